"""Search misses proven by nesting: a mechanism that contains another as a special case.

If mechanism M contains N (M's declaration maps every parameter set of N to one of M's with
the same current, :attr:`mechid.catalogue.base.Mechanism.contains`), then N's best fit, mapped
into M's parameters, is a point M's own search could have found. When that point's log
posterior under M beats the best M's search and sampler found by more than
:data:`MISS_MARGIN` nats, M's search provably missed a better region: its evidence is too low
(a lower bound at best) and every Bayes factor against M is unreliable. The check costs one
likelihood evaluation per nested pair; it proves a miss, it cannot prove there is none.

A second sign of the same failure needs no proof of a better point: M's evidence lies more
than :data:`MISS_MARGIN` below N's although M's own sampler flagged that evidence as unreliable
(:data:`UNRELIABLE_EVIDENCE`: the estimators disagree, the tempered chains hardly swap, the
ladder is too coarse). An Occam factor can put M below N, but not on an evidence its own
sampler distrusts; the analysis then fits M again from N's best fit, as for a proven miss
(seen: a first search that stalled 58 nats below M's best region on a small-spread diode,
its ln Z 321 nats below N's; fitted again, 66 nats above N's).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from mechid.catalogue import get_mechanism
from mechid.catalogue.base import ParameterHints
from mechid.inference.fit import NOISE_PARAMETERS, MechanismFit
from mechid.inference.flags import SamplerFlag
from mechid.inference.settings import SearchSettings
from mechid.inference.start import Mode, find_modes

#: Nats by which the mapped point must beat the best point found to count as a miss (a margin
#: for the differences between the two fits' noise parameters; our choice).
MISS_MARGIN = 5.0
#: Sampler flags that make an evidence below its nested law's a suspected search failure.
UNRELIABLE_EVIDENCE = frozenset({SamplerFlag.EVIDENCE_METHODS_DISAGREE,
                                 SamplerFlag.LOW_SWAP_RATE, SamplerFlag.LADDER_TOO_COARSE})


@dataclass(frozen=True)
class NestedSearchMiss:
    """A mechanism whose search missed the best fit of a mechanism it contains.

    Parameters
    ----------
    mechanism_id, nested_id : str
        The containing mechanism and the special case.
    gain : float
        Log posterior of the nested best fit mapped into ``mechanism_id``, minus the best log
        posterior its own search and sampler found (nats, > MISS_MARGIN); for a suspected
        miss, the nested law's ln Z minus the container's.
    proven : bool
        True: the mapped point beats everything found (a proof). False: the container's
        evidence is below the nested law's and its own sampler flagged it as unreliable.
    """

    mechanism_id: str
    nested_id: str
    gain: float
    proven: bool = True

    def caution(self) -> str:
        """The sentence for the cautions."""
        if not self.proven:
            return (f"{self.mechanism_id} contains {self.nested_id} as a special case, yet its "
                    f"evidence is {self.gain:.0f} nats lower and its sampler flagged that "
                    f"evidence as unreliable: its search probably missed its best region. Do "
                    f"not read the comparison of these two as evidence for {self.nested_id}")
        return (f"{self.mechanism_id} contains {self.nested_id} as a special case, but its "
                f"search missed that region: {self.nested_id}'s best fit, written in "
                f"{self.mechanism_id}'s parameters, is {self.gain:.0f} nats higher in posterior "
                f"density than anything {self.mechanism_id}'s sampler found. Its evidence is "
                f"too low and the Bayes factors against it are not reliable; do not read the "
                f"comparison of these two as evidence for {self.nested_id}")


def best_point(fit: MechanismFit) -> tuple[np.ndarray, float]:
    """The best internal point the fit's mode search and cold chain reached, and its log
    posterior."""
    at_map = float(fit.target.log_posterior(fit.map_internal[None, :])[0])
    chain = np.asarray(fit.run.cold_log_likelihood) + np.asarray(fit.run.cold_log_prior)
    index = np.unravel_index(int(np.argmax(chain)), chain.shape)
    if at_map >= float(chain[index]):
        return fit.map_internal, at_map
    return np.asarray(fit.run.cold_chain)[index], float(chain[index])


def best_found(fit: MechanismFit) -> float:
    """The best log posterior the fit's mode search and cold chain reached."""
    return best_point(fit)[1]


def best_values(fit: MechanismFit) -> dict[str, float]:
    """The physical values (noise parameters included) of the fit's best point."""
    physical = fit.target.physical_values(best_point(fit)[0][None, :])
    return {name: float(value[0, 0]) for name, value in physical.items()}


