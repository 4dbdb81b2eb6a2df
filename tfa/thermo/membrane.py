"""Energies across a membrane: the proton-motive force and the electrochemical offset of a
compound in a compartment other than the cell.

Convention
----------
The cell is the reference compartment (pH_cell, ψ = 0). For another compartment k with pH_k and
membrane potential Δψ_k = ψ(cell) − ψ(k) (negative when the cell is negative inside), the
electrochemical potential of a compound whose reference species has n_H hydrogen atoms and
charge z, written on the cell's scale, is

    μ̃ = ΔfG'°(at pH_k, I_k, pMg_k) + RT ln a + n_H RT ln10 (pH_cell − pH_k) − z F Δψ_k     (1)

(the Legendre transform of Alberty 2003 in each compartment, each compartment's buffered H+ at
its own chemical potential μ_H(k) = μ_H(cell) + RT ln10 (pH_cell − pH_k), and the electric work
z F (ψ_k − ψ_cell); every pseudo-isomer of a reactant gives the same sum because its members
differ only by H+, which is in electrochemical equilibrium with its compartment). A reaction's
energy is Σ ν μ̃, so a transport reaction carries the compartments' pH and potential in its
ΔrG'°; the buffered H+ of compartment k has ΔfG'° = 0 and the offset of (1) alone.

For one H+ moving from compartment k into the cell, (1) gives Mitchell's relation

    ΔG = −RT ln10 ΔpH + F Δψ,   ΔpH = pH_cell − pH_k,   Δψ = ψ_cell − ψ_k              (2)

(Mitchell 1961, Nature 191:144, doi:10.1038/191144a0; Nicholls & Ferguson, Bioenergetics 4,
2013, chapter 3, from memory): negative (inflow downhill) for a cell more alkaline and more
negative than its surroundings. The proton-motive force in mV is Δp = Δψ − (RT ln10 / F) ΔpH
(negative when it drives H+ in), and ΔG = F Δp.

Units: kJ/mol, K, V (mV at the interface).

References
----------
[1] P. Mitchell, Nature 191 (1961) 144-148, doi:10.1038/191144a0.
[2] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003, chapter 8
    (transport between phases at different pH and electric potential).
[3] J. Tiesinga et al., CODATA 2018 (R, F), Rev. Mod. Phys. 93 (2021) 025010.
"""

from __future__ import annotations

from ..constants import FARADAY, LN10, R


def electrochemical_offset(n_h: float, charge: float, cell_ph: float, compartment_ph: float,
                           membrane_potential_V: float, temperature: float) -> float:
    """The compartment term of equation (1) of the module text, kJ/mol:
    n_H RT ln10 (pH_cell − pH_k) − z F Δψ_k.

    Parameters
    ----------
    n_h : float
        Hydrogen atoms of the compound's reference species.
    charge : float
        Its charge.
    cell_ph, compartment_ph : float
        pH of the cell and of the compartment.
    membrane_potential_V : float
        Δψ = ψ(cell) − ψ(compartment), V.
    temperature : float
        K.

    Examples
    --------
    H+ of a fluid at pH 5.5 beside a cell at pH 7.5, Δψ = −150 mV, 70 °C: the H+ outside lies
    2 RT ln10 + 0.150 F above the cell's (hand derivation: 13.139 + 14.473 kJ/mol):

    >>> round(electrochemical_offset(1, 1, 7.5, 5.5, -0.150, 343.15), 3)
    27.612
    """
    return n_h * R * temperature * LN10 * (cell_ph - compartment_ph) - charge * FARADAY * membrane_potential_V


def proton_inflow_energy(delta_ph: float, membrane_potential_V: float, temperature: float) -> float:
    """ΔG of one H+ moving from a compartment into the cell, kJ/mol: −RT ln10 ΔpH + F Δψ
    (equation (2) of the module text; Mitchell 1961).

    Parameters
    ----------
    delta_ph : float
        pH_cell − pH_compartment.
    membrane_potential_V : float
        Δψ = ψ_cell − ψ_compartment, V.
    temperature : float
        K.

    Examples
    --------
    From pH 5.5 into pH 7.5 at Δψ = −150 mV and 70 °C (343.15 K): RT ln10 = 6.5695 kJ/mol, so
    −2 × 6.5695 + 96.4853 × (−0.150) = −13.139 − 14.473 = −27.612 kJ/mol (by hand):

    >>> round(proton_inflow_energy(2.0, -0.150, 343.15), 3)
    -27.612
    """
    return -R * temperature * LN10 * delta_ph + FARADAY * membrane_potential_V


def proton_motive_force_mV(delta_ph: float, membrane_potential_V: float, temperature: float) -> float:
    """The proton-motive force Δp = Δψ − (RT ln10 / F) ΔpH, mV (negative when it drives H+
    into the cell; Mitchell 1961, Nicholls & Ferguson 2013).

    >>> round(proton_motive_force_mV(2.0, -0.150, 343.15), 1)
    -286.2
    """
    return 1000.0 * proton_inflow_energy(delta_ph, membrane_potential_V, temperature) / FARADAY
