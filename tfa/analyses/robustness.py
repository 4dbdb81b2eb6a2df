"""Robustness of the conclusions to the uncertainty of the reaction energies.

For N seeded draws of ΔrG'° from their correlated distribution (:mod:`tfa.analyses.uncertainty`:
Σ = N C Nᵀ + D, reactions that share a compound vary together), each mode is solved again:
feasibility, the minimal uphill set and the H2 threshold. Reported:

- the probability that the network is feasible per mode, p̂ = k/n, with the binomial standard
  error √(p̂(1 − p̂)/n) (the normal approximation of the binomial proportion; e.g. D. S. Moore,
  G. P. McCabe, Introduction to the Practice of Statistics, 8.1);
- how often each reaction is in the minimal uphill set (the first minimal set the solver finds;
  alternative sets of the same size exist in some draws);
- the distribution of the H2 threshold (quantiles over the draws where the network can be fed at
  all; the others are counted apart).

Draw i of a compound's error is the same in every mode and does not depend on which process runs
it (``numpy.random.SeedSequence(seed)``, see :mod:`tfa.analyses.uncertainty`), so a given seed
gives identical results serially, on a process pool or on a Dask cluster
(:mod:`tfa.util.points`). ``sigma_scale`` multiplies every σ; with 0 each draw is the
deterministic answer exactly. The unperturbed (deterministic) answer of each mode is computed as
well and reported beside the probabilities.

Units: kJ/mol; the threshold in the unit of the H2 feed (mol/L, or bar for a gas).
"""

from __future__ import annotations

import functools
import logging
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Sequence

import numpy as np
import pandas as pd

from ..conditions import Conditions
from ..errors import InputError
from ..modes import STANDARD_MODES, parse_modes
from ..util.points import RunSummary, run_and_read, worker_cache
from .jobs import NetworkJob, answers_beyond_the_verdict, outcome, points_verification
from ..vocabulary import DEFAULT_H2_RANGE
from .uncertainty import energy_covariance, with_energies

log = logging.getLogger(__name__)

#: Quantiles of the H2 threshold that are reported.
THRESHOLD_QUANTILES = (0.05, 0.25, 0.5, 0.75, 0.95)
#: Index of the unperturbed point of each mode.
MEAN = "mean"
#: Confidence of the reported intervals.
CONFIDENCE = 0.95
#: Draws per mode between two looks at the intervals (sequential stopping).
BATCH = 10


def wilson_interval(k: int, n: int, confidence: float = CONFIDENCE) -> tuple[float, float]:
    """Wilson score interval of a binomial proportion k/n.

    Equation (Wilson 1927): with z the two-sided normal quantile of ``confidence`` and p̂ = k/n,

        centre = (p̂ + z²/2n) / (1 + z²/n),   half width = z/(1 + z²/n) · √(p̂(1 − p̂)/n + z²/4n²).

    Unlike p̂ ± z√(p̂(1 − p̂)/n) it never has width 0 at k = 0 or k = n and stays within [0, 1].

    Parameters
    ----------
    k : successes (feasible draws); n : trials (draws solved); confidence : e.g. 0.95

    Returns
    -------
    (low, high); (NaN, NaN) when n = 0

    Examples
    --------
    0 of 4 at 95 % (z = 1.95996): the upper end is z²/(n + z²) = 3.8415/7.8415 = 0.490, so
    "0 of 4" means p somewhere in [0, 0.49], not "p = 0.00 ± 0.00"; 81 of 263 gives [0.255,
    0.366] (E. B. Wilson, J. Am. Stat. Assoc. 22 (1927) 209-212, doi:10.1080/01621459.1927.10502953;
    the second example is Newcombe 1998, Stat. Med. 17:857, table I, method 3, from memory):

    >>> [round(x, 3) for x in wilson_interval(0, 4)]
    [0.0, 0.49]
    >>> [round(x, 3) for x in wilson_interval(81, 263)]
    [0.255, 0.366]
    """
    from statistics import NormalDist

    if n <= 0:
        return math.nan, math.nan
    z = NormalDist().inv_cdf(0.5 + confidence / 2.0)
    p = k / n
    denominator = 1.0 + z * z / n
    centre = (p + z * z / (2 * n)) / denominator
    half = z / denominator * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    low = 0.0 if k == 0 else max(0.0, centre - half)     # exactly 0 and 1 at the ends
    high = 1.0 if k == n else min(1.0, centre + half)
    return low, high


