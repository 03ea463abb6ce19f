"""Joint fit of one mechanism: MAP start, tempered ladder, evidence, summaries, adequacy."""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue.base import Mechanism, ParameterHints
from mechid.catalogue.validity import (
    FormulaNotApplicableError,
    not_applicable_text,
    validity_violations,
)
from mechid.device import Device
from mechid.errors import ConvergenceWarning
from mechid.inference.adequacy import AdequacyCheck, check_adequacy
from mechid.inference.domain import check_domain
from mechid.inference.evidence import EvidenceResult, estimate_evidence
from mechid.inference.flags import FAR_BELOW_MARGIN, SamplerFlag
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.noise import GAUSSIAN, NoiseLaw
from mechid.inference.predictive import PosteriorPredictive, posterior_predictive
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE, mechanism_priors
from mechid.inference.reference import (
    PilotRun,
    ReferencePathTarget,
    SamplerStartError,
    pilot_reference,
)
from mechid.inference.settings import LadderSettings, SearchSettings
from mechid.inference.start import find_modes
from mechid.inference.tempering import LadderRun
from mechid.results import (
    DomainCheck,
    MechanismResult,
    ParameterSummary,
    SamplingSummary,
    held_fixed,
    summarise_draws,
)

#: The nuisance parameters of the noise model (not physics).
NOISE_PARAMETERS = (NOISE_RELATIVE, NOISE_FLOOR)
#: Correlations with |r| at least this large are listed in the results.
NOTABLE_CORRELATION = 0.5
#: A mechanism whose best log-likelihood found by the mode search lies more than this many
#: nats below an evidence already estimated is not sampled (our choice, see
#: :class:`BelowLeaderError`): ln Z <= max ln L, the mode search has been seen to miss the
#: maximum by up to ~570 nats (benchmarks/RESULTS.md: diode study; Schottky emission on the
#: typical series, > 260 nats), and halving or doubling every catalogue range (or prior odds of
#: 100) moves ln Z by a few nats per parameter.
BELOW_LEADER_MARGIN = 1000.0


class BelowLeaderError(Exception):
    """The mode search's best log-likelihood is far below an evidence already estimated.

    The evidence is the prior average of the likelihood, so ln Z <= max ln L whatever the
    (normalised) prior; a mechanism whose best point found lies ``margin_nats`` below a
    competitor's ln Z cannot reach it, unless the search missed the maximum by that much.
    The fit stops after the mode search (no pilot, ladder or checks).

    Attributes
    ----------
    best_log_likelihood : float
        The largest ln L at the modes found (a lower estimate of max ln L).
    leader_log_evidence : float
        The best ln Z of the mechanisms fitted before it.
    margin_nats : float
        The margin the gap exceeded.
    """

    def __init__(self, best_log_likelihood: float, leader_log_evidence: float,
                 margin_nats: float) -> None:
        self.best_log_likelihood = float(best_log_likelihood)
        self.leader_log_evidence = float(leader_log_evidence)
        self.margin_nats = float(margin_nats)
        gap = leader_log_evidence - best_log_likelihood
        super().__init__(
            f"its best log-likelihood found by the mode search, {best_log_likelihood:.1f}, lies "
            f"{gap:.0f} nats below the best log-evidence already estimated "
            f"({leader_log_evidence:.1f}); since ln Z <= max ln L its evidence stays over "
            f"{margin_nats:g} nats below unless the mode search missed the maximum by more than "
            f"{gap - margin_nats:.0f} nats")


@dataclass(frozen=True)
class MechanismFit:
    """A fitted mechanism: the target, the sampler run, the evidence and the summaries.

    ``result`` and ``predictive`` are what reports read; the rest is sampler state for
    benchmarks and diagnostics.
    """

    target: MechanismTarget
    run: LadderRun
    evidence: EvidenceResult
    draws_internal: NDArray
    map_internal: NDArray
    adequacy: AdequacyCheck
    result: MechanismResult
    predictive: PosteriorPredictive


def posterior_draws(run: LadderRun, max_draws: int = 4000) -> NDArray:
    """Cold-chain draws in internal coordinates, shape ``(s, ndim)`` (production part only)."""
    chain = np.asarray(run.cold_chain)  # (steps, walkers, ndim)
    flat = chain.reshape(-1, chain.shape[-1])
    if len(flat) > max_draws:
        flat = flat[np.linspace(0, len(flat) - 1, max_draws).astype(int)]
    return flat


