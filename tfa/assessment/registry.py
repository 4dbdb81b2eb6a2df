"""The steps an assessment runs, in order: the one list :func:`tfa.assess`, ``tfa assess`` and
the single-analysis commands read.

The order is the order of the summary, the report and the progress display. A new analysis is
one :class:`~tfa.assessment.step.Step` subclass and one :func:`register_step` line.
"""

from __future__ import annotations

from ..errors import InputError
from .step import Step
from .steps.binding import BindingStep
from .steps.budget import EnergyBudgetStep
from .steps.census import CensusStep
from .steps.coverage import CoverageStep
from .steps.couplings import FewestCouplingsStep
from .steps.currencies import CurrenciesStep
from .steps.route_comparison import RouteComparisonStep
from .steps.driving_force import DrivingForceStep
from .steps.feasibility import FeasibilityStep
from .steps.gradient import GradientStep
from .steps.hydrogen import H2ScanStep, H2ThresholdStep
from .steps.precursors import PrecursorStep
from .steps.margins import VerdictMarginStep
from .steps.profile import EnergyProfileStep
from .steps.ranges import RangesStep
from .steps.robustness import RobustnessStep

#: The registered steps, in the order they run.
STEPS: list[Step] = []


def register_step(step: Step, before: str | None = None) -> Step:
    """Add a step to the assessment (at the end, or before the step named ``before``).

    Raises
    ------
    InputError
        A step without an id, or with the id of a registered step.
    """
    if not step.id:
        raise InputError(f"step {type(step).__name__} has no id; give it a class attribute id")
    if any(s.id == step.id for s in STEPS):
        raise InputError(f"a step with id {step.id!r} is registered already")
    position = len(STEPS)
    if before is not None:
        position = [s.id for s in STEPS].index(get_step(before).id)
    STEPS.insert(position, step)
    return step


def unregister_step(step_id: str) -> None:
    """Remove a registered step (for tests and notebooks that add their own)."""
    STEPS[:] = [s for s in STEPS if s.id != step_id]


def get_step(step_id: str) -> Step:
    """The registered step with this id.

    Raises
    ------
    InputError
        For an unknown id, listing the registered ones.
    """
    for step in STEPS:
        if step.id == step_id:
            return step
    raise InputError(f"step '{step_id}' is not known; the steps are {', '.join(s.id for s in STEPS)}")


def step_ids() -> list[str]:
    """Ids of the registered steps, in order."""
    return [s.id for s in STEPS]


for _step in (CoverageStep(), FeasibilityStep(), CensusStep(), H2ScanStep(), H2ThresholdStep(),
              DrivingForceStep(), EnergyBudgetStep(), EnergyProfileStep(), RangesStep(),
              RobustnessStep()):
    register_step(_step)
register_step(GradientStep(), before="driving_force")
register_step(BindingStep(), before="energy_profile")   # after the answers it reads
register_step(PrecursorStep(), before="census")  # each precursor alone
register_step(VerdictMarginStep(), before="robustness")   # the distance to a flipped verdict
register_step(FewestCouplingsStep())   # energy coupling and routes
register_step(CurrenciesStep())        # energy coupling and routes
register_step(RouteComparisonStep())   # energy coupling and routes
