"""Result records of the screening: lines, checks, data-level analyses, the whole result.

Frozen dataclasses and their plain-JSON ``to_dict`` forms (the ``linearisation`` block of
``docs/result-schema.md``).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from mechid.catalogue.base import ParameterHints
from mechid.screening.asymmetry import PolarityAsymmetry


def _json_float(value: float | None) -> float | None:
    """A finite float, or None for missing and non-finite values (JSON has no NaN)."""
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _json_floats(record: Any, names: tuple[str, ...]) -> dict[str, float | None]:
    """The named float attributes of a record in plain-JSON form."""
    return {name: _json_float(getattr(record, name)) for name in names}


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
        return curvature_index(self.r_squared)

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
class ConductanceAsymmetry:
    """The low-bias conductance parabola at one temperature and the asymmetry it implies.

    ``G(V) = g0 (1 + c1 V + c2 V^2)`` fitted to the numerical dI/dV of both polarities
    (Brinkman, Dynes & Rowell, J. Appl. Phys. 41, 1915 (1970); see
    :mod:`mechid.screening.conductance`). Values are None where ``determined`` is False
    (``detail`` says why) or, for the barriers, where the device thickness and mass are missing;
    ``*_err`` are standard errors from the parabola fit alone.
    """

    temperature_K: float
    determined: bool
    detail: str
    n_points: int = 0
    window_V: float | None = None
    zero_bias_conductance_S: float | None = None
    linear_coefficient_per_V: float | None = None
    quadratic_coefficient_per_V2: float | None = None
    minimum_bias_V: float | None = None
    minimum_bias_err_V: float | None = None
    relative_asymmetry: float | None = None
    relative_asymmetry_err: float | None = None
    mean_barrier_eV: float | None = None
    barrier_difference_eV: float | None = None
    barrier_difference_err_eV: float | None = None

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {
            "temperature_K": _json_float(self.temperature_K),
            "determined": bool(self.determined),
            "detail": self.detail,
            "n_points": int(self.n_points),
            **{name: _json_float(getattr(self, name)) for name in (
                "window_V", "zero_bias_conductance_S", "linear_coefficient_per_V",
                "quadratic_coefficient_per_V2", "minimum_bias_V", "minimum_bias_err_V",
                "relative_asymmetry", "relative_asymmetry_err", "mean_barrier_eV",
                "barrier_difference_eV", "barrier_difference_err_eV")},
        }


@dataclass(frozen=True)
class DiodeLine:
    """One straight line of the rectifying-contact analysis, or why it was not drawn.

    Parameters
    ----------
    determined : bool
        False when the data do not allow the line (too few points, a missing device value);
        then the numbers are NaN and ``detail`` says why.
    detail : str
        How the line was drawn (region, rule) or why it could not be.
    n_points : int
        Points on the line.
    slope, slope_err, intercept, intercept_err, r_squared : float
        The least-squares line and its standard errors (NaN when not determined).
    x_min, x_max : float
        Range of the plot's x over the points used.
    quantities : mapping
        What the line gives (keys with unit suffixes; ``<key>_err`` for standard errors).
    """

    determined: bool
    detail: str
    n_points: int = 0
    slope: float = math.nan
    slope_err: float = math.nan
    intercept: float = math.nan
    intercept_err: float = math.nan
    r_squared: float = math.nan
    x_min: float = math.nan
    x_max: float = math.nan
    quantities: Mapping[str, float] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form (non-finite numbers become None)."""
        return {
            "determined": self.determined, "detail": self.detail,
            "n_points": int(self.n_points),
            **_json_floats(self, ("slope", "slope_err", "intercept", "intercept_err",
                                  "r_squared", "x_min", "x_max")),
            "quantities": {k: _json_float(v) for k, v in self.quantities.items()},
        }


@dataclass(frozen=True)
class NordeMinimum:
    """The minimum of the Norde (1979) function as generalised by Bohlin (1986).

    ``determined`` False (with ``detail``) when F(V) has no minimum inside the measured range
    or a device value is missing; the numbers are then NaN.
    """

    determined: bool
    detail: str
    gamma: float = math.nan
    voltage_V: float = math.nan
    function_V: float = math.nan
    current_A: float = math.nan
    barrier_height_eV: float = math.nan
    series_resistance_ohm: float = math.nan

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {"determined": self.determined, "detail": self.detail,
                **_json_floats(self, ("gamma", "voltage_V", "function_V", "current_A",
                                      "barrier_height_eV", "series_resistance_ohm"))}


