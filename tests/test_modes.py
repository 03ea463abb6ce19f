"""A posterior with two separated modes: both are found, sampled and counted in the evidence."""

from __future__ import annotations

import warnings

import numpy as np

from mechid.catalogue.base import Mechanism, Parameter
from mechid.device import Device
from mechid.errors import MechidWarning
from mechid.inference.fit import fit_mechanism
from mechid.inference.likelihood import MechanismTarget
from mechid.inference.priors import mechanism_priors
from mechid.inference.settings import FULL_SEARCH, LadderSettings, SearchSettings
from mechid.inference.start import find_modes


def _squared_amplitude(lower: float) -> Mechanism:
    """I = a^2 G0 V with G0 = 1 uS: a and -a fit equally well (two modes when lower < 0)."""

    def magnitude(v, t, device, amplitude):
        return amplitude**2 * 1e-6 * v

    return Mechanism(
        id="toy_squared", family="hopping", name="toy", formula="a^2 G0 V", source="test",
        parameters=(
            Parameter("amplitude", "1", "a", "signed amplitude", lower, 2.0, 1.0),
        ),
        magnitude=magnitude, needs_area=False,
    )


def _data():
    rng = np.random.default_rng(11)
    v = np.tile(np.geomspace(0.05, 1.0, 20), 3)
    t = np.repeat([100.0, 200.0, 300.0], 20)
    i = 1.44 * 1e-6 * v * (1 + 0.03 * rng.standard_normal(v.size))
    return v, t, i


def test_both_modes_are_found_sampled_and_counted():
    v, t, i = _data()
    both, half = _squared_amplitude(-2.0), _squared_amplitude(0.0)
    target = MechanismTarget(both, v, t, i, Device(), mechanism_priors(both, Device(), i))
    modes = find_modes(target, np.random.default_rng(0), search=FULL_SEARCH)
    signs = sorted(np.sign(m.point[0]) for m in modes)
    assert signs == [-1.0, 1.0], [m.point for m in modes]

    settings = LadderSettings(n_temperatures=8, beta_power=2.0, n_burn=150, n_production=300,
                              max_production=300)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", MechidWarning)
        fit_both = fit_mechanism(both, v, t, i, Device(), settings, np.random.default_rng(1),
                                 search=FULL_SEARCH)
        fit_half = fit_mechanism(half, v, t, i, Device(), settings, np.random.default_rng(2),
                                 search=SearchSettings(n_polish=2))
    positive = np.mean(fit_both.result.draws["amplitude"] > 0)
    assert 0.3 < positive < 0.7, positive
    assert "multimodal_suspected" in fit_both.evidence.flags
    # Doubling the prior range of `amplitude` halves its prior density and doubles the
    # likelihood mass (the mirror mode), so ln Z is unchanged.
    difference = fit_both.evidence.log_evidence - fit_half.evidence.log_evidence
    tolerance = max(0.2, 4 * np.hypot(fit_both.evidence.log_evidence_err,
                                      fit_half.evidence.log_evidence_err))
    assert abs(difference) < tolerance, (difference, tolerance)
