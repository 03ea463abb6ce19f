"""Hostile and malformed input: every case ends in mechid's own error naming what to fix.

Each case below was a traceback, a silent acceptance or a silently wrong number before the
readers were tightened; the property tests at the end feed the readers mutated files and
require that nothing but a clean parse or an :class:`~mechid.errors.MechidError` comes out.
"""

from __future__ import annotations

import contextlib
import os
import string
import warnings
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from mechid.data import TEMPERATURE_RANGE_K, read_series
from mechid.device import read_device_toml
from mechid.errors import DeviceError, InputDataError, MechidError, MechidWarning

ROWS = "0.1,1e-9\n0.2,2.1e-9\n0.3,3.3e-9\n"
TIDY = "temperature_K,voltage_V,current_A\n" + "".join(
    f"{t},{v},{i}\n" for t in (77, 300) for v, i in ((0.1, 1e-9), (0.2, 2e-9), (0.3, 3e-9))
)


def _write(folder: Path, name: str, text: str | bytes) -> Path:
    path = folder / name
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    return path


# ------------------------------------------------------------------ temperature comments


@pytest.mark.parametrize("comment", ["# T = . K", "# temperature_K = 1.2.3", "# T = 1e5e5 K",
                                     "# temperature_K = -", "# temp = +.e3 K"])
def test_malformed_temperature_comment_is_named(tmp_path: Path, comment: str) -> None:
    path = _write(tmp_path, "run.csv", f"{comment}\nvoltage_V,current_A\n{ROWS}")
    with pytest.raises(InputDataError, match=r"run\.csv, line 1: the temperature comment"):
        read_series(path)


def test_comment_that_is_not_a_temperature_is_still_ignored(tmp_path: Path) -> None:
    path = _write(tmp_path, "s_77K.csv", f"# t = 5 s after cool-down\nvoltage_V,current_A\n{ROWS}")
    assert read_series(path).temperatures.tolist() == [77.0]


@pytest.mark.parametrize("value", ["1e999", "1e308", "1e-300", "5000"])
def test_implausible_header_temperature_is_refused(tmp_path: Path, value: str) -> None:
    path = _write(tmp_path, "run.csv", f"# temperature_K = {value}\nvoltage_V,current_A\n{ROWS}")
    with pytest.raises(InputDataError, match=r"run\.csv, line 1: .*temperature"):
        read_series(path)


@pytest.mark.parametrize("value", ["1e-300", "1e308", "2500"])
def test_implausible_column_temperature_is_refused(tmp_path: Path, value: str) -> None:
    path = _write(tmp_path, "iv.csv", f"temperature_K,voltage_V,current_A\n{value},0.1,1e-9\n")
    low, high = TEMPERATURE_RANGE_K
    with pytest.raises(InputDataError,
                       match=rf"iv\.csv, line 2, column 'temperature_K': temperature .* outside the "
                             rf"range mechid accepts \({low:g} K to {high:g} K\)"):
        read_series(path)


def test_implausible_file_name_temperature_is_refused(tmp_path: Path) -> None:
    path = _write(tmp_path, "s_3000K.csv", f"voltage_V,current_A\n{ROWS}")
    with pytest.raises(InputDataError, match=r"\(file name\): temperature .* outside the range"):
        read_series(path)


def test_celsius_below_absolute_zero_is_shown_as_written(tmp_path: Path) -> None:
    path = _write(tmp_path, "iv.csv", "temperature_C,voltage_V,current_A\n-300,0.1,1e-9\n")
    with pytest.raises(InputDataError) as info:
        read_series(path)
    message = str(info.value)
    assert "-300 °C" in message and "not above absolute zero" in message
    assert "needs the '_C' suffix" not in message  # it has it


# ------------------------------------------------------------------ cells


@pytest.mark.parametrize("cell", ["1e999", "9" * 400, "-" + "9" * 5000])
def test_cell_too_large_for_a_float(tmp_path: Path, cell: str) -> None:
    path = _write(tmp_path, "iv.csv", f"temperature_K,voltage_V,current_A\n77,0.1,{cell}\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 2, column 'current_A': .* is not a finite"):
        read_series(path)


@pytest.mark.parametrize("cell", ["3_00", "1.5_5", "\uff13", "1\x00", "\u0661\u0662", "0x10",
                                  "1,5e-9"])
def test_cells_python_would_accept_but_a_data_file_should_not(tmp_path: Path, cell: str) -> None:
    path = _write(tmp_path, "iv.csv", f"temperature_K;voltage_V;current_A\n77;0.1;{cell}\n")
    with pytest.raises(InputDataError, match=r"iv\.csv, line 2, column 'current_A': expected a number"):
        read_series(path)


