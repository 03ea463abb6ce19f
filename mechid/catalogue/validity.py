"""Validity domains of the catalogue formulas, and where a fit would need to leave them.

Every published formula holds only under stated conditions (a barrier that stays opaque, a
thermal expansion that stays small, a lowering smaller than the barrier it lowers). A
mechanism declares each condition once, as a :class:`ValidityCondition`: the quantity that
must stay on one side of a limit, computed from the bias, the temperature and the
parameters. :meth:`mechid.catalogue.base.Mechanism.current` returns NaN wherever a condition
fails, so the likelihood (which is -inf wherever the model is not finite) refuses those
draws: the formula is never used where its source says it does not hold.

Two kinds of condition are worth telling apart (see DEVELOPERS.md, "Validity domains"):

* parameter-only conditions (e.g. an opaque direct-tunnelling barrier at zero bias): the
  declared parameter ranges are chosen so that they cut away little of the prior box;
* data-dependent conditions (bias, temperature): the part of the prior they refuse depends on
  the measured window; a refused draw is a parameter set that cannot describe those data with
  this formula, and the evidence counts it as predicting nothing.

:func:`validity_violations` is the diagnostic that lets a report say so: given a mechanism,
data points and a batch of parameter draws (e.g. the posterior of a fit made without the
refusal, or the prior), it says which conditions fail, for what fraction of the draws and
points, and the most extreme value the draws needed.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from mechid.device import Device
from mechid.errors import MechidError

if TYPE_CHECKING:  # the declaration module imports this one
    from mechid.catalogue.base import Mechanism

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

#: Signature of a condition's quantity: q(|V| in V, T in K, device, **params) -> values.
QuantityFormula = Callable[..., FloatArray]


@dataclass(frozen=True)
class ValidityCondition:
    """One condition under which a mechanism's formula holds: ``quantity <= limit`` (or ``>=``).

    Parameters
    ----------
    id : str
        Stable id, e.g. ``"thermal_factor_argument"``.
    quantity : str
        Plain name of the quantity with its symbol, e.g. ``"pi c kT (thermal factor argument)"``.
    limit : float
        The bound the quantity must respect.
    bound : {"upper", "lower"}
        ``"upper"``: the formula holds where ``quantity <= limit``; ``"lower"``: where
        ``quantity >= limit``.
    reason : str
        One plain sentence: why the formula fails beyond the limit, and its source.
    evaluate : callable
        ``evaluate(|V|, T, device, **params) -> quantity``, broadcasting like the formula
        (data ``(n,)``, parameters ``(m, 1)``). NaN counts as a failed condition.
    """

    id: str
    quantity: str
    limit: float
    bound: Literal["upper", "lower"]
    reason: str
    evaluate: QuantityFormula

    def holds(self, quantity_values: ArrayLike) -> BoolArray:
        """True where the quantity respects the limit (False where it is NaN)."""
        q = np.asarray(quantity_values, dtype=float)
        return q <= self.limit if self.bound == "upper" else q >= self.limit

    def describe(self) -> str:
        """``"<symbol> <= <limit>"`` in plain text (the quantity without its explanation)."""
        sign = "<=" if self.bound == "upper" else ">="
        return f"{self.quantity.split(' (')[0]} {sign} {self.limit:g}"


def condition_quantities(
    conditions: tuple[ValidityCondition, ...],
    voltage_abs_V: ArrayLike,
    temperature_K: ArrayLike,
    device: Device,
    params: Mapping[str, ArrayLike],
) -> dict[str, FloatArray]:
    """Each condition's quantity at the given points, keyed by condition id.

    Parameters
    ----------
    conditions : tuple of ValidityCondition
        A mechanism's declared conditions.
    voltage_abs_V, temperature_K : array_like
        Bias magnitude in V (> 0) and temperature in K, broadcastable.
    device : Device
        The device description (passed through to the quantity formulas).
    params : mapping
        Every parameter of the mechanism by name, floats or arrays of shape ``(m, 1)``.

    Returns
    -------
    dict of str to ndarray
        Quantities broadcast to the common shape of data and parameters.
    """
    v = np.asarray(voltage_abs_V, dtype=float)
    t = np.asarray(temperature_K, dtype=float)
    values = {k: np.asarray(val, dtype=float) for k, val in params.items()}
    shape = np.broadcast_shapes(v.shape, t.shape, *(a.shape for a in values.values()))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return {
            c.id: np.broadcast_to(np.asarray(c.evaluate(v, t, device, **values), dtype=float),
                                  shape)
            for c in conditions
        }


def within_validity(
    conditions: tuple[ValidityCondition, ...],
    voltage_abs_V: ArrayLike,
    temperature_K: ArrayLike,
    device: Device,
    params: Mapping[str, ArrayLike],
) -> BoolArray:
    """True where every condition holds (arguments as in :func:`condition_quantities`).

    The same mask as testing each of :func:`condition_quantities`' arrays, broadcast once at
    the end instead of once per condition (this runs in every likelihood evaluation).
    """
    v = np.asarray(voltage_abs_V, dtype=float)
    t = np.asarray(temperature_K, dtype=float)
    values = {k: np.asarray(val, dtype=float) for k, val in params.items()}
    shape = np.broadcast_shapes(v.shape, t.shape, *(a.shape for a in values.values()))
    mask: BoolArray | bool = True
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        for condition in conditions:
            quantity = np.asarray(condition.evaluate(v, t, device, **values), dtype=float)
            mask = mask & condition.holds(quantity)
    return np.array(np.broadcast_to(mask, shape), dtype=bool)


@dataclass(frozen=True)
class ValidityViolation:
    """How often one validity condition fails over a batch of draws and data points.

    Attributes
    ----------
    condition_id, quantity, reason : str
        From the :class:`ValidityCondition`.
    requirement : str
        ``"<quantity> <= <limit>"`` (or ``>=``).
    fraction_of_draws : float
        Share of the draws for which the condition fails at one data point or more.
    fraction_of_points : float
        Share of all (draw, point) pairs where it fails.
    extreme_value : float
        The value furthest beyond the limit among the failing pairs (NaN when the quantity
        itself is undefined there).
    at_voltage_V, at_temperature_K : float
        The data point (bias magnitude, temperature) of ``extreme_value``.
    """

    condition_id: str
    quantity: str
    requirement: str
    reason: str
    fraction_of_draws: float
    fraction_of_points: float
    extreme_value: float
    at_voltage_V: float
    at_temperature_K: float

    def message(self) -> str:
        """A plain sentence for a report."""
        return (
            f"{self.fraction_of_draws:.0%} of the draws need {self.quantity} = "
            f"{self.extreme_value:.3g} (at {self.at_voltage_V:g} V, {self.at_temperature_K:g} K); "
            f"the formula holds only for {self.requirement}: {self.reason}"
        )


def validity_violations(
    mechanism: Mechanism,
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    draws: Mapping[str, ArrayLike],
    device: Device,
) -> tuple[ValidityViolation, ...]:
    """Which validity conditions a batch of parameter draws breaks on the given data points.

    Parameters
    ----------
    mechanism : Mechanism
        The catalogued mechanism (its ``validity`` conditions are evaluated).
    voltage_V, temperature_K : array_like
        Data points, shape ``(n,)``; zero-bias points are skipped, and the bias sign is
        ignored unless the mechanism declares a signed formula.
    draws : mapping
        Every parameter of the mechanism by name, each of shape ``(m,)`` (``m`` draws).
    device : Device
        The device description.

    Returns
    -------
    tuple of ValidityViolation
        One entry per condition that fails somewhere, in declaration order; empty when every
        draw is inside the domain at every point.
    """
    v = np.ravel(np.asarray(voltage_V, dtype=float))
    v = np.abs(v) if mechanism.is_odd else v  # signed formulas' conditions read the sign
    t = np.ravel(np.asarray(temperature_K, dtype=float))
    v, t = np.broadcast_arrays(v, t)
    keep = v != 0  # zero bias skipped; a signed formula keeps its negative biases
    v, t = v[keep], t[keep]
    columns = {k: np.reshape(np.asarray(a, dtype=float), (-1, 1)) for k, a in draws.items()}
    quantities = condition_quantities(mechanism.validity, v, t, device, columns)
    found = []
    for condition in mechanism.validity:
        q = quantities[condition.id]
        fails = ~condition.holds(q)
        if not fails.any():
            continue
        beyond = np.where(fails, q - condition.limit, np.nan)
        beyond = beyond if condition.bound == "upper" else -beyond
        defined = np.isfinite(beyond)
        flat = int(np.nanargmax(np.where(defined, beyond, -np.inf))) if defined.any() else int(
            np.argmax(fails))
        draw_index, point_index = np.unravel_index(flat, q.shape)
        found.append(ValidityViolation(
            condition_id=condition.id,
            quantity=condition.quantity,
            requirement=condition.describe(),
            reason=condition.reason,
            fraction_of_draws=float(np.mean(fails.any(axis=1))),
            fraction_of_points=float(np.mean(fails)),
            extreme_value=float(q[draw_index, point_index]),
            at_voltage_V=float(v[point_index]),
            at_temperature_K=float(t[point_index]),
        ))
    return tuple(found)


class FormulaNotApplicableError(MechidError):
    """A mechanism's formula holds nowhere on the data for any parameter set tried.

    Raised by the fit when every prior draw is refused by the validity domain; the message
    names the conditions that fail, and ``violations`` holds them as records (from
    :func:`validity_violations`) for the result to list the mechanism as not fitted.
    """

    def __init__(self, message: str, violations: tuple[ValidityViolation, ...] = ()) -> None:
        super().__init__(message)
        self.violations = violations


def not_applicable_message(
    mechanism: Mechanism,
    voltage_V: ArrayLike,
    temperature_K: ArrayLike,
    draws: Mapping[str, ArrayLike],
    device: Device,
) -> str:
    """Why ``mechanism`` cannot describe these data: one sentence per failing condition."""
    n_draws = len(np.ravel(next(iter(draws.values())))) if draws else 0
    found = validity_violations(mechanism, voltage_V, temperature_K, draws, device)
    return not_applicable_text(mechanism.id, n_draws, found)


def not_applicable_text(mechanism_id: str, n_draws: int,
                        found: tuple[ValidityViolation, ...]) -> str:
    """The sentence of :func:`not_applicable_message` from violations already computed."""
    reasons = "; ".join(v.message() for v in found) or "its formula is not finite there"
    return (f"{mechanism_id} was not fitted: none of {n_draws} prior draws is inside its "
            f"formula's validity domain on these data. {reasons}")
