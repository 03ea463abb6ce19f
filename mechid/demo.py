"""The shipped demo series (an invented scenario; true values in ``demo_data/truth.json``)."""

from __future__ import annotations

import json
from importlib import resources
from pathlib import Path


def demo_series_path() -> Path:
    """Path of the demo data file inside the installed package."""
    return Path(str(resources.files("mechid") / "demo_data" / "data.csv"))


def demo_truth() -> dict:
    """The demo series' manifest: scenario, true mechanism and parameters, noise, seed."""
    path = Path(str(resources.files("mechid") / "demo_data" / "truth.json"))
    return json.loads(path.read_text(encoding="utf-8"))
