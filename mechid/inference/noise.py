"""The one noise model of mechid: heteroscedastic Gaussian noise on the current.

.. math::

    I^{obs} \\sim \\mathcal{N}\\big(I,\\; \\sigma^2 = (s_{rel}\\, I)^2 + \\sigma_{floor}^2\\big)

The relative term describes instrument gain error and device-to-sweep scatter, the floor the
instrument's current noise. The likelihood (:mod:`mechid.inference.likelihood`), the
posterior predictive checks (:mod:`mechid.inference.adequacy`), the predictive band of the
report (:mod:`mechid.inference.predictive`) and the simulator (:mod:`mechid.simulate`) all
use the functions here, so the model is written once.

Every function broadcasts: model currents ``(m, n)`` with noise parameters ``(m, 1)``
(one row per parameter vector), or plain scalars.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

#: ln(2 pi), the normalising constant of the Gaussian density.
LOG_2PI = float(np.log(2 * np.pi))


def noise_variance(model_A: ArrayLike, relative: ArrayLike, floor_A: ArrayLike) -> NDArray:
    """Variance of the measured current about the model, ``(s_rel I)^2 + floor^2`` in A^2.

    Parameters
    ----------
    model_A : array_like
        Model current (either sign; only its magnitude matters).
    relative : array_like
        Relative noise ``s_rel`` (dimensionless).
    floor_A : array_like
        Noise floor ``sigma_floor`` in A.
    """
    return (np.asarray(relative) * model_A) ** 2 + np.asarray(floor_A) ** 2


def noise_sd(model_A: ArrayLike, relative: ArrayLike, floor_A: ArrayLike) -> NDArray:
    """Standard deviation of the measured current, ``sqrt((s_rel I)^2 + floor^2)`` in A."""
    return np.sqrt(noise_variance(model_A, relative, floor_A))


def summed_log_density(squared_residuals: NDArray, variance: NDArray, counts: NDArray) -> NDArray:
    """Gaussian log density of grouped points, summed over the last axis.

    A group ``u`` holds ``n_u`` points sharing one model value and one variance
    ``v_u``; ``squared_residuals[u]`` is the sum of their squared residuals. Then

    .. math::

        \\ln L = -\\tfrac12 \\sum_u \\big(S_u / v_u + n_u \\ln v_u\\big) - \\tfrac12 N \\ln 2\\pi,
        \\qquad N = \\sum_u n_u,

    the sum of the normal log densities of the points. With ``counts`` all ones it is the
    ordinary sum over points.

    Parameters
    ----------
    squared_residuals : ndarray, shape (..., groups)
        Sum of squared residuals of each group, A^2.
    variance : ndarray, shape (..., groups)
        Noise variance of each group, A^2.
    counts : ndarray, shape (groups,)
        Points in each group.

    Returns
    -------
    ndarray, shape (...)
        The log density.
    """
    n_points = float(np.sum(counts))
    return (-0.5 * np.sum(squared_residuals / variance + counts * np.log(variance), axis=-1)
            - 0.5 * LOG_2PI * n_points)


def add_noise(model_A: NDArray, sd_A: NDArray, rng: np.random.Generator) -> NDArray:
    """One draw of measured currents: ``model + sd * z`` with standard normal ``z``.

    The draws of ``z`` follow the shape of ``model_A`` (row by row), so the same generator
    state gives the same currents.
    """
    return model_A + sd_A * rng.standard_normal(np.shape(model_A))
