"""Tunnelling mechanisms: direct tunnelling (Simmons; Brinkman-Dynes-Rowell between
dissimilar electrodes) and Fowler-Nordheim tunnelling.

Every formula the declarations use is a public function of this module, so the
physics can be read, tested and reused without going through a :class:`Mechanism`:

* :func:`simmons_current_density_A_per_m2` -- Simmons (1963) rectangular barrier, T = 0
* :func:`simmons_thermal_factor` -- Simmons (1964) temperature factor
* :func:`simmons_low_bias_current_density_A_per_m2` -- the ohmic (V -> 0) limit
* :func:`fowler_nordheim_current_density_A_per_m2` -- Lenzlinger & Snow (1969) form
* :func:`murphy_good_thermal_factor` -- Murphy & Good (1956) temperature factor
* :func:`schottky_nordheim_parameter`, :func:`forbes_v`, :func:`forbes_t`,
  :func:`schottky_nordheim_current_density_A_per_m2` -- image-rounded barrier (Forbes 2006)
* :func:`bdr_conductance_coefficients`, :func:`bdr_zero_bias_conductance_S_per_m2`,
  :func:`bdr_current_density_A_per_m2`, :func:`bdr_conductance_minimum_V`,
  :func:`bdr_relative_asymmetry` -- trapezoidal barrier between dissimilar electrodes
  (Brinkman, Dynes & Rowell 1970), a current not odd in V

Units: voltages in V, energies in eV, thicknesses in nm, fields in V/nm, current densities
in A/m^2 (the unit in each name); the declarations multiply by the electrode area.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike
from scipy.special import xlogy

from mechid.catalogue.base import (
    FloatArray,
    Mechanism,
    Parameter,
    StraightenedPlot,
    iv_magnitudes,
)
from mechid.catalogue.checks import (
    NearlyTemperatureIndependent,
    PlotEstimate,
    PositiveQuantity,
    QuantityInRange,
    StraightPlot,
    TunnellingRegime,
)
from mechid.catalogue.validity import QuantityFormula, ValidityCondition
from mechid.constants import (
    BOLTZMANN_EV,
    ELECTRON_MASS,
    ELEMENTARY_CHARGE,
    FN_A_A_EV_PER_V2,
    FN_B_EV32_V_PER_NM,
    PLANCK,
    SCHOTTKY_BETA_EV_SQRT_M_PER_V,
    WKB_KAPPA_PER_NM_SQRT_EV,
)
from mechid.device import Device, Measured

#: Largest argument x = pi c kT at which the thermal factors x/sin(x) are used (factor 1.19).
#: Both factors come from expanding the WKB exponent linearly in energy about the Fermi level
#: and integrating it against the Fermi-Dirac occupation (Murphy & Good 1956, Phys. Rev. 102,
#: 1464; Simmons 1964, J. Appl. Phys. 35, 2655). The integral diverges at x = pi. The mean
#: energy of the tunnelling electrons, -x cot(x)/c relative to E_F (derived from the same
#: integral), rises from 1/c below E_F at T = 0 to 0.64/c at x = 1 and to E_F at x = pi/2,
#: where the expansion about E_F no longer describes the electrons carrying the current. The
#: factor is therefore trusted only while it is a correction: x <= 1 (common practice).
THERMAL_ARGUMENT_LIMIT = 1.0

#: Smallest Simmons exponent A sqrt(phibar) at which the intermediate-voltage formula is used.
#: Simmons' closed form keeps the leading order in 1/(A sqrt(phibar)): its low-bias limit
#: carries the factor 1 - 2/(A sqrt(phi0)) against the ohmic formula, so at 4 that correction
#: is one half; below about 2.1 the bracket turns non-monotonic in V and then negative
#: (measured here; our threshold, chosen so the correction stays a correction).
SIMMONS_MIN_EXPONENT = 4.0

_A_PER_M2_TO_A_PER_CM2 = 1e-4
_PER_NM2_TO_PER_M2 = 1e18
#: e^2/(4 pi eps0) in eV nm (1.439964), the Schottky constant of the image force.
_SCHOTTKY_CONSTANT_EV_NM = SCHOTTKY_BETA_EV_SQRT_M_PER_V**2 * 1e9


def thermal_smearing_factor(x: ArrayLike) -> FloatArray:
    """Thermal factor ``x / sin(x)`` of tunnelling currents; NaN at and beyond its pole.

    Parameters
    ----------
    x : array_like
        ``pi * c * kT`` with ``c`` the energy-decay coefficient of the transmission (1/eV)
        and ``kT`` in eV; ``x >= 0``.

    Returns
    -------
    ndarray
        ``x/sin(x)`` (1 at x = 0) for ``0 <= x < pi``, where the Fermi-Dirac integral behind
        it converges; NaN elsewhere. The formula is trusted only up to
        :data:`THERMAL_ARGUMENT_LIMIT` (x <= 1); the mechanism declarations refuse larger x
        through their ``thermal_factor_argument`` validity condition.

    Notes
    -----
    The factor is the exact value of ``int exp(c e) f(e) de / int_{-inf}^0 exp(c e) de`` for a
    transmission decaying as ``exp(c e)`` around the Fermi level and the Fermi-Dirac
    occupation ``f`` (Murphy & Good 1956, Phys. Rev. 102, 1464; Simmons 1964, J. Appl. Phys.
    35, 2655).
    """
    x = np.asarray(x, dtype=float)
    inside = (x >= 0) & (x < np.pi)
    return np.where(inside, 1.0 / np.sinc(np.where(inside, x, 0.0) / np.pi), np.nan)


# --------------------------------------------------------------------------------------
# Direct tunnelling: Simmons (1963) with the Simmons (1964) temperature factor
# --------------------------------------------------------------------------------------


def simmons_mean_barrier(
    voltage_V: ArrayLike, barrier_height_eV: ArrayLike, thickness_nm: ArrayLike
) -> tuple[FloatArray, FloatArray]:
    """Mean barrier height and width of a biased rectangular barrier, intermediate range.

    Parameters
    ----------
    voltage_V : array_like
        Bias magnitude in V (``eV`` in eV is numerically the same number).
    barrier_height_eV : array_like
        Zero-bias barrier height ``phi0`` in eV.
    thickness_nm : array_like
        Barrier thickness ``s`` in nm.

    Returns
    -------
    mean_barrier_eV, width_nm : ndarray
        ``phibar = phi0 - eV/2`` and ``ds = s``: the trapezoid of a rectangular barrier
        tilted by the bias, valid for ``eV < phi0`` (Simmons, J. Appl. Phys. 34, 1793 (1963),
        rectangular barrier without image force, intermediate-voltage range, beta = 1).
        Above ``eV = phi0`` the barrier is triangular: see
        :func:`simmons_high_voltage_current_density_A_per_m2`.
    """
    v = np.asarray(voltage_V, dtype=float)
    phi0 = np.asarray(barrier_height_eV, dtype=float)
    s = np.asarray(thickness_nm, dtype=float)
    return phi0 - 0.5 * v, s + 0.0 * v


def simmons_decay_coefficient(width_nm: ArrayLike, effective_mass_ratio: ArrayLike) -> FloatArray:
    """Simmons' ``A = 4 pi ds sqrt(2 m*)/h`` in eV^-1/2 (so ``A sqrt(phi)`` is dimensionless).

    Parameters
    ----------
    width_nm : array_like
        Effective barrier width ``ds`` in nm.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.

    Returns
    -------
    ndarray
        ``A = 2 ds sqrt(2 m* e)/hbar`` with energies in eV (Simmons 1963).
    """
    return (
        2.0
        * WKB_KAPPA_PER_NM_SQRT_EV
        * np.sqrt(np.asarray(effective_mass_ratio, dtype=float))
        * np.asarray(width_nm, dtype=float)
    )


def simmons_current_density_A_per_m2(
    voltage_V: ArrayLike,
    barrier_height_eV: ArrayLike,
    thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Tunnel current density through a rectangular barrier at T = 0 (Simmons 1963).

    Parameters
    ----------
    voltage_V : array_like
        Bias magnitude in V (> 0), intermediate range ``eV < phi0``.
    barrier_height_eV : array_like
        Barrier height ``phi0`` in eV.
    thickness_nm : array_like
        Barrier thickness ``s`` in nm.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.

    Returns
    -------
    ndarray
        Current density in A/m^2, the bare formula (no clipping): it is monotonic and
        positive only inside the validity domain of :data:`DIRECT_TUNNELLING`
        (``eV <= phi0`` and ``A sqrt(phibar) >= SIMMONS_MIN_EXPONENT``).

    Notes
    -----
    Simmons, J. Appl. Phys. 34, 1793 (1963), rectangular barrier, intermediate-voltage range
    ``0 <= eV < phi0``, beta = 1:

    .. math::

        J = \\frac{e}{2\\pi h\\,s^2}\\Big[\\bar\\varphi\\, e^{-A\\sqrt{\\bar\\varphi}}
            - (\\bar\\varphi + eV)\\, e^{-A\\sqrt{\\bar\\varphi + eV}}\\Big],
        \\qquad A = \\frac{4\\pi\\,s\\sqrt{2 m^*}}{h},\\quad
        \\bar\\varphi = \\varphi_0 - \\frac{eV}{2}

    (equation numbers not checked: the form was confirmed against a secondary reproduction
    of Simmons' intermediate-voltage formula and against the physics sheet's independent
    evaluation, 4.39032 A/m^2 at phi0 = 2 eV, s = 2 nm, 0.5 V). The bracket is evaluated as
    ``phibar exp(-A sqrt(phibar)) * (-expm1(log1p(eV/phibar) - A d))`` with
    ``d = sqrt(phibar+eV) - sqrt(phibar)`` so tiny biases keep full precision. The formula
    needs an opaque barrier, ``A sqrt(phibar) >> 1``: below about 2.1 the bracket is not
    monotonic in V and turns negative, which is why the declaration refuses
    ``A sqrt(phibar) < SIMMONS_MIN_EXPONENT`` instead of clipping.
    """
    v = np.asarray(voltage_V, dtype=float)
    mean_barrier, width_nm = simmons_mean_barrier(v, barrier_height_eV, thickness_nm)
    decay = simmons_decay_coefficient(width_nm, effective_mass_ratio)
    root_low = np.sqrt(mean_barrier)
    root_high = np.sqrt(mean_barrier + v)
    # e/(2 pi h s^2) times e (energies converted from eV to J): A m^-2 eV^-1.
    prefactor = ELEMENTARY_CHARGE**2 / (2 * np.pi * PLANCK * (width_nm * 1e-9) ** 2)
    forward = mean_barrier * np.exp(-decay * root_low)
    reverse_over_forward = np.log1p(v / mean_barrier) - decay * v / (root_high + root_low)
    return prefactor * forward * -np.expm1(reverse_over_forward)


