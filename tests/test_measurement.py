"""Measurement cautions triggered by the data (issue 11): each rule fires just above its
threshold, stays silent just below, and the repeat diagnostic matches a value computed here
by hand, independently of mechid."""

from __future__ import annotations

import io
import math
import statistics
import warnings
from pathlib import Path

import numpy as np
import pytest
from rich.console import Console

from mechid.analysis import AnalysisSettings, apply_windows, cautions, run_analysis_full
from mechid.data import IVSeries, read_series, series_from_arrays
from mechid.device import Device, Measured
from mechid.errors import InputDataError, MechidWarning
from mechid.measurement import (
    CRYOGENIC_TEMPERATURE_K,
    DRIFT_RELATIVE_CHANGE,
    HIGH_CURRENT_DENSITY_A_PER_CM2,
    HIGH_FIELD_V_PER_CM,
    HIGH_VOLTAGE_V,
    drift_check,
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
    assert "within one sweep" in hits[0]


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


# --------------------------------------------------------------------------------------------
# Reading order: drift between the first and last readings of a temperature, hysteresis within
# one sweep. Expected numbers are computed here with math.log on the factors the data were
# built with, independently of mechid.
# --------------------------------------------------------------------------------------------

SWEEP_V = np.array([-3.0, -2.0, -1.0, 1.0, 2.0, 3.0])


def _sweep(temperature: float, factor: float = 1.0,
           voltages: np.ndarray = SWEEP_V) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """One sweep in reading order: (T, V, I) with I = factor x 1 nA x sinh(V / 3)."""
    return (np.full(voltages.size, temperature), voltages.copy(),
            factor * 1e-9 * np.sinh(voltages / 3.0))


def _read_in_order(*sweeps: tuple[np.ndarray, np.ndarray, np.ndarray]) -> IVSeries:
    """The sweeps as one table, rows in the order given, through the data module's checks."""
    t, v, i = (np.concatenate(parts) for parts in zip(*sweeps, strict=True))
    return series_from_arrays(t, v, i)


def _drift_hits(notes: list[str]) -> list[str]:
    return _cautions_mentioning(notes, "measured again")


@pytest.mark.parametrize("factor", [1.2, 0.8])
def test_first_temperature_remeasured_with_a_change_gets_a_signed_drift_caution(
        factor: float) -> None:
    series = _read_in_order(_sweep(300.0), _sweep(350.0), _sweep(400.0), _sweep(300.0, factor))
    (check,) = drift_check(series)
    assert check.temperature_K == 300.0
    assert check.n_blocks == 2 and check.n_voltages == SWEEP_V.size
    assert check.median_log_ratio == pytest.approx(math.log(factor), rel=1e-12)
    assert check.median_relative_difference == pytest.approx(abs(factor - 1.0), rel=1e-12)
    assert check.changed
    (hit,) = _drift_hits(measurement_cautions(series, Device()))
    assert f"{math.log(factor):+.3g}" in hit
    assert ("rose" if factor > 1 else "fell") in hit
    assert "the film or contacts changed between the two readings" in hit
    assert f"{DRIFT_RELATIVE_CHANGE:.0%} (common practice)" in hit
    assert "written procedures" in hit
    # Separate readings of a temperature are drift, not hysteresis.
    assert repeat_agreement(series) == []


def test_remeasured_temperature_without_change_states_the_numbers_only() -> None:
    series = _read_in_order(_sweep(300.0), _sweep(350.0), _sweep(400.0), _sweep(300.0, 1.05))
    (check,) = drift_check(series)
    assert check.median_log_ratio == pytest.approx(math.log(1.05), rel=1e-12)
    assert not check.changed  # 5 % is below the 10 % common-practice threshold
    notes = measurement_cautions(series, Device())
    (hit,) = _drift_hits(notes)
    assert f"{math.log(1.05):+.3g}" in hit and "over 6 voltages" in hit
    assert "changed between" not in hit
    # A re-measured temperature replaces the suggestion to re-measure one.
    assert _cautions_mentioning(notes, "re-measuring") == []


def test_threshold_is_exclusive_just_above_and_below() -> None:
    above = _read_in_order(_sweep(300.0), _sweep(350.0), _sweep(300.0, 1.0 + 1.01 * DRIFT_RELATIVE_CHANGE))
    below = _read_in_order(_sweep(300.0), _sweep(350.0), _sweep(300.0, 1.0 + 0.99 * DRIFT_RELATIVE_CHANGE))
    assert drift_check(above)[0].changed and not drift_check(below)[0].changed


def test_forward_and_backward_sweeps_in_one_block_are_hysteresis_only() -> None:
    up = _sweep(300.0)
    back = _sweep(300.0, 1.2, SWEEP_V[::-1])
    series = _read_in_order(up, back, _sweep(350.0), _sweep(400.0))
    assert drift_check(series) == []
    (agreement,) = repeat_agreement(series)
    assert agreement.temperature_K == 300.0 and agreement.n_voltages == SWEEP_V.size
    assert agreement.median_relative_difference == pytest.approx(0.2 / 1.1, rel=1e-12)
    notes = measurement_cautions(series, Device())
    assert _drift_hits(notes) == []
    assert len(_cautions_mentioning(notes, "hysteresis")) == 1


def test_hysteresis_is_counted_within_blocks_and_drift_between_them() -> None:
    # 300 K swept up and back (back sweep 10 % higher), then 350 K, then 300 K swept up and
    # back again, all 30 % higher: hysteresis 0.1/1.05 in each block, drift ln(1.3) on the
    # block means (1.3 x 1.05 / 1.05).
    first = (_sweep(300.0), _sweep(300.0, 1.1, SWEEP_V[::-1]))
    last = (_sweep(300.0, 1.3), _sweep(300.0, 1.43, SWEEP_V[::-1]))
    series = _read_in_order(*first, _sweep(350.0), *last)
    (agreement,) = repeat_agreement(series)
    assert agreement.n_voltages == 2 * SWEEP_V.size
    assert agreement.median_relative_difference == pytest.approx(0.1 / 1.05, rel=1e-12)
    (check,) = drift_check(series)
    assert check.median_log_ratio == pytest.approx(math.log(1.3), rel=1e-12)


def _write_sweep(path: Path, sweep: tuple[np.ndarray, np.ndarray, np.ndarray]) -> None:
    t, v, i = sweep
    lines = ["temperature_K,voltage_V,current_A"]
    lines += [f"{float(a)!r},{float(b)!r},{float(c)!r}" for a, b, c in zip(t, v, i, strict=True)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


@pytest.mark.parametrize(("names", "expected_log_ratio"), [
    (("1_300K.csv", "2_350K.csv", "3_300K_again.csv"), math.log(1.2)),
    (("3_300K.csv", "2_350K.csv", "1_300K_again.csv"), -math.log(1.2)),
])
def test_files_are_read_in_the_order_given(tmp_path: Path, names: tuple[str, str, str],
                                           expected_log_ratio: float) -> None:
    # A folder's files are read in name order: the same three files, named so that the 1.2x
    # sweep comes last (current rose) or first (current fell).
    sweeps = (_sweep(300.0), _sweep(350.0), _sweep(300.0, 1.2))
    for name, sweep in zip(names, sweeps, strict=True):
        _write_sweep(tmp_path / name, sweep)
    series = read_series(tmp_path)
    (check,) = drift_check(series)
    assert check.median_log_ratio == pytest.approx(expected_log_ratio, rel=1e-12)


def test_two_files_of_one_temperature_read_one_after_another_are_one_block(
        tmp_path: Path) -> None:
    for name, sweep in (("a_300K.csv", _sweep(300.0)), ("b_300K_again.csv", _sweep(300.0, 1.2)),
                        ("c_350K.csv", _sweep(350.0))):
        _write_sweep(tmp_path / name, sweep)
    series = read_series(tmp_path)
    assert drift_check(series) == []
    assert repeat_agreement(series)[0].median_relative_difference == pytest.approx(0.2 / 1.1)


def test_reading_index_follows_sorting_and_exclusions(tmp_path: Path) -> None:
    # Rows 0..7 in reading order; row 1 is at zero bias (excluded), the rest are sorted by
    # temperature then voltage, each keeping its position in the file.
    t = [350.0, 350.0, 350.0, 350.0, 300.0, 300.0, 300.0, 350.0]
    v = [2.0, 0.0, 1.0, 3.0, 3.0, 1.0, 2.0, -1.0]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        series = series_from_arrays(t, v, [1e-9 * x for x in v])
    assert series.reading_index.tolist() == [5, 6, 4, 7, 2, 0, 3]
    assert series.voltage_V.tolist() == [1.0, 2.0, 3.0, -1.0, 1.0, 2.0, 3.0]
    # The bias window keeps each point's position.
    inside, _ = apply_windows(series, AnalysisSettings(bias_window_V=(1.5, 10.0)))
    assert inside.reading_index.tolist() == [6, 4, 0, 3]


def test_constructed_series_default_to_the_order_of_the_arrays() -> None:
    series = IVSeries([300.0, 300.0, 300.0], [1.0, 2.0, 3.0], [1e-9, 2e-9, 3e-9])
    assert series.reading_index.tolist() == [0, 1, 2]
    with pytest.raises(InputDataError):
        IVSeries([300.0, 300.0], [1.0, 2.0], [1e-9, 2e-9], reading_index=[0])


def test_remeasuring_is_suggested_for_a_temperature_series_or_high_field_only() -> None:
    def suggested(series: IVSeries, device: Device) -> bool:
        return bool(_cautions_mentioning(measurement_cautions(series, device), "re-measuring"))

    three = _series([300.0, 350.0, 400.0])
    two = _series([300.0, 350.0])
    assert suggested(three, Device())
    assert not suggested(two, Device())
    # 3 V across 30 nm is exactly 1 MV/cm (3 / 3e-6 cm); across 31 nm it is below.
    assert suggested(two, Device(thickness_nm=Measured(30.0)))
    assert not suggested(two, Device(thickness_nm=Measured(31.0)))
    assert HIGH_FIELD_V_PER_CM == 1.0e6
    assert len([n for n in measurement_cautions(three, Device()) if "re-measuring" in n]) == 1


def test_drift_check_is_a_json_field_of_the_input() -> None:
    series = _read_in_order(_sweep(300.0), _sweep(350.0), _sweep(300.0, 1.2))
    run = run_analysis_full(series, Device(area_cm2=1e-4), AnalysisSettings(screen_only=True),
                            seed=0)
    data = to_plain_json(run.result)
    (entry,) = data["input"]["drift_check"]
    assert entry["temperature_K"] == 300.0 and entry["n_blocks"] == 2
    assert entry["n_voltages"] == SWEEP_V.size
    assert entry["median_log_ratio"] == pytest.approx(math.log(1.2), rel=1e-12)
    assert entry["median_relative_difference"] == pytest.approx(0.2, rel=1e-12)
    assert data["input"]["repeat_agreement"] == []
    assert len(_drift_hits(list(data["cautions"]))) == 1


@pytest.mark.parametrize("name", ["demo", "larkfield_gan_schottky_diode",
                                  "larkfield_sinx_poole_frenkel"])
def test_demo_and_reference_series_gain_no_drift_or_hysteresis_caution(name: str) -> None:
    root = Path(__file__).resolve().parents[1]
    path = (root / "mechid" / "demo_data" / "data.csv" if name == "demo"
            else root / "reference_curves" / name / "data.csv")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        series = read_series(path)
    assert drift_check(series) == [] and repeat_agreement(series) == []
    notes = measurement_cautions(series, Device())
    assert _drift_hits(notes) == [] and _cautions_mentioning(notes, "hysteresis") == []
