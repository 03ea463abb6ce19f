"""Contract of the mechanism catalogue: ids, parameters, shapes, symmetry, numerical safety."""

from __future__ import annotations

from dataclasses import fields

import numpy as np
import pytest

from mechid.catalogue import MECHANISMS, get_mechanism, mechanism_ids
from mechid.catalogue.hopping import mott_vrh_variant
from mechid.device import Device, Measured
from mechid.errors import DeviceError

AREA_CM2 = 1e-4
DEVICE = Device(area_cm2=AREA_CM2)

#: The ids, families and parameter names fixed by the project's design (other modules,
#: the CLI and the JSON contract use these names).
EXPECTED = {
    "direct_tunnelling": ("tunnelling",
                          ("barrier_height_eV", "thickness_nm", "effective_mass_ratio")),
    "dissimilar_electrode_tunnelling": ("tunnelling", (
        "mean_barrier_eV", "barrier_difference_eV", "thickness_nm", "effective_mass_ratio")),
    "fowler_nordheim": ("tunnelling",
                        ("barrier_height_eV", "thickness_nm", "effective_mass_ratio")),
    "fowler_nordheim_two_barriers": ("tunnelling", (
        "barrier_height_positive_bias_eV", "barrier_height_negative_bias_eV", "thickness_nm",
        "effective_mass_ratio")),
    "schottky_emission": ("emission", ("barrier_height_eV", "dielectric_constant",
                                       "richardson_constant_ratio", "thickness_nm")),
    "schottky_emission_two_barriers": ("emission", (
        "barrier_height_positive_bias_eV", "barrier_height_negative_bias_eV",
        "dielectric_constant", "richardson_constant_ratio", "thickness_nm")),
    "poole_frenkel": ("emission", ("trap_depth_eV", "dielectric_constant",
                                   "prefactor_S_per_cm", "thickness_nm")),
    "ohmic_activated": ("ohmic", ("activation_energy_eV", "prefactor_S")),
    "sclc_shallow_traps": ("space_charge", ("trap_depth_eV",
                                            "permittivity_mobility_prefactor_cm2_per_Vs",
                                            "thickness_nm")),
    "sclc_exponential_traps": ("space_charge", ("characteristic_trap_temperature_K",
                                                "trap_density_per_cm3", "dielectric_constant",
                                                "mobility_band_density_per_V_s_cm",
                                                "thickness_nm")),
    "sclc_single_trap_level": ("space_charge", (
        "trap_depth_eV", "band_density_per_cm3", "trap_density_per_cm3", "mobility_cm2_per_Vs",
        "dielectric_constant", "thickness_nm")),
    "nearest_neighbour_hopping": ("hopping", ("activation_energy_eV", "hopping_distance_nm",
                                              "prefactor_A_per_cm2", "thickness_nm")),
    "mott_vrh": ("hopping", ("characteristic_temperature_K", "prefactor_S")),
    "mott_vrh_2d": ("hopping", ("characteristic_temperature_K", "prefactor_S")),
    "es_vrh": ("hopping", ("characteristic_temperature_K", "prefactor_S")),
    "schottky_diode": ("emission", ("barrier_height_eV", "ideality_factor",
                                    "richardson_constant_A_cm2_K2", "series_resistance_ohm",
                                    "shunt_resistance_ohm")),
    "inhomogeneous_schottky_diode": ("emission", (
        "mean_barrier_height_eV", "barrier_variance_V2", "voltage_coefficient_rho2",
        "voltage_coefficient_rho3_V", "richardson_constant_A_cm2_K2", "series_resistance_ohm",
        "shunt_resistance_ohm")),
    "lateral_2d_schottky_diode": ("emission", ("barrier_height_eV", "ideality_factor",
                                               "prefactor_A_per_K1_5", "series_resistance_ohm",
                                               "shunt_resistance_ohm")),
    "thermionic_field_diode": ("emission", (
        "barrier_height_eV", "doping_per_cm3", "semiconductor_effective_mass_ratio",
        "dielectric_constant", "richardson_constant_A_cm2_K2", "series_resistance_ohm",
        "shunt_resistance_ohm")),
    "trap_assisted_tunnelling": ("tunnelling", ("trap_energy_eV", "prefactor_A_per_cm2",
                                                "thickness_nm", "effective_mass_ratio")),
    "fowler_nordheim_image_force": ("tunnelling", (
        "barrier_height_eV", "thickness_nm", "effective_mass_ratio", "dielectric_constant")),
    "poole_frenkel_with_leak": ("emission", (
        "trap_depth_eV", "dielectric_constant", "prefactor_S_per_cm", "thickness_nm",
        "leak_activation_energy_eV", "leak_prefactor_S")),
    "schottky_emission_with_leak": ("emission", (
        "barrier_height_eV", "dielectric_constant", "richardson_constant_ratio", "thickness_nm",
        "leak_activation_energy_eV", "leak_prefactor_S")),
    "direct_tunnelling_with_leak": ("tunnelling", (
        "barrier_height_eV", "thickness_nm", "effective_mass_ratio",
        "leak_activation_energy_eV", "leak_prefactor_S")),
    "sclc_single_trap_level_with_leak": ("space_charge", (
        "trap_depth_eV", "band_density_per_cm3", "trap_density_per_cm3", "mobility_cm2_per_Vs",
        "dielectric_constant", "thickness_nm", "leak_activation_energy_eV", "leak_prefactor_S")),
    "fowler_nordheim_series_resistance": ("tunnelling", (
        "barrier_height_eV", "thickness_nm", "effective_mass_ratio", "series_resistance_ohm")),
}

