"""The report's words: headline numbers, methods and results paragraphs, references.

Everything here reads the plain-JSON form of the result (``to_plain_json(result)``),
so every number a reader sees is formatted from the same value that is in the JSON file.
The paragraphs are written from the run's own numbers and cite the published methods, so
they can be pasted into a manuscript or a referee response and edited.

Citations of the conduction mechanisms are read from each mechanism's ``source`` declaration
in :mod:`mechid.catalogue`; the method references below are those of the statistical
machinery (bibliographic details from memory, checked against the sources named in the
module docstrings of :mod:`mechid.inference`).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any

from mechid.catalogue import get_mechanism
from mechid.errors import UnknownMechanismError
from mechid.formatting import (
    format_estimate,
    format_number,
    format_probability,
    last_digit_for,
    undetermined_note,
)
from mechid.inference.adequacy import MAX_NOISE_RATIO, MIN_PREDICTIVE_P
from mechid.results import INTERVALS_CAVEAT

Json = Mapping[str, Any]

#: References of the methods, keyed by the short form used in the text.
METHOD_REFERENCES: dict[str, str] = {
    "Rocke & Durbin 2001": "D. M. Rocke and B. Durbin, A model for measurement error for gene "
                           "expression arrays, J. Comput. Biol. 8, 557-569 (2001).",
    "Durbin et al. 2002": "B. P. Durbin, J. S. Hardin, D. M. Hawkins and D. M. Rocke, A "
                          "variance-stabilizing transformation for gene-expression microarray "
                          "data, Bioinformatics 18, Suppl. 1, S105-S110 (2002).",
    "Lange, Little & Taylor 1989": "K. L. Lange, R. J. A. Little and J. M. G. Taylor, Robust "
                                   "statistical modeling using the t distribution, J. Am. Stat. "
                                   "Assoc. 84, 881-896 (1989).",
    "Sze & Ng 2007": "S. M. Sze and K. K. Ng, Physics of Semiconductor Devices, 3rd ed. "
                     "(Wiley, 2007).",
    "Dowell & Jarratt 1971": "M. Dowell and P. Jarratt, A modified regula falsi method for "
                             "computing the root of an equation, BIT 11, 168-174 (1971).",
    "Huber 1964": "P. J. Huber, Robust estimation of a location parameter, Ann. Math. Statist. "
                  "35, 73-101 (1964).",
    "Zabrodskii & Zinov'eva 1984": "A. G. Zabrodskii and K. N. Zinov'eva, Low-temperature "
                                   "conductivity and metal-insulator transition in compensated "
                                   "n-Ge, Sov. Phys. JETP 59, 425 (1984).",
    "Goodman & Weare 2010": "J. Goodman and J. Weare, Ensemble samplers with affine invariance, "
                            "Commun. Appl. Math. Comput. Sci. 5, 65-80 (2010).",
    "Foreman-Mackey et al. 2013": "D. Foreman-Mackey, D. W. Hogg, D. Lang and J. Goodman, "
                                  "emcee: The MCMC Hammer, Publ. Astron. Soc. Pac. 125, "
                                  "306-312 (2013).",
    "Geyer 1991": "C. J. Geyer, Markov chain Monte Carlo maximum likelihood, in Computing "
                  "Science and Statistics: Proc. 23rd Symposium on the Interface, 156-163 (1991).",
    "Fan et al. 2011": "Y. Fan, R. Wu, M.-H. Chen, L. Kuo and P. O. Lewis, Choosing among "
                       "partition models in Bayesian phylogenetics, Mol. Biol. Evol. 28, 523-532 "
                       "(2011).",
    "ter Braak 2006": "C. J. F. ter Braak, A Markov chain Monte Carlo version of the genetic "
                      "algorithm Differential Evolution, Stat. Comput. 16, 239-249 (2006).",
    "ter Braak & Vrugt 2008": "C. J. F. ter Braak and J. A. Vrugt, Differential Evolution Markov "
                              "chain with snooker updater and fewer chains, Stat. Comput. 18, "
                              "435-446 (2008).",
    "Xie et al. 2011": "W. Xie, P. O. Lewis, Y. Fan, L. Kuo and M.-H. Chen, Improving marginal "
                       "likelihood estimation for Bayesian phylogenetic model selection, Syst. "
                       "Biol. 60, 150-160 (2011).",
    "Friel, Hurn & Wyse 2014": "N. Friel, M. Hurn and J. Wyse, Improving power posterior "
                               "estimation of statistical evidence, Stat. Comput. 24, 709-723 "
                               "(2014).",
    "Meng & Wong 1996": "X.-L. Meng and W. H. Wong, Simulating ratios of normalizing constants "
                        "via a simple identity: a theoretical exploration, Statistica Sinica 6, "
                        "831-860 (1996).",
    "Kass & Raftery 1995": "R. E. Kass and A. E. Raftery, Bayes factors, J. Am. Stat. Assoc. "
                           "90, 773-795 (1995).",
    "Gelman, Meng & Stern 1996": "A. Gelman, X.-L. Meng and H. Stern, Posterior predictive "
                                 "assessment of model fitness via realized discrepancies, "
                                 "Statistica Sinica 6, 733-807 (1996).",
    "Wald & Wolfowitz 1940": "A. Wald and J. Wolfowitz, On a test whether two samples are from "
                             "the same population, Ann. Math. Statist. 11, 147-162 (1940).",
    "Rice 1984": "J. Rice, Bandwidth choice for nonparametric regression, Ann. Statist. 12, "
                 "1215-1230 (1984).",
    "Foreman-Mackey 2016": "D. Foreman-Mackey, corner.py: Scatterplot matrices in Python, "
                           "J. Open Source Softw. 1(2), 24 (2016).",
}


# --------------------------------------------------------------------------------------------
# Number formatting (one place, so the HTML, the console and the tests agree)
# --------------------------------------------------------------------------------------------


def is_number(value: Any) -> bool:
    """True for a finite int or float (JSON null and NaN are not numbers here)."""
    return isinstance(value, int | float) and not isinstance(value, bool) and math.isfinite(value)


def fmt(value: Any, spec: str = ".4g", missing: str = "n/a") -> str:
    """Format a JSON number with a format spec, ``"last:N"`` (print down to the digit
    10**N, :func:`mechid.formatting.format_number`) or ``"prob"`` (a posterior probability,
    :func:`mechid.formatting.format_probability`); ``missing`` for null/NaN."""
    if not is_number(value):
        return missing
    if spec == PROBABILITY_SPEC:
        return format_probability(float(value))
    if spec.startswith("last:"):
        return format_number(float(value), int(spec[5:]))
    return format(value, spec)


def estimate_spec(summary: Json) -> str:
    """The format of a parameter's median and intervals, as in the verdict sentence.

    Same rule as :func:`mechid.formatting.format_estimate`: two significant digits when the
    68 % interval spans more than a factor 3, otherwise down to the digit set by the width of
    the 68 % interval.
    """
    lo, hi = summary.get("ci68") or (None, None)
    if not (is_number(lo) and is_number(hi)):
        return ".4g"
    if lo > 0 and hi / lo > 3:
        return ".2g"
    last = last_digit_for(hi - lo)
    return ".4g" if last is None else f"last:{max(last, -30)}"


#: The :func:`fmt` spec of a posterior probability ("> 0.999", "0.873", "< 0.001").
PROBABILITY_SPEC = "prob"


def fmt_probability(value: Any) -> str:
    """Posterior probability as in the verdict sentence: a bound near 0 or 1, never "1"."""
    return fmt(value, PROBABILITY_SPEC)


def fmt_ln(value: Any) -> str:
    """ln Z, ln B and their errors (2 decimals, as in the verdict sentence; 4 significant
    digits beyond 1e7, where a failed estimator would otherwise print dozens of digits)."""
    return fmt(value, ".2f" if not is_number(value) or abs(value) < 1e7 else ".4g")


def unit_suffix(unit: str | None) -> str:
    """`` eV`` for a unit, empty for dimensionless."""
    return "" if unit in (None, "", "1") else f" {unit}"


def parameter_text(name: str, summary: Json) -> str:
    """``name = median unit (68 %: lo to hi; 95 %: lo to hi)`` with the sentence's precision."""
    unit = unit_suffix(summary.get("unit"))
    lo68, hi68 = summary.get("ci68") or (None, None)
    lo95, hi95 = summary.get("ci95") or (None, None)
    values = (summary.get("median"), lo68, hi68, lo95, hi95)
    note = undetermined_note(summary.get("reasons") or [])
    if summary.get("fixed") or not all(is_number(v) for v in values):
        return f"{name} = {fmt(summary.get('median'))}{unit}" + (
            " (held fixed)" if summary.get("fixed") else "") + note
    return f"{name} = " + format_estimate(float(values[0]), (float(lo68), float(hi68)),
                                         (float(lo95), float(hi95)), summary.get("unit") or "") + note


