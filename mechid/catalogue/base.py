"""The declaration every conduction mechanism is written in.

A :class:`Mechanism` holds everything the rest of mechid needs to know about one mechanism:
its stable id and family, the published formula (a vectorised function), its parameters
with unit, physical range and default prior (:class:`Parameter`), its straightened plots
(:class:`StraightenedPlot`) and the published source. Nothing outside
:mod:`mechid.catalogue` re-lists mechanisms or their parameters; they read these objects.

Shapes
------
``Mechanism.current(voltage_V, temperature_K, params, device)`` broadcasts: voltages and
temperatures of shape ``(n,)`` with parameter values of shape ``(m, 1)`` give currents of
shape ``(m, n)``, which is how the likelihood evaluates all walkers in one call.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from mechid.catalogue.checks import CheckSpec, DiodeEstimate, PlotEstimate
from mechid.catalogue.validity import ValidityCondition, within_validity
from mechid.device import Device
from mechid.errors import UnknownMechanismError

Family = Literal["tunnelling", "emission", "hopping", "space_charge", "ohmic"]
FloatArray = NDArray[np.float64]

#: What a mechanism may need of the data before it is worth fitting (evaluated by the
#: screening, :mod:`mechid.screening.applicability`): ``"both_polarities"`` -- data at both bias
#: signs (parameters declared per polarity are otherwise undetermined); ``"polarities_differ"``
#: -- not judged symmetric by the polarity-asymmetry diagnostic (a hypothesis whose current
#: differs between the polarities cannot win on data whose polarities agree);
#: ``"ideality_grows_on_cooling"`` -- the rectifying-contact analysis finds the ideality factor
#: rising as the temperature falls; ``"thermionic_field_signature"`` -- the device describes a
#: doped semiconductor, or the data meet both of the last two.
DataNeed = Literal["both_polarities", "polarities_differ", "ideality_grows_on_cooling",
                   "thermionic_field_signature"]

#: Signature of a condition on a whole fitted window: f(V, T, device, **params) -> bool of
#: shape (m,), whether each parameter set is admissible on these points (see Mechanism).
WindowCondition = Callable[..., NDArray[np.bool_]]

#: Signature of a magnitude formula: f(|V| in V, T in K, device, **params) -> |I| in A.
MagnitudeFormula = Callable[..., FloatArray]

#: Signature of a signed formula: f(V in V, either sign, T in K, device, **params) -> I in A.
SignedFormula = Callable[..., FloatArray]


def positive_or_nan(values: ArrayLike) -> FloatArray:
    """Return ``values`` as floats with every non-positive or NaN entry replaced by NaN.

    Straightened-plot transforms use it so that logarithms, square roots and reciprocals
    of undefined points give NaN silently instead of warnings or errors.
    """
    x = np.asarray(values, dtype=float)
    return np.where(x > 0, x, np.nan)


def iv_magnitudes(voltage_V: ArrayLike, current_A: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """Return ``(|V|, |I|)`` where bias and current are non-zero and share a sign, else NaN.

    A symmetric device gives ``I(-V) = -I(V)``, so both polarities map onto one branch;
    points with zero bias, zero current or a current against the bias (noise near zero
    bias) are undefined on logarithmic plots and come back as NaN.
    """
    v, i = np.broadcast_arrays(
        np.asarray(voltage_V, dtype=float), np.asarray(current_A, dtype=float)
    )
    same_sign = v * i > 0
    return np.where(same_sign, np.abs(v), np.nan), np.where(same_sign, np.abs(i), np.nan)


@dataclass(frozen=True)
class Parameter:
    """One physical parameter of a mechanism.

    Parameters
    ----------
    name : str
        Stable name with its unit suffix, e.g. ``"barrier_height_eV"``; used in the CLI,
        JSON and report.
    unit : str
        Unit as printed (``"eV"``, ``"nm"``, ``"S"``, ``"1"`` for dimensionless).
    symbol : str
        Short symbol for tables and axis labels (plain text, e.g. ``"phi_B"``).
    description : str
        One-line meaning.
    lower, upper : float
        Physical range; the default prior is uniform on it (log-uniform if ``log_scale``).
    typical : float
        A representative value (demo data, starting guesses, documentation).
    log_scale : bool
        True for scale parameters spanning decades (prefactors): prior uniform in log10.
    device_prior : str or None
        Name of the :class:`~mechid.device.Device` attribute that, when given, replaces the
        default prior by a Gaussian with the user's value and uncertainty.
    sample_in_log : bool
        Sample this parameter in log10 (the prior is unchanged; its density carries the
        Jacobian). Straightens power-law degeneracies such as thickness x sqrt(mass).
    """

    name: str
    unit: str
    symbol: str
    description: str
    lower: float
    upper: float
    typical: float
    log_scale: bool = False
    device_prior: str | None = None
    sample_in_log: bool = False

    def __post_init__(self) -> None:
        if not (self.lower < self.typical < self.upper):
            raise ValueError(f"{self.name}: typical value must lie inside ({self.lower}, {self.upper})")
        if (self.log_scale or self.sample_in_log) and self.lower <= 0:
            raise ValueError(f"{self.name}: a log-scale parameter needs a positive lower bound")

    @property
    def label(self) -> str:
        """Axis label with unit, e.g. ``"phi_B [eV]"``."""
        return self.symbol if self.unit in ("", "1") else f"{self.symbol} [{self.unit}]"


@dataclass(frozen=True)
class PlotRegime:
    """Where a straightened plot's straight-line form holds, judged from the line itself.

    Parameters
    ----------
    holds : callable
        ``holds(x, slope) -> bool array``: the points of one line (plot x values) inside the
        regime, given the slope of the line drawn through them.
    description : str
        The condition in words, e.g. ``"e a E/(2 k T) = slope x |V| >= 3"``.
    """

    holds: Callable[[FloatArray, float], NDArray[np.bool_]]
    description: str


@dataclass(frozen=True)
class StraightenedPlot:
    """A classical linearisation: a transform under which the mechanism is a straight line.

    Parameters
    ----------
    id : str
        Stable id, e.g. ``"fowler_nordheim_plot"``.
    title : str
        Human title, e.g. ``"Fowler-Nordheim plot"``.
    x_label, y_label : str
        Axis labels with units.
    grouping : {"per_temperature", "per_voltage"}
        One straight line per measured temperature (x from voltage), or one per selected
        voltage across temperatures (x from temperature, e.g. Arrhenius).
    transform : callable
        ``transform(voltage_V, temperature_K, current_A, device) -> (x, y)``, arrays of the
        input shape; points where the transform is undefined are NaN.
    interpret : callable
        ``interpret(slope, intercept, group_value, device) -> dict`` of physical quantities
        read from one line (group_value is the temperature in K or the voltage in V); keys
        carry unit suffixes. May return an empty dict when the device lacks a needed value.
    regime : PlotRegime, optional
        For a plot straight only in part of its range (``per_temperature`` plots): the
        screening fits the line, keeps the points where ``regime.holds``, refits until the
        kept points no longer change, and draws no line (the quantities undetermined) when
        fewer than four points remain. None: every point belongs to the line.
    """

    id: str
    title: str
    x_label: str
    y_label: str
    grouping: Literal["per_temperature", "per_voltage"]
    transform: Callable[[FloatArray, FloatArray, FloatArray, Device], tuple[FloatArray, FloatArray]]
    interpret: Callable[[float, float, float, Device], dict[str, float]]
    regime: PlotRegime | None = None

    def __post_init__(self) -> None:
        if self.regime is not None and self.grouping != "per_temperature":
            raise ValueError(f"{self.id}: a plot regime is evaluated on per_temperature lines only")


@dataclass(frozen=True)
class Mechanism:
    """A conduction mechanism: formula, parameters, straightened plots and source.

    Most mechanisms are odd in voltage: ``I(V) = sign(V) * magnitude(|V|)``, so both bias
    polarities are described by one set of parameters (symmetric device); they declare
    ``magnitude``. A mechanism whose current is not odd (a rectifying contact, barriers that
    differ between the two electrodes) declares ``signed_current`` instead: the formula of
    the signed current at signed bias, and its validity conditions then receive the signed
    bias too. Exactly one of the two is given. ``needs_area`` is
    False for mechanisms written directly as a current (no electrode area involved).
    ``estimates`` lists the parameters its straightened plots determine
    (:class:`~mechid.catalogue.checks.PlotEstimate`): the screening reads them into
    :class:`ParameterHints`, the fit's starting values. ``checks`` lists its consistency
    checks (:class:`~mechid.catalogue.checks.CheckSpec` subclasses), which the screening
    evaluates; every mechanism also gets the generic declared-range check.
    ``validity`` lists the conditions under which the formula holds
    (:class:`~mechid.catalogue.validity.ValidityCondition`); :meth:`current` returns NaN
    wherever one fails, so a fit refuses those draws. ``needs`` lists what the data must show
    before the analysis fits it (:data:`DataNeed`); a mechanism whose needs the screening finds
    unmet is left out with the reason recorded, unless it was asked for by name.
    ``window_condition`` restricts the prior by the fitted points as a whole (e.g. a composite
    whose paths must each carry the larger share somewhere in the measured window); the
    likelihood refuses the parameter sets it rejects, as it refuses those outside the validity
    domain. It receives the distinct fitted (|V|, T) pairs (signed V for a signed formula).
    ``contains`` names mechanisms that are special cases of this one, each with the map from
    its parameter values to this mechanism's (same current at every point): the fit uses it
    to detect a search that missed the nested mechanism's best region
    (:mod:`mechid.inference.nesting`).
    """

    id: str
    family: Family
    name: str
    formula: str
    source: str
    parameters: tuple[Parameter, ...]
    magnitude: MagnitudeFormula | None = None
    plots: tuple[StraightenedPlot, ...] = ()
    temperature_dependence: str = ""
    options: Mapping[str, Any] = field(default_factory=dict)
    needs_area: bool = True
    estimates: tuple[PlotEstimate | DiodeEstimate, ...] = ()
    checks: tuple[CheckSpec, ...] = ()
    validity: tuple[ValidityCondition, ...] = ()
    signed_current: SignedFormula | None = None
    needs: tuple[DataNeed, ...] = ()
    window_condition: WindowCondition | None = None
    contains: Mapping[str, Callable[[Mapping[str, float]], dict[str, float]]] = field(
        default_factory=dict)

    def __post_init__(self) -> None:
        if (self.magnitude is None) == (self.signed_current is None):
            raise ValueError(f"{self.id}: declare exactly one of magnitude (a current odd in V) "
                             "and signed_current")
        plot_ids = {plot.id for plot in self.plots}
        for spec in self.checks:
            read = [getattr(spec, a) for a in ("plot", "arrhenius_plot", "field_plot")
                    if hasattr(spec, a)]
            if any(plot_id not in plot_ids for plot_id in read):
                raise ValueError(f"{self.id}: {type(spec).__name__} reads an undeclared plot")
            named = [*spec.tested_parameters, *([spec.parameter] if hasattr(spec, "parameter")
                                                 and spec.parameter is not None else [])]
            unknown = [name for name in named if name not in self.parameter_names]
            if unknown:
                raise ValueError(f"{self.id}: {type(spec).__name__} names undeclared parameter "
                                 f"{', '.join(unknown)}")
        for estimate in self.estimates:
            if estimate.parameter not in self.parameter_names:
                raise ValueError(f"{self.id}: estimate of unknown parameter {estimate.parameter!r}")
            if isinstance(estimate, PlotEstimate) and estimate.plot not in plot_ids:
                raise ValueError(f"{self.id}: estimate from undeclared plot {estimate.plot!r}")

    @property
    def is_odd(self) -> bool:
        """True when ``I(-V) = -I(V)`` (the mechanism declares a ``magnitude``)."""
        return self.signed_current is None

    @property
    def parameter_names(self) -> tuple[str, ...]:
        """Parameter names in declaration order (the order of sampled vectors)."""
        return tuple(p.name for p in self.parameters)

    def __reduce_ex__(self, protocol: Any) -> Any:
        """Pickle a catalogued mechanism as its id (its formula may be a closure)."""
        from mechid.catalogue import MECHANISMS  # the registry imports this module

        if any(m is self for m in MECHANISMS):
            return (_catalogued_mechanism, (self.id,))
        return super().__reduce_ex__(protocol)

    def parameter(self, name: str) -> Parameter:
        """Return the declared :class:`Parameter` called ``name``."""
        for p in self.parameters:
            if p.name == name:
                return p
        known = ", ".join(self.parameter_names)
        raise UnknownMechanismError(f"{self.id} has no parameter {name!r}; its parameters: {known}")

    def typical_parameters(self) -> dict[str, float]:
        """A representative parameter set (the declared typical values)."""
        return {p.name: p.typical for p in self.parameters}

    def current(
        self,
        voltage_V: ArrayLike,
        temperature_K: ArrayLike,
        params: Mapping[str, ArrayLike],
        device: Device,
        *,
        enforce_validity: bool = True,
    ) -> FloatArray:
        """Current in A at the given biases and temperatures (broadcast with ``params``).

        Parameters
        ----------
        voltage_V, temperature_K : array_like
            Bias in V (either sign) and temperature in K, broadcastable.
        params : mapping
            Every declared parameter by name, each a float or an array broadcastable with the
            data (use shape ``(m, 1)`` to evaluate ``m`` parameter sets at once).
        device : Device
            Supplies the electrode area for mechanisms written as a current density.
        enforce_validity : bool, optional
            True (default, what fits use): NaN wherever a declared validity condition fails.
            False: the bare formula, wherever it can be evaluated (diagnostics only).

        Returns
        -------
        ndarray
            Current in A; zero at zero bias for odd mechanisms (a signed formula gives its own
            value there); NaN outside the formula's validity domain.
        """
        names = self.parameter_names
        missing = [n for n in names if n not in params]
        extra = [n for n in params if n not in names]
        if missing or extra:
            raise UnknownMechanismError(
                f"{self.id} needs parameters {', '.join(names)}"
                + (f"; missing {', '.join(missing)}" if missing else "")
                + (f"; unknown {', '.join(extra)}" if extra else "")
            )
        v = np.asarray(voltage_V, dtype=float)
        t = np.asarray(temperature_K, dtype=float)
        values = {k: np.asarray(val, dtype=float) for k, val in params.items()}
        if not self.is_odd:
            return self._signed(v, t, values, device, enforce_validity)
        v_abs = np.abs(v)
        biased = np.where(v_abs > 0, v_abs, np.nan)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            mag = self.magnitude(biased, t, device, **values)
        if enforce_validity and self.validity:
            mag = np.where(within_validity(self.validity, biased, t, device, values), mag, np.nan)
        return np.where(v_abs > 0, np.sign(v) * mag, 0.0)

    def _signed(self, v: FloatArray, t: FloatArray, values: Mapping[str, FloatArray],
                device: Device, enforce_validity: bool) -> FloatArray:
        """The current of a mechanism declared by its signed formula (see :meth:`current`)."""
        assert self.signed_current is not None
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            current = np.asarray(self.signed_current(v, t, device, **values), dtype=float)
        if enforce_validity and self.validity:
            current = np.where(within_validity(self.validity, v, t, device, values), current,
                               np.nan)
        return current


def _catalogued_mechanism(mechanism_id: str) -> Mechanism:
    """The registered mechanism of that id (unpickling helper)."""
    from mechid.catalogue import get_mechanism

    return get_mechanism(mechanism_id)


@dataclass(frozen=True)
class ParameterHints:
    """Starting values for one mechanism's fit, keyed by declared parameter name.

    Built by the screening from the mechanism's declared
    :class:`~mechid.catalogue.checks.PlotEstimate` entries and handed to the mode search
    (:func:`mechid.inference.start.find_modes`).

    Parameters
    ----------
    mechanism_id : str
        The mechanism these values are for.
    values : mapping
        Parameter name -> value in the parameter's unit (finite values only).
    sources : mapping
        Parameter name -> where the value was read, e.g. ``"schottky_plot.dielectric_constant"``.
    """

    mechanism_id: str
    values: Mapping[str, float] = field(default_factory=dict)
    sources: Mapping[str, str] = field(default_factory=dict)
