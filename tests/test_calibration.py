"""Coverage of mechid's credible intervals in repeated simulate-and-fit runs (benchmarks/calibration.py).

A calibrated posterior puts the truth inside its central 95 % interval in 95 % of runs when
the truth is drawn from the prior the fit uses (Cook, Gelman & Rubin 2006, J. Comput. Graph.
Stat. 15:675). The truths come from benchmarks/calibration.py: device-described parameters
from their own device prior, flat-prior parameters uniformly from a sub-region around the
reference scenario (calibrated in the informative-data regime, see that module).

The fast test uses Mott VRH (cheap formula, two physical parameters) with a short ladder and
a loose bound; a companion check shows that the same fits with intervals shrunk three-fold
(an over-confident sampler) fail that bound, so the bound can fail. The slow test applies
the issue's criterion: pooled 95 % coverage within 5 points of nominal, plus two binomial
standard errors.
"""

from __future__ import annotations

import importlib.util
import math
import sys
from pathlib import Path
from types import ModuleType

import numpy as np
import pytest

from mechid.analysis import AnalysisSettings
from mechid.catalogue import get_mechanism
from mechid.inference.settings import LadderSettings, SearchSettings

BENCHMARK = Path(__file__).resolve().parents[1] / "benchmarks" / "calibration.py"

#: A short ladder: the cold chain starts from the pilot draws, so a short burn-in suffices.
SHORT_LADDER = LadderSettings(n_temperatures=3, beta_power=2.0, n_burn=40, n_production=120,
                              max_production=120, n_walkers=16)
#: Loose bounds of the fast test (nominal 0.95 and 0.68; a 3x over-confident sampler gives
#: about 0.48 and 0.26, see test_bounds_fail_for_overconfident_intervals).
FAST_MIN_COVERAGE_95 = 0.75
FAST_MIN_COVERAGE_68 = 0.45


def _load_calibration() -> ModuleType:
    spec = importlib.util.spec_from_file_location("mechid_calibration_benchmark", BENCHMARK)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up there
    spec.loader.exec_module(module)
    return module


calibration = _load_calibration()


def _study(mechanism_id: str, runs: int, ladder: LadderSettings, seed: int) -> list:
    """(record, fit) pairs of ``runs`` runs of one mechanism."""
    scenario = calibration.load_scenarios()[mechanism_id]
    mechanism = get_mechanism(mechanism_id)
    return [calibration.run_once(mechanism, scenario, ladder, rng,
                                 search=SearchSettings(n_polish=2))
            for rng in np.random.default_rng(seed).spawn(runs)]


@pytest.fixture(scope="module")
def mott_runs() -> list:
    """Ten Mott VRH runs on the reference grid with the short ladder."""
    return _study("mott_vrh", 10, SHORT_LADDER, seed=11)


def test_truth_draws_follow_the_device_prior_and_the_flat_region() -> None:
    # Device-described parameters come from their truncated-normal prior N(value, sd);
    # flat-prior ones stay inside the +-15 % (linear) / +-0.5 decade (log) region.
    scenario = calibration.load_scenarios()["poole_frenkel"]
    device = calibration.scenario_device(scenario)
    mechanism = get_mechanism("poole_frenkel")
    rng = np.random.default_rng(3)
    draws = [calibration.draw_truth(mechanism, scenario, device, rng) for _ in range(400)]
    thickness = np.array([d["thickness_nm"] for d in draws])
    assert thickness.mean() == pytest.approx(30.0, abs=4 * 1.0 / math.sqrt(400))
    assert thickness.std() == pytest.approx(1.0, rel=0.15)
    trap = np.array([d["trap_depth_eV"] for d in draws])
    assert trap.min() >= 1.2 * 0.85 and trap.max() <= 1.2 * 1.15
    assert trap.max() - trap.min() > 0.3  # spread over the region, not a point
    log_prefactor = np.log10([d["prefactor_S_per_cm"] for d in draws])
    assert log_prefactor.min() >= -0.5 and log_prefactor.max() <= 0.5


def test_fits_succeed_and_reach_the_truth(mott_runs: list) -> None:
    records = [record for record, _ in mott_runs]
    assert all(r.error is None for r in records), [r.error for r in records]
    # log posterior at the truth minus the best point found: about -d/2 for a sampler that
    # explored the posterior, large and positive for one stuck away from the truth.
    assert max(r.map_deficit for r in records) < 5.0


def test_short_ladder_coverage_is_not_far_below_nominal(mott_runs: list) -> None:
    records = [record for record, _ in mott_runs]
    c95 = calibration.pooled_coverage(records, 0.95)
    c68 = calibration.pooled_coverage(records, 0.68)
    assert c95.total == 20
    assert c95.fraction >= FAST_MIN_COVERAGE_95, c95.text()
    assert c68.fraction >= FAST_MIN_COVERAGE_68, c68.text()
    # Over-coverage far above nominal would mean intervals much too wide.
    assert c68.fraction <= 0.95, c68.text()


def test_bounds_fail_for_overconfident_intervals(mott_runs: list) -> None:
    # The same fits scored with every interval shrunk three-fold about its median.
    shrunk = []
    for record, fit in mott_runs:
        copy = calibration.RunRecord(record.mechanism_id, record.truth)
        copy.inside = calibration.interval_hits(fit, record.truth, shrink=3.0)
        shrunk.append(copy)
    assert calibration.pooled_coverage(shrunk, 0.95).fraction < FAST_MIN_COVERAGE_95
    assert calibration.pooled_coverage(shrunk, 0.68).fraction < FAST_MIN_COVERAGE_68


def test_coverage_counts_and_binomial_error() -> None:
    c = calibration.Coverage(hits=19, total=20)
    assert c.fraction == pytest.approx(0.95)
    assert c.standard_error == pytest.approx(math.sqrt(0.95 * 0.05 / 20))
    failed = calibration.RunRecord("mott_vrh", {}, error="ValueError: x")
    ok = calibration.RunRecord("mott_vrh", {}, inside={0.95: {"a": True, "b": False}})
    pooled = calibration.pooled_coverage([failed, ok], 0.95)
    assert (pooled.hits, pooled.total) == (1, 2)


@pytest.mark.slow
@pytest.mark.parametrize("mechanism_id", ["mott_vrh", "poole_frenkel"])
def test_full_ladder_coverage_within_five_points_of_nominal(mechanism_id: str) -> None:
    runs = _study(mechanism_id, 30, AnalysisSettings().ladder(), seed=29)
    records = [record for record, _ in runs]
    assert all(r.error is None for r in records), [r.error for r in records]
    for level in calibration.LEVELS:
        coverage = calibration.pooled_coverage(records, level)
        tolerance = 0.05 + 2 * math.sqrt(level * (1 - level) / coverage.total)
        assert abs(coverage.fraction - level) <= tolerance, (level, coverage.text())
