"""The file's heat calibration (measured / model heat, ``[scenario]
heat_calibration``) in the one evaluation path.

Check values: the steady first law of a lumped tank without a cooler,
f P = UA (T - T_a), so T = T_a + f P / UA (any heat-transfer text, e.g.
Incropera et al., 6th ed., Sec. 5.3, at steady state); the tank's UA worked
out by hand from its walls and lid with a given coefficient h (UA = h A);
the cooler duty as the first-law balance of the cooled tank at its design
point, duty = max(0, f Q_d - UA_d (T_d - T_a,max)) (1 + margin) (common
practice).  The heat P itself is the circuit's mean heat over the cycle,
sum(Q_i t_i) / sum(t_i), read from an independent solve of the circuit.
"""

import dataclasses
import json

import numpy as np
import pytest

from heatload import chain, evaluation, io
from heatload.hydraulics import cycle
from heatload.measurement import measured
from heatload.outputs import tables
from heatload.studies import variants
from heatload.cli import main
from heatload.errors import HeatloadError

EXAMPLES = io.example_paths()


def _mean_heat(r):
    """The circuit's time-average heat into the oil over the cycle [W] (by hand)."""
    return float((r.heat_to_oil * r.duration).sum() / r.duration.sum())


@pytest.fixture(scope="module", params=EXAMPLES, ids=lambda p: p.stem)
def example(request):
    sc = io.load_scenario(request.param)
    return sc, chain.compare(sc), chain.compare(dataclasses.replace(sc, heat_calibration=1.5))


def _hand_tank(sc, h=9.0):
    """The scenario's tank full to the lid, no further surfaces, bottom on the floor,
    with a given coefficient h [W/(m^2 K)]: UA = h (2 (L + W) H + L W), by hand."""
    r = dataclasses.replace(sc.reservoir, heat_transfer_coefficient=h, oil_level=1.0,
                            surfaces=(), bottom_exposed=False)
    ua = h * (2.0 * (r.length + r.width) * r.height + r.length * r.width)
    return dataclasses.replace(sc, reservoir=r), ua


@pytest.mark.parametrize("strategy", ["meter-in", "load-sensing"])
def test_factor_moves_the_steady_temperature_as_the_closed_form_says(strategy):
    base, ua = _hand_tank(io.load_scenario(io.default_scenario_path()))
    st = base.strategy(strategy)
    t_ref = cycle.reference_oil_temperature(base)
    p_ref = _mean_heat(chain.solve_at(base, st, t_ref))          # raw model heat [W]
    ta = base.ambient.temperature
    for f in (1.0, 1.5, 0.6):
        sc = dataclasses.replace(base, heat_calibration=f)
        ev = evaluation.evaluate(sc, st)
        # uncoupled (circuit at the reference T): T = T_a + f P / UA, exactly
        assert float(ev.heat_uncoupled[0]) == pytest.approx(f * p_ref, rel=1e-12)
        assert float(ev.steady_uncoupled[0]) == pytest.approx(ta + f * p_ref / ua, rel=1e-9)
        # coupled: the circuit's raw heat at the returned T, times f, balances UA (T - T_a)
        # within the coupling's 0.01 K x UA
        t_c = float(ev.steady_coupled[0])
        p_c = _mean_heat(chain.solve_at(sc, st, t_c))
        assert abs(f * p_c - ua * (t_c - ta)) <= 0.01 * ua * 1.0001
        assert float(ev.heat_coupled[0]) == pytest.approx(f * p_c, rel=1e-9)
        assert float(ev.conductance[0]) == pytest.approx(ua, rel=1e-9)


