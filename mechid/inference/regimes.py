"""The regime map: which conduction path carries the current where, and where a single law fails.

Over the measured (|V|, T) plane -- every measured temperature, and a grid of bias magnitudes
spanning the measured ones -- two questions are answered from fits already made:

* under the posterior of the leading composite hypothesis (two paths in parallel,
  :mod:`mechid.catalogue.composite`), which path carries the larger share of the current,
  with the posterior probability of that statement (the share of draws that agree);
* where the leading single mechanism's standardised residuals fail: the data points of each
  cell with ``|z| > 3`` under its posterior-median parameters (a 3-sigma residual is a
  rejection by common practice).

A composite's paths are the catalogue's own formulas, so the map is a reading of the fit, not
a separate model: it is only as right as the composite.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from mechid.catalogue import get_mechanism
from mechid.catalogue.composite import largest_share, path_currents
from mechid.device import Device

#: Bias magnitudes on the map's grid (log-spaced over the measured range).
GRID_BIASES = 24
#: Posterior draws used for the path probabilities.
MAP_DRAWS = 400
#: |standardised residual| beyond which a point counts as failed (common practice: 3 sigma).
RESIDUAL_LIMIT = 3.0


@dataclass(frozen=True)
class RegimeMap:
    """Which path carries the current on the measured (|V|, T) plane, and where a law fails.

    Attributes
    ----------
    composite : str or None
        The composite hypothesis read (the most probable one fitted), None if none was fitted.
    composite_probability : float
        Its posterior probability among the candidates (NaN without a composite).
    paths : tuple of str
        Its paths, main first.
    temperatures_K : tuple of float
        The rows: the measured temperatures.
    bias_abs_V : tuple of float
        The columns: bias magnitudes, log-spaced over the measured range.
    dominant_path : tuple of tuple of int
        Per cell, the index into ``paths`` of the path most draws find carrying the larger share.
    dominant_probability : tuple of tuple of float
        Per cell, the share of posterior draws that agree on that path.
    single_mechanism : str or None
        The leading single (non-composite) mechanism whose residuals are mapped.
    residual_failure : tuple of tuple of float or None
        Per cell (nearest grid column of each data point), the share of its data points with
        ``|z| > 3``; None where the cell holds no data point.
    """

    composite: str | None
    composite_probability: float
    paths: tuple[str, ...]
    temperatures_K: tuple[float, ...]
    bias_abs_V: tuple[float, ...]
    dominant_path: tuple[tuple[int, ...], ...]
    dominant_probability: tuple[tuple[float, ...], ...]
    single_mechanism: str | None
    residual_failure: tuple[tuple[float | None, ...], ...]


def bias_grid(voltage_V: NDArray) -> NDArray:
    """:data:`GRID_BIASES` log-spaced |V| over the measured non-zero bias magnitudes."""
    magnitude = np.abs(voltage_V[voltage_V != 0])
    return np.geomspace(magnitude.min(), magnitude.max(), GRID_BIASES)


def path_map(composite_id: str, draws: Mapping[str, NDArray], temperatures: NDArray,
             biases: NDArray, device: Device, rng: np.random.Generator
             ) -> tuple[tuple[str, ...], NDArray, NDArray]:
    """Dominant path index and its posterior probability on the (T, |V|) grid.

    Returns
    -------
    paths, index, probability
        Path ids; two arrays of shape ``(len(temperatures), len(biases))``.
    """
    mechanism = get_mechanism(composite_id)
    n = len(next(iter(draws.values())))
    take = rng.choice(n, size=min(MAP_DRAWS, n), replace=False) if n > MAP_DRAWS else np.arange(n)
    params = {k: np.asarray(draws[k], dtype=float)[take][:, None]
              for k in mechanism.parameter_names}
    t_grid, v_grid = (a.ravel() for a in np.meshgrid(temperatures, biases, indexing="ij"))
    currents = path_currents(mechanism, v_grid, t_grid, params, device)
    assert currents is not None
    index, _ = largest_share(currents)  # (draws, cells)
    n_paths = len(currents)
    votes = np.stack([(index == k).mean(axis=0) for k in range(n_paths)])
    shape = (temperatures.size, biases.size)
    return (tuple(currents), np.argmax(votes, axis=0).reshape(shape),
            np.max(votes, axis=0).reshape(shape))


def residual_failure_map(standardised: NDArray, voltage_V: NDArray, temperature_K: NDArray,
                         temperatures: NDArray, biases: NDArray) -> list[list[float | None]]:
    """Share of points with ``|z| > 3`` per (T, nearest grid |V|) cell; None for empty cells."""
    nonzero = voltage_V != 0
    column = np.abs(np.log(np.abs(voltage_V[nonzero]))[:, None] - np.log(biases)[None, :]).argmin(1)
    row = np.searchsorted(temperatures, temperature_K[nonzero])
    failed = np.abs(standardised[nonzero]) > RESIDUAL_LIMIT
    counts = np.zeros((temperatures.size, biases.size))
    bad = np.zeros_like(counts)
    np.add.at(counts, (row, column), 1.0)
    np.add.at(bad, (row, column), failed.astype(float))
    return [[None if counts[i, j] == 0 else float(bad[i, j] / counts[i, j])
             for j in range(biases.size)] for i in range(temperatures.size)]


def regime_map(composite: tuple[str, float, Mapping[str, NDArray]] | None,
               single: tuple[str, NDArray] | None, voltage_V: NDArray, temperature_K: NDArray,
               device: Device, seed: int | None) -> RegimeMap:
    """Build the map from the leading composite's draws and the leading single's residuals.

    Parameters
    ----------
    composite : (id, probability, draws) or None
        The most probable composite fitted, its posterior probability and its posterior draws
        (physical values by parameter name).
    single : (id, standardised residuals) or None
        The most probable single mechanism and its residuals at the fitted points.
    voltage_V, temperature_K : ndarray
        The fitted points.
    device : Device
        The device description.
    seed : int or None
        For the choice of draws (deterministic).
    """
    temperatures = np.unique(temperature_K)
    biases = bias_grid(voltage_V)
    paths: tuple[str, ...] = ()
    index = np.zeros((temperatures.size, biases.size), dtype=int)
    probability = np.full(index.shape, math.nan)
    if composite is not None:
        paths, index, probability = path_map(composite[0], composite[2], temperatures, biases,
                                             device, np.random.default_rng(seed))
    failure: list[list[float | None]] = [[None] * biases.size for _ in temperatures]
    if single is not None:
        failure = residual_failure_map(single[1], voltage_V, temperature_K, temperatures, biases)
    return RegimeMap(
        composite=None if composite is None else composite[0],
        composite_probability=math.nan if composite is None else float(composite[1]),
        paths=paths,
        temperatures_K=tuple(float(t) for t in temperatures),
        bias_abs_V=tuple(float(v) for v in biases),
        dominant_path=tuple(tuple(int(k) for k in row) for row in index),
        dominant_probability=tuple(tuple(float(p) for p in row) for row in probability),
        single_mechanism=None if single is None else single[0],
        residual_failure=tuple(tuple(row) for row in failure),
    )
