"""What every step of an assessment shares: the inputs, the settings, the prepared networks per
mode, the answers other steps already computed, the notes and the progress display.

A :class:`RunContext` is made once per run (by :func:`tfa.assessment.run.run_steps`); steps ask it
for what they need (:meth:`RunContext.thermo_model`, :meth:`RunContext.feasibility`,
:meth:`RunContext.result_of`), so a question asked by two steps is answered once and the same
way, whether the step runs inside the whole assessment or alone as a command.
"""

from __future__ import annotations

import logging
import math
import time
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Callable

from ..errors import ComputationError, InputError, UndeterminedError
from ..modes import DEFAULT_MODE, STANDARD_MODES, parse_modes
from ..vocabulary import DEFAULT_ALTERNATIVES, DEFAULT_H2_LEVELS, DEFAULT_H2_RANGE

if TYPE_CHECKING:
    from ..analyses.feasibility import FeasibilityResult
    from ..network.inputs import Inputs
    from ..network.thermo_model import ThermoModel
    from ..problem.builder import ProblemOptions
    from ..thermo.database import ThermoDatabase
    from .step import Step

log = logging.getLogger(__name__)

#: progress(label, steps done, steps in all): what a display is told.
ProgressCallback = Callable[[str, int, int], None]
#: How an answer that does not apply begins (a mode needing a role the network lacks).
NOT_APPLICABLE = "not applicable"
#: Draws per mode of the robustness step of an assessment (a small run; about 1.5 s per draw on
#: the bundled network; ``tfa robustness`` runs large ones).
ASSESSMENT_DRAWS = 4


@dataclass
class Settings:
    """The choices of a run, validated once.

    Attributes
    ----------
    modes : list of str
        Modes of the per-mode questions (feasibility, census, robustness).
    mode : str
        Mode of the single-mode analyses (H2 scan and threshold, driving force, profile, ranges).
    alternatives : int
        Alternative minimal uphill sets per mode.
    h2_range : (float, float)
        H2 searched [mol/L dissolved; bar for a gas feed].
    h2_levels : int
        Levels of the H2 scan, log-spaced over ``h2_range``.
    h2_values : list of float, optional
        Explicit scan levels (replace ``h2_levels``).
    route : list of (str, int), optional
        A route named by the user: (reaction id, +1 or -1) in order.
    ranges_reactions : list of str, optional
        Reactions whose ranges are computed (default every reaction with an energy).
    ranges_compounds : bool
        Also range every concentration.
    ratio : float
        Substrate:product ratio of the census's third reference state.
    draws : int
        Draws of the energies per mode for the robustness step (0: skip it).
    seed : int
        Seed of the draws.
    workers : int
        Worker processes for many independent solves (1: in this process).
    include_unreviewed : bool
        Use data from sources that are not peer reviewed too.
    scan_uphill : bool
        The size of the minimal uphill set at infeasible H2 levels.
    """

    modes: list[str] = field(default_factory=lambda: list(STANDARD_MODES))
    mode: str = DEFAULT_MODE
    alternatives: int = DEFAULT_ALTERNATIVES
    h2_range: tuple[float, float] = DEFAULT_H2_RANGE
    h2_levels: int = DEFAULT_H2_LEVELS
    h2_values: list[float] | None = None
    route: list[tuple[str, int]] | None = None
    ranges_reactions: list[str] | None = None
    ranges_compounds: bool = False
    ratio: float = 100.0
    draws: int = ASSESSMENT_DRAWS
    seed: int = 0
    workers: int = 1
    include_unreviewed: bool = False
    scan_uphill: bool = True

    def __post_init__(self) -> None:
        self.modes = parse_modes(self.modes)
        self.mode = parse_modes([self.mode])[0]
        if isinstance(self.alternatives, bool) or not isinstance(self.alternatives, int) \
                or self.alternatives < 1:
            raise InputError(f"alternatives {self.alternatives!r}: give a whole number of at "
                             "least 1")
        low, high = (float(v) for v in self.h2_range)
        if not (math.isfinite(low) and math.isfinite(high) and 0 < low < high):
            raise InputError(f"H2 range {self.h2_range}: need 0 < low < high (mol/L; gas: bar)")
        self.h2_range = (low, high)
        if not isinstance(self.h2_levels, int) or self.h2_levels < 1:
            raise InputError(f"H2 levels {self.h2_levels!r}: give a whole number of at least 1")
        if self.h2_values is not None:
            values = [float(v) for v in self.h2_values]
            if not values or any(not (math.isfinite(v) and v > 0) for v in values):
                raise InputError("H2 levels must be positive, finite concentrations (mol/L; gas: bar)")
            self.h2_values = values
        if not (math.isfinite(self.ratio) and self.ratio > 0):
            raise InputError(f"substrate:product ratio {self.ratio!r}: give a positive number")
        if isinstance(self.draws, bool) or not isinstance(self.draws, int) or self.draws < 0:
            raise InputError(f"draws {self.draws!r}: give 0 (skip) or a whole number of draws")
        if isinstance(self.seed, bool) or not isinstance(self.seed, int) or self.seed < 0:
            raise InputError(f"seed {self.seed!r}: give a whole number >= 0")
        if isinstance(self.workers, bool) or not isinstance(self.workers, int) or self.workers < 1:
            raise InputError(f"workers {self.workers!r}: give a whole number of at least 1")

    def scan_levels(self) -> list[float]:
        """The H2 levels of the scan [mol/L; gas: bar]."""
        from ..analyses.hydrogen import scan_levels

        return self.h2_values or scan_levels(self.h2_range, self.h2_levels)


