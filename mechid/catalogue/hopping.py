"""Hopping conduction: nearest-neighbour (field-assisted) and variable-range hopping.

Every formula the declarations use is a public function of this module:

* :func:`hopping_field_argument`, :func:`nearest_neighbour_current_density_A_per_cm2`
  -- field-assisted nearest-neighbour hopping (Mott & Davis 1979)
* :func:`variable_range_hopping_conductance_S` -- ``G0 exp(-(T0/T)^p)`` (Mott 1969; Efros &
  Shklovskii 1975)
* :func:`mott_characteristic_temperature_K`, :func:`mott_hopping_distance_nm`,
  :func:`mott_hopping_energy_eV` -- Mott's T0 and the optimal hop
* :func:`efros_shklovskii_characteristic_temperature_K`, :func:`es_hopping_distance_nm`,
  :func:`es_hopping_energy_eV`
* :func:`reduced_activation_energy`, :func:`reduced_activation_energy_from_data` -- Zabrodskii's
  ``w = d ln(sigma)/d ln(T)``
* :func:`mott_vrh_variant` -- builds the Mott declaration for another dimension
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from numpy.typing import ArrayLike

from mechid.catalogue.base import (
    FloatArray,
    Mechanism,
    Parameter,
    PlotRegime,
    StraightenedPlot,
    iv_magnitudes,
    positive_or_nan,
)
from mechid.catalogue.checks import (
    HopEnergyExceedsKT,
    HoppingLaw,
    Ohmic,
    PlotEstimate,
    ThermallyActivated,
)
from mechid.catalogue.validity import ValidityCondition
from mechid.constants import BOLTZMANN_EV, SCHOTTKY_BETA_EV_SQRT_M_PER_V
from mechid.device import Device

_NM_TO_M = 1e-9
_NM_TO_CM = 1e-7
#: e^2/(4 pi eps0) in eV nm (1.439964).
_COULOMB_EV_NM = SCHOTTKY_BETA_EV_SQRT_M_PER_V**2 * 1e9


# --------------------------------------------------------------------------------------
# Nearest-neighbour (field-assisted) hopping
# --------------------------------------------------------------------------------------


def hopping_field_argument(
    field_V_per_m: ArrayLike, hopping_distance_nm: ArrayLike, temperature_K: ArrayLike
) -> FloatArray:
    """Field-assisted hopping argument ``e a E/(2 kT)`` (dimensionless).

    Parameters
    ----------
    field_V_per_m : array_like
        Field in V/m.
    hopping_distance_nm : array_like
        Hop distance ``a`` in nm.
    temperature_K : array_like
        Temperature in K.

    Returns
    -------
    ndarray
        Half the energy gained over one hop, in units of kT (Mott & Davis 1979).
    """
    energy_eV = np.asarray(hopping_distance_nm, dtype=float) * _NM_TO_M * np.asarray(
        field_V_per_m, dtype=float
    )
    return energy_eV / (2 * BOLTZMANN_EV * np.asarray(temperature_K, dtype=float))


def nearest_neighbour_current_density_A_per_cm2(
    field_V_per_m: ArrayLike,
    temperature_K: ArrayLike,
    activation_energy_eV: ArrayLike,
    hopping_distance_nm: ArrayLike,
    prefactor_A_per_cm2: ArrayLike,
) -> FloatArray:
    """Field-assisted nearest-neighbour hopping current density.

    Parameters
    ----------
    field_V_per_m : array_like
        Field in V/m.
    temperature_K : array_like
        Temperature in K.
    activation_energy_eV : array_like
        Hop activation energy ``E_a`` in eV (> 0).
    hopping_distance_nm : array_like
        Hop distance ``a`` in nm.
    prefactor_A_per_cm2 : array_like
        ``J0 = 2 e n a nu`` in A/cm^2.

    Returns
    -------
    ndarray
        Current density in A/cm^2.

    Notes
    -----
    Mott & Davis, Electronic Processes in Non-Crystalline Materials, 2nd ed. (Oxford, 1979)
    (from memory: no source could be checked for the prefactor convention): forward hops face
    ``E_a - eaE/2``, backward hops ``E_a + eaE/2``, so

    .. math::

        J = J_0 e^{-E_a/kT}\\sinh\\frac{eaE}{2kT}
          = \\frac{J_0}{2}\\Big[e^{-(E_a - eaE/2)/kT} - e^{-(E_a + eaE/2)/kT}\\Big].

    The second form is evaluated, as ``(J0/2) exp(-u) (-expm1(-eaE/kT))`` with ``u`` the
    forward barrier in kT. The model needs a forward barrier: where the field removes it
    (``eaE/2 > E_a``) hops are no longer activated and the expression has no meaning. It is
    returned bare (no clipping); the declaration :data:`NEAREST_NEIGHBOUR_HOPPING` refuses
    those points (``forward_barrier_left``).
    """
    t = np.asarray(temperature_K, dtype=float)
    kT = BOLTZMANN_EV * t
    half_gain = hopping_field_argument(field_V_per_m, hopping_distance_nm, t)
    forward_barrier = np.asarray(activation_energy_eV, dtype=float) / kT - half_gain
    net_fraction = -np.expm1(-2.0 * half_gain)
    return 0.5 * np.asarray(prefactor_A_per_cm2, dtype=float) * np.exp(-forward_barrier) * (
        net_fraction
    )


# --------------------------------------------------------------------------------------
# Variable-range hopping
# --------------------------------------------------------------------------------------


def variable_range_hopping_conductance_S(
    temperature_K: ArrayLike,
    characteristic_temperature_K: ArrayLike,
    exponent: float,
    prefactor_S: ArrayLike,
) -> FloatArray:
    """Variable-range hopping conductance ``G0 exp(-(T0/T)^p)`` in S.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    characteristic_temperature_K : array_like
        ``T0`` in K.
    exponent : float
        ``p``: 1/4 (Mott, 3D), 1/3 (Mott, 2D), 1/2 (Efros-Shklovskii).
    prefactor_S : array_like
        ``G0`` in S (taken temperature independent).

    Returns
    -------
    ndarray
        Conductance in S (Mott, Phil. Mag. 19, 835 (1969); Efros & Shklovskii, J. Phys. C 8,
        L49 (1975)).
    """
    ratio = np.asarray(characteristic_temperature_K, dtype=float) / np.asarray(
        temperature_K, dtype=float
    )
    return np.asarray(prefactor_S, dtype=float) * np.exp(-(ratio**exponent))


def mott_characteristic_temperature_K(
    beta: float, density_of_states_per_eV_cm3: ArrayLike, localisation_length_nm: ArrayLike
) -> FloatArray:
    """Mott's 3D characteristic temperature ``T0 = beta/(k N(E_F) xi^3)``.

    Parameters
    ----------
    beta : float
        Numerical constant, which depends on how xi is defined: 18 (commonly quoted),
        21.2 (Shklovskii & Efros 1984), about 16 (percolation estimate).
    density_of_states_per_eV_cm3 : array_like
        Density of states at the Fermi level, eV^-1 cm^-3.
    localisation_length_nm : array_like
        Localisation length ``xi`` in nm.

    Returns
    -------
    ndarray
        ``T0`` in K (Mott, Phil. Mag. 19, 835 (1969); the form ``18/(k N(E_F) alpha^3)``
        with ``alpha = xi`` checked against a secondary reproduction of Mott's law, the
        paper itself not consulted).
    """
    volume_cm3 = (np.asarray(localisation_length_nm, dtype=float) * _NM_TO_CM) ** 3
    density = np.asarray(density_of_states_per_eV_cm3, dtype=float)
    return beta / (BOLTZMANN_EV * density * volume_cm3)


def _temperature_ratio(
    characteristic_temperature_K: ArrayLike, temperature_K: ArrayLike
) -> FloatArray:
    """``T0/T`` as floats."""
    return np.asarray(characteristic_temperature_K, dtype=float) / np.asarray(
        temperature_K, dtype=float
    )


def mott_hopping_distance_nm(
    characteristic_temperature_K: ArrayLike,
    temperature_K: ArrayLike,
    localisation_length_nm: ArrayLike,
) -> FloatArray:
    """Mean Mott hop length ``R = (3/8) xi (T0/T)^(1/4)`` in nm (Mott 1969; from memory:
    no source for the 3/8 could be checked)."""
    ratio = _temperature_ratio(characteristic_temperature_K, temperature_K)
    return 0.375 * np.asarray(localisation_length_nm, dtype=float) * ratio**0.25


def mott_hopping_energy_eV(
    characteristic_temperature_K: ArrayLike, temperature_K: ArrayLike, exponent: float = 0.25
) -> FloatArray:
    """Mott hop energy ``W = p kT (T0/T)^p`` in eV, ``p = 1/(d + 1)``.

    At the optimum hop of Mott's argument (Mott 1969) the energy term ``W/kT`` is the share
    ``p`` of the exponent ``(T0/T)^p`` (the distance term ``2R/xi`` the rest), which gives
    ``W = (1/4) kT (T0/T)^(1/4)`` in 3D and ``(1/3) kT (T0/T)^(1/3)`` in 2D (from memory; the
    1/4 could not be checked against the paper, the split follows from minimising
    ``2R/xi + W/kT`` with ``W`` proportional to ``R^-d``).
    """
    t = np.asarray(temperature_K, dtype=float)
    ratio = np.asarray(characteristic_temperature_K, dtype=float) / t
    return exponent * BOLTZMANN_EV * t * ratio**exponent


def efros_shklovskii_characteristic_temperature_K(
    beta: float, dielectric_constant: ArrayLike, localisation_length_nm: ArrayLike
) -> FloatArray:
    """Efros-Shklovskii temperature ``T_ES = beta e^2/(4 pi eps0 kappa k xi)``.

    Parameters
    ----------
    beta : float
        Numerical constant, about 2.8 in 3D and 6.2 in 2D (from memory; the law
        ``exp(-(T_ES/T)^(1/2))`` itself is confirmed by Shklovskii's own summaries, the
        constants are not).
    dielectric_constant : array_like
        Relative permittivity ``kappa`` of the host.
    localisation_length_nm : array_like
        Localisation length ``xi`` in nm.

    Returns
    -------
    ndarray
        ``T_ES`` in K (Efros & Shklovskii, J. Phys. C 8, L49 (1975)).
    """
    kappa = np.asarray(dielectric_constant, dtype=float)
    coulomb_eV = _COULOMB_EV_NM / (kappa * np.asarray(localisation_length_nm, dtype=float))
    return beta * coulomb_eV / BOLTZMANN_EV


def es_hopping_distance_nm(
    characteristic_temperature_K: ArrayLike,
    temperature_K: ArrayLike,
    localisation_length_nm: ArrayLike,
) -> FloatArray:
    """ES hop length ``R = (1/4) xi (T_ES/T)^(1/2)`` in nm (from memory / common practice)."""
    ratio = _temperature_ratio(characteristic_temperature_K, temperature_K)
    return 0.25 * np.asarray(localisation_length_nm, dtype=float) * np.sqrt(ratio)


def es_hopping_energy_eV(
    characteristic_temperature_K: ArrayLike, temperature_K: ArrayLike
) -> FloatArray:
    """ES hop energy ``W = (1/2) kT (T_ES/T)^(1/2)`` in eV (from memory / common practice)."""
    t = np.asarray(temperature_K, dtype=float)
    ratio = np.asarray(characteristic_temperature_K, dtype=float) / t
    return 0.5 * BOLTZMANN_EV * t * np.sqrt(ratio)


def reduced_activation_energy(
    temperature_K: ArrayLike, characteristic_temperature_K: ArrayLike, exponent: float
) -> FloatArray:
    """Zabrodskii's ``w = d ln(sigma)/d ln(T)`` for ``sigma = sigma0 exp(-(T0/T)^p)``.

    Parameters
    ----------
    temperature_K : array_like
        Temperature in K.
    characteristic_temperature_K : array_like
        ``T0`` in K (``E_a/k`` for Arrhenius, ``p = 1``).
    exponent : float
        ``p``.

    Returns
    -------
    ndarray
        ``w = p (T0/T)^p``, so ``ln w`` is linear in ``ln T`` with slope ``-p`` (Zabrodskii &
        Zinov'eva, Sov. Phys. JETP 59, 425 (1984), citation details from memory; the
        expression itself follows from differentiating ``ln sigma`` and is checked in the
        tests). A prefactor
        ``sigma0 ∝ T^m`` would add ``m``.
    """
    ratio = np.asarray(characteristic_temperature_K, dtype=float) / np.asarray(
        temperature_K, dtype=float
    )
    return exponent * ratio**exponent


def reduced_activation_energy_from_data(
    temperature_K: ArrayLike, conductance: ArrayLike
) -> FloatArray:
    """Zabrodskii's ``w = d ln G/d ln T`` estimated from measured conductances.

    Parameters
    ----------
    temperature_K : array_like
        Temperatures in K, shape ``(n,)``, ``n >= 2``, strictly monotonic.
    conductance : array_like
        Conductance (or ``|I|/|V|`` at one bias) at those temperatures, > 0.

    Returns
    -------
    ndarray
        ``w`` at each temperature, by second-order finite differences in ``ln T``
        (:func:`numpy.gradient`); NaN where a conductance is not positive.
    """
    log_t = np.log(positive_or_nan(temperature_K))
    log_g = np.log(positive_or_nan(conductance))
    return np.gradient(log_g, log_t)


def _variable_range_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    characteristic_temperature_K: FloatArray,
    prefactor_S: FloatArray,
    exponent: float,
) -> FloatArray:
    """|I| = G0 |V| exp(-(T0/T)^p) in A (ohmic in bias)."""
    conductance = variable_range_hopping_conductance_S(
        temperature_K, characteristic_temperature_K, exponent, prefactor_S
    )
    return conductance * voltage_V


def _nearest_neighbour_current(
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    *,
    activation_energy_eV: FloatArray,
    hopping_distance_nm: FloatArray,
    prefactor_A_per_cm2: FloatArray,
    thickness_nm: FloatArray,
) -> FloatArray:
    """|I| in A of field-assisted nearest-neighbour hopping with E = |V|/d."""
    field = voltage_V / (thickness_nm * _NM_TO_M)
    density = nearest_neighbour_current_density_A_per_cm2(
        field, temperature_K, activation_energy_eV, hopping_distance_nm, prefactor_A_per_cm2
    )
    return density * device.require_area()


# --------------------------------------------------------------------------------------
# Straightened plots
# --------------------------------------------------------------------------------------


def _hopping_arrhenius_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = 1/T, y = ln(|I| T/|V|).

    At low field ``sinh(eaE/2kT) ~ eaE/2kT``, so ``I T/V ∝ exp(-E_a/kT)`` exactly; plotting
    ln(I/V) instead would bend the line by the 1/T prefactor and read ``E_a - kT``.
    """
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
    return 1.0 / t, np.log(i * t / v)


