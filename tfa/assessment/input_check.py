"""The one checker of a network and its setting: every check the analyses make on their inputs,
made before any of them runs, so that ``tfa inspect`` finds every input error ``tfa feasible``
and the other commands would find, with the same message.

The checks are the analyses' own code, not a copy of it: for every registered mode that applies
to the network (:meth:`RunContext.not_applicable`), the network is prepared as the analyses
prepare it (the mode's rewrites, the energies, the environment's feed, bounds, outlets and
demand: :meth:`RunContext.thermo_model`) and the optimisation problem is built on it (flux and
concentration bounds; nothing is solved). Reading the files (tables, SBML, the environment, the
identifiers table, ``--h2`` and ``--demand``) is checked by :func:`tfa.network.inputs.resolve_inputs`
before, the same way for every command.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..errors import InputError
from ..modes import MODES
from .context import RunContext, Settings


@dataclass
class InputCheck:
    """What the checker found: errors (exit code 2) and the modes that do not apply."""

    errors: list[str] = field(default_factory=list)
    not_applicable: dict[str, str] = field(default_factory=dict)


def check_inputs(inputs, options=None, modes: list[str] | None = None) -> InputCheck:
    """Run the analyses' checks on ``inputs`` for every mode (default: every registered mode),
    in the order the analyses meet them; collect every error rather than stop at the first.

    Parameters
    ----------
    inputs : Inputs
        From :func:`tfa.network.inputs.resolve_inputs`.
    options : ProblemOptions, optional
    modes : list of str, optional
    """
    from ..problem.builder import ProblemOptions, ThermoProblem

    options = options or ProblemOptions()
    ctx = RunContext(inputs, Settings(), options)
    check = InputCheck()
    for mode in modes or list(MODES):
        reason = ctx.not_applicable(mode)
        if reason:
            check.not_applicable[mode] = reason
            continue
        try:
            with ThermoProblem(ctx.thermo_model(mode), options):
                pass
        except InputError as err:
            if str(err) not in check.errors:
                check.errors.append(str(err))
    return check
