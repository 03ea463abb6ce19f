"""Physics of hopping conduction against outside values.

Check values from /work/shared/physics-references.md section 5 (recomputed there from the
published formulas with scipy.constants, CODATA 2022); sources named per check.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants

from mechid.catalogue import ES_VRH, MOTT_VRH, NEAREST_NEIGHBOUR_HOPPING
from mechid.catalogue.hopping import (
    efros_shklovskii_characteristic_temperature_K,
    es_hopping_distance_nm,
    es_hopping_energy_eV,
    hopping_field_argument,
    mott_characteristic_temperature_K,
    mott_hopping_distance_nm,
    mott_hopping_energy_eV,
    mott_vrh_variant,
    nearest_neighbour_current_density_A_per_cm2,
    reduced_activation_energy,
    reduced_activation_energy_from_data,
    variable_range_hopping_conductance_S,
)
from mechid.constants import BOLTZMANN_EV
from mechid.device import Device, Measured

AREA_CM2 = 1e-4
THICKNESS_NM = 20.0
DEVICE = Device(area_cm2=AREA_CM2, thickness_nm=Measured(THICKNESS_NM))


# ---- nearest-neighbour hopping -----------------------------------------------------------


def test_field_assisted_hopping_argument_and_sinh():
    # Mott & Davis 1979 field-assisted hopping; physics-references §5 [C]: a = 1 nm,
    # E = 1 MV/cm, 300 K -> e a E/(2kT) = 1.934086, sinh = 3.386582
    x = hopping_field_argument(1e8, 1.0, 300.0)
    assert x == pytest.approx(1.934086, rel=1e-6)
    kT = BOLTZMANN_EV * 300.0
    j = nearest_neighbour_current_density_A_per_cm2(1e8, 300.0, 0.3, 1.0, 1.0)
    assert j / np.exp(-0.3 / kT) == pytest.approx(3.386582, rel=1e-6)


def test_nearest_neighbour_density_independent_sinh_form():
    # Mott & Davis 1979: J = J0 exp(-E_a/kT) sinh(e a E/(2 kT)), written here directly with
    # scipy.constants, across the whole activated range (e a E/2 < E_a).
    field = np.geomspace(1e4, 0.99 * 2 * 0.3 / 1e-9, 25)  # V/m, up to e a E/2 = 0.99 E_a
    kT = constants.k * 300.0 / constants.e
    expected = 1e3 * np.exp(-0.3 / kT) * np.sinh(1e-9 * field / (2 * kT))
    j = nearest_neighbour_current_density_A_per_cm2(field, 300.0, 0.3, 1.0, 1e3)
    np.testing.assert_allclose(j, expected, rtol=1e-12)


def test_hopping_arrhenius_plot_recovers_activation_energy():
    # Low field: I T/V ∝ exp(-E_a/kT), so ln(I T/V) vs 1/T has slope -E_a/k (Mott & Davis 1979)
    params = {"activation_energy_eV": 0.25, "hopping_distance_nm": 1.0,
              "prefactor_A_per_cm2": 1e5, "thickness_nm": THICKNESS_NM}
    t = np.linspace(200.0, 400.0, 9)
    v = np.full_like(t, 1e-4)  # e a E/(2kT) ~ 1e-4: sinh is linear
    plot = NEAREST_NEIGHBOUR_HOPPING.plots[0]
    i = NEAREST_NEIGHBOUR_HOPPING.current(v, t, params, DEVICE)
    slope, intercept = np.polyfit(*plot.transform(v, t, i, DEVICE), 1)
    found = plot.interpret(slope, intercept, 1e-4, DEVICE)
    assert found["activation_energy_eV"] == pytest.approx(0.25, rel=1e-6)


def test_hopping_field_plot_recovers_hopping_distance():
    # High field (e a E >> 2kT): ln I vs V has slope e a/(2 kT d) per volt (Mott & Davis 1979)
    params = {"activation_energy_eV": 0.8, "hopping_distance_nm": 2.0,
              "prefactor_A_per_cm2": 1e5, "thickness_nm": THICKNESS_NM}
    v = np.linspace(5.0, 10.0, 11)
    t = np.full_like(v, 100.0)
    plot = NEAREST_NEIGHBOUR_HOPPING.plots[1]
    i = NEAREST_NEIGHBOUR_HOPPING.current(v, t, params, DEVICE)
    slope, intercept = np.polyfit(*plot.transform(v, t, i, DEVICE), 1)
    found = plot.interpret(slope, intercept, 100.0, DEVICE)
    assert found["hopping_distance_nm"] == pytest.approx(2.0, rel=1e-9)
    assert plot.interpret(slope, intercept, 100.0, Device()) == {}


# ---- variable-range hopping: characteristic temperatures and hops ------------------------


def test_mott_characteristic_temperature_and_hop():
    # Mott 1969; physics-references §5 [C]: beta = 18, N = 1e19 /eV/cm^3, xi = 1 nm
    # -> T0 = 2.08881e7 K; at 100 K (T0/T)^1/4 = 21.3784, R = 8.01689 nm, W = 46.0562 meV
    t0 = mott_characteristic_temperature_K(18.0, 1e19, 1.0)
    assert t0 == pytest.approx(2.08881e7, rel=1e-5)
    assert (t0 / 100.0) ** 0.25 == pytest.approx(21.3784, rel=1e-5)
    assert mott_hopping_distance_nm(t0, 100.0, 1.0) == pytest.approx(8.01689, rel=1e-5)
    assert mott_hopping_energy_eV(t0, 100.0) == pytest.approx(46.0562e-3, rel=1e-5)


def test_efros_shklovskii_characteristic_temperature():
    # Efros & Shklovskii 1975; physics-references §5 [C]: beta = 2.8, kappa = 10, xi = 5 nm
    # -> T_ES = 935.765 K
    t_es = efros_shklovskii_characteristic_temperature_K(2.8, 10.0, 5.0)
    assert t_es == pytest.approx(935.765, rel=1e-5)
    # hop length and energy (physics-references §5 [M/CP]): R = xi/4 sqrt(T_ES/T), W = kT/2 sqrt(..)
    assert es_hopping_distance_nm(t_es, t_es / 4, 5.0) == pytest.approx(2.5, rel=1e-12)
    kT = BOLTZMANN_EV * t_es / 4
    assert es_hopping_energy_eV(t_es, t_es / 4) == pytest.approx(kT, rel=1e-12)


@pytest.mark.parametrize(
    ("temperature", "t0", "p", "expected"),
    [
        (100.0, 1e6, 0.25, 2.5),  # physics-references §5 [C], exact
        (10.0, 1e3, 0.5, 5.0),  # physics-references §5 [C], exact
    ],
)
def test_zabrodskii_reduced_activation_energy_exact(temperature, t0, p, expected):
    # Zabrodskii & Zinov'eva 1984: w = p (T0/T)^p
    assert reduced_activation_energy(temperature, t0, p) == pytest.approx(expected, rel=1e-9)


def test_zabrodskii_arrhenius_value():
    # physics-references §5 [C]: E_a = 0.1 eV (T0 = 1160.452 K), 300 K -> w = 3.86817
    t0 = 0.1 / BOLTZMANN_EV
    assert t0 == pytest.approx(1160.452, rel=1e-6)
    assert reduced_activation_energy(300.0, t0, 1.0) == pytest.approx(3.86817, rel=1e-5)


@pytest.mark.parametrize("p", [0.25, 1 / 3, 0.5, 1.0])
def test_zabrodskii_log_slope_is_minus_p(p):
    # physics-references §5: ln w is linear in ln T with slope -p; the finite-difference
    # estimate from conductance data agrees with the analytic w
    # Independent check: w = d ln G/d ln T of G = G0 exp(-(T0/T)^p), differentiated here by
    # central differences of the closed form (step 1e-5 in ln T).
    t = np.geomspace(5.0, 300.0, 40)
    h = 1e-5

    def log_g(log_t):
        return np.log(1e-3) - (2e3 / np.exp(log_t)) ** p

    w_numeric = (log_g(np.log(t) + h) - log_g(np.log(t) - h)) / (2 * h)
    w = reduced_activation_energy(t, 2e3, p)
    assert w == pytest.approx(w_numeric, rel=1e-8)
    # the data estimate (finite differences on a grid) against the same numbers
    t = np.geomspace(5.0, 300.0, 400)
    g = variable_range_hopping_conductance_S(t, 2e3, p, 1e-3)
    np.testing.assert_allclose(g, 1e-3 * np.exp(-((2e3 / t) ** p)), rtol=1e-13)
    w_data = reduced_activation_energy_from_data(t, g)
    assert w_data[1:-1] == pytest.approx(p * (2e3 / t[1:-1]) ** p, rel=1e-3)


# ---- variable-range hopping: declarations and plots --------------------------------------


@pytest.mark.parametrize(
    ("mechanism", "p", "t0"),
    [(MOTT_VRH, 0.25, 3e6), (mott_vrh_variant(2), 1 / 3, 2e5), (ES_VRH, 0.5, 900.0)],
)
def test_vrh_plot_slope_recovers_characteristic_temperature(mechanism, p, t0):
    # Mott 1969 / Efros & Shklovskii 1975: ln(I/V) vs T^-p has slope -T0^p, so T0 = |slope|^(1/p)
    params = {"characteristic_temperature_K": t0, "prefactor_S": 2e-3}
    t = np.geomspace(10.0, 300.0, 15)
    v = np.full_like(t, 0.1)
    i = mechanism.current(v, t, params, Device())
    plot = mechanism.plots[0]
    slope, intercept = np.polyfit(*plot.transform(v, t, i, Device()), 1)
    assert slope == pytest.approx(-(t0**p), rel=1e-8)
    found = plot.interpret(slope, intercept, 0.1, Device())
    assert found["characteristic_temperature_K"] == pytest.approx(t0, rel=1e-7)
    assert found["prefactor_S"] == pytest.approx(2e-3, rel=1e-7)


def test_vrh_is_ohmic_and_needs_no_area():
    params = {"characteristic_temperature_K": 1e6, "prefactor_S": 1e-3}
    v = np.array([0.1, 0.2, 0.4])
    i = MOTT_VRH.current(v, np.full(3, 50.0), params, Device())
    assert i / v == pytest.approx(np.full(3, 1e-3 * np.exp(-((1e6 / 50.0) ** 0.25))), rel=1e-12)


def test_mott_variant_dimensions():
    two_d = mott_vrh_variant(2)
    assert two_d.id == "mott_vrh_2d" and two_d.options == {"dimension": 2}
    assert MOTT_VRH.options == {"dimension": 3}
    assert two_d.parameter_names == MOTT_VRH.parameter_names
    params = {"characteristic_temperature_K": 1e6, "prefactor_S": 1.0}
    i = two_d.current(1.0, 100.0, params, Device())
    assert i == pytest.approx(np.exp(-((1e4) ** (1 / 3))), rel=1e-12)
    with pytest.raises(ValueError, match="dimension 1, 2 or 3"):
        mott_vrh_variant(4)


def test_vrh_interpret_rejects_positive_slope():
    found = ES_VRH.plots[0].interpret(1.0, 0.0, 0.1, Device())
    assert np.isnan(found["characteristic_temperature_K"])
