"""Classical straightened-plot analysis of an I-V-T series (the practitioner's screening step).

Every mechanism in :data:`mechid.catalogue.MECHANISMS` declares its straightened plots
(:class:`~mechid.catalogue.base.StraightenedPlot`): a transform under which the mechanism is a
straight line and an ``interpret`` that reads physical quantities from slope and intercept.
This module draws those lines through the data -- one per temperature or one per selected bias
-- with a robust straight-line fit, applies the consistency checks practitioners use, and
ranks the mechanisms with a screening score. The Bayesian evidence
(:mod:`mechid.inference`) is the real model comparison; this is the quick look that
precedes it and that a reader can verify on paper.

Besides the declared plots, three data-level analyses are made once per series:

* the apparent activation energy at each common bias (Arrhenius slope of ln|I| vs 1/T);
* the reduced activation energy w(T) = d ln G / d ln T of Zabrodskii & Zinov'eva (1984) with
  the hopping exponent p from the slope of ln w vs ln T;
* the transition voltage, the minimum of ln(I/V^2) vs 1/V (Beebe et al. 2006), per temperature
  and polarity.

Which points go into a line
---------------------------
``per_temperature`` plots fold both polarities onto |V| (I is multiplied by sign(V), so a
current of the wrong sign stays negative and drops out where the transform takes a log); the
points where the transform is finite are fitted. ``per_voltage`` plots (Arrhenius-like) use a
few biases present at every temperature: ``n_biases`` targets spread evenly over the |V| range
common to all temperatures, each matched to the nearest measured |V| within 5 % at every
temperature; at least three temperatures are needed, otherwise the plot is reported as
"not enough temperatures".

Line fit and score
------------------
Each line is a Huber regression (scikit-learn ``HuberRegressor``, deterministic) with R^2
on all points used and slope/intercept errors from the ordinary-least-squares formula on the
robust residuals (:func:`robust_line`). Each mechanism declares its consistency checks as
data (``Mechanism.checks``, :mod:`mechid.catalogue.checks`); each check type is evaluated by
its rule in :data:`CHECK_RULES`. The ranking uses :func:`screening_score`, a documented
composite of straightness and checks -- a screening heuristic; the Bayesian evidence is the real comparison.
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray
from sklearn.exceptions import ConvergenceWarning as SklearnConvergenceWarning
from sklearn.linear_model import HuberRegressor
from threadpoolctl import threadpool_limits

from mechid import catalogue
from mechid.catalogue.base import Mechanism, ParameterHints, StraightenedPlot
from mechid.catalogue.checks import (
    CheckSpec,
    DielectricRange,
    DielectricVsOptical,
    FieldLoweringDielectric,
    HopEnergyExceedsKT,
    HoppingLaw,
    NearlyTemperatureIndependent,
    Ohmic,
    PlotEstimate,
    PositiveQuantity,
    QuantityInRange,
    RichardsonConstant,
    SlopeTimesTemperature,
    StraightPlot,
    ThermallyActivated,
    TunnellingRegime,
    ZeroFieldBarrier,
)
from mechid.constants import BOLTZMANN_EV
from mechid.data import SeriesLike
from mechid.device import Device

FloatArray = NDArray[np.float64]

#: Huber loss threshold in units of the fitted scale (Huber 1964; the scikit-learn default,
#: 95 % efficiency for Gaussian residuals).
HUBER_EPSILON = 1.35
#: L-BFGS settings of the Huber fit (started from the least-squares line).
HUBER_TOL = 1e-8
HUBER_MAX_ITER = 200
#: Relative mismatch allowed when matching a target bias to a measured |V|.
BIAS_MATCH_RTOL = 0.05
#: Fewest temperatures for an Arrhenius-like (per_voltage) line or a Zabrodskii analysis.
MIN_TEMPERATURES = 3
#: y spread (relative to 1 + |mean y|) below which a line is taken as exactly flat.
FLAT_RELATIVE_SPREAD = 1e-12
#: Fewest points for a per-temperature line.
MIN_POINTS_PER_LINE = 4

#: Tolerance on the Zabrodskii exponent: max(this, 2 standard errors); a law is supported
#: only when it is also the nearest of the laws. A prefactor G0 ~ T^m shifts w by m
#: (Zabrodskii & Zinov'eva 1984), which biases p by ~0.1 for low-field hopping.
ZABRODSKII_P_TOL = 0.2


# --------------------------------------------------------------------------------------------
# Result objects
# --------------------------------------------------------------------------------------------


def _json_float(value: float | None) -> float | None:
    """A finite float, or None for missing and non-finite values (JSON has no NaN)."""
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


@dataclass(frozen=True)
class LineFit:
    """One straight line through a straightened plot.

    Parameters
    ----------
    plot_id : str
        Id of the declared :class:`~mechid.catalogue.base.StraightenedPlot`.
    group : {"temperature_K", "voltage_V"}
        What is held fixed along the line.
    group_value : float
        The temperature in K or the bias |V| in V of this line.
    n_points : int
        Points that went into the fit (all finite transformed points of the group).
    slope, slope_err, intercept, intercept_err : float
        Huber-regression line; the errors are the ordinary-least-squares standard errors
        evaluated with the residuals of the robust line.
    r_squared : float
        1 - SS_res/SS_tot of the robust line on all points used.
    x_min, x_max : float
        Range of the plot's x over the points used.
    n_outliers : int
        Points the Huber loss treats as outliers (|residual| > epsilon * scale).
    quantities : mapping
        What the plot's ``interpret`` reads from the line (keys with unit suffixes).
    """

    plot_id: str
    group: str
    group_value: float
    n_points: int
    slope: float
    slope_err: float
    intercept: float
    intercept_err: float
    r_squared: float
    x_min: float
    x_max: float
    n_outliers: int = 0
    quantities: Mapping[str, float] = field(default_factory=dict)

    @property
    def curvature_index(self) -> float:
        """-log10(1 - R^2), clipped to [0, 12]: about the number of decimals of straightness."""
        return _straightness(self.r_squared)

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form (non-finite numbers become None)."""
        return {
            "plot_id": self.plot_id,
            "group": self.group,
            "group_value": _json_float(self.group_value),
            "n_points": int(self.n_points),
            "slope": _json_float(self.slope),
            "slope_err": _json_float(self.slope_err),
            "intercept": _json_float(self.intercept),
            "intercept_err": _json_float(self.intercept_err),
            "r_squared": _json_float(self.r_squared),
            "x_min": _json_float(self.x_min),
            "x_max": _json_float(self.x_max),
            "n_outliers": int(self.n_outliers),
            "quantities": {k: _json_float(v) for k, v in self.quantities.items()},
        }


