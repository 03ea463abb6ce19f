"""How much do the Bayes factors depend on the catalogue ranges? (prior sensitivity)

Every uniform or log-uniform prior that comes from a catalogue range is made narrower (width
x0.5) and wider (width x2), all at once, and each mechanism's log evidence is recomputed:

* **Importance reweighting** of the posterior draws (an elementary identity; the dependence
  of Bayes factors on the prior is discussed by Kass & Raftery 1995, J. Am. Stat. Assoc. 90,
  773)::

      Z' = integral L pi' = Z * E_post[pi'(theta) / pi(theta)],

  exact when the new prior's support lies inside the old one. Its Monte Carlo error and the
  effective sample size of the weights (Kish 1965, Survey Sampling, Wiley: n_eff =
  (sum w)^2 / sum w^2; from memory) are reported; the chain's autocorrelation is accounted for by
  counting only its effective sample size.
* **Wider ranges.** The draws lie inside the old box, so the reweighting gives exactly the
  width term ``sum ln(w_old / w_new)`` (each widened parameter's flat-coordinate width) and
  misses whatever likelihood mass lies outside the old box. That mass is bounded by a measured
  criterion, :func:`edge_contact`: the share of draws in the outer :data:`EDGE_BAND_SHARE` of
  the old range at each end estimates the posterior density at the edge; continued flat over
  the added width it would add a relative mass ``share x added width / band width``. When
  ``ln(1 + sum of those)`` exceeds :data:`MISSED_MASS_LIMIT_NATS` the posterior is said to
  touch the edge, and the wider evidence comes from a short re-run with the wider ranges
  (:func:`refit_log_evidence`, quick settings) or is reported "not computable by
  reweighting" -- never as the width term alone. Since the wider box contains the old one,
  ``ln Z' >= ln Z + width term`` exactly; a re-run more than :data:`RERUN_SIGMAS` standard
  errors below that bound missed the posterior and is reported as not computable. A separate
  mode entirely outside the old box is not detected by the edge criterion (nothing was
  sampled there).

Choices (stated in the report):

* the flat coordinate of a prior is the value for a uniform prior (also when the sampler works
  in log10 of it) and log10 of the value for a log-uniform prior; widths are scaled there;
* narrower: the new interval of half the width is centred on the posterior median, shifted to
  lie inside the old range (so the reweighting is exact);
* wider: twice the width about the centre of the declared range, cut at the physical hard
  limits (:func:`hard_lower_limit`: a relative permittivity and an ideality factor are at
  least 1; the other
  linear-scale catalogue quantities -- energies, lengths, mass ratios -- are positive, so the
  range stops at zero; log-uniform ranges have no limit in log10); the width actually used is
  recorded;
* device-value priors (truncated normals) and the noise priors (same for every mechanism) are
  left unchanged, as are held parameters.
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue.base import ParameterHints
from mechid.inference.priors import Prior
from mechid.inference.settings import QUICK_LADDER, QUICK_SEARCH, LadderSettings, SearchSettings
from mechid.results import (
    BayesFactorUnderRanges,
    EvidenceUnderRanges,
    MechanismResult,
    PriorSensitivity,
)

#: Width factors applied to every catalogue range (x1 is the analysis itself).
WIDTH_SCALES = (0.5, 2.0)
#: Band at each end of the old range, as a share of its flat-coordinate width, whose share of
#: posterior draws estimates the posterior density at the edge.
EDGE_BAND_SHARE = 0.01
#: Bound on the likelihood mass the reweighting could miss beyond the old range (nats; the
#: evidence engine's own precision target, ``LadderSettings.target_sigma``, is 0.1).
MISSED_MASS_LIMIT_NATS = 0.1
#: A re-run whose ln Z' lies more than this many standard errors below the exact lower bound
#: ln Z + width term (the wider box contains the old one) is reported as failed.
RERUN_SIGMAS = 3.0
#: Fewest effective weighted draws for a reweighted value to be quoted.
MIN_EFFECTIVE_DRAWS = 20.0
#: Where a positive quantity sampled in log10 stops, as a share of its new upper end (the
#: log10 coordinate cannot reach zero; the width lost is below one part in a million).
LOG_SAMPLED_FLOOR_SHARE = 1e-6
#: The origin of a prior that this analysis rescales.
CATALOGUE_ORIGIN = "catalogue range"

#: Linear-scale parameters that cannot fall below 1, and why.
UNIT_LOWER_LIMITS = {
    "dielectric_constant": "a relative permittivity is at least 1",
    # Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007): n = 1 for pure thermionic
    # emission, larger when other transport adds (from memory).
    "ideality_factor": "an ideality factor is at least 1 (pure thermionic emission)",
}

REWEIGHTING = "reweighting"
REWEIGHTING_WIDTH_TERM = "width term (posterior clear of the old edges)"
QUICK_RERUN = "quick re-run with the wider ranges"
NOT_COMPUTABLE = "not computable by reweighting"


def is_rescaled(prior: Prior) -> bool:
    """True for a uniform or log-uniform prior taken from a catalogue range."""
    return prior.kind in ("uniform", "log_uniform") and prior.origin == CATALOGUE_ORIGIN


def to_flat(prior: Prior, internal: NDArray) -> NDArray:
    """Internal coordinate -> the coordinate in which the prior is flat.

    Log-uniform: log10 of the value (the internal coordinate itself); uniform: the value
    (``10**internal`` when the sampler works in log10 of it).
    """
    x = np.asarray(internal, dtype=float)
    return x if prior.kind == "log_uniform" else prior.to_physical(x)


def _from_flat(prior: Prior, flat: float) -> float:
    return float(10.0**flat) if prior.kind == "log_uniform" else float(flat)


def flat_bounds(prior: Prior) -> tuple[float, float]:
    """The prior's support in its flat coordinate."""
    if prior.kind == "log_uniform":
        return math.log10(prior.lower), math.log10(prior.upper)
    return prior.lower, prior.upper


