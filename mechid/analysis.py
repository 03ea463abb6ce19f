"""The main job: read -> linearise -> fit and compare -> results.

:func:`run_analysis` takes a validated :class:`~mechid.data.IVSeries` and a
:class:`~mechid.device.Device`, and returns an :class:`~mechid.results.AnalysisResult`.
It prints nothing; progress is reported through an optional callback.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable, Mapping
from dataclasses import asdict, dataclass, field, replace
from typing import Any, Literal

import numpy as np
from scipy import stats

from mechid.catalogue import get_mechanism, registered_mechanisms
from mechid.catalogue.base import Mechanism, Parameter, ParameterHints
from mechid.data import IVSeries
from mechid.device import Device
from mechid.errors import MechidError, UnknownMechanismError
from mechid.formatting import (
    format_estimate,
    format_probability,
    plain_parameter_name,
    undetermined_note,
)
from mechid.inference.adequacy import (
    MAX_NOISE_RATIO,
    MIN_PREDICTIVE_P,
    NOISE_RESOLUTION,
    AdequacyCheck,
)
from mechid.inference.compare import (
    FamilyProbability,
    family_probabilities,
    kass_raftery_wording,
    rank_mechanisms,
)
from mechid.inference.fit import BELOW_LEADER_MARGIN, MechanismFit
from mechid.inference.nesting import (
    MISS_MARGIN,
    UNRELIABLE_EVIDENCE,
    beaten_nested_restart,
    best_found,
    nested_search_misses,
    refit_caution,
    restart_hints,
)
from mechid.inference.noise import DEFAULT_NOISE_LAW
from mechid.inference.noise_choice import AUTO, NoiseLawChoice, as_requested, choose_noise_law
from mechid.inference.path_start import (
    best_values,
    composite_parts,
    main_path_restart,
    part_hints,
)
from mechid.inference.predictive import PosteriorPredictive
from mechid.inference.priors import Prior
from mechid.inference.regimes import RegimeMap, regime_map
from mechid.inference.rounds import (
    FitJob,
    RoundsOutcome,
    best_evidence,
    default_workers,
    fit_candidates_in_rounds,
)
from mechid.inference.sensitivity import not_computed, sensitivity_of_fits
from mechid.inference.settings import (
    FULL_LADDER,
    FULL_SEARCH,
    QUICK_LADDER,
    QUICK_SEARCH,
    LadderSettings,
    SearchSettings,
)
from mechid.measurement import drift_check, measurement_cautions, repeat_agreement
from mechid.results import (
    QUICK_RUN_BANNER,
    AnalysisResult,
    BelowLeaderMechanism,
    MechanismResult,
    NotFittedMechanism,
    ParameterSummary,
    PolarityComparison,
    SkippedMechanism,
    Verdict,
)
from mechid.screening import LinearisationResult, linearise
from mechid.screening.applicability import unmet_need
from mechid.screening.asymmetry import PolarityAsymmetry

ProgressHook = Callable[[str, int, int], None]

Polarity = Literal["both", "positive", "negative", "each"]



@dataclass(frozen=True)
class AnalysisSettings:
    """Choices of one analysis run.

    Parameters
    ----------
    mechanisms : tuple of str, optional
        Mechanism ids to fit (all when None).
    quick : bool
        Shorter ladder (rougher evidences, for a first look).
    screen_only : bool
        Run only the linearisation tests.
    polarity : {"both", "positive", "negative", "each"}
        Which bias points enter the fit (both: joint fit of a symmetric device). ``"each"``:
        the joint fit, and every mechanism fitted again to each polarity alone, the two
        compared by evidence (:class:`~mechid.results.PolarityComparison`).
    prior_odds : dict, optional
        Relative prior weight per mechanism id (equal when omitted).
    workers : int
        Worker processes fitting mechanisms side by side (0: one per core, at most two).
        The numbers do not depend on it.
    ladder_overrides : mapping
        Fields of :class:`~mechid.inference.settings.LadderSettings` that replace the
        preset's (:data:`~mechid.inference.settings.FULL_LADDER` or ``QUICK_LADDER``).
    bias_window_V : (float, float), optional
        Analyse only points with ``low <= |V| <= high`` (both polarities), e.g. the high-field
        range of a Fowler-Nordheim analysis. Screening, fit and report all use the window.
    temperature_window_K : (float, float), optional
        Analyse only temperatures with ``low <= T <= high``.
    noise_law : str
        A law of :mod:`mechid.inference.noise` (``"gaussian"``, ``"lognormal_floor"``,
        ``"student_t"``) or ``"auto"``: chosen by evidence on the screening's most promising
        mechanism (:mod:`mechid.inference.noise_choice`).
    skip_below_leader : bool
        After its mode search, a mechanism whose best log-likelihood found lies more than
        :data:`~mechid.inference.fit.BELOW_LEADER_MARGIN` nats below an evidence already
        estimated is not sampled (listed in ``AnalysisResult.below_leader`` with the bound).
        Never applied to mechanisms asked for by name. False (``--fit-all``) fits every one.
    """

    mechanisms: tuple[str, ...] | None = None
    quick: bool = False
    screen_only: bool = False
    polarity: Polarity = "both"
    prior_odds: dict[str, float] | None = None
    workers: int = 0
    ladder_overrides: Mapping[str, Any] = field(default_factory=dict)
    bias_window_V: tuple[float, float] | None = None
    temperature_window_K: tuple[float, float] | None = None
    noise_law: str = DEFAULT_NOISE_LAW
    skip_below_leader: bool = True

    def ladder(self) -> LadderSettings:
        """The tempered-ladder settings these choices imply."""
        return replace(QUICK_LADDER if self.quick else FULL_LADDER, **self.ladder_overrides)

    def search(self) -> SearchSettings:
        """The mode search and pilot run these choices imply."""
        return QUICK_SEARCH if self.quick else FULL_SEARCH


@dataclass(frozen=True)
class AnalysisRun:
    """The result, the inputs and what inference hands over for reports.

    Only ``result`` is serialised. Reports read ``result``, ``series``, ``device`` and
    ``predictive`` (see :class:`mechid.report.ReportRun`); ``fits`` keeps the sampler state
    for benchmarks and diagnostics.
    """

    result: AnalysisResult
    linearisation: LinearisationResult
    fits: dict[str, MechanismFit]
    series: IVSeries
    device: Device
    predictive: dict[str, PosteriorPredictive]


def apply_windows(series: IVSeries, settings: AnalysisSettings) -> tuple[IVSeries, dict[str, Any]]:
    """The points inside the bias and temperature windows, and the windows as JSON.

    Raises
    ------
    MechidError
        If a window is not ``low < high`` with finite limits (``low >= 0`` for |V| and
        ``low > 0`` K), or fewer than 3 points remain.
    """
    keep = np.ones(series.n_points, dtype=bool)
    windows = (("--bias-window", settings.bias_window_V, np.abs(series.voltage_V), 0.0, "V"),
               ("--temperature-window", settings.temperature_window_K, series.temperature_K,
                1e-300, "K"))
    for option, window, values, least, unit in windows:
        if window is None:
            continue
        low, high = (float(x) for x in window)
        if not (math.isfinite(low) and math.isfinite(high) and least <= low < high):
            raise MechidError(f"{option} must be LOW:HIGH in {unit} with {least:g} <= LOW < HIGH"
                              f"{' (|V|)' if unit == 'V' else ''}, got {low:g}:{high:g}")
        keep &= (values >= low) & (values <= high)
    record = {"bias_abs_V": None if settings.bias_window_V is None
              else [float(x) for x in settings.bias_window_V],
              "temperature_K": None if settings.temperature_window_K is None
              else [float(x) for x in settings.temperature_window_K],
              "n_points_outside": int((~keep).sum())}
    if keep.all():
        return series, record
    if keep.sum() < 3:
        raise MechidError(f"the windows keep {int(keep.sum())} of {series.n_points} points; at "
                          "least 3 are needed (check --bias-window / --temperature-window)")
    inside = replace(series, temperature_K=series.temperature_K[keep],
                     voltage_V=series.voltage_V[keep], current_A=series.current_A[keep],
                     reading_index=series.reading_index[keep])
    return inside, record


def select_polarity(series: IVSeries, polarity: Polarity) -> np.ndarray:
    """Boolean mask of the points that enter the fit."""
    if polarity in ("both", "each"):
        return np.ones(series.n_points, dtype=bool)
    if polarity == "positive":
        return series.voltage_V > 0
    if polarity == "negative":
        return series.voltage_V < 0
    raise MechidError(f"--polarity must be both, positive, negative or each, got {polarity!r}")


def run_analysis(
    series: IVSeries,
    device: Device,
    settings: AnalysisSettings | None = None,
    seed: int | None = 0,
    progress: ProgressHook | None = None,
) -> AnalysisResult:
    """Run the whole job and return the serialisable result (see :func:`run_analysis_full`)."""
    return run_analysis_full(series, device, settings, seed, progress).result


def run_analysis_full(
    series: IVSeries,
    device: Device,
    settings: AnalysisSettings | None = None,
    seed: int | None = 0,
    progress: ProgressHook | None = None,
) -> AnalysisRun:
    """Linearise, fit every mechanism jointly, rank them and collect cautions.

    Raises
    ------
    MechidError
        If a density-type mechanism is asked for without an electrode area, or a polarity
        selection leaves no points.
    """
    settings = settings or AnalysisSettings()
    started = time.perf_counter()
    measured = {**series.summary(),
                "repeat_agreement": [asdict(a) for a in repeat_agreement(series)],
                "drift_check": [asdict(d) for d in drift_check(series)]}
    series, window = apply_windows(series, settings)
    mask = select_polarity(series, settings.polarity)
    if mask.sum() < 3:
        raise MechidError(f"no data points left for --polarity {settings.polarity}")
    lin = linearise(series, device)
    mechanisms = _selected_mechanisms(settings)
    fits: dict[str, MechanismFit] = {}
    master = np.random.default_rng(seed)
    not_fitted: tuple[NotFittedMechanism, ...] = ()
    skipped: tuple[SkippedMechanism, ...] = ()
    below_leader: tuple[BelowLeaderMechanism, ...] = ()
    comparison: tuple[PolarityComparison, ...] = ()
    noise: NoiseLawChoice | None = None
    repaired: list[str] = []
    if not settings.screen_only:
        _check_area(device, mechanisms)
        children = master.spawn(len(mechanisms))
        hints = _linearisation_hints(lin)
        # Most promising first (screening rank), so that mechanisms far below the leader are
        # not refined; each keeps its own random stream whatever the order.
        screening = {mid: rank for rank, mid in enumerate(lin.ranking)}
        skipped = _skipped_mechanisms(mechanisms, lin, settings, device)
        left_out = {entry.id for entry in skipped}
        jobs = sorted((FitJob(m.id, child, hints.get(m.id))
                       for m, child in zip(mechanisms, children, strict=True)
                       if m.id not in left_out),
                      key=lambda job: screening.get(job.mechanism_id, len(screening)))
        singles = [job for job in jobs if not composite_parts(get_mechanism(job.mechanism_id))]
        noise = _noise_law_choice(settings, singles or jobs, series, mask, device, master,
                                  progress)
        margin = (BELOW_LEADER_MARGIN if settings.skip_below_leader
                  and settings.mechanisms is None else None)
        outcome = fit_candidates_in_rounds(
            singles, series.voltage_V[mask], series.temperature_K[mask], series.current_A[mask],
            device, settings.ladder(), settings.search(),
            workers=settings.workers or default_workers(), progress=progress,
            noise_law=noise.law, below_leader_margin=margin,
        )
        repaired = _refit_nested_misses(outcome.fits, series, mask, device, settings, master,
                                        progress, noise)
        repaired += _refit_beaten_nested_laws(outcome.fits, series, mask, device, settings,
                                              master, progress, noise)
        outcome = _fit_composites([job for job in jobs if job not in singles], outcome, series,
                                  mask, device, settings, progress, noise, margin)
        repaired += _refit_stalled_main_paths(outcome.fits, series, mask, device, settings,
                                              master, progress, noise)
        repaired += _refit_unreliable_quick_evidences(outcome.fits, series, mask, device,
                                                      settings, master, progress, noise)
        if settings.polarity == "each":
            comparison = _compare_polarities(jobs, outcome.fits, series, device, settings,
                                             master, progress, noise)
        # A mechanism whose formula holds nowhere on the data is listed as not fitted, why.
        fits = {m.id: outcome.fits[m.id] for m in mechanisms if m.id in outcome.fits}
        not_fitted = tuple(outcome.not_fitted[m.id] for m in mechanisms
                           if m.id in outcome.not_fitted)
        below_leader = tuple(outcome.below_leader[m.id] for m in mechanisms
                             if m.id in outcome.below_leader)
    results = _ranked_results(fits, settings)
    regimes = (_regime_map(results, fits, series.voltage_V[mask], series.temperature_K[mask],
                           device, seed) if results else None)
    by_id = {m.id: m for m in mechanisms}
    leader = by_id[results[0].id] if results else None
    fitted_sides = "each" if comparison else _fitted_polarities(series.voltage_V[mask])
    polarity = (polarity_assumption(leader, fitted_sides)
                if leader is not None else "")
    verdict = (_verdict(results, settings, not_fitted, polarity, skipped, below_leader)
               if results else None)
    if verdict is not None:
        verdict = _with_families(verdict, results, settings)
    sensitivity = (not_computed("screen-only run: no fit") if settings.screen_only
                   else sensitivity_of_fits(fits, results, master))
    result = AnalysisResult(
        input={**measured, "polarity": settings.polarity, "window": window,
               "n_points_fitted": int(mask.sum())},
        device=device.to_dict(),
        linearisation=lin.to_dict(),
        mechanisms=tuple(results),
        verdict=verdict,
        settings={**asdict(settings), "ladder": asdict(settings.ladder()),
                  "wall_time_s": time.perf_counter() - started},
        cautions=tuple(repaired + [miss.caution() for miss in nested_search_misses(fits)]
                       + cautions(series, device, results, verdict, lin.polarity_asymmetry,
                                  leader_symmetric=None if leader is None else leader.is_odd)),
        seed=seed,
        not_fitted=not_fitted,
        skipped=skipped,
        below_leader=below_leader,
        polarity_comparison=comparison,
        regime_map=regimes,
        prior_sensitivity=sensitivity,
        noise_law=noise,
    )
    return AnalysisRun(result, lin, fits, series, device,
                       predictive={mid: fit.predictive for mid, fit in fits.items()})


def _fit_composites(jobs: list[FitJob], singles: RoundsOutcome, series: IVSeries,
                    mask: np.ndarray, device: Device, settings: AnalysisSettings,
                    progress: ProgressHook | None, noise: NoiseLawChoice,
                    margin: float | None) -> RoundsOutcome:
    """Fit the composites after the single mechanisms, starting from their parts' best fits.

    Each composite keeps its own random stream (``jobs``); the single fits' best evidence is
    the leader for the far-below rule. Returns the single and composite outcomes together.
    """
    if not jobs:
        return singles
    # The leak fitted to the excess draws from a stream spawned off the composite's own (its
    # fit's draws are unchanged by it).
    seeded = [replace(job, hints=(*part_hints(get_mechanism(job.mechanism_id), singles.fits,
                                              settings.search(), job.rng.spawn(1)[0]),
                                  *((job.hints,) if job.hints is not None else ())))
              for job in jobs]
    leader = best_evidence(None, singles.fits.values())
    composites = fit_candidates_in_rounds(
        seeded, series.voltage_V[mask], series.temperature_K[mask], series.current_A[mask],
        device, settings.ladder(), settings.search(),
        workers=settings.workers or default_workers(), progress=progress,
        noise_law=noise.law, below_leader_margin=margin, leader=leader)
    return RoundsOutcome(fits={**singles.fits, **composites.fits},
                         not_fitted={**singles.not_fitted, **composites.not_fitted},
                         below_leader={**singles.below_leader, **composites.below_leader})


def _refit_stalled_main_paths(fits: dict[str, MechanismFit], series: IVSeries,
                              mask: np.ndarray, device: Device, settings: AnalysisSettings,
                              master: np.random.Generator, progress: ProgressHook | None,
                              noise: NoiseLawChoice) -> list[str]:
    """Fit a parallel composite's main path again where its own search probably stalled.

    Only where the composite's evidence beats its main path's: a mode search of the main path
    from the composite's main-path values (:func:`main_path_restart`); if it beats the main
    path's fit by more than :data:`MISS_MARGIN` nats, the main path is fitted again from
    there and replaces the first fit when it reached a better point. ``fits`` is updated in
    place; returns a caution per refit. Streams are spawned from ``master`` only for the
    composites that beat their main path, so other runs keep their numbers.
    """
    notes = []
    for composite_id, composite_fit in list(fits.items()):
        parts = composite_parts(get_mechanism(composite_id))
        main_fit = fits.get(parts[0]) if len(parts) == 2 else None
        if main_fit is None or (composite_fit.evidence.log_evidence
                                <= main_fit.evidence.log_evidence):
            continue
        search_rng, fit_rng = master.spawn(2)
        start = main_path_restart(composite_fit, main_fit, settings.search(), search_rng,
                                  MISS_MARGIN)
        if start is None:
            continue
        again = _better_fit(FitJob(parts[0], fit_rng, start), main_fit, series, mask, device,
                            settings, progress, noise)
        if again is not None:
            gain = best_found(again) - best_found(main_fit)
            fits[parts[0]] = again
            notes.append(f"{parts[0]}'s first search stalled: started again from the main path "
                         f"of {composite_id}'s best fit it reached a point {gain:.0f} nats "
                         f"higher in posterior density, and the numbers shown are that fit's")
    return notes


def _better_fit(job: FitJob, first: MechanismFit, series: IVSeries, mask: np.ndarray,
                device: Device, settings: AnalysisSettings, progress: ProgressHook | None,
                noise: NoiseLawChoice) -> MechanismFit | None:
    """The job fitted again (this run's settings, one worker), or None when it did not reach
    a better point than ``first`` (the restarts below keep a new fit only then)."""
    again = fit_candidates_in_rounds(
        [job], series.voltage_V[mask], series.temperature_K[mask], series.current_A[mask],
        device, settings.ladder(), settings.search(), workers=1, progress=progress,
        noise_law=noise.law).fits.get(job.mechanism_id)
    return again if again is not None and best_found(again) > best_found(first) else None


#: A quick fit whose evidence its own sampler flags as unreliable is fitted again with the full
#: settings when its ln Z lies within this many nats of the leader's (our choice: a quick
#: evidence 84 nats below the full one was measured on a flagged composite, the leak at the
#: edge of visibility, composite_study.py seed 20261212 case 6, where it turned the verdict).
UNRELIABLE_QUICK_MARGIN = 150.0


def _refit_unreliable_quick_evidences(fits: dict[str, MechanismFit], series: IVSeries,
                                      mask: np.ndarray, device: Device,
                                      settings: AnalysisSettings, master: np.random.Generator,
                                      progress: ProgressHook | None,
                                      noise: NoiseLawChoice) -> list[str]:
    """Fit again, with the full ladder and search, the quick fits near the top whose evidence
    their sampler flags as unreliable (:data:`~mechid.inference.nesting.UNRELIABLE_EVIDENCE`).

    A quick run only. The candidates are those within :data:`UNRELIABLE_QUICK_MARGIN` nats of
    the best ln Z (the leader included); each starts from its quick fit's best point and
    replaces it. Streams are spawned from ``master`` only when there is a candidate, so other
    runs keep their numbers. ``fits`` is updated in place; returns a caution per refit.
    """
    if not settings.quick or not fits:
        return []
    top = max(fit.evidence.log_evidence for fit in fits.values())
    flagged = [mid for mid, fit in fits.items()
               if UNRELIABLE_EVIDENCE.intersection(fit.evidence.flags)
               and fit.evidence.log_evidence >= top - UNRELIABLE_QUICK_MARGIN]
    if not flagged:
        return []
    jobs = [FitJob(mid, rng, ParameterHints(mid, best_values(fits[mid]),
                                            {name: "quick fit's best point"
                                             for name in get_mechanism(mid).parameter_names}))
            for mid, rng in zip(flagged, master.spawn(len(flagged)), strict=True)]
    again = fit_candidates_in_rounds(
        jobs, series.voltage_V[mask], series.temperature_K[mask], series.current_A[mask],
        device, replace(FULL_LADDER, **settings.ladder_overrides), FULL_SEARCH,
        workers=settings.workers or default_workers(), progress=progress, noise_law=noise.law,
    ).fits
    notes = []
    for mid in flagged:
        if mid not in again:
            continue
        quick = fits[mid].evidence
        fits[mid] = again[mid]
        reasons = ", ".join(sorted(flag.value for flag in UNRELIABLE_EVIDENCE.intersection(
            quick.flags)))
        notes.append(f"{mid}'s quick evidence ({quick.log_evidence:.1f}) was flagged unreliable "
                     f"({reasons}) within {UNRELIABLE_QUICK_MARGIN:g} nats of the leader: it was "
                     f"fitted again with the full settings (ln Z {again[mid].evidence.log_evidence:.1f}"
                     "), and the numbers shown are that fit's")
    return notes


def _refit_nested_misses(fits: dict[str, MechanismFit], series: IVSeries, mask: np.ndarray,
                         device: Device, settings: AnalysisSettings,
                         master: np.random.Generator, progress: ProgressHook | None,
                         noise: NoiseLawChoice) -> list[str]:
    """Fit again, from the nested best fit, every container whose search provably missed it.

    The new fit replaces the old one when it reached a better point (it always starts next to
    one). ``fits`` is updated in place; returns a caution per refit. A fresh random stream is
    spawned from ``master`` per refit, so runs without a miss keep their numbers.
    """
    notes = []
    for miss in nested_search_misses(fits):
        job = FitJob(miss.mechanism_id, master.spawn(1)[0], restart_hints(miss, fits))
        again = _better_fit(job, fits[miss.mechanism_id], series, mask, device, settings,
                            progress, noise)
        if again is not None:
            fits[miss.mechanism_id] = again
            notes.append(refit_caution(miss))
    return notes


def _refit_beaten_nested_laws(fits: dict[str, MechanismFit], series: IVSeries,
                              mask: np.ndarray, device: Device, settings: AnalysisSettings,
                              master: np.random.Generator, progress: ProgressHook | None,
                              noise: NoiseLawChoice) -> list[str]:
    """Search again, with the full search, a nested law whose container's evidence beats it.

    Where that search beats the nested fit by more than :data:`MISS_MARGIN` nats
    (:func:`beaten_nested_restart`) the law is fitted again from there and replaces the first
    fit when it reached a better point. Streams are spawned from ``master`` only for such
    pairs. ``fits`` is updated in place; returns a caution per refit.
    """
    notes = []
    for container_id in list(fits):
        for nested_id in get_mechanism(container_id).contains:
            nested = fits.get(nested_id)
            if nested is None or (fits[container_id].evidence.log_evidence
                                  <= nested.evidence.log_evidence):
                continue
            search_rng, fit_rng = master.spawn(2)
            start = beaten_nested_restart(fits[container_id], nested, FULL_SEARCH, search_rng)
            if start is None:
                continue
            again = _better_fit(FitJob(nested_id, fit_rng, start), nested, series, mask,
                                device, settings, progress, noise)
            if again is not None:
                gain = best_found(again) - best_found(nested)
                fits[nested_id] = again
                notes.append(f"{nested_id}'s first search stalled: a second search (beaten by "
                             f"{container_id}, which contains it) reached a point {gain:.0f} "
                             "nats higher in posterior density, and the numbers shown are "
                             "that fit's")
    return notes


def _noise_law_choice(settings: AnalysisSettings, jobs: list[FitJob], series: IVSeries,
                      mask: np.ndarray, device: Device, master: np.random.Generator,
                      progress: ProgressHook | None) -> NoiseLawChoice:
    """The law asked for, or (``auto``) the one the probe's evidences pick.

    The probe's random stream is spawned from ``master`` only for ``auto``, after the fits'
    streams, so a named law leaves every other number of the run as it was.
    """
    if settings.noise_law != AUTO or not jobs:
        return as_requested(DEFAULT_NOISE_LAW if settings.noise_law == AUTO
                            else settings.noise_law)
    probe = get_mechanism(jobs[0].mechanism_id)
    if progress is not None:
        progress(f"noise law on {probe.id}", 0, 1)
    choice = choose_noise_law(probe, series.voltage_V[mask], series.temperature_K[mask],
                              series.current_A[mask], device, master.spawn(1)[0])
    if progress is not None:
        progress(f"noise law on {probe.id}", 1, 1)
    return choice


def _regime_map(results: list[MechanismResult], fits: Mapping[str, MechanismFit],
                voltage_V: np.ndarray, temperature_K: np.ndarray, device: Device,
                seed: int | None) -> RegimeMap:
    """The regime map from the most probable composite and the most probable single law."""
    def is_composite(result: MechanismResult) -> bool:
        # Paths in parallel only: a series resistance carries no current of its own.
        return bool(get_mechanism(result.id).options.get("paths"))

    composite = next((r for r in results if is_composite(r)), None)
    single = next((r for r in results if not is_composite(r)), None)
    residuals = None
    if single is not None:
        fit = fits[single.id]
        median = np.median(fit.draws_internal, axis=0)
        residuals = (single.id, fit.target.standardised_residuals(median))
    return regime_map(
        None if composite is None else (composite.id, composite.probability, composite.draws),
        residuals, voltage_V, temperature_K, device, seed)


def _skipped_mechanisms(mechanisms: list[Mechanism], lin: LinearisationResult,
                        settings: AnalysisSettings, device: Device
                        ) -> tuple[SkippedMechanism, ...]:
    """Mechanisms whose declared needs these data do not meet (never one asked for by name)."""
    if settings.mechanisms is not None:
        return ()
    found = []
    for mechanism in mechanisms:
        reason = unmet_need(mechanism, lin, device)
        if (reason is None and "both_polarities" in mechanism.needs
                and settings.polarity in ("positive", "negative")):
            reason = (f"its parameters differ between the polarities and only {settings.polarity} "
                      "bias was fitted (--polarity)")
        if reason is not None:
            found.append(SkippedMechanism(mechanism.id, mechanism.family, mechanism.name, reason))
    return tuple(found)


def _compare_polarities(jobs: list[FitJob], shared: Mapping[str, MechanismFit],
                        series: IVSeries, device: Device, settings: AnalysisSettings,
                        master: np.random.Generator, progress: ProgressHook | None,
                        noise: NoiseLawChoice) -> tuple[PolarityComparison, ...]:
    """Fit every jointly fitted mechanism to each polarity alone; compare with the joint fit.

    Each side gets fresh random streams spawned after the joint fit's (so the joint numbers
    are those of ``--polarity both`` with the same seed). Mechanisms declared by a signed
    formula are left out: their parameters already differ between the polarities.
    """
    wanted = [job for job in jobs if job.mechanism_id in shared
              and get_mechanism(job.mechanism_id).is_odd]
    if not wanted:
        return ()
    sides = {}
    for side, keep in (("positive", series.voltage_V > 0), ("negative", series.voltage_V < 0)):
        if keep.sum() < 3:
            raise MechidError(f"--polarity each needs data at both polarities; the {side} "
                              "bias has fewer than 3 points")
        children = master.spawn(len(wanted))
        side_jobs = [replace(job, rng=child) for job, child in zip(wanted, children, strict=True)]
        sides[side] = fit_candidates_in_rounds(
            side_jobs, series.voltage_V[keep], series.temperature_K[keep], series.current_A[keep],
            device, settings.ladder(), settings.search(),
            workers=settings.workers or default_workers(), progress=progress,
            noise_law=noise.law,
        ).fits
    found = []
    for job in wanted:
        joint = shared[job.mechanism_id].result
        pos, neg = (sides[side].get(job.mechanism_id) for side in ("positive", "negative"))
        if pos is None or neg is None:
            continue  # the formula holds nowhere on one side's data
        ln_b = pos.result.log_evidence + neg.result.log_evidence - joint.log_evidence
        err = math.sqrt(pos.result.log_evidence_err**2 + neg.result.log_evidence_err**2
                        + joint.log_evidence_err**2)
        preferred = ("undecided" if abs(ln_b) <= 2 * err
                     else "separate" if ln_b > 0 else "shared")
        found.append(PolarityComparison(
            mechanism_id=job.mechanism_id,
            ln_evidence_shared=joint.log_evidence, ln_evidence_shared_err=joint.log_evidence_err,
            ln_evidence_positive=pos.result.log_evidence,
            ln_evidence_positive_err=pos.result.log_evidence_err,
            ln_evidence_negative=neg.result.log_evidence,
            ln_evidence_negative_err=neg.result.log_evidence_err,
            ln_bayes_factor_separate_vs_shared=ln_b, ln_bayes_factor_separate_vs_shared_err=err,
            preferred=preferred,
            parameters_positive=determination(pos.result),
            parameters_negative=determination(neg.result),
        ))
    return tuple(found)


def _fitted_polarities(voltage_V: np.ndarray) -> str:
    """``"both"``, ``"positive"`` or ``"negative"``: the bias signs among the fitted points."""
    positive, negative = bool(np.any(voltage_V > 0)), bool(np.any(voltage_V < 0))
    return "both" if positive and negative else "positive" if positive else "negative"


def _check_area(device: Device, mechanisms: list[Mechanism]) -> None:
    """Raise a clear error when a density-type mechanism is to be fitted without an area."""
    needing = [m.id for m in mechanisms if m.needs_area]
    if needing and device.area_cm2 is None:
        raise MechidError(
            "the electrode area is needed to turn current density into current for "
            f"{', '.join(needing)}; give it with --area-cm2 or as area_cm2 in the device TOML "
            "file (or fit only mechanisms written as a current, e.g. --mechanism mott_vrh)"
        )


def _selected_mechanisms(settings: AnalysisSettings) -> list[Mechanism]:
    if settings.mechanisms is None:
        return list(registered_mechanisms())
    return [get_mechanism(m) for m in settings.mechanisms]


def _linearisation_hints(lin: LinearisationResult) -> dict[str, ParameterHints]:
    """Starting values read from the straightened plots, keyed by mechanism id.

    Each entry is keyed by declared parameter name (the mechanism's ``estimates``).
    """
    return {entry.mechanism_id: entry.hints for entry in lin.mechanisms}


def _ranked_results(fits: dict[str, MechanismFit], settings: AnalysisSettings) -> list[MechanismResult]:
    if not fits:
        return []
    ranking = rank_mechanisms(
        {k: f.result.log_evidence for k, f in fits.items()},
        {k: f.result.log_evidence_err for k, f in fits.items()},
        prior_odds=settings.prior_odds,
    )
    return [
        replace(fits[mechanism_id].result,
                probability=ranking.probability[i], probability_err=ranking.probability_err[i],
                ln_bayes_factor_vs_best=ranking.ln_bayes_factor_vs_best[i],
                ln_bayes_factor_vs_best_err=ranking.ln_bayes_factor_vs_best_err[i],
                parameters=determination(fits[mechanism_id].result))
        for i, mechanism_id in enumerate(ranking.ids)
    ]


#: A 95 % interval ending closer than this share of the prior range to one of its edges is
#: pinned there (in the sampling coordinate: log10 for log-scale parameters).
EDGE_SHARE = 0.01
#: Prior 68 % width over posterior 68 % width below which the data barely narrow the prior.
MIN_WIDTH_RATIO = 1.5
#: |r| above which two parameters form a ridge: only a combination of them is determined.
RIDGE_CORRELATION = 0.99


def prior_interval(prior: Prior, mass: float = 0.68) -> tuple[float, float]:
    """The central ``mass`` interval of a prior, in physical units.

    Uniform: ``lower + q (upper - lower)``; log-uniform: the same in log10; truncated
    normal: the quantiles of the truncated distribution (scipy.stats.truncnorm).
    """
    q = np.array([(1 - mass) / 2, (1 + mass) / 2])
    if prior.kind == "uniform":
        values = prior.lower + q * (prior.upper - prior.lower)
    elif prior.kind == "log_uniform":
        lo, hi = np.log10(prior.lower), np.log10(prior.upper)
        values = 10.0 ** (lo + q * (hi - lo))
    elif prior.kind == "truncated_normal":
        assert prior.mean is not None and prior.sd is not None
        a, b = (prior.lower - prior.mean) / prior.sd, (prior.upper - prior.mean) / prior.sd
        values = stats.truncnorm.ppf(q, a, b, loc=prior.mean, scale=prior.sd)
    else:
        raise ValueError("a fixed parameter has no prior interval")
    return float(values[0]), float(values[1])


def _width(prior: Prior, interval: tuple[float, float]) -> float:
    """Width of an interval in the prior's sampling coordinate."""
    lo, hi = prior.to_internal(np.asarray(interval, dtype=float))
    return float(hi - lo)


def _edge_reason(prior: Prior, summary: ParameterSummary) -> str | None:
    lo, hi = prior.internal_bounds()
    ci_lo, ci_hi = prior.to_internal(np.asarray(summary.ci95, dtype=float))
    margin = EDGE_SHARE * (hi - lo)
    unit = "" if prior.unit in ("", "1") else f" {prior.unit}"
    for side, bound, distance in (("lower", prior.lower, ci_lo - lo), ("upper", prior.upper, hi - ci_hi)):
        if distance < margin:
            return (f"pinned at the prior's {side} edge {bound:.4g}{unit} (95 % interval within "
                    f"{EDGE_SHARE:.0%} of the prior range of it)")
    return None


def _prior_reason(prior: Prior, summary: ParameterSummary) -> str | None:
    posterior_width = _width(prior, summary.ci68)
    prior_width = _width(prior, prior_interval(prior))
    ratio = prior_width / posterior_width if posterior_width > 0 else math.inf
    if ratio < MIN_WIDTH_RATIO:
        return (f"posterior about the prior: 68 % interval only {ratio:.2f} times narrower than "
                f"the prior's (criterion {MIN_WIDTH_RATIO:g})")
    return None


def _ridge_reasons(name: str, correlations: Mapping[str, Any], label: Callable[[str], str]
                   ) -> list[str]:
    reasons = []
    for pair in correlations.get("notable") or []:
        if name in (pair["a"], pair["b"]) and abs(pair["r"]) > RIDGE_CORRELATION:
            other = pair["b"] if pair["a"] == name else pair["a"]
            reasons.append(f"ridge with {label(other)} (r = {pair['r']:.4f}): only a "
                           "combination of the two is determined")
    return reasons


def _device_range_reason(prior: Prior, parameter: Parameter | None) -> str | None:
    value = prior.value if prior.is_fixed else prior.mean
    if (parameter is None or value is None or not prior.origin.startswith("device description")
            or parameter.lower <= value <= parameter.upper):
        return None
    unit = "" if prior.unit in ("", "1") else f" {prior.unit}"
    return (f"device value {value:.4g}{unit} lies outside the range the formula is declared "
            f"for ({parameter.lower:.4g} to {parameter.upper:.4g}{unit})")


def determination(result: MechanismResult) -> dict[str, ParameterSummary]:
    """Each parameter's summary with ``determined`` and ``reasons`` set.

    A parameter is not determined by the data when (criteria in the sampling coordinate,
    log10 for log-scale parameters):

    * its 95 % interval ends within :data:`EDGE_SHARE` (1 %) of the prior range from an edge
      (pinned there: the range, not the data, sets the value);
    * its prior's 68 % interval is less than :data:`MIN_WIDTH_RATIO` (1.5) times as wide as
      its posterior's (the data barely narrow the prior);
    * it forms a ridge, |r| > :data:`RIDGE_CORRELATION` (0.99), with another parameter;
    * its device value lies outside the mechanism's declared range (the prior is then a
      tail of the device's value, cut at the range).

    Held parameters are checked for the last rule only.
    """
    try:
        mechanism: Mechanism | None = get_mechanism(result.id)
    except UnknownMechanismError:
        mechanism = None

    def declared(name: str) -> Parameter | None:
        if mechanism is None or name not in mechanism.parameter_names:
            return None
        return mechanism.parameter(name)

    def label(name: str) -> str:
        parameter = declared(name)
        return parameter.symbol if parameter is not None else name

    priors = {prior.name: prior for prior in result.priors}
    summaries = {}
    for name, summary in result.parameters.items():
        prior = priors.get(name)
        reasons: list[str | None] = []
        if prior is not None:
            reasons.append(_device_range_reason(prior, declared(name)))
            if not prior.is_fixed and not summary.fixed:
                reasons += [_edge_reason(prior, summary), _prior_reason(prior, summary)]
                reasons += _ridge_reasons(name, result.correlations, label)
        found = tuple(r for r in reasons if r)
        summaries[name] = replace(summary, determined=not found, reasons=found)
    return summaries


def _verdict(results: list[MechanismResult], settings: AnalysisSettings,
             not_fitted: tuple[NotFittedMechanism, ...] = (),
             polarity: str = "", skipped: tuple[SkippedMechanism, ...] = (),
             below_leader: tuple[BelowLeaderMechanism, ...] = ()) -> Verdict:
    best = results[0]
    runner = results[1] if len(results) > 1 else None
    ln_b = -runner.ln_bayes_factor_vs_best if runner else float("inf")
    ln_b_err = runner.ln_bayes_factor_vs_best_err if runner else 0.0
    strength = kass_raftery_wording(ln_b) if runner else "only one mechanism fitted"
    resolved = runner is None or ln_b > 2 * ln_b_err
    failing = failing_statistics(best.adequacy)
    odds = prior_odds_text(settings.prior_odds)
    headline = (INADEQUATE_HEADLINE if not best.fit_adequate
                else f"most probable of the {len(results)} mechanisms fitted" if runner
                else "the only mechanism fitted")
    return Verdict(
        polarity_assumption=polarity,
        id=best.id, family=best.family, probability=best.probability,
        ln_bayes_factor_vs_runner_up=ln_b, ln_bayes_factor_vs_runner_up_err=ln_b_err,
        runner_up=runner.id if runner else None, strength=strength, resolved=resolved,
        fit_adequate=best.fit_adequate, n_candidates=len(results), prior_odds=odds,
        headline=headline, failing_statistics=tuple(failing), quick_run=settings.quick,
        sentence=quick_run_prefix(settings.quick)
        + verdict_sentence(best, runner, ln_b, ln_b_err, strength, resolved,
                           n_candidates=len(results), prior_odds=odds)
        + _not_fitted_sentence(len(results), not_fitted)
        + _skipped_sentence(skipped)
        + _below_leader_sentence(below_leader)
        + (f" Polarity assumption: {polarity}." if polarity else ""),
    )


def _with_families(verdict: Verdict, results: list[MechanismResult],
                   settings: AnalysisSettings) -> Verdict:
    """The verdict with each family's summed probability, in its fields and its sentence."""
    families = family_probabilities(
        {r.id: r.log_evidence for r in results}, {r.id: r.log_evidence_err for r in results},
        {r.id: r.family for r in results}, prior_odds=settings.prior_odds)
    return replace(verdict, family_probabilities=families,
                   sentence=verdict.sentence + family_sentence(families))


def family_sentence(families: tuple[FamilyProbability, ...]) -> str:
    """``" ... by family ...: tunnelling 0.97 (± 0.01; 2 mechanisms), ..."`` (empty for one)."""
    if len(families) < 2:
        return ""
    def error(value: float) -> str:
        return "MC error < 0.001" if value < 1e-3 else f"± {value:.2g}"

    parts = [f"{f.family} {format_probability(f.probability)} ({error(f.probability_err)}; "
             f"{len(f.members)} mechanism{'' if len(f.members) == 1 else 's'})"
             for f in families]
    return " Probability by family, summed over its members: " + ", ".join(parts) + "."


def polarity_assumption(mechanism: Mechanism, fitted_polarities: str) -> str:
    """How ``mechanism`` treats the two bias polarities, and which ones were fitted.

    Parameters
    ----------
    mechanism : Mechanism
        The leading hypothesis.
    fitted_polarities : str
        ``"both"``, ``"positive"`` or ``"negative"``: the bias points that were fitted.
    """
    law = ("symmetric in bias, I(-V) = -I(V), with one parameter set for both polarities"
           if mechanism.is_odd else
           "not symmetric in bias: its formula (and any parameter declared per electrode) "
           "differs between the polarities")
    fitted = {"both": "both polarities fitted jointly",
              "each": "both polarities fitted jointly, and each alone (see the polarity "
                      "comparison)",
              "positive": "positive bias only fitted",
              "negative": "negative bias only fitted"}.get(fitted_polarities, fitted_polarities)
    return f"{law}; {fitted}"


def _not_fitted_sentence(n_fitted: int, not_fitted: tuple[NotFittedMechanism, ...]) -> str:
    """Empty when every mechanism asked for was fitted; else who was left out, and that the
    probabilities are among the fitted ones only."""
    if not not_fitted:
        return ""
    counted = f"{n_fitted} mechanism{'' if n_fitted == 1 else 's'}"
    outside = [m.id for m in not_fitted if m.violations]
    stalled = [m.id for m in not_fitted if not m.violations]
    parts = ([f"not fitted (formula outside its validity on these data): {', '.join(outside)}"]
             if outside else [])
    parts += ([f"not fitted because the sampler could not start (no physics verdict): "
               f"{', '.join(stalled)}"] if stalled else [])
    return f" The probabilities are among the {counted} fitted; " + "; ".join(parts) + "."


def _skipped_sentence(skipped: tuple[SkippedMechanism, ...]) -> str:
    """Who was left out before fitting because the data do not show what it needs (or "")."""
    if not skipped:
        return ""
    return (" Not fitted because the screening rules them out on these data (see the reasons): "
            + ", ".join(m.id for m in skipped) + ".")


def _below_leader_sentence(below: tuple[BelowLeaderMechanism, ...]) -> str:
    """Who was not sampled because its best fit lies far below an evidence found (or "")."""
    if not below:
        return ""
    leaders = ", ".join(dict.fromkeys(m.leader_id for m in below))
    return (f" Not sampled because the best log-likelihood their mode search found lies over "
            f"{below[0].margin_nats:g} nats below the evidence of {leaders} (ln Z <= max ln L; "
            "--fit-all fits them): " + ", ".join(m.id for m in below) + ".")


def quick_run_prefix(quick: bool) -> str:
    """``"Quick run: a first look; quote numbers from a full run. "`` for a quick run."""
    return f"{QUICK_RUN_BANNER[0].upper()}{QUICK_RUN_BANNER[1:]}. " if quick else ""


#: The headline of a leader that fails its posterior predictive checks.
INADEQUATE_HEADLINE = "best of the candidates; none describes the data well"


def prior_odds_text(prior_odds: Mapping[str, float] | None) -> str:
    """``"equal prior odds"`` or ``"the stated prior odds (a: 2, b: 1)"``."""
    if not prior_odds:
        return "equal prior odds"
    return ("the stated prior odds ("
            + ", ".join(f"{k}: {v:g}" for k, v in prior_odds.items())
            + "; 1 for any mechanism not named)")


def failing_statistics(adequacy: AdequacyCheck) -> list[str]:
    """Each failed posterior predictive check: its statistic and what it means, in words.

    The thresholds are those of :mod:`mechid.inference.adequacy` (predictive p-values below
    ``MIN_PREDICTIVE_P``, a fitted-to-model-free noise ratio above ``MAX_NOISE_RATIO``).
    """
    failing = []
    if adequacy.predictive_p_runs < MIN_PREDICTIVE_P:
        failing.append(
            f"residual runs: {adequacy.residual_runs} runs of same-sign residuals along the bias "
            f"axis where about {adequacy.expected_runs:.0f} are expected (predictive "
            f"{_p_value(adequacy.predictive_p_runs)}), so the model's curve shape is "
            "systematically off")
    if adequacy.predictive_p_chi_square < MIN_PREDICTIVE_P:
        failing.append(
            f"chi-square predictive {_p_value(adequacy.predictive_p_chi_square)}: the residuals "
            "are larger than the fitted noise allows")
    ratio, scatter = adequacy.noise_ratio, adequacy.model_free_relative_noise
    if ratio is not None and scatter is not None and ratio > MAX_NOISE_RATIO:
        scatter_text = (f"{scatter:.2%}" if scatter >= NOISE_RESOLUTION
                        else f"below {NOISE_RESOLUTION:.2%}, counted as {NOISE_RESOLUTION:.2%}")
        failing.append(
            f"fitted relative noise {adequacy.fitted_relative_noise:.2%} is {ratio:.1f} times the "
            f"point-to-point scatter of the data ({scatter_text}), so the noise term absorbed a "
            "misfit and a reduced chi-square near 1 says nothing about the fit")
    return failing


def _p_value(p: float) -> str:
    """``"p = 0.0043"``; a p-value of 0 (no replicate as extreme) as ``"p < 0.005"``."""
    return f"p = {p:.2g}" if p > 0 else f"p < {REPLICATE_RESOLUTION:g}"


#: Resolution of a predictive p-value from the adequacy check's 200 replicated data sets.
REPLICATE_RESOLUTION = 1 / 200


def _format_parameter(name: str, summary: ParameterSummary) -> str:
    if summary.fixed:
        unit = "" if summary.unit in ("", "1") else f" {summary.unit}"
        return f"{name} = {summary.median:.4g}{unit} (held fixed)" + undetermined_note(summary.reasons)
    return (f"{name} = {format_estimate(summary.median, summary.ci68, summary.ci95, summary.unit)}"
            + undetermined_note(summary.reasons))


def verdict_sentence(best: MechanismResult, runner: MechanismResult | None, ln_b: float,
                     ln_b_err: float, strength: str, resolved: bool, *, n_candidates: int,
                     prior_odds: str = "equal prior odds") -> str:
    """The headline in plain words, with the numbers of the run.

    It names the candidate set and the prior odds the probability is conditional on, shows
    the probability as a bound near 0 or 1 (:func:`mechid.formatting.format_probability`),
    and, when the leader fails its posterior predictive checks, says so first, with the
    failing statistics, and gives no strength word: a Bayes factor between candidates that
    all fail only orders them.
    """
    physical = [k for k, s in best.parameters.items()
                if not k.startswith("noise_") and not s.fixed]
    params = "; ".join(_format_parameter(plain_parameter_name(k, best.parameters[k].unit),
                                         best.parameters[k]) for k in physical)
    probability = format_probability(best.probability)
    candidates = f"the {n_candidates} mechanisms fitted ({prior_odds})"
    not_resolved = "" if resolved else ", not resolved within the Monte Carlo error"
    if not best.fit_adequate:
        text = (f"{INADEQUATE_HEADLINE[0].upper()}{INADEQUATE_HEADLINE[1:]}: among {candidates}, "
                f"{best.name} ({best.id}) ranks first, but its fit fails the posterior "
                "predictive checks: " + "; ".join(failing_statistics(best.adequacy)) + ".")
        if runner is not None:
            text += (f" Its posterior probability ({probability} among the candidates) and "
                     f"ln B = {ln_b:.2f} ± {ln_b_err:.2f} against the runner-up, {runner.name}"
                     f"{not_resolved}, only order candidates that all fail; they do not show "
                     "that it is the conduction mechanism.")
        text += f" Parameters of this inadequate fit: {params}." if params else ""
        return text
    if runner is None:
        text = (f"{best.name} ({best.id}) is the only mechanism fitted, so no comparison was "
                "made")
    else:
        text = (f"Among {candidates}, {best.name} ({best.id}) is the most probable, with "
                f"posterior probability {probability} among the candidates; the Bayes factor "
                f"against the runner-up, {runner.name}, is ln B = {ln_b:.2f} ± {ln_b_err:.2f} "
                f"({strength} on the Kass & Raftery scale{not_resolved})")
    text += f". Parameters: {params}." if params else "."
    return text + " The fit is adequate (posterior predictive checks passed)."


def cautions(series: IVSeries, device: Device, results: list[MechanismResult],
             verdict: Verdict | None, asymmetry: PolarityAsymmetry | None = None, *,
             leader_symmetric: bool | None = None) -> list[str]:
    """Plain statements of what these data cannot distinguish, then how they were taken.

    ``asymmetry`` (the screening's polarity diagnostic) adds a caution when the polarities
    differ but the leading hypothesis is symmetric in bias (``leader_symmetric``).

    The second part, :func:`mechid.measurement.measurement_cautions`, names high voltage, high
    current density, cryogenic temperatures and disagreeing repeats when the data show them.
    """
    notes: list[str] = []
    temps = series.temperatures
    if len(temps) < 3:
        notes.append(f"only {len(temps)} temperature(s): the temperature dependence that separates "
                     "emission and hopping from tunnelling is poorly constrained")
    elif temps.max() / temps.min() < 1.5:
        notes.append(f"narrow temperature window ({temps.min():g}-{temps.max():g} K): activation "
                     "energies and hopping exponents are weakly determined")
    magnitude = np.abs(series.current_A[series.current_A != 0])
    if magnitude.size and np.log10(magnitude.max() / magnitude.min()) < 2:
        notes.append("the current spans fewer than two decades: straightened plots and exponents "
                     "are hard to tell apart")
    if not (np.any(series.voltage_V > 0) and np.any(series.voltage_V < 0)):
        notes.append("only one bias polarity was measured: bulk-limited (symmetric) and "
                     "electrode-limited (asymmetric) conduction cannot be told apart")
    if asymmetry is not None and asymmetry.asymmetric and verdict is not None and leader_symmetric:
        notes.append(f"the two bias polarities carry different currents ({asymmetry.sentence()}) "
                     f"but the leading hypothesis, {verdict.id}, is symmetric in bias: its "
                     "parameters average over both electrodes; compare the hypotheses whose "
                     "parameters differ between the polarities, or fit each polarity alone "
                     "(--polarity positive / negative)")
    emission_fitted = any(r.family == "emission" for r in results) or not results
    if device.optical_dielectric_constant is None and emission_fitted:
        notes.append("no optical dielectric constant was given: the dielectric constants read from "
                     "Schottky and Poole-Frenkel slopes cannot be checked against n^2")
    if device.thickness_nm is None:
        notes.append("no film thickness was given: field-dependent parameters are degenerate with "
                     "the thickness")
    if verdict is not None and not verdict.resolved:
        notes.append("the leading mechanism's margin is within twice the Monte Carlo error of the "
                     "evidences: run longer (without --quick) before quoting the ranking")
    if verdict is not None and not verdict.fit_adequate:
        notes.append("the leading mechanism fails its posterior predictive checks: report it as the "
                     "best of the candidates, not as the mechanism")
    for r in results:
        flags = [flag for flag in r.sampling.flags if flag.caution]
        if flags and (verdict is None or r.id in (verdict.id, verdict.runner_up)):
            notes.append(f"{r.id}: " + "; ".join(flag.meaning for flag in flags))
    # The leader and runner-up, like the sampler flags: a pull elsewhere does not change the
    # headline (every fitted mechanism's check is in its JSON entry, "validity").
    for r in results:
        if (r.validity is not None and r.validity.pulls
                and (verdict is None or r.id in (verdict.id, verdict.runner_up))):
            notes.append(r.validity.caution(r.id))
    return notes + measurement_cautions(series, device)
