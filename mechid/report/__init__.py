"""Reports of an analysis: the HTML evidence report, figure files, the summary CSV, the console.

:func:`write_outputs` is what ``mechid analyze --report/--figures/--summary`` and ``mechid demo``
call. It takes a :class:`ReportRun` (e.g. :class:`~mechid.analysis.AnalysisRun`): the result
records, the series and the device, and the posterior-predictive view of each fit that
inference hands over (:class:`~mechid.inference.predictive.PosteriorPredictive`: fitted
points, residuals, predictive band, posterior draws); the figures need the data and the
draws. The report never sees sampler state; every number shown is read from the JSON form
of ``run.result``.

Figures are :class:`matplotlib.figure.Figure` objects drawn on the Agg / PDF canvases; this
package never imports pyplot for its own figures and never calls ``matplotlib.use``.
"""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path
from typing import Any, Protocol

from mechid.data import IVSeries
from mechid.device import Device
from mechid.errors import MechidError
from mechid.inference.predictive import PosteriorPredictive
from mechid.results import AnalysisResult, to_plain_json

__all__ = ["ReportRun", "build_report_html", "write_outputs"]


class ReportRun(Protocol):
    """What a report reads of an analysis run (:class:`mechid.analysis.AnalysisRun` is one)."""

    @property
    def result(self) -> AnalysisResult:
        """The result records (the JSON contract)."""

    @property
    def series(self) -> IVSeries:
        """The measured series (every point, exclusions included)."""

    @property
    def device(self) -> Device:
        """The device description."""

    @property
    def predictive(self) -> Mapping[str, PosteriorPredictive]:
        """The posterior-predictive view of each fitted mechanism, by id."""


def _check_run(run: Any) -> None:
    if isinstance(run, AnalysisResult):
        raise TypeError(
            "write_outputs needs the AnalysisRun from mechid.analysis.run_analysis_full "
            "(the figures need the data and the posterior draws), not only its .result")
    for attribute in ("result", "series", "device", "predictive"):
        if not hasattr(run, attribute):
            raise TypeError(f"write_outputs needs an AnalysisRun; {type(run).__name__} has no "
                            f".{attribute}")


def build_report_html(run: ReportRun) -> str:
    """The self-contained HTML evidence report of one analysis run, as a string."""
    from mechid.report.figures import HTML_DPI, build_figures
    from mechid.report.html import render_html

    _check_run(run)
    data = to_plain_json(run.result)
    figures = build_figures(run, data)
    pngs = {f.key: f.png_bytes(HTML_DPI) for f in figures}
    return render_html(data, run, figures, pngs)


def write_outputs(run: ReportRun, *, report: Path | None = None, figures_dir: Path | None = None,
                  summary: Path | None = None) -> list[Path]:
    """Write the HTML report, the figure files and the summary CSV that were asked for.

    Parameters
    ----------
    run : ReportRun
        E.g. the :class:`~mechid.analysis.AnalysisRun` of
        :func:`mechid.analysis.run_analysis_full`.
    report : Path, optional
        The self-contained HTML report.
    figures_dir : Path, optional
        Folder receiving every figure as ``<key>.png`` (300 dpi) and ``<key>.pdf`` (vector).
    summary : Path, optional
        One CSV row per mechanism and parameter.

    Returns
    -------
    list of Path
        Every file written, report first.

    Raises
    ------
    MechidError
        When an output folder cannot be created or written.
    """
    from mechid.report.figures import HTML_DPI, build_figures
    from mechid.report.html import render_html
    from mechid.report.summary import write_summary_csv

    _check_run(run)
    data = to_plain_json(run.result)
    written: list[Path] = []
    try:
        figures = build_figures(run, data) if (report or figures_dir) else []
        if report is not None:
            pngs = {f.key: f.png_bytes(HTML_DPI) for f in figures}
            report = Path(report)
            report.write_text(render_html(data, run, figures, pngs), encoding="utf-8")
            written.append(report)
        if figures_dir is not None:
            for figure in figures:
                written.extend(figure.write_files(Path(figures_dir)))
        if summary is not None:
            written.append(write_summary_csv(data, Path(summary)))
    except OSError as error:
        raise MechidError(f"cannot write the report outputs: {error}") from error
    return written
