"""A reference distribution close to the posterior, and the path that starts from it.

Why: with a Gaussian noise model on currents spanning ten or more decades, prior draws give
log-likelihoods down to -1e25 while the posterior sits at +1e3. The power-posterior path from
the prior to the posterior then crosses some 25 decades of beta, far more than a practical
ladder can bridge. The *generalised stepping-stone* method (Fan, Wu, Chen, Kuo & Lewis 2011,
Mol. Biol. Evol. 28, 523) replaces the prior at the hot end of the ladder by a normalised
reference distribution r close to the posterior:

.. math::

    p_\\beta(\\theta) \\propto r(\\theta)^{1-\\beta}\\,[L(\\theta)\\pi(\\theta)]^{\\beta},
    \\qquad Z = \\int L\\pi\\,d\\theta = E_r\\!\\left[\\frac{L\\pi}{r}\\right].

This module builds r from a short emcee run at beta = 1 (the *pilot*) and wraps the model as
a :class:`ReferencePathTarget` whose "prior" is r and whose "likelihood" is L*pi/r, so the
evidence engine's stepping-stone, thermodynamic-integration and bridge estimators apply
unchanged and still estimate Z of the original model (Lefebvre, Steele & Vandal 2010,
Comput. Stat. Data Anal. 54, 1719, give the matching path-sampling identity).

The reference is a multivariate Student-t with 10 degrees of freedom whose scale is the average
of the pilot draws' covariance and the Laplace covariance at the MAP, widened and truncated to
the prior support. Its tails are heavier than a Gaussian's,
so the ratio L*pi/r stays bounded, yet light enough that thermodynamic integration's first
rung is not dominated by rare catastrophic fits. Its mass inside the support is estimated
from many cheap draws and enters log r.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import emcee
import numpy as np
from numpy.typing import NDArray
from scipy.special import gammaln

from mechid.errors import MechidError
from mechid.inference.settings import SearchSettings
from mechid.inference.target import Target

#: Degrees of freedom of the Student-t reference (heavy tails keep L*pi/r bounded).
REFERENCE_DOF = 10.0
#: Scale factor applied to the pilot covariance.
REFERENCE_WIDENING = 1.5
#: Draws used to estimate the reference mass inside the prior support.
MASS_DRAWS = 200_000
#: Least share of the reference's mass inside the prior box: below it, exact draws by
#: rejection would need more than 1000 proposals each.
MIN_INSIDE_SHARE = 1e-3
#: Largest batch of proposals drawn at once when sampling the truncated reference.
MAX_BATCH = 200_000


class SamplerStartError(MechidError):
    """The sampler could not be started for a mechanism on these data (not a physics verdict).

    Raised when the pilot ensemble cannot start or the reference distribution fitted to it
    lies almost wholly outside the prior box; the analysis lists the mechanism as not fitted
    with this reason instead of stopping.
    """


@dataclass
class StudentReference:
    """A mixture of multivariate Student-t components truncated to a box, normalised.

    One component per posterior mode found (usually one).

    Parameters
    ----------
    means : ndarray, shape (k, d)
        Component locations.
    scales : ndarray, shape (k, d, d)
        Component scale matrices (covariance times (dof - 2)/dof).
    weights : ndarray, shape (k,)
        Mixture weights (normalised here).
    lower, upper : ndarray, shape (d,)
        Box (the prior support in sampling coordinates).
    dof : float
        Degrees of freedom.
    rng : numpy.random.Generator
        Used once to estimate the mass inside the box.
    """

    means: NDArray
    scales: NDArray
    weights: NDArray
    lower: NDArray
    upper: NDArray
    dof: float
    rng: np.random.Generator
    log_mass: float = field(init=False)
    mass_err: float = field(init=False)

    def __post_init__(self) -> None:
        self.weights = np.asarray(self.weights, dtype=float) / np.sum(self.weights)
        self._log_weights = np.log(self.weights)
        # Cholesky factors and their inverses: the density and the draws are plain matrix
        # products (scipy's per-call overhead dominated the ladder's hot loop).
        d = self.means.shape[1]
        self._cholesky = np.array([np.linalg.cholesky(c) for c in self.scales])
        self._inverse_cholesky = np.array([np.linalg.inv(chol) for chol in self._cholesky])
        self._log_norm = np.array([
            gammaln((self.dof + d) / 2) - gammaln(self.dof / 2) - 0.5 * d * np.log(self.dof * np.pi)
            - np.sum(np.log(np.diag(chol))) for chol in self._cholesky
        ])
        self.log_mass = 0.0
        draws = self._untruncated(self.rng, MASS_DRAWS)
        inside = self._inside(draws).mean()
        if inside < MIN_INSIDE_SHARE:
            raise SamplerStartError(
                f"the reference distribution fitted to the pilot run puts {inside:.2g} of its "
                f"mass inside the prior box (at least {MIN_INSIDE_SHARE:g} needed): the pilot "
                "walkers did not settle inside the parameter ranges")
        self.log_mass = float(np.log(inside))
        self.mass_err = float(np.sqrt((1 - inside) / (inside * MASS_DRAWS)))

    def _inside(self, theta: NDArray) -> NDArray:
        return np.all((theta >= self.lower) & (theta <= self.upper), axis=1)

    def _untruncated(self, rng: np.random.Generator, n: int) -> NDArray:
        """Draws of the untruncated mixture: ``mean + L z / sqrt(u / dof)``, u ~ chi2(dof)."""
        d = self.means.shape[1]
        component = (rng.choice(len(self.weights), size=n, p=self.weights) if len(self.weights) > 1
                     else np.zeros(n, dtype=int))
        normal = rng.standard_normal((n, d))
        stretch = np.sqrt(self.dof / rng.chisquare(self.dof, size=n))
        correlated = np.einsum("nij,nj->ni", self._cholesky[component], normal)
        return self.means[component] + correlated * stretch[:, None]

    def log_density(self, theta: NDArray) -> NDArray:
        """Normalised log density ``(m, d) -> (m,)``; -inf outside the box."""
        theta = np.atleast_2d(theta)
        d = theta.shape[1]
        terms = np.empty((len(self.weights), theta.shape[0]))
        for k in range(len(self.weights)):
            z = (theta - self.means[k]) @ self._inverse_cholesky[k].T
            maha = np.einsum("ij,ij->i", z, z)
            terms[k] = (self._log_weights[k] + self._log_norm[k]
                        - 0.5 * (self.dof + d) * np.log1p(maha / self.dof))
        if len(terms) == 1:
            values = terms[0]
        else:
            top = terms.max(axis=0)
            values = top + np.log(np.sum(np.exp(terms - top), axis=0))
        return np.where(self._inside(theta), values - self.log_mass, -np.inf)

    def sample(self, rng: np.random.Generator, n: int) -> NDArray:
        """``n`` exact draws (rejection from the untruncated mixture)."""
        acceptance = float(np.exp(self.log_mass))
        kept: list[NDArray] = []
        count = 0
        while count < n:
            wanted = max(int(1.2 * (n - count) / acceptance) + 8, 16)
            batch = self._untruncated(rng, min(wanted, MAX_BATCH))  # bounded memory
            batch = batch[self._inside(batch)]
            kept.append(batch)
            count += len(batch)
        return np.vstack(kept)[:n]


@dataclass
class ReferencePathTarget:
    """The model seen along the reference-to-posterior path (a :class:`Target`).

    Its prior is the reference r and its likelihood L*pi/r, so its evidence equals the
    evidence of ``model``.
    """

    model: Target
    reference: StudentReference

    @property
    def ndim(self) -> int:
        """Number of sampled parameters."""
        return self.model.ndim

    @property
    def names(self) -> tuple[str, ...]:
        """Parameter names."""
        return self.model.names

    def log_prior(self, theta: NDArray) -> NDArray:
        """log r(theta)."""
        return self.reference.log_density(theta)

    def log_likelihood(self, theta: NDArray) -> NDArray:
        """log L + log pi - log r."""
        theta = np.atleast_2d(theta)
        with np.errstate(invalid="ignore"):
            value = (self.model.log_likelihood(theta) + self.model.log_prior(theta)
                     - self.reference.log_density(theta))
        return np.where(np.isfinite(value), value, -np.inf)

    def log_prior_and_likelihood(self, theta: NDArray) -> tuple[NDArray, NDArray]:
        """Both at once, with log r computed once and L only where r > 0 and pi > 0."""
        theta = np.atleast_2d(theta)
        log_r = self.reference.log_density(theta)
        log_pi = np.full(len(theta), -np.inf)
        inside = np.isfinite(log_r)
        log_pi[inside] = self.model.log_prior(theta[inside])
        value = np.full(len(theta), -np.inf)
        ok = inside & np.isfinite(log_pi)
        if ok.any():
            value[ok] = self.model.log_likelihood(theta[ok]) + log_pi[ok] - log_r[ok]
        return log_r, np.where(np.isfinite(value), value, -np.inf)

    def sample_prior(self, rng: np.random.Generator, n: int) -> NDArray:
        """Exact draws from r."""
        return self.reference.sample(rng, n)


def local_scales(target: Target, centre: NDArray, lower: NDArray, upper: NDArray) -> NDArray:
    """Per-parameter step over which the log posterior drops by about 2 nats (one call)."""
    steps = np.logspace(-9, 0, 19)[:, None] * (upper - lower)[None, :]  # (s, d)
    d = len(centre)
    points = np.repeat(centre[None, None, :], len(steps), axis=0).repeat(d, axis=1)  # (s, d, d)
    idx = np.arange(d)
    points[:, idx, idx] += steps
    flat = np.clip(points.reshape(-1, d), lower, upper)
    logp = target.log_prior(flat) + _finite_like(target, flat)
    drop = (target.log_prior(centre[None]) + _finite_like(target, centre[None]))[0] - logp
    drop = drop.reshape(len(steps), d)
    scales = np.empty(d)
    for j in range(d):
        ok = np.nonzero(drop[:, j] <= 2.0)[0]
        scales[j] = steps[ok[-1], j] if ok.size else steps[0, j]
    return scales


def laplace_covariance(target: Target, centre: NDArray, scales: NDArray, lower: NDArray,
                       upper: NDArray) -> NDArray:
    """Inverse of the negative Hessian of the log posterior at ``centre`` (one vectorised call).

    Central finite differences with steps of half the local 2-nat scales. Along the long,
    correlated ridges of these models the conditional scales are far narrower than the
    marginal ones; this covariance captures the ridge, so the pilot's walkers start spread
    along it. Parameters within a step of a prior bound (e.g. a noise floor pressed against
    its lower limit) keep ``scales**2`` and no correlation; if the interior Hessian is not
    negative definite the result is ``diag(scales**2)``.
    """
    h = 0.5 * scales
    fallback = np.diag(scales**2)
    interior = np.nonzero((centre - h > lower) & (centre + h < upper))[0]
    if interior.size == 0:
        return fallback
    signs = np.array([(1, 1), (1, -1), (-1, 1), (-1, -1)], dtype=float)
    pairs = [(a, b) for a in range(interior.size) for b in range(a, interior.size)]
    points = np.repeat(centre[None, :], 4 * len(pairs), axis=0)
    for k, (a, b) in enumerate(pairs):
        i, j = interior[a], interior[b]
        block = points[4 * k: 4 * k + 4]
        block[:, i] += signs[:, 0] * h[i]
        block[:, j] += signs[:, 1] * h[j]
    f = target.log_prior(points) + target.log_likelihood(points)
    if not np.all(np.isfinite(f)):
        return fallback
    hessian = np.empty((interior.size, interior.size))
    for k, (a, b) in enumerate(pairs):
        pp, pm, mp, mm = f[4 * k: 4 * k + 4]
        hessian[a, b] = hessian[b, a] = (pp - pm - mp + mm) / (4 * h[interior[a]] * h[interior[b]])
    try:
        sub = np.linalg.inv(-hessian)
        np.linalg.cholesky(sub)
    except np.linalg.LinAlgError:
        return fallback
    cov = fallback.copy()
    cov[np.ix_(interior, interior)] = 0.5 * (sub + sub.T)
    return cov


def _finite_like(target: Target, theta: NDArray) -> NDArray:
    value = target.log_likelihood(theta)
    return np.where(np.isfinite(value), value, -1e300)


def _regularised_covariance(chain: NDArray, scales: NDArray) -> NDArray:
    """Sample covariance made safely positive definite.

    A pilot on a badly misfitting model can leave a parameter (nearly) constant across the
    ensemble; its variance is then floored at a tenth of the local 2-nat scale, and all
    eigenvalues at 1e-8 of the largest.
    """
    cov = np.atleast_2d(np.cov(chain, rowvar=False))
    cov = 0.5 * (cov + cov.T)
    floor = (0.1 * scales) ** 2
    cov[np.diag_indices_from(cov)] = np.maximum(np.diag(cov), floor)
    values, vectors = np.linalg.eigh(cov)
    values = np.maximum(values, 1e-8 * values.max())  # scipy treats < ~2e-10 x max as singular
    return (vectors * values) @ vectors.T


@dataclass
class PilotRun:
    """Cold-chain draws of the pilot run and the reference built from them."""

    draws: NDArray
    reference: StudentReference
    n_likelihood_calls: int


def pilot_reference(
    target: Target,
    start: NDArray | Sequence[NDArray],
    lower: NDArray,
    upper: NDArray,
    rng: np.random.Generator,
    *,
    search: SearchSettings,
    log_posteriors: Sequence[float] | None = None,
) -> PilotRun:
    """Run emcee at beta = 1 at each mode and fit the Student-t mixture reference.

    Parameters
    ----------
    target : Target
        The model (normalised prior, vectorised likelihood).
    start : ndarray, shape (d,), or sequence of them
        Point(s) near the posterior mode(s), e.g. from :func:`mechid.inference.start.find_modes`.
    lower, upper : ndarray, shape (d,)
        Prior support in sampling coordinates.
    rng : numpy.random.Generator
        The random source (emcee receives states drawn from it).
    search : SearchSettings
        ``pilot_steps``: steps of the first block (the last ``pilot_steps // 2`` are used);
        ``pilot_max_steps``: cap on the pilot length while the log posterior is still
        rising. The ensemble has ``max(32, 4 d)`` walkers, rounded up to even.
    log_posteriors : sequence of float, optional
        Log posterior at each start; with several modes the mixture weights are their
        Laplace masses, each floored at 5 % so that every mode keeps reference draws.
    """
    starts = [np.asarray(start, float)] if np.ndim(start) == 1 else [np.asarray(x, float) for x in start]
    parts = [_pilot_component(target, x, lower, upper, rng, search.pilot_steps,
                              search.pilot_max_steps) for x in starts]
    means = np.array([part[1] for part in parts])
    covs = np.array([part[2] for part in parts])
    if len(parts) == 1 or log_posteriors is None:
        weights = np.full(len(parts), 1.0 / len(parts))
    else:
        log_mass = np.array([lp + 0.5 * np.linalg.slogdet(c)[1]
                             for lp, c in zip(log_posteriors, covs, strict=True)])
        weights = np.exp(log_mass - log_mass.max())
        weights = np.maximum(weights / weights.sum(), 0.05)
    shapes = covs * REFERENCE_WIDENING**2 * (REFERENCE_DOF - 2) / REFERENCE_DOF
    reference = StudentReference(means, shapes, weights, lower, upper, REFERENCE_DOF, rng)
    return PilotRun(np.vstack([part[0] for part in parts]), reference,
                    int(sum(part[3] for part in parts)))


def _pull_invalid_walkers(p0: NDArray, start: NDArray,
                          log_prob: Callable[[NDArray], NDArray]) -> NDArray:
    """Move starting walkers with log posterior -inf halfway to the mode, until none is left.

    A mode next to the edge of a formula's validity domain (where the model is refused) puts
    part of a Gaussian ball outside it; emcee must not start walkers there.
    """
    p0 = p0.copy()
    for _ in range(40):
        bad = ~np.isfinite(log_prob(p0))
        if not bad.any():
            break
        p0[bad] = start + 0.5 * (p0[bad] - start)
    return p0


def _pilot_component(
    target: Target, start: NDArray, lower: NDArray, upper: NDArray, rng: np.random.Generator,
    n_steps: int, max_steps: int,
) -> tuple[NDArray, NDArray, NDArray, int]:
    """emcee run at one mode: (draws, mean, covariance for the reference, likelihood calls)."""
    d = target.ndim
    walkers = max(32, 4 * d)
    walkers += walkers % 2
    scales = local_scales(target, start, lower, upper)
    cov0 = laplace_covariance(target, start, scales, lower, upper)
    p0 = start + rng.standard_normal((walkers, d)) @ np.linalg.cholesky(cov0).T
    p0 = np.clip(p0, lower, upper)

    def log_prob(theta: NDArray) -> NDArray:
        lp = target.log_prior(theta)
        out = np.full(len(theta), -np.inf)
        ok = np.isfinite(lp)
        if ok.any():
            out[ok] = lp[ok] + target.log_likelihood(theta[ok])
        return np.where(np.isfinite(out), out, -np.inf)

    p0 = _pull_invalid_walkers(p0, start, log_prob)
    sampler = emcee.EnsembleSampler(
        walkers, d, log_prob, vectorize=True,
        # emcee 3.1.6's DESnookerMove does not use a unit vector (measured: posterior variances
        # 8-10 % too narrow), so only DE and stretch moves are used here.
        moves=[(emcee.moves.DEMove(), 0.8), (emcee.moves.StretchMove(), 0.2)],
    )
    sampler.random_state = np.random.RandomState(int(rng.integers(2**32 - 1))).get_state()
    # Run in blocks until the ensemble's median log posterior stops rising (the walkers have
    # reached the typical set), then keep the last ``n_steps // 2`` steps.
    try:
        state = sampler.run_mcmc(p0, n_steps // 2, progress=False)
    except ValueError as refused:  # emcee: the starting ensemble is (nearly) singular
        raise SamplerStartError(f"the pilot ensemble could not start: {refused}") from None
    steps = n_steps // 2
    while steps < max_steps:
        previous = np.median(sampler.get_log_prob()[-n_steps // 4:])
        try:
            state = sampler.run_mcmc(state, n_steps // 2, progress=False)
        except ValueError as refused:  # the ensemble collapsed onto a lower-dimensional set
            raise SamplerStartError(f"the pilot ensemble collapsed: {refused}") from None
        steps += n_steps // 2
        if np.median(sampler.get_log_prob()[-n_steps // 4:]) - previous < 1.0:
            break
    chain = sampler.get_chain(discard=steps - n_steps // 2, flat=True)
    log_prob_chain = sampler.get_log_prob(discard=steps - n_steps // 2, flat=True)
    # Average the pilot's sample covariance with the Laplace one: a short pilot under-spreads
    # along near-degenerate ridges (measured: 40-50 % too narrow after 400 steps on the
    # thickness/dielectric-constant ridge of Poole-Frenkel), the Laplace covariance does not.
    # The Laplace covariance is taken again at the pilot's best point, which is closer to the
    # mode than the optimiser's result when that stopped early.
    best = chain[int(np.argmax(log_prob_chain))]
    if np.max(log_prob_chain) > target.log_prior(start[None])[0] + _finite_like(target, start[None])[0]:
        scales = local_scales(target, best, lower, upper)
        cov0 = laplace_covariance(target, best, scales, lower, upper)
    cov = 0.5 * (_regularised_covariance(chain, scales) + cov0)
    return chain, np.mean(chain, axis=0), cov, walkers * steps
