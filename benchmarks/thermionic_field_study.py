"""Simulated heavily doped Schottky contacts: does thermionic-field emission rank first, and do
its intervals cover the truth? And does it stay out of the way on diodes without tunnelling?

Thermionic-field cases draw a contact on a semiconductor from a small table (GaAs, GaN, Si:
effective mass and permittivity from memory, given to the analysis with a 3 % uncertainty, as a
user would from a handbook), a doping log-uniform in 1e17-2e19 cm^-3 (E00/kT from ~0.1 to ~5
over the window: thermionic through thermionic-field to field emission), a barrier
0.6-0.95 eV, A** 5-120, R_s 3-300 ohm, R_sh 1e8-1e11 ohm, five temperatures from 80-150 K to
300-400 K and a -2 to +1 V sweep; simulated by ``thermionic_field_diode`` with 2 % noise and a
1e-13 A floor. The doping is not given to the analysis. A draw whose simulation leaves the
validity domain (the junction reaches flat band) is drawn again, and counted.

``--diodes`` instead simulates plain Schottky diodes (constant n 1.0-1.5, the same ranges
otherwise) and Werner-Guettler inhomogeneous ones (sigma 0.05-0.12 V) and asks how often
``thermionic_field_diode`` is fitted (its data need: an ideality that grows on cooling) and
how often it leads.

Each case is analysed quick with the three diode hypotheses and ``thermionic_field_diode``
(``workers=1``). Reported per case: E00/kT at the coldest and warmest temperature, the leader
and its probability, ln B of thermionic-field emission against the best other diode law,
whether the 95 % intervals cover phi_B, N_D and R_s, and the seconds taken.

The hypotheses are asked for by name, so the analysis does not apply their data needs (it
never does to named ones): ``thermionic_field_diode`` is fitted on every case, the worst case
for a false lead. ``--need-only`` simulates the same cases and reports only whether the
screening would fit it when the whole catalogue runs (the need "ideality grows on cooling":
slope of n against 1/T and its standard error), without fitting.

Run: ``python benchmarks/thermionic_field_study.py [n_cases] [--seed N] [--diodes]
[--need-only]``.
"""

from __future__ import annotations

import sys
import time

import numpy as np
from diode_study import _covers  # the same coverage mark as the diode study (same folder)

import mechid
from mechid.catalogue import get_mechanism
from mechid.catalogue.thermionic_field import characteristic_tunnelling_energy_eV
from mechid.constants import BOLTZMANN_EV
from mechid.device import Device, Measured
from mechid.errors import MechidError
from mechid.screening import linearise
from mechid.screening.applicability import ideality_growth, unmet_need
from mechid.simulate import simulate_series

#: Default seed (chosen before any case was looked at; not used by any other study).
STUDY_SEED = 20261220
#: Semiconductor: (effective mass ratio, static permittivity), from memory.
MATERIALS = {"GaAs": (0.067, 12.9), "GaN": (0.2, 9.5), "Si": (0.26, 11.7)}
CANDIDATES = ("schottky_diode", "inhomogeneous_schottky_diode", "lateral_2d_schottky_diode",
              "thermionic_field_diode")
AREA_CM2 = 2e-4
VOLTAGES_V = [float(v) for v in np.round(np.linspace(-2.0, 1.0, 31), 6) if v != 0.0]
NOISE_RELATIVE = 0.02
NOISE_FLOOR_A = 1e-13


def _common(rng: np.random.Generator) -> dict[str, float]:
    return {"richardson_constant_A_cm2_K2": float(10 ** rng.uniform(np.log10(5), np.log10(120))),
            "series_resistance_ohm": float(10 ** rng.uniform(np.log10(3), np.log10(300))),
            "shunt_resistance_ohm": float(10 ** rng.uniform(8, 11))}


def _temperatures(rng: np.random.Generator) -> np.ndarray:
    return np.round(np.linspace(rng.uniform(80, 150), rng.uniform(300, 400), 5), 1)


