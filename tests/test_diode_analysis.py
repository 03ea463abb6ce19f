"""The rectifying-contact analysis (mechid.screening.diode) on independently simulated diodes.

The currents are simulated here, not with mechid: the implicit diode law with series and
shunt resistance, I = I_s[exp(e(V - I R_s)/(n k T)) - 1] + (V - I R_s)/R_sh,
I_s = A A** T^2 exp(-e phi/kT) (Sze & Ng 2007, metal-semiconductor chapter), solved point by
point with scipy's brentq. Constants from scipy.constants (CODATA). The tolerances are the
accuracy of the hand methods on these curves, measured once and stated beside each check
(the straight-region rule leaves a small bias: the curve bends at both ends of any window).
"""

from __future__ import annotations

import json
import math
from types import SimpleNamespace

import numpy as np
import pytest
from scipy import constants
from scipy.optimize import brentq

from mechid.device import Device, Measured
from mechid.screening import linearise
from mechid.screening.biases import prepare_series
from mechid.screening.diode import (
    ForwardBranch,
    diode_analysis,
    gaussian_richardson_fit,
    local_window,
    norde_function_V,
    norde_minimum,
    start_values,
)
from mechid.screening.records import DiodeLine

KB_EV = constants.k / constants.e
#: Richardson constant 4 pi m_e k^2 e/h^3 in A cm^-2 K^-2 (120.173 in the shared reference
#: sheet, computed there with scipy.constants).
A0 = 4 * math.pi * constants.m_e * constants.k**2 * constants.e / constants.h**3 * 1e-4
AREA_CM2 = 1e-3
RICHARDSON = 26.4  # A cm^-2 K^-2, about 0.22 A0
DEVICE = Device(area_cm2=AREA_CM2, richardson_constant_A_cm2_K2=Measured(RICHARDSON))


def diode_current(v: float, t: float, saturation: float, ideality: float, rs: float,
                  rsh: float) -> float:
    """Forward current of the implicit diode law, solved for I with brentq (0 < I < V/R_s)."""
    vt = KB_EV * t

    def residual(i: float) -> float:
        vd = v - i * rs
        return i - saturation * math.expm1(vd / (ideality * vt)) - vd / rsh

    # The root lies in 0 < I < min(V/R_s, I(R_s = 0)): residual(0) < 0 < residual(upper).
    upper = saturation * math.expm1(v / (ideality * vt)) + v / rsh
    if rs == 0:
        return upper  # explicit without series resistance
    return brentq(residual, 0.0, min(upper, v / rs), xtol=1e-300, rtol=1e-15, maxiter=500)


def werner_guttler_barrier(mean_eV: float, spread_V: float, t: float) -> float:
    """phi_ap = phibar - e sigma^2/(2kT) (Werner & Güttler, J. Appl. Phys. 69, 1522 (1991))."""
    return mean_eV - spread_V**2 / (2 * KB_EV * t)


def simulate(temps, volts, barrier, ideality, rs=20.0, rsh=1e12, noise=0.0, seed=0,
             both_polarities=False):
    """A series on the T x V grid; barrier(T) and ideality(T) are callables."""
    rng = np.random.default_rng(seed)
    rows = []
    for t in temps:
        saturation = AREA_CM2 * RICHARDSON * t**2 * math.exp(-barrier(t) / (KB_EV * t))
        for v in volts:
            rows.append((t, v, diode_current(v, t, saturation, ideality(t), rs, rsh)))
            if both_polarities:  # reverse bias: -I_s(1 - exp(-e|V|/nkT)) - |V|/R_sh
                rows.append((t, -v, -saturation * -math.expm1(-v / (ideality(t) * KB_EV * t))
                             - v / rsh))
    t, v, i = (np.array(c, dtype=float) for c in zip(*rows, strict=True))
    if noise:
        i = i * np.exp(noise * rng.standard_normal(i.size))
    return SimpleNamespace(temperature_K=t, voltage_V=v, current_A=i)


def analyse(series, device=DEVICE):
    return diode_analysis(prepare_series(series, 0), device)


TEMPS = np.arange(250.0, 401.0, 30.0)
VOLTS = np.linspace(0.01, 0.8, 80)


