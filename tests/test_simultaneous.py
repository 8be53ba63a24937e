"""Tests of phases that move several actuators at once on one supply.

1. Hand checks with an ideal circuit (loss-free pump, no line or valve drops):
   two cylinders extending together under a fixed pump with meter-in flow
   controls, a pressure-compensated pump, a load-sensing pump and a
   variable-speed pump; every pressure, flow and throttling loss is written
   out as arithmetic here (p = F / A, Q = v A, P = dp Q).
2. Saturation: demands beyond the pump are shared in proportion to the set flows.
3. Property test (hypothesis): input power = useful power + losses in every
   phase of random two-motion cycles, and each motion's own balance.
4. The file form: loading, refusals naming the field, writing back.
"""

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from heatload import checks, model as m
from heatload.hydraulics import circuits, cycle, invariants
from heatload.errors import HeatloadError
from heatload.model import STRATEGIES

# the ram: 100/70 mm; the door: 63/36 mm
A1 = math.pi / 4 * 0.100**2                   # pi D^2 / 4 (geometry) = 78.54 cm^2
A1_DOOR = math.pi / 4 * 0.063**2              # 31.17 cm^2
D_PUMP, N_PUMP = 28e-6, 1450 / 60             # model.Pump defaults [m^3/rev], [rev/s]
Q_TH = D_PUMP * N_PUMP                        # D n = 40.6 L/min
P_RELIEF = 180e5                              # model.ReliefValve default cracking

F_RAM, V_RAM = 50e3, 0.05                     # 50 kN at 0.05 m/s
F_DOOR, V_DOOR = 5e3, 0.04                    # 5 kN at 0.04 m/s
Q_RAM = V_RAM * A1                            # Q = v A: 23.56 L/min
Q_DOOR = V_DOOR * A1_DOOR                     # 7.48 L/min
P_RAM = F_RAM / A1                            # p = F / A (outlet to tank): 63.66 bar
P_DOOR = F_DOOR / A1_DOOR                     # 16.04 bar

ACTUATORS = (m.Cylinder("ram", bore=0.100, rod=0.070, stroke=0.5),
             m.Cylinder("door", bore=0.063, rod=0.036, stroke=0.6))


def _phase(door_speed=V_DOOR, door_first=False):
    ram = dict(actuator="ram", motion="extend", load=F_RAM, speed=V_RAM)
    door = dict(actuator="door", motion="extend", load=F_DOOR, speed=door_speed)
    own, other = (door, ram) if door_first else (ram, door)
    return m.Phase("close", stroke=0.4 if own is ram else None,
                   duration=None if own is ram else 8.0, **own,
                   simultaneous=(m.Motion(**other),))


def _scenario(phases, **params):
    par = m.StrategyParameters(**params)
    return m.Scenario("two", tuple(phases), ACTUATORS,
                      tuple(m.Strategy(s, parameters=par) for s in STRATEGIES))


def _solve(sc, strategy, **over):
    """Solved with a loss-free pump and no line, valve or override drops."""
    c = dict(cycle.circuit_inputs(sc, strategy))
    for k in ("pump_slip", "pump_viscous", "pump_friction", "check_cracking",
              "pline_l", "rline_l", "pline_k", "rline_k", "relief_override",
              "dv_rated_drop", "check_rated_drop", "dv_centre_drop"):
        c[k] = 0.0
    for k in [k for k in c if k.endswith("compress")]:
        c[k] = np.zeros(len(sc.phases), dtype=bool)
    c.update(over)
    c = cycle.finalize(c)
    return circuits.solve_strategy(strategy, c), c


def _close(a, b, rel=1e-9, abs_=1e-9):
    return a == pytest.approx(b, rel=rel, abs=abs_)


def _throttle(r, b):
    return r.motions[(b, ("loss", "flow_control"))][0]


SC = _scenario([_phase()])


# ---------------------------------------------------------------------------
# 1. hand checks
# ---------------------------------------------------------------------------

