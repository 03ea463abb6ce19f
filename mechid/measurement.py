"""Measurement cautions read from the data: high voltage, high current density, cryogenic
temperatures, drift between readings of a re-measured temperature and sweep hysteresis.

The order of the readings is the order of the points as read (:attr:`IVSeries.reading_index`):
a temperature read again after other temperatures is a drift check (did the film or contacts
change over the run?), a voltage read twice within one sweep is a hysteresis check.

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


#: Relative change of the current between the first and the last reading of a temperature
#: above which the drift caution says the film or contacts changed. Common practice (from
#: memory, no published source): repeated sweeps of a stable film and contacts usually agree to
#: a few per cent; 10 % is well outside that.
DRIFT_RELATIVE_CHANGE = 0.10

#: Fewest voltages read in both the first and the last block of a temperature for a drift
#: number (the same minimum as the voltages per temperature the data module asks for).
MIN_DRIFT_VOLTAGES = 3

#: Largest |V|/thickness above which re-measuring the first temperature is suggested, in V/cm.
#: Common practice (from memory): around 1 MV/cm and above, many dielectric films take up
#: charge or form defects during a sweep.
HIGH_FIELD_V_PER_CM = 1.0e6

#: Number of temperatures from which re-measuring the first temperature is suggested: a
#: temperature series long enough for the film to change during it.
MIN_TEMPERATURES_FOR_REMEASURE = 3


@dataclass(frozen=True)
class RepeatAgreement:
    """How far repeated readings of one sweep block disagree (sweep hysteresis).

    Parameters
    ----------
    temperature_K : float
        The temperature of the repeats.
    n_voltages : int
        Number of voltages measured more than once within one block of readings at that
        temperature (summed over the temperature's blocks).
    median_relative_difference : float
        Median over those voltages of ``(max |I| - min |I|) / mean |I|`` of the repeats.
    """

    temperature_K: float
    n_voltages: int
    median_relative_difference: float


@dataclass(frozen=True)
class DriftCheck:
    """How the current changed between the first and the last reading of one temperature.

    Parameters
    ----------
    temperature_K : float
        The re-measured temperature.
    n_blocks : int
        Separate blocks of readings at that temperature (another temperature read in between).
    n_voltages : int
        Voltages read in both the first and the last block.
    median_log_ratio : float
        Median over those voltages of ``ln(|I_last| / |I_first|)``: positive when the current
        rose between the readings, negative when it fell.
    median_relative_difference : float
        Median over those voltages of ``| |I_last| / |I_first| - 1 |``.
    """

    temperature_K: float
    n_blocks: int
    n_voltages: int
    median_log_ratio: float
    median_relative_difference: float

    @property
    def changed(self) -> bool:
        """Whether the change exceeds :data:`DRIFT_RELATIVE_CHANGE` (common practice)."""
        return self.median_relative_difference > DRIFT_RELATIVE_CHANGE


def reading_blocks(series: IVSeries) -> NDArray[np.int64]:
    """Per point, the number of its block of readings: a run of one temperature in reading order.

    The points are put in reading order (:attr:`IVSeries.reading_index`); a new block starts
    wherever the temperature differs from the previous reading's. A temperature read, left and
    read again later (e.g. the first temperature re-measured at the end) has two blocks.

    Parameters
    ----------
    series : IVSeries
        Any series; only its temperatures and reading order are read.

    Returns
    -------
    numpy.ndarray
        Block numbers (int64, 0 for the first block read), aligned with the series' arrays.
    """
    order = np.argsort(series.reading_index, kind="stable")
    in_order = series.temperature_K[order]
    starts = np.r_[True, in_order[1:] != in_order[:-1]] if in_order.size else np.array([], bool)
    blocks = np.empty(series.n_points, dtype=np.int64)
    blocks[order] = np.cumsum(starts) - 1
    return blocks


def _block_voltage_groups(series: IVSeries, blocks: NDArray[np.int64]
                          ) -> tuple[NDArray[np.float64], NDArray[np.int64], NDArray[np.int64]]:
    """Unique (block, voltage) pairs: their keys (2, k), each point's group and the counts."""
    pairs = np.stack([blocks.astype(np.float64), series.voltage_V])
    keys, group, counts = np.unique(pairs, axis=1, return_inverse=True, return_counts=True)
    return keys, group.reshape(-1), counts


def repeat_agreement(series: IVSeries) -> list[RepeatAgreement]:
    """Per temperature, the median relative difference between repeats within a sweep block.

    A voltage read more than once within one block of readings at a temperature (forward and
    backward sweeps, or a sweep repeated straight away) gives a hysteresis diagnostic: for each
    such voltage the spread ``(max |I| - min |I|) / mean |I|`` of its readings, then the median
    over voltages (and blocks). Readings of the same temperature in separate blocks are compared
    by :func:`drift_check` instead. Voltages whose readings are all zero are left out (no
    relative difference exists).

    Parameters
    ----------
    series : IVSeries
        The data, repeats kept.

    Returns
    -------
    list of RepeatAgreement
        One entry per temperature with at least one repeated voltage, ascending in temperature.
    """
    if not series.n_points:
        return []
    keys, group, counts = _block_voltage_groups(series, reading_blocks(series))
    temperature = np.empty(keys.shape[1])
    temperature[group] = series.temperature_K
    magnitude = np.abs(series.current_A)
    largest = np.full(keys.shape[1], -np.inf)
    smallest = np.full(keys.shape[1], np.inf)
    np.maximum.at(largest, group, magnitude)
    np.minimum.at(smallest, group, magnitude)
    mean = np.bincount(group, weights=magnitude, minlength=keys.shape[1]) / counts
    repeated = (counts > 1) & (mean > 0)
    spread = np.where(repeated, (largest - smallest) / np.where(mean > 0, mean, 1.0), np.nan)
    out = []
    for value in np.unique(temperature[repeated]):
        at_t = repeated & (temperature == value)
        out.append(RepeatAgreement(float(value), int(at_t.sum()),
                                   float(np.median(spread[at_t]))))
    return out


def drift_check(series: IVSeries) -> list[DriftCheck]:
    """Per re-measured temperature, how the current changed from its first to its last block.

    A temperature whose readings come in two or more blocks in reading order (see
    :func:`reading_blocks`) was measured, left and measured again. At each voltage read in both
    the first and the last block, ``|I_first|`` and ``|I_last|`` are the mean ``|I|`` of that
    block's readings there (so forward and backward sweeps are averaged alike in both blocks);
    the median over voltages of ``ln(|I_last| / |I_first|)`` says whether the current rose or
    fell, the median of ``| |I_last| / |I_first| - 1 |`` how much. Voltages with a zero mean in
    either block are left out.

    Parameters
    ----------
    series : IVSeries
        The data, repeats kept, with their reading order.

    Returns
    -------
    list of DriftCheck
        One entry per temperature with at least two blocks and at least
        :data:`MIN_DRIFT_VOLTAGES` voltages shared by its first and last block, ascending in
        temperature.
    """
    if not series.n_points:
        return []
    blocks = reading_blocks(series)
    keys, group, counts = _block_voltage_groups(series, blocks)
    mean = np.bincount(group, weights=np.abs(series.current_A), minlength=keys.shape[1]) / counts
    out = []
    for value in series.temperatures:
        at_t = np.unique(blocks[series.temperature_K == value])
        if at_t.size < 2:
            continue
        first = (keys[0] == at_t[0]) & (mean > 0)
        last = (keys[0] == at_t[-1]) & (mean > 0)
        shared, in_first, in_last = np.intersect1d(keys[1, first], keys[1, last],
                                                   return_indices=True)
        if shared.size < MIN_DRIFT_VOLTAGES:
            continue
        ratio = mean[last][in_last] / mean[first][in_first]
        out.append(DriftCheck(float(value), int(at_t.size), int(shared.size),
                              float(np.median(np.log(ratio))),
                              float(np.median(np.abs(ratio - 1.0)))))
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
    return [f"voltages measured more than once within one sweep (both sweep directions or a "
            f"sweep repeated straight away) at {len(agreements)} temperature(s); median relative "
            f"difference between the repeats {per_temperature} (largest at "
            f"{worst.temperature_K:g} K). A large difference means hysteresis: the current "
            "depends on the sweep direction or on what the film went through just before"]


def _drift_sentence(check: DriftCheck) -> str:
    direction = "rose" if check.median_log_ratio > 0 else "fell" if check.median_log_ratio < 0 \
        else "did not change"
    text = (f"{check.temperature_K:g} K was measured again after other temperatures "
            f"({check.n_blocks} separate readings); between the first and the last, the current "
            f"{direction}: median ln(|I_last|/|I_first|) = {check.median_log_ratio:+.3g}, median "
            f"relative difference {check.median_relative_difference:.2g} over "
            f"{check.n_voltages} voltages")
    if check.changed:
        text += (f", above {DRIFT_RELATIVE_CHANGE:.0%} (common practice): the film or contacts "
                 "changed between the two readings, so the temperatures measured in between "
                 "may not all describe the same device; follow your lab's written procedures "
                 "for a device that changes under test")
    return text


def _drift_caution(series: IVSeries, device: Device) -> list[str]:
    checks = drift_check(series)
    if checks:
        return [_drift_sentence(check) for check in checks]
    if _suggest_remeasuring(series, device):
        return ["no temperature was measured twice: re-measuring the first temperature at the "
                "end would show whether the film or contacts changed under stress during the run"]
    return []


def _suggest_remeasuring(series: IVSeries, device: Device) -> bool:
    if series.temperatures.size >= MIN_TEMPERATURES_FOR_REMEASURE:
        return True
    if device.thickness_nm is None or device.thickness_nm.value <= 0:
        return False
    field_V_per_cm = _largest_abs(series.voltage_V) / (device.thickness_nm.value * 1e-7)
    return field_V_per_cm >= HIGH_FIELD_V_PER_CM


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
        Plain sentences, in the order: voltage, current density, temperature, drift between
        readings of a re-measured temperature (or, for a temperature series or high-field data
        without one, the suggestion to re-measure), hysteresis within a sweep. Empty when
        nothing in the data calls for one.
    """
    return (_voltage_caution(series) + _current_density_caution(series, device)
            + _cryogenic_caution(series) + _drift_caution(series, device)
            + _repeat_caution(series))
