"""Simulated Schottky diodes: which hypothesis ranks first, and do the intervals cover the truth?

Each case draws a diode (seeded), simulates its I-V-T series with 1 % relative noise and a
1e-13 A floor, and runs ``mechid.analyse(..., quick=True, workers=1)`` over the three diode
hypotheses and the seven odd mechanisms of the catalogue. Half the cases are homogeneous
(sigma = 0: constant ideality n in 1.0-2.0), half carry a Gaussian barrier spread
(sigma 0.02-0.15 V, Werner & Guettler 1991, with rho2 and rho3 drawn so that n_ap stays in
1.0-2.0 over the measured temperatures).

Reported per case: the leader and its probability, ln B of the diode hypotheses against each
other, how much the spread matters over the window (the change of the lowering
e sigma^2/2kT between the coldest and the warmest temperature, in meV), and whether the 95 %
intervals of the right hypothesis cover phi_B (or phibar), sigma, n and R_s.

Run: ``python benchmarks/diode_study.py [n_cases] [--from K] [--seed N] [--full]
[--small-spread]``;
``--full`` instead times one full (non-quick) analysis of a typical homogeneous diode series;
``--small-spread`` draws only inhomogeneous diodes with a small spread (sigma 0.003-0.03 V, its
own seed :data:`SMALL_SPREAD_SEED`) and fits only the three diode hypotheses, to find where the
inhomogeneous hypothesis stops winning.

``--spread-only`` isolates the spread: inhomogeneous diodes whose only departure from a
homogeneous one is sigma (rho3 = 0 and rho2 = 1 - 1/n with n in 1.0-1.5, so n_ap is the same
at every temperature), sigma log-uniform in 0.002-0.05 V, every fourth case sigma = 0 exactly
(simulated with the homogeneous law), window from 100-200 K to 300-400 K; own seed
:data:`SPREAD_ONLY_SEED`, the three diode hypotheses. It asks whether the inhomogeneous
hypothesis wins exactly when the spread matters, i.e. when the change of the lowering
e sigma^2/2kT across the window is resolved by the data.
"""

from __future__ import annotations

import sys
import time
from dataclasses import dataclass

import numpy as np

import mechid
from mechid.catalogue import (
    INHOMOGENEOUS_SCHOTTKY_DIODE,
    SCHOTTKY_DIODE,
    mechanism_ids,
)
from mechid.constants import BOLTZMANN_EV
from mechid.device import Device
from mechid.simulate import simulate_series

#: Seed of the case draws (chosen before any case was looked at).
STUDY_SEED = 90417
#: Seed of the small-spread cases (chosen before any of them was looked at).
SMALL_SPREAD_SEED = 61203
#: Range of sigma in the main study and in the small-spread study, V.
SPREAD_RANGE_V = (0.02, 0.15)
SMALL_SPREAD_RANGE_V = (0.003, 0.03)
#: Seed of the spread-only cases (chosen before any of them was looked at).
SPREAD_ONLY_SEED = 80521
SPREAD_ONLY_RANGE_V = (0.002, 0.05)
DIODE_CANDIDATES = ("schottky_diode", "inhomogeneous_schottky_diode", "lateral_2d_schottky_diode")
AREA_CM2 = 1e-3
DEVICE = Device(area_cm2=AREA_CM2)
VOLTAGES_V = np.round(np.linspace(-2.0, 1.0, 31), 6)
VOLTAGES_V = VOLTAGES_V[VOLTAGES_V != 0.0]
N_TEMPERATURES = 5
NOISE_RELATIVE = 0.01
NOISE_FLOOR_A = 1e-13
CANDIDATES = mechanism_ids()  # the three diode hypotheses and the seven odd mechanisms


@dataclass(frozen=True)
class Case:
    """One simulated diode: the hypothesis it was simulated with, its truth and its window."""

    index: int
    inhomogeneous: bool
    truth: dict[str, float]
    temperatures_K: np.ndarray

    @property
    def spread_effect_meV(self) -> float:
        """Change of e sigma^2/2kT between the coldest and warmest temperature, in meV."""
        variance = self.truth.get("barrier_variance_V2", 0.0)
        t = self.temperatures_K
        return 1e3 * variance / (2 * BOLTZMANN_EV) * (1 / t.min() - 1 / t.max())


