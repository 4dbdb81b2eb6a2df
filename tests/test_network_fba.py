"""Plain flux balance on the bundled network in the bundled environment :
the native network makes the precursor set from the feed alone, and cannot when H2 or CO2 is
withheld. Mass balance only (no thermodynamics): a necessary condition the bundled network must
meet before any energy is asked of it. Flux balance as defined by J. D. Orth, I. Thiele and
B. O. Palsson, Nat. Biotechnol. 28 (2010) 245-248 (steady state S v = 0 within flux bounds).
"""

from __future__ import annotations

import math

import pytest

from tfa.errors import NetworkFileError
from tfa.network import bundled_environment, is_boundary_reaction, load_bundled_network, native
from tfa.network.bundled import bundled_folder
from tfa.network.roles import metabolite_role


def _bundled_ready() -> bool:
    try:
        folder = bundled_folder()
    except NetworkFileError:
        return False
    return all((folder / name).is_file() for name in ("reactions.tsv", "compounds.tsv", "environment.toml"))


pytestmark = pytest.mark.skipif(
    not _bundled_ready(),
    reason="models/ancestral_core/ (reactions.tsv, compounds.tsv, environment.toml) not written yet",
)


@pytest.fixture(scope="module")
def bundled():
    return load_bundled_network(), bundled_environment()


def _feed_key(env, model, thermo_key: str) -> str:
    """The feed key of the environment that names the compound with this thermo key."""
    for key in env.feed:
        met = env.resolve(model, key)
        if (met.notes or {}).get("thermo_key", "").lower() == thermo_key.lower() or key.lower() == thermo_key.lower():
            return key
    raise AssertionError(f"{thermo_key} is not fed in {env.name}")


def _max_demand(model, env) -> tuple[float, dict]:
    with model:
        with native(model):
            env.apply_exchange_bounds(model)
            model.objective = env.demand_reaction
            value = model.slim_optimize(error_value=math.nan)
            if math.isnan(value):
                return math.nan, {}
            solution = model.optimize()
            return solution.objective_value, solution.fluxes.to_dict()


def test_native_network_makes_precursors_from_feed_alone(bundled):
    model, env = bundled
    value, fluxes = _max_demand(model, env)
    assert value >= env.demand_flux > 0
    fed = set(env.feed_metabolites(model))
    free = fed | {m.id for m in model.metabolites if metabolite_role(m) in ("water", "proton")}
    for reaction in model.reactions:
        if is_boundary_reaction(reaction) and len(reaction.metabolites) == 1:
            met, coefficient = next(iter(reaction.metabolites.items()))
            uptake = fluxes[reaction.id] * coefficient > 1e-9     # flux adds the compound to the cell
            assert not uptake or met.id in free, f"{reaction.id} takes up {met.id}, which is not fed"


@pytest.mark.parametrize("withheld", ["H2", "CO2"])
def test_no_precursors_without_h2_or_co2(bundled, withheld):
    import dataclasses

    model, env = bundled
    if withheld == "CO2":      # carbon comes as the [fluid] total (dissolved inorganic carbon)
        fluid = {k: v for k, v in env.fluid.items() if k != "dissolved_inorganic_carbon"}
        starved = dataclasses.replace(env, fluid=fluid)
    else:
        starved = env.without_feed(_feed_key(env, model, withheld))
    value, _ = _max_demand(model, starved)
    assert math.isnan(value) or value < starved.demand_flux
