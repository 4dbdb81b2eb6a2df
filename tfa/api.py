"""The whole job in one call: read a network and a setting, run every analysis, write every file.

:func:`assess` answers, for one network at one environment: where each reaction energy comes
from (data coverage), how many reactions run downhill at reference concentrations (census),
whether a steady state exists with every reaction downhill in each of the four modes
(feasibility; Henry, Broadbelt & Hatzimanikatis 2007, Biophys. J. 92:1792) and, where not, the
smallest set of steps that must be driven uphill, how the answer changes with the H2 supply
(scan and threshold), the max-min driving force (Noor et al. 2014, PLoS Comput. Biol.
10:e1003483), the energy profile along the main carbon-fixation route, the range of each
reaction energy over the feasible set, and a small robustness run over the uncertainty of the
energies. It returns an :class:`Assessment`; :meth:`Assessment.write` writes the tables (CSV and
JSON), the figures (PNG and SVG) and one self-contained HTML report. Nothing is computed here
that the analyses do not compute: this module only orders the calls and adapts their tables.

Units: kJ/mol, mol/L (gases: bar); temperature in degC only in the words of the report.

Example (the bundled network at the Kestrel Ridge vent field, an invented demo setting)::

    import tfa
    result = tfa.assess(out="tfa-results")
    print(result.summary())
"""

from __future__ import annotations

import dataclasses
import logging
import math
import time
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Mapping, Sequence

import numpy as np
import pandas as pd

from .errors import InputError, TfaError

log = logging.getLogger(__name__)

#: The four modes, in the order they are reported (see :mod:`tfa.network.rewrites`).
ALL_MODES = ("native", "h2_only", "no_atp_strict", "no_atp_bare")
#: Default output folder of :func:`assess` and ``tfa assess``.
DEFAULT_OUT = "tfa-results"
#: H2 levels of the scan: one per decade from 1 pM to 10 mM (mol/L; bar for a gas feed).
DEFAULT_H2_LEVELS = tuple(float(v) for v in np.logspace(-12, -2, 11))
#: Range searched for the H2 threshold (mol/L; bar for a gas feed).
DEFAULT_H2_RANGE = (1e-12, 1e-2)
#: Draws per mode of the robustness run of an assessment (kept small: about 1.5 s per draw).
DEFAULT_ROBUSTNESS_DRAWS = 4
#: Alternative minimal uphill sets asked for per mode (integer cuts).
DEFAULT_ALTERNATIVES = 2
#: Pathway tags (lower case, substrings) of the carbon-fixation route from H2 + CO2 to pyruvate.
ROUTE_PATHWAYS = ("acetyl-coa pathway (methyl branch)", "acetyl-coa pathway (carbonyl branch)",
                  "pyruvate")
#: Reactions chunked per ranges call, so that progress can be shown.
RANGES_CHUNK = 10

#: Base names of the files :meth:`Assessment.write` produces (tables: .csv + .json; figures:
#: .png + .svg).
TABLE_FILES = ("coverage", "census", "census_counts", "feasibility", "uphill_sets", "h2_scan",
               "h2_threshold", "driving_force", "energy_profile", "ranges",
               "robustness_feasibility", "robustness_uphill")
FIGURE_FILES = ("energy_profile", "h2_scan", "census", "ranges")
REPORT_FILE = "report.html"
SUMMARY_FILE = "summary.json"

ProgressCallback = Callable[[str, int, int], None]


# ------------------------------------------------------------------------------------ inputs
@dataclass
class Inputs:
    """A network and its setting as read from files, with where each came from."""

    model: Any
    environment: Any
    network_source: str
    environment_source: str
    literature_path: Path | None = None
    network_folder: Path | None = None


def load_network(path: str | Path | None = None, compounds: str | Path | None = None,
                 require_balanced: bool = True):
    """Read a network: a reactions table (``.tsv``/``.csv``, ``compounds.tsv`` beside it), a
    folder holding ``reactions.tsv``, SBML (``.xml``) or cobra JSON; None reads the bundled
    network (demo data: the invented Kestrel Ridge vent field).

    Raises
    ------
    InputError
        Missing file, malformed table (with file and line), unbalanced reaction.
    """
    return resolve_inputs(path, None, compounds, require_balanced=require_balanced).model


def load_environment(path: str | Path | None = None, network: str | Path | None = None,
                     **conditions: float | None):
    """Read an environment file (TOML); without ``path`` the ``environment.toml`` beside the
    network, else the bundled one. ``conditions`` (``celsius``, ``ph``, ``ionic_strength``,
    ``pressure``, ``pmg``) override the file's."""
    from .network.bundled import bundled_environment_path
    from .network.environment import Environment

    env_path = Path(path) if path is not None else _default_environment_path(network)
    if env_path is None:
        env_path = bundled_environment_path()
    environment = Environment.from_toml(env_path)
    changes = {k: v for k, v in conditions.items() if v is not None}
    return environment.with_conditions(**changes) if changes else environment


def _network_folder(path: Path) -> Path:
    return path if path.is_dir() else path.parent


def _default_environment_path(network: str | Path | None) -> Path | None:
    if network is None:
        return None
    candidate = _network_folder(Path(network)) / "environment.toml"
    return candidate if candidate.is_file() else None


