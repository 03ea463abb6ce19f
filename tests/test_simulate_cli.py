"""`mechid simulate`, `mechid mechanisms` and the command line's handling of bad input."""

from __future__ import annotations

import numpy as np
import pytest
from typer.testing import CliRunner

from mechid.catalogue import MECHANISMS, get_mechanism
from mechid.catalogue.emission import poole_frenkel_current_density_A_per_cm2
from mechid.catalogue.tunnelling import simmons_current_density_A_per_m2
from mechid.cli import app
from mechid.data import read_series
from mechid.device import Device
from mechid.errors import MechidError
from mechid.simulate import simulate_series

runner = CliRunner()


def test_simulate_agrees_with_published_formula_values(tmp_path):
    # Simmons (1963) worked value, physics-references sec. 1: phi0 = 2 eV, s = 2 nm, V = 0.5 V,
    # m = m_e -> J = 4.39032 A m^-2 at T -> 0 (the thermal factor at 1 K is 1 + 4e-9).
    out = tmp_path / "dt.csv"
    result = runner.invoke(app, [
        "simulate", "direct_tunnelling", "--param", "barrier_height_eV=2",
        "--param", "thickness_nm=2", "--param", "effective_mass_ratio=1",
        "--temperatures-K", "1", "--voltages-V", "0.5,-0.5,0.1", "--area-cm2", "1", "--out", str(out),
    ])
    assert result.exit_code == 0, result.output
    series = read_series(out)
    expected_A = 4.39032 * 1e-4  # A m^-2 -> A cm^-2, times 1 cm^2
    np.testing.assert_allclose(np.sort(series.current_A)[[0, 2]], [-expected_A, expected_A], rtol=1e-5)


def test_simulate_matches_formula_functions_to_1e6():
    # The command writes what the catalogue formula gives (1e-6 relative, issue requirement).
    device = Device(area_cm2=2e-4)
    params = {"trap_depth_eV": 1.0, "dielectric_constant": 4.0, "prefactor_S_per_cm": 4.486,
              "thickness_nm": 100.0}
    sim = simulate_series(get_mechanism("poole_frenkel"), params, [250, 300], [1.0, 5.0, 10.0], device)
    field = np.abs(sim.voltage_V) / 100e-9  # V/m
    direct = poole_frenkel_current_density_A_per_cm2(field, sim.temperature_K, 1.0, 4.0, 4.486) * 2e-4
    np.testing.assert_allclose(sim.current_A, direct, rtol=1e-6)
    dt = simulate_series(get_mechanism("direct_tunnelling"),
                         {"barrier_height_eV": 2.0, "thickness_nm": 2.0, "effective_mass_ratio": 1.0},
                         [1.0], [0.1, 0.5], Device(area_cm2=1.0))
    np.testing.assert_allclose(dt.current_A * 1e4,
                               simmons_current_density_A_per_m2(np.array([0.1, 0.5]), 2.0, 2.0, 1.0),
                               rtol=1e-6)


def test_simulate_noise_is_reproducible_and_has_the_asked_level():
    mech = get_mechanism("mott_vrh")
    params = {"characteristic_temperature_K": 1e6, "prefactor_S": 1e-3}
    grid = dict(temperatures_K=[100.0], voltages_V=np.linspace(0.01, 1, 2000), device=Device())
    a = simulate_series(mech, params, **grid, noise_relative=0.05, rng=np.random.default_rng(4))
    b = simulate_series(mech, params, **grid, noise_relative=0.05, rng=np.random.default_rng(4))
    # bit-exact on purpose: same machine, same seed -> same numbers (mechid's determinism promise)
    np.testing.assert_array_equal(a.current_A, b.current_A)
    rel = a.current_A / a.noiseless_current_A - 1
    assert np.std(rel) == pytest.approx(0.05, rel=0.1)


def test_simulate_rejects_out_of_range_and_missing_parameters():
    mech = get_mechanism("es_vrh")
    with pytest.raises(MechidError, match="outside its physical range"):
        simulate_series(mech, {"characteristic_temperature_K": -1, "prefactor_S": 1e-3}, [10], [0.1],
                        Device())
    with pytest.raises(MechidError, match="needs a value for prefactor_S"):
        simulate_series(mech, {"characteristic_temperature_K": 100.0}, [10], [0.1], Device())


def test_out_of_range_dimensionless_value_is_printed_without_a_unit():
    # Issue 11: a ratio's unit "1" printed after the number read as "m*/m0 = 2 1".
    params = {"barrier_height_eV": 3.0, "thickness_nm": 5.0, "effective_mass_ratio": 2.0}
    with pytest.raises(MechidError, match=r"effective_mass_ratio = 2 is outside"):
        simulate_series(get_mechanism("fowler_nordheim"), params, [300], [1.0], Device())


def test_simulate_cli_errors_exit_2_without_traceback(tmp_path):
    cases = [
        ["simulate", "warp_drive", "--out", str(tmp_path / "a.csv")],
        ["simulate", "es_vrh", "--param", "bogus=1", "--out", str(tmp_path / "b.csv")],
        ["simulate", "es_vrh", "--param", "prefactor_S", "--out", str(tmp_path / "c.csv")],
        ["simulate", "es_vrh", "--param", "characteristic_temperature_K=1e3",
         "--param", "prefactor_S=0.1", "--voltages-V", "a,b", "--out", str(tmp_path / "d.csv")],
        ["simulate", "poole_frenkel", "--param", "trap_depth_eV=1", "--out", str(tmp_path / "e.csv")],
    ]
    for args in cases:
        result = runner.invoke(app, args)
        assert result.exit_code == 2, (args, result.output)
        assert "Traceback" not in result.output
        assert "error" in result.output.lower()


def test_simulate_refuses_to_overwrite(tmp_path):
    out = tmp_path / "x.csv"
    out.write_text("precious\n")
    result = runner.invoke(app, ["simulate", "es_vrh", "--param", "characteristic_temperature_K=1e3",
                                 "--param", "prefactor_S=0.1", "--out", str(out)])
    assert result.exit_code == 2
    assert out.read_text() == "precious\n"


def test_mechanisms_lists_every_mechanism_with_parameters():
    result = runner.invoke(app, ["mechanisms"])
    assert result.exit_code == 0
    for m in MECHANISMS:
        assert m.id in result.output
        for p in m.parameters:
            assert p.name in result.output


def test_voltage_range_syntax(tmp_path):
    out = tmp_path / "r.csv"
    result = runner.invoke(app, ["simulate", "mott_vrh", "--param", "characteristic_temperature_K=1e6",
                                 "--param", "prefactor_S=1e-3", "--temperatures-K", "50:300:6",
                                 "--voltages-V", "0.1:1:10", "--out", str(out)])
    assert result.exit_code == 0, result.output
    series = read_series(out)
    assert series.n_points == 60
    np.testing.assert_allclose(series.temperatures, np.linspace(50, 300, 6))


def test_prior_odds_option_parsing():
    import typer

    from mechid.cli import parse_prior_odds
    from mechid.errors import UnknownMechanismError

    assert parse_prior_odds(["mott_vrh=2", "es_vrh=0.5"]) == {"mott_vrh": 2.0, "es_vrh": 0.5}
    for bad in (["mott_vrh=0"], ["mott_vrh=-1"], ["mott_vrh"], ["mott_vrh=x"]):
        with pytest.raises(typer.Exit):
            parse_prior_odds(bad)
    with pytest.raises(UnknownMechanismError):
        parse_prior_odds(["warp_drive=1"])
