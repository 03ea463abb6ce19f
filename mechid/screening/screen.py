"""The screening of a whole series: every mechanism's plots, checks, score and hints."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np
from threadpoolctl import threadpool_limits

from mechid import catalogue
from mechid.catalogue.base import Mechanism
from mechid.data import SeriesLike
from mechid.device import Device
from mechid.screening.analyses import (
    activation_energies,
    hopping_laws,
    log_log_slopes,
    low_bias_exponents,
    transition_voltages,
    zabrodskii_analysis,
)
from mechid.screening.asymmetry import polarity_asymmetry
from mechid.screening.biases import PreparedSeries, prepare_series
from mechid.screening.checks import CheckContext, declared_range_checks, evaluate_check
from mechid.screening.conductance import conductance_asymmetry
from mechid.screening.diode import diode_analysis, start_values
from mechid.screening.hints import parameter_hints
from mechid.screening.plots import plot_lines
from mechid.screening.records import LinearisationResult, LineFit, MechanismLinearisation
from mechid.screening.score import mechanism_straightness, screening_score


def _summary(lines: Mapping[str, Sequence[LineFit]]) -> dict[str, float]:
    summary: dict[str, float] = {}
    for plot_id, drawn in lines.items():
        keys = sorted({k for line in drawn for k in line.quantities})
        for key in keys:
            values = np.array([line.quantities.get(key, np.nan) for line in drawn])
            values = values[np.isfinite(values)]
            if values.size:
                summary[f"{plot_id}.{key}"] = float(np.median(values))
    return summary


def _analyse_mechanism(mechanism: Mechanism, data: PreparedSeries, device: Device,
                       shared: Mapping[str, Any], diode_values: Mapping[str, float]
                       ) -> MechanismLinearisation:
    lines: dict[str, list[LineFit]] = {}
    notes: list[str] = []
    for plot in mechanism.plots:
        plot_lines_, plot_notes = plot_lines(plot, data, device)
        lines[plot.id] = plot_lines_
        notes.extend(plot_notes)
    ctx = CheckContext(mechanism=mechanism, lines=lines, device=device, data=data, **shared)
    checks = [evaluate_check(spec, ctx) for spec in mechanism.checks]
    checks.extend(declared_range_checks(ctx))
    straightness = mechanism_straightness(lines)
    return MechanismLinearisation(
        mechanism_id=mechanism.id,
        family=mechanism.family,
        lines=tuple(line for plot_lines_ in lines.values() for line in plot_lines_),
        summary=_summary(lines),
        checks=tuple(checks),
        straightness=straightness,
        score=screening_score(straightness, checks),
        notes=tuple(notes),
        hints=parameter_hints(mechanism, lines, diode_values),
    )


def linearise(series: SeriesLike, device: Device | None = None, *,
              mechanisms: Sequence[Mechanism] | None = None,
              n_biases: int = 4) -> LinearisationResult:
    """Straightened-plot analysis of an I-V-T series for every registered mechanism.

    Parameters
    ----------
    series : SeriesLike
        Arrays ``temperature_K``, ``voltage_V``, ``current_A`` (an
        :class:`~mechid.data.IVSeries` or a simulation). Non-finite points and zero bias are
        ignored.
    device : Device, optional
        Thickness, area, effective mass and optical dielectric constant used to read
        physical quantities from the lines; without them fewer quantities and checks.
    mechanisms : sequence of Mechanism, optional
        Defaults to every registered mechanism
        (:func:`mechid.catalogue.registered_mechanisms`, read at call time). The Zabrodskii
        analysis' candidate laws are those all registered mechanisms declare.
    n_biases : int, optional
        Number of common biases for Arrhenius-like plots (spread over the common range).

    Returns
    -------
    LinearisationResult
        Lines, checks and scores of every mechanism, the Zabrodskii analysis, transition
        voltages, apparent activation energies, the screening ranking, the polarity
        asymmetry and the rectifying-contact analysis
        (:func:`mechid.screening.diode.diode_analysis`).

    Notes
    -----
    Never raises on data a mechanism does not describe and emits no warnings: plots that
    cannot be drawn are listed in the mechanism's ``notes`` and checks that cannot be
    evaluated have ``passed=None``.
    """
    device = Device() if device is None else device
    registered = catalogue.registered_mechanisms()
    mechanisms = registered if mechanisms is None else tuple(mechanisms)
    laws = hopping_laws(registered)
    # The fits are tiny: BLAS threads only add overhead (about 7x on 2 cores).
    with np.errstate(all="ignore"), threadpool_limits(limits=1):
        data = prepare_series(series, n_biases)
        zabrodskii = zabrodskii_analysis(data, laws)
        shared = {
            "laws": laws,
            "zabrodskii": zabrodskii,
            "activation": activation_energies(data),
            "transitions": transition_voltages(data),
            "low_bias_exponents": low_bias_exponents(data),
            "log_log_slopes": log_log_slopes(data),
        }
        diode = diode_analysis(data, device)
        diode_values = start_values(diode, data, device)
        results = tuple(_analyse_mechanism(m, data, device, shared, diode_values)
                        for m in mechanisms)
        asymmetry = polarity_asymmetry(data)
    order = sorted(range(len(results)), key=lambda k: (-results[k].score, k))
    return LinearisationResult(
        mechanisms=results,
        zabrodskii=zabrodskii,
        transition_voltages=tuple(shared["transitions"]),
        activation_energies=tuple(shared["activation"]),
        ranking=tuple(results[k].mechanism_id for k in order),
        conductance_asymmetry=tuple(conductance_asymmetry(data, device)),
        diode=diode,
        polarity_asymmetry=asymmetry,
    )
