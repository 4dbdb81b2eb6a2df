"""Safe file writing: every file is written to a temporary name in the same folder and renamed
into place, so an interrupted run never leaves half a file, and nothing already written is lost.
"""

from __future__ import annotations

import contextlib
import json
import os
import tempfile
from pathlib import Path
from typing import Any, Iterator


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
