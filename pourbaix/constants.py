"""Physical constants and reference states used throughout the package, with their sources.

Every module takes these from here instead of defining its own copy.

References
----------
Tiesinga, E., Mohr, P. J., Newell, D. B., Taylor, B. N. (2021). CODATA
recommended values of the fundamental physical constants: 2018. Rev. Mod.
Phys. 93, 025010. doi:10.1103/RevModPhys.93.025010

Cox, J. D., Wagman, D. D., Medvedev, V. A. (1989). CODATA Key Values for
Thermodynamics. Hemisphere, New York (standard state: 298.15 K, 1 bar).
"""

from __future__ import annotations

import math

__all__ = [
    "R",
    "F",
    "F_KJ",
    "LN10",
    "ZERO_C_K",
    "T_REF_K",
    "T_REF_C",
    "P_REF_BAR",
    "CAL",
    "E_CHARGE",
    "N_A",
    "K_B",
    "EPS0",
    "NERNST_25C_V",
]

# CODATA 2018: exact in the 2019 SI (R = N_A k, F = N_A e), 10 digits as tabulated.
R = 8.314462618  # molar gas constant [J/(mol K)]
F = 96485.33212  # Faraday constant [C/mol]
F_KJ = F / 1000.0  # Faraday constant in kJ/(mol V)
E_CHARGE = 1.602176634e-19  # elementary charge (exact) [C]
N_A = 6.02214076e23  # Avogadro constant (exact) [1/mol]
K_B = 1.380649e-23  # Boltzmann constant (exact) [J/K]
EPS0 = 8.8541878128e-12  # vacuum electric permittivity (CODATA 2018, measured) [F/m]
LN10 = math.log(10.0)  # converts natural to decimal logarithms [-]

ZERO_C_K = 273.15  # 0 °C in kelvin (definition of the Celsius scale) [K]
T_REF_K = 298.15  # standard reference temperature (CODATA Key Values, Cox et al. 1989) [K]
T_REF_C = 25.0  # the same in degrees Celsius [°C]
P_REF_BAR = 1.0  # standard-state pressure (IUPAC since 1982) [bar]
CAL = 4.184  # thermochemical calorie (definition) [J]

# Nernst factor R T ln10 / F at 25 °C (Bard & Faulkner 2001, eq. 2.1.38 in log10 form) [V]
NERNST_25C_V = R * T_REF_K * LN10 / F
