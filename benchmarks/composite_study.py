"""Study: mixtures of two conduction paths, and single-path data, ranked with the composites.

Each case simulates one series on the grid, device and noise of a reference scenario
(``reference_curves/generate.py``) and analyses it with the whole catalogue, composites
included (``mechid.analyse(..., quick=True)`` by default, ``--full`` for the full settings).

Mixture kinds (the true law is the composite named, simulated with the catalogue's formulas):

* ``pf_leak`` -- Poole-Frenkel with an activated ohmic leak (``poole_frenkel_with_leak``) on
  the Poole-Frenkel scenario; the leak carries ``f`` of the current at the top bias of the
  coldest temperature, ``f`` log-uniform on [0.2 %, 1 %] (the leak the project's issue
  describes), its activation energy uniform on [0.05, 0.4] eV;
* ``schottky_leak`` -- the same leak with Schottky emission (``schottky_emission_with_leak``);
* ``dt_leak`` -- direct tunnelling with an activated leak (``direct_tunnelling_with_leak``) on
  the direct-tunnelling scenario: activation energy uniform on [0.1, 0.3] eV, the leak
  ``r`` times the tunnelling current at the lowest bias of the hottest temperature, ``r``
  log-uniform on [2, 30];
* ``sclc_tfl_leak`` -- space-charge-limited current through one trap level with its
  trap-filled-limit rise, plus the ohmic current of thermal carriers
  (``sclc_single_trap_level_with_leak``) on the single-level scenario: the ohmic path
  ``r`` times the space-charge current at the lowest bias of the hottest temperature, ``r``
  log-uniform on [2, 30], activation energy uniform on [0.2, 0.4] eV (a Fermi level above the
  trap level's 0.45 eV); a truth whose trap-filled limit lies outside the swept biases
  (below 1.5x the lowest, above the highest / 1.5) is drawn again, so the rise is seen;
* ``fn_series`` -- Fowler-Nordheim behind a series resistance
  (``fowler_nordheim_series_resistance``) on the Fowler-Nordheim scenario: the resistor takes
  a fraction ``q`` of the top bias at the hottest temperature, ``q`` uniform on [2 %, 15 %];
  a truth needing less than 1 ohm (the scenario's log-uniform barrier reaches 1 eV, where the
  top current is amperes) is drawn again: leads and probes alone exceed that; so is one above
  the resistance's declared range (1e12 ohm: a barrier so high that the top current is
  sub-picoampere; before this rule such a draw made the simulation refuse the case).

Edge kind (not in the default list; ``--kinds pf_leak_edge``): ``pf_leak_edge`` -- the same
mixture with the leak at the edge of visibility: its largest ratio to the Poole-Frenkel current
over the grid, ``r``, log-uniform on [0.3, 3], activation energy uniform on [0.05, 0.4] eV.
Where ``r < 1`` the leak never leads, the truth lies outside the composite's window condition
and the right answer is Poole-Frenkel alone; where ``r > 1`` it is the composite. The
analysis should tie near ``r = 1``; the study reports which law led, ln B, and the coverage of
the law it scores as right.

Truths of the main path's parameters are drawn as in ``calibration.py`` (device priors for
device quantities, +-15 % or +-0.5 decade about the scenario's value otherwise). A draw whose
paths do not each lead somewhere on the grid (the composite's own window condition) is drawn
again; so is a truth whose formula does not hold on the whole grid (the fit's validity
refusal is the same, so the truths keep the fit's effective prior there). Single-path cases
(``--singles``): the main paths and the leak law alone, truths drawn the same way; they
measure the false-composite rate.

Reported per case: the leader, whether it is the true law, ln B of the true law over the best
other, and for the true law whether each sampled physical parameter's central 95 % interval
covers the truth. Summary: the share ranked correctly per kind, coverage per kind, the
false-composite rate on single-path data.

Usage (from the repo root)::

    python benchmarks/composite_study.py --cases 40 --singles 24 --seed 20261203
    python benchmarks/composite_study.py --cases 8 --singles 0 --kinds fn_series --seed 7
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

import mechid
from mechid.catalogue import get_mechanism
from mechid.catalogue.base import Mechanism
from mechid.catalogue.composite import SERIES_RESISTANCE
from mechid.catalogue.space_charge import trap_filled_limit_voltage_V
from mechid.device import Device
from mechid.inference.fit import NOISE_PARAMETERS
from mechid.simulate import simulate_series

sys.path.insert(0, str(Path(__file__).resolve().parent))
from calibration import draw_truth, load_scenarios, scenario_device  # noqa: E402

SCENARIOS = load_scenarios()
#: Mixture kind -> (composite id, main path id).
KINDS = {
    "pf_leak": ("poole_frenkel_with_leak", "poole_frenkel"),
    "schottky_leak": ("schottky_emission_with_leak", "schottky_emission"),
    "dt_leak": ("direct_tunnelling_with_leak", "direct_tunnelling"),
    "fn_series": ("fowler_nordheim_series_resistance", "fowler_nordheim"),
    "sclc_tfl_leak": ("sclc_single_trap_level_with_leak", "sclc_single_trap_level"),
}
#: Kinds run only when named: kind -> (composite id, main path id).
EDGE_KINDS = {"pf_leak_edge": ("poole_frenkel_with_leak", "poole_frenkel")}
#: Single-path laws whose data measure the false-composite rate.
SINGLES = ("poole_frenkel", "schottky_emission", "direct_tunnelling", "fowler_nordheim",
           "ohmic_activated", "sclc_single_trap_level")
LEAK = get_mechanism("ohmic_activated")


@dataclass(frozen=True)
class Case:
    """One simulated series and what the analysis made of it."""

    index: int
    kind: str
    true_id: str
    truth: dict[str, float]
    leader: str
    ln_b_true_over_best_other: float
    covered: dict[str, bool]
    true_adequate: bool | None
    seconds: float
    error: str | None = None
    note: str = ""


def _grid(scenario: Mapping[str, Any]) -> tuple[np.ndarray, np.ndarray]:
    v = np.asarray(scenario["voltages_V"], float)
    t = np.asarray(scenario["temperatures_K"], float)
    grid_v, grid_t = np.meshgrid(v, t)
    return grid_v.ravel(), grid_t.ravel()


def _leak_truth(main: Mechanism, main_truth: Mapping[str, float], scenario: Mapping[str, Any],
                device: Device, rng: np.random.Generator, kind: str) -> dict[str, float]:
    """Activation energy and prefactor of the leak (see the module for the rules)."""
    v = np.abs(np.asarray(scenario["voltages_V"], float))
    temperatures = np.asarray(scenario["temperatures_K"], float)
    if kind in ("dt_leak", "sclc_tfl_leak"):
        energy = rng.uniform(0.1, 0.3) if kind == "dt_leak" else rng.uniform(0.2, 0.4)
        bias, temperature = v.min(), temperatures.max()
        target = 10 ** rng.uniform(np.log10(2.0), np.log10(30.0))
    else:
        energy = rng.uniform(0.05, 0.4)
        bias, temperature = v.max(), temperatures.min()
        target = 10 ** rng.uniform(np.log10(0.002), np.log10(0.01))
    main_current = abs(float(main.current(bias, temperature, main_truth, device)))
    unit = abs(float(LEAK.current(bias, temperature, {"activation_energy_eV": energy,
                                                      "prefactor_S": 1.0}, device)))
    return {"leak_activation_energy_eV": energy, "leak_prefactor_S": target * main_current / unit}


def _series_truth(main: Mechanism, main_truth: Mapping[str, float],
                  scenario: Mapping[str, Any], device: Device, rng: np.random.Generator
                  ) -> dict[str, float]:
    """The resistance that takes a fraction q of the top bias at the hottest temperature."""
    share = rng.uniform(0.02, 0.15)
    top = float(np.max(np.abs(scenario["voltages_V"])))
    hottest = float(np.max(scenario["temperatures_K"]))
    current = abs(float(main.current((1 - share) * top, hottest, main_truth, device)))
    return {SERIES_RESISTANCE: share * top / current}


def _rise_is_swept(truth: Mapping[str, float], scenario: Mapping[str, Any]) -> bool:
    """Lampert's trap-filled-limit voltage lies well inside the swept biases."""
    v = np.abs(np.asarray(scenario["voltages_V"], float))
    limit = float(trap_filled_limit_voltage_V(truth["trap_density_per_cm3"],
                                              truth["thickness_nm"], truth["dielectric_constant"]))
    return 1.5 * v.min() <= limit <= v.max() / 1.5


