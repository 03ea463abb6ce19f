"""Number formatting shared by the verdict sentence, the console and the report.

Values are printed with as many digits as their uncertainty supports: the width of the
68 % interval sets the last printed digit (two significant digits of the width, the usual
convention for quoting a result with its uncertainty).
"""

from __future__ import annotations

import math
from collections.abc import Sequence


def last_digit_for(width: float, significant: int = 2) -> int | None:
    """Power of ten of the last digit that shows ``significant`` digits of ``width``."""
    if not (math.isfinite(width) and width > 0):
        return None
    return math.floor(math.log10(width)) - (significant - 1)


def format_number(value: float, last_digit: int | None = None, sig: int = 4) -> str:
    """``value`` printed down to the digit 10**last_digit (``sig`` significant digits if None).

    Magnitudes of 1e5 and above or below 1e-3 use scientific notation.
    """
    if not math.isfinite(value):
        return "n/a"
    magnitude = abs(value)
    exponent = math.floor(math.log10(magnitude)) if magnitude > 0 else 0
    if last_digit is None:
        last_digit = exponent - (sig - 1)
    last_digit = max(last_digit, exponent - 6)  # never more than 7 significant digits
    if magnitude != 0 and (magnitude >= 1e5 or magnitude < 1e-3):
        return f"{value:.{max(exponent - last_digit, 0)}e}"
    return f"{value:.{max(-last_digit, 0)}f}"


def format_interval(lo: float, hi: float, last_digit: int | None) -> str:
    """``"lo to hi"`` with a shared last digit."""
    return f"{format_number(lo, last_digit)} to {format_number(hi, last_digit)}"


def format_estimate(median: float, ci68: tuple[float, float], ci95: tuple[float, float],
                    unit: str = "") -> str:
    """``"1.2001 eV (68 %: 1.1995 to 1.2007; 95 %: 1.1990 to 1.2012)"``."""
    unit_text = "" if unit in ("", "1") else f" {unit}"
    if ci68[0] > 0 and ci68[1] / ci68[0] > 3:  # spans decades: two significant digits each
        return (f"{median:.2g}{unit_text} (68 %: {ci68[0]:.2g} to {ci68[1]:.2g}; "
                f"95 %: {ci95[0]:.2g} to {ci95[1]:.2g})")
    last = last_digit_for(ci68[1] - ci68[0])
    unit_text = "" if unit in ("", "1") else f" {unit}"
    return (f"{format_number(median, last)}{unit_text} (68 %: {format_interval(*ci68, last)}; "
            f"95 %: {format_interval(*ci95, last)})")


#: Posterior probabilities closer than this to 0 or 1 are shown as a bound, never as 0 or 1.
PROBABILITY_RESOLUTION = 1e-3


def format_probability(probability: float) -> str:
    """A posterior probability as ``"> 0.999"``, ``"< 0.001"`` or three significant digits.

    A probability among a finite set of candidates is never exactly 0 or 1, and three digits
    of 0.99996 would print "1"; the bounds say what is known without claiming certainty.
    """
    if not math.isfinite(probability):
        return "n/a"
    if probability > 1.0 - PROBABILITY_RESOLUTION:
        return f"> {1.0 - PROBABILITY_RESOLUTION:g}"
    if probability < PROBABILITY_RESOLUTION:
        return f"< {PROBABILITY_RESOLUTION:g}"
    return f"{probability:.3g}"


DIMENSIONLESS_UNITS = ("", "1")


def unit_suffix(unit: str) -> str:
    """`` unit`` to print after a value, or nothing for a dimensionless value (unit ``"1"``).

    The catalogue writes the unit of a ratio as ``"1"`` (the SI convention for a
    dimensionless quantity); printed after a number it reads as a factor ("0.01912 1").
    """
    return "" if unit in DIMENSIONLESS_UNITS else f" {unit}"


def undetermined_note(reasons: Sequence[str]) -> str:
    """`` [not determined by the data: ...]`` after a parameter's value (empty when none)."""
    return f" [not determined by the data: {'; '.join(reasons)}]" if reasons else ""


def plain_parameter_name(name: str, unit: str) -> str:
    """A parameter's name in prose: ``trap_depth_eV`` -> ``trap depth`` (unit suffix dropped).

    Parameter names carry their unit as a suffix (``_eV``, ``_nm``, ``_S_per_cm`` for S/cm,
    ``_A_per_cm2`` for A/cm^2); the unit is printed after the value instead.
    """
    suffix = "_" + unit.replace("/", "_per_").replace("^", "")
    if unit not in ("", "1") and name.endswith(suffix):
        name = name[: -len(suffix)]
    return name.replace("_", " ")
