"""Two conduction paths in parallel: declaration, currents, validity and path shares."""

from __future__ import annotations

import numpy as np
import pytest

from mechid.catalogue import get_mechanism
from mechid.catalogue.composite import largest_share, parallel_paths, path_currents
from mechid.device import Device, Measured

DEVICE = Device(area_cm2=1e-4, thickness_nm=Measured(30.0, 1.0))
PF = get_mechanism("poole_frenkel")
NN = get_mechanism("nearest_neighbour_hopping")
COMPOSITE = parallel_paths(PF, NN, id="test_pf_with_hopping_leak", name="PF + hopping leak")


def _params():
    pf = PF.typical_parameters()
    nn = NN.typical_parameters()
    values = dict(pf)
    values.update({f"leak_{k}": v for k, v in nn.items() if k != "thickness_nm"})
    return pf, {**nn, "thickness_nm": pf["thickness_nm"]}, values


def test_leak_parameters_are_renamed_but_the_film_thickness_is_shared():
    assert COMPOSITE.parameter_names == (
        *PF.parameter_names, "leak_activation_energy_eV", "leak_hopping_distance_nm",
        "leak_prefactor_A_per_cm2")
    assert COMPOSITE.family == PF.family and COMPOSITE.is_odd
    assert COMPOSITE.needs_area


def test_composite_current_is_the_sum_of_the_two_paths():
    # Kirchhoff: paths in parallel see the same bias, currents add.
    pf, nn, values = _params()
    v = np.array([-8.0, -2.0, 0.5, 2.0, 8.0])
    t = np.array([300.0, 350.0, 350.0, 400.0, 450.0])
    expected = PF.current(v, t, pf, DEVICE) + NN.current(v, t, nn, DEVICE)
    np.testing.assert_allclose(COMPOSITE.current(v, t, values, DEVICE), expected, rtol=1e-13)
    batch = {k: np.array([[x], [1.1 * x]]) for k, x in values.items()}
    rows = COMPOSITE.current(v, t, batch, DEVICE)
    second = COMPOSITE.current(v, t, {k: 1.1 * x for k, x in values.items()}, DEVICE)
    np.testing.assert_allclose(rows[1], second, rtol=1e-12)


def test_paths_evaluated_once_for_sum_and_window_never_return_a_stale_answer():
    # The sum and the window condition share one evaluation of the two paths when asked at
    # the same inputs; an input changed in place (or a new value) must be evaluated afresh.
    pf, nn, values = _params()
    v = np.array([2.0, 4.0, 8.0])
    t = np.array([300.0, 350.0, 400.0])
    batch = {k: np.array([[x]]) for k, x in values.items()}
    first = COMPOSITE.magnitude(v, t, DEVICE, **batch)
    COMPOSITE.window_condition(v, t, DEVICE, **batch)
    batch["trap_depth_eV"] *= 0.9  # in place
    v *= 1.5  # in place
    pf_changed = {**pf, "trap_depth_eV": 0.9 * pf["trap_depth_eV"]}
    expected = (PF.current(v, t, pf_changed, DEVICE, enforce_validity=False)
                + NN.current(v, t, nn, DEVICE, enforce_validity=False))
    again = COMPOSITE.magnitude(v, t, DEVICE, **batch)
    np.testing.assert_allclose(again[0], expected, rtol=1e-13)
    assert not np.allclose(again, first)


def test_each_paths_validity_is_kept_and_the_leaks_is_renamed():
    leak_ids = {f"leak_{c.id}" for c in NN.validity}
    assert {c.id for c in COMPOSITE.validity} == {c.id for c in PF.validity} | leak_ids
    pf, nn, values = _params()
    # Where the leak's own formula is refused, so is the composite (same point, same values).
    v = np.geomspace(0.01, 200.0, 40)
    t = np.full(v.size, 300.0)
    leak_ok = np.isfinite(NN.current(v, t, nn, DEVICE))
    main_ok = np.isfinite(PF.current(v, t, pf, DEVICE))
    np.testing.assert_array_equal(np.isfinite(COMPOSITE.current(v, t, values, DEVICE)),
                                  leak_ok & main_ok)


def test_path_shares_name_the_path_that_carries_the_current():
    pf, nn, values = _params()
    v = np.array([0.5, 20.0])
    t = np.array([300.0, 300.0])
    with_paths = parallel_paths(PF, NN, id="poole_frenkel_x", name="x")
    from mechid.catalogue import temporarily_registered

    with temporarily_registered(with_paths):
        currents = path_currents(with_paths, v, t, values, DEVICE)
    assert set(currents) == {"poole_frenkel", "nearest_neighbour_hopping"}
    index, share = largest_share(currents)
    total = currents["poole_frenkel"] + currents["nearest_neighbour_hopping"]
    for k in range(2):
        biggest = max(currents.values(), key=lambda c: abs(c[k]))
        assert share[k] == pytest.approx(abs(biggest[k]) / abs(total[k]), rel=1e-12)
    assert path_currents(PF, v, t, pf, DEVICE) is None


