"""Which energy source a network depends on: its verdicts and H2 threshold with and without the
gradient across its membrane, the least gradient at which it runs, and how far H2 can reduce a
carrier (ferredoxin) with and without an ion-coupled enzyme.

Without the gradient means every compartment at the cell's pH and Δψ = 0
(:func:`tfa.network.compartments.without_gradient`): no proton-motive force, all
else equal.

The least gradient: the gradient is scaled by a factor s (ΔpH and Δψ of every compartment
together, :func:`~tfa.network.compartments.with_gradient_scaled`; s = 1 is the
environment's, s = 0 none) and s is found by bisection on the yes/no question of
:func:`tfa.analyses.feasibility.feasibility` (every point certified by the numpy check; every
"no" the solver's proof, re-asked of the second solver on networks up to 1000 reactions). It
assumes that a larger gradient never hurts, which the bisection cannot check between its points
(a reaction that must move ions out against the gradient could make a larger gradient hurt; the
verification says the assumption was made). The answer is verified at its two ends: a certified point at s_hi and
no point at s_lo, with s_hi − s_lo below the tolerance. Per entering H+ the energy is
−RT ln10 ΔpH + F Δψ (:func:`tfa.thermo.membrane.proton_inflow_energy`, Mitchell 1961).

The carrier by H2: for every reaction over H2, the two forms of a carrier pair and protons
alone (ferredoxin hydrogenase H2 + Fd_ox -> Fd_red + 2 H+; the energy-converting hydrogenase
that takes ions in as well), the most reduced state it reaches running downhill at the given H2
is ln(red/ox)_max = (−ΔrG'° − δ + RT ln a_H2)/RT (the reaction's ΔrG' = ΔrG'° + RT ln
(red/(ox a_H2)) ≤ −δ), and the carrier's potential there E' = E'° − (RT/nF) ln(red/ox) with
E'° = −(ΔfG'°red − ΔfG'°ox)/(nF) at the setting. For an ion-coupled reaction, the energy each
entering ion must bring for the carrier to reach the most reduced state the concentration bounds
allow is ΔrG'(direct reaction at that state)/n_ions.

References
----------
[1] P. Mitchell, Nature 191 (1961) 144-148, doi:10.1038/191144a0.
[2] W. Buckel, R. K. Thauer, Biochim. Biophys. Acta 1827 (2013) 94-113,
    doi:10.1016/j.bbabio.2012.07.002 (ion-coupled ferredoxin reduction; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Sequence

import pandas as pd

from ..constants import FARADAY, LN10
from ..errors import InputError, UndeterminedError
from ..network.compartments import with_gradient_scaled, without_gradient
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions
from ..thermo.membrane import proton_inflow_energy, proton_motive_force_mV
from .results import AnalysisResult, verification, weakest


#: The largest gradient scale searched (three times the environment's).
MAX_SCALE = 3.0
#: Bisection stops when the bracket of the scale is narrower than this.
SCALE_TOLERANCE = 0.005

VERDICT_COLUMNS = ["mode", "gradient", "feasible", "uphill_set_size", "h2_threshold", "h2_unit",
                   "message"]
LEAST_COLUMNS = ["mode", "compartment", "gradient_scale", "delta_ph", "membrane_potential_mV",
                 "proton_inflow_kJ_per_mol", "proton_motive_force_mV", "feasible", "status",
                 "message"]
CARRIER_COLUMNS = ["reaction", "gradient", "ions_in", "h2_activity", "reduced_to_oxidised_max",
                   "carrier_potential_mV", "needed_per_ion_kJ_per_mol"]

#: Prepares the network at an environment: environment -> ThermoModel.
Prepare = Callable[[object], ThermoModel]
#: Feasibility of a prepared network: (ThermoModel, diagnose) -> FeasibilityResult.
Ask = Callable[[ThermoModel, bool], object]


@dataclass(kw_only=True)
class GradientResult(AnalysisResult):
    """Verdicts with and without the gradient, the least gradient, and the carrier by H2."""

    analysis: str = "gradient"
    has_gradient: bool = False
    verdicts: list[dict] = field(default_factory=list)
    least: list[dict] = field(default_factory=list)
    carrier: list[dict] = field(default_factory=list)
    carrier_words: str = ""
    least_words: list[str] = field(default_factory=list)
    message: str = ""

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame(self.verdicts, columns=VERDICT_COLUMNS)

    def tables(self) -> dict[str, pd.DataFrame]:
        out = {"gradient_verdicts": self.to_frame(),
               "least_gradient": pd.DataFrame(self.least, columns=LEAST_COLUMNS)}
        if self.carrier:
            out["carrier_by_h2"] = pd.DataFrame(self.carrier, columns=CARRIER_COLUMNS)
        return out

    def summary(self) -> str:
        return self.message


def gradient_rows(environment) -> list[dict]:
    """One row per compartment: ΔpH, Δψ, the energy of an entering H+ and the pmf."""
    cell = environment.conditions
    rows = []
    for cid, comp in sorted(environment.compartments.items()):
        dph = cell.ph - comp.ph
        rows.append({"compartment": cid, "delta_ph": dph,
                     "membrane_potential_mV": comp.membrane_potential_mV,
                     "proton_inflow_kJ_per_mol": proton_inflow_energy(dph, comp.membrane_potential_V,
                                                                      cell.temperature),
                     "proton_motive_force_mV": proton_motive_force_mV(dph, comp.membrane_potential_V,
                                                                      cell.temperature)})
    return rows


def has_gradient(environment) -> bool:
    """True when some compartment differs from the cell in pH or has a membrane potential."""
    return any(abs(r["delta_ph"]) > 1e-12 or abs(r["membrane_potential_mV"]) > 1e-12
               for r in gradient_rows(environment))


def max_scale(environment, cap: float = MAX_SCALE) -> float:
    """The largest scale of the gradient that keeps every compartment's pH within 0-14."""
    ph = environment.conditions.ph
    top = cap
    for comp in environment.compartments.values():
        dph = ph - comp.ph
        if dph > 0:
            top = min(top, ph / dph)
        elif dph < 0:
            top = min(top, (14.0 - ph) / -dph)
    return top