def _hopping_arrhenius_interpret(
    slope: float, intercept: float, voltage_V: float, device: Device
) -> dict[str, float]:
    """Slope ``-E_a/k`` -> activation energy (low-field limit of the sinh law)."""
    return {"activation_energy_eV": float(-np.float64(slope) * BOLTZMANN_EV)}


def _hopping_field_transform(
    voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
) -> tuple[FloatArray, FloatArray]:
    """x = |V|, y = ln|I| (straight at high field, e a E >> 2 kT)."""
    v, i = iv_magnitudes(voltage_V, current_A)
    v, i, _ = np.broadcast_arrays(v, i, np.asarray(temperature_K, dtype=float))
    return v, np.log(i)


def _hopping_field_interpret(
    slope: float, intercept: float, temperature_K: float, device: Device
) -> dict[str, float]:
    """High-field slope ``e a/(2 kT d)`` per volt -> hop distance (needs thickness)."""
    if device.thickness_nm is None:
        return {}
    distance = np.float64(slope) * 2 * BOLTZMANN_EV * temperature_K * device.thickness_nm.value
    return {"hopping_distance_nm": float(distance)}


def _vrh_transform(exponent: float) -> Callable[..., tuple[FloatArray, FloatArray]]:
    def transform(
        voltage_V: FloatArray, temperature_K: FloatArray, current_A: FloatArray, device: Device
    ) -> tuple[FloatArray, FloatArray]:
        v, i = iv_magnitudes(voltage_V, current_A)
        v, i, t = np.broadcast_arrays(v, i, positive_or_nan(temperature_K))
        return t**-exponent, np.log(i / v)

    transform.__doc__ = f"x = T^(-{exponent:.4g}), y = ln(|I|/|V|)."
    return transform


