"""Figures and tables of the dashboard, built from the stored results (plain data).

Every axis names its quantity and unit; colours come from the Okabe-Ito
palette, which stays distinguishable with the common colour-vision
deficiencies (Okabe & Ito, "Color Universal Design", 2008).
"""

from __future__ import annotations

import numpy as np
import plotly.graph_objects as go
from dash import html
from plotly.subplots import make_subplots

from heatload import units
from heatload.outputs.report_assets import PALETTE, ROLE_COLOURS
from heatload.outputs.wording import customer_warnings, plain_path, warning_text

K0 = 273.15

#: Okabe-Ito colour-blind-safe palette, by name; the colours are those of the one
#: palette definition, :data:`heatload.outputs.report_assets.PALETTE` (report and dashboard).
OKABE_ITO = dict(zip(("blue", "orange", "green", "vermillion", "sky", "purple", "yellow",
                      "black"), PALETTE), grey=ROLE_COLOURS["infeasible"])
SERIES = PALETTE + (ROLE_COLOURS["infeasible"],)

#: Loss components as people call them, with the colour of each (oil heat: warm
#: colours; room heat of the drive: grey).
COMPONENT_LABELS = {
    "pump": "pump losses", "relief": "relief valve", "flow_control": "flow control / meter edge",
    "bleed": "bleed / bypass", "directional_valve": "directional valve",
    "check_valve": "check valve", "lines": "pipes and hoses",
    "counterbalance": "counterbalance valve", "actuator": "actuator friction",
    "compression": "oil compression", "drive_motor": "drive motor", "converter":
    "frequency converter",
}
ROOM = ("drive_motor", "converter")

FONT = dict(family="Inter, 'Segoe UI', Roboto, Helvetica, Arial, sans-serif", size=13,
            color="#1f2933")


def _u(kind: str, system: str) -> str:
    return units.pretty_unit(units.display_unit(kind, system))


def conv(value, kind: str, system: str):
    """SI value(s) of *kind* in the display unit of *system*."""
    if value is None:
        return None
    return units.from_si(value, kind, units.display_unit(kind, system))


def fmt(value, kind: str, system: str, digits: int = 3) -> str:
    """A formatted quantity, or an en dash for a missing value."""
    if value is None:
        return "–"
    return units.format_quantity(value, kind, system, digits)


def _c_to_k(c):
    return None if c is None else c + K0


def _layout(fig, title=None, height=420):
    fig.update_layout(template="plotly_white", font=FONT, height=height,
                      margin=dict(l=70, r=20, t=50 if title else 20, b=60),
                      title=dict(text=title, x=0.01, font=dict(size=15)) if title else None,
                      legend=dict(orientation="h", yanchor="top", y=-0.16, x=0),
                      colorway=list(SERIES))
    return fig


def empty_figure(message: str, height=320):
    """A blank figure carrying a note (used while nothing can be shown)."""
    fig = go.Figure()
    fig.add_annotation(text=message, showarrow=False, x=0.5, y=0.5, xref="paper",
                       yref="paper", font=dict(size=14, color="#52606d"))
    fig.update_xaxes(visible=False)
    fig.update_yaxes(visible=False)
    return _layout(fig, height=height)


def strategy_record(results: dict, name: str | None) -> dict | None:
    """The stored record of strategy *name* (the best-ranked one when None)."""
    if not results:
        return None
    recs = results["comparison"]["strategies"]
    for r in recs:
        if r["label"] == name or r["strategy"] == name:
            return r
    ranking = results["comparison"].get("ranking") or []
    for r in recs:
        if ranking and r["label"] == ranking[0]:
            return r
    return recs[0] if recs else None


# ---------------------------------------------------------------------------
# comparison
# ---------------------------------------------------------------------------

COMPARISON_COLUMNS = (
    ("strategy", "strategy"),
    ("energy", "electric energy per cycle"),
    ("heat", "heat into oil, running"),
    ("peak", "peak pressure"),
    ("steady", "oil temperature, steady, no cooler"),
    ("operating", "oil temperature, operating"),
    ("cooler", "cooler duty (with margin)"),
    ("cost", "energy cost per year"),
    ("co2", "CO₂ per year"),
    ("warnings", "warnings"),
)


