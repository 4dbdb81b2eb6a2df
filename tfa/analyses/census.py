"""Census of reaction energies: per reaction, Delta_r G'deg at the environment, Delta_r G' with
every reactant at 1 mM, and Delta_r G' at a substrate:product ratio; counts and fractions
exergonic, per mode. No optimisation (hence no certificate).

    Delta_r G' = Delta_r G'deg + RT sum_i nu_i ln a_i          (Alberty 2003, eq. 4.1-4)

At 1 mM of every reactant (gases at 1e-3 bar) this is the "Delta_r G'm" of Flamholz et al.
(2012, Nucleic Acids Res. 40:D770). At a substrate:product ratio r every substrate stands at
1 mM * sqrt(r) and every product at 1 mM / sqrt(r) (geometric mean 1 mM, each substrate/product
pair at ratio r). H+ and water never enter the activity term.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Iterable

import pandas as pd

from ..errors import InputError
from ..network.thermo_model import MODES, ThermoModel
from .results import AnalysisResult, provenance_of, verification

MILLIMOLAR = 1e-3


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
    ratio: float = 100.0
    table: pd.DataFrame = field(default_factory=pd.DataFrame)
    analysis: str = "census"

    def to_frame(self) -> pd.DataFrame:
        return self.table

    def counts(self) -> dict:
        """Number and fraction of reactions exergonic (< 0) at each reference state."""
        n = len(self.table)
        out = {"mode": self.mode, "reactions": n}
        for col, key in (("dg0_prime_kJ", "standard"), ("dg_1mM_kJ", "1 mM"),
                         ("dg_ratio_kJ", f"ratio {self.ratio:g}:1")):
            k = int((self.table[col] < 0).sum()) if n else 0
            out[f"exergonic at {key}"] = k
            out[f"fraction at {key}"] = k / n if n else float("nan")
        return out

    def summary(self) -> str:
        c = self.counts()
        return (f"{self.mode}: {c['exergonic at 1 mM']} of {c['reactions']} reactions exergonic at "
                f"1 mM, {c[f'exergonic at ratio {self.ratio:g}:1']} at substrate:product "
                f"{self.ratio:g}:1")

    def to_dict(self) -> dict:
        out = super().to_dict()
        out["counts"] = self.counts()
        return out


def census(tm: ThermoModel, ratio: float = 100.0) -> CensusResult:
    """Delta_r G'deg, Delta_r G' at 1 mM and at substrate:product ``ratio`` for every reaction
    with an energy (kJ/mol)."""
    if not (math.isfinite(ratio) and ratio > 0):
        raise InputError(f"substrate:product ratio must be a positive number, got {ratio!r}")
    rt = tm.RT
    no_activity = set(tm.no_activity)
    ln_mm = math.log(MILLIMOLAR)
    half = 0.5 * math.log(ratio)
    rows = []
    for r in tm.internal_reactions():
        e = tm.energies.get(r.id)
        if e is None:
            continue
        stoich = {m.id: float(c) for m, c in r.metabolites.items() if m.id not in no_activity}
        at_mm = {m: ln_mm for m in stoich}
        at_ratio = {m: ln_mm + (half if nu < 0 else -half) for m, nu in stoich.items()}
        rows.append({"reaction": r.id, "equation": r.build_reaction_string(),
                     "dg0_prime_kJ": e.standard, "sigma_kJ": e.uncertainty,
                     "dg_1mM_kJ": energy_at_activities(e.standard, stoich, at_mm, rt),
                     "dg_ratio_kJ": energy_at_activities(e.standard, stoich, at_ratio, rt),
                     "source": e.source})
    table = pd.DataFrame(rows, columns=["reaction", "equation", "dg0_prime_kJ", "sigma_kJ",
                                        "dg_1mM_kJ", "dg_ratio_kJ", "source"])
    table["exergonic_1mM"] = table["dg_1mM_kJ"] < 0
    result = CensusResult(conditions=tm.conditions, mode=tm.mode, ratio=ratio, table=table)
    result.provenance = provenance_of(tm)
    result.provenance["note"] = "no optimisation: no certificate needed"
    result.verification = verification("computed", "arithmetic on the reaction energies at fixed "
                                       "concentrations (no optimisation)")
    return result


@dataclass(kw_only=True)
class ModeCensusResult(AnalysisResult):
    """Census counts per mode."""

    results: list[CensusResult] = field(default_factory=list)
    analysis: str = "census by mode"

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame([r.counts() for r in self.results])


def census_by_mode(model, environment, modes: Iterable[str] = MODES, ratio: float = 100.0,
                   prepare: Callable | None = None) -> ModeCensusResult:
    """The census in each mode (each mode's rewrite undone afterwards)."""
    if prepare is None:
        from ..network.energies import prepare as prepare_default

        prepare = prepare_default
    results = []
    conditions = None
    for mode in modes:
        with model:
            tm = prepare(model, environment, mode)
            conditions = tm.conditions
            results.append(census(tm, ratio))
    return ModeCensusResult(conditions=conditions, results=results,
                            provenance={"modes": [r.provenance for r in results]},
                            verification=verification("computed", "arithmetic on the reaction "
                                                      "energies of every mode (no optimisation)"))
