"""A customer report: one self-contained HTML file (plotly.js inline, no
request to any server when opened), plus the same tables as a spreadsheet
and as CSV files.

Every number comes from :mod:`heatload.tables` records (and, for the cooler,
:func:`heatload.sizing.sizing_record`), so the report, the spreadsheet and
``heatload compare --json`` agree.  Every output path is checked before
anything is computed, and files are written by the project's one atomic
writer (:func:`heatload.outputs.write_atomic`); an existing file is replaced
only when asked to (``--force``), a folder, pipe or device never.  Text cells
of the exports that a spreadsheet would run as a formula are neutralised
(:mod:`heatload.outputs`).

The recommendation is the strategy with the lowest yearly electric energy
among those without safety-critical warnings (an overrunning load the circuit
cannot hold, a pressure above a component's rating, a stalled actuator, an
intensified chamber above its rating, a drive motor asked for more than 160 %
of its rating).  Oil-temperature warnings are not
disqualifying: the cooler sized here takes care of them.
"""

from __future__ import annotations

import html
import json
import math
import re
import time
from pathlib import Path

import numpy as np

from heatload import outputs, tables
from heatload.checks import MOTOR_EXCESS_TORQUE
from heatload.errors import HeatloadError

K0 = 273.15

#: Warning codes that rule a strategy out of the recommendation.
SAFETY_CRITICAL = ("overrunning-load", "pressure-rating", "stall")

CAUTION = ("This report is an estimate for early design. Component makers' data, "
           "machine-safety standards for hydraulic systems (e.g. ISO 4413), local codes and "
           "licensed engineering practice govern the design, selection and installation.")

LOSS_LABELS = {"drive_motor": "drive motor", "converter": "frequency converter", "pump": "pump",
               "relief": "relief valve", "flow_control": "flow control", "bleed": "bleed / bypass",
               "directional_valve": "directional valve", "check_valve": "check valve",
               "lines": "lines", "counterbalance": "counterbalance valve",
               "actuator": "actuator friction", "compression": "oil compression"}

#: Correlations and standards the engine uses (shown in the report's assumptions).
METHODS = (
    ("Viscosity grades", "ISO 3448 (ISO VG, kinematic viscosity at 40 °C)"),
    ("Viscosity over temperature", "ASTM D341 (Walther straight line through two points "
                                   "or a least-squares fit)"),
    ("Viscosity index", "ASTM D2270"),
    ("Oil density", "linear thermal expansion from 15 °C, secant bulk modulus"),
    ("Oil specific heat and thermal conductivity", "Cragoe (1929), US Bureau of Standards "
                                                   "Misc. Publ. 97, unless given"),
    ("Pump losses", "Wilson-type model (leakage ~ p/mu, viscous and Coulomb friction) "
                    "calibrated at the datasheet point; ISO 4391 terms"),
    ("Drive motor", "IEC 60034-30-1 efficiency classes; part load by IEC 60034-2-1 "
                    "loss separation"),
    ("Valves", "orifice equation and Q² characteristics (ISO 4411); relief with linear "
               "override; compensated flow controls (2-way and 3-way)"),
    ("Lines", "Darcy-Weisbach; laminar 64/Re, turbulent Colebrook (Swamee-Jain start)"),
    ("Actuators", "cylinder areas and force balance (ISO 3320 geometry); motor relations "
                  "(ISO 4391); compression energy from the bulk modulus"),
    ("Reservoir heat loss", "natural convection Churchill-Chu (vertical walls), "
                            "Lloyd-Moran / Radziemska-Lewandowski (horizontal), forced "
                            "convection flat plate, radiation (Stefan-Boltzmann); air by CoolProp"),
    ("Oil temperature", "lumped single-node first-law model: steady, periodic steady "
                        "(closed form per phase), warm-up, thermostat-switched cooler"),
    ("Air-oil cooler", "specific cooling power per K of ETD (common practice); stream "
                       "energy balances"),
    ("Water-oil cooler", "effectiveness-NTU (Incropera et al., 6th ed., Sec. 11.4-11.5); "
                         "water IAPWS-95 and ethylene glycol-water by CoolProp"),
    ("Cooler duty", "steady energy balance at the highest ambient with the oil at the "
                    "design temperature, plus margin"),
)


# ---------------------------------------------------------------------------
# selection: recommendation, prices, payback
# ---------------------------------------------------------------------------

def critical_warnings(record, scenario) -> list:
    """Safety-critical warnings of one strategy record (``tables.strategy_record``)."""
    out = []
    for w in record["warnings"]:
        if w["code"] in SAFETY_CRITICAL:
            out.append(w)
        elif w["code"] == "intensification" and _above_rating(w, scenario):
            out.append(w)
        elif w["code"] == "motor-overload" and w["value"] > w["limit"] * MOTOR_EXCESS_TORQUE:
            out.append(w)   # more torque than a motor is built to give even briefly
    return out


def _above_rating(w, scenario):
    for ph in scenario.phases:
        if ph.name == w["phase"] and ph.actuator:
            return float(w["value"]) > scenario.actuator(ph.actuator).max_pressure
    return False


def recommend(data, scenario):
    """(recommended record, reason text, excluded {label: [codes]}) from a
    :func:`heatload.tables.comparison_dict`: lowest yearly electric energy among
    strategies without safety-critical warnings."""
    recs = data["strategies"]
    excluded = {}
    for r in recs:
        crit = critical_warnings(r, scenario)
        if crit:
            excluded[r["label"]] = sorted({w["code"] for w in crit})
    ok = [r for r in recs if r["label"] not in excluded]
    pool = ok or recs
    best = min(pool, key=lambda r: r["electric_energy_per_year_kWh"])
    if ok:
        why = (f"lowest yearly electric energy among the {len(ok)} of "
               f"{tables.count(len(recs), 'strategy')} "
               "without safety-critical warnings")
    else:
        why = ("every strategy has a safety-critical warning; this one has the lowest yearly "
               "energy but needs the warnings resolved first")
    return best, why, excluded


def parse_prices(items, scenario) -> dict:
    """``["load-sensing=4200", ...]`` -> {strategy name: amount}."""
    out = {}
    for item in items or ():
        name, sep, amount = str(item).partition("=")
        name = name.strip()
        if not sep or not name:
            raise HeatloadError(f"price {item!r} must read NAME=AMOUNT, e.g. load-sensing=4200",
                                field="--price")
        try:
            st = scenario.strategy(name)
        except KeyError:
            raise HeatloadError(f"unknown strategy {name!r} in --price; this scenario has "
                                f"{', '.join(s.name for s in scenario.strategies)}",
                                field="--price") from None
        try:
            v = float(amount)
        except ValueError:
            raise HeatloadError(f"price of {name} must be a number, got {amount!r}",
                                field="--price") from None
        if not math.isfinite(v) or v < 0:
            raise HeatloadError(f"price of {name} must be >= 0", field="--price")
        out[st.name] = v
    return out


