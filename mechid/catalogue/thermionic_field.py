"""Thermionic-field emission over a Schottky contact: electrons tunnel through the barrier top.

On a heavily doped semiconductor the depletion region is thin, and electrons thermally excited
part of the way up the barrier tunnel through the rest of it. Padovani & Stratton,
Solid-State Electron. 9, 695 (1966), evaluate the current as the flux of electrons at each
energy times their WKB transmission through the parabolic depletion barrier; its signature is
an ideality factor ``n = (E00/kT) coth(E00/kT)`` that grows on cooling, with
``E00 = (e hbar/2) sqrt(N_D/(m* eps_s))``. As the doping rises, E00/kT grows and the current
passes from thermionic emission (E00 << kT, over the top) through thermionic-field emission
to field emission (E00 >> kT, near the Fermi level).

Model (Padovani & Stratton 1966; Crowell & Rideout, Solid-State Electron. 12, 89 (1969);
Rhoderick & Williams, *Metal-Semiconductor Contacts*, 2nd ed. 1988, ch. 2 -- all from memory),
energies ``E`` from the conduction-band edge in the neutral ``n``-type semiconductor,
``eps = E/kT``:

* the semiconductor's Fermi level lies ``eta kT`` above its band edge, ``eta`` from
  ``N_D = N_c F_1/2(eta)`` (Fermi-Dirac statistics, donors fully ionised; ``eta < 0`` when
  non-degenerate), see :func:`reduced_fermi_level`; the metal's Fermi level lies ``eV`` below
  the semiconductor's (forward bias ``V > 0``);
* the barrier in the depletion approximation is ``U(x) = e V_bb (1 - x/W)^2`` with the band
  bending ``e V_bb = e phi_B + eta kT - eV`` and ``W = sqrt(2 eps_s V_bb/(e N_D))``;
* its WKB transmission at energy ``E < e V_bb`` is ``exp(-(e V_bb/E00) g(E/eV_bb))`` with
  ``g(u) = sqrt(1 - u) - u ln((1 + sqrt(1 - u))/sqrt(u))`` (our integration of
  ``2 int kappa dx`` over the parabola; ``2 W sqrt(2 m* e V_bb)/hbar = 2 e V_bb/E00`` is what
  ties the barrier to ``E00``), and 1 above the barrier top;
* the current density is the net supply of the two electrodes at each energy times that
  transmission (the form of Crowell & Rideout 1969; Murphy & Good, Phys. Rev. 102, 1464
  (1956) for the supply function ``ln(1 + e^{eta - eps})`` of a Fermi gas):

  .. math::

      J = \\frac{A^{**} T}{k} \\int_0^\\infty T(E)\\,
          \\big[\\ln(1 + e^{\\eta - \\epsilon}) - \\ln(1 + e^{\\eta - v - \\epsilon})\\big]\\, dE,
      \\qquad v = eV/kT.

  Above the barrier top the integral is closed: ``int_x^inf ln(1 + e^{c - t}) dt =
  -Li_2(-e^{c - x})`` (the complete Fermi-Dirac integral of order 1), evaluated with
  :func:`scipy.special.spence` (``Li_2(z) = spence(1 - z)``).

Non-degenerate limit: ``ln(1 + e^{eta - eps}) -> (N_D/N_c) e^{-eps}`` and the bracket becomes
``(N_D/N_c) e^{-eps} (1 - e^{-v})``, Padovani & Stratton's Boltzmann form; without tunnelling
(``E00 -> 0``) it is thermionic emission ``A** T^2 e^{-phi_B/kT} (e^{v} - 1)`` exactly (tests).
In that limit the saddle point of the integral lies at ``E_m = e V_bb/cosh^2(E00/kT)`` and
gives Padovani & Stratton's exponent ``exp(-e V_bb/E0)`` with ``E0 = E00 coth(E00/kT)``, so
``d ln J/dV = e/E0`` in forward bias, and ``e (1/kT - 1/E0)`` in reverse bias -- their
``epsilon' = E00/(E00/kT - tanh(E00/kT))`` (checked in the tests). The closed form usually
quoted for the forward current, with the prefactor ``sqrt(pi E00 e V_bb)/cosh(E00/kT)`` (as we
recall it from textbook reproductions), differs from the saddle point of the same integral,
``sqrt(4 pi E00 e V_bb tanh(E00/kT))/cosh(E00/kT)``, by ``2 sqrt(tanh(E00/kT))``; we evaluate
the integral itself, so neither approximation enters.

Numerics: the integrand is log-concave in ``E`` (the transmission's exponent is concave, and
the supply difference ``ln(1 + e^x) - ln(1 + e^{x - |v|})`` is the logistic function integrated
over a window of width ``|v|``, log-concave by Prekopa's theorem), so a Gauss-Legendre rule
placed around its peak and its Fermi levels, with tangent bounds on the tails, evaluates it
(see :func:`supply_difference`): on 760 cases over E00 = 2-150 meV, band bending 0.05-1.2 eV,
10-450 K, eta = -20 to 60 and v = -30 to 40 it is within 1.1e-3 of scipy's adaptive
quadrature (median 8e-7; the hardest of them are in the tests).

Validity (refused, not extrapolated): the band bending must be at least 3 kT (depletion
approximation), at the junction voltage ``V - I R_s``: a forward bias beyond the barrier is
fine where the series resistance takes the rest. Donors are taken as fully ionised and the
image force is left out, as in the source.
"""

from __future__ import annotations

import threading
from collections.abc import Callable

import numpy as np
from numpy.typing import ArrayLike
from scipy import special

from mechid.catalogue.base import FloatArray, Mechanism, Parameter
from mechid.catalogue.checks import DiodeEstimate, ThermallyActivated
from mechid.catalogue.diode import (
    _BARRIER,
    _RESISTANCE_ESTIMATES,
    _RICHARDSON,
    _SERIES,
    _SHUNT,
    lambert_w_from_log,
)
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import (
    BOLTZMANN,
    BOLTZMANN_EV,
    ELECTRON_MASS,
    HBAR,
    PLANCK,
    VACUUM_PERMITTIVITY,
)
from mechid.device import Device

