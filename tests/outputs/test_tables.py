"""Tests of heatload.outputs.tables: the JSON export is serialisable and carries
exactly the numbers of the outcome objects; savings and payback by hand."""

import json
import math

import numpy as np
import pytest

from heatload import chain, decision, io
from heatload.hydraulics import circuits
from heatload.outputs import tables

K0 = 273.15
J_PER_KWH = 3.6e6   # 1 kWh = 3.6 MJ (SI definition)


@pytest.fixture(scope="module", params=io.example_paths(), ids=lambda p: p.stem)
def comparison(request):
    return chain.compare(io.load_scenario(request.param))


def test_json_serialisable_and_round_trips(comparison):
    d = tables.comparison_dict(comparison, source="x.toml")
    text = json.dumps(d, allow_nan=False)
    assert json.loads(text) == d
    assert d["scenario"]["file"] == "x.toml"
    assert d["ranking"] == [o.name for o in comparison.ranked()]


def test_numbers_equal_the_outcomes(comparison):
    sc = comparison.scenario
    d = tables.comparison_dict(comparison)
    assert d["scenario"]["phases"] == len(sc.phases)
    assert d["scenario"]["electricity_price_per_kWh"] == pytest.approx(
        sc.economics.electricity_price * J_PER_KWH)
    assert d["scenario"]["ambient_C"] == pytest.approx(sc.ambient.temperature - K0)
    for rec, o in zip(d["strategies"], comparison.outcomes):
        e, th = o.energy, o.thermal
        assert rec["strategy"] == o.strategy.kind and rec["label"] == o.name
        assert rec["heat_to_oil_W"] == float(e.average_heat_to_oil)
        assert rec["electric_energy_per_cycle_J"] == float(e.electric_energy_per_cycle)
        assert rec["electric_energy_per_year_kWh"] == pytest.approx(
            float(e.electric_energy_per_year) / J_PER_KWH, rel=1e-15)
        assert rec["cost_per_year"] == float(e.cost_per_year)
        assert rec["co2_per_year_kg"] == float(e.co2_per_year)
        assert rec["peak_pressure_Pa"] == float(e.peak_pressure)
        assert rec["oil_temperature_steady_C"] == pytest.approx(th.steady_coupled - K0,
                                                                abs=1e-12)
        assert rec["oil_temperature_operating_C"] == pytest.approx(
            th.operating_temperature - K0, abs=1e-12)
        assert rec["cooler_duty_W"] == th.cooler_duty
        assert rec["cooler_needed"] is bool(th.cooler_needed)
        assert [{k: v for k, v in w.items() if k != "severity"}
                for w in rec["warnings"]] == [w.as_dict() for w in o.warnings]
        out = {(w.code, w.phase) for w in decision.blocking_warnings(o, sc)}
        assert [w["severity"] == "blocking" for w in rec["warnings"]] == [
            (w.code, w.phase) in out for w in o.warnings]
        assert set(rec["component_energy_per_cycle_J"]) == set(circuits.LOSS_COMPONENTS)
        assert len(rec["phases"]) == len(sc.phases)
        for i, ph in enumerate(rec["phases"]):
            assert ph["phase"] == sc.phases[i].name
            assert ph["pump_pressure_Pa"] == float(o.circuit.pump_pressure[i])
            assert ph["electric_power_W"] == float(o.circuit.electric_power[i])
            assert ph["losses_W"]["relief"] == float(o.circuit.losses["relief"][i])
            assert ph["stalled"] is bool(o.circuit.stalled[i])
        # the phase powers close to the headline figure: sum P t = E
        e_sum = sum(p["electric_power_W"] * p["duration_s"] for p in rec["phases"])
        assert e_sum == pytest.approx(rec["electric_energy_per_cycle_J"], rel=1e-12)


def test_without_phases(comparison):
    d = tables.comparison_dict(comparison, with_phases=False)
    assert all("phases" not in s for s in d["strategies"])


def test_frames(comparison):
    f = tables.strategy_frame(comparison)
    assert len(f) == len(comparison.outcomes)
    long = tables.phase_component_frame(comparison)
    n = len(comparison.outcomes) * len(comparison.scenario.phases) * len(circuits.LOSS_COMPONENTS)
    assert len(long) == n
    # energies per strategy add up to the component energies per cycle
    o = comparison.outcomes[0]
    sub = long[(long.strategy == o.name) & (long.component == "pump")]
    assert sub.energy_J.sum() == pytest.approx(
        float(o.energy.component_energy_per_cycle["pump"]), rel=1e-12)


def test_savings_against_by_hand(comparison):
    base = comparison.outcomes[0]
    s = tables.savings_against(comparison, base.name)
    assert s[base.name]["energy_saving_kWh"] == 0.0
    for o in comparison.outcomes:
        de = (float(base.energy.electric_energy_per_year)
              - float(o.energy.electric_energy_per_year)) / J_PER_KWH
        assert s[o.name]["energy_saving_kWh"] == pytest.approx(de, rel=1e-12, abs=1e-9)


def test_payback_by_hand():
    # simple payback = extra price / yearly saving (common practice)
    got = tables.payback_years([3000.0, 3000.0, 500.0], [1500.0, 0.0, -10.0])
    assert got[0] == pytest.approx(2.0)
    assert math.isinf(got[1]) and math.isinf(got[2])
    assert np.asarray(got).shape == (3,)


def test_an_accumulators_phases_close_with_the_stored_power():
    # per phase: electric = useful + every loss + the power into the gas (first
    # law of the circuit with the accumulator as its store)
    from heatload import chain, io
    from heatload.outputs import tables
    path = next(p for p in io.example_paths() if p.name == "accumulator_baler.toml")
    sc = io.load_scenario(path)
    cmp = chain.compare(sc, ["accumulator"])
    recs = tables.phase_records(cmp.outcomes[0], sc, cmp.phase_arrays)
    assert any(abs(r["stored_power_W"]) > 1.0 for r in recs)
    for r in recs:
        total = r["useful_power_W"] + sum(r["losses_W"].values()) + r["stored_power_W"]
        assert abs(r["electric_power_W"] - total) <= 1e-6 * max(abs(r["electric_power_W"]), 1.0)
    # a circuit that stores nothing has no such entry
    other = chain.compare(sc, ["meter-in"]).outcomes[0]
    assert "stored_power_W" not in tables.phase_records(other, sc, cmp.phase_arrays)[0]
