"""A mechanism declared only here gets plots, checks, hints, a fit, JSON and report entries.

The toy is a thermally activated ohmic conductor, I = G0 V exp(-E_a/(k T)) (an Arrhenius
conductance; e.g. Mott & Davis 1979 for activated conduction). It is declared in this module
alone -- formula, parameters, one straightened plot, one check and its plot estimates -- and
registered with :func:`mechid.catalogue.temporarily_registered`; no other module of mechid is
touched. This is the contributor guide's "Adding a mechanism" as a test.
"""

from __future__ import annotations

import json
import warnings

import numpy as np
import pytest
from scipy import constants

from mechid.analysis import AnalysisSettings, run_analysis_full
from mechid.catalogue import get_mechanism, registered_mechanisms, temporarily_registered
from mechid.catalogue.base import (
    FloatArray,
    Mechanism,
    Parameter,
    StraightenedPlot,
    iv_magnitudes,
    positive_or_nan,
)
from mechid.catalogue.checks import Ohmic, PlotEstimate
from mechid.data import IVSeries
from mechid.device import Device
from mechid.errors import MechidWarning, UnknownMechanismError
from mechid.report import build_report_html
from mechid.results import to_plain_json
from mechid.screening import linearise

#: Boltzmann constant in eV/K, from scipy.constants (independent of mechid.constants).
K_EV = constants.k / constants.e
TRUTH = {"activation_energy_eV": 0.15, "prefactor_S": 1e-3}
TOY_ID = "toy_activated_ohmic"


def _toy_current(voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
                 activation_energy_eV: FloatArray, prefactor_S: FloatArray) -> FloatArray:
    """|I| = G0 |V| exp(-E_a/(k T)) in A."""
    return prefactor_S * voltage_V * np.exp(-activation_energy_eV / (K_EV * temperature_K))


def _arrhenius_transform(voltage_V: FloatArray, temperature_K: FloatArray,
                         current_A: FloatArray, device: Device) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I|/|V|)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i / v)


def _arrhenius_interpret(slope: float, intercept: float, voltage_V: float,
                         device: Device) -> dict[str, float]:
    """Slope -E_a/k, intercept ln G0."""
    return {"activation_energy_eV": float(-slope * K_EV), "prefactor_S": float(np.exp(intercept))}


TOY = Mechanism(
    id=TOY_ID,
    family="hopping",
    name="Activated ohmic conductor (toy)",
    formula="I = G0 V exp(-E_a/kT)",
    source="Arrhenius conductance; Mott & Davis (1979)",
    parameters=(
        Parameter("activation_energy_eV", "eV", "E_a", "activation energy", 0.01, 1.0, 0.2),
        Parameter("prefactor_S", "S", "G0", "conductance prefactor", 1e-9, 1e3, 1e-3,
                  log_scale=True),
    ),
    magnitude=_toy_current,
    plots=(StraightenedPlot("toy_arrhenius_plot", "Arrhenius plot of the conductance (toy)",
                            "1/T [1/K]", "ln(|I|/|V|) [ln(S)]", "per_voltage",
                            _arrhenius_transform, _arrhenius_interpret),),
    needs_area=False,
    estimates=(PlotEstimate("activation_energy_eV", "toy_arrhenius_plot"),
               PlotEstimate("prefactor_S", "toy_arrhenius_plot")),
    checks=(Ohmic(),),
)


def _series() -> IVSeries:
    """5 temperatures x 24 biases of toy data with 1 % Gaussian noise (fixed seed)."""
    temperatures = np.linspace(200.0, 360.0, 5)
    biases = np.geomspace(0.02, 1.0, 12)
    t, v = (a.ravel() for a in np.meshgrid(temperatures, np.r_[-biases[::-1], biases],
                                           indexing="ij"))
    clean = np.sign(v) * _toy_current(np.abs(v), t, Device(), **TRUTH)
    noise = 1.0 + 0.01 * np.random.default_rng(3).standard_normal(v.size)
    return IVSeries(temperature_K=t, voltage_V=v, current_A=clean * noise)


def test_registration_is_temporary() -> None:
    with temporarily_registered(TOY):
        assert get_mechanism(TOY_ID) is TOY
        assert registered_mechanisms()[-1] is TOY
        with pytest.raises(ValueError, match=TOY_ID), temporarily_registered(TOY):
            pass
    with pytest.raises(UnknownMechanismError):
        get_mechanism(TOY_ID)
    assert TOY not in registered_mechanisms()


def test_toy_is_screened_with_its_plot_check_and_hints() -> None:
    with temporarily_registered(TOY):
        result = linearise(_series(), Device())
    toy = result.for_mechanism(TOY_ID)
    assert {line.plot_id for line in toy.lines} == {"toy_arrhenius_plot"}
    assert len(toy.lines) == 4  # the default four common biases
    ohmic = [c for c in toy.checks if c.name == "ohmic"]
    assert len(ohmic) == 1 and ohmic[0].passed is True
    # Independent values: the truth the data were made with (1 % noise on 5 temperatures).
    assert toy.hints.values["activation_energy_eV"] == pytest.approx(0.15, rel=0.02)
    assert toy.hints.values["prefactor_S"] == pytest.approx(1e-3, rel=0.1)
    assert TOY_ID in result.ranking


def test_toy_is_fitted_serialised_and_reported() -> None:
    settings = AnalysisSettings(mechanisms=(TOY_ID, "mott_vrh"), quick=True, workers=1)
    with temporarily_registered(TOY), warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)  # short quick chains may warn
        run = run_analysis_full(_series(), Device(), settings, seed=0)
        html = build_report_html(run)
    result = run.result
    assert result.verdict is not None and result.verdict.id == TOY_ID
    toy = result.mechanism(TOY_ID)
    assert np.isfinite(toy.log_evidence) and 0 < toy.log_evidence_err < 1
    low, high = toy.parameters["activation_energy_eV"].ci95
    assert low <= TRUTH["activation_energy_eV"] <= high
    data = json.loads(json.dumps(to_plain_json(result)))
    assert TOY_ID in [m["id"] for m in data["mechanisms"]]
    assert TOY_ID in [m["mechanism_id"] for m in data["linearisation"]["mechanisms"]]
    assert TOY.name in html and "Arrhenius plot of the conductance (toy)" in html
