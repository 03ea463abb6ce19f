"""Every setting of the samplers in one place: the tempered ladder and the mode search.

Frozen dataclasses whose defaults are the full analysis; the quick analysis is a named
preset. Nothing else in mechid carries a default for these numbers: functions take a
settings object. The evidence errors each preset reaches are measured in ``benchmarks/``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from mechid.inference.target import FloatArray
from mechid.inference.tempering import (
    DifferentialEvolutionProposal,
    EnsembleProposal,
    SnookerProposal,
    temperature_ladder,
)


def _default_proposals() -> tuple[tuple[EnsembleProposal, float], ...]:
    return ((DifferentialEvolutionProposal(), 0.8), (SnookerProposal(), 0.2))


@dataclass(frozen=True)
class LadderSettings:
    """Settings of the tempered ladder and of the adaptive evidence run.

    The defaults are those of a full analysis (:data:`FULL_LADDER`); build other settings
    with ``dataclasses.replace(FULL_LADDER, ...)`` or by naming the fields that differ.

    Parameters
    ----------
    n_temperatures : int
        Number of rungs ``K`` (>= 2), including beta = 0 and beta = 1.
    beta_power : float
        Ladder exponent: ``beta_k = (k / (K - 1)) ** beta_power``.
    n_walkers : int or None
        Walkers per rung (even, at least ``max(8, 2 * ndim)``); default ``max(32, 4 * ndim)``
        rounded up to even.
    n_burn : int
        Steps discarded before recording.
    n_production : int
        Steps of the first production block (every ``thin``-th is recorded).
    swap_every : int
        Steps between neighbour-swap sweeps; 0 disables swaps (a diagnostic, not for use).
    target_sigma : float
        Stop extending once the batch-means error of the log-evidence is at most this.
    extension_steps : int
        Steps added per extension block.
    max_production : int
        Cap on production steps (burn-in excluded); reaching it without meeting the
        targets gives the ``not_converged`` flag.
    tau_multiple : float
        Required chain length in integrated autocorrelation times of log L (emcee
        autocorrelation tutorial: trust tau only for N > 50 tau).
    thin : int
        Record every ``thin``-th step.
    proposals : tuple of (EnsembleProposal, weight)
        Mixture of ensemble proposals; one is drawn per step (shared by all rungs).
    """

    n_temperatures: int = 8
    beta_power: float = 2.0
    n_walkers: int | None = None
    n_burn: int = 150
    n_production: int = 300
    swap_every: int = 1
    target_sigma: float = 0.1
    extension_steps: int = 200
    max_production: int = 600
    tau_multiple: float = 50.0
    thin: int = 1
    proposals: tuple[tuple[EnsembleProposal, float], ...] = field(
        default_factory=_default_proposals
    )

    def walkers_for(self, ndim: int) -> int:
        """Walkers per rung for a target of ``ndim`` parameters."""
        if self.n_walkers is not None:
            return int(self.n_walkers)
        n = max(32, 4 * ndim)
        return n + (n % 2)

    def betas(self) -> FloatArray:
        """Inverse temperatures of the ladder, increasing from exactly 0 to exactly 1."""
        return temperature_ladder(self.n_temperatures, self.beta_power)

    def validate(self, ndim: int) -> None:
        """Raise ``ValueError`` naming the first inconsistent setting."""
        walkers = self.walkers_for(ndim)
        checks = [
            (self.n_temperatures >= 2, "n_temperatures must be at least 2 (beta = 0 and 1)"),
            (self.beta_power > 0, "beta_power must be positive"),
            (walkers % 2 == 0, f"n_walkers must be even for red-blue updates, got {walkers}"),
            (walkers >= max(8, 2 * ndim), f"n_walkers must be >= max(8, 2*ndim) = "
                                          f"{max(8, 2 * ndim)}, got {walkers}"),
            (self.n_burn >= 0, "n_burn must be >= 0"),
            (self.n_production >= 10 * self.thin,
             "n_production must give at least 10 recorded steps (10 * thin) for batch means"),
            (self.swap_every >= 0, "swap_every must be >= 0 (0 disables swaps)"),
            (self.thin >= 1, "thin must be >= 1"),
            (self.extension_steps >= 1, "extension_steps must be >= 1"),
            (self.target_sigma > 0, "target_sigma must be positive"),
            (len(self.proposals) > 0 and all(w > 0 for _, w in self.proposals),
             "proposals need at least one entry with positive weights"),
        ]
        for ok, message in checks:
            if not ok:
                raise ValueError(f"invalid LadderSettings: {message}")


@dataclass(frozen=True)
class SearchSettings:
    """Settings of the mode search and of the pilot run that fixes the reference.

    The defaults are those of a full analysis (:data:`FULL_SEARCH`).

    Parameters
    ----------
    n_screen : int
        Prior draws screened (vectorised) before polishing
        (:func:`mechid.inference.start.find_modes`).
    n_polish : int
        Diverse screened candidates polished by the mode search; every distinct mode found
        gets its own component in the reference distribution.
    pilot_steps : int
        First block of the emcee pilot run (extended while still climbing).
    pilot_max_steps : int
        Cap on the pilot run's length.
    """

    n_screen: int = 2000
    n_polish: int = 4
    pilot_steps: int = 400
    pilot_max_steps: int = 2000


#: Ladder of a full analysis (see benchmarks/RESULTS.md for the evidence errors).
FULL_LADDER = LadderSettings()
#: Ladder of a quick analysis (``--quick``): rougher evidences, a first look.
QUICK_LADDER = LadderSettings(n_temperatures=5, beta_power=2.0, n_walkers=20, n_burn=60,
                              n_production=120, max_production=120)
#: Mode search and pilot run of a full analysis.
FULL_SEARCH = SearchSettings()
#: Mode search and pilot run of a quick analysis.
QUICK_SEARCH = SearchSettings(n_polish=2, pilot_steps=150, pilot_max_steps=300)
