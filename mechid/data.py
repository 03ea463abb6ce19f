"""Read, check and hold current-voltage-temperature (I-V-T) data.

This is the one module that touches input data files. Everything downstream works on an
:class:`IVSeries` in SI units (K, V, A) and never sees a file again.

Accepted input
--------------
*A tidy table* (``.csv``, ``.txt`` or ``.dat``) with one header line naming a temperature, a
voltage and a current column, in any order, each with its unit either as a suffix
(``temperature_K``, ``voltage_mV``, ``current_nA``) or in brackets (``voltage [mV]``)::

    # lines starting with '#' are comments and may appear anywhere
    temperature_K,voltage_V,current_A
    77,0.1,1.2e-9
    77,-0.1,-1.1e-9

*A per-temperature file* with only voltage and current columns; the temperature is then taken
from a header comment (``# temperature_K = 77``, ``# T = 77 K``) or from the file name
(``sample_77K.csv``, ``run3_77.5K.txt``). When both are present they must agree.

*A wide table*: one current column per temperature, each naming its temperature after an
``@`` (``current_nA@77K``, ``current [pA] @ 4.2 K``, ``current_A@-20C``), with either one
shared voltage column or a voltage column per temperature (``voltage_V@77K``). Sweeps of
different lengths leave the cells below their end empty::

    voltage_V@77K,current_nA@77K,voltage_V@300K,current_nA@300K
    0.1,0.012,0.1,3.1
    0.2,0.025,0.2,6.4
    ,,0.3,9.9

*A folder* of such files (tidy or per-temperature, units may differ between files); every
``*.csv``, ``*.txt`` and ``*.dat`` file directly inside it is read and merged into one series.
Other files (``device.toml``, reports, hidden files) are not data and are skipped.

Separators: comma, tab, semicolon or runs of whitespace, chosen from the header line (a
whitespace-separated file cannot use bracketed units with a space before the bracket).

Decisions
---------
* Every column needs a unit: a bare ``current`` column is an error, because a silent
  factor of 1000 between mA and A is the most common way I-V data go wrong.
* Columns that are not a temperature, voltage or current (a time stamp, a sweep counter)
  are ignored with a :class:`~mechid.errors.MechidWarning` naming them.
* Two columns of the same quantity (``current_A`` and ``current_mA``) are an error; different
  units in different files of a folder are converted without comment.
* Temperatures are grouped by exact value: a column holding the measured temperature of each
  point (77.02, 77.05, ...) must be rounded to the set point first.
* At least :data:`MIN_VOLTAGES_PER_TEMPERATURE` distinct non-zero voltages must remain at each
  temperature after exclusions: two points always lie on a straight line, so a straightened
  plot needs three to show whether it is straight at all.

Points that cannot carry information are excluded with a warning and kept in
:attr:`IVSeries.excluded` (see :func:`read_series`). Input files are opened read-only.
"""

from __future__ import annotations

import math
import re
import warnings
from collections import Counter
from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any, Protocol

import numpy as np
from numpy.typing import ArrayLike, NDArray

from mechid.errors import InputDataError, MechidWarning

#: File suffixes read as data inside a folder (compared case-insensitively).
DATA_SUFFIXES: tuple[str, ...] = (".csv", ".txt", ".dat")

#: Accepted units per quantity: name -> (scale to SI, offset added after scaling).
UNITS: dict[str, dict[str, tuple[float, float]]] = {
    "temperature": {"K": (1.0, 0.0), "C": (1.0, 273.15), "degC": (1.0, 273.15),
                    "°C": (1.0, 273.15)},
    "voltage": {"V": (1.0, 0.0), "mV": (1e-3, 0.0)},
    "current": {"A": (1.0, 0.0), "mA": (1e-3, 0.0), "uA": (1e-6, 0.0), "µA": (1e-6, 0.0),
                "μA": (1e-6, 0.0), "nA": (1e-9, 0.0), "pA": (1e-12, 0.0), "fA": (1e-15, 0.0)},
}

#: Column-name spellings of each quantity (compared case-insensitively).
QUANTITY_NAMES: dict[str, tuple[str, ...]] = {
    "temperature": ("temperature", "temp", "t"),
    "voltage": ("voltage", "bias", "v"),
    "current": ("current", "i"),
}

#: Fewest distinct non-zero voltages accepted at one temperature (see module notes).
MIN_VOLTAGES_PER_TEMPERATURE = 3

#: Relative tolerance within which currents count as equal to the compliance limit.
COMPLIANCE_RTOL = 1e-3

#: Fewest distinct voltages at the top of a sweep that make a compliance plateau.
COMPLIANCE_MIN_POINTS = 3

#: Temperatures accepted, in K. Electrical measurements run from dilution refrigerators
#: (a few mK) to furnace stages (well under 2000 K); a value outside this range is a unit or
#: typing mistake, not a measurement (our bound, chosen generously on both sides).
TEMPERATURE_RANGE_K = (1e-3, 2000.0)

#: Longest piece of a cell or line quoted back in an error message.
MAX_QUOTED_CHARACTERS = 60

#: A number as a data file may write it: ASCII digits, optional sign, decimal point and
#: exponent; "nan"/"inf" are recognised so that they get their own message. Python's float()
#: also takes '3_00', full-width or Arabic-Indic digits and surrounding NUL characters,
#: which a data file should not contain.
_NUMBER = re.compile(
    r"[-+]?(?:(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][-+]?[0-9]+)?|(?i:nan|inf|infinity))"
)

REASON_ZERO_BIAS = "zero bias carries no transport information"
REASON_COMPLIANCE = "current at compliance limit"

