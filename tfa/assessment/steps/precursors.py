"""Step: each demanded compound alone, per mode: made downhill, made only with steps driven uphill
(a thermodynamic bottleneck, with the first minimal set), or not made from the feed at all (a
stoichiometric gap)."""

from __future__ import annotations

from ...analyses.precursors import (PrecursorResult, PrecursorVerdict, demanded_compounds,
                                    precursor_verdicts)
from ..context import RunContext
from ..step import FigureSpec, Section, Step
from .feasibility import question_for


class PrecursorStep(Step):
    """Per-precursor verdicts (:mod:`tfa.analyses.precursors`) in every mode of the run."""

    id = "precursors"
    label = "precursors one by one"
    title = "Each precursor alone"
    question = ("which demanded compounds can the network make alone, per mode: downhill, only "
                "with steps driven uphill, or not at all from the feed?")

    def run(self, ctx: RunContext) -> PrecursorResult:
        result = PrecursorResult(conditions=ctx.environment.conditions)
        modes = ctx.settings.modes
        for k, mode in enumerate(modes):
            ctx.tick(k, len(modes), f"modes ({mode})")
            reason = ctx.not_applicable(mode)
            if reason:
                result.verdicts += _not_applicable(ctx, mode, reason)
                continue
            tick = ctx.ticker(f"compounds ({mode}, mode {k + 1} of {len(modes)})")
            answer = ctx.attempt(f"precursors ({mode})",
                                 lambda: precursor_verdicts(ctx.thermo_model(mode), ctx.options,
                                                            progress=tick))
            if answer is None:
                result.verdicts += _not_applicable(ctx, mode, "undetermined", "undetermined")
                continue
            result.verdicts += answer.verdicts
            result.certificates += answer.certificates
        return result

    def tables(self, result: PrecursorResult, ctx: RunContext) -> dict:
        return {"precursors": result.to_frame()}

    def verification(self, result: PrecursorResult, ctx: RunContext) -> dict:
        from ...analyses.results import weakest

        modes = list(dict.fromkeys(v.mode for v in result.verdicts))
        return {m: weakest([v.verification for v in result.of_mode(m)],
                           [v.compound for v in result.of_mode(m)]) for m in modes}

    def figures(self, result: PrecursorResult, ctx: RunContext) -> dict:
        if not result.verdicts:
            return {}

        def make():
            from ...report.precursor_figure import precursors_figure

            return precursors_figure(result.to_frame(), "Each demanded compound alone, per mode")

        return {"precursors": FigureSpec(make, "Each demanded compound alone, per mode: made "
                                               "downhill (filled), only with n steps driven uphill "
                                               "(n), or not from the feed (crossed)")}

    def summary_lines(self, result: PrecursorResult, ctx: RunContext) -> list[str]:
        lines = []
        for mode in dict.fromkeys(v.mode for v in result.verdicts):
            verdicts = result.of_mode(mode)
            if not verdicts or verdicts[0].verdict == "not applicable":
                continue
            gaps = any(v.verdict == "stoichiometric gap" for v in verdicts)
            lines.append(precursor_line(question_for(mode, ctx), verdicts,
                                        native_producible(ctx) if gaps and mode != "native" else {}))
        return lines

    def summary_data(self, result: PrecursorResult, ctx: RunContext) -> dict:
        out = {}
        for mode in dict.fromkeys(v.mode for v in result.verdicts):
            verdicts = result.of_mode(mode)
            out[mode] = {
                "downhill": [v.compound for v in verdicts if v.verdict == "downhill"],
                "uphill": {v.compound: v.uphill_set for v in verdicts if v.verdict == "uphill"},
                "stoichiometric_gap": [v.compound for v in verdicts
                                       if v.verdict == "stoichiometric gap"],
                "undetermined": [v.compound for v in verdicts if v.verdict == "undetermined"]}
        return {"precursors": out}

    def sections(self, result: PrecursorResult, ctx: RunContext) -> list[Section]:
        if not result.verdicts:
            return []
        text = ("Each compound the demand reaction consumes, asked alone: the demand is replaced "
                "by that compound's own demand at the flux the whole demand needs of it. First, "
                "flux balance without energies says whether the feed can make it at all (max_flux; "
                "below the need: a stoichiometric gap); then whether a steady state makes it with "
                "every step downhill; otherwise the first minimal uphill set for it alone, in the "
                "order of reaction ids (a thermodynamic bottleneck), with the energy to supply "
                "to its steps per mol of the compound's demand.")
        return [Section(self.title, text, tables=[("precursors", "Each precursor alone, per mode")],
                        figures=[("precursors", "Verdict per demanded compound and mode")])]

    def text(self, result: PrecursorResult, ctx: RunContext) -> str:
        from ...report.text import table_text

        frame = result.to_frame().drop(columns=["message", "checked_by"])
        return "\n".join(self.summary_lines(result, ctx)) + "\n\n" + table_text(frame) + "\n"


