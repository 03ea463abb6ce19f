"""Output paths are checked before any analysis; no output may replace a file that was read.

Every case ends with exit code 2 and a message naming the option and the path, and leaves
every input byte-identical. The runs use ``--screen-only`` where they get past the checks.
"""

from __future__ import annotations

import hashlib
import os
import shutil
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from mechid.cli import app

runner = CliRunner()
PF_DIR = Path(__file__).resolve().parents[1] / "reference_curves" / "larkfield_sinx_poole_frenkel"


def _invoke(args: list[object]):
    result = runner.invoke(app, [str(a) for a in args])
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        raise result.exception
    return result


def _digest(folder: Path) -> dict[str, str]:
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.iterdir())
            if p.is_file()}


@pytest.fixture
def copied(tmp_path: Path) -> Path:
    """A private copy of the PF reference series (data.csv + device.toml)."""
    folder = tmp_path / "run[1]"
    shutil.copytree(PF_DIR, folder)
    return folder


@pytest.fixture
def as_folder(tmp_path: Path) -> Path:
    """The PF series split into per-temperature files in one folder, with its device.toml."""
    folder = tmp_path / "sweeps"
    folder.mkdir()
    lines = (PF_DIR / "data.csv").read_text().splitlines()
    rows = [line for line in lines if line and line[0].isdigit()]
    by_t: dict[str, list[str]] = {}
    for row in rows:
        t, v, i = row.split(",")
        by_t.setdefault(t, []).append(f"{v},{i}")
    for t, body in by_t.items():
        (folder / f"s_{t}K.csv").write_text("voltage_V,current_A\n" + "\n".join(body) + "\n")
    shutil.copy(PF_DIR / "device.toml", folder / "device.toml")
    return folder


def _refused(args: list[object], pattern: str, folder: Path) -> None:
    before = _digest(folder)
    result = _invoke(args)
    assert result.exit_code == 2, result.output
    assert pattern in " ".join(result.output.split()), result.output
    assert _digest(folder) == before  # nothing read was changed


def test_json_onto_a_hard_link_of_the_input(copied: Path) -> None:
    link = copied / "alias.csv"
    os.link(copied / "data.csv", link)
    _refused(["analyze", copied / "data.csv", "--screen-only", "--json", link],
             "refusing to overwrite", copied)


def test_json_onto_the_device_description_just_read(copied: Path) -> None:
    _refused(["analyze", copied / "data.csv", "--screen-only", "--json", copied / "device.toml"],
             "refusing to overwrite", copied)


@pytest.mark.parametrize("option", ["--json", "--summary"])
def test_outputs_onto_a_file_of_a_data_folder(as_folder: Path, option: str) -> None:
    target = next(as_folder.glob("s_*K.csv"))
    _refused(["analyze", as_folder, "--screen-only", option, target], "refusing to overwrite",
             as_folder)


def test_summary_into_the_data_folder_would_become_data(as_folder: Path) -> None:
    _refused(["analyze", as_folder, "--screen-only", "--summary", as_folder / "table.csv"],
             "would be read as data", as_folder)


@pytest.mark.parametrize(("name", "pattern"), [
    ("missing/r.json", "does not exist"),
    (".", "is a folder"),
])
def test_unwritable_json_destinations_fail_before_the_analysis(copied: Path, tmp_path: Path,
                                                                name: str, pattern: str) -> None:
    _refused(["analyze", copied / "data.csv", "--quick", "--json", tmp_path / name], pattern, copied)


def test_two_options_writing_one_file(copied: Path, tmp_path: Path) -> None:
    _refused(["analyze", copied / "data.csv", "--screen-only", "--json", tmp_path / "x.out",
              "--summary", tmp_path / "x.out"], "both write", copied)


def test_figures_onto_an_existing_file(copied: Path, tmp_path: Path) -> None:
    (tmp_path / "plain").write_text("x")
    _refused(["analyze", copied / "data.csv", "--screen-only", "--figures", tmp_path / "plain"],
             "exists and is not a folder", copied)


