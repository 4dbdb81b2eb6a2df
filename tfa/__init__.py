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


def __getattr__(name: str) -> Any:
    if name in _EXPORTS:
        import importlib

        module_name, attribute = _EXPORTS[name]
        return getattr(importlib.import_module(module_name), attribute)
    raise AttributeError(f"module 'tfa' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
