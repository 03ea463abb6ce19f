"""Simulation study of credible-interval coverage, one mechanism at a time.

For each mechanism the study takes the reference scenario of that mechanism
(``reference_curves/generate.py``, ``SCENARIOS``: its temperature and bias grid, its device
description and its noise model) and repeats, ``--runs`` times:

1. draw true parameters (see "Where the truth comes from" below);
2. simulate a series with :func:`mechid.simulate.simulate_series` (the noise model of the
   fit: Gaussian with sd sqrt((s_rel I)^2 + floor^2), the scenario's s_rel and floor);
3. fit only the true mechanism with :func:`mechid.inference.fit.fit_mechanism` (the full
   ladder by default, ``--quick`` for the quick one);
4. record, for every sampled physical parameter, whether the truth lies inside its central
   68 % and 95 % credible intervals.

It prints per mechanism the number of runs, the pooled coverage of the 68 % and 95 %
intervals with binomial standard errors, the same per parameter, the fit failures and
sampler flags, and the wall time per fit. The target of the issue is coverage within
+-5 points of nominal.

Where the truth comes from
--------------------------
Bayesian credible intervals have exactly nominal coverage *on average over truths drawn from
the prior used in the fit* (e.g. Cook, Gelman & Rubin 2006, J. Comput. Graph. Stat. 15:675,
the basis of simulation-based calibration). Two kinds of parameters need different handling:

* **Parameters whose prior comes from the device description** (thickness, effective mass,
  optical dielectric constant with a standard uncertainty) have informative truncated-normal
  priors N(value, sd). Their truth is drawn *from that same prior*
  (:func:`mechid.inference.priors.parameter_prior` and :meth:`Prior.sample`). Drawing it from
  anything else (e.g. always the nominal value, or a wider spread) would make the coverage of
  these, and of every parameter correlated with them, not nominal even for a perfect sampler.
* **Parameters with the catalogue's flat prior** (uniform, or log-uniform for prefactors)
  span ranges where most values give currents that are unmeasurably small or absurdly large
  on a given grid. Their truth is drawn uniformly in the sampling coordinate (linear, or
  log10 for log-scale parameters) from a sub-region around the scenario's true value:
  +-``--spread`` relative (default 15 %) or +-``--decades`` (default 0.5) decades. Because
  the prior density is flat over that sub-region and the data are informative (the posterior
  is far narrower than the sub-region and away from the prior bounds), the posterior is the
  normalised likelihood there and its intervals are calibrated for every truth in it, so the
  restriction does not bias the coverage. It would if the data were weak (posterior as wide
  as the prior): then only truths from the full prior give nominal coverage.

The noise parameters are not scored: their truth (the scenario's) is not drawn from their
prior, and the floor often lies below its prior range (the floor prior starts at 1e-3 of the
smallest measured current).

Counting
--------
Coverage is pooled over runs and the sampled physical parameters of a mechanism; the
standard error ``sqrt(p (1 - p) / n)`` treats the n intervals as independent, which slightly
understates it (parameters of one run are correlated). A fit that raises counts as a failure
and is listed apart, not as a miss. ``map_deficit`` is the log posterior at the truth minus
the best log posterior the fit found (MAP or any posterior draw); a deficit of more than a
few nats means the sampler never reached the region of the truth.

Usage (from the repo root)::

    python benchmarks/calibration.py --runs 20
    python benchmarks/calibration.py --runs 10 --mechanisms mott_vrh poole_frenkel --quick
    python benchmarks/calibration.py --runs 40 --budget-minutes 25   # stop starting new runs
"""

from __future__ import annotations

import argparse
import importlib.util
import math
import sys
import time
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from types import ModuleType
from typing import Any

import numpy as np

from mechid.analysis import AnalysisSettings
from mechid.catalogue import get_mechanism
from mechid.catalogue.base import Mechanism
from mechid.device import Device, device_from_values
from mechid.errors import ConvergenceWarning
from mechid.inference.fit import MechanismFit, fit_mechanism
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE, parameter_prior
from mechid.inference.settings import FULL_SEARCH, LadderSettings, SearchSettings
from mechid.simulate import simulate_series