def payback_rows(data, present, prices=None) -> list:
    """Per strategy: price, extra price over the present circuit, yearly cost saving,
    simple payback (``tables.payback_years``); None where a price is unknown."""
    from heatload import tables

    prices = dict(prices or {})
    price = {r["label"]: prices.get(r["label"], r["price"]) for r in data["strategies"]}
    base = next(r for r in data["strategies"] if r["label"] == present)
    rows = []
    for r in data["strategies"]:
        saving = base["cost_per_year"] - r["cost_per_year"]
        # prices are extra prices over the present circuit: the present one's is 0
        # unless the file gives both on one footing
        p, p0 = price[r["label"]], price[present]
        p0 = 0.0 if p0 is None else p0
        if r["label"] == present:
            p = p0
        extra = (p - p0) if p is not None else None
        if extra is None:
            years = None
        elif extra <= 0:
            years = 0.0 if saving > 0 else None
        else:
            y = float(tables.payback_years(extra, saving))
            years = y if math.isfinite(y) else math.inf
        rows.append({"strategy": r["label"], "price": p, "extra_price": extra,
                     "cost_saving_per_year": saving, "payback_years": years})
    return rows


# ---------------------------------------------------------------------------
# figures
# ---------------------------------------------------------------------------

def _layout(fig, title, height=360, **kw):
    from heatload.report_assets import FIGURE_WIDTH, PALETTE
    fig.update_layout(
        title=dict(text=title, x=0.0, xanchor="left", font=dict(size=14)),
        width=FIGURE_WIDTH, height=height, autosize=False, template="plotly_white",
        colorway=list(PALETTE), margin=dict(l=64, r=20, t=46, b=50),
        font=dict(family="system-ui, -apple-system, Segoe UI, Roboto, Arial, sans-serif",
                  size=12, color="#1d2430"),
        legend=dict(orientation="h", yanchor="bottom", y=1.0, xanchor="right", x=1.0), **kw)
    return fig


def sankey_figure(record, title):
    """Energy per cycle from electric input to useful work and every loss [kJ]."""
    import plotly.graph_objects as go
    from heatload.report_assets import PALETTE

    ce = {k: max(0.0, v or 0.0) / 1e3 for k, v in record["component_energy_per_cycle_J"].items()}
    electric = record["electric_energy_per_cycle_J"] / 1e3
    useful = record["useful_energy_per_cycle_J"] / 1e3
    motor = ce.get("drive_motor", 0.0) + ce.get("converter", 0.0)
    shaft = max(electric - motor, 0.0)
    hydraulic = max(shaft - ce.get("pump", 0.0), 0.0)
    nodes = ["electric input", "pump shaft", "hydraulic power"]
    colors = [PALETTE[0], PALETTE[4], PALETTE[2]]
    src, dst, val, lcol = [], [], [], []

    def node(label, color):
        nodes.append(label)
        colors.append(color)
        return len(nodes) - 1

    def link(a, b, v, c="rgba(0,114,178,0.30)"):
        if v > 1e-9:
            src.append(a), dst.append(b), val.append(v), lcol.append(c)

    loss_c, loss_l = PALETTE[3], "rgba(213,94,0,0.30)"
    link(0, 1, shaft)
    if motor > 0:
        link(0, node("drive motor" + (" + converter" if ce.get("converter", 0) > 0 else ""),
                     loss_c), motor, loss_l)
    link(1, 2, hydraulic)
    if ce.get("pump", 0.0) > 0:
        link(1, node("pump", loss_c), ce["pump"], loss_l)
    if useful < 0:
        link(node("work from overrunning load", PALETTE[5]), 2, -useful,
             "rgba(204,121,167,0.35)")
    for k in ("relief", "flow_control", "bleed", "directional_valve", "check_valve", "lines",
              "counterbalance", "actuator", "compression"):
        if ce.get(k, 0.0) > 0:
            link(2, node(LOSS_LABELS[k], loss_c), ce[k], loss_l)
    if useful > 0:
        link(2, node("useful work", PALETTE[2]), useful, "rgba(0,158,115,0.35)")
    fig = go.Figure(go.Sankey(
        arrangement="snap", valueformat=".1f", valuesuffix=" kJ",
        node=dict(label=nodes, color=colors, pad=14, thickness=14,
                  line=dict(color="#ffffff", width=0.5)),
        link=dict(source=src, target=dst, value=val, color=lcol)))
    return _layout(fig, title, height=380)


def _steps(durations, values):
    t = np.concatenate([[0.0], np.cumsum(durations)])
    v = list(values) + [values[-1]]
    return t, v


def cycle_figure(records, names):
    """Heat into the oil [kW] and pump pressure [bar] over one cycle (steps per phase)."""
    import plotly.graph_objects as go
    from plotly.subplots import make_subplots
    from heatload.report_assets import PALETTE

    fig = make_subplots(rows=2, cols=1, shared_xaxes=True, vertical_spacing=0.08)
    for i, (rec, name) in enumerate(zip(records, names)):
        ph = rec["phases"]
        d = [p["duration_s"] for p in ph]
        c = PALETTE[i % len(PALETTE)]
        t, q = _steps(d, [p["heat_to_oil_W"] / 1e3 for p in ph])
        hover = [p["phase"] for p in ph] + [ph[-1]["phase"]]
        fig.add_trace(go.Scatter(x=t, y=q, mode="lines", line=dict(shape="hv", color=c),
                                 name=f"{name}", legendgroup=name, text=hover,
                                 hovertemplate="%{text}: %{y:.2f} kW<extra>" + name + "</extra>"),
                      row=1, col=1)
        t, p = _steps(d, [p["pump_pressure_Pa"] / 1e5 for p in ph])
        fig.add_trace(go.Scatter(x=t, y=p, mode="lines",
                                 line=dict(shape="hv", color=c, dash="solid" if i == 0 else "dash"),
                                 name=name, legendgroup=name, showlegend=False, text=hover,
                                 hovertemplate="%{text}: %{y:.1f} bar<extra>" + name + "</extra>"),
                      row=2, col=1)
    fig.update_yaxes(title_text="heat into oil [kW]", rangemode="tozero", row=1, col=1)
    fig.update_yaxes(title_text="pump pressure [bar]", rangemode="tozero", row=2, col=1)
    fig.update_xaxes(title_text="time in the cycle [s]", row=2, col=1)
    return _layout(fig, "Heat and pressure over one cycle", height=460)


def _thin(times, temps, limit=700):
    t = np.asarray(times, float).ravel()
    y = np.asarray(temps, float).ravel()
    if t.size <= limit:
        return t, y
    idx = np.unique(np.concatenate([np.linspace(0, t.size - 1, limit).astype(int),
                                    [int(np.argmax(y))]]))
    return t[idx], y[idx]