def comparison_rows(results: dict, system: str) -> list:
    """One dict of display strings per strategy, in ranking order."""
    comp = results["comparison"]
    ranking = comp.get("ranking") or []
    recs = {r["label"]: r for r in comp["strategies"]}
    order = [recs[n] for n in ranking if n in recs] or comp["strategies"]
    rows = []
    mass = "kg" if system == "si" else "lb"
    for rank, r in enumerate(order, 1):
        co2 = r["co2_per_year_kg"]
        co2_text = "–" if co2 is None else (
            f"{units.format_number(co2 / 1000.0, 3)} t" if system == "si"
            else f"{units.format_number(units.from_si(co2, 'mass', 'lb'), 3)} {mass}")
        rows.append({
            "rank": rank, "label": r["label"],
            "strategy": r["label"],
            "energy": fmt(r["electric_energy_per_cycle_J"], "energy", system),
            "heat": fmt(r["heat_to_oil_W"], "power", system),
            "peak": fmt(r["peak_pressure_Pa"], "pressure", system),
            "steady": fmt(_c_to_k(r["oil_temperature_steady_C"]), "temperature", system),
            "operating": fmt(_c_to_k(r["oil_temperature_operating_C"]), "temperature",
                             system),
            "cooler": (fmt(r["cooler_duty_W"], "power", system) if r["cooler_needed"]
                       else "none needed"),
            "cost": ("–" if r["cost_per_year"] is None else
                     f"{r['cost_per_year']:,.0f} {r.get('currency') or ''}".strip()),
            "co2": co2_text,
            "warnings": [warning_text(w, system, with_phase=True) for w in r["warnings"]],
        })
    return rows


def comparison_table(results: dict, system: str):
    """The comparison as an HTML table, warnings beside each strategy."""
    rows = comparison_rows(results, system)
    head = html.Thead(html.Tr([html.Th("#")] + [html.Th(label) for _, label in
                                                 COMPARISON_COLUMNS]))
    body = []
    for r in rows:
        cells = [html.Td(str(r["rank"]), className="num")]
        for key, _ in COMPARISON_COLUMNS:
            if key == "warnings":
                ws = r["warnings"]
                cells.append(html.Td(html.Ul([html.Li(w) for w in ws]) if ws else "none",
                                     className="warnings" + (" has" if ws else "")))
            elif key == "strategy":
                cells.append(html.Td(r[key], className="name"))
            else:
                cells.append(html.Td(r[key], className="num"))
        body.append(html.Tr(cells, **{"data-strategy": r["label"]}))
    table = html.Table([head, html.Tbody(body)], className="comparison", id="comparison-table")
    if not results.get("complete", True):
        return html.Div([html.Div("Only the strategy in view is computed yet; the others "
                                  "follow when this view opens.", className="note"), table])
    return table


def _present_record(results: dict):
    comp = results["comparison"]
    name = (comp.get("decision") or {}).get("present") or comp["scenario"].get("present_strategy")
    for r in comp["strategies"]:
        if r["label"] == name:
            return r
    return None


def _delta(value, base, kind, system, money=""):
    """'−1.2 kW vs present' (None when either is missing or they are equal)."""
    if value is None or base is None:
        return None
    d = value - base
    if abs(d) <= 1e-9 * max(abs(base), 1.0):
        return "same as the present circuit"
    sign = "+" if d > 0 else "−"
    text = (f"{abs(d):,.0f} {money}".strip() if kind == "money"
            else fmt(abs(d), kind, system))
    return f"{sign}{text} vs present"


