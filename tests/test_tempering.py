"""Tests of the lockstep tempered ladder (mechid.inference.tempering).

Reference values are analytic: Gaussian moments, mixture weights, power-law ladders.
"""

from __future__ import annotations

import numpy as np
import pytest

from mechid.inference.settings import LadderSettings
from mechid.inference.target import FunctionTarget, Target, evaluate_target
from mechid.inference.tempering import (
    DifferentialEvolutionProposal,
    SnookerProposal,
    StretchProposal,
    TemperedLadder,
    _pick_distinct,
    run_tempered_ladder,
    start_pool_size,
    temperature_ladder,
)

FAST = LadderSettings(n_temperatures=6, beta_power=4.0, n_burn=100, n_production=300,
                      max_production=3000)


def gaussian_target(mean: np.ndarray, cov: np.ndarray, box: float = 20.0) -> FunctionTarget:
    """Gaussian likelihood times a uniform box prior [-box, box]^d (normalised)."""
    ndim = len(mean)
    inverse = np.linalg.inv(cov)
    log_volume = ndim * np.log(2 * box)

    def log_prior(theta: np.ndarray) -> np.ndarray:
        inside = np.all(np.abs(theta) <= box, axis=1)
        return np.where(inside, -log_volume, -np.inf)

    def log_likelihood(theta: np.ndarray) -> np.ndarray:
        delta = theta - mean
        return -0.5 * np.einsum("ij,jk,ik->i", delta, inverse, delta)

    return FunctionTarget(
        tuple(f"x{i}" for i in range(ndim)), log_prior, log_likelihood,
        lambda rng, n: rng.uniform(-box, box, (n, ndim)),
    )


def mixture_target(weight: float = 0.8) -> FunctionTarget:
    """1-D mixture likelihood weight*N(3, 0.3^2) + (1-weight)*N(-3, 0.5^2), U[-10, 10] prior."""
    def log_normal(x: np.ndarray, mean: float, sd: float) -> np.ndarray:
        return -0.5 * ((x - mean) / sd) ** 2 - np.log(sd * np.sqrt(2 * np.pi))

    def log_likelihood(theta: np.ndarray) -> np.ndarray:
        x = theta[:, 0]
        return np.logaddexp(np.log(weight) + log_normal(x, 3.0, 0.3),
                            np.log1p(-weight) + log_normal(x, -3.0, 0.5))

    return FunctionTarget(
        ("x",), lambda t: np.where(np.abs(t[:, 0]) <= 10, -np.log(20.0), -np.inf),
        log_likelihood, lambda rng, n: rng.uniform(-10, 10, (n, 1)),
    )


def test_function_target_satisfies_protocol_and_evaluation_skips_outside_support():
    target = gaussian_target(np.zeros(2), np.eye(2), box=1.0)
    assert isinstance(target, Target)
    theta = np.array([[0.0, 0.0], [2.0, 0.0], [np.nan, 0.0]])
    log_prior, log_like, n_evaluated = evaluate_target(target, theta)
    assert n_evaluated == 1
    assert log_prior[0] == pytest.approx(-np.log(4.0))
    assert np.all(np.isneginf(log_prior[1:])) and np.all(np.isneginf(log_like[1:]))


def test_power_ladder_ends_exactly_at_prior_and_posterior():
    betas = temperature_ladder(12, 4.0)
    assert betas[0] == 0.0 and betas[-1] == 1.0
    assert np.all(np.diff(betas) > 0)
    # np.power (SIMD on some processors) vs Python's libm pow: a few ulp
    assert betas[6] == pytest.approx((6 / 11) ** 4, rel=1e-13)


@pytest.mark.parametrize(
    ("changes", "message"),
    [({"n_walkers": 7}, "even"), ({"n_temperatures": 1}, "at least 2"),
     ({"n_walkers": 4}, "max\\(8"), ({"thin": 0}, "thin")],
)
def test_invalid_settings_are_rejected_with_the_reason(changes, message):
    settings = LadderSettings(**changes)
    with pytest.raises(ValueError, match=message):
        settings.validate(3)


def test_default_walkers_scale_with_dimension_and_stay_even():
    assert LadderSettings().walkers_for(3) == 32
    assert LadderSettings().walkers_for(9) == 36
    assert LadderSettings(n_walkers=40).walkers_for(2) == 40


def test_distinct_complement_picks_are_distinct_and_cover_all_walkers():
    rng = np.random.default_rng(3)
    first, second, third = _pick_distinct(rng, 5, (4000,), 3)
    assert np.all(first != second) and np.all(first != third) and np.all(second != third)
    for picks in (first, second, third):
        counts = np.bincount(picks, minlength=5) / 4000
        assert np.all(np.abs(counts - 0.2) < 0.03)


@pytest.mark.parametrize(
    "proposal", [StretchProposal(), DifferentialEvolutionProposal(), SnookerProposal()]
)
def test_each_proposal_leaves_a_correlated_gaussian_invariant(proposal):
    # Metropolis-Hastings with the proposal's Hastings factor must sample N(0, C) exactly;
    # the variances of a stationary chain match diag(C) (here 1, 9, 0.25) within ~3 sd.
    cov = np.array([[1.0, 1.2, 0.0], [1.2, 9.0, 0.3], [0.0, 0.3, 0.25]])
    inverse = np.linalg.inv(cov)
    rng = np.random.default_rng(11)
    walkers, half = 32, 16

    def log_density(x: np.ndarray) -> np.ndarray:
        return -0.5 * np.einsum("...i,ij,...j->...", x, inverse, x)

    x = rng.multivariate_normal(np.zeros(3), cov, size=(1, walkers))
    current = log_density(x)
    kept = []
    for step in range(3000):
        order = rng.permutation(walkers)
        for part in range(2):
            moving, fixed = order[part * half:(part + 1) * half], order[(1 - part) * half:(2 - part) * half]
            proposal_x, log_factor = proposal.propose(x[:, moving], x[:, fixed], rng)
            new = log_density(proposal_x)
            accept = np.log(rng.random((1, half))) < log_factor + new - current[:, moving]
            x[0, moving[accept[0]]] = proposal_x[0, accept[0]]
            current[0, moving[accept[0]]] = new[0, accept[0]]
        if step >= 500:
            kept.append(x[0].copy())
    variance = np.concatenate(kept).var(axis=0)
    np.testing.assert_allclose(variance, np.diag(cov), rtol=0.06)