def test_factor_one_and_a_half_raises_the_rise_by_half_at_fixed_heat():
    # oil at the reference T (no coupling): the rise over ambient is f P / UA, so
    # f = 1.5 gives exactly 1.5 times the rise of f = 1
    base, _ = _hand_tank(io.load_scenario(io.default_scenario_path()))
    ta = base.ambient.temperature
    one = evaluation.evaluate(base, "meter-in", thermal=False)
    more = evaluation.evaluate(dataclasses.replace(base, heat_calibration=1.5), "meter-in",
                               thermal=False)
    rise1 = float(one.steady_uncoupled[0]) - ta
    assert float(more.steady_uncoupled[0]) - ta == pytest.approx(1.5 * rise1, rel=1e-12)
    # the circuit's own figures (electricity, losses) are not calibrated
    np.testing.assert_array_equal(one.operating.electric_power, more.operating.electric_power)
    np.testing.assert_array_equal(one.operating.heat_to_oil, more.operating.heat_to_oil)


def test_factor_one_leaves_every_example_at_the_raw_model(example):
    # f = 1: every thermal heat is the circuit's own heat, to 1e-12
    sc, cmp, _ = example
    t_ref = cycle.reference_oil_temperature(sc)
    for o in cmp.outcomes:
        th = o.thermal
        assert th.heat_calibration == 1.0
        assert th.heat_uncoupled == pytest.approx(
            _mean_heat(chain.solve_at(sc, o.strategy, t_ref)), rel=1e-12)
        assert th.design_heat == pytest.approx(
            _mean_heat(chain.solve_at(sc, o.strategy, th.design_oil_temperature)), rel=1e-12)
        raw_c = chain.solve_at(sc, o.strategy, th.steady_coupled)
        np.testing.assert_allclose(th.phase_heat, raw_c.heat_to_oil, rtol=1e-12, atol=1e-9)
        assert th.heat_running == pytest.approx(float(o.energy.average_heat_to_oil), rel=1e-12)


def test_factor_one_written_in_the_file_changes_no_output(example, tmp_path):
    sc, cmp, _ = example
    text = io.dumps_scenario(sc).replace("[scenario]\n", "[scenario]\nheat_calibration = 1.0\n",
                                         1)
    same = io.loads_scenario(text)
    assert same.heat_calibration == 1.0
    a = tables.comparison_dict(cmp, with_phases=True)
    b = tables.comparison_dict(chain.compare(same), with_phases=True)
    a["scenario"]["file"] = b["scenario"]["file"] = None
    assert json.dumps(a, sort_keys=True) == json.dumps(b, sort_keys=True)


def test_factor_reaches_every_strategy_and_the_cooler_duty(example):
    sc, cmp, cal = example
    t_ref = cycle.reference_oil_temperature(sc)
    margin = sc.cooler.margin
    for o, c in zip(cmp.outcomes, cal.outcomes):
        th = c.thermal
        assert th.heat_calibration == 1.5
        # the heat at a fixed oil temperature scales by f for every strategy
        assert th.heat_uncoupled == pytest.approx(1.5 * o.thermal.heat_uncoupled, rel=1e-12)
        q_d = _mean_heat(chain.solve_at(sc, c.strategy, th.design_oil_temperature))
        assert th.design_heat == pytest.approx(1.5 * q_d, rel=1e-12)
        # first law of the cooled tank at the design point
        excess = 1.5 * q_d - th.design_conductance * (th.design_oil_temperature
                                                      - th.design_ambient)
        assert th.cooler_duty == pytest.approx(max(excess, 0.0) * (1 + margin), rel=1e-9,
                                               abs=1e-9)
        # more heat, never a cooler oil; the electricity is the model circuit's at the
        # oil temperature the machine then runs at (not scaled by f)
        assert th.steady_coupled >= o.thermal.steady_coupled
        raw_op = chain.solve_at(sc, c.strategy, th.operating_temperature)
        np.testing.assert_allclose(c.circuit.electric_power, raw_op.electric_power, rtol=1e-9)
        # the per-phase heat of the shift and the periodic cycle is scaled too
        mean = float((th.phase_heat * th.phase_durations).sum() / th.phase_durations.sum())
        assert mean == pytest.approx(th.heat_coupled, rel=1e-9)


