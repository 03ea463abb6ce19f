"""Space-charge-limited current (SCLC): Mott-Gurney with shallow traps, Mark-Helfrich traps.

Every formula the declarations use is a public function of this module:

* :func:`mott_gurney_current_density_A_per_m2` -- trap-free SCLC (Mott & Gurney 1940)
* :func:`shallow_trap_factor` -- Lampert's ``theta = (N_c/N_t) exp(-E_t/kT)`` (Lampert 1956)
* :func:`mark_helfrich_current_density_A_per_m2` -- exponential trap distribution
  (Mark & Helfrich 1962)
* :func:`trap_filled_limit_voltage_V` -- Lampert's ``V_TFL = e N_t d^2/(2 eps0 eps_r)``
* :func:`ohmic_to_sclc_crossover_voltage_V` -- where Mott-Gurney overtakes the ohmic current

Identifiability. With shallow traps the current is ``(9/8) eps0 eps_r mu theta V^2/d^3``:
``eps_r``, ``mu`` and ``N_c/N_t`` enter only as the product ``eps_r mu N_c/N_t``, so the
shallow-trap declaration samples that product as one parameter
(``permittivity_mobility_prefactor_cm2_per_Vs``); the trap depth ``E_t`` is identified by the
temperature dependence. In the Mark-Helfrich law ``mu N_c`` is one product and ``eps_r``,
``N_t`` and ``d`` enter as ``eps_r/(N_t d^2)`` and ``mu N_c/d``; the thickness comes from the
device description (Gaussian prior) and ``eps_r`` from the device's static permittivity when
given, otherwise only ``eps_r/N_t`` is determined (a straight ridge in log coordinates).

Trap-filled limit. Lampert's ohmic -> trap-limited -> trap-filled (steep rise) -> trap-free
sequence has published limits (``V_TFL``, the crossover voltage) but no single closed form
across the regimes that we could verify, so it is not a hypothesis here; the limits are
public functions and the log-log slope plot shows the regime (slope 1, 2, > 2).
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
from mechid.catalogue.checks import PlotEstimate, QuantityInRange, ThermallyActivated
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import BOLTZMANN_EV, ELEMENTARY_CHARGE, VACUUM_PERMITTIVITY
from mechid.device import Device, Measured

_NM_TO_M = 1e-9
_CM2_TO_M2 = 1e-4
_PER_CM3_TO_PER_M3 = 1e6
_PER_CM_TO_PER_M = 1e2

#: Smallest eV/kT at which the drift-only SCLC laws are used: Mott-Gurney and Mark-Helfrich
#: neglect diffusion, which is justified only for biases well above kT/e (common practice;
#: the factor 10 is our threshold).
DRIFT_ONLY_MIN_BIAS_KT = 10.0


def mott_gurney_current_density_A_per_m2(
    voltage_V: ArrayLike, thickness_nm: ArrayLike, dielectric_constant: ArrayLike,
    mobility_cm2_per_Vs: ArrayLike,
) -> FloatArray:
    """Trap-free space-charge-limited current density ``(9/8) eps0 eps_r mu V^2/d^3``.

    Parameters
    ----------
    voltage_V : array_like
        Bias in V.
    thickness_nm : array_like
        Film thickness ``d`` in nm.
    dielectric_constant : array_like
        Static relative permittivity ``eps_r``.
    mobility_cm2_per_Vs : array_like
        Carrier mobility in cm^2/(V s) (times ``theta`` for shallow traps).

    Returns
    -------
    ndarray
        Current density in A/m^2 (Mott & Gurney, Electronic Processes in Ionic Crystals,
        Oxford 1940; single carrier, ohmic injecting contact, no diffusion; Lampert, Phys.
        Rev. 103, 1648 (1956) for the shallow-trap factor; equation numbers not checked).
    """
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    mu_m2 = np.asarray(mobility_cm2_per_Vs, dtype=float) * _CM2_TO_M2
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    return 9.0 / 8.0 * eps * mu_m2 * np.asarray(voltage_V, dtype=float) ** 2 / d_m**3


def shallow_trap_factor(
    temperature_K: ArrayLike, trap_depth_eV: ArrayLike, band_to_trap_density_ratio: ArrayLike
) -> FloatArray:
    """Lampert's free-to-trapped ratio ``theta = (N_c/N_t) exp(-E_t/kT)`` (dimensionless).

    Lampert, Phys. Rev. 103, 1648 (1956) (from memory; also Lampert & Mark, Current
    Injection in Solids, 1970): the share of injected carriers that stay free when a single
    shallow trap level lies ``E_t`` below the band edge; valid while ``theta << 1``.
    """
    kT = BOLTZMANN_EV * np.asarray(temperature_K, dtype=float)
    return np.asarray(band_to_trap_density_ratio, dtype=float) * np.exp(
        -np.asarray(trap_depth_eV, dtype=float) / kT
    )


def mark_helfrich_current_density_A_per_m2(
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    thickness_nm: ArrayLike,
    dielectric_constant: ArrayLike,
    characteristic_trap_temperature_K: ArrayLike,
    trap_density_per_cm3: ArrayLike,
    mobility_band_density_per_V_s_cm: ArrayLike,
) -> FloatArray:
    """SCLC with an exponential trap distribution (Mark & Helfrich 1962).

    Parameters
    ----------
    voltage_V, temperature_K : array_like
        Bias in V and temperature in K.
    thickness_nm : array_like
        Film thickness ``d`` in nm.
    dielectric_constant : array_like
        Static relative permittivity ``eps_r``.
    characteristic_trap_temperature_K : array_like
        ``T_t`` of the trap distribution ``N(E) = (N_t/kT_t) exp(-E/kT_t)``.
    trap_density_per_cm3 : array_like
        Total trap density ``N_t`` in cm^-3.
    mobility_band_density_per_V_s_cm : array_like
        ``mu N_c`` in (cm^2/(V s)) cm^-3 = 1/(V s cm).

    Returns
    -------
    ndarray
        Current density in A/m^2.

    Notes
    -----
    Mark & Helfrich, J. Appl. Phys. 33, 205 (1962), with ``l = T_t/T``:

    .. math::

        J = e^{1-l} \\mu N_c \\Big(\\frac{\\varepsilon l}{N_t (l+1)}\\Big)^l
            \\Big(\\frac{2l+1}{l+1}\\Big)^{l+1} \\frac{V^{l+1}}{d^{2l+1}}

    (prefactor from memory, in the form widely reproduced; it could not be checked against
    the paper. It is dimensionally consistent -- A/m^2 for every l -- and for l -> 0 it tends
    to ``e mu N_c V/d``, the ohmic current of the band density, both checked in the tests).
    Evaluated in logarithms. The law needs ``l > 1`` (a trap tail broader than kT) and a bias
    below the trap-filled limit (:func:`trap_filled_limit_voltage_V`), where the bracket
    ``eps l V/(e N_t (l+1) d^2)`` stays below 1/2; the declaration refuses points with
    ``T > T_t`` or ``V > V_TFL``. Beyond ``V_TFL`` the formula grows without bound as
    ``(V/V_TFL)^l`` (it overflows at low T), which is why it is not used there.
    """
    t = np.asarray(temperature_K, dtype=float)
    ell = np.asarray(characteristic_trap_temperature_K, dtype=float) / t
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    n_t = np.asarray(trap_density_per_cm3, dtype=float) * _PER_CM3_TO_PER_M3
    mu_nc = np.asarray(mobility_band_density_per_V_s_cm, dtype=float) * _PER_CM_TO_PER_M
    v = np.asarray(voltage_V, dtype=float)
    log_j = (
        (1.0 - ell) * np.log(ELEMENTARY_CHARGE)
        + np.log(mu_nc)
        + ell * np.log(eps * ell / (n_t * (ell + 1.0)))
        + (ell + 1.0) * np.log((2.0 * ell + 1.0) / (ell + 1.0))
        + (ell + 1.0) * np.log(v)
        - (2.0 * ell + 1.0) * np.log(d_m)
    )
    return np.exp(log_j)


def trap_filled_limit_voltage_V(
    trap_density_per_cm3: ArrayLike, thickness_nm: ArrayLike, dielectric_constant: ArrayLike
) -> FloatArray:
    """Lampert's trap-filled-limit voltage ``V_TFL = e N_t d^2/(2 eps0 eps_r)`` in V.

    Lampert, Phys. Rev. 103, 1648 (1956) (from memory): the bias at which the injected charge
    fills a single trap level of density ``N_t``; the current then rises steeply to the
    trap-free Mott-Gurney law.
    """
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    n_t = np.asarray(trap_density_per_cm3, dtype=float) * _PER_CM3_TO_PER_M3
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    return ELEMENTARY_CHARGE * n_t * d_m**2 / (2.0 * eps)


def ohmic_to_sclc_crossover_voltage_V(
    free_carrier_density_per_cm3: ArrayLike, thickness_nm: ArrayLike,
    dielectric_constant: ArrayLike, shallow_trap_factor_value: ArrayLike = 1.0,
) -> FloatArray:
    """Bias where ``e n0 mu V/d`` equals the SCLC law: ``V_x = 8 e n0 d^2/(9 theta eps0 eps_r)``.

    Obtained by equating the ohmic current of the thermal free-carrier density ``n0`` with
    ``(9/8) eps0 eps_r theta mu V^2/d^3`` (Lampert 1956; Lampert & Mark 1970, from memory):
    below ``V_x`` the injected charge is smaller than the thermal one and the current is ohmic.
    """
    d_m = np.asarray(thickness_nm, dtype=float) * _NM_TO_M
    n0 = np.asarray(free_carrier_density_per_cm3, dtype=float) * _PER_CM3_TO_PER_M3
    eps = VACUUM_PERMITTIVITY * np.asarray(dielectric_constant, dtype=float)
    theta = np.asarray(shallow_trap_factor_value, dtype=float)
    return 8.0 * ELEMENTARY_CHARGE * n0 * d_m**2 / (9.0 * theta * eps)


# --------------------------------------------------------------------------------------
# Straightened plots
# --------------------------------------------------------------------------------------


def _log_log_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = ln|V|, y = ln|I|: a power law I ∝ V^m is a line of slope m."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return np.log(v), np.log(i)


def _sclc_log_log_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """The log-log slope ``d ln I/d ln V`` (2 for Mott-Gurney)."""
    return {"voltage_exponent": float(slope)}


def _mark_helfrich_log_log_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """Slope ``l + 1 = T_t/T + 1`` -> characteristic trap temperature ``T_t = (slope - 1) T``."""
    return {"voltage_exponent": float(slope),
            "characteristic_trap_temperature_K": float((np.float64(slope) - 1.0) * temperature_K)}


def _log_log_plot(plot_id: str, interpret) -> StraightenedPlot:  # noqa: ANN001
    return StraightenedPlot(
        id=plot_id,
        title="Log-log I-V plot (slope 1 ohmic, 2 space-charge-limited, > 2 trap-limited)",
        x_label="ln|V| [ln(V)]",
        y_label="ln|I| [ln(A)]",
        grouping="per_temperature",
        transform=_log_log_transform,
        interpret=interpret,
    )


def _known(value: Measured | None) -> float | None:
    return None if value is None else float(value.value)


def _sclc_arrhenius_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I|/V^2): straight with slope ``-E_t/k`` for shallow-trap SCLC."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i / v**2)


def _sclc_arrhenius_interpret(
    slope: float, intercept: float, voltage_V: float, device: Device
) -> dict[str, float]:
    """Slope -> trap depth; intercept -> ``eps_r mu N_c/N_t`` when thickness and area are known."""
    out = {"trap_depth_eV": float(-np.float64(slope) * BOLTZMANN_EV)}
    thickness = _known(device.thickness_nm)
    if thickness is not None and device.area_cm2 is not None:
        d_m = thickness * _NM_TO_M
        with np.errstate(over="ignore"):
            per_v2 = np.exp(np.float64(intercept)) / (device.area_cm2 * _CM2_TO_M2)
        product_m2 = per_v2 * d_m**3 / (9.0 / 8.0 * VACUUM_PERMITTIVITY)
        out["permittivity_mobility_prefactor_cm2_per_Vs"] = float(product_m2 / _CM2_TO_M2)
    return out


SCLC_LOG_LOG_PLOT = _log_log_plot("sclc_log_log_plot", _sclc_log_log_interpret)
MARK_HELFRICH_LOG_LOG_PLOT = _log_log_plot("mark_helfrich_log_log_plot",
                                           _mark_helfrich_log_log_interpret)
SCLC_ARRHENIUS_PLOT = StraightenedPlot(
    id="sclc_arrhenius_plot",
    title="Arrhenius plot of I/V^2 (shallow-trap space-charge-limited current)",
    x_label="1/T [1/K]",
    y_label="ln(|I|/V^2) [ln(A/V^2)]",
    grouping="per_voltage",
    transform=_sclc_arrhenius_transform,
    interpret=_sclc_arrhenius_interpret,
)


# --------------------------------------------------------------------------------------
# Magnitudes and validity
# --------------------------------------------------------------------------------------


def _shallow_trap_sclc_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_depth_eV: FloatArray, permittivity_mobility_prefactor_cm2_per_Vs: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| = (9/8) eps0 [eps_r mu N_c/N_t] exp(-E_t/kT) V^2/d^3 x area, in A."""
    effective = shallow_trap_factor(temperature_K, trap_depth_eV,
                                    permittivity_mobility_prefactor_cm2_per_Vs)
    density = mott_gurney_current_density_A_per_m2(voltage_V, thickness_nm, 1.0, effective)
    return density * _CM2_TO_M2 * device.require_area()


