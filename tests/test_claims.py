"""Claims a referee can trust: the verdict's wording, undetermined parameters, quick runs.

The records here are built by hand (no sampler), so each wording rule is checked on the case
it is about: an inadequate leader whose noise term absorbed the misfit (the numbers of the
issue: reduced chi-square 0.99, noise 23 times the point-to-point scatter, B = 1.6e66), a
leader with probability 0.99996, stated prior odds.
"""

from __future__ import annotations

import html as html_module
import math
import re
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from rich.console import Console
from typer.testing import CliRunner

from mechid.analysis import (
    AnalysisSettings,
    _ranked_results,
    _verdict,
    determination,
    failing_statistics,
    prior_interval,
)
from mechid.catalogue import get_mechanism, registered_mechanisms
from mechid.cli import app
from mechid.device import Device, Measured
from mechid.formatting import format_probability, plain_parameter_name
from mechid.inference.adequacy import AdequacyCheck
from mechid.inference.compare import KASS_RAFTERY_SCALE
from mechid.inference.priors import Prior, parameter_prior
from mechid.report.console import render_console
from mechid.report.html import _Figures, _parameter_table, _ranking_section, _verdict_section
from mechid.report.text import case_against, results_paragraph
from mechid.results import MechanismResult, SamplingSummary, summarise_draws, to_plain_json

#: Every strength word of the Kass & Raftery (1995) scale.
STRENGTH_WORDS = [words for _, words in KASS_RAFTERY_SCALE]

GOOD_FIT = AdequacyCheck(adequate=True, reduced_chi_square=1.02, predictive_p_chi_square=0.41,
                         residual_runs=95, expected_runs=97.0, predictive_p_runs=0.38,
                         fitted_relative_noise=0.011, model_free_relative_noise=0.010,
                         noise_ratio=1.1, reasons=())
#: The issue's case: the noise term absorbed the misfit (reduced chi-square 0.99).
ABSORBED_MISFIT = AdequacyCheck(
    adequate=False, reduced_chi_square=0.99, predictive_p_chi_square=0.47, residual_runs=12,
    expected_runs=81.0, predictive_p_runs=0.0, fitted_relative_noise=0.115,
    model_free_relative_noise=0.005, noise_ratio=23.0,
    reasons=("residuals form long same-sign runs", "the fit needs 11.50% relative noise"))


def mechanism(mechanism_id: str, log_evidence: float, adequacy: AdequacyCheck = GOOD_FIT,
              name: str | None = None, parameters: dict | None = None, priors: tuple = (),
              notable: tuple = ()) -> MechanismResult:
    """A fitted mechanism's record (by default one physical parameter: trap depth 1.2 eV)."""
    draws = 1.2 + 0.01 * (np.arange(2001) / 2000.0 - 0.5)
    if parameters is None:
        parameters = {"trap_depth_eV": summarise_draws("trap_depth_eV", "eV", draws)}
    return MechanismResult(
        id=mechanism_id, family="emission", name=name or mechanism_id.replace("_", " "),
        formula="I = ...", source="a source", log_evidence=log_evidence, log_evidence_err=0.1,
        probability=math.nan, probability_err=math.nan, ln_bayes_factor_vs_best=math.nan,
        ln_bayes_factor_vs_best_err=math.nan, fit_adequate=adequacy.adequate,
        adequacy=adequacy, priors=priors, parameters=parameters,
        map_parameters={}, correlations={"names": [], "matrix": [], "notable": list(notable)},
        evidence=None,  # type: ignore[arg-type]  # not read by the verdict
        sampling=SamplingSummary(n_draws=2001, autocorr_time=(1.0,), effective_sample_size=2001,
                                 n_likelihood_calls=1, flags=()),
    )


def fake_fit(result: MechanismResult):
    """What :func:`_ranked_results` reads of a fit: its ``result``."""
    return type("Fit", (), {"result": result})()


def verdict_of(*results: MechanismResult, settings: AnalysisSettings | None = None):
    settings = settings or AnalysisSettings()
    ranked = _ranked_results({r.id: fake_fit(r) for r in results}, settings)
    return _verdict(ranked, settings), ranked


# --------------------------------------------------------------------------------------------
# 1. The verdict is exact about the candidate set, the prior odds and the adequacy
# --------------------------------------------------------------------------------------------


def test_probability_is_shown_as_a_bound_never_as_one_or_zero():
    # Before: "posterior probability 1" (three digits of 0.99996).
    assert format_probability(0.99996) == "> 0.999"
    assert format_probability(1.0) == "> 0.999"
    assert format_probability(3e-9) == "< 0.001"
    assert format_probability(0.0) == "< 0.001"
    assert format_probability(0.8734) == "0.873"
    assert format_probability(0.999) == "0.999"


