"""Joint multi-temperature likelihood of one mechanism, vectorised over walkers and points.

Noise model: one of the laws of :mod:`mechid.inference.noise` (by default the heteroscedastic
Gaussian, sigma_i^2 = (s_rel I(V_i, T_i; theta))^2 + sigma_floor^2, so points near the floor,
including negative readings at tiny bias, are weighted correctly). Both noise parameters are
nuisance parameters with stated priors (:func:`mechid.inference.priors.noise_priors`),
marginalised by the sampler.

Physical parameters are shared across all temperatures and both polarities (a mechanism whose
parameters differ between the polarities declares them separately, see
:mod:`mechid.catalogue.polarity`).
"""

from __future__ import annotations

import functools
import os
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue.base import Mechanism
from mechid.device import Device
from mechid.inference.noise import (
    GAUSSIAN,
    NoiseLaw,
    noise_sd,
    noise_variance,
    summed_log_density,
)
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE, Prior

_MAX_THREADS = max(1, min(4, os.cpu_count() or 1))
_THREADS = {"count": _MAX_THREADS}
#: Below about this many walker-points per chunk, thread overhead outweighs the gain.
_POINTS_PER_CHUNK = 20_000


def set_likelihood_threads(count: int) -> None:
    """Threads used to evaluate large likelihood batches (1 in worker processes)."""
    _THREADS["count"] = max(1, min(_MAX_THREADS, int(count)))


@functools.cache
def _pool() -> ThreadPoolExecutor:
    return ThreadPoolExecutor(max_workers=_MAX_THREADS, thread_name_prefix="mechid-likelihood")


