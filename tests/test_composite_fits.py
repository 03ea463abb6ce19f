"""Composites in the analysis: fitted after their parts, from their parts' best fits.

Integration checks on simulated series (the catalogue's own formulas, 2 % noise): the
composite must win on data with a visible leak and must not win on single-path data (Occam's
factor of the window condition, see :mod:`mechid.catalogue.composite`). The rates over many
truths are measured in ``benchmarks/composite_study.py``; these two series only guard the
wiring.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

import mechid
from mechid.catalogue import get_mechanism
from mechid.device import Device, Measured
from mechid.inference.path_start import part_hints, top_of_sweep
from mechid.simulate import simulate_series

DEVICE = Device(area_cm2=1e-4, thickness_nm=Measured(30.0, 1.0),
                optical_dielectric_constant=Measured(4.0, 0.4))
TEMPERATURES_K = (300.0, 350.0, 400.0, 450.0)
BIAS_V = np.concatenate([-np.geomspace(1.0, 12.0, 14)[::-1], np.geomspace(1.0, 12.0, 14)])
PF_TRUTH = {"trap_depth_eV": 1.2, "dielectric_constant": 4.2, "prefactor_S_per_cm": 1.0,
            "thickness_nm": 30.0}
CANDIDATES = ["poole_frenkel", "ohmic_activated", "poole_frenkel_with_leak"]


def _analyse(mechanism_id: str, truth: dict[str, float], seed: int) -> mechid.Analysis:
    series = simulate_series(get_mechanism(mechanism_id), truth, TEMPERATURES_K, BIAS_V, DEVICE,
                             noise_relative=0.02, noise_floor_A=1e-14,
                             rng=np.random.default_rng(seed))
    data = {"temperature_K": series.temperature_K, "voltage_V": series.voltage_V,
            "current_A": series.current_A}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return mechid.analyse(data, device=DEVICE, mechanisms=CANDIDATES, quick=True,
                              workers=1, seed=seed)


@pytest.fixture(scope="module")
def mixture() -> mechid.Analysis:
    # The leak (0.3 eV, 1e-5 S) carries the lowest biases, Poole-Frenkel the top ones.
    truth = {**PF_TRUTH, "leak_activation_energy_eV": 0.3, "leak_prefactor_S": 1e-5}
    return _analyse("poole_frenkel_with_leak", truth, seed=3)


def test_a_visible_leak_makes_the_composite_lead_and_its_parts_are_recovered(mixture):
    ranked = mixture.result.mechanisms
    assert ranked[0].id == "poole_frenkel_with_leak"
    assert ranked[0].log_evidence - ranked[1].log_evidence > 10.0
    draws = ranked[0].draws
    for name, true in (("trap_depth_eV", 1.2), ("leak_activation_energy_eV", 0.3)):
        low, high = np.quantile(draws[name], [0.001, 0.999])
        assert low < true < high, name


def test_single_path_data_do_not_make_the_composite_lead():
    ranked = _analyse("poole_frenkel", PF_TRUTH, seed=4).result.mechanisms
    by_id = {r.id: r for r in ranked}
    assert ranked[0].id == "poole_frenkel"
    assert by_id["poole_frenkel_with_leak"].log_evidence < by_id["poole_frenkel"].log_evidence


def test_part_hints_carry_each_parts_best_fit_under_the_composites_names(mixture):
    composite = get_mechanism("poole_frenkel_with_leak")
    hints = part_hints(composite, mixture.run.fits)
    assert [set(h.values) for h in hints] == [
        set(get_mechanism("poole_frenkel").parameter_names), set(composite.parameter_names)]
    assert hints[1].sources["leak_prefactor_S"] == "best fit of ohmic_activated"
    assert part_hints(get_mechanism("poole_frenkel"), mixture.run.fits) == ()


def test_the_leak_fitted_to_the_excess_over_the_main_fit_lands_near_the_true_leak(mixture):
    # The data's excess over Poole-Frenkel's best fit is the leak where it shows (low bias,
    # cold): the leak's own fit there starts the composite next to its true parameters.
    from mechid.inference.settings import QUICK_SEARCH

    composite = get_mechanism("poole_frenkel_with_leak")
    hints = part_hints(composite, mixture.run.fits, QUICK_SEARCH, np.random.default_rng(0))
    assert len(hints) == 4
    leak = hints[2].values
    assert leak["leak_activation_energy_eV"] == pytest.approx(0.3, abs=0.05)
    assert leak["leak_prefactor_S"] == pytest.approx(1e-5, rel=1.0)
    assert "excess" in hints[2].sources["leak_prefactor_S"]


def test_the_main_path_fitted_to_the_top_of_each_sweep_starts_both_paths_near_the_truth(mixture):
    # The fourth start: Poole-Frenkel fitted where it leads (the top third of each sweep),
    # then the leak fitted to the excess over that fit.
    from mechid.inference.settings import QUICK_SEARCH

    composite = get_mechanism("poole_frenkel_with_leak")
    start = part_hints(composite, mixture.run.fits, QUICK_SEARCH, np.random.default_rng(0))[3]
    assert start.values["trap_depth_eV"] == pytest.approx(1.2, abs=0.05)
    assert start.values["leak_activation_energy_eV"] == pytest.approx(0.3, abs=0.05)
    assert start.values["leak_prefactor_S"] == pytest.approx(1e-5, rel=1.0)
    assert "top of each sweep" in start.sources["trap_depth_eV"]


def test_top_of_sweep_keeps_the_highest_third_of_each_temperatures_biases():
    voltage = np.tile(np.r_[-np.arange(1.0, 7.0)[::-1], 0.0, np.arange(1.0, 7.0)], 2)
    temperature = np.repeat([300.0, 400.0], 13)
    keep = top_of_sweep(voltage, temperature)
    # |V| quantile 2/3 of {6..1, 0, 1..6} is 4.0: |V| 4, 5, 6 of both signs, at each T.
    assert keep.sum() == 12
    assert set(np.abs(voltage[keep])) == {4.0, 5.0, 6.0}
    assert not keep[voltage == 0].any()


def test_main_path_restart_starts_from_the_composites_main_values_only_when_it_pays(mixture):
    # The reverse hand-off: the main path is searched again from the composite's main-path
    # values; its start is returned only if that search beats the main fit by the margin.
    from mechid.inference.path_start import best_values, main_path_restart
    from mechid.inference.settings import QUICK_SEARCH

    fits = mixture.run.fits
    composite, main = fits["poole_frenkel_with_leak"], fits["poole_frenkel"]
    never = main_path_restart(composite, main, QUICK_SEARCH, np.random.default_rng(0), 1e9)
    assert never is None
    start = main_path_restart(composite, main, QUICK_SEARCH, np.random.default_rng(0), -1e9)
    assert start is not None and start.mechanism_id == "poole_frenkel"
    expected = {k: v for k, v in best_values(composite).items()
                if k in get_mechanism("poole_frenkel").parameter_names}
    assert start.values == expected
    assert set(start.sources.values()) == {"best fit of poole_frenkel_with_leak"}
