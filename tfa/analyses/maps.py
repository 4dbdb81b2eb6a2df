"""Condition maps: the answers of the analyses over a grid of two of temperature, pH, ionic
strength, H2 supply and pressure, or along one axis (a mixing line of two fluids: ``mixing``, the
share of vent fluid, :mod:`tfa.network.mixing_line`; at each point the mixture's temperature, pH,
ionic strength, H2 and dissolved inorganic carbon are recorded, and the H2 margin
log10(H2 of the mixture / H2 threshold)). A pH change (an axis or a mixing line) moves the
gradient's outer protons with it, ΔpH kept, unless ``fixed_outer_ph`` is asked.

At each grid point and mode the environment is copied with the two conditions changed
(:func:`tfa.analyses.jobs.changed_environment`), the network's energies are prepared there
(:func:`tfa.network.energies.prepare`: temperature, pH, ionic strength and pressure enter the
transformed energies; H2 supply the fixed H2 activity) and solved: feasibility, the size of the
minimal uphill set, the max-min driving force of the network (Noor et al. 2014, PLoS Comput.
Biol. 10:e1003483) and the H2 threshold. Points run through :mod:`tfa.util.points` (process
pool by default, Dask on request) and are appended to a results file as they finish, so a map
can be resumed.

Units at the interface: temperature °C, ionic strength mol/L, pressure bar, H2 mol/L (bar when
H2 is fed as a gas); energies kJ/mol.
"""

from __future__ import annotations

import functools
import logging
import math
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Sequence

import numpy as np
import pandas as pd

from ..conditions import ModelRangeWarning
from ..errors import InputError
from ..modes import parse_modes
from ..util.numbers import MAX_AXIS_VALUES, MAX_GRID_POINTS, read_count, read_number
from ..util.points import RunSummary, run_and_read
from ..vocabulary import DEFAULT_H2_RANGE
from .jobs import CONDITION_AXES, NetworkJob, changed_environment, outcome, points_verification

log = logging.getLogger(__name__)

#: Columns of a map table besides the axes.
MAP_COLUMNS = ("feasible", "uphill_set_size", "driving_force_kJ_per_mol", "h2_threshold",
               "h2_at_range_floor")
#: Column name of each axis in the tables (:mod:`tfa.vocabulary`).
AXIS_COLUMNS = {"temperature": "temperature_C", "ph": "pH", "ionic_strength": "ionic_strength_mol_per_L",
                "pressure": "pressure_bar", "h2": "h2_activity", "mixing": "vent_fraction"}
#: Columns of the mixture at each point of a mixing line, in order.
MIXTURE_COLUMNS = ("temperature_C", "pH", "ionic_strength_mol_per_L", "h2_activity",
                   "dissolved_inorganic_carbon_mol_per_L", "h2_margin_decades")


def map_point(job: NetworkJob, point: dict) -> dict:
    """Outcome at one grid point in one mode; runs in a worker."""
    changes = {point["x_name"]: point["x"]}
    if point.get("y_name"):
        changes[point["y_name"]] = point["y"]
    tm = job.thermo_model(point["mode"], changes)
    result = outcome(tm, job.problem_options(),
                     job.options.get("parts", ("uphill", "threshold", "driving_force")), job.h2_range())
    if "mixing" in changes:
        result.update(_mixture(job, changes, result.get("h2_threshold")))
    return result


def _mixture(job: NetworkJob, changes: dict, threshold: float | None) -> dict:
    """The mixture's conditions at a point of a mixing line, and the H2 margin (decades)."""
    from ..network.mixing_line import mixed_environment

    model, environment, _ = job.objects()
    _, fluid = mixed_environment(environment, model, float(changes["mixing"]),
                                 not job.options.get("fixed_outer_ph", False))
    margin = math.log10(fluid.h2 / threshold) if threshold else None
    return {"temperature_C": fluid.celsius, "pH": fluid.ph,
            "ionic_strength_mol_per_L": fluid.ionic_strength, "h2_activity": fluid.h2,
            "dissolved_inorganic_carbon_mol_per_L": fluid.dic, "h2_margin_decades": margin}