def simmons_high_voltage_current_density_A_per_m2(
    voltage_V: ArrayLike,
    barrier_height_eV: ArrayLike,
    thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Simmons' published high-voltage (``eV > phi0``) current density, T = 0.

    Parameters
    ----------
    voltage_V : array_like
        Bias magnitude in V, ``eV > phi0``.
    barrier_height_eV, thickness_nm, effective_mass_ratio : array_like
        As in :func:`simmons_current_density_A_per_m2`.

    Returns
    -------
    ndarray
        Current density in A/m^2 (both terms kept).

    Notes
    -----
    Simmons, J. Appl. Phys. 34, 1793 (1963), rectangular barrier, ``V > phi0/e``, field
    ``F = V/s``:

    .. math::

        J = \\frac{2.2\\,e^3 F^2}{8\\pi h \\varphi_0}\\Big[
            e^{-\\frac{8\\pi\\sqrt{2m^*}\\,\\varphi_0^{3/2}}{2.96\\,h e F}}
            - \\Big(1 + \\frac{2eV}{\\varphi_0}\\Big)
            e^{-\\frac{8\\pi\\sqrt{2m^*}\\,\\varphi_0^{3/2}}{2.96\\,h e F}
               \\sqrt{1 + 2eV/\\varphi_0}}\\Big]

    The numbers 2.2 and 2.96 come from Simmons' correction factor beta = 23/24 for the
    triangular barrier (beta confirmed on a secondary reproduction; the two constants are
    quoted from memory). They are not the beta = 1 values of the intermediate formula
    continued to ``eV = phi0`` (2 and 2 sqrt 2 = 2.83), so the two forms do not join: at
    ``eV = phi0`` this one is larger by ``1.1 exp(A sqrt(phi0/2) (1 - 2.83/2.96))`` (measured
    here at phi0 = 2 eV, m* = 0.5: 1.5 for s = 1 nm, 2.1 for 2 nm, 5.5 for 5 nm). The
    direct-tunnelling declaration therefore does not switch to it; it refuses ``eV > phi0``
    (the high-field data are the Fowler-Nordheim mechanism's domain), so no sampler crosses
    the seam.
    """
    v = np.asarray(voltage_V, dtype=float)
    phi0 = np.asarray(barrier_height_eV, dtype=float)
    field = v / np.asarray(thickness_nm, dtype=float)  # V/nm
    # 8 pi sqrt(2 m*) phi0^1.5/(2.96 h e F) = (3/2.96) b sqrt(m*) phi0^1.5/F (b: FN constant)
    exponent = 3.0 / 2.96 * fowler_nordheim_slope_V_per_nm(phi0, effective_mass_ratio) / field
    ratio = 1.0 + 2.0 * v / phi0
    prefactor = 2.2 * FN_A_A_EV_PER_V2 / phi0 * field**2 * _PER_NM2_TO_PER_M2
    return prefactor * (np.exp(-exponent) - ratio * np.exp(-exponent * np.sqrt(ratio)))


def simmons_low_bias_current_density_A_per_m2(
    voltage_V: ArrayLike,
    barrier_height_eV: ArrayLike,
    thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Ohmic (V -> 0) limit of the Simmons current density.

    Parameters
    ----------
    voltage_V, barrier_height_eV, thickness_nm, effective_mass_ratio : array_like
        As in :func:`simmons_current_density_A_per_m2`.

    Returns
    -------
    ndarray
        ``J = (e/h)^2 (sqrt(2 m* phi0)/s) V exp(-A sqrt(phi0))`` in A/m^2 (Simmons 1963,
        low-voltage range; the same constant as the zero-bias conductance of Brinkman, Dynes
        & Rowell 1970, J. Appl. Phys. 41, 1915). The full formula tends to this times
        ``1 - 2/(A sqrt(phi0))`` as V -> 0, the leading term of the expansion.
    """
    phi0 = np.asarray(barrier_height_eV, dtype=float)
    s_nm = np.asarray(thickness_nm, dtype=float)
    mass = np.asarray(effective_mass_ratio, dtype=float)
    momentum = np.sqrt(2 * mass * ELECTRON_MASS * phi0 * ELEMENTARY_CHARGE)
    decay = simmons_decay_coefficient(s_nm, mass)
    return (
        (ELEMENTARY_CHARGE / PLANCK) ** 2
        * momentum
        / (s_nm * 1e-9)
        * np.asarray(voltage_V, dtype=float)
        * np.exp(-decay * np.sqrt(phi0))
    )


def simmons_thermal_coefficient(
    voltage_V: ArrayLike,
    barrier_height_eV: ArrayLike,
    thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Simmons' ``B = A/(2 sqrt(phibar))`` in 1/eV, the energy decay rate of the transmission.

    Parameters
    ----------
    voltage_V, barrier_height_eV, thickness_nm, effective_mass_ratio : array_like
        As in :func:`simmons_current_density_A_per_m2`.

    Returns
    -------
    ndarray
        ``B`` in 1/eV, with ``phibar`` and ``A`` at the given bias (Simmons 1964,
        J. Appl. Phys. 35, 2655; the form of B quoted from memory and confirmed by the
        physics sheet's independent check, B = 7.24525 1/eV at phi0 = 2 eV, s = 2 nm,
        m* = m0: the derivative of the WKB exponent A sqrt(phi) with respect to energy).
    """
    mean_barrier, width_nm = simmons_mean_barrier(voltage_V, barrier_height_eV, thickness_nm)
    return simmons_decay_coefficient(width_nm, effective_mass_ratio) / (2 * np.sqrt(mean_barrier))


def simmons_thermal_factor(
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Temperature factor ``J(V, T)/J(V, 0) = x/sin(x)``, ``x = pi B kT`` (Simmons 1964).

    Parameters
    ----------
    voltage_V, barrier_height_eV, thickness_nm, effective_mass_ratio : array_like
        As in :func:`simmons_current_density_A_per_m2`.
    temperature_K : array_like
        Temperature in K.

    Returns
    -------
    ndarray
        The factor (Simmons, J. Appl. Phys. 35, 2655 (1964)); NaN from its pole at
        ``x = pi`` on (see :func:`thermal_smearing_factor`). Trusted for ``x <= 1`` only.
    """
    coefficient = simmons_thermal_coefficient(
        voltage_V, barrier_height_eV, thickness_nm, effective_mass_ratio
    )
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return thermal_smearing_factor(np.pi * coefficient * kT)


def _direct_tunnelling_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    barrier_height_eV: FloatArray,
    thickness_nm: FloatArray,
    effective_mass_ratio: FloatArray,
) -> FloatArray:
    """|I| in A of direct tunnelling: Simmons (1963) density x Simmons (1964) factor x area."""
    density = simmons_current_density_A_per_m2(
        voltage_V, barrier_height_eV, thickness_nm, effective_mass_ratio
    )
    factor = simmons_thermal_factor(
        voltage_V, temperature_K, barrier_height_eV, thickness_nm, effective_mass_ratio
    )
    return density * factor * _A_PER_M2_TO_A_PER_CM2 * device.require_area()


# --------------------------------------------------------------------------------------
# Fowler-Nordheim tunnelling
# --------------------------------------------------------------------------------------


def fowler_nordheim_slope_V_per_nm(
    barrier_height_eV: ArrayLike, effective_mass_ratio: ArrayLike
) -> FloatArray:
    """FN slope ``B = b sqrt(m*/m0) phi^(3/2)`` in V/nm: ``J ∝ exp(-B/E)``.

    Parameters
    ----------
    barrier_height_eV : array_like
        Barrier height ``phi`` in eV.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.

    Returns
    -------
    ndarray
        ``B`` in V/nm, with the second FN constant ``b`` of Forbes & Deane (2007, Proc.
        R. Soc. A 463, 2907). On a plot of ln(I/V^2) against 1/V the slope is ``-B d``.
    """
    phi = np.asarray(barrier_height_eV, dtype=float)
    return FN_B_EV32_V_PER_NM * np.sqrt(np.asarray(effective_mass_ratio, dtype=float)) * phi**1.5


def fowler_nordheim_current_density_A_per_m2(
    field_V_per_nm: ArrayLike, barrier_height_eV: ArrayLike, effective_mass_ratio: ArrayLike
) -> FloatArray:
    """Fowler-Nordheim current density through a triangular barrier at T = 0.

    Parameters
    ----------
    field_V_per_nm : array_like
        Field in the insulator in V/nm (> 0).
    barrier_height_eV : array_like
        Barrier height ``phi`` in eV.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.

    Returns
    -------
    ndarray
        Current density in A/m^2.

    Notes
    -----
    Lenzlinger & Snow, J. Appl. Phys. 40, 278 (1969) (attribution and equation number from
    memory), pinned here with the ``m0/m*`` prefactor, as the MOS form is usually reproduced
    (prefactor ``q^3 m0/(8 pi h m_ox phi_B)``, whose ``m0/m_ox`` factor was checked on a
    secondary reproduction; some reviews drop it). Validity: a triangular barrier,
    ``eV > phi`` (the declaration refuses lower biases):

    .. math::

        J = \\frac{a}{\\varphi}\\frac{m_0}{m^*} E^2
            \\exp\\Big(-\\frac{b\\sqrt{m^*/m_0}\\,\\varphi^{3/2}}{E}\\Big)

    with ``a = e^3/(8 pi h)`` and ``b = (8 pi/3) sqrt(2 m0)/(e h)`` (Forbes & Deane 2007).
    No image-force rounding (``v = t = 1``).
    """
    field = np.asarray(field_V_per_nm, dtype=float)
    phi = np.asarray(barrier_height_eV, dtype=float)
    mass = np.asarray(effective_mass_ratio, dtype=float)
    exponent = -fowler_nordheim_slope_V_per_nm(phi, mass) / field
    return FN_A_A_EV_PER_V2 / (phi * mass) * field**2 * np.exp(exponent) * _PER_NM2_TO_PER_M2


def murphy_good_thermal_coefficient(
    field_V_per_nm: ArrayLike,
    barrier_height_eV: ArrayLike,
    effective_mass_ratio: ArrayLike,
    t_value: ArrayLike = 1.0,
) -> FloatArray:
    """Energy decay rate ``c = (3/2) b sqrt(m*/m0) phi^(1/2) t(f)/E`` in 1/eV.

    Parameters
    ----------
    field_V_per_nm : array_like
        Field in V/nm.
    barrier_height_eV : array_like
        Barrier height in eV.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.
    t_value : array_like, optional
        Barrier function ``t(f)``; 1 for the triangular barrier, :func:`forbes_t` for the
        image-rounded one.

    Returns
    -------
    ndarray
        ``c = 1/d_F`` in 1/eV: the decay width of the elementary barrier is
        ``d_F = 2F/(3 b sqrt(phi))`` = 0.09759678 eV at phi = 1 eV, F = 1 V/nm (Forbes'
        decay width, reproduced in the "Field electron emission" article, its eq. 14, checked),
        scaled by ``sqrt(m*/m0)`` for the tunnelling mass and by ``t(f)`` for the image-rounded
        barrier (Murphy & Good, Phys. Rev. 102, 1464 (1956), whose thermal factor
        ``pi c kT/sin(pi c kT)`` uses it).
    """
    phi = np.asarray(barrier_height_eV, dtype=float)
    return (
        1.5
        * FN_B_EV32_V_PER_NM
        * np.sqrt(np.asarray(effective_mass_ratio, dtype=float))
        * np.sqrt(phi)
        * np.asarray(t_value, dtype=float)
        / np.asarray(field_V_per_nm, dtype=float)
    )


def murphy_good_thermal_factor(
    field_V_per_nm: ArrayLike,
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    effective_mass_ratio: ArrayLike,
    t_value: ArrayLike = 1.0,
) -> FloatArray:
    """Temperature factor ``J(T)/J(0) = pi c kT / sin(pi c kT)`` (Murphy & Good 1956).

    Parameters
    ----------
    field_V_per_nm, barrier_height_eV, effective_mass_ratio, t_value : array_like
        As in :func:`murphy_good_thermal_coefficient`.
    temperature_K : array_like
        Temperature in K.

    Returns
    -------
    ndarray
        The factor; NaN from its pole at ``pi c kT = pi`` on (see
        :func:`thermal_smearing_factor`). Trusted for ``pi c kT <= 1`` only.
    """
    c = murphy_good_thermal_coefficient(
        field_V_per_nm, barrier_height_eV, effective_mass_ratio, t_value
    )
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return thermal_smearing_factor(np.pi * c * kT)


def schottky_nordheim_parameter(
    barrier_height_eV: ArrayLike, field_V_per_nm: ArrayLike
) -> FloatArray:
    """Scaled barrier field ``f = (e^3/(4 pi eps0)) F/phi^2`` (Forbes 2006).

    Parameters
    ----------
    barrier_height_eV : array_like
        Work function / barrier height ``phi`` in eV.
    field_V_per_nm : array_like
        Surface field ``F`` in V/nm (vacuum).

    Returns
    -------
    ndarray
        ``f = 1.439964 F/phi^2``; ``f = 1`` removes the Schottky-Nordheim barrier.
    """
    phi = np.asarray(barrier_height_eV, dtype=float)
    return _SCHOTTKY_CONSTANT_EV_NM * np.asarray(field_V_per_nm, dtype=float) / phi**2


def _scaled_field_in_range(f: ArrayLike) -> FloatArray:
    """``f`` as floats, NaN outside the Schottky-Nordheim range ``0 <= f <= 1``."""
    f = np.asarray(f, dtype=float)
    return np.where((f >= 0) & (f <= 1), f, np.nan)


def forbes_v(f: ArrayLike) -> FloatArray:
    """Forbes' approximation ``v(f) = 1 - f + (f/6) ln f`` of the SN barrier function.

    Forbes, Appl. Phys. Lett. 89, 113122 (2006); stated accuracy about 0.3 % for 0 <= f <= 1,
    the range of the Schottky-Nordheim barrier (f = 1 removes it): NaN outside that range.
    ``v(0) = 1``.
    """
    f = _scaled_field_in_range(f)
    return 1.0 - f + xlogy(f, f) / 6.0


def forbes_t(f: ArrayLike) -> FloatArray:
    """Forbes' approximation ``t(f) = 1 + f/9 - (f/18) ln f`` (Forbes 2006). ``t(0) = 1``.

    Defined for 0 <= f <= 1 like :func:`forbes_v`; NaN outside.
    """
    f = _scaled_field_in_range(f)
    return 1.0 + f / 9.0 - xlogy(f, f) / 18.0


def schottky_nordheim_current_density_A_per_m2(
    field_V_per_nm: ArrayLike, barrier_height_eV: ArrayLike
) -> FloatArray:
    """Murphy-Good FN-type current density for the image-rounded (SN) barrier, T = 0.

    Parameters
    ----------
    field_V_per_nm : array_like
        Surface field in V/nm.
    barrier_height_eV : array_like
        Work function in eV.

    Returns
    -------
    ndarray
        ``J = a/(phi t(f)^2) F^2 exp(-v(f) b phi^(3/2)/F)`` in A/m^2 with the free-electron
        mass, ``v`` and ``t`` from :func:`forbes_v` and :func:`forbes_t` (Murphy & Good 1956;
        Forbes 2006; Forbes & Deane 2007). For field emission into vacuum; the catalogue's
        ``fowler_nordheim`` mechanism uses the triangular barrier of Lenzlinger & Snow.
    """
    field = np.asarray(field_V_per_nm, dtype=float)
    phi = np.asarray(barrier_height_eV, dtype=float)
    f = schottky_nordheim_parameter(phi, field)
    exponent = -forbes_v(f) * FN_B_EV32_V_PER_NM * phi**1.5 / field
    return FN_A_A_EV_PER_V2 / (phi * forbes_t(f) ** 2) * field**2 * np.exp(exponent) * 1e18


def _fowler_nordheim_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    barrier_height_eV: FloatArray,
    thickness_nm: FloatArray,
    effective_mass_ratio: FloatArray,
) -> FloatArray:
    """|I| in A of FN tunnelling: Lenzlinger-Snow density x Murphy-Good factor x area."""
    field = voltage_V / thickness_nm
    density = fowler_nordheim_current_density_A_per_m2(
        field, barrier_height_eV, effective_mass_ratio
    )
    factor = murphy_good_thermal_factor(
        field, temperature_K, barrier_height_eV, effective_mass_ratio
    )
    return density * factor * _A_PER_M2_TO_A_PER_CM2 * device.require_area()


# --------------------------------------------------------------------------------------
# Straightened plots
# --------------------------------------------------------------------------------------


def _known(value: Measured | None) -> float | None:
    """The value of a device :class:`~mechid.device.Measured` field, or None."""
    return None if value is None else float(value.value)


def _low_bias_conductance_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = V^2, y = |I|/|V| (use the low-bias points, eV well below the barrier)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return v**2, i / v


def _low_bias_conductance_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """I/V = G0 (1 + gamma V^2): intercept G0 in S, gamma = slope/intercept in 1/V^2."""
    with np.errstate(divide="ignore", invalid="ignore"):
        gamma = np.float64(slope) / np.float64(intercept)
    return {"zero_bias_conductance_S": float(intercept), "cubic_coefficient_per_V2": float(gamma)}


def fowler_nordheim_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """Fowler-Nordheim coordinates ``x = 1/|V|``, ``y = ln(|I|/V^2)``; NaN where undefined.

    Also the coordinates of transition-voltage spectroscopy (the minimum of y against x;
    Beebe et al., Phys. Rev. Lett. 97, 026801 (2006)).
    """
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return 1.0 / v, np.log(i / v**2)


def _fowler_nordheim_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Barrier height from the FN slope ``-b sqrt(m*/m0) phi^(3/2) d`` (and the intercept).

    Needs the device thickness. Without a device effective mass the keys say
    ``assuming_unit_mass``. With the area, the intercept
    ``ln(area a/(phi (m*/m0) d^2))`` gives a second, independent barrier estimate.
    """
    thickness = _known(device.thickness_nm)
    if thickness is None:
        return {}
    mass = _known(device.effective_mass_ratio)
    suffix = "eV" if mass is not None else "assuming_unit_mass_eV"
    mass = 1.0 if mass is None else mass
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        product = -np.float64(slope) / (FN_B_EV32_V_PER_NM * thickness * np.sqrt(mass))
        barrier = np.where(product > 0, np.abs(product) ** (2.0 / 3.0), np.nan)
        result = {f"barrier_height_{suffix}": float(barrier)}
        if device.area_cm2 is not None:
            area_nm2 = device.area_cm2 * 1e14
            from_intercept = area_nm2 * FN_A_A_EV_PER_V2 / (
                mass * thickness**2 * np.exp(np.float64(intercept))
            )
            result[f"barrier_height_from_intercept_{suffix}"] = float(from_intercept)
    return result


#: The Fowler-Nordheim plot, one line per temperature.
FOWLER_NORDHEIM_PLOT = StraightenedPlot(
    id="fowler_nordheim_plot",
    title="Fowler-Nordheim plot",
    x_label="1/|V| [1/V]",
    y_label="ln(|I|/V^2) [ln(A/V^2)]",
    grouping="per_temperature",
    transform=fowler_nordheim_transform,
    interpret=_fowler_nordheim_interpret,
)

LOW_BIAS_CONDUCTANCE_PLOT = StraightenedPlot(
    id="low_bias_conductance_plot",
    title="Low-bias conductance (I/V against V^2)",
    x_label="V^2 [V^2]",
    y_label="|I|/|V| [S]",
    grouping="per_temperature",
    transform=_low_bias_conductance_transform,
    interpret=_low_bias_conductance_interpret,
)


# --------------------------------------------------------------------------------------
# Validity domains
# --------------------------------------------------------------------------------------


def _bias_over_barrier(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """``eV/phi``: below 1 the tilted barrier is a trapezoid, above 1 a triangle."""
    return voltage_V / barrier_height_eV


def _simmons_exponent(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """Simmons' exponent ``A sqrt(phibar)`` at the bias."""
    mean_barrier, width_nm = simmons_mean_barrier(voltage_V, barrier_height_eV, thickness_nm)
    return simmons_decay_coefficient(width_nm, effective_mass_ratio) * np.sqrt(mean_barrier)


def _simmons_thermal_argument(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """``pi B kT`` of the Simmons (1964) factor."""
    coefficient = simmons_thermal_coefficient(
        voltage_V, barrier_height_eV, thickness_nm, effective_mass_ratio
    )
    return np.pi * coefficient * BOLTZMANN_EV * temperature_K


def _fowler_nordheim_thermal_argument(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """``pi c kT`` of the Murphy-Good (1956) factor at the field ``V/d``."""
    c = murphy_good_thermal_coefficient(
        voltage_V / thickness_nm, barrier_height_eV, effective_mass_ratio
    )
    return np.pi * c * BOLTZMANN_EV * temperature_K


def _thermal_argument_condition(evaluate: QuantityFormula, source: str) -> ValidityCondition:
    """The ``pi c kT <= 1`` condition of a tunnelling thermal factor (see THERMAL_ARGUMENT_LIMIT)."""
    return ValidityCondition(
        id="thermal_factor_argument",
        quantity="pi c kT (argument of the thermal factor x/sin x)",
        limit=THERMAL_ARGUMENT_LIMIT,
        bound="upper",
        reason=(
            f"the thermal factor ({source}) expands the tunnelling exponent about the Fermi "
            "level and holds only while it is a small correction (x/sin x <= 1.19); beyond it "
            "the current is carried by hot electrons the formula does not describe"
        ),
        evaluate=evaluate,
    )


#: Where Simmons' intermediate-voltage formula with the Simmons (1964) factor holds.
DIRECT_TUNNELLING_VALIDITY = (
    ValidityCondition(
        id="bias_below_barrier",
        quantity="eV/phi0 (bias over barrier height)",
        limit=1.0,
        bound="upper",
        reason=(
            "Simmons' intermediate-voltage formula (1963) holds for eV < phi0; above it the "
            "barrier is triangular and his high-voltage form, which does not join this one, "
            "applies: those data belong to Fowler-Nordheim tunnelling"
        ),
        evaluate=_bias_over_barrier,
    ),
    ValidityCondition(
        id="opaque_barrier",
        quantity="A sqrt(phibar) (Simmons exponent)",
        limit=SIMMONS_MIN_EXPONENT,
        bound="lower",
        reason=(
            "Simmons' closed form (1963) needs an opaque barrier, A sqrt(phibar) >> 1; for a "
            "nearly transparent one its two terms cancel and the current is no longer monotonic "
            "in the bias"
        ),
        evaluate=_simmons_exponent,
    ),
    _thermal_argument_condition(_simmons_thermal_argument, "Simmons 1964"),
)

#: Where the triangular-barrier FN formula with the Murphy-Good factor holds.
FOWLER_NORDHEIM_VALIDITY = (
    ValidityCondition(
        id="triangular_barrier",
        quantity="eV/phi (bias over barrier height)",
        limit=1.0,
        bound="lower",
        reason=(
            "the Fowler-Nordheim formula assumes a triangular barrier, i.e. a bias above the "
            "barrier height (Lenzlinger & Snow 1969); below it electrons tunnel through the "
            "whole film (direct tunnelling)"
        ),
        evaluate=_bias_over_barrier,
    ),
    _thermal_argument_condition(_fowler_nordheim_thermal_argument, "Murphy & Good 1956"),
)


# --------------------------------------------------------------------------------------
# Declarations
# --------------------------------------------------------------------------------------


def _barrier(lower: float, typical: float) -> Parameter:
    return Parameter(
        name="barrier_height_eV", unit="eV", symbol="phi_B",
        description="tunnel barrier height (electrode Fermi level to insulator band edge)",
        lower=lower, upper=5.0, typical=typical, sample_in_log=True,
    )


def _thickness(lower: float, upper: float, typical: float) -> Parameter:
    return Parameter(
        name="thickness_nm", unit="nm", symbol="d", description="barrier (film) thickness",
        lower=lower, upper=upper, typical=typical, device_prior="thickness_nm",
        sample_in_log=True,
    )


_MASS = Parameter(
    name="effective_mass_ratio", unit="1", symbol="m*/m0",
    description="tunnelling effective mass in units of the free-electron mass",
    lower=0.05, upper=1.0, typical=0.5, device_prior="effective_mass_ratio",
    # Tunnelling depends on d * sqrt(m* phi) (WKB exponent): in logs the ridge is straight.
    sample_in_log=True,
)

DIRECT_TUNNELLING = Mechanism(
    id="direct_tunnelling",
    family="tunnelling",
    name="Direct tunnelling (Simmons)",
    formula=(
        "J = e/(2 pi h ds^2) [phibar exp(-A sqrt(phibar))"
        " - (phibar + eV) exp(-A sqrt(phibar + eV))] * x/sin(x);"
        "  A = 4 pi d sqrt(2 m*)/h,  x = pi kT A/(2 sqrt(phibar)),  phibar = phi0 - eV/2,  ds = d;"
        "  valid for eV < phi0, A sqrt(phibar) >= 4, x <= 1"
    ),
    source=(
        "Simmons, J. Appl. Phys. 34, 1793 (1963) (rectangular barrier, no image force); "
        "temperature factor: Simmons, J. Appl. Phys. 35, 2655 (1964)"
    ),
    parameters=(_barrier(0.1, 2.0), _thickness(0.3, 20.0, 2.0), _MASS),
    magnitude=_direct_tunnelling_current,
    plots=(LOW_BIAS_CONDUCTANCE_PLOT,),
    checks=(
        NearlyTemperatureIndependent(),
        TunnellingRegime("direct"),
        PositiveQuantity(
            "low_bias_conductance_plot", "cubic_coefficient_per_V2",
            "the conductance of a tunnel barrier rises with bias (Simmons 1963; Brinkman, "
            "Dynes & Rowell 1970)"),
    ),
    temperature_dependence="nearly none: rises a few per cent from 0 to 300 K (x/sin x factor)",
    validity=DIRECT_TUNNELLING_VALIDITY,
)

FOWLER_NORDHEIM = Mechanism(
    id="fowler_nordheim",
    family="tunnelling",
    name="Fowler-Nordheim tunnelling",
    formula=(
        "J = (a/phi)(m0/m*) E^2 exp(-b sqrt(m*/m0) phi^(3/2)/E) * x/sin(x);  E = V/d,"
        "  x = pi c kT,  c = (3/2) b sqrt(m*/m0) phi^(1/2)/E,  a = e^3/(8 pi h),"
        "  b = (8 pi/3) sqrt(2 m0)/(e h);  valid for eV > phi, x <= 1"
    ),
    source=(
        "Lenzlinger & Snow, J. Appl. Phys. 40, 278 (1969) (with the m0/m* prefactor); "
        "temperature factor: Murphy & Good, Phys. Rev. 102, 1464 (1956); "
        "constants: Forbes & Deane, Proc. R. Soc. A 463, 2907 (2007)"
    ),
    parameters=(_barrier(0.5, 3.0), _thickness(1.0, 100.0, 8.0), _MASS),
    magnitude=_fowler_nordheim_current,
    plots=(FOWLER_NORDHEIM_PLOT,),
    # Needs the device thickness and effective mass (else the plot gives only a barrier
    # assuming m* = m0, which is not this parameter).
    estimates=(PlotEstimate("barrier_height_eV", "fowler_nordheim_plot"),),
    checks=(
        NearlyTemperatureIndependent(),
        # Smallest R^2 counted as straight and the barrier range [common practice].
        StraightPlot("fowler_nordheim_plot", 0.99),
        QuantityInRange("fowler_nordheim_plot",
                        ("barrier_height_eV", "barrier_height_assuming_unit_mass_eV"),
                        0.5, 5.0, name="fowler_nordheim_barrier_in_range",
                        parameter="barrier_height_eV"),
        TunnellingRegime("fowler_nordheim"),
    ),
    temperature_dependence="weak: rises slowly with temperature (pi c kT/sin(pi c kT) factor)",
    validity=FOWLER_NORDHEIM_VALIDITY,
)


# --------------------------------------------------------------------------------------
# Direct tunnelling between dissimilar electrodes: Brinkman, Dynes & Rowell (1970)
# --------------------------------------------------------------------------------------

#: Largest second-order term (9/128)(A0^2/phibar)(eV)^2 of the BDR conductance at which the
#: low-bias expansion is used (ours, measured against the exact WKB integral of the trapezoid
#: at T = 0, E_F = 5.5 eV, phibar 0.5-3 eV, d 1-3 nm, dphi/phibar 0.2-0.5: at 0.5 the
#: conductance is within 7.5 % and the current within 1.5 % of WKB, at 0.25 within 1.7 %).
BDR_MAX_QUADRATIC_TERM = 0.5


def bdr_decay_coefficient(thickness_nm: ArrayLike, effective_mass_ratio: ArrayLike) -> FloatArray:
    """BDR's ``A0 = 4 d sqrt(2 m*)/(3 hbar)`` in eV^-1/2 (energies in eV).

    Parameters
    ----------
    thickness_nm : array_like
        Barrier thickness ``d`` in nm.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.

    Returns
    -------
    ndarray
        ``A0``, two thirds of Simmons' ``A`` (:func:`simmons_decay_coefficient`): 10.2463
        eV^-1/2 at d = 1.5 nm, m* = m0 (Brinkman, Dynes & Rowell, J. Appl. Phys. 41, 1915
        (1970); value from the physics sheet's independent evaluation).
    """
    return (4.0 / 3.0 * WKB_KAPPA_PER_NM_SQRT_EV * np.sqrt(np.asarray(effective_mass_ratio,
                                                                    dtype=float))
            * np.asarray(thickness_nm, dtype=float))


def bdr_conductance_coefficients(
    mean_barrier_eV: ArrayLike, barrier_difference_eV: ArrayLike, thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """Linear and quadratic coefficients of the BDR conductance ``G(V)/G(0) = 1 + c1 V + c2 V^2``.

    Parameters
    ----------
    mean_barrier_eV : array_like
        Mean barrier height ``phibar = (phi1 + phi2)/2`` in eV.
    barrier_difference_eV : array_like
        ``dphi = phi2 - phi1`` in eV, where ``phi1`` is the barrier at the electrode that
        injects at positive bias and ``phi2`` the one at the other electrode.
    thickness_nm, effective_mass_ratio : array_like
        As in :func:`bdr_decay_coefficient`.

    Returns
    -------
    c1, c2 : ndarray
        ``c1 = -A0 dphi/(16 phibar^(3/2))`` in 1/V and ``c2 = (9/128) A0^2/phibar`` in
        1/V^2 (Brinkman, Dynes & Rowell, J. Appl. Phys. 41, 1915 (1970); the form as
        quoted on the physics sheet, from memory, equation number not checked).

    Notes
    -----
    The sign convention was fixed here against the exact WKB integral of the trapezoidal
    barrier (tests/test_dissimilar_tunnelling.py): with ``dphi > 0`` (the electrode injecting
    at negative bias has the higher barrier) the conductance is lower at positive bias and
    its minimum lies at ``V > 0``. Equivalently, more current flows when the electrode with
    the lower barrier is biased positively, as Simmons found for dissimilar electrodes at
    low voltage (J. Appl. Phys. 34, 2581 (1963), abstract checked).
    """
    phibar = np.asarray(mean_barrier_eV, dtype=float)
    a0 = bdr_decay_coefficient(thickness_nm, effective_mass_ratio)
    c1 = -a0 * np.asarray(barrier_difference_eV, dtype=float) / (16.0 * phibar**1.5)
    c2 = 9.0 / 128.0 * a0**2 / phibar
    return c1, c2


def bdr_zero_bias_conductance_S_per_m2(
    mean_barrier_eV: ArrayLike, thickness_nm: ArrayLike, effective_mass_ratio: ArrayLike
) -> FloatArray:
    """BDR zero-bias conductance per area, ``(e/h)^2 sqrt(2 m* phibar)/d exp(-(3/2) A0 sqrt(phibar))``.

    Parameters
    ----------
    mean_barrier_eV, thickness_nm, effective_mass_ratio : array_like
        As in :func:`bdr_conductance_coefficients`.

    Returns
    -------
    ndarray
        G(0) in S/m^2. BDR write it ``3.16e10 (phibar^1/2/d) exp(-1.025 d phibar^1/2)``
        S/cm^2 (d in Angstrom, phibar in V, free-electron mass; Brinkman, Dynes & Rowell
        1970, constants from memory; the sheet recomputes 3.15881e10 and 1.024633). It is
        the ohmic limit of Simmons' low-voltage formula
        (:func:`simmons_low_bias_current_density_A_per_m2`) with the mean barrier.
    """
    return simmons_low_bias_current_density_A_per_m2(1.0, mean_barrier_eV, thickness_nm,
                                                     effective_mass_ratio)


def bdr_current_density_A_per_m2(
    voltage_V: ArrayLike, mean_barrier_eV: ArrayLike, barrier_difference_eV: ArrayLike,
    thickness_nm: ArrayLike, effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Current density of the BDR conductance integrated from zero bias, T = 0 (signed).

    Parameters
    ----------
    voltage_V : array_like
        Signed bias in V.
    mean_barrier_eV, barrier_difference_eV, thickness_nm, effective_mass_ratio : array_like
        As in :func:`bdr_conductance_coefficients`.

    Returns
    -------
    ndarray
        ``J = G(0) (V + c1 V^2/2 + c2 V^3/3)`` in A/m^2, the integral of
        ``G(V) = G(0)(1 + c1 V + c2 V^2)`` (Brinkman, Dynes & Rowell 1970) from 0 to V. Not
        odd in V when ``dphi != 0``. The bare expansion: it holds at low bias only, which the
        declaration :data:`DISSIMILAR_ELECTRODE_TUNNELLING` enforces.
    """
    v = np.asarray(voltage_V, dtype=float)
    c1, c2 = bdr_conductance_coefficients(mean_barrier_eV, barrier_difference_eV, thickness_nm,
                                          effective_mass_ratio)
    g0 = bdr_zero_bias_conductance_S_per_m2(mean_barrier_eV, thickness_nm, effective_mass_ratio)
    return g0 * v * (1.0 + v * (c1 / 2.0 + c2 * v / 3.0))


def bdr_conductance_minimum_V(
    mean_barrier_eV: ArrayLike, barrier_difference_eV: ArrayLike, thickness_nm: ArrayLike,
    effective_mass_ratio: ArrayLike,
) -> FloatArray:
    """Bias of the BDR conductance minimum, ``-c1/(2 c2) = 4 dphi/(9 A0 sqrt(phibar))`` in V.

    Derived from the BDR parabola (Brinkman, Dynes & Rowell 1970); 0.0153357 V at
    d = 1.5 nm, phibar = 2 eV, dphi = 0.5 eV (physics sheet, independent evaluation).
    """
    c1, c2 = bdr_conductance_coefficients(mean_barrier_eV, barrier_difference_eV, thickness_nm,
                                          effective_mass_ratio)
    return -c1 / (2.0 * c2)


def bdr_relative_asymmetry(linear_per_V: ArrayLike, quadratic_per_V2: ArrayLike) -> FloatArray:
    """``dphi/phibar = -3 sqrt(2) c1/sqrt(c2)`` from a measured conductance parabola.

    Parameters
    ----------
    linear_per_V, quadratic_per_V2 : array_like
        ``c1`` and ``c2`` of ``G(V)/G(0) = 1 + c1 V + c2 V^2``.

    Returns
    -------
    ndarray
        The barrier asymmetry relative to the mean barrier (sign as in
        :func:`bdr_conductance_coefficients`); NaN where ``c2 <= 0``. Follows from BDR's two
        coefficients by eliminating ``A0``: ``c1/sqrt(c2) = -(dphi/phibar) sqrt(128/9)/16``
        (derived here; needs neither the thickness nor the mass).
    """
    c2 = np.asarray(quadratic_per_V2, dtype=float)
    root = np.sqrt(np.where(c2 > 0, c2, np.nan))
    return -3.0 * np.sqrt(2.0) * np.asarray(linear_per_V, dtype=float) / root


def _dissimilar_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    mean_barrier_eV: FloatArray,
    barrier_difference_eV: FloatArray,
    thickness_nm: FloatArray,
    effective_mass_ratio: FloatArray,
) -> FloatArray:
    """Signed I in A: BDR current density x Simmons (1964) factor at |V| x area."""
    density = bdr_current_density_A_per_m2(voltage_V, mean_barrier_eV, barrier_difference_eV,
                                           thickness_nm, effective_mass_ratio)
    factor = simmons_thermal_factor(np.abs(voltage_V), temperature_K, mean_barrier_eV,
                                    thickness_nm, effective_mass_ratio)
    return density * factor * _A_PER_M2_TO_A_PER_CM2 * device.require_area()


def _relative_barrier_difference(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    mean_barrier_eV: FloatArray, barrier_difference_eV: FloatArray,
    thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """``|dphi|/phibar`` (a parameter-only quantity)."""
    return np.abs(barrier_difference_eV) / mean_barrier_eV + 0.0 * voltage_V


def _bdr_opacity(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    mean_barrier_eV: FloatArray, barrier_difference_eV: FloatArray,
    thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """Simmons' exponent ``A sqrt(phibar) = (3/2) A0 sqrt(phibar)`` at zero bias."""
    return (1.5 * bdr_decay_coefficient(thickness_nm, effective_mass_ratio)
            * np.sqrt(mean_barrier_eV) + 0.0 * voltage_V)


def _bdr_quadratic_term(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    mean_barrier_eV: FloatArray, barrier_difference_eV: FloatArray,
    thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """The second-order term ``c2 V^2 = (9/128)(A0^2/phibar)(eV)^2`` of G(V)/G(0)."""
    _, c2 = bdr_conductance_coefficients(mean_barrier_eV, barrier_difference_eV, thickness_nm,
                                         effective_mass_ratio)
    return c2 * np.asarray(voltage_V, dtype=float) ** 2


def _bdr_thermal_argument(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    mean_barrier_eV: FloatArray, barrier_difference_eV: FloatArray,
    thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
) -> FloatArray:
    """``pi B kT`` of the Simmons (1964) factor with the mean barrier at |V|."""
    coefficient = simmons_thermal_coefficient(np.abs(voltage_V), mean_barrier_eV, thickness_nm,
                                              effective_mass_ratio)
    return np.pi * coefficient * BOLTZMANN_EV * temperature_K


#: Where the BDR low-bias conductance (with the Simmons 1964 factor) holds.
DISSIMILAR_ELECTRODE_VALIDITY = (
    ValidityCondition(
        id="barrier_asymmetry_below_mean",
        quantity="|dphi|/phibar (barrier difference over mean barrier)",
        limit=1.0,
        bound="upper",
        reason=(
            "Brinkman, Dynes & Rowell (1970) expand the trapezoidal barrier about its mean and "
            "state their result for dphi/phibar < 1 (from memory); beyond it one barrier would "
            "be negative at zero bias"
        ),
        evaluate=_relative_barrier_difference,
    ),
    ValidityCondition(
        id="opaque_barrier",
        quantity="A sqrt(phibar) (Simmons exponent at zero bias)",
        limit=SIMMONS_MIN_EXPONENT,
        bound="lower",
        reason=(
            "the BDR zero-bias conductance is the leading order of the WKB integral in "
            "1/(A sqrt(phibar)) (Simmons 1963); below the limit the neglected order is more than "
            "half of it (the direct-tunnelling limit, ours)"
        ),
        evaluate=_bdr_opacity,
    ),
    ValidityCondition(
        id="low_bias_expansion",
        quantity="c2 V^2 (second-order term of the BDR conductance)",
        limit=BDR_MAX_QUADRATIC_TERM,
        bound="upper",
        reason=(
            "the BDR conductance is a low-bias expansion (Brinkman, Dynes & Rowell 1970); "
            "beyond the limit (ours, measured against the exact WKB integral) the parabola "
            "departs from the trapezoidal-barrier conductance by more than 7.5 %"
        ),
        evaluate=_bdr_quadratic_term,
    ),
    _thermal_argument_condition(_bdr_thermal_argument, "Simmons 1964"),
)

DISSIMILAR_ELECTRODE_TUNNELLING = Mechanism(
    id="dissimilar_electrode_tunnelling",
    family="tunnelling",
    name="Direct tunnelling between dissimilar electrodes (Brinkman-Dynes-Rowell)",
    formula=(
        "J = G0 [V + c1 V^2/2 + c2 V^3/3] * x/sin(x);  G0 = (e/h)^2 sqrt(2 m* phibar)/d"
        " exp(-(3/2) A0 sqrt(phibar)),  c1 = -A0 dphi/(16 phibar^(3/2)),"
        "  c2 = (9/128) A0^2/phibar,  A0 = 4 d sqrt(2 m*)/(3 hbar),"
        "  dphi = phi(electrode injecting at V<0) - phi(electrode injecting at V>0),"
        "  x = pi B kT (Simmons 1964, mean barrier);"
        "  valid for |dphi| <= phibar, (3/2) A0 sqrt(phibar) >= 4, c2 V^2 <= 0.5, x <= 1"
    ),
    source=(
        "Brinkman, Dynes & Rowell, J. Appl. Phys. 41, 1915 (1970) (trapezoidal barrier, "
        "low-bias conductance, integrated here from zero bias); temperature factor: Simmons, "
        "J. Appl. Phys. 35, 2655 (1964) (the combination is ours); polarity dependence "
        "between dissimilar electrodes: Simmons, J. Appl. Phys. 34, 2581 (1963)"
    ),
    parameters=(
        Parameter(
            name="mean_barrier_eV", unit="eV", symbol="phibar",
            description="mean of the two electrodes' tunnel barriers (phi1 + phi2)/2",
            lower=0.1, upper=5.0, typical=2.0, sample_in_log=True,
        ),
        Parameter(
            name="barrier_difference_eV", unit="eV", symbol="dphi",
            description=(
                "barrier of the electrode injecting at negative bias minus that of the "
                "electrode injecting at positive bias (positive: the conductance minimum "
                "lies at V > 0)"),
            lower=-1.5, upper=1.5, typical=0.3,
        ),
        # BDR state their result for d > ~1 nm (from memory): the box starts there.
        _thickness(1.0, 20.0, 2.0),
        _MASS,
    ),
    signed_current=_dissimilar_current,
    plots=(LOW_BIAS_CONDUCTANCE_PLOT,),
    checks=(
        NearlyTemperatureIndependent(),
        TunnellingRegime("direct"),
        PositiveQuantity(
            "low_bias_conductance_plot", "cubic_coefficient_per_V2",
            "the conductance of a tunnel barrier rises with bias (Brinkman, Dynes & Rowell "
            "1970)"),
    ),
    temperature_dependence="nearly none: rises a few per cent from 0 to 300 K (x/sin x factor)",
    validity=DISSIMILAR_ELECTRODE_VALIDITY,
    # Not "polarities_differ": in the BDR regime |I(-V)/I(+V)| stays within a few per cent to
    # tens of per cent of 1 (below the diagnostic's factor 1.5), yet the fit resolves it.
    needs=("both_polarities",),
)