def draw_tunnelling_case(rng: np.random.Generator) -> tuple[str, dict, np.ndarray, Device]:
    """A thermionic-field contact (see the module docstring)."""
    material = str(rng.choice(list(MATERIALS)))
    mass, eps = MATERIALS[material]
    truth = {"barrier_height_eV": float(rng.uniform(0.6, 0.95)),
             "doping_per_cm3": float(10 ** rng.uniform(17, np.log10(2e19))),
             "semiconductor_effective_mass_ratio": mass, "dielectric_constant": eps,
             **_common(rng)}
    device = Device(area_cm2=AREA_CM2,
                    semiconductor_dielectric_constant=Measured(eps, 0.03 * eps),
                    semiconductor_effective_mass_ratio=Measured(mass, 0.03 * mass))
    return "thermionic_field_diode", truth, _temperatures(rng), device


def draw_diode_case(rng: np.random.Generator, index: int
                    ) -> tuple[str, dict, np.ndarray, Device]:
    """A plain (even index) or inhomogeneous (odd) diode without tunnelling."""
    temperatures = _temperatures(rng)
    barrier = float(rng.uniform(0.6, 0.95))
    if index % 2 == 0:
        truth = {"barrier_height_eV": barrier, "ideality_factor": float(rng.uniform(1.0, 1.5)),
                 **_common(rng)}
        return "schottky_diode", truth, temperatures, Device(area_cm2=AREA_CM2)
    sd = float(rng.uniform(0.05, 0.12))
    truth = {"mean_barrier_height_eV": barrier, "barrier_variance_V2": sd**2,
             "voltage_coefficient_rho2": float(rng.uniform(0.0, 0.2)),
             "voltage_coefficient_rho3_V": float(rng.uniform(-0.004, 0.0)), **_common(rng)}
    return "inhomogeneous_schottky_diode", truth, temperatures, Device(area_cm2=AREA_CM2)


def need_only(index: int, draw, seed: int) -> None:
    """Print whether the screening finds the ideality growing on cooling on this case."""
    mechanism_id, _, temperatures, device, series = _simulated(draw, seed)[:5]
    screening = linearise(series, device)
    growth = ideality_growth(screening.diode)
    reason = unmet_need(get_mechanism("thermionic_field_diode"), screening, device)
    slope = "not judged" if growth is None else f"slope {growth[0]:.3g} +- {growth[1]:.2g} K"
    print(f"{index:>3} {mechanism_id:<28} T={temperatures.min():.0f}-{temperatures.max():.0f} K "
          f"{slope}: {'fitted' if reason is None else 'not fitted'}", flush=True)


def _simulated(draw, seed: int) -> tuple:
    """(mechanism id, truth, temperatures, device, series, redraws) of one case."""
    rng = np.random.default_rng(seed)
    redraws = 0
    while True:
        mechanism_id, truth, temperatures, device = draw(rng)
        try:
            series = simulate_series(get_mechanism(mechanism_id), truth, temperatures,
                                     VOLTAGES_V, device, noise_relative=NOISE_RELATIVE,
                                     noise_floor_A=NOISE_FLOOR_A, rng=rng)
            break
        except MechidError:
            redraws += 1
    return mechanism_id, truth, temperatures, device, series, redraws


