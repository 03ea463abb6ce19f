"""One self-contained HTML evidence report.

The page carries everything inline: the stylesheet, and every figure as a
``data:image/png;base64,...`` URI. It loads no script, font or image from anywhere, so it
opens offline in any browser, can be mailed to a referee, and prints to PDF cleanly through
its ``@media print`` rules.

Reading order (a reader who has never seen mechid should know within a minute which
mechanism wins, by how much, with what parameters, and why the others lose):

1. **Verdict** -- leading mechanism, probability, Bayes factor with its Kass & Raftery
   wording, adequacy, the key parameters with 68 % and 95 % intervals;
2. **Ranking** -- every mechanism's evidence, probability, Bayes factor, adequacy, parameters
   and the case against it;
3. **Measurements** -- the I-V curves, excluded points, device and noise;
4. **Mechanism by mechanism** -- straightened plots and their checks, joint fit with the
   predictive band, residuals, evidence, posterior corner plot;
5. **Cautions**, then **text for a manuscript** (methods, priors, results) and **references**.

Numbers that also appear in the JSON carry ``data-json`` (the JSON path) and ``data-fmt``
(the format spec) attributes, so a test can check the displayed text against the JSON.
"""

from __future__ import annotations

import base64
import datetime as _dt
import html
from collections.abc import Mapping, Sequence
from typing import TYPE_CHECKING, Any

from mechid.catalogue import get_mechanism
from mechid.report.figures import DOUBLE_COLUMN_IN, ReportFigure, mechanism_order
from mechid.report.text import (
    PROBABILITY_SPEC,
    case_against,
    case_against_short,
    estimate_spec,
    fmt,
    fmt_ln,
    is_number,
    key_parameters,
    mechanism_name,
    methods_paragraph,
    noise_law_sentence,
    parameter_symbol,
    polarity_comparison_lines,
    priors_paragraph,
    references,
    results_paragraph,
    screening_entry,
    screening_quantity_note,
    unit_suffix,
)
from mechid.results import INTERVALS_CAVEAT, QUICK_RUN_BANNER

if TYPE_CHECKING:
    from mechid.report import ReportRun

Json = Mapping[str, Any]

#: The report's stylesheet (no external fonts: the system's sans-serif and monospace).
STYLESHEET = """
:root { --ink:#1d2433; --muted:#5f6b7a; --line:#d8dde5; --panel:#f4f6f9; --accent:#2456a6;
        --pass:#1a7f4b; --pass-bg:#e3f4ea; --fail:#b42318; --fail-bg:#fdecea; --na:#6b7280;
        --na-bg:#eef0f3; --warn-bg:#fff6e0; --warn:#8a5a00; }
* { box-sizing: border-box; }
html { font-size: 15px; }
body { margin: 0; color: var(--ink); background: #fff; line-height: 1.5;
       font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial,
       "Noto Sans", "DejaVu Sans", sans-serif; }
main { max-width: 64rem; margin: 0 auto; padding: 0 1.4rem 3rem; }
header.top { background: var(--ink); color: #fff; padding: 1.1rem 1.4rem 0.9rem; }
header.top .inner { max-width: 64rem; margin: 0 auto; }
header.top h1 { margin: 0; font-size: 1.45rem; font-weight: 650; letter-spacing: 0.01em; }
header.top p { margin: 0.25rem 0 0; color: #c9d1dc; font-size: 0.9rem; }
nav.toc { max-width: 64rem; margin: 0 auto; padding: 0.55rem 1.4rem; font-size: 0.85rem;
          border-bottom: 1px solid var(--line); }
nav.toc a { color: var(--accent); text-decoration: none; margin-right: 1rem; white-space: nowrap; }
h2 { font-size: 1.2rem; margin: 2.2rem 0 0.6rem; padding-bottom: 0.25rem;
     border-bottom: 2px solid var(--ink); }
h2 .num { color: var(--muted); font-weight: 500; margin-right: 0.4rem; }
h3 { font-size: 1.02rem; margin: 1.4rem 0 0.4rem; }
h4 { font-size: 0.92rem; margin: 1.1rem 0 0.3rem; color: var(--muted); text-transform: uppercase;
     letter-spacing: 0.04em; }
p { margin: 0.45rem 0; }
code, .formula { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "DejaVu Sans Mono",
                 monospace; font-size: 0.84rem; }
.formula { display: block; background: var(--panel); border-left: 3px solid var(--line);
           padding: 0.45rem 0.7rem; white-space: pre-wrap; overflow-wrap: anywhere; }
.verdict { border: 2px solid var(--accent); border-radius: 8px; padding: 1rem 1.2rem;
           margin-top: 1.4rem; background: #f7f9fd; }
.verdict.weak { border-color: var(--warn); background: var(--warn-bg); }
.verdict .banner { margin: 0 0 0.6rem; padding: 0.35rem 0.7rem; border-radius: 4px;
                   background: var(--warn-bg); color: var(--warn); border: 1px solid var(--warn);
                   font-weight: 650; text-transform: uppercase; letter-spacing: 0.03em; }
.verdict .lead { font-size: 1.35rem; font-weight: 650; margin: 0 0 0.6rem; }
.tiles { display: flex; flex-wrap: wrap; gap: 0.7rem; margin: 0.6rem 0 0.8rem; }
.tile { flex: 1 1 12rem; background: #fff; border: 1px solid var(--line); border-radius: 6px;
        padding: 0.5rem 0.75rem; }
.tile .label { font-size: 0.75rem; color: var(--muted); text-transform: uppercase;
               letter-spacing: 0.05em; }
.tile .value { font-size: 1.25rem; font-weight: 650; }
.tile .sub { font-size: 0.82rem; color: var(--muted); }
.tile ul.failing { margin: 0.2rem 0 0; padding-left: 1.1rem; color: var(--ink); }
.sentence { font-size: 0.95rem; }
table { border-collapse: collapse; width: 100%; margin: 0.5rem 0 0.8rem; font-size: 0.85rem; }
th, td { text-align: left; padding: 0.3rem 0.5rem; border-bottom: 1px solid var(--line);
         vertical-align: top; }
th { background: var(--panel); font-weight: 600; }
td.n, th.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.leader td { background: #eef3fb; font-weight: 600; }
.badge { display: inline-block; padding: 0.05rem 0.45rem; border-radius: 999px;
         font-size: 0.75rem; font-weight: 650; letter-spacing: 0.02em; white-space: nowrap; }
.pass { color: var(--pass); background: var(--pass-bg); }
.fail { color: var(--fail); background: var(--fail-bg); }
.na { color: var(--na); background: var(--na-bg); }
figure { margin: 0.8rem 0 1.2rem; }
figure img { display: block; max-width: 100%; height: auto; margin: 0 auto; }
figcaption { font-size: 0.82rem; color: var(--muted); margin-top: 0.35rem; }
figcaption b { color: var(--ink); }
article.mech { border-top: 1px solid var(--line); margin-top: 1.6rem; padding-top: 0.4rem; }
article.mech header h3 { margin-bottom: 0.1rem; }
.meta { font-size: 0.85rem; color: var(--muted); }
.against { border-left: 4px solid var(--fail); background: var(--fail-bg); padding: 0.4rem 0.7rem;
           margin: 0.5rem 0; font-size: 0.9rem; }
.for { border-left: 4px solid var(--pass); background: var(--pass-bg); padding: 0.4rem 0.7rem;
       margin: 0.5rem 0; font-size: 0.9rem; }
.cautions li { margin: 0.3rem 0; }
.paste { background: var(--panel); border: 1px solid var(--line); border-radius: 6px;
         padding: 0.7rem 0.9rem; margin: 0.5rem 0 1rem; font-size: 0.9rem; }
ol.refs { font-size: 0.85rem; padding-left: 1.4rem; }
footer { max-width: 64rem; margin: 2rem auto 0; padding: 0.8rem 1.4rem 2rem; color: var(--muted);
         font-size: 0.8rem; border-top: 1px solid var(--line); }
.two { display: grid; grid-template-columns: 1fr 1fr; gap: 1.2rem; }
@media (max-width: 52rem) { .two { grid-template-columns: 1fr; } }
@media print {
  @page { size: A4; margin: 14mm 13mm; }
  html { font-size: 10pt; }
  header.top { background: none; color: var(--ink); border-bottom: 2px solid var(--ink);
               padding: 0 0 0.4rem; }
  header.top p { color: var(--muted); }
  nav.toc { display: none; }
  main { max-width: none; padding: 0; }
  h2, h3, h4 { break-after: avoid; }
  figure, table, .two, .verdict, .tile, .against, .for, .paste { break-inside: avoid; }
  article.mech + article.mech { break-before: page; }
  figure img { max-width: 100%; max-height: 230mm; }
  a { color: inherit; text-decoration: none; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
"""


