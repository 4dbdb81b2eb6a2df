"""The run loop: read the inputs, run the steps in order, return an :class:`Assessment`.

:func:`assess` is the whole job for notebooks and ``tfa assess``; :func:`run_steps` runs any list
of registered steps (the single-analysis commands run one). Both validate every input before
anything is computed or written.
"""

from __future__ import annotations

import contextlib
import os
import time
import warnings
from pathlib import Path
from typing import Any, Sequence

from ..errors import InputError
from ..modes import DEFAULT_MODE, STANDARD_MODES
from ..util.outdir import check_output_folder, output_lock
from ..vocabulary import DEFAULT_ALTERNATIVES, DEFAULT_H2_LEVELS, DEFAULT_H2_RANGE
from .context import ASSESSMENT_DRAWS, ASSESSMENT_INTERVAL_WIDTH, ProgressCallback, RunContext, Settings
from .registry import STEPS, get_step
from .result import Assessment
from .step import Step

#: Default output folder of :func:`assess` and ``tfa assess``.
DEFAULT_OUT = "tfa-results"
#: Label of the progress display while the files are written.
WRITING = "writing files"


def run_steps(steps: Sequence[Step], inputs: Any, settings: Settings, options: Any = None,
              progress: ProgressCallback | None = None, out: str | Path | None = None,
              report: bool = True, command: str = "assess") -> Assessment:
    """Run ``steps`` in order on one shared context; write the files to ``out`` when given.

    Parameters
    ----------
    steps : sequence of Step
    inputs : Inputs
        From :func:`tfa.network.inputs.resolve_inputs`.
    settings : Settings
    options : ProblemOptions, optional
    progress : callable, optional
        ``progress(label, steps done, steps in all)``.
    out : path, optional
        Folder for every file (see :meth:`Assessment.write`).
    report : bool
        Also write ``summary.json`` and ``report.html`` into ``out``.
    command : str
        Recorded in the output folder's marker.
    """
    from ..problem.builder import ProblemOptions

    if options is None:
        options = ProblemOptions()
    elif not isinstance(options, ProblemOptions):
        raise InputError(f"options: expected a ProblemOptions, got {type(options).__name__}")
    check_route(settings.route, inputs.model)
    if progress is not None and not callable(progress):
        raise InputError(f"progress: expected a function progress(label, done, total), got "
                         f"{type(progress).__name__}")
    ctx = RunContext(inputs, settings, options, progress)
    ctx.steps_total = len(steps) + (1 if out is not None else 0)
    result = Assessment(ctx, list(steps))
    # the output folder is checked and locked before anything is computed
    with output_lock(out, "out") if out is not None else contextlib.nullcontext():
        for step in steps:
            ctx.timed(step)
        if out is not None:
            started = time.monotonic()
            ctx.begin(WRITING)
            result.write(out, report=report, command=command)
            ctx.timings["writing_files"] = round(time.monotonic() - started, 2)
            ctx.steps_done += 1
    return result


def check_route(route: list[tuple[str, int]] | None, model) -> None:
    """Refuse a route that names reactions the network does not have."""
    if route is None:
        return
    unknown = [rid for rid, _ in route if rid not in model.reactions]
    if unknown:
        raise InputError(f"route: reaction(s) {', '.join(unknown)} not in network {model.id}; "
                         "give ids of its reactions, separated by commas")


def select_steps(skip: Sequence[str] = (), only: Sequence[str] | None = None) -> list[Step]:
    """The registered steps, without those in ``skip`` (or only those in ``only``), in order.

    Raises
    ------
    InputError
        For a step id that is not registered.
    """
    for step_id in [*skip, *(only or [])]:
        get_step(step_id)
    chosen = [s for s in STEPS if s.id not in set(skip)]
    if only is not None:
        chosen = [s for s in chosen if s.id in set(only)]
    return chosen