_EXPECTED_PATTERN = (
    "expected a header such as 'temperature_K,voltage_V,current_A' (units: "
    + "; ".join(f"{q} {'/'.join(u)}" for q, u in UNITS.items())
    + "; brackets also work, e.g. 'voltage [mV]'), or 'voltage_V,current_A' with the "
    "temperature in a '# temperature_K = 77' comment or in the file name like 'sample_77K.csv'"
)

_FILENAME_TEMPERATURE = re.compile(r"(?<![\d.])(\d+(?:\.\d+)?)\s?K(?![A-Za-z])")
# Quantity word case-insensitive, unit case-sensitive (so '# T_c = 9' is not read as Celsius).
# The value is taken loosely here (digits, dots, signs, exponents) and then checked strictly,
# so that '# T = 1.2.3 K' is an error rather than a silently ignored comment.
_HEADER_TEMPERATURE = re.compile(
    r"^#\s*(?i:temperature|temp|t)(?:_(?P<name_unit>\w+)|\s*\[(?P<bracket_unit>[^\]]+)\])?"
    r"\s*[=:]\s*(?P<value>[-+.0-9][-+.0-9eE]*)\s*(?P<value_unit>°C|degC|[KC])?\s*$"
)
_TEMPERATURE_UNIT_ALIASES = {"K": "K", "C": "C", "degC": "C", "°C": "C"}


# --------------------------------------------------------------------------------------------
# Result objects
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class ExcludedPoint:
    """A measured point left out of the analysis, and why.

    Parameters
    ----------
    source : str
        Name of the file the point came from.
    row : int
        Line number in that file as an editor shows it (the first line is 1).
    temperature_K, voltage_V, current_A : float
        The point, converted to K, V and A.
    reason : str
        Why the point cannot carry information.
    """

    source: str
    row: int
    temperature_K: float
    voltage_V: float
    current_A: float
    reason: str


