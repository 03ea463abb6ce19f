"""The lines of a declared straightened plot: one per temperature or one per common bias."""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue.base import FloatArray, PlotRegime, StraightenedPlot
from mechid.device import Device
from mechid.screening.biases import MIN_TEMPERATURES, PreparedSeries
from mechid.screening.lines import RobustLine, robust_line
from mechid.screening.records import LineFit

#: Fewest points for a per-temperature line.
MIN_POINTS_PER_LINE = 4
#: Most refits while the points of a plot's declared regime change.
MAX_REGIME_REFITS = 20


def _transform(plot: StraightenedPlot, voltage: FloatArray, temperature: FloatArray,
               current: FloatArray, device: Device) -> tuple[FloatArray, FloatArray]:
    with np.errstate(all="ignore"):
        x, y = plot.transform(voltage, temperature, current, device)
    x = np.broadcast_to(np.asarray(x, dtype=float), voltage.shape)
    y = np.broadcast_to(np.asarray(y, dtype=float), voltage.shape)
    return x, y


def _interpret(plot: StraightenedPlot, line: RobustLine, group_value: float,
               device: Device) -> dict[str, float]:
    with np.errstate(all="ignore"):
        quantities = plot.interpret(line.slope, line.intercept, group_value, device)
    return {str(k): float(v) for k, v in quantities.items()}


def _make_line(plot: StraightenedPlot, group: str, group_value: float, x: FloatArray,
               y: FloatArray, device: Device) -> LineFit | None:
    finite = np.isfinite(x) & np.isfinite(y)
    fit = robust_line(x[finite], y[finite])
    if fit is None:
        return None
    return LineFit(
        plot_id=plot.id,
        group=group,
        group_value=float(group_value),
        n_points=int(np.count_nonzero(finite)),
        slope=fit.slope,
        slope_err=fit.slope_err,
        intercept=fit.intercept,
        intercept_err=fit.intercept_err,
        r_squared=fit.r_squared,
        x_min=float(x[finite].min()),
        x_max=float(x[finite].max()),
        n_outliers=fit.n_outliers,
        quantities=_interpret(plot, fit, group_value, device),
    )


def _per_temperature_lines(plot: StraightenedPlot, data: PreparedSeries,
                           device: Device) -> tuple[list[LineFit], list[str]]:
    x, y = _transform(plot, data.abs_voltage_V, data.temperature_K, data.folded_current_A,
                      device)
    if data.temperatures.size == 0:
        return [], [f"{plot.id}: no usable point (finite, non-zero bias, positive temperature)"]
    lines, notes = [], []
    for t in data.temperatures:
        at_t = data.temperature_K == t
        finite = at_t & np.isfinite(x) & np.isfinite(y)
        if np.count_nonzero(finite) < MIN_POINTS_PER_LINE:
            notes.append(f"{plot.id} at {t:g} K: fewer than {MIN_POINTS_PER_LINE} usable points")
            continue
        x_t, y_t = x[at_t], y[at_t]
        if plot.regime is not None:
            inside = _regime_points(plot.regime, x_t, y_t)
            if inside is None:
                notes.append(f"{plot.id} at {t:g} K: fewer than {MIN_POINTS_PER_LINE} points where "
                             f"the plot is straight ({plot.regime.description}); its "
                             "quantities are undetermined")
                continue
            x_t = np.where(inside, x_t, np.nan)
        line = _make_line(plot, "temperature_K", float(t), x_t, y_t, device)
        if line is None:
            notes.append(f"{plot.id} at {t:g} K: no spread in x")
        else:
            lines.append(line)
    return lines, notes


def _regime_points(regime: PlotRegime, x: FloatArray, y: FloatArray) -> NDArray[np.bool_] | None:
    """Points of one line inside the plot's declared regime, found self-consistently.

    Fit all finite points, keep those where ``regime.holds(x, slope)``, refit on them and
    repeat until the kept set is unchanged (at most MAX_REGIME_REFITS times). None when
    fewer than MIN_POINTS_PER_LINE points are kept.
    """
    finite = np.isfinite(x) & np.isfinite(y)
    kept = finite
    for _ in range(MAX_REGIME_REFITS):
        fit = robust_line(x[kept], y[kept])
        if fit is None:
            return None
        with np.errstate(all="ignore"):
            now = finite & np.asarray(regime.holds(x, fit.slope), dtype=bool)
        if np.count_nonzero(now) < MIN_POINTS_PER_LINE:
            return None
        if np.array_equal(now, kept):
            break
        kept = now
    return kept


def _per_voltage_lines(plot: StraightenedPlot, data: PreparedSeries,
                       device: Device) -> tuple[list[LineFit], list[str]]:
    if data.temperatures.size < MIN_TEMPERATURES:
        return [], [f"{plot.id}: not enough temperatures ({data.temperatures.size}; "
                    f"an Arrhenius-like line needs >= {MIN_TEMPERATURES})"]
    if data.common_biases_V.size == 0:
        return [], [f"{plot.id}: no bias is measured with a positive current at every "
                    "temperature"]
    lines, notes = [], []
    for bias, currents in zip(data.common_biases_V, data.common_current_A, strict=True):
        voltage = np.full(data.temperatures.shape, bias)
        x, y = _transform(plot, voltage, data.temperatures, currents, device)
        n_finite = int(np.count_nonzero(np.isfinite(x) & np.isfinite(y)))
        if n_finite < MIN_TEMPERATURES:
            notes.append(f"{plot.id} at {bias:g} V: not enough temperatures ({n_finite})")
            continue
        line = _make_line(plot, "voltage_V", float(bias), x, y, device)
        if line is not None:
            lines.append(line)
    return lines, notes


def plot_lines(plot: StraightenedPlot, data: PreparedSeries,
               device: Device) -> tuple[list[LineFit], list[str]]:
    """All lines of one declared plot and notes on the groups that could not be fitted."""
    if plot.grouping == "per_temperature":
        return _per_temperature_lines(plot, data, device)
    return _per_voltage_lines(plot, data, device)