def draw_case(rng: np.random.Generator, index: int,
              spread_range_V: tuple[float, float] = SPREAD_RANGE_V,
              inhomogeneous: bool | None = None) -> Case:
    """A diode with barrier 0.6-1.0 eV, A** 10-150, R_s 10-1e4 ohm, R_sh 1e7-1e11 ohm.

    Odd cases are inhomogeneous unless ``inhomogeneous`` says otherwise; their sigma is drawn
    uniformly in ``spread_range_V``.
    """
    inhomogeneous = index % 2 == 1 if inhomogeneous is None else inhomogeneous
    barrier = rng.uniform(0.6, 1.0)
    common = {
        "richardson_constant_A_cm2_K2": float(10 ** rng.uniform(1.0, np.log10(150.0))),
        "series_resistance_ohm": float(10 ** rng.uniform(1.0, 4.0)),
        "shunt_resistance_ohm": float(10 ** rng.uniform(7.0, 11.0)),
    }
    t_max = rng.uniform(300.0, 400.0)
    if not inhomogeneous:
        t_min = rng.uniform(40.0, 200.0)
        truth = {"barrier_height_eV": barrier, "ideality_factor": rng.uniform(1.0, 2.0), **common}
    else:
        sd = rng.uniform(*spread_range_V)
        # keep the apparent barrier above 0.3 eV at the coldest temperature
        t_floor = sd**2 / (2 * BOLTZMANN_EV * (barrier - 0.3))
        t_min = rng.uniform(max(40.0, t_floor), max(200.0, t_floor + 20.0))
        rho2 = rng.uniform(0.0, 0.3)
        # n_ap(T_min) <= 2: 1 - rho2 + rho3/2kT_min >= 1/2
        rho3 = rng.uniform(max(-(0.5 - rho2) * 2 * BOLTZMANN_EV * t_min, -0.01), 0.0)
        truth = {"mean_barrier_height_eV": barrier, "barrier_variance_V2": sd**2,
                 "voltage_coefficient_rho2": rho2, "voltage_coefficient_rho3_V": rho3, **common}
    temperatures = np.round(np.linspace(t_min, t_max, N_TEMPERATURES), 1)
    return Case(index, inhomogeneous, {k: float(v) for k, v in truth.items()}, temperatures)


def draw_spread_only_case(rng: np.random.Generator, index: int) -> Case:
    """A diode that differs from a homogeneous one only by its barrier spread (see module)."""
    barrier = rng.uniform(0.6, 1.0)
    ideality = rng.uniform(1.0, 1.5)
    common = {
        "richardson_constant_A_cm2_K2": float(10 ** rng.uniform(1.0, np.log10(150.0))),
        "series_resistance_ohm": float(10 ** rng.uniform(1.0, 4.0)),
        "shunt_resistance_ohm": float(10 ** rng.uniform(7.0, 11.0)),
    }
    temperatures = np.round(np.linspace(rng.uniform(100.0, 200.0), rng.uniform(300.0, 400.0),
                                        N_TEMPERATURES), 1)
    sd = float(np.exp(rng.uniform(*np.log(SPREAD_ONLY_RANGE_V))))
    if index % 4 == 0:
        truth = {"barrier_height_eV": barrier, "ideality_factor": ideality, **common}
        return Case(index, False, truth, temperatures)
    truth = {"mean_barrier_height_eV": barrier, "barrier_variance_V2": sd**2,
             "voltage_coefficient_rho2": 1.0 - 1.0 / ideality, "voltage_coefficient_rho3_V": 0.0,
             **common}
    return Case(index, True, {k: float(v) for k, v in truth.items()}, temperatures)


def simulate(case: Case, rng: np.random.Generator) -> dict[str, np.ndarray]:
    """The noisy series of a case, as the columns ``mechid.analyse`` reads."""
    mechanism = INHOMOGENEOUS_SCHOTTKY_DIODE if case.inhomogeneous else SCHOTTKY_DIODE
    series = simulate_series(mechanism, case.truth, case.temperatures_K, VOLTAGES_V, DEVICE,
                             noise_relative=NOISE_RELATIVE, noise_floor_A=NOISE_FLOOR_A, rng=rng)
    return {"temperature_K": series.temperature_K, "voltage_V": series.voltage_V,
            "current_A": series.current_A}


