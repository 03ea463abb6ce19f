"""Validity domains decide the outcome: the result says so.

A mechanism whose formula holds nowhere on the data is listed as not fitted, with the failing
condition and the value it would need (JSON, console, HTML report, verdict count). A fitted
mechanism whose data would need parameters outside the domain gets a caution naming the
condition and the value (:mod:`mechid.inference.domain`); clean in-domain data get none.

The quantities that decide (eV/phi0, pi c kT) are recomputed here from scipy.constants,
independently of mechid, so the data are known to need (or not need) the domain's outside.
"""

from __future__ import annotations

import html
import io
import json
import re
import warnings
from pathlib import Path

import numpy as np
import pytest
from rich.console import Console
from scipy import constants

from mechid.analysis import AnalysisSettings, run_analysis_full
from mechid.catalogue import DIRECT_TUNNELLING, FOWLER_NORDHEIM, get_mechanism
from mechid.data import IVSeries, read_series
from mechid.device import Device, device_from_values, read_device_toml
from mechid.errors import MechidWarning
from mechid.inference.domain import DOMAIN_PULL_MARGIN, check_domain
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors
from mechid.inference.settings import QUICK_SEARCH
from mechid.inference.start import find_modes
from mechid.report import build_report_html
from mechid.report.console import render_console
from mechid.report.text import fmt
from mechid.results import to_plain_json
from mechid.screening import linearise

REFERENCE = Path(__file__).resolve().parents[1] / "reference_curves"
FOLDERS = sorted(p for p in REFERENCE.iterdir() if (p / "truth.json").is_file())

# Fowler-Nordheim, phi = 3 eV, d = 8 nm, m* = 0.5 (as in tests/test_physics_validity.py),
# measured at 200-300 K and 5.5-10 V: at 300 K and 5.5 V the Murphy-Good thermal factor needs
# pi c kT = 1.48 > 1 (recomputed below), outside its validity.
FN_TRUTH = {"barrier_height_eV": 3.0, "thickness_nm": 8.0, "effective_mass_ratio": 0.5}
FN_TEMPERATURES_K = (200.0, 250.0, 300.0)
FN_BIASES_V = np.linspace(5.5, 10.0, 12)


def _fn_thermal_argument(voltage, temperature, phi, thickness, mass):
    """pi c kT with c = 2 sqrt(2 m* e phi)/(hbar e F) (Murphy & Good 1956), SI units."""
    field = voltage / (thickness * 1e-9)
    c = 2 * np.sqrt(2 * mass * constants.m_e * phi * constants.e) / (constants.hbar * field)
    return np.pi * c * constants.k * temperature / constants.e


def _bare_data(mechanism, params, temperatures_K, biases_V, device, seed):
    """Noisy currents of the bare formula (validity not enforced), 2 % relative noise."""
    t = np.repeat(np.asarray(temperatures_K, float), len(biases_V))
    v = np.tile(np.asarray(biases_V, float), len(temperatures_K))
    current = mechanism.current(v, t, params, device, enforce_validity=False)
    noisy = current * (1 + 0.02 * np.random.default_rng(seed).standard_normal(current.shape))
    return v, t, noisy


def _check(mechanism, v, t, i, device, seed=1, hints=None):
    target = MechanismTarget(mechanism, v, t, i, device, mechanism_priors(mechanism, device, i))
    modes = find_modes(target, np.random.default_rng(seed), hints, search=QUICK_SEARCH)
    return check_domain(target, [m.point for m in modes], np.random.default_rng(seed + 1))