def headline(results: dict, strategy: str | None, system: str):
    """Key figures of one strategy as tiles (always in view): by default the
    recommended strategy, each with its difference to the present circuit;
    a value beyond a limit (oil above the fluid's limit, a circuit ruled out)
    is flagged."""
    r = strategy_record(results, strategy)
    if r is None:
        return []
    p = _present_record(results)
    is_present = p is not None and p["label"] == r["label"]
    cur = r.get("currency") or ""
    hot = any(w["code"] == "oil-temperature" for w in r["warnings"])
    own = r.get("yearly_cost_total")
    tiles = [
        ("yearly cost of ownership", "–" if own is None else f"{own:,.0f} {cur}",
         None if is_present or p is None else _delta(own, p.get("yearly_cost_total"),
                                                     "money", system, cur), False),
        ("electric energy per cycle", fmt(r["electric_energy_per_cycle_J"], "energy", system),
         None if is_present or p is None else _delta(r["electric_energy_per_cycle_J"],
                                                     p["electric_energy_per_cycle_J"],
                                                     "energy", system), False),
        ("mean heat into oil", fmt(r["heat_to_oil_W"], "power", system),
         None if is_present or p is None else _delta(r["heat_to_oil_W"], p["heat_to_oil_W"],
                                                     "power", system), False),
        ("steady oil temperature, no cooler",
         fmt(_c_to_k(r["oil_temperature_steady_C"]), "temperature", system),
         "above the fluid's limit on the hottest day" if hot else None, hot),
        ("cooler duty", fmt(r["cooler_duty_W"], "power", system) if r["cooler_needed"]
         else "none needed",
         None if is_present or p is None else _delta(
             r["cooler_duty_W"] if r["cooler_needed"] else 0.0,
             p["cooler_duty_W"] if p["cooler_needed"] else 0.0, "power", system), False),
    ]
    rec = (results["comparison"].get("recommended"))
    role = ("recommended" if r["label"] == rec else "present circuit" if is_present
            else "ruled out" if r.get("feasible") is False else "alternative")
    out_reason = r.get("reason") if r.get("feasible") is False else None
    name = html.Div([html.Div("strategy shown", className="tile-label"),
                     html.Div(r["label"], className="tile-value", id="tile-strategy"),
                     html.Div(out_reason or role, className="tile-delta", id="tile-role")],
                    className="tile strategy" + (" bad" if out_reason else ""))
    out = [name]
    for i, (label, value, delta, bad) in enumerate(tiles):
        kids = [html.Div(label, className="tile-label"),
                html.Div(value, className="tile-value", id=f"tile-{i}")]
        if delta:
            kids.append(html.Div(delta, className="tile-delta", id=f"tile-delta-{i}"))
        out.append(html.Div(kids, className="tile" + (" bad" if bad else "")))
    return out


# ---------------------------------------------------------------------------
# the decision (first view)
# ---------------------------------------------------------------------------

def decision_figure(results: dict):
    """Yearly cost of ownership of every strategy, ranked: energy, cooler fan,
    annualised circuit and cooler price stacked, one colour per role
    (:data:`heatload.outputs.report_assets.ROLE_COLOURS`), ruled-out circuits grey."""
    from heatload.outputs.report_assets import role_colour

    comp = results["comparison"]
    dec = comp.get("decision") or {}
    recs = {r["label"]: r for r in comp["strategies"]}
    order = [recs[n] for n in comp.get("ranking") or [] if n in recs]
    cur = dec.get("currency") or ""
    names = [f"{r['rank']}. {r['label']}" for r in order]
    colours = [role_colour(r["label"], dec.get("present"), dec.get("recommended"),
                           r.get("feasible", True)) for r in order]
    fig = go.Figure()
    for part, label, op in (("energy", "energy", 1.0), ("fan", "cooler fan", 0.75),
                            ("circuit", "circuit price / year", 0.5),
                            ("cooler", "cooler price / year", 0.3)):
        fig.add_trace(go.Bar(
            y=names, x=[(r.get("yearly_cost") or {}).get(part) or 0.0 for r in order],
            orientation="h", name=label, marker=dict(color=colours, opacity=op),
            customdata=[r.get("reason") or "" for r in order],
            hovertemplate="%{y}: %{x:,.0f} " + cur + " (" + label + ")<br>%{customdata}"
                          "<extra></extra>"))
    for nm, r in zip(names, order):
        tot = r.get("yearly_cost_total") or 0.0
        fig.add_annotation(x=tot, y=nm, text=f" {tot:,.0f}" + ("" if r.get("feasible", True)
                                                               else "  ruled out"),
                           showarrow=False, xanchor="left", font=dict(size=12))
    # the segments share their bar's role colour, lighter from energy to cooler
    # price: a legend of one colour would mislead, the view's caption says it
    fig.update_layout(barmode="stack", showlegend=False)
    fig.update_yaxes(autorange="reversed", title_text="strategy, ranked", automargin=True)
    fig.update_xaxes(title_text=f"yearly cost of ownership [{cur}/year]")
    return _layout(fig, "Yearly cost of ownership, ranked (green: recommended, orange: "
                        "present, grey: ruled out)", height=90 + 42 * max(len(order), 1))