@dataclass(frozen=True, eq=False)
class IVSeries:
    """An I-V-T data set in SI units, sorted by temperature and then voltage.

    Repeated points (forward and backward sweeps, repeated measurements) are kept as
    separate points in the order they were read. The arrays are read-only.

    Parameters
    ----------
    temperature_K, voltage_V, current_A : numpy.ndarray
        Kept points, float64, equal lengths.
    sources : tuple of str
        Names of the files read.
    excluded : tuple of ExcludedPoint
        Points left out, each with its reason.
    reading_index : numpy.ndarray, optional
        Per kept point, its position in the order the points were read (int64): files in the
        order given (a folder's files by name), rows in file order, a wide table's
        temperatures one after another. Excluded points keep their positions, so the numbers
        can have gaps. Default ``arange(n)``: the order of the arrays given is the reading
        order. :func:`mechid.measurement.drift_check` reads it.
    """

    temperature_K: NDArray[np.float64]
    voltage_V: NDArray[np.float64]
    current_A: NDArray[np.float64]
    sources: tuple[str, ...] = ()
    excluded: tuple[ExcludedPoint, ...] = field(default=())
    reading_index: NDArray[np.int64] | None = None

    def __post_init__(self) -> None:
        arrays = {}
        for name in ("temperature_K", "voltage_V", "current_A"):
            array = np.array(getattr(self, name), dtype=np.float64).reshape(-1)
            array.setflags(write=False)
            arrays[name] = array
            object.__setattr__(self, name, array)
        n_points = arrays["temperature_K"].size
        order = (np.arange(n_points, dtype=np.int64) if self.reading_index is None
                 else np.array(self.reading_index, dtype=np.int64).reshape(-1))
        order.setflags(write=False)
        arrays["reading_index"] = order
        object.__setattr__(self, "reading_index", order)
        lengths = {name: a.size for name, a in arrays.items()}
        if len(set(lengths.values())) != 1:
            raise InputDataError(f"temperature, voltage, current and reading-order lengths "
                                 f"differ: {lengths}")
        object.__setattr__(self, "sources", tuple(self.sources))
        object.__setattr__(self, "excluded", tuple(self.excluded))

    @property
    def n_points(self) -> int:
        """Number of kept points."""
        return int(self.temperature_K.size)

    @property
    def temperatures(self) -> NDArray[np.float64]:
        """The distinct temperatures in K, ascending."""
        return np.unique(self.temperature_K)

    def at_temperature(self, temperature_K: float) -> tuple[NDArray[np.float64],
                                                           NDArray[np.float64]]:
        """Return ``(voltage_V, current_A)`` at one temperature, sorted by voltage.

        Raises
        ------
        InputDataError
            If the series holds no point at that temperature (relative tolerance 1e-9).
        """
        mask = np.isclose(self.temperature_K, temperature_K, rtol=1e-9, atol=0.0)
        if not mask.any():
            present = ", ".join(f"{t:g}" for t in self.temperatures)
            raise InputDataError(
                f"no data at {temperature_K:g} K; temperatures present: {present}"
            )
        return self.voltage_V[mask], self.current_A[mask]

    def summary(self) -> dict[str, Any]:
        """Plain-JSON overview: sizes, ranges, decades of current, polarities, exclusions."""
        empty = self.n_points == 0
        magnitude = np.abs(self.current_A)
        nonzero = magnitude[magnitude > 0]
        decades = float(np.log10(nonzero.max() / nonzero.min())) if nonzero.size else 0.0
        reasons = Counter(point.reason for point in self.excluded)
        return {
            "n_points": self.n_points,
            "n_temperatures": int(self.temperatures.size),
            "temperature_range_K": None if empty else [float(self.temperature_K.min()),
                                                        float(self.temperature_K.max())],
            "voltage_range_V": None if empty else [float(self.voltage_V.min()),
                                                    float(self.voltage_V.max())],
            "current_decades": decades,
            "both_polarities": bool((self.voltage_V > 0).any() and (self.voltage_V < 0).any()),
            "n_excluded": len(self.excluded),
            "n_excluded_by_reason": dict(sorted(reasons.items())),
            "sources": list(self.sources),
        }

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form holding every kept and excluded point."""
        return {
            "temperature_K": self.temperature_K.tolist(),
            "voltage_V": self.voltage_V.tolist(),
            "current_A": self.current_A.tolist(),
            "reading_index": self.reading_index.tolist(),
            "sources": list(self.sources),
            "excluded": [asdict(point) for point in self.excluded],
        }


class SeriesLike(Protocol):
    """Anything with temperature, voltage and current arrays (an IVSeries, a simulation)."""

    temperature_K: ArrayLike
    voltage_V: ArrayLike
    current_A: ArrayLike


# --------------------------------------------------------------------------------------------
# Reading one file
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _Column:
    """A recognised data column: its position, quantity and unit."""

    index: int
    header: str
    quantity: str
    unit: str


@dataclass
class _FileTable:
    """Raw points of one file in SI units, with the line number of each point."""

    source: str
    line: NDArray[np.int64]
    temperature_K: NDArray[np.float64]
    voltage_V: NDArray[np.float64]
    current_A: NDArray[np.float64]


def _split_function(header_line: str) -> Callable[[str], list[str]]:
    """Choose the field separator from the header line."""
    for separator in (",", "\t", ";"):
        if separator in header_line:
            return lambda line, s=separator: [cell.strip().strip('"\'') for cell in line.split(s)]
    return lambda line: [cell.strip('"\'') for cell in line.split()]


def _parse_column_name(name: str) -> tuple[str, str | None] | None:
    """Return ``(quantity, unit or None)`` for a quantity column, ``None`` for another column.

    ``current_mA``, ``current [mA]`` and ``current (mA)`` give ``("current", "mA")``; a bare
    ``current`` gives ``("current", None)``; ``temperature_setpoint_K`` is another column.
    """
    match = re.fullmatch(r"(?P<word>[^\s_\[\(]+)\s*(?:\[(?P<b>[^\]]*)\]|\((?P<p>[^)]*)\))", name)
    if match:
        word, unit = match["word"], (match["b"] if match["b"] is not None else match["p"]).strip()
    else:
        word, _, unit = name.partition("_")
        if "_" in unit or " " in word:
            return None
    for quantity, spellings in QUANTITY_NAMES.items():
        if word.lower() in spellings:
            return quantity, (unit or None)
    return None


def _recognise_columns(header: list[str], source: str, line_number: int,
                       require: tuple[str, ...] = ("voltage", "current")) -> dict[str, _Column]:
    """Map quantities to header columns, raising on duplicates, missing or unknown units."""
    duplicates = sorted(name for name, n in Counter(header).items() if n > 1)
    if duplicates:
        raise InputDataError(
            f"{source}, line {line_number}: duplicate column name(s) "
            f"{', '.join(repr(d) for d in duplicates)}; every column needs its own name"
        )
    columns: dict[str, _Column] = {}
    extras = []
    for index, name in enumerate(header):
        parsed = _parse_column_name(name)
        if parsed is None:
            extras.append(name)
            continue
        quantity, unit = parsed
        accepted = ", ".join(UNITS[quantity])
        example = next(iter(UNITS[quantity]))
        if unit is None:
            raise InputDataError(
                f"{source}, line {line_number}: column {name!r} has no unit; write it with "
                f"one of the {quantity} units {accepted}, e.g. '{quantity}_{example}'"
            )
        if unit not in UNITS[quantity]:
            raise InputDataError(
                f"{source}, line {line_number}: column {name!r} has unknown unit {unit!r}; "
                f"accepted {quantity} units: {accepted} (as a suffix '_mA' or in brackets '[mA]')"
            )
        if quantity in columns:
            raise InputDataError(
                f"{source}, line {line_number}: two {quantity} columns, "
                f"{columns[quantity].header!r} and {name!r}; keep exactly one per quantity"
            )
        columns[quantity] = _Column(index, name, quantity, unit)
    missing = [q for q in require if q not in columns]
    if missing:
        found = ", ".join(repr(h) for h in header)
        raise InputDataError(
            f"{source}, line {line_number}: no {' or '.join(missing)} column; columns found: "
            f"{found}; {_EXPECTED_PATTERN}"
        )
    if extras:
        warnings.warn(
            f"{source}: column(s) {', '.join(repr(e) for e in extras)} are not temperature, "
            "voltage or current and are ignored",
            MechidWarning, stacklevel=4,
        )
    return columns


def _to_si(values: NDArray[np.float64], column: _Column) -> NDArray[np.float64]:
    scale, offset = UNITS[column.quantity][column.unit]
    return values * scale + offset


def quoted(text: str, limit: int = MAX_QUOTED_CHARACTERS) -> str:
    """``repr`` of ``text`` cut to ``limit`` characters, for error messages."""
    if len(text) <= limit:
        return repr(text)
    return repr(text[:limit]) + f" ... ({len(text)} characters)"


def is_plain_number(text: str) -> bool:
    """True when ``text`` is a decimal number written with ASCII characters only."""
    return _NUMBER.fullmatch(text) is not None


def _numeric_column(cells: list[str], lines: NDArray[np.int64], column: _Column,
                    source: str) -> NDArray[np.float64]:
    """Convert one column of text cells to float64, naming the first bad cell on failure."""
    bad = next((k for k, cell in enumerate(cells) if not is_plain_number(cell)), None)
    if bad is not None:
        shown = quoted(cells[bad]) if cells[bad] else "an empty cell"
        raise InputDataError(
            f"{source}, line {lines[bad]}, column {column.header!r}: expected a number written "
            f"with the digits 0-9 (e.g. 1.5e-9), found {shown}"
        )
    with np.errstate(over="ignore"):  # 1e999 or a 400-digit cell become inf, refused below
        values = np.array(cells, dtype=str).astype(np.float64)
    not_finite = ~np.isfinite(values)
    if not_finite.any():
        bad = int(np.argmax(not_finite))
        raise InputDataError(
            f"{source}, line {lines[bad]}, column {column.header!r}: {quoted(cells[bad])} is not "
            "a finite number; remove the point or replace it with a measured value"
        )
    return values


def _header_temperature(lines: list[tuple[int, str]], source: str) -> tuple[float, int] | None:
    """Return ``(temperature in K, line number)`` from ``# temperature_K = 77``-style comments."""
    found: list[tuple[float, int]] = []
    for number, text in lines:
        match = _HEADER_TEMPERATURE.match(text.strip())
        if match is None:
            continue
        written = [u for u in (match["name_unit"], match["bracket_unit"], match["value_unit"]) if u]
        units = {_TEMPERATURE_UNIT_ALIASES.get(u.strip(), u.strip()) for u in written}
        if len(units) != 1 or not units <= {"K", "C"}:
            raise InputDataError(
                f"{source}, line {number}: cannot tell the unit of the temperature in "
                f"{quoted(text.strip())}; write e.g. '# temperature_K = 77' or '# T = 77 K'"
            )
        written_value = match["value"]
        if not is_plain_number(written_value) or not math.isfinite(float(written_value)):
            raise InputDataError(
                f"{source}, line {number}: the temperature comment {quoted(text.strip())} does "
                f"not hold a finite number ({written_value!r}); write e.g. '# temperature_K = 77'"
            )
        celsius = units == {"C"}
        value = float(written_value) + (273.15 if celsius else 0.0)
        _check_temperature_value(value, f"{source}, line {number}",
                                 f"{written_value} {'°C' if celsius else 'K'}")
        found.append((value, number))
    if len({value for value, _ in found}) > 1:
        shown = ", ".join(f"line {n}: {v:g} K" for v, n in found)
        raise InputDataError(f"{source}: the header comments give different temperatures ({shown})")
    return found[0] if found else None


