"""Log-evidence of a model from a tempered ladder: stepping-stone, thermodynamic integration, bridge.

The evidence :math:`Z = \\int L(\\theta)\\,\\pi(\\theta)\\,d\\theta` (the prior normalised)
is estimated three ways from one run of :func:`mechid.inference.tempering.run_tempered_ladder`:

* **stepping-stone** (Xie et al. 2011, Syst. Biol. 60:150), the reported value:
  :math:`\\log Z = \\sum_k \\log E_{\\beta_{k-1}}[L^{\\beta_k - \\beta_{k-1}}]`, free of
  quadrature error;
* **thermodynamic integration** with the corrected trapezoid rule (Friel, Hurn & Wyse 2014,
  Stat. Comput. 24:709) and the left/right Riemann sums, which bracket :math:`\\log Z`
  exactly because :math:`E_\\beta[\\log L]` increases with :math:`\\beta`;
* **bridge sampling** from the :math:`\\beta = 1` chain with the optimal bridge of Meng & Wong
  (1996, Stat. Sinica 6:831) and the error of Fruhwirth-Schnatter (2004, Econom. J. 7:143);
* a **Laplace-Metropolis** value (Lewis & Raftery 1997, JASA 92:648) for screening and for the
  ``map_on_boundary`` flag only.

Errors of stepping-stone and TI come from batch means over the whole ladder (10 blocks in
time), which, unlike per-rung errors, include the correlation between rungs that swaps
create. The harmonic-mean estimator is deliberately absent (Neal 2008: infinite variance).
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field, replace

import numpy as np
from emcee.autocorr import integrated_time
from numpy.typing import NDArray
from scipy import optimize
from scipy.special import logsumexp
from sklearn.exceptions import ConvergenceWarning as SklearnConvergenceWarning
from sklearn.mixture import GaussianMixture

from mechid.errors import ConvergenceWarning
from mechid.inference.flags import (
    AUTOCORR_MULTIPLE,
    LOW_STEP_ESS,
    LOW_SWAP_RATE,
    SamplerFlag,
)
from mechid.inference.settings import LadderSettings
from mechid.inference.target import FloatArray, Target, evaluate_target
from mechid.inference.tempering import LadderRun, ProgressCallback, TemperedLadder

#: Time blocks for the batch-means errors.
N_BATCHES = 10
#: An evidence this many errors below ``not_worth_below`` is not refined further, where
#: ``not_worth_below`` is the best competitor's log-evidence minus :data:`FAR_BELOW_MARGIN`.
FAR_BELOW_SIGMAS = 5.0
#: Minimum number of proposal draws for bridge sampling.
MIN_BRIDGE_PROPOSALS = 2000
#: Largest Gaussian-mixture proposal tried for bridge sampling (chosen by BIC).
MAX_BRIDGE_COMPONENTS = 3
#: At most this many (evenly spaced) draws are used to fit the bridge proposal.
MAX_BRIDGE_FIT_DRAWS = 3000


# --------------------------------------------------------------------------------------
# Estimators (pure functions)
# --------------------------------------------------------------------------------------


def _per_rung(logl_chains: NDArray) -> FloatArray:
    """Reshape ``(K, ...)`` log-likelihood samples to ``(K, n)``."""
    chains = np.asarray(logl_chains, dtype=float)
    return chains.reshape(chains.shape[0], -1)


def power_posterior_moments(logl_chains: NDArray) -> tuple[FloatArray, FloatArray]:
    """Mean and variance of log L on every rung.

    Parameters
    ----------
    logl_chains : ndarray, shape (K, ...)
        Log-likelihood samples of each rung (any trailing shape).

    Returns
    -------
    mean, var : ndarray, shape (K,)
        :math:`E_\\beta[\\log L]` and :math:`V_\\beta[\\log L]`; ``-inf``/NaN if a rung holds
        ``log L = -inf`` samples.
    """
    samples = _per_rung(logl_chains)
    with np.errstate(invalid="ignore"):
        return samples.mean(axis=1), samples.var(axis=1, ddof=1)


def stepping_stone_terms(betas: NDArray, logl_chains: NDArray) -> FloatArray:
    """Log ratios :math:`\\log Z_{\\beta_k}/Z_{\\beta_{k-1}}` of the stepping-stone estimator.

    Each ratio is :math:`\\log \\frac{1}{n}\\sum_i \\exp[(\\beta_k-\\beta_{k-1})\\,\\ell_i]`
    over the samples :math:`\\ell_i` of rung ``k - 1`` (Xie et al. 2011, eq. 8), computed
    with log-sum-exp.

    Parameters
    ----------
    betas : ndarray, shape (K,)
        Increasing inverse temperatures from 0 to 1.
    logl_chains : ndarray, shape (K, ...)
        Log-likelihood samples of each rung.

    Returns
    -------
    ndarray, shape (K - 1,)
    """
    betas = np.asarray(betas, dtype=float)
    samples = _per_rung(logl_chains)[:-1]
    steps = np.diff(betas)[:, None]
    return logsumexp(steps * samples, axis=1) - math.log(samples.shape[1])


def stepping_stone_step_ess(betas: NDArray, logl_chains: NDArray) -> FloatArray:
    """Relative effective sample size of each stepping-stone step's importance weights.

    Step ``k`` averages :math:`w_i = \\exp[(\\beta_k-\\beta_{k-1})\\ell_i]` over rung
    ``k - 1``; :math:`(\\sum w)^2 / (n \\sum w^2)` (Kong 1992, Tech. Rep. 348, Univ. Chicago;
    from memory) is near 1 when the two rungs overlap well and near ``1/n`` when a few
    samples carry the whole average, i.e. when the rungs are too far apart for the step to
    be estimated reliably whatever the run length.

    Parameters
    ----------
    betas : ndarray, shape (K,)
        Increasing inverse temperatures.
    logl_chains : ndarray, shape (K, ...)
        Log-likelihood samples of each rung.

    Returns
    -------
    ndarray, shape (K - 1,)
    """
    samples = _per_rung(logl_chains)[:-1]
    scaled = np.diff(np.asarray(betas, dtype=float))[:, None] * samples
    with np.errstate(invalid="ignore"):
        weights = np.exp(scaled - np.max(scaled, axis=1, keepdims=True))
        return np.sum(weights, axis=1) ** 2 / (samples.shape[1] * np.sum(weights**2, axis=1))


def stepping_stone(betas: NDArray, logl_chains: NDArray) -> float:
    """Stepping-stone log-evidence (Xie et al. 2011, Syst. Biol. 60:150, eqs. 8-9).

    Parameters
    ----------
    betas : ndarray, shape (K,)
        Increasing inverse temperatures, ``betas[0] = 0`` and ``betas[-1] = 1``.
    logl_chains : ndarray, shape (K, ...)
        Log-likelihood samples of each rung (the last rung is not used).

    Returns
    -------
    float
        :math:`\\log Z` for a normalised prior.
    """
    return float(np.sum(stepping_stone_terms(betas, logl_chains)))


@dataclass(frozen=True)
class ThermodynamicIntegral:
    """Quadratures of :math:`\\log Z = \\int_0^1 E_\\beta[\\log L]\\,d\\beta`.

    Attributes
    ----------
    corrected : float
        Trapezoid minus the derivative correction of Friel, Hurn & Wyse (2014).
    trapezoid : float
        Plain trapezoid rule.
    left, right : float
        Left and right Riemann sums; ``left <= log Z <= right`` exactly (up to Monte Carlo
        error in the means), since :math:`dE_\\beta/d\\beta = V_\\beta \\ge 0`.
    """

    corrected: float
    trapezoid: float
    left: float
    right: float


def corrected_trapezoid(betas: NDArray, mean: NDArray, var: NDArray) -> ThermodynamicIntegral:
    """Thermodynamic integration with the corrected trapezoid rule.

    .. math::

        \\log Z \\approx \\sum_i h_i \\frac{E_i + E_{i+1}}{2}
                     - \\sum_i \\frac{h_i^2}{12}(V_{i+1} - V_i),
        \\quad h_i = \\beta_{i+1} - \\beta_i,

    using :math:`dE_\\beta/d\\beta = V_\\beta` in the Euler-Maclaurin end correction (Friel,
    Hurn & Wyse 2014, Stat. Comput. 24:709, eq. 9). Path sampling: Gelman & Meng (1998,
    Stat. Sci. 13:163).

    Parameters
    ----------
    betas : ndarray, shape (K,)
        Increasing inverse temperatures from 0 to 1.
    mean, var : ndarray, shape (K,)
        :math:`E_\\beta[\\log L]` and :math:`V_\\beta[\\log L]` on each rung.

    Returns
    -------
    ThermodynamicIntegral
    """
    betas, mean, var = (np.asarray(a, dtype=float) for a in (betas, mean, var))
    h = np.diff(betas)
    with np.errstate(invalid="ignore"):
        left = float(np.sum(h * mean[:-1]))
        right = float(np.sum(h * mean[1:]))
        trapezoid = 0.5 * (left + right)
        corrected = trapezoid - float(np.sum(h**2 / 12.0 * np.diff(var)))
    return ThermodynamicIntegral(corrected, trapezoid, left, right)


def batch_means_error(
    estimator: Callable[[NDArray], float], logl_chains: NDArray, n_blocks: int = N_BATCHES
) -> tuple[float, FloatArray]:
    """Monte Carlo error of a ladder estimator from batch means in time.

    The production steps are cut into ``n_blocks`` contiguous blocks; the estimator is
    applied to every block (all rungs at once) and the error is
    :math:`\\mathrm{sd}(\\hat z_b)/\\sqrt{B}`. Blocks long compared with the
    autocorrelation time are nearly independent, so the error includes the correlation
    between rungs and within chains (cf. Flegal & Jones 2010, Ann. Stat. 38:1034).

    Parameters
    ----------
    estimator : callable
        Maps a ``(K, steps, walkers)`` block to a log-evidence.
    logl_chains : ndarray, shape (K, steps, walkers)
        Ladder log-likelihood samples.
    n_blocks : int
        Number of blocks (at least 2).

    Returns
    -------
    error : float
        Standard error of the full-run estimate.
    block_values : ndarray, shape (n_blocks,)
        Estimates from the individual blocks.
    """
    chains = np.asarray(logl_chains, dtype=float)
    if n_blocks < 2 or chains.shape[1] < n_blocks:
        raise ValueError(f"need at least {n_blocks} >= 2 steps for batch means, got {chains.shape}")
    blocks = np.array_split(np.arange(chains.shape[1]), n_blocks)
    values = np.array([estimator(chains[:, block]) for block in blocks])
    with np.errstate(invalid="ignore"):
        error = float(np.std(values, ddof=1) / math.sqrt(n_blocks))
    return error, values


def integrated_autocorr_time(series: NDArray) -> float:
    """Integrated autocorrelation time of a scalar ensemble series ``(steps, walkers)``.

    Uses ``emcee.autocorr.integrated_time`` (walker-averaged autocorrelation, automatic
    window c = 5; Sokal 1997 windowing) with ``tol=0`` so it never raises; ``-inf`` values
    are set to the smallest finite value and constant walkers are skipped (a fully constant
    series returns 1).
    """
    values = np.asarray(series, dtype=float)
    finite = np.isfinite(values)
    if not finite.any():
        return 1.0
    values = np.where(finite, values, values[finite].min())
    moving = np.ptp(values, axis=0) > 0
    if not moving.any():
        return 1.0
    with np.errstate(all="ignore"):
        tau = float(integrated_time(values[:, moving, None], tol=0)[0])
    return tau if np.isfinite(tau) else float(values.shape[0])


def parameter_autocorr_times(chain: NDArray) -> FloatArray:
    """Integrated autocorrelation time of each parameter of a chain ``(steps, walkers, ndim)``."""
    chain = np.asarray(chain, dtype=float)
    return np.array([integrated_autocorr_time(chain[:, :, j]) for j in range(chain.shape[2])])


@dataclass(frozen=True)
class BridgeEstimate:
    """Result of :func:`bridge_sampling`.

    Attributes
    ----------
    log_evidence, error : float
        Estimate and its approximate standard error (relative-MSE formula).
    n_evaluations : int
        Likelihood evaluations spent on proposal draws.
    n_components : int
        Components of the Gaussian-mixture proposal (1 = multivariate normal).
    iterations : int
        Fixed-point iterations used.
    """

    log_evidence: float
    error: float
    n_evaluations: int
    n_components: int
    iterations: int


def _fit_proposal(fit_draws: FloatArray, seed: int, max_components: int) -> GaussianMixture:
    """Gaussian mixture with 1..max_components components, chosen by BIC (standardised data)."""
    if len(fit_draws) > MAX_BRIDGE_FIT_DRAWS:
        fit_draws = fit_draws[np.linspace(0, len(fit_draws) - 1, MAX_BRIDGE_FIT_DRAWS).astype(int)]
    n, ndim = fit_draws.shape
    per_component = ndim + ndim * (ndim + 1) // 2 + 1
    largest = max(1, min(max_components, n // (10 * per_component)))
    best, best_bic = None, np.inf
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", SklearnConvergenceWarning)
        for k in range(1, largest + 1):
            model = GaussianMixture(
                k, covariance_type="full", init_params="k-means++", random_state=seed,
                reg_covar=1e-9,
            )
            model.fit(fit_draws)
            bic = model.bic(fit_draws)
            if bic < best_bic:
                best, best_bic = model, bic
    assert best is not None
    return best


def bridge_sampling(
    log_posterior: Callable[[FloatArray], tuple[FloatArray, int]],
    draws: NDArray,
    log_posterior_draws: NDArray,
    rng: np.random.Generator,
    *,
    n_proposal: int | None = None,
    max_components: int = MAX_BRIDGE_COMPONENTS,
    tolerance: float = 1e-10,
    max_iterations: int = 1000,
) -> BridgeEstimate:
    """Log-evidence by optimal bridge sampling (Meng & Wong 1996, Stat. Sinica 6:831, eq. 4.1).

    A proposal :math:`g` (a Gaussian mixture, 1 component = multivariate normal, number of
    components by BIC, fitted on standardised coordinates) is fitted to the *first half* of
    the posterior draws (in time); the *second half* (:math:`N_1` draws) and :math:`N_2`
    draws from :math:`g` enter the fixed-point iteration

    .. math::

        r \\leftarrow \\frac{N_2^{-1}\\sum_j l_{2j}/(s_1 l_{2j} + s_2 r)}
                          {N_1^{-1}\\sum_i 1/(s_1 l_{1i} + s_2 r)},
        \\quad l = \\frac{L\\pi}{g},\\; s_i = \\frac{N_i}{N_1+N_2},

    done in logarithms. Splitting the draws avoids the bias of fitting and evaluating on the
    same sample (Overstall & Forster 2010, CSDA 54:3269; Gronau et al. 2017, J. Math. Psych.
    81:80). The error is the relative mean-square error of Fruhwirth-Schnatter (2004,
    Econom. J. 7:143, eq. 21), :math:`RE^2 = \\mathrm{Var}_g(f_1)/(N_2 E_g[f_1]^2) +
    \\tau_{f_2}\\mathrm{Var}_p(f_2)/(N_1 E_p[f_2]^2)`, with the autocorrelation time
    :math:`\\tau_{f_2}` of :math:`f_2` along the chain; :math:`\\sigma(\\log Z) \\approx RE`.

    Parameters
    ----------
    log_posterior : callable
        ``theta (m, ndim) -> (log prior + log likelihood (m,), n_likelihood_evaluations)``.
    draws : ndarray, shape (steps, walkers, ndim)
        Posterior draws (ideally thinned to roughly independent steps).
    log_posterior_draws : ndarray, shape (steps, walkers)
        Unnormalised log posterior of ``draws``.
    rng : numpy.random.Generator
        Random source for the mixture fit and the proposal draws.
    n_proposal : int, optional
        :math:`N_2`; default ``max(N_1, 2000)``.
    max_components : int
        Largest mixture tried.
    tolerance, max_iterations : float, int
        Convergence of the fixed-point iteration (on :math:`\\log r`).

    Returns
    -------
    BridgeEstimate
    """
    draws = np.asarray(draws, dtype=float)
    log_q_draws = np.asarray(log_posterior_draws, dtype=float)
    n_steps, n_walkers, ndim = draws.shape
    if n_steps < 4:
        raise ValueError(f"bridge sampling needs at least 4 steps of draws, got {n_steps}")
    split = n_steps // 2
    fit_draws = draws[:split].reshape(-1, ndim)
    centre, scale = fit_draws.mean(axis=0), fit_draws.std(axis=0)
    scale = np.where(scale > 0, scale, 1.0)
    log_jacobian = -float(np.sum(np.log(scale)))
    seed = int(rng.integers(2**31 - 1))
    proposal = _fit_proposal((fit_draws - centre) / scale, seed, max_components)

    kept = draws[split:]
    n1 = kept.shape[0] * kept.shape[1]
    n2 = int(n_proposal if n_proposal is not None else max(n1, MIN_BRIDGE_PROPOSALS))
    proposal.set_params(random_state=int(rng.integers(2**31 - 1)))
    proposal_draws = proposal.sample(n2)[0] * scale + centre
    log_q_proposal, n_eval = log_posterior(proposal_draws)

    def log_g(theta: FloatArray) -> FloatArray:
        return proposal.score_samples((theta - centre) / scale) + log_jacobian

    l1 = log_q_draws[split:].reshape(-1) - log_g(kept.reshape(-1, ndim))
    l2 = np.asarray(log_q_proposal, dtype=float) - log_g(proposal_draws)
    log_s1, log_s2 = math.log(n1 / (n1 + n2)), math.log(n2 / (n1 + n2))
    shift = float(np.median(l1))
    l1, l2 = l1 - shift, l2 - shift
    log_r, iterations = 0.0, 0
    with np.errstate(over="ignore", invalid="ignore"):
        for iterations in range(1, max_iterations + 1):  # noqa: B007 (used after the loop)
            numerator = logsumexp(l2 - np.logaddexp(log_s1 + l2, log_s2 + log_r)) - math.log(n2)
            denominator = logsumexp(-np.logaddexp(log_s1 + l1, log_s2 + log_r)) - math.log(n1)
            updated = numerator - denominator
            if abs(updated - log_r) < tolerance:
                log_r = updated
                break
            log_r = updated
        # Fruhwirth-Schnatter (2004) relative MSE with p = q / Z normalised
        f1 = np.exp(l2 - log_r - np.logaddexp(log_s1 + l2 - log_r, log_s2))
        f2 = np.exp(-np.logaddexp(log_s1 + l1 - log_r, log_s2))
        tau_f2 = integrated_autocorr_time(f2.reshape(kept.shape[0], kept.shape[1]))
        re2 = np.var(f1) / (n2 * np.mean(f1) ** 2) + tau_f2 * np.var(f2) / (n1 * np.mean(f2) ** 2)
    return BridgeEstimate(
        log_evidence=float(log_r + shift),
        error=float(np.sqrt(re2)),
        n_evaluations=int(n_eval),
        n_components=int(proposal.n_components),
        iterations=iterations,
    )


@dataclass(frozen=True)
class LaplaceEstimate:
    """Result of :func:`laplace_metropolis`.

    Attributes
    ----------
    log_evidence : float
        Laplace-Metropolis log-evidence (NaN if the covariance is singular).
    map_point : ndarray, shape (ndim,)
        Highest-posterior point found.
    on_boundary : bool
        True if a step of one posterior standard deviation from ``map_point`` along some
        parameter leaves the prior support.
    n_evaluations : int
        Likelihood evaluations spent.
    boundary_parameters : tuple of int
        Indices of the parameters for which that step leaves the support.
    """

    log_evidence: float
    map_point: FloatArray
    on_boundary: bool
    n_evaluations: int
    boundary_parameters: tuple[int, ...] = ()


def laplace_metropolis(
    target: Target, draws: NDArray, log_posterior_draws: NDArray, polish: bool = True
) -> LaplaceEstimate:
    """Laplace-Metropolis log-evidence (Lewis & Raftery 1997, JASA 92:648, eq. 4).

    .. math::

        \\log Z \\approx \\log L(\\hat\\theta) + \\log\\pi(\\hat\\theta)
                     + \\frac d2 \\log 2\\pi + \\frac12 \\log|\\hat\\Sigma|,

    with :math:`\\hat\\theta` the best posterior draw (polished by Nelder-Mead) and
    :math:`\\hat\\Sigma` the posterior sample covariance. Exact for Gaussian posteriors;
    wrong for posteriors cut by a prior edge, skewed, curved or multimodal, hence only a
    screening value and the source of the ``map_on_boundary`` flag.

    Parameters
    ----------
    target : Target
        The model.
    draws : ndarray, shape (n, ndim)
        Posterior draws.
    log_posterior_draws : ndarray, shape (n,)
        Unnormalised log posterior of ``draws``.
    polish : bool
        Refine the best draw with a Nelder-Mead search.

    Returns
    -------
    LaplaceEstimate
    """
    draws = np.asarray(draws, dtype=float)
    log_q = np.asarray(log_posterior_draws, dtype=float)
    ndim = draws.shape[1]
    best = int(np.argmax(log_q))
    point, value = draws[best].copy(), float(log_q[best])
    covariance = np.atleast_2d(np.cov(draws, rowvar=False))
    sd = np.sqrt(np.clip(np.diag(covariance), 0.0, None))
    n_evaluations = 0
    if polish and np.all(sd > 0):
        counter = [0]

        def negative(theta: FloatArray) -> float:
            lp, ll, n_eval = evaluate_target(target, theta[None, :])
            counter[0] += n_eval
            total = float(lp[0] + ll[0])
            return -total if np.isfinite(total) else 1e300

        simplex = np.vstack([point, point + np.diag(0.2 * sd)])
        found = optimize.minimize(
            negative, point, method="Nelder-Mead",
            options={"initial_simplex": simplex, "maxfev": 100 * ndim, "xatol": 1e-9,
                     "fatol": 1e-6},
        )
        n_evaluations += counter[0]
        if -found.fun > value:
            point, value = np.asarray(found.x, dtype=float), float(-found.fun)
    sign, logdet = np.linalg.slogdet(covariance)
    log_evidence = value + 0.5 * ndim * math.log(2 * math.pi) + 0.5 * logdet if sign > 0 else np.nan
    probes = point[None, :] + np.concatenate([np.diag(sd), -np.diag(sd)])
    probe_prior, _, _ = evaluate_target(_PriorOnly(target), probes)
    outside = ~np.isfinite(probe_prior.reshape(2, ndim)).all(axis=0)
    return LaplaceEstimate(
        log_evidence=float(log_evidence),
        map_point=point,
        on_boundary=bool(outside.any()),
        n_evaluations=n_evaluations,
        boundary_parameters=tuple(int(i) for i in np.nonzero(outside)[0]),
    )


@dataclass(frozen=True)
class _PriorOnly:
    """A target view whose likelihood is zero (to probe the prior support without cost)."""

    inner: Target

    @property
    def ndim(self) -> int:
        return self.inner.ndim

    @property
    def names(self) -> tuple[str, ...]:
        return self.inner.names

    def log_prior(self, theta: NDArray) -> NDArray:
        return self.inner.log_prior(theta)

    def log_likelihood(self, theta: NDArray) -> NDArray:
        return np.zeros(len(theta))

    def sample_prior(self, rng: np.random.Generator, n: int) -> NDArray:
        return self.inner.sample_prior(rng, n)


# --------------------------------------------------------------------------------------
# The adaptive evidence run
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class EvidenceResult:
    """Log-evidence estimates, their errors and the diagnostics of one ladder run.

    Attributes
    ----------
    log_evidence, log_evidence_err : float
        Stepping-stone estimate and its batch-means standard error (the reported value).
    log_evidence_ti, log_evidence_ti_err : float
        Corrected-trapezoid thermodynamic integration and its batch-means error.
    ti_bracket : tuple of float
        Left and right Riemann sums (a hard bracket of log Z up to Monte Carlo error).
    log_evidence_bridge, log_evidence_bridge_err : float
        Optimal bridge sampling on the cold chain and its relative-MSE error (NaN if it
        failed).
    bridge_components : int
        Gaussian-mixture components of the bridge proposal.
    log_evidence_laplace : float
        Laplace-Metropolis value (screening only).
    map_point : ndarray, shape (ndim,)
        Best posterior point found.
    autocorr_time : ndarray, shape (ndim,)
        Integrated autocorrelation time of each parameter on the cold chain (steps).
    log_likelihood_autocorr_time : ndarray, shape (K,)
        Integrated autocorrelation time of log L on each rung.
    effective_sample_size : float
        Cold-chain draws divided by the largest parameter autocorrelation time.
    n_steps : int
        Recorded production steps.
    n_likelihood_calls : int
        Likelihood evaluations (points) of the whole estimate, bridge and Laplace included.
    converged : bool
        True if the error and chain-length targets were met.
    flags : tuple of SamplerFlag
        What the estimate noticed (see :class:`mechid.inference.flags.SamplerFlag`).
    betas, mean_log_likelihood, var_log_likelihood : ndarray, shape (K,)
        Ladder and :math:`E_\\beta`, :math:`V_\\beta` of log L.
    swap_acceptance : ndarray, shape (K - 1,)
        Neighbour-swap acceptance.
    step_effective_fraction : ndarray, shape (K - 1,)
        Relative ESS of each stepping-stone step's weights (``ladder_too_coarse`` below
        :data:`LOW_STEP_ESS`).
    boundary_parameters : tuple of str
        Parameters whose MAP lies within one posterior sd of a prior bound.
    wall_time : float
        Seconds of sampling and estimation.
    """

    log_evidence: float
    log_evidence_err: float
    log_evidence_ti: float
    log_evidence_ti_err: float
    ti_bracket: tuple[float, float]
    log_evidence_bridge: float
    log_evidence_bridge_err: float
    bridge_components: int
    log_evidence_laplace: float
    map_point: FloatArray
    autocorr_time: FloatArray
    log_likelihood_autocorr_time: FloatArray
    effective_sample_size: float
    n_steps: int
    n_likelihood_calls: int
    converged: bool
    flags: tuple[SamplerFlag, ...] = ()
    betas: FloatArray = field(default_factory=lambda: np.empty(0))
    mean_log_likelihood: FloatArray = field(default_factory=lambda: np.empty(0))
    var_log_likelihood: FloatArray = field(default_factory=lambda: np.empty(0))
    swap_acceptance: FloatArray = field(default_factory=lambda: np.empty(0))
    step_effective_fraction: FloatArray = field(default_factory=lambda: np.empty(0))
    boundary_parameters: tuple[str, ...] = ()
    wall_time: float = 0.0



def _ladder_convergence(
    run: LadderRun, settings: LadderSettings
) -> tuple[bool, float, FloatArray]:
    """(targets met, batch-means sigma of SS, tau of log L per rung)."""
    betas = run.betas
    sigma, _ = batch_means_error(lambda block: stepping_stone(betas, block), run.log_likelihood)
    tau = np.array([integrated_autocorr_time(chain) for chain in run.log_likelihood])
    long_enough = run.n_steps >= settings.tau_multiple * float(np.max(tau))
    return bool(sigma <= settings.target_sigma and long_enough), sigma, tau


def estimate_evidence(
    target: Target,
    settings: LadderSettings,
    rng: np.random.Generator,
    start: NDArray | None = None,
    progress: ProgressCallback | None = None,
    not_worth_below: float | None = None,
) -> tuple[LadderRun, EvidenceResult]:
    """Run a tempered ladder until the log-evidence is precise enough, then estimate it.

    After burn-in and ``settings.n_production`` steps, production is extended by
    ``settings.extension_steps`` at a time until the stepping-stone batch-means error is at
    most ``settings.target_sigma`` and the run is at least ``settings.tau_multiple``
    autocorrelation times of log L long on every rung, or ``settings.max_production``
    production steps are reached (flag ``not_converged`` and a
    :class:`mechid.errors.ConvergenceWarning`).

    Parameters
    ----------
    target : Target
        Model with a normalised prior and a vectorised log-likelihood.
    settings : LadderSettings
        Ladder and stopping settings.
    rng : numpy.random.Generator
        The only random source.
    start : ndarray, shape (n, ndim) or (ndim,), optional
        Points near the posterior mode for the initial walkers.
    progress : callable, optional
        ``progress(steps_done, total_steps)``; the total grows when production is extended.
    not_worth_below : float, optional
        Skip the extensions when the estimate plus :data:`FAR_BELOW_SIGMAS` errors stays
        below this log-evidence (e.g. a competing model's minus :data:`FAR_BELOW_MARGIN`):
        more precision cannot change a comparison lost by that much. Flag ``far_below``.

    Returns
    -------
    run : LadderRun
        All production samples.
    result : EvidenceResult
        Estimates, errors, diagnostics and flags.

    Warns
    -----
    mechid.errors.ConvergenceWarning
        If the targets were not met within ``settings.max_production`` steps.
    """
    ladder = TemperedLadder(target, settings, rng, start)
    total = settings.n_burn + settings.n_production
    ladder.run(settings.n_burn, record=False, progress=progress, total=total)
    ladder.run(settings.n_production, record=True, progress=progress, total=total)
    run = ladder.snapshot()
    converged, sigma, tau_logl = _ladder_convergence(run, settings)
    far_below = False
    while not converged and ladder.n_production_steps < settings.max_production:
        if not_worth_below is not None:
            estimate = stepping_stone(run.betas, run.log_likelihood)
            if estimate + FAR_BELOW_SIGMAS * sigma < not_worth_below:
                far_below = True
                break
        steps = min(settings.extension_steps, settings.max_production - ladder.n_production_steps)
        ladder.run(steps, record=True, progress=progress, total=ladder.steps_done + steps)
        run = ladder.snapshot()
        converged, sigma, tau_logl = _ladder_convergence(run, settings)
    result = summarise_ladder(target, run, rng, converged=converged, tau_log_likelihood=tau_logl)
    if far_below:
        result = replace(result, flags=(*result.flags, SamplerFlag.FAR_BELOW))
    elif not converged:
        warnings.warn(
            f"log-evidence not converged after {run.n_steps} production steps: batch-means "
            f"error {sigma:.3g} (target {settings.target_sigma:g}), longest log L "
            f"autocorrelation time {np.max(tau_logl):.1f} steps (need "
            f"{settings.tau_multiple:g} x tau <= steps); its larger Monte Carlo error is "
            "carried into the ranking (after --quick, run without it for a longer ladder)",
            ConvergenceWarning,
            stacklevel=2,
        )
    return run, result


def summarise_ladder(
    target: Target,
    run: LadderRun,
    rng: np.random.Generator,
    *,
    converged: bool = True,
    tau_log_likelihood: NDArray | None = None,
) -> EvidenceResult:
    """All estimators, errors, diagnostics and flags of a finished ladder run.

    Parameters
    ----------
    target : Target
        The model (bridge proposals and the Laplace polish evaluate it).
    run : LadderRun
        Production samples.
    rng : numpy.random.Generator
        Random source for bridge sampling.
    converged : bool
        Whether the adaptive stopping targets were met (``not_converged`` flag otherwise).
    tau_log_likelihood : ndarray, optional
        Autocorrelation times of log L per rung, if already computed.

    Returns
    -------
    EvidenceResult
    """
    betas, chains = run.betas, run.log_likelihood
    flags: list[SamplerFlag] = [] if converged else [SamplerFlag.NOT_CONVERGED]
    ss = stepping_stone(betas, chains)
    ss_err, _ = batch_means_error(lambda block: stepping_stone(betas, block), chains)
    mean, var = power_posterior_moments(chains)
    ti = corrected_trapezoid(betas, mean, var)

    def ti_block(block: NDArray) -> float:
        return corrected_trapezoid(betas, *power_posterior_moments(block)).corrected

    ti_err, _ = batch_means_error(ti_block, chains)
    if tau_log_likelihood is None:
        tau_log_likelihood = np.array([integrated_autocorr_time(c) for c in chains])
    tau = parameter_autocorr_times(run.cold_chain)
    n_draws = run.n_steps * run.n_walkers
    log_q = run.cold_log_prior + run.cold_log_likelihood

    bridge = _bridge_from_run(target, run, tau, log_q, rng)
    # No Nelder-Mead polish: the value is for screening and the boundary flag only, and the
    # best of thousands of posterior draws is within about a nat of the MAP.
    laplace = laplace_metropolis(target, run.cold_chain.reshape(-1, run.cold_chain.shape[2]),
                                 log_q.reshape(-1), polish=False)
    calls = run.n_likelihood_evaluations + laplace.n_evaluations
    calls += bridge.n_evaluations if bridge is not None else 0

    if np.any(run.swap_acceptance < LOW_SWAP_RATE):
        flags.append(SamplerFlag.LOW_SWAP_RATE)
    if run.n_steps < AUTOCORR_MULTIPLE * float(np.max(tau)):
        flags.append(SamplerFlag.AUTOCORR_SHORT)
    if not (np.all(np.isfinite(mean)) and np.all(np.isfinite(var))):
        flags.append(SamplerFlag.TI_UNDEFINED)
    # Rung overlap, not SS vs TI: along a reference path, TI's first rung is dominated by the
    # reference's rare, very poor tail draws (variance of log L ~1e6 measured), so the two
    # differ by more than their errors even on ladders whose every step is well estimated.
    step_ess = stepping_stone_step_ess(betas, chains)
    if np.min(step_ess) < LOW_STEP_ESS:
        flags.append(SamplerFlag.LADDER_TOO_COARSE)
    disagree = (ss < ti.left - 3 * ss_err - 0.1) or (ss > ti.right + 3 * ss_err + 0.1)
    if bridge is None:
        flags.append(SamplerFlag.BRIDGE_FAILED)
    elif abs(ss - bridge.log_evidence) > 3 * math.hypot(ss_err, bridge.error) + 0.1:
        disagree = True
    if disagree:
        flags.append(SamplerFlag.EVIDENCE_METHODS_DISAGREE)
    if laplace.on_boundary:
        flags.append(SamplerFlag.MAP_ON_BOUNDARY)

    return EvidenceResult(
        log_evidence=ss,
        log_evidence_err=ss_err,
        log_evidence_ti=ti.corrected,
        log_evidence_ti_err=ti_err,
        ti_bracket=(ti.left, ti.right),
        log_evidence_bridge=bridge.log_evidence if bridge is not None else np.nan,
        log_evidence_bridge_err=bridge.error if bridge is not None else np.nan,
        bridge_components=bridge.n_components if bridge is not None else 0,
        log_evidence_laplace=laplace.log_evidence,
        map_point=laplace.map_point,
        autocorr_time=tau,
        log_likelihood_autocorr_time=np.asarray(tau_log_likelihood, dtype=float),
        effective_sample_size=float(n_draws / max(float(np.max(tau)), 1.0)),
        n_steps=run.n_steps,
        n_likelihood_calls=int(calls),
        converged=converged,
        flags=tuple(flags),
        betas=betas.copy(),
        mean_log_likelihood=mean,
        var_log_likelihood=var,
        swap_acceptance=run.swap_acceptance.copy(),
        step_effective_fraction=step_ess,
        boundary_parameters=tuple(target.names[i] for i in laplace.boundary_parameters),
        wall_time=run.wall_time,
    )


def _bridge_from_run(
    target: Target, run: LadderRun, tau: FloatArray, log_q: FloatArray, rng: np.random.Generator
) -> BridgeEstimate | None:
    """Bridge sampling on the cold chain thinned by half the shortest tau (emcee monitor tutorial)."""
    thin = max(1, int(0.5 * float(np.min(tau))))
    draws, values = run.cold_chain[::thin], log_q[::thin]
    if draws.shape[0] < 4:
        return None

    def log_posterior(theta: FloatArray) -> tuple[FloatArray, int]:
        lp, ll, n_eval = evaluate_target(target, theta)
        with np.errstate(invalid="ignore"):
            return lp + ll, n_eval

    try:
        return bridge_sampling(log_posterior, draws, values, rng)
    except (ValueError, np.linalg.LinAlgError):
        return None
