"""The decision rule (heatload.decision): feasible first, then yearly cost of
ownership; the same order in compare --json, the CLI table and the report."""

import contextlib
import io as stdio
import json
import re
from pathlib import Path

import numpy as np
import pytest

from heatload import chain, decision, io
from heatload.cli import main


def _run(argv):
    out = stdio.StringIO()
    with contextlib.redirect_stdout(out):
        rc = main(argv)
    return rc, out.getvalue()


@pytest.fixture(scope="module")
def press140(tmp_path_factory):
    """The forming press with its forming load raised to 140 kN (coining at 178 bar,
    above what a 170 bar compensator or an LS pump below the relief can give)."""
    text = io.default_scenario_path().read_text(encoding="utf-8")
    text, n = re.subn(r'load = "120 kN"', 'load = "140 kN"', text)
    assert n == 1
    p = tmp_path_factory.mktemp("press") / "press140.toml"
    p.write_text(text, encoding="utf-8")
    return p


def test_capital_recovery_factor_annuity_tables():
    # annuity (capital recovery) factors of compound-interest tables:
    # 5 %, 10 years 0.12950; 8 %, 15 years 0.11683; 10 %, 5 years 0.26380
    for i, n, a in ((0.05, 10, 0.12950), (0.08, 15, 0.11683), (0.10, 5, 0.26380)):
        assert float(decision.capital_recovery_factor(i, n)) == pytest.approx(a, abs=5e-6)
    # no interest: straight-line, price / life (definition)
    assert float(decision.capital_recovery_factor(0.0, 4)) == 0.25
    # the annuity pays the price back: present value of n payments = 1 (definition)
    i, n = 0.07, 12
    a = float(decision.capital_recovery_factor(i, n))
    assert sum(a / (1 + i) ** k for k in range(1, n + 1)) == pytest.approx(1.0, rel=1e-12)


def test_fan_on_fraction_is_load_over_capacity():
    # an on/off controller runs its fraction load / capacity of the time (first law)
    np.testing.assert_allclose(decision.fan_on_fraction([0.0, 2.0, 5.0, 9.0], 4.0),
                               [0.0, 0.5, 1.0, 1.0])
    assert float(decision.fan_on_fraction(3.0, 0.0)) == 0.0


def test_rank_order_feasible_first():
    order = decision.rank_order([False, True, True, False], [1.0, 5.0, 3.0, 0.5])
    assert list(order) == [2, 1, 3, 0]


def test_sweep_feasibility_from_counts():
    counts = {"stall": np.array([0, 1, 0, 0]), "runaway": np.array([0, 0, 2, 0]),
              "intensification": np.array([3, 0, 0, 0]),
              "motor-overload": np.array([0, 0, 0, 1])}
    assert list(decision.feasible_counts(counts)) == [True, False, False, False]


def test_press_140kN_stalled_circuits_are_out(press140):
    rc, out = _run(["compare", str(press140), "--json", "--no-phases"])
    assert rc == 0
    js = json.loads(out)
    recs = {r["label"]: r for r in js["strategies"]}
    stalled = {n for n, r in recs.items() if any(w["code"] == "stall" for w in r["warnings"])}
    assert stalled, "the 140 kN press should stall some circuits"
    for n in stalled:
        assert recs[n]["feasible"] is False
        assert "stalls" in recs[n]["reason"]
    rec = js["recommended"]
    assert rec is not None and recs[rec]["feasible"] is True
    assert js["ranking"][0] == rec
    # every feasible strategy ranks before every infeasible one, by yearly cost
    feas = [recs[n]["feasible"] for n in js["ranking"]]
    assert feas == sorted(feas, reverse=True)
    ok = [recs[n]["yearly_cost_total"] for n in js["ranking"] if recs[n]["feasible"]]
    assert ok == sorted(ok)
    for r in recs.values():
        assert r["reason"] and "\n" not in r["reason"]
        c = r["yearly_cost"]
        assert c["total"] == pytest.approx(c["energy"] + c["fan"] + c["circuit"] + c["cooler"])
        # electricity: kWh per year x price per kWh (definition)
        assert c["energy"] == pytest.approx(r["electric_energy_per_year_kWh"]
                                            * js["scenario"]["electricity_price_per_kWh"])
    # the CLI's table ranks in the same order and prints the decision
    rc, text = _run(["compare", str(press140)])
    assert f"Build {rec}" in text
    # (a feasible row is numbered by its rank, a ruled-out one marked "out")
    rows = [ln.split()[1] for ln in text.splitlines()
            if re.match(r"^\s*(\d+|out)\s+\S", ln)]
    assert rows[:len(js["ranking"])] == js["ranking"]
    marks = {ln.split()[1]: ln.split()[0] for ln in text.splitlines()
             if re.match(r"^\s*(\d+|out)\s+\S", ln)}
    assert all((marks[n] == "out") == (not recs[n]["feasible"]) for n in js["ranking"])


def test_cost_of_ownership_by_hand():
    sc = io.load_scenario(io.default_scenario_path())
    cmp = chain.compare(sc, ["meter-in", "variable-speed"])
    o = cmp.outcome("meter-in")
    c = decision.yearly_cost(sc, o)
    a = float(decision.capital_recovery_factor(sc.economics.interest_rate,
                                               sc.economics.service_life))
    duty = o.thermal.cooler_duty if o.thermal.cooler_needed else 0.0
    price = (decision.DEFAULT_COOLER_PRICE_FIXED + decision.DEFAULT_COOLER_PRICE_PER_KW
             * duty / 1e3) if duty > 0 else 0.0
    assert c.cooler_price == pytest.approx(price)
    assert c.cooler == pytest.approx(a * price)
    assert c.circuit == pytest.approx(a * (o.strategy.parameters.price or 0.0))
    # the fan never draws more than its power over every running hour
    cap = decision.DEFAULT_FAN_POWER_FRACTION * duty * sc.economics.hours_per_year / 1e3
    assert 0.0 <= c.fan_energy_kWh <= cap + 1e-9
    # a price from the command line replaces the file's
    assert decision.yearly_cost(sc, o, price=1000.0).circuit == pytest.approx(a * 1000.0)
    d = cmp.decision()
    assert d.saving(d.present) == 0.0
    assert d.sentence().endswith(".")


@pytest.mark.parametrize("amount, words", [("nan", "finite"), ("inf", "finite"),
                                           ("1e999", "finite"), ("-1", "within 0"),
                                           ("1e308", "within 0"), ("cheap", "a number")])
def test_prices_are_finite_and_bounded(amount, words):
    from heatload.decision import price_value
    from heatload.errors import HeatloadError
    with pytest.raises(HeatloadError, match=words):
        price_value(amount, "--price")
    assert price_value("4200", "--price") == 4200.0