def test_meter_in_two_motions_by_hand():
    r, _ = _solve(SC, "meter-in")
    # fixed pump at the relief; each flow control throttles relief - its load
    # pressure (common practice): 180 - 63.66 bar on the ram, 180 - 16.04 on the door
    assert _close(r.pump_pressure[0], P_RELIEF)
    assert _close(r.pump_flow[0], Q_TH)                      # the whole pump flow
    assert _close(r.relief_flow[0], Q_TH - Q_RAM - Q_DOOR)   # 40.6 - 31.04 L/min
    assert _close(r.motions[(0, "flow")][0], Q_RAM)
    assert _close(r.motions[(1, "flow")][0], Q_DOOR)
    assert _close(r.motions[(1, "inlet_pressure")][0], P_DOOR)
    assert _close(_throttle(r, 0), Q_RAM * (P_RELIEF - P_RAM))
    assert _close(_throttle(r, 1), Q_DOOR * (P_RELIEF - P_DOOR))
    # the door's: 7.48 L/min x 163.96 bar / 600 = 2.04 kW (P[kW] = p[bar] Q[L/min]/600)
    assert _throttle(r, 1) / 1e3 == pytest.approx(7.4813 * 163.96 / 600, rel=1e-4)
    assert _close(r.losses["flow_control"][0], _throttle(r, 0) + _throttle(r, 1))
    assert _close(r.losses["relief"][0], (Q_TH - Q_RAM - Q_DOOR) * P_RELIEF)
    # useful F v of both; ideal pump: shaft = 180 bar x 40.6 L/min / 600 = 12.18 kW
    assert _close(r.useful_power[0], F_RAM * V_RAM + F_DOOR * V_DOOR)
    assert r.shaft_power[0] / 1e3 == pytest.approx(180 * 40.6 / 600, rel=1e-9)
    assert abs(r.balance_residual[0]) < 1e-6


def test_pressure_compensated_two_motions_by_hand():
    p_c = 150e5
    r, _ = _solve(_scenario([_phase()], compensator_setting=p_c), "pressure-compensated")
    # pump at its setting delivering the sum of the flows; each compensator
    # (flow control) throttles the setting down to its load (common practice)
    assert _close(r.pump_pressure[0], p_c)
    assert _close(r.pump_flow[0], Q_RAM + Q_DOOR)            # 31.04 L/min
    assert r.relief_flow[0] == 0
    assert _close(_throttle(r, 0), Q_RAM * (p_c - P_RAM))
    assert _close(_throttle(r, 1), Q_DOOR * (p_c - P_DOOR))
    assert _close(r.displacement_fraction[0], (Q_RAM + Q_DOOR) / Q_TH)
    # ideal pump: shaft = 150 bar x 31.04 L/min / 600 = 7.76 kW
    assert r.shaft_power[0] == pytest.approx(p_c * (Q_RAM + Q_DOOR), rel=1e-9)


@pytest.mark.parametrize("door_first", [False, True])
def test_load_sensing_two_motions_by_hand(door_first):
    margin = 20e5      # model.StrategyParameters.load_sensing_margin default
    r, _ = _solve(_scenario([_phase(door_first=door_first)]), "load-sensing")
    # pump at the highest load + margin, 63.66 + 20 = 83.66 bar, whichever motion is
    # the phase's own; the ram meters with the margin, the lighter door's compensator
    # throttles the difference (common practice)
    p_pump = P_RAM + margin
    ram, door = (1, 0) if door_first else (0, 1)
    assert _close(r.pump_pressure[0], p_pump)
    assert _close(r.pump_flow[0], Q_RAM + Q_DOOR)
    assert _close(_throttle(r, ram), Q_RAM * margin)
    assert _close(_throttle(r, door), Q_DOOR * (p_pump - P_DOOR))
    # the door's: 7.48 L/min x 67.62 bar / 600 = 0.843 kW
    assert _throttle(r, door) / 1e3 == pytest.approx(7.4813 * 67.62 / 600, rel=1e-3)
    assert r.shaft_power[0] == pytest.approx(p_pump * (Q_RAM + Q_DOOR), rel=1e-9)
    assert abs(r.balance_residual[0]) < 1e-6


def test_variable_speed_two_motions_by_hand():
    r, _ = _solve(SC, "variable-speed")
    # the pump turns for the sum of the flows at the heavier load's pressure; the
    # lighter door's valve throttles the difference
    assert _close(r.pump_pressure[0], P_RAM)
    assert _close(r.pump_shaft_speed[0], (Q_RAM + Q_DOOR) / D_PUMP)
    assert _close(r.pump_flow[0], Q_RAM + Q_DOOR)
    assert abs(_throttle(r, 0)) < 1e-6
    assert _close(_throttle(r, 1), Q_DOOR * (P_RAM - P_DOOR))
    assert r.shaft_power[0] == pytest.approx(P_RAM * (Q_RAM + Q_DOOR), rel=1e-9)