def run_case(index: int, draw, seed: int) -> dict:
    """Simulate (drawing again while the simulation leaves the validity domain) and analyse."""
    mechanism_id, truth, temperatures, device, series, redraws = _simulated(draw, seed)
    data = {"temperature_K": series.temperature_K, "voltage_V": series.voltage_V,
            "current_A": series.current_A}
    start = time.perf_counter()
    result = mechid.analyse(data, device=device, mechanisms=CANDIDATES, quick=True, workers=1,
                            seed=seed).to_dict()
    seconds = time.perf_counter() - start
    by_id = {m["id"]: m for m in result["mechanisms"]}
    ranked = sorted(by_id.values(), key=lambda m: -m["log_evidence"])
    tfe = by_id.get("thermionic_field_diode", {})
    others = [m["log_evidence"] for m in ranked if m["id"] != "thermionic_field_diode"]
    ln_b = (tfe["log_evidence"] - max(others)) if tfe and others else float("nan")
    skipped = [m["id"] for m in result.get("not_fitted", [])]
    row = {"case": index, "truth": mechanism_id, "redraws": redraws,
           "T_K": f"{temperatures.min():.0f}-{temperatures.max():.0f}",
           "leader": ranked[0]["id"], "p_leader": ranked[0]["probability"], "lnB_tfe": ln_b,
           "not_fitted": skipped, "seconds": seconds}
    if mechanism_id == "thermionic_field_diode":
        e00 = float(characteristic_tunnelling_energy_eV(
            truth["doping_per_cm3"], truth["dielectric_constant"],
            truth["semiconductor_effective_mass_ratio"]))
        row |= {"N_D": truth["doping_per_cm3"],
                "E00/kT": f"{e00 / (BOLTZMANN_EV * temperatures.max()):.2f}-"
                          f"{e00 / (BOLTZMANN_EV * temperatures.min()):.2f}",
                "coverage": {key: _covers(tfe, name, truth[name]) for key, name in
                             (("phi_B", "barrier_height_eV"), ("N_D", "doping_per_cm3"),
                              ("R_s", "series_resistance_ohm"))}}
    return row


def _print_row(row: dict) -> None:
    extra = ""
    if "coverage" in row:
        cov = row["coverage"]
        extra = (f" N_D={row['N_D']:.3g} E00/kT={row['E00/kT']} | cover phi_B={cov['phi_B']} "
                 f"N_D={cov['N_D']} R_s={cov['R_s']}")
    print(f"{row['case']:>3} {row['truth']:<28} T={row['T_K']:>8} K redraws={row['redraws']}"
          f"{extra} | leader={row['leader']} p={row['p_leader']:.3f} "
          f"lnB(tfe-best other)={row['lnB_tfe']:+.1f} not fitted={row['not_fitted']} | "
          f"{row['seconds']:.0f} s", flush=True)


def _summary(rows: list[dict]) -> None:
    print(f"\n{len(rows)} cases")
    for truth in sorted({r["truth"] for r in rows}):
        sub = [r for r in rows if r["truth"] == truth]
        fitted = sum("thermionic_field_diode" not in r["not_fitted"] for r in sub)
        leads = sum(r["leader"] == "thermionic_field_diode" for r in sub)
        right = sum(r["leader"] == truth for r in sub)
        print(f"{truth}: leads {right}/{len(sub)}; thermionic_field_diode fitted {fitted}/"
              f"{len(sub)}, leads {leads}/{len(sub)}")
    for key in ("phi_B", "N_D", "R_s"):
        marks = [r["coverage"][key] for r in rows if "coverage" in r
                 and (r["coverage"][key] == "yes" or r["coverage"][key].startswith("no"))]
        if marks:
            print(f"95 % coverage of {key}: {sum(m == 'yes' for m in marks)}/{len(marks)}")
    print(f"median seconds per case: {np.median([r['seconds'] for r in rows]):.0f}")


def main(argv: list[str]) -> None:
    diodes = "--diodes" in argv
    only_need = "--need-only" in argv
    argv = [a for a in argv if a not in ("--diodes", "--need-only")]
    n_cases = int(argv[0]) if argv and not argv[0].startswith("--") else 8
    seed = int(argv[argv.index("--seed") + 1]) if "--seed" in argv else STUDY_SEED
    rows = []
    for index in range(n_cases):
        def draw(rng: np.random.Generator, index: int = index):
            return draw_diode_case(rng, index) if diodes else draw_tunnelling_case(rng)
        if only_need:
            need_only(index, draw, seed + index)
            continue
        rows.append(run_case(index, draw, seed + index))
        _print_row(rows[-1])
    if rows:
        _summary(rows)


if __name__ == "__main__":
    import warnings

    warnings.simplefilter("ignore")  # convergence warnings of quick fits are in the flags
    main(sys.argv[1:])
