"""The JSON result contract ``mechid.result/1`` (docs/result-schema.md) on a real run.

One quick analysis restricted to two mechanisms (module-scoped, about 15 s) is written with
``--json`` and checked key by key against the schema document, which is parsed here so that
the document and the program cannot drift apart silently.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import pytest
from typer.testing import CliRunner

from mechid.cli import app
from mechid.inference.flags import SamplerFlag

ROOT = Path(__file__).resolve().parents[1]
SCHEMA_DOC = ROOT / "docs" / "result-schema.md"
SERIES = ROOT / "reference_curves" / "larkfield_nanocrystal_mott_vrh"
FITTED = ("mott_vrh", "es_vrh")

# Kass & Raftery (1995), J. Am. Stat. Assoc. 90, 773, section 3.2: 2 ln B in 0-2 "not worth
# more than a bare mention", 2-6 "positive", 6-10 "strong", > 10 "very strong".
KASS_RAFTERY = ((2.0, "not worth more than a bare mention"), (6.0, "positive"), (10.0, "strong"),
                (math.inf, "very strong"))


def _refuse_constant(token: str):
    raise ValueError(f"non-standard JSON token {token}")


@pytest.fixture(scope="module")
def result_text(tmp_path_factory) -> str:
    out = tmp_path_factory.mktemp("contract") / "result.json"
    args = ["analyze", str(SERIES / "data.csv"), "--quick", "--seed", "3", "--json", str(out)]
    for mechanism_id in FITTED:
        args += ["--mechanism", mechanism_id]
    run = CliRunner().invoke(app, args)
    if run.exception is not None and not isinstance(run.exception, SystemExit):
        raise run.exception
    assert run.exit_code == 0, run.output
    return out.read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def result(result_text) -> dict:
    return json.loads(result_text, parse_constant=_refuse_constant)


# --------------------------------------------------------------------------------------------
# Reading the schema document
# --------------------------------------------------------------------------------------------


def _doc_block() -> str:
    """The ```text block of the schema document, with '#' comments removed."""
    text = SCHEMA_DOC.read_text(encoding="utf-8")
    block = re.search(r"```text\n(.*?)```", text, flags=re.S)
    assert block is not None, "docs/result-schema.md has no ```text block"
    return "\n".join(line.split("#", 1)[0].rstrip() for line in block.group(1).splitlines())


def _keys_at_indent(lines: list[str], indent: int) -> set[str]:
    """Keys written as '"key":' on lines indented by exactly ``indent`` spaces."""
    keys: set[str] = set()
    for line in lines:
        if len(line) - len(line.lstrip(" ")) != indent:
            continue
        outer, previous = line, None
        while outer != previous:  # drop objects and lists opened and closed on the line
            previous, outer = outer, re.sub(r"\{[^{}]*\}|\[[^\[\]]*\]", "", outer)
        keys.update(re.findall(r'"(\w+)"\s*:', outer))
    return keys


def _section(block: str, key: str, opener: str = "{", indent: int | None = None) -> str:
    """The text between the bracket opened after '"key":' and its matching closing bracket.

    With ``indent``, only a key written at exactly that indentation counts.
    """
    margin = "^" + " " * indent if indent is not None else ""
    found = re.search(margin + f'"{key}"\\s*:', block, flags=re.M)
    assert found is not None, f"the schema document does not show {key!r}"
    start = block.index(opener, found.end())
    closer = {"{": "}", "[": "]"}[opener]
    depth = 0
    for position in range(start, len(block)):
        depth += {opener: 1, closer: -1}.get(block[position], 0)
        if depth == 0:
            return block[start + 1:position]
    raise AssertionError(f"unbalanced {opener} after {key!r} in the schema document")


def _listed(section: str) -> set[str]:
    """Every key of a section, listed as '"a", "b"' or written '"a": value' (values skipped)."""
    return set(re.findall(r'(?<!:)(?<!:\s)"(\w+)"', section))


def test_document_lists_every_top_level_key(result):
    documented = _keys_at_indent(_doc_block().splitlines(), 2)
    assert documented == set(result)


def test_document_lists_every_mechanism_key(result):
    mechanisms_text = _section(_doc_block(), "mechanisms", "[", indent=2)
    documented = _keys_at_indent(mechanisms_text.splitlines(), 6)
    for entry in result["mechanisms"]:
        assert documented == set(entry)


@pytest.mark.parametrize("path", ["input", "device", "verdict", "linearisation",
                                  "mechanisms/adequacy", "mechanisms/sampling",
                                  "mechanisms/correlations", "mechanisms/priors",
                                  "mechanisms/validity", "prior_sensitivity"])
