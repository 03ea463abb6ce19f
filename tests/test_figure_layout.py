"""Figure layout (issue 11): no clipped titles, no overlapping labels, no ambiguous tick labels,
no data point cut off or hidden, in every figure the report writes.

Two runs feed the figures: the demo series with a short joint fit of two mechanisms (the
verdict, ranking, regime, joint-fit and posterior figures, and the straightened plots of every
screened mechanism) and the GaN Schottky-diode reference curve screened only (the diode
figures). Each figure is drawn on an Agg canvas and measured with matplotlib's renderer
(the checker below).
"""

from __future__ import annotations

import warnings
from collections.abc import Iterator
from pathlib import Path
from types import SimpleNamespace
from typing import Any, NamedTuple

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.collections import PathCollection
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.transforms import Bbox

from mechid.analysis import AnalysisRun, AnalysisSettings, run_analysis_full
from mechid.catalogue import get_mechanism
from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidWarning
from mechid.inference.predictive import PosteriorAxis
from mechid.report.figures import (
    ReportFigure,
    _physical_log_ticks,
    _place_note,
    _style,
    build_figures,
    corner_figure,
)

# --------------------------------------------------------------------------------------------
# The checker: plain functions over a drawn figure, so a failure names the figure, the artists
# and their pixel boxes.
# --------------------------------------------------------------------------------------------

#: Pixels two boxes may share (anti-aliasing, glyph side bearings) before they overlap.
OVERLAP_TOLERANCE_PX = 1.0

#: Relative slack on the view limits for a data point (float rounding of the limits).
LIMIT_TOLERANCE = 1e-9


class TextBox(NamedTuple):
    """A drawn text-like artist: its role, its text, its box in display pixels, its axes."""

    role: str
    text: str
    box: Bbox
    axes_index: int | None


def draw(figure: Figure) -> Any:
    """Draw the figure on an Agg canvas and return the renderer."""
    canvas = FigureCanvasAgg(figure)
    canvas.draw()
    return canvas.get_renderer()


def _visible_text(artist: Any) -> bool:
    return bool(artist.get_visible() and artist.get_text().strip())


def _tick_labels(axes: Any, index: int, renderer: Any) -> Iterator[TextBox]:
    for name, axis in (("x", axes.xaxis), ("y", axes.yaxis)):
        # The ticks the last draw drew: matplotlib's own selection (inside the view interval,
        # labels formatted); get_major_ticks() can hold stale ticks from earlier locators.
        for tick in axis._update_ticks():  # noqa: SLF001
            for label in (tick.label1, tick.label2):
                if _visible_text(label):
                    yield TextBox(f"{name} tick label", label.get_text(),
                                  label.get_window_extent(renderer), index)


def text_boxes(figure: Figure, renderer: Any) -> list[TextBox]:
    """Every visible title, axis label, tick label, offset text, text, legend and suptitle."""
    boxes: list[TextBox] = []
    for index, axes in enumerate(figure.axes):
        if not axes.get_visible():
            continue
        titles = (("title", axes.title), ("title", axes._left_title),  # noqa: SLF001
                  ("title", axes._right_title))  # noqa: SLF001
        labels = (("x label", axes.xaxis.label), ("y label", axes.yaxis.label),
                  ("x offset", axes.xaxis.get_offset_text()),
                  ("y offset", axes.yaxis.get_offset_text()))
        for role, artist in (*titles, *labels):
            if _visible_text(artist):
                boxes.append(TextBox(role, artist.get_text(), artist.get_window_extent(renderer),
                                     index))
        boxes.extend(_tick_labels(axes, index, renderer))
        for artist in axes.texts:
            if _visible_text(artist):
                boxes.append(TextBox("text", artist.get_text(),
                                     artist.get_window_extent(renderer), index))
        legend = axes.get_legend()
        if legend is not None and legend.get_visible():
            boxes.append(TextBox("legend", "", legend.get_window_extent(renderer), index))
    for legend in figure.legends:
        boxes.append(TextBox("legend", "", legend.get_window_extent(renderer), None))
    for artist in figure.texts:
        if _visible_text(artist):
            boxes.append(TextBox("figure text", artist.get_text(),
                                 artist.get_window_extent(renderer), None))
    suptitle = getattr(figure, "_suptitle", None)
    if suptitle is not None and _visible_text(suptitle):
        boxes.append(TextBox("suptitle", suptitle.get_text(), suptitle.get_window_extent(renderer),
                             None))
    return boxes


