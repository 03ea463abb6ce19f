"""Composite hypotheses: two conduction paths in parallel, their currents added.

Real films rarely follow one formula over the whole measured window: a leak (ohmic,
activated or hopping conduction through defects or along the edge) carries the lowest biases,
an emission or tunnelling path the highest. Two paths between the same electrodes carry the
same bias, so their currents add (Kirchhoff's current law):

.. math::  I(V, T) = I_{\\text{main}}(V, T;\\ \\theta_{\\text{main}})
                     + I_{\\text{leak}}(V, T;\\ \\theta_{\\text{leak}})

:func:`parallel_paths` builds the hypothesis from two catalogued odd mechanisms. The main
path keeps its parameter names; the leak's are prefixed ``leak_``, except a device quantity
both paths declare from the same device value (e.g. the film thickness ``thickness_nm``),
which is one quantity of the one film and is shared. Each path's formula holds only where its
source says it does, so both paths' validity conditions are declared (the leak's renamed).
The composite's family is that of the main path (the verdict's family probability counts it
there), and its straightened plots, screening checks and starting hints are the main path's
(the screening cannot tell a composite from its main path; only the fit can).

Identifiability: a leak too small to matter anywhere in the measured window makes the
composite the single mechanism under another name, and such parameter sets fill most of a
wide leak prior -- so, left alone, the composite would tie with the single mechanism on
single-path data (measured: ln B = 0.2 on simulated Poole-Frenkel data). The composite
therefore declares a window condition: each path must carry the larger share of the current at
one fitted point at least (the ordering the project's issue asks for). Parameter sets breaking
it are refused like those outside a validity domain, so a composite describes data only where
both paths are seen.

A series resistance (contact, lead or spreading resistance) takes part of the applied bias:
the film sees ``u = V - I R_s`` and carries ``I = f(u)`` (:func:`behind_series_resistance`,
the same self-consistent relation as the diode equation with series resistance, Sze & Ng,
*Physics of Semiconductor Devices*, 3rd ed. 2007, ch. 3). For a current that rises with
bias, ``u + R_s f(u)`` rises monotonically from 0 to ``V`` on ``[0, V]``, so the film voltage
is found by a bracketing root search (:func:`film_voltage_V`), vectorised over parameter sets
and points. The formula's validity conditions are checked at the film voltage, where the
formula is used. Its window condition:
the resistor must take at least :data:`SERIES_DROP_MIN` of the bias at one fitted point at
least (below that it is invisible and the composite is the single law under another name).
"""

from __future__ import annotations

import threading
from collections.abc import Mapping
from dataclasses import replace

import numpy as np

from mechid.catalogue.base import FloatArray, Mechanism, Parameter
from mechid.catalogue.roots import rising_root
from mechid.catalogue.validity import ValidityCondition
from mechid.device import Device

#: Prefix of the leak path's parameter names.
LEAK_PREFIX = "leak_"
#: Name of the series-resistance parameter.
SERIES_RESISTANCE = "series_resistance_ohm"
#: Smallest fraction of the bias the series resistance must take at one fitted point at least
#: (our choice: a 1 % bias loss changes a Fowler-Nordheim current by ~10-50 %, plainly seen at
#: a few per cent noise; a smaller one is not a second element the data can show).
SERIES_DROP_MIN = 0.01
#: Relative tolerance of the film voltage (of |V|) and the step cap of its root search
#: (bisection alone reaches the tolerance in 44 steps).
_FILM_TOLERANCE = 1e-13
_FILM_MAX_STEPS = 100


def leak_parameter_names(main: Mechanism, leak: Mechanism) -> dict[str, str]:
    """Leak parameter name -> its name in the composite (shared device quantities unchanged)."""
    by_name = {p.name: p for p in main.parameters}
    names = {}
    for p in leak.parameters:
        shared = (p.name in by_name and p.device_prior is not None
                  and by_name[p.name].device_prior == p.device_prior)
        names[p.name] = p.name if shared else LEAK_PREFIX + p.name
    return names


def _leak_parameter(parameter: Parameter, name: str) -> Parameter:
    return replace(parameter, name=name, symbol=f"{parameter.symbol} (leak)",
                   description=f"{parameter.description} (leak path)")


