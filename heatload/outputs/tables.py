"""Results as plain data: the one place the command line's JSON, the report
and the spreadsheet export take their numbers from, so they always agree.

Keys carry their SI unit as a suffix (``_W``, ``_J``, ``_Pa``, ``_C`` ...).
"""

from __future__ import annotations

import math

import numpy as np


K0 = 273.15


def _f(x):
    """A JSON-safe float (None for NaN/inf)."""
    if x is None:
        return None
    v = float(x)
    return v if math.isfinite(v) else None


def _loss_components():
    # the solvers are imported on use: the command line's text helpers below
    # load this module for `check` and `--help` too
    from heatload.hydraulics.circuits import LOSS_COMPONENTS
    return LOSS_COMPONENTS


def phase_records(outcome, scenario, pa) -> list:
    """Per-phase results of one strategy as dicts (SI, unit-suffixed keys)."""
    from heatload.hydraulics.energy import cap_rod_pressures
    r = outcome.circuit
    cap, rod = cap_rod_pressures(r, pa["extending"])
    out = []
    for i, ph in enumerate(scenario.phases):
        rec = {
            "phase": ph.name, "actuator": ph.actuator, "motion": ph.motion,
            "duration_s": _f(r.duration[i]),
            "pump_pressure_Pa": _f(r.pump_pressure[i]),
            "cap_pressure_Pa": _f(cap[i]), "rod_pressure_Pa": _f(rod[i]),
            "pump_flow_m3_s": _f(r.pump_flow[i]),
            "actuator_flow_m3_s": _f(r.actuator_flow[i]),
            "relief_flow_m3_s": _f(r.relief_flow[i]),
            "bleed_flow_m3_s": _f(r.bleed_flow[i]),
            "speed_target": _f(r.speed_target[i]), "speed": _f(r.speed[i]),
            "speed_unit": "rev/s" if _is_motor(scenario, ph) else "m/s",
            "pump_shaft_speed_rps": _f(r.pump_shaft_speed[i]),
            "electric_power_W": _f(r.electric_power[i]),
            "useful_power_W": _f(r.useful_power[i]),
            "heat_to_oil_W": _f(r.heat_to_oil[i]),
            "losses_W": {k: _f(r.losses[k][i]) for k in _loss_components()},
            "stalled": bool(r.stalled[i]), "flow_limited": bool(r.flow_limited[i]),
            "runaway": bool(r.runaway[i]),
        }
        if r.stored_power is not None:
            # an accumulator's gas: put in (+) or given back (-); each phase closes
            # electric = useful + losses + stored
            rec["stored_power_W"] = _f(r.stored_power[i])
        rec["actuators"] = list(ph.actuators)
        rec["motions"] = motion_records(r, scenario, i)
        out.append(rec)
    return out


def motion_records(r, scenario, i) -> list:
    """Each actuator's figures in phase *i* of a solved result: its own motion
    first, then its simultaneous ones (SI, unit-suffixed keys; an idle phase
    has none).  ``throttle_loss_W`` is its flow control's (or, where the pump
    serves a heavier motion, its valve's) throttling, Q dp."""
    from heatload.hydraulics.circuits import MOTION_FIGURES, MOTION_LOSSES
    ph = scenario.phases[i]
    if not ph.actuator:
        return []
    names = {"flow": "flow_m3_s", "outlet_flow": "outlet_flow_m3_s",
             "inlet_pressure": "inlet_pressure_Pa", "outlet_pressure": "outlet_pressure_Pa",
             "speed": "speed", "speed_target": "speed_target",
             "throttle_drop": "throttle_drop_Pa", "useful_power": "useful_power_W"}
    if r.motions is None:
        # one actuator: the phase's figures are its own (the valve's centre
        # flow moves no actuator: it is in no moving phase)
        own = {"flow": r.actuator_flow, "outlet_flow": r.outlet_flow,
               "inlet_pressure": r.inlet_pressure, "outlet_pressure": r.outlet_pressure,
               "speed": r.speed, "speed_target": r.speed_target,
               "throttle_drop": r.throttle_drop, "useful_power": r.useful_power}
        figures = [({k: own[k][i] for k in MOTION_FIGURES},
                    {k: r.losses[k][i] for k in MOTION_LOSSES})]
    else:
        figures = [({k: r.motions[(b, k)][i] for k in MOTION_FIGURES},
                    {k: r.motions[(b, ("loss", k))][i] for k in MOTION_LOSSES})
                   for b in range(len(ph.simultaneous) + 1)]
    motions = [(ph.actuator, ph.motion)] + [(x.actuator, x.motion) for x in ph.simultaneous]
    out = []
    for (name, motion), (fig, loss) in zip(motions, figures):
        rec = {"actuator": name, "motion": motion}
        rec.update({names[k]: _f(v) for k, v in fig.items()})
        rec["speed_unit"] = "rev/s" if scenario.actuator(name).kind == "motor" else "m/s"
        rec["throttle_loss_W"] = _f(loss["flow_control"])
        rec["losses_W"] = {k: _f(v) for k, v in loss.items()}
        out.append(rec)
    return out