def _filename_temperature(path: Path) -> float | None:
    """Return the temperature in K written in a file name like ``sample_77.5K.csv``."""
    matches = _FILENAME_TEMPERATURE.findall(path.stem)
    if len(set(matches)) > 1:
        raise InputDataError(
            f"{path.name}: the file name holds several temperatures ({', '.join(matches)} K); "
            "give the temperature in a '# temperature_K = 77' header comment instead"
        )
    if not matches:
        return None
    value = float(matches[0])
    _check_temperature_value(value, f"{path.name} (file name)", f"{matches[0]} K")
    return value


def _check_temperature_value(value_K: float, where: str, as_written: str) -> None:
    """Raise unless a temperature lies in :data:`TEMPERATURE_RANGE_K`."""
    low, high = TEMPERATURE_RANGE_K
    if math.isfinite(value_K) and low <= value_K <= high:
        return
    if math.isfinite(value_K) and value_K <= 0:
        problem = "is not above absolute zero"
    else:
        problem = f"is outside the range mechid accepts ({low:g} K to {high:g} K)"
    shown = as_written if len(as_written) <= MAX_QUOTED_CHARACTERS else quoted(as_written)
    converted = "" if as_written.endswith(" K") else f" (= {value_K:.6g} K)"
    raise InputDataError(f"{where}: temperature {shown}{converted} {problem}; check the value and its unit")


def _file_temperature(path: Path, comments: list[tuple[int, str]]) -> tuple[float, str] | None:
    """Temperature of a per-temperature file and where it came from (header or file name)."""
    header = _header_temperature(comments, path.name)
    from_name = _filename_temperature(path)
    if header and from_name is not None and not math.isclose(header[0], from_name, rel_tol=1e-9):
        raise InputDataError(
            f"{path.name}: the header comment on line {header[1]} gives {header[0]:g} K but the "
            f"file name gives {from_name:g} K; make them agree"
        )
    if header:
        return header[0], f"line {header[1]}"
    if from_name is not None:
        return from_name, "the file name"
    return None


def _read_lines(path: Path) -> list[str]:
    """Return the lines of a text file (universal newlines, BOM removed), read-only."""
    if not path.exists():
        raise InputDataError(f"{path}: no such file or folder")
    try:
        with open(path, encoding="utf-8-sig", newline=None) as handle:
            text = handle.read()
    except UnicodeDecodeError as exc:
        raise InputDataError(f"{path.name}: not a UTF-8 text file ({exc.reason})") from None
    except OSError as exc:
        raise InputDataError(f"{path}: cannot read the file ({exc.strerror})") from None
    return text.split("\n")


def _read_file(path: Path) -> _FileTable:
    """Read one data file into SI arrays with line numbers (no exclusions yet)."""
    source = path.name
    numbered = [(k + 1, line) for k, line in enumerate(_read_lines(path))]
    comments = [(n, t) for n, t in numbered if t.lstrip().startswith("#")]
    content = [(n, t) for n, t in numbered if t.strip() and not t.lstrip().startswith("#")]
    if not content:
        raise InputDataError(f"{source}: the file is empty (no header and no data rows)")
    header_number, header_line = content[0]
    split = _split_function(header_line)
    header = split(header_line)
    if any(_WIDE_COLUMN.fullmatch(name) for name in header):
        return _read_wide(source, header, header_number, content[1:], split)
    columns = _recognise_columns(header, source, header_number)
    rows = content[1:]
    if not rows:
        raise InputDataError(
            f"{source}: only a header (line {header_number}) and no data rows below it"
        )
    lines = np.array([n for n, _ in rows], dtype=np.int64)
    cells = [split(text) for _, text in rows]
    for (number, _), fields in zip(rows, cells, strict=True):
        if len(fields) != len(header):
            raise InputDataError(
                f"{source}, line {number}: {len(fields)} field(s) but the header on line "
                f"{header_number} names {len(header)} column(s)"
            )
    values = {
        quantity: _to_si(_numeric_column([f[col.index] for f in cells], lines, col, source), col)
        for quantity, col in columns.items()
    }
    if "temperature" in columns:
        temperature = values["temperature"]
        _check_header_against_column(path, comments, temperature, lines)
    else:
        metadata = _file_temperature(path, comments)
        if metadata is None:
            raise InputDataError(
                f"{source}: no temperature column, no '# temperature_K = ...' comment and no "
                f"temperature in the file name; columns found: "
                f"{', '.join(repr(h) for h in header)}; {_EXPECTED_PATTERN}"
            )
        value, _origin = metadata
        temperature = np.full(lines.size, value)
    if "temperature" in columns:
        _check_temperature_column(temperature, lines, source, columns["temperature"])
    return _FileTable(source, lines, temperature, values["voltage"], values["current"])


