"""The sections of a report that do not depend on the analyses: the environment, the data
sources, the conventions and their limits, and the cautions."""

from __future__ import annotations

import logging
from typing import Any, Iterable, Mapping

import pandas as pd

from ..errors import InputError
from .html import ReportSection

logger = logging.getLogger(__name__)

CAUTIONS_TEXT = """\
H2, H2S and CO are hazardous gases: H2 is flammable and forms explosive mixtures with air; \
H2S and CO are highly toxic, and H2S is also flammable. CO2 and NH3 are hazardous at high \
concentration.

The results in this report are model calculations about the thermodynamics of a reaction \
network. They are not safety guidance and not instructions for any experiment. For any work \
with these gases or with hot, pressurised fluids, defer to local rules and to qualified \
practice."""

CONVENTIONS_TEXT = """\
Units: energies in kJ/mol, temperature in kelvin inside the program (degrees Celsius only in \
the input and in this report), concentrations of solutes in mol/L, gases as partial pressure \
in bar. Water has activity 1; H+ is fixed by the pH and never a variable.

- Transformed energies at fixed pH and ionic strength follow the Legendre transform of \
Alberty (2003); activity coefficients of charged species come from the extended \
Debye-Hueckel equation (B = 1.6 kg^1/2 mol^-1/2), trustworthy up to an ionic strength of \
about 0.25-0.5 mol/L.
- Species energies are carried from 25 degC with a constant heat capacity (within about \
0.5 kJ/mol per reaction of the HKF equations of state at 80 degC; several kJ/mol above \
150 degC); where the heat capacity is missing, a constant reaction enthalpy is used and \
flagged. Pressure enters through a constant standard molar volume.
- Reaction energy at the solution: ΔrG' = ΔrG'° + RT Σ νᵢ ln aᵢ. Carriers without \
species data enter through their reduction potential, ΔG = -nFE. Reactions without species \
data use a cited literature value or an estimate with its uncertainty; none is set to zero \
silently.
- A steady state is feasible when mass balance holds and every reaction carrying flux runs \
downhill (ΔrG' < 0) within the concentration bounds (thermodynamics-based flux analysis, \
Henry et al. 2007); the driving force is the max-min driving force of Noor et al. (2014).
- Every solution reported was re-checked without the solver: mass balance, bounds, \
recomputed energies and the sign of each energy against its flux.

Limits: thermodynamics says what may run, not how fast: kinetics, catalysts and transport are \
not modelled. Metal-ion binding is ignored unless a pMg is given; complexation with other \
ions, non-ideal gases and mineral surfaces are not modelled. Estimated and unreviewed data \
carry larger uncertainties; see the data coverage and data sources."""



def environment_section(conditions: Any, feed: Mapping[str, float] | None = None,
                        bounds: pd.DataFrame | Mapping[str, tuple[float, float]] | None = None,
                        name: str = "", text: str = "") -> ReportSection:
    """The environment: conditions, fed compounds and concentration bounds.

    Parameters
    ----------
    conditions : Conditions or mapping
        A :class:`tfa.conditions.Conditions` (its ``describe()`` and ``to_dict()`` are used) or a
        mapping of name to value.
    feed : mapping, optional
        Compound -> fixed concentration (mol/L; gases bar).
    bounds : DataFrame or mapping, optional
        Concentration bounds: a table, or compound -> (lower, upper) in mol/L (gases bar).
    name : str
        Name of the environment.
    text : str
        Extra words placed before the tables.
    """
    rows: list[dict[str, Any]] = []
    if hasattr(conditions, "to_dict"):
        described = conditions.describe() if hasattr(conditions, "describe") else ""
        items = conditions.to_dict().items()
    else:
        described = ""
        items = dict(conditions).items()
    for key, value in items:
        rows.append({"quantity": "condition", "name": key, "value": value, "upper": None})
    for compound, value in (feed or {}).items():
        rows.append({"quantity": "feed (fixed)", "name": compound, "value": value, "upper": None})
    if isinstance(bounds, pd.DataFrame):
        bound_table = bounds
    else:
        for compound, (low, high) in (bounds or {}).items():
            rows.append({"quantity": "bounds", "name": compound, "value": low, "upper": high})
        bound_table = None
    words = f"Environment {name}: {described}." if name or described else ""
    words = (words + "\n\n" + text).strip() if text else words
    words += ("\n\nFeed values are fixed concentrations (mol/L; gases: partial pressure, bar); "
              "bounds give the lowest (value) and highest (upper) concentration allowed.")
    table = pd.DataFrame(rows, columns=["quantity", "name", "value", "upper"])
    if bound_table is not None:
        words += " The bounds follow in the second table below."
    more = (("Concentration bounds", bound_table),) if bound_table is not None else ()
    return ReportSection("Environment", words.strip(), table, table_caption="Conditions and feed",
                         more_tables=more)


def sources_section(sources: pd.DataFrame, used_keys: Iterable[str] | None = None,
                    text: str = "") -> ReportSection:
    """Every data source: key, authors, year, citation, DOI, peer reviewed.

    Parameters
    ----------
    sources : DataFrame
        Columns ``key, authors, year, citation, doi, peer_reviewed`` (as in
        ``tfa/data/sources.csv``); other columns are kept.
    used_keys : iterable of str, optional
        When given, only these sources are listed (the ones the results rest on).
    text : str
        Words before the table.
    """
    required = ["key", "authors", "year", "citation", "doi", "peer_reviewed"]
    missing = [c for c in required if c not in sources.columns]
    if missing:
        raise InputError(f"data sources table lacks column(s) {', '.join(missing)}; "
                         f"expected {', '.join(required)}")
    table = sources
    if used_keys is not None:
        keys = set(used_keys)
        table = sources.loc[sources["key"].astype(str).isin(keys)]
        unknown = sorted(keys - set(sources["key"].astype(str)))
        if unknown:
            logger.warning("sources not in the sources table: %s", ", ".join(unknown))
    reviewed = table["peer_reviewed"].astype(str).str.lower().isin(["yes", "true", "1"])
    words = (f"{len(table)} sources; {int(reviewed.sum())} peer reviewed, "
             f"{int((~reviewed).sum())} not. DOIs are given as text; nothing in this file links "
             "outside it." + (f" {text}" if text else ""))
    return ReportSection("Data sources", words, table.reset_index(drop=True),
                         table_caption="Data sources")


def conventions_section(extra: str = "") -> ReportSection:
    """Conventions of the calculation and their limits (fixed text, plus ``extra``)."""
    return ReportSection("Conventions and their limits",
                         CONVENTIONS_TEXT + ("\n\n" + extra if extra else ""))


def cautions_section() -> ReportSection:
    """The cautions every report carries (hazardous gases; model results, not safety advice)."""
    return ReportSection("Cautions", CAUTIONS_TEXT)


# ---------------------------------------------------------------------------------------------
# the page
# ---------------------------------------------------------------------------------------------
