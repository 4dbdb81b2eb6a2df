"""Analyses on the thermodynamic flux problem, one per module; each returns a result dataclass
with ``to_frame()``, ``tables()`` (file stem -> table, columns from :mod:`tfa.vocabulary`),
``to_dict()``, the conditions, the data provenance and its certificates."""

from .budget import EnergyBudget, energy_budget
from .carbon_paths import CarbonRoutes, carbon_routes
from .census import CensusResult, census
from .driving_force import DrivingForceResult, network_driving_force, pathway_driving_force
from .feasibility import FeasibilityResult, feasibility
from .hydrogen import H2ScanResult, H2ThresholdResult, h2_scan, h2_threshold, h2_threshold_by_bisection
from .ranges import RangesResult, ranges
from .results import AnalysisResult
from .route import energy_profile, order_route, parse_route
from .demand import ImpossibleDemandError
from .uphill import UphillResult, minimal_uphill_set

__all__ = [
    "AnalysisResult", "CarbonRoutes", "CensusResult", "EnergyBudget", "DrivingForceResult", "FeasibilityResult", "H2ScanResult",
    "H2ThresholdResult", "ImpossibleDemandError", "RangesResult", "UphillResult", "carbon_routes", "census",
    "energy_budget", "energy_profile", "feasibility", "h2_scan", "h2_threshold", "h2_threshold_by_bisection",
    "minimal_uphill_set", "network_driving_force", "order_route", "parse_route",
    "pathway_driving_force", "ranges",
]
