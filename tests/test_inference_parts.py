"""Priors, likelihood, ranking and adequacy checks, on a toy mechanism with a known answer."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import integrate, stats

from mechid.catalogue.base import Mechanism, Parameter
from mechid.device import Device, Measured
from mechid.inference.adequacy import check_adequacy, count_runs, model_free_relative_noise
from mechid.inference.compare import kass_raftery_wording, rank_mechanisms
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.predictive import posterior_predictive
from mechid.inference.priors import Prior, mechanism_priors, noise_priors, parameter_prior
from mechid.inference.settings import SearchSettings
from mechid.inference.start import find_map


def _ohmic(v, t, device, conductance_S, thickness_nm):
    return conductance_S * v * (1.0 + 0.0 * thickness_nm)


def _quadratic(v, t, device, conductance_S, thickness_nm):
    return conductance_S * v**2 * (1.0 + 0.0 * thickness_nm)


def _toy(formula=_ohmic, name="toy"):
    return Mechanism(
        id=name, family="hopping", name="toy ohmic", formula="G V", source="test",
        parameters=(
            Parameter("conductance_S", "S", "G", "conductance", 1e-9, 1e-3, 1e-6, log_scale=True),
            Parameter("thickness_nm", "nm", "d", "thickness", 1.0, 100.0, 10.0,
                      device_prior="thickness_nm"),
        ),
        magnitude=formula,
    )


@pytest.mark.parametrize(
    "prior",
    [
        Prior("a", "eV", "uniform", 0.1, 5.0),
        Prior("b", "S", "log_uniform", 1e-9, 1e-3),
        Prior("c", "nm", "truncated_normal", 4.0, 8.0, mean=5.0, sd=1.0),
        Prior("d", "nm", "truncated_normal", 4.0, 8.0, mean=5.0, sd=1.0, log_coordinate=True),
        Prior("e", "eV", "uniform", 0.1, 5.0, log_coordinate=True),
    ],
)
def test_prior_density_is_normalised(prior):
    # The evidence is only meaningful for a normalised prior (Xie et al. 2011; any text).
    lo, hi = prior.internal_bounds()
    total, _ = integrate.quad(lambda x: np.exp(prior.log_density(np.array([x]))[0]), lo, hi)
    assert total == pytest.approx(1.0, rel=1e-8)
    draws = prior.sample(np.random.default_rng(1), 20000)
    assert np.all((draws >= lo) & (draws <= hi))


def test_log_coordinate_keeps_the_prior_distribution():
    # Same prior, sampled in log10: the draws' physical distribution must be the truncated normal.
    prior = Prior("d", "nm", "truncated_normal", 4.0, 8.0, mean=5.0, sd=1.0, log_coordinate=True)
    physical = prior.to_physical(prior.sample(np.random.default_rng(3), 20000))
    reference = stats.truncnorm(-1.0, 3.0, loc=5.0, scale=1.0)
    assert stats.kstest(physical, reference.cdf).pvalue > 0.01


def test_truncated_normal_prior_matches_scipy():
    prior = Prior("c", "nm", "truncated_normal", 4.0, 8.0, mean=5.0, sd=1.0)
    x = np.linspace(4.1, 7.9, 7)
    reference = stats.truncnorm.logpdf(x, -1.0, 3.0, loc=5.0, scale=1.0)
    np.testing.assert_allclose(prior.log_density(x), reference, rtol=1e-12)


def test_device_values_become_priors():
    p = _toy().parameter("thickness_nm")
    assert parameter_prior(p, Device()).kind == "uniform"
    fixed = parameter_prior(p, Device(thickness_nm=Measured(6.0)))
    assert fixed.is_fixed and fixed.value == 6.0
    gaussian = parameter_prior(p, Device(thickness_nm=Measured(6.0, 0.3)))
    assert gaussian.kind == "truncated_normal" and gaussian.mean == 6.0 and gaussian.sd == 0.3
    assert "device description" in gaussian.describe()


def test_noise_priors_cover_the_data():
    rel, floor = noise_priors(np.array([1e-12, -3e-9, 2e-6]))
    assert rel.kind == floor.kind == "log_uniform"
    assert floor.lower == pytest.approx(1e-15) and floor.upper == pytest.approx(2e-6)


def _toy_target(noise_rel=0.05, n_per=15, seed=3, formula=_ohmic, data_formula=None):
    rng = np.random.default_rng(seed)
    v = np.tile(np.r_[-np.geomspace(0.05, 1.0, n_per)[::-1], np.geomspace(0.05, 1.0, n_per)], 2)
    t = np.repeat([100.0, 300.0], 2 * n_per)
    data_formula = data_formula or formula
    true = 2e-6 * np.sign(v) * data_formula(np.abs(v), t, None, 1.0, 1.0)
    i = true + noise_rel * np.abs(true) * rng.standard_normal(v.size)
    mech = _toy(formula)
    device = Device(thickness_nm=Measured(10.0), area_cm2=1e-4)
    priors = mechanism_priors(mech, device, i)
    return MechanismTarget(mech, v, t, i, device, priors)


def test_likelihood_matches_scipy_normal_and_is_vectorised():
    target = _toy_target()
    assert target.names == ("conductance_S", "noise_relative", "noise_floor_A")
    theta = np.array([[np.log10(2e-6), np.log10(0.05), np.log10(1e-9)],
                      [np.log10(3e-6), np.log10(0.1), np.log10(1e-8)]])
    batch = target.log_likelihood(theta)
    for row, value in zip(theta, batch, strict=True):
        g, s, f = 10 ** row
        mean = g * target.voltage_V
        sd = np.sqrt((s * mean) ** 2 + f**2)
        reference = stats.norm.logpdf(target.current_A, mean, sd).sum()
        assert value == pytest.approx(reference, rel=1e-12)
        # one row alone vs inside a batch: other array lengths can take other SIMD paths in
        # exp/log (ulp-level per term), summed over the points -> rel 1e-12, not bit equality
        assert target.log_likelihood(row[None, :])[0] == pytest.approx(value, rel=1e-12)
    outside = theta[:1].copy()
    outside[0, 0] = 5.0
    assert target.log_likelihood(outside)[0] == -np.inf
    assert target.log_posterior(outside)[0] == -np.inf


def test_ranking_probabilities_and_kass_raftery():
    ranking = rank_mechanisms({"a": -10.0, "b": -7.0, "c": -20.0}, {"a": 0.1, "b": 0.1, "c": 0.1})
    assert ranking.ids == ("b", "a", "c")
    expected = np.exp([-7.0, -10.0, -20.0]) / np.exp([-7.0, -10.0, -20.0]).sum()
    np.testing.assert_allclose(ranking.probability, expected, rtol=1e-12)
    assert ranking.ln_bayes_factor_best_vs_runner_up == pytest.approx(3.0)
    assert ranking.resolved
    odds = rank_mechanisms({"a": 0.0, "b": 0.0}, {"a": 0.0, "b": 0.0}, prior_odds={"a": 3.0})
    assert odds.probability[0] == pytest.approx(0.75)
    # Kass & Raftery (1995) section 3.2: 2 ln B = 0-2 bare mention, 2-6 positive, 6-10 strong,
    # > 10 very strong; physics-references sec. 12 gives 2 ln B = 7.2452 as "strong".
    assert kass_raftery_wording(0.5) == "not worth more than a bare mention"
    assert kass_raftery_wording(2.0) == "positive"
    assert kass_raftery_wording(7.2452 / 2) == "strong"
    assert kass_raftery_wording(6.0) == "very strong"


def test_runs_count():
    residuals = np.array([[1, 1, -1, -1, 1, -1, 1, 1]], dtype=float)
    group = np.array([0, 0, 0, 0, 1, 1, 1, 1])
    # group 0: ++-- -> 2 runs; group 1: +-++ -> 3 runs
    assert count_runs(residuals, group)[0] == 5


def test_model_free_noise_estimate_recovers_scatter():
    rng = np.random.default_rng(0)
    v = np.tile(np.linspace(0.1, 2.0, 200), 3)
    t = np.repeat([100.0, 200.0, 300.0], 200)
    i = np.exp(3 * v) * (1 + 0.03 * rng.standard_normal(v.size))
    assert model_free_relative_noise(v, t, i) == pytest.approx(0.03, rel=0.15)


def test_adequacy_flags_a_wrong_curve_shape_and_passes_the_right_one():
    rng = np.random.default_rng(7)
    good = _toy_target(noise_rel=0.02, n_per=25)
    bad = _toy_target(noise_rel=0.02, n_per=25, data_formula=_quadratic)  # data ~V^2, model ~V
    for target, expected in ((good, True), (bad, False)):
        best = find_map(target, rng, search=SearchSettings(n_polish=2))
        draws = best + 1e-3 * rng.standard_normal((400, target.ndim))
        check = check_adequacy(target, draws, rng)
        assert check.adequate is expected, check.reasons


def test_estimates_are_printed_to_the_digits_their_interval_supports():
    from mechid.formatting import format_estimate

    assert format_estimate(1.2001289, (1.19951, 1.20073), (1.1990, 1.2012), "eV") == (
        "1.2001 eV (68 %: 1.1995 to 1.2007; 95 %: 1.1990 to 1.2012)")
    assert format_estimate(2.0e6, (1.9e6, 2.1e6), (1.8e6, 2.2e6), "K").startswith("2.00e+06 K")
    assert format_estimate(5.7e-15, (1.2e-15, 4.2e-14), (1e-15, 5e-14), "A").startswith("5.7e-15 A")


def test_ranking_orders_by_evidence_even_when_probabilities_underflow():
    ranking = rank_mechanisms({"a": 0.0, "b": -3000.0, "c": -900.0, "d": -2000.0},
                              {k: 0.05 for k in "abcd"})
    assert ranking.ids == ("a", "c", "d", "b")
    assert ranking.ln_bayes_factor_best_vs_runner_up == pytest.approx(900.0)


def test_reference_mixture_density_matches_scipy_and_is_normalised():
    from mechid.inference.reference import StudentReference

    rng = np.random.default_rng(0)
    a = rng.standard_normal((2, 2))
    cov = a @ a.T + np.eye(2)
    means = np.array([[0.0, 1.0], [2.0, -1.0]])
    ref = StudentReference(means, np.array([cov, 0.5 * cov]), np.array([0.3, 0.7]),
                           -np.full(2, 4.0), np.full(2, 4.0), 10.0, rng)
    x = rng.uniform(-4, 4, (6, 2))
    expected = np.log(0.3 * stats.multivariate_t(means[0], cov, df=10).pdf(x)
                      + 0.7 * stats.multivariate_t(means[1], 0.5 * cov, df=10).pdf(x)) - ref.log_mass
    np.testing.assert_allclose(ref.log_density(x), expected, rtol=1e-10)
    total, _ = integrate.dblquad(lambda y, x_: np.exp(ref.log_density(np.array([[x_, y]]))[0]),
                                 -4, 4, -4, 4, epsabs=1e-6)
    assert total == pytest.approx(1.0, abs=3 * ref.mass_err + 1e-4)


def test_posterior_predictive_view_of_a_point_posterior():
    # One posterior point repeated: the median model must be G V (written here), the band
    # model + sigma z with sigma = hypot(s I, floor) and z standard normal, so its quantile
    # offsets averaged over the grid must be scipy's 2.5 % and 97.5 % points.
    target = _toy_target(noise_rel=0.05)
    theta = np.array([np.log10(2e-6), np.log10(0.05), np.log10(1e-9)])
    assert target.names == ("conductance_S", "noise_relative", "noise_floor_A")
    view = posterior_predictive(target, np.tile(theta, (400, 1)))
    model = 2e-6 * np.abs(view.grid_voltage_V)  # folded: sign(V) I
    np.testing.assert_allclose(view.median_A, model, rtol=1e-12)
    sd = np.hypot(0.05 * np.abs(model), 1e-9)
    # np.quantile (linear interpolation) of n draws sits near order statistic (n-1)p + 1, whose
    # mean is about Phi^-1((k - 0.375)/(n + 0.25)) (Blom 1958): -1.897 for p = 0.025, n = 150.
    n = view.n_predictive_draws
    blom = stats.norm.ppf(((n - 1) * 0.975 + 1 - 0.375) / (n + 0.25))
    assert n == 150
    assert np.mean((view.upper_A - model) / sd) == pytest.approx(blom, abs=0.05)
    assert np.mean((view.lower_A - model) / sd) == pytest.approx(-blom, abs=0.05)
    # Residuals at the point, the fitted data, and the corner axes (noise left out).
    at_points = 2e-6 * target.voltage_V
    expected = (target.current_A - at_points) / np.hypot(0.05 * np.abs(at_points), 1e-9)
    np.testing.assert_allclose(view.residuals, expected, rtol=1e-10)
    np.testing.assert_array_equal(view.current_A, target.current_A)
    assert [(a.name, a.log10) for a in view.parameters] == [("conductance_S", True)]
    np.testing.assert_array_equal(view.parameters[0].values, np.full(400, theta[0]))
    # The grid covers every (temperature, polarity) branch of the data.
    for t in (100.0, 300.0):
        on = view.grid_temperature_K == t
        assert view.grid_voltage_V[on].min() == pytest.approx(-1.0)
        assert view.grid_voltage_V[on].max() == pytest.approx(1.0)
