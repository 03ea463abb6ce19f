"""The one noise model against scipy.stats.norm (an independent Gaussian implementation)."""

import numpy as np
from scipy import stats

from mechid.catalogue import get_mechanism
from mechid.device import device_from_values
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.noise import add_noise, noise_sd, noise_variance, summed_log_density
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE, mechanism_priors
from mechid.simulate import simulate_series


def _independent_sd(model: np.ndarray, relative: float, floor: float) -> np.ndarray:
    """sigma = hypot(s_rel * I, floor), written independently of mechid."""
    return np.hypot(relative * np.abs(model), floor)


def test_variance_is_relative_term_plus_floor_in_both_limits():
    model = np.array([-1e-3, -1e-9, 0.0, 1e-12, 1e-6])
    np.testing.assert_allclose(noise_sd(model, 0.05, 1e-12), _independent_sd(model, 0.05, 1e-12),
                               rtol=1e-14)
    # Floor-dominated (I = 0) and relative-dominated (large I) limits, by hand.
    assert noise_variance(0.0, 0.05, 2e-12) == 4e-24
    np.testing.assert_allclose(noise_sd(1.0, 0.05, 1e-15), 0.05, rtol=1e-14)


def test_summed_log_density_equals_scipy_norm_point_by_point():
    rng = np.random.default_rng(11)
    model = rng.lognormal(-20.0, 3.0, size=(4, 25)) * rng.choice([-1.0, 1.0], size=25)
    relative = np.array([[0.01], [0.03], [0.1], [0.5]])
    floor = np.array([[1e-14], [1e-12], [1e-10], [1e-9]])
    observed = model[0] * (1 + 0.05 * rng.standard_normal(25))
    expected = np.array([
        stats.norm.logpdf(observed, loc=model[k], scale=_independent_sd(model[k], relative[k, 0],
                                                                         floor[k, 0])).sum()
        for k in range(4)
    ])
    variance = noise_variance(model, relative, floor)
    got = summed_log_density((observed - model) ** 2, variance, np.ones(25))
    np.testing.assert_allclose(got, expected, rtol=1e-12)


def test_grouped_points_give_the_same_density_as_the_points_one_by_one():
    # Groups of points that share one model value and one variance (the likelihood's
    # (|V|, T) pairs): the grouped sum of squares must give scipy's point-by-point sum.
    rng = np.random.default_rng(12)
    group_model = np.array([1e-9, 3e-8, 2e-7])
    counts = np.array([1.0, 3.0, 2.0])
    point_model = np.repeat(group_model, counts.astype(int))
    observed = point_model * (1 + 0.1 * rng.standard_normal(point_model.size))
    scale = _independent_sd(point_model, 0.08, 1e-10)
    expected = stats.norm.logpdf(observed, loc=point_model, scale=scale).sum()
    group = np.repeat(np.arange(3), counts.astype(int))
    squares = np.bincount(group, (observed - point_model) ** 2)
    got = summed_log_density(squares, noise_variance(group_model, 0.08, 1e-10), counts)
    np.testing.assert_allclose(got, expected, rtol=1e-12)


def test_likelihood_of_a_target_equals_scipy_norm_with_the_noise_written_independently():
    device = device_from_values(thickness_nm=30.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4)
    mechanism = get_mechanism("poole_frenkel")
    mags = np.geomspace(2.0, 10.0, 12)
    voltage = np.r_[-mags, mags]
    temperature = np.full(voltage.size, 350.0)
    truth = mechanism.typical_parameters()
    clean = mechanism.current(voltage, temperature, truth, device)
    current = clean * (1 + 0.03 * np.random.default_rng(3).standard_normal(voltage.size))
    target = MechanismTarget(mechanism, voltage, temperature, current, device,
                             mechanism_priors(mechanism, device, current))
    theta = target.sample_prior(np.random.default_rng(4), 10)
    values = target.physical_values(theta)
    model = np.sign(voltage) * mechanism.current(
        np.abs(voltage), temperature, {k: values[k] for k in mechanism.parameter_names}, device)
    expected = np.array([
        stats.norm.logpdf(current, loc=model[k],
                          scale=_independent_sd(model[k], values[NOISE_RELATIVE][k, 0],
                                                values[NOISE_FLOOR][k, 0])).sum()
        for k in range(len(theta))
    ])
    # draws outside the formula's validity domain (NaN model current) are refused: -inf
    refused = np.isnan(model).any(axis=1)
    assert refused.sum() < len(theta) // 2
    expected = np.where(refused, -np.inf, expected)
    np.testing.assert_allclose(target.log_likelihood(theta), expected, rtol=1e-10)


def test_drawn_noise_is_normal_with_the_model_sd():
    # Standardised simulated residuals must be N(0, 1) (Kolmogorov-Smirnov against scipy),
    # across a range where the floor and the relative term each dominate.
    mechanism = get_mechanism("poole_frenkel")
    device = device_from_values(thickness_nm=30.0, area_cm2=1e-4)
    voltages = np.geomspace(0.5, 12.0, 400)
    sim = simulate_series(mechanism, mechanism.typical_parameters(), [300.0, 400.0], voltages,
                          device, noise_relative=0.05, noise_floor_A=1e-12,
                          rng=np.random.default_rng(0))
    sd = _independent_sd(sim.noiseless_current_A, 0.05, 1e-12)
    z = (sim.current_A - sim.noiseless_current_A) / sd
    assert stats.kstest(z, stats.norm.cdf).pvalue > 1e-3
    assert abs(np.std(z) - 1.0) < 0.05
    # The same generator state gives the same currents.
    again = add_noise(sim.noiseless_current_A, sd, np.random.default_rng(0))
    np.testing.assert_allclose(again, sim.current_A, rtol=1e-13)