ALL = [*MECHANISMS, mott_vrh_variant(1)]
IDS = [f"{m.id}{m.options.get('dimension', '')}" for m in ALL]
#: Mechanisms odd in V (rectifying contacts declare a signed formula instead).
ODD = [m for m in ALL if m.is_odd]
ODD_IDS = [f"{m.id}{m.options.get('dimension', '')}" for m in ODD]


def test_ids_families_and_parameter_names():
    assert mechanism_ids() == tuple(EXPECTED)
    for mechanism_id, (family, names) in EXPECTED.items():
        mechanism = get_mechanism(mechanism_id)
        assert mechanism.family == family
        assert mechanism.parameter_names == names


@pytest.mark.parametrize("mechanism", ALL, ids=IDS)
def test_declaration_is_complete(mechanism):
    assert mechanism.name and mechanism.formula and mechanism.source
    assert mechanism.temperature_dependence
    # The screening folds the series onto |V|, where no plot straightens a rectifying contact.
    assert mechanism.plots or not mechanism.is_odd
    device_fields = {f.name for f in fields(Device)}
    for p in mechanism.parameters:
        assert p.device_prior is None or p.device_prior in device_fields
        assert p.unit and p.symbol and p.description
    for plot in mechanism.plots:
        assert plot.grouping in ("per_temperature", "per_voltage")
        assert plot.x_label and plot.y_label and plot.title


def test_plot_ids_are_unique():
    # One id, one plot (electrode-resolved variants share their base mechanism's plots).
    plots = {plot.id: plot for m in MECHANISMS for plot in m.plots}
    assert all(plots[plot.id] is plot for m in MECHANISMS for plot in m.plots)


def _biases_inside_domain(mechanism, params, temperature_K, count=3):
    """``count`` increasing biases where the typical parameters are inside the domain."""
    v = np.geomspace(1e-3, 50.0, 400)
    valid = np.isfinite(mechanism.current(v, np.full_like(v, temperature_K), params, DEVICE))
    assert valid.sum() >= count, mechanism.id
    return v[valid][np.linspace(0, valid.sum() - 1, count).astype(int)]


@pytest.mark.parametrize("mechanism", ODD, ids=ODD_IDS)
def test_current_is_odd_and_zero_at_zero_bias(mechanism):
    params = mechanism.typical_parameters()
    inside = _biases_inside_domain(mechanism, params, 250.0)
    v = np.concatenate([-inside[::-1], [0.0], inside])
    t = np.full_like(v, 250.0)
    i = mechanism.current(v, t, params, DEVICE)
    assert i[3] == 0.0
    # Same formula at the same |V|, but at other array positions: NumPy's SIMD exp/log/power may
    # treat a lane and a loop tail differently, so allow a few ulp (rel 1e-13 = ~450 ulp of margin
    # on a one-ulp difference amplified by exponents up to ~50), not bit equality.
    assert i[4:] == pytest.approx(-i[:3][::-1], rel=1e-13)
    assert np.all(i[4:] > 0)


