"""Declarative specs a mechanism lists beside its formula: what its plots tell the fit.

These are plain frozen records (data, no behaviour): the screening
(:mod:`mechid.screening`) reads them and evaluates them. Nothing here imports the
screening, so data flows one way: the catalogue stays at the bottom.

:class:`PlotEstimate` says which declared parameter a straightened plot determines and how
(the hand-off from the screening to the fit's mode search). The subclasses of
:class:`CheckSpec` are the consistency checks practitioners make on straightened plots; each
names the plots and quantities it reads, and its thresholds (with their defaults).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass


@dataclass(frozen=True)
class PlotEstimate:
    """A declared parameter read from a straightened plot (a starting value for the fit).

    Parameters
    ----------
    parameter : str
        Name of the declared :class:`~mechid.catalogue.base.Parameter` it estimates.
    plot : str
        Id of one of the mechanism's declared plots.
    quantity : str, optional
        Key of the plot's ``interpret`` output that carries the value; defaults to
        ``parameter``.
    zero_bias_power : float, optional
        None: the median of the quantity over the plot's lines. A power q: the intercept at
        zero bias of an ordinary-least-squares line of the quantity against |V|^q over the
        lines of a per-voltage plot. An activation energy lowered by a Schottky or
        Poole-Frenkel term, phi - beta sqrt(V/(d eps_r)) (Sze & Ng 2007, ch. 4; Frenkel
        1938), extrapolates to the zero-field barrier with q = 1/2; the apparent activation
        energy of high-field hopping, E_a - e a V/(2 d) (from ln sinh x ~ x - ln 2 in the
        Mott & Davis 1979 field-assisted hopping law), with q = 1.
    """

    parameter: str
    plot: str
    quantity: str | None = None
    zero_bias_power: float | None = None

    @property
    def key(self) -> str:
        """The interpreted quantity's key (``quantity`` or, when not given, ``parameter``)."""
        return self.quantity or self.parameter


@dataclass(frozen=True)
class DiodeEstimate:
    """A declared parameter read from the rectifying-contact analysis (a starting value).

    The analysis (:func:`mechid.screening.diode.start_values`) reads per-temperature semilog
    lines, the Richardson plot, Werner & Guettler's plots, Cheung's lines and the reverse
    branch into named quantities; ``quantity`` is one of those names.
    """

    parameter: str
    quantity: str

    @property
    def key(self) -> str:
        """The quantity's name."""
        return self.quantity


# --------------------------------------------------------------------------------------------
# Consistency checks (each evaluated by its rule in mechid.screening.checks)
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class CheckSpec:
    """Base of every declared consistency check.

    A mechanism lists its checks in ``Mechanism(checks=(...))``; the screening evaluates
    each with the rule registered for its type. ``tested_parameters`` are declared
    parameters whose range this check already tests (the generic declared-range check
    then skips them).
    """

    @property
    def tested_parameters(self) -> tuple[str, ...]:
        """Declared parameters whose range this check tests itself."""
        return ()


@dataclass(frozen=True)
class ThermallyActivated(CheckSpec):
    """Emission and hopping are activated: median Zabrodskii w = d ln G/d ln T > 1 (ours)."""


@dataclass(frozen=True)
class NearlyTemperatureIndependent(CheckSpec):
    """Tunnelling: largest apparent activation energy below ``max_activation_eV`` and w < 1.

    20 meV is a common-practice threshold.
    """

    max_activation_eV: float = 0.020


@dataclass(frozen=True)
class TunnellingRegime(CheckSpec):
    """Direct vs Fowler-Nordheim regime from d ln I/d ln V at the lowest biases.

    ``regime="direct"`` passes when the exponent is below 2 (below the transition voltage
    of Beebe et al. 2006), ``"fowler_nordheim"`` when it is above 2.
    """

    regime: str


@dataclass(frozen=True)
class PositiveQuantity(CheckSpec):
    """The median of an interpreted quantity of ``plot`` is positive; ``reason`` says why."""

    plot: str
    quantity: str
    reason: str


@dataclass(frozen=True)
class StraightPlot(CheckSpec):
    """The plot is straight: median R^2 over its lines >= ``minimum_r_squared``."""

    plot: str
    minimum_r_squared: float


