"""Ohmic conduction by thermally generated free carriers (an activated conductance).

Every formula the declaration uses is a public function of this module:

* :func:`activated_conductance_S` -- ``G = G0 exp(-E_a/kT)``
* :func:`ohmic_current_A` -- ``I = G V``

Why a conductance, not ``sigma0 A/d``: the geometric form ``I = (A/d) sigma0 exp(-E_a/kT) V``
(Sze & Ng 2007, ohmic conduction in insulators) has the single combination ``sigma0 A/d`` in
front of the exponential; ``sigma0`` and ``d`` cannot be told apart from I-V-T data, so the
declaration samples the conductance prefactor ``G0`` and a report converts it with the device
geometry (:func:`conductivity_prefactor_S_per_cm`).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from mechid.catalogue.base import (
    FloatArray,
    Mechanism,
    Parameter,
    StraightenedPlot,
    iv_magnitudes,
    positive_or_nan,
)
from mechid.catalogue.checks import Ohmic, PlotEstimate, StraightPlot, ThermallyActivated
from mechid.constants import BOLTZMANN_EV
from mechid.device import Device


def activated_conductance_S(
    temperature_K: ArrayLike, activation_energy_eV: ArrayLike, prefactor_S: ArrayLike
) -> FloatArray:
    """Conductance ``G = G0 exp(-E_a/kT)`` in S.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    activation_energy_eV : array_like
        ``E_a = E_C - E_F`` in eV (the energy to generate a free carrier).
    prefactor_S : array_like
        ``G0 = sigma0 A/d`` in S.

    Returns
    -------
    ndarray
        Conductance in S. Ohmic conduction in an insulator, ``J = sigma E`` with
        ``sigma = sigma0 exp(-E_a/kT)`` carried by thermally excited electrons
        ``n = N_C exp(-(E_C - E_F)/kT)`` (Sze & Ng, Physics of Semiconductor Devices, 3rd ed.
        2007, ch. 4, table of conduction processes in insulators, "ohmic conduction"; Chiu,
        Adv. Mater. Sci. Eng. 2014, 578168 (2014), eq. for ohmic conduction; equation
        numbers from memory). The temperature dependence of ``N_C`` and of the mobility is
        absorbed in ``G0`` (taken temperature independent).
    """
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return np.asarray(prefactor_S, dtype=float) * np.exp(
        -np.asarray(activation_energy_eV, dtype=float) / kT
    )


def ohmic_current_A(
    voltage_V: ArrayLike, temperature_K: ArrayLike, activation_energy_eV: ArrayLike,
    prefactor_S: ArrayLike,
) -> FloatArray:
    """Ohmic current ``I = G0 exp(-E_a/kT) V`` in A (see :func:`activated_conductance_S`)."""
    conductance = activated_conductance_S(temperature_K, activation_energy_eV, prefactor_S)
    return conductance * np.asarray(voltage_V, dtype=float)


def conductivity_prefactor_S_per_cm(
    prefactor_S: ArrayLike, thickness_nm: float, area_cm2: float
) -> FloatArray:
    """``sigma0 = G0 d/A`` in S/cm: the geometric form of the prefactor (Sze & Ng 2007)."""
    return np.asarray(prefactor_S, dtype=float) * thickness_nm * 1e-7 / area_cm2


def _ohmic_magnitude(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    activation_energy_eV: FloatArray,
    prefactor_S: FloatArray,
) -> FloatArray:
    """|I| in A of activated ohmic conduction (no area: written as a conductance)."""
    return ohmic_current_A(voltage_V, temperature_K, activation_energy_eV, prefactor_S)


def _ohmic_arrhenius_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I|/|V|): straight with slope ``-E_a/k`` for activated ohmic conduction."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i / v)


def _ohmic_arrhenius_interpret(
    slope: float, intercept: float, voltage_V: float, device: Device
) -> dict[str, float]:
    """Slope ``-E_a/k`` -> activation energy; intercept ``ln G0`` -> conductance prefactor."""
    with np.errstate(over="ignore"):
        prefactor = np.exp(np.float64(intercept))
    return {"activation_energy_eV": float(-np.float64(slope) * BOLTZMANN_EV),
            "prefactor_S": float(prefactor)}


OHMIC_ARRHENIUS_PLOT = StraightenedPlot(
    id="ohmic_arrhenius_plot",
    title="Arrhenius plot of the conductance (ln(I/V) against 1/T)",
    x_label="1/T [1/K]",
    y_label="ln(|I|/|V|) [ln(S)]",
    grouping="per_voltage",
    transform=_ohmic_arrhenius_transform,
    interpret=_ohmic_arrhenius_interpret,
)

OHMIC_ACTIVATED = Mechanism(
    id="ohmic_activated",
    family="ohmic",
    name="Ohmic conduction (thermally activated carriers)",
    formula="I = G0 exp(-E_a/kT) V;  G0 = sigma0 A/d,  E_a = E_C - E_F",
    source=(
        "Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (Wiley, 2007), ch. 4, conduction "
        "in insulators (ohmic conduction); Chiu, Adv. Mater. Sci. Eng. 2014, 578168 (2014)"
    ),
    parameters=(
        Parameter(
            name="activation_energy_eV", unit="eV", symbol="E_a",
            description="activation energy of the free-carrier density (E_C - E_F)",
            lower=0.005, upper=2.0, typical=0.3,
        ),
        Parameter(
            name="prefactor_S", unit="S", symbol="G0",
            description="conductance prefactor sigma0 A/d (high-temperature limit of I/V)",
            lower=1e-12, upper=1e6, typical=1e-2, log_scale=True,
        ),
    ),
    magnitude=_ohmic_magnitude,
    plots=(OHMIC_ARRHENIUS_PLOT,),
    temperature_dependence="activated: ln(I/V) linear in 1/T (slope -E_a/k), independent of V",
    needs_area=False,
    estimates=(
        PlotEstimate("activation_energy_eV", "ohmic_arrhenius_plot"),
        PlotEstimate("prefactor_S", "ohmic_arrhenius_plot"),
    ),
    # Not a HoppingLaw: the Zabrodskii analysis names its p = 1 law after nearest-neighbour
    # hopping, whose low-field limit is this Arrhenius law too.
    checks=(Ohmic(), ThermallyActivated(), StraightPlot("ohmic_arrhenius_plot", 0.999)),
)
