"""The strategy registry: every circuit is one class, and the rest of the engine
reads the registry instead of naming strategies."""

import dataclasses
import pathlib

import numpy as np
import pytest

from heatload import chain, io, model as m, paths
from heatload.hydraulics import circuits, strategies

ENGINE = pathlib.Path(strategies.__file__).parents[1]   # the heatload package


def test_registry_is_the_list_of_strategies():
    assert m.STRATEGIES == strategies.NAMES == tuple(strategies.REGISTRY)
    fields = {f.name for f in dataclasses.fields(m.StrategyParameters)}
    for name, cls in strategies.REGISTRY.items():
        assert cls.kind == name and cls.description
        assert set(cls.settings) <= fields, name


def test_names_only_in_the_registry_and_the_schema():
    # a strategy is dispatched through its class, not by comparing names
    for path in ENGINE.rglob("*.py"):
        if path.relative_to(ENGINE).as_posix() in ("hydraulics/strategies.py", "io/schema.py"):
            continue
        text = path.read_text(encoding="utf-8")
        for name in strategies.NAMES:
            assert f'"{name}"' not in text, (path.name, name)


def test_unknown_strategy_is_one_line():
    with pytest.raises(Exception) as info:
        strategies.circuit("meter-on")
    assert "expected one of meter-in" in str(info.value)


def test_a_setting_varies_only_where_the_circuit_has_it():
    sc = io.load_scenario(io.default_scenario_path())
    ref = paths.resolve_path(sc, "strategies[*].load_sensing_margin")
    assert [t[1] for t in ref.targets] == [s.name for s in sc.strategies
                                           if s.kind == "load-sensing"]
    with pytest.raises(Exception, match="no such strategy has a bypass_spring"):
        paths.resolve_path(sc, "strategies.meter-in.bypass_spring")


def test_a_new_strategy_is_one_class(monkeypatch):
    # an inlet flow control needing twice the minimum drop, registered as one class:
    # it runs end to end; the relief still sets the pump pressure (fixed pump,
    # common practice), and it reaches the set speed in no more phases than
    # meter-in does
    class DoubleThrottle(strategies.MeterIn):
        kind = "double-throttle"
        description = "meter-in with twice the flow control's minimum drop"

        def available(self, q, c, p1):
            # the relief's pressure less a second drop of the flow control's size:
            # with its own inlet throttle (fc_min_drop) twice the drop in all
            return (circuits._relief_supply(q, c, c["q_theoretical"])
                    - circuits.flow_control_drop(q, c, c["fc_min_drop"]))

    monkeypatch.setitem(strategies.REGISTRY, "double-throttle", DoubleThrottle())
    sc = io.load_scenario(io.default_scenario_path())
    sc = dataclasses.replace(sc, strategies=(m.Strategy("meter-in"),
                                             m.Strategy("double-throttle")))
    a, b = (o.circuit_uncoupled for o in chain.compare(sc).outcomes)
    assert np.all(np.isfinite(b.electric_power))
    assert np.all(np.abs(b.balance_residual) <= 1e-9 * (np.abs(b.electric_power) + 1.0))
    # phases with a set speed both reach (full-flow phases settle where the
    # supply meets the demand, so there the throttle moves the flow)
    both = (~a.flow_limited & ~b.flow_limited & ~a.stalled & ~b.stalled
            & np.isclose(a.actuator_flow, b.actuator_flow, rtol=1e-12, atol=0))
    assert both.any()
    np.testing.assert_allclose(b.pump_pressure[both], a.pump_pressure[both], rtol=1e-12)
    assert (b.flow_limited | b.stalled).sum() >= (a.flow_limited | a.stalled).sum()
