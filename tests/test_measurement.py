"""Measurement cautions triggered by the data (issue 11): each rule fires just above its
threshold, stays silent just below, and the repeat diagnostic matches a value computed here
by hand, independently of mechid."""

from __future__ import annotations

import io
import statistics
import warnings

import numpy as np
import pytest
from rich.console import Console

from mechid.analysis import AnalysisSettings, cautions, run_analysis_full
from mechid.data import IVSeries
from mechid.device import Device, Measured
from mechid.errors import MechidWarning
from mechid.measurement import (
    CRYOGENIC_TEMPERATURE_K,
    HIGH_CURRENT_DENSITY_A_PER_CM2,
    HIGH_VOLTAGE_V,
    measurement_cautions,
    repeat_agreement,
)
from mechid.report import build_report_html
from mechid.report.console import render_console
from mechid.results import to_plain_json

VOLTAGES = np.array([-3.0, -2.0, -1.0, 1.0, 2.0, 3.0])


def _series(temperatures: list[float], voltages: np.ndarray = VOLTAGES,
            current_scale: float = 1e-9) -> IVSeries:
    t = np.repeat(temperatures, voltages.size)
    v = np.tile(voltages, len(temperatures))
    return IVSeries(t, v, current_scale * np.sinh(v / 3.0))


def _cautions_mentioning(notes: list[str], word: str) -> list[str]:
    return [n for n in notes if word in n]


def test_tidy_room_temperature_data_get_no_measurement_caution() -> None:
    assert measurement_cautions(_series([300.0, 350.0]), Device(area_cm2=1e-4)) == []


@pytest.mark.parametrize(("largest_v", "fires"), [(HIGH_VOLTAGE_V * 1.01, True),
                                                  (HIGH_VOLTAGE_V, False)])
def test_high_voltage_caution_fires_only_above_threshold(largest_v: float, fires: bool) -> None:
    voltages = np.array([-largest_v, -1.0, -0.5, 0.5, 1.0, 2.0])
    notes = measurement_cautions(_series([300.0], voltages), Device())
    hits = _cautions_mentioning(notes, "high voltage")
    assert len(hits) == int(fires)
    if fires:
        assert f"|V| = {largest_v:.3g} V" in hits[0]
        assert "electrical-safety rules" in hits[0] and "written procedures" in hits[0]


def test_current_density_caution_uses_the_area_and_names_self_heating() -> None:
    # sinh(1) * scale / area: the largest |I| of the series, divided here by hand.
    area_cm2 = 1e-4
    scale = 1.1 * HIGH_CURRENT_DENSITY_A_PER_CM2 * area_cm2 / np.sinh(1.0)
    series = _series([300.0], current_scale=scale)
    notes = measurement_cautions(series, Device(area_cm2=area_cm2))
    hits = _cautions_mentioning(notes, "self-heating")
    assert len(hits) == 1
    expected_density = scale * np.sinh(1.0) / area_cm2
    assert f"{expected_density:.3g} A/cm^2" in hits[0]
    # Ten times the area: a tenth of the density, below the threshold.
    assert _cautions_mentioning(measurement_cautions(series, Device(area_cm2=1e-3)),
                                "self-heating") == []
    # No area: the current density is unknown, nothing is claimed.
    assert _cautions_mentioning(measurement_cautions(series, Device()), "self-heating") == []


@pytest.mark.parametrize(("coldest", "fires"), [(CRYOGENIC_TEMPERATURE_K - 1.0, True),
                                                (CRYOGENIC_TEMPERATURE_K, False)])
def test_cryogenic_caution_names_thermometry_and_thermal_lag(coldest: float, fires: bool) -> None:
    notes = measurement_cautions(_series([coldest, 300.0]), Device())
    hits = _cautions_mentioning(notes, "thermal lag")
    assert len(hits) == int(fires)
    if fires:
        assert f"{coldest:g} K" in hits[0]
        assert "cryogen-handling rules" in hits[0] and "written procedures" in hits[0]


def _hand_median_spread(readings: dict[float, list[float]]) -> float:
    """(max - min) / mean of |I| per repeated voltage, median over voltages, by hand."""
    spreads = []
    for values in readings.values():
        if len(values) > 1:
            magnitudes = [abs(x) for x in values]
            spreads.append((max(magnitudes) - min(magnitudes))
                           / (sum(magnitudes) / len(magnitudes)))
    return statistics.median(spreads)


