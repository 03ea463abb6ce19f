"""The sampling target of the evidence engine: a normalised prior and a vectorised likelihood.

The engine in :mod:`mechid.inference.tempering` and :mod:`mechid.inference.evidence` knows
nothing about physics. It sees a :class:`Target`: a parameter vector of fixed length, a
*proper, normalised* log prior (the evidence is only defined for a proper prior, and a
missing normalisation constant shifts every log-evidence by the log prior volume), exact
prior draws, and a log-likelihood evaluated for many parameter vectors in one call.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Protocol, runtime_checkable

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]


@runtime_checkable
class Target(Protocol):
    """What the evidence engine needs from a model.

    Attributes
    ----------
    ndim : int
        Number of sampled parameters.
    names : tuple of str
        Parameter names, ``len(names) == ndim``.

    Notes
    -----
    A target may also offer ``log_prior_and_likelihood(theta) -> (log_prior, log_like)``
    when the two share work; :func:`evaluate_target` then makes that one call instead.
    """

    ndim: int
    names: tuple[str, ...]

    def log_prior(self, theta: NDArray) -> NDArray:
        """Normalised log prior density, ``(m, ndim) -> (m,)``; ``-inf`` outside the support."""
        ...

    def log_likelihood(self, theta: NDArray) -> NDArray:
        """Log-likelihood, ``(m, ndim) -> (m,)``; non-finite values are read as ``-inf``."""
        ...

    def sample_prior(self, rng: np.random.Generator, n: int) -> NDArray:
        """``n`` exact, independent prior draws, shape ``(n, ndim)``."""
        ...


@dataclass(frozen=True)
class FunctionTarget:
    """A :class:`Target` assembled from three vectorised callables (tests, benchmarks, scripts).

    Parameters
    ----------
    names : tuple of str
        Parameter names; their number sets ``ndim``.
    log_prior_fn : callable
        ``(m, ndim) -> (m,)`` normalised log prior density.
    log_likelihood_fn : callable
        ``(m, ndim) -> (m,)`` log-likelihood.
    sample_prior_fn : callable
        ``(rng, n) -> (n, ndim)`` exact prior draws.
    """

    names: tuple[str, ...]
    log_prior_fn: Callable[[FloatArray], FloatArray]
    log_likelihood_fn: Callable[[FloatArray], FloatArray]
    sample_prior_fn: Callable[[np.random.Generator, int], FloatArray]

    @property
    def ndim(self) -> int:
        """Number of parameters."""
        return len(self.names)

    def log_prior(self, theta: NDArray) -> NDArray:
        """Normalised log prior density, ``(m, ndim) -> (m,)``."""
        return np.asarray(self.log_prior_fn(np.atleast_2d(theta)), dtype=float)

    def log_likelihood(self, theta: NDArray) -> NDArray:
        """Log-likelihood, ``(m, ndim) -> (m,)``."""
        return np.asarray(self.log_likelihood_fn(np.atleast_2d(theta)), dtype=float)

    def sample_prior(self, rng: np.random.Generator, n: int) -> NDArray:
        """``n`` exact prior draws, shape ``(n, ndim)``."""
        return np.asarray(self.sample_prior_fn(rng, n), dtype=float).reshape(n, self.ndim)


def evaluate_target(target: Target, theta: NDArray) -> tuple[FloatArray, FloatArray, int]:
    """Log prior and log-likelihood of many points, calling the likelihood only inside the prior.

    Parameters
    ----------
    target : Target
        The model.
    theta : ndarray, shape (m, ndim)
        Parameter vectors.

    Returns
    -------
    log_prior, log_likelihood : ndarray, shape (m,)
        Non-finite values (NaN, +-inf) are returned as ``-inf``; the log-likelihood is
        ``-inf`` wherever the prior density is zero, without evaluating it there.
    n_evaluated : int
        Number of points the likelihood was actually evaluated at.
    """
    theta = np.atleast_2d(np.asarray(theta, dtype=float))
    combined = getattr(target, "log_prior_and_likelihood", None)
    if combined is not None:  # a target that shares work between the two (one call)
        with np.errstate(all="ignore"):
            log_prior, log_likelihood = (np.asarray(v, dtype=float).reshape(len(theta))
                                         for v in combined(theta))
            log_prior = np.where(np.isfinite(log_prior), log_prior, -np.inf)
            log_likelihood = np.where(np.isfinite(log_prior) & np.isfinite(log_likelihood),
                                      log_likelihood, -np.inf)
        return log_prior, log_likelihood, int(np.count_nonzero(np.isfinite(log_prior)))
    with np.errstate(all="ignore"):
        log_prior = np.asarray(target.log_prior(theta), dtype=float).reshape(len(theta))
        finite_point = np.all(np.isfinite(theta), axis=1)
        log_prior = np.where(np.isfinite(log_prior) & finite_point, log_prior, -np.inf)
        log_likelihood = np.full(len(theta), -np.inf)
        inside = np.isfinite(log_prior)
        n_evaluated = int(np.count_nonzero(inside))
        if n_evaluated:
            values = np.asarray(target.log_likelihood(theta[inside]), dtype=float)
            values = values.reshape(n_evaluated)
            log_likelihood[inside] = np.where(np.isfinite(values), values, -np.inf)
    return log_prior, log_likelihood, n_evaluated
