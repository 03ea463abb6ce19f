"""Electrode-resolved hypotheses: one odd mechanism with some parameters per bias polarity.

A catalogued mechanism declared by its ``magnitude`` is odd in the bias,
``I(-V) = -I(V)``: one set of parameters describes both polarities, as for a film between two
identical electrodes. Between dissimilar electrodes the quantities that belong to an
electrode differ between the polarities. For emission over an interface barrier the
carriers come from whichever electrode injects at that polarity (the cathode), so the
barrier height is that electrode's (Sze & Ng, Physics of Semiconductor Devices, 3rd ed.
2007, metal-semiconductor contacts; the polarity dependence of tunnelling between
dissimilar electrodes: Simmons, J. Appl. Phys. 34, 2581 (1963), abstract checked: "the J-V
characteristic is polarity-dependent").

:func:`electrode_resolved` builds such a hypothesis from an odd mechanism: the named
parameters are declared twice, once for the electrode that injects at positive bias and
once for the electrode that injects at negative bias, and the signed formula is

.. math::

    I(V) = \\operatorname{sign}(V)\\,|I|_{\\text{base}}(|V|;\\ \\theta_\\pm)

with the positive-bias parameters ``theta_+`` on the points with ``V > 0`` and
``theta_-`` on those with ``V < 0`` (zero at ``V = 0``). With equal values on both sides it
is the base mechanism. "Positive bias" is ``V > 0`` as recorded in the data; the electrode
that injects electrons there is the one at the lower potential.

Each side's formula holds where the base formula holds with that side's parameters, so
every base validity condition is declared once per side, evaluated on that side's points.
"""

from __future__ import annotations

from collections.abc import Callable, Collection, Mapping
from dataclasses import fields, replace
from typing import Literal

import numpy as np

from mechid.catalogue.base import FloatArray, Mechanism, Parameter
from mechid.catalogue.checks import CheckSpec, PlotEstimate
from mechid.catalogue.emission import SCHOTTKY_EMISSION
from mechid.catalogue.tunnelling import FOWLER_NORDHEIM
from mechid.catalogue.validity import ValidityCondition
from mechid.device import Device

Side = Literal["positive_bias", "negative_bias"]

#: The two sides, in declaration order.
SIDES: tuple[Side, Side] = ("positive_bias", "negative_bias")

_SIDE_WORDS: dict[Side, str] = {
    "positive_bias": "the electrode that injects at positive bias (V > 0 as recorded)",
    "negative_bias": "the electrode that injects at negative bias (V < 0 as recorded)",
}
_SIDE_SYMBOL: dict[Side, str] = {"positive_bias": "+", "negative_bias": "-"}
_SIDE_POINTS: dict[Side, str] = {"positive_bias": "V > 0", "negative_bias": "V < 0"}


def unit_suffix(parameter: Parameter) -> str:
    """The unit suffix of a parameter's name (``"_eV"``, ``"_S_per_cm"``; ``""`` if none).

    Raises
    ------
    ValueError
        When the name does not end with the suffix its unit implies.
    """
    if parameter.unit in ("", "1"):
        return ""
    suffix = "_" + parameter.unit.replace("/", "_per_").replace(" ", "_")
    if not parameter.name.endswith(suffix):
        raise ValueError(f"{parameter.name}: name does not end with the unit suffix {suffix!r} "
                         f"of its unit {parameter.unit!r}")
    return suffix


def side_parameter_name(parameter: Parameter, side: Side) -> str:
    """The name of ``parameter`` for one side: the side inserted before the unit suffix.

    ``barrier_height_eV`` -> ``barrier_height_positive_bias_eV``; a dimensionless
    ``dielectric_constant`` -> ``dielectric_constant_positive_bias``.
    """
    suffix = unit_suffix(parameter)
    stem = parameter.name[: len(parameter.name) - len(suffix)]
    return f"{stem}_{side}{suffix}"


def side_parameter(parameter: Parameter, side: Side) -> Parameter:
    """The declaration of ``parameter`` for one side: same unit, range and prior."""
    return replace(
        parameter,
        name=side_parameter_name(parameter, side),
        symbol=f"{parameter.symbol}{_SIDE_SYMBOL[side]}",
        description=f"{parameter.description}; of {_SIDE_WORDS[side]}",
    )


