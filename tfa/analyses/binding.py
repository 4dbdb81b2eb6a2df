"""What binds: the constraints that decide each answer, with their dual values in words.

For each answer of a mode:

- **feasible** (a yes/no answer at one certified point, one of many): the concentration bounds
  active at the point (which compound, which bound), the fed concentrations, the demand and the
  reactions that run at exactly the least driving force delta;
- **h2_threshold**, **h2_window_low**, **h2_window_high** (least or largest ln[H2] at which
  the network is feasible) and **driving_force** (the max-min driving force B): the dual values
  of the linear program with the flux pattern of the optimum fixed
  (:mod:`tfa.problem.sensitivity`), each confirmed by re-solving with the datum moved both ways
  (the dual lies between the left and right derivatives, Bertsimas & Tsitsiklis 1997,
  Introduction to Linear Optimization, Section 5.2).

Sensitivities and their units:

- H2 answers: s = d ln[H2] / d ln(bound) (dimensionless): the H2 level scales as bound^s, so
  s = 1 reads "halving the bound halves the threshold"; for a reaction energy,
  d ln[H2] / d ΔrG'° [per kJ/mol];
- driving force: d B / d ln(bound) [kJ/mol per unit ln c]; for A <=> B at a fixed A and B at its
  lower bound, -RT (hand-derived from B = -(ΔrG'° + RT ln(b/a)));
  d B / d ΔrG'° [dimensionless].

The dual values describe the answer with the optimum's flux pattern fixed (which reactions run,
and which way): they are local to that pattern, and the words say so ("with the flux pattern
fixed"). Another pattern may take over as soon as a datum moves (a 0.5 % lower ferredoxin bound
moved the bundled network's full H2 threshold the other way from its pattern's dual). So the
top binding constraint(s) of each H2 answer found by a MILP are checked on the full problem
(:func:`check_by_full_solve`): the threshold (or largest H2) MILP is solved again with the datum
moved down by :data:`CHECK_STEP`, and the measured change of ln[H2] is reported beside the one
the pattern predicts (columns ``check_step``, ``predicted_ln_h2_change``,
``measured_ln_h2_change``).

Example (hand-derived; R = 8.314462618 J/(mol K), CODATA 2018): H2 + X <=> XH2 with
ΔrG'° = -10 kJ/mol, delta = 0.1 kJ/mol: [H2]_min = [XH2]_min / ([X]_max K),
K = exp(9.9/RT), so d ln[H2]_min / d ln[XH2]_min = 1 and d ln[H2]_min / d ln[X]_max = -1
(tests/test_binding.py).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..errors import ComputationError, InputError, UndeterminedError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, Solution, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from ..problem.sensitivity import (ZERO_DUAL, LPOptimum, PatternLP, dual_confirmed,
                                   pattern_lp, solve_pattern)
from ..problem.sensitivity import finite_difference as _finite_difference
from .results import AnalysisResult, certify, verification

log = logging.getLogger(__name__)

#: Columns of the binding_constraints table.
BINDING_COLUMNS = ["mode", "answer", "rank", "kind", "compound", "reaction", "bound", "activity",
                   "sensitivity", "sensitivity_unit", "sensitivity_left", "sensitivity_right",
                   "dual_confirmed", "check_step", "predicted_ln_h2_change",
                   "measured_ln_h2_change", "message"]
#: The answers a row can belong to, with the words used for them.
ANSWERS = {"feasible": "the feasible steady state",
           "h2_threshold": "the H2 threshold",
           "h2_window_low": "the lower end of the H2 window",
           "h2_window_high": "the upper end of the H2 window",
           "driving_force": "the max-min driving force"}
#: A compound lies at a bound when within this of it, in ln units.
AT_BOUND = 1e-6
#: Priority of the kinds in the table (lower is named first; bounds and feeds compete on the
#: size of their dual value, both per unit ln c).
#: How far a binding datum is moved down for the full re-solve (ln units for a concentration
#: bound, 0.5 %; kJ/mol for the least driving force): large enough to stand above the solver's
#: tolerance (about 1e-6 in ln[H2]), small enough to stay local.
CHECK_STEP = 0.005
#: Rows per H2 answer given the full re-solve (the first-ranked and one that binds equally).
CHECK_ROWS = 2
#: A measured change agrees with the predicted one within this share of it (or 1e-4 in ln).
CHECK_AGREEMENT = 0.1
#: Words put before an effect read from the dual values of the pattern LP.
FIXED = "with the flux pattern fixed, "
KIND_ORDER = {"range searched": 0, "concentration bound": 1, "fed concentration": 1,
              "carrier state": 1, "reaction energy": 2, "least driving force": 3, "demand": 4}


@dataclass(kw_only=True)
class BindingResult(AnalysisResult):
    """The binding constraints of every answer (one table; see :data:`BINDING_COLUMNS`)."""

    table: pd.DataFrame = field(default_factory=lambda: pd.DataFrame(columns=BINDING_COLUMNS))
    analysis: str = "binding constraints"

    def to_frame(self) -> pd.DataFrame:
        return self.table

    def tables(self) -> dict[str, pd.DataFrame]:
        return {"binding_constraints": self.table}

    def top(self, mode: str, answer: str) -> dict | None:
        """The first-ranked row of one answer, or None."""
        rows = self.table[(self.table["mode"] == mode) & (self.table["answer"] == answer)]
        return None if rows.empty else rows.sort_values("rank").iloc[0].to_dict()

    def top_words(self, mode: str, answer: str, pairs: dict[str, str] | None = None) -> str:
        """The first-ranked constraint of one answer in words, with the constraints that move the
        answer exactly as much; for a yes/no answer, the demand and a count of what the point
        found reaches.

        ``pairs`` (reduced form -> oxidised form of each carrier pair): when the two bounds that
        move the answer equally and oppositely are the two forms of one carrier, they are named
        as the carrier ratio they set (e.g. the least NADH/NAD+ ratio the bounds allow).
        """
        rows = self.table[(self.table["mode"] == mode) & (self.table["answer"] == answer)]
        if rows.empty:
            return ""
        rows = rows.sort_values("rank")
        if answer == "feasible":
            kinds = rows["kind"].value_counts()
            return (f"{rows.iloc[0]['message']}; at the point found (one of many), "
                    f"{int(kinds.get('concentration bound', 0))} concentration bound(s) reached, "
                    f"{int(kinds.get('fed concentration', 0))} fed concentration(s), "
                    f"{int(kinds.get('least driving force', 0))} step(s) at exactly the least "
                    "driving force")
        top = rows.iloc[0]
        s = top["sensitivity"]
        if not (isinstance(s, float) and math.isfinite(s)) or abs(s) <= ZERO_DUAL:
            return str(top["message"])
        same = rows[(rows["kind"].map(KIND_ORDER) == KIND_ORDER[top["kind"]])
                    & (rows["rank"] > top["rank"])
                    & ((rows["sensitivity"].abs() - abs(s)).abs() <= 1e-6 * max(1.0, abs(s)))]
        ratio = _ratio_words(top, same, pairs or {}, ANSWERS[answer])
        if ratio:
            return ratio + _check_words(top, ANSWERS[answer], _subject(top, ANSWERS[answer]))
        checked = _check_words(top, ANSWERS[answer])
        extra = [_subject(other, ANSWERS[answer]) for _, other in same.head(2).iterrows()]
        return (str(top["message"]) + checked
                + (f"; as strongly (the same size of dual value): {' and '.join(extra)}"
                   if extra else ""))

    def summary(self) -> str:
        lines = []
        for (mode, answer), _ in self.table.groupby(["mode", "answer"], sort=False):
            words = self.top_words(mode, answer)
            if words:
                lines.append(f"{mode}, {ANSWERS[answer]}: {words}")
        return "\n".join(lines) or "no binding constraints (no answer with a solution)"


def _subject(row, name: str) -> str:
    """What a row names, without its effect: "the upper bound of X (0.01 mol/L)", "the ΔrG'° of
    R1", "the carrier state ... (lower end)"."""
    if row["kind"] == "reaction energy":
        return f"the ΔrG'° of {row['reaction']}"
    message = str(row["message"])
    head = message.split(f" sets {name}: ", 1)[0]
    return head.split(f" enters {name}: ", 1)[0]