def test_run_shapes_counts_and_progress():
    target = gaussian_target(np.array([1.0, -1.0]), np.diag([0.5, 2.0]))
    calls = []
    run = run_tempered_ladder(target, FAST, np.random.default_rng(0),
                              progress=lambda done, total: calls.append((done, total)))
    walkers = FAST.walkers_for(2)
    assert run.log_likelihood.shape == (6, 300, walkers)
    assert run.cold_chain.shape == (300, walkers, 2)
    assert run.cold_log_prior.shape == run.cold_log_likelihood.shape == (300, walkers)
    # bit-exact on purpose: the cold chain's values are the last rung's row, not a recomputation
    np.testing.assert_array_equal(run.cold_log_likelihood, run.log_likelihood[-1])
    assert run.n_burn == 100 and run.n_steps == 300
    # 2 stacked calls per step; every rung's half-ensemble evaluated in each
    # one call for the resampled start pool, then 2 stacked calls per step
    assert run.n_likelihood_batches == 1 + 2 * 400
    assert run.n_likelihood_evaluations <= start_pool_size(6, walkers) + 6 * walkers * 400
    assert [c[0] for c in calls] == list(range(1, 401)) and calls[-1] == (400, 400)
    assert np.all((run.swap_acceptance > 0) & (run.swap_acceptance <= 1))
    assert run.move_acceptance[0] == 1.0  # the prior rung takes fresh prior draws
    assert np.all(np.isfinite(run.cold_log_likelihood))


def test_cold_rung_samples_the_posterior():
    # Gaussian likelihood in a wide box: the posterior is N(mean, cov) to 1e-30
    mean, cov = np.array([1.0, -2.0]), np.array([[0.5, 0.4], [0.4, 2.0]])
    run = run_tempered_ladder(gaussian_target(mean, cov), FAST, np.random.default_rng(1))
    draws = run.cold_chain.reshape(-1, 2)
    np.testing.assert_allclose(draws.mean(axis=0), mean, atol=0.08)
    np.testing.assert_allclose(np.cov(draws, rowvar=False), cov, atol=0.12)


def test_same_seed_same_chains_and_other_seed_differs():
    target = gaussian_target(np.zeros(3), np.eye(3))
    first = run_tempered_ladder(target, FAST, np.random.default_rng(42))
    again = run_tempered_ladder(target, FAST, np.random.default_rng(42))
    other = run_tempered_ladder(target, FAST, np.random.default_rng(43))
    # bit-exact on purpose: same machine, same seed -> same numbers (mechid's determinism promise)
    np.testing.assert_array_equal(first.log_likelihood, again.log_likelihood)
    np.testing.assert_array_equal(first.cold_chain, again.cold_chain)
    assert not np.array_equal(first.cold_chain, other.cold_chain)


def test_start_points_seed_the_hot_to_cold_rungs_and_bad_starts_are_redrawn():
    target = gaussian_target(np.array([5.0, 5.0]), 1e-4 * np.eye(2))
    start = np.array([[5.0, 5.0], [50.0, 50.0]])  # the second point is outside the prior
    ladder = TemperedLadder(target, FAST, np.random.default_rng(2), start=start)
    assert np.all(np.isfinite(ladder.log_prior)) and np.all(np.isfinite(ladder.log_like[1:]))
    cold = ladder.positions[-1]
    # the scan finds the 0.01 posterior width; cold walkers start close to the mode
    assert np.median(np.abs(cold - 5.0)) < 0.1
    # the single-point form of ``start`` (a MAP vector) is accepted too
    TemperedLadder(target, FAST, np.random.default_rng(2), start=np.array([5.0, 5.0]))
    with pytest.raises(ValueError, match="columns"):
        TemperedLadder(target, FAST, np.random.default_rng(2), start=np.zeros((1, 3)))


def test_swaps_recover_the_weights_of_separated_modes():
    # Modes 6 apart with weights 0.8 / 0.2 (exact posterior weights, the prior being flat
    # over both): swaps move walkers between modes.
    settings = LadderSettings(n_temperatures=8, beta_power=4.0, n_burn=200, n_production=600,
                              max_production=3000)
    run = run_tempered_ladder(mixture_target(0.8), settings, np.random.default_rng(5))
    heavy = np.mean(run.cold_chain[..., 0] > 0)
    assert heavy == pytest.approx(0.8, abs=0.06)


def test_rungs_start_from_prior_draws_resampled_towards_their_power_posterior():
    # Uniform prior on [-20, 20], likelihood N(3, 0.5^2):
    # the cold rung must start near the posterior, the prior rung spread like the prior.
    target = gaussian_target(np.array([3.0]), np.array([[0.25]]))
    ladder = TemperedLadder(target, FAST, np.random.default_rng(3))
    cold, prior_rung = ladder.positions[-1, :, 0], ladder.positions[0, :, 0]
    assert abs(np.mean(cold) - 3.0) < 0.5
    assert np.std(prior_rung) > 5 * np.std(cold)
    assert ladder.n_batches == 1  # the pool is the only evaluation
