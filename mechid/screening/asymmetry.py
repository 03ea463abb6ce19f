"""Polarity asymmetry: do the two bias polarities carry the same current?

A symmetric hypothesis (one parameter set for both polarities, ``I(-V) = -I(V)``) cannot
describe a junction whose electrodes differ (two barrier heights, Simmons 1963) or a
rectifying contact (Sze & Ng 2007, ch. 3). Before any fit, this diagnostic compares
``|I(+V)|`` with ``|I(-V)|`` at matched bias magnitudes, per temperature, and says whether the
difference is larger than the scatter of the data can explain.

Criterion (our choice, stated in every result): a temperature is asymmetric when the median
ratio ``|I(+V)|/|I(-V)|`` over its upper-half bias pairs differs from 1 by at least
:data:`ASYMMETRY_FACTOR` (either way) and the mean log ratio is at least
:data:`ASYMMETRY_SIGNIFICANCE` standard errors from zero. Only the upper half of each
temperature's matched |V| range is used, so that pairs near zero bias, where the reading is
dominated by the instrument's floor, do not decide.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

from mechid.screening.biases import BIAS_MATCH_RTOL, PreparedSeries

#: Median ratio (or its inverse) from which a temperature counts as asymmetric (our choice).
ASYMMETRY_FACTOR = 1.5
#: Mean log ratio over its standard error needed as well (our choice).
ASYMMETRY_SIGNIFICANCE = 3.0
#: Fewest matched (+V, -V) pairs in the upper half for a temperature to be judged.
MIN_PAIRS = 3


@dataclass(frozen=True)
class PolarityRatio:
    """The polarity ratio at one temperature.

    Attributes
    ----------
    temperature_K : float
        The temperature.
    n_pairs : int
        Matched (+V, -V) bias pairs used (upper half of the matched |V| range).
    median_ratio : float
        Median of ``|I(+V)|/|I(-V)|`` over those pairs.
    extreme_ratio, extreme_at_voltage_V : float
        The ratio furthest from 1 (in log) and the |V| where it occurs.
    log_ratio_mean, log_ratio_se : float
        Mean of ``ln(|I(+V)|/|I(-V)|)`` and its standard error.
    asymmetric : bool
        Whether this temperature meets the criterion of the module.
    """

    temperature_K: float
    n_pairs: int
    median_ratio: float
    extreme_ratio: float
    extreme_at_voltage_V: float
    log_ratio_mean: float
    log_ratio_se: float
    asymmetric: bool


@dataclass(frozen=True)
class PolarityAsymmetry:
    """The polarity-asymmetry diagnostic of a whole series.

    Attributes
    ----------
    asymmetric : bool or None
        True when at least one temperature is asymmetric, False when every judged temperature
        is symmetric, None when no temperature could be judged (see ``reason``).
    largest_ratio : float
        Over the judged temperatures, the median ratio furthest from 1 (NaN if none).
    at_temperature_K : float
        Where ``largest_ratio`` was found (NaN if none).
    criterion : str
        The rule applied, in words.
    reason : str
        One sentence: what was found, or why nothing could be judged.
    per_temperature : tuple of PolarityRatio
        The judged temperatures.
    """

    asymmetric: bool | None
    largest_ratio: float
    at_temperature_K: float
    criterion: str
    reason: str
    per_temperature: tuple[PolarityRatio, ...]

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form (NaN as None)."""
        def clean(value: Any) -> Any:
            return None if isinstance(value, float) and not math.isfinite(value) else value

        out = {k: clean(v) for k, v in asdict(self).items() if k != "per_temperature"}
        out["per_temperature"] = [{k: clean(v) for k, v in asdict(r).items()}
                                  for r in self.per_temperature]
        return out

    def sentence(self) -> str:
        """``"|I(+V)|/|I(-V)| = 3.8 at 300 K"`` style summary of the largest ratio."""
        return f"|I(+V)|/|I(-V)| = {self.largest_ratio:.3g} at {self.at_temperature_K:g} K"


CRITERION = (f"median |I(+V)|/|I(-V)| over the upper half of the matched biases at least "
             f"{ASYMMETRY_FACTOR:g} (or at most 1/{ASYMMETRY_FACTOR:g}), and the mean log ratio "
             f"at least {ASYMMETRY_SIGNIFICANCE:g} standard errors from 0, at one temperature "
             "or more")


