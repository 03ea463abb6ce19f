"""Thermionic-field emission over a Schottky contact: electrons tunnel through the barrier top.

On a heavily doped semiconductor the depletion region is thin, and electrons thermally excited
part of the way up the barrier tunnel through the rest of it. Padovani & Stratton,
Solid-State Electron. 9, 695 (1966), evaluate the current as the flux of electrons at each
energy times their WKB transmission through the parabolic depletion barrier; its signature is
an ideality factor ``n = (E00/kT) coth(E00/kT)`` that grows on cooling, with
``E00 = (e hbar/2) sqrt(N_D/(m* eps_s))``.

Model (Padovani & Stratton 1966; Crowell & Rideout, Solid-State Electron. 12, 89 (1969);
Rhoderick & Williams, *Metal-Semiconductor Contacts*, 2nd ed. 1988, ch. 2 -- all from memory),
energies from the conduction-band edge in the neutral semiconductor, ``n``-type:

* the barrier in the depletion approximation is ``U(x) = e V_bb (1 - x/W)^2`` with the band
  bending ``V_bb = phi_B - phi_n - V`` (``phi_n = (kT/e) ln(N_c/N_D)``, the Fermi level below
  the band edge, Boltzmann statistics) and ``W = sqrt(2 eps_s V_bb/(e N_D))``;
* its WKB transmission at energy ``E < e V_bb`` is ``exp(-(e V_bb/E00) g(E/eV_bb))`` with
  ``g(u) = sqrt(1 - u) - u ln((1 + sqrt(1 - u))/sqrt(u))`` (our integration of
  ``2 int kappa dx`` over the parabola; ``2 W sqrt(2 m* e V_bb)/hbar = 2 e V_bb/E00`` is what
  ties the barrier to ``E00``), and 1 above the barrier top;
* the current density is the Boltzmann supply times that transmission, minus the same flux
  from the metal (detailed balance):

  .. math::

      J = \\frac{A^{**} T}{k} \\frac{N_D}{N_c}
          \\Big[\\int_0^{eV_{bb}} e^{-E/kT - (eV_{bb}/E_{00}) g(E/eV_{bb})}\\, dE
                + kT e^{-eV_{bb}/kT}\\Big] \\big(1 - e^{-eV/kT}\\big).

The integral is evaluated by Gauss-Legendre quadrature over the energies that carry the
current (see :func:`log_supply_integral_eV`), good to 2e-4 of the integral against scipy's
adaptive quadrature over E00 = 1-150 meV, band bending 0.05-1.5 eV and 10-600 K (tests).
Without tunnelling (``E00 -> 0``) it is thermionic emission with ``n = 1`` exactly. The
saddle point of the integral lies at ``E_m = e V_bb/cosh^2(E00/kT)`` and gives back Padovani &
Stratton's exponent ``exp(-e V_bb/E0)`` with ``E0 = E00 coth(E00/kT)``, so that
``d ln J/dV = e/E0`` in forward bias, and ``e (1/kT - 1/E0)`` in reverse bias -- their
``epsilon' = E00/(E00/kT - tanh(E00/kT))`` (checked in the tests). The closed form
usually quoted for the forward current, with the prefactor ``sqrt(pi E00 e V_bb)/cosh(E00/kT)``
(as we recall it from textbook reproductions), differs from the saddle point of the same
integral, ``sqrt(4 pi E00 e V_bb tanh(E00/kT))/cosh(E00/kT)``, by ``2 sqrt(tanh(E00/kT))``;
we evaluate the integral itself, so neither approximation enters.

Validity (refused, not extrapolated): the band bending must be at least 3 kT (depletion
approximation; checked at the applied bias, which over-estimates the junction's share of a
forward bias, so the check is conservative), and the Fermi level at least 2 kT below the band
edge (Boltzmann statistics of the supply; common practice). Donors are taken as fully ionised.

**Declared, not registered.** Those two conditions leave the thermionic-field regime itself
outside the domain: ``N_D <= N_c e^-2`` with ``N_c ~ (m* T)^{3/2}`` keeps
``E00/kT ~ m*^{1/4} T^{-1/4} eps_s^{-1/2}`` below about 0.3-0.6 (m* = 0.07-1, 50-300 K), where
``n = (E00/kT) coth(E00/kT) <= 1.1``, while contacts reported as thermionic-field have
``n`` = 1.2-2 on degenerate doping. Registering it would offer a hypothesis that refuses the
data it is meant for. What it needs: the Fermi-Dirac supply ``ln(1 + exp((E_F - E)/kT))`` and
the Fermi level of a degenerate semiconductor (``N_D = N_c F_1/2(eta)`` inverted), with the
metal's supply subtracted term by term instead of the factor ``1 - exp(-eV/kT)``. The
quadrature, its tail bounds, the analytic slope and the series-resistance solution carry over.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from mechid.catalogue.base import FloatArray, Mechanism, Parameter
from mechid.catalogue.checks import ThermallyActivated
from mechid.catalogue.diode import _BARRIER, _RICHARDSON, _SERIES, _SHUNT, lambert_w_from_log
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

#: Gauss-Legendre nodes of the energy integral (24: within 2e-4 of adaptive quadrature over
#: the ranges in the module's docstring; 16 nodes reached 6e-3).
_QUADRATURE_NODES, _QUADRATURE_WEIGHTS = np.polynomial.legendre.leggauss(24)
#: The integrand is log-concave in E; its tangent at this many curvature widths from the
#: saddle point bounds the tails (see :func:`log_supply_integral_eV`).
_TANGENT_REACH = 6.0
#: Tails whose bound lies this many nats below the peak are left out (e^-40 of the peak).
_TAIL_DROP = 40.0
#: Tolerance of the junction-voltage search, relative to the bias (on ``u + R_s I(u) - V``
#: and on the bracket width), and its step cap (Newton converges in a few steps; a step that
#: leaves the bracket halves it instead).
_JUNCTION_TOLERANCE = 1e-12
_JUNCTION_MAX_STEPS = 100
#: Smallest band bending and Fermi-level depth, in kT, where the model holds.
MIN_BAND_BENDING_KT = 3.0
MIN_FERMI_DEPTH_KT = 2.0


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


def band_edge_density_per_cm3(temperature_K: ArrayLike,
                              effective_mass_ratio: ArrayLike) -> FloatArray:
    """Effective density of states of the conduction band, ``N_c = 2 (2 pi m* k T/h^2)^{3/2}``.

    Sze & Ng 2007, ch. 1 (from memory); in cm^-3.
    """
    thermal = (2.0 * np.pi * np.asarray(effective_mass_ratio, dtype=float) * ELECTRON_MASS
               * BOLTZMANN * np.asarray(temperature_K, dtype=float)
               / PLANCK**2)
    return 2.0 * thermal**1.5 * 1e-6


def depletion_barrier_exponent(energy_share: ArrayLike) -> FloatArray:
    """``g(u) = sqrt(1 - u) - u ln((1 + sqrt(1 - u))/sqrt(u))`` for ``0 < u <= 1``.

    The WKB exponent through the parabolic depletion barrier at energy ``E = u e V_bb`` is
    ``(e V_bb/E00) g(u)``; ``g(0) = 1`` (a carrier at the band edge crosses the whole
    barrier), ``g(1) = 0`` (at its top).
    """
    u = np.asarray(energy_share, dtype=float)
    root = np.sqrt(1.0 - u)
    return root - u * np.log((1.0 + root) / np.sqrt(u))


def log_supply_integral_eV(band_bending_eV: ArrayLike, e00_eV: ArrayLike,
                           temperature_K: ArrayLike) -> FloatArray:
    """``ln[int_0^a exp(-E/kT - (a/E00) g(E/a)) dE + kT exp(-a/kT)]``, ``a = e V_bb`` (eV).

    The first term is the tunnelling flux, the second the flux over the barrier top. The
    exponent ``h(E)`` is concave in ``E`` (``g'' > 0``), so the integrand is log-concave with its
    peak at the saddle point ``E_m = a/cosh^2(E00/kT)`` (curvature width
    ``sigma = sqrt(2 a E00 tanh(E00/kT))/cosh(E00/kT)``). The tangent to ``h`` at
    ``E_m +- 6 sigma`` lies above ``h`` beyond that point, which bounds each tail; the
    quadrature covers the energies where that bound is within 40 nats of the peak (or the
    whole of ``[0, a]``). Evaluated relative to the peak, so deep barriers do not underflow.
    """
    return supply_integral_and_slope(band_bending_eV, e00_eV, temperature_K)[0]


def supply_integral_and_slope(band_bending_eV: ArrayLike, e00_eV: ArrayLike,
                              temperature_K: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """:func:`log_supply_integral_eV` and its derivative in the band bending ``a`` (1/eV).

    ``d ln T/da = -sqrt(1 - E/a)/E00`` (from ``g - u g' = sqrt(1 - u)``), and the moving
    top of the tunnelling range adds ``e^{-a/kT}`` (transmission 1 there) which the flux over
    the top loses, so ``dS/da = -(1/E00) int T sqrt(1 - E/a) e^{-E/kT} dE``, taken on the
    same quadrature nodes.
    """
    a, e00, t = np.broadcast_arrays(*(np.asarray(x, dtype=float)
                                      for x in (band_bending_eV, e00_eV, temperature_K)))
    kt = BOLTZMANN_EV * t
    y = e00 / kt
    with np.errstate(over="ignore", divide="ignore", invalid="ignore", under="ignore"):
        peak = a / np.cosh(y) ** 2
        width = np.sqrt(2.0 * a * e00 * np.tanh(y)) / np.cosh(y)

        def exponent(energy, a=a, kt=kt, e00=e00):  # noqa: ANN001, ANN202
            return -energy / kt - (a / e00) * depletion_barrier_exponent(
                np.clip(energy / a, 1e-300, 1.0))

        def slope(energy):  # noqa: ANN001, ANN202
            share = np.clip(energy / a, 1e-300, 1.0)
            return -1.0 / kt + np.log((1.0 + np.sqrt(1.0 - share)) / np.sqrt(share)) / e00

        top_value = exponent(peak)
        upper0 = np.minimum(peak + _TANGENT_REACH * width, a)
        lower0 = np.maximum(peak - _TANGENT_REACH * width, 0.0)
        rise_up = np.maximum(exponent(upper0) - top_value + _TAIL_DROP, 0.0)
        rise_down = np.maximum(exponent(lower0) - top_value + _TAIL_DROP, 0.0)
        upper = np.where(upper0 >= a, a,
                         np.minimum(a, upper0 + rise_up / np.abs(slope(upper0))))
        lower = np.where(lower0 <= 0.0, 0.0,
                         np.maximum(0.0, lower0 - rise_down / np.abs(slope(lower0))))
        half, middle = 0.5 * (upper - lower), 0.5 * (upper + lower)
        nodes = middle[..., None] + half[..., None] * _QUADRATURE_NODES
        weighted = _QUADRATURE_WEIGHTS * np.exp(
            exponent(nodes, a[..., None], kt[..., None], e00[..., None]) - top_value[..., None])
        tunnel = half * np.sum(weighted, axis=-1)
        tunnel_slope = half * np.sum(
            weighted * np.sqrt(np.clip(1.0 - nodes / a[..., None], 0.0, 1.0)), axis=-1) / e00
        # Both terms relative to the peak value exp(top_value).
        over_top = np.exp(np.log(kt) - a / kt - top_value)
        log_total = np.log(tunnel + over_top) + top_value
        derivative = -tunnel_slope / (tunnel + over_top)
        barrier_gone = ~(a > 0)
        log_total = np.where(barrier_gone, np.log(kt) - a / kt, log_total)
        derivative = np.where(barrier_gone, -1.0 / kt, derivative)
        return log_total, derivative


def fermi_depth_eV(temperature_K: ArrayLike, doping_per_cm3: ArrayLike,
                   effective_mass_ratio: ArrayLike) -> FloatArray:
    """``phi_n = (kT/e) ln(N_c/N_D)``: the Fermi level below the band edge (Boltzmann), in eV."""
    t = np.asarray(temperature_K, dtype=float)
    return BOLTZMANN_EV * t * np.log(band_edge_density_per_cm3(t, effective_mass_ratio)
                                     / np.asarray(doping_per_cm3, dtype=float))


def thermionic_field_current_density_A_per_cm2(
    junction_voltage_V: ArrayLike, temperature_K: ArrayLike, barrier_height_eV: ArrayLike,
    doping_per_cm3: ArrayLike, effective_mass_ratio: ArrayLike, dielectric_constant: ArrayLike,
    richardson_constant_A_cm2_K2: ArrayLike,
) -> FloatArray:
    """Signed current density (A/cm^2) of the contact at the junction voltage (forward > 0).

    The formula of the module's docstring: ``(A** T/k)(N_D/N_c)`` times the supply integral
    (:func:`log_supply_integral_eV`) times ``1 - exp(-eV/kT)``.
    """
    return _density_and_slope(junction_voltage_V, temperature_K, barrier_height_eV,
                              doping_per_cm3, effective_mass_ratio, dielectric_constant,
                              richardson_constant_A_cm2_K2)[0]


def _density_and_slope(u: ArrayLike, temperature_K: ArrayLike, barrier_height_eV: ArrayLike,
                       doping_per_cm3: ArrayLike, effective_mass_ratio: ArrayLike,
                       dielectric_constant: ArrayLike, richardson_constant_A_cm2_K2: ArrayLike,
                       ) -> tuple[FloatArray, FloatArray]:
    """``J(u)`` in A/cm^2 and ``dJ/du`` in A/(cm^2 V) (the band bending falls as ``u`` rises)."""
    v = np.asarray(u, dtype=float)
    t = np.asarray(temperature_K, dtype=float)
    kt = BOLTZMANN_EV * t
    depth = fermi_depth_eV(t, doping_per_cm3, effective_mass_ratio)
    e00 = characteristic_tunnelling_energy_eV(doping_per_cm3, dielectric_constant,
                                              effective_mass_ratio)
    bending = np.asarray(barrier_height_eV, dtype=float) - depth - v
    log_supply, supply_slope = supply_integral_and_slope(bending, e00, t)
    with np.errstate(over="ignore", invalid="ignore"):
        flux = np.exp(np.log(np.asarray(richardson_constant_A_cm2_K2, dtype=float) * t
                             / BOLTZMANN_EV) - depth / kt + log_supply)
        balance = -np.expm1(-v / kt)  # 1 - exp(-eV/kT): the metal's flux subtracted
        density = flux * balance
        slope = -supply_slope * density + flux * np.exp(-v / kt) / kt
    return density, slope


def _contact_current(
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
    the analytic ``dI/du`` (:func:`supply_integral_and_slope`) from ``u = V`` (in forward
    bias from the Lambert W solution of the local exponential, see the code), kept inside that
    bracket (a step leaving it is replaced by the bracket's midpoint, and the bracket shrinks
    at every step), vectorised over parameter sets and points; only entries not yet within
    :data:`_JUNCTION_TOLERANCE` of ``|V|`` are evaluated again.
    """
    area = device.require_area()
    arrays = np.broadcast_arrays(voltage_V, temperature_K, barrier_height_eV, doping_per_cm3,
                                 semiconductor_effective_mass_ratio, dielectric_constant,
                                 richardson_constant_A_cm2_K2, series_resistance_ohm,
                                 shunt_resistance_ohm)
    shape = arrays[0].shape
    v, t, phi, dop, mass, eps, rich, r_s, r_sh = (np.asarray(a, dtype=float).ravel()
                                                  for a in arrays)

    def current_and_slope(u: FloatArray, index: np.ndarray) -> tuple[FloatArray, FloatArray]:
        density, slope = _density_and_slope(u, t[index], phi[index], dop[index], mass[index],
                                            eps[index], rich[index])
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
            settled = (np.abs(excess) <= _JUNCTION_TOLERANCE * np.abs(v[index])) | (
                high - low <= _JUNCTION_TOLERANCE * np.abs(v[index]))
            result[index[settled]] = current[settled]
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


def _band_bending_in_kt(voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
                        barrier_height_eV: FloatArray, doping_per_cm3: FloatArray,
                        semiconductor_effective_mass_ratio: FloatArray,
                        **_: FloatArray) -> FloatArray:
    """``e V_bb/kT`` at the applied bias (the junction's share of a forward bias is smaller,
    so its band bending larger: refusing on the applied bias is conservative)."""
    depth = fermi_depth_eV(temperature_K, doping_per_cm3, semiconductor_effective_mass_ratio)
    return (barrier_height_eV - depth - voltage_V) / (BOLTZMANN_EV * temperature_K)


def _fermi_depth_in_kt(voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
                       doping_per_cm3: FloatArray,
                       semiconductor_effective_mass_ratio: FloatArray,
                       **_: FloatArray) -> FloatArray:
    """``e phi_n/kT = ln(N_c/N_D)``, broadcast over the points."""
    depth = fermi_depth_eV(temperature_K, doping_per_cm3, semiconductor_effective_mass_ratio)
    return depth / (BOLTZMANN_EV * temperature_K) + 0.0 * voltage_V


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
    ValidityCondition(
        id="fermi_level_below_band_edge",
        quantity="e phi_n/kT = ln(N_c/N_D) (Fermi level below the band edge in kT)",
        limit=MIN_FERMI_DEPTH_KT,
        bound="lower",
        reason=(
            "the supply of electrons is the Boltzmann tail exp(-(E - E_F)/kT) and "
            "phi_n = (kT/e) ln(N_c/N_D), both wrong for a degenerate semiconductor; 2 kT is "
            "the usual margin (common practice)"
        ),
        evaluate=_fermi_depth_in_kt,
    ),
)

THERMIONIC_FIELD_DIODE = Mechanism(
    id="thermionic_field_diode",
    family="emission",
    name="Schottky diode with thermionic-field emission (tunnelling through the barrier top)",
    formula=(
        "I = A J(V - I R_s) + (V - I R_s)/R_sh;  J = (A** T/k)(N_D/N_c) [int_0^{eV_bb} "
        "exp(-E/kT - (eV_bb/E00) g(E/eV_bb)) dE + kT exp(-eV_bb/kT)] (1 - exp(-eV/kT)), "
        "V_bb = phi_B - phi_n - V, E00 = (e hbar/2) sqrt(N_D/(m* eps_s))"
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
    checks=(ThermallyActivated(),),  # the supply over the barrier is thermally activated
    needs=("polarities_differ",),  # a rectifier cannot describe polarities that agree
    signed_current=_contact_current,
    temperature_dependence=(
        "activated, with an ideality n = (E00/kT) coth(E00/kT) that grows on cooling; "
        "reverse current rising as exp(eV_R (1/kT - 1/E0)); rectifying (not odd in V)"
    ),
    validity=THERMIONIC_FIELD_VALIDITY,
)