@dataclass(frozen=True)
class Check:
    """A consistency check with its reason in words.

    Parameters
    ----------
    name : str
        Short stable name, e.g. ``"dielectric_constant_vs_optical"``.
    passed : bool or None
        None when the check cannot be evaluated (missing device value, too few temperatures).
    value, expected : float, str or None
        The number tested and what it was compared with (a value, a range in words).
    detail : str
        One sentence saying why it passed, failed or could not be evaluated.
    """

    name: str
    passed: bool | None
    value: float | None
    expected: str
    detail: str

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "name": self.name,
            "passed": self.passed,
            "value": _json_float(self.value),
            "expected": self.expected,
            "detail": self.detail,
        }


@dataclass(frozen=True)
class ZabrodskiiAnalysis:
    """Reduced activation energy w(T) = d ln G / d ln T and the hopping exponent p.

    Parameters
    ----------
    bias_V : float or None
        The common bias at which G = I/V was taken (the lowest one).
    temperatures_K, w : tuple of float
        Temperatures and the reduced activation energy there.
    exponent_p, exponent_p_err : float or None
        p from the OLS slope (-p) of ln w vs ln T and its standard error.
    supported_law : str or None
        Mechanism id of the hopping law whose p is nearest, when within tolerance.
    detail : str
        How the analysis went, or why it could not be made.
    law_exponents : mapping
        The candidate laws: p of every mechanism that declares a
        :class:`~mechid.catalogue.checks.HoppingLaw`, keyed by mechanism id.
    """

    bias_V: float | None
    temperatures_K: tuple[float, ...]
    w: tuple[float, ...]
    exponent_p: float | None
    exponent_p_err: float | None
    supported_law: str | None
    detail: str
    law_exponents: Mapping[str, float] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "bias_V": _json_float(self.bias_V),
            "temperatures_K": [_json_float(t) for t in self.temperatures_K],
            "w": [_json_float(v) for v in self.w],
            "exponent_p": _json_float(self.exponent_p),
            "exponent_p_err": _json_float(self.exponent_p_err),
            "supported_law": self.supported_law,
            "law_exponents": dict(self.law_exponents),
            "detail": self.detail,
        }


@dataclass(frozen=True)
class TransitionVoltage:
    """Transition voltage at one temperature (Beebe et al. 2006), per polarity.

    ``positive_V`` and ``negative_V`` are the |V| of the minimum of ln(I/V^2) vs 1/V on each
    bias branch, or None when the minimum does not lie inside the measured range.
    """

    temperature_K: float
    positive_V: float | None
    negative_V: float | None

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "temperature_K": _json_float(self.temperature_K),
            "positive_V": _json_float(self.positive_V),
            "negative_V": _json_float(self.negative_V),
        }


@dataclass(frozen=True)
class ActivationEnergy:
    """Apparent activation energy E_a = -k_B d ln|I| / d(1/T) at one common bias."""

    bias_V: float
    activation_energy_eV: float
    n_temperatures: int

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "bias_V": _json_float(self.bias_V),
            "activation_energy_eV": _json_float(self.activation_energy_eV),
            "n_temperatures": int(self.n_temperatures),
        }


@dataclass(frozen=True)
class MechanismLinearisation:
    """Straightened-plot analysis of one mechanism.

    Parameters
    ----------
    mechanism_id, family : str
        From the catalogue declaration.
    lines : tuple of LineFit
        Every line drawn for the mechanism's plots.
    summary : mapping
        Median over lines of every interpreted quantity, keyed ``"<plot_id>.<quantity>"``,
        plus derived quantities from the checks (e.g. a zero-field barrier).
    checks : tuple of Check
        Consistency checks.
    straightness : float or None
        Mean over plots of the median curvature index -log10(1 - R^2) of their lines,
        clipped to [0, STRAIGHTNESS_CAP]; None when no line could be drawn.
    score : float
        Screening score (see :func:`screening_score`); -inf when nothing could be drawn.
    notes : tuple of str
        Plots that could not be drawn, with the reason.
    hints : ParameterHints
        Values of the declared parameters the plots determine (the mechanism's
        ``estimates``), keyed by parameter name: the fit's starting values. Not in the JSON.
    """

    mechanism_id: str
    family: str
    lines: tuple[LineFit, ...]
    summary: Mapping[str, float]
    checks: tuple[Check, ...]
    straightness: float | None
    score: float
    notes: tuple[str, ...] = ()
    hints: ParameterHints = field(default_factory=lambda: ParameterHints(""))

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "mechanism_id": self.mechanism_id,
            "family": self.family,
            "lines": [line.to_dict() for line in self.lines],
            "summary": {k: _json_float(v) for k, v in self.summary.items()},
            "checks": [c.to_dict() for c in self.checks],
            "straightness": _json_float(self.straightness),
            "score": _json_float(self.score),
            "notes": list(self.notes),
        }


@dataclass(frozen=True)
class LinearisationResult:
    """Result of :func:`linearise` for a whole series.

    Parameters
    ----------
    mechanisms : tuple of MechanismLinearisation
        One per catalogued mechanism, in catalogue order.
    zabrodskii : ZabrodskiiAnalysis
        Reduced-activation-energy analysis of the series.
    transition_voltages : tuple of TransitionVoltage
        One per temperature.
    activation_energies : tuple of ActivationEnergy
        Apparent activation energy at each common bias.
    ranking : tuple of str
        Mechanism ids, best screening score first.
    """

    mechanisms: tuple[MechanismLinearisation, ...]
    zabrodskii: ZabrodskiiAnalysis
    transition_voltages: tuple[TransitionVoltage, ...]
    activation_energies: tuple[ActivationEnergy, ...]
    ranking: tuple[str, ...]

    @property
    def best(self) -> str | None:
        """Id of the best-scoring mechanism, or None when no mechanism could be assessed."""
        by_id = {m.mechanism_id: m for m in self.mechanisms}
        if not self.ranking or not math.isfinite(by_id[self.ranking[0]].score):
            return None
        return self.ranking[0]

    def for_mechanism(self, mechanism_id: str) -> MechanismLinearisation:
        """The analysis of one mechanism (KeyError naming the known ids otherwise)."""
        for m in self.mechanisms:
            if m.mechanism_id == mechanism_id:
                return m
        known = ", ".join(m.mechanism_id for m in self.mechanisms)
        raise KeyError(f"no linearisation for {mechanism_id!r}; known: {known}")

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "mechanisms": [m.to_dict() for m in self.mechanisms],
            "zabrodskii": self.zabrodskii.to_dict(),
            "transition_voltages": [t.to_dict() for t in self.transition_voltages],
            "activation_energies": [a.to_dict() for a in self.activation_energies],
            "ranking": list(self.ranking),
            "best": self.best,
        }


# --------------------------------------------------------------------------------------------
# Robust straight line
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _Line:
    slope: float
    slope_err: float
    intercept: float
    intercept_err: float
    r_squared: float
    n_outliers: int


