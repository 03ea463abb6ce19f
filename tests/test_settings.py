"""One home for the sampler settings: frozen dataclasses, named presets, no drifting defaults."""

import dataclasses
import importlib
import inspect
import pkgutil

import pytest

import mechid
from mechid.analysis import AnalysisSettings
from mechid.inference.settings import (
    FULL_LADDER,
    FULL_SEARCH,
    QUICK_LADDER,
    QUICK_SEARCH,
    LadderSettings,
    SearchSettings,
)


def test_dataclass_defaults_are_the_full_analysis():
    # Before: LadderSettings() had 12 rungs and beta_power 4, the full analysis 8 and 2.
    assert LadderSettings() == FULL_LADDER == AnalysisSettings().ladder()
    assert SearchSettings() == FULL_SEARCH == AnalysisSettings().search()
    assert AnalysisSettings(quick=True).ladder() == QUICK_LADDER
    assert AnalysisSettings(quick=True).search() == QUICK_SEARCH


def test_presets_keep_the_benchmarked_numbers():
    # The numbers benchmarks/RESULTS.md was measured with (must not change silently).
    full = (FULL_LADDER.n_temperatures, FULL_LADDER.beta_power, FULL_LADDER.n_walkers,
            FULL_LADDER.n_burn, FULL_LADDER.n_production, FULL_LADDER.max_production)
    quick = (QUICK_LADDER.n_temperatures, QUICK_LADDER.beta_power, QUICK_LADDER.n_walkers,
             QUICK_LADDER.n_burn, QUICK_LADDER.n_production, QUICK_LADDER.max_production)
    assert full == (8, 2.0, None, 150, 300, 600)
    assert quick == (5, 2.0, 20, 60, 120, 120)
    assert dataclasses.astuple(FULL_SEARCH) == (2000, 4, 400, 2000)
    assert dataclasses.astuple(QUICK_SEARCH) == (2000, 2, 150, 300)


def test_settings_are_frozen_and_overrides_replace_only_the_named_fields():
    with pytest.raises(dataclasses.FrozenInstanceError):
        FULL_LADDER.n_burn = 1  # type: ignore[misc]
    with pytest.raises(dataclasses.FrozenInstanceError):
        QUICK_SEARCH.n_polish = 1  # type: ignore[misc]
    ladder = AnalysisSettings(quick=True, ladder_overrides={"n_burn": 7}).ladder()
    assert ladder == dataclasses.replace(QUICK_LADDER, n_burn=7)


def _functions_of_mechid():
    for info in pkgutil.walk_packages(mechid.__path__, "mechid."):
        if info.name.endswith("__main__"):
            continue
        module = importlib.import_module(info.name)
        for _, obj in inspect.getmembers(module, inspect.isfunction):
            if obj.__module__ == info.name:
                yield f"{info.name}.{obj.__name__}", obj
        for _, cls in inspect.getmembers(module, inspect.isclass):
            if cls.__module__ == info.name and not dataclasses.is_dataclass(cls):
                for name, method in inspect.getmembers(cls, inspect.isfunction):
                    yield f"{info.name}.{cls.__name__}.{name}", method


def test_no_function_carries_its_own_default_for_a_setting():
    # Before: fit_mechanism had n_polish=2 and find_modes n_polish=4 beside the presets.
    settings = {f.name for f in dataclasses.fields(LadderSettings)} | {
        f.name for f in dataclasses.fields(SearchSettings)}
    offenders = [
        f"{where}({parameter.name}={parameter.default!r})"
        for where, function in _functions_of_mechid()
        for parameter in inspect.signature(function).parameters.values()
        if parameter.name in settings and parameter.default is not inspect.Parameter.empty
    ]
    assert offenders == []
