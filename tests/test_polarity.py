"""Electrode-resolved hypotheses (mechid.catalogue.polarity): oddness broken exactly as declared."""

from __future__ import annotations

import numpy as np
import pytest

from mechid.catalogue import get_mechanism
from mechid.catalogue.base import Parameter
from mechid.catalogue.checks import QuantityInRange, ZeroFieldBarrier
from mechid.catalogue.emission import POOLE_FRENKEL, SCHOTTKY_EMISSION
from mechid.catalogue.polarity import (
    FOWLER_NORDHEIM_TWO_BARRIERS,
    SCHOTTKY_EMISSION_TWO_BARRIERS,
    electrode_resolved,
    evaluate_on_points,
    side_parameter_name,
)
from mechid.catalogue.tunnelling import FOWLER_NORDHEIM
from mechid.catalogue.validity import validity_violations
from mechid.device import Device

DEVICE = Device(area_cm2=1e-4)
PAIRS = [(SCHOTTKY_EMISSION, SCHOTTKY_EMISSION_TWO_BARRIERS),
         (FOWLER_NORDHEIM, FOWLER_NORDHEIM_TWO_BARRIERS)]
PAIR_IDS = [resolved.id for _, resolved in PAIRS]
POS, NEG = "barrier_height_positive_bias_eV", "barrier_height_negative_bias_eV"


def _bias(base):
    """Biases of both signs spanning the base mechanism's typical window (and zero)."""
    magnitudes = np.geomspace(0.05, 3.0, 9) if base is SCHOTTKY_EMISSION else np.linspace(
        3.5, 12.0, 9)
    return np.concatenate([-magnitudes[::-1], [0.0], magnitudes])


def _draws(mechanism, m, seed):
    """``m`` prior draws of every parameter, shape (m, 1) (uniform in the declared box)."""
    rng = np.random.default_rng(seed)
    out = {}
    for p in mechanism.parameters:
        if p.log_scale or p.sample_in_log:
            out[p.name] = 10 ** rng.uniform(np.log10(p.lower), np.log10(p.upper), (m, 1))
        else:
            out[p.name] = rng.uniform(p.lower, p.upper, (m, 1))
    return out


def test_names_insert_the_side_before_the_unit_suffix():
    barrier = SCHOTTKY_EMISSION.parameter("barrier_height_eV")
    assert side_parameter_name(barrier, "positive_bias") == POS
    assert side_parameter_name(barrier, "negative_bias") == NEG
    eps = SCHOTTKY_EMISSION.parameter("dielectric_constant")
    assert side_parameter_name(eps, "negative_bias") == "dielectric_constant_negative_bias"
    prefactor = POOLE_FRENKEL.parameter("prefactor_S_per_cm")
    assert side_parameter_name(prefactor, "positive_bias") == "prefactor_positive_bias_S_per_cm"
    odd = Parameter("height_eV", "nm", "h", "a name without its unit", 0.1, 2.0, 1.0)
    with pytest.raises(ValueError, match="unit suffix"):
        side_parameter_name(odd, "positive_bias")


@pytest.mark.parametrize(("base", "resolved"), PAIRS, ids=PAIR_IDS)
def test_declaration_splits_only_the_barrier(base, resolved):
    assert not resolved.is_odd and base.is_odd
    shared = [n for n in base.parameter_names if n != "barrier_height_eV"]
    assert resolved.parameter_names == (POS, NEG, *shared)
    for name in (POS, NEG):
        side, original = resolved.parameter(name), base.parameter("barrier_height_eV")
        assert (side.lower, side.upper, side.typical, side.unit, side.sample_in_log) == (
            original.lower, original.upper, original.typical, original.unit,
            original.sample_in_log)
        assert "injects at" in side.description
    assert resolved.plots == base.plots
    assert len(resolved.validity) == 2 * len(base.validity)