def hard_lower_limit(prior: Prior) -> tuple[float | None, str]:
    """The physical lower limit a widened range stops at (flat coordinate), and why.

    A relative permittivity and a diode ideality factor are at least 1
    (:data:`UNIT_LOWER_LIMITS`); every other linear-scale catalogue quantity with a
    non-negative declared range (barrier heights, trap depths, activation energies, lengths,
    effective-mass ratios, variances) is non-negative, so its range stops at 0. A log-uniform
    range has no limit in log10; a range declared below zero has none either.
    """
    if prior.kind == "log_uniform":
        return None, ""
    if prior.name in UNIT_LOWER_LIMITS:
        return 1.0, UNIT_LOWER_LIMITS[prior.name]
    if prior.lower >= 0:
        return 0.0, "a quantity that cannot be negative"
    return None, ""


def rescaled_prior(prior: Prior, scale: float, flat_draws: NDArray) -> tuple[Prior, str]:
    """The prior with its flat-coordinate width times ``scale``, and the limit met (or "").

    ``scale <= 1``: centred on the posterior median of ``flat_draws``, shifted inside the old
    range. ``scale > 1``: about the centre of the old range, cut at :func:`hard_lower_limit`.
    """
    lo, hi = flat_bounds(prior)
    width = scale * (hi - lo)
    limit_note = ""
    if scale <= 1:
        start = float(np.clip(np.median(flat_draws) - width / 2, lo, hi - width))
        new_lo, new_hi = start, start + width
    else:
        centre = (lo + hi) / 2
        new_lo, new_hi = centre - width / 2, centre + width / 2
        hard, why = hard_lower_limit(prior)
        if hard is not None and new_lo < hard:
            new_lo, limit_note = hard, f"lower end held at {hard:g} ({why})"
            if hard <= 0 and prior.log_scale:
                new_lo = LOG_SAMPLED_FLOOR_SHARE * new_hi
    lower, upper = _from_flat(prior, new_lo), _from_flat(prior, new_hi)
    return replace(prior, lower=lower, upper=upper,
                   origin=f"{CATALOGUE_ORIGIN} x{scale:g}"), limit_note


