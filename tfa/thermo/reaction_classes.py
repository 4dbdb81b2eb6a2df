"""Reaction classes and their typical ΔrG'°: the sanity check of group-contribution estimates.

A group-contribution estimate can be far off for one molecule (σ near 10 kJ/mol, and worse for
groups seen in few training species), and a reaction between two estimated compounds can then
come out with the wrong sign for its chemistry. The reactions of a class share their chemistry
and lie close together: reductions of a carbonyl group by NAD(P)H, phosphorylation of an
alcohol by ATP, hydrolysis of a phosphate ester, transamination with glutamate. The typical
range of a class is the range of ΔrG'° of its member reactions computed from the library
(species data and reconciled literature values, :class:`tfa.thermo.library.ReactionLibrary`) at
25 °C, pH 7, I = 0.25 M, no Mg2+.

An estimated reaction of a class whose ΔrG'° at those conditions lies more than
:data:`CLASS_SIGMAS` of its own σ outside the range is flagged, and its σ is widened to
√(σ² + d²), d being its distance from the range, so that the class range lies within about one
widened σ (:func:`check_estimate`). The value itself is kept (the estimate may be right for a
reason the class does not know, e.g. the alkyl shift of ketol-acid reductoisomerase); the flag
tells the user which number to verify.

A class is recognised by stoichiometry alone, over compound ids of the thermodynamic database
(:func:`classify`): one compound consumed and one produced besides the class's fixed partners,
H+ and water. That is a pattern, not a mechanism: threonine synthase (O-phosphohomoserine +
H2O -> threonine + phosphate) has the pattern of a phosphate-ester hydrolysis.

Units: kJ/mol.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Mapping

from ..conditions import Conditions

#: Conditions at which classes and estimates are compared.
REFERENCE = Conditions.from_celsius(25.0, ph=7.0, ionic_strength=0.25)
#: An estimate further than this many of its σ outside its class's range is flagged.
CLASS_SIGMAS = 3.0
#: Compound ids that are never the "substrate" of a class.
_PARTNERS = {"H+", "H2O"}


@dataclass(frozen=True)
class ReactionClass:
    """A class of reactions: its fixed partners (compound id -> coefficient) and the member
    reactions (equations over library compounds) that give its typical range."""

    name: str
    partners: tuple[tuple[str, float], ...]
    members: tuple[str, ...]
    alternatives: tuple[tuple[tuple[str, float], ...], ...] = ()

    def partner_sets(self):
        return (dict(self.partners),) + tuple(dict(a) for a in self.alternatives)


CLASSES: tuple[ReactionClass, ...] = (
    ReactionClass(
        "reduction of a carbonyl group by NAD(P)H",
        (("NADH", -1.0), ("NAD", 1.0)),
        ("pyruvate + NADH <=> lactate + NAD",
         "oxaloacetate + NADH <=> malate + NAD",
         "acetaldehyde + NADH <=> ethanol + NAD",
         "propanal + NADH <=> 1-propanol + NAD",
         "butanal + NADH <=> 1-butanol + NAD",
         "dihydroxyacetone phosphate + NADH <=> glycerol 3-phosphate + NAD"),
        ((("NADPH", -1.0), ("NADP", 1.0)),)),
    ReactionClass(
        "phosphorylation of an alcohol by ATP",
        (("ATP", -1.0), ("ADP", 1.0)),
        ("glucose + ATP <=> glucose 6-phosphate + ADP",
         "fructose 6-phosphate + ATP <=> fructose 1,6-bisphosphate + ADP",
         "adenosine + ATP <=> AMP + ADP",
         "glycerol + ATP <=> glycerol 3-phosphate + ADP")),
    ReactionClass(
        "hydrolysis of a phosphate ester",
        (("H2O", -1.0), ("phosphate", 1.0)),
        ("glucose 6-phosphate + H2O <=> glucose + phosphate",
         "glucose 1-phosphate + H2O <=> glucose + phosphate",
         "glycerol 3-phosphate + H2O <=> glycerol + phosphate",
         "AMP + H2O <=> adenosine + phosphate")),
    ReactionClass(
        "transamination with glutamate",
        (("glutamate", -1.0), ("2-oxoglutarate", 1.0)),
        ("glutamate + pyruvate <=> 2-oxoglutarate + alanine",
         "glutamate + oxaloacetate <=> 2-oxoglutarate + aspartate"),
        ((("glutamate", 1.0), ("2-oxoglutarate", -1.0)),)),
)


def classify(stoichiometry: Mapping[str, float]) -> ReactionClass | None:
    """The class of a reaction over database compound ids, or None.

    The reaction (either direction) must hold the class's partners with their coefficients and,
    besides them, H+ and water, exactly one compound consumed and one produced, each once.

    >>> classify({"NADPH": -1, "NADP": 1, "H+": -1, "estimated:alac": -1, "estimated:dhiv": 1}).name
    'reduction of a carbonyl group by NAD(P)H'
    >>> classify({"ATP": -1, "ADP": 1, "H+": 1, "x": -1, "y": 1}).name
    'phosphorylation of an alcohol by ATP'
    >>> classify({"NADH": -1, "NAD": 1, "x": -1, "CO2": -1, "y": 1}) is None
    True
    """
    for direction in (1.0, -1.0):
        net = {k: direction * float(v) for k, v in stoichiometry.items() if abs(float(v)) > 1e-12}
        for cls in CLASSES:
            for partners in cls.partner_sets():
                if any(abs(net.get(k, 0.0) - v) > 1e-9 for k, v in partners.items()):
                    continue
                rest = {k: v for k, v in net.items() if k not in partners and k not in _PARTNERS}
                if sorted(rest.values()) == [-1.0, 1.0]:
                    return cls
    return None


@dataclass(frozen=True)
class ClassRange:
    """Typical ΔrG'° of a class at :data:`REFERENCE`: its members' values, kJ/mol."""

    name: str
    low: float
    high: float
    members: tuple[tuple[str, float], ...]

    def distance(self, value: float) -> float:
        """How far ``value`` lies outside [low, high] (0 inside), kJ/mol."""
        return max(self.low - value, value - self.high, 0.0)


@lru_cache(maxsize=4)
def class_range(name: str, include_unreviewed: bool = False) -> ClassRange:
    """The typical range of the class called ``name`` from the bundled library (cached).

    Examples
    --------
    >>> r = class_range("reduction of a carbonyl group by NAD(P)H")
    >>> -32 < r.low < r.high < -10
    True
    """
    from .library import ReactionLibrary

    cls = next(c for c in CLASSES if c.name == name)
    library = ReactionLibrary.load(include_unreviewed)
    values = []
    for equation in cls.members:
        result = library.reaction_energy(equation, REFERENCE)
        values.append((equation, result.standard))
    numbers = [v for _, v in values]
    return ClassRange(name, min(numbers), max(numbers), tuple(values))


@dataclass(frozen=True)
class ClassCheck:
    """The outcome of :func:`check_estimate`: the class, the estimate at :data:`REFERENCE`,
    its distance from the class range, whether it is flagged and the σ to use."""

    name: str
    value: float
    distance: float
    flagged: bool
    sigma: float
    message: str


def check_estimate(stoichiometry: Mapping[str, float], value_at_reference: float,
                   sigma: float, label: str = "", include_unreviewed: bool = False
                   ) -> ClassCheck | None:
    """Check an estimated reaction against its class (None when it has none).

    Parameters
    ----------
    stoichiometry : mapping
        Database compound id -> coefficient.
    value_at_reference : float
        Its estimated ΔrG'° at :data:`REFERENCE`, kJ/mol.
    sigma : float
        Its standard uncertainty, kJ/mol.

    Examples
    --------
    A reduction of a 2-oxo acid by NADPH estimated at +26 ± 12 kJ/mol lies about 45 kJ/mol above
    the range of the class (lactate, malate, ethanol and alcohol dehydrogenases, about −30 to
    −19 kJ/mol): flagged and σ widened to about 46 kJ/mol.

    >>> c = check_estimate({"NADPH": -1, "NADP": 1, "H+": -1, "a": -1, "b": 1}, 26.0, 12.0)
    >>> c.flagged, 40 < c.distance < 50, 40 < c.sigma < 55
    (True, True, True)
    """
    cls = classify(stoichiometry)
    if cls is None:
        return None
    rng = class_range(cls.name, include_unreviewed)
    d = rng.distance(value_at_reference)
    flagged = d > CLASS_SIGMAS * sigma
    widened = math.hypot(sigma, d) if flagged else sigma
    where = f"{label}: " if label else ""
    text = (f"{where}estimate {value_at_reference:+.1f} kJ/mol at 25 degC, pH 7, I = 0.25 M, where "
            f"the {cls.name} lies between {rng.low:.1f} and {rng.high:.1f} kJ/mol (library)")
    if flagged:
        text = (f"class check: {text}; {d:.1f} kJ/mol outside, more than {CLASS_SIGMAS:g} sigma: "
                f"sigma widened from {sigma:.1f} to {widened:.1f} kJ/mol")
    else:
        text = f"class check passed: {text}"
    return ClassCheck(cls.name, value_at_reference, d, flagged, widened, text)