def undetermined(mechanism: Json) -> list[tuple[str, list[str]]]:
    """(symbol, reasons) of each physical parameter the data do not determine."""
    return [(parameter_symbol(str(mechanism.get("id")), name), list(s.get("reasons") or []))
            for name, s in (mechanism.get("parameters") or {}).items()
            if not name.startswith("noise_") and s.get("determined") is False]


def key_parameters(mechanism: Json) -> list[tuple[str, Json]]:
    """Physical (non-noise), free parameters of a mechanism entry, in declaration order."""
    return [(name, s) for name, s in (mechanism.get("parameters") or {}).items()
            if not name.startswith("noise_") and not s.get("fixed")]


def parameter_symbol(mechanism_id: str, name: str) -> str:
    """The catalogue symbol of a parameter (the name itself for noise parameters)."""
    try:
        return get_mechanism(mechanism_id).parameter(name).symbol
    except UnknownMechanismError:
        return name


def mechanism_name(mechanism_id: str, data: Json | None = None) -> str:
    """Human name of a mechanism: from the result when fitted, else from the catalogue."""
    for m in (data or {}).get("mechanisms") or []:
        if m.get("id") == mechanism_id:
            return str(m.get("name"))
    return get_mechanism(mechanism_id).name


def _join(items: Sequence[str], last: str = "and") -> str:
    items = [i for i in items if i]
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + f" {last} " + items[-1]


