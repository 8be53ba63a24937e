"""A customer report: one self-contained HTML file (charts as inline SVG, no
script library and no request to any server when opened), plus the same
tables as a spreadsheet and as CSV files.

It reads as a deliverable: a cover block (project, customer, prepared by,
date, revision, tool version, the input file's SHA-256), the decision first,
sections that flow in print with page numbers "x of y" (CSS paged media), one
colour per role (present / recommended / others, :mod:`heatload.outputs.report_assets`,
shared with the dashboard), and an appendix of assumptions in the customer's
units.

Every number comes from :mod:`heatload.outputs.tables` records (and, for the cooler,
:func:`heatload.cooling.sizing.sizing_record`), so the report, the spreadsheet and
``heatload compare --json`` agree.  Every output path is checked before
anything is computed, and files are written by the project's one atomic
writer (:func:`heatload.io.files.write_atomic`); an existing file is replaced
only when asked to (``--force``), a folder, pipe or device never.  Text cells
of the exports that a spreadsheet would run as a formula are neutralised
(:mod:`heatload.io.files`).

The recommendation and the rank order are :func:`heatload.decision.decide`'s:
feasible first, then by yearly cost of ownership.
"""

from __future__ import annotations

import html
import json
import math
import re
from pathlib import Path

import numpy as np

from heatload.io import files as outputs
from heatload.outputs import tables
from heatload.errors import HeatloadError
from heatload.outputs.wording import CAUTION, plain_path, severity_counts

K0 = 273.15


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
        from heatload.decision import price_value
        out[st.name] = price_value(amount.strip(), "--price", f"price of {name}")
    return out


def payback_rows(data, present, prices=None) -> list:
    """Per strategy: circuit price, extra price over the present circuit (the
    circuits' difference plus that of the coolers each needs), yearly saving of
    electricity (circuit and cooler fan, :func:`heatload.outputs.tables.running_cost_saving`;
    cooling water is not priced), simple payback (``tables.payback_years``);
    None where a price is unknown."""
    from heatload.outputs import tables

    prices = dict(prices or {})
    price = {r["label"]: prices.get(r["label"], r["price"]) for r in data["strategies"]}
    base = next(r for r in data["strategies"] if r["label"] == present)
    rows = []
    for r in data["strategies"]:
        saving = tables.running_cost_saving(base, r)
        # prices are extra prices over the present circuit: the present one's is 0
        # unless the file gives both on one footing
        p, p0 = price[r["label"]], price[present]
        p0 = 0.0 if p0 is None else p0
        if r["label"] == present:
            p = p0
        extra = ((p - p0) + tables.cooler_price_difference(base, r)
                 if p is not None else None)
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
# figures: inline SVG (heatload.outputs.svgplot), one colour per role
# ---------------------------------------------------------------------------

#: Where each loss of the energy flow ends up: the room (drive motor, converter)
#: or the oil (every other loss).
FLOW_ORDER = ("drive_motor", "converter", "pump", "relief", "flow_control", "bleed",
              "directional_valve", "check_valve", "lines", "counterbalance", "actuator",
              "compression")


def energy_flow_rows(record) -> list:
    """Where the electric energy of one cycle goes: [(label, kJ, "useful" | "room" |
    "oil")], useful work first, then each loss (first law: the sum equals the
    electric input plus any work an overrunning load puts in)."""
    ce = {k: max(0.0, v or 0.0) / 1e3 for k, v in record["component_energy_per_cycle_J"].items()}
    rows = [("useful work", max(record["useful_energy_per_cycle_J"], 0.0) / 1e3, "useful")]
    for k in FLOW_ORDER:
        if k in ce:
            where = "room" if k in ("drive_motor", "converter") else "oil"
            rows.append((LOSS_LABELS[k] + (" (room)" if where == "room" else ""), ce[k], where))
    return rows


def energy_flow_chart(records, names, colours):
    """Electric input, useful work and every loss per cycle [kJ] of the strategies
    *names*, grouped bars drawn to one scale with their numbers."""
    from heatload.outputs.svgplot import grouped_bars

    flows = [energy_flow_rows(r) for r in records]
    keep = [i for i, row in enumerate(flows[0])
            if any(f[i][1] > 1e-6 for f in flows) or row[0] == "useful work"]
    cats = ["electric input"] + [flows[0][i][0] for i in keep]
    series = []
    for name, colour, r, f in zip(names, colours, records, flows):
        series.append((name, colour, [r["electric_energy_per_cycle_J"] / 1e3]
                       + [f[i][1] for i in keep]))
    return grouped_bars(cats, series, "energy per cycle [kJ]",
                        "Where the energy of one cycle goes (one scale)")


def cycle_chart(records, names, colours, dashes=None):
    """Heat into the oil [kW] and pump pressure [bar] over one cycle, phase by phase,
    with the phase names."""
    from heatload.outputs.svgplot import step_chart

    dashes = dashes or [False] * len(names)
    ph = records[0]["phases"]
    heat = [(n, c, d, [p["heat_to_oil_W"] / 1e3 for p in r["phases"]])
            for n, c, d, r in zip(names, colours, dashes, records)]
    pres = [(n, c, d, [p["pump_pressure_Pa"] / 1e5 for p in r["phases"]])
            for n, c, d, r in zip(names, colours, dashes, records)]
    return step_chart([p["duration_s"] for p in ph], [p["phase"] for p in ph],
                      [("heat into oil [kW]", heat), ("pump pressure [bar]", pres)],
                      "Heat and pressure over one cycle")