def _describe(box: TextBox) -> str:
    where = "figure" if box.axes_index is None else f"axes {box.axes_index}"
    b = box.box
    return (f"{box.role} {box.text!r} ({where}) at x {b.x0:.0f}-{b.x1:.0f}, "
            f"y {b.y0:.0f}-{b.y1:.0f} px")


def outside_canvas(figure: Figure, boxes: list[TextBox]) -> list[str]:
    """Text boxes that reach beyond the figure canvas (clipped in a saved image)."""
    width, height = figure.canvas.get_width_height()
    tol = OVERLAP_TOLERANCE_PX
    return [f"{_describe(b)} leaves the {width}x{height} px canvas" for b in boxes
            if b.box.x0 < -tol or b.box.y0 < -tol or b.box.x1 > width + tol
            or b.box.y1 > height + tol]


def _overlap(a: Bbox, b: Bbox) -> bool:
    tol = OVERLAP_TOLERANCE_PX
    return (min(a.x1, b.x1) - max(a.x0, b.x0) > tol) and (min(a.y1, b.y1) - max(a.y0, b.y0) > tol)


def overlapping(boxes: list[TextBox]) -> list[str]:
    """Pairs of text boxes that overlap (by more than the tolerance in both directions)."""
    found = []
    for k, first in enumerate(boxes):
        for second in boxes[k + 1:]:
            if _overlap(first.box, second.box):
                found.append(f"{_describe(first)} overlaps {_describe(second)}")
    return found


def _in_limits(values: np.ndarray, limits: tuple[float, float]) -> np.ndarray:
    low, high = sorted(limits)
    slack = LIMIT_TOLERANCE * max(abs(low), abs(high), 1e-300)
    return (values >= low - slack) & (values <= high + slack)


def _data_points(axes: Any) -> Iterator[tuple[str, np.ndarray]]:
    """Marker positions (data coordinates) of the axes' data-space lines and scatters."""
    for line in axes.lines:
        if not isinstance(line, Line2D) or line.get_marker() in (None, "None", "", " "):
            continue
        if line.get_transform() != axes.transData or not line.get_visible():
            continue
        yield f"markers {line.get_label()!r}", np.asarray(line.get_xydata(), dtype=float)
    for collection in axes.collections:
        if (isinstance(collection, PathCollection) and collection.get_visible()
                and collection.get_offset_transform() == axes.transData):
            yield "scatter", np.asarray(collection.get_offsets(), dtype=float)


def points_outside_limits(figure: Figure) -> list[str]:
    """Finite data points drawn outside their axes' view limits (cut off in the image)."""
    found = []
    for index, axes in enumerate(figure.axes):
        for what, xy in _data_points(axes):
            if xy.size == 0:
                continue
            finite = np.isfinite(xy).all(axis=1)
            if axes.get_xscale() == "log":
                finite &= xy[:, 0] > 0
            if axes.get_yscale() == "log":
                finite &= xy[:, 1] > 0
            xy = xy[finite]
            inside = _in_limits(xy[:, 0], axes.get_xlim()) & _in_limits(xy[:, 1], axes.get_ylim())
            for x, y in xy[~inside]:
                found.append(f"axes {index} {axes.get_title(loc='left') or axes.get_title()!r}: "
                             f"{what} point ({x:.4g}, {y:.4g}) outside x {axes.get_xlim()} "
                             f"y {axes.get_ylim()}")
    return found


def points_under_text(figure: Figure, boxes: list[TextBox]) -> list[str]:
    """Data points hidden under a text box or legend drawn inside the same axes."""
    found = []
    for index, axes in enumerate(figure.axes):
        covers = [b for b in boxes if b.axes_index == index and b.role in ("text", "legend")
                  and axes.bbox.contains(*b.box.get_points().mean(axis=0))]
        if not covers:
            continue
        for what, xy in _data_points(axes):
            xy = xy[np.isfinite(xy).all(axis=1)]
            if not xy.size:
                continue
            pixels = axes.transData.transform(xy)
            for cover in covers:
                box = cover.box
                under = ((pixels[:, 0] > box.x0) & (pixels[:, 0] < box.x1)
                         & (pixels[:, 1] > box.y0) & (pixels[:, 1] < box.y1))
                for x, y in xy[under]:
                    found.append(f"axes {index}: {what} point ({x:.4g}, {y:.4g}) hidden under "
                                 f"{_describe(cover)}")
    return found


