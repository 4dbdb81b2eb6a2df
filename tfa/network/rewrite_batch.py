"""The machinery every rewrite of a network shares: what a rewrite did (:class:`RewriteSummary`),
a ``with model:`` context that restores every order exactly (:func:`exact_context`), the note a
rewritten reaction carries (:func:`note_rewrite`), and the batch that applies a rewrite's changes
at once (:class:`RewriteBatch`: new terms and removals set on the cobra objects, then the
solver's problem built once from the rewritten network; the problem from before is put back on
exit).
"""

from __future__ import annotations

import contextlib
from collections import defaultdict
from dataclasses import dataclass, field
from functools import partial
from typing import Iterator

import cobra
import pandas as pd
from cobra.util.context import get_context
from cobra.util.solver import linear_reaction_coefficients
from optlang.symbolics import Zero

#: Coefficients smaller than this are taken as zero.
TOLERANCE = 1e-9

@dataclass
class RewriteSummary:
    """What a rewrite did.

    Attributes
    ----------
    mode : str
        The mode (an id of :data:`tfa.modes.MODES`) or the rewrite that made this summary.
    rewritten : dict
        Reaction id -> what was done to it (the text also stored in its ``notes['rewritten']``).
    removed : list
        Ids of reactions removed from the model (inside the context).
    blocked : list
        Ids of reactions whose bounds were set to (0, 0).
    removed_metabolites : list
        Ids of compounds removed from the model.
    """

    mode: str
    rewritten: dict[str, str] = field(default_factory=dict)
    removed: list[str] = field(default_factory=list)
    blocked: list[str] = field(default_factory=list)
    removed_metabolites: list[str] = field(default_factory=list)

    def to_frame(self) -> pd.DataFrame:
        """One row per touched reaction: ``reaction``, ``action`` (rewritten/removed/blocked), ``detail``."""
        rows = []
        for rid, text in self.rewritten.items():
            action = "removed" if rid in self.removed else "blocked" if rid in self.blocked else "rewritten"
            rows.append({"reaction": rid, "action": action, "detail": text})
        return pd.DataFrame(rows, columns=["reaction", "action", "detail"])


# --------------------------------------------------------------------------------------------
# exact undo


def _restore_order(model: cobra.Model, reaction_ids: list[str], metabolite_ids: list[str],
                   term_order: dict[str, list[str]]) -> None:
    """Put reactions, metabolites and each reaction's terms back in their saved order."""
    rpos = {rid: i for i, rid in enumerate(reaction_ids)}
    model.reactions.sort(key=lambda r: rpos.get(r.id, len(rpos)))
    mpos = {mid: i for i, mid in enumerate(metabolite_ids)}
    model.metabolites.sort(key=lambda m: mpos.get(m.id, len(mpos)))
    for rid, order in term_order.items():
        if rid not in model.reactions:
            continue
        reaction = model.reactions.get_by_id(rid)
        current = reaction._metabolites  # noqa: SLF001 - reorder only, same keys and values
        if [m.id for m in current] != order and {m.id for m in current} == set(order):
            by_id = {m.id: m for m in current}
            reaction._metabolites = {by_id[mid]: current[by_id[mid]] for mid in order}  # noqa: SLF001


@contextlib.contextmanager
def exact_context(model: cobra.Model) -> Iterator:
    """``with model:`` plus restoring of every order, registered first so it runs last."""
    with model:
        context = get_context(model)
        context(partial(_restore_order, model, [r.id for r in model.reactions],
                        [m.id for m in model.metabolites],
                        {r.id: [m.id for m in r._metabolites] for r in model.reactions}))  # noqa: SLF001
        yield context


def note_rewrite(context, reaction: cobra.Reaction, text: str, summary: RewriteSummary) -> None:
    """Record ``text`` in ``notes['rewritten']`` (undone with the context) and in the summary."""
    old = reaction.notes
    new = dict(old)
    new["rewritten"] = f"{old['rewritten']}; {text}" if old.get("rewritten") else text
    context(partial(setattr, reaction, "notes", old))
    reaction.notes = new
    summary.rewritten[reaction.id] = text