def test_fn_data_that_need_a_thermal_argument_above_one_pull_outside():
    device = Device(area_cm2=1e-4)
    needed = _fn_thermal_argument(5.5, 300.0, 3.0, 8.0, 0.5)
    assert needed == pytest.approx(1.48, abs=0.01)  # the data need pi c kT > 1
    v, t, i = _bare_data(FOWLER_NORDHEIM, FN_TRUTH, FN_TEMPERATURES_K, FN_BIASES_V, device, 2)
    check = _check(FOWLER_NORDHEIM, v, t, i, device)
    assert check.pulls and check.gain > DOMAIN_PULL_MARGIN
    assert [x.condition_id for x in check.violations] == ["thermal_factor_argument"]
    worst = check.violations[0]
    assert worst.extreme_value > 1.0 and worst.requirement == "pi c kT <= 1"
    # the violation's value is the thermal argument of the point outside, recomputed here
    p = check.parameters_outside
    expected = _fn_thermal_argument(worst.at_voltage_V, worst.at_temperature_K,
                                    p["barrier_height_eV"], p["thickness_nm"],
                                    p["effective_mass_ratio"])
    assert worst.extreme_value == pytest.approx(expected, rel=1e-6)
    assert "pi c kT" in check.caution("fowler_nordheim")


def test_direct_tunnelling_data_beyond_the_barrier_pull_outside_and_say_the_barrier():
    # Simmons intermediate-voltage data with phi0 = 1 eV measured to 1.6 V: eV/phi0 = 1.6.
    # Thickness and mass are pinned by the device, so a valid barrier (>= 1.6 eV) would give
    # currents orders of magnitude too small; the data want phi0 = 1 eV.
    device = device_from_values(thickness_nm=2.0, thickness_sd_nm=0.1, area_cm2=1e-4,
                                effective_mass_ratio=0.5, effective_mass_sd=0.05)
    truth = {"barrier_height_eV": 1.0, "thickness_nm": 2.0, "effective_mass_ratio": 0.5}
    v, t, i = _bare_data(DIRECT_TUNNELLING, truth, (77.0, 150.0), np.linspace(0.1, 1.6, 16),
                         device, 2)
    check = _check(DIRECT_TUNNELLING, v, t, i, device)
    assert check.pulls and check.gain > DOMAIN_PULL_MARGIN
    assert check.parameters_outside["barrier_height_eV"] == pytest.approx(1.0, rel=0.05)
    found = {x.condition_id: x for x in check.violations}
    assert set(found) == {"bias_below_barrier"}
    assert found["bias_below_barrier"].at_voltage_V == pytest.approx(1.6)
    assert found["bias_below_barrier"].extreme_value == pytest.approx(
        1.6 / check.parameters_outside["barrier_height_eV"], rel=1e-9)


@pytest.mark.parametrize("folder", FOLDERS, ids=lambda p: p.name)
def test_clean_reference_series_do_not_pull_their_mechanism_outside(folder):
    # The shipped series are simulated inside each formula's domain: the false-alarm rate
    # of the check must be zero on all seven.
    # The search starts, as in an analysis, from the screening's hints. Without them the
    # quick search missed the inhomogeneous diode's mode on the patchy-Si series (best valid
    # log posterior 1948 against 4244 at the truth) and the check raised a false pull; its
    # hints now come from the rectifying-contact analysis.
    truth = json.loads((folder / "truth.json").read_text())
    series = read_series(folder / "data.csv")
    device = read_device_toml(folder / "device.toml")
    hints = linearise(series, device).for_mechanism(truth["mechanism"]).hints
    check = _check(get_mechanism(truth["mechanism"]), series.voltage_V, series.temperature_K,
                   series.current_A, device, hints=hints)
    assert not check.pulls, (check.gain, check.violations)


@pytest.fixture(scope="module")
def refused_run():
    """Quick analysis of FN data (5.5-10 V) with FN and direct tunnelling asked for."""
    device = Device(area_cm2=1e-4)
    v, t, i = _bare_data(FOWLER_NORDHEIM, FN_TRUTH, FN_TEMPERATURES_K,
                         np.r_[-FN_BIASES_V[::-1], FN_BIASES_V], device, 3)
    settings = AnalysisSettings(mechanisms=("fowler_nordheim", "direct_tunnelling"), quick=True,
                                workers=1)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        run = run_analysis_full(IVSeries(t, v, i), device, settings, seed=4)
    return run, [str(w.message) for w in caught]


