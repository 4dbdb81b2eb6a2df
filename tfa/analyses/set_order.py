"""The minimal uphill sets in a stable order, and how many there are.

Among the sets of the least size s, sets are ordered lexicographically on their members' reaction
ids (each set's ids sorted; Python's string order, code point by code point): set A comes before
set B when the first id at which their sorted lists differ is smaller in A. Equivalently, A < B
exactly when the smallest id of the symmetric difference A Δ B lies in A (hand proof: the ids
below it are in both sets, so the sorted lists agree up to it, and at its position A holds it
and B a larger id).

The first set in that order is found member by member, on the uphill-set problem with the row
sum_j u_j <= s (only sets of size s remain, since none is smaller):

1. any set W (a mixed-integer point; the first point found);
2. let m be the smallest member of W not yet decided; ask for a set containing one of the
   undecided ids below m (the row sum_{j undecided, id_j < id_m} u_j >= 1);
3. none (the solver proves the problem infeasible): m is the next member, the undecided ids below
   it are out (u_j fixed at 1 and 0); one: it is the new W, back to 2.

W always contains the members decided so far, so when s members are decided W is the set. Each
next set in the order is the first among the sets not yet found: the earlier ones are cut off by
integer cuts sum_{j in S} u_j <= s - 1 (Balas & Jeroslow 1972, SIAM J. Appl. Math. 23:61).

The count continues with integer cuts in the solver's order after the listed sets, up to a limit;
it is exact ("all found") when the problem with every found set cut off has no point, else a
lower bound ("at least N").

Hand check (``tests/test_uphill_order.py``): a network whose every step is uphill at any
concentration, with two-step routes A -> B -> P by R2 or R4 then R1 or R3 and a bypass R0, R5,
has the five minimal sets {R0, R5}, {R1, R2}, {R1, R4}, {R2, R3}, {R3, R4}, listed in exactly
that order (the solver alone found {R3, R4} first); ``tests/test_engine_enumeration.py`` checks
the order and the count against an exact enumeration of 200 random networks.
"""

from __future__ import annotations

import logging
from dataclasses import dataclass

from ..errors import UndeterminedError
from ..problem.builder import Solution, ThermoProblem
from ..problem.solvers import InfeasibleProblem

log = logging.getLogger(__name__)

#: Minimal sets counted per question (the listed ones included) before the count is reported as
#: "at least N": each is one mixed-integer solve (about 0.1-0.5 s on the bundled network).
COUNT_LIMIT = 20


@dataclass
class OrderedSet:
    """One minimal set found in order.

    Attributes
    ----------
    members : list of str
        Reaction ids, sorted.
    solution : Solution
        A point of the problem with exactly these steps uphill.
    ordered : bool
        True when every earlier candidate was ruled out by a solver proof (the set is the first in
        the order among those not yet found); False when a time limit stopped a proof (the set is
        minimal but possibly not the first).
    solves : int
        Mixed-integer solves it took.
    """

    members: list[str]
    solution: Solution
    ordered: bool = True
    solves: int = 0


def _solve_point(problem: ThermoProblem, what: str) -> Solution | None:
    """Any point of the problem as it stands (zero objective: the first point found), or None
    when the solver proves there is none."""
    problem.set_objective({}, "min")
    try:
        return problem.solve(what)
    except InfeasibleProblem:
        return None


def first_in_order(problem: ThermoProblem, size: int, what: str = "minimal uphill set",
                   witness: Solution | None = None, progress=None) -> OrderedSet | None:
    """The first set of ``size`` uphill steps in the order of reaction ids (see the module text)
    among those the problem still allows, or None when it allows none.

    The caller has added the row sum_j u_j <= size and the cuts of the sets found before; the
    bounds of the uphill binaries are restored on return. ``witness``: a point of the problem as
    it stands (a set of ``size`` not cut off), used as the first W instead of a solve.
    ``progress(text)``: told before each solve (a progress display).

    Raises
    ------
    UndeterminedError
        When the time limit stops the first point's search (the later proofs stopping only clear
        :attr:`OrderedSet.ordered`).
    """
    ids = problem.energy_ids
    u = problem.u_vars
    saved = [(v, v.lb, v.ub) for v in u]
    decided_in = {ids[j] for j, v in enumerate(u) if v.lb >= 1}
    decided_out = {ids[j] for j, v in enumerate(u) if v.ub <= 0}
    solves = 0
    try:
        if witness is None or len(witness.uphill) != size:
            solves += 1
            witness = _solve_point(problem, f"{what} in order")
        if witness is None:
            return None
        ordered = True
        while len(decided_in) < size:
            if progress is not None:
                progress(f"member {len(decided_in) + 1} of {size}, {solves} solves")
            members = sorted(set(witness.uphill) - decided_in)
            if not members:   # the point has fewer steps than the size: cannot be (size minimal)
                break
            m = members[0]
            below = [j for j, rid in enumerate(ids)
                     if rid < m and rid not in decided_in and rid not in decided_out]
            better = None
            if below and ordered:
                row = problem.add_constraint({u[j]: 1.0 for j in below}, 1.0, None,
                                             "tfa_order_below")
                solves += 1
                try:
                    better = _solve_point(problem, f"{what}: a set with a step before {m}")
                except UndeterminedError:
                    log.warning("%s: the order could not be proven within the time limit", what)
                    ordered = False
                finally:
                    problem.remove_constraint(row)
            if better is not None:
                witness = better
                continue
            for j in below:
                u[j].ub = 0
                decided_out.add(ids[j])
            u[ids.index(m)].lb = 1
            decided_in.add(m)
        return OrderedSet(sorted(witness.uphill), witness, ordered, solves)
    finally:
        for v, lb, ub in saved:
            v.set_bounds(lb, ub)