def warnings_in_words(comp: dict, name: str | None) -> list:
    """The warnings of strategy *name* in plain sentences grouped by severity
    (:func:`heatload.outputs.wording.customer_warnings`), for the decision view."""
    r = next((x for x in comp["strategies"] if x["label"] == name), None)
    if r is None or not r["warnings"]:
        return []
    groups = customer_warnings(r["warnings"])
    kids = [html.H3(f"What to watch with {name}")]
    for heading, items in groups:
        kids.append(html.H4(heading))
        kids.append(html.Ul([html.Li([text, html.Span(f" ({', '.join(ph)})", className="note")])
                             for text, ph in items]))
    return [html.Div(kids, id="decision-warnings")]


def decision_view(results: dict, system: str):
    """The first view: the decision in a sentence, the ranked chart of yearly cost,
    the circuits ruled out with their reasons."""
    from dash import dcc

    if not results:
        return html.Div("computing …", className="note")
    if not results.get("complete", True):
        return html.Div("Only the strategy in view is computed yet; the decision follows "
                        "when this view opens.", className="note", id="decision-partial")
    comp = results["comparison"]
    dec = comp.get("decision") or {}
    out_rows = [html.Li([html.B(r["label"]), f": {r['reason']}"],
                        **{"data-strategy": r["label"]})
                for r in sorted(comp["strategies"], key=lambda r: r.get("rank") or 0)
                if r.get("feasible") is False]
    kids = [html.P(dec.get("sentence", ""), className="decision", id="decision-sentence")]
    kids.append(dcc.Graph(id="decision-graph", figure=decision_figure(results),
                          config={"displaylogo": False}))
    kids.append(html.Div("Each bar, from solid to light: electricity of the circuit, "
                         "electricity of the cooler's fan, the circuit's extra price and the "
                         "cooler's price spread over the service life.", className="caution"))
    if out_rows:
        kids += [html.H3("Ruled out"), html.Ul(out_rows, id="ruled-out", className="ruled-out")]
    kids += warnings_in_words(comp, dec.get("recommended") or comp.get("recommended"))
    kids += [html.Div(f"Note: {n}.", className="caution") for n in dec.get("notes") or []]
    from heatload.outputs.wording import calibration_note
    note = calibration_note(comp["scenario"].get("heat_calibration_factor", 1.0))
    if note:
        kids.append(html.Div(note, className="caution", id="heat-calibration"))
    kids.append(html.Div("Rule: circuits that can do the job first (no stall, speed reached, "
                         "within ratings, no runaway without a holding valve, motor not "
                         "overloaded), then by yearly cost of ownership.", className="caution"))
    return html.Div(kids, id="decision-view")


# ---------------------------------------------------------------------------
# where the energy goes
# ---------------------------------------------------------------------------

def sankey_figure(results: dict, strategy: str | None, system: str):
    """Electric input -> drive losses (room) and hydraulic power -> each oil
    loss and the useful work, per cycle, in the energy unit of *system*."""
    r = strategy_record(results, strategy)
    if r is None:
        return empty_figure("no results yet")
    unit = _u("energy", system)
    comp = r["component_energy_per_cycle_J"]
    e_in = r["electric_energy_per_cycle_J"] or 0.0
    useful = r["useful_energy_per_cycle_J"] or 0.0
    room = sum((comp.get(k) or 0.0) for k in ROOM)
    labels = ["electric input", "shaft and hydraulic power"]
    colors = [OKABE_ITO["blue"], OKABE_ITO["sky"]]
    src, dst, val, lcol = [], [], [], []

    def node(label, color):
        labels.append(label)
        colors.append(color)
        return len(labels) - 1

    def link(a, b, v, color):
        if v and v > 0:
            src.append(a)
            dst.append(b)
            val.append(float(conv(v, "energy", system)))
            lcol.append(color)

    for k in ROOM:
        v = comp.get(k) or 0.0
        if v > 0:
            link(0, node(f"{COMPONENT_LABELS[k]} (heats the room)", OKABE_ITO["grey"]), v,
                 "rgba(153,153,153,0.45)")
    link(0, 1, e_in - room, "rgba(86,180,233,0.45)")
    if useful < 0:
        # overrunning loads return more work than the actuators deliver: a source
        link(node("work done by overrunning loads", OKABE_ITO["green"]), 1, -useful,
             "rgba(0,158,115,0.45)")
    oil_colors = (OKABE_ITO["vermillion"], OKABE_ITO["orange"], OKABE_ITO["purple"],
                  OKABE_ITO["yellow"], OKABE_ITO["black"])
    ci = 0
    for k, v in sorted(comp.items(), key=lambda kv: -(kv[1] or 0.0)):
        if k in ROOM or not v or v <= 0:
            continue
        col = oil_colors[ci % len(oil_colors)]
        ci += 1
        link(1, node(f"{COMPONENT_LABELS.get(k, k)} (heats the oil)", col), v,
             "rgba(213,94,0,0.35)")
    if useful > 0:
        link(1, node("useful work", OKABE_ITO["green"]), useful, "rgba(0,158,115,0.45)")
    fig = go.Figure(go.Sankey(
        valueformat=".4g", valuesuffix=f" {unit}",
        node=dict(label=labels, color=colors, pad=14, thickness=16,
                  line=dict(color="#ffffff", width=0.5)),
        link=dict(source=src, target=dst, value=val, color=lcol)))
    title = (f"{r['label']}: energy per cycle [{unit}], electric input "
             f"{fmt(e_in, 'energy', system)}")
    return _layout(fig, title, height=460)