def axis_values(text: str) -> tuple[str, list[float]]:
    """Parse an axis: ``NAME=START:STOP:COUNT`` (linear), ``NAME=START:STOP:COUNT:log``
    (log-spaced) or ``NAME=V1,V2,...``.

    >>> axis_values("temperature=40:90:6")
    ('temperature', [40.0, 50.0, 60.0, 70.0, 80.0, 90.0])
    >>> axis_values("h2=1e-6:1e-2:5:log")[1]
    [1e-06, 1e-05, 0.0001, 0.001, 0.01]
    >>> axis_values("pH=6.5,7,7.5")
    ('ph', [6.5, 7.0, 7.5])
    """
    name, sep, spec = text.partition("=")
    name = name.strip().lower().replace("-", "_")
    name = {"vent_fraction": "mixing", "mix": "mixing"}.get(name, name)
    name = {"t": "temperature", "i": "ionic_strength", "p": "pressure"}.get(name, name)
    if not sep or name not in CONDITION_AXES:
        raise InputError(f"axis '{text}': write NAME=START:STOP:COUNT[:log] or NAME=V1,V2,... with "
                         f"NAME one of {', '.join(CONDITION_AXES)}")
    where = f"axis '{text[:60]}'"
    if ":" in spec:
        parts = spec.split(":")
        if len(parts) not in (3, 4) or (len(parts) == 4 and parts[3].strip().lower() not in ("log", "lin")):
            raise InputError(f"{where}: '{spec}' is not START:STOP:COUNT[:log] nor a list of "
                             "numbers; e.g. temperature=40:90:6 or h2=1e-6:1e-2:9:log")
        start, stop = (read_number(v, "end", where) for v in parts[:2])
        count = read_count(parts[2], "COUNT", where, maximum=MAX_AXIS_VALUES)
        if len(parts) == 4 and parts[3].strip().lower() == "log":
            if start <= 0 or stop <= 0:
                raise InputError(f"{where}: a log-spaced axis needs positive ends")
            values = np.logspace(math.log10(start), math.log10(stop), count)
            values = [float(f"{v:.12g}") for v in values]
        else:
            values = [float(f"{v:.12g}") for v in np.linspace(start, stop, count)]
    else:
        items = [v for v in spec.split(",") if v.strip()]
        if len(items) > MAX_AXIS_VALUES:
            raise InputError(f"{where}: {len(items)} values; give at most {MAX_AXIS_VALUES}")
        values = [read_number(v, "value", where) for v in items]
    if not values:
        raise InputError(f"{where}: no values")
    if len(set(values)) != len(values):
        raise InputError(f"{where}: repeated values")
    return name, values


def check_grid(model, environment, x: tuple[str, Sequence[float]],
               y: tuple[str, Sequence[float]] | None, modes: Sequence[str]) -> list[str]:
    """Refuse a grid before anything runs: too many points (:data:`MAX_GRID_POINTS`), or any
    value that makes impossible conditions (outside 0-300 degC, boiling water, a pH outside
    0-14, an H2 supply that is no concentration ...), named with its axis. Returns the
    model-range warnings the grid raises (conditions past a model's usual range), each once.
    """
    from ..conditions import ModelRangeWarning

    (x_name, x_vals), (y_name, y_vals) = x, (y or (None, [None]))
    for name, vals in ((x_name, x_vals), (y_name, y_vals)):
        if len(vals) > MAX_AXIS_VALUES:
            raise InputError(f"map axis {name}: {len(vals)} values; give at most {MAX_AXIS_VALUES}")
    total = len(x_vals) * len(y_vals) * len(modes)
    if total > MAX_GRID_POINTS:
        raise InputError(f"the map has {total:,} points ({len(x_vals)} x {len(y_vals)} x "
                         f"{len(modes)} modes); give at most {MAX_GRID_POINTS:,}")
    seen: list[str] = []
    for xv in x_vals:
        for yv in y_vals:
            changes = {x_name: xv} if y_name is None else {x_name: xv, y_name: yv}
            where = ", ".join(f"{k}={v:g}" for k, v in changes.items())
            with warnings.catch_warnings(record=True) as caught:
                warnings.simplefilter("always", ModelRangeWarning)
                try:
                    changed_environment(model, environment, changes)
                except InputError as err:
                    raise type(err)(f"map point {where}: {err}") from None
            seen += [str(w.message) for w in caught
                     if issubclass(w.category, ModelRangeWarning) and str(w.message) not in seen]
    return seen


