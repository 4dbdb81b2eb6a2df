"""Per-precursor verdicts: for each compound the demand reaction consumes, can the network make it
alone, from the feed, in a given mode?

For a compound p with coefficient a_p in the demand reaction (which must carry at least v_min),
the demand is replaced by p's own demand, p ->, with the flux the whole demand needs of it,
a_p v_min, and three questions are asked in turn:

1. **Producible at all** (stoichiometry and feeds): the largest flux of p's demand by flux
   balance, max v_p subject to S v = 0 and the flux bounds (a linear program without any
   energy; Orth, Thiele & Palsson 2010, Nat. Biotechnol. 28:245). Below a_p v_min: a
   *stoichiometric gap* (no route from the feed, whatever the energies).
2. **Producible downhill**: the feasibility question of :mod:`tfa.analyses.feasibility` (a steady
   state with every reaction that carries flux downhill, ΔrG' <= -delta in its direction).
3. **Otherwise**: the minimal uphill set of :mod:`tfa.analyses.uphill` for p alone, the first in
   the order of reaction ids, with the number of sets of that size: a *thermodynamic bottleneck*.

Hand example (``tests/test_precursors.py``): a network feeding A with A -> P1 downhill, A -> P2
uphill at every concentration and no route to P3 gives P1 downhill, P2 uphill (one step) and P3
a stoichiometric gap.
"""

from __future__ import annotations

import dataclasses
import logging
from dataclasses import dataclass, field

import pandas as pd

from ..errors import UndeterminedError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions
from .results import AnalysisResult, verification

log = logging.getLogger(__name__)

#: Verdicts, in the order of the figure's legend.
VERDICTS = ("downhill", "uphill", "stoichiometric gap", "undetermined", "not applicable")
#: Minimal sets counted per precursor: 1 asks only whether a second exists ("the only set" or "at
#: least 2"; each further one is a mixed-integer solve, the assessment counts more
#: for the whole demand).
PRECURSOR_COUNT_LIMIT = 1

#: Columns of the ``precursors`` table (one row per mode and demanded compound).
PRECURSOR_COLUMNS = ["mode", "compound", "demand_coefficient", "verdict", "producible", "max_flux",
                     "feasible", "uphill_set_size", "uphill_set", "sets_found", "all_sets_found",
                     "energy_to_supply_total_kJ_per_mol_demand", "message", "verification",
                     "checked_by"]


@dataclass
class PrecursorVerdict:
    """The answer for one demanded compound in one mode.

    Attributes
    ----------
    mode, compound : str
    coefficient : float
        Moles of the compound per mole of the demand reaction.
    verdict : str
        One of :data:`VERDICTS`.
    producible : bool or None
        Made from the feed by the stoichiometry (None when not asked).
    max_flux : float
        Largest flux of its own demand by flux balance (flux unit).
    feasible : bool or None
        Made with every step downhill.
    uphill_set : list of str
        The first minimal uphill set in the order of reaction ids (empty when downhill).
    sets_found : int
        Minimal sets of that size found; ``all_sets_found`` says whether that is all of them.
    energy_to_supply : float
        Energy to supply to the first set's steps, kJ per mol of the compound's demand.
    message : str
        The answer in words.
    verification : dict
        ``status`` and ``check``.
    """

    mode: str
    compound: str
    coefficient: float
    verdict: str
    producible: bool | None = None
    max_flux: float = float("nan")
    feasible: bool | None = None
    uphill_set: list[str] = field(default_factory=list)
    sets_found: int = 0
    all_sets_found: bool = True
    energy_to_supply: float = float("nan")
    message: str = ""
    verification: dict = field(default_factory=dict)

    def row(self) -> dict:
        """One row of the ``precursors`` table."""
        uphill = self.verdict == "uphill"
        return {"mode": self.mode, "compound": self.compound,
                "demand_coefficient": self.coefficient, "verdict": self.verdict,
                "producible": self.producible, "max_flux": self.max_flux,
                "feasible": self.feasible,
                "uphill_set_size": len(self.uphill_set) if uphill else (0 if self.feasible else None),
                "uphill_set": ", ".join(self.uphill_set),
                "sets_found": self.sets_found if uphill else None,
                "all_sets_found": self.all_sets_found if uphill else None,
                "energy_to_supply_total_kJ_per_mol_demand": self.energy_to_supply,
                "message": self.message,
                "verification": self.verification.get("status", ""),
                "checked_by": self.verification.get("check", "")}


@dataclass(kw_only=True)
class PrecursorResult(AnalysisResult):
    """Per-precursor verdicts of one or more modes."""

    verdicts: list[PrecursorVerdict] = field(default_factory=list)
    analysis: str = "precursors"

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame([v.row() for v in self.verdicts], columns=PRECURSOR_COLUMNS)

    def of_mode(self, mode: str) -> list[PrecursorVerdict]:
        """The verdicts of one mode, in the order of the demand reaction."""
        return [v for v in self.verdicts if v.mode == mode]

    def summary(self) -> str:
        return "; ".join(f"{v.mode} {v.compound}: {v.verdict}" for v in self.verdicts)


def demanded_compounds(tm: ThermoModel) -> list[tuple[str, float]]:
    """(compound id, coefficient) of each compound the demand reaction consumes, in the order of
    its equation; empty without a demand."""
    if tm.demand_id is None:
        return []
    demand = tm.model.reactions.get_by_id(tm.demand_id)
    return [(m.id, -float(c)) for m, c in demand.metabolites.items() if c < 0]


