"""Priors of the joint fit: stated, proper, normalised, and built from one place.

Every sampled quantity lives in an *internal* coordinate: log10 of the value for scale
parameters (prefactors, noise levels, characteristic temperatures), the value itself
otherwise. Each prior's density is normalised in that internal coordinate, which is what
the evidence needs (a forgotten normalisation shifts log Z by the log prior volume; see
``shared`` notes on evidence estimation).

Where the priors come from:

* a catalogue parameter gets a uniform prior on its declared physical range (log-uniform
  when the parameter is declared ``log_scale``);
* a parameter tied to the device description (thickness, effective mass, optical dielectric
  constant) gets a Gaussian with the user's value and standard uncertainty, truncated to
  the physical range; a value given without uncertainty is held fixed;
* the noise model's two nuisance parameters get log-uniform priors whose ranges are set
  from the data (same for every mechanism, so they cancel in Bayes factors to first order).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np
from numpy.typing import NDArray
from scipy import special, stats

from mechid.catalogue.base import Mechanism, Parameter
from mechid.device import Device, Measured

PriorKind = Literal["uniform", "log_uniform", "truncated_normal", "fixed"]


@dataclass(frozen=True)
class Prior:
    """The prior of one parameter.

    Parameters
    ----------
    name, unit : str
        Parameter name (with unit suffix) and unit.
    kind : {"uniform", "log_uniform", "truncated_normal", "fixed"}
        ``log_uniform`` is uniform in log10 of the value between ``lower`` and ``upper``.
    lower, upper : float
        Support in physical units.
    mean, sd : float or None
        Gaussian location and scale (``truncated_normal``) in physical units.
    value : float or None
        The held value (``fixed``).
    origin : str
        Where the prior came from, in words (printed in reports).
    """

    name: str
    unit: str
    kind: PriorKind
    lower: float
    upper: float
    mean: float | None = None
    sd: float | None = None
    value: float | None = None
    origin: str = ""
    log_coordinate: bool = False

    @property
    def is_fixed(self) -> bool:
        """True when the parameter is not sampled."""
        return self.kind == "fixed"

    @property
    def log_scale(self) -> bool:
        """True when the internal coordinate is log10 of the value.

        Always for ``log_uniform``; also for other kinds when ``log_coordinate`` is set (a
        sampling choice that straightens ridges such as thickness x sqrt(mass) = const; the
        density then carries the Jacobian ``x ln 10``, so the prior itself is unchanged).
        """
        return self.kind == "log_uniform" or self.log_coordinate

    def to_internal(self, value: NDArray | float) -> NDArray:
        """Physical value -> internal coordinate."""
        v = np.asarray(value, dtype=float)
        return np.log10(v) if self.log_scale else v

    def to_physical(self, internal: NDArray | float) -> NDArray:
        """Internal coordinate -> physical value."""
        x = np.asarray(internal, dtype=float)
        return 10.0**x if self.log_scale else x

    def internal_bounds(self) -> tuple[float, float]:
        """Support in the internal coordinate."""
        lo, hi = self.to_internal(self.lower), self.to_internal(self.upper)
        return float(lo), float(hi)

    def log_density(self, internal: NDArray) -> NDArray:
        """Normalised log prior density in the internal coordinate (-inf outside)."""
        x = np.asarray(internal, dtype=float)
        lo, hi = self.internal_bounds()
        inside = (x >= lo) & (x <= hi)
        value = self.to_physical(x)
        if self.kind == "log_uniform":
            dens = np.full_like(x, -np.log(hi - lo))
        elif self.kind == "uniform":
            dens = np.full_like(x, -np.log(self.upper - self.lower))
        elif self.kind == "truncated_normal":
            assert self.mean is not None and self.sd is not None
            z = (value - self.mean) / self.sd
            dens = -0.5 * z**2 - np.log(self.sd * np.sqrt(2 * np.pi)) - self.log_normal_mass
        else:
            raise ValueError("a fixed parameter has no density")
        if self.log_coordinate and self.kind != "log_uniform":
            with np.errstate(divide="ignore", invalid="ignore"):
                dens = dens + np.log(value * np.log(10.0))  # Jacobian dx/du of x = 10**u
        return np.where(inside, dens, -np.inf)

    @functools.cached_property
    def log_normal_mass(self) -> float:
        """log of the Gaussian mass inside the support (truncated_normal only)."""
        return _log_normal_mass((self.lower - self.mean) / self.sd,
                                (self.upper - self.mean) / self.sd)

    def sample(self, rng: np.random.Generator, n: int) -> NDArray:
        """``n`` exact draws in the internal coordinate."""
        if self.kind == "log_uniform":
            lo, hi = self.internal_bounds()
            return rng.uniform(lo, hi, size=n)
        if self.kind == "uniform":
            return self.to_internal(rng.uniform(self.lower, self.upper, size=n))
        if self.kind == "truncated_normal":
            assert self.mean is not None and self.sd is not None
            a, b = (self.lower - self.mean) / self.sd, (self.upper - self.mean) / self.sd
            draws = stats.truncnorm.rvs(a, b, loc=self.mean, scale=self.sd, size=n, random_state=rng)
            return self.to_internal(draws)
        raise ValueError("a fixed parameter is not sampled")

    def describe(self) -> str:
        """One-line description, e.g. ``"uniform on [0.1, 5] eV (catalogue range)"``."""
        unit = "" if self.unit in ("", "1") else f" {self.unit}"
        if self.kind == "uniform":
            text = f"uniform on [{self.lower:.4g}, {self.upper:.4g}]{unit}"
        elif self.kind == "log_uniform":
            text = f"log-uniform on [{self.lower:.3g}, {self.upper:.3g}]{unit}"
        elif self.kind == "truncated_normal":
            text = (f"normal({self.mean:.4g}, sd {self.sd:.3g}){unit} truncated to "
                    f"[{self.lower:.4g}, {self.upper:.4g}]")
        else:
            text = f"fixed at {self.value:.4g}{unit}"
        return f"{text} ({self.origin})" if self.origin else text

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form, including the one-line description."""
        return {
            "name": self.name, "unit": self.unit, "kind": self.kind,
            "lower": self.lower, "upper": self.upper, "mean": self.mean, "sd": self.sd,
            "value": self.value, "origin": self.origin, "description": self.describe(),
        }


