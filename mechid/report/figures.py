"""The report's figures, built as :class:`matplotlib.figure.Figure` objects (never pyplot).

Every figure is made at publication size (``DOUBLE_COLUMN_IN`` wide, the usual two-column
journal width) with units in every axis label and one shared style (:data:`STYLE`), so the
same object can be embedded in the HTML report as a PNG and written by ``--figures`` as a
PNG and a vector PDF. Nothing here chooses a backend: figures are drawn by
:class:`~matplotlib.backends.backend_agg.FigureCanvasAgg` (PNG) and the PDF canvas through
``Figure.savefig``, so importing this module never calls ``matplotlib.use``.

Figures
-------
* :func:`iv_curves_figure` -- the measured I-V curves at every temperature, on a log-current
  axis, both polarities, excluded points marked;
* :func:`straightened_figure` -- one mechanism's straightened plots with their straight lines
  and R^2 (from the linearisation result);
* :func:`joint_fit_figure` -- the joint fit: data with the posterior median curve and the 95 %
  posterior predictive band, and the standardised residuals below;
* :func:`corner_figure` -- the posterior of the physical parameters (corner.py, Foreman-Mackey
  2016), 68 % and 95 % contours;
* :func:`ranking_figure` -- ln B of every fitted mechanism against the leader, on the Kass &
  Raftery (1995) scale;
* :func:`zabrodskii_figure` -- the reduced activation energy w(T) and its power-law slope
  (Zabrodskii & Zinov'eva 1984);
* :func:`diode_figures` -- a rectifying contact's phi_ap(T) and n(T), Richardson and
  Werner-Güttler plots, Cheung and Norde plots (when the screening's diode analysis ran).
"""

from __future__ import annotations

import io
import logging
import math
import textwrap
import warnings
from collections.abc import Iterator, Mapping, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

import matplotlib
import numpy as np
from matplotlib import ticker
from matplotlib.figure import Figure
from numpy.typing import NDArray

from mechid.catalogue import get_mechanism
from mechid.catalogue.base import Mechanism, StraightenedPlot
from mechid.constants import BOLTZMANN_EV
from mechid.data import IVSeries
from mechid.device import Device
from mechid.formatting import format_probability
from mechid.inference.predictive import PosteriorPredictive, thin_draws

if TYPE_CHECKING:
    from mechid.report import ReportRun
from mechid.screening.biases import common_bias_points

logger = logging.getLogger(__name__)

FloatArray = NDArray[np.float64]

#: Two-column journal figure width in inches (about 178 mm).
DOUBLE_COLUMN_IN = 7.0
#: Resolution of the PNG embedded in the HTML report (sharp on screen and in print).
HTML_DPI = 150
#: Resolution of the PNG files written by ``--figures``.
FILE_DPI = 300
#: Posterior draws shown in a corner plot (evenly thinned; enough for 95 % contours).
CORNER_DRAWS = 2500
#: Grid points per (temperature, polarity) branch of the model curves.
CURVE_POINTS = 70

#: One consistent style for every figure (fonts embedded as TrueType in PDFs).
STYLE: dict[str, Any] = {
    "font.family": "DejaVu Sans",
    "font.size": 8.0,
    "axes.titlesize": 8.5,
    "axes.labelsize": 8.0,
    "legend.fontsize": 6.5,
    "legend.title_fontsize": 7.0,
    "xtick.labelsize": 7.0,
    "ytick.labelsize": 7.0,
    "axes.grid": True,
    "grid.alpha": 0.35,
    "grid.linewidth": 0.5,
    "axes.spines.top": False,
    "axes.spines.right": False,
    "axes.linewidth": 0.7,
    "lines.linewidth": 1.1,
    "lines.markersize": 3.2,
    "legend.frameon": False,
    "pdf.fonttype": 42,
    "svg.fonttype": "none",
}

#: Colours of the report (shared with the HTML stylesheet).
INK = "#1d2433"
MUTED = "#6b7280"
PASS_COLOUR = "#1a7f4b"
FAIL_COLOUR = "#b42318"
LEADER_COLOUR = "#2456a6"


@dataclass
class ReportFigure:
    """A figure of the report with its file stem, title and caption.

    Parameters
    ----------
    key : str
        File stem used by ``--figures`` (``<key>.png``, ``<key>.pdf``); unique in a report.
    title : str
        Short title shown above the figure.
    caption : str
        What the figure shows, including conventions (contour levels, band width).
    figure : matplotlib.figure.Figure
        The figure itself.
    section : str
        ``"data"``, ``"comparison"`` or ``"mechanism"``.
    mechanism_id : str or None
        The mechanism a ``"mechanism"`` figure belongs to.
    """

    key: str
    title: str
    caption: str
    figure: Figure
    section: str
    mechanism_id: str | None = None
    tight: bool = False

    def png_bytes(self, dpi: int = HTML_DPI) -> bytes:
        """The figure as PNG bytes (tight bounding box)."""
        buffer = io.BytesIO()
        with _style():
            self.figure.savefig(buffer, format="png", dpi=dpi, bbox_inches=self._bbox(),
                                facecolor="white", pil_kwargs={"compress_level": 3})
        return buffer.getvalue()

    def _bbox(self) -> str | None:
        """Tight bounding box only where asked (corner plots, corner#262)."""
        return "tight" if self.tight else None

    def write_files(self, directory: Path) -> list[Path]:
        """Write ``<key>.png`` (FILE_DPI) and ``<key>.pdf`` (vector) into ``directory``."""
        directory.mkdir(parents=True, exist_ok=True)
        written = []
        for suffix, dpi in (("png", FILE_DPI), ("pdf", None)):
            path = directory / f"{self.key}.{suffix}"
            extra = {"pil_kwargs": {"compress_level": 3}} if suffix == "png" else {}
            with _style():
                self.figure.savefig(path, format=suffix, dpi=dpi, bbox_inches=self._bbox(),
                                    facecolor="white", **extra)
            written.append(path)
        return written


@contextmanager
def _style() -> Iterator[None]:
    """The report style as an rc context (restored afterwards; no global change)."""
    with matplotlib.rc_context(STYLE):
        yield


def temperature_colours(temperatures: Sequence[float]) -> dict[float, tuple[float, ...]]:
    """One colour per temperature, cold = dark violet to hot = orange (``plasma``)."""
    temps = sorted({float(t) for t in temperatures})
    cmap = matplotlib.colormaps["plasma"]
    positions = np.linspace(0.0, 0.82, len(temps)) if len(temps) > 1 else np.array([0.35])
    return {t: tuple(cmap(p)) for t, p in zip(temps, positions, strict=True)}


def _series_colours(n: int) -> list[tuple[float, ...]]:
    """Colours for lines that are not temperatures (biases): ``viridis`` without the yellow."""
    cmap = matplotlib.colormaps["viridis"]
    return [tuple(cmap(p)) for p in (np.linspace(0.0, 0.85, n) if n > 1 else [0.4])]


def _temperature_label(t: float) -> str:
    return f"{t:g} K"


def _legend(ax: Any, n_entries: int, **kwargs: Any) -> None:
    """A compact legend with more columns when there are many entries."""
    ncol = 1 if n_entries <= 6 else 2 if n_entries <= 14 else 3
    ax.legend(ncol=ncol, handlelength=1.4, columnspacing=0.8, borderaxespad=0.3, **kwargs)


def _plain_log_ticks(axis: Any) -> None:
    """Label a log axis with plain numbers (1, 2, 5, 10, ...) instead of powers of ten."""
    axis.set_major_locator(ticker.LogLocator(base=10, subs=(1.0, 2.0, 5.0)))
    axis.set_major_formatter(ticker.FuncFormatter(lambda value, _pos: f"{value:g}"))
    axis.set_minor_formatter(ticker.NullFormatter())


_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _power_of_ten(value: float, _pos: Any = None) -> str:
    """Tick label ``10⁻⁶`` in Unicode superscripts (no mathtext: several times faster)."""
    if not (value > 0 and math.isfinite(value)):
        return ""
    exponent = math.log10(value)
    if abs(exponent - round(exponent)) < 1e-9:
        return "10" + str(int(round(exponent))).translate(_SUPERSCRIPT)
    return f"{value:g}"


def _log_axis(axis: Any) -> None:
    """Decade ticks labelled ``10ⁿ`` on a log axis, unlabelled minor ticks."""
    axis.set_major_formatter(ticker.FuncFormatter(_power_of_ten))
    axis.set_minor_formatter(ticker.NullFormatter())