def robustness_point(job: NetworkJob, point: dict) -> dict:
    """Outcome of one draw (or of the mean, ``index == "mean"``) in one mode; runs in a worker.

    ``point["scenario"]`` says what is drawn: "energies" (default), "assumptions" (the setting's
    ranges, :mod:`tfa.network.scenario`) or "both"; ``point["held"]`` lists assumptions held at
    their central value."""
    scenario = point.get("scenario", "energies")
    changes: dict = {}
    if scenario != "energies" and point["index"] != MEAN:
        from ..network.scenario import draw_changes

        _, environment, _ = job.objects()
        changes = draw_changes(environment.scenario, int(point["seed"]), int(point["index"]),
                               tuple(point.get("held", ())))
    tm = job.scenario_model(point["mode"], changes) if changes else job.thermo_model(point["mode"])
    parts = job.options.get("parts", ("uphill", "threshold"))
    if point["index"] == MEAN or scenario == "assumptions":
        return outcome(tm, job.problem_options(), parts, job.h2_range())
    key = ("covariance", job.token, point["mode"], tuple(sorted(changes.items())))
    cov = worker_cache(key, lambda: energy_covariance(tm))
    draw = cov.draw(int(point["seed"]), int(point["index"]))
    scale = float(point.get("sigma_scale", 1.0))
    values = cov.mean + scale * (draw - cov.mean)
    drawn = with_energies(tm, dict(zip(cov.reaction_ids, values.tolist())))
    solver = None if changes else _draw_solver(job, point["mode"], cov, scale)
    if solver is None or not solver.covers(values):
        return outcome(drawn, job.problem_options(), parts, job.h2_range())
    answer = solver.outcome(values, diagnose="uphill" in parts)
    # the H2 threshold and the driving force are asked of the drawn model itself
    answer.update(answers_beyond_the_verdict(drawn, job.problem_options(), parts, job.h2_range()))
    return answer


#: Reused draw problems kept per worker process (one per job and mode).
DRAW_SOLVERS_KEPT = 4


def _draw_solver(job: NetworkJob, mode: str, cov, scale: float):
    """The worker's :class:`tfa.analyses.draws.DrawSolver` of a job and mode (built on first
    use, from the mode's prepared model; the last :data:`DRAW_SOLVERS_KEPT` are kept)."""
    from collections import OrderedDict

    from .draws import DrawSolver

    kept: OrderedDict = worker_cache(("draw-solvers",), OrderedDict)
    key = (job.token, mode, scale)
    if key not in kept:
        sigma = scale * np.sqrt(np.maximum(np.diag(cov.covariance), 0.0))
        kept[key] = DrawSolver(job.thermo_model(mode), job.problem_options(),
                               list(cov.reaction_ids), sigma)
        while len(kept) > DRAW_SOLVERS_KEPT:
            kept.popitem(last=False)
    kept.move_to_end(key)
    return kept[key]


def robustness_points(n_draws: int, seed: int, modes: Sequence[str], sigma_scale: float = 1.0,
                      scenario: str = "energies", assumptions: Sequence[str] = ()) -> list[dict]:
    """The points of a run: the mean and draws 0..n-1 of every mode, ids ``<mode>/<index>``;
    with a scenario (``assumptions`` or ``both``) ids ``<mode>/<scenario>/<index>``, and per
    assumption the same draws with it held central (``<mode>/<scenario>-held:<key>/<index>``).

    >>> [p["id"] for p in robustness_points(2, 7, ["native"])]
    ['native/mean', 'native/d00000', 'native/d00001']
    >>> [p["id"] for p in robustness_points(1, 7, ["native"], scenario="both", assumptions=["pH"])]
    ['native/mean', 'native/both/d00000', 'native/both-held:pH/d00000']
    """
    variants = [("", ())] if scenario == "energies" else (
        [(scenario, ())] + [(f"{scenario}-held:{key}", (key,)) for key in assumptions])
    points = []
    for mode in modes:
        points.append({"id": f"{mode}/{MEAN}", "mode": mode, "index": MEAN, "seed": int(seed),
                       "sigma_scale": float(sigma_scale)})
        for variant, held in variants:
            for i in range(n_draws):
                point = {"id": f"{mode}/{variant + '/' if variant else ''}d{i:05d}", "mode": mode,
                         "index": i, "seed": int(seed), "sigma_scale": float(sigma_scale)}
                if variant:
                    point.update(scenario=scenario, variant=variant, held=list(held))
                points.append(point)
    return points