def assess(network: Any = None, environment: Any = None, out: str | Path | None = None, *,
           modes: Sequence[str] = STANDARD_MODES, mode: str = DEFAULT_MODE, options: Any = None,
           route: str | Sequence[str] | None = None,
           h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
           h2_levels: int | Sequence[float] = DEFAULT_H2_LEVELS,
           alternatives: int = DEFAULT_ALTERNATIVES, ranges_compounds: bool = False,
           draws: int = ASSESSMENT_DRAWS, seed: int = 0, workers: int = 1,
           interval_width: float = ASSESSMENT_INTERVAL_WIDTH,
           compounds: str | Path | None = None, include_unreviewed: bool = False,
           conditions: dict[str, float | None] | None = None, skip: Sequence[str] = (),
           progress: ProgressCallback | None = None, **deprecated: Any) -> Assessment:
    """Assess a network at a setting: every registered step, optionally written to ``out``.

    Parameters
    ----------
    network : None, path or cobra.Model
        None: the bundled network (demo data).
    environment : None, path or Environment
        None: ``environment.toml`` beside the network, else the bundled one.
    out : path, optional
        Folder to write every file into (see :meth:`Assessment.write`); None writes nothing.
    modes : sequence of str
        Modes of the per-mode questions (:data:`tfa.modes.STANDARD_MODES` by default).
    mode : str
        Mode of the H2 scan, threshold, driving force, energy profile and ranges.
    options : ProblemOptions, optional
        Solver, least driving force, k σ, unknown-energy policy, time limit.
    route : "R1,R2,-R3" or list, optional
        A route in order (a leading minus: run backwards): the energy profile follows it and
        the driving force step also reports its own max-min driving force.
    h2_range : (float, float)
        H2 searched [mol/L dissolved; bar for a gas feed].
    h2_levels : int or sequence of float
        Levels of the scan: a count log-spaced over ``h2_range``, or the levels themselves.
    alternatives : int
        Alternative minimal uphill sets per mode.
    ranges_compounds : bool
        Also range every concentration (slower).
    draws, seed : int
        Draws per mode of the robustness step, at most (0: skip it), and their seed.
    interval_width : float
        The draws stop once every 95 % Wilson interval is at most this wide (0: exactly draws).
    workers : int
        Worker processes for the draws and the ranges (1: in this process).
    compounds : path, optional
        Compounds table when not beside the reactions table.
    include_unreviewed : bool
        Use data from sources that are not peer reviewed too.
    conditions : dict, optional
        Overrides of the environment: ``celsius`` [degC], ``ph``, ``ionic_strength`` [mol/L],
        ``pressure`` [bar], ``pmg``.
    skip : sequence of str
        Ids of steps not to run (:func:`tfa.assessment.registry.step_ids`).
    progress : callable, optional
        ``progress(label, steps done, steps in all)``.

    Returns
    -------
    Assessment

    Raises
    ------
    InputError
        Bad network, environment, mode, route or option (nothing is written).
    """
    from ..analyses.route import parse_route
    from ..network.inputs import resolve_inputs

    if deprecated:
        draws, seed = _deprecated_keywords(deprecated, draws, seed)
    if out is not None:
        if not isinstance(out, (str, os.PathLike)):
            raise InputError(f"out: expected a folder path, got {type(out).__name__} {out!r}")
        check_output_folder(out, "out")
    if isinstance(h2_levels, (int,)) and not isinstance(h2_levels, bool):
        level_count, level_values = h2_levels, None
    elif isinstance(h2_levels, (list, tuple)):
        level_count, level_values = DEFAULT_H2_LEVELS, list(h2_levels)
    else:
        raise InputError(f"h2_levels: give a count or a list of levels, got "
                         f"{type(h2_levels).__name__}")
    if not isinstance(modes, str):
        if not hasattr(modes, "__iter__"):
            raise InputError(f"modes: give a list of mode names, got {type(modes).__name__}")
        modes = list(modes)
    if not isinstance(h2_range, (list, tuple)) or len(h2_range) != 2:
        raise InputError(f"h2_range: give (low, high) in mol/L (gas: bar), got {h2_range!r}")
    if route is not None and not isinstance(route, (str, list, tuple)):
        raise InputError(f"route: give 'R1,R2,-R3' or a list of reaction ids, got "
                         f"{type(route).__name__} {route!r}")
    if isinstance(skip, str):
        skip = [s.strip() for s in skip.split(",") if s.strip()]
    settings = Settings(modes=modes, mode=mode, alternatives=alternatives,
                        h2_range=tuple(h2_range), h2_levels=level_count, h2_values=level_values,
                        route=parse_route(route), ranges_compounds=bool(ranges_compounds),
                        draws=draws, seed=seed, workers=workers, interval_width=interval_width,
                        include_unreviewed=bool(include_unreviewed))
    steps = select_steps(skip)
    inputs = resolve_inputs(network, environment, compounds, **(conditions or {}))
    return run_steps(steps, inputs, settings, options, progress, out)


def _deprecated_keywords(given: dict[str, Any], draws: int, seed: int) -> tuple[int, int]:
    """Old keyword spellings of :func:`assess`, kept for one release with a warning."""
    renamed = {"robustness_draws": "draws", "robustness_seed": "seed"}
    unknown = sorted(set(given) - set(renamed))
    if unknown:
        raise InputError(f"assess: unknown keyword(s) {', '.join(unknown)}")
    for old, new in renamed.items():
        if old in given:
            warnings.warn(f"assess({old}=...) is deprecated; use {new}=...", DeprecationWarning,
                          stacklevel=3)
    return (int(given.get("robustness_draws", draws)), int(given.get("robustness_seed", seed)))
