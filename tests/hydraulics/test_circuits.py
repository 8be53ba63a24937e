"""Tests of heatload.hydraulics.circuits: the seven strategy solvers.

1. Hand-checkable cases with an ideal circuit (loss-free pump, no line or valve
   drops): every pressure, flow and loss is written out as arithmetic here.
2. An independent reference: the same circuit written in this file as its own
   nonlinear network (pump, relief, valves, lines, flow control, actuator) and
   solved with scipy.optimize.fsolve, using only the component functions of
   heatload.components.valves / lines / pumps (which have their own outside tests).
3. Property-based power balance over random scenarios (hypothesis).
4. Vectorization: a leading variants axis gives the same numbers as separate solves.
"""

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from heatload.hydraulics import circuits, cycle, strategies
from heatload.components import lines, pumps, valves
from heatload import model as m
from heatload.model import STRATEGIES
from heatload.io import example_paths, load_scenario

BORE, ROD = 0.100, 0.070
A1 = math.pi / 4 * BORE**2                    # cap area, pi D^2/4 (geometry)
A2 = math.pi / 4 * (BORE**2 - ROD**2)         # annulus, pi (D^2 - d^2)/4 (geometry)
D_PUMP, N_PUMP = 28e-6, 1450 / 60             # model.Pump defaults [m^3/rev], [rev/s]
Q_TH = D_PUMP * N_PUMP                        # ideal pump flow D n [m^3/s] = 40.6 L/min
P_RELIEF = 180e5                              # model.ReliefValve default cracking [Pa]


def _scenario(phases, actuators=None, **strategy_params):
    acts = actuators or (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5),)
    par = m.StrategyParameters(**strategy_params)
    return m.Scenario("test", tuple(phases), tuple(acts),
                      tuple(m.Strategy(s, parameters=par) for s in STRATEGIES))


def _ideal(sc, strategy, **over):
    """Circuit inputs with a loss-free pump, no line, valve or relief override drops."""
    c = dict(cycle.circuit_inputs(sc, strategy))
    for k in ("pump_slip", "pump_viscous", "pump_friction", "check_cracking",
              "pline_l", "rline_l", "pline_k", "rline_k", "relief_override"):
        c[k] = 0.0
    for k in ("dv_rated_drop", "check_rated_drop", "dv_centre_drop"):
        c[k] = 0.0                            # ideal valves (a zero drop is allowed)
    c["compress"] = np.zeros(len(sc.phases), dtype=bool)
    c.update(over)
    return cycle.finalize(c)


def _solve(sc, strategy, **over):
    return circuits.solve_strategy(strategy, _ideal(sc, strategy, **over))


F_EXT = 50e3                                   # extend load [N]
V_EXT = 0.05                                   # extend speed [m/s]
Q1_EXT = V_EXT * A1                            # Q = v A (continuity) = 23.56 L/min
P1_EXT = F_EXT / A1                            # p = F/A with p2 = 0: 63.66 bar

EXTEND = m.Phase("extend", "c", "extend", load=F_EXT, speed=V_EXT, stroke=0.5)
SC = _scenario([EXTEND])


def _close(a, b, rel=1e-9, abs_=1e-6):
    return a == pytest.approx(b, rel=rel, abs=abs_)


# ---------------------------------------------------------------------------
# 1. hand checks, ideal circuit
# ---------------------------------------------------------------------------

def test_meter_in_by_hand():
    r = _solve(SC, "meter-in")
    # fixed pump at the relief setting; the flow control takes p_s - p1 (common practice)
    assert _close(r.pump_pressure[0], P_RELIEF)
    assert _close(r.actuator_flow[0], Q1_EXT, abs_=1e-12)
    assert _close(r.inlet_pressure[0], P1_EXT)
    assert _close(r.speed[0], V_EXT)
    # throttle loss Q1 (p_s - p1); relief loss (Qp - Q1) p_s (first law, P = p Q)
    assert _close(r.losses["flow_control"][0], Q1_EXT * (P_RELIEF - P1_EXT))
    assert _close(r.relief_flow[0], Q_TH - Q1_EXT, abs_=1e-12)
    assert _close(r.losses["relief"][0], (Q_TH - Q1_EXT) * P_RELIEF)
    # P[kW] = p[bar] Q[L/min] / 600 (common practice): 180 bar x 17.038 L/min
    q_lmin = (Q_TH - Q1_EXT) * 60000
    assert r.losses["relief"][0] / 1e3 == pytest.approx(180.0 * q_lmin / 600, rel=1e-9)
    assert q_lmin == pytest.approx(40.6 - 23.5619449, rel=1e-6)   # 1450 x 28 cm^3, v A
    # useful F v; ideal pump: shaft power = p_s Q_p
    assert _close(r.useful_power[0], F_EXT * V_EXT)
    assert _close(r.shaft_power[0], P_RELIEF * Q_TH)
    assert abs(r.losses["pump"][0]) < 1e-6
    assert not r.flow_limited[0] and not r.stalled[0] and not r.runaway[0]


def test_meter_out_by_hand_and_intensification():
    r = _solve(SC, "meter-out")
    # p1 = p_s (no inlet throttle); p2 = (p1 A1 - F)/A2 (force balance, common practice)
    p2 = (P_RELIEF * A1 - F_EXT) / A2
    assert _close(r.inlet_pressure[0], P_RELIEF)
    assert _close(r.outlet_pressure[0], p2)
    q2 = Q1_EXT * A2 / A1
    assert _close(r.losses["flow_control"][0], q2 * p2)
    assert _close(r.losses["relief"][0], (Q_TH - Q1_EXT) * P_RELIEF)
    # zero load: p2/p_s = A1/A2, the intensification of the area ratio (common practice)
    sc0 = _scenario([m.Phase("e", "c", "extend", load=0.0, speed=V_EXT, stroke=0.5)])
    r0 = _solve(sc0, "meter-out")
    assert r0.outlet_pressure[0] / r0.pump_pressure[0] == pytest.approx(A1 / A2, rel=1e-9)
    assert A1 / A2 == pytest.approx(1 / (1 - 0.7**2), rel=1e-12)   # 1/(1 - (d/D)^2)


def test_bleed_off_by_hand():
    r = _solve(SC, "bleed-off")
    # fixed pump at the load pressure; surplus bled at that pressure (common practice)
    assert _close(r.pump_pressure[0], P1_EXT)
    assert _close(r.bleed_flow[0], Q_TH - Q1_EXT, abs_=1e-12)
    assert _close(r.losses["bleed"][0], (Q_TH - Q1_EXT) * P1_EXT)
    assert abs(r.losses["relief"][0]) < 1e-9 and abs(r.losses["flow_control"][0]) < 1e-6


def test_bypass_compensated_by_hand():
    spring = 8e5  # model.StrategyParameters.bypass_spring default
    r = _solve(SC, "bypass-compensated")
    # pump at load + spring; loss (Qp - Q1)(p_load + spring) + Q1 spring (common practice)
    assert _close(r.pump_pressure[0], P1_EXT + spring)
    assert _close(r.losses["bleed"][0], (Q_TH - Q1_EXT) * (P1_EXT + spring))
    assert _close(r.losses["flow_control"][0], Q1_EXT * spring)
    assert _close(r.throttle_drop[0], spring)


def test_pressure_compensated_by_hand():
    p_c = 150e5
    sc = _scenario([EXTEND], compensator_setting=p_c)
    r = _solve(sc, "pressure-compensated")
    # pump at its compensator setting delivering Q1 only; throttle Q1 (p_c - p1)
    assert _close(r.pump_pressure[0], p_c)
    assert _close(r.pump_flow[0], Q1_EXT, abs_=1e-12)
    assert r.relief_flow[0] == 0 and r.bleed_flow[0] == 0
    assert _close(r.losses["flow_control"][0], Q1_EXT * (p_c - P1_EXT))
    # stroke = Q1 / (D n) (no slip)
    assert _close(r.displacement_fraction[0], Q1_EXT / Q_TH)
    # the default setting is relief cracking - 10 bar (model.StrategyParameters doc)
    r_def = _solve(SC, "pressure-compensated")
    assert _close(r_def.pump_pressure[0], P_RELIEF - 10e5)


def test_load_sensing_by_hand():
    margin = 20e5  # model.StrategyParameters.load_sensing_margin default
    r = _solve(SC, "load-sensing")
    # pump at p_load + margin; metering loss Q1 x margin (common practice)
    assert _close(r.pump_pressure[0], P1_EXT + margin)
    assert _close(r.pump_flow[0], Q1_EXT, abs_=1e-12)
    assert _close(r.losses["flow_control"][0], Q1_EXT * margin)
    # P[kW] = p[bar] Q[L/min]/600 (common practice): 20 bar x 23.56 L/min = 0.785 kW
    assert r.losses["flow_control"][0] / 1e3 == pytest.approx(20 * 23.5619449 / 600, rel=1e-7)