#: A column of a wide table: a quantity column name, then '@' and its temperature, e.g.
#: ``current_nA@77K``, ``voltage [mV] @ 4.2 K`` or ``current_A@-20C``.
_WIDE_COLUMN = re.compile(
    r"(?P<name>[^@]+?)\s*@\s*(?P<value>[-+]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][-+]?[0-9]+)?)"
    r"\s*(?P<unit>K|C|°C|degC)"
)


def _wide_groups(header: list[str], source: str, line_number: int
                 ) -> tuple[dict[float, dict[str, _Column]], _Column | None]:
    """Group wide-table columns by temperature; return them and the shared voltage column."""
    groups: dict[float, dict[str, _Column]] = {}
    shared_voltage: _Column | None = None
    for index, name in enumerate(header):
        match = _WIDE_COLUMN.fullmatch(name)
        parsed = _parse_column_name(match["name"] if match else name)
        if parsed is None or parsed[0] == "temperature":
            raise InputDataError(
                f"{source}, line {line_number}: column {quoted(name)} does not fit a wide table; "
                "every column is a voltage or current with its unit, and all but one shared "
                "voltage column carry their temperature, e.g. 'voltage_V,current_nA@77K,"
                "current_nA@300K' or 'voltage_V@77K,current_nA@77K,voltage_V@300K,current_nA@300K'"
            )
        quantity = parsed[0]
        # checks the unit as a tidy header would (missing or unknown unit -> clear error)
        checked = _recognise_columns([match["name"] if match else name], source, line_number,
                                     require=(quantity,))[quantity]
        column = _Column(index, name, quantity, checked.unit)
        if match is None:
            if quantity != "voltage" or shared_voltage is not None:
                raise InputDataError(
                    f"{source}, line {line_number}: column {quoted(name)} has no temperature "
                    "('@77K'); in a wide table only one shared voltage column may go without"
                )
            shared_voltage = column
            continue
        celsius = match["unit"] != "K"
        temperature = float(match["value"]) + (273.15 if celsius else 0.0)
        _check_temperature_value(temperature, f"{source}, line {line_number}, column {quoted(name)}",
                                 f"{match['value']} {'°C' if celsius else 'K'}")
        group = groups.setdefault(temperature, {})
        if quantity in group:
            raise InputDataError(
                f"{source}, line {line_number}: two {quantity} columns at {temperature:g} K "
                f"({quoted(group[quantity].header)} and {quoted(name)})"
            )
        group[quantity] = column
    return groups, shared_voltage


def _read_wide(source: str, header: list[str], header_number: int,
               rows: list[tuple[int, str]], split: Callable[[str], list[str]]) -> _FileTable:
    """Read a wide table: per temperature a current column and its (or a shared) voltage column.

    Sweeps of different lengths leave cells empty at the bottom of a column; a row where a
    temperature has a voltage but no current (or the reverse) is an error.
    """
    groups, shared_voltage = _wide_groups(header, source, header_number)
    if not rows:
        raise InputDataError(f"{source}: only a header (line {header_number}) and no data rows below it")
    cells = [split(text) for _, text in rows]
    for (number, _), fields in zip(rows, cells, strict=True):
        if len(fields) > len(header):
            raise InputDataError(
                f"{source}, line {number}: {len(fields)} field(s) but the header on line "
                f"{header_number} names {len(header)} column(s)"
            )
    padded = [fields + [""] * (len(header) - len(fields)) for fields in cells]
    lines = np.array([n for n, _ in rows], dtype=np.int64)
    parts = []
    for temperature, group in sorted(groups.items()):
        voltage_column = group.get("voltage", shared_voltage)
        if "current" not in group or voltage_column is None:
            missing = "current" if "current" not in group else "voltage"
            raise InputDataError(
                f"{source}, line {header_number}: no {missing} column for {temperature:g} K"
            )
        parts.append(_wide_part(source, padded, lines, temperature, voltage_column, group["current"]))
    line, temperature_K, voltage, current = (np.concatenate(a) for a in zip(*parts, strict=True))
    return _FileTable(source, line, temperature_K, voltage, current)


def _wide_part(source: str, cells: list[list[str]], lines: NDArray[np.int64], temperature: float,
               voltage_column: _Column, current_column: _Column
               ) -> tuple[NDArray[np.int64], NDArray[np.float64], NDArray[np.float64],
                          NDArray[np.float64]]:
    """The points of one temperature of a wide table (rows where both cells are empty skipped)."""
    v_text = [f[voltage_column.index] for f in cells]
    i_text = [f[current_column.index] for f in cells]
    filled = np.array([bool(v) and bool(i) for v, i in zip(v_text, i_text, strict=True)])
    half = np.array([bool(v) != bool(i) for v, i in zip(v_text, i_text, strict=True)])
    if half.any():
        bad = int(np.argmax(half))
        empty = current_column if v_text[bad] else voltage_column
        raise InputDataError(
            f"{source}, line {lines[bad]}, column {quoted(empty.header)}: empty while the other "
            f"column of the {temperature:g} K sweep holds a value"
        )
    keep = np.flatnonzero(filled)
    kept_lines = lines[keep]
    voltage = _to_si(_numeric_column([v_text[k] for k in keep], kept_lines, voltage_column, source),
                     voltage_column)
    current = _to_si(_numeric_column([i_text[k] for k in keep], kept_lines, current_column, source),
                     current_column)
    return kept_lines, np.full(keep.size, temperature), voltage, current


