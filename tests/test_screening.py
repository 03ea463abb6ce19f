"""Straightened-plot analysis (mechid.screening) on clean simulated I-V-T series.

Series are built directly from ``mechanism.current(V, T, params, device)`` of the catalogue
declarations, on both polarities, in realistic regimes chosen so that each mechanism's own
declared plots apply (e.g. nearest-neighbour hopping in its high-field range). Reference
numbers come from /work/shared/physics-references.md (section named beside each check),
recomputed there with scipy.constants.
"""

from __future__ import annotations

import dataclasses
import json
import math
import re
import subprocess
import sys
from dataclasses import dataclass

import numpy as np
import pytest
from scipy import constants, stats

from mechid.catalogue import MECHANISMS, get_mechanism
from mechid.catalogue.base import ParameterHints
from mechid.catalogue.checks import (
    CheckSpec,
    HoppingLaw,
    PlotEstimate,
    StraightPlot,
    ZeroFieldBarrier,
)
from mechid.catalogue.hopping import mott_vrh_variant
from mechid.data import IVSeries
from mechid.device import Device, device_from_values
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors
from mechid.inference.start import hint_vectors
from mechid.screening import (
    CHECK_RULES,
    Check,
    LinearisationResult,
    evaluate_check,
    hopping_laws,
    linearise,
    robust_line,
)
from mechid.screening.biases import common_bias_points, prepare_series

AREA_CM2 = 1e-4


@dataclass(frozen=True)
class Regime:
    """A mechanism, its true parameters and a measurement grid."""

    mechanism_id: str
    params: dict[str, float]
    temperatures_K: np.ndarray
    biases_V: np.ndarray  # positive; the series gets both polarities
    device: Device


def _series(mechanism_id: str, params: dict[str, float], temperatures_K: np.ndarray,
            biases_V: np.ndarray, device: Device) -> IVSeries:
    voltages = np.concatenate([-biases_V[::-1], biases_V])
    t_grid, v_grid = (a.ravel() for a in np.meshgrid(temperatures_K, voltages, indexing="ij"))
    current = get_mechanism(mechanism_id).current(v_grid, t_grid, params, device)
    return IVSeries(temperature_K=t_grid, voltage_V=v_grid, current_A=current)


def _device(**values: float) -> Device:
    return device_from_values(area_cm2=AREA_CM2, **values)