def map_points(x: tuple[str, Sequence[float]], y: tuple[str, Sequence[float]] | None,
               modes: Sequence[str]) -> list[dict]:
    """Grid points, ids ``<mode>/<ix>-<iy>`` (``<mode>/<ix>`` along one axis).

    >>> [p["id"] for p in map_points(("ph", [7, 8]), ("temperature", [50]), ["native"])]
    ['native/0-0', 'native/1-0']
    >>> [p["id"] for p in map_points(("mixing", [0, 0.5]), None, ["native"])]
    ['native/0', 'native/1']
    """
    points = []
    for mode in modes:
        if y is None:
            points += [{"id": f"{mode}/{ix}", "mode": mode, "x_name": x[0], "x": float(xv),
                        "y_name": None, "y": None} for ix, xv in enumerate(x[1])]
            continue
        for ix, xv in enumerate(x[1]):
            for iy, yv in enumerate(y[1]):
                points.append({"id": f"{mode}/{ix}-{iy}", "mode": mode, "x_name": x[0], "x": float(xv),
                               "y_name": y[0], "y": float(yv)})
    return points


@dataclass
class MapResult:
    """Answers at every grid point and mode.

    Attributes
    ----------
    x_name, x_values, y_name, y_values : the axes (units: see the module docstring)
    modes : list of str
    records : one dict per (mode, x, y): the outcome keys and ``error`` (None when solved)
    run : RunSummary of the execution
    provenance : dict
    warnings : model-range warnings of the grid's conditions
    """

    x_name: str
    x_values: list[float]
    y_name: str | None
    y_values: list[float]
    modes: list[str]
    records: list[dict]
    run: RunSummary | None = None
    provenance: dict = field(default_factory=dict)
    analysis: str = "condition map"
    warnings: list[str] = field(default_factory=list)

    def to_frame(self) -> pd.DataFrame:
        """One row per grid point and mode: mode, the two axes (named as in :data:`AXIS_COLUMNS`),
        feasible, uphill_set_size, driving_force_kJ_per_mol, h2_threshold, uphill_set (members of
        a minimal set, ', '-joined), error."""
        rows = []
        line = self.y_name is None
        for r in self.records:
            row = {"mode": r["mode"], AXIS_COLUMNS[self.x_name]: r["x"]}
            if not line:
                row[AXIS_COLUMNS[self.y_name]] = r["y"]
            for c in MAP_COLUMNS:
                row[c] = r.get(c)
            if line and self.x_name == "mixing":
                for c in MIXTURE_COLUMNS:
                    row[c] = r.get(c)
            row["uphill_set"] = (", ".join(r["uphill_set"]) if isinstance(r.get("uphill_set"), list)
                                 else None)
            row["error"] = r.get("error")
            rows.append(row)
        return pd.DataFrame(rows)

    def summary(self) -> str:
        """Per mode: feasible points out of solved points, and failures."""
        lines = []
        for mode in self.modes:
            rec = [r for r in self.records if r["mode"] == mode]
            solved = [r for r in rec if r.get("error") is None]
            k = sum(1 for r in solved if r.get("feasible"))
            floor = sum(1 for r in solved if r.get("h2_at_range_floor"))
            lines.append(f"{mode}: feasible at {k} of {len(solved)} points"
                         + (f"; H2 threshold at the bottom of the range searched at {floor} "
                            "point(s) (feasible already there: the true threshold, if any, is "
                            "lower)" if floor else "")
                         + (f"; {len(rec) - len(solved)} point(s) failed or not computed"
                            if len(rec) > len(solved) else ""))
        return "\n".join(lines)

    def to_dict(self) -> dict:
        """Plain dictionary for JSON output."""
        return {"analysis": self.analysis, "summary": self.summary(),
                "x": {"name": self.x_name, "values": self.x_values},
                "y": ({"name": self.y_name, "values": self.y_values} if self.y_name else None),
                "modes": self.modes,
                "provenance": self.provenance, "warnings": list(self.warnings),
                "verification": points_verification(self.records),
                "table": self.to_frame().to_dict(orient="records")}


def _record(point: dict, line: dict | None) -> dict:
    base = {"mode": point["mode"], "x": point["x"], "y": point.get("y"), "feasible": None,
            "uphill_set_size": None, "uphill_set": None, "driving_force_kJ_per_mol": None,
            "h2_threshold": None, "h2_at_range_floor": None,
            "error": None}
    if line is None:
        base["error"] = "not computed (run interrupted)"
    elif "error" in line:
        base["error"] = line["error"]
    else:
        base.update(line["result"])
    return base