def least_gradient(environment, prepare: Prepare, ask: Ask, at_zero=None, at_one=None,
                   tolerance: float = SCALE_TOLERANCE,
                   progress: Callable[[int, int], None] | None = None) -> tuple[list[dict], dict, str]:
    """(rows per compartment at the least gradient, verification, words): the least scale s of
    the environment's gradient at which the network runs (see the module text).

    ``prepare(environment)`` gives the network at an environment and ``ask(tm, False)`` its
    feasibility (a :class:`~tfa.analyses.feasibility.FeasibilityResult`); ``at_zero`` and
    ``at_one``, when given, are the answers without the gradient and at the environment's.
    """
    steps = [0]
    budget = 2 + math.ceil(math.log2(max(MAX_SCALE / tolerance, 2)))

    def runs(scale: float):
        steps[0] += 1
        if progress is not None:
            progress(min(steps[0], budget), budget)
        return ask(prepare(with_gradient_scaled(environment, scale)), False)

    def rows_at(scale: float, feasible: bool, status: str, words: str) -> list[dict]:
        rows = gradient_rows(with_gradient_scaled(environment, scale))
        for row in rows:
            row.update(gradient_scale=scale, feasible=feasible, status=status, message=words)
        return rows

    at_zero = at_zero if at_zero is not None else runs(0.0)
    if at_zero.feasible:
        words = "runs without any gradient (ΔpH = 0, Δψ = 0)"
        cert = at_zero.verification or {}
        return rows_at(0.0, True, "certified", words), \
            verification("certified", cert.get("check", "the point at no gradient")), words
    high = 1.0
    last_yes = at_one if at_one is not None else runs(1.0)
    if not last_yes.feasible:
        high = max_scale(environment)
        last_yes = runs(high)
        if not last_yes.feasible:
            words = (f"does not run even at {high:.3g} times the environment's gradient (the most "
                     "searched): the gradient alone does not make it run")
            check = last_yes.verification or {}
            status = check.get("status", "solver proof")
            return rows_at(high, False, status, words), verification(status, check.get("check", "")), words
    low, last_no = 0.0, at_zero
    while high - low > tolerance:
        mid = 0.5 * (low + high)
        answer = runs(mid)
        if answer.feasible:
            high, last_yes = mid, answer
        else:
            low, last_no = mid, answer
    no_check = (last_no.verification or {}).get("check", "")
    status = "proven" if (last_no.verification or {}).get("status") == "proven" else "solver proof"
    check = (f"a certified point at {high:.4g} times the gradient "
             f"({(last_yes.verification or {}).get('check', '')}); no point at {low:.4g} times it "
             f"({no_check}); bisection to {tolerance:g}, assuming a larger gradient never hurts")
    rows = rows_at(high, True, status, "")
    parts = ", ".join(f"{r['compartment']}: ΔpH {r['delta_ph']:.3g}, Δψ "
                      f"{r['membrane_potential_mV']:.3g} mV, {r['proton_inflow_kJ_per_mol']:.3g} "
                      "kJ/mol per H+ entering" for r in rows)
    words = (f"runs from {high:.3g} times the environment's gradient ({parts}; no point at "
             f"{low:.3g} times)")
    for row in rows:
        row["message"] = words
    return rows, verification(status, check), words


