"""The machine's own data at the edge of the engine: ``heatload logfit``.

A temperature log (CSV, :mod:`heatload.measurement.logs`) is fitted with the lumped tank
model (:mod:`heatload.measurement.logfit`); with a scenario the heat capacity comes from
its oil and steel (:func:`heatload.evaluation.heat_capacity`), the measured heat
is set beside the model's heat for the present circuit at the logged oil
temperature, and the cooler duty at the design point is worked out again from
the measured heat load (:func:`heatload.cooling.cooler.required_cooler_duty`).

Calibration
-----------
- heat factor = P_measured / Q_model(T_log): the model's heat of the present
  circuit at the time-averaged logged oil temperature while running;
- conductance factor = UA_fitted / UA_model(T_log, T_a,log): the surfaces'
  conductance of the scenario at the logged oil and air temperatures;
- design point from the measurement: heat = heat factor x the model's design
  heat, UA = conductance factor x the model's design UA; the duty follows as
  in ``heatload cooler`` (the same function, the scenario's margin).

Applying the factor
-------------------
The heat factor goes into the file as ``heat_calibration`` under
``[scenario]`` (:func:`calibration_line`); every command then multiplies every
strategy's heat into the oil by it (:func:`heatload.evaluation.evaluate`).
The factor is always worked out against the *raw* model (the scenario with
``heat_calibration`` = 1), so a file that already carries one gets the same
factor again, never the factor of a factor.

Only this module formats; the fit and the physics live in their modules.
"""

from __future__ import annotations

import html
import math

import numpy as np

from heatload.errors import HeatloadError

K0 = 273.15

#: What the given heat capacity does to the results (said with every fit that uses one).
CAPACITY_NOTE = ("P and UA are proportional to the heat capacity C, which is given, not "
                 "fitted: a C 10 % high makes both 10 % high; the time constant and P/UA "
                 "come from the log alone.")


def log_columns():
    """Columns of a temperature log (README, "Measured logs")."""
    from heatload.measurement.logs import ColumnSpec
    return {"time": ColumnSpec(("time",), "time", True, "s"),
            "oil": ColumnSpec(("oil",), "temperature", True, "degC"),
            "ambient": ColumnSpec(("ambient",), "temperature", True, "degC"),
            "running": ColumnSpec(("running",), "fraction", False)}


def read_temperature_log(path, columns=None, units=None, ambient_temperature=None, text=None):
    """Read a temperature log (:func:`heatload.measurement.logs.read_log`); with
    *ambient_temperature* [K] the log needs no ambient column (taken constant)."""
    from heatload.measurement import logfit, logs

    specs = log_columns()
    if ambient_temperature is not None:
        specs["ambient"] = logs.ColumnSpec(("ambient",), "temperature", False, "degC")
    log = logs.read_log(path, specs, columns, units, min_rows=logfit.MIN_SAMPLES, text=text)
    check_temperatures(log)
    if "ambient" not in log.values:
        from heatload.io import schema
        schema._check(float(ambient_temperature), f"{ambient_temperature - K0:.4g} °C",
                      schema._AMBIENT["temperature"], "temperature", "--ambient-temperature",
                      None)
        log.values["ambient"] = np.full(len(log), float(ambient_temperature))
        log.notes.append(f"no ambient column: the air taken at a constant "
                         f"{ambient_temperature - K0:.4g} °C")
    return log


def check_temperatures(log) -> None:
    """Refuse a logged temperature no machine gives, naming the file, line and
    column: the ambient column is held to the scenario file's rule for the air
    (``[ambient] temperature``), the oil column to the loader's limit for any
    temperature and, below, to the coldest air of that rule (oil in a tank
    without a chiller is never colder than the air around it)."""
    from heatload.errors import HeatloadError
    from heatload.io import schema
    from heatload.measurement.logs import _err

    air = schema._AMBIENT["temperature"]
    oil = schema._F("temperature", "pos", low=air.low,
                    why=f"the coldest air of {air.why}; oil in a tank is not colder")
    for key, spec in (("ambient", air), ("oil", oil)):
        v = log.values.get(key)
        if v is None:
            continue
        for i in (int(np.argmin(v)), int(np.argmax(v))):
            try:
                schema._check(float(v[i]), f"{v[i] - K0:.4g} °C", spec, "temperature",
                              None, None)
            except HeatloadError as e:
                raise _err(e.message, log.source, int(log.lines[i]),
                           log.headers.get(key, key)) from None