def shift_figure(curves, limit_C, design_C):
    """Oil temperature [°C] over a shift [h]; *curves* = [(label, times, temps K, dash)]."""
    import plotly.graph_objects as go
    from heatload.report_assets import PALETTE

    fig = go.Figure()
    for i, (label, t, y, dash) in enumerate(curves):
        t, y = _thin(t, y)
        fig.add_trace(go.Scatter(x=np.round(t / 3600.0, 4), y=np.round(y - K0, 2), mode="lines",
                                 name=label, line=dict(color=PALETTE[i % len(PALETTE)], dash=dash),
                                 hovertemplate="%{x:.2f} h: %{y:.1f} °C<extra>" + label
                                 + "</extra>"))
    fig.add_hline(y=limit_C, line=dict(color=PALETTE[3], dash="dot", width=1),
                  annotation_text=f"fluid limit {limit_C:.0f} °C", annotation_position="top left")
    fig.add_hline(y=design_C, line=dict(color=PALETTE[7], dash="dot", width=1),
                  annotation_text=f"design {design_C:.0f} °C", annotation_position="bottom left")
    fig.update_xaxes(title_text="time from cold start [h]")
    fig.update_yaxes(title_text="oil temperature [°C]")
    return _layout(fig, "Oil temperature over a shift", height=380)


def energy_bar_figure(data, recommended, present):
    """Yearly electric energy [MWh] and heat into the oil [kW] per strategy."""
    import plotly.graph_objects as go
    from plotly.subplots import make_subplots
    from heatload.report_assets import PALETTE

    recs = data["strategies"]
    names = [r["label"] for r in recs]
    col = [PALETTE[2] if n == recommended else PALETTE[1] if n == present else PALETTE[0]
           for n in names]
    fig = make_subplots(rows=1, cols=2, horizontal_spacing=0.16)
    fig.add_trace(go.Bar(y=names, x=[r["electric_energy_per_year_kWh"] / 1e3 for r in recs],
                         orientation="h", marker_color=col, showlegend=False,
                         hovertemplate="%{y}: %{x:.2f} MWh/year<extra></extra>"), row=1, col=1)
    fig.add_trace(go.Bar(y=names, x=[r["heat_to_oil_W"] / 1e3 for r in recs], orientation="h",
                         marker_color=col, showlegend=False,
                         hovertemplate="%{y}: %{x:.2f} kW<extra></extra>"), row=1, col=2)
    fig.update_xaxes(title_text="electric energy [MWh/year]", row=1, col=1)
    fig.update_xaxes(title_text="heat into oil [kW]", row=1, col=2)
    fig.update_yaxes(autorange="reversed", title_text="strategy", row=1, col=1)
    fig.update_yaxes(autorange="reversed", showticklabels=False, row=1, col=2)
    fig = _layout(fig, "Energy and heat by strategy (green: recommended, orange: present)",
                  height=330)
    fig.update_layout(margin=dict(l=170, r=20, t=46, b=50))
    return fig


class _Figures:
    """Turns plotly figures into HTML divs: plotly.js inline once, then none."""

    def __init__(self):
        self.first = True
        self.count = 0

    def __call__(self, fig, caption=""):
        import plotly.io as pio

        self.count += 1
        div = pio.to_html(fig, include_plotlyjs=self.first, full_html=False,
                          div_id=f"figure-{self.count}",
                          config={"displaylogo": False, "responsive": False,
                                  "showSendToCloud": False,
                                  "modeBarButtonsToRemove": ["sendDataToCloud", "lasso2d",
                                                             "select2d"]})
        self.first = False
        cap = f'<div class="caption">{html.escape(caption)}</div>' if caption else ""
        return f'<div class="figure">{div}{cap}</div>'


# ---------------------------------------------------------------------------
# formatting helpers
# ---------------------------------------------------------------------------

def _e(x):
    return html.escape(str(x))


def _num(v, digits=3):
    from heatload.units import format_number
    if v is None:
        return "–"
    if isinstance(v, float) and math.isinf(v):
        return "never"
    return format_number(float(v), digits)


def _grouped(v, decimals=0):
    if v is None:
        return "–"
    return f"{v:,.{decimals}f}"


def _cell(value, text, strategy=None, key=None):
    attrs = ""
    if key is not None:
        attrs += f' data-key="{_e(key)}"'
        if strategy is not None:
            attrs += f' data-strategy="{_e(strategy)}"'
        if value is not None and not (isinstance(value, float) and not math.isfinite(value)):
            attrs += f' data-value="{float(value)!r}"'
    return f'<td class="num"{attrs}>{_e(text)}</td>'


def _table(headers, rows, cls=""):
    head = "".join(f'<th class="{c}">{_e(h)}</th>' for h, c in headers)
    return (f'<table class="{cls}"><thead><tr>{head}</tr></thead><tbody>'
            + "".join(rows) + "</tbody></table>")


# ---------------------------------------------------------------------------
# sections
# ---------------------------------------------------------------------------

def comparison_section(data, recommended, present):
    cur = data["scenario"]["currency"]
    headers = [("strategy", ""), ("energy [kWh/yr]", "num"), (f"cost [{cur}/yr]", "num"),
               ("CO₂ [t/yr]", "num"), ("heat to oil [kW]", "num"),
               ("oil, no cooler [°C]", "num"), ("oil, running [°C]", "num"),
               ("cooler [kW]", "num"), ("peak [bar]", "num"), ("eff. [%]", "num"),
               ("warnings", "")]
    rows = []
    for rank, name in enumerate(data["ranking"], 1):
        r = next(x for x in data["strategies"] if x["label"] == name)
        cls = " ".join(c for c, on in (("recommended", name == recommended),
                                       ("present", name == present)) if on)
        codes = sorted({w["code"] for w in r["warnings"]})
        s = r["label"]
        rows.append(
            f'<tr class="{cls}" data-strategy="{_e(s)}"><td>{rank}. {_e(s)}</td>'
            + _cell(r["electric_energy_per_year_kWh"],
                    _grouped(r["electric_energy_per_year_kWh"]), s, "electric_energy_per_year_kWh")
            + _cell(r["cost_per_year"], _grouped(r["cost_per_year"]), s, "cost_per_year")
            + _cell(r["co2_per_year_kg"], f"{r['co2_per_year_kg'] / 1e3:.2f}", s, "co2_per_year_kg")
            + _cell(r["heat_to_oil_W"], _num(r["heat_to_oil_W"] / 1e3), s, "heat_to_oil_W")
            + _cell(r["oil_temperature_steady_C"], f"{r['oil_temperature_steady_C']:.1f}", s,
                    "oil_temperature_steady_C")
            + _cell(r["oil_temperature_operating_C"], f"{r['oil_temperature_operating_C']:.1f}",
                    s, "oil_temperature_operating_C")
            + _cell(r["cooler_duty_W"], _num(r["cooler_duty_W"] / 1e3) if r["cooler_needed"]
                    else "none", s, "cooler_duty_W")
            + _cell(r["peak_pressure_Pa"], f"{r['peak_pressure_Pa'] / 1e5:.0f}", s,
                    "peak_pressure_Pa")
            + _cell(r["overall_efficiency"], f"{100 * r['overall_efficiency']:.0f}", s,
                    "overall_efficiency")
            + f'<td class="small {"warn" if codes else ""}">{_e(", ".join(codes) or "–")}</td></tr>')
    return _table(headers, rows, "compare")


