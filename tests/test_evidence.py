"""Tests of the evidence estimators (mechid.inference.evidence) against closed forms.

Reference values:
* linear-Gaussian model y = X w + e, e ~ N(0, Sigma), w ~ N(m0, S0):
  log Z = log N(y; X m0, Sigma + X S0 X^T) (Bishop 2006, PRML eq. 3.86, from memory), and the
  power posterior N(m_b, S_b) with S_b^-1 = S0^-1 + b X^T Sigma^-1 X (same algebra with
  Sigma / b), giving E_b[log L] and V_b[log L] in closed form (evidence-methods.md, T1);
* uniform box prior: log Z = log int L dw + log P_box - log V (Gaussian integral, T2);
* Gaussian shells (Feroz & Hobson 2008, MNRAS 384:449, sect. 6.2): log Z = -1.7456 (T4);
* Kass & Raftery (1995, JASA 90:773, sect. 3.2) thresholds 2 ln B = 2, 6, 10.
Tolerances follow evidence-methods.md, sect. 5.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass

import numpy as np
import pytest
from scipy import integrate, stats

from mechid.errors import ConvergenceWarning
from mechid.inference.compare import kass_raftery_wording
from mechid.inference.evidence import (
    EvidenceResult,
    batch_means_error,
    bridge_sampling,
    corrected_trapezoid,
    estimate_evidence,
    stepping_stone,
)
from mechid.inference.settings import LadderSettings
from mechid.inference.target import FunctionTarget
from mechid.inference.tempering import temperature_ladder
from mechid.results import to_plain_json

PT_FAST = LadderSettings(n_temperatures=12, beta_power=4.0, n_burn=200, n_production=600, max_production=600,
                         target_sigma=10.0, tau_multiple=0.0)


# --------------------------------------------------------------------------------------
# Linear-Gaussian model with every quantity in closed form
# --------------------------------------------------------------------------------------


@dataclass
class LinearGaussian:
    """y = X w + e with Gaussian prior and noise; all evidence quantities analytic."""

    design: np.ndarray
    y: np.ndarray
    sigma: float
    m0: np.ndarray
    s0: np.ndarray

    @classmethod
    def vandermonde(cls, ndim=4, n=50, sigma=0.5, prior_sd=2.0, seed=1, order=None):
        rng = np.random.default_rng(seed)
        x = np.linspace(-1.0, 1.0, n)
        truth_order = ndim if order is None else order
        truth = rng.normal(0.0, 1.0, truth_order)
        y = np.vander(x, truth_order, increasing=True) @ truth + rng.normal(0.0, sigma, n)
        return cls(np.vander(x, ndim, increasing=True), y, sigma, np.zeros(ndim),
                   prior_sd**2 * np.eye(ndim))

    @property
    def ndim(self) -> int:
        return self.design.shape[1]

    @property
    def constant(self) -> float:
        n = len(self.y)
        return -0.5 * n * math.log(2 * math.pi) - n * math.log(self.sigma)

    def log_likelihood(self, theta: np.ndarray) -> np.ndarray:
        residual = self.y[None, :] - theta @ self.design.T
        return self.constant - 0.5 * np.sum(residual * residual, axis=1) / self.sigma**2

    def target(self, shift: float = 0.0) -> FunctionTarget:
        prior = stats.multivariate_normal(self.m0, self.s0)
        root = np.linalg.cholesky(self.s0)
        return FunctionTarget(
            tuple(f"w{i}" for i in range(self.ndim)),
            lambda t: np.atleast_1d(prior.logpdf(t)),
            lambda t: self.log_likelihood(t) + shift,
            lambda rng, n: self.m0 + rng.standard_normal((n, self.ndim)) @ root.T,
        )

    def log_evidence(self) -> float:
        covariance = self.sigma**2 * np.eye(len(self.y)) + self.design @ self.s0 @ self.design.T
        return float(stats.multivariate_normal(self.design @ self.m0, covariance).logpdf(self.y))

    def log_evidence_precision_form(self) -> float:
        a = self.design.T @ self.design / self.sigma**2
        s0_inv = np.linalg.inv(self.s0)
        sn = np.linalg.inv(s0_inv + a)
        mn = sn @ (s0_inv @ self.m0 + self.design.T @ self.y / self.sigma**2)
        quad = (self.y @ self.y / self.sigma**2 + self.m0 @ s0_inv @ self.m0
                - mn @ np.linalg.inv(sn) @ mn)
        return (self.constant + 0.5 * (np.linalg.slogdet(sn)[1] - np.linalg.slogdet(self.s0)[1])
                - 0.5 * quad)

    def power_posterior(self, beta: float) -> tuple[np.ndarray, np.ndarray]:
        a = self.design.T @ self.design / self.sigma**2
        s0_inv = np.linalg.inv(self.s0)
        cov = np.linalg.inv(s0_inv + beta * a)
        mean = cov @ (s0_inv @ self.m0 + beta * self.design.T @ self.y / self.sigma**2)
        return mean, cov

    def moments(self, beta: float) -> tuple[float, float]:
        """Exact E_beta[log L] and V_beta[log L]."""
        a = self.design.T @ self.design / self.sigma**2
        mean, cov = self.power_posterior(beta)
        residual = self.y - self.design @ mean
        gradient = self.design.T @ residual / self.sigma**2
        e = self.constant - 0.5 * (residual @ residual / self.sigma**2 + np.trace(a @ cov))
        v = gradient @ cov @ gradient + 0.5 * np.trace(a @ cov @ a @ cov)
        return float(e), float(v)

    def log_evidence_at(self, beta: float) -> float:
        """log int L^beta pi: L^beta is a Gaussian with variance sigma^2/beta times a constant."""
        n = len(self.y)
        scaled = self.sigma**2 / beta
        covariance = scaled * np.eye(n) + self.design @ self.s0 @ self.design.T
        log_norm = beta * self.constant + 0.5 * n * math.log(2 * math.pi * scaled)
        return log_norm + float(
            stats.multivariate_normal(self.design @ self.m0, covariance).logpdf(self.y))


@pytest.fixture(scope="module")
def model() -> LinearGaussian:
    return LinearGaussian.vandermonde()


@pytest.fixture(scope="module")
def pt_run(model):
    """T1b: one fast PT run on the d=4 model, shared by several tests."""
    return estimate_evidence(model.target(), PT_FAST, np.random.default_rng(2024))


# --------------------------------------------------------------------------------------
# Closed forms and the deterministic TI layer (T1, T1a)
# --------------------------------------------------------------------------------------


def test_closed_form_evidence_in_two_forms_agrees(model):
    assert model.log_evidence() == pytest.approx(model.log_evidence_precision_form(), abs=1e-10)


@pytest.mark.parametrize("beta", [0.05, 0.3, 0.8])
def test_closed_form_moments_are_derivatives_of_the_power_evidence(model, beta):
    # d log Z_b / d b = E_b and d E_b / d b = V_b (central differences)
    h = 1e-5
    e, v = model.moments(beta)
    slope = (model.log_evidence_at(beta + h) - model.log_evidence_at(beta - h)) / (2 * h)
    assert slope == pytest.approx(e, rel=1e-6)
    e_plus, _ = model.moments(beta + h)
    e_minus, _ = model.moments(beta - h)
    assert (e_plus - e_minus) / (2 * h) == pytest.approx(v, rel=1e-5)


def _exact_ti(model: LinearGaussian, betas: np.ndarray):
    moments = np.array([model.moments(b) for b in betas])
    return corrected_trapezoid(betas, moments[:, 0], moments[:, 1])


def test_corrected_trapezoid_on_exact_moments(model):
    exact = model.log_evidence()
    k16 = _exact_ti(model, temperature_ladder(16, 5.0))
    k24 = _exact_ti(model, temperature_ladder(24, 5.0))
    # evidence-methods.md T1a: K=16 beta^5 errors about -0.44 (plain) and +0.03 (corrected)
    assert k16.trapezoid - exact == pytest.approx(-0.44, abs=0.1)
    assert abs(k16.corrected - exact) < 0.05
    assert abs(k24.corrected - exact) < 0.01


def test_riemann_sums_bracket_the_evidence_on_random_ladders(model):
    exact = model.log_evidence()
    rng = np.random.default_rng(7)
    for _ in range(20):
        inner = np.sort(rng.uniform(0, 1, rng.integers(3, 15)))
        ti = _exact_ti(model, np.concatenate([[0.0], inner, [1.0]]))
        assert ti.left <= exact <= ti.right


def test_stepping_stone_on_exact_power_posterior_draws(model):
    # iid draws from each exact power posterior isolate the estimator from the sampler
    rng = np.random.default_rng(3)
    betas = temperature_ladder(12, 4.0)
    chains = []
    for beta in betas:
        mean, cov = model.power_posterior(beta)
        draws = rng.multivariate_normal(mean, cov, size=(400, 16))
        chains.append(model.log_likelihood(draws.reshape(-1, model.ndim)).reshape(400, 16))
    chains = np.stack(chains)
    estimate = stepping_stone(betas, chains)
    sigma, blocks = batch_means_error(lambda b: stepping_stone(betas, b), chains)
    assert len(blocks) == 10
    assert abs(estimate - model.log_evidence()) < max(0.05, 4 * sigma)
    assert 0.005 < sigma < 0.1


def test_batch_means_error_of_an_iid_mean_matches_sigma_over_root_n():
    rng = np.random.default_rng(5)
    chains = rng.normal(0.0, 2.0, size=(1, 4000, 8))
    error, _ = batch_means_error(lambda block: float(block.mean()), chains)
    assert error == pytest.approx(2.0 / math.sqrt(chains.size), rel=0.35)


def test_bridge_sampling_on_exact_posterior_draws(model):
    rng = np.random.default_rng(9)
    mean, cov = model.power_posterior(1.0)
    target = model.target()
    draws = rng.multivariate_normal(mean, cov, size=(200, 8))

    def log_posterior(theta):
        return target.log_prior(theta) + target.log_likelihood(theta), len(theta)

    values = log_posterior(draws.reshape(-1, model.ndim))[0].reshape(200, 8)
    bridge = bridge_sampling(log_posterior, draws, values, rng)
    assert bridge.n_components == 1  # BIC keeps one component for a Gaussian posterior
    assert abs(bridge.log_evidence - model.log_evidence()) < max(0.01, 4 * bridge.error)
    assert bridge.error < 0.01


def test_kass_raftery_grades_in_nats():
    # Kass & Raftery (1995), sect. 3.2: 2 ln B thresholds 2, 6, 10 -> ln B 1, 3, 5
    assert kass_raftery_wording(0.5) == "not worth more than a bare mention"
    assert kass_raftery_wording(1.0) == "positive"
    assert kass_raftery_wording(-2.9) == "positive"
    assert kass_raftery_wording(3.0) == "strong"
    assert kass_raftery_wording(5.0) == "very strong"


# --------------------------------------------------------------------------------------
# Sampling tests (T1b, T2, T3, T4, T7)
# --------------------------------------------------------------------------------------


def test_pt_stepping_stone_ti_and_bridge_match_closed_form(model, pt_run):
    run, result = pt_run
    exact = model.log_evidence()
    assert abs(result.log_evidence - exact) < max(0.15, 4 * result.log_evidence_err)
    assert result.log_evidence_err < 0.12
    assert abs(result.log_evidence_bridge - exact) < 0.05
    assert abs(result.log_evidence_ti - exact) < 0.25  # K=12 beta^4: bias about +0.1
    left, right = result.ti_bracket
    assert left - 3 * result.log_evidence_ti_err <= exact <= right + 3 * result.log_evidence_ti_err
    assert abs(result.log_evidence_laplace - exact) < 0.2  # Gaussian posterior: Laplace exact
    assert result.converged and result.flags == ()
    assert result.n_likelihood_calls >= run.n_likelihood_evaluations > 12 * 32 * 800 * 0.9
    np.testing.assert_allclose(result.mean_log_likelihood[-1],
                               model.moments(1.0)[0], atol=0.3)


def test_result_serialises_to_strict_json(pt_run):
    _, result = pt_run
    text = json.dumps(to_plain_json(result), allow_nan=False)
    assert json.loads(text)["log_evidence"] == pytest.approx(result.log_evidence)


SMALL = LadderSettings(n_temperatures=6, beta_power=4.0, n_burn=60, n_production=200, max_production=200,
                      target_sigma=10.0, tau_multiple=0.0)


@pytest.fixture(scope="module")
def small_run(model):
    return estimate_evidence(model.target(), SMALL, np.random.default_rng(77))[1]


def test_same_seed_gives_identical_numbers(model, small_run):
    again = estimate_evidence(model.target(), SMALL, np.random.default_rng(77))[1]
    for key in ("log_evidence", "log_evidence_err", "log_evidence_ti", "log_evidence_bridge",
                "log_evidence_bridge_err", "log_evidence_laplace"):
        # bit-exact on purpose: same machine, same seed -> same numbers (mechid's determinism promise)
        assert getattr(small_run, key) == getattr(again, key), key


def test_shifting_log_likelihood_by_a_constant_shifts_every_estimate(model, small_run):
    # For beta > 0 the Metropolis ratios do not change, so the chains are identical
    shift = 123.456
    moved = estimate_evidence(model.target(shift), SMALL, np.random.default_rng(77))[1]
    for key in ("log_evidence", "log_evidence_ti", "log_evidence_bridge", "log_evidence_laplace"):
        assert getattr(moved, key) - getattr(small_run, key) == pytest.approx(shift, abs=1e-6), key
    np.testing.assert_allclose(np.subtract(moved.ti_bracket, small_run.ti_bracket), shift,
                               atol=1e-6)
    assert moved.log_evidence_err == pytest.approx(small_run.log_evidence_err, abs=1e-6)


def box_target(model: LinearGaussian, lower: np.ndarray, upper: np.ndarray,
               dummy: tuple[float, float] | None = None) -> FunctionTarget:
    """The linear-Gaussian likelihood with a normalised uniform box prior (optionally a
    dummy parameter that the likelihood ignores)."""
    lo = np.append(lower, dummy[0]) if dummy else np.asarray(lower, dtype=float)
    hi = np.append(upper, dummy[1]) if dummy else np.asarray(upper, dtype=float)
    log_volume = float(np.sum(np.log(hi - lo)))
    ndim = model.ndim

    def log_prior(theta):
        inside = np.all((theta >= lo) & (theta <= hi), axis=1)
        return np.where(inside, -log_volume, -np.inf)

    return FunctionTarget(
        tuple(f"w{i}" for i in range(len(lo))), log_prior,
        lambda t: model.log_likelihood(t[:, :ndim]),
        lambda rng, n: rng.uniform(lo, hi, size=(n, len(lo))),
    )


def box_log_evidence(model: LinearGaussian, lower, upper) -> float:
    """log int L dw + log P_box - log V for a Gaussian likelihood in w (T2)."""
    x, y, s2 = model.design, model.y, model.sigma**2
    precision = x.T @ x / s2
    w_hat = np.linalg.solve(precision, x.T @ y / s2)
    residual = y - x @ w_hat
    n, d = x.shape
    log_integral = (-0.5 * (n - d) * math.log(2 * math.pi) - 0.5 * n * math.log(s2)
                    - 0.5 * np.linalg.slogdet(precision)[1] - 0.5 * residual @ residual / s2)
    cov = np.linalg.inv(precision)
    p_box = stats.multivariate_normal(w_hat, cov).cdf(
        upper, lower_limit=lower, rng=np.random.default_rng(0))
    return float(log_integral + math.log(p_box) - np.sum(np.log(np.subtract(upper, lower))))


@pytest.fixture(scope="module")
def small_model() -> LinearGaussian:
    return LinearGaussian.vandermonde(ndim=3, n=40, sigma=0.3, seed=4)


def _gls(model: LinearGaussian) -> tuple[np.ndarray, np.ndarray]:
    precision = model.design.T @ model.design / model.sigma**2
    cov = np.linalg.inv(precision)
    return cov @ model.design.T @ model.y / model.sigma**2, np.sqrt(np.diag(cov))


def test_box_prior_cutting_the_posterior(small_model):
    w_hat, sd = _gls(small_model)
    lower, upper = w_hat - 6 * sd, w_hat + 6 * sd
    lower[0] = w_hat[0] + 0.3 * sd[0]  # the mode lies outside: MAP on the boundary
    exact = box_log_evidence(small_model, lower, upper)
    settings = LadderSettings(n_temperatures=12, beta_power=5.0, n_burn=200, n_production=600,
                              max_production=600, target_sigma=10.0, tau_multiple=0.0)
    _, result = estimate_evidence(box_target(small_model, lower, upper), settings,
                                  np.random.default_rng(8))
    assert abs(result.log_evidence - exact) < max(0.15, 4 * result.log_evidence_err)
    assert abs(result.log_evidence_bridge - exact) < max(0.1, 4 * result.log_evidence_bridge_err)
    assert "map_on_boundary" in result.flags


def test_prior_width_and_ignored_parameter_change_log_evidence_as_expected(small_model):
    # Doubling a uniform prior on a well-constrained parameter costs log 2; a parameter the
    # likelihood ignores leaves log Z unchanged (its prior integrates to one).
    w_hat, sd = _gls(small_model)
    lower, upper = w_hat - 8 * sd, w_hat + 8 * sd
    wider_upper = upper.copy()
    wider_upper[1] += upper[1] - lower[1]
    settings = LadderSettings(n_temperatures=10, beta_power=4.0, n_burn=150, n_production=400,
                              max_production=400, target_sigma=10.0, tau_multiple=0.0)
    rng = np.random.default_rng(12)
    _, narrow = estimate_evidence(box_target(small_model, lower, upper), settings, rng)
    _, wide = estimate_evidence(box_target(small_model, lower, wider_upper), settings, rng)
    _, dummy = estimate_evidence(box_target(small_model, lower, upper, dummy=(-1.0, 3.0)),
                                 settings, rng)
    exact = box_log_evidence(small_model, lower, upper)
    assert abs(narrow.log_evidence - exact) < max(0.15, 4 * narrow.log_evidence_err)
    both = math.hypot(narrow.log_evidence_err, wide.log_evidence_err)
    assert wide.log_evidence - narrow.log_evidence == pytest.approx(-math.log(2), abs=4 * both)
    both = math.hypot(narrow.log_evidence_err, dummy.log_evidence_err)
    assert abs(dummy.log_evidence - narrow.log_evidence) < 4 * both


def shells_target() -> FunctionTarget:
    """Two Gaussian shells, r = 2, w = 0.1, centres (+-3.5, 0), prior U[-6, 6]^2."""
    radius, width = 2.0, 0.1
    centres = np.array([[-3.5, 0.0], [3.5, 0.0]])
    log_norm = -0.5 * math.log(2 * math.pi * width**2)

    def log_likelihood(theta):
        dist = np.linalg.norm(theta[:, None, :] - centres[None], axis=2)
        return np.logaddexp.reduce(log_norm - 0.5 * (dist - radius) ** 2 / width**2, axis=1)

    return FunctionTarget(
        ("x", "y"), lambda t: np.where(np.all(np.abs(t) <= 6, axis=1), -math.log(144.0), -np.inf),
        log_likelihood, lambda rng, n: rng.uniform(-6, 6, (n, 2)),
    )


def test_gaussian_shells():
    # Feroz & Hobson (2008): exact log Z = log(2 int 2 pi rho N(rho; r, w) d rho) - log 144
    radial, _ = integrate.quad(lambda p: 2 * math.pi * p * stats.norm(2.0, 0.1).pdf(p), 0, 10)
    exact = math.log(2 * radial) - math.log(144.0)
    assert exact == pytest.approx(-1.7456, abs=1e-4)
    settings = LadderSettings(n_temperatures=12, beta_power=4.0, n_burn=300, n_production=700,
                              max_production=700, target_sigma=10.0, tau_multiple=0.0)
    _, result = estimate_evidence(shells_target(), settings, np.random.default_rng(4))
    assert abs(result.log_evidence - exact) < 0.1


def test_bayes_factor_of_nested_polynomials():
    # Data from a quadratic; order 1 (2 coefficients) against order 2 (3 coefficients)
    rng_data = 21
    quadratic = LinearGaussian.vandermonde(ndim=3, n=40, sigma=0.4, prior_sd=1.5,
                                           seed=rng_data)
    linear = LinearGaussian(quadratic.design[:, :2], quadratic.y, quadratic.sigma,
                            np.zeros(2), quadratic.s0[:2, :2])
    exact = quadratic.log_evidence() - linear.log_evidence()
    settings = LadderSettings(n_temperatures=12, beta_power=4.0, n_burn=200, n_production=800,
                              max_production=800, target_sigma=10.0, tau_multiple=0.0)
    _, z2 = estimate_evidence(quadratic.target(), settings, np.random.default_rng(31))
    _, z1 = estimate_evidence(linear.target(), settings, np.random.default_rng(32))
    ln_b = z2.log_evidence - z1.log_evidence
    assert abs(ln_b - exact) < 0.2
    assert np.sign(ln_b) == np.sign(exact) and abs(exact) > 1.0


def test_likelihood_zero_on_part_of_the_prior():
    # L = N(x; 0, 1) for x > -1 and 0 below (an invalid parameter region), prior U[-5, 5]:
    # Z = (Phi(5) - Phi(-1)) / 10. Prior draws with log L = -inf make TI undefined, not SS.
    exact = math.log((stats.norm.cdf(5.0) - stats.norm.cdf(-1.0)) / 10.0)
    target = FunctionTarget(
        ("x",), lambda t: np.where(np.abs(t[:, 0]) <= 5, -math.log(10.0), -np.inf),
        lambda t: np.where(t[:, 0] > -1, stats.norm.logpdf(t[:, 0]), -np.inf),
        lambda rng, n: rng.uniform(-5, 5, (n, 1)),
    )
    settings = LadderSettings(n_temperatures=8, beta_power=4.0, n_burn=100, n_production=400,
                              max_production=400, target_sigma=10.0, tau_multiple=0.0)
    _, result = estimate_evidence(target, settings, np.random.default_rng(3))
    assert abs(result.log_evidence - exact) < max(0.1, 4 * result.log_evidence_err)
    assert "ti_undefined" in result.flags
    assert json.dumps(to_plain_json(result), allow_nan=False)


def test_not_converged_warns_and_flags(model):
    settings = LadderSettings(n_temperatures=4, beta_power=4.0, n_burn=20, n_production=40, max_production=60,
                              extension_steps=20, target_sigma=1e-4)
    with pytest.warns(ConvergenceWarning, match="not converged"):
        run, result = estimate_evidence(model.target(), settings, np.random.default_rng(1))
    assert isinstance(result, EvidenceResult)
    assert run.n_steps == 60 and not result.converged
    assert "not_converged" in result.flags


def test_progress_reports_extension_steps(model):
    settings = LadderSettings(n_temperatures=4, beta_power=4.0, n_burn=10, n_production=30, max_production=50,
                              extension_steps=20, target_sigma=1e-6)
    seen: list[tuple[int, int]] = []
    with pytest.warns(ConvergenceWarning):
        estimate_evidence(model.target(), settings, np.random.default_rng(1),
                          progress=lambda done, total: seen.append((done, total)))
    assert seen[-1] == (60, 60)
    assert all(done <= total for done, total in seen)


# --------------------------------------------------------------------------------------
# Slow statistical studies (run with -m slow)
# --------------------------------------------------------------------------------------


@pytest.mark.slow
def test_stepping_stone_error_is_calibrated_over_seeds(model):
    # T1c: z = (SS - exact) / sigma over 10 seeds
    exact = model.log_evidence()
    z = []
    for seed in range(10):
        _, result = estimate_evidence(model.target(), PT_FAST, np.random.default_rng(500 + seed))
        z.append((result.log_evidence - exact) / result.log_evidence_err)
    z = np.array(z)
    assert abs(z.mean()) < 1.5 and z.std(ddof=1) < 2.0 and np.all(np.abs(z) < 4.0)


def bimodal_target() -> FunctionTarget:
    """0.8 N(3*1, 0.3^2 I) + 0.2 N(-3*1, 0.8^2 I) in d = 3, log L + 40, prior U[-10, 10]^3."""
    heavy = stats.multivariate_normal(np.full(3, 3.0), 0.3**2 * np.eye(3))
    light = stats.multivariate_normal(np.full(3, -3.0), 0.8**2 * np.eye(3))
    return FunctionTarget(
        ("a", "b", "c"),
        lambda t: np.where(np.all(np.abs(t) <= 10, axis=1), -3 * math.log(20.0), -np.inf),
        lambda t: 40.0 + np.logaddexp(math.log(0.8) + heavy.logpdf(t),
                                      math.log(0.2) + light.logpdf(t)),
        lambda rng, n: rng.uniform(-10, 10, (n, 3)),
    )


@pytest.mark.slow
def test_bimodal_mixture_needs_swaps():
    exact = 40.0 - 3 * math.log(20.0)  # 31.013
    settings = LadderSettings(n_temperatures=12, beta_power=5.0, n_burn=300, n_production=1000,
                              max_production=1000, target_sigma=10.0, tau_multiple=0.0)
    run, result = estimate_evidence(bimodal_target(), settings, np.random.default_rng(6))
    assert abs(result.log_evidence - exact) < 0.3
    assert np.mean(run.cold_chain[..., 0] > 0) == pytest.approx(0.8, abs=0.1)
    # regression guard: without swaps the cold rung cannot share walkers between the modes
    no_swaps = LadderSettings(n_temperatures=12, beta_power=5.0, n_burn=300, n_production=1000,
                              max_production=1000, swap_every=0, target_sigma=10.0,
                              tau_multiple=0.0)
    run, result = estimate_evidence(bimodal_target(), no_swaps, np.random.default_rng(6))
    heavy = np.mean(run.cold_chain[..., 0] > 0)
    assert (abs(result.log_evidence - exact) > 0.3 or abs(heavy - 0.8) > 0.1
            or "evidence_methods_disagree" in result.flags)


@pytest.mark.slow
def test_agrees_with_dynesty_nested_sampling(model):
    dynesty = pytest.importorskip("dynesty")
    target = model.target()
    prior_sd = math.sqrt(model.s0[0, 0])

    def transform(u):
        return stats.norm.ppf(u) * prior_sd

    sampler = dynesty.NestedSampler(lambda w: float(model.log_likelihood(w[None, :])[0]),
                                    transform, model.ndim, nlive=500,
                                    rstate=np.random.default_rng(13))
    sampler.run_nested(print_progress=False)
    nested = sampler.results
    reference, reference_err = float(nested.logz[-1]), float(nested.logzerr[-1])
    _, result = estimate_evidence(target, PT_FAST, np.random.default_rng(14))
    delta = result.log_evidence - reference
    assert abs(delta) < 3 * math.hypot(result.log_evidence_err, reference_err)
    assert abs(delta) < 0.5


def test_family_probability_is_the_sum_over_its_members():
    # Hand calculation: Z_DT = Z_FN = 1, Z_hop = 1/2 (equal prior odds) gives
    # P(tunnelling) = 2/2.5 = 0.8 and P(hopping) = 0.2 -- Bayes' rule over a partition.
    from mechid.inference.compare import family_probabilities

    logz = {"dt": 0.0, "fn": 0.0, "hop": -np.log(2.0)}
    err = {"dt": 0.0, "fn": 0.0, "hop": 0.0}
    fams = {"dt": "tunnelling", "fn": "tunnelling", "hop": "hopping"}
    first, second = family_probabilities(logz, err, fams)
    assert (first.family, second.family) == ("tunnelling", "hopping")
    assert first.probability == pytest.approx(0.8, rel=1e-12)
    assert second.probability == pytest.approx(0.2, rel=1e-12)
    assert first.probability_err == pytest.approx(0.0, abs=1e-12)
    assert set(first.members) == {"dt", "fn"}
    # Prior odds 3:1:1 for dt: P(tunnelling) = (3 + 1)/(3 + 1 + 0.5) = 8/9
    (top, _) = family_probabilities(logz, err, fams, prior_odds={"dt": 3.0})
    assert top.probability == pytest.approx(8 / 9, rel=1e-12)
    # With Monte Carlo errors the family error is smaller than the members' (anticorrelated)
    noisy = family_probabilities(logz, {"dt": 0.5, "fn": 0.5, "hop": 0.5}, fams)
    assert 0 < noisy[0].probability_err < 0.2