def resolve_inputs(network: Any = None, environment: Any = None,
                   compounds: str | Path | None = None, require_balanced: bool = True,
                   **conditions: float | None) -> Inputs:
    """Read the network and the environment as ``tfa`` resolves them everywhere.

    ``network``: None (the bundled network), a path (reactions table, folder, SBML, JSON) or a
    ``cobra.Model``. ``environment``: None (``environment.toml`` beside the network, else the
    bundled one), a path, or an :class:`~tfa.network.environment.Environment`. ``conditions``
    (``celsius``, ``ph``, ``ionic_strength``, ``pressure``, ``pmg``) override the environment's.
    """
    from .network.bundled import bundled_environment_path, bundled_folder
    from .network.environment import Environment
    from .network.io_sbml import load_network as read_any
    from .network.io_table import reaction_values_beside

    literature = None
    folder = None
    if network is None:
        folder = bundled_folder()
        model = read_any(folder / "reactions.tsv", require_balanced=require_balanced)
        literature = reaction_values_beside(folder / "reactions.tsv")
        network_source = f"bundled network ({folder / 'reactions.tsv'})"
        default_env = bundled_environment_path()
    elif isinstance(network, (str, Path)):
        path = Path(network)
        if not path.exists():
            raise InputError(f"{path}: no such file or folder; give a reactions table, a folder "
                             "holding reactions.tsv, or an SBML/JSON file")
        if compounds is not None and not Path(compounds).is_file():
            raise InputError(f"{compounds}: no such compounds table; give the path of "
                             "compounds.tsv or leave --compounds out")
        model = read_any(path, compounds, require_balanced=require_balanced)
        folder = _network_folder(path)
        literature = reaction_values_beside(folder / "reactions.tsv")
        network_source = str(path)
        default_env = _default_environment_path(path) or bundled_environment_path()
    elif hasattr(network, "reactions") and hasattr(network, "metabolites"):
        model = network
        path = (model.notes or {}).get("reaction_values_path")
        literature = Path(path) if path else None
        network_source = f"cobra model {model.id}"
        default_env = bundled_environment_path()
    else:
        raise InputError(f"network: expected a path or a cobra.Model, got {type(network).__name__}")
    if environment is None or isinstance(environment, (str, Path)):
        env_path = Path(environment) if environment is not None else default_env
        env = Environment.from_toml(env_path)
        env_source = str(env_path)
    elif isinstance(environment, Environment):
        env = environment
        env_source = environment.source or environment.name
    else:
        raise InputError(f"environment: expected a path or an Environment, got "
                         f"{type(environment).__name__}")
    changes = {k: v for k, v in conditions.items() if v is not None}
    if changes:
        env = env.with_conditions(**changes)
    return Inputs(model, env, network_source, env_source, literature, folder)


# ------------------------------------------------------------------------------------ route
def route_reactions(model, demand_id: str | None = None,
                    pathways: Sequence[str] = ROUTE_PATHWAYS,
                    fluxes: Mapping[str, float] | None = None) -> list[tuple[str, int]]:
    """The main carbon-fixation route from H2 + CO2 to pyruvate: (reaction id, direction), in
    route order.

    The reactions are those tagged (``pathway`` note, case-insensitive substring of
    :data:`ROUTE_PATHWAYS`) with the methyl or carbonyl branch of the acetyl-CoA pathway or
    with pyruvate synthesis that carry flux in the least-total-flux way of making one unit of
    pyruvate from the feed (parsimonious flux balance, Lewis et al. 2010, Mol. Syst. Biol.
    6:390; the network's own demand switched off). They are put in order by
    :func:`order_route`. Empty when the network has no pyruvate or cannot make it.

    When ``fluxes`` (reaction id -> flux of a certified steady state) is given, the route is
    read from that steady state instead, so the profile's steps and its concentrations come
    from one and the same solution.
    """
    import cobra

    pyruvate = [m for m in model.metabolites if _is_pyruvate(m)]
    if not pyruvate:
        return []
    if fluxes is not None:
        return _route_from_fluxes(model, fluxes, pathways)
    with model:
        if demand_id is not None and demand_id in model.reactions:
            model.reactions.get_by_id(demand_id).bounds = (0.0, 0.0)
        sink = model.add_boundary(pyruvate[0], type="demand", reaction_id="tfa_route_pyruvate")
        sink.bounds = (1.0, 1.0)
        model.objective = sink
        try:
            fluxes = cobra.flux_analysis.pfba(model).fluxes
        except Exception as err:  # an infeasible LP: cobra raises its own errors
            log.info("route: pyruvate cannot be made from the feed (%s)", err)
            return []
    return _route_from_fluxes(model, fluxes, pathways)


def _route_from_fluxes(model, fluxes: Mapping[str, float],
                       pathways: Sequence[str]) -> list[tuple[str, int]]:
    """Route steps (tagged reactions that carry flux, in their direction), in carbon order."""
    chosen = []
    for reaction in model.reactions:
        tag = str((reaction.notes or {}).get("pathway") or reaction.subsystem or "").lower()
        v = float(fluxes.get(reaction.id, 0.0))
        if abs(v) <= 1e-9 or not any(p in tag for p in pathways):
            continue
        direction = 1 if v > 0 else -1
        if "acetyl-coa" not in tag:
            made = [m for m, c in reaction.metabolites.items() if c * direction > 0]
            if not any(_is_pyruvate(m) for m in made):
                continue
        chosen.append((reaction.id, direction))
    return order_route(model, chosen)


def _formula_counts(met) -> dict[str, int]:
    import re

    counts: dict[str, int] = {}
    for element, number in re.findall(r"([A-Z][a-z]?)(\d*)", str(met.formula or "")):
        counts[element] = counts.get(element, 0) + int(number or 1)
    return counts


def _contains(big: dict[str, int], small: dict[str, int]) -> bool:
    return big != small and all(big.get(e, 0) >= n for e, n in small.items())


