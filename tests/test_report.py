"""The evidence report, figure files, summary CSV and console summary (mechid.report).

Every reference curve gets a report from a screening-only run (fast); one curve also gets a
short joint fit of two mechanisms, so the verdict, ranking, joint-fit and posterior figures
are exercised. Numbers shown in the report are checked against the JSON contract through the
``data-json`` / ``data-fmt`` tags the HTML carries on every number that is also in the JSON.
"""

from __future__ import annotations

import base64
import csv
import html
import io
import re
import warnings
from html.parser import HTMLParser
from pathlib import Path
from types import SimpleNamespace
from typing import Any

import pytest
from PIL import Image
from rich.console import Console

from mechid.analysis import AnalysisRun, AnalysisSettings, run_analysis_full
from mechid.catalogue import get_mechanism
from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidWarning
from mechid.formatting import format_estimate, plain_parameter_name
from mechid.report import build_report_html, write_outputs
from mechid.report.console import render_console
from mechid.report.figures import _power_of_ten, corner_labels
from mechid.report.summary import COLUMNS
from mechid.report.text import estimate_spec, fmt, parameter_text, references
from mechid.results import to_plain_json

REFERENCE_DIR = Path(__file__).resolve().parent.parent / "reference_curves"
REFERENCE_CURVES = sorted(p.name for p in REFERENCE_DIR.iterdir()
                          if (p / "data.csv").is_file() and (p / "device.toml").is_file())
FITTED_CURVE = "larkfield_sinx_poole_frenkel"
FITTED_MECHANISMS = ("poole_frenkel", "schottky_emission")
#: A deliberately short ladder: these tests check the report, not the evidence.
TEST_LADDER = {"n_temperatures": 4, "n_burn": 40, "n_production": 40, "max_production": 40,
               "n_walkers": 16, "extension_steps": 10}
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


def analyse(curve: str, **settings: Any) -> AnalysisRun:
    """Run the analysis of one reference curve (library warnings about short chains hushed)."""
    folder = REFERENCE_DIR / curve
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        series = read_series(folder / "data.csv")
        device = read_device_toml(folder / "device.toml")
        return run_analysis_full(series, device, AnalysisSettings(**settings), seed=0)


class _ReportParser(HTMLParser):
    """Collects image sources, tagged numbers and external references of a report."""

    def __init__(self) -> None:
        super().__init__()
        self.images: list[str] = []
        self.tagged: list[tuple[str, str, str]] = []  # (json path, format, text)
        self.external: list[str] = []
        self._open: list[tuple[str, str] | None] = []
        self._text: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        a = dict(attrs)
        if tag == "img":
            self.images.append(a.get("src") or "")
        for key in ("src", "href"):
            value = a.get(key) or ""
            if value.startswith(("http:", "https:", "//")):
                self.external.append(value)
        if tag == "link" or tag == "script":
            self.external.append(tag)
        if tag == "span" and a.get("data-json") and a.get("data-fmt"):
            self._open.append((a["data-json"], a["data-fmt"]))
            self._text = []
        elif tag == "span":
            self._open.append(None)

    def handle_endtag(self, tag: str) -> None:
        if tag == "span" and self._open:
            item = self._open.pop()
            if item is not None:
                self.tagged.append((item[0], item[1], "".join(self._text)))

    def handle_data(self, data: str) -> None:
        self._text.append(data)


def parse(html_text: str) -> _ReportParser:
    parser = _ReportParser()
    parser.feed(html_text)
    return parser


def json_value(data: Any, path: str) -> Any:
    """Resolve a dotted path (list indices as numbers) in the JSON contract."""
    node = data
    for part in path.split("."):
        node = node[int(part)] if isinstance(node, list) else node[part]
    return node


def check_images(parser: _ReportParser) -> None:
    assert parser.images, "the report has no figure"
    for src in parser.images:
        assert src.startswith("data:image/png;base64,")
        raw = base64.b64decode(src.split(",", 1)[1], validate=True)
        assert raw.startswith(PNG_SIGNATURE)
        with Image.open(io.BytesIO(raw)) as image:
            image.verify()
        with Image.open(io.BytesIO(raw)) as image:
            assert image.width > 300 and image.height > 150


def check_tagged_numbers(parser: _ReportParser, data: dict[str, Any]) -> int:
    """Every tagged number equals its JSON value formatted with the stated format."""
    for path, spec, text in parser.tagged:
        assert text == fmt(json_value(data, path), spec), (path, spec, text)
    return len(parser.tagged)


# --------------------------------------------------------------------------------------------
# Screening-only reports of every reference curve
# --------------------------------------------------------------------------------------------


