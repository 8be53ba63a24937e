"""Server-side behaviour of the dashboard: the callbacks' plain functions,
called directly (no browser, no server).

Check values: conversions from NIST SP 811 (2008) Appendix B; mechanical work
W = F s (definition); payback = extra price / yearly saving (definition of a
simple payback).  Everything else is checked against the engine's own public
functions called independently (the dashboard must only lay them out).
"""

import base64

import numpy as np
import pytest
from dash import no_update

from heatload.dashboard import app as dash_app
from heatload.dashboard import callbacks, compute, figures, state
from heatload import chain, io
from heatload.outputs import tables
from heatload.errors import HeatloadError

LBF = 4.4482216152605        # N per lbf, NIST SP 811 (exact by definition of lbm and g_n)
PSI = 6894.757293168         # Pa per psi, NIST SP 811


@pytest.fixture(scope="module")
def examples():
    return dash_app.scenario_choices()[2]


@pytest.fixture(scope="module")
def base():
    """The default scenario loaded and computed once, as the page would."""
    sc = io.load_scenario(io.default_scenario_path())
    data = io.scenario_to_dict(sc)
    form = state.render_form(data, "si")
    store = {"data": data, "source": "forming_press.toml"}
    return {"scenario": sc, "data": data, "form": form, "store": store,
            "results": compute.compute_results(sc, source="forming_press.toml")}


def _edit(base, examples, rows=None, keys=None, system="si", store=None, results=None):
    f = base["form"]
    return callbacks.update_scenario(
        "phase-table", None, None, None, system,
        rows if rows is not None else f["phase_rows"], f["actuator_rows"],
        keys if keys is not None else f["key_values"],
        store or base["store"], results or base["results"], examples)


def _flagged(styles):
    """The (row, column) cells an error style marks (the active-cell style aside)."""
    return [(st["if"]["row_index"], st["if"]["column_id"]) for st in styles
            if "row_index" in st["if"]]


def _rows(base):
    return [dict(r) for r in base["form"]["phase_rows"]]


# ---------------------------------------------------------------------------
# loading and the comparison
# ---------------------------------------------------------------------------

def test_page_load_computes_the_default_comparison(base, examples):
    f = base["form"]
    out = callbacks.update_scenario(None, None, None, None, "si", f["phase_rows"],
                                    f["actuator_rows"], f["key_values"], base["store"],
                                    None, examples)
    res = out["results"]
    ref = tables.comparison_dict(chain.compare(base["scenario"]))
    assert [r["label"] for r in res["comparison"]["strategies"]] == \
        [r["label"] for r in ref["strategies"]]
    for mine, theirs in zip(res["comparison"]["strategies"], ref["strategies"]):
        assert mine["electric_energy_per_cycle_J"] == pytest.approx(
            theirs["electric_energy_per_cycle_J"], rel=1e-9)
        assert mine["cooler_duty_W"] == pytest.approx(theirs["cooler_duty_W"], rel=1e-9)
    rows = figures.comparison_rows(res, "si")
    assert [r["label"] for r in rows] == ref["ranking"]
    assert all(r["energy"].endswith("kJ") and r["steady"].endswith("°C") for r in rows)
    # warnings sit beside their strategy
    meter_in = next(r for r in rows if r["label"] == "meter-in")
    assert any("relief" in w for w in meter_in["warnings"])


def test_results_are_json_serialisable(base):
    import json

    text = json.dumps(base["results"], allow_nan=False)
    assert "comparison" in json.loads(text)


def test_choosing_an_example_loads_it(base, examples):
    key = next(k for k, p in examples.items() if p.stem == "platform_lift")
    f = base["form"]
    out = callbacks.update_scenario("scenario-select", key, None, None, "si", f["phase_rows"],
                                    f["actuator_rows"], f["key_values"], base["store"],
                                    base["results"], examples)
    lift = io.load_scenario(examples[key])
    assert out["results"]["name"] == lift.name
    assert len(out["phase_rows"]) == len(lift.phases)
    assert "platform_lift.toml" in out["source_label"]


# ---------------------------------------------------------------------------
# editing
# ---------------------------------------------------------------------------

def test_editing_a_phase_load_changes_the_numbers(base, examples):
    rows = _rows(base)
    assert rows[2]["name"] == "forming" and rows[2]["load"] == "100"
    rows[2]["load"] = "130"
    out = _edit(base, examples, rows)
    assert out["form_errors"] == []
    new = io.scenario_from_dict(out["store"]["data"])
    assert new.phases[2].load == 130e3
    old_rec = figures.strategy_record(base["results"], "meter-in")
    new_rec = figures.strategy_record(out["results"], "meter-in")
    # useful work rises by dF * stroke = 30 kN * 60 mm = 1800 J (W = F s)
    dw = new_rec["useful_energy_per_cycle_J"] - old_rec["useful_energy_per_cycle_J"]
    assert dw == pytest.approx(30e3 * 0.060, rel=1e-6)
    assert new_rec["cost_per_year"] != old_rec["cost_per_year"]


