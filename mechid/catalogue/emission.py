"""Emission over a field-lowered barrier: Schottky (interface) and Poole-Frenkel (bulk traps).

Every formula the two declarations use is a public function of this module:

* :func:`schottky_barrier_lowering_eV`, :func:`poole_frenkel_barrier_lowering_eV`
* :func:`richardson_dushman_current_density_A_per_cm2`
* :func:`schottky_current_density_A_per_cm2` (one interface),
  :func:`schottky_mim_current_density_A_per_cm2` (net current through the film),
  :func:`poole_frenkel_current_density_A_per_cm2`
* :func:`field_slope_sqrt_m_per_V`, :func:`dielectric_constant_from_field_slope` -- the
  slope of ln J against sqrt(E) and its inversion to the (optical) dielectric constant

Units: fields in V/m, energies in eV, current densities in A/cm^2 (the unit in each name);
the declarations take the field as ``E = |V|/d`` and multiply by the electrode area.
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
from mechid.catalogue.checks import (
    CheckSpec,
    DielectricRange,
    DielectricVsOptical,
    FieldLoweringDielectric,
    PlotEstimate,
    RichardsonConstant,
    SlopeTimesTemperature,
    ThermallyActivated,
    ZeroFieldBarrier,
)
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import (
    BOLTZMANN_EV,
    POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V,
    RICHARDSON_A_CM2_K2,
    SCHOTTKY_BETA_EV_SQRT_M_PER_V,
)
from mechid.device import Device, Measured

_NM_TO_M = 1e-9
_V_PER_M_TO_V_PER_CM = 1e-2


def schottky_barrier_lowering_eV(
    field_V_per_m: ArrayLike, dielectric_constant: ArrayLike
) -> FloatArray:
    """Image-force barrier lowering ``beta_S sqrt(E/eps_r)`` in eV.

    Parameters
    ----------
    field_V_per_m : array_like
        Field at the interface in V/m.
    dielectric_constant : array_like
        Image-force (optical, high-frequency) relative permittivity ``eps_r``.

    Returns
    -------
    ndarray
        ``sqrt(e^3 E/(4 pi eps0 eps_r))`` in eV (Sze & Ng, Physics of Semiconductor Devices,
        3rd ed. 2007, metal-semiconductor contacts).
    """
    ratio = np.asarray(field_V_per_m, dtype=float) / np.asarray(dielectric_constant, dtype=float)
    return SCHOTTKY_BETA_EV_SQRT_M_PER_V * np.sqrt(ratio)


def poole_frenkel_barrier_lowering_eV(
    field_V_per_m: ArrayLike, dielectric_constant: ArrayLike
) -> FloatArray:
    """Poole-Frenkel trap-barrier lowering ``beta_PF sqrt(E/eps_r)``, ``beta_PF = 2 beta_S``.

    Parameters
    ----------
    field_V_per_m : array_like
        Field in the film in V/m.
    dielectric_constant : array_like
        Optical relative permittivity ``eps_r``.

    Returns
    -------
    ndarray
        ``sqrt(e^3 E/(pi eps0 eps_r))`` in eV, twice the Schottky lowering (Frenkel,
        Phys. Rev. 54, 647 (1938)). Checked: a textbook chapter on the Poole-Frenkel effect
        gives ``beta_PF = (e^3/(pi eps eps0))^1/2``, 4.40e-4 eV (cm/V)^1/2 at eps = 3 (this
        function: 4.3817e-4, within the 1 % the textbook rounds to).
    """
    ratio = np.asarray(field_V_per_m, dtype=float) / np.asarray(dielectric_constant, dtype=float)
    return POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V * np.sqrt(ratio)


def richardson_dushman_current_density_A_per_cm2(
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    richardson_constant_ratio: ArrayLike = 1.0,
) -> FloatArray:
    """Thermionic emission over a barrier without field lowering (Richardson-Dushman).

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    barrier_height_eV : array_like
        Barrier height in eV.
    richardson_constant_ratio : array_like, optional
        ``A*/A0`` (``m*/m0`` for an isotropic band).

    Returns
    -------
    ndarray
        ``J = A* T^2 exp(-phi_B/kT)`` in A/cm^2 with ``A0 = 4 pi m0 k^2 e/h^3``
        (120.17 A cm^-2 K^-2; Sze & Ng 2007).
    """
    t = np.asarray(temperature_K, dtype=float)
    exponent = -np.asarray(barrier_height_eV, dtype=float) / (BOLTZMANN_EV * t)
    return RICHARDSON_A_CM2_K2 * np.asarray(richardson_constant_ratio, dtype=float) * t**2 * np.exp(
        exponent
    )


def schottky_current_density_A_per_cm2(
    field_V_per_m: ArrayLike,
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    dielectric_constant: ArrayLike,
    richardson_constant_ratio: ArrayLike = 1.0,
) -> FloatArray:
    """Schottky emission: Richardson-Dushman current over the image-force-lowered barrier.

    Parameters
    ----------
    field_V_per_m : array_like
        Field at the interface in V/m.
    temperature_K : array_like
        Temperature in K.
    barrier_height_eV : array_like
        Zero-field barrier height ``phi_B`` in eV.
    dielectric_constant : array_like
        Optical relative permittivity ``eps_r``.
    richardson_constant_ratio : array_like, optional
        ``A*/A0``.

    Returns
    -------
    ndarray
        Current density in A/cm^2.

    Notes
    -----
    Sze & Ng 2007 (metal-semiconductor contacts; insulator conduction table):

    .. math::

        J = A^* T^2 \\exp\\Big(-\\frac{\\varphi_B - \\beta_S\\sqrt{E/\\varepsilon_r}}{kT}\\Big)

    The formula needs a barrier: where the lowering exceeds ``phi_B`` there is nothing left
    to emit over and the expression has no meaning. It is returned bare (no clipping); the
    declaration :data:`SCHOTTKY_EMISSION` refuses those points (``barrier_not_removed``).
    """
    lowering = schottky_barrier_lowering_eV(field_V_per_m, dielectric_constant)
    effective = np.asarray(barrier_height_eV, dtype=float) - lowering
    return richardson_dushman_current_density_A_per_cm2(
        temperature_K, effective, richardson_constant_ratio
    )


def schottky_mim_current_density_A_per_cm2(
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    barrier_height_eV: ArrayLike,
    dielectric_constant: ArrayLike,
    richardson_constant_ratio: ArrayLike,
    thickness_nm: ArrayLike,
) -> FloatArray:
    """Net Schottky emission through a symmetric metal-insulator-metal film.

    Parameters
    ----------
    voltage_V : array_like
        Bias magnitude in V (>= 0); the field is ``E = V/d``.
    temperature_K : array_like
        Temperature in K.
    barrier_height_eV, dielectric_constant, richardson_constant_ratio : array_like
        As in :func:`schottky_current_density_A_per_cm2`.
    thickness_nm : array_like
        Film thickness ``d`` in nm.

    Returns
    -------
    ndarray
        Current density in A/cm^2; zero at zero bias and linear in V there.

    Notes
    -----
    Both electrodes emit over the same field-lowered barrier; electrons from the biased-down
    electrode must in addition climb ``eV``, so the net current is the forward flux times
    ``1 - exp(-eV/kT)`` (the thermionic-emission balance of Sze & Ng, Physics of
    Semiconductor Devices, 3rd ed. 2007, metal-semiconductor contacts, written for a
    symmetric MIM structure as in Simmons, Phys. Rev. Lett. 15, 967 (1965), from memory):

    .. math::

        J = A^* T^2 \\exp\\Big(-\\frac{\\varphi_B - \\beta_S\\sqrt{E/\\varepsilon_r}}{kT}\\Big)
            \\Big[1 - \\exp\\Big(-\\frac{eV}{kT}\\Big)\\Big]

    For ``eV >> kT`` it is the one-sided formula; without the bracket the current would jump
    from ``-A* T^2 exp(-phi_B/kT)`` to ``+A* T^2 exp(-phi_B/kT)`` at zero bias.
    """
    v = np.asarray(voltage_V, dtype=float)
    field = v / (np.asarray(thickness_nm, dtype=float) * _NM_TO_M)
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    one_sided = schottky_current_density_A_per_cm2(
        field, temperature_K, barrier_height_eV, dielectric_constant, richardson_constant_ratio
    )
    return one_sided * -np.expm1(-v / kT)


def poole_frenkel_current_density_A_per_cm2(
    field_V_per_m: ArrayLike,
    temperature_K: ArrayLike,
    trap_depth_eV: ArrayLike,
    dielectric_constant: ArrayLike,
    prefactor_S_per_cm: ArrayLike,
) -> FloatArray:
    """Poole-Frenkel emission from bulk traps (ideality ``xi = 1``).

    Parameters
    ----------
    field_V_per_m : array_like
        Field in the film in V/m.
    temperature_K : array_like
        Temperature in K.
    trap_depth_eV : array_like
        Zero-field trap depth ``phi_T`` below the conduction band in eV.
    dielectric_constant : array_like
        Optical relative permittivity ``eps_r``.
    prefactor_S_per_cm : array_like
        ``sigma0 = e mu N_C`` in S/cm.

    Returns
    -------
    ndarray
        Current density in A/cm^2.

    Notes
    -----
    Frenkel, Phys. Rev. 54, 647 (1938); Sze & Ng 2007 (equation numbers not checked; the
    form ``J ∝ E exp(beta_PF sqrt(E)/kT)``, read on the ln(J/E) against sqrt(E) plot, is the
    one reviewed by Schroeder, J. Appl. Phys. 117, 215103 (2015), abstract checked):

    .. math::

        J = \\sigma_0 E \\exp\\Big(-\\frac{\\varphi_T - \\beta_{PF}\\sqrt{E/\\varepsilon_r}}{kT}
        \\Big),\\qquad \\beta_{PF} = 2\\beta_S

    Where the lowering exceeds the trap depth the trap no longer binds its electron and the
    expression has no meaning. It is returned bare (no clipping); the declaration
    :data:`POOLE_FRENKEL` refuses those points (``trap_not_emptied``).
    """
    field = np.asarray(field_V_per_m, dtype=float)
    lowering = poole_frenkel_barrier_lowering_eV(field, dielectric_constant)
    effective = np.asarray(trap_depth_eV, dtype=float) - lowering
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    conductivity = np.asarray(prefactor_S_per_cm, dtype=float) * np.exp(-effective / kT)
    return conductivity * field * _V_PER_M_TO_V_PER_CM


def field_slope_sqrt_m_per_V(
    temperature_K: ArrayLike, dielectric_constant: ArrayLike, coefficient_eV: float
) -> FloatArray:
    """Slope of ln J against sqrt(E), ``beta/(kT sqrt(eps_r))``, in (m/V)^1/2.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    dielectric_constant : array_like
        Relative permittivity ``eps_r``.
    coefficient_eV : float
        ``SCHOTTKY_BETA_EV_SQRT_M_PER_V`` (Schottky plot) or
        ``POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V`` (Poole-Frenkel plot), eV (m/V)^1/2.

    Returns
    -------
    ndarray
        The slope of the Schottky plot ln(J/T^2) or of the PF plot ln(J/E) against sqrt(E).
    """
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return coefficient_eV / (kT * np.sqrt(np.asarray(dielectric_constant, dtype=float)))


def dielectric_constant_from_field_slope(
    slope_sqrt_m_per_V: ArrayLike, temperature_K: ArrayLike, coefficient_eV: float
) -> FloatArray:
    """Invert :func:`field_slope_sqrt_m_per_V`: ``eps_r = (beta/(S kT))^2``.

    Parameters
    ----------
    slope_sqrt_m_per_V : array_like
        Slope ``S`` of ln J against sqrt(E), in (m/V)^1/2; NaN is returned for ``S <= 0``.
    temperature_K : array_like
        Temperature in K.
    coefficient_eV : float
        ``beta_S`` or ``beta_PF`` for eps_r = 1, eV (m/V)^1/2. The same slope read as
        Poole-Frenkel instead of Schottky gives exactly four times the permittivity.

    Returns
    -------
    ndarray
        ``eps_r`` (Sze & Ng 2007; the standard inversion of the Schottky / PF plot).
    """
    slope = positive_or_nan(slope_sqrt_m_per_V)
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return (coefficient_eV / (slope * kT)) ** 2


# --------------------------------------------------------------------------------------
# Magnitude formulas of the declarations
# --------------------------------------------------------------------------------------


def _schottky_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    barrier_height_eV: FloatArray,
    dielectric_constant: FloatArray,
    richardson_constant_ratio: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| in A of Schottky emission through the film (MIM form, E = |V|/d)."""
    density = schottky_mim_current_density_A_per_cm2(
        voltage_V, temperature_K, barrier_height_eV, dielectric_constant,
        richardson_constant_ratio, thickness_nm,
    )
    return density * device.require_area()


