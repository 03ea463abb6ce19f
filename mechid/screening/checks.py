"""Consistency-check rules: one evaluator per declared check type (mechid.catalogue.checks)."""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from mechid.catalogue.base import FloatArray, Mechanism
from mechid.catalogue.checks import (
    CheckSpec,
    DielectricRange,
    DielectricVsOptical,
    FieldLoweringDielectric,
    HopEnergyExceedsKT,
    HoppingLaw,
    InterceptNotActivated,
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
    VoltageInsideSweep,
    ZeroFieldBarrier,
)
from mechid.constants import BOLTZMANN_EV
from mechid.device import Device
from mechid.formatting import unit_suffix
from mechid.screening.analyses import ZABRODSKII_P_TOL, law_supported
from mechid.screening.biases import PreparedSeries
from mechid.screening.lines import zero_bias_line
from mechid.screening.records import ActivationEnergy, Check, LineFit, TransitionVoltage, ZabrodskiiAnalysis


@dataclass(frozen=True)
class CheckContext:
    """Everything a check may read."""

    mechanism: Mechanism
    lines: Mapping[str, Sequence[LineFit]]
    device: Device
    data: PreparedSeries
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


def dielectric_range_check(spec: DielectricRange, ctx: CheckContext) -> Check:
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


def dielectric_optical_check(spec: DielectricVsOptical, ctx: CheckContext) -> Check:
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


def slope_times_temperature_check(spec: SlopeTimesTemperature, ctx: CheckContext) -> Check:
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


def zero_field_barrier_check(spec: ZeroFieldBarrier, ctx: CheckContext) -> Check:
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


def field_lowering_dielectric_check(spec: FieldLoweringDielectric, ctx: CheckContext) -> Check:
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


def richardson_constant_check(spec: RichardsonConstant, ctx: CheckContext) -> Check:
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


def thermally_activated_check(spec: ThermallyActivated, ctx: CheckContext) -> Check:
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


def temperature_independent_check(spec: NearlyTemperatureIndependent, ctx: CheckContext) -> Check:
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


def intercept_not_activated_check(spec: InterceptNotActivated, ctx: CheckContext) -> Check:
    """The per-temperature intercepts of ``spec.plot`` carry no activation energy (OLS)."""
    name = f"{spec.plot}_intercept_not_activated"
    expected = f"|apparent E_a of the intercepts| <= {1e3 * spec.max_activation_eV:g} meV"
    lines = ctx.lines.get(spec.plot, ())
    if len(lines) < 3:
        return _unknown(name, expected, "needs lines at >= 3 temperatures")
    inverse_t = np.array([1.0 / line.group_value for line in lines])
    slope = float(np.polyfit(inverse_t, [line.intercept for line in lines], 1)[0])
    energy = -slope * BOLTZMANN_EV
    return Check(name, abs(energy) <= spec.max_activation_eV, energy, expected,
                 f"intercepts give an apparent activation energy of {1e3 * energy:.3g} meV "
                 f"over {len(lines)} temperatures")


def voltage_inside_sweep_check(spec: VoltageInsideSweep, ctx: CheckContext) -> Check:
    """The median of a voltage read from ``spec.plot`` lies in (0, max_share x largest |V|]."""
    name = f"{spec.quantity}_inside_sweep"
    values = ctx.quantity(spec.plot, spec.quantity)
    top = float(np.nanmax(ctx.data.abs_voltage_V)) if ctx.data.abs_voltage_V.size else np.nan
    expected = f"0 < {spec.quantity} <= {spec.max_share:.2g} x largest |V| ({top:.3g} V)"
    if values.size == 0 or not np.isfinite(top):
        return _unknown(name, expected, f"no {spec.plot} line could be drawn")
    median = float(np.median(values))
    return Check(name, 0.0 < median <= spec.max_share * top, median, expected,
                 f"median {median:.3g} V over {values.size} lines")


def straight_plot_check(spec: StraightPlot, ctx: CheckContext) -> Check:
    """The plot is straight: median R^2 over its lines >= ``spec.minimum_r_squared`` [CP]."""
    name, expected = f"{spec.plot}_straight", f"median R^2 >= {spec.minimum_r_squared:g}"
    lines = ctx.lines.get(spec.plot, ())
    if not lines:
        return _unknown(name, expected, f"no {spec.plot} line could be drawn")
    r2 = float(np.median([line.r_squared for line in lines]))
    return Check(name, r2 >= spec.minimum_r_squared, r2, expected,
                 f"median R^2 = {r2:.6g} over {len(lines)} lines")