def _check_words(row, name: str, subject: str = "it") -> str:
    """The full re-solve beside the prediction, in words ("" when the row was not re-solved)."""
    measured, predicted = row.get("measured_ln_h2_change"), row.get("predicted_ln_h2_change")
    step = row.get("check_step")
    if not all(isinstance(v, float) and math.isfinite(v) for v in (measured, predicted, step)):
        return ""
    moved = (f"{abs(step):g} kJ/mol lower" if row["kind"] == "least driving force"
             else f"{100 * (1 - math.exp(step)):.2g} % lower")
    agree = abs(measured - predicted) <= CHECK_AGREEMENT * abs(predicted) + 1e-4
    return (f"; solved again in full with {subject} {moved}, {name} moves by "
            f"{100 * math.expm1(measured):+.2g} % (the fixed flux pattern predicts "
            f"{100 * math.expm1(predicted):+.2g} %"
            + (")" if agree else ": another flux pattern takes over)"))


def _ratio_words(top, same: pd.DataFrame, pairs: dict[str, str], name: str) -> str:
    """A carrier pair's two bounds read as the ratio they set, or "" (see BindingResult.top_words)."""
    oxidised_of = dict(pairs)
    for _, other in same.iterrows():
        a, b = top, other
        if oxidised_of.get(b["compound"]) == a["compound"]:
            a, b = b, a
        if oxidised_of.get(a["compound"]) != b["compound"] or a["bound"] == b["bound"]:
            continue
        if abs(a["sensitivity"] + b["sensitivity"]) > 1e-6 * max(1.0, abs(a["sensitivity"])):
            continue
        ratio = a["activity"] / b["activity"]
        extreme = "least" if a["bound"] == "lower" else "largest"
        s = float(a["sensitivity"])
        head = (f"the {extreme} {a['compound']}/{b['compound']} ratio the bounds allow "
                f"({ratio:.3g}: {a['compound']} at its {a['bound']} bound, {b['compound']} at its "
                f"{b['bound']})")
        if str(a["sensitivity_unit"]).startswith("d ln[H2]"):
            words = _ln_words(s, name).replace(" it ", " the ratio ", 1)
            return f"{head} sets {name}: {FIXED}{words}"
        return (f"{head} sets {name}: {FIXED}a tenfold rise of the ratio changes it by "
                f"{s * math.log(10):+.3g} kJ/mol")
    return ""


