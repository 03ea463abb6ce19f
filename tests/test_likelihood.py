"""The joint likelihood's vectorised prior against the per-parameter definition."""

import numpy as np

from mechid.catalogue import MECHANISMS
from mechid.device import device_from_values
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors


def test_vectorised_log_prior_equals_the_sum_of_the_per_parameter_densities():
    # Every prior kind at once: device Gaussians (some sampled in log10), log-uniform
    # prefactors and noise parameters, uniform ranges; points inside and outside the support.
    device = device_from_values(thickness_nm=20.0, thickness_sd_nm=2.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4,
                                effective_mass_ratio=0.4, effective_mass_sd=0.05)
    rng = np.random.default_rng(4)
    current = np.geomspace(1e-12, 1e-3, 30)
    for mechanism in MECHANISMS:
        priors = mechanism_priors(mechanism, device, current)
        target = MechanismTarget(mechanism, np.linspace(0.1, 3, 30), np.full(30, 300.0), current,
                                 device, priors)
        theta = target.sample_prior(rng, 50)
        theta[:5] += 100.0  # outside
        expected = sum(p.log_density(theta[:, j]) for j, p in enumerate(target.free))
        np.testing.assert_allclose(target.log_prior(theta), expected, rtol=1e-12, atol=1e-12)


def test_pair_statistics_likelihood_equals_the_point_by_point_gaussian_sum():
    # Both polarities, repeated points, a zero-bias point and a temperature with one polarity:
    # the sufficient-statistics form must equal sum_i log N(I_i | model_i, sigma_i^2).
    device = device_from_values(thickness_nm=30.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4)
    rng = np.random.default_rng(2)
    mags = np.geomspace(2.0, 10.0, 15)
    voltage = np.r_[-mags, mags, mags[:5], 0.0, mags]
    temperature = np.r_[np.full(30, 350.0), np.full(5, 350.0), 350.0, np.full(15, 400.0)]
    for mechanism in MECHANISMS:
        priors = mechanism_priors(mechanism, device, np.geomspace(1e-12, 1e-6, voltage.size))
        truth = mechanism.typical_parameters()
        current = mechanism.current(voltage, temperature,
                                    {k: np.array([[v]]) for k, v in truth.items()}, device)[0]
        current = current * (1 + 0.05 * rng.standard_normal(voltage.size))
        current = current + 1e-13 * rng.standard_normal(voltage.size)
        target = MechanismTarget(mechanism, voltage, temperature, current, device, priors)
        theta = target.sample_prior(rng, 20)
        model = target.model_current(theta)
        sd = target.noise_sd(theta, model)
        with np.errstate(all="ignore"):
            direct = np.sum(-0.5 * ((current - model) / sd) ** 2 - np.log(sd)
                            - 0.5 * np.log(2 * np.pi), axis=1)
        direct = np.where(np.isfinite(direct), direct, -np.inf)
        if mechanism.window_condition is not None:  # a composite's prior restriction
            physical = target.physical_values(theta)
            seen = mechanism.window_condition(
                np.abs(voltage), temperature, device,
                **{name: physical[name] for name in mechanism.parameter_names})
            direct = np.where(seen, direct, -np.inf)
        fast = target.log_likelihood(theta)
        finite = np.isfinite(direct)
        np.testing.assert_array_equal(np.isfinite(fast), finite)
        np.testing.assert_allclose(fast[finite], direct[finite], rtol=1e-9, atol=1e-6)
