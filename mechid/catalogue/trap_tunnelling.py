"""Trap-assisted tunnelling and Fowler-Nordheim tunnelling with the image-force correction.

Every formula the declarations use is a public function of this module (or, for the
Forbes barrier functions, of :mod:`mechid.catalogue.tunnelling`, imported, not copied):

* :func:`trap_assisted_tunnelling_current_density_A_per_cm2` -- ``J = C exp(-b sqrt(m*)
  phi_t^(3/2)/E)`` (Houng, Wang & Chang 1999)
* :func:`dielectric_scaled_barrier_field` -- Forbes' ``f`` with the image force screened by
  the film's optical permittivity
* :func:`image_force_fowler_nordheim_current_density_A_per_m2` -- the Murphy-Good FN-type
  equation with Forbes' (2006) ``v(f)`` and ``t(f)``

:data:`TRAP_ASSISTED_TUNNELLING` and :data:`FOWLER_NORDHEIM_IMAGE_FORCE` are registered in the
catalogue. The screening cannot tell the image-force law from ``fowler_nordheim``: on a
simulated image-rounded series (phi = 1.1 eV, eps_r = 3.1, f up to 0.36) both score 3.907 (the
same Fowler-Nordheim plot, straight for both, and the same kinds of checks). The Bayesian fit
can (quick, whole FN scenario grid, four series each; not a calibration): on image-rounded
data with the optical permittivity given (2.1 +- 0.2) the image-force law won by ln B 302-338;
on plain Fowler-Nordheim data without it, plain FN won by 3.3-21.
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
)
from mechid.catalogue.checks import (
    NearlyTemperatureIndependent,
    PlotEstimate,
    QuantityInRange,
    StraightPlot,
)
from mechid.catalogue.tunnelling import (  # one declaration of thickness and mass
    _MASS,
    _thickness,
    forbes_t,
    forbes_v,
    fowler_nordheim_slope_V_per_nm,
    fowler_nordheim_transform,
    murphy_good_thermal_coefficient,
    murphy_good_thermal_factor,
)
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import BOLTZMANN_EV, FN_A_A_EV_PER_V2, FN_B_EV32_V_PER_NM
from mechid.device import Device, Measured

_A_PER_M2_TO_A_PER_CM2 = 1e-4
_PER_NM2_TO_PER_M2 = 1e18
#: e^3/(4 pi eps0) in eV^2 nm/V: Forbes' f = this x F/phi^2 (F in V/nm).
_SCHOTTKY_CONSTANT_EV2_NM_PER_V = 1.439964547842567


# --------------------------------------------------------------------------------------
# Trap-assisted tunnelling
# --------------------------------------------------------------------------------------


def trap_assisted_tunnelling_current_density_A_per_cm2(
    field_V_per_nm: ArrayLike, trap_energy_eV: ArrayLike, effective_mass_ratio: ArrayLike,
    prefactor_A_per_cm2: ArrayLike,
) -> FloatArray:
    """Trap-assisted tunnelling current density ``C exp(-b sqrt(m*/m0) phi_t^(3/2)/E)``.

    Parameters
    ----------
    field_V_per_nm : array_like
        Field in the insulator in V/nm.
    trap_energy_eV : array_like
        Energy ``phi_t`` of the trap below the insulator conduction band, in eV.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.
    prefactor_A_per_cm2 : array_like
        ``C`` in A/cm^2 (trap density, capture and emission rates; taken field independent).

    Returns
    -------
    ndarray
        Current density in A/cm^2.

    Notes
    -----
    The trap-limited step is the tunnelling of an electron from the trap through the
    triangular barrier of height ``phi_t``; in the closed form used for thin SiO2 and high-k
    leakage

    .. math::

        J = C \\exp\\Big(-\\frac{8\\pi\\sqrt{2 q m^*}\\,\\varphi_t^{3/2}}{3 h E}\\Big)

    (Houng, Wang & Chang, J. Appl. Phys. 86, 1488 (1999); reviewed by Chiu, Adv. Mater. Sci.
    Eng. 2014, 578168 (2014), trap-assisted tunnelling equation; both citations and the
    equation's form from memory, not checked against the papers). With ``phi_t`` in eV the
    exponent is ``b sqrt(m*/m0) phi_t^(3/2)/E`` with Forbes & Deane's second FN constant
    ``b``, the same constant as the Fowler-Nordheim exponent (checked in the tests). The
    elastic form has no temperature dependence.
    """
    exponent = fowler_nordheim_slope_V_per_nm(trap_energy_eV, effective_mass_ratio) / (
        np.asarray(field_V_per_nm, dtype=float))
    return np.asarray(prefactor_A_per_cm2, dtype=float) * np.exp(-exponent)


def _tat_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_energy_eV: FloatArray, prefactor_A_per_cm2: FloatArray, thickness_nm: FloatArray,
    effective_mass_ratio: FloatArray,
) -> FloatArray:
    """|I| in A of trap-assisted tunnelling at ``E = |V|/d``."""
    density = trap_assisted_tunnelling_current_density_A_per_cm2(
        voltage_V / thickness_nm, trap_energy_eV, effective_mass_ratio, prefactor_A_per_cm2)
    return density * device.require_area() + 0.0 * temperature_K


def _bias_over_trap_energy(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_energy_eV: FloatArray, **params: FloatArray,
) -> FloatArray:
    """``eV/phi_t``: at or above 1 the barrier seen from the trap is triangular."""
    return voltage_V / trap_energy_eV


def _known(value: Measured | None) -> float | None:
    return None if value is None else float(value.value)


def _tat_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/|V|, y = ln|I|: straight with slope ``-b sqrt(m*) phi_t^(3/2) d``."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return 1.0 / v, np.log(i)


def _energy_from_slope(slope: float, device: Device, key: str,
                       slope_factor: float = 1.0) -> dict[str, float]:
    """Energy from a slope ``-slope_factor b sqrt(m*) E^(3/2) d`` of ln(I...) against 1/V.

    Needs the device thickness (else empty); without a device mass, unit mass is assumed and
    the key says so (``<key>_assuming_unit_mass_eV``).
    """
    thickness = _known(device.thickness_nm)
    if thickness is None:
        return {}
    mass = _known(device.effective_mass_ratio)
    suffix = "eV" if mass is not None else "assuming_unit_mass_eV"
    mass = 1.0 if mass is None else mass
    product = -np.float64(slope) / (slope_factor * FN_B_EV32_V_PER_NM * np.sqrt(mass) * thickness)
    energy = product ** (2.0 / 3.0) if product > 0 else np.nan
    return {f"{key}_{suffix}": float(energy)}


def _tat_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Slope -> trap energy (needs the thickness; unit mass assumed when none is given)."""
    return _energy_from_slope(slope, device, "trap_energy")


TAT_PLOT = StraightenedPlot(
    id="trap_assisted_tunnelling_plot",
    title="Trap-assisted tunnelling plot (ln I against 1/V)",
    x_label="1/|V| [1/V]",
    y_label="ln|I| [ln(A)]",
    grouping="per_temperature",
    transform=_tat_transform,
    interpret=_tat_interpret,
)

_TRAP_BELOW_BIAS = ValidityCondition(
    id="triangular_trap_barrier",
    quantity="eV/phi_t (bias over trap energy)",
    limit=1.0,
    bound="lower",
    reason=(
        "the closed form integrates the WKB exponent over a triangular barrier from the trap "
        "to the band edge (Houng et al. 1999), which needs a voltage drop across the film "
        "larger than the trap depth"
    ),
    evaluate=_bias_over_trap_energy,
)



TRAP_ASSISTED_TUNNELLING = Mechanism(
    id="trap_assisted_tunnelling",
    family="tunnelling",
    name="Trap-assisted tunnelling",
    formula=(
        "J = C exp(-8 pi sqrt(2 q m*) phi_t^(3/2)/(3 h E)) = C exp(-b sqrt(m*/m0) phi_t^(3/2)/E);"
        "  E = V/d;  valid for eV >= phi_t"
    ),
    source=(
        "Houng, Wang & Chang, J. Appl. Phys. 86, 1488 (1999); review: Chiu, Adv. Mater. Sci. "
        "Eng. 2014, 578168 (2014)"
    ),
    parameters=(
        Parameter(
            name="trap_energy_eV", unit="eV", symbol="phi_t",
            description="trap energy below the insulator conduction band",
            lower=0.1, upper=3.0, typical=1.0, sample_in_log=True,
        ),
        Parameter(
            name="prefactor_A_per_cm2", unit="A/cm^2", symbol="C",
            description="trap-assisted tunnelling prefactor (trap density and rates)",
            lower=1e-12, upper=1e6, typical=1e-2, log_scale=True,
        ),
        _thickness(1.0, 100.0, 8.0),
        _MASS,
    ),
    magnitude=_tat_current,
    plots=(TAT_PLOT,),
    temperature_dependence="none (elastic tunnelling from the trap)",
    estimates=(PlotEstimate("trap_energy_eV", "trap_assisted_tunnelling_plot"),),
    checks=(
        NearlyTemperatureIndependent(),
        StraightPlot("trap_assisted_tunnelling_plot", 0.99),
        QuantityInRange("trap_assisted_tunnelling_plot",
                        ("trap_energy_eV", "trap_energy_assuming_unit_mass_eV"), 0.1, 3.0,
                        name="trap_energy_in_range", parameter="trap_energy_eV"),
    ),
    validity=(_TRAP_BELOW_BIAS,),
)


# --------------------------------------------------------------------------------------
# Fowler-Nordheim with the image-force (Schottky-Nordheim barrier) correction
# --------------------------------------------------------------------------------------


def dielectric_scaled_barrier_field(
    field_V_per_nm: ArrayLike, barrier_height_eV: ArrayLike, dielectric_constant: ArrayLike
) -> FloatArray:
    """Forbes' scaled barrier field ``f = e^3 F/(4 pi eps0 eps_r phi^2)`` inside a dielectric.

    Forbes, Appl. Phys. Lett. 89, 113122 (2006) defines ``f = (e^3/(4 pi eps0)) F/phi^2`` for
    emission into vacuum; in a film the image potential is screened by the optical (image-force)
    permittivity ``eps_r``, as in the Schottky lowering ``sqrt(e^3 F/(4 pi eps0 eps_r))`` (Sze &
    Ng 2007), which gives the ``1/eps_r`` here (our substitution, common practice). ``f = 1``
    removes the barrier.
    """
    phi = np.asarray(barrier_height_eV, dtype=float)
    return (_SCHOTTKY_CONSTANT_EV2_NM_PER_V * np.asarray(field_V_per_nm, dtype=float)
            / (np.asarray(dielectric_constant, dtype=float) * phi**2))


def image_force_fowler_nordheim_current_density_A_per_m2(
    field_V_per_nm: ArrayLike, barrier_height_eV: ArrayLike, effective_mass_ratio: ArrayLike,
    dielectric_constant: ArrayLike,
) -> FloatArray:
    """Murphy-Good FN-type current density with Forbes' ``v(f)``, ``t(f)``, T = 0.

    Parameters
    ----------
    field_V_per_nm : array_like
        Field in the film in V/nm.
    barrier_height_eV : array_like
        Zero-field barrier height ``phi`` in eV.
    effective_mass_ratio : array_like
        Tunnelling effective mass ``m*/m0``.
    dielectric_constant : array_like
        Image-force (optical) relative permittivity of the film.

    Returns
    -------
    ndarray
        ``J = (a/(phi t(f)^2)) (m0/m*) F^2 exp(-v(f) b sqrt(m*/m0) phi^(3/2)/F)`` in A/m^2:
        the Murphy & Good (Phys. Rev. 102, 1464 (1956)) FN-type equation for the
        Schottky-Nordheim barrier, ``v`` and ``t`` from Forbes' approximations (Appl. Phys.
        Lett. 89, 113122 (2006); :func:`~mechid.catalogue.tunnelling.forbes_v`,
        :func:`~mechid.catalogue.tunnelling.forbes_t`), the mass entering as in the
        Lenzlinger-Snow form of the catalogue's ``fowler_nordheim``. NaN where ``f > 1``
        (no barrier left).
    """
    field = np.asarray(field_V_per_nm, dtype=float)
    phi = np.asarray(barrier_height_eV, dtype=float)
    mass = np.asarray(effective_mass_ratio, dtype=float)
    f = dielectric_scaled_barrier_field(field, phi, dielectric_constant)
    exponent = -forbes_v(f) * fowler_nordheim_slope_V_per_nm(phi, mass) / field
    return (FN_A_A_EV_PER_V2 / (phi * mass * forbes_t(f) ** 2) * field**2 * np.exp(exponent)
            * _PER_NM2_TO_PER_M2)


def _image_force_fn_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
    dielectric_constant: FloatArray,
) -> FloatArray:
    """|I| in A: Murphy-Good density x Murphy-Good thermal factor (with t(f)) x area."""
    field = voltage_V / thickness_nm
    density = image_force_fowler_nordheim_current_density_A_per_m2(
        field, barrier_height_eV, effective_mass_ratio, dielectric_constant)
    t_value = forbes_t(dielectric_scaled_barrier_field(field, barrier_height_eV,
                                                       dielectric_constant))
    factor = murphy_good_thermal_factor(field, temperature_K, barrier_height_eV,
                                        effective_mass_ratio, t_value)
    return density * factor * _A_PER_M2_TO_A_PER_CM2 * device.require_area()