def test_sweep_variants_carry_the_factor(example):
    # sweeps and the Monte Carlo evaluate through the same call: a batch of one
    # reproduces compare with the factor
    sc, _, cal = example
    sc15 = dataclasses.replace(sc, heat_calibration=1.5)
    for c in cal.outcomes:
        v = variants.evaluate_variants(sc15, c.strategy)
        th = c.thermal
        for got, want in ((v.heat_to_oil, th.heat_running), (v.design_heat, th.design_heat),
                          (v.oil_temperature_steady, th.steady_coupled),
                          (v.cooler_duty, th.cooler_duty)):
            assert float(got[0]) == pytest.approx(want, rel=1e-12, abs=1e-9)


def test_datasheet_rating_settles_with_the_scaled_heat():
    # the datasheet coolers' settled temperature: f Q(T) = (UA(T) + S)(T - T_a,max)
    from heatload.cooling import cooler_datasheet
    sc = io.load_scenario(_lift_log()[1])             # lists datasheet coolers
    assert sc.coolers
    sc = dataclasses.replace(sc, heat_calibration=1.3)
    o = chain.evaluate_strategy(sc, sc.strategy(sc.economics.present_strategy))
    sel = cooler_datasheet.rate_coolers(sc, o)
    ta = o.thermal.design_ambient
    ua = chain.conductance_fn(sc, ta)
    for r in sel.ratings:
        t = r.settled_temperature
        q = 1.3 * _mean_heat(chain.solve_at(sc, o.strategy, t))
        total = float(ua(t)) + r.specific_power
        assert abs(q - total * (t - ta)) <= 0.01 * total * 1.0001, r.name


@pytest.mark.parametrize("value", ["0.1", "7", "0", "-1", '"1.3 kW"', "true"])
def test_implausible_factors_are_refused_with_one_line(value):
    text = io.dumps_scenario(io.load_scenario(io.default_scenario_path())).replace(
        "[scenario]\n", f"[scenario]\nheat_calibration = {value}\n", 1)
    with pytest.raises(HeatloadError) as err:
        io.loads_scenario(text)
    msg = err.value.one_line()
    assert "scenario.heat_calibration" in msg and "\n" not in msg


def test_a_factor_round_trips_through_the_file():
    sc = dataclasses.replace(io.load_scenario(io.default_scenario_path()), heat_calibration=1.27)
    assert io.loads_scenario(io.dumps_scenario(sc)).heat_calibration == 1.27
    assert "heat_calibration" not in io.dumps_scenario(
        dataclasses.replace(sc, heat_calibration=1.0))


# ---------------------------------------------------------------------------
# heatload logfit --scenario: the factor, against the raw model, and how to apply it
# ---------------------------------------------------------------------------

def _lift_log():
    from pathlib import Path
    root = Path(__file__).resolve().parents[1]
    return root / "duty_cycles" / "logs" / "platform_lift_day.csv", \
        root / "duty_cycles" / "platform_lift.toml"


def test_logfit_factor_does_not_feed_back_into_itself(tmp_path, capsys):
    log_path, scen = _lift_log()
    sc = io.load_scenario(scen)
    log = measured.read_temperature_log(log_path)
    cap = float(evaluation.heat_capacity(sc, float(np.mean(log.values["oil"]))))
    fit = measured.fit_log(log, cap)
    raw = measured.scenario_comparison(sc, log, fit)
    applied = measured.scenario_comparison(dataclasses.replace(sc, heat_calibration=1.4),
                                           log, fit)
    for key in ("model_heat_W", "heat_calibration_factor", "model_design_heat_W",
                "model_cooler_duty_W", "measured_cooler_duty_W"):
        assert applied[key] == pytest.approx(raw[key], rel=1e-12), key
    assert applied["file_heat_calibration_factor"] == 1.4
    # the model's heat is the raw circuit's at the logged oil temperature
    st = sc.strategy(sc.economics.present_strategy)
    q = _mean_heat(chain.solve_at(sc, st, raw["logged_oil_temperature_C"] + 273.15))
    assert raw["model_heat_W"] == pytest.approx(q, rel=1e-12)