def test_only_odd_paths_can_be_composed():
    from dataclasses import replace

    signed = replace(NN, magnitude=None, signed_current=lambda v, t, d, **p: v)
    with pytest.raises(ValueError, match="odd in V"):
        parallel_paths(PF, signed, id="x", name="x")


def test_regime_map_names_the_dominant_path_and_the_failing_cells():
    from mechid.catalogue import temporarily_registered
    from mechid.inference.regimes import regime_map

    pf, nn, values = _params()
    pf.update(trap_depth_eV=1.2, dielectric_constant=4.2, prefactor_S_per_cm=1.0, thickness_nm=30.0)
    values.update(pf)
    nn["thickness_nm"] = 30.0
    values["leak_prefactor_A_per_cm2"] = 1e-3
    values["leak_activation_energy_eV"] = 0.3
    nn.update(prefactor_A_per_cm2=1e-3, activation_energy_eV=0.3)
    comp = parallel_paths(PF, NN, id="pf_leak_for_map", name="x")
    draws = {k: np.full(50, v) for k, v in values.items()}
    v = np.concatenate([-np.geomspace(0.5, 12, 10), np.geomspace(0.5, 12, 10)])
    t = np.repeat([300.0, 450.0], 10)
    z = np.zeros(v.size)
    z[:3] = 5.0  # three failing points, at 300 K
    with temporarily_registered(comp):
        found = regime_map(("pf_leak_for_map", 0.9, draws), ("poole_frenkel", z), v, t, DEVICE,
                           seed=1)
    assert found.paths == ("poole_frenkel", "nearest_neighbour_hopping")
    grid_v = np.array(found.bias_abs_V)
    for i, temperature in enumerate(found.temperatures_K):
        main = PF.current(grid_v, temperature, pf, DEVICE)
        leak = NN.current(grid_v, temperature, nn, DEVICE)
        expected = np.where(np.abs(leak) > np.abs(main), 1, 0)
        assert list(found.dominant_path[i]) == list(expected)
        assert set(found.dominant_probability[i]) == {1.0}  # identical draws agree
    # This leak carries the low biases at 300 K (PF ~ 1e-17 A there) and not the top ones.
    assert found.dominant_path[0][0] == 1 and found.dominant_path[0][-1] == 0
    flagged = [(i, j) for i, row in enumerate(found.residual_failure)
               for j, share in enumerate(row) if share]
    assert flagged and all(i == 0 for i, _ in flagged)
    assert found.residual_failure[1][0] in (None, 0.0)


def test_window_condition_refuses_a_path_that_never_leads():
    from mechid.inference.likelihood import MechanismTarget
    from mechid.inference.priors import mechanism_priors

    pf, nn, values = _params()
    pf.update(trap_depth_eV=1.2, dielectric_constant=4.2, prefactor_S_per_cm=1.0, thickness_nm=30.0)
    values.update(pf)
    v = np.concatenate([-np.geomspace(0.5, 12, 10), np.geomspace(0.5, 12, 10)])
    t = np.repeat([300.0, 450.0], 10)
    current = PF.current(v, t, pf, DEVICE)
    priors = mechanism_priors(COMPOSITE, DEVICE, np.full(v.size, 1e-14))
    target = MechanismTarget(COMPOSITE, v, t, current, DEVICE, priors)
    leading = dict(values, leak_activation_energy_eV=0.3, leak_prefactor_A_per_cm2=1e-3)
    silent = dict(values, leak_activation_energy_eV=1.9, leak_prefactor_A_per_cm2=1e-4)
    ok = COMPOSITE.window_condition(np.abs(v), t, DEVICE, **{
        k: np.array([[leading[k]], [silent[k]]]) for k in COMPOSITE.parameter_names})
    assert list(ok) == [True, False]
    # The likelihood refuses the silent-leak set however well it fits (it is PF alone).
    names = target.names
    rows = []
    for chosen in (leading, silent):
        row = []
        for prior in target.free:
            value = chosen.get(prior.name, {"noise_relative": 0.02, "noise_floor_A": 1e-14}.get(
                prior.name))
            row.append(float(prior.to_internal(value)))
        rows.append(row)
    loglike = target.log_likelihood(np.array(rows))
    assert np.isfinite(loglike[0]) and loglike[1] == -np.inf, names


# -- a path behind a series resistance, and the registered combinations -------------------

FN = get_mechanism("fowler_nordheim")
FN_DEVICE = Device(area_cm2=1e-4, thickness_nm=Measured(6.0, 0.2),
                   effective_mass_ratio=Measured(0.45, 0.05))
