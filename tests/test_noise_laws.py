"""The alternative noise laws against outside references (scipy.stats, numerical integration).

* Student-t law: scipy.stats.t with 4 degrees of freedom (an independent implementation).
* Log-normal-with-floor (glog) law: with a negligible floor it must be scipy.stats.lognorm
  (median I, shape s_rel); with a negligible relative term a Gaussian of width floor; in
  between a proper density (integrates to 1 by scipy.integrate.quad).
* The likelihood of a target under each law equals the sum of the law's point densities.
* ``auto`` keeps the Gaussian law on Gaussian data and leaves it on heavy-tailed data.
"""

import numpy as np
import pytest
from scipy import integrate, stats
from typer.testing import CliRunner

from mechid.catalogue import get_mechanism
from mechid.cli import app
from mechid.device import Device, device_from_values
from mechid.errors import MechidError
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.noise import (
    GAUSSIAN,
    LOGNORMAL_FLOOR,
    NOISE_LAWS,
    STUDENT_T,
    get_noise_law,
)
from mechid.inference.noise_choice import choose_noise_law, noise_law_setting
from mechid.inference.priors import NOISE_FLOOR, NOISE_RELATIVE, mechanism_priors
from mechid.simulate import simulate_series


def _column(value: float) -> np.ndarray:
    return np.array([[value]])


@pytest.mark.parametrize("law", list(NOISE_LAWS.values()), ids=list(NOISE_LAWS))
@pytest.mark.parametrize("model, relative, floor", [(2e-9, 0.1, 1e-10), (-5e-12, 0.03, 1e-11),
                                                    (0.0, 0.05, 1e-12)])
def test_every_law_is_a_normalised_density_of_the_measured_current(law, model, relative, floor):
    # scipy.integrate.quad over the measured current; the peak region is given as break points.
    width = 12 * np.hypot(relative * abs(model), floor)
    total = integrate.quad(
        lambda x: float(np.exp(law.log_density(np.array([x]), _column(model), _column(relative),
                                               _column(floor)))[0, 0]),
        model - 40 * width, model + 40 * width, points=[model], limit=400)[0]
    assert total == pytest.approx(1.0, abs=2e-4 if law is STUDENT_T else 1e-6)


def test_student_law_is_scipy_t_with_four_degrees_of_freedom():
    rng = np.random.default_rng(5)
    model = rng.lognormal(-20, 2, size=(3, 30))
    relative, floor = np.array([[0.02], [0.1], [0.3]]), np.array([[1e-12], [1e-10], [1e-9]])
    observed = model[0] * (1 + 0.2 * rng.standard_normal(30))
    scale = np.hypot(relative * model, floor)  # written independently of mechid
    expected = stats.t.logpdf(observed, df=4, loc=model, scale=scale)
    np.testing.assert_allclose(STUDENT_T.log_density(observed, model, relative, floor), expected,
                               rtol=1e-12)


def test_glog_law_is_scipy_lognormal_when_the_floor_is_negligible():
    model, relative = 3e-7, 0.08
    observed = np.geomspace(1.5e-7, 6e-7, 25)
    got = LOGNORMAL_FLOOR.log_density(observed, _column(model), _column(relative),
                                      _column(1e-20))[0]
    expected = stats.lognorm.logpdf(observed, s=relative, scale=model)
    np.testing.assert_allclose(got, expected, atol=1e-9)


def test_glog_law_is_gaussian_of_the_floor_width_when_the_relative_term_is_negligible():
    model, floor = 2e-13, 1e-12
    observed = np.linspace(-3e-12, 4e-12, 25)
    got = LOGNORMAL_FLOOR.log_density(observed, _column(model), _column(1e-9), _column(floor))[0]
    np.testing.assert_allclose(got, stats.norm.logpdf(observed, loc=model, scale=floor), atol=1e-6)


@pytest.mark.parametrize("law", [LOGNORMAL_FLOOR, STUDENT_T], ids=["glog", "student"])
def test_drawn_readings_follow_the_law(law):
    # Probability integral transform: the law's own CDF of its draws is uniform. The CDFs
    # here are written independently: glog via the normal CDF of the transform, t via scipy.
    rng = np.random.default_rng(9)
    model = np.geomspace(1e-13, 1e-8, 4000)
    relative, floor = 0.1, 1e-12
    drawn = law.draw(model, relative, floor, rng)
    if law is STUDENT_T:
        u = stats.t.cdf(drawn, df=4, loc=model, scale=np.hypot(relative * model, floor))
    else:
        c = floor / relative
        u = stats.norm.cdf((np.arcsinh(drawn / c) - np.arcsinh(model / c)) / relative)
    assert stats.kstest(u, "uniform").pvalue > 1e-3