def motions_section(records, names, system="si") -> str:
    """The phases that move several actuators at once: each motion's flow, inlet
    pressure, speed reached and throttling loss under each shown strategy
    (*records*: ``compare --json`` strategy records); empty text when every
    phase moves one actuator."""
    from heatload.units import format_quantity as fq
    rows = []
    for name, rec in zip(names, records):
        for ph in rec["phases"]:
            if len(ph["motions"]) < 2:
                continue
            for j, mo in enumerate(ph["motions"]):
                target = mo["speed_target"]
                reached = (f"{100 * mo['speed'] / target:.0f} %" if target else "–")
                rows.append("<tr>" + "".join(
                    f"<td>{_e(t)}</td>" for t in ((name, ph["phase"]) if j == 0 else ("", ""))
                    + (mo["actuator"], mo["motion"])) + "".join(
                    f'<td class="num">{_e(t)}</td>' for t in (
                        fq(mo["flow_m3_s"], "flow", system),
                        fq(mo["inlet_pressure_Pa"], "pressure", system), reached,
                        # rounding of the solve (~1e-16 W) shown as the zero it is
                        fq(mo["throttle_loss_W"] if mo["throttle_loss_W"] > 1e-6 else 0.0,
                           "power", system))) + "</tr>")
    if not rows:
        return ""
    return ("<h3>Actuators moving together</h3><p>Phases that move several actuators on "
            "the one supply: each motion's flow, inlet pressure, share of its set speed "
            "and the throttling loss booked on it (its valve takes what the pump "
            "pressure gives beyond its need).</p>"
            + _table([("strategy", ""), ("phase", ""), ("actuator", ""), ("motion", ""),
                      ("flow", "num"), ("inlet pressure", "num"), ("speed / set", "num"),
                      ("throttling", "num")], rows, "motions"))


def _thin(times, temps, limit=400):
    t = np.asarray(times, float).ravel()
    y = np.asarray(temps, float).ravel()
    if t.size <= limit:
        return t, y
    idx = np.unique(np.concatenate([np.linspace(0, t.size - 1, limit).astype(int),
                                    [int(np.argmax(y))]]))
    return t[idx], y[idx]


def shift_chart(curves, limit_C, design_C):
    """Oil temperature [°C] over a shift [h]; *curves* = [(label, times s, temps K,
    colour, dashed)]."""
    from heatload.outputs.report_assets import PALETTE, ROLE_COLOURS
    from heatload.outputs.svgplot import line_chart

    lines = []
    for label, t, y, colour, dash in curves:
        t, y = _thin(t, y)
        lines.append((label, colour, dash, t / 3600.0, y - K0))
    return line_chart(lines, "time from cold start [h]", "oil temperature [°C]",
                      "Oil temperature over a shift",
                      hlines=[(limit_C, f"fluid limit {limit_C:.0f} °C", PALETTE[3]),
                              (design_C, f"design {design_C:.0f} °C", PALETTE[7])])


def cost_chart(data, decision):
    """Yearly cost of ownership of every strategy in rank order, split into
    energy, cooler fan, circuit and cooler; ruled-out strategies greyed with
    the reason."""
    from heatload.outputs.report_assets import role_colour
    from heatload.outputs.svgplot import bar_chart

    cur = data["scenario"]["currency"]
    rows = []
    for v in decision.verdicts:
        c = role_colour(v.name, decision.present, decision.recommended, v.feasible)
        parts = (v.cost.energy, v.cost.fan, v.cost.circuit, v.cost.cooler)
        rows.append({"label": f"{v.rank}. {v.name}", "bold": v.name == decision.recommended,
                     "grey": not v.feasible,
                     "segments": [(x, c, op) for x, op in zip(parts, (1.0, 0.75, 0.5, 0.3))],
                     "note": "" if v.feasible else "ruled out"})
    legend = [("energy", "#5b6675", 1.0), ("cooler fan", "#5b6675", 0.75),
              ("circuit price / year", "#5b6675", 0.5), ("cooler price / year", "#5b6675", 0.3)]
    return bar_chart(rows, f"yearly cost of ownership [{cur}/year]",
                     "Yearly cost of ownership, ranked (green: recommended, orange: present, "
                     "grey: ruled out)", legend=legend, note_width=100)


def _figure(svg, caption=""):
    cap = f'<div class="caption">{html.escape(caption)}</div>' if caption else ""
    return f'<div class="figure">{svg}{cap}</div>'


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

