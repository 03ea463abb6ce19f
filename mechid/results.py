"""Plain result objects of an analysis and the one function that writes the JSON contract.

The JSON contract (``"schema": "mechid.result/1"``) is documented in ``docs/result-schema.md``;
reports and the command line read these objects, never raw sampler state.
"""

from __future__ import annotations

import dataclasses
import json
import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from enum import Enum
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import NDArray

from mechid import __version__
from mechid.inference.flags import SamplerFlag

if TYPE_CHECKING:
    from mechid.catalogue.validity import ValidityViolation
    from mechid.inference.adequacy import AdequacyCheck
    from mechid.inference.compare import FamilyProbability
    from mechid.inference.evidence import EvidenceResult
    from mechid.inference.noise_choice import NoiseLawChoice
    from mechid.inference.priors import Prior
    from mechid.inference.regimes import RegimeMap

SCHEMA = "mechid.result/1"


#: Field metadata that keeps a field out of the JSON (e.g. posterior draws, see --samples).
NOT_IN_JSON = {"json": False}


@dataclass(frozen=True)
class ParameterSummary:
    """Posterior summary of one parameter in physical units.

    JSON: ``{"median", "ci68", "ci95", "unit", "fixed", "determined", "reasons"}`` (the name
    is the key). ``determined`` is false when the data do not determine the value (pinned at
    a prior edge, posterior about the prior, a ridge with another parameter, a device value
    outside the formula's range); ``reasons`` says which, in words
    (:func:`mechid.analysis.determination`).
    """

    name: str = field(metadata=NOT_IN_JSON)
    median: float
    ci68: tuple[float, float]
    ci95: tuple[float, float]
    unit: str
    fixed: bool = False
    determined: bool = True
    reasons: tuple[str, ...] = ()


def summarise_draws(name: str, unit: str, draws: NDArray) -> ParameterSummary:
    """Median and central 68 % / 95 % credible intervals of 1-D posterior draws."""
    q = np.quantile(np.asarray(draws, dtype=float), [0.025, 0.16, 0.5, 0.84, 0.975])
    return ParameterSummary(name=name, median=float(q[2]), ci68=(float(q[1]), float(q[3])),
                            ci95=(float(q[0]), float(q[4])), unit=unit)


def held_fixed(name: str, unit: str, value: float) -> ParameterSummary:
    """The summary of a parameter held at ``value`` (every interval is the point)."""
    return ParameterSummary(name=name, median=value, ci68=(value, value), ci95=(value, value),
                            unit=unit, fixed=True)


@dataclass(frozen=True)
class SamplingSummary:
    """How well the beta = 1 chain sampled the posterior (the contract's ``"sampling"``)."""

    n_draws: int
    autocorr_time: tuple[float, ...]
    effective_sample_size: float
    n_likelihood_calls: int
    flags: tuple[SamplerFlag, ...]


@dataclass(frozen=True)
class DomainCheck:
    """Do the data pull a fit against its formula's validity domain? (the contract's ``"validity"``)

    The fit only uses parameters inside the domain (:mod:`mechid.catalogue.validity`). This
    record compares the best log posterior found inside it with the best found by a short
    search of the bare formula (validity not enforced) started from the fit's modes.

    Attributes
    ----------
    log_posterior_inside : float
        Best log posterior among the valid points (the modes and the search's end points).
    log_posterior_outside : float
        Best log posterior of the bare formula at a point outside the domain (NaN when the
        search found none).
    gain : float
        ``log_posterior_outside - log_posterior_inside`` (NaN when nothing was outside).
    margin : float
        The gain above which the data are said to pull outside (``pulls``).
    pulls : bool
        True when ``gain > margin``: the data would need parameters outside the domain.
    parameters_outside : dict
        The best point outside the domain, physical units (empty when none).
    violations : tuple of ValidityViolation
        The conditions that point breaks, each with the value it needs.
    n_likelihood_calls : int
        Parameter sets evaluated by the check.
    """

    log_posterior_inside: float
    log_posterior_outside: float
    gain: float
    margin: float
    pulls: bool
    parameters_outside: dict[str, float]
    violations: tuple[ValidityViolation, ...]
    n_likelihood_calls: int

    def caution(self, mechanism_id: str) -> str:
        """A plain sentence for the cautions: which condition the data pull across, and how far."""
        needs = "; ".join(
            f"{v.quantity} = {v.extreme_value:.3g} at {v.at_voltage_V:g} V, "
            f"{v.at_temperature_K:g} K, where the formula holds only for {v.requirement}"
            for v in self.violations)
        return (f"{mechanism_id}: the data pull the fit outside its formula's validity: the "
                f"bare formula fits {self.gain:.0f} nats (log posterior) better with {needs}; "
                "the fitted values are the best the formula allows inside its domain, "
                "not a description of these data")