REPO_ROOT = Path(__file__).resolve().parent.parent
GENERATOR = REPO_ROOT / "reference_curves" / "generate.py"
#: Default relative half-width of the truth region of linear flat-prior parameters.
DEFAULT_SPREAD = 0.15
#: Default half-width in decades of the truth region of log-scale flat-prior parameters.
DEFAULT_DECADES = 0.5
#: Nominal contents of the two credible intervals.
LEVELS = (0.68, 0.95)


# --------------------------------------------------------------------------------------
# Scenarios and truths
# --------------------------------------------------------------------------------------


def load_scenarios(path: Path = GENERATOR) -> dict[str, dict[str, Any]]:
    """The reference scenarios keyed by mechanism id (first scenario of each mechanism)."""
    module = _load_module(path)
    scenarios: dict[str, dict[str, Any]] = {}
    for scenario in module.SCENARIOS:
        scenarios.setdefault(scenario["mechanism"], scenario)
    return scenarios


def _load_module(path: Path) -> ModuleType:
    spec = importlib.util.spec_from_file_location("mechid_reference_generator", path)
    if spec is None or spec.loader is None:
        raise FileNotFoundError(f"cannot load the scenario generator {path}")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def scenario_device(scenario: Mapping[str, Any]) -> Device:
    """The device description of a scenario (with its stated uncertainties)."""
    return device_from_values(**scenario["device"])


@dataclass(frozen=True)
class TruthRegion:
    """Half-widths of the region the flat-prior truths are drawn from.

    Parameters
    ----------
    spread : float
        Relative half-width for linear parameters (0.15 means +-15 %).
    decades : float
        Half-width in decades for log-scale parameters.
    """

    spread: float = DEFAULT_SPREAD
    decades: float = DEFAULT_DECADES


def draw_truth(
    mechanism: Mechanism,
    scenario: Mapping[str, Any],
    device: Device,
    rng: np.random.Generator,
    region: TruthRegion = TruthRegion(),
) -> dict[str, float]:
    """True parameter values of one run (see the module docstring for the two rules).

    Parameters
    ----------
    mechanism : Mechanism
        Catalogue declaration.
    scenario : mapping
        Reference scenario; its ``"params"`` centre the flat-prior region.
    device : Device
        Device description; its values with uncertainties are the priors drawn from.
    rng : numpy.random.Generator
        Random source.
    region : TruthRegion
        Half-widths of the flat-prior region.

    Returns
    -------
    dict
        Physical value of every mechanism parameter.
    """
    truth: dict[str, float] = {}
    for parameter in mechanism.parameters:
        prior = parameter_prior(parameter, device)
        if prior.is_fixed:
            truth[parameter.name] = float(prior.value)
        elif prior.kind == "truncated_normal":
            truth[parameter.name] = float(prior.to_physical(prior.sample(rng, 1)[0]))
        else:
            centre = float(prior.to_internal(scenario["params"][parameter.name]))
            half = region.decades if prior.log_scale else region.spread * abs(centre)
            lo, hi = prior.internal_bounds()
            value = rng.uniform(max(lo, centre - half), min(hi, centre + half))
            truth[parameter.name] = float(prior.to_physical(value))
    return truth


# --------------------------------------------------------------------------------------
# One run
# --------------------------------------------------------------------------------------


@dataclass
class RunRecord:
    """Outcome of one simulate-and-fit run.

    Attributes
    ----------
    mechanism_id : str
        Mechanism simulated and fitted.
    truth : dict
        True physical values.
    inside : dict
        ``inside[level][name]``: whether the truth lies in the central credible interval of
        that level (only sampled physical parameters).
    wall_time : float
        Seconds of the fit (MAP, pilot, ladder, summaries).
    flags : list of str
        Sampler flags of the fit.
    converged : bool
        False when the ladder raised a convergence warning.
    map_deficit : float
        log posterior at the truth minus the best log posterior found (NaN if unknown).
    error : str or None
        The exception of a failed fit (then ``inside`` is empty).
    """

    mechanism_id: str
    truth: dict[str, float]
    inside: dict[float, dict[str, bool]] = field(default_factory=dict)
    wall_time: float = float("nan")
    flags: list[str] = field(default_factory=list)
    converged: bool = True
    map_deficit: float = float("nan")
    error: str | None = None


