"""Space-charge-limited current (SCLC): Mott-Gurney with shallow traps, Mark-Helfrich traps.

Every formula the declarations use is a public function of this module:

* :func:`mott_gurney_current_density_A_per_m2` -- trap-free SCLC (Mott & Gurney 1940)
* :func:`shallow_trap_factor` -- Lampert's ``theta = (N_c/N_t) exp(-E_t/kT)`` (Lampert 1956)
* :func:`mark_helfrich_current_density_A_per_m2` -- exponential trap distribution
  (Mark & Helfrich 1962)
* :func:`trap_filled_limit_voltage_V` -- Lampert's ``V_TFL = e N_t d^2/(2 eps0 eps_r)``
* :func:`ohmic_to_sclc_crossover_voltage_V` -- where Mott-Gurney overtakes the ohmic current

Identifiability. With shallow traps the current is ``(9/8) eps0 eps_r mu theta V^2/d^3``:
``eps_r``, ``mu`` and ``N_c/N_t`` enter only as the product ``eps_r mu N_c/N_t``, so the
shallow-trap declaration samples that product as one parameter
(``permittivity_mobility_prefactor_cm2_per_Vs``); the trap depth ``E_t`` is identified by the
temperature dependence. In the Mark-Helfrich law ``mu N_c`` is one product and ``eps_r``,
``N_t`` and ``d`` enter as ``eps_r/(N_t d^2)`` and ``mu N_c/d``; the thickness comes from the
device description (Gaussian prior) and ``eps_r`` from the device's static permittivity when
given, otherwise only ``eps_r/N_t`` is determined (a straight ridge in log coordinates).

* :func:`single_trap_level_current_density_A_per_m2` -- Lampert's single trap level across
  the trap-limited square law, the trap-filled-limit rise and the trap-free square law

Trap-filled limit. For one discrete trap level in equilibrium with the band, drift only and
an injecting contact, Lampert's equations (current ``J = e mu n E``, Poisson
``eps dE/dx = e (n + n_t)``, occupancy ``n_t = N_t n/(n + n_1)``) integrate in closed form
along the film; :func:`single_trap_level_current_density_A_per_m2` gives the result in the
collecting-end density and inverts it. It tends to the shallow-trap law ``theta``-times
Mott-Gurney at low bias, rises at Lampert's ``V_TFL`` (vertically in the deep-trap limit)
and tends to Mott-Gurney above it; the thermal free carriers (the ohmic regime below both)
are not in it, so the catalogue pairs it with an ohmic leak
(:mod:`mechid.catalogue.combinations`).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from mechid.catalogue.base import (
    FloatArray,
    Mechanism,
    Parameter,
    PlotRegime,
    StraightenedPlot,
    iv_magnitudes,
    positive_or_nan,
)
from mechid.catalogue.checks import (
    InterceptNotActivated,
    PlotEstimate,
    QuantityInRange,
    ThermallyActivated,
    VoltageInsideSweep,
)
from mechid.catalogue.roots import rising_root_with_slope
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import BOLTZMANN_EV, ELEMENTARY_CHARGE, VACUUM_PERMITTIVITY
from mechid.device import Device, Measured

_NM_TO_M = 1e-9
_CM2_TO_M2 = 1e-4
_PER_CM3_TO_PER_M3 = 1e6
_PER_CM_TO_PER_M = 1e2

#: Smallest eV/kT at which the drift-only SCLC laws are used: Mott-Gurney and Mark-Helfrich
#: neglect diffusion, which is justified only for biases well above kT/e (common practice;
#: the factor 10 is our threshold).
DRIFT_ONLY_MIN_BIAS_KT = 10.0

#: Tolerance on ln V of the single-trap-level root search: 1e-12 keeps ln J exact to
#: 1e-9 even on the steepest rise seen (d ln J/d ln V of a few hundred).
_SINGLE_LEVEL_TOLERANCE = 1e-12


def mott_gurney_current_density_A_per_m2(
    voltage_V: ArrayLike, thickness_nm: ArrayLike, dielectric_constant: ArrayLike,
    mobility_cm2_per_Vs: ArrayLike,
) -> FloatArray:
    """Trap-free space-charge-limited current density ``(9/8) eps0 eps_r mu V^2/d^3``.

    Parameters
    ----------
    voltage_V : array_like
        Bias in V.
    thickness_nm : array_like
        Film thickness ``d`` in nm.
    dielectric_constant : array_like
        Static relative permittivity ``eps_r``.
    mobility_cm2_per_Vs : array_like
        Carrier mobility in cm^2/(V s) (times ``theta`` for shallow traps).

    Returns
    -------
    ndarray
        Current density in A/m^2 (Mott & Gurney, Electronic Processes in Ionic Crystals,
        Oxford 1940; single carrier, ohmic injecting contact, no diffusion; Lampert, Phys.
        Rev. 103, 1648 (1956) for the shallow-trap factor; equation numbers not checked).
    """
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    mu_m2 = np.asarray(mobility_cm2_per_Vs, dtype=float) * _CM2_TO_M2
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    return 9.0 / 8.0 * eps * mu_m2 * np.asarray(voltage_V, dtype=float) ** 2 / d_m**3


def shallow_trap_factor(
    temperature_K: ArrayLike, trap_depth_eV: ArrayLike, band_to_trap_density_ratio: ArrayLike
) -> FloatArray:
    """Lampert's free-to-trapped ratio ``theta = (N_c/N_t) exp(-E_t/kT)`` (dimensionless).

    Lampert, Phys. Rev. 103, 1648 (1956) (from memory; also Lampert & Mark, Current
    Injection in Solids, 1970): the share of injected carriers that stay free when a single
    shallow trap level lies ``E_t`` below the band edge; valid while ``theta << 1``.
    """
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return np.asarray(band_to_trap_density_ratio, dtype=float) * np.exp(
        -np.asarray(trap_depth_eV, dtype=float) / kT
    )


def mark_helfrich_current_density_A_per_m2(
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    thickness_nm: ArrayLike,
    dielectric_constant: ArrayLike,
    characteristic_trap_temperature_K: ArrayLike,
    trap_density_per_cm3: ArrayLike,
    mobility_band_density_per_V_s_cm: ArrayLike,
) -> FloatArray:
    """SCLC with an exponential trap distribution (Mark & Helfrich 1962).

    Parameters
    ----------
    voltage_V, temperature_K : array_like
        Bias in V and temperature in K.
    thickness_nm : array_like
        Film thickness ``d`` in nm.
    dielectric_constant : array_like
        Static relative permittivity ``eps_r``.
    characteristic_trap_temperature_K : array_like
        ``T_t`` of the trap distribution ``N(E) = (N_t/kT_t) exp(-E/kT_t)``.
    trap_density_per_cm3 : array_like
        Total trap density ``N_t`` in cm^-3.
    mobility_band_density_per_V_s_cm : array_like
        ``mu N_c`` in (cm^2/(V s)) cm^-3 = 1/(V s cm).

    Returns
    -------
    ndarray
        Current density in A/m^2.

    Notes
    -----
    Mark & Helfrich, J. Appl. Phys. 33, 205 (1962), with ``l = T_t/T``:

    .. math::

        J = e^{1-l} \\mu N_c \\Big(\\frac{\\varepsilon l}{N_t (l+1)}\\Big)^l
            \\Big(\\frac{2l+1}{l+1}\\Big)^{l+1} \\frac{V^{l+1}}{d^{2l+1}}

    (prefactor from memory, in the form widely reproduced; it could not be checked against
    the paper. It is dimensionally consistent -- A/m^2 for every l -- and for l -> 0 it tends
    to ``e mu N_c V/d``, the ohmic current of the band density, both checked in the tests).
    Evaluated in logarithms. The law needs ``l > 1`` (a trap tail broader than kT) and a bias
    below the trap-filled limit (:func:`trap_filled_limit_voltage_V`), where the bracket
    ``eps l V/(e N_t (l+1) d^2)`` stays below 1/2; the declaration refuses points with
    ``T > T_t`` or ``V > V_TFL``. Beyond ``V_TFL`` the formula grows without bound as
    ``(V/V_TFL)^l`` (it overflows at low T), which is why it is not used there.
    """
    t = np.asarray(temperature_K, dtype=float)
    ell = np.asarray(characteristic_trap_temperature_K, dtype=float) / t
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    n_t = np.asarray(trap_density_per_cm3, dtype=float) * _PER_CM3_TO_PER_M3
    mu_nc = np.asarray(mobility_band_density_per_V_s_cm, dtype=float) * _PER_CM_TO_PER_M
    v = np.asarray(voltage_V, dtype=float)
    log_j = (
        (1.0 - ell) * np.log(ELEMENTARY_CHARGE)
        + np.log(mu_nc)
        + ell * np.log(eps * ell / (n_t * (ell + 1.0)))
        + (ell + 1.0) * np.log((2.0 * ell + 1.0) / (ell + 1.0))
        + (ell + 1.0) * np.log(v)
        - (2.0 * ell + 1.0) * np.log(d_m)
    )
    return np.exp(log_j)


def trap_filled_limit_voltage_V(
    trap_density_per_cm3: ArrayLike, thickness_nm: ArrayLike, dielectric_constant: ArrayLike
) -> FloatArray:
    """Lampert's trap-filled-limit voltage ``V_TFL = e N_t d^2/(2 eps0 eps_r)`` in V.

    Lampert, Phys. Rev. 103, 1648 (1956) (from memory): the bias at which the injected charge
    fills a single trap level of density ``N_t``; the current then rises steeply to the
    trap-free Mott-Gurney law.
    """
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    n_t = np.asarray(trap_density_per_cm3, dtype=float) * _PER_CM3_TO_PER_M3
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    return ELEMENTARY_CHARGE * n_t * d_m**2 / (2.0 * eps)


def ohmic_to_sclc_crossover_voltage_V(
    free_carrier_density_per_cm3: ArrayLike, thickness_nm: ArrayLike,
    dielectric_constant: ArrayLike, shallow_trap_factor_value: ArrayLike = 1.0,
) -> FloatArray:
    """Bias where ``e n0 mu V/d`` equals the SCLC law: ``V_x = 8 e n0 d^2/(9 theta eps0 eps_r)``.

    Obtained by equating the ohmic current of the thermal free-carrier density ``n0`` with
    ``(9/8) eps0 eps_r theta mu V^2/d^3`` (Lampert 1956; Lampert & Mark 1970, from memory):
    below ``V_x`` the injected charge is smaller than the thermal one and the current is ohmic.
    """
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    n0 = np.asarray(free_carrier_density_per_cm3, dtype=float) * _PER_CM3_TO_PER_M3
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    theta = np.asarray(shallow_trap_factor_value, dtype=float)
    return 8.0 * ELEMENTARY_CHARGE * n0 * d_m**2 / (9.0 * theta * eps)


#: Terms of the small-``t`` series of :func:`_log_tail_integrals` (error < 0.05**14 < 1e-18).
_TAIL_SERIES_TERMS = 14
#: Its coefficients ``1/(k + m)`` for k = 2 and 3 (columns 0 and 1), and those of the
#: series of ``t R_k`` (columns 2 and 3), ``-m/(k + m)``.
_TAIL_SERIES_COEFFICIENTS = np.hstack([
    1.0 / (np.arange(_TAIL_SERIES_TERMS)[:, None] + np.array([2.0, 3.0])),
    -np.arange(_TAIL_SERIES_TERMS)[:, None]
    / (np.arange(_TAIL_SERIES_TERMS)[:, None] + np.array([2.0, 3.0]))])


def _log_tail_integrals(y: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """``ln P_2``, ``ln P_3`` and their slopes in ``y``, where
    ``P_k(t) = int_1^inf ds/(s^k (s + t))`` at ``t = e^-y``.

    Closed forms by partial fractions, written in ``u = 1/t = e^y`` so that a very deep trap
    (``t`` beyond the floating-point range) neither overflows nor cancels:
    ``P_2 = u (1 - u ln(1 + 1/u))`` and ``P_3 = (u/2)(1 - 2u + 2u^2 ln(1 + 1/u))``. Below
    ``t = 0.05``, where those forms lose digits to cancellation, the series
    ``sum_m (-t)^m/(k + m)`` replaces them (all its terms in one matrix product, since this
    runs at every step of the root search).

    The slopes ``d ln P_k/dy = t R_k/P_k`` with ``R_k = -dP_k/dt = int_1^inf ds/(s^k
    (s + t)^2)`` come from the same pieces (our derivation): the series
    ``t R_k = -sum_m m (-t)^m/(k + m)``, and above ``t = 0.05`` the recurrence
    ``P_k = (1/(k-1) - P_(k-1))/t`` differentiated, ``t R_1 = u (ln(1 + 1/u) - 1/(1 + u))``,
    ``t R_2 = P_2 - u t R_1``, ``t R_3 = P_3 - u t R_2``. They steer the root search only
    (a few digits lost to cancellation near ``t = 0.05`` slow it, never move its root).
    """
    y = np.asarray(y, dtype=float)
    log_p2, log_p3 = np.empty_like(y), np.empty_like(y)
    slope_2, slope_3 = np.empty_like(y), np.empty_like(y)
    small = y > -np.log(0.05)
    powers = np.empty((_TAIL_SERIES_TERMS, int(small.sum())))
    powers[0], powers[1:] = 1.0, -np.exp(-y[small])
    np.cumprod(powers, axis=0, out=powers)  # row m: (-t)^m
    p2, p3, tr2, tr3 = _TAIL_SERIES_COEFFICIENTS.T @ powers
    log_p2[small], log_p3[small] = np.log(p2), np.log(p3)
    slope_2[small], slope_3[small] = tr2 / p2, tr3 / p3
    yl = y[~small]
    u = np.exp(yl)
    log_one_plus_t = np.log1p(u) - yl  # ln(1 + 1/u)
    log_p2[~small] = yl + np.log1p(-u * log_one_plus_t)
    log_p3[~small] = yl - np.log(2.0) + np.log1p(-2.0 * u + 2.0 * u**2 * log_one_plus_t)
    p2, p3 = np.exp(log_p2[~small]), np.exp(log_p3[~small])
    tr2 = p2 - u * u * (log_one_plus_t - 1.0 / (1.0 + u))
    slope_2[~small], slope_3[~small] = tr2 / p2, (p3 - u * tr2) / p3
    return log_p2, log_p3, slope_2, slope_3


def _single_level_shape(y: FloatArray, log_empty: FloatArray, log_filled: FloatArray
                        ) -> tuple[FloatArray, FloatArray, FloatArray]:
    """``(ln(V/V_b), ln G_1, d ln(V/V_b)/dy)`` at ``y = ln(n_d/b)``, in logarithms throughout.

    ``V/V_b = G_2/(t G_1^2)`` with ``t = b/n_d``, ``G_1 = q/2 + (1-q) P_2(t)`` and
    ``G_2 = q/3 + (1-q) P_3(t)``; ``log_empty = ln q`` and ``log_filled = ln(1 - q)``.
    The slope is ``1 + d ln G_2/dy - 2 d ln G_1/dy`` with
    ``d ln G_k/dy = ((1-q) P_k/G_k) d ln P_k/dy``.
    """
    log_p2, log_p3, slope_p2, slope_p3 = _log_tail_integrals(y)
    log_g1 = np.logaddexp(log_empty - np.log(2.0), log_filled + log_p2)
    log_g2 = np.logaddexp(log_empty - np.log(3.0), log_filled + log_p3)
    slope = (1.0 + np.exp(log_filled + log_p3 - log_g2) * slope_p3
             - 2.0 * np.exp(log_filled + log_p2 - log_g1) * slope_p2)
    return log_g2 - 2.0 * log_g1 + y, log_g1, slope


def _deep_injection_start(log_v_over_vb: FloatArray, log_empty: FloatArray,
                          log_filled: FloatArray) -> FloatArray:
    """A start for the root search: ``y`` where ``V/V_b`` of the ``t >> 1`` asymptote
    (``P_2 ~ 1/t``, ``P_3 ~ 1/(2t)``) equals the target.

    With ``w = e^y = q z`` the asymptote ``V/V_b = w (q/3 + (1-q) w/2)/(q/2 + (1-q) w)^2 = c``
    is the quadratic ``(1-q)(c(1-q) - 1/2) z^2 + (c(1-q) - 1/3) z + c/4 = 0`` (our algebra),
    whose one positive root exists below the plateau ``c < 1/(2(1-q))`` (the trap-filled
    limit). Above it (or where the quadratic fails) the trap-free limit is returned. Starting
    values only: the search itself brackets and refines.
    """
    c = np.exp(np.minimum(log_v_over_vb, 0.0))
    filled = np.exp(log_filled)
    a2 = filled * (c * filled - 0.5)
    a1 = c * filled - 1.0 / 3.0
    a0 = 0.25 * c
    with np.errstate(invalid="ignore", divide="ignore"):
        z = 2.0 * a0 / (-a1 + np.sqrt(a1 * a1 - 4.0 * a2 * a0))
        y = log_empty + np.log(z)
    trap_free = np.log(0.75) + log_v_over_vb
    return np.where((a2 < 0) & np.isfinite(y), y, trap_free)


def single_trap_level_current_density_A_per_m2(
    voltage_V: ArrayLike, temperature_K: ArrayLike, thickness_nm: ArrayLike,
    dielectric_constant: ArrayLike, mobility_cm2_per_Vs: ArrayLike,
    trap_density_per_cm3: ArrayLike, band_density_per_cm3: ArrayLike, trap_depth_eV: ArrayLike,
) -> FloatArray:
    """Space-charge-limited current through a film with one discrete trap level, in A/m^2.

    Parameters
    ----------
    voltage_V, temperature_K : array_like
        Bias (> 0) in V and temperature in K.
    thickness_nm : array_like
        Film thickness ``d`` in nm.
    dielectric_constant : array_like
        Static relative permittivity ``eps_r``.
    mobility_cm2_per_Vs : array_like
        Free-carrier mobility ``mu``.
    trap_density_per_cm3 : array_like
        Density ``N_t`` of the trap level.
    band_density_per_cm3 : array_like
        Effective density of states ``N_c`` of the transport band.
    trap_depth_eV : array_like
        Depth ``E_t`` of the level below the band edge.

    Returns
    -------
    ndarray
        Current density in A/m^2 (NaN where an input is not positive).

    Notes
    -----
    Lampert, Phys. Rev. 103, 1648 (1956); Lampert & Mark, *Current Injection in Solids*
    (1970), ch. 4 (from memory): one carrier, an injecting contact (``E = 0`` at ``x = 0``),
    drift only, thermal free carriers neglected, and the trap level in equilibrium with the
    band, ``n_t = N_t n/(n + n_1)`` with ``n_1 = N_c exp(-E_t/kT)``. With ``J = e mu n E``
    and ``eps dE/dx = e (n + n_t)``, ``dx = -(J eps/(e^2 mu)) g(n) dn/n^3`` where
    ``g(n) = (n + n_1)/(n + n_1 + N_t)``, so with ``b = n_1 + N_t``, ``q = n_1/b``,
    ``t = b/n_d`` (``n_d`` the free density at the collecting contact) and
    ``P_k(t) = int_1^inf ds/(s^k (s+t))`` (our integration):

    .. math::

        d = \\frac{J \\varepsilon}{e^2 \\mu n_d^2} G_1, \\quad
        V = \\frac{J^2 \\varepsilon}{e^3 \\mu^2 n_d^3} G_2, \\quad
        G_1 = \\tfrac{q}{2} + (1-q) P_2(t), \\quad G_2 = \\tfrac{q}{3} + (1-q) P_3(t),

    hence ``V = (e d^2 b/eps) G_2/(t G_1^2)`` and ``J = e^2 mu d n_d^2/(eps G_1)``. ``V``
    rises with ``n_d``; the root is found between the trap-free and the all-traps-empty
    densities, ``3 eps V q/(4 e d^2) <= n_d <= 3 eps V/(4 e d^2)``, by
    :func:`~mechid.catalogue.roots.rising_root_with_slope`.
    Limits checked in the tests: ``N_t = 0`` gives Mott-Gurney exactly; ``n_d << n_1`` gives
    ``theta = n_1/(n_1 + N_t)`` times Mott-Gurney (Lampert's shallow-trap law); for
    ``n_1 << n_d << N_t``, ``V = e (N_t + n_1) d^2/(2 eps)``, Lampert's trap-filled-limit
    voltage, independent of ``J`` (the vertical rise); a direct numerical integration of
    the same equations agrees.
    """
    v, t_k, d_nm, eps_r, mu, n_t, n_c, e_t = np.broadcast_arrays(*(
        np.asarray(a, dtype=float) for a in (
            voltage_V, temperature_K, thickness_nm, dielectric_constant, mobility_cm2_per_Vs,
            trap_density_per_cm3, band_density_per_cm3, trap_depth_eV)))
    shape = v.shape
    v, t_k, d_nm, eps_r, mu, n_t, n_c, e_t = (
        a.ravel() for a in (v, t_k, d_nm, eps_r, mu, n_t, n_c, e_t))
    d_m = d_nm * _NM_TO_M
    eps = VACUUM_PERMITTIVITY * eps_r
    with np.errstate(over="ignore", under="ignore", invalid="ignore", divide="ignore"):
        # Occupancy in logarithms: n_1 = N_c exp(-E_t/kT) underflows for a deep level when cold.
        log_n1 = np.log(n_c * _PER_CM3_TO_PER_M3) - e_t / (BOLTZMANN_EV * t_k)
        log_nt = np.log(n_t * _PER_CM3_TO_PER_M3)
        log_b = np.logaddexp(log_n1, log_nt)
        log_empty, log_filled = log_n1 - log_b, log_nt - log_b
        log_v_over_vb = np.log(v) - (np.log(ELEMENTARY_CHARGE * d_m**2 / eps) + log_b)
        high = np.log(0.75) + log_v_over_vb + 1e-9
        low = high + log_empty - 2e-9
        ok = np.isfinite(high) & np.isfinite(low) & (v > 0) & (mu > 0) & (n_t >= 0)

        def mismatch(y: FloatArray, index: np.ndarray) -> tuple[FloatArray, FloatArray]:
            shape_at, _, slope = _single_level_shape(y, log_empty[index], log_filled[index])
            return shape_at - log_v_over_vb[index], slope

        # Two candidate starts, the one nearer the root kept: the trap-free end, and the
        # root of the deep-injection asymptote (below).
        every = np.flatnonzero(ok)
        deep = np.clip(_deep_injection_start(log_v_over_vb[every], log_empty[every],
                                             log_filled[every]), low[every], high[every])
        ends = np.concatenate([deep, high[every]])
        f_ends, slope_ends = mismatch(ends, np.concatenate([every, every]))
        nearer_deep = ~(np.abs(f_ends[every.size:]) < np.abs(f_ends[:every.size]))
        start, f_start, slope_start = (np.full(v.size, np.nan) for _ in range(3))
        for out, both in ((start, ends), (f_start, f_ends), (slope_start, slope_ends)):
            out[every] = np.where(nearer_deep, both[:every.size], both[every.size:])
        y = rising_root_with_slope(mismatch, low, high, start, f_start, slope_start,
                                   _SINGLE_LEVEL_TOLERANCE, active=every)
        log_g1 = np.full(v.size, np.nan)
        log_g1[every] = _single_level_shape(y[every], log_empty[every], log_filled[every])[1]
        log_j = (2.0 * np.log(ELEMENTARY_CHARGE) + np.log(mu * _CM2_TO_M2) + np.log(d_m)
                 + 2.0 * (log_b + y) - np.log(eps) - log_g1)
        j = np.where(ok, np.exp(log_j), np.nan)
    return j.reshape(shape)


# --------------------------------------------------------------------------------------
# Straightened plots
# --------------------------------------------------------------------------------------


def _log_log_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = ln|V|, y = ln|I|: a power law I ∝ V^m is a line of slope m."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return np.log(v), np.log(i)


def _sclc_log_log_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """The log-log slope ``d ln I/d ln V`` (2 for Mott-Gurney)."""
    return {"voltage_exponent": float(slope)}


def _mark_helfrich_log_log_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Slope ``l + 1 = T_t/T + 1`` -> characteristic trap temperature ``T_t = (slope - 1) T``."""
    return {"voltage_exponent": float(slope),
            "characteristic_trap_temperature_K": float((np.float64(slope) - 1.0) * temperature_K)}


def _log_log_plot(plot_id: str, interpret) -> StraightenedPlot:  # noqa: ANN001
    return StraightenedPlot(
        id=plot_id,
        title="Log-log I-V plot (slope 1 ohmic, 2 space-charge-limited, > 2 trap-limited)",
        x_label="ln|V| [ln(V)]",
        y_label="ln|I| [ln(A)]",
        grouping="per_temperature",
        transform=_log_log_transform,
        interpret=interpret,
    )


def _known(value: Measured | None) -> float | None:
    return None if value is None else float(value.value)


def _sclc_arrhenius_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I|/V^2): straight with slope ``-E_t/k`` for shallow-trap SCLC."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i / v**2)