# --------------------------------------------------------------------------------------------
# Small HTML helpers
# --------------------------------------------------------------------------------------------


def esc(value: Any) -> str:
    """HTML-escaped text of any value."""
    return html.escape(str(value), quote=True)


def num(value: Any, spec: str, path: str | None = None, missing: str = "n/a") -> str:
    """A formatted number, tagged with its JSON path and format for checking."""
    text = fmt(value, spec, missing)
    if path is None:
        return esc(text)
    return f'<span data-json="{esc(path)}" data-fmt="{esc(spec)}">{esc(text)}</span>'


def badge(passed: bool | None, yes: str = "passed", no: str = "failed",
          unknown: str = "not evaluated") -> str:
    """A coloured pass / fail / not-evaluated badge."""
    if passed is True:
        return f'<span class="badge pass">✓ {esc(yes)}</span>'
    if passed is False:
        return f'<span class="badge fail">✗ {esc(no)}</span>'
    return f'<span class="badge na">– {esc(unknown)}</span>'


def table(headers: Sequence[str], rows: Sequence[Sequence[str]],
          numeric: Sequence[int] = (), row_classes: Sequence[str] | None = None) -> str:
    """An HTML table from pre-escaped cell strings; ``numeric`` columns are right-aligned."""
    head = "".join(f'<th class="n">{h}</th>' if i in numeric else f"<th>{h}</th>"
                   for i, h in enumerate(headers))
    body = []
    for k, row in enumerate(rows):
        cls = f' class="{row_classes[k]}"' if row_classes and row_classes[k] else ""
        cells = "".join(f'<td class="n">{c}</td>' if i in numeric else f"<td>{c}</td>"
                        for i, c in enumerate(row))
        body.append(f"<tr{cls}>{cells}</tr>")
    return f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


def figure_html(figure: ReportFigure, number: int, png: bytes) -> str:
    """A numbered figure with its PNG embedded as a base64 data URI."""
    encoded = base64.b64encode(png).decode("ascii")
    share = min(100.0, 100.0 * figure.figure.get_figwidth() / DOUBLE_COLUMN_IN)
    return (f'<figure id="fig-{esc(figure.key)}"><img src="data:image/png;base64,{encoded}" '
            f'alt="{esc(figure.title)}" style="width:{share:.0f}%">'
            f"<figcaption><b>Figure {number}. {esc(figure.title)}.</b> "
            f"{esc(figure.caption)}</figcaption></figure>")


def interval(summary: Json, key: str, path: str) -> str:
    """``lo – hi`` of a credible interval, each end tagged with its JSON path."""
    lo, hi = summary.get(key) or (None, None)
    spec = estimate_spec(summary)
    return f"{num(lo, spec, f'{path}.{key}.0')} – {num(hi, spec, f'{path}.{key}.1')}"


# --------------------------------------------------------------------------------------------
# Sections
# --------------------------------------------------------------------------------------------


class _Figures:
    """Figures by key with running numbers, rendered to PNG once."""

    def __init__(self, figures: Sequence[ReportFigure], pngs: Mapping[str, bytes]) -> None:
        self._by_key = {f.key: f for f in figures}
        self._pngs = pngs
        self._numbers: dict[str, int] = {}

    def get(self, key: str) -> str:
        figure = self._by_key.get(key)
        if figure is None:
            return ""
        number = self._numbers.setdefault(key, len(self._numbers) + 1)
        return figure_html(figure, number, self._pngs[key])


def _header(data: Json) -> str:
    device = data.get("device") or {}
    inp = data.get("input") or {}
    sample = device.get("name") or "unnamed sample"
    sources = ", ".join(inp.get("sources") or []) or "data in memory"
    today = _dt.datetime.now(_dt.UTC).date().isoformat()
    return (f'<header class="top"><div class="inner"><h1>Conduction-mechanism evidence report'
            f"</h1><p>{esc(sample)} · data: {esc(sources)} · mechid "
            f"{esc(data.get('mechid_version'))} · seed {esc(data.get('seed'))} · {today}</p>"
            "</div></header>")