@pytest.fixture(scope="module")
def homogeneous():
    """n = 1.05, phi_B = 0.75 eV, R_s = 20 ohm, R_sh = 1e12 ohm at 250-400 K."""
    return analyse(simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05, both_polarities=True))


def test_homogeneous_diode_per_temperature(homogeneous):
    assert homogeneous.ran and homogeneous.forward_polarity == "positive"
    determined = [r for r in homogeneous.temperatures if r.semilog.determined]
    assert len(determined) >= 4
    # Tolerances: about three times the largest error measured on these curves (in brackets).
    for r in determined:
        q = r.semilog.quantities
        # Semilog line [n 0.3 %, phi_ap 1 meV].
        assert q["ideality_factor"] == pytest.approx(1.05, rel=0.01)
        assert q["apparent_barrier_eV"] == pytest.approx(0.75, abs=0.003)
        assert q["apparent_barrier_eV_err"] > 0 and q["ideality_factor_err"] > 0
        # Cheung & Cheung (1986) [R_s 0.3 %, n 0.8 %; H(I): R_s 0.4 %, phi_B 2 meV].
        cheung = r.cheung_derivative.quantities
        assert cheung["series_resistance_ohm"] == pytest.approx(20.0, rel=0.01)
        assert cheung["ideality_factor"] == pytest.approx(1.05, rel=0.025)
        assert r.cheung_h.quantities["series_resistance_ohm"] == pytest.approx(20.0, rel=0.015)
        assert r.cheung_h.quantities["barrier_height_eV"] == pytest.approx(0.75, abs=0.006)
        # Norde/Bohlin minimum with gamma = 2 > n [phi_B 0.6 meV, R_s 0.8 %].
        assert r.norde.determined and r.norde.gamma == 2
        assert r.norde.barrier_height_eV == pytest.approx(0.75, abs=0.002)
        assert r.norde.series_resistance_ohm == pytest.approx(20.0, rel=0.025)


def test_homogeneous_diode_across_temperatures(homogeneous):
    richardson = homogeneous.richardson.quantities
    # Richardson plot [barrier 2 meV, A** 8 %]: the intercept extrapolates from
    # 1/T = 0.0029-0.004 1/K to 0, so small errors in I_s grow.
    assert richardson["barrier_height_eV"] == pytest.approx(0.75, abs=0.006)
    assert richardson["richardson_constant_A_cm2_K2"] == pytest.approx(RICHARDSON, rel=0.25)
    # No inhomogeneity: the spread the few-meV semilog bias alone makes [0.010 V].
    spread = homogeneous.barrier_vs_inverse_2kt.quantities.get("barrier_spread_V", 0.0)
    assert spread < 0.02


def test_richardson_plot_on_ideal_diodes_returns_barrier_and_constant():
    # n = 1, no series resistance, no shunt: the semilog line is exact above 3kT/e, so the
    # Richardson plot must give phi_B and A** closely (1 meV, 3 %).
    series = simulate(np.arange(200.0, 351.0, 25.0), np.linspace(0.02, 0.5, 49),
                      lambda t: 0.7, lambda t: 1.0, rs=0.0, rsh=1e30)
    result = analyse(series)
    q = result.richardson.quantities
    assert result.richardson.n_points == 7
    assert q["barrier_height_eV"] == pytest.approx(0.7, abs=0.001)
    assert q["richardson_constant_A_cm2_K2"] == pytest.approx(RICHARDSON, rel=0.03)
    for r in result.temperatures:
        assert r.semilog.quantities["ideality_factor"] == pytest.approx(1.0, abs=0.005)
        # R_s = 0: the curve never bends, so F(V) has no minimum inside the range.
        assert not r.norde.determined and "no minimum" in r.norde.detail


def test_werner_guttler_closed_form_against_gaussian_integral():
    # phi_ap from averaging exp(-phi/kT) over a Gaussian of barriers, numerically, against the
    # closed form; the shared reference sheet's numbers 0.806591 (300 K) and 0.419774 eV
    # (100 K) for phibar = 1 eV, sigma = 0.1 V.
    for t, expected in ((300.0, 0.806591), (100.0, 0.419774)):
        vt = KB_EV * t
        phi = np.linspace(1.0 - 25 * 0.1, 1.0 + 25 * 0.1, 400001)
        gauss = np.exp(-((phi - 1.0) ** 2) / (2 * 0.01)) / (0.1 * math.sqrt(2 * math.pi))
        mean = np.trapezoid(gauss * np.exp(-(phi - 1.0) / vt), phi)
        assert 1.0 - vt * math.log(mean) == pytest.approx(expected, abs=1e-6)
        assert werner_guttler_barrier(1.0, 0.1, t) == pytest.approx(expected, abs=1e-6)