def _bound_words(lp: PatternLP, side: str, mid: str, unit: str = "mol/L") -> str:
    i = lp.index(mid)
    value = math.exp(lp.lower[i] if side != "upper" else lp.upper[i])
    if side == "fixed":
        return f"the fed concentration of {mid} ({value:.3g} {unit})"
    return f"the {side} bound of {mid} ({value:.3g} {unit})"


def _ln_words(s: float, answer: str) -> str:
    """How an H2 level (ln) moves with a bound, s = d ln[H2]/d ln(bound)."""
    if abs(s - 1) < 0.02:
        return f"halving it halves {answer}"
    if abs(s + 1) < 0.02:
        return f"doubling it halves {answer}"
    return f"halving it multiplies {answer} by {0.5 ** s:.3g} (it scales as the bound^{s:.3g})"


def _one_sided(dual: float, left: float, right: float) -> str:
    """Words for a kink: the optimum moves differently when the datum moves the other way."""
    if not (math.isfinite(left) and math.isfinite(right)) or abs(dual) <= ZERO_DUAL:
        return ""
    if abs(left - right) <= 1e-3 * max(abs(left), abs(right), 1e-9):
        return ""
    def said(x: float) -> str:   # a derivative within the re-solve's noise is 0
        return "0" if abs(x) <= ZERO_DUAL else f"{x:+.3g}"

    return (f" (one-sided: the derivative is {said(left)} below and {said(right)} above the "
            "bound, another constraint takes over)")


