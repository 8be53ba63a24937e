"""Tests of heatload.hydraulics.cycle: scenario -> per-phase arrays (geometry by hand)."""

import math

import numpy as np
import pytest

from heatload.hydraulics import circuits, cycle
from heatload import model as m

BORE, ROD, STROKE = 0.080, 0.050, 0.4
A_CAP = math.pi / 4 * BORE**2                 # pi D^2 / 4 (geometry)
A_ANN = math.pi / 4 * (BORE**2 - ROD**2)      # pi (D^2 - d^2) / 4 (geometry)
Q_PUMP = 28e-6 * 1450 / 60                    # model.Pump default D n [m^3/s]


def _sc(phases, actuators=None, **par):
    acts = actuators or (m.Cylinder("c", bore=BORE, rod=ROD, stroke=STROKE,
                                    friction_force=300.0, dead_volume=2e-4),)
    p = m.StrategyParameters(**par)
    return m.Scenario("t", tuple(phases), tuple(acts),
                      tuple(m.Strategy(s, parameters=p) for s in m.STRATEGIES))


PHASES = [m.Phase("extend", "c", "extend", load=30e3, speed=0.1, stroke=STROKE),
          m.Phase("press", "c", "hold", duration=4.0, hold_force=60e3),
          m.Phase("retract", "c", "retract", load=2e3, speed=None, stroke=STROKE),
          m.Phase("idle", None, "idle", duration=6.0)]


def test_areas_targets_and_durations():
    pa = cycle.phase_arrays(_sc(PHASES))
    # extend: in = cap, out = annulus; retract swaps them (geometry)
    assert pa["a_in"][0] == pytest.approx(A_CAP) and pa["a_out"][0] == pytest.approx(A_ANN)
    assert pa["a_in"][2] == pytest.approx(A_ANN) and pa["a_out"][2] == pytest.approx(A_CAP)
    assert pa["q_ratio"][0] == pytest.approx(A_ANN / A_CAP)
    # set flow Q = v A (continuity); speed None = full pump flow (inf target)
    assert pa["q_target"][0] == pytest.approx(0.1 * A_CAP)
    assert np.isinf(pa["q_target"][2])
    # duration from the stroke at the set speed t = s / v; at full flow v = Q_p / A_in
    assert pa["duration"][0] == pytest.approx(STROKE / 0.1)
    assert pa["duration"][2] == pytest.approx(STROKE / (Q_PUMP / A_ANN))
    assert pa["by_stroke"][0] and pa["by_stroke"][2] and not pa["by_stroke"][1]
    assert pa["duration"][1] == 4.0 and pa["duration"][3] == 6.0
    # effective force: load + friction while moving, none held
    assert pa["force"][0] == pytest.approx(30e3 + 300.0)
    assert pa["force"][2] == pytest.approx(2e3 + 300.0)
    # hold force -> pressure on the cap area p = F / A
    assert pa["hold_pressure"][1] == pytest.approx(60e3 / A_CAP)
    assert list(pa["moving"]) == [True, False, True, False]
    # compressed volume: cap area x stroke + dead volume
    assert pa["compression_volume"][0] == pytest.approx(A_CAP * STROKE + 2e-4)


def test_previous_phase_same_chamber():
    pa = cycle.phase_arrays(_sc(PHASES))
    # the hold pressurises the cap chamber the extend left pressurised: previous = 0;
    # retract uses the rod chamber (none before); extend follows idle (cyclic): none
    assert list(pa["previous_phase"]) == [-1, 0, -1, -1]
    # two extends back to back (cyclically): each one's previous is the other
    pa2 = cycle.phase_arrays(_sc(PHASES[:1] + [m.Phase("e2", "c", "extend", load=1e3,
                                                        speed=0.05, stroke=0.1)]))
    assert list(pa2["previous_phase"]) == [1, 0]


def test_compression_energy_by_hand():
    # energy to compress V from p0 to p: V (p^2 - p0^2) / (2 K) (linear bulk modulus,
    # common practice), released as heat over the phase
    sc = _sc(PHASES)
    c = dict(cycle.circuit_inputs(sc, "load-sensing"))
    r = circuits.solve_strategy("load-sensing", cycle.finalize(c))
    v = A_CAP * STROKE + 2e-4
    k = sc.fluid.bulk_modulus
    p_ext, p_hold = r.inlet_pressure[0], r.inlet_pressure[1]
    assert p_hold > p_ext
    v_rod = A_ANN * STROKE + 2e-4
    # both chambers: the inlet one filled at p1, the outlet one (full at the start)
    # pressed from its earlier pressure to p2
    p2 = r.outlet_pressure
    e_hold = (v * (p_hold**2 - p_ext**2) + v_rod * max(p2[1]**2 - p2[0]**2, 0.0)) / (2 * k)
    assert r.losses["compression"][1] == pytest.approx(e_hold / r.duration[1], rel=1e-12)
    assert r.losses["compression"][0] == pytest.approx(
        (v * p_ext**2 + v_rod * p2[0]**2) / (2 * k) / r.duration[0], rel=1e-12)
    # the rod chamber compresses from zero to its pressure, the cap side it empties too
    assert r.losses["compression"][2] == pytest.approx(
        (v_rod * r.inlet_pressure[2]**2 + v * p2[2]**2) / (2 * k) / r.duration[2], rel=1e-12)
    assert r.losses["compression"][3] == 0.0


