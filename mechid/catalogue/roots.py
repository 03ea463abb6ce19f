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
    tol_all = np.broadcast_to(np.asarray(tolerance, dtype=float), low.shape)
    root = np.array(high, dtype=float)
    index = np.arange(low.size) if active is None else np.asarray(active)
    # Work on compact copies of the open entries only; a finished entry leaves them.
    lo, hi = low[index].astype(float), high[index].astype(float)
    g_lo, g_hi = f_low[index].astype(float), f_high[index].astype(float)
    tol = tol_all[index]
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