def _toc(order: Sequence[str], data: Json) -> str:
    links = [("verdict", "Verdict"), ("ranking", "Ranking"), ("data", "Measurements"),
             ("mechanisms", "Mechanisms"), ("cautions", "Cautions"),
             ("text", "Text for a manuscript"), ("references", "References")]
    mech_links = " ".join(f'<a href="#m-{esc(m)}">{esc(mechanism_name(m, data))}</a>'
                          for m in order)
    return ('<nav class="toc">' + "".join(f'<a href="#{a}">{esc(t)}</a>' for a, t in links)
            + f"<br>{mech_links}</nav>")


def _probability_tile(data: Json, verdict: Json) -> tuple[str, str, str]:
    n = verdict.get("n_candidates")
    value = num(verdict.get("probability"), PROBABILITY_SPEC, "verdict.probability")
    if n == 1:
        return ("Posterior probability", value,
                "the only mechanism fitted: 1 by construction, no comparison")
    return ("Posterior probability", value,
            f"among the {esc(n)} mechanisms fitted; {esc(verdict.get('prior_odds'))}")


def _runner_up_tile(verdict: Json) -> tuple[str, str, str]:
    """ln B against the runner-up: with B and its strength word only for an adequate leader."""
    ln_b = num(verdict.get("ln_bayes_factor_vs_runner_up"), ".2f",
               "verdict.ln_bayes_factor_vs_runner_up")
    value = (f"ln B = {ln_b} ± " + num(verdict.get("ln_bayes_factor_vs_runner_up_err"), ".2f",
                                       "verdict.ln_bayes_factor_vs_runner_up_err"))
    not_resolved = "" if verdict.get("resolved") else "; not resolved"
    if not verdict.get("fit_adequate"):
        return (f"Against runner-up ({esc(verdict['runner_up'])})", value,
                "orders candidates that all fail their checks; not a finding" + not_resolved)
    b_value = verdict.get("bayes_factor_vs_runner_up")
    b_text = (f"B = {num(b_value, '.3g', 'verdict.bayes_factor_vs_runner_up')}"
              if is_number(b_value) else "B beyond floating-point range")
    return (f"Against runner-up ({esc(verdict['runner_up'])})", value,
            f"{b_text}; <b>{esc(verdict.get('strength'))}</b> (Kass &amp; Raftery 1995)"
            + not_resolved)


def _adequacy_tile(verdict: Json, best: Json) -> tuple[str, str, str]:
    """The adequacy badge; the failing statistics when the leader fails, not a reduced chi-square
    that the noise term may have absorbed."""
    badge_html = badge(verdict.get("fit_adequate"), "adequate", "not adequate")
    failing = verdict.get("failing_statistics") or []
    if not verdict.get("fit_adequate") and failing:
        return ("Fit adequacy", badge_html,
                "<ul class='failing'>" + "".join(f"<li>{esc(f)}</li>" for f in failing)
                + "</ul>")
    adequacy = best.get("adequacy") or {}
    return ("Fit adequacy", badge_html,
            "reduced χ² = " + num(adequacy.get("reduced_chi_square"), ".3g",
                                  "mechanisms.0.adequacy.reduced_chi_square"))


def _verdict_section(data: Json) -> str:
    verdict = data.get("verdict")
    mechanisms = data.get("mechanisms") or []
    if verdict is None or not mechanisms:
        return _screening_verdict(data)
    best = mechanisms[0]
    weak = not verdict.get("fit_adequate") or not verdict.get("resolved")
    tiles = [_probability_tile(data, verdict)]
    if verdict.get("runner_up"):
        tiles.append(_runner_up_tile(verdict))
    tiles.append(_adequacy_tile(verdict, best))
    tile_html = "".join(f'<div class="tile"><div class="label">{label}</div>'
                        f'<div class="value">{value}</div><div class="sub">{sub}</div></div>'
                        for label, value, sub in tiles)
    rows = []
    for name, s in key_parameters(best):
        path = f"mechanisms.0.parameters.{name}"
        rows.append([
            f"{esc(parameter_symbol(best['id'], name))} <span class='meta'>({esc(name)})</span>",
            num(s.get("median"), estimate_spec(s), f"{path}.median"),
            interval(s, "ci68", path), interval(s, "ci95", path),
            esc(unit_suffix(s.get("unit")).strip() or "–"),
            _determined_cell(s),
        ])
    params = (table(["parameter", "median", "68 % interval", "95 % interval", "unit",
                     "determined by the data?"], rows, numeric=(1, 2, 3))
              + intervals_caveat()) if rows else ""
    lead = (f"{esc(verdict.get('headline', '')).capitalize()}: " if not verdict.get("fit_adequate")
            else "Leading mechanism: ")
    return ('<h2 id="verdict"><span class="num">1</span>Verdict</h2>'
            f'<section class="verdict{" weak" if weak else ""}">'
            + (f'<p class="banner">{esc(QUICK_RUN_BANNER.capitalize())}</p>'
               if verdict.get("quick_run") else "")
            + f'<p class="lead">{lead}{esc(best.get("name"))} '
            f'<span class="meta">({esc(best.get("id"))}, {esc(best.get("family"))})</span></p>'
            f'<div class="tiles">{tile_html}</div>'
            f'<p class="sentence" data-json="verdict.sentence">{esc(verdict.get("sentence"))}</p>'
            f"{params}</section>")


def intervals_caveat() -> str:
    """The note that goes beside every parameter table."""
    return f"<p class='meta caveat'>{esc(INTERVALS_CAVEAT.capitalize())}.</p>"


def _determined_cell(summary: Json) -> str:
    """A yes badge, or a no badge with the reasons the data do not determine the value."""
    if summary.get("determined") is not False:
        return badge(True, "yes")
    return (badge(False, no="no") + "<br><span class='meta'>"
            + esc("; ".join(summary.get("reasons") or [])) + "</span>")


def _screening_verdict(data: Json) -> str:
    lin = data.get("linearisation") or {}
    best = lin.get("best")
    text = ("Screening only: no Bayesian fit was run, so there is no posterior probability or "
            "Bayes factor. ")
    if data.get("not_fitted"):
        text = ("No mechanism was fitted: the formula of every mechanism asked for is outside "
                "its validity on these data (see the ranking), so there is no posterior "
                "probability or Bayes factor. ")
    if best:
        text += (f"The straightened plots favour {mechanism_name(best, data)} ({best}); treat "
                 "this as a first look and run the full analysis before quoting it.")
    else:
        text += "No mechanism could be assessed from the straightened plots."
    return ('<h2 id="verdict"><span class="num">1</span>Verdict</h2>'
            f'<section class="verdict weak"><p class="lead">Provisional: '
            f"{esc(mechanism_name(best, data)) if best else 'no candidate'}</p>"
            f'<p class="sentence">{esc(text)}</p></section>')


