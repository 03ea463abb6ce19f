"""The ``mechid`` command line (typer). The only module that prints or sets up logging."""

from __future__ import annotations

import logging
import re
import sys
import warnings
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Annotated, Any

import numpy as np
import typer
from rich.console import Console
from rich.markup import escape
from rich.progress import BarColumn, Progress, TaskProgressColumn, TextColumn, TimeElapsedColumn

from mechid import __version__
from mechid.catalogue import MECHANISMS, get_mechanism, mechanism_ids
from mechid.device import Device, device_from_values, find_device_toml, read_device_toml
from mechid.errors import DeviceError, MechidError, MechidWarning

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    help="Identify the conduction mechanism of thin films and junctions from I-V-T data.",
)
# Outside a terminal (pipes, files, tests) rich would assume 80 columns and cut table cells.
out = Console(width=None if sys.stdout.isatty() else 140)
err = Console(stderr=True, width=None if sys.stderr.isatty() else 140)

USER_ERROR_EXIT = 2


def _fail(message: str) -> typer.Exit:
    err.print(f"[bold red]error:[/] {escape(message)}", highlight=False, soft_wrap=True)
    return typer.Exit(code=USER_ERROR_EXIT)


@contextmanager
def _user_errors() -> Iterator[None]:
    """Turn mechid errors into a clear message and exit code 2; show our warnings plainly."""

    def show(message, category, filename, lineno, file=None, line=None):  # noqa: ANN001
        if issubclass(category, MechidWarning):
            err.print(f"[yellow]warning:[/] {escape(str(message))}", highlight=False, soft_wrap=True)
        else:
            logging.getLogger("mechid").debug("%s: %s", category.__name__, message)

    previous = warnings.showwarning
    warnings.showwarning = show
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("always", MechidWarning)
            yield
    except MechidError as exc:
        raise _fail(str(exc)) from None
    finally:
        warnings.showwarning = previous


def _version(value: bool) -> None:
    if value:
        out.print(f"mechid {__version__}")
        raise typer.Exit()


@app.callback()
def main(
    version: Annotated[bool, typer.Option("--version", callback=_version, is_eager=True,
                                          help="Print the version and exit.")] = False,
    verbose: Annotated[bool, typer.Option("--verbose", "-v", help="Log details to stderr.")] = False,
) -> None:
    """Identify the conduction mechanism of thin films and junctions from I-V-T data."""
    logging.basicConfig(level=logging.INFO if verbose else logging.WARNING,
                        format="%(levelname)s %(name)s: %(message)s", stream=sys.stderr)


def _parse_number_list(text: str, option: str) -> list[float]:
    """Parse ``"77,150,300"`` or a range ``"start:stop:count"`` (inclusive, evenly spaced)."""
    text = text.strip()
    try:
        if ":" in text:
            start, stop, count = text.split(":")
            n = int(count)
            if n < 1:
                raise ValueError
            return list(np.linspace(float(start), float(stop), n))
        return [float(part) for part in text.split(",") if part.strip()]
    except ValueError:
        raise _fail(
            f"{option} expects comma-separated numbers (e.g. 77,150,300) or start:stop:count "
            f"(e.g. 0.05:2:40), got {text!r}"
        ) from None


def parse_window(option: str, text: str | None) -> tuple[float, float] | None:
    """``"LO:HI"`` -> ``(LO, HI)`` (None when not given); a clear error otherwise."""
    if text is None:
        return None
    low, colon, high = text.partition(":")
    try:
        if not colon:
            raise ValueError
        return float(low), float(high)
    except ValueError:
        raise _fail(f"{option} expects LO:HI with two numbers, e.g. 1.5:6, got {text!r}") from None


def parse_prior_odds(items: list[str]) -> dict[str, float]:
    """Parse ``["mott_vrh=2", ...]`` into relative prior weights (positive numbers)."""
    odds: dict[str, float] = {}
    for item in items:
        name, sep, value = item.partition("=")
        get_mechanism(name.strip())
        try:
            weight = float(value) if sep else float("nan")
        except ValueError:
            weight = float("nan")
        if not (weight > 0 and np.isfinite(weight)):
            raise _fail(f"--prior-odds expects ID=WEIGHT with a positive weight, got {item!r}")
        odds[name.strip()] = weight
    return odds


