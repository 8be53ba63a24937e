"""Tests of heatload.checks: each warning code raised by a constructed case,
and quiet cases that raise none."""

import math

import pytest

from heatload import checks, circuits, cycle, model as m

BORE, ROD = 0.100, 0.070
A1 = math.pi / 4 * BORE**2                 # pi D^2 / 4 (geometry)
A2 = math.pi / 4 * (BORE**2 - ROD**2)


def _sc(phases, pump=None, dv=None, cyl_rating=250e5, **par):
    pu = m.PowerUnit(pump=pump or m.Pump(),
                     directional_valve=dv or m.DirectionalValve())
    acts = (m.Cylinder("c", bore=BORE, rod=ROD, stroke=0.5, max_pressure=cyl_rating),)
    p = m.StrategyParameters(**par)
    return m.Scenario("chk", tuple(phases), acts,
                      tuple(m.Strategy(s, parameters=p) for s in m.STRATEGIES), power_unit=pu)


def _warn(sc, strategy):
    pa = cycle.phase_arrays(sc)
    r = circuits.solve_strategy(strategy, cycle.circuit_inputs(sc, strategy, phases=pa))
    return checks.phase_warnings(r, sc, pa)


def _codes(ws):
    return {w.code for w in ws}


EXT = m.Phase("ext", "c", "extend", load=40e3, speed=0.05, stroke=0.3)


def test_quiet_case():
    # a moderate load under load sensing: nothing to warn about
    assert _warn(_sc([EXT]), "load-sensing") == []


def test_pressure_rating_pump_valve_actuator():
    # relief 180 bar (model default) above a 150 bar pump rating, a 160 bar valve
    # and a 170 bar cylinder
    sc = _sc([EXT], pump=m.Pump(max_pressure=150e5, rated_pressure=150e5),
             dv=m.DirectionalValve(max_pressure=160e5), cyl_rating=170e5)
    ws = [w for w in _warn(sc, "meter-out") if w.code == "pressure-rating"]
    limits = sorted(w.limit for w in ws)
    assert limits == [150e5, 160e5, 170e5]
    assert all(w.value > w.limit for w in ws)


def test_intensification_meter_out():
    # zero load meter-out: p2 = p_s A1/A2, about 1.96 x supply (common practice)
    sc = _sc([m.Phase("e", "c", "extend", load=0.0, speed=0.05, stroke=0.3)])
    ws = [w for w in _warn(sc, "meter-out") if w.code == "intensification"]
    assert len(ws) == 1
    assert ws[0].value / ws[0].limit == pytest.approx(A1 / A2, rel=0.05)


def test_overrunning_load_meter_in_not_meter_out():
    sc = _sc([m.Phase("lower", "c", "extend", load=-15e3, speed=0.05, stroke=0.3)])
    assert "overrunning-load" in _codes(_warn(sc, "meter-in"))
    assert "overrunning-load" not in _codes(_warn(sc, "meter-out"))


def test_cavitation_with_weak_counterbalance():
    # a counterbalance set at only 2 bar cannot hold 30 kN: the force balance
    # p1 = (F + A2 setting)/(A1 + r A2) < 0 pulls the inlet below -0.3 bar (common practice)
    f, setting = -30e3, 2e5
    sc = _sc([m.Phase("lower", "c", "extend", load=f, speed=0.05, stroke=0.3)],
             counterbalance_setting=setting)
    assert (f + A2 * setting) / (A1 + 3 * A2) < circuits.CAVITATION_THRESHOLD
    ws = [w for w in _warn(sc, "meter-in") if w.code == "cavitation"]
    assert len(ws) == 1 and ws[0].value < ws[0].limit


def test_relief_passing_in_hold():
    sc = _sc([EXT, m.Phase("hold", "c", "hold", duration=5.0, hold_pressure=50e5,
                           unloading="relief")])
    ws = [w for w in _warn(sc, "meter-in") if w.code == "relief-passing"]
    assert len(ws) == 1 and ws[0].phase == "hold"
    # unloaded through a tandem centre instead: no warning
    sc2 = _sc([EXT, m.Phase("hold", "c", "hold", duration=5.0, hold_pressure=50e5,
                            unloading="centre")])
    assert "relief-passing" not in _codes(_warn(sc2, "meter-in"))


def test_speed_not_reached_and_stall():
    fast = m.Phase("fast", "c", "extend", load=10e3, speed=0.2, stroke=0.3)
    ws = [w for w in _warn(_sc([fast]), "meter-in") if w.code == "speed-not-reached"]
    assert len(ws) == 1 and ws[0].value < ws[0].limit
    # 28 cm^3 x 1450 rpm / A1: the pump's speed (continuity)
    assert ws[0].value == pytest.approx(28e-6 * 1450 / 60 / A1, rel=0.02)
    heavy = m.Phase("heavy", "c", "extend", load=200e5 * A1, speed=0.05, stroke=0.3)
    assert "stall" in _codes(_warn(_sc([heavy]), "meter-in"))


def test_temperature_warnings():
    sc = _sc([EXT])
    # VG46 (model.Fluid default, nu100 = 6.8 mm^2/s, a typical VI ~100 oil, common
    # practice) at 100 degC is below the pump's 10 mm^2/s minimum and above the
    # fluid's 80 degC limit
    codes = _codes(checks.temperature_warnings(sc, 373.15))
    assert codes == {"oil-temperature", "viscosity-window"}
    assert checks.temperature_warnings(sc, 323.15) == []
    # a thick oil when cold: above a 500 mm^2/s cold-start limit at -10 degC
    sc_cold = _sc([EXT], pump=m.Pump(viscosity_max=500e-6))
    ws = checks.temperature_warnings(sc_cold, 263.15)
    assert _codes(ws) == {"viscosity-window"} and ws[0].limit == 500e-6


def test_warning_as_dict():
    w = _warn(_sc([m.Phase("fast", "c", "extend", load=1e3, speed=0.2, stroke=0.3)]),
              "meter-in")[0]
    d = w.as_dict()
    assert set(d) == {"code", "phase", "value", "limit", "message"}


def test_thermal_warnings_at_running_and_cold_start():
    # VG 46 by D341 through the model's default datasheet points (ASTM D341):
    # about 7 mm^2/s at 100 degC and several hundred mm^2/s at -10 degC
    from heatload import model as m
    sc = m.Scenario("t", (m.Phase("i", None, "idle", duration=1.0),), (),
                    (m.Strategy("meter-in"),),
                    power_unit=m.PowerUnit(pump=m.Pump(viscosity_min=10e-6, viscosity_max=300e-6)),
                    ambient=m.Ambient(cold_start_temperature=263.15))
    ws = checks.thermal_warnings(sc, steady_no_cooler=373.15, operating=328.15, cooler_duty=5e3)
    assert _codes(ws) == {"oil-temperature", "viscosity-window"}
    assert "a cooler is needed" in ws[0].message
    assert all("cold start" in w.message for w in ws if w.code == "viscosity-window")
    calm = checks.thermal_warnings(sc, 323.15, 323.15, 0.0)   # 50 degC: inside the window
    assert [w.message.split(" at ")[1][:10] for w in calm] == ["cold start"]