REGIMES: dict[str, Regime] = {
    # 2 nm barrier at low bias (eV << phi0): the direct, ohmic-to-cubic range.
    "direct_tunnelling": Regime(
        "direct_tunnelling",
        {"barrier_height_eV": 2.0, "thickness_nm": 2.0, "effective_mass_ratio": 0.5},
        np.linspace(100, 300, 5), np.linspace(0.02, 0.3, 15),
        _device(thickness_nm=2.0, effective_mass_ratio=0.5),
    ),
    # 5 nm SiO2-like film at 0.8-1.5 V/nm, phi = 3 eV, m* = 0.4, 77-250 K: inside the FN
    # formula's validity (eV > phi; Murphy-Good pi c kT <= 0.95, factor <= 1.16).
    "fowler_nordheim": Regime(
        "fowler_nordheim",
        {"barrier_height_eV": 3.0, "thickness_nm": 5.0, "effective_mass_ratio": 0.4},
        np.linspace(77, 250, 5), np.linspace(4.0, 7.5, 21),
        _device(thickness_nm=5.0, effective_mass_ratio=0.4),
    ),
    # eV >= 14 kT: the reverse emission of the MIM form (Sze & Ng) is below 1e-6, so the
    # Schottky plot is straight (at 0.1 V and 400 K it would bend the line by 5 %).
    "schottky_emission": Regime(
        "schottky_emission",
        {"barrier_height_eV": 0.8, "dielectric_constant": 4.0, "richardson_constant_ratio": 0.5,
         "thickness_nm": 20.0},
        np.linspace(200, 400, 5), np.linspace(0.5, 5.0, 25),
        _device(thickness_nm=20.0, optical_dielectric_constant=4.0),
    ),
    "poole_frenkel": Regime(
        "poole_frenkel",
        {"trap_depth_eV": 0.9, "dielectric_constant": 4.0, "prefactor_S_per_cm": 1.0,
         "thickness_nm": 20.0},
        np.linspace(250, 400, 5), np.linspace(0.5, 10.0, 25),
        _device(thickness_nm=20.0, optical_dielectric_constant=4.0),
    ),
    # High-field range e a E >> 2 kT, below the field that removes the hop barrier.
    "nearest_neighbour_hopping": Regime(
        "nearest_neighbour_hopping",
        {"activation_energy_eV": 0.2, "hopping_distance_nm": 2.0, "prefactor_A_per_cm2": 1e5,
         "thickness_nm": 20.0},
        np.linspace(200, 350, 6), np.linspace(1.0, 3.5, 21),
        _device(thickness_nm=20.0),
    ),
    "mott_vrh": Regime(
        "mott_vrh",
        {"characteristic_temperature_K": 1e7, "prefactor_S": 1e-3},
        np.geomspace(20, 300, 12), np.linspace(0.01, 1.0, 10),
        _device(),
    ),
    "es_vrh": Regime(
        "es_vrh",
        {"characteristic_temperature_K": 1e4, "prefactor_S": 1e-3},
        np.geomspace(2, 50, 12), np.linspace(0.01, 1.0, 10),
        _device(),
    ),
    "ohmic_activated": Regime(
        "ohmic_activated",
        {"activation_energy_eV": 0.35, "prefactor_S": 10.0},
        np.linspace(250, 400, 6), np.linspace(0.01, 0.5, 12),
        _device(),
    ),
    # eV >= 10 kT (the drift-only validity of Mott-Gurney) at every point.
    "sclc_shallow_traps": Regime(
        "sclc_shallow_traps",
        {"trap_depth_eV": 0.3, "permittivity_mobility_prefactor_cm2_per_Vs": 100.0,
         "thickness_nm": 300.0},
        np.linspace(175, 350, 6), np.linspace(1.0, 30.0, 15),
        _device(thickness_nm=300.0),
    ),
    "sclc_exponential_traps": Regime(
        "sclc_exponential_traps",
        {"characteristic_trap_temperature_K": 1500.0, "trap_density_per_cm3": 1e18,
         "dielectric_constant": 3.5, "mobility_band_density_per_V_s_cm": 1e21,
         "thickness_nm": 500.0},
        np.linspace(250, 400, 6), np.linspace(3.0, 30.0, 15),
        _device(thickness_nm=500.0),
    ),
    # eV >= phi_t: the barrier seen from the trap is triangular.
    "trap_assisted_tunnelling": Regime(
        "trap_assisted_tunnelling",
        {"trap_energy_eV": 1.2, "prefactor_A_per_cm2": 1e2, "thickness_nm": 8.0,
         "effective_mass_ratio": 0.4},
        np.linspace(250, 400, 4), np.linspace(3.0, 8.0, 20),
        _device(thickness_nm=8.0, effective_mass_ratio=0.4),
    ),
}


@pytest.fixture(scope="module")
def results() -> dict[str, LinearisationResult]:
    out = {}
    for name, regime in REGIMES.items():
        series = _series(regime.mechanism_id, regime.params, regime.temperatures_K,
                         regime.biases_V, regime.device)
        out[name] = linearise(series, regime.device)
    return out


# --------------------------------------------------------------------------------------------
# Robust line
# --------------------------------------------------------------------------------------------


def test_robust_line_is_exact_on_a_line_and_matches_ols_errors_on_gaussian_noise() -> None:
    x = np.linspace(-2.0, 5.0, 40)
    exact = robust_line(x, 1.5 - 0.75 * x)
    assert exact is not None
    assert exact.slope == pytest.approx(-0.75, rel=1e-9)
    assert exact.intercept == pytest.approx(1.5, rel=1e-9)
    assert exact.r_squared == pytest.approx(1.0, abs=1e-12)

    rng = np.random.default_rng(7)
    y = 1.5 - 0.75 * x + 0.05 * rng.standard_normal(x.size)
    fit = robust_line(x, y)
    ols = stats.linregress(x, y)
    # Huber and OLS agree on Gaussian noise within a fraction of the standard error, and the
    # documented error is the OLS formula on the robust residuals.
    assert abs(fit.slope - ols.slope) < 0.3 * ols.stderr
    assert fit.slope_err == pytest.approx(ols.stderr, rel=0.05)
    assert fit.intercept_err == pytest.approx(ols.intercept_stderr, rel=0.05)


def test_robust_line_resists_an_outlier() -> None:
    x = np.linspace(0.0, 1.0, 30)
    y = 2.0 + 3.0 * x
    y[10] += 5.0
    fit = robust_line(x, y)
    assert fit.slope == pytest.approx(3.0, rel=1e-3)
    assert fit.n_outliers >= 1