def width_term(old: Sequence[Prior], new: Sequence[Prior]) -> float:
    """``sum ln(w_old / w_new)`` over the priors, widths in the flat coordinate."""
    total = 0.0
    for a, b in zip(old, new, strict=True):
        (alo, ahi), (blo, bhi) = flat_bounds(a), flat_bounds(b)
        total += math.log((ahi - alo) / (bhi - blo))
    return total


@dataclass(frozen=True)
class Reweighted:
    """``ln E_post[pi'/pi]`` from posterior draws, with its Monte Carlo error.

    Attributes
    ----------
    ln_shift : float
        ``ln Z' - ln Z`` (``-inf`` when no draw lies in the new support).
    ln_shift_err : float
        Standard error of ``ln_shift``: ``sd(w) / (mean(w) sqrt(n_eff))`` (delta method) with
        ``n_eff`` the chain's effective sample size, and at least ``1 / n_eff`` (a share of
        the posterior below one effective draw is not resolved).
    effective_sample_size : float
        Kish's ``(sum w)^2 / sum w^2``, scaled by the chain's effective share ``n_eff / n``.
    """

    ln_shift: float
    ln_shift_err: float
    effective_sample_size: float


def reweight(old: Sequence[Prior], new: Sequence[Prior], draws_internal: NDArray,
             chain_effective_size: float | None = None) -> Reweighted:
    """Importance reweighting of posterior draws from the priors ``old`` to ``new``.

    Parameters
    ----------
    old, new : sequence of Prior
        The priors of the sampled parameters, in the column order of ``draws_internal``
        (same internal coordinates).
    draws_internal : ndarray, shape (s, ndim)
        Posterior draws under ``old``.
    chain_effective_size : float, optional
        Effective sample size of the draws (autocorrelated chains); ``s`` when omitted.
    """
    draws = np.atleast_2d(np.asarray(draws_internal, dtype=float))
    n = draws.shape[0]
    n_eff = float(n if chain_effective_size is None else min(n, max(chain_effective_size, 1.0)))
    log_w = np.zeros(n)
    for column, (a, b) in enumerate(zip(old, new, strict=True)):
        if a == b:
            continue
        with np.errstate(invalid="ignore"):
            log_w = log_w + b.log_density(draws[:, column]) - a.log_density(draws[:, column])
    if not np.any(np.isfinite(log_w)):
        return Reweighted(-math.inf, math.nan, 0.0)
    top = float(np.max(log_w))
    w = np.exp(log_w - top)
    mean = float(np.mean(w))
    ln_shift = top + math.log(mean)
    relative_sd = float(np.std(w, ddof=1) / mean) if n > 1 else math.nan
    kish = float(np.sum(w) ** 2 / np.sum(w**2))
    # Equal weights (every draw inside the new box) give sd 0, but a posterior share below one
    # effective draw cannot be resolved: the error is at least 1/n_eff.
    return Reweighted(ln_shift, max(relative_sd / math.sqrt(n_eff), 1.0 / n_eff),
                      kish * n_eff / n)


@dataclass(frozen=True)
class EdgeContact:
    """Does the posterior reach the old range's edges? (for the wider ranges)

    Attributes
    ----------
    missed_mass_bound : float
        ``ln(1 + sum_j share_j x added_j / band_j)``: the likelihood mass (nats) beyond the
        old range if the posterior density at each edge continued flat over the added width.
    parameters : tuple of str
        Parameters with draws in an edge band (contributing to the bound).
    touches : bool
        ``missed_mass_bound > MISSED_MASS_LIMIT_NATS``.
    """

    missed_mass_bound: float
    parameters: tuple[str, ...]
    touches: bool


