"""Fit several mechanisms in rounds, on worker processes when there are cores to spare.

Each mechanism's fit is independent (its own random stream, its own data copy), so two fits
can run at once on a two-core laptop: the samplers' Python-level work (mode search, emcee
pilot, ladder bookkeeping) runs on one core per fit instead of one core for all.

Determinism does not depend on the number of workers or on scheduling: mechanisms are taken
in the given order in rounds of :data:`ROUND_SIZE`, and the "far below the leader" threshold
of a round (see :func:`mechid.inference.fit.fit_mechanism`) uses only the evidences of earlier
rounds. One worker runs the same rounds in this process.

Workers are forked where the platform allows it (spawned elsewhere) and use one likelihood
thread each. Progress reports travel back through a queue; warnings raised in a worker are
re-issued here. A ladder without extensions (``max_production == n_production``, e.g. the
quick settings) makes no far-below decisions, so all its fits form one round, unless
mechanisms far below the leader are skipped after their mode search
(``below_leader_margin``): then the first round's evidences serve every later fit, which
forms a second round.
"""

from __future__ import annotations

import multiprocessing
import os
import queue as queue_module
import time
import warnings
from collections.abc import Callable, Iterable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue import get_mechanism
from mechid.catalogue.base import ParameterHints
from mechid.catalogue.validity import FormulaNotApplicableError
from mechid.device import Device
from mechid.errors import MechidWarning
from mechid.inference.fit import BelowLeaderError, MechanismFit, fit_mechanism
from mechid.inference.likelihood import MechanismTarget, set_likelihood_threads
from mechid.inference.noise import GAUSSIAN, NoiseLaw
from mechid.inference.priors import mechanism_priors
from mechid.inference.reference import SamplerStartError
from mechid.inference.settings import LadderSettings, SearchSettings
from mechid.results import BelowLeaderMechanism, NotFittedMechanism

#: Mechanisms fitted per round (the far-below threshold is updated between rounds).
ROUND_SIZE = 2

ProgressHook = Callable[[str, int, int], None]


@dataclass(frozen=True)
class FitJob:
    """One mechanism to fit: its id, its own random stream and its starting hints (from the
    linearisation, or several sets, e.g. a composite's parts' best fits)."""

    mechanism_id: str
    rng: np.random.Generator
    hints: ParameterHints | tuple[ParameterHints, ...] | None = None


@dataclass(frozen=True)
class _SharedInputs:
    """What every fit of one analysis shares (sent once to each worker)."""

    voltage_V: NDArray
    temperature_K: NDArray
    current_A: NDArray
    device: Device
    ladder: LadderSettings
    search: SearchSettings
    noise_law: NoiseLaw = GAUSSIAN
    below_leader_margin: float | None = None


@dataclass(frozen=True)
class RoundsOutcome:
    """The fits by mechanism id, the mechanisms whose formula holds nowhere on the data, and
    those whose sampling was skipped because their best fit lies far below the leader."""

    fits: dict[str, MechanismFit]
    not_fitted: dict[str, NotFittedMechanism]
    below_leader: dict[str, BelowLeaderMechanism]


#: What one job gives: its fit, why it was not fitted, or why it was not sampled.
_Outcome = MechanismFit | NotFittedMechanism | BelowLeaderMechanism
#: The best evidence so far: (mechanism id, ln Z), or None before the first fit.
_Leader = tuple[str, float] | None


def default_workers() -> int:
    """Worker processes used by default: one per core, at most :data:`ROUND_SIZE`."""
    return max(1, min(ROUND_SIZE, os.cpu_count() or 1))


def fit_in_rounds(*args: Any, **kwargs: Any) -> dict[str, MechanismFit]:
    """The fits of :func:`fit_candidates_in_rounds` (same arguments; the not fitted left out)."""
    return fit_candidates_in_rounds(*args, **kwargs).fits