def _matched_pairs(data: PreparedSeries, temperature: float) -> tuple[np.ndarray, np.ndarray]:
    """(|V|, ln ratio) of the (+V, -V) pairs at one temperature, repeats averaged per |V|."""
    at_t = data.temperature_K == temperature
    good = at_t & (data.folded_current_A > 0)
    levels = []
    for sign in (1.0, -1.0):
        on = good & (np.sign(data.voltage_V) == sign)
        v, inverse = np.unique(data.abs_voltage_V[on], return_inverse=True)
        mean = np.bincount(inverse, data.folded_current_A[on], v.size) / np.bincount(inverse,
                                                                                      None, v.size)
        levels.append((v, mean))
    (v_pos, i_pos), (v_neg, i_neg) = levels
    if v_pos.size == 0 or v_neg.size == 0:
        return np.empty(0), np.empty(0)
    nearest = np.clip(np.searchsorted(v_neg, v_pos), 1, v_neg.size - 1) if v_neg.size > 1 else (
        np.zeros(v_pos.size, dtype=int))
    if v_neg.size > 1:
        left_closer = np.abs(v_neg[nearest - 1] - v_pos) <= np.abs(v_neg[nearest] - v_pos)
        nearest = np.where(left_closer, nearest - 1, nearest)
    close = np.abs(v_neg[nearest] - v_pos) <= BIAS_MATCH_RTOL * v_pos
    return v_pos[close], np.log(i_pos[close] / i_neg[nearest[close]])


def _ratio_at(data: PreparedSeries, temperature: float) -> PolarityRatio | None:
    """The judged ratio at one temperature, or None with too few pairs."""
    v, log_ratio = _matched_pairs(data, temperature)
    if v.size == 0:
        return None
    upper = v >= np.median(v)
    v, log_ratio = v[upper], log_ratio[upper]
    if v.size < MIN_PAIRS:
        return None
    mean = float(np.mean(log_ratio))
    se = float(np.std(log_ratio, ddof=1) / math.sqrt(v.size))
    median = float(np.exp(np.median(log_ratio)))
    k = int(np.argmax(np.abs(log_ratio)))
    significant = abs(mean) >= ASYMMETRY_SIGNIFICANCE * se
    large = max(median, 1.0 / median) >= ASYMMETRY_FACTOR
    return PolarityRatio(
        temperature_K=float(temperature), n_pairs=int(v.size), median_ratio=median,
        extreme_ratio=float(np.exp(log_ratio[k])), extreme_at_voltage_V=float(v[k]),
        log_ratio_mean=mean, log_ratio_se=se, asymmetric=bool(significant and large),
    )


def polarity_asymmetry(data: PreparedSeries) -> PolarityAsymmetry:
    """Compare ``|I(+V)|`` and ``|I(-V)|`` at matched |V|, per temperature.

    Parameters
    ----------
    data : PreparedSeries
        The series as prepared by the screening (signed and folded currents).

    Returns
    -------
    PolarityAsymmetry
        The per-temperature ratios and the verdict of the module's criterion; ``asymmetric``
        is None when only one polarity was measured or no temperature has
        :data:`MIN_PAIRS` matched pairs in its upper half.
    """
    if not (np.any(data.voltage_V > 0) and np.any(data.voltage_V < 0)):
        return PolarityAsymmetry(None, math.nan, math.nan, CRITERION,
                                 "only one bias polarity was measured", ())
    ratios = tuple(r for t in data.temperatures if (r := _ratio_at(data, float(t))) is not None)
    if not ratios:
        return PolarityAsymmetry(
            None, math.nan, math.nan, CRITERION,
            f"no temperature has {MIN_PAIRS} or more matched +V/-V bias pairs (within "
            f"{BIAS_MATCH_RTOL:.0%}) in the upper half of its bias range", ())
    furthest = max(ratios, key=lambda r: abs(math.log(r.median_ratio)))
    asymmetric = any(r.asymmetric for r in ratios)
    n_asym = sum(r.asymmetric for r in ratios)
    reason = (f"{n_asym} of {len(ratios)} temperatures asymmetric; largest median "
              f"|I(+V)|/|I(-V)| = {furthest.median_ratio:.3g} at {furthest.temperature_K:g} K"
              if asymmetric else
              f"the two polarities agree within the criterion at all {len(ratios)} temperatures "
              f"judged (largest median ratio {furthest.median_ratio:.3g})")
    return PolarityAsymmetry(asymmetric, furthest.median_ratio, furthest.temperature_K,
                             CRITERION, reason, ratios)
