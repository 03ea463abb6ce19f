"""The BDR conductance test: is the low-bias conductance parabola centred on zero bias?

Between identical electrodes the tunnel conductance ``G = dI/dV`` is even in V; between
dissimilar ones (barriers ``phi1`` at the electrode injecting at positive bias, ``phi2`` at
the other) Brinkman, Dynes & Rowell (J. Appl. Phys. 41, 1915 (1970)) give

.. math::

    G(V)/G(0) = 1 + c_1 V + c_2 V^2,\\qquad c_1 = -\\frac{A_0\\,\\Delta\\varphi}{16\\,
    \\bar\\varphi^{3/2}},\\quad c_2 = \\frac{9}{128}\\frac{A_0^2}{\\bar\\varphi}

with ``dphi = phi2 - phi1`` (sign fixed against the WKB integral, see
:func:`mechid.catalogue.tunnelling.bdr_conductance_coefficients`), so the minimum sits at
``V_min = -c1/(2 c2)`` and ``dphi/phibar = -3 sqrt(2) c1/sqrt(c2)`` needs neither thickness
nor mass. With the device thickness and effective mass, ``A0`` is known and
``phibar = 9 A0^2/(128 c2)`` gives the barriers in eV.

Per temperature: the numerical dI/dV of the I-V points (second-order differences on the
sorted biases, :func:`numpy.gradient`), an ordinary-least-squares parabola of G against V
in a low-bias window, its minimum and the asymmetry with standard errors from the fit
(HC3 covariance, delta method). The window starts at :data:`INITIAL_WINDOW_V` (or the smaller of the two
polarities' largest bias) and shrinks until ``c2 V^2 <= BDR_MAX_QUADRATIC_TERM``, the limit
the mechanism ``dissimilar_electrode_tunnelling`` declares for the expansion.
"""

from __future__ import annotations

import numpy as np

from mechid.catalogue.base import FloatArray
from mechid.catalogue.tunnelling import (
    BDR_MAX_QUADRATIC_TERM,
    bdr_decay_coefficient,
    bdr_relative_asymmetry,
)
from mechid.device import Device, Measured
from mechid.screening.biases import PreparedSeries
from mechid.screening.records import ConductanceAsymmetry

#: Largest |V| the parabola is first fitted over (common practice: BDR-type fits are made
#: within a few hundred mV of zero bias); the window then shrinks to the expansion's limit.
INITIAL_WINDOW_V = 0.5
#: Fewest points of each polarity inside the window (ours: a parabola's slope at zero bias
#: needs both sides).
MIN_POINTS_PER_POLARITY = 3
#: Fewest points in the window (three coefficients and at least four residual degrees).
MIN_POINTS = 7
#: Window refinements (each narrows it to the expansion limit of the last fit).
_MAX_REFINEMENTS = 6


def numerical_conductance(voltage_V: FloatArray, current_A: FloatArray
                          ) -> tuple[FloatArray, FloatArray]:
    """dI/dV of one I-V curve, by second-order differences on the distinct sorted biases.

    Repeated biases are averaged first. Returns ``(V, G)`` (empty with fewer than three
    distinct biases).
    """
    biases, inverse = np.unique(np.asarray(voltage_V, dtype=float), return_inverse=True)
    if biases.size < 3:
        return np.empty(0), np.empty(0)
    current = (np.bincount(inverse.ravel(), np.asarray(current_A, dtype=float))
               / np.bincount(inverse.ravel()))
    return biases, np.gradient(current, biases, edge_order=2)


def _parabola(v: FloatArray, g: FloatArray) -> tuple[FloatArray, FloatArray]:
    """OLS ``g0 + g1 V + g2 V^2``: coefficients and their heteroscedasticity-consistent covariance.

    The noise of a numerical conductance grows with the current (relative noise on I), so the
    covariance is the HC3 sandwich (White, Econometrica 48, 817 (1980); MacKinnon & White,
    J. Econometrics 29, 305 (1985)): ``(X'X)^-1 X' diag(r_i^2/(1 - h_ii)^2) X (X'X)^-1``.
    """
    design = np.column_stack([np.ones_like(v), v, v**2])
    coefficients, *_ = np.linalg.lstsq(design, g, rcond=None)
    residual = g - design @ coefficients
    bread = np.linalg.inv(design.T @ design)
    leverage = np.einsum("ij,jk,ik->i", design, bread, design)
    scaled = design * (residual / (1.0 - leverage))[:, None]
    return coefficients, bread @ (scaled.T @ scaled) @ bread