@dataclass(frozen=True)
class QuantityInRange(CheckSpec):
    """The median of the first available quantity among ``quantities`` lies in [low, high].

    ``parameter`` names the declared parameter whose range this tests (if any).
    """

    plot: str
    quantities: tuple[str, ...]
    low: float
    high: float
    name: str
    parameter: str | None = None

    @property
    def tested_parameters(self) -> tuple[str, ...]:
        """The declared parameter this range check stands for."""
        return () if self.parameter is None else (self.parameter,)


@dataclass(frozen=True)
class DielectricRange(CheckSpec):
    """eps_r read from the field slope of ``plot`` lies in [low, high] (Sze & Ng 2007)."""

    plot: str
    low: float = 1.0
    high: float = 20.0

    @property
    def tested_parameters(self) -> tuple[str, ...]:
        """The dielectric constant's range is tested here."""
        return ("dielectric_constant",)


@dataclass(frozen=True)
class DielectricVsOptical(CheckSpec):
    """eps_r from the field slope of ``plot`` agrees with the optical n^2 within ``rtol``."""

    plot: str
    rtol: float = 0.5


@dataclass(frozen=True)
class SlopeTimesTemperature(CheckSpec):
    """The field slope of ``plot`` scales as 1/T: coefficient of variation of slope*T small."""

    plot: str
    max_cv: float = 0.1


@dataclass(frozen=True)
class InterceptNotActivated(CheckSpec):
    """The intercepts of a per-temperature plot do not follow an Arrhenius law.

    An ``ln``-valued intercept against 1/T gives an apparent activation energy; the check
    passes when its magnitude is at most ``max_activation_eV`` (for a trap-free square law,
    whose prefactor holds no Boltzmann factor).
    """

    plot: str
    max_activation_eV: float = 0.05


@dataclass(frozen=True)
class VoltageInsideSweep(CheckSpec):
    """A characteristic voltage read from ``plot`` lies inside the sweep (median over lines).

    Passes when ``0 < median <= largest |V| x max_share`` (e.g. a trap-filled limit that the
    sweep has passed, so its top shows the approach to the trap-free law).
    """

    plot: str
    quantity: str
    max_share: float = 2.0 / 3.0


@dataclass(frozen=True)
class ZeroFieldBarrier(CheckSpec):
    """A per-bias activation energy extrapolated to zero field lies in a declared range.

    The ``quantity`` of the per-voltage ``plot`` is extrapolated against sqrt(V) to zero;
    the result must lie in the declared range of ``parameter``.
    """

    plot: str
    quantity: str
    parameter: str


@dataclass(frozen=True)
class RichardsonConstant(CheckSpec):
    """A*/A0 from the Richardson intercept within ``max_decades`` decades of 1."""

    plot: str
    max_decades: float = 2.0


@dataclass(frozen=True)
class FieldLoweringDielectric(CheckSpec):
    """eps_r from d E_a/d sqrt(V) (``arrhenius_plot``) agrees with that of ``field_plot``.

    ``coefficient_eV`` is the lowering coefficient beta in eV sqrt(m/V) (Schottky or
    Poole-Frenkel); agreement within ``rtol``.
    """

    arrhenius_plot: str
    quantity: str
    field_plot: str
    coefficient_eV: float
    rtol: float = 0.5


@dataclass(frozen=True)
class HoppingLaw(CheckSpec):
    """ln G = const - (T0/T)^p with this ``exponent`` p, tested by the Zabrodskii analysis.

    p = 1 nearest-neighbour (Arrhenius), 1/(D+1) Mott in D dimensions (Mott 1969), 1/2
    Efros-Shklovskii (Efros & Shklovskii 1975). Every declared law is also a candidate of
    the Zabrodskii analysis' "nearest law".
    """

    exponent: float


@dataclass(frozen=True)
class Ohmic(CheckSpec):
    """The current is ohmic: d ln I/d ln V within 1 +/- ``tolerance`` at every temperature."""

    tolerance: float = 0.1


@dataclass(frozen=True)
class HopEnergyExceedsKT(CheckSpec):
    """Variable-range self-consistency: hop energy W >= kT at the highest temperature.

    ``hop_energy(T0, T)`` in eV is the mechanism's own formula (declared in its family
    module); ``source`` names it for the check's detail.
    """

    plot: str
    hop_energy: Callable[[float, float], float]
    source: str