def _assumption(item, value, source, kind=None, si=None):
    return {"item": item, "value": value, "source": source, "kind": kind,
            "value_si": None if si is None else float(si)}


def assumptions(scenario, data=None) -> list:
    """Every input and model assumption with its value and source (list of dicts:
    item, value (text), source, kind, value_si)."""
    from heatload import chain, oil
    from heatload.units import format_quantity as fq

    def q(v, kind, digits=3):
        return fq(v, kind, "si", digits)
    sc = scenario
    f, a, r, pu, ec, cd = (sc.fluid, sc.ambient, sc.reservoir, sc.power_unit, sc.economics,
                           sc.cooler)
    t_d = chain.design_oil_temperature(sc)
    out = []
    A = out.append
    A(_assumption("fluid", f.name + (f" (ISO VG {f.iso_grade})" if f.iso_grade else ""),
                  "scenario; ISO 3448 grade"))
    A(_assumption("viscosity at 40 °C", q(f.nu40, "kinematic_viscosity"), "scenario; ASTM D341",
                  "kinematic_viscosity", f.nu40))
    A(_assumption("viscosity at 100 °C", q(f.nu100, "kinematic_viscosity"),
                  "scenario; ASTM D341", "kinematic_viscosity", f.nu100))
    try:
        vi = float(oil.viscosity_index(f.nu40, f.nu100))
        A(_assumption("viscosity index", f"{vi:.0f}", "ASTM D2270 from the two viscosities",
                      "dimensionless", vi))
    except HeatloadError:
        pass
    A(_assumption("density at 15 °C", q(f.density_15C, "density"), "scenario", "density",
                  f.density_15C))
    cp = float(oil.fluid_specific_heat(f, t_d))
    A(_assumption("oil specific heat at the design temperature", q(cp, "specific_heat"),
                  "scenario" if f.specific_heat else "Cragoe (1929) correlation",
                  "specific_heat", cp))
    A(_assumption("oil temperature limits", f"{q(f.temperature_min, 'temperature')} .. "
                  f"{q(f.temperature_max, 'temperature')}", "scenario (fluid)"))
    A(_assumption("design oil temperature (cooler)", q(t_d, "temperature"),
                  "scenario" if cd.oil_temperature_max is not None else
                  "fluid limit - 5 K (common practice)", "temperature", t_d))
    A(_assumption("ambient, typical", q(a.temperature, "temperature"), "scenario",
                  "temperature", a.temperature))
    A(_assumption("ambient, highest (cooler design)", q(a.temperature_max, "temperature"),
                  "scenario", "temperature", a.temperature_max))
    A(_assumption("cold start", q(a.cold_start_temperature, "temperature"), "scenario",
                  "temperature", a.cold_start_temperature))
    A(_assumption("site altitude", q(a.altitude, "distance"), "scenario; barometric formula",
                  "distance", a.altitude))
    A(_assumption("oil volume", q(r.oil_volume, "volume"), "scenario", "volume", r.oil_volume))
    A(_assumption("reservoir outside dimensions", f"{r.length:.2f} x {r.width:.2f} x "
                  f"{r.height:.2f} m, oil level {100 * r.oil_level:.0f} %", "scenario"))
    A(_assumption("heat transfer of the walls",
                  q(r.heat_transfer_coefficient, "heat_transfer_coefficient")
                  if r.heat_transfer_coefficient else
                  "natural convection + radiation" + (f", air {r.air_velocity:.1f} m/s"
                                                       if r.air_velocity else ", still air"),
                  "scenario" if r.heat_transfer_coefficient else
                  "Churchill-Chu, Stefan-Boltzmann (emissivity "
                  f"{r.emissivity:.2f})"))
    A(_assumption("steel mass", q(r.steel_mass, "mass"), "scenario", "mass", r.steel_mass))
    if r.surfaces:
        A(_assumption("further surfaces", ", ".join(f"{s.name} {s.area:.2f} m²"
                                                     for s in r.surfaces), "scenario"))
    p = pu.pump
    A(_assumption("pump", f"{p.kind} {p.type}, {p.displacement * 1e6:.1f} cm³/rev at "
                  f"{p.shaft_speed * 60:.0f} rpm", "scenario"))
    A(_assumption("pump datasheet point", f"eta_v {p.volumetric_efficiency:.2f}, eta_hm "
                  f"{p.hydromechanical_efficiency:.2f} at {q(p.rated_pressure, 'pressure')} and "
                  f"{q(p.rated_viscosity, 'kinematic_viscosity')}",
                  "scenario; Wilson-type loss model calibrated there"))
    A(_assumption("pump pressure rating", q(p.max_pressure, "pressure"), "scenario",
                  "pressure", p.max_pressure))
    m = pu.motor
    A(_assumption("drive motor", f"{q(m.rated_power, 'power')} {m.efficiency_class}, "
                  f"{m.poles} poles" + (f", efficiency {m.efficiency:.3f}" if m.efficiency else ""),
                  "scenario" + ("" if m.efficiency else "; IEC 60034-30-1 class minimum")))
    A(_assumption("relief valve", f"cracking {q(pu.relief.cracking_pressure, 'pressure')}, "
                  f"override {q(pu.relief.override, 'pressure')} at "
                  f"{q(pu.relief.rated_flow, 'flow')}", "scenario; linear override (ISO 4411)"))
    dv = pu.directional_valve
    A(_assumption("directional valve", f"{q(dv.pressure_drop, 'pressure')} at "
                  f"{q(dv.rated_flow, 'flow')}, {dv.centre} centre", "scenario; Δp ~ Q²"))
    for label, ln in (("pressure line", pu.pressure_line), ("return line", pu.return_line)):
        A(_assumption(label, f"{ln.length:.1f} m, ID {ln.inner_diameter * 1e3:.0f} mm, "
                      f"K {ln.fittings_k:.1f}", "scenario; Darcy-Weisbach, Colebrook"))
    for st in sc.strategies:
        sp = st.parameters
        bits = {"meter-in": f"flow control min. drop {q(sp.flow_control_min_drop, 'pressure')}",
                "meter-out": f"flow control min. drop {q(sp.flow_control_min_drop, 'pressure')}",
                "bleed-off": f"flow control min. drop {q(sp.flow_control_min_drop, 'pressure')}",
                "bypass-compensated": f"3-way spring {q(sp.bypass_spring, 'pressure')}",
                "pressure-compensated": "compensator " + (
                    q(sp.compensator_setting, "pressure") if sp.compensator_setting
                    else "relief cracking - 10 bar"),
                "load-sensing": f"margin {q(sp.load_sensing_margin, 'pressure')}, standby "
                                f"{q(sp.standby_pressure, 'pressure')}",
                "variable-speed": f"speed {100 * sp.min_speed_fraction:.0f}-"
                                  f"{100 * sp.max_speed_fraction:.0f} % of nominal"}[st.kind]
        if sp.counterbalance_setting:
            bits += f", counterbalance {q(sp.counterbalance_setting, 'pressure')}"
        A(_assumption(f"strategy {st.name}", bits, "scenario or typical value (common practice)"))
    A(_assumption("operating hours", f"{ec.hours_per_year:.0f} h/year", "scenario",
                  "dimensionless", ec.hours_per_year))
    A(_assumption("electricity price", f"{ec.electricity_price * 3.6e6:.3f} {ec.currency}/kWh",
                  "scenario"))
    A(_assumption("grid CO₂ factor", f"{ec.grid_co2_factor * 3.6e6:.3f} kg/kWh", "scenario"))
    A(_assumption("cooler duty margin", f"{100 * cd.margin:.0f} %",
                  "scenario; margin common practice", "dimensionless", cd.margin))
    A(_assumption("cooler coolant", cd.coolant, "scenario"))
    A(_assumption("air temperature rise through the cooler",
                  q(cd.air_temperature_rise, "temperature_difference"), "scenario",
                  "temperature_difference", cd.air_temperature_rise))
    A(_assumption("cooling water", f"inlet {q(cd.water_inlet_temperature, 'temperature')}, "
                  + (f"flow {q(cd.water_flow, 'flow')}" if cd.water_flow else
                     f"rise {q(cd.water_temperature_rise, 'temperature_difference')}")
                  + f", glycol {100 * cd.water_glycol_fraction:.0f} %", "scenario; CoolProp"))
    A(_assumption("allowed oil-side pressure drop", q(cd.oil_pressure_drop_max, "pressure"),
                  "scenario", "pressure", cd.oil_pressure_drop_max))
    A(_assumption("cooler oil flow", "cycle-average return flow (return-line cooler)",
                  "assumption of this report"))
    A(_assumption("thermostat", ("on at " + q(cd.thermostat_on, "temperature")
                                 if cd.thermostat_on else "on at the design temperature")
                  + f", hysteresis {q(cd.thermostat_hysteresis, 'temperature_difference')}",
                  "scenario"))
    A(_assumption("shift length", f"{sc.shift_duration / 3600:.1f} h", "scenario", "time",
                  sc.shift_duration))
    for u in sc.uncertainty:
        A(_assumption(f"uncertain: {u.path}", f"{u.distribution} {u.low:g} .. {u.high:g}"
                      + (" (factors)" if u.relative else " (SI)"), "scenario"))
    for name, src in METHODS:
        A(_assumption(f"method: {name}", "", src))
    return out


