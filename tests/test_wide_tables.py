"""Wide tables: one current column per temperature, the temperature after '@' in its header."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from mechid.data import read_series
from mechid.errors import InputDataError


def _write(folder: Path, text: str) -> Path:
    path = folder / "wide.csv"
    path.write_text(text, encoding="utf-8")
    return path


def test_shared_voltage_column_gives_the_same_points_as_the_tidy_layout(tmp_path: Path) -> None:
    wide = _write(tmp_path, "voltage_mV,current_nA@77K,current [pA] @ 300 K\n"
                            "100,1,2000\n200,2,4100\n300,3.5,6300\n")
    tidy = tmp_path / "tidy.csv"
    tidy.write_text("temperature_K,voltage_V,current_A\n77,0.1,1e-9\n77,0.2,2e-9\n77,0.3,3.5e-9\n"
                    "300,0.1,2e-9\n300,0.2,4.1e-9\n300,0.3,6.3e-9\n")
    a, b = read_series(wide), read_series(tidy)
    np.testing.assert_array_equal(a.temperature_K, b.temperature_K)
    np.testing.assert_array_equal(a.voltage_V, b.voltage_V)
    # unit scaling differs (nA and pA vs A written out): one IEEE multiplication, <= 1 ulp
    np.testing.assert_allclose(a.current_A, b.current_A, rtol=4e-16, atol=0.0)


def test_voltage_column_per_temperature_and_sweeps_of_different_lengths(tmp_path: Path) -> None:
    path = _write(tmp_path, "voltage_V@77K,current_A@77K,voltage_V@-20C,current_A@-20C\n"
                            "0.1,1e-9,0.1,1e-8\n0.2,2e-9,0.2,2e-8\n0.3,3e-9,0.3,3e-8\n,,0.4,4e-8\n")
    series = read_series(path)
    assert series.temperatures.tolist() == [77.0, pytest.approx(253.15)]
    _, current = series.at_temperature(253.15)
    assert current.size == 4


@pytest.mark.parametrize(("text", "pattern"), [
    ("voltage_V,current_A@77K\n0.1,1e-9\n0.2,\n0.3,3e-9\n", r"line 3, column 'current_A@77K': empty"),
    ("voltage_V,current_A@77K,current_mA@77K\n0.1,1,1\n", r"two current columns at 77 K"),
    ("voltage_V,current@77K\n0.1,1\n", r"has no unit"),
    ("voltage_V,current_A@77K,current_A\n0.1,1,1\n", r"has no temperature"),
    ("temperature_K,voltage_V,current_A@77K\n77,0.1,1\n", r"does not fit a wide table"),
    ("voltage_V,current_A@0K\n0.1,1\n", r"not above absolute zero"),
    ("voltage_V@300K,current_A@77K\n0.1,1\n", r"no voltage column for 77 K"),
    ("voltage_V,current_A@77K\n0.1,1e-9,5\n", r"3 field\(s\) but the header"),
])
def test_malformed_wide_tables_are_named(tmp_path: Path, text: str, pattern: str) -> None:
    with pytest.raises(InputDataError, match=pattern):
        read_series(_write(tmp_path, text))