def _margins(fig: Figure, left: float, right: float, bottom: float, top: float,
             wspace: float = 0.3, hspace: float = 0.2) -> None:
    """Fixed margins in inches (a fixed layout is several times faster than a layout engine
    and gives every figure of a kind the same frame)."""
    width, height = fig.get_size_inches()
    fig.subplots_adjust(left=left / width, right=1 - right / width, bottom=bottom / height,
                        top=1 - top / height, wspace=wspace, hspace=hspace)


#: Mean glyph width of the report font (DejaVu Sans) as a fraction of its size, a little above
#: the width of typical mixed text, so that text wrapped or boxed by it fits without a draw.
GLYPH_WIDTH_EM = 0.6

#: Height of a text line as a fraction of the font size (matplotlib's default line spacing).
LINE_HEIGHT_EM = 1.25

#: Top margin in inches per title line beyond the first (8.5 pt titles).
TITLE_LINE_IN = 0.15


def _axes_size_in(ax: Any) -> tuple[float, float]:
    """Width and height of an axes in inches."""
    position = ax.get_position()
    width, height = ax.figure.get_size_inches()
    return position.width * width, position.height * height


def _wrap_to_width(text: str, width_in: float, fontsize_pt: float) -> str:
    """``text`` wrapped at spaces to lines that fit ``width_in`` at ``fontsize_pt``."""
    chars = max(12, int(width_in * 72.0 / (GLYPH_WIDTH_EM * fontsize_pt)))
    return textwrap.fill(text, chars, break_long_words=False, break_on_hyphens=False)


def _fit_side_margins(fig: Figure, axes: Sequence[Any], left: float, right: float,
                      bottom: float, top: float, wspace: float) -> tuple[float, float]:
    """Widen the left margin and the gaps of a row of panels until every y axis fits.

    Tick labels are only known once formatted, so the y axes (tick labels and label) are
    measured once on an Agg canvas; the margins are in inches. Returns the new
    ``(left, wspace)``.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    renderer = FigureCanvasAgg(fig).get_renderer()
    pad_in = 0.08
    overhang = [(ax.bbox.x0 - ax.yaxis.get_tightbbox(renderer).x0) / fig.dpi + pad_in
                for ax in axes]
    width = float(fig.get_size_inches()[0])
    n = len(axes)
    axes_width = (width - left - right) / (n + (n - 1) * wspace)
    gap = max([wspace * axes_width, *(o + 0.1 for o in overhang[1:])])
    left = max(left, overhang[0])
    axes_width = (width - left - right - (n - 1) * gap) / n
    wspace = gap / axes_width if n > 1 else wspace
    _margins(fig, left, right, bottom, top, wspace=wspace)
    return left, wspace


def _data_fraction(ax: Any) -> FloatArray:
    """Axes-fraction positions (n, 2) of the markers drawn in data coordinates."""
    parts = [np.asarray(line.get_xydata(), dtype=float) for line in ax.lines
             if line.get_marker() not in (None, "None", "", " ")]
    if not parts:
        return np.empty((0, 2))
    xy = np.concatenate(parts)
    fraction = (ax.transScale + ax.transLimits).transform(xy)
    return fraction[np.isfinite(fraction).all(axis=1)]


def _free_corner(fraction: FloatArray, box: tuple[float, float], margin: float,
                 pad: float) -> tuple[float, float] | None:
    """The first corner (lower right, upper left, upper right, lower left) whose box holds no
    point, as the box's lower-left corner in axes fraction; None when every corner is taken."""
    w, h = box
    for x0, y0 in ((1 - margin - w, margin), (margin, 1 - margin - h),
                   (1 - margin - w, 1 - margin - h), (margin, margin)):
        inside = ((fraction[:, 0] > x0 - pad) & (fraction[:, 0] < x0 + w + pad)
                  & (fraction[:, 1] > y0 - pad) & (fraction[:, 1] < y0 + h + pad))
        if not inside.any():
            return x0, y0
    return None


def _lower_the_floor(ax: Any, fraction: FloatArray, box: tuple[float, float], margin: float,
                     pad: float) -> None:
    """Lower the y limit so that no point under the lower-right box is left under it."""
    w, h = box
    under = fraction[:, 0] > 1 - margin - w - pad
    if not under.any():
        return
    scale = ax.yaxis.get_transform()
    low, high = scale.transform(np.asarray(ax.get_ylim(), dtype=float))
    lowest = low + fraction[under, 1].min() * (high - low)
    clear = margin + h + pad
    new_low = min(low, (lowest - clear * high) / (1 - clear))
    ax.set_ylim(scale.inverted().transform(np.array([new_low, high])))


def _place_note(ax: Any, text: str, fontsize: float = 6.5) -> None:
    """A boxed note in a corner of the axes where it hides no data point.

    The first free corner (lower right, upper left, upper right, lower left) is taken; when
    every corner holds points, the y range is extended downwards to free the lower right.
    """
    width_in, height_in = _axes_size_in(ax)
    lines = text.split("\n")
    box = ((max(len(line) for line in lines) * GLYPH_WIDTH_EM + 0.8) * fontsize / 72 / width_in,
           (len(lines) * LINE_HEIGHT_EM + 0.8) * fontsize / 72 / height_in)
    margin, pad = 0.02, 0.02
    ax.autoscale_view()
    fraction = _data_fraction(ax)
    corner = _free_corner(fraction, box, margin, pad)
    if corner is None:
        _lower_the_floor(ax, fraction, box, margin, pad)
        corner = (1 - margin - box[0], margin)
    right = corner[0] > 0.5
    ax.text(corner[0] + (box[0] if right else 0.0), corner[1], text, transform=ax.transAxes,
            ha="right" if right else "left", va="bottom", fontsize=fontsize,
            multialignment="right" if right else "left",
            bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": "#c9ced6", "lw": 0.5})


def _positive_floor(values: FloatArray) -> float:
    """A small positive value below the data, for log axes (clip of lower bands)."""
    positive = values[np.isfinite(values) & (values > 0)]
    return float(positive.min()) * 0.3 if positive.size else 1e-15


# --------------------------------------------------------------------------------------------
# The data
# --------------------------------------------------------------------------------------------


def _broken_at_zero_bias(voltage_V: FloatArray, current_A: FloatArray
                         ) -> tuple[FloatArray, FloatArray]:
    """The sweep (sorted by V) with a NaN gap wherever it changes polarity.

    |I| vanishes at zero bias, so a line joining the last negative to the first positive point
    would draw a current through an unmeasured region; the gap leaves it out.
    """
    crossings = np.flatnonzero(np.sign(voltage_V[:-1]) != np.sign(voltage_V[1:])) + 1
    return (np.insert(voltage_V.astype(float), crossings, np.nan),
            np.insert(current_A.astype(float), crossings, np.nan))


def iv_curves_figure(series: IVSeries) -> ReportFigure:
    """Measured |I| against V at every temperature, and |I| against |V| on log-log axes.

    Left: both polarities against signed bias (log-current axis). Right: |I| against |V|
    with filled markers for positive and open markers for negative bias, so an asymmetric
    (electrode-limited) device shows as two separate branches. Excluded points with a
    non-zero current are drawn as grey crosses.
    """
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 3.0))
        _margins(fig, 0.62, 0.12, 0.45, 0.28, wspace=0.28)
        ax_lin, ax_log = fig.subplots(1, 2)
        colours = temperature_colours(series.temperatures)
        magnitude = np.abs(series.current_A)
        for t, colour in colours.items():
            at_t = series.temperature_K == t
            order = np.argsort(series.voltage_V[at_t])
            v, i = series.voltage_V[at_t][order], magnitude[at_t][order]
            ok = i > 0
            ax_lin.plot(*_broken_at_zero_bias(v[ok], i[ok]), "o-", color=colour, ms=2.6, lw=0.8,
                        label=_temperature_label(t))
            positive, negative = ok & (v > 0), ok & (v < 0)
            ax_log.plot(v[positive], i[positive], "o", color=colour, ms=2.8)
            ax_log.plot(-v[negative], i[negative], "o", mfc="none", mec=colour, ms=3.2,
                        mew=0.7)
        excluded = [(p.voltage_V, abs(p.current_A)) for p in series.excluded
                    if p.current_A != 0 and np.isfinite(p.current_A)]
        if excluded:
            ev, ei = np.array(excluded).T
            ax_lin.plot(ev, ei, "x", color=MUTED, ms=4, mew=0.9, label="excluded")
            nonzero_v = ev != 0
            ax_log.plot(np.abs(ev[nonzero_v]), ei[nonzero_v], "x", color=MUTED, ms=4, mew=0.9)
        for ax in (ax_lin, ax_log):
            ax.set_yscale("log")
            _log_axis(ax.yaxis)
            ax.set_ylabel("|I| [A]")
        ax_log.set_xscale("log")
        _plain_log_ticks(ax_log.xaxis)
        ax_lin.set_xlabel("bias V [V]")
        ax_log.set_xlabel("|V| [V]")
        ax_lin.set_title("(a) both polarities")
        ax_log.set_title("(b) log-log; filled V > 0, open V < 0")
        _legend(ax_lin, len(colours) + bool(excluded), title="temperature", loc="best")
    caption = (f"Measured current magnitude at {len(colours)} temperature(s), "
               f"{series.n_points} points kept"
               + (f", {len(series.excluded)} excluded (grey crosses where |I| > 0)"
                  if series.excluded else "")
               + ". Colour runs from the coldest (violet) to the hottest (orange) sweep.")
    return ReportFigure("data_iv_curves", "Measured I-V curves", caption, fig, "data")