def _warnings_html(data):
    items = []
    for r in data["strategies"]:
        for w in r["warnings"]:
            items.append(f"<li><b>{_e(r['label'])}</b> / {_e(w['phase'] or 'whole cycle')}: "
                         f"{_e(w['message'])} <span class=\"note\">({_e(w['code'])})</span></li>")
    if not items:
        return "<p>No warnings.</p>"
    return '<ul class="warnings">' + "".join(items) + "</ul>"


def _cooler_html(rec, sz, unc):
    from heatload import sizing as sizing_mod
    from heatload.units import format_quantity as fq

    parts = [f"<p>Design point for <b>{_e(rec['strategy'])}</b>: highest ambient "
             f"{rec['design_ambient_C']:.1f} °C, oil held at {rec['design_oil_temperature_C']:.1f} °C. "
             f"Heat into the oil {fq(rec['design_heat_W'], 'power')}, the reservoir's surfaces shed "
             f"{fq(rec['surfaces_heat_W'], 'power')}.</p>"]
    if not rec["cooler_needed"]:
        parts.append("<p><b>No cooler is needed</b> at the design point.</p>")
    rows = sizing_mod.spec_rows(sz, "si")
    if rows:
        parts.append('<table class="keep"><thead><tr><th>spec sheet item</th><th class="num">'
                     'value</th></tr></thead><tbody>' + "".join(
                         f'<tr><td>{_e(k)}</td><td class="num">{_e(v)}</td></tr>'
                         for k, v in rows) + "</tbody></table>")
    if rec["air"] and rec["coolant"] != "air":
        a = rec["air"]
        parts.append(f"<p>Air-oil alternative: {fq(a['specific_cooling_power_W_K'], 'thermal_conductance')}"
                     f" at ETD {a['etd_K']:.1f} K, air {a['air_mass_flow_kg_s']:.2f} kg/s.</p>")
    if rec["water"]:
        wrows = []
        for arr, w in rec["water"].items():
            wrows.append(f"<tr><td>{_e(arr)}</td>"
                         + _cell(w["required_conductance_W_K"], _num(w["required_conductance_W_K"]))
                         + _cell(w["ntu"], f"{w['ntu']:.3f}")
                         + _cell(w["effectiveness"], f"{w['effectiveness']:.3f}")
                         + _cell(w["water_volume_flow_m3_s"],
                                 f"{w['water_volume_flow_m3_s'] * 6e4:.1f}")
                         + _cell(w["water_outlet_temperature_C"],
                                 f"{w['water_outlet_temperature_C']:.1f}") + "</tr>")
        parts.append("<h3>Water-oil options</h3>" + _table(
            [("arrangement", ""), ("UA [W/K]", "num"), ("NTU [-]", "num"),
             ("effectiveness [-]", "num"), ("water [L/min]", "num"),
             ("water out [°C]", "num")], wrows, "keep"))
    if rec["rating"]:
        r = rec["rating"]
        parts.append(f"<p>Rating check: {fq(r['rated_duty_W'], 'power')} at ETD "
                     f"{r['rated_etd_K']:.1f} K gives {fq(r['duty_at_design_W'], 'power')} at the "
                     f"design ETD {r['design_etd_K']:.1f} K — "
                     f"{'enough' if r['suffices'] else 'not enough'}.</p>")
    t = rec.get("thermostat")
    if t and rec["cooler_needed"]:
        parts.append(f"<p>With a thermostat (on at {t['on_temperature_C']:.1f} °C, hysteresis "
                     f"{t['hysteresis_K']:.0f} K) the cooler switches on {tables.times(t['switch_count'])} "
                     f"in a {t['shift_duration_s'] / 3600:.1f} h shift and runs "
                     f"{100 * t['on_fraction']:.0f} % of the time; the oil peaks at "
                     f"{t['max_temperature_C']:.1f} °C.</p>")
    parts.append("<h3>Uncertainty</h3>")
    if unc and unc.get("available"):
        d, tt = unc["cooler_duty_W"], unc["oil_temperature_C"]
        urows = [
            "<tr><td>cooler duty [kW]</td>" + "".join(
                _cell(d[k], _num(d[k] / 1e3), None, f"uncertainty_duty_{k}")
                for k in ("P50", "P90", "P95")) + "</tr>",
            "<tr><td>oil temperature, steady without cooler at typical ambient [°C]</td>"
            + "".join(
                _cell(tt[k], f"{tt[k]:.1f}", None, f"uncertainty_oil_{k}")
                for k in ("P50", "P90", "P95")) + "</tr>"]
        parts.append(f"<p class=\"note\">Monte Carlo, {unc['samples']} samples (seed "
                     f"{unc['seed']}), over the scenario's uncertain inputs.</p>")
        parts.append(_table([("", ""), ("P50", "num"), ("P90", "num"), ("P95", "num")], urows,
                            "keep"))
        if unc.get("sensitivity"):
            srows = []
            for s in unc["sensitivity"]:
                sw = s.get("swing")
                srows.append(f"<tr><td><code>{_e(s.get('path'))}</code></td>"
                             + _cell(sw if isinstance(sw, (int, float)) else None,
                                     _num(sw / 1e3) if isinstance(sw, (int, float)) else str(sw))
                             + "</tr>")
            parts.append(_table([("input that moves the duty most", ""),
                                 ("swing of the cooler duty [kW]", "num")], srows, "keep"))
    else:
        parts.append(f"<p class=\"note\">{_e((unc or {}).get('note', 'uncertainty not available'))}"
                     "</p>")
    for n in rec["notes"]:
        parts.append(f'<p class="note">Note: {_e(n)}</p>')
    parts.append(f'<p class="note">{_e(rec["caution"])}</p>')
    return "".join(parts)