def texts_over_other_axes(figure: Figure, boxes: list[TextBox]) -> list[str]:
    """Titles and offset texts reaching into another axes' frame (a corner-plot title or
    ``1e-5+5e-2`` over the neighbouring panel)."""
    drawn = [index for index, axes in enumerate(figure.axes) if axes.get_visible()
             and (axes.get_frame_on() or axes.lines or axes.collections or axes.patches)]
    found = []
    for box in boxes:
        if box.role not in ("title", "x offset", "y offset"):
            continue
        for index in drawn:
            if index != box.axes_index and _overlap(box.box, figure.axes[index].bbox):
                found.append(f"{_describe(box)} reaches into axes {index}")
    return found


def repeated_tick_labels(boxes: list[TextBox]) -> list[str]:
    """Axes whose tick labels repeat a text (two different ticks both labelled ``1``)."""
    found = []
    groups: dict[tuple[int | None, str], list[str]] = {}
    for box in boxes:
        if box.role.endswith("tick label"):
            groups.setdefault((box.axes_index, box.role), []).append(box.text)
    for (index, role), texts in groups.items():
        repeated = sorted({t for t in texts if texts.count(t) > 1})
        if repeated:
            found.append(f"axes {index}: {role}s repeat {repeated} (all: {texts})")
    return found


def layout_problems(figure: Figure, tight: bool = False) -> list[str]:
    """Every clipped or overlapping text, ambiguous tick label and cut-off or hidden point.

    ``tight``: the figure is saved with a tight bounding box (corner plots), which grows the
    image around every artist, so text beyond the canvas is not clipped.
    """
    renderer = draw(figure)
    boxes = text_boxes(figure, renderer)
    return ((outside_canvas(figure, boxes) if not tight else []) + overlapping(boxes)
            + texts_over_other_axes(figure, boxes) + repeated_tick_labels(boxes)
            + points_outside_limits(figure) + points_under_text(figure, boxes))


# --------------------------------------------------------------------------------------------
# The report's figures
# --------------------------------------------------------------------------------------------

ROOT = Path(__file__).resolve().parent.parent
#: A deliberately short ladder (as in tests/test_report.py): the layout, not the evidence.
SHORT_LADDER = {"n_temperatures": 4, "n_burn": 40, "n_production": 40, "max_production": 40,
                "n_walkers": 16, "extension_steps": 10}


def _run(folder: Path, **settings: object) -> AnalysisRun:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        return run_analysis_full(read_series(folder / "data.csv"),
                                 read_device_toml(folder / "device.toml"),
                                 AnalysisSettings(**settings), seed=0)


@pytest.fixture(scope="module")
def report_figures() -> dict[str, ReportFigure]:
    demo = _run(ROOT / "mechid" / "demo_data", quick=True,
                mechanisms=("poole_frenkel", "schottky_emission"), ladder_overrides=SHORT_LADDER)
    diode = _run(ROOT / "reference_curves" / "larkfield_gan_schottky_diode", screen_only=True)
    figures = {f"demo/{f.key}": f for f in build_figures(demo)}
    # The diode run adds its own data figures; its straightened plots are drawn by the same
    # code as the demo's (kept out to hold the test near 30 s).
    figures.update({f"diode/{f.key}": f for f in build_figures(diode)
                    if f.key.startswith("data_")})
    return figures


def test_the_runs_give_the_figures_the_issue_names(report_figures: dict[str, ReportFigure]
                                                   ) -> None:
    keys = set(report_figures)
    for key in ("demo/poole_frenkel_straightened", "demo/poole_frenkel_posterior",
                "demo/poole_frenkel_joint_fit", "demo/comparison_bayes_factors",
                "demo/data_zabrodskii", "demo/sclc_shallow_traps_straightened",
                "diode/data_diode_richardson", "diode/data_diode_series_resistance"):
        assert key in keys


