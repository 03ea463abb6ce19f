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
