"""The device under test: geometry and material constants, each with its uncertainty.

The values become priors in the Bayesian fit (a value with a standard uncertainty becomes a
truncated Gaussian prior; a value without one is held fixed), so value and uncertainty are
kept together in :class:`Measured`.

A device description can come from command-line options or from a small TOML file, e.g.::

    # device.toml
    name = "ALD alumina film, wafer 3, pad B2"
    thickness_nm = 6.0
    thickness_sd_nm = 0.3
    area_cm2 = 1e-4
    effective_mass_ratio = 0.4
    effective_mass_sd = 0.05
    optical_dielectric_constant = 2.9
    optical_dielectric_constant_sd = 0.2
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import asdict, dataclass, fields, replace
from pathlib import Path
from typing import Any

from mechid.errors import DeviceError

#: Keys accepted in a device TOML file, with a one-line meaning each.
DEVICE_KEYS: dict[str, str] = {
    "name": "free text naming the sample",
    "thickness_nm": "film thickness in nm (> 0)",
    "thickness_sd_nm": "standard uncertainty of the thickness in nm (>= 0)",
    "area_cm2": "electrode area in cm^2 (> 0)",
    "effective_mass_ratio": "tunnelling effective mass m*/m0 (> 0)",
    "effective_mass_sd": "standard uncertainty of m*/m0 (>= 0)",
    "optical_dielectric_constant": "high-frequency relative permittivity, about n^2 (>= 1)",
    "optical_dielectric_constant_sd": "standard uncertainty of the optical dielectric constant",
    "richardson_constant_A_cm2_K2": "effective Richardson constant A** of the contact in "
                                    "A cm^-2 K^-2 (> 0; 120 x m*/m0 for an isotropic band)",
    "richardson_constant_sd_A_cm2_K2": "standard uncertainty of the Richardson constant",
    "doping_cm3": "net doping of the semiconductor in cm^-3 (> 0)",
    "doping_sd_cm3": "standard uncertainty of the doping in cm^-3",
    "semiconductor_dielectric_constant": "static relative permittivity of the semiconductor (>= 1)",
    "semiconductor_dielectric_constant_sd": "standard uncertainty of that permittivity",
    "semiconductor_effective_mass_ratio": "conduction effective mass of the semiconductor m*/m0 "
                                          "(> 0)",
    "semiconductor_effective_mass_sd": "standard uncertainty of the semiconductor m*/m0",
}

#: (value key, uncertainty key) of every measured quantity, in the order of :class:`Device`.
MEASURED_KEYS: tuple[tuple[str, str], ...] = (
    ("thickness_nm", "thickness_sd_nm"),
    ("effective_mass_ratio", "effective_mass_sd"),
    ("optical_dielectric_constant", "optical_dielectric_constant_sd"),
    ("richardson_constant_A_cm2_K2", "richardson_constant_sd_A_cm2_K2"),
    ("doping_cm3", "doping_sd_cm3"),
    ("semiconductor_dielectric_constant", "semiconductor_dielectric_constant_sd"),
    ("semiconductor_effective_mass_ratio", "semiconductor_effective_mass_sd"),
)


@dataclass(frozen=True)
class Measured:
    """A measured value with an optional standard uncertainty (same unit as the value).

    Parameters
    ----------
    value : float
        Best estimate.
    sd : float or None
        Standard uncertainty; ``None`` or 0 means the value is taken as exact.
    """

    value: float
    sd: float | None = None

    @property
    def is_exact(self) -> bool:
        """True when no uncertainty was given (the parameter is held fixed in fits)."""
        return self.sd is None or self.sd == 0.0


@dataclass(frozen=True)
class Device:
    """Description of the device under test.

    Parameters
    ----------
    thickness_nm : Measured or None
        Insulator (film) thickness in nm.
    area_cm2 : float or None
        Electrode area in cm^2, converts current density to current.
    effective_mass_ratio : Measured or None
        Tunnelling effective mass m*/m0.
    optical_dielectric_constant : Measured or None
        High-frequency relative permittivity (about the square of the refractive index),
        the one that governs image-force and Poole-Frenkel barrier lowering (Sze & Ng 2007).
    name : str or None
        Free text naming the sample.
    richardson_constant_A_cm2_K2 : Measured or None
        Effective Richardson constant A** of a Schottky contact in A cm^-2 K^-2
        (A** = 120 m*/m0 A cm^-2 K^-2 for an isotropic band, Sze & Ng 2007).
    doping_cm3 : Measured or None
        Net doping of the semiconductor of a Schottky contact, in cm^-3.
    semiconductor_dielectric_constant : Measured or None
        Static relative permittivity of that semiconductor.
    semiconductor_effective_mass_ratio : Measured or None
        Conduction effective mass m*/m0 of that semiconductor.
    """

    thickness_nm: Measured | None = None
    area_cm2: float | None = None
    effective_mass_ratio: Measured | None = None
    optical_dielectric_constant: Measured | None = None
    name: str | None = None
    richardson_constant_A_cm2_K2: Measured | None = None
    doping_cm3: Measured | None = None
    semiconductor_dielectric_constant: Measured | None = None
    semiconductor_effective_mass_ratio: Measured | None = None

    def __post_init__(self) -> None:
        _check_measured("thickness_nm", self.thickness_nm, minimum=0.0, strict=True)
        _check_measured("effective_mass_ratio", self.effective_mass_ratio, minimum=0.0, strict=True)
        _check_measured(
            "optical_dielectric_constant", self.optical_dielectric_constant, minimum=1.0,
            strict=False,
        )
        _check_measured("richardson_constant_A_cm2_K2", self.richardson_constant_A_cm2_K2,
                        minimum=0.0, strict=True)
        _check_measured("doping_cm3", self.doping_cm3, minimum=0.0, strict=True)
        _check_measured("semiconductor_dielectric_constant", self.semiconductor_dielectric_constant,
                        minimum=1.0, strict=False)
        _check_measured("semiconductor_effective_mass_ratio",
                        self.semiconductor_effective_mass_ratio, minimum=0.0, strict=True)
        if self.area_cm2 is not None and not (math.isfinite(self.area_cm2) and self.area_cm2 > 0):
            raise DeviceError(f"area_cm2 must be a positive number of cm^2, got {self.area_cm2!r}")

    def merged_with(self, other: Device) -> Device:
        """Return a copy where every value set in ``other`` replaces the one here."""
        updates = {f.name: getattr(other, f.name) for f in fields(other)
                   if getattr(other, f.name) is not None}
        return replace(self, **updates)

    def require_area(self) -> float:
        """Return the area in cm^2, or raise a :class:`DeviceError` saying how to give it."""
        if self.area_cm2 is None:
            raise DeviceError(
                "the electrode area is needed to turn current density into current; "
                "give it with --area-cm2 or as area_cm2 in the device TOML file"
            )
        return self.area_cm2

    def to_dict(self) -> dict[str, Any]:
        """Plain-JSON form: ``{"thickness_nm": {"value": 6.0, "sd": 0.3}, ...}``."""
        return asdict(self)


def _check_measured(name: str, m: Measured | None, *, minimum: float, strict: bool) -> None:
    if m is None:
        return
    ok = math.isfinite(m.value) and (m.value > minimum if strict else m.value >= minimum)
    if not ok:
        relation = ">" if strict else ">="
        raise DeviceError(f"{name} must be a finite number {relation} {minimum:g}, got {m.value!r}")
    if m.sd is not None and not (math.isfinite(m.sd) and m.sd >= 0):
        raise DeviceError(f"the uncertainty of {name} must be a finite number >= 0, got {m.sd!r}")


def _measured(value: float | None, sd: float | None) -> Measured | None:
    return None if value is None else Measured(float(value), None if sd is None else float(sd))


def device_from_values(
    *,
    thickness_nm: float | None = None,
    thickness_sd_nm: float | None = None,
    area_cm2: float | None = None,
    effective_mass_ratio: float | None = None,
    effective_mass_sd: float | None = None,
    optical_dielectric_constant: float | None = None,
    optical_dielectric_constant_sd: float | None = None,
    name: str | None = None,
    **more: float | None,
) -> Device:
    """Build a :class:`Device` from plain numbers (the CLI options and TOML keys).

    ``more`` takes the remaining measured values of :data:`MEASURED_KEYS` (Schottky-contact
    quantities such as ``doping_cm3`` with ``doping_sd_cm3``).

    Raises
    ------
    DeviceError
        If an uncertainty is given without its value, a value is impossible or a keyword is
        not a device value.
    """
    values: dict[str, float | None] = {
        "thickness_nm": thickness_nm, "thickness_sd_nm": thickness_sd_nm,
        "effective_mass_ratio": effective_mass_ratio, "effective_mass_sd": effective_mass_sd,
        "optical_dielectric_constant": optical_dielectric_constant,
        "optical_dielectric_constant_sd": optical_dielectric_constant_sd,
    }
    known = {key for pair in MEASURED_KEYS for key in pair}
    unknown = sorted(set(more) - known)
    if unknown:
        raise DeviceError(f"unknown device value(s) {', '.join(unknown)}")
    values.update(more)
    measured: dict[str, Measured | None] = {}
    for value_name, sd_name in MEASURED_KEYS:
        value, sd = values.get(value_name), values.get(sd_name)
        if value is None and sd is not None:
            raise DeviceError(f"{sd_name} was given without {value_name}")
        measured[value_name] = _measured(value, sd)
    return Device(area_cm2=None if area_cm2 is None else float(area_cm2), name=name, **measured)


def read_device_toml(path: Path) -> Device:
    """Read a device description from a TOML file (keys listed in :data:`DEVICE_KEYS`).

    Raises
    ------
    DeviceError
        Naming the file and the offending key when the file cannot be used.
    """
    try:
        with open(path, "rb") as handle:
            content = handle.read()
    except OSError as exc:
        raise DeviceError(f"{path}: cannot read the device file ({exc.strerror})") from None
    try:
        text = content.decode("utf-8-sig")  # a byte-order mark is accepted, as in data files
    except UnicodeDecodeError as exc:
        raise DeviceError(
            f"{path}: not a UTF-8 text file (byte {exc.start} cannot be decoded); save it as UTF-8"
        ) from None
    try:
        raw = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise DeviceError(f"{path}: not valid TOML ({_shortened(str(exc))})") from None
    except ValueError:  # Python refuses integers of more than 4300 digits
        raise DeviceError(f"{path}: holds a number too long to read; write it with an exponent") from None
    unknown = sorted(set(raw) - set(DEVICE_KEYS))
    if unknown:
        known = ", ".join(DEVICE_KEYS)
        shown = ", ".join(_shortened(k) for k in unknown[:5])
        raise DeviceError(f"{path}: unknown key(s) {shown}; known keys: {known}")
    values: dict[str, Any] = {key: _toml_value(path, key, value) for key, value in raw.items()}
    try:
        return device_from_values(**values)
    except DeviceError as exc:
        raise DeviceError(f"{path}: {exc}") from None


#: Longest device name accepted, and longest piece of a value quoted in a message.
MAX_NAME_CHARACTERS = 200
_MAX_QUOTED = 60


def _shortened(text: str) -> str:
    return text if len(text) <= _MAX_QUOTED else text[:_MAX_QUOTED] + f"... ({len(text)} characters)"


def _toml_value(path: Path, key: str, value: Any) -> str | float:
    """Check one TOML value: ``name`` is a short single-line string, the rest finite numbers."""
    if key == "name":
        if not isinstance(value, str):
            raise DeviceError(
                f"{path}: name must be a text in quotes (e.g. name = \"pad B2\"), got a "
                f"{type(value).__name__}: {_shortened(repr(value))}"
            )
        if len(value) > MAX_NAME_CHARACTERS or not value.isprintable():
            raise DeviceError(
                f"{path}: name must be one line of at most {MAX_NAME_CHARACTERS} printable "
                f"characters, got {_shortened(repr(value))}"
            )
        return value
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise DeviceError(
            f"{path}: {key} must be a number ({DEVICE_KEYS[key]}), got {_shortened(repr(value))}"
        )
    try:
        return float(value)  # NaN and inf are refused, with the key's own rule, by Device
    except OverflowError:
        raise DeviceError(
            f"{path}: {key} must be a finite number ({DEVICE_KEYS[key]}), got an integer of "
            f"about {int(value.bit_length() * math.log10(2)) + 1} digits"
        ) from None


def find_device_toml(data_path: Path) -> Path | None:
    """Return the device file that sits beside a data file or inside a data folder, if any.

    Looked for, in order: ``<data stem>.device.toml`` beside a file, then ``device.toml`` in
    the same folder (or inside the folder when ``data_path`` is a folder).
    """
    folder = data_path if data_path.is_dir() else data_path.parent
    candidates = [] if data_path.is_dir() else [data_path.with_name(f"{data_path.stem}.device.toml")]
    candidates.append(folder / "device.toml")
    return next((c for c in candidates if c.is_file()), None)