# --------------------------------------------------------------------------------------------
# Ranking and extracted quantities
# --------------------------------------------------------------------------------------------


@pytest.mark.parametrize("mechanism_id", list(REGIMES))
def test_right_mechanism_ranks_first(results: dict[str, LinearisationResult],
                                     mechanism_id: str) -> None:
    result = results[mechanism_id]
    assert result.best == mechanism_id, [(m.mechanism_id, round(m.score, 2))
                                         for m in result.mechanisms]
    assert result.ranking[0] == mechanism_id
    own = result.for_mechanism(mechanism_id)
    assert all(c.passed is not False for c in own.checks), [c for c in own.checks if c.passed
                                                            is False]


@pytest.mark.parametrize(("mechanism_id", "plot_id"), [
    ("schottky_emission", "schottky_plot"),
    ("poole_frenkel", "poole_frenkel_plot"),
])
def test_dielectric_constant_from_the_field_slope(results: dict[str, LinearisationResult],
                                                  mechanism_id: str, plot_id: str) -> None:
    analysis = results[mechanism_id].for_mechanism(mechanism_id)
    values = [line.quantities["dielectric_constant"] for line in analysis.lines
              if line.plot_id == plot_id]
    assert len(values) == REGIMES[mechanism_id].temperatures_K.size
    np.testing.assert_allclose(values, 4.0, rtol=0.01)
    checks = {c.name: c for c in analysis.checks}
    assert checks["dielectric_constant_vs_optical"].passed is True
    assert checks["slope_times_temperature_constant"].passed is True
    assert checks["dielectric_constants_agree"].value == pytest.approx(1.0, rel=0.01)


@pytest.mark.parametrize(("mechanism_id", "name", "truth"), [
    ("schottky_emission", "zero_field_barrier_height_eV", 0.8),
    ("poole_frenkel", "zero_field_trap_depth_eV", 0.9),
])
def test_zero_field_barrier_from_arrhenius_lines(results: dict[str, LinearisationResult],
                                                 mechanism_id: str, name: str,
                                                 truth: float) -> None:
    checks = {c.name: c for c in results[mechanism_id].for_mechanism(mechanism_id).checks}
    assert checks[name].passed is True
    assert checks[name].value == pytest.approx(truth, rel=0.01)


def test_schottky_slope_matches_reference() -> None:
    # physics-references.md S3: eps_r = 4, 300 K -> field slope S = 7.339251e-4 (m/V)^1/2;
    # against sqrt(|V|) the slope is S/sqrt(d).
    device = _device(thickness_nm=20.0)
    regime = REGIMES["schottky_emission"]
    series = _series("schottky_emission", regime.params, np.array([250.0, 300.0, 350.0]),
                     regime.biases_V, device)
    line = next(line for line in linearise(series, device).for_mechanism("schottky_emission").lines
                if line.plot_id == "schottky_plot" and line.group_value == 300.0)
    assert line.slope == pytest.approx(7.339251e-4 / math.sqrt(20e-9), rel=1e-5)


def test_fowler_nordheim_barrier_and_slope(results: dict[str, LinearisationResult]) -> None:
    analysis = results["fowler_nordheim"].for_mechanism("fowler_nordheim")
    barriers = [line.quantities["barrier_height_eV"] for line in analysis.lines]
    # True thickness and mass given: within 2 % (the Murphy-Good thermal factor bends the
    # line slightly, most at 300 K).
    np.testing.assert_allclose(barriers, 3.0, rtol=0.02)

    # physics-references.md S2: phi = 3.2 eV, m* = 0.5, d = 5 nm -> slope of ln(I/V^2) vs
    # 1/V = -138.247 V. At 4 K the thermal factor is 1 to < 1e-4.
    device = _device(thickness_nm=5.0, effective_mass_ratio=0.5)
    params = {"barrier_height_eV": 3.2, "thickness_nm": 5.0, "effective_mass_ratio": 0.5}
    series = _series("fowler_nordheim", params, np.array([4.0, 10.0, 20.0]),
                     np.linspace(3.0, 8.0, 26), device)
    line = linearise(series, device).for_mechanism("fowler_nordheim").lines[0]
    assert line.slope == pytest.approx(-138.247, rel=1e-4)