def _vrh_interpret(exponent: float) -> Callable[..., dict[str, float]]:
    def interpret(
        slope: float, intercept: float, voltage_V: float, device: Device
    ) -> dict[str, float]:
        with np.errstate(invalid="ignore", over="ignore"):
            t0 = positive_or_nan(-np.float64(slope)) ** (1.0 / exponent)
            g0 = np.exp(np.float64(intercept))
        return {"characteristic_temperature_K": float(t0), "prefactor_S": float(g0)}

    interpret.__doc__ = f"Slope -T0^p -> T0 = (-slope)^(1/p), p = {exponent:.4g}; intercept ln G0."
    return interpret


def _vrh_plot(plot_id: str, title: str, exponent: float, exponent_text: str) -> StraightenedPlot:
    return StraightenedPlot(
        id=plot_id,
        title=title,
        x_label=f"T^(-{exponent_text}) [K^(-{exponent_text})]",
        y_label="ln(|I|/|V|) [ln(S)]",
        grouping="per_voltage",
        transform=_vrh_transform(exponent),
        interpret=_vrh_interpret(exponent),
    )


def _vrh_magnitude(exponent: float) -> Callable[..., FloatArray]:
    def magnitude(
        voltage_V: FloatArray,
        temperature_K: FloatArray,
        device: Device,
        *,
        characteristic_temperature_K: FloatArray,
        prefactor_S: FloatArray,
    ) -> FloatArray:
        return _variable_range_current(
            voltage_V, temperature_K, device,
            characteristic_temperature_K=characteristic_temperature_K,
            prefactor_S=prefactor_S, exponent=exponent,
        )

    magnitude.__doc__ = f"|I| = G0 |V| exp(-(T0/T)^p) in A, p = {exponent:.4g}."
    return magnitude


