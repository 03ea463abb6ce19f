"""Parallel tempering: affine-invariant ensembles on a ladder of power posteriors, in lockstep.

Rung ``k`` of the ladder samples the power posterior
:math:`p_\\beta(\\theta) \\propto L(\\theta)^{\\beta_k}\\,\\pi(\\theta)` with
:math:`\\beta_k = (k/(K-1))^{p}`, so :math:`\\beta_0 = 0` is the prior and
:math:`\\beta_{K-1} = 1` the posterior. Power-law ladders put the rungs near
:math:`\\beta = 0`, where :math:`E_\\beta[\\log L]` changes fastest (Friel & Pettitt 2008,
JRSS-B 70:589; Calderhead & Girolami 2009, CSDA 53:4028).

Each rung is an ensemble of walkers moved by red-blue ensemble updates (Goodman & Weare
2010, CAMCoS 5:65; Foreman-Mackey et al. 2013, PASP 125:306): the walkers are split in two
halves at random and each half moves using the other half as its complement. All rungs
move *together*: the proposals of every rung for one half are stacked into a single
``(K * walkers/2, ndim)`` batch and the target's vectorised log-likelihood is called once
per half-step. The benchmark ``benchmarks/bench_evidence.py`` compares this with ``K``
separate ``emcee.EnsembleSampler`` objects run in lockstep: same algorithm, but ``2K``
small likelihood calls per step instead of 2, and emcee's per-call overhead.

Rung 0 (the prior) is refreshed with exact prior draws, an independence sampler whose
proposal is its target (always accepted), which feeds fresh prior mass into the ladder.
After every ``swap_every`` steps, neighbouring rungs exchange walkers with probability
:math:`\\min(1, \\exp[(\\beta_{k+1}-\\beta_k)(\\ell_k - \\ell_{k+1})])` (Geyer 1991;
Earl & Deem 2005, PCCP 7:3910), pairing the walkers of the two rungs at random; even pairs
are tried before odd pairs, each set in one vectorised operation.

All randomness comes from the one ``numpy.random.Generator`` passed in: the same seed gives
bit-identical chains.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from mechid.inference.target import FloatArray, Target, evaluate_target

if TYPE_CHECKING:  # the settings module imports the proposals defined here
    from mechid.inference.settings import LadderSettings

ProgressCallback = Callable[[int, int], None]

#: Attempts at redrawing a start position whose log-posterior is -inf before giving up.
_MAX_START_REDRAWS = 50
#: Smallest pool of prior draws resampled for the rung starts.
_START_POOL = 1024
#: Relative step sizes (in prior standard deviations) scanned for the start-ball widths.
_SCAN_STEPS = np.logspace(-8.0, 0.0, 17)
#: Drop of the log posterior (nats) taken as "one standard deviation away" in the scan.
_SCAN_DROP = 2.0


def start_pool_size(n_rungs: int, n_walkers: int) -> int:
    """Prior draws resampled for the rung starts (see ``TemperedLadder._resampled_start``)."""
    return max(_START_POOL, 4 * n_rungs * n_walkers)


# --------------------------------------------------------------------------------------
# Ensemble proposals, vectorised over rungs
# --------------------------------------------------------------------------------------


class EnsembleProposal:
    """A red-blue ensemble proposal applied to many ensembles (rungs) at once.

    Subclasses implement :meth:`propose` for arrays of shape ``(rungs, walkers, ndim)``.
    """

    def propose(
        self, active: FloatArray, complement: FloatArray, rng: np.random.Generator
    ) -> tuple[FloatArray, FloatArray]:
        """Propose new positions for the active half of every rung.

        Parameters
        ----------
        active : ndarray, shape (R, m, ndim)
            Current positions of the walkers being moved.
        complement : ndarray, shape (R, c, ndim)
            Positions of the other half of the same rung (held fixed).
        rng : numpy.random.Generator
            Random source.

        Returns
        -------
        proposal : ndarray, shape (R, m, ndim)
            Proposed positions.
        log_factor : ndarray, shape (R, m)
            Log of the proposal-density ratio added to the Metropolis-Hastings log ratio.
        """
        raise NotImplementedError


def _pick_distinct(
    rng: np.random.Generator, n_choices: int, shape: tuple[int, ...], count: int
) -> list[NDArray]:
    """``count`` (1-3) index arrays of ``shape``, mutually distinct element by element."""
    first = rng.integers(n_choices, size=shape)
    picks = [first]
    if count >= 2:
        picks.append((first + 1 + rng.integers(n_choices - 1, size=shape)) % n_choices)
    if count >= 3:
        low = np.minimum(picks[0], picks[1])
        high = np.maximum(picks[0], picks[1])
        third = rng.integers(n_choices - 2, size=shape)
        third = third + (third >= low)
        third = third + (third >= high)
        picks.append(third)
    return picks


def _gather(complement: FloatArray, index: NDArray) -> FloatArray:
    """Rows ``complement[r, index[r, i]]`` as an array ``(R, m, ndim)``."""
    rows = np.arange(complement.shape[0])[:, None]
    return complement[rows, index]


@dataclass(frozen=True)
class StretchProposal(EnsembleProposal):
    """Affine-invariant stretch move (Goodman & Weare 2010, CAMCoS 5:65, eqs. 7, 9, 10).

    :math:`Y = X_j + z (X_k - X_j)` with :math:`g(z) \\propto 1/\\sqrt{z}` on
    :math:`[1/a, a]`, accepted with the extra factor :math:`z^{d-1}`.

    Parameters
    ----------
    a : float
        Stretch scale (> 1); 2 is the value of Goodman & Weare.
    """

    a: float = 2.0

    def propose(self, active, complement, rng):  # noqa: D102 (documented on the base class)
        n_rungs, n_active, ndim = active.shape
        z = ((self.a - 1.0) * rng.random((n_rungs, n_active)) + 1.0) ** 2 / self.a
        (partner,) = _pick_distinct(rng, complement.shape[1], (n_rungs, n_active), 1)
        anchor = _gather(complement, partner)
        proposal = anchor + z[..., None] * (active - anchor)
        return proposal, (ndim - 1.0) * np.log(z)


@dataclass(frozen=True)
class DifferentialEvolutionProposal(EnsembleProposal):
    """Differential-evolution move (ter Braak 2006, Stat. Comput. 16:239; Nelson et al. 2014, ApJS 210:11).

    :math:`Y = X + \\gamma (X_{j} - X_{k})` with two distinct complement walkers. The
    jump is symmetric, so no Hastings factor. :math:`\\gamma_0 = 2.38/\\sqrt{2d}` is the
    optimal random-walk scale for Gaussian targets quoted by ter Braak (2006); with
    probability ``mode_hop_probability`` the step uses :math:`\\gamma = 1`, which jumps
    exactly between modes of equal shape (ter Braak 2006, sect. 3).

    Parameters
    ----------
    gamma_scatter : float
        Relative Gaussian scatter of :math:`\\gamma` around :math:`\\gamma_0` (keeps the
        step-length distribution continuous).
    mode_hop_probability : float
        Probability of a :math:`\\gamma = 1` step.
    """

    gamma_scatter: float = 0.1
    mode_hop_probability: float = 0.1

    def propose(self, active, complement, rng):  # noqa: D102
        n_rungs, n_active, ndim = active.shape
        first, second = _pick_distinct(rng, complement.shape[1], (n_rungs, n_active), 2)
        gamma = (2.38 / np.sqrt(2.0 * ndim)) * (
            1.0 + self.gamma_scatter * rng.standard_normal((n_rungs, n_active))
        )
        hop = rng.random((n_rungs, n_active)) < self.mode_hop_probability
        gamma = np.where(hop, 1.0, gamma)
        step = _gather(complement, first) - _gather(complement, second)
        return active + gamma[..., None] * step, np.zeros((n_rungs, n_active))


@dataclass(frozen=True)
class SnookerProposal(EnsembleProposal):
    """Differential-evolution snooker update (ter Braak & Vrugt 2008, Stat. Comput. 18:435).

    With three distinct complement walkers :math:`z, z_1, z_2`, the walker moves along the
    line through itself and :math:`z`: :math:`Y = X + \\gamma\\,u\\,u^T(z_1 - z_2)` with
    the *unit* vector :math:`u = (X - z)/\\lVert X - z\\rVert`, and the Hastings factor is
    :math:`(d-1)\\log(\\lVert Y - z\\rVert/\\lVert X - z\\rVert)`. :math:`\\gamma` is
    uniform on [1.2, 2.2] as in the paper.

    Parameters
    ----------
    gamma_low, gamma_high : float
        Range of the uniform jump scale.
    """

    gamma_low: float = 1.2
    gamma_high: float = 2.2

    def propose(self, active, complement, rng):  # noqa: D102
        n_rungs, n_active, ndim = active.shape
        centre, one, two = _pick_distinct(rng, complement.shape[1], (n_rungs, n_active), 3)
        z = _gather(complement, centre)
        offset = active - z
        with np.errstate(divide="ignore", invalid="ignore"):
            length = np.linalg.norm(offset, axis=-1)
            unit = offset / length[..., None]
            gamma = rng.uniform(self.gamma_low, self.gamma_high, size=(n_rungs, n_active))
            projection = np.sum(unit * (_gather(complement, one) - _gather(complement, two)), -1)
            proposal = active + (gamma * projection)[..., None] * unit
            log_factor = (ndim - 1.0) * (
                np.log(np.linalg.norm(proposal - z, axis=-1)) - np.log(length)
            )
        return proposal, log_factor


def temperature_ladder(n_temperatures: int, power: float) -> FloatArray:
    """Power-law ladder ``beta_k = (k / (K - 1)) ** power``, k = 0..K-1 (Friel & Pettitt 2008)."""
    betas = (np.arange(n_temperatures) / (n_temperatures - 1.0)) ** power
    betas[0], betas[-1] = 0.0, 1.0
    return betas


@dataclass
class LadderRun:
    """Recorded output of a tempered ladder (production steps only).

    Attributes
    ----------
    names : tuple of str
        Parameter names.
    betas : ndarray, shape (K,)
        Inverse temperatures, ``betas[0] == 0`` and ``betas[-1] == 1``.
    log_likelihood : ndarray, shape (K, steps, walkers)
        Log-likelihood of every rung's walkers at every recorded step.
    cold_chain : ndarray, shape (steps, walkers, ndim)
        Positions of the beta = 1 rung.
    cold_log_likelihood, cold_log_prior : ndarray, shape (steps, walkers)
        Log-likelihood and log prior of ``cold_chain``.
    swap_acceptance : ndarray, shape (K - 1,)
        Accepted fraction of swaps between rungs k and k+1 during production (NaN when
        swaps are disabled).
    move_acceptance : ndarray, shape (K,)
        Accepted fraction of ensemble moves per rung during production.
    n_burn : int
        Burn-in steps run before recording.
    n_likelihood_evaluations : int
        Points the likelihood was evaluated at (all phases, including the start).
    n_likelihood_batches : int
        Vectorised likelihood calls made.
    wall_time : float
        Seconds spent sampling.
    """

    names: tuple[str, ...]
    betas: FloatArray
    log_likelihood: FloatArray
    cold_chain: FloatArray
    cold_log_likelihood: FloatArray
    cold_log_prior: FloatArray
    swap_acceptance: FloatArray
    move_acceptance: FloatArray
    n_burn: int
    n_likelihood_evaluations: int
    n_likelihood_batches: int
    wall_time: float

    @property
    def n_steps(self) -> int:
        """Recorded production steps."""
        return int(self.log_likelihood.shape[1])

    @property
    def n_walkers(self) -> int:
        """Walkers per rung."""
        return int(self.log_likelihood.shape[2])


# --------------------------------------------------------------------------------------
# The lockstep engine
# --------------------------------------------------------------------------------------


class TemperedLadder:
    """Stateful lockstep sampler behind :func:`run_tempered_ladder` (resumable).

    Parameters
    ----------
    target : Target
        Model to sample.
    settings : LadderSettings
        Ladder settings (validated here).
    rng : numpy.random.Generator
        The one random source; consumed in a fixed order, so runs are reproducible.
    start : ndarray, shape (n, ndim) or (ndim,), optional
        Points near the posterior mode used to seed the beta > 0 rungs.
    """

    def __init__(
        self,
        target: Target,
        settings: LadderSettings,
        rng: np.random.Generator,
        start: NDArray | None = None,
    ) -> None:
        settings.validate(target.ndim)
        self.target = target
        self.settings = settings
        self.rng = rng
        self.betas = settings.betas()
        self.n_walkers = settings.walkers_for(target.ndim)
        weights = np.array([w for _, w in settings.proposals], dtype=float)
        self._proposal_weights = weights / weights.sum()
        self.n_evaluations = 0
        self.n_batches = 0
        self.wall_time = 0.0
        self.steps_done = 0
        self.n_burn = 0
        self._records: list[tuple[FloatArray, FloatArray, FloatArray]] = []
        self._swap_tries = np.zeros(len(self.betas) - 1)
        self._swap_accepts = np.zeros(len(self.betas) - 1)
        self._move_tries = np.zeros(len(self.betas))
        self._move_accepts = np.zeros(len(self.betas))
        began = time.perf_counter()
        self._initialise(start)
        self.wall_time += time.perf_counter() - began

    # -- evaluation -------------------------------------------------------------------

    def _evaluate(self, theta: FloatArray) -> tuple[FloatArray, FloatArray]:
        """Log prior and log-likelihood for ``(..., ndim)`` in one vectorised call."""
        lead_shape = theta.shape[:-1]
        log_prior, log_like, n_eval = evaluate_target(
            self.target, theta.reshape(-1, theta.shape[-1])
        )
        self.n_evaluations += n_eval
        self.n_batches += 1
        return log_prior.reshape(lead_shape), log_like.reshape(lead_shape)

    # -- initialisation ---------------------------------------------------------------

    def _initialise(self, start: NDArray | None) -> None:
        n_rungs, n_walkers, ndim = len(self.betas), self.n_walkers, self.target.ndim
        if start is None:
            positions, log_prior, log_like = self._resampled_start()
        else:
            prior_draws = self.target.sample_prior(self.rng, n_rungs * n_walkers)
            positions = prior_draws.reshape(n_rungs, n_walkers, ndim).copy()
            prior_sd = np.std(prior_draws, axis=0)
            prior_sd = np.where(prior_sd > 0, prior_sd, 1.0)
            centres = np.atleast_2d(np.asarray(start, dtype=float))
            if centres.shape[1] != ndim:
                raise ValueError(f"start must have {ndim} columns, got shape {centres.shape}")
            scales = self._start_scales(centres, prior_sd)
            positions[1:] = self._start_balls(centres, scales, prior_sd)
            log_prior, log_like = self._evaluate(positions)
        for _ in range(_MAX_START_REDRAWS):
            bad = ~(np.isfinite(log_prior) & np.isfinite(log_like))
            bad[0] = ~np.isfinite(log_prior[0])  # the prior rung accepts log L = -inf
            if not bad.any():
                break
            fresh = self.target.sample_prior(self.rng, int(bad.sum()))
            positions[bad] = fresh
            log_prior[bad], log_like[bad] = self._evaluate(fresh)
        self.positions, self.log_prior, self.log_like = positions, log_prior, log_like

    def _resampled_start(self) -> tuple[FloatArray, FloatArray, FloatArray]:
        """Start every rung from prior draws resampled with weights ``L^beta``.

        Sampling-importance-resampling (Rubin 1988, Bayesian Statistics 3:395): a pool of
        prior draws, weighted by ``L^beta_k`` and resampled with replacement, is approximately
        distributed as rung ``k``. Without replacement the picks would crowd into the peak
        (too narrow an ensemble, which affine-invariant moves widen only slowly); repeated
        walkers separate within a few steps. When the prior is close to the posterior (the
        reference path of :mod:`mechid.inference.reference`) the cold rungs start near
        equilibrium instead of contracting from the wider reference during the burn-in.
        """
        n_rungs, n_walkers = len(self.betas), self.n_walkers
        pool = self.target.sample_prior(self.rng, start_pool_size(n_rungs, n_walkers))
        pool_prior, pool_like = self._evaluate(pool)
        usable = np.nonzero(np.isfinite(pool_prior) & np.isfinite(pool_like))[0]
        picks = np.empty((n_rungs, n_walkers), dtype=int)
        picks[0] = np.arange(n_walkers)
        for k in range(1, n_rungs):
            if len(usable) == 0:  # nothing to weigh: plain prior draws (redrawn later)
                picks[k] = self.rng.choice(len(pool), size=n_walkers, replace=False)
                continue
            log_weight = self.betas[k] * pool_like[usable]
            weight = np.exp(log_weight - log_weight.max()) + 1e-300
            picks[k] = self.rng.choice(usable, size=n_walkers, replace=True, p=weight / weight.sum())
        return pool[picks], pool_prior[picks], pool_like[picks]

    def _start_scales(self, centres: FloatArray, prior_sd: FloatArray) -> FloatArray:
        """Per-parameter width of the posterior near ``centres[0]`` from a one-call scan.

        The log posterior is evaluated at ``centre +- h e_j`` for ``h`` on a geometric grid
        of prior standard deviations; the largest ``h`` with a drop of at most 2 nats gives
        ``sigma_j = h / sqrt(2 drop)`` (exact for a Gaussian's conditional widths).
        """
        ndim = self.target.ndim
        centre = centres[0]
        steps = _SCAN_STEPS[:, None] * prior_sd[None, :]  # (n_h, ndim)
        eye = np.eye(ndim)
        offsets = steps[:, :, None] * eye[None, :, :]  # (n_h, ndim, ndim)
        points = np.concatenate(
            [(centre + offsets).reshape(-1, ndim), (centre - offsets).reshape(-1, ndim),
             centre[None, :]]
        )
        log_prior, log_like = self._evaluate(points)
        with np.errstate(invalid="ignore"):
            log_post = log_prior + log_like
        top = log_post[-1]
        if not np.isfinite(top):
            return prior_sd
        n_h = len(_SCAN_STEPS)
        plus = log_post[: n_h * ndim].reshape(n_h, ndim)
        minus = log_post[n_h * ndim: 2 * n_h * ndim].reshape(n_h, ndim)
        with np.errstate(invalid="ignore"):
            best_side = np.fmax(plus, minus)  # a boundary MAP still has one finite side
            drop = np.where(np.isfinite(best_side), top - best_side, np.inf)
        exceeded = drop > _SCAN_DROP
        first = np.where(exceeded.any(axis=0), np.argmax(exceeded, axis=0), n_h)
        scales = prior_sd.copy()
        for j in range(ndim):
            if first[j] == 0:  # narrower than the finest step: extrapolate as a Gaussian
                scales[j] = steps[0, j] / np.sqrt(2.0 * drop[0, j]) if np.isfinite(
                    drop[0, j]) else steps[0, j]
            elif first[j] < n_h:  # largest step still within ~2 sd of the centre
                scales[j] = steps[first[j] - 1, j]
        return scales

    def _start_balls(
        self, centres: FloatArray, scales: FloatArray, prior_sd: FloatArray
    ) -> FloatArray:
        """Positions for rungs 1..K-1: Gaussian balls widened by 1/sqrt(beta), capped."""
        n_rungs, n_walkers, ndim = len(self.betas) - 1, self.n_walkers, self.target.ndim
        widths = np.minimum(scales[None, :] / np.sqrt(self.betas[1:, None]), prior_sd[None, :])
        picks = self.rng.integers(len(centres), size=(n_rungs, n_walkers))
        noise = self.rng.standard_normal((n_rungs, n_walkers, ndim))
        return centres[picks] + noise * widths[:, None, :]

    # -- one step ---------------------------------------------------------------------

    def _tempered(self, log_prior: FloatArray, log_like: FloatArray) -> FloatArray:
        """Log density of rungs 1..K-1 (beta > 0), arrays of shape (K-1, m)."""
        with np.errstate(invalid="ignore"):
            return log_prior + self.betas[1:, None] * log_like

    def _step(self) -> NDArray:
        """One red-blue update of every rung; returns accepted moves per rung."""
        n_rungs, n_walkers = len(self.betas), self.n_walkers
        half = n_walkers // 2
        choice = self.rng.choice(len(self._proposal_weights), p=self._proposal_weights)
        proposal_move = self.settings.proposals[choice][0]
        order = self.rng.permuted(np.tile(np.arange(n_walkers), (n_rungs, 1)), axis=1)
        rows = np.arange(n_rungs)[:, None]
        accepted = np.zeros(n_rungs)
        for part in range(2):
            moving = order[:, part * half: (part + 1) * half]
            fixed = order[:, (1 - part) * half: (2 - part) * half]
            hot = self.target.sample_prior(self.rng, half)[None]
            cold, log_factor = proposal_move.propose(
                self.positions[rows[1:], moving[1:]], self.positions[rows[1:], fixed[1:]], self.rng
            )
            candidate = np.concatenate([hot, cold], axis=0)
            new_prior, new_like = self._evaluate(candidate)
            with np.errstate(invalid="ignore"):
                log_ratio = (
                    log_factor
                    + self._tempered(new_prior[1:], new_like[1:])
                    - self._tempered(self.log_prior[rows[1:], moving[1:]],
                                     self.log_like[rows[1:], moving[1:]])
                )
            uniform = self.rng.random((n_rungs - 1, half))
            accept = np.ones((n_rungs, half), dtype=bool)
            with np.errstate(divide="ignore", invalid="ignore"):
                accept[1:] = np.log(uniform) < log_ratio  # NaN compares False: rejected
            accept[0] = np.isfinite(new_prior[0])
            target_rows, target_cols = np.nonzero(accept)
            walker = moving[target_rows, target_cols]
            self.positions[target_rows, walker] = candidate[target_rows, target_cols]
            self.log_prior[target_rows, walker] = new_prior[target_rows, target_cols]
            self.log_like[target_rows, walker] = new_like[target_rows, target_cols]
            accepted += accept.sum(axis=1)
        return accepted

    def _swap(self) -> NDArray:
        """One sweep of neighbour swaps: all even pairs (0-1, 2-3, ...) then all odd pairs.

        Within a phase the pairs share no rung, so each phase is one vectorised operation
        (the even-odd scheme of Okabe et al. 2001, Chem. Phys. Lett. 335:435). Walkers of
        the two rungs are paired by a random permutation. Returns accepted swaps per pair.
        """
        n_walkers = self.n_walkers
        accepted = np.zeros(len(self.betas) - 1)
        for first in (0, 1):
            lower = np.arange(first, len(self.betas) - 1, 2)
            if len(lower) == 0:
                continue
            upper = lower + 1
            partner = self.rng.permuted(np.tile(np.arange(n_walkers), (len(lower), 1)), axis=1)
            uniform = self.rng.random((len(lower), n_walkers))
            gap = (self.betas[upper] - self.betas[lower])[:, None]
            with np.errstate(invalid="ignore", divide="ignore"):
                log_ratio = gap * (
                    self.log_like[lower] - self.log_like[upper[:, None], partner]
                )
                accept = np.log(uniform) < log_ratio  # NaN compares False: rejected
            pair, mine = np.nonzero(accept)
            low_rung, high_rung, theirs = lower[pair], upper[pair], partner[pair, mine]
            for array in (self.positions, self.log_prior, self.log_like):
                held = array[low_rung, mine].copy()
                array[low_rung, mine] = array[high_rung, theirs]
                array[high_rung, theirs] = held
            accepted[lower] = accept.sum(axis=1)
        return accepted

    # -- public driving ---------------------------------------------------------------

    def run(
        self,
        n_steps: int,
        *,
        record: bool,
        progress: ProgressCallback | None = None,
        total: int | None = None,
    ) -> None:
        """Advance the ladder ``n_steps`` steps.

        Parameters
        ----------
        n_steps : int
            Steps to run.
        record : bool
            Record production samples (and acceptance statistics); False for burn-in.
        progress : callable, optional
            Called as ``progress(steps_done, total)`` after every step.
        total : int, optional
            Total steps reported to ``progress``; defaults to the steps done after this call.
        """
        began = time.perf_counter()
        total = self.steps_done + n_steps if total is None else total
        swap_every = self.settings.swap_every
        for _ in range(n_steps):
            moves_accepted = self._step()
            self.steps_done += 1
            swapped = swap_every > 0 and self.steps_done % swap_every == 0
            swaps_accepted = self._swap() if swapped else None
            if record:
                self._move_tries += self.n_walkers
                self._move_accepts += moves_accepted
                if swaps_accepted is not None:
                    self._swap_tries += self.n_walkers
                    self._swap_accepts += swaps_accepted
                if self.steps_done % self.settings.thin == 0:
                    self._records.append(
                        (self.log_like.copy(), self.positions[-1].copy(), self.log_prior[-1].copy())
                    )
            else:
                self.n_burn += 1
            if progress is not None:
                progress(self.steps_done, max(total, self.steps_done))
        self.wall_time += time.perf_counter() - began

    @property
    def n_production_steps(self) -> int:
        """Production steps run so far (recorded or thinned away)."""
        return self.steps_done - self.n_burn

    def snapshot(self) -> LadderRun:
        """The recorded production as a :class:`LadderRun` (arrays are copies)."""
        if not self._records:
            raise ValueError("no production steps recorded yet")
        log_like = np.stack([r[0] for r in self._records], axis=1)
        with np.errstate(invalid="ignore"):
            swap = self._swap_accepts / self._swap_tries
            moves = self._move_accepts / self._move_tries
        return LadderRun(
            names=tuple(self.target.names),
            betas=self.betas.copy(),
            log_likelihood=log_like,
            cold_chain=np.stack([r[1] for r in self._records]),
            cold_log_likelihood=log_like[-1].copy(),
            cold_log_prior=np.stack([r[2] for r in self._records]),
            swap_acceptance=swap,
            move_acceptance=moves,
            n_burn=self.n_burn,
            n_likelihood_evaluations=self.n_evaluations,
            n_likelihood_batches=self.n_batches,
            wall_time=self.wall_time,
        )


def run_tempered_ladder(
    target: Target,
    settings: LadderSettings,
    rng: np.random.Generator,
    start: NDArray | None = None,
    progress: ProgressCallback | None = None,
) -> LadderRun:
    """Run burn-in and the first production block of a tempered ladder.

    Parameters
    ----------
    target : Target
        Model with a normalised prior and a vectorised log-likelihood.
    settings : LadderSettings
        Ladder size, walkers, step counts and proposals.
    rng : numpy.random.Generator
        The only random source (same seed, same chains).
    start : ndarray, shape (n, ndim) or (ndim,), optional
        Points near the mode (e.g. a MAP estimate); the beta > 0 rungs start in Gaussian
        balls around them, widened by ``1/sqrt(beta)``; -inf starts are redrawn from the
        prior. Without ``start`` every rung starts from prior draws.
    progress : callable, optional
        ``progress(steps_done, total_steps)`` after every step.

    Returns
    -------
    LadderRun
        The production samples and diagnostics.

    Examples
    --------
    >>> import numpy as np
    >>> from scipy import stats
    >>> from mechid.inference.target import FunctionTarget
    >>> target = FunctionTarget(
    ...     ("x",),
    ...     lambda t: stats.uniform(-5, 10).logpdf(t[:, 0]),
    ...     lambda t: -0.5 * t[:, 0] ** 2,
    ...     lambda rng, n: rng.uniform(-5, 5, (n, 1)))
    >>> run = run_tempered_ladder(target, LadderSettings(n_temperatures=4, n_burn=20,
    ...                           n_production=50), np.random.default_rng(1))
    >>> run.cold_chain.shape
    (50, 32, 1)
    """
    ladder = TemperedLadder(target, settings, rng, start)
    total = settings.n_burn + settings.n_production
    ladder.run(settings.n_burn, record=False, progress=progress, total=total)
    ladder.run(settings.n_production, record=True, progress=progress, total=total)
    return ladder.snapshot()


def proposal_names(proposals: Sequence[tuple[EnsembleProposal, float]]) -> list[str]:
    """Readable ``"Name (weight)"`` labels of a proposal mixture (for reports)."""
    return [f"{type(p).__name__} ({w:g})" for p, w in proposals]