def test_estimates_of_the_barrier_go_to_both_sides_and_checks_are_remapped_or_dropped():
    schottky = {e.parameter: e for e in SCHOTTKY_EMISSION_TWO_BARRIERS.estimates}
    base = next(e for e in SCHOTTKY_EMISSION.estimates if e.parameter == "barrier_height_eV")
    for name in (POS, NEG):
        assert (schottky[name].plot, schottky[name].key, schottky[name].zero_bias_power) == (
            base.plot, base.key, base.zero_bias_power)
    # ZeroFieldBarrier reads one barrier from plots of both polarities: dropped.
    assert not any(isinstance(c, ZeroFieldBarrier) for c in SCHOTTKY_EMISSION_TWO_BARRIERS.checks)
    assert SCHOTTKY_EMISSION_TWO_BARRIERS.options["dropped_checks"] == ("ZeroFieldBarrier",)
    assert len(SCHOTTKY_EMISSION_TWO_BARRIERS.checks) == len(SCHOTTKY_EMISSION.checks) - 1
    # The FN barrier range check stays, no longer standing for a declared parameter.
    (in_range,) = [c for c in FOWLER_NORDHEIM_TWO_BARRIERS.checks if isinstance(c, QuantityInRange)]
    assert in_range.parameter is None and in_range.low == 0.5 and in_range.high == 5.0
    assert FOWLER_NORDHEIM_TWO_BARRIERS.options["dropped_checks"] == ()


@pytest.mark.parametrize(("base", "resolved"), PAIRS, ids=PAIR_IDS)
def test_equal_barriers_give_the_base_mechanism(base, resolved):
    draws = _draws(base, 16, seed=3)
    split = {k: v for k, v in draws.items() if k != "barrier_height_eV"}
    split.update({POS: draws["barrier_height_eV"], NEG: draws["barrier_height_eV"]})
    v = _bias(base)
    t = np.linspace(77.0, 400.0, v.size)
    expected = base.current(v, t, draws, DEVICE)
    got = resolved.current(v, t, split, DEVICE)
    assert np.isfinite(expected).sum() > 50  # the comparison covers valid points
    # The same formula evaluated on a subset of columns: NumPy's SIMD exp/log may differ by an
    # ulp between array lengths, amplified by exponents up to ~100 (DEVELOPERS.md): rtol 1e-12.
    np.testing.assert_allclose(got, expected, rtol=1e-12, atol=0.0)
    assert np.array_equal(np.isnan(got), np.isnan(expected))  # same refusals


@pytest.mark.parametrize(("base", "resolved"), PAIRS, ids=PAIR_IDS)
def test_each_side_uses_its_own_barrier(base, resolved):
    params = base.typical_parameters()
    v = _bias(base)
    low, high = dict(params), dict(params)
    low["barrier_height_eV"] *= 0.9
    resolved_params = {k: val for k, val in params.items() if k != "barrier_height_eV"}
    resolved_params.update({POS: low["barrier_height_eV"], NEG: high["barrier_height_eV"]})
    got = resolved.current(v, 300.0, resolved_params, DEVICE)
    positive, negative = v > 0, v < 0
    np.testing.assert_allclose(got[positive], base.current(v[positive], 300.0, low, DEVICE),
                               rtol=1e-12)
    np.testing.assert_allclose(got[negative], base.current(v[negative], 300.0, high, DEVICE),
                               rtol=1e-12)
    assert got[v == 0] == 0.0
    # Oddness broken: the lower barrier at positive bias carries more current there.
    finite = np.isfinite(got[positive]) & np.isfinite(got[negative][::-1])
    assert finite.any()
    assert np.all(got[positive][finite] > -got[negative][::-1][finite])


def test_validity_is_enforced_per_side_with_that_sides_barrier():
    # Schottky: the image-force lowering must leave a barrier (Sze & Ng 2007). A 0.1 eV
    # barrier at positive bias is removed at 3 V through 20 nm (lowering 0.16 eV at eps_r 4),
    # the 1.0 eV barrier at negative bias is not.
    params = {POS: 0.1, NEG: 1.0, "dielectric_constant": 4.0, "richardson_constant_ratio": 0.5,
              "thickness_nm": 20.0}
    current = SCHOTTKY_EMISSION_TWO_BARRIERS.current(np.array([-3.0, 3.0]), 300.0, params, DEVICE)
    assert np.isfinite(current[0]) and np.isnan(current[1])
    bare = SCHOTTKY_EMISSION_TWO_BARRIERS.current(np.array([-3.0, 3.0]), 300.0, params, DEVICE,
                                                  enforce_validity=False)
    assert np.all(np.isfinite(bare))
    draws = {k: np.array([v]) for k, v in params.items()}
    (violation,) = validity_violations(SCHOTTKY_EMISSION_TWO_BARRIERS, [-3.0, 3.0], [300.0, 300.0],
                                       draws, DEVICE)
    assert violation.condition_id == "barrier_not_removed_positive_bias"
    assert violation.at_voltage_V == 3.0 and violation.fraction_of_points == 0.5
    assert "V > 0" in violation.requirement
    # FN needs eV >= phi (triangular barrier): at 4 V a 3 eV barrier qualifies, a 4.5 eV one
    # does not; each side is judged by its own barrier.
    fn = {POS: 4.5, NEG: 3.0, "thickness_nm": 8.0, "effective_mass_ratio": 0.5}
    current = FOWLER_NORDHEIM_TWO_BARRIERS.current(np.array([-4.0, 4.0]), 77.0, fn, DEVICE)
    assert np.isfinite(current[0]) and np.isnan(current[1])


