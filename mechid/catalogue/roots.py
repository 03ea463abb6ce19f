"""A vectorised root search for the formulas that are defined implicitly.

Two declarations need the root of a rising function at every (walker, point) pair: the film
voltage behind a series resistance (:mod:`mechid.catalogue.composite`) uses
:func:`rising_root` (false position, no slope needed); the collecting-end carrier density of
Lampert's single-trap-level space-charge law (:mod:`mechid.catalogue.space_charge`), whose
slope is known in closed form, uses :func:`rising_root_with_slope` (Newton's method kept
inside the bracket), which needs about half the steps.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from mechid.catalogue.base import FloatArray

#: Signature of the function searched: f(trial values, indices into the flat arrays) -> f.
RisingFunction = Callable[[FloatArray, np.ndarray], FloatArray]
#: The same, also returning the slope df/dx at the trials.
RisingFunctionWithSlope = Callable[[FloatArray, np.ndarray], tuple[FloatArray, FloatArray]]


def _solved_entries(high: FloatArray, tolerance: FloatArray | float,
                    active: np.ndarray | None) -> tuple[FloatArray, np.ndarray, FloatArray]:
    """The result array (``high`` until solved), the entries to solve and their tolerances."""
    index = np.arange(high.size) if active is None else np.asarray(active)
    tol = np.broadcast_to(np.asarray(tolerance, dtype=float), high.shape)[index]
    return np.array(high, dtype=float), index, tol


def rising_root(func: RisingFunction, low: FloatArray, high: FloatArray, f_low: FloatArray,
                f_high: FloatArray, tolerance: FloatArray, *, max_steps: int = 100,
                active: np.ndarray | None = None) -> FloatArray:
    """Roots of rising functions, one per entry of the flat bracket arrays.

    The Illinois variant of false position (Dowell & Jarratt, BIT 11, 168 (1971)): it keeps
    every root bracketed, halves the function value of an end kept twice in a row so the
    bracket closes, and falls back to bisection where the secant step leaves the bracket.
    A NaN function value counts as below the root. An entry stops when ``|f| <= tolerance``
    (at a bracket end already, or at a trial) or its bracket is that narrow; only the entries
    still open are evaluated at each step.

    Parameters
    ----------
    func : callable
        ``func(trial, indices)`` returns ``f`` at ``trial`` for the entries ``indices``.
    low, high : ndarray
        Bracket ends, flat, with ``f_low <= 0 <= f_high`` (not checked: the caller builds
        the bracket from the physics).
    f_low, f_high : ndarray
        The function at the ends.
    tolerance : ndarray or float
        Absolute tolerance on ``f`` and on the bracket width, per entry or for all.
    max_steps : int
        Steps after which the last trial is returned.
    active : ndarray of int, optional
        The entries to solve; the others keep ``high``. All by default.

    Returns
    -------
    ndarray
        The last trial of each solved entry (``high`` where nothing was solved).
    """
    root, index, tol = _solved_entries(high, tolerance, active)
    # Work on compact copies of the open entries only; a finished entry leaves them.
    lo, hi = low[index].astype(float), high[index].astype(float)
    g_lo, g_hi = f_low[index].astype(float), f_high[index].astype(float)
    # An end that already meets the tolerance is the root (a secant step from it would not
    # move, and bisection would only creep towards it).
    at_high, at_low = np.abs(g_hi) <= tol, np.abs(g_lo) <= tol
    root[index] = np.where(at_high, hi, np.where(at_low, lo, root[index]))
    keep = ~(at_high | at_low)
    index, lo, hi, g_lo, g_hi, tol = (a[keep] for a in (index, lo, hi, g_lo, g_hi, tol))
    side = np.zeros(index.size, dtype=np.int8)  # +1: the upper end moved last, -1: the lower
    for _ in range(max_steps):
        if index.size == 0:
            break
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            trial = hi - g_hi * (hi - lo) / (g_hi - g_lo)
        trial = np.where(np.isfinite(trial) & (trial > lo) & (trial < hi), trial, 0.5 * (lo + hi))
        value = func(trial, index)
        upper = value > 0  # NaN counts as below the root
        g_hi = np.where(upper, value, np.where(side == -1, 0.5 * g_hi, g_hi))
        g_lo = np.where(upper, np.where(side == 1, 0.5 * g_lo, g_lo), value)
        hi, lo = np.where(upper, trial, hi), np.where(upper, lo, trial)
        side = np.where(upper, 1, -1).astype(np.int8)
        root[index] = trial
        open_ = ~((np.abs(value) <= tol) | (hi - lo <= tol))  # a NaN value stays open
        if not open_.all():
            index, lo, hi, g_lo, g_hi, tol, side = (
                a[open_] for a in (index, lo, hi, g_lo, g_hi, tol, side))
    return root


def rising_root_with_slope(func: RisingFunctionWithSlope, low: FloatArray, high: FloatArray,
                           start: FloatArray, f_start: FloatArray, slope_start: FloatArray,
                           tolerance: FloatArray | float, *, max_steps: int = 100,
                           active: np.ndarray | None = None) -> FloatArray:
    """Roots of rising functions by Newton's method kept inside a bracket.

    Newton steps where they land strictly inside the current bracket, bisection elsewhere
    (a non-finite or non-positive slope, a step out of the bracket); each trial then replaces
    the bracket end on its side, so every root stays bracketed (the safeguarded Newton
    method, e.g. Press et al., *Numerical Recipes*, 3rd ed. (2007), sec. 9.4). A NaN function
    value counts as below the root. An entry stops when ``|f| <= tolerance`` or its bracket
    is that narrow; only the entries still open are evaluated at each step.

    Parameters
    ----------
    func : callable
        ``func(trial, indices)`` returns ``(f, df/dx)`` at ``trial`` for the entries
        ``indices``.
    low, high : ndarray
        Bracket ends, flat, with ``f(low) <= 0 <= f(high)`` (not checked).
    start, f_start, slope_start : ndarray
        First point (inside ``[low, high]``) with its function value and slope.
    tolerance, max_steps, active
        As for :func:`rising_root`.

    Returns
    -------
    ndarray
        The last point of each solved entry (``high`` where nothing was solved).
    """
    root, index, tol = _solved_entries(high, tolerance, active)
    x, f, slope = (np.asarray(a, dtype=float)[index] for a in (start, f_start, slope_start))
    lo, hi = low[index].astype(float), high[index].astype(float)
    root[index] = x
    for _ in range(max_steps):
        upper = f > 0  # NaN counts as below the root
        hi, lo = np.where(upper, x, hi), np.where(upper, lo, x)
        open_ = ~((np.abs(f) <= tol) | (hi - lo <= tol))  # a NaN value stays open
        if not open_.all():
            index, x, f, slope, lo, hi, tol = (
                a[open_] for a in (index, x, f, slope, lo, hi, tol))
        if index.size == 0:
            break
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            trial = x - f / slope
        inside = np.isfinite(trial) & (slope > 0) & (trial > lo) & (trial < hi)
        x = np.where(inside, trial, 0.5 * (lo + hi))
        f, slope = func(x, index)
        root[index] = x
    return root