def _setting(composite_id: str, main_id: str) -> tuple[Mechanism, Mechanism, Mapping[str, Any],
                                                      Device, np.ndarray, np.ndarray]:
    """The composite, its main path, the main path's scenario, device and (V, T) grid."""
    scenario = SCENARIOS[main_id]
    return (get_mechanism(composite_id), get_mechanism(main_id), scenario,
            scenario_device(scenario), *_grid(scenario))


def draw_mixture(kind: str, rng: np.random.Generator) -> tuple[Mechanism, dict[str, float],
                                                               Mapping[str, Any], Device]:
    """A composite truth whose parts are each seen on the grid (redrawn until they are)."""
    composite, main, scenario, device, v, t = _setting(*KINDS[kind])
    for _ in range(200):
        truth = draw_truth(main, scenario, device, rng)
        extra = (_series_truth(main, truth, scenario, device, rng) if kind == "fn_series"
                 else _leak_truth(main, truth, scenario, device, rng, kind))
        truth = {**truth, **extra}
        values = {k: np.array([[truth[k]]]) for k in composite.parameter_names}
        current = composite.current(v, t, truth, device)
        if kind == "fn_series" and not (
                max(1.0, composite.parameter(SERIES_RESISTANCE).lower)
                <= truth[SERIES_RESISTANCE] <= composite.parameter(SERIES_RESISTANCE).upper):
            continue
        if kind == "sclc_tfl_leak" and not _rise_is_swept(truth, scenario):
            continue
        if np.all(np.isfinite(current)) and bool(
                composite.window_condition(np.abs(v), t, device, **values)[0]):
            return composite, truth, scenario, device
    raise RuntimeError(f"{kind}: no truth with both parts seen in 200 draws")