def test_a_number_with_its_own_unit_is_accepted(base, examples):
    rows = _rows(base)
    rows[2]["load"] = "25000 lbf"
    out = _edit(base, examples, rows)
    new = io.scenario_from_dict(out["store"]["data"])
    assert new.phases[2].load == pytest.approx(25000 * LBF, rel=1e-12)  # NIST SP 811


def test_us_numbers_are_taken_in_us_units(base, examples):
    form_us = state.render_form(base["data"], "us")
    rows = [dict(r) for r in form_us["phase_rows"]]
    rows[2]["load"] = "20000"             # lbf, the header's unit
    keys = list(form_us["key_values"])
    keys[3] = "2500"                      # relief setting in psi
    out = callbacks.update_scenario("phase-table", None, None, None, "us", rows,
                                    form_us["actuator_rows"], keys, base["store"],
                                    base["results"], examples)
    assert out["form_errors"] == []
    new = io.scenario_from_dict(out["store"]["data"])
    assert new.phases[2].load == pytest.approx(20000 * LBF, rel=1e-12)
    assert new.power_unit.relief.cracking_pressure == pytest.approx(2500 * PSI, rel=1e-9)


def test_untouched_cells_keep_their_exact_values_in_either_system(base):
    for system in ("si", "us"):
        form = state.render_form(base["data"], system)
        sc, _, errors = state.apply_form(base["data"], form["phase_rows"],
                                         form["actuator_rows"], form["key_values"], system)
        assert errors == [] and sc == base["scenario"]


def test_invalid_value_is_flagged_at_its_cell_and_results_stay(base, examples):
    rows = _rows(base)
    rows[2]["speed"] = "12 kg"
    out = _edit(base, examples, rows)
    assert out["results"] is no_update and out["store"] is no_update
    assert _flagged(out["phase_styles"]) == [(2, "speed")]
    tip = out["phase_tooltips"][2]["speed"]["value"]
    assert "expected a velocity" in tip and "12 kg" in tip
    text = " ".join(str(li.children) for li in out["form_errors"])
    assert "phase 3 'forming', speed" in text and "12 kg" in text


@pytest.mark.parametrize("text", ["fast", "1e999", "--3", "3 mm/s/s", "9**9**9", "10**10**8 m/s",
                                  "0,5 m/s", "2 3 m/s"])
def test_unparsable_speeds_are_refused(base, examples, text):
    rows = _rows(base)
    rows[1]["speed"] = text
    out = _edit(base, examples, rows)
    assert out["results"] is no_update
    assert _flagged(out["phase_styles"]) == [(1, "speed")]


def test_validation_errors_from_the_engine_reach_the_field(base, examples):
    rows = _rows(base)
    rows[2]["motion"] = "fly"
    out = _edit(base, examples, rows)
    assert out["results"] is no_update
    assert [r for r, _ in _flagged(out["phase_styles"])] == [2]


def test_a_power_tower_in_a_key_field_is_refused_at_once(base, examples):
    """Typing 9**9**9 into a key field once froze the server for every browser."""
    import time
    keys = list(base["form"]["key_values"])
    keys[0] = "9**9**9"
    t0 = time.perf_counter()
    out = _edit(base, examples, keys=keys)
    assert time.perf_counter() - t0 < 10.0     # hang guard, not a benchmark
    assert out["results"] is no_update and "no arithmetic" in out["key_errors"][0]


def test_key_number_error_and_fix(base, examples):
    keys = list(base["form"]["key_values"])
    keys[0] = "40 bar"                    # a pressure where a displacement belongs
    out = _edit(base, examples, keys=keys)
    assert out["results"] is no_update
    assert "displacement" in out["key_errors"][0]
    keys[0] = "45"
    out = _edit(base, examples, keys=keys)
    assert out["key_errors"] == [""] * len(state.KEY_FIELDS)
    new = io.scenario_from_dict(out["store"]["data"])
    assert new.power_unit.pump.displacement == pytest.approx(45e-6, rel=1e-12)


def test_deleting_a_row_keeps_the_others(base, examples):
    rows = _rows(base)
    del rows[5]                           # the decompression phase
    out = _edit(base, examples, rows)
    new = io.scenario_from_dict(out["store"]["data"])
    old = base["scenario"].phases
    assert new.phases == old[:5] + old[6:]


def test_unchanged_form_does_not_recompute(base, examples):
    out = _edit(base, examples)
    assert out["results"] is no_update and out["store"] is no_update


