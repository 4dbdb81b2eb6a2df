"""The demand asked one precursor at a time: the demand reaction drawing only one of its compounds
(with its own coefficient, the demand flux unchanged), so an analysis can say which precursors a
mode can make.

The per-precursor verdicts of the assessment (table ``precursors``, :mod:`tfa.analyses.precursors`)
ask the same question of the modes the assessment runs; :func:`precursor_verdicts` takes them
(``known``) instead of solving again, and solves only the precursors it is not given.
"""

from __future__ import annotations

from typing import Any, Callable, Mapping

from ..errors import ComputationError, InputError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions


def demand_precursors(tm: ThermoModel) -> dict[str, float]:
    """Compound id -> coefficient (negative) of each compound the demand reaction draws."""
    if tm.demand_id is None:
        return {}
    reaction = tm.model.reactions.get_by_id(tm.demand_id)
    return {m.id: c for m, c in reaction.metabolites.items() if c < 0}


def per_precursor(tm: ThermoModel, run: Callable[[ThermoModel, str], Any],
                  precursors: list[str] | None = None,
                  progress: Callable[[int, int], None] | None = None) -> list:
    """``run(tm, precursor)`` for each compound of the demand alone (the demand reaction drawing
    only it; the model is restored after each); ``progress(done, total)`` before each.

    Raises
    ------
    InputError
        A precursor the demand reaction does not draw.
    """
    drawn = demand_precursors(tm)
    out = []
    asked = precursors or list(drawn)
    for k, compound in enumerate(asked):
        if progress is not None:
            progress(k, len(asked))
        if compound not in drawn:
            raise InputError(f"precursor '{compound}' is not drawn by the demand reaction "
                             f"{tm.demand_id}; use one of {', '.join(drawn)}")
        with tm.model:
            reaction = tm.model.reactions.get_by_id(tm.demand_id)
            reaction.add_metabolites({tm.model.metabolites.get_by_id(m): -c
                                      for m, c in drawn.items() if m != compound})
            out.append(run(tm, compound))
    return out


def precursor_verdicts(tm: ThermoModel, options: ProblemOptions | None = None,
                       progress: Callable[[int, int], None] | None = None,
                       known: Mapping[str, bool | None] | None = None) -> dict[str, bool | None]:
    """Precursor -> can the mode make it alone with every step downhill (True/False; None when a
    solver stopped without an answer). A "no" is the solver's proof, not confirmed by the second
    solver (to keep the many small questions fast); a "yes" is a certified steady state.

    ``known``: verdicts already found for this mode (the assessment's ``precursors`` step asks
    the same question, :func:`known_verdicts`); those precursors are not solved again.
    """
    from dataclasses import replace

    from .feasibility import feasibility

    quick = replace(options or ProblemOptions(), confirm_infeasible="never")
    known = dict(known or {})
    drawn = list(demand_precursors(tm))
    asked = [m for m in drawn if m not in known]
    answers: dict[str, bool | None] = {}

    def ask(model: ThermoModel, compound: str):
        try:
            return compound, feasibility(model, quick, diagnose=False).feasible
        except ComputationError:
            return compound, None

    if asked:
        answers = dict(per_precursor(tm, ask, asked, progress=progress))
    return {m: known[m] if m in known else answers.get(m) for m in drawn}


#: Verdicts of :mod:`tfa.analyses.precursors` read as "made downhill": True, False or None.
DOWNHILL_VERDICTS = {"downhill": True, "uphill": False, "stoichiometric gap": False,
                     "undetermined": None}


def known_verdicts(verdicts) -> dict[str, bool | None]:
    """Precursor -> made downhill (True/False/None) from the per-precursor verdicts of one mode
    (:class:`tfa.analyses.precursors.PrecursorVerdict`: downhill, uphill, stoichiometric gap,
    undetermined); a verdict of another kind (not applicable) is left out."""
    return {v.compound: DOWNHILL_VERDICTS[v.verdict] for v in verdicts
            if v.verdict in DOWNHILL_VERDICTS}