def _key_parameter_cell(mechanism: Json, index: int) -> str:
    parts = []
    for name, s in key_parameters(mechanism):
        lo, hi = s.get("ci68") or (None, None)
        spec = estimate_spec(s)
        path = f"mechanisms.{index}.parameters.{name}"
        parts.append(f"{esc(parameter_symbol(mechanism['id'], name))} = "
                     f"{num(s.get('median'), spec, f'{path}.median')}"
                     f"{esc(unit_suffix(s.get('unit')))} <span class='meta'>"
                     f"[{num(lo, spec, f'{path}.ci68.0')}, {num(hi, spec, f'{path}.ci68.1')}]"
                     "</span>"
                     + (" <span class='badge fail'>not determined</span>"
                        if s.get("determined") is False else ""))
    return "<br>".join(parts) or "–"


def _ranking_section(data: Json, figures: _Figures) -> str:
    mechanisms = data.get("mechanisms") or []
    out = ['<h2 id="ranking"><span class="num">2</span>Ranking of the candidates</h2>']
    if mechanisms:
        rows, classes = [], []
        for k, m in enumerate(mechanisms):
            path = f"mechanisms.{k}"
            against = case_against(data, m)
            rows.append([
                f'<a href="#m-{esc(m["id"])}">{esc(m.get("name"))}</a><br>'
                f"<span class='meta'>{esc(m['id'])}</span>",
                f"{num(m.get('log_evidence'), '.2f', f'{path}.log_evidence')} ± "
                f"{num(m.get('log_evidence_err'), '.2f', f'{path}.log_evidence_err')}",
                num(m.get("probability"), PROBABILITY_SPEC, f"{path}.probability"),
                num(m.get("ln_bayes_factor_vs_best"), ".2f", f"{path}.ln_bayes_factor_vs_best"),
                badge(m.get("fit_adequate"), "yes", "no"),
                _key_parameter_cell(m, k),
                "leader" if k == 0 and not against else esc(case_against_short(data, m)),
            ])
            classes.append("leader" if k == 0 else "")
        out.append("<p>Mechanisms sorted by posterior probability. ln Z: log-evidence "
                   "(stepping-stone) ± Monte Carlo error; ln B: log Bayes factor against the "
                   "leader; parameters: posterior median [68 % interval]; "
                   f"{esc(INTERVALS_CAVEAT)}.</p>")
        out.append(table(["mechanism", "ln Z", "probability", "ln B vs leader", "adequate",
                          "parameters", "case against"], rows, numeric=(1, 2, 3),
                         row_classes=classes))
        out.append(figures.get("comparison_bayes_factors"))
        out.append(figures.get("comparison_regime_map"))
        out.append(prior_sensitivity_html(data))
    out.append(_not_fitted_html(data))
    out.append(_left_out_html(
        data.get("skipped") or [], "<b>Not fitted: ruled out by the screening:</b> each needs "
        "something these data do not show, so its fit could not change the comparison."))
    out.append(_left_out_html(
        data.get("below_leader") or [], "<b>Not sampled: best fit far below the leader's "
        "evidence</b> (the evidence cannot exceed the best likelihood; <code>--fit-all</code> "
        "fits them):"))
    compared = polarity_comparison_lines(data)
    if compared:
        out.append("<p><b>Each polarity alone against both together:</b> the evidence of the "
                   "two polarities fitted as independent series against one parameter set for "
                   "both (ln B &gt; 0: the parameters differ between the polarities).</p>"
                   "<ul class='cautions'>" + "".join(f"<li>{esc(line)}</li>" for line in compared)
                   + "</ul>")
    out.append(_screening_table(data))
    return "".join(out)


def prior_sensitivity_html(data: Json) -> str:
    """ln B of the leader against each mechanism with every catalogue range x0.5, x1, x2."""
    record = data.get("prior_sensitivity") or {}
    if not record.get("computed"):
        return ""
    rows = []
    for k, c in enumerate(record.get("comparisons") or []):
        path = f"prior_sensitivity.comparisons.{k}"
        cells = [esc(c.get("other"))]
        cells += [num(v, ".2f", f"{path}.ln_bayes_factor.{j}")
                  for j, v in enumerate(c.get("ln_bayes_factor") or [])]
        cells.append(num(c.get("largest_shift"), ".2f", f"{path}.largest_shift"))
        methods = sorted({m for m in c.get("methods") or [] if m != "analysis"})
        cells.append(esc("; ".join(methods)))
        rows.append(cells)
    scales = [f"ln B at x{fmt(s, 'g')}" for s in record.get("scales") or []]
    return (f'<p data-json="prior_sensitivity.sentence">Prior sensitivity: '
            f"{esc(record.get('sentence'))}.</p>"
            + table(["leader against", *scales, "largest shift", "how"], rows,
                    numeric=tuple(range(1, len(scales) + 2))))


def _not_fitted_html(data: Json) -> str:
    """The mechanisms left out because their formula holds nowhere on these data (or "")."""
    entries = data.get("not_fitted") or []
    if not entries:
        return ""
    items = []
    for k, entry in enumerate(entries):
        needs = "; ".join(
            f"{esc(v.get('quantity'))} = "
            f"{num(v.get('extreme_value'), '.3g', f'not_fitted.{k}.violations.{j}.extreme_value')}"
            f" at {esc(fmt(v.get('at_voltage_V'), 'g'))} V, "
            f"{esc(fmt(v.get('at_temperature_K'), 'g'))} K, where it holds only for "
            f"{esc(v.get('requirement'))} ({esc(v.get('reason'))})"
            for j, v in enumerate(entry.get("violations") or []))
        items.append(f"<li><b>{esc(entry.get('name'))}</b> ({esc(entry.get('id'))}): "
                     f"{needs or esc(entry.get('reason'))}</li>")
    if not all(entry.get("violations") for entry in entries):
        return ("<p><b>Not fitted (each with its reason):</b> these take no part in the "
                "comparison; the probabilities above are among the "
                f"{len(data.get('mechanisms') or [])} mechanisms fitted.</p>"
                f"<ul class='cautions'>{''.join(items)}</ul>")
    return ("<p><b>Not fitted: formula outside its validity on these data:</b> no parameter "
            "set of its prior keeps the formula within the conditions its source states, so it "
            "takes no part in the comparison; the probabilities above are among the "
            f"{len(data.get('mechanisms') or [])} mechanisms fitted.</p>"
            f"<ul class='cautions'>{''.join(items)}</ul>")


