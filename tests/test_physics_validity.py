"""Validity domains: every catalogue formula is finite, positive and increasing in |V| where it
holds, refused (NaN) where it does not, and the diagnostic says which condition failed.

The quantities the conditions bound are recomputed here from scipy.constants (independent
of mechid's constants module), so a wrong limit or a wrong quantity fails these tests.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants

from mechid.catalogue import (
    DIRECT_TUNNELLING,
    FOWLER_NORDHEIM,
    MECHANISMS,
    NEAREST_NEIGHBOUR_HOPPING,
    POOLE_FRENKEL,
    SCHOTTKY_EMISSION,
)
from mechid.catalogue.hopping import mott_vrh_variant
from mechid.catalogue.validity import validity_violations, within_validity
from mechid.device import Device

DEVICE = Device(area_cm2=1e-4)
ALL = [*MECHANISMS, mott_vrh_variant(1)]
IDS = [f"{m.id}{m.options.get('dimension', '')}" for m in ALL]
BIASES_V = np.geomspace(1e-3, 50.0, 90)
TEMPERATURES_K = np.array([1.0, 4.2, 77.0, 300.0, 500.0])
KT_300_EV = constants.k * 300.0 / constants.e


def _parameter(draw, p):
    """A value inside the declared range (log-uniform for log-scale parameters)."""
    if p.log_scale:
        return 10 ** draw(st.floats(np.log10(p.lower), np.log10(p.upper)))
    return draw(st.floats(p.lower, p.upper))


@pytest.mark.parametrize("mechanism", ALL, ids=IDS)
@settings(max_examples=30, deadline=None, derandomize=True)
@given(data=st.data())
def test_current_positive_increasing_inside_domain_and_refused_outside(mechanism, data):
    params = {p.name: _parameter(data.draw, p) for p in mechanism.parameters}
    for temperature in TEMPERATURES_K:
        t = np.full_like(BIASES_V, temperature)
        current = mechanism.current(BIASES_V, t, params, DEVICE)
        bare = mechanism.current(BIASES_V, t, params, DEVICE, enforce_validity=False)
        valid = within_validity(mechanism.validity, BIASES_V, t, DEVICE, params)
        valid = np.broadcast_to(valid, BIASES_V.shape)
        assert np.all(np.isnan(current[~valid])), (mechanism.id, params, temperature)
        inside = current[valid]
        np.testing.assert_array_equal(inside, bare[valid])
        assert np.all(np.isfinite(inside)), (mechanism.id, params, temperature)
        assert np.all(inside >= 0)
        # the valid biases form one interval (no holes) and the current rises along it
        index = np.flatnonzero(valid)
        if index.size > 1:
            assert np.all(np.diff(index) == 1), (mechanism.id, params, temperature)
            step = np.diff(inside)
            representable = (inside[:-1] > 1e-290) & (inside[1:] > 1e-290)
            assert np.all(step >= 0), (mechanism.id, params, temperature)
            assert np.all(step[representable] > 0), (mechanism.id, params, temperature)


def _fn_thermal_argument(voltage, temperature, phi, thickness, mass):
    """pi c kT with c = 2 sqrt(2 m* e phi)/(hbar e F) (Forbes' decay width), SI units."""
    field = voltage / (thickness * 1e-9)
    c = 2 * np.sqrt(2 * mass * constants.m_e * phi * constants.e) / (constants.hbar * field)
    return np.pi * c * constants.k * temperature / constants.e


def test_violations_name_the_condition_share_and_extreme_value():
    # FN, phi = 3 eV, m* = 0.5, d = 8 nm at 300 K: pi c kT = 1.63 at 5 V, 0.82 at 10 V,
    # 0.41 at 20 V (recomputed independently above); two of four draws are 8 nm (fail at
    # 5 V), two 4 nm (pi c kT = 0.82 at 5 V: inside).
    v = np.array([5.0, 10.0, 20.0])
    t = np.full(3, 300.0)
    draws = {"barrier_height_eV": np.full(4, 3.0), "effective_mass_ratio": np.full(4, 0.5),
             "thickness_nm": np.array([8.0, 4.0, 8.0, 4.0])}
    found = validity_violations(FOWLER_NORDHEIM, v, t, draws, DEVICE)
    assert [x.condition_id for x in found] == ["thermal_factor_argument"]
    violation = found[0]
    x_thick = _fn_thermal_argument(v, 300.0, 3.0, 8.0, 0.5)
    x_thin = _fn_thermal_argument(v, 300.0, 3.0, 4.0, 0.5)
    assert x_thick[0] == pytest.approx(1.63, abs=0.01)
    failing = np.concatenate([x_thick, x_thin, x_thick, x_thin]) > 1
    assert violation.fraction_of_points == pytest.approx(failing.mean())
    assert violation.fraction_of_draws == pytest.approx(0.5)
    assert violation.extreme_value == pytest.approx(x_thick[0], rel=1e-6)
    assert (violation.at_voltage_V, violation.at_temperature_K) == (5.0, 300.0)
    assert "1.63" in violation.message() and "<= 1" in violation.message()
    inside = {k: a[:1] for k, a in draws.items()} | {"thickness_nm": np.array([2.0])}
    assert validity_violations(FOWLER_NORDHEIM, v, t, inside, DEVICE) == ()


def test_violations_of_a_direct_tunnelling_fit_beyond_the_barrier():
    # Data to 1.5 V with phi0 = 1 eV: the points above eV = phi0 break "bias_below_barrier";
    # zero-bias points are ignored.
    v = np.array([0.0, -0.5, 0.9, 1.2, 1.5])
    t = np.full(5, 77.0)
    draws = {"barrier_height_eV": np.array([1.0, 2.0]), "thickness_nm": np.array([2.0, 2.0]),
             "effective_mass_ratio": np.array([0.5, 0.5])}
    found = {x.condition_id: x for x in validity_violations(DIRECT_TUNNELLING, v, t, draws,
                                                            DEVICE)}
    assert set(found) == {"bias_below_barrier"}
    assert found["bias_below_barrier"].fraction_of_draws == 0.5
    assert found["bias_below_barrier"].fraction_of_points == pytest.approx(2 / 8)
    assert found["bias_below_barrier"].extreme_value == pytest.approx(1.5)


@pytest.mark.parametrize(
    ("mechanism", "params", "edge_V"),
    [
        # lowering beta sqrt(E/eps_r) equals the barrier at E = eps_r (phi/beta)^2 (Sze & Ng):
        # beta_S = sqrt(e/(4 pi eps0)) in eV (m/V)^1/2
        (SCHOTTKY_EMISSION, {"barrier_height_eV": 0.3, "dielectric_constant": 4.0,
                             "richardson_constant_ratio": 0.5, "thickness_nm": 10.0},
         4.0 * (0.3 / np.sqrt(constants.e / (4 * np.pi * constants.epsilon_0))) ** 2 * 10e-9),
        (POOLE_FRENKEL, {"trap_depth_eV": 0.3, "dielectric_constant": 4.0,
                         "prefactor_S_per_cm": 1.0, "thickness_nm": 10.0},
         4.0 * (0.3 / np.sqrt(constants.e / (np.pi * constants.epsilon_0))) ** 2 * 10e-9),
        # e a E/2 = E_a at V = 2 E_a d/a (Mott & Davis 1979)
        (NEAREST_NEIGHBOUR_HOPPING, {"activation_energy_eV": 0.1, "hopping_distance_nm": 2.0,
                                     "prefactor_A_per_cm2": 1.0, "thickness_nm": 10.0},
         2 * 0.1 * 10.0 / 2.0),
    ],
    ids=["schottky", "poole_frenkel", "nn_hopping"],
)
def test_emission_and_hopping_refused_where_the_field_removes_the_barrier(mechanism, params,
                                                                          edge_V):
    v = edge_V * np.array([0.99, 1.01])
    i = mechanism.current(v, np.full(2, 300.0), params, DEVICE)
    assert np.isfinite(i[0]) and i[0] > 0
    assert np.isnan(i[1])


def test_a_mechanism_whose_formula_holds_nowhere_is_not_fitted_and_says_why():
    # FN-like data at 6-10 V: every direct-tunnelling draw has phi0 <= 5 eV < eV, outside
    # Simmons' intermediate range. The fit refuses it before sampling; the rounds leave it
    # out with a warning naming the condition.
    from mechid.catalogue.validity import FormulaNotApplicableError
    from mechid.errors import MechidWarning
    from mechid.inference.fit import fit_mechanism
    from mechid.inference.rounds import FitJob, fit_in_rounds
    from mechid.inference.settings import FULL_SEARCH, LadderSettings

    device = Device(area_cm2=1e-4)
    v = np.array([-10.0, -8.0, -6.0, 6.0, 8.0, 10.0])
    t = np.full(6, 300.0)
    params = {"barrier_height_eV": 3.0, "thickness_nm": 6.0, "effective_mass_ratio": 0.45}
    i = FOWLER_NORDHEIM.current(v, np.full(6, 77.0), params, device)
    with pytest.raises(FormulaNotApplicableError, match=r"eV/phi0 .* <= 1"):
        fit_mechanism(DIRECT_TUNNELLING, v, t, i, device, LadderSettings(),
                      np.random.default_rng(1), search=FULL_SEARCH)
    with pytest.warns(MechidWarning, match="direct_tunnelling was not fitted"):
        fits = fit_in_rounds([FitJob("direct_tunnelling", np.random.default_rng(1))], v, t, i,
                             device, LadderSettings(), FULL_SEARCH)
    assert fits == {}


def test_simulating_outside_the_domain_says_which_condition_fails():
    # FN at 5 V and 300 K in an 8 nm film: pi c kT = 1.63 (computed above independently).
    from mechid.errors import MechidError
    from mechid.simulate import simulate_series

    params = {"barrier_height_eV": 3.0, "thickness_nm": 8.0, "effective_mass_ratio": 0.5}
    with pytest.raises(MechidError, match=r"pi c kT .* = 1\.63 at 5 V, 300 K .*pi c kT <= 1"):
        simulate_series(FOWLER_NORDHEIM, params, [77.0, 300.0], [5.0, 10.0], DEVICE)
