"""Step: the fewest ATP couplings with which the demand (and each precursor alone) is met with
every step downhill (:mod:`tfa.analyses.couplings`)."""

from __future__ import annotations

import pandas as pd

from ...analyses.couplings import (COUPLING_COLUMNS, COUPLING_COUNT_COLUMNS, CouplingResult,
                                   coupling_answers, coupling_tables)
from ..context import RunContext
from ..step import Section, Step


def coupling_mode(ctx: RunContext) -> str:
    """The mode the couplings are chosen in: the analysis mode with every ATP coupling optional
    (``coupling_choice`` for ``native``; ``MODE+coupling_choice`` otherwise, refused with the reason
    when the mode already treats ATP another way)."""
    from ...modes import parse_modes

    mode = ctx.settings.mode
    if mode in ("native", "coupling_choice"):
        return "coupling_choice"
    return parse_modes(f"{mode}+coupling_choice")[0]


class FewestCouplingsStep(Step):
    """Which ATP-dependent steps are indispensable: the fewest couplings kept."""

    id = "couplings"
    label = "fewest couplings"
    title = "Fewest energy-coupled steps"
    question = ("which ATP couplings are indispensable: the fewest kept (the others run as bare "
                "chemistry) with every step downhill, for the demand and each precursor alone")

    def run(self, ctx: RunContext) -> list[CouplingResult]:
        from ...errors import InputError

        try:
            mode = coupling_mode(ctx)
        except InputError as err:
            ctx.note(f"fewest couplings: not asked ({err})")
            return []
        if ctx.skipped_as_not_applicable("fewest couplings", mode):
            return []
        tm = ctx.thermo_model(mode)
        ctx.tick(0, 1, "the whole demand")
        answers = ctx.attempt("fewest couplings", lambda: coupling_answers(
            tm, ctx.options, ctx.settings.coupling_objective, ctx.settings.alternatives,
            progress=ctx.ticker("precursors alone")))
        return answers or []

    def tables(self, result: list[CouplingResult], ctx: RunContext) -> dict:
        if not result:
            return {"fewest_couplings": pd.DataFrame(columns=COUPLING_COLUMNS),
                    "coupling_counts": pd.DataFrame(columns=COUPLING_COUNT_COLUMNS)}
        return coupling_tables(result)

    def summary_lines(self, result: list[CouplingResult], ctx: RunContext) -> list[str]:
        if not result:
            return []
        whole = result[0]
        lines = [f"fewest ATP couplings ({ctx.settings.coupling_objective}): {whole.message} "
                 f"[{whole.verification.get('status', '')}]"]
        needing = [a for a in result[1:] if a.feasible and a.size > 0]
        free = [a.precursor for a in result[1:] if a.feasible and a.size == 0]
        blocked = [a.precursor for a in result[1:] if not a.feasible]
        if len(result) > 1:
            parts = []
            if free:
                parts.append(f"no coupling needed for {', '.join(free)}")
            for a in needing:
                parts.append(f"{a.precursor}: {' or '.join('{' + ', '.join(s) + '}' for s in a.sets)}")
            if blocked:
                parts.append(f"not with any choice: {', '.join(blocked)}")
            lines.append("per precursor: " + "; ".join(parts))
        return lines

    def summary_data(self, result: list[CouplingResult], ctx: RunContext) -> dict:
        if not result:
            return {}
        return {"couplings_kept": {a.precursor: (a.size if a.feasible else None) for a in result}}

    def verification(self, result: list[CouplingResult], ctx: RunContext) -> dict:
        return {a.precursor: dict(a.verification) for a in result}

    def sections(self, result: list[CouplingResult], ctx: RunContext) -> list[Section]:
        if not result:
            return []
        text = (" ".join(self.summary_lines(result, ctx)) + " Each ATP-coupled step may keep its "
                "coupling or run as its bare chemistry; a coupling counts as kept when the step "
                "spends ATP (steps that make ATP, such as an ATP synthase, are listed with the "
                "role 'makes ATP' and not counted). coupling_energy_kJ_per_mol is the ΔrG'° the "
                "coupling adds, in the direction run.")
        return [Section(self.title, text, tables=[
            ("coupling_counts", "Fewest couplings, for the demand and each precursor alone"),
            ("fewest_couplings", "The couplings kept in each optimal set")])]

    def text(self, result: list[CouplingResult], ctx: RunContext) -> str:
        from ...report.text import table_text

        lines = self.summary_lines(result, ctx) or ["fewest couplings: not asked (see notes)"]
        tables = self.tables(result, ctx)
        parts = ["\n".join(lines)]
        if len(tables["fewest_couplings"]):
            parts.append(table_text(tables["fewest_couplings"], "{:.3g}"))
        return "\n\n".join(parts) + "\n"