def evaluate_on_points(
    formula: Callable[..., FloatArray],
    voltage_V: FloatArray,
    temperature_K: FloatArray,
    device: Device,
    params: Mapping[str, FloatArray],
    selected: FloatArray,
    fill: float,
) -> FloatArray:
    """``formula(|V|, T, device, **params)`` on the selected data points only; ``fill`` elsewhere.

    Parameters
    ----------
    formula : callable
        A magnitude formula or a validity quantity, ``f(|V|, T, device, **params)``.
    voltage_V, temperature_K : ndarray
        Data (signed bias), broadcastable with the parameters.
    device : Device
        Passed through.
    params : mapping
        The formula's parameters, floats or arrays (``(m, 1)`` for ``m`` parameter sets).
    selected : ndarray of bool
        Shape of ``voltage_V``: the points to evaluate.
    fill : float
        The value everywhere else.

    Returns
    -------
    ndarray
        The broadcast shape of data and parameters.

    Notes
    -----
    The usual case (bias of shape ``(n,)``, temperature a scalar or ``(n,)``, every parameter
    a scalar or of shape ``(..., 1)``) selects the data columns, so the formula runs on
    the selected points for every parameter set without copies of the parameters. Any other
    broadcast (e.g. a temperature x bias grid) falls back to broadcasting everything to the
    common shape and evaluating the selected elements as one flat array.
    """
    v = np.asarray(voltage_V, dtype=float)
    t = np.asarray(temperature_K, dtype=float)
    values = {k: np.asarray(a, dtype=float) for k, a in params.items()}
    shape = np.broadcast_shapes(v.shape, t.shape, *(a.shape for a in values.values()))
    out = np.full(shape, fill, dtype=float)
    columns = (v.ndim == 1 and t.shape in ((), v.shape) and len(shape) >= 1
               and shape[-1] == v.shape[0]
               and all(a.ndim == 0 or a.shape[-1] == 1 for a in values.values()))
    if columns:
        index = np.flatnonzero(selected)
        if index.size:
            out[..., index] = formula(np.abs(v[index]), t if t.ndim == 0 else t[index], device,
                                      **values)
        return out
    mask = np.broadcast_to(np.asarray(selected, dtype=bool), shape)
    if mask.any():
        v_all, t_all, *p_all = np.broadcast_arrays(v, t, *values.values())
        picked = dict(zip(values, (a[mask] for a in p_all), strict=True))
        out[mask] = formula(np.abs(v_all[mask]), t_all[mask], device, **picked)
    return out


def _side_values(values: Mapping[str, FloatArray], names: Mapping[str, str]) -> dict[str, FloatArray]:
    """The base mechanism's parameters for one side (``names``: base name -> side name)."""
    return {base: values[names.get(base, base)] for base in names}


def _side_condition(condition: ValidityCondition, side: Side,
                    names: Mapping[str, str]) -> ValidityCondition:
    """A base condition evaluated on one side's points with that side's parameters.

    Points of the other polarity and zero bias are outside this condition: it reports its
    limit there (the condition holds).
    """
    symbol, _, explanation = condition.quantity.partition(" (")
    where = _SIDE_POINTS[side]
    quantity = (f"{symbol} at {where} ({explanation[:-1]}; " if explanation
                else f"{symbol} at {where} (") + f"parameters of {_SIDE_WORDS[side]})"
    sign = 1.0 if side == "positive_bias" else -1.0

    def evaluate(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                 **values: FloatArray) -> FloatArray:
        v = np.asarray(voltage_V, dtype=float)
        return evaluate_on_points(condition.evaluate, v, temperature_K, device,
                                  _side_values(values, names), sign * v > 0, condition.limit)

    return ValidityCondition(id=f"{condition.id}_{side}", quantity=quantity,
                             limit=condition.limit, bound=condition.bound,
                             reason=condition.reason, evaluate=evaluate)


def _named_parameters(spec: CheckSpec) -> set[str]:
    """The declared parameters a check names (its tested parameters and its ``parameter``)."""
    named = set(spec.tested_parameters)
    parameter = getattr(spec, "parameter", None)
    if parameter is not None:
        named.add(parameter)
    return named


def _carried_checks(checks: tuple[CheckSpec, ...], split: Collection[str]
                    ) -> tuple[tuple[CheckSpec, ...], tuple[str, ...]]:
    """The base checks kept for the resolved mechanism, and the names of those dropped.

    A check naming no split parameter is kept. One whose ``parameter`` may be None (e.g.
    :class:`~mechid.catalogue.checks.QuantityInRange`) is remapped to ``parameter=None``:
    its range test of the plot quantity stays, but no longer stands for a declared
    parameter (the folded plots mix both electrodes' values). Any other check naming a
    split parameter (e.g. :class:`~mechid.catalogue.checks.ZeroFieldBarrier`, which reads
    one barrier from plots of both polarities) is dropped.
    """
    kept: list[CheckSpec] = []
    dropped: list[str] = []
    for spec in checks:
        if not _named_parameters(spec) & set(split):
            kept.append(spec)
            continue
        optional = {f.name: f.default for f in fields(spec)}.get("parameter", ...) is None
        remapped = replace(spec, parameter=None) if optional else None
        if remapped is not None and not _named_parameters(remapped) & set(split):
            kept.append(remapped)
        else:
            dropped.append(type(spec).__name__)
    return tuple(kept), tuple(dropped)


def _carried_estimates(estimates: tuple[PlotEstimate, ...],
                       side_names: Mapping[str, tuple[str, str]]) -> tuple[PlotEstimate, ...]:
    """Base estimates; one of a split parameter becomes one per side (the same reading)."""
    carried: list[PlotEstimate] = []
    for estimate in estimates:
        if estimate.parameter not in side_names:
            carried.append(estimate)
            continue
        carried.extend(replace(estimate, parameter=name, quantity=estimate.key)
                       for name in side_names[estimate.parameter])
    return tuple(carried)


