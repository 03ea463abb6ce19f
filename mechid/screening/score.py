"""The screening score and rank: straightness of the plots plus the checks."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence

import numpy as np

from mechid.screening.records import Check, LineFit

#: Curvature index -log10(1 - R^2) at and above which a plot counts as fully straight: data
#: with ~1 % noise cannot tell straighter lines apart.
STRAIGHTNESS_CAP = 4.0
#: Weights of the screening score.
WEIGHT_STRAIGHTNESS = 2.0
WEIGHT_CHECKS = 2.0
FAILED_CHECK_PENALTY = 2.0


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
