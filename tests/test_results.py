"""Result records are frozen and have one JSON converter (mechid.results.to_plain_json)."""

import dataclasses
import json
import math

import numpy as np
import pytest

from mechid.analysis import AnalysisRun
from mechid.inference.adequacy import AdequacyCheck
from mechid.inference.evidence import EvidenceResult
from mechid.inference.fit import MechanismFit
from mechid.inference.flags import SamplerFlag
from mechid.results import (
    NOT_IN_JSON,
    AnalysisResult,
    MechanismResult,
    ParameterSummary,
    SamplingSummary,
    Verdict,
    held_fixed,
    summarise_draws,
    to_plain_json,
)

RECORDS = (ParameterSummary, SamplingSummary, MechanismResult, Verdict, AnalysisResult,
           EvidenceResult, AdequacyCheck, MechanismFit, AnalysisRun)


@pytest.mark.parametrize("record", RECORDS, ids=lambda cls: cls.__name__)
def test_records_are_frozen_dataclasses_without_converters_of_their_own(record):
    # Before: MechanismResult, Verdict, AnalysisResult, EvidenceResult, MechanismFit and
    # AnalysisRun were mutable, and five of them had their own to_dict.
    assert dataclasses.is_dataclass(record)
    assert record.__dataclass_params__.frozen
    assert not hasattr(record, "to_dict")


def test_assigning_to_a_built_record_raises():
    summary = summarise_draws("x_nm", "nm", np.arange(101.0))
    with pytest.raises(dataclasses.FrozenInstanceError):
        summary.median = 0.0  # type: ignore[misc]


def test_parameter_summary_quantiles_match_numpy_percentiles():
    draws = np.random.default_rng(1).normal(3.0, 2.0, 20_000)
    summary = summarise_draws("x_nm", "nm", draws)
    lo95, lo68, mid, hi68, hi95 = np.percentile(draws, [2.5, 16, 50, 84, 97.5])
    assert summary.median == pytest.approx(mid, rel=1e-13)
    assert summary.ci68 == pytest.approx((lo68, hi68), rel=1e-13)
    assert summary.ci95 == pytest.approx((lo95, hi95), rel=1e-13)
    fixed = held_fixed("d_nm", "nm", 5.0)
    assert fixed.fixed and fixed.ci68 == (5.0, 5.0) == fixed.ci95


def test_converter_handles_records_enums_numpy_and_non_finite_numbers():
    @dataclasses.dataclass(frozen=True)
    class Inner:
        flag: SamplerFlag
        values: np.ndarray
        hidden: str = dataclasses.field(default="x", metadata=NOT_IN_JSON)

    payload = {
        "inner": Inner(SamplerFlag.FAR_BELOW, np.array([1.0, np.nan, np.inf])),
        "scalars": (np.float64(2.5), np.int64(3), np.bool_(True), -math.inf),
        "summary": summarise_draws("x_nm", "nm", np.array([1.0, 2.0, 3.0])),
    }
    plain = to_plain_json(payload)
    assert plain["inner"] == {"flag": "far_below", "values": [1.0, None, None]}
    assert plain["scalars"] == [2.5, 3, True, None]
    assert type(plain["scalars"][1]) is int and type(plain["scalars"][2]) is bool
    assert plain["summary"] == {"median": 2.0, "ci68": [pytest.approx(1.32), pytest.approx(2.68)],
                                "ci95": [pytest.approx(1.05), pytest.approx(2.95)], "unit": "nm",
                                "fixed": False, "determined": True, "reasons": []}
    json.dumps(plain, allow_nan=False)


def test_verdict_bayes_factor_is_derived_from_its_logarithm():
    def verdict(ln_b: float) -> Verdict:
        return Verdict(id="a", family="f", probability=0.9, runner_up="b",
                       ln_bayes_factor_vs_runner_up=ln_b, ln_bayes_factor_vs_runner_up_err=0.1,
                       strength="strong", resolved=True, fit_adequate=True, n_candidates=2,
                       prior_odds="equal prior odds", headline="h", failing_statistics=(),
                       quick_run=False, sentence="s")

    # exp(log 20): a few ulp
    assert verdict(math.log(20.0)).bayes_factor_vs_runner_up == pytest.approx(20.0, rel=1e-13)
    assert verdict(800.0).bayes_factor_vs_runner_up == math.inf  # written as null
    assert verdict(-800.0).bayes_factor_vs_runner_up == 0.0
    assert list(to_plain_json(verdict(1.0)))[:5] == [
        "id", "family", "probability", "runner_up", "bayes_factor_vs_runner_up"]
