"""Tests of the cooler job (heatload.cooling.sizing) against first-law balances,
effectiveness-NTU / LMTD relations, the ht library and CoolProp properties."""

import contextlib
import io as stdio
import json
import math
import sys

import numpy as np
import pytest

import heatload.studies

from heatload import chain, io
from heatload.cooling import sizing
from heatload.cli import main
from heatload.errors import HeatloadError

K0 = 273.15


@pytest.fixture(scope="module")
def press():
    sc = io.load_scenario(io.default_scenario_path())  # air-oil cooler scenario
    return sc, chain.compare(sc)


@pytest.fixture(scope="module")
def winch():
    path = [p for p in io.example_paths() if p.name == "conveyor_winch.toml"][0]
    sc = io.load_scenario(path)  # water-oil cooler scenario
    return sc, chain.compare(sc, ["meter-in", "variable-speed"])


@pytest.fixture(scope="module")
def lift():
    path = [p for p in io.example_paths() if p.name == "platform_lift.toml"][0]
    sc = io.load_scenario(path)
    return sc, chain.compare(sc)


def _air_cp(t):
    from CoolProp.CoolProp import PropsSI
    return PropsSI("C", "T", t, "P", 101325.0, "Air")


def _water_cp(t):
    from CoolProp.CoolProp import PropsSI
    return PropsSI("C", "T", t, "P", 101325.0, "Water")


def test_cycle_average_flow_by_hand():
    # definition of a time average: (1*1 + 3*3) / (1 + 3) = 2.5
    assert sizing.cycle_average_flow([1.0, 3.0], [1.0, 3.0]) == pytest.approx(2.5, rel=1e-15)
    with pytest.raises(HeatloadError):
        sizing.cycle_average_flow([1.0], [0.0])


def test_design_point_first_law(press):
    sc, cmp = press
    o = cmp.outcome("meter-in")
    sz = sizing.size_cooler(sc, o, thermostat=False)
    th = o.thermal
    # steady balance at the design point (first law): P0 = Q - UA (T_d - T_a,max)
    shed = th.design_conductance * (th.design_oil_temperature - sc.ambient.temperature_max)
    assert sz.surfaces_heat == pytest.approx(shed, rel=1e-12)
    assert sz.duty_without_margin == pytest.approx(th.design_heat - shed, rel=1e-9)
    assert sz.duty == pytest.approx(sz.duty_without_margin * (1 + sc.cooler.margin), rel=1e-9)
    assert sz.cooler_needed
    # return-line cooler: time average of the pump flow, summed by hand
    q = o.circuit.pump_flow
    t = o.circuit.duration
    hand = sum(float(a) * float(b) for a, b in zip(q, t)) / sum(float(b) for b in t)
    assert sz.oil_flow == pytest.approx(hand, rel=1e-12)


def test_air_cooler_balances(press):
    sc, cmp = press
    sz = sizing.size_cooler(sc, cmp.outcome("meter-in"), coolant="air", thermostat=False)
    a = sz.air
    etd = sz.design_oil_temperature - sc.ambient.temperature_max
    # specific cooling power is duty per kelvin of ETD (common practice of catalogues)
    assert float(a.etd) == pytest.approx(etd, rel=1e-12)
    assert float(a.specific_cooling_power) * etd == pytest.approx(sz.duty, rel=1e-12)
    # air side first law: m cp dT = P, cp of air from CoolProp at the mean air temperature
    rise = sc.cooler.air_temperature_rise
    cp_air = _air_cp(sc.ambient.temperature_max + rise / 2)
    assert float(a.air_mass_flow) * cp_air * rise == pytest.approx(sz.duty, rel=2e-3)
    # oil side first law: rho Q cp dT = P; density by linear expansion from 15 degC
    # (rho = rho15 (1 - beta (T - 288.15)), a hand formula; 0.3 % covers 1/(1+x) vs 1-x)
    f = sc.fluid
    rho_hand = f.density_15C * (1 - f.expansion_coefficient * (sz.design_oil_temperature - 288.15))
    assert sz.oil_density == pytest.approx(rho_hand, rel=3e-3)
    drop = float(a.oil_temperature_drop)
    assert sz.oil_density * sz.oil_flow * sz.oil_specific_heat * drop == pytest.approx(
        sz.duty, rel=1e-9)
    # Cragoe (1929) in its US form, from memory: c = (0.388 + 0.00045 T_F) / sqrt(s)
    # Btu/(lb F), s = specific gravity 60/60 F (water 999.0 kg/m^3 at 60 F, from memory);
    # 1 Btu/(lb F) = 4186.8 J/(kg K)
    if f.specific_heat is None:
        t_f = (sz.design_oil_temperature - K0) * 1.8 + 32
        rho60 = f.density_15C / (1 + f.expansion_coefficient * (288.7056 - 288.15))
        c_hand = (0.388 + 0.00045 * t_f) / math.sqrt(rho60 / 999.0)
        assert sz.oil_specific_heat == pytest.approx(c_hand * 4186.8, rel=5e-3)


