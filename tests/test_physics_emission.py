"""Physics of Schottky and Poole-Frenkel emission against outside values.

Check values from /work/shared/physics-references.md sections 0, 3 and 4 (recomputed there
from the published formulas with scipy.constants, CODATA 2022); sources named per check.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants

from mechid.catalogue import POOLE_FRENKEL, SCHOTTKY_EMISSION
from mechid.catalogue.emission import (
    POOLE_FRENKEL_ARRHENIUS_PLOT,
    POOLE_FRENKEL_PLOT,
    RICHARDSON_PLOT,
    SCHOTTKY_PLOT,
    dielectric_constant_from_field_slope,
    field_slope_sqrt_m_per_V,
    poole_frenkel_barrier_lowering_eV,
    poole_frenkel_current_density_A_per_cm2,
    richardson_dushman_current_density_A_per_cm2,
    schottky_barrier_lowering_eV,
    schottky_current_density_A_per_cm2,
    schottky_mim_current_density_A_per_cm2,
)
from mechid.constants import (
    POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V,
    RICHARDSON_A_CM2_K2,
    SCHOTTKY_BETA_EV_SQRT_M_PER_V,
)
from mechid.device import Device, Measured

AREA_CM2 = 1e-4
THICKNESS_NM = 20.0
DEVICE = Device(area_cm2=AREA_CM2, thickness_nm=Measured(THICKNESS_NM))
FIELD_1MV_PER_CM = 1e8  # V/m
SIGMA0_S_PER_CM = constants.e * 1.0 * 2.8e19  # e mu N_C with mu = 1 cm^2/Vs, N_C = 2.8e19 cm^-3


# ---- constants and barrier lowering ------------------------------------------------------


def test_richardson_constant():
    # A0 = 4 pi m_e k^2 e/h^3 = 120.1732 A cm^-2 K^-2 (physics-references §0 [C]; Sze & Ng 2007)
    a0 = RICHARDSON_A_CM2_K2
    assert a0 == pytest.approx(120.1732, rel=1e-5)


def test_barrier_lowering_coefficients():
    # physics-references §0 [C]: beta_S = 3.794686e-4, beta_PF = 7.589373e-4 eV (cm/V)^1/2
    # (eps_r = 1); beta_PF(eps_r = 3) = 4.381727e-4, textbook 4.40e-4 within 1 % [P]
    per_sqrt_cm = np.sqrt(100.0)  # (m/V)^1/2 -> (cm/V)^1/2
    beta_s, beta_pf = SCHOTTKY_BETA_EV_SQRT_M_PER_V, POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V
    assert beta_s * per_sqrt_cm == pytest.approx(3.794686e-4, rel=1e-6)
    assert beta_pf * per_sqrt_cm == pytest.approx(7.589373e-4, rel=1e-6)
    assert beta_pf * per_sqrt_cm / np.sqrt(3) == pytest.approx(4.381727e-4, rel=1e-6)
    assert beta_pf * per_sqrt_cm / np.sqrt(3) == pytest.approx(4.40e-4, rel=1e-2)


@pytest.mark.parametrize(("eps", "expected"), [(1.0, 0.379469), (2.13, 0.260008), (4.0, 0.189734)])
def test_schottky_lowering_at_1_MV_per_cm(eps, expected):
    # Sze & Ng 2007 image-force lowering; physics-references §3 [C]
    lowering = schottky_barrier_lowering_eV(FIELD_1MV_PER_CM, eps)
    assert lowering == pytest.approx(expected, rel=1e-5)


def test_poole_frenkel_lowering_is_schottky_lowering_at_quarter_permittivity():
    # Frenkel 1938: beta_PF = 2 beta_S; physics-references §4 [C]: 0.379469 eV at eps_r = 4
    pf = poole_frenkel_barrier_lowering_eV(FIELD_1MV_PER_CM, 4.0)
    assert pf == pytest.approx(0.379469, rel=1e-6)
    assert pf == pytest.approx(schottky_barrier_lowering_eV(FIELD_1MV_PER_CM, 1.0), rel=1e-14)


# ---- current densities -------------------------------------------------------------------


def test_richardson_dushman_density():
    # physics-references §3 [C]: phi_B = 1.0 eV, 300 K, A0 -> 1.71708e-10 A/cm^2
    j = richardson_dushman_current_density_A_per_cm2(300.0, 1.0)
    assert j == pytest.approx(1.71708e-10, rel=1e-5)


def test_schottky_density():
    # physics-references §3 [C]: phi_B = 1.0, eps_r = 4, 1 MV/cm, 300 K -> 2.64354e-7 A/cm^2,
    # phi_eff = 0.810266 eV
    j = schottky_current_density_A_per_cm2(FIELD_1MV_PER_CM, 300.0, 1.0, 4.0)
    assert j == pytest.approx(2.64354e-7, rel=1e-5)
    phi_eff = 1.0 - schottky_barrier_lowering_eV(FIELD_1MV_PER_CM, 4.0)
    assert phi_eff == pytest.approx(0.810266, rel=1e-6)


def test_poole_frenkel_density():
    # physics-references §4 [C]: mu = 1 cm^2/Vs, N_C = 2.8e19 cm^-3, phi_T = 1 eV, eps_r = 4,
    # 1 MV/cm, 300 K -> 1.68811e-4 A/cm^2, apparent E_a = 0.620531 eV
    j = poole_frenkel_current_density_A_per_cm2(FIELD_1MV_PER_CM, 300.0, 1.0, 4.0, SIGMA0_S_PER_CM)
    assert j == pytest.approx(1.68811e-4, rel=1e-5)
    e_a = 1.0 - poole_frenkel_barrier_lowering_eV(FIELD_1MV_PER_CM, 4.0)
    assert e_a == pytest.approx(0.620531, rel=1e-6)


def test_schottky_mim_current_passes_through_zero():
    # Sze & Ng 2007 / Simmons 1965: J = A* T^2 exp(-(phi_B - dphi)/kT) [1 - exp(-eV/kT)].
    # Near zero bias J/V -> A* T^2 exp(-phi_B/kT)/kT: physics-references §3 [C] gives the
    # Richardson-Dushman density 1.71708e-10 A/cm^2 at phi_B = 1 eV, 300 K (A* = A0), and
    # kT = 0.0258520 eV from scipy.constants. The old one-sided form stayed at 1.7e-10 as
    # V -> 0+ and jumped sign at 0 V.
    kT = constants.k * 300.0 / constants.e
    v = np.array([1e-12, 1e-10])
    j = schottky_mim_current_density_A_per_cm2(v, 300.0, 1.0, 4.0, 1.0, 20.0)
    assert j / v == pytest.approx(np.full(2, 1.71708e-10 / kT), rel=1e-4)
    params = {"barrier_height_eV": 1.0, "dielectric_constant": 4.0,
              "richardson_constant_ratio": 1.0, "thickness_nm": 20.0}
    i = SCHOTTKY_EMISSION.current(np.array([-1e-9, 0.0, 1e-9]), np.full(3, 300.0), params, DEVICE)
    assert i[1] == 0.0 and i[2] == -i[0]
    assert i[2] == pytest.approx(1.71708e-10 / kT * 1e-9 * AREA_CM2, rel=1e-4)


def test_schottky_mim_current_equals_one_sided_form_when_eV_much_larger_than_kT():
    # physics-references §3 [C]: phi_B = 1.0, eps_r = 4, 1 MV/cm, 300 K -> 2.64354e-7 A/cm^2;
    # with d = 20 nm that field is 2 V, eV/kT = 77: the reverse flux is exp(-77) of the forward.
    j = schottky_mim_current_density_A_per_cm2(2.0, 300.0, 1.0, 4.0, 1.0, 20.0)
    assert j == pytest.approx(2.64354e-7, rel=1e-5)
    # at eV = kT the bracket is 1 - 1/e (independent arithmetic)
    kT = constants.k * 300.0 / constants.e
    ratio = schottky_mim_current_density_A_per_cm2(kT, 300.0, 1.0, 4.0, 1.0, 20.0) / (
        schottky_current_density_A_per_cm2(kT / 20e-9, 300.0, 1.0, 4.0, 1.0))
    assert ratio == pytest.approx(1 - np.exp(-1.0), rel=1e-12)


def test_emission_formulas_are_not_clipped_where_the_lowering_exceeds_the_barrier():
    # Old code held the effective barrier at zero (J = A* T^2, sigma0 E). The bare formulas
    # now continue as published; the declarations refuse those points (test_physics_validity).
    field = np.array([1e10])  # lowering 0.38 eV x 10 = 3.8 eV at eps_r = 1 >> 0.3 eV
    lowering = schottky_barrier_lowering_eV(field, 1.0)
    kT = constants.k * 300.0 / constants.e
    j_s = schottky_current_density_A_per_cm2(field, 300.0, 0.3, 1.0, 2.0)
    assert j_s == pytest.approx(2.0 * RICHARDSON_A_CM2_K2 * 300.0**2
                                * np.exp((lowering - 0.3) / kT), rel=1e-9)
    assert j_s > 2.0 * RICHARDSON_A_CM2_K2 * 300.0**2


# ---- slopes and their inversion ----------------------------------------------------------


def test_schottky_slope_and_inversion():
    # physics-references §3 [C]: eps_r = 4, 300 K -> S = 7.339251e-4 (m/V)^1/2 -> eps_r = 4
    slope = field_slope_sqrt_m_per_V(300.0, 4.0, SCHOTTKY_BETA_EV_SQRT_M_PER_V)
    assert slope == pytest.approx(7.339251e-4, rel=1e-6)
    eps = dielectric_constant_from_field_slope(slope, 300.0, SCHOTTKY_BETA_EV_SQRT_M_PER_V)
    assert eps == pytest.approx(4.0, rel=1e-12)


def test_poole_frenkel_slope_and_inversion():
    # physics-references §4 [C]: eps_r = 4, 300 K -> 1.467850e-3 (m/V)^1/2 -> eps_r = 4
    slope = field_slope_sqrt_m_per_V(300.0, 4.0, POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V)
    assert slope == pytest.approx(1.467850e-3, rel=1e-6)
    eps = dielectric_constant_from_field_slope(slope, 300.0, POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V)
    assert eps == pytest.approx(4.0, rel=1e-12)


def test_poole_frenkel_versus_schottky_factor_four_ambiguity():
    # physics-references §3/§4 [C], 300 K: the PF slope of eps_r = 4 (1.467850e-3 (m/V)^1/2)
    # read as a Schottky slope gives eps_r = 1; the Schottky slope of eps_r = 4
    # (7.339251e-4) read as PF gives 16.
    eps = dielectric_constant_from_field_slope(np.array([1.467850e-3, 7.339251e-4]), 300.0,
                                               SCHOTTKY_BETA_EV_SQRT_M_PER_V)
    assert eps == pytest.approx([1.0, 4.0], rel=2e-6)
    eps = dielectric_constant_from_field_slope(np.array([1.467850e-3, 7.339251e-4]), 300.0,
                                               POOLE_FRENKEL_BETA_EV_SQRT_M_PER_V)
    assert eps == pytest.approx([4.0, 16.0], rel=2e-6)


def test_non_positive_slope_gives_nan_permittivity():
    eps = dielectric_constant_from_field_slope(np.array([0.0, -1e-3]), 300.0, 1.0)
    assert np.all(np.isnan(eps))


# ---- straightened plots on clean simulated data ------------------------------------------


def _fit(plot, v, t, i):
    x, y = plot.transform(v, t, i, DEVICE)
    return np.polyfit(x, y, 1)


def _schottky_current_written_here(v, t, phi, eps, ratio, d_nm):
    """Independent Schottky MIM current in A from scipy.constants (Sze & Ng 2007)."""
    e, k, eps0 = constants.e, constants.k, constants.epsilon_0
    a0 = 4 * np.pi * constants.m_e * k**2 * e / constants.h**3 * 1e-4  # A cm^-2 K^-2
    field = v / (d_nm * 1e-9)
    lowering = np.sqrt(e * field / (4 * np.pi * eps0 * eps))  # eV
    kT = k * t / e
    return (ratio * a0 * t**2 * np.exp(-(phi - lowering) / kT) * (1 - np.exp(-v / kT))
            * AREA_CM2)


def _poole_frenkel_current_written_here(v, t, phi, eps, sigma0, d_nm):
    """Independent Poole-Frenkel current in A from scipy.constants (Frenkel 1938)."""
    e, k, eps0 = constants.e, constants.k, constants.epsilon_0
    field = v / (d_nm * 1e-9)
    lowering = np.sqrt(e * field / (np.pi * eps0 * eps))  # eV
    return sigma0 * field * 1e-2 * np.exp(-(phi - lowering) / (k * t / e)) * AREA_CM2


def test_schottky_plot_recovers_permittivity_at_every_temperature():
    # Sze & Ng 2007: ln(I/T^2) vs sqrt(V) has slope beta_S/(kT sqrt(eps_r d)); S*T constant
    params = {"barrier_height_eV": 1.0, "dielectric_constant": 4.0,
              "richardson_constant_ratio": 0.3, "thickness_nm": THICKNESS_NM}
    # The data are the published formula written in this test, not mechid's model.
    v = np.linspace(0.5, 6.0, 12)
    for temperature in (250.0, 300.0, 350.0):
        t = np.full_like(v, temperature)
        i = _schottky_current_written_here(v, t, 1.0, 4.0, 0.3, THICKNESS_NM)
        np.testing.assert_allclose(SCHOTTKY_EMISSION.current(v, t, params, DEVICE), i,
                                   rtol=1e-12)
        slope, intercept = _fit(SCHOTTKY_PLOT, v, t, i)
        found = SCHOTTKY_PLOT.interpret(slope, intercept, temperature, DEVICE)
        assert found["dielectric_constant"] == pytest.approx(4.0, rel=1e-6)


def test_richardson_plot_recovers_effective_barrier_and_richardson_constant():
    # Sze & Ng 2007: ln(I/T^2) vs 1/T has slope -phi_eff/k and intercept ln(A* area)
    params = {"barrier_height_eV": 1.0, "dielectric_constant": 4.0,
              "richardson_constant_ratio": 0.3, "thickness_nm": THICKNESS_NM}
    t = np.linspace(250.0, 400.0, 10)
    v = np.full_like(t, 2.0)
    i = _schottky_current_written_here(v, t, 1.0, 4.0, 0.3, THICKNESS_NM)
    np.testing.assert_allclose(SCHOTTKY_EMISSION.current(v, t, params, DEVICE), i, rtol=1e-12)
    slope, intercept = _fit(RICHARDSON_PLOT, v, t, i)
    found = RICHARDSON_PLOT.interpret(slope, intercept, 2.0, DEVICE)
    field = 2.0 / (THICKNESS_NM * 1e-9)
    expected = 1.0 - schottky_barrier_lowering_eV(field, 4.0)
    assert found["effective_barrier_eV"] == pytest.approx(expected, rel=1e-9)
    assert found["richardson_constant_ratio"] == pytest.approx(0.3, rel=1e-7)
    assert found["richardson_constant_A_per_cm2_K2"] == pytest.approx(0.3 * 120.1732, rel=1e-5)


def test_poole_frenkel_plots_recover_permittivity_activation_energy_and_prefactor():
    # Frenkel 1938 / Sze & Ng 2007: ln(I/V) vs sqrt(V) -> eps_r; ln(I/V) vs 1/T -> E_a(E)
    params = {"trap_depth_eV": 1.0, "dielectric_constant": 4.0,
              "prefactor_S_per_cm": SIGMA0_S_PER_CM, "thickness_nm": THICKNESS_NM}
    v = np.linspace(0.5, 6.0, 12)
    t = np.full_like(v, 300.0)
    i = _poole_frenkel_current_written_here(v, t, 1.0, 4.0, SIGMA0_S_PER_CM, THICKNESS_NM)
    np.testing.assert_allclose(POOLE_FRENKEL.current(v, t, params, DEVICE), i, rtol=1e-12)
    slope, intercept = _fit(POOLE_FRENKEL_PLOT, v, t, i)
    found = POOLE_FRENKEL_PLOT.interpret(slope, intercept, 300.0, DEVICE)
    assert found["dielectric_constant"] == pytest.approx(4.0, rel=1e-8)
    # the same data read through the Schottky interpretation: eps_r / 4 (factor-4 ambiguity)
    as_schottky = SCHOTTKY_PLOT.interpret(slope, intercept, 300.0, DEVICE)
    assert as_schottky["dielectric_constant"] == pytest.approx(1.0, rel=1e-8)

    t = np.linspace(250.0, 400.0, 10)
    v = np.full_like(t, 2.0)
    i = _poole_frenkel_current_written_here(v, t, 1.0, 4.0, SIGMA0_S_PER_CM, THICKNESS_NM)
    slope, intercept = _fit(POOLE_FRENKEL_ARRHENIUS_PLOT, v, t, i)
    found = POOLE_FRENKEL_ARRHENIUS_PLOT.interpret(slope, intercept, 2.0, DEVICE)
    field = 2.0 / (THICKNESS_NM * 1e-9)
    expected = 1.0 - poole_frenkel_barrier_lowering_eV(field, 4.0)
    assert found["activation_energy_eV"] == pytest.approx(expected, rel=1e-9)
    assert found["prefactor_S_per_cm"] == pytest.approx(SIGMA0_S_PER_CM, rel=1e-7)


def test_plot_interpretation_without_thickness_is_empty():
    assert SCHOTTKY_PLOT.interpret(1.0, 0.0, 300.0, Device()) == {}
    assert POOLE_FRENKEL_PLOT.interpret(1.0, 0.0, 300.0, Device()) == {}
    assert set(RICHARDSON_PLOT.interpret(-1e4, 0.0, 1.0, Device())) == {"effective_barrier_eV"}