def test_adequate_leader_names_the_candidate_set_and_equal_prior_odds():
    # ln B = 10: P = 1 / (1 + e^-10) = 0.99995, shown as "> 0.999 among the candidates".
    verdict, _ = verdict_of(mechanism("poole_frenkel", -100.0), mechanism("schottky", -110.0))
    sentence = verdict.sentence
    assert verdict.probability == pytest.approx(1 / (1 + math.exp(-10.0)), rel=1e-12)
    assert "among the 2 mechanisms fitted (equal prior odds)" in sentence.lower()
    assert "posterior probability > 0.999 among the candidates" in sentence
    assert not re.search(r"probability 1(\b|\.)", sentence)
    assert "very strong on the Kass & Raftery scale" in sentence
    assert verdict.n_candidates == 2 and verdict.prior_odds == "equal prior odds"
    assert verdict.headline == "most probable of the 2 mechanisms fitted"
    assert verdict.failing_statistics == ()


def test_stated_prior_odds_are_named_in_the_verdict():
    settings = AnalysisSettings(prior_odds={"schottky": 4.0})
    verdict, ranked = verdict_of(mechanism("poole_frenkel", -100.0),
                                 mechanism("schottky", -101.0), settings=settings)
    # P(pf) = e^1 / (e^1 + 4) = 0.4046 (by hand): schottky leads on the prior odds.
    assert ranked[0].id == "schottky"
    assert ranked[0].probability == pytest.approx(4 / (4 + math.e), rel=1e-12)
    assert "the stated prior odds (schottky: 4" in verdict.sentence
    assert "equal prior odds" not in verdict.sentence


def test_inadequate_leader_is_headlined_as_best_of_the_candidates_without_a_strength_word():
    # Before: "... is the most probable mechanism, with posterior probability 1; ... very
    # strong on the Kass & Raftery scale" although no candidate fits.
    verdict, _ = verdict_of(mechanism("schottky", -100.0, ABSORBED_MISFIT),
                            mechanism("poole_frenkel", -252.0, ABSORBED_MISFIT))
    sentence = verdict.sentence
    assert sentence.startswith("Best of the candidates; none describes the data well")
    assert verdict.headline == "best of the candidates; none describes the data well"
    for words in STRENGTH_WORDS:
        assert words not in sentence
    assert "most probable" not in sentence
    # the failing statistics and what they mean, with the record's numbers
    assert "12 runs of same-sign residuals" in sentence and "about 81 are expected" in sentence
    assert "(predictive p < 0.005)" in sentence  # p = 0 of 200 replicates, not "p = 0"
    assert "23.0 times the point-to-point scatter" in sentence
    assert "11.50%" in sentence and "0.50%" in sentence
    assert "the noise term absorbed a misfit" in sentence
    assert len(verdict.failing_statistics) == 2  # runs and noise; chi-square p = 0.47 passed
    assert "only order candidates that all fail" in sentence
    # the Bayes factor is not given as a number beyond reading (no "B = 1.6e+66")
    assert "e+" not in sentence
    # the JSON strength field still words ln B alone (Kass & Raftery), for the contract
    assert verdict.strength == "very strong"


def plain_result(*results: MechanismResult, settings: AnalysisSettings | None = None) -> dict:
    """The plain-JSON form the report and console read (no screening, no series)."""
    settings = settings or AnalysisSettings()
    verdict, ranked = verdict_of(*results, settings=settings)
    return to_plain_json({"verdict": verdict, "mechanisms": ranked,
                          "settings": {"quick": settings.quick, "prior_odds": None},
                          "cautions": []})


def card_text(data: dict) -> str:
    """The verdict card as plain text (tags removed)."""
    return re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html_module.unescape(
        _verdict_section(data))))


def console_text(data: dict) -> str:
    console = Console(record=True, width=200)
    render_console(data, console)
    return re.sub(r"\s+", " ", console.export_text())


def test_card_of_an_inadequate_leader_shows_the_failing_statistics_not_chi_square():
    # Before: "very strong", "B = 1.64e+66" and "reduced χ² = 0.99" under "not adequate".
    data = plain_result(mechanism("schottky", -100.0, ABSORBED_MISFIT),
                        mechanism("poole_frenkel", -252.0, ABSORBED_MISFIT))
    card = card_text(data)
    assert "Best of the candidates; none describes the data well: schottky" in card
    assert "reduced χ²" not in card
    assert "23.0 times the point-to-point scatter" in card
    assert "12 runs of same-sign residuals" in card
    for words in STRENGTH_WORDS:
        assert words not in card
    assert "B = " not in card.replace("ln B = ", "")
    assert "orders candidates that all fail their checks; not a finding" in card
    assert "> 0.999" in card and "among the 2 mechanisms fitted; equal prior odds" in card
    paragraph = results_paragraph(data)
    for words in STRENGTH_WORDS:
        assert words not in paragraph
    assert "no candidate describes the data well" in paragraph
    assert "reduced χ²" not in paragraph