def quantity_range_check(spec: QuantityInRange, ctx: CheckContext) -> Check:
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


def tunnelling_regime_check(spec: TunnellingRegime, ctx: CheckContext) -> Check:
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


def positive_quantity_check(spec: PositiveQuantity, ctx: CheckContext) -> Check:
    """The median of an interpreted quantity is positive (``spec.reason`` says why it must be)."""
    key = spec.quantity
    name, expected = f"{key}_positive", f"{key} > 0"
    values = ctx.quantity(spec.plot, key)
    if values.size == 0:
        return _unknown(name, expected, f"no finite {key} from the {spec.plot}")
    value = float(np.median(values))
    return Check(name, value > 0, value, expected, f"median {key} = {value:.3g}; {spec.reason}")


def zabrodskii_law_check(spec: HoppingLaw, ctx: CheckContext) -> Check:
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
    return Check(name, law_supported(z.exponent_p, z.exponent_p_err, p_law, ctx.laws),
                 z.exponent_p, expected, z.detail)


def hop_energy_check(spec: HopEnergyExceedsKT, ctx: CheckContext) -> Check:
    """Variable-range self-consistency: hop energy W >= kT at the highest temperature [CP]."""
    name, expected = "hop_energy_exceeds_kT", "W/kT >= 1 at the highest temperature"
    t0 = ctx.quantity(spec.plot, "characteristic_temperature_K")
    if t0.size == 0:
        return _unknown(name, expected, f"no finite T0 from the {spec.plot}")
    t_max = float(ctx.data.temperatures.max())
    ratio = spec.hop_energy(float(np.median(t0)), t_max) / (BOLTZMANN_EV * t_max)
    return Check(name, ratio >= 1, ratio, expected,
                 f"W/kT = {ratio:.3g} at {t_max:g} K ({spec.source})")


def ohmic_check(spec: Ohmic, ctx: CheckContext) -> Check:
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


def declared_range_checks(ctx: CheckContext) -> list[Check]:
    """Every interpreted quantity named like a declared parameter lies in its declared range.

    Parameters whose range a declared check already tests (its ``tested_parameters``) are
    skipped. A parameter estimated from a plot with a declared regime
    (:class:`~mechid.catalogue.base.PlotRegime`) that drew no line because no point lay in
    that regime is reported as undetermined (``passed=None``), not as failing.
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
        expected = f"{parameter.lower:g} <= {parameter.name} <= {parameter.upper:g}"
        name = f"{parameter.name}_in_declared_range"
        if not present:
            outside = _outside_regime(ctx, parameter.name)
            if outside is not None:
                checks.append(_unknown(name, expected, outside))
            continue
        if values.size == 0:
            checks.append(Check(name, False, None, expected,
                                f"no finite {parameter.name} could be read"))
            continue
        value = float(np.median(values))
        passed = parameter.lower <= value <= parameter.upper
        checks.append(Check(name, passed, value, expected,
                            f"median {parameter.name} = {value:.4g}{unit_suffix(parameter.unit)}"))
    return checks


def _outside_regime(ctx: CheckContext, parameter: str) -> str | None:
    """Why ``parameter`` is undetermined, when its plot drew no line for want of regime points."""
    for estimate in ctx.mechanism.estimates:
        if not isinstance(estimate, PlotEstimate):
            continue
        plot = next(p for p in ctx.mechanism.plots if p.id == estimate.plot)
        if estimate.parameter == parameter and plot.regime is not None and not ctx.lines.get(plot.id):
            return (f"undetermined: no {plot.id} line, no point lies where the plot is straight "
                    f"({plot.regime.description})")
    return None


#: The rule that evaluates each declared check type (mechid.catalogue.checks).
CHECK_RULES: dict[type[CheckSpec], Callable[[Any, CheckContext], Check]] = {
    ThermallyActivated: thermally_activated_check,
    NearlyTemperatureIndependent: temperature_independent_check,
    TunnellingRegime: tunnelling_regime_check,
    PositiveQuantity: positive_quantity_check,
    StraightPlot: straight_plot_check,
    InterceptNotActivated: intercept_not_activated_check,
    VoltageInsideSweep: voltage_inside_sweep_check,
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


def evaluate_check(spec: CheckSpec, ctx: CheckContext) -> Check:
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