def fit_candidates_in_rounds(
    jobs: Sequence[FitJob],
    voltage_V: NDArray,
    temperature_K: NDArray,
    current_A: NDArray,
    device: Device,
    ladder: LadderSettings,
    search: SearchSettings,
    workers: int = 1,
    progress: ProgressHook | None = None,
    noise_law: NoiseLaw = GAUSSIAN,
    below_leader_margin: float | None = None,
    leader: tuple[str, float] | None = None,
) -> RoundsOutcome:
    """Fit every job, ``ROUND_SIZE`` at a time; the fits and the mechanisms not fitted.

    Parameters
    ----------
    jobs : sequence of FitJob
        In the order to fit them (most promising first saves time).
    voltage_V, temperature_K, current_A : ndarray
        The points entering the fit.
    device : Device
        Device description.
    ladder : LadderSettings
        Tempered-ladder settings.
    search : SearchSettings
        Mode search and pilot run of every fit.
    workers : int
        Worker processes; 1 fits in this process. The numbers do not depend on it.
    progress : callable, optional
        ``progress(label, done, total)`` while sampling.
    noise_law : NoiseLaw
        The noise law of every fit.
    below_leader_margin : float, optional
        A mechanism whose best log-likelihood found by its mode search lies more than this
        many nats below the best evidence of the earlier rounds is not sampled
        (:class:`~mechid.inference.fit.BelowLeaderError`); None fits every mechanism.
    leader : (str, float), optional
        The best (mechanism id, ln Z) of fits made before these (e.g. the single mechanisms
        before the composites): it serves as the first round's leader.

    Returns
    -------
    RoundsOutcome
        The fits keyed by mechanism id, each mechanism whose formula holds nowhere on
        these data with the conditions that fail (a MechidWarning says so too), and each
        mechanism not sampled because it lies far below the leader (with the bound).
    """
    shared = _SharedInputs(np.asarray(voltage_V, float), np.asarray(temperature_K, float),
                           np.asarray(current_A, float), device, ladder, search, noise_law,
                           below_leader_margin)
    if ladder.max_production > ladder.n_production:
        rounds = [list(jobs[i: i + ROUND_SIZE]) for i in range(0, len(jobs), ROUND_SIZE)]
    elif below_leader_margin is not None and leader is not None:  # known leader: one round
        rounds = [list(jobs)]
    elif below_leader_margin is not None:  # the first round's evidences serve all the rest
        rounds = [list(jobs[:ROUND_SIZE]), list(jobs[ROUND_SIZE:])]
    else:  # no extensions, so no far-below decisions: one round, no waiting between fits
        rounds = [list(jobs)]
    rounds = [batch for batch in rounds if batch]
    if workers <= 1 or len(jobs) <= 1:
        fits = _fit_here(rounds, shared, progress, leader)
    else:
        fits = _fit_on_workers(rounds, shared, min(workers, ROUND_SIZE), progress, leader)
    # A mechanism whose formula holds nowhere on these data is not fitted (warned in _fit).
    return RoundsOutcome(
        fits={k: fit for k, fit in fits.items() if isinstance(fit, MechanismFit)},
        not_fitted={k: fit for k, fit in fits.items() if isinstance(fit, NotFittedMechanism)},
        below_leader={k: fit for k, fit in fits.items()
                      if isinstance(fit, BelowLeaderMechanism)},
    )


def _fit_here(rounds: list[list[FitJob]], shared: _SharedInputs,
              progress: ProgressHook | None, leader: _Leader = None) -> dict[str, _Outcome]:
    fits: dict[str, _Outcome] = {}
    for batch in rounds:
        for job in batch:
            hook = None if progress is None else _labelled(progress, job.mechanism_id)
            fits[job.mechanism_id] = _fit(job, shared, leader, hook)
        leader = best_evidence(leader, (fits[job.mechanism_id] for job in batch))
    return fits


def _fit_on_workers(rounds: list[list[FitJob]], shared: _SharedInputs, workers: int,
                    progress: ProgressHook | None, leader: _Leader = None
                    ) -> dict[str, _Outcome]:
    context = multiprocessing.get_context(_start_method())
    messages = context.Queue()
    fits: dict[str, _Outcome] = {}
    with ProcessPoolExecutor(max_workers=workers, mp_context=context,
                             initializer=_start_worker, initargs=(shared, messages)) as pool:
        for batch in rounds:
            # Longest first, so that a slow fit does not start last and hold up the round
            # (the numbers do not depend on the order: each job has its own stream).
            costs = {job.mechanism_id: expected_cost(job.mechanism_id, shared) for job in batch}
            submitted = sorted(batch, key=lambda job: -costs[job.mechanism_id])
            futures: dict[Future, FitJob] = {
                pool.submit(_fit_in_worker, job, leader): job for job in submitted
            }
            pending = set(futures)
            while pending:
                _, pending = wait(pending, timeout=0.1, return_when=FIRST_COMPLETED)
                _relay(messages, progress)
            _relay(messages, progress)
            outcomes = {job.mechanism_id: future.result() for future, job in futures.items()}
            for job in batch:  # warnings and records in the given order, whatever ran first
                fit, caught = outcomes[job.mechanism_id]
                for message, category in caught:
                    warnings.warn(message, category, stacklevel=3)
                fits[job.mechanism_id] = fit
            leader = best_evidence(leader, (fits[job.mechanism_id] for job in batch))
    return fits


#: Single-point likelihood evaluations timed per mechanism by :func:`expected_cost`.
COST_PROBES = 3