def fit_log(log, capacity=None, confidence=0.95):
    """:func:`heatload.measurement.logfit.fit_tank_log` on a read :class:`~heatload.measurement.logs.Log`."""
    from heatload.measurement import logfit

    try:
        fit = logfit.fit_tank_log(log.time, log.values["oil"], log.values["ambient"],
                                  log.values.get("running"), capacity=capacity,
                                  confidence=confidence)
    except HeatloadError as e:
        # whatever the fit refuses, the reader must know which log it was
        raise e.located(file=log.source) from None
    except (ArithmeticError, ValueError, np.linalg.LinAlgError) as e:
        raise HeatloadError(f"the tank model cannot be fitted to this log ({e}); check the "
                            "oil, ambient and running columns", file=log.source) from None
    fit.notes[:0] = log.notes
    return fit


def calibration_advice(comparison, fit, path) -> list:
    """Lines saying how to apply the heat factor of *comparison* to the file
    *path* (the exact line to add), or why it should not be applied."""
    from heatload.io.schema import HEAT_CALIBRATION_RANGE

    f = comparison["heat_calibration_factor"]
    now = comparison.get("file_heat_calibration_factor", 1.0)
    if f is None:
        return ["no calibration factor: the log gives no heat (see above)"]
    if not fit.identified.get("heat", True):
        return [f"the heat is not identified by this log: do not apply the factor {f:.3g}"]
    low, high = HEAT_CALIBRATION_RANGE
    if not low <= float(f"{f:.3g}") <= high:
        return [f"the factor {f:.3g} lies outside {low:g} .. {high:g}: the duty cycle or the "
                "log is wrong rather than the losses; check both before calibrating"]
    where = (f"replace heat_calibration = {now:.6g} under [scenario] in {path} by"
             if now != 1.0 else f"to apply it, add under [scenario] in {path}:")
    out = [where, f"    {calibration_line(f)}",
           "(every command then scales every strategy's heat into the oil by it; "
           "the circuits' electricity stays the model's)"]
    ua = comparison.get("conductance_calibration_factor")
    if ua is not None and abs(ua - 1.0) > 0.05:
        out.append(f"the conductance factor {ua:.3g} is not applied by it: the other "
                   "commands keep the model's UA of the surfaces, so their cooler duty "
                   "differs from the one from the measurement above")
    return out


def calibration_line(factor) -> str:
    """The file's line that applies a heat factor (3 significant digits)."""
    return f"heat_calibration = {float(f'{factor:.3g}'):g}"


def logged_oil_temperature(log, fit) -> float:
    """Time-averaged logged oil temperature while the machine runs [K] (the
    whole log when it never runs)."""
    t = log.time
    w = np.diff(t) * (log.values["running"][:-1] if "running" in log.values else 1.0)
    y = 0.5 * (log.values["oil"][1:] + log.values["oil"][:-1])
    if not np.sum(w) > 0:
        w = np.diff(t)
    return float(np.sum(w * y) / np.sum(w))