# --------------------------------------------------------------------------------------
# Validity domain
# --------------------------------------------------------------------------------------


def _hop_energy_fraction(
    voltage_V: FloatArray, temperature_K: FloatArray, device: Device, *,
    activation_energy_eV: FloatArray, hopping_distance_nm: FloatArray,
    prefactor_A_per_cm2: FloatArray, thickness_nm: FloatArray,
) -> FloatArray:
    """``(e a E/2)/E_a``: share of the hop barrier removed by the field at ``E = V/d``."""
    return hopping_distance_nm * voltage_V / (2 * thickness_nm * activation_energy_eV)


#: Field-assisted hopping holds while a forward hop is still activated.
NEAREST_NEIGHBOUR_VALIDITY = (
    ValidityCondition(
        id="forward_barrier_left",
        quantity="e a E/(2 E_a) (share of the hop barrier removed by the field)",
        limit=1.0,
        bound="upper",
        reason=(
            "field-assisted hopping lowers the forward hop barrier by e a E/2 (Mott & Davis "
            "1979); once that exceeds E_a the hops are no longer thermally activated"
        ),
        evaluate=_hop_energy_fraction,
    ),
)


# --------------------------------------------------------------------------------------
# Declarations
# --------------------------------------------------------------------------------------

#: Smallest sinh argument x = e a E/(2 k T) at which ln I is read as linear in V: there
#: sinh x = exp(x)/2 (1 - exp(-2x)), and the local slope d ln I/dV = b coth(x) exceeds b by
#: 2 exp(-2x)/(1 - exp(-2x)) = 0.5 % at x = 3 (our threshold for "e a E >> 2 k T").
HOPPING_FIELD_MIN_ARGUMENT = 3.0