def comparison_section(data, recommended, present, decision=None, system="si"):
    """The ranked comparison table, figures in *system*'s units (each cell's
    ``data-value`` stays the SI figure of ``compare --json``)."""
    from heatload.units import display_unit, from_file, from_si, pretty_unit

    def unit(kind):
        return pretty_unit(display_unit(kind, system))

    def shown(v, kind, digits=3, file_kind=None):
        """*v* (SI, or as the JSON holds it for *file_kind*) as a number in *system*."""
        if v is None:
            return "–"
        return _num(from_si(from_file(v, file_kind), kind, display_unit(kind, system)), digits)
    cur = data["scenario"]["currency"]
    co2 = "t" if system == "si" else unit("mass")
    headers = [("strategy", ""), (f"ownership [{cur}/yr]", "num"), ("energy [kWh/yr]", "num"),
               (f"electricity [{cur}/yr]", "num"),
               (f"CO₂ [{co2}/yr]", "num"), (f"heat to oil, running [{unit('power')}]", "num"),
               (f"oil, no cooler [{unit('temperature')}]", "num"),
               (f"oil, running [{unit('temperature')}]", "num"),
               (f"cooler [{unit('power')}]", "num"), (f"peak [{unit('pressure')}]", "num"),
               ("eff. [%]", "num"), ("warnings", "")]
    rows = []
    for rank, name in enumerate(data["ranking"], 1):
        r = next(x for x in data["strategies"] if x["label"] == name)
        ok = r.get("feasible", True)
        cls = " ".join(c for c, on in (("recommended", name == recommended),
                                       ("present", name == present), ("out", not ok)) if on)
        codes = severity_counts(r["warnings"])
        s = r["label"]
        own = r.get("yearly_cost_total")
        rows.append(
            f'<tr class="{cls}" data-strategy="{_e(s)}"><td>{rank}. {_e(s)}</td>'
            + _cell(own, _grouped(own), s, "yearly_cost_total")
            + _cell(r["electric_energy_per_year_kWh"],
                    _grouped(r["electric_energy_per_year_kWh"]), s, "electric_energy_per_year_kWh")
            + _cell(r["cost_per_year"], _grouped(r["cost_per_year"]), s, "cost_per_year")
            + _cell(r["co2_per_year_kg"], f"{r['co2_per_year_kg'] / 1e3:,.2f}" if system == "si"
                    else shown(r["co2_per_year_kg"], "mass", 4), s, "co2_per_year_kg")
            + _cell(r["heat_to_oil_W"], shown(r["heat_to_oil_W"], "power"), s, "heat_to_oil_W")
            + _cell(r["oil_temperature_steady_C"],
                    shown(r["oil_temperature_steady_C"], "temperature", 3, "temperature"), s,
                    "oil_temperature_steady_C")
            + _cell(r["oil_temperature_operating_C"],
                    shown(r["oil_temperature_operating_C"], "temperature", 3, "temperature"),
                    s, "oil_temperature_operating_C")
            + _cell(r["cooler_duty_W"], shown(r["cooler_duty_W"], "power") if r["cooler_needed"]
                    else "none", s, "cooler_duty_W")
            + _cell(r["peak_pressure_Pa"], shown(r["peak_pressure_Pa"], "pressure"), s,
                    "peak_pressure_Pa")
            + _cell(r["overall_efficiency"], f"{100 * r['overall_efficiency']:.0f}", s,
                    "overall_efficiency")
            + f'<td class="small {"warn" if codes else ""}">{_e(codes or "–")}</td></tr>'
            + ("" if ok else f'<tr class="out reason-row"><td colspan="{len(headers)}">'
               f'<span class="reason">{_e(s)} is {_e(r["reason"])}</span></td></tr>'))
    return _table(headers, rows, "compare")


def _assumption(item, value, source, kind=None, si=None):
    return {"item": item, "value": value, "source": source, "kind": kind,
            "value_si": None if si is None else float(si)}


def assumptions(scenario, data=None, system="si") -> list:
    """Every input and model assumption with its value and source (list of dicts:
    item, value (text in *system*'s units: "si" or "us"), source, kind, value_si)."""
    from heatload import chain, decision, evaluation
    from heatload.properties import oil
    from heatload.paths import resolve_path
    from heatload.hydraulics.strategies import circuit
    from heatload.units import format_quantity as fq

    def q(v, kind, digits=3):
        return fq(v, kind, system, digits)
    sc = scenario
    f, a, r, pu, ec, cd = (sc.fluid, sc.ambient, sc.reservoir, sc.power_unit, sc.economics,
                           sc.cooler)
    t_d = float(evaluation.design_temperature(sc))
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
    A(_assumption("reservoir outside dimensions", f"{q(r.length, 'distance')} x {q(r.width, 'distance')} x "
                  f"{q(r.height, 'distance')}, oil level {100 * r.oil_level:.0f} %", "scenario"))
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
    A(_assumption("pump", f"{p.kind} {p.type}, {q(p.displacement, 'displacement')} at "
                  f"{q(p.shaft_speed, 'shaft_speed')}", "scenario"))
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
        A(_assumption(label, f"{q(ln.length, 'distance')}, ID {q(ln.inner_diameter, 'length')}, "
                      f"K {ln.fittings_k:.1f}", "scenario; Darcy-Weisbach, Colebrook"))
    for st in sc.strategies:
        sp = st.parameters
        bits = circuit(st.kind).settings_text(sp, q)
        if sp.counterbalance_setting:
            bits += f", counterbalance {q(sp.counterbalance_setting, 'pressure')}"
        A(_assumption(f"strategy {st.name}", bits, "scenario or typical value (common practice)"))
    A(_assumption("operating hours", f"{ec.hours_per_year:.0f} h/year", "scenario",
                  "dimensionless", ec.hours_per_year))
    A(_assumption("electricity price", f"{ec.electricity_price * 3.6e6:.3f} {ec.currency}/kWh",
                  "scenario"))
    A(_assumption("grid CO₂ factor", f"{ec.grid_co2_factor * 3.6e6:.3f} kg/kWh", "scenario"))
    A(_assumption("service life and interest (prices annualised)",
                  f"{ec.service_life:g} years at {100 * ec.interest_rate:g} %/year, capital "
                  f"recovery factor "
                  f"{float(decision.capital_recovery_factor(ec.interest_rate, ec.service_life)):.4f}",
                  "scenario or default; annuity method"))
    fixed, per_kw = decision.cooler_prices(cd)
    A(_assumption("cooler price", f"{fixed:,.0f} {ec.currency} + {per_kw:,.0f} {ec.currency}/kW "
                  "of duty", "scenario" if cd.price_fixed is not None and cd.price_per_kW
                  is not None else "default (common practice)"))
    A(_assumption("cooler fan power", f"{100 * (cd.fan_power_fraction if cd.fan_power_fraction is not None else decision.DEFAULT_FAN_POWER_FRACTION):.1f} % of the duty, on "
                  "for the share of the time the load needs it", "scenario" if
                  cd.fan_power_fraction is not None else "default (common practice)"))
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
    if sc.heat_calibration != 1.0:
        from heatload.outputs.wording import calibration_note
        A(_assumption("heat calibration (measured / model heat)",
                      f"× {sc.heat_calibration:.3g} on every strategy's heat into the oil",
                      "scenario (heat_calibration, from a temperature log: heatload logfit); "
                      + calibration_note(sc.heat_calibration), "dimensionless",
                      sc.heat_calibration))
    for u in sc.uncertainty:
        kind = None if u.relative else resolve_path(sc, u.path).kind
        span = (f"x {u.low:g} .. {u.high:g} of the nominal" if u.relative
                else f"{u.low:g} .. {u.high:g} (SI)" if kind is None   # cylinders and motors
                else f"{q(u.low, kind)} .. {q(u.high, kind)}")
        A(_assumption(f"uncertain: {plain_path(u.path, sc)} ({u.path})",
                      f"{u.distribution}, {span}", "scenario"))
    for name, src in METHODS:
        A(_assumption(f"method: {name}", "", src))
    return out


