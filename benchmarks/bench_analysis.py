"""Benchmark the whole job on the reference series: speed, evidence errors, recovery of the truth.

Prints, per series: wall time of the analysis, per-mechanism wall time and likelihood point
evaluations per second, the evidence error achieved, the rank of the true mechanism and
whether every true parameter lies inside its 95 % interval. Also times a "typical series"
(8 temperatures x 100 voltages, all seven mechanisms). Run from the repo root::

    python benchmarks/bench_analysis.py            # full settings
    python benchmarks/bench_analysis.py --quick    # the --quick settings
    python benchmarks/bench_analysis.py --only larkfield_sinx_poole_frenkel
    python benchmarks/bench_analysis.py --fit-all   # also sample mechanisms far below the leader
"""

from __future__ import annotations

import argparse
import json
import time
import warnings
from pathlib import Path

import numpy as np

from mechid.analysis import AnalysisSettings, run_analysis_full
from mechid.catalogue import get_mechanism
from mechid.data import IVSeries, read_series
from mechid.device import device_from_values, read_device_toml
from mechid.errors import MechidWarning
from mechid.inference.domain import check_domain
from mechid.simulate import simulate_series

ROOT = Path(__file__).resolve().parents[1] / "reference_curves"


def _report(name: str, run, truth: dict, wall: float) -> None:
    result = run.result
    ids = [m.id for m in result.mechanisms]
    rank = ids.index(truth["mechanism"]) + 1
    best = result.mechanism(truth["mechanism"])
    inside = {k: best.parameters[k].ci95[0] <= v <= best.parameters[k].ci95[1]
              for k, v in truth["params"].items() if not best.parameters[k].fixed}
    print(f"\n{name}: {wall:.1f} s, {result.input['n_points']} points; true mechanism "
          f"{truth['mechanism']} ranked {rank}; truth inside 95 %: "
          + ", ".join(f"{k}={'yes' if ok else 'NO'}" for k, ok in inside.items()))
    print(f"  {'mechanism':26s} {'ln Z':>12s} {'err':>6s} {'bridge':>12s} {'time s':>7s} "
          f"{'Mpt/s':>6s} adequate flags")
    for m in result.mechanisms:
        fit = run.fits[m.id]
        points = fit.evidence.n_likelihood_calls * fit.target.n_points
        seconds = fit.run.wall_time
        print(f"  {m.id:26s} {m.log_evidence:12.2f} {m.log_evidence_err:6.3f} "
              f"{fit.evidence.log_evidence_bridge:12.2f} {seconds:7.1f} {points / seconds / 1e6:6.1f} "
              f"{'yes' if m.fit_adequate else 'no ':3s}      {','.join(fit.evidence.flags)}")
    _report_domain_checks(run)
    for entry in result.below_leader:
        print(f"  not sampled: {entry.id:26s} best ln L found {entry.best_log_likelihood:.1f}, "
              f"{entry.leader_log_evidence - entry.best_log_likelihood:.0f} nats below "
              f"ln Z of {entry.leader_id}")


def _report_domain_checks(run) -> None:
    """Cost and outcome of each fit's validity-domain check (repeated here to time it)."""
    print(f"  {'validity check':26s} {'time s':>7s} {'sets':>6s} {'gain':>9s} pulls")
    for m in run.result.mechanisms:
        fit = run.fits[m.id]
        began = time.perf_counter()
        check = check_domain(fit.target, [fit.map_internal], np.random.default_rng(0))
        seconds = time.perf_counter() - began
        print(f"  {m.id:26s} {seconds:7.2f} {check.n_likelihood_calls:6d} {check.gain:9.1f} "
              f"{'yes' if m.validity and m.validity.pulls else 'no'}")


def typical_series() -> tuple[IVSeries, object]:
    """8 temperatures x 100 voltages of Poole-Frenkel data (both polarities)."""
    mech = get_mechanism("poole_frenkel")
    device = device_from_values(thickness_nm=30.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4)
    mags = np.geomspace(3.0, 12.0, 50)
    sim = simulate_series(mech, {"trap_depth_eV": 1.2, "dielectric_constant": 4.2,
                                 "prefactor_S_per_cm": 1.0, "thickness_nm": 30.0},
                          np.linspace(300, 450, 8), np.r_[-mags[::-1], mags], device,
                          noise_relative=0.02, noise_floor_A=1e-14, rng=np.random.default_rng(5))
    return IVSeries(sim.temperature_K, sim.voltage_V, sim.current_A), device


def main() -> None:
    """Run the benchmark and print the figures."""
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true")
    parser.add_argument("--only", nargs="*", default=None)
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--skip-typical", action="store_true")
    parser.add_argument("--fit-all", action="store_true",
                        help="sample every mechanism (no skipping far below the leader)")
    args = parser.parse_args()
    warnings.simplefilter("ignore", MechidWarning)
    settings = AnalysisSettings(quick=args.quick, skip_below_leader=not args.fit_all)
    print(f"settings: {'quick' if args.quick else 'full'} ladder {settings.ladder().n_temperatures} rungs")
    if not args.skip_typical:
        series, device = typical_series()
        began = time.perf_counter()
        run = run_analysis_full(series, device, settings, seed=args.seed)
        truth = {"mechanism": "poole_frenkel", "params": {"trap_depth_eV": 1.2, "dielectric_constant": 4.2,
                                                          "prefactor_S_per_cm": 1.0, "thickness_nm": 30.0}}
        _report("typical series (8 T x 100 V, PF)", run, truth, time.perf_counter() - began)
    for folder in sorted(p for p in ROOT.iterdir() if (p / "truth.json").is_file()):
        if args.only and folder.name not in args.only:
            continue
        truth = json.loads((folder / "truth.json").read_text())
        began = time.perf_counter()
        run = run_analysis_full(read_series(folder / "data.csv"), read_device_toml(folder / "device.toml"),
                                settings, seed=args.seed)
        _report(folder.name, run, truth, time.perf_counter() - began)


if __name__ == "__main__":
    main()