def _covers(entry: dict, name: str, value: float) -> str:
    """'yes'/'no' when the 95 % interval of ``name`` covers ``value``, '-' when not fitted."""
    parameters = entry.get("parameters", {})
    if name not in parameters:
        return "-"
    lo, hi = parameters[name]["ci95"]
    return "yes" if lo <= value <= hi else f"no({lo:.4g}..{hi:.4g} vs {value:.4g})"


def _truth_ideality(case: Case) -> float:
    """n of a homogeneous case; the warmest-temperature n_ap of an inhomogeneous one."""
    if not case.inhomogeneous:
        return case.truth["ideality_factor"]
    kt = BOLTZMANN_EV * case.temperatures_K.max()
    return 1 / (1 - case.truth["voltage_coefficient_rho2"]
                + case.truth["voltage_coefficient_rho3_V"] / (2 * kt))


def run_case(case: Case, seed: int, candidates: tuple[str, ...] = CANDIDATES) -> dict:
    """Analyse one case and summarise what the study reports."""
    data = simulate(case, np.random.default_rng(seed))
    start = time.perf_counter()
    result = mechid.analyse(data, device=DEVICE, mechanisms=candidates, quick=True, workers=1,
                            seed=seed).to_dict()
    seconds = time.perf_counter() - start
    by_id = {m["id"]: m for m in result["mechanisms"]}
    ranked = sorted(by_id.values(), key=lambda m: -m["log_evidence"])
    ln_z = {mid: by_id[mid]["log_evidence"] if mid in by_id else float("nan")
            for mid in ("schottky_diode", "inhomogeneous_schottky_diode",
                        "lateral_2d_schottky_diode")}
    homogeneous_fit = by_id.get("schottky_diode", {})
    inhomogeneous_fit = by_id.get("inhomogeneous_schottky_diode", {})
    if case.inhomogeneous:
        coverage = {
            "phibar": _covers(inhomogeneous_fit, "mean_barrier_height_eV",
                              case.truth["mean_barrier_height_eV"]),
            # central intervals of sigma^2 are those of sigma, squared
            "sigma": _covers(inhomogeneous_fit, "barrier_variance_V2",
                             case.truth["barrier_variance_V2"]),
            "n": "-",
            "R_s": _covers(inhomogeneous_fit, "series_resistance_ohm",
                           case.truth["series_resistance_ohm"]),
        }
    else:
        var95 = inhomogeneous_fit.get("parameters", {}).get("barrier_variance_V2", {}).get("ci95")
        coverage = {
            "phibar": _covers(homogeneous_fit, "barrier_height_eV", case.truth["barrier_height_eV"]),
            "sigma": f"upper95={np.sqrt(var95[1]):.3g}V" if var95 else "-",
            "n": _covers(homogeneous_fit, "ideality_factor", case.truth["ideality_factor"]),
            "R_s": _covers(homogeneous_fit, "series_resistance_ohm",
                           case.truth["series_resistance_ohm"]),
        }
    return {
        "case": case.index, "truth": "inhomogeneous" if case.inhomogeneous else "homogeneous",
        "sigma_V": float(np.sqrt(case.truth.get("barrier_variance_V2", 0.0))),
        "spread_meV": case.spread_effect_meV,
        "n_true": _truth_ideality(case), "T_K": f"{case.temperatures_K.min():.0f}-"
        f"{case.temperatures_K.max():.0f}", "R_s": case.truth["series_resistance_ohm"],
        "leader": ranked[0]["id"], "p_leader": ranked[0]["probability"],
        "lnB_inhom_vs_hom": ln_z["inhomogeneous_schottky_diode"] - ln_z["schottky_diode"],
        "lnB_2d_vs_hom": ln_z["lateral_2d_schottky_diode"] - ln_z["schottky_diode"],
        "not_fitted": [m["id"] for m in result.get("not_fitted", [])],
        "coverage": coverage, "seconds": seconds,
    }


