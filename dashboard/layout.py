"""The page: a header with the scenario controls, key figures always in view,
and one tab per view.  Fixed-width pieces are avoided so it reads at
1366x768 and spreads out on a large screen."""

from __future__ import annotations

from dash import dash_table, dcc, html

from . import logfit_view, state
from heatload.outputs.wording import CAUTION


#: Largest duty-cycle file accepted; a larger one is refused with a message
#: by the server (the browser's own size filter would drop it silently).
MAX_UPLOAD_BYTES = 1_000_000
#: Bound on any request the server reads (uploads travel base64-encoded).
MAX_REQUEST_BYTES = 16 * 1024 * 1024

#: The cell being edited: a blue frame (the table's default pink would read as an error).
ACTIVE_CELL = ({"if": {"state": "active"}, "backgroundColor": "#e8f1fa",
                "border": "1px solid #0072B2"},)

CSS = """
:root { --ink:#1f2933; --muted:#52606d; --line:#d9dee3; --bg:#f5f7f9; --accent:#0072B2;
        --bad:#D55E00; }
* { box-sizing: border-box; }
body { margin:0; font-family: Inter, "Segoe UI", Roboto, Helvetica, Arial, sans-serif;
       color:var(--ink); background:var(--bg); font-size:14px; }
.page { max-width: 1800px; margin: 0 auto; padding: 8px 14px 24px; }
.top { display:flex; flex-wrap:wrap; align-items:flex-end; gap:8px 16px;
       background:#fff; border:1px solid var(--line); border-radius:6px; padding:10px 14px; }
.brand h1 { font-size:19px; margin:0; letter-spacing:.2px; }
.brand .sub { color:var(--muted); font-size:12px; }
.ctl { display:flex; flex-direction:column; gap:3px; }
.ctl > label, .ctl > .lab { font-size:11px; color:var(--muted); text-transform:uppercase;
                        letter-spacing:.4px; }
.upload { border:1px dashed #9aa5b1; border-radius:4px; padding:6px 10px; cursor:pointer;
          background:#fafbfc; font-size:13px; }
.btn { background:var(--accent); color:#fff; border:0; border-radius:4px; padding:7px 12px;
       cursor:pointer; font-size:13px; }
.btn.secondary { background:#fff; color:var(--accent); border:1px solid var(--accent); }
.msg { font-size:13px; margin-top:6px; }
.msg.bad, .err { color:var(--bad); }
.msg.ok { color:#007a5a; }
.caution { font-size:12px; color:var(--muted); margin:8px 2px; }
.tiles { display:flex; flex-wrap:wrap; gap:8px; margin:6px 0 8px; }
.msgs { display:flex; gap:18px; flex-wrap:wrap; }
.tabs-row .tab { padding:7px 10px !important; line-height:20px; }
.tile { background:#fff; border:1px solid var(--line); border-left:4px solid var(--accent);
        border-radius:5px; padding:6px 12px; min-width:170px; flex:1 1 170px; }
.tile.strategy { border-left-color:#009E73; background:#f3faf7; }
.tile.bad { border-left-color:var(--bad); background:#fff4ee; }
.tile-delta { font-size:12px; color:var(--muted); }
.tile.bad .tile-delta { color:var(--bad); }
.banner { background:#fde4d3; border:1px solid var(--bad); border-left:6px solid var(--bad);
          color:#7a2e00; padding:8px 12px; border-radius:4px; margin:6px 0; font-size:14px; }
.banner:empty { display:none; }
p.decision { font-size:18px; font-weight:600; border-left:5px solid #009E73;
             background:#eef8f4; padding:8px 12px; margin:4px 0 10px; }
ul.ruled-out li { color:var(--muted); margin-bottom:3px; }
.stale { background:#f3f5f8; border:1px dashed #9aa5b1; padding:8px 10px; border-radius:4px;
         color:var(--muted); font-size:13px; }
.tile-label { font-size:11px; color:var(--muted); text-transform:uppercase; }
.tile-value { font-size:20px; font-weight:600; font-variant-numeric: tabular-nums; }
.panel { background:#fff; border:1px solid var(--line); border-top:0; padding:12px 14px; }
.grid2 { display:grid; grid-template-columns: minmax(0,3fr) minmax(260px,1fr); gap:14px; }
.grid2.even { grid-template-columns: minmax(0,1fr) minmax(0,1fr); }
@media (max-width: 1100px) { .grid2, .grid2.even { grid-template-columns: 1fr; } }
h3 { font-size:15px; margin:6px 0 8px; }
.keys { display:grid; grid-template-columns: 1fr 110px 64px; gap:4px 8px; align-items:center; }
.keys input { width:100%; padding:4px 6px; border:1px solid #bcccdc; border-radius:3px;
              font-size:13px; text-align:right; }
.keys .unit { color:var(--muted); font-size:12px; }
.kerr { color:var(--bad); font-size:12px; }
.kerr:empty { display:none; }
.keys .kerr { grid-column: 1 / span 3; }
.row .kerr { align-self:center; }
table.comparison, table.spec { border-collapse:collapse; width:100%; font-size:13px; }
table.comparison th, table.comparison td, table.spec th, table.spec td {
  border-bottom:1px solid var(--line); padding:5px 8px; vertical-align:top; text-align:left; }
table.comparison th { font-size:12px; color:var(--muted); font-weight:600; }
table.comparison td.num { text-align:right; white-space:nowrap;
                          font-variant-numeric: tabular-nums; }
table.comparison td.warnings ul { margin:0; padding-left:16px; }
table.comparison td.warnings.has { color:#8a3c00; font-size:12px; }
table.spec th { width:45%; font-weight:500; color:var(--muted); }
.note { background:#fff8e6; border:1px solid #f0d48a; padding:8px 10px; border-radius:4px;
        font-size:13px; margin:6px 0; }
.form-errors li { color:var(--bad); }
.row { display:flex; flex-wrap:wrap; gap:12px; align-items:flex-end; margin-bottom:8px; }
"""

