"""Prior sensitivity of the evidences: reweighting against closed forms and against re-fits.

Analytic case: a Gaussian likelihood normalised in the flat coordinates of a uniform and a
log-uniform prior. Its evidence under a box prior is a product of normal-mass terms over box
widths, Z = prod_j [Phi((b_j - mu_j)/s_j) - Phi((a_j - mu_j)/s_j)] / (b_j - a_j) (elementary;
scipy.stats.norm gives Phi), for the declared and for the rescaled boxes alike.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import replace

import numpy as np
import pytest
from rich.console import Console
from scipy import constants, stats

from mechid.analysis import AnalysisSettings, run_analysis_full
from mechid.catalogue import temporarily_registered
from mechid.catalogue.base import Mechanism, Parameter
from mechid.data import IVSeries
from mechid.device import Device
from mechid.errors import MechidWarning
from mechid.inference.fit import fit_mechanism
from mechid.inference.priors import Prior
from mechid.inference.sensitivity import (
    MISSED_MASS_LIMIT_NATS,
    NOT_COMPUTABLE,
    QUICK_RERUN,
    REWEIGHTING,
    REWEIGHTING_WIDTH_TERM,
    edge_contact,
    evidence_under_ranges,
    flat_bounds,
    refit_log_evidence,
    rescaled_prior,
    reweight,
)
from mechid.inference.settings import QUICK_LADDER, QUICK_SEARCH
from mechid.report.console import render_console
from mechid.report.html import prior_sensitivity_html
from mechid.report.text import methods_paragraph, results_paragraph
from mechid.results import to_plain_json

LINEAR = Prior("energy_eV", "eV", "uniform", 0.5, 10.5, origin="catalogue range")
LOG = Prior("prefactor_S", "S", "log_uniform", 1e-3, 1e3, origin="catalogue range")


def _log_evidence(priors, means, sds) -> float:
    """Closed form ln Z of the normalised Gaussian likelihood under box priors (flat coords)."""
    total = 0.0
    for prior, mean, sd in zip(priors, means, sds, strict=True):
        lo, hi = flat_bounds(prior)
        mass = stats.norm.cdf(hi, mean, sd) - stats.norm.cdf(lo, mean, sd)
        total += math.log(mass / (hi - lo))
    return total


def _posterior_draws(priors, means, sds, n: int, seed: int) -> np.ndarray:
    """Exact iid posterior draws (truncated normals) in the internal coordinates."""
    rng = np.random.default_rng(seed)
    columns = []
    for prior, mean, sd in zip(priors, means, sds, strict=True):
        lo, hi = flat_bounds(prior)
        flat = stats.truncnorm.rvs((lo - mean) / sd, (hi - mean) / sd, loc=mean, scale=sd,
                                   size=n, random_state=rng)
        columns.append(flat)  # uniform and log-uniform: the flat coordinate is internal here
    return np.column_stack(columns)


def _new_priors(record, priors):
    return [Prior(p.name, p.unit, p.kind, *record.ranges[p.name], origin=p.origin) for p in priors]


@pytest.mark.parametrize("seed", [1, 2])
def test_narrower_ranges_reweight_to_the_closed_form(seed):
    # A broad posterior (sd 2 on a width-10 box, sd 0.8 decades on 6) so that halving the
    # ranges cuts real mass: the answer is not just 2 ln 2.
    priors, means, sds = [LINEAR, LOG], [4.0, 0.5], [2.0, 0.8]
    draws = _posterior_draws(priors, means, sds, 20_000, seed)
    ln_z = _log_evidence(priors, means, sds)
    record = evidence_under_ranges("gauss", priors, draws, 0.5, ln_z, 0.0)
    assert record.method == REWEIGHTING
    new = _new_priors(record, priors)
    for old, changed in zip(priors, new, strict=True):
        (lo, hi), (nlo, nhi) = flat_bounds(old), flat_bounds(changed)
        assert nhi - nlo == pytest.approx(0.5 * (hi - lo), rel=1e-12)
        assert lo <= nlo and nhi <= hi
    exact = _log_evidence(new, means, sds) - ln_z
    assert abs(exact - 2 * math.log(2)) > 0.2  # mass is really cut (errors ~0.01)
    assert record.ln_evidence_shift == pytest.approx(exact, abs=4 * record.ln_evidence_shift_err)
    assert 0.002 < record.ln_evidence_shift_err < 0.05
    assert 5_000 < record.effective_sample_size < 20_000


def test_narrower_range_is_centred_on_the_posterior_median_inside_the_old_range():
    flat = np.array([9.9, 10.0, 10.1, 10.2, 10.4])  # median 10.1, near the upper end 10.5
    narrowed, note = rescaled_prior(LINEAR, 0.5, flat)
    assert (narrowed.lower, narrowed.upper) == pytest.approx((5.5, 10.5), rel=1e-12)
    assert note == ""
    middle, _ = rescaled_prior(LINEAR, 0.5, np.array([5.0, 5.5, 6.0]))
    assert (middle.lower, middle.upper) == pytest.approx((3.0, 8.0), rel=1e-12)


def test_wider_ranges_give_the_width_term_when_the_posterior_is_clear_of_the_edges():
    priors, means, sds = [LINEAR, LOG], [4.0, 0.5], [0.3, 0.2]
    draws = _posterior_draws(priors, means, sds, 4000, 3)
    ln_z = _log_evidence(priors, means, sds)
    record = evidence_under_ranges("gauss", priors, draws, 2.0, ln_z, 0.0)
    assert record.method == REWEIGHTING_WIDTH_TERM
    assert record.missed_mass_bound == 0.0
    # x2 about the centre 5.5 is [-4.5, 15.5], held at 0 (a positive quantity): width 15.5;
    # log10 range [-3, 3] becomes [-6, 6].
    assert record.ranges["energy_eV"] == pytest.approx((0.0, 15.5), rel=1e-12)
    assert record.ranges["prefactor_S"] == pytest.approx((1e-6, 1e6), rel=1e-12)
    assert record.limits and "cannot be negative" in record.limits[0]
    exact = _log_evidence(_new_priors(record, priors), means, sds) - ln_z
    assert exact == pytest.approx(math.log(10 / 15.5) + math.log(6 / 12), abs=1e-9)
    assert record.ln_evidence_shift == pytest.approx(exact, abs=1e-9)


@pytest.mark.parametrize(("name", "lower", "upper", "expected"), [
    ("dielectric_constant", 1.0, 20.0, (1.0, 29.5)),       # eps_r >= 1 (vacuum)
    ("ideality_factor", 1.0, 3.0, (1.0, 4.0)),             # n >= 1 (thermionic emission)
    ("voltage_coefficient_rho2", -0.5, 0.5, (-1.0, 1.0)),  # no limit below zero
])
def test_doubled_ranges_stop_at_the_physical_limits(name, lower, upper, expected):
    prior = Prior(name, "1", "uniform", lower, upper, origin="catalogue range")
    wider, _ = rescaled_prior(prior, 2.0, np.array([0.0]))
    assert (wider.lower, wider.upper) == pytest.approx(expected, rel=1e-12)


def test_edge_criterion_fires_on_a_posterior_piled_at_a_bound():
    # Posterior piled against the upper end 10.5 (mean beyond it): doubling the range adds
    # likelihood mass the draws never saw, and the width term alone would be wrong by ~1 nat.
    priors, means, sds = [LINEAR], [10.8], [1.0]
    draws = _posterior_draws(priors, means, sds, 4000, 4)
    ln_z = _log_evidence(priors, means, sds)
    record = evidence_under_ranges("gauss", priors, draws, 2.0, ln_z, 0.0)
    assert record.method.startswith(NOT_COMPUTABLE)
    assert math.isnan(record.ln_evidence_shift)
    assert record.edge_parameters == ("energy_eV",)
    assert record.missed_mass_bound > MISSED_MASS_LIMIT_NATS
    exact = _log_evidence(_new_priors(record, priors), means, sds) - ln_z
    assert abs(exact - record.width_term) > 0.5  # what a silent width term would have missed
    # With a re-run the record carries the re-run's number and says so.
    rerun = evidence_under_ranges("gauss", priors, draws, 2.0, ln_z, 0.05,
                                  refit=lambda _id, new: (_log_evidence(
                                      [p for p in new if not p.is_fixed], means, sds), 0.1))
    assert rerun.method == QUICK_RERUN
    assert rerun.ln_evidence_shift == pytest.approx(exact, abs=1e-12)
    assert rerun.ln_evidence_shift_err == pytest.approx(math.hypot(0.1, 0.05), rel=1e-12)
    # A re-run below the exact lower bound ln Z + width term (the wider box contains the old
    # one, so Z' >= (w/w') Z) missed the posterior: no number.
    missed = evidence_under_ranges("gauss", priors, draws, 2.0, ln_z, 0.05,
                                   refit=lambda _id, new: (ln_z + record.width_term - 1.0, 0.1))
    assert missed.method.startswith(NOT_COMPUTABLE) and "lower bound" in missed.method
    assert math.isnan(missed.ln_evidence_shift)
    broken = evidence_under_ranges("gauss", priors, draws, 2.0, ln_z, 0.05,
                                   refit=lambda _id, new: (math.inf, math.nan))
    assert "no finite" in broken.method and math.isnan(broken.ln_evidence_shift)


def test_edge_criterion_stays_quiet_far_from_the_bounds_and_fires_on_a_flat_posterior():
    priors = [LINEAR]
    wide = [Prior("energy_eV", "eV", "uniform", 0.0, 15.5, origin="catalogue range x2")]
    inside = _posterior_draws(priors, [5.0], [0.5], 4000, 5)
    assert not edge_contact(priors, wide, inside).touches
    # The data say nothing (posterior = prior): the likelihood is as large beyond the edges.
    flat = np.random.default_rng(6).uniform(0.5, 10.5, size=(4000, 1))
    found = edge_contact(priors, wide, flat)
    assert found.touches and found.parameters == ("energy_eV",)
    # Flat continuation: share 1 % per band of 1 %, added width 0.5 + 5 on a width of 10.
    assert found.missed_mass_bound == pytest.approx(math.log1p(5.5 / 10), abs=0.05)


def test_reweighting_error_counts_the_chain_effective_size():
    priors, means, sds = [LINEAR], [4.0], [2.0]
    draws = _posterior_draws(priors, means, sds, 8000, 7)
    narrowed = [rescaled_prior(LINEAR, 0.5, draws[:, 0])[0]]
    iid = reweight(priors, narrowed, draws)
    chain = reweight(priors, narrowed, draws, chain_effective_size=800)
    assert chain.ln_shift == iid.ln_shift
    assert chain.ln_shift_err == pytest.approx(iid.ln_shift_err * math.sqrt(10), rel=1e-12)
    assert chain.effective_sample_size == pytest.approx(iid.effective_sample_size / 10, rel=1e-12)


def test_device_and_noise_priors_are_left_alone():
    device = Prior("thickness_nm", "nm", "truncated_normal", 1.0, 10.0, mean=5.0, sd=1.0,
                   origin="device description with its standard uncertainty")
    noise = Prior("noise_relative", "1", "log_uniform", 1e-4, 1.0,
                  origin="noise model, same for every mechanism")
    draws = np.column_stack([np.full(100, 5.0), np.full(100, -2.0)])
    record = evidence_under_ranges("x", [device, noise], draws, 0.5, 0.0, 0.0)
    assert record.ranges == {} and record.ln_evidence_shift == 0.0


# --------------------------------------------------------------------------------------------
# Against a direct re-fit of a toy mechanism
# --------------------------------------------------------------------------------------------

#: Boltzmann constant in eV/K from scipy.constants (independent of mechid.constants).
K_EV = constants.k / constants.e
TOY_TRUTH = {"activation_energy_eV": 0.15, "prefactor_S": 1e-3}


def _toy_current(voltage_V, temperature_K, device, *, activation_energy_eV, prefactor_S):
    """|I| = G0 |V| exp(-E_a/(k T)): an Arrhenius conductance (Mott & Davis 1979)."""
    return prefactor_S * voltage_V * np.exp(-activation_energy_eV / (K_EV * temperature_K))


TOY = Mechanism(
    id="toy_sensitivity_ohmic", family="hopping", name="Activated ohmic conductor (toy)",
    formula="I = G0 V exp(-E_a/kT)", source="Arrhenius conductance; Mott & Davis (1979)",
    parameters=(
        Parameter("activation_energy_eV", "eV", "E_a", "activation energy", 0.01, 1.0, 0.2),
        Parameter("prefactor_S", "S", "G0", "conductance prefactor", 1e-9, 1e3, 1e-3,
                  log_scale=True),
    ),
    magnitude=_toy_current, needs_area=False,
)


@pytest.fixture(scope="module")
def toy_fit():
    """A quick fit of the toy on 4 temperatures x 16 biases with 2 % noise (fixed seed)."""
    temperatures = np.linspace(220.0, 340.0, 4)
    biases = np.geomspace(0.02, 1.0, 8)
    t, v = (a.ravel() for a in np.meshgrid(temperatures, np.r_[-biases[::-1], biases],
                                           indexing="ij"))
    clean = np.sign(v) * _toy_current(np.abs(v), t, Device(), **TOY_TRUTH)
    current = clean * (1.0 + 0.02 * np.random.default_rng(11).standard_normal(v.size))
    with temporarily_registered(TOY):
        return fit_mechanism(TOY, v, t, current, Device(), TOY_LADDER, np.random.default_rng(12),
                             search=QUICK_SEARCH)


#: A little longer than the quick ladder, so that the comparison is within ~0.1 nat.
TOY_LADDER = replace(QUICK_LADDER, n_production=200, max_production=400, target_sigma=0.05)


@pytest.mark.parametrize("scale", [0.5, 2.0])
def test_reweighting_agrees_with_a_refit_of_a_toy_mechanism(toy_fit, scale):
    result = toy_fit.result
    record = evidence_under_ranges(
        TOY.id, toy_fit.target.priors, toy_fit.draws_internal, scale, result.log_evidence,
        result.log_evidence_err, result.sampling.effective_sample_size)
    assert record.method == (REWEIGHTING if scale < 1 else REWEIGHTING_WIDTH_TERM)
    new_priors = tuple(
        replace(p, lower=record.ranges[p.name][0], upper=record.ranges[p.name][1])
        if p.name in record.ranges else p for p in toy_fit.target.priors)
    refit_ln_z, refit_err = refit_log_evidence(toy_fit, new_priors, np.random.default_rng(13),
                                               ladder=TOY_LADDER)
    direct = refit_ln_z - result.log_evidence
    tolerance = 4 * math.hypot(refit_err, result.log_evidence_err, record.ln_evidence_shift_err)
    assert record.ln_evidence_shift == pytest.approx(direct, abs=tolerance)
    # The shift is not zero: halving costs ~2 ln 2 for two well-determined parameters.
    assert abs(record.ln_evidence_shift) > 0.9


# --------------------------------------------------------------------------------------------
# In the analysis: a parameter the data do not see makes the wider posterior touch the edge
# --------------------------------------------------------------------------------------------


def _toy_with_spare_current(voltage_V, temperature_K, device, *, activation_energy_eV,
                            prefactor_S, spare_factor):
    """The toy's current; ``spare_factor`` enters nothing (its posterior is its prior)."""
    return _toy_current(voltage_V, temperature_K, device,
                        activation_energy_eV=activation_energy_eV, prefactor_S=prefactor_S)