def zabrodskii_figure(linearisation: Mapping[str, Any]) -> ReportFigure | None:
    """Reduced activation energy w = d ln G / d ln T against T on log-log axes.

    For G = G0 exp[-(T0/T)^p] the points lie on a line of slope -p (Zabrodskii & Zinov'eva,
    Sov. Phys. JETP 59, 425 (1984)); guides of slope -1, -1/2 and -1/4 (nearest-neighbour,
    Efros-Shklovskii, Mott) are drawn through the data's centre. Returns None when the
    linearisation could not compute w (fewer than three temperatures, or not activated).
    """
    z = linearisation.get("zabrodskii") or {}
    temps = np.array([t for t in z.get("temperatures_K", []) if t is not None], dtype=float)
    w = np.array([v for v in z.get("w", []) if v is not None], dtype=float)
    if temps.size < 3 or temps.size != w.size or np.any(w <= 0):
        return None
    laws = z.get("law_exponents") or {}
    # The legend goes below the axes (inside it would hide points), one entry a line.
    legend_in = 0.14 * (len(laws) + 1) + 0.12
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN * 0.55, 2.7 + legend_in))
        _margins(fig, 0.62, 0.12, 0.45 + legend_in, 0.28)
        ax = fig.subplots()
        ax.plot(temps, w, "o", color=INK, label="data (finite differences)")
        centre_t, centre_w = math.exp(np.log(temps).mean()), math.exp(np.log(w).mean())
        span = np.geomspace(temps.min(), temps.max(), 20)
        for (law, p), colour in zip(sorted(laws.items(), key=lambda kv: -kv[1]),
                                    _series_colours(len(laws)), strict=True):
            ax.plot(span, centre_w * (span / centre_t) ** (-p), "--", color=colour, lw=0.9,
                    label=f"slope -{p:.3g} ({law.replace('_', ' ')})")
        ax.set_xscale("log")
        ax.set_yscale("log")
        _plain_log_ticks(ax.xaxis)
        _plain_log_ticks(ax.yaxis)
        ax.set_xlabel("T [K]")
        ax.set_ylabel("w = d ln G / d ln T")
        p_value = z.get("exponent_p")
        title = "Reduced activation energy"
        if p_value is not None:
            err = z.get("exponent_p_err")
            title += f": p = {p_value:.2f}" + (f" ± {err:.2f}" if err is not None else "")
        ax.set_title(title)
        ax.legend(ncol=1, loc="upper center", bbox_to_anchor=(0.5, -0.2), handlelength=1.6,
                  columnspacing=0.8, handletextpad=0.4)
    bias = z.get("bias_V")
    caption = ("Zabrodskii & Zinov'eva (1984) analysis: for G = G0 exp[-(T0/T)^p] the reduced "
               "activation energy falls on a line of slope -p"
               + (f" (G = I/V at {bias:g} V)" if bias is not None else "")
               + ". " + str(z.get("detail", "")))
    return ReportFigure("data_zabrodskii", "Reduced activation energy", caption, fig, "data")


# --------------------------------------------------------------------------------------------
# Straightened plots
# --------------------------------------------------------------------------------------------


def _draw_plot_panel(ax: Any, plot: StraightenedPlot, lines: Sequence[Mapping[str, Any]],
                     series: IVSeries, device: Device) -> None:
    """Scatter the transformed data of one straightened plot and draw its fitted lines."""
    n_entries = 0
    if plot.grouping == "per_temperature":
        abs_v = np.abs(series.voltage_V)
        folded = np.sign(series.voltage_V) * series.current_A
        nonzero = abs_v > 0
        with np.errstate(all="ignore"):
            x, y = plot.transform(abs_v[nonzero], series.temperature_K[nonzero],
                                  folded[nonzero], device)
        x = np.broadcast_to(np.asarray(x, dtype=float), abs_v[nonzero].shape)
        y = np.broadcast_to(np.asarray(y, dtype=float), abs_v[nonzero].shape)
        temps_all = series.temperature_K[nonzero]
        for t, colour in temperature_colours(series.temperatures).items():
            sel = (temps_all == t) & np.isfinite(x) & np.isfinite(y)
            if sel.any():
                ax.plot(x[sel], y[sel], "o", color=colour, ms=2.6, label=_temperature_label(t))
                n_entries += 1
        line_colours = temperature_colours(series.temperatures)
        for line in lines:
            colour = line_colours.get(float(line["group_value"]), INK)
            _draw_line(ax, line, colour)
    else:
        colours = _series_colours(len(lines))
        for line, colour in zip(lines, colours, strict=True):
            bias = float(line["group_value"])
            temps, current = common_bias_points(series, bias)
            with np.errstate(all="ignore"):
                x, y = plot.transform(np.full(temps.shape, bias), temps, current, device)
            x = np.broadcast_to(np.asarray(x, dtype=float), temps.shape)
            y = np.broadcast_to(np.asarray(y, dtype=float), temps.shape)
            ok = np.isfinite(x) & np.isfinite(y)
            ax.plot(x[ok], y[ok], "o", color=colour, ms=3.0, label=f"{bias:.3g} V")
            _draw_line(ax, line, colour)
            n_entries += 1
    ax.set_xlabel(plot.x_label)
    ax.set_ylabel(plot.y_label)
    if n_entries:
        ax.legend(ncol=min(n_entries, 5), loc="upper center", bbox_to_anchor=(0.5, -0.17),
                  handlelength=1.0, columnspacing=0.8, handletextpad=0.3,
                  title="line at" if plot.grouping == "per_voltage" else None)


def _r_squared_note(lines: Sequence[Mapping[str, Any]]) -> str:
    """The R² of a panel's lines: one value, or their range and number."""
    r2 = np.array([line["r_squared"] for line in lines if line.get("r_squared") is not None])
    if r2.size:
        return (f"R² = {r2[0]:.4f}" if r2.size == 1 else
                f"R² from {r2.min():.4f} to {r2.max():.4f}\n({r2.size} lines)")
    return "no straight line could be drawn"


def _title_and_note_panels(fig: Figure, axes: Sequence[Any], plots: Sequence[StraightenedPlot],
                           panel_lines: Sequence[Sequence[Mapping[str, Any]]],
                           bottom: float) -> None:
    """Fit the y axes into the margins, wrap each title to its panel, add the R² notes.

    The figure grows upwards by a line per extra title line, so the panels keep their height.
    """
    left, wspace = _fit_side_margins(fig, axes, 0.62, 0.12, bottom, 0.28, 0.3)
    fontsize = float(matplotlib.rcParams["axes.titlesize"])
    titles = [_wrap_to_width(plot.title, _axes_size_in(ax)[0], fontsize)
              for ax, plot in zip(axes, plots, strict=True)]
    extra_in = TITLE_LINE_IN * max(title.count("\n") for title in titles)
    if extra_in:
        width, height = fig.get_size_inches()
        fig.set_size_inches(width, height + extra_in)
        _margins(fig, left, 0.12, bottom, 0.28 + extra_in, wspace=wspace)
    for ax, title, lines in zip(axes, titles, panel_lines, strict=True):
        ax.set_title(title, loc="left")
        _place_note(ax, _r_squared_note(lines))