def _mark_helfrich_current(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    characteristic_trap_temperature_K: FloatArray, trap_density_per_cm3: FloatArray,
    dielectric_constant: FloatArray, mobility_band_density_per_V_s_cm: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| of the Mark-Helfrich law x area, in A."""
    density = mark_helfrich_current_density_A_per_m2(
        voltage_V, temperature_K, thickness_nm, dielectric_constant,
        characteristic_trap_temperature_K, trap_density_per_cm3, mobility_band_density_per_V_s_cm)
    return density * _CM2_TO_M2 * device.require_area()


def _bias_over_kT(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                  **params: FloatArray) -> FloatArray:
    """``eV/kT``: the drift-only SCLC laws neglect diffusion, which needs eV >> kT."""
    return voltage_V / (BOLTZMANN_EV * temperature_K)


def _trap_temperature_ratio(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                            *, characteristic_trap_temperature_K: FloatArray,
                            **params: FloatArray) -> FloatArray:
    """``l = T_t/T`` of the Mark-Helfrich law."""
    return characteristic_trap_temperature_K / temperature_K + 0.0 * voltage_V


def _bias_over_trap_filled_limit(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    trap_density_per_cm3: FloatArray, dielectric_constant: FloatArray, thickness_nm: FloatArray,
    **params: FloatArray,
) -> FloatArray:
    """``V/V_TFL``: the bias over Lampert's trap-filled-limit voltage."""
    return voltage_V / trap_filled_limit_voltage_V(trap_density_per_cm3, thickness_nm,
                                                   dielectric_constant)


_TRAPS_NOT_FILLED = ValidityCondition(
    id="below_trap_filled_limit",
    quantity="V/V_TFL (bias over the trap-filled-limit voltage e N_t d^2/(2 eps0 eps_r))",
    limit=1.0,
    bound="upper",
    reason=(
        "the Mark-Helfrich (1962) law assumes most injected charge sits in traps that are far "
        "from filled; at Lampert's trap-filled limit (1956) the traps are full and the current "
        "rises to the trap-free square law instead"
    ),
    evaluate=_bias_over_trap_filled_limit,
)

_DRIFT_ONLY = ValidityCondition(
    id="drift_dominates_diffusion",
    quantity="eV/kT (bias in units of the thermal voltage)",
    limit=DRIFT_ONLY_MIN_BIAS_KT,
    bound="lower",
    reason=(
        "the Mott-Gurney (1940) and Mark-Helfrich (1962) laws neglect carrier diffusion, "
        "which is justified only for biases well above kT/e"
    ),
    evaluate=_bias_over_kT,
)

_DEEP_TRAP_TAIL = ValidityCondition(
    id="trap_tail_deeper_than_kT",
    quantity="l = T_t/T (trap-distribution temperature over sample temperature)",
    limit=1.0,
    bound="lower",
    reason=(
        "the Mark-Helfrich (1962) power law V^(l+1) assumes an exponential trap tail broader "
        "than kT (l > 1); for l <= 1 the trapped charge no longer follows the quasi-Fermi level "
        "as assumed"
    ),
    evaluate=_trap_temperature_ratio,
)


def _thickness() -> Parameter:
    return Parameter(
        name="thickness_nm", unit="nm", symbol="d", description="film thickness",
        lower=5.0, upper=20000.0, typical=200.0, device_prior="thickness_nm",
        sample_in_log=True,
    )


SCLC_SHALLOW_TRAPS = Mechanism(
    id="sclc_shallow_traps",
    family="space_charge",
    name="Space-charge-limited current (Mott-Gurney, shallow traps)",
    formula=(
        "J = (9/8) eps0 eps_r mu theta V^2/d^3;  theta = (N_c/N_t) exp(-E_t/kT);"
        "  sampled: P = eps_r mu N_c/N_t;  valid for eV/kT >= 10"
    ),
    source=(
        "Mott & Gurney, Electronic Processes in Ionic Crystals (Oxford, 1940); shallow traps: "
        "Lampert, Phys. Rev. 103, 1648 (1956)"
    ),
    parameters=(
        Parameter(
            name="trap_depth_eV", unit="eV", symbol="E_t",
            description="depth of the shallow trap level below the transport band",
            lower=0.01, upper=1.5, typical=0.3,
        ),
        Parameter(
            name="permittivity_mobility_prefactor_cm2_per_Vs", unit="cm^2/(V s)",
            symbol="eps_r mu N_c/N_t",
            description="static permittivity x mobility x N_c/N_t (the product the current fixes)",
            lower=1e-8, upper=1e10, typical=1e2, log_scale=True,
        ),
        _thickness(),
    ),
    magnitude=_shallow_trap_sclc_current,
    plots=(SCLC_LOG_LOG_PLOT, SCLC_ARRHENIUS_PLOT),
    temperature_dependence="activated through theta: ln(I/V^2) linear in 1/T (slope -E_t/k)",
    estimates=(
        PlotEstimate("trap_depth_eV", "sclc_arrhenius_plot"),
        PlotEstimate("permittivity_mobility_prefactor_cm2_per_Vs", "sclc_arrhenius_plot"),
    ),
    checks=(
        # Log-log slope 2 of the Mott-Gurney law; +/- 0.2 allows for noise [common practice].
        QuantityInRange("sclc_log_log_plot", ("voltage_exponent",), 1.8, 2.2,
                        name="square_law_voltage_exponent"),
        ThermallyActivated(),
    ),
    validity=(_DRIFT_ONLY,),
)

SCLC_EXPONENTIAL_TRAPS = Mechanism(
    id="sclc_exponential_traps",
    family="space_charge",
    name="Space-charge-limited current (Mark-Helfrich, exponential trap distribution)",
    formula=(
        "J = e^(1-l) mu N_c (eps l/(N_t (l+1)))^l ((2l+1)/(l+1))^(l+1) V^(l+1)/d^(2l+1);"
        "  l = T_t/T;  valid for l >= 1, eV/kT >= 10, V <= V_TFL = e N_t d^2/(2 eps)"
    ),
    source="Mark & Helfrich, J. Appl. Phys. 33, 205 (1962)",
    parameters=(
        Parameter(
            name="characteristic_trap_temperature_K", unit="K", symbol="T_t",
            description="characteristic temperature of the exponential trap distribution",
            lower=100.0, upper=5000.0, typical=1000.0, sample_in_log=True,
        ),
        Parameter(
            name="trap_density_per_cm3", unit="cm^-3", symbol="N_t",
            description="total density of the exponentially distributed traps",
            lower=1e13, upper=1e22, typical=1e18, log_scale=True,
        ),
        Parameter(
            name="dielectric_constant", unit="1", symbol="eps_r",
            description="static relative permittivity of the film",
            lower=1.5, upper=30.0, typical=3.5,
            device_prior="semiconductor_dielectric_constant", sample_in_log=True,
        ),
        Parameter(
            name="mobility_band_density_per_V_s_cm", unit="1/(V s cm)", symbol="mu N_c",
            description="mobility x effective band density of states",
            lower=1e8, upper=1e26, typical=1e19, log_scale=True,
        ),
        _thickness(),
    ),
    magnitude=_mark_helfrich_current,
    plots=(MARK_HELFRICH_LOG_LOG_PLOT,),
    temperature_dependence="power law V^(T_t/T + 1): the log-log slope falls as T rises",
    estimates=(PlotEstimate("characteristic_trap_temperature_K", "mark_helfrich_log_log_plot"),),
    checks=(
        # Trap-limited SCLC rises faster than the square law [common practice threshold].
        QuantityInRange("mark_helfrich_log_log_plot", ("voltage_exponent",), 2.2, 50.0,
                        name="trap_limited_voltage_exponent"),
        ThermallyActivated(),
    ),
    validity=(_DRIFT_ONLY, _DEEP_TRAP_TAIL, _TRAPS_NOT_FILLED),
)
