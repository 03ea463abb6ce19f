"""Bias matching: the series folded onto |V| and the table of biases common to all temperatures."""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from mechid.catalogue.base import FloatArray
from mechid.data import SeriesLike

#: Relative mismatch allowed when matching a target bias to a measured |V|.
BIAS_MATCH_RTOL = 0.05
#: Fewest temperatures for an Arrhenius-like (per_voltage) line or a Zabrodskii analysis.
MIN_TEMPERATURES = 3


@dataclass(frozen=True)
class PreparedSeries:
    """Series folded to |V| with the common-bias table."""

    temperature_K: FloatArray
    voltage_V: FloatArray  # signed, as measured
    current_A: FloatArray  # signed, as measured
    abs_voltage_V: FloatArray
    folded_current_A: FloatArray  # sign(V) * I: positive for a normally conducting device
    temperatures: FloatArray
    common_biases_V: FloatArray  # shape (n_biases,)
    common_current_A: FloatArray  # shape (n_biases, n_temperatures), NaN where unmatched


def prepare_series(series: SeriesLike, n_biases: int) -> PreparedSeries:
    """Usable points (finite, non-zero bias, positive temperature) folded onto |V|.

    ``n_biases`` targets for the common-bias table (:func:`common_bias_table`); 0 for none.
    """
    temperature = np.asarray(series.temperature_K, dtype=float).reshape(-1)
    voltage = np.asarray(series.voltage_V, dtype=float).reshape(-1)
    current = np.asarray(series.current_A, dtype=float).reshape(-1)
    usable = (
        np.isfinite(temperature) & (temperature > 0) & np.isfinite(voltage) & (voltage != 0)
        & np.isfinite(current)
    )
    temperature, voltage, current = temperature[usable], voltage[usable], current[usable]
    abs_voltage = np.abs(voltage)
    folded = np.sign(voltage) * current
    temperatures = np.unique(temperature)
    biases, table = common_bias_table(temperature, abs_voltage, folded, temperatures, n_biases)
    return PreparedSeries(temperature, voltage, current, abs_voltage, folded, temperatures,
                          biases, table)


def common_bias_table(
    temperature: FloatArray,
    abs_voltage: FloatArray,
    folded_current: FloatArray,
    temperatures: FloatArray,
    n_biases: int,
) -> tuple[FloatArray, FloatArray]:
    """Pick biases present at every temperature and the (folded) current there.

    Targets are spread evenly over the |V| range common to all temperatures where the
    current is positive; each is matched to the nearest measured |V| (within
    BIAS_MATCH_RTOL) at every temperature, averaging repeated points at that |V|.
    """
    empty = (np.empty(0), np.empty((0, temperatures.size)))
    positive = folded_current > 0
    if temperatures.size == 0 or n_biases < 1:
        return empty
    lows, highs = [], []
    for t in temperatures:
        v = abs_voltage[(temperature == t) & positive]
        if v.size == 0:
            return empty
        lows.append(v.min())
        highs.append(v.max())
    low, high = max(lows), min(highs)
    if not low <= high:
        return empty
    targets = np.unique(np.linspace(low, high, n_biases)) if high > low else np.array([low])
    table = np.full((targets.size, temperatures.size), np.nan)
    matched_bias = np.full((targets.size, temperatures.size), np.nan)
    for j, t in enumerate(temperatures):
        at_t = (temperature == t) & positive
        matched_bias[:, j], table[:, j] = match_biases(abs_voltage[at_t], folded_current[at_t],
                                                       targets)
    with np.errstate(all="ignore"), warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # all-NaN rows give NaN medians
        biases = np.nanmedian(matched_bias, axis=1)
    keep = np.isfinite(biases)
    return biases[keep], table[keep]


def match_biases(abs_voltage: FloatArray, current: FloatArray,
                 targets: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Nearest measured |V| to each target (within BIAS_MATCH_RTOL) and the mean current there.

    Parameters
    ----------
    abs_voltage, current : ndarray
        Points of one temperature, shape ``(n,)``, n >= 1.
    targets : ndarray
        Target biases, shape ``(k,)``.

    Returns
    -------
    matched, mean_current : ndarray
        Shape ``(k,)``; NaN where no measured |V| lies within the tolerance. Repeated points
        at the matched |V| are averaged.
    """
    nearest = abs_voltage[np.argmin(np.abs(abs_voltage[None, :] - targets[:, None]), axis=1)]
    same = abs_voltage[None, :] == nearest[:, None]
    mean_current = np.sum(np.where(same, current[None, :], 0.0), axis=1) / same.sum(axis=1)
    ok = np.abs(nearest - targets) <= BIAS_MATCH_RTOL * targets
    return np.where(ok, nearest, np.nan), np.where(ok, mean_current, np.nan)


def common_bias_points(series: SeriesLike, bias_V: float) -> tuple[FloatArray, FloatArray]:
    """Temperatures and folded current at the measured |V| nearest ``bias_V`` (within 5 %).

    The matching of :func:`common_bias_table` for one bias (positive folded currents only,
    repeated points averaged); temperatures without a match are dropped. The report draws
    the per-voltage plots' points with it.
    """
    data = prepare_series(series, n_biases=0)
    temps_out, current_out = [], []
    for t in data.temperatures:
        at_t = (data.temperature_K == t) & (data.folded_current_A > 0)
        if not at_t.any():
            continue
        _, current = match_biases(data.abs_voltage_V[at_t], data.folded_current_A[at_t],
                                  np.array([bias_V], dtype=float))
        if np.isfinite(current[0]):
            temps_out.append(float(t))
            current_out.append(float(current[0]))
    return np.array(temps_out), np.array(current_out)
