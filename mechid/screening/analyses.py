"""Data-level analyses made once per series: activation energies, the Zabrodskii exponent,
transition voltages and log-log slopes."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence

import numpy as np

from mechid.catalogue.base import FloatArray, Mechanism
from mechid.catalogue.checks import (
    HoppingLaw,
)
from mechid.constants import BOLTZMANN_EV
from mechid.screening.biases import MIN_TEMPERATURES, PreparedSeries
from mechid.screening.lines import ols_slope
from mechid.screening.records import ActivationEnergy, TransitionVoltage, ZabrodskiiAnalysis

#: Tolerance on the Zabrodskii exponent: max(this, 2 standard errors); a law is supported
#: only when it is also the nearest of the laws. A prefactor G0 ~ T^m shifts w by m
#: (Zabrodskii & Zinov'eva 1984), which biases p by ~0.1 for low-field hopping.
ZABRODSKII_P_TOL = 0.2


def hopping_laws(mechanisms: Sequence[Mechanism]) -> dict[str, float]:
    """Exponent p of every declared hopping law, keyed by mechanism id (declaration order)."""
    return {m.id: spec.exponent for m in mechanisms for spec in m.checks
            if isinstance(spec, HoppingLaw)}


def law_supported(p: float, p_err: float | None, p_law: float,
                   laws: Mapping[str, float]) -> bool:
    candidates = np.array(sorted(set(laws.values()) | {p_law}))
    nearest = float(candidates[np.argmin(np.abs(candidates - p))])
    tolerance = max(ZABRODSKII_P_TOL, 2 * p_err) if p_err is not None else ZABRODSKII_P_TOL
    return nearest == p_law and abs(p - p_law) <= tolerance


def activation_energies(data: PreparedSeries) -> list[ActivationEnergy]:
    """Apparent E_a at each common bias from the OLS slope of ln I vs 1/T."""
    out = []
    if data.temperatures.size < 2:
        return out
    inverse_t = 1.0 / data.temperatures
    for bias, currents in zip(data.common_biases_V, data.common_current_A, strict=True):
        ok = np.isfinite(currents) & (currents > 0)
        if np.count_nonzero(ok) < 2:
            continue
        slope, _ = ols_slope(inverse_t[ok], np.log(currents[ok]))
        out.append(ActivationEnergy(float(bias), -slope * BOLTZMANN_EV,
                                    int(np.count_nonzero(ok))))
    return out


def zabrodskii_analysis(data: PreparedSeries, laws: Mapping[str, float]) -> ZabrodskiiAnalysis:
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
    minus_p, p_err = ols_slope(ln_t, np.log(w))
    p = -minus_p
    p_err_or_none = p_err if math.isfinite(p_err) else None
    if not laws:
        return failed("no mechanism declares a hopping law", bias, temps, w)
    nearest = min(laws, key=lambda law: abs(p - laws[law]))
    supported = nearest if law_supported(p, p_err_or_none, laws[nearest], laws) else None
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


def transition_voltages(data: PreparedSeries) -> list[TransitionVoltage]:
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


def low_bias_exponents(data: PreparedSeries) -> dict[float, float]:
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
        slope, _ = ols_slope(np.log(v[lowest]), np.log(data.folded_current_A[ok][lowest]))
        out[float(t)] = slope
    return out


def log_log_slopes(data: PreparedSeries) -> dict[float, float]:
    """OLS slope of ln I vs ln |V| over all positive points at each temperature."""
    out = {}
    for t in data.temperatures:
        ok = (data.temperature_K == t) & (data.folded_current_A > 0)
        if np.unique(data.abs_voltage_V[ok]).size < 3:
            continue
        slope, _ = ols_slope(np.log(data.abs_voltage_V[ok]), np.log(data.folded_current_A[ok]))
        out[float(t)] = slope
    return out