def test_spec_sheet_consistent(press):
    sc, cmp = press
    sz = sizing.size_cooler(sc, cmp.outcome("load-sensing"), coolant="air", thermostat=False)
    s = sz.spec
    assert s.coolant == "air"
    assert s.duty == pytest.approx(sz.duty, rel=1e-12)
    assert s.duty == pytest.approx(s.duty_without_margin * (1 + s.margin), rel=1e-12)
    assert s.specific_cooling_power * s.etd == pytest.approx(s.duty, rel=1e-12)
    assert s.oil_pressure_drop_max == sc.cooler.oil_pressure_drop_max
    assert s.oil_flow == pytest.approx(sz.oil_flow, rel=1e-12)
    # ASTM D341 (Walther): log log (nu + 0.7) = A - B log T, through 40 and 100 degC, by hand
    f = sc.fluid
    z1 = math.log10(math.log10(f.nu40 * 1e6 + 0.7))
    z2 = math.log10(math.log10(f.nu100 * 1e6 + 0.7))
    b = (z1 - z2) / (math.log10(373.15) - math.log10(313.15))
    a = z1 + b * math.log10(313.15)
    nu = (10 ** 10 ** (a - b * math.log10(s.oil_inlet_temperature)) - 0.7) * 1e-6
    assert s.oil_viscosity == pytest.approx(nu, rel=2e-3)
    rows = dict(sizing.spec_rows(sz, "si"))
    assert "kW" in rows["duty to quote (with margin)"]
    us = dict(sizing.spec_rows(sz, "us"))
    assert "psi" in us["allowed oil-side pressure drop"] and "gpm" in us["oil flow"]
    assert "cfm" in us["air flow"]


def test_water_cooler_balances_and_lmtd(winch):
    sc, cmp = winch
    sz = sizing.size_cooler(sc, cmp.outcome("meter-in"), coolant="water", thermostat=False)
    assert set(sz.water) == {"counterflow", "shell-and-tube"}
    t_w = sc.cooler.water_inlet_temperature
    t_oil = sz.design_oil_temperature
    for arr, w in sz.water.items():
        p = float(w.duty)
        assert p == pytest.approx(sz.duty, rel=1e-12)
        # water side first law with CoolProp's cp at the mean water temperature; the
        # allowed rise is met when no flow is given
        t_out = float(w.water_outlet_temperature)
        assert t_out - t_w == pytest.approx(sc.cooler.water_temperature_rise, rel=1e-6)
        assert float(w.water_mass_flow) * _water_cp(0.5 * (t_w + t_out)) * (t_out - t_w) == \
            pytest.approx(p, rel=2e-3)
        # oil side first law
        c_oil = sz.oil_density * sz.oil_flow * sz.oil_specific_heat
        assert c_oil * (t_oil - float(w.oil_outlet_temperature)) == pytest.approx(p, rel=1e-9)
        # effectiveness definition (Incropera 6th ed. eq. 11.20)
        c_min = min(c_oil, float(w.water_capacity_rate))
        assert float(w.effectiveness) == pytest.approx(p / (c_min * (t_oil - t_w)), rel=1e-9)
    # counterflow: P = UA LMTD (Incropera 6th ed. eqs. 11.14-11.15), independent of e-NTU
    cf = sz.water["counterflow"]
    d1 = t_oil - float(cf.water_outlet_temperature)
    d2 = float(cf.oil_outlet_temperature) - t_w
    lmtd = (d1 - d2) / math.log(d1 / d2)
    assert float(cf.required_conductance) == pytest.approx(float(cf.duty) / lmtd, rel=1e-6)
    # shell-and-tube, one shell two tube passes: effectiveness from the ht library
    ht = pytest.importorskip("ht")
    st = sz.water["shell-and-tube"]
    eps = ht.effectiveness_from_NTU(float(st.ntu), float(st.capacity_ratio), subtype="S&T",
                                    n_shell_tube=1)
    assert eps == pytest.approx(float(st.effectiveness), rel=1e-6)
    # counterflow is the most effective arrangement: it never needs more UA (second law)
    assert float(cf.required_conductance) <= float(st.required_conductance) * (1 + 1e-12)
    spec = sz.spec
    assert spec.coolant == "water" and spec.arrangement == "shell-and-tube"
    assert spec.required_conductance == pytest.approx(float(st.required_conductance), rel=1e-9)