def fit_mechanism(
    mechanism: Mechanism,
    voltage_V: NDArray,
    temperature_K: NDArray,
    current_A: NDArray,
    device: Device,
    settings: LadderSettings,
    rng: np.random.Generator,
    hints: ParameterHints | Sequence[ParameterHints] | None = None,
    progress: Callable[[int, int], None] | None = None,
    *,
    search: SearchSettings,
    leader_log_evidence: float | None = None,
    noise_law: NoiseLaw = GAUSSIAN,
    below_leader_margin: float | None = None,
) -> MechanismFit:
    """Fit one mechanism jointly to all points and estimate its evidence.

    Steps: a MAP search (seeded by the linearisation hints), a short emcee pilot run at the
    posterior that fixes a reference distribution, then the tempered ladder from that
    reference to the posterior (generalised stepping-stone, Fan et al. 2011, see
    :mod:`mechid.inference.reference`), whose beta = 1 chain gives the parameter summaries.

    Parameters
    ----------
    mechanism : Mechanism
        Catalogue declaration.
    voltage_V, temperature_K, current_A : ndarray
        Kept data points.
    device : Device
        Device description (priors and area).
    settings : LadderSettings
        Tempered-ladder settings.
    rng : numpy.random.Generator
        The one source of randomness of this fit.
    hints : ParameterHints or sequence of them, optional
        Starting values (from the straightened plots, or another fit), keyed by parameter
        name.
    progress : callable, optional
        ``progress(done, total)`` during sampling.
    search : SearchSettings
        Mode search and pilot run (:data:`mechid.inference.settings.FULL_SEARCH` or
        ``QUICK_SEARCH``); every distinct mode found gets its own component in the
        reference distribution.
    leader_log_evidence : float, optional
        Best log-evidence of the mechanisms already fitted (earlier rounds, see
        :mod:`mechid.inference.rounds`): a mechanism far below it is not refined beyond the
        first production block (flag ``far_below``).
    noise_law : NoiseLaw
        How the measured currents scatter about the model (:mod:`mechid.inference.noise`).
    below_leader_margin : float, optional
        With ``leader_log_evidence``: stop after the mode search when the best log-likelihood
        found lies more than this many nats below it (None: never).

    Raises
    ------
    BelowLeaderError
        When ``below_leader_margin`` applies (the record says the bound and the gap).
    """
    priors = mechanism_priors(mechanism, device, current_A)
    target = MechanismTarget(mechanism, voltage_V, temperature_K, current_A, device, priors,
                             noise_law=noise_law)
    modes = find_modes(target, rng, hints, search=search)
    if not np.isfinite(modes[0].log_posterior):
        raise _not_applicable(mechanism, target, device, rng)
    if below_leader_margin is not None and leader_log_evidence is not None:
        best = float(np.max(target.log_likelihood(np.array([m.point for m in modes]))))
        if best < leader_log_evidence - below_leader_margin:
            raise BelowLeaderError(best, leader_log_evidence, below_leader_margin)
    start = modes[0].point
    pilot = pilot_reference(target, [m.point for m in modes], *target.bounds, rng,
                            search=search, log_posteriors=[m.log_posterior for m in modes])
    path = ReferencePathTarget(target, pilot.reference)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", ConvergenceWarning)
        # Every rung starts from reference draws resampled by L^beta: they already spread
        # along the posterior's ridges, which a ball around the pilot's last positions does not.
        floor = None if leader_log_evidence is None else leader_log_evidence - FAR_BELOW_MARGIN
        run, evidence = estimate_evidence(path, settings, rng, start=None, progress=progress,
                                          not_worth_below=floor)
    for warning in caught:  # say which mechanism a sampler warning is about
        warnings.warn(f"{mechanism.id}: {warning.message}", warning.category, stacklevel=2)
    evidence = _with_pilot(evidence, pilot, multimodal=len(modes) > 1)
    if not (np.isfinite(evidence.log_evidence) and np.isfinite(evidence.log_evidence_err)):
        # Seen: a law whose validity domain refused every walker the reference placed (the
        # ladder's mean log-likelihoods all NaN); a NaN ln Z must not be ranked as a fit.
        raise SamplerStartError("the tempered chains found no finite likelihood to average, so "
                                "no evidence could be estimated")
    draws = posterior_draws(run)
    adequacy = check_adequacy(target, draws, rng)
    # Last use of rng, after the sampling: the fit's numbers do not depend on the check.
    domain = check_domain(target, [m.point for m in modes], rng)
    result = _mechanism_result(mechanism, target, evidence, draws, start, adequacy, domain)
    return MechanismFit(target, run, evidence, draws, start, adequacy, result,
                        posterior_predictive(target, draws))


