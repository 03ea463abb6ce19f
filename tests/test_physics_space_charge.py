"""Space-charge-limited current: Mott-Gurney, Lampert's shallow traps and limits, Mark-Helfrich.

Check values are computed independently in the test from scipy.constants (the formulas as
published, re-implemented here) and, where the physics sheet of this project lists a number
computed from the same published formula, compared with that number ([C] there).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as sc

from mechid.catalogue import get_mechanism
from mechid.catalogue.space_charge import (
    SCLC_EXPONENTIAL_TRAPS,
    SCLC_SHALLOW_TRAPS,
    mark_helfrich_current_density_A_per_m2,
    mott_gurney_current_density_A_per_m2,
    ohmic_to_sclc_crossover_voltage_V,
    shallow_trap_factor,
    trap_filled_limit_voltage_V,
)
from mechid.device import device_from_values

DEVICE = device_from_values(thickness_nm=300.0, area_cm2=1e-4)


def test_mott_gurney_worked_number():
    # eps_r = 3, mu = 1 cm^2/Vs, V = 1 V, L = 100 nm: (9/8) eps0 eps_r mu V^2/L^3 from
    # scipy.constants (Mott & Gurney 1940 form); the physics sheet gives 2.98829e6 A/m^2 [C].
    independent = 9 / 8 * sc.epsilon_0 * 3.0 * 1e-4 * 1.0**2 / (100e-9) ** 3
    value = mott_gurney_current_density_A_per_m2(1.0, 100.0, 3.0, 1.0)
    assert value == pytest.approx(independent, rel=1e-13)
    assert value == pytest.approx(2.98829e6, rel=1e-5)


def test_mott_gurney_scales_as_v_squared_over_d_cubed():
    # The square law and the d^-3 thickness law (Mott & Gurney 1940; Lampert 1956).
    j = mott_gurney_current_density_A_per_m2(np.array([1.0, 2.0]), 100.0, 3.0, 1.0)
    assert j[1] / j[0] == pytest.approx(4.0, rel=1e-13)
    thin, thick = mott_gurney_current_density_A_per_m2(1.0, np.array([100.0, 200.0]), 3.0, 1.0)
    assert thick / thin == pytest.approx(1 / 8, rel=1e-13)


def test_trap_filled_limit_voltage():
    # V_TFL = e N_t L^2/(2 eps0 eps_r) (Lampert 1956), N_t = 1e17 cm^-3, L = 100 nm, eps_r = 3:
    # recomputed from scipy.constants; the physics sheet gives 3.01585 V [C].
    independent = sc.e * 1e23 * (100e-9) ** 2 / (2 * sc.epsilon_0 * 3.0)
    value = trap_filled_limit_voltage_V(1e17, 100.0, 3.0)
    assert value == pytest.approx(independent, rel=1e-13)
    assert value == pytest.approx(3.01585, rel=1e-5)


def test_ohmic_to_sclc_crossover_voltage():
    # e n0 mu V/L = (9/8) eps0 eps_r mu V^2/L^3 at V_x = 8 e n0 L^2/(9 eps0 eps_r); n0 = 1e15
    # cm^-3, L = 100 nm, eps_r = 3: the physics sheet gives 0.0536152 V [C].
    value = ohmic_to_sclc_crossover_voltage_V(1e15, 100.0, 3.0)
    assert value == pytest.approx(0.0536152, rel=1e-5)
    ohmic = sc.e * 1e21 * 1e-4 * value / 100e-9
    assert mott_gurney_current_density_A_per_m2(value, 100.0, 3.0, 1.0) == pytest.approx(
        ohmic, rel=1e-12)


def test_shallow_trap_factor_is_lampert_theta():
    # theta = (N_c/N_t) exp(-E_t/kT) (Lampert 1956), kT from scipy.constants.
    kT_eV = sc.k * 300.0 / sc.e
    assert shallow_trap_factor(300.0, 0.3, 100.0) == pytest.approx(
        100.0 * np.exp(-0.3 / kT_eV), rel=1e-12)


def test_shallow_trap_mechanism_is_mott_gurney_times_theta_times_area():
    params = {"trap_depth_eV": 0.3, "permittivity_mobility_prefactor_cm2_per_Vs": 50.0,
              "thickness_nm": 300.0}
    v = np.array([1.0, 5.0, 20.0])
    t = np.array([200.0, 250.0, 300.0])
    current = SCLC_SHALLOW_TRAPS.current(v, t, params, DEVICE)
    kT = sc.k * t / sc.e
    independent = (9 / 8 * sc.epsilon_0 * 50e-4 * np.exp(-0.3 / kT) * v**2 / (300e-9) ** 3
                   * 1e-8)
    np.testing.assert_allclose(current, independent, rtol=1e-12)


def _mark_helfrich_literal(v, t, d_m, eps_r, t_t, n_t_m3, mu_nc_si):
    """The Mark & Helfrich (1962) law written out directly (SI units)."""
    ell = t_t / t
    eps = sc.epsilon_0 * eps_r
    return (sc.e ** (1 - ell) * mu_nc_si * (eps * ell / (n_t_m3 * (ell + 1))) ** ell
            * ((2 * ell + 1) / (ell + 1)) ** (ell + 1) * v ** (ell + 1) / d_m ** (2 * ell + 1))


def test_mark_helfrich_matches_the_literal_formula():
    v = np.array([2.0, 5.0, 10.0])
    t = np.array([300.0, 300.0, 350.0])
    value = mark_helfrich_current_density_A_per_m2(v, t, 500.0, 3.5, 900.0, 1e18, 1e19)
    literal = _mark_helfrich_literal(v, t, 500e-9, 3.5, 900.0, 1e24, 1e21)
    np.testing.assert_allclose(value, literal, rtol=1e-12)


def test_mark_helfrich_power_law_and_thickness_law():
    # J ∝ V^(l+1)/d^(2l+1), l = T_t/T (Mark & Helfrich 1962).
    t_t, t = 1500.0, 300.0
    ell = t_t / t
    j = mark_helfrich_current_density_A_per_m2(np.array([1.0, 10.0]), t, 500.0, 3.5, t_t, 1e18,
                                               1e19)
    assert np.log10(j[1] / j[0]) == pytest.approx(ell + 1, rel=1e-12)
    j_d = mark_helfrich_current_density_A_per_m2(1.0, t, np.array([250.0, 500.0]), 3.5, t_t,
                                                 1e18, 1e19)
    assert np.log2(j_d[0] / j_d[1]) == pytest.approx(2 * ell + 1, rel=1e-12)


def test_mark_helfrich_tends_to_the_ohmic_band_current_for_shallow_tails():
    # l -> 0: J -> e mu N_c V/d (dimensional consistency check of the prefactor; ours).
    value = mark_helfrich_current_density_A_per_m2(2.0, 300.0, 500.0, 3.5, 1e-9, 1e18, 1e19)
    assert value == pytest.approx(sc.e * 1e21 * 2.0 / 500e-9, rel=1e-9)


def test_validity_refuses_low_bias_and_shallow_tails():
    params = SCLC_EXPONENTIAL_TRAPS.typical_parameters()
    params["characteristic_trap_temperature_K"] = 250.0
    # l = 250/300 < 1: refused; l = 250/200 > 1: kept (Mark & Helfrich need l > 1).
    i = SCLC_EXPONENTIAL_TRAPS.current(np.array([5.0, 5.0]), np.array([300.0, 200.0]), params,
                                       DEVICE)
    assert np.isnan(i[0]) and np.isfinite(i[1])
    # eV/kT < 10 (diffusion not negligible) refused: 0.1 V at 300 K is 3.9 kT.
    shallow = SCLC_SHALLOW_TRAPS.typical_parameters()
    j = SCLC_SHALLOW_TRAPS.current(np.array([0.1, 1.0]), np.array([300.0, 300.0]), shallow,
                                   DEVICE)
    assert np.isnan(j[0]) and np.isfinite(j[1])


def test_log_log_plot_reads_the_trap_temperature():
    plot = SCLC_EXPONENTIAL_TRAPS.plots[0]
    t_t, t = 1200.0, 300.0
    v = np.geomspace(2.0, 20.0, 8)
    params = {"characteristic_trap_temperature_K": t_t, "trap_density_per_cm3": 1e18,
              "dielectric_constant": 3.5, "mobility_band_density_per_V_s_cm": 1e19,
              "thickness_nm": 300.0}
    current = SCLC_EXPONENTIAL_TRAPS.current(v, np.full_like(v, t), params, DEVICE)
    x, y = plot.transform(v, np.full_like(v, t), current, DEVICE)
    slope, intercept = np.polyfit(x, y, 1)
    quantities = plot.interpret(slope, intercept, t, DEVICE)
    assert quantities["voltage_exponent"] == pytest.approx(t_t / t + 1, rel=1e-9)
    assert quantities["characteristic_trap_temperature_K"] == pytest.approx(t_t, rel=1e-9)


def test_sclc_arrhenius_plot_reads_depth_and_prefactor():
    plot = next(p for p in SCLC_SHALLOW_TRAPS.plots if p.id == "sclc_arrhenius_plot")
    device = device_from_values(thickness_nm=300.0, thickness_sd_nm=10.0, area_cm2=1e-4)
    t = np.array([200.0, 250.0, 300.0, 350.0])
    params = {"trap_depth_eV": 0.3, "permittivity_mobility_prefactor_cm2_per_Vs": 50.0,
              "thickness_nm": 300.0}
    current = SCLC_SHALLOW_TRAPS.current(np.full_like(t, 5.0), t, params, device)
    x, y = plot.transform(np.full_like(t, 5.0), t, current, device)
    slope, intercept = np.polyfit(x, y, 1)
    quantities = plot.interpret(slope, intercept, 5.0, device)
    assert quantities["trap_depth_eV"] == pytest.approx(0.3, rel=1e-9)
    assert quantities["permittivity_mobility_prefactor_cm2_per_Vs"] == pytest.approx(50.0,
                                                                                       rel=1e-9)


def test_registered_under_the_space_charge_family():
    assert get_mechanism("sclc_shallow_traps").family == "space_charge"
    assert get_mechanism("sclc_exponential_traps").family == "space_charge"


def test_mark_helfrich_refused_beyond_the_trap_filled_limit():
    # V_TFL = e N_t d^2/(2 eps0 eps_r) (Lampert 1956): 1e16 cm^-3, 100 nm, eps_r 3 gives 0.30 V.
    params = {"characteristic_trap_temperature_K": 1000.0, "trap_density_per_cm3": 1e16,
              "dielectric_constant": 3.0, "mobility_band_density_per_V_s_cm": 1e19,
              "thickness_nm": 100.0}
    v_tfl = sc.e * 1e22 * (100e-9) ** 2 / (2 * sc.epsilon_0 * 3.0)
    v = np.array([0.9 * v_tfl, 1.1 * v_tfl])
    i = SCLC_EXPONENTIAL_TRAPS.current(v, np.full(2, 50.0), params, DEVICE)
    assert np.isfinite(i[0]) and np.isnan(i[1])
