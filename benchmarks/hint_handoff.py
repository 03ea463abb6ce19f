"""What the straightened-plot hints change: mode-search time and height, fit time and ln Z.

For the typical series and every reference series, the screening's
:class:`~mechid.catalogue.base.ParameterHints` are handed to the mode search (or not), with the
same random stream either way. Prints, per series:

* for every mechanism: wall time of the mode search, the number of parameter points it
  evaluated (independent of machine load) and the best log posterior it found, with and
  without hints; ``--n-screen`` makes the screen smaller (the default search screens 2000
  prior draws), which shows whether the hints rescue a thin screen;
* for the true mechanism: wall time of the whole fit and ln Z +/- its error, with and
  without hints (full settings unless ``--quick``).

Run from the repo root::

    python benchmarks/hint_handoff.py
    python benchmarks/hint_handoff.py --quick --seeds 0 1 2
"""

from __future__ import annotations

import argparse
import json
import time
import warnings

import numpy as np
from bench_analysis import ROOT, typical_series

from mechid.analysis import AnalysisSettings
from mechid.catalogue import MECHANISMS, get_mechanism
from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidWarning
from mechid.inference.fit import fit_mechanism
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors
from mechid.inference.start import find_modes
from mechid.screening import linearise


def _series_list() -> list[tuple[str, object, object, str]]:
    series, device = typical_series()
    out = [("typical (8 T x 100 V, PF)", series, device, "poole_frenkel")]
    for folder in sorted(p for p in ROOT.iterdir() if (p / "truth.json").is_file()):
        truth = json.loads((folder / "truth.json").read_text())
        out.append((folder.name, read_series(folder / "data.csv"),
                    read_device_toml(folder / "device.toml"), truth["mechanism"]))
    return out


class _Counting:
    """A target whose log_posterior counts the parameter points it is asked for."""

    def __init__(self, target: MechanismTarget) -> None:
        self._target = target
        self.points = 0

    def __getattr__(self, name: str):
        return getattr(self._target, name)

    def log_posterior(self, theta):
        self.points += len(theta)
        return self._target.log_posterior(theta)


def _mode_search(series, device, hints, seed: int, n_polish: int, n_screen: int) -> None:
    print(f"  {'mechanism':26s} {'hinted':28s} {'search s':>16s} {'points':>14s} "
          f"{'best ln post':>26s}")
    for mechanism in MECHANISMS:
        if mechanism.needs_area and device.area_cm2 is None:
            continue
        target = MechanismTarget(mechanism, series.voltage_V, series.temperature_K,
                                 series.current_A, device,
                                 mechanism_priors(mechanism, device, series.current_A))
        row = []
        for given in (None, hints[mechanism.id]):
            counting = _Counting(target)
            began = time.perf_counter()
            modes = find_modes(counting, np.random.default_rng(seed), given, n_screen=n_screen,
                               n_polish=n_polish)
            row.append((time.perf_counter() - began, counting.points, modes[0].log_posterior))
        hinted = ",".join(sorted(hints[mechanism.id].values)) or "-"
        print(f"  {mechanism.id:26s} {hinted[:28]:28s} {row[0][0]:7.2f} {row[1][0]:7.2f}  "
              f"{row[0][1]:6d} {row[1][1]:6d}  {row[0][2]:12.2f} {row[1][2]:12.2f}")


def _whole_fit(series, device, hints, mechanism_id: str, settings: AnalysisSettings,
               seeds: list[int]) -> None:
    mechanism = get_mechanism(mechanism_id)
    search = settings.search()
    for seed in seeds:
        for label, given in (("without", None), ("with", hints[mechanism_id])):
            began = time.perf_counter()
            fit = fit_mechanism(mechanism, series.voltage_V, series.temperature_K,
                                series.current_A, device, settings.ladder(),
                                np.random.default_rng(seed), hints=given, **search)
            wall = time.perf_counter() - began
            r = fit.result
            print(f"  fit {mechanism_id} seed {seed} {label:7s} hints: {wall:6.1f} s  "
                  f"ln Z = {r.log_evidence:.3f} +/- {r.log_evidence_err:.3f}")


def main() -> None:
    """Run the comparison and print the figures."""
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true")
    parser.add_argument("--seeds", type=int, nargs="*", default=[0])
    parser.add_argument("--only", nargs="*", default=None)
    parser.add_argument("--no-fit", action="store_true", help="mode search only")
    parser.add_argument("--n-screen", type=int, default=2000, help="prior draws screened")
    args = parser.parse_args()
    warnings.simplefilter("ignore", MechidWarning)
    settings = AnalysisSettings(quick=args.quick)
    print(f"settings: {'quick' if args.quick else 'full'}; search {settings.search()}")
    for name, series, device, truth in _series_list():
        if args.only and name not in args.only:
            continue
        hints = {m.mechanism_id: m.hints for m in linearise(series, device).mechanisms}
        print(f"\n{name} (true mechanism {truth}); mode search without / with hints")
        _mode_search(series, device, hints, args.seeds[0], settings.search()["n_polish"],
                     args.n_screen)
        if not args.no_fit:
            _whole_fit(series, device, hints, truth, settings, args.seeds)


if __name__ == "__main__":
    main()