@pytest.mark.parametrize(("mechanism_id", "p"), [("mott_vrh", 0.25), ("es_vrh", 0.5)])
def test_zabrodskii_exponent(results: dict[str, LinearisationResult], mechanism_id: str,
                             p: float) -> None:
    z = results[mechanism_id].zabrodskii
    assert abs(z.exponent_p - p) < 0.05
    assert z.supported_law == mechanism_id
    assert z.exponent_p_err is not None and z.exponent_p_err < 0.05


def test_zabrodskii_w_of_arrhenius_conductance() -> None:
    # physics-references.md S5: Arrhenius E_a = 0.1 eV at 300 K -> w = E_a/kT = 3.86817.
    temperatures = np.linspace(290.0, 310.0, 21)
    kT = constants.k / constants.e * temperatures
    conductance = 1e-3 * np.exp(-0.1 / kT)
    series = IVSeries(temperature_K=np.repeat(temperatures, 2),
                      voltage_V=np.tile([-0.1, 0.1], temperatures.size),
                      current_A=np.repeat(conductance, 2) * np.tile([-0.1, 0.1],
                                                                    temperatures.size))
    z = linearise(series).zabrodskii
    w_300 = dict(zip(z.temperatures_K, z.w, strict=True))[300.0]
    assert w_300 == pytest.approx(3.86817, rel=1e-4)
    assert z.exponent_p == pytest.approx(1.0, abs=0.01)
    assert z.supported_law == "nearest_neighbour_hopping"


def test_transition_voltage_of_simmons_barrier() -> None:
    # physics-references.md S9: Simmons intermediate-voltage formula, phi0 = 2 eV, s = 2 nm,
    # free-electron mass -> V_t = 0.526519 V (Beebe et al. 2006 definition).
    device = _device(thickness_nm=2.0, effective_mass_ratio=1.0)
    params = {"barrier_height_eV": 2.0, "thickness_nm": 2.0, "effective_mass_ratio": 1.0}
    series = _series("direct_tunnelling", params, np.array([4.2, 10.0]),
                     np.arange(0.01, 1.2001, 0.01), device)
    result = linearise(series, device)
    for tv in result.transition_voltages:
        assert tv.positive_V == pytest.approx(0.526519, abs=1e-2)
        assert tv.negative_V == pytest.approx(0.526519, abs=1e-2)
    # Data crossing the transition voltage are no longer purely FN-like.
    fn = {c.name: c for c in result.for_mechanism("fowler_nordheim").checks}
    assert fn["fowler_nordheim_tunnelling_regime"].passed is False


def test_no_transition_voltage_inside_pure_fn_data(
        results: dict[str, LinearisationResult]) -> None:
    assert all(tv.positive_V is None and tv.negative_V is None
               for tv in results["fowler_nordheim"].transition_voltages)


# --------------------------------------------------------------------------------------------
# Checks that cannot be evaluated, JSON, junk
# --------------------------------------------------------------------------------------------


def test_missing_optical_constant_leaves_check_unevaluated() -> None:
    regime = REGIMES["poole_frenkel"]
    device = _device(thickness_nm=20.0)
    series = _series("poole_frenkel", regime.params, regime.temperatures_K, regime.biases_V,
                     device)
    checks = {c.name: c for c in linearise(series, device).for_mechanism("poole_frenkel").checks}
    assert checks["dielectric_constant_vs_optical"].passed is None
    assert "optical" in checks["dielectric_constant_vs_optical"].detail
    assert checks["dielectric_constant_in_range"].passed is True


@pytest.mark.parametrize("mechanism_id", list(REGIMES))
def test_to_dict_is_plain_json(results: dict[str, LinearisationResult],
                               mechanism_id: str) -> None:
    as_dict = results[mechanism_id].to_dict()
    text = json.dumps(as_dict, allow_nan=False)
    assert json.loads(text)["best"] == mechanism_id
    assert {"mechanisms", "zabrodskii", "transition_voltages", "ranking"} <= set(as_dict)


def test_check_to_dict_turns_nan_into_null() -> None:
    assert Check("x", None, math.nan, "e", "d").to_dict()["value"] is None