def test_huge_cell_is_not_echoed_whole(tmp_path: Path) -> None:
    cell = "x" * 2_000_000
    path = _write(tmp_path, "iv.csv", f"temperature_K,voltage_V,current_A\n77,0.1,{cell}\n")
    with pytest.raises(InputDataError) as info:
        read_series(path)
    assert len(str(info.value)) < 400
    assert "2000000 characters" in str(info.value)


@pytest.mark.parametrize("text", [
    "temperature_K,voltage_V,current_A\n" + "".join(f"77,{v},0\n" for v in (0.1, 0.2, 0.3, 0.4)),
    "temperature_K,voltage_V,current_A\n" + "".join(f"77,{v},{i}\n" for v, i in
                                                    ((0.1, 0), (0.2, 0), (0.3, 1e-9), (0.4, 2e-9))),
])
def test_all_zero_currents_are_refused(tmp_path: Path, text: str) -> None:
    path = _write(tmp_path, "iv.csv", text)
    with pytest.raises(InputDataError, match=r"iv\.csv: at 77 K only [0-2] current\(s\) differ from 0 A"):
        read_series(path)


# ------------------------------------------------------------------ paths


def test_device_file_is_not_data(tmp_path: Path) -> None:
    with pytest.raises(InputDataError, match="neither a regular file nor a folder"):
        read_series(Path("/dev/null"))


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes on this system")
def test_named_pipe_is_not_data(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe.csv"
    os.mkfifo(fifo)
    with pytest.raises(InputDataError, match="neither a regular file nor a folder"):
        read_series(fifo)


# ------------------------------------------------------------------ device.toml


def test_device_file_that_is_not_utf8(tmp_path: Path) -> None:
    path = _write(tmp_path, "device.toml", 'name = "caf\xe9"\n'.encode("latin-1"))
    with pytest.raises(DeviceError, match=r"device\.toml: not a UTF-8 text file \(byte 11"):
        read_device_toml(path)


def test_device_file_with_byte_order_mark_is_read(tmp_path: Path) -> None:
    path = _write(tmp_path, "device.toml", "\ufeffthickness_nm = 5.0\n".encode())
    assert read_device_toml(path).thickness_nm.value == 5.0


@pytest.mark.parametrize("text", ["thickness_nm = " + "9" * 400 + "\n",
                                  "thickness_nm = " + "9" * 5000 + "\n"])
def test_device_integer_too_large_for_a_float(tmp_path: Path, text: str) -> None:
    path = _write(tmp_path, "device.toml", text)
    with pytest.raises(DeviceError, match=r"device\.toml: .*(finite number|too long)"):
        read_device_toml(path)


@pytest.mark.parametrize("text", ["name = {a = 1}\n", "name = 5\n", "name = [1, 2]\n",
                                  'name = "a\\nb"\n', f'name = "{"n" * 300}"\n'])
def test_device_name_must_be_one_short_line_of_text(tmp_path: Path, text: str) -> None:
    path = _write(tmp_path, "device.toml", text)
    with pytest.raises(DeviceError, match=r"device\.toml: name must be"):
        read_device_toml(path)


# ------------------------------------------------------------------ property tests

_ALPHABET = string.digits + string.ascii_letters + ".,;:_-+#=[]() \t\n°\x00\uff13\ufeff\"'"


def _mutate(text: str, data: st.DataObject) -> str:
    """Apply a few random insertions, deletions and replacements to ``text``."""
    chars = list(text)
    for _ in range(data.draw(st.integers(1, 6))):
        where = data.draw(st.integers(0, len(chars)))
        action = data.draw(st.sampled_from(["insert", "delete", "replace"]))
        piece = data.draw(st.text(alphabet=_ALPHABET, min_size=1, max_size=4))
        if action == "insert" or not chars:
            chars[where:where] = list(piece)
        elif action == "delete":
            del chars[where:where + len(piece)]
        else:
            chars[where:where + 1] = list(piece)
    return "".join(chars)


def _only_mechid_errors(call) -> None:
    with contextlib.suppress(MechidError):  # a clear message is a correct outcome here
        call()


@settings(max_examples=300, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_mutated_data_files_give_a_series_or_a_mechid_error(tmp_path: Path, data) -> None:
    base = data.draw(st.sampled_from([TIDY, "# temperature_K = 77\nvoltage_V,current_A\n" + ROWS * 2]))
    path = tmp_path / "s_77K.csv"
    path.write_bytes(_mutate(base, data).encode("utf-8", errors="surrogatepass"))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        _only_mechid_errors(lambda: read_series(path))


@settings(max_examples=200, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_mutated_device_files_give_a_device_or_a_device_error(tmp_path: Path, data) -> None:
    base = ('name = "pad B2"\nthickness_nm = 6.0\nthickness_sd_nm = 0.3\narea_cm2 = 1e-4\n'
            "effective_mass_ratio = 0.4\n")
    path = tmp_path / "device.toml"
    path.write_bytes(_mutate(base, data).encode("utf-8"))
    _only_mechid_errors(lambda: read_device_toml(path))