def native_producible(ctx: RunContext) -> dict[str, bool]:
    """Whether the network as given (native mode) can make each demanded compound from the feed
    by flux balance alone (empty when the native mode does not apply); computed once per run."""
    from ...analyses.precursors import capacities

    def compute() -> dict[str, bool]:
        if ctx.not_applicable("native"):
            return {}
        tm = ctx.thermo_model("native")
        demand = tm.model.reactions.get_by_id(tm.demand_id)
        required = max(demand.lower_bound, 0.0)
        need = dict(demanded_compounds(tm))
        return {c: bool(v >= required * need[c] * (1 - 1e-9)) for c, v in capacities(tm).items()}

    return ctx.cached("precursors:native_producible", compute)


def _not_applicable(ctx: RunContext, mode: str, reason: str,
                    verdict: str = "not applicable") -> list[PrecursorVerdict]:
    """A verdict without a question asked for each compound of the demand as given."""
    tm = ctx.thermo_model("native") if not ctx.not_applicable("native") else None
    compounds = demanded_compounds(tm) if tm is not None else []
    return [PrecursorVerdict(mode, c, a, verdict, message=f"{verdict}: {reason}")
            for c, a in compounds]


def precursor_line(question: str, verdicts: list[PrecursorVerdict],
                   native: dict[str, bool]) -> str:
    """The verdicts of one mode in a sentence: which compounds are made downhill, which only
    with steps driven uphill (grouped by their first minimal set), which not at all and why.

    >>> v = [PrecursorVerdict("no_atp_strict", "gly", 0.58, "uphill", uphill_set=["FALDH"]),
    ...      PrecursorVerdict("no_atp_strict", "ser", 0.21, "uphill", uphill_set=["FALDH"]),
    ...      PrecursorVerdict("no_atp_strict", "utp", 0.14, "stoichiometric gap")]
    >>> precursor_line("runs without ATP", v, {"gly": True, "ser": True, "utp": True})
    'runs without ATP, each precursor alone: none made downhill; 2 only with steps driven uphill (a thermodynamic bottleneck): FALDH for gly, ser; 1 not from the feed (a stoichiometric gap: made in the native mode, so every route to it needs what this mode removes): utp'
    """
    from ...report.text import names

    downhill = [v.compound for v in verdicts if v.verdict == "downhill"]
    uphill = [v for v in verdicts if v.verdict == "uphill"]
    gaps = [v.compound for v in verdicts if v.verdict == "stoichiometric gap"]
    unknown = [v.compound for v in verdicts if v.verdict == "undetermined"]
    parts = []
    if len(downhill) == len(verdicts):
        parts.append(f"all {len(verdicts)} made downhill")
    else:
        parts.append(f"{len(downhill)} made downhill: {names(downhill)}" if downhill
                     else "none made downhill")
    if uphill:
        groups: dict[tuple[str, ...], list[str]] = {}
        for v in uphill:
            groups.setdefault(tuple(v.uphill_set), []).append(v.compound)
        listed = "; ".join(f"{', '.join(s)} for {names(c)}" for s, c in groups.items())
        parts.append(f"{len(uphill)} only with steps driven uphill (a thermodynamic "
                     f"bottleneck): {listed}")
    if gaps:
        removed = [c for c in gaps if native.get(c)]
        absent = [c for c in gaps if c not in removed]
        if removed:
            parts.append(f"{len(removed)} not from the feed (a stoichiometric gap: made in the "
                         "native mode, so every route to it needs what this mode removes): "
                         f"{names(removed)}")
        if absent:
            parts.append(f"{len(absent)} not from the feed (a stoichiometric gap: no route from "
                         f"the feed whatever the energies): {names(absent)}")
    if unknown:
        parts.append(f"{len(unknown)} undetermined: {names(unknown)}")
    return f"{question}, each precursor alone: " + "; ".join(parts)