def draw_edge(kind: str, rng: np.random.Generator) -> tuple[Mechanism, dict[str, float],
                                                             Mapping[str, Any], Device, str,
                                                             str]:
    """A mixture whose leak is at the edge of visibility (see the module), the law that is
    right for it (the composite where the leak leads somewhere, else the main path) and a note
    with the leak's largest ratio to the main path."""
    composite, main, scenario, device, v, t = _setting(*EDGE_KINDS[kind])
    for _ in range(200):
        truth = draw_truth(main, scenario, device, rng)
        energy = rng.uniform(0.05, 0.4)
        ratio = 10 ** rng.uniform(np.log10(0.3), np.log10(3.0))
        with np.errstate(invalid="ignore", divide="ignore"):
            unit = np.abs(LEAK.current(v, t, {"activation_energy_eV": energy,
                                              "prefactor_S": 1.0}, device))
            largest = np.nanmax(unit / np.abs(main.current(v, t, truth, device)))
        truth = {**truth, "leak_activation_energy_eV": energy,
                 "leak_prefactor_S": ratio / largest}
        if not all(p.lower <= truth[p.name] <= p.upper for p in composite.parameters):
            continue  # a leak prefactor below the declared range: the simulation refuses it
        values = {k: np.array([[truth[k]]]) for k in composite.parameter_names}
        if not np.all(np.isfinite(composite.current(v, t, truth, device))):
            continue
        leads = bool(composite.window_condition(np.abs(v), t, device, **values)[0])
        return (composite, truth, scenario, device, composite.id if leads else main.id,
                f"leak/main largest {ratio:.2f}")
    raise RuntimeError(f"{kind}: no truth inside the formulas' validity in 200 draws")


