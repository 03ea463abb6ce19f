"""The hand-off to the fit: declared parameter values read from the straightened plots."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence

import numpy as np

from mechid.catalogue.base import Mechanism, ParameterHints
from mechid.catalogue.checks import DiodeEstimate, PlotEstimate
from mechid.screening.lines import zero_bias_line
from mechid.screening.records import LineFit


def parameter_hints(mechanism: Mechanism, lines: Mapping[str, Sequence[LineFit]],
                    diode_values: Mapping[str, float] | None = None) -> ParameterHints:
    """Starting values of the parameters the mechanism's plots determine.

    Evaluates every declared :class:`~mechid.catalogue.checks.PlotEstimate`: the median of
    the quantity over the plot's lines, or its extrapolation to zero bias
    (:func:`zero_bias_line`); and every :class:`~mechid.catalogue.checks.DiodeEstimate`
    from ``diode_values`` (:func:`mechid.screening.diode.start_values`). Values that are not
    finite are left out; whether a value lies inside the prior is for the mode search to
    decide.
    """
    values: dict[str, float] = {}
    sources: dict[str, str] = {}
    for estimate in mechanism.estimates:
        if isinstance(estimate, DiodeEstimate):
            value = (diode_values or {}).get(estimate.key)
            source = f"rectifying-contact analysis: {estimate.key}"
        else:
            value = _estimate_value(estimate, lines.get(estimate.plot, ()))
            source = (f"{estimate.plot}.{estimate.key}"
                      + ("" if estimate.zero_bias_power is None else " at zero bias"))
        if value is not None and math.isfinite(value):
            values[estimate.parameter] = float(value)
            sources[estimate.parameter] = source
    return ParameterHints(mechanism.id, values, sources)


def _estimate_value(estimate: PlotEstimate, plot_lines: Sequence[LineFit]) -> float | None:
    if estimate.zero_bias_power is not None:
        fit = zero_bias_line(plot_lines, estimate.key, estimate.zero_bias_power)
        return None if fit is None else fit[0]
    values = np.array([line.quantities.get(estimate.key, np.nan) for line in plot_lines])
    values = values[np.isfinite(values)]
    return float(np.median(values)) if values.size else None
