"""The Python way in (mechid.analyse): the same job and numbers as the command line."""

from __future__ import annotations

import json
import shutil
import warnings
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

import mechid
from mechid.cli import app
from mechid.data import read_series
from mechid.errors import DeviceError, InputDataError, MechidWarning
from mechid.outputs import OutputPathError

PF_DIR = Path(__file__).resolve().parents[1] / "reference_curves" / "larkfield_sinx_poole_frenkel"
FIT = {"mechanisms": ["poole_frenkel", "schottky_emission"], "quick": True}


class _Frame:
    """The part of a DataFrame the API relies on: ``.columns`` and item access by name."""

    def __init__(self, columns: dict[str, np.ndarray]) -> None:
        self._columns = columns
        self.columns = list(columns)

    def __getitem__(self, name: str) -> np.ndarray:
        return self._columns[name]


@pytest.fixture(scope="module")
def fitted() -> mechid.Analysis:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        return mechid.analyse(PF_DIR / "data.csv", seed=3, **FIT)


def test_a_quick_fit_names_the_true_mechanism_and_matches_the_command_line(fitted, tmp_path):
    assert fitted.best == "poole_frenkel"
    data = fitted.to_dict()
    assert data["schema"].startswith("mechid.result/")
    out = tmp_path / "cli.json"
    result = CliRunner().invoke(app, ["analyze", str(PF_DIR / "data.csv"), "--quick", "--seed", "3",
                                      "--mechanism", "poole_frenkel", "--mechanism",
                                      "schottky_emission", "--json", str(out)])
    assert result.exit_code == 0, result.output
    cli = json.loads(out.read_text())
    # same data, settings and seed on the same machine: identical numbers (the determinism promise)
    assert [m["log_evidence"] for m in cli["mechanisms"]] == [m["log_evidence"] for m in data["mechanisms"]]


def test_parameter_table_has_one_row_per_mechanism_and_parameter(fitted):
    rows = fitted.parameter_table()
    expected = sum(len(m["parameters"]) for m in fitted.to_dict()["mechanisms"])
    assert len(rows) == expected
    pf = {r["parameter"]: r for r in rows if r["mechanism_id"] == "poole_frenkel"}
    truth = json.loads((PF_DIR / "truth.json").read_text())["params"]
    for name, value in truth.items():
        assert pf[name]["ci95_lo"] <= value <= pf[name]["ci95_hi"], name


def test_write_report_and_json_refuse_the_input(fitted, tmp_path):
    written = fitted.write_report(tmp_path / "r.html", summary=tmp_path / "s.csv")
    assert [p.name for p in written] == ["r.html", "s.csv"]
    assert "<html" in (tmp_path / "r.html").read_text()[:500].lower()
    with pytest.raises(OutputPathError, match="refusing to overwrite"):
        fitted.write_json(PF_DIR / "data.csv")


def test_tables_and_arrays_give_the_series_of_the_file(tmp_path):
    series = read_series(PF_DIR / "data.csv")
    frame = _Frame({"temperature_K": series.temperature_K, "voltage [mV]": series.voltage_V * 1e3,
                    "current_A": series.current_A})
    device = {"thickness_nm": 30.0, "area_cm2": 1e-3}
    a = mechid.analyse(frame, device=device, screen_only=True)
    b = mechid.analyse(PF_DIR / "data.csv", screen_only=True)
    assert a.result.linearisation["ranking"][0] == b.result.linearisation["ranking"][0]
    assert a.run.device.thickness_nm.value == 30.0


def test_bad_tables_and_device_keys_are_mechid_errors(tmp_path):
    with pytest.raises(InputDataError, match="no temperature column"):
        mechid.analyse({"voltage_V": [0.1, 0.2, 0.3], "current_A": [1, 2, 3]}, screen_only=True)
    with pytest.raises(InputDataError, match=r"row 2, column 'current_A'"):
        mechid.analyse({"temperature_K": [77.0] * 3, "voltage_V": [0.1, 0.2, 0.3],
                        "current_A": [1e-9, np.nan, 3e-9]}, screen_only=True)
    with pytest.raises(DeviceError, match="device"):
        mechid.analyse(PF_DIR / "data.csv", device={"thicknes_nm": 3.0}, screen_only=True)
    copy = tmp_path / "pf"
    shutil.copytree(PF_DIR, copy)
    with pytest.raises(mechid.errors.MechidError, match="seed"):
        mechid.analyse(copy / "data.csv", screen_only=True, seed=-1)