def _legend_entries(plot: StraightenedPlot, lines: Sequence[Mapping[str, Any]],
                    series: IVSeries) -> int:
    """Number of legend entries of one straightened-plot panel."""
    if plot.grouping == "per_temperature":
        return int(series.temperatures.size)
    return sum(1 for line in lines if line.get("plot_id") == plot.id)


def _draw_line(ax: Any, line: Mapping[str, Any], colour: Any) -> None:
    """Draw one fitted straight line over the x range of its points."""
    keys = ("slope", "intercept", "x_min", "x_max")
    if any(line.get(k) is None for k in keys):
        return
    x = np.array([line["x_min"], line["x_max"]], dtype=float)
    ax.plot(x, line["intercept"] + line["slope"] * x, "-", color=colour, lw=1.0, alpha=0.9)


def straightened_figure(mechanism: Mechanism, linearisation_entry: Mapping[str, Any],
                        series: IVSeries, device: Device) -> ReportFigure | None:
    """The mechanism's straightened plots with the straight lines of the linearisation.

    Parameters
    ----------
    mechanism : Mechanism
        Catalogue declaration (plots, transforms, labels).
    linearisation_entry : mapping
        The mechanism's entry of ``result.linearisation["mechanisms"]`` (plain JSON form), so
        the lines and R^2 drawn are exactly those in the JSON.
    series, device : IVSeries, Device
        The data and the device description the transforms need.

    Returns
    -------
    ReportFigure or None
        None when the mechanism declares no straightened plot.
    """
    if not mechanism.plots:
        return None
    n = len(mechanism.plots)
    all_lines = linearisation_entry.get("lines", [])
    legend_rows = max(math.ceil(_legend_entries(p, all_lines, series) / 5) for p in mechanism.plots)
    bottom = 0.5 + 0.16 * legend_rows + (0.14 if legend_rows else 0.0)
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN if n > 1 else DOUBLE_COLUMN_IN * 0.6,
                              2.25 + bottom))
        _margins(fig, 0.62, 0.12, bottom, 0.28, wspace=0.3)
        axes = np.atleast_1d(fig.subplots(1, n))
        panel_lines = [[line for line in all_lines if line.get("plot_id") == plot.id]
                       for plot in mechanism.plots]
        for ax, plot, lines in zip(axes, mechanism.plots, panel_lines, strict=True):
            _draw_plot_panel(ax, plot, lines, series, device)
        _title_and_note_panels(fig, axes, mechanism.plots, panel_lines, bottom)
    titles = " and ".join(p.title for p in mechanism.plots)
    caption = (f"{titles}: if {mechanism.name} governs the current, the points fall on straight "
               "lines. Lines: robust (Huber) straight-line fits, one per "
               + " / ".join(sorted({"temperature" if p.grouping == "per_temperature"
                                    else "common bias" for p in mechanism.plots}))
               + "; R² as computed in the linearisation result.")
    return ReportFigure(f"{mechanism.id}_straightened", "Straightened plots", caption, fig,
                        "mechanism", mechanism.id)


# --------------------------------------------------------------------------------------------
# Joint fit
# --------------------------------------------------------------------------------------------


def joint_fit_figure(mechanism_result: Mapping[str, Any],
                     view: PosteriorPredictive) -> ReportFigure:
    """Data with the joint fit and its predictive band, and standardised residuals.

    Parameters
    ----------
    mechanism_result : mapping
        The mechanism's JSON entry (name, adequacy numbers for the caption).
    view : PosteriorPredictive
        The fitted points, residuals and predictive band handed over by inference.
    """
    mechanism = get_mechanism(view.mechanism_id)
    v, t, i = view.voltage_V, view.temperature_K, view.current_A
    grid_v, grid_t = view.grid_voltage_V, view.grid_temperature_K
    band = {"median": view.median_A, "lower": view.lower_A, "upper": view.upper_A}
    residuals = view.residuals
    colours = temperature_colours(np.unique(t))
    floor = _positive_floor(np.abs(i))
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 4.4))
        _margins(fig, 0.7, 0.12, 0.45, 0.28, hspace=0.08)
        ax, ax_res = fig.subplots(2, 1, sharex=True, height_ratios=(2.6, 1.0))
        for temp, colour in colours.items():
            at_t = t == temp
            ax.plot(v[at_t], np.abs(i[at_t]), "o", color=colour, ms=2.6,
                    label=_temperature_label(temp))
            ax_res.plot(v[at_t], residuals[at_t], "o", color=colour, ms=2.4)
            for sign in (1.0, -1.0):
                on = (grid_t == temp) & (np.sign(grid_v) == sign)
                if not on.any():
                    continue
                lower = np.clip(band["lower"][on], floor, None)
                upper = np.clip(band["upper"][on], floor, None)
                ax.fill_between(grid_v[on], lower, upper, color=colour, alpha=0.16, lw=0)
                ax.plot(grid_v[on], np.abs(band["median"][on]), "-", color=colour, lw=0.9)
        ax.set_yscale("log")
        _log_axis(ax.yaxis)
        ax.set_ylim(bottom=floor)
        ax.set_ylabel("|I| [A]")
        ax.set_title(f"Joint fit of {mechanism_result.get('name', mechanism.name)} "
                     "to all temperatures", loc="left")
        _legend(ax, len(colours), title="temperature", loc="best")
        ax_res.axhline(0.0, color=INK, lw=0.6)
        for level in (-2.0, 2.0):
            ax_res.axhline(level, color=MUTED, lw=0.6, ls="--")
        finite = residuals[np.isfinite(residuals)]
        limit = max(3.5, float(np.max(np.abs(finite))) * 1.1) if finite.size else 3.5
        ax_res.set_ylim(-limit, limit)
        ax_res.set_xlabel("bias V [V]")
        ax_res.set_ylabel("residual [σ]")
    adequacy = mechanism_result.get("adequacy") or {}
    chi2 = adequacy.get("reduced_chi_square")
    caption = ("Points: measured |I| that entered the fit. Lines: posterior median model; "
               f"shaded: 95 % posterior predictive band (model plus fitted noise, "
               f"{view.n_predictive_draws} posterior draws). Lower panel: standardised residuals "
               "(I_obs - I_model)/σ at the posterior median, dashed at ±2σ"
               + (f"; reduced χ² = {chi2:.3g}" if isinstance(chi2, int | float) else "") + ".")
    return ReportFigure(f"{mechanism.id}_joint_fit", "Joint fit and residuals", caption,
                        fig, "mechanism", mechanism.id)


# --------------------------------------------------------------------------------------------
# Posterior (corner plot)
# --------------------------------------------------------------------------------------------


def corner_labels(view: PosteriorPredictive) -> tuple[list[int], list[str], list[str]]:
    """Columns, axis labels with units and short titles of the physical sampled parameters.

    Noise parameters are not in the view (nuisance; their summaries are in the tables). Every
    axis is labelled ``symbol [unit]`` (the catalogue's :attr:`Parameter.label`) in physical
    units; a parameter sampled in log10 is drawn on a logarithmic axis, ``(log axis)``.
    """
    mechanism = get_mechanism(view.mechanism_id)
    columns, labels, titles = [], [], []
    for column, axis in enumerate(view.parameters):
        parameter = mechanism.parameter(axis.name)
        label, title = parameter.label, parameter.symbol
        if axis.log10:
            label += " (log axis)"
        columns.append(column)
        labels.append(label)
        titles.append(title)
    return columns, labels, titles


def _quantile_title(symbol: str, values: FloatArray, log10: bool = False) -> str:
    """``symbol = median`` over ``[16th, 84th]`` percentiles, in physical units (plain text).

    ``values`` in log10 (``log10=True``) are shown as the physical values they stand for.
    """
    lo, mid, hi = np.quantile(values, [0.16, 0.5, 0.84])
    if log10:
        lo, mid, hi = 10.0**lo, 10.0**mid, 10.0**hi
    # Enough significant digits that the interval's ends differ from the median.
    width = max(hi - lo, abs(mid) * 1e-12, 1e-300)
    digits = int(min(12, max(3, math.ceil(math.log10(max(abs(mid), width) / width)) + 2)))
    return f"{symbol} = {mid:.{digits}g}\n[{lo:.{digits}g}, {hi:.{digits}g}]"


