"""How much the Bayes factors of the reference series move when every catalogue range is
halved or doubled (:mod:`mechid.inference.sensitivity`).

Runs the whole analysis (every catalogued mechanism, seed 3) on each series of
``reference_curves/``, prints one markdown row per series (leader, runner-up, ln B at x0.5 /
x1 / x2, the largest shift against the runner-up and against every fitted mechanism, how
each was obtained) and draws ``benchmarks/prior_sensitivity.png``: the change of ln B (leader
vs runner-up) from the analysis's value at x0.5 and x2, per series. Run from the repo root::

    python benchmarks/prior_sensitivity.py            # quick settings (a few minutes)
    python benchmarks/prior_sensitivity.py --full     # full settings
    python benchmarks/prior_sensitivity.py --rerun-all  # re-fit every mechanism at an edge
"""

from __future__ import annotations

import argparse
import json
import math
import time
import warnings
from pathlib import Path

import matplotlib
import numpy as np

matplotlib.use("Agg")
from matplotlib.figure import Figure  # noqa: E402

from mechid.analysis import AnalysisSettings, run_analysis_full  # noqa: E402
from mechid.data import read_series  # noqa: E402
from mechid.device import read_device_toml  # noqa: E402
from mechid.inference.sensitivity import sensitivity_of_fits  # noqa: E402
from mechid.results import PriorSensitivity  # noqa: E402

HERE = Path(__file__).resolve().parent
REFERENCE_CURVES = HERE.parent / "reference_curves"
FIGURE = HERE / "prior_sensitivity.png"


def run_series(folder: Path, quick: bool, seed: int, rerun_all: bool
               ) -> tuple[dict, PriorSensitivity, float]:
    """The analysis of one reference series: truth, the sensitivity record, wall time.

    With ``rerun_all`` every mechanism (not only the leader and the runner-up) whose wider
    posterior reaches a range edge is re-fitted (own random stream).
    """
    truth = json.loads((folder / "truth.json").read_text())
    series = read_series(folder / "data.csv")
    device = read_device_toml(folder / "device.toml")
    started = time.perf_counter()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # sampler notes are in the result's flags
        run = run_analysis_full(series, device, AnalysisSettings(quick=quick), seed=seed)
        record = run.result.prior_sensitivity
        if rerun_all:
            record = sensitivity_of_fits(run.fits, run.result.mechanisms,
                                         np.random.default_rng([seed, 1]),
                                         n_refits=len(run.result.mechanisms))
    return truth, record, time.perf_counter() - started


def _short(method: str) -> str:
    if method.startswith("not computable"):
        return "not computable"
    return {"reweighting": "rw", "analysis": "-",
            "width term (posterior clear of the old edges)": "width term",
            "quick re-run with the wider ranges": "re-run"}.get(method, method)


def row(name: str, truth: dict, record: PriorSensitivity, seconds: float) -> str:
    """One markdown row for a series."""
    first = record.comparisons[0]
    values = " / ".join(f"{v:.2f}" if math.isfinite(v) else "n/a" for v in first.ln_bayes_factor)
    errors = " / ".join(f"{e:.3f}" if math.isfinite(e) else "n/a" for e in first.shift_err)
    methods = " / ".join(sorted({_short(part) for c in record.comparisons for m in c.methods
                                 for part in m.split(" | ")} - {"-"}))
    overall = max((c.largest_shift for c in record.comparisons
                   if math.isfinite(c.largest_shift)), default=math.nan)
    missing = sum(not c.complete for c in record.comparisons)
    return (f"| {name} | {truth['mechanism']} | {first.leader} | {first.other} | {values} | "
            f"{errors} | {first.largest_shift:.2f} | {overall:.2f} | {missing} of "
            f"{len(record.comparisons)} | {methods} | {seconds:.0f} s |")


def draw(results: list[tuple[str, PriorSensitivity]], path: Path) -> None:
    """Left: ln B (leader vs runner-up) at x0.5, x1, x2 per series; right: its change from x1
    (symmetric-log axis, linear within +-1 nat)."""
    figure = Figure(figsize=(10.0, 4.4), layout="constrained")
    values_axes, shift_axes = figure.subplots(1, 2)
    labels = [name.replace("larkfield_", "") for name, _ in results]
    colours = {0.5: "C0", 1.0: "0.3", 2.0: "C3"}
    markers = {0.5: "v", 1.0: "o", 2.0: "^"}
    for k, (_, record) in enumerate(results):
        first = record.comparisons[0]
        base = first.ln_bayes_factor[first.scales.index(1.0)]
        for j, (scale, value, error) in enumerate(zip(first.scales, first.ln_bayes_factor,
                                                      first.shift_err, strict=True)):
            offset = (j - 1) * 0.15
            label = f"ranges x{scale:g}" if k == 0 else None
            if not math.isfinite(value):
                shift_axes.annotate("n/a", (k + offset, 0.0), ha="center", fontsize=8,
                                    color=colours[scale])
                continue
            values_axes.plot(k + offset, value, markers[scale], color=colours[scale], label=label)
            if scale != 1.0:
                shift_axes.errorbar(k + offset, value - base, yerr=error, fmt=markers[scale],
                                    color=colours[scale], label=label)
    values_axes.set_yscale("log")
    values_axes.set_ylabel("ln B, leader vs runner-up")
    shift_axes.set_yscale("symlog", linthresh=1.0)
    shift_axes.axhline(0.0, color="0.5", lw=0.8)
    shift_axes.set_ylabel("ln B(scaled ranges) - ln B(declared ranges)")
    for axes in (values_axes, shift_axes):
        axes.set_xticks(range(len(results)))
        axes.set_xticklabels(labels, rotation=30, ha="right", fontsize=8)
        axes.legend(fontsize=8)
    figure.suptitle("Every catalogue range halved or doubled (reference series)", fontsize=10)
    figure.savefig(path, dpi=120)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--full", action="store_true", help="full settings (default: quick)")
    parser.add_argument("--seed", type=int, default=3)
    parser.add_argument("--rerun-all", action="store_true",
                        help="re-fit every mechanism whose wider posterior reaches an edge")
    args = parser.parse_args()
    folders = sorted(p for p in REFERENCE_CURVES.iterdir() if (p / "truth.json").is_file())
    print("| series | truth | leader | runner-up | ln B x0.5 / x1 / x2 | shift error x0.5 / x1 / "
          "x2 | largest shift (runner-up) | largest shift (all) | comparisons incomplete | "
          "how | wall time |")
    print("|---|---|---|---|---|---|---|---|---|---|---|")
    results = []
    for folder in folders:
        truth, record, seconds = run_series(folder, quick=not args.full, seed=args.seed,
                                           rerun_all=args.rerun_all)
        print(row(folder.name, truth, record, seconds), flush=True)
        results.append((folder.name, record))
    for name, record in results:
        print(f"{name}: {record.sentence}")
        for evidence in record.evidences:
            if evidence.edge_parameters or evidence.limits:
                print(f"  {evidence.mechanism_id} x{evidence.scale:g}: {evidence.method}; "
                      f"shift {evidence.ln_evidence_shift:.3f} ± "
                      f"{evidence.ln_evidence_shift_err:.3f}; edge bound "
                      f"{evidence.missed_mass_bound:.3f} ({', '.join(evidence.edge_parameters)}); "
                      f"{'; '.join(evidence.limits)}")
    draw(results, FIGURE)
    print(f"figure: {FIGURE.relative_to(HERE.parent)}")


if __name__ == "__main__":
    main()