# --------------------------------------------------------------------------------------------
# The case against each mechanism
# --------------------------------------------------------------------------------------------


def screening_entry(data: Json, mechanism_id: str) -> Json | None:
    """The linearisation entry of one mechanism (plain JSON), or None."""
    for entry in (data.get("linearisation") or {}).get("mechanisms") or []:
        if entry.get("mechanism_id") == mechanism_id:
            return entry
    return None


def _declared_for(mechanism_id: str, quantity: str):  # noqa: ANN202 (a Parameter or None)
    """The mechanism parameter a screening quantity estimates: same stem and same unit suffix.

    ``barrier_height_from_intercept_assuming_unit_mass_eV`` estimates ``barrier_height_eV``;
    the longest matching stem wins. None when no parameter matches or the id is unknown.
    """
    from mechid.catalogue import get_mechanism
    from mechid.errors import UnknownMechanismError

    try:
        parameters = get_mechanism(mechanism_id).parameters
    except UnknownMechanismError:
        return None
    matches = []
    for parameter in parameters:
        stem, _, suffix = parameter.name.rpartition("_")
        if stem and quantity.startswith(stem) and quantity.endswith(f"_{suffix}"):
            matches.append((len(stem), parameter))
        elif quantity == parameter.name:
            matches.append((len(parameter.name), parameter))
    return max(matches, key=lambda match: match[0])[1] if matches else None


def screening_quantity_note(mechanism_id: str, quantity_key: str, value: Any) -> str:
    """A note when a straightened-plot number lies outside the catalogue range of the parameter
    it estimates (then the line does not describe that mechanism on these data), else ``""``.

    ``quantity_key`` is ``"<plot_id>.<quantity>"`` as in the linearisation summary.
    """
    if not is_number(value):
        return ""
    parameter = _declared_for(mechanism_id, quantity_key.split(".", 1)[-1])
    if parameter is None or parameter.lower <= value <= parameter.upper:
        return ""
    return (f"outside the catalogue range of {parameter.name} ({fmt(parameter.lower, 'g')} to "
            f"{fmt(parameter.upper, 'g')}{unit_suffix(parameter.unit)}): no physical reading of "
            "this line for this mechanism")


def failed_checks(data: Json, mechanism_id: str) -> list[Json]:
    """The consistency checks of the mechanism's straightened plots that failed."""
    entry = screening_entry(data, mechanism_id) or {}
    return [c for c in entry.get("checks") or [] if c.get("passed") is False]