def _screening_table(data: Json) -> str:
    lin = data.get("linearisation") or {}
    rows = []
    for rank, mechanism_id in enumerate(lin.get("ranking") or [], start=1):
        entry = screening_entry(data, mechanism_id) or {}
        checks = entry.get("checks") or []
        passed = sum(c.get("passed") is True for c in checks)
        failed = sum(c.get("passed") is False for c in checks)
        rows.append([str(rank), f'<a href="#m-{esc(mechanism_id)}">'
                     f"{esc(mechanism_name(mechanism_id, data))}</a>",
                     num(entry.get("straightness"), ".2f"), num(entry.get("score"), ".3g"),
                     f"{badge(True, str(passed)) if passed else ''} "
                     f"{badge(False, '', str(failed)) if failed else ''}".strip() or "–"])
    if not rows:
        return ""
    return ("<h3>Straightened-plot screening</h3><p>The classical look: how straight each "
            "mechanism's straightened plots are (straightness = median −log10(1 − R²)) and how "
            "many consistency checks the quantities read from them pass. A quick screen, not "
            "the comparison.</p>"
            + table(["rank", "mechanism", "straightness", "score", "checks"], rows,
                    numeric=(0, 2, 3)))


def _window_text(window: Json) -> str:
    """``"1.5 <= |V| <= 6 V; 77 <= T <= 300 K (12 points outside)"`` or ``"all points"``."""
    parts = []
    if window.get("bias_abs_V"):
        parts.append(f"{fmt(window['bias_abs_V'][0], 'g')} <= |V| <= "
                     f"{fmt(window['bias_abs_V'][1], 'g')} V")
    if window.get("temperature_K"):
        parts.append(f"{fmt(window['temperature_K'][0], 'g')} <= T <= "
                     f"{fmt(window['temperature_K'][1], 'g')} K")
    if not parts:
        return "all points"
    return "; ".join(parts) + f" ({window.get('n_points_outside')} points outside)"


def _data_section(data: Json, run: ReportRun, figures: _Figures) -> str:
    inp = data.get("input") or {}
    out = ['<h2 id="data"><span class="num">3</span>The measurements</h2>',
           figures.get("data_iv_curves")]
    t_range = inp.get("temperature_range_K") or [None, None]
    v_range = inp.get("voltage_range_V") or [None, None]
    facts = [
        ["points kept", num(inp.get("n_points"), "d", "input.n_points")],
        ["points in the joint fit", num(inp.get("n_points_fitted"), "d", "input.n_points_fitted")],
        ["temperatures", f"{num(inp.get('n_temperatures'), 'd', 'input.n_temperatures')} "
                         f"({num(t_range[0], 'g')} – {num(t_range[1], 'g')} K)"],
        ["bias range", f"{num(v_range[0], 'g')} – {num(v_range[1], 'g')} V"],
        ["decades of current", num(inp.get("current_decades"), ".2f", "input.current_decades")],
        ["both polarities", "yes" if inp.get("both_polarities") else "no"],
        ["polarity fitted", esc(inp.get("polarity", "both"))],
        ["window analysed", esc(_window_text(inp.get("window") or {}))],
        ["points excluded", num(inp.get("n_excluded"), "d", "input.n_excluded")],
    ]
    device_rows = _device_rows(data.get("device") or {})
    out.append('<div class="two"><div><h4>Data</h4>' + table(["", ""], facts) + "</div>"
               '<div><h4>Device description</h4>'
               + (table(["quantity", "value"], device_rows) if device_rows
                  else "<p>No device description was given.</p>") + "</div></div>")
    out.append(_noise_text(data))
    out.append(_excluded_html(run))
    zab = figures.get("data_zabrodskii")
    if zab:
        out.append("<h3>Temperature dependence</h3>" + zab)
    out.append(_activation_table(data))
    out.append(_diode_section(data, figures))
    return "".join(out)


def _device_rows(device: Json) -> list[list[str]]:
    labels = {"thickness_nm": ("film thickness", "nm"), "area_cm2": ("electrode area", "cm²"),
              "effective_mass_ratio": ("effective mass m*/m0", ""),
              "optical_dielectric_constant": ("optical dielectric constant", ""),
              "name": ("sample", "")}
    rows = []
    for key, (label, unit) in labels.items():
        value = device.get(key)
        if value is None:
            continue
        if isinstance(value, Mapping):
            sd = value.get("sd")
            text = (f"{num(value.get('value'), 'g', f'device.{key}.value')}"
                    + (f" ± {num(sd, 'g', f'device.{key}.sd')}" if is_number(sd) and sd > 0
                       else " (exact: held fixed)") + (f" {unit}" if unit else ""))
        elif is_number(value):
            text = num(value, "g", f"device.{key}") + (f" {unit}" if unit else "")
        else:
            text = esc(value)
        rows.append([esc(label), text])
    return rows


def _noise_text(data: Json) -> str:
    mechanisms = data.get("mechanisms") or []
    if not mechanisms:
        return ""
    best = mechanisms[0]
    adequacy = best.get("adequacy") or {}
    params = best.get("parameters") or {}
    rel = params.get("noise_relative") or {}
    floor = params.get("noise_floor_A") or {}
    model_free = adequacy.get("model_free_relative_noise")
    text = ("<h4>Noise</h4><p>Scatter estimated without any model (second differences of "
            "ln|I| along each sweep): "
            + (f"{num(model_free, '.3g', 'mechanisms.0.adequacy.model_free_relative_noise')} "
               "relative" if is_number(model_free) else "not available")
            + f". The leading fit's noise model: relative "
            f"{num(rel.get('median'), '.3g', 'mechanisms.0.parameters.noise_relative.median')} "
            f"and a floor of "
            f"{num(floor.get('median'), '.3g', 'mechanisms.0.parameters.noise_floor_A.median')} A "
            f"(posterior medians; ratio fitted / model-free = "
            f"{num(adequacy.get('noise_ratio'), '.3g')}).</p>")
    law = noise_law_sentence(data)
    if law:
        text += f"<p>Noise law of every fit: {esc(law)}</p>"
    return text


def _excluded_html(run: ReportRun) -> str:
    excluded = list(run.series.excluded or ())
    if not excluded:
        return "<h4>Excluded points</h4><p>None: every point read was used.</p>"
    limit = 30
    rows = [[esc(p.source), str(p.row), fmt(p.temperature_K, "g"), fmt(p.voltage_V, "g"),
             fmt(p.current_A, ".4g"), esc(p.reason)] for p in excluded[:limit]]
    more = (f"<p class='meta'>… and {len(excluded) - limit} more.</p>"
            if len(excluded) > limit else "")
    return ("<h4>Excluded points</h4>"
            + table(["file", "line", "T [K]", "V [V]", "I [A]", "why"], rows,
                    numeric=(1, 2, 3, 4)) + more)