class _PhysicalFromLog10(ticker.Formatter):
    """Tick labels of a log10-sampled axis as the physical values (``1e-06``, ``0.3``), with
    the fewest significant digits (at least two) that tell every label of the axis apart."""

    def __call__(self, x: float, pos: int | None = None) -> str:
        return f"{10.0**x:.2g}"

    def format_ticks(self, values: Sequence[float]) -> list[str]:
        physical = 10.0 ** np.asarray(values, dtype=float)
        labels = [f"{v:.2g}" for v in physical]
        for digits in range(3, 13):
            if len(set(labels)) == len(labels):
                break
            labels = [f"{v:.{digits}g}" for v in physical]
        return labels


def _physical_log_ticks(axis: Any) -> None:
    """Tick labels of a log10-sampled axis as the physical values, each label distinct."""
    axis.set_major_formatter(_PhysicalFromLog10())


#: Gap between a corner plot's tick labels and its axis label, in points.
CORNER_LABEL_GAP_PT = 3.0

#: Fraction of a corner panel at each end kept free of ticks, so that 45-degree tick labels
#: stay clear of the neighbouring panel's.
CORNER_TICK_MARGIN = 0.2


class _InnerTicks(ticker.MaxNLocator):
    """Nice ticks (MaxNLocator) inside the inner part of the view only; the one tick nearest
    the centre when none falls inside, or when ``single``."""

    def __init__(self, nbins: int, single: bool = False) -> None:
        super().__init__(nbins)
        self.single = single

    def tick_values(self, vmin: float, vmax: float) -> NDArray[np.float64]:
        ticks = np.asarray(super().tick_values(vmin, vmax), dtype=float)
        low, high = sorted((vmin, vmax))
        margin = CORNER_TICK_MARGIN * (high - low)
        inner = ticks[(ticks >= low + margin) & (ticks <= high - margin)]
        if (inner.size and not self.single) or not ticks.size:
            return inner
        return ticks[[int(np.argmin(np.abs(ticks - 0.5 * (low + high))))]]


def _corner_axis_labels(fig: Figure, grid: NDArray[Any], labels: Sequence[str]) -> None:
    """Keep a corner plot's axis labels clear of its tick labels and of each other.

    corner.py puts every label at one fixed distance from its axes whatever the width of the
    (45-degree) tick labels, and long labels run into the next panel's. Here ticks stay off
    the panel ends (their labels met the neighbouring panel's), long labels are wrapped
    to the panel size, and after one measurement on an Agg canvas each label sits just
    beyond the widest tick label of its row or column.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    k = grid.shape[0]
    size_in = _axes_size_in(grid[k - 1, 0])[0]
    # No offset text ("1e-5+5e-2" above an axis lands on the neighbouring panel): every
    # linear tick label carries its full value.
    for ax in grid.flat:
        for axis in (ax.xaxis, ax.yaxis):
            if isinstance(axis.get_major_formatter(), ticker.ScalarFormatter):
                axis.get_major_formatter().set_useOffset(False)
    # About one tick label per 0.4 inch of panel: 45-degree labels of five or more digits.
    bins = max(2, min(4, int(size_in / 0.4)))
    for row in range(k):
        for col in range(row + 1):
            grid[row, col].xaxis.set_major_locator(_InnerTicks(bins))
            if col < row:
                grid[row, col].yaxis.set_major_locator(_InnerTicks(bins))
    for col in range(k):
        grid[k - 1, col].set_xlabel(_wrap_to_width(labels[col], size_in, 7.5))
    for row in range(1, k):
        grid[row, 0].set_ylabel(_wrap_to_width(labels[row], size_in, 7.5))
    renderer = FigureCanvasAgg(fig).get_renderer()
    for col in range(k):
        _thin_ticks([grid[row, col].xaxis for row in range(col, k)], renderer, bins)
    for row in range(1, k):
        _thin_ticks([grid[row, col].yaxis for col in reversed(range(row))], renderer, bins)
    gap = CORNER_LABEL_GAP_PT * fig.dpi / 72.0
    left_axes = [grid[row, 0] for row in range(1, k)]
    bottom_axes = [grid[k - 1, col] for col in range(k)]
    if left_axes:
        left_edge = min(_ticks_extent(ax.yaxis, renderer).x0 for ax in left_axes) - gap
        for ax in left_axes:
            ax.yaxis.set_label_coords((left_edge - ax.bbox.x0) / ax.bbox.width, 0.5)
    bottom_edge = min(_ticks_extent(ax.xaxis, renderer).y0 for ax in bottom_axes) - gap
    for ax in bottom_axes:
        ax.xaxis.set_label_coords(0.5, (bottom_edge - ax.bbox.y0) / ax.bbox.height)


def _labels_collide(axis: Any, renderer: Any) -> bool:
    """Whether two neighbouring tick labels of an axis overlap (by more than a pixel)."""
    boxes = [label.get_window_extent(renderer) for label in axis.get_ticklabels()
             if label.get_text()]
    return any(min(a.x1, b.x1) - max(a.x0, b.x0) > 1 and min(a.y1, b.y1) - max(a.y0, b.y0) > 1
               for a, b in zip(boxes, boxes[1:], strict=False))


def _thin_ticks(axes: Sequence[Any], renderer: Any, bins: int) -> None:
    """Fewer ticks on a corner plot's row or column until its labelled axis (the last of
    ``axes``) has no colliding tick labels, down to the one tick nearest the centre; every
    axis of the row or column alike."""
    while bins > 0 and _labels_collide(axes[-1], renderer):
        bins -= 1
        for axis in axes:
            axis.set_major_locator(_InnerTicks(max(bins, 1), single=bins == 0))


def _ticks_extent(axis: Any, renderer: Any) -> Any:
    """Display box of an axis's ticks and tick labels (its label left out)."""
    axis.label.set_visible(False)
    try:
        return axis.get_tightbbox(renderer)
    finally:
        axis.label.set_visible(True)


def corner_figure(view: PosteriorPredictive) -> ReportFigure | None:
    """Corner plot of the physical parameters' posterior (68 % and 95 % contours).

    Returns None when no physical parameter was sampled or none has any spread.
    """
    import corner  # imported here: corner imports matplotlib.pyplot only for its own figures

    columns, labels, titles = corner_labels(view)
    if not columns:
        return None
    draws = np.column_stack([axis.values for axis in view.parameters])
    keep = [k for k, c in enumerate(columns) if np.ptp(draws[:, c]) > 0]
    if not keep:
        return None
    data = thin_draws(draws, CORNER_DRAWS)[:, [columns[k] for k in keep]]
    labels = [labels[k] for k in keep]
    titles = [titles[k] for k in keep]
    size = min(DOUBLE_COLUMN_IN, 1.75 * len(keep) + 0.9)
    with _style(), warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # contour levels of thin posteriors
        fig = Figure(figsize=(size, size))
        corner.corner(
            data, fig=fig, labels=labels, show_titles=False,
            levels=(0.68, 0.95), quantiles=[0.16, 0.5, 0.84], bins=25, smooth=1.0,
            color=LEADER_COLOUR, plot_datapoints=False, fill_contours=True,
            label_kwargs={"fontsize": 7.5}, max_n_ticks=4, labelpad=0.12,
        )
        for ax in fig.axes:
            ax.grid(False)
            ax.tick_params(labelsize=6)
        grid = np.array(fig.axes).reshape(len(keep), len(keep))
        in_log10 = [view.parameters[columns[k]].log10 for k in keep]
        last = len(keep) - 1
        # corner labels only the bottom row (x) and the left column (y); the other axes keep
        # their empty tick labels.
        for col in range(len(keep)):
            if in_log10[col]:
                _physical_log_ticks(grid[last, col].xaxis)
        for row in range(1, len(keep)):
            if in_log10[row]:
                _physical_log_ticks(grid[row, 0].yaxis)
        panel_in = _axes_size_in(grid[0, 0])[0]
        for ax, title, column, log10 in zip(grid.diagonal(), titles, data.T, in_log10,
                                            strict=True):
            # A line wider than the panel would run over the neighbouring panel: wrapped.
            text = "\n".join(_wrap_to_width(line, panel_in, 6.5)
                             for line in _quantile_title(title, column, log10).split("\n"))
            ax.set_title(text, fontsize=6.5)
        _corner_axis_labels(fig, grid, labels)
    mechanism = get_mechanism(view.mechanism_id)
    caption = (f"Posterior of the {mechanism.name} parameters ({len(data)} draws of the "
               "β = 1 chain), drawn with corner.py (Foreman-Mackey 2016). Two-dimensional "
               "panels: contours enclosing 68 % and 95 % of the posterior mass. Diagonal: "
               "marginal histograms with the median and the 16th/84th percentiles (dashed), "
               "quoted above each column as the median over [16th, 84th]. Axes are in "
               "physical units; parameters sampled in log10 (log-uniform prefactors, and "
               "barrier, thickness or mass where the catalogue samples them so) are drawn on "
               "logarithmic axes. The noise parameters are omitted (see the table).")
    return ReportFigure(f"{mechanism.id}_posterior", "Posterior", caption, fig, "mechanism",
                        mechanism.id, tight=True)


