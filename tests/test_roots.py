"""The shared root searches and the slopes that steer the single-trap-level search.

Outside references: scipy.optimize.brentq for the roots, and scipy.integrate.quad of the
defining integrals P_k(t) = int_1^inf ds/(s^k (s+t)) and R_k(t) = int_1^inf ds/(s^k (s+t)^2)
for the slopes (an implementation independent of the closed forms and series).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq

from mechid.catalogue.roots import rising_root, rising_root_with_slope
from mechid.catalogue.space_charge import (
    _deep_injection_start,
    _log_tail_integrals,
    _single_level_shape,
)

TARGETS = np.array([-50.0, -3.0, -0.2, 0.0, 0.7, 4.0, 90.0])


def _cubic(x: np.ndarray, index: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return x**3 + x - TARGETS[index], 3.0 * x**2 + 1.0


def test_newton_in_a_bracket_finds_the_roots_brentq_finds():
    low, high = np.full(TARGETS.size, -10.0), np.full(TARGETS.size, 10.0)
    start = high.copy()
    f_start, slope_start = _cubic(start, np.arange(TARGETS.size))
    root = rising_root_with_slope(_cubic, low, high, start, f_start, slope_start, 1e-13)
    expected = [brentq(lambda x, c=c: x**3 + x - c, -10.0, 10.0, xtol=1e-14) for c in TARGETS]
    np.testing.assert_allclose(root, expected, atol=1e-12)


def test_without_a_usable_slope_it_bisects_and_still_converges():
    def no_slope(x: np.ndarray, index: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return _cubic(x, index)[0], np.full(x.size, np.nan)

    low, high = np.full(TARGETS.size, -10.0), np.full(TARGETS.size, 10.0)
    start = np.zeros(TARGETS.size)
    f_start, _ = no_slope(start, np.arange(TARGETS.size))
    root = rising_root_with_slope(no_slope, low, high, start, f_start, np.full(7, np.nan),
                                  1e-12, max_steps=200)
    expected = [brentq(lambda x, c=c: x**3 + x - c, -10.0, 10.0, xtol=1e-14) for c in TARGETS]
    np.testing.assert_allclose(root, expected, atol=1e-9)


def test_a_nan_value_counts_as_below_the_root():
    # f is NaN left of 1 and x - 2 right of it: the search must move right, to 2.
    def partly_undefined(x: np.ndarray, index: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return np.where(x < 1.0, np.nan, x - 2.0), np.ones(x.size)

    start = np.array([0.0])
    root = rising_root_with_slope(partly_undefined, np.array([-5.0]), np.array([5.0]), start,
                                  np.array([np.nan]), np.array([1.0]), 1e-12)
    assert root[0] == pytest.approx(2.0, abs=1e-10)


def test_only_the_active_entries_are_solved():
    low, high = np.full(TARGETS.size, -10.0), np.full(TARGETS.size, 10.0)
    f_high, slope_high = _cubic(high, np.arange(TARGETS.size))
    active = np.array([1, 4])
    root = rising_root_with_slope(_cubic, low, high, high, f_high, slope_high, 1e-13,
                                  active=active)
    untouched = np.setdiff1d(np.arange(TARGETS.size), active)
    np.testing.assert_array_equal(root[untouched], high[untouched])
    f_low = _cubic(low, np.arange(TARGETS.size))[0]
    reference = rising_root(lambda x, i: _cubic(x, i)[0], low, high, f_low, f_high, 1e-13,
                            active=active)
    np.testing.assert_allclose(root[active], reference[active], atol=1e-12)


@pytest.mark.parametrize("t", [1e-4, 0.01, 0.049, 0.051, 0.3, 1.0, 7.0, 300.0, 1e6])
def test_tail_integral_slopes_match_quadrature(t):
    """d ln P_k/dy = t R_k/P_k at t = e^-y, against scipy quad of both integrals."""
    y = np.array([-np.log(t)])
    log_p2, log_p3, slope_2, slope_3 = _log_tail_integrals(y)
    for k, log_p, slope in ((2, log_p2, slope_2), (3, log_p3, slope_3)):
        p = quad(lambda s, k=k: 1.0 / (s**k * (s + t)), 1.0, np.inf, epsabs=0, epsrel=1e-12)[0]
        r = quad(lambda s, k=k: 1.0 / (s**k * (s + t) ** 2), 1.0, np.inf, epsabs=0,
                 epsrel=1e-12)[0]
        assert log_p[0] == pytest.approx(np.log(p), rel=1e-10, abs=1e-12)
        assert slope[0] == pytest.approx(t * r / p, rel=1e-7, abs=1e-12)


def test_shape_slope_matches_a_central_difference():
    y = np.linspace(-25.0, 25.0, 501)
    for q in (1e-12, 1e-4, 0.3, 0.999):
        log_empty, log_filled = np.full(y.size, np.log(q)), np.full(y.size, np.log1p(-q))
        _, _, slope = _single_level_shape(y, log_empty, log_filled)
        h = 1e-5
        above = _single_level_shape(y + h, log_empty, log_filled)[0]
        below = _single_level_shape(y - h, log_empty, log_filled)[0]
        np.testing.assert_allclose(slope, (above - below) / (2 * h), rtol=1e-5, atol=1e-7)
        assert np.all(slope > 0)  # V rises with n_d: the search's premise


def test_deep_injection_start_is_the_root_for_a_deep_level_below_the_plateau():
    """For q -> 0 and V below the trap-filled plateau the t >> 1 asymptote is exact to O(q):
    in n_d on the trap-limited square law, in V up to the plateau (where V is nearly flat in
    n_d, so n_d itself is ill-determined). On the plateau the search starts elsewhere."""
    q = 1e-9
    y_true = np.linspace(-40.0, -8.0, 50)  # t = e^-y >> 1
    log_empty, log_filled = np.full(y_true.size, np.log(q)), np.full(y_true.size, np.log1p(-q))
    log_v = _single_level_shape(y_true, log_empty, log_filled)[0]
    start = _deep_injection_start(log_v, log_empty, log_filled)
    shallow = y_true < np.log(q) + 2.0  # the trap-limited square law and its bend
    np.testing.assert_allclose(start[shallow], y_true[shallow], atol=1e-3)
    log_v_start = _single_level_shape(start, log_empty, log_filled)[0]
    below_plateau = log_v < np.log(0.5) - 0.01
    assert below_plateau.sum() >= 30
    np.testing.assert_allclose(log_v_start[below_plateau], log_v[below_plateau], atol=1e-3)