def _warnings_html(data, system="si"):
    """Per strategy in rank order: its warnings in plain sentences grouped by
    severity, then each one with its figures in *system*'s units (the code
    only as a data attribute, never as text)."""
    from heatload.outputs.wording import customer_warnings, warning_text

    order = {n: i for i, n in enumerate(data.get("ranking") or [])}
    parts = []
    for r in sorted(data["strategies"], key=lambda r: order.get(r["label"], len(order))):
        if not r["warnings"]:
            continue
        groups = "".join(
            f"<p class=\"severity\"><b>{_e(head)}</b></p><ul>" + "".join(
                f"<li>{_e(text)} <span class=\"note\">({_e(', '.join(ph))})</span></li>"
                for text, ph in items) + "</ul>"
            for head, items in customer_warnings(r["warnings"]))
        detail = "".join(
            f'<li data-code="{_e(w["code"])}" data-severity="{_e(w.get("severity", ""))}">'
            f"{_e(warning_text(w, system, with_phase=True))}</li>" for w in r["warnings"])
        parts.append(f'<div class="warnings keep" data-strategy="{_e(r["label"])}">'
                     f"<h3>{_e(r['label'])}</h3>{groups}"
                     f'<p class="note">In detail:</p><ul class="warnings small">{detail}</ul></div>')
    return "".join(parts) or "<p>No warnings.</p>"


def _cooler_html(rec, sz, unc, system="si"):
    """The cooler section, its figures in *system*'s units (the water options'
    table in SI)."""
    from heatload.cooling import sizing as sizing_mod
    from heatload.units import format_quantity

    def fq(v, kind, digits=3):
        return format_quantity(v, kind, system, digits)

    def deg(c):     # a temperature the record holds in °C
        return format_quantity(c + 273.15, "temperature", system, decimals=1)

    from heatload.units import display_unit, from_si, pretty_unit

    def unit(kind):
        return pretty_unit(display_unit(kind, system))

    def num(v, kind, digits=3):     # an SI value as a number in *system*'s unit
        return _num(from_si(v, kind, display_unit(kind, system)), digits)

    parts = [f"<p>Design point for <b>{_e(rec['strategy'])}</b>: highest ambient "
             f"{deg(rec['design_ambient_C'])}, oil held at {deg(rec['design_oil_temperature_C'])}. "
             f"Heat into the oil {fq(rec['design_heat_W'], 'power')}, the reservoir's surfaces shed "
             f"{fq(rec['surfaces_heat_W'], 'power')}.</p>"]
    if not rec["cooler_needed"]:
        parts.append("<p><b>No cooler is needed</b> at the design point.</p>")
    rows = sizing_mod.spec_rows(sz, system)
    if rows:
        parts.append('<table class="keep"><thead><tr><th>spec sheet item</th><th class="num">'
                     'value</th></tr></thead><tbody>' + "".join(
                         f'<tr><td>{_e(k)}</td><td class="num">{_e(v)}</td></tr>'
                         for k, v in rows) + "</tbody></table>")
    if rec["air"] and rec["coolant"] != "air":
        a = rec["air"]
        parts.append(f"<p>Air-oil alternative: {fq(a['specific_cooling_power_W_K'], 'thermal_conductance')}"
                     f" at ETD {fq(a['etd_K'], 'temperature_difference')}, air "
                     f"{fq(a['air_mass_flow_kg_s'], 'mass_flow')}.</p>")
    if rec["water"]:
        wrows = []
        for arr, w in rec["water"].items():
            wrows.append(f"<tr><td>{_e(arr)}</td>"
                         + _cell(w["required_conductance_W_K"],
                                 num(w["required_conductance_W_K"], "thermal_conductance"))
                         + _cell(w["ntu"], f"{w['ntu']:.3f}")
                         + _cell(w["effectiveness"], f"{w['effectiveness']:.3f}")
                         + _cell(w["water_volume_flow_m3_s"],
                                 num(w["water_volume_flow_m3_s"], "flow"))
                         + _cell(w["water_outlet_temperature_C"],
                                 num(w["water_outlet_temperature_C"] + 273.15, "temperature"))
                         + "</tr>")
        parts.append("<h3>Water-oil options</h3>" + _table(
            [("arrangement", ""), (f"UA [{unit('thermal_conductance')}]", "num"),
             ("NTU [-]", "num"), ("effectiveness [-]", "num"),
             (f"water [{unit('flow')}]", "num"), (f"water out [{unit('temperature')}]", "num")],
            wrows, "keep"))
    if rec["rating"]:
        r = rec["rating"]
        parts.append(f"<p>Rating check: {fq(r['rated_duty_W'], 'power')} at ETD "
                     f"{fq(r['rated_etd_K'], 'temperature_difference')} gives "
                     f"{fq(r['duty_at_design_W'], 'power')} at the design ETD "
                     f"{fq(r['design_etd_K'], 'temperature_difference')} — "
                     f"{'enough' if r['suffices'] else 'not enough'}.</p>")
    t = rec.get("thermostat")
    if t and rec["cooler_needed"]:
        which = (f"the cooler ({_e(t['cooler'])}, by its datasheet curve)" if t.get("cooler")
                 else "the cooler")
        parts.append(f"<p>With a thermostat (on at {deg(t['on_temperature_C'])}, hysteresis "
                     f"{fq(t['hysteresis_K'], 'temperature_difference', 2)}) {which} switches on "
                     f"{tables.times(t['switch_count'])} "
                     f"in {sizing_mod.shift_words(t['shift_duration_s'])} and runs "
                     f"{100 * t['on_fraction']:.0f} % of the time; the oil peaks at "
                     f"{deg(t['max_temperature_C'])}.</p>")
    parts.append("<h3>Uncertainty</h3>")
    if unc and unc.get("available"):
        d, tt = unc["cooler_duty_W"], unc["oil_temperature_C"]
        urows = [
            f"<tr><td>cooler duty [{unit('power')}]</td>" + "".join(
                _cell(d[k], num(d[k], "power"), None, f"uncertainty_duty_{k}")
                for k in ("P50", "P90", "P95")) + "</tr>",
            "<tr><td>oil temperature, steady without cooler at typical ambient "
            f"[{unit('temperature')}]</td>" + "".join(
                _cell(tt[k], num(tt[k] + 273.15, "temperature", 4), None,
                      f"uncertainty_oil_{k}")
                for k in ("P50", "P90", "P95")) + "</tr>"]
        parts.append(f"<p class=\"note\">Monte Carlo, {unc['samples']:,} samples (seed "
                     f"{unc['seed']}), over the scenario's uncertain inputs.</p>")
        for note in unc.get("truncation_notes", ()):
            parts.append(f"<p class=\"note\">{_e(note)}</p>")
        parts.append(_table([("", ""), ("P50", "num"), ("P90", "num"), ("P95", "num")], urows,
                            "keep"))
        if unc.get("sensitivity"):
            srows = []
            for s in unc["sensitivity"]:
                sw = s.get("cooler_duty_swing_W")
                path = str(s.get("path"))
                srows.append(f'<tr><td title="{_e(path)}">{_e(plain_path(path))} '
                             f'<span class="note">({_e(path)})</span></td>'
                             + _cell(sw if isinstance(sw, (int, float)) else None,
                                     num(sw, "power") if isinstance(sw, (int, float))
                                     else str(sw))
                             + "</tr>")
            parts.append(_table([("input that moves the duty most", ""),
                                 (f"swing of the cooler duty [{unit('power')}]", "num")],
                                srows, "keep"))
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