def test_document_lists_the_keys_of_nested_objects(result, path):
    block = _doc_block()
    if path.startswith("mechanisms/"):
        block = _section(block, "mechanisms", "[", indent=2)
        key = path.split("/")[1]
        objects = [m[key] for m in result["mechanisms"]]
    else:
        key = path
        objects = [result[key]]
    documented = _listed(_section(block, key, "[" if key == "priors" else "{",
                                  indent=None if "/" in path else 2))
    for value in objects:
        items = value if isinstance(value, list) else [value]
        for item in items:
            assert set(item) <= documented, (path, sorted(set(item) - documented))


def test_document_lists_the_keys_of_a_mechanism_not_fitted():
    # Direct tunnelling on 6-10 V data: every barrier of its prior (<= 5 eV) is below eV, so
    # the record lists "bias_below_barrier" (the contract run fits no refused mechanism).
    import numpy as np

    from mechid.catalogue import DIRECT_TUNNELLING
    from mechid.catalogue.validity import validity_violations
    from mechid.device import Device
    from mechid.results import NotFittedMechanism, to_plain_json

    draws = {"barrier_height_eV": np.array([1.0, 4.9]), "thickness_nm": np.array([2.0, 2.0]),
             "effective_mass_ratio": np.array([0.5, 0.5])}
    found = validity_violations(DIRECT_TUNNELLING, np.array([6.0, 10.0]), np.full(2, 77.0),
                                draws, Device(area_cm2=1e-4))
    entry = to_plain_json(NotFittedMechanism(
        id="direct_tunnelling", family="tunnelling", name="direct tunnelling", reason="why",
        violations=found))
    section = _section(_doc_block(), "not_fitted", "[", indent=2)
    assert set(entry) | set(entry["violations"][0]) <= _listed(section)
    assert set(entry["violations"][0]) == _listed(_section(section, "violations", "["))


def test_document_lists_linearisation_entry_keys(result):
    linearisation = _section(_doc_block(), "linearisation", indent=2)
    documented = _listed(_section(linearisation, "mechanisms", "["))
    for entry in result["linearisation"]["mechanisms"]:
        assert set(entry) == documented


def test_document_lists_parameter_summary_keys(result):
    documented = _listed(_section(_section(_doc_block(), "mechanisms", "[", indent=2), "trap_depth_eV"))
    for entry in result["mechanisms"]:
        for summary in entry["parameters"].values():
            assert set(summary) == documented


# --------------------------------------------------------------------------------------------
# The contract itself
# --------------------------------------------------------------------------------------------


def test_strict_json_without_nan_or_infinity(result_text):
    for token in ("NaN", "Infinity"):
        assert token not in result_text
    json.loads(result_text, parse_constant=_refuse_constant)


def test_top_level_identity_input_and_device(result):
    assert result["schema"] == "mechid.result/1"
    assert result["seed"] == 3
    truth = json.loads((SERIES / "truth.json").read_text())
    summary = result["input"]
    assert summary["n_points"] == len(truth["temperatures_K"]) * len(truth["voltages_V"])
    assert summary["n_temperatures"] == len(truth["temperatures_K"])
    assert summary["temperature_range_K"] == [min(truth["temperatures_K"]), max(truth["temperatures_K"])]
    assert summary["n_excluded"] == 0 and summary["n_points_fitted"] == summary["n_points"]
    assert summary["sources"] == ["data.csv"]
    assert result["device"]["area_cm2"] == pytest.approx(truth["device"]["area_cm2"])
    assert result["device"]["thickness_nm"]["value"] == pytest.approx(truth["device"]["thickness_nm"])
    assert result["linearisation"]["ranking"] and result["linearisation"]["mechanisms"]


def test_mechanisms_sorted_and_probabilities_consistent(result):
    mechanisms = result["mechanisms"]
    assert sorted(m["id"] for m in mechanisms) == sorted(FITTED)
    probabilities = [m["probability"] for m in mechanisms]
    assert probabilities == sorted(probabilities, reverse=True)
    assert sum(probabilities) == pytest.approx(1.0, abs=1e-9)
    best = mechanisms[0]["log_evidence"]
    # Equal prior odds: P_k = Z_k / sum Z_j and B_k = Z_k / Z_best.
    log_total = best + math.log(sum(math.exp(m["log_evidence"] - best) for m in mechanisms))
    for m in mechanisms:
        assert isinstance(m["id"], str) and isinstance(m["family"], str)
        assert math.isfinite(m["log_evidence"]) and m["log_evidence_err"] >= 0
        assert m["probability"] == pytest.approx(math.exp(m["log_evidence"] - log_total), abs=1e-12)
        assert m["ln_bayes_factor_vs_best"] == pytest.approx(m["log_evidence"] - best, abs=1e-9)
        assert m["bayes_factor_vs_best"] == pytest.approx(math.exp(m["log_evidence"] - best), rel=1e-9)
        assert m["bayes_factor_vs_best"] <= 1.0