def _rows_from_optimum(lp: PatternLP, opt: LPOptimum, mode: str, answer: str,
                       range_compound: str | None = None, unit: str = "mol/L",
                       confirm: int | None = None) -> list[dict]:
    """Rows for every datum whose dual is not zero, or that lies at a bound, with words; each
    dual confirmed by re-solving with its datum moved both ways, or with ``confirm`` only the
    first ``confirm`` rows by rank (the others keep NaN one-sided derivatives and
    ``dual_confirmed`` None: two linear programs fewer per row)."""
    objective, sense = opt.objective[:2], opt.objective[2]

    def finite_difference(lp, objective, sense, datum):   # deferred when confirming a few
        if confirm is not None:
            return math.nan, math.nan
        return _finite_difference(lp, objective, sense, datum)

    is_h2 = objective[0] == "ln_activity"
    name = ANSWERS[answer]
    unit_bound = "per unit ln c" if not is_h2 else "d ln[H2] per unit ln c"
    rows = []
    for i, mid in enumerate(lp.metabolite_ids):
        fixed = lp.upper[i] - lp.lower[i] <= 1e-12
        candidates = [("fixed", opt.lower_duals[i] + opt.upper_duals[i])] if fixed else [
            ("lower", opt.lower_duals[i]), ("upper", opt.upper_duals[i])]
        for side, dual in candidates:
            at = (fixed or (side == "lower" and opt.log_conc[i] - lp.lower[i] <= AT_BOUND)
                  or (side == "upper" and lp.upper[i] - opt.log_conc[i] <= AT_BOUND))
            if not at and abs(dual) <= ZERO_DUAL:
                continue
            left, right = finite_difference(lp, objective, sense, (side, mid, ""))
            kind = ("range searched" if mid == range_compound
                    else "fed concentration" if fixed else "concentration bound")
            what = ("the bottom of the H2 range searched" if kind == "range searched"
                    and side == "lower" else "the top of the H2 range searched"
                    if kind == "range searched" else _bound_words(lp, side, mid, unit))
            if kind == "range searched" and abs(dual) > ZERO_DUAL:
                words = (f"{what} sets {name}: the network is feasible up to it, and the "
                         "window may go on beyond it")
            elif abs(dual) <= ZERO_DUAL:
                words = f"{what} is active, but moving it does not move {name}"
            elif is_h2:
                words = f"{what} sets {name}: {FIXED}{_ln_words(dual, name)}"
            else:
                words = (f"{what} sets {name}: {FIXED}a tenfold rise of it changes it by "
                         f"{dual * math.log(10):+.3g} kJ/mol ({dual / lp.rt:+.3g} RT per unit ln c)")
            words += _one_sided(dual, left, right)
            value = math.exp(lp.lower[i] if side != "upper" else lp.upper[i])
            rows.append({"_datum": (side, mid, ""), "kind": kind, "compound": mid,
                         "reaction": "", "bound": side,
                         "activity": value, "sensitivity": float(dual),
                         "sensitivity_unit": ("kJ/mol per unit ln c" if not is_h2 else unit_bound),
                         "sensitivity_left": left, "sensitivity_right": right,
                         "dual_confirmed": dual_confirmed(dual, left, right), "message": words})
    for k, rid in enumerate(lp.reaction_ids):
        dual = float(opt.energy_duals[k])
        if abs(dual) <= ZERO_DUAL:
            continue
        left, right = finite_difference(lp, objective, sense, ("energy", rid, ""))
        change = (f"1 kJ/mol more in its ΔrG'° multiplies it by {math.exp(dual):.3g}" if is_h2
                  else f"1 kJ/mol more in its ΔrG'° changes it by {dual:+.3g} kJ/mol")
        rows.append({"_datum": ("energy", rid, ""), "kind": "reaction energy",
                     "compound": "", "reaction": rid,
                     "bound": "", "activity": math.nan, "sensitivity": dual,
                     "sensitivity_unit": "d ln[H2] per kJ/mol" if is_h2 else "per kJ/mol",
                     "sensitivity_left": left, "sensitivity_right": right,
                     "dual_confirmed": dual_confirmed(dual, left, right),
                     "message": f"reaction {rid} runs at its limit and sets {name}: {FIXED}{change}"})
    for k, (coefficients, low, high, text) in enumerate(lp.state_rows):
        for side, dual in zip(("lower", "upper"), opt.state_duals[k]):
            if abs(dual) <= ZERO_DUAL:
                continue
            left, right = finite_difference(lp, objective, sense, ("state", str(k), side))
            change = (_ln_words(dual, name) if is_h2 else
                      f"a rise of its {side} bound by one unit of ln changes it by {dual:+.3g} kJ/mol")
            rows.append({"_datum": ("state", str(k), side), "kind": "carrier state",
                         "compound": ", ".join(
                             lp.metabolite_ids[i] for i in coefficients), "reaction": "",
                         "bound": side, "activity": math.nan, "sensitivity": float(dual),
                         "sensitivity_unit": unit_bound if is_h2 else "kJ/mol per unit ln",
                         "sensitivity_left": left, "sensitivity_right": right,
                         "dual_confirmed": dual_confirmed(dual, left, right),
                         "message": f"the carrier state {text} ({side} end) sets {name}: {FIXED}{change}"
                                    + _one_sided(dual, left, right)})
    if is_h2 and abs(opt.delta_dual) > ZERO_DUAL:
        left, right = finite_difference(lp, objective, sense, ("delta", "", ""))
        rows.append({"_datum": ("delta", "", ""), "kind": "least driving force",
                     "compound": "", "reaction": "", "bound": "",
                     "activity": math.nan, "sensitivity": opt.delta_dual,
                     "sensitivity_unit": "d ln[H2] per kJ/mol",
                     "sensitivity_left": left, "sensitivity_right": right,
                     "dual_confirmed": dual_confirmed(opt.delta_dual, left, right),
                     "message": f"the least driving force ({lp.min_driving_force:g} kJ/mol) "
                                f"enters {name}: {FIXED}1 kJ/mol more multiplies it by "
                                f"{math.exp(opt.delta_dual):.3g}"})
    for row in rows:
        row.update(mode=mode, answer=answer)
    ranked = _ranked(rows)
    for row in ranked:
        datum = row.pop("_datum")
        if confirm is None:
            continue
        if row["rank"] > confirm or abs(row["sensitivity"]) <= ZERO_DUAL:
            row["dual_confirmed"] = None   # not re-solved
            continue
        left, right = _finite_difference(lp, objective, sense, datum)
        row.update(sensitivity_left=left, sensitivity_right=right,
                   dual_confirmed=dual_confirmed(row["sensitivity"], left, right))
        if row["kind"] not in ("reaction energy", "least driving force"):
            row["message"] += _one_sided(row["sensitivity"], left, right)
    return ranked