def order_route(model, steps: Sequence[tuple[str, int]]) -> list[tuple[str, int]]:
    """Put route steps in the order the carbon flows: a step comes once every substrate it needs
    is fed or made by an earlier step (ties: order of the network file).

    Carrier moieties (tetrahydrofolate, coenzyme A: a compound of at least six carbons that
    another route compound contains whole and that contains no such compound itself) and
    compounds with a role in the compounds table (electron carriers, ATP, phosphate, water)
    count as present from the start, since the network regenerates them. When the remaining steps wait on
    each other, the first of them in the file goes next.
    """
    if not steps:
        return []
    position = {r.id: k for k, r in enumerate(model.reactions)}
    steps = sorted(steps, key=lambda s: position.get(s[0], 0))
    sides = {}
    for rid, d in steps:
        reaction = model.reactions.get_by_id(rid)
        sides[rid] = ({m.id for m, c in reaction.metabolites.items() if c * d < 0},
                      {m.id for m, c in reaction.metabolites.items() if c * d > 0})
    made = set().union(*(p for _, p in sides.values()))
    involved = {m for pair in sides.values() for side in pair for m in side}
    formulas = {m: _formula_counts(model.metabolites.get_by_id(m)) for m in involved}
    big = {m for m, f in formulas.items() if f.get("C", 0) >= 6}
    carriers = {m for m in big
                if any(_contains(formulas[o], formulas[m]) for o in involved if o != m)
                and not any(_contains(formulas[m], formulas[o]) for o in big if o != m)}
    # compounds with a role (electron carriers, ATP/ADP/AMP, phosphate, water, H+) are
    # regenerated elsewhere in the network: they never hold a carbon step back
    cofactors = {m for m in involved if (model.metabolites.get_by_id(m).notes or {}).get("role")}
    available = (involved - made) | carriers | cofactors
    ordered: list[tuple[str, int]] = []
    remaining = list(steps)
    while remaining:
        ready = [s for s in remaining if sides[s[0]][0] <= available]
        step = ready[0] if ready else remaining[0]
        ordered.append(step)
        remaining.remove(step)
        available |= sides[step[0]][1]
    return ordered


def _is_pyruvate(met) -> bool:
    return met.id.lower() in ("pyr", "pyruvate") or str(met.name or "").lower() == "pyruvate"


def parse_route(text: str | Sequence[str] | None) -> list[tuple[str, int]] | None:
    """``"R1,R2,-R3"`` -> [("R1", 1), ("R2", 1), ("R3", -1)] (a leading minus: run backwards).

    >>> parse_route("HDCR, -FALDH,ACS")
    [('HDCR', 1), ('FALDH', -1), ('ACS', 1)]
    """
    if text is None:
        return None
    items = text.split(",") if isinstance(text, str) else list(text)
    out = []
    for item in items:
        item = str(item).strip()
        if not item:
            continue
        direction = -1 if item.startswith("-") else 1
        out.append((item.lstrip("-+").strip(), direction))
    if not out:
        raise InputError(f"route {text!r}: give reaction ids separated by commas, e.g. HDCR,FTHFS")
    return out


def energy_profile(tm, route: Sequence[tuple[str, int]], log_conc: dict[str, float]) -> pd.DataFrame:
    """ΔrG' and ΔrG'° of each route step in the direction it runs, at given concentrations.

    ΔrG' = d (ΔrG'° + RT Σ_i ν_i ln c_i) (Alberty 2003, eq. 4.1-4), d = ±1 the direction; H+ and
    water carry no activity term. Units: kJ/mol. Compounds missing from ``log_conc`` are taken
    at 1 mM.

    Returns
    -------
    DataFrame
        ``step``, ``reaction``, ``direction``, ``dg_prime``, ``dg_standard``, ``cumulative``.
    """
    rt = tm.RT
    rows = []
    total = 0.0
    for rid, d in route:
        e = tm.energies.get(rid)
        if e is None:
            continue
        reaction = tm.model.reactions.get_by_id(rid)
        term = sum(c * log_conc.get(m.id, math.log(1e-3)) for m, c in reaction.metabolites.items()
                   if m.id not in tm.no_activity)
        g = d * (e.standard + rt * term)
        total += g
        rows.append({"step": rid if d > 0 else f"{rid} (reverse)", "reaction": rid,
                     "direction": "forward" if d > 0 else "backward", "dg_prime": g,
                     "dg_standard": d * e.standard, "cumulative": total})
    return pd.DataFrame(rows, columns=["step", "reaction", "direction", "dg_prime", "dg_standard",
                                       "cumulative"])


