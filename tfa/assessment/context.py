"""What every step of an assessment shares: the inputs, the settings, the prepared networks per
mode, the answers other steps already computed, the notes and the progress display.

A :class:`RunContext` is made once per run (by :func:`tfa.assessment.run.run_steps`); steps ask it
for what they need (:meth:`RunContext.thermo_model`, :meth:`RunContext.feasibility`,
:meth:`RunContext.result_of`), so a question asked by two steps is answered once and the same
way, whether the step runs inside the whole assessment or alone as a command.
"""

from __future__ import annotations

import contextlib
import logging
import time
import warnings
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Callable, Iterator

from ..conditions import ModelRangeWarning
from ..errors import ComputationError, InputError, UndeterminedError
from ..modes import DEFAULT_MODE, STANDARD_MODES, parse_modes
from ..util.numbers import (MAX_ALTERNATIVES, MAX_DRAWS, MAX_H2_LEVELS, MAX_SEED, MAX_WORKERS,
                            read_activity, read_count, read_number)
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
#: Draws per mode of the robustness step of an assessment (a first look, the most it draws;
#: ``tfa robustness`` runs large ones; the command-line default in tfa.cli.options is the same).
#: 40: with the draws answered on one reused problem (tfa.analyses.draws) they cost about what
#: 12 fresh builds did, and a Wilson interval of 40 draws is about half as wide.
ASSESSMENT_DRAWS = 40
#: Width at which the assessment's draws stop (sequential stopping).
ASSESSMENT_INTERVAL_WIDTH = 0.3


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
        Draws of the energies per mode for the robustness step, at most (0: skip it).
    interval_width : float
        The draws stop once every 95 % Wilson interval is at most this wide (0: exactly
        ``draws``).
    seed : int
        Seed of the draws.
    workers : int
        Worker processes for many independent solves (1: in this process).
    include_unreviewed : bool
        Use data from sources that are not peer reviewed too.
    scan_uphill : bool
        The size of the minimal uphill set at infeasible H2 levels.
    route_file : str, optional
        Route file of the route comparison (default ``routes.toml`` beside the network, else one
        route per carbon-fixing pathway tag).
    coupling_objective : str
        Objective of the fewest-couplings step: ``count`` or ``energy``
        (:data:`tfa.analyses.couplings.COUPLING_OBJECTIVES`).
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
    interval_width: float = ASSESSMENT_INTERVAL_WIDTH
    seed: int = 0
    workers: int = 1
    include_unreviewed: bool = False
    scan_uphill: bool = True
    coupling_objective: str = "count"
    route_file: str | None = None

    def __post_init__(self) -> None:
        self.modes = parse_modes(self.modes)
        self.mode = parse_modes([self.mode])[0]
        self.alternatives = read_count(self.alternatives, "alternatives", maximum=MAX_ALTERNATIVES,
                                       text=False)
        if not isinstance(self.h2_range, (list, tuple)) or len(self.h2_range) != 2:
            raise InputError(f"H2 range {self.h2_range!r}: give (low, high) in mol/L (gas: bar)")
        low, high = (read_activity(v, "H2 range") for v in self.h2_range)
        if not low < high:
            raise InputError(f"H2 range {self.h2_range}: need 0 < low < high (mol/L; gas: bar)")
        self.h2_range = (low, high)
        self.h2_levels = read_count(self.h2_levels, "H2 levels", maximum=MAX_H2_LEVELS,
                                    text=False)
        if self.h2_values is not None:
            values = [read_activity(v, "H2 level") for v in self.h2_values]
            if not values or len(values) > MAX_H2_LEVELS:
                raise InputError(f"H2 levels: give 1 to {MAX_H2_LEVELS} concentrations (mol/L; "
                                 "gas: bar)")
            self.h2_values = values
        self.ratio = read_number(self.ratio, "substrate:product ratio", above=0.0)
        self.draws = read_count(self.draws, "draws", minimum=0, maximum=MAX_DRAWS, text=False)
        self.interval_width = read_number(self.interval_width, "interval width", minimum=0.0,
                                          maximum=1.0)
        self.seed = read_count(self.seed, "seed", minimum=0, maximum=MAX_SEED, text=False)
        self.workers = read_count(self.workers, "workers", maximum=MAX_WORKERS, text=False)
        if self.coupling_objective not in ("count", "energy"):
            raise InputError(f"coupling objective {self.coupling_objective!r}: use count or energy")
        if self.route is not None and not isinstance(self.route, list):
            raise InputError(f"route {self.route!r}: give a list of (reaction id, +1 or -1)")
        if self.ranges_reactions is not None and (
                isinstance(self.ranges_reactions, str)
                or not all(isinstance(r, str) for r in self.ranges_reactions)):
            raise InputError("ranges_reactions: give a list of reaction ids")

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
        #: Conditions past a model's usual range (ModelRangeWarning), for the summary and report.
        self.warnings: list[str] = list(getattr(inputs, "warnings", []) or [])
        #: Answers a solver could not give in time ("undetermined": exit code 1).
        self.undetermined: list[str] = []
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
        # every key of the environment names something in the network (a typo is an error)
        inputs.environment.check_network(inputs.model)

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
            from ..analyses.set_order import COUNT_LIMIT

            reason = self.not_applicable(mode)
            if reason:
                self._feasibility[mode] = FeasibilityResult(
                    conditions=self.environment.conditions, mode=mode, feasible=False,
                    message=f"{NOT_APPLICABLE}: {reason}")
                return self._feasibility[mode]
            tm = self.thermo_model(mode)
            try:
                result = feasibility(tm, self.options, alternatives=self.settings.alternatives,
                                     count_limit=COUNT_LIMIT,
                                     progress=lambda text: self.detail(f"{mode}: {text}"))
            except UndeterminedError as err:
                result = FeasibilityResult(conditions=tm.conditions, mode=mode, feasible=False,
                                           message=f"undetermined: {err}")
                self.undetermined.append(f"feasibility ({mode})")
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
            if isinstance(err, UndeterminedError):
                self.undetermined.append(what)
            return None

    @contextlib.contextmanager
    def recording_warnings(self) -> Iterator[None]:
        """Record every model-range warning raised inside (and let it be shown as usual)."""
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", ModelRangeWarning)
            yield
        for item in caught:
            if issubclass(item.category, ModelRangeWarning):
                text = str(item.message)
                if text not in self.warnings:
                    self.warnings.append(text)
                    warnings.warn_explicit(item.message, item.category, item.filename, item.lineno)
            else:
                warnings.warn_explicit(item.message, item.category, item.filename, item.lineno)

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

    def detail(self, text: str) -> None:
        """Progress inside the current step in words (``text`` after the step's label)."""
        if self.progress is not None:
            self.progress(f"{self.current_label}: {text}", self.steps_done,
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
            with self.recording_warnings():
                self.results[step.id] = step.run(self)
        self.timings[step.id] = round(time.monotonic() - started, 2)
        self.steps_done += 1
        return self.results[step.id]