def _path_condition(condition: ValidityCondition, names: Mapping[str, str],
                    leak: bool) -> ValidityCondition:
    """A path's validity condition reading that path's parameters out of the composite's.

    ``names`` maps the path's own parameter names to the composite's; a leak condition gets
    the ``leak_`` prefix in its id and says so in its quantity.
    """
    def evaluate(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                 **values: FloatArray) -> FloatArray:
        return condition.evaluate(voltage_V, temperature_K, device,
                                  **{own: values[new] for own, new in names.items()})

    if not leak:
        return replace(condition, evaluate=evaluate)
    return replace(condition, id=LEAK_PREFIX + condition.id,
                   quantity=f"{condition.quantity} [leak path]", evaluate=evaluate)


class _LastEvaluation(threading.local):
    """The last inputs and outputs of a composite's two paths, one record per thread.

    Inputs are compared by value (copies are kept, so a caller that reuses or changes an
    array in place never gets a stale answer); anything that is not an array (the device)
    by identity.
    """

    def __init__(self) -> None:
        self.key: tuple | None = None
        self.value: tuple[FloatArray, FloatArray] | None = None

    def lookup(self, key: tuple) -> tuple[FloatArray, FloatArray] | None:
        if self.key is None or len(key) != len(self.key):
            return None
        for kept, new in zip(self.key, key, strict=True):
            if isinstance(kept, np.ndarray):
                new = np.asarray(new)
                if kept.shape != new.shape or not np.array_equal(kept, new, equal_nan=True):
                    return None
            elif kept is not new:
                return None
        return self.value

    def store(self, key: tuple, value: tuple[FloatArray, FloatArray]) -> None:
        self.key = tuple(np.array(k, copy=True) if isinstance(k, np.ndarray | float | int)
                         else k for k in key)
        self.value = value


def parallel_paths(main: Mechanism, leak: Mechanism, *, id: str, name: str) -> Mechanism:
    """Declare the composite of two paths in parallel, ``I = I_main + I_leak``.

    Parameters
    ----------
    main, leak : Mechanism
        Two odd mechanisms (declared by their magnitude); ``main`` names the family.
    id, name : str
        The composite's stable id and human name.

    Returns
    -------
    Mechanism
        Odd in V, with the main path's parameters, then the leak's (renamed, see the module).

    Raises
    ------
    ValueError
        If either path is not odd, or two renamed parameters collide.
    """
    if not (main.is_odd and leak.is_odd):
        raise ValueError(f"{id}: parallel paths are declared for mechanisms odd in V")
    names = leak_parameter_names(main, leak)
    leak_parameters = tuple(_leak_parameter(p, names[p.name]) for p in leak.parameters
                            if names[p.name] != p.name)
    parameters = (*main.parameters, *leak_parameters)
    if len({p.name for p in parameters}) != len(parameters):
        raise ValueError(f"{id}: parameter names collide after renaming the leak's")
    main_names = main.parameter_names
    last = _LastEvaluation()

    def both_paths(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                   values: Mapping[str, FloatArray]) -> tuple[FloatArray, FloatArray]:
        # The likelihood asks for the sum, then for the window condition at the same point
        # (the same inputs): the paths are evaluated once for both.
        key = (voltage_V, temperature_K, device, *(values[k] for k in sorted(values)))
        found = last.lookup(key)
        if found is not None:
            return found
        own_main = {k: values[k] for k in main_names}
        own_leak = {own: values[new] for own, new in names.items()}
        currents = (main.current(voltage_V, temperature_K, own_main, device,
                                 enforce_validity=False),
                    leak.current(voltage_V, temperature_K, own_leak, device,
                                 enforce_validity=False))
        last.store(key, currents)
        return currents

    def magnitude(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                  **values: FloatArray) -> FloatArray:
        # The composite's own validity covers both paths' conditions (declared below).
        main_current, leak_current = both_paths(voltage_V, temperature_K, device, values)
        return main_current + leak_current

    def each_path_leads_somewhere(voltage_V: FloatArray, temperature_K: FloatArray,
                                  device: Device, **values: FloatArray) -> np.ndarray:
        with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
            main_current, leak_current = (np.abs(c) for c in both_paths(
                voltage_V, temperature_K, device, values))
        main_leads = np.atleast_2d(main_current > leak_current)
        leak_leads = np.atleast_2d(leak_current > main_current)
        return main_leads.any(axis=-1) & leak_leads.any(axis=-1)

    return Mechanism(
        id=id, family=main.family, name=name, window_condition=each_path_leads_somewhere,
        formula=f"I = I_{main.id} + I_{leak.id} (paths in parallel)",
        source=f"main path: {main.source}; leak path: {leak.source}",
        parameters=parameters, magnitude=magnitude, plots=main.plots,
        temperature_dependence=(f"{main.temperature_dependence}, plus a leak: "
                                f"{leak.temperature_dependence}"),
        needs_area=main.needs_area or leak.needs_area,
        estimates=main.estimates, checks=main.checks,
        validity=(*(_path_condition(c, {n: n for n in main_names}, leak=False)
                    for c in main.validity),
                  *(_path_condition(c, names, leak=True) for c in leak.validity)),
        options={"paths": (main.id, leak.id)},
    )