def first_of_least_size(problem: ThermoProblem, least: Solution,
                        what: str = "minimal uphill set") -> OrderedSet:
    """The first set of ``least``'s size in the order of reaction ids, ``least`` being a point of
    the uphill-set problem with the fewest uphill steps (a proven minimum): the row
    sum_j u_j <= size is added for :func:`first_in_order` and removed on return. Used where one
    set per question is listed (the H2 scan's levels)."""
    size = len(least.uphill)
    row = problem.add_constraint({v: 1.0 for v in problem.u_vars}, None, float(size), "tfa_size")
    try:
        item = first_in_order(problem, size, what, witness=least)
    finally:
        problem.remove_constraint(row)
    return item if item is not None else OrderedSet(sorted(least.uphill), least, False)


def cut_off(problem: ThermoProblem, members: list[str], name: str):
    """The integer cut sum_{j in S} u_j <= |S| - 1: the set S is found no more."""
    index = {rid: j for j, rid in enumerate(problem.energy_ids)}
    return problem.add_constraint({problem.u_vars[index[r]]: 1.0 for r in members}, None,
                                  len(members) - 1, name)


def count_more(problem: ThermoProblem, found: int, limit: int, what: str = "minimal uphill set",
               progress=None) -> tuple[int, bool]:
    """Go on finding sets (any order) with the found ones cut off, up to ``limit`` in all.

    Returns (sets found in all, complete): complete when the solver proved that no further set
    exists; a time limit stops the count where it is (not complete). At the limit, one more
    solve says whether the count is complete; when a further set exists it is counted too
    (limit + 1, not complete: "at least limit + 1").
    """
    while found < limit:
        if progress is not None:
            progress(f"counting sets, {found} found")
        try:
            point = _solve_point(problem, f"{what}: counting")
        except UndeterminedError:
            return found, False
        if point is None:
            return found, True
        found += 1
        cut_off(problem, sorted(point.uphill), f"tfa_count_{found}")
    try:
        more = _solve_point(problem, f"{what}: one more?")
    except UndeterminedError:
        return found, False
    return (found, True) if more is None else (found + 1, False)


def list_in_order(result, problem: ThermoProblem, size: int, alternatives: int,
                   count_limit: int, checks: list[str], record,
                   first: Solution | None = None, progress=None) -> None:
    """Up to ``alternatives`` sets of ``size`` in the order of reaction ids
    (:func:`first_in_order`), then the count up to ``count_limit``; each set is added to the
    :class:`~tfa.analyses.uphill.UphillResult` ``result`` by ``record(result, problem, members,
    solution)``."""
    count = {v: 1.0 for v in problem.u_vars}
    problem.add_constraint(count, None, float(size), "tfa_size")
    solves = 0
    for k in range(max(1, alternatives)):
        tell = None if progress is None else (lambda text, k=k: progress(f"set {k + 1}: {text}"))
        item = first_in_order(problem, size, witness=first if k == 0 else None, progress=tell)
        if item is None:
            result.exhausted = True
            break
        solves += item.solves
        result.ordered = result.ordered and item.ordered
        record(result, problem, item.members, item.solution)
        cut_off(problem, item.members, f"tfa_cut_{k}")
    found = len(result.sets)
    if not result.exhausted and count_limit > 0:   # 0: only those listed (robustness draws)
        found, result.exhausted = count_more(problem, found, max(count_limit, found),
                                             progress=progress)
    result.count = found
    checks.append(f"sets listed in the order of reaction ids ({solves} mixed-integer solves; "
                  + ("each earlier candidate ruled out by a solver proof" if result.ordered
                     else "a time limit stopped some proofs of the order")
                  + f"); {count_words(found, result.exhausted)}"
                  + (" (no further set: the solver proved it)" if result.exhausted else
                     f" (counting stopped at {found})" if count_limit > 0 else " (not counted)"))


def list_as_found(result, problem: ThermoProblem, sol: Solution,
                   alternatives: int, checks: list[str], record) -> None:
    """The sets in the solver's order (when the least size is not proven, or the order is not
    asked for): the first, then alternatives by integer cuts."""
    size = len(sol.uphill)
    result.ordered = False
    count = {v: 1.0 for v in problem.u_vars}
    for k in range(max(1, alternatives)):
        if k > 0:
            problem.set_objective(count, "min")
            try:
                sol = problem.solve("minimal uphill set", accept_best=True)
            except InfeasibleProblem:
                result.exhausted = True
                checks.append(f"no further set of {size}: {problem.solver_name} proved it")
                break
            if len(sol.uphill) > size:
                result.exhausted = True
                checks.append(f"no further set of {size}: the next best has {len(sol.uphill)}")
                break
        record(result, problem, sorted(sol.uphill), sol)
        if k + 1 < alternatives:
            cut_off(problem, sorted(sol.uphill), f"tfa_cut_{k}")
    result.count = len(result.sets)
    checks.append("sets in the order the solver found them")


def count_words(count: int, complete: bool) -> str:
    """The number of minimal sets in words.

    >>> count_words(1, True), count_words(4, True), count_words(20, False)
    ('the only set of this size', '4 sets of this size', 'at least 20 sets of this size')
    """
    if complete and count == 1:
        return "the only set of this size"
    return f"{'' if complete else 'at least '}{count} set{'' if count == 1 else 's'} of this size"