def _is_motor(scenario, ph):
    if not ph.actuator:
        return False
    return scenario.actuator(ph.actuator).kind == "motor"


def warning_records(outcome, scenario) -> list:
    """The warnings of *outcome* as records (``Warning_.as_dict``) with their
    ``severity`` (:func:`heatload.outputs.wording.severity`: "blocking" where the
    decision rule rules the circuit out by it)."""
    from heatload.decision import blocking_warnings
    from heatload.outputs.wording import severity

    out = blocking_warnings(outcome, scenario)
    return [dict(w.as_dict(), severity=severity(w.code, any(w is b for b in out)))
            for w in outcome.warnings]


def strategy_record(outcome, scenario, pa, with_phases=True) -> dict:
    """Headline figures of one strategy (SI, unit-suffixed keys)."""
    from heatload.hydraulics.energy import J_PER_KWH
    e = outcome.energy
    th = outcome.thermal
    rec = {
        "strategy": outcome.strategy.kind,
        "label": outcome.name,
        # the thermal step's heat (x the file's heat_calibration); the per-cycle
        # energies below are the model's bookkeeping
        "heat_to_oil_W": _f(th.heat_running),
        "electric_power_average_W": _f(e.average_electric_power),
        "electric_energy_per_cycle_J": _f(e.electric_energy_per_cycle),
        "heat_to_oil_per_cycle_J": _f(e.heat_to_oil_per_cycle),
        "useful_energy_per_cycle_J": _f(e.useful_energy_per_cycle),
        "room_heat_per_cycle_J": _f(e.room_heat_per_cycle),
        "cycle_time_s": _f(e.cycle_time),
        "electric_energy_per_year_kWh": _f(e.electric_energy_per_year / J_PER_KWH),
        "cost_per_year": _f(e.cost_per_year),
        "currency": scenario.economics.currency,
        "co2_per_year_kg": _f(e.co2_per_year),
        "overall_efficiency": _f(e.overall_efficiency),
        "peak_pressure_Pa": _f(e.peak_pressure),
        "oil_temperature_steady_C": _f(th.steady_coupled - K0),
        "oil_temperature_steady_uncoupled_C": _f(th.steady_uncoupled - K0),
        "oil_temperature_hot_day_C": _f(th.steady_hot - K0),
        "oil_temperature_operating_C": _f(th.operating_temperature - K0),
        "oil_temperature_cycle_min_C": _f(th.cycle_minimum - K0),
        "oil_temperature_cycle_max_C": _f(th.cycle_maximum - K0),
        # heat_to_oil_W: running (held by the sized cooler where one is needed);
        # heat_to_oil_steady_W: at the steady temperature without a cooler
        "heat_to_oil_steady_W": _f(th.heat_coupled),
        "heat_to_oil_uncoupled_W": _f(th.heat_uncoupled),
        "heat_to_oil_design_W": _f(th.design_heat),
        "cooler_needed": bool(th.cooler_needed),
        "cooler_duty_W": _f(th.cooler_duty),
        "time_to_oil_limit_s": _f(th.time_to_limit),
        "price": _f(outcome.strategy.parameters.price),
        "component_energy_per_cycle_J": {k: _f(v) for k, v in
                                         e.component_energy_per_cycle.items()},
        "warnings": warning_records(outcome, scenario),
    }
    if with_phases:
        rec["phases"] = phase_records(outcome, scenario, pa)
    return rec


