"""Carrier states: the ``[cofactors]`` section of an environment.

A researcher constrains the carrier pools of a cell the way they are measured: per-form bounds,
the total of a pool (NAD+ + NADH, NADP+ + NADPH, ferredoxin, adenylates, CoA), bounds on the
ratio of two forms (NADPH/NADP+) and a floor on the phosphorylation potential (the Gibbs energy
of ATP synthesis at the cell's concentrations). All of them act on x = ln c (c in mol/L):

- **ratio** ``a/b`` in [r_lo, r_hi]:  ln r_lo <= x_a - x_b <= ln r_hi (exactly linear);
- **phosphorylation potential** ΔG_p = ΔrG'°(ADP + Pi -> ATP + H2O) + RT (x_ATP - x_ADP - x_Pi)
  >= floor (exactly linear; Thauer, Jungermann & Decker 1977, Bacteriol. Rev. 41:100, use
  ΔG_p of about 60-70 kJ/mol in growing cells; 45 kJ/mol is the low end, from memory);
- **pool total** sum_i c_i <= T: sum_i exp(x_i) is convex in x, so the allowed set is convex but
  not a polytope. It is represented piecewise-linearly in log space (:func:`pool_rows`):

  * ``inner`` (default): each exp(x_i) is bounded from above by its chords between breakpoints
    (the chords of a convex function lie above it), s_i >= chord_k(x_i) for every k and
    sum_i s_i <= T. Every point that meets the rows meets the true total (conservative; the
    certificate checks the true sum). The chords are at most :data:`CHORD_RELATIVE_ERROR` above
    exp(x) in the part of the range that matters (above 1e-3 T; below it one chord, at most
    1e-3 T above), so a pool may reach a total about 1 % below T at worst.
  * ``outer``: tangents at the same breakpoints (below exp(x)) relax the total by at most the
    same share: a point may exceed T by that share, and an infeasible answer then holds for the
    true total too (a bracket with ``inner``).

  A floor on the total, sum_i c_i >= L (``least``), is not convex in log space; it enters as
  one linear row, the tangent plane of ln sum exp at reference shares w of the forms
  (``shares``): sum_i w_i x_i >= ln L + sum_i w_i ln w_i (:func:`floor_row`). By the weighted
  inequality of arithmetic and geometric means every point meeting it meets the floor
  (conservative); it is exact where the forms stand in the shares w.

File format (every key optional)::

    [cofactors]
    pool_approximation = "inner"                        # or "outer"
    phosphorylation_potential_min_kJ_per_mol = 45.0
    [cofactors.bounds]                                  # per form, mol/L; override [bounds]
    atp = [5.0e-4, 1.0e-2]
    [cofactors.pools]                                   # total of each pool, mol/L
    NAD = { forms = ["nad", "nadh"], total = 1.0e-3, least = 5.0e-4, shares = [0.97, 0.03] }
    [cofactors.ratios]                                  # "form/form" = [lowest, highest]
    "nadph/nadp" = [1.0, 1000.0]

The old behaviour (every carrier form free between the ``[bounds]``, no pool, ratio or floor) is
an explicit choice: ``--loose-cofactors`` on the command line, ``Environment.with_loose_cofactors``
in Python.
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field
from typing import Any

from ..errors import NetworkFileError

logger = logging.getLogger(__name__)

#: Keys of the ``[cofactors]`` section.
COFACTOR_KEYS = ("pool_approximation", "phosphorylation_potential_min_kJ_per_mol", "bounds",
                 "pools", "ratios")
POOL_APPROXIMATIONS = ("inner", "outer")
#: Largest relative gap between exp(x) and its chord (inner) or tangent (outer) over one segment
#: of the pool rows: for a segment of width h in ln c the chord lies at most about h^2/8 above
#: exp (Taylor expansion); h = 0.25 gives 0.8 %.
CHORD_RELATIVE_ERROR = 0.008
#: Width of a segment in ln c, from CHORD_RELATIVE_ERROR (h^2/8 = 0.008).
SEGMENT_WIDTH = 0.25
#: Below this share of the total a form is negligible: one chord covers the range beneath it
#: (the chord lies at most this share of the total above exp there, 0.1 % of the pool).
NEGLIGIBLE_SHARE = 1e-3
#: The reaction whose energy the phosphorylation potential is: thermo keys and coefficients.
PHOSPHORYLATION = {"ADP": -1.0, "phosphate": -1.0, "ATP": 1.0, "H2O": 1.0}


@dataclass(frozen=True)
class Pool:
    """A carrier pool: its forms (compound keys of the network), their largest total (mol/L),
    and optionally their least total (mol/L) with the reference shares of the forms at which
    the floor is exact (see :func:`floor_row`)."""

    name: str
    forms: tuple[str, ...]
    total: float
    least: float | None = None
    shares: tuple[float, ...] = ()


@dataclass(frozen=True)
class RatioBound:
    """Bounds on the ratio numerator/denominator of two forms (dimensionless)."""

    numerator: str
    denominator: str
    lowest: float
    highest: float

    @property
    def name(self) -> str:
        return f"{self.numerator}/{self.denominator}"


@dataclass(frozen=True)
class CofactorStates:
    """The ``[cofactors]`` section, as read (compound keys not yet resolved in a network).

    Attributes
    ----------
    bounds : dict
        Compound key -> (lower, upper) concentration, mol/L; override ``[bounds]``.
    pools : tuple of Pool
    ratios : tuple of RatioBound
    phosphorylation_floor : float or None
        Least ΔG of ATP synthesis (ADP + Pi -> ATP + H2O) at the cell's concentrations, kJ/mol.
    pool_approximation : str
        "inner" or "outer" (see the module docstring).
    """

    bounds: dict[str, tuple[float, float]] = field(default_factory=dict)
    pools: tuple[Pool, ...] = ()
    ratios: tuple[RatioBound, ...] = ()
    phosphorylation_floor: float | None = None
    pool_approximation: str = "inner"

    @classmethod
    def from_dict(cls, data: dict[str, Any], where: str, pair, positive, real) -> "CofactorStates":
        """Read the section; ``pair``, ``positive`` and ``real`` are the environment's number
        gates (so every number passes the one gate)."""
        for key in data:
            if key not in COFACTOR_KEYS:
                import difflib
                close = difflib.get_close_matches(key, COFACTOR_KEYS, n=1)
                hint = f"did you mean '{close[0]}'? " if close else ""
                raise NetworkFileError(f"{where}: unknown key '{key}' in [cofactors]; {hint}allowed: "
                                       f"{', '.join(COFACTOR_KEYS)}")
        approximation = data.get("pool_approximation", "inner")
        if approximation not in POOL_APPROXIMATIONS:
            raise NetworkFileError(f"{where} [cofactors] pool_approximation: {approximation!r}; give "
                                   f"one of {', '.join(POOL_APPROXIMATIONS)}")
        floor = None
        if "phosphorylation_potential_min_kJ_per_mol" in data:
            floor = real(where, "cofactors", "phosphorylation_potential_min_kJ_per_mol",
                         data["phosphorylation_potential_min_kJ_per_mol"], minimum=0.0, maximum=200.0)
        bounds_section = data.get("bounds", {})
        if not isinstance(bounds_section, dict):
            raise NetworkFileError(f"{where} [cofactors.bounds]: give a table of compound = [lower, upper]")
        bounds = {key: pair(where, key, value) for key, value in bounds_section.items()}
        pools = []
        pools_section = data.get("pools", {})
        if not isinstance(pools_section, dict):
            raise NetworkFileError(f"{where} [cofactors.pools]: give a table of NAME = {{ forms = "
                                   "[...], total = ... }}")
        for name, spec in pools_section.items():
            if (not isinstance(spec, dict) or not {"forms", "total"} <= set(spec)
                    or not set(spec) <= {"forms", "total", "least", "shares"}
                    or ("least" in spec) != ("shares" in spec)):
                raise NetworkFileError(f"{where} [cofactors.pools] {name}: write {name} = {{ forms = "
                                       "[\"nad\", \"nadh\"], total = 1.0e-3 }} (mol/L), optionally with "
                                       "least = 5.0e-4 and shares = [0.97, 0.03] (the floor and the "
                                       "reference shares of the forms)")
            forms = spec["forms"]
            if (not isinstance(forms, list) or len(forms) < 2
                    or not all(isinstance(f, str) and f for f in forms) or len(set(forms)) != len(forms)):
                raise NetworkFileError(f"{where} [cofactors.pools] {name}: forms must list two or more "
                                       "different compound ids, e.g. [\"nad\", \"nadh\"]")
            total = positive(where, "cofactors.pools", name, spec["total"])
            least, shares = None, ()
            if "least" in spec:
                least = positive(where, "cofactors.pools", f"{name} least", spec["least"])
                raw = spec["shares"]
                if not isinstance(raw, list) or len(raw) != len(forms):
                    raise NetworkFileError(f"{where} [cofactors.pools] {name}: shares must give one "
                                           f"number per form ({len(forms)})")
                shares = tuple(positive(where, "cofactors.pools", f"{name} shares", v) for v in raw)
                if least > total:
                    raise NetworkFileError(f"{where} [cofactors.pools] {name}: least {least:g} is above "
                                           f"total {total:g}")
            pools.append(Pool(name, tuple(forms), total, least, shares))
        ratios = []
        ratios_section = data.get("ratios", {})
        if not isinstance(ratios_section, dict):
            raise NetworkFileError(f"{where} [cofactors.ratios]: give a table of \"a/b\" = [lowest, highest]")
        for key, value in ratios_section.items():
            numerator, slash, denominator = key.partition("/")
            if not slash or not numerator.strip() or not denominator.strip() or "/" in denominator:
                raise NetworkFileError(f"{where} [cofactors.ratios] {key}: name the ratio as "
                                       "\"numerator/denominator\" with two compound ids, e.g. "
                                       "\"nadph/nadp\" = [1.0, 1000.0]")
            lowest, highest = pair(where, key, value)
            ratios.append(RatioBound(numerator.strip(), denominator.strip(), lowest, highest))
        return cls(bounds, tuple(pools), tuple(ratios), floor, approximation)

    def keys(self) -> list[tuple[str, str]]:
        """(table, compound key) of every compound the section names, for network checks."""
        out = [("cofactors.bounds", k) for k in self.bounds]
        out += [("cofactors.pools", f) for p in self.pools for f in p.forms]
        out += [("cofactors.ratios", k) for r in self.ratios for k in (r.numerator, r.denominator)]
        return out


@dataclass(frozen=True)
class LogLinearBound:
    """lower <= sum_i a_i ln c_i <= upper (c in mol/L), a linear row in the problem.

    ``text`` says in words what it is (for reports and certificates)."""

    name: str
    coefficients: dict[str, float]
    lower: float | None
    upper: float | None
    text: str


@dataclass(frozen=True)
class PoolTotal:
    """sum_i c_i <= total (mol/L) over the forms (metabolite ids), approximated as ``method``."""

    name: str
    forms: tuple[str, ...]
    total: float
    method: str
    text: str


def resolved_constraints(states: CofactorStates, resolve, phosphorylation_standard=None
                         ) -> tuple[list[LogLinearBound], list[PoolTotal]]:
    """The section's constraints on metabolite ids.

    Parameters
    ----------
    resolve : callable
        Compound key -> metabolite id, or None when the network (as rewritten for a mode) lacks it.
    phosphorylation_standard : callable or None
        () -> (ΔrG'° of ADP + Pi -> ATP + H2O at the setting in kJ/mol, RT in kJ/mol, ids of
        ATP, ADP, phosphate), or None when the network lacks one of them.
    """
    rows: list[LogLinearBound] = []
    for ratio in states.ratios:
        a, b = resolve(ratio.numerator), resolve(ratio.denominator)
        if a is None or b is None:
            logger.info("ratio %s left out: not in this network", ratio.name)
            continue
        rows.append(LogLinearBound(f"ratio {ratio.name}", {a: 1.0, b: -1.0}, math.log(ratio.lowest),
                                   math.log(ratio.highest),
                                   f"{ratio.name} between {ratio.lowest:g} and {ratio.highest:g}"))
    if states.phosphorylation_floor is not None and phosphorylation_standard is not None:
        found = phosphorylation_standard()
        if found is not None:
            standard, rt, (atp, adp, pi) = found
            rows.append(LogLinearBound(
                "phosphorylation potential", {atp: 1.0, adp: -1.0, pi: -1.0},
                (states.phosphorylation_floor - standard) / rt, None,
                f"ΔG of ATP synthesis >= {states.phosphorylation_floor:g} kJ/mol "
                f"(ΔrG'° = {standard:.1f} kJ/mol at the setting + RT ln([ATP]/[ADP][Pi]))"))
    pools: list[PoolTotal] = []
    for pool in states.pools:
        resolved = [resolve(f) for f in pool.forms]
        forms = tuple(m for m in resolved if m is not None)
        if pool.least is not None and all(m is not None for m in resolved):
            rows.append(floor_row(pool, forms))
        elif pool.least is not None:
            logger.info("floor of pool %s left out: not every form is in this network", pool.name)
        if not forms:
            continue
        pools.append(PoolTotal(f"pool {pool.name}", forms, pool.total, states.pool_approximation,
                               f"{' + '.join(pool.forms)} <= {pool.total:g} mol/L"))
    return rows, pools


def floor_row(pool: Pool, forms: tuple[str, ...]) -> LogLinearBound:
    """The floor sum_i c_i >= L of a pool as one linear row in ln c: the tangent plane of
    ln sum_i exp(x_i) at the reference shares w (normalised),

        sum_i w_i x_i >= ln L + sum_i w_i ln w_i,

    i.e. prod_i (c_i / w_i)^w_i >= L. By the weighted inequality of arithmetic and geometric
    means, sum_i c_i = sum_i w_i (c_i / w_i) >= prod_i (c_i / w_i)^w_i, so every point that meets
    the row meets the floor (conservative, an inner approximation; a floor is not convex in ln c,
    so no polytope holds it exactly); it is exact when the forms stand in the reference shares and
    stricter the farther they are from them.

    >>> row = floor_row(Pool("NAD", ("nad", "nadh"), 1e-3, 5e-4, (0.97, 0.03)), ("nad", "nadh"))
    >>> x = {"nad": math.log(0.97 * 5e-4), "nadh": math.log(0.03 * 5e-4)}    # on the floor, at w
    >>> round(sum(a * x[m] for m, a in row.coefficients.items()) - row.lower, 12)
    0.0
    """
    weights = [w / sum(pool.shares) for w in pool.shares]
    lower = math.log(pool.least) + sum(w * math.log(w) for w in weights)
    shares = ":".join(f"{w:.3g}" for w in weights)
    return LogLinearBound(f"floor of pool {pool.name}", dict(zip(forms, weights)), lower, None,
                          f"{' + '.join(pool.forms)} >= {pool.least:g} mol/L (tangent in ln c at "
                          f"shares {shares}: conservative)")


def breakpoints(lower: float, upper: float, total: float) -> list[float]:
    """Breakpoints in ln c over [lower, upper] for the rows of one form of a pool with ``total``.

    One segment covers the range below ``NEGLIGIBLE_SHARE * total``; above it the segments are at
    most :data:`SEGMENT_WIDTH` wide.

    >>> [round(p, 3) for p in breakpoints(math.log(1e-6), math.log(1e-3), 1e-3)][:3]
    [-13.816, -13.569, -13.322]
    >>> len(breakpoints(math.log(1e-9), math.log(1e-3), 1e-3))
    30
    """
    if upper <= lower:
        return [lower]
    start = max(lower, math.log(NEGLIGIBLE_SHARE * total))
    start = min(start, upper)
    count = max(1, math.ceil((upper - start) / SEGMENT_WIDTH - 1e-9))
    points = [start + (upper - start) * k / count for k in range(count + 1)]
    if lower < start:
        points = [lower] + points
    return points


def pool_rows(lower: float, upper: float, total: float, method: str) -> list[tuple[float, float]]:
    """Linear pieces (slope, intercept) with s >= (slope x + intercept) / total for every piece,
    s being the form's share of the total (s = c / total when tight).

    ``inner``: chords of exp between consecutive breakpoints (above exp: conservative);
    ``outer``: tangents of exp at the breakpoints (below exp: a relaxation).

    Equation: chord through (p, e^p), (q, e^q): slope (e^q - e^p)/(q - p); tangent at p: slope
    e^p, intercept e^p (1 - p). Hand check: from 1 mM to 2 mM (ln 2 = 0.69, three segments of
    0.23) the chords bound exp from above with a gap of at most h^2/8 = 0.0067 (0.48 % at 1.5 mM),
    the tangents from below:

    >>> pieces = pool_rows(math.log(1e-3), math.log(2e-3), 1.0, "inner")
    >>> len(pieces), round(max(s * math.log(1.5e-3) + b for s, b in pieces) / 1.5e-3 - 1, 4)
    (3, 0.0048)
    >>> pieces = pool_rows(math.log(1e-3), math.log(2e-3), 1.0, "outer")
    >>> round(max(s * math.log(1.5e-3) + b for s, b in pieces) / 1.5e-3 - 1, 4)
    -0.0017
    """
    points = breakpoints(lower, upper, total)
    pieces = []
    if method == "outer":
        for p in points:
            pieces.append((math.exp(p) / total, math.exp(p) * (1.0 - p) / total))
        return pieces
    if len(points) == 1:
        return [(0.0, math.exp(points[0]) / total)]
    for p, q in zip(points, points[1:]):
        slope = (math.exp(q) - math.exp(p)) / (q - p)
        pieces.append((slope / total, (math.exp(p) - slope * p) / total))
    return pieces
