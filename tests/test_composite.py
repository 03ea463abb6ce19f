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
