"""The Python way in: analyse a series from a notebook or a script.

The same job as ``mechid analyze`` with the same settings, without the command line::

    import mechid

    analysis = mechid.analyse("sweeps/", quick=True, seed=1)       # a file or a folder
    analysis = mechid.analyse(table, device={"thickness_nm": 30.0,  # a DataFrame or dict
                                             "area_cm2": 1e-3})
    analysis.best                      # id of the most probable mechanism
    analysis.to_dict()                 # the JSON contract (docs/result-schema.md) as a dict
    analysis.parameter_table()         # one row per mechanism and parameter
    analysis.write_report("report.html")

``table`` columns are named as in a tidy file header, with units (``temperature_K``,
``voltage_mV``, ``current [nA]``).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from mechid.analysis import AnalysisRun, AnalysisSettings, Polarity, run_analysis_full
from mechid.catalogue import get_mechanism
from mechid.data import IVSeries, read_series, series_from_table
from mechid.device import Device, device_from_values, find_device_toml, read_device_toml
from mechid.errors import DeviceError, MechidError
from mechid.inference.noise_choice import noise_law_setting
from mechid.outputs import InputFiles, check_output_paths, input_files
from mechid.results import AnalysisResult, to_plain_json

ProgressHook = Callable[[str, int, int], None]


@dataclass(frozen=True)
class Analysis:
    """One finished analysis: the result record plus what its report needs.

    Parameters
    ----------
    run : AnalysisRun
        The result, the series, the device, the screening and the fits.
    inputs : InputFiles
        The files the analysis read (outputs are never written over them).
    """

    run: AnalysisRun
    inputs: InputFiles = InputFiles(())

    @property
    def result(self) -> AnalysisResult:
        """The result record (what the JSON contract holds)."""
        return self.run.result

    @property
    def best(self) -> str | None:
        """Id of the most probable mechanism (None for a screening-only run)."""
        mechanisms = self.run.result.mechanisms
        return mechanisms[0].id if mechanisms else None

    def to_dict(self) -> dict[str, Any]:
        """The result as plain JSON types: the ``mechid.result/1`` contract."""
        return to_plain_json(self.run.result)

    def parameter_table(self) -> list[dict[str, Any]]:
        """One row per mechanism and parameter (ready for ``pandas.DataFrame(rows)``).

        Keys: ``mechanism_id``, ``rank``, ``probability``, ``log_evidence``,
        ``log_evidence_err``, ``fit_adequate``, ``parameter``, ``unit``, ``median``,
        ``ci68_lo``, ``ci68_hi``, ``ci95_lo``, ``ci95_hi``, ``fixed`` (numbers as floats,
        None where undefined) -- the columns of ``mechid analyze --summary``.
        """
        from mechid.report.summary import summary_records

        return summary_records(self.to_dict())

    def write_json(self, path: Path | str) -> Path:
        """Write the result JSON (never over a file the analysis read)."""
        from mechid.results import write_json

        path = Path(path)
        check_output_paths({"json": path}, {}, self.inputs)
        write_json(self.run.result, path)
        return path

    def write_report(self, path: Path | str | None = None, *, figures_dir: Path | str | None = None,
                     summary: Path | str | None = None) -> list[Path]:
        """Write the HTML report, the figure files and/or the summary CSV; return the paths."""
        from mechid.report import write_outputs

        paths = {"report": _path(path), "summary": _path(summary)}
        folder = _path(figures_dir)
        check_output_paths(paths, {"figures": folder}, self.inputs)
        return write_outputs(self.run, report=paths["report"], figures_dir=folder,
                             summary=paths["summary"])


def _path(value: Path | str | None) -> Path | None:
    return None if value is None else Path(value)


def _series_and_inputs(data: Any) -> tuple[IVSeries, Path | None]:
    if isinstance(data, IVSeries):
        return data, None
    if isinstance(data, str | Path):
        return read_series(data), Path(data)
    return series_from_table(data), None


def _device(data_path: Path | None, device: Device | Mapping[str, Any] | Path | str | None
            ) -> tuple[Device, Path | None]:
    if isinstance(device, Device):
        return device, None
    if isinstance(device, str | Path):
        return read_device_toml(Path(device)), Path(device)
    found = find_device_toml(data_path) if data_path is not None else None
    base = read_device_toml(found) if found is not None else Device()
    if device is None:
        return base, found
    try:
        return base.merged_with(device_from_values(**dict(device))), found
    except TypeError as exc:
        raise DeviceError(f"device: {exc}; known keys are those of device.toml") from None


def analyse(
    data: Any,
    *,
    device: Device | Mapping[str, Any] | Path | str | None = None,
    mechanisms: Sequence[str] | None = None,
    quick: bool = False,
    screen_only: bool = False,
    polarity: Polarity = "both",
    prior_odds: Mapping[str, float] | None = None,
    workers: int = 0,
    seed: int = 0,
    progress: ProgressHook | None = None,
    bias_window_V: tuple[float, float] | None = None,
    temperature_window_K: tuple[float, float] | None = None,
    noise_law: str = "gaussian",
) -> Analysis:
    """Analyse an I-V-T series: screening, joint fits, evidences, ranking.

    Parameters
    ----------
    data : path, IVSeries, mapping or DataFrame-like
        A data file or folder (as for ``mechid analyze``), a series already read, or columns
        named with their units (``temperature_K``, ``voltage_V``, ``current_A`` ...).
    device : Device, mapping, path or None
        The device: a :class:`~mechid.device.Device`, a ``device.toml`` path, or a mapping
        of the ``device.toml`` keys (``thickness_nm``, ``thickness_sd_nm``, ``area_cm2`` ...)
        that override a ``device.toml`` found beside a data path.
    mechanisms, quick, screen_only, polarity, prior_odds, workers, seed
        As the ``mechid analyze`` options of the same names (``--mechanism``, ``--quick``,
        ``--screen-only``, ``--polarity``, ``--prior-odds``, ``--workers``, ``--seed``).
    progress : callable, optional
        ``progress(label, done, total)``, called as the fits advance.
    bias_window_V, temperature_window_K : (float, float), optional
        As ``--bias-window`` and ``--temperature-window``: analyse only
        ``low <= |V| <= high`` volts and ``low <= T <= high`` kelvin.
    noise_law : str
        As ``--noise-law``: ``"gaussian"`` (default), ``"lognormal_floor"``, ``"student_t"``
        or ``"auto"`` (chosen by evidence, :mod:`mechid.inference.noise_choice`).

    Returns
    -------
    Analysis
        The result, with ``to_dict()``, ``parameter_table()`` and ``write_report()``.

    Raises
    ------
    mechid.errors.MechidError
        For bad data, device values or settings, with a message that says what to fix.
    """
    series, data_path = _series_and_inputs(data)
    used_device, device_path = _device(data_path, device)
    for mechanism_id in mechanisms or ():
        get_mechanism(mechanism_id)
    if seed < 0:
        raise MechidError(f"seed must be a whole number >= 0, got {seed}")
    settings = AnalysisSettings(
        mechanisms=tuple(mechanisms) if mechanisms else None, quick=quick, screen_only=screen_only,
        polarity=polarity, prior_odds=dict(prior_odds) if prior_odds else None, workers=workers,
        bias_window_V=bias_window_V, temperature_window_K=temperature_window_K,
        noise_law=noise_law_setting(noise_law),
    )
    run = run_analysis_full(series, used_device, settings, seed=seed, progress=progress)
    inputs = (input_files(data_path, series.sources, device_path) if data_path is not None
              else InputFiles((device_path,) if device_path else ()))
    return Analysis(run, inputs)