def case_against(data: Json, mechanism: Json) -> list[str]:
    """Plain reasons why a fitted mechanism is not the answer (empty for a sound leader).

    Uses the evidence against the leader (Kass & Raftery wording), the adequacy checks and
    the failed consistency checks of its straightened plots.
    """
    from mechid.inference.compare import kass_raftery_wording

    reasons = []
    ln_b = mechanism.get("ln_bayes_factor_vs_best")
    if is_number(ln_b) and ln_b < 0:
        err = mechanism.get("ln_bayes_factor_vs_best_err")
        reasons.append(f"ln B = {fmt_ln(ln_b)} ± {fmt_ln(err)} relative to the leader "
                       f"(Kass & Raftery: {kass_raftery_wording(-ln_b)})")
    elif ln_b is None and mechanism.get("log_evidence") is None:
        reasons.append("its evidence could not be estimated")
    if not mechanism.get("fit_adequate"):
        adequacy_reasons = (mechanism.get("adequacy") or {}).get("reasons") or []
        reasons.append("fit not adequate"
                       + (": " + "; ".join(adequacy_reasons) if adequacy_reasons else ""))
    failed = failed_checks(data, str(mechanism.get("id")))
    if failed:
        reasons.append("failed straightened-plot checks: "
                       + "; ".join(str(c.get("name")).replace("_", " ") for c in failed))
    return reasons


def case_against_short(data: Json, mechanism: Json) -> str:
    """One-line summary of :func:`case_against` for the ranking table."""
    from mechid.inference.compare import kass_raftery_wording

    parts = []
    ln_b = mechanism.get("ln_bayes_factor_vs_best")
    if is_number(ln_b) and ln_b < 0:
        parts.append(f"ln B = {fmt_ln(ln_b)} ({kass_raftery_wording(-ln_b)})")
    if not mechanism.get("fit_adequate"):
        parts.append("inadequate fit")
    n_failed = len(failed_checks(data, str(mechanism.get("id"))))
    if n_failed:
        parts.append(f"{n_failed} failed check{'s' if n_failed > 1 else ''}")
    return "; ".join(parts)


# --------------------------------------------------------------------------------------------
# Methods
# --------------------------------------------------------------------------------------------


def _data_sentence(data: Json) -> str:
    inp = data.get("input") or {}
    t_range = inp.get("temperature_range_K") or [None, None]
    v_range = inp.get("voltage_range_V") or [None, None]
    excluded = inp.get("n_excluded") or 0
    reasons = inp.get("n_excluded_by_reason") or {}
    excluded_text = ""
    if excluded:
        excluded_text = (f"; {excluded} point(s) were excluded before the analysis ("
                         + "; ".join(f"{n}: {r}" for r, n in reasons.items()) + ")")
    polarity = inp.get("polarity", "both")
    polarity_text = {"both": "both bias polarities fitted jointly",
                     "each": "both bias polarities fitted jointly, and each polarity fitted "
                             "alone for the comparison of shared and separate parameters",
                     "positive": "positive bias only", "negative": "negative bias only"}.get(
                         polarity, str(polarity))
    window = inp.get("window") or {}
    limits = []
    if window.get("bias_abs_V"):
        lo, hi = window["bias_abs_V"]
        limits.append(f"{fmt(lo, 'g')} V <= |V| <= {fmt(hi, 'g')} V")
    if window.get("temperature_K"):
        lo, hi = window["temperature_K"]
        limits.append(f"{fmt(lo, 'g')} K <= T <= {fmt(hi, 'g')} K")
    if limits:
        excluded_text += (f"; the analysis was restricted to {' and '.join(limits)}, which left "
                          f"out {window.get('n_points_outside')} point(s)")
    return (f"The series holds {inp.get('n_points')} points at {inp.get('n_temperatures')} "
            f"temperature(s) from {fmt(t_range[0], 'g')} to {fmt(t_range[1], 'g')} K and biases "
            f"from {fmt(v_range[0], 'g')} to {fmt(v_range[1], 'g')} V, spanning "
            f"{fmt(inp.get('current_decades'), '.1f')} decades of current{excluded_text}; "
            f"{inp.get('n_points_fitted', inp.get('n_points'))} points entered the joint fit "
            f"({polarity_text}).")


def polarity_comparison_lines(data: Json) -> list[str]:
    """One sentence per mechanism of a ``--polarity each`` run: shared or separate parameters."""
    lines = []
    for entry in data.get("polarity_comparison") or []:
        mechanism = entry.get("mechanism_id")
        ln_b, err = entry.get("ln_bayes_factor_separate_vs_shared"), entry.get(
            "ln_bayes_factor_separate_vs_shared_err")
        choice = {"separate": "the polarities need parameters of their own",
                  "shared": "one parameter set serves both polarities",
                  "undecided": "the data do not decide"}.get(entry.get("preferred"), "n/a")
        sides = []
        for side in ("positive", "negative"):
            params = entry.get(f"parameters_{side}") or {}
            shown = [parameter_text(name, summary) for name, summary in params.items()
                     if not name.startswith("noise_") and not summary.get("fixed")]
            if shown:
                sides.append(f"{side} bias: " + "; ".join(shown))
        lines.append(f"{mechanism_name(str(mechanism), data)}: ln B(separate vs shared) = "
                     f"{fmt_ln(ln_b)} ± {fmt_ln(err)}: {choice}"
                     + (" (" + " | ".join(sides) + ")" if sides else ""))
    return lines


