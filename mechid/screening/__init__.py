"""Screening: classical straightened-plot analysis of an I-V-T series (the practitioner's look).

Every registered mechanism (:mod:`mechid.catalogue`) declares its straightened plots
(:class:`~mechid.catalogue.base.StraightenedPlot`): a transform under which the mechanism is a
straight line and an ``interpret`` that reads physical quantities from slope and intercept.
This module draws those lines through the data -- one per temperature or one per selected bias
-- with a robust straight-line fit, applies the consistency checks practitioners use, and
ranks the mechanisms with a screening score. The Bayesian evidence
(:mod:`mechid.inference`) is the real model comparison; this is the quick look that
precedes it and that a reader can verify on paper.

Besides the declared plots, three data-level analyses are made once per series:

* the apparent activation energy at each common bias (Arrhenius slope of ln|I| vs 1/T);
* the reduced activation energy w(T) = d ln G / d ln T of Zabrodskii & Zinov'eva (1984) with
  the hopping exponent p from the slope of ln w vs ln T;
* the transition voltage, the minimum of ln(I/V^2) vs 1/V (Beebe et al. 2006), per temperature
  and polarity.

Which points go into a line
---------------------------
``per_temperature`` plots fold both polarities onto |V| (I is multiplied by sign(V), so a
current of the wrong sign stays negative and drops out where the transform takes a log); the
points where the transform is finite are fitted. ``per_voltage`` plots (Arrhenius-like) use a
few biases present at every temperature: ``n_biases`` targets spread evenly over the |V| range
common to all temperatures, each matched to the nearest measured |V| within 5 % at every
temperature; at least three temperatures are needed, otherwise the plot is reported as
"not enough temperatures".

Line fit and score
------------------
Each line is a Huber regression (scikit-learn ``HuberRegressor``, deterministic) with R^2
on all points used and slope/intercept errors from the ordinary-least-squares formula on the
robust residuals (:func:`robust_line`). Each mechanism declares its consistency checks as
data (``Mechanism.checks``, :mod:`mechid.catalogue.checks`); each check type is evaluated by
its rule in :data:`CHECK_RULES`. The ranking uses :func:`screening_score`, a documented
composite of straightness and checks -- a screening heuristic; the Bayesian evidence is the real comparison.


Modules (one job each)
----------------------
* :mod:`~mechid.screening.records` -- result records and their JSON forms
* :mod:`~mechid.screening.lines` -- the robust (Huber) line, OLS slopes, zero-bias extrapolation
* :mod:`~mechid.screening.biases` -- the series folded onto |V| and the common-bias table
* :mod:`~mechid.screening.plots` -- the lines of a declared straightened plot
* :mod:`~mechid.screening.analyses` -- data-level analyses (activation energies, Zabrodskii,
  transition voltages, log-log slopes)
* :mod:`~mechid.screening.checks` -- the rule of each declared check type
* :mod:`~mechid.screening.hints` -- declared parameter values for the fit (the hand-off)
* :mod:`~mechid.screening.score` -- the screening score
* :mod:`~mechid.screening.screen` -- :func:`linearise`, the whole screening of a series
"""

from mechid.screening.analyses import hopping_laws
from mechid.screening.biases import BIAS_MATCH_RTOL, common_bias_points
from mechid.screening.checks import CHECK_RULES, CheckContext, evaluate_check
from mechid.screening.lines import robust_line
from mechid.screening.records import (
    ActivationEnergy,
    Check,
    LinearisationResult,
    LineFit,
    MechanismLinearisation,
    TransitionVoltage,
    ZabrodskiiAnalysis,
)
from mechid.screening.screen import linearise

__all__ = [
    "BIAS_MATCH_RTOL",
    "CHECK_RULES",
    "ActivationEnergy",
    "Check",
    "CheckContext",
    "LineFit",
    "LinearisationResult",
    "MechanismLinearisation",
    "TransitionVoltage",
    "ZabrodskiiAnalysis",
    "common_bias_points",
    "evaluate_check",
    "hopping_laws",
    "linearise",
    "robust_line",
]
