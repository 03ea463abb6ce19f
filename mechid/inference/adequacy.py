"""Is the best mechanism actually a good description? Posterior predictive checks.

A Bayes factor only ranks the candidates; the leader can still be "the best of a bad lot".
These checks look at the leader on its own:

* **Posterior predictive p-values** (Gelman, Meng & Stern 1996, Statistica Sinica 6, 733)
  for two discrepancies: the chi-square of the standardised residuals, and the number of
  runs of same-sign residuals along the bias axis within each temperature (the Wald &
  Wolfowitz 1940 runs statistic). A model with the wrong curve shape leaves long runs of
  same-sign residuals, which the fitted noise level cannot hide.
* **Noise consistency**: the relative noise the fit needs, compared with a model-free
  estimate of the scatter from second differences of ln|I| along each sweep (a Rice 1984
  style difference estimator, Ann. Stat. 12, 1215). A wrong model inflates the fitted noise.

Thresholds (p >= 0.01, fitted/model-free noise <= 3) are common practice, not theorems.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import NOISE_RELATIVE

#: Smallest posterior predictive p-value accepted (common practice).
MIN_PREDICTIVE_P = 0.01
#: Largest accepted ratio of fitted to model-free relative noise (common practice).
MAX_NOISE_RATIO = 3.0
#: Relative noise below which data count as effectively noiseless for the ratio test.
NOISE_RESOLUTION = 1e-3


@dataclass(frozen=True)
class AdequacyCheck:
    """Outcome of the posterior predictive checks of one mechanism."""

    adequate: bool
    reduced_chi_square: float
    predictive_p_chi_square: float
    residual_runs: int
    expected_runs: float
    predictive_p_runs: float
    fitted_relative_noise: float
    model_free_relative_noise: float | None
    noise_ratio: float | None
    reasons: tuple[str, ...]


def group_order(voltage_V: NDArray, temperature_K: NDArray) -> tuple[NDArray, NDArray]:
    """Sort order along the bias axis within each (temperature, polarity) sweep, and group ids.

    Returns
    -------
    order : ndarray of int
        Indices that sort points by temperature, polarity and |V|.
    group : ndarray of int
        Group id of each point in that order.
    """
    polarity = np.sign(voltage_V)
    order = np.lexsort((np.abs(voltage_V), polarity, temperature_K))
    keys = np.column_stack([temperature_K[order], polarity[order]])
    new_group = np.r_[True, np.any(keys[1:] != keys[:-1], axis=1)]
    return order, np.cumsum(new_group) - 1


def count_runs(residuals: NDArray, group: NDArray) -> NDArray:
    """Number of runs of same-sign residuals, summed over groups.

    ``residuals`` has shape ``(m, n)`` (already in group order); returns shape ``(m,)``.
    """
    signs = np.sign(residuals)
    same_group = group[1:] == group[:-1]
    changes = (signs[:, 1:] != signs[:, :-1]) & same_group
    n_groups = int(group.max()) + 1 if group.size else 0
    return n_groups + changes.sum(axis=1)


def model_free_relative_noise(
    voltage_V: NDArray, temperature_K: NDArray, current_A: NDArray
) -> float | None:
    """Robust relative scatter from second differences of ln|I| along each sweep.

    For a smooth curve sampled densely, the second difference of three neighbours is
    dominated by noise with variance 6 sigma^2; the median absolute value makes the estimate
    robust against the curvature at a few points (Rice 1984 difference estimator, robust form).
    Returns None when fewer than 5 usable triples exist.
    """
    order, group = group_order(voltage_V, temperature_K)
    i_sorted = np.abs(current_A[order])
    log_i = np.log(np.where(i_sorted > 0, i_sorted, np.nan))
    second = log_i[2:] - 2 * log_i[1:-1] + log_i[:-2]
    same = (group[2:] == group[1:-1]) & (group[1:-1] == group[:-2]) & np.isfinite(second)
    usable = second[same]
    if usable.size < 5:
        return None
    return float(np.median(np.abs(usable)) / (0.6745 * np.sqrt(6.0)))


def check_adequacy(
    target: MechanismTarget,
    posterior_draws: NDArray,
    rng: np.random.Generator,
    n_replicates: int = 200,
) -> AdequacyCheck:
    """Posterior predictive checks of one fitted mechanism.

    Parameters
    ----------
    target : MechanismTarget
        The fitted target (data, model, noise model).
    posterior_draws : ndarray
        Internal parameter vectors from the posterior, shape ``(s, ndim)``.
    rng : numpy.random.Generator
        Source of the replicated data and of the draw selection.
    n_replicates : int
        Number of posterior draws used for replicated data sets.
    """
    pick = rng.choice(len(posterior_draws), size=min(n_replicates, len(posterior_draws)),
                      replace=False)
    theta = posterior_draws[pick]
    order, group = group_order(target.voltage_V, target.temperature_K)
    model = target.model_current(theta)[:, order]
    observed = target.current_A[order]
    replicated = target.draw_noisy(theta, model, rng)

    chi2_obs = np.sum(target.standardise(theta, model, observed) ** 2, axis=1)
    chi2_rep = np.sum(target.standardise(theta, model, replicated) ** 2, axis=1)
    runs_obs = count_runs(observed - model, group)
    runs_rep = count_runs(replicated - model, group)
    p_chi2 = float(np.mean(chi2_rep >= chi2_obs))
    p_runs = float(np.mean(runs_rep <= runs_obs))  # too few runs = systematic misfit

    median_theta = np.median(posterior_draws, axis=0)
    residuals = target.standardised_residuals(median_theta)
    dof = max(target.n_points - target.ndim, 1)
    fitted_rel = float(np.median(target.physical_values(theta)[NOISE_RELATIVE])
                       * target.noise_law.sd_per_scale)
    model_free = model_free_relative_noise(target.voltage_V, target.temperature_K, target.current_A)
    ratio = None
    if model_free is not None:
        ratio = fitted_rel / max(model_free, NOISE_RESOLUTION)

    reasons = []
    if p_runs < MIN_PREDICTIVE_P:
        reasons.append(
            f"residuals form long same-sign runs along the bias axis ({int(np.median(runs_obs))} "
            f"runs, about {float(np.mean(runs_rep)):.0f} expected; predictive p = {p_runs:.3g})"
        )
    if p_chi2 < MIN_PREDICTIVE_P:
        reasons.append(f"chi-square larger than the noise model allows (predictive p = {p_chi2:.3g})")
    if ratio is not None and ratio > MAX_NOISE_RATIO:
        reasons.append(
            f"the fit needs {fitted_rel:.2%} relative noise, {ratio:.1f} times the point-to-point "
            f"scatter of the data ({model_free:.2%})"
        )
    return AdequacyCheck(
        adequate=not reasons,
        reduced_chi_square=float(np.sum(residuals**2) / dof),
        predictive_p_chi_square=p_chi2,
        residual_runs=int(np.median(runs_obs)),
        expected_runs=float(np.mean(runs_rep)),
        predictive_p_runs=p_runs,
        fitted_relative_noise=fitted_rel,
        model_free_relative_noise=model_free,
        noise_ratio=ratio,
        reasons=tuple(reasons),
    )