def test_adequacy_and_priors_are_explained(result):
    for m in result["mechanisms"]:
        assert isinstance(m["fit_adequate"], bool)
        adequacy = m["adequacy"]
        assert adequacy["adequate"] is m["fit_adequate"]
        assert adequacy["reduced_chi_square"] > 0
        assert 0.0 <= adequacy["predictive_p_chi_square"] <= 1.0
        assert 0.0 <= adequacy["predictive_p_runs"] <= 1.0
        assert isinstance(adequacy["reasons"], list)
        assert (not m["fit_adequate"]) == bool(adequacy["reasons"])
        assert m["priors"]
        for prior in m["priors"]:
            assert isinstance(prior["description"], str) and prior["description"].strip()
            assert prior["name"] in m["parameters"]


def test_parameters_have_ordered_nested_intervals(result):
    for m in result["mechanisms"]:
        names = set(m["parameters"])
        assert {"noise_relative", "noise_floor_A"} <= names
        assert {p["name"] for p in m["priors"]} <= names
        for name, summary in m["parameters"].items():
            lo68, hi68 = summary["ci68"]
            lo95, hi95 = summary["ci95"]
            assert lo68 <= summary["median"] <= hi68, (m["id"], name)
            assert lo95 <= lo68 and hi68 <= hi95, (m["id"], name)
            assert isinstance(summary["unit"], str)
            assert isinstance(summary["fixed"], bool)


def test_verdict_names_leader_bayes_factor_and_strength(result):
    verdict = result["verdict"]
    first, second = result["mechanisms"][:2]
    assert verdict["id"] == first["id"] and verdict["family"] == first["family"]
    assert verdict["probability"] == first["probability"]
    assert verdict["runner_up"] == second["id"]
    ln_b = first["log_evidence"] - second["log_evidence"]
    assert verdict["ln_bayes_factor_vs_runner_up"] == pytest.approx(ln_b, abs=1e-9)
    if ln_b < 700:  # beyond that exp overflows and the contract writes null
        assert verdict["bayes_factor_vs_runner_up"] == pytest.approx(math.exp(ln_b), rel=1e-9)
    else:
        assert verdict["bayes_factor_vs_runner_up"] is None
    expected = next(words for bound, words in KASS_RAFTERY if 2 * ln_b < bound)
    assert verdict["strength"] == expected
    assert isinstance(verdict["resolved"], bool) and isinstance(verdict["fit_adequate"], bool)
    assert verdict["fit_adequate"] is first["fit_adequate"]
    assert first["id"] in verdict["sentence"]
    assert verdict["n_candidates"] == len(FITTED) and verdict["prior_odds"] == "equal prior odds"
    # the strength word is the headline's only for an adequate leader (issue 11)
    assert (expected in verdict["sentence"]) is verdict["fit_adequate"]
    assert bool(verdict["failing_statistics"]) is not verdict["fit_adequate"]


def _documented_flags() -> list[tuple[str, str]]:
    """(name, meaning) of each item of the schema document's list of sampler flags."""
    text = SCHEMA_DOC.read_text(encoding="utf-8")
    section = text[text.index("`sampling.flags` (and `evidence.flags`)"):]
    section = section[:section.index("\n\n", section.index("\n- "))]
    return re.findall(r"^- `([a-z_]+)`: (.+)\.$", section, flags=re.MULTILINE)


def test_document_lists_exactly_the_sampler_flags_with_their_meanings():
    # The enum is the one place flags are made and explained; the document must say the same.
    documented = _documented_flags()
    assert documented == [(flag.value, flag.meaning) for flag in SamplerFlag]


def test_flags_in_the_json_are_plain_strings_of_the_enum(result):
    for mechanism in result["mechanisms"]:
        for flags in (mechanism["sampling"]["flags"], mechanism["evidence"]["flags"]):
            assert all(isinstance(flag, str) and SamplerFlag(flag).meaning for flag in flags)


@pytest.mark.parametrize("key", ["comparisons", "evidences"])
def test_document_lists_the_prior_sensitivity_records(result, key):
    section = _section(_section(_doc_block(), "prior_sensitivity", "{", indent=2), key, "[")
    entries = result["prior_sensitivity"][key]
    assert result["prior_sensitivity"]["computed"] and entries
    for entry in entries:
        assert set(entry) == _listed(section)