def _scaled_field(voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
                  barrier_height_eV: FloatArray, thickness_nm: FloatArray,
                  effective_mass_ratio: FloatArray, dielectric_constant: FloatArray) -> FloatArray:
    """Forbes' ``f`` at the field ``V/d``."""
    return dielectric_scaled_barrier_field(voltage_V / thickness_nm, barrier_height_eV,
                                           dielectric_constant)


def _bias_over_barrier(voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
                       barrier_height_eV: FloatArray, **params: FloatArray) -> FloatArray:
    """``eV/phi``: at or above 1 the barrier is triangular (Fowler-Nordheim regime)."""
    return voltage_V / barrier_height_eV


def _image_force_thermal_argument(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    barrier_height_eV: FloatArray, thickness_nm: FloatArray, effective_mass_ratio: FloatArray,
    dielectric_constant: FloatArray,
) -> FloatArray:
    """``pi c kT`` of the Murphy-Good thermal factor with ``t(f)``."""
    field = voltage_V / thickness_nm
    t_value = forbes_t(dielectric_scaled_barrier_field(field, barrier_height_eV,
                                                       dielectric_constant))
    c = murphy_good_thermal_coefficient(field, barrier_height_eV, effective_mass_ratio, t_value)
    return np.pi * c * BOLTZMANN_EV * temperature_K