#: Order of the kinds for a yes/no answer: what the question imposes first.
POINT_KIND_ORDER = ("demand", "fed concentration", "least driving force", "concentration bound")


def _ranked(rows: list[dict]) -> list[dict]:
    def key(row: dict) -> tuple:
        if row["answer"] == "feasible":
            return (POINT_KIND_ORDER.index(row["kind"]), row["compound"], row["reaction"],
                    row["bound"])
        moves = abs(row["sensitivity"]) > ZERO_DUAL if math.isfinite(row["sensitivity"]) else False
        return (not moves, KIND_ORDER[row["kind"]], -abs(np.nan_to_num(row["sensitivity"])),
                row["compound"], row["reaction"], row["bound"])

    rows.sort(key=key)
    for n, row in enumerate(rows, 1):
        row["rank"] = n
    return rows


def optimum_constraints(tm: ThermoModel, solution: Solution, options: ProblemOptions, mode: str,
                        answer: str, objective: tuple[str, str | None], sense: str,
                        log_bound_overrides: dict | None = None, range_compound: str | None = None,
                        unit: str = "mol/L", confirm: int | None = None) -> tuple[list[dict], float]:
    """Rows of one optimisation answer and the pattern LP's optimum (to compare with the MILP's).

    Parameters
    ----------
    tm, solution, options : the model, the optimum's certified solution and the problem options
    answer : a key of :data:`ANSWERS`
    objective, sense : as :func:`tfa.problem.sensitivity.solve_pattern`
    log_bound_overrides : the bounds the optimum was found under (the H2 range for H2 answers)
    range_compound : the compound whose bounds are the range searched (H2), named as such
    confirm : confirm only the duals of the first ``confirm`` rows by re-solving (default all)
    """
    lp = pattern_lp(tm, solution, options, log_bound_overrides)
    opt = solve_pattern(lp, objective, sense)
    return _rows_from_optimum(lp, opt, mode, answer, range_compound, unit, confirm), opt.value


