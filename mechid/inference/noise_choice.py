"""Which noise law to fit: as asked, or chosen by evidence on one probe mechanism.

With ``noise_law="auto"`` the most promising mechanism of the screening (the probe) is fitted
once under every law of :mod:`mechid.inference.noise` with the quick settings, and the law
with the largest evidence is used for the whole analysis -- but the Gaussian law is left only
when another law beats it by more than :data:`SWITCH_MARGIN` nats and by more than two
combined standard errors of the evidences. The evidences of one mechanism under different laws
are densities of the same measured currents, so their ratio is a Bayes factor between noise
laws (conditional on that mechanism being the one that carries the current).

The margin of 3 nats is "strong" evidence on the scale of Kass & Raftery (1995, J. Am.
Stat. Assoc. 90, 773: 2 ln B > 6); it keeps the default law unless the data clearly say
otherwise.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue.base import Mechanism
from mechid.catalogue.validity import FormulaNotApplicableError
from mechid.device import Device
from mechid.errors import MechidError
from mechid.inference.fit import fit_mechanism
from mechid.inference.noise import DEFAULT_NOISE_LAW, NOISE_LAWS, NoiseLaw, get_noise_law
from mechid.inference.reference import SamplerStartError
from mechid.inference.settings import QUICK_LADDER, QUICK_SEARCH

#: The word that asks for the choice by evidence.
AUTO = "auto"
#: ln B a law needs over the default before it replaces it (Kass & Raftery 1995, "strong").
SWITCH_MARGIN = 3.0


@dataclass(frozen=True)
class NoiseLawChoice:
    """The noise law of an analysis, and why.

    Parameters
    ----------
    requested : str
        What was asked for: a law id or ``"auto"``.
    chosen : str
        The law every fit used.
    name, formula, source : str
        Of the chosen law.
    probe_mechanism : str or None
        The mechanism fitted under every law (``"auto"`` only).
    log_evidence, log_evidence_err : dict
        ln Z of the probe under each law and its error (``"auto"`` only; a law whose fit
        could not be made is missing).
    reason : str
        One sentence: why this law.
    """

    requested: str
    chosen: str
    name: str
    formula: str
    source: str
    probe_mechanism: str | None = None
    log_evidence: dict[str, float] = field(default_factory=dict)
    log_evidence_err: dict[str, float] = field(default_factory=dict)
    reason: str = ""

    @property
    def law(self) -> NoiseLaw:
        """The chosen law."""
        return get_noise_law(self.chosen)


def noise_law_setting(value: str) -> str:
    """The canonical setting for a user's word: a law id or ``"auto"``.

    ``-`` and ``_`` are interchangeable (``lognormal-floor`` on the command line).

    Raises
    ------
    MechidError
        For an unknown law, naming the known ones.
    """
    key = str(value).strip().lower().replace("-", "_")
    if key == AUTO or key in NOISE_LAWS:
        return key
    known = ", ".join([law.replace("_", "-") for law in NOISE_LAWS] + [AUTO])
    raise MechidError(f"unknown noise law {value!r}: expected one of {known}")


def as_requested(law_id: str) -> NoiseLawChoice:
    """The choice when a law was named (no probe fits)."""
    law = get_noise_law(law_id)
    return NoiseLawChoice(requested=law.id, chosen=law.id, name=law.name, formula=law.formula,
                          source=law.source, reason="named by the user"
                          if law.id != DEFAULT_NOISE_LAW else "the default law")


def choose_noise_law(mechanism: Mechanism, voltage_V: NDArray, temperature_K: NDArray,
                     current_A: NDArray, device: Device,
                     rng: np.random.Generator) -> NoiseLawChoice:
    """Fit ``mechanism`` under every law (quick settings) and pick by evidence.

    Parameters
    ----------
    mechanism : Mechanism
        The probe (the screening's most promising candidate).
    voltage_V, temperature_K, current_A : ndarray
        The points the analysis fits.
    device : Device
        Device description.
    rng : numpy.random.Generator
        Source of the probe fits' randomness (one stream per law is spawned from it).

    Returns
    -------
    NoiseLawChoice
        The law, the probe's evidences, and the reason.
    """
    evidence: dict[str, float] = {}
    error: dict[str, float] = {}
    for law_id, law_rng in zip(NOISE_LAWS, rng.spawn(len(NOISE_LAWS)), strict=True):
        try:
            fit = fit_mechanism(mechanism, voltage_V, temperature_K, current_A, device,
                                QUICK_LADDER, law_rng, search=QUICK_SEARCH,
                                noise_law=NOISE_LAWS[law_id])
        except (FormulaNotApplicableError, SamplerStartError):
            continue
        if math.isfinite(fit.evidence.log_evidence):
            evidence[law_id] = float(fit.evidence.log_evidence)
            error[law_id] = float(fit.evidence.log_evidence_err)
    chosen, reason = _decide(evidence, error)
    law = NOISE_LAWS[chosen]
    return NoiseLawChoice(requested=AUTO, chosen=chosen, name=law.name, formula=law.formula,
                          source=law.source, probe_mechanism=mechanism.id,
                          log_evidence=evidence, log_evidence_err=error, reason=reason)


def _decide(evidence: dict[str, float], error: dict[str, float]) -> tuple[str, str]:
    """The rule of the module docstring, with its reason in words."""
    default = DEFAULT_NOISE_LAW
    if default not in evidence:
        return default, ("the probe fit under the default law could not be made, so the "
                         "default law is kept")
    best = max(evidence, key=evidence.__getitem__)
    if best == default:
        return default, "the default law has the largest evidence on the probe"
    gain = evidence[best] - evidence[default]
    combined = math.hypot(error[best], error[default])
    if gain > SWITCH_MARGIN and gain > 2.0 * combined:
        return best, (f"ln B = {gain:.1f} +- {combined:.1f} over the default law on the probe "
                      f"(more than {SWITCH_MARGIN:g} nats and two standard errors)")
    return default, (f"the best other law gains only ln B = {gain:.1f} +- {combined:.1f} on the "
                     f"probe (needs more than {SWITCH_MARGIN:g} nats and two standard errors)")