def _window_points(v: FloatArray, window: float) -> tuple[FloatArray, str | None]:
    """Mask of the points within ``window``, or why there are too few."""
    inside = np.abs(v) <= window
    n_pos, n_neg = int(np.sum(inside & (v > 0))), int(np.sum(inside & (v < 0)))
    if min(n_pos, n_neg) < MIN_POINTS_PER_POLARITY or int(np.sum(inside)) < MIN_POINTS:
        return inside, (f"too few low-bias points within |V| <= {window:.3g} V ({n_pos} at V > 0, "
                        f"{n_neg} at V < 0; needs {MIN_POINTS_PER_POLARITY} each and "
                        f"{MIN_POINTS} in all)")
    return inside, None


def _known(value: Measured | None) -> float | None:
    """The value of a device :class:`~mechid.device.Measured` field, or None."""
    return None if value is None else float(value.value)


def conductance_parabola(voltage_V: FloatArray, current_A: FloatArray, temperature_K: float,
                         device: Device) -> ConductanceAsymmetry:
    """The BDR conductance test on one temperature's I-V points (see the module notes)."""
    v, g = numerical_conductance(voltage_V, current_A)
    if not (np.any(v > 0) and np.any(v < 0)):
        return ConductanceAsymmetry(temperature_K, False,
                                    "not determined: needs both bias polarities")
    window = min(INITIAL_WINDOW_V, float(v.max()), float(-v.min()))
    for _ in range(_MAX_REFINEMENTS):
        inside, problem = _window_points(v, window)
        if problem is not None:
            return ConductanceAsymmetry(temperature_K, False, f"not determined: {problem}")
        coefficients, covariance = _parabola(v[inside], g[inside])
        g0, g1, g2 = coefficients
        if not (g0 > 0 and g2 > 0):
            return ConductanceAsymmetry(
                temperature_K, False, "not determined: the low-bias conductance parabola has "
                "no minimum (zero-bias conductance or curvature not positive)",
                int(inside.sum()), window)
        limit = float(np.sqrt(BDR_MAX_QUADRATIC_TERM * g0 / g2))
        if limit >= window:
            break
        window = limit
    return _record(temperature_K, window, int(inside.sum()), coefficients, covariance, device)


def _record(temperature_K: float, window: float, n_points: int, coefficients: FloatArray,
            covariance: FloatArray, device: Device) -> ConductanceAsymmetry:
    """Minimum, asymmetry and (with thickness and mass) barriers, by the delta method."""
    g0, g1, g2 = (float(c) for c in coefficients)
    minimum = -g1 / (2.0 * g2)
    minimum_gradient = np.array([0.0, -1.0 / (2.0 * g2), g1 / (2.0 * g2**2)])
    ratio = float(bdr_relative_asymmetry(g1 / g0, g2 / g0))
    ratio_gradient = np.array([-ratio / (2.0 * g0), -3.0 * np.sqrt(2.0) / np.sqrt(g0 * g2),
                               -ratio / (2.0 * g2)])
    minimum_err = float(np.sqrt(minimum_gradient @ covariance @ minimum_gradient))
    ratio_err = float(np.sqrt(ratio_gradient @ covariance @ ratio_gradient))
    detail = (f"G(V) parabola over |V| <= {window:.3g} V ({n_points} points): minimum at "
              f"{minimum:.3g} +/- {minimum_err:.2g} V, dphi/phibar = {ratio:.3g} +/- "
              f"{ratio_err:.2g}")
    mean = difference = difference_err = None
    thickness, mass = _known(device.thickness_nm), _known(device.effective_mass_ratio)
    if thickness is None or mass is None:
        detail += "; barriers in eV not determined (needs the device thickness and mass)"
    else:
        a0 = float(bdr_decay_coefficient(thickness, mass))
        c2 = g2 / g0
        mean = 9.0 * a0**2 / (128.0 * c2)
        difference = ratio * mean
        # d(dphi) = mean d(ratio) + ratio d(mean), with d(mean)/mean = -d(c2)/c2.
        c2_gradient = np.array([-g2 / g0**2, 0.0, 1.0 / g0])
        gradient = mean * ratio_gradient - ratio * mean / c2 * c2_gradient
        difference_err = float(np.sqrt(gradient @ covariance @ gradient))
        detail += f"; phibar = {mean:.3g} eV, dphi = {difference:.3g} +/- {difference_err:.2g} eV"
    return ConductanceAsymmetry(
        temperature_K, True, detail, n_points, window, g0, g1 / g0, g2 / g0, minimum,
        minimum_err, ratio, ratio_err, mean, difference, difference_err)


def conductance_asymmetry(data: PreparedSeries, device: Device) -> list[ConductanceAsymmetry]:
    """The BDR conductance test at every temperature of a prepared series."""
    records = []
    for temperature in data.temperatures:
        at = data.temperature_K == temperature
        records.append(conductance_parabola(data.voltage_V[at], data.current_A[at],
                                            float(temperature), device))
    return records