def edge_contact(old: Sequence[Prior], new: Sequence[Prior], draws_internal: NDArray) -> EdgeContact:
    """The measured criterion for the wider ranges (see the module notes)."""
    draws = np.atleast_2d(np.asarray(draws_internal, dtype=float))
    total, named = 0.0, []
    for column, (a, b) in enumerate(zip(old, new, strict=True)):
        if a == b:
            continue
        flat = to_flat(a, draws[:, column])
        (lo, hi), (new_lo, new_hi) = flat_bounds(a), flat_bounds(b)
        band = EDGE_BAND_SHARE * (hi - lo)
        share_lo, share_hi = float(np.mean(flat <= lo + band)), float(np.mean(flat >= hi - band))
        added = share_lo * max(lo - new_lo, 0.0) / band + share_hi * max(new_hi - hi, 0.0) / band
        if added > 0:
            named.append(a.name)
        total += added
    bound = math.log1p(total)
    return EdgeContact(bound, tuple(named), bound > MISSED_MASS_LIMIT_NATS)


#: ``refit(mechanism_id, new_priors) -> (ln Z, its error)``: a re-run with other ranges.
Refit = Callable[[str, tuple[Prior, ...]], tuple[float, float]]


def evidence_under_ranges(
    mechanism_id: str,
    priors: Sequence[Prior],
    draws_internal: NDArray,
    scale: float,
    log_evidence: float,
    log_evidence_err: float,
    chain_effective_size: float | None = None,
    refit: Refit | None = None,
) -> EvidenceUnderRanges:
    """One mechanism's log evidence with every catalogue range's width times ``scale``.

    Parameters
    ----------
    mechanism_id : str
        For the record.
    priors : sequence of Prior
        Every prior of the fit (held ones included), in the fit's order.
    draws_internal : ndarray, shape (s, ndim)
        Posterior draws of the free parameters in internal coordinates.
    scale : float
        Width factor.
    log_evidence, log_evidence_err : float
        The fit's ln Z and error (a re-run's shift is measured against them).
    chain_effective_size : float, optional
        Effective sample size of the draws.
    refit : callable, optional
        Re-run used when the wider posterior touches the old edges; without it such a case
        is reported as not computable by reweighting.
    """
    free = [p for p in priors if not p.is_fixed]
    draws = np.atleast_2d(np.asarray(draws_internal, dtype=float))
    new, limits = [], []
    for column, prior in enumerate(free):
        if is_rescaled(prior):
            changed, note = rescaled_prior(prior, scale, to_flat(prior, draws[:, column]))
            new.append(changed)
            if note:
                limits.append(f"{prior.name}: {note}")
        else:
            new.append(prior)
    ranges = {b.name: (b.lower, b.upper) for a, b in zip(free, new, strict=True) if a != b}
    exact = width_term(free, new)
    common = dict(mechanism_id=mechanism_id, scale=scale, width_term=exact, ranges=ranges,
                  limits=tuple(limits))
    if not ranges:
        return EvidenceUnderRanges(method="no catalogue range to rescale", ln_evidence_shift=0.0,
                                   ln_evidence_shift_err=0.0, effective_sample_size=math.nan,
                                   edge_parameters=(), missed_mass_bound=0.0, **common)
    if scale <= 1:
        found = reweight(free, new, draws, chain_effective_size)
        enough = found.effective_sample_size >= MIN_EFFECTIVE_DRAWS
        return EvidenceUnderRanges(
            method=REWEIGHTING if enough else
            f"{NOT_COMPUTABLE} (effective sample size {found.effective_sample_size:.1f} "
            f"< {MIN_EFFECTIVE_DRAWS:g})",
            ln_evidence_shift=found.ln_shift if enough else math.nan,
            ln_evidence_shift_err=found.ln_shift_err if enough else math.nan,
            effective_sample_size=found.effective_sample_size, edge_parameters=(),
            missed_mass_bound=0.0, **common)
    edge = edge_contact(free, new, draws)
    if not edge.touches:
        return EvidenceUnderRanges(
            method=REWEIGHTING_WIDTH_TERM, ln_evidence_shift=exact, ln_evidence_shift_err=0.0,
            effective_sample_size=float(draws.shape[0] if chain_effective_size is None
                                        else min(draws.shape[0], chain_effective_size)),
            edge_parameters=edge.parameters, missed_mass_bound=edge.missed_mass_bound, **common)
    if refit is None:
        return EvidenceUnderRanges(
            method=f"{NOT_COMPUTABLE} (posterior touches the old edge of "
            f"{', '.join(edge.parameters)}; no re-run)",
            ln_evidence_shift=math.nan, ln_evidence_shift_err=math.nan,
            effective_sample_size=math.nan, edge_parameters=edge.parameters,
            missed_mass_bound=edge.missed_mass_bound, **common)
    full_new = tuple(next((b for b in new if b.name == p.name), p) for p in priors)
    ln_z, ln_z_err = refit(mechanism_id, full_new)
    shift, error = ln_z - log_evidence, float(np.hypot(ln_z_err, log_evidence_err))
    method = QUICK_RERUN
    if not (math.isfinite(shift) and math.isfinite(error)):
        method = f"{NOT_COMPUTABLE} (the quick re-run gave no finite ln Z' and error)"
        shift, error = math.nan, math.nan
    elif shift + RERUN_SIGMAS * error < exact:
        # The wider box contains the old one, so Z' >= (w/w') Z exactly: a re-run below that
        # bound did not find the posterior the first fit sampled.
        method = (f"{NOT_COMPUTABLE} (the quick re-run gave ln Z' - ln Z = {shift:.2f} ± "
                  f"{error:.2f}, below the exact lower bound {exact:.2f}: it missed the "
                  "posterior)")
        shift, error = math.nan, math.nan
    return EvidenceUnderRanges(
        method=method, ln_evidence_shift=shift, ln_evidence_shift_err=error,
        effective_sample_size=math.nan, edge_parameters=edge.parameters,
        missed_mass_bound=edge.missed_mass_bound, **common)


