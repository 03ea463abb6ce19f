"""Direct tunnelling between dissimilar electrodes (BDR 1970) and the BDR conductance test."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as sc
from scipy.integrate import quad

from mechid.catalogue import get_mechanism
from mechid.catalogue.tunnelling import (
    BDR_MAX_QUADRATIC_TERM,
    DISSIMILAR_ELECTRODE_TUNNELLING,
    bdr_conductance_coefficients,
    bdr_conductance_minimum_V,
    bdr_current_density_A_per_m2,
    bdr_decay_coefficient,
    bdr_relative_asymmetry,
    bdr_zero_bias_conductance_S_per_m2,
)
from mechid.catalogue.validity import validity_violations
from mechid.device import Device, Measured
from mechid.screening.conductance import conductance_parabola
from mechid.screening.screen import linearise
from mechid.simulate import simulate_series

MECHANISM = DISSIMILAR_ELECTRODE_TUNNELLING
DEVICE = Device(area_cm2=1e-4)
#: Fermi energy of the free-electron electrodes in the WKB integral (common textbook value).
FERMI_EV = 5.5


def wkb_current_density(voltage_V, phi1_eV, phi2_eV, thickness_nm, mass=1.0):
    """T = 0 WKB current density (A/m^2) through a trapezoidal barrier, written independently.

    Landauer/Simmons form J = (4 pi m e/h^3) int D(E_x) [xi1 - xi2] dE_x for free-electron
    electrodes, electrons flowing from electrode 1 (barrier phi1 above its Fermi level) to
    electrode 2 (phi2) at V > 0; the barrier top falls linearly from E_F + phi1 to
    E_F + phi2 - eV, and int sqrt(U(x) - E) dx over a linear U has the closed form
    (2d/3)(u2^1.5 - u1^1.5)/(u2 - u1). At V < 0 electrode 2 injects (phi1, phi2 swapped).
    """
    if voltage_V < 0:
        return -wkb_current_density(-voltage_V, phi2_eV, phi1_eV, thickness_nm, mass)
    kappa = np.sqrt(2 * mass * sc.m_e * sc.e) / sc.hbar * thickness_nm * 1e-9  # per sqrt(eV)

    def transmission(energy):
        u1, u2 = phi1_eV + FERMI_EV - energy, phi2_eV - voltage_V + FERMI_EV - energy
        mean_root = np.sqrt(u1) if abs(u2 - u1) < 1e-12 else (u2**1.5 - u1**1.5) / (1.5 * (u2 - u1))
        return np.exp(-2 * kappa * mean_root)

    window = FERMI_EV - voltage_V
    below = quad(lambda e: transmission(e) * voltage_V, 0, window, epsabs=0, epsrel=1e-11,
                 limit=200)[0]
    inside = quad(lambda e: transmission(e) * (FERMI_EV - e), window, FERMI_EV, epsabs=0,
                  epsrel=1e-11, limit=200)[0]
    return 4 * np.pi * mass * sc.m_e * sc.e / sc.h**3 * (below + inside) * sc.e**2


def wkb_conductance(voltage_V, phi1, phi2, d, step=1e-4):
    """dJ/dV of the WKB current by a central difference (S/m^2)."""
    return (wkb_current_density(voltage_V + step, phi1, phi2, d)
            - wkb_current_density(voltage_V - step, phi1, phi2, d)) / (2 * step)


def test_bdr_numbers_against_the_physics_sheet():
    # Physics sheet (independent evaluation of the BDR formulas, [C]): d = 15 A, phibar = 2 V,
    # dphi = 0.5 V, free-electron mass.
    assert bdr_decay_coefficient(1.5, 1.0) == pytest.approx(10.2463, rel=1e-5)
    c1, c2 = bdr_conductance_coefficients(2.0, 0.5, 1.5, 1.0)
    assert c1 == pytest.approx(-0.113207, rel=1e-5)
    assert c2 == pytest.approx(3.69096, rel=1e-5)
    assert bdr_conductance_minimum_V(2.0, 0.5, 1.5, 1.0) == pytest.approx(0.0153357, rel=1e-5)
    # The sheet's G(0) = 1.07402 S/cm^2 uses BDR's rounded constants (next test); with exact
    # constants, (e/h)^2 sqrt(2 m e phibar)/d exp(-2 d sqrt(2 m e phibar)/hbar), re-implemented
    # here from scipy.constants:
    momentum = np.sqrt(2 * sc.m_e * sc.e * 2.0)
    exact = (sc.e / sc.h) ** 2 * momentum / 1.5e-9 * np.exp(-2 * 1.5e-9 * momentum / sc.hbar)
    # exp of an argument of ~22: rtol 1e-12 (DEVELOPERS.md float policy).
    assert bdr_zero_bias_conductance_S_per_m2(2.0, 1.5, 1.0) == pytest.approx(exact, rel=1e-12)


def test_zero_bias_conductance_against_bdr_rounded_constants():
    # BDR (1970) print G(0) = 3.16e10 (phibar^1/2/d) exp(-1.025 d phibar^1/2) S/cm^2, d in A
    # (constants from memory, recomputed on the physics sheet as 3.15881e10 and 1.024633): the
    # three-digit rounding of 1.025 times an exponent of ~22 allows about 1 %.
    for d_angstrom, phibar in ((15.0, 2.0), (20.0, 1.0), (30.0, 3.0)):
        printed = 3.16e10 * np.sqrt(phibar) / d_angstrom * np.exp(-1.025 * d_angstrom
                                                                  * np.sqrt(phibar))
        ours = bdr_zero_bias_conductance_S_per_m2(phibar, d_angstrom / 10, 1.0) * 1e-4
        assert ours == pytest.approx(printed, rel=0.015)


@pytest.mark.parametrize(("phi1", "phi2", "d"), [(1.75, 2.25, 1.5), (1.0, 1.6, 2.0),
                                                 (2.5, 1.5, 2.0), (0.85, 1.15, 1.0)])
def test_bdr_conductance_against_independent_wkb_integral(phi1, phi2, d):
    phibar, dphi = (phi1 + phi2) / 2, phi2 - phi1
    c1, c2 = bdr_conductance_coefficients(phibar, dphi, d, 1.0)
    g0 = bdr_zero_bias_conductance_S_per_m2(phibar, d, 1.0)
    wkb_g0 = wkb_conductance(0.0, phi1, phi2, d)
    # BDR's G(0) is the leading order in 1/(A sqrt(phibar)); the exact WKB integral was measured
    # 3-11 % above it for these barriers.
    assert wkb_g0 / g0 == pytest.approx(1.0, abs=0.12)
    # The normalised parabola at low bias (c2 V^2 <= 0.25): within 2 % (measured <= 1.7 %).
    limit = np.sqrt(0.25 / c2)
    for v in np.array([-1.0, -0.5, 0.5, 1.0]) * limit:
        ratio = wkb_conductance(v, phi1, phi2, d) / wkb_g0
        assert ratio == pytest.approx(1 + c1 * v + c2 * v**2, rel=0.02)
    # The minimum of a parabola fitted to WKB G(V) within +/- 0.1 V: same sign as BDR's
    # -c1/(2 c2) and within 3/(A sqrt(phibar)) of it (BDR keep the leading order in
    # 1/(A sqrt(phibar)), A = 3 A0/2; measured 7-11 % apart for A sqrt(phibar) = 22-29 and 20 %
    # for 10).
    v = np.linspace(-0.1, 0.1, 21)
    g = np.array([wkb_conductance(x, phi1, phi2, d) for x in v])
    p2, p1, _ = np.polyfit(v, g, 2)
    exponent = 1.5 * bdr_decay_coefficient(d, 1.0) * np.sqrt(phibar)
    assert -p1 / (2 * p2) == pytest.approx(-c1 / (2 * c2), rel=3.0 / exponent)


def test_current_against_wkb_asymmetry_and_simmons_polarity_rule():
    # dphi > 0: the electrode that is positive at V > 0 has the higher barrier (higher work
    # function); Simmons (J. Appl. Phys. 34, 2581 (1963), abstract): at low voltage more current
    # flows when the lower-work-function electrode is positive, i.e. |I(-V)| > |I(+V)|.
    phi1, phi2, d = 1.75, 2.25, 1.5
    params = {"mean_barrier_eV": 2.0, "barrier_difference_eV": 0.5, "thickness_nm": d,
              "effective_mass_ratio": 1.0}
    v = np.array([0.1, 0.2])
    for bias in v:
        current = MECHANISM.current(np.array([-bias, bias]), 4.2, params, DEVICE)
        assert -current[0] > current[1] > 0
        ours = -current[0] / current[1]
        wkb = -wkb_current_density(-bias, phi1, phi2, d) / wkb_current_density(bias, phi1, phi2, d)
        assert ours == pytest.approx(wkb, rel=0.01)  # measured 0.1-0.5 % apart
    # At 4.2 K the Simmons (1964) factor is 1 + 3e-5: the current is BDR's integral x area.
    density = bdr_current_density_A_per_m2(0.2, 2.0, 0.5, d, 1.0)
    assert MECHANISM.current(0.2, 4.2, params, DEVICE) == pytest.approx(density * 1e-8, rel=1e-4)


def test_mirror_symmetry_and_oddness_for_equal_barriers():
    v = np.linspace(-0.25, 0.25, 11)
    base = {"mean_barrier_eV": 1.5, "thickness_nm": 1.8, "effective_mass_ratio": 0.6}
    forward = MECHANISM.current(v, 200.0, {**base, "barrier_difference_eV": 0.4}, DEVICE)
    mirrored = MECHANISM.current(-v, 200.0, {**base, "barrier_difference_eV": -0.4}, DEVICE)
    # Same arithmetic on negated inputs: a few ulp (DEVELOPERS.md float policy).
    np.testing.assert_allclose(forward, -mirrored, rtol=1e-13, atol=0.0)
    symmetric = MECHANISM.current(v, 200.0, {**base, "barrier_difference_eV": 0.0}, DEVICE)
    np.testing.assert_allclose(symmetric, -symmetric[::-1], rtol=1e-13, atol=0.0)
    assert symmetric[5] == 0.0


def test_validity_domain_refuses_outside_the_expansion():
    inside = {"mean_barrier_eV": 2.0, "barrier_difference_eV": 0.5, "thickness_nm": 1.5,
              "effective_mass_ratio": 1.0}
    _, c2 = bdr_conductance_coefficients(2.0, 0.5, 1.5, 1.0)
    edge = np.sqrt(BDR_MAX_QUADRATIC_TERM / c2)
    v = np.array([-1.01 * edge, -0.99 * edge, 0.99 * edge, 1.01 * edge])
    current = MECHANISM.current(v, 77.0, inside, DEVICE)
    np.testing.assert_array_equal(np.isfinite(current), [False, True, True, False])
    found = {x.condition_id for x in validity_violations(
        MECHANISM, v, np.full(4, 77.0), {k: np.array([val]) for k, val in inside.items()}, DEVICE)}
    assert found == {"low_bias_expansion"}
    # |dphi| > phibar (BDR's stated range), an almost transparent barrier, a hot one.
    cases = {
        "barrier_asymmetry_below_mean": dict(inside, mean_barrier_eV=0.4, barrier_difference_eV=-0.5),
        "opaque_barrier": dict(inside, mean_barrier_eV=0.12, barrier_difference_eV=0.0,
                               thickness_nm=1.0, effective_mass_ratio=0.3),
        "thermal_factor_argument": dict(inside, thickness_nm=6.0, barrier_difference_eV=0.0,
                                        mean_barrier_eV=0.5),
    }
    for condition, params in cases.items():
        assert np.isnan(MECHANISM.current(0.01, 300.0, params, DEVICE))
        found = {x.condition_id for x in validity_violations(
            MECHANISM, [0.01], [300.0], {k: np.array([val]) for k, val in params.items()},
            DEVICE)}
        assert condition in found


def test_relative_asymmetry_inverts_the_bdr_coefficients():
    # dphi/phibar = -3 sqrt(2) c1/sqrt(c2) holds for any thickness and mass (derived).
    for phibar, dphi, d, m in ((2.0, 0.5, 1.5, 1.0), (1.2, -0.7, 3.0, 0.4), (3.5, 0.2, 1.1, 0.9)):
        c1, c2 = bdr_conductance_coefficients(phibar, dphi, d, m)
        assert bdr_relative_asymmetry(c1, c2) == pytest.approx(dphi / phibar, rel=1e-13)
    assert np.isnan(bdr_relative_asymmetry(0.1, -1.0))


def _series(params, voltages, temperatures=(77.0, 150.0, 300.0), noise=0.0, seed=None):
    rng = None if seed is None else np.random.default_rng(seed)
    return simulate_series(MECHANISM, params, temperatures, voltages, DEVICE_WITH_FILM,
                           noise_relative=noise, rng=rng)


DEVICE_WITH_FILM = Device(area_cm2=1e-4, thickness_nm=Measured(1.5, 0.05),
                          effective_mass_ratio=Measured(1.0, 0.05))
TRUTH = {"mean_barrier_eV": 2.0, "barrier_difference_eV": 0.5, "thickness_nm": 1.5,
         "effective_mass_ratio": 1.0}


def test_conductance_test_recovers_the_asymmetry_from_clean_data():
    series = _series(TRUTH, np.linspace(-0.3, 0.3, 41), temperatures=(77.0,))
    (record,) = linearise(series, DEVICE_WITH_FILM).conductance_asymmetry
    assert record.determined
    # Numerical dI/dV of an exact cubic (second-order differences) and an OLS parabola: exact
    # up to the x/sin x factor's slight bias dependence at 77 K.
    assert record.minimum_bias_V == pytest.approx(0.0153357, rel=0.01)
    assert record.relative_asymmetry == pytest.approx(0.25, rel=0.01)
    assert record.barrier_difference_eV == pytest.approx(0.5, rel=0.01)
    assert record.mean_barrier_eV == pytest.approx(2.0, rel=0.01)


def test_conductance_test_recovers_the_asymmetry_within_its_errors_on_noisy_data():
    # 0.2 % relative noise, three temperatures, ten seeds: |estimate - truth| / error should
    # look standard normal; allow 3 sigma each and a mean |z| below 1.5.
    z = []
    for seed in range(10):
        series = _series(TRUTH, np.linspace(-0.3, 0.3, 41), noise=0.002, seed=100 + seed)
        for record in linearise(series, DEVICE_WITH_FILM).conductance_asymmetry:
            assert record.determined
            z.append((record.relative_asymmetry - 0.25) / record.relative_asymmetry_err)
    z = np.abs(z)
    assert np.all(z < 3.5) and np.mean(z) < 1.5


def test_conductance_test_says_not_determined():
    one_polarity = _series(TRUTH, np.linspace(0.01, 0.3, 30), temperatures=(300.0,))
    (record,) = linearise(one_polarity, DEVICE_WITH_FILM).conductance_asymmetry
    assert not record.determined and "both bias polarities" in record.detail
    assert record.to_dict()["minimum_bias_V"] is None
    sparse = _series(TRUTH, [-0.3, -0.2, 0.1, 0.2, 0.3], temperatures=(300.0,))
    (record,) = linearise(sparse, DEVICE_WITH_FILM).conductance_asymmetry
    assert not record.determined and "too few low-bias points" in record.detail
    # Without the device thickness and mass the ratio is still determined, the barriers not.
    series = _series(TRUTH, np.linspace(-0.3, 0.3, 41), temperatures=(77.0,))
    record = conductance_parabola(series.voltage_V, series.current_A, 77.0, DEVICE)
    assert record.determined and record.barrier_difference_eV is None
    assert record.relative_asymmetry == pytest.approx(0.25, rel=0.01)


def test_conductance_test_on_a_symmetric_junction_finds_no_offset():
    symmetric = dict(TRUTH, barrier_difference_eV=0.0)
    series = _series(symmetric, np.linspace(-0.3, 0.3, 41), noise=0.002, seed=7)
    for record in linearise(series, DEVICE_WITH_FILM).conductance_asymmetry:
        assert abs(record.minimum_bias_V) < 3.5 * record.minimum_bias_err_V


def test_registered():
    assert get_mechanism("dissimilar_electrode_tunnelling") is MECHANISM
    assert not MECHANISM.is_odd


def test_needs_both_polarities_but_not_a_large_asymmetry():
    # The BDR asymmetry is a few per cent at low bias, far below the polarity diagnostic's
    # factor 1.5, so only both polarities are required.
    assert MECHANISM.needs == ("both_polarities",)