def _ladder_sentence(settings: Json) -> str:
    ladder = settings.get("ladder") or {}
    k = ladder.get("n_temperatures")
    power = ladder.get("beta_power")
    walkers = ladder.get("n_walkers")
    walkers_text = (f"{walkers} walkers per rung" if is_number(walkers)
                    else "max(32, 4 x number of sampled parameters) walkers per rung")
    text = (f"Each mechanism was fitted jointly to all temperatures with shared physical "
            f"parameters. A maximum a posteriori search and a short emcee run at the posterior "
            f"(Foreman-Mackey et al. 2013) fixed a multivariate Student-t reference distribution; "
            f"the posterior was then sampled on a parallel-tempered ladder (Geyer 1991) of {k} "
            f"distributions r^(1−β) (L π)^β from that reference to the posterior, with "
            f"β_k = (k/(K−1))^{fmt(power, 'g')} (generalised stepping-stone, Fan et al. 2011), "
            f"using differential-evolution and snooker ensemble moves (ter Braak 2006; ter Braak "
            f"& Vrugt 2008), {walkers_text}, {ladder.get('n_burn')} burn-in steps and at least "
            f"{ladder.get('n_production')} recorded steps per rung")
    sigma = ladder.get("target_sigma")
    if is_number(sigma):
        text += (f", extended (up to {ladder.get('max_production')} steps) until the "
                 f"log-evidence error was at most {fmt(sigma, 'g')}")
    if settings.get("quick"):
        text += " (quick setting: a shorter ladder, for a first look)"
    return text + "."


_NOISE_LAW_SENTENCES = {
    "gaussian": "The likelihood is Gaussian in current with standard deviation "
                "sqrt((s_rel I)^2 + σ_floor^2)",
    "lognormal_floor": "The likelihood treats the scatter as log-normal of relative size s_rel "
                       "that becomes Gaussian of size σ_floor near zero current (the "
                       "two-component model of Rocke & Durbin 2001), through the generalised-log "
                       "transform asinh(I/c), c = σ_floor/s_rel (Durbin et al. 2002)",
    "student_t": "The likelihood is Student-t in current with 4 degrees of freedom and scale "
                 "sqrt((s_rel I)^2 + σ_floor^2) (Lange, Little & Taylor 1989), so that a few "
                 "wild readings do not drag the fit",
}


def noise_law_methods(data: Json) -> str:
    """The methods sentences on the noise law: which one, and how it was chosen."""
    choice = data.get("noise_law") or {}
    law = choice.get("chosen") or "gaussian"
    text = (_NOISE_LAW_SENTENCES.get(law, _NOISE_LAW_SENTENCES["gaussian"])
            + "; its relative term s_rel and current floor σ_floor are nuisance parameters with "
            "log-uniform priors set from the data and are marginalised.")
    evidences = choice.get("log_evidence") or {}
    if choice.get("requested") == "auto" and evidences:
        listed = ", ".join(f"{name.replace('_', '-')} {fmt(value, '.1f')}"
                           for name, value in evidences.items())
        text += (f" The noise law was chosen by evidence: {choice.get('probe_mechanism')}, the "
                 f"screening's most promising mechanism, was fitted under each law with the "
                 f"quick settings (ln Z: {listed}); {choice.get('reason')}.")
    return text


def noise_law_sentence(data: Json) -> str:
    """One line: the noise law of the fits and why ("" for a screening-only run)."""
    choice = data.get("noise_law") or {}
    if not choice:
        return ""
    return f"{choice.get('name')} ({choice.get('reason')})."


