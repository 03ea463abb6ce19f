"""Measurement cautions read from the data: high voltage, high current density, cryogenic
temperatures and disagreement between repeated sweeps.

Each caution points the user to local electrical-safety or cryogen-handling rules and the lab's
written procedures; mechid cannot judge a set-up it has not seen. The thresholds are common
laboratory practice (from memory, no published source) and are named constants so that a
user or a test can see exactly when a caution fires.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from mechid.data import IVSeries
from mechid.device import Device

#: |V| above which a caution about high voltage is given, in V. Common practice (from memory):
#: bench supplies and probe stations are usually rated and guarded for lower voltages, and
#: many labs' rules treat more than 50 V as needing extra protection against contact.
HIGH_VOLTAGE_V = 50.0

#: |I|/area above which self-heating is named, in A/cm^2. Common practice (from memory): at
#: 100 A/cm^2 and a few volts the dissipated power is hundreds of W/cm^2, a heat flux that
#: warms a film on a poorly conducting substrate or stage above the temperature the sensor reads.
HIGH_CURRENT_DENSITY_A_PER_CM2 = 100.0

#: Temperature below which cryogen handling, thermometry and thermal lag are named, in K.
#: Common practice (from memory): below about 100 K the stage is cooled with liquid nitrogen
#: or helium, and the sample can lag the sensor during a temperature ramp.
CRYOGENIC_TEMPERATURE_K = 100.0

ELECTRICAL_RULES = "follow your local electrical-safety rules and your lab's written procedures"
CRYOGEN_RULES = "follow your local cryogen-handling rules and your lab's written procedures"


@dataclass(frozen=True)
class RepeatAgreement:
    """How far repeated readings at the same temperature and voltage disagree.

    Parameters
    ----------
    temperature_K : float
        The temperature of the repeats.
    n_voltages : int
        Number of voltages measured more than once at that temperature.
    median_relative_difference : float
        Median over those voltages of ``(max |I| - min |I|) / mean |I|`` of the repeats.
    """

    temperature_K: float
    n_voltages: int
    median_relative_difference: float


def repeat_agreement(series: IVSeries) -> list[RepeatAgreement]:
    """Per temperature, the median relative difference between repeated readings.

    A voltage read more than once at a temperature (forward and backward sweeps, or a
    repeated sweep) gives a hysteresis diagnostic: for each such voltage the spread
    ``(max |I| - min |I|) / mean |I|`` of its readings, then the median over voltages.
    Voltages whose readings are all zero are left out (no relative difference exists).

    Parameters
    ----------
    series : IVSeries
        The data, repeats kept.

    Returns
    -------
    list of RepeatAgreement
        One entry per temperature with at least one repeated voltage, ascending in temperature.
    """
    pairs = np.stack([series.temperature_K, series.voltage_V])
    keys, group, counts = np.unique(pairs, axis=1, return_inverse=True, return_counts=True)
    group = group.reshape(-1)
    magnitude = np.abs(series.current_A)
    largest = np.full(keys.shape[1], -np.inf)
    smallest = np.full(keys.shape[1], np.inf)
    np.maximum.at(largest, group, magnitude)
    np.minimum.at(smallest, group, magnitude)
    mean = np.bincount(group, weights=magnitude, minlength=keys.shape[1]) / counts
    repeated = (counts > 1) & (mean > 0)
    spread = np.where(repeated, (largest - smallest) / np.where(mean > 0, mean, 1.0), np.nan)
    out = []
    for temperature in np.unique(keys[0, repeated]):
        at_t = repeated & (keys[0] == temperature)
        out.append(RepeatAgreement(float(temperature), int(at_t.sum()),
                                   float(np.median(spread[at_t]))))
    return out


def _largest_abs(values: NDArray[np.float64]) -> float:
    return float(np.max(np.abs(values))) if values.size else 0.0


def _voltage_caution(series: IVSeries) -> list[str]:
    largest = _largest_abs(series.voltage_V)
    if largest <= HIGH_VOLTAGE_V:
        return []
    return [f"the data reach |V| = {largest:.3g} V (above {HIGH_VOLTAGE_V:g} V, a common-practice "
            f"limit): high voltage can injure and can stress or break down the film; "
            f"{ELECTRICAL_RULES}"]


def _current_density_caution(series: IVSeries, device: Device) -> list[str]:
    if device.area_cm2 is None or device.area_cm2 <= 0:
        return []
    density = _largest_abs(series.current_A) / device.area_cm2
    if density <= HIGH_CURRENT_DENSITY_A_PER_CM2:
        return []
    return [f"the current density reaches {density:.3g} A/cm^2 (above "
            f"{HIGH_CURRENT_DENSITY_A_PER_CM2:g} A/cm^2, a common-practice limit): self-heating can "
            "raise the film above the measured temperature and bias every temperature-dependent "
            f"parameter, and the film can degrade during the sweep; {ELECTRICAL_RULES}"]


def _cryogenic_caution(series: IVSeries) -> list[str]:
    if not series.n_points:
        return []
    coldest = float(series.temperature_K.min())
    if coldest >= CRYOGENIC_TEMPERATURE_K:
        return []
    return [f"the data go down to {coldest:g} K (below {CRYOGENIC_TEMPERATURE_K:g} K, cryogenic by "
            "common practice): check that the thermometer reads the sample, not only the stage, "
            "and that each temperature had settled before the sweep (thermal lag); "
            f"{CRYOGEN_RULES}"]


def _repeat_caution(series: IVSeries) -> list[str]:
    agreements = repeat_agreement(series)
    if not agreements:
        return []
    worst = max(agreements, key=lambda a: a.median_relative_difference)
    per_temperature = ", ".join(f"{a.temperature_K:g} K: {a.median_relative_difference:.2g}"
                                for a in agreements)
    return [f"voltages measured more than once (both sweep directions or repeated sweeps) at "
            f"{len(agreements)} temperature(s); median relative difference between the repeats "
            f"{per_temperature} (largest at {worst.temperature_K:g} K). A large difference means "
            "hysteresis or a change in the film during the sweeps; the table does not record the "
            "order of the readings, so hysteresis cannot be told apart from drift over time"]


def measurement_cautions(series: IVSeries, device: Device) -> list[str]:
    """Cautions about how the data were taken, triggered by the data themselves.

    Parameters
    ----------
    series : IVSeries
        The data as loaded (all kept points, repeats included).
    device : Device
        The device; its area (when given) turns current into current density.

    Returns
    -------
    list of str
        Plain sentences, in the order: voltage, current density, temperature, repeats.
        Empty when nothing in the data calls for one.
    """
    return (_voltage_caution(series) + _current_density_caution(series, device)
            + _cryogenic_caution(series) + _repeat_caution(series))