def _sclc_arrhenius_interpret(
    slope: float, intercept: float, voltage_V: float, device: Device
) -> dict[str, float]:
    """Slope -> trap depth; intercept -> ``eps_r mu N_c/N_t`` when thickness and area are known."""
    out = {"trap_depth_eV": float(-np.float64(slope) * BOLTZMANN_EV)}
    thickness = _known(device.thickness_nm)
    if thickness is not None and device.area_cm2 is not None:
        d_m = thickness * _NM_TO_M
        with np.errstate(over="ignore"):
            per_v2 = np.exp(np.float64(intercept)) / (device.area_cm2 * _CM2_TO_M2)
        product_m2 = per_v2 * d_m**3 / (9.0 / 8.0 * VACUUM_PERMITTIVITY)
        out["permittivity_mobility_prefactor_cm2_per_Vs"] = float(product_m2 / _CM2_TO_M2)
    return out


#: Points at the top of each sweep read as the approach to the trap-free square law (our
#: choice: enough for a line, few enough to stay above a trap-filled-limit rise).
TOP_OF_SWEEP_POINTS = 5


def _top_of_sweep(x: FloatArray, slope: float) -> np.ndarray:
    """The TOP_OF_SWEEP_POINTS largest biases of one line (x = 1/|V|: the smallest x)."""
    finite = np.isfinite(x)
    if np.count_nonzero(finite) <= TOP_OF_SWEEP_POINTS:
        return finite
    return finite & (x <= np.sort(x[finite])[TOP_OF_SWEEP_POINTS - 1])


