"""Thermionic emission over a Schottky contact (a rectifying diode), as three hypotheses.

The current of a metal-semiconductor contact is not odd in V: forward bias lowers the
barrier seen from the semiconductor, reverse bias leaves the saturation current. The three
declarations here are therefore written as signed formulas (``Mechanism.signed_current``):

* :data:`SCHOTTKY_DIODE` -- thermionic emission with a constant ideality factor, series and
  shunt resistance (Sze & Ng 2007; Rhoderick & Williams 1988);
* :data:`INHOMOGENEOUS_SCHOTTKY_DIODE` -- the same diode with a Gaussian distribution of
  barrier heights (Werner & Guettler 1991): apparent barrier and ideality follow from the
  mean barrier, its variance and the two voltage coefficients. The variance sigma^2, not
  sigma, is the declared parameter: it enters linearly (``phi_ap = phibar - e sigma^2/2kT``),
  so the ridge along which ``phibar``, ``sigma^2`` and ``ln A**`` trade off in ``ln I_s`` is
  straight for the ensemble sampler (with sigma it is curved; measured on a simulated
  homogeneous series at 200-400 K, the sigma-parametrised quick fit stalled 7 nats below the
  best log-likelihood, the sigma^2 one reached it);
* :data:`LATERAL_2D_SCHOTTKY_DIODE` -- thermionic injection across a lateral Schottky contact
  to a two-dimensional material, saturation current scaling as ``T^{3/2}``
  (Ang, Yang & Ang 2018).

Every formula is a public function of this module:

* :func:`lambert_w_from_log` -- principal branch ``W0(z)`` from ``ln z`` (no overflow)
* :func:`diode_current_A` -- the implicit diode law with ``R_s`` and ``R_sh``, solved in
  closed form with the Lambert W function (Jain & Kapoor 2004)
* :func:`richardson_constant_A_cm2_K2` -- ``A** = A0 m*/m0``
* :func:`thermionic_saturation_current_A`, :func:`lateral_2d_saturation_current_A`
* :func:`inhomogeneous_apparent_barrier_eV`, :func:`inhomogeneous_ideality_factor`,
  :func:`barrier_sd_from_two_temperatures_V` (Werner & Guettler 1991)

Units: energies in eV, temperatures in K, resistances in ohm, currents in A. The barrier
standard deviation ``sigma`` is in V (the spread of ``e phi`` is ``e sigma``), as in the source.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
from numpy.typing import ArrayLike
from scipy import special

from mechid.catalogue.base import FloatArray, Mechanism, Parameter
from mechid.catalogue.checks import DiodeEstimate, ThermallyActivated
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import BOLTZMANN_EV, RICHARDSON_A_CM2_K2
from mechid.device import Device

#: Above this ``ln z`` the Lambert W start value is the asymptotic series (``exp`` of it
#: would approach overflow); below it, scipy's ``lambertw`` of ``exp(ln z)``.
_ASYMPTOTIC_LOG_Z = 50.0
#: Below this ``ln z``, ``W(z) = z`` to double precision (``z^2`` is under one ulp of ``z``)
#: and ``exp`` underflows soon after.
_TINY_LOG_Z = -40.0
#: Newton steps on ``u + e^u = ln z`` (``u = ln W``) polishing the start value; the start is
#: good to ~1e-8 (scipy's tolerance) or ~1e-3 (asymptotic at ln z >= 50), and Newton converges
#: quadratically, so three steps reach the double-precision floor.
_NEWTON_STEPS = 3
#: Newton steps on the implicit law itself for the junction voltage, after the Lambert W
#: start (see :func:`diode_current_from_log_saturation_A`). The start is off by up to
#: ~1e-16 R_s I_s/(nkT/e) (below 0.1 over the declared ranges); the law is convex in the
#: junction voltage with curvature/slope ratio 1, so errors go 0.1 -> 5e-3 -> 1e-5 -> 6e-11
#: -> 2e-21: four steps.
_JUNCTION_NEWTON_STEPS = 4


# --------------------------------------------------------------------------------------
# The Lambert W function from the logarithm of its argument
# --------------------------------------------------------------------------------------


def lambert_w_from_log(log_z: ArrayLike) -> FloatArray:
    """Principal branch ``W0(z)`` of the Lambert W function for ``z = exp(log_z) > 0``.

    Parameters
    ----------
    log_z : array_like
        ``ln z``, any real value (``z`` itself may be far beyond the float range).

    Returns
    -------
    ndarray
        ``w > 0`` with ``w e^w = z``, i.e. ``ln w + w = ln z``.

    Notes
    -----
    ``W`` is the inverse of ``w e^w`` (Corless et al., Adv. Comput. Math. 5, 329 (1996)).
    Forward-biased diodes give ``ln z`` of several thousand, so ``z`` is never formed: the
    equation ``u + e^u = ln z`` for ``u = ln w`` is solved by Newton's method from
    ``u0 = ln W0(exp(ln z))`` (:func:`scipy.special.lambertw`) for moderate ``ln z``, or from
    the asymptotic ``w0 = L - ln L + ln L/L`` (``L = ln z``, Corless et al. eq. 4.19) for
    large ``ln z``. For ``ln z`` below -40, ``W(z) = z`` to double precision.
    The function ``u + e^u - ln z`` is increasing and convex, so Newton converges from any
    start to the right of the root and quadratically near it.
    """
    log_z = np.asarray(log_z, dtype=float)
    large = log_z > _ASYMPTOTIC_LOG_Z
    tiny = log_z < _TINY_LOG_Z
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        moderate = np.where(large | tiny, 0.0, log_z)
        w_moderate = special.lambertw(np.exp(moderate)).real
        big = np.where(large, log_z, _ASYMPTOTIC_LOG_Z + 1.0)
        ln_big = np.log(big)
        w_large = big - ln_big + ln_big / big
        u = np.where(large, np.log(w_large), np.log(w_moderate))
        u = np.where(tiny, log_z, u)
        for _ in range(_NEWTON_STEPS):
            e_u = np.exp(u)
            u = u - (u + e_u - log_z) / (1.0 + e_u)
        return np.where(tiny, np.exp(log_z), np.exp(u))


# --------------------------------------------------------------------------------------
# The diode law with series and shunt resistance
# --------------------------------------------------------------------------------------


def diode_current_A(
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    saturation_current_A: ArrayLike,
    ideality_factor: ArrayLike,
    series_resistance_ohm: ArrayLike,
    shunt_resistance_ohm: ArrayLike,
) -> FloatArray:
    """Current of a diode with series and shunt resistance, solved in closed form.

    Parameters
    ----------
    voltage_V : array_like
        Terminal bias in V, either sign (forward positive).
    temperature_K : array_like
        Temperature in K.
    saturation_current_A : array_like
        ``I_s > 0`` in A.
    ideality_factor : array_like
        ``n > 0``.
    series_resistance_ohm, shunt_resistance_ohm : array_like
        ``R_s > 0`` and ``R_sh > 0`` in ohm (``R_sh = inf`` is no shunt).

    Returns
    -------
    ndarray
        ``I`` in A, the root of the implicit equation (Sze & Ng, Physics of Semiconductor
        Devices, 3rd ed. 2007, metal-semiconductor contacts; Rhoderick & Williams,
        Metal-Semiconductor Contacts, 2nd ed. 1988)

        .. math::

            I = I_s\\Big[\\exp\\frac{e(V - I R_s)}{n k T} - 1\\Big] + \\frac{V - I R_s}{R_{sh}}.

    Notes
    -----
    With ``a = n k T/e`` the equation has the explicit solution (Jain & Kapoor, Sol. Energy
    Mater. Sol. Cells 81, 269 (2004), their single-diode current with the photocurrent set
    to zero; equation number not checked, the algebra re-derived here and tested against a
    bracketing root solve)

    .. math::

        I = \\frac{V - R_{sh} I_s}{R_s + R_{sh}} + \\frac{a}{R_s} W(z),\\quad
        \\ln z = \\ln\\frac{R_s R_{sh} I_s}{a (R_s + R_{sh})}
                 + \\frac{R_{sh}(V + R_s I_s)}{a (R_s + R_{sh})}.

    Derivation: put ``x = (V - I R_s)/a``; the equation becomes linear in ``I`` plus
    ``I_s e^x``; eliminating ``I`` gives ``(b - x) e^{b - x} = z`` with
    ``b = R_{sh}(V + R_s I_s)/(a(R_s + R_{sh}))``, so ``b - x = W(z)``. ``W`` is evaluated
    from ``ln z`` (:func:`lambert_w_from_log`), so large forward bias, where ``z`` overflows,
    is exact. ``R_sh = inf`` gives the series-resistance-only solution (Banwell & Jayakumar,
    Electron. Lett. 36, 291 (2000)).
    """
    with np.errstate(divide="ignore"):
        log_saturation = np.log(np.asarray(saturation_current_A, dtype=float))
    return diode_current_from_log_saturation_A(voltage_V, temperature_K, log_saturation,
                                               ideality_factor, series_resistance_ohm,
                                               shunt_resistance_ohm)


def diode_current_from_log_saturation_A(
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    log_saturation_current_A: ArrayLike,
    ideality_factor: ArrayLike,
    series_resistance_ohm: ArrayLike,
    shunt_resistance_ohm: ArrayLike,
) -> FloatArray:
    """:func:`diode_current_A` with ``ln I_s`` given instead of ``I_s``.

    At low temperature ``I_s`` underflows (``phi_B/kT > 745``) while ``I_s exp(eV/nkT)`` is
    still a measurable forward current; entering ``ln z`` through ``ln I_s`` keeps it exact.
    Parameters and result as in :func:`diode_current_A`.

    Notes
    -----
    The Lambert W form gives the junction voltage ``x = b - W(z)`` (in units of ``nkT/e``,
    ``b = R_sh (V + R_s I_s)/(a (R_s + R_sh))``). Where the series resistance carries almost
    all of the bias (``R_s I_s >> nkT/e``), ``b`` and ``W`` are large and nearly equal, and
    both ``x`` and the closed-form current lose digits to that cancellation (relative error
    ~ ``1e-16 R_s I_s/V``). Four Newton steps on the implicit law itself,
    ``I_s (e^x - 1) + a x/R_sh = (V - a x)/R_s``, whose terms are all of the size of the
    current, restore them; the current is then read from whichever side of that equation
    does not cancel: ``(V - a x)/R_s`` where the junction takes less than half the bias,
    ``I_s (e^x - 1) + a x/R_sh`` elsewhere.
    """
    v = np.asarray(voltage_V, dtype=float)
    a = ideality_factor * BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    log_i_s = np.asarray(log_saturation_current_A, dtype=float)
    i_s = np.exp(log_i_s)
    r_s = np.asarray(series_resistance_ohm, dtype=float)
    r_sh = np.asarray(shunt_resistance_ohm, dtype=float)
    with np.errstate(invalid="ignore"):  # inf/inf where there is no shunt; replaced
        shunt_share = np.where(np.isinf(r_sh), 1.0, r_sh / (r_s + r_sh))  # R_sh/(R_s + R_sh)
    b = shunt_share * (v + r_s * i_s) / a
    log_z = np.log(r_s * shunt_share / a) + log_i_s + b
    # W(z) = b - x with x = (V - I R_s)/a, the junction voltage in units of nkT/e
    x = b - lambert_w_from_log(log_z)
    for _ in range(_JUNCTION_NEWTON_STEPS):
        forward = np.exp(log_i_s + x)
        residual = (_junction_current(x, forward, i_s) + a * x / r_sh) - (v - a * x) / r_s
        x = x - residual / (forward + a / r_sh + a / r_s)
    series_form = (v - a * x) / r_s
    junction_form = _junction_current(x, np.exp(log_i_s + x), i_s) + a * x / r_sh
    return np.where(np.abs(a * x) <= 0.5 * np.abs(v), series_form, junction_form)


def _junction_current(x: FloatArray, forward: FloatArray, i_s: FloatArray) -> FloatArray:
    """``I_s (e^x - 1)``: ``I_s expm1(x)`` for small ``x``, ``I_s e^x - I_s`` from ``ln I_s``
    for large ``x`` (where ``e^x`` alone would overflow)."""
    with np.errstate(over="ignore", invalid="ignore"):
        return np.where(x < 1.0, i_s * np.expm1(np.minimum(x, 1.0)), forward - i_s)


def diode_residual_A(
    current_A: ArrayLike,
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    saturation_current_A: float,
    ideality_factor: float,
    series_resistance_ohm: float,
    shunt_resistance_ohm: float,
) -> FloatArray:
    """Right-hand side minus left-hand side of the implicit diode law (zero at the solution).

    Parameters as in :func:`diode_current_A`, plus the trial ``current_A``.
    """
    i = np.asarray(current_A, dtype=float)
    junction = np.asarray(voltage_V, dtype=float) - i * series_resistance_ohm
    a = ideality_factor * BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return (saturation_current_A * np.expm1(junction / a) + junction / shunt_resistance_ohm
            - i)


# --------------------------------------------------------------------------------------
# Saturation currents
# --------------------------------------------------------------------------------------


def richardson_constant_A_cm2_K2(effective_mass_ratio: ArrayLike) -> FloatArray:
    """Effective Richardson constant ``A** = A0 m*/m0`` of an isotropic band.

    Parameters
    ----------
    effective_mass_ratio : array_like
        ``m*/m0``.

    Returns
    -------
    ndarray
        ``A**`` in A cm^-2 K^-2, with ``A0 = 4 pi e m0 k^2/h^3`` = 120.17 A cm^-2 K^-2
        (Sze & Ng 2007; without the quantum-reflection and phonon-scattering corrections).
    """
    return RICHARDSON_A_CM2_K2 * np.asarray(effective_mass_ratio, dtype=float)


def thermionic_saturation_current_A(
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    richardson_constant_A_cm2_K2: ArrayLike,
    area_cm2: float,
) -> FloatArray:
    """Saturation current of thermionic emission, ``I_s = A A** T^2 exp(-e phi_B/kT)``.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    barrier_height_eV : array_like
        Barrier height ``phi_B`` in eV (an apparent, temperature-dependent barrier may be
        passed, as for the inhomogeneous contact).
    richardson_constant_A_cm2_K2 : array_like
        Effective Richardson constant ``A**``.
    area_cm2 : float
        Contact area ``A`` in cm^2.

    Returns
    -------
    ndarray
        ``I_s`` in A (Sze & Ng 2007, metal-semiconductor contacts, thermionic-emission theory).
    """
    t = np.asarray(temperature_K, dtype=float)
    exponent = -np.asarray(barrier_height_eV, dtype=float) / (BOLTZMANN_EV * t)
    return area_cm2 * np.asarray(richardson_constant_A_cm2_K2, dtype=float) * t**2 * np.exp(
        exponent)


def log_thermionic_saturation_current_A(
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    richardson_constant_A_cm2_K2: ArrayLike,
    area_cm2: float,
) -> FloatArray:
    """``ln I_s`` of :func:`thermionic_saturation_current_A`, finite where ``I_s`` underflows."""
    t = np.asarray(temperature_K, dtype=float)
    return (np.log(area_cm2 * np.asarray(richardson_constant_A_cm2_K2, dtype=float) * t**2)
            - np.asarray(barrier_height_eV, dtype=float) / (BOLTZMANN_EV * t))


def lateral_2d_saturation_current_A(
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    prefactor_A_per_K1_5: ArrayLike,
) -> FloatArray:
    """Saturation current of a lateral Schottky contact to a 2D material, ``C T^{3/2} e^{-phi/kT}``.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    barrier_height_eV : array_like
        Barrier height ``phi_B`` in eV.
    prefactor_A_per_K1_5 : array_like
        ``C`` in A K^-3/2: the material's 2D thermionic constant times the contact width.

    Returns
    -------
    ndarray
        ``I_s`` in A. Ang, Yang & Ang, Phys. Rev. Lett. 121, 056802 (2018) (abstract checked):
        the reverse saturation current of 2D-material Schottky heterostructures scales as
        ``ln(J/T^beta)`` linear in ``1/T`` with ``beta = 3/2`` for lateral contacts (and
        ``beta = 1`` for vertical ones, not declared here), for a wide range of 2D systems.
        The constant's expression differs between 2D systems, so it is a free parameter.
    """
    t = np.asarray(temperature_K, dtype=float)
    exponent = -np.asarray(barrier_height_eV, dtype=float) / (BOLTZMANN_EV * t)
    return np.asarray(prefactor_A_per_K1_5, dtype=float) * t**1.5 * np.exp(exponent)


def log_lateral_2d_saturation_current_A(
    temperature_K: ArrayLike, barrier_height_eV: ArrayLike, prefactor_A_per_K1_5: ArrayLike,
) -> FloatArray:
    """``ln I_s`` of :func:`lateral_2d_saturation_current_A`, finite where ``I_s`` underflows."""
    t = np.asarray(temperature_K, dtype=float)
    return (np.log(np.asarray(prefactor_A_per_K1_5, dtype=float) * t**1.5)
            - np.asarray(barrier_height_eV, dtype=float) / (BOLTZMANN_EV * t))


# --------------------------------------------------------------------------------------
# Gaussian barrier inhomogeneity (Werner & Guettler 1991)
# --------------------------------------------------------------------------------------


def barrier_lowering_by_spread_eV(temperature_K: ArrayLike, barrier_sd_V: ArrayLike
                                  ) -> FloatArray:
    """Lowering of the apparent barrier by a Gaussian spread, ``e sigma^2/(2kT)``, in eV.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    barrier_sd_V : array_like
        Standard deviation ``sigma`` of the barrier distribution, in V.

    Returns
    -------
    ndarray
        ``sigma^2/(2 kT)`` with ``kT`` in eV (Werner & Guettler 1991, see
        :func:`inhomogeneous_apparent_barrier_eV`).
    """
    sd = np.asarray(barrier_sd_V, dtype=float)
    return sd**2 / (2.0 * BOLTZMANN_EV * np.asarray(temperature_K, dtype=float))


def inhomogeneous_apparent_barrier_eV(
    temperature_K: ArrayLike, mean_barrier_height_eV: ArrayLike, barrier_sd_V: ArrayLike
) -> FloatArray:
    """Apparent (zero-bias) barrier of a contact with a Gaussian barrier distribution.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    mean_barrier_height_eV : array_like
        Mean barrier ``phibar_B`` in eV.
    barrier_sd_V : array_like
        Standard deviation ``sigma`` in V.

    Returns
    -------
    ndarray
        ``phi_ap = phibar_B - e sigma^2/(2kT)`` in eV: averaging ``exp(-e phi/kT)`` over a
        Gaussian of mean ``phibar_B`` and standard deviation ``sigma`` gives
        ``exp(-e phibar_B/kT + e^2 sigma^2/(2 k^2 T^2))``. Werner & Guettler, J. Appl. Phys.
        69, 1522 (1991) (abstract checked; the relation from memory, equation number not
        checked); the Gaussian average is re-derived in the tests by quadrature.
    """
    return np.asarray(mean_barrier_height_eV, dtype=float) - barrier_lowering_by_spread_eV(
        temperature_K, barrier_sd_V)


def inhomogeneous_ideality_factor(
    temperature_K: ArrayLike, voltage_coefficient_rho2: ArrayLike,
    voltage_coefficient_rho3_V: ArrayLike,
) -> FloatArray:
    """Apparent ideality of a Gaussian-inhomogeneous contact, ``1/n - 1 = -rho2 + e rho3/(2kT)``.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    voltage_coefficient_rho2 : array_like
        ``rho2``: change of the mean barrier with bias, ``phibar(V) = phibar(0) + rho2 V``.
    voltage_coefficient_rho3_V : array_like
        ``rho3`` in V: change of the standard deviation with bias,
        ``sigma^2(V) = sigma^2(0) + rho3 V``.

    Returns
    -------
    ndarray
        ``n_ap = 1/(1 - rho2 + rho3/(2 kT))`` with ``kT`` in eV (Werner & Guettler 1991, from
        memory, equation number not checked). Infinite or negative where the denominator is
        not positive; the declaration refuses those points.
    """
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    inverse = 1.0 - np.asarray(voltage_coefficient_rho2, dtype=float) + np.asarray(
        voltage_coefficient_rho3_V, dtype=float) / (2.0 * kT)
    with np.errstate(divide="ignore"):
        return 1.0 / inverse


def barrier_sd_from_two_temperatures_V(
    temperature_1_K: float, apparent_barrier_1_eV: float,
    temperature_2_K: float, apparent_barrier_2_eV: float,
) -> tuple[float, float]:
    """Mean barrier and standard deviation from the apparent barrier at two temperatures.

    Parameters
    ----------
    temperature_1_K, apparent_barrier_1_eV, temperature_2_K, apparent_barrier_2_eV : float
        Two points of ``phi_ap(T)``.

    Returns
    -------
    (float, float)
        ``(phibar_B in eV, sigma in V)``: ``phi_ap`` is linear in ``1/(2kT)`` with slope
        ``-sigma^2`` and intercept ``phibar_B`` (Werner & Guettler 1991, the phi_ap against
        1/(2kT) plot). NaN for sigma when the slope is positive (no Gaussian spread fits).
    """
    x1 = 1.0 / (2.0 * BOLTZMANN_EV * temperature_1_K)
    x2 = 1.0 / (2.0 * BOLTZMANN_EV * temperature_2_K)
    slope = (apparent_barrier_2_eV - apparent_barrier_1_eV) / (x2 - x1)
    intercept = apparent_barrier_1_eV - slope * x1
    return float(intercept), float(np.sqrt(-slope)) if slope <= 0 else float("nan")


# --------------------------------------------------------------------------------------
# Signed formulas of the declarations
# --------------------------------------------------------------------------------------


def _schottky_diode_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, ideality_factor: FloatArray,
    richardson_constant_A_cm2_K2: FloatArray, series_resistance_ohm: FloatArray,
    shunt_resistance_ohm: FloatArray,
) -> FloatArray:
    """Signed I in A of the homogeneous Schottky diode."""
    log_saturation = log_thermionic_saturation_current_A(
        temperature_K, barrier_height_eV, richardson_constant_A_cm2_K2, device.require_area())
    return diode_current_from_log_saturation_A(voltage_V, temperature_K, log_saturation,
                                               ideality_factor, series_resistance_ohm,
                                               shunt_resistance_ohm)


def _inhomogeneous_diode_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    mean_barrier_height_eV: FloatArray, barrier_variance_V2: FloatArray,
    voltage_coefficient_rho2: FloatArray, voltage_coefficient_rho3_V: FloatArray,
    richardson_constant_A_cm2_K2: FloatArray, series_resistance_ohm: FloatArray,
    shunt_resistance_ohm: FloatArray,
) -> FloatArray:
    """Signed I in A of the Gaussian-inhomogeneous Schottky diode."""
    apparent = inhomogeneous_apparent_barrier_eV(temperature_K, mean_barrier_height_eV,
                                                 np.sqrt(barrier_variance_V2))
    ideality = inhomogeneous_ideality_factor(temperature_K, voltage_coefficient_rho2,
                                             voltage_coefficient_rho3_V)
    return _schottky_diode_current(
        voltage_V, temperature_K, device, barrier_height_eV=apparent, ideality_factor=ideality,
        richardson_constant_A_cm2_K2=richardson_constant_A_cm2_K2,
        series_resistance_ohm=series_resistance_ohm, shunt_resistance_ohm=shunt_resistance_ohm)


def _lateral_2d_diode_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, ideality_factor: FloatArray,
    prefactor_A_per_K1_5: FloatArray, series_resistance_ohm: FloatArray,
    shunt_resistance_ohm: FloatArray,
) -> FloatArray:
    """Signed I in A of the lateral 2D-material Schottky diode."""
    log_saturation = log_lateral_2d_saturation_current_A(temperature_K, barrier_height_eV,
                                                         prefactor_A_per_K1_5)
    return diode_current_from_log_saturation_A(voltage_V, temperature_K, log_saturation,
                                               ideality_factor, series_resistance_ohm,
                                               shunt_resistance_ohm)


# --------------------------------------------------------------------------------------
# Validity domain of the inhomogeneous contact
# --------------------------------------------------------------------------------------


def _spread_lowering_fraction(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    mean_barrier_height_eV: FloatArray, barrier_variance_V2: FloatArray, **_: FloatArray,
) -> FloatArray:
    """Share of the mean barrier removed by the spread, ``(e sigma^2/2kT)/phibar``."""
    lowering = barrier_lowering_by_spread_eV(temperature_K, np.sqrt(barrier_variance_V2))
    return lowering / mean_barrier_height_eV


def _apparent_ideality(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    voltage_coefficient_rho2: FloatArray, voltage_coefficient_rho3_V: FloatArray,
    **_: FloatArray,
) -> FloatArray:
    """``n_ap``, NaN where ``1/n_ap <= 0`` (no finite positive ideality)."""
    ideality = inhomogeneous_ideality_factor(temperature_K, voltage_coefficient_rho2,
                                             voltage_coefficient_rho3_V)
    return np.where(ideality > 0, ideality, np.nan)


#: The inhomogeneous-barrier formula holds while a barrier is left and the ideality is >= 1.
INHOMOGENEOUS_VALIDITY = (
    ValidityCondition(
        id="barrier_not_removed_by_spread",
        quantity="e sigma^2/(2 kT phibar) (share of the mean barrier removed by the spread)",
        limit=1.0,
        bound="upper",
        reason=(
            "the Gaussian average of exp(-e phi/kT) lowers the apparent barrier by "
            "e sigma^2/2kT (Werner & Guettler 1991); once that reaches the mean barrier the "
            "apparent barrier is gone and the current would come from the Gaussian's tail "
            "at negative barriers (patches with no barrier), where the model has no meaning"
        ),
        evaluate=_spread_lowering_fraction,
    ),
    ValidityCondition(
        id="ideality_at_least_one",
        quantity="n_ap (apparent ideality factor)",
        limit=1.0,
        bound="lower",
        reason=(
            "thermionic emission over a barrier cannot rise faster than exp(eV/kT), so "
            "n >= 1 (Rhoderick & Williams 1988, from memory); where 1 - rho2 + e rho3/2kT "
            "reaches 0 the Werner & Guettler ideality has no meaning"
        ),
        evaluate=_apparent_ideality,
    ),
)


# --------------------------------------------------------------------------------------
# Declarations
# --------------------------------------------------------------------------------------

#: n in [1, 3]: thermionic emission gives n >= 1 (image-force lowering and interface states
#: push it a little above 1; recombination in the depletion region gives n = 2, Rhoderick &
#: Williams 1988, from memory); apparent values up to ~3 are reported for contacts whose
#: current is partly tunnelling or inhomogeneous, which the other hypotheses describe
#: explicitly. A constant n (no T-dependence) is the plain hypothesis on purpose: the
#: published T-dependences (the T0 effect; Werner & Guettler's n_ap(T); thermionic-field
#: emission) are the competing hypotheses, and folding one into this declaration would make
#: the comparison between them meaningless.
_IDEALITY = Parameter(
    name="ideality_factor", unit="1", symbol="n",
    description="ideality factor, constant in temperature (1 for ideal thermionic emission)",
    lower=1.0, upper=3.0, typical=1.1,
)

_RICHARDSON = Parameter(
    name="richardson_constant_A_cm2_K2", unit="A cm^-2 K^-2", symbol="A**",
    description="effective Richardson constant of the contact",
    lower=1e-3, upper=1e3, typical=30.0, log_scale=True,
    device_prior="richardson_constant_A_cm2_K2",
)

_SERIES = Parameter(
    name="series_resistance_ohm", unit="ohm", symbol="R_s",
    description="series resistance (semiconductor bulk, contacts, leads)",
    lower=1e-2, upper=1e8, typical=10.0, log_scale=True,
)

_SHUNT = Parameter(
    name="shunt_resistance_ohm", unit="ohm", symbol="R_sh",
    description="shunt (parallel leakage) resistance",
    lower=1e2, upper=1e16, typical=1e9, log_scale=True,
)

_BARRIER = Parameter(
    name="barrier_height_eV", unit="eV", symbol="phi_B",
    description="Schottky barrier height at zero bias",
    lower=0.1, upper=2.0, typical=0.7,
)

#: Starting values every diode hypothesis reads from the rectifying-contact analysis
#: (:func:`mechid.screening.diode.start_values`): Cheung's series resistance and the
#: cold reverse branch's shunt.
_RESISTANCE_ESTIMATES = (
    DiodeEstimate("series_resistance_ohm", "series_resistance_ohm"),
    DiodeEstimate("shunt_resistance_ohm", "shunt_resistance_ohm"),
)

_DIODE_FORMULA = (
    "I = I_s [exp(e(V - I R_s)/(n kT)) - 1] + (V - I R_s)/R_sh, solved with the Lambert W "
    "function"
)
_DIODE_SOURCE = (
    "Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (Wiley, 2007), metal-semiconductor "
    "contacts; Rhoderick & Williams, Metal-Semiconductor Contacts, 2nd ed. (Oxford, 1988); "
    "closed form: Jain & Kapoor, Sol. Energy Mater. Sol. Cells 81, 269 (2004)"
)

SCHOTTKY_DIODE = Mechanism(
    id="schottky_diode",
    family="emission",
    name="Schottky diode (thermionic emission)",
    formula=_DIODE_FORMULA + ";  I_s = A A** T^2 exp(-phi_B/kT), n constant",
    source=_DIODE_SOURCE,
    parameters=(_BARRIER, _IDEALITY, _RICHARDSON, _SERIES, _SHUNT),
    estimates=(
        DiodeEstimate("barrier_height_eV", "barrier_height_eV"),
        DiodeEstimate("ideality_factor", "ideality_factor"),
        DiodeEstimate("richardson_constant_A_cm2_K2", "richardson_constant_A_cm2_K2"),
        *_RESISTANCE_ESTIMATES,
    ),
    checks=(ThermallyActivated(),),  # thermionic emission: the saturation current is activated
    needs=("polarities_differ",),  # a rectifier cannot describe polarities that agree
    signed_current=_schottky_diode_current,
    temperature_dependence=(
        "strong: activated saturation current, ln(I_s/T^2) linear in 1/T with slope -phi_B/k; "
        "rectifying (not odd in V)"
    ),
)

def homogeneous_as_inhomogeneous(values: Mapping[str, float]) -> dict[str, float]:
    """A homogeneous diode's parameters as those of the inhomogeneous one (same current).

    With sigma^2 = 0, rho3 = 0 and rho2 = 1 - 1/n, Werner & Guettler's phi_ap = phibar and
    1/n_ap - 1 = -rho2 reduce to the plain diode law with barrier phibar and ideality n.
    """
    return {
        "mean_barrier_height_eV": float(values["barrier_height_eV"]),
        "barrier_variance_V2": 0.0,
        "voltage_coefficient_rho2": 1.0 - 1.0 / float(values["ideality_factor"]),
        "voltage_coefficient_rho3_V": 0.0,
        **{name: float(values[name]) for name in
           ("richardson_constant_A_cm2_K2", "series_resistance_ohm", "shunt_resistance_ohm")},
    }


INHOMOGENEOUS_SCHOTTKY_DIODE = Mechanism(
    id="inhomogeneous_schottky_diode",
    family="emission",
    name="Schottky diode with Gaussian barrier inhomogeneity",
    formula=(
        _DIODE_FORMULA + ";  I_s = A A** T^2 exp(-phi_ap/kT), phi_ap = phibar - e sigma^2/2kT, "
        "1/n_ap - 1 = -rho2 + e rho3/2kT"
    ),
    source=(
        "Werner & Guettler, J. Appl. Phys. 69, 1522 (1991); diode law and closed form as for "
        "schottky_diode (" + _DIODE_SOURCE + ")"
    ),
    parameters=(
        Parameter(
            name="mean_barrier_height_eV", unit="eV", symbol="phibar_B",
            description="mean of the Gaussian barrier distribution at zero bias",
            lower=0.1, upper=2.0, typical=0.8,
        ),
        # sigma <= 0.2 V and |rho3| <= 10 mV: reported barrier spreads are ~0.05-0.15 V and
        # rho3 a few mV, mostly negative (the T0 effect), rho2 a few hundredths to tenths
        # (from memory of Werner & Guettler 1991 and later tabulations, not re-checked); the
        # ranges are kept near those values because wider ones are mostly refused at low T
        # (n_ap < 1 or phi_ap <= 0), which starves the mode search.
        Parameter(
            name="barrier_variance_V2", unit="V^2", symbol="sigma^2",
            description=(
                "variance of the Gaussian barrier distribution (sigma = its square root, "
                "at most 0.2 V)"
            ),
            lower=0.0, upper=0.04, typical=0.0064,
        ),
        Parameter(
            name="voltage_coefficient_rho2", unit="1", symbol="rho2",
            description="bias coefficient of the mean barrier, d phibar/dV",
            lower=-0.5, upper=0.5, typical=0.05,
        ),
        Parameter(
            name="voltage_coefficient_rho3_V", unit="V", symbol="rho3",
            description="bias coefficient of the barrier variance, d sigma^2/dV",
            lower=-0.01, upper=0.01, typical=-0.002,
        ),
        _RICHARDSON, _SERIES, _SHUNT,
    ),
    estimates=(
        DiodeEstimate("mean_barrier_height_eV", "gaussian_mean_barrier_eV"),
        DiodeEstimate("barrier_variance_V2", "gaussian_barrier_variance_V2"),
        DiodeEstimate("voltage_coefficient_rho2", "rho2"),
        DiodeEstimate("voltage_coefficient_rho3_V", "rho3_V"),
        DiodeEstimate("richardson_constant_A_cm2_K2", "gaussian_richardson_constant_A_cm2_K2"),
        *_RESISTANCE_ESTIMATES,
    ),
    checks=(ThermallyActivated(),),  # thermionic emission: the saturation current is activated
    needs=("polarities_differ",),  # a rectifier cannot describe polarities that agree
    signed_current=_inhomogeneous_diode_current,
    temperature_dependence=(
        "strong: apparent barrier falls and ideality rises on cooling; ln(I_s/T^2) "
        "+ e^2 sigma^2/(2k^2T^2) linear in 1/T with slope -phibar/k"
    ),
    validity=INHOMOGENEOUS_VALIDITY,
    contains={"schottky_diode": homogeneous_as_inhomogeneous},
)

LATERAL_2D_SCHOTTKY_DIODE = Mechanism(
    id="lateral_2d_schottky_diode",
    family="emission",
    name="Lateral Schottky contact to a 2D material (T^3/2 thermionic injection)",
    formula=_DIODE_FORMULA + ";  I_s = C T^(3/2) exp(-phi_B/kT), n constant",
    source=(
        "Ang, Yang & Ang, Phys. Rev. Lett. 121, 056802 (2018) (lateral 2D Schottky "
        "heterostructures: ln(J/T^(3/2)) linear in 1/T); diode law and closed form as for "
        "schottky_diode"
    ),
    parameters=(
        _BARRIER, _IDEALITY,
        Parameter(
            name="prefactor_A_per_K1_5", unit="A K^-3/2", symbol="C",
            description="2D thermionic constant times the contact width",
            lower=1e-16, upper=1e2, typical=1e-6, log_scale=True,
        ),
        _SERIES, _SHUNT,
    ),
    # The barrier is not read from the T^2 Richardson plot: its slope differs by kT/2.
    estimates=(DiodeEstimate("ideality_factor", "ideality_factor"), *_RESISTANCE_ESTIMATES),
    checks=(ThermallyActivated(),),  # thermionic emission: the saturation current is activated
    needs=("polarities_differ",),  # a rectifier cannot describe polarities that agree
    signed_current=_lateral_2d_diode_current,
    needs_area=False,
    temperature_dependence=(
        "strong: activated saturation current, ln(I_s/T^(3/2)) linear in 1/T with slope "
        "-phi_B/k; rectifying (not odd in V)"
    ),
)