# ---------------------------------------------------------------------------
# the report
# ---------------------------------------------------------------------------

def _present_name(cmp, present):
    sc = cmp.scenario
    name = present or sc.economics.present_strategy or cmp.outcomes[0].name
    try:
        return cmp.outcome(name).name
    except KeyError:
        raise HeatloadError(f"unknown present strategy {name!r}; this comparison has "
                            f"{', '.join(o.name for o in cmp.outcomes)}",
                            field="--present") from None


def report_data(scenario, comparison, present=None, prices=None, source=None,
                samples=None, seed=1) -> dict:
    """Everything the report shows, as plain data (also used by the exports)."""
    from heatload import sizing, tables

    data = tables.comparison_dict(comparison, source, with_phases=True)
    present = _present_name(comparison, present)
    best, why, excluded = recommend(data, scenario)
    rec_name = best["label"]
    savings = tables.savings_against(comparison, present)
    pay = payback_rows(data, present, prices)
    o_rec = comparison.outcome(rec_name)
    sz = sizing.size_cooler(scenario, o_rec)
    unc = sizing.cooler_uncertainty(scenario, o_rec.strategy,
                                    samples=samples or sizing.REPORT_SAMPLES, seed=seed)
    return {"data": data, "present": present, "recommended": rec_name, "why": why,
            "excluded": excluded, "savings": savings, "payback": pay, "sizing": sz,
            "cooler": sizing.sizing_record(sz, unc), "uncertainty": unc,
            "assumptions": assumptions(scenario, data)}


