"""Rank mechanisms by Bayesian evidence: posterior probabilities, Bayes factors, verbal scale.

Posterior probability of mechanism k with prior odds pi_k:

.. math::  P(M_k | D) = \\frac{\\pi_k Z_k}{\\sum_j \\pi_j Z_j}

Its Monte Carlo uncertainty comes from propagating each log-evidence's error (independent
normal errors, 2000 draws). A family's probability (tunnelling, emission, hopping, ...) is the
sum over its members, with its error propagated from the same draws. Bayes factors and the
verbal strength follow Kass & Raftery (1995, J. Am. Stat. Assoc. 90, 773, section 3.2),
whose 2 ln B thresholds 2, 6 and 10 are 1, 3 and 5 in ln B.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from scipy.special import logsumexp, softmax

#: Kass & Raftery (1995) scale on ln B (their 2 ln B thresholds halved).
KASS_RAFTERY_SCALE: tuple[tuple[float, str], ...] = (
    (1.0, "not worth more than a bare mention"),
    (3.0, "positive"),
    (5.0, "strong"),
    (np.inf, "very strong"),
)


def kass_raftery_wording(ln_bayes_factor: float) -> str:
    """Verbal strength of ln B on the Kass & Raftery (1995) scale (the sign says which model).

    Returns ``"undefined"`` for NaN; an infinite ln B is ``"very strong"``.
    """
    value = abs(float(ln_bayes_factor))
    if np.isnan(value):
        return "undefined"
    return next(words for bound, words in KASS_RAFTERY_SCALE if value < bound)


@dataclass(frozen=True)
class Ranking:
    """Mechanisms ranked by posterior probability (best first)."""

    ids: tuple[str, ...]
    log_evidence: tuple[float, ...]
    log_evidence_err: tuple[float, ...]
    probability: tuple[float, ...]
    probability_err: tuple[float, ...]
    ln_bayes_factor_vs_best: tuple[float, ...]
    ln_bayes_factor_vs_best_err: tuple[float, ...]

    @property
    def best(self) -> str:
        """Id of the most probable mechanism."""
        return self.ids[0]

    @property
    def ln_bayes_factor_best_vs_runner_up(self) -> float:
        """ln B of the leader against the second (inf when only one was fitted)."""
        return -self.ln_bayes_factor_vs_best[1] if len(self.ids) > 1 else float("inf")

    @property
    def ln_bayes_factor_best_vs_runner_up_err(self) -> float:
        """Monte Carlo error of :attr:`ln_bayes_factor_best_vs_runner_up`."""
        return self.ln_bayes_factor_vs_best_err[1] if len(self.ids) > 1 else 0.0

    @property
    def resolved(self) -> bool:
        """False when the leader's margin is within twice its Monte Carlo error."""
        return self.ln_bayes_factor_best_vs_runner_up > 2 * self.ln_bayes_factor_best_vs_runner_up_err


def rank_mechanisms(
    log_evidence: Mapping[str, float],
    log_evidence_err: Mapping[str, float],
    prior_odds: Mapping[str, float] | None = None,
    rng: np.random.Generator | None = None,
    n_draws: int = 2000,
) -> Ranking:
    """Rank mechanisms by posterior probability.

    Parameters
    ----------
    log_evidence, log_evidence_err : mapping
        ln Z and its Monte Carlo standard error per mechanism id (-inf allowed for a model
        that cannot describe the data at all).
    prior_odds : mapping, optional
        Relative prior weights (equal when omitted; need not sum to one).
    rng : numpy.random.Generator, optional
        For the error propagation (deterministic default seed 0).
    """
    ids: Sequence[str] = list(log_evidence)
    logz = np.array([log_evidence[i] for i in ids], dtype=float)
    err = np.array([log_evidence_err[i] for i in ids], dtype=float)
    weights = np.array([1.0 if prior_odds is None else prior_odds.get(i, 1.0) for i in ids])
    if np.any(weights <= 0):
        raise ValueError("prior odds must be positive")
    log_w = np.log(weights / weights.sum())
    logits = logz + log_w
    prob = softmax(logits) if np.isfinite(logsumexp(logits)) else np.full(len(ids), np.nan)

    rng = rng or np.random.default_rng(0)
    draws = logits + np.where(np.isfinite(err), err, 0.0) * rng.standard_normal((n_draws, len(ids)))
    prob_err = softmax(draws, axis=1).std(axis=0)

    # Order by log posterior weight, not by probability: probabilities of clearly losing
    # mechanisms underflow to exactly 0 and would tie.
    order = np.argsort(-np.nan_to_num(logits, nan=-np.inf), kind="stable")
    best = order[0]
    ln_b = logz - logz[best]
    ln_b_err = np.sqrt(err**2 + err[best] ** 2)
    ln_b_err[best] = 0.0
    return Ranking(
        ids=tuple(ids[i] for i in order),
        log_evidence=tuple(float(logz[i]) for i in order),
        log_evidence_err=tuple(float(err[i]) for i in order),
        probability=tuple(float(prob[i]) for i in order),
        probability_err=tuple(float(prob_err[i]) for i in order),
        ln_bayes_factor_vs_best=tuple(float(ln_b[i]) for i in order),
        ln_bayes_factor_vs_best_err=tuple(float(ln_b_err[i]) for i in order),
    )


@dataclass(frozen=True)
class FamilyProbability:
    """The summed posterior probability of one family of mechanisms.

    Attributes
    ----------
    family : str
        The family declared by the mechanisms (e.g. ``"tunnelling"``).
    probability, probability_err : float
        Sum of the members' posterior probabilities, and its Monte Carlo error.
    members : tuple of str
        Mechanism ids of the family among those fitted, most probable first.
    """

    family: str
    probability: float
    probability_err: float
    members: tuple[str, ...]


def family_probabilities(
    log_evidence: Mapping[str, float],
    log_evidence_err: Mapping[str, float],
    families: Mapping[str, str],
    prior_odds: Mapping[str, float] | None = None,
    rng: np.random.Generator | None = None,
    n_draws: int = 2000,
) -> tuple[FamilyProbability, ...]:
    """Posterior probability of each family: the sum over its members, most probable first.

    Parameters
    ----------
    log_evidence, log_evidence_err, prior_odds, rng, n_draws
        As in :func:`rank_mechanisms` (prior odds are per mechanism).
    families : mapping
        Family of every mechanism id in ``log_evidence``.
    """
    ranking = rank_mechanisms(log_evidence, log_evidence_err, prior_odds, rng, n_draws=1)
    ids = list(ranking.ids)
    logz = np.array(ranking.log_evidence)
    err = np.array(ranking.log_evidence_err)
    weights = np.array([1.0 if prior_odds is None else prior_odds.get(i, 1.0) for i in ids])
    logits = logz + np.log(weights / weights.sum())
    rng = rng or np.random.default_rng(0)
    draws = logits + np.where(np.isfinite(err), err, 0.0) * rng.standard_normal((n_draws, len(ids)))
    drawn = softmax(draws, axis=1)
    prob = np.array(ranking.probability)
    found = []
    for family in dict.fromkeys(families[i] for i in ids):
        members = np.array([families[i] == family for i in ids])
        found.append(FamilyProbability(
            family=family, probability=float(prob[members].sum()),
            probability_err=float(drawn[:, members].sum(axis=1).std()),
            members=tuple(i for i, m in zip(ids, members, strict=True) if m),
        ))
    return tuple(sorted(found, key=lambda f: -np.nan_to_num(f.probability, nan=-1.0)))
