"""The mechanism catalogue: the one registry every other module reads.

Each mechanism is declared once, in the module of its family:

* :mod:`mechid.catalogue.tunnelling` -- ``direct_tunnelling``, ``fowler_nordheim``,
  ``dissimilar_electrode_tunnelling``
* :mod:`mechid.catalogue.emission` -- ``schottky_emission``, ``poole_frenkel``
* :mod:`mechid.catalogue.polarity` -- ``schottky_emission_two_barriers``,
  ``fowler_nordheim_two_barriers`` (a barrier per electrode)
* :mod:`mechid.catalogue.hopping` -- ``nearest_neighbour_hopping``, ``mott_vrh``,
  ``mott_vrh_2d``, ``es_vrh``
* :mod:`mechid.catalogue.diode` -- ``schottky_diode``, ``inhomogeneous_schottky_diode``,
  ``lateral_2d_schottky_diode`` (rectifying contacts, signed formulas)
* :mod:`mechid.catalogue.thermionic_field` -- ``thermionic_field_diode`` (Padovani & Stratton's
  tunnelling through the barrier top, with Fermi-Dirac statistics for degenerate doping)
* :mod:`mechid.catalogue.ohmic` -- ``ohmic_activated``
* :mod:`mechid.catalogue.space_charge` -- ``sclc_shallow_traps``, ``sclc_exponential_traps``,
  ``sclc_single_trap_level`` (Lampert's trap-filled-limit rise)
* :mod:`mechid.catalogue.trap_tunnelling` -- ``trap_assisted_tunnelling``,
  ``fowler_nordheim_image_force`` (Murphy-Good rounding with Forbes' v(f); the screening
  cannot tell it from ``fowler_nordheim``, the fit can, see that module)
* :mod:`mechid.catalogue.combinations` -- the composites (two paths in parallel, or a path
  behind a series resistance, built by :mod:`mechid.catalogue.composite`):
  ``poole_frenkel_with_leak``, ``schottky_emission_with_leak``,
  ``direct_tunnelling_with_leak``, ``sclc_single_trap_level_with_leak``,
  ``fowler_nordheim_series_resistance``
"""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager

from mechid.catalogue.base import Mechanism, Parameter, StraightenedPlot
from mechid.catalogue.combinations import COMPOSITES
from mechid.catalogue.diode import (
    INHOMOGENEOUS_SCHOTTKY_DIODE,
    LATERAL_2D_SCHOTTKY_DIODE,
    SCHOTTKY_DIODE,
)
from mechid.catalogue.emission import POOLE_FRENKEL, SCHOTTKY_EMISSION
from mechid.catalogue.hopping import ES_VRH, MOTT_VRH, MOTT_VRH_2D, NEAREST_NEIGHBOUR_HOPPING
from mechid.catalogue.ohmic import OHMIC_ACTIVATED
from mechid.catalogue.polarity import FOWLER_NORDHEIM_TWO_BARRIERS, SCHOTTKY_EMISSION_TWO_BARRIERS
from mechid.catalogue.space_charge import (
    SCLC_EXPONENTIAL_TRAPS,
    SCLC_SHALLOW_TRAPS,
    SCLC_SINGLE_TRAP_LEVEL,
)
from mechid.catalogue.thermionic_field import THERMIONIC_FIELD_DIODE
from mechid.catalogue.trap_tunnelling import FOWLER_NORDHEIM_IMAGE_FORCE, TRAP_ASSISTED_TUNNELLING
from mechid.catalogue.tunnelling import (
    DIRECT_TUNNELLING,
    DISSIMILAR_ELECTRODE_TUNNELLING,
    FOWLER_NORDHEIM,
)
from mechid.errors import UnknownMechanismError

#: All mechanisms, in the order they are listed and reported.
MECHANISMS: tuple[Mechanism, ...] = (
    DIRECT_TUNNELLING,
    DISSIMILAR_ELECTRODE_TUNNELLING,
    FOWLER_NORDHEIM,
    FOWLER_NORDHEIM_TWO_BARRIERS,
    SCHOTTKY_EMISSION,
    SCHOTTKY_EMISSION_TWO_BARRIERS,
    POOLE_FRENKEL,
    OHMIC_ACTIVATED,
    SCLC_SHALLOW_TRAPS,
    SCLC_EXPONENTIAL_TRAPS,
    SCLC_SINGLE_TRAP_LEVEL,
    NEAREST_NEIGHBOUR_HOPPING,
    MOTT_VRH,
    MOTT_VRH_2D,
    ES_VRH,
    SCHOTTKY_DIODE,
    INHOMOGENEOUS_SCHOTTKY_DIODE,
    LATERAL_2D_SCHOTTKY_DIODE,
    THERMIONIC_FIELD_DIODE,
    TRAP_ASSISTED_TUNNELLING,
    FOWLER_NORDHEIM_IMAGE_FORCE,
    *COMPOSITES,
)

_BY_ID = {m.id: m for m in MECHANISMS}


def registered_mechanisms() -> tuple[Mechanism, ...]:
    """Every mechanism registered now: :data:`MECHANISMS` plus any temporarily added."""
    return tuple(_BY_ID.values())


@contextmanager
def temporarily_registered(*mechanisms: Mechanism) -> Iterator[tuple[Mechanism, ...]]:
    """Register extra mechanisms for the duration of a ``with`` block.

    Inside the block they are listed, looked up, screened, fitted and reported exactly like
    the catalogued ones (everything reads the registry through :func:`get_mechanism` and
    :func:`registered_mechanisms`); on leaving they are removed again. Meant for tests and
    for trying a mechanism before adding it to :data:`MECHANISMS`. Fits on worker processes
    (``workers > 1``) start from the built-in catalogue, so fit in-process (``workers=1``).

    Raises
    ------
    ValueError
        When an id is already registered.
    """
    taken = [m.id for m in mechanisms if m.id in _BY_ID]
    if taken or len({m.id for m in mechanisms}) != len(mechanisms):
        raise ValueError(f"mechanism id already registered: {', '.join(taken) or 'duplicate'}")
    _BY_ID.update({m.id: m for m in mechanisms})
    try:
        yield mechanisms
    finally:
        for m in mechanisms:
            _BY_ID.pop(m.id, None)


def mechanism_ids() -> tuple[str, ...]:
    """The stable ids of all registered mechanisms."""
    return tuple(_BY_ID)


def get_mechanism(mechanism_id: str) -> Mechanism:
    """Return the mechanism declared under ``mechanism_id``.

    Raises
    ------
    UnknownMechanismError
        Listing the known ids when ``mechanism_id`` is not one of them.
    """
    try:
        return _BY_ID[mechanism_id]
    except KeyError:
        known = ", ".join(_BY_ID)
        raise UnknownMechanismError(
            f"unknown mechanism {mechanism_id!r}; known mechanisms: {known}"
        ) from None


__all__ = [
    "MECHANISMS",
    "Mechanism",
    "Parameter",
    "StraightenedPlot",
    "get_mechanism",
    "mechanism_ids",
    "registered_mechanisms",
    "temporarily_registered",
]