def carrier_by_h2(tm: ThermoModel, h2_id: str, options: ProblemOptions) -> list[dict]:
    """For every carrier pair that some ion-coupled reaction reduces with H2: each reaction over
    H2, the pair and protons alone, with the most reduced state it reaches at the fed H2 (see
    the module text). Empty when no such pair."""
    from ..network.compartments import cell_compartment
    from ..network.roles import carrier_pairs
    from .hydrogen import h2_unit

    table = tm.compound_table
    if table is None or h2_id not in tm.log_bounds:
        return []
    ln_h2 = tm.log_bounds[h2_id][0]
    cell = cell_compartment(tm.model)
    delta = options.min_driving_force
    rows: list[dict] = []
    for pair in carrier_pairs(tm.model).values():
        red, ox = pair.reduced.id, pair.oxidised.id
        found = []
        for reaction in tm.model.reactions:
            if reaction.id not in tm.energies:
                continue
            nu = {m.id: c for m, c in reaction.metabolites.items()}
            variable = {m for m in nu if m not in tm.no_activity}
            if variable != {h2_id, red, ox} or nu[h2_id] * nu[red] >= 0 or nu[red] * nu[ox] >= 0:
                continue
            sign = 1.0 if nu[red] > 0 else -1.0     # written as reduction by H2
            ions = sum(-sign * c for m, c in reaction.metabolites.items()
                       if m.id in tm.no_activity and (m.compartment or cell) != cell
                       and (m.notes or {}).get("thermo_key") == "H+")
            g0 = sign * tm.energies[reaction.id].standard / abs(nu[red])
            found.append((reaction.id, ions, g0, abs(nu[h2_id] / nu[red])))
        if not any(abs(ions) > 1e-12 for _, ions, _, _ in found):
            continue
        g_red = table.compounds[red].standard
        g_ox = table.compounds[ox].standard
        e0 = -(g_red - g_ox) / (pair.electrons * FARADAY)
        ln_ratio_bound = tm.log_bounds[red][1] - tm.log_bounds[ox][0]
        direct = [g for _, ions, g, _ in found if abs(ions) < 1e-12]
        for rid, ions, g0, h2_per in found:
            ln_ratio = (-g0 - delta + h2_per * tm.RT * ln_h2) / tm.RT
            needed = float("nan")
            if abs(ions) > 1e-12 and direct:
                at_bound = min(direct) + tm.RT * (ln_ratio_bound - h2_per * ln_h2)
                needed = max(0.0, (at_bound + delta) / ions)
            rows.append({"reaction": rid, "ions_in": ions, "h2_activity": math.exp(ln_h2),
                         "reduced_to_oxidised_max": math.exp(min(ln_ratio, 700.0)),
                         "carrier_potential_mV": 1000.0 * (e0 - tm.RT * ln_ratio
                                                           / (pair.electrons * FARADAY)),
                         "needed_per_ion_kJ_per_mol": needed, "pair": pair.pair,
                         "bound_ratio": math.exp(ln_ratio_bound), "rt_ln10": tm.RT * LN10,
                         "unit": h2_unit(tm)})
    return rows