def _exponential_field_regime(voltage_V: FloatArray, slope_per_V: float) -> FloatArray:
    """Points of the hopping field plot where e a E >> 2 k T (Mott & Davis 1979 sinh law).

    On the straight part the slope of ln I against |V| is b = e a/(2 k T d), so the sinh
    argument at each point is x = slope |V|; points with x >= HOPPING_FIELD_MIN_ARGUMENT are
    in the exponential regime. In the ohmic regime (x << 1) a line through ln I vs V has a
    slope of order 1/|V| and gives x of order 1, so no point qualifies.
    """
    return np.asarray(slope_per_V * voltage_V >= HOPPING_FIELD_MIN_ARGUMENT)


_CONDUCTANCE_PREFACTOR = Parameter(
    name="prefactor_S", unit="S", symbol="G0",
    description="conductance prefactor (high-temperature limit of I/V)",
    lower=1e-12, upper=1e3, typical=1e-3, log_scale=True,
)

NEAREST_NEIGHBOUR_HOPPING = Mechanism(
    id="nearest_neighbour_hopping",
    family="hopping",
    name="Nearest-neighbour hopping (field-assisted)",
    formula="J = J0 exp(-E_a/kT) sinh(e a E/(2 kT));  E = V/d,  J0 = 2 e n a nu",
    source=(
        "Mott & Davis, Electronic Processes in Non-Crystalline Materials, 2nd ed. "
        "(Oxford, 1979), field-assisted hopping"
    ),
    parameters=(
        Parameter(
            name="activation_energy_eV", unit="eV", symbol="E_a",
            description="activation energy of one hop",
            lower=0.005, upper=2.0, typical=0.2,
        ),
        Parameter(
            name="hopping_distance_nm", unit="nm", symbol="a",
            description="distance between hopping sites",
            lower=0.1, upper=20.0, typical=1.0,
            sample_in_log=True,  # the field enters as a/d: a straight ridge in log coordinates
        ),
        Parameter(
            name="prefactor_A_per_cm2", unit="A/cm^2", symbol="J0",
            description="current-density prefactor 2 e n a nu",
            lower=1e-4, upper=1e12, typical=1e5, log_scale=True,
        ),
        Parameter(
            name="thickness_nm", unit="nm", symbol="d", description="film thickness (E = V/d)",
            lower=1.0, upper=1000.0, typical=50.0, device_prior="thickness_nm",
            sample_in_log=True,
        ),
    ),
    magnitude=_nearest_neighbour_current,
    plots=(
        StraightenedPlot(
            id="hopping_arrhenius_plot",
            title="Arrhenius plot of conductance x temperature (hopping)",
            x_label="1/T [1/K]",
            y_label="ln(|I| T/|V|) [ln(S K)]",
            grouping="per_voltage",
            transform=_hopping_arrhenius_transform,
            interpret=_hopping_arrhenius_interpret,
        ),
        StraightenedPlot(
            id="hopping_field_plot",
            title="High-field hopping plot (ln I against V)",
            x_label="|V| [V]",
            y_label="ln|I| [ln(A)]",
            grouping="per_temperature",
            transform=_hopping_field_transform,
            interpret=_hopping_field_interpret,
            regime=PlotRegime(_exponential_field_regime,
                              f"e a E/(2 k T) = slope x |V| >= {HOPPING_FIELD_MIN_ARGUMENT:g}"),
        ),
    ),
    temperature_dependence="activated: ln(I/V) linear in 1/T at low field (slope -E_a/k)",
    estimates=(
        PlotEstimate("activation_energy_eV", "hopping_arrhenius_plot", zero_bias_power=1.0),
        PlotEstimate("hopping_distance_nm", "hopping_field_plot"),
    ),
    checks=(ThermallyActivated(), HoppingLaw(exponent=1.0)),
    validity=NEAREST_NEIGHBOUR_VALIDITY,
)