FN_VALUES = {"barrier_height_eV": 3.1, "thickness_nm": 6.0, "effective_mass_ratio": 0.45}


def test_series_resistance_current_solves_the_circuit_equation_like_brentq():
    # Independent check: scipy's Brent root of I - I_FN(V - I R_s) = 0 (Sze & Ng 2007, ch. 3:
    # the film sees the applied bias less the drop on R_s).
    from scipy.optimize import brentq

    series = get_mechanism("fowler_nordheim_series_resistance")
    resistance = 2.0e3
    v = np.linspace(6.0, 9.5, 8)
    t = np.full(v.size, 175.0)
    found = series.current(v, t, {**FN_VALUES, "series_resistance_ohm": resistance}, FN_DEVICE)
    for bias, current in zip(v, found, strict=True):
        def residual(i: float, bias: float = bias) -> float:
            film = bias - i * resistance
            return i - float(FN.current(film, 175.0, FN_VALUES, FN_DEVICE,
                                        enforce_validity=False))

        expected = brentq(residual, 0.0, float(FN.current(bias, 175.0, FN_VALUES, FN_DEVICE)),
                          xtol=1e-300, rtol=1e-14)
        assert current == pytest.approx(expected, rel=1e-10)
    # The resistor only takes away: the current is below the unbent law, more so at the top.
    bare = FN.current(v, t, FN_VALUES, FN_DEVICE)
    assert np.all(found < bare) and found[-1] / bare[-1] < found[0] / bare[0]


def test_series_resistance_is_odd_and_vectorised_over_parameter_sets():
    series = get_mechanism("fowler_nordheim_series_resistance")
    values = {**FN_VALUES, "series_resistance_ohm": 1e3}
    v = np.array([-9.0, -7.0, 7.0, 9.0])
    t = np.full(v.size, 125.0)
    single = series.current(v, t, values, FN_DEVICE)
    np.testing.assert_allclose(single[:2], -single[2:][::-1], rtol=1e-12)
    batch = {k: np.array([[x], [x]]) for k, x in values.items()}
    batch["series_resistance_ohm"] = np.array([[1e3], [1e5]])
    rows = series.current(v, t, batch, FN_DEVICE)
    np.testing.assert_allclose(rows[0], single, rtol=1e-12)
    other = series.current(v, t, {**values, "series_resistance_ohm": 1e5}, FN_DEVICE)
    np.testing.assert_allclose(rows[1], other, rtol=1e-12)


def test_series_validity_is_judged_at_the_film_voltage():
    # Fowler-Nordheim needs eV > phi across the film: 3.3 V applied through a resistor that
    # leaves less than 3.1 V on the film is refused, although 3.3 V alone would pass.
    series = get_mechanism("fowler_nordheim_series_resistance")
    values = {**FN_VALUES, "thickness_nm": 3.0}
    bias = np.array([3.3])
    assert np.isfinite(FN.current(bias, 77.0, values, FN_DEVICE))
    small = series.current(bias, 77.0, {**values, "series_resistance_ohm": 1e-1}, FN_DEVICE)
    large = series.current(bias, 77.0, {**values, "series_resistance_ohm": 1e6}, FN_DEVICE)
    assert np.isfinite(small[0]) and np.isnan(large[0])


def test_series_window_asks_the_resistor_to_take_one_percent_somewhere():
    from mechid.catalogue.composite import SERIES_DROP_MIN, film_voltage_V

    series = get_mechanism("fowler_nordheim_series_resistance")
    v = np.linspace(6.0, 9.5, 8)
    t = np.full(v.size, 175.0)
    top = float(FN.current(9.5, 175.0, FN_VALUES, FN_DEVICE))
    # A resistance dropping ~10 % at the top point is seen; one dropping ~0.01 % is not.
    seen, unseen = 0.1 * 9.5 / top, 1e-4 * 9.5 / top
    batch = {k: np.array([[x], [x]]) for k, x in FN_VALUES.items()}
    batch["series_resistance_ohm"] = np.array([[seen], [unseen]])
    assert list(series.window_condition(v, t, FN_DEVICE, **batch)) == [True, False]
    film = film_voltage_V(FN, v, t, FN_DEVICE, np.array([[seen]]), batch)
    assert (9.5 - film[0, -1]) / 9.5 > SERIES_DROP_MIN


def test_registered_composites_are_built_from_catalogued_parts():
    from mechid.catalogue import registered_mechanisms
    from mechid.catalogue.combinations import COMPOSITES
    from mechid.inference.path_start import composite_parts

    ids = {m.id for m in registered_mechanisms()}
    for composite in COMPOSITES:
        assert composite.id in ids
        parts = composite_parts(composite)
        assert parts and all(part in ids and not composite_parts(get_mechanism(part))
                             for part in parts)
        assert composite.family == get_mechanism(parts[0]).family
        assert composite.window_condition is not None