def draw_single(mechanism_id: str, rng: np.random.Generator
                ) -> tuple[Mechanism, dict[str, float], Mapping[str, Any], Device]:
    """A single-path truth on its reference scenario (as the calibration study draws it)."""
    mechanism = get_mechanism(mechanism_id)
    scenario = SCENARIOS[mechanism_id]
    device = scenario_device(scenario)
    v, t = _grid(scenario)
    for _ in range(200):
        truth = draw_truth(mechanism, scenario, device, rng)
        if np.all(np.isfinite(mechanism.current(v, t, truth, device))):
            return mechanism, truth, scenario, device
    raise RuntimeError(f"{mechanism_id}: no truth inside the formula's validity in 200 draws")


def _covered(draws: Mapping[str, np.ndarray], truth: Mapping[str, float]) -> dict[str, bool]:
    hits = {}
    for name, value in truth.items():
        sample = draws.get(name)
        if sample is None or name in NOISE_PARAMETERS or np.ptp(sample) == 0:
            continue
        low, high = np.quantile(sample, [0.025, 0.975])
        hits[name] = bool(low <= value <= high)
    return hits


def run_case(index: int, kind: str, draw: Callable[[np.random.Generator], tuple],
             rng: np.random.Generator, quick: bool) -> Case:
    """Simulate one series, analyse it with the whole catalogue and score the true law."""
    truth_rng, noise_rng = rng.spawn(2)
    drawn = draw(truth_rng)
    mechanism, truth, scenario, device = drawn[:4]
    scored = get_mechanism(drawn[4]) if len(drawn) > 4 else mechanism
    note = drawn[5] if len(drawn) > 5 else ""
    seed = int(rng.integers(2**31))
    started = time.perf_counter()
    try:
        series = simulate_series(mechanism, truth, scenario["temperatures_K"],
                                 scenario["voltages_V"], device,
                                 noise_relative=scenario["noise_relative"],
                                 noise_floor_A=scenario["noise_floor_A"], rng=noise_rng)
        data = {"temperature_K": series.temperature_K, "voltage_V": series.voltage_V,
                "current_A": series.current_A}
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            analysis = mechid.analyse(data, device=device, quick=quick, seed=seed)
    except Exception as exc:  # noqa: BLE001 (a failure is an outcome of the study)
        return Case(index, kind, scored.id, truth, "-", float("nan"), {}, None,
                    time.perf_counter() - started, f"{type(exc).__name__}: {exc}", note)
    ranked = analysis.result.mechanisms
    by_id = {r.id: r for r in ranked}
    true = by_id.get(scored.id)
    others = [r.log_evidence for r in ranked if r.id != scored.id]
    ln_b = (float("nan") if true is None
            else true.log_evidence - (max(others) if others else -np.inf))
    if scored is not mechanism or note:
        main_id = mechanism.options.get("paths", (mechanism.id,))[0]
        pair = [by_id.get(i) for i in (mechanism.id, main_id)]
        note += ("; lnB(composite:main) " + (f"{pair[0].log_evidence - pair[1].log_evidence:+.1f}"
                                             if None not in pair else "n/a (one not sampled)"))
    return Case(index, kind, scored.id, truth, ranked[0].id if ranked else "-", ln_b,
                {} if true is None else _covered(true.draws, truth),
                None if true is None else bool(true.fit_adequate),
                time.perf_counter() - started, note=note)