def _log_normal_mass(a: float, b: float) -> float:
    """log(Phi(b) - Phi(a)), stable in the tails."""
    return float(special.logsumexp([special.log_ndtr(b), special.log_ndtr(a)], b=[1.0, -1.0]))


def parameter_prior(parameter: Parameter, device: Device) -> Prior:
    """Default prior of a catalogue parameter, replaced by the device value when there is one."""
    measured: Measured | None = (
        getattr(device, parameter.device_prior) if parameter.device_prior else None
    )
    if measured is None:
        kind: PriorKind = "log_uniform" if parameter.log_scale else "uniform"
        return Prior(parameter.name, parameter.unit, kind, parameter.lower, parameter.upper,
                     origin="catalogue range", log_coordinate=parameter.sample_in_log)
    if measured.is_exact:
        return Prior(parameter.name, parameter.unit, "fixed", parameter.lower, parameter.upper,
                     value=measured.value, origin="device description, held fixed")
    lower = max(parameter.lower, measured.value - 6 * measured.sd)
    if parameter.sample_in_log:
        lower = max(lower, parameter.lower, 1e-12)
    upper = min(parameter.upper, measured.value + 6 * measured.sd)
    if not lower < upper:
        lower, upper = parameter.lower, parameter.upper
    return Prior(parameter.name, parameter.unit, "truncated_normal", lower, upper,
                 mean=measured.value, sd=measured.sd,
                 origin="device description with its standard uncertainty",
                 log_coordinate=parameter.sample_in_log)


#: Names of the two noise nuisance parameters (shared by every mechanism).
NOISE_RELATIVE = "noise_relative"
NOISE_FLOOR = "noise_floor_A"


def noise_priors(current_A: NDArray) -> tuple[Prior, Prior]:
    """Log-uniform priors of the relative noise and the absolute noise floor.

    The relative noise spans 1e-4 to 1 (0.01 % to 100 % of the current). The floor spans
    1e-3 times the smallest non-zero measured |I| up to the largest |I|: wide enough for
    any instrument that recorded these data, and the same for every mechanism.
    """
    magnitude = np.abs(np.asarray(current_A, dtype=float))
    positive = magnitude[magnitude > 0]
    smallest = float(positive.min()) if positive.size else 1e-15
    largest = float(magnitude.max()) if magnitude.size and magnitude.max() > 0 else 1.0
    relative = Prior(NOISE_RELATIVE, "1", "log_uniform", 1e-4, 1.0,
                     origin="noise model, same for every mechanism")
    floor = Prior(NOISE_FLOOR, "A", "log_uniform", 1e-3 * smallest, max(largest, 10 * smallest),
                  origin="noise model, range set by the measured currents")
    return relative, floor


def mechanism_priors(mechanism: Mechanism, device: Device, current_A: NDArray) -> tuple[Prior, ...]:
    """All priors of a joint fit: the mechanism's parameters, then the two noise parameters."""
    physical = tuple(parameter_prior(p, device) for p in mechanism.parameters)
    return physical + noise_priors(current_A)