# --------------------------------------------------------------------------------------------
# Comparison
# --------------------------------------------------------------------------------------------

#: |ln B| up to which the comparison axis is linear (symlog beyond).
SYMLOG_LINEAR = 6.0

#: Kass & Raftery (1995) thresholds on ln B (their 2 ln B = 2, 6, 10), and their words.
KASS_RAFTERY_BANDS: tuple[tuple[float, float, str], ...] = (
    (0.0, 1.0, "bare mention"),
    (1.0, 3.0, "positive"),
    (3.0, 5.0, "strong"),
    (5.0, math.inf, "very strong"),
)


def ranking_figure(mechanisms: Sequence[Mapping[str, Any]]) -> ReportFigure | None:
    """ln B of every fitted mechanism against the leader, with its Monte Carlo error.

    The axis is linear down to ln B = -SYMLOG_LINEAR and logarithmic beyond (symlog), so the
    Kass & Raftery (1995) bands (bare mention, positive, strong, very strong; shaded) stay
    readable next to mechanisms that lose by hundreds of nats. Bars of mechanisms whose fit
    fails the adequacy checks are hatched. Returns None when fewer than two were fitted.
    """
    if len(mechanisms) < 2:
        return None
    ids = [m["id"] for m in mechanisms]
    ln_b = np.array([_finite_or(m.get("ln_bayes_factor_vs_best"), -np.inf) for m in mechanisms])
    err = np.array([_finite_or(m.get("ln_bayes_factor_vs_best_err"), 0.0) for m in mechanisms])
    finite = np.isfinite(ln_b)
    depth = float(max(10.0, -ln_b[finite].min() * 1.5)) if finite.any() else 10.0
    shown = np.where(finite, ln_b, -depth)
    y = np.arange(len(ids))[::-1]
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 0.36 * len(ids) + 1.1))
        _margins(fig, 0.12 + 0.058 * max(len(i) for i in ids), 0.12, 0.45, 0.08)
        ax = fig.subplots()
        ax.set_xscale("symlog", linthresh=SYMLOG_LINEAR, linscale=2.0)
        shades = ("#f6f7f9", "#ebeff5", "#dfe6ef", "#d3dcea")
        for band, ((lo, hi, words), shade) in enumerate(zip(KASS_RAFTERY_BANDS, shades,
                                                             strict=True)):
            right, left = -lo, -min(hi, depth)
            ax.axvspan(left, right, color=shade, lw=0, zorder=0)
            centre = -(lo + min(hi, SYMLOG_LINEAR * 3)) / 2 if hi == math.inf else (left + right) / 2
            ax.text(centre, len(ids) - 0.5 + 0.28 * (band % 2), words, ha="center", va="bottom",
                    fontsize=6, color=MUTED)
        for k, m in enumerate(mechanisms):
            adequate = bool(m.get("fit_adequate"))
            colour = LEADER_COLOUR if k == 0 else "#7b879a"
            ax.barh(y[k], shown[k], xerr=err[k] if (finite[k] and k > 0) else None, height=0.55,
                    color=colour if adequate else "white", edgecolor=colour,
                    hatch=None if adequate else "////", lw=0.8, zorder=2,
                    error_kw={"elinewidth": 0.8, "capsize": 2, "ecolor": INK})
            probability = m.get("probability")
            label = "leader, " if k == 0 else ""
            if probability is not None:
                label += probability_label(probability, among_candidates=k == 0)
            ax.text(0.3, y[k], label, va="center", ha="left", fontsize=6.5)
        ax.set_yticks(y, ids)
        ax.set_xlim(-depth, SYMLOG_LINEAR * 1.6)
        ax.set_ylim(-0.6, len(ids) + 0.3)
        ax.axvline(0, color=INK, lw=0.7)
        ax.xaxis.set_major_formatter(ticker.FuncFormatter(lambda value, _pos: f"{value:g}"))
        ax.set_xlabel("ln B against the leading mechanism  (ln Z − ln Z_best;  linear to "
                      f"−{SYMLOG_LINEAR:g}, logarithmic beyond)")
        ax.grid(axis="y", visible=False)
    caption = ("Natural-log Bayes factor of each fitted mechanism against the leader "
               "(error bars: Monte Carlo error of the evidence difference). Shaded bands: "
               "Kass & Raftery (1995) scale, ln B thresholds 1, 3 and 5. Hatched bars: the "
               "fit fails the posterior predictive adequacy checks. P: posterior probability "
               "among the fitted candidates only, with equal prior odds.")
    return ReportFigure("comparison_bayes_factors", "Evidence against the leader", caption,
                        fig, "comparison")


def regime_figure(regimes: Mapping[str, Any] | None) -> ReportFigure | None:
    """The regime map on the measured (|V|, T) plane (:mod:`mechid.inference.regimes`).

    Left panel (when a composite was fitted): the path carrying the larger share of the
    current, shaded by the posterior probability of that statement. Right panel: the share of
    the leading single mechanism's points whose standardised residual exceeds 3. None when
    there is nothing to draw.
    """
    if not regimes or not regimes.get("temperatures_K"):
        return None
    temperatures = np.array(regimes["temperatures_K"], dtype=float)
    biases = np.array(regimes["bias_abs_V"], dtype=float)
    composite = regimes.get("composite")
    failure = np.array([[np.nan if x is None else x for x in row]
                        for row in regimes.get("residual_failure") or []], dtype=float)
    single = regimes.get("single_mechanism")
    panels = (["paths"] if composite else []) + (["residuals"] if single else [])
    if not panels:
        return None
    rows = np.arange(temperatures.size)
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 0.22 * temperatures.size + 1.9))
        _margins(fig, 0.7, 0.75, 0.5, 0.42, wspace=0.15)
        axes = np.atleast_1d(fig.subplots(1, len(panels), sharey=True))
        for ax, panel in zip(axes, panels, strict=True):
            if panel == "paths":
                index = np.array(regimes["dominant_path"], dtype=float)
                probability = np.array(regimes["dominant_probability"], dtype=float)
                colours = np.array([[0.14, 0.34, 0.65], [0.80, 0.45, 0.10]])
                rgb = colours[index.astype(int) % 2]
                alpha = np.clip((probability - 0.5) * 2, 0.15, 1.0)[..., None]
                ax.imshow(rgb * alpha + (1 - alpha), aspect="auto", origin="lower",
                          interpolation="nearest")
                paths = regimes.get("paths") or []
                ax.set_title(f"{composite}:\n{paths[0]} (blue) or {paths[1]} (orange)",
                             fontsize=7, loc="left")
            else:
                image = ax.imshow(failure, aspect="auto", origin="lower", cmap="Reds",
                                  vmin=0.0, vmax=1.0, interpolation="nearest")
                fig.colorbar(image, ax=ax, fraction=0.05, pad=0.02, label="share |z| > 3")
                ax.set_title(f"{single}:\nresidual failures", fontsize=7, loc="left")
            ticks = np.linspace(0, biases.size - 1, min(5, biases.size)).round().astype(int)
            ax.set_xticks(ticks, [f"{biases[k]:.3g}" for k in ticks])
            ax.set_xlabel("|V| [V]")
            ax.grid(False)
        axes[0].set_yticks(rows, [f"{t:g}" for t in temperatures])
        axes[0].set_ylabel("T [K]")
    caption = ("Regime map over the measured temperatures and biases. "
               + ("Left: which path of the leading composite hypothesis carries the larger share "
                  "of the current; pale cells are those where the posterior draws disagree "
                  "(colour strength: probability of the path shown, from 0.5 to 1). "
                  if composite else "")
               + (f"{'Right' if composite else 'The panel'}: share of the data points of each "
                  f"cell where {single}, the leading single mechanism, misses by more than three "
                  "standard deviations (common-practice threshold); white: no data." if single
                  else ""))
    return ReportFigure("comparison_regime_map", "Regime map", caption, fig, "comparison")


