"""Lampert's single trap level: the closed-form integration against its limits and the ODE.

Outside values: the Mott-Gurney worked number of this project's physics sheet (computed from
the published formula, [C] there), scipy.constants, and a direct numerical integration of
Lampert's (1956) equations with scipy's ODE solver -- an implementation independent of the
closed form in mechid.catalogue.space_charge.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as sc
from scipy.integrate import solve_ivp

from mechid.catalogue import get_mechanism
from mechid.catalogue.space_charge import (
    SQUARE_LAW_APPROACH_PLOT,
    mott_gurney_current_density_A_per_m2,
    single_trap_level_current_density_A_per_m2,
    trap_filled_limit_voltage_V,
)
from mechid.device import device_from_values

LAW = get_mechanism("sclc_single_trap_level")
#: A deep level: n_1 = N_c exp(-E_t/kT) is ~1e-5 of N_t at 300 K.
DEEP = {"thickness_nm": 200.0, "dielectric_constant": 3.5, "mobility_cm2_per_Vs": 1.0,
        "trap_density_per_cm3": 1e17, "band_density_per_cm3": 1e20, "trap_depth_eV": 0.48}


def _density(v, t, params):
    return single_trap_level_current_density_A_per_m2(
        v, t, params["thickness_nm"], params["dielectric_constant"],
        params["mobility_cm2_per_Vs"], params["trap_density_per_cm3"],
        params["band_density_per_cm3"], params["trap_depth_eV"])


def _n1_per_m3(t, params):
    return params["band_density_per_cm3"] * 1e6 * np.exp(
        -params["trap_depth_eV"] * sc.e / (sc.k * t))


def test_without_traps_it_is_mott_gurney_exactly():
    # eps_r = 3, mu = 1 cm^2/Vs, 1 V, 100 nm: the physics sheet's 2.98829e6 A/m^2 [C].
    j = single_trap_level_current_density_A_per_m2(1.0, 300.0, 100.0, 3.0, 1.0, 0.0, 1e19, 0.3)
    assert j == pytest.approx(2.98829e6, rel=1e-5)
    v = np.geomspace(1e-3, 1e3, 13)
    np.testing.assert_allclose(
        single_trap_level_current_density_A_per_m2(v, 300.0, 100.0, 3.0, 1.0, 0.0, 1e19, 0.3),
        mott_gurney_current_density_A_per_m2(v, 100.0, 3.0, 1.0), rtol=1e-12)


def test_far_below_the_limit_it_is_lamperts_shallow_trap_law():
    # n_d << n_1: theta x Mott-Gurney with theta = n_1/(n_1 + N_t) (Lampert 1956).
    shallow = {**DEEP, "trap_depth_eV": 0.25}
    n_1 = _n1_per_m3(300.0, shallow)
    theta = n_1 / (n_1 + shallow["trap_density_per_cm3"] * 1e6)
    v = np.array([1e-3, 3e-3])
    ratio = _density(v, 300.0, shallow) / mott_gurney_current_density_A_per_m2(v, 200.0, 3.5, 1.0)
    np.testing.assert_allclose(ratio, theta, rtol=3e-3)


def test_the_rise_sits_at_lamperts_trap_filled_limit_voltage():
    # Lampert (1956): V_TFL = e N_t d^2/(2 eps0 eps_r); for a deep level the current jumps
    # from theta x Mott-Gurney to the trap-free law across it.
    v_tfl = sc.e * 1e23 * (200e-9) ** 2 / (2 * sc.epsilon_0 * 3.5)
    assert trap_filled_limit_voltage_V(1e17, 200.0, 3.5) == pytest.approx(v_tfl, rel=1e-12)
    below, above = _density(np.array([0.8 * v_tfl, 1.25 * v_tfl]), 300.0, DEEP)
    assert above / below > 1e3
    v = np.geomspace(0.5 * v_tfl, 2.0 * v_tfl, 2001)
    slope = np.gradient(np.log(_density(v, 300.0, DEEP)), np.log(v))
    assert v[np.argmax(slope)] == pytest.approx(v_tfl, rel=0.02)
    # Far above, the filled traps no longer matter: Mott-Gurney again.
    high = 1e3 * v_tfl
    assert _density(high, 300.0, DEEP) == pytest.approx(
        mott_gurney_current_density_A_per_m2(high, 200.0, 3.5, 1.0), rel=2e-3)


def _bias_by_integration(j, t, params):
    """V(J) from eps dE/dx = e (n + n_t), J = e mu n E, n_t = N_t n/(n + n_1), E(0) = 0."""
    eps = sc.epsilon_0 * params["dielectric_constant"]
    mu = params["mobility_cm2_per_Vs"] * 1e-4
    n_t, n_1, d = params["trap_density_per_cm3"] * 1e6, _n1_per_m3(t, params), params[
        "thickness_nm"] * 1e-9

    def rhs(x, y):
        n = j / (sc.e * mu * y[0])
        return [sc.e / eps * (n + n_t * n / (n + n_1)), y[0]]

    # Start just inside the contact, where the free charge dominates (trap-free profile).
    x0 = 1e-9 * d
    e0 = np.sqrt(2 * j * x0 / (eps * mu))
    sol = solve_ivp(rhs, [x0, d], [e0, 2.0 / 3.0 * e0 * x0], method="LSODA", rtol=1e-11,
                    atol=[1e-9 * e0, 1e-15])
    return sol.y[1, -1]


@pytest.mark.parametrize("share", [0.05, 0.6, 0.95, 1.0, 1.05, 1.5, 20.0])
def test_agrees_with_a_direct_integration_of_lamperts_equations(share):
    v_tfl = float(trap_filled_limit_voltage_V(1e17, 200.0, 3.5))
    v = share * v_tfl
    j = float(_density(v, 300.0, DEEP))
    assert _bias_by_integration(j, 300.0, DEEP) == pytest.approx(v, rel=1e-5)


def test_current_rises_with_bias_over_random_parameters():
    rng = np.random.default_rng(7)
    v = np.geomspace(0.01, 1000.0, 400)
    for _ in range(30):
        params = {"thickness_nm": 10 ** rng.uniform(1, 4), "dielectric_constant": rng.uniform(2, 20),
                  "mobility_cm2_per_Vs": 10 ** rng.uniform(-6, 2),
                  "trap_density_per_cm3": 10 ** rng.uniform(12, 21),
                  "band_density_per_cm3": 10 ** rng.uniform(15, 23),
                  "trap_depth_eV": rng.uniform(0.05, 1.5)}
        j = _density(v, rng.uniform(50, 500), params)
        assert np.all(np.isfinite(j)) and np.all(np.diff(j) > 0)


def test_declaration_scales_with_area_and_refuses_diffusion_bias():
    device = device_from_values(thickness_nm=200.0, area_cm2=1e-4)
    params = {k: DEEP[k] for k in LAW.parameter_names}
    current = LAW.current(np.array([-2.0, 2.0, 0.1]), np.full(3, 300.0), params, device)
    assert current[1] == pytest.approx(float(_density(2.0, 300.0, DEEP)) * 1e-8, rel=1e-12)
    assert current[0] == pytest.approx(-current[1], rel=1e-15)
    # 0.1 V at 300 K is 3.9 kT/e, below the drift-only limit of 10 kT/e: refused.
    assert np.isnan(current[2])
    assert LAW.family == "space_charge"


def test_square_law_approach_plot_gives_mobility_and_trap_density_to_start_from():
    device = device_from_values(thickness_nm=200.0, thickness_sd_nm=10.0, area_cm2=1e-4,
                                semiconductor_dielectric_constant=3.5,
                                semiconductor_dielectric_constant_sd=0.3)
    params = {k: DEEP[k] for k in LAW.parameter_names}
    v_tfl = float(trap_filled_limit_voltage_V(1e17, 200.0, 3.5))
    v = np.geomspace(2.0 * v_tfl, 6.0 * v_tfl, 5)
    x, y = SQUARE_LAW_APPROACH_PLOT.transform(v, np.full(5, 300.0),
                                              LAW.current(v, np.full(5, 300.0), params, device),
                                              device)
    slope, intercept = np.polyfit(x, y, 1)
    read = SQUARE_LAW_APPROACH_PLOT.interpret(slope, intercept, 300.0, device)
    # Starting values only (an approximation of ours): within 30 % of the truth.
    assert read["mobility_cm2_per_Vs"] == pytest.approx(1.0, rel=0.3)
    assert read["trap_density_per_cm3"] == pytest.approx(1e17, rel=0.3)
