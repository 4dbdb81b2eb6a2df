"""Census of reaction energies: per reaction, Delta_r G'deg at the environment, Delta_r G' with
every reactant at 1 mM, and Delta_r G' at a substrate:product ratio; counts and fractions
exergonic, per mode. No optimisation (hence no certificate).

    Delta_r G' = Delta_r G'deg + RT sum_i nu_i ln a_i          (Alberty 2003, eq. 4.1-4)

At 1 mM of every reactant (gases at 1e-3 bar) this is the "Delta_r G'm" of Flamholz et al.
(2012, Nucleic Acids Res. 40:D770). At a substrate:product ratio r every substrate stands at
1 mM * sqrt(r) and every product at 1 mM / sqrt(r) (geometric mean 1 mM, each substrate/product
pair at ratio r). H+ and water never enter the activity term: each compartment's H+ stands at
that compartment's pH (its energy is in ΔrG'°). Fed compounds stay at their feed values in both
reference states (they are fixed by the environment). ΔrG'° of a reaction across a
membrane refers to each compound in its own compartment, and the column ``standard_state`` says
so (:func:`tfa.network.energies.standard_state_words`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import pandas as pd

from ..errors import InputError
from ..network.thermo_model import ThermoModel
from .results import AnalysisResult, provenance_of, verification

MILLIMOLAR = 1e-3
#: Default substrate:product ratio of the third reference state.
DEFAULT_RATIO = 100.0
#: Columns of the census table (per reaction), without the mode.
CENSUS_COLUMNS = ["reaction", "equation", "delta_g_standard_kJ_per_mol", "sigma_kJ_per_mol",
                  "delta_g_1mM_kJ_per_mol", "delta_g_at_ratio_kJ_per_mol", "source",
                  "standard_state", "exergonic_1mM"]


def energy_at_activities(standard: float, stoichiometry: dict[str, float],
                         log_activity: dict[str, float], rt: float) -> float:
    """Delta_r G' = Delta_r G'deg + RT sum_i nu_i ln a_i, kJ/mol.

    Parameters
    ----------
    standard : float
        Delta_r G'deg, kJ/mol.
    stoichiometry : dict
        compound -> nu (negative for substrates); compounds absent from ``log_activity`` are
        skipped (H+, water).
    log_activity : dict
        compound -> ln a.
    rt : float
        R*T, kJ/mol.

    Examples
    --------
    A -> B + C with all three at 1 mM at 298.15 K: one more product than substrate, so
    Delta_r G'm = Delta_r G'deg + RT ln(1e-3) = Delta_r G'deg - 17.12 kJ/mol (the 1 mM standard of
    Flamholz et al. 2012, Nucleic Acids Res. 40:D770).

    >>> rt = 8.314462618e-3 * 298.15
    >>> round(energy_at_activities(0.0, {"A": -1, "B": 1, "C": 1},
    ...                            {k: math.log(1e-3) for k in "ABC"}, rt), 2)
    -17.12
    """
    total = sum(nu * log_activity[c] for c, nu in stoichiometry.items() if c in log_activity)
    return float(standard + rt * total)


@dataclass(kw_only=True)
class CensusResult(AnalysisResult):
    """Per reaction energies at three reference states; counts exergonic."""

    mode: str = "native"
    ratio: float = DEFAULT_RATIO
    table: pd.DataFrame = field(default_factory=pd.DataFrame)
    analysis: str = "census"

    def to_frame(self) -> pd.DataFrame:
        return self.table

    def counts(self) -> dict:
        """Number and fraction of reactions exergonic (< 0) at each reference state."""
        n = len(self.table)
        out = {"mode": self.mode, "reactions": n, "substrate_product_ratio": self.ratio}
        for column, key in (("delta_g_standard_kJ_per_mol", "standard"),
                            ("delta_g_1mM_kJ_per_mol", "1mM"),
                            ("delta_g_at_ratio_kJ_per_mol", "at_ratio")):
            k = int((self.table[column] < 0).sum()) if n else 0
            out[f"exergonic_{key}"] = k
            out[f"fraction_exergonic_{key}"] = k / n if n else float("nan")
        return out

    def tables(self) -> dict[str, pd.DataFrame]:
        return {"census": self.table.assign(mode=self.mode)[["mode", *CENSUS_COLUMNS]],
                "census_counts": pd.DataFrame([self.counts()])}

    def summary(self) -> str:
        c = self.counts()
        return (f"{self.mode}: {c['exergonic_1mM']} of {c['reactions']} reactions exergonic at "
                f"1 mM, {c['exergonic_at_ratio']} at substrate:product {self.ratio:g}:1")



def census(tm: ThermoModel, ratio: float = DEFAULT_RATIO) -> CensusResult:
    """ΔrG'°, ΔrG' at 1 mM and ΔrG' at substrate:product ``ratio`` for every reaction with an
    energy (kJ/mol); fed compounds at their feed values.

    Parameters
    ----------
    tm : ThermoModel
        The network prepared in one mode.
    ratio : float
        Substrate:product ratio of the third reference state [dimensionless].
    """
    if not (math.isfinite(ratio) and ratio > 0):
        raise InputError(f"substrate:product ratio must be a positive number, got {ratio!r}")
    rt = tm.RT
    no_activity = set(tm.no_activity)
    ln_mm = math.log(MILLIMOLAR)
    half = 0.5 * math.log(ratio)
    fed = {m: lo for m, (lo, hi) in tm.log_bounds.items() if abs(hi - lo) < 1e-12}
    rows = []
    for r in tm.internal_reactions():
        e = tm.energies.get(r.id)
        if e is None:
            continue
        stoich = {m.id: float(c) for m, c in r.metabolites.items() if m.id not in no_activity}
        at_mm = {m: fed.get(m, ln_mm) for m in stoich}
        at_ratio = {m: fed.get(m, ln_mm + (half if nu < 0 else -half)) for m, nu in stoich.items()}
        rows.append({"reaction": r.id, "equation": r.build_reaction_string(),
                     "delta_g_standard_kJ_per_mol": e.standard, "sigma_kJ_per_mol": e.uncertainty,
                     "delta_g_1mM_kJ_per_mol": energy_at_activities(e.standard, stoich, at_mm, rt),
                     "delta_g_at_ratio_kJ_per_mol": energy_at_activities(e.standard, stoich,
                                                                         at_ratio, rt),
                     "source": e.source, "standard_state": e.standard_state})
    table = pd.DataFrame(rows, columns=CENSUS_COLUMNS[:-1])
    table["exergonic_1mM"] = table["delta_g_1mM_kJ_per_mol"] < 0
    result = CensusResult(conditions=tm.conditions, mode=tm.mode, ratio=ratio, table=table)
    result.provenance = provenance_of(tm)
    result.provenance["note"] = "no optimisation: no certificate needed"
    result.verification = verification("computed", "arithmetic on the reaction energies at fixed "
                                       "concentrations (no optimisation)")
    return result