def _parse_params(items: list[str], mechanism_id: str) -> dict[str, float]:
    mechanism = get_mechanism(mechanism_id)
    params: dict[str, float] = {}
    for item in items:
        name, sep, value = item.partition("=")
        if not sep:
            raise _fail(f"--param expects NAME=VALUE, got {item!r}")
        mechanism.parameter(name.strip())
        try:
            params[name.strip()] = float(value)
        except ValueError:
            raise _fail(f"--param {name.strip()}: {value!r} is not a number") from None
    return params


def _device(
    data: Path | None,
    device_file: Path | None,
    **values: float | None,
) -> tuple[Device, Path | None]:
    base = Device()
    used = device_file or (find_device_toml(data) if data is not None else None)
    if used is not None:
        base = read_device_toml(used)
    try:
        overrides = device_from_values(**values)
    except DeviceError as exc:
        raise DeviceError(f"command-line device options: {_option_spelling(str(exc))}") from None
    return base.merged_with(overrides), used


#: Device keys as they are spelled on the command line (for error messages).
DEVICE_OPTIONS = {
    "thickness_nm": "--thickness-nm", "thickness_sd_nm": "--thickness-sd-nm",
    "area_cm2": "--area-cm2", "effective_mass_ratio": "--effective-mass",
    "effective_mass_sd": "--effective-mass-sd",
    "optical_dielectric_constant": "--optical-dielectric-constant",
    "optical_dielectric_constant_sd": "--optical-dielectric-constant-sd",
}
_DEVICE_KEY_PATTERN = re.compile(r"\b(" + "|".join(sorted(DEVICE_OPTIONS, key=len, reverse=True)) + r")\b")


def _option_spelling(message: str) -> str:
    """Replace device keys (``thickness_sd_nm``) in a message by their options (``--thickness-sd-nm``)."""
    return _DEVICE_KEY_PATTERN.sub(lambda match: DEVICE_OPTIONS[match[0]], message)


#: The help panel of the device options (short texts, so that the long option names are
#: not cut at 80 columns; the panel title says what an omitted uncertainty means).
DEVICE_PANEL = "Device (an omitted *-sd holds that value fixed)"


def _device_option(name: str, metavar: str, text: str) -> Any:
    """A device-description option in the device panel."""
    return typer.Option(name, metavar=metavar, help=text, rich_help_panel=DEVICE_PANEL)


ThicknessOpt = Annotated[float | None, _device_option("--thickness-nm", "NM", "Film thickness.")]
ThicknessSdOpt = Annotated[float | None, _device_option(
    "--thickness-sd-nm", "NM", "Standard uncertainty of d.")]
AreaOpt = Annotated[float | None, _device_option("--area-cm2", "CM2", "Electrode area.")]
MassOpt = Annotated[float | None, _device_option(
    "--effective-mass", "M", "Tunnelling mass m*/m0.")]
MassSdOpt = Annotated[float | None, _device_option(
    "--effective-mass-sd", "S", "Standard uncertainty of m*/m0.")]
EpsOpt = Annotated[float | None, _device_option(
    "--optical-dielectric-constant", "E", "Optical eps_r, about n^2.")]
EpsSdOpt = Annotated[float | None, _device_option(
    "--optical-dielectric-constant-sd", "S", "Standard uncertainty of eps_r.")]
SeedOpt = Annotated[int, typer.Option(
    "--seed", min=0, metavar="N", help="Random seed (>= 0); the same seed gives the same numbers.")]


