"""Simulate I-V-T series from a catalogue mechanism, optionally with a fit's noise law.

The noise laws are the ones the Bayesian fit can assume (:mod:`mechid.inference.noise`); the
default is Gaussian with standard deviation sqrt((s_rel * I)^2 + floor^2).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue.base import Mechanism
from mechid.catalogue.validity import validity_violations
from mechid.data import TEMPERATURE_RANGE_K
from mechid.device import Device
from mechid.errors import MechidError
from mechid.formatting import unit_suffix
from mechid.inference.noise import GAUSSIAN, LOGNORMAL_FLOOR, NoiseLaw, noise_sd


@dataclass(frozen=True)
class SimulatedSeries:
    """A simulated series on a temperature x voltage grid (tidy, one row per point)."""

    temperature_K: NDArray
    voltage_V: NDArray
    current_A: NDArray
    noiseless_current_A: NDArray


def simulate_series(
    mechanism: Mechanism,
    params: Mapping[str, float],
    temperatures_K: Sequence[float],
    voltages_V: Sequence[float],
    device: Device,
    *,
    noise_relative: float = 0.0,
    noise_floor_A: float = 0.0,
    rng: np.random.Generator | None = None,
    noise_law: NoiseLaw = GAUSSIAN,
) -> SimulatedSeries:
    """Model currents of ``mechanism`` on the grid ``temperatures_K x voltages_V``.

    Parameters
    ----------
    mechanism : Mechanism
        Catalogue declaration.
    params : mapping
        A value for every declared parameter (physical units, names with unit suffixes).
    temperatures_K, voltages_V : sequence of float
        Grid; voltages may be of either sign.
    device : Device
        Supplies the electrode area for current-density formulas.
    noise_relative, noise_floor_A : float
        Noise model: standard deviation sqrt((noise_relative*I)^2 + noise_floor_A^2).
    rng : numpy.random.Generator, optional
        Source of the noise (needed only when noise is asked for).
    noise_law : NoiseLaw
        How the readings scatter (default Gaussian). The log-normal-with-floor law needs
        both noise levels above zero.

    Returns
    -------
    SimulatedSeries
        Rows ordered by temperature, then voltage as given.

    Raises
    ------
    MechidError
        On a missing or out-of-range parameter, a non-positive temperature, negative noise,
        or a formula that is not finite at the requested points.
    """
    temperatures = np.asarray(temperatures_K, dtype=float)
    voltages = np.asarray(voltages_V, dtype=float)
    if temperatures.size == 0 or voltages.size == 0:
        raise MechidError("simulate needs at least one temperature and one voltage")
    low, high = TEMPERATURE_RANGE_K
    if not np.all((temperatures >= low) & (temperatures <= high)):
        raise MechidError(f"temperatures must lie between {low:g} K and {high:g} K (the range "
                          "the data reader accepts)")
    if np.any(~np.isfinite(voltages)):
        raise MechidError("voltages must be finite numbers")
    if not all(np.isfinite(x) and x >= 0 for x in (noise_relative, noise_floor_A)):
        raise MechidError("noise levels must be finite numbers >= 0")
    if noise_law is LOGNORMAL_FLOOR and min(noise_relative, noise_floor_A) <= 0:
        raise MechidError("the lognormal-floor noise law needs a relative noise and a noise "
                          "floor both above zero")
    _check_ranges(mechanism, params)
    t_grid, v_grid = (a.ravel() for a in np.meshgrid(temperatures, voltages, indexing="ij"))
    clean = mechanism.current(v_grid, t_grid, params, device)
    if not np.all(np.isfinite(clean)):
        raise MechidError(_not_finite_message(mechanism, params, v_grid, t_grid, device))
    with np.errstate(over="ignore"):
        sd = noise_sd(clean, noise_relative, noise_floor_A)
    if not np.all(np.isfinite(sd)):
        raise MechidError("the noise levels are too large: the simulated currents overflow")
    if np.any(sd > 0):
        if rng is None:
            raise MechidError("noise was requested but no random generator (seed) was given")
        noisy = noise_law.draw(clean, noise_relative, noise_floor_A, rng)
    else:
        noisy = clean.copy()
    return SimulatedSeries(t_grid, v_grid, noisy, clean)


def _not_finite_message(mechanism: Mechanism, params: Mapping[str, float], voltage_V: NDArray,
                        temperature_K: NDArray, device: Device) -> str:
    """Which validity condition the parameters break at the requested points, if any."""
    one_set = {name: np.array([value]) for name, value in params.items()}
    found = validity_violations(mechanism, voltage_V, temperature_K, one_set, device)
    if not found:
        return f"{mechanism.id} is not finite at some requested points; check the parameters"
    reasons = "; ".join(
        f"{v.quantity} = {v.extreme_value:.3g} at {v.at_voltage_V:g} V, {v.at_temperature_K:g} K "
        f"({v.fraction_of_points:.0%} of the points), but the formula holds only for "
        f"{v.requirement}: {v.reason}"
        for v in found
    )
    return (f"{mechanism.id} is outside its formula's validity at some requested points "
            f"(change the parameters or the bias/temperature grid): {reasons}")


def _check_ranges(mechanism: Mechanism, params: Mapping[str, float]) -> None:
    for name, value in params.items():
        p = mechanism.parameter(name)
        if not (p.lower <= value <= p.upper):
            raise MechidError(
                f"{mechanism.id}: {name} = {value:g}{unit_suffix(p.unit)} is outside its physical range "
                f"[{p.lower:g}, {p.upper:g}]"
            )
    missing = [n for n in mechanism.parameter_names if n not in params]
    if missing:
        raise MechidError(
            f"{mechanism.id} needs a value for {', '.join(missing)} (give --param NAME=VALUE)"
        )