TOY_WITH_SPARE = Mechanism(
    id="toy_sensitivity_spare", family="hopping", name="Toy with a parameter the data miss",
    formula="I = G0 V exp(-E_a/kT)", source="Arrhenius conductance; Mott & Davis (1979)",
    parameters=(*TOY.parameters,
                Parameter("spare_factor", "1", "f", "enters nothing", 1e-2, 1e2, 1.0,
                          log_scale=True)),
    magnitude=_toy_with_spare_current, needs_area=False,
)


def _toy_series() -> IVSeries:
    temperatures = np.linspace(220.0, 340.0, 4)
    biases = np.geomspace(0.02, 1.0, 8)
    t, v = (a.ravel() for a in np.meshgrid(temperatures, np.r_[-biases[::-1], biases],
                                           indexing="ij"))
    clean = np.sign(v) * _toy_current(np.abs(v), t, Device(), **TOY_TRUTH)
    current = clean * (1.0 + 0.02 * np.random.default_rng(11).standard_normal(v.size))
    return IVSeries(temperature_K=t, voltage_V=v, current_A=current)


@pytest.fixture(scope="module")
def toy_analysis():
    settings = AnalysisSettings(mechanisms=(TOY.id, TOY_WITH_SPARE.id), quick=True, workers=1)
    with temporarily_registered(TOY), temporarily_registered(TOY_WITH_SPARE), \
            warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        return run_analysis_full(_toy_series(), Device(), settings, seed=5)