def test_reference_curves_present() -> None:
    assert len(REFERENCE_CURVES) >= 5, REFERENCE_CURVES


@pytest.mark.parametrize("curve", REFERENCE_CURVES)
def test_screening_report_of_every_reference_curve(curve: str) -> None:
    run = analyse(curve, screen_only=True)
    data = to_plain_json(run.result)
    html_text = build_report_html(run)
    parser = parse(html_text)
    check_images(parser)
    assert not parser.external, f"external assets: {parser.external}"
    check_tagged_numbers(parser, data)
    # one straightened-plot figure per screened mechanism that declares plots, plus the data
    screened = [e["mechanism_id"] for e in data["linearisation"]["mechanisms"]]
    with_plots = [m for m in screened if get_mechanism(m).plots]
    assert len(parser.images) >= 1 + len(with_plots)
    for mechanism_id in screened:
        assert f'id="m-{mechanism_id}"' in html_text
        # the catalogue's source declaration is cited (escaped as HTML)
        assert get_mechanism(mechanism_id).source.replace("&", "&amp;") in html_text
    assert "Screening only" in html_text
    assert "@media print" in html_text


# --------------------------------------------------------------------------------------------
# A fitted run: verdict, ranking, joint fit, posterior, files, CSV, console
# --------------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def fitted_run() -> AnalysisRun:
    return analyse(FITTED_CURVE, quick=True, mechanisms=FITTED_MECHANISMS,
                   ladder_overrides=TEST_LADDER)


@pytest.fixture(scope="module")
def fitted_outputs(fitted_run: AnalysisRun, tmp_path_factory: pytest.TempPathFactory
                   ) -> dict[str, Any]:
    out = tmp_path_factory.mktemp("report")
    written = write_outputs(fitted_run, report=out / "report.html", figures_dir=out / "figures",
                            summary=out / "summary.csv")
    return {"dir": out, "written": written, "html": (out / "report.html").read_text("utf-8"),
            "data": to_plain_json(fitted_run.result)}


def test_fitted_report_embeds_decodable_figures(fitted_outputs: dict[str, Any]) -> None:
    parser = parse(fitted_outputs["html"])
    check_images(parser)
    assert not parser.external
    # data, Zabrodskii (7 temperatures), comparison, and per fitted mechanism: straightened
    # plots, joint fit, posterior
    html_text = fitted_outputs["html"]
    for key in ("data_iv_curves", "comparison_bayes_factors"):
        assert f'id="fig-{key}"' in html_text
    for mechanism_id in FITTED_MECHANISMS:
        for suffix in ("straightened", "joint_fit", "posterior"):
            assert f'id="fig-{mechanism_id}_{suffix}"' in html_text
    assert "levels=(0.68" not in html_text  # caption in words, not code
    assert "68 % and 95 % of the posterior mass" in html_text


def test_verdict_numbers_equal_the_json(fitted_outputs: dict[str, Any]) -> None:
    data, html_text = fitted_outputs["data"], fitted_outputs["html"]
    verdict = data["verdict"]
    parser = parse(html_text)
    n_tagged = check_tagged_numbers(parser, data)
    paths = {path for path, _, _ in parser.tagged}
    assert {"verdict.probability", "verdict.ln_bayes_factor_vs_runner_up",
            "verdict.ln_bayes_factor_vs_runner_up_err"} <= paths
    best = data["mechanisms"][0]
    for name, summary in best["parameters"].items():
        if name.startswith("noise_") or summary["fixed"]:
            continue
        for key in ("median", "ci68.0", "ci68.1", "ci95.0", "ci95.1"):
            assert f"mechanisms.0.parameters.{name}.{key}" in paths
    assert n_tagged > 20
    # the verdict sentence is the JSON's, verbatim (HTML-escaped)
    escaped = html.escape(verdict["sentence"], quote=True)
    assert escaped in html_text
    # the numbers of the sentence are those of the JSON, in the same format
    assert f"ln B = {verdict['ln_bayes_factor_vs_runner_up']:.2f}" in verdict["sentence"]
    assert f"probability {fmt(verdict['probability'], 'prob')} among" in verdict["sentence"]
    assert (verdict["strength"] in html_text) is verdict["fit_adequate"]


def test_parameter_format_matches_the_verdict_sentence(fitted_outputs: dict[str, Any]) -> None:
    best = fitted_outputs["data"]["mechanisms"][0]
    sentence = fitted_outputs["data"]["verdict"]["sentence"]
    for name, summary in best["parameters"].items():
        if name.startswith("noise_") or summary["fixed"]:
            continue
        text = parameter_text(plain_parameter_name(name, summary["unit"]), summary)
        assert text in sentence
        assert f"{name} =" not in sentence  # plain words in prose, not the JSON key
        spec = estimate_spec(summary)
        assert fmt(summary["median"], spec) in text