def test_variable_speed_by_hand():
    r = _solve(SC, "variable-speed")
    # speed n = Q1/D (ideal pump), pump at the load pressure, no throttle loss
    assert _close(r.pump_shaft_speed[0], Q1_EXT / D_PUMP)
    assert _close(r.pump_pressure[0], P1_EXT)
    assert abs(r.losses["flow_control"][0]) < 1e-6
    assert abs(r.losses["bleed"][0]) < 1e-6 and abs(r.losses["relief"][0]) < 1e-9
    # ideal pump: shaft power = p Q1 = F v
    assert _close(r.shaft_power[0], F_EXT * V_EXT, rel=1e-9)
    assert r.losses["converter"][0] > 0


def test_variable_speed_below_min_speed_bleeds():
    # set flow below the minimum speed's flow: surplus bled at the working pressure
    v = 0.005
    sc = _scenario([m.Phase("slow", "c", "extend", load=F_EXT, speed=v, stroke=0.1)],
                   min_speed_fraction=0.2)
    r = _solve(sc, "variable-speed")
    q1 = v * A1
    q_min = 0.2 * Q_TH
    assert q1 < q_min
    assert _close(r.pump_shaft_speed[0], 0.2 * N_PUMP)
    assert _close(r.bleed_flow[0], q_min - q1, abs_=1e-12)
    assert _close(r.losses["bleed"][0], (q_min - q1) * P1_EXT)


HOLD_P = 50e5


def _hold(unloading, hold_pressure=HOLD_P):
    return m.Phase("hold", "c", "hold", duration=5.0, hold_pressure=hold_pressure,
                   unloading=unloading)


@pytest.mark.parametrize("strategy", ["meter-in", "meter-out", "bleed-off"])
def test_hold_relief_unloading(strategy):
    r = _solve(_scenario([EXTEND, _hold("relief")]), strategy)
    # relief unloading: the whole pump flow over the relief at its setting (common practice)
    assert _close(r.pump_pressure[1], P_RELIEF)
    assert _close(r.relief_flow[1], Q_TH, abs_=1e-12)
    assert _close(r.losses["relief"][1], Q_TH * P_RELIEF)
    assert r.actuator_flow[1] == 0 and r.speed[1] == 0
    assert _close(r.inlet_pressure[1], HOLD_P)


@pytest.mark.parametrize("strategy", ["meter-in", "meter-out", "bleed-off",
                                      "bypass-compensated"])
def test_hold_centre_unloading(strategy):
    # a tandem centre (model default) returns the pump flow at its centre drop: 3 bar at
    # 60 L/min, ~Q^2 (orifice law, common practice); here with the real centre drop
    sc = _scenario([EXTEND, _hold("centre")])
    c = _ideal(sc, strategy, dv_centre_drop=3e5)
    r = circuits.solve_strategy(strategy, c)
    p_centre = 3e5 * (Q_TH / (60 / 60000)) ** 2
    assert _close(r.pump_pressure[1], p_centre)
    assert r.relief_flow[1] == 0
    assert _close(r.pump_flow[1], Q_TH, abs_=1e-12)
    total = sum(r.losses[k][1] for k in circuits.OIL_LOSSES)
    assert _close(total, Q_TH * p_centre)


@pytest.mark.parametrize("strategy", ["pressure-compensated", "load-sensing"])
def test_hold_held_variable_pumps(strategy):
    r = _solve(_scenario([EXTEND, _hold("held")], compensator_setting=150e5), strategy)
    # a variable pump holds pressure at zero stroke (ideal pump: no flow at all)
    assert abs(r.pump_flow[1]) < 1e-12 and r.displacement_fraction[1] < 1e-12
    expected = 150e5 if strategy == "pressure-compensated" else HOLD_P + 20e5
    assert _close(r.pump_pressure[1], expected)
    assert abs(r.heat_to_oil[1]) < 1e-6


def test_hold_held_variable_speed():
    # variable speed holds the pressure at its minimum speed; the flow it cannot
    # stop is bled at the held pressure; near zero with a small minimum speed
    sc = _scenario([EXTEND, _hold("held")], min_speed_fraction=1e-4)
    r = _solve(sc, "variable-speed")
    assert _close(r.pump_pressure[1], HOLD_P)
    assert _close(r.pump_shaft_speed[1], 1e-4 * N_PUMP)
    assert r.pump_flow[1] == pytest.approx(1e-4 * Q_TH, rel=1e-9)
    assert r.heat_to_oil[1] == pytest.approx(1e-4 * Q_TH * HOLD_P, rel=1e-9)


def test_load_sensing_idle_at_standby():
    sc = _scenario([EXTEND, m.Phase("idle", None, "idle", duration=3.0)])
    r = _solve(sc, "load-sensing")
    assert _close(r.pump_pressure[1], 25e5)  # standby default, model.StrategyParameters


@pytest.mark.parametrize("strategy", STRATEGIES)
def test_stall_beyond_relief(strategy):
    # load needing 200 bar against a 180 bar relief: the actuator stalls
    sc = _scenario([m.Phase("press", "c", "extend", load=200e5 * A1, speed=V_EXT,
                            stroke=0.1)])
    r = _solve(sc, strategy)
    assert r.stalled[0]
    assert r.speed[0] == 0 and r.actuator_flow[0] == 0
    assert np.all(np.isfinite(r.electric_power)) and abs(r.balance_residual[0]) < 1e-6
    if strategy in ("meter-in", "meter-out", "bleed-off", "bypass-compensated"):
        # the whole pump flow crosses the relief at its setting (common practice)
        assert _close(r.relief_flow[0], Q_TH, abs_=1e-12)
        assert _close(r.pump_pressure[0], P_RELIEF)


def test_stall_relief_override_follows_the_flow_it_passes():
    # relief law p = p_crack + override Q / Q_rated (heatload.components.valves.relief_pressure,
    # common practice): at stall a fixed pump passes all its flow, a variable-speed pump
    # at its minimum speed (10 %, model default) only that
    sc = _scenario([m.Phase("press", "c", "extend", load=200e5 * A1, speed=V_EXT,
                            stroke=0.1)])
    q_rated = 60 / 60000
    r_fix = _solve(sc, "meter-in", relief_override=10e5)
    assert _close(r_fix.pump_pressure[0], P_RELIEF + 10e5 * Q_TH / q_rated)
    r_vs = _solve(sc, "variable-speed", relief_override=10e5)
    assert _close(r_vs.relief_flow[0], 0.1 * Q_TH, abs_=1e-12)
    assert _close(r_vs.pump_pressure[0], P_RELIEF + 10e5 * 0.1 * Q_TH / q_rated)
    assert _close(r_vs.losses["relief"][0], r_vs.relief_flow[0] * r_vs.pump_pressure[0])


def test_overrunning_meter_in_runs_away_meter_out_holds():
    f = -20e3
    sc = _scenario([m.Phase("lower", "c", "extend", load=f, speed=V_EXT, stroke=0.3)])
    r_in = _solve(sc, "meter-in")
    r_out = _solve(sc, "meter-out")
    assert r_in.runaway[0] and r_in.counterbalance_active[0]
    # figures assume a counterbalance at 1.3 x the load-induced pressure |F|/A2
    # (common practice for the setting)
    assert _close(r_in.counterbalance_setting[0], 1.3 * abs(f) / A2)
    assert not r_out.runaway[0] and not r_out.counterbalance_active[0]
    # meter-out holds it: p2 = (p_s A1 - F)/A2 with F < 0
    assert _close(r_out.outlet_pressure[0], (P_RELIEF * A1 - f) / A2)
    # useful power negative: the load does work on the circuit
    assert r_out.useful_power[0] == pytest.approx(f * V_EXT)
    # with a fitted counterbalance meter-in is not flagged
    sc_cb = _scenario([m.Phase("lower", "c", "extend", load=f, speed=V_EXT, stroke=0.3)],
                      counterbalance_setting=1.3 * abs(f) / A2)
    assert not _solve(sc_cb, "meter-in").runaway[0]


def test_pulling_load_below_friction_is_not_a_runaway():
    # 500 N pulling against 2000 N of seal friction: the piston still needs pressure to
    # move (force balance p1 A1 - p2 A2 = F + F_friction > 0), nothing can run away
    acts = (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5, friction_force=2000.0),)
    sc = _scenario([m.Phase("e", "c", "extend", load=-500.0, speed=V_EXT, stroke=0.3)],
                   actuators=acts)
    r = _solve(sc, "meter-in")
    assert not r.runaway[0] and not r.counterbalance_active[0]
    assert _close(r.inlet_pressure[0], 1500.0 / A1)


def test_counterbalance_pressures_by_hand():
    # direct-acting counterbalance, pilot ratio r: p2 = setting - r p1 while open,
    # force balance p1 A1 - p2 A2 = F -> p1 = (F + A2 setting)/(A1 + r A2) (common practice)
    f = -20e3
    setting = 1.3 * abs(f) / A2
    sc = _scenario([m.Phase("lower", "c", "extend", load=f, speed=V_EXT, stroke=0.3)],
                   counterbalance_setting=setting, counterbalance_pilot_ratio=3.0)
    r = _solve(sc, "meter-in")
    p1 = (f + A2 * setting) / (A1 + 3.0 * A2)
    assert _close(r.inlet_pressure[0], p1)
    assert _close(r.outlet_pressure[0], setting - 3.0 * p1)
    q2 = Q1_EXT * A2 / A1
    assert _close(r.losses["counterbalance"][0], q2 * (setting - 3.0 * p1))