def test_inhomogeneous_contact_recovers_spread_mean_barrier_and_rho():
    # Werner & Güttler (1991): sigma = 0.1 V, phibar = 0.95 eV; 1/n - 1 = -rho2 + rho3/(2kT)
    # with rho2 = -0.02, rho3 = -0.002 V (n from 1.02 at 350 K to 1.08 at 150 K).
    def ideality(t):
        return 1.0 / (1.0 + 0.02 - 0.002 / (2 * KB_EV * t))

    temps = np.arange(150.0, 351.0, 25.0)
    series = simulate(temps, np.linspace(0.01, 1.0, 100),
                      lambda t: werner_guttler_barrier(0.95, 0.1, t), ideality)
    result = analyse(series)
    # Measured errors in brackets; tolerances about three times larger.
    spread = result.barrier_vs_inverse_2kt.quantities
    assert spread["barrier_spread_V"] == pytest.approx(0.1, rel=0.02)  # [0.5 %]
    assert spread["mean_barrier_eV"] == pytest.approx(0.95, abs=0.006)  # [2 meV]
    rho = result.ideality_vs_inverse_2kt.quantities
    assert rho["rho3_V"] == pytest.approx(-0.002, abs=0.0006)  # [0.2 mV]
    assert rho["rho2"] == pytest.approx(-0.02, abs=0.006)  # [0.002]
    modified = result.modified_richardson.quantities
    assert modified["mean_barrier_eV"] == pytest.approx(0.95, abs=0.006)  # [2 meV]
    assert modified["richardson_constant_A_cm2_K2"] == pytest.approx(RICHARDSON, rel=0.1)  # [1 %]
    # The conventional Richardson plot is then far off: barrier and A** too low (the
    # signature Werner & Güttler explain).
    conventional = result.richardson.quantities
    assert conventional["barrier_height_eV"] < 0.95 - 0.2
    assert conventional["richardson_constant_A_cm2_K2"] < RICHARDSON / 100


def test_norde_minimum_against_hand_computed_example():
    # Hand computation (n = 1, gamma = 2, Norde 1979): T = 300 K, kT/e = 0.025852 V,
    # A = 1e-3 cm^2, A** = A0 = 120.173, phi_B = 0.8 eV, R_s = 100 ohm:
    # I_s = A A0 T^2 exp(-0.8/0.025852) = 3.9323e-10 A; the minimum sits where I0 R_s = kT/e,
    # I0 = 2.5852e-4 A, V0 = (kT/e) ln(I0/I_s + 1) + I0 R_s = 0.37217 V,
    # F0 = V0/2 - (kT/e) ln(I0/(A A0 T^2)) = 0.63977 V, phi_B = F0 + V0/2 - kT/e = 0.8000 eV.
    t, rs = 300.0, 100.0
    saturation = 3.9323e-10
    volts = np.arange(0.10, 0.60, 0.002)
    current = np.array([diode_current(v, t, saturation, 1.0, rs, 1e30) for v in volts])
    device = Device(area_cm2=1e-3, richardson_constant_A_cm2_K2=Measured(A0))
    minimum = norde_minimum(ForwardBranch(t, volts, current), 1.0, device)
    assert minimum.determined and minimum.gamma == 2
    assert minimum.voltage_V == pytest.approx(0.37217, abs=0.002)  # grid step 2 mV
    assert minimum.function_V == pytest.approx(0.63977, abs=2e-5)
    assert minimum.current_A == pytest.approx(2.5852e-4, rel=0.02)
    assert minimum.barrier_height_eV == pytest.approx(0.8000, abs=0.001)
    assert minimum.series_resistance_ohm == pytest.approx(100.0, rel=0.02)
    f = norde_function_V(volts, current, t, 2, 1e-3 * A0)
    assert float(f.min()) == pytest.approx(0.63977, abs=1e-4)