def expected_cost(mechanism_id: str, shared: _SharedInputs) -> float:
    """A fit's expected run time, for scheduling only: seconds per single-point likelihood
    evaluation (the mode search's unit of work, timed on a few prior draws from a fixed
    stream) times the number of free parameters (the search's steps grow with it).

    Implicit laws (a root search per point) cost ~10-30 x an explicit one, so a round that
    started them last would wait for them alone.
    """
    mechanism = get_mechanism(mechanism_id)
    target = MechanismTarget(mechanism, shared.voltage_V, shared.temperature_K,
                             shared.current_A, shared.device,
                             mechanism_priors(mechanism, shared.device, shared.current_A),
                             noise_law=shared.noise_law)
    draws = target.sample_prior(np.random.default_rng(0), COST_PROBES)
    timings = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for draw in draws:
            started = time.perf_counter()
            target.log_likelihood(draw[None, :])
            timings.append(time.perf_counter() - started)
    return float(np.median(timings)) * target.ndim


def _start_method() -> str:
    """``fork`` where the platform offers it (no re-import: ~3 s saved per run), else ``spawn``.

    A forked worker inherits the parent's likelihood thread pool without its threads; the
    worker never uses it (one likelihood thread, see :func:`_start_worker`).
    """
    return "fork" if "fork" in multiprocessing.get_all_start_methods() and os.name == "posix" \
        and not _is_macos() else "spawn"


def _is_macos() -> bool:
    return os.uname().sysname == "Darwin"


def _fit(job: FitJob, shared: _SharedInputs, leader: _Leader,
         hook: Callable[[int, int], None] | None) -> _Outcome:
    """The fit, or why not (also as a MechidWarning) when the formula holds nowhere."""
    mechanism = get_mechanism(job.mechanism_id)
    try:
        return fit_mechanism(
            mechanism, shared.voltage_V, shared.temperature_K,
            shared.current_A, shared.device, shared.ladder, job.rng, hints=job.hints,
            progress=hook, search=shared.search,
            leader_log_evidence=None if leader is None else leader[1],
            below_leader_margin=shared.below_leader_margin,
            noise_law=shared.noise_law,
        )
    except BelowLeaderError as below:
        assert leader is not None  # raised only against a known evidence
        return BelowLeaderMechanism(
            id=mechanism.id, family=mechanism.family, name=mechanism.name,
            reason=f"{mechanism.id} was not sampled: {below} (leader so far: {leader[0]})",
            leader_id=leader[0],
            best_log_likelihood=below.best_log_likelihood,
            leader_log_evidence=below.leader_log_evidence, margin_nats=below.margin_nats)
    except FormulaNotApplicableError as refused:
        warnings.warn(str(refused), MechidWarning, stacklevel=2)
        return NotFittedMechanism(id=mechanism.id, family=mechanism.family, name=mechanism.name,
                                  reason=str(refused), violations=refused.violations)
    except SamplerStartError as failed:
        reason = (f"{mechanism.id} was not fitted: the sampler could not start on these data "
                  f"({failed}); this says nothing about the physics of the mechanism")
        warnings.warn(reason, MechidWarning, stacklevel=2)
        return NotFittedMechanism(id=mechanism.id, family=mechanism.family, name=mechanism.name,
                                  reason=reason, violations=())


def best_evidence(leader: _Leader, fits: Iterable[_Outcome]) -> _Leader:
    """The (id, ln Z) of the best finite evidence among ``leader`` and ``fits``."""
    values = [(fit.result.id, float(fit.evidence.log_evidence)) for fit in fits
              if isinstance(fit, MechanismFit) and np.isfinite(fit.evidence.log_evidence)]
    if leader is not None:
        values.append(leader)
    return max(values, key=lambda pair: pair[1]) if values else None


def _labelled(progress: ProgressHook, mechanism_id: str) -> Callable[[int, int], None]:
    label = f"fitting {mechanism_id}"

    def hook(done: int, total: int) -> None:
        progress(label, done, total)

    return hook


def _relay(messages: Any, progress: ProgressHook | None) -> None:
    """Pass the workers' progress reports on (the latest per label is enough)."""
    latest: dict[str, tuple[int, int]] = {}
    while True:
        try:
            label, done, total = messages.get_nowait()
        except queue_module.Empty:
            break
        latest[label] = (done, total)
    if progress is not None:
        for label, (done, total) in latest.items():
            progress(label, done, total)


# -- inside a worker process -----------------------------------------------------------

_WORKER: dict[str, Any] = {}


def _start_worker(shared: _SharedInputs, messages: Any) -> None:
    set_likelihood_threads(1)
    _WORKER["shared"] = shared
    _WORKER["messages"] = messages


def _fit_in_worker(job: FitJob, leader: _Leader
                   ) -> tuple[_Outcome, list[tuple[str, type]]]:
    messages = _WORKER["messages"]
    label = f"fitting {job.mechanism_id}"

    def hook(done: int, total: int) -> None:
        messages.put((label, done, total))

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        fit = _fit(job, _WORKER["shared"], leader, hook)
    return fit, [(str(w.message), w.category) for w in caught]