# ---------------------------------------------------------------------------
# the cycle over time
# ---------------------------------------------------------------------------

def _steps(durations, values):
    """Step-plot coordinates: each phase's value held from its start to its end."""
    t = np.r_[0.0, np.cumsum(durations)]
    v = list(values) + [values[-1] if len(values) else None]
    return t.tolist(), v


def _actuator_traces(fig, ph, dur, phase_names, system):
    """Where phases move several actuators at once: each actuator's inlet
    pressure (row 1; a gap where the phase leaves it alone) and flow (row 2,
    zero where it rests) over the cycle."""
    if not any(len(p.get("motions") or []) > 1 for p in ph):
        return
    names = list(dict.fromkeys(mo["actuator"] for p in ph for mo in p["motions"]))
    colours = ["#332288", "#88ccee", "#117733", "#999933", "#882255", "#44aa99"]
    for j, name in enumerate(names):
        colour = colours[j % len(colours)]
        for row, key, kind, what in ((1, "inlet_pressure_Pa", "pressure", "inlet"),
                                     (2, "flow_m3_s", "flow", "flow")):
            vals = []
            for p in ph:
                mo = next((x for x in p["motions"] if x["actuator"] == name), None)
                v = None if mo is None else mo[key]
                if v is None and row == 2:
                    v = 0.0
                vals.append(None if v is None else conv(v, kind, system))
            t, v = _steps(dur, vals)
            fig.add_trace(go.Scatter(x=t, y=v, name=f"{name} {what}", mode="lines",
                                     line_shape="hv", customdata=phase_names,
                                     line=dict(color=colour, width=1.5, dash="dashdot"),
                                     legendgroup=str(row)), row=row, col=1)