@app.command("mechanisms")
def list_mechanisms() -> None:
    """List every catalogued mechanism: formula, parameters with units and ranges, source."""
    for m in MECHANISMS:
        out.rule(f"[bold]{m.id}[/]  ({m.family}) {m.name}")
        out.print(f"  formula: {m.formula}", highlight=False, markup=False)
        out.print(f"  source: {m.source}", highlight=False, markup=False)
        if m.temperature_dependence:
            out.print(f"  temperature dependence: {m.temperature_dependence}", highlight=False,
                      markup=False)
        out.print("  parameters:", highlight=False)
        for p in m.parameters:
            prior = "log-uniform" if p.log_scale else "uniform"
            device_note = f"; from the device's {p.device_prior} when given" if p.device_prior else ""
            out.print(f"    {p.name}  [{p.unit}]  range {p.lower:g} .. {p.upper:g} ({prior} prior"
                      f"{device_note}): {p.description}", highlight=False, soft_wrap=True, markup=False)
        if m.plots:
            out.print("  straightened plots: " + "; ".join(
                f"{pl.title} ({pl.y_label} vs {pl.x_label})" for pl in m.plots),
                highlight=False, markup=False)


@app.command("simulate")
def simulate_command(
    mechanism_id: Annotated[str, typer.Argument(
        metavar="MECHANISM_ID", help=f"One of: {', '.join(mechanism_ids())}.")],
    out_path: Annotated[Path, typer.Option("--out", help="CSV file to write (never overwritten).")],
    param: Annotated[list[str], typer.Option(
        "--param", help="NAME=VALUE for each parameter (see `mechid mechanisms`).")] = [],  # noqa: B006
    temperatures: Annotated[str, typer.Option(
        "--temperatures-K", help="Temperatures: 77,150,300 or start:stop:count.")] = "300",
    voltages: Annotated[str, typer.Option(
        "--voltages-V", help="Biases: 0.1,0.2 or start:stop:count (either sign).")] = "0.1:1:10",
    noise_relative: Annotated[float, typer.Option(
        "--noise-relative", help="Relative noise sd (0.02 = 2 %).")] = 0.0,
    noise_floor: Annotated[float, typer.Option(
        "--noise-floor-A", help="Absolute noise floor sd in A.")] = 0.0,
    noise_law: Annotated[str, typer.Option(
        "--noise-law", metavar="LAW",
        help="gaussian (default), lognormal-floor or student-t.")] = "gaussian",
    area: AreaOpt = None,
    seed: SeedOpt = 0,
) -> None:
    """Write model currents of one mechanism on a temperature x voltage grid as a tidy CSV."""
    from mechid.data import write_series_csv
    from mechid.simulate import simulate_series

    with _user_errors():
        mechanism = get_mechanism(mechanism_id)
        params = _parse_params(param, mechanism_id)
        device = device_from_values(area_cm2=area)
        if area is None and any(p.device_prior == "thickness_nm" for p in mechanism.parameters):
            raise MechidError(f"{mechanism_id} gives a current density; pass --area-cm2")
        result = simulate_series(
            mechanism, params,
            _parse_number_list(temperatures, "--temperatures-K"),
            _parse_number_list(voltages, "--voltages-V"),
            device, noise_relative=noise_relative, noise_floor_A=noise_floor,
            rng=np.random.default_rng(seed), noise_law=_simulation_noise_law(noise_law),
        )
        write_series_csv(result, out_path)
    err.print(f"wrote {result.current_A.size} points to {out_path}", highlight=False, markup=False)


def _simulation_noise_law(value: str):  # noqa: ANN202
    """The named noise law for ``simulate`` ("auto" chooses by evidence, so only for fits)."""
    from mechid.inference.noise import get_noise_law
    from mechid.inference.noise_choice import AUTO, noise_law_setting

    setting = noise_law_setting(value)
    if setting == AUTO:
        raise MechidError("simulate needs a named noise law (auto chooses one for fits only)")
    return get_noise_law(setting)


def _progress_hook(progress: Progress):  # noqa: ANN202
    tasks: dict[str, int] = {}

    def hook(label: str, done: int, total: int) -> None:
        if label not in tasks:
            tasks[label] = progress.add_task(label, total=total)
        progress.update(tasks[label], completed=done, total=total)

    return hook


