"""The terminal summary printed by ``mechid analyze``.

:func:`render_console` prints, in this order: the straightened-plot screening (one row per
mechanism: key quantities read from the lines, checks passed/failed, screening rank), then,
when mechanisms were fitted, the evidence ranking (ln Z ± error, probability, ln B against the
leader, adequacy, key parameters as median [68 %]), the mechanisms not fitted because their
formula holds nowhere on the data, the verdict sentence and the cautions.
It reads the plain-JSON form of the result, so every number printed equals the JSON.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from rich.console import Console
from rich.markup import escape
from rich.table import Table

from mechid.report.text import (
    estimate_spec,
    fmt,
    fmt_ln,
    fmt_probability,
    is_number,
    key_parameters,
    noise_law_sentence,
    parameter_symbol,
    polarity_comparison_lines,
    screening_entry,
    undetermined,
    unit_suffix,
)
from mechid.results import INTERVALS_CAVEAT, QUICK_RUN_BANNER, AnalysisResult, to_plain_json

#: Quantities shown per mechanism in the screening table.
MAX_SCREENING_QUANTITIES = 3


def _quantities(entry: Mapping[str, Any]) -> str:
    """The first few finite quantities read from the straightened plots, ``name=value``."""
    parts = []
    for key, value in (entry.get("summary") or {}).items():
        if is_number(value):
            parts.append(f"{key.split('.', 1)[-1]}={fmt(value, '.3g')}")
        if len(parts) == MAX_SCREENING_QUANTITIES:
            break
    return ", ".join(parts) or "-"


def screening_table(data: Mapping[str, Any]) -> Table | None:
    """Rich table of the linearisation screening, in screening-rank order."""
    lin = data.get("linearisation") or {}
    ranking = lin.get("ranking") or []
    if not ranking:
        return None
    table = Table(title="Straightened-plot screening", title_justify="left", expand=False)
    table.add_column("rank", justify="right")
    table.add_column("mechanism")
    table.add_column("read from the lines")
    table.add_column("checks", justify="center")
    table.add_column("score", justify="right")
    for rank, mechanism_id in enumerate(ranking, start=1):
        entry = screening_entry(data, mechanism_id) or {}
        checks = entry.get("checks") or []
        passed = sum(c.get("passed") is True for c in checks)
        failed = sum(c.get("passed") is False for c in checks)
        table.add_row(str(rank), escape(mechanism_id), escape(_quantities(entry)),
                      f"[green]{passed} ok[/green] / [red]{failed} failed[/red]",
                      fmt(entry.get("score"), ".3g"))
    return table


def _parameters_cell(mechanism: Mapping[str, Any]) -> str:
    parts = []
    for name, s in key_parameters(mechanism):
        lo, hi = s.get("ci68") or (None, None)
        spec = estimate_spec(s)
        parts.append(f"{parameter_symbol(str(mechanism.get('id')), name)}="
                     f"{fmt(s.get('median'), spec)}{unit_suffix(s.get('unit'))} "
                     f"[{fmt(lo, spec)}, {fmt(hi, spec)}]"
                     + (" (not determined)" if s.get("determined") is False else ""))
    return "\n".join(parts) or "-"


def ranking_table(data: Mapping[str, Any]) -> Table | None:
    """Rich table of the evidence ranking (None for a screening-only result)."""
    mechanisms = data.get("mechanisms") or []
    if not mechanisms:
        return None
    table = Table(title="Evidence ranking (joint fit)", title_justify="left")
    table.add_column("mechanism")
    table.add_column("ln Z ± err", justify="right")
    table.add_column("probability", justify="right")
    table.add_column("ln B vs best", justify="right")
    table.add_column("adequate", justify="center")
    table.add_column("key parameters: median [68 %]")
    for m in mechanisms:
        adequate = "[green]yes[/green]" if m.get("fit_adequate") else "[red]no[/red]"
        table.add_row(
            escape(str(m.get("id"))),
            f"{fmt_ln(m.get('log_evidence'))} ± {fmt_ln(m.get('log_evidence_err'))}",
            fmt_probability(m.get("probability")),
            fmt_ln(m.get("ln_bayes_factor_vs_best")),
            adequate, escape(_parameters_cell(m)),
        )
    return table


def not_fitted_lines(data: Mapping[str, Any]) -> list[str]:
    """One plain line per mechanism not fitted (formula outside its validity on these data)."""
    lines = []
    for entry in data.get("not_fitted") or []:
        needs = "; ".join(
            f"{v.get('quantity')} = {fmt(v.get('extreme_value'), '.3g')} at "
            f"{fmt(v.get('at_voltage_V'), 'g')} V, {fmt(v.get('at_temperature_K'), 'g')} K "
            f"(holds only for {v.get('requirement')})"
            for v in entry.get("violations") or [])
        lines.append(f"{entry.get('id')}: " + (needs or str(entry.get("reason"))))
    return lines


def print_undetermined(data: Mapping[str, Any], console: Console) -> None:
    """List the parameters the data do not determine, mechanism by mechanism, with why."""
    lines = [f"  - {m.get('id')}: {symbol}: {'; '.join(reasons)}"
             for m in data.get("mechanisms") or [] for symbol, reasons in undetermined(m)]
    if lines:
        console.print("[bold]Not determined by the data[/bold] (the value is set by the prior, "
                      "a range edge or another parameter, not by the data)")
        for line in lines:
            console.print(escape(line))


def render_console(result: AnalysisResult | Mapping[str, Any], console: Console) -> None:
    """Print the analysis summary to a rich console.

    Parameters
    ----------
    result : AnalysisResult or mapping
        The result, or its plain-JSON form; works for screening-only results (no fitted
        mechanisms, no verdict).
    console : rich.console.Console
        Where to print.
    """
    data = (to_plain_json(result) if isinstance(result, AnalysisResult)
            else dict(result))
    screening = screening_table(data)
    if screening is not None:
        console.print(screening)
    ranking = ranking_table(data)
    if ranking is not None:
        console.print(ranking)
        console.print(f"[dim]{INTERVALS_CAVEAT.capitalize()}.[/dim]")
        print_undetermined(data, console)
    not_fitted = not_fitted_lines(data)
    if not_fitted:
        validity_only = all((e.get("violations") or []) for e in data.get("not_fitted") or [])
        heading = ("Not fitted: formula outside its validity on these data" if validity_only
                   else "Not fitted (each with its reason)")
        console.print(f"[bold]{heading}[/bold]"
                      + (" (the probabilities above are among the mechanisms fitted)"
                         if data.get("mechanisms") else ""))
        for line in not_fitted:
            console.print(f"  - {escape(line)}")
    skipped = data.get("skipped") or []
    if skipped:
        console.print("[bold]Not fitted: ruled out by the screening[/bold]")
        for entry in skipped:
            console.print(f"  - {escape(str(entry.get('id')))}: {escape(str(entry.get('reason')))}")
    below = data.get("below_leader") or []
    if below:
        console.print("[bold]Not sampled: best fit far below the leader's evidence[/bold] "
                      "(--fit-all fits them)")
        for entry in below:
            console.print(f"  - {escape(str(entry.get('reason')))}")
    compared = polarity_comparison_lines(data)
    if compared:
        console.print("[bold]Each polarity alone against both together[/bold] (ln B > 0: "
                      "parameters differ between the polarities)")
        for line in compared:
            console.print(f"  - {escape(line)}")
    verdict = data.get("verdict")
    if verdict is not None:
        if verdict.get("quick_run"):
            console.print(f"[bold yellow]{QUICK_RUN_BANNER.upper()}[/bold yellow]")
        style = "bold" if verdict.get("fit_adequate") and verdict.get("resolved") else "bold yellow"
        console.print(f"[{style}]Verdict:[/{style}] {escape(str(verdict.get('sentence')))}")
    elif not data.get("mechanisms") and not not_fitted:
        best = (data.get("linearisation") or {}).get("best")
        console.print("Screening only (no Bayesian fit): "
                      + (f"the straightened plots favour {escape(str(best))}." if best
                         else "no mechanism could be assessed."))
    noise = noise_law_sentence(data)
    if noise:
        console.print(f"[bold]Noise law:[/bold] {escape(noise)}")
    sensitivity = data.get("prior_sensitivity") or {}
    if sensitivity.get("computed"):
        console.print(f"[bold]Prior sensitivity:[/bold] {escape(str(sensitivity.get('sentence')))}")
    cautions = data.get("cautions") or []
    if cautions:
        console.print("[bold]Cautions[/bold]")
        for caution in cautions:
            console.print(f"  - {escape(str(caution))}")
