"""One evaluation for a scenario and for N variants.

A variant equal to the scenario (every overridable field set to its own
value, so every entry goes through the variant branch of the one builder)
must reproduce ``heatload compare`` on every bundled example and every
strategy; an overrunning hydraulic motor must run at the speed of a motor
turned by its load (it pumps: n = Q / (eta_v D), common practice) both ways.
"""

import dataclasses

import numpy as np
import pytest

from heatload import chain, checks, evaluation, io, paths
from heatload.errors import HeatloadError
from heatload.studies import variants

EXAMPLES = io.example_paths()


def _equal_overrides(sc):
    """Every single-target path with a value, set to that value (N = 1)."""
    out = {}
    for p in paths.valid_paths(sc):
        if "[*]" in p:
            continue
        ref = paths.resolve_path(sc, p)
        if len(ref.targets) == 1 and ref.nominal[0] is not None:
            out[p] = [float(ref.nominal[0])]
    return out


def _close(a, b, rtol):
    np.testing.assert_allclose(np.asarray(a, float), np.asarray(b, float), rtol=rtol, atol=0)


@pytest.fixture(scope="module", params=EXAMPLES, ids=lambda p: p.stem)
def example(request):
    sc = io.load_scenario(request.param)
    return sc, chain.compare(sc)


def _agree(sc, o, v, rtol):
    th = o.thermal
    e = o.energy
    _close(v.electric_energy_per_cycle[0], e.electric_energy_per_cycle, rtol)
    _close(v.electric_energy_per_year[0], e.electric_energy_per_year, rtol)
    _close(v.heat_to_oil[0], th.heat_running, rtol)
    _close(v.cycle_time[0], e.cycle_time, rtol)
    _close(v.peak_pressure[0], e.peak_pressure, rtol)
    _close(v.heat_to_oil_uncoupled[0], th.heat_uncoupled, rtol)
    _close(v.oil_temperature_uncoupled[0], th.steady_uncoupled, rtol)
    _close(v.oil_temperature_steady[0], th.steady_coupled, rtol)
    _close(v.oil_temperature_operating[0], th.operating_temperature, rtol)
    _close(v.oil_temperature_cycle_max[0], th.cycle_maximum, rtol)
    _close(v.design_heat[0], th.design_heat, rtol)
    _close(v.cooler_duty[0], th.cooler_duty, rtol)
    # the sweep counts the conditions the report lists
    listed = {}
    for w in o.warnings:
        listed[w.code] = listed.get(w.code, 0) + 1
    for code in checks.PHASE_CODES + checks.CYCLE_CODES:
        assert int(v.warnings[code][0]) == listed.get(code, 0), (o.name, code)


def test_every_example_and_strategy_agrees_with_an_equal_variant(example):
    sc, cmp = example
    over = _equal_overrides(sc)
    assert len(over) > 20
    for o in cmp.outcomes:
        v = variants.evaluate_variants(sc, o.strategy, {k: np.array(x) for k, x in over.items()})
        _agree(sc, o, v, 1e-12)
        # and the scenario itself (no override) as a batch of one
        _agree(sc, o, variants.evaluate_variants(sc, o.strategy), 1e-12)


def _overrunning_conveyor():
    """The conveyor example with its 120 N*m phase overrun (-120 N*m)."""
    sc = io.load_scenario([p for p in EXAMPLES if p.stem == "conveyor_winch"][0])
    phases = tuple(dataclasses.replace(ph, load=-ph.load) if ph.load == pytest.approx(120.0)
                   else ph for ph in sc.phases)
    assert phases != sc.phases
    return dataclasses.replace(sc, phases=phases)


@pytest.mark.parametrize("strategy", ["meter-in", "meter-out", "load-sensing"])
def test_overrunning_motor_sweep_variant_reproduces_compare(strategy):
    sc = _overrunning_conveyor()
    o = chain.compare(sc, [strategy]).outcomes[0]
    disp = sc.power_unit.pump.displacement
    v = variants.evaluate_variants(sc, strategy, {"power_unit.pump.displacement": [disp]},
                                   thermal=True)
    _close(v.electric_energy_per_cycle[0], o.energy.electric_energy_per_cycle, 1e-9)
    _agree(sc, o, v, 1e-12)