def _finite_or(value: Any, default: float) -> float:
    return float(value) if isinstance(value, int | float) and math.isfinite(value) else default


def probability_label(probability: float, among_candidates: bool = False) -> str:
    """``P = 0.42`` or ``P > 0.999`` (:func:`~mechid.formatting.format_probability`).

    With ``among_candidates`` the label says the probability is relative to the fitted
    candidates, not to every conceivable mechanism.
    """
    text = format_probability(probability)
    label = f"P {text}" if text.startswith(("<", ">")) else f"P = {text}"
    return f"{label} among the candidates" if among_candidates else label


# --------------------------------------------------------------------------------------------
# All figures of a run
# --------------------------------------------------------------------------------------------


def build_figures(run: ReportRun, result_dict: Mapping[str, Any] | None = None
                  ) -> list[ReportFigure]:
    """Every figure of the report of one analysis run, in report order.

    Parameters
    ----------
    run : ReportRun
        The result, the series, the device and the posterior-predictive views.
    result_dict : mapping, optional
        ``to_plain_json(run.result)`` when already computed (the figures read the
        same numbers as the JSON).
    """
    from mechid.results import to_plain_json

    data = result_dict if result_dict is not None else to_plain_json(run.result)
    figures = [iv_curves_figure(run.series)]
    zabrodskii = zabrodskii_figure(data.get("linearisation") or {})
    if zabrodskii is not None:
        figures.append(zabrodskii)
    figures.extend(diode_figures(data, run.series, run.device))
    ranking = ranking_figure(data.get("mechanisms") or [])
    if ranking is not None:
        figures.append(ranking)
    regimes = regime_figure(data.get("regime_map"))
    if regimes is not None:
        figures.append(regimes)
    for mechanism_id in mechanism_order(data):
        figures.extend(mechanism_figures(run, data, mechanism_id))
    return figures


def mechanism_order(data: Mapping[str, Any]) -> list[str]:
    """Fitted mechanisms by probability, then the screened-only ones by screening rank."""
    fitted = [m["id"] for m in data.get("mechanisms") or []]
    screened = list((data.get("linearisation") or {}).get("ranking") or [])
    return fitted + [m for m in screened if m not in fitted]


def mechanism_figures(run: ReportRun, data: Mapping[str, Any],
                      mechanism_id: str) -> list[ReportFigure]:
    """Straightened plots, joint fit and posterior of one mechanism (those that apply)."""
    figures: list[ReportFigure] = []
    entry = linearisation_entry(data, mechanism_id)
    mechanism = get_mechanism(mechanism_id)
    if entry is not None:
        straight = straightened_figure(mechanism, entry, run.series, run.device)
        if straight is not None:
            figures.append(straight)
    view = run.predictive.get(mechanism_id)
    mechanism_json = next((m for m in data.get("mechanisms") or [] if m["id"] == mechanism_id),
                          None)
    if view is not None and mechanism_json is not None:
        figures.append(joint_fit_figure(mechanism_json, view))
        posterior = corner_figure(view)
        if posterior is not None:
            figures.append(posterior)
    return figures


def linearisation_entry(data: Mapping[str, Any], mechanism_id: str) -> Mapping[str, Any] | None:
    """The mechanism's entry of the linearisation result (plain JSON), or None."""
    for entry in (data.get("linearisation") or {}).get("mechanisms") or []:
        if entry.get("mechanism_id") == mechanism_id:
            return entry
    return None


# --------------------------------------------------------------------------------------------
# Rectifying contact (mechid.screening.diode)
# --------------------------------------------------------------------------------------------


