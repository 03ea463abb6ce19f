"""A containing hypothesis whose search missed its nested special case is caught.

Physics of the nesting: Werner & Güttler (J. Appl. Phys. 69, 1522 (1991)) with sigma^2 = 0,
rho3 = 0 and rho2 = 1 - 1/n is the plain diode law with ideality n (phi_ap = phibar,
1/n_ap - 1 = -rho2): the currents must agree at every point.
"""

from types import SimpleNamespace

import numpy as np
import pytest

from mechid.catalogue import get_mechanism
from mechid.catalogue.diode import homogeneous_as_inhomogeneous
from mechid.device import Device
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.nesting import MISS_MARGIN, nested_search_misses
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE, mechanism_priors
from mechid.simulate import simulate_series

DEVICE = Device(area_cm2=1e-3)
HOMOGENEOUS = get_mechanism("schottky_diode")
INHOMOGENEOUS = get_mechanism("inhomogeneous_schottky_diode")
TRUTH = {"barrier_height_eV": 0.75, "ideality_factor": 1.2, "richardson_constant_A_cm2_K2": 30.0,
         "series_resistance_ohm": 50.0, "shunt_resistance_ohm": 1e9}


def test_the_inhomogeneous_diode_contains_the_homogeneous_one_point_by_point():
    rng = np.random.default_rng(4)
    voltage = np.linspace(-2.0, 1.0, 31)
    for _ in range(5):
        values = {"barrier_height_eV": rng.uniform(0.5, 1.0), "ideality_factor": rng.uniform(1, 2),
                  "richardson_constant_A_cm2_K2": 10 ** rng.uniform(0, 2),
                  "series_resistance_ohm": 10 ** rng.uniform(1, 4),
                  "shunt_resistance_ohm": 10 ** rng.uniform(7, 11)}
        for temperature in (80.0, 200.0, 400.0):
            t = np.full(voltage.size, temperature)
            np.testing.assert_allclose(
                INHOMOGENEOUS.current(voltage, t, homogeneous_as_inhomogeneous(values), DEVICE),
                HOMOGENEOUS.current(voltage, t, values, DEVICE), rtol=1e-12, atol=0)


def _fake_fit(mechanism, series, point_physical, log_evidence=0.0, flags=()):
    """A fit-like record whose best point (MAP and only chain state) is ``point_physical``."""
    priors = mechanism_priors(mechanism, DEVICE, series.current_A)
    target = MechanismTarget(mechanism, series.voltage_V, series.temperature_K, series.current_A,
                             DEVICE, priors)
    internal = np.array([float(p.to_internal(point_physical[p.name])) for p in target.free])
    log_like = target.log_likelihood(internal[None, :])
    log_prior = target.log_prior(internal[None, :])
    run = SimpleNamespace(cold_chain=internal[None, None, :], cold_log_likelihood=log_like[None, :],
                          cold_log_prior=log_prior[None, :])
    return SimpleNamespace(target=target, run=run, map_internal=internal,
                           result=SimpleNamespace(id=mechanism.id),
                           evidence=SimpleNamespace(log_evidence=log_evidence, flags=flags))


def test_a_missed_nested_region_is_reported_and_a_found_one_is_not():
    series = simulate_series(HOMOGENEOUS, TRUTH, [100.0, 200.0, 300.0], np.linspace(-1, 0.8, 37),
                             DEVICE, noise_relative=0.02, noise_floor_A=1e-13,
                             rng=np.random.default_rng(1))
    noise = {NOISE_RELATIVE: 0.02, NOISE_FLOOR: 1e-13}
    nested = _fake_fit(HOMOGENEOUS, series, {**TRUTH, **noise})
    # the container "found" only a poor point: 30 meV off in barrier, no spread
    poor = {**homogeneous_as_inhomogeneous({**TRUTH, "barrier_height_eV": 0.78}), **noise}
    missed = _fake_fit(INHOMOGENEOUS, series, poor)
    found = nested_search_misses({"schottky_diode": nested, "inhomogeneous_schottky_diode": missed})
    assert len(found) == 1 and found[0].mechanism_id == "inhomogeneous_schottky_diode"
    assert found[0].gain > MISS_MARGIN
    assert "not reliable" in found[0].caution()
    # a container that reached the nested best fit (mapped) shows no miss
    reached = _fake_fit(INHOMOGENEOUS, series, {**homogeneous_as_inhomogeneous(TRUTH), **noise})
    assert nested_search_misses({"schottky_diode": nested,
                                 "inhomogeneous_schottky_diode": reached}) == []