def _with_pilot(evidence: EvidenceResult, pilot: PilotRun, multimodal: bool) -> EvidenceResult:
    """The ladder's evidence completed with what the pilot run and the mode search add.

    The reference's mass inside the prior box was itself estimated by Monte Carlo (its error
    adds in quadrature); the pilot's likelihood calls count; a MAP on the boundary only in a
    noise parameter is no flag (a noise floor pressed against its lower limit only says the
    data are clean); several modes give ``multimodal_suspected``.
    """
    physical_edge = [name for name in evidence.boundary_parameters if name not in NOISE_PARAMETERS]
    flags = [flag for flag in evidence.flags
             if physical_edge or flag is not SamplerFlag.MAP_ON_BOUNDARY]
    if multimodal:
        flags.append(SamplerFlag.MULTIMODAL_SUSPECTED)
    return replace(
        evidence,
        log_evidence_err=float(np.hypot(evidence.log_evidence_err, pilot.reference.mass_err)),
        n_likelihood_calls=evidence.n_likelihood_calls + pilot.n_likelihood_calls,
        flags=tuple(flags),
    )


#: Prior draws whose validity violations explain why a mechanism was not fitted (the
#: fractions quoted then carry a binomial error of at most 0.5/sqrt(500) ~ 2 %; 2000 cost
#: ~1 s on an implicit law behind a series resistance, for a sentence).
EXPLAINED_DRAWS = 500


def _not_applicable(mechanism: Mechanism, target: MechanismTarget, device: Device,
                    rng: np.random.Generator, n_draws: int = EXPLAINED_DRAWS
                    ) -> FormulaNotApplicableError:
    """The error for a mechanism whose validity domain refuses every prior draw on the data."""
    physical = target.physical_values(target.sample_prior(rng, n_draws))
    draws = {name: physical[name][:, 0] for name in mechanism.parameter_names}
    found = validity_violations(mechanism, target.voltage_V, target.temperature_K, draws, device)
    return FormulaNotApplicableError(not_applicable_text(mechanism.id, n_draws, found), found)


def _mechanism_result(
    mechanism: Mechanism,
    target: MechanismTarget,
    evidence: EvidenceResult,
    draws: NDArray,
    start: NDArray,
    adequacy: AdequacyCheck,
    domain: DomainCheck,
) -> MechanismResult:
    physical = target.physical_values(draws)
    best = target.physical_values(start[None, :])
    summaries: dict[str, ParameterSummary] = {}
    samples: dict[str, NDArray] = {}
    for prior in target.priors:
        values = physical[prior.name][:, 0]
        if prior.is_fixed:
            summaries[prior.name] = held_fixed(prior.name, prior.unit, float(prior.value))
        else:
            summaries[prior.name] = summarise_draws(prior.name, prior.unit, values)
            samples[prior.name] = values
    return MechanismResult(
        id=mechanism.id, family=mechanism.family, name=mechanism.name,
        formula=mechanism.formula, source=mechanism.source,
        log_evidence=float(evidence.log_evidence), log_evidence_err=float(evidence.log_evidence_err),
        probability=math.nan, probability_err=math.nan,
        ln_bayes_factor_vs_best=math.nan, ln_bayes_factor_vs_best_err=math.nan,
        fit_adequate=adequacy.adequate, adequacy=adequacy,
        priors=tuple(target.priors),
        parameters=summaries,
        map_parameters={k: float(v[0, 0]) for k, v in best.items()},
        correlations=_correlations(target.names, draws),
        evidence=evidence,
        sampling=_sampling_summary(evidence, draws),
        validity=domain,
        draws=samples,
    )


def _correlations(names: tuple[str, ...], draws: NDArray) -> dict[str, object]:
    """Posterior correlation matrix (internal coordinates) and the notable pairs."""
    if draws.shape[1] < 2:
        return {"names": list(names), "matrix": [[1.0]], "notable": []}
    with np.errstate(invalid="ignore", divide="ignore"):
        matrix = np.corrcoef(draws, rowvar=False)
    notable = [
        {"a": names[i], "b": names[j], "r": float(matrix[i, j])}
        for i in range(len(names)) for j in range(i + 1, len(names))
        if np.isfinite(matrix[i, j]) and abs(matrix[i, j]) >= NOTABLE_CORRELATION
    ]
    notable.sort(key=lambda item: -abs(item["r"]))
    return {"names": list(names), "matrix": matrix.tolist(), "notable": notable}


def _sampling_summary(evidence: EvidenceResult, draws: NDArray) -> SamplingSummary:
    return SamplingSummary(
        n_draws=int(len(draws)),
        autocorr_time=tuple(np.atleast_1d(evidence.autocorr_time).astype(float).tolist()),
        effective_sample_size=float(evidence.effective_sample_size),
        n_likelihood_calls=int(evidence.n_likelihood_calls),
        flags=evidence.flags,
    )