def _junk_series() -> dict[str, IVSeries]:
    voltage = np.tile(np.linspace(-1.0, 1.0, 21), 2)
    temperature = np.repeat([100.0, 200.0], 21)
    return {
        "all_negative_currents": IVSeries(temperature_K=temperature, voltage_V=voltage,
                                          current_A=-np.abs(voltage) * 1e-6 - 1e-9),
        "two_temperatures": IVSeries(temperature_K=temperature, voltage_V=voltage,
                                     current_A=1e-6 * voltage),
        "all_zero": IVSeries(temperature_K=temperature, voltage_V=voltage,
                             current_A=np.zeros_like(voltage)),
        "empty": IVSeries(temperature_K=np.array([]), voltage_V=np.array([]),
                          current_A=np.array([])),
        "single_point": IVSeries(temperature_K=[300.0], voltage_V=[1.0], current_A=[1e-3]),
    }


@pytest.mark.parametrize("name", list(_junk_series()))
def test_junk_never_raises_nor_warns(name: str) -> None:
    # pytest runs with filterwarnings=error, so any stray warning fails here.
    result = linearise(_junk_series()[name], _device(thickness_nm=5.0))
    json.dumps(result.to_dict(), allow_nan=False)
    assert len(result.ranking) == len(result.mechanisms)
    assert result.zabrodskii.exponent_p is None


def test_two_temperatures_report_not_enough_temperatures() -> None:
    result = linearise(_junk_series()["two_temperatures"], _device(thickness_nm=5.0))
    notes = result.for_mechanism("poole_frenkel").notes
    assert any("not enough temperatures" in note for note in notes)
    assert "not enough temperatures" in result.zabrodskii.detail


def test_all_negative_currents_on_positive_bias_give_no_lines() -> None:
    voltage = np.tile(np.linspace(0.1, 1.0, 10), 3)
    series = IVSeries(temperature_K=np.repeat([100.0, 200.0, 300.0], 10), voltage_V=voltage,
                      current_A=-1e-6 * voltage)
    result = linearise(series, _device(thickness_nm=5.0))
    assert result.best is None
    assert all(not m.lines for m in result.mechanisms)


# --------------------------------------------------------------------------------------------
# Hand-off of the plot values to the fit (keyed by parameter name)
# --------------------------------------------------------------------------------------------

#: Relative tolerance of each hinted value against the truth on the clean REGIMES data.
#: Exact transforms (emission, VRH) leave only rounding; the FN plot carries the Murphy-Good
#: thermal factor at 77-300 K (~1 %); the hopping Arrhenius slope at 1-3.5 V still feels
#: the sinh curvature, ln(1 - exp(-eaE/kT)) (Mott & Davis 1979 law), ~10 % on E_a.
HINT_RTOL = {
    "fowler_nordheim": {"barrier_height_eV": 0.01},
    "schottky_emission": {"dielectric_constant": 1e-6, "barrier_height_eV": 1e-6,
                          "richardson_constant_ratio": 1e-6},
    "poole_frenkel": {"dielectric_constant": 1e-6, "trap_depth_eV": 1e-6,
                      "prefactor_S_per_cm": 1e-6},
    "nearest_neighbour_hopping": {"activation_energy_eV": 0.15, "hopping_distance_nm": 0.01},
    "mott_vrh": {"characteristic_temperature_K": 1e-6, "prefactor_S": 1e-6},
    "es_vrh": {"characteristic_temperature_K": 1e-6, "prefactor_S": 1e-6},
    # The low-bias conductance G0 and its cubic coefficient mix barrier, thickness and mass:
    # the plot alone determines no declared parameter, so nothing is handed over.
    "direct_tunnelling": {},
    # Exact transforms of the new laws (Arrhenius of I/V and I/V^2, log-log, ln I vs 1/V).
    "ohmic_activated": {"activation_energy_eV": 1e-6, "prefactor_S": 1e-6},
    "sclc_shallow_traps": {"trap_depth_eV": 1e-6,
                           "permittivity_mobility_prefactor_cm2_per_Vs": 1e-6},
    "sclc_exponential_traps": {"characteristic_trap_temperature_K": 1e-6},
    "trap_assisted_tunnelling": {"trap_energy_eV": 1e-6},
}


@pytest.mark.parametrize("mechanism_id", list(REGIMES))
def test_hints_are_keyed_by_parameter_name_and_near_the_truth(
        results: dict[str, LinearisationResult], mechanism_id: str) -> None:
    hints = results[mechanism_id].for_mechanism(mechanism_id).hints
    mechanism = get_mechanism(mechanism_id)
    assert hints.mechanism_id == mechanism_id
    assert set(hints.values) <= set(mechanism.parameter_names)
    expected = HINT_RTOL[mechanism_id]
    assert set(hints.values) == set(expected)
    truth = REGIMES[mechanism_id].params
    for name, rtol in expected.items():
        assert hints.values[name] == pytest.approx(truth[name], rel=rtol), name
        assert hints.sources[name].startswith(tuple(p.id for p in mechanism.plots))


