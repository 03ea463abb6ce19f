"""Plain result objects of an analysis and the one function that writes the JSON contract.

The JSON contract (``"schema": "mechid.result/1"``) is documented in ``docs/result-schema.md``;
reports and the command line read these objects, never raw sampler state.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray

from mechid import __version__

SCHEMA = "mechid.result/1"


@dataclass(frozen=True)
class ParameterSummary:
    """Posterior summary of one parameter in physical units."""

    name: str
    unit: str
    median: float
    ci68: tuple[float, float]
    ci95: tuple[float, float]
    fixed: bool = False

    def to_dict(self) -> dict[str, Any]:
        """The contract's ``{"median", "ci68", "ci95", "unit"}`` (plus ``fixed``)."""
        return {"median": self.median, "ci68": list(self.ci68), "ci95": list(self.ci95),
                "unit": self.unit, "fixed": self.fixed}


def summarise_draws(name: str, unit: str, draws: NDArray) -> ParameterSummary:
    """Median and central 68 % / 95 % credible intervals of 1-D posterior draws."""
    q = np.quantile(np.asarray(draws, dtype=float), [0.025, 0.16, 0.5, 0.84, 0.975])
    return ParameterSummary(name, unit, float(q[2]), (float(q[1]), float(q[3])),
                            (float(q[0]), float(q[4])))


@dataclass
class MechanismResult:
    """Everything learned about one mechanism from the joint fit."""

    id: str
    family: str
    name: str
    formula: str
    source: str
    log_evidence: float
    log_evidence_err: float
    probability: float = float("nan")
    probability_err: float = float("nan")
    ln_bayes_factor_vs_best: float = float("nan")
    ln_bayes_factor_vs_best_err: float = float("nan")
    fit_adequate: bool = False
    adequacy: dict[str, Any] = field(default_factory=dict)
    priors: list[dict[str, Any]] = field(default_factory=list)
    parameters: dict[str, ParameterSummary] = field(default_factory=dict)
    correlations: dict[str, Any] = field(default_factory=dict)
    evidence: dict[str, Any] = field(default_factory=dict)
    sampling: dict[str, Any] = field(default_factory=dict)
    map_parameters: dict[str, float] = field(default_factory=dict)
    # Posterior draws in physical units (not serialised into the JSON; see --samples).
    draws: dict[str, NDArray] = field(default_factory=dict, repr=False)

    def to_dict(self) -> dict[str, Any]:
        """The contract entry of ``"mechanisms"``."""
        return {
            "id": self.id, "family": self.family, "name": self.name,
            "formula": self.formula, "source": self.source,
            "log_evidence": self.log_evidence, "log_evidence_err": self.log_evidence_err,
            "probability": self.probability, "probability_err": self.probability_err,
            "bayes_factor_vs_best": _exp_or_zero(self.ln_bayes_factor_vs_best),
            "ln_bayes_factor_vs_best": self.ln_bayes_factor_vs_best,
            "ln_bayes_factor_vs_best_err": self.ln_bayes_factor_vs_best_err,
            "fit_adequate": self.fit_adequate, "adequacy": self.adequacy,
            "priors": self.priors,
            "parameters": {k: v.to_dict() for k, v in self.parameters.items()},
            "map_parameters": self.map_parameters,
            "correlations": self.correlations,
            "evidence": self.evidence, "sampling": self.sampling,
        }


def _exp_or_zero(ln_value: float) -> float:
    """exp(ln_value), 0 on underflow and inf (written as null) on overflow."""
    if math.isnan(ln_value):
        return float("nan")
    if ln_value > 709.0:
        return float("inf")
    return math.exp(ln_value) if ln_value > -745 else 0.0


@dataclass
class Verdict:
    """The headline: the leading mechanism and how strongly the data prefer it."""

    id: str
    family: str
    probability: float
    ln_bayes_factor_vs_runner_up: float
    ln_bayes_factor_vs_runner_up_err: float
    runner_up: str | None
    strength: str
    resolved: bool
    fit_adequate: bool
    sentence: str

    def to_dict(self) -> dict[str, Any]:
        """The contract's ``"verdict"`` object."""
        return {
            "id": self.id, "family": self.family, "probability": self.probability,
            "runner_up": self.runner_up,
            "bayes_factor_vs_runner_up": _exp_or_zero(self.ln_bayes_factor_vs_runner_up),
            "ln_bayes_factor_vs_runner_up": self.ln_bayes_factor_vs_runner_up,
            "ln_bayes_factor_vs_runner_up_err": self.ln_bayes_factor_vs_runner_up_err,
            "strength": self.strength, "resolved": self.resolved,
            "fit_adequate": self.fit_adequate, "sentence": self.sentence,
        }


@dataclass
class AnalysisResult:
    """The whole outcome of ``mechid analyze``."""

    input: dict[str, Any]
    device: dict[str, Any]
    linearisation: dict[str, Any]
    mechanisms: list[MechanismResult]
    verdict: Verdict | None
    settings: dict[str, Any]
    cautions: list[str] = field(default_factory=list)
    seed: int | None = None

    def to_dict(self) -> dict[str, Any]:
        """The full JSON contract ``mechid.result/1``."""
        return {
            "schema": SCHEMA,
            "mechid_version": __version__,
            "seed": self.seed,
            "input": self.input,
            "device": self.device,
            "settings": self.settings,
            "linearisation": self.linearisation,
            "mechanisms": [m.to_dict() for m in self.mechanisms],
            "verdict": None if self.verdict is None else self.verdict.to_dict(),
            "cautions": list(self.cautions),
        }

    def mechanism(self, mechanism_id: str) -> MechanismResult:
        """The result for one mechanism id."""
        return next(m for m in self.mechanisms if m.id == mechanism_id)


def to_plain_json(value: Any) -> Any:
    """Convert NumPy scalars/arrays, tuples and non-finite floats (-> None) to plain JSON."""
    if isinstance(value, dict):
        return {str(k): to_plain_json(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [to_plain_json(v) for v in value]
    if isinstance(value, np.ndarray):
        return to_plain_json(value.tolist())
    if isinstance(value, np.bool_ | bool):
        return bool(value)
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, float | np.floating):
        value = float(value)
        return value if math.isfinite(value) else None
    return value


def write_json(result: AnalysisResult, path: Path) -> None:
    """Write the result as strict JSON (non-finite numbers become null)."""
    text = json.dumps(to_plain_json(result.to_dict()), indent=2, allow_nan=False)
    path.write_text(text + "\n", encoding="utf-8")


def write_samples(result: AnalysisResult, path: Path) -> None:
    """Write posterior draws (physical units) of every mechanism to a ``.npz`` file.

    Arrays are named ``<mechanism id>/<parameter name>``; ``seed`` is stored as well.
    """
    arrays = {f"{m.id}/{name}": values for m in result.mechanisms for name, values in m.draws.items()}
    arrays["seed"] = np.array(-1 if result.seed is None else result.seed)
    with open(path, "wb") as handle:
        np.savez_compressed(handle, **arrays)
