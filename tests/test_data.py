"""Tests of mechid.data: reading, unit conversion, validation messages, exclusions, writing."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from mechid.data import (
    MIN_VOLTAGES_PER_TEMPERATURE,
    REASON_COMPLIANCE,
    REASON_ZERO_BIAS,
    IVSeries,
    compliance_mask,
    read_series,
    write_series_csv,
)
from mechid.errors import InputDataError, MechidWarning

GOOD_ROWS = "77,0.1,1e-9\n77,0.2,3e-9\n77,0.3,7e-9\n300,0.1,1e-6\n300,0.2,3e-6\n300,0.3,8e-6\n"


def _write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


# ----------------------------------------------------------------------------- good input


def test_tidy_csv_is_read_in_si_and_sorted(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n" + GOOD_ROWS)
    series = read_series(path)
    assert series.n_points == 6
    # Bit equality is justified in this module: decimal parsing and unit scaling (one IEEE
    # multiplication) are correctly rounded on every processor; no exp/log/power is involved.
    np.testing.assert_array_equal(series.temperatures, [77.0, 300.0])
    voltage, current = series.at_temperature(300.0)
    np.testing.assert_array_equal(voltage, [0.1, 0.2, 0.3])
    np.testing.assert_array_equal(current, [1e-6, 3e-6, 8e-6])
    assert series.sources == ("iv.csv",)
    assert series.excluded == ()
    assert series.temperature_K.dtype == np.float64


@pytest.mark.parametrize(
    ("column", "cell", "expected_A"),
    [
        ("current_A", "2.5", 2.5),
        ("current_mA", "2.5", 2.5e-3),
        ("current_uA", "2.5", 2.5e-6),
        ("current_µA", "2.5", 2.5e-6),
        ("current_nA", "2.5", 2.5e-9),
        ("current_pA", "2.5", 2.5e-12),
        ("current_fA", "2.5", 2.5e-15),
        ("current [nA]", "2.5", 2.5e-9),
        ("I_mA", "2.5", 2.5e-3),
    ],
)
def test_current_units_are_converted_to_ampere(tmp_path: Path, column: str, cell: str,
                                               expected_A: float) -> None:
    rows = "".join(f"77,{v},{float(cell) * v}\n" for v in (1, 2, 3))
    path = _write(tmp_path, "iv.csv", f"temperature_K,voltage_V,{column}\n{rows}")
    series = read_series(path)
    np.testing.assert_allclose(series.current_A, expected_A * np.array([1, 2, 3]), rtol=1e-12)


@pytest.mark.parametrize("column", ["voltage_mV", "voltage [mV]", "voltage (mV)", "V_mV"])
def test_millivolt_columns_are_converted_to_volt(tmp_path: Path, column: str) -> None:
    path = _write(tmp_path, "iv.csv", f"temperature_K,{column},current_A\n"
                  "77,-250,-1e-9\n77,100,1e-9\n77,500,4e-9\n")
    series = read_series(path)
    np.testing.assert_allclose(series.voltage_V, [-0.25, 0.1, 0.5], rtol=1e-12)


def test_celsius_is_converted_to_kelvin(tmp_path: Path) -> None:
    # 0 degC = 273.15 K exactly (SI Brochure, 9th ed., 2019, section 2.3.1).
    path = _write(tmp_path, "iv.csv", "temperature_C,voltage_V,current_A\n"
                  "0,0.1,1e-9\n0,0.2,2e-9\n0,0.3,3e-9\n26.85,0.1,1e-8\n26.85,0.2,2e-8\n"
                  "26.85,0.3,3e-8\n")
    series = read_series(path)
    np.testing.assert_allclose(series.temperatures, [273.15, 300.0], rtol=1e-12)


def test_column_order_is_free_and_separators_are_detected(tmp_path: Path) -> None:
    expected = read_series(_write(tmp_path, "a.csv",
                                  "temperature_K,voltage_V,current_A\n" + GOOD_ROWS))
    reordered = "\n".join(",".join(reversed(line.split(","))) for line in GOOD_ROWS.splitlines())
    variants = {
        "b.csv": "current_A,voltage_V,temperature_K\n" + reordered + "\n",
        "c.txt": "temperature_K\tvoltage_V\tcurrent_A\n" + GOOD_ROWS.replace(",", "\t"),
        "d.dat": "temperature_K  voltage_V  current_A\n" + GOOD_ROWS.replace(",", "   "),
        "e.csv": "temperature_K;voltage_V;current_A\n" + GOOD_ROWS.replace(",", ";"),
    }
    for name, text in variants.items():
        series = read_series(_write(tmp_path, name, text))
        np.testing.assert_array_equal(series.voltage_V, expected.voltage_V, err_msg=name)
        np.testing.assert_array_equal(series.current_A, expected.current_A, err_msg=name)


def test_comments_blank_lines_crlf_and_bom_are_accepted(tmp_path: Path) -> None:
    text = "\ufeff# measured on probe station 2\r\ntemperature_K,voltage_V,current_A\r\n\r\n" \
        "# sweep up\r\n77,0.1,1e-9\r\n77,0.2,2e-9\r\n77,0.3,3e-9\r\n77,0,1e-13\r\n"
    path = tmp_path / "iv.csv"
    path.write_bytes(text.encode("utf-8"))
    with pytest.warns(MechidWarning, match=r"iv\.csv line\(s\) 8"):
        series = read_series(path)
    assert series.n_points == 3
    assert series.excluded[0].row == 8  # line as an editor shows it, comments counted


def test_extra_columns_are_ignored_with_a_warning(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "time_s,temperature_K,voltage_V,current_A\n"
                  "0,77,0.1,1e-9\n1,77,0.2,2e-9\n2,77,0.3,3e-9\n")
    with pytest.warns(MechidWarning, match="'time_s'.*ignored"):
        series = read_series(path)
    assert series.n_points == 3


def test_both_polarities_unsorted_rows_and_repeats_are_kept(tmp_path: Path) -> None:
    # forward then backward sweep, both polarities, rows in measurement (not sorted) order
    rows = ["77,0.2,2e-9", "77,-0.2,-2.1e-9", "77,0.1,1e-9", "77,-0.1,-1e-9", "77,0.3,3e-9",
            "77,0.3,3.1e-9", "77,0.2,2.05e-9", "77,0.1,0.95e-9", "77,-0.3,-3e-9"]
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n" + "\n".join(rows))
    series = read_series(path)
    assert series.n_points == len(rows)
    np.testing.assert_array_equal(series.voltage_V, [-0.3, -0.2, -0.1, 0.1, 0.1, 0.2, 0.2, 0.3,
                                                     0.3])
    # repeats keep their reading order (stable sort)
    np.testing.assert_array_equal(series.current_A[3:5], [1e-9, 0.95e-9])
    np.testing.assert_array_equal(series.current_A[7:9], [3e-9, 3.1e-9])
    assert series.summary()["both_polarities"] is True


def test_folder_temperature_from_header_and_file_name(tmp_path: Path) -> None:
    _write(tmp_path, "sample_77K.csv", "voltage_V,current_A\n0.1,1e-9\n0.2,2e-9\n0.3,3e-9\n")
    _write(tmp_path, "run3_150.5K.txt", "voltage_mV,current_nA\n100,10\n200,20\n300,30\n")
    _write(tmp_path, "hot.dat", "# temperature_K = 300\nvoltage_V,current_mA\n"
                                "-0.1,-1\n0.1,1\n0.2,2\n")
    _write(tmp_path, "warm.csv", "# T = 26.85 C\nvoltage_V,current_A\n0.1,1e-7\n0.2,2e-7\n"
                                 "0.3,3e-7\n")
    _write(tmp_path, "device.toml", "thickness_nm = 5.0\n")
    _write(tmp_path, "notes.md", "not data")
    series = read_series(tmp_path)
    np.testing.assert_allclose(series.temperatures, [77.0, 150.5, 300.0])
    # 'warm.csv' (26.85 C) and 'hot.dat' (300 K) are the same temperature and merge
    assert set(series.sources) == {"sample_77K.csv", "run3_150.5K.txt", "hot.dat", "warm.csv"}
    voltage, current = series.at_temperature(150.5)
    np.testing.assert_allclose(current, [1e-8, 2e-8, 3e-8], rtol=1e-12)  # nA -> A
    voltage, current = series.at_temperature(300.0)
    assert voltage.size == 6
    np.testing.assert_allclose(current[voltage == -0.1], [-1e-3], rtol=1e-12)  # mA -> A


def test_folder_may_hold_tidy_files(tmp_path: Path) -> None:
    _write(tmp_path, "all.csv", "temperature_K,voltage_V,current_A\n" + GOOD_ROWS)
    _write(tmp_path, "extra_200K.csv", "voltage_V,current_A\n0.1,1e-8\n0.2,2e-8\n0.3,3e-8\n")
    series = read_series(tmp_path)
    np.testing.assert_array_equal(series.temperatures, [77.0, 200.0, 300.0])
    assert series.n_points == 9


def test_header_temperature_matching_the_file_name_is_accepted(tmp_path: Path) -> None:
    path = _write(tmp_path, "s_77K.csv", "# temperature [K]: 77\nvoltage_V,current_A\n"
                  "0.1,1e-9\n0.2,2e-9\n0.3,3e-9\n")
    np.testing.assert_array_equal(read_series(path).temperatures, [77.0])


def test_zero_bias_points_are_excluded_with_a_warning_and_counted(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n"
                  "77,0,3e-13\n77,0.1,1e-9\n77,0.0,-2e-13\n77,0.2,2e-9\n77,0.3,3e-9\n")
    with pytest.warns(MechidWarning, match=r"excluded 2 point.*zero bias.*line\(s\) 2, 4"):
        series = read_series(path)
    assert series.n_points == 3
    assert not np.any(series.voltage_V == 0)
    assert [(p.row, p.current_A, p.reason) for p in series.excluded] == [
        (2, 3e-13, REASON_ZERO_BIAS), (4, -2e-13, REASON_ZERO_BIAS)]
    assert series.summary()["n_excluded_by_reason"] == {REASON_ZERO_BIAS: 2}


def _sweep_with_compliance(limit: float) -> tuple[np.ndarray, np.ndarray]:
    voltage = np.round(np.arange(0.1, 1.01, 0.1), 10)
    current = np.minimum(1e-6 * np.exp(voltage / 0.1), limit)
    return voltage, current


def test_compliance_plateau_is_excluded_with_a_warning_and_counted(tmp_path: Path) -> None:
    voltage, current = _sweep_with_compliance(limit=1e-3)  # clamps from 0.7 V up (exp(7) > 1e3)
    lines = [f"77,{float(v)!r},{float(i)!r}" for v, i in zip(voltage, current, strict=True)]
    lines += [f"77,{float(-v)!r},{float(-i)!r}" for v, i in zip(voltage, current, strict=True)]
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n" + "\n".join(lines))
    with pytest.warns(MechidWarning, match="excluded 8 point.*compliance limit"):
        series = read_series(path)
    limited = [p for p in series.excluded if p.reason == REASON_COMPLIANCE]
    assert sorted(p.voltage_V for p in limited) == [-1.0, -0.9, -0.8, -0.7, 0.7, 0.8, 0.9, 1.0]
    assert {p.current_A for p in limited} == {1e-3, -1e-3}
    assert np.all(np.abs(series.current_A) < 1e-3)
    assert series.summary()["n_excluded_by_reason"] == {REASON_COMPLIANCE: 8}


def test_compliance_mask_needs_three_voltages_at_the_limit() -> None:
    # two points at the same current are not a plateau (COMPLIANCE_MIN_POINTS = 3)
    voltage = np.array([0.1, 0.2, 0.3, 0.4])
    current = np.array([1e-9, 2e-9, 5e-9, 5e-9])
    assert not compliance_mask(np.full(4, 77.0), voltage, current).any()
    # a steadily rising current is never flagged, even at its maximum
    assert not compliance_mask(np.full(4, 77.0), voltage, [1, 2, 3, 4]).any()
    # forward/backward repeats at the top count as one voltage each
    voltage = np.array([0.1, 0.2, 0.3, 0.3, 0.4, 0.4])
    current = np.array([1e-9, 2e-9, 5e-9, 5e-9, 5e-9, 5e-9])
    assert not compliance_mask(np.full(6, 77.0), voltage, current).any()
    voltage = np.array([0.1, 0.2, 0.3, 0.4, 0.5])
    current = np.array([1e-9, 2e-9, 5e-9, 5.000001e-9, 4.9999e-9])
    np.testing.assert_array_equal(compliance_mask(np.full(5, 77.0), voltage, current),
                                  [False, False, True, True, True])


def test_compliance_mask_is_per_temperature_and_polarity() -> None:
    temperature = np.array([77.0] * 4 + [300.0] * 4)
    voltage = np.array([0.1, 0.2, 0.3, 0.4, -0.1, -0.2, -0.3, -0.4])
    current = np.array([1, 2, 3, 4, -1, -2, -2, -2], dtype=float)
    np.testing.assert_array_equal(compliance_mask(temperature, voltage, current),
                                  [False] * 5 + [True] * 3)


def test_write_then_read_round_trip_is_exact(tmp_path: Path) -> None:
    rng = np.random.default_rng(7)
    temperature = np.repeat([77.0, 150.0, 300.0], 5)
    voltage = np.tile([-0.4, -0.1, 0.1, 0.25, 0.7], 3) * (1 + 1e-3 * rng.standard_normal(15))
    current = np.sign(voltage) * 10.0 ** rng.uniform(-13, -3, 15)
    source = IVSeries(temperature, voltage, current)
    path = write_series_csv(source, tmp_path / "sim.csv", comment="simulated\nseed 7")
    assert path.read_text().splitlines()[:3] == ["# simulated", "# seed 7",
                                                "temperature_K,voltage_V,current_A"]
    back = read_series(path)
    order = np.lexsort((voltage, temperature))
    # written with 17 significant digits: the round trip is exact on any IEEE-754 machine
    np.testing.assert_array_equal(back.temperature_K, temperature[order])
    np.testing.assert_array_equal(back.voltage_V, voltage[order])
    np.testing.assert_array_equal(back.current_A, current[order])


def test_write_refuses_to_overwrite_unless_asked(tmp_path: Path) -> None:
    path = _write(tmp_path, "out.csv", "keep me")
    series = IVSeries([77.0, 77.0, 77.0], [0.1, 0.2, 0.3], [1e-9, 2e-9, 3e-9])
    with pytest.raises(InputDataError, match=r"out\.csv already exists"):
        write_series_csv(series, path)
    assert path.read_text() == "keep me"
    write_series_csv(series, path, overwrite=True)
    assert read_series(path).n_points == 3


def test_write_rejects_non_finite_and_unequal_lengths(tmp_path: Path) -> None:
    class Points:
        temperature_K = [77.0, 77.0]
        voltage_V = [0.1, np.nan]
        current_A = [1e-9, 2e-9]

    with pytest.raises(InputDataError, match="NaN or infinite"):
        write_series_csv(Points(), tmp_path / "a.csv")
    Points.voltage_V = [0.1]
    with pytest.raises(InputDataError, match="lengths differ"):
        write_series_csv(Points(), tmp_path / "b.csv")
    assert not (tmp_path / "a.csv").exists()


def test_reading_leaves_input_bytes_unchanged(tmp_path: Path) -> None:
    text = "# T = 77 K\r\nvoltage_mV,current_nA\r\n0,0.001\r\n300,3\r\n100,1\r\n200,2\r\n"
    path = tmp_path / "sample_77K.csv"
    path.write_bytes(text.encode("utf-8"))
    before, mtime = path.read_bytes(), path.stat().st_mtime_ns
    with pytest.warns(MechidWarning):
        read_series(path)
    assert path.read_bytes() == before
    assert path.stat().st_mtime_ns == mtime


def test_series_helpers_summary_and_json(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n" + GOOD_ROWS
                  + "300,0,1e-12\n")
    with pytest.warns(MechidWarning):
        series = read_series(path)
    summary = series.summary()
    assert summary["n_points"] == 6
    assert summary["n_temperatures"] == 2
    assert summary["temperature_range_K"] == [77.0, 300.0]
    assert summary["voltage_range_V"] == [0.1, 0.3]
    assert summary["current_decades"] == pytest.approx(np.log10(8e-6 / 1e-9))
    assert summary["both_polarities"] is False
    assert summary["n_excluded"] == 1
    payload = json.loads(json.dumps({"summary": summary, "data": series.to_dict()}))
    assert payload["data"]["excluded"][0]["row"] == 8
    assert payload["data"]["voltage_V"] == series.voltage_V.tolist()
    with pytest.raises(ValueError, match="read-only"):
        series.voltage_V[0] = 1.0
    with pytest.raises(InputDataError, match="no data at 200 K; temperatures present: 77, 300"):
        series.at_temperature(200.0)


# ----------------------------------------------------------------------------- bad input


def test_missing_file_names_the_path(tmp_path: Path) -> None:
    with pytest.raises(InputDataError, match=r"nothere\.csv: no such file"):
        read_series(tmp_path / "nothere.csv")


@pytest.mark.parametrize("text", ["", "\n\n", "# only a comment\n"])
def test_empty_file(tmp_path: Path, text: str) -> None:
    path = _write(tmp_path, "empty.csv", text)
    with pytest.raises(InputDataError, match=r"empty\.csv: the file is empty"):
        read_series(path)


def test_header_only(tmp_path: Path) -> None:
    path = _write(tmp_path, "head.csv", "# c\ntemperature_K,voltage_V,current_A\n")
    with pytest.raises(InputDataError, match=r"head\.csv: only a header \(line 2\)"):
        read_series(path)


def test_missing_column_lists_columns_found_and_pattern(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,resistance_ohm\n77,0.1,5\n")
    with pytest.raises(InputDataError) as info:
        read_series(path)
    message = str(info.value)
    assert "iv.csv, line 1: no current column" in message
    assert "'temperature_K', 'voltage_V', 'resistance_ohm'" in message
    assert "temperature_K,voltage_V,current_A" in message


def test_missing_temperature_everywhere(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "voltage_V,current_A\n0.1,1e-9\n")
    with pytest.raises(InputDataError, match=r"iv\.csv: no temperature column.*"
                                             r"columns found: 'voltage_V', 'current_A'"):
        read_series(path)


def test_non_numeric_cell_names_file_line_column_and_text(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n77,0.1,1e-9\n"
                  "# note\n77,0.2,1.2e-9 A\n")
    with pytest.raises(InputDataError,
                       match=r"iv\.csv, line 4, column 'current_A': expected a number "
                             r"written with the digits 0-9 \(e\.g\. 1\.5e-9\), found '1\.2e-9 A'"):
        read_series(path)


def test_empty_cell_is_named(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n77,,1e-9\n")
    with pytest.raises(InputDataError,
                       match=r"iv\.csv, line 2, column 'voltage_V': expected a number "
                             r"written with the digits 0-9 \(e\.g\. 1\.5e-9\), found an empty cell"):
        read_series(path)


@pytest.mark.parametrize("bad", ["nan", "NaN", "inf", "-Infinity"])
def test_nan_and_inf_are_rejected(tmp_path: Path, bad: str) -> None:
    path = _write(tmp_path, "iv.csv", f"temperature_K,voltage_V,current_A\n77,0.1,1e-9\n"
                  f"77,0.2,{bad}\n")
    with pytest.raises(InputDataError,
                       match=rf"iv\.csv, line 3, column 'current_A': '{bad}' is not a finite"):
        read_series(path)


def test_wrong_field_count_is_named(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n77,0.1\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 2: 2 field\(s\) but the header "
                                             r"on line 1 names 3"):
        read_series(path)


def test_single_voltage_at_a_temperature(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A\n" + GOOD_ROWS
                  + "150,0.5,1e-8\n150,0.5,1.1e-8\n")
    with pytest.raises(InputDataError) as info:
        read_series(path)
    message = str(info.value)
    assert message.startswith("iv.csv: at 150 K only 1 distinct non-zero voltage(s)")
    assert f"at least {MIN_VOLTAGES_PER_TEMPERATURE}" in message


def test_too_few_voltages_left_after_zero_bias_exclusion(tmp_path: Path) -> None:
    path = _write(tmp_path, "s_4.2K.csv", "voltage_V,current_A\n0,0\n0.1,1e-9\n-0.1,-1e-9\n")
    with pytest.warns(MechidWarning, match="zero bias"), \
            pytest.raises(InputDataError, match=r"s_4\.2K\.csv: at 4\.2 K only 2 distinct"):
        read_series(path)


@pytest.mark.parametrize(("column", "value", "shown"),
                         [("temperature_K", "-5", "-5 K"), ("temperature_K", "0", "0 K"),
                          ("temperature_C", "-300", "-300 °C \\(= -26\\.85 K\\)")])
def test_temperature_not_above_absolute_zero(tmp_path: Path, column: str, value: str,
                                             shown: str) -> None:
    path = _write(tmp_path, "iv.csv", f"voltage_V,current_A,{column}\n0.1,1e-9,77\n"
                  f"0.2,2e-9,{value}\n")
    with pytest.raises(InputDataError, match=rf"iv\.csv, line 3, column '{column}': "
                                             rf"temperature {shown} is not above absolute zero"):
        read_series(path)


def test_negative_temperature_in_header(tmp_path: Path) -> None:
    path = _write(tmp_path, "cold.csv", "# temperature_K = -4\nvoltage_V,current_A\n0.1,1\n")
    with pytest.raises(InputDataError,
                       match=r"cold\.csv, line 1: temperature -4 K is not above absolute zero"):
        read_series(path)


def test_two_columns_of_the_same_quantity(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_A,current_mA\n"
                  "77,0.1,1e-3,1\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 1: two current columns, "
                                             r"'current_A' and 'current_mA'"):
        read_series(path)


def test_duplicate_column_names(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "# x\ntemperature_K,voltage_V,current_A,voltage_V\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 2: duplicate column name\(s\) "
                                             r"'voltage_V'"):
        read_series(path)


def test_unknown_unit_lists_accepted_suffixes(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_K,voltage_V,current_kA\n77,0.1,1\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 1: column 'current_kA' has unknown "
                                             r"unit 'kA'; accepted current units: A, mA, uA"):
        read_series(path)


def test_column_without_unit_is_rejected(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature,voltage,current\n77,0.1,1\n")
    with pytest.raises(InputDataError, match=r"column 'temperature' has no unit.*temperature_K"):
        read_series(path)


def test_header_and_file_name_temperatures_must_agree(tmp_path: Path) -> None:
    path = _write(tmp_path, "sample_77K.csv", "# T = 80 K\nvoltage_V,current_A\n0.1,1e-9\n")
    with pytest.raises(InputDataError, match=r"sample_77K\.csv: the header comment on line 1 "
                                             r"gives 80 K but the file name gives 77 K"):
        read_series(path)


def test_header_comment_must_agree_with_temperature_column(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "# temperature_K = 77\ntemperature_K,voltage_V,current_A\n"
                  "77,0.1,1e-9\n78,0.2,2e-9\n")
    with pytest.raises(InputDataError, match=r"line 4 of the temperature column gives 78 K"):
        read_series(path)


def test_header_temperature_without_unit_is_rejected(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "# T = 77\nvoltage_V,current_A\n0.1,1e-9\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 1: cannot tell the unit"):
        read_series(path)


def test_folder_without_data_files(tmp_path: Path) -> None:
    _write(tmp_path, "device.toml", "thickness_nm = 5\n")
    with pytest.raises(InputDataError, match=r"holds no data files \(looked for \.csv, \.txt"):
        read_series(tmp_path)


def test_bad_file_inside_a_folder_is_named(tmp_path: Path) -> None:
    _write(tmp_path, "a_77K.csv", "voltage_V,current_A\n0.1,1e-9\n0.2,2e-9\n0.3,3e-9\n")
    _write(tmp_path, "b_300K.csv", "voltage_V,current_A\n0.1,1e-6\n0.2,oops\n")
    with pytest.raises(InputDataError, match=r"b_300K\.csv, line 3, column 'current_A'"):
        read_series(tmp_path)
