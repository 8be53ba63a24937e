"""The "Temperature log" tab: upload a machine's temperature log (CSV) and see
the tank model fitted to it beside the scenario's model.

Only lays out and calls the engine: reading and fitting are
:mod:`heatload.measurement.measured` and :mod:`heatload.measurement.logfit`; the heat capacity comes
from the scenario shown (:func:`heatload.evaluation.heat_capacity`) unless one is
typed in.  ``log_view`` is the plain function behind the callback, testable
without a browser; nothing is written to disk.
"""

from __future__ import annotations

import base64
import binascii
import re

from dash import Input, Output, State, dcc, html

from heatload.errors import HeatloadError

#: Largest log accepted from the browser [bytes] (a day at one sample a second
#: is about 3 MB; uploads travel base64-encoded within the request bound).
MAX_LOG_UPLOAD_BYTES = 10_000_000


def layout():
    """The tab's content."""
    return html.Div([
        html.Div([
            html.Div([html.Span("temperature log (CSV)", className="lab"),
                      dcc.Upload(id="log-upload", className="upload", multiple=False,
                                 accept=".csv,.txt",
                                 children=html.Div("drop or choose a .csv log"))],
                     className="ctl"),
            html.Div([html.Label("heat capacity of oil and steel", htmlFor="log-capacity"),
                      dcc.Input(id="log-capacity", type="text", debounce=True,
                                placeholder="from the scenario, or e.g. 650 kJ/K",
                                style={"width": "230px"})], className="ctl"),
        ], className="row"),
        html.Div("Columns are found by name: a header containing 'time', 'oil', 'ambient' "
                 "and optionally 'running' (0/1), each with its unit in square brackets, "
                 "e.g. 'oil temperature [degC]'; time may be a timestamp.",
                 className="caution"),
        html.Div(id="log-message", className="msg"),
        dcc.Loading(html.Div([html.Div(id="log-table"), html.Div(id="log-compare"),
                              dcc.Graph(id="log-graph", config={"displaylogo": False})])),
    ], className="panel")


def _decode(contents, filename):
    from heatload.measurement import logs

    name = re.sub(r"[^\w.\- ]", "_", str(filename or "log.csv"))[:120]
    if not contents or "," not in contents:
        raise HeatloadError("no file content received", file=name)
    b64 = contents.split(",", 1)[1]
    if len(b64) * 3 // 4 > MAX_LOG_UPLOAD_BYTES:
        raise HeatloadError(f"file larger than {MAX_LOG_UPLOAD_BYTES // 1_000_000} MB; "
                            "resample the log", file=name)
    try:
        raw = base64.b64decode(b64, validate=True)
    except (binascii.Error, ValueError):
        raise HeatloadError("the upload is not valid base64 data", file=name) from None
    return name, logs._decode(raw)


def _table(rows):
    head = html.Tr([html.Th(h) for h in ("quantity", "fitted", rows[0][4] + " interval", "")])
    body = [html.Tr([html.Td(a), html.Td(b, className="num"), html.Td(c, className="num"),
                     html.Td(d)]) for a, b, c, d, _ in rows]
    return html.Table([html.Thead(head), html.Tbody(body)], id="log-fit-table",
                      className="comparison")