@pytest.mark.parametrize("law", list(NOISE_LAWS.values()), ids=list(NOISE_LAWS))
def test_target_likelihood_is_the_sum_of_the_law_point_densities(law):
    device = device_from_values(thickness_nm=30.0, thickness_sd_nm=1.0, area_cm2=1e-4,
                                optical_dielectric_constant=4.0, optical_dielectric_constant_sd=0.4)
    mechanism = get_mechanism("poole_frenkel")
    mags = np.geomspace(2.0, 10.0, 12)
    voltage = np.r_[-mags, mags, mags[:3]]  # repeats too
    temperature = np.full(voltage.size, 350.0)
    clean = mechanism.current(voltage, temperature, mechanism.typical_parameters(), device)
    current = clean * (1 + 0.03 * np.random.default_rng(3).standard_normal(voltage.size))
    target = MechanismTarget(mechanism, voltage, temperature, current, device,
                             mechanism_priors(mechanism, device, current), noise_law=law)
    theta = target.sample_prior(np.random.default_rng(4), 12)
    values = target.physical_values(theta)
    model = np.sign(voltage) * mechanism.current(
        np.abs(voltage), temperature, {k: values[k] for k in mechanism.parameter_names}, device)
    expected = law.log_density(current, model, values[NOISE_RELATIVE], values[NOISE_FLOOR]).sum(1)
    expected = np.where(np.isnan(model).any(axis=1), -np.inf, expected)
    np.testing.assert_allclose(target.log_likelihood(theta), expected, rtol=1e-10)


def test_unknown_law_names_the_known_ones():
    assert noise_law_setting("lognormal-floor") == "lognormal_floor"
    assert noise_law_setting("AUTO") == "auto"
    with pytest.raises(MechidError, match="gaussian, lognormal-floor, student-t, auto"):
        noise_law_setting("poisson")
    with pytest.raises(KeyError):
        get_noise_law("poisson")


def test_cli_refuses_an_unknown_noise_law_without_a_traceback(tmp_path):
    data = tmp_path / "d.csv"
    data.write_text("temperature_K,voltage_V,current_A\n300,0.1,1e-9\n300,0.2,2e-9\n"
                    "300,0.3,3e-9\n")
    run = CliRunner().invoke(app, ["analyze", str(data), "--noise-law", "poisson"])
    assert run.exit_code != 0
    assert "unknown noise law" in run.output
    assert "Traceback" not in run.output


def _mott_series(noise: str, seed: int):
    mechanism = get_mechanism("mott_vrh")
    clean = simulate_series(mechanism, mechanism.typical_parameters(),
                            [60.0, 80.0, 110.0, 150.0, 200.0], np.linspace(0.05, 1.0, 24), Device())
    rng = np.random.default_rng(seed)
    if noise == "gaussian":
        current = GAUSSIAN.draw(clean.current_A, 0.03, 1e-15, rng)
    else:  # a t(2) scatter: heavy tails the Gaussian law cannot absorb
        current = clean.current_A * (1 + 0.03 * rng.standard_t(2, clean.current_A.size))
    return mechanism, clean.voltage_V, clean.temperature_K, current


@pytest.mark.parametrize("noise, expected", [("gaussian", "gaussian"),
                                             ("heavy", "student_t")])
def test_auto_choice_keeps_gaussian_on_gaussian_data_and_leaves_it_on_heavy_tails(noise, expected):
    mechanism, v, t, i = _mott_series(noise, seed=21)
    choice = choose_noise_law(mechanism, v, t, i, Device(), np.random.default_rng(2))
    assert set(choice.log_evidence) == set(NOISE_LAWS)
    assert choice.chosen == expected, choice
    assert choice.probe_mechanism == "mott_vrh"


def test_simulate_draws_from_the_named_law_and_refuses_a_glog_law_without_a_floor():
    mechanism = get_mechanism("mott_vrh")
    args = (mechanism, mechanism.typical_parameters(), [80.0, 150.0], np.linspace(0.1, 1, 50),
            Device())
    sim = simulate_series(*args, noise_relative=0.05, noise_floor_A=1e-15,
                          rng=np.random.default_rng(1), noise_law=STUDENT_T)
    again = STUDENT_T.draw(sim.noiseless_current_A, 0.05, 1e-15, np.random.default_rng(1))
    np.testing.assert_array_equal(sim.current_A, again)
    with pytest.raises(MechidError, match="both above zero"):
        simulate_series(*args, noise_relative=0.05, rng=np.random.default_rng(1),
                        noise_law=LOGNORMAL_FLOOR)


def test_methods_text_names_the_law_and_how_auto_chose_it():
    from mechid.report.text import noise_law_methods, noise_law_sentence, references

    chosen = {"requested": "auto", "chosen": "student_t", "name": STUDENT_T.name,
              "probe_mechanism": "mott_vrh", "reason": "ln B = 12.0 +- 0.3 over the default law",
              "log_evidence": {"gaussian": 100.0, "lognormal_floor": 101.0, "student_t": 112.0}}
    text = noise_law_methods({"noise_law": chosen})
    assert "Student-t in current with 4 degrees of freedom" in text
    assert "mott_vrh" in text and "student-t 112.0" in text and "ln B = 12.0" in text
    assert noise_law_sentence({"noise_law": chosen}).startswith(STUDENT_T.name)
    methods, _ = references({"noise_law": chosen, "mechanisms": [{"id": "mott_vrh"}]})
    assert any("Lange" in m for m in methods) and any("Rocke" in m for m in methods)
    default = noise_law_methods({"noise_law": {"requested": "gaussian", "chosen": "gaussian"}})
    assert default.startswith("The likelihood is Gaussian in current") and "chosen" not in default