# an accumulator delivers peaks beyond its pump (checked by its own tests below)
@pytest.mark.parametrize("strategy", [s for s in STRATEGIES if s != "accumulator"])
def test_flow_limited_by_pump(strategy):
    # set speed beyond the pump: speed = pump flow / area (continuity)
    v = 0.12
    assert v * A1 > Q_TH
    sc = _scenario([m.Phase("fast", "c", "extend", load=10e3, speed=v, stroke=0.5)])
    r = _solve(sc, strategy)
    assert r.flow_limited[0] and not r.stalled[0]
    assert r.speed[0] == pytest.approx(Q_TH / A1, rel=1e-9)
    assert r.speed_target[0] == pytest.approx(v)
    # stroke at the speed reached: t = s / v
    assert r.duration[0] == pytest.approx(0.5 / (Q_TH / A1), rel=1e-9)


def test_full_pump_flow_phase_not_flow_limited():
    # speed None = full pump flow: no speed-not-reached
    sc = _scenario([m.Phase("rapid", "c", "extend", load=1e3, speed=None, stroke=0.5)])
    for s in ("meter-in", "bleed-off", "load-sensing"):
        r = _solve(sc, s)
        assert not r.flow_limited[0]
        assert r.speed[0] == pytest.approx(Q_TH / A1, rel=1e-9)


def test_motor_by_hand():
    # hydraulic motor: dp = 2 pi T / (D eta_hm); speed = Q eta_v / D (ISO 4391 definitions)
    d_m, ev, ehm, torque, n = 50e-6, 0.95, 0.92, 100.0, 5.0
    mot = m.HydraulicMotor("mot", displacement=d_m, volumetric_efficiency=ev,
                           hydromechanical_efficiency=ehm)
    sc = _scenario([m.Phase("run", "mot", "run", load=torque, speed=n, duration=10.0)],
                   actuators=(mot,))
    r = _solve(sc, "load-sensing")
    q1 = n * d_m / ev
    dp = 2 * math.pi * torque / (d_m * ehm)
    assert _close(r.actuator_flow[0], q1, abs_=1e-12)
    assert _close(r.inlet_pressure[0], dp)
    assert _close(r.useful_power[0], 2 * math.pi * torque * n)
    # motor loss = p Q - 2 pi T n = 2 pi T n (1/(eta_v eta_hm) - 1)
    assert _close(r.losses["actuator"][0], 2 * math.pi * torque * n * (1 / (ev * ehm) - 1))


def test_overrunning_motor_loss_is_positive():
    # an overrunning motor works as a pump: Q = D n eta_v, dp = 2 pi |T| eta_hm / D, its
    # loss 2 pi |T| n (1 - eta_v eta_hm) >= 0 (ISO 4391 pump definitions)
    d_m, ev, ehm, torque, n = 50e-6, 0.90, 0.97, -80.0, 4.0
    mot = m.HydraulicMotor("mot", displacement=d_m, volumetric_efficiency=ev,
                           hydromechanical_efficiency=ehm)
    sc = _scenario([m.Phase("brake", "mot", "run", load=torque, speed=n, duration=10.0)],
                   actuators=(mot,))
    r = _solve(sc, "meter-out")
    assert r.speed[0] == pytest.approx(n, rel=1e-9)
    assert _close(r.actuator_flow[0], d_m * n * ev, abs_=1e-12)
    assert _close(r.losses["actuator"][0], 2 * math.pi * abs(torque) * n * (1 - ev * ehm))


# ---------------------------------------------------------------------------
# 2. independent reference: the circuit as a nonlinear network, scipy fsolve
# ---------------------------------------------------------------------------

def _real_scenario(phase, **par):
    pu = m.PowerUnit(relief=m.ReliefValve(cracking_pressure=180e5, override=15e5,
                                          rated_flow=60 / 60000))
    acts = (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5, friction_force=500.0),)
    return m.Scenario("ref", (phase,), acts,
                      tuple(m.Strategy(s, parameters=m.StrategyParameters(**par))
                            for s in STRATEGIES), power_unit=pu)


def _network_parts(c):
    """Component laws of the circuit, each from heatload.components.valves/lines/pumps."""
    g = {k: (np.asarray(v).ravel()[0] if isinstance(v, np.ndarray) else v)
         for k, v in c.items()}

    def supply_drop(q):
        return (valves.check_valve_pressure_drop(q, g["check_cracking"], g["check_rated_flow"],
                                                 g["check_rated_drop"])
                + lines.line_pressure_drop(q, g["pline_d"], g["pline_l"], g["density"],
                                           g["viscosity"], g["pline_rough"], g["pline_k"])
                + valves.valve_path_pressure_drop(q, g["dv_rated_flow"], g["dv_rated_drop"]))

    def return_drop(q):
        return (valves.valve_path_pressure_drop(q, g["dv_rated_flow"], g["dv_rated_drop"])
                + lines.line_pressure_drop(q, g["rline_d"], g["rline_l"], g["density"],
                                           g["viscosity"], g["rline_rough"], g["rline_k"]))

    def pump_q(p, x=1.0):
        # Wilson: Q = x D n - Cs D p / (2 pi mu) (heatload.components.pumps, tested against ISO 4391)
        return (x * g["pump_displacement"] * g["pump_speed"]
                - g["pump_slip"] * g["pump_displacement"] * p / (2 * math.pi * g["mu"]))

    def relief_q(p):
        return valves.relief_flow(p, g["relief_cracking"], g["relief_override"],
                                  g["relief_rated_flow"])

    return g, supply_drop, return_drop, pump_q, relief_q


def _fsolve(fun, x0):
    from scipy.optimize import fsolve
    x, info, ier, msg = fsolve(fun, x0, full_output=True, xtol=1e-11)
    assert ier == 1, msg
    assert np.max(np.abs(fun(x))) < 1e-6
    return x


SCALE_P, SCALE_Q = 1e5, 1e-4   # unknowns in bar and 1e-4 m^3/s keep fsolve well scaled


def test_meter_in_reference_flow_limited_with_relief_passing():
    # load close to the relief: the 2-way flow control is pressed below its minimum drop
    # and passes Q = Q_set sqrt(dp/dp_min); the relief passes the rest of the pump flow
    v = 0.04
    f = 177e5 * A1
    sc = _real_scenario(m.Phase("press", "c", "extend", load=f, speed=v, stroke=0.2))
    c = cycle.circuit_inputs(sc, "meter-in")
    r = circuits.solve_strategy("meter-in", c)
    g, supply, ret, pump_q, relief_q = _network_parts(c)
    q_set = v * A1
    f_eff = f + 500.0

    def eqs(x):
        ps, p1, p2, q1, dpfc = x[0] * SCALE_P, x[1] * SCALE_P, x[2] * SCALE_P, \
            x[3] * SCALE_Q, x[4] * SCALE_P
        return [(pump_q(ps) - q1 - relief_q(ps)) / SCALE_Q,                     # pump node
                (ps - supply(q1) - dpfc - p1) / SCALE_P,                        # supply path
                (q1 - valves.flow_control_2way_flow(q_set, dpfc, g["fc_min_drop"])) / SCALE_Q,
                (p2 - ret(q1 * A2 / A1)) / SCALE_P,                             # return path
                (p1 * A1 - p2 * A2 - f_eff) / (SCALE_P * A1)]                   # piston
    x = _fsolve(eqs, [185, 175, 1, q_set / SCALE_Q * 0.9, 5])
    ps, p1, p2, q1 = x[0] * SCALE_P, x[1] * SCALE_P, x[2] * SCALE_P, x[3] * SCALE_Q
    assert q1 < 0.99 * q_set and relief_q(ps) > 0          # the case is what it claims
    assert r.flow_limited[0]
    assert r.actuator_flow[0] == pytest.approx(q1, rel=1e-3)
    assert r.pump_pressure[0] == pytest.approx(ps, rel=1e-3)
    assert r.inlet_pressure[0] == pytest.approx(p1, rel=1e-3)
    assert r.outlet_pressure[0] == pytest.approx(p2, rel=1e-3)
    assert r.relief_flow[0] == pytest.approx(relief_q(ps), rel=1e-3)
    assert r.losses["relief"][0] == pytest.approx(relief_q(ps) * ps, rel=1e-3)


def test_meter_in_reference_not_limited():
    v, f = 0.05, 60e5 * A1
    sc = _real_scenario(m.Phase("feed", "c", "extend", load=f, speed=v, stroke=0.2))
    c = cycle.circuit_inputs(sc, "meter-in")
    r = circuits.solve_strategy("meter-in", c)
    g, supply, ret, pump_q, relief_q = _network_parts(c)
    q1 = v * A1

    def eqs(x):
        ps, p1, p2 = x * SCALE_P
        return [(pump_q(ps) - q1 - relief_q(ps)) / SCALE_Q,
                (p2 - ret(q1 * A2 / A1)) / SCALE_P,
                (p1 * A1 - p2 * A2 - f - 500.0) / (SCALE_P * A1)]
    ps, p1, p2 = _fsolve(eqs, [185, 60, 1]) * SCALE_P
    assert not r.flow_limited[0]
    assert r.pump_pressure[0] == pytest.approx(ps, rel=1e-3)
    assert r.inlet_pressure[0] == pytest.approx(p1, rel=1e-3)
    assert r.throttle_drop[0] == pytest.approx(ps - supply(q1) - p1, rel=1e-3)
    assert r.losses["relief"][0] == pytest.approx(relief_q(ps) * ps, rel=1e-3)