def _diode_rows(diode: Mapping[str, Any], key: str) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Temperatures, a semilog quantity and its standard error where determined."""
    rows = []
    for entry in diode.get("temperatures") or []:
        semilog = entry.get("semilog") or {}
        q = semilog.get("quantities") or {}
        if semilog.get("determined") and q.get(key) is not None:
            rows.append((entry["temperature_K"], q[key], q.get(f"{key}_err") or 0.0))
    table = np.array(rows, dtype=float).reshape(-1, 3)
    return table[:, 0], table[:, 1], table[:, 2]


def _fitted_line(ax: Any, line: Mapping[str, Any] | None, scale: float = 1.0,
                 label: str | None = None) -> None:
    """Draw a diode-analysis line y = a + b x over its x range; x drawn as scale * x."""
    if not line or not line.get("determined"):
        return
    x = np.linspace(line["x_min"], line["x_max"], 2)
    ax.plot(x * scale, line["intercept"] + line["slope"] * x, "-", color=LEADER_COLOUR, lw=1.0,
            label=label)


def _not_determined(ax: Any, line: Mapping[str, Any] | None, width: int = 30) -> None:
    """An empty panel (no ticks) saying why its line was not drawn."""
    detail = (line or {}).get("detail") or "not determined"
    ax.text(0.5, 0.5, "\n".join(textwrap.wrap(detail, width)), transform=ax.transAxes,
            ha="center", va="center", fontsize=6.5, color=MUTED)
    ax.set_xticks([])
    ax.set_yticks([])


def _label(ax: Any, title: str, x_label: str, y_label: str) -> None:
    """Panel title (left) and axis labels."""
    ax.set_title(title, loc="left")
    ax.set_xlabel(x_label)
    ax.set_ylabel(y_label)


def diode_temperature_figure(diode: Mapping[str, Any]) -> ReportFigure | None:
    """Apparent barrier phi_ap(T) and ideality factor n(T) from the semilog lines, with errors.

    Returns None when the rectifying-contact analysis did not run or no semilog line exists.
    """
    if not diode.get("ran"):
        return None
    t_n, n, n_err = _diode_rows(diode, "ideality_factor")
    if t_n.size == 0:
        return None
    t_b, barrier, barrier_err = _diode_rows(diode, "apparent_barrier_eV")
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 2.7))
        _margins(fig, 0.62, 0.12, 0.45, 0.28, wspace=0.32)
        ax_b, ax_n = fig.subplots(1, 2)
        if t_b.size:
            ax_b.errorbar(t_b, barrier, yerr=barrier_err, fmt="o", color=INK, capsize=2,
                          elinewidth=0.8)
        else:
            _not_determined(ax_b, {"detail": "apparent barrier not determined: "
                                   "area and Richardson constant needed"})
        ax_n.errorbar(t_n, n, yerr=n_err, fmt="o", color=INK, capsize=2, elinewidth=0.8)
        ax_n.axhline(1.0, color=MUTED, lw=0.7, ls="--")
        _label(ax_b, "(a) apparent barrier (kT/e) ln(A A** T²/I_s)", "T [K]", "φ_ap [eV]")
        _label(ax_n, "(b) ideality factor from the ln I–V slope", "T [K]", "ideality factor n")
    caption = ("From the straight part of ln I vs V at each temperature (forward bias, "
               "V > 3kT/e, below the series-resistance bend): (a) the apparent barrier "
               "φ_ap = (kT/e) ln(A A** T²/I_s), (b) the ideality factor n = e/(kT × slope); "
               "error bars: one standard error of the line fit (A** taken as exact). The "
               "dashed line is n = 1 (pure thermionic emission). A barrier that rises and an n "
               "that falls with T point to a spread of barrier heights (Werner & Güttler 1991).")
    return ReportFigure("data_diode_temperature", "Rectifying contact: barrier and ideality "
                        "against temperature", caption, fig, "data")


def diode_richardson_figure(diode: Mapping[str, Any]) -> ReportFigure | None:
    """Richardson, modified Richardson and the two Werner & Güttler plots with their lines.

    Returns None when the analysis did not run or fewer than two temperatures have a line.
    """
    if not diode.get("ran"):
        return None
    t, current, _ = _diode_rows(diode, "saturation_current_A")
    if t.size < 2:
        return None
    spread = (diode.get("barrier_vs_inverse_2kt") or {}).get("quantities") or {}
    sigma = spread.get("barrier_spread_V")
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 5.2))
        _margins(fig, 0.7, 0.12, 0.45, 0.28, wspace=0.32, hspace=0.55)
        (ax_r, ax_m), (ax_b, ax_n) = fig.subplots(2, 2)
        ax_r.plot(1000.0 / t, np.log(current / t**2), "o", color=INK)
        _fitted_line(ax_r, diode.get("richardson"), 1000.0)
        ax_r.set_title("(a) Richardson plot", loc="left")
        ax_r.set_ylabel("ln(I_s/T²)  [I_s in A]")
        modified = diode.get("modified_richardson") or {}
        if sigma is not None and modified.get("determined"):
            vt = BOLTZMANN_EV * t
            ax_m.plot(1000.0 / t, np.log(current / t**2) - 0.5 * (sigma / vt) ** 2, "o",
                      color=INK)
            _fitted_line(ax_m, modified, 1000.0)
        else:
            _not_determined(ax_m, modified)
        ax_m.set_title("(b) modified Richardson plot", loc="left")
        ax_m.set_ylabel("ln(I_s/T²) − e²σ²/(2k²T²)")
        for ax in (ax_r, ax_m):
            ax.set_xlabel("1000/T [1/K]")
        t_b, barrier, barrier_err = _diode_rows(diode, "apparent_barrier_eV")
        if t_b.size:
            ax_b.errorbar(1.0 / (2 * BOLTZMANN_EV * t_b), barrier, yerr=barrier_err, fmt="o",
                          color=INK, capsize=2, elinewidth=0.8)
            _fitted_line(ax_b, diode.get("barrier_vs_inverse_2kt"))
        else:
            _not_determined(ax_b, diode.get("barrier_vs_inverse_2kt"))
        ax_b.set_title("(c) apparent barrier against 1/(2kT)", loc="left")
        ax_b.set_ylabel("φ_ap [eV]")
        t_n, n, n_err = _diode_rows(diode, "ideality_factor")
        ax_n.errorbar(1.0 / (2 * BOLTZMANN_EV * t_n), 1.0 / n - 1.0, yerr=n_err / n**2, fmt="o",
                      color=INK, capsize=2, elinewidth=0.8)
        _fitted_line(ax_n, diode.get("ideality_vs_inverse_2kt"))
        ax_n.set_title("(d) ideality factor against 1/(2kT)", loc="left")
        ax_n.set_ylabel("1/n − 1")
        for ax in (ax_b, ax_n):
            ax.set_xlabel("1/(2kT) [1/eV]")
    caption = ("Saturation currents I_s and ideality factors from the semilog lines; blue "
               "lines: least-squares fits (at least 3 temperatures). (a) Richardson plot: slope "
               "−eφ_B/k, intercept ln(A A**). (b) Modified Richardson plot (Werner & Güttler "
               "1991) with the barrier spread σ of panel (c): slope −eφ̄_B/k, intercept "
               "ln(A A**). (c) φ_ap = φ̄_B − eσ²/(2kT): slope −σ², intercept the mean barrier "
               "φ̄_B. (d) 1/n − 1 = −ρ₂ + eρ₃/(2kT): slope ρ₃, intercept −ρ₂. Straight (a) "
               "with a sensible A** means a homogeneous barrier; a curved (a) with straight "
               "(b)-(d) means a Gaussian spread of barriers. A spread σ below about 0.03 V is "
               "within the bias of the semilog lines (measured on simulated homogeneous "
               "diodes) and is not resolved.")
    return ReportFigure("data_diode_richardson", "Rectifying contact: Richardson and "
                        "Werner–Güttler plots", caption, fig, "data")


def diode_series_resistance_figure(diode: Mapping[str, Any], series: IVSeries,
                                   device: Device) -> ReportFigure | None:
    """Cheung & Cheung's dV/d(ln I) and H(I), and Norde's F(V), at every temperature.

    The points are recomputed from the series with the screening's own functions; the lines
    and minima are those of the JSON. Returns None when the analysis did not run.
    """
    from mechid.screening.biases import prepare_series
    from mechid.screening.diode import (
        THERMAL_VOLTAGES_ABOVE,
        area_richardson_A_K2,
        cheung_derivative_points,
        cheung_h_function,
        forward_branches,
        norde_function_V,
        rising_points,
    )

    if not diode.get("ran") or diode.get("forward_polarity") is None:
        return None
    records = {float(e["temperature_K"]): e for e in diode.get("temperatures") or []}
    branches = forward_branches(prepare_series(series, 0), diode["forward_polarity"])
    product = area_richardson_A_K2(device)
    colours = temperature_colours([b.temperature_K for b in branches])
    with _style():
        fig = Figure(figsize=(DOUBLE_COLUMN_IN, 3.45))
        _margins(fig, 0.62, 0.12, 0.95, 0.28, wspace=0.42)
        ax_d, ax_h, ax_f = fig.subplots(1, 3)
        for branch in branches:
            entry = records.get(branch.temperature_K) or {}
            colour = colours[branch.temperature_K]
            derivative = entry.get("cheung_derivative") or {}
            if derivative.get("determined"):
                v, i = rising_points(branch, (entry.get("semilog") or {}).get("x_min"))
                centre, slope = cheung_derivative_points(v, i)
                ax_d.plot(centre * 1e3, slope, "o", color=colour, ms=2.2,
                          label=_temperature_label(branch.temperature_K))
                _scaled_line(ax_d, derivative, colour)
                ideality = derivative["quantities"].get("ideality_factor")
                h_line = entry.get("cheung_h") or {}
                if h_line.get("determined") and not isinstance(product, str):
                    ax_h.plot(i * 1e3, cheung_h_function(v, i, branch.temperature_K, ideality,
                                                         product), "o", color=colour, ms=2.2)
                    _scaled_line(ax_h, h_line, colour)
            norde = entry.get("norde") or {}
            if norde.get("determined") and not isinstance(product, str):
                v, i = rising_points(branch, THERMAL_VOLTAGES_ABOVE * BOLTZMANN_EV
                                     * branch.temperature_K)
                ax_f.plot(v, norde_function_V(v, i, branch.temperature_K, norde["gamma"],
                                              product), "-", color=colour, lw=0.9)
                ax_f.plot(norde["voltage_V"], norde["function_V"], "v", color=colour, ms=4.5)
        for ax in (ax_h, ax_f):
            if not ax.lines:
                _not_determined(ax, {"detail": "not determined: "
                                     + (product if isinstance(product, str)
                                        else "no line at any temperature")})
        _label(ax_d, "(a) Cheung: dV/d(ln I)", "I [mA]", "dV/d(ln I) [V]")
        _label(ax_h, "(b) Cheung: H(I)", "I [mA]", "H(I) [V]")
        _label(ax_f, "(c) Norde: F(V)", "V [V]", "F(V) [V]")
        if ax_d.lines:
            handles, labels = ax_d.get_legend_handles_labels()
            fig.legend(handles, labels, loc="lower center",
                       ncol=len(labels) if len(labels) <= 10 else math.ceil(len(labels) / 2),
                       handlelength=1.0, columnspacing=0.8, title="temperature")
    caption = ("Series resistance from the forward branch, one colour per temperature. (a) "
               "Cheung & Cheung (1986): dV/d(ln I) = I R_s + n kT/e, lines give R_s (slope) and "
               "n (intercept). (b) H(I) = V − (n kT/e) ln(I/(A A** T²)) = I R_s + n φ_B with n "
               "from (a): slope R_s, intercept n φ_B. (c) Norde (1979) function F(V) = V/γ − "
               "(kT/e) ln(I/(A A** T²)), γ the smallest integer above n (Bohlin 1986); triangles "
               "mark the minima, which give φ_B = F0 + ((γ − n)/n)(V0/γ − kT/e) and "
               "R_s = (γ − n) kT/(e I0).")
    return ReportFigure("data_diode_series_resistance", "Rectifying contact: Cheung and Norde "
                        "plots", caption, fig, "data")


def _scaled_line(ax: Any, line: Mapping[str, Any], colour: Any) -> None:
    """A line fitted against I in A, drawn against I in mA."""
    x = np.array([line["x_min"], line["x_max"]], dtype=float)
    ax.plot(x * 1e3, line["intercept"] + line["slope"] * x, "-", color=colour, lw=0.9)


def diode_figures(data: Mapping[str, Any], series: IVSeries, device: Device
                  ) -> list[ReportFigure]:
    """Every figure of the rectifying-contact analysis that applies (empty when it did not run)."""
    diode = (data.get("linearisation") or {}).get("diode") or {}
    made = (diode_temperature_figure(diode), diode_richardson_figure(diode),
            diode_series_resistance_figure(diode, series, device))
    return [f for f in made if f is not None]