def test_card_and_console_of_an_adequate_leader():
    data = plain_result(mechanism("poole_frenkel", -100.0), mechanism("schottky", -110.0))
    card = card_text(data)
    assert "Leading mechanism: poole frenkel" in card
    assert "> 0.999" in card and "among the 2 mechanisms fitted; equal prior odds" in card
    assert "very strong" in card and "reduced χ² = 1.02" in card
    text = console_text(data)
    assert "│ > 0.999 │" in text.replace("  ", " ") or "> 0.999 │" in text
    assert "probability 1" not in text
    assert "among the 2 mechanisms fitted (equal prior odds)" in text.lower()
    assert "Of the 2 mechanisms fitted (equal prior odds)" in results_paragraph(data)



# --------------------------------------------------------------------------------------------
# 2. Parameters the data do not determine
# --------------------------------------------------------------------------------------------


def test_prior_interval_matches_closed_forms():
    # uniform on [0, 10]: 0.16 and 0.84 of the range; log-uniform on [1e-3, 1e3]: the same
    # in log10 (10^(-3 + 0.16 x 6)); normal(30, 1) cut at +-6 sd: the normal quantiles
    # 30 -+ 0.994458 (scipy.stats.norm.ppf(0.84); the cut moves them by < 1e-8).
    assert prior_interval(Prior("x", "1", "uniform", 0.0, 10.0)) == pytest.approx((1.6, 8.4),
                                                                                  rel=1e-13)
    assert prior_interval(Prior("x", "1", "log_uniform", 1e-3, 1e3)) == pytest.approx(
        (10 ** -2.04, 10 ** 2.04), rel=1e-12)
    normal = Prior("d_nm", "nm", "truncated_normal", 24.0, 36.0, mean=30.0, sd=1.0)
    assert prior_interval(normal) == pytest.approx((30 - 0.994458, 30 + 0.994458), abs=1e-6)


def _summaries(**draws: np.ndarray) -> dict:
    return {name: summarise_draws(name, "1", values) for name, values in draws.items()}


def test_parameter_pinned_at_a_prior_edge_is_flagged():
    # The case: eps_r = 1.0011 [1.0003, 1.0028] against the lower edge 1 of [1, 20].
    rng = np.random.default_rng(5)
    pinned = 1.0 + rng.exponential(0.001, 4000)
    inside = rng.normal(5.0, 0.1, 4000)
    prior = Prior("dielectric_constant", "1", "uniform", 1.0, 20.0)
    for draws, expected in ((pinned, False), (inside, True)):
        record = mechanism("schottky_emission", -1.0, priors=(prior,),
                           parameters=_summaries(dielectric_constant=draws))
        summary = determination(record)["dielectric_constant"]
        assert summary.determined is expected
        if not expected:
            assert summary.reasons == ("pinned at the prior's lower edge 1 (95 % interval within "
                                       "1% of the prior range of it)",)


def test_posterior_equal_to_the_prior_is_flagged_and_a_narrower_one_is_not():
    # Posterior draws from the prior itself: width ratio 1; half the width: ratio 2 (> 1.5).
    rng = np.random.default_rng(6)
    prior = Prior("thickness_nm", "nm", "truncated_normal", 24.0, 36.0, mean=30.0, sd=1.0,
                  origin="device description with its standard uncertainty")
    as_prior = rng.normal(30.0, 1.0, 20_000)
    narrower = rng.normal(30.0, 0.5, 20_000)
    flagged = determination(mechanism("poole_frenkel", -1.0, priors=(prior,),
                                      parameters=_summaries(thickness_nm=as_prior)))
    assert flagged["thickness_nm"].determined is False
    (reason,) = flagged["thickness_nm"].reasons
    assert reason.startswith("posterior about the prior: 68 % interval only 1.0")
    kept = determination(mechanism("poole_frenkel", -1.0, priors=(prior,),
                                   parameters=_summaries(thickness_nm=narrower)))
    assert kept["thickness_nm"].determined is True and kept["thickness_nm"].reasons == ()