def test_a_flagged_container_evidence_below_the_nested_one_is_a_suspected_miss():
    from mechid.inference.flags import SamplerFlag

    series = simulate_series(HOMOGENEOUS, TRUTH, [100.0, 200.0, 300.0], np.linspace(-1, 0.8, 37),
                             DEVICE, noise_relative=0.02, noise_floor_A=1e-13,
                             rng=np.random.default_rng(1))
    noise = {NOISE_RELATIVE: 0.02, NOISE_FLOOR: 1e-13}
    nested = _fake_fit(HOMOGENEOUS, series, {**TRUTH, **noise}, log_evidence=100.0)
    point = {**homogeneous_as_inhomogeneous(TRUTH), **noise}
    flagged = _fake_fit(INHOMOGENEOUS, series, point, log_evidence=60.0,
                        flags=(SamplerFlag.EVIDENCE_METHODS_DISAGREE,))
    found = nested_search_misses({"schottky_diode": nested,
                                  "inhomogeneous_schottky_diode": flagged})
    assert len(found) == 1 and not found[0].proven and found[0].gain == pytest.approx(40.0)
    assert "flagged" in found[0].caution()
    # The same deficit on an evidence the sampler trusts is an Occam factor, not a miss; so is
    # a flagged evidence within the margin.
    trusted = _fake_fit(INHOMOGENEOUS, series, point, log_evidence=60.0)
    close = _fake_fit(INHOMOGENEOUS, series, point, log_evidence=97.0,
                      flags=(SamplerFlag.LOW_SWAP_RATE,))
    for container in (trusted, close):
        assert nested_search_misses({"schottky_diode": nested,
                                     "inhomogeneous_schottky_diode": container}) == []


def test_restart_hints_are_the_nested_best_fit_mapped():
    from mechid.inference.nesting import NestedSearchMiss, restart_hints

    series = simulate_series(HOMOGENEOUS, TRUTH, [150.0, 300.0], np.linspace(-1, 0.8, 19), DEVICE,
                             noise_relative=0.02, noise_floor_A=1e-13, rng=np.random.default_rng(2))
    noise = {NOISE_RELATIVE: 0.02, NOISE_FLOOR: 1e-13}
    fits = {"schottky_diode": _fake_fit(HOMOGENEOUS, series, {**TRUTH, **noise}),
            "inhomogeneous_schottky_diode": _fake_fit(
                INHOMOGENEOUS, series, {**homogeneous_as_inhomogeneous(TRUTH), **noise})}
    hints = restart_hints(NestedSearchMiss("inhomogeneous_schottky_diode", "schottky_diode", 9.0),
                          fits)
    assert hints.mechanism_id == "inhomogeneous_schottky_diode"
    expected = homogeneous_as_inhomogeneous(TRUTH)
    assert set(hints.values) == set(expected)
    for name, value in expected.items():
        assert abs(hints.values[name] - value) <= 1e-9 * max(1.0, abs(value)), name


def test_a_missed_container_is_fitted_again_from_the_nested_fit_and_wins():
    # An inhomogeneous diode with a small spread on a window down to 100 K (the small-spread
    # study's case 1, benchmarks/RESULTS.md): the first search of the inhomogeneous law misses
    # and the homogeneous law led with p = 1.000. Fitted again from the homogeneous best fit,
    # the true law leads.
    import warnings

    import mechid

    truth = {"mean_barrier_height_eV": 0.750396, "barrier_variance_V2": 0.000470353,
             "voltage_coefficient_rho2": 0.178005, "voltage_coefficient_rho3_V": -0.000378005,
             "richardson_constant_A_cm2_K2": 24.4734, "series_resistance_ohm": 178.638,
             "shunt_resistance_ohm": 1.00609e8}
    voltage = np.round(np.linspace(-2.0, 1.0, 31), 6)
    series = simulate_series(INHOMOGENEOUS, truth, [100.2, 173.8, 247.4, 321.0, 394.6],
                             voltage[voltage != 0], DEVICE, noise_relative=0.01,
                             noise_floor_A=1e-13, rng=np.random.default_rng(61204))
    data = {"temperature_K": series.temperature_K, "voltage_V": series.voltage_V,
            "current_A": series.current_A}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = mechid.analyse(data, device=DEVICE, quick=True, workers=1, seed=61204,
                                mechanisms=("schottky_diode", "inhomogeneous_schottky_diode")
                                ).to_dict()
    # Whether the first search misses depends on floating-point rounding (it does with this
    # machine's SIMD kernels, not with NumPy's baseline ones), so the test asks for what must
    # hold either way: no unrepaired miss, and the true law leads. (Interval coverage is a
    # property of many cases, not of one, and is measured in the benchmarks.)
    assert not any("search missed that region" in c for c in result["cautions"])
    assert result["mechanisms"][0]["id"] == "inhomogeneous_schottky_diode"