def comparison_dict(cmp, source=None, with_phases=True, present=None, prices=None) -> dict:
    """The whole comparison as JSON-ready data (``heatload compare --json``).

    ``recommended``, ``ranking`` and each strategy's ``feasible``, ``rank``,
    ``reason`` and ``yearly_cost`` come from :func:`heatload.decision.decide`."""
    from heatload.hydraulics.energy import J_PER_KWH
    sc = cmp.scenario
    dec = cmp.decision(present, prices)
    ranked = [cmp.outcome(n) for n in dec.order]
    records = []
    for o in cmp.outcomes:
        rec = strategy_record(o, sc, cmp.phase_arrays, with_phases)
        v = dec.verdict(o.name)
        rec.update({"feasible": v.feasible, "rank": v.rank, "reason": v.reason,
                    "yearly_cost": {k: _f(x) for k, x in v.cost.as_dict().items()},
                    "yearly_cost_total": _f(v.cost.total)})
        records.append(rec)
    return {
        "scenario": {
            "name": sc.name, "file": str(source) if source else None,
            "phases": len(sc.phases), "hours_per_year": sc.economics.hours_per_year,
            "electricity_price_per_kWh": sc.economics.electricity_price * J_PER_KWH,
            "currency": sc.economics.currency,
            "grid_co2_kg_per_kWh": sc.economics.grid_co2_factor * J_PER_KWH,
            "ambient_C": sc.ambient.temperature - K0,
            "ambient_max_C": sc.ambient.temperature_max - K0,
            "design_oil_temperature_C": (ranked[0].thermal.design_oil_temperature - K0
                                         if ranked else None),
            "present_strategy": sc.economics.present_strategy,
            "heat_calibration_factor": float(sc.heat_calibration),
        },
        "recommended": dec.recommended,
        "decision": {k: v for k, v in dec.as_dict().items() if k != "ranking"},
        "ranking": [o.name for o in ranked],
        "strategies": records,
    }


def strategy_frame(cmp):
    """Strategies x headline figures (pandas DataFrame, SI unit-suffixed columns)."""
    import pandas as pd

    rows = []
    dec = cmp.decision()
    for o in cmp.outcomes:
        rec = strategy_record(o, cmp.scenario, cmp.phase_arrays, with_phases=False)
        rec.pop("component_energy_per_cycle_J")
        v = dec.verdict(o.name)
        rec.update({"rank": v.rank, "feasible": v.feasible,
                    "yearly_cost_total": v.cost.total, "reason": v.reason})
        # "whole cycle" as the command line says, not "-": a text cell that
        # begins with "-" reads as a formula in a spreadsheet
        rec["warnings"] = "; ".join(f"{w['phase'] or 'whole cycle'}: {w['code']}"
                                    for w in rec["warnings"])
        rows.append(rec)
    return pd.DataFrame(rows)


def phase_component_frame(cmp):
    """Long table: strategy x phase x component power [W] and energy [J]."""
    import pandas as pd

    rows = []
    for o in cmp.outcomes:
        r = o.circuit
        for i, ph in enumerate(cmp.scenario.phases):
            for k in _loss_components():
                p = float(r.losses[k][i])
                rows.append({"strategy": o.name, "phase": ph.name, "component": k,
                             "power_W": p, "energy_J": p * float(r.duration[i])})
    return pd.DataFrame(rows)