def cycle_figure(results: dict, strategy: str | None, system: str):
    """Pressures, flows and heat into the oil per phase, against time in the cycle."""
    r = strategy_record(results, strategy)
    if r is None or not r.get("phases"):
        return empty_figure("no results yet")
    ph = r["phases"]
    dur = [p["duration_s"] or 0.0 for p in ph]
    pu, qu, wu = _u("pressure", system), _u("flow", system), _u("power", system)
    fig = make_subplots(rows=3, cols=1, shared_xaxes=True, vertical_spacing=0.06)

    phase_names = [p["phase"] for p in ph]
    phase_names = phase_names + phase_names[-1:]

    def trace(row, key, kind, name, color, dash=None):
        vals = [conv(p[key], kind, system) if p[key] is not None else None for p in ph]
        t, v = _steps(dur, vals)
        fig.add_trace(go.Scatter(x=t, y=v, name=name, mode="lines", line_shape="hv",
                                 line=dict(color=color, width=2, dash=dash),
                                 customdata=phase_names, legendgroup=str(row)),
                      row=row, col=1)

    trace(1, "pump_pressure_Pa", "pressure", "pump pressure", OKABE_ITO["blue"])
    trace(1, "cap_pressure_Pa", "pressure", "cap side", OKABE_ITO["orange"])
    trace(1, "rod_pressure_Pa", "pressure", "rod side", OKABE_ITO["green"], "dot")
    trace(2, "pump_flow_m3_s", "flow", "pump flow", OKABE_ITO["blue"])
    trace(2, "actuator_flow_m3_s", "flow", "actuator flow", OKABE_ITO["orange"])
    trace(2, "relief_flow_m3_s", "flow", "over the relief", OKABE_ITO["vermillion"], "dash")
    trace(2, "bleed_flow_m3_s", "flow", "bled / bypassed", OKABE_ITO["purple"], "dot")
    trace(3, "heat_to_oil_W", "power", "heat into oil", OKABE_ITO["vermillion"])
    trace(3, "electric_power_W", "power", "electric input", OKABE_ITO["grey"], "dot")
    _actuator_traces(fig, ph, dur, phase_names, system)
    starts = np.r_[0.0, np.cumsum(dur)[:-1]]
    # one shapes list: add_vline per phase re-checks every earlier line (slow)
    fig.update_layout(shapes=[dict(type="line", xref=f"x{k}", yref=f"y{k} domain",
                                   x0=float(s), x1=float(s), y0=0, y1=1,
                                   line=dict(color="#e4e7eb", width=1))
                              for s in starts for k in ("", "2", "3")])
    fig.update_xaxes(title_text="time in the cycle [s]", row=3, col=1)
    fig.update_yaxes(title_text=f"pressure [{pu}]", row=1, col=1, rangemode="tozero")
    fig.update_yaxes(title_text=f"flow [{qu}]", row=2, col=1, rangemode="tozero")
    fig.update_yaxes(title_text=f"power [{wu}]", row=3, col=1, rangemode="tozero")
    fig.update_traces(hovertemplate="%{customdata}: %{y:.4g}<extra>%{fullData.name}</extra>")
    _layout(fig, f"{r['label']}: one cycle of {units.format_number(sum(dur), 3)} s "
                 "(phases as steps)", height=640)
    fig.update_layout(hovermode="x unified", margin=dict(l=70, r=170, t=50, b=50),
                      legend=dict(orientation="v", x=1.01, y=1.0, yanchor="top",
                                  tracegroupgap=105))
    return fig


# ---------------------------------------------------------------------------
# temperature over a shift
# ---------------------------------------------------------------------------

def shift_figure(profiles: dict, system: str, title: str = ""):
    """Oil temperature over a shift without and with the thermostat-switched cooler.

    *profiles*: ``{"without": (t [s], T [K]), "with": (t, T) or None,
    "limit": K, "design": K}``.
    """
    tu = _u("temperature", system)
    fig = go.Figure()
    t0, T0 = profiles["without"]
    fig.add_trace(go.Scatter(x=np.asarray(t0) / 3600.0, y=conv(np.asarray(T0), "temperature",
                                                                 system),
                             name="no cooler", line=dict(color=OKABE_ITO["vermillion"],
                                                         width=2)))
    if profiles.get("with") is not None:
        t1, T1 = profiles["with"]
        fig.add_trace(go.Scatter(x=np.asarray(t1) / 3600.0,
                                 y=conv(np.asarray(T1), "temperature", system),
                                 name="with the sized cooler (thermostat)",
                                 line=dict(color=OKABE_ITO["blue"], width=2)))
    for key, label, color in (("limit", "fluid's upper limit", OKABE_ITO["black"]),
                              ("design", "design oil temperature", OKABE_ITO["grey"])):
        v = profiles.get(key)
        if v is not None:
            fig.add_hline(y=float(conv(v, "temperature", system)),
                          line=dict(color=color, dash="dash", width=1),
                          annotation_text=label, annotation_position="top left")
    fig.update_xaxes(title_text="time from a cold start [h]")
    fig.update_yaxes(title_text=f"oil temperature [{tu}]")
    _layout(fig, title, height=480)
    fig.update_layout(margin=dict(l=70, r=20, t=50, b=100))
    return fig


# ---------------------------------------------------------------------------
# cooler sizing
# ---------------------------------------------------------------------------

def spec_table(rows: list):
    """The cooler spec sheet (item, value) as an HTML table."""
    return html.Table(html.Tbody([html.Tr([html.Th(a), html.Td(b)]) for a, b in rows]),
                      className="spec", id="spec-table")


