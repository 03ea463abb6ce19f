"""Mechanisms whose current is not odd in V, and the polarity-asymmetry diagnostic.

The toy signed mechanism is an exponential rectifier written only here,
I = G0 V exp(V/V0) (not odd: |I(+V)|/|I(-V)| = exp(2|V|/V0)); the physics of real rectifying
contacts is tested with the catalogue's own diode hypotheses.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest

from mechid.analysis import cautions, polarity_assumption
from mechid.catalogue import get_mechanism
from mechid.catalogue.base import FloatArray, Mechanism, Parameter
from mechid.catalogue.validity import ValidityCondition, validity_violations
from mechid.data import IVSeries
from mechid.device import Device, Measured
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors
from mechid.screening.asymmetry import ASYMMETRY_FACTOR, polarity_asymmetry
from mechid.screening.biases import prepare_series
from mechid.simulate import simulate_series

DEVICE = Device(area_cm2=1e-4, thickness_nm=Measured(20.0))


def _rectifier(voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
               prefactor_S: FloatArray, voltage_scale_V: FloatArray) -> FloatArray:
    return prefactor_S * voltage_V * np.exp(voltage_V / voltage_scale_V)


TOY = Mechanism(
    id="toy_rectifier", family="emission", name="toy exponential rectifier",
    formula="I = G0 V exp(V/V0)", source="written for this test",
    parameters=(
        Parameter("prefactor_S", "S", "G0", "conductance", 1e-9, 1e-1, 1e-4, log_scale=True),
        Parameter("voltage_scale_V", "V", "V0", "scale", 0.05, 5.0, 0.5),
    ),
    signed_current=_rectifier, needs_area=False,
    validity=(ValidityCondition(
        id="forward_limit", quantity="V/V0 (forward argument)", limit=20.0, bound="upper",
        reason="toy limit on the forward side only",
        evaluate=lambda v, t, device, prefactor_S, voltage_scale_V: v / voltage_scale_V),),
)


def test_a_mechanism_declares_exactly_one_formula():
    with pytest.raises(ValueError, match="exactly one"):
        Mechanism(id="x", family="emission", name="x", formula="", source="",
                  parameters=TOY.parameters)
    with pytest.raises(ValueError, match="exactly one"):
        Mechanism(id="x", family="emission", name="x", formula="", source="",
                  parameters=TOY.parameters, magnitude=_rectifier, signed_current=_rectifier)
    assert not TOY.is_odd and get_mechanism("schottky_emission").is_odd


def test_signed_formula_sees_the_sign_and_its_validity_too():
    params = {"prefactor_S": 1e-3, "voltage_scale_V": 0.5}
    v = np.array([-2.0, -1.0, 0.0, 1.0, 2.0, 12.0])
    current = TOY.current(v, 300.0, params, Device())
    expected = 1e-3 * v * np.exp(v / 0.5)  # hand-written, outside the declaration
    np.testing.assert_allclose(current[:5], expected[:5], rtol=1e-14)
    assert np.isnan(current[5])  # 12 V / 0.5 V = 24 > 20: refused on the forward side only
    # -12 V gives -24 <= 20: inside (the condition reads the signed bias)
    assert np.isfinite(TOY.current(-12.0, 300.0, params, Device()))
    found = validity_violations(TOY, v, np.full(v.size, 300.0),
                                {k: np.array([val]) for k, val in params.items()}, Device())
    assert [f.condition_id for f in found] == ["forward_limit"]
    assert found[0].at_voltage_V == 12.0


def test_signed_likelihood_equals_the_point_by_point_gaussian_sum():
    rng = np.random.default_rng(11)
    mags = np.geomspace(0.1, 2.0, 12)
    voltage = np.r_[-mags, mags, mags[:4], 0.0]
    temperature = np.full(voltage.size, 300.0)
    truth = {"prefactor_S": 1e-4, "voltage_scale_V": 0.5}
    clean = TOY.current(voltage, temperature, truth, Device())
    current = clean * (1 + 0.03 * rng.standard_normal(voltage.size)) + 1e-12 * rng.standard_normal(
        voltage.size)
    priors = mechanism_priors(TOY, Device(), np.geomspace(1e-12, 1e-6, voltage.size))
    target = MechanismTarget(TOY, voltage, temperature, current, Device(), priors)
    theta = target.sample_prior(rng, 25)
    model = target.model_current(theta)
    values = target.physical_values(theta)
    direct_model = TOY.current(voltage, temperature,
                               {k: values[k] for k in TOY.parameter_names}, Device())
    np.testing.assert_allclose(model, direct_model, rtol=1e-12)
    sd = target.noise_sd(theta, model)
    with np.errstate(all="ignore"):
        direct = np.sum(-0.5 * ((current - model) / sd) ** 2 - np.log(sd)
                        - 0.5 * np.log(2 * np.pi), axis=1)
    finite = np.isfinite(direct)
    fast = target.log_likelihood(theta)
    np.testing.assert_array_equal(np.isfinite(fast), finite)
    np.testing.assert_allclose(fast[finite], direct[finite], rtol=1e-9, atol=1e-6)


def _schottky_series(positive_scale: float, seed: int) -> SimpleNamespace:
    mechanism = get_mechanism("schottky_emission")
    v = np.concatenate([-np.geomspace(0.3, 6.0, 20)[::-1], np.geomspace(0.3, 6.0, 20)])
    sim = simulate_series(mechanism, mechanism.typical_parameters(), [250.0, 300.0, 350.0],
                          list(v), DEVICE, noise_relative=0.02, noise_floor_A=1e-13,
                          rng=np.random.default_rng(seed))
    current = np.where(sim.voltage_V > 0, positive_scale, 1.0) * sim.current_A
    return SimpleNamespace(temperature_K=sim.temperature_K, voltage_V=sim.voltage_V,
                           current_A=current)


@pytest.mark.parametrize("scale, expected", [(1.0, False), (1.2, False), (3.8, True),
                                             (1 / 3.8, True)])
def test_asymmetry_diagnostic_separates_a_3_8_fold_ratio_from_noise(scale, expected):
    # 3.8x: the ratio of the 1.6 / 1.9 eV junction; 1.2x stays under the 1.5x factor.
    result = polarity_asymmetry(prepare_series(_schottky_series(scale, seed=3), 4))
    assert result.asymmetric is expected
    if expected:
        assert result.largest_ratio == pytest.approx(scale, rel=0.1)
        assert max(result.largest_ratio, 1 / result.largest_ratio) >= ASYMMETRY_FACTOR
    assert len(result.per_temperature) == 3
    assert result.to_dict()["criterion"] == result.criterion


def test_asymmetry_not_judged_with_one_polarity():
    series = _schottky_series(1.0, seed=4)
    keep = series.voltage_V > 0
    one = SimpleNamespace(temperature_K=series.temperature_K[keep],
                          voltage_V=series.voltage_V[keep], current_A=series.current_A[keep])
    result = polarity_asymmetry(prepare_series(one, 4))
    assert result.asymmetric is None and "one bias polarity" in result.reason
    assert result.to_dict()["largest_ratio"] is None


def test_caution_when_asymmetric_data_meet_a_symmetric_leader():
    raw = _schottky_series(3.8, seed=5)
    series = IVSeries(temperature_K=raw.temperature_K, voltage_V=raw.voltage_V,
                      current_A=raw.current_A)
    asymmetry = polarity_asymmetry(prepare_series(raw, 4))
    verdict = SimpleNamespace(id="schottky_emission", resolved=True, fit_adequate=True,
                              runner_up=None)
    symmetric = cautions(series, DEVICE, [], verdict, asymmetry, leader_symmetric=True)
    signed = cautions(series, DEVICE, [], verdict, asymmetry, leader_symmetric=False)
    flagged = [c for c in symmetric if "bias polarities carry different currents" in c]
    assert len(flagged) == 1 and "schottky_emission" in flagged[0]
    assert not any("bias polarities carry different currents" in c for c in signed)


def test_polarity_assumption_names_the_law_and_the_fitted_polarities():
    odd = polarity_assumption(get_mechanism("poole_frenkel"), "both")
    assert odd.startswith("symmetric in bias") and odd.endswith("both polarities fitted jointly")
    assert polarity_assumption(TOY, "positive").startswith("not symmetric in bias")
    assert polarity_assumption(TOY, "positive").endswith("positive bias only fitted")


def test_each_polarity_alone_against_both_together_in_one_run(tmp_path):
    # 3.8x more current at positive bias than a single Schottky barrier gives: the two sides
    # alone must beat one shared parameter set by evidence, in the same run as the joint fit.
    from mechid.analysis import AnalysisSettings, run_analysis_full
    from mechid.report.text import polarity_comparison_lines
    from mechid.results import to_plain_json

    raw = _schottky_series(3.8, seed=6)
    series = IVSeries(temperature_K=raw.temperature_K, voltage_V=raw.voltage_V,
                      current_A=raw.current_A)
    device = Device(area_cm2=1e-4, thickness_nm=Measured(20.0, 1.0),
                    optical_dielectric_constant=Measured(4.0, 0.4))
    settings = AnalysisSettings(mechanisms=("schottky_emission",), quick=True, workers=1,
                                polarity="each")
    result = run_analysis_full(series, device, settings, seed=12).result
    (entry,) = result.polarity_comparison
    assert entry.mechanism_id == "schottky_emission"
    assert entry.ln_bayes_factor_separate_vs_shared > 10 and entry.preferred == "separate"
    total = entry.ln_evidence_positive + entry.ln_evidence_negative - entry.ln_evidence_shared
    assert entry.ln_bayes_factor_separate_vs_shared == pytest.approx(total, rel=1e-12)
    assert "each alone" in result.verdict.polarity_assumption
    data = to_plain_json(result)
    (line,) = polarity_comparison_lines(data)
    assert "separate vs shared" in line and "positive bias:" in line


def test_declared_needs_skip_a_mechanism_with_the_reason_unless_asked_for():
    from dataclasses import replace as dc_replace

    from mechid.analysis import AnalysisSettings, _skipped_mechanisms
    from mechid.screening import linearise
    from mechid.screening.applicability import unmet_need

    needy = dc_replace(TOY, id="toy_needy", needs=("both_polarities", "polarities_differ"))
    symmetric = _schottky_series(1.0, seed=7)
    asymmetric = _schottky_series(3.8, seed=7)
    positive = SimpleNamespace(**{k: getattr(symmetric, k)[symmetric.voltage_V > 0]
                                  for k in ("temperature_K", "voltage_V", "current_A")})
    lin_sym, lin_asym, lin_pos = (linearise(s, DEVICE, mechanisms=[])
                                  for s in (symmetric, asymmetric, positive))
    assert "finds them equal" in unmet_need(needy, lin_sym)
    assert unmet_need(needy, lin_asym) is None
    assert "only one bias polarity" in unmet_need(needy, lin_pos)
    assert unmet_need(TOY, lin_sym) is None  # declares no needs
    (entry,) = _skipped_mechanisms([needy, TOY], lin_sym, AnalysisSettings(), Device())
    assert entry.id == "toy_needy" and "finds them equal" in entry.reason
    assert _skipped_mechanisms([needy], lin_sym, AnalysisSettings(mechanisms=("toy_needy",)),
                               Device()) == ()
    (only_positive,) = _skipped_mechanisms([needy], lin_asym, AnalysisSettings(polarity="positive"),
                                         Device())
    assert "only positive bias was fitted" in only_positive.reason