def test_overrunning_motor_turns_faster_than_its_flow():
    # a motor overrun by its load pumps: its leakage adds to the speed the flow
    # gives, n = Q / (eta_v D), while a driven motor runs at n = Q eta_v / D
    # (volumetric efficiency of a motor, common practice)
    sc = _overrunning_conveyor()
    act = sc.actuators[0]
    ev = evaluation.evaluate(sc, "meter-in", {"power_unit.pump.displacement":
                                              [sc.power_unit.pump.displacement]}, thermal=False)
    r = ev.uncoupled
    for i, ph in enumerate(sc.phases):
        if ph.actuator and r.speed[0, i] > 0:
            q = r.actuator_flow[0, i]
            ev_, d = act.volumetric_efficiency, act.displacement
            expect = q / (ev_ * d) if ph.load < 0 else q * ev_ / d
            assert r.speed[0, i] == pytest.approx(expect, rel=1e-12), ph.name


def test_rows_of_a_batch_do_not_depend_on_each_other():
    # the same variant alone and inside a batch of different ones
    sc = io.load_scenario(io.default_scenario_path())
    vals = np.array([20e-6, sc.power_unit.pump.displacement, 36e-6])
    many = variants.evaluate_variants(sc, "meter-in", {"power_unit.pump.displacement": vals})
    one = variants.evaluate_variants(sc, "meter-in", {"power_unit.pump.displacement": vals[1:2]})
    for f in ("electric_energy_per_cycle", "oil_temperature_steady", "cooler_duty"):
        _close(getattr(many, f)[1], getattr(one, f)[0], 1e-12)


def test_conductance_of_one_temperature_equals_the_table_lookup():
    # the warm-up's scalar path and the vectorized lookup are one formula:
    # equal to the last bit, at the nodes, between them and beyond the ends
    sc = io.load_scenario(io.default_scenario_path())
    table = evaluation.ConductanceTable(sc, [300.0], np.nan, 1.3)
    ua = table.fn(0)
    t = np.concatenate([np.linspace(250.0, 560.0, 4001), table.t[0],
                        [table.t[0, 0] - 1e-9, evaluation.TABLE_TOP, 600.0]])
    assert np.array_equal([ua(float(x)) for x in t], ua(t))
    # a few rows at a time (a scenario's coupled solve) against the whole batch
    whole = table(t, np.zeros(t.size, int))
    for i in range(0, t.size, 7):
        few = table(t[i:i + 7], np.zeros(len(t[i:i + 7]), int))
        assert np.array_equal(few[0], whole[0][i:i + 7])
        assert np.array_equal(few[1], whole[1][i:i + 7])


def test_many_air_temperatures_give_the_lookups_of_their_own_tables():
    # > 8 air temperatures compute only the nodes a lookup reads; each row
    # must read what the full table of its own air temperature gives
    sc = io.load_scenario(io.default_scenario_path())
    air = np.linspace(280.0, 320.0, 12)
    many = evaluation.ConductanceTable(sc, air)
    t_oil = np.linspace(270.0, 540.0, 12)
    got, slope = many(t_oil)
    for i, (ta, t) in enumerate(zip(air, t_oil)):
        one, one_slope = evaluation.ConductanceTable(sc, [ta])(np.array([t]))
        assert got[i] == one[0] and slope[i] == one_slope[0]


def test_a_sweep_breaking_a_rule_between_fields_is_refused():
    # the solver's inner loop skips the component checks; the batch is
    # checked once: a check valve's rated drop includes its cracking pressure
    # (0.5 bar in the file), so 0.2 bar at rated flow is refused
    from heatload.errors import HeatloadError
    sc = io.load_scenario(io.default_scenario_path())
    with pytest.raises(HeatloadError, match="cracking"):
        variants.evaluate_variants(sc, "meter-in",
                                   {"power_unit.check_valve.pressure_drop": np.array([0.2e5])})


