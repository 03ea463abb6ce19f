"""Starting points for a composite hypothesis from the best fits of its parts.

A composite (:mod:`mechid.catalogue.composite`) has twice the parameters of a single law and a
window condition that refuses most of its prior box (each path must be seen somewhere), so a
search from prior draws alone often misses its best region (measured: quick settings missed
it on a Poole-Frenkel + leak mixture, ``benchmarks/RESULTS.md``). Its parts have been fitted
already as single mechanisms; their best points are where the composite's best region begins:

* the main path's best fit, with the leak (or the series resistance) drawn from its prior;
* for two paths in parallel, both parts' best fits together (the leak's parameters renamed).

These are starting values only: the mode search polishes them with the composite's own
likelihood, and the evidence is the composite's own.
"""

from __future__ import annotations

from collections.abc import Mapping

from mechid.catalogue import get_mechanism
from mechid.catalogue.base import Mechanism, ParameterHints
from mechid.catalogue.composite import leak_parameter_names
from mechid.inference.fit import MechanismFit
from mechid.inference.nesting import best_point


def composite_parts(mechanism: Mechanism) -> tuple[str, ...]:
    """The ids of the single mechanisms a composite is built from (empty: not a composite)."""
    if mechanism.options.get("paths"):
        return tuple(mechanism.options["paths"])
    if mechanism.options.get("series_with"):
        return (mechanism.options["series_with"],)
    return ()


def best_values(fit: MechanismFit) -> dict[str, float]:
    """The physical values of a fit's best point (its mechanism's parameters only)."""
    physical = fit.target.physical_values(best_point(fit)[0][None, :])
    names = get_mechanism(fit.result.id).parameter_names
    return {name: float(physical[name][0, 0]) for name in names}


def part_hints(mechanism: Mechanism, fits: Mapping[str, MechanismFit]
               ) -> tuple[ParameterHints, ...]:
    """Starting values for a composite from its parts' fits (see the module; empty when its
    main part was not fitted)."""
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
    return tuple(hints)
