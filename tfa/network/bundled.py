"""Where the bundled network and environment live: ``models/ancestral_core/`` of the repository,
shipped inside the package as ``tfa.models``.
"""

from __future__ import annotations

import importlib.resources
from pathlib import Path

import cobra

from ..errors import NetworkFileError

BUNDLED_NAME = "ancestral_core"


def bundled_folder(name: str = BUNDLED_NAME) -> Path:
    """The folder of a bundled network (``tfa.models/<name>``), as a file-system path."""
    root = importlib.resources.files("tfa.models")
    folder = Path(str(root / name))
    if not folder.is_dir():
        raise NetworkFileError(
            f"bundled network '{name}' not found at {folder}; reinstall tfa or give your own network files"
        )
    return folder


def bundled_reactions_path(name: str = BUNDLED_NAME) -> Path:
    """``reactions.tsv`` of the bundled network."""
    return bundled_folder(name) / "reactions.tsv"


def bundled_compounds_path(name: str = BUNDLED_NAME) -> Path:
    """``compounds.tsv`` of the bundled network."""
    return bundled_folder(name) / "compounds.tsv"


def bundled_environment_path(name: str = BUNDLED_NAME) -> Path:
    """``environment.toml`` of the bundled network (the Kestrel Ridge vent field)."""
    return bundled_folder(name) / "environment.toml"


def load_bundled_network(name: str = BUNDLED_NAME) -> cobra.Model:
    """Read the bundled network (checked: every internal reaction balances)."""
    from .io_table import read_network

    return read_network(bundled_reactions_path(name), bundled_compounds_path(name), model_id=name)


#: The starter network ``tfa new-network`` writes (the example of docs/formats.md).
STARTER_NAME = "starter"
#: Its files, in the order they are written.
STARTER_FILES = ("compounds.csv", "reactions.csv", "environment.toml")


def write_starter_network(folder: str | Path) -> list[Path]:
    """Write the starter network (its compounds and reactions tables and its environment, demo
    data of an invented setting) into ``folder``, created if needed; returns the files written.

    Raises
    ------
    NetworkFileError
        When ``folder`` is a file, or already holds one of the files (nothing is overwritten).
    """
    from ..util.files import write_text

    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise NetworkFileError(f"{folder}: exists and is not a folder; give a new or empty folder")
    taken = [name for name in STARTER_FILES if (folder / name).exists()]
    if taken:
        raise NetworkFileError(f"{folder}: already holds {', '.join(taken)}; give a new folder "
                               "(nothing was overwritten)")
    source = bundled_folder(STARTER_NAME)
    return [write_text(folder / name, (source / name).read_text(encoding="utf-8"))
            for name in STARTER_FILES]
