"""Coolers from datasheet curves: interpolation by hand, the viscosity
correction of the oil-side drop, the settled temperature against the heat
balance, and the choice of the smallest cooler that holds the limit.

Check values: linear interpolation worked by hand; laminar drop proportional
to viscosity (Hagen-Poiseuille) and smooth-turbulent to viscosity^0.25
(Blasius), White, Fluid Mechanics, Sec. 6.4/6.7; first-law balance
Q = (UA + S)(T - Ta); a differential cylinder returns its flow times the
area ratio (common practice)."""

import dataclasses
import math
from pathlib import Path

import numpy as np
import pytest

from heatload import chain, evaluation, io
from heatload.cooling import cooler_datasheet as cd, sizing
from heatload.errors import HeatloadError

LPM = 1e-3 / 60
LIFT = Path(__file__).resolve().parents[2] / "duty_cycles" / "platform_lift.toml"
CURVE = ((5 * LPM, 10.0), (10 * LPM, 14.0), (20 * LPM, 18.0), (40 * LPM, 21.0))


def test_specific_power_is_the_hand_interpolation():
    # 15 L/min: 14 + (15 - 10) / (20 - 10) x (18 - 14) = 16 W/K
    assert float(cd.specific_cooling_power(CURVE, 15 * LPM)) == pytest.approx(16.0)
    # 30 L/min: 18 + 10/20 x 3 = 19.5 W/K
    assert float(cd.specific_cooling_power(CURVE, 30 * LPM)) == pytest.approx(19.5)
    # below the first point towards 0 at no flow: 2.5 L/min -> 5 W/K
    assert float(cd.specific_cooling_power(CURVE, 2.5 * LPM)) == pytest.approx(5.0)
    # beyond the curve: held at the last value
    assert float(cd.specific_cooling_power(CURVE, 80 * LPM)) == pytest.approx(21.0)


def test_cycle_average_by_hand():
    # 3 s at 15 L/min (16 W/K) and 1 s at 40 L/min (21 W/K): (3 x 16 + 21) / 4 = 17.25
    s = cd.cycle_specific_cooling_power(CURVE, [15 * LPM, 40 * LPM], [3.0, 1.0])
    assert s == pytest.approx(17.25)


def test_pressure_drop_viscosity_bounds_and_extrapolation():
    c = cd.DatasheetCooler("x", CURVE, ((20 * LPM, 0.30e5), (40 * LPM, 0.95e5)), 30e-6)
    assert float(cd.oil_pressure_drop(c, 40 * LPM, 30e-6)) == pytest.approx(0.95e5)
    # 30 L/min at the curve's viscosity: 0.30 + 0.5 x 0.65 = 0.625 bar
    assert float(cd.oil_pressure_drop(c, 30 * LPM, 30e-6)) == pytest.approx(0.625e5)
    # twice as thick: laminar bound, twice the drop (Hagen-Poiseuille)
    assert float(cd.oil_pressure_drop(c, 40 * LPM, 60e-6)) == pytest.approx(1.9e5)
    # 16 x thinner: Blasius bound, (1/16)^0.25 = 0.5
    assert float(cd.oil_pressure_drop(c, 40 * LPM, 30e-6 / 16)) == pytest.approx(0.475e5)
    # beyond the curve: the power law through the last two points,
    # n = ln(0.95/0.30)/ln 2 = 1.663, at 80 L/min 0.95 x 2^n = 3.0 bar
    n = math.log(0.95 / 0.30) / math.log(2.0)
    assert float(cd.oil_pressure_drop(c, 80 * LPM, 30e-6)) == pytest.approx(0.95e5 * 2 ** n)
    assert cd.oil_pressure_drop(cd.DatasheetCooler("y", CURVE), 1e-3, 30e-6) is None


def test_coolers_load_and_round_trip():
    sc = io.load_scenario(LIFT)
    assert [c.name for c in sc.coolers] == ["AO-1 (invented)", "AO-2 (invented)",
                                            "AO-3 (invented)"]
    assert sc.coolers[0].specific_power[2] == pytest.approx((20 * LPM, 18.0))
    assert sc.coolers[1].fan_power == pytest.approx(60.0)
    assert io.loads_scenario(io.dumps_scenario(sc)) == sc