@pytest.mark.parametrize("strategy", ["bleed-off", "bypass-compensated"])
def test_bleed_off_and_bypass_at_the_heavier_load(strategy):
    r, c = _solve(SC, strategy)
    spring = 8e5 if strategy == "bypass-compensated" else 0.0  # 3-way spring default
    # pump at the heavier load (+ the 3-way spring); the surplus leaves at that
    # pressure; the lighter door's valve throttles the difference
    p_pump = P_RAM + spring
    assert _close(r.pump_pressure[0], p_pump)
    assert _close(r.bleed_flow[0] + r.relief_flow[0], Q_TH - Q_RAM - Q_DOOR)
    assert _close(_throttle(r, 1), Q_DOOR * (p_pump - P_DOOR))
    assert _close(_throttle(r, 0), Q_RAM * spring)


@pytest.mark.parametrize("strategy", ["hi-lo", "accumulator"])
def test_hi_lo_and_accumulator_sum_the_flows(strategy):
    sc = _scenario([_phase(), m.Phase("idle", None, "idle", duration=30.0)])
    r, _ = _solve(sc, strategy)
    one, _ = _solve(_scenario([dataclasses.replace(_phase(), simultaneous=()),
                               m.Phase("idle", None, "idle", duration=30.0)]), strategy)
    # the circuit delivers the sum: the accumulator's duty grows by the door's volume
    if strategy == "accumulator":
        t = 0.4 / V_RAM                                   # 8 s
        assert r.pump_duty[0] == pytest.approx(
            one.pump_duty[0] * (Q_RAM + Q_DOOR) / Q_RAM, rel=1e-9)
        assert _close(r.pump_flow[0], Q_RAM + Q_DOOR)
        assert r.pump_duty[0] == pytest.approx((Q_RAM + Q_DOOR) * t / (Q_TH * 38.0),
                                               rel=1e-9)
    else:
        # below the unloading pressure (60 bar default: a third of 180) the ram's
        # 63.66 bar needs the small pump alone: 10.15 L/min shared in proportion
        assert r.flow_limited[0]
        share = 0.25 * Q_TH / (Q_RAM + Q_DOOR)
        assert _close(r.motions[(0, "flow")][0], share * Q_RAM)
        assert _close(r.motions[(1, "flow")][0], share * Q_DOOR)
    assert abs(r.balance_residual).max() < 1e-6


# ---------------------------------------------------------------------------
# 2. saturation: proportional flow sharing, flagged
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("strategy", ["meter-in", "pressure-compensated", "load-sensing"])
def test_saturation_shares_the_pump_in_proportion(strategy):
    v_door = 0.12                                  # 22.44 L/min: 46.0 > 40.6 L/min
    sc = _scenario([_phase(door_speed=v_door)])
    r, c = _solve(sc, strategy)
    s = Q_TH / (Q_RAM + v_door * A1_DOOR)          # 0.882: each gets 88 % of its set flow
    assert r.flow_limited[0]
    assert _close(r.motions[(0, "flow")][0], s * Q_RAM, rel=1e-7)
    assert _close(r.motions[(1, "flow")][0], s * v_door * A1_DOOR, rel=1e-7)
    assert _close(r.motions[(1, "speed")][0] / v_door, r.speed[0] / V_RAM, rel=1e-9)
    warnings = checks.phase_warnings(checks.phase_conditions(r, c, sc), sc)
    text = [w.message for w in warnings if w.code == "speed-not-reached"]
    assert text and "in proportion to the set flows" in text[0] and "88 %" in text[0]


# ---------------------------------------------------------------------------
# 3. balance of random two-motion phases
# ---------------------------------------------------------------------------