class RunContext:
    """The shared state of one run of steps (see the module docstring).

    Parameters
    ----------
    inputs : Inputs
        The network and environment, with where they came from.
    settings : Settings
    options : ProblemOptions
        Solver, least driving force, k σ, unknown-energy policy, time limit.
    progress : callable, optional
        ``progress(label, steps done, steps in all)``.
    """

    def __init__(self, inputs: "Inputs", settings: Settings, options: "ProblemOptions",
                 progress: ProgressCallback | None = None) -> None:
        self.inputs = inputs
        self.settings = settings
        self.options = options
        self.progress = progress
        self.notes: list[str] = []
        self.results: dict[str, Any] = {}
        self.timings: dict[str, float] = {}
        self.steps_total = 0
        self.steps_done = 0
        self.current_label = ""
        self._database: "ThermoDatabase | None" = None
        self._thermo_models: dict[str, "ThermoModel"] = {}
        self._feasibility: dict[str, "FeasibilityResult"] = {}
        self._steps: dict[str, "Step"] = {}
        self._cache: dict[str, Any] = {}

    # ------------------------------------------------------------------ shared answers
    @property
    def model(self):
        """The network as read (a cobra model; never rewritten in place)."""
        return self.inputs.model

    @property
    def environment(self):
        """The setting (an :class:`~tfa.network.environment.Environment`)."""
        return self.inputs.environment

    @property
    def database(self) -> "ThermoDatabase":
        """The thermodynamic database (reviewed sources only unless asked otherwise)."""
        if self._database is None:
            from ..thermo.database import ThermoDatabase

            self._database = ThermoDatabase.load(include_unreviewed=self.settings.include_unreviewed)
        return self._database

    def thermo_model(self, mode: str) -> "ThermoModel":
        """The network rewritten for ``mode`` with its energies at the environment (prepared once
        per run, on a copy of the network)."""
        if mode not in self._thermo_models:
            from ..network.energies import prepare

            self._thermo_models[mode] = prepare(self.model, self.environment, mode,
                                                db=self.database,
                                                literature=self.literature())
        return self._thermo_models[mode]

    def literature(self):
        """The network's own reaction values (a path), or None: the library's values over its
        compounds (:mod:`tfa.network.library_values`). One rule for every step."""
        return self.inputs.literature_path or None

    # ------------------------------------------------------------------ what applies
    def not_applicable(self, mode: str) -> str:
        """Why ``mode`` cannot be asked of this network ("" when it can): a role it needs
        that the network lacks (:attr:`tfa.modes.Mode.needs`), or no demand at all."""
        def reason() -> str:
            from ..modes import get_mode
            from ..network.role_inference import missing_needs, not_applicable_reason

            if not self.environment.demand_reaction:
                return ("no demand reaction; name one with --demand ID or in the environment's "
                        "[demand]")
            return not_applicable_reason(missing_needs(self.model, get_mode(mode).needs))

        return self.cached(f"not_applicable:{mode}", reason)

    def applicable(self, modes: list[str]) -> list[str]:
        """The modes of ``modes`` that this network can be asked."""
        return [m for m in modes if not self.not_applicable(m)]

    def skipped_as_not_applicable(self, what: str, mode: str | None = None) -> bool:
        """True (and a note) when the single-mode analysis ``what`` does not apply in ``mode``
        (default the analysis mode)."""
        mode = mode or self.settings.mode
        reason = self.not_applicable(mode)
        if reason:
            self.note(f"{what} ({mode} mode): not applicable: {reason}")
        return bool(reason)

    def h2_id(self) -> str | None:
        """The network's H2 compound: the one with the role h2 (declared, inferred or named
        with --h2), or None."""
        from ..network.roles import single_with_role

        met = single_with_role(self.model, "h2")
        return met.id if met is not None else None

    def constrained(self, mode: str) -> tuple[int, int]:
        """(reactions with an energy, reactions in all) of the network in ``mode``: the internal
        reactions, the demand not counted."""
        tm = self.thermo_model(mode)
        internal = [r.id for r in tm.internal_reactions() if r.id != tm.demand_id]
        return sum(1 for rid in internal if rid in tm.energies), len(internal)

    def feasibility(self, mode: str) -> "FeasibilityResult":
        """Feasibility of ``mode`` with up to ``alternatives`` minimal uphill sets as the
        diagnosis (computed once per run); a solver that stops without an answer gives a result
        whose message says "undetermined"; a mode that does not apply, one that says "not
        applicable" and why (nothing is solved)."""
        if mode not in self._feasibility:
            from ..analyses.feasibility import FeasibilityResult, feasibility

            reason = self.not_applicable(mode)
            if reason:
                self._feasibility[mode] = FeasibilityResult(
                    conditions=self.environment.conditions, mode=mode, feasible=False,
                    message=f"{NOT_APPLICABLE}: {reason}")
                return self._feasibility[mode]
            tm = self.thermo_model(mode)
            try:
                result = feasibility(tm, self.options, alternatives=self.settings.alternatives)
            except UndeterminedError as err:
                result = FeasibilityResult(conditions=tm.conditions, mode=mode, feasible=False,
                                           message=f"undetermined: {err}")
            self._feasibility[mode] = result
        return self._feasibility[mode]

    def result_of(self, step_id: str) -> Any:
        """The result of another step of this run, running it first when it has not run (a step
        that depends on another's answer asks for it here)."""
        if step_id not in self.results:
            from .registry import get_step

            step = self._steps.get(step_id) or get_step(step_id)
            self.results[step_id] = step.run(self)
        return self.results[step_id]

    def cached(self, key: str, compute: Callable[[], Any]) -> Any:
        """A value computed once per run and shared by the steps that need it."""
        if key not in self._cache:
            self._cache[key] = compute()
        return self._cache[key]

    def attempt(self, what: str, call: Callable[[], Any]) -> Any:
        """Run one computation; a computation error becomes a note and None (bad input is
        raised)."""
        try:
            return call()
        except InputError:
            raise
        except ComputationError as err:
            log.warning("%s: %s", what, err)
            self.notes.append(f"{what}: not computed ({err})")
            return None

    def note(self, text: str) -> None:
        """Add a remark for the summary and the report."""
        if text not in self.notes:
            self.notes.append(text)

    # ------------------------------------------------------------------ progress
    def begin(self, label: str) -> None:
        """A new step starts (shown on the progress display)."""
        self.current_label = label
        log.info("step: %s", label)
        if self.progress is not None:
            self.progress(label, self.steps_done, max(self.steps_total, 1))

    def tick(self, done: int, total: int, unit: str) -> None:
        """Progress inside the current step: ``done`` of ``total`` ``unit`` (e.g. levels)."""
        if self.progress is not None:
            self.progress(f"{self.current_label}: {done}/{total} {unit}", self.steps_done,
                          max(self.steps_total, 1))

    def ticker(self, unit: str) -> Callable[[int, int], None]:
        """A ``(done, total)`` callback for an analysis, shown as progress of the current step."""
        return lambda done, total: self.tick(done, total, unit)

    def timed(self, step: "Step") -> Any:
        """Run a step (once), record its time and result."""
        self._steps[step.id] = step
        started = time.monotonic()
        self.begin(step.label)
        if step.id not in self.results:
            self.results[step.id] = step.run(self)
        self.timings[step.id] = round(time.monotonic() - started, 2)
        self.steps_done += 1
        return self.results[step.id]
