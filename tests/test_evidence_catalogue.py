"""Log-evidence of a catalogue mechanism: mechid's pipeline against dynesty nested sampling.

Both estimate Z = int L(theta) pi(theta) d theta for the *same* MechanismTarget (same data,
same likelihood, same normalised priors in the same internal coordinates), so they must agree
within their Monte Carlo errors. mechid: MAP search, pilot Student-t reference, generalised
stepping-stone ladder (Fan et al. 2011, Mol. Biol. Evol. 28:523). dynesty: static nested
sampling (Skilling 2006, Bayesian Anal. 1:833; Speagle 2020, MNRAS 493:3132), whose
``logzerr`` is its own error estimate. The prior transform maps the unit cube onto each
prior: uniform and log-uniform priors are uniform in the internal coordinate (an affine map),
a truncated normal uses the inverse CDF (scipy.stats.truncnorm.ppf).

Model: Mott variable-range hopping (Mott 1969, Phil. Mag. 19:835), two physical parameters
plus the two noise parameters, d = 4; no device-described parameter enters, so nothing is
held fixed or Gaussian here (the truncated-normal branch of the transform is tested apart).

The comparison is marked slow: dynesty's per-call overhead makes even a 24-point, 150-live-point
run take 30-50 s on two shared cores (measured), past the budget of the default suite.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from scipy import stats

from mechid.analysis import AnalysisSettings
from mechid.catalogue import get_mechanism
from mechid.device import device_from_values
from mechid.errors import ConvergenceWarning
from mechid.inference.fit import fit_mechanism
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import Prior, mechanism_priors
from mechid.inference.settings import LadderSettings, SearchSettings
from mechid.simulate import simulate_series

dynesty = pytest.importorskip("dynesty")

MOTT_TRUTH = {"characteristic_temperature_K": 2.0e6, "prefactor_S": 1.0e-2}
DEVICE = device_from_values(thickness_nm=100.0, area_cm2=1e-4)


def mott_target(temperatures: list[float], magnitudes: list[float], seed: int) -> MechanismTarget:
    """Mott VRH data on ``temperatures x (+-magnitudes)`` with 2 % noise, as a fit target."""
    mechanism = get_mechanism("mott_vrh")
    voltages = np.concatenate([-np.asarray(magnitudes)[::-1], magnitudes])
    sim = simulate_series(mechanism, MOTT_TRUTH, temperatures, voltages, DEVICE,
                          noise_relative=0.02, noise_floor_A=1e-15, rng=np.random.default_rng(seed))
    priors = mechanism_priors(mechanism, DEVICE, sim.current_A)
    return MechanismTarget(mechanism, sim.voltage_V, sim.temperature_K, sim.current_A, DEVICE, priors)


def prior_transform(priors: tuple[Prior, ...]):
    """Unit cube -> internal coordinates of the free priors (dynesty's ``prior_transform``)."""
    maps = []
    for prior in priors:
        lo, hi = prior.internal_bounds()
        if prior.kind in ("uniform", "log_uniform"):
            maps.append(lambda u, lo=lo, hi=hi: lo + u * (hi - lo))
        elif prior.kind == "truncated_normal":
            a, b = (lo - prior.mean) / prior.sd, (hi - prior.mean) / prior.sd
            dist = stats.truncnorm(a, b, loc=prior.mean, scale=prior.sd)
            maps.append(dist.ppf)
        else:
            raise ValueError(f"{prior.name} is fixed and not sampled")

    def transform(u: np.ndarray) -> np.ndarray:
        return np.array([f(x) for f, x in zip(maps, u, strict=True)])

    return transform


def dynesty_log_evidence(target: MechanismTarget, n_live: int, seed: int) -> tuple[float, float]:
    """Static nested sampling of ``target``: (log Z, logzerr)."""

    def log_likelihood(x: np.ndarray) -> float:
        value = float(target.log_likelihood(x[None, :])[0])
        return value if math.isfinite(value) else -1e300

    # Random-walk proposals within multi-ellipsoid bounds: robust for the curved, strongly
    # correlated posterior of (T0, prefactor) and the one-sided noise-floor posterior.
    sampler = dynesty.NestedSampler(log_likelihood, prior_transform(target.free), target.ndim,
                                    nlive=n_live, bound="multi", sample="rwalk",
                                    rstate=np.random.default_rng(seed))
    sampler.run_nested(dlogz=0.01, print_progress=False)
    results = sampler.results
    return float(results.logz[-1]), float(results.logzerr[-1])


def pipeline_log_evidence(target: MechanismTarget, ladder: LadderSettings,
                          seed: int) -> tuple[float, float]:
    """mechid's fit of the same data: (log Z, its Monte Carlo error)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ConvergenceWarning)
        fit = fit_mechanism(target.mechanism, target.voltage_V, target.temperature_K,
                            target.current_A, DEVICE, ladder, np.random.default_rng(seed),
                            search=SearchSettings(n_polish=2))
    assert fit.target.ndim == target.ndim
    return fit.evidence.log_evidence, fit.evidence.log_evidence_err


def assert_agree(mechid: tuple[float, float], nested: tuple[float, float], limit: float) -> None:
    """|difference| < 3 combined errors and < ``limit`` nats."""
    (z_mechid, err_mechid), (z_nested, err_nested) = mechid, nested
    delta = z_mechid - z_nested
    combined = math.sqrt(err_mechid**2 + err_nested**2)
    assert abs(delta) < 3 * combined, (z_mechid, err_mechid, z_nested, err_nested)
    assert abs(delta) < limit, (z_mechid, z_nested)


def test_prior_transform_maps_quantiles_onto_each_prior() -> None:
    # Uniform / log-uniform: affine in the internal coordinate; truncated normal: the median
    # of N(30, 1) truncated symmetrically at +-6 sd is 30 and its 0.8413 quantile is 31
    # (standard normal CDF at 1 is 0.8413, Abramowitz & Stegun 1964, table 26.1).
    priors = (
        Prior("a", "eV", "uniform", 0.5, 2.5),
        Prior("b", "S", "log_uniform", 1e-4, 1e2),
        Prior("c", "nm", "truncated_normal", 24.0, 36.0, mean=30.0, sd=1.0),
    )
    transform = prior_transform(priors)
    assert transform(np.array([0.25, 0.5, 0.5])) == pytest.approx([1.0, -1.0, 30.0])
    assert transform(np.array([1.0, 0.0, stats.norm.cdf(1.0)])) == pytest.approx(
        [2.5, -4.0, 31.0], abs=1e-6)


@pytest.mark.slow
def test_pipeline_evidence_matches_nested_sampling() -> None:
    # 5 temperatures x 6 biases of each polarity = 60 points; d = 4.
    target = mott_target([20.0, 45.0, 100.0, 150.0, 300.0],
                         [0.01, 0.02, 0.04, 0.08, 0.14, 0.2], seed=3)
    assert target.ndim == 4 and target.n_points == 60
    assert_agree(pipeline_log_evidence(target, AnalysisSettings().ladder(), seed=4),
                 dynesty_log_evidence(target, n_live=500, seed=6), limit=0.5)
