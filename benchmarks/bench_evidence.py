"""Benchmark of the evidence engine on linear-Gaussian models with a closed-form evidence.

Model: y = X w + e, e ~ N(0, sigma^2 I), w ~ N(0, s0^2 I), X a Vandermonde matrix on
[-1, 1] with ``n`` points (800 by default, the size of an I-V-T series). Exact
log Z = log N(y; 0, sigma^2 I + s0^2 X X^T) (Bishop 2006, PRML eq. 3.86).

Compared strategies for running K tempered ensembles in lockstep:

* ``emcee-K``: K ``emcee.EnsembleSampler`` objects (vectorize=True, log L as a blob via
  ``column_stack``, DE 0.8 + snooker 0.2), advanced ``chunk`` steps at a time with
  ``run_mcmc``, swaps between chunks. 2K likelihood calls per DE step, 4K per snooker step.
* ``stacked``: :mod:`mechid.inference.tempering`, all rungs' proposals for one half of the
  walkers in one likelihood call (2 calls per step), with several proposal mixtures.

Prints, per option: CPU seconds (robust on a shared machine), likelihood evaluations
(points) and calls (batches), evaluations per CPU second, the stepping-stone error against
the exact value over seeds, and the batch-means sigma. CPU time of the stacked runs includes
the estimators (bridge, Laplace); the emcee-K runs only sample.
Run: ``python benchmarks/bench_evidence.py [--seeds 4] [--dims 4 6]``.
"""

from __future__ import annotations

import argparse
import time
from dataclasses import dataclass

import emcee
import numpy as np
from scipy import stats

from mechid.inference.evidence import batch_means_error, estimate_evidence, stepping_stone
from mechid.inference.settings import LadderSettings
from mechid.inference.target import FunctionTarget
from mechid.inference.tempering import (
    DifferentialEvolutionProposal,
    StretchProposal,
    temperature_ladder,
)


@dataclass
class Problem:
    """A linear-Gaussian target with its exact log-evidence."""

    target: FunctionTarget
    exact: float
    n_calls: list[int]


def linear_gaussian(ndim: int, n_points: int, sigma: float = 0.05, s0: float = 2.0) -> Problem:
    """Vandermonde regression with ``n_points`` data and an exact evidence."""
    rng = np.random.default_rng(1)
    x = np.linspace(-1.0, 1.0, n_points)
    design = np.vander(x, ndim, increasing=True)
    y = design @ rng.normal(0.0, 1.0, ndim) + rng.normal(0.0, sigma, n_points)
    prior = stats.multivariate_normal(np.zeros(ndim), s0**2 * np.eye(ndim))
    const = -0.5 * n_points * np.log(2 * np.pi) - n_points * np.log(sigma)
    n_calls = [0]

    def log_likelihood(theta: np.ndarray) -> np.ndarray:
        n_calls[0] += 1
        residual = y[None, :] - theta @ design.T
        return const - 0.5 * np.sum(residual * residual, axis=1) / sigma**2

    target = FunctionTarget(
        tuple(f"w{i}" for i in range(ndim)),
        lambda t: np.atleast_1d(prior.logpdf(t)),
        log_likelihood,
        lambda g, m: g.normal(0.0, s0, (m, ndim)),
    )
    covariance = sigma**2 * np.eye(n_points) + s0**2 * design @ design.T
    exact = float(stats.multivariate_normal(np.zeros(n_points), covariance).logpdf(y))
    return Problem(target, exact, n_calls)


def run_emcee_lockstep(problem: Problem, settings: LadderSettings, seed: int, chunk: int,
                       moves: list) -> tuple[float, float, int, float]:
    """K emcee samplers in lockstep; returns (log Z, sigma, evaluations, CPU seconds)."""
    target = problem.target
    rng = np.random.default_rng(seed)
    betas = temperature_ladder(settings.n_temperatures, settings.beta_power)
    ndim = target.ndim
    walkers = settings.walkers_for(ndim)
    evaluations = [0]

    def make_log_prob(beta: float):
        def log_prob(theta: np.ndarray) -> np.ndarray:
            lp = target.log_prior(theta)
            ll = np.full(len(theta), -np.inf)
            ok = np.isfinite(lp)
            ll[ok] = target.log_likelihood(theta[ok])
            evaluations[0] += int(ok.sum())
            total = lp + beta * ll if beta > 0 else lp
            return np.column_stack([total, ll])

        return log_prob

    samplers, states = [], []
    for beta in betas:
        sampler = emcee.EnsembleSampler(
            walkers, ndim, make_log_prob(beta), vectorize=True,
            moves=moves,
        )
        sampler.random_state = np.random.RandomState(int(rng.integers(2**31 - 1))).get_state()
        p0 = target.sample_prior(rng, walkers)
        out = make_log_prob(beta)(p0)
        states.append(emcee.State(p0, log_prob=out[:, 0], blobs=out[:, 1]))
        samplers.append(sampler)
    began = time.process_time()
    records = []
    n_total = settings.n_burn + settings.n_production
    for step in range(0, n_total, chunk):
        for k, sampler in enumerate(samplers):
            states[k] = sampler.run_mcmc(states[k], chunk, store=False)
        _emcee_swaps(states, betas, rng)
        if step >= settings.n_burn:
            records.append(np.stack([np.asarray(s.blobs, dtype=float) for s in states]))
    seconds = time.process_time() - began
    chains = np.stack(records, axis=1)  # (K, records, walkers)
    log_z = stepping_stone(betas, chains)
    sigma, _ = batch_means_error(lambda b: stepping_stone(betas, b), chains)
    return log_z, sigma, evaluations[0], seconds