def methods_paragraph(data: Json) -> str:
    """The methods paragraph, from the run's settings (plain text with author-year citations)."""
    mechanisms = data.get("mechanisms") or []
    screened = [e.get("mechanism_id") for e in (data.get("linearisation") or {}).get(
        "mechanisms") or []]
    parts = [
        f"Conduction mechanisms were identified with mechid {data.get('mechid_version')} "
        f"(random seed {data.get('seed')}). " + _data_sentence(data),
        f"Screening: for each of the {len(screened)} candidate mechanisms the data were "
        "transformed to its straightened plot(s), a robust straight line (Huber 1964 loss) was "
        "fitted per temperature or per common bias, and the quantities implied by slope and "
        "intercept were compared with physical ranges and with the device description. The "
        "hopping exponent was estimated from the reduced activation energy w = d ln G / d ln T "
        "(Zabrodskii & Zinov'eva 1984).",
    ]
    if mechanisms:
        prior_odds = (data.get("settings") or {}).get("prior_odds")
        parts += [
            f"Bayesian comparison of {len(mechanisms)} mechanism(s): "
            + _join([f"{m.get('name')} ({m.get('source')})" for m in mechanisms]) + ". "
            + noise_law_methods(data) + " " + _ladder_sentence(data.get("settings") or {}),
            "The log-evidence ln Z was estimated by stepping-stone sampling (Xie et al. 2011), "
            "with its Monte Carlo error from batch means over the whole ladder; corrected-"
            "trapezoid thermodynamic integration (Friel, Hurn & Wyse 2014) and bridge sampling "
            "(Meng & Wong 1996) from the same run served as cross-checks. Posterior "
            "probabilities assume " + ("equal prior odds" if not prior_odds else
                                       "the prior odds " + ", ".join(
                                           f"{k}: {fmt(v, 'g')}" for k, v in prior_odds.items()))
            + ", and Bayes factors are worded on the Kass & Raftery (1995) scale.",
            "Fit adequacy was judged by posterior predictive p-values (Gelman, Meng & Stern "
            "1996) of the χ² discrepancy and of the number of runs of same-sign residuals "
            f"(Wald & Wolfowitz 1940), both required to be at least {MIN_PREDICTIVE_P:g}, and "
            "by the ratio of the fitted relative noise to a model-free estimate from second "
            f"differences of ln|I| (Rice 1984), required to be at most {MAX_NOISE_RATIO:g}. "
            "Posterior corner plots were drawn with corner.py (Foreman-Mackey 2016).",
        ]
        parts += [prior_sensitivity_methods(data)] if _sensitivity(data) else []
        parts += [composite_methods(mechanisms)] if _composites(mechanisms) else []
    else:
        parts.append("No Bayesian fit was made in this run (screening only).")
    return " ".join(parts)


def _composites(mechanisms: Sequence[Json]) -> list[str]:
    """Ids of the fitted mechanisms that are composites of catalogued parts."""
    found = []
    for m in mechanisms:
        try:
            options = get_mechanism(str(m.get("id"))).options
        except UnknownMechanismError:
            continue
        if options.get("paths") or options.get("series_with"):
            found.append(str(m.get("id")))
    return found


def composite_methods(mechanisms: Sequence[Json]) -> str:
    """How the composite hypotheses were built and fitted (methods text)."""
    from mechid.catalogue.composite import SERIES_DROP_MIN

    return (
        "Composite hypotheses (" + _join(_composites(mechanisms)) + ") combine catalogued "
        "laws: two conduction paths in parallel, whose currents add, or a path behind a "
        "series resistance R_s, I = f(V - I R_s), solved self-consistently by a bracketing "
        "root search (Sze & Ng 2007; Dowell & Jarratt 1971). Each part kept its published "
        "formula and validity domain (a part behind R_s judged at the film voltage). Their "
        "priors were restricted so that each part is seen: each parallel path carries the "
        "larger share of the current at one fitted point at least, and R_s takes at least "
        f"{SERIES_DROP_MIN:.0%} of the bias at one fitted point. They were fitted after the "
        "single mechanisms, their mode search seeded with "
        "their parts' best fits, and ranked by evidence with them.")


def _sensitivity(data: Json) -> Json | None:
    """The run's prior-sensitivity record when it was computed, else None."""
    record = data.get("prior_sensitivity") or {}
    return record if record.get("computed") else None