def test_every_report_figure_has_a_clean_layout(report_figures: dict[str, ReportFigure]) -> None:
    problems = {}
    for key, figure in report_figures.items():
        with _style():
            found = layout_problems(figure.figure, figure.tight)
        if found:
            problems[key] = found
    assert problems == {}


# --- the checker itself and the two layout helpers, on figures built here ------------------


def _panel(title: str, x: list[float] | None = None, y: list[float] | None = None,
           style: str = "o") -> Figure:
    """A small figure with room for its labels; points on the diagonal unless given."""
    fig = Figure(figsize=(3.0, 2.0))
    fig.subplots_adjust(left=0.2, right=0.95, bottom=0.2, top=0.85)
    ax = fig.subplots()
    ax.plot([0.0, 1.0, 2.0] if x is None else x, [0.0, 1.0, 2.0] if y is None else y, style)
    ax.set_title(title)
    return fig


def test_checker_finds_a_clipped_title_and_a_hidden_point() -> None:
    assert layout_problems(_panel("short")) == []
    (clipped,) = layout_problems(_panel("a title far too long to fit a three-inch wide figure"))
    assert "leaves the" in clipped
    fig = _panel("short")
    fig.axes[0].text(0.02, 0.02, "a note\nover a point", transform=fig.axes[0].transAxes,
                     ha="left", va="bottom")  # over the point (0, 0) in the lower-left corner
    assert any("hidden under text" in p for p in layout_problems(fig))


def test_checker_finds_a_point_outside_the_view_limits() -> None:
    fig = _panel("short")
    fig.axes[0].set_xlim(0.0, 1.5)
    (cut,) = layout_problems(fig)
    assert "outside x" in cut and "(2, 2)" in cut


def test_note_goes_to_a_free_corner_or_makes_room() -> None:
    # Points along the rising diagonal leave the lower-right corner free.
    fig = _panel("short")
    _place_note(fig.axes[0], "R² = 1.0000")
    assert layout_problems(fig) == []
    # Points in all four corners: the y range is lowered until the note hides none.
    fig = _panel("short", [0, 0, 1, 1, 0.5], [0, 1, 0, 1, 0.5])
    ax = fig.axes[0]
    bottom_before = ax.get_ylim()[0]
    _place_note(ax, "R² from 0.9 to 1.0\n(4 lines)")
    assert ax.get_ylim()[0] < bottom_before
    assert layout_problems(fig) == []


def test_log10_axis_labels_get_digits_until_they_differ() -> None:
    fig = _panel("short", list(np.log10([1.6003, 1.6026])), [0.0, 1.0], "-")
    ax = fig.axes[0]
    _physical_log_ticks(ax.xaxis)
    problems = layout_problems(fig)
    labels = [t.get_text() for t in ax.xaxis.get_ticklabels() if t.get_text()]
    assert len(labels) == len(set(labels)) >= 2
    assert not [p for p in problems if "repeat" in p]


@pytest.mark.parametrize("relative_spread", [1e-4, 0.3])
def test_corner_plot_of_the_largest_mechanism_has_a_clean_layout(relative_spread: float
                                                                  ) -> None:
    # Seven parameters in a 7-inch figure, with posteriors so narrow that every label needs
    # five or more digits (1e-4) or ordinary ones (0.3): titles, tick labels and axis labels
    # must still keep clear of each other and of the neighbouring panels.
    mechanism = get_mechanism("inhomogeneous_schottky_diode")
    rng = np.random.default_rng(1)
    axes = []
    for parameter in mechanism.parameters:
        log10 = bool(parameter.sample_in_log or parameter.log_scale)
        centre = parameter.typical
        draws = (np.log10(centre) + relative_spread * rng.normal(size=3000) / np.log(10)
                 if log10 else centre + abs(centre) * relative_spread * rng.normal(size=3000))
        axes.append(PosteriorAxis(parameter.name, log10, draws))
    view = SimpleNamespace(mechanism_id=mechanism.id, parameters=tuple(axes))
    figure = corner_figure(view)
    assert figure is not None and len(figure.figure.axes) == len(axes) ** 2 == 49
    with _style():
        assert layout_problems(figure.figure, figure.tight) == []