@dataclass
class MechanismTarget:
    """Posterior target of one mechanism on one series (the evidence engine's ``Target``).

    Parameters
    ----------
    mechanism : Mechanism
        The catalogue declaration.
    voltage_V, temperature_K, current_A : ndarray
        The kept data points, shape ``(n,)``.
    device : Device
        Device description (area for density formulas).
    priors : tuple of Prior
        One per mechanism parameter, then the two noise parameters, in that order.
    enforce_validity : bool, optional
        True (what fits use): the model is NaN, so the likelihood -inf, outside the
        formula's validity domain. False: the bare formula (the domain check of
        :mod:`mechid.inference.domain` only). A composite's window condition holds either
        way: it restricts the hypothesis' prior, it is not a validity domain.
    noise_law : NoiseLaw, optional
        How the measured currents scatter about the model (default: Gaussian in current).
    """

    mechanism: Mechanism
    voltage_V: NDArray
    temperature_K: NDArray
    current_A: NDArray
    device: Device
    priors: tuple[Prior, ...]
    enforce_validity: bool = True
    noise_law: NoiseLaw = GAUSSIAN
    free: tuple[Prior, ...] = field(init=False)

    def __post_init__(self) -> None:
        self.voltage_V = np.asarray(self.voltage_V, dtype=float)
        self.temperature_K = np.asarray(self.temperature_K, dtype=float)
        self.current_A = np.asarray(self.current_A, dtype=float)
        self.free = tuple(p for p in self.priors if not p.is_fixed)
        # An odd current is evaluated once per distinct (|V|, T) pair (halves the cost for
        # sweeps of both polarities); a signed formula once per distinct (V, T) pair.
        odd = self.mechanism.is_odd
        pairs = np.column_stack([np.abs(self.voltage_V) if odd else self.voltage_V,
                                 self.temperature_K])
        unique, self._inverse = np.unique(pairs, axis=0, return_inverse=True)
        self._inverse = self._inverse.ravel()
        self._unique_abs_voltage, self._unique_temperature = unique[:, 0], unique[:, 1]
        self._sign = np.sign(self.voltage_V) if odd else np.ones_like(self.voltage_V)
        # Sufficient statistics per (|V|, T) pair: the likelihood then needs the model and the
        # variance only once per pair (the +V and -V points share both).
        n_unique = len(unique)
        self._pair_count = np.bincount(self._inverse, minlength=n_unique).astype(float)
        self._pair_signed_sum = np.bincount(self._inverse, self._sign * self.current_A, n_unique)
        self._pair_square_sum = np.bincount(self._inverse, self.current_A**2, n_unique)
        self._pair_nonzero = ((self._unique_abs_voltage != 0) | (not odd)).astype(float)
        self._prior_lo = np.array([p.internal_bounds()[0] for p in self.free])
        self._prior_hi = np.array([p.internal_bounds()[1] for p in self.free])
        self._vector_prior = _VectorPrior.from_priors(self.free)

    @property
    def ndim(self) -> int:
        """Number of sampled (free) parameters."""
        return len(self.free)

    @property
    def names(self) -> tuple[str, ...]:
        """Names of the sampled parameters, in vector order."""
        return tuple(p.name for p in self.free)

    @property
    def bounds(self) -> tuple[NDArray, NDArray]:
        """Support of the free parameters in the internal coordinates (lower, upper)."""
        return self._prior_lo, self._prior_hi

    @property
    def n_points(self) -> int:
        """Number of data points in the likelihood."""
        return int(self.current_A.size)

    def physical_values(self, theta: NDArray) -> dict[str, NDArray]:
        """Map internal vectors ``(m, ndim)`` to physical values of every prior, shape ``(m, 1)``."""
        theta = np.atleast_2d(theta)
        values: dict[str, NDArray] = {}
        column = 0
        for prior in self.priors:
            if prior.is_fixed:
                values[prior.name] = np.full((theta.shape[0], 1), float(prior.value))
            else:
                values[prior.name] = prior.to_physical(theta[:, column : column + 1])
                column += 1
        return values

    def _pair_magnitude(self, values: dict[str, NDArray]) -> NDArray:
        """|I| at each distinct (|V|, T) pair, shape ``(m, pairs)``, from physical values.

        For a mechanism declared by its signed formula: the signed I at each distinct (V, T).
        """
        physical = {name: values[name] for name in self.mechanism.parameter_names}
        return self.mechanism.current(
            self._unique_abs_voltage, self._unique_temperature, physical, self.device,
            enforce_validity=self.enforce_validity,
        )

    def model_current(self, theta: NDArray) -> NDArray:
        """Model current in A, shape ``(m, n)``, for internal vectors ``(m, ndim)``."""
        magnitude = self._pair_magnitude(self.physical_values(theta))
        return magnitude[:, self._inverse] * self._sign

    def noise_sd(self, theta: NDArray, model: NDArray) -> NDArray:
        """Per-point ``sqrt((s_rel I)^2 + floor^2)`` in A, shape ``(m, n)``.

        The standard deviation under the Gaussian law, the scale under Student-t.
        """
        values = self.physical_values(theta)
        return noise_sd(model, values[NOISE_RELATIVE], values[NOISE_FLOOR])

    def standardise(self, theta: NDArray, model: NDArray, observed: NDArray) -> NDArray:
        """Residuals of ``observed`` about ``model`` in units of the noise law, ``(m, n)``."""
        values = self.physical_values(theta)
        return self.noise_law.standardise(observed, model, values[NOISE_RELATIVE],
                                          values[NOISE_FLOOR])

    def draw_noisy(self, theta: NDArray, model: NDArray, rng: np.random.Generator) -> NDArray:
        """Measured currents simulated about ``model`` by the noise law, ``(m, n)``."""
        values = self.physical_values(theta)
        return self.noise_law.draw(model, values[NOISE_RELATIVE], values[NOISE_FLOOR], rng)

    def log_prior(self, theta: NDArray) -> NDArray:
        """Normalised log prior of internal vectors ``(m, ndim)`` -> ``(m,)``.

        The sum of :meth:`mechid.inference.priors.Prior.log_density` over the free
        parameters, evaluated for all of them at once (a test checks the two agree).
        """
        return self._vector_prior.log_density(np.atleast_2d(theta))

    def log_likelihood(self, theta: NDArray) -> NDArray:
        """Log likelihood of the series under the noise law, ``(m, ndim)`` -> ``(m,)``; -inf where invalid.

        Large batches are split in chunks evaluated on a small thread pool: NumPy releases
        the GIL inside its array loops, so the chunks run on separate cores.
        """
        theta = np.atleast_2d(theta)
        inside = np.all((theta >= self._prior_lo) & (theta <= self._prior_hi), axis=1)
        result = np.full(theta.shape[0], -np.inf)
        if not inside.any():
            return result
        ok = theta[inside]
        n_chunks = min(_THREADS["count"], max(1, ok.shape[0] * self.n_points // _POINTS_PER_CHUNK))
        if n_chunks > 1:
            parts = list(_pool().map(self._log_likelihood_block, np.array_split(ok, n_chunks)))
            loglike = np.concatenate(parts)
        else:
            loglike = self._log_likelihood_block(ok)
        result[inside] = loglike
        return result

    def _log_likelihood_block(self, theta: NDArray) -> NDArray:
        """The summed log density of the points; -inf where the model is invalid.

        Gaussian law, per pair u with n_u points:
        sum_i (I_i - s_i m_u)^2 = S2_u - 2 m_u S1_u + n_u m_u^2 (sufficient statistics).
        Other laws: the law's density point by point.
        """
        with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
            values = self.physical_values(theta)
            magnitude = self._pair_magnitude(values) * self._pair_nonzero  # model 0 at V = 0
            relative, floor = values[NOISE_RELATIVE], values[NOISE_FLOOR]
            if self.noise_law is GAUSSIAN:
                variance = noise_variance(magnitude, relative, floor)
                squares = (self._pair_square_sum - 2.0 * magnitude * self._pair_signed_sum
                           + self._pair_count * magnitude**2)
                loglike = summed_log_density(squares, variance, self._pair_count)
            else:
                model = magnitude[:, self._inverse] * self._sign
                loglike = np.sum(self.noise_law.log_density(self.current_A, model, relative,
                                                            floor), axis=1)
            # The window condition is part of the hypothesis (its prior), not a validity
            # domain: it holds also when the validity conditions are lifted.
            if self.mechanism.window_condition is not None:
                physical = {name: values[name] for name in self.mechanism.parameter_names}
                admissible = self.mechanism.window_condition(
                    self._unique_abs_voltage, self._unique_temperature, self.device, **physical)
                loglike = np.where(admissible, loglike, -np.inf)
        return np.where(np.isfinite(loglike), loglike, -np.inf)

    def log_posterior(self, theta: NDArray) -> NDArray:
        """Unnormalised log posterior ``(m, ndim) -> (m,)``."""
        lp = self.log_prior(theta)
        out = np.full(lp.shape, -np.inf)
        ok = np.isfinite(lp)
        if ok.any():
            out[ok] = lp[ok] + self.log_likelihood(np.atleast_2d(theta)[ok])
        return out

    def sample_prior(self, rng: np.random.Generator, n: int) -> NDArray:
        """``n`` exact prior draws of the free parameters, shape ``(n, ndim)``."""
        return np.column_stack([p.sample(rng, n) for p in self.free])

    def standardised_residuals(self, theta: NDArray) -> NDArray:
        """Residuals in units of the noise law for one internal vector, shape ``(n,)``.

        (I_obs - I_model)/sigma for the Gaussian and Student-t laws, the glog difference over
        s_rel for the log-normal law.
        """
        theta = np.atleast_2d(theta)[:1]
        model = self.model_current(theta)
        return self.standardise(theta, model, self.current_A)[0]


@dataclass(frozen=True)
class _VectorPrior:
    """The product of independent priors, as arrays (one column per free parameter).

    Every kind's log density is ``constant + normal term + Jacobian term`` in the internal
    coordinate; see :meth:`mechid.inference.priors.Prior.log_density` for each term.
    """

    lower: NDArray
    upper: NDArray
    constant: NDArray
    in_log10: NDArray
    normal: NDArray
    mean: NDArray
    sd: NDArray
    jacobian: NDArray

    @classmethod
    def from_priors(cls, priors: tuple[Prior, ...]) -> _VectorPrior:
        constant, normal, mean, sd = [], [], [], []
        for prior in priors:
            lo, hi = prior.internal_bounds()
            if prior.kind == "log_uniform":
                constant.append(-np.log(hi - lo))
            elif prior.kind == "uniform":
                constant.append(-np.log(prior.upper - prior.lower))
            elif prior.kind == "truncated_normal":
                constant.append(-np.log(prior.sd * np.sqrt(2 * np.pi)) - prior.log_normal_mass)
            else:
                raise ValueError(f"{prior.name}: a fixed parameter has no density")
            normal.append(prior.kind == "truncated_normal")
            mean.append(prior.mean if prior.kind == "truncated_normal" else 0.0)
            sd.append(prior.sd if prior.kind == "truncated_normal" else 1.0)
        return cls(
            lower=np.array([p.internal_bounds()[0] for p in priors]),
            upper=np.array([p.internal_bounds()[1] for p in priors]),
            constant=np.array(constant),
            in_log10=np.array([p.log_scale for p in priors]),
            normal=np.array(normal),
            mean=np.array(mean, dtype=float),
            sd=np.array(sd, dtype=float),
            jacobian=np.array([p.log_coordinate and p.kind != "log_uniform" for p in priors]),
        )

    def log_density(self, theta: NDArray) -> NDArray:
        """``(m, d) -> (m,)``, -inf outside the support."""
        inside = np.all((theta >= self.lower) & (theta <= self.upper), axis=1)
        with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
            value = np.where(self.in_log10, 10.0**theta, theta)
            z = np.where(self.normal, (value - self.mean) / self.sd, 0.0)
            terms = self.constant - 0.5 * z**2
            terms = terms + np.where(self.jacobian, np.log(np.abs(value) * np.log(10.0)), 0.0)
            total = np.sum(terms, axis=1)
        return np.where(inside, total, -np.inf)
