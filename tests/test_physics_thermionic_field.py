"""Thermionic-field emission over a Schottky contact (``mechid.catalogue.thermionic_field``).

Outside references: the Padovani-Stratton check values of the physics sheet (E00 and E0 for
N_D = 1e18 cm^-3, m* = 0.2, eps_s = 9.5, computed from the formula with scipy.constants), the
effective density of states from scipy.constants, scipy's adaptive quadrature of the same
energy integral, Padovani & Stratton's forward ideality ``(E00/kT) coth(E00/kT)`` and reverse
slope ``1/epsilon' = (E00/kT - tanh(E00/kT))/E00``, the thermionic-emission diode law in the
limit of no tunnelling, scipy's Brent root for the series resistance, and for the Fermi-Dirac
statistics: the closed form of F_1/2(0) with scipy's zeta, its Boltzmann and Sommerfeld
series, -Li_2(-1) = pi^2/12, an independent inversion of N_D = N_c F_1/2 and the
zero-temperature (box) limit of the Fermi supply.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy import constants, integrate, optimize, special

from mechid.catalogue import mechanism_ids
from mechid.catalogue.thermionic_field import (
    THERMIONIC_FIELD_DIODE,
    _band_bending_in_kt,
    _density_and_slope,
    band_edge_density_per_cm3,
    characteristic_tunnelling_energy_eV,
    depletion_barrier_exponent,
    doping_for_tunnelling_energy_per_cm3,
    fermi_dirac_half,
    log_over_top_supply,
    reduced_fermi_level,
    supply_difference,
    thermionic_field_current_density_A_per_cm2,
)
from mechid.device import Device

KB_EV = constants.k / constants.e
DEVICE = Device(area_cm2=1e-4)


def test_characteristic_energy_matches_the_physics_sheet():
    # physics-references.md section 14, [C]: 13.4695 meV; at 300 K E0 = 28.150 meV, n = 1.08889.
    e00 = float(characteristic_tunnelling_energy_eV(1e18, 9.5, 0.2))
    assert e00 == pytest.approx(13.4695e-3, rel=1e-4)
    kt = KB_EV * 300.0
    e0 = e00 / np.tanh(e00 / kt)
    assert e0 == pytest.approx(28.150e-3, rel=1e-4)
    assert e0 / kt == pytest.approx(1.08889, rel=1e-4)


def test_band_edge_density_from_scipy_constants_and_silicon():
    # N_c = 2 (2 pi m* k T/h^2)^{3/2}, recomputed here with scipy.constants; for silicon's
    # density-of-states mass 1.08 it is the textbook 2.8e19 cm^-3 at 300 K (Sze & Ng, from
    # memory).
    reference = 2 * (2 * np.pi * constants.m_e * constants.k * 300.0 / constants.h**2) ** 1.5
    assert band_edge_density_per_cm3(300.0, 1.0) == pytest.approx(reference * 1e-6, rel=1e-12)
    assert band_edge_density_per_cm3(300.0, 1.08) == pytest.approx(2.8e19, rel=0.01)


def test_barrier_exponent_ends():
    # g(0) = 1: a carrier at the band edge crosses the whole parabola; g(1) = 0 at its top.
    assert float(depletion_barrier_exponent(1e-300)) == pytest.approx(1.0, abs=1e-12)
    assert float(depletion_barrier_exponent(1.0)) == 0.0


def _reference_integral(a: float, e00: float, temperature: float, eta: float, v: float) -> float:
    """The energy integral by scipy's adaptive quadrature, written from the formula: segments
    spaced geometrically from the band edge, linearly over the barrier and every kT/2 near
    both Fermi levels, the supply as ``ln(1 + e^z)`` by numpy.logaddexp."""
    kt = KB_EV * temperature

    def log_integrand(energy: float) -> float:
        shape = (-(a / e00) * depletion_barrier_exponent(max(energy / a, 1e-300))
                 if energy < a else 0.0)
        net = np.logaddexp(0, eta - energy / kt) - np.logaddexp(0, eta - v - energy / kt)
        return shape + np.log(abs(net)) if net != 0 else -np.inf

    end = a + (max(eta, eta - v, 0.0) + 80.0) * kt
    points = {*np.geomspace(1e-14 * a, a, 60), *np.linspace(0, a, 400), *np.linspace(a, end, 100)}
    for fermi in (eta * kt, (eta - v) * kt):
        points |= {*(fermi + kt * np.arange(-40, 41, 0.5))}
    grid = np.array(sorted(p for p in points if 0 <= p <= end))
    peak = max(log_integrand(e) for e in grid[1:])
    with warnings.catch_warnings():
        # quad warns of round-off on segments far below the peak, which add nothing
        warnings.simplefilter("ignore", integrate.IntegrationWarning)
        total = sum(integrate.quad(lambda e: np.exp(log_integrand(e) - peak), lo, hi,
                                   epsabs=0.0, epsrel=1e-11, limit=200)[0]
                    for lo, hi in zip(grid[:-1], grid[1:], strict=True))
    return float(np.sign(v) * total * np.exp(peak))


# Band bending (eV), E00 (eV), T (K), eta, v = eV/kT: thermionic, thermionic-field and field
# emission; non-degenerate and degenerate; forward, near-zero and reverse bias, the metal's
# Fermi level inside the barrier; the peak at the band edge (last rows).
INTEGRAL_CASES = [
    (0.8, 0.002, 300.0, -5.0, 10.0), (0.8, 0.002, 300.0, -5.0, -20.0),
    (0.8, 0.015, 120.0, -3.0, 0.01), (0.8, 0.015, 120.0, -3.0, 25.0),
    (0.8, 0.015, 120.0, -3.0, -40.0), (0.5, 0.04, 80.0, 2.0, 5.0), (0.5, 0.04, 80.0, 2.0, -30.0),
    (0.3, 0.015, 10.0, 60.0, -30.0), (1.2, 0.015, 10.0, 60.0, -1.0), (0.3, 0.08, 10.0, 20.0, 2.0),
    (0.05, 0.08, 10.0, 20.0, 0.01), (1.2, 0.15, 120.0, 60.0, -30.0), (0.3, 0.002, 120.0, 60.0, 2.0),
    (1.2, 0.08, 120.0, -20.0, 2.0), (0.3, 0.08, 10.0, 3.0, 2.0), (0.3, 0.08, 10.0, -20.0, -30.0),
]


@pytest.mark.parametrize("case", INTEGRAL_CASES)
def test_energy_integral_agrees_with_adaptive_quadrature(case):
    # 760 cases over E00 = 2-150 meV, band bending 0.05-1.2 eV, 10-450 K, eta = -20 to 60 and
    # v = -30 to 40 gave a worst relative difference of 1.1e-3 (median 2e-7); these are the
    # hardest of them and a spread of ordinary ones.
    log_scale, total, _, _ = supply_difference(*case)
    assert float(np.exp(log_scale) * total) == pytest.approx(_reference_integral(*case), rel=2e-3)


@pytest.mark.parametrize("case", INTEGRAL_CASES[:8])
def test_integral_slopes_are_its_derivatives(case):
    a, e00, temperature, eta, v = case
    log_scale, _, d_bending, d_bias = supply_difference(*case)

    def value(a_: float, v_: float) -> float:
        s, t, _, _ = supply_difference(a_, e00, temperature, eta, v_)
        return float(np.exp(s) * t)

    step_a, step_v = 1e-6 * a, 1e-5 * max(abs(v), 1.0)
    by_bending = (value(a + step_a, v) - value(a - step_a, v)) / (2 * step_a)
    by_bias = (value(a, v + step_v) - value(a, v - step_v)) / (2 * step_v)
    # The analytic slopes are those of the exact integral; the rule's own value moves a
    # little with its nodes, hence 1e-2.
    assert float(np.exp(log_scale) * d_bending) == pytest.approx(by_bending, rel=1e-2)
    assert float(np.exp(log_scale) * d_bias) == pytest.approx(by_bias, rel=1e-2)


def test_fermi_dirac_half_against_closed_form_and_quadrature():
    # F_1/2(0) = (1 - 2^-1/2) zeta(3/2) (the Dirichlet eta function; Blakemore 1982, from
    # memory), zeta from scipy; the rest against scipy's adaptive quadrature of the definition.
    assert float(fermi_dirac_half(0.0)[0]) == pytest.approx(
        (1 - 2**-0.5) * special.zeta(1.5), rel=1e-12)
    for eta in (-30.0, -3.0, 1.5, 5.0, 20.0, 150.0):
        def occupied(t: float, eta=eta) -> float:
            return np.sqrt(t) * special.expit(eta - t)
        ref, _ = integrate.quad(occupied, 0.0, max(eta, 0.0) + 60.0, points=[max(eta, 0.0)],
                                limit=500, epsabs=0.0, epsrel=1e-13)
        value, slope = fermi_dirac_half(eta)
        assert float(value) == pytest.approx(ref * 2 / np.sqrt(np.pi), rel=1e-11)
        step = 1e-5
        finite = (fermi_dirac_half(eta + step)[0] - fermi_dirac_half(eta - step)[0]) / (2 * step)
        assert float(slope) == pytest.approx(float(finite), rel=1e-7)
    # Boltzmann limit e^eta (1 - e^eta/2^{3/2}) and Sommerfeld's degenerate expansion
    # (4/(3 sqrt(pi))) eta^{3/2} (1 + pi^2/(8 eta^2)) (both standard series, from memory).
    assert float(fermi_dirac_half(-30.0)[0]) == pytest.approx(
        np.exp(-30.0) * (1 - np.exp(-30.0) / 2**1.5), rel=1e-12)
    eta = 400.0
    assert float(fermi_dirac_half(eta)[0]) == pytest.approx(
        4 / (3 * np.sqrt(np.pi)) * eta**1.5 * (1 + np.pi**2 / (8 * eta**2)), rel=1e-9)


@pytest.mark.parametrize("doping", [1e14, 1e17, 1e18, 1e19, 1e20])
@pytest.mark.parametrize("temperature", [10.0, 77.0, 300.0, 600.0])
def test_fermi_level_inverts_the_electron_density(doping, temperature):
    # N_D = N_c F_1/2(eta), solved here independently with scipy's Brent root on the
    # adaptive quadrature of F_1/2.
    ratio = doping / float(band_edge_density_per_cm3(temperature, 0.2))

    def density_gap(eta: float) -> float:
        value, _ = integrate.quad(lambda t: np.sqrt(t) * special.expit(eta - t), 0.0,
                                  max(eta, 0.0) + 60.0, points=[max(eta, 0.0)], limit=500)
        return np.log(value * 2 / np.sqrt(np.pi)) - np.log(ratio)

    reference = optimize.brentq(density_gap, -60.0, 2000.0, xtol=1e-12)
    assert float(reduced_fermi_level(temperature, doping, 0.2)) == pytest.approx(reference,
                                                                              abs=1e-8)


def test_over_the_top_supply_is_the_order_one_fermi_dirac_integral():
    # -Li_2(-1) = pi^2/12 (Abramowitz & Stegun 27.7, from memory); the rest against scipy's
    # quadrature of int_0^inf ln(1 + e^{y - t}) dt, either side of each branch change.
    assert float(np.exp(log_over_top_supply(0.0))) == pytest.approx(np.pi**2 / 12, rel=1e-13)
    for y in (-700.0, -60.0, -5.0, -3.0001, -2.9999, -1.0, 3.0, 39.9, 40.1, 80.0):
        def supply(t: float, y=y) -> float:
            return np.logaddexp(0.0, y - t) * np.exp(-y if y < 0 else 0.0)
        ref, _ = integrate.quad(supply, 0.0, max(y, 0.0) + 80.0, points=[max(y, 0.0)],
                                limit=500, epsabs=0.0, epsrel=1e-13)
        expected = np.log(ref) + (y if y < 0 else 0.0)
        assert float(log_over_top_supply(y)) == pytest.approx(expected, abs=1e-11)


def test_zero_temperature_limit_is_field_emission_between_the_fermi_levels():
    # As T -> 0 the Fermi supply kT ln(1 + e^{(E_F - E)/kT}) becomes (E_F - E)_+ (Murphy &
    # Good 1956), so the integral becomes int T(E) [(E_F - E)_+ - (E_F - eV - E)_+] dE / kT:
    # checked at 2 K against that box form by quadrature (Sommerfeld's correction there,
    # ~(pi^2/6) (kT d ln T/dE)^2, is 3e-5).
    a, e00, fermi, bias = 0.5, 0.06, 0.1, 0.04
    temperature = 2.0
    kt = KB_EV * temperature

    def box(energy: float) -> float:
        shape = np.exp(-(a / e00) * depletion_barrier_exponent(energy / a))
        return shape * (max(fermi - energy, 0.0) - max(fermi - bias - energy, 0.0))

    expected, _ = integrate.quad(box, 1e-12, fermi, points=[fermi - bias], epsrel=1e-12)
    log_scale, total, _, _ = supply_difference(a, e00, temperature, fermi / kt, bias / kt)
    assert float(np.exp(log_scale) * total * kt) == pytest.approx(expected, rel=3e-4)


def _boltzmann_integral(a: float, e00: float, temperature: float) -> float:
    """``ln int_0^inf T(E) e^{-E/kT} dE``: the integral in the Boltzmann limit, per e^eta."""
    eta, v = -40.0, 50.0  # non-degenerate; 1 - e^{-v} = 1
    log_scale, total, _, _ = supply_difference(a, e00, temperature, eta, v)
    return float(log_scale + np.log(total)) - eta


def test_saddle_point_gives_the_padovani_stratton_exponent_where_the_peak_is_inside():
    # Our saddle-point evaluation of the Boltzmann integral: sqrt(4 pi a E00 tanh y)/cosh y
    # exp(-a/E0), y = E00/kT. Where the peak lies many widths inside [0, a] it must match.
    for bending, e00, temperature in ((1.0, 0.005, 50.0), (1.5, 0.01, 100.0), (1.5, 0.02, 300.0)):
        kt = KB_EV * temperature
        y = e00 / kt
        peak = bending / np.cosh(y) ** 2
        width = np.sqrt(2 * bending * e00 * np.tanh(y)) / np.cosh(y)
        assert min(peak, bending - peak) > 4 * width
        saddle = (np.log(np.sqrt(4 * np.pi * bending * e00 * np.tanh(y)) / np.cosh(y))
                  - bending / (e00 / np.tanh(y)))
        assert _boltzmann_integral(bending, e00, temperature) == pytest.approx(saddle, abs=0.01)


def test_no_tunnelling_is_thermionic_emission_with_unit_ideality():
    # N_D = 1e8 cm^-3: E00 ~ 1e-7 eV, the barrier is opaque below its top; the current is
    # A** T^2 exp(-phi_B/kT) (exp(eV/kT) - 1) (Sze & Ng 2007, thermionic emission). The
    # barrier (1.1 eV) keeps a band bending above 3 kT up to the highest bias.
    temperature, barrier, richardson = 300.0, 1.1, 26.4
    kt = KB_EV * temperature
    bias = np.array([-0.5, -0.1, 0.05, 0.2, 0.35])
    ours = thermionic_field_current_density_A_per_cm2(bias, temperature, barrier, 1e8, 0.2, 9.5,
                                                      richardson)
    diode = richardson * temperature**2 * np.exp(-barrier / kt) * np.expm1(bias / kt)
    np.testing.assert_allclose(ours, diode, rtol=2e-3)
    # What is left is tunnelling just below the top, which the thermionic law leaves out:
    # it shrinks as E00 does (N_D 1e8 -> 1e6: E00 ten times smaller).
    closer = thermionic_field_current_density_A_per_cm2(bias, temperature, barrier, 1e6, 0.2,
                                                        9.5, richardson)
    assert np.all(np.abs(closer / diode - 1) < 0.5 * np.abs(ours / diode - 1))


@pytest.mark.parametrize(("bending_eV", "e00_eV", "temperature_K"),
                         [(1.0, 0.005, 50.0), (1.5, 0.01, 100.0), (1.5, 0.02, 300.0)])
def test_bias_slopes_are_padovani_strattons_where_the_peak_is_inside(bending_eV, e00_eV,
                                                                      temperature_K):
    # ln S = ln sqrt(a) - a/E0 + const near the saddle point, so d ln S/da = 1/(2a) - 1/E0:
    # forward d ln J/dV = 1/E0 - 1/(2a), i.e. n = E0/kT = (E00/kT) coth(E00/kT), and reverse
    # d ln|J|/dV_R = 1/kT - 1/E0 + 1/(2a) = 1/epsilon' + 1/(2a) with
    # 1/epsilon' = (E00/kT - tanh(E00/kT))/E00 (Padovani & Stratton 1966), in the Boltzmann
    # limit. Checked on the analytic slope and on a finite difference of the integral.
    kt = KB_EV * temperature_K
    y = e00_eV / kt
    e0 = e00_eV / np.tanh(y)
    log_scale, total, d_bending, _ = supply_difference(bending_eV, e00_eV, temperature_K,
                                                       -40.0, 50.0)
    step = 1e-6
    finite = (_boltzmann_integral(bending_eV + step, e00_eV, temperature_K)
              - _boltzmann_integral(bending_eV - step, e00_eV, temperature_K)) / (2 * step)
    for derivative in (float(d_bending / total), float(finite)):
        forward = -derivative
        assert kt * (forward + 0.5 / bending_eV) == pytest.approx(kt / e0, rel=0.01)
        reverse = 1.0 / kt + derivative
        assert reverse - 0.5 / bending_eV == pytest.approx((y - np.tanh(y)) / e00_eV, rel=0.01)


@pytest.mark.parametrize("doping", [1e17, 3e19])
def test_junction_current_slope_is_the_derivative_of_the_current(doping):
    params = (0.9, doping, 0.2, 9.5, 26.4)  # phi_B, N_D, m*, eps_s, A**
    bias = np.array([-0.6, -0.05, 0.02, 0.3])
    eta = reduced_fermi_level(250.0, doping, 0.2)
    e00 = characteristic_tunnelling_energy_eV(doping, 9.5, 0.2)
    _, slope = _density_and_slope(bias, 250.0, 0.9, eta, e00, 26.4)
    step = 1e-7
    up = thermionic_field_current_density_A_per_cm2(bias + step, 250.0, *params)
    down = thermionic_field_current_density_A_per_cm2(bias - step, 250.0, *params)
    # The analytic derivative is that of the exact integral; the quadrature's own value moves
    # a little differently with its nodes, hence 1e-2 here. Newton on the circuit needs no
    # more (the circuit test checks the converged current).
    np.testing.assert_allclose(slope, (up - down) / (2 * step), rtol=1e-2)


def _random_parameters(rng: np.random.Generator, count: int) -> dict[str, np.ndarray]:
    return {
        "barrier_height_eV": rng.uniform(0.7, 1.1, (count, 1)),
        "doping_per_cm3": 10 ** rng.uniform(16, 19.5, (count, 1)),
        "semiconductor_effective_mass_ratio": rng.uniform(0.15, 0.3, (count, 1)),
        "dielectric_constant": rng.uniform(8.0, 11.0, (count, 1)),
        "richardson_constant_A_cm2_K2": 10 ** rng.uniform(0, 2, (count, 1)),
        "series_resistance_ohm": 10 ** rng.uniform(0, 3, (count, 1)),
        "shunt_resistance_ohm": 10 ** rng.uniform(8, 12, (count, 1)),
    }


def test_series_and_shunt_resistance_solve_the_circuit_like_brentq():
    rng = np.random.default_rng(7)
    params = _random_parameters(rng, 6)
    bias = np.linspace(-1.0, 0.8, 19)
    temperature = np.linspace(200.0, 400.0, 19)
    ours = THERMIONIC_FIELD_DIODE.current(bias, temperature, params, DEVICE,
                                          enforce_validity=False)
    for row in range(6):
        p = {k: float(v[row, 0]) for k, v in params.items()}
        for col in range(0, 19, 3):
            v, t = bias[col], temperature[col]

            def circuit(current: float, v=v, t=t, p=p) -> float:
                junction = v - current * p["series_resistance_ohm"]
                density = thermionic_field_current_density_A_per_cm2(
                    junction, t, p["barrier_height_eV"], p["doping_per_cm3"],
                    p["semiconductor_effective_mass_ratio"], p["dielectric_constant"],
                    p["richardson_constant_A_cm2_K2"])
                return 1e-4 * density + junction / p["shunt_resistance_ohm"] - current

            if v == 0:
                continue
            low, high = sorted((0.0, v / p["series_resistance_ohm"]))
            reference = optimize.brentq(circuit, low, high, xtol=1e-300, rtol=1e-14)
            assert ours[row, col] == pytest.approx(reference, rel=1e-9)


def test_current_rises_with_bias_for_random_parameters():
    rng = np.random.default_rng(11)
    params = _random_parameters(rng, 20)
    bias = np.linspace(-1.0, 0.8, 300)
    current = THERMIONIC_FIELD_DIODE.current(bias, 300.0, params, DEVICE, enforce_validity=False)
    assert np.all(np.diff(current, axis=1) > 0)
    assert np.all(current[:, bias < 0] < 0) and np.all(current[:, bias > 0] > 0)


def test_near_flat_band_is_refused_and_degenerate_doping_is_not():
    params = {"barrier_height_eV": 0.8, "doping_per_cm3": 1e17,
              "semiconductor_effective_mass_ratio": 0.2, "dielectric_constant": 9.5,
              "richardson_constant_A_cm2_K2": 26.4, "series_resistance_ohm": 1e-2,
              "shunt_resistance_ohm": 1e10}
    eta = float(reduced_fermi_level(300.0, 1e17, 0.2))
    flat_band = 0.8 + eta * KB_EV * 300.0
    bias = np.array([-0.5, 0.3, flat_band - 2 * KB_EV * 300.0])
    current = THERMIONIC_FIELD_DIODE.current(bias, 300.0, params, DEVICE)
    assert np.all(np.isfinite(current[:2])) and np.isnan(current[2])
    # N_c(300 K, m* = 0.2) = 2.2e18: 1e19 puts the Fermi level above the band edge, the
    # thermionic-field regime proper, which Fermi-Dirac statistics describe.
    degenerate = THERMIONIC_FIELD_DIODE.current(bias[:2], 300.0,
                                                {**params, "doping_per_cm3": 1e19}, DEVICE)
    assert float(reduced_fermi_level(300.0, 1e19, 0.2)) > 2.0
    assert np.all(np.isfinite(degenerate)) and degenerate[0] < 0 < degenerate[1]


def test_the_band_bending_is_checked_at_the_junction_voltage():
    # Behind 1 kOhm a forward bias of 1.5 V (beyond the 0.8 eV barrier) leaves the contact
    # itself far from flat band: accepted, with u = V - I R_s.
    params = {"barrier_height_eV": 0.8, "doping_per_cm3": 1e17,
              "semiconductor_effective_mass_ratio": 0.2, "dielectric_constant": 9.5,
              "richardson_constant_A_cm2_K2": 26.4, "series_resistance_ohm": 1e3,
              "shunt_resistance_ohm": 1e10}
    bias = np.array([0.2, 1.0, 1.5])
    current = THERMIONIC_FIELD_DIODE.current(bias, 300.0, params, DEVICE)
    assert np.all(np.isfinite(current))
    junction = bias - current * 1e3
    assert np.all(junction < 0.5)
    values = {k: np.asarray(v, dtype=float) for k, v in params.items()}
    bending = _band_bending_in_kt(bias, np.asarray(300.0), DEVICE, **values)
    eta = float(reduced_fermi_level(300.0, 1e17, 0.2))
    np.testing.assert_allclose(bending, (0.8 - junction) / (KB_EV * 300.0) + eta, rtol=1e-12)
    # The same check on inputs the last solve did not see solves again (values, not
    # identities, decide).
    values["series_resistance_ohm"] = np.asarray(1e-2)
    refused = _band_bending_in_kt(bias, np.asarray(300.0), DEVICE, **values)
    assert refused[2] < 3.0


def test_registered_as_a_rectifying_contact_with_a_growing_ideality():
    assert not THERMIONIC_FIELD_DIODE.is_odd
    assert THERMIONIC_FIELD_DIODE.needs == ("thermionic_field_signature",)
    assert "thermionic_field_diode" in mechanism_ids()


def test_doping_for_a_characteristic_energy_inverts_it():
    doping = doping_for_tunnelling_energy_per_cm3(13.4695e-3, 9.5, 0.2)
    assert float(doping) == pytest.approx(1e18, rel=1e-4)  # the physics sheet's E00 check