def _print_row(row: dict) -> None:
    cov = row["coverage"]
    print(f"{row['case']:>3} {row['truth']:<13} sigma={row['sigma_V']:.3f} V "
          f"spread={row['spread_meV']:7.1f} meV n={row['n_true']:.2f} T={row['T_K']:>8} K "
          f"R_s={row['R_s']:9.3g} | leader={row['leader']} p={row['p_leader']:.3f} "
          f"lnB(inhom-hom)={row['lnB_inhom_vs_hom']:+8.1f} lnB(2d-hom)={row['lnB_2d_vs_hom']:+7.1f}"
          f" | cover phi={cov['phibar']} sigma={cov['sigma']} n={cov['n']} R_s={cov['R_s']}"
          f" | {row['seconds']:.0f} s", flush=True)


def _summary(rows: list[dict]) -> None:
    print(f"\n{len(rows)} cases")
    for truth, right in (("homogeneous", "schottky_diode"),
                         ("inhomogeneous", "inhomogeneous_schottky_diode")):
        sub = [r for r in rows if r["truth"] == truth]
        if not sub:
            continue
        first = sum(r["leader"] == right for r in sub)
        diode_first = sum(r["leader"].endswith("schottky_diode") for r in sub)
        print(f"{truth}: {right} first in {first}/{len(sub)}; a diode hypothesis first in "
              f"{diode_first}/{len(sub)}")
    for key in ("phibar", "sigma", "n", "R_s"):
        marks = [r["coverage"][key] for r in rows
                 if r["coverage"][key] == "yes" or r["coverage"][key].startswith("no")]
        if marks:
            print(f"95 % coverage of {key}: {sum(m == 'yes' for m in marks)}/{len(marks)}")


def time_full_fit() -> None:
    """One full (non-quick) analysis of a typical homogeneous diode series (the three diode
    hypotheses), timed."""
    case = Case(-1, False, {"barrier_height_eV": 0.75, "ideality_factor": 1.15,
                            "richardson_constant_A_cm2_K2": 30.0, "series_resistance_ohm": 50.0,
                            "shunt_resistance_ohm": 1e9},
                np.array([200.0, 250.0, 300.0, 350.0, 400.0]))
    data = simulate(case, np.random.default_rng(1))
    candidates = DIODE_CANDIDATES
    start = time.perf_counter()
    result = mechid.analyse(data, device=DEVICE, mechanisms=candidates, quick=False, workers=1,
                            seed=3).to_dict()
    leader = result["verdict"]["id"]
    print(f"full fit, {len(candidates)} candidates, {len(data['voltage_V'])} points: "
          f"{time.perf_counter() - start:.0f} s, leader {leader} "
          f"p={result['verdict']['probability']:.3f}", flush=True)


def main(argv: list[str]) -> None:
    if "--full" in argv:
        time_full_fit()
        return
    small = "--small-spread" in argv
    spread_only = "--spread-only" in argv
    argv = [a for a in argv if a not in ("--small-spread", "--spread-only")]
    n_cases = int(argv[0]) if argv and not argv[0].startswith("--") else 12
    first = int(argv[argv.index("--from") + 1]) if "--from" in argv else 0
    seed = SPREAD_ONLY_SEED if spread_only else SMALL_SPREAD_SEED if small else STUDY_SEED
    if "--seed" in argv:  # a seed not looked at before, for a study that decides a design
        seed = int(argv[argv.index("--seed") + 1])
    rng = np.random.default_rng(seed)
    rows = []
    for index in range(n_cases):
        # drawn in order, so a case does not depend on --from
        if spread_only:
            case = draw_spread_only_case(rng, index)
        elif small:
            case = draw_case(rng, index, SMALL_SPREAD_RANGE_V, inhomogeneous=True)
        else:
            case = draw_case(rng, index)
        if index < first:
            continue
        rows.append(run_case(case, seed=seed + index,
                             candidates=DIODE_CANDIDATES if small or spread_only
                             else CANDIDATES))
        _print_row(rows[-1])
    _summary(rows)


if __name__ == "__main__":
    import warnings

    warnings.simplefilter("ignore")  # convergence warnings of quick fits are in the flags
    main(sys.argv[1:])
