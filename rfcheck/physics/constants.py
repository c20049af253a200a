"""Physical constants in SI, taken once from :mod:`scipy.constants` (CODATA).

Every other module takes its constants from here; no numeric literal of a physical
constant appears anywhere else in rfcheck.
"""

from __future__ import annotations

import math

from scipy import constants as _c

#: speed of light in vacuum, m/s (exact)
C = _c.c
#: elementary charge, C (exact)
E_CHARGE = _c.e
#: electron mass, kg
M_E = _c.m_e
#: proton mass, kg
M_P = _c.m_p
#: atomic mass constant (1 u), kg
AMU = _c.physical_constants["atomic mass constant"][0]
#: vacuum permittivity, F/m
EPS0 = _c.epsilon_0
#: vacuum permeability, H/m
MU0 = _c.mu_0
#: impedance of free space, ohm
ETA0 = math.sqrt(MU0 / EPS0)
#: Boltzmann constant, J/K
K_B = _c.k
#: electron rest energy, eV
M_E_C2_EV = M_E * C**2 / E_CHARGE
#: one electronvolt in kelvin
EV_IN_K = E_CHARGE / K_B
TWO_PI = 2.0 * math.pi
