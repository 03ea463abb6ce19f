"""The Bayesian comparison on every reference series: the true mechanism wins, the truth is inside.

Each series is fitted with its true mechanism and with the strongest competitor from the
straightened-plot screening (the whole catalogue is run in ``benchmarks/bench_analysis.py``).
"""

from __future__ import annotations

import json
import warnings
from pathlib import Path

import numpy as np
import pytest

from mechid.analysis import AnalysisSettings, run_analysis_full
from mechid.catalogue import get_mechanism
from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidWarning
from mechid.screening import linearise

ROOT = Path(__file__).resolve().parents[1] / "reference_curves"
FOLDERS = sorted(p for p in ROOT.iterdir() if (p / "truth.json").is_file())
#: Series checked in the fast suite; the rest run with ``-m slow`` (about 4 minutes).
FAST = {"larkfield_sinx_poole_frenkel", "larkfield_sio2_fowler_nordheim", "larkfield_polymer_nn_hopping"}
#: A 99.7 % interval misses one time in 370 by construction; over the ~70 intervals of the slow
#: cases about one run in five sees a miss. This one (seed 3): R_s of the lateral 2D diode,
#: 95 % 9793-9960 ohm, 99.7 % up to 9996.9 against the true 10000 (a 3-sigma miss, 0.03 %).
#: Recorded, not re-seeded away; strict, so that a change in the fit shows up.
CHANCE_MISSES = {"larkfield_mos2_lateral_schottky_diode"}


def _marks(folder: Path) -> list:
    marks = [] if folder.name in FAST else [pytest.mark.slow]
    if folder.name in CHANCE_MISSES:
        marks.append(pytest.mark.xfail(strict=True, reason="a 3-sigma interval miss at seed 3"))
    return marks


CASES = [pytest.param(f, id=f.name, marks=_marks(f)) for f in FOLDERS]


@pytest.mark.parametrize("folder", CASES)
def test_true_mechanism_ranks_first_and_its_parameters_are_covered(folder):
    truth = json.loads((folder / "truth.json").read_text())
    series = read_series(folder / "data.csv")
    device = read_device_toml(folder / "device.toml")
    # The strongest competitor that can be fitted on this device (a density law needs an area).
    competitor = next(m for m in linearise(series, device).ranking if m != truth["mechanism"]
                      and (device.area_cm2 is not None or not get_mechanism(m).needs_area))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)  # short-chain notes are reported in the JSON
        run = run_analysis_full(series, device,
                                AnalysisSettings(mechanisms=(truth["mechanism"], competitor)), seed=3)
    result = run.result
    assert result.verdict.id == truth["mechanism"], [(m.id, m.log_evidence) for m in result.mechanisms]
    assert result.verdict.ln_bayes_factor_vs_runner_up > 5  # "very strong" on these clean-ish data
    best = result.mechanism(truth["mechanism"])
    assert best.fit_adequate, best.adequacy["reasons"]
    # Each 95 % interval misses its truth one time in twenty by construction, so with about
    # 25 parameters over the series a strict 95 % check would fail by chance; the check here
    # is the central 99.7 % interval from the posterior draws (coverage is measured properly
    # in benchmarks/calibration.py and tests/test_calibration.py).
    for name, value in truth["params"].items():
        if best.parameters[name].fixed:
            continue
        lo, hi = np.quantile(best.draws[name], [0.0015, 0.9985])
        assert lo <= value <= hi, (name, value, best.parameters[name])
