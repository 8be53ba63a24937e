"""The dashboard's temperature-log tab, server side: its plain function called
directly (no browser).  Check values: the engine's own public functions called
independently (the view must only lay them out), and the invented demo log's
known values (1.5 kW, 24 W/K at 150 kJ/K)."""

import base64
from pathlib import Path

import pytest

from heatload import chain, evaluation, io
from heatload.measurement import measured
from heatload.dashboard import app as dash_app
from heatload.dashboard import logfit_view

ROOT = Path(__file__).resolve().parents[1]
LOG = ROOT / "duty_cycles" / "logs" / "platform_lift_day.csv"
LIFT = ROOT / "duty_cycles" / "platform_lift.toml"


def _upload(path):
    return "data:text/csv;base64," + base64.b64encode(path.read_bytes()).decode()


def _store():
    return {"data": io.scenario_to_dict(io.load_scenario(LIFT)), "source": LIFT.name}


def test_tab_is_on_the_page():
    app = dash_app.make_app()
    page = str(app.layout())
    for id_ in ("log-upload", "log-capacity", "log-graph", "log-table"):
        assert id_ in page


def test_view_fits_with_a_given_capacity():
    msg, table, comp, fig = logfit_view.log_view(_upload(LOG), LOG.name, "150 kJ/K", None, "si")
    text = str(table)
    # the demo log was made with 1.5 kW and UA 24 W/K at C = 150 kJ/K
    direct = measured.fit_log(measured.read_temperature_log(LOG), 150e3)
    assert direct.heat == pytest.approx(1500.0, rel=0.03)
    assert measured.summary_rows(direct, "si")[0][1] in text
    assert comp is None
    assert len(fig.data) >= 3


def test_view_uses_the_scenario_and_compares():
    msg, table, comp, fig = logfit_view.log_view(_upload(LOG), LOG.name, "", _store(), "si")
    assert "from the scenario" in str(msg)
    sc = io.load_scenario(LIFT)
    log = measured.read_temperature_log(LOG)
    import numpy as np
    cap = float(evaluation.heat_capacity(sc, float(np.mean(log.values["oil"]))))
    fit = measured.fit_log(log, cap)
    c = measured.scenario_comparison(sc, log, fit)
    assert f"{c['heat_calibration_factor']:.3g}" in str(comp)


def test_bad_upload_shows_one_line():
    bad = ROOT / "tests" / "data" / "bad_logs" / "non_numeric_cell.csv"
    msg, table, comp, fig = logfit_view.log_view(_upload(bad), bad.name, "", None, "si")
    assert "'warm' is not a number" in str(msg) and table is None
    msg, *_ = logfit_view.log_view("data:text/csv;base64,@@", "x.csv", "", None, "si")
    assert "base64" in str(msg)
    msg, *_ = logfit_view.log_view(_upload(LOG), LOG.name, "12 bar", None, "si")
    assert "heat capacity" in str(msg)


def test_cooler_view_lists_the_datasheet_coolers():
    from heatload.cooling import cooler_datasheet, sizing
    from heatload.dashboard import callbacks
    store = _store()
    sc = io.load_scenario(LIFT)
    strat = sizing._design_strategy(sc).name
    head, spec = callbacks.cooler_view(store["data"], strat, "si")
    text = str(head)
    sel = cooler_datasheet.rate_coolers(sc, chain.evaluate_strategy(sc, sc.strategy(strat)))
    assert "datasheet-table" in text and f"Chosen: {sel.chosen}" in text
    for r in sel.ratings:
        assert r.name in text


def test_view_in_us_units_and_how_to_apply_the_factor():
    # US customary: UA in Btu/(h·°F) (1 Btu/(h·°F) = 0.52752793 W/K, NIST SP 811:
    # 1 Btu_IT/h = 0.29307107 W, times 1.8 per K), temperatures in °F on the plot
    msg, table, comp, fig = logfit_view.log_view(_upload(LOG), LOG.name, "", _store(), "us")
    sc = io.load_scenario(LIFT)
    log = measured.read_temperature_log(LOG)
    import numpy as np
    fit = measured.fit_log(log, float(evaluation.heat_capacity(sc, float(np.mean(
        log.values["oil"])))))
    ua_us = fit.conductance / 0.52752793
    assert f"{ua_us:.3g} Btu/(h·°F)" in str(table)
    assert "W/K" not in str(table) and "W/K" not in str(comp)
    assert "Btu/°F" in str(table)                       # the heat capacity, written plainly
    assert "°F" in fig.layout.yaxis.title.text
    first = (log.values["oil"][0] - 273.15) * 1.8 + 32.0
    assert float(fig.data[0].y[0]) == pytest.approx(first, rel=1e-12)
    assert "°F" in str(msg)                              # the residual too
    # SI: the tank's UA in W/K (tens of W/K read better than hundredths of kW/K)
    _, table_si, comp_si, fig_si = logfit_view.log_view(_upload(LOG), LOG.name, "", _store(),
                                                         "si")
    assert f"{fit.conductance:.3g} W/K" in str(table_si)
    assert "°C" in fig_si.layout.yaxis.title.text
    # the factor, and how to apply it in the form or the file
    c = measured.scenario_comparison(sc, log, fit)
    assert measured.calibration_line(c["heat_calibration_factor"]) in str(comp_si)
    assert "heat calibration on the 'Cycle and machine' tab" in str(comp_si)