INDEX = """<!DOCTYPE html>
<html lang="en"><head>{%metas%}<title>heatload dashboard</title>{%favicon%}{%css%}
<style>""" + CSS + """</style></head>
<body>{%app_entry%}<footer>{%config%}{%scripts%}{%renderer%}</footer></body></html>"""


def _table(id_, columns, rows, dropdown=None, deletable=False):
    return dash_table.DataTable(
        id=id_, columns=columns, data=rows, editable=True, row_deletable=deletable,
        dropdown=dropdown or {}, style_table={"overflowX": "auto"},
        style_data_conditional=list(ACTIVE_CELL),
        style_header={"backgroundColor": "#eef2f6", "fontWeight": "600",
                      "whiteSpace": "normal", "height": "auto", "fontSize": "12px"},
        style_cell={"fontFamily": "Inter, 'Segoe UI', Roboto, Arial, sans-serif",
                    "fontSize": "13px", "padding": "4px 8px", "minWidth": "70px",
                    "textAlign": "right"},
        style_cell_conditional=[{"if": {"column_id": c}, "textAlign": "left"}
                                for c in ("name", "actuator", "motion", "unloading", "kind")],
        css=[{"selector": ".dash-spreadsheet-menu", "rule": "display:none"}],
        tooltip_delay=0, tooltip_duration=None)


def _keys_block(form):
    items = []
    for i, f in enumerate(state.KEY_FIELDS):
        items += [html.Span(f.label),
                  dcc.Input(id={"type": "key", "index": i}, value=form["key_values"][i],
                            type="text", debounce=True, name=f.field),
                  html.Span(form["key_units"][i], className="unit",
                            id={"type": "key-unit", "index": i}),
                  html.Div("", className="kerr", id={"type": "key-error", "index": i})]
    return html.Div(items, className="keys")


