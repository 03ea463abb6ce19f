"""mechid: identify the conduction mechanism of thin films and junctions from I-V-T data.

Data flows one way: read and validate (:mod:`mechid.data`) -> screen
(:mod:`mechid.screening`) -> fit and compare (:mod:`mechid.inference`) -> report
(:mod:`mechid.report`). Every conduction mechanism is declared once in
:mod:`mechid.catalogue`.
"""

import logging
from typing import Any

__version__ = "0.1.0"

logging.getLogger(__name__).addHandler(logging.NullHandler())

__all__ = ["Analysis", "analyse", "__version__"]


def __getattr__(name: str) -> Any:
    """``mechid.analyse`` and ``mechid.Analysis`` (see :mod:`mechid.api`), imported on first use
    so that ``import mechid`` and the command line's start stay light."""
    if name in ("analyse", "Analysis"):
        from mechid import api

        return getattr(api, name)
    raise AttributeError(f"module 'mechid' has no attribute {name!r}")