@pytest.mark.parametrize("entry, fragment", [
    ('specific_power = [["20 L/min", "18 W/K"], ["10 L/min", "20 W/K"]]',
     "coolers[0].specific_power: the oil flows of the curve must increase"),
    ('specific_power = [["20 L/min", "18 bar"], ["40 L/min", "20 W/K"]]',
     "coolers[0].specific_power[0]: expected a thermal conductance"),
    ('specific_power = [["20 L/min", "18 W/K"], ["40 L/min", "20 W/K"]]\n'
     'pressure_drop = [["20 L/min", "0.2 bar"], ["40 L/min", "0.6 bar"]]',
     "coolers[0].pressure_drop_viscosity: give the viscosity"),
    ('specific_power = [["20 L/min", "18 W/K"]]', "at least two"),
])
def test_bad_cooler_entries_refused_with_file_and_line(entry, fragment):
    text = LIFT.read_text(encoding="utf-8").split("[[coolers]]")[0]
    text += f'[[coolers]]\nname = "bad"\n{entry}\n'
    with pytest.raises(HeatloadError) as e:
        io.loads_scenario(text, source="lift.toml")
    msg = e.value.one_line()
    assert fragment in msg and msg.startswith("lift.toml:")


@pytest.fixture(scope="module")
def lift():
    sc = io.load_scenario(LIFT)
    outcome = chain.evaluate_strategy(sc, sizing._design_strategy(sc))
    return sc, outcome, cd.rate_coolers(sc, outcome)


def test_settled_temperatures_satisfy_the_heat_balance(lift):
    sc, outcome, sel = lift
    ta = sel.design_ambient
    ua = chain.conductance_fn(sc, ta)
    for r in sel.ratings:
        t = r.settled_temperature
        heat = float(evaluation.mean_heat(chain.solve_at(sc, outcome.strategy, t)))
        shed = (float(ua(t)) + r.specific_power) * (t - ta)
        # first law at the settled temperature, to the chain's 0.01 K tolerance
        assert heat == pytest.approx(shed, abs=0.02 * (float(ua(t)) + r.specific_power))
    temps = [r.settled_temperature for r in sorted(sel.ratings, key=lambda r: r.specific_power)]
    assert temps == sorted(temps, reverse=True)          # more cooler, cooler oil


def test_smallest_cooler_that_holds_the_limit_is_chosen(lift):
    sc, outcome, sel = lift
    holding = [r for r in sel.ratings if r.holds_limit and r.holds_with_margin]
    assert holding and sel.chosen == min(holding, key=lambda r: r.specific_power).name
    assert sel.chosen == "AO-2 (invented)"
    small = next(r for r in sel.ratings if r.name == "AO-1 (invented)")
    assert not small.holds_with_margin
    # over a hot shift a larger cooler needs its fan for less of the time
    by_size = sorted(sel.ratings, key=lambda r: r.specific_power)
    fractions = [r.shift_on_fraction for r in by_size]
    assert fractions == sorted(fractions, reverse=True)
    for r in sel.ratings:
        assert r.holds_limit == (r.settled_temperature <= sel.design_oil_temperature + 1e-9)
        assert r.duty_at_design == pytest.approx(
            r.specific_power * (sel.design_oil_temperature - sel.design_ambient))


def test_peak_return_flow_of_the_differential_cylinder(lift):
    sc, outcome, sel = lift
    res = outcome.circuit
    act = sc.actuators[0]
    ratio = act.bore ** 2 / (act.bore ** 2 - act.rod ** 2)
    for i, ph in enumerate(sc.phases):
        if ph.motion == "retract" and res.actuator_flow[i] > 0:
            # rod side in, cap side out: the return carries the area ratio (80/56 mm: 1.96)
            assert res.outlet_flow[i] / res.actuator_flow[i] == pytest.approx(ratio, rel=1e-6)
    assert sel.peak_return_flow == pytest.approx(float(np.max(cd.return_flow(res))))
    assert sel.peak_return_flow > 1.2 * sel.mean_return_flow