@pytest.mark.parametrize("load_bar, limited", [(60.0, False), (179.0, True)])
def test_meter_out_reference(load_bar, limited):
    # flow control in the outlet: Q2 = Q2_set sqrt(dp/dp_min) below its minimum drop
    v = 0.05
    f = load_bar * 1e5 * A1
    sc = _real_scenario(m.Phase("feed", "c", "extend", load=f, speed=v, stroke=0.2))
    c = cycle.circuit_inputs(sc, "meter-out")
    r = circuits.solve_strategy("meter-out", c)
    g, supply, ret, pump_q, relief_q = _network_parts(c)
    ratio = A2 / A1
    q2_set = v * A2

    def eqs(x):
        ps, p1, p2, q1, dpfc = x[0] * SCALE_P, x[1] * SCALE_P, x[2] * SCALE_P, \
            x[3] * SCALE_Q, x[4] * SCALE_P
        q2 = q1 * ratio
        return [(pump_q(ps) - q1 - relief_q(ps)) / SCALE_Q,
                (ps - supply(q1) - p1) / SCALE_P,
                (q2 - valves.flow_control_2way_flow(q2_set, dpfc, g["fc_min_drop"])) / SCALE_Q,
                (p2 - dpfc - ret(q2)) / SCALE_P,
                (p1 * A1 - p2 * A2 - f - 500.0) / (SCALE_P * A1)]
    # the flow control law is flat above its minimum drop: start from both sides
    x0 = [185, 180, 100, 0.8 * v * A1 / SCALE_Q, 5] if limited else \
        [185, 180, 150, v * A1 / SCALE_Q, 50]
    x = _fsolve(eqs, x0)
    ps, p1, p2, q1 = x[0] * SCALE_P, x[1] * SCALE_P, x[2] * SCALE_P, x[3] * SCALE_Q
    assert bool(r.flow_limited[0]) is limited
    assert bool(q1 < 0.99 * v * A1) is limited
    assert r.actuator_flow[0] == pytest.approx(q1, rel=1e-3)
    assert r.pump_pressure[0] == pytest.approx(ps, rel=1e-3)
    assert r.inlet_pressure[0] == pytest.approx(p1, rel=1e-3)
    assert r.outlet_pressure[0] == pytest.approx(p2, rel=1e-3)
    assert r.losses["relief"][0] == pytest.approx(relief_q(ps) * ps, rel=1e-3)
    assert r.losses["flow_control"][0] == pytest.approx(q1 * ratio * (p2 - ret(q1 * ratio)),
                                                        rel=1e-3)


@pytest.mark.parametrize("case", ["metered", "valve-limited", "compensator", "full-stroke"])
def test_load_sensing_reference(case):
    # LS pump: p_s = min(p1 + margin, compensator curve); what the margin leaves over the
    # supply drops is the metering drop; when the drops exceed it the flow is limited
    v, load_bar, dv_drop, comp = 0.05, 60.0, 5e5, None
    if case == "valve-limited":
        dv_drop = 200e5                   # P->A drop at rated flow far above the margin
    elif case == "compensator":
        load_bar, comp, dv_drop = 150.0, 160e5, 100e5
    elif case == "full-stroke":
        v = 0.2                           # more than the pump's flow
    f = load_bar * 1e5 * A1
    pu = m.PowerUnit(directional_valve=m.DirectionalValve(pressure_drop=dv_drop))
    acts = (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5, friction_force=500.0),)
    sc = m.Scenario("ls", (m.Phase("feed", "c", "extend", load=f, speed=v, stroke=0.2),),
                    acts, (m.Strategy("load-sensing", parameters=m.StrategyParameters(
                        compensator_setting=comp)),), power_unit=pu)
    c = cycle.circuit_inputs(sc, "load-sensing")
    r = circuits.solve_strategy("load-sensing", c)
    g, supply, ret, pump_q, relief_q = _network_parts(c)
    margin, p_comp = g["ls_margin"], g["compensator"]
    q_set = v * A1

    def pressures(q1):
        p2 = ret(q1 * A2 / A1)
        p1 = (f + 500.0 + p2 * A2) / A1
        return p1, p2

    if case == "metered":
        q1 = q_set
        p1, p2 = pressures(q1)
        ps = p1 + margin
    else:
        def eqs(x):
            ps, q1 = x[0] * SCALE_P, x[1] * SCALE_Q
            p1, _ = pressures(q1)
            if case == "valve-limited":
                e0 = ps - (p1 + margin)
            elif case == "compensator":
                e0 = ps - p_comp
            else:   # full stroke: the pump delivers all it can at p_s (Wilson, x = 1)
                e0 = (pump_q(ps) - q1) / SCALE_Q * SCALE_P
            return [e0 / SCALE_P, (ps - supply(q1) - p1) / SCALE_P]
        ps, q1 = _fsolve(eqs, [p_comp / 1e5 if case == "compensator" else 80,
                               0.7 * min(q_set, Q_TH) / SCALE_Q]) * [SCALE_P, SCALE_Q]
        p1, p2 = pressures(q1)
        assert q1 < 0.99 * q_set
    assert bool(r.flow_limited[0]) is (case != "metered")
    assert r.actuator_flow[0] == pytest.approx(q1, rel=1e-3)
    assert r.pump_pressure[0] == pytest.approx(ps, rel=1e-3)
    assert r.inlet_pressure[0] == pytest.approx(p1, rel=1e-3)
    assert r.outlet_pressure[0] == pytest.approx(p2, rel=1e-3)
    assert r.losses["flow_control"][0] == pytest.approx(q1 * (ps - supply(q1) - p1),
                                                        abs=1e-3 * q1 * ps)


# ---------------------------------------------------------------------------
# 3. power balance over random scenarios
# ---------------------------------------------------------------------------

@st.composite
def scenarios(draw):
    bore = draw(st.floats(0.03, 0.2))
    rod = bore * draw(st.floats(0.2, 0.9))
    relief = draw(st.floats(50e5, 300e5))
    pump = m.Pump(displacement=draw(st.floats(5e-6, 100e-6)),
                  shaft_speed=draw(st.floats(10.0, 30.0)),
                  volumetric_efficiency=draw(st.floats(0.80, 0.99)),
                  hydromechanical_efficiency=draw(st.floats(0.75, 0.97)),
                  rated_pressure=200e5, max_pressure=350e5)
    pu = m.PowerUnit(pump=pump, relief=m.ReliefValve(cracking_pressure=relief,
                                                     override=draw(st.floats(0.0, 30e5))))
    cyl = m.Cylinder("c", bore=bore, rod=rod, stroke=0.5,
                     friction_force=draw(st.floats(0.0, 2e3)), dead_volume=1e-4,
                     back_pressure=draw(st.one_of(st.none(), st.floats(1e5, 20e5))),
                     counterbalance_setting=draw(st.one_of(st.none(), st.floats(10e5, 200e5))))
    mot = m.HydraulicMotor("mot", displacement=draw(st.floats(10e-6, 200e-6)),
                           volumetric_efficiency=draw(st.floats(0.85, 0.99)),
                           hydromechanical_efficiency=draw(st.floats(0.85, 0.99)))
    a1 = math.pi / 4 * bore**2
    phases = []
    for i in range(draw(st.integers(1, 4))):
        kind = draw(st.sampled_from(["extend", "retract", "run", "hold", "idle"]))
        load_frac = draw(st.floats(-0.8, 1.3))   # of the relief force; beyond 1 stalls
        speed = draw(st.one_of(st.none(), st.floats(0.001, 0.5)))
        unl = draw(st.sampled_from(["relief", "centre", "held", "pilot-check"]))
        if kind in ("extend", "retract"):
            regen = kind == "extend" and draw(st.booleans())
            phases.append(m.Phase(f"p{i}", "c", kind, load=load_frac * relief * a1,
                                  speed=speed, stroke=0.3, unloading=unl,
                                  regeneration=regen))
        elif kind == "run":
            torque = load_frac * relief * mot.displacement / (2 * math.pi)
            phases.append(m.Phase(f"p{i}", "mot", "run", load=torque,
                                  speed=None if speed is None else speed * 20,
                                  duration=5.0, unloading=unl))
        elif kind == "hold":
            phases.append(m.Phase(f"p{i}", "c", "hold", duration=3.0, unloading=unl,
                                  hold_pressure=draw(st.floats(0.0, 1.1)) * relief))
        else:
            phases.append(m.Phase(f"p{i}", None, "idle", duration=2.0, unloading=unl))
    par = m.StrategyParameters(
        counterbalance_setting=draw(st.one_of(st.none(), st.floats(10e5, 200e5))),
        compensator_setting=relief * draw(st.floats(0.5, 0.99)),
        min_speed_fraction=draw(st.floats(0.01, 0.5)))
    temp = draw(st.floats(283.15, 363.15))
    return m.Scenario("rand", tuple(phases), (cyl, mot),
                      tuple(m.Strategy(s, parameters=par) for s in STRATEGIES),
                      power_unit=pu), temp