def _square_law_approach_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/|V|, y = ln(|I|/V^2)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return 1.0 / v, np.log(i / v**2)


def _square_law_approach_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Mobility from the intercept, trap density from the slope (starting values).

    Above the trap-filled limit the filled traps act as a fixed charge; treating the current
    as Mott-Gurney in ``V - V_TFL`` (an approximation of ours, within about 10 % of the
    single-level law at twice ``V_TFL``) gives ``ln(I/V^2) ~ ln C - 2 V_TFL/V``: the
    intercept at ``1/V = 0`` is the trap-free ``C = (9/8) eps mu A/d^3`` and the slope is
    ``-2 V_TFL``, hence ``N_t = 2 eps V_TFL/(e d^2)``. Needs the thickness, the area and
    the static permittivity.
    """
    out = {"trap_filled_limit_voltage_V": float(-0.5 * np.float64(slope))}
    thickness = _known(device.thickness_nm)
    permittivity = _known(device.semiconductor_dielectric_constant)
    if thickness is None or permittivity is None or device.area_cm2 is None:
        return out
    d_m = thickness * _NM_TO_M
    eps = VACUUM_PERMITTIVITY * permittivity
    with np.errstate(over="ignore"):
        per_v2 = np.exp(np.float64(intercept)) / (device.area_cm2 * _CM2_TO_M2)
    out["mobility_cm2_per_Vs"] = float(per_v2 * d_m**3 / (9.0 / 8.0 * eps) / _CM2_TO_M2)
    if slope < 0:
        n_t = 2.0 * eps * out["trap_filled_limit_voltage_V"] / (ELEMENTARY_CHARGE * d_m**2)
        out["trap_density_per_cm3"] = float(n_t / _PER_CM3_TO_PER_M3)
    return out


SCLC_LOG_LOG_PLOT = _log_log_plot("sclc_log_log_plot", _sclc_log_log_interpret)
MARK_HELFRICH_LOG_LOG_PLOT = _log_log_plot("mark_helfrich_log_log_plot",
                                           _mark_helfrich_log_log_interpret)
SQUARE_LAW_APPROACH_PLOT = StraightenedPlot(
    id="square_law_approach_plot",
    title="ln(I/V^2) against 1/V at the top of each sweep (approach to the trap-free square law)",
    x_label="1/|V| [1/V]",
    y_label="ln(|I|/V^2) [ln(A/V^2)]",
    grouping="per_temperature",
    transform=_square_law_approach_transform,
    interpret=_square_law_approach_interpret,
    regime=PlotRegime(_top_of_sweep, f"the {TOP_OF_SWEEP_POINTS} largest biases of each sweep"),
)
SCLC_ARRHENIUS_PLOT = StraightenedPlot(
    id="sclc_arrhenius_plot",
    title="Arrhenius plot of I/V^2 (shallow-trap space-charge-limited current)",
    x_label="1/T [1/K]",
    y_label="ln(|I|/V^2) [ln(A/V^2)]",
    grouping="per_voltage",
    transform=_sclc_arrhenius_transform,
    interpret=_sclc_arrhenius_interpret,
)


# --------------------------------------------------------------------------------------
# Magnitudes and validity
# --------------------------------------------------------------------------------------


def _shallow_trap_sclc_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_depth_eV: FloatArray, permittivity_mobility_prefactor_cm2_per_Vs: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| = (9/8) eps0 [eps_r mu N_c/N_t] exp(-E_t/kT) V^2/d^3 x area, in A."""
    effective = shallow_trap_factor(temperature_K, trap_depth_eV,
                                    permittivity_mobility_prefactor_cm2_per_Vs)
    density = mott_gurney_current_density_A_per_m2(voltage_V, thickness_nm, 1.0, effective)
    return density * _CM2_TO_M2 * device.require_area()