def _check_header_against_column(path: Path, comments: list[tuple[int, str]],
                                 temperature: NDArray[np.float64],
                                 lines: NDArray[np.int64]) -> None:
    """A header temperature comment must agree with the temperature column when both exist."""
    header = _header_temperature(comments, path.name)
    if header is None:
        return
    differ = ~np.isclose(temperature, header[0], rtol=1e-9, atol=0.0)
    if differ.any():
        bad = int(np.argmax(differ))
        raise InputDataError(
            f"{path.name}: the header comment on line {header[1]} gives {header[0]:g} K but line "
            f"{lines[bad]} of the temperature column gives {temperature[bad]:g} K"
        )


def _check_temperature_column(temperature: NDArray[np.float64], lines: NDArray[np.int64],
                              source: str, column: _Column) -> None:
    """Every temperature of a column must lie in :data:`TEMPERATURE_RANGE_K`."""
    low, high = TEMPERATURE_RANGE_K
    outside = ~((temperature >= low) & (temperature <= high))
    if not outside.any():
        return
    bad = int(np.argmax(outside))
    scale, offset = UNITS["temperature"][column.unit]
    as_written = f"{(temperature[bad] - offset) / scale:g} {'K' if column.unit == 'K' else '°C'}"
    hint = "" if column.unit != "K" or temperature[bad] > 0 else (
        " (a Celsius column needs the '_C' suffix)")
    try:
        _check_temperature_value(float(temperature[bad]),
                                 f"{source}, line {lines[bad]}, column {column.header!r}", as_written)
    except InputDataError as exc:
        raise InputDataError(f"{exc}{hint}") from None


# --------------------------------------------------------------------------------------------
# Exclusions
# --------------------------------------------------------------------------------------------


def compliance_mask(temperature_K: ArrayLike, voltage_V: ArrayLike, current_A: ArrayLike, *,
                    rtol: float = COMPLIANCE_RTOL,
                    min_points: int = COMPLIANCE_MIN_POINTS) -> NDArray[np.bool_]:
    """Flag points on a compliance plateau at the top of a sweep.

    A source-measure unit that reaches its current compliance holds the current at the set
    limit while the voltage keeps stepping, so the top of the sweep shows the same |I| at
    several voltages. Removing that plateau before fitting is common practice in I-V analysis
    (no single published source). Per temperature and polarity, the distinct |V| levels are
    taken from the largest down; a level belongs to the plateau when every point at it has
    ``| |I| - max|I| | <= rtol * max|I|``; the plateau counts when it spans at least
    ``min_points`` distinct voltages.

    Parameters
    ----------
    temperature_K, voltage_V, current_A : array_like
        The points (zero-bias points are never flagged).
    rtol : float
        Relative tolerance on equality with the largest |I| of the group.
    min_points : int
        Fewest distinct voltages on a plateau.

    Returns
    -------
    numpy.ndarray of bool
        True for points on a compliance plateau.
    """
    temperature = np.asarray(temperature_K, dtype=np.float64)
    voltage = np.asarray(voltage_V, dtype=np.float64)
    magnitude = np.abs(np.asarray(current_A, dtype=np.float64))
    flagged = np.zeros(voltage.size, dtype=bool)
    polarity = np.sign(voltage)
    groups = np.unique(np.stack([temperature, polarity]), axis=1).T
    for group_temperature, group_polarity in groups:
        if group_polarity == 0:
            continue
        members = np.flatnonzero((temperature == group_temperature) & (polarity == group_polarity))
        flagged[members] = _plateau_in_group(np.abs(voltage[members]), magnitude[members],
                                             rtol, min_points)
    return flagged


def _plateau_in_group(abs_voltage: NDArray[np.float64], magnitude: NDArray[np.float64],
                      rtol: float, min_points: int) -> NDArray[np.bool_]:
    """Plateau flags for one temperature and polarity (see :func:`compliance_mask`)."""
    largest = magnitude.max()
    if largest <= 0:
        return np.zeros(abs_voltage.size, dtype=bool)
    at_limit = np.abs(magnitude - largest) <= rtol * largest
    levels, level_of_point = np.unique(abs_voltage, return_inverse=True)
    misses = np.bincount(level_of_point, weights=~at_limit, minlength=levels.size)
    run_from_top = np.cumprod(misses[::-1] == 0)[::-1].astype(bool)
    if run_from_top.sum() < min_points:
        return np.zeros(abs_voltage.size, dtype=bool)
    return run_from_top[level_of_point]


def _excluded_points(table: _FileTable, sources: NDArray[np.int64], names: Sequence[str],
                     mask: NDArray[np.bool_], reason: str) -> list[ExcludedPoint]:
    index = np.flatnonzero(mask)
    return [
        ExcludedPoint(names[sources[k]], int(table.line[k]), float(table.temperature_K[k]),
                      float(table.voltage_V[k]), float(table.current_A[k]), reason)
        for k in index
    ]