def histogram_figure(samples_w, percentiles: dict, system: str, title: str, quote=None):
    """Distribution of the cooler duty from the Monte Carlo, with P50/P90/P95 and
    the duty to quote (*quote* [W], :func:`heatload.decision.quoted_duty`)."""
    pu = _u("power", system)
    fig = go.Figure()
    if samples_w is not None and len(samples_w):
        fig.add_trace(go.Histogram(x=conv(np.asarray(samples_w, float), "power", system),
                                   nbinsx=40, marker_color=OKABE_ITO["blue"],
                                   name="samples", opacity=0.85))
    for (k, v), color, pos in zip(sorted((percentiles or {}).items()),
                                  (OKABE_ITO["orange"], OKABE_ITO["vermillion"],
                                   OKABE_ITO["purple"]),
                                  ("top left", "top right", "bottom right")):
        if v is None:
            continue
        fig.add_vline(x=float(conv(v, "power", system)), line=dict(color=color, dash="dash"),
                      annotation_text=f"{k} {fmt(v, 'power', system)}",
                      annotation_position=pos)
    if quote is not None:
        fig.add_vline(x=float(conv(quote, "power", system)),
                      line=dict(color=OKABE_ITO["green"], width=3),
                      annotation_text=f"quote {fmt(quote, 'power', system)}",
                      annotation_position="bottom left")
    fig.update_xaxes(title_text=f"cooler duty [{pu}]")
    fig.update_yaxes(title_text="samples [count]")
    return _layout(fig, title, height=360)


def sensitivity_figure(rows: list, system: str, title: str):
    """Inputs ranked by how far they move the cooler duty: each bar spans the
    duty with the input at its low and at its high bound (the others nominal)."""
    pu = _u("power", system)
    rows = rows[::-1]                       # largest swing on top
    names, paths, base, width = [], [], [], []
    for r in rows:
        lo, hi = r.get("cooler_duty_low_W"), r.get("cooler_duty_high_W")
        if lo is None or hi is None:
            sw = r.get("cooler_duty_swing_W")
            if not isinstance(sw, (int, float)):
                continue
            lo, hi = 0.0, abs(sw)
        a, b = sorted((float(conv(lo, "power", system)), float(conv(hi, "power", system))))
        path = str(r.get("path", "?"))
        names.append(plain_path(path))       # plain words; the file's path on hover
        paths.append(path)
        base.append(a)
        width.append(max(b - a, 1e-9))
    fig = go.Figure(go.Bar(x=width, base=base, y=names, orientation="h", customdata=paths,
                           marker_color=OKABE_ITO["orange"],
                           hovertemplate="%{y} (%{customdata}): from %{base:,.3r} over "
                                         f"%{{x:,.3r}} {pu}<extra></extra>"))
    fig.update_xaxes(title_text=f"cooler duty, input at its low and high bound [{pu}]")
    fig.update_yaxes(title_text="uncertain input", automargin=True)
    return _layout(fig, title, height=320)


# ---------------------------------------------------------------------------
# payback
# ---------------------------------------------------------------------------

def payback_horizon(payback: float) -> float:
    """Years shown: about three paybacks, 2 to 20 years (10 when it never pays back)."""
    if not np.isfinite(payback):
        return 10.0
    return float(min(max(np.ceil(3.0 * payback), 2.0), 20.0))


def payback_figure(extra_price: float, yearly_saving: float, payback: float,
                   currency: str, candidate: str, baseline: str):
    """Cumulative net saving of *candidate* over *baseline*: saving x years minus
    the extra price."""
    y = np.linspace(0.0, payback_horizon(payback), 121)
    net = yearly_saving * y - extra_price
    fig = go.Figure(go.Scatter(x=y, y=net, mode="lines", name="cumulative net saving",
                               line=dict(color=OKABE_ITO["green"], width=2.5)))
    fig.add_hline(y=0.0, line=dict(color=OKABE_ITO["black"], width=1))
    if np.isfinite(payback):
        fig.add_vline(x=float(payback), line=dict(color=OKABE_ITO["vermillion"], dash="dash"),
                      annotation_text=f"payback {payback:.1f} years",
                      annotation_position="top right")
    fig.update_xaxes(title_text="years in service [year]")
    fig.update_yaxes(title_text=f"cumulative net saving [{currency}]")
    return _layout(fig, f"{candidate} instead of {baseline}", height=380)