def test_hinted_values_reach_the_mode_search_screen() -> None:
    regime = REGIMES["poole_frenkel"]
    series = _series(regime.mechanism_id, regime.params, regime.temperatures_K,
                     regime.biases_V, regime.device)
    mechanism = get_mechanism("poole_frenkel")
    target = MechanismTarget(mechanism, series.voltage_V, series.temperature_K,
                             series.current_A, regime.device,
                             mechanism_priors(mechanism, regime.device, series.current_A))
    hints = linearise(series, regime.device).for_mechanism("poole_frenkel").hints
    draws = hint_vectors(target, hints, np.random.default_rng(0))
    names = [p.name for p in target.free]
    column = names.index("trap_depth_eV")
    hinted = target.free[column].to_internal(hints.values["trap_depth_eV"])
    assert np.all(draws[:, column] == hinted)
    assert hints.values["trap_depth_eV"] == pytest.approx(0.9, rel=1e-6)
    with pytest.raises(ValueError, match="poole_frenkel_plot.dielectric_constant"):
        hint_vectors(target, ParameterHints("poole_frenkel",
                                            {"poole_frenkel_plot.dielectric_constant": 4.0}),
                     np.random.default_rng(0))


# --------------------------------------------------------------------------------------------
# Checks declared with the mechanism
# --------------------------------------------------------------------------------------------


def test_every_declared_check_has_a_rule_and_unknown_specs_are_refused() -> None:
    for mechanism in MECHANISMS:
        assert mechanism.checks, mechanism.id
        for spec in mechanism.checks:
            assert type(spec) in CHECK_RULES, (mechanism.id, spec)

    @dataclass(frozen=True)
    class Unruled(CheckSpec):
        pass

    with pytest.raises(TypeError, match="Unruled"):
        evaluate_check(Unruled(), None)  # type: ignore[arg-type]


def test_hopping_law_comes_from_the_declaration() -> None:
    # Mott 2D: p = 1/3 (Mott 1969), declared by the variant itself, not looked up by id.
    mott_2d = mott_vrh_variant(2)
    laws = [spec for spec in mott_2d.checks if isinstance(spec, HoppingLaw)]
    assert [law.exponent for law in laws] == [pytest.approx(1 / 3, rel=1e-15)]
    assert hopping_laws(MECHANISMS) == {"nearest_neighbour_hopping": 1.0, "mott_vrh": 0.25,
                                        "mott_vrh_2d": pytest.approx(1 / 3, rel=1e-15),
                                        "es_vrh": 0.5}


# --------------------------------------------------------------------------------------------
# Layering and the shared bias matching
# --------------------------------------------------------------------------------------------


def test_catalogue_does_not_import_the_screening() -> None:
    code = ("import sys, mechid.catalogue; "
            "sys.exit(any(m.startswith('mechid.screening') for m in sys.modules))")
    assert subprocess.run([sys.executable, "-c", code], check=False).returncode == 0


def test_report_bias_points_are_the_common_bias_table() -> None:
    regime = REGIMES["poole_frenkel"]
    series = _series(regime.mechanism_id, regime.params, regime.temperatures_K,
                     regime.biases_V, regime.device)
    data = prepare_series(series, n_biases=4)
    for bias, currents in zip(data.common_biases_V, data.common_current_A, strict=True):
        temps, current = common_bias_points(series, float(bias))
        np.testing.assert_array_equal(temps, data.temperatures)
        np.testing.assert_array_equal(current, currents)


# --------------------------------------------------------------------------------------------
# Hop distance only from the exponential regime of the field plot
# --------------------------------------------------------------------------------------------


def _hopping_series(activation_eV: float, biases_V: np.ndarray) -> tuple[IVSeries, Device]:
    device = _device(thickness_nm=50.0)
    params = {"activation_energy_eV": activation_eV, "hopping_distance_nm": 1.0,
              "prefactor_A_per_cm2": 1e5, "thickness_nm": 50.0}
    return _series("nearest_neighbour_hopping", params, np.linspace(200, 350, 6), biases_V,
                   device), device


