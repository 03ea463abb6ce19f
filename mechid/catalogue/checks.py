"""Declarative specs a mechanism lists beside its formula: what its plots tell the fit.

These are plain frozen records (data, no behaviour): the screening
(:mod:`mechid.screening`) reads them and evaluates them. Nothing here imports the
screening, so data flows one way: the catalogue stays at the bottom.

:class:`PlotEstimate` says which declared parameter a straightened plot determines and how
(the hand-off from the screening to the fit's mode search).
"""

from __future__ import annotations

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