def robust_line(x: FloatArray, y: FloatArray) -> _Line | None:
    """Fit y = intercept + slope*x with the Huber loss (Huber 1964) via scikit-learn.

    x and y are standardised before the fit (the Huber scale is fitted jointly, so the fit is
    invariant to units) and the coefficients transformed back. Deterministic (L-BFGS, no
    random start). The errors are the ordinary-least-squares standard errors,
    s^2 = SS_res/(n-2), se(slope) = s/sqrt(S_xx), se(intercept) = s*sqrt(1/n + xbar^2/S_xx),
    evaluated with the residuals of the robust line.

    Returns
    -------
    _Line or None
        None when fewer than 3 finite points or no spread in x.
    """
    finite = np.isfinite(x) & np.isfinite(y)
    x, y = x[finite], y[finite]
    n = x.size
    if n < 3:
        return None
    x_mean, y_mean = float(x.mean()), float(y.mean())
    x_sd, y_sd = float(x.std()), float(y.std())
    if not (x_sd > 0 and math.isfinite(x_sd) and math.isfinite(y_sd)):
        return None
    if y_sd <= FLAT_RELATIVE_SPREAD * (1.0 + abs(y_mean)):
        # y constant to rounding error (an ohmic current on a plot of ln(I/V)): a flat line.
        slope, intercept, n_outliers = 0.0, y_mean, 0
        y = np.full_like(y, y_mean)
    else:
        x_std, y_std = (x - x_mean) / x_sd, (y - y_mean) / y_sd
        huber = HuberRegressor(epsilon=HUBER_EPSILON, alpha=0.0, max_iter=HUBER_MAX_ITER,
                               tol=HUBER_TOL, warm_start=True)
        # Start L-BFGS from the least-squares line (warm_start reads these attributes): on
        # clean data it is already the optimum, which saves most of the iterations.
        ols_slope = float(np.mean(x_std * y_std))
        ols_residual = y_std - ols_slope * x_std
        huber.coef_ = np.array([ols_slope])
        huber.intercept_ = 0.0
        huber.scale_ = max(1.4826 * float(np.median(np.abs(ols_residual))), 1e-6)
        with warnings.catch_warnings():
            # A line through clean data drives the Huber scale to its lower bound; L-BFGS
            # may then stop on its iteration limit with a converged line. Not a user warning.
            warnings.simplefilter("ignore", SklearnConvergenceWarning)
            huber.fit(x_std[:, None], y_std)
        slope = float(huber.coef_[0]) * y_sd / x_sd
        intercept = y_mean + y_sd * float(huber.intercept_) - slope * x_mean
        n_outliers = int(np.count_nonzero(huber.outliers_))
    residual = y - (intercept + slope * x)
    ss_res = float(np.sum(residual**2))
    ss_tot = float(np.sum((y - y_mean) ** 2))
    s_xx = float(np.sum((x - x_mean) ** 2))
    s2 = ss_res / (n - 2)
    return _Line(
        slope=slope,
        slope_err=math.sqrt(s2 / s_xx),
        intercept=intercept,
        intercept_err=math.sqrt(s2 * (1.0 / n + x_mean**2 / s_xx)),
        r_squared=1.0 - ss_res / ss_tot if ss_tot > 0 else 1.0,
        n_outliers=n_outliers,
    )


def _ols_slope(x: FloatArray, y: FloatArray) -> tuple[float, float]:
    """Ordinary-least-squares slope and its standard error (NaN error for n < 3)."""
    n = x.size
    x_c = x - x.mean()
    s_xx = float(np.sum(x_c**2))
    slope = float(np.sum(x_c * (y - y.mean())) / s_xx)
    if n < 3:
        return slope, math.nan
    residual = y - y.mean() - slope * x_c
    return slope, math.sqrt(float(np.sum(residual**2)) / (n - 2) / s_xx)


# --------------------------------------------------------------------------------------------
# Preparing the data
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _Prepared:
    """Series folded to |V| with the common-bias table."""

    temperature_K: FloatArray
    voltage_V: FloatArray  # signed, as measured
    current_A: FloatArray  # signed, as measured
    abs_voltage_V: FloatArray
    folded_current_A: FloatArray  # sign(V) * I: positive for a normally conducting device
    temperatures: FloatArray
    common_biases_V: FloatArray  # shape (n_biases,)
    common_current_A: FloatArray  # shape (n_biases, n_temperatures), NaN where unmatched


def _prepare(series: SeriesLike, n_biases: int) -> _Prepared:
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
    biases, table = _common_bias_table(temperature, abs_voltage, folded, temperatures, n_biases)
    return _Prepared(temperature, voltage, current, abs_voltage, folded, temperatures, biases,
                     table)