# ------------------------------------------------------------------------------------ result
@dataclass
class Assessment:
    """Every result of one assessment (see :func:`assess`).

    Attributes
    ----------
    network, environment : the cobra model (as given) and the Environment
    network_source, environment_source : where they were read from
    mode : the mode of the H2 scan, threshold, driving force, profile and ranges
    options : ProblemOptions used throughout
    coverage : CoverageReport (data behind every reaction energy)
    feasibility : dict mode -> FeasibilityResult (diagnosis: the minimal uphill sets)
    census : dict mode -> CensusResult
    h2_scan, h2_threshold, driving_force, ranges : results in ``mode`` (None when not computed)
    profile : DataFrame of the energy profile along ``route``
    route : list of (reaction id, direction)
    robustness : RobustnessResult or None
    notes : plain-words remarks (what could not be computed and why, relaxations made)
    timings : seconds per step
    """

    network: Any
    environment: Any
    network_source: str
    environment_source: str
    mode: str
    options: Any
    coverage: Any = None
    feasibility: dict = field(default_factory=dict)
    census: dict = field(default_factory=dict)
    h2_scan: Any = None
    h2_threshold: Any = None
    h2_unit: str = "mol/L"
    driving_force: Any = None
    profile: pd.DataFrame = field(default_factory=pd.DataFrame)
    route: list = field(default_factory=list)
    route_source: str = ""
    ranges: Any = None
    ranges_relaxed: list = field(default_factory=list)
    reference: Any = None
    reference_words: str = ""
    robustness: Any = None
    notes: list = field(default_factory=list)
    timings: dict = field(default_factory=dict)
    sources_used: list = field(default_factory=list)
    bounds: dict = field(default_factory=dict)
    network_sources: Any = None

    # ---------------------------------------------------------------- plain words
    def summary_data(self) -> dict:
        """The results as plain data (the keys of :mod:`tfa.report.summary`, plus details)."""
        counts = self.coverage.counts if self.coverage is not None else {}
        total = self.coverage.total if self.coverage is not None else 0
        missing = counts.get("placeholder", 0) + counts.get("none", 0)
        data: dict[str, Any] = {
            "network": getattr(self.network, "id", ""),
            "environment": f"{self.environment.name} ({self.environment.conditions.describe()})",
            "coverage": {"reactions": total, "with_energy": total - missing,
                         "estimated": counts.get("estimated", 0), "missing": missing},
            "feasible": {m: r.feasible for m, r in self.feasibility.items()},
            "uphill": {m: (r.diagnosis.sets if r.diagnosis is not None else [])
                       for m, r in self.feasibility.items()},
            "demand_impossible": [m for m, r in self.feasibility.items() if r.demand_impossible],
            "mode": self.mode,
        }
        if self.h2_threshold is not None:
            data["h2_threshold"] = self.h2_threshold.threshold if self.h2_threshold.feasible else None
            data["h2_range"] = list(self.h2_threshold.search_range)
            data["h2_unit"] = self.h2_unit
        if self.driving_force is not None:
            data["driving_force"] = self.driving_force.driving_force
            data["bottlenecks"] = list(self.driving_force.bottlenecks)
        if self.robustness is not None:
            data["robustness"] = self.robustness.feasibility_frame().to_dict(orient="records")
        data["notes"] = list(self.notes)
        return data

    def summary_lines(self) -> list[str]:
        """The answer in short sentences (one per line)."""
        from .report.summary import MODE_QUESTIONS, summary_lines

        data = self.summary_data()
        lines = summary_lines(data)
        for mode in data["demand_impossible"]:
            question = MODE_QUESTIONS.get(mode, mode)
            lines = [line + " (the demand cannot be met even ignoring thermodynamics)"
                     if line == f"{question}: no" else line for line in lines]
        if self.mode != "native" and (self.h2_threshold is not None or self.driving_force is not None):
            lines.append(f"(H2 needed and driving force in mode {self.mode})")
        if self.robustness is not None:
            for row in self.robustness.feasibility_frame().itertuples():
                if row.draws:
                    lines.append(f"robustness ({row.mode}): feasible in {row.feasible} of "
                                 f"{row.draws} draws of the energies")
        return lines

    def summary(self) -> str:
        """:meth:`summary_lines` as one text."""
        return "\n".join(self.summary_lines())

    # ---------------------------------------------------------------- tables
    def tables(self) -> dict[str, pd.DataFrame]:
        """Every result table by file name (see :data:`TABLE_FILES`)."""
        out: dict[str, pd.DataFrame] = {}
        if self.coverage is not None:
            out["coverage"] = self.coverage.to_frame()
        out["census"] = census_long(self.census)
        out["census_counts"] = pd.DataFrame([r.counts() for r in self.census.values()])
        out["feasibility"] = pd.DataFrame([
            {"mode": m, "feasible": r.feasible,
             "uphill_set_size": (r.diagnosis.size if r.diagnosis is not None
                                 else (0 if r.feasible else None)),
             "demand_impossible": r.demand_impossible, "message": r.message}
            for m, r in self.feasibility.items()],
            columns=["mode", "feasible", "uphill_set_size", "demand_impossible", "message"])
        rows = []
        for m, r in self.feasibility.items():
            if r.diagnosis is not None:
                for row in r.diagnosis.to_frame().to_dict(orient="records"):
                    rows.append({"mode": m, **row})
        out["uphill_sets"] = pd.DataFrame(rows, columns=["mode", "set", "reaction", "direction",
                                                         "uphill_by_kJ"])
        if self.h2_scan is not None:
            out["h2_scan"] = self.h2_scan.to_frame()
        if self.h2_threshold is not None:
            out["h2_threshold"] = self.h2_threshold.to_frame()
        if self.driving_force is not None:
            out["driving_force"] = self.driving_force.to_frame()
        out["energy_profile"] = self.profile
        if self.ranges is not None:
            with warnings.catch_warnings():  # concatenating an empty compounds table
                warnings.simplefilter("ignore", FutureWarning)
                out["ranges"] = self.ranges.to_frame()
        if self.robustness is not None:
            out["robustness_feasibility"] = self.robustness.feasibility_frame()
            out["robustness_uphill"] = self.robustness.uphill_frame()
        return out

    # ---------------------------------------------------------------- files
    def write(self, out_dir: str | Path) -> list[Path]:
        """Write tables (CSV + JSON), figures (PNG + SVG), ``summary.json`` and ``report.html``
        into ``out_dir`` (created if needed), each file atomically. Returns the paths."""
        from .report.tables import write_table
        from .util.files import write_json

        out = Path(out_dir)
        if out.exists() and not out.is_dir():
            raise InputError(f"{out}: exists and is not a folder; give another --out")
        written: list[Path] = []
        for name, frame in self.tables().items():
            written.extend(write_table(frame, out / name))
        figures = self._write_figures(out)
        for paths in figures.values():
            written.extend(paths)
        written.append(write_json(out / SUMMARY_FILE, {**self.summary_data(),
                                                       "summary": self.summary_lines(),
                                                       "timings_s": self.timings}))
        written.append(self._write_report(out, figures))
        return written

    def _write_figures(self, out: Path) -> dict[str, tuple[Path, Path]]:
        from .report import figures as fig

        made: dict[str, tuple[Path, Path]] = {}
        if len(self.profile):
            title = f"Energy profile along the route, {self.mode} mode"
            made["energy_profile"] = fig.save_figure(
                fig.energy_profile_figure(self.profile[["step", "dg_prime", "dg_standard"]], title),
                out / "energy_profile")
        if self.h2_scan is not None and len(self.h2_scan.to_frame()):
            scan = h2_scan_for_figure(self.h2_scan.to_frame())
            threshold = (self.h2_threshold.threshold if self.h2_threshold is not None
                         and self.h2_threshold.feasible else None)
            made["h2_scan"] = fig.save_figure(
                fig.h2_scan_figure(scan, unit=self.h2_unit, threshold=threshold,
                                   title=f"H2 supply, {self.mode} mode"), out / "h2_scan")
        long = census_long(self.census)
        if len(long):
            made["census"] = fig.save_figure(
                fig.census_figure(long, title="Reaction energies at the setting, per mode"),
                out / "census")
        if self.ranges is not None and len(self.ranges.reactions):
            made["ranges"] = fig.save_figure(
                fig.ranges_figure(ranges_for_figure(self.ranges, self.reference),
                                  title=f"Feasible ΔrG' per reaction, {self.mode} mode"),
                out / "ranges")
        return made

    def _write_report(self, out: Path, figures: dict[str, tuple[Path, Path]]) -> Path:
        from .report.html import (ReportSection, build_report, cautions_section,
                                  conventions_section, environment_section, sources_section)

        def stem(name: str) -> list[Path]:
            return [figures[name][1]] if name in figures else []

        tables = self.tables()
        env = self.environment
        sections = [ReportSection("Summary", self.summary() + (
            "\n\nNotes:\n" + "\n".join(f"- {n}" for n in self.notes) if self.notes else ""))]
        bounds = pd.DataFrame([{"compound": m, "lower": math.exp(lo), "upper": math.exp(hi)}
                               for m, (lo, hi) in sorted(self._log_bounds().items())],
                              columns=["compound", "lower", "upper"])
        sections.append(environment_section(
            env.conditions, env.feed, bounds, name=env.name,
            text=(f"{env.description}\n\nNetwork: {self.network_source}. Environment file: "
                  f"{self.environment_source}.").strip()))
        if self.coverage is not None:
            c = self.coverage
            sections.append(ReportSection(
                "Data coverage",
                f"{c.total} internal reactions; {100 * c.reviewed_or_cited_fraction:.0f}% have "
                "their transformed standard energy from reviewed species data or cited "
                "literature values. Sources: species (reviewed species data), literature (a "
                "cited reaction value), reconciled (several values combined), estimate (group "
                "contribution, wide uncertainty).",
                c.counts_frame(), table_caption="Reactions per kind of data",
                more_tables=(("Every reaction: dG'0 (kJ/mol), standard uncertainty and provenance",
                              tables["coverage"]),)))
        sections.append(ReportSection(
            "Feasibility per mode",
            "native: the network as given (ATP regenerated inside); h2_only: H2 in place of "
            "the redox carriers; no_atp_strict: no ATP at all; no_atp_bare: ATP coupling "
            "stripped from each reaction (bare chemistry).",
            tables["feasibility"], table_caption="Feasibility per mode"))
        sections.append(ReportSection(
            "Minimal uphill sets",
            "The fewest reactions that must run against their gradient (coupled to an energy "
            "source) for the demand to be met; uphill_by_kJ is how far uphill each runs at the "
            "concentrations that make the set's total smallest (kJ/mol).",
            tables["uphill_sets"], table_caption="Minimal uphill sets per mode"))
        if "h2_scan" in tables:
            words = self.h2_scan.summary()
            if self.h2_threshold is not None:
                words += "\n" + self.h2_threshold.message
            sections.append(ReportSection(
                "H2 scan and threshold", words, tables["h2_scan"],
                figure_paths=stem("h2_scan"),
                figure_captions=[f"Feasibility, size of the minimal uphill set and max-min driving "
                                 f"force against the H2 supply ({self.h2_unit})"],
                table_caption=f"H2 scan ({self.h2_unit})",
                more_tables=(("H2 threshold", tables["h2_threshold"]),)
                if "h2_threshold" in tables else ()))
        if "driving_force" in tables:
            sections.append(ReportSection(
                "Driving force", self.driving_force.summary() + " (a negative value: the most "
                "uphill step cannot be made less uphill than this).", tables["driving_force"],
                table_caption="Reactions carrying flux at the max-min driving force (kJ/mol)"))
        if len(self.profile):
            sections.append(ReportSection(
                "Energy profile",
                f"Route ({self.route_source}): " + ", ".join(self.profile["step"]) + ". dG' at "
                f"the concentrations of {self.reference_words}; dG'0 dashed.", self.profile, figure_paths=stem("energy_profile"),
                figure_captions=["Cumulative dG' along the route (kJ/mol)"],
                table_caption="Route steps (kJ/mol)"))
        if "ranges" in tables:
            words = self.ranges.summary()
            if self.ranges_relaxed:
                words += (". The network is infeasible in this mode, so the ranges are over the "
                          "steady states in which " + ", ".join(self.ranges_relaxed) +
                          " (the minimal uphill set) may run uphill.")
            sections.append(ReportSection(
                "Ranges", words, tables["ranges"], figure_paths=stem("ranges"),
                figure_captions=["Interval of dG' per reaction over the feasible set (kJ/mol); "
                                 f"ticks: {self.reference_words}"],
                table_caption="Ranges (reactions kJ/mol; compounds mol/L or bar)"))
        if "census" in figures or "census_counts" in tables:
            sections.append(ReportSection(
                "Census", "dG' of every reaction with all reactants at 1 mM (gases 1e-3 bar) and "
                "dG'0, per mode.", tables["census_counts"], figure_paths=stem("census"),
                figure_captions=["Distribution of reaction energies per mode (kJ/mol)"],
                table_caption="Reactions exergonic per mode",
                more_tables=(("Every reaction per mode (kJ/mol)", tables["census"]),)))
        if self.robustness is not None:
            sections.append(ReportSection(
                "Robustness",
                f"{self.robustness.n_draws} draws per mode of the reaction energies from their "
                f"correlated uncertainty (seed {self.robustness.seed}); a small run, enlarge it "
                "with --robustness-draws or tfa robustness.\n" + self.robustness.summary(),
                tables["robustness_feasibility"], table_caption="Feasibility over the draws",
                more_tables=(("How often each reaction is in the minimal uphill set",
                              tables["robustness_uphill"]),)))
        sections.append(sources_section(*self._sources()))
        sections.append(conventions_section())
        sections.append(cautions_section())
        subtitle = (f"{getattr(self.network, 'id', '')} at {env.name}: "
                    f"{env.conditions.describe()}")
        return build_report(sections, out / REPORT_FILE, title="tfa network assessment",
                            subtitle=subtitle)

    def _log_bounds(self) -> dict:
        return self.bounds

    def _sources(self) -> tuple[pd.DataFrame, list[str]]:
        from .thermo.database import ThermoDatabase

        db = ThermoDatabase.load()
        rows = [{"key": s.key, "authors": s.authors, "year": s.year, "citation": s.citation,
                 "doi": s.doi or "", "peer_reviewed": "yes" if s.peer_reviewed else "no"}
                for s in db.sources.values()]
        table = pd.DataFrame(rows)
        extra = self.network_sources
        if extra is not None and len(extra):
            table = pd.concat([table, extra[[c for c in table.columns if c in extra.columns]]],
                              ignore_index=True).drop_duplicates("key", keep="last")
        known = set(table["key"].astype(str))
        used = [k for k in self.sources_used if k in known]
        return table, used


