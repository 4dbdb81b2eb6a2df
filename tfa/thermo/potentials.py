"""Electron carriers without species data (ferredoxin and the like), entered through their
reduction potential.

A couple is written as the half reaction

    ox + n e⁻ + m H⁺ → red

with electrons on the standard-hydrogen-electrode scale and H⁺ fixed by the pH (transformed
ΔfG'°(H⁺) = 0), so that

.. math::

    \\Delta_f G'^\\circ(\\mathrm{red}) - \\Delta_f G'^\\circ(\\mathrm{ox}) = -nF E'^\\circ

(Alberty 2003, eq. 8.2-4; Thauer et al. 1977, appendix). The oxidised form is given the reference
value ΔfG'°(ox) = 0. That choice is arbitrary but harmless: the carrier's pseudo-element (``Fd``,
``Fz``, ``Rd``, ``Hds``) must balance in every reaction, so the oxidised and reduced forms always
appear with opposite coefficients and the reference cancels. A reaction that does not conserve the
pair does not balance and is refused.

The potential is tabulated at one pH; at another pH it moves by −(m/n)(RT ln 10/F) per pH unit
(Clark 1960; Alberty 2003, eq. 8.2-9). No ionic-strength dependence is applied.

Temperature (the assumption, stated in every result away from 25 °C): E'° is held at its table
value, because no temperature dependence of these protein or cofactor potentials is known to
us for the carriers of the table. Reported temperature coefficients of biological one- and
two-electron carriers (ferredoxins, rubredoxins, cytochromes) lie between about 0 and −2 mV/K
(from memory), so the held value's standard uncertainty grows with the distance from the table
temperature, σ(T) = √(σ² + (k |T − T_table|)²) with k = :data:`TEMPERATURE_SIGMA_V_PER_K`
(1 mV/K, common practice chosen here): ±45 mV at 70 °C, about 8.7 kJ/mol for a two-electron
couple. (The H+/H2 couple itself is species data and moves with temperature: about −90 mV
between 25 °C at pH 7 and 70 °C at pH 7.5.)

Units: E in V, F in kJ/(mol V), energies in kJ/mol.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003, chapter 8.
[2] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180.
[3] R. K. Thauer, A.-K. Kaster, H. Seedorf, W. Buckel, R. Hedderich, Nat. Rev. Microbiol. 6 (2008)
    579-591.
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from pathlib import Path

from ..constants import FARADAY, LN10, R
from ..errors import InputError

#: Carriers' potentials are held fixed beyond this distance from their table temperature, K.
TEMPERATURE_TOLERANCE_K = 1.0
#: Growth of the standard uncertainty of a held potential with |T − T_table|, V/K (common
#: practice chosen here; reported coefficients lie between about 0 and −2 mV/K, from memory).
TEMPERATURE_SIGMA_V_PER_K = 1.0e-3

_COLUMNS = ("id", "name", "synonyms", "oxidised", "oxidised_synonyms", "oxidised_formula",
            "reduced", "reduced_synonyms", "reduced_formula", "n_electrons", "n_protons",
            "e0_prime_V", "sigma_V", "ph", "temperature_C", "source_key", "note")


@dataclass(frozen=True)
class CarrierCouple:
    """One redox couple of a carrier without species data (a row of ``potentials.csv``)."""

    id: str
    name: str
    synonyms: tuple[str, ...]
    oxidised: str
    oxidised_synonyms: tuple[str, ...]
    oxidised_formula: str
    reduced: str
    reduced_synonyms: tuple[str, ...]
    reduced_formula: str
    n_electrons: int
    n_protons: int
    e0_prime: float
    sigma: float
    ph: float
    temperature_C: float
    source: str
    note: str

    def potential(self, ph: float, temperature: float) -> float:
        """E'° in V at ``ph`` and ``temperature`` (K).

        Equation: E'°(pH) = E'°(pH_table) − (m/n)(RT ln10/F)(pH − pH_table); the value at the
        table pH is held at every temperature (no dependence known).

        Examples
        --------
        A couple taking one H+ per electron moves by −59.2 mV per pH unit at 25 °C (Clark 1960):

        >>> c = CarrierCouple("x", "x", (), "a", (), "X", "b", (), "XH", 1, 1, -0.1, 0.01, 7.0, 25.0, "", "")
        >>> round(1000 * (c.potential(8.0, 298.15) - c.potential(7.0, 298.15)), 1)
        -59.2
        """
        slope = (self.n_protons / self.n_electrons) * R * temperature * LN10 / FARADAY
        return self.e0_prime - slope * (ph - self.ph)

    def reduced_minus_oxidised(self, ph: float, temperature: float) -> float:
        """ΔfG'°(red) − ΔfG'°(ox) = −nF E'°, kJ/mol.

        Examples
        --------
        Ferredoxin at −420 mV per two electrons (Thauer et al. 1977; from memory): +81.05 kJ/mol.

        >>> c = CarrierCouple("fd", "fd", (), "Fd_ox", (), "Fd", "Fd_red", (), "Fd-2", 2, 0,
        ...                   -0.420, 0.03, 7.0, 25.0, "TJD77", "")
        >>> round(c.reduced_minus_oxidised(7.0, 298.15), 2)
        81.05
        """
        return -self.n_electrons * FARADAY * self.potential(ph, temperature)

    def potential_sigma(self, temperature: float | None = None) -> float:
        """Standard uncertainty of E'° at ``temperature`` (K; None: the table temperature), V.

        Equation: σ(T) = √(σ² + (k |T − T_table|)²), k = 1 mV/K (module docstring).

        Examples
        --------
        Ferredoxin, σ = 30 mV at 25 °C (common practice: the spread of −400 to −450 mV among
        ferredoxins), at 70 °C: √(30² + 45²) = 54.1 mV.

        >>> c = CarrierCouple("fd", "fd", (), "Fd_ox", (), "Fd", "Fd_red", (), "Fd-2", 2, 0,
        ...                   -0.420, 0.030, 7.0, 25.0, "TJD77", "")
        >>> round(1000 * c.potential_sigma(343.15), 1)
        54.1
        """
        if temperature is None:
            return self.sigma
        drift = TEMPERATURE_SIGMA_V_PER_K * abs(temperature - (self.temperature_C + 273.15))
        return math.hypot(self.sigma, drift)

    def energy_uncertainty(self, temperature: float | None = None) -> float:
        """Standard uncertainty of ΔfG'°(red) − ΔfG'°(ox): nF σ(E'°, T), kJ/mol."""
        return self.n_electrons * FARADAY * self.potential_sigma(temperature)

    @property
    def status(self) -> str:
        """Status of the potential (:mod:`tfa.thermo.status`): recalled when its note says so."""
        from .status import CITED, RECALLED

        return RECALLED if "from memory" in self.note.lower() else CITED

    def temperature_flag(self, temperature: float) -> str | None:
        """A flag when the potential is used away from its table temperature (the assumption
        and the widened σ)."""
        if abs(temperature - (self.temperature_C + 273.15)) > TEMPERATURE_TOLERANCE_K:
            return (f"E'° of {self.name} held at its {self.temperature_C:g} degC value (no "
                    "temperature dependence known; assumed constant), sigma widened by 1 mV/K to "
                    f"{1000 * self.potential_sigma(temperature):.0f} mV")
        return None


def _split(text: str) -> tuple[str, ...]:
    return tuple(part.strip() for part in (text or "").split(";") if part.strip())


def read_potentials(path: str | Path) -> list[CarrierCouple]:
    """Read a table of carrier couples (columns as in ``tfa/data/potentials.csv``).

    Raises
    ------
    InputError
        Missing columns or unreadable numbers, naming the file and line.
    """
    path = Path(path)
    with path.open(newline="", encoding="utf-8") as handle:
        reader = csv.DictReader(handle)
        missing = [c for c in _COLUMNS if c not in (reader.fieldnames or [])]
        if missing:
            raise InputError(f"{path}: missing columns {', '.join(missing)}; the header must hold "
                             f"{', '.join(_COLUMNS)}")
        couples = []
        for line, row in enumerate(reader, start=2):
            try:
                couple = CarrierCouple(
                    id=row["id"].strip(), name=row["name"].strip(), synonyms=_split(row["synonyms"]),
                    oxidised=row["oxidised"].strip(), oxidised_synonyms=_split(row["oxidised_synonyms"]),
                    oxidised_formula=row["oxidised_formula"].strip(),
                    reduced=row["reduced"].strip(), reduced_synonyms=_split(row["reduced_synonyms"]),
                    reduced_formula=row["reduced_formula"].strip(),
                    n_electrons=int(row["n_electrons"]), n_protons=int(row["n_protons"]),
                    e0_prime=float(row["e0_prime_V"]), sigma=float(row["sigma_V"]),
                    ph=float(row["ph"]), temperature_C=float(row["temperature_C"]),
                    source=row["source_key"].strip(), note=row["note"].strip(),
                )
            except (TypeError, ValueError) as err:
                raise InputError(f"{path} line {line}: cannot read the couple ({err}); give whole "
                                 "numbers of electrons and protons and E'° in volts") from err
            if couple.n_electrons <= 0:
                raise InputError(f"{path} line {line}: n_electrons must be positive")
            couples.append(couple)
    return couples


@lru_cache(maxsize=1)
def load_potentials() -> tuple[CarrierCouple, ...]:
    """The bundled carrier couples of ``tfa/data/potentials.csv``."""
    with resources.as_file(resources.files("tfa.data") / "potentials.csv") as path:
        return tuple(read_potentials(path))
