"""The HTML report renders in a real browser: headless Chromium loads every embedded image.

Chromium (Debian package ``chromium``) runs with no sandbox, GPU, network or first-run
services and a fresh profile. The page gets a tiny script appended (the report itself has
none) that writes the number of images and of images with ``naturalWidth > 0`` into the DOM;
``--dump-dom`` then shows whether every figure decoded. A screenshot and a print-to-PDF check
that the page paints and prints. Skipped, with the reason, where Chromium is not installed.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import warnings
from pathlib import Path

import pytest
from PIL import Image

from mechid.analysis import AnalysisRun, AnalysisSettings, run_analysis_full
from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidWarning
from mechid.report import write_outputs

REFERENCE = Path(__file__).resolve().parent.parent / "reference_curves" / "larkfield_sinx_poole_frenkel"
TEST_LADDER = {"n_temperatures": 4, "n_burn": 40, "n_production": 40, "max_production": 40,
               "n_walkers": 16, "extension_steps": 10}
BROWSERS = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")
COUNT_SCRIPT = (
    "<script>addEventListener('load',function(){var i=Array.prototype.slice.call("
    "document.images);var d=document.createElement('div');d.id='image-count';"
    "d.setAttribute('data-total',i.length);d.setAttribute('data-loaded',i.filter(function(x)"
    "{return x.complete&&x.naturalWidth>0;}).length);document.body.appendChild(d);});</script>"
)
TIMEOUT_S = 120


def find_browser() -> str | None:
    return next((path for name in BROWSERS if (path := shutil.which(name))), None)


def run_browser(browser: str, profile: Path, *args: str) -> subprocess.CompletedProcess[str]:
    command = [browser, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
               "--disable-background-networking", "--disable-component-update",
               "--disable-sync", f"--user-data-dir={profile}", *args]
    return subprocess.run(command, capture_output=True, text=True, timeout=TIMEOUT_S,
                          check=False)


@pytest.fixture(scope="module")
def browser() -> str:
    found = find_browser()
    if found is None:
        pytest.skip("Chromium not found on PATH (install the Debian package 'chromium')")
    return found


@pytest.fixture(scope="module")
def report(tmp_path_factory: pytest.TempPathFactory) -> Path:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        series = read_series(REFERENCE / "data.csv")
        device = read_device_toml(REFERENCE / "device.toml")
        run: AnalysisRun = run_analysis_full(
            series, device, AnalysisSettings(quick=True, mechanisms=("poole_frenkel",),
                                             ladder_overrides=TEST_LADDER), seed=0)
    path = tmp_path_factory.mktemp("render") / "report.html"
    write_outputs(run, report=path)
    return path


def test_every_image_loads_in_chromium(browser: str, report: Path, tmp_path: Path) -> None:
    html_text = report.read_text("utf-8")
    n_img = html_text.count("<img ")
    assert n_img >= 5
    probe = tmp_path / "probe.html"
    probe.write_text(html_text.replace("</body>", COUNT_SCRIPT + "</body>"), "utf-8")
    done = run_browser(browser, tmp_path / "profile", "--virtual-time-budget=10000",
                       "--dump-dom", probe.as_uri())
    assert done.returncode == 0, done.stderr[-2000:]
    match = re.search(r'id="image-count" data-total="(\d+)" data-loaded="(\d+)"', done.stdout)
    assert match, "the counting script did not run: " + done.stdout[-500:]
    assert int(match.group(1)) == n_img
    assert int(match.group(2)) == n_img


def test_screenshot_paints_the_page(browser: str, report: Path, tmp_path: Path) -> None:
    shot = tmp_path / "shot.png"
    done = run_browser(browser, tmp_path / "profile", "--hide-scrollbars",
                       f"--screenshot={shot}", "--window-size=1280,2000", report.as_uri())
    assert done.returncode == 0, done.stderr[-2000:]
    with Image.open(shot) as image:
        assert image.size == (1280, 2000)
        colours = image.convert("RGB").getcolors(maxcolors=1 << 20)
    # text, the verdict box and figures give many distinct colours; a blank page gives one
    assert colours is not None and len(colours) > 200


def test_prints_to_pdf(browser: str, report: Path, tmp_path: Path) -> None:
    pdf = tmp_path / "report.pdf"
    done = run_browser(browser, tmp_path / "profile", "--no-pdf-header-footer",
                       f"--print-to-pdf={pdf}", report.as_uri())
    assert done.returncode == 0, done.stderr[-2000:]
    data = pdf.read_bytes()
    assert data.startswith(b"%PDF")
    assert len(re.findall(rb"/Type\s*/Page[^s]", data)) >= 3


#: Marks every element whose box reaches past the viewport's right edge, and the page width.
OVERFLOW_SCRIPT = (
    "<script>addEventListener('load',function(){var w=document.documentElement.clientWidth;"
    "var bad=[];Array.prototype.forEach.call(document.querySelectorAll('body *'),function(e){"
    "var r=e.getBoundingClientRect();if(r.width>0&&r.right>w+1){bad.push(e.tagName+'.'+"
    "(e.className||''));}});var d=document.createElement('div');d.id='overflow';"
    "d.setAttribute('data-width',w);d.setAttribute('data-scroll',"
    "document.documentElement.scrollWidth);d.setAttribute('data-bad',bad.slice(0,20).join(' '));"
    "document.body.appendChild(d);});</script>"
)


def test_new_elements_render_within_1400_px(browser: str, report: Path, tmp_path: Path) -> None:
    # Issue 11: the quick-run banner, the interval caveat, the noise-law statement and the
    # undetermined-parameter flags are in the rendered page, and nothing reaches past the
    # right edge of a 1400 px window (no horizontal scrolling, no clipped element).
    probe = tmp_path / "probe.html"
    probe.write_text(report.read_text("utf-8").replace("</body>", OVERFLOW_SCRIPT + "</body>"),
                     "utf-8")
    done = run_browser(browser, tmp_path / "profile", "--window-size=1400,2000",
                       "--virtual-time-budget=10000", "--dump-dom", probe.as_uri())
    assert done.returncode == 0, done.stderr[-2000:]
    dom = done.stdout
    match = re.search(r'id="overflow" data-width="(\d+)" data-scroll="(\d+)" data-bad="([^"]*)"',
                      dom)
    assert match, "the overflow script did not run: " + dom[-500:]
    width, scroll, bad = int(match.group(1)), int(match.group(2)), match.group(3)
    assert width > 1200
    assert scroll <= width, f"page scrolls sideways ({scroll} > {width} px): {bad}"
    assert bad == "", f"elements past the right edge: {bad}"
    text = re.sub(r"<[^>]+>", " ", dom)
    for phrase in ("QUICK RUN", "conditional on the model", "Noise law of every fit",
                   "Gaussian in current"):
        assert phrase.lower() in text.lower(), phrase
