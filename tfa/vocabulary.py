"""The names `tfa` uses for quantities, table columns and command-line options, each defined once.

Every column of every table (CSV and JSON) and every key of ``summary.json`` is one of
:data:`COLUMNS`; a number carries its unit in its name (``..._kJ_per_mol``, ``..._mol_per_L``)
unless it is dimensionless. Text uses the symbols of :data:`SYMBOLS` (Unicode, with one ASCII
fallback). Options meaning the same thing have the same name and default in every command
(:data:`OPTIONS`, used by :mod:`tfa.cli.options`).

Activities: an ``activity`` is a concentration in mol/L divided by 1 mol/L for a solute, or a
partial pressure in bar divided by 1 bar for a gas (the standard states of the species data), so
it is dimensionless; the unit the user gave (mol/L or bar) is stated beside it where it matters
(``h2_unit``).

This module imports nothing of ``tfa`` and no third-party package.

Examples
--------
>>> symbol("delta_g_standard"), symbol("delta_g_standard", ascii_only=True)
("ΔrG'°", "dG'0")
>>> COLUMNS["delta_g_kJ_per_mol"].unit
'kJ/mol'
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Term:
    """One named quantity: its key (a column or JSON key), meaning and unit.

    ``unit`` is "" for dimensionless numbers, text and flags.
    """

    key: str
    meaning: str
    unit: str = ""


def _terms(*rows: tuple[str, str, str]) -> dict[str, Term]:
    return {key: Term(key, meaning, unit) for key, meaning, unit in rows}


#: Every column and JSON key of the outputs.
COLUMNS: dict[str, Term] = _terms(
    # identifiers and words
    ("mode", "the mode the network was asked to run in (tfa.modes)", ""),
    ("reaction", "reaction id", ""),
    ("compound", "compound (metabolite) id", ""),
    ("equation", "the reaction as written, by compound ids", ""),
    ("pathway", "pathway tag of the reaction", ""),
    ("step", "a step of the route (reaction id, '(reverse)' when run backwards)", ""),
    ("direction", "direction a reaction carries flux or is asked to run: forward, backward, none",
     ""),
    ("source", "kind of data an energy comes from: species, literature, reconciled, estimated, "
               "placeholder, none", ""),
    ("provenance", "plain words: which data, values and sources an energy rests on", ""),
    ("message", "the answer in plain words", ""),
    ("kind", "what a row describes", ""),
    ("error", "why a point could not be answered (empty when it was)", ""),
    ("status", "how far the numbers behind an energy were checked: reviewed species data, cited "
               "reaction value, reconciled, recalled value (from memory), common practice, "
               "estimated, unreviewed", ""),
    ("audit_flags", "open disagreements of the data audit that touch the energy", ""),
    ("item", "the datum to verify: a reaction value, a species, a carrier potential, an estimate",
     ""),
    ("value", "the number, in the unit of the column unit", ""),
    ("sigma", "its standard uncertainty, in the unit of the column unit", ""),
    ("unit", "unit of value and sigma", ""),
    ("citation", "the published source in full", ""),
    ("conditions", "temperature, pH, ionic strength, pMg of a measurement", ""),
    ("note", "remarks on the datum (where it comes from, why it was corrected)", ""),
    ("used_by", "reactions whose energy uses the datum, joined by ', '", ""),
    ("recalled_values", "numbers of a source used without checking its printed table", ""),
    ("set", "number of an alternative minimal uphill set (1 = the first found)", ""),
    ("verification", "how the answer was checked: certified (the point passed the independent "
                     "check), proven (a solver's proof confirmed by a second route, or an optimum "
                     "whose bound the solver proved), solver proof (not confirmed), best found "
                     "(a limit stopped the search), computed (no optimisation)", ""),
    ("checked_by", "the check behind the verification, in words", ""),
    ("uphill_set", "members of a minimal uphill set, joined by ', '", ""),
    ("in_order_of_ids", "whether the minimal uphill set(s) listed are the first in the order of "
                        "reaction ids (sorted ids compared one by one), each proven so; false: "
                        "in the order found (a time limit stopped a proof)", ""),
    ("h2_compound", "the network's H2 compound", ""),
    ("h2_unit", "unit the H2 supply is given in: mol/L (dissolved) or bar (gas)", ""),
    ("has_energy", "whether the reaction has a transformed standard energy", ""),
    ("in_deterministic_set", "whether the reaction is in the minimal uphill set of the mean "
                             "energies", ""),
    ("deterministic_feasible", "the answer with the mean energies", ""),
    ("draw", "index of a draw of the energies ('mean' for the unperturbed energies)", ""),
    # verdicts and counts
    ("feasible", "a steady state meets the demand with every reaction carrying flux downhill", ""),
    ("demand_impossible", "the demand cannot be met even ignoring thermodynamics", ""),
    ("uphill_set_size", "number of reactions in a minimal uphill set", ""),
    ("reactions", "number of reactions", ""),
    ("count", "number of draws in which it happened", ""),
    ("draws", "number of draws solved", ""),
    ("feasible_draws", "number of draws in which the network is feasible", ""),
    ("failed_draws", "number of draws that could not be solved", ""),
    ("never_feasible", "draws in which no H2 level in the range makes the network feasible", ""),
    ("frequency", "fraction of the draws in which it happened", ""),
    ("fraction", "fraction of the rows", ""),
    ("probability", "estimated probability that the network is feasible", ""),
    ("standard_error", "binomial standard error of the probability", ""),
    ("exergonic_standard", "reactions with ΔrG'° < 0", ""),
    ("exergonic_1mM", "reactions (or: the reaction) with ΔrG' < 0 at 1 mM of every reactant", ""),
    ("exergonic_at_ratio", "reactions with ΔrG' < 0 at the substrate:product ratio", ""),
    ("fraction_exergonic_standard", "fraction of reactions with ΔrG'° < 0", ""),
    ("fraction_exergonic_1mM", "fraction of reactions with ΔrG' < 0 at 1 mM", ""),
    ("fraction_exergonic_at_ratio", "fraction of reactions with ΔrG' < 0 at the ratio", ""),
    ("substrate_product_ratio", "ratio of every substrate to every product of the third "
                                "reference state", ""),
    # energies
    ("delta_g_standard_kJ_per_mol", "ΔrG'°, transformed standard reaction Gibbs energy at the "
                                    "setting's temperature, pH, ionic strength and pressure",
     "kJ/mol"),
    ("delta_g_kJ_per_mol", "ΔrG', transformed reaction Gibbs energy at the concentrations of a "
                           "solution", "kJ/mol"),
    ("delta_g_1mM_kJ_per_mol", "ΔrG' with every reactant at 1 mM (gases 1e-3 bar)", "kJ/mol"),
    ("delta_g_at_ratio_kJ_per_mol", "ΔrG' at the substrate:product ratio around 1 mM", "kJ/mol"),
    ("delta_g_min_kJ_per_mol", "least ΔrG' over the feasible steady states", "kJ/mol"),
    ("delta_g_max_kJ_per_mol", "largest ΔrG' over the feasible steady states", "kJ/mol"),
    ("cumulative_delta_g_kJ_per_mol", "running sum of ΔrG' along the route", "kJ/mol"),
    ("sigma_kJ_per_mol", "standard uncertainty of ΔrG'° (or of ΔfG'° in a table of compounds)",
     "kJ/mol"),
    ("formation_delta_g_standard_kJ_per_mol", "ΔfG'°, transformed standard formation energy of a "
                                              "compound at the setting", "kJ/mol"),
    ("delta_h_standard_kJ_per_mol", "ΔrH'°, transformed standard reaction enthalpy", "kJ/mol"),
    ("sigma_from_covariance_kJ_per_mol", "σ of ΔrG'° from the covariance of the draws", "kJ/mol"),
    ("shared_sigma_kJ_per_mol", "the part of σ shared with other reactions", "kJ/mol"),
    ("independent_sigma_kJ_per_mol", "the part of σ this reaction has alone", "kJ/mol"),
    ("driving_force_kJ_per_mol", "max-min driving force, or a reaction's -ΔrG' in its direction",
     "kJ/mol"),
    ("uphill_by_kJ_per_mol", "how far uphill a reaction runs in its direction (ΔrG' > 0) at the "
                             "concentrations that make its set's total smallest", "kJ/mol"),
    ("short_by_kJ_per_mol", "how far a member of an uphill set falls short of the least driving "
                            "force when it runs downhill by less than it", "kJ/mol"),
    # fluxes and activities
    ("flux", "net flux (forward minus backward), in the network's flux unit", "flux unit"),
    ("activity", "concentration over 1 mol/L, or partial pressure over 1 bar for a gas", ""),
    ("ln_activity", "natural logarithm of the activity", ""),
    ("activity_min", "least activity over the feasible steady states", ""),
    ("activity_max", "largest activity over the feasible steady states", ""),
    ("h2_activity", "H2 supply: dissolved H2 in mol/L, or H2 partial pressure in bar for a gas "
                    "feed (see h2_unit)", ""),
    ("ln_h2_activity", "natural logarithm of h2_activity", ""),
    ("h2_threshold", "least H2 supply at which the network is feasible (unit: h2_unit)", ""),
    ("ln_h2_threshold", "natural logarithm of h2_threshold", ""),
    ("h2_range_low", "lower end of the H2 range searched (unit: h2_unit)", ""),
    ("h2_range_high", "upper end of the H2 range searched (unit: h2_unit)", ""),
    ("h2_threshold_q05", "5 % quantile of the H2 threshold over the draws", ""),
    ("h2_threshold_q25", "25 % quantile of the H2 threshold over the draws", ""),
    ("h2_threshold_q50", "median of the H2 threshold over the draws", ""),
    ("h2_threshold_q75", "75 % quantile of the H2 threshold over the draws", ""),
    ("h2_threshold_q95", "95 % quantile of the H2 threshold over the draws", ""),
    # what binds, and the H2 answer as a window
    ("answer", "the answer a binding constraint belongs to: feasible, h2_threshold, "
               "h2_window_low, h2_window_high, driving_force", ""),
    ("rank", "order of a row within its answer (1 = the constraint named first)", ""),
    ("bound", "which bound of a compound: lower, upper, or fixed (a fed compound)", ""),
    ("sensitivity", "dual value of the linear program with the flux pattern fixed: change of the "
                    "answer per unit change of the constraint (unit in sensitivity_unit)", ""),
    ("sensitivity_unit", "unit of sensitivity: d ln[H2] per unit ln c, kJ/mol per unit ln c, "
                         "per kJ/mol ...", ""),
    ("sensitivity_left", "the same derivative by re-solving with the datum moved down by 1e-3",
     ""),
    ("sensitivity_right", "the same derivative by re-solving with the datum moved up by 1e-3",
     ""),
    ("dual_confirmed", "whether the dual value lies between the left and right derivatives", ""),
    ("check_step", "how far a top binding datum was moved for the full re-solve (its own unit: ln "
                   "of a concentration, or kJ/mol for the least driving force)", ""),
    ("predicted_ln_h2_change", "change of ln of the H2 answer the flux pattern of the optimum "
                               "predicts for check_step (sensitivity_left x check_step)", ""),
    ("measured_ln_h2_change", "change of ln of the H2 answer when the full problem (the H2 "
                              "threshold MILP) is solved again with the datum moved by "
                              "check_step", ""),
    ("h2_at_range_floor", "the network is feasible already at the bottom of the H2 range "
                          "searched (the true threshold, if any, lies lower)", ""),
    ("h2_partial_pressure_bar", "H2 partial pressure in equilibrium with the level (Henry's law "
                                "at the setting's temperature and pressure)", "bar"),
    ("h2_partial_pressure_Pa", "the same partial pressure in pascal", "Pa"),
    ("h2_mmol_per_kg", "dissolved H2 of the level, in mmol per kg of water", "mmol/kg"),
    ("h2_window", "number of a window of H2 levels at which the network is feasible (1 = lowest)",
     ""),
    ("window_end", "which end of an H2 window: low or high", ""),
    ("at_range_end", "the end lies at the end of the H2 range searched (the window may go on)",
     ""),
    ("found_by", "how the value was found: an MILP optimum, or bisection to a stated precision",
     ""),
    ("binding_constraint", "the constraint that sets the value, in words", ""),
    ("at_range_floor_draws", "draws whose H2 threshold lies at the bottom of the range searched",
     ""),
    # energy budget, carbon routes, energy profile (the steady state that ran)
    ("solution", "which steady state a row describes, in words", ""),
    ("net_reaction", "the net reaction over the internal reactions per unit of demand (one "
                     "turnover of the demand reaction): consumed → made", ""),
    ("delta_g_net_kJ_per_demand", "ΔrG' of the net reaction = Σ flux × ΔrG' / demand flux, at the "
                                  "solution's concentrations", "kJ per unit of demand"),
    ("feed_chemistry_kJ_per_demand", "the part of the net ΔrG' from converting the feed (H2, CO2, "
                                     "N, S, P) into the products: the net ΔrG' minus the gradient's",
     "kJ per unit of demand"),
    ("gradient_kJ_per_demand", "the part of the net ΔrG' from outer protons entering: protons in × "
                               "energy per proton", "kJ per unit of demand"),
    ("protons_in_per_demand", "outer protons (of a geochemical gradient) taken in",
     "mol per unit of demand"),
    ("energy_per_proton_kJ_per_mol", "free energy one outer proton releases on entering, "
                                     "-RT (ln10 pH + ln a_out) (membrane potential 0)", "kJ/mol"),
    ("atp_made_per_demand", "ATP made by the reactions that make it", "mol per unit of demand"),
    ("atp_spent_per_demand", "ATP used by the reactions that use it", "mol per unit of demand"),
    ("atp_synthesis_delta_g_kJ_per_mol", "ΔrG' of ADP + Pi → ATP + H2O at the solution's "
                                         "concentrations", "kJ/mol"),
    ("atp_energy_kJ_per_demand", "free energy stored in the ATP made: ATP made × ΔrG' of ATP "
                                 "synthesis", "kJ per unit of demand"),
    ("uphill_supplied_kJ_per_demand", "energy to supply to the steps that run uphill: Σ flux × ΔrG' "
                                      "over them / demand flux", "kJ per unit of demand"),
    ("downhill_dissipated_kJ_per_demand", "Σ flux × ΔrG' over the steps that run downhill / demand "
                                          "flux", "kJ per unit of demand"),
    ("h2_consumed_per_demand", "H2 taken in (net)", "mol per unit of demand"),
    ("carbon_taken_up_per_demand", "carbon atoms taken in from the feed (net)",
     "mol C per unit of demand"),
    ("h2_per_carbon", "H2 taken in per carbon atom taken in", ""),
    ("atp_per_h2", "ATP made per H2 taken in", ""),
    ("reactions_without_energy", "reactions carrying flux without an energy (left out of the sums), "
                                 "joined by ', '", ""),
    ("path", "number of a carbon path (1 = the widest, found first)", ""),
    ("source_compound", "the compound a carbon path starts from (taken from the feed)", ""),
    ("sink_compound", "the compound a carbon path ends in (demanded or exported)", ""),
    ("compounds", "the carbon compounds along a path, joined by ' → '", ""),
    ("steps", "the reactions along a path in the direction they run, joined by ', '", ""),
    ("fixation_step", "the reaction that takes a path's carbon from the feed, with its pathway tag",
     ""),
    ("pathway_tags", "the pathway tags along a path, joined by ' → '", ""),
    ("carbon_flux_per_demand", "carbon a path carries (or a cycle circulates)",
     "mol C per unit of demand"),
    ("carbon_share", "a path's part of the carbon taken from the feed", ""),
    ("compound_in", "the carbon compound a step of the path takes", ""),
    ("compound_out", "the carbon compound a step of the path makes", ""),
    ("near_equilibrium", "|ΔrG'| < RT ln 10: the backward flux is more than a tenth of the forward "
                         "(flux-force relation, Beard & Qian 2007)", ""),
    # conditions (map axes and summaries)
    # the setting's fluids
    ("vent_fraction", "share of vent fluid in a mixture with seawater (0: seawater, 1: vent fluid)", ""),
    ("dissolved_inorganic_carbon_mol_per_L", "dissolved inorganic carbon, CO2(aq) + HCO3- + CO3--",
     "mol/L"),
    ("h2_margin_decades", "log10 of the mixture's H2 over the H2 threshold (> 0: H2 to spare)", ""),
    ("temperature_C", "temperature", "degC"),
    ("temperature_K", "temperature", "K"),
    ("pH", "pH", ""),
    ("ionic_strength_mol_per_L", "ionic strength", "mol/L"),
    ("pressure_bar", "pressure", "bar"),
    ("pMg", "-log10 of the free Mg2+ activity", ""),
    # compound-space uncertainty, verdict margins, intervals, scenario draws
    ("margin_sigma", "least total change of the energies' sources (L1 norm, in units of each "
                     "source's σ) that flips the verdict", "σ"),
    ("margin_status", "how the margin was found: proven (exact minimum), best found (a verified "
                      "flip), or none within the cap", ""),
    ("carried_by", "the sources carrying most of the change, with their shares", ""),
    ("rounds", "linear programs of cuts the search of a margin took", ""),
    ("label", "a source of uncertainty in plain words", ""),
    ("deviation_sigma", "deviation of one source, in units of its σ", "σ"),
    ("share", "fraction of the total change carried by one source", ""),
    ("interval_low", "lower end of the Wilson score interval of the probability", ""),
    ("interval_high", "upper end of the Wilson score interval of the probability", ""),
    ("confidence", "confidence level of the intervals", ""),
    ("stopped_by", "why the draws stopped: the interval width reached, or the draw budget", ""),
    ("assumption", "an assumption of the setting drawn in a scenario run", ""),
    ("probability_held_central", "probability with this assumption held at its central value", ""),
    ("probability_change", "probability minus the probability with the assumption held central",
     ""),
    ("scenario", "what was drawn: energies, assumptions, or both", ""),
    # compartments, the proton-motive force, thresholds with and without the gradient
    ("compartment", "compartment id of a compound ('' or the cell's id: the cell, whose "
                    "conditions the environment's [conditions] give)", ""),
    ("gradient", "with or without the environment's gradient across the membrane (every "
                 "compartment's pH and membrane potential, or the cell's pH and 0 mV)", ""),
    ("gradient_scale", "fraction of the environment's gradient (ΔpH and Δψ of every compartment "
                       "scaled together; 0 none, 1 the environment's)", ""),
    ("delta_ph", "ΔpH = pH(cell) − pH(compartment)", ""),
    ("membrane_potential_mV", "Δψ = ψ(cell) − ψ(compartment); negative when the cell is negative "
                              "inside", "mV"),
    ("proton_inflow_kJ_per_mol", "ΔG of one H+ entering the cell from the compartment, "
                                 "−RT ln10 ΔpH + F Δψ (Mitchell 1961)", "kJ/mol"),
    ("proton_motive_force_mV", "Δp = Δψ − (RT ln10 / F) ΔpH; negative when it drives H+ in", "mV"),
    ("ions_in", "ions a reaction takes into the cell per turnover (negative: out)", ""),
    ("reduced_to_oxidised_max", "the highest reduced/oxidised ratio of a carrier that the "
                                "reaction can reach running downhill at the given H2", ""),
    ("carrier_potential_mV", "reduction potential E' of the carrier pair at that ratio", "mV"),
    ("needed_per_ion_kJ_per_mol", "energy each entering ion must bring for the reaction to reach "
                                  "the most reduced carrier state the bounds allow (0: none "
                                  "needed)", "kJ/mol"),
    ("standard_state", "what ΔrG'° refers to: every compound at 1 mol/L (gases 1 bar) at the "
                       "environment's pH; for a reaction across a membrane, each compound at its "
                       "compartment's pH and electric potential", ""),
)

# per-precursor verdicts; the order and count of minimal sets; the energy to supply
COLUMNS.update(_terms(
    ("flux_per_demand", "flux of a reaction over the flux of the demand reaction, at the steady "
                        "state of least energy to supply to the uphill steps", ""),
    ("energy_to_supply_kJ_per_mol_demand", "energy to supply to an uphill step per unit of demand: "
                                           "flux_per_demand times how far uphill it runs "
                                           "(ΔrG' in its direction); summed over a set, "
                                           "Σ flux × ΔrG' over the uphill steps per mol of demand",
     "kJ/mol"),
    ("sets_found", "minimal uphill sets of the least size found in all (listed and counted)", ""),
    ("all_sets_found", "whether every minimal uphill set of the least size was found (else "
                       "sets_found is a lower bound)", ""),
    ("demand_coefficient", "moles of the compound per mole of the demand reaction", ""),
    ("verdict", "the answer for a demanded compound: downhill (made with every step downhill), "
                "uphill (made only with the steps of a minimal uphill set driven), stoichiometric "
                "gap (cannot be made from the feed whatever the energies), not applicable, "
                "undetermined", ""),
    ("producible", "the compound can be made from the feed by the stoichiometry and flux bounds, "
                   "ignoring energies", ""),
    ("max_flux", "largest flux of the compound's own demand allowed by the stoichiometry and flux "
                 "bounds, ignoring energies", "flux unit"),
    ("energy_to_supply_total_kJ_per_mol_demand", "energy to supply to the steps of the first "
                                                 "minimal uphill set, per mol of demand", "kJ/mol"),
))
# fewest couplings, energy currencies, carbon-fixation routes
COLUMNS.update(_terms(
    ("precursor", "a compound of the demand asked alone ('(whole demand)' for the demand)", ""),
    ("coupling_role", "what an ATP-coupled step did: spends ATP (a coupling kept) or makes ATP "
                      "(energy conservation, not counted)", ""),
    ("bonds", "phosphoanhydride bonds the step spends per unit of flux in its direction "
              "(negative: it makes them)", ""),
    ("coupling_energy_kJ_per_mol", "ΔrG'° the ATP coupling adds to a step in its direction "
                                   "(ΔrG'° of the bare chemistry minus that of the coupled step)",
     "kJ/mol"),
    ("couplings_kept", "fewest ATP couplings kept (steps spending ATP) with every step downhill",
     ""),
    ("exhausted", "every optimal set is listed", ""),
    ("coupling_sets", "the optimal sets of kept couplings, sets separated by '; '", ""),
    ("currency", "what pays for the ATP-coupled steps: ATP, acetyl_phosphate, thioester, "
                 "pyrophosphate, polyphosphate, or none (ATP removed or bare chemistry)", ""),
    ("carriers", "electron carriers kept, or H2 in their place", ""),
    ("precursors_made", "precursors the mode makes alone with every step downhill, joined by ', '",
     ""),
    ("precursors_not_made", "precursors the mode cannot make alone with every step downhill", ""),
    ("route", "id of a carbon-fixation route (route file or pathway tag)", ""),
    ("name", "words for a route, as tables and figures show it", ""),
    ("closed_entries", "carbon-fixing reactions outside the route closed while it is asked", ""),
    ("routes_feasible", "per route, whether it meets the demand as the only carbon entry", ""),
    ("atp_made_per_carbon", "ATP made per carbon atom taken in from the feed (route comparison: "
                            "per carbon fixed)", ""),
    ("atp_spent_per_carbon", "ATP used per carbon atom taken in from the feed", ""),
    ("delta_g_net_kJ_per_carbon", "ΔrG' of the net reaction per carbon atom taken in from the feed",
     "kJ per mol C"),
    ("gradient_share", "share of the net reaction's ΔrG' paid by outer protons entering (the rest: "
                       "the feed chemistry)", ""),
    ("carbon_entries", "reactions taking carbon from the carbon source, each with its share of "
                       "that carbon, largest first", ""),
    ("route_carbon_share", "share of the carbon taken from the carbon source through the route's "
                           "own reactions (the rest: the shared entries)", ""),
    ("h2_threshold_binding", "the constraints that set the H2 threshold, first two, each with its "
                             "dual value and unit", ""),
    ("driving_force_binding", "the constraints that set the max-min driving force, first two, each "
                              "with its dual value and unit", ""),
))

#: Keys of ``summary.json`` besides table columns.
SUMMARY_KEYS: dict[str, Term] = _terms(
    ("network", "network id", ""),
    ("environment", "the setting in one line", ""),
    ("coverage", "reactions with an energy, estimated and missing", ""),
    ("uphill", "per mode, the minimal uphill sets found", ""),
    ("uphill_sets_found", "per mode, how many minimal uphill sets of the least size were found "
                          "(sets_found, all_sets_found), whether they are listed in the order of "
                          "reaction ids (in_order_of_ids) and the energy to supply to the first "
                          "(energy_to_supply_total_kJ_per_mol_demand)", ""),
    ("precursors", "per mode, the demanded compounds by verdict (downhill, uphill, stoichiometric "
                   "gap)", ""),
    ("bottlenecks", "reactions at the max-min driving force", ""),
    ("h2_range", "the H2 range searched, [low, high] (unit: h2_unit)", ""),
    ("robustness", "feasibility over the draws of the energies, per mode", ""),
    ("notes", "what could not be computed and why, relaxations made", ""),
    ("warnings", "conditions past a model's usual range (model-range warnings)", ""),
    ("undetermined", "answers a solver could not give within the time limit", ""),
    ("not_applicable", "per mode that cannot be asked of the network, why (a role it lacks)", ""),
    ("constrained", "per mode, reactions with an energy (with_energy) of the internal reactions "
                    "(reactions); the rest run without a thermodynamic constraint", ""),
    ("summary", "the answer in plain sentences", ""),
    ("timings_s", "seconds per step", "s"),
    ("steps", "the steps that ran, in order", ""),
    ("verifications", "per step (and mode): how each answer was checked, status and check", ""),
    ("h2_windows", "the feasible H2 window(s), [[low, high], ...] (unit: h2_unit)", ""),
    ("binding", "per mode and answer, the constraint named first (binding_constraints)", ""),
    ("route_driving_force_kJ_per_mol", "max-min driving force of the named route", "kJ/mol"),
    ("route_bottlenecks", "reactions at the named route's max-min driving force", ""),
    ("command", "the command that printed the JSON", ""),
    ("energy_budget", "per mode, the row of the energy_budget table", ""),
    ("carbon_fixation", "per mode, the share of the feed's carbon per fixation step", ""),
    ("profile_path", "the steps of the energy profile and what they follow", ""),
    ("tables", "every table of the answer: file stem -> rows", ""),
    ("verdict_margins", "per mode, the distance to a flipped verdict", ""),
)

#: Symbols used in text: key -> (Unicode, ASCII fallback).
SYMBOLS: dict[str, tuple[str, str]] = {
    "delta_g_standard": ("ΔrG'°", "dG'0"),
    "delta_g": ("ΔrG'", "dG'"),
    "formation_standard": ("ΔfG'°", "dfG'0"),
    "formation_species": ("ΔfG°", "dfG0"),
    "sigma": ("σ", "sigma"),
}


def symbol(key: str, ascii_only: bool = False) -> str:
    """The symbol of a quantity in text, in Unicode or its ASCII fallback."""
    unicode_text, ascii_text = SYMBOLS[key]
    return ascii_text if ascii_only else unicode_text


#: ASCII spellings of the other characters the text uses, after the symbols of SYMBOLS.
ASCII_CHARACTERS = {"°C": "degC", "°": "deg", "×": "x", "±": "+/-", "≈": "~", "≤": "<=",
                    "≥": ">=", "→": "->", "←": "<-", "⇌": "<=>", "−": "-", "–": "-", "—": "-",
                    "…": "...", "μ": "u", "µ": "u", "Δ": "d", "σ": "sigma", "·": "*", "²": "2",
                    "³": "3", "⁺": "+", "⁻": "-", "₂": "2", "’": "'", "“": '"', "”": '"'}


def ascii_text(text: str) -> str:
    """``text`` for a console that shows ASCII only: each symbol by its fallback of
    :data:`SYMBOLS` (:func:`symbol` with ``ascii_only``), the other known characters by
    :data:`ASCII_CHARACTERS`, anything else as ``?``.

    >>> ascii_text("ΔrG'° = -12.3 ± 0.5 kJ/mol at 70 °C, σ × 2")
    "dG'0 = -12.3 +/- 0.5 kJ/mol at 70 degC, sigma x 2"
    """
    if text.isascii():
        return text
    for key in sorted(SYMBOLS, key=lambda k: -len(SYMBOLS[k][0])):
        text = text.replace(symbol(key), symbol(key, ascii_only=True))
    for char, spelled in ASCII_CHARACTERS.items():
        text = text.replace(char, spelled)
    return text.encode("ascii", "replace").decode("ascii")


@dataclass(frozen=True)
class Option:
    """A command-line option shared by several commands: the same flag, metavar, default and
    help text wherever it appears."""

    flags: tuple[str, ...]
    help: str
    default: object = None
    metavar: str | None = None


#: H2 range searched by the threshold and spanned by the scan, mol/L (gas feed: bar): from 1 pM
#: (far below any natural setting) to 10 mM (above saturation at 1 bar H2 for most settings).
DEFAULT_H2_RANGE = (1e-12, 1e-2)
#: Levels of the H2 scan, log-spaced over the range (one per decade).
DEFAULT_H2_LEVELS = 11
#: Alternative minimal uphill sets asked for.
DEFAULT_ALTERNATIVES = 2

#: Options shared by several commands, by destination name.
OPTIONS: dict[str, Option] = {
    "modes": Option(("--modes",), "comma-separated modes the question is asked in, or 'all' "
                    "(native, h2_only, no_atp_strict, no_atp_bare; default %(default)s)", "all",
                    "LIST"),
    "mode": Option(("--mode",), "the mode of the single-mode analyses: H2 scan and threshold, "
                   "driving force, ranges, energy profile (default %(default)s)", "native", "MODE"),
    "route": Option(("--route",), "reactions of a route, in order, separated by commas (a leading "
                    "minus runs one backwards); default: the widest carbon path of the steady "
                    "state (the path that carries the most carbon)", None, "R1,R2,-R3"),
    "h2_range": Option(("--h2-range",), "H2 supply searched, LOW:HIGH (mol/L dissolved; bar for a "
                       "gas feed; default %(default)s)",
                       f"{DEFAULT_H2_RANGE[0]:g}:{DEFAULT_H2_RANGE[1]:g}", "LOW:HIGH"),
    "h2_levels": Option(("--h2-levels",), "levels of the H2 scan, log-spaced over --h2-range "
                        "(default %(default)s)", DEFAULT_H2_LEVELS, "N"),
    "alternatives": Option(("--alternatives",), "minimal uphill sets listed per mode, in the "
                           "order of reaction ids; they are counted further (default "
                           "%(default)s)", DEFAULT_ALTERNATIVES, "N"),
    "workers": Option(("--workers",), "worker processes for many independent solves (draws, map "
                      "points, ranges); 'auto': one per core (default %(default)s: in this process)",
                      "1", "N"),
    "out": Option(("--out",), "folder for the tables (CSV and JSON) and figures (default: write "
                  "no files)", None, "DIR"),
    "seed": Option(("--seed",), "seed of the draws of the energies (default %(default)s)", 0, "S"),
    "draws": Option(("--draws",), "draws of the energies per mode (default %(default)s)", 100, "N"),
    "interval_width": Option(("--interval-width",), "draw until every 95 %% Wilson interval of a "
                             "probability is at most W wide, or --draws are made (0: exactly "
                             "--draws; default %(default)s)", 0.1, "W"),
    "network_data": Option(("--network",), "a network (reactions table or folder, SBML or cobra "
                           "JSON) whose own data and compound names are used instead of the "
                           "library's (species data, its reaction_values.tsv, estimates)", None,
                           "PATH"),
    "h2": Option(("--h2",), "the network's H2 compound (metabolite id), when no compound has the "
                 "role h2 (default: the compound with that role, declared or inferred)", None, "ID"),
    "demand": Option(("--demand",), "the demand reaction (reaction id), over the environment's "
                     "(default: the environment's [demand]; without an environment, the model's "
                     "objective)", None, "ID"),
    # pH changes and the gradient
    "fixed_outer_ph": Option(("--fixed-outer-ph",), "keep the outer fluid's pH when the pH changes "
                             "(a pH axis, a mixing line), so the gradient ΔpH changes with it "
                             "(default: the outer pH moves with the pH, ΔpH kept)", False, None),
    "loose_cofactors": Option(("--loose-cofactors",), "ignore the environment's [cofactors] carrier "
                              "states (pool totals, ratios, phosphorylation floor): every carrier "
                              "form free within [bounds], the earlier behaviour", False, None),
    "identifiers": Option(("--identifiers",), "your table of identifiers (compound, thermo_key): "
                          "which compound of the thermodynamic data each metabolite is, over the "
                          "matches made from annotations (default: identifiers.tsv beside the "
                          "network)", None, "FILE"),
}
