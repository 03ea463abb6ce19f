"""Bias and temperature windows: the analysis sees only the points inside, and says so."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from mechid.analysis import AnalysisSettings, apply_windows
from mechid.cli import app
from mechid.data import read_series
from mechid.errors import MechidError

FN = Path(__file__).resolve().parents[1] / "reference_curves" / "larkfield_sio2_fowler_nordheim"
runner = CliRunner()


def test_windows_keep_exactly_the_points_inside():
    series = read_series(FN / "data.csv")
    settings = AnalysisSettings(bias_window_V=(7.0, 9.0), temperature_window_K=(100.0, 200.0))
    inside, record = apply_windows(series, settings)
    expected = ((np.abs(series.voltage_V) >= 7.0) & (np.abs(series.voltage_V) <= 9.0)
                & (series.temperature_K >= 100.0) & (series.temperature_K <= 200.0))
    assert inside.n_points == expected.sum() > 0
    np.testing.assert_array_equal(inside.current_A, series.current_A[expected])
    assert record == {"bias_abs_V": [7.0, 9.0], "temperature_K": [100.0, 200.0],
                      "n_points_outside": int((~expected).sum())}
    same, none = apply_windows(series, AnalysisSettings())
    assert same is series and none["n_points_outside"] == 0


@pytest.mark.parametrize("window, message", [((5.0, 5.0), "LOW < HIGH"), ((-1.0, 2.0), "0 <= LOW"),
                                             ((20.0, 30.0), "keep 0 of")])
def test_impossible_windows_are_refused(window, message):
    with pytest.raises(MechidError, match=message):
        apply_windows(read_series(FN / "data.csv"), AnalysisSettings(bias_window_V=window))


def test_cli_window_reaches_the_json_and_the_methods_text(tmp_path):
    out = tmp_path / "r.json"
    result = runner.invoke(app, ["analyze", str(FN), "--screen-only", "--bias-window", "7:9.5",
                                 "--temperature-window", "100:250", "--json", str(out)])
    assert result.exit_code == 0, result.output
    data = json.loads(out.read_text())
    window = data["input"]["window"]
    assert window["bias_abs_V"] == [7.0, 9.5] and window["temperature_K"] == [100.0, 250.0]
    assert data["input"]["n_points_fitted"] + window["n_points_outside"] == data["input"]["n_points"]
    from mechid.report.text import methods_paragraph

    assert "restricted to 7 V <= |V| <= 9.5 V and 100 K <= T <= 250 K" in methods_paragraph(data)


@pytest.mark.parametrize("text", ["7-9", "a:b", "7"])
def test_cli_window_syntax_errors_exit_non_zero_with_a_message(text):
    result = runner.invoke(app, ["analyze", str(FN), "--screen-only", "--bias-window", text])
    assert result.exit_code != 0
    assert "--bias-window expects LO:HI" in result.output
    assert "Traceback" not in result.output
