"""Straight lines: the robust (Huber) line through a straightened plot, OLS slopes, and the
extrapolation of a per-bias quantity to zero bias."""

from __future__ import annotations

import math
import warnings
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from sklearn.exceptions import ConvergenceWarning as SklearnConvergenceWarning
from sklearn.linear_model import HuberRegressor

from mechid.catalogue.base import FloatArray
from mechid.screening.records import LineFit

#: Huber loss threshold in units of the fitted scale (Huber 1964; the scikit-learn default,
#: 95 % efficiency for Gaussian residuals).
HUBER_EPSILON = 1.35
#: L-BFGS settings of the Huber fit (started from the least-squares line).
HUBER_TOL = 1e-8
HUBER_MAX_ITER = 200
#: y spread (relative to 1 + |mean y|) below which a line is taken as exactly flat.
FLAT_RELATIVE_SPREAD = 1e-12


@dataclass(frozen=True)
class RobustLine:
    slope: float
    slope_err: float
    intercept: float
    intercept_err: float
    r_squared: float
    n_outliers: int


def robust_line(x: FloatArray, y: FloatArray) -> RobustLine | None:
    """Fit y = intercept + slope*x with the Huber loss (Huber 1964) via scikit-learn.

    x and y are standardised before the fit (the Huber scale is fitted jointly, so the fit is
    invariant to units) and the coefficients transformed back. Deterministic (L-BFGS, no
    random start). The errors are the ordinary-least-squares standard errors,
    s^2 = SS_res/(n-2), se(slope) = s/sqrt(S_xx), se(intercept) = s*sqrt(1/n + xbar^2/S_xx),
    evaluated with the residuals of the robust line.

    Returns
    -------
    RobustLine or None
        None when fewer than 3 finite points or no spread in x.
    """
    finite = np.isfinite(x) & np.isfinite(y)
    x, y = x[finite], y[finite]
    n = x.size
    if n < 3:
        return None
    x_mean, y_mean = float(x.mean()), float(y.mean())
    x_sd, y_sd = float(x.std()), float(y.std())
    if not (x_sd > 0 and math.isfinite(x_sd) and math.isfinite(y_sd)):
        return None
    if y_sd <= FLAT_RELATIVE_SPREAD * (1.0 + abs(y_mean)):
        # y constant to rounding error (an ohmic current on a plot of ln(I/V)): a flat line.
        slope, intercept, n_outliers = 0.0, y_mean, 0
        y = np.full_like(y, y_mean)
    else:
        x_std, y_std = (x - x_mean) / x_sd, (y - y_mean) / y_sd
        huber = HuberRegressor(epsilon=HUBER_EPSILON, alpha=0.0, max_iter=HUBER_MAX_ITER,
                               tol=HUBER_TOL, warm_start=True)
        # Start L-BFGS from the least-squares line (warm_start reads these attributes): on
        # clean data it is already the optimum, which saves most of the iterations.
        ols_slope = float(np.mean(x_std * y_std))
        ols_residual = y_std - ols_slope * x_std
        huber.coef_ = np.array([ols_slope])
        huber.intercept_ = 0.0
        huber.scale_ = max(1.4826 * float(np.median(np.abs(ols_residual))), 1e-6)
        with warnings.catch_warnings():
            # A line through clean data drives the Huber scale to its lower bound; L-BFGS
            # may then stop on its iteration limit with a converged line. Not a user warning.
            warnings.simplefilter("ignore", SklearnConvergenceWarning)
            huber.fit(x_std[:, None], y_std)
        slope = float(huber.coef_[0]) * y_sd / x_sd
        intercept = y_mean + y_sd * float(huber.intercept_) - slope * x_mean
        n_outliers = int(np.count_nonzero(huber.outliers_))
    residual = y - (intercept + slope * x)
    ss_res = float(np.sum(residual**2))
    ss_tot = float(np.sum((y - y_mean) ** 2))
    s_xx = float(np.sum((x - x_mean) ** 2))
    s2 = ss_res / (n - 2)
    return RobustLine(
        slope=slope,
        slope_err=math.sqrt(s2 / s_xx),
        intercept=intercept,
        intercept_err=math.sqrt(s2 * (1.0 / n + x_mean**2 / s_xx)),
        r_squared=1.0 - ss_res / ss_tot if ss_tot > 0 else 1.0,
        n_outliers=n_outliers,
    )


def ols_slope(x: FloatArray, y: FloatArray) -> tuple[float, float]:
    """Ordinary-least-squares slope and its standard error (NaN error for n < 3)."""
    n = x.size
    x_c = x - x.mean()
    s_xx = float(np.sum(x_c**2))
    slope = float(np.sum(x_c * (y - y.mean())) / s_xx)
    if n < 3:
        return slope, math.nan
    residual = y - y.mean() - slope * x_c
    return slope, math.sqrt(float(np.sum(residual**2)) / (n - 2) / s_xx)


def zero_bias_line(plot_lines: Sequence[LineFit], key: str,
                   power: float) -> tuple[float, float, int] | None:
    """OLS line of a per-bias quantity against |V|^power: (intercept, slope, n biases).

    None when fewer than two biases give a finite value.
    """
    lines = [line for line in plot_lines if key in line.quantities]
    energies = np.array([line.quantities[key] for line in lines], dtype=float)
    roots = np.array([line.group_value for line in lines], dtype=float) ** power
    ok = np.isfinite(energies)
    if np.count_nonzero(ok) < 2 or np.ptp(roots[ok]) == 0:
        return None
    slope, _ = ols_slope(roots[ok], energies[ok])
    intercept = float(np.mean(energies[ok]) - slope * np.mean(roots[ok]))
    return intercept, slope, int(np.count_nonzero(ok))