def test_logfit_prints_the_line_to_add_and_the_line_applies(tmp_path, capsys):
    log_path, scen = _lift_log()
    assert main(["logfit", str(log_path), "--scenario", str(scen)]) == 0
    out = capsys.readouterr().out
    # the text fits 80 columns: a long path may move to the next line
    assert f"add under [scenario] in {scen}" in " ".join(out.split())
    line = next(x.strip() for x in out.splitlines() if x.strip().startswith("heat_calibration ="))
    factor = float(line.split("=")[1])
    assert main(["logfit", str(log_path), "--scenario", str(scen), "--json"]) == 0
    rec = json.loads(capsys.readouterr().out)
    assert rec["heat_calibration_line"] == line
    assert factor == pytest.approx(rec["scenario"]["heat_calibration_factor"], rel=5e-3)
    # the line pasted under [scenario] loads, and logfit then says it replaces it
    text = scen.read_text().replace("[scenario]\n", f"[scenario]\n{line}\n", 1)
    calibrated = tmp_path / "lift.toml"
    calibrated.write_text(text)
    assert io.load_scenario(calibrated).heat_calibration == factor
    assert main(["logfit", str(log_path), "--scenario", str(calibrated)]) == 0
    out = capsys.readouterr().out
    assert f"replace heat_calibration = {factor:.6g} under [scenario]" in " ".join(out.split())
    assert line in out                     # the same factor again, not a factor of a factor
    # the HTML page says it too
    page = tmp_path / "fit.html"
    assert main(["logfit", str(log_path), "--scenario", str(scen), "-o", str(page)]) == 0
    assert line in page.read_text()


def test_outputs_state_the_factor_only_when_it_is_not_one(tmp_path, capsys):
    path = io.default_scenario_path()
    for cmd in (["compare"], ["thermal"], ["phases", "--strategy", "meter-in"], ["cooler",
                                                                                  "--samples", "20"]):
        assert main(cmd + [str(path)]) == 0
        assert "heat_calibration" not in capsys.readouterr().out
    text = path.read_text().replace("[scenario]\n", "[scenario]\nheat_calibration = 1.25\n", 1)
    cal = tmp_path / "cal.toml"
    cal.write_text(text)
    assert main(["check", str(cal)]) == 0
    assert "heat calibration: × 1.25" in capsys.readouterr().out
    for cmd in (["compare"], ["thermal"], ["phases", "--strategy", "meter-in"], ["cooler",
                                                                                  "--samples", "20"]):
        assert main(cmd + [str(cal), "--wide"]) == 0
        out = capsys.readouterr().out
        assert "Heat into the oil × 1.25 (heat_calibration" in out, cmd
    vary = ["sweep", "--vary", "power_unit.pump.displacement=20 cm^3/rev..40 cm^3/rev:2",
            "--strategy", "meter-in", "--top", "1"]
    assert main(vary + [str(cal), "--wide", "-o", str(tmp_path / "s.csv")]) == 0
    assert "Heat into the oil × 1.25 (heat_calibration" in capsys.readouterr().out
    import pandas as pd
    assert (pd.read_csv(tmp_path / "s.csv")["heat_calibration_factor"] == 1.25).all()
    for cmd in (["compare", "--json"], ["thermal", "--json"], ["cooler", "--json",
                                                                 "--samples", "20"]):
        assert main(cmd + [str(cal)]) == 0
        rec = json.loads(capsys.readouterr().out)
        got = (rec["scenario"] if isinstance(rec["scenario"], dict) else rec)[
            "heat_calibration_factor"]
        assert got == 1.25, cmd