IMAGE_FORCE_FN_VALIDITY = (
    ValidityCondition(
        id="barrier_left",
        quantity="f (scaled barrier field)",
        limit=1.0,
        bound="upper",
        reason=(
            "Forbes' v(f), t(f) (2006) describe the Schottky-Nordheim barrier for 0 <= f <= 1; "
            "at f = 1 the image force removes the barrier and tunnelling gives way to emission "
            "over it"
        ),
        evaluate=_scaled_field,
    ),
    ValidityCondition(
        id="triangular_barrier",
        quantity="eV/phi (bias over barrier height)",
        limit=1.0,
        bound="lower",
        reason=(
            "the Fowler-Nordheim-type equation assumes the barrier ends inside the film "
            "(triangular shape, bias above the barrier height)"
        ),
        evaluate=_bias_over_barrier,
    ),
    ValidityCondition(
        id="thermal_factor_argument",
        quantity="pi c kT (argument of the thermal factor x/sin x)",
        limit=1.0,
        bound="upper",
        reason=(
            "the Murphy & Good (1956) thermal factor expands the tunnelling exponent about the "
            "Fermi level and holds only while it is a small correction"
        ),
        evaluate=_image_force_thermal_argument,
    ),
)


#: Slope correction of the Schottky-Nordheim barrier taken for a starting value: Forbes'
#: s(f) = 1 - f/6 (2006) at a typical f ~ 0.3 (from memory).
_TYPICAL_SLOPE_CORRECTION = 0.95


