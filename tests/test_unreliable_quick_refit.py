"""A quick fit whose evidence its sampler flags as unreliable, near the top, is fitted again.

Seen (composite_study.py, seed 20261212, case 6): Poole-Frenkel with an ohmic leak at the edge
of visibility; the quick ladder gave the composite ln Z 6903 (flagged: evidence methods
disagree, ladder too coarse, low swap rate) against 6987 from the full settings, and the
verdict went to Poole-Frenkel alone by ln B 60 instead of to the composite by 24.
"""

from __future__ import annotations

import warnings
from dataclasses import replace

import numpy as np
import pytest

from mechid.analysis import (
    UNRELIABLE_QUICK_MARGIN,
    AnalysisSettings,
    _refit_unreliable_quick_evidences,
)
from mechid.catalogue import get_mechanism
from mechid.data import IVSeries
from mechid.device import device_from_values
from mechid.inference.flags import SamplerFlag
from mechid.inference.noise_choice import as_requested
from mechid.inference.rounds import FitJob, fit_in_rounds
from mechid.simulate import simulate_series

SHORT = {"n_temperatures": 4, "n_burn": 30, "n_production": 40, "max_production": 40,
         "n_walkers": 16, "extension_steps": 10}


@pytest.fixture(scope="module")
def fitted():
    device = device_from_values(thickness_nm=30.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0,
                                optical_dielectric_constant_sd=0.4)
    sim = simulate_series(get_mechanism("poole_frenkel"),
                          {"trap_depth_eV": 1.2, "dielectric_constant": 4.2,
                           "prefactor_S_per_cm": 1.0, "thickness_nm": 30.0},
                          [300.0, 375.0, 450.0], np.geomspace(3.0, 12.0, 12), device,
                          noise_relative=0.02, noise_floor_A=1e-14,
                          rng=np.random.default_rng(1))
    series = IVSeries(sim.temperature_K, sim.voltage_V, sim.current_A)
    settings = AnalysisSettings(quick=True, workers=1, ladder_overrides=SHORT)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        fits = fit_in_rounds([FitJob("poole_frenkel", np.random.default_rng(2)),
                              FitJob("schottky_emission", np.random.default_rng(3))],
                             series.voltage_V, series.temperature_K, series.current_A, device,
                             settings.ladder(), settings.search())
    return series, device, settings, fits


def _flagged(fit):
    evidence = replace(fit.evidence, flags=(*fit.evidence.flags,
                                            SamplerFlag.EVIDENCE_METHODS_DISAGREE))
    return replace(fit, evidence=evidence)


def _refit(fits, series, device, settings):
    mask = np.ones(series.voltage_V.size, dtype=bool)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return _refit_unreliable_quick_evidences(fits, series, mask, device, settings,
                                                 np.random.default_rng(9), None,
                                                 as_requested("gaussian"))


def test_a_flagged_fit_near_the_leader_is_fitted_again_with_the_full_search(fitted):
    series, device, settings, fits = fitted
    fits = {**fits, "poole_frenkel": _flagged(fits["poole_frenkel"])}
    before = fits["poole_frenkel"]
    notes = _refit(fits, series, device, settings)
    assert len(notes) == 1 and notes[0].startswith("poole_frenkel's quick evidence")
    assert "evidence_methods_disagree" in notes[0]
    assert fits["poole_frenkel"] is not before
    assert SamplerFlag.EVIDENCE_METHODS_DISAGREE not in fits["poole_frenkel"].evidence.flags
    assert fits["schottky_emission"] is fitted[3]["schottky_emission"]  # not flagged: kept


def test_flags_far_below_the_leader_or_a_full_run_change_nothing(fitted):
    series, device, settings, fits = fitted
    gap = (fits["poole_frenkel"].evidence.log_evidence
           - fits["schottky_emission"].evidence.log_evidence)
    far = {**fits, "schottky_emission": _flagged(fits["schottky_emission"])}
    assert gap > UNRELIABLE_QUICK_MARGIN  # Schottky emission lies far below on these data
    assert _refit(far, series, device, settings) == []
    near = {**fits, "poole_frenkel": _flagged(fits["poole_frenkel"])}
    assert _refit(near, series, device, replace(settings, quick=False)) == []