def _common_bias_table(
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
        v, i = abs_voltage[at_t], folded_current[at_t]
        nearest = v[np.argmin(np.abs(v[None, :] - targets[:, None]), axis=1)]
        same = v[None, :] == nearest[:, None]
        mean_current = np.sum(np.where(same, i[None, :], 0.0), axis=1) / same.sum(axis=1)
        ok = np.abs(nearest - targets) <= BIAS_MATCH_RTOL * targets
        table[:, j] = np.where(ok, mean_current, np.nan)
        matched_bias[:, j] = np.where(ok, nearest, np.nan)
    with np.errstate(all="ignore"), warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # all-NaN rows give NaN medians
        biases = np.nanmedian(matched_bias, axis=1)
    keep = np.isfinite(biases)
    return biases[keep], table[keep]


# --------------------------------------------------------------------------------------------
# Lines of the declared plots
# --------------------------------------------------------------------------------------------


def _transform(plot: StraightenedPlot, voltage: FloatArray, temperature: FloatArray,
               current: FloatArray, device: Device) -> tuple[FloatArray, FloatArray]:
    with np.errstate(all="ignore"):
        x, y = plot.transform(voltage, temperature, current, device)
    x = np.broadcast_to(np.asarray(x, dtype=float), voltage.shape)
    y = np.broadcast_to(np.asarray(y, dtype=float), voltage.shape)
    return x, y


def _interpret(plot: StraightenedPlot, line: _Line, group_value: float,
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


def _per_temperature_lines(plot: StraightenedPlot, data: _Prepared,
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
        line = _make_line(plot, "temperature_K", float(t), x[at_t], y[at_t], device)
        if line is None:
            notes.append(f"{plot.id} at {t:g} K: no spread in x")
        else:
            lines.append(line)
    return lines, notes


def _per_voltage_lines(plot: StraightenedPlot, data: _Prepared,
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


def plot_lines(plot: StraightenedPlot, data: _Prepared,
               device: Device) -> tuple[list[LineFit], list[str]]:
    """All lines of one declared plot and notes on the groups that could not be fitted."""
    if plot.grouping == "per_temperature":
        return _per_temperature_lines(plot, data, device)
    return _per_voltage_lines(plot, data, device)


# --------------------------------------------------------------------------------------------
# Data-level analyses
# --------------------------------------------------------------------------------------------


def _activation_energies(data: _Prepared) -> list[ActivationEnergy]:
    """Apparent E_a at each common bias from the OLS slope of ln I vs 1/T."""
    out = []
    if data.temperatures.size < 2:
        return out
    inverse_t = 1.0 / data.temperatures
    for bias, currents in zip(data.common_biases_V, data.common_current_A, strict=True):
        ok = np.isfinite(currents) & (currents > 0)
        if np.count_nonzero(ok) < 2:
            continue
        slope, _ = _ols_slope(inverse_t[ok], np.log(currents[ok]))
        out.append(ActivationEnergy(float(bias), -slope * BOLTZMANN_EV,
                                    int(np.count_nonzero(ok))))
    return out


def zabrodskii_analysis(data: _Prepared, laws: Mapping[str, float]) -> ZabrodskiiAnalysis:
    """Reduced activation energy and hopping exponent (Zabrodskii & Zinov'eva 1984).

    w(T) = d ln G / d ln T with G = I/V at the lowest common bias, by second-order finite
    differences on the (non-uniform) ln T grid (:func:`numpy.gradient`, edge_order=2). For
    G = G0 exp[-(T0/T)^p], w = p (T0/T)^p, so ln w = ln(p T0^p) - p ln T and the OLS slope of
    ln w vs ln T is -p (Zabrodskii & Zinov'eva, Sov. Phys. JETP 59, 425 (1984), from memory).
    p = 1 is nearest-neighbour (Arrhenius), 1/4 Mott 3D, 1/2 Efros-Shklovskii; ``laws`` are
    the candidates (:func:`hopping_laws`), the nearest is reported.
    """
    def failed(detail: str, bias: float | None = None, temps: Sequence[float] = (),
               w: Sequence[float] = ()) -> ZabrodskiiAnalysis:
        return ZabrodskiiAnalysis(bias, tuple(map(float, temps)), tuple(map(float, w)),
                                  None, None, None, detail, dict(laws))

    if data.temperatures.size < MIN_TEMPERATURES:
        return failed(f"not enough temperatures ({data.temperatures.size}; needs "
                      f">= {MIN_TEMPERATURES})")
    if data.common_biases_V.size == 0:
        return failed("no bias is measured with a positive current at every temperature")
    bias = float(data.common_biases_V[0])
    currents = data.common_current_A[0]
    ok = np.isfinite(currents) & (currents > 0)
    temps = data.temperatures[ok]
    if temps.size < MIN_TEMPERATURES:
        return failed(f"positive current at only {temps.size} temperatures at {bias:g} V", bias)
    ln_t = np.log(temps)
    ln_g = np.log(currents[ok] / bias)
    w = np.gradient(ln_g, ln_t, edge_order=2)
    if np.any(w <= 0):
        return failed("w = d ln G/d ln T is not positive at every temperature (not "
                      "activated: metallic or tunnelling-like)", bias, temps, w)
    minus_p, p_err = _ols_slope(ln_t, np.log(w))
    p = -minus_p
    p_err_or_none = p_err if math.isfinite(p_err) else None
    if not laws:
        return failed("no mechanism declares a hopping law", bias, temps, w)
    nearest = min(laws, key=lambda law: abs(p - laws[law]))
    supported = nearest if _law_supported(p, p_err_or_none, laws[nearest], laws) else None
    detail = (f"p = {p:.3f} +/- {p_err:.3f} from ln w vs ln T at {bias:g} V over "
              f"{temps.size} temperatures; nearest law {nearest} (p = {laws[nearest]:g})"
              + ("" if supported else ", but too far from it"))
    return ZabrodskiiAnalysis(bias, tuple(map(float, temps)), tuple(map(float, w)), p,
                              p_err_or_none, supported, detail, dict(laws))


def _branch_transition_voltage(abs_v: FloatArray, current: FloatArray) -> float | None:
    """Minimum of ln(I/V^2) vs 1/V on one bias branch, refined by a parabola in 1/V."""
    ok = current > 0
    abs_v, current = abs_v[ok], current[ok]
    if abs_v.size < 3:
        return None
    order = np.argsort(-abs_v)  # ascending in x = 1/V
    x = 1.0 / abs_v[order]
    y = np.log(current[order] / abs_v[order] ** 2)
    k = int(np.argmin(y))
    if k == 0 or k == x.size - 1 or x[k - 1] == x[k] or x[k] == x[k + 1]:
        return None
    x3, y3 = x[k - 1:k + 2], y[k - 1:k + 2]
    a, b, _ = np.polyfit(x3 - x3[1], y3, 2)
    if not a > 0:
        return float(1.0 / x[k])
    x_min = x3[1] - b / (2 * a)
    return float(1.0 / x_min) if x_min > 0 else None


def transition_voltages(data: _Prepared) -> list[TransitionVoltage]:
    """Transition voltage per temperature and polarity (Beebe et al., PRL 97, 026801 (2006)).

    V_t is where ln(I/V^2) vs 1/V has its minimum (equivalently d ln I/d ln V = 2). It is
    reported only when the minimum lies strictly inside the measured range; on a
    tunnelling junction it marks where the data cross from direct to Fowler-Nordheim-like
    tunnelling.
    """
    out = []
    for t in data.temperatures:
        at_t = data.temperature_K == t
        branch = {}
        for name, sign in (("positive", 1.0), ("negative", -1.0)):
            on_branch = at_t & (np.sign(data.voltage_V) == sign)
            with np.errstate(all="ignore"):
                branch[name] = _branch_transition_voltage(
                    data.abs_voltage_V[on_branch], sign * data.current_A[on_branch])
        out.append(TransitionVoltage(float(t), branch["positive"], branch["negative"]))
    return out


def _low_bias_exponents(data: _Prepared) -> dict[float, float]:
    """d ln I / d ln V over the three lowest distinct |V| at each temperature (OLS slope).

    Equals 2 exactly at the transition voltage (Beebe et al. 2006): below 2 the current is
    in the direct (ohmic-like) regime, above 2 it is Fowler-Nordheim-like.
    """
    out = {}
    for t in data.temperatures:
        ok = (data.temperature_K == t) & (data.folded_current_A > 0)
        v = data.abs_voltage_V[ok]
        if np.unique(v).size < 3:
            continue
        lowest = v <= np.unique(v)[2]
        slope, _ = _ols_slope(np.log(v[lowest]), np.log(data.folded_current_A[ok][lowest]))
        out[float(t)] = slope
    return out


def _log_log_slopes(data: _Prepared) -> dict[float, float]:
    """OLS slope of ln I vs ln |V| over all positive points at each temperature."""
    out = {}
    for t in data.temperatures:
        ok = (data.temperature_K == t) & (data.folded_current_A > 0)
        if np.unique(data.abs_voltage_V[ok]).size < 3:
            continue
        slope, _ = _ols_slope(np.log(data.abs_voltage_V[ok]), np.log(data.folded_current_A[ok]))
        out[float(t)] = slope
    return out


# --------------------------------------------------------------------------------------------
# Consistency checks
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _Context:
    """Everything a check may read."""

    mechanism: Mechanism
    lines: Mapping[str, Sequence[LineFit]]
    device: Device
    data: _Prepared
    laws: Mapping[str, float]
    zabrodskii: ZabrodskiiAnalysis
    activation: Sequence[ActivationEnergy]
    transitions: Sequence[TransitionVoltage]
    low_bias_exponents: Mapping[float, float]
    log_log_slopes: Mapping[float, float]

    def quantity(self, plot_id: str, key: str) -> FloatArray:
        """Finite values of one interpreted quantity over the lines of a plot."""
        values = np.array([line.quantities.get(key, np.nan) for line in self.lines.get(plot_id, ())],
                          dtype=float)
        return values[np.isfinite(values)]


def _unknown(name: str, expected: str, detail: str) -> Check:
    return Check(name, None, None, expected, detail)


def zero_bias_line(plot_lines: Sequence[LineFit], key: str,
                   power: float) -> tuple[float, float, int] | None:
    """OLS line of a per-bias quantity against |V|^power: (intercept, slope, n biases).

    None when fewer than two biases give a finite value.
    """
    lines = [line for line in plot_lines if key in line.quantities]
    energies = np.array([line.quantities[key] for line in lines], dtype=float)
    roots = np.array([line.group_value for line in lines], dtype=float) ** power
    ok = np.isfinite(energies)
    if np.count_nonzero(ok) < 2 or np.ptp(roots[ok]) == 0:
        return None
    slope, _ = _ols_slope(roots[ok], energies[ok])
    intercept = float(np.mean(energies[ok]) - slope * np.mean(roots[ok]))
    return intercept, slope, int(np.count_nonzero(ok))


def dielectric_range_check(spec: DielectricRange, ctx: _Context) -> Check:
    """eps_r read from a Schottky/PF slope lies in [low, high] (Sze & Ng 2007; [CP])."""
    plot_id, name = spec.plot, "dielectric_constant_in_range"
    expected = f"{spec.low:g} <= eps_r <= {spec.high:g}"
    if not ctx.lines.get(plot_id):
        return _unknown(name, expected, f"no {plot_id} line could be drawn")
    if ctx.device.thickness_nm is None:
        return _unknown(name, expected, "needs the film thickness to turn the slope into eps_r")
    values = ctx.quantity(plot_id, "dielectric_constant")
    if values.size == 0:
        return Check(name, False, None, expected,
                     f"the {plot_id} slope is not positive, so no eps_r can be read from it")
    eps = float(np.median(values))
    passed = spec.low <= eps <= spec.high
    return Check(name, passed, eps, expected,
                 f"median eps_r = {eps:.3g} from the {plot_id} slopes"
                 + ("" if passed else ", outside the range of real dielectrics"))


def dielectric_optical_check(spec: DielectricVsOptical, ctx: _Context) -> Check:
    """eps_r from the slope agrees with the optical value n^2 (Chiu 2014; Sze & Ng 2007).

    Passes when |eps_r/n^2 - 1| <= spec.rtol (a common-practice threshold).
    """
    name = "dielectric_constant_vs_optical"
    expected = f"|eps_r/n^2 - 1| <= {spec.rtol:g}"
    optical = ctx.device.optical_dielectric_constant
    if optical is None:
        return _unknown(name, expected, "the device's optical dielectric constant is not given")
    values = ctx.quantity(spec.plot, "dielectric_constant")
    if values.size == 0:
        return _unknown(name, expected, f"no eps_r could be read from the {spec.plot} slopes")
    ratio = float(np.median(values)) / optical.value
    passed = abs(ratio - 1) <= spec.rtol
    return Check(name, passed, ratio, expected,
                 f"eps_r/n^2 = {ratio:.3g} (optical value {optical.value:g})")


def slope_times_temperature_check(spec: SlopeTimesTemperature, ctx: _Context) -> Check:
    """The field slope scales as 1/T: slope*T constant (coefficient of variation small)."""
    name = "slope_times_temperature_constant"
    expected = f"coefficient of variation of slope*T <= {spec.max_cv:g}"
    lines = ctx.lines.get(spec.plot, ())
    if len(lines) < 2:
        return _unknown(name, expected, "needs lines at >= 2 temperatures")
    product = np.array([line.slope * line.group_value for line in lines])
    mean = float(np.mean(product))
    if not mean > 0:
        return Check(name, False, None, expected,
                     f"the {spec.plot} slopes are not positive on average")
    cv = float(np.std(product) / mean)
    passed = cv <= spec.max_cv
    return Check(name, passed, cv, expected,
                 f"slope*T varies by {100 * cv:.2g} % over {len(lines)} temperatures")


def zero_field_barrier_check(spec: ZeroFieldBarrier, ctx: _Context) -> Check:
    """Barrier extrapolated to zero field from the Arrhenius/Richardson energies.

    The activation energy at bias V is phi - beta sqrt(V/(d eps_r)) (Sze & Ng 2007; for
    Poole-Frenkel Frenkel 1938), so an OLS line of it against sqrt(V) has intercept phi
    (zero field). The barrier must lie within the declared range of ``spec.parameter``
    (which is positive).
    """
    name = f"zero_field_{spec.parameter}"
    declared = ctx.mechanism.parameter(spec.parameter)
    expected = f"{declared.lower:g} <= {spec.parameter} <= {declared.upper:g}"
    fit = zero_bias_line(ctx.lines.get(spec.plot, ()), spec.quantity, 0.5)
    if fit is None:
        return _unknown(name, expected, f"needs {spec.plot} lines at >= 2 biases")
    intercept, _, n = fit
    passed = declared.lower <= intercept <= declared.upper
    return Check(name, passed, intercept, expected,
                 f"{spec.quantity} extrapolated to zero field: {intercept:.3g} eV from {n} biases")


def field_lowering_dielectric_check(spec: FieldLoweringDielectric, ctx: _Context) -> Check:
    """The two eps_r estimates agree: from the field plot slope and from d E_a/d sqrt(E).

    E_a(V) = phi - beta sqrt(V/(d eps_r)) gives eps_r = (beta/(s sqrt(d)))^2 from the slope s
    of E_a against sqrt(V); it must agree with the eps_r of the field plot (Sze & Ng 2007;
    physics sheet S11 item 2). Passes when the ratio is within 1 +/- spec.rtol.
    """
    name = "dielectric_constants_agree"
    expected = f"|eps_r(E_a)/eps_r(slope) - 1| <= {spec.rtol:g}"
    if ctx.device.thickness_nm is None:
        return _unknown(name, expected, "needs the film thickness")
    fit = zero_bias_line(ctx.lines.get(spec.arrhenius_plot, ()), spec.quantity, 0.5)
    from_slope = ctx.quantity(spec.field_plot, "dielectric_constant")
    if fit is None or from_slope.size == 0:
        return _unknown(name, expected, "needs both eps_r estimates")
    _, slope, n = fit
    if not slope < 0:
        return Check(name, False, None, expected,
                     f"{spec.quantity} does not fall with sqrt(bias), so no field lowering is seen")
    eps = (spec.coefficient_eV / (-slope * math.sqrt(ctx.device.thickness_nm.value * 1e-9))) ** 2
    ratio = eps / float(np.median(from_slope))
    passed = abs(ratio - 1) <= spec.rtol
    return Check(name, passed, ratio, expected,
                 f"eps_r = {eps:.3g} from the field dependence of {spec.quantity} ({n} biases) vs "
                 f"{float(np.median(from_slope)):.3g} from the {spec.field_plot}")


def richardson_constant_check(spec: RichardsonConstant, ctx: _Context) -> Check:
    """A* from the Richardson intercept within spec.max_decades decades of A0 [CP].

    Practitioners expect A*/A0 ~ m*/m0 of order one (Sze & Ng 2007; physics sheet S11
    item 3: "within ~1-2 decades of 120 m*/m0").
    """
    name = "richardson_constant_plausible"
    expected = f"|log10(A*/A0)| <= {spec.max_decades:g}"
    values = ctx.quantity(spec.plot, "richardson_constant_ratio")
    values = values[values > 0]
    if values.size == 0:
        return _unknown(name, expected, "needs the electrode area and a Richardson line")
    ratio = float(np.median(values))
    decades = math.log10(ratio)
    return Check(name, abs(decades) <= spec.max_decades, ratio, expected,
                 f"A*/A0 = {ratio:.3g} ({decades:+.2g} decades)")


def thermally_activated_check(spec: ThermallyActivated, ctx: _Context) -> Check:
    """Emission and hopping are activated: median Zabrodskii w = d ln G/d ln T > 1 [ours]."""
    name, expected = "thermally_activated", "median w = d ln G/d ln T > 1"
    w = np.asarray(ctx.zabrodskii.w, dtype=float)
    if w.size == 0:
        return _unknown(name, expected, ctx.zabrodskii.detail)
    median = float(np.median(w))
    passed = median > 1
    return Check(name, passed, median, expected,
                 f"the conductance changes {'faster' if passed else 'slower'} than T itself "
                 f"(median w = {median:.3g})")


def temperature_independent_check(spec: NearlyTemperatureIndependent, ctx: _Context) -> Check:
    """Tunnelling is nearly temperature independent: apparent E_a < 20 meV [common practice].

    The largest apparent activation energy over the common biases is tested; at low
    temperature a small E_a can still mean a strong change, so w < 1 is also required.
    """
    name = "nearly_temperature_independent"
    expected = f"apparent E_a < {1e3 * spec.max_activation_eV:g} meV and median w < 1"
    if not ctx.activation:
        return _unknown(name, expected, "needs >= 2 temperatures at a common bias")
    largest = max(a.activation_energy_eV for a in ctx.activation)
    w = np.asarray(ctx.zabrodskii.w, dtype=float)
    w_ok = w.size == 0 or float(np.median(w)) < 1
    passed = largest < spec.max_activation_eV and w_ok
    return Check(name, passed, largest, expected,
                 f"largest apparent activation energy {1e3 * largest:.3g} meV over "
                 f"{len(ctx.activation)} biases")


def straight_plot_check(spec: StraightPlot, ctx: _Context) -> Check:
    """The plot is straight: median R^2 over its lines >= ``spec.minimum_r_squared`` [CP]."""
    name, expected = f"{spec.plot}_straight", f"median R^2 >= {spec.minimum_r_squared:g}"
    lines = ctx.lines.get(spec.plot, ())
    if not lines:
        return _unknown(name, expected, f"no {spec.plot} line could be drawn")
    r2 = float(np.median([line.r_squared for line in lines]))
    return Check(name, r2 >= spec.minimum_r_squared, r2, expected,
                 f"median R^2 = {r2:.6g} over {len(lines)} lines")


def quantity_range_check(spec: QuantityInRange, ctx: _Context) -> Check:
    """The median of the first available quantity among ``spec.quantities`` is in range."""
    name, expected = spec.name, f"{spec.low:g} <= value <= {spec.high:g}"
    lines = ctx.lines.get(spec.plot, ())
    key = next((k for k in spec.quantities if any(k in line.quantities for line in lines)), None)
    if key is None:
        return _unknown(name, expected, f"{spec.plot} gives none of {', '.join(spec.quantities)} "
                        "(device values missing?)")
    values = ctx.quantity(spec.plot, key)
    if values.size == 0:
        return Check(name, False, None, expected, f"no finite {key} from the {spec.plot}")
    value = float(np.median(values))
    passed = spec.low <= value <= spec.high
    return Check(name, passed, value, expected, f"median {key} = {value:.4g}")


def tunnelling_regime_check(spec: TunnellingRegime, ctx: _Context) -> Check:
    """Direct vs Fowler-Nordheim regime from d ln I/d ln V at the lowest biases.

    ln(I/V^2) vs 1/V has its minimum (the transition voltage, Beebe et al. 2006) where
    d ln I/d ln V = 2: below it (exponent < 2) tunnelling is direct, above it FN-like.
    ``regime="direct"`` passes when the data start below the transition voltage;
    ``regime="fowler_nordheim"`` when they start above it (the FN plot falls throughout).
    """
    regime = spec.regime
    name = f"{regime}_tunnelling_regime"
    expected = "d ln I/d ln V < 2 at the lowest bias" if regime == "direct" else (
        "d ln I/d ln V > 2 at the lowest bias (no transition voltage inside the data)")
    if not ctx.low_bias_exponents:
        return _unknown(name, expected, "needs >= 3 distinct biases at a temperature")
    exponents = np.array(list(ctx.low_bias_exponents.values()))
    median = float(np.median(exponents))
    below = bool(np.all(exponents < 2))
    passed = below if regime == "direct" else bool(np.all(exponents > 2))
    found = [v for t in ctx.transitions for v in (t.positive_V, t.negative_V) if v is not None]
    detail = f"low-bias d ln I/d ln V = {median:.3g} (median over temperatures)"
    if found:
        detail += f"; transition voltage {np.median(found):.3g} V lies inside the data"
    return Check(name, passed, median, expected, detail)


def positive_quantity_check(spec: PositiveQuantity, ctx: _Context) -> Check:
    """The median of an interpreted quantity is positive (``spec.reason`` says why it must be)."""
    key = spec.quantity
    name, expected = f"{key}_positive", f"{key} > 0"
    values = ctx.quantity(spec.plot, key)
    if values.size == 0:
        return _unknown(name, expected, f"no finite {key} from the {spec.plot}")
    value = float(np.median(values))
    return Check(name, value > 0, value, expected, f"median {key} = {value:.3g}; {spec.reason}")


def hopping_laws(mechanisms: Sequence[Mechanism]) -> dict[str, float]:
    """Exponent p of every declared hopping law, keyed by mechanism id (declaration order)."""
    return {m.id: spec.exponent for m in mechanisms for spec in m.checks
            if isinstance(spec, HoppingLaw)}


def zabrodskii_law_check(spec: HoppingLaw, ctx: _Context) -> Check:
    """Zabrodskii exponent p agrees with the mechanism's law (Zabrodskii & Zinov'eva 1984).

    Passes when the mechanism's p is the nearest of the hopping laws to the measured p and
    within max(ZABRODSKII_P_TOL, 2 standard errors) of it.
    """
    p_law = spec.exponent
    name = "zabrodskii_exponent"
    expected = f"p = {p_law:.3g}, nearest law and within max({ZABRODSKII_P_TOL:g}, 2 sd)"
    z = ctx.zabrodskii
    if z.exponent_p is None:
        return _unknown(name, expected, z.detail)
    return Check(name, _law_supported(z.exponent_p, z.exponent_p_err, p_law, ctx.laws),
                 z.exponent_p, expected, z.detail)


def _law_supported(p: float, p_err: float | None, p_law: float,
                   laws: Mapping[str, float]) -> bool:
    candidates = np.array(sorted(set(laws.values()) | {p_law}))
    nearest = float(candidates[np.argmin(np.abs(candidates - p))])
    tolerance = max(ZABRODSKII_P_TOL, 2 * p_err) if p_err is not None else ZABRODSKII_P_TOL
    return nearest == p_law and abs(p - p_law) <= tolerance


def hop_energy_check(spec: HopEnergyExceedsKT, ctx: _Context) -> Check:
    """Variable-range self-consistency: hop energy W >= kT at the highest temperature [CP]."""
    name, expected = "hop_energy_exceeds_kT", "W/kT >= 1 at the highest temperature"
    t0 = ctx.quantity(spec.plot, "characteristic_temperature_K")
    if t0.size == 0:
        return _unknown(name, expected, f"no finite T0 from the {spec.plot}")
    t_max = float(ctx.data.temperatures.max())
    ratio = spec.hop_energy(float(np.median(t0)), t_max) / (BOLTZMANN_EV * t_max)
    return Check(name, ratio >= 1, ratio, expected,
                 f"W/kT = {ratio:.3g} at {t_max:g} K ({spec.source})")


def ohmic_check(spec: Ohmic, ctx: _Context) -> Check:
    """Variable-range hopping as declared is ohmic: d ln I/d ln V within 1 +/- 0.1 [CP]."""
    name = "ohmic"
    expected = (f"{1 - spec.tolerance:g} <= d ln I/d ln V <= {1 + spec.tolerance:g} "
                "at every temperature")
    if not ctx.log_log_slopes:
        return _unknown(name, expected, "needs >= 3 distinct biases at a temperature")
    slopes = np.array(list(ctx.log_log_slopes.values()))
    passed = bool(np.all(np.abs(slopes - 1) <= spec.tolerance))
    return Check(name, passed, float(np.median(slopes)), expected,
                 f"log-log I-V slope {slopes.min():.3g} to {slopes.max():.3g}")


def declared_range_checks(ctx: _Context) -> list[Check]:
    """Every interpreted quantity named like a declared parameter lies in its declared range.

    Parameters whose range a declared check already tests (its ``tested_parameters``) are
    skipped.
    """
    checks = []
    skip = {name for spec in ctx.mechanism.checks for name in spec.tested_parameters}
    for parameter in ctx.mechanism.parameters:
        if parameter.name in skip:
            continue
        values = np.concatenate([ctx.quantity(plot_id, parameter.name) for plot_id in ctx.lines]
                                or [np.empty(0)])
        present = any(parameter.name in line.quantities
                      for lines in ctx.lines.values() for line in lines)
        if not present:
            continue
        expected = f"{parameter.lower:g} <= {parameter.name} <= {parameter.upper:g}"
        name = f"{parameter.name}_in_declared_range"
        if values.size == 0:
            checks.append(Check(name, False, None, expected,
                                f"no finite {parameter.name} could be read"))
            continue
        value = float(np.median(values))
        passed = parameter.lower <= value <= parameter.upper
        checks.append(Check(name, passed, value, expected,
                            f"median {parameter.name} = {value:.4g} {parameter.unit}"))
    return checks


#: The rule that evaluates each declared check type (mechid.catalogue.checks).
CHECK_RULES: dict[type[CheckSpec], Callable[[Any, _Context], Check]] = {
    ThermallyActivated: thermally_activated_check,
    NearlyTemperatureIndependent: temperature_independent_check,
    TunnellingRegime: tunnelling_regime_check,
    PositiveQuantity: positive_quantity_check,
    StraightPlot: straight_plot_check,
    QuantityInRange: quantity_range_check,
    DielectricRange: dielectric_range_check,
    DielectricVsOptical: dielectric_optical_check,
    SlopeTimesTemperature: slope_times_temperature_check,
    ZeroFieldBarrier: zero_field_barrier_check,
    RichardsonConstant: richardson_constant_check,
    FieldLoweringDielectric: field_lowering_dielectric_check,
    HoppingLaw: zabrodskii_law_check,
    Ohmic: ohmic_check,
    HopEnergyExceedsKT: hop_energy_check,
}


def evaluate_check(spec: CheckSpec, ctx: _Context) -> Check:
    """Evaluate one declared check with the rule registered for its type.

    Raises
    ------
    TypeError
        When no rule is registered for the spec's type (add one to :data:`CHECK_RULES`).
    """
    rule = CHECK_RULES.get(type(spec))
    if rule is None:
        raise TypeError(f"no screening rule for the check spec {type(spec).__name__}; "
                        "register one in mechid.screening.checks.CHECK_RULES")
    return rule(spec, ctx)


# --------------------------------------------------------------------------------------------
# Score and entry point
# --------------------------------------------------------------------------------------------

#: Curvature index -log10(1 - R^2) at and above which a plot counts as fully straight: data
#: with ~1 % noise cannot tell straighter lines apart.
STRAIGHTNESS_CAP = 4.0
#: Weights of the screening score.
WEIGHT_STRAIGHTNESS = 2.0
WEIGHT_CHECKS = 2.0
FAILED_CHECK_PENALTY = 2.0


def _straightness(r_squared: float) -> float:
    if not math.isfinite(r_squared):
        return 0.0
    return float(np.clip(-math.log10(max(1.0 - r_squared, 1e-12)), 0.0, 12.0))


def mechanism_straightness(lines: Mapping[str, Sequence[LineFit]]) -> float | None:
    """Mean over plots of the median capped curvature index of their lines, scaled to [0, 1]."""
    per_plot = [
        float(np.median([min(line.curvature_index, STRAIGHTNESS_CAP) for line in plot_lines]))
        for plot_lines in lines.values() if plot_lines
    ]
    return float(np.mean(per_plot)) / STRAIGHTNESS_CAP if per_plot else None


def screening_score(straightness: float | None, checks: Sequence[Check]) -> float:
    """Screening score of one mechanism (higher is better).

    Notes
    -----
    Common practice judges a mechanism by whether its straightened plots are straight and
    whether the quantities read from them are physical (Sze & Ng 2007; Chiu 2014). On clean
    data several plots are nearly straight, so straightness is measured as the curvature
    index c = -log10(1 - R^2) (decimals of straightness), capped at STRAIGHTNESS_CAP and
    scaled to [0, 1] (mean over plots of the median over lines). The checks enter as
    (n_passed - FAILED_CHECK_PENALTY * n_failed) / n_evaluated, in [-2, 1]; checks that
    could not be evaluated do not count. The score is

        WEIGHT_STRAIGHTNESS * straightness + WEIGHT_CHECKS * check_term.

    This composite is our own screening heuristic, not a published statistic; the
    Bayesian evidence is the real model comparison.
    """
    if straightness is None:
        return -math.inf
    evaluated = [c.passed for c in checks if c.passed is not None]
    n_pass = sum(1 for p in evaluated if p)
    n_fail = len(evaluated) - n_pass
    check_term = (n_pass - FAILED_CHECK_PENALTY * n_fail) / len(evaluated) if evaluated else 0.0
    return WEIGHT_STRAIGHTNESS * straightness + WEIGHT_CHECKS * check_term


def _summary(lines: Mapping[str, Sequence[LineFit]]) -> dict[str, float]:
    summary: dict[str, float] = {}
    for plot_id, plot_lines in lines.items():
        keys = sorted({k for line in plot_lines for k in line.quantities})
        for key in keys:
            values = np.array([line.quantities.get(key, np.nan) for line in plot_lines])
            values = values[np.isfinite(values)]
            if values.size:
                summary[f"{plot_id}.{key}"] = float(np.median(values))
    return summary


def parameter_hints(mechanism: Mechanism,
                    lines: Mapping[str, Sequence[LineFit]]) -> ParameterHints:
    """Starting values of the parameters the mechanism's plots determine.

    Evaluates every declared :class:`~mechid.catalogue.checks.PlotEstimate`: the median of
    the quantity over the plot's lines, or its extrapolation to zero bias
    (:func:`zero_bias_line`). Values that are not finite are left out; whether a value lies
    inside the prior is for the mode search to decide.
    """
    values: dict[str, float] = {}
    sources: dict[str, str] = {}
    for estimate in mechanism.estimates:
        value = _estimate_value(estimate, lines.get(estimate.plot, ()))
        if value is not None and math.isfinite(value):
            values[estimate.parameter] = value
            sources[estimate.parameter] = (f"{estimate.plot}.{estimate.key}"
                                           + ("" if estimate.zero_bias_power is None
                                              else " at zero bias"))
    return ParameterHints(mechanism.id, values, sources)


def _estimate_value(estimate: PlotEstimate, plot_lines: Sequence[LineFit]) -> float | None:
    if estimate.zero_bias_power is not None:
        fit = zero_bias_line(plot_lines, estimate.key, estimate.zero_bias_power)
        return None if fit is None else fit[0]
    values = np.array([line.quantities.get(estimate.key, np.nan) for line in plot_lines])
    values = values[np.isfinite(values)]
    return float(np.median(values)) if values.size else None


def _analyse_mechanism(mechanism: Mechanism, data: _Prepared, device: Device,
                       shared: Mapping[str, Any]) -> MechanismLinearisation:
    lines: dict[str, list[LineFit]] = {}
    notes: list[str] = []
    for plot in mechanism.plots:
        plot_lines_, plot_notes = plot_lines(plot, data, device)
        lines[plot.id] = plot_lines_
        notes.extend(plot_notes)
    ctx = _Context(mechanism=mechanism, lines=lines, device=device, data=data, **shared)
    checks = [evaluate_check(spec, ctx) for spec in mechanism.checks]
    checks.extend(declared_range_checks(ctx))
    straightness = mechanism_straightness(lines)
    return MechanismLinearisation(
        mechanism_id=mechanism.id,
        family=mechanism.family,
        lines=tuple(line for plot_lines_ in lines.values() for line in plot_lines_),
        summary=_summary(lines),
        checks=tuple(checks),
        straightness=straightness,
        score=screening_score(straightness, checks),
        notes=tuple(notes),
        hints=parameter_hints(mechanism, lines),
    )


def linearise(series: SeriesLike, device: Device | None = None, *,
              mechanisms: Sequence[Mechanism] | None = None,
              n_biases: int = 4) -> LinearisationResult:
    """Straightened-plot analysis of an I-V-T series for every catalogued mechanism.

    Parameters
    ----------
    series : SeriesLike
        Arrays ``temperature_K``, ``voltage_V``, ``current_A`` (an
        :class:`~mechid.data.IVSeries` or a simulation). Non-finite points and zero bias are
        ignored.
    device : Device, optional
        Thickness, area, effective mass and optical dielectric constant used to read
        physical quantities from the lines; without them fewer quantities and checks.
    mechanisms : sequence of Mechanism, optional
        Defaults to the whole catalogue (:data:`mechid.catalogue.MECHANISMS` at call time).
        The Zabrodskii analysis' candidate laws are those the whole catalogue declares.
    n_biases : int, optional
        Number of common biases for Arrhenius-like plots (spread over the common range).

    Returns
    -------
    LinearisationResult
        Lines, checks and scores of every mechanism, the Zabrodskii analysis, transition
        voltages, apparent activation energies and the screening ranking.

    Notes
    -----
    Never raises on data a mechanism does not describe and emits no warnings: plots that
    cannot be drawn are listed in the mechanism's ``notes`` and checks that cannot be
    evaluated have ``passed=None``.
    """
    device = Device() if device is None else device
    registered = catalogue.registered_mechanisms()
    mechanisms = registered if mechanisms is None else tuple(mechanisms)
    laws = hopping_laws(registered)
    # The fits are tiny: BLAS threads only add overhead (about 7x on 2 cores).
    with np.errstate(all="ignore"), threadpool_limits(limits=1):
        data = _prepare(series, n_biases)
        zabrodskii = zabrodskii_analysis(data, laws)
        shared = {
            "laws": laws,
            "zabrodskii": zabrodskii,
            "activation": _activation_energies(data),
            "transitions": transition_voltages(data),
            "low_bias_exponents": _low_bias_exponents(data),
            "log_log_slopes": _log_log_slopes(data),
        }
        results = tuple(_analyse_mechanism(m, data, device, shared) for m in mechanisms)
    order = sorted(range(len(results)), key=lambda k: (-results[k].score, k))
    return LinearisationResult(
        mechanisms=results,
        zabrodskii=zabrodskii,
        transition_voltages=tuple(shared["transitions"]),
        activation_energies=tuple(shared["activation"]),
        ranking=tuple(results[k].mechanism_id for k in order),
    )