def test_bypass_needed_when_the_drop_exceeds_the_allowed(lift):
    sc, outcome, _ = lift
    tight = dataclasses.replace(sc, cooler=dataclasses.replace(sc.cooler,
                                                               oil_pressure_drop_max=0.1e5))
    sel = cd.rate_coolers(tight, outcome)
    assert all(r.bypass_needed for r in sel.ratings)
    assert not any(r.bypass_needed for r in cd.rate_coolers(sc, outcome).ratings
                   if r.name == "AO-3 (invented)")


def test_cooler_command_lists_the_datasheet_coolers(capsys):
    import json
    from heatload.cli import main
    assert main(["cooler", str(LIFT), "--samples", "20"]) == 0
    out = capsys.readouterr().out
    assert "Datasheet coolers" in out and "* AO-2 (invented)" in out
    assert main(["cooler", str(LIFT), "--samples", "20", "--json"]) == 0
    rec = json.loads(capsys.readouterr().out)
    assert rec["datasheet_coolers"]["chosen"] == "AO-2 (invented)"


def _by_hand(curve, q):
    """Linear interpolation in the datasheet points, (0, 0) first, held beyond the last."""
    pts = [(0.0, 0.0)] + [tuple(p) for p in curve]
    if q >= pts[-1][0]:
        return pts[-1][1]
    for (q1, s1), (q2, s2) in zip(pts, pts[1:]):
        if q1 <= q <= q2:
            return s1 + (s2 - s1) * (q - q1) / (q2 - q1)
    raise AssertionError(q)


def test_sizing_thermostat_shift_runs_on_the_chosen_coolers_curve(lift):
    from heatload.heat import thermal
    sc, outcome, sel = lift
    sz = sizing.size_cooler(sc, outcome)
    t = sz.thermostat
    assert t["cooler"] == sel.chosen == "AO-2 (invented)"
    curve = next(c for c in sc.coolers if c.name == t["cooler"]).specific_power
    # S over the cycle: the curve at each phase's return flow Q_pump - Q_1 + Q_2,
    # time-averaged over the phases, worked by hand
    r = outcome.circuit
    q_ret = np.maximum(r.pump_flow - r.actuator_flow + r.outlet_flow, 0.0)
    s_hand = sum(_by_hand(curve, q) * d for q, d in zip(q_ret, r.duration)) / sum(r.duration)
    assert t["cooler_specific_power_W_K"] == pytest.approx(s_hand, rel=1e-12)
    # the shift with that conductance: C dT/dt = Q - UA (T - Ta) - S (T - Ta) while on
    th, amb = outcome.thermal, sc.ambient
    ua = float(chain.conductance_fn(sc, amb.temperature)(th.steady_coupled))
    run = thermal.thermostat_cooler_run(
        th.phase_heat, th.phase_durations, th.capacity, ua, amb.temperature,
        amb.cold_start_temperature, sc.shift_duration,
        sc.cooler.thermostat_on or th.design_oil_temperature, sc.cooler.thermostat_hysteresis,
        cooler_conductance=s_hand)
    assert t["on_fraction"] == pytest.approx(float(run.on_fraction), rel=1e-9)
    assert t["switch_count"] == len(run.switch_on_times)
    assert t["max_temperature_K"] == pytest.approx(float(np.max(run.maximum_temperature)),
                                                   rel=1e-12)
    # the curve's cooler is not the sized duty: the fan runs for another share
    duty_run = sizing.thermostat_summary(sc, outcome)
    assert duty_run["cooler"] is None
    assert abs(duty_run["on_fraction"] - t["on_fraction"]) > 0.01
    # the same selection is shown and written (one rating, not two)
    assert sizing.sizing_record(sz)["thermostat"]["cooler"] == "AO-2 (invented)"


def test_sizing_thermostat_falls_back_to_the_duty_when_no_listed_cooler_holds(lift):
    sc, outcome, _ = lift
    small = dataclasses.replace(sc, coolers=tuple(c for c in sc.coolers
                                                  if c.name == "AO-1 (invented)"))
    sz = sizing.size_cooler(small, outcome)
    assert sz.datasheet.chosen is None and sz.thermostat["cooler"] is None
    assert any("uses the sized duty" in n for n in sz.notes)