def refit_log_evidence(
    fit,  # mechid.inference.fit.MechanismFit (imported lazily: fit imports results)
    priors: Sequence[Prior],
    rng: np.random.Generator,
    ladder: LadderSettings = QUICK_LADDER,
    search: SearchSettings = QUICK_SEARCH,
) -> tuple[float, float]:
    """ln Z and its error of a fitted mechanism re-run with other catalogue ranges.

    The mechanism's declared ranges are replaced by the ``priors``' supports (log-uniform and
    uniform catalogue priors only; device and noise priors come out as before) and the whole
    fit (:func:`mechid.inference.fit.fit_mechanism`) runs again on the same points, its mode
    search seeded with the first fit's best point (``map_parameters``).
    """
    from mechid.inference.fit import fit_mechanism

    mechanism = fit.target.mechanism
    changed = {p.name: p for p in priors
               if p.kind in ("uniform", "log_uniform") and p.origin.startswith(CATALOGUE_ORIGIN)}
    parameters = tuple(
        replace(p, lower=changed[p.name].lower, upper=changed[p.name].upper)
        if p.name in changed else p for p in mechanism.parameters)
    widened = replace(mechanism, parameters=parameters)
    start = {name: float(value) for name, value in fit.result.map_parameters.items()
             if name in changed}
    hints = ParameterHints(mechanism.id, {k: v for k, v in start.items()
                                          if changed[k].lower < v < changed[k].upper})
    target = fit.target
    again = fit_mechanism(widened, target.voltage_V, target.temperature_K, target.current_A,
                          target.device, ladder, rng, hints, search=search,
                          noise_law=target.noise_law)
    return again.result.log_evidence, again.result.log_evidence_err


