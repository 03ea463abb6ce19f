"""Which mechanisms the data make worth fitting: the declared needs, judged by the screening.

A mechanism may declare what the data must show before a fit can tell anything about it
(:data:`mechid.catalogue.base.DataNeed`). Skipping one whose need is unmet saves its fit and
changes no conclusion the fit could reach; the result lists it with the reason. Each need is
judged here from the screening alone (no fit):

* ``both_polarities``: points at positive and at negative bias; without one sign the
  parameters declared for that polarity would only return their prior.
* ``polarities_differ``: the polarity-asymmetry diagnostic
  (:mod:`mechid.screening.asymmetry`) did not find the two polarities equal. When it could not
  judge (one polarity, too few matched pairs) the need counts as met: nothing is skipped on
  missing evidence.
"""

from __future__ import annotations

from mechid.catalogue.base import DataNeed, Mechanism
from mechid.screening.records import LinearisationResult


def unmet_need(mechanism: Mechanism, screening: LinearisationResult) -> str | None:
    """The reason ``mechanism`` is not worth fitting on these data, or None to fit it."""
    for need in mechanism.needs:
        reason = _judge(need, screening)
        if reason is not None:
            return reason
    return None


def _judge(need: DataNeed, screening: LinearisationResult) -> str | None:
    asymmetry = screening.polarity_asymmetry
    if need == "both_polarities":
        if asymmetry is not None and asymmetry.reason == "only one bias polarity was measured":
            return ("its parameters differ between the polarities and only one bias polarity was "
                    "measured, so those of the other would return their prior")
        return None
    if need == "polarities_differ":
        if asymmetry is not None and asymmetry.asymmetric is False:
            return ("its current differs between the polarities, but the polarity-asymmetry "
                    f"diagnostic finds them equal ({asymmetry.reason}; criterion: "
                    f"{asymmetry.criterion})")
        return None
    raise ValueError(f"unknown data need {need!r}")