def test_rating_proportional_to_etd(press, winch):
    sc, cmp = press
    sz = sizing.size_cooler(sc, cmp.outcome("load-sensing"), rated_duty=10e3, rated_etd=40.0,
                            thermostat=False)
    etd = sz.design_oil_temperature - sc.ambient.temperature_max
    # duty proportional to ETD at fixed flows (common practice): 10 kW x ETD / 40 K
    assert sz.rating["design_etd_K"] == pytest.approx(etd, rel=1e-12)
    assert sz.rating["duty_at_design_W"] == pytest.approx(10e3 * etd / 40.0, rel=1e-12)
    assert sz.rating["suffices"] == (10e3 * etd / 40.0 >= sz.duty)
    small = sizing.rate_cooler(sz, 0.5 * sz.duty * 40.0 / etd, 40.0)
    assert not small["suffices"] and small["ratio"] == pytest.approx(0.5, rel=1e-9)
    # water: the ETD is against the water inlet
    scw, cmpw = winch
    szw = sizing.size_cooler(scw, cmpw.outcome("meter-in"), coolant="water", rated_duty=20e3,
                             rated_etd=30.0, thermostat=False)
    etd_w = szw.design_oil_temperature - scw.cooler.water_inlet_temperature
    assert szw.rating["duty_at_design_W"] == pytest.approx(20e3 * etd_w / 30.0, rel=1e-12)
    with pytest.raises(HeatloadError) as e:
        sizing.size_cooler(sc, cmp.outcome("load-sensing"), rated_duty=10e3, thermostat=False)
    assert e.value.field == "--rated-etd"


def test_thermostat_summary(press):
    sc, cmp = press
    o = cmp.outcome("load-sensing")
    t = sizing.thermostat_summary(sc, o)
    assert t["switch_count"] >= 1
    assert 0.0 < t["on_fraction"] < 1.0
    assert t["max_temperature_K"] <= sc.fluid.temperature_max
    # the cooler's duty is sized for the hottest day, so on a typical day the oil is held
    # within the hysteresis band around the switch-on temperature (two-point control)
    assert t["max_temperature_K"] <= t["on_temperature_K"] + 2.0


def test_no_cooler_needed(lift):
    sc, cmp = lift
    o = next(o for o in cmp.outcomes if not o.thermal.cooler_needed)
    sz = sizing.size_cooler(sc, o)
    assert not sz.cooler_needed and sz.spec is None and sz.air is None and not sz.water
    assert sz.design_heat <= sz.surfaces_heat  # first law: the surfaces shed it all
    assert any("no cooler needed" in n for n in sz.notes)
    rec = sizing.sizing_record(sz)
    json.dumps(rec, allow_nan=False)
    assert rec["duty_W"] == 0.0 and rec["spec"] is None


def test_bad_inputs(press):
    sc, cmp = press
    with pytest.raises(HeatloadError) as e:
        sizing.size_cooler(sc, cmp.outcomes[0], coolant="oil")
    assert e.value.field == "--coolant"
    with pytest.raises(HeatloadError) as e:
        sizing._design_strategy(sc, "no-such")
    assert e.value.field == "--strategy"


def _run(argv):
    out = stdio.StringIO()
    err = stdio.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        rc = main(argv)
    return rc, out.getvalue(), err.getvalue()


def test_cli_json_and_text(monkeypatch):
    monkeypatch.setitem(sys.modules, "heatload.studies.uncertainty", None)
    monkeypatch.delattr(heatload.studies, "uncertainty", raising=False)  # fast; tested below
    rc, out, _ = _run(["cooler", "--json", "--rated-duty", "10 kW", "--rated-etd", "40 K"])
    assert rc == 0
    rec = json.loads(out)
    assert rec["strategy"] == "meter-in"  # the scenario's present circuit
    assert rec["spec"]["duty_W"] == pytest.approx(rec["duty_W"])
    assert rec["rating"]["rated_duty_W"] == 10e3 and rec["rating"]["rated_etd_K"] == 40.0
    assert rec["uncertainty"]["available"] is False
    rc, out, _ = _run(["cooler", "--units", "us", "--coolant", "water", "--strategy",
                       "load-sensing"])
    assert rc == 0
    assert "Spec sheet" in out and "psi" in out and "gpm" in out
    assert "estimate for early design" in out
    assert "uncertainty not available" in out
    rc, _, err = _run(["cooler", "--rated-duty", "ten"])
    assert rc == 2 and "--rated-duty" in err