def test_without_area_or_richardson_constant_says_which_is_missing():
    series = simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05)
    result = analyse(series, Device(area_cm2=AREA_CM2))
    r = result.temperatures[0]
    assert "ideality_factor" in r.semilog.quantities
    assert "apparent_barrier_eV" not in r.semilog.quantities
    assert "richardson_constant_A_cm2_K2 not given" in r.semilog.detail
    assert not r.cheung_h.determined and "richardson_constant_A_cm2_K2" in r.cheung_h.detail
    assert not r.norde.determined and "richardson_constant_A_cm2_K2" in r.norde.detail
    assert not result.barrier_vs_inverse_2kt.determined
    assert not result.modified_richardson.determined
    # The Richardson plot still gives the barrier; without the area only the product A A**.
    bare = analyse(series, Device())
    assert "barrier_height_eV" in bare.richardson.quantities
    assert "area_times_richardson_A_K2" in bare.richardson.quantities
    assert "area_cm2 and richardson_constant_A_cm2_K2 not given" in bare.temperatures[0].semilog.detail


def test_one_temperature_gives_no_richardson_plot():
    result = analyse(simulate([300.0], VOLTS, lambda t: 0.75, lambda t: 1.05))
    assert result.ran
    for line in (result.richardson, result.barrier_vs_inverse_2kt,
                 result.ideality_vs_inverse_2kt):
        assert not line.determined and "1 temperature(s), 3 needed" in line.detail
        assert math.isnan(line.slope)
    assert not result.modified_richardson.determined


def test_too_few_points_and_non_rectifying_data_do_not_run():
    # Three forward points: one window, no degree of freedom left to show it is straight.
    few = analyse(simulate(TEMPS, np.array([0.1, 0.2, 0.3]), lambda t: 0.75,
                           lambda t: 1.05))
    assert not few.ran and "not run" in few.reason and few.temperatures == ()
    # An ohmic resistor: ln I vs V is not straight (local n grows like V), so no diode.
    t = np.repeat(TEMPS, VOLTS.size)
    v = np.tile(VOLTS, TEMPS.size)
    ohmic = analyse(SimpleNamespace(temperature_K=t, voltage_V=v, current_A=v / 1e3))
    assert not ohmic.ran and ohmic.richardson is None
    assert "no straight forward region of 1.5 decades at any temperature" in ohmic.reason


def test_negative_forward_polarity_is_found():
    series = simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05, both_polarities=True)
    flipped = SimpleNamespace(temperature_K=series.temperature_K, voltage_V=-series.voltage_V,
                              current_A=-series.current_A)
    result = analyse(flipped)
    assert result.ran and result.forward_polarity == "negative"
    assert result.temperatures[0].semilog.quantities["ideality_factor"] == pytest.approx(
        1.05, rel=0.02)


def test_noisy_diode_still_reads_n_and_barrier():
    # 2 % log-normal current noise (seeded): n within 2 % (measured up to 1.7 %, on the
    # hottest and shortest line), phi_ap within 5 meV (measured up to 1.5 meV).
    result = analyse(simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05, noise=0.02,
                              seed=11))
    assert result.ran
    determined = [r for r in result.temperatures if r.semilog.determined]
    assert len(determined) >= 3
    for r in determined:
        assert r.semilog.quantities["ideality_factor"] == pytest.approx(1.05, rel=0.02)
        assert r.semilog.quantities["apparent_barrier_eV"] == pytest.approx(0.75, abs=0.005)


def test_linearise_puts_the_analysis_in_strict_json():
    series = simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05)
    data = linearise(series, DEVICE).to_dict()
    text = json.dumps(data, allow_nan=False)
    diode = json.loads(text)["diode"]
    assert diode["ran"] is True and diode["forward_polarity"] == "positive"
    assert len(diode["temperatures"]) == TEMPS.size
    assert diode["richardson"]["quantities"]["barrier_height_eV"] == pytest.approx(0.75, abs=0.015)


