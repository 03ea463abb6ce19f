"""Starting points for a composite hypothesis from the best fits of its parts.

A composite (:mod:`mechid.catalogue.composite`) has twice the parameters of a single law and a
window condition that refuses most of its prior box (each path must be seen somewhere), so a
search from prior draws alone often misses its best region (measured: quick settings missed
it on a Poole-Frenkel + leak mixture, ``benchmarks/RESULTS.md``). Its parts have been fitted
already as single mechanisms; their best points are where the composite's best region begins:

* the main path's best fit, with the leak (or the series resistance) drawn from its prior;
* for two paths in parallel, both parts' best fits together (the leak's parameters renamed);
* for two paths in parallel, the main path's best fit with a leak fitted (its own mode search)
  to what the data carry beyond that fit, at the points where they exceed it by more than
  :data:`EXCESS_SHARE` -- where a leak shows. Without it the leak's start is a prior draw, and
  a 6-parameter search under the window condition can stall far below the main path alone
  (seen: Schottky + leak data, the composite's best 1925 against 3535 for Schottky alone).

These are starting values only: the mode search polishes them with the composite's own
likelihood, and the evidence is the composite's own.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from mechid.catalogue import get_mechanism
from mechid.catalogue.base import Mechanism, ParameterHints
from mechid.catalogue.composite import leak_parameter_names
from mechid.inference.fit import MechanismFit
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.nesting import best_values as best_values_with_noise
from mechid.inference.priors import mechanism_priors
from mechid.inference.settings import SearchSettings
from mechid.inference.start import find_modes

#: A point shows a leak when the data exceed the main path's best fit by this share of the
#: measured current (our choice: well above the few per cent noise of these measurements).
EXCESS_SHARE = 0.2
#: Fewest such points a leak is fitted to.
MIN_EXCESS_POINTS = 3


def composite_parts(mechanism: Mechanism) -> tuple[str, ...]:
    """The ids of the single mechanisms a composite is built from (empty: not a composite)."""
    if mechanism.options.get("paths"):
        return tuple(mechanism.options["paths"])
    if mechanism.options.get("series_with"):
        return (mechanism.options["series_with"],)
    return ()


def best_values(fit: MechanismFit) -> dict[str, float]:
    """The physical values of a fit's best point (its mechanism's parameters only)."""
    values = best_values_with_noise(fit)
    return {name: values[name] for name in get_mechanism(fit.result.id).parameter_names}


def excess_leak_values(mechanism: Mechanism, main_fit: MechanismFit, search: SearchSettings,
                       rng: np.random.Generator) -> dict[str, float]:
    """The leak's values (composite names) fitted to the data's excess over the main path's
    best fit (empty when fewer than :data:`MIN_EXCESS_POINTS` points show one)."""
    main_id, leak_id = composite_parts(mechanism)
    main, leak = get_mechanism(main_id), get_mechanism(leak_id)
    target = main_fit.target
    with np.errstate(invalid="ignore", over="ignore"):
        model = main.current(target.voltage_V, target.temperature_K, best_values(main_fit),
                             target.device)
        excess = np.abs(target.current_A) - np.abs(model)
        shows = (excess > EXCESS_SHARE * np.abs(target.current_A)) & np.isfinite(excess) & (
            target.voltage_V != 0)
    if shows.sum() < MIN_EXCESS_POINTS:
        return {}
    v, t = target.voltage_V[shows], target.temperature_K[shows]
    signed = np.sign(v) * excess[shows]
    leak_target = MechanismTarget(leak, v, t, signed, target.device,
                                  mechanism_priors(leak, target.device, signed),
                                  noise_law=target.noise_law)
    mode = find_modes(leak_target, rng, search=search)[0]
    if not np.isfinite(mode.log_posterior):
        return {}
    physical = leak_target.physical_values(mode.point[None, :])
    renamed = leak_parameter_names(main, leak)
    return {renamed[name]: float(physical[name][0, 0]) for name in leak.parameter_names
            if renamed[name] != name}


def part_hints(mechanism: Mechanism, fits: Mapping[str, MechanismFit],
               search: SearchSettings | None = None, rng: np.random.Generator | None = None
               ) -> tuple[ParameterHints, ...]:
    """Starting values for a composite from its parts' fits (see the module; empty when its
    main part was not fitted). With ``search`` and ``rng``, a parallel composite also gets
    the main fit plus a leak fitted to the data's excess over it."""
    parts = composite_parts(mechanism)
    if not parts or parts[0] not in fits:
        return ()
    main = best_values(fits[parts[0]])
    sources = {name: f"best fit of {parts[0]}" for name in main}
    hints = [ParameterHints(mechanism.id, main, sources)]
    if len(parts) == 2 and parts[1] in fits:
        renamed = leak_parameter_names(get_mechanism(parts[0]), get_mechanism(parts[1]))
        leak = {renamed[name]: value for name, value in best_values(fits[parts[1]]).items()
                if renamed[name] not in main}
        hints.append(ParameterHints(
            mechanism.id, {**main, **leak},
            {**sources, **{name: f"best fit of {parts[1]}" for name in leak}}))
    if len(parts) == 2 and search is not None and rng is not None:
        excess = excess_leak_values(mechanism, fits[parts[0]], search, rng)
        if excess:
            hints.append(ParameterHints(
                mechanism.id, {**main, **excess},
                {**sources, **{name: f"{parts[1]} fitted to the excess over the best fit of "
                               f"{parts[0]}" for name in excess}}))
    return tuple(hints)