def test_figure_files_png_and_pdf(fitted_outputs: dict[str, Any]) -> None:
    folder = fitted_outputs["dir"] / "figures"
    pngs = sorted(folder.glob("*.png"))
    pdfs = sorted(folder.glob("*.pdf"))
    assert pngs and [p.stem for p in pngs] == [p.stem for p in pdfs]
    for png in pngs:
        with Image.open(png) as image:
            assert image.format == "PNG"
            assert round(image.info["dpi"][0]) == 300  # publication resolution
            assert image.width >= 1000
    for pdf in pdfs:
        assert pdf.read_bytes().startswith(b"%PDF")
    assert set(fitted_outputs["written"]) >= set(pngs) | set(pdfs)


def test_summary_csv_rows_equal_the_json(fitted_outputs: dict[str, Any]) -> None:
    data = fitted_outputs["data"]
    with open(fitted_outputs["dir"] / "summary.csv", newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    assert tuple(rows[0].keys()) == COLUMNS
    expected = sum(len(m["parameters"]) for m in data["mechanisms"])
    assert len(rows) == expected
    by_key = {(r["mechanism_id"], r["parameter"]): r for r in rows}
    for m in data["mechanisms"]:
        for name, s in m["parameters"].items():
            row = by_key[(m["id"], name)]
            assert float(row["median"]) == s["median"]
            assert float(row["ci95_hi"]) == s["ci95"][1]
            assert float(row["log_evidence"]) == m["log_evidence"]
            assert row["fixed"] == ("true" if s["fixed"] else "false")
            assert row["unit"] == s["unit"]


def test_corner_labels_carry_units_and_log10(fitted_run: AnalysisRun) -> None:
    columns, labels, _ = corner_labels(fitted_run.predictive["poole_frenkel"])
    # Poole-Frenkel: phi_T [eV] linear, sigma0 log-uniform in S/cm: physical unit, log axis
    assert "phi_T [eV]" in labels
    assert "sigma0 [S/cm] (log axis)" in labels
    assert not any(label.startswith("noise") for label in labels)
    assert len(columns) == len(labels)


def test_no_pyplot_figures_left_open(fitted_outputs: dict[str, Any]) -> None:
    import matplotlib.pyplot as plt

    assert plt.get_fignums() == []


def test_console_summary_matches_the_json(fitted_run: AnalysisRun) -> None:
    console = Console(record=True, width=200)
    render_console(fitted_run.result, console)
    text = console.export_text()
    data = to_plain_json(fitted_run.result)
    assert "Straightened-plot screening" in text and "Evidence ranking" in text
    for m in data["mechanisms"]:
        assert m["id"] in text
        assert f"{m['log_evidence']:.2f} ± {m['log_evidence_err']:.2f}" in text
    assert re.sub(r"\s+", " ", data["verdict"]["sentence"]) in re.sub(r"\s+", " ", text)


def test_console_and_csv_on_a_screening_only_result(tmp_path: Path) -> None:
    run = analyse(FITTED_CURVE, screen_only=True)
    console = Console(record=True, width=160)
    render_console(run.result, console)
    text = console.export_text()
    assert "Screening only" in text and "Evidence ranking" not in text
    for mechanism_id in run.result.linearisation["ranking"]:
        assert mechanism_id in text
    written = write_outputs(run, summary=tmp_path / "s.csv")
    assert written == [tmp_path / "s.csv"]
    lines = (tmp_path / "s.csv").read_text("utf-8").splitlines()
    assert lines == [",".join(COLUMNS)]


def test_write_outputs_wants_the_run(fitted_run: AnalysisRun, tmp_path: Path) -> None:
    with pytest.raises(TypeError, match="AnalysisRun"):
        write_outputs(fitted_run.result, report=tmp_path / "r.html")


# --------------------------------------------------------------------------------------------
# Small pieces
# --------------------------------------------------------------------------------------------


def test_power_of_ten_tick_labels() -> None:
    assert _power_of_ten(1e-6) == "10⁻⁶"
    assert _power_of_ten(100.0) == "10²"
    assert _power_of_ten(3e-3) == "0.003"
    assert _power_of_ten(0.0) == ""


def test_estimate_spec_reproduces_format_estimate() -> None:
    summary = {"median": 1.20013, "ci68": [1.20004, 1.2002], "ci95": [1.19995, 1.20053],
               "unit": "eV", "fixed": False}
    text = format_estimate(1.20013, (1.20004, 1.2002), (1.19995, 1.20053), "eV")
    assert parameter_text("x", summary) == "x = " + text
    assert text.startswith(fmt(1.20013, estimate_spec(summary)))
    wide = {"median": 3e5, "ci68": [1e5, 9e5], "ci95": [3e4, 3e6], "unit": "K", "fixed": False}
    assert estimate_spec(wide) == ".2g"


def test_references_cite_methods_and_catalogue_sources(fitted_outputs: dict[str, Any]) -> None:
    methods, sources = references(fitted_outputs["data"])
    joined = " ".join(methods)
    for key in ("Xie et al. 2011", "Friel, Hurn & Wyse 2014", "Meng & Wong 1996",
                "Kass & Raftery 1995", "Foreman-Mackey et al. 2013",
                "Zabrodskii & Zinov'eva 1984"):
        assert key in joined
    assert ("Poole-Frenkel emission", get_mechanism("poole_frenkel").source) in sources
    html_text = fitted_outputs["html"]
    assert "Methods" in html_text and "Results" in html_text and "Priors" in html_text


def test_report_reads_the_results_and_the_predictive_view_only(
        fitted_run: AnalysisRun, fitted_outputs: dict[str, Any]) -> None:
    # Before, the figures reached fit.target and fit.draws_internal: a run without the fits
    # could not be reported. Now the result records and the view give the same report.
    reported = SimpleNamespace(result=fitted_run.result, series=fitted_run.series,
                               device=fitted_run.device, predictive=fitted_run.predictive)
    assert build_report_html(reported) == fitted_outputs["html"]
    assert set(fitted_run.predictive) == set(FITTED_MECHANISMS)


def test_corner_ticks_and_titles_are_physical_values(fitted_run: AnalysisRun) -> None:
    # A log10-sampled axis shows 10**x as its tick labels, the diagonal title physical values.
    import numpy as np

    from mechid.report.figures import corner_figure

    view = fitted_run.predictive["poole_frenkel"]
    figure = corner_figure(view).figure
    n = int(round(len(figure.axes) ** 0.5))
    names = [axis.name for axis in view.parameters]
    k = names.index("prefactor_S_per_cm")
    bottom = figure.axes[(n - 1) * n + k]
    formatter = bottom.xaxis.get_major_formatter()
    assert formatter(-3.0, 0) == "0.001" and formatter(2.0, 0) == "1e+02"
    samples = 10.0 ** next(a.values for a in view.parameters if a.name == "prefactor_S_per_cm")
    title = figure.axes[k * n + k].get_title()
    assert title.startswith("sigma0 = ")
    shown = float(title.split("=")[1].split("\n")[0])
    assert shown == pytest.approx(np.median(samples), rel=0.01)  # thinned draws: ~1 % apart


def test_a_cross_check_with_a_huge_error_is_named_not_printed():
    # Issue 11: "absurd cross-check numbers printed without comment (TI 3.5e11 ...)".
    from mechid.report.html import cross_check_text

    evidence = {"var_log_likelihood": [5.66e18, 197.0, 14.3]}
    from mechid.report.html import _first_rung_reason

    text = cross_check_text("thermodynamic integration", 1.84e15, 1.87e14,
                            _first_rung_reason(evidence))
    assert "not informative" in text and "1.8e+15" not in text and "5.7e+18" in text
    assert cross_check_text("bridge sampling", 3270.88, 0.02, "x") == "bridge sampling 3270.88 ± 0.02"
    assert cross_check_text("bridge sampling", float("nan"), 0.02, "x") == ""


def test_a_screening_number_outside_the_catalogue_range_gets_a_note():
    # Issue 11: "FN intercept barrier 2.8e6 eV" was printed without comment. Ranges are the
    # catalogue's declared parameter bounds (read here from the declaration itself).
    from mechid.catalogue import get_mechanism
    from mechid.report.text import screening_quantity_note

    barrier = next(p for p in get_mechanism("fowler_nordheim").parameters
                   if p.name == "barrier_height_eV")
    note = screening_quantity_note(
        "fowler_nordheim", "fowler_nordheim_plot.barrier_height_from_intercept_assuming_unit_mass_eV",
        2.84e6)
    assert "barrier_height_eV" in note and "no physical reading" in note
    inside = 0.5 * (barrier.lower + barrier.upper)
    assert screening_quantity_note("fowler_nordheim", "fowler_nordheim_plot.barrier_height_"
                                   "assuming_unit_mass_eV", inside) == ""
    # a quantity that estimates no declared parameter gets no note
    assert screening_quantity_note("direct_tunnelling",
                                   "low_bias_conductance_plot.cubic_coefficient_per_V2", 1e9) == ""
    assert screening_quantity_note("mott_vrh", "mott_vrh_plot.prefactor_S", 1.5e29) != ""