def _mark_helfrich_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    characteristic_trap_temperature_K: FloatArray, trap_density_per_cm3: FloatArray,
    dielectric_constant: FloatArray, mobility_band_density_per_V_s_cm: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| of the Mark-Helfrich law x area, in A."""
    density = mark_helfrich_current_density_A_per_m2(
        voltage_V, temperature_K, thickness_nm, dielectric_constant,
        characteristic_trap_temperature_K, trap_density_per_cm3, mobility_band_density_per_V_s_cm)
    return density * _CM2_TO_M2 * device.require_area()


def _bias_over_kT(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                  **params: FloatArray) -> FloatArray:
    """``eV/kT``: the drift-only SCLC laws neglect diffusion, which needs eV >> kT."""
    return voltage_V / (BOLTZMANN_EV * temperature_K)


def _trap_temperature_ratio(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                            *, characteristic_trap_temperature_K: FloatArray,
                            **params: FloatArray) -> FloatArray:
    """``l = T_t/T`` of the Mark-Helfrich law."""
    return characteristic_trap_temperature_K / temperature_K + 0.0 * voltage_V


def _bias_over_trap_filled_limit(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_density_per_cm3: FloatArray, dielectric_constant: FloatArray, thickness_nm: FloatArray,
    **params: FloatArray,
) -> FloatArray:
    """``V/V_TFL``: the bias over Lampert's trap-filled-limit voltage."""
    return voltage_V / trap_filled_limit_voltage_V(trap_density_per_cm3, thickness_nm,
                                                   dielectric_constant)