def _poole_frenkel_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    trap_depth_eV: FloatArray,
    dielectric_constant: FloatArray,
    prefactor_S_per_cm: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| in A of Poole-Frenkel emission with E = |V|/d."""
    field = voltage_V / (thickness_nm * _NM_TO_M)
    density = poole_frenkel_current_density_A_per_cm2(
        field, temperature_K, trap_depth_eV, dielectric_constant, prefactor_S_per_cm
    )
    return density * device.require_area()


# --------------------------------------------------------------------------------------
# Straightened plots
# --------------------------------------------------------------------------------------


def _known(value: Measured | None) -> float | None:
    return None if value is None else float(value.value)


def _schottky_plot_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = sqrt(|V|), y = ln(|I|/T^2)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return np.sqrt(v), np.log(i / t**2)


def _richardson_plot_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I|/T^2)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i / t**2)


def _poole_frenkel_plot_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = sqrt(|V|), y = ln(|I|/|V|)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return np.sqrt(v), np.log(i / v)


def _conductance_arrhenius_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I|/|V|)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i / v)


def _permittivity_from_sqrt_voltage_slope(
    slope: float, temperature_K: float, device: Device, coefficient_eV: float
) -> dict[str, float]:
    """eps_r from a slope against sqrt(|V|): the field slope is ``slope * sqrt(d)``."""
    thickness = _known(device.thickness_nm)
    if thickness is None:
        return {}
    field_slope = np.float64(slope) * np.sqrt(thickness * _NM_TO_M)
    eps = dielectric_constant_from_field_slope(field_slope, temperature_K, coefficient_eV)
    return {"dielectric_constant": float(eps)}


def _schottky_plot_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Slope ``beta_S/(kT sqrt(eps_r d))`` -> optical dielectric constant (needs thickness)."""
    return _permittivity_from_sqrt_voltage_slope(
        slope, temperature_K, device, SCHOTTKY_BETA_EV_SQRT_M_PER_V
    )