def test_uncertainty_degrades(press, monkeypatch):
    sc, cmp = press
    monkeypatch.setitem(sys.modules, "heatload.studies.uncertainty", None)
    monkeypatch.delattr(heatload.studies, "uncertainty", raising=False)  # import fails
    u = sizing.cooler_uncertainty(sc, cmp.outcomes[0].strategy, samples=10)
    assert u["available"] is False and "uncertainty not available" in u["note"]


def test_uncertainty_percentiles(press):
    pytest.importorskip("heatload.studies.uncertainty")
    sc, cmp = press
    u = sizing.cooler_uncertainty(sc, sc.strategy("load-sensing"), samples=400, seed=3)
    assert u["available"], u["note"]
    d = u["cooler_duty_W"]
    t = u["oil_temperature_C"]
    assert d["P50"] <= d["P90"] <= d["P95"]
    assert t["P50"] <= t["P90"] <= t["P95"]
    assert u["sensitivity"] and "path" in u["sensitivity"][0]
    json.dumps(u, allow_nan=False)


def test_coolant_not_colder_than_the_oil_is_refused(press, tmp_path):
    # water at 90 degC cannot take heat from oil held at 55 degC (ETD < 0, second
    # law): `--coolant water` refuses with the field, file and line instead of
    # printing an air sizing with exit 0
    import dataclasses
    sc, cmp = press
    hot = dataclasses.replace(sc, cooler=dataclasses.replace(
        sc.cooler, water_inlet_temperature=K0 + 90.0))
    with pytest.raises(HeatloadError) as e:
        sizing.size_cooler(hot, cmp.outcome("meter-in"), coolant="water", thermostat=False)
    assert e.value.field == "cooler.water_inlet_temperature"
    assert "cannot cool" in e.value.message
    # equality is no better: the ETD is zero
    same = dataclasses.replace(sc, cooler=dataclasses.replace(
        sc.cooler, water_inlet_temperature=cmp.outcomes[0].thermal.design_oil_temperature))
    with pytest.raises(HeatloadError):
        sizing.size_cooler(same, cmp.outcomes[0], coolant="water", thermostat=False)
    # the file's own coolant (air) still sizes; the water sizing is only noted impossible
    sz = sizing.size_cooler(hot, cmp.outcome("meter-in"), thermostat=False)
    assert sz.spec is not None and sz.spec.coolant == "air"
    text = io.default_scenario_path().read_text(encoding="utf-8")
    text = text.replace('coolant = "air"', 'coolant = "air"\nwater_inlet_temperature = "90 degC"')
    path = tmp_path / "hot_water.toml"
    path.write_text(text, encoding="utf-8")
    rc, out, err = _run(["cooler", str(path), "--coolant", "water", "--samples", "2"])
    assert rc == 2 and out == ""
    line = text.splitlines().index('water_inlet_temperature = "90 degC"') + 1
    assert err.startswith(f"heatload: error: {path}:{line}: cooler.water_inlet_temperature:")
    assert err.count("\n") == 1


def test_air_coolant_hotter_than_the_design_refused(winch):
    # the winch sizes a water cooler; asked for air on a day hotter than its design
    # oil temperature, no air cooler can hold it (ETD <= 0)
    import dataclasses
    sc, cmp = winch
    o = cmp.outcome("meter-in")
    t_d = o.thermal.design_oil_temperature
    hot_day = dataclasses.replace(o.thermal, design_ambient=t_d + 1.0)
    with pytest.raises(HeatloadError) as e:
        sizing.size_cooler(sc, dataclasses.replace(o, thermal=hot_day), coolant="air",
                           thermostat=False)
    assert e.value.field == "cooler.oil_temperature_max" and "air cooler" in e.value.message