def test_units_toggle_changes_headers_and_values(base, examples):
    f = base["form"]
    out = callbacks.update_scenario("units", None, None, None, "us", f["phase_rows"],
                                    f["actuator_rows"], f["key_values"], base["store"],
                                    base["results"], examples)
    heads = {c["id"]: c["name"] for c in out["phase_columns"]}
    assert heads["load"] == "load [lbf]" and heads["hold_pressure"] == "hold pressure [psi]"
    # 100 kN = 22481 lbf (NIST SP 811)
    assert float(out["phase_rows"][2]["load"]) == pytest.approx(100e3 / LBF, rel=5e-4)
    assert out["key_units"][3] == "psi"
    assert out["results"] is no_update    # a change of display only
    assert "°F" in figures.comparison_rows(base["results"], "us")[0]["steady"]
    tiles = figures.headline(base["results"], "meter-in", "us")
    assert tiles[0].children[1].children == "meter-in"
    assert "Btu" in tiles[2].children[1].children      # energy per cycle


# ---------------------------------------------------------------------------
# upload
# ---------------------------------------------------------------------------

def _payload(raw: bytes) -> str:
    return "data:application/octet-stream;base64," + base64.b64encode(raw).decode()


@pytest.mark.parametrize("raw, reason", [
    (b"[scenario\nname = 'x'", "TOML syntax error"),
    (b"[scenario]\nname = 'x'\n", "missing required section"),
    (b"\xff\xfe\x00garbage", "not UTF-8"),
    (b"#" * 1_000_001, "larger than"),
])
def test_bad_upload_is_refused_and_previous_scenario_stays(base, examples, raw, reason):
    f = base["form"]
    out = callbacks.update_scenario("upload", None, _payload(raw), "../../etc/bad.toml", "si",
                                    f["phase_rows"], f["actuator_rows"], f["key_values"],
                                    base["store"], base["results"], examples)
    msg = out["upload_message"].children
    assert msg.startswith("Upload refused") and reason in msg
    assert out["store"] is no_update and out["results"] is no_update
    assert out["phase_rows"] is no_update


