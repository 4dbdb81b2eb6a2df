"""The HTML report of an assessment: the summary, the environment, one or more sections per step
(in step order), the data sources, the conventions and the cautions, in one self-contained page
(:func:`tfa.report.html.build_report`)."""

from __future__ import annotations

import math
from pathlib import Path
from typing import TYPE_CHECKING

import pandas as pd

from ..report.html import ReportSection, build_report
from ..thermo.status import RECALLED
from ..report.sections import (cautions_section, conventions_section, environment_section,
                               sources_section)

if TYPE_CHECKING:
    from .result import Assessment

#: Words before the table of data sources.
SOURCES_TEXT = ("recalled_values counts the numbers taken from a source without checking them "
                "against its printed table (marked \"from memory\"); verify those before "
                "publishing (the to_verify table lists each with the reactions that use it).")


def write_report(assessment: "Assessment", tables: dict[str, pd.DataFrame],
                 figures: dict[str, Path], path: Path) -> Path:
    """Write ``report.html`` for an assessment whose tables and figures (file stem -> SVG path)
    are made; returns the path."""
    ctx = assessment.context
    notes = ctx.notes
    sections = [ReportSection("Summary", assessment.summary() + (
        "\n\nNotes:\n" + "\n".join(f"- {n}" for n in notes) if notes else "") + (
        "\n\nWarnings (conditions past a model's usual range):\n"
        + "\n".join(f"- {w}" for w in ctx.warnings) if ctx.warnings else ""))]
    sections.append(_environment(assessment))
    for step in assessment.steps:
        for spec in step.sections(assessment.result(step.id), ctx):
            shown = [(caption, tables[stem]) for stem, caption in spec.tables if stem in tables]
            shown = list(spec.extra_tables) + shown
            figure_paths = [figures[stem] for stem, _ in spec.figures if stem in figures]
            captions = [caption for stem, caption in spec.figures if stem in figures]
            first_caption, first = shown[0] if shown else ("", None)
            sections.append(ReportSection(spec.title, spec.text, first,
                                          figure_paths=figure_paths, figure_captions=captions,
                                          table_caption=first_caption,
                                          more_tables=tuple(shown[1:])))
    sources, used = _sources(assessment)
    sections.append(sources_section(sources, used, text=SOURCES_TEXT if "recalled_values" in sources
                                    else ""))
    from ..network.standard_states import standard_state_words

    sections.append(conventions_section(standard_state_words(ctx.model, ctx.database)))
    sections.append(cautions_section())
    env = ctx.environment
    subtitle = f"{ctx.model.id} at {env.name}: {env.conditions.describe()}"
    return build_report(sections, path, title="tfa network assessment", subtitle=subtitle)


def _environment(assessment: "Assessment") -> ReportSection:
    ctx = assessment.context
    env = ctx.environment
    tm = ctx.thermo_model(ctx.settings.mode)
    bounds = pd.DataFrame([{"compound": m, "lower": math.exp(lo), "upper": math.exp(hi)}
                           for m, (lo, hi) in sorted(tm.log_bounds.items())],
                          columns=["compound", "lower", "upper"])
    from ..network.compartments import describe_compartments

    text = (f"{env.description}\n\nNetwork: {ctx.inputs.network_source}. Environment file: "
            f"{ctx.inputs.environment_source}."
            + (f"\n\nCompartments besides the cell: {describe_compartments(env)}."
               if env.compartments else "")
            + ("\n\nIons moved across the membrane per turnover: "
               + ", ".join(f"{rid} {n:g}" for rid, n in sorted(env.ion_stoichiometry.items())) + "."
               if env.ion_stoichiometry else "")).strip()
    feed = dict(env.feed)
    for met_id, (key, value) in env.fluid_feed(ctx.model).items():   # the speciated [fluid] totals
        feed[f"{met_id} ({key}, speciated from [fluid])"] = value
    states = [r.text for r in tm.log_rows] + [p.text for p in tm.pools]
    if states:
        text += "\n\nCarrier states ([cofactors]): " + "; ".join(states) + "."
    elif env.cofactors is None:
        text += "\n\nCarrier states: none (every carrier form only within its bounds)."
    return environment_section(env.conditions, feed, bounds, name=env.name, text=text)


def _sources(assessment: "Assessment") -> tuple[pd.DataFrame, list[str]]:
    """Every data source (the database's and the network's own) and the keys the results use."""
    ctx = assessment.context
    db = ctx.database
    rows = [{"key": s.key, "authors": s.authors, "year": s.year, "citation": s.citation,
             "doi": s.doi or "", "peer_reviewed": "yes" if s.peer_reviewed else "no"}
            for s in db.sources.values()]
    table = pd.DataFrame(rows)
    extra = ctx.inputs.network_sources()
    if extra is not None and len(extra):
        table = pd.concat([table, extra[[c for c in table.columns if c in extra.columns]]],
                          ignore_index=True).drop_duplicates("key", keep="last")
    coverage = ctx.results.get("coverage")
    if coverage is not None:
        verify = coverage.to_verify()
        recalled = verify.loc[verify["status"] == RECALLED, "source"].value_counts()
        table["recalled_values"] = [int(recalled.get(k, 0)) for k in table["key"]]
    known = set(table["key"].astype(str))
    used = [k for k in _used_source_keys(ctx.thermo_model(ctx.settings.mode)) if k in known]
    return table, used


def _used_source_keys(tm) -> list[str]:
    """Source keys of every compound energy and literature value behind a prepared network."""
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