def scenario_comparison(scenario, log, fit, strategy=None) -> dict:
    """The measured heat and conductance beside the scenario's model, the
    calibration factors and the cooler duty at the design point from the
    measurement (see the module notes).  SI values, unit-suffixed keys.
    *strategy*: the machine's circuit by name; default the scenario's present one."""
    import dataclasses

    from heatload import chain, evaluation
    from heatload.cooling import cooler, sizing

    applied = float(scenario.heat_calibration)
    # the raw model: a factor already in the file must not feed back into itself
    scenario = dataclasses.replace(scenario, heat_calibration=1.0)
    strat = sizing._design_strategy(scenario, strategy)
    t_log = logged_oil_temperature(log, fit)
    ta_log = float(np.mean(log.values["ambient"]))
    q_model = float(evaluation.mean_heat(chain.solve_at(scenario, strat, t_log)))
    ua_model = float(chain.conductance_fn(scenario, ta_log)(t_log))
    outcome = chain.evaluate_strategy(scenario, strat)
    th = outcome.thermal
    heat_factor = fit.heat / q_model if fit.heat is not None and q_model > 0 else None
    ua_factor = fit.conductance / ua_model if fit.conductance is not None else None
    rec = {"strategy": strat.name, "logged_oil_temperature_C": t_log - K0,
           "logged_ambient_C": ta_log - K0,
           "model_heat_W": q_model, "measured_heat_W": fit.heat,
           "heat_calibration_factor": heat_factor,
           "file_heat_calibration_factor": applied,
           "model_conductance_W_K": ua_model, "measured_conductance_W_K": fit.conductance,
           "conductance_calibration_factor": ua_factor,
           "design_oil_temperature_C": th.design_oil_temperature - K0,
           "design_ambient_C": th.design_ambient - K0,
           "model_design_heat_W": th.design_heat,
           "model_design_conductance_W_K": th.design_conductance,
           "model_cooler_duty_W": th.cooler_duty, "margin": scenario.cooler.margin,
           "measured_design_heat_W": None, "measured_design_conductance_W_K": None,
           "measured_cooler_duty_W": None}
    if heat_factor is not None and ua_factor is not None:
        q_d = heat_factor * th.design_heat
        ua_d = ua_factor * th.design_conductance
        duty = float(cooler.required_cooler_duty(q_d, ua_d, th.design_oil_temperature,
                                                 th.design_ambient, scenario.cooler.margin))
        rec.update(measured_design_heat_W=q_d, measured_design_conductance_W_K=ua_d,
                   measured_cooler_duty_W=duty)
        if fit.identified["heat"] and fit.identified["conductance"]:
            lo_q, hi_q = (heat_factor * th.design_heat * v / fit.heat
                          for v in fit.intervals["heat"])
            lo_u, hi_u = (ua_factor * th.design_conductance * v / fit.conductance
                          for v in fit.intervals["conductance"])
            # the duty grows with the heat and falls with the conductance
            rec["measured_cooler_duty_W_interval"] = [
                float(cooler.required_cooler_duty(lo_q, max(hi_u, 0.0),
                                                  th.design_oil_temperature,
                                                  th.design_ambient, scenario.cooler.margin)),
                float(cooler.required_cooler_duty(hi_q, max(lo_u, 0.0),
                                                  th.design_oil_temperature,
                                                  th.design_ambient, scenario.cooler.margin))]
    return rec


# ---------------------------------------------------------------------------
# formatting
# ---------------------------------------------------------------------------

def _unit(kind, system):
    from heatload.units import display_unit
    # a tank's UA reads in W/K (tens of W/K), not the cooler's kW/K
    return "W/K" if kind == "thermal_conductance" and system == "si" else display_unit(kind, system)


def _q(value, kind, system, digits=3):
    from heatload.units import format_number, from_si, pretty_unit
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "–"
    unit = _unit(kind, system)
    v = float(from_si(value, kind, unit)) if unit else float(value)
    return f"{format_number(v, digits)} {pretty_unit(unit)}".strip()


def _iv(pair, kind, system, digits=3):
    """An interval "low .. high unit", with the digits it takes to tell the
    ends apart."""
    from heatload.units import format_number, from_si, pretty_unit
    if pair is None:
        return "–"
    unit = _unit(kind, system)
    for d in range(digits, 7):
        vals = []
        for v in pair:
            if v is None or math.isnan(v):
                vals.append("–")
            elif not math.isfinite(v):
                vals.append("∞" if v > 0 else "−∞")
            else:
                vals.append(format_number(float(from_si(v, kind, unit)), d))
        if vals[0] != vals[1]:
            break
    return f"{vals[0]} .. {vals[1]} {pretty_unit(unit)}".strip()


