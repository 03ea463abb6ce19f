"""`mechid analyze` end to end through the command line (typer's CliRunner).

The Bayesian runs are restricted with ``--quick`` and two ``--mechanism`` options on the
Poole-Frenkel reference series (about 15 s each); everything else uses ``--screen-only`` or fails
before any fit.
"""

from __future__ import annotations

import csv
import hashlib
import json
import math
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from mechid.cli import app
from mechid.data import REASON_COMPLIANCE, REASON_ZERO_BIAS

runner = CliRunner()

REFERENCE = Path(__file__).resolve().parents[1] / "reference_curves"
PF_DIR = REFERENCE / "larkfield_sinx_poole_frenkel"
PF_DATA = PF_DIR / "data.csv"
FIT_ARGS = ["--quick", "--mechanism", "poole_frenkel", "--mechanism", "schottky_emission"]


def _invoke(args: list[str]):
    """Run the CLI; a crash inside the command (not a clean exit) fails the test at once."""
    result = runner.invoke(app, [str(a) for a in args])
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        raise result.exception
    return result


def _sha256(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def _fit_pf(folder: Path, seed: int):
    """Quick restricted fit of the PF reference series writing JSON, samples and summary CSV."""
    folder.mkdir(parents=True, exist_ok=True)
    paths = {"json": folder / "result.json", "samples": folder / "draws.npz",
             "summary": folder / "summary.csv"}
    result = _invoke(["analyze", PF_DATA, *FIT_ARGS, "--seed", seed, "--json", paths["json"],
                      "--samples", paths["samples"], "--summary", paths["summary"]])
    return result, paths


def _without_wall_times(value):
    """Drop every key holding a wall-clock time (the only thing allowed to differ between runs)."""
    if isinstance(value, dict):
        return {k: _without_wall_times(v) for k, v in value.items() if "wall_time" not in k}
    if isinstance(value, list):
        return [_without_wall_times(v) for v in value]
    return value


@pytest.fixture(scope="module")
def pf_run(tmp_path_factory):
    """The seed-0 run, with the input file's hash before and after."""
    folder = tmp_path_factory.mktemp("pf_seed0")
    before = _sha256(PF_DATA)
    result, paths = _fit_pf(folder, seed=0)
    return result, paths, before


# --------------------------------------------------------------------------------------------
# The main job
# --------------------------------------------------------------------------------------------


def test_screen_only_prints_the_screening_table(tmp_path):
    out = tmp_path / "screen.json"
    result = _invoke(["analyze", PF_DATA, "--screen-only", "--json", out])
    assert result.exit_code == 0, result.output
    assert "Straightened-plot screening" in result.stdout
    assert "Screening only" in result.stdout and "poole_frenkel" in result.stdout
    assert "Traceback" not in result.output
    data = json.loads(out.read_text())
    assert data["mechanisms"] == [] and data["verdict"] is None
    assert data["linearisation"]["ranking"][0] == "poole_frenkel"
    assert sorted(data["linearisation"]["ranking"]) == sorted(
        m["mechanism_id"] for m in data["linearisation"]["mechanisms"])


def test_fit_writes_outputs_and_ranks_the_true_mechanism_first(pf_run):
    result, paths, sha_before = pf_run
    assert result.exit_code == 0, result.output
    assert "Traceback" not in result.output
    truth = json.loads((PF_DIR / "truth.json").read_text())
    data = json.loads(paths["json"].read_text())
    ranked = [m["id"] for m in data["mechanisms"]]
    assert ranked == [truth["mechanism"], "schottky_emission"]
    assert data["verdict"]["id"] == truth["mechanism"]
    assert data["seed"] == 0
    # The console shows the same verdict; stderr names every written file.
    assert "Verdict:" in result.stdout
    for path in paths.values():
        assert path.is_file() and path.stat().st_size > 0
        assert path.name in result.stderr
    # Trap depth of the generating model (truth.json) inside the 95 % interval.
    trap = data["mechanisms"][0]["parameters"]["trap_depth_eV"]
    assert trap["ci95"][0] <= truth["params"]["trap_depth_eV"] <= trap["ci95"][1]
    # The input file is never touched.
    assert _sha256(PF_DATA) == sha_before


def test_samples_and_summary_agree_with_the_json(pf_run):
    _, paths, _ = pf_run
    data = json.loads(paths["json"].read_text())
    with np.load(paths["samples"]) as draws:
        assert int(draws["seed"]) == 0
        for mechanism in data["mechanisms"]:
            for name, summary in mechanism["parameters"].items():
                values = draws[f"{mechanism['id']}/{name}"]
                assert values.ndim == 1 and values.size >= 100
                assert np.median(values) == pytest.approx(summary["median"], rel=1e-12)
    with open(paths["summary"], newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    by_key = {(r["mechanism_id"], r["parameter"]): r for r in rows}
    expected_keys = {(m["id"], name) for m in data["mechanisms"] for name in m["parameters"]}
    assert set(by_key) == expected_keys
    for mechanism in data["mechanisms"]:
        for name, summary in mechanism["parameters"].items():
            row = by_key[(mechanism["id"], name)]
            assert float(row["median"]) == pytest.approx(summary["median"], rel=1e-12)
            assert float(row["ci95_lo"]) == pytest.approx(summary["ci95"][0], rel=1e-12)
    assert {r["rank"] for r in rows if r["mechanism_id"] == "poole_frenkel"} == {"1"}


def test_same_seed_same_numbers_other_seed_other_numbers(pf_run, tmp_path):
    _, first, _ = pf_run
    again, second = _fit_pf(tmp_path / "again", seed=0)
    assert again.exit_code == 0, again.output
    a = json.loads(first["json"].read_text())
    b = json.loads(second["json"].read_text())
    assert "wall_time_s" in a["settings"]  # the one field known to differ
    assert _without_wall_times(a) == _without_wall_times(b)
    assert first["summary"].read_bytes() == second["summary"].read_bytes()
    with np.load(first["samples"]) as da, np.load(second["samples"]) as db:
        assert sorted(da.files) == sorted(db.files)
        for key in da.files:
            # bit-exact on purpose: same machine, same seed -> same numbers (mechid's determinism promise)
            np.testing.assert_array_equal(da[key], db[key])

    other, third = _fit_pf(tmp_path / "other", seed=1)
    assert other.exit_code == 0, other.output
    c = json.loads(third["json"].read_text())
    assert c["seed"] == 1
    pf_a, pf_c = a["mechanisms"][0], c["mechanisms"][0]
    assert pf_c["id"] == pf_a["id"] == "poole_frenkel"
    assert pf_c["log_evidence"] != pf_a["log_evidence"]
    assert pf_c["parameters"]["trap_depth_eV"]["median"] != pf_a["parameters"]["trap_depth_eV"]["median"]
    # ... but the same conclusion: the evidences agree to within a few Monte Carlo errors.
    err = math.hypot(pf_a["log_evidence_err"], pf_c["log_evidence_err"])
    assert abs(pf_c["log_evidence"] - pf_a["log_evidence"]) < 6 * err + 0.5


def test_command_line_device_options_override_the_toml(tmp_path):
    base_json, over_json = tmp_path / "base.json", tmp_path / "over.json"
    base = _invoke(["analyze", PF_DATA, "--screen-only", "--json", base_json])
    over = _invoke(["analyze", PF_DATA, "--screen-only", "--json", over_json,
                    "--thickness-nm", "50", "--area-cm2", "2e-4"])
    assert base.exit_code == 0 and over.exit_code == 0, over.output
    assert "device.toml" in over.stderr  # the TOML beside the data was read
    b, o = json.loads(base_json.read_text()), json.loads(over_json.read_text())
    assert b["device"]["thickness_nm"] == {"value": 30.0, "sd": 1.0}
    assert o["device"]["thickness_nm"] == {"value": 50.0, "sd": None}  # no sd given: held fixed
    assert o["device"]["area_cm2"] == 2e-4
    # Values not given on the command line still come from the TOML.
    assert o["device"]["optical_dielectric_constant"] == {"value": 4.0, "sd": 0.4}
    assert o["device"]["name"] == b["device"]["name"]

    # The override is used, not only echoed. Poole-Frenkel plot (Frenkel 1938; Sze & Ng 2007):
    # slope of ln(I/V) vs sqrt(V) is sqrt(e^3/(pi eps0 eps_r d))/kT, so eps_r read ~ 1/d; the
    # Arrhenius prefactor sigma0 = J/E = I d/(V A) scales as d/A.
    def pf_summary(data):
        entry = next(m for m in data["linearisation"]["mechanisms"]
                     if m["mechanism_id"] == "poole_frenkel")
        return entry["summary"]

    sb, so = pf_summary(b), pf_summary(o)
    assert so["poole_frenkel_plot.dielectric_constant"] == pytest.approx(
        sb["poole_frenkel_plot.dielectric_constant"] * 30 / 50, rel=1e-9)
    assert so["poole_frenkel_arrhenius_plot.prefactor_S_per_cm"] == pytest.approx(
        sb["poole_frenkel_arrhenius_plot.prefactor_S_per_cm"] * (50 / 30) / 2, rel=1e-9)


def test_thickness_sd_without_thickness_is_refused(tmp_path):
    result = _invoke(["analyze", PF_DATA, "--screen-only", "--thickness-sd-nm", "1"])
    assert result.exit_code == 2
    assert "--thickness-sd-nm" in result.stderr and "--thickness-nm" in result.stderr
    assert "Traceback" not in result.output


# --------------------------------------------------------------------------------------------
# Bad input: exit 2, a message naming the file/line/column, no traceback
# --------------------------------------------------------------------------------------------

GOOD_TABLE = "temperature_K,voltage_V,current_A\n" + "".join(
    f"{t},{v},{1e-9 * v * t / 300:.6e}\n" for t in (200, 250, 300) for v in (-1.0, -0.5, 0.5, 1.0, 1.5)
)


def _write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def _bad_cases(folder: Path) -> dict[str, tuple[list, list[str]]]:
    """name -> (arguments, fragments the error message must contain)."""
    good = _write(folder, "good.csv", GOOD_TABLE)
    lines = GOOD_TABLE.splitlines(keepends=True)
    non_numeric = lines[:4] + ["250,abc,1e-9\n"] + lines[5:]
    with_nan = lines[:7] + ["250,0.5,nan\n"] + lines[8:]
    mixed = "temperature_K,voltage_V,current_A,current_mA\n" + "".join(
        line.rstrip("\n") + ",0.001\n" for line in lines[1:])
    return {
        "missing file": (["analyze", folder / "absent.csv", "--screen-only"],
                         ["absent.csv", "no such file"]),
        "empty file": (["analyze", _write(folder, "empty.csv", ""), "--screen-only"],
                       ["empty.csv", "empty"]),
        "non-numeric cell": (["analyze", _write(folder, "text.csv", "".join(non_numeric)), "--screen-only"],
                             ["text.csv", "line 5", "voltage_V", "abc"]),
        "NaN": (["analyze", _write(folder, "nan.csv", "".join(with_nan)), "--screen-only"],
                ["nan.csv", "line 8", "current_A", "finite"]),
        "single voltage": (["analyze", _write(folder, "single.csv",
                                              "temperature_K,voltage_V,current_A\n"
                                              "300,1,1e-9\n300,1,1.01e-9\n"), "--screen-only"],
                           ["single.csv", "300 K", "distinct"]),
        "missing column": (["analyze", _write(folder, "nocurrent.csv", "temperature_K,voltage_V\n300,1\n"),
                            "--screen-only"], ["nocurrent.csv", "line 1", "no current column"]),
        "unknown unit": (["analyze", _write(folder, "unit.csv",
                                            GOOD_TABLE.replace("current_A", "current_kA")),
                          "--screen-only"], ["unit.csv", "current_kA", "unknown unit"]),
        "mixed units": (["analyze", _write(folder, "mixed.csv", mixed), "--screen-only"],
                        ["mixed.csv", "current_A", "current_mA"]),
        "negative thickness": (["analyze", good, "--screen-only", "--thickness-nm", "-5"],
                               ["--thickness-nm", "> 0", "-5"]),
        "zero thickness": (["analyze", good, "--screen-only", "--thickness-nm", "0"],
                           ["--thickness-nm", "> 0"]),
        "unknown mechanism": (["analyze", good, "--area-cm2", "1e-4", "--mechanism", "warp_drive"],
                              ["warp_drive", "poole_frenkel"]),
        "bad polarity": (["analyze", good, "--screen-only", "--polarity", "sideways"],
                         ["--polarity", "sideways", "positive"]),
        "json over input": (["analyze", good, "--screen-only", "--json", good],
                            ["good.csv", "overwrite"]),
        "no area for a fit": (["analyze", good, "--quick", "--mechanism", "poole_frenkel",
                               "--thickness-nm", "30"], ["area", "--area-cm2"]),
    }


def test_every_bad_input_exits_2_with_a_clear_message(tmp_path):
    # No device.toml in tmp_path, so "no area for a fit" has no area anywhere.
    cases = _bad_cases(tmp_path)
    good_before = (tmp_path / "good.csv").read_bytes()
    for name, (args, fragments) in cases.items():
        result = _invoke(args)
        assert result.exit_code == 2, (name, result.output)
        assert "Traceback" not in result.output, name
        assert "error:" in result.stderr, (name, result.stderr)
        message = " ".join(result.stderr.split())  # undo console line wrapping
        for fragment in fragments:
            assert fragment in message, (name, fragment, message)
    assert (tmp_path / "good.csv").read_bytes() == good_before


# --------------------------------------------------------------------------------------------
# Excluded points
# --------------------------------------------------------------------------------------------


def test_excluded_points_warn_on_stderr_and_are_counted(tmp_path):
    rows = ["temperature_K,voltage_V,current_A"]
    for t in (200, 250, 300):
        rows.append(f"{t},0,3e-13")  # zero bias: excluded
        rows += [f"{t},{v},{1e-7 * v * t / 300:.6e}" for v in (-1.0, -0.8, -0.6, -0.4, -0.2,
                                                                0.2, 0.4, 0.6, 0.8, 1.0)]
    # Compliance plateau at 300 K: the SMU holds 1.2e-7 A while the bias steps on.
    rows += [f"300,{v},1.2e-7" for v in (1.2, 1.4, 1.6)]
    data = _write(tmp_path, "sweep.csv", "\n".join(rows) + "\n")
    out = tmp_path / "screen.json"
    result = _invoke(["analyze", data, "--screen-only", "--json", out])
    assert result.exit_code == 0, result.output
    stderr = " ".join(result.stderr.split())
    assert "warning:" in stderr
    assert "excluded 3 point(s), " + REASON_ZERO_BIAS in stderr
    assert "excluded 3 point(s), " + REASON_COMPLIANCE in stderr
    assert "sweep.csv line(s)" in stderr
    summary = json.loads(out.read_text())["input"]
    assert summary["n_excluded"] == 6
    assert summary["n_excluded_by_reason"] == {REASON_COMPLIANCE: 3, REASON_ZERO_BIAS: 3}
    assert summary["n_points"] == 30 and summary["n_points_fitted"] == 30