def test_report_figures_and_section_only_for_a_diode():
    from mechid.data import IVSeries
    from mechid.report.figures import diode_figures
    from mechid.report.html import _diode_section

    simulated = simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05)
    series = IVSeries(simulated.temperature_K, simulated.voltage_V, simulated.current_A)
    data = {"linearisation": json.loads(json.dumps(linearise(series, DEVICE).to_dict()))}
    figures = diode_figures(data, series, DEVICE)
    assert [f.key for f in figures] == ["data_diode_temperature", "data_diode_richardson",
                                        "data_diode_series_resistance"]
    assert all(f.png_bytes(dpi=40).startswith(b"\x89PNG") for f in figures)

    class Figures:  # stands in for the report's figure numbering
        def get(self, key):
            return f"<figure {key}>"

    html = _diode_section(data, Figures())
    first = data["linearisation"]["diode"]["temperatures"][0]["semilog"]["quantities"]
    assert f"{first['ideality_factor']:.4g}" in html and "<figure data_diode_richardson>" in html
    # An ohmic series: the analysis does not run, so no figure and no section.
    t = np.repeat(TEMPS, VOLTS.size)
    v = np.tile(VOLTS, TEMPS.size)
    ohmic = IVSeries(t, v, v / 1e3)
    data = {"linearisation": linearise(ohmic, DEVICE).to_dict()}
    assert diode_figures(data, ohmic, DEVICE) == []
    assert _diode_section(data, Figures()) == ""


# --------------------------------------------------------------------------------------------
# Thermionic-field signature (Padovani & Stratton, Solid-State Electron. 9, 695 (1966))
# --------------------------------------------------------------------------------------------


def test_characteristic_energy_from_doping_matches_the_textbook_number():
    from mechid.screening.diode import characteristic_energy_from_doping_eV

    # E00 = 18.5e-12 sqrt(N/(m_r eps_r)) eV with N in cm^-3 (Sze & Ng, metal-semiconductor
    # chapter; the rounded number from memory). Same from scipy.constants written here.
    assert characteristic_energy_from_doping_eV(1e18, 1.0, 1.0) == pytest.approx(18.5e-3, rel=0.005)
    n, eps, mass = 2e19, 12.9, 0.067  # heavily doped GaAs-like values (from memory)
    direct = constants.hbar / 2 * math.sqrt(n * 1e6 / (mass * constants.m_e * eps
                                                       * constants.epsilon_0))
    assert characteristic_energy_from_doping_eV(n, eps, mass) == pytest.approx(direct, rel=1e-12)


def test_thermionic_field_ideality_has_both_limits():
    from mechid.screening.diode import ideality_thermionic_field

    # E00 << kT: thermionic emission, n -> 1 + (E00/kT)^2/3; E00 >> kT: field emission,
    # n -> E00/kT (coth -> 1). Series of x coth x, written independently.
    x_small = 1e-4 / (KB_EV * 300)  # the next term, -x^4/45, is below 1e-11
    assert ideality_thermionic_field(1e-4, 300.0) == pytest.approx(1.0 + x_small**2 / 3, rel=1e-10)
    assert ideality_thermionic_field(0.1, 20.0) == pytest.approx(0.1 / (KB_EV * 20.0), rel=1e-12)
    x = 0.7
    assert ideality_thermionic_field(x * KB_EV * 150.0, 150.0) == pytest.approx(
        x * math.cosh(x) / math.sinh(x), rel=1e-12)


def test_doping_implied_and_fitted_characteristic_energy_agree_on_a_thermionic_field_diode():
    from mechid.screening.diode import ideality_thermionic_field

    energy = 0.030  # eV: n from 1.4 at 250 K to 1.18 at 400 K
    doping = Measured(3.0e18, 0.3e18)
    eps, mass = Measured(12.9, 0.1), Measured(0.067, 0.002)
    implied = 0.5 * constants.hbar * math.sqrt(3.0e24 / (0.067 * constants.m_e * 12.9
                                                        * constants.epsilon_0))
    device = Device(area_cm2=AREA_CM2, richardson_constant_A_cm2_K2=Measured(RICHARDSON),
                    doping_cm3=doping, semiconductor_dielectric_constant=eps,
                    semiconductor_effective_mass_ratio=mass)
    series = simulate(TEMPS, np.linspace(0.01, 1.0, 100), lambda t: 0.9,
                      lambda t: float(ideality_thermionic_field(energy, t)), rs=2.0,
                      both_polarities=True)
    line = analyse(series, device).thermionic_field_ideality
    assert line.determined, line.detail
    q = line.quantities
    assert q["characteristic_energy_eV"] == pytest.approx(energy, rel=0.03)
    assert q["characteristic_energy_eV_err"] > 0
    assert q["rms_ideality_residual"] < 0.02  # measured 0.012: the semilog lines' own n bias
    assert q["characteristic_energy_from_doping_eV"] == pytest.approx(implied, rel=1e-9)
    assert 0 < q["characteristic_energy_from_doping_eV_err"] < 0.1 * implied
    # Without the doping values the comparison is not made, and the line says why.
    flat = analyse(simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05, both_polarities=True))
    assert "not given" in flat.thermionic_field_ideality.detail