_TRAPS_NOT_FILLED = ValidityCondition(
    id="below_trap_filled_limit",
    quantity="V/V_TFL (bias over the trap-filled-limit voltage e N_t d^2/(2 eps0 eps_r))",
    limit=1.0,
    bound="upper",
    reason=(
        "the Mark-Helfrich (1962) law assumes most injected charge sits in traps that are far "
        "from filled; at Lampert's trap-filled limit (1956) the traps are full and the current "
        "rises to the trap-free square law instead"
    ),
    evaluate=_bias_over_trap_filled_limit,
)

_DRIFT_ONLY = ValidityCondition(
    id="drift_dominates_diffusion",
    quantity="eV/kT (bias in units of the thermal voltage)",
    limit=DRIFT_ONLY_MIN_BIAS_KT,
    bound="lower",
    reason=(
        "the Mott-Gurney (1940) and Mark-Helfrich (1962) laws neglect carrier diffusion, "
        "which is justified only for biases well above kT/e"
    ),
    evaluate=_bias_over_kT,
)

_DEEP_TRAP_TAIL = ValidityCondition(
    id="trap_tail_deeper_than_kT",
    quantity="l = T_t/T (trap-distribution temperature over sample temperature)",
    limit=1.0,
    bound="lower",
    reason=(
        "the Mark-Helfrich (1962) power law V^(l+1) assumes an exponential trap tail broader "
        "than kT (l > 1); for l <= 1 the trapped charge no longer follows the quasi-Fermi level "
        "as assumed"
    ),
    evaluate=_trap_temperature_ratio,
)