def electrode_resolved(base: Mechanism, split: Collection[str], *, id: str, name: str,
                       source_note: str) -> Mechanism:
    """An electrode-resolved variant of an odd mechanism: ``split`` parameters per polarity.

    Parameters
    ----------
    base : Mechanism
        An odd mechanism (declared by its ``magnitude``).
    split : collection of str
        Names of the base parameters that belong to the injecting electrode; each is declared
        twice (:func:`side_parameter`), every other parameter is shared.
    id, name : str
        Id and human name of the new mechanism.
    source_note : str
        Why the split parameters belong to the injecting electrode, with its source (appended
        to the base source).

    Returns
    -------
    Mechanism
        Declared by its signed formula. Plots: the base plots (on both polarities folded onto
        |V|). Estimates: a base estimate of a split parameter is given to both sides. Checks:
        see :func:`_carried_checks` (remapped or dropped where they name a split
        parameter). Validity: every base condition once per side. Needs: data at both
        polarities that the screening does not find equal.

    Raises
    ------
    ValueError
        When ``base`` is not odd, or ``split`` names no parameter or an undeclared one.
    """
    if not base.is_odd or base.magnitude is None:
        raise ValueError(f"{base.id}: only a mechanism odd in V (a magnitude) can be resolved")
    unknown = [n for n in split if n not in base.parameter_names]
    if unknown or not split:
        raise ValueError(f"{base.id}: cannot split {', '.join(unknown) or 'nothing'}; "
                         f"its parameters: {', '.join(base.parameter_names)}")
    parameters: list[Parameter] = []
    side_names: dict[str, tuple[str, str]] = {}
    for parameter in base.parameters:
        if parameter.name in split:
            pair = tuple(side_parameter(parameter, side) for side in SIDES)
            parameters.extend(pair)
            side_names[parameter.name] = (pair[0].name, pair[1].name)
        else:
            parameters.append(parameter)
    names = {side: {p: side_names[p][k] if p in side_names else p for p in base.parameter_names}
             for k, side in enumerate(SIDES)}
    magnitude = base.magnitude

    def signed_current(voltage_V: FloatArray, temperature_K: FloatArray, device: Device,
                       **values: FloatArray) -> FloatArray:
        v = np.asarray(voltage_V, dtype=float)
        positive = evaluate_on_points(magnitude, v, temperature_K, device,
                                      _side_values(values, names["positive_bias"]), v > 0, 0.0)
        negative = evaluate_on_points(magnitude, v, temperature_K, device,
                                      _side_values(values, names["negative_bias"]), v < 0, 0.0)
        return positive - negative

    checks, dropped = _carried_checks(base.checks, split)
    listed = ", ".join(split)
    return Mechanism(
        id=id,
        family=base.family,
        name=name,
        formula=(f"{base.formula};  I(V) = sign(V) |I|(|V|) with {listed} of the electrode "
                 "injecting at that polarity (one value for V > 0, one for V < 0)"),
        source=f"{base.source}; {source_note}",
        parameters=tuple(parameters),
        signed_current=signed_current,
        plots=base.plots,
        temperature_dependence=base.temperature_dependence,
        options={**base.options, "electrode_resolved_from": base.id, "split_parameters":
                 tuple(split), "dropped_checks": dropped},
        needs_area=base.needs_area,
        estimates=_carried_estimates(base.estimates, side_names),
        checks=checks,
        validity=tuple(_side_condition(c, side, names[side])
                       for side in SIDES for c in base.validity),
        # A barrier per electrode shows as an exponential difference between the polarities.
        needs=tuple(dict.fromkeys((*base.needs, "both_polarities", "polarities_differ"))),
    )


_EMISSION_NOTE = (
    "emission mechanisms take the barrier of whichever electrode injects at that polarity "
    "(Sze & Ng 2007, metal-semiconductor contacts; polarity dependence between dissimilar "
    "electrodes: Simmons, J. Appl. Phys. 34, 2581 (1963))"
)

#: Schottky emission with the barrier of each polarity's injecting electrode. Each side keeps
#: the base formula's net-flux factor 1 - exp(-eV/kT) (symmetric MIM film); with unequal
#: barriers the back-flux over the other electrode's barrier is then approximated by the
#: injecting one's (ours), which matters only within a few kT of zero bias.
SCHOTTKY_EMISSION_TWO_BARRIERS = electrode_resolved(
    SCHOTTKY_EMISSION, ("barrier_height_eV",), id="schottky_emission_two_barriers",
    name="Schottky emission, one barrier per electrode", source_note=_EMISSION_NOTE,
)

#: Fowler-Nordheim tunnelling with the barrier of each polarity's injecting electrode.
FOWLER_NORDHEIM_TWO_BARRIERS = electrode_resolved(
    FOWLER_NORDHEIM, ("barrier_height_eV",), id="fowler_nordheim_two_barriers",
    name="Fowler-Nordheim tunnelling, one barrier per electrode", source_note=_EMISSION_NOTE,
)