def prior_sensitivity_methods(data: Json) -> str:
    """How the Bayes factors were tested against the catalogue ranges (methods text)."""
    return (
        "Prior sensitivity: every uniform or log-uniform prior taken from a catalogue range "
        "was halved and doubled in width in the coordinate in which it is flat (log10 for "
        "log-uniform priors); the halved range was centred on the posterior median inside the "
        "declared range, the doubled one on the declared range's centre, stopping at 0 for "
        "non-negative quantities and at 1 for a relative permittivity or an ideality factor; "
        "device-value and noise "
        "priors were left unchanged. Each log-evidence was recomputed by importance "
        "reweighting of the posterior draws, Z' = Z E_post[π'/π] (exact for a range inside "
        "the declared one; Monte Carlo error from the weights and the chain's effective sample "
        "size). For doubled ranges the reweighting gives the width term Σ ln(w/w') and cannot "
        "see likelihood mass beyond the declared range; where the share of posterior draws in "
        "the outer 1 % of a range, continued flat over the added width, bounds that mass "
        "above 0.1 nats, the leader and the runner-up were re-fitted with the doubled ranges "
        "(quick settings; a re-run below the exact lower bound ln Z + Σ ln(w/w') is "
        "reported as failed) and other mechanisms are reported as not computable.")


def priors_paragraph(data: Json) -> str:
    """The priors of every fitted mechanism, in words (from the JSON ``priors`` lists)."""
    sentences = []
    for m in data.get("mechanisms") or []:
        described = []
        for prior in m.get("priors") or []:
            symbol = parameter_symbol(str(m.get("id")), str(prior.get("name")))
            described.append(f"{symbol}: {prior.get('description')}")
        sentences.append(f"{m.get('name')} — " + "; ".join(described) + ".")
    if not sentences:
        return ""
    return "Priors (physical units). " + " ".join(sentences)


# --------------------------------------------------------------------------------------------
# Results
# --------------------------------------------------------------------------------------------


def results_paragraph(data: Json) -> str:
    """The results paragraph, written from the run's numbers."""
    mechanisms = data.get("mechanisms") or []
    verdict = data.get("verdict")
    if not mechanisms or verdict is None:
        return screening_results(data)
    best = mechanisms[0]
    evidence = (f"ln Z = {fmt_ln(best.get('log_evidence'))} ± "
                f"{fmt_ln(best.get('log_evidence_err'))}")
    parts = [
        f"Only {best.get('name')} was fitted ({evidence}), so no comparison was made."
        if len(mechanisms) == 1 else
        f"Of the {len(mechanisms)} mechanisms fitted ({verdict.get('prior_odds')}), "
        f"{best.get('name')} has the highest evidence, {evidence}, and a posterior probability "
        f"{fmt_probability(best.get('probability'))} among these candidates."
    ]
    params = key_parameters(best)
    if params:
        parts.append("Its parameters (posterior median with 68 % and 95 % credible intervals; "
                     f"the {INTERVALS_CAVEAT}): "
                     + "; ".join(parameter_text(parameter_symbol(best["id"], n), s)
                                 for n, s in params) + ".")
    if verdict.get("runner_up"):
        parts.append(_runner_up_sentence(mechanisms, verdict))
    adequacy = best.get("adequacy") or {}
    failing = verdict.get("failing_statistics") or []
    if not best.get("fit_adequate") and failing:
        parts.append("The fit is not adequate, so no candidate describes the data well: "
                     + "; ".join(failing) + ".")
    else:
        parts.append(_adequacy_sentence(best, adequacy))
    others = []
    for m in mechanisms[1:]:
        adequate = "adequate fit" if m.get("fit_adequate") else "inadequate fit"
        others.append(f"{m.get('name')} ln B = {fmt_ln(m.get('ln_bayes_factor_vs_best'))} "
                      f"({adequate})")
    if others:
        parts.append("Relative to the leader: " + "; ".join(others) + ".")
    if _sensitivity(data):
        sentence = str(_sensitivity(data).get("sentence"))
        parts.append(f"Prior sensitivity: {sentence}.")
    lin = data.get("linearisation") or {}
    best_screen = lin.get("best")
    if best_screen:
        agree = "agrees" if best_screen == best.get("id") else "does not agree"
        parts.append(f"The straightened-plot screening ranks {mechanism_name(best_screen, data)} "
                     f"first, which {agree} with the Bayesian ranking.")
    return " ".join(parts)


def _adequacy_sentence(best: Json, adequacy: Json) -> str:
    """The adequacy statistics of an adequate leader (or one without failing statistics)."""
    return (
        ("The fit is adequate" if best.get("fit_adequate") else "The fit is not adequate")
        + f" (reduced χ² = {fmt(adequacy.get('reduced_chi_square'), '.3g')}, predictive "
        f"p = {fmt(adequacy.get('predictive_p_chi_square'), '.3g')} for χ² and "
        f"{fmt(adequacy.get('predictive_p_runs'), '.3g')} for residual runs"
        + (f"; fitted relative noise {fmt(adequacy.get('fitted_relative_noise'), '.3g')} "
           f"against {fmt(adequacy.get('model_free_relative_noise'), '.3g')} estimated "
           "without a model" if is_number(adequacy.get("model_free_relative_noise")) else "")
        + ")."
    )


