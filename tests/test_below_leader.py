"""A mechanism far below an evidence already estimated is not sampled, with the bound recorded."""

import warnings

import numpy as np
import pytest

from mechid.analysis import _below_leader_sentence
from mechid.catalogue import get_mechanism
from mechid.device import device_from_values
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors
from mechid.inference.rounds import FitJob, fit_candidates_in_rounds
from mechid.inference.settings import LadderSettings, SearchSettings
from mechid.inference.start import find_modes
from mechid.results import BelowLeaderMechanism, to_plain_json
from mechid.simulate import simulate_series

TINY_LADDER = LadderSettings(n_temperatures=4, beta_power=2.0, n_walkers=16, n_burn=20,
                             n_production=40, max_production=40)
TINY_SEARCH = SearchSettings(n_polish=1, pilot_steps=40, pilot_max_steps=40)
IDS = ("poole_frenkel", "schottky_emission", "mott_vrh")


TRUTH = {"trap_depth_eV": 1.1, "dielectric_constant": 4.0, "prefactor_S_per_cm": 2.0,
         "thickness_nm": 25.0}


@pytest.fixture(scope="module")
def series():
    """Poole-Frenkel data, 4 temperatures x 10 biases (one polarity)."""
    device = device_from_values(thickness_nm=25.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4)
    sim = simulate_series(get_mechanism("poole_frenkel"), TRUTH, np.linspace(250.0, 400.0, 4),
                          np.geomspace(2.0, 10.0, 10), device, noise_relative=0.02,
                          noise_floor_A=1e-14, rng=np.random.default_rng(2))
    return sim, device


def _fit(series, margin, ladder=TINY_LADDER):
    sim, device = series
    jobs = [FitJob(i, rng) for i, rng in zip(IDS, np.random.default_rng(3).spawn(3), strict=True)]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # short chains: convergence warnings expected
        return fit_candidates_in_rounds(jobs, sim.voltage_V, sim.temperature_K, sim.current_A,
                                        device, ladder, TINY_SEARCH, workers=1,
                                        below_leader_margin=margin)


@pytest.fixture(scope="module")
def outcomes(series):
    return {margin: _fit(series, margin) for margin in (None, 50.0)}


def test_the_evidence_never_exceeds_the_largest_likelihood(series, outcomes):
    # The rule rests on Z = E_prior[L] <= max L (an average never exceeds the maximum; common
    # practice): for each fitted mechanism the best ln L over its own posterior draws and the
    # mode search's start already lies above its ln Z.
    for fit in outcomes[None].fits.values():
        best = np.max(fit.target.log_likelihood(np.vstack([fit.draws_internal,
                                                           fit.map_internal])))
        assert fit.evidence.log_evidence <= best


def test_a_mechanism_far_below_the_first_round_is_not_sampled_and_says_why(outcomes):
    every, skipping = outcomes[None], outcomes[50.0]
    assert set(every.fits) == set(IDS) and not every.below_leader
    # Poole-Frenkel data: the first round (poole_frenkel, schottky_emission) sets the leader;
    # Mott hopping comes second and its best fit lies thousands of nats below.
    leader = max(every.fits.values(), key=lambda f: f.evidence.log_evidence)
    assert leader.result.id == "poole_frenkel"
    assert set(skipping.below_leader) == {"mott_vrh"}
    record = skipping.below_leader["mott_vrh"]
    assert record.leader_id == "poole_frenkel" and record.margin_nats == 50.0
    # bit-exact on purpose: the leader's evidence is handed over unchanged
    assert record.leader_log_evidence == leader.evidence.log_evidence
    assert record.best_log_likelihood < record.leader_log_evidence - record.margin_nats
    assert f"{record.best_log_likelihood:.1f}" in record.reason
    assert "ln Z <= max ln L" in record.reason
    gap = record.leader_log_evidence - record.best_log_likelihood
    assert f"missed the maximum by more than {gap - 50.0:.0f} nats" in record.reason
    assert record.reason.endswith("(leader so far: poole_frenkel)")