def path_currents(mechanism: Mechanism, voltage_V: FloatArray, temperature_K: FloatArray,
                  params: Mapping[str, FloatArray], device: Device
                  ) -> dict[str, FloatArray] | None:
    """Each path's current of a composite declared by :func:`parallel_paths` (else None).

    Returns
    -------
    dict or None
        ``{main id: I_main, leak id: I_leak}`` in A, broadcast like :meth:`Mechanism.current`
        (bare formulas: the regime map asks which path carries the current, not whether the
        formulas hold there).
    """
    from mechid.catalogue import get_mechanism

    paths = mechanism.options.get("paths")
    if not paths:
        return None
    main, leak = (get_mechanism(p) for p in paths)
    names = leak_parameter_names(main, leak)
    return {
        main.id: main.current(voltage_V, temperature_K,
                              {k: params[k] for k in main.parameter_names}, device,
                              enforce_validity=False),
        leak.id: leak.current(voltage_V, temperature_K,
                              {own: params[new] for own, new in names.items()}, device,
                              enforce_validity=False),
    }


def largest_share(currents: Mapping[str, FloatArray]) -> tuple[np.ndarray, FloatArray]:
    """Index of the path carrying the most current at each point, and its share of the total."""
    stacked = np.abs(np.stack(list(currents.values())))
    total = stacked.sum(axis=0)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.argmax(stacked, axis=0), np.max(stacked, axis=0) / total


_FILM_VOLTAGE_CACHE = threading.local()


def _cache_key(*arrays: np.ndarray) -> tuple:
    return tuple((a.shape, a.tobytes()) for a in arrays)


def film_voltage_V(main: Mechanism, voltage_abs_V: FloatArray, temperature_K: FloatArray,
                   device: Device, resistance_ohm: FloatArray,
                   values: Mapping[str, FloatArray]) -> FloatArray:
    """The bias ``u`` across the film when ``|V|`` is applied through ``R_s``.

    Solves ``g(u) = u + R_s |I_main(u)| - |V| = 0`` on ``[0, |V|]``, where ``g`` rises from
    ``-|V|`` (for a current that rises with bias): the Illinois variant of false position
    (Dowell & Jarratt, BIT 11, 168 (1971)), which keeps the root bracketed and falls back to
    bisection where a trial current cannot be evaluated (it then counts as too small). Each
    point stops when ``|g| <= 1e-13 |V|`` or its bracket is that narrow. Broadcasts like the
    formula (points ``(n,)``, parameter sets ``(m, 1)``). The last result is kept per
    thread: the likelihood asks for the same solution again for the validity conditions and
    the window condition.
    """
    v = np.asarray(voltage_abs_V, dtype=float)
    t = np.asarray(temperature_K, dtype=float)
    r = np.asarray(resistance_ohm, dtype=float)
    own = {k: np.asarray(values[k], dtype=float) for k in main.parameter_names}
    key = _cache_key(v, t, r, *own.values())
    last = getattr(_FILM_VOLTAGE_CACHE, "entry", None)
    if last is not None and last[0] == key:
        return last[1]
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        film = _illinois_film_voltage(main, v, t, r, own, device)
    _FILM_VOLTAGE_CACHE.entry = (key, film)
    return film


