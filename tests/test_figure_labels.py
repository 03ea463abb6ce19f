"""Figure 1 (evidence against the leader) states probabilities as bounded, relative to the
fitted candidates (issue 11: it printed "P > 0.999999" with no candidate set)."""

from __future__ import annotations

from matplotlib.backends.backend_agg import FigureCanvasAgg

from mechid.formatting import format_probability
from mechid.report.figures import ranking_figure


def _figure_texts(probabilities: list[float]) -> list[str]:
    mechanisms = [{"id": f"m{k}", "probability": p, "fit_adequate": True,
                   "ln_bayes_factor_vs_best": -20.0 * k, "ln_bayes_factor_vs_best_err": 0.1}
                  for k, p in enumerate(probabilities)]
    figure = ranking_figure(mechanisms)
    assert figure is not None
    canvas_box = figure.figure.bbox
    renderer = FigureCanvasAgg(figure.figure).get_renderer()
    texts = [text for ax in figure.figure.axes for text in ax.texts]
    for text in texts:  # the longer leader label must not run off the figure
        box = text.get_window_extent(renderer)
        assert canvas_box.x0 <= box.x0 and box.x1 <= canvas_box.x1, text.get_text()
    return [text.get_text() for text in texts]


def test_leader_probability_is_bounded_and_among_the_candidates() -> None:
    # exp(-20) / (1 + exp(-20)) = 2.06e-9: far below the 1e-3 resolution of the wording.
    texts = _figure_texts([1.0 - 2.06e-9, 2.06e-9])
    assert "leader, P > 0.999 among the candidates" in texts
    assert "P < 0.001" in texts
    assert not any("0.999999" in t for t in texts)


def test_middle_probabilities_use_the_shared_three_digit_format() -> None:
    texts = _figure_texts([0.6, 0.4])
    assert f"leader, P = {format_probability(0.6)} among the candidates" in texts
    assert "P = 0.4" in texts


def test_iv_curves_do_not_join_the_two_polarities_across_zero_bias():
    # A line from -3 V to +3 V would draw a current through the unmeasured gap (|I| -> 0 at 0 V).
    import numpy as np

    from mechid.data import IVSeries
    from mechid.report.figures import iv_curves_figure

    v = np.array([-3.0, -2.0, -1.0, 1.0, 2.0, 3.0])
    series = IVSeries(np.full(6, 300.0), v, 1e-9 * v)
    figure = iv_curves_figure(series).figure
    line = next(line for line in figure.axes[0].get_lines() if line.get_linestyle() == "-")
    x = np.asarray(line.get_xdata(), dtype=float)
    gaps = np.flatnonzero(np.isnan(x))
    assert len(gaps) == 1 and x[gaps[0] - 1] < 0 < x[gaps[0] + 1]