def input_fingerprint(source=None, scenario=None):
    """SHA-256 of the input: the bytes of the scenario file, or, for a scenario
    made in memory (the dashboard), of its canonical TOML text."""
    import hashlib

    if source and Path(source).is_file():
        return hashlib.sha256(Path(source).read_bytes()).hexdigest()
    if scenario is not None:
        from heatload import io
        return hashlib.sha256(io.dumps_scenario(scenario).encode("utf-8")).hexdigest()
    return None


def tool_version():
    """The installed heatload version."""
    try:
        from importlib.metadata import version
        return version("heatload")
    except Exception:  # noqa: BLE001  (a source checkout without metadata)
        import heatload
        return getattr(heatload, "__version__", "unknown")


def cover_data(scenario, source=None, cover=None) -> dict:
    """The cover block: project, customer, prepared by, date, revision (the
    scenario's ``[scenario]`` keys, overridden by *cover*), tool version, input
    file name and SHA-256."""
    import datetime

    c = {"project": scenario.project or scenario.name, "customer": scenario.customer,
         "prepared_by": scenario.prepared_by, "revision": scenario.revision or "A",
         "date": datetime.date.today().isoformat()}
    c["tool"] = f"heatload {tool_version()}"
    c["input"] = Path(source).name if source else "(made in the dashboard)"
    c["sha256"] = input_fingerprint(source, scenario)
    for k, v in (cover or {}).items():
        if v and k != "sha256":
            c[k] = str(v)
    if cover and cover.get("date"):
        try:   # a date a customer reads must be a real one (ISO 8601, YYYY-MM-DD)
            datetime.date.fromisoformat(str(cover["date"]))
        except ValueError:
            raise HeatloadError(f"expected a date such as 2026-12-03 (ISO 8601), got "
                                f"{str(cover['date'])[:40]!r}", field="--date") from None
    return c


def report_data(scenario, comparison, present=None, prices=None, source=None,
                samples=None, seed=1, cover=None, system="si") -> dict:
    """Everything the report shows, as plain data (also used by the exports).

    The recommendation and the rank order are :func:`heatload.decision.decide`'s."""
    from heatload import decision as decision_mod
    from heatload.cooling import sizing
    from heatload.outputs import tables

    present = _present_name(comparison, present)
    dec = comparison.decision(present, prices)
    data = tables.comparison_dict(comparison, source, with_phases=True, present=present,
                                  prices=prices)
    rec_name = dec.best.name
    savings = tables.savings_against(comparison, present)
    pay = payback_rows(data, present, prices)
    o_rec = comparison.outcome(rec_name)
    sz = sizing.size_cooler(scenario, o_rec, strict=False)
    unc = sizing.cooler_uncertainty(scenario, o_rec.strategy,
                                    samples=samples or sizing.REPORT_SAMPLES, seed=seed)
    rec = sizing.sizing_record(sz, unc)
    quote = None
    if rec["cooler_needed"]:
        q, basis, covered = decision_mod.quoted_duty(
            rec["duty_W"], rec["margin"], unc.get("cooler_duty_W") if unc.get("available")
            else None, system)
        quote = {"duty_W": q, "basis": basis, "margin_covers": covered}
    excluded = {v.name: sorted({c for c, _ in v.blocking}) for v in dec.verdicts
                if not v.feasible}
    return {"data": data, "present": present, "recommended": rec_name,
            "feasible": dec.recommended is not None, "decision": dec,
            "why": dec.best.reason, "excluded": excluded, "savings": savings,
            "payback": pay, "sizing": sz, "cooler": rec, "uncertainty": unc,
            "quote": quote, "cover": cover_data(scenario, source, cover), "system": system,
            "assumptions": assumptions(scenario, data, system)}


