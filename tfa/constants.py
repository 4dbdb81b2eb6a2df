"""Physical constants and reference state, in the units used inside ``tfa``.

Units inside the package: kJ/mol, kelvin, mol/L, bar. Degrees Celsius appear only at the
interface (command line, environment files, reports).

References
----------
[1] CODATA 2018 recommended values (E. Tiesinga et al., Rev. Mod. Phys. 93 (2021) 025010):
    R = 8.314462618 J/(mol K), F = 96485.33212 C/mol.
[2] The thermochemical calorie, 4.184 J exactly (as used by the OBIGT database).
"""

from __future__ import annotations

import math

#: Gas constant in kJ/(mol K) [1].
R = 8.314462618e-3
#: Faraday constant in kJ/(mol V) [1].
FARADAY = 96.48533212
#: Natural logarithm of ten.
LN10 = math.log(10.0)
#: Reference temperature of the species data, K.
T_REF = 298.15
#: Reference pressure of the species data, bar.
P_REF = 1.0
#: Zero of the Celsius scale, K.
CELSIUS_ZERO = 273.15
#: Joules per thermochemical calorie [2].
CALORIE = 4.184
#: 1 cm3 * bar expressed in kJ (1 cm3 bar = 0.1 J).
CM3_BAR_IN_KJ = 1.0e-4