@dataclass(frozen=True)
class NotFittedMechanism:
    """A mechanism left out of the comparison: its formula holds nowhere on these data.

    ``violations`` (from :func:`mechid.catalogue.validity.validity_violations` over prior
    draws) name each failing condition in plain words with the most extreme value the
    draws needed; ``reason`` is the whole explanation in one sentence.
    """

    id: str
    family: str
    name: str
    reason: str
    violations: tuple[ValidityViolation, ...]


@dataclass(frozen=True)
class SkippedMechanism:
    """A mechanism not fitted because the screening found a declared need of it unmet.

    See :mod:`mechid.screening.applicability`; ``reason`` says which need and what the
    screening found. A mechanism asked for by name is never skipped.
    """

    id: str
    family: str
    name: str
    reason: str


@dataclass(frozen=True)
class BelowLeaderMechanism:
    """A mechanism whose sampling was skipped: its best fit lies far below an evidence found.

    Its mode search ran; the best log-likelihood it found, ``best_log_likelihood``, bounds its
    log-evidence from above (ln Z <= max ln L for a normalised prior) if the search found the
    maximum, and lies more than ``margin_nats`` below ``leader_log_evidence`` (the best ln Z
    of the mechanisms fitted before it, ``leader_id``). ``reason`` says so in one sentence.
    Switched off by ``AnalysisSettings(skip_below_leader=False)`` (``--fit-all``).
    """

    id: str
    family: str
    name: str
    reason: str
    best_log_likelihood: float
    leader_id: str
    leader_log_evidence: float
    margin_nats: float


@dataclass(frozen=True)
class MechanismResult:
    """Everything learned about one mechanism from the joint fit (built once, never changed).

    The ranking fields (probability, Bayes factors against the best) are NaN as the fit
    builds it; the comparison makes the ranked copy with :func:`dataclasses.replace`.
    ``bayes_factor_vs_best`` is derived from ``ln_bayes_factor_vs_best``. The field order
    is the JSON order.
    """

    id: str
    family: str
    name: str
    formula: str
    source: str
    log_evidence: float
    log_evidence_err: float
    probability: float
    probability_err: float
    bayes_factor_vs_best: float = field(init=False)
    ln_bayes_factor_vs_best: float
    ln_bayes_factor_vs_best_err: float
    fit_adequate: bool
    adequacy: AdequacyCheck
    priors: tuple[Prior, ...]
    parameters: dict[str, ParameterSummary]
    map_parameters: dict[str, float]
    correlations: dict[str, Any]
    evidence: EvidenceResult
    sampling: SamplingSummary
    validity: DomainCheck | None = None
    # Posterior draws in physical units (not serialised into the JSON; see --samples).
    draws: dict[str, NDArray] = field(default_factory=dict, repr=False, compare=False,
                                      metadata=NOT_IN_JSON)

    def __post_init__(self) -> None:
        object.__setattr__(self, "bayes_factor_vs_best", _exp_or_zero(self.ln_bayes_factor_vs_best))


def _exp_or_zero(ln_value: float) -> float:
    """exp(ln_value), 0 on underflow and inf (written as null) on overflow."""
    if math.isnan(ln_value):
        return float("nan")
    if ln_value > 709.0:
        return float("inf")
    return math.exp(ln_value) if ln_value > -745 else 0.0


#: What every credible interval is (shown beside every parameter table; docs/result-schema.md).
INTERVALS_CAVEAT = ("credible intervals are statistical and conditional on the model (formula "
                    "and noise law) being right")


#: The banner of a verdict from a ``--quick`` run (console, report, JSON sentence).
QUICK_RUN_BANNER = "quick run: a first look; quote numbers from a full run"