def _thickness() -> Parameter:
    return Parameter(
        name="thickness_nm", unit="nm", symbol="d", description="film thickness",
        lower=5.0, upper=20000.0, typical=200.0, device_prior="thickness_nm",
        sample_in_log=True,
    )


SCLC_SHALLOW_TRAPS = Mechanism(
    id="sclc_shallow_traps",
    family="space_charge",
    name="Space-charge-limited current (Mott-Gurney, shallow traps)",
    formula=(
        "J = (9/8) eps0 eps_r mu theta V^2/d^3;  theta = (N_c/N_t) exp(-E_t/kT);"
        "  sampled: P = eps_r mu N_c/N_t;  valid for eV/kT >= 10"
    ),
    source=(
        "Mott & Gurney, Electronic Processes in Ionic Crystals (Oxford, 1940); shallow traps: "
        "Lampert, Phys. Rev. 103, 1648 (1956)"
    ),
    parameters=(
        Parameter(
            name="trap_depth_eV", unit="eV", symbol="E_t",
            description="depth of the shallow trap level below the transport band",
            lower=0.01, upper=1.5, typical=0.3,
        ),
        Parameter(
            name="permittivity_mobility_prefactor_cm2_per_Vs", unit="cm^2/(V s)",
            symbol="eps_r mu N_c/N_t",
            description="static permittivity x mobility x N_c/N_t (the product the current fixes)",
            lower=1e-8, upper=1e10, typical=1e2, log_scale=True,
        ),
        _thickness(),
    ),
    magnitude=_shallow_trap_sclc_current,
    plots=(SCLC_LOG_LOG_PLOT, SCLC_ARRHENIUS_PLOT),
    temperature_dependence="activated through theta: ln(I/V^2) linear in 1/T (slope -E_t/k)",
    estimates=(
        PlotEstimate("trap_depth_eV", "sclc_arrhenius_plot"),
        PlotEstimate("permittivity_mobility_prefactor_cm2_per_Vs", "sclc_arrhenius_plot"),
    ),
    checks=(
        # Log-log slope 2 of the Mott-Gurney law; +/- 0.2 allows for noise [common practice].
        QuantityInRange("sclc_log_log_plot", ("voltage_exponent",), 1.8, 2.2,
                        name="square_law_voltage_exponent"),
        ThermallyActivated(),
    ),
    validity=(_DRIFT_ONLY,),
)