def build_report(scenario, comparison, present=None, prices=None, source=None,
                 samples=None, seed=1, prepared=None) -> str:
    """The report as one self-contained HTML document (str).

    Parameters
    ----------
    scenario : heatload.model.Scenario
    comparison : heatload.chain.Comparison
    present : str, optional
        The machine's present circuit; default the scenario's
        ``economics.present_strategy`` or the first strategy.
    prices : dict, optional
        {strategy name: extra price} overriding the scenario's prices.
    source : str, optional
        File name shown in the report.
    samples, seed : int, optional
        Monte Carlo of the cooler duty (default :data:`heatload.sizing.REPORT_SAMPLES`).
    prepared : dict, optional
        A :func:`report_data` result to reuse.

    Returns
    -------
    str
        HTML; plotly.js inline once, no reference to any server.
    """
    from heatload import chain
    from heatload.report_assets import STYLESHEET

    rd = prepared or report_data(scenario, comparison, present, prices, source, samples, seed)
    data, present, rec_name = rd["data"], rd["present"], rd["recommended"]
    recs = {r["label"]: r for r in data["strategies"]}
    best, base = recs[rec_name], recs[present]
    sav = rd["savings"][rec_name]
    cur = data["scenario"]["currency"]
    cooler = rd["cooler"]
    fig = _Figures()

    # --- summary -----------------------------------------------------------------
    if rec_name == present:
        lead = (f"<p>The present circuit, <b>{_e(present)}</b>, is already the best choice for "
                f"this cycle: {_e(rd['why'])}.</p>")
    else:
        lead = (f"<p>For this duty cycle we recommend <b>{_e(rec_name)}</b>: "
                f"{_e(rd['why'])}. Against the present <b>{_e(present)}</b> circuit it saves "
                f"<b>{_grouped(sav['energy_saving_kWh'])} kWh</b> and "
                f"<b>{_grouped(sav['cost_saving'])} {_e(cur)}</b> a year "
                f"({sav['co2_saving_kg'] / 1e3:.2f} t CO₂), and puts "
                f"{_num((base['heat_to_oil_W'] - best['heat_to_oil_W']) / 1e3)} kW less heat "
                f"into the oil.</p>")
    if rd["excluded"]:
        lead += ("<p>Not recommended because of safety-critical warnings: " + "; ".join(
            f"{_e(k)} ({_e(', '.join(v))})" for k, v in rd["excluded"].items()) + ".</p>")
    if cooler["cooler_needed"]:
        spec = cooler["spec"]
        size = ""
        if spec and spec["coolant"] == "air":
            size = (f", an air-oil cooler of {spec['specific_cooling_power_W_K'] / 1e3:.3f} kW/K "
                    f"at an ETD of {spec['etd_K']:.1f} K")
        elif spec:
            size = (f", a water-oil cooler ({_e(spec['arrangement'])}) of UA "
                    f"{spec['required_conductance_W_K'] / 1e3:.3f} kW/K")
        lead += (f"<p>A cooler <b>is needed</b> with {_e(rec_name)}: "
                 f"<b>{_num(cooler['duty_W'] / 1e3)} kW</b> including the "
                 f"{100 * cooler['margin']:.0f} % margin{size}.</p>")
    else:
        lead += (f"<p><b>No cooler is needed</b> with {_e(rec_name)}: the reservoir sheds the "
                 "heat at the design point.</p>")
    pay = next(p for p in rd["payback"] if p["strategy"] == rec_name)
    if rec_name != present:
        if pay["extra_price"] is None:
            lead += ("<p>Payback: no price is known for this circuit (give one with "
                     f"<code>--price {_e(rec_name)}=AMOUNT</code>).</p>")
        elif pay["payback_years"] is not None:
            lead += (f"<p>Its extra price of {_grouped(pay['extra_price'])} {_e(cur)} pays back in "
                     f"<b>{_num(pay['payback_years'], 2)} years</b>.</p>")
    keyfig = (
        '<div class="keyfigures">'
        f'<div class="keyfigure"><div class="label">recommended</div><div class="value">'
        f'{_e(rec_name)}</div></div>'
        f'<div class="keyfigure"><div class="label">energy saving per year</div>'
        f'<div class="value" data-key="energy_saving_kWh" data-value="{sav["energy_saving_kWh"]!r}">'
        f'{_grouped(sav["energy_saving_kWh"])} kWh</div></div>'
        f'<div class="keyfigure"><div class="label">cost saving per year</div>'
        f'<div class="value" data-key="cost_saving" data-value="{sav["cost_saving"]!r}">'
        f'{_grouped(sav["cost_saving"])} {_e(cur)}</div></div>'
        f'<div class="keyfigure"><div class="label">cooler duty</div>'
        f'<div class="value" data-key="cooler_duty_W" data-strategy="{_e(rec_name)}" '
        f'data-value="{best["cooler_duty_W"]!r}">'
        + (f'{_num(best["cooler_duty_W"] / 1e3)} kW' if best["cooler_needed"] else "none")
        + "</div></div></div>")

    # --- figures -----------------------------------------------------------------
    show = [present] if rec_name == present else [present, rec_name]
    energy_fig = fig(energy_bar_figure(data, rec_name, present),
                     "Yearly electric energy bought and mean heat into the oil, at the operating "
                     "oil temperature.")
    sankeys = "".join(fig(sankey_figure(recs[n], f"Where the energy goes: {n} (kJ per cycle)"),
                          "Electric input to useful work and each loss, per cycle. Drive motor "
                          "losses heat the room; all others heat the oil.") for n in show)
    cyc = fig(cycle_figure([recs[n] for n in show], show),
              "Steps per phase, at the operating oil temperature.")
    curves = []
    o_rec = comparison.outcome(rec_name)
    w = chain.shift_profile(scenario, o_rec, cooler_on=False)
    curves.append((f"{rec_name}, no cooler", w.times, w.temperatures, "solid"))
    if o_rec.thermal.cooler_needed:
        wc = chain.shift_profile(scenario, o_rec, cooler_on=True)
        curves.append((f"{rec_name}, with cooler", wc.times, wc.temperatures, "solid"))
    if rec_name != present:
        wp = chain.shift_profile(scenario, comparison.outcome(present), cooler_on=False)
        curves.append((f"{present}, no cooler", wp.times, wp.temperatures, "dash"))
    shift = fig(shift_figure(curves, scenario.fluid.temperature_max - K0,
                             o_rec.thermal.design_oil_temperature - K0),
                f"From a cold start at {scenario.ambient.cold_start_temperature - K0:.0f} °C, "
                f"typical ambient {scenario.ambient.temperature - K0:.0f} °C; the cooler is "
                "switched by its thermostat.")

    # --- payback table -----------------------------------------------------------
    prow = []
    for p in rd["payback"]:
        cls = "recommended" if p["strategy"] == rec_name else ""
        prow.append(f'<tr class="{cls}"><td>{_e(p["strategy"])}</td>'
                    + _cell(p["price"], _grouped(p["price"]), p["strategy"], "price")
                    + _cell(p["extra_price"], _grouped(p["extra_price"]), p["strategy"],
                            "extra_price")
                    + _cell(p["cost_saving_per_year"], _grouped(p["cost_saving_per_year"]),
                            p["strategy"], "cost_saving_per_year")
                    + _cell(p["payback_years"], _num(p["payback_years"], 2)
                            if p["payback_years"] is not None else "–", p["strategy"],
                            "payback_years") + "</tr>")
    payback = _table([("strategy", ""), (f"price [{cur}]", "num"),
                      (f"extra over {present} [{cur}]", "num"),
                      (f"cost saving [{cur}/year]", "num"), ("payback [years]", "num")], prow)

    arow = "".join(f"<tr><td>{_e(a['item'])}</td><td>{_e(a['value'])}</td>"
                   f"<td class=\"note\">{_e(a['source'])}</td></tr>" for a in rd["assumptions"])
    assum = _table([("item", ""), ("value", ""), ("source", "")], [arow])

    sc = data["scenario"]
    meta = (f"{sc['phases']} phases, {sc['hours_per_year']:.0f} h/year, ambient "
            f"{sc['ambient_C']:.0f} °C (design {sc['ambient_max_C']:.0f} °C), electricity "
            f"{sc['electricity_price_per_kWh']:.3f} {_e(cur)}/kWh"
            + (f" — file {_e(Path(sc['file']).name)}" if sc["file"] else ""))
    payload = json.dumps({"comparison": _jsonable(data), "cooler": _jsonable(cooler),
                          "present": present, "recommended": rec_name},
                         ensure_ascii=True, allow_nan=False).replace("</", "<\\/")
    desc = f"<p>{_e(scenario.description)}</p>" if scenario.description else ""
    body = f"""
<header class="title"><h1>{_e(scenario.name)} — heat load and control strategies</h1>
<div class="meta">{meta}</div></header>
<section class="page" id="summary"><h2>Summary</h2>{desc}{keyfig}{lead}
<div class="caution">{_e(CAUTION)}</div></section>
<section class="page" id="comparison"><h2>Strategies compared</h2>
<p>Ranked by yearly electric energy at the operating oil temperature (with the cooler where one is
needed). The recommended row is highlighted.</p>
{comparison_section(data, rec_name, present)}{energy_fig}</section>
<section class="page" id="energy"><h2>Where the energy goes</h2>{sankeys}</section>
<section class="page" id="cycle"><h2>Heat and pressure over the cycle</h2>{cyc}</section>
<section class="page" id="shift"><h2>Oil temperature over a shift</h2>{shift}</section>
<section class="page" id="cooler"><h2>Cooler</h2>{_cooler_html(cooler, rd['sizing'], rd['uncertainty'])}</section>
<section class="page" id="payback"><h2>Payback</h2>
<p>Simple payback = extra price over the present circuit / yearly cost saving. Prices are the
scenario's or given on the command line.</p>{payback}</section>
<section class="page" id="warnings"><h2>Warnings</h2>{_warnings_html(data)}</section>
<section class="page" id="assumptions"><h2>Assumptions and methods</h2>{assum}
<div class="caution">{_e(CAUTION)}</div></section>
<footer>Made with heatload. Figures are estimates from the scenario's inputs and the methods
listed above.</footer>
<script type="application/json" id="heatload-data">{payload}</script>
"""
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
            f"<title>{_e(scenario.name)} — heatload report</title>"
            f"<style>{STYLESHEET}</style></head><body><main>{body}</main></body></html>\n")


def _jsonable(obj):
    if isinstance(obj, dict):
        return {k: _jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_jsonable(v) for v in obj]
    if isinstance(obj, (float, np.floating)):
        return float(obj) if math.isfinite(obj) else None
    if isinstance(obj, np.integer):
        return int(obj)
    if isinstance(obj, np.bool_):
        return bool(obj)
    return obj


# ---------------------------------------------------------------------------
# exports
# ---------------------------------------------------------------------------

def export_names(strategy_names) -> list:
    """Names of the export tables (sheets; CSV files by :func:`_csv_name`) for
    strategies of these names, in the order :func:`export_tables` gives them."""
    return (["strategies", "phase_components"] + [f"phases {n}" for n in strategy_names]
            + ["cooler", "payback", "assumptions"])