@dataclass(frozen=True)
class Verdict:
    """The headline: the leading mechanism and how strongly the data prefer it.

    ``probability`` is conditional on the candidate set (``n_candidates`` mechanisms fitted)
    and on ``prior_odds``. ``strength`` words ln B alone (Kass & Raftery); the ``headline``
    and ``sentence`` leave it out when the leader is not adequate, and ``failing_statistics``
    then say which posterior predictive checks failed and what that means. ``quick_run``
    is true for a ``--quick`` run, whose sentence opens with :data:`QUICK_RUN_BANNER`.
    ``polarity_assumption`` says how the leader treats the two bias polarities (one parameter
    set for both, or a formula that differs between them) and which polarities were fitted.
    """

    id: str
    family: str
    probability: float
    runner_up: str | None
    bayes_factor_vs_runner_up: float = field(init=False)
    ln_bayes_factor_vs_runner_up: float
    ln_bayes_factor_vs_runner_up_err: float
    strength: str
    resolved: bool
    fit_adequate: bool
    n_candidates: int
    prior_odds: str
    headline: str
    failing_statistics: tuple[str, ...]
    quick_run: bool
    sentence: str
    polarity_assumption: str = ""
    #: Summed posterior probability per family (tunnelling, emission, hopping, ...).
    family_probabilities: tuple[FamilyProbability, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "bayes_factor_vs_runner_up",
                           _exp_or_zero(self.ln_bayes_factor_vs_runner_up))


@dataclass(frozen=True)
class EvidenceUnderRanges:
    """One mechanism's ln Z with every catalogue range's width times ``scale``.

    ``method`` says how it was obtained (:mod:`mechid.inference.sensitivity`): importance
    reweighting (narrower ranges), the exact width term (wider ranges, posterior clear of the
    old edges), a quick re-run, or "not computable by reweighting" (shift NaN). ``width_term``
    is ``sum ln(w_old/w_new)``; ``ranges`` the new physical ranges by parameter; ``limits``
    the hard limits a wider range stopped at; ``missed_mass_bound`` the edge criterion (nats).
    """

    mechanism_id: str
    scale: float
    method: str
    ln_evidence_shift: float
    ln_evidence_shift_err: float
    effective_sample_size: float
    width_term: float
    edge_parameters: tuple[str, ...]
    missed_mass_bound: float
    ranges: dict[str, tuple[float, float]]
    limits: tuple[str, ...]


@dataclass(frozen=True)
class BayesFactorUnderRanges:
    """ln B of the leader against ``other`` at each width factor of the catalogue ranges.

    ``ln_bayes_factor``, ``shift_err`` (Monte Carlo error of the change from the x1 value) and
    ``methods`` are aligned with ``scales``; ``largest_shift`` is the largest |change| (NaN
    when nothing could be computed), ``complete`` false when some width is not computable.
    """

    leader: str
    other: str
    scales: tuple[float, ...]
    ln_bayes_factor: tuple[float, ...]
    shift_err: tuple[float, ...]
    methods: tuple[str, ...]
    largest_shift: float
    largest_shift_err: float
    complete: bool


@dataclass(frozen=True)
class PriorSensitivity:
    """How much the Bayes factors move when every catalogue range is halved or doubled.

    ``computed`` is false (with the ``reason``) for screen-only runs and single fits.
    """

    computed: bool
    reason: str
    scales: tuple[float, ...]
    largest_shift: float
    sentence: str
    comparisons: tuple[BayesFactorUnderRanges, ...]
    evidences: tuple[EvidenceUnderRanges, ...]


@dataclass(frozen=True)
class PolarityComparison:
    """One mechanism with one parameter set for both polarities against each polarity alone.

    The separate model fits the positive-bias and the negative-bias points as two
    independent series (every parameter, noise included, free on each side), so its
    evidence is the product ``Z_positive * Z_negative``; the Bayes factor against the shared
    (joint) fit is ``ln Z_positive + ln Z_negative - ln Z_shared``. Positive favours parameters
    that differ between the polarities (e.g. two electrode barriers); ``preferred`` is
    ``"undecided"`` when it is within twice its Monte Carlo error.
    """

    mechanism_id: str
    ln_evidence_shared: float
    ln_evidence_shared_err: float
    ln_evidence_positive: float
    ln_evidence_positive_err: float
    ln_evidence_negative: float
    ln_evidence_negative_err: float
    ln_bayes_factor_separate_vs_shared: float
    ln_bayes_factor_separate_vs_shared_err: float
    preferred: str
    parameters_positive: dict[str, ParameterSummary]
    parameters_negative: dict[str, ParameterSummary]


