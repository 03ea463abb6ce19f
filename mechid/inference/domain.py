"""Do the data pull a fit against its formula's validity domain?

A fit uses a formula only inside its validity domain (:mod:`mechid.catalogue.validity`): a
refused draw has likelihood zero. When the data would be described much better by the same
formula with parameters outside that domain (e.g. Fowler-Nordheim data at a temperature where
the Murphy-Good thermal factor would need pi c kT > 1, or direct-tunnelling data whose best fit
needs eV > phi0), the valid fit sits on the domain's edge and its parameters describe the edge,
not the data. :func:`check_domain` detects this cheaply: a short Nelder-Mead search of the
bare formula (validity not enforced) started from the fit's modes and from the best of a few
hundred prior draws scored with the bare formula, and a comparison of the best point it finds
outside the domain with the best valid one.

Margin. The check flags a pull when the bare formula outside the domain beats the best valid
point by more than :data:`DOMAIN_PULL_MARGIN` = 10 nats of log posterior. When the truth lies
inside the domain, relaxing one active inequality constraint gains a log-likelihood ratio
whose large-sample law is the 50:50 mixture of 0 and chi^2_1 / 2 (Self & Liang 1987, J. Am.
Stat. Assoc. 82, 605, case of a parameter on the boundary; from memory, not checked against
the paper): P(gain > 10) = P(chi^2_1 > 20) / 2 = 3.9e-6; with three active conditions,
P(chi^2_3 > 20) = 1.7e-4 at most. A gain of 10 nats is also a likelihood ratio of 2.2e4, well
beyond "very strong" on the Kass & Raftery (1995) scale (2 ln B > 10). The priors are the same
density on both sides, so the log posterior difference is the log-likelihood ratio plus the
change of the prior's log density (zero for uniform priors).

Cost: one vectorised call of :data:`SCREEN_DRAWS` prior draws, then at most
:data:`POLISH_EVALUATIONS` single-point likelihood calls per start (the modes and
:data:`SCREEN_STARTS` screened points): about a thousand parameter sets, measured in
``benchmarks/RESULTS.md``. The fit calls it after its last random draw, so the fit's numbers
do not change.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

import numpy as np
from numpy.typing import NDArray
from scipy import optimize

from mechid.catalogue.validity import validity_violations
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.start import _diverse
from mechid.results import DomainCheck

#: Gain (nats of log posterior) of the bare formula outside the domain above which the data
#: are said to pull outside it (see the module docstring for the false-alarm rate).
DOMAIN_PULL_MARGIN = 10.0
#: Likelihood evaluations of the bare-formula search (Nelder-Mead), per start.
POLISH_EVALUATIONS = 200
#: Prior draws scored with the bare formula (one vectorised call) ...
SCREEN_DRAWS = 256
#: ... of which this many diverse good ones are searched, besides the fit's modes.
SCREEN_STARTS = 2


def check_domain(
    target: MechanismTarget,
    starts: Sequence[NDArray],
    rng: np.random.Generator,
    *,
    margin: float = DOMAIN_PULL_MARGIN,
    max_evaluations: int = POLISH_EVALUATIONS,
) -> DomainCheck:
    """Compare the best valid point with the best point of the bare formula outside the domain.

    Parameters
    ----------
    target : MechanismTarget
        The fit's target (validity enforced).
    starts : sequence of ndarray
        Points to start the bare-formula search from, internal coordinates (the fit's modes).
    rng : numpy.random.Generator
        Source of the :data:`SCREEN_DRAWS` prior draws scored with the bare formula, of which
        :data:`SCREEN_STARTS` diverse good ones join the starts (a valid mode far from the
        data's best point, e.g. pressed into a corner of the box, is no good start).
    margin : float
        Gain in nats above which the check says the data pull outside the domain.
    max_evaluations : int
        Likelihood evaluations of the search per start.

    Returns
    -------
    DomainCheck
        The two log posteriors, the gain, the point outside and the conditions it breaks.
    """
    starts = np.atleast_2d(np.asarray(starts, dtype=float))
    if not target.mechanism.validity:
        best = float(np.max(target.log_posterior(starts)))
        return _no_point_outside(best, margin, len(starts))
    bare = replace(target, enforce_validity=False)
    draws = target.sample_prior(rng, SCREEN_DRAWS)
    scores = bare.log_posterior(draws)
    if np.any(np.isfinite(scores)):
        lower, upper = target.bounds
        picked = _diverse(draws, np.where(np.isfinite(scores), scores, -np.inf), upper - lower,
                          SCREEN_STARTS)
        starts = np.vstack([starts, picked])
    ends, calls = zip(*(_bare_search(bare, x, max_evaluations) for x in starts), strict=True)
    candidates = np.vstack([starts, *ends])
    inside = target.log_posterior(candidates)
    outside = bare.log_posterior(candidates)
    n_calls = int(sum(calls)) + 2 * len(candidates) + SCREEN_DRAWS
    best_inside = float(np.max(inside))
    refused = ~np.isfinite(inside) & np.isfinite(outside)
    if not refused.any():
        return _no_point_outside(best_inside, margin, n_calls)
    k = int(np.argmax(np.where(refused, outside, -np.inf)))
    physical = target.physical_values(candidates[k: k + 1])
    point = {name: float(values[0, 0]) for name, values in physical.items()}
    draws = {name: physical[name][:, 0] for name in target.mechanism.parameter_names}
    gain = float(outside[k]) - best_inside
    return DomainCheck(
        log_posterior_inside=best_inside, log_posterior_outside=float(outside[k]), gain=gain,
        margin=margin, pulls=bool(gain > margin), parameters_outside=point,
        violations=validity_violations(target.mechanism, target.voltage_V,
                                       target.temperature_K, draws, target.device),
        n_likelihood_calls=n_calls,
    )


def _no_point_outside(best_inside: float, margin: float, n_calls: int) -> DomainCheck:
    return DomainCheck(log_posterior_inside=best_inside, log_posterior_outside=float("nan"),
                       gain=float("nan"), margin=margin, pulls=False, parameters_outside={},
                       violations=(), n_likelihood_calls=n_calls)


def _bare_search(bare: MechanismTarget, start: NDArray, max_evaluations: int
                 ) -> tuple[NDArray, int]:
    """Nelder-Mead on the unit prior box from ``start``: the end point and the sets evaluated.

    Nelder-Mead, not a gradient method: at the domain's edge the bare formula may itself stop
    being finite (e.g. x/sin x beyond x = pi), which stalls a quasi-Newton line search at once.
    """
    lower, upper = bare.bounds
    span = upper - lower

    def negative(z: NDArray) -> float:
        value = bare.log_posterior((lower + np.clip(z, 0.0, 1.0) * span)[None, :])[0]
        return -value if np.isfinite(value) else 1e300

    z0 = np.clip((start - lower) / span, 0.0, 1.0)
    found = optimize.minimize(negative, z0, method="Nelder-Mead",
                              options={"maxfev": max_evaluations, "xatol": 1e-6, "fatol": 1e-3})
    end = lower + np.clip(np.asarray(found.x, dtype=float), 0.0, 1.0) * span
    return end, int(found.nfev)
