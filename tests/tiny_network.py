"""The tiny network of tests/test_network_energies.py as files, for the tests that need it on
disk (one definition of its tables for every test file)."""

from __future__ import annotations

import importlib.util
from pathlib import Path


def tiny_tables():
    """The module of tests/test_network_energies.py (COMPOUNDS, REACTIONS, VALUES)."""
    spec = importlib.util.spec_from_file_location(
        "_tiny_network", Path(__file__).with_name("test_network_energies.py"))
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def write_tiny_network(folder: Path) -> Path:
    """compounds.tsv, reactions.tsv and reaction_values.tsv of the tiny network in ``folder``."""
    tiny = tiny_tables()
    (folder / "compounds.tsv").write_text(tiny.COMPOUNDS)
    (folder / "reactions.tsv").write_text(tiny.REACTIONS)
    (folder / "reaction_values.tsv").write_text(tiny.VALUES)
    return folder
