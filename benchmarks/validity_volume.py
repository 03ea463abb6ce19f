"""How much of each mechanism's declared parameter box its validity domain refuses.

Draws the declared ranges (uniform, log-uniform for ``log_scale`` parameters; device priors
not applied) and evaluates every validity condition on a data window, with
:func:`mechid.catalogue.validity.validity_violations`. A refused draw predicts nothing for
those data (the likelihood is zero there), so this is the share of the prior volume the
evidence spends on parameter sets the formula cannot use at that window. Run from the repo
root::

    python benchmarks/validity_volume.py
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np

from mechid.catalogue import MECHANISMS, Mechanism
from mechid.catalogue.validity import validity_violations
from mechid.device import Device

N_DRAWS = 20000
REFERENCE_CURVES = Path(__file__).resolve().parents[1] / "reference_curves"
WINDOWS = {
    "0.1-5 V, 77-300 K": (np.geomspace(0.1, 5.0, 25), np.array([77.0, 300.0])),
    "0.1-1 V, 77-300 K": (np.geomspace(0.1, 1.0, 10), np.array([77.0, 300.0])),
    "1 mV, 77 K (zero-bias limit)": (np.array([1e-3]), np.array([77.0])),
}


def reference_window(mechanism_id: str) -> tuple[str, np.ndarray, np.ndarray] | None:
    """Bias magnitudes and temperatures of the mechanism's shipped reference series."""
    for truth_file in sorted(REFERENCE_CURVES.glob("*/truth.json")):
        truth = json.loads(truth_file.read_text())
        if truth["mechanism"] == mechanism_id:
            v = np.unique(np.abs(truth["voltages_V"]))
            t = np.asarray(truth["temperatures_K"], dtype=float)
            label = f"reference {v.min():g}-{v.max():g} V, {t.min():g}-{t.max():g} K"
            return label, v, t
    return None


def prior_box_draws(mechanism: Mechanism, rng: np.random.Generator, n: int) -> dict:
    """``n`` draws from the declared ranges, each parameter independent."""
    draws = {}
    for p in mechanism.parameters:
        if p.log_scale:
            draws[p.name] = 10 ** rng.uniform(np.log10(p.lower), np.log10(p.upper), n)
        else:
            draws[p.name] = rng.uniform(p.lower, p.upper, n)
    return draws


def refused_share(mechanism: Mechanism, voltages: np.ndarray, temperatures: np.ndarray,
                  draws: dict) -> tuple[float, dict[str, float]]:
    """Share of draws refused at one point of the window or more; and per condition."""
    v, t = (a.ravel() for a in np.meshgrid(voltages, temperatures))
    device = Device(area_cm2=1e-4)
    current = mechanism.current(v, t, {k: a[:, None] for k, a in draws.items()}, device)
    refused = float(np.mean(np.isnan(current).any(axis=1)))
    per_condition = {x.condition_id: x.fraction_of_draws
                     for x in validity_violations(mechanism, v, t, draws, device)}
    return refused, per_condition


def main() -> None:
    rng = np.random.default_rng(20261202)
    for mechanism in MECHANISMS:
        if not mechanism.validity:
            print(f"{mechanism.id:28s} no validity conditions declared")
            continue
        draws = prior_box_draws(mechanism, rng, N_DRAWS)
        windows = [(label, v, t) for label, (v, t) in WINDOWS.items()]
        reference = reference_window(mechanism.id)
        windows += [reference] if reference else []
        for label, voltages, temperatures in windows:
            refused, per_condition = refused_share(mechanism, voltages, temperatures, draws)
            detail = ", ".join(f"{k} {v:.1%}" for k, v in per_condition.items())
            print(f"{mechanism.id:28s} {label:30s} refused {refused:6.1%}  ({detail})")


if __name__ == "__main__":
    main()