#: Gauss-Legendre nodes of each of the six panels of the energy integral (see
#: :func:`_integration_window`; within 1.1e-3 of adaptive quadrature over the ranges in the
#: module's docstring, 3e-3 with 10 nodes).
_QUADRATURE_NODES, _QUADRATURE_WEIGHTS = np.polynomial.legendre.leggauss(12)
#: Panels integrated at a time: the node arrays of a block stay in the processor's cache
#: (2x faster than one pass over a fit's 10^4 entries; timed on the tools' machine).
_PANEL_BLOCK = 4096
#: The rule on [0, 1], and in ``s`` for ``E = s^2`` (nodes ``s^2``, weights ``2 s ds``) for a
#: panel that starts at the band edge (see :func:`_tunnelling_sums`).
_UNIT_NODES = 0.5 * (_QUADRATURE_NODES + 1.0)
_UNIT_WEIGHTS = 0.5 * _QUADRATURE_WEIGHTS
_SQUARED_NODES = _UNIT_NODES**2
_SQUARED_WEIGHTS = _QUADRATURE_WEIGHTS * _UNIT_NODES
#: The integrand is log-concave in E; its tangent at this many curvature widths from the
#: peak bounds the tails (see :func:`supply_difference`).
_TANGENT_REACH = 6.0
#: Tails whose bound lies this many nats below the peak are left out (e^-25 of the peak).
_TAIL_DROP = 25.0
#: Safeguarded Newton steps locating the integrand's peak (it only places the quadrature),
#: and the smallest share of the band bending searched (ln u).
_PEAK_STEPS = 5
_SMALLEST_LOG_SHARE = -60.0
#: Half-width, in kT, of the quadrature panel around each Fermi level.
_FERMI_PANEL = 4.0
#: Tolerance of the junction-voltage search, relative to the bias (on ``u + R_s I(u) - V``
#: and on the bracket width), and its step cap (Newton converges in a few steps; a step that
#: leaves the bracket halves it instead). 1e-12 keeps the current within ~3e-10 of itself
#: (2 V at kT = 7 meV), so the reference series regenerate to 1e-9 on any processor.
_JUNCTION_TOLERANCE = 1e-12
_JUNCTION_MAX_STEPS = 100
#: A Newton step below this share of kT/e, changing the current by less than this share of
#: itself, is taken by linearising the current (see :func:`_solve_contact_current`).
_LINEAR_STEP = 1e-6
#: Smallest band bending, in kT, where the model holds.
MIN_BAND_BENDING_KT = 3.0
#: Fermi-Dirac integral of order 1/2: Gauss-Legendre nodes per piece, the reach (in kT) past
#: the Fermi level beyond which the occupation is taken as 0 (below: as 1), both e^-40, and
#: the Newton steps of its inversion (concave in eta: converges from any start).
_FD_NODES, _FD_WEIGHTS = np.polynomial.legendre.leggauss(48)
_FD_REACH = 40.0
_FD_NEWTON_STEPS = 12
#: Below this argument ``ln(1 + e^x) = e^x`` and ``-Li_2(-e^x) = e^x`` to double precision
#: in their logarithms; above ``_DILOG_LARGE`` ``-Li_2(-e^y) = y^2/2 + pi^2/6`` likewise.
_EXPONENTIAL_TAIL = -50.0
_DILOG_LARGE = 40.0
#: Below this argument ``-Li_2(-e^y)`` is summed as its power series in ``e^y`` (these many
#: terms: the next is below 1e-17 of the sum; spence is within 2e-15 down to here).
_DILOG_SERIES = -3.0
_DILOG_TERMS = 14
#: Below this window width (in kT) the supply difference is taken to first order in it,
#: and below this reduced level in its Boltzmann form (where it would underflow).
_NARROW_WINDOW = 1e-6
_DEEP_BOLTZMANN = -700.0


def characteristic_tunnelling_energy_eV(
    doping_per_cm3: ArrayLike, dielectric_constant: ArrayLike, effective_mass_ratio: ArrayLike
) -> FloatArray:
    """``E00 = (e hbar/2) sqrt(N_D/(m* eps_s))`` in eV (Padovani & Stratton 1966).

    With ``N_D`` in m^-3, ``m* = m_r m0`` and ``eps_s = eps_r eps0`` in SI units,
    ``(hbar/2) sqrt(N_D/(m* eps_s))`` is E00 in eV (the charge ``e`` cancels the J -> eV
    conversion).
    """
    doping_m3 = np.asarray(doping_per_cm3, dtype=float) * 1e6
    mass = np.asarray(effective_mass_ratio, dtype=float) * ELECTRON_MASS
    permittivity = np.asarray(dielectric_constant, dtype=float) * VACUUM_PERMITTIVITY
    return 0.5 * HBAR * np.sqrt(doping_m3 / (mass * permittivity))


def doping_for_tunnelling_energy_per_cm3(e00_eV: ArrayLike, dielectric_constant: ArrayLike,
                                         effective_mass_ratio: ArrayLike) -> FloatArray:
    """The donor density (cm^-3) whose E00 is ``e00_eV``: the inverse of
    :func:`characteristic_tunnelling_energy_eV`, ``N_D = (2 E00/hbar)^2 m* eps_s``."""
    mass = np.asarray(effective_mass_ratio, dtype=float) * ELECTRON_MASS
    permittivity = np.asarray(dielectric_constant, dtype=float) * VACUUM_PERMITTIVITY
    return (2.0 * np.asarray(e00_eV, dtype=float) / HBAR) ** 2 * mass * permittivity * 1e-6


def band_edge_density_per_cm3(temperature_K: ArrayLike,
                              effective_mass_ratio: ArrayLike) -> FloatArray:
    """Effective density of states of the conduction band, ``N_c = 2 (2 pi m* k T/h^2)^{3/2}``.

    Sze & Ng 2007, ch. 1 (from memory); in cm^-3.
    """
    thermal = (2.0 * np.pi * np.asarray(effective_mass_ratio, dtype=float) * ELECTRON_MASS
               * BOLTZMANN * np.asarray(temperature_K, dtype=float)
               / PLANCK**2)
    return 2.0 * thermal**1.5 * 1e-6


