"""tfa: thermodynamic feasibility of ancestral reaction networks.

For notebooks (imports are lazy, so ``import tfa`` stays fast)::

    import tfa
    result = tfa.assess()                    # bundled network, its environment
    network = tfa.load_network("my/reactions.tsv")
    environment = tfa.load_environment("my/vent.toml")
    db = tfa.ThermoDatabase.load()
"""

from __future__ import annotations

from typing import Any

__version__ = "0.1.0"

#: Names re-exported lazily: name -> (module, attribute).
_EXPORTS = {
    "assess": ("tfa.assessment.run", "assess"),
    "Assessment": ("tfa.assessment.result", "Assessment"),
    "Step": ("tfa.assessment.step", "Step"),
    "register_step": ("tfa.assessment.registry", "register_step"),
    "load_network": ("tfa.network.inputs", "load_network"),
    "load_environment": ("tfa.network.inputs", "load_environment"),
    "ThermoDatabase": ("tfa.thermo.database", "ThermoDatabase"),
    "Conditions": ("tfa.conditions", "Conditions"),
    "ProblemOptions": ("tfa.problem.options", "ProblemOptions"),
    "MODES": ("tfa.modes", "MODES"),
}

__all__ = ["__version__", *_EXPORTS]


def _usable_cache_home() -> None:
    """cobra creates its model cache (``$XDG_CACHE_HOME`` or ``~/.cache``) when it is first
    imported and fails on a read-only or missing home; give it a folder of its own in the
    temporary folder then (tfa uses no cached model)."""
    import os
    import tempfile
    from pathlib import Path

    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    folder = Path(base) / "cobrapy"
    try:
        folder.mkdir(parents=True, exist_ok=True)
        if os.access(folder, os.W_OK):
            return
    except OSError:
        pass
    fallback = Path(tempfile.gettempdir()) / f"tfa-cache-{os.getuid() if hasattr(os, 'getuid') else 0}"
    fallback.mkdir(mode=0o700, exist_ok=True)
    os.environ["XDG_CACHE_HOME"] = str(fallback)


_usable_cache_home()


def __getattr__(name: str) -> Any:
    if name in _EXPORTS:
        import importlib

        module_name, attribute = _EXPORTS[name]
        return getattr(importlib.import_module(module_name), attribute)
    raise AttributeError(f"module 'tfa' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
