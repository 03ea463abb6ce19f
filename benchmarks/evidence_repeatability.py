"""Is the quoted evidence error honest? Repeat fits with different seeds and compare.

For each mechanism, the typical series of ``bench_analysis.py`` (8 temperatures x 100
voltages of Poole-Frenkel data) is fitted ``--repeats`` times with different seeds. The
standard deviation of ln Z across repeats is the real Monte Carlo error; the mean quoted
error should match it (ratio near 1; below 1 means the quoted error is too small). Run from
the repo root::

    python benchmarks/evidence_repeatability.py                 # full settings, 8 repeats
    python benchmarks/evidence_repeatability.py --quick --repeats 6
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_analysis import typical_series  # noqa: E402

from mechid.analysis import AnalysisSettings  # noqa: E402
from mechid.catalogue import get_mechanism  # noqa: E402
from mechid.catalogue.validity import FormulaNotApplicableError  # noqa: E402
from mechid.inference.fit import fit_mechanism  # noqa: E402


def main() -> None:
    """Print, per mechanism: mean ln Z, spread across seeds, mean quoted error, their ratio."""
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true")
    parser.add_argument("--repeats", type=int, default=8)
    parser.add_argument("--mechanisms", nargs="*",
                        default=["poole_frenkel", "schottky_emission", "nearest_neighbour_hopping",
                                 "fowler_nordheim"])
    args = parser.parse_args()
    warnings.simplefilter("ignore")
    series, device = typical_series()
    settings = AnalysisSettings(quick=args.quick)
    print(f"settings: {'quick' if args.quick else 'full'}, {args.repeats} seeds each")
    print(f"{'mechanism':26s} {'mean ln Z':>12s} {'sd(seeds)':>9s} {'quoted':>7s} {'ratio':>6s} "
          f"{'bridge-SS':>9s} {'s/fit':>6s}")
    for mechanism_id in args.mechanisms:
        values, errors, gaps, seconds = [], [], [], []
        for seed in range(args.repeats):
            began = time.perf_counter()
            try:
                fit = fit_mechanism(get_mechanism(mechanism_id), series.voltage_V,
                                    series.temperature_K, series.current_A, device,
                                    settings.ladder(), np.random.default_rng(1000 + seed),
                                    search=settings.search())
            except FormulaNotApplicableError as refused:  # e.g. FN on the low-field PF series
                print(f"{mechanism_id:26s} not fitted: {str(refused)[:160]}", flush=True)
                break
            seconds.append(time.perf_counter() - began)
            values.append(fit.evidence.log_evidence)
            errors.append(fit.evidence.log_evidence_err)
            gaps.append(fit.evidence.log_evidence_bridge - fit.evidence.log_evidence)
        if len(values) < 2:
            continue
        spread, quoted = float(np.std(values, ddof=1)), float(np.mean(errors))
        print(f"{mechanism_id:26s} {np.mean(values):12.3f} {spread:9.3f} {quoted:7.3f} "
              f"{quoted / spread:6.2f} {np.mean(gaps):9.3f} {np.mean(seconds):6.1f}", flush=True)


if __name__ == "__main__":
    main()