def _comparison(c, system, fit=None):
    from heatload.measurement.measured import _q, calibration_advice, calibration_line

    factor = c["heat_calibration_factor"]
    ua_factor = c["conductance_calibration_factor"]
    items = [
        f"heat into the oil at the logged {_q(c['logged_oil_temperature_C'] + 273.15, 'temperature', system)}: "
        f"model ({c['strategy']}) {_q(c['model_heat_W'], 'power', system)}, measured "
        f"{_q(c['measured_heat_W'], 'power', system)}; calibration factor "
        + ("–" if factor is None else f"{factor:.3g}"),
        f"surfaces' UA: model {_q(c['model_conductance_W_K'], 'thermal_conductance', system)}, "
        f"measured {_q(c['measured_conductance_W_K'], 'thermal_conductance', system)}; factor "
        + ("–" if ua_factor is None else f"{ua_factor:.3g}"),
        f"cooler duty at the design point: model {_q(c['model_cooler_duty_W'], 'power', system)}, "
        f"from the measurement {_q(c['measured_cooler_duty_W'], 'power', system)}"]
    if fit is not None:
        advice = calibration_advice(c, fit, "the file")
        if factor is not None and len(advice) > 1 and advice[1].strip() == calibration_line(
                factor):
            items.append(f"to apply it, enter {advice[1].split('=')[1].strip()} as the heat "
                         "calibration on the 'Cycle and machine' tab (power unit, tank, site), "
                         f"or add {calibration_line(factor)} under [scenario] in the file; "
                         + " ".join(advice[2:]))
        else:
            items.append(advice[0])
    return html.Div([html.H3("beside the model"), html.Ul([html.Li(i) for i in items])],
                    id="log-compare-list")


def log_view(contents, filename, capacity_text, store, system):
    """``(message, table, comparison, figure)`` for an uploaded log.

    The heat capacity is *capacity_text* (``"650 kJ/K"``) when given, else the
    scenario's in *store* (its oil and steel at the logged mean oil
    temperature); with the scenario the model's heat and duty stand beside
    the measured ones.  A bad file or entry gives its one-line message and
    empty views."""
    import numpy as np

    from heatload import chain, evaluation
    from heatload.measurement import measured
    from heatload.units import format_quantity, to_si

    empty = ("", None, None, {"data": [], "layout": {"height": 80}})
    if not contents:
        return ("Upload a temperature log to fit the tank model to it.",) + empty[1:]
    try:
        name, text = _decode(contents, filename)
        log = measured.read_temperature_log(name, text=text)
        scenario = None
        if store and store.get("data"):
            from . import compute
            scenario = compute.scenario_of(store["data"], store.get("source") or "dashboard")
        if capacity_text and str(capacity_text).strip():
            capacity = to_si(str(capacity_text), "heat_capacity", field="heat capacity")
            if not capacity > 0:
                raise HeatloadError("must be positive", field="heat capacity")
            source = "given"
        elif scenario is not None:
            mean_oil = float(np.mean(log.values["oil"]))
            capacity = float(evaluation.heat_capacity(scenario, mean_oil))
            source = ("from the scenario's oil and steel at "
                      f"{format_quantity(mean_oil, 'temperature', system)}")
        else:
            capacity, source = None, "not given"
        fit = measured.fit_log(log, capacity)
        comparison = (measured.scenario_comparison(scenario, log, fit)
                      if scenario is not None and fit.heat is not None else None)
    except HeatloadError as exc:
        return (html.Div(exc.one_line(), className="err", id="log-error"),) + empty[1:]
    notes = [html.Div(n, className="note") for n in fit.notes]
    message = html.Div([html.Div(
        f"{name}: {fit.samples} samples over {fit.duration / 3600:.3g} h; residual RMS "
        f"{format_quantity(fit.residual_rms, 'temperature_difference', system)}; heat "
        f"capacity {source}."), *notes])
    table = _table(measured.summary_rows(fit, system, source))
    comp = _comparison(comparison, system, fit) if comparison is not None else None
    fig = measured.figure(log, fit, system)
    fig.update_layout(width=None, autosize=True)
    return message, table, comp, fig


def register(app) -> None:
    """Wire the tab's one callback."""
    @app.callback(Output("log-message", "children"), Output("log-table", "children"),
                  Output("log-compare", "children"), Output("log-graph", "figure"),
                  Input("log-upload", "contents"), Input("log-capacity", "value"),
                  Input("units", "value"), State("log-upload", "filename"),
                  State("scenario-store", "data"))
    def _log(contents, capacity, system, filename, store):
        return log_view(contents, filename, capacity, store, system)