def census_long(census: dict) -> pd.DataFrame:
    """Census tables of every mode as one long table: ``mode, reaction, dg_prime, kind``
    (kinds: "ΔrG'°" and "ΔrG' at 1 mM"; kJ/mol)."""
    frames = []
    for mode, result in census.items():
        t = result.to_frame()
        for column, kind in (("dg0_prime_kJ", "ΔrG'°"), ("dg_1mM_kJ", "ΔrG' at 1 mM")):
            frames.append(pd.DataFrame({"mode": mode, "reaction": t["reaction"],
                                        "dg_prime": t[column], "kind": kind}))
    if not frames:
        return pd.DataFrame(columns=["mode", "reaction", "dg_prime", "kind"])
    return pd.concat(frames, ignore_index=True)


def h2_scan_for_figure(scan: pd.DataFrame) -> pd.DataFrame:
    """The H2 scan table in the columns of :func:`tfa.report.figures.h2_scan_figure`."""
    return pd.DataFrame({"h2": scan["h2"], "feasible": scan["feasible"].astype(bool),
                         "uphill_count": scan["uphill_set_size"],
                         "driving_force": scan["driving_force_kJ"]})


def ranges_for_figure(ranges_result, driving_force=None) -> pd.DataFrame:
    """Reaction ranges in the columns of :func:`tfa.report.figures.ranges_figure`, with ΔrG' at
    the max-min driving-force solution where the reaction carries flux there."""
    frame = ranges_result.reactions.rename(columns={"dg_min_kJ": "dg_min", "dg_max_kJ": "dg_max"})
    if driving_force is not None and len(driving_force.table):
        at = dict(zip(driving_force.table["reaction"], driving_force.table["dg_prime_kJ"]))
        frame = frame.assign(dg_at_solution=[at.get(r, float("nan")) for r in frame["reaction"]])
    return frame