@dataclass
class RobustnessResult:
    """Outcome of every draw in every mode.

    Attributes
    ----------
    modes, n_draws, seed, sigma_scale : what was run
    records : list of dict
        One per (mode, draw): ``mode``, ``draw`` (int, or "mean"), ``feasible``,
        ``uphill_set_size``, ``uphill_set``, ``h2_threshold``, ``error`` (None when solved).
    conditions : Conditions or None
    run : RunSummary of the execution (workers, time, failures)
    provenance : dict
    confidence : of the Wilson intervals (0.95)
    stopped_by : why the draws stopped (the interval width reached, or the draw budget)
    interval_width : the width asked for (None: a fixed number of draws)
    """

    modes: list[str]
    n_draws: int
    seed: int
    sigma_scale: float
    records: list[dict]
    conditions: Conditions | None = None
    run: RunSummary | None = None
    provenance: dict = field(default_factory=dict)
    confidence: float = CONFIDENCE
    scenario: str = "energies"
    assumptions: list = field(default_factory=list)
    variant: str = ""
    stopped_by: str = ""
    interval_width: float | None = None
    analysis: str = "robustness"

    def _draws(self, mode: str, variant: str | None = None) -> list[dict]:
        want = self.variant if variant is None else variant
        return [r for r in self.records if r["mode"] == mode and r["draw"] != MEAN
                and r.get("variant", "") == want]

    def assumption_frame(self) -> pd.DataFrame:
        """Per mode and assumption of the scenario: the probability of feasibility with everything
        drawn, with the assumption held at its central value, and the change (how much of the
        verdict's uncertainty the assumption carries)."""
        rows = []
        for mode in self.modes:
            solved = [r for r in self._draws(mode) if r["error"] is None]
            p_all = sum(1 for r in solved if r["feasible"]) / len(solved) if solved else math.nan
            for key in self.assumptions:
                held = [r for r in self._draws(mode, f"{self.variant}-held:{key}") if r["error"] is None]
                p_held = sum(1 for r in held if r["feasible"]) / len(held) if held else math.nan
                rows.append({"mode": mode, "scenario": self.scenario, "assumption": key,
                             "probability": p_all, "probability_held_central": p_held,
                             "probability_change": p_all - p_held, "draws": len(held)})
        return pd.DataFrame(rows, columns=["mode", "scenario", "assumption", "probability",
                                           "probability_held_central", "probability_change",
                                           "draws"])

    def _mean(self, mode: str) -> dict | None:
        return next((r for r in self.records if r["mode"] == mode and r["draw"] == MEAN), None)

    def feasibility_frame(self) -> pd.DataFrame:
        """Per mode: draws solved, feasible count, probability, binomial standard error, failed
        draws and the deterministic answer."""
        rows = []
        for mode in self.modes:
            solved = [r for r in self._draws(mode) if r["error"] is None]
            n = len(solved)
            k = sum(1 for r in solved if r["feasible"])
            p = k / n if n else math.nan
            mean = self._mean(mode)
            low, high = wilson_interval(k, n, self.confidence)
            rows.append({"mode": mode, "draws": n, "feasible_draws": k, "probability": p,
                         "interval_low": low, "interval_high": high,
                         "standard_error": math.sqrt(p * (1 - p) / n) if n else math.nan,
                         "failed_draws": len(self._draws(mode)) - n,
                         "deterministic_feasible": None if mean is None or mean["error"] else mean["feasible"],
                         "stopped_by": self.stopped_by})
        return pd.DataFrame(rows)

    def uphill_frame(self) -> pd.DataFrame:
        """Per mode and reaction: how often it is in the minimal uphill set (fraction of the draws
        with a computed set), and in the deterministic set."""
        rows = []
        for mode in self.modes:
            sets = [r["uphill_set"] for r in self._draws(mode)
                    if r["error"] is None and r.get("uphill_set") is not None]
            counts: dict[str, int] = {}
            for members in sets:
                for rid in members:
                    counts[rid] = counts.get(rid, 0) + 1
            mean = self._mean(mode)
            in_mean = set((mean or {}).get("uphill_set") or [])
            for rid in sorted(set(counts) | in_mean, key=lambda r: (-counts.get(r, 0), r)):
                rows.append({"mode": mode, "reaction": rid, "count": counts.get(rid, 0),
                             "frequency": counts.get(rid, 0) / len(sets) if sets else math.nan,
                             "in_deterministic_set": rid in in_mean})
        return pd.DataFrame(rows, columns=["mode", "reaction", "count", "frequency", "in_deterministic_set"])

    def uphill_size_frame(self) -> pd.DataFrame:
        """Per mode and size of the minimal uphill set: number and fraction of draws."""
        rows = []
        for mode in self.modes:
            sizes = [r["uphill_set_size"] for r in self._draws(mode)
                     if r["error"] is None and r.get("uphill_set_size") is not None]
            for size in sorted(set(sizes)):
                rows.append({"mode": mode, "uphill_set_size": int(size), "draws": sizes.count(size),
                             "fraction": sizes.count(size) / len(sizes)})
        return pd.DataFrame(rows, columns=["mode", "uphill_set_size", "draws", "fraction"])

    def threshold_frame(self) -> pd.DataFrame:
        """Per mode: H2 threshold quantiles over the draws where one exists, the number of draws
        where the network cannot be fed at any H2 in range, and the deterministic threshold."""
        rows = []
        for mode in self.modes:
            solved = [r for r in self._draws(mode) if r["error"] is None and "h2_threshold" in r]
            values = np.array([r["h2_threshold"] for r in solved if r["h2_threshold"] is not None], float)
            row: dict[str, Any] = {"mode": mode, "draws": len(values),
                                   "never_feasible": len(solved) - len(values)}
            for q in THRESHOLD_QUANTILES:
                row[f"h2_threshold_q{int(round(q * 100)):02d}"] = (float(np.quantile(values, q))
                                                                  if len(values) else math.nan)
            row["at_range_floor_draws"] = sum(1 for r in solved if r.get("h2_at_range_floor"))
            mean = self._mean(mode)
            row["h2_threshold"] = (mean or {}).get("h2_threshold")
            row["h2_at_range_floor"] = (mean or {}).get("h2_at_range_floor")
            rows.append(row)
        return pd.DataFrame(rows)

    def records_frame(self) -> pd.DataFrame:
        """One row per (mode, draw)."""
        frame = pd.DataFrame(self.records)
        if "uphill_set" in frame:
            frame["uphill_set"] = [", ".join(u) if isinstance(u, list) else None
                                   for u in frame["uphill_set"]]
        return frame

    def to_frame(self) -> pd.DataFrame:
        """The main table: feasibility probability per mode."""
        return self.feasibility_frame()

    def frames(self) -> dict[str, pd.DataFrame]:
        """Every table by name (for files)."""
        out = {"feasibility": self.feasibility_frame(), "uphill": self.uphill_frame(),
               "uphill_set_size": self.uphill_size_frame(), "threshold": self.threshold_frame(),
               "draws": self.records_frame()}
        if self.assumptions:
            out["assumptions"] = self.assumption_frame()
        return out

    def tables(self) -> dict[str, pd.DataFrame]:
        """The tables of an assessment's robustness run (file stems ``robustness_...``)."""
        return {"robustness_feasibility": self.feasibility_frame(),
                "robustness_uphill": self.uphill_frame()}

    def summary(self) -> str:
        """One line per mode in plain words."""
        lines = []
        for row in self.feasibility_frame().itertuples():
            if row.draws:
                lines.append(f"{row.mode}: feasible in {row.feasible_draws} of {row.draws} draws "
                             f"(p = {row.probability:.2f}, {self.confidence:.0%} interval "
                             f"{row.interval_low:.2f}-{row.interval_high:.2f})"
                             + (f"; {row.failed_draws} draw(s) failed" if row.failed_draws else ""))
            else:
                lines.append(f"{row.mode}: no draw solved")
        if any("h2_threshold" in r for r in self.records):
            for row in self.threshold_frame().itertuples():
                if row.h2_at_range_floor or row.at_range_floor_draws:
                    lines.append(f"{row.mode}: H2 threshold at the bottom of the range searched "
                                 f"in {row.at_range_floor_draws} of {row.draws} draws"
                                 + (" and with the mean energies" if row.h2_at_range_floor else "")
                                 + " (feasible already there: the true threshold, if any, is lower)")
        for row in (self.assumption_frame().itertuples() if self.assumptions else ()):
            lines.append(f"{row.mode}: {row.assumption} carries {row.probability_change:+.2f} of "
                         f"the probability (p = {row.probability:.2f} with it drawn, "
                         f"{row.probability_held_central:.2f} with it held at its central value)")
        if self.stopped_by:
            lines.append(f"draws stopped by {self.stopped_by}")
        return "\n".join(lines)

    def to_dict(self) -> dict:
        """Plain dictionary for JSON output."""
        return {"analysis": self.analysis, "summary": self.summary(), "seed": self.seed,
                "n_draws": self.n_draws, "sigma_scale": self.sigma_scale, "modes": self.modes,
                "confidence": self.confidence, "stopped_by": self.stopped_by,
                "scenario": self.scenario,
                "interval_width": self.interval_width,
                "conditions": self.conditions.to_dict() if self.conditions else None,
                "provenance": self.provenance,
                "verification": points_verification(self.records),
                **{name: frame.to_dict(orient="records") for name, frame in self.frames().items()}}