def test_skipping_leaves_the_numbers_of_the_mechanisms_fitted_unchanged(outcomes):
    every, skipping = outcomes[None], outcomes[50.0]
    for mechanism_id, fit in skipping.fits.items():
        # bit-exact on purpose: each mechanism keeps its own random stream, same machine
        assert fit.evidence.log_evidence == every.fits[mechanism_id].evidence.log_evidence
        assert np.array_equal(fit.draws_internal, every.fits[mechanism_id].draws_internal)


def test_a_margin_no_gap_exceeds_skips_nothing(series, outcomes):
    wide = _fit(series, 1e9)
    assert not wide.below_leader and set(wide.fits) == set(IDS)
    for mechanism_id, fit in wide.fits.items():
        # bit-exact on purpose: same streams, same machine
        assert fit.evidence.log_evidence == outcomes[None].fits[mechanism_id].evidence.log_evidence


def test_with_extensions_the_rounds_of_two_decide(series):
    # A ladder that may extend runs in rounds of two: the leader after round one is known to
    # round two whether or not mechanisms are skipped.
    ladder = LadderSettings(n_temperatures=4, beta_power=2.0, n_walkers=16, n_burn=20,
                            n_production=40, max_production=80, extension_steps=40)
    outcome = _fit(series, 50.0, ladder)
    assert set(outcome.below_leader) == {"mott_vrh"}
    assert set(outcome.fits) == {"poole_frenkel", "schottky_emission"}


def test_the_record_and_the_sentence_name_the_bound():
    record = BelowLeaderMechanism(id="mott_vrh", family="hopping", name="Mott", reason="why",
                                  best_log_likelihood=10.0, leader_id="poole_frenkel",
                                  leader_log_evidence=2000.0, margin_nats=1000.0)
    entry = to_plain_json(record)
    assert entry["best_log_likelihood"] == 10.0 and entry["margin_nats"] == 1000.0
    sentence = _below_leader_sentence((record,))
    assert "over 1000 nats below the evidence of poole_frenkel" in sentence
    assert "--fit-all" in sentence and sentence.endswith("mott_vrh.")
    assert _below_leader_sentence(()) == ""


def test_the_bound_is_the_best_likelihood_at_the_modes_found(series, outcomes):
    # The record's best_log_likelihood is ln L (the evidence's bound), not the log posterior,
    # at the best of the modes the mechanism's own search finds (its stream replayed here).
    sim, device = series
    mechanism = get_mechanism("mott_vrh")
    target = MechanismTarget(mechanism, sim.voltage_V, sim.temperature_K, sim.current_A, device,
                             mechanism_priors(mechanism, device, sim.current_A))
    rng = np.random.default_rng(3).spawn(3)[2]
    points = np.array([mode.point for mode in find_modes(target, rng, None, search=TINY_SEARCH)])
    record = outcomes[50.0].below_leader["mott_vrh"]
    # bit-exact on purpose: the same evaluation on the same machine
    assert record.best_log_likelihood == np.max(target.log_likelihood(points))
    assert record.best_log_likelihood != np.max(target.log_posterior(points))


def test_console_and_html_list_them_with_the_reason():
    from rich.console import Console

    from mechid.report.console import render_console
    from mechid.report.html import _left_out_html

    entry = {"id": "mott_vrh", "name": "Mott <3D>", "reason": "mott_vrh was not sampled: gap"}
    console = Console(record=True, width=200)
    render_console({"below_leader": [entry]}, console)
    text = console.export_text()
    assert "Not sampled: best fit far below the leader's evidence" in text
    assert "mott_vrh was not sampled: gap" in text
    html = _left_out_html([entry], "<b>heading</b>")
    assert "<b>Mott &lt;3D&gt;</b> (mott_vrh): mott_vrh was not sampled: gap" in html
    assert _left_out_html([], "<b>heading</b>") == ""