def compare_under_ranges(
    ranked: Sequence[tuple[str, float, float]],
    evidences: Mapping[tuple[str, float], EvidenceUnderRanges],
    scales: Sequence[float] = WIDTH_SCALES,
) -> tuple[BayesFactorUnderRanges, ...]:
    """ln B of the leader against every other mechanism at each width factor.

    ``ranked`` is ``(id, ln Z, ln Z error)`` in ranking order (the leader first); the columns
    are the scales sorted with 1 (the analysis) among them.
    """
    columns = sorted({1.0, *scales})
    leader, ln_z_leader, _ = ranked[0]
    comparisons = []
    for other, ln_z_other, _ in ranked[1:]:
        values, errors, methods = [], [], []
        for scale in columns:
            if scale == 1.0:
                values.append(ln_z_leader - ln_z_other)
                errors.append(0.0)
                methods.append("analysis")
                continue
            a, b = evidences[(leader, scale)], evidences[(other, scale)]
            values.append(ln_z_leader + a.ln_evidence_shift - ln_z_other - b.ln_evidence_shift)
            errors.append(float(np.hypot(a.ln_evidence_shift_err, b.ln_evidence_shift_err)))
            methods.append(a.method if a.method == b.method else f"{a.method} | {b.method}")
        base = values[columns.index(1.0)]
        shifts = [abs(v - base) for v in values if math.isfinite(v)]
        finite = [i for i, v in enumerate(values) if math.isfinite(v)]
        largest = max(shifts) if shifts else math.nan
        where = max(finite, key=lambda i: abs(values[i] - base)) if finite else 0
        comparisons.append(BayesFactorUnderRanges(
            leader=leader, other=other, scales=tuple(columns), ln_bayes_factor=tuple(values),
            shift_err=tuple(errors), methods=tuple(methods), largest_shift=largest,
            largest_shift_err=errors[where] if finite else math.nan,
            complete=len(finite) == len(columns)))
    return tuple(comparisons)


def summary_sentence(comparisons: Sequence[BayesFactorUnderRanges],
                     evidences: Sequence[EvidenceUnderRanges] = ()) -> str:
    """"ln B moves by at most X when every catalogue range is halved or doubled" and more.

    Names the leader's and runner-up's parameters whose posterior reached a declared range's
    edge (re-fitted with the doubled ranges): a large shift then says that the range, not
    the data, held that mechanism back.
    """
    if not comparisons:
        return "only one mechanism fitted: no Bayes factor to test"
    runner = comparisons[0]
    values = ", ".join(f"{v:.2f}" if math.isfinite(v) else "n/a" for v in runner.ln_bayes_factor)
    scales = "/".join(f"x{s:g}" for s in runner.scales)
    text = (f"ln B ({runner.leader} vs runner-up {runner.other}) moves by at most "
            f"{runner.largest_shift:.2f} ± {runner.largest_shift_err:.2f} when every catalogue "
            f"range is halved or doubled (ln B at {scales}: {values})")
    if not runner.complete:
        text += "; not computable by reweighting at some widths (see methods)"
    at_edge = [f"{e.mechanism_id} ({', '.join(e.edge_parameters)})" for e in evidences
               if e.method == QUICK_RERUN and e.mechanism_id in (runner.leader, runner.other)]
    if at_edge:
        text += ("; re-fitted with the doubled ranges because the posterior reaches a declared "
                 "range's edge: " + ", ".join(at_edge))
    overall = [c.largest_shift for c in comparisons if math.isfinite(c.largest_shift)]
    if len(comparisons) > 1 and overall:
        text += f"; against every fitted mechanism at most {max(overall):.2f}"
    flips = [c.other for c in comparisons
             if any(math.isfinite(v) and v < 0 for v in c.ln_bayes_factor)]
    if flips:
        text += f"; the order changes against {', '.join(flips)}"
    return text