def fermi_dirac_half(eta: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """``F_1/2(eta)`` and its derivative ``F_-1/2(eta)``, normalised as in Blakemore (1982).

    ``F_j(eta) = (1/Gamma(j + 1)) int_0^inf t^j dt/(1 + e^{t - eta})`` (Blakemore,
    Solid-State Electron. 25, 1067 (1982), from memory), so that ``n = N_c F_1/2(eta)`` and
    ``F_j -> e^eta`` in the non-degenerate limit. Evaluated in ``s = sqrt(t)`` (no square-root
    end point) by Gauss-Legendre rules on ``[sqrt(eta - 40), sqrt(eta)]`` and
    ``[sqrt(eta), sqrt(eta + 40)]`` (``eta`` taken as at least 0 in the bounds), where the
    occupation falls from 1 to 0; below the first piece it is 1 to e^-40, so
    ``(2/3) t^{3/2}`` in closed form. Within 1e-12 of scipy's adaptive quadrature and of the
    closed form ``F_1/2(0) = (1 - 2^-1/2) zeta(3/2)`` (tests).
    """
    eta = np.asarray(eta, dtype=float)
    inner = np.sqrt(np.maximum(eta - _FD_REACH, 0.0))
    middle = np.sqrt(np.maximum(eta, 0.0))
    outer = np.sqrt(np.maximum(eta, 0.0) + _FD_REACH)
    integral = (2.0 / 3.0) * inner**3
    derivative = np.zeros_like(integral)
    for low, high in ((inner, middle), (middle, outer)):
        half = 0.5 * (high - low)
        s = (0.5 * (high + low))[..., None] + half[..., None] * _FD_NODES
        occupied = special.expit(eta[..., None] - s**2)
        weighted = _FD_WEIGHTS * 2.0 * s**2 * occupied
        integral = integral + half * np.sum(weighted, axis=-1)
        derivative = derivative + half * np.sum(weighted * (1.0 - occupied), axis=-1)
    # 1/Gamma(3/2) = 2/sqrt(pi); d/d eta of the unnormalised integral is
    # int sqrt(t) f (1 - f) dt, and F_-1/2 = (1/Gamma(3/2)) times that.
    norm = 2.0 / np.sqrt(np.pi)
    return norm * integral, norm * derivative


def reduced_fermi_level(temperature_K: ArrayLike, doping_per_cm3: ArrayLike,
                        effective_mass_ratio: ArrayLike) -> FloatArray:
    """``eta = (E_F - E_c)/kT`` solving ``N_D = N_c F_1/2(eta)`` (all donors ionised).

    Newton's method on ``ln F_1/2(eta) = ln(N_D/N_c)``: ``ln F_1/2`` is increasing and concave
    (``F_j`` is log-concave), so the tangent lies above it and every step after the first
    lands left of the root and climbs to it. Start: ``ln r + r/sqrt(8)`` for ``r = N_D/N_c < 1``
    (the first term of Joyce & Dixon, Appl. Phys. Lett. 31, 354 (1977), from memory), the
    inverse of Sommerfeld's ``F_1/2 ~ (4/(3 sqrt(pi))) eta^{3/2}`` above.
    """
    ratio = (np.asarray(doping_per_cm3, dtype=float)
             / band_edge_density_per_cm3(temperature_K, effective_mass_ratio))
    log_ratio = np.log(ratio)
    eta = np.where(ratio < 1.0, log_ratio + ratio / np.sqrt(8.0),
                   (0.75 * np.sqrt(np.pi) * ratio) ** (2.0 / 3.0))
    for _ in range(_FD_NEWTON_STEPS):
        value, slope = fermi_dirac_half(eta)
        eta = eta - (np.log(value) - log_ratio) * value / slope
    return eta


def _softplus(x: FloatArray) -> FloatArray:
    """``ln(1 + e^x)``, as ``max(x, 0) + ln(1 + e^-|x|)`` (several times faster than
    :func:`numpy.logaddexp` on the quadrature nodes, and as accurate)."""
    return np.maximum(x, 0.0) + np.log1p(np.exp(-np.abs(x)))


def log_fermi_supply(x: ArrayLike) -> FloatArray:
    """``ln ln(1 + e^x)``: the log of the supply function of a Fermi gas, without underflow.

    ``ln(1 + e^x)`` is what a Fermi gas at reduced Fermi level ``x`` above the energy supplies
    per unit energy to a barrier (Murphy & Good 1956); ``e^x`` (Boltzmann) far below, ``x``
    (fully occupied) far above.
    """
    x = np.asarray(x, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(x < _EXPONENTIAL_TAIL, x,
                        np.log(_softplus(np.maximum(x, _EXPONENTIAL_TAIL))))


def log_over_top_supply(y: ArrayLike) -> FloatArray:
    """``ln[-Li_2(-e^y)]`` with ``-Li_2(-e^y) = int_0^inf ln(1 + e^{y - t}) dt``.

    The supply above the barrier top in kT units (the complete Fermi-Dirac integral of order 1,
    Blakemore 1982); ``Li_2(z) = spence(1 - z)`` (scipy's convention), ``e^y`` far below
    and ``y^2/2 + pi^2/6`` far above (the dilogarithm's inversion formula, Abramowitz &
    Stegun 27.7, from memory).
    """
    y = np.asarray(y, dtype=float)
    mid = np.clip(y, _DILOG_SERIES, _DILOG_LARGE)
    with np.errstate(divide="ignore"):
        moderate = np.log(-special.spence(1.0 + np.exp(mid)))
    # Below _DILOG_SERIES the power series -Li_2(-z) = sum (-1)^(k+1) z^k/k^2 keeps the
    # relative precision that spence(1 + z) loses as z -> 0 (it returns ~ -z to absolute,
    # not relative, precision).
    z = np.exp(np.minimum(y, _DILOG_SERIES))
    series = np.zeros_like(z)
    for k in range(_DILOG_TERMS, 0, -1):  # Horner: 1 - z/4 + z^2/9 - ...
        series = (-1.0) ** (k - 1) / k**2 + z * series
    small = y + np.log(series)
    return np.where(y < _DILOG_SERIES, small,
                    np.where(y > _DILOG_LARGE, np.log(0.5 * y**2 + np.pi**2 / 6.0), moderate))


def _supply_window(x: FloatArray, width: FloatArray
                   ) -> tuple[FloatArray, FloatArray, FloatArray]:
    """The net supply ``D(x) = ln(1 + e^x) - ln(1 + e^{x - w})`` (``w >= 0``), in logs.

    Returns ``ln D``, ``rho = d ln D/dx = (sigma(x) - sigma(x - w))/D`` (in ``(0, 1]``,
    falling: ``D`` is log-concave) and ``d rho/dx``, with ``sigma`` the logistic function.
    For ``w`` below :data:`_NARROW_WINDOW` to first order in ``w``: ``D = w sigma(x)``,
    ``rho = sigma(-x)``, ``rho' = -sigma(x) sigma(-x)``; below ``x = -700`` (where ``D``
    underflows) its Boltzmann form ``e^x (1 - e^{-w})``, ``rho = 1``, ``rho' = 0``.
    """
    w = np.maximum(width, _NARROW_WINDOW)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        gap = _softplus(x) - _softplus(x - w)
        sig, sig_lag = special.expit(x), special.expit(x - w)
        rho = (sig - sig_lag) / gap
        curvature = (sig * (1.0 - sig) - sig_lag * (1.0 - sig_lag)) / gap - rho**2
        log_gap = np.log(gap)
        deep = x < _DEEP_BOLTZMANN
        if np.any(deep):
            log_gap = np.where(deep, x + np.log(-np.expm1(-w)), log_gap)
            rho = np.where(deep, 1.0, rho)
            curvature = np.where(deep, 0.0, curvature)
        narrow = width < _NARROW_WINDOW
        if np.any(narrow):
            upper = special.expit(-x)
            log_gap = np.where(narrow, np.log(np.maximum(width, 1e-300)) - _softplus(-x),
                               log_gap)
            rho = np.where(narrow, upper, rho)
            curvature = np.where(narrow, -sig * upper, curvature)
    return log_gap, rho, curvature


def depletion_barrier_exponent(energy_share: ArrayLike) -> FloatArray:
    """``g(u) = sqrt(1 - u) - u ln((1 + sqrt(1 - u))/sqrt(u))`` for ``0 < u <= 1``.

    The WKB exponent through the parabolic depletion barrier at energy ``E = u e V_bb`` is
    ``(e V_bb/E00) g(u)``; ``g(0) = 1`` (a carrier at the band edge crosses the whole
    barrier), ``g(1) = 0`` (at its top); ``g'(u) = -arccosh(1/sqrt(u))``.
    """
    u = np.asarray(energy_share, dtype=float)
    root = np.sqrt(1.0 - u)
    return root - u * np.log((1.0 + root) / np.sqrt(u))


def _inverse_cosh_squared(z: FloatArray) -> FloatArray:
    """``ln(1/cosh^2(z))`` for ``z >= 0`` without overflow."""
    return np.log(4.0) - 2.0 * z - 2.0 * np.log1p(np.exp(-2.0 * z))


def _arccosh_inverse_root(u: FloatArray) -> FloatArray:
    """``arccosh(1/sqrt(u)) = ln((1 + sqrt(1 - u))/sqrt(u))``, i.e. ``-g'(u)``."""
    return np.log1p(np.sqrt(1.0 - u)) - 0.5 * np.log(u)


def _log_peak_share(a: FloatArray, e00: FloatArray, kt: FloatArray, lead: FloatArray,
                    width: FloatArray) -> FloatArray:
    """``ln u`` of the share ``u = E/a`` of the band bending where the integrand of
    :func:`supply_difference` peaks: the root of ``arccosh(1/sqrt(u)) = (E00/kT) rho``, with
    ``rho`` the log-slope of the net supply at ``lead - u a/kT`` (:func:`_supply_window`).

    ``rho`` falls from its value at the barrier top to that at the band edge, which brackets
    the root between ``1/cosh^2`` of ``E00/kT`` times each; Newton's method in ``ln u`` inside
    that bracket (a step leaving it is replaced by the bracket's middle in ``ln u``: the peak
    may sit anywhere from the band edge, on a degenerate semiconductor with ``E00 >> kT``, to
    the top). The Boltzmann limit ``rho = 1`` gives Padovani & Stratton's
    ``u = 1/cosh^2(E00/kT)``.
    """
    y = e00 / kt
    _, rho_top, _ = _supply_window(lead - a / kt, width)
    _, rho_edge, _ = _supply_window(lead, width)
    low = np.maximum(_inverse_cosh_squared(y * rho_top), _SMALLEST_LOG_SHARE)
    high = np.minimum(_inverse_cosh_squared(y * rho_edge), 0.0)
    log_u = 0.5 * (low + high)
    for _ in range(_PEAK_STEPS):
        u = np.exp(log_u)
        _, rho, rho_slope = _supply_window(lead - u * a / kt, width)
        gap = _arccosh_inverse_root(u) - y * rho
        low = np.where(gap > 0, log_u, low)
        high = np.where(gap > 0, high, log_u)
        gap_slope = -0.5 / np.sqrt(1.0 - u) + y * rho_slope * u * a / kt
        step = log_u - gap / gap_slope
        log_u = np.where(np.isfinite(step) & (step > low) & (step < high), step,
                         0.5 * (low + high))
    return log_u


def _integration_window(a: FloatArray, e00: FloatArray, kt: FloatArray, lead: FloatArray,
                        width: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Panel edges of the tunnelling integral on ``[0, a]``, and its log at the peak.

    The log of the integrand, ``h(E) = -(a/E00) g(E/a) + ln D(lead - E/kT)``, is concave; at
    its peak ``E_m`` (:func:`_log_peak_share`) its curvature gives a width
    ``sigma = 1/sqrt(-h'')``. The tangent to ``h`` at any point lies above ``h`` beyond it,
    which bounds each tail: the window ends where the lowest of these bounds, taken at
    ``E_m +- 6 sigma`` and at each Fermi level ``+- 4 kT``, is 25 nats below the peak (or at
    0 and ``a``). Panels break at ``E_m +- 6 sigma``, at the higher Fermi level ``+- 4 kT``
    and at the lower one: at the higher the net supply turns from slowly varying to falling as
    ``e^{-E/kT}`` within ``kT`` while the window may run on for many ``kT`` (a degenerate
    semiconductor, or the metal's Fermi level in reverse bias); at the lower it turns from
    rising linearly to constant, a bend that a panel edge at the bend resolves.
    """
    log_share = _log_peak_share(a, e00, kt, lead, width)
    share = np.exp(log_share)
    log_window, _, window_curvature = _supply_window(lead - share * a / kt, width)
    top_value = -(a / e00) * depletion_barrier_exponent(share) + log_window
    curvature = (np.maximum(-window_curvature, 0.0) / kt**2
                 + 0.5 / (e00 * a * share * np.sqrt(1.0 - share)))
    spread = _TANGENT_REACH / np.sqrt(curvature)
    peak = share * a

    def exponent_and_slope(energy: FloatArray) -> tuple[FloatArray, FloatArray]:
        ratio = np.clip(energy / a, 1e-300, 1.0)
        log_net, rho, _ = _supply_window(lead - energy / kt, width)
        return (-(a / e00) * depletion_barrier_exponent(ratio) + log_net,
                -rho / kt + _arccosh_inverse_root(ratio) / e00)

    fermi_levels = (lead * kt, (lead - width) * kt)
    upper0 = np.minimum(peak + spread, a)
    lower0 = np.maximum(peak - spread, 0.0)
    upper, lower = a, np.zeros_like(a)
    for point in (upper0, *(f + _FERMI_PANEL * kt for f in fermi_levels)):
        upper = np.minimum(upper, _tangent_reach(point, peak, top_value, exponent_and_slope, a,
                                                 right=True))
    for point in (lower0, *(f - _FERMI_PANEL * kt for f in fermi_levels)):
        lower = np.maximum(lower, _tangent_reach(point, peak, top_value, exponent_and_slope, a,
                                                 right=False))
    inner = [lower0, upper0, fermi_levels[0] - _FERMI_PANEL * kt,
             fermi_levels[0] + _FERMI_PANEL * kt, fermi_levels[1]]
    edges = np.stack([lower, upper, *(np.clip(e, lower, upper) for e in inner)], axis=-1)
    return np.sort(edges, axis=-1), top_value


def _tangent_reach(point: FloatArray, peak: FloatArray, top_value: FloatArray,
                   exponent_and_slope: Callable[[FloatArray], tuple[FloatArray, FloatArray]],
                   a: FloatArray, *, right: bool) -> FloatArray:
    """Where the tangent to the concave ``exponent`` at ``point`` falls 25 nats below the
    peak: beyond it (on the ``right`` of the peak, or the left) the integrand is below e^-25
    of its peak. ``a`` (right) or 0 (left) where the point is not on that side of the peak
    or outside ``[0, a]``."""
    inside = (point > 0.0) & (point < a) & ((point > peak) if right else (point < peak))
    value, gradient = exponent_and_slope(np.clip(point, 0.0, a))
    height = value - top_value + _TAIL_DROP
    reach = point - np.maximum(height, 0.0) / gradient
    useful = inside & np.isfinite(reach) & ((gradient < 0) if right else (gradient > 0))
    return np.where(useful, np.clip(reach, 0.0, a), a if right else 0.0)


def supply_difference(bending_eV: ArrayLike, e00_eV: ArrayLike, temperature_K: ArrayLike,
                      eta: ArrayLike, bias_kt: ArrayLike
                      ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """The energy integral of the module's docstring, with its slopes, relative to its peak.

    ``S = int_0^inf T(E) [ln(1 + e^{eta - eps}) - ln(1 + e^{eta - v - eps})] dE`` (eV) with
    ``a = e V_bb`` the band bending (eV), ``eta`` the reduced Fermi level of the semiconductor
    and ``v = eV/kT``.

    Returns
    -------
    log_scale, total, d_bending, d_bias : ndarray
        ``S = e^{log_scale} total`` (signed as ``v``), ``dS/da = e^{log_scale} d_bending``
        (at fixed Fermi levels) and ``dS/dv = e^{log_scale} d_bias`` (at fixed ``a``).

    Notes
    -----
    Below the top the integrand is ``T(E) D(x)`` with ``x = c - eps`` for the higher of the two
    Fermi levels ``c`` and ``D`` the net supply of :func:`_supply_window` (width ``|v|``); it is
    log-concave and integrated by Gauss-Legendre panels over :func:`_integration_window`.
    Above the top ``T = 1`` and the integral is ``kT [F(c - a/kT) - F(c - |v| - a/kT)]`` with
    ``F(y) = -Li_2(-e^y)`` (:func:`log_over_top_supply`). The slopes: ``d ln T/da =
    -sqrt(1 - E/a)/E00`` (from ``g - u g' = sqrt(1 - u)``; the moving top adds to the
    tunnelling range what it takes from the flux over the top, so no end term), and ``dS/dv``
    is the metal's occupation ``1/(1 + e^{eps - eta + v})`` integrated the same way
    (``kT ln(1 + e^{...})`` above the top).
    """
    inputs = np.broadcast_arrays(*(np.asarray(x, dtype=float)
                                   for x in (bending_eV, e00_eV, temperature_K, eta, bias_kt)))
    shape = inputs[0].shape
    a, e00, t, eta, v = (x.ravel() for x in inputs)
    kt = BOLTZMANN_EV * t
    width = np.abs(v)
    lead = eta + np.maximum(-v, 0.0)  # the higher Fermi level, in kT above the band edge
    metal_leads = v < 0
    sign = np.where(v < 0, -1.0, 1.0)
    with np.errstate(over="ignore", divide="ignore", invalid="ignore", under="ignore"):
        safe = np.where(a > 0, a, 1.0)
        edges, top_value = _integration_window(safe, e00, kt, lead, width)
        # Only panels of positive length are integrated (most entries use two or three of
        # the six), in blocks whose node arrays stay in the processor's cache.
        owner, panel = np.nonzero(np.diff(edges, axis=-1) > 0)
        sums = np.zeros((3, a.size))
        for start in range(0, owner.size, _PANEL_BLOCK):
            rows = slice(start, start + _PANEL_BLOCK)
            entry = owner[rows]
            for q, part in zip(sums, _tunnelling_sums(
                    edges[entry, panel[rows]], edges[entry, panel[rows] + 1], safe[entry],
                    e00[entry], kt[entry], lead[entry], width[entry], metal_leads[entry],
                    top_value[entry]), strict=True):
                q += np.bincount(entry, weights=part, minlength=a.size)
        tunnel, tunnel_bending, tunnel_bias = sums

        top_lead = lead - np.maximum(a, 0.0) / kt
        log_over_lead = log_over_top_supply(top_lead)
        # No barrier left (refused by the validity domain; kept finite for the solver):
        # everything above the band edge passes.
        gone = ~(a > 0)
        top_value = np.where(gone, np.log(kt) + log_over_lead, top_value)
        over = np.exp(np.log(kt) + log_over_lead - top_value) * -np.expm1(
            log_over_top_supply(top_lead - width) - log_over_lead)
        metal_top = np.where(metal_leads, top_lead, top_lead - width)
        over_bias = np.exp(np.log(kt) + log_fermi_supply(metal_top) - top_value)
        tunnel, tunnel_bending, tunnel_bias = (np.where(gone, 0.0, q) for q in
                                               (tunnel, tunnel_bending, tunnel_bias))
    return tuple(q.reshape(shape) for q in (  # type: ignore[return-value]
        top_value, sign * (tunnel + over), -sign * tunnel_bending, tunnel_bias + over_bias))


def _tunnelling_sums(start: FloatArray, end: FloatArray, a: FloatArray, e00: FloatArray,
                     kt: FloatArray, lead: FloatArray, width: FloatArray,
                     metal_leads: FloatArray, top_value: FloatArray
                     ) -> tuple[FloatArray, FloatArray, FloatArray]:
    """The tunnelling part of :func:`supply_difference` on a list of panels (each row one
    panel of one entry): the integral over the panel and its two slopes, relative to
    ``e^{top_value}``, by the Gauss-Legendre rule.

    A panel that starts at the band edge is mapped by ``E = L s^2``: there the exponent
    ``(a/E00) g(E/a)`` has a ``u ln u`` term whose slope is singular; in ``s`` it is
    ``s^2 ln s``, which the rule integrates to the accuracy of the other panels.
    """
    length = (end - start)[:, None]
    at_edge = (start == 0.0)[:, None]
    nodes = start[:, None] + length * np.where(at_edge, _SQUARED_NODES, _UNIT_NODES)
    weights = length * np.where(at_edge, _SQUARED_WEIGHTS, _UNIT_WEIGHTS)
    x = lead[:, None] - nodes / kt[:, None]
    ratio = np.maximum(nodes / a[:, None], 1e-300)  # the nodes lie in [0, a]
    root = np.sqrt(1.0 - ratio)
    # depletion_barrier_exponent written out, to reuse sqrt(1 - u) in the bending slope
    log_transmission = -(a / e00)[:, None] * (
        root - ratio * (np.log1p(root) - 0.5 * np.log(ratio)))
    net, metal_share = _net_supply_at_nodes(x, width[:, None],
                                             metal_leads[:, None].astype(float))
    weighted = weights * np.exp(log_transmission + net - top_value[:, None])
    return (np.sum(weighted, axis=-1), np.sum(weighted * root, axis=-1) / e00,
            np.sum(weighted * metal_share, axis=-1))


def _net_supply_at_nodes(x: FloatArray, width: FloatArray, metal_leads: FloatArray
                         ) -> tuple[FloatArray, FloatArray]:
    """``ln D(x)`` of :func:`_supply_window` and the metal's occupation divided by ``D``.

    The cheap form for the quadrature nodes: ``D = softplus(x) - softplus(x - w)`` directly;
    the metal's occupation is ``1 - e^{-softplus(m)}`` at its reduced level ``m`` (``x`` in
    reverse bias, ``x - w`` in forward bias). Far in the Boltzmann tail (``x < -700``) ``D``
    underflows to 0 and so does the node's weight: only where the current itself is below
    the floating-point range.
    """
    lead = _softplus(x)
    lag = _softplus(x - width)
    gap = lead - lag
    metal = lag + metal_leads * gap
    occupied = -np.expm1(-metal) / np.maximum(gap, 1e-300)
    net = np.log(gap)
    narrow = width < _NARROW_WINDOW
    if np.any(narrow):
        # D = w sigma(x) and the metal's occupation sigma(x) to first order in w.
        wide = np.maximum(width, 1e-300)
        net = np.where(narrow, np.log(wide) - _softplus(-x), net)
        occupied = np.where(narrow, 1.0 / wide, occupied)
    return net, occupied


def thermionic_field_current_density_A_per_cm2(
    junction_voltage_V: ArrayLike, temperature_K: ArrayLike, barrier_height_eV: ArrayLike,
    doping_per_cm3: ArrayLike, effective_mass_ratio: ArrayLike, dielectric_constant: ArrayLike,
    richardson_constant_A_cm2_K2: ArrayLike,
) -> FloatArray:
    """Signed current density (A/cm^2) of the contact at the junction voltage (forward > 0).

    The formula of the module's docstring: ``(A** T/k)`` times the energy integral
    (:func:`supply_difference`), with the Fermi level of :func:`reduced_fermi_level`.
    """
    eta = reduced_fermi_level(temperature_K, doping_per_cm3, effective_mass_ratio)
    e00 = characteristic_tunnelling_energy_eV(doping_per_cm3, dielectric_constant,
                                              effective_mass_ratio)
    return _density_and_slope(junction_voltage_V, temperature_K, barrier_height_eV, eta, e00,
                              richardson_constant_A_cm2_K2)[0]


def _density_and_slope(u: ArrayLike, temperature_K: ArrayLike, barrier_height_eV: ArrayLike,
                       eta: ArrayLike, e00_eV: ArrayLike,
                       richardson_constant_A_cm2_K2: ArrayLike,
                       ) -> tuple[FloatArray, FloatArray]:
    """``J(u)`` in A/cm^2 and ``dJ/du`` in A/(cm^2 V): the band bending
    ``phi_B + eta kT - u`` falls and the metal's Fermi level drops as ``u`` rises."""
    v = np.asarray(u, dtype=float)
    t = np.asarray(temperature_K, dtype=float)
    kt = BOLTZMANN_EV * t
    bending = np.asarray(barrier_height_eV, dtype=float) + np.asarray(eta) * kt - v
    log_scale, total, d_bending, d_bias = supply_difference(bending, e00_eV, t, eta, v / kt)
    with np.errstate(over="ignore", invalid="ignore"):
        scale = np.exp(np.log(np.asarray(richardson_constant_A_cm2_K2, dtype=float) * t
                              / BOLTZMANN_EV) + log_scale)
        return scale * total, scale * (-d_bending + d_bias / kt)


def _fermi_level_at_points(temperature_K: ArrayLike, doping_per_cm3: ArrayLike,
                           effective_mass_ratio: ArrayLike) -> FloatArray:
    """:func:`reduced_fermi_level`, solved once per distinct temperature when the temperatures
    form one axis (a series has a handful of temperatures and hundreds of points)."""
    t = np.asarray(temperature_K, dtype=float)
    per_set = all(np.ndim(p) == 0 or np.shape(p)[-1] == 1
                  for p in (doping_per_cm3, effective_mass_ratio))
    if t.ndim != 1 or not per_set:
        return reduced_fermi_level(t, doping_per_cm3, effective_mass_ratio)
    distinct, where = np.unique(t, return_inverse=True)
    return np.take(reduced_fermi_level(distinct, doping_per_cm3, effective_mass_ratio),
                   where, axis=-1)

def _solve_contact_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, doping_per_cm3: FloatArray,
    semiconductor_effective_mass_ratio: FloatArray, dielectric_constant: FloatArray,
    richardson_constant_A_cm2_K2: FloatArray, series_resistance_ohm: FloatArray,
    shunt_resistance_ohm: FloatArray,
) -> FloatArray:
    """Signed I in A: the contact's current at the junction voltage ``u`` behind ``R_s``, with
    the shunt, ``I = A J(u) + u/R_sh`` and ``u = V - I R_s``.

    ``F(u) = u + R_s I(u) - V`` rises in ``u`` and, since ``|I(u)| <= |I(V)|`` between 0 and
    ``V``, has its root between ``V`` and ``V - R_s I(V)`` (clipped at 0). Newton steps with
    the analytic ``dI/du`` (:func:`supply_difference`) from ``u = V`` (in forward
    bias from the Lambert W solution of the local exponential, see the code), kept inside that
    bracket (a step leaving it is replaced by the bracket's midpoint, and the bracket shrinks
    at every step), vectorised over parameter sets and points; only entries not yet within
    :data:`_JUNCTION_TOLERANCE` of ``|V|`` are evaluated again.
    """
    area = device.require_area()
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        fermi = _fermi_level_at_points(temperature_K, doping_per_cm3,
                                       semiconductor_effective_mass_ratio)
    e00 = characteristic_tunnelling_energy_eV(doping_per_cm3, dielectric_constant,
                                              semiconductor_effective_mass_ratio)
    arrays = np.broadcast_arrays(voltage_V, temperature_K, barrier_height_eV, fermi, e00,
                                 richardson_constant_A_cm2_K2, series_resistance_ohm,
                                 shunt_resistance_ohm)
    shape = arrays[0].shape
    v, t, phi, eta, e00, rich, r_s, r_sh = (np.asarray(a, dtype=float).ravel()
                                            for a in arrays)

    def current_and_slope(u: FloatArray, index: np.ndarray) -> tuple[FloatArray, FloatArray]:
        density, slope = _density_and_slope(u, t[index], phi[index], eta[index], e00[index],
                                            rich[index])
        return area * density + u / r_sh[index], area * slope + 1.0 / r_sh[index]

    result = np.zeros(v.size)
    result[~np.isfinite(v)] = np.nan
    index = np.flatnonzero(np.isfinite(v) & (v != 0))
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        u = v[index].copy()
        current, slope = current_and_slope(u, index)
        drop = r_s[index] * current
        bound = np.where(np.abs(drop) < np.abs(u), u - drop, 0.0)
        low, high = np.minimum(u, bound), np.maximum(u, bound)
        # Forward: start where a current exponential in u with the local slope at V would
        # meet the resistor, V - nu W(R_s I'(V)) with nu = I(V)/I'(V) (the diode's Lambert W
        # solution); Newton from V alone would creep down by ~nkT per step.
        forward = (u > 0) & (current > 0) & (slope > 0)
        guess = u - (current / slope) * lambert_w_from_log(np.log(r_s[index] * slope))
        restart = forward & np.isfinite(guess) & (guess > low) & (guess < high)
        if restart.any():
            u = np.where(restart, guess, u)
            current[restart], slope[restart] = current_and_slope(u[restart], index[restart])
        for _ in range(_JUNCTION_MAX_STEPS):
            excess = u + r_s[index] * current - v[index]
            # Where the Newton step is below 1e-6 kT/e and changes the current by under 1e-6
            # of itself, the current linearised to that step is exact to ~1e-12 (the curvature
            # term of an exponential is (I' du/I)^2/2 of I; no law here rises faster than
            # e^{eV/kT}) and meets the circuit exactly: taken without evaluating the integral
            # again (most low-current points settle on their first evaluation).
            shift = -excess / (1.0 + r_s[index] * slope)
            linear = (np.abs(slope * shift) <= _LINEAR_STEP * np.abs(current)) & (
                np.abs(shift) <= _LINEAR_STEP * BOLTZMANN_EV * t[index])
            settled = (np.abs(excess) <= _JUNCTION_TOLERANCE * np.abs(v[index])) | (
                high - low <= _JUNCTION_TOLERANCE * np.abs(v[index])) | linear
            result[index[settled]] = np.where(linear, current + slope * shift,
                                              current)[settled]
            keep = ~settled
            if not keep.any():
                break
            index, u, current, slope, excess, low, high = (
                a[keep] for a in (index, u, current, slope, excess, low, high))
            high = np.where(excess > 0, np.minimum(high, u), high)
            low = np.where(excess > 0, low, np.maximum(low, u))
            # Forward: Newton on ln(R_s I(u)) - ln(V - u), nearly straight in u where I is
            # exponential (Newton on the excess itself creeps by ~nkT per step from above);
            # reverse: on the excess, where the current is small and nearly linear.
            logged = (v[index] > 0) & (current > 0) & (u < v[index])
            with_log = u - (np.log(r_s[index] * current) - np.log(v[index] - u)) / (
                slope / current + 1.0 / (v[index] - u))
            step = np.where(logged, with_log, u - excess / (1.0 + r_s[index] * slope))
            u = np.where(np.isfinite(step) & (step >= low) & (step <= high), step,
                         0.5 * (low + high))
            current, slope = current_and_slope(u, index)
        else:
            result[index] = current
    return result.reshape(shape)



#: The last circuit :func:`_contact_current` solved in this thread: ``(inputs, junction
#: voltages)``, the inputs copied. The validity check of the same evaluation
#: (:func:`_band_bending_in_kt`, called by :meth:`Mechanism.current` right after the current
#: with the same arrays) reads ``u = V - I R_s`` from here instead of solving again. Inputs are
#: compared by value, so a stale entry is never used; one per thread, as the likelihood runs
#: blocks of walkers on a thread pool.
_LAST_CIRCUIT = threading.local()


def _circuit_inputs(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                    params: dict[str, FloatArray]) -> tuple:
    return (device, np.asarray(voltage_V), np.asarray(temperature_K),
            *(np.asarray(params[name]) for name in sorted(params)))


def _same_inputs(first: tuple, second: tuple) -> bool:
    return len(first) == len(second) and all(
        (a == b) if isinstance(a, Device) else
        (np.shape(a) == np.shape(b) and np.array_equal(a, b, equal_nan=True))
        for a, b in zip(first, second, strict=True))


def _contact_current(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                     **params: FloatArray) -> FloatArray:
    """:func:`_solve_contact_current`, remembering the junction voltages
    (:data:`_LAST_CIRCUIT`)."""
    current = _solve_contact_current(voltage_V, temperature_K, device, **params)
    inputs = tuple(a if isinstance(a, Device) else np.array(a, copy=True)
                   for a in _circuit_inputs(voltage_V, temperature_K, device, params))
    _LAST_CIRCUIT.entry = (inputs, voltage_V - current * params["series_resistance_ohm"])
    return current


def junction_voltage_V(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                       **params: FloatArray) -> FloatArray:
    """``u = V - I R_s``: the share of the bias across the contact itself."""
    inputs = _circuit_inputs(voltage_V, temperature_K, device, params)
    entry = getattr(_LAST_CIRCUIT, "entry", None)
    if entry is None or not _same_inputs(entry[0], inputs):
        _contact_current(voltage_V, temperature_K, device, **params)
        entry = _LAST_CIRCUIT.entry
    return entry[1]


def _band_bending_in_kt(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                        **params: FloatArray) -> FloatArray:
    """``e V_bb/kT = (phi_B - u)/kT + eta`` at the junction voltage ``u = V - I R_s``: the
    series resistance takes the rest of a forward bias, so a bias beyond the barrier is
    refused only where the contact itself would reach flat band."""
    eta = _fermi_level_at_points(temperature_K, params["doping_per_cm3"],
                                 params["semiconductor_effective_mass_ratio"])
    junction = junction_voltage_V(voltage_V, temperature_K, device, **params)
    return (params["barrier_height_eV"] - junction) / (BOLTZMANN_EV * temperature_K) + eta


THERMIONIC_FIELD_VALIDITY = (
    ValidityCondition(
        id="band_bending_above_3kT",
        quantity="e V_bb/kT (band bending of the depletion region in kT)",
        limit=MIN_BAND_BENDING_KT,
        bound="lower",
        reason=(
            "the parabolic barrier is the depletion approximation, which needs a band bending "
            "of several kT (common practice); near flat band the barrier, its width and the "
            "tunnelling through it are not described"
        ),
        evaluate=_band_bending_in_kt,
    ),
)

THERMIONIC_FIELD_DIODE = Mechanism(
    id="thermionic_field_diode",
    family="emission",
    name="Schottky diode with thermionic-field emission (tunnelling through the barrier top)",
    formula=(
        "I = A J(V - I R_s) + (V - I R_s)/R_sh;  J = (A** T/k) int_0^inf T(E) "
        "[ln(1 + e^(eta - E/kT)) - ln(1 + e^(eta - (E + eV)/kT))] dE, "
        "T(E) = exp(-(eV_bb/E00) g(E/eV_bb)) below the top, 1 above; "
        "eV_bb = e phi_B + eta kT - eV, N_D = N_c F_1/2(eta), "
        "E00 = (e hbar/2) sqrt(N_D/(m* eps_s))"
    ),
    source=(
        "Padovani & Stratton, Solid-State Electron. 9, 695 (1966); Crowell & Rideout, "
        "Solid-State Electron. 12, 89 (1969); Rhoderick & Williams, Metal-Semiconductor "
        "Contacts, 2nd ed. (Oxford, 1988)"
    ),
    parameters=(
        _BARRIER,
        Parameter(
            name="doping_per_cm3", unit="cm^-3", symbol="N_D",
            description="net donor density of the semiconductor (fully ionised)",
            lower=1e14, upper=1e20, typical=1e18, log_scale=True, device_prior="doping_cm3",
            # a measured doping gives a Gaussian prior: sampled in log10 all the same, as its
            # scale (1e18) would otherwise swamp the other coordinates' covariance
            sample_in_log=True,
        ),
        Parameter(
            name="semiconductor_effective_mass_ratio", unit="1", symbol="m*/m0",
            description="conduction-band effective mass of the semiconductor",
            lower=0.02, upper=2.0, typical=0.2,
            device_prior="semiconductor_effective_mass_ratio",
        ),
        Parameter(
            name="dielectric_constant", unit="1", symbol="eps_s",
            description="static relative permittivity of the semiconductor",
            lower=2.0, upper=30.0, typical=9.5,
            device_prior="semiconductor_dielectric_constant",
        ),
        _RICHARDSON, _SERIES, _SHUNT,
    ),
    estimates=(
        DiodeEstimate("barrier_height_eV", "thermionic_field_barrier_eV"),
        DiodeEstimate("doping_per_cm3", "thermionic_field_doping_per_cm3"),
        # Cheung's R_s, not the reverse-branch shunt: on a thermionic-field contact the
        # reverse current is tunnelling, which a shunt read from it would stand in for.
        _RESISTANCE_ESTIMATES[0],
    ),
    checks=(ThermallyActivated(),),  # the supply over the barrier is thermally activated
    # A doped semiconductor in the device description, or a rectifier (polarities differ)
    # whose ideality grows on cooling: where n does not grow, E00 << kT, i.e. thermionic
    # emission, which schottky_diode describes.
    needs=("thermionic_field_signature",),
    signed_current=_contact_current,
    temperature_dependence=(
        "activated, with an ideality n = (E00/kT) coth(E00/kT) that grows on cooling; "
        "reverse current rising as exp(eV_R (1/kT - 1/E0)); rectifying (not odd in V)"
    ),
    validity=THERMIONIC_FIELD_VALIDITY,
)
