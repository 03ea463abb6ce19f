"""Thermionic-field emission over a Schottky contact (``mechid.catalogue.thermionic_field``).

Outside references: the Padovani-Stratton check values of the physics sheet (E00 and E0 for
N_D = 1e18 cm^-3, m* = 0.2, eps_s = 9.5, computed from the formula with scipy.constants), the
effective density of states from scipy.constants, scipy's adaptive quadrature of the same
energy integral, Padovani & Stratton's forward ideality ``(E00/kT) coth(E00/kT)`` and reverse
slope ``1/epsilon' = (E00/kT - tanh(E00/kT))/E00``, the thermionic-emission diode law in the
limit of no tunnelling, and scipy's Brent root for the series resistance.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants, integrate, optimize

from mechid.catalogue import mechanism_ids
from mechid.catalogue.thermionic_field import (
    THERMIONIC_FIELD_DIODE,
    _density_and_slope,
    band_edge_density_per_cm3,
    characteristic_tunnelling_energy_eV,
    depletion_barrier_exponent,
    fermi_depth_eV,
    log_supply_integral_eV,
    supply_integral_and_slope,
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


@pytest.mark.parametrize("bending_eV", [0.05, 0.3, 1.2])
@pytest.mark.parametrize("e00_eV", [0.002, 0.015, 0.08])
@pytest.mark.parametrize("temperature_K", [20.0, 120.0, 450.0])
def test_supply_integral_agrees_with_adaptive_quadrature(bending_eV, e00_eV, temperature_K):
    kt = KB_EV * temperature_K
    ours = float(log_supply_integral_eV(bending_eV, e00_eV, temperature_K))

    def integrand(energy: float) -> float:
        share = energy / bending_eV
        return np.exp(-energy / kt - (bending_eV / e00_eV) * depletion_barrier_exponent(share)
                      - ours)

    peak = bending_eV / np.cosh(e00_eV / kt) ** 2
    tunnel, _ = integrate.quad(integrand, 0.0, bending_eV, points=[peak], limit=1000,
                               epsabs=0.0, epsrel=1e-11)
    over_top = np.exp(np.log(kt) - bending_eV / kt - ours)
    assert tunnel + over_top == pytest.approx(1.0, abs=5e-4)


def test_saddle_point_gives_the_padovani_stratton_exponent_where_the_peak_is_inside():
    # Our saddle-point evaluation of the integral: sqrt(4 pi a E00 tanh y)/cosh y exp(-a/E0),
    # y = E00/kT. Where the peak lies many widths inside [0, a] it must match the quadrature.
    for bending, e00, temperature in ((1.0, 0.005, 50.0), (1.5, 0.01, 100.0), (1.5, 0.02, 300.0)):
        kt = KB_EV * temperature
        y = e00 / kt
        peak = bending / np.cosh(y) ** 2
        width = np.sqrt(2 * bending * e00 * np.tanh(y)) / np.cosh(y)
        assert min(peak, bending - peak) > 4 * width
        saddle = (np.log(np.sqrt(4 * np.pi * bending * e00 * np.tanh(y)) / np.cosh(y))
                  - bending / (e00 / np.tanh(y)))
        assert float(log_supply_integral_eV(bending, e00, temperature)) == pytest.approx(
            saddle, abs=0.01)


def test_no_tunnelling_is_thermionic_emission_with_unit_ideality():
    # N_D = 1e6 cm^-3: E00 ~ 1e-9 eV, the barrier is opaque below its top; the current is
    # A** T^2 exp(-phi_B/kT) (exp(eV/kT) - 1) (Sze & Ng 2007, thermionic emission).
    temperature, barrier, richardson = 300.0, 0.8, 26.4
    kt = KB_EV * temperature
    bias = np.array([-0.5, -0.1, 0.05, 0.2, 0.4])
    ours = thermionic_field_current_density_A_per_cm2(bias, temperature, barrier, 1e6, 0.2, 9.5,
                                                      richardson)
    diode = richardson * temperature**2 * np.exp(-barrier / kt) * np.expm1(bias / kt)
    np.testing.assert_allclose(ours, diode, rtol=1e-3)


@pytest.mark.parametrize(("bending_eV", "e00_eV", "temperature_K"),
                         [(1.0, 0.005, 50.0), (1.5, 0.01, 100.0), (1.5, 0.02, 300.0)])
def test_bias_slopes_are_padovani_strattons_where_the_peak_is_inside(bending_eV, e00_eV,
                                                                      temperature_K):
    # ln S = ln sqrt(a) - a/E0 + const near the saddle point, so d ln S/da = 1/(2a) - 1/E0:
    # forward d ln J/dV = 1/E0 - 1/(2a), i.e. n = E0/kT = (E00/kT) coth(E00/kT), and reverse
    # d ln|J|/dV_R = 1/kT - 1/E0 + 1/(2a) = 1/epsilon' + 1/(2a) with
    # 1/epsilon' = (E00/kT - tanh(E00/kT))/E00 (Padovani & Stratton 1966). Checked on the
    # analytic derivative and on a finite difference of the integral itself.
    kt = KB_EV * temperature_K
    y = e00_eV / kt
    e0 = e00_eV / np.tanh(y)
    _, slope = supply_integral_and_slope(bending_eV, e00_eV, temperature_K)
    step = 1e-6
    finite = (log_supply_integral_eV(bending_eV + step, e00_eV, temperature_K)
              - log_supply_integral_eV(bending_eV - step, e00_eV, temperature_K)) / (2 * step)
    for derivative in (float(slope), float(finite)):
        forward = -derivative
        assert kt * (forward + 0.5 / bending_eV) == pytest.approx(kt / e0, rel=0.01)
        reverse = 1.0 / kt + derivative
        assert reverse - 0.5 / bending_eV == pytest.approx((y - np.tanh(y)) / e00_eV, rel=0.01)


def test_junction_current_slope_is_the_derivative_of_the_current():
    params = (0.9, 1e17, 0.2, 9.5, 26.4)  # phi_B, N_D, m*, eps_s, A**
    bias = np.array([-0.6, -0.05, 0.02, 0.3])
    _, slope = _density_and_slope(bias, 250.0, *params)
    step = 1e-7
    up = thermionic_field_current_density_A_per_cm2(bias + step, 250.0, *params)
    down = thermionic_field_current_density_A_per_cm2(bias - step, 250.0, *params)
    # The analytic derivative is that of the exact integral; the quadrature's own value moves
    # a little differently with its nodes (2e-4 of the value), hence a few 1e-3 here. Newton
    # on the circuit needs no more (the circuit test checks the converged current).
    np.testing.assert_allclose(slope, (up - down) / (2 * step), rtol=5e-3)


def _random_parameters(rng: np.random.Generator, count: int) -> dict[str, np.ndarray]:
    return {
        "barrier_height_eV": rng.uniform(0.7, 1.1, (count, 1)),
        "doping_per_cm3": 10 ** rng.uniform(16, 17.3, (count, 1)),
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


def test_near_flat_band_and_degenerate_doping_are_refused():
    params = {"barrier_height_eV": 0.8, "doping_per_cm3": 1e17,
              "semiconductor_effective_mass_ratio": 0.2, "dielectric_constant": 9.5,
              "richardson_constant_A_cm2_K2": 26.4, "series_resistance_ohm": 10.0,
              "shunt_resistance_ohm": 1e10}
    depth = float(fermi_depth_eV(300.0, 1e17, 0.2))
    flat_band = 0.8 - depth
    bias = np.array([-0.5, 0.3, flat_band - 2 * KB_EV * 300.0])
    current = THERMIONIC_FIELD_DIODE.current(bias, 300.0, params, DEVICE)
    assert np.all(np.isfinite(current[:2])) and np.isnan(current[2])
    # N_c(300 K, m* = 0.2) = 2.2e18: 1e18 puts the Fermi level within 2 kT of the band edge.
    degenerate = THERMIONIC_FIELD_DIODE.current(bias[:2], 300.0,
                                                {**params, "doping_per_cm3": 1e18}, DEVICE)
    assert np.all(np.isnan(degenerate))


def test_declared_as_a_rectifying_contact_but_not_registered():
    # Not registered (see the module): with Boltzmann statistics its validity domain stops at
    # N_D <= N_c e^-2, where E00/kT stays below ~0.6 -- the thermionic-field regime proper
    # needs the Fermi-Dirac statistics of a degenerate semiconductor.
    assert not THERMIONIC_FIELD_DIODE.is_odd
    assert "polarities_differ" in THERMIONIC_FIELD_DIODE.needs
    assert "thermionic_field_diode" not in mechanism_ids()