def _poole_frenkel_plot_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Slope ``beta_PF/(kT sqrt(eps_r d))`` -> optical dielectric constant (needs thickness)."""
    return _permittivity_from_sqrt_voltage_slope(
        slope, temperature_K, device, POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V
    )


def _richardson_plot_interpret(
    slope: float, intercept: float, voltage_V: float, device: Device
) -> dict[str, float]:
    """Slope ``-phi_eff/k`` -> effective barrier at this bias; intercept ``ln(A* area)``."""
    result = {"effective_barrier_eV": float(-np.float64(slope) * BOLTZMANN_EV)}
    if device.area_cm2 is not None:
        with np.errstate(over="ignore"):
            richardson = float(np.exp(np.float64(intercept)) / device.area_cm2)
        result["richardson_constant_A_per_cm2_K2"] = richardson
        result["richardson_constant_ratio"] = richardson / RICHARDSON_A_CM2_K2
    return result


def _poole_frenkel_arrhenius_interpret(
    slope: float, intercept: float, voltage_V: float, device: Device
) -> dict[str, float]:
    """Slope ``-E_a/k`` -> activation energy at this bias; intercept ``ln(sigma0 area/d)``."""
    result = {"activation_energy_eV": float(-np.float64(slope) * BOLTZMANN_EV)}
    thickness = _known(device.thickness_nm)
    if thickness is not None and device.area_cm2 is not None:
        with np.errstate(over="ignore"):
            prefactor = np.exp(np.float64(intercept)) * thickness * 1e-7 / device.area_cm2
        result["prefactor_S_per_cm"] = float(prefactor)
    return result


SCHOTTKY_PLOT = StraightenedPlot(
    id="schottky_plot",
    title="Schottky plot",
    x_label="sqrt(|V|) [V^1/2]",
    y_label="ln(|I|/T^2) [ln(A/K^2)]",
    grouping="per_temperature",
    transform=_schottky_plot_transform,
    interpret=_schottky_plot_interpret,
)

RICHARDSON_PLOT = StraightenedPlot(
    id="richardson_plot",
    title="Richardson plot",
    x_label="1/T [1/K]",
    y_label="ln(|I|/T^2) [ln(A/K^2)]",
    grouping="per_voltage",
    transform=_richardson_plot_transform,
    interpret=_richardson_plot_interpret,
)

POOLE_FRENKEL_PLOT = StraightenedPlot(
    id="poole_frenkel_plot",
    title="Poole-Frenkel plot",
    x_label="sqrt(|V|) [V^1/2]",
    y_label="ln(|I|/|V|) [ln(S)]",
    grouping="per_temperature",
    transform=_poole_frenkel_plot_transform,
    interpret=_poole_frenkel_plot_interpret,
)

POOLE_FRENKEL_ARRHENIUS_PLOT = StraightenedPlot(
    id="poole_frenkel_arrhenius_plot",
    title="Arrhenius plot of the conductance (Poole-Frenkel)",
    x_label="1/T [1/K]",
    y_label="ln(|I|/|V|) [ln(S)]",
    grouping="per_voltage",
    transform=_conductance_arrhenius_transform,
    interpret=_poole_frenkel_arrhenius_interpret,
)


# --------------------------------------------------------------------------------------
# Validity domains
# --------------------------------------------------------------------------------------


def _schottky_lowering_fraction(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, dielectric_constant: FloatArray,
    richardson_constant_ratio: FloatArray, thickness_nm: FloatArray,
) -> FloatArray:
    """Share of the barrier removed by the image force at ``E = V/d``."""
    field = voltage_V / (thickness_nm * _NM_TO_M)
    return schottky_barrier_lowering_eV(field, dielectric_constant) / barrier_height_eV


def _poole_frenkel_lowering_fraction(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_depth_eV: FloatArray, dielectric_constant: FloatArray,
    prefactor_S_per_cm: FloatArray, thickness_nm: FloatArray,
) -> FloatArray:
    """Share of the trap depth removed by the field at ``E = V/d``."""
    field = voltage_V / (thickness_nm * _NM_TO_M)
    return poole_frenkel_barrier_lowering_eV(field, dielectric_constant) / trap_depth_eV


#: Schottky emission holds while the image-force lowering leaves a barrier.
SCHOTTKY_EMISSION_VALIDITY = (
    ValidityCondition(
        id="barrier_not_removed",
        quantity="beta_S sqrt(E/eps_r)/phi_B (share of the barrier removed by the field)",
        limit=1.0,
        bound="upper",
        reason=(
            "Schottky emission is thermionic emission over the lowered barrier (Sze & Ng 2007); "
            "once the lowering exceeds the barrier there is no barrier left"
        ),
        evaluate=_schottky_lowering_fraction,
    ),
)

#: Poole-Frenkel emission holds while the lowered trap still binds its electron.
POOLE_FRENKEL_VALIDITY = (
    ValidityCondition(
        id="trap_not_emptied",
        quantity="beta_PF sqrt(E/eps_r)/phi_T (share of the trap depth removed by the field)",
        limit=1.0,
        bound="upper",
        reason=(
            "Poole-Frenkel emission is thermal emission over the field-lowered Coulomb barrier "
            "of a trap (Frenkel 1938); once the lowering exceeds the depth the trap is empty"
        ),
        evaluate=_poole_frenkel_lowering_fraction,
    ),
)


# --------------------------------------------------------------------------------------
# Declarations
# --------------------------------------------------------------------------------------

_DIELECTRIC = Parameter(
    name="dielectric_constant", unit="1", symbol="eps_r",
    description="optical (high-frequency) relative permittivity governing the barrier lowering",
    lower=1.0, upper=20.0, typical=4.0, device_prior="optical_dielectric_constant",
    sample_in_log=True,  # straightens the eps_r x d ridge of sqrt(V/(d eps_r))
)

_THICKNESS = Parameter(
    name="thickness_nm", unit="nm", symbol="d", description="film thickness (E = V/d)",
    lower=1.0, upper=1000.0, typical=20.0, device_prior="thickness_nm", sample_in_log=True,
)



def _field_lowering_checks(field_plot: str, arrhenius_plot: str, energy: str, barrier: str,
                           beta_eV: float, extra: tuple[CheckSpec, ...] = ()
                           ) -> tuple[CheckSpec, ...]:
    """Checks of a barrier lowered by sqrt(E/eps_r) (Sze & Ng 2007; Frenkel 1938).

    Activated; eps_r from the field slope physical and equal to n^2; slope x T constant;
    the per-bias activation ``energy`` of the ``arrhenius_plot`` extrapolated to zero field
    inside the ``barrier`` range; then ``extra``; then the two eps_r estimates agreeing
    (lowering coefficient ``beta_eV``).
    """
    return (
        ThermallyActivated(),
        DielectricRange(field_plot),
        DielectricVsOptical(field_plot),
        SlopeTimesTemperature(field_plot),
        ZeroFieldBarrier(arrhenius_plot, energy, barrier),
        *extra,
        FieldLoweringDielectric(arrhenius_plot, energy, field_plot, beta_eV),
    )


SCHOTTKY_EMISSION = Mechanism(
    id="schottky_emission",
    family="emission",
    name="Schottky emission",
    formula=(
        "J = A0 (A*/A0) T^2 exp(-(phi_B - beta_S sqrt(E/eps_r))/kT) [1 - exp(-eV/kT)];  E = V/d,"
        "  beta_S = sqrt(e^3/(4 pi eps0)),  A0 = 4 pi m0 k^2 e/h^3 = 120.17 A cm^-2 K^-2"
    ),
    source=(
        "Richardson-Dushman emission with Schottky image-force lowering; Sze & Ng, "
        "Physics of Semiconductor Devices, 3rd ed. (Wiley, 2007); net current of a symmetric "
        "MIM film: Simmons, Phys. Rev. Lett. 15, 967 (1965)"
    ),
    parameters=(
        Parameter(
            name="barrier_height_eV", unit="eV", symbol="phi_B",
            description="zero-field barrier height at the injecting interface",
            lower=0.05, upper=4.0, typical=0.8,
        ),
        _DIELECTRIC,
        Parameter(
            name="richardson_constant_ratio", unit="1", symbol="A*/A0",
            description="effective Richardson constant over the free-electron value",
            lower=1e-4, upper=10.0, typical=0.5, log_scale=True,
        ),
        _THICKNESS,
    ),
    magnitude=_schottky_current,
    plots=(SCHOTTKY_PLOT, RICHARDSON_PLOT),
    estimates=(
        PlotEstimate("dielectric_constant", "schottky_plot"),
        PlotEstimate("barrier_height_eV", "richardson_plot", "effective_barrier_eV",
                     zero_bias_power=0.5),
        PlotEstimate("richardson_constant_ratio", "richardson_plot"),
    ),
    checks=_field_lowering_checks(
        "schottky_plot", "richardson_plot", "effective_barrier_eV", "barrier_height_eV",
        SCHOTTKY_BETA_EV_SQRT_M_PER_V, extra=(RichardsonConstant("richardson_plot"),)),
    temperature_dependence="strong: activated, ln(I/T^2) linear in 1/T with slope -phi_eff/k",
    validity=SCHOTTKY_EMISSION_VALIDITY,
)

POOLE_FRENKEL = Mechanism(
    id="poole_frenkel",
    family="emission",
    name="Poole-Frenkel emission",
    formula=(
        "J = sigma0 E exp(-(phi_T - beta_PF sqrt(E/eps_r))/kT);  E = V/d,"
        "  beta_PF = 2 beta_S = sqrt(e^3/(pi eps0)),  sigma0 = e mu N_C"
    ),
    source="Frenkel, Phys. Rev. 54, 647 (1938); Sze & Ng, Physics of Semiconductor Devices, "
    "3rd ed. (Wiley, 2007)",
    parameters=(
        Parameter(
            name="trap_depth_eV", unit="eV", symbol="phi_T",
            description="zero-field depth of the emitting traps below the conduction band",
            lower=0.05, upper=3.0, typical=1.0,
        ),
        _DIELECTRIC,
        Parameter(
            name="prefactor_S_per_cm", unit="S/cm", symbol="sigma0",
            description="conductivity prefactor e mu N_C",
            lower=1e-9, upper=1e4, typical=1.0, log_scale=True,
        ),
        _THICKNESS,
    ),
    magnitude=_poole_frenkel_current,
    plots=(POOLE_FRENKEL_PLOT, POOLE_FRENKEL_ARRHENIUS_PLOT),
    estimates=(
        PlotEstimate("dielectric_constant", "poole_frenkel_plot"),
        PlotEstimate("trap_depth_eV", "poole_frenkel_arrhenius_plot", "activation_energy_eV",
                     zero_bias_power=0.5),
        PlotEstimate("prefactor_S_per_cm", "poole_frenkel_arrhenius_plot"),
    ),
    checks=_field_lowering_checks(
        "poole_frenkel_plot", "poole_frenkel_arrhenius_plot", "activation_energy_eV",
        "trap_depth_eV", POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V),
    temperature_dependence="strong: activated, ln(I/V) linear in 1/T with slope -E_a(E)/k",
    validity=POOLE_FRENKEL_VALIDITY,
)