def _replace_contents(items, members: list) -> None:
    """Set the members of a cobra DictList in one pass (its index rebuilt once)."""
    list.clear(items)
    list.extend(items, members)
    items._generate_index()


def _write_terms(terms: dict) -> None:
    """Give each reaction its terms (reaction -> {metabolite: coefficient}) on the cobra objects,
    keeping every metabolite's set of reactions in step (no solver change)."""
    for reaction, new in terms.items():
        for met in reaction._metabolites:  # noqa: SLF001
            if met not in new:
                met._reaction.discard(reaction)  # noqa: SLF001
        for met in new:
            met._reaction.add(reaction)  # noqa: SLF001
        reaction._metabolites = dict(new)  # noqa: SLF001


class RewriteBatch:
    """The changes of one rewrite, applied at once by :meth:`apply` (see the module text).

    ``terms``: reaction -> its new terms; ``removed``: reactions to take out; ``gone``: compounds
    to take out (after their reactions and terms are gone). Bounds are set through cobra as
    usual before :meth:`apply` (one variable each, no row rewritten).
    """

    def __init__(self, model: cobra.Model, context) -> None:
        self.model = model
        self.context = context
        self.terms: dict[cobra.Reaction, dict[cobra.Metabolite, float]] = {}
        self.removed: list[cobra.Reaction] = []
        self.gone: list[cobra.Metabolite] = []

    def set_terms(self, reaction: cobra.Reaction, new: dict[cobra.Metabolite, float]) -> None:
        self.terms[reaction] = {m: c for m, c in new.items() if abs(c) > TOLERANCE}

    def apply(self) -> None:
        model, context = self.model, self.context
        if not (self.terms or self.removed or self.gone):
            return
        old_solver = model.solver
        plain = (len(old_solver.variables) == 2 * len(model.reactions)
                 and len(old_solver.constraints) == len(model.metabolites))
        objective = {r.id: c for r, c in linear_reaction_coefficients(model).items()}
        direction = old_solver.objective.direction
        # the cobra objects
        before = {r: dict(r._metabolites) for r in self.terms}  # noqa: SLF001
        _write_terms(self.terms)
        context(partial(_write_terms, before))
        removed = set(self.removed)
        if removed:
            reactions = list(model.reactions)
            for r in self.removed:
                r._model = None  # noqa: SLF001
                for met in r._metabolites:  # noqa: SLF001
                    met._reaction.discard(r)  # noqa: SLF001
            _replace_contents(model.reactions, [r for r in reactions if r not in removed])
            context(partial(self._put_back_reactions, reactions, list(self.removed)))
        gone = set(self.gone)
        if gone:
            metabolites = list(model.metabolites)
            for met in self.gone:
                met._model = None  # noqa: SLF001
            _replace_contents(model.metabolites, [m for m in metabolites if m not in gone])
            context(partial(self._put_back_metabolites, metabolites, list(self.gone)))
        if not plain:
            # the solver carries more than the network (another problem's rows and columns):
            # change it in place, one call per row, and take out the removed columns and rows
            self._change_in_place(old_solver, before, removed, gone)
            return
        model._solver = _solver_of(model, old_solver, objective, direction)  # noqa: SLF001
        context(partial(setattr, model, "_solver", old_solver))

    def _put_back_reactions(self, reactions: list, removed: list) -> None:
        for r in removed:
            r._model = self.model  # noqa: SLF001
            for met in r._metabolites:  # noqa: SLF001
                met._reaction.add(r)  # noqa: SLF001
        _replace_contents(self.model.reactions, reactions)

    def _put_back_metabolites(self, metabolites: list, gone: list) -> None:
        for met in gone:
            met._model = self.model  # noqa: SLF001
        _replace_contents(self.model.metabolites, metabolites)

    def _change_in_place(self, solver, before: dict, removed: set, gone: set) -> None:
        rows = _row_changes(self.terms, before)
        undo = _row_changes(before, self.terms)
        _set_row_coefficients(solver, rows)
        self.context(partial(_set_row_coefficients, solver, undo))
        columns = [solver.variables[name] for r in removed for name in (r.id, r.reverse_id)]
        constraints = [solver.constraints[m.id] for m in gone if m.id in solver.constraints]
        if columns or constraints:
            bounds = [(v.name, v.lb, v.ub) for v in columns]
            terms = {r: dict(r._metabolites) for r in removed}  # noqa: SLF001
            solver.remove(constraints + columns)
            self.context(partial(_restore_rows_and_columns, solver, constraints, columns, bounds,
                                 terms))