@dataclass(frozen=True)
class AnalysisResult:
    """The whole outcome of ``mechid analyze`` (the JSON contract ``mechid.result/1``)."""

    schema: str = field(default=SCHEMA, init=False)
    mechid_version: str = field(default=__version__, init=False)
    seed: int | None
    input: dict[str, Any]
    device: dict[str, Any]
    settings: dict[str, Any]
    linearisation: dict[str, Any]
    mechanisms: tuple[MechanismResult, ...]
    verdict: Verdict | None
    cautions: tuple[str, ...]
    #: Mechanisms asked for but not fitted (formula outside its validity on these data).
    not_fitted: tuple[NotFittedMechanism, ...] = ()
    #: Mechanisms left out before fitting: a declared need unmet by these data (with why).
    skipped: tuple[SkippedMechanism, ...] = ()
    #: Mechanisms whose sampling was skipped after the mode search: best ln L found far below
    #: an evidence already estimated (the bound and the margin with each).
    below_leader: tuple[BelowLeaderMechanism, ...] = ()
    #: ``--polarity each``: shared against separate parameters, per mechanism fitted to both.
    polarity_comparison: tuple[PolarityComparison, ...] = ()
    #: Which path carries the current where (leading composite), and where the leading
    #: single law's residuals fail (:mod:`mechid.inference.regimes`).
    regime_map: RegimeMap | None = None
    #: Bayes factors under halved and doubled catalogue ranges (None: not run by this path).
    prior_sensitivity: PriorSensitivity | None = None
    #: The noise law every fit used and why (None: screening only).
    noise_law: NoiseLawChoice | None = None

    def mechanism(self, mechanism_id: str) -> MechanismResult:
        """The result for one mechanism id."""
        return next(m for m in self.mechanisms if m.id == mechanism_id)


def to_plain_json(value: Any) -> Any:
    """The one JSON converter: result records to built-in types, ready for ``json.dumps``.

    Dataclasses become dicts of their fields (in field order; fields whose metadata is
    :data:`NOT_IN_JSON` are left out),
    enums their value, NumPy scalars and arrays Python numbers and lists, tuples lists, and
    non-finite floats ``None`` (strict JSON, as ``docs/result-schema.md`` says). Objects with
    a ``to_dict`` method of their own (the screening records and the device) are converted
    from it.
    """
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        if hasattr(value, "to_dict"):
            return to_plain_json(value.to_dict())
        names = [f.name for f in dataclasses.fields(value) if f.metadata.get("json", True)]
        return {name: to_plain_json(getattr(value, name)) for name in names}
    if isinstance(value, Enum):
        return to_plain_json(value.value)
    if isinstance(value, Mapping):
        return {str(k): to_plain_json(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [to_plain_json(v) for v in value]
    if isinstance(value, np.ndarray):
        return to_plain_json(value.tolist())
    if isinstance(value, np.bool_ | bool):
        return bool(value)
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, float | np.floating):
        value = float(value)
        return value if math.isfinite(value) else None
    return value


def write_json(result: AnalysisResult, path: Path) -> None:
    """Write the result as strict JSON (non-finite numbers become null)."""
    text = json.dumps(to_plain_json(result), indent=2, allow_nan=False)
    path.write_text(text + "\n", encoding="utf-8")


def write_samples(result: AnalysisResult, path: Path) -> None:
    """Write posterior draws (physical units) of every mechanism to a ``.npz`` file.

    Arrays are named ``<mechanism id>/<parameter name>``; ``seed`` is stored as well.
    """
    arrays = {f"{m.id}/{name}": values for m in result.mechanisms for name, values in m.draws.items()}
    arrays["seed"] = np.array(-1 if result.seed is None else result.seed)
    with open(path, "wb") as handle:
        np.savez_compressed(handle, **arrays)