@st.composite
def two_motion_cycles(draw):
    relief = draw(st.floats(80e5, 300e5))
    pump = m.Pump(displacement=draw(st.floats(10e-6, 80e-6)),
                  volumetric_efficiency=draw(st.floats(0.85, 0.98)),
                  hydromechanical_efficiency=draw(st.floats(0.8, 0.95)))
    pu = m.PowerUnit(pump=pump, relief=m.ReliefValve(cracking_pressure=relief))
    acts = (m.Cylinder("a", bore=draw(st.floats(0.04, 0.16)), rod=0.03, stroke=1.0,
                       friction_force=draw(st.floats(0.0, 1e3)), dead_volume=1e-4),
            m.Cylinder("b", bore=draw(st.floats(0.04, 0.16)), rod=0.03, stroke=1.0,
                       back_pressure=draw(st.one_of(st.none(), st.floats(1e5, 10e5)))),
            m.HydraulicMotor("h", displacement=draw(st.floats(20e-6, 200e-6))))
    phases = []
    for i in range(draw(st.integers(1, 3))):
        own = draw(st.sampled_from(["a", "b"]))
        other = draw(st.sampled_from([x for x in ("a", "b", "h") if x != own]))
        motion = draw(st.sampled_from(["extend", "retract"]))
        area = math.pi / 4 * 0.1**2
        load = draw(st.floats(-0.5, 1.2)) * relief * area * 0.3
        other_motion = "run" if other == "h" else draw(st.sampled_from(
            ["extend", "retract", "hold"]))
        extra = m.Motion(other, other_motion,
                         load=draw(st.floats(-0.3, 1.0)) * relief * 1e-4,
                         speed=None if other_motion == "hold"
                         else draw(st.floats(0.005, 0.3)) * (30 if other == "h" else 1),
                         hold_pressure=relief * 0.5 if other_motion == "hold" else None)
        phases.append(m.Phase(f"p{i}", own, motion, load=load,
                              speed=draw(st.floats(0.005, 0.3)), stroke=0.3,
                              simultaneous=(extra,)))
        if draw(st.booleans()):
            phases.append(m.Phase(f"i{i}", None, "idle", duration=5.0))
    par = m.StrategyParameters(compensator_setting=relief * 0.9)
    return m.Scenario("rand", tuple(phases), acts,
                      tuple(m.Strategy(s, parameters=par) for s in STRATEGIES),
                      power_unit=pu), draw(st.floats(293.15, 343.15))


@pytest.mark.parametrize("strategy", STRATEGIES)
@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(case=two_motion_cycles())
def test_power_balance_of_two_motion_phases(strategy, case):
    sc, temp = case
    r = circuits.solve_strategy(strategy, cycle.circuit_inputs(sc, strategy, temp))
    # first law per phase: P_electric = useful + sum(losses) (+ stored)
    scale = np.maximum(np.abs(r.electric_power), 1.0) + np.abs(r.useful_power)
    assert np.all(np.abs(r.balance_residual) <= 1e-9 * scale)
    for k, v in r.losses.items():
        assert np.all(v >= -1e-7 * scale), (k, v)
    # each motion: p_pump Q_b = its useful power + its path's losses
    assert invariants.motion_violations(r) == []
    # every motion moves at the same fraction of its set speed (proportional sharing)
    for b in (0, 1):
        target = r.motions[(b, "speed_target")]
        on = target > 0
        ratio = r.motions[(0, "speed")][on] / r.motions[(0, "speed_target")][on]
        assert np.allclose(r.motions[(b, "speed")][on] / target[on], ratio, rtol=1e-9)


# ---------------------------------------------------------------------------
# 4. single-motion phases unchanged; the file form
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("strategy", STRATEGIES)
def test_a_single_motion_phase_is_unchanged_beside_a_multi_motion_one(strategy):
    single = m.Phase("press", "ram", "extend", load=120e3, speed=0.01, stroke=0.1)
    alone = _scenario([single, m.Phase("back", "ram", "retract", load=2e3, speed=0.1,
                                       stroke=0.5)])
    mixed = dataclasses.replace(alone, phases=(_phase(),) + alone.phases)
    # the chambers' compression depends on the phase before (another cycle here)
    def solve(sc):
        c = dict(cycle.circuit_inputs(sc, strategy))
        c["compress"] = np.zeros(len(sc.phases), dtype=bool)
        return circuits.solve_strategy(strategy, cycle.finalize(c))
    a, b = solve(alone), solve(mixed)
    for name in ("pump_pressure", "inlet_pressure", "pump_flow", "electric_power",
                 "heat_to_oil", "speed"):
        x, y = getattr(a, name), getattr(b, name)[1:]
        if strategy != "accumulator":      # its pump duty is the whole cycle's
            assert np.allclose(x, y, rtol=1e-12, atol=1e-12), name