def _finite(r):
    for name in ("pump_pressure", "inlet_pressure", "outlet_pressure", "pump_flow",
                 "actuator_flow", "speed", "duration", "shaft_power", "electric_power",
                 "useful_power", "pump_shaft_speed"):
        assert np.all(np.isfinite(getattr(r, name))), name
    for k, v in r.losses.items():
        assert np.all(np.isfinite(v)), k


@pytest.mark.parametrize("strategy", STRATEGIES)
@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(case=scenarios())
def test_power_balance_property(strategy, case):
    sc, temp = case
    r = circuits.solve_strategy(strategy, cycle.circuit_inputs(sc, strategy, temp))
    _finite(r)
    # first law: P_electric = useful + sum(losses)
    scale = np.maximum(np.abs(r.electric_power), 1.0) + np.abs(r.useful_power)
    assert np.all(np.abs(r.balance_residual) <= 1e-9 * scale)
    # every loss is a dissipation: >= 0 (to rounding of the root solve)
    tol = 1e-7 * scale
    for k, v in r.losses.items():
        assert np.all(v >= -tol), (k, v)
    assert np.all(r.pump_flow >= -1e-15) and np.all(r.actuator_flow >= 0)
    assert np.all(r.duration > 0)
    # the load is driven where it opposes the motion: useful >= 0 there
    assert np.all(r.useful_power[np.asarray([p.load >= 0 for p in sc.phases])] >= -1e-9)


# ---------------------------------------------------------------------------
# 4. vectorization
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("strategy", STRATEGIES)
def test_variants_axis_equals_separate_solves(strategy):
    phases = [m.Phase("e", "c", "extend", load=50e3, speed=0.05, stroke=0.3),
              m.Phase("r", "c", "retract", load=5e3, speed=0.1, stroke=0.3),
              m.Phase("h", "c", "hold", duration=4.0, hold_pressure=80e5, unloading="held"),
              m.Phase("i", None, "idle", duration=2.0)]
    sc = _real_scenario(phases[0])
    sc = m.Scenario("v", tuple(phases), sc.actuators, sc.strategies, power_unit=sc.power_unit)
    loads = np.array([0.0, 20e3, 120e3, 260e3, -30e3])      # incl. a stall and an overrun
    base = dict(cycle.circuit_inputs(sc, strategy))
    force = np.array(base["force"], dtype=float)
    load = np.array(base["load"], dtype=float)
    batch = dict(base)
    batch["load"] = np.where(np.arange(4) == 0, loads[:, None], load)
    batch["force"] = np.where(np.arange(4) == 0, loads[:, None] + 500.0, force)
    rb = circuits.solve_strategy(strategy, cycle.finalize(batch))
    assert rb.pump_pressure.shape == (5, 4)
    for i, ld in enumerate(loads):
        one = dict(base)
        one["load"] = np.where(np.arange(4) == 0, ld, load)
        one["force"] = np.where(np.arange(4) == 0, ld + 500.0, force)
        r1 = circuits.solve_strategy(strategy, cycle.finalize(one))
        for name in ("pump_pressure", "inlet_pressure", "outlet_pressure", "actuator_flow",
                     "relief_flow", "bleed_flow", "electric_power", "duration"):
            np.testing.assert_allclose(getattr(rb, name)[i], getattr(r1, name),
                                       rtol=1e-12, atol=1e-12 * (1 + np.max(np.abs(
                                           getattr(r1, name)))), err_msg=name)
        for k in circuits.LOSS_COMPONENTS:
            np.testing.assert_allclose(rb.losses[k][i], r1.losses[k], rtol=1e-12,
                                       atol=1e-9, err_msg=k)
        np.testing.assert_array_equal(rb.stalled[i], r1.stalled)
        np.testing.assert_array_equal(rb.runaway[i], r1.runaway)


def test_oil_temperature_axis():
    # circuit_inputs with an array of temperatures gives a leading axis
    sc = _real_scenario(EXTEND)
    temps = np.array([300.0, 330.0, 350.0])
    rb = circuits.solve_strategy("meter-in", cycle.circuit_inputs(sc, "meter-in", temps))
    for i, t in enumerate(temps):
        r1 = circuits.solve_strategy("meter-in", cycle.circuit_inputs(sc, "meter-in", t))
        np.testing.assert_allclose(rb.electric_power[i], r1.electric_power, rtol=1e-12)
        np.testing.assert_allclose(rb.heat_to_oil[i], r1.heat_to_oil, rtol=1e-12)


def test_unknown_strategy_raises():
    from heatload.errors import HeatloadError
    with pytest.raises(HeatloadError) as e:
        circuits.solve_strategy("throttle", cycle.circuit_inputs(SC, "meter-in"))
    assert e.value.field == "strategies"


# ---------------------------------------------------------------------------
# 5. a vented centre, a pressure the pump cannot hold, bleed-off speed drift
# ---------------------------------------------------------------------------

def test_pressure_compensated_pump_behind_a_vented_centre():
    # an open/tandem centre vents the pump line: the compensator sees no pressure,
    # the pump swings to full stroke and circulates Q_th at the centre drop ~Q^2
    # (orifice law, common practice)
    sc = _scenario([EXTEND, _hold("centre", hold_pressure=None)])
    c = _ideal(sc, "pressure-compensated", dv_centre_drop=3e5)
    r = circuits.solve_strategy("pressure-compensated", c)
    p_centre = 3e5 * (Q_TH / (60 / 60000)) ** 2
    assert _close(r.pump_pressure[1], p_centre)
    assert _close(r.pump_flow[1], Q_TH, abs_=1e-12)
    assert r.displacement_fraction[1] == 1.0
    assert _close(r.losses["directional_valve"][1], Q_TH * p_centre)


def test_hold_above_relief_is_flagged():
    from heatload import checks
    sc = _scenario([EXTEND, _hold("relief", hold_pressure=P_RELIEF + 20e5)])
    c = cycle.circuit_inputs(sc, "meter-in")
    r = circuits.solve_strategy("meter-in", c)
    codes = [w.code for w in checks.phase_warnings(checks.phase_conditions(r, c, sc), sc)]
    assert "hold-pressure" in codes


def test_bleed_off_speed_follows_the_load():
    # Ideal pump, no drops: p = F/A1.  The bleed restrictor is an orifice,
    # Q_b = Q_b0 sqrt(p/p0) (Merritt 1967); with the load 10 % up, p' = 1.1 p0, so
    # Q1' = Q_th - Q_b0 sqrt(1.1) and (v' - v)/v = Q_b0 (1 - sqrt(1.1)) / Q1.
    c = _ideal(SC, "bleed-off")
    r = circuits.solve_strategy("bleed-off", c)
    change = strategies.bleed_off_speed_change(c, r, 1.1)
    qb0 = Q_TH - Q1_EXT
    expected = qb0 * (1 - math.sqrt(1.1)) / Q1_EXT
    assert change[0] == pytest.approx(expected, rel=1e-6)


def test_ideal_components_from_a_file_book_no_loss():
    """Zero drops are allowed wherever the physics allows them (an ideal
    directional valve, check valve, no pipe length, no fittings, no thermal
    expansion), so a circuit can be checked by hand from a file; such a
    component books exactly no loss and the balance still closes."""
    import re

    from heatload import io
    text = io.default_scenario_path().read_text()
    for pat, rep in [(r'pressure_drop = "[^"]*"', 'pressure_drop = "0 bar"'),
                     (r'cracking_pressure = "0.5 bar"', 'cracking_pressure = "0 bar"'),
                     (r'centre_pressure_drop = "[^"]*"', 'centre_pressure_drop = "0 bar"'),
                     (r'(?m)^length = "4 m".*$', 'length = "0 m"'),
                     (r'fittings_k = [0-9.]+', 'fittings_k = 0'),
                     (r'expansion_coefficient = "[^"]*"', 'expansion_coefficient = "0 1/K"')]:
        text, n = re.subn(pat, rep, text)
        assert n, pat
    sc = io.loads_scenario(text, source="ideal.toml")
    assert sc.power_unit.directional_valve.pressure_drop == 0.0
    assert sc.power_unit.pressure_line.length == 0.0 and sc.fluid.expansion_coefficient == 0.0
    for kind in STRATEGIES:
        r = circuits.solve_strategy(kind, cycle.circuit_inputs(sc, kind))
        for part in ("directional_valve", "check_valve", "lines"):
            assert np.all(r.losses[part] == 0.0), (kind, part)
        assert np.all(np.abs(r.balance_residual) <= 1e-9 * np.maximum(r.electric_power, 1.0))