def _row_changes(target: dict, current: dict) -> dict:
    """Per compound row: {column name: coefficient} turning ``current`` terms into ``target``."""
    rows: dict[str, dict[str, float]] = defaultdict(dict)
    for reaction, new in target.items():
        old = current.get(reaction, {})
        for met in set(old) | set(new):
            c = new.get(met, 0.0)
            if met in new and met in old and old[met] == c:
                continue
            rows[met.id][reaction.id] = c
            rows[met.id][reaction.reverse_id] = -c
    return rows


def _set_row_coefficients(solver, rows: dict) -> None:
    """One call per row."""
    solver.update()
    for row, coefficients in rows.items():
        if row in solver.constraints:
            solver.constraints[row].set_linear_coefficients(
                {solver.variables[name]: c for name, c in coefficients.items()
                 if name in solver.variables})


def _restore_rows_and_columns(solver, constraints: list, columns: list, bounds: list,
                              terms: dict) -> None:
    solver.add(columns)
    solver.add(constraints, sloppy=True)
    for name, lb, ub in bounds:
        solver.variables[name].set_bounds(lb, ub)
    _set_row_coefficients(solver, _row_changes(terms, {}))


def _solver_of(model: cobra.Model, template, objective: dict[str, float], direction: str):
    """A new solver problem of the network as it now is, with ``template``'s interface and
    configuration: a column pair per reaction (cobra's forward and reverse variables, same
    names), a row per compound (steady state), each row set in one call; the objective from
    ``objective`` (reaction id -> coefficient)."""
    interface = template.interface
    solver = interface.Model()
    solver.configuration = interface.Configuration.clone(template.configuration, problem=solver)
    columns = {}
    for r in model.reactions:
        lb, ub = r.lower_bound, r.upper_bound
        columns[r.id] = interface.Variable(r.id, lb=max(lb, 0.0), ub=max(ub, 0.0))
        columns[r.reverse_id] = interface.Variable(r.reverse_id, lb=max(-ub, 0.0), ub=max(-lb, 0.0))
    solver.add(list(columns.values()))
    rows = [interface.Constraint(Zero, name=m.id, lb=0, ub=0) for m in model.metabolites]
    solver.add(rows, sloppy=True)
    solver.update()
    terms: dict[str, dict] = defaultdict(dict)
    for r in model.reactions:
        forward, reverse = columns[r.id], columns[r.reverse_id]
        for met, c in r._metabolites.items():  # noqa: SLF001
            terms[met.id][forward] = c
            terms[met.id][reverse] = -c
    for row in rows:
        if terms.get(row.name):
            row.set_linear_coefficients(terms[row.name])
    solver.objective = interface.Objective(Zero, direction=direction, sloppy=True)
    coefficients = {}
    for r in model.reactions:
        if objective.get(r.id):
            coefficients[columns[r.id]] = objective[r.id]
            coefficients[columns[r.reverse_id]] = -objective[r.id]
    if coefficients:
        solver.objective.set_linear_coefficients(coefficients)
    solver.update()
    return solver