@dataclass(frozen=True)
class DiodeTemperature:
    """Rectifying-contact analysis of the forward branch at one temperature.

    ``semilog`` is the straight part of ln I vs V (ideality factor, saturation current,
    apparent barrier); ``cheung_derivative`` and ``cheung_h`` the two Cheung & Cheung (1986)
    lines; ``norde`` the minimum of the Norde function.
    """

    temperature_K: float
    semilog: DiodeLine
    cheung_derivative: DiodeLine
    cheung_h: DiodeLine
    norde: NordeMinimum

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        return {"temperature_K": _json_float(self.temperature_K),
                "semilog": self.semilog.to_dict(),
                "cheung_derivative": self.cheung_derivative.to_dict(),
                "cheung_h": self.cheung_h.to_dict(), "norde": self.norde.to_dict()}


@dataclass(frozen=True)
class DiodeAnalysis:
    """The straightened-plot analysis of a rectifying contact over temperature.

    Parameters
    ----------
    ran : bool
        Whether the data looked like a rectifying contact (the rule is in ``reason``).
    reason : str
        Why the analysis ran or not.
    forward_polarity : {"positive", "negative"} or None
        The bias polarity taken as forward (the one carrying the larger current).
    temperatures : tuple of DiodeTemperature
        One per temperature (empty when the analysis did not run).
    richardson, barrier_vs_inverse_2kt, ideality_vs_inverse_2kt, modified_richardson : DiodeLine
        The lines across temperatures (Richardson plot; Werner & Güttler's three plots).
    thermionic_field_ideality : DiodeLine
        n(T) against Padovani & Stratton's (E00/kT) coth(E00/kT), E00 fitted.
    """

    ran: bool
    reason: str
    forward_polarity: str | None = None
    temperatures: tuple[DiodeTemperature, ...] = ()
    richardson: DiodeLine | None = None
    barrier_vs_inverse_2kt: DiodeLine | None = None
    ideality_vs_inverse_2kt: DiodeLine | None = None
    modified_richardson: DiodeLine | None = None
    thermionic_field_ideality: DiodeLine | None = None

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form."""
        lines = ("richardson", "barrier_vs_inverse_2kt", "ideality_vs_inverse_2kt",
                 "modified_richardson", "thermionic_field_ideality")
        return {"ran": self.ran, "reason": self.reason,
                "forward_polarity": self.forward_polarity,
                "temperatures": [t.to_dict() for t in self.temperatures],
                **{key: (None if getattr(self, key) is None else getattr(self, key).to_dict())
                   for key in lines}}


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
    hints : ParameterHints
        Values of the declared parameters the plots determine (the mechanism's
        ``estimates``), keyed by parameter name: the fit's starting values. Not in the JSON.
    notes : tuple of str
        Plots that could not be drawn, with the reason.
    """

    mechanism_id: str
    family: str
    lines: tuple[LineFit, ...]
    summary: Mapping[str, float]
    checks: tuple[Check, ...]
    straightness: float | None
    score: float
    hints: ParameterHints
    notes: tuple[str, ...] = ()

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
    conductance_asymmetry : tuple of ConductanceAsymmetry
        The BDR conductance test, one per temperature.
    diode : DiodeAnalysis or None
        The rectifying-contact analysis (:mod:`mechid.screening.diode`).
    polarity_asymmetry : PolarityAsymmetry or None
        Do the two bias polarities carry the same current
        (:func:`mechid.screening.asymmetry.polarity_asymmetry`).
    """

    mechanisms: tuple[MechanismLinearisation, ...]
    zabrodskii: ZabrodskiiAnalysis
    transition_voltages: tuple[TransitionVoltage, ...]
    activation_energies: tuple[ActivationEnergy, ...]
    ranking: tuple[str, ...]
    conductance_asymmetry: tuple[ConductanceAsymmetry, ...] = ()
    diode: DiodeAnalysis | None = None
    polarity_asymmetry: PolarityAsymmetry | None = None

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
            "conductance_asymmetry": [c.to_dict() for c in self.conductance_asymmetry],
            "ranking": list(self.ranking),
            "best": self.best,
            "diode": None if self.diode is None else self.diode.to_dict(),
            "polarity_asymmetry": (None if self.polarity_asymmetry is None
                                   else self.polarity_asymmetry.to_dict()),
        }


def curvature_index(r_squared: float) -> float:
    """-log10(1 - R^2) clipped to [0, 12] (decimals of straightness); 0 when not finite."""
    if not math.isfinite(r_squared):
        return 0.0
    return float(np.clip(-math.log10(max(1.0 - r_squared, 1e-12)), 0.0, 12.0))
