"""Physics of the tunnelling mechanisms against outside values.

Check values come from /work/shared/physics-references.md (sections 0-2 and 9), each
recomputed there from the published formula with scipy.constants (CODATA 2022); the source
of each check is named beside it.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants, integrate
from scipy.optimize import minimize_scalar

from mechid.catalogue import DIRECT_TUNNELLING, FOWLER_NORDHEIM
from mechid.catalogue.tunnelling import (
    FOWLER_NORDHEIM_PLOT,
    LOW_BIAS_CONDUCTANCE_PLOT,
    SIMMONS_MIN_EXPONENT,
    THERMAL_ARGUMENT_LIMIT,
    forbes_t,
    forbes_v,
    fowler_nordheim_current_density_A_per_m2,
    fowler_nordheim_slope_V_per_nm,
    murphy_good_thermal_coefficient,
    murphy_good_thermal_factor,
    schottky_nordheim_current_density_A_per_m2,
    schottky_nordheim_parameter,
    simmons_current_density_A_per_m2,
    simmons_decay_coefficient,
    simmons_high_voltage_current_density_A_per_m2,
    simmons_low_bias_current_density_A_per_m2,
    simmons_thermal_coefficient,
    simmons_thermal_factor,
    thermal_smearing_factor,
)
from mechid.constants import FN_A_A_EV_PER_V2, FN_B_EV32_V_PER_NM, WKB_KAPPA_PER_NM_SQRT_EV
from mechid.device import Device, Measured

AREA_CM2 = 1e-4


# ---- constants ---------------------------------------------------------------------------


def test_fowler_nordheim_constants_match_forbes_deane():
    # Forbes & Deane 2007 recommended values: a = 1.541434e-6 A eV V^-2, b = 6.830890 eV^-3/2 V/nm
    a, b = FN_A_A_EV_PER_V2, FN_B_EV32_V_PER_NM
    assert a == pytest.approx(1.541434e-6, rel=1e-6)
    assert b == pytest.approx(6.830890, rel=1e-6)
    # b is (4/3) of the WKB decay constant sqrt(2 m e)/hbar (physics-references §0)
    assert b == pytest.approx(4 / 3 * WKB_KAPPA_PER_NM_SQRT_EV, rel=1e-12)


# ---- Simmons direct tunnelling ------------------------------------------------------------


def test_simmons_exponent_coefficient():
    # physics-references §1 [C]: A sqrt(phi0) = 28.9810 for phi0 = 2 eV, s = 2 nm, m = m_e
    assert simmons_decay_coefficient(2.0, 1.0) * np.sqrt(2.0) == pytest.approx(28.9810, rel=1e-5)


@pytest.mark.parametrize(("voltage", "expected"), [(0.5, 4.39032), (0.1, 0.550479)])
def test_simmons_intermediate_voltage_density(voltage, expected):
    # Simmons 1963 intermediate-voltage formula; physics-references §1 [C], A/m^2
    j = simmons_current_density_A_per_m2(voltage, 2.0, 2.0, 1.0)
    assert j == pytest.approx(expected, rel=1e-5)


def test_simmons_low_bias_formula_value():
    # Simmons 1963 low-voltage (ohmic) limit; physics-references §1 [C]: 0.579049 A/m^2 at 0.1 V
    j = simmons_low_bias_current_density_A_per_m2(0.1, 2.0, 2.0, 1.0)
    assert j == pytest.approx(0.579049, rel=1e-5)


def test_simmons_tends_to_low_bias_limit():
    # physics-references §1 [C, derived]: J_Simmons/J_low -> 1 - 2/(A sqrt(phi0)) as V -> 0
    voltages = np.array([1e-9, 1e-6, 1e-4])
    ratio = simmons_current_density_A_per_m2(voltages, 2.0, 2.0, 1.0) / (
        simmons_low_bias_current_density_A_per_m2(voltages, 2.0, 2.0, 1.0)
    )
    expected = 1 - 2 / 28.98097
    assert ratio == pytest.approx(np.full(3, expected), rel=2e-5)


def test_simmons_low_bias_thickness_ratio():
    # physics-references §1 [C]: low-V J(s = 1.0 nm)/J(1.1 nm) = 4.68498 at phi0 = 2 eV
    ratio = simmons_low_bias_current_density_A_per_m2(
        0.1, 2.0, 1.0, 1.0
    ) / simmons_low_bias_current_density_A_per_m2(0.1, 2.0, 1.1, 1.0)
    assert ratio == pytest.approx(4.68498, rel=1e-5)


def test_simmons_thermal_factor_values():
    # Simmons 1964 factor; physics-references §1 [C]: B = 7.24525 1/eV, x1.06013 (300 K),
    # x1.00381 (77 K) for phi0 = 2 eV, s = 2 nm, m = m_e (zero-bias limit)
    v = 1e-9
    assert simmons_thermal_coefficient(v, 2.0, 2.0, 1.0) == pytest.approx(7.24525, rel=1e-5)
    assert simmons_thermal_factor(v, 300.0, 2.0, 2.0, 1.0) == pytest.approx(1.06013, rel=1e-4)
    assert simmons_thermal_factor(v, 77.0, 2.0, 2.0, 1.0) == pytest.approx(1.00381, rel=1e-4)


def test_simmons_apparent_activation_energy_is_meV():
    # physics-references §1 [C]: apparent E_a(300 K) = 3.06 meV (direct tunnelling is ~flat in T)
    t = np.array([299.9, 300.1])
    factor = simmons_thermal_factor(1e-9, t, 2.0, 2.0, 1.0)
    apparent_eV = -constants.k / constants.e * np.diff(np.log(factor))[0] / np.diff(1 / t)[0]
    assert apparent_eV == pytest.approx(3.06e-3, rel=5e-3)


def test_direct_tunnelling_is_nearly_temperature_independent():
    # Simmons 1964: J(300 K)/J(77 K) equals the ratio of the thermal factors, a few per cent
    device = Device(area_cm2=AREA_CM2)
    params = {"barrier_height_eV": 2.0, "thickness_nm": 2.0, "effective_mass_ratio": 1.0}
    v = np.array([1e-6, 1e-6])
    i = DIRECT_TUNNELLING.current(v, np.array([300.0, 77.0]), params, device)
    assert i[0] / i[1] == pytest.approx(1.06013 / 1.00381, rel=1e-4)
    assert 1.0 < i[0] / i[1] < 1.1


def _simmons_wkb_current_density_A_per_m2(voltage_V, phi0_eV, s_nm, mass_ratio):
    """Independent check: the T = 0 WKB integral of a rectangular barrier tilted by eV.

    J = (4 pi m e/h^3) int_0^inf D(E_x) [N1 - N2] dE_x with the supply function of two
    free-electron metals (E_F = 5.5 eV) and D = exp(-2 int sqrt(2 m (U(x) - E_x))/hbar dx)
    over the classically forbidden part of U(x) = E_F + phi0 - eV x/s (Simmons 1963, his
    starting integral; evaluated by quadrature here, no mean-barrier approximation).
    """
    e, h, hbar = constants.e, constants.h, constants.hbar
    m = mass_ratio * constants.m_e
    fermi = 5.5

    def transmission(energy):
        def integrand(x):
            gap = fermi + phi0_eV - voltage_V * x / s_nm - energy
            return np.sqrt(2 * m * e * max(gap, 0.0)) / hbar * 1e-9

        return np.exp(-2 * integrate.quad(integrand, 0.0, s_nm, limit=200)[0])

    def supply(energy):  # (E_F - E_x) electrons below E_F - eV can tunnel both ways
        return min(fermi - energy, voltage_V) if energy < fermi else 0.0

    value = integrate.quad(lambda E: transmission(E) * supply(E), 0.0, fermi,
                           points=[fermi - voltage_V], limit=400)[0]
    return 4 * np.pi * m * e**3 / h**3 * value  # energies in eV -> e^2 for two eV factors


@pytest.mark.parametrize("voltage", [0.1, 0.5, 1.0])
def test_simmons_against_independent_wkb_integral(voltage):
    # Simmons' closed form against the WKB integral it approximates (quadrature above).
    # physics-references §1 [C]: WKB 0.612208 (0.1 V), 4.98982 (0.5 V) A/m^2 at phi0 = 2 eV,
    # s = 2 nm; Simmons/WKB = 0.899, 0.880, 0.809 (1 V): the mean-barrier approximation is
    # 10-20 % low here, so the two are compared with the sheet's ratios, not with each other.
    wkb = _simmons_wkb_current_density_A_per_m2(voltage, 2.0, 2.0, 1.0)
    sheet = {0.1: 0.612208, 0.5: 4.98982}
    if voltage in sheet:
        assert wkb == pytest.approx(sheet[voltage], rel=2e-3)
    ratio = simmons_current_density_A_per_m2(voltage, 2.0, 2.0, 1.0) / wkb
    assert ratio == pytest.approx({0.1: 0.899, 0.5: 0.880, 1.0: 0.809}[voltage], abs=5e-3)


def test_simmons_high_voltage_form_against_independent_si_evaluation():
    # Simmons 1963 high-voltage range, written here from SI constants (scipy.constants):
    # J = 2.2 e^3 F^2/(8 pi h phi0) [exp(-8 pi sqrt(2m) phi0^1.5/(2.96 h e F)) - (1 + 2eV/phi0)
    # exp(-(...) sqrt(1 + 2eV/phi0))], phi0 in J, F in V/m.
    e, h = constants.e, constants.h
    phi0, s, m, v = 2.0, 5.0, 0.5, np.array([3.0, 6.0])
    field = v / (s * 1e-9)
    phi_j = phi0 * e
    k = 8 * np.pi * np.sqrt(2 * m * constants.m_e) * phi_j**1.5 / (2.96 * h * e * field)
    ratio = 1 + 2 * v / phi0
    expected = 2.2 * e**3 * field**2 / (8 * np.pi * h * phi_j) * (
        np.exp(-k) - ratio * np.exp(-k * np.sqrt(ratio)))
    found = simmons_high_voltage_current_density_A_per_m2(v, phi0, s, m)
    np.testing.assert_allclose(found, expected, rtol=1e-12)


def test_simmons_published_forms_do_not_join_and_the_declaration_refuses_the_seam():
    # At eV = phi0 the published high-voltage form (beta = 23/24: 2.2, 2.96) is larger than the
    # intermediate form (beta = 1) by 1.1 exp(A sqrt(phi0/2) (1 - 2 sqrt 2/2.96)) up to the
    # small reverse terms: about 5.5x at phi0 = 2 eV, s = 5 nm, m* = 0.5 (measured here). The
    # direct-tunnelling declaration therefore stops at eV = phi0 instead of switching.
    phi0, s, m = 2.0, 5.0, 0.5
    intermediate = simmons_current_density_A_per_m2(phi0, phi0, s, m)
    high = simmons_high_voltage_current_density_A_per_m2(phi0, phi0, s, m)
    exponent = simmons_decay_coefficient(s, m) * np.sqrt(phi0 / 2)
    assert high / intermediate == pytest.approx(
        1.1 * np.exp(exponent * (1 - 2 * np.sqrt(2) / 2.96)), rel=0.02)
    assert high / intermediate > 5
    device = Device(area_cm2=AREA_CM2)
    params = {"barrier_height_eV": phi0, "thickness_nm": 2.0, "effective_mass_ratio": m}
    i = DIRECT_TUNNELLING.current(np.array([0.999 * phi0, 1.001 * phi0]), 4.2, params, device)
    assert np.isfinite(i[0]) and i[0] > 0
    assert np.isnan(i[1])


@pytest.mark.parametrize(("thickness_nm", "expected_V"), [(1.0, 1.05765), (2.0, 0.526519)])
def test_simmons_transition_voltage(thickness_nm, expected_V):
    # Transition voltage (minimum of ln(I/V^2) vs 1/V; Beebe et al. 2006) of the Simmons
    # intermediate formula, phi0 = 2 eV, m = m_e; physics-references §9 [C]
    def fn_ordinate(v):
        return np.log(simmons_current_density_A_per_m2(v, 2.0, thickness_nm, 1.0) / v**2)

    found = minimize_scalar(fn_ordinate, bounds=(0.1, 1.99), method="bounded",
                            options={"xatol": 1e-9})
    assert found.x == pytest.approx(expected_V, rel=1e-4)


def test_simmons_transparent_barrier_is_refused_not_clipped():
    # A sqrt(phibar) = 0.22 (the corner of the old declared box): Simmons' bracket is negative
    # there (the formula does not hold); the declaration refuses it (NaN) instead of
    # returning a current of exactly zero, which the old clipping did.
    v = np.array([0.01, 0.05])
    assert simmons_decay_coefficient(0.3, 0.05) * np.sqrt(0.1) < 0.25
    assert np.all(simmons_current_density_A_per_m2(v, 0.1, 0.3, 0.05) < 0)
    params = {"barrier_height_eV": 0.1, "thickness_nm": 0.3, "effective_mass_ratio": 0.05}
    assert np.all(np.isnan(DIRECT_TUNNELLING.current(v, 4.2, params, Device(area_cm2=AREA_CM2))))


@pytest.mark.parametrize("exponent", [SIMMONS_MIN_EXPONENT, 6.0, 30.0])
def test_simmons_current_increases_with_bias_inside_the_domain(exponent):
    # Above the declared minimum exponent the intermediate formula rises monotonically from
    # 0 to eV = phi0 (it fails below about 2.1: the old defect, J = 0 from 3.49 V at
    # phi0 = 1 eV, s = 1 nm, m* = 0.3 came from there and from the high-voltage branch).
    phi0, mass = 1.0, 0.3
    thickness = exponent / simmons_decay_coefficient(1.0, mass)  # A sqrt(phi0) = exponent
    v = np.linspace(1e-4, phi0, 2001)
    j = simmons_current_density_A_per_m2(v, phi0, thickness, mass)
    inside = simmons_decay_coefficient(thickness, mass) * np.sqrt(phi0 - v / 2) >= SIMMONS_MIN_EXPONENT
    assert np.all(j[inside] > 0)
    assert np.all(np.diff(j[inside]) > 0)


def test_low_bias_conductance_plot_recovers_zero_bias_conductance():
    # Simmons 1963: J ~ G0 (V + gamma V^3) at low bias, so I/V against V^2 is straight with
    # intercept G0 = J_low/V * area
    device = Device(area_cm2=AREA_CM2)
    params = {"barrier_height_eV": 2.0, "thickness_nm": 2.0, "effective_mass_ratio": 1.0}
    v = np.linspace(0.005, 0.05, 10)
    t = np.full_like(v, 1.0)
    i = DIRECT_TUNNELLING.current(v, t, params, device)
    x, y = LOW_BIAS_CONDUCTANCE_PLOT.transform(v, t, i, device)
    slope, intercept = np.polyfit(x, y, 1)
    found = LOW_BIAS_CONDUCTANCE_PLOT.interpret(slope, intercept, 1.0, device)
    g0 = (1 - 2 / 28.98097) * 0.579049 / 0.1 * AREA_CM2 * 1e-4  # S, from the checks above
    assert found["zero_bias_conductance_S"] == pytest.approx(g0, rel=1e-4)
    assert found["cubic_coefficient_per_V2"] > 0


# ---- Fowler-Nordheim ---------------------------------------------------------------------


def test_fowler_nordheim_density_pins_mass_prefactor():
    # Lenzlinger & Snow 1969 form with m0/m*; physics-references §2 [C]: phi = 3.2 eV,
    # m* = 0.5, E = 1 V/nm -> 0.945760 A/m^2 (0.472880 without the m0/m* prefactor)
    j = fowler_nordheim_current_density_A_per_m2(1.0, 3.2, 0.5)
    assert j == pytest.approx(0.945760, rel=1e-5)
    assert j * 0.5 == pytest.approx(0.472880, rel=1e-5)


@pytest.mark.parametrize(("mass", "expected"), [(0.42, 25.3412), (0.5, 27.6495)])
def test_fowler_nordheim_slope(mass, expected):
    # physics-references §2 [C]: B = b sqrt(m*) phi^(3/2) at phi = 3.2 eV, in V/nm
    assert fowler_nordheim_slope_V_per_nm(3.2, mass) == pytest.approx(expected, rel=1e-5)


def test_fowler_nordheim_plot_slope_proportional_to_thickness():
    # physics-references §2 [C]: ln(I/V^2) vs 1/V slope -138.247 V (5 nm), -276.495 V (10 nm)
    params = {"barrier_height_eV": 3.2, "effective_mass_ratio": 0.5}
    for thickness, expected in [(5.0, -138.247), (10.0, -276.495)]:
        device = Device(area_cm2=AREA_CM2, thickness_nm=Measured(thickness),
                        effective_mass_ratio=Measured(0.5))
        v = np.linspace(0.7, 1.4, 9) * thickness  # E = 0.7 .. 1.4 V/nm: eV > phi
        t = np.full_like(v, 1.0)  # 1 K: thermal factor 1 + O(1e-5)
        i = FOWLER_NORDHEIM.current(v, t, params | {"thickness_nm": thickness}, device)
        x, y = FOWLER_NORDHEIM_PLOT.transform(v, t, i, device)
        slope, intercept = np.polyfit(x, y, 1)
        assert slope == pytest.approx(expected, rel=1e-4)
        found = FOWLER_NORDHEIM_PLOT.interpret(slope, intercept, 1.0, device)
        assert found["barrier_height_eV"] == pytest.approx(3.2, rel=1e-4)
        assert found["barrier_height_from_intercept_eV"] == pytest.approx(3.2, rel=1e-3)


def test_fowler_nordheim_interpret_says_when_mass_was_assumed():
    device = Device(thickness_nm=Measured(5.0))
    found = FOWLER_NORDHEIM_PLOT.interpret(-138.247, 0.0, 300.0, device)
    # slope/(b d) = phi^(3/2) sqrt(m*) = 4.0477 -> phi = 2.54 eV at m* = 1
    assert set(found) == {"barrier_height_assuming_unit_mass_eV"}
    expected = (138.247 / (FN_B_EV32_V_PER_NM * 5.0)) ** (2 / 3)
    assert found["barrier_height_assuming_unit_mass_eV"] == pytest.approx(expected, rel=1e-12)
    assert FOWLER_NORDHEIM_PLOT.interpret(-138.247, 0.0, 300.0, Device()) == {}
    assert np.isnan(FOWLER_NORDHEIM_PLOT.interpret(1.0, 0.0, 300.0, device)[
        "barrier_height_assuming_unit_mass_eV"])


def test_murphy_good_thermal_factor_values():
    # Murphy & Good 1956; physics-references §2 [C]: phi = 3.2, m* = 0.5, F = 1 V/nm:
    # c = 12.9607 1/eV, x1.21169 (300 K), x1.01227 (77 K)
    assert murphy_good_thermal_coefficient(1.0, 3.2, 0.5) == pytest.approx(12.9607, rel=1e-5)
    assert murphy_good_thermal_factor(1.0, 300.0, 3.2, 0.5) == pytest.approx(1.21169, rel=1e-4)
    assert murphy_good_thermal_factor(1.0, 77.0, 3.2, 0.5) == pytest.approx(1.01227, rel=1e-4)


def test_murphy_good_factor_vacuum_with_forbes_t():
    # physics-references §2 [C]: phi = 4.5 eV, F = 5 V/nm with t(f): c = 4.60768, x1.02373 (300 K)
    t_value = forbes_t(schottky_nordheim_parameter(4.5, 5.0))
    c = murphy_good_thermal_coefficient(5.0, 4.5, 1.0, t_value)
    assert c == pytest.approx(4.60768, rel=1e-5)
    factor = murphy_good_thermal_factor(5.0, 300.0, 4.5, 1.0, t_value)
    assert factor == pytest.approx(1.02373, rel=1e-4)


def test_forbes_barrier_functions():
    # Forbes 2006 worked example phi = 4.5 eV, F = 5 V/nm (f ~ 0.36, v ~ 0.58 [P]);
    # physics-references §2 [C]: f = 0.355547, v = 0.583175, t = 1.059931
    f = schottky_nordheim_parameter(4.5, 5.0)
    assert f == pytest.approx(0.355547, rel=1e-6)
    assert forbes_v(f) == pytest.approx(0.583175, rel=1e-6)
    assert forbes_t(f) == pytest.approx(1.059931, rel=1e-6)
    assert forbes_v(0.0) == 1.0 and forbes_t(0.0) == 1.0


def test_forbes_functions_only_on_the_schottky_nordheim_range():
    # Forbes 2006: the approximations are stated for 0 <= f <= 1; at f = 1 the field removes
    # the barrier, where the exact v(1) = 0 (Murphy & Good 1956). Outside: NaN, not a value.
    assert forbes_v(1.0) == pytest.approx(0.0, abs=1e-15)
    assert np.all(np.isnan(forbes_v(np.array([-0.1, 1.2]))))
    assert np.all(np.isnan(forbes_t(np.array([-0.1, 1.2]))))


def test_forbes_v_close_to_exact_schottky_nordheim_integral():
    # physics-references §2 [C]: exact v(f) by numerical integration 0.859439 / 0.581317 /
    # 0.169987 at f = 0.1 / 0.3555 / 0.8; Forbes 2006 stated accuracy ~0.3 %
    f = np.array([0.1, 0.3555, 0.8])
    exact = np.array([0.859439, 0.581317, 0.169987])
    assert np.max(np.abs(forbes_v(f) - exact)) < 3e-3


def test_schottky_nordheim_versus_elementary_fn_density():
    # Murphy & Good / Forbes 2006; physics-references §2 [C] at phi = 4.5 eV, F = 5 V/nm:
    # 3.79396e9 A/m^2 (SN barrier), 1.85704e7 A/m^2 (elementary, v = t = 1)
    j_sn = schottky_nordheim_current_density_A_per_m2(5.0, 4.5)
    assert j_sn == pytest.approx(3.79396e9, rel=1e-5)
    assert fowler_nordheim_current_density_A_per_m2(5.0, 4.5, 1.0) == pytest.approx(
        1.85704e7, rel=1e-5
    )


# ---- thermal factor: independent Fermi integral, and its validity limit -------------------


def _thermal_factor_by_fermi_integral(x):
    """Independent check: int exp(c e) f(e) de / int_{-inf}^0 exp(c e) de, with kT = 1, c = x/pi.

    The ratio of the current at temperature T to that at T = 0 for a transmission decaying as
    exp(c e) about the Fermi level (Murphy & Good 1956; Simmons 1964), by quadrature.
    """
    c = x / np.pi
    warm = integrate.quad(lambda e: np.exp(c * e) / (1 + np.exp(e)), -np.inf, 0)[0] + \
        integrate.quad(lambda e: np.exp((c - 1) * e) / (1 + np.exp(-e)), 0, np.inf)[0]
    return warm * c  # int_{-inf}^0 exp(c e) de = 1/c


@pytest.mark.parametrize("x", [0.05, 0.5, 1.0, 2.0, 3.0])
def test_thermal_factor_equals_the_fermi_integral(x):
    assert thermal_smearing_factor(x) == pytest.approx(_thermal_factor_by_fermi_integral(x),
                                                       rel=1e-7)


def test_thermal_factor_is_nan_at_its_pole_and_refused_beyond_the_limit():
    # The integral diverges at x = pi; the old code held the factor at 9.15 from 0.9 pi on.
    factor = thermal_smearing_factor(np.array([0.0, np.pi, 10.0, -1.0]))
    assert factor[0] == 1.0 and np.all(np.isnan(factor[1:]))
    assert THERMAL_ARGUMENT_LIMIT == 1.0
    # 1/sinc(x/pi) vs 1/sin(x): a reordered expression, a few ulp apart
    assert thermal_smearing_factor(THERMAL_ARGUMENT_LIMIT) == pytest.approx(1 / np.sin(1.0),
                                                                             rel=1e-13)
    # FN at 5 V/300 K in an 8 nm film: pi c kT = 2.7 -> the declaration refuses the point
    device = Device(area_cm2=AREA_CM2)
    params = {"barrier_height_eV": 3.0, "thickness_nm": 8.0, "effective_mass_ratio": 0.5}
    i = FOWLER_NORDHEIM.current(np.array([5.0, 5.0]), np.array([300.0, 4.2]), params, device)
    assert np.isnan(i[0]) and np.isfinite(i[1]) and i[1] > 0
    bare = FOWLER_NORDHEIM.current(5.0, 300.0, params, device, enforce_validity=False)
    assert bare > i[1]


def test_murphy_good_coefficient_is_forbes_decay_width():
    # Forbes' decay width d_F = 2F/(3 b sqrt(phi)) = 0.09759678 eV at phi = 1 eV, F = 1 V/nm
    # ("Field electron emission" article, eq. 14 [P]); c = 1/d_F for m* = m0, t = 1. The
    # article's constants are an older CODATA set: agreement to 1e-5, not 1e-6.
    assert 1 / murphy_good_thermal_coefficient(1.0, 1.0, 1.0) == pytest.approx(0.09759678,
                                                                               rel=2e-5)
