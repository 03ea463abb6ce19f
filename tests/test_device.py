"""Tests of mechid.device: TOML reading, validation, merging and the device-file lookup."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from mechid.device import (
    DEVICE_KEYS,
    Device,
    Measured,
    device_from_values,
    find_device_toml,
    read_device_toml,
)
from mechid.errors import DeviceError

FULL_TOML = """\
name = "ALD alumina film, wafer 3, pad B2"
thickness_nm = 6.0
thickness_sd_nm = 0.3
area_cm2 = 1e-4
effective_mass_ratio = 0.4
effective_mass_sd = 0.05
optical_dielectric_constant = 3
optical_dielectric_constant_sd = 0.2
"""


def _write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def test_read_device_toml_reads_every_key(tmp_path: Path) -> None:
    device = read_device_toml(_write(tmp_path, "device.toml", FULL_TOML))
    assert device.name == "ALD alumina film, wafer 3, pad B2"
    assert device.thickness_nm == Measured(6.0, 0.3)
    assert device.area_cm2 == 1e-4
    assert device.effective_mass_ratio == Measured(0.4, 0.05)
    assert device.optical_dielectric_constant == Measured(3.0, 0.2)
    assert isinstance(device.optical_dielectric_constant.value, float)  # TOML int -> float
    assert json.loads(json.dumps(device.to_dict()))["thickness_nm"] == {"value": 6.0, "sd": 0.3}


def test_value_without_uncertainty_is_exact(tmp_path: Path) -> None:
    device = read_device_toml(_write(tmp_path, "device.toml", "thickness_nm = 5\n"))
    assert device.thickness_nm is not None and device.thickness_nm.is_exact
    assert not Measured(5.0, 0.1).is_exact
    assert Measured(5.0, 0.0).is_exact
    assert device.area_cm2 is None and device.effective_mass_ratio is None


def test_unknown_key_is_named_with_known_keys(tmp_path: Path) -> None:
    path = _write(tmp_path, "device.toml", "thickness_nm = 5\nthicknes_sd_nm = 0.2\n")
    with pytest.raises(DeviceError) as info:
        read_device_toml(path)
    message = str(info.value)
    assert str(path) in message
    assert "unknown key(s) thicknes_sd_nm" in message
    assert all(key in message for key in DEVICE_KEYS)


@pytest.mark.parametrize("text", ["thickness_nm = -2.0\n", "thickness_nm = 0\n",
                                  "thickness_nm = nan\n"])
def test_impossible_thickness_is_a_device_error(tmp_path: Path, text: str) -> None:
    path = _write(tmp_path, "device.toml", text)
    pattern = r"device\.toml: thickness_nm must be a finite number > 0"
    with pytest.raises(DeviceError, match=pattern):
        read_device_toml(path)


@pytest.mark.parametrize(
    ("text", "pattern"),
    [
        ("thickness_nm = 5\nthickness_sd_nm = -1\n", "uncertainty of thickness_nm"),
        ("thickness_sd_nm = 0.2\n", "thickness_sd_nm was given without thickness_nm"),
        ("area_cm2 = 0\n", "area_cm2 must be a positive number"),
        ("effective_mass_ratio = 0\n", "effective_mass_ratio must be a finite number > 0"),
        ("optical_dielectric_constant = 0.5\n", "optical_dielectric_constant must be .* >= 1"),
        ('thickness_nm = "six"\n', "thickness_nm must be a number"),
        ("thickness_nm = true\n", "thickness_nm must be a number"),
        ("thickness_nm = 5\nthickness_nm = 6\n", "not valid TOML"),
    ],
)
def test_other_bad_device_files(tmp_path: Path, text: str, pattern: str) -> None:
    with pytest.raises(DeviceError, match=pattern):
        read_device_toml(_write(tmp_path, "device.toml", text))


def test_missing_device_file(tmp_path: Path) -> None:
    with pytest.raises(DeviceError, match=r"absent\.toml: cannot read the device file"):
        read_device_toml(tmp_path / "absent.toml")


def test_merged_with_prefers_values_set_in_other() -> None:
    from_file = device_from_values(thickness_nm=6.0, thickness_sd_nm=0.3, area_cm2=1e-4,
                                   name="pad B2")
    from_options = device_from_values(thickness_nm=5.5, effective_mass_ratio=0.3)
    merged = from_file.merged_with(from_options)
    assert merged.thickness_nm == Measured(5.5, None)
    assert merged.effective_mass_ratio == Measured(0.3, None)
    assert merged.area_cm2 == 1e-4  # not set in other: kept
    assert merged.name == "pad B2"
    assert from_file.thickness_nm == Measured(6.0, 0.3)  # frozen original unchanged
    assert Device().merged_with(Device()) == Device()


def test_require_area_explains_how_to_give_it() -> None:
    assert device_from_values(area_cm2=2e-4).require_area() == 2e-4
    with pytest.raises(DeviceError, match="--area-cm2 or as area_cm2"):
        Device().require_area()


def test_find_device_toml_prefers_the_file_named_after_the_data(tmp_path: Path) -> None:
    data = _write(tmp_path, "run7.csv", "x")
    assert find_device_toml(data) is None
    shared = _write(tmp_path, "device.toml", "thickness_nm = 5\n")
    assert find_device_toml(data) == shared
    specific = _write(tmp_path, "run7.device.toml", "thickness_nm = 6\n")
    assert find_device_toml(data) == specific


def test_find_device_toml_inside_a_data_folder(tmp_path: Path) -> None:
    folder = tmp_path / "sweeps"
    folder.mkdir()
    assert find_device_toml(folder) is None
    inside = _write(folder, "device.toml", "thickness_nm = 5\n")
    _write(tmp_path, "device.toml", "thickness_nm = 9\n")  # beside the folder: not used
    assert find_device_toml(folder) == inside
