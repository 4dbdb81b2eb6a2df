"""Correlated uncertainty of reaction energies (tfa.analyses.uncertainty).

References: the covariance of linear functions of correlated inputs, Cov(aᵀx, bᵀx) = aᵀ C b, is
the law of propagation of uncertainty of JCGM 100:2008 (GUM), section 5.2; hand-derived values
below follow it. The statistical checks compare sample moments of seeded draws with Σ (fixed
seed, so they cannot flake; the tolerance is five standard errors of the estimate).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tfa.analyses.uncertainty import (
    draw_energies,
    keyed_normals,
    energy_covariance,
    psd_factor,
    with_energies,
)
from tfa.errors import InputError
from tfa.network.thermo_model import ReactionEnergy


class Stub:
    """Just what the covariance reads: ``energies``."""

    def __init__(self, energies):
        self.energies = energies


def chain(sigma_a=1.0, sigma_b=2.0, sigma_c=3.0, extra=0.0):
    """A -> B (R1) and B -> C (R2); R3 = 2 A -> C + literature-only part of σ ``extra``."""
    sa, sb, sc = sigma_a, sigma_b, sigma_c
    return Stub({
        "R1": ReactionEnergy("R1", -10.0, math.hypot(sa, sb), "species", "", {"A": -1, "B": 1}),
        "R2": ReactionEnergy("R2", 3.0, math.hypot(sb, sc), "species", "", {"B": -1, "C": 1}),
        "R3": ReactionEnergy("R3", -7.0, math.sqrt(4 * sa ** 2 + sc ** 2 + extra ** 2), "literature", "",
                             {"A": -2, "C": 1}),
    }), {"A": sa, "B": sb, "C": sc}


def test_shared_compound_covariance_hand_derived():
    # GUM 5.2: Cov(R1, R2) = (+1)(-1) σ_B² = -4; Cov(R1, R3) = (-1)(-2) σ_A² = 2;
    # Cov(R2, R3) = (1)(1) σ_C² = 9; Var R3 = 4 σ_A² + σ_C² + 1.5² = 4 + 9 + 2.25.
    model, sig = chain(extra=1.5)
    cov = energy_covariance(model, sig)
    assert cov.reaction_ids == ["R1", "R2", "R3"]
    expected = np.array([[5.0, -4.0, 2.0], [-4.0, 13.0, 9.0], [2.0, 9.0, 15.25]])
    np.testing.assert_allclose(cov.covariance, expected, atol=1e-12)
    np.testing.assert_allclose(cov.independent_sigma, [0.0, 0.0, 1.5], atol=1e-7)
    # the diagonal is each reaction's stated σ²
    np.testing.assert_allclose(np.sqrt(np.diag(cov.covariance)), cov.sigma, rtol=1e-12)
    assert cov.correlation()[0, 1] == pytest.approx(-4 / math.sqrt(65))


def test_without_compound_sigmas_reactions_are_independent():
    model, _ = chain()
    cov = energy_covariance(model, {})
    np.testing.assert_allclose(cov.covariance, np.diag(cov.sigma ** 2), atol=1e-12)


def test_covariance_is_positive_semidefinite():
    rng = np.random.default_rng(3)
    compounds = [f"C{i}" for i in range(12)]
    sig = {c: float(s) for c, s in zip(compounds, rng.uniform(0.1, 3.0, 12))}
    energies = {}
    for j in range(30):  # more reactions than compounds: Σ is rank deficient
        terms = {c: float(rng.integers(-2, 3)) for c in rng.choice(compounds, 3, replace=False)}
        var = sum((n * sig[c]) ** 2 for c, n in terms.items()) + (0.5 if j % 4 == 0 else 0.0)
        energies[f"R{j}"] = ReactionEnergy(f"R{j}", float(rng.normal(0, 20)), math.sqrt(var), "species", "", terms)
    cov = energy_covariance(Stub(energies), sig)
    values = np.linalg.eigvalsh(cov.covariance)
    assert values.min() > -1e-9 * values.max()
    assert values.min() < 1e-6  # rank deficient indeed, so the guard matters
    f = psd_factor(cov.covariance)
    np.testing.assert_allclose(f @ f.T, cov.covariance, atol=1e-8)


def test_psd_guard_refuses_an_indefinite_matrix():
    with pytest.raises(InputError, match="positive semi-definite"):
        psd_factor(np.array([[1.0, 2.0], [2.0, 1.0]]))


def test_zero_sigma_draws_equal_the_mean_exactly():
    model, _ = chain(0.0, 0.0, 0.0)
    ids, draws = draw_energies(model, 5, seed=11)
    mean = np.array([model.energies[r].standard for r in ids])
    assert np.array_equal(draws, np.tile(mean, (5, 1)))


def test_draws_reproduce_the_covariance_and_are_order_independent():
    model, sig = chain(extra=1.5)
    cov = energy_covariance(model, sig)
    ids, draws = draw_energies(cov, 3000, seed=2024)
    sample = np.cov(draws, rowvar=False)
    # standard error of a sample covariance: sqrt((Σ_ii Σ_jj + Σ_ij²) / n)
    c = cov.covariance
    se = np.sqrt((np.outer(np.diag(c), np.diag(c)) + c ** 2) / len(draws))
    assert np.all(np.abs(sample - c) < 5 * se)
    np.testing.assert_allclose(draws.mean(axis=0), cov.mean, atol=5 * np.sqrt(np.diag(c) / len(draws)).max())
    # draw 7 alone equals row 7 of the batch, and other seeds differ
    _, one = draw_energies(cov, 1, seed=2024, start=7)
    assert np.array_equal(one[0], draws[7])
    assert np.array_equal(cov.draw(2024, 7), draws[7])
    assert not np.array_equal(draw_energies(cov, 1, seed=2025, start=7)[1][0], draws[7])


def test_keyed_normals_are_children_of_the_spawned_draw():
    from tfa.analyses.uncertainty import _name_key

    for i in range(3):
        child = np.random.SeedSequence(5).spawn(3)[i]
        expected = np.random.default_rng(np.random.SeedSequence(5, spawn_key=child.spawn_key + (_name_key("B"),)))
        assert keyed_normals(5, i, ["A", "B"])[1] == expected.standard_normal()
    with pytest.raises(InputError, match="seed"):
        keyed_normals(-1, 0, ["A"])


def test_a_compound_has_the_same_error_in_every_mode():
    # a "mode" that adds a reaction over B must not change the draws of R1 and R2
    model, sig = chain()
    extended = Stub(dict(model.energies, R4=ReactionEnergy("R4", 1.0, 2.0, "species", "", {"B": 1})))
    one = energy_covariance(model, sig, reaction_ids=["R1", "R2"]).draw(9, 4)
    two = energy_covariance(extended, sig, reaction_ids=["R1", "R2", "R4"]).draw(9, 4)
    np.testing.assert_allclose(one, two[:2], rtol=0, atol=1e-12)
    # and R4's draw moves with B's error: R4 - ḡ4 = σ_B z_B = R1 - ḡ1 - σ_A z_A
    z = keyed_normals(9, 4, ["A", "B"])
    assert two[2] - 1.0 == pytest.approx(2.0 * z[1])
    assert one[0] + 10.0 == pytest.approx(-1.0 * z[0] + 2.0 * z[1])


def test_with_energies_replaces_values_and_keeps_the_rest():
    model, _ = chain()

    from tfa.conditions import Conditions
    from tfa.network.thermo_model import ThermoModel

    tm = ThermoModel(model=None, conditions=Conditions(), energies=model.energies, log_bounds={})
    new = with_energies(tm, {"R1": -12.5}, uncertainty=0.0)
    assert new.energies["R1"].standard == -12.5 and new.energies["R2"].standard == 3.0
    assert all(e.uncertainty == 0.0 for e in new.energies.values())
    assert tm.energies["R1"].standard == -10.0  # the original is untouched
    with pytest.raises(InputError, match="no energy"):
        with_energies(tm, {"R9": 1.0})