def _line(case: Case) -> str:
    cover = " ".join(f"{k}={'y' if v else 'NO'}" for k, v in case.covered.items())
    status = "correct" if case.leader == case.true_id else f"WRONG (leader {case.leader})"
    truth = " ".join(f"{k}={v:.4g}" for k, v in case.truth.items())
    return (f"{case.index:3d} {case.kind:14s} {status} | lnB(true:best other)="
            f"{case.ln_b_true_over_best_other:+.1f} | adequate={case.true_adequate} | "
            f"covered95 {cover or '-'} | {case.seconds:.0f} s | truth {truth}"
            + (f" | {case.note}" if case.note else "")
            + (f" | ERROR {case.error}" if case.error else ""))


def summary(cases: list[Case]) -> list[str]:
    """Correct-ranking share and coverage per kind, and the false-composite rate."""
    lines = []
    composites = {composite for composite, _ in KINDS.values()}
    for kind in dict.fromkeys(c.kind for c in cases):
        these = [c for c in cases if c.kind == kind]
        correct = sum(c.leader == c.true_id for c in these)
        hits = [flag for c in these for flag in c.covered.values()]
        errors = sum(c.error is not None for c in these)
        lines.append(f"{kind}: ranked first {correct}/{len(these)}; 95 % coverage "
                     f"{sum(hits)}/{len(hits)} intervals; failed {errors}")
    mixtures = [c for c in cases if c.kind in KINDS]
    singles = [c for c in cases if c.kind == "single"]
    for kind in EDGE_KINDS:
        these = [c for c in cases if c.kind == kind]
        for label, group in (("leak never leads (main path right)",
                              [c for c in these if c.true_id not in composites]),
                             ("leak leads somewhere (composite right)",
                              [c for c in these if c.true_id in composites])):
            if group:
                hits = [flag for c in group for flag in c.covered.values()]
                lines.append(f"{kind}, {label}: right law first "
                             f"{sum(c.leader == c.true_id for c in group)}/{len(group)}; "
                             f"95 % coverage {sum(hits)}/{len(hits)}")
    if mixtures:
        hits = [flag for c in mixtures for flag in c.covered.values()]
        lines.append(f"mixtures: ranked first {sum(c.leader == c.true_id for c in mixtures)}/"
                     f"{len(mixtures)}; 95 % coverage {sum(hits)}/{len(hits)}")
    if singles:
        false = sum(c.leader in composites for c in singles)
        lines.append(f"single-path data: ranked first {sum(c.leader == c.true_id for c in singles)}"
                     f"/{len(singles)}; a composite led {false}/{len(singles)} "
                     "(the false-composite rate)")
    return lines


def main() -> None:
    """Run the study and print one line per case, then the summary."""
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--cases", type=int, default=40, help="mixture cases (kinds in turn)")
    parser.add_argument("--singles", type=int, default=20, help="single-path cases (in turn)")
    parser.add_argument("--kinds", nargs="*", default=list(KINDS),
                        choices=[*KINDS, *EDGE_KINDS])
    parser.add_argument("--seed", type=int, default=2026)
    parser.add_argument("--full", action="store_true", help="full settings (default quick)")
    args = parser.parse_args()
    rng = np.random.default_rng(args.seed)
    started, cases = time.perf_counter(), []
    plan = [(k, args.kinds[k % len(args.kinds)], "mixture") for k in range(args.cases)]
    plan += [(args.cases + k, SINGLES[k % len(SINGLES)], "single") for k in range(args.singles)]
    for index, what, family in plan:
        case_rng = rng.spawn(1)[0]
        if what in EDGE_KINDS:
            case = run_case(index, what, lambda r, w=what: draw_edge(w, r), case_rng,
                            not args.full)
        elif family == "mixture":
            case = run_case(index, what, lambda r, w=what: draw_mixture(w, r), case_rng,
                            not args.full)
        else:
            case = run_case(index, "single", lambda r, w=what: draw_single(w, r), case_rng,
                            not args.full)
        cases.append(case)
        print(_line(case), flush=True)
    for line in summary(cases):
        print(line)
    print(f"{len(cases)} cases in {(time.perf_counter() - started) / 60:.1f} min "
          f"({'full' if args.full else 'quick'} settings, seed {args.seed})")


if __name__ == "__main__":
    main()
