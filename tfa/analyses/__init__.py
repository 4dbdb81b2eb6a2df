"""Analyses on the thermodynamic flux problem; each returns a result dataclass with
``to_frame()``, ``to_dict()``, the conditions, the data provenance and its certificates."""

from .census import CensusResult, census, census_by_mode
from .driving_force import DrivingForceResult, network_driving_force, pathway_driving_force
from .feasibility import FeasibilityResult, ModeFeasibilityResult, feasibility, feasibility_by_mode
from .hydrogen import H2ScanResult, H2ThresholdResult, h2_scan, h2_threshold, h2_threshold_by_bisection
from .ranges import RangesResult, ranges
from .results import AnalysisResult
from .uphill import ImpossibleDemandError, UphillResult, minimal_uphill_set

__all__ = [
    "AnalysisResult", "CensusResult", "DrivingForceResult", "FeasibilityResult", "H2ScanResult",
    "H2ThresholdResult", "ImpossibleDemandError", "ModeFeasibilityResult", "RangesResult",
    "UphillResult", "census", "census_by_mode", "feasibility", "feasibility_by_mode", "h2_scan",
    "h2_threshold", "h2_threshold_by_bisection", "minimal_uphill_set", "network_driving_force",
    "pathway_driving_force", "ranges",
]
