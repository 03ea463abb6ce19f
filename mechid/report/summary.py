"""The ``--summary`` CSV: one row per mechanism and parameter, for spreadsheets.

Columns (in this order): ``mechanism_id``, ``rank``, ``probability``, ``log_evidence``,
``log_evidence_err``, ``fit_adequate``, ``parameter``, ``unit``, ``median``, ``ci68_lo``,
``ci68_hi``, ``ci95_lo``, ``ci95_hi``, ``fixed``. Numbers are written with full precision
(``repr`` of the JSON value) so they equal the JSON; a missing or non-finite value is an
empty cell. Mechanisms appear in ranking order, parameters in declaration order with the
two noise parameters last.
"""

from __future__ import annotations

import csv
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from mechid.report.text import is_number

COLUMNS: tuple[str, ...] = (
    "mechanism_id", "rank", "probability", "log_evidence", "log_evidence_err", "fit_adequate",
    "parameter", "unit", "median", "ci68_lo", "ci68_hi", "ci95_lo", "ci95_hi", "fixed",
)


def _cell(value: Any) -> str:
    """A CSV cell: full-precision numbers, true/false, empty for null or non-finite."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if is_number(value):
        return repr(value) if isinstance(value, float) else str(value)
    return "" if value is None or isinstance(value, float) else str(value)


def summary_records(data: Mapping[str, Any]) -> list[dict[str, Any]]:
    """One record per mechanism and parameter, keyed by :data:`COLUMNS`, values as in the JSON.

    ``data`` is a result in plain-JSON form (``to_plain_json(result)``).
    """
    records = []
    for rank, m in enumerate(data.get("mechanisms") or [], start=1):
        for name, s in (m.get("parameters") or {}).items():
            ci68 = s.get("ci68") or [None, None]
            ci95 = s.get("ci95") or [None, None]
            records.append({
                "mechanism_id": m.get("id"), "rank": rank, "probability": m.get("probability"),
                "log_evidence": m.get("log_evidence"),
                "log_evidence_err": m.get("log_evidence_err"),
                "fit_adequate": bool(m.get("fit_adequate")), "parameter": name,
                "unit": s.get("unit"), "median": s.get("median"),
                "ci68_lo": ci68[0], "ci68_hi": ci68[1], "ci95_lo": ci95[0], "ci95_hi": ci95[1],
                "fixed": bool(s.get("fixed")),
            })
    return records


def summary_rows(data: Mapping[str, Any]) -> list[dict[str, str]]:
    """The CSV rows of a result in plain-JSON form (:func:`summary_records` as text cells)."""
    return [{column: _cell(record[column]) for column in COLUMNS} for record in summary_records(data)]


def write_summary_csv(data: Mapping[str, Any], path: Path) -> Path:
    """Write the summary CSV (header row always, even for a screening-only result)."""
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=COLUMNS)
        writer.writeheader()
        writer.writerows(summary_rows(data))
    return path