TOML = """
[scenario]
name = "t"
[[actuators]]
name = "ram"
kind = "cylinder"
bore = "100 mm"
rod = "70 mm"
stroke = "500 mm"
[[actuators]]
name = "door"
kind = "cylinder"
bore = "63 mm"
rod = "36 mm"
stroke = "600 mm"
[[phases]]
name = "close"
actuator = "ram"
motion = "extend"
load = "50 kN"
speed = "0.05 m/s"
stroke = "400 mm"
[[phases.simultaneous]]
actuator = "door"
motion = "extend"
load = "5 kN"
speed = "0.04 m/s"
"""


def test_file_form_loads_and_writes_back():
    from heatload import io
    sc = io.loads_scenario(TOML)
    assert sc.phases[0].simultaneous == (m.Motion("door", "extend", load=5e3, speed=0.04),)
    assert sc.phases[0].actuators == ("ram", "door")
    assert io.loads_scenario(io.dumps_scenario(sc)) == sc


@pytest.mark.parametrize("change, field, fragment", [
    ('speed = "0.04 m/s"\n', "phases[0].simultaneous[0].speed", "set speed"),
    ('actuator = "door"', "phases[0].simultaneous[0].actuator", "no actuator"),
    ('motion = "extend"\nload = "5 kN"', "phases[0].simultaneous[0].motion", "not one of"),
    ('load = "5 kN"', "phases[0].simultaneous[0].colour", "unknown key"),
])
def test_file_form_refusals_name_the_field(change, field, fragment):
    from heatload import io
    head, tail = TOML.split("[[phases.simultaneous]]")
    replacement = {
        'speed = "0.04 m/s"\n': "",
        'actuator = "door"': 'actuator = "gate"',
        'motion = "extend"\nload = "5 kN"': 'motion = "spin"\nload = "5 kN"',
        'load = "5 kN"': 'load = "5 kN"\ncolour = "red"',
    }[change]
    text = head + "[[phases.simultaneous]]" + tail.replace(change, replacement)
    with pytest.raises(HeatloadError) as e:
        io.loads_scenario(text)
    assert e.value.field == field and fragment in str(e.value)


def test_a_phase_at_full_flow_cannot_share():
    from heatload import io
    text = TOML.replace('speed = "0.05 m/s"', 'speed = "full"')
    with pytest.raises(HeatloadError) as e:
        io.loads_scenario(text)
    assert e.value.field == "phases[0].speed"
    text = TOML.replace('actuator = "door"', 'actuator = "ram"')
    with pytest.raises(HeatloadError, match="already moves"):
        io.loads_scenario(text)


def test_a_simultaneous_stroke_longer_than_the_cylinder_is_refused():
    from heatload import io
    # 0.4 m at 0.05 m/s: 8 s; the door at 0.1 m/s would travel 0.8 m > its 0.6 m
    text = TOML.replace('speed = "0.04 m/s"', 'speed = "0.1 m/s"')
    with pytest.raises(HeatloadError, match="more than") as e:
        io.loads_scenario(text)
    assert e.value.field == "phases[0].simultaneous[0].speed"


def test_bleed_off_speed_drift_of_a_two_motion_phase():
    # Ideal pump, no drops: the pump at the ram's p = F/A1, the door throttled.  The
    # bleed restrictor is an orifice, Q_b = Q_b0 sqrt(p/p0) (Merritt 1967); with the
    # ram's load 10 % up, p' = 1.1 p0 and the motions share Q_th - Q_b0 sqrt(1.1) in
    # their set proportion: (v' - v)/v = (Q_th - Q_b0 sqrt(1.1)) / (Q_ram + Q_door) - 1
    from heatload.hydraulics import strategies
    r, c = _solve(SC, "bleed-off")
    change = strategies.bleed_off_speed_change(c, r, 1.1)
    qb0 = Q_TH - Q_RAM - Q_DOOR
    expected = (Q_TH - qb0 * math.sqrt(1.1)) / (Q_RAM + Q_DOOR) - 1.0
    assert change[0] == pytest.approx(expected, rel=1e-6)


def test_readme_simultaneous_example_loads():
    from pathlib import Path

    from heatload import io
    readme = (Path(__file__).parents[1] / "README.md").read_text(encoding="utf-8")
    block = readme.split("### Simultaneous motions", 1)[1].split("```toml\n", 1)[1]
    block = block.split("```", 1)[0]
    head = TOML.split("[[phases]]")[0]
    sc = io.loads_scenario(head + block, source="README")
    assert sc.phases[0].simultaneous == (m.Motion("door", "extend", load=4e3, speed=0.04),)
    assert io.loads_scenario(io.dumps_scenario(sc)) == sc


