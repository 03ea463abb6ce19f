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
* ``ideality_grows_on_cooling``: the rectifying-contact analysis (:mod:`mechid.screening.diode`)
  finds the semilog ideality factor rising as the temperature falls: the slope of n against
  1/T (weighted least squares, its standard error scaled up by the scatter) exceeds
  :data:`IDEALITY_GROWTH_SIGMAS` standard errors. Thermionic-field emission has
  n = (E00/kT) coth(E00/kT), which grows on cooling wherever E00 is not << kT; where it is,
  n = 1 and the current is thermionic emission, which the plain diode law describes. When the
  analysis did not run (no rectifying contact seen) the need is not met; when it has fewer
  than :data:`MIN_IDEALITY_TEMPERATURES` temperatures with a semilog line it counts as met.
* ``thermionic_field_signature``: the device description gives the semiconductor's doping or
  its effective mass (the user describes a doped semiconductor contact), or the data meet
  both ``polarities_differ`` and ``ideality_grows_on_cooling``. The device route matters:
  a contact so heavily doped that field emission dominates is nearly symmetric and shows no
  straight semilog region, so the data alone do not announce it.
"""

from __future__ import annotations

import math

import numpy as np

from mechid.catalogue.base import DataNeed, Mechanism
from mechid.device import Device
from mechid.screening.records import DiodeAnalysis, LinearisationResult

#: Standard errors by which the slope of n against 1/T must exceed zero (about a one-sided
#: 2 % false alarm on Gaussian errors; common practice for "significant").
IDEALITY_GROWTH_SIGMAS = 2.0
#: Fewest temperatures with a semilog ideality factor for that slope (a line and one degree
#: of freedom).
MIN_IDEALITY_TEMPERATURES = 3


def unmet_need(mechanism: Mechanism, screening: LinearisationResult,
               device: Device | None = None) -> str | None:
    """The reason ``mechanism`` is not worth fitting on these data (and this device
    description), or None to fit it."""
    for need in mechanism.needs:
        reason = _judge(need, screening, device)
        if reason is not None:
            return reason
    return None


def _judge(need: DataNeed, screening: LinearisationResult,
           device: Device | None = None) -> str | None:
    if need == "thermionic_field_signature":
        if device is not None and (device.doping_cm3 is not None
                                   or device.semiconductor_effective_mass_ratio is not None):
            return None
        for part in ("polarities_differ", "ideality_grows_on_cooling"):
            reason = _judge(part, screening)
            if reason is not None:
                return (reason + "; nor does the device description give the semiconductor's "
                        "doping or effective mass")
        return None
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
    if need == "ideality_grows_on_cooling":
        return _ideality_does_not_grow(screening.diode)
    raise ValueError(f"unknown data need {need!r}")


def ideality_growth(diode: DiodeAnalysis | None) -> tuple[float, float, int] | None:
    """Slope of the semilog ideality factor against 1/T (K), its standard error and the number
    of temperatures, or None when the rectifying-contact analysis cannot say.

    Weighted least squares with the lines' standard errors as weights; the slope's error is
    scaled by sqrt(chi^2/dof) when the scatter exceeds those errors (never scaled down).
    """
    if diode is None or not diode.ran:
        return None
    rows = [(r.temperature_K, r.semilog.quantities["ideality_factor"],
             r.semilog.quantities.get("ideality_factor_err", math.nan))
            for r in diode.temperatures
            if r.semilog.determined and "ideality_factor" in r.semilog.quantities]
    if len(rows) < MIN_IDEALITY_TEMPERATURES:
        return None
    t, n, err = (np.array(c, dtype=float) for c in zip(*rows, strict=True))
    usable = np.isfinite(err) & (err > 0)
    weight = np.where(usable, 1.0 / np.where(usable, err, 1.0) ** 2, 0.0)
    if not usable.all():
        weight = np.ones_like(n)
    x = 1.0 / t
    x_mean = np.sum(weight * x) / np.sum(weight)
    spread = np.sum(weight * (x - x_mean) ** 2)
    if not spread > 0:
        return None
    slope = float(np.sum(weight * (x - x_mean) * n) / spread)
    intercept = np.sum(weight * n) / np.sum(weight) - slope * x_mean
    chi2 = float(np.sum(weight * (n - intercept - slope * x) ** 2))
    dof = len(rows) - 2
    scale = max(1.0, chi2 / dof) if dof > 0 else 1.0
    return slope, math.sqrt(scale / spread), len(rows)


def _ideality_does_not_grow(diode: DiodeAnalysis | None) -> str | None:
    if diode is None or not diode.ran:
        why = "no rectifying-contact analysis" if diode is None else diode.reason
        return ("its current is that of a rectifying Schottky contact, and the rectifying-"
                f"contact analysis did not run on these data ({why}); ask for it by name to fit "
                "it anyway (a contact so heavily doped that field emission makes it nearly "
                "symmetric looks like this)")
    growth = ideality_growth(diode)
    if growth is None:
        return None
    slope, error, count = growth
    if slope > IDEALITY_GROWTH_SIGMAS * error:
        return None
    return ("its ideality factor n = (E00/kT) coth(E00/kT) grows on cooling, but the semilog "
            f"ideality factors do not (slope of n against 1/T: {slope:.3g} +- {error:.2g} K "
            f"over {count} temperatures; needed: above {IDEALITY_GROWTH_SIGMAS:g} standard "
            "errors); where n does not grow, thermionic-field emission reduces to thermionic "
            "emission with n = 1, which the plain diode law (schottky_diode) describes")
