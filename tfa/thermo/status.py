"""Status of an energy: how far the numbers behind it were checked.

Every energy ``tfa`` reports (a formation energy, a reaction energy, a row of the coverage
table) carries one status word, the weakest of the data it is made of, in this order from
strongest to weakest:

- ``reviewed species data``: species data of a peer-reviewed source, used as published;
- ``cited reaction value``: a reaction-level value checked against its printed source;
- ``reconciled``: several cited reaction values combined (least squares, see
  :mod:`tfa.thermo.reconcile`);
- ``recalled value (from memory)``: a value recalled from its source but not checked against the
  printed table, or species data re-anchored to such a value, or a carrier potential recalled;
- ``common practice``: a rule of thumb or an analogy with a homologous reaction, no measurement
  of its own;
- ``estimated``: a group-contribution estimate;
- ``unreviewed``: species data of a source that is not peer reviewed.

A referee asks first for everything from ``recalled value`` down: :func:`needs_checking`.
"""

from __future__ import annotations

from typing import Iterable

REVIEWED = "reviewed species data"
CITED = "cited reaction value"
RECONCILED = "reconciled"
RECALLED = "recalled value (from memory)"
COMMON_PRACTICE = "common practice"
ESTIMATED = "estimated"
UNREVIEWED = "unreviewed"

#: Every status, strongest first.
STATUSES = (REVIEWED, CITED, RECONCILED, RECALLED, COMMON_PRACTICE, ESTIMATED, UNREVIEWED)
_RANK = {s: i for i, s in enumerate(STATUSES)}

#: Status of a reaction value by its basis (:data:`tfa.thermo.literature.BASES`).
BASIS_STATUS = {"checked": CITED, "from memory": RECALLED, "common practice": COMMON_PRACTICE}


def weakest(statuses: Iterable[str]) -> str:
    """The weakest of ``statuses`` (empty strings ignored; none given: reviewed species data).

    >>> weakest([REVIEWED, RECALLED, CITED])
    'recalled value (from memory)'
    >>> weakest([])
    'reviewed species data'
    """
    given = [s for s in statuses if s]
    for s in given:
        if s not in _RANK:
            raise ValueError(f"unknown status {s!r}; use one of {', '.join(STATUSES)}")
    return max(given, key=_RANK.__getitem__) if given else REVIEWED


def combined_value_status(bases: Iterable[str]) -> str:
    """Status of an energy made of reaction values with these bases: ``cited reaction value``
    for one checked value, ``reconciled`` for several, else the weakest basis.

    >>> combined_value_status(["checked"]), combined_value_status(["checked", "checked"])
    ('cited reaction value', 'reconciled')
    >>> combined_value_status(["checked", "from memory"])
    'recalled value (from memory)'
    """
    bases = list(bases)
    statuses = [BASIS_STATUS[b] for b in bases]
    status = weakest(statuses)
    if status == CITED and len(bases) > 1:
        return RECONCILED
    return status


def needs_checking(status: str) -> bool:
    """True for the statuses a user should verify before publishing (recalled and weaker).

    >>> needs_checking(RECALLED), needs_checking(RECONCILED)
    (True, False)
    """
    return _RANK[status] >= _RANK[RECALLED]