# ------------------------------------------------------------------------------------ run
def assess(network: Any = None, environment: Any = None, out: str | Path | None = None, *,
           mode: str = "native", modes: Sequence[str] = ALL_MODES, options: Any = None,
           route: str | Sequence[str] | None = None,
           h2_levels: Sequence[float] = DEFAULT_H2_LEVELS,
           h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
           alternatives: int = DEFAULT_ALTERNATIVES, ranges_compounds: bool = False,
           robustness_draws: int = DEFAULT_ROBUSTNESS_DRAWS, robustness_seed: int = 0,
           workers: int | None = None, compounds: str | Path | None = None,
           include_unreviewed: bool = False,
           conditions: dict[str, float | None] | None = None,
           progress: ProgressCallback | None = None) -> Assessment:
    """Assess a network at a setting: every analysis, optionally written to ``out``.

    Parameters
    ----------
    network : None, path or cobra.Model
        None: the bundled network (demo data).
    environment : None, path or Environment
        None: ``environment.toml`` beside the network, else the bundled one.
    out : path, optional
        Folder to write every file into (see :meth:`Assessment.write`); None writes nothing.
    mode : str
        Mode of the H2 scan, threshold, driving force, energy profile and ranges.
    modes : sequence of str
        Modes of the feasibility question and the census.
    options : ProblemOptions, optional
        Solver, least driving force, k sigma, unknown-energy policy, time limit.
    route : "R1,R2,-R3" or list, optional
        Reactions of the energy profile in order (a leading minus: run backwards); default:
        the tagged carbon-fixation route that carries flux (:func:`route_reactions`).
    h2_levels, h2_range : H2 scan levels and threshold range (mol/L; gas feed: bar)
    alternatives : alternative minimal uphill sets per mode
    ranges_compounds : also range every concentration (slower)
    robustness_draws : draws per mode of the robustness run (0: skip it)
    robustness_seed, workers : seed of the draws; worker processes for the robustness run and
        the ranges (None: in this process; measured on the shared 2-core machine, two workers
        were slower than one for the bundled network's ranges: 65 s against 49 s)
    compounds : compounds table when not beside the reactions table
    include_unreviewed : use data from sources that are not peer reviewed too
    conditions : overrides of the environment (``celsius``, ``ph``, ``ionic_strength``,
        ``pressure``, ``pmg``)
    progress : callable(step label, steps done, total steps), optional

    Returns
    -------
    Assessment

    Raises
    ------
    InputError
        Bad network, environment, mode, route or option (nothing is written).
    """
    from .analyses.census import census
    from .network.energies import prepare
    from .problem.builder import ProblemOptions
    from .thermo.database import ThermoDatabase

    options = options or ProblemOptions()
    modes = list(modes)
    bad = [m for m in [*modes, mode] if m not in ALL_MODES]
    if bad:
        raise InputError(f"unknown mode(s) {', '.join(bad)}; use {', '.join(ALL_MODES)}")
    if not modes:
        raise InputError("no mode given; use one or more of " + ", ".join(ALL_MODES))
    if robustness_draws < 0:
        raise InputError(f"robustness draws {robustness_draws}: give 0 (skip) or more")
    if alternatives < 1:
        raise InputError(f"alternatives {alternatives}: give at least 1")
    levels = [float(v) for v in h2_levels]
    if not levels or any(not (math.isfinite(v) and v > 0) for v in levels):
        raise InputError("H2 levels must be positive, finite concentrations (mol/L; gas: bar)")
    if out is not None and Path(out).exists() and not Path(out).is_dir():
        raise InputError(f"{out}: exists and is not a folder; give another output folder")
    user_route = parse_route(route)

    steps = ["reading the network", "data coverage", *[f"feasibility: {m}" for m in modes],
             "census", "H2 scan", "H2 threshold", "driving force", "ranges"]
    if robustness_draws:
        steps.append("robustness")
    if out is not None:
        steps.append("writing files")
    clock = _Clock(steps, progress)

    clock.start("reading the network")
    inputs = resolve_inputs(network, environment, compounds, **(conditions or {}))
    model, env = inputs.model, inputs.environment
    if user_route is not None:
        unknown = [rid for rid, _ in user_route if rid not in model.reactions]
        if unknown:
            raise InputError(f"route: reaction(s) {', '.join(unknown)} not in network {model.id}; "
                             "give ids of its reactions, separated by commas")
    db = ThermoDatabase.load(include_unreviewed=include_unreviewed)
    result = Assessment(network=model, environment=env, network_source=inputs.network_source,
                        environment_source=inputs.environment_source, mode=mode, options=options)
    result.network_sources = _network_sources(inputs.network_folder)
    literature = inputs.literature_path

    clock.start("data coverage")
    from .network.coverage import coverage

    result.coverage = coverage(model, env, db, literature if literature else [])

    thermo_models = {}
    for m in dict.fromkeys([*modes, mode]):
        if m in modes:
            clock.start(f"feasibility: {m}")
        thermo_models[m] = prepare(model, env, m, db=db)
        if m in modes:
            result.feasibility[m] = _feasibility(thermo_models[m], options, alternatives)
    tm = thermo_models[mode]
    result.bounds = dict(tm.log_bounds)
    result.sources_used = _used_sources(tm)
    result.h2_unit = _h2_unit(tm, db)

    clock.start("census")
    for m in modes:
        result.census[m] = census(thermo_models[m])

    from .analyses.driving_force import network_driving_force
    from .analyses.hydrogen import h2_scan, h2_threshold
    from .problem.solvers import InfeasibleProblem

    clock.start("H2 scan")
    result.h2_scan = _attempt(result, "H2 scan", lambda: h2_scan(tm, levels, options))
    clock.start("H2 threshold")
    result.h2_threshold = _attempt(result, "H2 threshold",
                                   lambda: h2_threshold(tm, options, h2_range=h2_range))
    clock.start("driving force")
    result.driving_force = _attempt(result, "driving force",
                                    lambda: network_driving_force(tm, options))
    result.reference, result.reference_words = _reference_solution(result, tm, options)
    concentrations: dict[str, float] = {}
    if result.reference is not None:
        ref = result.reference.concentrations
        concentrations = dict(zip(ref["compound"], ref["ln_c"]))
    if user_route is not None:
        result.route, result.route_source = user_route, "given with --route"
    else:
        reference_fluxes = None
        if result.reference is not None:
            frame = result.reference.to_frame()
            reference_fluxes = dict(zip(frame["reaction"], frame["flux"]))
        result.route = route_reactions(tm.model, tm.demand_id, fluxes=reference_fluxes)
        result.route_source = "acetyl-CoA pathway to pyruvate"
        if not result.route:
            result.notes.append("no route from the feed to pyruvate through reactions tagged "
                                "with the acetyl-CoA pathway or pyruvate synthesis: no energy "
                                "profile (name the route with --route R1,R2,...)")
    result.profile = energy_profile(tm, result.route, concentrations)

    clock.start("ranges")
    result.ranges = _ranges(result, tm, options, ranges_compounds, clock, InfeasibleProblem,
                            workers)

    if robustness_draws:
        clock.start("robustness")
        result.robustness = _robustness(result, model, env, modes, options, robustness_draws,
                                        robustness_seed, workers)
    if out is not None:
        clock.start("writing files")
        result.timings = dict(clock.timings)
        result.write(out)
    clock.finish()
    result.timings = dict(clock.timings)
    return result