def _mott_hop_energy(exponent: float) -> Callable[[float, float], float]:
    """Mott hop energy in eV as a plain float, for the hop-energy check of exponent ``p``."""
    def hop_energy(t0: float, t: float) -> float:
        return float(mott_hopping_energy_eV(t0, t, exponent))
    return hop_energy


def _es_hop_energy(t0: float, t: float) -> float:
    """Efros-Shklovskii hop energy in eV as a plain float (for the hop-energy check)."""
    return float(es_hopping_energy_eV(t0, t))


def _vrh_estimates(plot_id: str) -> tuple[PlotEstimate, ...]:
    """A variable-range-hopping plot gives T0 (slope) and G0 (intercept)."""
    return (PlotEstimate("characteristic_temperature_K", plot_id),
            PlotEstimate("prefactor_S", plot_id))


_MOTT_EXPONENTS = {1: (0.5, "1/2"), 2: (1.0 / 3.0, "1/3"), 3: (0.25, "1/4")}


def mott_vrh_variant(dimension: int) -> Mechanism:
    """Mott variable-range hopping in ``dimension`` dimensions, ``p = 1/(dimension + 1)``.

    Parameters
    ----------
    dimension : {1, 2, 3}
        Dimensionality of the hopping network (3 for films thicker than the hop length,
        2 for layers thinner than it).

    Returns
    -------
    Mechanism
        Id ``"mott_vrh"`` for 3D (the catalogue's :data:`MOTT_VRH`), ``"mott_vrh_2d"`` and
        ``"mott_vrh_1d"`` otherwise, with ``options={"dimension": dimension}`` (Mott, Phil.
        Mag. 19, 835 (1969)).

    Raises
    ------
    ValueError
        If ``dimension`` is not 1, 2 or 3.
    """
    if dimension not in _MOTT_EXPONENTS:
        raise ValueError(f"Mott VRH is defined for dimension 1, 2 or 3, got {dimension!r}")
    exponent, text = _MOTT_EXPONENTS[dimension]
    plot_id = "mott_vrh_plot" if dimension == 3 else f"mott_vrh_{dimension}d_plot"
    return Mechanism(
        id="mott_vrh" if dimension == 3 else f"mott_vrh_{dimension}d",
        family="hopping",
        name=f"Mott variable-range hopping ({dimension}D)",
        formula=f"I = G0 V exp(-(T0/T)^({text}));  T0 = beta/(k N(E_F) xi^3) in 3D",
        source=(
            "Mott, Phil. Mag. 19, 835 (1969); Mott, J. Non-Cryst. Solids 1, 1 (1968)"
        ),
        parameters=(
            Parameter(
                name="characteristic_temperature_K", unit="K", symbol="T0",
                description="Mott characteristic temperature",
                lower=1e2, upper=1e9, typical=1e6, log_scale=True,
            ),
            _CONDUCTANCE_PREFACTOR,
        ),
        magnitude=_vrh_magnitude(exponent),
        plots=(
            _vrh_plot(plot_id, f"Mott plot (ln(I/V) against T^-{text})", exponent, text),
        ),
        temperature_dependence=f"stretched exponential: ln(I/V) linear in T^(-{text})",
        options={"dimension": dimension},
        needs_area=False,
        estimates=_vrh_estimates(plot_id),
        checks=(
            ThermallyActivated(),
            HoppingLaw(exponent=exponent),
            Ohmic(),
            HopEnergyExceedsKT(plot_id, _mott_hop_energy(exponent),
                               f"W = kT (T0/T)^({text})/{dimension + 1}, Mott 1969"),
        ),
    )


