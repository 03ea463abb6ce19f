"""Physical constants (CODATA via :mod:`scipy.constants`) and derived conduction constants.

All derived constants are computed here once, from their published definitions, so every
formula in :mod:`mechid.catalogue` reads the same numbers.
"""

import numpy as np
from scipy import constants as _c

ELEMENTARY_CHARGE = _c.e  # C
PLANCK = _c.h  # J s
HBAR = _c.hbar  # J s
ELECTRON_MASS = _c.m_e  # kg
BOLTZMANN = _c.k  # J/K
BOLTZMANN_EV = _c.k / _c.e  # eV/K
VACUUM_PERMITTIVITY = _c.epsilon_0  # F/m

#: First Fowler-Nordheim constant a = e^3/(8 pi h), in A eV V^-2
#: (Forbes & Deane 2007, Proc. R. Soc. A 463, 2907, their recommended values).
FN_A_A_EV_PER_V2 = ELEMENTARY_CHARGE**3 / (8 * np.pi * PLANCK) / ELEMENTARY_CHARGE

#: Second Fowler-Nordheim constant b = (8 pi/3) sqrt(2 m_e)/(e h), in eV^-3/2 V nm^-1
#: (Forbes & Deane 2007).
FN_B_EV32_V_PER_NM = (
    (8 * np.pi / 3) * np.sqrt(2 * ELECTRON_MASS) / (ELEMENTARY_CHARGE * PLANCK)
    * ELEMENTARY_CHARGE**1.5 * 1e-9
)

#: Richardson constant A0 = 4 pi m_e k^2 e / h^3, in A cm^-2 K^-2
#: (Richardson-Dushman; Sze & Ng 2007, metal-semiconductor contacts chapter).
RICHARDSON_A_CM2_K2 = 4 * np.pi * ELECTRON_MASS * BOLTZMANN**2 * ELEMENTARY_CHARGE / PLANCK**3 * 1e-4

#: Schottky image-force coefficient beta_S = sqrt(e^3/(4 pi eps0)) for eps_r = 1, in
#: eV (m/V)^1/2; the barrier lowering is beta_S*sqrt(E/eps_r) (Sze & Ng 2007).
SCHOTTKY_BETA_EV_SQRT_M_PER_V = float(np.sqrt(ELEMENTARY_CHARGE / (4 * np.pi * VACUUM_PERMITTIVITY)))

#: Poole-Frenkel coefficient beta_PF = 2 beta_S (Frenkel 1938, Phys. Rev. 54, 647).
POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V = 2.0 * SCHOTTKY_BETA_EV_SQRT_M_PER_V

#: sqrt(2 m_e * 1 eV)/hbar in nm^-1 eV^-1/2: the WKB decay constant of a 1 eV barrier.
WKB_KAPPA_PER_NM_SQRT_EV = float(np.sqrt(2 * ELECTRON_MASS * ELEMENTARY_CHARGE) / HBAR * 1e-9)
