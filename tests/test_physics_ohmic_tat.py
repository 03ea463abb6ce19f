"""Activated ohmic conduction, trap-assisted tunnelling and image-force Fowler-Nordheim.

Check values: scipy.constants re-implementations of the published formulas, the physics
sheet's computed numbers ([C] there), and Forbes' exact Schottky-Nordheim function v(f)
written with complete elliptic integrals (scipy.special) to test his approximation.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as sc
from scipy.special import ellipe, ellipk

from mechid.catalogue import get_mechanism
from mechid.catalogue.ohmic import OHMIC_ACTIVATED, activated_conductance_S
from mechid.catalogue.trap_tunnelling import (
    FOWLER_NORDHEIM_IMAGE_FORCE,
    TRAP_ASSISTED_TUNNELLING,
    dielectric_scaled_barrier_field,
    image_force_fowler_nordheim_current_density_A_per_m2,
    trap_assisted_tunnelling_current_density_A_per_cm2,
)
from mechid.catalogue.tunnelling import (
    forbes_t,
    forbes_v,
    fowler_nordheim_current_density_A_per_m2,
)
from mechid.device import device_from_values

DEVICE = device_from_values(thickness_nm=8.0, thickness_sd_nm=0.3, area_cm2=1e-4,
                            effective_mass_ratio=0.4, effective_mass_sd=0.05)


# ------------------------------------------------------------------ ohmic conduction


def test_activated_conductance_gives_back_its_activation_energy():
    # Two-temperature Arrhenius reading with k from scipy.constants (Sze & Ng 2007 law).
    g = activated_conductance_S(np.array([250.0, 400.0]), 0.35, 10.0)
    k_eV = sc.k / sc.e
    energy = -k_eV * np.log(g[1] / g[0]) / (1 / 400.0 - 1 / 250.0)
    assert energy == pytest.approx(0.35, rel=1e-12)
    assert g[0] == pytest.approx(10.0 * np.exp(-0.35 / (k_eV * 250.0)), rel=1e-12)


def test_ohmic_mechanism_is_linear_in_bias():
    params = OHMIC_ACTIVATED.typical_parameters()
    v = np.array([0.01, 0.1, 1.0])
    i = OHMIC_ACTIVATED.current(v, np.full(3, 300.0), params, DEVICE)
    np.testing.assert_allclose(i / v, i[0] / v[0], rtol=1e-13)


def test_ohmic_arrhenius_plot_reads_both_parameters():
    plot = OHMIC_ACTIVATED.plots[0]
    t = np.array([250.0, 300.0, 350.0, 400.0])
    params = {"activation_energy_eV": 0.35, "prefactor_S": 10.0}
    i = OHMIC_ACTIVATED.current(np.full_like(t, 0.1), t, params, DEVICE)
    x, y = plot.transform(np.full_like(t, 0.1), t, i, DEVICE)
    slope, intercept = np.polyfit(x, y, 1)
    quantities = plot.interpret(slope, intercept, 0.1, DEVICE)
    assert quantities["activation_energy_eV"] == pytest.approx(0.35, rel=1e-9)
    assert quantities["prefactor_S"] == pytest.approx(10.0, rel=1e-9)


# ------------------------------------------------------------------ trap-assisted tunnelling


def test_tat_exponent_constant():
    # 8 pi sqrt(2 q m*) phi_t^(3/2)/(3 h E) with phi_t in volts (Houng et al. 1999 form, from
    # memory) at phi_t = 1 V, m* = 0.5 m0, E = 1 V/nm, from scipy.constants; the physics sheet
    # gives 4.83017 [C].
    literal = 8 * np.pi * np.sqrt(2 * sc.e * 0.5 * sc.m_e) * 1.0**1.5 / (3 * sc.h * 1e9)
    assert literal == pytest.approx(4.83017, rel=1e-5)
    j = trap_assisted_tunnelling_current_density_A_per_cm2(1.0, 1.0, 0.5, 1.0)
    assert j == pytest.approx(np.exp(-literal), rel=1e-12)


def test_tat_is_temperature_independent_and_refuses_bias_below_the_trap():
    params = {"trap_energy_eV": 1.2, "prefactor_A_per_cm2": 1e2, "thickness_nm": 8.0,
              "effective_mass_ratio": 0.4}
    i = TRAP_ASSISTED_TUNNELLING.current(np.array([1.0, 5.0, 5.0]),
                                         np.array([300.0, 100.0, 400.0]), params, DEVICE)
    assert np.isnan(i[0])  # eV = 1 < phi_t = 1.2 eV: the barrier from the trap is not triangular
    assert i[1] == i[2]  # the elastic form has no temperature in it: bit equality by construction


def test_tat_plot_reads_the_trap_energy():
    plot = TRAP_ASSISTED_TUNNELLING.plots[0]
    params = {"trap_energy_eV": 1.2, "prefactor_A_per_cm2": 1e2, "thickness_nm": 8.0,
              "effective_mass_ratio": 0.4}
    v = np.linspace(3.0, 8.0, 10)
    i = TRAP_ASSISTED_TUNNELLING.current(v, np.full_like(v, 300.0), params, DEVICE)
    x, y = plot.transform(v, np.full_like(v, 300.0), i, DEVICE)
    slope, intercept = np.polyfit(x, y, 1)
    assert plot.interpret(slope, intercept, 300.0, DEVICE)["trap_energy_eV"] == pytest.approx(
        1.2, rel=1e-9)


# ------------------------------------------------------------------ image-force FN


def _exact_v(f):
    """Schottky-Nordheim v(f) = sqrt(1 + sqrt f) [E(m) - sqrt f K(m)], m = (1 - sqrt f)/(1 + sqrt f).

    The complete-elliptic-integral form of v (Forbes & Deane 2007, with scipy's parameter
    convention m = k^2; form from memory, its end points v(0) = 1, v(1) = 0 checked below).
    """
    y = np.sqrt(f)
    m = (1 - y) / (1 + y)
    return np.sqrt(1 + y) * (ellipe(m) - y * ellipk(m))


def test_exact_v_end_points():
    assert _exact_v(1e-14) == pytest.approx(1.0, abs=1e-6)
    assert _exact_v(1.0) == pytest.approx(0.0, abs=1e-15)
    assert forbes_v(0.0) == 1.0 and forbes_v(1.0) == 0.0


def test_forbes_v_within_its_stated_accuracy_of_the_exact_function():
    # Forbes (2006) states his approximation is good to about 0.0025 in v over 0 <= f <= 1
    # (from memory). Measured here: 0.00238 at f = 0.176.
    f = np.linspace(1e-9, 1.0, 20001)
    error = np.abs(forbes_v(f) - _exact_v(f))
    assert error.max() <= 0.0025
    assert error.max() > 1e-3  # it is an approximation, not the exact function


def test_forbes_t_close_to_the_exact_t():
    # t(f) = v(f) - (4/3) f dv/df (Forbes & Deane 2007, from memory), dv/df by central
    # differences of the exact v. Measured difference of Forbes' t: at most 0.0042 (ours).
    f = np.linspace(0.01, 0.99, 99)
    h = 1e-6
    t_exact = _exact_v(f) - 4 / 3 * f * (_exact_v(f + h) - _exact_v(f - h)) / (2 * h)
    assert np.max(np.abs(forbes_t(f) - t_exact)) < 0.005


def test_scaled_field_in_a_dielectric():
    # f = e^3 F/(4 pi eps0 eps_r phi^2); F = 1 V/nm, phi = 4.5 eV, eps_r = 1 gives 0.0711094
    # (physics sheet [C]); scipy.constants re-implementation for eps_r = 3.
    assert dielectric_scaled_barrier_field(1.0, 4.5, 1.0) == pytest.approx(0.0711094, rel=1e-6)
    independent = sc.e / (4 * np.pi * sc.epsilon_0 * 3.0) * 1e9 / 2.0**2
    assert dielectric_scaled_barrier_field(1.0, 2.0, 3.0) == pytest.approx(independent, rel=1e-9)


def test_image_force_fn_reduces_to_the_triangular_form_without_image_force():
    # eps_r -> infinity removes the image force: v = t = 1, the Lenzlinger-Snow FN density.
    field = np.array([0.8, 1.2])
    with_if = image_force_fowler_nordheim_current_density_A_per_m2(field, 3.0, 0.5, 1e15)
    plain = fowler_nordheim_current_density_A_per_m2(field, 3.0, 0.5)
    np.testing.assert_allclose(with_if, plain, rtol=1e-9)


def test_image_force_raises_the_current_by_the_murphy_good_factors():
    field, phi, mass, eps = 1.0, 1.5, 0.4, 3.0
    f = dielectric_scaled_barrier_field(field, phi, eps)
    ratio = (image_force_fowler_nordheim_current_density_A_per_m2(field, phi, mass, eps)
             / fowler_nordheim_current_density_A_per_m2(field, phi, mass))
    b = 8 * np.pi / 3 * np.sqrt(2 * sc.m_e * mass) * (phi * sc.e) ** 1.5 / (sc.e * sc.h) / 1e9
    expected = np.exp((1 - forbes_v(f)) * b / field) / forbes_t(f) ** 2
    assert ratio == pytest.approx(expected, rel=1e-9)
    assert ratio > 1


def test_image_force_fn_refuses_a_removed_barrier():
    params = {"barrier_height_eV": 0.6, "thickness_nm": 2.0, "effective_mass_ratio": 0.5,
              "dielectric_constant": 1.0}
    # F = 1.5 V/nm: f = 1.44 x 1.5/0.36 = 6 > 1 (no barrier left); F = 0.35 V/nm: f = 1.4 > 1
    # too; 0.7 V over 5 nm: f = 0.56, allowed when eV >= phi.
    i = FOWLER_NORDHEIM_IMAGE_FORCE.current(np.array([3.0, 0.7]), np.array([10.0, 10.0]),
                                            params, device_from_values(area_cm2=1e-4))
    assert np.isnan(i[0]) and np.isnan(i[1])
    params["thickness_nm"] = 5.0
    j = FOWLER_NORDHEIM_IMAGE_FORCE.current(np.array([0.7]), np.array([10.0]), params,
                                            device_from_values(area_cm2=1e-4))
    assert np.isfinite(j[0])


def test_trap_assisted_tunnelling_is_registered():
    assert get_mechanism("trap_assisted_tunnelling").family == "tunnelling"