def _illinois_film_voltage(main: Mechanism, v: FloatArray, t: FloatArray, r: FloatArray,
                           own: Mapping[str, FloatArray], device: Device) -> FloatArray:
    """The root search of :func:`film_voltage_V` on the flattened broadcast arrays."""
    shape = np.broadcast_shapes(v.shape, t.shape, r.shape, *(a.shape for a in own.values()))

    def flat(a: FloatArray) -> FloatArray:
        return np.broadcast_to(a, shape).ravel()

    bias, temperature, resistance = flat(v), flat(t), flat(r)
    params = {k: flat(a) for k, a in own.items()}
    g_high = resistance * np.abs(main.magnitude(bias, temperature, device, **params))

    def excess(trial: FloatArray, index: np.ndarray) -> FloatArray:
        current = main.magnitude(trial, temperature[index], device,
                                 **{k: a[index] for k, a in params.items()})
        return trial - bias[index] + resistance[index] * np.abs(current)

    # Where the formula cannot be evaluated at the applied bias itself, the point is left at
    # u = |V| (its current stays NaN, so the set is refused, never extrapolated).
    active = np.flatnonzero((bias > 0) & np.isfinite(g_high))
    film = rising_root(excess, np.zeros(bias.size), bias.copy(), -bias, g_high,
                       _FILM_TOLERANCE * bias, max_steps=_FILM_MAX_STEPS, active=active)
    return film.reshape(shape)


def _series_condition(condition: ValidityCondition, main: Mechanism) -> ValidityCondition:
    """A main-path condition evaluated at the film voltage instead of the applied bias."""
    def evaluate(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                 **values: FloatArray) -> FloatArray:
        film = film_voltage_V(main, voltage_V, temperature_K, device,
                              values[SERIES_RESISTANCE], values)
        return condition.evaluate(film, temperature_K, device,
                                  **{k: values[k] for k in main.parameter_names})

    return replace(condition, quantity=f"{condition.quantity} [at the film voltage V - I R_s]",
                   evaluate=evaluate)


def behind_series_resistance(main: Mechanism, *, id: str, name: str) -> Mechanism:
    """Declare ``main`` in series with a resistance: ``I = f(V - I R_s)``.

    Parameters
    ----------
    main : Mechanism
        An odd mechanism whose current rises with bias.
    id, name : str
        The composite's stable id and human name.

    Returns
    -------
    Mechanism
        Odd in V, with the main parameters and ``series_resistance_ohm``; its window
        condition asks the resistor to take at least :data:`SERIES_DROP_MIN` of the bias at
        one fitted point (see the module).
    """
    if not main.is_odd:
        raise ValueError(f"{id}: a series resistance is declared for mechanisms odd in V")
    resistance = Parameter(
        name=SERIES_RESISTANCE, unit="ohm", symbol="R_s",
        description="series (contact, lead or spreading) resistance",
        lower=1e-1, upper=1e12, typical=1e3, log_scale=True)

    def magnitude(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                  **values: FloatArray) -> FloatArray:
        film = film_voltage_V(main, voltage_V, temperature_K, device,
                              values[SERIES_RESISTANCE], values)
        own = {k: values[k] for k in main.parameter_names}
        return np.abs(main.magnitude(film, temperature_K, device, **own))

    def resistor_is_seen(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                         **values: FloatArray) -> np.ndarray:
        # Zero bias as NaN, exactly as Mechanism.current passes it to the formula, so that
        # the solution of this likelihood evaluation is found in the cache, not solved again.
        biased = np.where(voltage_V > 0, voltage_V, np.nan)
        film = film_voltage_V(main, biased, temperature_K, device,
                              values[SERIES_RESISTANCE], values)
        with np.errstate(invalid="ignore", divide="ignore"):
            share = np.atleast_2d((biased - film) / biased)
        return np.any(share >= SERIES_DROP_MIN, axis=-1)

    return Mechanism(
        id=id, family=main.family, name=name, window_condition=resistor_is_seen,
        formula=f"I = I_{main.id}(V - I R_s) (series resistance, solved self-consistently)",
        source=(f"{main.source}; series resistance: Sze & Ng, Physics of Semiconductor "
                "Devices, 3rd ed. (2007), ch. 3"),
        parameters=(*main.parameters, resistance), magnitude=magnitude, plots=main.plots,
        temperature_dependence=f"{main.temperature_dependence}, bent at the highest currents "
                               "by a series resistance",
        needs_area=main.needs_area, estimates=main.estimates, checks=main.checks,
        validity=tuple(_series_condition(c, main) for c in main.validity),
        options={"series_with": main.id},
    )