MOTT_VRH = mott_vrh_variant(3)

#: Mott hopping in a layer thinner than the hop length (exponent 1/3).
MOTT_VRH_2D = mott_vrh_variant(2)

ES_VRH = Mechanism(
    id="es_vrh",
    family="hopping",
    name="Efros-Shklovskii variable-range hopping",
    formula="I = G0 V exp(-(T_ES/T)^(1/2));  T_ES = beta e^2/(4 pi eps0 kappa k xi)",
    source="Efros & Shklovskii, J. Phys. C 8, L49 (1975)",
    parameters=(
        Parameter(
            name="characteristic_temperature_K", unit="K", symbol="T_ES",
            description="Efros-Shklovskii characteristic temperature",
            lower=1.0, upper=1e7, typical=1e3, log_scale=True,
        ),
        _CONDUCTANCE_PREFACTOR,
    ),
    magnitude=_vrh_magnitude(0.5),
    plots=(_vrh_plot("es_vrh_plot", "Efros-Shklovskii plot (ln(I/V) against T^-1/2)", 0.5, "1/2"),),
    temperature_dependence="stretched exponential: ln(I/V) linear in T^(-1/2)",
    needs_area=False,
    estimates=_vrh_estimates("es_vrh_plot"),
    checks=(
        ThermallyActivated(),
        HoppingLaw(exponent=0.5),
        Ohmic(),
        HopEnergyExceedsKT("es_vrh_plot", _es_hop_energy,
                           "W = kT (T_ES/T)^(1/2)/2, Efros & Shklovskii 1975"),
    ),
)