def _activation_table(data: Json) -> str:
    energies = (data.get("linearisation") or {}).get("activation_energies") or []
    if not energies:
        return ""
    rows = [[num(e.get("bias_V"), ".3g"), num(e.get("activation_energy_eV"), ".3g"),
             str(e.get("n_temperatures"))] for e in energies]
    return ("<p>Apparent activation energy E_a = −k_B d ln|I| / d(1/T) at common biases (a "
            "value near zero points to tunnelling, a bias-dependent one to field-lowered "
            "emission):</p>"
            + table(["bias [V]", "E_a [eV]", "temperatures"], rows, numeric=(0, 1, 2)))


def _mechanisms_section(data: Json, order: Sequence[str], figures: _Figures) -> str:
    out = ['<h2 id="mechanisms"><span class="num">4</span>Mechanism by mechanism</h2>',
           "<p>For each candidate: its straightened plots and what they imply, the joint "
           "Bayesian fit to every temperature at once, and the evidence for and against it. "
           "Fitted mechanisms come first, in order of probability.</p>"]
    fitted = {m["id"]: (k, m) for k, m in enumerate(data.get("mechanisms") or [])}
    for mechanism_id in order:
        out.append(_mechanism_article(data, mechanism_id, fitted.get(mechanism_id), figures))
    return "".join(out)


def _mechanism_article(data: Json, mechanism_id: str, fitted: tuple[int, Json] | None,
                       figures: _Figures) -> str:
    mechanism = get_mechanism(mechanism_id)
    out = [f'<article class="mech" id="m-{esc(mechanism_id)}"><header>'
           f"<h3>{esc(mechanism.name)}</h3><p class='meta'>{esc(mechanism_id)} · "
           f"{esc(mechanism.family)}"]
    if fitted is not None:
        k, m = fitted
        out.append(f" · rank {k + 1} · posterior probability "
                   f"{num(m.get('probability'), PROBABILITY_SPEC, f'mechanisms.{k}.probability')}"
                   " among the candidates")
    elif any(entry.get("id") == mechanism_id for entry in data.get("not_fitted") or []):
        out.append(" · not fitted: formula outside its validity on these data (see the ranking)")
    else:
        out.append(" · screened only (not fitted in this run)")
    out.append(f"</p></header><code class='formula'>{esc(mechanism.formula)}</code>"
               f"<p class='meta'>Source: {esc(mechanism.source)}</p>")
    if fitted is not None:
        against = case_against(data, fitted[1])
        if against:
            out.append('<div class="against"><b>Against it:</b> ' + esc("; ".join(against))
                       + ".</div>")
        else:
            out.append('<div class="for"><b>Leads</b> the comparison with an adequate fit and no '
                       "failed consistency check.</div>")
    out.append(_screening_block(data, mechanism_id, figures))
    if fitted is not None:
        out.append(_fit_block(data, fitted[0], fitted[1], figures))
    out.append("</article>")
    return "".join(out)


def _screening_block(data: Json, mechanism_id: str, figures: _Figures) -> str:
    entry = screening_entry(data, mechanism_id)
    out = ["<h4>Straightened plots</h4>"]
    if entry is None:
        return out[0] + "<p>Not part of the screening.</p>"
    out.append(figures.get(f"{mechanism_id}_straightened"))
    summary = entry.get("summary") or {}
    if summary:
        rows = [[esc(key.split(".", 1)[-1]), esc(key.split(".", 1)[0].replace("_", " ")),
                 num(value, ".4g"), esc(screening_quantity_note(mechanism_id, key, value))]
                for key, value in summary.items()]
        out.append("<p>Quantities read from the lines (median over lines):</p>"
                   + table(["quantity", "from", "value", "note"], rows, numeric=(2,)))
    checks = entry.get("checks") or []
    if checks:
        rows = [[badge(c.get("passed")), esc(str(c.get("name")).replace("_", " ")),
                 num(c.get("value"), ".4g"), esc(c.get("expected")), esc(c.get("detail"))]
                for c in checks]
        out.append("<p>Consistency checks:</p>"
                   + table(["", "check", "value", "expected", "why"], rows, numeric=(2,)))
    notes = entry.get("notes") or []
    if notes:
        out.append("<p class='meta'>Not drawn: " + esc("; ".join(notes)) + ".</p>")
    return "".join(out)


#: A cross-check of ln Z whose own error exceeds this many nats checks nothing; it is named
#: as not informative instead of printed as a number (our choice).
CROSS_CHECK_USEFUL_ERROR = 10.0


def cross_check_text(method: str, value: Any, error: Any, reason: str) -> str:
    """``method value ± error``, or (error above :data:`CROSS_CHECK_USEFUL_ERROR`) why the
    method gave no usable number; the stepping-stone value is reported either way."""
    if not is_number(value):
        return ""
    if is_number(error) and error <= CROSS_CHECK_USEFUL_ERROR:
        return f"{method} {fmt_ln(value)} ± {fmt_ln(error)}"
    return f"{method} not informative here (error {fmt(error, '.2g')} nats: {reason})"


def _first_rung_reason(evidence: Json) -> str:
    """Why thermodynamic integration fails on a ladder from a reference distribution."""
    variances = [v for v in evidence.get("var_log_likelihood") or [] if is_number(v)]
    if not variances:
        return "its Monte Carlo error is too large"
    return (f"the variance of the log-likelihood ratio on the rung at the reference is "
            f"{fmt(variances[0], '.2g')}, which its end correction cannot carry")