def mapped_values(container_id: str, nested: MechanismFit) -> dict[str, float]:
    """The nested fit's best point as physical values of the container (noise parameters
    carried over unchanged)."""
    mapping = get_mechanism(container_id).contains[nested.result.id]
    values = best_values(nested)
    return {**mapping(values), **{name: values[name] for name in NOISE_PARAMETERS}}


def mapped_point(container: MechanismFit, nested: MechanismFit) -> np.ndarray | None:
    """The nested fit's best point in the container's internal coordinates (None: outside
    the container's prior)."""
    mapped = mapped_values(container.result.id, nested)
    point = []
    for prior in container.target.free:
        internal = float(prior.to_internal(mapped[prior.name]))
        low, high = prior.internal_bounds()
        if not low <= internal <= high:
            return None
        point.append(internal)
    return np.array(point)


def restart_hints(miss: NestedSearchMiss, fits: Mapping[str, MechanismFit]) -> ParameterHints:
    """Starting values for fitting the container again: the nested best fit, mapped."""
    mapped = mapped_values(miss.mechanism_id, fits[miss.nested_id])
    names = get_mechanism(miss.mechanism_id).parameter_names
    return ParameterHints(miss.mechanism_id, {k: v for k, v in mapped.items() if k in names},
                          {k: f"best fit of {miss.nested_id}" for k in mapped if k in names})


def refit_caution(miss: NestedSearchMiss) -> str:
    """The sentence saying that a missed container was fitted again, and from where."""
    if not miss.proven:
        return (f"{miss.mechanism_id}'s first fit gave an evidence {miss.gain:.0f} nats below "
                f"that of {miss.nested_id}, which it contains as a special case, and its "
                f"sampler flagged that evidence as unreliable; it was fitted again starting "
                f"from {miss.nested_id}'s best fit, and the numbers shown are that fit's")
    return (f"{miss.mechanism_id}'s first search missed the region of {miss.nested_id}, which "
            f"it contains as a special case ({miss.gain:.0f} nats); it was fitted again "
            f"starting from {miss.nested_id}'s best fit, and the numbers shown are that fit's")


def nested_search_misses(fits: Mapping[str, MechanismFit]) -> list[NestedSearchMiss]:
    """Every fitted (container, nested) pair where the container's search provably missed,
    or probably did (an evidence below the nested law's that its sampler flagged)."""
    misses = []
    for container in fits.values():
        for nested_id in get_mechanism(container.result.id).contains:
            nested = fits.get(nested_id)
            if nested is None:
                continue
            point = mapped_point(container, nested)
            gain = (-np.inf if point is None else
                    float(container.target.log_posterior(point[None, :])[0])
                    - best_found(container))
            if np.isfinite(gain) and gain > MISS_MARGIN:
                misses.append(NestedSearchMiss(container.result.id, nested_id, gain))
                continue
            deficit = float(nested.evidence.log_evidence - container.evidence.log_evidence)
            if deficit > MISS_MARGIN and UNRELIABLE_EVIDENCE & set(container.evidence.flags):
                misses.append(NestedSearchMiss(container.result.id, nested_id, deficit,
                                               proven=False))
    return misses


def search_beats(fit: MechanismFit, start: ParameterHints, search: SearchSettings,
                 rng: np.random.Generator, margin: float = MISS_MARGIN) -> Mode | None:
    """A second mode search of ``fit``'s law from ``start`` (and ``search``'s fresh prior
    draws): its best mode when that beats everything the fit reached by more than ``margin``
    nats, else None."""
    mode = find_modes(fit.target, rng, start, search=search)[0]
    if not np.isfinite(mode.log_posterior) or mode.log_posterior <= best_found(fit) + margin:
        return None
    return mode


def beaten_nested_restart(container: MechanismFit, nested: MechanismFit, search: SearchSettings,
                          rng: np.random.Generator, margin: float = MISS_MARGIN
                          ) -> ParameterHints | None:
    """Starting values for fitting a nested law again where its container beats it, or None.

    The reverse of :func:`nested_search_misses`: a container whose evidence beats the law it
    contains may do so because the nested law's own search stalled (seen: homogeneous diode
    data, the plain diode's quick search ~35 nats low, the inhomogeneous and the 2D diode
    ahead of it). A second mode search of the nested law from its best point
    (:func:`search_beats`) decides.
    """
    law = nested.target.mechanism
    own = {name: value for name, value in best_values(nested).items()
           if name in law.parameter_names}
    mode = search_beats(nested, ParameterHints(law.id, own, {name: f"best fit of {law.id}"
                                                             for name in own}),
                        search, rng, margin)
    if mode is None:
        return None
    physical = nested.target.physical_values(mode.point[None, :])
    found = {name: float(physical[name][0, 0]) for name in law.parameter_names}
    return ParameterHints(law.id, found, {name: f"second search of {law.id} (beaten by "
                                         f"{container.result.id})" for name in found})
