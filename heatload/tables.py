"""Results as plain data: the one place the command line's JSON, the report
and the spreadsheet export take their numbers from, so they always agree.

Keys carry their SI unit as a suffix (``_W``, ``_J``, ``_Pa``, ``_C`` ...).
"""

from __future__ import annotations

import math

import numpy as np

from heatload.circuits import LOSS_COMPONENTS
from heatload.energy import J_PER_KWH, cap_rod_pressures

K0 = 273.15


def _f(x):
    """A JSON-safe float (None for NaN/inf)."""
    if x is None:
        return None
    v = float(x)
    return v if math.isfinite(v) else None


def phase_records(outcome, scenario, pa) -> list:
    """Per-phase results of one strategy as dicts (SI, unit-suffixed keys)."""
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
            "losses_W": {k: _f(r.losses[k][i]) for k in LOSS_COMPONENTS},
            "stalled": bool(r.stalled[i]), "flow_limited": bool(r.flow_limited[i]),
            "runaway": bool(r.runaway[i]),
        }
        out.append(rec)
    return out


def _is_motor(scenario, ph):
    if not ph.actuator:
        return False
    return scenario.actuator(ph.actuator).kind == "motor"


def strategy_record(outcome, scenario, pa, with_phases=True) -> dict:
    """Headline figures of one strategy (SI, unit-suffixed keys)."""
    e = outcome.energy
    th = outcome.thermal
    rec = {
        "strategy": outcome.strategy.kind,
        "label": outcome.name,
        "heat_to_oil_W": _f(e.average_heat_to_oil),
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
        "heat_to_oil_uncoupled_W": _f(th.heat_uncoupled),
        "heat_to_oil_design_W": _f(th.design_heat),
        "cooler_needed": bool(th.cooler_needed),
        "cooler_duty_W": _f(th.cooler_duty),
        "time_to_oil_limit_s": _f(th.time_to_limit),
        "price": _f(outcome.strategy.parameters.price),
        "component_energy_per_cycle_J": {k: _f(v) for k, v in
                                         e.component_energy_per_cycle.items()},
        "warnings": [w.as_dict() for w in outcome.warnings],
    }
    if with_phases:
        rec["phases"] = phase_records(outcome, scenario, pa)
    return rec


def comparison_dict(cmp, source=None, with_phases=True, present=None, prices=None) -> dict:
    """The whole comparison as JSON-ready data (``heatload compare --json``).

    ``recommended``, ``ranking`` and each strategy's ``feasible``, ``rank``,
    ``reason`` and ``yearly_cost`` come from :func:`heatload.decision.decide`."""
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
            for k in LOSS_COMPONENTS:
                p = float(r.losses[k][i])
                rows.append({"strategy": o.name, "phase": ph.name, "component": k,
                             "power_W": p, "energy_J": p * float(r.duration[i])})
    return pd.DataFrame(rows)


def savings_against(cmp, present: str | None = None) -> dict:
    """Yearly energy and cost of each strategy against the present circuit."""
    present = present or cmp.scenario.economics.present_strategy or cmp.outcomes[0].name
    base = cmp.outcome(present)
    out = {}
    for o in cmp.outcomes:
        de = float(base.energy.electric_energy_per_year - o.energy.electric_energy_per_year)
        out[o.name] = {"energy_saving_kWh": de / J_PER_KWH,
                       "cost_saving": float(base.energy.cost_per_year - o.energy.cost_per_year),
                       "co2_saving_kg": float(base.energy.co2_per_year - o.energy.co2_per_year)}
    return out


def payback_years(extra_price, yearly_saving):
    """Simple payback [years] = extra price / yearly saving; inf when nothing is saved."""
    extra = np.asarray(extra_price, float)
    saving = np.asarray(yearly_saving, float)
    return np.where(saving > 0, extra / np.where(saving > 0, saving, 1.0), np.inf)