def _fit_block(data: Json, k: int, m: Json, figures: _Figures) -> str:
    path = f"mechanisms.{k}"
    evidence = m.get("evidence") or {}
    adequacy = m.get("adequacy") or {}
    sampling = m.get("sampling") or {}
    out = ["<h4>Joint fit and evidence</h4>"]
    cross = [text for text in (
        cross_check_text("thermodynamic integration", evidence.get("log_evidence_ti"),
                         evidence.get("log_evidence_ti_err"), _first_rung_reason(evidence)),
        cross_check_text("bridge sampling", evidence.get("log_evidence_bridge"),
                         evidence.get("log_evidence_bridge_err"),
                         "its Monte Carlo error is too large")) if text]
    out.append(
        f"<p>ln Z = {num(m.get('log_evidence'), '.2f', f'{path}.log_evidence')} ± "
        f"{num(m.get('log_evidence_err'), '.2f', f'{path}.log_evidence_err')} (stepping-stone)"
        + (f"; cross-checks: {esc('; '.join(cross))}" if cross else "")
        + f". ln B against the leader: "
        f"{num(m.get('ln_bayes_factor_vs_best'), '.2f', f'{path}.ln_bayes_factor_vs_best')} ± "
        f"{num(m.get('ln_bayes_factor_vs_best_err'), '.2f', f'{path}.ln_bayes_factor_vs_best_err')}"
        ".</p>")
    flags = list(sampling.get("flags") or [])
    if flags:
        out.append(f"<p class='meta'>Sampler flags: {esc(', '.join(flags))}.</p>")
    out.append(_domain_pull_html(m.get("validity") or {}, path))
    out.append(figures.get(f"{m['id']}_joint_fit"))
    reasons = adequacy.get("reasons") or []
    adequacy_rows = [
        ["adequate", badge(m.get("fit_adequate"), "yes", "no")],
        ["reduced χ²", num(adequacy.get("reduced_chi_square"), ".3g",
                           f"{path}.adequacy.reduced_chi_square")],
        ["predictive p (χ²)", num(adequacy.get("predictive_p_chi_square"), ".3g",
                                  f"{path}.adequacy.predictive_p_chi_square")],
        ["residual runs (expected)", f"{num(adequacy.get('residual_runs'), 'd')} "
                                     f"({num(adequacy.get('expected_runs'), '.1f')})"],
        ["predictive p (runs)", num(adequacy.get("predictive_p_runs"), ".3g",
                                    f"{path}.adequacy.predictive_p_runs")],
        ["noise ratio fitted / model-free", num(adequacy.get("noise_ratio"), ".3g")],
    ]
    if reasons:
        adequacy_rows.append(["why not", esc("; ".join(reasons))])
    out.append('<div class="two"><div><p>Adequacy (posterior predictive checks):</p>'
               + table(["", ""], adequacy_rows) + "</div><div>"
               + _parameter_table(m, path) + "</div></div>")
    out.append(figures.get(f"{m['id']}_posterior"))
    return "".join(out)


def _domain_pull_html(validity: Json, path: str) -> str:
    """A warning when the data pull the fit outside its formula's validity domain (or "")."""
    if not validity.get("pulls"):
        return ""
    needs = "; ".join(f"{esc(v.get('quantity'))} = {esc(fmt(v.get('extreme_value'), '.3g'))} "
                      f"(holds only for {esc(v.get('requirement'))})"
                      for v in validity.get("violations") or [])
    return ("<div class='against'><b>The data pull outside the formula's validity:</b> the "
            "bare formula fits "
            f"{num(validity.get('gain'), '.0f', f'{path}.validity.gain')} nats (log posterior) "
            f"better with {needs}. The values below are the best the formula allows inside its "
            "domain, not a description of these data.</div>")


def _parameter_table(m: Json, path: str) -> str:
    priors = {p.get("name"): p for p in m.get("priors") or []}
    rows = []
    for name, s in (m.get("parameters") or {}).items():
        p_path = f"{path}.parameters.{name}"
        symbol = parameter_symbol(str(m.get("id")), name)
        unit = unit_suffix(s.get("unit")).strip()
        if s.get("fixed"):
            value = f"{num(s.get('median'), '.4g', f'{p_path}.median')} (fixed)"
            ci = "–"
        else:
            value = num(s.get("median"), estimate_spec(s), f"{p_path}.median")
            ci = interval(s, "ci68", p_path)
        prior_text = f"<span class='meta'>{esc((priors.get(name) or {}).get('description', ''))}</span>"
        if s.get("determined") is False:
            value += "<br><span class='badge fail'>not determined</span>"
            prior_text += ("<br><b>Not determined by the data:</b> "
                           + esc("; ".join(s.get("reasons") or [])))
        rows.append([f"{esc(symbol)}" + (f" [{esc(unit)}]" if unit else ""), value, ci,
                     prior_text])
    return ("<p>Parameters (posterior median, 68 % interval) and priors:</p>"
            + table(["parameter", "median", "68 %", "prior"], rows, numeric=(1, 2))
            + intervals_caveat())


def _cautions_section(data: Json) -> str:
    cautions = data.get("cautions") or []
    body = ("<ul class='cautions'>" + "".join(f"<li>{esc(c)}</li>" for c in cautions) + "</ul>"
            if cautions else "<p>None: nothing in these data flags a mechanism the comparison "
                             "cannot tell apart or a measurement condition to check.</p>")
    return ('<h2 id="cautions"><span class="num">5</span>What these data cannot tell apart, '
            'and how they were taken</h2>' + body)


def _text_section(data: Json) -> str:
    priors = priors_paragraph(data)
    return ('<h2 id="text"><span class="num">6</span>Text for a manuscript</h2>'
            "<p class='meta'>Written from this run's numbers; edit freely.</p>"
            f"<h4>Methods</h4><div class='paste'>{esc(methods_paragraph(data))}</div>"
            + (f"<h4>Priors</h4><div class='paste'>{esc(priors)}</div>" if priors else "")
            + f"<h4>Results</h4><div class='paste'>{esc(results_paragraph(data))}</div>")


def _references_section(data: Json) -> str:
    methods, sources = references(data)
    return ('<h2 id="references"><span class="num">7</span>References</h2><h4>Methods</h4>'
            "<ol class='refs'>" + "".join(f"<li>{esc(r)}</li>" for r in methods) + "</ol>"
            "<h4>Mechanisms (from the catalogue's source declarations)</h4><ol class='refs'>"
            + "".join(f"<li><b>{esc(n)}</b>: {esc(s)}</li>" for n, s in sources) + "</ol>")


# --------------------------------------------------------------------------------------------
# The page
# --------------------------------------------------------------------------------------------