def test_a_mechanism_refused_everywhere_is_listed_as_not_fitted_with_its_reason(refused_run):
    run, messages = refused_run
    result = run.result
    assert any("direct_tunnelling was not fitted" in m for m in messages)
    assert [m.id for m in result.mechanisms] == ["fowler_nordheim"]
    (entry,) = result.not_fitted
    assert entry.id == "direct_tunnelling" and entry.family == DIRECT_TUNNELLING.family
    (violation,) = [x for x in entry.violations if x.condition_id == "bias_below_barrier"]
    # every barrier of the prior is <= 5 eV, so eV/phi0 >= 5.5/5 = 1.1 for every draw
    assert violation.fraction_of_draws == 1.0 and violation.requirement == "eV/phi0 <= 1"
    assert violation.extreme_value >= 10.0 / 5.0 and violation.at_voltage_V == 10.0
    assert result.verdict.n_candidates == 1
    assert "among the 1 mechanism fitted" in result.verdict.sentence
    data = json.loads(json.dumps(to_plain_json(result), allow_nan=False))
    assert data["not_fitted"][0]["id"] == "direct_tunnelling"
    assert data["not_fitted"][0]["violations"][0]["requirement"] == "eV/phi0 <= 1"
    assert data["verdict"]["n_candidates"] == 1


def test_the_data_pulling_fn_outside_give_a_caution_in_result_console_and_report(refused_run):
    run, _ = refused_run
    fn = run.result.mechanism("fowler_nordheim")
    assert fn.validity is not None and fn.validity.pulls
    assert any(c.startswith("fowler_nordheim: the data pull the fit outside")
               and "pi c kT" in c for c in run.result.cautions)
    console = Console(record=True, width=200, file=io.StringIO())
    render_console(run.result, console)
    text = console.export_text()
    assert "Not fitted: formula outside its validity on these data" in text
    assert "direct_tunnelling: eV/phi0" in text
    assert "the data pull the fit outside" in text
    report = build_report_html(run)
    assert "Not fitted: formula outside its validity on these data" in report
    assert "The data pull outside the formula's validity" in report
    # the numbers the new parts show are the JSON's, formatted as they say
    data = to_plain_json(run.result)
    tagged = [(path, spec, html.unescape(text)) for path, spec, text in re.findall(
        r'<span data-json="([^"]+)" data-fmt="([^"]+)">([^<]*)</span>', report)
        if path.startswith("not_fitted.") or ".validity." in path]
    assert {path for path, _, _ in tagged} >= {"not_fitted.0.violations.0.extreme_value",
                                               "mechanisms.0.validity.gain"}
    for path, spec, text in tagged:
        node = data
        for part in path.split("."):
            node = node[int(part)] if isinstance(node, list) else node[part]
        assert text == fmt(node, spec), path


def test_when_every_mechanism_asked_for_is_refused_the_outputs_say_so_not_screening_only():
    # Direct tunnelling alone on 5.5-10 V data: eV/phi0 >= 5.5/5 = 1.1 for its whole prior.
    device = Device(area_cm2=1e-4)
    v, t, i = _bare_data(FOWLER_NORDHEIM, FN_TRUTH, FN_TEMPERATURES_K, FN_BIASES_V, device, 3)
    settings = AnalysisSettings(mechanisms=("direct_tunnelling",), quick=True, workers=1)
    with pytest.warns(MechidWarning, match="direct_tunnelling was not fitted"):
        run = run_analysis_full(IVSeries(t, v, i), device, settings, seed=1)
    assert run.result.mechanisms == () and run.result.verdict is None
    assert [m.id for m in run.result.not_fitted] == ["direct_tunnelling"]
    console = Console(record=True, width=200, file=io.StringIO())
    render_console(run.result, console)
    text = console.export_text()
    assert "direct_tunnelling: eV/phi0" in text and "Screening only" not in text
    report = build_report_html(run)
    assert "No mechanism was fitted" in report and "Screening only" not in report