def test_ridge_between_two_parameters_flags_both_with_the_other_symbol():
    # The case: thickness and mass at r = -0.9995 (only d sqrt(m*) is determined).
    rng = np.random.default_rng(7)
    priors = (Prior("thickness_nm", "nm", "uniform", 0.3, 20.0),
              Prior("effective_mass_ratio", "1", "uniform", 0.05, 1.0))
    record = mechanism(
        "direct_tunnelling", -1.0, priors=priors,
        parameters=_summaries(thickness_nm=rng.normal(2.0, 0.01, 4000),
                              effective_mass_ratio=rng.normal(0.4, 0.002, 4000)),
        notable=({"a": "thickness_nm", "b": "effective_mass_ratio", "r": -0.9995},))
    summaries = determination(record)
    assert summaries["thickness_nm"].reasons == (
        "ridge with m*/m0 (r = -0.9995): only a combination of the two is determined",)
    assert summaries["effective_mass_ratio"].reasons == (
        "ridge with d (r = -0.9995): only a combination of the two is determined",)
    # r = -0.98 is a correlation, not a ridge
    weaker = replace(record, correlations={"notable": [
        {"a": "thickness_nm", "b": "effective_mass_ratio", "r": -0.98}]})
    assert all(s.determined for s in determination(weaker).values())


def test_device_value_outside_the_declared_range_is_flagged():
    # The demo's case: direct tunnelling fitted with thickness normal(30, 1) nm, range 0.3-20.
    parameter = get_mechanism("direct_tunnelling").parameter("thickness_nm")
    prior = parameter_prior(parameter, Device(thickness_nm=Measured(30.0, 1.0)))
    draws = 20.0 - np.random.default_rng(8).exponential(0.01, 4000)
    summaries = determination(mechanism("direct_tunnelling", -1.0, priors=(prior,),
                                        parameters=_summaries(thickness_nm=draws)))
    reasons = summaries["thickness_nm"].reasons
    assert reasons[0] == ("device value 30 nm lies outside the range the formula is declared "
                          "for (0.3 to 20 nm)")
    assert reasons[1].startswith("pinned at the prior's upper edge 20 nm")


def test_undetermined_parameters_are_shown_in_json_sentence_console_and_report():
    rng = np.random.default_rng(9)
    prior = Prior("trap_depth_eV", "eV", "uniform", 0.05, 3.0)
    pinned = {"trap_depth_eV": summarise_draws("trap_depth_eV", "eV",
                                               3.0 - rng.exponential(0.001, 4000))}
    data = plain_result(mechanism("poole_frenkel", -100.0, priors=(prior,), parameters=pinned),
                        mechanism("schottky_emission", -110.0))
    summary = data["mechanisms"][0]["parameters"]["trap_depth_eV"]
    assert summary["determined"] is False
    assert summary["reasons"][0].startswith("pinned at the prior's upper edge 3 eV")
    note = "[not determined by the data: pinned at the prior's upper edge 3 eV"
    assert note in data["verdict"]["sentence"]
    assert note in results_paragraph(data)
    text = console_text(data)
    assert "(not determined)" in text and "Not determined by the data" in text
    assert "poole_frenkel: phi_T: pinned at the prior's upper edge 3 eV" in text
    card = card_text(data)
    assert "determined by the data?" in card and "no pinned at the prior's upper edge" in card



# --------------------------------------------------------------------------------------------
# 3. A quick run is visibly quick
# --------------------------------------------------------------------------------------------


@pytest.mark.parametrize("quick", [True, False])
def test_quick_run_banner_in_json_console_and_report(quick: bool):
    # Before: only the methods paragraph said "quick setting".
    data = plain_result(mechanism("poole_frenkel", -100.0), mechanism("schottky", -110.0),
                        settings=AnalysisSettings(quick=quick))
    banner = "quick run: a first look; quote numbers from a full run"
    verdict = data["verdict"]
    assert verdict["quick_run"] is quick
    assert verdict["sentence"].startswith(f"Q{banner[1:]}. ") is quick
    assert (banner.upper() in console_text(data)) is quick
    assert (f'<p class="banner">Q{banner[1:]}</p>' in _verdict_section(data)) is quick


# --------------------------------------------------------------------------------------------
# 4. Intervals are labelled as statistical and conditional on the model
# --------------------------------------------------------------------------------------------

CAVEAT = ("credible intervals are statistical and conditional on the model (formula and noise "
          "law) being right")


