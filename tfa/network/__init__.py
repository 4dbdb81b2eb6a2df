"""The network layer: reaction networks as cobra models, read from our tables, SBML or cobra JSON;
balance checks; the rewrites the modes are made of (:mod:`tfa.modes`); the environment a network lives in.

Main entry points::

    from tfa.network import read_network, load_network, write_network, balance_report
    from tfa.network import apply_mode, Environment, load_bundled_network, bundled_environment
"""

from .bundled import bundled_environment_path, bundled_folder, load_bundled_network
from .checks import balance_report, is_boundary_reaction, require_balanced_network
from .environment import Environment, bundled_environment
from .io_sbml import load_network, read_cobra_json, read_sbml, save_network, write_cobra_json, write_sbml
from .io_table import read_network, write_network
from .rewrites import (RewriteSummary, apply_mode, h2_only, native, no_atp_bare_chemistry,
                       no_atp_strict)

__all__ = [
    "Environment", "RewriteSummary", "apply_mode", "balance_report", "bundled_environment",
    "bundled_environment_path", "bundled_folder", "h2_only", "is_boundary_reaction", "load_bundled_network",
    "load_network", "native", "no_atp_bare_chemistry", "no_atp_strict", "read_cobra_json", "read_network",
    "read_sbml", "require_balanced_network", "save_network", "write_cobra_json", "write_network",
    "write_sbml",
]
