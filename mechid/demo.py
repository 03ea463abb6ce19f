"""The shipped demo series (an invented scenario; true values in ``demo_data/truth.json``)."""

from __future__ import annotations

from importlib import resources
from pathlib import Path


def demo_series_path() -> Path:
    """Path of the demo data file inside the installed package."""
    return Path(str(resources.files("mechid") / "demo_data" / "data.csv"))
