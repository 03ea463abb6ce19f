"""Starting points for the samplers: a search for the posterior's modes.

Walkers that start far from the posterior mode waste the burn-in or get stuck on islands
(emcee FAQ, "initialisation"). The search is: a vectorised screen of many prior draws plus
the hints from the linearisation tests; a quasi-Newton (L-BFGS-B) then Nelder-Mead polish of
several *diverse* good candidates; and a merge of polished points that lie in the same basin
(no dip of more than 2 nats on the straight line between them). Several modes do occur: the
Simmons tunnelling formula, for instance, often admits two (barrier, thickness, mass)
solutions of similar posterior height.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy import optimize

from mechid.catalogue.base import ParameterHints
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.settings import SearchSettings

#: Modes further than this below the best (nats) carry negligible mass (< ~3e-4) and are dropped.
MODE_WINDOW = 8.0
#: Finite-difference step on the unit box for the optimiser's gradient.
_GRADIENT_STEP = 1e-6
#: A dip deeper than this (nats) on the line between two optima separates two modes.
BASIN_DIP = 2.0


@dataclass(frozen=True)
class Mode:
    """A polished local maximum of the log posterior (internal coordinates)."""

    point: NDArray
    log_posterior: float


def hint_vectors(target: MechanismTarget, hints: ParameterHints, rng: np.random.Generator,
                 n: int = 64) -> NDArray:
    """Prior draws with the hinted parameters set to their hinted values (where in range).

    Raises
    ------
    ValueError
        When the hints are for another mechanism or name a parameter it does not declare
        (a hand-off keyed by anything but parameter names would otherwise be ignored).
    """
    mechanism = target.mechanism
    unknown = sorted(set(hints.values) - set(mechanism.parameter_names))
    if hints.mechanism_id != mechanism.id or unknown:
        raise ValueError(f"hints for {hints.mechanism_id!r} (parameters {unknown or 'known'}) "
                         f"do not fit {mechanism.id!r} ({', '.join(mechanism.parameter_names)})")
    draws = target.sample_prior(rng, n)
    for column, prior in enumerate(target.free):
        value = hints.values.get(prior.name)
        if value is None or not np.isfinite(value) or not (prior.lower <= value <= prior.upper):
            continue
        draws[:, column] = prior.to_internal(value)
    return draws


def _diverse(points: NDArray, scores: NDArray, span: NDArray, count: int) -> NDArray:
    """Greedy max-min selection of ``count`` points among the best-scored 5 %."""
    order = np.argsort(-scores)
    pool = points[order[: max(count, len(points) // 20)]]
    unit = pool / span
    chosen = [0]
    distance = np.linalg.norm(unit - unit[0], axis=1)
    while len(chosen) < min(count, len(pool)):
        nxt = int(np.argmax(distance))
        chosen.append(nxt)
        distance = np.minimum(distance, np.linalg.norm(unit - unit[nxt], axis=1))
    return pool[chosen]


def find_modes(
    target: MechanismTarget,
    rng: np.random.Generator,
    hints: ParameterHints | Sequence[ParameterHints] | None = None,
    *,
    search: SearchSettings,
) -> list[Mode]:
    """Distinct posterior modes, best first (internal coordinates).

    Parameters
    ----------
    target : MechanismTarget
        Posterior to maximise.
    rng : numpy.random.Generator
        Source of the screening draws.
    hints : ParameterHints or sequence of them, optional
        Parameter values read from the straightened plots (or another fit), keyed by
        parameter name (physical units); per set, 64 prior draws with these values set join
        the screen.
    search : SearchSettings
        ``n_screen`` prior draws are screened in vectorised batches, then ``n_polish``
        diverse good candidates are polished (the best screened point is always one).
    """
    candidates = [target.sample_prior(rng, search.n_screen)]
    for hint_set in ((hints,) if isinstance(hints, ParameterHints) else hints or ()):
        if hint_set.values:
            candidates.append(hint_vectors(target, hint_set, rng))
    points = np.vstack(candidates)
    scores = np.concatenate([target.log_posterior(chunk) for chunk in np.array_split(points, 8)])
    lower = np.array([p.internal_bounds()[0] for p in target.free])
    upper = np.array([p.internal_bounds()[1] for p in target.free])
    span = upper - lower
    if not np.any(np.isfinite(scores)):
        return [Mode(points[0], -np.inf)]
    starts = _diverse(points, np.where(np.isfinite(scores), scores, -np.inf), span, search.n_polish)

    def negative(z: NDArray) -> float:
        value = target.log_posterior((lower + z * span)[None, :])[0]
        return -value if np.isfinite(value) else 1e300

    def negative_and_gradient(z: NDArray) -> tuple[float, NDArray]:
        return _value_and_central_gradient(target, z, lower, span)

    polished = []
    for x0 in starts:
        # Quasi-Newton on the unit box (fast along the long, correlated ridges these models
        # have), then a Nelder-Mead pass that needs no gradient.
        z0 = np.clip((x0 - lower) / span, 0.0, 1.0)
        first = optimize.minimize(negative_and_gradient, z0, jac=True, method="L-BFGS-B",
                                  bounds=[(0.0, 1.0)] * len(z0), options={"maxiter": 300})
        # L-BFGS-B can report success on a shoulder thousands of nats below the mode (its
        # relative tolerance on |log posterior| ~ 1e4 is loose), so Nelder-Mead always follows.
        second = optimize.minimize(negative, first.x, method="Nelder-Mead",
                                   options={"maxiter": 100 * target.ndim, "xatol": 1e-9,
                                            "fatol": 1e-4})
        best = min((first, second), key=lambda r: r.fun)
        polished.append(Mode(lower + np.clip(np.asarray(best.x, float), 0.0, 1.0) * span, -best.fun))
    return _merge_basins(target, polished)


def _value_and_central_gradient(target: MechanismTarget, z: NDArray, lower: NDArray,
                                span: NDArray) -> tuple[float, NDArray]:
    """Negative log posterior on the unit box and its central-difference gradient.

    All ``2 d + 1`` points go to the vectorised likelihood in one call (scipy's own finite
    differences would make ``d + 1`` separate calls). Steps are clipped at the box edges and
    the difference divided by the actual distance.
    """
    d = len(z)
    eye = np.eye(d) * _GRADIENT_STEP
    points = np.clip(np.vstack([z[None, :], z + eye, z - eye]), 0.0, 1.0)
    values = target.log_posterior(lower + points * span)
    if not np.isfinite(values[0]):
        return 1e300, np.zeros(d)
    values = np.where(np.isfinite(values), values, values[0] - 1e6)
    axis = np.arange(d)
    distance = points[1 + axis, axis] - points[d + 1 + axis, axis]
    moved = distance > 0
    gradient = np.zeros(d)
    gradient[moved] = (values[1: d + 1][moved] - values[d + 1:][moved]) / distance[moved]
    return -float(values[0]), -gradient


def _merge_basins(target: MechanismTarget, modes: list[Mode]) -> list[Mode]:
    """Keep the best optimum of each basin, within :data:`MODE_WINDOW` of the overall best."""
    modes = sorted(modes, key=lambda m: -m.log_posterior)
    kept: list[Mode] = []
    for mode in modes:
        if mode.log_posterior < modes[0].log_posterior - MODE_WINDOW:
            continue
        same = False
        for other in kept:
            line = other.point + np.linspace(0, 1, 13)[:, None] * (mode.point - other.point)
            values = target.log_posterior(line)
            if np.min(values) >= min(mode.log_posterior, other.log_posterior) - BASIN_DIP:
                same = True
                break
        if not same:
            kept.append(mode)
    return kept


def find_map(
    target: MechanismTarget,
    rng: np.random.Generator,
    hints: ParameterHints | Sequence[ParameterHints] | None = None,
    *,
    search: SearchSettings,
) -> NDArray:
    """Approximate MAP point (the best of :func:`find_modes`), shape ``(ndim,)``."""
    return find_modes(target, rng, hints, search=search)[0].point
