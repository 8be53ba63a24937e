"""Tests of heatload.outputs.wording: warnings written in the reader's units, in plain
sentences grouped by severity for customers, and field paths in plain words."""

import pytest

from heatload import chain, decision, io
from heatload.outputs import tables, wording
from heatload.checks import CODE_KINDS

PSI = 6894.757293168      # Pa per psi (NIST SP 811, B.8)
HP = 745.6998715822702    # W per horsepower, mechanical (NIST SP 811, B.8)


@pytest.fixture(scope="module")
def records():
    cmp = chain.compare(io.load_scenario(io.default_scenario_path()))
    return tables.comparison_dict(cmp, with_phases=False)["strategies"]


def test_us_text_converts_every_figure(records):
    """Each figure of a US warning is its SI value converted by the NIST factors,
    and no SI unit is left in it."""
    seen = set()
    for r in records:
        for w in r["warnings"]:
            us = wording.warning_text(w, "us")
            assert wording.warning_text(w, "si") == w["message"]
            for q in w["quantities"]:
                seen.add(q["kind"])
                if q["kind"] == "pressure":
                    assert f"{q['value'] / PSI:,.0f} psi" in us
                elif q["kind"] == "temperature":
                    assert f"{(q['value'] - 273.15) * 9 / 5 + 32:,.0f} °F" in us
                elif q["kind"] == "power":
                    assert " hp" in us and " kW" not in us
            for unit in (" bar", "°C", " kW", "L/min"):
                assert unit not in us, (unit, us)
    assert {"pressure", "temperature", "power", "flow"} <= seen


def test_a_power_in_hp():
    w = {"code": "motor-overload", "phase": None, "template": "takes {0}",
         "quantities": [{"value": 7500.0, "kind": "power", "decimals": None}]}
    assert wording.warning_text(w, "us") == f"takes {7500.0 / HP:.1f} hp"   # 10.1 hp


def test_severity_follows_the_decision_rule(records):
    """A warning reads "rules the circuit out" exactly where the decision rule
    rules the strategy out by it."""
    for r in records:
        blocking = [w for w in r["warnings"] if w["severity"] == "blocking"]
        assert bool(blocking) == (r["feasible"] is False)
        for w in blocking:
            assert w["code"] in decision.BLOCKING + ("motor-overload",)
    assert wording.severity("correlation-range") == "information"
    assert wording.severity("relief-passing") == "attention"
    assert wording.severity("stall", blocking=True) == "blocking"


def test_customer_sentences_grouped_without_codes(records):
    for code in CODE_KINDS:               # hyphenated codes never; "stall" is a word
        assert ("-" not in code or code not in wording.sentence(code))
        assert wording.sentence(code).endswith(".") and code in wording.SENTENCES
    meter_out = next(r for r in records if r["label"] == "meter-out")
    groups = wording.customer_warnings(meter_out["warnings"])
    heads = [h for h, _ in groups]
    # most serious first, each heading once
    order = [h for _, h in wording.SEVERITIES]
    assert heads == sorted(heads, key=order.index) and len(set(heads)) == len(heads)
    assert heads[0] == "Rules the circuit out"
    sentences = [s for _, items in groups for s, _ in items]
    assert len(sentences) == len(set(sentences))          # one sentence per code
    assert wording.severity_counts(meter_out["warnings"]).startswith("3 rule it out")


def test_plain_paths():
    sc = io.load_scenario(io.default_scenario_path())
    assert wording.plain_path("phases[*].load") == "phase loads"
    assert wording.plain_path("phases[0].speed", sc) == f"speed of phase {sc.phases[0].name}"
    assert wording.plain_path("reservoir.heat_transfer_factor") == "tank heat-transfer factor"
    assert wording.plain_path("power_unit.relief.cracking_pressure") == \
        "relief valve cracking pressure"
    assert wording.plain_path("actuators.main.bore") == "bore of actuator main"
    for p in ("phases[*].load", "ambient.temperature_max", "economics.electricity_price"):
        assert "[" not in wording.plain_path(p) and "_" not in wording.plain_path(p)


def test_every_code_has_a_kind_and_a_sentence():
    from heatload.checks import PHASE_CODES
    codes = set(PHASE_CODES) | {"oil-temperature", "viscosity-window", "correlation-range"}
    assert codes <= set(CODE_KINDS) and codes <= set(wording.SENTENCES)


def test_one_caution_text():
    # the caution lives in one place; the CLI, report, cooler sheet and dashboard import it
    from pathlib import Path
    root = Path(wording.__file__).parents[2]
    holders = [p.relative_to(root).as_posix()
               for folder in ("heatload", "dashboard") for p in (root / folder).rglob("*.py")
               if "licensed engineering practice" in p.read_text(encoding="utf-8")]
    assert holders == ["heatload/outputs/wording.py"]
    assert "ISO 4413" in wording.CAUTION
