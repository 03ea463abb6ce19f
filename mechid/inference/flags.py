"""What the sampler noticed: one typed flag per finding, carrying its meaning and threshold.

:class:`SamplerFlag` is a ``str`` enum, so the JSON keeps the plain strings
(``"not_converged"``, ...). Each member carries its one-line meaning (the words of the
cautions and of ``docs/result-schema.md``, which a test checks against this list) and
whether it is worth a caution when it concerns the leader or the runner-up.
"""

from __future__ import annotations

from enum import StrEnum

#: Swap acceptance below which the ladder is flagged as too sparse (``low_swap_rate``).
LOW_SWAP_RATE = 0.1
#: Required cold-chain length in parameter autocorrelation times (``autocorr_short``; emcee's
#: autocorrelation tutorial: trust tau only for N > 50 tau).
AUTOCORR_MULTIPLE = 50.0
#: A stepping-stone step whose weights have a relative ESS below this is too coarse.
LOW_STEP_ESS = 0.05
#: An evidence more than this many nats below a better mechanism's is not refined (``far_below``).
FAR_BELOW_MARGIN = 50.0


class SamplerFlag(StrEnum):
    """A finding of the sampler or the evidence estimate about one mechanism's fit.

    Attributes
    ----------
    meaning : str
        What it means, in plain words.
    caution : bool
        Whether the analysis turns it into a caution for the leader and the runner-up.
    """

    meaning: str
    caution: bool

    def __new__(cls, value: str, meaning: str, caution: bool) -> SamplerFlag:
        member = str.__new__(cls, value)
        member._value_ = value
        member.meaning = meaning
        member.caution = caution
        return member

    NOT_CONVERGED = (
        "not_converged",
        "the evidence did not reach its precision target within the step cap (its quoted error "
        "is still honest; run longer for a tighter value)",
        True,
    )
    FAR_BELOW = (
        "far_below",
        f"its evidence was not refined because it lies over {FAR_BELOW_MARGIN:g} nats below a "
        "better mechanism: more precision cannot change the ranking",
        True,
    )
    AUTOCORR_SHORT = (
        "autocorr_short",
        f"the chain is shorter than {AUTOCORR_MULTIPLE:g} autocorrelation times: its credible "
        "intervals may be too narrow",
        True,
    )
    LOW_SWAP_RATE = (
        "low_swap_rate",
        "few swaps between ladder rungs: the evidence error may be understated",
        True,
    )
    LADDER_TOO_COARSE = (
        "ladder_too_coarse",
        f"a stepping-stone step's weights have a relative effective sample size below "
        f"{LOW_STEP_ESS:g}",
        False,
    )
    EVIDENCE_METHODS_DISAGREE = (
        "evidence_methods_disagree",
        "stepping-stone and bridge sampling disagree beyond their errors",
        True,
    )
    BRIDGE_FAILED = (
        "bridge_failed",
        "bridge sampling failed, so the stepping-stone value has no independent check",
        False,
    )
    TI_UNDEFINED = (
        "ti_undefined",
        "thermodynamic integration is undefined (a rung's mean or variance of log L is not finite)",
        False,
    )
    MAP_ON_BOUNDARY = (
        "map_on_boundary",
        "a physical parameter's best value lies within one posterior sd of a prior bound "
        "(listed in evidence.boundary_parameters)",
        False,
    )
    MULTIMODAL_SUSPECTED = (
        "multimodal_suspected",
        "the posterior has separated modes (each found mode has its own reference component; "
        "intervals span them)",
        True,
    )