def _mg_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Barrier from the FN slope ``-s b sqrt(m*) phi^(3/2) d`` with ``s = 0.95``.

    The slope correction function of the SN barrier is ``s(f) = 1 - f/6`` in Forbes' (2006)
    approximation; with ``s`` fixed at a typical value the barrier read here is a starting
    value for the fit, not a result.
    """
    return _energy_from_slope(slope, device, "barrier_height", _TYPICAL_SLOPE_CORRECTION)


IMAGE_FORCE_FN_PLOT = StraightenedPlot(
    id="image_force_fowler_nordheim_plot",
    title="Fowler-Nordheim plot read with the image-force slope correction",
    x_label="1/|V| [1/V]",
    y_label="ln(|I|/V^2) [ln(A/V^2)]",
    grouping="per_temperature",
    transform=fowler_nordheim_transform,
    interpret=_mg_interpret,
)

FOWLER_NORDHEIM_IMAGE_FORCE = Mechanism(
    id="fowler_nordheim_image_force",
    family="tunnelling",
    name="Fowler-Nordheim tunnelling with image-force rounding (Murphy-Good)",
    formula=(
        "J = (a/(phi t(f)^2))(m0/m*) E^2 exp(-v(f) b sqrt(m*/m0) phi^(3/2)/E) * x/sin(x);"
        "  f = e^3 E/(4 pi eps0 eps_r phi^2),  v(f) = 1 - f + (f/6) ln f,"
        "  t(f) = 1 + f/9 - (f/18) ln f;  valid for f <= 1, eV >= phi, x <= 1"
    ),
    source=(
        "Murphy & Good, Phys. Rev. 102, 1464 (1956); Forbes, Appl. Phys. Lett. 89, 113122 "
        "(2006); constants: Forbes & Deane, Proc. R. Soc. A 463, 2907 (2007)"
    ),
    parameters=(
        Parameter(
            name="barrier_height_eV", unit="eV", symbol="phi_B",
            description="zero-field barrier height (before image-force rounding)",
            lower=0.5, upper=5.0, typical=3.0, sample_in_log=True,
        ),
        _thickness(1.0, 100.0, 8.0),
        _MASS,
        Parameter(
            name="dielectric_constant", unit="1", symbol="eps_r",
            description="image-force (optical) relative permittivity of the film",
            lower=1.0, upper=30.0, typical=2.5, device_prior="optical_dielectric_constant",
            sample_in_log=True,
        ),
    ),
    magnitude=_image_force_fn_current,
    plots=(IMAGE_FORCE_FN_PLOT,),
    temperature_dependence="weak: rises slowly with temperature (pi c kT/sin(pi c kT) factor)",
    estimates=(PlotEstimate("barrier_height_eV", "image_force_fowler_nordheim_plot"),),
    checks=(
        NearlyTemperatureIndependent(),
        StraightPlot("image_force_fowler_nordheim_plot", 0.99),
        QuantityInRange("image_force_fowler_nordheim_plot",
                        ("barrier_height_eV", "barrier_height_assuming_unit_mass_eV"),
                        0.5, 5.0, name="image_force_barrier_in_range",
                        parameter="barrier_height_eV"),
    ),
    validity=IMAGE_FORCE_FN_VALIDITY,
)