@pytest.mark.parametrize("kind", STRATEGIES)
def test_a_stalled_actuator_holds_what_the_pump_gives(kind):
    """A load no circuit here can lift (1e9 N on a 100 mm bore, 1.3e6 bar): the
    actuator stalls, its inlet holds the pump's stall pressure less the check
    valve's spring and the outlet is open to tank (no flow, no drop) -- not the
    load's own pressure, which once gave 10^6 bar and 10^14 W of 'losses'."""
    stuck = m.Phase("press", "c", "extend", load=1e9, speed=V_EXT, stroke=0.5)
    sc = _scenario([stuck, m.Phase("wait", None, "idle", duration=5.0)])
    c = cycle.circuit_inputs(sc, kind)
    r = circuits.solve_strategy(kind, c)
    assert r.stalled[0]
    p_pump = r.pump_pressure[0]
    assert r.inlet_pressure[0] == pytest.approx(max(p_pump - float(np.ravel(
        c["check_cracking"])[0]), 0.0), rel=1e-12)
    assert r.outlet_pressure[0] == 0.0
    assert p_pump <= 400e5                        # a relief or compensator setting
    # compression at most V p^2 / (2K) at that pressure (linear bulk modulus)
    v = A1 * 0.5 + sc.actuators[0].dead_volume
    bound = v * p_pump**2 / (2 * sc.fluid.bulk_modulus) / r.duration[0]
    assert r.losses["compression"][0] <= bound * (1 + 1e-9)
    assert np.all(np.abs(r.balance_residual) <= 1e-9 * np.maximum(r.electric_power, 1.0))


# ---------------------------------------------------------------------------
# 5. hi-lo and accumulator circuits, by hand (ideal circuit as in section 1)
# ---------------------------------------------------------------------------

X_HI = 0.25                                     # model default high_pressure_fraction
Q_HI, Q_LO = X_HI * Q_TH, (1 - X_HI) * Q_TH     # 10.15 and 30.45 L/min
P_UNLOAD = P_RELIEF / 3                         # default: a third of the relief, 60 bar
DP_UNLOAD = 3e5                                 # model default unloading_valve_drop


def _lmin(q):
    return q * 60000


def test_hi_lo_approach_both_pumps_unloading_valve_modulates():
    # light load, 30 L/min: between the small pump's 10.15 and both pumps' 40.6 L/min.
    # Required 5 kN / A1 = 6.37 bar + 8 bar (flow control) < 60 bar, so both pumps
    # deliver and the unloading valve holds the system at 60 bar, passing the surplus
    # (common practice: an unloading valve is a pressure valve for the large pump)
    q1 = 30 / 60000
    sc = _scenario([m.Phase("approach", "c", "extend", load=5e3, speed=q1 / A1, stroke=0.4)])
    r = _solve(sc, "hi-lo")
    p1 = 5e3 / A1
    assert _close(r.actuator_flow[0], q1, abs_=1e-12)
    assert _close(r.pump_pressure[0], P_UNLOAD)
    assert _close(r.pump_flow[0], Q_TH, abs_=1e-12)              # both pumps deliver
    assert _close(r.bleed_flow[0], Q_TH - q1, abs_=1e-12)         # 10.6 L/min at 60 bar
    assert _close(r.losses["bleed"][0], (Q_TH - q1) * P_UNLOAD)
    assert _close(r.losses["flow_control"][0], q1 * (P_UNLOAD - p1))
    assert r.relief_flow[0] == 0
    # ideal pumps: shaft = 60 bar x 40.6 L/min / 600 = 4.06 kW (P = p Q)
    assert r.shaft_power[0] / 1e3 == pytest.approx(60 * 40.6 / 600, rel=1e-9)
    # against meter-in with the same total pump, whose surplus crosses 180 bar
    r_in = _solve(sc, "meter-in")
    assert r_in.shaft_power[0] / 1e3 == pytest.approx(180 * 40.6 / 600, rel=1e-9)


def test_hi_lo_pressing_small_pump_large_unloaded():
    # 50 kN needs 63.66 bar > 60: the large pump unloads to tank at 3 bar; the small
    # pump works at the relief (180 bar) and the flow control takes 4.71 L/min
    v = 0.01
    q1 = v * A1
    sc = _scenario([m.Phase("press", "c", "extend", load=F_EXT, speed=v, stroke=0.05)])
    r = _solve(sc, "hi-lo")
    assert _close(r.actuator_flow[0], q1, abs_=1e-12)
    assert _close(r.pump_pressure[0], P_RELIEF)
    assert _close(r.relief_flow[0], Q_HI - q1, abs_=1e-12)
    assert _close(r.losses["relief"][0], (Q_HI - q1) * P_RELIEF)
    # the unloaded pump: 30.45 L/min x 3 bar / 600 = 0.152 kW (P = p Q)
    assert r.losses["bleed"][0] / 1e3 == pytest.approx(30.45 * 3 / 600, rel=1e-9)
    assert _close(r.losses["flow_control"][0], q1 * (P_RELIEF - P1_EXT))
    # shaft: 180 bar x 10.15 + 3 bar x 30.45 L/min, / 600 = 3.045 + 0.152 kW
    assert r.shaft_power[0] / 1e3 == pytest.approx((180 * 10.15 + 3 * 30.45) / 600, rel=1e-9)
    assert abs(r.losses["pump"][0]) < 1e-6
    assert abs(r.balance_residual[0]) < 1e-6


def test_hi_lo_fast_press_limited_to_the_small_pump():
    # 50 kN (63.66 bar, above 60) at 23.56 L/min: only the small pump works at that
    # pressure, so the speed is its 10.15 L/min over A1 (continuity)
    r = _solve(SC, "hi-lo")
    assert r.flow_limited[0]
    assert _close(r.actuator_flow[0], Q_HI, rel=1e-9, abs_=1e-12)
    assert _close(r.speed[0], Q_HI / A1, rel=1e-9)
    assert r.relief_flow[0] < 1e-9 * Q_TH


def test_hi_lo_hold_over_relief_is_the_small_pump():
    r = _solve(_scenario([EXTEND, _hold("relief")]), "hi-lo")
    # relief unloading: the small pump over the relief, the large one unloaded
    assert _close(r.relief_flow[1], Q_HI, abs_=1e-12)
    assert _close(r.heat_to_oil[1], Q_HI * P_RELIEF + Q_LO * DP_UNLOAD)


P_ACC_MIN, P_ACC_MAX = 100e5, 170e5      # 170 bar: default relief 180 - 10 bar
ACC_V0, ACC_P0 = 0.020, 90e5             # 20 L precharged to 90 bar
P_ATM = 1.01325e5                        # ISO 2533 standard atmosphere


def _acc_scenario(phases, **over):
    par = dict(accumulator_pressure_min=P_ACC_MIN, accumulator_precharge=ACC_P0,
               accumulator_gas_volume=ACC_V0)
    par.update(over)
    return _scenario(phases, **par)


def test_accumulator_mean_pressure_and_volume_by_hand():
    from heatload.components import accumulator as acc
    pa, pb, p0 = P_ACC_MAX + P_ATM, P_ACC_MIN + P_ATM, ACC_P0 + P_ATM
    # Boyle (n = 1): V = V0 p0 / p; usable V0 p0 (1/pb - 1/pa) = 20 L x 91.013 x
    # (1/101.013 - 1/171.013) = 7.376 L
    assert acc.usable_volume(P_ACC_MIN, P_ACC_MAX, ACC_P0, ACC_V0) * 1e3 == pytest.approx(
        20 * 91.01325 * (1 / 101.01325 - 1 / 171.01325), rel=1e-12)
    assert acc.usable_volume(P_ACC_MIN, P_ACC_MAX, ACC_P0, ACC_V0) * 1e3 == pytest.approx(
        7.376, abs=1e-3)
    # isothermal work p V ln(V2/V1) over the volume: ln(pa/pb)/(1/pb - 1/pa), abs.
    assert acc.mean_pressure(P_ACC_MIN, P_ACC_MAX) == pytest.approx(
        math.log(pa / pb) / (1 / pb - 1 / pa) - P_ATM, rel=1e-12)
    # polytropic n = 1.4: W = (pa Va - pb Vb)/(n - 1), V ~ p^(-1/n)
    n = 1.4
    va, vb = pa ** (-1 / n), pb ** (-1 / n)
    assert acc.mean_pressure(P_ACC_MIN, P_ACC_MAX, n) == pytest.approx(
        (pa * va - pb * vb) / (n - 1) / (vb - va) - P_ATM, rel=1e-12)
    # scipy as an independent integrator of p dV over the same swing
    from scipy.integrate import quad
    work, _ = quad(lambda v: pb * vb ** n / v ** n, va, vb)
    assert acc.mean_pressure(P_ACC_MIN, P_ACC_MAX, n) == pytest.approx(
        work / (vb - va) - P_ATM, rel=1e-9)
    assert acc.gas_volume(P_ACC_MAX, ACC_P0, ACC_V0) == pytest.approx(ACC_V0 * p0 / pa)