# A coarse grid (0.1 V steps, 80-320 K) over a Gaussian barrier distribution: Werner &
# Guettler (1991), phi_ap = phibar - sigma^2/2kT and 1/n_ap - 1 = -rho2 + rho3/2kT, with
# phibar = 0.85 eV, sigma^2 = 0.0064 V^2, rho2 = 0.05, rho3 = -2 mV (values of the shipped
# patchy-Si reference series), R_s = 30 ohm, R_sh = 1e10 ohm.
COARSE_TEMPS = np.arange(80.0, 321.0, 40.0)
COARSE_VOLTS = np.round(np.arange(0.1, 1.01, 0.1), 2)


def _wg_barrier(t: float) -> float:
    return 0.85 - 0.0064 / (2 * KB_EV * t)


def _wg_ideality(t: float) -> float:
    return 1.0 / (1.0 - 0.05 - 0.002 / (2 * KB_EV * t))


def test_a_coarse_grid_uses_three_point_windows_and_reads_n_where_it_is_straight():
    """Five-point windows on this grid span 58 kT/e at 80 K (shunt, exponential and series
    bend together); before the windows adapted the semilog n read 1.7-3.7 against 1.1-1.24."""
    series = simulate(COARSE_TEMPS, COARSE_VOLTS, _wg_barrier, _wg_ideality, rs=30.0,
                      rsh=1e10, noise=0.01, seed=3, both_polarities=True)
    result = analyse(series, Device(area_cm2=AREA_CM2))
    assert result.ran
    assert local_window(np.arange(0.1, 1.01, 0.1), 200.0) == 3
    assert local_window(np.linspace(0.01, 0.8, 80), 300.0) == 5  # fine grids keep five
    warm = [r for r in result.temperatures if r.temperature_K >= 200]
    for record in warm:
        n = record.semilog.quantities["ideality_factor"]
        assert n == pytest.approx(_wg_ideality(record.temperature_K), rel=0.12)


def test_gaussian_start_values_come_near_the_werner_guettler_truth():
    series = simulate(COARSE_TEMPS, COARSE_VOLTS, _wg_barrier, _wg_ideality, rs=30.0,
                      rsh=1e10, noise=0.01, seed=3, both_polarities=True)
    data = prepare_series(series, 0)
    device = Device(area_cm2=AREA_CM2)
    values = start_values(diode_analysis(data, device), data, device)
    # Starting values only: they need to land in the right basin, not on the truth.
    assert values["gaussian_mean_barrier_eV"] == pytest.approx(0.85, abs=0.1)
    assert values["gaussian_barrier_variance_V2"] == pytest.approx(0.0064, rel=0.5)
    assert values["series_resistance_ohm"] == pytest.approx(30.0, rel=0.3)
    assert values["shunt_resistance_ohm"] == pytest.approx(1e10, rel=0.1)
    assert values["rho3_V"] < 0


def test_exact_werner_guettler_saturation_currents_give_back_the_distribution():
    """The regression alone, on saturation currents from WG's formula itself."""
    records = []
    for t in (150.0, 200.0, 250.0, 300.0, 350.0):
        i_s = AREA_CM2 * 100.0 * t**2 * math.exp(-_wg_barrier(t) / (KB_EV * t))
        semilog = DiodeLine(True, "exact", 5, quantities={"saturation_current_A": i_s})
        records.append(SimpleNamespace(temperature_K=t, semilog=semilog))
    values = gaussian_richardson_fit(records, AREA_CM2)
    assert values["gaussian_mean_barrier_eV"] == pytest.approx(0.85, rel=1e-9)
    assert values["gaussian_barrier_variance_V2"] == pytest.approx(0.0064, rel=1e-7)
    assert values["gaussian_richardson_constant_A_cm2_K2"] == pytest.approx(100.0, rel=1e-7)