SCLC_EXPONENTIAL_TRAPS = Mechanism(
    id="sclc_exponential_traps",
    family="space_charge",
    name="Space-charge-limited current (Mark-Helfrich, exponential trap distribution)",
    formula=(
        "J = e^(1-l) mu N_c (eps l/(N_t (l+1)))^l ((2l+1)/(l+1))^(l+1) V^(l+1)/d^(2l+1);"
        "  l = T_t/T;  valid for l >= 1, eV/kT >= 10, V <= V_TFL = e N_t d^2/(2 eps)"
    ),
    source="Mark & Helfrich, J. Appl. Phys. 33, 205 (1962)",
    parameters=(
        Parameter(
            name="characteristic_trap_temperature_K", unit="K", symbol="T_t",
            description="characteristic temperature of the exponential trap distribution",
            lower=100.0, upper=5000.0, typical=1000.0, sample_in_log=True,
        ),
        Parameter(
            name="trap_density_per_cm3", unit="cm^-3", symbol="N_t",
            description="total density of the exponentially distributed traps",
            lower=1e13, upper=1e22, typical=1e18, log_scale=True,
        ),
        Parameter(
            name="dielectric_constant", unit="1", symbol="eps_r",
            description="static relative permittivity of the film",
            lower=1.5, upper=30.0, typical=3.5,
            device_prior="semiconductor_dielectric_constant", sample_in_log=True,
        ),
        Parameter(
            name="mobility_band_density_per_V_s_cm", unit="1/(V s cm)", symbol="mu N_c",
            description="mobility x effective band density of states",
            lower=1e8, upper=1e26, typical=1e19, log_scale=True,
        ),
        _thickness(),
    ),
    magnitude=_mark_helfrich_current,
    plots=(MARK_HELFRICH_LOG_LOG_PLOT,),
    temperature_dependence="power law V^(T_t/T + 1): the log-log slope falls as T rises",
    estimates=(PlotEstimate("characteristic_trap_temperature_K", "mark_helfrich_log_log_plot"),),
    checks=(
        # Trap-limited SCLC rises faster than the square law [common practice threshold].
        QuantityInRange("mark_helfrich_log_log_plot", ("voltage_exponent",), 2.2, 50.0,
                        name="trap_limited_voltage_exponent"),
        ThermallyActivated(),
    ),
    validity=(_DRIFT_ONLY, _DEEP_TRAP_TAIL, _TRAPS_NOT_FILLED),
)