def savings_against(cmp, present: str | None = None) -> dict:
    """Yearly energy and cost of each strategy against the present circuit."""
    from heatload.hydraulics.energy import J_PER_KWH
    present = present or cmp.scenario.economics.present_strategy or cmp.outcomes[0].name
    base = cmp.outcome(present)
    out = {}
    for o in cmp.outcomes:
        de = float(base.energy.electric_energy_per_year - o.energy.electric_energy_per_year)
        out[o.name] = {"energy_saving_kWh": de / J_PER_KWH,
                       "cost_saving": float(base.energy.cost_per_year - o.energy.cost_per_year),
                       "co2_saving_kg": float(base.energy.co2_per_year - o.energy.co2_per_year)}
    return out


def running_cost_saving(base: dict, candidate: dict) -> float:
    """Electricity cost a year that *candidate* saves against *base* (strategy
    records of :func:`comparison_dict`) [currency/year]: the circuit's and the
    cooler fan's.  Cooling water is not counted (the scenario has no water price)."""
    def bought(r):
        yc = r.get("yearly_cost") or {}
        return float(yc.get("energy", r.get("cost_per_year")) or 0.0) + float(
            yc.get("fan") or 0.0)
    return bought(base) - bought(candidate)


def cooler_price_difference(base: dict, candidate: dict) -> float:
    """Price of the cooler *candidate* needs less that of *base*'s [currency]
    (strategy records of :func:`comparison_dict`; a smaller cooler saves)."""
    def price(r):
        return float((r.get("yearly_cost") or {}).get("cooler_price") or 0.0)
    return price(candidate) - price(base)


def payback_years(extra_price, yearly_saving):
    """Simple payback [years] = extra price / yearly saving; inf when nothing is saved."""
    extra = np.asarray(extra_price, float)
    saving = np.asarray(yearly_saving, float)
    return np.where(saving > 0, extra / np.where(saving > 0, saving, 1.0), np.inf)


# ---------------------------------------------------------------------------
# terminal text: the command line's tables, numbers and counts
# ---------------------------------------------------------------------------

#: Width of the command line's output when the terminal's is unknown (a pipe).
DEFAULT_WIDTH = 80


def terminal_width(default: int = DEFAULT_WIDTH) -> int:
    """Columns of the terminal (``COLUMNS`` first, *default* for a pipe), at least 40."""
    import shutil
    return max(40, shutil.get_terminal_size((default, 24)).columns)


def plain_number(value, digits: int = 3) -> str:
    """*value* with *digits* significant figures (at least the whole part),
    thousands separated, never in exponent form: ``49,040``, ``12.0``, ``0.655``
    (:func:`heatload.units.format_number`; "n/a" where not finite).

    >>> plain_number(49040.3), plain_number(12.04), plain_number(0.6546), plain_number(-1234567.0)
    ('49,040', '12.0', '0.655', '-1,234,567')
    """
    from heatload.units import format_number

    v = float(value)
    return format_number(v, digits) if math.isfinite(v) else "n/a"


def count(n: int, noun: str, plural: str | None = None) -> str:
    """``1 strategy``, ``2 strategies``, ``3 phases``: a count with its noun in
    the right number (*plural* when adding "s" or "ies" is wrong).

    >>> count(1, "strategy"), count(7, "strategy"), count(0, "variant"), count(2, "switch", "switches")
    ('1 strategy', '7 strategies', '0 variants', '2 switches')
    """
    n = int(n)
    if n == 1:
        return f"1 {noun}"
    if plural is None:
        plural = (noun[:-1] + "ies" if noun.endswith("y") and noun[-2:-1] not in "aeiou"
                  else noun + "s")
    return f"{n:,} {plural}"


def times(n: int) -> str:
    """How often: ``once``, ``twice``, ``3 times``, ``never``.

    >>> times(0), times(1), times(2), times(31)
    ('never', 'once', 'twice', '31 times')
    """
    n = int(n)
    return {0: "never", 1: "once", 2: "twice"}.get(n, f"{n:,} times")


def _is_number(cell) -> bool:
    t = str(cell).replace(",", "").replace("..", "").lstrip("-")
    return bool(t) and (t[0].isdigit() or t in ("none", "never", "n/a"))