def prior_sensitivity(
    ranked: Sequence[tuple[str, float, float]],
    priors: Mapping[str, Sequence[Prior]],
    draws_internal: Mapping[str, NDArray],
    chain_effective_size: Mapping[str, float],
    refit: Refit | None = None,
    refit_ids: Sequence[str] = (),
    scales: Sequence[float] = WIDTH_SCALES,
) -> PriorSensitivity:
    """The whole prior-sensitivity record of an analysis.

    Parameters
    ----------
    ranked : sequence of (id, ln Z, ln Z error)
        Fitted mechanisms in ranking order.
    priors, draws_internal, chain_effective_size : mapping
        Per mechanism id: the fit's priors, its posterior draws (internal coordinates) and
        their effective sample size.
    refit : callable, optional
        Re-run for a wider posterior that touches the old edges.
    refit_ids : sequence of str
        Mechanisms allowed a re-run (the others are then "not computable by reweighting").
    scales : sequence of float
        Width factors.
    """
    evidences: dict[tuple[str, float], EvidenceUnderRanges] = {}
    for mechanism_id, ln_z, ln_z_err in ranked:
        for scale in scales:
            evidences[(mechanism_id, scale)] = evidence_under_ranges(
                mechanism_id, priors[mechanism_id], draws_internal[mechanism_id], scale,
                ln_z, ln_z_err, chain_effective_size.get(mechanism_id),
                refit if mechanism_id in refit_ids else None)
    comparisons = compare_under_ranges(ranked, evidences, scales)
    finite = [c.largest_shift for c in comparisons if math.isfinite(c.largest_shift)]
    return PriorSensitivity(
        computed=True, reason="", scales=tuple(sorted({1.0, *scales})),
        largest_shift=max(finite) if finite else math.nan,
        sentence=summary_sentence(comparisons, tuple(evidences.values())),
        comparisons=comparisons,
        evidences=tuple(evidences.values()))


def not_computed(reason: str) -> PriorSensitivity:
    """The record of a run without a comparison (screen-only, a single mechanism)."""
    return PriorSensitivity(computed=False, reason=reason, scales=(), largest_shift=math.nan,
                            sentence=f"prior sensitivity not computed: {reason}",
                            comparisons=(), evidences=())


def sensitivity_of_fits(fits: Mapping[str, Any], results: Sequence[MechanismResult],
                        rng: np.random.Generator, n_refits: int = 2) -> PriorSensitivity:
    """The prior-sensitivity record of an analysis, from its fits and ranked results.

    Parameters
    ----------
    fits : mapping
        :class:`mechid.inference.fit.MechanismFit` by mechanism id.
    results : sequence of MechanismResult
        The ranked results (leader first).
    rng : numpy.random.Generator
        Source of the re-runs' streams (one spawned per re-run candidate, after the fits').
    n_refits : int
        How many of the top-ranked mechanisms may be re-run with the doubled ranges when their
        posterior reaches a range edge (the analysis: 2, leader and runner-up); the others
        are then reported as not computable by reweighting.
    """
    if len(results) < 2:
        return not_computed("fewer than two mechanisms fitted: no Bayes factor")
    candidates = [r.id for r in results[:n_refits]]
    streams = dict(zip(candidates, rng.spawn(len(candidates)), strict=True))

    def refit(mechanism_id: str, priors: tuple[Prior, ...]) -> tuple[float, float]:
        with warnings.catch_warnings():  # its error bar says how good the quick re-run is
            warnings.simplefilter("ignore")
            return refit_log_evidence(fits[mechanism_id], priors, streams[mechanism_id])

    return prior_sensitivity(
        [(r.id, r.log_evidence, r.log_evidence_err) for r in results],
        {r.id: fits[r.id].target.priors for r in results},
        {r.id: fits[r.id].draws_internal for r in results},
        {r.id: r.sampling.effective_sample_size for r in results},
        refit=refit, refit_ids=tuple(streams))
