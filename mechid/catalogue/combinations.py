"""The composite hypotheses the catalogue offers: which combinations of paths are physical.

Each is built from catalogued single mechanisms by :mod:`mechid.catalogue.composite`, so its
formula is its parts' published formulas; only the combination is declared here.

* Emission or tunnelling through the film with an *activated ohmic leak* in parallel (defect
  or edge conduction; Sze & Ng 2007, ch. 4, list ohmic conduction as the low-field path of
  insulators, and Chiu 2014 reviews the leak currents of dielectric films that combine them):
  ``poole_frenkel_with_leak``, ``schottky_emission_with_leak``,
  ``direct_tunnelling_with_leak``. The leak's activation energy may be as small as 5 meV, so
  a plain resistive leak is included.
* Space-charge-limited current through one trap level with an *ohmic path* in parallel:
  ``sclc_single_trap_level_with_leak``. Lampert (1956) and Lampert & Mark (1970, ch. 4)
  describe the whole single-level curve as ohmic (thermal free carriers) at the lowest bias,
  then the trap-limited square law, the trap-filled-limit rise and the trap-free square law;
  the single-level law here omits the thermal carriers, and their ohmic current (activated,
  from the Fermi level) is the parallel path. Adding the two currents is the regional
  approximation Lampert himself uses near the ohmic crossover, not an exact solution there.
* Fowler-Nordheim tunnelling *behind a series resistance* (contact or lead resistance that
  bends the top of a field-emission sweep): ``fowler_nordheim_series_resistance``.

A combination is listed only where both parts describe the same film between the same
electrodes and each can dominate part of a measured window; the analysis fits these after the
single mechanisms, starting from their parts' best fits (:mod:`mechid.inference.path_start`).
"""

from __future__ import annotations

from mechid.catalogue.composite import behind_series_resistance, parallel_paths
from mechid.catalogue.emission import POOLE_FRENKEL, SCHOTTKY_EMISSION
from mechid.catalogue.ohmic import OHMIC_ACTIVATED
from mechid.catalogue.space_charge import SCLC_SINGLE_TRAP_LEVEL
from mechid.catalogue.tunnelling import DIRECT_TUNNELLING, FOWLER_NORDHEIM

POOLE_FRENKEL_WITH_LEAK = parallel_paths(
    POOLE_FRENKEL, OHMIC_ACTIVATED, id="poole_frenkel_with_leak",
    name="Poole-Frenkel emission with an ohmic leak in parallel")
SCHOTTKY_EMISSION_WITH_LEAK = parallel_paths(
    SCHOTTKY_EMISSION, OHMIC_ACTIVATED, id="schottky_emission_with_leak",
    name="Schottky emission with an ohmic leak in parallel")
DIRECT_TUNNELLING_WITH_LEAK = parallel_paths(
    DIRECT_TUNNELLING, OHMIC_ACTIVATED, id="direct_tunnelling_with_leak",
    name="Direct tunnelling with an activated leak in parallel")
SCLC_SINGLE_TRAP_LEVEL_WITH_LEAK = parallel_paths(
    SCLC_SINGLE_TRAP_LEVEL, OHMIC_ACTIVATED, id="sclc_single_trap_level_with_leak",
    name="Space-charge-limited current with one trap level and an ohmic path in parallel")
FOWLER_NORDHEIM_SERIES_RESISTANCE = behind_series_resistance(
    FOWLER_NORDHEIM, id="fowler_nordheim_series_resistance",
    name="Fowler-Nordheim tunnelling behind a series resistance")

#: Every composite, in the order listed (after the single mechanisms).
COMPOSITES = (
    POOLE_FRENKEL_WITH_LEAK,
    SCHOTTKY_EMISSION_WITH_LEAK,
    DIRECT_TUNNELLING_WITH_LEAK,
    SCLC_SINGLE_TRAP_LEVEL_WITH_LEAK,
    FOWLER_NORDHEIM_SERIES_RESISTANCE,
)