def _record(point: dict, line: dict | None) -> dict:
    base = {"mode": point["mode"], "draw": point["index"], "feasible": None, "uphill_set_size": None,
            "uphill_set": None, "h2_threshold": None, "h2_at_range_floor": None, "error": None}
    if point.get("variant"):
        base["variant"] = point["variant"]
    if line is None:
        base["error"] = "not computed (run interrupted)"
    elif "error" in line:
        base["error"] = line["error"]
    else:
        base.update(line["result"])
    return base


def robustness(model, environment, n_draws: int = 100, seed: int = 0,
               modes: Sequence[str] = STANDARD_MODES,
               *, executor: str = "pool", workers: int | None = None, scheduler: str | None = None,
               results_path: str | Path | None = None, resume: bool = False, overwrite: bool = False,
               sigma_scale: float = 1.0, threshold: bool = True,
               h2_range: tuple[float, float] = DEFAULT_H2_RANGE, prepare: Callable | None = None,
               progress: Callable | None = None, interval_width: float | None = None,
               scenario: str = "energies", batch: int = BATCH, uphill_sets: bool = True,
               **problem_options: Any) -> RobustnessResult:
    """Feasibility, minimal uphill set and H2 threshold under seeded draws of ΔrG'°.

    Parameters
    ----------
    model, environment : the network (cobra.Model) and the setting (Environment)
    n_draws : draws per mode; with ``interval_width`` the budget (the most draws per mode)
    seed : whole number >= 0; the same seed gives the same draws on any executor
    modes : modes to solve (default all four)
    executor, workers, scheduler : see :func:`tfa.util.points.run_points` (default: a local
        process pool with one worker per core)
    results_path : JSON-lines file of the run (default: a temporary file, removed afterwards);
        give one to be able to ``resume``. Draws are keyed by their index, so resuming with a
        larger ``n_draws`` extends a finished run and its first draws stay what they were
    sigma_scale : multiplies every σ (0: every draw is the deterministic answer)
    threshold : also compute the H2 threshold of every draw
    uphill_sets : compute the minimal uphill set of every infeasible draw (False: the verdict
        alone, about three times faster on the bundled network)
    h2_range : (low, high) the threshold is searched over [mol/L; gas: bar] (the one default of
        :data:`tfa.vocabulary.DEFAULT_H2_RANGE`, as ``tfa h2-threshold``)
    prepare : replaces :func:`tfa.network.energies.prepare` (module-level function)
    interval_width : sequential stopping: draw ``batch`` more per mode until the Wilson interval
        (:func:`wilson_interval`, 95 %) of every mode is at most this wide, or ``n_draws`` are made
        (None: exactly ``n_draws``). The result says which stopped it (``stopped_by``)
    batch : draws per mode between two looks at the intervals
    scenario : what is drawn: "energies" (default), "assumptions" (the ranges of the
        environment's ``[scenario]`` alone, :mod:`tfa.network.scenario`) or "both" jointly; with
        assumptions each is also held at its central value over the same draws, and
        :meth:`RobustnessResult.assumption_frame` reports the change it makes
    problem_options : ``min_driving_force``, ``solver``, ``time_limit``, ``unknown_energy``

    Returns
    -------
    RobustnessResult
    """
    import tempfile

    if n_draws < 1:
        raise InputError(f"the number of draws must be at least 1, got {n_draws}")
    if not (math.isfinite(sigma_scale) and sigma_scale >= 0):
        raise InputError(f"sigma_scale must be >= 0, got {sigma_scale}")
    if seed is None or int(seed) < 0:
        raise InputError(f"the seed must be a whole number >= 0, got {seed!r}")
    if interval_width is not None and not (0 < interval_width <= 1):
        raise InputError(f"the interval width must lie in (0, 1], got {interval_width}")
    modes = parse_modes(list(modes))
    if scenario not in ("energies", "assumptions", "both"):
        raise InputError(f"scenario {scenario!r}: use energies, assumptions or both")
    assumptions = sorted(getattr(environment, "scenario", {}) or {})
    if scenario != "energies" and not assumptions:
        raise InputError(f"scenario {scenario}: the environment gives no ranges; add a [scenario] "
                         "section, e.g. \"pH_compartment.out\" = [5.0, 6.0]")
    parts = (("uphill",) if uphill_sets else ()) + (("threshold",) if threshold else ())
    job = NetworkJob.create(model, environment, parts=parts, prepare=prepare,
                            h2_range=tuple(h2_range), **problem_options)
    header = {"analysis": "robustness", "seed": int(seed), "modes": modes,
              "sigma_scale": float(sigma_scale), **job.describe()}
    if scenario != "energies":
        header["scenario"] = scenario
    function = functools.partial(robustness_point, job)
    looks = ([int(n_draws)] if interval_width is None else
             sorted(set(list(range(min(batch, n_draws), n_draws, max(1, batch))) + [int(n_draws)])))
    with tempfile.TemporaryDirectory(prefix="tfa-robustness-") as scratch:
        path = Path(results_path) if results_path is not None else Path(scratch) / "draws.jsonl"
        seconds = 0.0
        stopped_by = f"the draw budget ({n_draws} per mode)" if interval_width is not None else ""
        for look, count in enumerate(looks):
            points = robustness_points(count, seed, modes, sigma_scale, scenario, assumptions)
            summary, lines = run_and_read(points, function, path, "draws.jsonl", executor=executor,
                                          workers=workers, scheduler=scheduler,
                                          resume=resume or look > 0,
                                          overwrite=overwrite and look == 0, header=header,
                                          progress=progress)
            seconds += summary.seconds
            records = [_record(p, lines.get(p["id"])) for p in points]
            if summary.interrupted or interval_width is None:
                break
            partial = RobustnessResult(modes=modes, n_draws=count, seed=int(seed),
                                       sigma_scale=float(sigma_scale), records=records,
                                       variant="" if scenario == "energies" else scenario)
            frame = partial.feasibility_frame()
            widths = (frame["interval_high"] - frame["interval_low"]).fillna(1.0)
            if count < n_draws and bool((widths <= interval_width + 1e-12).all()):
                stopped_by = (f"the interval width (every {CONFIDENCE:.0%} interval at most "
                              f"{interval_width:g} wide after {count} draws per mode)")
                break
        summary.seconds = seconds
    conditions = getattr(environment, "conditions", None)
    return RobustnessResult(modes=modes, n_draws=int(count), seed=int(seed),
                            sigma_scale=float(sigma_scale), records=records, conditions=conditions,
                            run=summary, stopped_by=stopped_by, interval_width=interval_width,
                            scenario=scenario,
                            assumptions=assumptions if scenario != "energies" else [],
                            variant="" if scenario == "energies" else scenario,
                            provenance={"executor": summary.executor, "seconds": summary.seconds,
                                        "results_file": str(results_path) if results_path else None,
                                        "interrupted": summary.interrupted, **job.describe()})