def test_air_flow_is_at_the_sites_air_density():
    """The air cooler's air flow is a volume at the air inlet: at the site's
    altitude the air is thinner and the same mass flow takes more volume.
    ISO 2533 standard atmosphere: 98.945 kPa at 200 m against 101.325 kPa at
    sea level (from memory), so 2.41 % more volume at 200 m."""
    import dataclasses

    sc = io.load_scenario(io.default_scenario_path())       # the press stands at 200 m
    assert sc.ambient.altitude == pytest.approx(200.0)
    sea = dataclasses.replace(sc, ambient=dataclasses.replace(sc.ambient, altitude=0.0))
    at_site = sizing.size_cooler(sc, chain.compare(sc).outcome("meter-in"), coolant="air",
                                 thermostat=False)
    at_sea = sizing.size_cooler(sea, chain.compare(sea).outcome("meter-in"), coolant="air",
                                thermostat=False)
    assert at_site.air.air_mass_flow == pytest.approx(at_sea.air.air_mass_flow, rel=1e-3)
    assert at_site.spec.coolant_flow / at_sea.spec.coolant_flow == pytest.approx(
        101.325 / 98.945, rel=2e-3)


def _hot_hall():
    """The press in a 60 °C hall (69 °C on the hottest day), the oil designed to
    75 °C: an ETD of 6 K, below the air cooler's 10 K air temperature rise."""
    import dataclasses
    from heatload import io
    sc = io.load_scenario(io.default_scenario_path())
    return dataclasses.replace(
        sc, uncertainty=(),
        ambient=dataclasses.replace(sc.ambient, temperature=333.15, temperature_max=342.15),
        cooler=dataclasses.replace(sc.cooler, oil_temperature_max=348.15))


def test_a_cooler_no_unit_can_give_rules_the_strategy_out_everywhere():
    # compare, cooler and report agree: the comparison flags it (cooler-design,
    # ruling the strategy out), `cooler` refuses it, the report sizes without a
    # sheet and says why
    from heatload import chain
    from heatload.cooling import sizing
    from heatload.errors import HeatloadError
    sc = _hot_hall()
    cmp = chain.compare(sc)
    needs = [o for o in cmp.outcomes if o.thermal.cooler_needed]
    assert needs
    for o in cmp.outcomes:
        flagged = any(w.code == "cooler-design" for w in o.warnings)
        assert flagged == o.thermal.cooler_needed, o.name
    verdicts = {v.name: v for v in cmp.decision().verdicts}
    assert all(not verdicts[o.name].feasible for o in needs)
    with pytest.raises(HeatloadError, match="no air-oil cooler can hold"):
        sizing.size_cooler(sc, needs[0])
    sz = sizing.size_cooler(sc, needs[0], strict=False, thermostat=False)
    assert sz.spec is None and "no air-oil cooler can hold" in sz.notes[0]
    # the ETD (6 K) is below the air's temperature rise (10 K): no air cooler
    assert sz.design_oil_temperature - sz.design_ambient < sc.cooler.air_temperature_rise


def test_the_default_press_has_no_cooler_design_warning():
    from heatload import chain, io
    cmp = chain.compare(io.load_scenario(io.default_scenario_path()))
    assert not [w for o in cmp.outcomes for w in o.warnings if w.code == "cooler-design"]


def test_a_design_temperature_outside_the_pumps_viscosity_window_is_cautioned():
    # the cooler holds the oil at the design temperature, so the pump runs there:
    # at 55 °C the press's ISO VG 46 oil is about 25 mm²/s (ISO 3448 grade, Walther
    # line of ASTM D341), below a pump asking at least 30
    import dataclasses
    from heatload import chain, io
    from heatload.cooling import sizing
    sc = io.load_scenario(io.default_scenario_path())
    pu = sc.power_unit
    strict = dataclasses.replace(sc, power_unit=dataclasses.replace(
        pu, pump=dataclasses.replace(pu.pump, viscosity_min=30e-6, rated_viscosity=30e-6)))
    o = chain.evaluate_strategy(strict, strict.strategy("meter-in"))
    sz = sizing.size_cooler(strict, o, thermostat=False)
    assert sz.oil_viscosity < 30e-6
    assert sz.notes[0].startswith("caution: at the design oil temperature 55.0 °C")
    assert "below the pump's least 30 mm²/s" in sz.notes[0]
    plain = sizing.size_cooler(sc, chain.evaluate_strategy(sc, sc.strategy("meter-in")),
                               thermostat=False)
    assert not any(n.startswith("caution: at the design") for n in plain.notes)