def test_zero_bias_is_zero_and_inside_the_domain():
    # The FN condition eV/phi >= 1 fails at V = 0 for the base; a signed formula's zero-bias
    # point belongs to no side, so the current there is the exact 0.
    params = FOWLER_NORDHEIM_TWO_BARRIERS.typical_parameters()
    assert FOWLER_NORDHEIM_TWO_BARRIERS.current(0.0, 300.0, params, DEVICE) == 0.0


def test_general_broadcast_falls_back_correctly():
    # A temperature x bias grid (data not 1-D) and per-point parameters take the fallback path.
    base, resolved = SCHOTTKY_EMISSION, SCHOTTKY_EMISSION_TWO_BARRIERS
    params = base.typical_parameters()
    split = {k: v for k, v in params.items() if k != "barrier_height_eV"}
    split.update({POS: params["barrier_height_eV"], NEG: params["barrier_height_eV"]})
    v = np.array([-1.0, -0.2, 0.0, 0.3, 2.0])
    t = np.array([[100.0], [300.0]])
    grid = resolved.current(v, t, split, DEVICE)
    assert grid.shape == (2, 5)
    np.testing.assert_allclose(grid, base.current(v, t, params, DEVICE), rtol=1e-12, atol=0.0)
    per_point = dict(split, **{POS: np.full(5, 0.8), NEG: np.full(5, 0.8)})
    np.testing.assert_allclose(resolved.current(v, 300.0, per_point, DEVICE),
                               base.current(v, 300.0, params, DEVICE), rtol=1e-12, atol=0.0)


def test_evaluate_on_points_touches_only_the_selected_points():
    calls = []

    def formula(v, t, device, *, a):
        calls.append(np.broadcast_shapes(np.shape(v), np.shape(a)))
        return a * v

    v = np.array([-2.0, -1.0, 0.0, 1.0, 2.0])
    a = np.array([[1.0], [10.0], [100.0]])
    out = evaluate_on_points(formula, v, 300.0, DEVICE, {"a": a}, v > 0, -7.0)
    np.testing.assert_array_equal(out, [[-7, -7, -7, 1, 2], [-7, -7, -7, 10, 20],
                                        [-7, -7, -7, 100, 200]])
    assert calls == [(3, 2)]  # one call, on the two positive points only (no 2x cost)


def test_refuses_a_signed_base_or_an_unknown_parameter():
    with pytest.raises(ValueError, match="cannot split"):
        electrode_resolved(SCHOTTKY_EMISSION, ("work_function_eV",), id="x", name="x",
                           source_note="x")
    with pytest.raises(ValueError, match="odd"):
        electrode_resolved(SCHOTTKY_EMISSION_TWO_BARRIERS, (POS,), id="x", name="x",
                           source_note="x")


def test_registered_and_fitted_like_any_mechanism():
    from mechid.inference.priors import mechanism_priors  # noqa: PLC0415 (only here)

    mechanism = get_mechanism("fowler_nordheim_two_barriers")
    priors = mechanism_priors(mechanism, Device(area_cm2=1e-4), np.array([1e-9, 2e-9]))
    assert [p.name for p in priors][:2] == [POS, NEG]


def test_declared_data_needs():
    # A barrier per electrode: pointless without both polarities, and skipped by the screening
    # when the polarities agree (mechid.screening.applicability).
    for resolved in (SCHOTTKY_EMISSION_TWO_BARRIERS, FOWLER_NORDHEIM_TWO_BARRIERS):
        assert set(resolved.needs) == {"both_polarities", "polarities_differ"}
