"""Accuracy of the rectifying-contact hand analysis (mechid.screening.diode) on simulated diodes.

Simulates forward (and reverse) I-V curves with the implicit diode law of
``tests/test_diode_analysis.py`` (brentq per point, independent of mechid) for a homogeneous
contact and a Werner-Güttler inhomogeneous one, at several noise levels and seeds, and prints
what each hand method returns against the truth. Run: ``python benchmarks/diode_analysis_accuracy.py``
(about 10-30 s).
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from test_diode_analysis import (  # noqa: E402
    KB_EV,
    RICHARDSON,
    analyse,
    simulate,
    werner_guttler_barrier,
)

NOISES = (0.0, 0.01, 0.03)
SEEDS = (1, 2, 3)


def _median(values: list[float]) -> float:
    finite = [v for v in values if np.isfinite(v)]
    return float(np.median(finite)) if finite else float("nan")


def _per_temperature(result, record: str, key: str) -> list[float]:
    values = []
    for entry in result.temperatures:
        part = getattr(entry, record)
        values.append(getattr(part, key) if record == "norde" else part.quantities.get(key, np.nan))
    return values


def homogeneous_case(noise: float, seed: int) -> dict[str, float]:
    """n = 1.05, phi_B = 0.75 eV, R_s = 20 ohm, R_sh = 1e9 ohm, 250-400 K, 0.01-0.8 V."""
    series = simulate(np.arange(250.0, 401.0, 30.0), np.linspace(0.01, 0.8, 80),
                      lambda t: 0.75, lambda t: 1.05, rsh=1e9, noise=noise, seed=seed)
    result = analyse(series)
    richardson = result.richardson.quantities if result.richardson else {}
    spread = result.barrier_vs_inverse_2kt.quantities if result.barrier_vs_inverse_2kt else {}
    return {
        "ran": float(result.ran),
        "n (1.05)": _median(_per_temperature(result, "semilog", "ideality_factor")),
        "phi_ap (0.75)": _median(_per_temperature(result, "semilog", "apparent_barrier_eV")),
        "Rs Cheung (20)": _median(_per_temperature(result, "cheung_derivative",
                                                   "series_resistance_ohm")),
        "phi Cheung H (0.75)": _median(_per_temperature(result, "cheung_h", "barrier_height_eV")),
        "phi Norde (0.75)": _median(_per_temperature(result, "norde", "barrier_height_eV")),
        "Rs Norde (20)": _median(_per_temperature(result, "norde", "series_resistance_ohm")),
        "phi Richardson (0.75)": richardson.get("barrier_height_eV", np.nan),
        f"A** Richardson ({RICHARDSON:g})": richardson.get("richardson_constant_A_cm2_K2", np.nan),
        "sigma (0)": spread.get("barrier_spread_V", 0.0),
    }


def inhomogeneous_case(noise: float, seed: int) -> dict[str, float]:
    """Werner-Güttler: phibar = 0.95 eV, sigma = 0.1 V, rho2 = -0.02, rho3 = -0.002 V, 150-350 K."""
    def ideality(t: float) -> float:
        return 1.0 / (1.0 + 0.02 - 0.002 / (2 * KB_EV * t))

    series = simulate(np.arange(150.0, 351.0, 25.0), np.linspace(0.01, 1.0, 100),
                      lambda t: werner_guttler_barrier(0.95, 0.1, t), ideality, noise=noise,
                      seed=seed)
    result = analyse(series)
    spread = result.barrier_vs_inverse_2kt.quantities
    rho = result.ideality_vs_inverse_2kt.quantities
    modified = result.modified_richardson.quantities
    return {
        "ran": float(result.ran),
        "sigma (0.1)": spread.get("barrier_spread_V", np.nan),
        "phibar (0.95)": spread.get("mean_barrier_eV", np.nan),
        "rho2 (-0.02)": rho.get("rho2", np.nan),
        "rho3 (-0.002)": rho.get("rho3_V", np.nan),
        "phibar mod. Richardson (0.95)": modified.get("mean_barrier_eV", np.nan),
        f"A** mod. Richardson ({RICHARDSON:g})": modified.get("richardson_constant_A_cm2_K2",
                                                              np.nan),
        "phi Richardson (apparent)": result.richardson.quantities.get("barrier_height_eV", np.nan),
    }


def main() -> None:
    for name, case in (("homogeneous", homogeneous_case), ("inhomogeneous", inhomogeneous_case)):
        print(f"== {name} contact (truth in parentheses; per-temperature values: median)")
        for noise in NOISES:
            for seed in SEEDS if noise else SEEDS[:1]:
                row = case(noise, seed)
                cells = ", ".join(f"{k} {v:.4g}" for k, v in row.items())
                print(f"noise {noise:.0%} seed {seed}: {cells}")


if __name__ == "__main__":
    main()