class _Clock:
    """Step timings and the progress callback."""

    def __init__(self, steps: list[str], progress: ProgressCallback | None) -> None:
        self.steps = steps
        self.progress = progress
        self.timings: dict[str, float] = {}
        self.current: str | None = None
        self.t0 = time.monotonic()
        self.done = 0

    def start(self, label: str) -> None:
        self.finish()
        self.current = label
        self.t0 = time.monotonic()
        log.info("assess: %s", label)
        if self.progress is not None:
            self.progress(label, self.done, len(self.steps))

    def finish(self) -> None:
        if self.current is not None:
            self.timings[self.current] = round(time.monotonic() - self.t0, 2)
            self.done += 1
            self.current = None


def _attempt(result: Assessment, what: str, call: Callable[[], Any]) -> Any:
    """Run one analysis; a computation error becomes a note (input errors propagate)."""
    from .errors import ComputationError

    try:
        return call()
    except ComputationError as err:
        log.warning("%s: %s", what, err)
        result.notes.append(f"{what}: not computed ({err})")
        return None


def relax(tm, reactions: Sequence[str]):
    """The ThermoModel with the energies of ``reactions`` left out: they may then run either way
    (as if coupled to an energy source), which is what a minimal uphill set allows."""
    drop = set(reactions)
    return dataclasses.replace(tm, energies={k: v for k, v in tm.energies.items() if k not in drop})


def _reference_solution(result: Assessment, tm, options):
    """The steady state whose concentrations the energy profile and the ranges figure show: the
    max-min driving-force solution of the network when it is feasible, else of the network with
    its first minimal uphill set allowed to run uphill (the best concentrations of the
    minimal-uphill solution)."""
    from .analyses.driving_force import network_driving_force

    feas = result.feasibility.get(tm.mode)
    if feas is None or feas.feasible:
        return result.driving_force, "the max-min driving-force solution of the network"
    if feas.diagnosis is None or not feas.diagnosis.sets or not feas.diagnosis.sets[0]:
        return result.driving_force, "the max-min driving-force solution of the network"
    members = feas.diagnosis.sets[0]
    reference = _attempt(result, "driving force with the minimal uphill set allowed",
                         lambda: network_driving_force(relax(tm, members), options))
    return reference, ("the max-min driving-force solution of the network in which "
                       + ", ".join(members) + " (the minimal uphill set) may run uphill")


def _feasibility(tm, options, alternatives: int):
    """Feasibility with up to ``alternatives`` minimal uphill sets as the diagnosis."""
    from .analyses.feasibility import feasibility
    from .errors import UndeterminedError

    try:
        return feasibility(tm, options, alternatives=alternatives)
    except UndeterminedError as err:
        from .analyses.feasibility import FeasibilityResult

        return FeasibilityResult(conditions=tm.conditions, mode=tm.mode, feasible=False,
                                 message=f"undetermined: {err}")