@app.command("analyze")
def analyze_command(
    data: Annotated[Path, typer.Argument(
        help="A tidy CSV (temperature, voltage, current) or a folder of per-temperature files.")],
    thickness_nm: ThicknessOpt = None,
    thickness_sd_nm: ThicknessSdOpt = None,
    area_cm2: AreaOpt = None,
    effective_mass: MassOpt = None,
    effective_mass_sd: MassSdOpt = None,
    optical_dielectric_constant: EpsOpt = None,
    optical_dielectric_constant_sd: EpsSdOpt = None,
    device_file: Annotated[Path | None, typer.Option(
        "--device", help="Device TOML file (default: device.toml beside the data).")] = None,
    json_path: Annotated[Path | None, typer.Option("--json", help="Write the result as JSON.")] = None,
    samples_path: Annotated[Path | None, typer.Option(
        "--samples", help="Write posterior draws to a .npz file.")] = None,
    report_path: Annotated[Path | None, typer.Option(
        "--report", help="Write a self-contained HTML evidence report.")] = None,
    figures_dir: Annotated[Path | None, typer.Option(
        "--figures", help="Also write each report figure as PNG and PDF into this folder.")] = None,
    summary_path: Annotated[Path | None, typer.Option(
        "--summary", help="Write one CSV row per mechanism and parameter.")] = None,
    only: Annotated[list[str], typer.Option(
        "--mechanism", metavar="ID", help="Fit only these mechanism ids (repeatable; default: all).")] = [],  # noqa: B006
    screen_only: Annotated[bool, typer.Option(
        "--screen-only", help="Run only the straightened-plot tests (no Bayesian fit).")] = False,
    quick: Annotated[bool, typer.Option(
        "--quick", help="Shorter chains and fewer temperatures on the ladder (rougher evidences).")] = False,
    polarity: Annotated[str, typer.Option(
        "--polarity", help="both (joint fit), positive, negative, or each (joint fit, then "
                           "each polarity alone, compared by evidence).")] = "both",
    prior_odds: Annotated[list[str], typer.Option(
        "--prior-odds", metavar="ID=WEIGHT", help="Relative prior weight of a mechanism (repeatable; "
                             "default: equal odds).")] = [],  # noqa: B006
    workers: Annotated[int, typer.Option(
        "--workers", min=0, metavar="N",
        help="Processes fitting mechanisms side by side (0: one per core, at most 2). Results do "
             "not depend on it.")] = 0,
    bias_window: Annotated[str | None, typer.Option(
        "--bias-window", metavar="LO:HI",
        help="Analyse only points with LO <= |V| <= HI volts (e.g. 6:9.5).")] = None,
    temperature_window: Annotated[str | None, typer.Option(
        "--temperature-window", metavar="LO:HI",
        help="Analyse only temperatures LO <= T <= HI kelvin (e.g. 77:300).")] = None,
    noise_law: Annotated[str, typer.Option(
        "--noise-law", metavar="LAW",
        help="How readings scatter: gaussian (default), lognormal-floor, student-t, or auto "
             "(chosen by evidence on the most promising mechanism).")] = "gaussian",
    fit_all: Annotated[bool, typer.Option(
        "--fit-all", help="Sample every mechanism, also those whose best fit found lies over "
                          "1000 nats below an evidence already estimated (skipped by default, "
                          "listed with the bound).")] = False,
    seed: SeedOpt = 0,
) -> None:
    """Read an I-V-T series, run every linearisation test, fit and rank every mechanism."""
    from mechid.analysis import AnalysisSettings, run_analysis_full
    from mechid.data import read_series
    from mechid.inference.noise_choice import noise_law_setting
    from mechid.outputs import check_output_paths, input_files

    with _user_errors():
        series = read_series(data)
        device, used = _device(
            data, device_file, thickness_nm=thickness_nm, thickness_sd_nm=thickness_sd_nm,
            area_cm2=area_cm2, effective_mass_ratio=effective_mass,
            effective_mass_sd=effective_mass_sd,
            optical_dielectric_constant=optical_dielectric_constant,
            optical_dielectric_constant_sd=optical_dielectric_constant_sd,
        )
        check_output_paths(
            {"--json": json_path, "--samples": samples_path, "--report": report_path,
             "--summary": summary_path},
            {"--figures": figures_dir}, input_files(data, series.sources, used),
        )
        if used is not None:
            err.print(f"device description from {used}", highlight=False, markup=False)
        for mechanism_id in only:
            get_mechanism(mechanism_id)
        settings = AnalysisSettings(
            mechanisms=tuple(only) or None, quick=quick, screen_only=screen_only,
            polarity=polarity, prior_odds=parse_prior_odds(prior_odds) or None, workers=workers,
            bias_window_V=parse_window("--bias-window", bias_window),
            temperature_window_K=parse_window("--temperature-window", temperature_window),
            noise_law=noise_law_setting(noise_law),
            skip_below_leader=not fit_all,
        )
        with Progress(TextColumn("{task.description:<28}"), BarColumn(), TaskProgressColumn(),
                      TimeElapsedColumn(), console=err, transient=False,
                      disable=not err.is_terminal) as progress:
            run = run_analysis_full(series, device, settings, seed=seed,
                                    progress=_progress_hook(progress))
        _print_result(run.result)
        _write_outputs(run, json_path, samples_path, report_path, figures_dir, summary_path)