def _cover_html(c):
    rows = [("project", c["project"]), ("customer", c["customer"] or "–"),
            ("prepared by", c["prepared_by"] or "–"), ("date", c["date"]),
            ("revision", c["revision"]), ("tool", c["tool"]), ("input file", c["input"]),
            ("input SHA-256", c["sha256"] or "–")]
    cells = "".join(f'<tr><th>{_e(k)}</th><td{" class=sha" if k == "input SHA-256" else ""}>'
                    f"{_e(v)}</td></tr>" for k, v in rows)
    return f'<table class="cover" id="cover">{cells}</table>'


def build_report(scenario, comparison, present=None, prices=None, source=None,
                 samples=None, seed=1, prepared=None, cover=None, system="si") -> str:
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
        The scenario file (name and SHA-256 on the cover).
    samples, seed : int, optional
        Monte Carlo of the cooler duty (default :data:`heatload.cooling.sizing.REPORT_SAMPLES`).
    prepared : dict, optional
        A :func:`report_data` result to reuse.
    cover : dict, optional
        project, customer, prepared_by, date, revision overriding the scenario's.
    system : str, optional
        "si" or "us": units of the assumptions appendix.

    Returns
    -------
    str
        HTML with its charts as inline SVG: no script library, no reference to
        any server.
    """
    from heatload import chain
    from heatload.outputs.report_assets import ROLE_COLOURS, STYLESHEET, role_colour

    rd = prepared or report_data(scenario, comparison, present, prices, source, samples, seed,
                                 cover, system)
    from heatload.units import format_quantity as fq
    system = rd.get("system", "si")
    data, present, rec_name = rd["data"], rd["present"], rd["recommended"]
    dec = rd["decision"]
    recs = {r["label"]: r for r in data["strategies"]}
    best, base = recs[rec_name], recs[present]
    sav = rd["savings"][rec_name]
    cur = data["scenario"]["currency"]
    cooler = rd["cooler"]

    # --- summary -----------------------------------------------------------------
    lead = f'<p class="decision" id="decision-sentence"><b>{_e(dec.sentence())}</b></p>'
    if rec_name != present:
        lead += (f"<p>Against the present <b>{_e(present)}</b> circuit, {_e(rec_name)} saves "
                 f"<b>{_grouped(sav['energy_saving_kWh'])} kWh</b> of electricity a year "
                 f"({_grouped(sav['cost_saving'])} {_e(cur)}, "
                 f"{sav['co2_saving_kg'] / 1e3:.2f} t CO₂) and puts "
                 f"{fq(base['heat_to_oil_W'] - best['heat_to_oil_W'], 'power', system)} less "
                 f"heat into the oil.</p>")
    if rd["excluded"]:
        lead += ("<p>Ruled out: " + "; ".join(
            f"<b>{_e(v.name)}</b> — {_e(v.reason[5:] if v.reason.startswith('out: ') else v.reason)}"
            for v in dec.verdicts if not v.feasible) + ".</p>")
    if cooler["cooler_needed"]:
        spec = cooler["spec"]
        size = ""
        if spec:
            from heatload.cooling.cooler_types import cooler_type
            size = ", " + _e(cooler_type(spec["coolant"]).summary(spec, system))
        lead += (f"<p>A cooler <b>is needed</b> with {_e(rec_name)}: "
                 f"<b>{fq(cooler['duty_W'], 'power', system)}</b> including the "
                 f"{100 * cooler['margin']:.0f} % margin{size}.</p>")
        lead += _quote_html(rd)
    else:
        lead += (f"<p><b>No cooler is needed</b> with {_e(rec_name)}: the reservoir sheds the "
                 "heat at the design point.</p>")
    pay = next(p for p in rd["payback"] if p["strategy"] == rec_name)
    if rec_name != present:
        if pay["extra_price"] is None:
            lead += ("<p>Payback: no price is known for this circuit (give one with "
                     f"<code>--price {_e(rec_name)}=AMOUNT</code>).</p>")
        elif pay["payback_years"] is not None:
            lead += (f"<p>Its extra price of {_grouped(pay['extra_price'])} {_e(cur)} (circuit "
                     "and cooler) pays back in "
                     f"<b>{_num(pay['payback_years'], 2)} years</b> from the electricity "
                     "saved (circuit and cooler fan).</p>")
    keyfig = (
        '<div class="keyfigures">'
        f'<div class="keyfigure"><div class="label">recommended</div><div class="value">'
        f'{_e(rec_name)}</div></div>'
        f'<div class="keyfigure"><div class="label">cost of ownership saved per year</div>'
        f'<div class="value" data-key="ownership_saving" data-value="{dec.saving()!r}">'
        f'{_grouped(dec.saving())} {_e(cur)}</div></div>'
        f'<div class="keyfigure"><div class="label">energy saving per year</div>'
        f'<div class="value" data-key="energy_saving_kWh" data-value="{sav["energy_saving_kWh"]!r}">'
        f'{_grouped(sav["energy_saving_kWh"])} kWh</div></div>'
        f'<div class="keyfigure"><div class="label">electricity cost saving per year</div>'
        f'<div class="value" data-key="cost_saving" data-value="{sav["cost_saving"]!r}">'
        f'{_grouped(sav["cost_saving"])} {_e(cur)}</div></div>'
        f'<div class="keyfigure"><div class="label">cooler duty</div>'
        f'<div class="value" data-key="cooler_duty_W" data-strategy="{_e(rec_name)}" '
        f'data-value="{best["cooler_duty_W"]!r}">'
        + (fq(best["cooler_duty_W"], "power", system) if best["cooler_needed"] else "none")
        + "</div></div></div>")

    # --- figures -----------------------------------------------------------------
    show = [present] if rec_name == present else [present, rec_name]
    colours = [role_colour(n, present, rec_name) for n in show]
    cost_fig = _figure(cost_chart(data, dec),
                       "Electricity of the circuit and of the cooler's fan, and the extra "
                       "price of the circuit and of its cooler spread over the service life "
                       "(capital recovery). Ruled-out circuits are grey.")
    flow = _figure(energy_flow_chart([recs[n] for n in show], show, colours),
                   "Electric input, useful work and each loss per cycle, every bar on one "
                   "scale. Drive motor and converter losses heat the room; all others heat "
                   "the oil.")
    cyc = _figure(cycle_chart([recs[n] for n in show], show, colours,
                              [n == present and n != rec_name for n in show]),
                  "Steps per phase, at the operating oil temperature; phases numbered in "
                  "cycle order.")
    motions = motions_section([recs[n] for n in show], show, rd.get("system", "si"))
    curves = []
    o_rec = comparison.outcome(rec_name)
    c_rec, c_pre = ROLE_COLOURS["recommended"], ROLE_COLOURS["present"]
    w = chain.shift_profile(scenario, o_rec, cooler_on=False)
    curves.append((f"{rec_name}, no cooler", w.times, w.temperatures, c_rec,
                   bool(o_rec.thermal.cooler_needed)))
    if o_rec.thermal.cooler_needed:
        wc = chain.shift_profile(scenario, o_rec, cooler_on=True)
        curves.append((f"{rec_name}, with cooler", wc.times, wc.temperatures, c_rec, False))
    if rec_name != present:
        wp = chain.shift_profile(scenario, comparison.outcome(present), cooler_on=False)
        curves.append((f"{present}, no cooler", wp.times, wp.temperatures, c_pre, True))
    shift = _figure(shift_chart(curves, scenario.fluid.temperature_max - K0,
                                o_rec.thermal.design_oil_temperature - K0),
                    f"From a cold start at "
                    f"{fq(scenario.ambient.cold_start_temperature, 'temperature', system, decimals=0)}, "
                    f"typical ambient "
                    f"{fq(scenario.ambient.temperature, 'temperature', system, decimals=0)}; "
                    f"the cooler is "
                    "switched by its thermostat.")

    # --- payback and cost of ownership ---------------------------------------------
    prow = []
    for p in rd["payback"]:
        v = dec.verdict(p["strategy"])
        cls = "recommended" if p["strategy"] == rec_name else ("out" if not v.feasible else "")
        prow.append(f'<tr class="{cls}"><td>{_e(p["strategy"])}</td>'
                    + _cell(p["price"], _grouped(p["price"]), p["strategy"], "price")
                    + _cell(v.cost.cooler_price, _grouped(v.cost.cooler_price), p["strategy"],
                            "cooler_price")
                    + _cell(p["extra_price"], _grouped(p["extra_price"]), p["strategy"],
                            "extra_price")
                    + _cell(v.cost.total, _grouped(v.cost.total), p["strategy"],
                            "yearly_cost_total")
                    + _cell(p["cost_saving_per_year"], _grouped(p["cost_saving_per_year"]),
                            p["strategy"], "cost_saving_per_year")
                    + _cell(p["payback_years"], _num(p["payback_years"], 2)
                            if p["payback_years"] is not None else "–", p["strategy"],
                            "payback_years") + "</tr>")
    payback = _table([("strategy", ""), (f"circuit price [{cur}]", "num"),
                      (f"cooler price [{cur}]", "num"),
                      (f"extra price vs {present}, circuit + cooler [{cur}]", "num"),
                      (f"cost of ownership [{cur}/year]", "num"),
                      (f"electricity saved vs {present}, circuit + cooler fan "
                       f"[{cur}/year]", "num"),
                      ("simple payback [years]", "num")], prow)
    notes = "".join(f'<p class="note">Note: {_e(n)}.</p>' for n in dec.notes)

    inputs = [a for a in rd["assumptions"] if not a["item"].startswith("method: ")]
    methods = [a for a in rd["assumptions"] if a["item"].startswith("method: ")]
    arow = "".join(f"<tr><td>{_e(a['item'])}</td><td>{_e(a['value'])}</td>"
                   f"<td class=\"note\">{_e(a['source'])}</td></tr>" for a in inputs)
    mrow = "".join(f"<tr><td>{_e(a['item'][len('method: '):])}</td>"
                   f"<td>{_e(a['source'])}</td></tr>" for a in methods)
    assum = (_table([("item", ""), ("value", ""), ("source", "")], [arow])
             + "<h3>Methods</h3>" + _table([("step", ""), ("method, standard or source", "")],
                                           [mrow], "methods"))

    sc = data["scenario"]
    meta = (f"{sc['phases']} phases, {sc['hours_per_year']:,.0f} h/year, ambient "
            f"{fq(sc['ambient_C'] + 273.15, 'temperature', system, decimals=0)} (design "
            f"{fq(sc['ambient_max_C'] + 273.15, 'temperature', system, decimals=0)}), electricity "
            f"{sc['electricity_price_per_kWh']:.3f} {_e(cur)}/kWh")
    payload = json.dumps({"comparison": _jsonable(data), "cooler": _jsonable(cooler),
                          "present": present, "recommended": rec_name,
                          "cover": rd["cover"], "quote": rd["quote"]},
                         ensure_ascii=True, allow_nan=False).replace("<", "\\u003c")
    # every "<" escaped: no "</script" or "<!--" inside the data block can change how
    # the page parses (JSON reads \u003c back as "<")
    desc = f"<p>{_e(scenario.description)}</p>" if scenario.description else ""
    unit_word = "US customary" if rd.get("system") == "us" else "SI"
    from heatload.outputs.wording import calibration_note
    note = calibration_note(scenario.heat_calibration)
    calibrated = f'<p class="note" id="heat-calibration">{_e(note)}</p>' if note else ""
    body = f"""