def _ranges_task(task) -> Any:
    """One chunk of the ranges (a top-level function, so worker processes can run it)."""
    from .analyses.ranges import ranges

    tm, options, reactions, compounds = task
    return ranges(tm, options, reactions=reactions, compounds=compounds)


def _run_chunks(tasks: list, workers: int | None, clock: _Clock) -> list:
    """Run the ranges chunks, in ``workers`` processes when more than one (default: in this
    process); results come back in task order. Each chunk certifies its own solutions."""
    pool_size = min(len(tasks), workers or 1)
    done = 0

    def tick() -> None:
        if clock.progress is not None:
            clock.progress(f"ranges {done}/{len(tasks)} parts", clock.done, len(clock.steps))

    if pool_size <= 1:
        parts = []
        for task in tasks:
            tick()
            parts.append(_ranges_task(task))
            done += 1
        return parts
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(max_workers=pool_size) as pool:
        futures = [pool.submit(_ranges_task, task) for task in tasks]
        parts = []
        for future in futures:
            tick()
            parts.append(future.result())
            done += 1
    return parts


def _ranges(result: Assessment, tm, options, with_compounds: bool, clock: _Clock, infeasible_error,
            workers: int | None = None):
    """Ranges of every reaction energy (and, when asked, concentration); when the mode is
    infeasible, over the steady states in which the first minimal uphill set may run uphill
    (those reactions' energies are left out of the problem)."""
    from .analyses.ranges import RangesResult

    feas = result.feasibility.get(tm.mode)
    target = tm
    if feas is not None and not feas.feasible:
        if feas.diagnosis is None or not feas.diagnosis.sets:
            result.notes.append(f"ranges: not computed, the {tm.mode} network has no steady state "
                                "that meets the demand")
            return None
        relaxed = feas.diagnosis.sets[0]
        target = relax(tm, relaxed)
        result.ranges_relaxed = list(relaxed)
        result.notes.append("ranges: the network is infeasible in this mode; ranges are over the "
                            f"steady states in which {', '.join(relaxed)} may run uphill")
    ids = [r.id for r in target.internal_reactions() if r.id in target.energies]
    pool = workers or 1
    size = max(RANGES_CHUNK, -(-len(ids) // pool))  # one chunk per worker: incumbents shared within it
    chunks = [ids[start:start + size] for start in range(0, len(ids), size)]
    # plain data for worker processes: the compound table is not needed to range energies
    shipped = dataclasses.replace(target, compound_table=None)
    tasks = [(shipped, options, chunk, []) for chunk in chunks]
    if with_compounds:
        tasks.append((shipped, options, [], None))
    try:
        parts = _run_chunks(tasks, workers, clock)
    except infeasible_error as err:
        result.notes.append(f"ranges: not computed ({err})")
        return None
    except TfaError as err:
        result.notes.append(f"ranges: not computed ({err})")
        return None
    compounds_part = parts.pop() if with_compounds else None
    out = RangesResult(conditions=target.conditions)
    out.reactions = pd.concat([p.reactions for p in parts], ignore_index=True) if parts else \
        pd.DataFrame(columns=["reaction", "dg_min_kJ", "dg_max_kJ"])
    out.compounds = (compounds_part.compounds if compounds_part is not None
                     else pd.DataFrame(columns=["compound", "c_min", "c_max"]))
    for p in [*parts, compounds_part]:
        if p is not None:
            out.certificates.extend(p.certificates)
    out.provenance = parts[0].provenance if parts else {}
    if result.ranges_relaxed:
        out.provenance = {**out.provenance, "uphill_allowed": list(result.ranges_relaxed)}
    return out


def _robustness(result: Assessment, model, env, modes, options, draws: int, seed: int,
                workers: int | None):
    """A small robustness run over the modes whose answer depends on the energies (a demand the
    stoichiometry cannot meet does not)."""
    from .analyses.robustness import robustness

    run_modes = [m for m in modes if not result.feasibility[m].demand_impossible]
    if not run_modes:
        result.notes.append("robustness: skipped, no mode can meet the demand at all")
        return None
    executor = "pool" if workers else "serial"
    try:
        return robustness(model, env, n_draws=draws, seed=seed, modes=run_modes,
                          executor=executor, workers=workers, threshold=False,
                          solver=options.solver, time_limit=options.time_limit,
                          min_driving_force=options.min_driving_force,
                          unknown_energy=options.unknown_energy)
    except TfaError as err:
        if isinstance(err, InputError):
            raise
        result.notes.append(f"robustness: not computed ({err})")
        return None


def _used_sources(tm) -> list[str]:
    keys: list[str] = []
    table = tm.compound_table
    if table is not None:
        for c in table.compounds.values():
            for k in c.sources:
                if k and k not in keys:
                    keys.append(k)
        for value in table.literature:
            if value.source_key and value.source_key not in keys:
                keys.append(value.source_key)
    return keys


def _h2_unit(tm, db) -> str:
    h2 = {r.lower(): mid for r, mid in tm.feed_ids.items()}.get("h2")
    if h2 is None:
        return "mol/L"
    met = tm.model.metabolites.get_by_id(h2) if h2 in tm.model.metabolites else None
    key = str((met.notes or {}).get("thermo_key") or h2) if met is not None else h2
    try:
        return "bar" if db.compound(key).kind == "gas" else "mol/L"
    except TfaError:
        return "mol/L"


def _network_sources(folder: Path | None) -> pd.DataFrame | None:
    if folder is None:
        return None
    for name, sep in (("sources.tsv", "\t"), ("sources.csv", ",")):
        path = folder / name
        if path.is_file():
            try:
                frame = pd.read_csv(path, sep=sep, comment="#", dtype=str, keep_default_na=False)
            except (pd.errors.ParserError, UnicodeDecodeError) as err:
                raise InputError(f"{path}: cannot be read as a table ({err}); fix it or remove it")
            return frame if "key" in frame.columns else None
    return None