def export_tables(scenario, comparison, prepared=None, present=None, prices=None) -> dict:
    """{name: pandas DataFrame} of the spreadsheet and CSV exports: ``strategies``,
    ``phase_components``, ``phases <strategy>`` per strategy, ``cooler``, ``payback``,
    ``assumptions`` (:func:`export_names`)."""
    import pandas as pd
    from heatload import sizing, tables

    rd = prepared
    out = {"strategies": tables.strategy_frame(comparison),
           "phase_components": tables.phase_component_frame(comparison)}
    for o in comparison.outcomes:
        rows = []
        for r in tables.phase_records(o, scenario, comparison.phase_arrays):
            r = dict(r)
            for k, v in r.pop("losses_W").items():
                r[f"loss_{k}_W"] = v
            rows.append(r)
        out[f"phases {o.name}"] = pd.DataFrame(rows)
    crow = []
    for o in comparison.outcomes:
        rec = sizing.sizing_record(sizing.size_cooler(scenario, o, thermostat=False))
        flat = {}
        for k, v in rec.items():
            if k in ("notes", "caution", "rating", "thermostat", "uncertainty"):
                continue
            if isinstance(v, dict):
                for k2, v2 in v.items():
                    if isinstance(v2, dict):
                        for k3, v3 in v2.items():
                            flat[f"{k}_{k2}_{k3}"] = v3
                    else:
                        flat[f"{k}_{k2}"] = v2
            elif v is not None:
                flat[k] = v
        flat["notes"] = "; ".join(rec["notes"])
        crow.append(flat)
    out["cooler"] = pd.DataFrame(crow)
    if rd is not None:
        out["payback"] = pd.DataFrame(rd["payback"])
        out["assumptions"] = pd.DataFrame(rd["assumptions"])
    else:
        present = _present_name(comparison, present)
        data = tables.comparison_dict(comparison)
        out["payback"] = pd.DataFrame(payback_rows(data, present, prices))
        out["assumptions"] = pd.DataFrame(assumptions(scenario))
    names = export_names(o.name for o in comparison.outcomes)
    return {k: out[k] for k in names}


def _sheet_name(name, used):
    # Excel forbids []:*?/\ in a sheet name and 31+ characters; control
    # characters would make the workbook unreadable
    s = re.sub(r"[\[\]:*?/\\]", "-", "".join(c if c.isprintable() else "-" for c in name))
    s = s.strip("'")[:31] or "sheet"
    base, i = s, 2
    while s in used:
        suffix = f" {i}"
        s = base[:31 - len(suffix)] + suffix
        i += 1
    used.add(s)
    return s


def _csv_name(name):
    return (re.sub(r"[^A-Za-z0-9._-]+", "_", name).strip("_.") or "table") + ".csv"


def _csv_targets(directory, names) -> dict:
    d = Path(directory)
    targets = {name: d / _csv_name(name) for name in names}
    if len(set(targets.values())) != len(targets):
        raise HeatloadError("two tables map to the same CSV file name", field="--csv")
    return targets


def check_outputs(output=None, xlsx=None, csv=None, table_names=(), force=False):
    """Refuse every output of ``heatload report`` that cannot be written, before
    anything is computed: wrong extension (``.html``/``.htm``, ``.xlsx``), a
    folder, pipe or device in the way (even with *force*), an existing file
    without *force*."""
    if output is not None:
        outputs.check_output(output, "--output", force=force, suffixes=(".html", ".htm"))
    if xlsx:
        outputs.check_output(xlsx, "--xlsx", force=force, suffixes=(".xlsx",))
        try:
            import openpyxl  # noqa: F401  (the spreadsheet writer)
        except ImportError:
            raise HeatloadError("writing .xlsx needs the 'openpyxl' package "
                                "(pip install openpyxl)", field="--xlsx") from None
    if csv:
        outputs.check_output_folder(csv, "--csv")
        for p in _csv_targets(csv, table_names).values():
            outputs.check_output(p, "--csv", force=force)


def write_html(text, path, force=False):
    """Write the report atomically; refuses to overwrite without *force*."""
    def w(tmp):
        with open(tmp, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
    return outputs.write_atomic(path, w, "--output", force=force)


def write_xlsx(frames, path, force=False):
    """Write {sheet: DataFrame} to an .xlsx workbook (openpyxl via pandas),
    atomically; text that would run as a formula is stored as text."""
    import pandas as pd

    outputs.check_output(path, "--xlsx", force=force, suffixes=(".xlsx",))

    def w(tmp):
        used = set()
        with pd.ExcelWriter(tmp, engine="openpyxl") as xw:
            for name, df in frames.items():
                sheet = _sheet_name(name, used)
                outputs.xlsx_safe(df).to_excel(xw, sheet_name=sheet, index=False)
                outputs.mark_text_cells(xw.sheets[sheet])
    return outputs.write_atomic(path, w, "--xlsx", force=force)


def write_csv(frames, directory, force=False) -> list:
    """Write each table as ``DIR/<name>.csv`` atomically (:func:`heatload.outputs.to_csv`:
    UTF-8, text that would run as a formula with a leading quote); refuses to overwrite any
    existing file without *force* (checked before writing any)."""
    outputs.check_output_folder(directory, "--csv")
    targets = _csv_targets(directory, frames)
    for p in targets.values():
        outputs.check_output(p, "--csv", force=force)
    return [outputs.write_atomic(p, lambda tmp, df=frames[name]: outputs.to_csv(df, tmp),
                                 "--csv", force=force)
            for name, p in targets.items()]


def run_cli(args) -> int:
    """``heatload report [FILE] -o report.html [--xlsx F] [--csv DIR] [--present NAME]
    [--price NAME=AMOUNT ...] [--samples N] [--seed S] [--force]``."""
    from heatload import chain, io

    t0 = time.perf_counter()
    path = args.file or io.default_scenario_path()
    sc = io.load_scenario(path)
    prices = parse_prices(getattr(args, "price", None), sc)
    out = Path(args.output)
    # refuse before computing anything
    check_outputs(out, args.xlsx, args.csv, export_names(st.name for st in sc.strategies),
                  args.force)
    cmp = chain.compare(sc)
    rd = report_data(sc, cmp, args.present, prices, str(path),
                     samples=getattr(args, "samples", None), seed=getattr(args, "seed", 1))
    text = build_report(sc, cmp, prepared=rd)
    write_html(text, out, args.force)
    if args.xlsx or args.csv:
        frames = export_tables(sc, cmp, rd)
        if args.xlsx:
            write_xlsx(frames, args.xlsx, args.force)
        if args.csv:
            write_csv(frames, args.csv, args.force)
    dt = time.perf_counter() - t0
    print(f"wrote {out} ({out.stat().st_size:,} bytes) in {dt:.1f} s"
          + (f"; {args.xlsx}" if args.xlsx else "") + (f"; {args.csv}/" if args.csv else ""))
    print(f"recommended: {rd['recommended']} ({rd['why']})")
    print(CAUTION)
    return 0