def point_constraints(tm: ThermoModel, solution: Solution, options: ProblemOptions,
                      mode: str) -> list[dict]:
    """Rows of a yes/no answer at its certified point: active bounds, fed concentrations, the
    demand and the reactions at exactly the least driving force (no duals: nothing is
    optimised, and the point is one of many)."""
    lp = pattern_lp(tm, solution, options)
    x = dict(zip(solution.metabolite_ids, solution.log_conc))
    rows = []
    for i, mid in enumerate(lp.metabolite_ids):
        fixed = lp.upper[i] - lp.lower[i] <= 1e-12
        xi = x.get(mid, math.nan)
        side = ("fixed" if fixed else "lower" if xi - lp.lower[i] <= AT_BOUND
                else "upper" if lp.upper[i] - xi <= AT_BOUND else None)
        if side is None:
            continue
        what = _bound_words(lp, side, mid)
        rows.append({"kind": "fed concentration" if fixed else "concentration bound",
                     "compound": mid, "reaction": "", "bound": side,
                     "activity": math.exp(lp.lower[i] if side != "upper" else lp.upper[i]),
                     "message": f"{what} {'holds' if fixed else 'is reached'} at the point found"})
    energies = dict(zip(solution.energy_ids, solution.energies))
    for k, rid in enumerate(lp.reaction_ids):
        force = -lp.direction[k] * energies.get(rid, math.nan)
        if abs(force - lp.min_driving_force) <= 1e-6 * max(1.0, lp.min_driving_force):
            rows.append({"kind": "least driving force", "compound": "", "reaction": rid,
                         "bound": "", "activity": math.nan,
                         "message": f"reaction {rid} runs downhill by exactly the least driving "
                                    f"force ({lp.min_driving_force:g} kJ/mol) at the point found"})
    if tm.demand_id:
        demand = tm.model.reactions.get_by_id(tm.demand_id)
        rows.append({"kind": "demand", "compound": "", "reaction": tm.demand_id, "bound": "lower",
                     "activity": math.nan,
                     "message": f"the demand {tm.demand_id} (flux at least {demand.lower_bound:g}) "
                                "decides which reactions must carry flux"})
    for row in rows:
        row.update(mode=mode, answer="feasible", sensitivity=math.nan, sensitivity_unit="",
                   sensitivity_left=math.nan, sensitivity_right=math.nan, dual_confirmed=None)
    return _ranked(rows)


def binding_frame(rows: list[dict]) -> pd.DataFrame:
    """The table of :data:`BINDING_COLUMNS` from rows."""
    return pd.DataFrame(rows, columns=BINDING_COLUMNS)


def binding_verification(table: pd.DataFrame, mismatches: list[str]) -> dict:
    """How the dual values were checked, in words."""
    duals = table[table["sensitivity"].notna() & (table["sensitivity"].abs() > ZERO_DUAL)]
    bad = duals[duals["dual_confirmed"] == False]  # noqa: E712 - a column of True/False/None
    words = (f"{len(duals)} dual value(s), each re-solved with its datum moved by ±1e-3: "
             f"{len(duals) - len(bad)} lie between the left and right derivatives")
    if len(bad):
        words += f"; not confirmed: {', '.join(bad['message'].str.slice(0, 60))}"
    if mismatches:
        words += "; the pattern LP's optimum differs from the answer's: " + "; ".join(mismatches)
    # an LP optimum's dual, confirmed by a second route (the re-solves): "proven"
    return verification("proven" if not len(bad) and not mismatches else "solver proof", words)


#: Kinds of datum the full re-solve can move (through the options of the problem).
MOVABLE = ("concentration bound", "fed concentration", "least driving force")


def _moved_options(tm: ThermoModel, opts: ProblemOptions, row: dict, step: float
                   ) -> ProblemOptions | None:
    """The options with the row's datum moved down by ``step`` (ln units for a bound, both ends
    of a fed concentration; kJ/mol for the least driving force), or None for a kind the options
    cannot move (a carrier state, a reaction energy)."""
    if row["kind"] == "least driving force":
        return replace(opts, min_driving_force=opts.min_driving_force - step)
    if row["kind"] not in MOVABLE:
        return None
    mid = row["compound"]
    bounds = opts.log_bound_overrides.get(mid, tm.log_bounds.get(mid))
    if bounds is None:
        return None
    lo, hi = float(bounds[0]), float(bounds[1])
    lo, hi = {"fixed": (lo - step, hi - step), "lower": (lo - step, hi),
              "upper": (lo, max(lo, hi - step))}[row["bound"]]
    return replace(opts, log_bound_overrides={**opts.log_bound_overrides, mid: (lo, hi)})


def _optimum_ln_h2(tm: ThermoModel, opts: ProblemOptions, h2: str, sense: str) -> float:
    """ln of the least (``sense`` "min") or largest H2 at which the full problem is feasible: the
    H2 threshold MILP of :func:`tfa.analyses.hydrogen.h2_threshold`, its point certified."""
    with ThermoProblem(tm, opts) as problem:
        problem.set_objective({problem.x_vars[problem.metabolite_index[h2]]: 1.0}, sense)
        sol = problem.solve("H2 answer with a binding datum moved")
        certify(problem, sol)
        return float(sol.log_conc[sol.metabolite_ids.index(h2)])