def _warn_excluded(points: list[ExcludedPoint], reason: str) -> None:
    if not points:
        return
    by_file: dict[str, list[int]] = {}
    for point in points:
        by_file.setdefault(point.source, []).append(point.row)
    where = "; ".join(
        f"{name} line(s) {', '.join(map(str, rows[:10]))}{', ...' if len(rows) > 10 else ''}"
        for name, rows in by_file.items()
    )
    warnings.warn(f"excluded {len(points)} point(s), {reason}: {where}", MechidWarning,
                  stacklevel=4)


# --------------------------------------------------------------------------------------------
# Public readers and writer
# --------------------------------------------------------------------------------------------


def _data_files(path: Path) -> list[Path]:
    if not path.exists():
        raise InputDataError(f"{path}: no such file or folder")
    if path.is_file():
        return [path]
    if not path.is_dir():
        raise InputDataError(
            f"{path}: neither a regular file nor a folder (a device, pipe or socket); give a "
            "data file or a folder of data files"
        )
    try:
        files = sorted(p for p in path.iterdir() if p.is_file()
                       and p.suffix.lower() in DATA_SUFFIXES and not p.name.startswith("."))
    except OSError as exc:
        raise InputDataError(f"{path}: cannot list the folder ({exc.strerror})") from None
    if not files:
        raise InputDataError(
            f"{path}: the folder holds no data files (looked for {', '.join(DATA_SUFFIXES)})"
        )
    return files


def _too_few_per_temperature(temperature: NDArray[np.float64], counted: NDArray[np.float64],
                             names: Sequence[str], sources: NDArray[np.int64]
                             ) -> tuple[float, int, str] | None:
    """The first temperature with fewer than :data:`MIN_VOLTAGES_PER_TEMPERATURE` counted
    points, as ``(temperature, count, files)``; ``counted`` holds 1 for each point that counts.
    """
    all_temperatures, index = np.unique(temperature, return_inverse=True)
    counts = np.bincount(index, weights=counted, minlength=all_temperatures.size)
    short = np.flatnonzero(counts < MIN_VOLTAGES_PER_TEMPERATURE)
    if short.size == 0:
        return None
    t_bad = float(all_temperatures[short[0]])
    files = sorted({names[s] for s in np.unique(sources[temperature == t_bad])})
    return t_bad, int(counts[short[0]]), ", ".join(files)


def _check_voltages_per_temperature(temperature: NDArray[np.float64],
                                    voltage: NDArray[np.float64], names: Sequence[str],
                                    sources: NDArray[np.int64]) -> None:
    """Each temperature needs :data:`MIN_VOLTAGES_PER_TEMPERATURE` distinct non-zero voltages."""
    first_of_pair = np.zeros(temperature.size)
    _, first = np.unique(np.stack([temperature, voltage]), axis=1, return_index=True)
    first_of_pair[first] = 1.0
    short = _too_few_per_temperature(temperature, first_of_pair * (voltage != 0), names, sources)
    if short is None:
        return
    t_bad, count, files = short
    raise InputDataError(
        f"{files}: at {t_bad:g} K only {count} distinct non-zero "
        f"voltage(s) remain after exclusions; at least {MIN_VOLTAGES_PER_TEMPERATURE} are needed "
        "(two points always lie on a straight line, so linearity cannot be tested). If the "
        "temperature column holds the measured temperature of each point, round it to the "
        "set point."
    )


def _check_nonzero_currents(temperature: NDArray[np.float64], current: NDArray[np.float64],
                            names: Sequence[str], sources: NDArray[np.int64]) -> None:
    """Each temperature needs :data:`MIN_VOLTAGES_PER_TEMPERATURE` non-zero currents.

    A sweep read as all zeros (an instrument range too coarse, a wrong column, a unit lost
    to rounding) carries no information about any mechanism; analysing it would crown
    whichever hypothesis best describes nothing.
    """
    short = _too_few_per_temperature(temperature, (current != 0).astype(float), names, sources)
    if short is None:
        return
    t_bad, count, files = short
    raise InputDataError(
        f"{files}: at {t_bad:g} K only {count} current(s) differ "
        f"from 0 A; at least {MIN_VOLTAGES_PER_TEMPERATURE} non-zero currents are needed. Check "
        "the current column and its unit, and the instrument's range"
    )


def read_series(path: Path | str) -> IVSeries:
    """Read a data file or a folder of data files into one checked :class:`IVSeries`.

    Points that cannot carry information are excluded with a
    :class:`~mechid.errors.MechidWarning` and listed in :attr:`IVSeries.excluded`:

    * exact zero bias (``REASON_ZERO_BIAS``), where the current is offset or noise only;
    * a compliance plateau at the top of a sweep (``REASON_COMPLIANCE``), see
      :func:`compliance_mask`.

    Parameters
    ----------
    path : pathlib.Path or str
        A data file, or a folder whose ``*.csv``, ``*.txt`` and ``*.dat`` files are all read.

    Returns
    -------
    IVSeries
        Kept points in K, V and A, sorted by temperature then voltage.

    Raises
    ------
    InputDataError
        Naming the file and the line or column, for a missing or empty file, a missing,
        duplicated or unit-less column, a non-numeric or non-finite cell, a temperature not
        above 0 K, disagreeing temperatures, or too few voltages at a temperature.
    """
    path = Path(path)
    tables = []
    for file_path in _data_files(path):  # a plain loop keeps warning stack levels exact
        tables.append(_read_file(file_path))
    return _checked_series(tables)


