"""A vectorised root search for the formulas that are defined implicitly.

Two declarations need the root of a rising function at every (walker, point) pair: the film
voltage behind a series resistance (:mod:`mechid.catalogue.composite`) and the collecting-end
carrier density of Lampert's single-trap-level space-charge law
(:mod:`mechid.catalogue.space_charge`). Both use :func:`rising_root`, so the stepping rule
lives in one place.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from mechid.catalogue.base import FloatArray

#: Signature of the function searched: f(trial values, indices into the flat arrays) -> f.
RisingFunction = Callable[[FloatArray, np.ndarray], FloatArray]


def rising_root(func: RisingFunction, low: FloatArray, high: FloatArray, f_low: FloatArray,
                f_high: FloatArray, tolerance: FloatArray, *, max_steps: int = 100,
                active: np.ndarray | None = None) -> FloatArray:
    """Roots of rising functions, one per entry of the flat bracket arrays.

    The Illinois variant of false position (Dowell & Jarratt, BIT 11, 168 (1971)): it keeps
    every root bracketed, halves the function value of an end kept twice in a row so the
    bracket closes, and falls back to bisection where the secant step leaves the bracket.
    A NaN function value counts as below the root. An entry stops when ``|f| <= tolerance``
    or its bracket is that narrow; only the entries still open are evaluated at each step.

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
    low, high = low.astype(float), high.astype(float)
    f_low, f_high = f_low.astype(float), f_high.astype(float)
    tol = np.broadcast_to(np.asarray(tolerance, dtype=float), low.shape)
    root = high.copy()
    last_side = np.zeros(low.size, dtype=np.int8)  # +1: the upper end moved last, -1: lower
    active = np.arange(low.size) if active is None else np.asarray(active)
    for _ in range(max_steps):
        if active.size == 0:
            break
        lo, hi, g_lo, g_hi = low[active], high[active], f_low[active], f_high[active]
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            trial = hi - g_hi * (hi - lo) / (g_hi - g_lo)
        trial = np.where(np.isfinite(trial) & (trial > lo) & (trial < hi), trial, 0.5 * (lo + hi))
        value = func(trial, active)
        upper = value > 0  # NaN counts as below the root
        side = last_side[active]
        high[active] = np.where(upper, trial, hi)
        f_high[active] = np.where(upper, value, np.where(side == -1, 0.5 * g_hi, g_hi))
        low[active] = np.where(upper, lo, trial)
        f_low[active] = np.where(upper, np.where(side == 1, 0.5 * g_lo, g_lo), value)
        last_side[active] = np.where(upper, 1, -1)
        root[active] = trial
        done = (np.abs(value) <= tol[active]) | (high[active] - low[active] <= tol[active])
        active = active[~done]
    return root