def test_brackets_in_paths_are_printed_as_written(copied: Path, tmp_path: Path) -> None:
    out = tmp_path / "o[" / "x]"
    out.mkdir(parents=True)
    result = _invoke(["analyze", copied / "data.csv", "--screen-only", "--json", out / "r.json"])
    assert result.exit_code == 0, result.output
    assert (out / "r.json").is_file()
    assert "o[/x]" in result.output


@pytest.mark.parametrize("command", [["analyze", PF_DIR / "data.csv", "--screen-only"],
                                     ["simulate", "mott_vrh", "--out", "x.csv"]])
def test_negative_seed_is_a_usage_error(command: list[object]) -> None:
    result = _invoke([*command, "--seed", "-1"])
    assert result.exit_code == 2
    assert "--seed" in result.output


def test_demo_out_onto_an_existing_file(tmp_path: Path) -> None:
    (tmp_path / "taken").write_text("keep me")
    result = _invoke(["demo", "--out", tmp_path / "taken"])
    assert result.exit_code == 2, result.output
    assert "exists and is not a folder" in result.output
    assert (tmp_path / "taken").read_text() == "keep me"


# ------------------------------------------------------------------ property test of the arguments

_TEXT = st.text(alphabet="0123456789.,:-+eE _=abcxyz[]", max_size=12)


@settings(max_examples=120, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(temperatures=st.one_of(_TEXT, st.sampled_from(["77,300", "20:300:4"])),
       voltages=st.one_of(_TEXT, st.sampled_from(["0.1,0.2,0.3", "-1:1:5"])),
       t0=st.one_of(_TEXT, st.sampled_from(["1e6", "5e5"])), noise=st.floats(allow_nan=True),
       seed=st.integers(-5, 2**70), area=st.one_of(_TEXT, st.just("1e-3")))
def test_simulate_arguments_end_in_success_or_a_usage_error(tmp_path: Path, temperatures: str,
                                                           voltages: str, t0: str, noise: float,
                                                           seed: int, area: str) -> None:
    out = tmp_path / "sim.csv"
    out.unlink(missing_ok=True)
    result = _invoke(["simulate", "mott_vrh", "--out", out, "--temperatures-K", temperatures,
                      "--voltages-V", voltages, "--param", f"characteristic_temperature_K={t0}",
                      "--param", "prefactor_S=1e-3", "--noise-relative", noise,
                      "--seed", seed, "--area-cm2", area])
    assert result.exit_code in (0, 2), result.output
    assert (result.exit_code == 0) == out.is_file()


@pytest.mark.parametrize("option", ["--noise-relative", "--noise-floor-A"])
def test_simulate_refuses_nan_noise(tmp_path: Path, option: str) -> None:
    result = _invoke(["simulate", "mott_vrh", "--out", tmp_path / "s.csv", "--param",
                      "characteristic_temperature_K=1e6", "--param", "prefactor_S=1e-3",
                      "--temperatures-K", "77,300", "--voltages-V", "0.1,0.2,0.3", option, "nan"])
    assert result.exit_code == 2 and "finite" in result.output
    assert not (tmp_path / "s.csv").exists()


def test_read_only_output_folder_fails_before_the_analysis(copied: Path, tmp_path: Path,
                                                            monkeypatch: pytest.MonkeyPatch) -> None:
    # Root (as in CI) may write anywhere, so the operating system's answer is stood in for:
    # the check must ask it (os.access) and refuse before any fit.
    locked = tmp_path / "locked"
    locked.mkdir()
    real_access = os.access
    monkeypatch.setattr("mechid.outputs.os.access",
                        lambda path, mode: False if Path(path) == locked else real_access(path, mode))
    _refused(["analyze", copied / "data.csv", "--quick", "--json", locked / "r.json"],
             "cannot be written to", copied)