def test_good_upload_replaces_the_scenario(base, examples, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    text = io.default_scenario_path().read_text(encoding="utf-8").replace(
        'name = "Forming press 140 kN"', 'name = "Uploaded press"')
    f = base["form"]
    out = callbacks.update_scenario("upload", None, _payload(text.encode()), "mine.toml", "si",
                                    f["phase_rows"], f["actuator_rows"], f["key_values"],
                                    base["store"], base["results"], examples)
    assert out["results"]["name"] == "Uploaded press"
    assert out["upload_contents"] is None
    assert list(tmp_path.iterdir()) == []       # nothing written to disk


# ---------------------------------------------------------------------------
# downloads
# ---------------------------------------------------------------------------

def test_downloaded_scenario_loads_back_equal(base, examples):
    rows = _rows(base)
    rows[3]["load"] = "125"
    rows[0]["speed"] = "0.1 m/s"
    out = _edit(base, examples, rows)
    d = callbacks.download_scenario(out["store"]["data"])
    assert d["filename"] == "forming_press_140_kn.toml"
    back = io.loads_scenario(d["content"], source=d["filename"])
    assert back == io.scenario_from_dict(out["store"]["data"])
    assert back.phases[3].load == 125e3 and back.phases[0].speed == pytest.approx(0.1)


def test_report_download_is_html_or_a_note(base):
    payload, note = callbacks.download_report(base["data"], "forming_press.toml")
    if payload is None:
        assert "heatload.outputs.report" in note
    else:
        assert payload["filename"].endswith(".html")
        assert payload["content"].lstrip().lower().startswith("<!doctype html")


# ---------------------------------------------------------------------------
# views
# ---------------------------------------------------------------------------

def test_sankey_balances_electric_input(base):
    for name in ("meter-in", "load-sensing"):
        fig = figures.sankey_figure(base["results"], name, "si")
        s = fig.data[0]
        src, dst, val = np.array(s.link.source), np.array(s.link.target), np.array(s.link.value)
        rec = figures.strategy_record(base["results"], name)
        assert val[src == 0].sum() == pytest.approx(rec["electric_energy_per_cycle_J"] / 1e3,
                                                    rel=1e-9)   # kJ
        # what enters the hydraulic node leaves it (first law, up to the solver residual)
        assert val[dst == 1].sum() == pytest.approx(val[src == 1].sum(), rel=2e-3)
        assert all(v > 0 for v in val)


def test_every_axis_names_its_unit(base):
    for system, unit in (("si", "bar"), ("us", "psi")):
        fig = figures.cycle_figure(base["results"], "meter-in", system)
        titles = [fig.layout[a].title.text for a in ("yaxis", "yaxis2", "yaxis3", "xaxis3")]
        assert titles[0] == f"pressure [{unit}]"
        assert all("[" in t and "]" in t for t in titles)


def test_cycle_steps_span_the_cycle(base):
    fig = figures.cycle_figure(base["results"], "meter-in", "si")
    rec = figures.strategy_record(base["results"], "meter-in")
    assert fig.data[0].x[-1] == pytest.approx(rec["cycle_time_s"], rel=1e-9)
    assert fig.data[0].line.shape == "hv"


def test_shift_view_with_and_without_cooler(base):
    fig, note = callbacks.shift_view(base["data"], "meter-in", "si")
    names = [t.name for t in fig.data]
    assert names == ["no cooler", "with the sized cooler (thermostat)"]
    assert fig.layout.yaxis.title.text == "oil temperature [°C]"
    sc = base["scenario"]
    ref = chain.shift_profile(sc, chain.evaluate_strategy(sc, sc.strategy("meter-in")), False)
    assert max(fig.data[0].y) == pytest.approx(float(np.max(ref.temperatures)) - 273.15,
                                               abs=1e-6)   # downsampling keeps the peak
    assert "thermostat" in note


def test_cooler_view(base):
    head, spec = callbacks.cooler_view(base["data"], "meter-in", "si")
    assert "duty to quote" in str(spec)


def test_uncertainty_view(base):
    from heatload.studies import uncertainty as unc
    out = callbacks.uncertainty_view(base["data"], "load-sensing", 200, "si")
    assert out.id == "mc-result"
    hist, tornado = (g.figure for g in out.children if hasattr(g, "figure"))
    # uncertain inputs named in plain words, the file's path as their tooltip
    names = next(g for g in out.children if getattr(g, "id", None) == "mc-inputs")
    spans = {sp.title: sp.children for sp in names.children if not isinstance(sp, str)}
    assert spans["phases[*].load"] == "phase loads"
    assert set(spans) == {u.path for u in base["scenario"].uncertainty}
    assert [y for y in tornado.data[0].y if "[" in y or "_" in y] == []
    # the duty to quote is named and marked on the histogram
    from heatload import decision
    quote = next(g for g in out.children if getattr(g, "id", None) == "mc-quote")
    assert "Quote this duty" in str(quote.children)
    shapes = [sh.x0 for sh in hist.layout.shapes]
    o = chain.evaluate_strategy(base["scenario"], base["scenario"].strategy("load-sensing"))
    pct = {k: float(v) for k, v in unc.monte_carlo(base["scenario"], base["scenario"].strategy(
        "load-sensing"), samples=200, seed=1).percentiles["cooler_duty_W"].items()}
    q = decision.quoted_duty(o.thermal.cooler_duty, base["scenario"].cooler.margin, pct)[0]
    assert any(x == pytest.approx(q / 1e3) for x in shapes)
    sc = base["scenario"]
    mc = unc.monte_carlo(sc, sc.strategy("load-sensing"), samples=200, seed=1)
    assert len(hist.data[0].x) == 200
    assert np.sort(hist.data[0].x) == pytest.approx(np.sort(mc.cooler_duty) / 1e3)   # kW
    assert hist.layout.xaxis.title.text == "cooler duty [kW]"
    assert len(tornado.data[0].y) == len(sc.uncertainty)


def test_payback_arithmetic(base):
    res = base["results"]
    text, fig = callbacks.payback_view(res, "meter-in", "load-sensing", 3000.0, "si")
    recs = {r["label"]: r for r in res["comparison"]["strategies"]}
    mi, ls = recs["meter-in"]["yearly_cost"], recs["load-sensing"]["yearly_cost"]
    # electricity saved, the cooler fans' included
    saving = (res["savings"]["meter-in"]["load-sensing"]["cost_saving"]
              + mi["fan"] - ls["fan"])
    assert saving > 0
    years = 3000.0 / saving                       # simple payback: price / yearly saving
    assert f"{years:.1f} years" in text.children
    x, y = np.asarray(fig.data[0].x), np.asarray(fig.data[0].y)
    assert y[0] == -3000.0
    assert y == pytest.approx(saving * x - 3000.0)
    assert np.interp(0.0, y, x) == pytest.approx(years, rel=1e-9)   # crosses zero at payback
    # the circuits' price difference plus the cooler each needs (a smaller one saves)
    assert callbacks.default_extra_price(res, "meter-in", "load-sensing") == pytest.approx(
        2800.0 + ls["cooler_price"] - mi["cooler_price"], abs=0.5)


def test_strategy_choice_defaults_to_the_recommended_one(base):
    opts, value = callbacks.strategy_choices(base["store"], None, base["results"])
    assert len(opts) == 7 and value == base["results"]["comparison"]["recommended"]
    assert callbacks.strategy_choices(base["store"], "bleed-off")[1] == "bleed-off"
    # before the comparison is known the value is left alone (views show the best ranked)
    assert callbacks.strategy_choices(base["store"], None)[1] is no_update
    tiles = figures.headline(base["results"], None, "si")
    assert tiles[0].children[1].children == value
    assert tiles[0].children[2].children == "recommended"
    # each tile says its difference to the present circuit
    assert "vs present" in tiles[1].children[2].children


def test_decision_view_says_the_same_as_compare_json(base):
    from heatload import decision
    res = base["results"]
    view = figures.decision_view(res, "si")
    sentence = next(c for c in view.children if getattr(c, "id", None) == "decision-sentence")
    dec = decision.decide(chain.compare(base["scenario"]))
    assert sentence.children == dec.sentence()
    fig = next(c for c in view.children if getattr(c, "id", None) == "decision-graph").figure
    assert list(fig.data[0].y) == [f"{v.rank}. {v.name}" for v in dec.verdicts]
    total = np.sum([np.asarray(t.x, float) for t in fig.data], axis=0)
    assert total == pytest.approx([v.cost.total for v in dec.verdicts])


def test_required_cell_cleared_is_an_error(base, examples):
    f = base["form"]
    rows = _rows(base)
    rows[2]["load"] = ""                          # a moving phase without its load
    keys = list(f["key_values"])
    keys[0] = " "                                 # the pump displacement emptied
    out = callbacks.update_scenario("phase-table", None, None, None, "si", rows,
                                    f["actuator_rows"], keys, base["store"],
                                    base["results"], examples)
    assert out["results"] is no_update and out["store"] is no_update
    fields = [li.to_plotly_json()["props"].get("data-field") for li in out["form_errors"]]
    assert "phases[2].load" in fields and "power_unit.pump.displacement" in fields
    assert out["banner"] is not None and "2 invalid entries" in str(out["banner"])
    # the optional design temperature may be emptied (back to its default)
    keys = list(f["key_values"])
    keys[8] = ""
    ok = callbacks.update_scenario("key", None, None, None, "si", _rows(base),
                                   f["actuator_rows"], keys, base["store"], base["results"],
                                   examples)
    assert ok["banner"] is None


def test_monte_carlo_cleared_when_scenario_or_strategy_changes(base):
    from dash.exceptions import PreventUpdate
    from heatload.dashboard import compute as comp
    key = {"key": comp.scenario_key(base["store"]["data"]), "strategy": "load-sensing"}
    with pytest.raises(PreventUpdate):
        callbacks.mc_stale(base["store"], "load-sensing", key)
    note, cleared = callbacks.mc_stale(base["store"], "meter-in", key)
    assert note.id == "mc-stale" and cleared is None
    other = {"data": {**base["store"]["data"], "scenario": {"name": "changed"}}}
    note, _ = callbacks.mc_stale(other, "load-sensing", key)
    assert "earlier" in note.children


def test_edit_on_a_one_strategy_tab_computes_that_strategy_first(base, examples):
    from dash.exceptions import PreventUpdate

    rows = _rows(base)
    rows[2]["load"] = "115"
    f = base["form"]
    out = callbacks.update_scenario("phase-table", None, None, None, "si", rows,
                                    f["actuator_rows"], f["key_values"], base["store"],
                                    base["results"], examples, tab="energy",
                                    strategy="load-sensing")
    part = out["results"]
    assert part["complete"] is False
    assert [r["label"] for r in part["comparison"]["strategies"]] == ["load-sensing"]
    # the views of one strategy are served; nothing more is needed there
    with pytest.raises(PreventUpdate):
        callbacks.complete_results(part, "energy", "load-sensing", out["store"])
    # opening the comparison (or picking another strategy) completes the results
    full = callbacks.complete_results(part, "comparison", "load-sensing", out["store"])
    assert full["complete"] is True and len(full["comparison"]["strategies"]) == 7
    again = callbacks.complete_results(part, "energy", "bleed-off", out["store"])
    assert again["complete"] is True
    # the strategy computed first equals its value in the full comparison
    a = figures.strategy_record(part, "load-sensing")
    b = figures.strategy_record(full, "load-sensing")
    assert a["electric_energy_per_cycle_J"] == pytest.approx(b["electric_energy_per_cycle_J"],
                                                             rel=1e-12)
    ref = tables.comparison_dict(chain.compare(io.scenario_from_dict(out["store"]["data"])))
    assert full["comparison"]["ranking"] == ref["ranking"]
    with pytest.raises(PreventUpdate):
        callbacks.complete_results(full, "comparison", "meter-in", out["store"])
    with pytest.raises(PreventUpdate):      # the payback needs every strategy
        callbacks.payback_view(part, "meter-in", "load-sensing", 100.0, "si")


def test_a_late_answer_for_an_older_scenario_is_replaced(base, examples):
    rows = _rows(base)
    rows[2]["load"] = "111"
    out = _edit(base, examples, rows)
    assert compute.matches(out["results"], out["store"])
    # results of the scenario before the edit arrive after it: recognised as stale
    old = dict(base["results"], key=compute.scenario_key(base["data"]))
    assert not compute.matches(old, out["store"])
    fresh = callbacks.complete_results(old, "energy", "meter-in", out["store"])
    assert compute.matches(fresh, out["store"])
    assert figures.strategy_record(fresh, "meter-in")["useful_energy_per_cycle_J"] == \
        pytest.approx(figures.strategy_record(out["results"], "meter-in")
                      ["useful_energy_per_cycle_J"], rel=1e-12)


def test_downsample_keeps_extremes():
    t = np.linspace(0, 10, 20001)
    v = np.sin(7 * t) + 0.01 * t
    td, vd = compute.downsample(t, v, 500)
    assert len(td) <= 520 and vd.max() == v.max() and vd.min() == v.min()
    assert td[0] == t[0] and td[-1] == t[-1]


# ---------------------------------------------------------------------------
# sessions, app and command line
# ---------------------------------------------------------------------------

def test_sessions_do_not_share_state(base, examples):
    app = dash_app.make_app()
    first = app.layout()
    rows = _rows(base)
    rows[2]["load"] = "140"
    out = _edit(base, examples, rows)          # "session A" edits
    assert io.scenario_from_dict(out["store"]["data"]).phases[2].load == 140e3
    second = app.layout()                      # a new page load starts from the file

    def store_of(layout):
        return next(c for c in layout.children if getattr(c, "id", None) == "scenario-store")
    assert store_of(second).data == store_of(first).data == base["store"] | {
        "source": "forming_press.toml"}


def test_make_app_with_a_file_and_a_bad_file(tmp_path):
    from heatload.errors import HeatloadError

    p = tmp_path / "press.toml"
    p.write_text(io.default_scenario_path().read_text(encoding="utf-8"), encoding="utf-8")
    app = dash_app.make_app(p)
    layout = app.layout()
    assert "press.toml" in str(layout)
    bad = tmp_path / "bad.toml"
    bad.write_text("[scenario\n", encoding="utf-8")
    with pytest.raises(HeatloadError):
        dash_app.make_app(bad)


class _Args:
    def __init__(self, **kw):
        self.file, self.port, self.host, self.debug = None, 8050, "127.0.0.1", False
        self.__dict__.update(kw)


@pytest.mark.parametrize("host, warned", [("127.0.0.1", False), ("0.0.0.0", True)])
def test_run_cli_binds_loopback_and_warns_otherwise(monkeypatch, capsys, host, warned):
    seen = {}

    def fake_serve(app, host=None, port=None, threads=None):
        seen.update(host=host, port=port, threads=threads)
    monkeypatch.setattr(dash_app, "serve", fake_serve)
    monkeypatch.setattr("dash.Dash.run", lambda self, **kw: pytest.fail("development server"))
    assert dash_app.run_cli(_Args(host=host, port=8123)) == 0
    assert seen == {"host": host, "port": 8123, "threads": 8}
    err = capsys.readouterr().err
    assert ("warning" in err) == warned
    with pytest.raises(HeatloadError) as e:
        dash_app.run_cli(_Args(threads=0))
    assert e.value.field == "--threads"
    with pytest.raises(HeatloadError, match="1..65535"):    # 0 is no port, not the default
        dash_app.run_cli(_Args(port=0))


def test_run_cli_debug_only_when_asked(monkeypatch):
    seen = {}
    monkeypatch.setattr("dash.Dash.run", lambda self, **kw: seen.update(kw))
    dash_app.run_cli(_Args(debug=True))
    assert seen["debug"] is True and seen["host"] == "127.0.0.1"


def test_production_server_serves_the_page():
    """waitress (the production WSGI server) serves the page and its callbacks' list."""
    import threading
    import urllib.request

    app = dash_app.make_app()
    server = dash_app.make_server(app, host="127.0.0.1", port=0, threads=2)
    port = server.effective_port
    stop = threading.Event()

    def loop():          # server.run() until asked to stop, then the socket is closed
        while not stop.is_set():
            server.asyncore.loop(timeout=0.05, map=server._map, count=1)
    t = threading.Thread(target=loop, daemon=True)
    t.start()
    try:
        for path in ("/", "/_dash-layout", "/_dash-dependencies"):
            with urllib.request.urlopen(f"http://127.0.0.1:{port}{path}", timeout=20) as r:
                assert r.status == 200
                assert r.headers.get("Server") == "heatload"
    finally:
        stop.set()
        t.join(timeout=10)
        server.close()
        server.task_dispatcher.shutdown()


def test_an_engine_refusal_quotes_what_was_typed(base, examples):
    """The loader checks the exact SI text the form makes of an entry; its message
    once quoted '-500000.0 Pa' for a typed -5: it quotes the entry as typed."""
    keys = list(base["form"]["key_values"])
    i = [f.field for f in state.KEY_FIELDS].index("reservoir.oil_volume")
    keys[i] = "1e-9"
    out = _edit(base, examples, keys=keys)
    assert out["results"] is no_update
    msg = out["key_errors"][i]
    assert "'1e-9 L'" in msg and "m^3" not in msg


def test_a_downloaded_scenario_with_a_control_character_in_its_name_loads():
    import dataclasses
    sc = io.load_scenario(io.default_scenario_path())
    sc = dataclasses.replace(sc, name="Press\x07X\x1b")
    again = io.loads_scenario(io.dumps_scenario(sc), source="dl.toml")
    assert again.name == sc.name


def test_warnings_in_plain_words_and_chosen_units(base):
    """The decision view gives a circuit's warnings as plain sentences grouped by
    severity (no internal code); the comparison gives them in the chosen units."""
    from heatload.checks import CODE_KINDS

    comp = base["results"]["comparison"]
    (div,) = figures.warnings_in_words(comp, "meter-out")
    text = str(div.to_plotly_json())
    assert "Rules the circuit out" in text and "Needs attention" in text
    assert not [c for c in CODE_KINDS if "-" in c and c in text]
    us = {r["label"]: r for r in figures.comparison_rows(base["results"], "us")}
    words = " ".join(us["meter-out"]["warnings"])
    assert "psi" in words and "°F" in words and "hp" in words
    assert " bar" not in words and "°C" not in words and " kW" not in words


def test_heat_calibration_key_field_reaches_the_results_and_is_said(base, examples):
    # the measured / model heat factor typed in the form: every strategy's heat x f,
    # the decision view says so; empty is the model as it stands (f = 1)
    i = [f.field for f in state.KEY_FIELDS].index("scenario.heat_calibration")
    assert base["form"]["key_values"][i] == ""
    keys = list(base["form"]["key_values"])
    keys[i] = "1.4"
    sc, data, errors = state.apply_form(base["data"], base["form"]["phase_rows"],
                                        base["form"]["actuator_rows"], keys, "si")
    assert errors == [] and sc.heat_calibration == 1.4
    res = compute.compute_results(sc, source="calibrated")
    raw = {r["label"]: r for r in base["results"]["comparison"]["strategies"]}
    for r in res["comparison"]["strategies"]:
        assert r["heat_to_oil_uncoupled_W"] == pytest.approx(
            1.4 * raw[r["label"]]["heat_to_oil_uncoupled_W"], rel=1e-12)
    view = figures.decision_view(res, "si")
    note = next(c for c in view.children if getattr(c, "id", None) == "heat-calibration")
    assert "× 1.4 (heat_calibration" in note.children
    assert not any(getattr(c, "id", None) == "heat-calibration"
                   for c in figures.decision_view(base["results"], "si").children)
    keys[i] = "9"                                  # beyond 0.2 .. 5: refused, named
    _, _, errors = state.apply_form(base["data"], base["form"]["phase_rows"],
                                    base["form"]["actuator_rows"], keys, "si")
    assert errors and errors[0][0] == "scenario.heat_calibration"


def test_an_edit_parses_only_the_cell_it_changed(monkeypatch):
    data = io.scenario_to_dict(io.load_scenario(io.default_scenario_path()))
    form = state.render_form(data, "si")
    args = (form["actuator_rows"], form["key_values"], "si")
    state.apply_form(data, form["phase_rows"], *args)          # every cell once
    calls = []
    to_si = state.units.to_si
    monkeypatch.setattr(state.units, "to_si", lambda *a, **k: calls.append(a) or to_si(*a, **k))
    rows = [dict(r) for r in form["phase_rows"]]
    rows[2]["load"] = "123.5"
    sc, _, errors = state.apply_form(data, rows, *args)
    assert not errors and sc.phases[2].load == pytest.approx(123.5e3)
    # the new text, and the stored value it replaces shown as text to compare
    assert len(calls) <= 2 and any("123.5" in str(a[0]) for a in calls)
    # a refusal names its own cell every time (never answered from the cache)
    rows[3]["load"] = "12 parsecs"
    for _ in range(2):
        _, _, errors = state.apply_form(data, rows, *args)
        assert errors and errors[0][0].startswith("phases[3]")


def test_a_port_in_use_or_a_foreign_host_is_refused_before_starting(capsys):
    # one line naming the flag, exit 2, nothing started (no banner)
    import socket

    from heatload import cli
    with socket.socket() as held:
        held.bind(("127.0.0.1", 0))
        held.listen(1)
        port = held.getsockname()[1]
        assert cli.main(["dashboard", "--port", str(port)]) == 2
    err = capsys.readouterr().err
    assert "--port" in err and "in use" in err and "http://" not in err
    assert cli.main(["dashboard", "--host", "999.1.1.1", "--port", "8769"]) == 2
    err = capsys.readouterr().err
    assert "--host" in err and "not an address" in err and "http://" not in err


@pytest.mark.parametrize("typed", ["abc", "0", "-500", "99", "20001", "1e12", "150.5", "nan",
                                   "", None, "9" * 500])
def test_a_bad_monte_carlo_count_is_named_beside_its_field_and_nothing_runs(
        base, typed, monkeypatch):
    """A bad sample count once reran silently with the last valid count: now one
    line beside the field names it and the range, nothing runs and the result
    shown stays (no update)."""
    with pytest.raises(HeatloadError, match="Monte Carlo samples"):
        callbacks.uncertainty_view(base["data"], "load-sensing", typed, "si")
    ran = []
    monkeypatch.setattr(callbacks, "uncertainty_view", lambda *a: ran.append(a))
    out, key, message = callbacks.run_monte_carlo(base["store"], "load-sensing", typed, "si")
    assert out is no_update and key is no_update and ran == []
    assert message.startswith("Monte Carlo samples: expected a whole number from 100 to "
                              "20,000") and "\n" not in message and len(message) < 120
    if typed and len(typed) < 20:
        assert f"got {typed!r}" in message


def test_a_good_monte_carlo_count_runs_and_clears_the_message(base):
    assert [callbacks.monte_carlo_samples(t) for t in ("100", " 2,000 ", "2e3", 20000)] == \
        [100, 2000, 2000, 20000]
    out, key, message = callbacks.run_monte_carlo(base["store"], "load-sensing", "200", "si")
    assert out.id == "mc-result" and key["strategy"] == "load-sensing" and message == ""


def test_the_samples_field_keeps_what_was_typed_and_reports_beside_it():
    """The field is text (a number input hands the server the last good count
    for a bad entry), no callback writes it, and its message sits in the
    field's row, styled as the key fields' messages are."""
    app = dash_app.make_app()
    layout = app.layout()

    def find(node, id_):
        if getattr(node, "id", None) == id_:
            return node
        kids = getattr(node, "children", None)
        for k in kids if isinstance(kids, (list, tuple)) else [kids]:
            if k is not None and not isinstance(k, str):
                hit = find(k, id_)
                if hit is not None:
                    return hit
        return None

    field = find(layout, "mc-samples")
    assert field.type == "text"
    row = next(r for r in _rows_holding(layout, "mc-samples"))
    error = find(row, "mc-samples-error")
    assert error is not None and error.className == find(layout, {"type": "key-error",
                                                                  "index": 0}).className
    outputs = " ".join(app.callback_map)
    assert "mc-samples.value" not in outputs and "mc-samples-error.children" in outputs


def _rows_holding(node, id_):
    """The components whose direct children include the one with *id_*."""
    kids = getattr(node, "children", None)
    kids = kids if isinstance(kids, (list, tuple)) else [kids]
    if any(getattr(k, "id", None) == id_ for k in kids):
        yield node
    for k in kids:
        if k is not None and not isinstance(k, str):
            yield from _rows_holding(k, id_)


def test_a_bad_extra_price_is_named_not_replaced_by_the_default(base):
    # the field is text: what was typed reaches the server, and a bad entry gets
    # one line naming the field (it was a number input: the browser handed a bad
    # entry over as nothing, and the default price was used without a word)
    res = base["results"]

    def find(node):
        if getattr(node, "id", None) == "pay-price":
            return node
        kids = getattr(node, "children", None)
        for k in kids if isinstance(kids, (list, tuple)) else [kids]:
            if k is not None and not isinstance(k, str):
                hit = find(k)
                if hit is not None:
                    return hit
        return None
    assert find(dash_app.make_app().layout()).type == "text"
    for bad in ("abc", "-5", "1e99", "nan", "4,200"):
        text, fig = callbacks.payback_view(res, "meter-in", "load-sensing", bad, "si")
        assert "extra price" in str(text.children) and fig is callbacks.no_update
    good, _ = callbacks.payback_view(res, "meter-in", "load-sensing", "3000", "si")
    assert "3,000" in good.children
    empty, _ = callbacks.payback_view(res, "meter-in", "load-sensing", "  ", "si")
    assert "extra price of" in empty.children