def test_intervals_are_labelled_beside_every_parameter_table():
    # Before: no table, console line or paragraph said what the intervals assume.
    data = plain_result(mechanism("poole_frenkel", -100.0), mechanism("schottky", -110.0))
    assert CAVEAT.capitalize() in card_text(data)
    for k, m in enumerate(data["mechanisms"]):
        assert CAVEAT.capitalize() in _parameter_table(m, f"mechanisms.{k}")
    assert CAVEAT in _ranking_section(data, _Figures([], {}))
    assert CAVEAT.capitalize() in console_text(data)
    assert CAVEAT in results_paragraph(data)
    schema_doc = (Path(__file__).resolve().parents[1] / "docs" / "result-schema.md").read_text()
    assert CAVEAT in re.sub(r"\s+", " ", schema_doc)


# --------------------------------------------------------------------------------------------
# 5. Text and command-line defects
# --------------------------------------------------------------------------------------------


def test_prose_uses_plain_parameter_names_not_json_keys():
    # Before: "trap_depth_eV = 1.2000 eV" in the verdict sentence.
    assert plain_parameter_name("trap_depth_eV", "eV") == "trap depth"
    assert plain_parameter_name("prefactor_S_per_cm", "S/cm") == "prefactor"
    assert plain_parameter_name("prefactor_A_per_cm2", "A/cm^2") == "prefactor"
    assert plain_parameter_name("dielectric_constant", "1") == "dielectric constant"
    verdict, _ = verdict_of(mechanism("poole_frenkel", -100.0), mechanism("schottky", -110.0))
    assert "trap depth = 1.2000 eV (68 %" in verdict.sentence
    assert "trap_depth_eV" not in verdict.sentence


def test_results_paragraph_gives_the_leaders_parameters_before_the_runner_up():
    # Before: "The runner-up, ..., trails by ..." came first, so "Its parameters" read as the
    # runner-up's.
    paragraph = results_paragraph(plain_result(mechanism("poole_frenkel", -100.0),
                                               mechanism("schottky", -110.0)))
    assert paragraph.index("Its parameters") < paragraph.index("The runner-up")
    first_sentences = paragraph[:paragraph.index("The runner-up")]
    assert "poole frenkel has the highest evidence" in first_sentences


def test_case_against_does_not_repeat_against_it():
    # Before: the report printed "Against it: evidence against it: ln B = ...".
    data = plain_result(mechanism("poole_frenkel", -100.0), mechanism("schottky", -110.0))
    reasons = case_against(data, data["mechanisms"][1])
    assert reasons == ["ln B = -10.00 ± 0.14 relative to the leader (Kass & Raftery: very "
                       "strong)"]


def test_analyze_help_is_readable_at_80_columns():
    # Before: both optical options were cut to the same "--optical-dielectric-co…".
    result = CliRunner().invoke(app, ["analyze", "--help"], env={"COLUMNS": "80"})
    assert result.exit_code == 0
    assert "…" not in result.output
    assert max(len(line) for line in result.output.splitlines()) <= 80
    for option in ("--optical-dielectric-constant ", "--optical-dielectric-constant-sd ",
                   "--thickness-sd-nm ", "--effective-mass-sd "):
        assert option in result.output
    helps = [line.split("│")[1].split()[2:] for line in result.output.splitlines()
             if "--optical-dielectric-constant" in line]
    assert len(helps) == 2 and helps[0] != helps[1]


def test_mechanisms_listing_does_not_prefix_formulas_with_i():
    # Before: "I = J = e/(2 pi h ...)" and "I = I = G0 V ...".
    result = CliRunner().invoke(app, ["mechanisms"], env={"COLUMNS": "200"})
    assert result.exit_code == 0
    assert "I = J =" not in result.output and "I = I =" not in result.output
    assert result.output.count("formula: ") == len(registered_mechanisms())


def test_noise_ratio_statistic_states_the_resolution_it_used():
    # adequacy divides by max(scatter, 0.1 %): a scatter of 0.02 % is quoted as such
    tiny = replace(ABSORBED_MISFIT, model_free_relative_noise=0.0002, noise_ratio=115.0)
    (_, noise) = failing_statistics(tiny)
    assert "115.0 times the point-to-point scatter of the data (below 0.10%, counted as " \
           "0.10%)" in noise


def test_a_single_fitted_mechanism_is_not_given_a_comparison():
    data = plain_result(mechanism("poole_frenkel", -100.0))
    verdict = data["verdict"]
    assert verdict["headline"] == "the only mechanism fitted"
    assert "is the only mechanism fitted, so no comparison was made" in verdict["sentence"]
    assert "Kass & Raftery" not in verdict["sentence"]
    card = card_text(data)
    assert "the only mechanism fitted: 1 by construction, no comparison" in card
    assert "among the 1 mechanisms" not in card
    assert results_paragraph(data).startswith("Only poole frenkel was fitted (ln Z = -100.00 ± "
                                              "0.10), so no comparison was made.")