def test_analysis_reruns_a_mechanism_whose_wider_posterior_touches_the_edge(toy_analysis):
    record = toy_analysis.result.prior_sensitivity
    assert record.computed and len(record.comparisons) == 1
    spare = next(e for e in record.evidences
                 if e.mechanism_id == TOY_WITH_SPARE.id and e.scale == 2.0)
    assert spare.method == QUICK_RERUN and spare.edge_parameters == ("spare_factor",)
    # A parameter the likelihood ignores does not change Z when its range widens, so the
    # true shift is the width term of E_a and G0 alone: ln(0.99/1.495) + ln(12/24) (E_a's
    # doubled range [-0.485, 1.495] eV stops at 0). The width term over all three parameters
    # would be ln 2 lower; the re-run must not be.
    expected = math.log(0.99 / 1.495) + math.log(12 / 24)
    assert spare.width_term == pytest.approx(expected + math.log(0.5), rel=1e-12)
    assert spare.ln_evidence_shift == pytest.approx(expected, abs=4 * spare.ln_evidence_shift_err)
    assert abs(spare.ln_evidence_shift - spare.width_term) > 0.4
    plain = to_plain_json(toy_analysis.result)["prior_sensitivity"]
    assert plain["comparisons"][0]["scales"] == [0.5, 1.0, 2.0]


def test_sensitivity_is_in_the_console_html_and_methods_text(toy_analysis):
    data = to_plain_json(toy_analysis.result)
    console = Console(record=True, width=200)
    render_console(data, console)
    text = console.export_text()
    assert "Prior sensitivity:" in text and "moves by at most" in text
    assert "importance reweighting" in methods_paragraph(data)
    assert "Prior sensitivity:" in results_paragraph(data)
    page = prior_sensitivity_html(data)
    assert "ln B at x0.5" in page and "ln B at x2" in page
    lnb = data["prior_sensitivity"]["comparisons"][0]["ln_bayes_factor"]
    tag = 'data-json="prior_sensitivity.comparisons.0.ln_bayes_factor.2" data-fmt=".2f"'
    assert f"{tag}>{lnb[2]:.2f}<" in page


def test_screen_only_runs_record_why_there_is_no_sensitivity():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        run = run_analysis_full(_toy_series(), Device(), AnalysisSettings(screen_only=True))
    record = run.result.prior_sensitivity
    assert not record.computed and "screen-only" in record.reason
    assert to_plain_json(run.result)["prior_sensitivity"]["comparisons"] == []