# Thermionic-field emission's data need and starting values.


def _screened(series, device=DEVICE):
    return SimpleNamespace(diode=analyse(series, device), polarity_asymmetry=None)


def test_ideality_growth_need_tells_a_thermionic_field_diode_from_a_constant_ideality():
    from mechid.screening.applicability import IDEALITY_GROWTH_SIGMAS, _judge, ideality_growth
    from mechid.screening.diode import ideality_thermionic_field

    growing = simulate(TEMPS, np.linspace(0.01, 1.0, 100), lambda t: 0.9,
                       lambda t: float(ideality_thermionic_field(0.030, t)), rs=2.0,
                       noise=0.01, seed=4, both_polarities=True)
    slope, error, count = ideality_growth(_screened(growing).diode)
    assert count >= 5 and slope > IDEALITY_GROWTH_SIGMAS * error
    assert _judge("ideality_grows_on_cooling", _screened(growing)) is None
    constant = simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05, noise=0.01, seed=5,
                        both_polarities=True)
    reason = _judge("ideality_grows_on_cooling", _screened(constant))
    assert reason is not None and "do not" in reason and "schottky_diode" in reason
    # No rectifying contact seen: not fitted (it is a contact's law); a rectifier with too few
    # temperatures to judge the trend: fitted (nothing skipped on missing evidence).
    unseen = _judge("ideality_grows_on_cooling", SimpleNamespace(diode=None,
                                                                 polarity_asymmetry=None))
    assert unseen is not None and "by name" in unseen
    two = simulate(TEMPS[:2], VOLTS, lambda t: 0.75, lambda t: 1.05, both_polarities=True)
    assert _judge("ideality_grows_on_cooling", _screened(two)) is None


def test_thermionic_field_start_values_come_near_the_truth_on_the_reference_series():
    # The invented heavily doped GaAs contact (reference_curves/, simulated by mechid's own
    # thermionic-field law; true N_D = 2e18 cm^-3, phi_B = 0.78 eV with A** = 8.2, which the
    # start value does not know: it uses the declared typical A** = 30, so its barrier is
    # higher by about E0 ln(30/8.2) at the warmest temperature).
    from pathlib import Path

    from mechid.data import read_series
    from mechid.device import read_device_toml

    folder = (Path(__file__).resolve().parents[1] / "reference_curves"
              / "larkfield_gaas_heavily_doped_schottky_contact")
    series, device = read_series(folder / "data.csv"), read_device_toml(folder / "device.toml")
    values = start_values(diode_analysis(prepare_series(series, 0), device),
                          prepare_series(series, 0), device)
    assert values["thermionic_field_doping_per_cm3"] == pytest.approx(2e18, rel=0.5)
    assert 0.78 < values["thermionic_field_barrier_eV"] < 0.78 + 0.2


def test_thermionic_field_signature_is_the_device_or_a_growing_rectifier():
    from mechid.screening.applicability import _judge

    constant = _screened(simulate(TEMPS, VOLTS, lambda t: 0.75, lambda t: 1.05, noise=0.01,
                                  seed=5, both_polarities=True))
    plain = _judge("thermionic_field_signature", constant, DEVICE)
    assert plain is not None and "nor does the device description" in plain
    # A device described as a doped semiconductor: fitted whatever the data show (a heavily
    # doped contact is nearly symmetric and has no straight semilog region).
    for described in (Device(area_cm2=AREA_CM2, doping_cm3=Measured(1e19, 2e18)),
                      Device(area_cm2=AREA_CM2,
                             semiconductor_effective_mass_ratio=Measured(0.067, 0.003))):
        assert _judge("thermionic_field_signature", constant, described) is None
        assert _judge("thermionic_field_signature", SimpleNamespace(
            diode=None, polarity_asymmetry=None), described) is None
