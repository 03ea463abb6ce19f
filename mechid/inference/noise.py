"""The noise laws of mechid: how a measured current scatters about the model current.

Every law has the same two nuisance parameters, a relative scale ``s_rel`` (instrument gain
error, sweep-to-sweep scatter) and an absolute floor ``sigma_floor`` in A (the instrument's
current noise), so every mechanism's priors are the same whichever law is fitted.

* ``gaussian`` (the default): Gaussian in current,

  .. math::

      I^{obs} \\sim \\mathcal{N}\\big(I,\\; \\sigma^2 = (s_{rel}\\, I)^2 + \\sigma_{floor}^2\\big).

* ``lognormal_floor``: multiplicative (log-normal) scatter of relative size ``s_rel`` that
  turns into additive Gaussian scatter of size ``sigma_floor`` near zero current -- the
  two-component error model of Rocke & Durbin (2001, J. Comput. Biol. 8, 557),
  y = mu exp(eta) + eps. Its likelihood uses the generalised-log (glog) transform that
  stabilises that model's variance (Durbin, Hardin, Hawkins & Rocke 2002, Bioinformatics 18
  Suppl. 1, S105): with c = sigma_floor / s_rel,

  .. math::

      z = \\frac{\\operatorname{asinh}(I^{obs}/c) - \\operatorname{asinh}(I/c)}{s_{rel}}
      \\sim \\mathcal{N}(0, 1),

  a change of variables of a normal density, so a proper density of the measured current
  (Jacobian ``1/sqrt(sigma_floor^2 + (s_rel I_obs)^2)``). For |I| >> c it is a log-normal of
  log-scale width ``s_rel`` (median I), for |I| << c a Gaussian of width ``sigma_floor``.
  The glog law is the variance-stabilised approximation of the two-component model, not its
  exact density (which has no closed form).
* ``student_t``: Student-t in current with 4 degrees of freedom and the Gaussian law's scale
  ``sqrt((s_rel I)^2 + sigma_floor^2)``; heavy tails so that a few wild readings (contact
  glitches, range switches) do not drag the fit. Robust regression with t errors and a fixed
  small number of degrees of freedom, 4 as the usual default: Lange, Little & Taylor (1989,
  J. Am. Stat. Assoc. 84, 881), the choice of 4 from memory.

The likelihood (:mod:`mechid.inference.likelihood`), the posterior predictive checks
(:mod:`mechid.inference.adequacy`), the predictive band of the report
(:mod:`mechid.inference.predictive`) and the simulator (:mod:`mechid.simulate`) all use the
functions here, so each law is written once. The evidences of one mechanism under different
laws are densities of the same measured currents, so they can be compared
(:func:`mechid.inference.noise_choice.choose_noise_law`).

Every function broadcasts: model currents ``(m, n)`` with noise parameters ``(m, 1)``
(one row per parameter vector), or plain scalars.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.special import gammaln

#: ln(2 pi), the normalising constant of the Gaussian density.
LOG_2PI = float(np.log(2 * np.pi))


def noise_variance(model_A: ArrayLike, relative: ArrayLike, floor_A: ArrayLike) -> NDArray:
    """Variance of the measured current about the model, ``(s_rel I)^2 + floor^2`` in A^2.

    Parameters
    ----------
    model_A : array_like
        Model current (either sign; only its magnitude matters).
    relative : array_like
        Relative noise ``s_rel`` (dimensionless).
    floor_A : array_like
        Noise floor ``sigma_floor`` in A.
    """
    return (np.asarray(relative) * model_A) ** 2 + np.asarray(floor_A) ** 2


def noise_sd(model_A: ArrayLike, relative: ArrayLike, floor_A: ArrayLike) -> NDArray:
    """Standard deviation of the measured current, ``sqrt((s_rel I)^2 + floor^2)`` in A."""
    return np.sqrt(noise_variance(model_A, relative, floor_A))


def summed_log_density(squared_residuals: NDArray, variance: NDArray, counts: NDArray) -> NDArray:
    """Gaussian log density of grouped points, summed over the last axis.

    A group ``u`` holds ``n_u`` points sharing one model value and one variance
    ``v_u``; ``squared_residuals[u]`` is the sum of their squared residuals. Then

    .. math::

        \\ln L = -\\tfrac12 \\sum_u \\big(S_u / v_u + n_u \\ln v_u\\big) - \\tfrac12 N \\ln 2\\pi,
        \\qquad N = \\sum_u n_u,

    the sum of the normal log densities of the points. With ``counts`` all ones it is the
    ordinary sum over points.

    Parameters
    ----------
    squared_residuals : ndarray, shape (..., groups)
        Sum of squared residuals of each group, A^2.
    variance : ndarray, shape (..., groups)
        Noise variance of each group, A^2.
    counts : ndarray, shape (groups,)
        Points in each group.

    Returns
    -------
    ndarray, shape (...)
        The log density.
    """
    n_points = float(np.sum(counts))
    return (-0.5 * np.sum(squared_residuals / variance + counts * np.log(variance), axis=-1)
            - 0.5 * LOG_2PI * n_points)


def add_noise(model_A: NDArray, sd_A: NDArray, rng: np.random.Generator) -> NDArray:
    """One draw of measured currents: ``model + sd * z`` with standard normal ``z``.

    The draws of ``z`` follow the shape of ``model_A`` (row by row), so the same generator
    state gives the same currents.
    """
    return model_A + sd_A * rng.standard_normal(np.shape(model_A))


# --------------------------------------------------------------------------------------
# The laws
# --------------------------------------------------------------------------------------

#: Degrees of freedom of the Student-t law (Lange, Little & Taylor 1989; from memory).
STUDENT_DEGREES_OF_FREEDOM = 4.0
_NU = STUDENT_DEGREES_OF_FREEDOM
_STUDENT_CONSTANT = float(gammaln((_NU + 1) / 2) - gammaln(_NU / 2) - 0.5 * np.log(_NU * np.pi))


def _gaussian_log_density(observed: NDArray, model: NDArray, relative: NDArray,
                          floor: NDArray) -> NDArray:
    variance = noise_variance(model, relative, floor)
    return -0.5 * ((observed - model) ** 2 / variance + np.log(variance) + LOG_2PI)


def _gaussian_standardise(observed: NDArray, model: NDArray, relative: NDArray,
                          floor: NDArray) -> NDArray:
    return (observed - model) / noise_sd(model, relative, floor)


def _gaussian_draw(model: NDArray, relative: NDArray, floor: NDArray,
                   rng: np.random.Generator) -> NDArray:
    return add_noise(model, noise_sd(model, relative, floor), rng)


def _glog_scale(relative: NDArray, floor: NDArray) -> NDArray:
    """``c = sigma_floor / s_rel``, the current where the two components are equal, in A."""
    return np.asarray(floor) / np.asarray(relative)


def _glog_standardise(observed: NDArray, model: NDArray, relative: NDArray,
                      floor: NDArray) -> NDArray:
    c = _glog_scale(relative, floor)
    return (np.arcsinh(observed / c) - np.arcsinh(model / c)) / np.asarray(relative)


def _glog_log_density(observed: NDArray, model: NDArray, relative: NDArray,
                      floor: NDArray) -> NDArray:
    z = _glog_standardise(observed, model, relative, floor)
    jacobian_variance = np.asarray(floor) ** 2 + (np.asarray(relative) * observed) ** 2
    return -0.5 * (z**2 + LOG_2PI + np.log(jacobian_variance))


def _glog_draw(model: NDArray, relative: NDArray, floor: NDArray,
               rng: np.random.Generator) -> NDArray:
    """Exact draws of the glog law: ``c sinh(asinh(I/c) + s_rel z)``."""
    c = _glog_scale(relative, floor)
    z = rng.standard_normal(np.shape(model))
    return c * np.sinh(np.arcsinh(model / c) + np.asarray(relative) * z)


def _student_log_density(observed: NDArray, model: NDArray, relative: NDArray,
                         floor: NDArray) -> NDArray:
    variance = noise_variance(model, relative, floor)
    t2 = (observed - model) ** 2 / variance
    return _STUDENT_CONSTANT - 0.5 * np.log(variance) - 0.5 * (_NU + 1) * np.log1p(t2 / _NU)


def _student_draw(model: NDArray, relative: NDArray, floor: NDArray,
                  rng: np.random.Generator) -> NDArray:
    t = rng.standard_t(_NU, size=np.shape(model))
    return model + noise_sd(model, relative, floor) * t


@dataclass(frozen=True)
class NoiseLaw:
    """One noise law: its density, its standardised residual and its simulator.

    Parameters
    ----------
    id : str
        Identifier used on the command line (with ``-`` for ``_``) and in the JSON.
    name : str
        Plain name for reports.
    formula : str
        The law in one line.
    source : str
        Where it is published.
    log_density : callable
        ``(observed (n,), model (m, n), relative (m, 1), floor (m, 1)) -> (m, n)``:
        the log density of each measured current, in ln(1/A).
    standardise : callable
        Same arguments -> ``(m, n)``: the residual in units of the law's scale (a standard
        normal variable for the Gaussian and glog laws, a t variable for Student-t).
    draw : callable
        ``(model, relative, floor, rng) -> measured`` currents of one simulated sweep.
    sd_per_scale : float
        Standard deviation of a standardised residual (1, or sqrt(nu/(nu-2)) for Student-t):
        turns the fitted relative scale into a relative standard deviation.
    """

    id: str
    name: str
    formula: str
    source: str
    log_density: Callable[[NDArray, NDArray, NDArray, NDArray], NDArray]
    standardise: Callable[[NDArray, NDArray, NDArray, NDArray], NDArray]
    draw: Callable[[NDArray, NDArray, NDArray, np.random.Generator], NDArray]
    sd_per_scale: float = 1.0


GAUSSIAN = NoiseLaw(
    id="gaussian", name="Gaussian in current",
    formula="I_obs ~ Normal(I, (s_rel I)^2 + floor^2)",
    source="heteroscedastic Gaussian errors with a variance function (common practice)",
    log_density=_gaussian_log_density, standardise=_gaussian_standardise, draw=_gaussian_draw,
)
LOGNORMAL_FLOOR = NoiseLaw(
    id="lognormal_floor", name="log-normal with an additive floor (glog)",
    formula="[asinh(I_obs/c) - asinh(I/c)] / s_rel ~ Normal(0, 1), c = floor / s_rel",
    source=("Rocke & Durbin 2001, J. Comput. Biol. 8, 557 (model); Durbin, Hardin, Hawkins & "
            "Rocke 2002, Bioinformatics 18 Suppl. 1, S105 (glog transform)"),
    log_density=_glog_log_density, standardise=_glog_standardise, draw=_glog_draw,
)
STUDENT_T = NoiseLaw(
    id="student_t", name="Student-t in current (4 degrees of freedom)",
    formula="(I_obs - I) / sqrt((s_rel I)^2 + floor^2) ~ t(4)",
    source="Lange, Little & Taylor 1989, J. Am. Stat. Assoc. 84, 881",
    log_density=_student_log_density, standardise=_gaussian_standardise, draw=_student_draw,
    sd_per_scale=float(np.sqrt(_NU / (_NU - 2.0))),
)

#: Every noise law by id, the default first.
NOISE_LAWS: dict[str, NoiseLaw] = {law.id: law for law in (GAUSSIAN, LOGNORMAL_FLOOR, STUDENT_T)}
DEFAULT_NOISE_LAW = GAUSSIAN.id


def get_noise_law(law_id: str) -> NoiseLaw:
    """The law with this id (``-`` and ``_`` both accepted).

    Raises
    ------
    KeyError
        With the known ids, for an unknown one.
    """
    key = law_id.replace("-", "_")
    if key not in NOISE_LAWS:
        raise KeyError(f"unknown noise law {law_id!r}; known: {', '.join(NOISE_LAWS)}")
    return NOISE_LAWS[key]