def test_low_field_hopping_leaves_the_hop_distance_undetermined() -> None:
    # E_a = 0.2 eV, d = 50 nm, V <= 0.05 V: e a E <= 1 nm x 0.05 V/50 nm = 1 meV against
    # 2 k T >= 34 meV, so e a E/(2 k T) <= 0.03: the ohmic end of J ~ sinh(e a E/(2 k T))
    # (Mott & Davis 1979). A line through ln I vs V there read a = 97.6 nm (truth 1 nm),
    # failed the range check and direct tunnelling won.
    series, device = _hopping_series(0.2, np.linspace(0.005, 0.05, 10))
    result = linearise(series, device)
    hopping = result.for_mechanism("nearest_neighbour_hopping")
    assert not [line for line in hopping.lines if line.plot_id == "hopping_field_plot"]
    distance = [c for c in hopping.checks if c.name == "hopping_distance_nm_in_declared_range"]
    assert len(distance) == 1 and distance[0].passed is None
    assert "undetermined" in distance[0].detail
    assert "hopping_distance_nm" not in hopping.hints.values
    assert not [c.name for c in hopping.checks if c.passed is False]
    assert result.ranking[0] == "nearest_neighbour_hopping"


def test_high_field_hopping_reads_the_hop_distance_from_the_exponential_regime() -> None:
    # e a E/(2 k T) from 0.017 to 14.5 over 0.05-25 V at 200-350 K: only the points with
    # argument >= 3 belong to the straight line. Independent value: the slope of ln I vs V
    # there is e a/(2 k T d) up to coth(x) - 1 <= 0.5 %, so a is read to better than 0.5 %.
    series, device = _hopping_series(0.4, np.geomspace(0.05, 25.0, 30))
    hopping = linearise(series, device).for_mechanism("nearest_neighbour_hopping")
    lines = [line for line in hopping.lines if line.plot_id == "hopping_field_plot"]
    assert len(lines) == 6
    k_eV = constants.k / constants.e
    for line in lines:
        argument_at_lowest = line.x_min * 1.0 / (2 * k_eV * line.group_value * 50.0)
        assert argument_at_lowest >= 3.0 * 0.99
        assert line.quantities["hopping_distance_nm"] == pytest.approx(1.0, rel=5e-3)
    assert hopping.hints.values["hopping_distance_nm"] == pytest.approx(1.0, rel=5e-3)


@pytest.mark.parametrize(("declaration", "message"), [
    ({"estimates": (PlotEstimate("no_such_parameter", "toy_plot"),)}, "unknown parameter"),
    ({"estimates": (PlotEstimate("activation_energy_eV", "no_such_plot"),)}, "undeclared plot"),
    ({"checks": (StraightPlot("no_such_plot", 0.99),)}, "undeclared plot"),
    ({"checks": (ZeroFieldBarrier("toy_plot", "activation_energy_eV", "barrier_eV"),)},
     "undeclared parameter barrier_eV"),
])
def test_declarations_naming_unknown_plots_or_parameters_fail_at_import(
        declaration: dict, message: str) -> None:
    hopping = get_mechanism("nearest_neighbour_hopping")
    plot = dataclasses.replace(hopping.plots[0], id="toy_plot")
    with pytest.raises(ValueError, match=message):
        dataclasses.replace(hopping, id="toy", plots=(plot,),
                            **{"estimates": (), "checks": (), **declaration})


def test_a_plot_regime_needs_per_temperature_lines() -> None:
    field_plot = get_mechanism("nearest_neighbour_hopping").plots[1]
    assert field_plot.regime is not None
    with pytest.raises(ValueError, match="per_temperature"):
        dataclasses.replace(field_plot, grouping="per_voltage")


def test_dimensionless_values_are_printed_without_a_unit(
        results: dict[str, LinearisationResult]) -> None:
    # Issue 11: "median richardson_constant_ratio = 0.01912 1" read as a product with 1.
    dimensionless = {(m.id, p.name) for m in MECHANISMS for p in m.parameters
                     if p.unit == "1"}
    details = [check.detail for result in results.values() for entry in result.mechanisms
               for check in entry.checks
               if (entry.mechanism_id, check.name.removesuffix("_in_declared_range"))
               in dimensionless and check.value is not None]
    assert details, "no dimensionless range check was read from the regimes"
    for detail in details:
        assert not detail.endswith(" 1"), detail
        assert re.fullmatch(r"median \w+ = \S+", detail), detail
