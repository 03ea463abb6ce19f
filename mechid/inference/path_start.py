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

* for two paths in parallel, the main path fitted (its own mode search, from its best fit) to
  the top :data:`TOP_SHARE` of each temperature's biases only -- where the main path, the
  steeper one, leads -- plus a leak fitted to the excess over that. Where the leak carries
  much of the lowest biases, the main path's best fit to all points is bent by it and the
  excess over it shows no leak (seen: a space-charge law with an ohmic path 2-30 x larger at
  the lowest bias, the composite's search ending 1100 nats below the truth).

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
from mechid.inference.nesting import search_beats
from mechid.inference.priors import mechanism_priors
from mechid.inference.settings import SearchSettings
from mechid.inference.start import find_modes

#: A point shows a leak when the data exceed the main path's best fit by this share of the
#: measured current (our choice: well above the few per cent noise of these measurements).
EXCESS_SHARE = 0.2
#: Fewest such points a leak is fitted to.
MIN_EXCESS_POINTS = 3
#: Share of each temperature's biases (the highest) the main path is fitted to alone for the
#: top-of-sweep start (our choice: a third; an ohmic leak 30 x the main path at the lowest of
#: two decades of bias falls below it over the top third of a square law).
TOP_SHARE = 1.0 / 3.0


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


def excess_leak_values(mechanism: Mechanism, target: MechanismTarget,
                       main_values: Mapping[str, float], search: SearchSettings,
                       rng: np.random.Generator) -> dict[str, float]:
    """The leak's values (composite names) fitted to the data's excess over the main path at
    ``main_values`` (empty when fewer than :data:`MIN_EXCESS_POINTS` points show one)."""
    main_id, leak_id = composite_parts(mechanism)
    main, leak = get_mechanism(main_id), get_mechanism(leak_id)
    with np.errstate(invalid="ignore", over="ignore"):
        model = main.current(target.voltage_V, target.temperature_K, dict(main_values),
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


def top_of_sweep(voltage_V: np.ndarray, temperature_K: np.ndarray,
                 share: float = TOP_SHARE) -> np.ndarray:
    """Mask of the points in the top ``share`` of their own temperature's biases (by |V|)."""
    magnitude = np.abs(voltage_V)
    keep = np.zeros(magnitude.size, dtype=bool)
    for temperature in np.unique(temperature_K):
        at = temperature_K == temperature
        keep[at] = magnitude[at] >= np.quantile(magnitude[at], 1.0 - share)
    return keep & (magnitude > 0)


def top_of_sweep_values(main_fit: MechanismFit, search: SearchSettings,
                        rng: np.random.Generator) -> dict[str, float]:
    """The main path's values fitted (from its best fit) to the top of each sweep only
    (empty when too few points are left or the search finds nothing)."""
    target = main_fit.target
    main = target.mechanism
    keep = top_of_sweep(target.voltage_V, target.temperature_K)
    if keep.sum() <= len(main.parameters):
        return {}
    current = target.current_A[keep]
    top_target = MechanismTarget(main, target.voltage_V[keep], target.temperature_K[keep],
                                 current, target.device,
                                 mechanism_priors(main, target.device, current),
                                 noise_law=target.noise_law)
    start = ParameterHints(main.id, best_values(main_fit),
                           {name: f"best fit of {main.id}" for name in main.parameter_names})
    mode = find_modes(top_target, rng, start, search=search)[0]
    if not np.isfinite(mode.log_posterior):
        return {}
    physical = top_target.physical_values(mode.point[None, :])
    return {name: float(physical[name][0, 0]) for name in main.parameter_names}


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
        main_fit = fits[parts[0]]
        excess_rng, top_rng, top_excess_rng = rng.spawn(3)
        excess = excess_leak_values(mechanism, main_fit.target, main, search, excess_rng)
        if excess:
            hints.append(ParameterHints(
                mechanism.id, {**main, **excess},
                {**sources, **{name: f"{parts[1]} fitted to the excess over the best fit of "
                               f"{parts[0]}" for name in excess}}))
        top = top_of_sweep_values(main_fit, search, top_rng)
        if top:
            top_leak = excess_leak_values(mechanism, main_fit.target, top, search,
                                          top_excess_rng)
            top_sources = {name: f"{parts[0]} fitted to the top of each sweep" for name in top}
            hints.append(ParameterHints(
                mechanism.id, {**top, **top_leak},
                {**top_sources, **{name: f"{parts[1]} fitted to the excess over "
                                   f"{parts[0]} at the top of each sweep" for name in top_leak}}))
    return tuple(hints)


def main_path_restart(composite_fit: MechanismFit, main_fit: MechanismFit,
                      search: SearchSettings, rng: np.random.Generator,
                      margin: float) -> ParameterHints | None:
    """Starting values for fitting a composite's main path again, or None when not needed.

    The reverse of :func:`part_hints`: where a parallel composite's evidence beats its main
    path's alone, the main path's own search may have stalled where the composite's did not
    (a leak then patches a misfit the single law would not have had; seen on simulated
    single-trap-level data, the single law's search ending 550 nats below its truth and the
    composite leading). A mode search of the main path started from the composite's main-path
    values decides: if it beats everything the main path's fit reached by more than
    ``margin`` nats, those values are returned to fit it again; otherwise None.
    """
    main = main_fit.target.mechanism
    values = {name: value for name, value in best_values(composite_fit).items()
              if name in main.parameter_names}
    start = ParameterHints(main.id, values, {name: f"best fit of {composite_fit.result.id}"
                                             for name in values})
    return None if search_beats(main_fit, start, search, rng, margin) is None else start
