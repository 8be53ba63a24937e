"""The plausibility checks pass on real results and catch impossible ones."""

import copy
import dataclasses

import numpy as np
import pytest

from heatload import chain, io
from heatload.hydraulics import invariants


@pytest.fixture(scope="module")
def press():
    return chain.compare(io.load_scenario(io.default_scenario_path()))


@pytest.mark.parametrize("path", io.example_paths(), ids=lambda p: p.stem)
def test_examples_are_plausible(path):
    invariants.assert_plausible(chain.compare(io.load_scenario(path)))


def _broken(result, **changes):
    r = copy.copy(result)
    r.losses = dict(result.losses)
    for k, v in changes.items():
        if k.startswith("loss_"):
            r.losses[k[5:]] = v
        else:
            setattr(r, k, v)
    return r


def test_negative_loss_is_caught(press):
    r = press.outcomes[0].circuit
    bad = _broken(r, loss_relief=-np.abs(r.losses["relief"]) - 10.0)
    assert any("negative" in v for v in invariants.circuit_violations(bad))


def test_unbalanced_power_is_caught(press):
    r = press.outcomes[0].circuit
    bad = _broken(r, electric_power=r.electric_power * 1.01)
    assert any("balance" in v for v in invariants.circuit_violations(bad))


def test_nan_is_caught(press):
    r = press.outcomes[0].circuit
    p = r.pump_pressure.copy()
    p[0] = np.nan
    assert any("not finite" in v for v in invariants.circuit_violations(_broken(r, pump_pressure=p)))


def test_temperature_below_ambient_is_caught(press):
    o = press.outcomes[0]
    th = dataclasses.replace(o.thermal, steady_coupled=press.scenario.ambient.temperature - 5.0)
    o2 = dataclasses.replace(o, thermal=th)
    assert any("below ambient" in v for v in invariants.outcome_violations(o2, press.scenario))
    with pytest.raises(invariants.PlausibilityError):
        cmp = dataclasses.replace(press, outcomes=[o2])
        invariants.assert_plausible(cmp)