def test_accumulator_by_hand():
    from heatload.components import accumulator as acc
    # extend 50 kN at 0.05 m/s over 0.5 m (10 s, 23.56 L/min, 3.927 L), idle 30 s
    sc = _acc_scenario([EXTEND, m.Phase("idle", None, "idle", duration=30.0)])
    r = _solve(sc, "accumulator")
    p_m = acc.mean_pressure(P_ACC_MIN, P_ACC_MAX)     # checked by hand above
    volume = Q1_EXT * 10.0
    duty = volume / (Q_TH * 40.0)                     # 3.927 L / 27.07 L = 0.145
    assert volume * 1e3 == pytest.approx(3.92699, rel=1e-5)
    assert r.pump_duty[0] == pytest.approx(duty, rel=1e-12)
    assert duty == pytest.approx(3.92699 / (40.6 / 60 * 40), rel=1e-5)
    assert _close(r.actuator_flow[0], Q1_EXT, abs_=1e-12)
    assert _close(r.pump_pressure[0], p_m)
    # throttling the accumulator's pressure down to the load's: Q1 (p_m - p1)
    assert _close(r.losses["flow_control"][0], Q1_EXT * (p_m - P1_EXT))
    # ideal pump on for d at p_m, idling for 1 - d at 3 bar (P = p Q)
    for i in (0, 1):
        assert _close(r.shaft_power[i], duty * p_m * Q_TH + (1 - duty) * DP_UNLOAD * Q_TH)
        assert _close(r.losses["bleed"][i], (1 - duty) * DP_UNLOAD * Q_TH)
    # the gas takes p_m (d Q_p - Q1): negative while extending, positive idling,
    # zero over the cycle
    assert _close(r.stored_power[0], p_m * (duty * Q_TH - Q1_EXT))
    assert _close(r.stored_power[1], p_m * duty * Q_TH)
    assert abs((r.stored_power * r.duration).sum()) < 1e-9 * p_m * volume
    assert np.all(np.abs(r.balance_residual) < 1e-6)
    # 7.4 L usable covers the phase's 3.9 L, and the pump keeps up: no warning
    conds = strategies.REGISTRY["accumulator"].extra_conditions(_ideal(sc, "accumulator"), r)
    assert not any(cd.mask.any() for cd in conds)


def test_accumulator_too_small_and_pump_behind_are_flagged():
    # 0.12 m/s: 56.5 L/min, more than the pump's 40.6, for 4.17 s: 3.93 L, more than a
    # 5 L accumulator's 1.84 L usable (5 x 91.013 x (1/101.013 - 1/171.013))
    v = 0.12
    sc = _acc_scenario([m.Phase("fast", "c", "extend", load=F_EXT, speed=v, stroke=0.5),
                        m.Phase("idle", None, "idle", duration=1.0)],
                       accumulator_gas_volume=0.005)
    c = _ideal(sc, "accumulator")
    r = circuits.solve_strategy("accumulator", c)
    short, behind = strategies.REGISTRY["accumulator"].extra_conditions(c, r)
    assert short.code == behind.code == "speed-not-reached"
    assert short.mask[0] and not short.mask[1]
    assert short.limit[0] * 1e3 == pytest.approx(1.8440, abs=1e-3)
    # duty 3.927 L / (40.6 L/min x 5.17 s) = 1.12 > 1: the pump falls behind
    duty = v * A1 * (0.5 / v) / (Q_TH * (0.5 / v + 1.0))
    assert duty == pytest.approx(1.12, abs=0.01)
    assert r.pump_duty[0] == pytest.approx(duty, rel=1e-12)
    assert behind.mask[0]
    assert "runs down" in behind.text(0)


def test_accumulator_load_above_its_lowest_pressure_stalls():
    # 60 kN needs 76.4 bar + 8 bar flow control: above a 70 bar minimum
    sc = _acc_scenario([m.Phase("p", "c", "extend", load=60e3, speed=0.05, stroke=0.1)],
                       accumulator_pressure_min=70e5, accumulator_precharge=60e5)
    r = _solve(sc, "accumulator")
    assert r.flow_limited[0] or r.stalled[0]
    assert r.speed[0] < 0.05


# ---------------------------------------------------------------------------
# 6. regeneration (differential connection), by hand
# ---------------------------------------------------------------------------

A_ROD = A1 - A2                                  # pi d^2 / 4 (geometry): 38.48 cm^2


def test_regeneration_speed_and_force_from_the_rod_area():
    # v = Q / A_rod and p = F / A_rod (differential cylinder, common practice):
    # 10 kN and 0.1 m/s need 10e3 / 38.48e-4 = 25.98 bar and 0.1 x 38.48 cm^2 =
    # 23.09 L/min, where the plain extension needs 78.54 cm^2: 47.12 L/min
    assert A_ROD == pytest.approx(math.pi / 4 * ROD**2, rel=1e-12)
    f, v = 10e3, 0.1
    ph = m.Phase("approach", "c", "extend", load=f, speed=v, stroke=0.4, regeneration=True)
    r = _solve(_scenario([ph]), "meter-in")
    assert _close(r.actuator_flow[0], v * A_ROD, abs_=1e-12)
    assert r.actuator_flow[0] * 60000 == pytest.approx(23.09, abs=0.01)
    assert _close(r.inlet_pressure[0], f / A_ROD)
    assert r.inlet_pressure[0] / 1e5 == pytest.approx(25.98, abs=0.01)
    assert _close(r.speed[0], v)
    # ideal drops: the rod side's oil rejoins at the cap pressure, nothing reaches tank
    assert abs(r.outlet_pressure[0]) < 1e-6
    assert _close(r.outlet_flow[0], v * A2, abs_=1e-12)
    assert _close(r.useful_power[0], f * v)
    assert abs(r.losses["actuator"][0]) < 1e-6
    # the full pump flow: v = Q_th / A_rod = 0.176 m/s (40.6 L/min over 38.48 cm^2)
    full = m.Phase("fast", "c", "extend", load=0.0, speed=None, stroke=0.4, regeneration=True)
    r_full = _solve(_scenario([full]), "bleed-off")
    assert _close(r_full.speed[0], Q_TH / A_ROD, rel=1e-9)
    # the duration follows: 0.4 m / 0.176 m/s = 2.27 s
    assert _close(r_full.duration[0], 0.4 / (Q_TH / A_ROD), rel=1e-9)


def test_regeneration_with_drops_keeps_the_force_balance():
    # real drops on the rod side's path: p1 A_cap - (p1 + p2) A_ann = F, i.e.
    # p1 A_rod - p2 A_ann = F (force balance, common practice)
    ph = m.Phase("approach", "c", "extend", load=10e3, speed=0.1, stroke=0.4,
                 regeneration=True)
    sc = _scenario([ph])
    r = circuits.solve_strategy("meter-in", cycle.circuit_inputs(sc, "meter-in"))
    p1, p2 = r.inlet_pressure[0], r.outlet_pressure[0]
    assert p2 > 0
    assert p1 * A1 - (p1 + p2) * A2 == pytest.approx(10e3, rel=1e-9)
    assert abs(r.balance_residual[0]) < 1e-9 * r.electric_power[0]


# ---------------------------------------------------------------------------
# 7. repeated blocks of phases
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("strategy", STRATEGIES)
def test_repeated_block_equals_the_copied_phases(strategy):
    # a block (press, back) run 3 times in the cycle, written once, gives the cycle
    # the copied phases give: time t_A + 3 (t_B + t_C), energy sum(P t) alike
    a = m.Phase("approach", "c", "extend", load=2e3, speed=0.1, stroke=0.2, compress=False)
    b = m.Phase("press", "c", "extend", load=F_EXT, speed=0.02, stroke=0.05, compress=False)
    cc = m.Phase("back", "c", "retract", load=1e3, speed=0.1, stroke=0.05, compress=False)
    idle = m.Phase("wait", None, "idle", duration=4.0)
    rep = dataclasses.replace(_scenario([a, b, cc, idle]),
                              repeats=(m.Repeat("press", "back", 3),))
    copied = _scenario([a, b, cc, dataclasses.replace(b, name="press2"),
                        dataclasses.replace(cc, name="back2"),
                        dataclasses.replace(b, name="press3"),
                        dataclasses.replace(cc, name="back3"), idle])
    r = circuits.solve_strategy(strategy, cycle.circuit_inputs(rep, strategy))
    k = circuits.solve_strategy(strategy, cycle.circuit_inputs(copied, strategy))
    t_one = 0.2 / 0.1 + 3 * (0.05 / 0.02 + 0.05 / 0.1) + 4.0      # 2 + 3 x 3 + 4 = 15 s
    if not (r.flow_limited.any() or r.stalled.any()):
        assert r.duration.sum() == pytest.approx(t_one, rel=1e-12)
    assert r.duration.sum() == pytest.approx(k.duration.sum(), rel=1e-12)
    for name in ("electric_power", "heat_to_oil"):
        e_rep = (getattr(r, name) * r.duration).sum()
        e_cop = (getattr(k, name) * k.duration).sum()
        assert e_rep == pytest.approx(e_cop, rel=1e-9), name
    assert np.all(np.abs(r.balance_residual) <= 1e-9 * (np.abs(r.electric_power) + 1.0))


# ---------------------------------------------------------------------------
# 8. valves set per actuator, and a hold on a pilot-operated check
# ---------------------------------------------------------------------------