def gradient_dependence(environment, modes: Sequence[str], prepare_at: Callable[[object, str], ThermoModel],
                        ask: Callable[[ThermoModel, bool], object], with_gradient: dict,
                        mode: str, options: ProblemOptions, h2_id: str | None = None,
                        threshold: Callable[[ThermoModel], object] | None = None,
                        with_threshold: object | None = None,
                        progress: Callable[[int, int], None] | None = None) -> GradientResult:
    """Verdicts with and without the gradient (per mode), the least gradient (in ``mode``) and
    the carrier by H2 (see the module text).

    Parameters
    ----------
    environment : Environment
        With compartments.
    modes : modes whose verdicts are compared.
    prepare_at : callable
        (environment, mode) -> ThermoModel.
    ask : callable
        (ThermoModel, diagnose) -> FeasibilityResult.
    with_gradient : dict
        mode -> FeasibilityResult at the environment itself (computed once by the caller).
    mode : str
        The mode of the least-gradient search.
    options : ProblemOptions
    h2_id : str, optional
        The fed H2, for the carrier by H2.
    threshold : callable, optional
        ThermoModel -> H2ThresholdResult (:func:`tfa.analyses.hydrogen.h2_threshold`), asked of
        ``mode`` without the gradient; ``with_threshold`` is its answer with the gradient.
    """
    if not getattr(environment, "compartments", None):
        raise InputError("the environment has no compartment besides the cell, so there is no "
                         "gradient to compare with; give one with [compartments.ID] pH = ...")
    result = GradientResult(conditions=environment.conditions)
    result.has_gradient = has_gradient(environment)
    flat = without_gradient(environment)
    budget = 2 + math.ceil(math.log2(max(MAX_SCALE / SCALE_TOLERANCE, 2)))
    total = len(modes) + 1 + budget * len(modes)
    done = [0]

    def tick(count: int = 1) -> None:
        done[0] += count
        if progress is not None:
            progress(min(done[0], total), total)

    flat_answers: dict = {}
    for m in modes:
        for label, answer in (("with", with_gradient[m]), ("without", None)):
            if answer is None and not with_gradient[m].feasible:
                # not asked again: a mode that does not run with the gradient does not run with
                # less of it (the assumption of the module text), and its diagnosis is costly
                result.verdicts.append({
                    "mode": m, "gradient": label, "feasible": False, "uphill_set_size": None,
                    "message": "infeasible: it does not run even with the gradient (not asked "
                               "again without it)"})
                continue
            if answer is None:
                tick()
                try:
                    answer = flat_answers[m] = ask(prepare_at(flat, m), True)
                except UndeterminedError as err:
                    result.verdicts.append({"mode": m, "gradient": label, "feasible": None,
                                            "uphill_set_size": None,
                                            "message": f"undetermined: {err}"})
                    continue
            result.verdicts.append({"mode": m, "gradient": label, "feasible": answer.feasible,
                                    "uphill_set_size": answer.uphill_set_size,
                                    "message": answer.message})
    if threshold is not None:
        tick()
        answers = {"with": with_threshold, "without": threshold(prepare_at(flat, mode))}
        for row in result.verdicts:
            found = answers.get(row["gradient"]) if row["mode"] == mode else None
            if found is not None:
                row["h2_threshold"] = found.threshold if found.feasible else None
                row["h2_unit"] = found.unit
    checks, sentences = [], []
    for m in (modes if result.has_gradient else ()):
        answers = {r["gradient"]: r for r in result.verdicts if r["mode"] == m}
        if answers.get("without", {}).get("feasible") is None and m != mode:
            continue
        if getattr(with_gradient[m], "demand_impossible", False):
            sentences.append(f"{m}: the demand cannot be met even ignoring thermodynamics, with "
                             "any gradient")
            continue
        if not with_gradient[m].feasible and m != mode:
            sentences.append(f"{m}: does not run at the environment's gradient (larger gradients "
                             f"are searched in the analysis mode, {mode}, only)")
            continue
        rows, check, words = least_gradient(environment, lambda env, m=m: prepare_at(env, m), ask,
                                            at_zero=flat_answers.get(m), at_one=with_gradient[m],
                                            progress=lambda d, t: tick())
        for row in rows:
            row["mode"] = m
        result.least.extend(rows)
        checks.append(check)
        sentences.append(f"{m}: {words}")
    result.verification = weakest(checks, [s.split(":")[0] for s in sentences
                                           if "ignoring thermodynamics" not in s
                                           and "larger gradients are searched" not in s])
    if not result.has_gradient:
        sentences = [f"{m}: the environment has no gradient (every compartment at the cell's pH, "
                     "Δψ = 0): nothing to scale" for m in modes]
    result.least_words = sentences
    words = "least gradient: " + "; ".join(sentences)
    tm = prepare_at(environment, mode)
    flat_tm = prepare_at(flat, mode)
    if h2_id is not None:
        for label, model in (("with", tm), ("without", flat_tm)):
            for row in carrier_by_h2(model, h2_id, options):
                row["gradient"] = label
                result.carrier.append(row)
    result.carrier_words = carrier_words(result.carrier)
    result.message = words + (f"; {result.carrier_words}" if result.carrier_words else "")
    return result


