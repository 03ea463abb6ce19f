"""The posterior-predictive view of one fit: what a report may show of it, nothing more.

:func:`posterior_predictive` turns a fitted target and its posterior draws into a frozen
:class:`PosteriorPredictive`: the points that entered the fit with their standardised
residuals, the posterior median model and the 95 % posterior predictive band (model plus
the noise model of :mod:`mechid.inference.noise`) on a dense bias grid per measured
temperature and polarity, and the posterior draws of the physical parameters for a corner
plot. Reports read this record and the results; they never see the sampler.
"""

from __future__ import annotations

import warnings
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE

#: Posterior draws used for the predictive band (fixed subset: same view for the same run).
PREDICTIVE_DRAWS = 150
#: Grid points per (temperature, polarity) branch of the model curves.
CURVE_POINTS = 70
#: Seed of the noise draws of the band (fixed, and apart from the run's random stream, so
#: building the view changes no other number of the run).
BAND_SEED = 0


@dataclass(frozen=True)
class PosteriorAxis:
    """Posterior draws of one sampled physical parameter.

    Attributes
    ----------
    name : str
        Catalogue parameter name (with its unit suffix).
    log10 : bool
        True when the parameter is sampled in log10: ``values`` are then log10 of the
        physical value in its unit; otherwise the physical value itself.
    values : ndarray, shape (s,)
        Draws of the beta = 1 chain.
    """

    name: str
    log10: bool
    values: NDArray


@dataclass(frozen=True)
class PosteriorPredictive:
    """What the data and the posterior of one mechanism look like together.

    Attributes
    ----------
    mechanism_id : str
        The fitted mechanism.
    voltage_V, temperature_K, current_A : ndarray, shape (n,)
        The points that entered the fit.
    residuals : ndarray, shape (n,)
        Standardised residuals (I_obs - I_model)/sigma at the posterior median of the
        sampling coordinates.
    grid_voltage_V, grid_temperature_K : ndarray, shape (g,)
        Dense grid covering every measured (temperature, polarity) branch (signed bias).
    median_A, lower_A, upper_A : ndarray, shape (g,)
        Posterior median model and the 2.5 % / 97.5 % quantiles of the posterior
        predictive (model plus noise), of the folded current sign(V) * I, in A.
    n_predictive_draws : int
        Posterior draws behind the band.
    parameters : tuple of PosteriorAxis
        The sampled physical parameters (noise parameters and held values left out).
    """

    mechanism_id: str
    voltage_V: NDArray
    temperature_K: NDArray
    current_A: NDArray
    residuals: NDArray
    grid_voltage_V: NDArray
    grid_temperature_K: NDArray
    median_A: NDArray
    lower_A: NDArray
    upper_A: NDArray
    n_predictive_draws: int
    parameters: tuple[PosteriorAxis, ...]


def posterior_predictive(target: MechanismTarget, draws: NDArray) -> PosteriorPredictive:
    """The posterior-predictive view of a fit.

    Parameters
    ----------
    target : MechanismTarget
        The fitted target (data, model, noise model).
    draws : ndarray, shape (s, ndim)
        Posterior draws in the sampling coordinates.
    """
    draws = np.asarray(draws, dtype=float)
    grid_v, grid_t = model_grid(target.voltage_V, target.temperature_K)
    subset = thin_draws(draws, PREDICTIVE_DRAWS)
    median, lower, upper = predictive_band(target, subset, grid_v, grid_t)
    centre = np.median(draws, axis=0)
    physical = set(target.mechanism.parameter_names)
    return PosteriorPredictive(
        mechanism_id=target.mechanism.id,
        voltage_V=target.voltage_V, temperature_K=target.temperature_K,
        current_A=target.current_A,
        residuals=target.standardised_residuals(centre[None, :]),
        grid_voltage_V=grid_v, grid_temperature_K=grid_t,
        median_A=median, lower_A=lower, upper_A=upper,
        n_predictive_draws=len(subset),
        parameters=tuple(PosteriorAxis(prior.name, prior.log_scale, draws[:, column])
                         for column, prior in enumerate(target.free) if prior.name in physical),
    )


def thin_draws(draws: NDArray, n: int) -> NDArray:
    """An evenly spaced, deterministic subset of at most ``n`` draws (rows)."""
    if len(draws) <= n:
        return draws
    return draws[np.linspace(0, len(draws) - 1, n).astype(int)]


def _branch_grid(abs_v: NDArray) -> NDArray:
    """Bias magnitudes spanning one measured branch (log-spaced when it spans a decade)."""
    lo, hi = float(abs_v.min()), float(abs_v.max())
    if hi <= lo:
        return np.array([lo])
    if hi / lo > 10:
        return np.geomspace(lo, hi, CURVE_POINTS)
    return np.linspace(lo, hi, CURVE_POINTS)


def model_grid(voltage_V: NDArray, temperature_K: NDArray) -> tuple[NDArray, NDArray]:
    """Dense (signed V, T) grid covering every measured branch of the points."""
    grid_v, grid_t = [], []
    for t in np.unique(temperature_K):
        for sign in (1.0, -1.0):
            on = (temperature_K == t) & (np.sign(voltage_V) == sign)
            if on.any():
                v = sign * _branch_grid(np.abs(voltage_V[on]))
                grid_v.append(v)
                grid_t.append(np.full(v.shape, t))
    return np.concatenate(grid_v), np.concatenate(grid_t)


def _nan_quantiles(values: NDArray, q: Sequence[float]) -> NDArray:
    """Quantiles along axis 0 ignoring NaN; NaN for all-NaN columns (no warning)."""
    finite = np.isfinite(values)
    if finite.all():
        return np.quantile(values, q, axis=0)
    out = np.full((len(q), values.shape[1]), np.nan)
    good = finite.any(axis=0)
    if good.any():
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", RuntimeWarning)
            out[:, good] = np.nanquantile(np.where(finite, values, np.nan)[:, good], q, axis=0)
    return out


def predictive_band(target: MechanismTarget, draws: NDArray, voltage_V: NDArray,
                    temperature_K: NDArray) -> tuple[NDArray, NDArray, NDArray]:
    """Posterior median model and 95 % posterior predictive band on a (V, T) grid.

    Each posterior draw's model current gets one draw of the fitted noise (relative term
    and floor) from a generator seeded with :data:`BAND_SEED`.

    Parameters
    ----------
    target : MechanismTarget
        The fitted target.
    draws : ndarray, shape (s, ndim)
        Posterior draws in the sampling coordinates.
    voltage_V, temperature_K : ndarray
        Grid points (signed bias).

    Returns
    -------
    median, lower, upper : ndarray
        Of the folded current sign(V) * I, in A.
    """
    values = target.physical_values(draws)
    physical = {name: values[name] for name in target.mechanism.parameter_names}
    with np.errstate(all="ignore"):
        model = target.mechanism.current(voltage_V, temperature_K, physical, target.device)
        noisy = target.noise_law.draw(model, values[NOISE_RELATIVE], values[NOISE_FLOOR],
                                      np.random.default_rng(BAND_SEED))
    sign = np.sign(voltage_V)
    median = _nan_quantiles(model * sign, [0.5])[0]
    lower, upper = _nan_quantiles(noisy * sign, [0.025, 0.975])
    return median, lower, upper