<header class="title"><h1>{_e(scenario.name)} — heat load and control strategies</h1>
<div class="meta">{meta}</div>{_cover_html(rd['cover'])}</header>
<section id="summary"><h2>1 Decision</h2>{lead}{keyfig}{desc}{calibrated}
<div class="caution">{_e(CAUTION)}</div></section>
<section id="comparison"><h2>2 Strategies compared</h2>
<p>Ranked by the decision rule: circuits that can do the job first, then by yearly cost of
ownership. The recommended row is highlighted; ruled-out rows are grey.</p>
{comparison_section(data, rec_name, present, dec, rd.get("system", "si"))}{cost_fig}</section>
<section id="energy"><h2>3 Where the energy goes</h2>{flow}</section>
<section id="cycle"><h2>4 Heat and pressure over the cycle</h2>{cyc}{motions}</section>
<section id="shift"><h2>5 Oil temperature over a shift</h2>{shift}</section>
<section id="cooler"><h2>6 Cooler</h2>{_cooler_html(cooler, rd['sizing'], rd['uncertainty'], system)}</section>
<section id="payback"><h2>7 Cost of ownership and payback</h2>
<p>Yearly cost of ownership = electricity of the circuit and of the cooler's fan + (circuit price
+ cooler price) x the capital recovery factor over the service life. Simple payback = extra price
over the present circuit (the circuits' price difference plus that of the coolers each needs) /
yearly saving of electricity (the circuit's and the cooler fan's). Cooling water is not counted:
the scenario gives no water price. Prices are the scenario's or given on the
command line.</p>{payback}{notes}</section>
<section id="warnings"><h2>8 Warnings</h2>{_warnings_html(data, rd.get("system", "si"))}</section>
<section id="assumptions" class="appendix"><h2>Appendix: assumptions and methods ({unit_word}
units)</h2>{assum}
<div class="caution">{_e(CAUTION)}</div></section>
<footer>Made with {_e(rd['cover']['tool'])}. Figures are estimates from the scenario's inputs
and the methods listed above.</footer>
<script type="application/json" id="heatload-data">{payload}</script>
"""
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
            f"<title>{_e(scenario.name)} — heatload report</title>"
            f"<style>{STYLESHEET}</style></head><body><main>{body}</main></body></html>\n")


def _quote_html(rd):
    from heatload.units import format_quantity
    system = rd.get("system", "si")
    q = rd["quote"]
    unc = rd["uncertainty"] or {}
    spec = rd["cooler"].get("spec") or {}
    line = (f'<p class="quote" id="quote-duty"><b>Quote this duty: '
            f'{format_quantity(q["duty_W"], "power", system)}</b> — {_e(q["basis"])}.')
    kwk = unc.get("specific_cooling_power_W_K") if unc.get("available") else None
    if spec.get("coolant") == "air" and kwk:
        def g(v):
            return format_quantity(v, "thermal_conductance", system)
        line += (f" Specific cooling power at the ETD: {g(spec['specific_cooling_power_W_K'])}"
                 f" nominal; over the uncertain inputs (the hottest day among them) "
                 f"P50 {g(kwk['P50'])}, P90 {g(kwk['P90'])}, P95 {g(kwk['P95'])}.")
    return line + "</p>"


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
    from heatload.cooling import sizing
    from heatload.outputs import tables

    rd = prepared
    out = {"strategies": tables.strategy_frame(comparison),
           "phase_components": tables.phase_component_frame(comparison)}
    for o in comparison.outcomes:
        rows = []
        for r in tables.phase_records(o, scenario, comparison.phase_arrays):
            r = dict(r)
            for k, v in r.pop("losses_W").items():
                r[f"loss_{k}_W"] = v
            # a cell holds one value: the actuators as text; each motion's
            # figures are in compare --json (and the report's phase table)
            r.pop("motions")
            r["actuators"] = ", ".join(r["actuators"])
            rows.append(r)
        out[f"phases {o.name}"] = pd.DataFrame(rows)
    crow = []
    for o in comparison.outcomes:
        rec = sizing.sizing_record(sizing.size_cooler(scenario, o, thermostat=False,
                                                      strict=False))
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
        if Path(csv).is_dir():      # (a folder still to be made holds no file)
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
    """Write each table as ``DIR/<name>.csv`` atomically (:func:`heatload.io.files.to_csv`:
    UTF-8, text that would run as a formula with a leading quote); refuses to overwrite any
    existing file without *force* (checked before writing any)."""
    outputs.check_output_folder(directory, "--csv")
    Path(directory).mkdir(exist_ok=True)    # the --csv folder itself, in an existing one
    targets = _csv_targets(directory, frames)
    for p in targets.values():
        outputs.check_output(p, "--csv", force=force)
    return [outputs.write_atomic(p, lambda tmp, df=frames[name]: outputs.to_csv(df, tmp),
                                 "--csv", force=force)
            for name, p in targets.items()]