def make_layout(initial: dict):
    """The page for one browser session.

    *initial*: ``data`` (scenario dict), ``source`` (label), ``options``
    (scenario choices), ``value`` (the chosen one), ``system``, ``note`` (a
    message to show, e.g. a missing optional module).
    """
    system = initial.get("system", "si")
    form = state.render_form(initial["data"], system)
    phase_dropdown = {c.key: {"options": [{"label": v, "value": v} for v in c.choices],
                              "clearable": False}
                      for c in state.PHASE_COLUMNS if c.choices}
    controls = html.Div([
        html.Div([html.H1("heatload"),
                  html.Div("hydraulic heat load and cooling", className="sub")],
                 className="brand"),
        html.Div([html.Label("scenario", htmlFor="scenario-select"),
                  dcc.Dropdown(id="scenario-select", options=initial["options"],
                               value=initial["value"], clearable=False,
                               style={"minWidth": "220px"})], className="ctl"),
        html.Div([html.Span("or open a file", className="lab"),
                  dcc.Upload(id="upload", children=html.Div("drop or choose a .toml file"),
                             className="upload", multiple=False, accept=".toml")],
                 className="ctl"),
        html.Div([html.Span("units", className="lab"),
                  dcc.RadioItems(id="units", value=system, inline=True,
                                 options=[{"label": " SI ", "value": "si"},
                                          {"label": " US customary ", "value": "us"}],
                                 inputStyle={"marginRight": "4px"},
                                 labelStyle={"marginRight": "10px"})], className="ctl"),
        html.Div([html.Label("strategy shown", htmlFor="strategy-select"),
                  dcc.Dropdown(id="strategy-select", options=[], value=None,
                               clearable=False, style={"minWidth": "200px"})],
                 className="ctl"),
        html.Div([html.Span("download", className="lab"),
                  html.Div([html.Button("scenario (.toml)", id="download-toml-btn",
                                        className="btn secondary", n_clicks=0),
                            html.Button("report (.html)", id="download-report-btn",
                                        className="btn secondary", n_clicks=0,
                                        style={"marginLeft": "6px"})])], className="ctl"),
        dcc.Download(id="download-toml"), dcc.Download(id="download-report"),
    ], className="top")
    messages = html.Div([html.Div(f"showing: {initial['source']}", id="source-label",
                                  className="msg"),
                         html.Div(initial.get("note", ""), id="upload-message", className="msg")],
                        className="msgs")
    cycle_tab = html.Div([
        html.Div([
            html.Div([
                html.H3("duty cycle"),
                html.Div("Numbers are in the units of the headers; a number with its own "
                         "unit (e.g. '110 kN') is accepted too. 'full' speed = the whole "
                         "pump flow.", className="caution"),
                html.Ul(id="form-errors", className="form-errors"),
                _table("phase-table", form["phase_columns"], form["phase_rows"],
                       dropdown=phase_dropdown, deletable=True),
                html.H3("actuators", style={"marginTop": "16px"}),
                _table("actuator-table", form["actuator_columns"], form["actuator_rows"]),
            ]),
            html.Div([html.H3("power unit, tank, site"), _keys_block(form)]),
        ], className="grid2"),
    ])
    tabs = dcc.Tabs(id="tabs", value="decision", parent_className="tabs-row", children=[
        dcc.Tab(label="Decision", value="decision",
                children=html.Div(html.Div(id="decision"), className="panel")),
        dcc.Tab(label="Cycle and machine", value="cycle",
                children=html.Div(cycle_tab, className="panel")),
        dcc.Tab(label="Comparison", value="comparison",
                children=html.Div(html.Div(id="comparison"), className="panel")),
        dcc.Tab(label="Where the energy goes", value="energy",
                children=html.Div(dcc.Graph(id="sankey", config={"displaylogo": False}),
                                  className="panel")),
        dcc.Tab(label="Cycle over time", value="timeline",
                children=html.Div(dcc.Graph(id="cycle-graph", config={"displaylogo": False}),
                                  className="panel")),
        dcc.Tab(label="Shift temperature", value="shift",
                children=html.Div([dcc.Loading(dcc.Graph(id="shift-graph",
                                                         config={"displaylogo": False})),
                                   html.Div(id="shift-note", className="caution")],
                                  className="panel")),
        dcc.Tab(label="Cooler sizing", value="cooler", children=html.Div([
            html.Div(id="cooler-note"),
            html.Div([html.Div([html.H3("spec sheet"), html.Div(id="cooler-spec")]),
                      html.Div([html.H3("uncertainty of the duty"),
                                # text, not a number input: the browser would hand a
                                # bad entry over as the last good count (or none)
                                html.Div([dcc.Input(id="mc-samples", type="text",
                                                    inputMode="numeric", value="2000",
                                                    name="Monte Carlo samples",
                                                    style={"width": "90px"}),
                                          html.Span(" samples ", className="caution"),
                                          html.Button("run Monte Carlo", id="mc-run",
                                                      className="btn", n_clicks=0),
                                          html.Div("", id="mc-samples-error",
                                                   className="kerr")],
                                         className="row"),
                                dcc.Loading(html.Div(id="mc-out"))])],
                     className="grid2 even")], className="panel")),
        dcc.Tab(label="Payback", value="payback", children=html.Div([
            html.Div([
                html.Div([html.Label("present circuit", htmlFor="pay-base"),
                          dcc.Dropdown(id="pay-base", clearable=False,
                                       style={"minWidth": "210px"})], className="ctl"),
                html.Div([html.Label("candidate", htmlFor="pay-candidate"),
                          dcc.Dropdown(id="pay-candidate", clearable=False,
                                       style={"minWidth": "210px"})], className="ctl"),
                html.Div([html.Label("extra price of the candidate", htmlFor="pay-price"),
                          # text, not a number input: a browser hands a number input's
                          # bad entry over as nothing, which read as the default price
                          dcc.Input(id="pay-price", type="text", debounce=True,
                                    inputMode="decimal", style={"width": "120px"})],
                         className="ctl"),
            ], className="row"),
            html.Div(id="pay-summary", className="msg"),
            dcc.Graph(id="pay-graph", config={"displaylogo": False}),
        ], className="panel")),
        dcc.Tab(label="Temperature log", value="log", children=logfit_view.layout()),
    ])
    return html.Div([
        dcc.Store(id="scenario-store", storage_type="memory",
                  data={"data": initial["data"], "source": initial["source"]}),
        dcc.Store(id="results-store", storage_type="memory"),
        dcc.Store(id="mc-key", storage_type="memory"),
        controls, messages,
        html.Div(CAUTION, className="caution", id="caution"),
        html.Div(id="error-banner", className="banner", role="alert"),
        html.Div(id="headline", className="tiles"),
        tabs,
    ], className="page")