def summary_rows(fit, system="si", capacity_source="given") -> list:
    """(quantity, value, interval, status) rows of a fit for people."""
    pct = f"{100 * fit.confidence:.0f} %"

    def status(key):
        return "identified" if fit.identified.get(key, True) else "NOT identified"

    def spread(value, pair, kind):
        # an interval a hundred times wider than its value says only "unknown"
        if (value is not None and pair is not None and math.isfinite(value)
                and max(abs(pair[0] - value), abs(pair[1] - value)) > 100.0 * abs(value)):
            return "wider than ±100x"
        return _iv(pair, kind, system)
    rows = [("heat while running, P", _q(fit.heat, "power", system),
             spread(fit.heat, fit.intervals.get("heat"), "power"),
             status("heat") if fit.capacity is not None else "needs C"),
            ("conductance to air, UA", _q(fit.conductance, "thermal_conductance", system, 3),
             spread(fit.conductance, fit.intervals.get("conductance"), "thermal_conductance"),
             status("conductance") if fit.conductance is not None else "needs C"),
            ("heat capacity, C", _q(fit.capacity, "heat_capacity", system), "", capacity_source
             if fit.capacity is not None else "not given"),
            ("time constant, C/UA", f"{fit.time_constant / 3600:.3g} h"
             if math.isfinite(fit.time_constant) else "∞",
             _iv([v / 3600 for v in fit.intervals["time_constant"]], "dimensionless",
                 system) + " h", status("conductance")),
            ("steady rise, P/UA", _q(fit.temperature_rise, "temperature_difference", system),
             spread(fit.temperature_rise, fit.intervals["temperature_rise"],
                    "temperature_difference"),
             status("temperature_rise")),
            ("initial oil temperature", _q(fit.initial_temperature, "temperature", system),
             "", status("initial_temperature"))]
    return [r + (pct,) for r in rows]