def _runner_up_sentence(mechanisms: Sequence[Json], verdict: Json) -> str:
    """ln B against the runner-up; worded on the Kass & Raftery scale only for an adequate
    leader (between candidates that all fail, it orders them and is not a finding)."""
    runner = next((m for m in mechanisms if m.get("id") == verdict["runner_up"]), {})
    not_resolved = ("" if verdict.get("resolved") else
                    "not resolved within twice the Monte Carlo error")
    if verdict.get("fit_adequate"):
        qualifier = (f"{verdict.get('strength')} evidence on the Kass & Raftery scale"
                     + (f"; {not_resolved}" if not_resolved else ""))
    else:
        qualifier = ("this only orders the candidates, since the leader fails its posterior "
                     "predictive checks" + (f"; {not_resolved}" if not_resolved else ""))
    return (f"The runner-up, {runner.get('name', verdict['runner_up'])}, trails by ln B = "
            f"{fmt_ln(verdict.get('ln_bayes_factor_vs_runner_up'))} ± "
            f"{fmt_ln(verdict.get('ln_bayes_factor_vs_runner_up_err'))} ({qualifier}).")


def screening_results(data: Json) -> str:
    """Results paragraph of a screening-only run (no evidence)."""
    lin = data.get("linearisation") or {}
    ranking = lin.get("ranking") or []
    if not ranking:
        return "No mechanism could be assessed by the straightened plots."
    best = lin.get("best")
    text = ("Only the straightened-plot screening was run, so no posterior probabilities or "
            "Bayes factors are available. ")
    if best:
        entry = screening_entry(data, best) or {}
        checks = entry.get("checks") or []
        passed = sum(c.get("passed") is True for c in checks)
        text += (f"The screening ranks {mechanism_name(best, data)} first (score "
                 f"{fmt(entry.get('score'), '.3g')}, {passed} of {len(checks)} consistency "
                 "checks passed). ")
    text += ("Screening ranks: " + ", ".join(f"{i + 1}. {mid}" for i, mid in enumerate(ranking))
             + ".")
    return text


# --------------------------------------------------------------------------------------------
# References
# --------------------------------------------------------------------------------------------


def _noise_law_references(data: Json) -> list[str]:
    """The references of the noise laws the methods paragraph names."""
    choice = data.get("noise_law") or {}
    laws = set(choice.get("log_evidence") or {}) | {choice.get("chosen") or "gaussian"}
    found = []
    if "lognormal_floor" in laws:
        found += ["Rocke & Durbin 2001", "Durbin et al. 2002"]
    if "student_t" in laws:
        found.append("Lange, Little & Taylor 1989")
    return found


def references(data: Json) -> tuple[list[str], list[tuple[str, str]]]:
    """Method references used in the text, and (mechanism name, source) for each mechanism.

    The mechanism sources come from the catalogue's ``Mechanism.source`` declarations of every
    mechanism that appears in the result (fitted or screened).
    """
    used = ["Huber 1964", "Zabrodskii & Zinov'eva 1984"]
    if data.get("mechanisms"):
        used += ["Foreman-Mackey et al. 2013", "Geyer 1991", "Fan et al. 2011", "ter Braak 2006",
                 "ter Braak & Vrugt 2008", "Xie et al. 2011", "Friel, Hurn & Wyse 2014", "Meng & Wong 1996",
                 "Kass & Raftery 1995", "Gelman, Meng & Stern 1996", "Wald & Wolfowitz 1940",
                 "Rice 1984", "Foreman-Mackey 2016"]
        used += _noise_law_references(data)
        used += ["Sze & Ng 2007", "Dowell & Jarratt 1971"] if _composites(
            data.get("mechanisms") or []) else []
    methods = [f"{key}: {METHOD_REFERENCES[key]}" for key in used]
    ids = [m.get("id") for m in data.get("mechanisms") or []]
    ids += [e.get("mechanism_id") for e in (data.get("linearisation") or {}).get("mechanisms")
            or [] if e.get("mechanism_id") not in ids]
    sources = []
    for mechanism_id in ids:
        mechanism = get_mechanism(str(mechanism_id))
        sources.append((mechanism.name, mechanism.source))
    return methods, sources