def format_table(headers, rows, width: int | None = None, optional=()) -> str:
    """Rows as a text table: numbers right-aligned, text left; a header cell may
    hold a line break (name, then unit).

    When *width* is given and the table is wider, the columns named in
    *optional* are left out in that order until it fits, then the longest text
    cells are shortened with "…"; a last line names what was left out.
    ``width=None`` shows every column (``--wide``).
    """
    headers = [str(h) for h in headers]
    rows = [[str(c) for c in r] for r in rows]
    cols = list(range(len(headers)))

    def col_width(i):
        return max([len(x) for x in headers[i].split("\n")] + [len(r[i]) for r in rows])

    def total(cs):
        return sum(col_width(i) for i in cs) + 2 * (len(cs) - 1)

    dropped = []
    if width is not None:
        for name in optional:
            if total(cols) <= width:
                break
            i = headers.index(name)
            if i in cols:
                cols.remove(i)
                dropped.append(name.replace("-\n", "").replace("\n", " "))
    widths = {i: col_width(i) for i in cols}
    if width is not None:
        # still too wide: shorten the widest text column, never below 8 characters
        while sum(widths.values()) + 2 * (len(cols) - 1) > width:
            text_cols = [i for i in cols if widths[i] > 8 and not all(_is_number(r[i]) for r in rows)]
            if not text_cols:
                break
            i = max(text_cols, key=lambda j: widths[j])
            widths[i] -= 1
        for r in rows:
            for i in cols:
                if len(r[i]) > widths[i]:
                    r[i] = r[i][:widths[i] - 1] + "…"
    numeric = {i: bool(rows) and all(_is_number(r[i]) or r[i] == "-" for r in rows) for i in cols}
    head_lines = max(len(headers[i].split("\n")) for i in cols)
    out = []
    for k in range(head_lines):
        cells = []
        for i in cols:
            parts = headers[i].split("\n")
            part = parts[k - (head_lines - len(parts))] if k >= head_lines - len(parts) else ""
            cells.append(part.rjust(widths[i]) if numeric[i] else part.ljust(widths[i]))
        out.append("  ".join(cells).rstrip())
    out.append("  ".join("-" * widths[i] for i in cols))
    for r in rows:
        out.append("  ".join(r[i].rjust(widths[i]) if _is_number(r[i]) else r[i].ljust(widths[i])
                             for i in cols).rstrip())
    if dropped:
        out.extend(wrap_line(f"(not shown to fit {width} columns: {', '.join(dropped)}; "
                             "--wide shows every column)", width))
    return "\n".join(out)


#: A space that must not break a line: between a number and its unit.
_UNIT_SPACE = r"(?<=\d) (?=[°%A-Za-zµ³²/·]{1,8}(?:[\s,.;:)]|$))"


def wrap_line(line: str, width: int | None) -> list:
    """*line* broken into lines of at most *width* characters (``None``: as is),
    never between a number and its unit.

    Continuation lines are indented under the value of a "name   value" line
    (the first run of two or more spaces after the leading indent), else two
    characters deeper than an indented line, or flush for a paragraph.

    >>> wrap_line("  ! meter-in: the oil would settle at 209 °C, above 80 °C", 40)
    ['  ! meter-in: the oil would settle at', '    209 °C, above 80 °C']
    """
    if width is None or len(line) <= width:
        return [line]
    import re
    import textwrap
    lead = len(line) - len(line.lstrip(" "))
    m = re.search(r"\S {2,}(?=\S)", line[lead:])
    if m and lead + m.end() <= 0.6 * width and not line.lstrip().startswith("! "):
        hang = lead + m.end()
    else:
        hang = lead + 2 if lead else 0
    glued = re.sub(_UNIT_SPACE, "\u00a0", line)
    out = textwrap.wrap(glued, width=width, subsequent_indent=" " * hang,
                        break_on_hyphens=False, drop_whitespace=True)
    return [x.replace("\u00a0", " ") for x in out] or [line]