def series_from_table(table: Any, *, name: str = "table") -> IVSeries:
    """Build a checked :class:`IVSeries` from in-memory columns (a notebook's way in).

    Parameters
    ----------
    table : mapping or DataFrame-like
        Columns by name, named as in a tidy file header with their units
        (``temperature_K``, ``voltage_mV``, ``current [nA]`` ...): a dict of arrays, or any
        object with ``.columns`` and item access by column name (e.g. a pandas DataFrame).
    name : str
        What messages call the table; rows are numbered from 1 in them.

    Returns
    -------
    IVSeries
        The same checks and exclusions as :func:`read_series` (zero bias, compliance
        plateau, temperature range, at least three voltages and non-zero currents).

    Raises
    ------
    InputDataError
        Naming the column and row, as for a file.
    """
    header = [str(c) for c in (table.columns if hasattr(table, "columns") else table.keys())]
    columns = _recognise_columns(header, name, 1, require=("temperature", "voltage", "current"))
    values: dict[str, NDArray[np.float64]] = {}
    for quantity, column in columns.items():
        try:
            raw = np.asarray(table[column.header], dtype=np.float64).reshape(-1)
        except (TypeError, ValueError):
            raise InputDataError(f"{name}, column {column.header!r}: expected numbers only") from None
        bad = np.flatnonzero(~np.isfinite(raw))
        if bad.size:
            raise InputDataError(
                f"{name}, row {bad[0] + 1}, column {column.header!r}: {raw[bad[0]]!r} is not a "
                "finite number"
            )
        values[quantity] = _to_si(raw, column)
    sizes = {q: v.size for q, v in values.items()}
    if len(set(sizes.values())) != 1:
        raise InputDataError(f"{name}: the columns differ in length {sizes}")
    rows = np.arange(1, values["voltage"].size + 1, dtype=np.int64)
    _check_temperature_column(values["temperature"], rows, name, columns["temperature"])
    return _checked_series([_FileTable(name, rows, values["temperature"], values["voltage"],
                                       values["current"])])


def series_from_arrays(temperature_K: ArrayLike, voltage_V: ArrayLike, current_A: ArrayLike
                       ) -> IVSeries:
    """:func:`series_from_table` for three arrays already in K, V and A."""
    return series_from_table({"temperature_K": temperature_K, "voltage_V": voltage_V,
                              "current_A": current_A}, name="arrays")


def _checked_series(tables: list[_FileTable]) -> IVSeries:
    """Merge read tables, exclude points that carry no information, check what remains."""
    names = [t.source for t in tables]
    sources = np.concatenate([np.full(t.line.size, k) for k, t in enumerate(tables)])
    merged = _FileTable(
        "", np.concatenate([t.line for t in tables]),
        np.concatenate([t.temperature_K for t in tables]),
        np.concatenate([t.voltage_V for t in tables]),
        np.concatenate([t.current_A for t in tables]),
    )
    zero_bias = merged.voltage_V == 0
    at_compliance = compliance_mask(merged.temperature_K, merged.voltage_V, merged.current_A)
    at_compliance &= ~zero_bias
    excluded_zero = _excluded_points(merged, sources, names, zero_bias, REASON_ZERO_BIAS)
    excluded_limit = _excluded_points(merged, sources, names, at_compliance, REASON_COMPLIANCE)
    _warn_excluded(excluded_zero, REASON_ZERO_BIAS)
    _warn_excluded(excluded_limit, REASON_COMPLIANCE)
    keep = ~(zero_bias | at_compliance)
    _check_voltages_per_temperature(merged.temperature_K, np.where(keep, merged.voltage_V, 0.0),
                                    names, sources)
    temperature, voltage, current = (merged.temperature_K[keep], merged.voltage_V[keep],
                                     merged.current_A[keep])
    # Position in the order read: files in the order given, rows (a wide table's temperature
    # columns) in file order; excluded points keep their numbers.
    reading_index = np.flatnonzero(keep).astype(np.int64)
    _check_nonzero_currents(temperature, current, names, sources[keep])
    order = np.lexsort((voltage, temperature))  # stable: repeats keep their reading order
    return IVSeries(temperature[order], voltage[order], current[order], tuple(names),
                    tuple(excluded_zero + excluded_limit), reading_index[order])


def write_series_csv(series: SeriesLike, path: Path | str, *, overwrite: bool = False,
                     comment: str | None = None) -> Path:
    """Write points in the tidy format ``temperature_K,voltage_V,current_A``.

    Values are written with 17 significant digits, so reading the file back gives the same
    float64 numbers.

    Parameters
    ----------
    series : SeriesLike
        Object with ``temperature_K``, ``voltage_V`` and ``current_A`` arrays (K, V, A).
    path : pathlib.Path or str
        File to create.
    overwrite : bool
        Replace an existing file; without it an existing file is an error.
    comment : str, optional
        Text written above the header as ``#`` comment lines (e.g. how data were simulated).

    Returns
    -------
    pathlib.Path
        The path written.

    Raises
    ------
    InputDataError
        If the file exists and ``overwrite`` is False, or the arrays differ in length or hold
        non-finite values.
    """
    path = Path(path)
    columns = [np.asarray(getattr(series, name), dtype=np.float64).reshape(-1)
               for name in ("temperature_K", "voltage_V", "current_A")]
    if len({c.size for c in columns}) != 1:
        raise InputDataError(
            f"cannot write {path}: temperature, voltage and current lengths differ "
            f"({', '.join(str(c.size) for c in columns)})"
        )
    table = np.column_stack(columns)
    if not np.isfinite(table).all():
        raise InputDataError(f"cannot write {path}: the points hold NaN or infinite values")
    header = "temperature_K,voltage_V,current_A"
    if comment:
        header = "\n".join(f"# {line}" for line in comment.splitlines()) + "\n" + header
    try:
        with open(path, "w" if overwrite else "x", encoding="utf-8", newline="\n") as handle:
            np.savetxt(handle, table, fmt="%.17g", delimiter=",", header=header, comments="")
    except FileExistsError:
        raise InputDataError(
            f"{path} already exists; choose another name or allow overwriting"
        ) from None
    except OSError as exc:
        raise InputDataError(f"cannot write {path} ({exc.strerror})") from None
    return path