def _write_outputs(run, json_path, samples_path, report_path, figures_dir, summary_path) -> None:  # noqa: ANN001
    from mechid.results import write_json, write_samples

    result = run.result
    if json_path is not None:
        write_json(result, json_path)
        err.print(f"result JSON written to {json_path}", highlight=False, markup=False)
    if samples_path is not None:
        write_samples(result, samples_path)
        err.print(f"posterior draws written to {samples_path}", highlight=False, markup=False)
    if report_path is not None or figures_dir is not None or summary_path is not None:
        from mechid.report import write_outputs

        for written in write_outputs(run, report=report_path, figures_dir=figures_dir,
                                     summary=summary_path):
            err.print(f"written {written}", highlight=False, markup=False)


def _print_result(result) -> None:  # noqa: ANN001
    from mechid.report.console import render_console

    render_console(result, out)


@app.command("demo")
def demo_command(
    out_dir: Annotated[Path, typer.Option("--out", help="Folder for the demo outputs.")] = Path(
        "mechid-demo"),
    quick: Annotated[bool, typer.Option("--quick", help="Shorter chains (rougher evidences).")] = False,
    seed: SeedOpt = 0,
) -> None:
    """Analyse the shipped demo series and write JSON and report into ./mechid-demo/."""
    from mechid.analysis import AnalysisSettings, run_analysis_full
    from mechid.data import read_series
    from mechid.demo import demo_series_path, demo_truth
    from mechid.report import write_outputs
    from mechid.results import write_json

    with _user_errors():
        data = demo_series_path()
        device_path = find_device_toml(data)
        device = read_device_toml(device_path) if device_path else Device()
        series = read_series(data)
        if out_dir.exists() and not out_dir.is_dir():
            raise MechidError(f"--out {out_dir}: exists and is not a folder; give a folder name")
        try:
            out_dir.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise MechidError(f"--out {out_dir}: cannot create the folder ({exc.strerror})") from None
        err.print(f"demo data: {data}", highlight=False, markup=False)
        err.print(f"scenario: {demo_truth()['story']}", highlight=False, markup=False)
        with Progress(TextColumn("{task.description:<28}"), BarColumn(), TaskProgressColumn(),
                      TimeElapsedColumn(), console=err, disable=not err.is_terminal) as progress:
            run = run_analysis_full(series, device, AnalysisSettings(quick=quick), seed=seed,
                                    progress=_progress_hook(progress))
        _print_result(run.result)
        json_path = out_dir / "result.json"
        write_json(run.result, json_path)
        written = [json_path, *write_outputs(run, report=out_dir / "report.html", figures_dir=None,
                                             summary=out_dir / "summary.csv")]
        truth = demo_truth()
        err.print(f"true mechanism of the demo series: {truth['mechanism']} with "
                  + ", ".join(f"{k} = {v:g}" for k, v in truth["params"].items()), highlight=False)
        err.print("demo outputs written to " + ", ".join(str(p) for p in written), highlight=False,
                  markup=False)


if __name__ == "__main__":  # pragma: no cover
    app()