def test_meter_out_outlet_chamber_stores_compression_energy():
    """A meter-out circuit intensifies the rod chamber (p2 A2 = p1 A1 - F): the
    energy V2 p2^2 / (2 K) stored there at the start of the stroke is lost as heat
    like the inlet chamber's (linear bulk modulus, common practice)."""
    sc = _sc(PHASES)
    r = circuits.solve_strategy("meter-out", cycle.finalize(dict(
        cycle.circuit_inputs(sc, "meter-out"))))
    k = sc.fluid.bulk_modulus
    v_cap, v_rod = A_CAP * STROKE + 2e-4, A_ANN * STROKE + 2e-4
    p1, p2 = r.inlet_pressure[0], r.outlet_pressure[0]
    assert p2 > 10e5                                   # the throttle holds back the outlet
    e = (v_cap * p1**2 + v_rod * p2**2) / (2 * k)
    assert r.losses["compression"][0] == pytest.approx(e / r.duration[0], rel=1e-12)
    assert v_rod * p2**2 / (v_cap * p1**2) > 0.3       # not a rounding: a real share


def test_motor_arrays():
    d, ev, ehm = 80e-6, 0.94, 0.90
    mot = m.HydraulicMotor("mot", displacement=d, volumetric_efficiency=ev,
                           hydromechanical_efficiency=ehm)
    sc = _sc([m.Phase("drive", "mot", "run", load=150.0, speed=10.0, duration=5.0),
              m.Phase("brake", "mot", "run", load=-60.0, speed=8.0, duration=5.0)],
             actuators=(mot,))
    pa = cycle.phase_arrays(sc)
    # driving: dp D = 2 pi T / eta_hm, n = Q eta_v / D (ISO 4391 definitions)
    assert pa["force"][0] == pytest.approx(2 * math.pi * 150.0 / ehm)
    assert pa["q_target"][0] == pytest.approx(10.0 * d / ev)
    # overrun: it pumps, dp D = 2 pi T eta_hm, Q = D n eta_v
    assert pa["force"][1] == pytest.approx(2 * math.pi * -60.0 * ehm)
    assert pa["q_target"][1] == pytest.approx(8.0 * d * ev)
    assert pa["work_per_load_speed"][0] == pytest.approx(2 * math.pi)


def test_strategy_arrays_use_the_scenarios_parameters():
    sc = _sc(PHASES, compensator_setting=140e5, load_sensing_margin=15e5)
    s = cycle.strategy_arrays(sc, "pressure-compensated")
    assert s["compensator"] == 140e5 and s["ls_margin"] == 15e5
    # default compensator: relief cracking - 10 bar (model.StrategyParameters doc)
    s0 = cycle.strategy_arrays(_sc(PHASES), m.Strategy("pressure-compensated"))
    assert s0["compensator"] == pytest.approx(180e5 - 10e5)


def test_circuit_inputs_broadcast_and_finalize():
    sc = _sc(PHASES)
    c = cycle.circuit_inputs(sc, "meter-in", np.array([300.0, 320.0, 340.0]))
    assert c["shape"] == (3, 4)
    assert c["a_in"].shape == (3, 4) and c["viscosity"].shape == (3, 4)
    # oil thins as it warms (ASTM D341 behaviour)
    assert c["viscosity"][0, 0] > c["viscosity"][1, 0] > c["viscosity"][2, 0]
    c2 = dict(c)
    c2["relief_cracking"] = np.array([150e5, 200e5])[:, None, None]
    f = cycle.finalize(c2)
    assert f["shape"] == (2, 3, 4) and f["load"].shape == (2, 3, 4)


def test_reference_temperature_matches_rated_viscosity():
    from heatload.properties import oil
    sc = _sc(PHASES)
    t = cycle.reference_oil_temperature(sc)
    # the pump's datasheet viscosity (model default 32 mm^2/s) at the reference T
    assert float(oil.kinematic_viscosity(sc.fluid, t)) == pytest.approx(32e-6, rel=1e-6)
