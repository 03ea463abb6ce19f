"""Starting points for the samplers: a maximum a posteriori (MAP) search.

Walkers that start far from the posterior mode waste the burn-in or get stuck on islands
(emcee FAQ, "initialisation"). The search is: a vectorised screen of many prior draws plus
the hints from the linearisation tests, then a Nelder-Mead polish of the best few.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
from numpy.typing import NDArray
from scipy import optimize

from mechid.inference.likelihood import MechanismTarget


def hint_vectors(target: MechanismTarget, hints: Mapping[str, float], rng: np.random.Generator,
                 n: int = 64) -> NDArray:
    """Prior draws with the hinted parameters set to their hinted values (where in range)."""
    draws = target.sample_prior(rng, n)
    for column, prior in enumerate(target.free):
        value = hints.get(prior.name)
        if value is None or not np.isfinite(value) or not (prior.lower <= value <= prior.upper):
            continue
        draws[:, column] = prior.to_internal(value)
    return draws


def find_map(
    target: MechanismTarget,
    rng: np.random.Generator,
    hints: Mapping[str, float] | None = None,
    n_screen: int = 2000,
    n_polish: int = 2,
) -> NDArray:
    """Approximate MAP point of ``target`` in internal coordinates, shape ``(ndim,)``.

    Parameters
    ----------
    target : MechanismTarget
        Posterior to maximise.
    rng : numpy.random.Generator
        Source of the screening draws.
    hints : mapping, optional
        Parameter values suggested by the linearisation tests (physical units).
    n_screen : int
        Number of prior draws screened in vectorised batches.
    n_polish : int
        Number of best screened points polished with Nelder-Mead.
    """
    candidates = [target.sample_prior(rng, n_screen)]
    if hints:
        candidates.append(hint_vectors(target, hints, rng))
    points = np.vstack(candidates)
    scores = np.concatenate([target.log_posterior(chunk) for chunk in np.array_split(points, 8)])
    if not np.any(np.isfinite(scores)):
        return points[0]
    best = points[np.argsort(-scores)[:n_polish]]

    lower = np.array([p.internal_bounds()[0] for p in target.free])
    upper = np.array([p.internal_bounds()[1] for p in target.free])
    span = upper - lower

    def negative(z: NDArray) -> float:
        value = target.log_posterior((lower + z * span)[None, :])[0]
        return -value if np.isfinite(value) else 1e300

    polished = []
    for x0 in best:
        # Quasi-Newton on the unit box first (fast along the long, correlated ridges these
        # models have), then a Nelder-Mead pass that does not trust the numerical gradient.
        z0 = np.clip((x0 - lower) / span, 0.0, 1.0)
        first = optimize.minimize(negative, z0, method="L-BFGS-B", bounds=[(0.0, 1.0)] * len(z0),
                                  options={"maxiter": 300})
        second = optimize.minimize(negative, first.x, method="Nelder-Mead",
                                   options={"maxiter": 100 * target.ndim, "xatol": 1e-9, "fatol": 1e-4})
        polished.append(min((first, second), key=lambda r: r.fun))
    winner = min(polished, key=lambda r: r.fun)
    return lower + np.clip(np.asarray(winner.x, dtype=float), 0.0, 1.0) * span