def simulate_run(
    mechanism: Mechanism,
    truth: Mapping[str, float],
    scenario: Mapping[str, Any],
    device: Device,
    rng: np.random.Generator,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Simulated ``(voltage_V, temperature_K, current_A)`` on the scenario's grid and noise."""
    sim = simulate_series(
        mechanism, truth, scenario["temperatures_K"], scenario["voltages_V"], device,
        noise_relative=scenario["noise_relative"], noise_floor_A=scenario["noise_floor_A"],
        rng=rng,
    )
    return sim.voltage_V, sim.temperature_K, sim.current_A


def interval_hits(fit: MechanismFit, truth: Mapping[str, float],
                  shrink: float = 1.0) -> dict[float, dict[str, bool]]:
    """Whether each sampled physical parameter's truth is inside its 68 % / 95 % interval.

    Parameters
    ----------
    fit : MechanismFit
        A finished fit.
    truth : mapping
        True physical values.
    shrink : float
        Divide every interval's half-widths (about the median) by this factor; 1 scores the
        fit as it is, larger values mimic an over-confident sampler (used by the tests to
        show that a coverage bound can fail).
    """
    hits: dict[float, dict[str, bool]] = {level: {} for level in LEVELS}
    for prior in fit.target.free:
        if prior.name not in truth:
            continue
        summary = fit.result.parameters[prior.name]
        for level, (lo, hi) in zip(LEVELS, (summary.ci68, summary.ci95), strict=True):
            lo_i, hi_i, mid, value = (float(prior.to_internal(x))
                                      for x in (lo, hi, summary.median, truth[prior.name]))
            lo_i, hi_i = mid - (mid - lo_i) / shrink, mid + (hi_i - mid) / shrink
            hits[level][prior.name] = bool(lo_i <= value <= hi_i)
    return hits


def map_deficit(fit: MechanismFit, truth: Mapping[str, float],
                noise: Mapping[str, float]) -> float:
    """log posterior at the truth minus the best one the fit found (noise clamped into its prior)."""
    values = {**truth, **noise}
    point = []
    for prior in fit.target.free:
        lo, hi = prior.internal_bounds()
        point.append(float(np.clip(prior.to_internal(values[prior.name]), lo, hi)))
    at_truth = float(fit.target.log_posterior(np.array([point]))[0])
    found = fit.run.cold_log_likelihood + fit.run.cold_log_prior  # beta = 1: log L + log pi
    at_map = float(fit.target.log_posterior(fit.map_internal[None, :])[0])
    best = max(at_map, float(np.max(found)))
    return at_truth - best


def run_once(
    mechanism: Mechanism,
    scenario: Mapping[str, Any],
    ladder: LadderSettings,
    rng: np.random.Generator,
    region: TruthRegion = TruthRegion(),
    search: SearchSettings = FULL_SEARCH,
) -> tuple[RunRecord, MechanismFit | None]:
    """Draw a truth, simulate, fit and score one run; failures are recorded, not raised.

    ``search`` holds the mode-search and pilot settings (``AnalysisSettings.search()``).
    """
    device = scenario_device(scenario)
    truth_rng, noise_rng, fit_rng = rng.spawn(3)
    truth = draw_truth(mechanism, scenario, device, truth_rng, region)
    record = RunRecord(mechanism.id, truth)
    started = time.perf_counter()
    try:
        voltage, temperature, current = simulate_run(mechanism, truth, scenario, device, noise_rng)
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", ConvergenceWarning)
            fit = fit_mechanism(mechanism, voltage, temperature, current, device, ladder, fit_rng,
                                search=search)
    except Exception as exc:  # noqa: BLE001 (a failed fit is an outcome of the study)
        record.wall_time = time.perf_counter() - started
        record.error = f"{type(exc).__name__}: {exc}"
        return record, None
    record.wall_time = time.perf_counter() - started
    record.converged = not any(issubclass(w.category, ConvergenceWarning) for w in caught)
    record.flags = list(fit.evidence.flags)
    record.inside = interval_hits(fit, truth)
    noise = {NOISE_RELATIVE: scenario["noise_relative"], NOISE_FLOOR: scenario["noise_floor_A"]}
    record.map_deficit = map_deficit(fit, truth, noise)
    return record, fit


# --------------------------------------------------------------------------------------
# Summaries
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Coverage:
    """Fraction of intervals containing the truth, with its binomial standard error."""

    hits: int
    total: int

    @property
    def fraction(self) -> float:
        """Observed coverage (NaN without intervals)."""
        return self.hits / self.total if self.total else float("nan")

    @property
    def standard_error(self) -> float:
        """sqrt(p (1 - p) / n) at the observed p (NaN without intervals)."""
        if not self.total:
            return float("nan")
        p = self.fraction
        return math.sqrt(max(p * (1.0 - p), 0.0) / self.total)

    def text(self) -> str:
        """e.g. ``"0.93 +- 0.03"``."""
        return f"{self.fraction:.2f} +- {self.standard_error:.2f}"


def pooled_coverage(records: Sequence[RunRecord], level: float,
                    parameter: str | None = None) -> Coverage:
    """Coverage of the ``level`` intervals over successful runs (one parameter or all)."""
    flags = [hit for r in records if r.error is None
             for name, hit in r.inside.get(level, {}).items()
             if parameter is None or name == parameter]
    return Coverage(int(sum(flags)), len(flags))


def summary_table(records: Sequence[RunRecord]) -> str:
    """Plain-text table: per mechanism (pooled) and per parameter."""
    header = (f"{'mechanism / parameter':<38} {'runs':>4} {'fail':>4} {'n':>4} "
              f"{'cover 68%':>12} {'cover 95%':>12} {'s/fit':>6} {'unconv':>6} {'deficit>5':>9}")
    lines = [header, "-" * len(header)]
    ids = list(dict.fromkeys(r.mechanism_id for r in records))
    for mechanism_id in ids:
        mine = [r for r in records if r.mechanism_id == mechanism_id]
        ok = [r for r in mine if r.error is None]
        c68, c95 = pooled_coverage(mine, 0.68), pooled_coverage(mine, 0.95)
        wall = float(np.mean([r.wall_time for r in ok])) if ok else float("nan")
        unconverged = sum(not r.converged for r in ok)
        stuck = sum(r.map_deficit > 5.0 for r in ok)
        lines.append(f"{mechanism_id:<38} {len(mine):>4} {len(mine) - len(ok):>4} {c95.total:>4} "
                     f"{c68.text():>12} {c95.text():>12} {wall:>6.1f} {unconverged:>6} {stuck:>9}")
        names = list(dict.fromkeys(n for r in ok for n in r.inside.get(0.95, {})))
        for name in names:
            p68, p95 = pooled_coverage(mine, 0.68, name), pooled_coverage(mine, 0.95, name)
            lines.append(f"  {name:<36} {'':>4} {'':>4} {p95.total:>4} "
                         f"{p68.text():>12} {p95.text():>12}")
    everything68, everything95 = pooled_coverage(records, 0.68), pooled_coverage(records, 0.95)
    lines.append("-" * len(header))
    lines.append(f"{'all mechanisms':<38} {len(records):>4} "
                 f"{sum(r.error is not None for r in records):>4} {everything95.total:>4} "
                 f"{everything68.text():>12} {everything95.text():>12}")
    return "\n".join(lines)


def failure_lines(records: Sequence[RunRecord]) -> list[str]:
    """One line per failed fit and per run whose truth the sampler never reached."""
    lines = []
    for index, r in enumerate(records):
        if r.error is not None:
            lines.append(f"run {index} {r.mechanism_id}: FAILED {r.error}; truth {r.truth}")
        elif r.map_deficit > 5.0:
            lines.append(f"run {index} {r.mechanism_id}: truth {r.map_deficit:.1f} nats above the best "
                         f"point found; truth {r.truth}; flags {r.flags}")
    return lines


# --------------------------------------------------------------------------------------
# Driver
# --------------------------------------------------------------------------------------


def run_study(
    mechanism_ids: Sequence[str],
    runs: int,
    ladder: LadderSettings,
    seed: int,
    region: TruthRegion = TruthRegion(),
    budget_s: float | None = None,
    verbose: bool = True,
    search: SearchSettings = FULL_SEARCH,
) -> list[RunRecord]:
    """Run the study, interleaving mechanisms so a time budget leaves them balanced.

    Parameters
    ----------
    mechanism_ids : sequence of str
        Mechanisms to study (each needs a reference scenario).
    runs : int
        Runs per mechanism.
    ladder : LadderSettings
        Ladder of every fit.
    seed : int
        Master seed; each (run, mechanism) gets its own spawned generator.
    region : TruthRegion
        Truth region of flat-prior parameters.
    budget_s : float, optional
        Start no new round of runs after this many seconds.
    verbose : bool
        Print one progress line per run.
    search : SearchSettings
        Mode-search and pilot settings of every fit.
    """
    scenarios = load_scenarios()
    missing = [m for m in mechanism_ids if m not in scenarios]
    if missing:
        raise SystemExit(f"no reference scenario for {', '.join(missing)}")
    streams = {m: g for m, g in zip(mechanism_ids, np.random.default_rng(seed).spawn(
        len(mechanism_ids)), strict=True)}
    records: list[RunRecord] = []
    started = time.perf_counter()
    for index in range(runs):
        if budget_s is not None and time.perf_counter() - started > budget_s:
            if verbose:
                print(f"time budget reached after {index} rounds", flush=True)
            break
        for mechanism_id in mechanism_ids:
            rng = streams[mechanism_id].spawn(1)[0]
            record, _ = run_once(get_mechanism(mechanism_id), scenarios[mechanism_id], ladder, rng,
                                 region, search)
            records.append(record)
            if verbose:
                print(_progress_line(index, runs, record), flush=True)
    return records


def _progress_line(index: int, runs: int, record: RunRecord) -> str:
    if record.error is not None:
        return f"[{index + 1}/{runs}] {record.mechanism_id}: FAILED ({record.error})"
    missed = [n for n, hit in record.inside[0.95].items() if not hit]
    return (f"[{index + 1}/{runs}] {record.mechanism_id}: {record.wall_time:.1f} s, "
            f"outside 95%: {', '.join(missed) or '-'}, deficit {record.map_deficit:.1f}"
            f"{'' if record.converged else ', not converged'}")


def parse_arguments(argv: Sequence[str]) -> argparse.Namespace:
    """Command-line options."""
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--runs", type=int, default=20, help="runs per mechanism")
    parser.add_argument("--mechanisms", nargs="+", default=None,
                        help="mechanism ids (default: every mechanism with a reference scenario)")
    parser.add_argument("--quick", action="store_true", help="quick ladder instead of the full one")
    parser.add_argument("--seed", type=int, default=2024, help="master seed")
    parser.add_argument("--spread", type=float, default=DEFAULT_SPREAD,
                        help="relative half-width of linear flat-prior truths")
    parser.add_argument("--decades", type=float, default=DEFAULT_DECADES,
                        help="half-width in decades of log-scale flat-prior truths")
    parser.add_argument("--budget-minutes", type=float, default=None,
                        help="start no new round of runs after this many minutes")
    return parser.parse_args(list(argv))


def main(argv: Sequence[str]) -> int:
    """Run the study and print the coverage table."""
    args = parse_arguments(argv)
    mechanism_ids = args.mechanisms or list(load_scenarios())
    settings = AnalysisSettings(quick=args.quick)
    ladder = settings.ladder()
    budget = None if args.budget_minutes is None else 60.0 * args.budget_minutes
    began = time.perf_counter()
    records = run_study(mechanism_ids, args.runs, ladder, args.seed,
                        TruthRegion(args.spread, args.decades), budget, search=settings.search())
    print()
    print(f"coverage of central credible intervals ({'quick' if args.quick else 'full'} ladder, "
          f"seed {args.seed}, truths: device priors + flat region +-{args.spread:.0%} / "
          f"+-{args.decades:g} dec; {time.perf_counter() - began:.0f} s in all)")
    print(summary_table(records))
    problems = failure_lines(records)
    if problems:
        print("\nfailed fits and runs that never reached the truth:")
        print("\n".join(problems))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
