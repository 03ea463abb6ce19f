"""A nested law beaten by the law that contains it is searched again (analysis step).

Seen (diode_study.py, seed 20261216, case 16): homogeneous diode data on which the plain
diode's quick search stalled ~35 nats low, so the inhomogeneous and the 2D diode led it; a
second search of the plain diode from fresh prior draws found its mode.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from mechid.analysis import AnalysisSettings, _refit_beaten_nested_laws
from mechid.catalogue import get_mechanism
from mechid.catalogue.base import ParameterHints
from mechid.data import IVSeries
from mechid.device import Device
from mechid.inference.fit import fit_mechanism
from mechid.inference.nesting import best_found
from mechid.inference.noise_choice import as_requested
from mechid.inference.settings import QUICK_SEARCH, SearchSettings
from mechid.simulate import simulate_series

SHORT = {"n_temperatures": 4, "n_burn": 30, "n_production": 40, "max_production": 40,
         "n_walkers": 20, "extension_steps": 10}
TRUTH = {"barrier_height_eV": 0.8, "ideality_factor": 1.1, "richardson_constant_A_cm2_K2": 50.0,
         "series_resistance_ohm": 100.0, "shunt_resistance_ohm": 1e10}
#: A search that cannot find the mode: one prior draw and one polish from a far-off start.
STALLED = SearchSettings(n_screen=1, n_polish=1, pilot_steps=40, pilot_max_steps=40)
FAR = {"barrier_height_eV": 1.9, "ideality_factor": 2.9, "richardson_constant_A_cm2_K2": 1e-3,
       "series_resistance_ohm": 1e7, "shunt_resistance_ohm": 1e3}


@pytest.fixture(scope="module")
def diode():
    device = Device(area_cm2=1e-3)
    volts = np.round(np.linspace(-1.0, 0.8, 19), 6)
    sim = simulate_series(get_mechanism("schottky_diode"), TRUTH, [200.0, 250.0, 300.0, 350.0],
                          volts[volts != 0], device, noise_relative=0.01, noise_floor_A=1e-13,
                          rng=np.random.default_rng(4))
    series = IVSeries(sim.temperature_K, sim.voltage_V, sim.current_A)
    settings = AnalysisSettings(quick=True, workers=1, ladder_overrides=SHORT)

    def fit(mechanism_id, search, hints=None):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return fit_mechanism(get_mechanism(mechanism_id), series.voltage_V,
                                 series.temperature_K, series.current_A, device,
                                 settings.ladder(), np.random.default_rng(5), hints,
                                 search=search)

    stalled = fit("schottky_diode", STALLED, ParameterHints("schottky_diode", FAR, {}))
    container = fit("inhomogeneous_schottky_diode", QUICK_SEARCH,
                    ParameterHints("inhomogeneous_schottky_diode",
                                   {"mean_barrier_height_eV": 0.8, "barrier_variance_V2": 0.0,
                                    "voltage_coefficient_rho2": 1 - 1 / 1.1,
                                    "voltage_coefficient_rho3_V": 0.0,
                                    "richardson_constant_A_cm2_K2": 50.0,
                                    "series_resistance_ohm": 100.0,
                                    "shunt_resistance_ohm": 1e10}, {}))
    return series, device, settings, stalled, container


def test_a_stalled_nested_law_beaten_by_its_container_is_fitted_again(diode):
    series, device, settings, stalled, container = diode
    assert container.evidence.log_evidence > stalled.evidence.log_evidence  # the premise
    fits = {"schottky_diode": stalled, "inhomogeneous_schottky_diode": container}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        notes = _refit_beaten_nested_laws(fits, series, np.ones(series.voltage_V.size, bool),
                                          device, settings, np.random.default_rng(6), None,
                                          as_requested("gaussian"))
    assert len(notes) == 1 and notes[0].startswith("schottky_diode's first search stalled")
    assert best_found(fits["schottky_diode"]) > best_found(stalled) + 5
    assert fits["inhomogeneous_schottky_diode"] is container
    # the plain law, now found, is back ahead of (or level with) the law containing it
    assert (fits["schottky_diode"].evidence.log_evidence
            > container.evidence.log_evidence - 3.0)