def test_back_pressure_valve_per_actuator_by_hand():
    # a 10 bar back-pressure valve in the outlet line: p2 = 10 bar while moving, so the
    # force balance p1 A1 - p2 A2 = F gives p1 = (F + A2 x 10 bar)/A1 = 63.66 + 5.1 bar;
    # its loss Q2 x 10 bar (P = p Q); in a hold it does nothing
    bp = 10e5
    acts = (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5, back_pressure=bp),)
    sc = _scenario([EXTEND, _hold("relief")], actuators=acts)
    r = _solve(sc, "meter-in")
    p1 = (F_EXT + A2 * bp) / A1
    assert _close(r.inlet_pressure[0], p1)
    assert _close(r.outlet_pressure[0], bp)
    q2 = Q1_EXT * A2 / A1
    assert _close(r.losses["counterbalance"][0], q2 * bp)
    assert _close(r.losses["flow_control"][0], Q1_EXT * (P_RELIEF - p1))
    assert r.outlet_pressure[1] == 0 and r.losses["counterbalance"][1] == 0
    # retracting, the valve sits in the (cap side) outlet: p1 A2 - bp A1 = F
    back = m.Phase("back", "c", "retract", load=5e3, speed=0.05, stroke=0.3)
    r2 = _solve(_scenario([back], actuators=acts), "meter-in")
    assert _close(r2.inlet_pressure[0], (5e3 + A1 * bp) / A2)
    # meter-out: the outlet throttle takes what the valve leaves, p2 still from the balance
    r3 = _solve(sc, "meter-out")
    assert _close(r3.outlet_pressure[0], (P_RELIEF * A1 - F_EXT) / A2)
    assert _close(r3.losses["counterbalance"][0] + r3.losses["flow_control"][0],
                  q2 * (P_RELIEF * A1 - F_EXT) / A2)
    for res in (r, r2, r3):
        assert np.all(np.abs(res.balance_residual) < 1e-6)


def test_counterbalance_per_actuator_replaces_the_strategys():
    # the actuator's own valve: the same hand formula as the strategy's
    # p1 = (F + A2 setting)/(A1 + r A2), here with r = 4 (common practice)
    f = -20e3
    setting = 1.3 * abs(f) / A2
    acts = (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5, counterbalance_setting=setting,
                       counterbalance_pilot_ratio=4.0),)
    sc = _scenario([m.Phase("lower", "c", "extend", load=f, speed=V_EXT, stroke=0.3)],
                   actuators=acts)
    r = _solve(sc, "meter-in")
    assert not r.runaway[0] and r.counterbalance_active[0]
    p1 = (f + A2 * setting) / (A1 + 4.0 * A2)
    assert _close(r.inlet_pressure[0], p1)
    assert _close(r.outlet_pressure[0], setting - 4.0 * p1)
    # and it wins over a strategy's setting
    sc2 = _scenario([m.Phase("lower", "c", "extend", load=f, speed=V_EXT, stroke=0.3)],
                    actuators=acts, counterbalance_setting=2 * setting)
    assert _close(_solve(sc2, "meter-in").inlet_pressure[0], p1)


@pytest.mark.parametrize("strategy", ["meter-in", "bleed-off", "bypass-compensated", "hi-lo",
                                      "variable-speed"])
def test_hold_on_a_pilot_operated_check_unloads_the_pump(strategy):
    # closed centre, 150 bar held by a pilot-operated check: the pump is vented at the
    # valve's centre drop, 3 bar at 60 L/min ~ Q^2 (orifice law, common practice):
    # 3 x (40.6/60)^2 = 1.374 bar; no relief flow; the chamber stays at 150 bar
    sc = _scenario([EXTEND, _hold("pilot-check", hold_pressure=150e5)])
    c = _ideal(sc, strategy, dv_centre_drop=3e5, centre_unloads=np.array(False))
    r = circuits.solve_strategy(strategy, c)
    q = Q_TH * (0.1 if strategy == "variable-speed" else 1.0)   # at its minimum speed
    p_vent = 3e5 * (q / (60 / 60000)) ** 2
    if strategy != "variable-speed":
        assert p_vent / 1e5 == pytest.approx(3 * (40.6 / 60) ** 2, rel=1e-9)
    assert _close(r.pump_pressure[1], p_vent)
    assert r.relief_flow[1] == 0
    assert _close(r.inlet_pressure[1], 150e5)
    assert _close(r.heat_to_oil[1], q * p_vent)              # ideal pump: the vent only
    # held over the relief instead, the same hold costs 180 bar x 40.6 L/min = 12.2 kW
    # (hi-lo: 180 bar x 10.15 + 3 bar x 30.45 L/min = 3.2 kW), against 93 W vented
    r_relief = circuits.solve_strategy(strategy, _ideal(
        _scenario([EXTEND, _hold("relief", hold_pressure=150e5)]), strategy))
    if strategy != "variable-speed":    # which holds at its minimum speed either way
        assert r_relief.heat_to_oil[1] > 30 * r.heat_to_oil[1]
    # no hold-pressure warning: the check holds, not the pump
    from heatload import checks
    conds = checks.phase_conditions(r, c, sc)
    assert not any(cd.mask[1] for cd in conds if cd.code == "hold-pressure")


@pytest.mark.parametrize("strategy", ["pressure-compensated", "load-sensing"])
def test_hold_on_a_pilot_operated_check_variable_pump_destrokes(strategy):
    # a variable pump need not be vented: it sits at zero stroke at its compensator
    # (150 bar here) or at its standby (25 bar, model default); ideal pump: no flow, no heat
    sc = _scenario([EXTEND, _hold("pilot-check", hold_pressure=160e5)],
                   compensator_setting=150e5)
    r = _solve(sc, strategy)
    assert _close(r.pump_pressure[1], 150e5 if strategy == "pressure-compensated" else 25e5)
    assert abs(r.pump_flow[1]) < 1e-12 and abs(r.heat_to_oil[1]) < 1e-6
    assert _close(r.inlet_pressure[1], 160e5)               # the check holds 160 bar


def test_an_ideal_pump_is_the_limit_of_a_real_one():
    # volumetric efficiency 0.999 -> 1.0 moves the heat by about the 0.1 % more flow,
    # not by the relief's whole drop (a zero-leak pump once sat a full-flow phase at
    # the relief: 17 bar -> 180 bar on the forming press)
    import dataclasses
    from heatload import chain, io
    sc = io.load_scenario(io.default_scenario_path())
    heat = []
    for eff in (0.999, 1.0):
        pu = sc.power_unit
        pump = dataclasses.replace(pu.pump, volumetric_efficiency=eff)
        s2 = dataclasses.replace(sc, power_unit=dataclasses.replace(pu, pump=pump))
        o = chain.evaluate_strategy(s2, s2.strategies[0])
        heat.append(o.thermal.heat_uncoupled)
    assert heat[1] == pytest.approx(heat[0], rel=2e-3)


# ---------------------------------------------------------------------------
# strategies side by side in one batch (a comparison solved at once)
# ---------------------------------------------------------------------------

def _stacked(bases, n_phases):
    """Solver inputs of several rows, every entry given per row and phase."""
    out = {k: np.concatenate([np.broadcast_to(np.asarray(b[k]), (1, n_phases)) for b in bases])
           for k in bases[0] if k != "shape"}
    out["shape"] = (len(bases), n_phases)
    return out


def _rows_equal(single, mixed, i, n_phases):
    """Row *i* of *mixed* holds every figure of *single* (one row), bit for bit."""
    def same(a, b):
        return np.array_equal(np.broadcast_to(a, (1, n_phases)),
                              np.broadcast_to(np.asarray(b), (mixed.pump_pressure.shape[0],
                                                              n_phases))[i:i + 1],
                              equal_nan=True)
    for f in dataclasses.fields(single):
        a = getattr(single, f.name)
        if f.name == "strategy" or a is None:
            continue
        b = getattr(mixed, f.name)
        if isinstance(a, dict):
            assert all(same(a[k], b[k]) for k in a), f.name
        else:
            assert same(a, b), f.name


@pytest.mark.parametrize("example", [p.name for p in example_paths()])
def test_strategies_side_by_side_equal_each_alone(example):
    # every strategy at two oil temperatures in one batch gives each row exactly
    # what its strategy gives alone (the relations are element by element; the
    # batch only dispatches each circuit's own calls to its rows)
    sc = next(load_scenario(p) for p in example_paths() if p.name == example)
    kinds = list(STRATEGIES)
    bases, singles = [], []
    for kind in kinds:
        st = next((s for s in sc.strategies if s.kind == kind), m.Strategy(kind))
        for t in (313.15, 353.15):
            c = cycle.circuit_inputs(sc, st, t)
            bases.append(c)
            singles.append(circuits.solve_strategy(kind, c))
    p = len(sc.phases)
    mixed = circuits.solve_strategy([k for k in kinds for _ in range(2)], _stacked(bases, p))
    assert mixed.strategy == tuple(k for k in kinds for _ in range(2))
    for i, single in enumerate(singles):
        _rows_equal(single, mixed, i, p)