def carrier_words(rows: list[dict]) -> str:
    """The carrier-by-H2 answer in one sentence."""
    coupled = [r for r in rows if r["gradient"] == "with" and abs(r["ions_in"]) > 1e-12]
    direct = [r for r in rows if r["gradient"] == "with" and abs(r["ions_in"]) < 1e-12]
    if not coupled:
        return ""
    best_c = max(coupled, key=lambda r: r["reduced_to_oxidised_max"])
    text = (f"{best_c['pair']} by H2 at {best_c['h2_activity']:.3g} {best_c['unit']}: with the gradient "
            f"{best_c['reaction']} ({best_c['ions_in']:g} ions in) reduces it to "
            f"red/ox {best_c['reduced_to_oxidised_max']:.3g} (E' {best_c['carrier_potential_mV']:.0f} mV)")
    if direct:
        best_d = max(direct, key=lambda r: r["reduced_to_oxidised_max"])
        text += (f", against {best_d['reduced_to_oxidised_max']:.3g} (E' "
                 f"{best_d['carrier_potential_mV']:.0f} mV) by {best_d['reaction']} without it")
    needed = best_c["needed_per_ion_kJ_per_mol"]
    if math.isfinite(needed):
        text += f"; the most reduced state the bounds allow (red/ox {best_c['bound_ratio']:.3g}) "
        text += ("needs no gradient" if needed <= 0 else
                 f"needs at least {needed:.3g} kJ/mol from each entering H+ (ΔpH "
                 f"{needed / best_c['rt_ln10']:.3g} at Δψ = 0, or Δψ {-1000 * needed / FARADAY:.3g} "
                 "mV at ΔpH = 0)")
    return text + " [computed: arithmetic on the reaction energies, no optimisation]"

