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