def test_a_simultaneous_motion_gets_its_own_chamber_warnings():
    # the door lowering under its own weight (-3 kN, overrunning) beside the ram:
    # a meter-in circuit without a counterbalance valve cannot hold it (it runs
    # away); meter-out throttles its outlet and holds it
    phase = dataclasses.replace(_phase(), simultaneous=(
        m.Motion("door", "extend", load=-3e3, speed=0.04),))
    sc = _scenario([phase])
    for strategy, expected in (("meter-in", True), ("meter-out", False)):
        c = cycle.circuit_inputs(sc, strategy)
        r = circuits.solve_strategy(strategy, c)
        warnings = checks.phase_warnings(checks.phase_conditions(r, c, sc), sc)
        runaway = [w for w in warnings if w.code == "overrunning-load"]
        assert bool(runaway) == expected, strategy
        if expected:
            assert "'door' moving with it" in runaway[0].message
    # its chamber above its rating: a hold at 300 bar in a 250 bar cylinder
    hold = dataclasses.replace(_phase(), simultaneous=(
        m.Motion("door", "hold", hold_pressure=300e5),))
    sc = _scenario([hold])
    c = cycle.circuit_inputs(sc, "load-sensing")
    r = circuits.solve_strategy("load-sensing", c)
    codes = [w.code for w in checks.phase_warnings(checks.phase_conditions(r, c, sc), sc)]
    assert "pressure-rating" in codes


def test_report_and_json_list_each_motion():
    from pathlib import Path

    from heatload import chain, io
    from heatload.outputs import report, tables
    root = Path(__file__).parents[1] / "duty_cycles"
    sc = io.load_scenario(root / "two_cylinder_baler.toml")
    data = tables.comparison_dict(chain.compare(sc))
    rec = {r["strategy"]: r for r in data["strategies"]}["load-sensing"]
    close = rec["phases"][0]
    assert close["actuators"] == ["ram", "door"]
    assert [mo["actuator"] for mo in close["motions"]] == ["ram", "door"]
    # the phase's flow is its motions' (the pump delivers what they take)
    assert close["pump_flow_m3_s"] == pytest.approx(
        sum(mo["flow_m3_s"] for mo in close["motions"]), rel=1e-12)
    # each motion: p_pump Q_b = useful + its path's losses (compression aside)
    for mo in close["motions"]:
        path = sum(v for k, v in mo["losses_W"].items() if k != "compression")
        assert close["pump_pressure_Pa"] * mo["flow_m3_s"] == pytest.approx(
            mo["useful_power_W"] + path, rel=1e-9)
    assert rec["phases"][1]["actuators"] == ["ram"] and len(rec["phases"][1]["motions"]) == 1
    assert rec["phases"][3]["actuators"] == [] and rec["phases"][3]["motions"] == []
    html = report.motions_section([rec], ["load-sensing"])
    assert "door" in html and "close and fill" in html and "<td>press</td>" not in html
    one = io.load_scenario(root / "forming_press.toml")
    data = tables.comparison_dict(chain.compare(one))
    assert report.motions_section(data["strategies"][:1], ["x"]) == ""


def test_dashboard_shows_each_motion():
    from pathlib import Path

    from heatload import io
    from heatload.dashboard import compute, figures, state
    sc = io.load_scenario(Path(__file__).parents[1] / "duty_cycles" / "two_cylinder_baler.toml")
    data = io.scenario_to_dict(sc)
    form = state.render_form(data, "si")
    # 4 kN, 0.04 m/s = 40 mm/s (1 m = 1000 mm)
    assert [r["simultaneous"] for r in form["phase_rows"]][:2] == [
        "door extend 4 kN at 40 mm/s", ""]
    # the read-only cell keeps the stored motions when the form is applied
    again, _, errors = state.apply_form(data, form["phase_rows"], form["actuator_rows"],
                                        form["key_values"], "si")
    assert errors == [] and again.phases == sc.phases
    fig = figures.cycle_figure(compute.compute_results(sc), "load-sensing", "si")
    names = [t.name for t in fig.data]
    assert {"ram flow", "door flow", "ram inlet", "door inlet"} <= set(names)
    door = fig.data[names.index("door flow")]
    # 7.48 L/min in the first phase (0.04 m/s x 31.17 cm^2), nothing while pressing
    assert door.y[0] == pytest.approx(0.04 * math.pi / 4 * 0.063**2 * 60000, rel=1e-6)
    assert door.y[1] == 0.0