def render_html(data: Json, run: ReportRun, figures: Sequence[ReportFigure],
                pngs: Mapping[str, bytes]) -> str:
    """The whole report as one HTML string.

    Parameters
    ----------
    data : mapping
        ``to_plain_json(result)`` -- the JSON contract, the source of every number.
    run : ReportRun
        Used for the excluded points of the series.
    figures : sequence of ReportFigure
        From :func:`mechid.report.figures.build_figures`.
    pngs : mapping
        PNG bytes of each figure by key.
    """
    order = mechanism_order(data)
    figs = _Figures(figures, pngs)
    body = [
        _header(data), _toc(order, data), "<main>",
        _verdict_section(data),
        _ranking_section(data, figs),
        _data_section(data, run, figs),
        _mechanisms_section(data, order, figs),
        _cautions_section(data),
        _text_section(data),
        _references_section(data),
        "</main>",
        f"<footer>Generated by mechid {esc(data.get('mechid_version'))} from result schema "
        f"{esc(data.get('schema'))}. Self-contained: all figures are embedded; the file needs "
        "no network access. Figures and numbers come from the same run as the JSON result."
        "</footer>",
    ]
    title = "Evidence report"
    verdict = data.get("verdict")
    if verdict:
        title += f": {mechanism_name(verdict['id'], data)}"
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
            f"<title>{esc(title)}</title><style>{STYLESHEET}</style></head><body>"
            + "".join(body) + "</body></html>\n")


# --------------------------------------------------------------------------------------------
# Rectifying contact (mechid.screening.diode)
# --------------------------------------------------------------------------------------------

#: The per-temperature columns of the rectifying-contact table: (header, record, quantity).
DIODE_COLUMNS: tuple[tuple[str, str, str], ...] = (
    ("n", "semilog", "ideality_factor"),
    ("φ_ap [eV]", "semilog", "apparent_barrier_eV"),
    ("decades", "semilog", "current_decades"),
    ("R_s Cheung dV/d(ln I) [Ω]", "cheung_derivative", "series_resistance_ohm"),
    ("R_s Cheung H(I) [Ω]", "cheung_h", "series_resistance_ohm"),
    ("φ_B Cheung H(I) [eV]", "cheung_h", "barrier_height_eV"),
)

#: The lines across temperature: (JSON key, title, quantity keys shown).
DIODE_LINES: tuple[tuple[str, str, tuple[str, ...]], ...] = (
    ("richardson", "Richardson plot ln(I_s/T²) vs 1/T",
     ("barrier_height_eV", "richardson_constant_A_cm2_K2", "area_times_richardson_A_K2")),
    ("barrier_vs_inverse_2kt", "φ_ap vs 1/(2kT) (Werner & Güttler 1991)",
     ("mean_barrier_eV", "barrier_spread_V")),
    ("ideality_vs_inverse_2kt", "1/n − 1 vs 1/(2kT) (Werner & Güttler 1991)",
     ("rho2", "rho3_V")),
    ("modified_richardson", "modified Richardson plot (Werner & Güttler 1991)",
     ("mean_barrier_eV", "richardson_constant_A_cm2_K2", "area_times_richardson_A_K2")),
    ("thermionic_field_ideality",
     "n(T) against (E₀₀/kT) coth(E₀₀/kT), thermionic-field emission (Padovani & Stratton 1966)",
     ("characteristic_energy_eV", "characteristic_energy_from_doping_eV",
      "rms_ideality_residual")),
)


def _value_with_error(quantities: Json, key: str, path: str) -> str:
    """``value ± err`` of a quantity and its ``<key>_err`` (each tagged with its JSON path)."""
    if not is_number(quantities.get(key)):
        return "–"
    text = num(quantities.get(key), ".4g", f"{path}.{key}")
    if is_number(quantities.get(f"{key}_err")):
        text += " ± " + num(quantities.get(f"{key}_err"), ".2g", f"{path}.{key}_err")
    return text


def _diode_section(data: Json, figures: _Figures) -> str:
    """The rectifying-contact analysis: shown only when the screening ran it."""
    diode = (data.get("linearisation") or {}).get("diode") or {}
    if not diode.get("ran"):
        return ""
    base = "linearisation.diode"
    out = ["<h3>Rectifying contact: the classical diode analysis</h3>",
           f"<p>The forward branch ({esc(diode.get('forward_polarity'))} bias) analysed as a "
           "Schottky contact with the straightened plots practitioners draw by hand, before "
           f"any fit. Why it ran: {esc(str(diode.get('reason')).removeprefix('ran: '))}.</p>",
           figures.get("data_diode_temperature"), figures.get("data_diode_richardson"),
           figures.get("data_diode_series_resistance")]
    rows, notes = [], []
    for k, entry in enumerate(diode.get("temperatures") or []):
        path = f"{base}.temperatures.{k}"
        row = [num(entry.get("temperature_K"), "g")]
        for _, record, key in DIODE_COLUMNS:
            row.append(_value_with_error((entry.get(record) or {}).get("quantities") or {}, key,
                                         f"{path}.{record}.quantities"))
        norde = entry.get("norde") or {}
        row.append(num(norde.get("barrier_height_eV"), ".4g", f"{path}.norde.barrier_height_eV"))
        row.append(num(norde.get("series_resistance_ohm"), ".4g",
                       f"{path}.norde.series_resistance_ohm"))
        rows.append(row)
        for record in ("semilog", "cheung_derivative", "cheung_h", "norde"):
            part = entry.get(record) or {}
            if not part.get("determined"):
                notes.append(f"{fmt(entry.get('temperature_K'), 'g')} K, {record.replace('_', ' ')}: "
                             f"{part.get('detail')}")
    headers = (["T [K]"] + [esc(h) for h, _, _ in DIODE_COLUMNS]
               + ["φ_B Norde [eV]", "R_s Norde [Ω]"])
    out.append("<p>Per temperature (± one standard error of the line fit):</p>"
               + table(headers, rows, numeric=tuple(range(len(headers)))))
    line_rows = []
    for key, title, shown in DIODE_LINES:
        line = diode.get(key) or {}
        quantities = line.get("quantities") or {}
        values = "; ".join(f"{esc(q)} = {_value_with_error(quantities, q, f'{base}.{key}.quantities')}"
                           for q in shown if q in quantities)
        line_rows.append([esc(title), badge(line.get("determined"), "drawn", "not determined"),
                          values or "–", esc(line.get("detail"))])
    out.append("<p>Across temperatures:</p>"
               + table(["plot", "", "quantities", "how / why not"], line_rows))
    if notes:
        out.append("<p class='meta'>Not determined: " + esc("; ".join(notes)) + ".</p>")
    return "".join(out)


def _left_out_html(entries: list[dict[str, Any]], heading: str) -> str:
    """A paragraph ``heading`` (HTML) and the entries' names, ids and reasons ("" for none)."""
    if not entries:
        return ""
    return (f"<p>{heading}</p><ul class='cautions'>" + "".join(
        f"<li><b>{esc(e.get('name'))}</b> ({esc(e.get('id'))}): {esc(e.get('reason'))}</li>"
        for e in entries) + "</ul>")
