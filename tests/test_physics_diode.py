"""Physics of the Schottky-diode hypotheses against outside values.

Constants are recomputed here from scipy.constants (independent of mechid.constants); check
values come from /work/shared/physics-references.md section 14 ([C]: computed there from the
published formulas with scipy.constants) and from independent solutions written in this file
(a bracketing root solve of the implicit diode law, quadrature of a Gaussian barrier average).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants, integrate, optimize, special

from mechid.catalogue import (
    INHOMOGENEOUS_SCHOTTKY_DIODE,
    LATERAL_2D_SCHOTTKY_DIODE,
    SCHOTTKY_DIODE,
)
from mechid.catalogue.diode import (
    barrier_sd_from_two_temperatures_V,
    diode_current_A,
    diode_residual_A,
    inhomogeneous_apparent_barrier_eV,
    inhomogeneous_ideality_factor,
    lambert_w_from_log,
    lateral_2d_saturation_current_A,
    richardson_constant_A_cm2_K2,
    thermionic_saturation_current_A,
)
from mechid.catalogue.validity import validity_violations
from mechid.device import Device

AREA_CM2 = 1e-3
DEVICE = Device(area_cm2=AREA_CM2)
DIODES = (SCHOTTKY_DIODE, INHOMOGENEOUS_SCHOTTKY_DIODE, LATERAL_2D_SCHOTTKY_DIODE)
K_EV = constants.k / constants.e  # Boltzmann constant in eV/K (CODATA, scipy.constants)
#: A0 = 4 pi e m0 k^2/h^3 in A cm^-2 K^-2 (Sze & Ng 2007), from scipy.constants.
A0 = 4 * np.pi * constants.e * constants.m_e * constants.k**2 / constants.h**3 * 1e-4


def _plain_diode_A(v, t, i_s, n, r_sh):
    """Diode law without series resistance (explicit): I_s[exp(eV/nkT) - 1] + V/R_sh."""
    return i_s * np.expm1(v / (n * K_EV * t)) + v / r_sh


# ---- constants and saturation currents ---------------------------------------------------


def test_richardson_constant_from_scipy_constants():
    # A** = A0 m*/m0 with A0 = 4 pi e m k^2/h^3 (Sze & Ng 2007); 120.1732 in
    # physics-references §0 [C]
    assert richardson_constant_A_cm2_K2(1.0) == pytest.approx(A0, rel=1e-13)
    free_electron_value = A0
    assert free_electron_value == pytest.approx(120.1732, rel=1e-6)
    assert richardson_constant_A_cm2_K2(0.26) == pytest.approx(0.26 * A0, rel=1e-13)


def test_saturation_current_worked_value():
    # physics-references §14 [C]: A = 1e-3 cm^2, A** = 0.22 A0, phi_B = 0.9 eV, 300 K
    # -> I_s = 1.80775e-12 A (Sze & Ng 2007 thermionic-emission saturation current)
    i_s = thermionic_saturation_current_A(300.0, 0.9, 0.22 * A0, 1e-3)
    assert i_s == pytest.approx(1.80775e-12, rel=1e-5)


def test_lateral_2d_saturation_scales_as_t_to_three_halves():
    # Ang, Yang & Ang, PRL 121, 056802 (2018): ln(J/T^(3/2)) linear in 1/T, slope -phi_B/k
    t = np.array([150.0, 250.0, 400.0])
    i_s = lateral_2d_saturation_current_A(t, 0.45, 2e-7)
    slope, intercept = np.polyfit(1.0 / t, np.log(i_s / t**1.5), 1)
    assert -slope * K_EV == pytest.approx(0.45, rel=1e-10)
    assert np.exp(intercept) == pytest.approx(2e-7, rel=1e-9)
    # the same data are not straight on the classic ln(I/T^2) plot with that slope
    slope_t2, _ = np.polyfit(1.0 / t, np.log(i_s / t**2), 1)
    assert -slope_t2 * K_EV != pytest.approx(0.45, rel=1e-3)


# ---- Lambert W ---------------------------------------------------------------------------


def test_lambert_w_matches_scipy_where_z_is_representable():
    log_z = np.linspace(-39.0, 700.0, 5001)
    reference = special.lambertw(np.exp(log_z), tol=1e-15).real
    np.testing.assert_allclose(lambert_w_from_log(log_z), reference, rtol=1e-13, atol=0.0)


def test_lambert_w_solves_its_defining_equation_beyond_overflow():
    # W e^W = z  <=>  ln W + W = ln z (Corless et al. 1996); ln z up to 1e6 overflows exp
    log_z = np.geomspace(1.0, 1e6, 400)
    w = lambert_w_from_log(log_z)
    np.testing.assert_allclose(np.log(w) + w, log_z, rtol=1e-14)
    assert np.all(np.diff(w) > 0)


def test_lambert_w_of_tiny_argument_is_the_argument():
    # W(z) = z - z^2 + ... (Corless et al. 1996); below ln z = -40 z^2 is under one ulp of z
    log_z = np.array([-45.0, -300.0, -800.0])
    np.testing.assert_allclose(lambert_w_from_log(log_z), np.exp(log_z), rtol=1e-15)


# ---- the diode law with series and shunt resistance --------------------------------------


GRID_V = np.round(np.linspace(-2.0, 1.0, 31), 10)
GRID_V = GRID_V[GRID_V != 0.0]


@pytest.mark.parametrize("series_ohm", [1e-9, 1e-2, 10.0, 1e4, 1e8])
@pytest.mark.parametrize("shunt_ohm", [1e3, 1e8, np.inf])
@pytest.mark.parametrize(("barrier_eV", "richardson"), [(0.7, 30.0), (0.1, 1e3)])
def test_closed_form_equals_bracketing_root_of_implicit_law(series_ohm, shunt_ohm, barrier_eV,
                                                            richardson):
    # Independent solution: brentq on the implicit equation (Sze & Ng 2007), bracketed by
    # 0 and V/R_s (the junction voltage V - I R_s has the sign of I). The 0.1 eV barrier with
    # R_s = 1e8 ohm puts R_s I_s up to 1e15 nkT/e: the series resistance takes the bias.
    worst = 0.0
    for t in (40.0, 100.0, 300.0, 400.0):
        i_s = thermionic_saturation_current_A(t, barrier_eV, richardson, AREA_CM2)
        closed = diode_current_A(GRID_V, t, i_s, 1.2, series_ohm, shunt_ohm)
        for v, i in zip(GRID_V, closed, strict=True):
            lo, hi = sorted((0.0, v / series_ohm))
            root = optimize.brentq(diode_residual_A, lo, hi, xtol=1e-300, rtol=1e-15,
                                   maxiter=1000, args=(v, t, i_s, 1.2, series_ohm, shunt_ohm))
            worst = max(worst, abs(i / root - 1.0))
    # the root solve is good to ~1e-15; the closed form passes exp/log of arguments up to ~300
    # (forward bias at 40 K), which amplifies an ulp to ~1e-13
    assert worst < 1e-12


def test_vanishing_series_resistance_gives_the_plain_diode_law():
    # R_s -> 0: I = I_s[exp(eV/nkT) - 1] + V/R_sh (Sze & Ng 2007), explicit; R_s = 1e-15 ohm
    # keeps I R_s below 1e-13 nkT/e here (currents up to ~30 A at 1 V, 300 K)
    for t in (150.0, 300.0):
        i_s = thermionic_saturation_current_A(t, 0.9, 50.0, AREA_CM2)
        closed = diode_current_A(GRID_V, t, i_s, 1.3, 1e-15, 1e7)
        np.testing.assert_allclose(closed, _plain_diode_A(GRID_V, t, i_s, 1.3, 1e7), rtol=1e-10)


def test_infinite_shunt_equals_very_large_shunt():
    t = 300.0
    i_s = thermionic_saturation_current_A(t, 0.6, 50.0, AREA_CM2)
    no_shunt = diode_current_A(GRID_V, t, i_s, 1.1, 5.0, np.inf)
    huge = diode_current_A(GRID_V, t, i_s, 1.1, 5.0, 1e30)
    np.testing.assert_allclose(no_shunt, huge, rtol=1e-12)
    # reverse bias without shunt saturates at -I_s (exp(-2 V/nkT) ~ 1e-31 is negligible)
    assert no_shunt[0] == pytest.approx(-i_s, rel=1e-12)


def test_zero_bias_gives_zero_current():
    i_s = thermionic_saturation_current_A(300.0, 0.5, 50.0, AREA_CM2)
    i = diode_current_A(0.0, 300.0, i_s, 1.2, 10.0, 1e6)
    assert abs(i) < 1e-13 * i_s


def test_forward_slope_is_e_over_n_k_t():
    # For eV >> nkT and negligible R_s: d ln I/dV = e/(n k T) (Sze & Ng 2007; the semilog
    # plot that reads the ideality factor)
    t, n = 300.0, 1.25
    i_s = thermionic_saturation_current_A(t, 0.8, 100.0, AREA_CM2)
    v = np.array([0.60, 0.61])  # exp(-eV/nkT) < 1e-8: the -1 of the diode law is negligible
    i = diode_current_A(v, t, i_s, n, 1e-9, np.inf)
    slope = np.diff(np.log(i))[0] / 0.01
    assert slope == pytest.approx(1.0 / (n * K_EV * t), rel=1e-6)


def test_series_resistance_limits_large_forward_current():
    # Far above the knee the junction voltage grows only logarithmically: dV/dI -> R_s
    t, r_s = 300.0, 50.0
    i_s = thermionic_saturation_current_A(t, 0.5, 100.0, AREA_CM2)
    v = np.array([5.0, 5.01])
    i = diode_current_A(v, t, i_s, 1.0, r_s, np.inf)
    assert 0.01 / np.diff(i)[0] == pytest.approx(r_s, rel=0.01)


# ---- Gaussian barrier inhomogeneity (Werner & Guettler 1991) -----------------------------


def test_apparent_barrier_check_values():
    # physics-references §14 [C]: phibar = 1.0 eV, sigma = 0.1 V -> phi_ap = 0.806591 eV at
    # 300 K and 0.419774 eV at 100 K
    phi = inhomogeneous_apparent_barrier_eV(np.array([300.0, 100.0]), 1.0, 0.1)
    np.testing.assert_allclose(phi, [0.806591, 0.419774], rtol=1e-6)


def test_apparent_barrier_is_the_gaussian_average_of_the_emission():
    # Independent derivation: <exp(-phi/kT)> over a Gaussian of mean phibar, sd sigma,
    # by quadrature, equals exp(-phi_ap/kT)
    t, phibar, sigma = 200.0, 0.9, 0.07
    kt = K_EV * t

    def integrand(phi):
        return np.exp(-phi / kt) * np.exp(-0.5 * ((phi - phibar) / sigma) ** 2) / (
            sigma * np.sqrt(2 * np.pi))

    peak = phibar - sigma**2 / kt  # where the integrand peaks
    average, _ = integrate.quad(integrand, peak - 12 * sigma, peak + 12 * sigma,
                                epsabs=0.0, epsrel=1e-12, limit=200)
    phi_ap = inhomogeneous_apparent_barrier_eV(t, phibar, sigma)
    assert -kt * np.log(average) == pytest.approx(phi_ap, rel=1e-10)


def test_two_temperatures_give_mean_barrier_and_sd():
    # Werner & Guettler: phi_ap against 1/(2kT) is a line, slope -sigma^2, intercept phibar
    phibar, sd = barrier_sd_from_two_temperatures_V(300.0, 0.806591, 100.0, 0.419774)
    assert phibar == pytest.approx(1.0, rel=1e-5)
    assert sd == pytest.approx(0.1, rel=1e-5)


def test_inhomogeneous_ideality():
    # 1/n - 1 = -rho2 + e rho3/(2kT) (Werner & Guettler 1991), recomputed with scipy constants
    kt = K_EV * 300.0
    expected = 1.0 / (1.0 - 0.1 + (-0.005) / (2 * kt))
    assert inhomogeneous_ideality_factor(300.0, 0.1, -0.005) == pytest.approx(expected, rel=1e-13)
    assert expected == pytest.approx(1.24488, rel=1e-4)
    assert inhomogeneous_ideality_factor(77.0, 0.0, 0.0) == 1.0  # homogeneous, ideal
    # rho3 < 0 gives the T0 effect: n rises on cooling
    n = inhomogeneous_ideality_factor(np.array([100.0, 200.0, 300.0]), 0.02, -0.002)
    assert np.all(np.diff(n) < 0)


def test_homogeneous_limit_of_the_inhomogeneous_diode():
    # sigma = 0, rho3 = 0, rho2 = 1 - 1/n: the inhomogeneous diode is the plain diode law
    v, t = GRID_V, np.full_like(GRID_V, 250.0)
    plain = SCHOTTKY_DIODE.current(v, t, dict(
        barrier_height_eV=0.7, ideality_factor=1.25, richardson_constant_A_cm2_K2=40.0,
        series_resistance_ohm=30.0, shunt_resistance_ohm=1e9), DEVICE)
    inhomogeneous = INHOMOGENEOUS_SCHOTTKY_DIODE.current(v, t, dict(
        mean_barrier_height_eV=0.7, barrier_variance_V2=0.0, voltage_coefficient_rho2=1 - 1 / 1.25,
        voltage_coefficient_rho3_V=0.0, richardson_constant_A_cm2_K2=40.0,
        series_resistance_ohm=30.0, shunt_resistance_ohm=1e9), DEVICE)
    np.testing.assert_allclose(inhomogeneous, plain, rtol=1e-12)


def test_inhomogeneous_validity_refuses_removed_barrier_and_ideality_below_one():
    v = np.array([-1.0, 0.3])
    base = dict(mean_barrier_height_eV=0.3, barrier_variance_V2=0.01, voltage_coefficient_rho2=0.0,
                voltage_coefficient_rho3_V=0.0, richardson_constant_A_cm2_K2=40.0,
                series_resistance_ohm=30.0, shunt_resistance_ohm=1e9)
    # sigma^2/(2kT) = 0.01/(2 x 3.45 meV) = 1.45 eV > 0.3 eV at 40 K; 0.19 eV < 0.3 at 300 K
    cold = INHOMOGENEOUS_SCHOTTKY_DIODE.current(v, np.full(2, 40.0), base, DEVICE)
    warm = INHOMOGENEOUS_SCHOTTKY_DIODE.current(v, np.full(2, 300.0), base, DEVICE)
    assert np.all(np.isnan(cold)) and np.all(np.isfinite(warm))
    found = validity_violations(INHOMOGENEOUS_SCHOTTKY_DIODE, v, np.full(2, 40.0),
                                {k: np.array([val]) for k, val in base.items()}, DEVICE)
    assert [f.condition_id for f in found] == ["barrier_not_removed_by_spread"]
    assert found[0].extreme_value == pytest.approx(0.01 / (2 * K_EV * 40.0) / 0.3, rel=1e-12)
    # rho3 > 0 gives 1/n - 1 > 0, i.e. n < 1: refused; rho3 so negative that 1/n <= 0: refused
    for rho3 in (0.004, -0.03):
        params = {**base, "barrier_variance_V2": 0.0, "voltage_coefficient_rho3_V": rho3}
        assert np.all(np.isnan(INHOMOGENEOUS_SCHOTTKY_DIODE.current(
            v, np.full(2, 100.0), params, DEVICE)))
        assert INHOMOGENEOUS_SCHOTTKY_DIODE.current(
            v, np.full(2, 100.0), params, DEVICE, enforce_validity=False) is not None


# ---- declarations: signed, broadcasting, monotonic, finite -------------------------------


def _prior_draws(mechanism, rng, m):
    draws = {}
    for p in mechanism.parameters:
        lo, hi = (np.log10(p.lower), np.log10(p.upper)) if p.log_scale else (p.lower, p.upper)
        u = rng.uniform(lo, hi, size=(m, 1))
        draws[p.name] = 10**u if p.log_scale else u
    return draws


@pytest.mark.parametrize("mechanism", DIODES, ids=[m.id for m in DIODES])
def test_broadcasting_equals_per_row_evaluation(mechanism):
    rng = np.random.default_rng(11)
    draws = _prior_draws(mechanism, rng, 5)
    v = np.linspace(-2.0, 1.0, 13)
    t = np.linspace(40.0, 400.0, 13)
    batch = mechanism.current(v, t, draws, DEVICE)
    assert batch.shape == (5, 13)
    rows = np.array([mechanism.current(v, t, {k: float(a[j, 0]) for k, a in draws.items()},
                                       DEVICE) for j in range(5)])
    # batched vs row-wise NumPy kernels may differ by an ulp, amplified by exp (DEVELOPERS.md)
    np.testing.assert_allclose(batch, rows, rtol=1e-12, atol=0.0, equal_nan=True)


@pytest.mark.parametrize("mechanism", DIODES, ids=[m.id for m in DIODES])
def test_rectifying_monotonic_and_finite_over_the_prior(mechanism):
    rng = np.random.default_rng(5)
    draws = _prior_draws(mechanism, rng, 400)
    v = np.linspace(-2.0, 1.0, 61)
    for t in (40.0, 150.0, 400.0):
        i = mechanism.current(v, np.full_like(v, t), draws, DEVICE)
        valid = np.all(np.isfinite(i), axis=1)
        if mechanism.validity:
            assert valid.any()
        else:
            assert valid.all()
        i = i[valid]
        assert np.all(np.diff(i, axis=1) >= 0.0)  # current never falls with bias
        assert np.all(i[:, v < 0] <= 0.0) and np.all(i[:, v > 0] >= 0.0)
        # rectifying: forward current at +1 V exceeds the reverse magnitude at -1 V
        forward, reverse = i[:, v == 1.0][:, 0], -i[:, np.isclose(v, -1.0)][:, 0]
        assert np.all(forward >= reverse * (1 - 1e-9))  # equal (to rounding) when ohmic


def test_lateral_2d_needs_no_area_and_the_3d_diode_does():
    params = LATERAL_2D_SCHOTTKY_DIODE.typical_parameters()
    assert np.isfinite(LATERAL_2D_SCHOTTKY_DIODE.current(0.5, 300.0, params, Device()))
    assert not LATERAL_2D_SCHOTTKY_DIODE.needs_area and SCHOTTKY_DIODE.needs_area


def test_device_richardson_constant_becomes_the_prior():
    from mechid.device import Measured
    from mechid.inference.priors import parameter_prior

    parameter = SCHOTTKY_DIODE.parameter("richardson_constant_A_cm2_K2")
    prior = parameter_prior(parameter, Device(area_cm2=1e-3,
                                              richardson_constant_A_cm2_K2=Measured(112.0, 10.0)))
    assert prior.kind == "truncated_normal" and prior.mean == 112.0 and prior.sd == 10.0
