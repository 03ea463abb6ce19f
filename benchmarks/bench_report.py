"""How long the evidence report adds to an analysis.

Runs the analysis of one reference curve, then times, separately: building the figures,
rendering the HTML report, writing every figure as PNG (300 dpi) and PDF, and the summary
CSV. The target is under 15 s for a typical series (all seven mechanisms fitted).

Usage (from the repo root)::

    python benchmarks/bench_report.py                      # all mechanisms, quick ladder
    python benchmarks/bench_report.py --mechanisms poole_frenkel schottky_emission
    python benchmarks/bench_report.py --curve larkfield_alox_direct_tunnelling --full

Prints wall-clock and CPU seconds (CPU time is the fairer number on a busy machine).
"""

from __future__ import annotations

import argparse
import tempfile
import time
import warnings
from collections.abc import Callable
from pathlib import Path
from typing import Any

from mechid.analysis import AnalysisSettings, run_analysis_full
from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidWarning
from mechid.report import write_outputs
from mechid.report.figures import HTML_DPI, build_figures
from mechid.report.html import render_html
from mechid.results import to_plain_json

REFERENCE_DIR = Path(__file__).resolve().parent.parent / "reference_curves"


def timed(label: str, action: Callable[[], Any]) -> tuple[Any, float]:
    """Run ``action`` and print its wall-clock and CPU time."""
    wall, cpu = time.perf_counter(), time.process_time()
    value = action()
    wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
    print(f"{label:<34} {wall:7.2f} s wall  {cpu:7.2f} s CPU")
    return value, wall


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--curve", default="larkfield_sinx_poole_frenkel")
    parser.add_argument("--mechanisms", nargs="*", default=None)
    parser.add_argument("--full", action="store_true", help="full ladder instead of --quick")
    args = parser.parse_args()

    folder = REFERENCE_DIR / args.curve
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        series = read_series(folder / "data.csv")
        device = read_device_toml(folder / "device.toml")
        settings = AnalysisSettings(quick=not args.full,
                                    mechanisms=tuple(args.mechanisms) if args.mechanisms else None)
        run, _ = timed("analysis", lambda: run_analysis_full(series, device, settings, seed=0))

    data = to_plain_json(run.result)
    figures, t_build = timed("build figures", lambda: build_figures(run, data))
    pngs, t_png = timed("render PNGs for the HTML",
                        lambda: {f.key: f.png_bytes(HTML_DPI) for f in figures})
    html_text, t_html = timed("assemble HTML", lambda: render_html(data, run, figures, pngs))
    print(f"{'report total (figures + HTML)':<34} {t_build + t_png + t_html:7.2f} s wall  "
          f"({len(figures)} figures, {len(run.result.mechanisms)} fitted mechanisms, "
          f"{len(html_text) / 1e6:.2f} MB)")
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp)
        timed("write_outputs (report+figures+csv)",
              lambda: write_outputs(run, report=out / "r.html", figures_dir=out / "figures",
                                    summary=out / "s.csv"))


if __name__ == "__main__":
    main()