# ---------------------------------------------------------------------------
# strategies side by side (a comparison in one batch)
# ---------------------------------------------------------------------------

def _same(a, b, where):
    """Every figure of two evaluations (or results) equal bit for bit."""
    if isinstance(a, evaluation.circuits.CircuitResult):
        for f in dataclasses.fields(a):
            _same(getattr(a, f.name), getattr(b, f.name), f"{where}.{f.name}")
    elif isinstance(a, dict):
        assert a.keys() == b.keys(), where
        for k in a:
            _same(a[k], b[k], f"{where}[{k}]")
    elif isinstance(a, np.ndarray) or isinstance(b, np.ndarray):
        assert np.array_equal(np.broadcast_to(a, np.shape(b)), b, equal_nan=True) and \
            np.shape(a) == np.shape(b), where
    else:
        assert a == b, where


@pytest.mark.parametrize("thermal", [True, "design", False])
@pytest.mark.parametrize("example", [p.name for p in io.example_paths()])
def test_strategies_side_by_side_equal_each_evaluated_alone(example, thermal):
    sc = next(io.load_scenario(p) for p in io.example_paths() if p.name == example)
    together = evaluation.evaluate_strategies(sc, sc.strategies, thermal=thermal,
                                              hot=thermal is True)
    for st, ev in zip(sc.strategies, together):
        alone = evaluation.evaluate(sc, st, thermal=thermal, hot=thermal is True)
        assert ev.strategy == alone.strategy
        for f in ("uncoupled", "design", "coupled", "operating", "heat_uncoupled",
                  "steady_uncoupled", "cooler_duty", "steady_coupled", "steady_hot",
                  "coupling_iterations", "capacity", "cycle_maximum",
                  "operating_temperature"):
            _same(getattr(alone, f), getattr(ev, f), f"{example} {st.name} {f}")
        assert [c.code for c in ev.conditions] == [c.code for c in alone.conditions]
        for x, y in zip(alone.conditions + alone.cycle_conditions,
                        ev.conditions + ev.cycle_conditions):
            assert np.array_equal(np.asarray(x.mask), np.asarray(y.mask)), (st.name, x.code)
            assert np.array_equal(np.asarray(x.value), np.asarray(y.value), equal_nan=True)


def test_strategies_side_by_side_with_variants():
    # three variants of the pump for two strategies in one batch: each strategy's
    # rows equal its own evaluation of the same variants
    sc = io.load_scenario(io.default_scenario_path())
    over = {"power_unit.pump.displacement": np.array([18e-6, 25e-6, 32e-6]),
            "ambient.temperature": np.array([288.15, 298.15, 308.15])}
    pair = [sc.strategies[0], sc.strategies[-1]]
    together = evaluation.evaluate_strategies(sc, pair, over)
    for st, ev in zip(pair, together):
        alone = evaluation.evaluate(sc, st, over)
        assert ev.n == 3
        for f in ("operating", "steady_coupled", "cooler_duty", "capacity"):
            _same(getattr(alone, f), getattr(ev, f), f"{st.name} {f}")


def test_a_varied_compensator_above_the_relief_is_refused():
    # a sweep reaching the relief's cracking pressure (180 bar) is refused by name,
    # as the file would be (the pump would sit on its relief, not its compensator)
    sc = io.load_scenario(io.default_scenario_path())
    path = "strategies.pressure-compensated.compensator_setting"
    with pytest.raises(HeatloadError, match="compensator_setting.*relief"):
        evaluation.evaluate(sc, "pressure-compensated",
                            {path: np.array([150e5, 175e5, 185e5])}, thermal="design")
    ok = evaluation.evaluate(sc, "pressure-compensated", {path: np.array([150e5, 175e5])},
                             thermal="design")
    assert ok.n == 2