@pytest.mark.parametrize("mechanism", ALL, ids=IDS)
def test_broadcasting_equals_loop_of_scalars(mechanism):
    rng = np.random.default_rng(7)
    m, n = 4, 6
    params = {}
    for p in mechanism.parameters:
        if p.log_scale:
            draw = 10 ** rng.uniform(np.log10(p.lower), np.log10(p.upper), size=(m, 1))
        else:
            draw = rng.uniform(p.lower, p.upper, size=(m, 1))
        params[p.name] = draw
    v = rng.uniform(0.01, 5.0, size=n) * rng.choice([-1.0, 1.0], size=n)
    t = rng.uniform(5.0, 500.0, size=n)
    batch = mechanism.current(v, t, params, DEVICE)
    assert batch.shape == (m, n)
    looped = np.array([
        [mechanism.current(v[k], t[k], {name: float(val[j, 0]) for name, val in params.items()},
                           DEVICE) for k in range(n)]
        for j in range(m)
    ])
    # A batched call and a scalar call take different NumPy code paths (SIMD lanes vs scalar
    # libm), which may differ by an ulp in exp/log/power; the formulas then pass that through
    # exp() of arguments up to ~100, so a relative 1e-12 is the justified bound (a real
    # broadcasting mistake gives differences of order 1).
    np.testing.assert_allclose(batch, looped, rtol=1e-12, atol=0.0)


@pytest.mark.parametrize("mechanism", MECHANISMS, ids=[m.id for m in MECHANISMS])
def test_area_needed_exactly_for_density_formulas(mechanism):
    params = mechanism.typical_parameters()
    if not mechanism.needs_area:
        assert np.isfinite(mechanism.current(1.0, 300.0, params, Device()))
    else:
        with pytest.raises(DeviceError, match="area"):
            mechanism.current(1.0, 300.0, params, Device())


@pytest.mark.parametrize("mechanism", ALL, ids=IDS)
def test_transforms_give_nan_for_undefined_points_without_warnings(mechanism):
    # filterwarnings = error: any RuntimeWarning from log/sqrt/division fails this test
    v = np.array([0.0, 1.0, 1.0, -1.0, 1.0, 1.0, 1.0, 2.0, -2.0])
    i = np.array([1e-9, 0.0, -1e-9, 1e-9, np.nan, 1e-9, 1e-9, 3e-9, -3e-9])
    t = np.array([300.0, 300.0, 300.0, 300.0, 300.0, 0.0, -5.0, 300.0, 300.0])
    device = Device(area_cm2=AREA_CM2, thickness_nm=Measured(10.0))
    for plot in mechanism.plots:
        x, y = plot.transform(v, t, i, device)
        assert x.shape == v.shape and y.shape == v.shape
        undefined = np.isnan(x) | np.isnan(y)
        assert undefined[:5].all(), plot.id  # zero bias, zero or opposite or NaN current
        assert np.isfinite(x[7:]).all() and np.isfinite(y[7:]).all(), plot.id
        # both polarities of a symmetric device land on the same point
        # (equal up to the ulp-level differences of SIMD lanes vs loop tails in log/sqrt)
        assert x[7] == pytest.approx(x[8], rel=1e-13) and y[7] == pytest.approx(y[8], rel=1e-13)
        if plot.grouping == "per_voltage":
            assert undefined[5:7].all(), plot.id  # non-positive temperature


@pytest.mark.parametrize("mechanism", ALL, ids=IDS)
def test_interpret_returns_plain_floats_with_unit_suffixed_keys(mechanism):
    device = Device(area_cm2=AREA_CM2, thickness_nm=Measured(10.0),
                    effective_mass_ratio=Measured(0.5))
    for plot in mechanism.plots:
        for dev in (device, Device()):
            found = plot.interpret(-2.0, -20.0, 300.0, dev)
            assert isinstance(found, dict)
            for key, value in found.items():
                assert isinstance(key, str) and isinstance(value, float)
                assert key.endswith(("_eV", "_nm", "_K", "_S", "_S_per_cm", "_per_V2",
                                     "_A_per_cm2_K2", "_ratio", "dielectric_constant",
                                     "_exponent", "_cm2_per_Vs", "_V", "_per_cm3"))
