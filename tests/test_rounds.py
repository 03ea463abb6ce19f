"""Fitting mechanisms in rounds, in this process or on worker processes, gives the same numbers."""

import pickle
import warnings

import numpy as np
import pytest

from mechid.catalogue import MECHANISMS, get_mechanism
from mechid.catalogue.base import Mechanism
from mechid.device import Device, device_from_values
from mechid.errors import MechidWarning
from mechid.inference.rounds import FitJob, _SharedInputs, expected_cost, fit_in_rounds
from mechid.inference.settings import QUICK_LADDER, QUICK_SEARCH, LadderSettings, SearchSettings
from mechid.simulate import simulate_series

TINY_LADDER = LadderSettings(n_temperatures=4, beta_power=2.0, n_walkers=16, n_burn=20,
                             n_production=40, max_production=40)
TINY_SEARCH = SearchSettings(n_polish=1, pilot_steps=40, pilot_max_steps=40)


def test_catalogued_mechanisms_pickle_as_their_registry_entry():
    for mechanism in MECHANISMS:
        assert pickle.loads(pickle.dumps(mechanism)) is mechanism


def test_an_uncatalogued_mechanism_still_pickles_by_value():
    base = get_mechanism("mott_vrh")
    custom = Mechanism(id="custom", family=base.family, name="custom", formula="", source="",
                       parameters=base.parameters, magnitude=np.multiply, needs_area=False)
    assert pickle.loads(pickle.dumps(custom)) == custom


@pytest.fixture(scope="module")
def small_series():
    device = device_from_values(thickness_nm=30.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4)
    sim = simulate_series(get_mechanism("poole_frenkel"),
                          {"trap_depth_eV": 1.2, "dielectric_constant": 4.2,
                           "prefactor_S_per_cm": 1.0, "thickness_nm": 30.0},
                          [300.0, 375.0, 450.0], np.geomspace(3.0, 12.0, 12), device,
                          noise_relative=0.02, noise_floor_A=1e-14, rng=np.random.default_rng(1))
    return sim, device


def _jobs(seed: int) -> list[FitJob]:
    ids = ["poole_frenkel", "schottky_emission", "mott_vrh"]
    return [FitJob(i, rng) for i, rng in zip(ids, np.random.default_rng(seed).spawn(3), strict=True)]


def test_worker_processes_give_the_numbers_of_the_in_process_rounds(small_series):
    sim, device = small_series
    results = {}
    labels: dict[int, set[str]] = {}
    for workers in (1, 2):
        seen: set[str] = set()
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # short chains: convergence warnings expected
            fits = fit_in_rounds(_jobs(7), sim.voltage_V, sim.temperature_K, sim.current_A, device,
                                 TINY_LADDER, TINY_SEARCH, workers=workers,
                                 progress=lambda label, done, total, seen=seen: seen.add(label))
        results[workers] = {k: (f.evidence.log_evidence, f.evidence.log_evidence_err,
                                f.draws_internal.sum()) for k, f in fits.items()}
        labels[workers] = seen
    # bit-exact on purpose: same machine and seed, any worker count -> same numbers (promised in
    # the README: each mechanism's arrays are evaluated whole, whatever process runs them)
    assert results[1] == results[2]
    assert set(results[1]) == {"poole_frenkel", "schottky_emission", "mott_vrh"}
    expected = {f"fitting {i}" for i in results[1]}
    assert labels[1] == expected and labels[2] == expected


def test_an_implicit_law_is_expected_to_cost_more_than_an_explicit_one(small_series):
    # Only the order of submission to the workers reads this figure (longest first); the
    # numbers do not depend on it (test above, whose mechanisms it reorders).
    sim, device = small_series
    shared = _SharedInputs(sim.voltage_V, sim.temperature_K, sim.current_A, device,
                           TINY_LADDER, TINY_SEARCH)
    implicit = expected_cost("sclc_single_trap_level_with_leak", shared)
    explicit = expected_cost("ohmic_activated", shared)
    assert 0 < 5 * explicit < implicit  # measured ~50 x apart; timing noise cannot flip it


def test_a_sampler_that_cannot_start_lists_the_mechanism_as_not_fitted(monkeypatch):
    # A pilot ensemble emcee refuses (or a reference outside the prior box) must not stop the
    # analysis: the mechanism is listed as not fitted, with a reason that is not a physics verdict.
    import mechid.inference.rounds as rounds_module
    from mechid.inference.reference import SamplerStartError

    def refuse(*args, **kwargs):
        raise SamplerStartError("the pilot ensemble could not start: test")

    monkeypatch.setattr(rounds_module, "fit_mechanism", refuse)
    job = rounds_module.FitJob("poole_frenkel", np.random.default_rng(0))
    shared = rounds_module._SharedInputs(np.array([1.0, 2.0]), np.array([300.0, 300.0]),
                                         np.array([1e-9, 2e-9]), Device(area_cm2=1e-4),
                                         QUICK_LADDER, QUICK_SEARCH)
    with pytest.warns(MechidWarning, match="sampler could not start"):
        outcome = rounds_module._fit(job, shared, None, None)
    assert outcome.id == "poole_frenkel" and outcome.violations == ()
    assert "says nothing about the physics" in outcome.reason


def test_a_ladder_without_a_finite_evidence_is_not_ranked(monkeypatch, small_series):
    # Seen on a simulated diode: dissimilar-electrode tunnelling's walkers all sat where its
    # validity domain refuses, the ladder's mean log-likelihoods were NaN and the NaN ln Z was
    # ranked (and written as null). Such a fit is listed as not fitted instead.
    from dataclasses import replace

    import mechid.inference.fit as fit_module
    import mechid.inference.rounds as rounds_module

    real = fit_module.estimate_evidence

    def without_evidence(*args, **kwargs):
        run, evidence = real(*args, **kwargs)
        return run, replace(evidence, log_evidence=float("nan"))

    monkeypatch.setattr(fit_module, "estimate_evidence", without_evidence)
    sim, device = small_series
    shared = rounds_module._SharedInputs(sim.voltage_V, sim.temperature_K, sim.current_A, device,
                                         TINY_LADDER, TINY_SEARCH)
    job = rounds_module.FitJob("poole_frenkel", np.random.default_rng(0))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        outcome = rounds_module._fit(job, shared, None, None)
    assert outcome.id == "poole_frenkel" and "no evidence could be estimated" in outcome.reason
