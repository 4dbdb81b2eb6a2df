"""Safe file reading and writing.

Reading: every file ``tfa`` reads because an input names it passes one gate
(:func:`check_input_file`, :func:`read_input_text`): it must be a regular file (not a device,
a pipe or a folder) of at most :data:`MAX_INPUT_BYTES`, UTF-8 text with or without a byte-order
mark. A file named *inside* another input (a note of an SBML file) is read only within that
file's folder (:func:`confined_file`).

Writing: every file is written to a temporary name in the same folder and renamed into place, so
an interrupted run never leaves half a file (whole output folders: :mod:`tfa.util.outdir`).
"""

from __future__ import annotations

import contextlib
import json
import os
import stat
import tempfile
from pathlib import Path
from typing import Any, Iterator

from ..errors import InputError

#: Largest input file read, bytes (the tables or SBML of a genome-scale network are a few MB).
MAX_INPUT_BYTES = 64 * 2**20


def check_input_file(path: str | os.PathLike, what: str = "input file") -> Path:
    """``path`` when it is a regular file of at most :data:`MAX_INPUT_BYTES`, else an
    :class:`~tfa.errors.InputError` that says why (a device such as ``/dev/zero``, a pipe such as
    ``/dev/stdin`` or a folder is never read).

    >>> check_input_file("/dev/zero", "reaction values")
    Traceback (most recent call last):
    ...
    tfa.errors.InputError: /dev/zero: the reaction values is not a regular file (a device, a pipe or a folder); give the path of a file
    """
    path = Path(path)
    try:
        info = path.stat()
    except FileNotFoundError:
        raise InputError(f"{path}: no such {what}; give the path of an existing file") from None
    except OSError as err:
        raise InputError(f"{path}: the {what} cannot be read ({err.strerror or err})") from None
    if not stat.S_ISREG(info.st_mode):
        raise InputError(f"{path}: the {what} is not a regular file (a device, a pipe or a "
                         "folder); give the path of a file")
    if info.st_size > MAX_INPUT_BYTES:
        raise InputError(f"{path}: the {what} has {info.st_size:,} bytes, more than the "
                         f"{MAX_INPUT_BYTES // 2**20} MiB an input may have; give a smaller file")
    return path


def read_input_text(path: str | os.PathLike, what: str = "input file") -> str:
    r"""The text of an input file that passes :func:`check_input_file`, decoded as UTF-8 (a
    byte-order mark is dropped).

    >>> import tempfile, pathlib
    >>> f = pathlib.Path(tempfile.mkdtemp()) / "t.tsv"
    >>> _ = f.write_bytes(b"\xef\xbb\xbfid\tname\n")
    >>> read_input_text(f)
    'id\tname\n'
    """
    path = check_input_file(path, what)
    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_INPUT_BYTES + 1)
    except OSError as err:
        raise InputError(f"{path}: the {what} cannot be read ({err.strerror or err})") from None
    if len(data) > MAX_INPUT_BYTES:
        raise InputError(f"{path}: the {what} is larger than {MAX_INPUT_BYTES // 2**20} MiB; give "
                         "a smaller file")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as err:
        raise InputError(f"{path}: the {what} is not UTF-8 text (byte {err.start}); save it as "
                         "UTF-8") from None


def confined_file(name: str, folder: str | os.PathLike, what: str, where: str) -> Path:
    """The file a note of an input file names (``name``, relative to ``folder``, the folder of
    that input file), refused when it leaves ``folder`` (an absolute path, ``..``, a symbolic link
    out) or fails :func:`check_input_file`.

    >>> confined_file("/etc/hostname", "/tmp", "reaction values", "net.xml")
    Traceback (most recent call last):
    ...
    tfa.errors.InputError: net.xml: the reaction values it names ('/etc/hostname') lie outside its folder /tmp; files named inside an input are read only from that input's folder
    """
    base = Path(folder).resolve()
    text = str(name).strip()
    shown = text if len(text) <= 80 else text[:77] + "..."
    if not text or "\x00" in text:
        raise InputError(f"{where}: the {what} it names ({shown!r}) is no file name")
    target = (base / text).resolve()
    if target != base and base not in target.parents:
        raise InputError(f"{where}: the {what} it names ({shown!r}) lie outside its folder {base}; "
                         "files named inside an input are read only from that input's folder")
    return check_input_file(target, what)


def _umask() -> int:
    """The process's file-creation mask (read without changing it where the system allows)."""
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


@contextlib.contextmanager
def atomic_path(path: str | os.PathLike) -> Iterator[Path]:
    """Yield a temporary path beside ``path``; on success rename it onto ``path``.

    On error the temporary file is removed and ``path`` is left as it was.

    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> with atomic_path(d / "a.txt") as tmp:
    ...     _ = tmp.write_text("hello")
    >>> (d / "a.txt").read_text(), sorted(p.name for p in d.iterdir())
    ('hello', ['a.txt'])
    """
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=target.parent)
    os.close(fd)
    tmp = Path(tmp_name)
    os.chmod(tmp, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode of a new file
    try:
        yield tmp
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            tmp.unlink()
        raise


def write_text(path: str | os.PathLike, text: str) -> Path:
    """Write text atomically; return the path."""
    with atomic_path(path) as tmp:
        tmp.write_text(text, encoding="utf-8")
    return Path(path)


def write_bytes(path: str | os.PathLike, data: bytes) -> Path:
    """Write bytes atomically; return the path."""
    with atomic_path(path) as tmp:
        tmp.write_bytes(data)
    return Path(path)


def write_json(path: str | os.PathLike, obj: Any) -> Path:
    """Write JSON atomically (indented, NaN written as null); return the path."""
    return write_text(path, to_json(obj) + "\n")


def _clean(obj: Any) -> Any:
    """Make an object JSON-safe: NaN/inf become None, numpy scalars become Python numbers."""
    import math

    import numpy as np

    if isinstance(obj, dict):
        return {str(k): _clean(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_clean(v) for v in obj]
    if isinstance(obj, np.ndarray):
        return [_clean(v) for v in obj.tolist()]
    if isinstance(obj, np.generic):
        obj = obj.item()
    if isinstance(obj, float) and not math.isfinite(obj):
        return None
    return obj


def to_json(obj: Any) -> str:
    """Serialise to JSON text with NaN and infinities as ``null``."""
    return json.dumps(_clean(obj), indent=2, allow_nan=False, default=str)
