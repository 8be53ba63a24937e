"""Tests of heatload.hydraulics.energy: cycle and yearly sums written out by hand."""

import numpy as np
import pytest

from heatload.hydraulics import circuits, cycle, energy
from heatload import model as m


def _result(**kw):
    """A two-phase CircuitResult with chosen numbers (no solve)."""
    z = np.zeros(2)
    losses = {k: z.copy() for k in circuits.LOSS_COMPONENTS}
    losses.update(kw.pop("losses", {}))
    base = dict(strategy="meter-in", pump_pressure=np.array([150e5, 20e5]),
                inlet_pressure=np.array([120e5, 0.0]), outlet_pressure=np.array([3e5, 0.0]),
                pump_flow=z, actuator_flow=z, outlet_flow=z, relief_flow=z, bleed_flow=z,
                speed=z, speed_target=z, pump_shaft_speed=z, displacement_fraction=z,
                throttle_drop=z, duration=np.array([10.0, 30.0]), shaft_power=z,
                electric_power=np.array([1000.0, 2000.0]),
                useful_power=np.array([400.0, -100.0]), losses=losses,
                stalled=z.astype(bool), flow_limited=z.astype(bool), runaway=z.astype(bool),
                counterbalance_active=z.astype(bool))
    base.update(kw)
    return circuits.CircuitResult(**base)


def test_summarize_by_hand():
    losses = {"relief": np.array([300.0, 1500.0]), "drive_motor": np.array([100.0, 200.0]),
              "pump": np.array([200.0, 400.0])}
    r = _result(losses=losses)
    eco = m.Economics(hours_per_year=4000.0, electricity_price=0.20 / 3.6e6,
                      grid_co2_factor=0.35 / 3.6e6)
    e = energy.summarize(r, eco)
    # E = sum P t: 1000 x 10 + 2000 x 30 = 70 kJ per 40 s cycle
    assert e.cycle_time == pytest.approx(40.0)
    assert e.electric_energy_per_cycle == pytest.approx(70e3)
    # heat to oil: relief + pump = (300 + 200) x 10 + (1500 + 400) x 30 = 62 kJ
    assert e.heat_to_oil_per_cycle == pytest.approx(62e3)
    assert e.room_heat_per_cycle == pytest.approx(100 * 10 + 200 * 30)
    assert e.average_heat_to_oil == pytest.approx(62e3 / 40)
    assert e.average_electric_power == pytest.approx(70e3 / 40)
    # useful net 400 x 10 - 100 x 30 = 1 kJ; efficiency counts positive work only: 4/70
    assert e.useful_energy_per_cycle == pytest.approx(1e3)
    assert e.overall_efficiency == pytest.approx(4e3 / 70e3)
    # cycles per year = 4000 h x 3600 s/h / 40 s = 360 000
    assert e.cycles_per_year == pytest.approx(360e3)
    # 70 kJ x 360 000 = 25.2 GJ = 7000 kWh; 0.20 /kWh -> 1400; 0.35 kg/kWh -> 2450 kg
    assert e.electric_energy_per_year == pytest.approx(25.2e9)
    assert e.electric_energy_per_year_kWh == pytest.approx(7000.0)
    assert e.cost_per_year == pytest.approx(1400.0)
    assert e.co2_per_year == pytest.approx(2450.0)
    # highest of pump, inlet and outlet pressures
    assert e.peak_pressure == pytest.approx(150e5)
    assert e.component_energy_per_cycle["relief"] == pytest.approx(300 * 10 + 1500 * 30)


def test_summarize_reduces_the_last_axis_only():
    sc = m.Scenario("v", (m.Phase("e", "c", "extend", load=20e3, speed=0.05, stroke=0.3),
                          m.Phase("i", None, "idle", duration=5.0)),
                    (m.Cylinder("c", bore=0.08, rod=0.05, stroke=0.3),),
                    (m.Strategy("meter-in"),))
    temps = np.array([300.0, 330.0])
    rb = circuits.solve_strategy("meter-in", cycle.circuit_inputs(sc, "meter-in", temps))
    eb = energy.summarize(rb, sc.economics)
    assert eb.electric_energy_per_cycle.shape == (2,)
    for i, t in enumerate(temps):
        e1 = energy.summarize(circuits.solve_strategy(
            "meter-in", cycle.circuit_inputs(sc, "meter-in", t)), sc.economics)
        assert eb.electric_energy_per_cycle[i] == pytest.approx(
            float(e1.electric_energy_per_cycle), rel=1e-12)


def test_phase_table_columns_and_energies():
    sc = m.Scenario("v", (m.Phase("ext", "c", "extend", load=20e3, speed=0.05, stroke=0.3),
                          m.Phase("ret", "c", "retract", load=1e3, speed=0.1, stroke=0.3)),
                    (m.Cylinder("c", bore=0.08, rod=0.05, stroke=0.3),),
                    (m.Strategy("meter-in"),))
    r = circuits.solve_strategy("meter-in", cycle.circuit_inputs(sc, "meter-in"))
    df = energy.phase_table(r, sc)
    assert list(df["phase"]) == ["ext", "ret"]
    # cap pressure is the inlet while extending, the outlet while retracting
    assert df["cap_pressure_Pa"][0] == r.inlet_pressure[0]
    assert df["cap_pressure_Pa"][1] == r.outlet_pressure[1]
    np.testing.assert_allclose(df["electric_energy_J"], r.electric_power * r.duration)
    np.testing.assert_allclose(df["heat_to_oil_J"], r.heat_to_oil * r.duration)
    for k in circuits.LOSS_COMPONENTS:
        assert f"loss_{k}_W" in df.columns