def test_repeat_diagnostic_matches_a_hand_computation() -> None:
    # 300 K: up and down sweep over 1, 2, 3 V (back-sweep currents 10 %, 20 %, 40 % higher)
    # plus a single reading at -1 V; 350 K: one sweep only (no repeats).
    up = {1.0: 1e-9, 2.0: 4e-9, 3.0: 9e-9}
    down = {1.0: 1.1e-9, 2.0: 4.8e-9, 3.0: 12.6e-9}
    readings = {v: [up[v], down[v]] for v in up}
    t = [300.0] * 7 + [350.0] * 4
    v = [1.0, 2.0, 3.0, 3.0, 2.0, 1.0, -1.0, -2.0, -1.0, 1.0, 2.0]
    i = [up[1.0], up[2.0], up[3.0], down[3.0], down[2.0], down[1.0], -1e-9,
         -5e-9, -2e-9, 2e-9, 5e-9]
    series = IVSeries(np.array(t), np.array(v), np.array(i))
    agreements = repeat_agreement(series)
    assert [a.temperature_K for a in agreements] == [300.0]
    assert agreements[0].n_voltages == 3
    expected = _hand_median_spread(readings)
    assert expected == pytest.approx(0.2 / 1.1)  # 2 V: (4.8 - 4) / 4.4
    assert agreements[0].median_relative_difference == pytest.approx(expected, rel=1e-13)
    hits = _cautions_mentioning(measurement_cautions(series, Device()), "hysteresis")
    assert len(hits) == 1
    assert f"300 K: {expected:.2g}" in hits[0]
    assert "cannot be told apart from drift" in hits[0]


def test_no_repeats_means_no_hysteresis_claim() -> None:
    assert repeat_agreement(_series([300.0, 350.0])) == []


def test_analysis_cautions_carry_the_measurement_cautions() -> None:
    series = _series([77.0, 300.0], np.array([-60.0, -1.0, -0.5, 0.5, 1.0, 60.0]))
    notes = cautions(series, Device(thickness_nm=None), [], None)
    assert _cautions_mentioning(notes, "high voltage")
    assert _cautions_mentioning(notes, "thermal lag")
    # They follow the notes about what the data cannot tell apart.
    assert notes.index(_cautions_mentioning(notes, "high voltage")[0]) > notes.index(
        _cautions_mentioning(notes, "thickness")[0])


def test_console_and_report_show_the_measurement_cautions() -> None:
    voltages = np.linspace(5.0, 60.0, 8)
    series = _series([77.0, 150.0, 300.0], np.concatenate([-voltages[::-1], voltages]))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        run = run_analysis_full(series, Device(thickness_nm=Measured(20.0, 1.0), area_cm2=1e-4),
                                AnalysisSettings(screen_only=True), seed=0)
    data = to_plain_json(run.result)
    for word in ("high voltage", "thermal lag"):
        assert len(_cautions_mentioning(list(data["cautions"]), word)) == 1
    buffer = io.StringIO()
    render_console(data, Console(file=buffer, width=200, no_color=True))
    html_text = build_report_html(run)
    for word in ("high voltage", "thermal lag", "written procedures"):
        assert word in buffer.getvalue()
        assert word in html_text


def test_repeat_agreement_is_a_json_field_of_the_input() -> None:
    # The hysteresis/drift number itself, not only a sentence: same values as the diagnostic.
    from mechid.results import to_plain_json

    up = np.array([1e-9, 4e-9, 9e-9])
    series = IVSeries(np.full(9, 300.0), np.array([1.0, 2.0, 3.0, 3.0, 2.0, 1.0, -1.0, -2.0, -3.0]),
                      np.r_[up, 1.2 * up[::-1], -up])
    run = run_analysis_full(series, Device(area_cm2=1e-4),
                            AnalysisSettings(screen_only=True), seed=0)
    (entry,) = to_plain_json(run.result)["input"]["repeat_agreement"]
    (expected,) = repeat_agreement(series)
    assert entry == {"temperature_K": 300.0, "n_voltages": 3,
                     "median_relative_difference": expected.median_relative_difference}
    assert expected.median_relative_difference == pytest.approx(0.2 / 1.1, rel=1e-13)