def check_by_full_solve(tm: ThermoModel, opts: ProblemOptions, rows: list[dict], h2: str,
                        sense: str, base_ln: float, step: float = CHECK_STEP,
                        limit: int = CHECK_ROWS) -> int:
    """Solve the full H2 problem again with each top binding datum moved down by ``step``.

    The first-ranked row of ``rows`` (one H2 answer, ranked) and the rows whose dual value has
    the same size, of a kind the options can move (:data:`MOVABLE`), up to ``limit``, get
    ``check_step`` (-step, in the datum's unit), ``predicted_ln_h2_change`` (the pattern LP's
    derivative below the datum, ``sensitivity_left``, times -step) and ``measured_ln_h2_change``
    (the optimum of the H2 MILP with the datum moved, minus ``base_ln``; nan when the moved
    problem has no feasible H2 in the range or a time limit stopped it). Returns the re-solves
    made.

    Parameters
    ----------
    opts : the options the answer was found under (with the H2 range as the bounds of ``h2``)
    sense : "min" for the threshold, "max" for the largest H2
    base_ln : ln of the answer [ln of mol/L, or of bar for a gas]
    step : the move [ln units for a concentration; kJ/mol for the least driving force]

    Example (hand-derived, ``tests/test_binding.py``): H2 + X <=> XH2 alone has
    [H2]_min = [XH2]_min / ([X]_max K), so one flux pattern holds everywhere and lowering
    [XH2]_min by 0.5 % lowers the threshold by 0.5 %: measured -0.005 = predicted -0.005 in ln.
    """
    if not rows or not math.isfinite(base_ln):
        return 0
    top = abs(float(rows[0]["sensitivity"]))
    if not math.isfinite(top) or top <= ZERO_DUAL:
        return 0
    chosen = [r for r in rows if r["kind"] in MOVABLE and math.isfinite(r["sensitivity"])
              and abs(abs(r["sensitivity"]) - top) <= 1e-6 * max(1.0, top)
              and KIND_ORDER[r["kind"]] == KIND_ORDER[rows[0]["kind"]]][:limit]
    made = 0
    for row in chosen:
        moved = _moved_options(tm, opts, row, step)
        if moved is None:
            continue
        slope = row["sensitivity_left"] if math.isfinite(row["sensitivity_left"]) else row["sensitivity"]
        try:
            measured = _optimum_ln_h2(tm, moved, h2, sense) - base_ln
        except (InfeasibleProblem, UndeterminedError, ComputationError, InputError):
            measured = math.nan
        made += 1
        row.update(check_step=-step, predicted_ln_h2_change=-step * float(slope),
                   measured_ln_h2_change=measured)
    return made


def window_binding(tm: ThermoModel, opts: ProblemOptions, result, mode: str) -> None:
    """The binding constraints at every end of every window of an H2 answer
    (:class:`tfa.analyses.hydrogen.H2ThresholdResult`): dual values of the pattern LP, and for the
    ends found by a MILP (not a range end) the full re-solve of the top ones
    (:func:`check_by_full_solve`)."""
    from ..network.roles import carrier_pairs

    h2 = result.h2_id
    try:
        result.carrier_pairs = {p.reduced.id: p.oxidised.id
                                for p in carrier_pairs(tm.model).values()}
    except InputError:
        result.carrier_pairs = {}
    for end in result.ends:
        answer = result.answer_of(end)
        sense = "min" if end["window_end"] == "low" else "max"
        try:
            rows, _ = optimum_constraints(tm, end["solution"], opts, mode, answer,
                                          ("ln_activity", h2), sense, range_compound=h2,
                                          unit=result.unit)
        except (ComputationError, InputError) as err:
            log.warning("binding constraints at the %s end of H2 window %d: %s",
                        end["window_end"], end["h2_window"], err)
            continue
        if "MILP" in end["found_by"] and not end["at_range_end"]:
            check_by_full_solve(tm, opts, rows, h2, sense, math.log(end["h2_activity"]))
        for row in rows:
            row["h2_window"] = end["h2_window"]
            if end["h2_window"] > 1:
                row["message"] = f"(window {end['h2_window']}) " + row["message"]
        result.binding.extend(rows)
