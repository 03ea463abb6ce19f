"""The straightened plots of a rectifying (Schottky) contact, drawn before any fit.

What practitioners do by hand with forward I-V curves at several temperatures, on the
thermionic-emission diode law (Sze & Ng 2007, metal-semiconductor chapter; Rhoderick &
Williams, *Metal-Semiconductor Contacts*, 2nd ed., Oxford 1988)::

    I = I_s [exp(e(V - I R_s)/(n k T)) - 1] + (V - I R_s)/R_sh,   I_s = A A** T^2 exp(-e phi_B/kT)

1. Per temperature, the straight part of ln I vs V: slope e/(n k T) gives the ideality factor
   n(T), the intercept ln I_s(T), and with the area A and the Richardson constant A** the
   apparent barrier phi_ap(T) = (kT/e) ln(A A** T^2 / I_s).
2. The Richardson plot ln(I_s/T^2) vs 1/T: slope -e phi_B/k, intercept ln(A A**).
3. Werner & Güttler, J. Appl. Phys. 69, 1522 (1991), a Gaussian distribution of barriers
   (mean phibar, standard deviation sigma in V): phi_ap = phibar - e sigma^2/(2kT), so
   phi_ap vs 1/(2kT) has slope -sigma^2 and intercept phibar; 1/n - 1 = -rho2 + e rho3/(2kT);
   and the modified Richardson plot ln(I_s/T^2) - e^2 sigma^2/(2 k^2 T^2) vs 1/T has slope
   -e phibar/k and intercept ln(A A**).
4. Cheung & Cheung, Appl. Phys. Lett. 49, 85 (1986): dV/d(ln I) = I R_s + n kT/e and
   H(I) = V - (n kT/e) ln(I/(A A** T^2)) = I R_s + n phi_B, both straight in I.
5. Norde, J. Appl. Phys. 50, 5052 (1979), generalised to n > 1 by Bohlin, J. Appl. Phys. 60,
   1223 (1986): F(V) = V/gamma - (kT/e) ln(I/(A A** T^2)) with an integer gamma > n; at its
   minimum (V0, F0, I0), phi_B = F0 + ((gamma - n)/n)(V0/gamma - kT/e) and
   R_s = (gamma - n) kT/(e I0).
6. Thermionic-field emission, Padovani & Stratton, Solid-State Electron. 9, 695 (1966): with
   heavy doping electrons tunnel through the top of the barrier and the forward slope is
   e/E0 with E0 = E00 coth(E00/kT), so n(T) = (E00/kT) coth(E00/kT), and
   E00 = (e hbar/2) sqrt(N_D/(m* eps_s)). E00 fitted to n(T) is compared with the E00 the
   device's doping implies (:func:`thermionic_field_ideality`). This is a signature, not a
   fit of the thermionic-field current (whose saturation-current prefactor is not checked here).

What was checked, and how: Norde's F(V) = V/2 - (kT/q) ln(I/(A A** T^2)) against the
abstract of Norde (1979); the authors, title and reference of Werner & Güttler (1991, doi
10.1063/1.347243) against its bibliographic record, and their phi_ap = phibar - q sigma^2/(2kT)
and the (1/n - 1) vs 1/T line with the voltage coefficients rho2, rho3 against a later paper
quoting them; Cheung & Cheung's two functions and Bohlin's generalisation are from memory
(and the shared reference notes), and are derived from the diode law in the functions' notes
(the tests check them numerically). Equation numbers of all four papers: from memory, not
quoted.

Every quantity is "not determined", with the reason, when the data do not allow it: fewer
than :data:`MIN_LINE_POINTS` points on a line (a semilog line on a coarse bias grid may hold
one :func:`local_window` of three), fewer than :data:`MIN_TEMPERATURES` temperatures across
temperature, a missing device value (area, A**), no minimum of F(V) inside the measured
range. No number comes from a line through two points.

:func:`start_values` reads the analysis into the fit's starting values (the catalogue's
:class:`~mechid.catalogue.checks.DiodeEstimate` declarations name them); without them the
quick mode search of the inhomogeneous diode ended thousands of nats below the truth on a
simulated 80-320 K series.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np
from numpy.lib.stride_tricks import sliding_window_view
from scipy import optimize

from mechid.catalogue.base import FloatArray
from mechid.catalogue.thermionic_field import (
    THERMIONIC_FIELD_DIODE,
    characteristic_tunnelling_energy_eV,
    doping_for_tunnelling_energy_per_cm3,
    reduced_fermi_level,
    thermionic_field_current_density_A_per_cm2,
)
from mechid.constants import BOLTZMANN_EV
from mechid.device import Device
from mechid.screening.biases import MIN_TEMPERATURES, PreparedSeries
from mechid.screening.lines import robust_line
from mechid.screening.records import DiodeAnalysis, DiodeLine, DiodeTemperature, NordeMinimum

#: Fewest points on any straight line of the analysis.
MIN_LINE_POINTS = 5
#: Lower end of the semilog fit, in thermal voltages: V > 3kT/e makes the -1 of the diode law
#: (and the reverse term exp(-eV/kT) of the thermionic-emission form) a few per cent at most
#: (common practice, Rhoderick & Williams 1988).
THERMAL_VOLTAGES_ABOVE = 3.0
#: Points in the sliding window of the local ideality factor (e/kT) dV/d ln I...
LOCAL_WINDOW = 5
#: ...unless the bias steps are coarse: a window spans at most this many kT/e (at n = 1 about
#: 2.6 decades of current), and at least 3 points. On a 0.1 V grid at 80 K five points span
#: 58 kT/e, from the shunt through the exponential to the series-resistance bend, and their
#: slope is none of them (our threshold; seen on a simulated 80-320 K diode whose semilog n
#: read 1.7-3.7 against a true 1.1-1.24).
WINDOW_SPAN_KT = 6.0
#: Fewest points of a local window (a slope and its standard error need one degree of freedom).
MIN_WINDOW = 3
#: A window whose local ideality factor has a larger relative standard error than this is
#: curved, not noisy (1 % noise over a window spanning a decade gives ~1 %), and does not
#: extend the straight region however close its value (our threshold).
WINDOW_RELATIVE_ERROR = 0.1
#: The straight part of ln I vs V: the contiguous run of windows whose local ideality factor
#: is within this fraction of its lowest value, two standard errors allowed on each (see
#: :func:`straight_region`). Above it, the series resistance bends the curve (I R_s adds
#: I R_s e/kT to the local ideality); below, a shunt does. Our threshold.
STRAIGHT_TOLERANCE = 0.05
#: Fewest decades of current on a semilog line for its n and I_s to count (our threshold:
#: over less than a decade the slope is ill-determined next to the curvature at both ends).
MIN_LINE_DECADES = 1.5
#: The data look like a rectifying contact when at least one temperature has a straight
#: forward ln I vs V region of at least this many decades of current (our threshold)...
RECTIFYING_DECADES = 3.0
#: ...over at least this many points (two degrees of freedom for its straightness: on a
#: bias grid fine enough for five-point windows three decades hold many more points; on a
#: 0.1 V grid they may hold four)...
MIN_RECTIFYING_POINTS = 4
#: ...with an ideality factor in this range: thermionic emission gives n >= 1 (0.95 allows
#: for noise); n well above 2 points to tunnelling or leakage (common practice).
IDEALITY_RANGE = (0.95, 3.0)


def thermal_voltage_V(temperature_K: float | FloatArray) -> float | FloatArray:
    """kT/e in V (scipy.constants, CODATA)."""
    return BOLTZMANN_EV * temperature_K


@dataclass(frozen=True)
class ForwardBranch:
    """Forward-bias points of one temperature: |V| ascending and unique, current > 0."""

    temperature_K: float
    voltage_V: FloatArray
    current_A: FloatArray


def forward_polarity(data: PreparedSeries) -> str | None:
    """"positive" or "negative": the polarity carrying the larger current; None if neither."""
    best, polarity = 0.0, None
    for sign, name in ((1.0, "positive"), (-1.0, "negative")):
        on = (np.sign(data.voltage_V) == sign) & (data.folded_current_A > 0)
        peak = float(data.folded_current_A[on].max()) if on.any() else 0.0
        if peak > best:
            best, polarity = peak, name
    return polarity


def forward_branches(data: PreparedSeries, polarity: str) -> list[ForwardBranch]:
    """The forward branch at every temperature (repeated |V| averaged)."""
    sign = 1.0 if polarity == "positive" else -1.0
    branches = []
    for t in data.temperatures:
        on = ((data.temperature_K == t) & (np.sign(data.voltage_V) == sign)
              & (data.folded_current_A > 0))
        voltage, inverse = np.unique(data.abs_voltage_V[on], return_inverse=True)
        current = (np.bincount(inverse, weights=data.folded_current_A[on], minlength=voltage.size)
                   / np.bincount(inverse, minlength=voltage.size))
        branches.append(ForwardBranch(float(t), voltage, current))
    return branches


def local_window(voltage_V: FloatArray, temperature_K: float) -> int:
    """Points per local window: :data:`LOCAL_WINDOW`, fewer where the median bias step is so
    coarse that they would span more than :data:`WINDOW_SPAN_KT` kT/e, never fewer than
    :data:`MIN_WINDOW`."""
    if voltage_V.size < 2:
        return LOCAL_WINDOW
    step = float(np.median(np.diff(voltage_V)))
    span = WINDOW_SPAN_KT * thermal_voltage_V(temperature_K)
    fitting = 1 + int(span // step) if step > 0 else LOCAL_WINDOW
    return int(np.clip(fitting, MIN_WINDOW, LOCAL_WINDOW))


def local_ideality(voltage_V: FloatArray, current_A: FloatArray,
                   temperature_K: float) -> tuple[FloatArray, FloatArray]:
    """Local ideality factor (e/kT) / (d ln I/dV) and its standard error, per window.

    Least-squares slopes of ln I vs V over ``w`` = :func:`local_window` consecutive points;
    element i belongs to points i .. i + w - 1. The standard error is n se(slope)/slope with
    the usual se(slope) = s/sqrt(S_xx). Infinite where the slope is not positive; empty
    arrays when there are fewer points than a window.
    """
    window = local_window(voltage_V, temperature_K)
    if voltage_V.size < window:
        return np.empty(0), np.empty(0)
    x = sliding_window_view(voltage_V, window)
    y = sliding_window_view(np.log(current_A), window)
    xc = x - x.mean(axis=1, keepdims=True)
    yc = y - y.mean(axis=1, keepdims=True)
    s_xx = np.sum(xc**2, axis=1)
    slope = np.sum(xc * yc, axis=1) / s_xx
    residual = yc - slope[:, None] * xc
    slope_err = np.sqrt(np.sum(residual**2, axis=1) / (window - 2) / s_xx)
    with np.errstate(divide="ignore", invalid="ignore"):
        ideality = np.where(slope > 0, 1.0 / (thermal_voltage_V(temperature_K) * slope), np.inf)
        error = np.where(slope > 0, ideality * slope_err / slope, np.inf)
    return ideality, error


def _first_above_thermal(branch: ForwardBranch) -> int:
    """Index of the first forward point above :data:`THERMAL_VOLTAGES_ABOVE` kT/e."""
    lower = THERMAL_VOLTAGES_ABOVE * thermal_voltage_V(branch.temperature_K)
    return int(np.searchsorted(branch.voltage_V, lower, side="right"))


def straight_region(branch: ForwardBranch) -> tuple[int, int] | str:
    """Index range [first, last] of the straight forward ln I vs V region, or why there is none.

    Rule (stated in the module constants): only V > 3kT/e; n_ref is the lowest upper bound
    n_local + 2 se(n_local) over the windows (so one noisy window cannot set it); the region is
    the contiguous run of windows around that one whose n_local - 2 se(n_local) stays within
    :data:`STRAIGHT_TOLERANCE` of n_ref and whose relative standard error is at most
    :data:`WINDOW_RELATIVE_ERROR`. On noiseless data this is "local ideality within 5 % of
    its lowest value"; noise widens it by two standard errors.
    """
    v, t = branch.voltage_V, branch.temperature_K
    lower = THERMAL_VOLTAGES_ABOVE * thermal_voltage_V(t)
    start = _first_above_thermal(branch)
    window = local_window(v[start:], t)
    local, error = local_ideality(v[start:], branch.current_A[start:], t)
    upper = local + 2.0 * error
    if local.size == 0 or not np.isfinite(upper).any():
        return (f"fewer than {window} forward points above 3kT/e = {lower:.3g} V with "
                "a rising current")
    best = int(np.argmin(upper))
    with np.errstate(invalid="ignore"):  # inf - inf where a window's slope is not positive
        ok = (np.isfinite(local) & (error <= WINDOW_RELATIVE_ERROR * local)
              & (local - 2.0 * error <= (1.0 + STRAIGHT_TOLERANCE) * upper[best]))
    first = best
    while first > 0 and ok[first - 1]:
        first -= 1
    last = best
    while last < ok.size - 1 and ok[last + 1]:
        last += 1
    return start + first, start + last + window - 1


@dataclass(frozen=True)
class _Line:
    slope: float
    slope_err: float
    intercept: float
    intercept_err: float
    r_squared: float


def least_squares_line(x: FloatArray, y: FloatArray) -> _Line:
    """Ordinary least squares y = a + b x with the usual standard errors (n >= 3).

    s^2 = SS_res/(n - 2), se(b) = s/sqrt(S_xx), se(a) = s sqrt(1/n + xbar^2/S_xx).
    """
    n = x.size
    x_mean, y_mean = float(x.mean()), float(y.mean())
    s_xx = float(np.sum((x - x_mean) ** 2))
    slope = float(np.sum((x - x_mean) * (y - y_mean)) / s_xx)
    intercept = y_mean - slope * x_mean
    residual = y - intercept - slope * x
    ss_res, ss_tot = float(np.sum(residual**2)), float(np.sum((y - y_mean) ** 2))
    s2 = ss_res / (n - 2)
    return _Line(slope, math.sqrt(s2 / s_xx), intercept,
                 math.sqrt(s2 * (1.0 / n + x_mean**2 / s_xx)),
                 1.0 - ss_res / ss_tot if ss_tot > 0 else 1.0)


def _drawn(x: FloatArray, y: FloatArray, detail: str, quantities: dict[str, float],
           robust: bool = False) -> tuple[DiodeLine, _Line]:
    """The line through (x, y) as a record: least squares, or the screening's Huber line
    (:func:`mechid.screening.lines.robust_line`) where single points may be far off."""
    line = (robust_line(x, y) if robust else None) or least_squares_line(x, y)
    record = DiodeLine(True, detail, int(x.size), line.slope, line.slope_err, line.intercept,
                       line.intercept_err, line.r_squared, float(x.min()), float(x.max()),
                       quantities)
    return record, line


def area_richardson_A_K2(device: Device) -> float | str:
    """A A** in A K^-2 from the device, or the names of the missing values."""
    missing = [name for name, value in (("area_cm2", device.area_cm2),
                                        ("richardson_constant_A_cm2_K2",
                                         device.richardson_constant_A_cm2_K2))
               if value is None]
    if missing:
        return " and ".join(missing) + " not given"
    return device.area_cm2 * device.richardson_constant_A_cm2_K2.value


def apparent_barrier_eV(saturation_current_A: float | FloatArray, temperature_K: float | FloatArray,
                        area_richardson: float) -> float | FloatArray:
    """phi_ap = (kT/e) ln(A A** T^2 / I_s) in eV (thermionic emission; Sze & Ng 2007)."""
    return thermal_voltage_V(temperature_K) * np.log(
        area_richardson * temperature_K**2 / saturation_current_A)


# --------------------------------------------------------------------------------------------
# One temperature
# --------------------------------------------------------------------------------------------


def semilog_line(branch: ForwardBranch, device: Device) -> DiodeLine:
    """The straight part of ln I vs V: ideality factor, saturation current, apparent barrier.

    ln I = ln I_s + e V/(n k T) where V > 3kT/e and I R_s << n kT/e (Sze & Ng 2007), so
    n = e/(kT slope) and I_s = exp(intercept); standard errors from the line,
    se(n) = n se(slope)/slope, se(phi_ap) = (kT/e) se(intercept) (the uncertainty of A** is
    not included). Quantities: ``ideality_factor``, ``saturation_current_A``,
    ``ln_saturation_current_err``, ``current_decades`` and, with area and A**,
    ``apparent_barrier_eV``.
    """
    region = straight_region(branch)
    if isinstance(region, str):
        return DiodeLine(False, f"not determined: {region}")
    first, last = region
    v = branch.voltage_V[first:last + 1]
    ln_i = np.log(branch.current_A[first:last + 1])
    rule = (f"straight for V = {v[0]:.3g}-{v[-1]:.3g} V (V > 3kT/e; local ideality factor "
            f"within {STRAIGHT_TOLERANCE:.0%} of its lowest value, two standard errors allowed: "
            "below the series-resistance bend)")
    # A coarse grid's straight part may hold one window only (:func:`local_window`).
    above = branch.voltage_V[_first_above_thermal(branch):]  # the grid straight_region read
    if v.size < min(MIN_LINE_POINTS, local_window(above, branch.temperature_K)):
        return DiodeLine(False, f"not determined: only {v.size} points {rule}", int(v.size))
    decades = float((ln_i[-1] - ln_i[0]) / math.log(10.0))
    if decades < MIN_LINE_DECADES:
        return DiodeLine(False, f"not determined: only {decades:.2g} decades of current {rule}",
                         int(v.size))
    vt = thermal_voltage_V(branch.temperature_K)
    product = area_richardson_A_K2(device)
    detail = f"ln I vs V {rule}"
    if isinstance(product, str):
        detail += f"; apparent barrier not determined: {product}"
    record, line = _drawn(v, ln_i, detail, {})
    ideality = 1.0 / (vt * line.slope)
    quantities = {
        "ideality_factor": ideality,
        "ideality_factor_err": ideality * line.slope_err / line.slope,
        "saturation_current_A": math.exp(line.intercept),
        "ln_saturation_current_err": line.intercept_err,
        "current_decades": decades,
    }
    if not isinstance(product, str):
        quantities["apparent_barrier_eV"] = float(
            apparent_barrier_eV(quantities["saturation_current_A"], branch.temperature_K, product))
        quantities["apparent_barrier_eV_err"] = vt * line.intercept_err
    return replace(record, quantities=quantities)


def rising_points(branch: ForwardBranch, from_voltage_V: float) -> tuple[FloatArray, FloatArray]:
    """Forward points at V >= from_voltage_V whose current exceeds every earlier one."""
    on = branch.voltage_V >= from_voltage_V
    v, i = branch.voltage_V[on], branch.current_A[on]
    if v.size == 0:
        return v, i
    previous_max = np.concatenate([[-np.inf], np.maximum.accumulate(i)[:-1]])
    keep = i > previous_max
    return v[keep], i[keep]


def cheung_derivative_points(v: FloatArray, i: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Currents and dV/d(ln I) from least-squares slopes of V vs ln I over sliding windows.

    Each window of :data:`LOCAL_WINDOW` consecutive points gives one slope, placed at the
    window's middle current (a local line, not a two-point difference: near the top of the
    curve ln I changes little from point to point and a difference amplifies the noise).
    """
    if v.size < LOCAL_WINDOW:
        return np.empty(0), np.empty(0)
    x = sliding_window_view(np.log(i), LOCAL_WINDOW)
    y = sliding_window_view(v, LOCAL_WINDOW)
    xc = x - x.mean(axis=1, keepdims=True)
    slope = np.sum(xc * (y - y.mean(axis=1, keepdims=True)), axis=1) / np.sum(xc**2, axis=1)
    return i[LOCAL_WINDOW // 2: i.size - LOCAL_WINDOW // 2], slope


def cheung_h_function(v: FloatArray, i: FloatArray, temperature_K: float, ideality: float,
                      area_richardson: float) -> FloatArray:
    """H(I) = V - (n kT/e) ln(I/(A A** T^2)) in V (Cheung & Cheung 1986)."""
    return v - ideality * thermal_voltage_V(temperature_K) * np.log(
        i / (area_richardson * temperature_K**2))


def cheung_lines(branch: ForwardBranch, semilog: DiodeLine,
                 device: Device) -> tuple[DiodeLine, DiodeLine]:
    """The two Cheung & Cheung (1986) lines at one temperature.

    With V - I R_s in the forward diode law (V > 3kT/e, shunt negligible),
    V = I R_s + n (kT/e) ln(I/I_s), so dV/d(ln I) = I R_s + n kT/e: straight in I with slope
    R_s and intercept n kT/e; and H(I) = V - (n kT/e) ln(I/(A A** T^2)) = I R_s + n phi_B
    (substituting I_s = A A** T^2 exp(-e phi_B/kT)): slope R_s, intercept n phi_B, with n from
    the first line. Points: every forward point from the lower end of the semilog region up.
    """
    if not semilog.determined:
        reason = "not determined: no straight ln I vs V region to start from"
        return DiodeLine(False, reason), DiodeLine(False, reason)
    v, i = rising_points(branch, semilog.x_min)
    if v.size < MIN_LINE_POINTS:
        reason = f"not determined: only {v.size} forward points from {semilog.x_min:.3g} V up"
        return DiodeLine(False, reason), DiodeLine(False, reason)
    vt = thermal_voltage_V(branch.temperature_K)
    centre, slope = cheung_derivative_points(v, i)
    if centre.size < MIN_LINE_POINTS:
        reason = f"not determined: only {centre.size} windows of {LOCAL_WINDOW} points"
        return DiodeLine(False, reason), DiodeLine(False, reason)
    derivative, line = _drawn(centre, slope, f"dV/d(ln I) vs I over {v[0]:.3g}-{v[-1]:.3g} V "
                              "(robust line)", {}, robust=True)
    ideality = line.intercept / vt
    derivative = replace(derivative, quantities={
        "series_resistance_ohm": line.slope, "series_resistance_ohm_err": line.slope_err,
        "ideality_factor": ideality, "ideality_factor_err": line.intercept_err / vt})
    product = area_richardson_A_K2(device)
    if isinstance(product, str):
        return derivative, DiodeLine(False, f"not determined: {product}")
    if not ideality > 0:
        return derivative, DiodeLine(False, "not determined: the first Cheung line gives n <= 0")
    h_values = cheung_h_function(v, i, branch.temperature_K, ideality, product)
    h_line, fit = _drawn(i, h_values, f"H(I) vs I with n = {ideality:.3g} from dV/d(ln I) "
                         "(robust line)", {}, robust=True)
    h_line = replace(h_line, quantities={
        "series_resistance_ohm": fit.slope, "series_resistance_ohm_err": fit.slope_err,
        "barrier_height_eV": fit.intercept / ideality,
        "barrier_height_eV_err": fit.intercept_err / ideality})
    return derivative, h_line


def norde_gamma(ideality: float) -> int:
    """The smallest integer gamma > n, at least Norde's 2 (Bohlin 1986 asks gamma > n)."""
    return max(2, math.floor(ideality) + 1)


def norde_function_V(v: FloatArray, i: FloatArray, temperature_K: float, gamma: float,
                     area_richardson: float) -> FloatArray:
    """F(V) = V/gamma - (kT/e) ln(I/(A A** T^2)) in V (Norde 1979 with gamma = 2; Bohlin 1986)."""
    return v / gamma - thermal_voltage_V(temperature_K) * np.log(
        i / (area_richardson * temperature_K**2))


def norde_minimum(branch: ForwardBranch, ideality: float, device: Device) -> NordeMinimum:
    """Barrier height and series resistance from the minimum of the Norde function.

    Notes
    -----
    With V = I R_s + n (kT/e) ln(I/I_s) and I_s = A A** T^2 exp(-e phi_B/kT),
    F = V/gamma + phi_B - (V - I R_s)/n. dI/dV = I/(n kT/e + I R_s), so dF/dV = 0 where
    n kT/e + I0 R_s = gamma kT/e: I0 = (gamma - n) kT/(e R_s) (needs gamma > n). Then
    phi_B = F0 - V0/gamma + (V0 - I0 R_s)/n = F0 + ((gamma - n)/n)(V0/gamma - kT/e), Bohlin's
    result; for n = 1, gamma = 2 it is Norde's phi_B = F0 + V0/2 - kT/e. The minimum is the
    vertex of a parabola through the five points around the lowest F; n is the semilog one.
    """
    product = area_richardson_A_K2(device)
    if isinstance(product, str):
        return NordeMinimum(False, f"not determined: {product}")
    if not (math.isfinite(ideality) and ideality > 0):
        return NordeMinimum(False, "not determined: no ideality factor from ln I vs V")
    t = branch.temperature_K
    vt = thermal_voltage_V(t)
    v, i = rising_points(branch, THERMAL_VOLTAGES_ABOVE * vt)
    gamma = norde_gamma(ideality)
    if v.size < MIN_LINE_POINTS:
        return NordeMinimum(False, f"not determined: only {v.size} forward points above 3kT/e",
                            gamma=gamma)
    f = norde_function_V(v, i, t, gamma, product)
    k = int(np.argmin(f))
    if k < 2 or k > v.size - 3:
        return NordeMinimum(False, "not determined: F(V) has no minimum inside the measured "
                            "range (the series resistance does not bend the curve enough "
                            "within it)", gamma=gamma)
    around = slice(k - 2, k + 3)
    centre = v[k]
    c2, c1, c0 = np.polyfit(v[around] - centre, f[around], 2)
    if not c2 > 0:
        return NordeMinimum(False, "not determined: F(V) is not convex at its lowest point",
                            gamma=gamma)
    offset = -c1 / (2 * c2)
    v0 = float(np.clip(centre + offset, v[k - 1], v[k + 1]))
    f0 = float(np.polyval([c2, c1, c0], v0 - centre))
    i0 = float(np.exp(np.interp(v0, v, np.log(i))))
    return NordeMinimum(
        True, f"minimum of F(V) with gamma = {gamma} (n = {ideality:.3g}) at V0 = {v0:.3g} V",
        gamma=float(gamma), voltage_V=v0, function_V=f0, current_A=i0,
        barrier_height_eV=f0 + (gamma - ideality) / ideality * (v0 / gamma - vt),
        series_resistance_ohm=(gamma - ideality) * vt / i0)


def analyse_temperature(branch: ForwardBranch, device: Device) -> DiodeTemperature:
    """Semilog line, Cheung lines and Norde minimum of one forward branch."""
    semilog = semilog_line(branch, device)
    derivative, h_line = cheung_lines(branch, semilog, device)
    ideality = semilog.quantities.get("ideality_factor", math.nan)
    return DiodeTemperature(branch.temperature_K, semilog, derivative, h_line,
                            norde_minimum(branch, ideality, device))


# --------------------------------------------------------------------------------------------
# Across temperatures
# --------------------------------------------------------------------------------------------


def _semilog_table(records: Sequence[DiodeTemperature], key: str) -> tuple[FloatArray, FloatArray]:
    rows = [(r.temperature_K, r.semilog.quantities[key]) for r in records
            if r.semilog.determined and key in r.semilog.quantities]
    table = np.array(rows, dtype=float).reshape(-1, 2)
    return table[:, 0], table[:, 1]


def _too_few(n: int, what: str) -> DiodeLine | None:
    if n < MIN_TEMPERATURES:
        return DiodeLine(False, f"not determined: {what} at {n} temperature(s), "
                                f"{MIN_TEMPERATURES} needed", n)
    return None


def _richardson_constant(intercept: float, intercept_err: float,
                         device: Device) -> dict[str, float]:
    """A** = exp(intercept)/A when the area is known, else the product A A**."""
    product = math.exp(intercept)
    if device.area_cm2 is None:
        return {"area_times_richardson_A_K2": product,
                "area_times_richardson_A_K2_err": product * intercept_err}
    constant = product / device.area_cm2
    return {"richardson_constant_A_cm2_K2": constant,
            "richardson_constant_A_cm2_K2_err": constant * intercept_err}


def richardson_line(records: Sequence[DiodeTemperature], device: Device) -> DiodeLine:
    """ln(I_s/T^2) vs 1/T: slope -e phi_B/k, intercept ln(A A**) (Sze & Ng 2007)."""
    t, current = _semilog_table(records, "saturation_current_A")
    few = _too_few(t.size, "a saturation current")
    if few is not None:
        return few
    record, line = _drawn(1.0 / t, np.log(current / t**2),
                          "ln(I_s/T^2) vs 1/T over the temperatures with a semilog line", {})
    return replace(record, quantities={
        "barrier_height_eV": -line.slope * BOLTZMANN_EV,
        "barrier_height_eV_err": line.slope_err * BOLTZMANN_EV,
        **_richardson_constant(line.intercept, line.intercept_err, device)})


def inverse_2kt_per_eV(temperature_K: FloatArray) -> FloatArray:
    """1/(2kT) in eV^-1."""
    return 1.0 / (2.0 * BOLTZMANN_EV * temperature_K)


def barrier_vs_inverse_2kt(records: Sequence[DiodeTemperature], device: Device) -> DiodeLine:
    """Werner & Güttler (1991): phi_ap = phibar - e sigma^2/(2kT), straight in 1/(2kT).

    With phi_ap in eV and x = 1/(2kT) in eV^-1 the slope is -(e sigma)^2 in eV^2, so
    sigma = sqrt(-slope) in V (se: se(slope)/(2 sigma)); the intercept is phibar. A slope
    >= 0 shows no Gaussian spread: sigma is then not determined.

    Resolution (``benchmarks/diode_analysis_accuracy.py``): on simulated homogeneous diodes
    (n = 1.05, R_s = 20 ohm, R_sh = 1e9 ohm) the few-meV bias of the semilog lines alone gives
    sigma up to 0.025 V, so spreads below about 0.03 V are not resolved by this plot; a
    simulated sigma = 0.1 V is recovered within 1 %.
    """
    t, barrier = _semilog_table(records, "apparent_barrier_eV")
    if t.size == 0 and isinstance(area_richardson_A_K2(device), str):
        return DiodeLine(False, f"not determined: {area_richardson_A_K2(device)}")
    few = _too_few(t.size, "an apparent barrier")
    if few is not None:
        return few
    record, line = _drawn(inverse_2kt_per_eV(t), barrier, "phi_ap vs 1/(2kT)", {})
    quantities = {"mean_barrier_eV": line.intercept, "mean_barrier_eV_err": line.intercept_err}
    detail = record.detail
    if line.slope < 0:
        sigma = math.sqrt(-line.slope)
        quantities |= {"barrier_spread_V": sigma, "barrier_spread_V_err": line.slope_err / (2 * sigma)}
    else:
        detail += "; barrier spread not determined: phi_ap does not fall with 1/(2kT)"
    return replace(record, detail=detail, quantities=quantities)


def ideality_vs_inverse_2kt(records: Sequence[DiodeTemperature]) -> DiodeLine:
    """Werner & Güttler (1991): 1/n - 1 = -rho2 + e rho3/(2kT): slope rho3 (V), intercept -rho2."""
    t, ideality = _semilog_table(records, "ideality_factor")
    few = _too_few(t.size, "an ideality factor")
    if few is not None:
        return few
    record, line = _drawn(inverse_2kt_per_eV(t), 1.0 / ideality - 1.0, "1/n - 1 vs 1/(2kT)", {})
    return replace(record, quantities={
        "rho2": -line.intercept, "rho2_err": line.intercept_err,
        "rho3_V": line.slope, "rho3_V_err": line.slope_err})


def modified_richardson_line(records: Sequence[DiodeTemperature], spread: DiodeLine,
                             device: Device) -> DiodeLine:
    """Werner & Güttler (1991): ln(I_s/T^2) - e^2 sigma^2/(2 k^2 T^2) vs 1/T.

    Slope -e phibar/k, intercept ln(A A**), with sigma from the phi_ap vs 1/(2kT) line.
    """
    sigma = spread.quantities.get("barrier_spread_V")
    if sigma is None:
        return DiodeLine(False, "not determined: no barrier spread sigma from phi_ap vs 1/(2kT)")
    t, current = _semilog_table(records, "saturation_current_A")
    few = _too_few(t.size, "a saturation current")
    if few is not None:
        return few
    y = np.log(current / t**2) - 0.5 * (sigma / thermal_voltage_V(t)) ** 2
    record, line = _drawn(1.0 / t, y, f"with sigma = {sigma:.3g} V", {})
    return replace(record, quantities={
        "mean_barrier_eV": -line.slope * BOLTZMANN_EV,
        "mean_barrier_eV_err": line.slope_err * BOLTZMANN_EV,
        **_richardson_constant(line.intercept, line.intercept_err, device)})


def ideality_thermionic_field(characteristic_energy_eV: float | FloatArray,
                              temperature_K: float | FloatArray) -> float | FloatArray:
    """n = (E00/kT) coth(E00/kT) (Padovani & Stratton 1966); 1 as E00/kT -> 0."""
    x = np.asarray(characteristic_energy_eV / (BOLTZMANN_EV * np.asarray(temperature_K)))
    small = np.abs(x) < 1e-4
    safe = np.where(small, 1.0, x)
    return np.where(small, 1.0 + x**2 / 3.0, safe / np.tanh(safe))


def characteristic_energy_from_doping_eV(doping_cm3: float, dielectric_constant: float,
                                         effective_mass_ratio: float) -> float:
    """E00 = (e hbar/2) sqrt(N_D/(m* eps_s)) in eV (Padovani & Stratton 1966), see
    :func:`mechid.catalogue.thermionic_field.characteristic_tunnelling_energy_eV`."""
    return float(characteristic_tunnelling_energy_eV(doping_cm3, dielectric_constant,
                                                     effective_mass_ratio))


def _doping_energy(device: Device) -> dict[str, float] | str:
    """E00 implied by the device's doping, with its error propagated (or what is missing)."""
    values = (("doping_cm3", device.doping_cm3),
              ("semiconductor_dielectric_constant", device.semiconductor_dielectric_constant),
              ("semiconductor_effective_mass_ratio", device.semiconductor_effective_mass_ratio))
    missing = [name for name, value in values if value is None]
    if missing:
        return " and ".join(missing) + " not given"
    doping, eps, mass = (value for _, value in values)
    energy = characteristic_energy_from_doping_eV(doping.value, eps.value, mass.value)
    # E00 ~ sqrt(N / (eps m)): relative errors add in quadrature with weight 1/2.
    relative = 0.5 * math.sqrt(sum(((m.sd or 0.0) / m.value) ** 2 for m in (doping, eps, mass)))
    return {"characteristic_energy_from_doping_eV": energy,
            "characteristic_energy_from_doping_eV_err": energy * relative}


def thermionic_field_ideality(records: Sequence[DiodeTemperature], device: Device) -> DiodeLine:
    """E00 fitted to n(T) = (E00/kT) coth(E00/kT) (Padovani & Stratton 1966), by least squares.

    The standard error comes from the Gauss-Newton curvature and the residual variance
    (n - 1 degrees of freedom). The line's ``slope`` and ``intercept`` are those of the
    measured n against the fitted (E00/kT) coth(E00/kT): 1 and 0 when the signature holds.
    Where the device gives the doping, the semiconductor's permittivity and effective mass,
    the E00 they imply is reported beside the fitted one.
    """
    t, ideality = _semilog_table(records, "ideality_factor")
    few = _too_few(t.size, "an ideality factor")
    if few is not None:
        return few
    if np.all(ideality <= 1.0):
        return DiodeLine(False, "not determined: every n <= 1, no thermionic-field signature")
    fit = optimize.least_squares(
        lambda e: ideality_thermionic_field(e[0], t) - ideality, x0=[BOLTZMANN_EV * t.mean()],
        bounds=([0.0], [np.inf]))
    energy = float(fit.x[0])
    residual = fit.fun
    dof = max(t.size - 1, 1)
    jacobian = float(np.sum(fit.jac[:, 0] ** 2))
    energy_err = math.sqrt(float(np.sum(residual**2)) / dof / jacobian) if jacobian > 0 else math.nan
    predicted = ideality_thermionic_field(energy, t)
    record, _ = _drawn(np.asarray(predicted, dtype=float), ideality,
                       "n vs (E00/kT) coth(E00/kT) with E00 fitted", {})
    quantities = {"characteristic_energy_eV": energy, "characteristic_energy_eV_err": energy_err,
                  "rms_ideality_residual": float(np.sqrt(np.mean(residual**2)))}
    implied = _doping_energy(device)
    detail = record.detail
    if isinstance(implied, str):
        detail += f"; E00 from the doping not computed: {implied}"
    else:
        quantities |= implied
    return replace(record, detail=detail, quantities=quantities)


# --------------------------------------------------------------------------------------------
# The whole series
# --------------------------------------------------------------------------------------------


def rectifying_reason(records: Sequence[DiodeTemperature]) -> tuple[bool, str]:
    """Whether the data look like a rectifying contact, and why (the rule in words)."""
    rule = (f"a straight forward ln I vs V region over >= {RECTIFYING_DECADES:g} decades and "
            f">= {MIN_RECTIFYING_POINTS} points with {IDEALITY_RANGE[0]:g} <= n <= "
            f"{IDEALITY_RANGE[1]:g} at one temperature at least")
    passing = [r.temperature_K for r in records if r.semilog.determined
               and r.semilog.n_points >= MIN_RECTIFYING_POINTS
               and r.semilog.quantities["current_decades"] >= RECTIFYING_DECADES
               and IDEALITY_RANGE[0] <= r.semilog.quantities["ideality_factor"]
               <= IDEALITY_RANGE[1]]
    if passing:
        return True, (f"ran: the data show {rule} (at " + ", ".join(f"{t:g} K" for t in passing)
                      + ")")
    return False, f"not run: the data do not show {rule}; {_best_semilog(records)}"


def _best_semilog(records: Sequence[DiodeTemperature]) -> str:
    """The longest semilog line found, in words (for the reason the analysis did not run)."""
    drawn = [r for r in records if r.semilog.determined]
    if not drawn:
        return (f"no straight forward region of {MIN_LINE_DECADES:g} decades at any "
                "temperature")
    best = max(drawn, key=lambda r: r.semilog.quantities["current_decades"])
    q = best.semilog.quantities
    return (f"the longest is {q['current_decades']:.2g} decades with n = "
            f"{q['ideality_factor']:.3g} at {best.temperature_K:g} K")


def diode_analysis(data: PreparedSeries, device: Device) -> DiodeAnalysis:
    """The rectifying-contact analysis of a prepared series (see the module docstring)."""
    polarity = forward_polarity(data)
    if polarity is None:
        return DiodeAnalysis(False, "not run: no positive current in either polarity")
    records = tuple(analyse_temperature(b, device) for b in forward_branches(data, polarity))
    ran, reason = rectifying_reason(records)
    if not ran:
        return DiodeAnalysis(False, reason, polarity)
    spread = barrier_vs_inverse_2kt(records, device)
    return DiodeAnalysis(
        ran=True, reason=reason, forward_polarity=polarity, temperatures=records,
        richardson=richardson_line(records, device),
        barrier_vs_inverse_2kt=spread,
        ideality_vs_inverse_2kt=ideality_vs_inverse_2kt(records),
        modified_richardson=modified_richardson_line(records, spread, device),
        thermionic_field_ideality=thermionic_field_ideality(records, device),
    )


# --------------------------------------------------------------------------------------------
# Starting values for the fit
# --------------------------------------------------------------------------------------------

#: Fewest temperatures with a semilog line for the Gaussian-barrier regression (three
#: coefficients and one degree of freedom).
MIN_GAUSSIAN_TEMPERATURES = 4


def gaussian_richardson_fit(records: Sequence[DiodeTemperature],
                            area_cm2: float | None) -> dict[str, float]:
    """Mean barrier, variance and A** from ln I_s(T) by one least-squares regression.

    Werner & Guettler (1991): with a Gaussian barrier distribution
    ``ln(I_s/T^2) = ln(A A**) - phibar/kT + sigma^2/(2 (kT)^2)`` (phi in eV, sigma in V), so
    ``ln(I_s/T^2)`` regressed on ``1, -1/kT, 1/(2 (kT)^2)`` gives ``ln(A A**)``, ``phibar``
    and ``sigma^2`` without A** being known -- their modified Richardson plot and their
    phi_ap-vs-1/T plot in one step (our arrangement). Empty with fewer than
    :data:`MIN_GAUSSIAN_TEMPERATURES` semilog lines; ``sigma^2`` below 0 (no spread seen)
    is given as 0.
    """
    t, current = _semilog_table(records, "saturation_current_A")
    if t.size < MIN_GAUSSIAN_TEMPERATURES:
        return {}
    kt = BOLTZMANN_EV * t
    design = np.column_stack([np.ones_like(t), -1.0 / kt, 1.0 / (2.0 * kt**2)])
    coefficients = np.linalg.lstsq(design, np.log(current / t**2), rcond=None)[0]
    values = {"gaussian_mean_barrier_eV": float(coefficients[1]),
              "gaussian_barrier_variance_V2": max(float(coefficients[2]), 0.0)}
    if area_cm2:
        values["gaussian_richardson_constant_A_cm2_K2"] = float(
            np.exp(coefficients[0]) / area_cm2)
    return values


def reverse_shunt_resistance_ohm(data: PreparedSeries, forward: str) -> float | None:
    """R_sh read from the reverse branch at the coldest temperature: median |V/I| there.

    Cold, the reverse saturation current of a barrier of a few tenths of an eV is far below
    any shunt current, so the reverse current is the shunt's (our reading for a start value
    only; a warm-only series gives an upper bound on the conductance instead). None without
    reverse points.
    """
    sign = -1.0 if forward == "positive" else 1.0
    coldest = float(np.min(data.temperatures))
    on = ((data.temperature_K == coldest) & (np.sign(data.voltage_V) == sign)
          & (data.folded_current_A > 0))
    if not on.any():
        return None
    return float(np.median(data.abs_voltage_V[on] / data.folded_current_A[on]))


def start_values(analysis: DiodeAnalysis, data: PreparedSeries, device: Device
                 ) -> dict[str, float]:
    """The rectifying-contact analysis read into starting values, keyed by quantity name.

    The names the catalogue's :class:`~mechid.catalogue.checks.DiodeEstimate` declarations
    read: ``ideality_factor`` (median of the semilog lines), ``barrier_height_eV`` and
    ``richardson_constant_A_cm2_K2`` (Richardson plot), ``gaussian_*`` (see
    :func:`gaussian_richardson_fit`), ``rho2`` and ``rho3_V`` (Werner & Guettler's 1/n - 1
    vs 1/(2kT)), ``series_resistance_ohm`` (median of Cheung's dV/d ln I lines) and
    ``shunt_resistance_ohm`` (:func:`reverse_shunt_resistance_ohm`) and
    ``thermionic_field_doping_per_cm3`` (the doping whose E00 fits n(T), see
    :func:`_doping_from_ideality`) with ``thermionic_field_barrier_eV``
    (:func:`_thermionic_field_barrier`). Empty when the analysis did not run; a quantity it
    could not read is left out.
    """
    if not analysis.ran or analysis.forward_polarity is None:
        return {}
    values: dict[str, float] = {}
    _, ideality = _semilog_table(analysis.temperatures, "ideality_factor")
    if ideality.size:
        values["ideality_factor"] = float(np.median(ideality))
    for line in (analysis.richardson, analysis.ideality_vs_inverse_2kt):
        if line is not None and line.determined:
            values |= {k: v for k, v in line.quantities.items() if not k.endswith("_err")}
    values |= gaussian_richardson_fit(analysis.temperatures, device.area_cm2)
    resistances = [r.cheung_derivative.quantities.get("series_resistance_ohm", math.nan)
                   for r in analysis.temperatures if r.cheung_derivative.determined]
    positive = [r for r in resistances if r > 0]
    if positive:
        values["series_resistance_ohm"] = float(np.median(positive))
    shunt = reverse_shunt_resistance_ohm(data, analysis.forward_polarity)
    if shunt is not None:
        values["shunt_resistance_ohm"] = shunt
    doping = _doping_from_ideality(analysis.thermionic_field_ideality, device)
    if doping is not None:
        values["thermionic_field_doping_per_cm3"] = doping
        barrier = _thermionic_field_barrier(analysis.temperatures, device, doping)
        if barrier is not None:
            values["thermionic_field_barrier_eV"] = barrier
    return {k: v for k, v in values.items() if math.isfinite(v)}


def _thermionic_field_barrier(records: Sequence[DiodeTemperature], device: Device,
                              doping: float) -> float | None:
    """The barrier at which the thermionic-field current (with ``doping``, the device's or
    the declared typical permittivity, mass and A**) passes through the middle of the warmest
    semilog line: our own inversion of the model at one point (below the series-resistance
    bend, where the junction takes the whole bias), a starting value only."""
    drawn = [r for r in records if r.semilog.determined]
    if not drawn or device.area_cm2 is None:
        return None
    warmest = max(drawn, key=lambda r: r.temperature_K)
    line, temperature = warmest.semilog, warmest.temperature_K
    bias = 0.5 * (line.x_min + line.x_max)
    target = line.intercept + line.slope * bias - math.log(device.area_cm2)
    declared = {p.name: p.typical for p in THERMIONIC_FIELD_DIODE.parameters}
    known = {"dielectric_constant": device.semiconductor_dielectric_constant,
             "semiconductor_effective_mass_ratio": device.semiconductor_effective_mass_ratio,
             "richardson_constant_A_cm2_K2": device.richardson_constant_A_cm2_K2}
    eps, mass, richardson = (declared[k] if m is None else m.value for k, m in known.items())
    fermi = float(reduced_fermi_level(temperature, doping, mass))
    kt = BOLTZMANN_EV * temperature
    lowest = bias - fermi * kt + 3.0 * kt  # the depletion approximation's edge (3 kT)

    def excess(barrier: float) -> float:
        density = thermionic_field_current_density_A_per_cm2(
            bias, temperature, barrier, doping, mass, eps, richardson)
        return math.log(float(density)) - target if density > 0 else -math.inf

    highest = 2.0
    if not lowest < highest or not (excess(lowest) > 0 > excess(highest)):
        return None
    return float(optimize.brentq(excess, lowest, highest, xtol=1e-6))


def _doping_from_ideality(line: DiodeLine | None, device: Device) -> float | None:
    """The donor density whose E00 is the one fitted to n(T) (:func:`thermionic_field_ideality`),
    with the device's semiconductor permittivity and effective mass, or the thermionic-field
    hypothesis' typical values where the device gives none."""
    if line is None or not line.determined:
        return None
    energy = line.quantities.get("characteristic_energy_eV", math.nan)
    if not energy > 0:
        return None
    declared = {p.name: p.typical for p in THERMIONIC_FIELD_DIODE.parameters}
    eps = device.semiconductor_dielectric_constant
    mass = device.semiconductor_effective_mass_ratio
    return float(doping_for_tunnelling_energy_per_cm3(
        energy, declared["dielectric_constant"] if eps is None else eps.value,
        declared["semiconductor_effective_mass_ratio"] if mass is None else mass.value))