def figure(log, fit, system="si"):
    """The log with the fitted model (plotly figure: temperatures, residual,
    running state), temperatures in *system*'s units ("si" or "us")."""
    import plotly.graph_objects as go
    from plotly.subplots import make_subplots
    from heatload.outputs.report_assets import PALETTE
    from heatload.units import display_unit, from_si, pretty_unit

    t_unit = display_unit("temperature", system)
    dt_unit = display_unit("temperature_difference", system)

    def temp(v):
        return from_si(np.asarray(v, float), "temperature", t_unit)

    n = len(log.time)
    step = max(1, n // 4000)               # a few thousand points draw fast
    th = log.time[::step] / 3600.0
    rows = 3 if "running" in log.values else 2
    heights = [0.6, 0.2, 0.2][:rows]
    fig = make_subplots(rows=rows, cols=1, shared_xaxes=True, row_heights=heights,
                        vertical_spacing=0.05)
    fig.add_trace(go.Scatter(x=th, y=temp(log.values["oil"][::step]), mode="markers",
                             name="oil, logged", marker=dict(size=3, color=PALETTE[0])),
                  row=1, col=1)
    fig.add_trace(go.Scatter(x=th, y=temp(fit.fitted[::step]), mode="lines", name="oil, fitted",
                             line=dict(color=PALETTE[3], width=2)), row=1, col=1)
    fig.add_trace(go.Scatter(x=th, y=temp(log.values["ambient"][::step]), mode="lines",
                             name="ambient", line=dict(color=PALETTE[2], width=1)),
                  row=1, col=1)
    fig.add_trace(go.Scatter(x=th, y=from_si(np.asarray(fit.residuals[::step], float),
                                             "temperature_difference", dt_unit),
                             mode="lines", name="residual",
                             line=dict(color=PALETTE[7], width=1)), row=2, col=1)
    if rows == 3:
        fig.add_trace(go.Scatter(x=th, y=log.values["running"][::step], mode="lines",
                                 name="running", line=dict(color=PALETTE[1], shape="hv"),
                                 fill="tozeroy"), row=3, col=1)
        fig.update_yaxes(title_text="running", range=[-0.05, 1.05], row=3, col=1)
    fig.update_yaxes(title_text=f"temperature [{pretty_unit(t_unit)}]", row=1, col=1)
    fig.update_yaxes(title_text=f"residual [{pretty_unit(dt_unit)}]", row=2, col=1)
    fig.update_xaxes(title_text="time [h]", row=rows, col=1)
    fig.update_layout(width=680, height=560, template="plotly_white",
                      margin=dict(l=64, r=20, t=46, b=50),
                      title=dict(text="Oil temperature: log and fitted tank model", x=0.0),
                      legend=dict(orientation="h", yanchor="bottom", y=1.0, xanchor="right",
                                  x=1.0))
    return fig


def build_html(log, fit, comparison, system="si", capacity_source="given") -> str:
    """A self-contained HTML page: the fit's table, notes, the figure and the
    caution (plotly.js inline, no request to any server)."""
    import plotly.io as pio
    from heatload.outputs.report import CAUTION
    from heatload.outputs.report_assets import STYLESHEET

    e = html.escape
    rows = "".join(f"<tr><td>{e(a)}</td><td class='num'>{e(b)}</td><td class='num'>{e(c)}</td>"
                   f"<td>{e(d)}</td></tr>" for a, b, c, d, _ in
                   summary_rows(fit, system, capacity_source))
    notes = "".join(f"<li>{e(n)}</li>" for n in fit.notes)
    comp = ""
    if comparison is not None:
        c = comparison
        factor = c["heat_calibration_factor"]
        comp = (f"<h2>Against the model ({e(c['strategy'])})</h2><table><tbody>"
                f"<tr><td>heat into the oil at the logged oil temperature</td><td class='num'>"
                f"model {e(_q(c['model_heat_W'], 'power', system))}, measured "
                f"{e(_q(c['measured_heat_W'], 'power', system))}</td></tr>"
                f"<tr><td>calibration factor (measured / model)</td><td class='num'>"
                f"{'–' if factor is None else f'{factor:.3g}'}</td></tr>"
                f"<tr><td>surfaces' conductance UA at the logged temperatures</td>"
                f"<td class='num'>model "
                f"{e(_q(c['model_conductance_W_K'], 'thermal_conductance', system))}, measured "
                f"{e(_q(c['measured_conductance_W_K'], 'thermal_conductance', system))}</td></tr>"
                f"<tr><td>cooler duty at the design point</td><td class='num'>model "
                f"{e(_q(c['model_cooler_duty_W'], 'power', system))}; from the measurement "
                f"{e(_q(c['measured_cooler_duty_W'], 'power', system))}</td></tr>"
                f"<tr><td>to apply the factor</td><td>"
                f"{e(' '.join(calibration_advice(c, fit, 'the scenario file')))}</td></tr>"
                "</tbody></table>")
    div = pio.to_html(figure(log, fit, system), include_plotlyjs=True, full_html=False,
                      config={"displaylogo": False})
    body = (f"<header class='title'><h1>Temperature log fit — {e(log.source)}</h1>"
            f"<div class='meta'>{fit.samples:,} samples over {fit.duration / 3600:.3g} h; "
            f"residual RMS {e(_q(fit.residual_rms, 'temperature_difference', system))}"
            "</div></header>"
            "<p>Model: C dT/dt = P·running − UA (T − T<sub>ambient</sub>), solved exactly "
            "between samples and fitted by least squares to the logged oil temperature.</p>"
            f"<table><thead><tr><th>quantity</th><th class='num'>fitted</th>"
            f"<th class='num'>{100 * fit.confidence:.0f} % interval</th><th></th></tr></thead>"
            f"<tbody>{rows}</tbody></table>"
            + (f"<ul>{notes}</ul>" if notes else "")
            + (f"<p>{e(CAPACITY_NOTE)}</p>" if fit.capacity is not None else "") + comp
            + f"<div class='figure'>{div}</div><div class='caution'>{e(CAUTION)}</div>")
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>Temperature log fit — {e(log.source)}</title>"
            f"<style>{STYLESHEET}</style></head><body><main>{body}</main></body></html>\n")


def _json_default(v):
    if isinstance(v, (np.floating, np.integer)):
        f = float(v)
        return f if math.isfinite(f) else None
    return None