def capacities(tm: ThermoModel, compounds: list[str] | None = None) -> dict[str, float]:
    """Largest flux of each demanded compound's own demand by flux balance alone (no energies),
    flux unit: the first question of :func:`precursor_verdicts`, asked alone (one linear program
    per compound)."""
    from .demand import demand_capacity

    wanted = [m for m, _ in demanded_compounds(tm) if compounds is None or m in compounds]
    if not wanted:
        return {}
    copy = dataclasses.replace(tm, model=tm.model.copy())
    demand = copy.model.reactions.get_by_id(tm.demand_id)
    out = {}
    for compound in wanted:
        with copy.model:
            demand.subtract_metabolites(dict(demand.metabolites))
            demand.add_metabolites({copy.model.metabolites.get_by_id(compound): -1.0})
            out[compound] = demand_capacity(copy)
    return out


def precursor_verdicts(tm: ThermoModel, options: ProblemOptions | None = None,
                       compounds: list[str] | None = None,
                       count_limit: int = PRECURSOR_COUNT_LIMIT,
                       progress=None) -> PrecursorResult:
    """The verdict of each demanded compound alone, in the mode of ``tm`` (module text).

    Parameters
    ----------
    tm : ThermoModel
        The network prepared for one mode (not changed: the questions are asked of a copy).
    options : ProblemOptions
    compounds : list of str, optional
        Only these of the demanded compounds (default all).
    count_limit : int
        Minimal uphill sets counted per compound.
    progress : callable, optional
        ``progress(done, total, text)`` before each compound (text "") and while its minimal
        sets are put in order (text the detail).

    Returns
    -------
    PrecursorResult
        One :class:`PrecursorVerdict` per compound; a solver stopped by the time limit gives the
        verdict "undetermined" for that compound only.
    """
    options = options or ProblemOptions()
    result = PrecursorResult(conditions=tm.conditions)
    wanted = demanded_compounds(tm)
    if compounds is not None:
        wanted = [(m, a) for m, a in wanted if m in set(compounds)]
    if not wanted:
        return result
    from ..problem.solvers import use_solver

    copy = dataclasses.replace(tm, model=tm.model.copy())
    model = copy.model
    # the solver of every problem below, attached once (a change inside the loop would copy the
    # whole problem twice per compound)
    use_solver(model, options.solver)
    demand = model.reactions.get_by_id(tm.demand_id)
    required = max(demand.lower_bound, 0.0)
    statuses = []
    for k, (compound, coefficient) in enumerate(wanted):
        tell = None
        if progress is not None:
            progress(k, len(wanted), compound)
            tell = (lambda text, k=k, compound=compound:
                    progress(k, len(wanted), f"{compound}, {text}"))
        need = required * coefficient
        with model:
            demand.subtract_metabolites(dict(demand.metabolites))
            demand.add_metabolites({model.metabolites.get_by_id(compound): -1.0})
            demand.bounds = (need, max(demand.upper_bound * coefficient, need))
            verdict = _one(copy, options, compound, coefficient, need, count_limit, tell)
        result.verdicts.append(verdict)
        result.certificates.extend(verdict.verification.pop("certificates", []))
        statuses.append(verdict.verification)
    from .results import weakest

    result.verification = weakest(statuses, [v.compound for v in result.verdicts])
    return result


def _one(tm: ThermoModel, options: ProblemOptions, compound: str, coefficient: float, need: float,
         count_limit: int, progress=None) -> PrecursorVerdict:
    """The three questions for one compound whose own demand is in place: the flux-balance
    capacity, then the minimal uphill set on one build (:func:`minimal_uphill_set` first asks
    with every step downhill: a certified point there is the "downhill" verdict)."""
    from .demand import ImpossibleDemandError, demand_capacity
    from .uphill import minimal_uphill_set

    verdict = PrecursorVerdict(tm.mode, compound, coefficient, "undetermined")
    capacity = demand_capacity(tm)
    verdict.max_flux = capacity
    verdict.producible = bool(capacity >= need * (1 - 1e-9))
    lp = ("a flux-balance linear program (cobra, no energies) gives the largest flux of its own "
          f"demand: {capacity:.3g}")
    if not verdict.producible:
        verdict.verdict = "stoichiometric gap"
        verdict.message = (f"{compound} cannot be made from the feed whatever the energies: its own "
                           f"demand of {need:.3g} meets a largest possible flux of {capacity:.3g}")
        verdict.verification = verification("proven", lp)
        return verdict
    try:
        d = minimal_uphill_set(tm, options, alternatives=1, try_downhill_first=True,
                               count_limit=count_limit, progress=progress)
    except ImpossibleDemandError as err:      # beyond the flux reach of the problem
        verdict.verdict, verdict.feasible = "stoichiometric gap", False
        verdict.message = str(err)
        verdict.verification = verification("proven", f"{lp}; {err.verification.get('check', '')}")
        return verdict
    except UndeterminedError as err:
        verdict.message = f"undetermined: {err}"
        verdict.verification = verification("best found", f"{lp}; {err}")
        return verdict
    verdict.verification = verification(d.verification.get("status", "computed"),
                                        f"{lp}; {d.verification.get('check', '')}",
                                        certificates=list(d.certificates))
    if d.size == 0:
        verdict.verdict, verdict.feasible, verdict.energy_to_supply = "downhill", True, 0.0
        verdict.message = f"{compound} is made with every step downhill"
        return verdict
    verdict.feasible = False
    verdict.verdict = "uphill"
    verdict.uphill_set = list(d.sets[0]) if d.sets else []
    verdict.sets_found, verdict.all_sets_found = d.count, d.exhausted
    verdict.energy_to_supply = d.energy_to_supply(0) if d.sets else float("nan")
    verdict.message = (f"{compound} needs {len(verdict.uphill_set)} step(s) driven uphill: "
                       f"{', '.join(verdict.uphill_set)} ({d.count_words()}); energy to supply "
                       f"{verdict.energy_to_supply:.3g} kJ per mol of the demand of {compound}")
    return verdict