def _single_trap_level_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_depth_eV: FloatArray, band_density_per_cm3: FloatArray,
    trap_density_per_cm3: FloatArray, mobility_cm2_per_Vs: FloatArray,
    dielectric_constant: FloatArray, thickness_nm: FloatArray,
) -> FloatArray:
    """|I| of Lampert's single-trap-level law x area, in A."""
    density = single_trap_level_current_density_A_per_m2(
        voltage_V, temperature_K, thickness_nm, dielectric_constant, mobility_cm2_per_Vs,
        trap_density_per_cm3, band_density_per_cm3, trap_depth_eV)
    return density * _CM2_TO_M2 * device.require_area()


SCLC_SINGLE_TRAP_LEVEL = Mechanism(
    id="sclc_single_trap_level",
    family="space_charge",
    name="Space-charge-limited current with one trap level (trap-filled-limit rise)",
    formula=(
        "J = e^2 mu d n_d^2/(eps G1), V = (e d^2 b/eps) G2/(t G1^2);  b = n_1 + N_t,"
        "  t = b/n_d, n_1 = N_c exp(-E_t/kT), G1 = q/2 + (1-q) P2(t), G2 = q/3 + (1-q) P3(t),"
        "  q = n_1/b;  theta x Mott-Gurney below V_TFL = e N_t d^2/(2 eps), Mott-Gurney above;"
        "  valid for eV/kT >= 10"
    ),
    source=(
        "Lampert, Phys. Rev. 103, 1648 (1956); Lampert & Mark, Current Injection in Solids "
        "(1970), ch. 4; trap-free limit: Mott & Gurney (1940); closed-form integration ours "
        "(see single_trap_level_current_density_A_per_m2)"
    ),
    parameters=(
        Parameter(
            name="trap_depth_eV", unit="eV", symbol="E_t",
            description="depth of the trap level below the transport band",
            lower=0.05, upper=1.5, typical=0.4,
        ),
        Parameter(
            name="band_density_per_cm3", unit="cm^-3", symbol="N_c",
            description="effective density of states of the transport band",
            lower=1e15, upper=1e23, typical=1e20, log_scale=True,
        ),
        Parameter(
            name="trap_density_per_cm3", unit="cm^-3", symbol="N_t",
            description="density of the trap level (sets the trap-filled-limit voltage)",
            lower=1e12, upper=1e21, typical=1e17, log_scale=True,
        ),
        Parameter(
            name="mobility_cm2_per_Vs", unit="cm^2/(V s)", symbol="mu",
            description="free-carrier mobility",
            lower=1e-8, upper=1e4, typical=1e-2, log_scale=True,
        ),
        Parameter(
            name="dielectric_constant", unit="1", symbol="eps_r",
            description="static relative permittivity of the film",
            lower=1.5, upper=30.0, typical=3.5,
            device_prior="semiconductor_dielectric_constant", sample_in_log=True,
        ),
        _thickness(),
    ),
    magnitude=_single_trap_level_current,
    # Not the Arrhenius plot of I/V^2: across the rise its slope mixes the trap depth with the
    # trap-free law's zero, so it reads neither (measured: 0.22 eV for a 0.45 eV level).
    plots=(SCLC_LOG_LOG_PLOT, SQUARE_LAW_APPROACH_PLOT),
    temperature_dependence=(
        "activated below the trap-filled limit (theta = n_1/(n_1 + N_t)), nearly "
        "temperature-independent on the trap-free square law above it"
    ),
    estimates=(PlotEstimate("mobility_cm2_per_Vs", "square_law_approach_plot"),
               PlotEstimate("trap_density_per_cm3", "square_law_approach_plot")),
    checks=(
        # Every regime of the law rises at least as the square law; 1.8 allows for noise
        # [common practice], the upper bound only excludes nonsense.
        QuantityInRange("sclc_log_log_plot", ("voltage_exponent",), 1.8, 1000.0,
                        name="at_least_square_law_voltage_exponent"),
        # Above the trap-filled limit the current tends to the trap-free square law, whose
        # prefactor holds no Boltzmann factor; 50 meV allows for a sweep that ends on the rise
        # (our threshold). A sweep that stays below the limit fails it: that is the shallow-trap
        # law's regime, which sclc_shallow_traps screens.
        InterceptNotActivated("square_law_approach_plot"),
        # The sweep must pass the limit for the top to approach the trap-free law; at 1.5 x
        # V_TFL the approach line is the starting-value approximation of that plot (ours).
        VoltageInsideSweep("square_law_approach_plot", "trap_filled_limit_voltage_V"),
    ),
    validity=(_DRIFT_ONLY,),
)