def _emcee_swaps(states: list, betas: np.ndarray, rng: np.random.Generator) -> None:
    """Neighbour swaps on emcee States (log_prob = log prior + beta log L, blob = log L)."""
    for k in range(len(betas) - 1):
        low, high = states[k], states[k + 1]
        partner = rng.permutation(len(low.coords))
        ll_low, ll_high = np.asarray(low.blobs, float), np.asarray(high.blobs, float)
        with np.errstate(invalid="ignore"):
            log_ratio = (betas[k + 1] - betas[k]) * (ll_low - ll_high[partner])
            accept = np.log(rng.random(len(partner))) < log_ratio
        mine, theirs = np.nonzero(accept)[0], partner[accept]
        lp_low = low.log_prob - (betas[k] * ll_low if betas[k] > 0 else 0.0)
        lp_high = high.log_prob - betas[k + 1] * ll_high
        new_low_coords, new_high_coords = high.coords[theirs].copy(), low.coords[mine].copy()
        new_low_ll, new_high_ll = ll_high[theirs].copy(), ll_low[mine].copy()
        new_low_lp, new_high_lp = lp_high[theirs].copy(), lp_low[mine].copy()
        low.coords[mine], high.coords[theirs] = new_low_coords, new_high_coords
        ll_low[mine], ll_high[theirs] = new_low_ll, new_high_ll
        with np.errstate(invalid="ignore"):
            low.log_prob[mine] = new_low_lp + (betas[k] * new_low_ll if betas[k] > 0 else 0.0)
        high.log_prob[theirs] = new_high_lp + betas[k + 1] * new_high_ll
        low.blobs, high.blobs = ll_low, ll_high


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, default=4)
    parser.add_argument("--dims", type=int, nargs="+", default=[4, 6])
    parser.add_argument("--points", type=int, default=800)
    args = parser.parse_args()
    base = LadderSettings(n_temperatures=12, beta_power=4.0, n_burn=300, n_production=600,
                          max_production=3000)
    stacked = {
        "stacked DE0.8+snooker0.2": base.proposals,
        "stacked DE": ((DifferentialEvolutionProposal(), 1.0),),
        "stacked stretch": ((StretchProposal(), 1.0),),
    }
    emcee_options = {
        "emcee-K DE0.8+snooker0.2, swaps every 1": (1, "snooker"),
        "emcee-K DE, swaps every 1": (1, "de"),
        "emcee-K DE, swaps every 10": (10, "de"),
    }
    print(f"K={base.n_temperatures}, beta^{base.beta_power:g}, burn {base.n_burn}, production "
          f"{base.n_production} (fixed), {args.points} data points, {args.seeds} seeds; "
          f"times are CPU seconds of sampling")
    print(f"{'option':42s} {'d':>2s} {'cpu s':>6s} {'evals':>9s} {'calls':>6s} {'eval/s':>9s} "
          f"{'mean err':>9s} {'sd err':>7s} {'mean sig':>8s} {'|br err|':>8s}")
    for ndim in args.dims:
        problem = linear_gaussian(ndim, args.points)
        for name, proposals in stacked.items():
            settings = LadderSettings(
                n_temperatures=base.n_temperatures, beta_power=base.beta_power, n_burn=base.n_burn,
                n_production=base.n_production, max_production=base.n_production,
                proposals=proposals, target_sigma=10.0, tau_multiple=0.0,
            )
            rows = []
            for seed in range(args.seeds):
                problem.n_calls[0] = 0
                began = time.process_time()
                run, result = estimate_evidence(problem.target, settings,
                                                np.random.default_rng(seed))
                rows.append((result.log_evidence - problem.exact, result.log_evidence_err,
                             run.n_likelihood_evaluations, problem.n_calls[0],
                             time.process_time() - began,
                             abs(result.log_evidence_bridge - problem.exact)))
            _print_rows(name, ndim, rows)
        for name, (chunk, kind) in emcee_options.items():
            rows = []
            for seed in range(args.seeds):
                moves = ([(emcee.moves.DEMove(), 0.8), (emcee.moves.DESnookerMove(), 0.2)]
                         if kind == "snooker" else [(emcee.moves.DEMove(), 1.0)])
                problem.n_calls[0] = 0
                log_z, sigma, evaluations, seconds = run_emcee_lockstep(
                    problem, base, seed, chunk, moves)
                rows.append((log_z - problem.exact, sigma, evaluations, problem.n_calls[0],
                             seconds, np.nan))
            _print_rows(name, ndim, rows)


def _print_rows(name: str, ndim: int, rows: list[tuple]) -> None:
    err, sig, evals, calls, seconds, bridge = (
        np.array(column, dtype=float) for column in zip(*rows, strict=True)
    )
    sd = np.std(err, ddof=1) if len(err) > 1 else np.nan
    bridge_err = np.nanmean(bridge) if np.isfinite(bridge).any() else np.nan
    print(f"{name:42s} {ndim:2d} {seconds.mean():6.2f} {evals.mean():9.3g} {calls.mean():6.0f} "
          f"{(evals / seconds).mean():9.3g} {err.mean():+9.3f} {sd:7.3f} {sig.mean():8.3f} "
          f"{bridge_err:8.4f}")


if __name__ == "__main__":
    main()