def condition_map(model, environment, x: tuple[str, Sequence[float]] = ("temperature", (40.0, 70.0, 100.0)),
                  y: tuple[str, Sequence[float]] | None = ("ph", (6.0, 7.0, 8.0)),
                  modes: Sequence[str] = ("native",), *, executor: str = "pool",
                  workers: int | None = None, scheduler: str | None = None,
                  results_path: str | Path | None = None, resume: bool = False,
                  overwrite: bool = False, threshold: bool = True, driving_force: bool = True,
                  h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
                  prepare: Callable | None = None, progress: Callable | None = None,
                  **problem_options: Any) -> MapResult:
    """Feasibility, uphill-set size, driving force and H2 threshold over a grid of two conditions.

    Parameters
    ----------
    model, environment : the network (cobra.Model) and the setting (Environment)
    x, y : (axis name, values); names from :data:`tfa.analyses.jobs.CONDITION_AXES`; ``y`` None
        for a line along ``x`` (e.g. ``("mixing", [0, 0.1, ..., 1])``)
    modes : modes to solve at every point
    executor, workers, scheduler : see :func:`tfa.util.points.run_points`
    results_path : JSON-lines file (default: temporary); give one to ``resume``
    threshold, driving_force : compute these two at every point (each is one more MILP)
    h2_range : (low, high) the threshold is searched over [mol/L; gas: bar] (the one default of
        :data:`tfa.vocabulary.DEFAULT_H2_RANGE`, as ``tfa h2-threshold``)
    prepare : replaces :func:`tfa.network.energies.prepare` (module-level function)
    problem_options : ``min_driving_force``, ``solver``, ``time_limit``, ``unknown_energy``, and
        ``fixed_outer_ph`` (True: a pH change leaves the outer fluid's pH, so ΔpH changes)

    Returns
    -------
    MapResult
    """
    (x_name, x_vals), (y_name, y_vals) = x, (y or (None, [0.0]))
    for name in (x_name, y_name):
        if name is not None and name not in CONDITION_AXES:
            raise InputError(f"unknown map axis {name!r}; use two of {', '.join(CONDITION_AXES)}")
    if x_name == y_name:
        raise InputError(f"the two map axes must differ (both are {x_name})")
    if "mixing" in (x_name, y_name) and ({x_name, y_name} & {"temperature", "ph", "h2", "ionic_strength"}):
        raise InputError("a mixing line sets temperature, pH, ionic strength and H2 itself; pair it "
                         "with pressure or give it alone")
    x_vals = [read_number(v, "value", f"map axis {x_name}") for v in x_vals]
    y_vals = [read_number(v, "value", f"map axis {y_name}") for v in y_vals]
    if not x_vals or not y_vals:
        raise InputError("each map axis needs at least one value")
    modes = parse_modes(list(modes))
    y = None if y_name is None else (y_name, y_vals)
    range_warnings = check_grid(model, environment, (x_name, x_vals), y, modes)
    for text in range_warnings:
        warnings.warn(text, ModelRangeWarning, stacklevel=2)
    parts = ["uphill"] + (["threshold"] if threshold else []) + (["driving_force"] if driving_force else [])
    job = NetworkJob.create(model, environment, parts=parts, prepare=prepare,
                            h2_range=tuple(h2_range), **problem_options)
    points = map_points((x_name, x_vals), y, modes)
    header = {"analysis": "map", "x": [x_name, x_vals], "y": list(y) if y else None, "modes": modes,
              **job.describe()}
    function = functools.partial(map_point, job)
    summary, lines = run_and_read(points, function, results_path, "map.jsonl", executor=executor,
                                  workers=workers, scheduler=scheduler, resume=resume,
                                  overwrite=overwrite, header=header, progress=progress)
    records = [_record(p, lines.get(p["id"])) for p in points]
    return MapResult(x_name, x_vals, y_name, y_vals if y else [], modes, records, run=summary,
                     warnings=range_warnings,
                     provenance={"executor": summary.executor, "seconds": summary.seconds,
                                 "points_per_second": summary.points_per_second,
                                 "results_file": str(results_path) if results_path else None,
                                 "interrupted": summary.interrupted, **job.describe()})
