"""Dash wiring.  Each callback is a thin wrapper around a plain function of
this module, so the behaviour is testable without a browser.

Data flow (all state lives in the page):

- ``update_scenario``: the one callback that reads the form, the scenario
  picker, the upload and the units toggle; it validates, recomputes when the
  scenario changed and writes ``scenario-store`` (last good scenario) and
  ``results-store`` (serialisable results).  A bad entry is flagged at its
  field and both stores stay as they were, so the last good results stay shown.
- the views read ``results-store`` (comparison, energy flow, cycle, payback)
  or rebuild the one strategy they show from ``scenario-store`` (shift
  temperature, cooler sizing).
"""

from __future__ import annotations

import base64
import binascii
import inspect
import re

import numpy as np
from dash import ALL, Input, Output, State, ctx, html, no_update
from dash.exceptions import PreventUpdate

from . import compute, figures, state
from .layout import ACTIVE_CELL, MAX_UPLOAD_BYTES
from heatload import chain, io
from heatload.outputs import report, tables
from heatload.cooling import sizing
from heatload.studies import uncertainty as unc
from heatload.errors import HeatloadError

ERROR_STYLE = {"backgroundColor": "#fde4d3", "border": "2px solid #D55E00"}


# ---------------------------------------------------------------------------
# the scenario: load, upload, edit, units
# ---------------------------------------------------------------------------

def read_upload(contents: str | None, filename: str | None):
    """Decode a ``dcc.Upload`` payload and parse it as a duty-cycle file.

    The file name is used only in messages; nothing is written to disk.
    Returns ``(scenario, canonical dict)``; raises :class:`HeatloadError`.
    """
    name = str(filename or "upload.toml")
    name = re.sub(r"[^\w.\- ]", "_", name)[:120]
    if not contents or "," not in contents:
        raise HeatloadError("no file content received", file=name)
    b64 = contents.split(",", 1)[1]
    if len(b64) * 3 // 4 > MAX_UPLOAD_BYTES:
        raise HeatloadError(f"file larger than {MAX_UPLOAD_BYTES // 1000} kB", file=name)
    try:
        raw = base64.b64decode(b64, validate=True)
    except (binascii.Error, ValueError):
        raise HeatloadError("the upload is not valid base64 data", file=name) from None
    if len(raw) > MAX_UPLOAD_BYTES:
        raise HeatloadError(f"file larger than {MAX_UPLOAD_BYTES // 1000} kB", file=name)
    try:
        text = raw.decode("utf-8").removeprefix("\ufeff")
    except UnicodeDecodeError:
        raise HeatloadError("not UTF-8 text; save the file as UTF-8", file=name) from None
    return state.scenario_data(text, name)


def _field_label(field: str | None, rows: list, section: str) -> str:
    where, row, col = state.locate(field)
    if where in ("phases", "actuators") and rows and row is not None and row < len(rows):
        name = rows[row].get("name") or ""
        what = "phase" if where == "phases" else "actuator"
        return f"{what} {row + 1} '{name}'" + (f", {col}" if col else "")
    if where == "key":
        return state.KEY_FIELDS[row].label
    return field or "scenario"


def error_outputs(errors: list, phase_rows: list, actuator_rows: list) -> dict:
    """Styles, tooltips and messages that flag each error at its field."""
    n_keys = len(state.KEY_FIELDS)
    key_errors = [""] * n_keys
    styles = {"phases": [], "actuators": []}
    tips = {"phases": [{} for _ in phase_rows or []],
            "actuators": [{} for _ in actuator_rows or []]}
    items = []
    for field, message in errors:
        where, row, col = state.locate(field)
        if where in ("phases", "actuators"):
            rows = phase_rows if where == "phases" else actuator_rows
            col = col or "name"
            styles[where].append({"if": {"row_index": row, "column_id": col}, **ERROR_STYLE})
            if row < len(tips[where]):
                tips[where][row][col] = {"value": message, "type": "text"}
            items.append(html.Li(f"{_field_label(field, rows, where)}: {message}",
                                 **{"data-field": field or ""}))
        elif where == "key":
            key_errors[row] = message
            items.append(html.Li(f"{state.KEY_FIELDS[row].label}: {message}",
                                 **{"data-field": field or ""}))
        else:
            items.append(html.Li(f"{field or 'scenario'}: {message}",
                                 **{"data-field": field or ""}))
    banner = None
    if items:
        items.append(html.Li("The results shown are those of the last valid entry.",
                             className="caution"))
        n = len(errors)
        first = errors[0]
        banner = html.Span([html.B(f"{n} invalid entr{'y' if n == 1 else 'ies'} in the form"),
                            f" (first: {first[0] or 'scenario'}: {first[1]}). Every number "
                            "shown is from the last valid entry; fix it in the 'Cycle and "
                            "machine' tab."], id="error-banner-text")
    return {"phase_styles": list(ACTIVE_CELL) + styles["phases"],
            "phase_tooltips": tips["phases"],
            "actuator_styles": list(ACTIVE_CELL) + styles["actuators"], "actuator_tooltips": tips["actuators"],
            "key_errors": key_errors, "form_errors": items, "banner": banner}


OUTPUT_KEYS = ("store", "results", "phase_rows", "phase_columns", "actuator_rows",
               "actuator_columns", "phase_styles", "phase_tooltips", "actuator_styles",
               "actuator_tooltips", "key_values", "key_units", "key_errors", "form_errors",
               "upload_message", "source_label", "upload_contents", "banner")


def _blank() -> dict:
    return {k: no_update for k in OUTPUT_KEYS}


def _visible(data: dict, tab, strategy):
    """The one strategy to compute first, or None for all (see compute.NEEDS_ALL)."""
    if tab is None or tab in compute.NEEDS_ALL:
        return None
    names = compute.strategy_names(data)
    if strategy in names:
        return strategy
    present = (data.get("economics") or {}).get("present_strategy")
    return present if present in names else None


def _loaded(out: dict, scenario, data: dict, source: str, system: str) -> dict:
    form = state.render_form(data, system)
    out.update(store={"data": data, "source": source},
               results=compute.compute_results(scenario, source=source,
                                               key=compute.scenario_key(data)),
               phase_rows=form["phase_rows"], phase_columns=form["phase_columns"],
               actuator_rows=form["actuator_rows"], actuator_columns=form["actuator_columns"],
               key_values=form["key_values"], key_units=form["key_units"],
               source_label=f"showing: {source}")
    out.update(error_outputs([], form["phase_rows"], form["actuator_rows"]))
    return out


def update_scenario(trigger, choice, upload_contents, upload_filename, system, phase_rows,
                    actuator_rows, key_vals, store, results, examples: dict, tab=None,
                    strategy=None) -> dict:
    """The one state callback (see the module notes).

    Parameters
    ----------
    trigger : str or None
        Id of the input that fired: 'scenario-select', 'upload', 'units',
        'phase-table', 'actuator-table', a key field, or None (page load).
    examples : dict
        Choice value -> file path of the scenarios the server offers.
    tab, strategy : str, optional
        The tab in front and the strategy shown.  After an edit, a tab that
        shows one strategy gets that strategy computed first (the results are
        marked incomplete and :func:`complete_results` adds the rest when a
        view needs them); ``None`` computes every strategy.

    Returns
    -------
    dict
        One entry per :data:`OUTPUT_KEYS` (``dash.no_update`` where unchanged).
    """
    out = _blank()
    system = system if system in ("si", "us") else "si"
    if trigger == "scenario-select":
        path = examples.get(choice)
        if path is None:
            out["upload_message"] = html.Span(f"unknown scenario {choice!r}", className="err")
            return out
        scenario = io.load_scenario(path)
        data = io.scenario_to_dict(scenario)
        out["upload_message"] = ""
        return _loaded(out, scenario, data, path.name, system)
    if trigger == "upload":
        if not upload_contents:
            raise PreventUpdate
        out["upload_contents"] = None      # the same file may be chosen again
        try:
            scenario, data = read_upload(upload_contents, upload_filename)
        except HeatloadError as e:
            out["upload_message"] = html.Span(
                f"Upload refused: {e.one_line()}. The previous scenario stays.",
                className="err", id="upload-error")
            return out
        out["upload_message"] = html.Span(f"Opened {upload_filename}.", className="ok")
        return _loaded(out, scenario, data, str(upload_filename), system)
    data = (store or {}).get("data")
    source = (store or {}).get("source", "dashboard")
    if data is None:
        raise PreventUpdate
    if trigger == "units":
        form = state.render_form(data, system)
        out.update(phase_rows=form["phase_rows"], phase_columns=form["phase_columns"],
                   actuator_rows=form["actuator_rows"],
                   actuator_columns=form["actuator_columns"],
                   key_values=form["key_values"], key_units=form["key_units"])
        out.update(error_outputs([], form["phase_rows"], form["actuator_rows"]))
        return out
    scenario, _, errors = state.apply_form(data, phase_rows, actuator_rows, key_vals, system,
                                           source=source)
    out.update(error_outputs(errors, phase_rows, actuator_rows))
    if scenario is None:
        return out
    canonical = io.scenario_to_dict(scenario)
    if canonical == data and results:
        return out                          # nothing that matters changed
    out["store"] = {"data": canonical, "source": source}
    out["results"] = compute.compute_results(scenario, source=source,
                                             only=_visible(canonical, tab, strategy),
                                             key=compute.scenario_key(canonical))
    return out


def complete_results(results, tab, strategy, store):
    """Every strategy's results once a view needs more than the one computed
    first, or when the stored results belong to an older scenario (a late
    answer); ``PreventUpdate`` when nothing is missing."""
    if not store or not store.get("data"):
        raise PreventUpdate
    stale = bool(results) and not compute.matches(results, store)
    if not stale and not compute.needs_completion(results, tab, strategy):
        raise PreventUpdate
    scenario = compute.scenario_of(store["data"])
    return compute.compute_results(scenario, source=store.get("source"),
                                   key=compute.scenario_key(store["data"]))


# ---------------------------------------------------------------------------
# views
# ---------------------------------------------------------------------------

def strategy_choices(store, current, results=None):
    """Options of the strategy selector (every strategy of the stored scenario)
    and the value to keep, else the recommended one (once the whole comparison
    of this scenario is known; ``no_update`` until then: the views show the
    best-ranked strategy meanwhile)."""
    if not store or not store.get("data"):
        raise PreventUpdate
    data = store["data"]
    names = compute.strategy_names(data)
    opts = [{"label": n, "value": n} for n in names]
    if current in names:
        return opts, current
    if results and results.get("complete", True) and compute.matches(results, store):
        rec = results["comparison"].get("recommended") or (
            results["comparison"].get("ranking") or [None])[0]
        if rec in names:
            return opts, rec
    return opts, no_update


def payback_choices(results, base, candidate):
    """Options of the two payback selectors and their values."""
    if not results or not results.get("complete", True):
        raise PreventUpdate
    comp = results["comparison"]
    names = [r["label"] for r in comp["strategies"]]
    opts = [{"label": n, "value": n} for n in names]
    present = comp["scenario"].get("present_strategy")
    if base not in names:
        base = present if present in names else names[0]
    if candidate not in names:
        ranking = [n for n in (comp.get("ranking") or names) if n != base]
        candidate = ranking[0] if ranking else base
    return opts, base, opts, candidate


def default_extra_price(results, base, candidate):
    """Extra price of *candidate* over *base*: the circuits' price difference
    (the scenario's strategy prices) plus the difference of the coolers each
    needs (:func:`heatload.decision.cooler_price`)."""
    b = figures.strategy_record(results, base)
    c = figures.strategy_record(results, candidate)
    if b is None or c is None:
        return None
    # whole currency units: a price field, not a computed figure
    return float(round((c.get("price") or 0.0) - (b.get("price") or 0.0)
                       + tables.cooler_price_difference(b, c)))


def yearly_saving(results, base, candidate):
    """Electricity saved a year by *candidate* against *base*, the cooler fans'
    included [currency/year]."""
    b = figures.strategy_record(results, base)
    c = figures.strategy_record(results, candidate)
    if b is None or c is None:
        return None
    return tables.running_cost_saving(b, c)


def payback_view(results, base, candidate, extra_price, system):
    """Summary text and figure of the payback of *candidate* over *base*."""
    if (not results or not results.get("complete", True) or base is None
            or candidate is None):
        raise PreventUpdate
    sav = results["savings"].get(base, {}).get(candidate)
    rec = figures.strategy_record(results, candidate)
    if sav is None or rec is None:
        raise PreventUpdate
    currency = rec.get("currency") or ""
    if extra_price is None or (isinstance(extra_price, str) and not extra_price.strip()):
        extra = default_extra_price(results, base, candidate) or 0.0
    else:
        from heatload.decision import price_value
        try:
            extra = price_value(extra_price, "extra price")
        except HeatloadError as e:
            return html.Span(e.one_line(), id="pay-text", className="err"), no_update
    yearly = yearly_saving(results, base, candidate)
    years = float(tables.payback_years(extra, yearly))
    kwh = f"{sav['energy_saving_kWh']:,.0f} kWh"
    if yearly > 0:
        pay = (f"pays back in {years:.1f} years" if np.isfinite(years) else "never pays back")
        text = (f"{candidate} instead of {base} saves {kwh} of electricity and "
                f"{yearly:,.0f} {currency} a year (cooler fans included); an extra price of "
                f"{extra:,.0f} {currency} (circuit and cooler) {pay}.")
    else:
        text = (f"{candidate} does not save energy cost against {base} "
                f"({-yearly:,.0f} {currency} a year more): no payback.")
    return (html.Span(text, id="pay-text"),
            figures.payback_figure(extra, yearly, years, currency, candidate, base))


def shift_view(data: dict, strategy: str, system: str):
    """Figure and note of the oil temperature over a shift, without and with
    the sized cooler (:func:`heatload.chain.shift_profile`)."""
    scenario, outcome = compute.strategy_outcome(data, strategy)
    off = chain.shift_profile(scenario, outcome, cooler_on=False)
    prof = {"without": compute.downsample(off.times, off.temperatures),
            "limit": scenario.fluid.temperature_max,
            "design": outcome.thermal.design_oil_temperature, "with": None}
    note = "No cooler is needed: the tank's surfaces shed the heat at the design point."
    if outcome.thermal.cooler_duty > 0.0:
        on = chain.shift_profile(scenario, outcome, cooler_on=True)
        prof["with"] = compute.downsample(on.times, on.temperatures)
        frac = getattr(on, "on_fraction", None)
        note = (f"Cooler of {figures.fmt(outcome.thermal.cooler_duty, 'power', system)} "
                "switched by the thermostat" +
                (f", on {100 * float(frac):.0f} % of the shift." if frac is not None else "."))
    title = (f"{outcome.name}: oil temperature over "
             f"{sizing.shift_words(scenario.shift_duration, '.3g')} from "
             f"{figures.fmt(scenario.ambient.cold_start_temperature, 'temperature', system)}, "
             f"ambient {figures.fmt(scenario.ambient.temperature, 'temperature', system)}")
    return figures.shift_figure(prof, system, title), note


def _calibration_note(scenario) -> list:
    """The file's heat calibration in words, when it is not 1."""
    from heatload.outputs.wording import calibration_note
    note = calibration_note(scenario.heat_calibration)
    return [html.Div(note, className="note", id="cooler-heat-calibration")] if note else []


def cooler_view(data: dict, strategy: str, system: str):
    """Spec sheet rows and notes of the cooler of *strategy* (heatload.cooling.sizing)."""
    scenario, outcome = compute.strategy_outcome(data, strategy)
    sz = sizing.size_cooler(scenario, outcome, thermostat=False)
    notes = [html.Div(n, className="note") for n in sz.notes]
    rows = sizing.spec_rows(sz, system)
    spec = (figures.spec_table(rows) if rows else
            html.Div("No cooler needed at the design point.", className="note", id="spec-table"))
    head = html.Div([html.Div(
        f"{outcome.name}: design point {figures.fmt(sz.design_oil_temperature, 'temperature', system)} "
        f"oil at {figures.fmt(sz.design_ambient, 'temperature', system)} ambient; the surfaces "
        f"shed {figures.fmt(sz.surfaces_heat, 'power', system)} of "
        f"{figures.fmt(sz.design_heat, 'power', system)}.", className="msg"), *notes,
        *_calibration_note(scenario), html.Div(sz.caution, className="caution")])
    from .datasheet_view import datasheet_block     # coolers listed by datasheet curves
    listed = datasheet_block(scenario, outcome, system)
    if listed is not None:
        head.children.append(listed)
    return head, spec


def _sample_array(mc):
    for name in ("cooler_duty_W", "cooler_duty", "duty_W", "duty"):
        v = getattr(mc, name, None)
        if v is None and isinstance(mc, dict):
            v = mc.get(name)
        if v is not None and np.ndim(v) == 1 and np.size(v) > 1:
            return np.asarray(v, float)
    samples = getattr(mc, "samples", None)
    if isinstance(samples, dict):
        for name in ("cooler_duty_W", "cooler_duty"):
            if name in samples:
                return np.asarray(samples[name], float)
    return None


def _call(fn, *args, **kwargs):
    """Call *fn* with only the keyword arguments it accepts."""
    params = inspect.signature(fn).parameters
    if not any(p.kind == p.VAR_KEYWORD for p in params.values()):
        kwargs = {k: v for k, v in kwargs.items() if k in params}
    return fn(*args, **kwargs)


#: Samples the dashboard's Monte Carlo runs: from enough for a P90 to a click's
#: wait (the command line runs up to 1,000,000).
MC_SAMPLES = (100, 20_000)
#: Characters of a bad entry quoted back in its message.
_QUOTED = 24


def monte_carlo_samples(value) -> int:
    """The count typed into the Monte Carlo's samples field, as a whole number
    from ``MC_SAMPLES[0]`` to ``MC_SAMPLES[1]`` (``2000``, ``2,000`` and ``2e3``
    read alike).

    Raises
    ------
    HeatloadError
        Anything else (text, zero, a negative or fractional count, one beyond
        the range), as one line naming the field and the range.
    """
    lo, hi = MC_SAMPLES
    typed = "" if value is None else str(value).strip()
    shown = typed if len(typed) <= _QUOTED else typed[:_QUOTED - 1] + "…"
    expected = f"expected a whole number from {lo:,} to {hi:,}"
    try:
        v = float(typed.replace(",", "")) if len(typed) <= 40 else float("nan")
    except ValueError:
        v = float("nan")
    if not typed or not np.isfinite(v) or v != round(v) or not lo <= v <= hi:
        raise HeatloadError(f"{expected}, got {shown!r}" if typed else f"{expected}; it is empty",
                            field="Monte Carlo samples")
    return int(v)


def run_monte_carlo(store, strategy, samples, system):
    """The Monte Carlo button: ``(result, key, message beside the samples field)``.

    A bad count (:func:`monte_carlo_samples`) shows its one-line message beside
    the field and runs nothing: the result shown and the entry as typed stay."""
    try:
        n = monte_carlo_samples(samples)
    except HeatloadError as e:
        return no_update, no_update, e.one_line()
    if not store or not strategy:
        raise PreventUpdate
    return (uncertainty_view(store["data"], strategy, n, system),
            {"key": compute.scenario_key(store["data"]), "strategy": strategy}, "")


def uncertainty_view(data: dict, strategy: str, samples: int, system: str):
    """Monte Carlo histogram of the cooler duty and the sensitivity ranking
    (:mod:`heatload.studies.uncertainty`); a note when it is missing.  *samples*:
    as :func:`monte_carlo_samples` takes it."""
    scenario = compute.scenario_of(data)
    if not scenario.uncertainty:
        return html.Div("The scenario lists no uncertain inputs ([[uncertainty]] in the "
                        "file).", className="note", id="mc-note")
    st = scenario.strategy(strategy)
    n = monte_carlo_samples(samples)
    try:
        mc = _call(unc.monte_carlo, scenario, st, samples=n, seed=1, progress=False)
        sens = list(_call(unc.sensitivity, scenario, st)) if hasattr(unc, "sensitivity") else []
    except HeatloadError as e:
        return html.Div(f"Uncertainty analysis failed: {e.one_line()}", className="note",
                        id="mc-note")
    pct = {}
    raw = getattr(mc, "percentiles", None) or {}
    for k, v in dict(raw.get("cooler_duty_W", {})).items():
        pct[str(k)] = float(v)
    rows = [compute.plain(dict(s)) if not isinstance(s, dict) else compute.plain(s)
            for s in sens][:8]
    from heatload import decision
    _, outcome = compute.strategy_outcome(data, strategy)
    quote = None
    line = None
    if outcome.thermal.cooler_needed:
        quote, basis, _ = decision.quoted_duty(outcome.thermal.cooler_duty,
                                               scenario.cooler.margin, pct)
        line = html.P([html.B(f"Quote this duty: {figures.fmt(quote, 'power', system)}"),
                       f" — {basis}."], id="mc-quote", className="msg")
    figs = [figures.histogram_figure(_sample_array(mc), pct, system,
                                     f"{strategy}: cooler duty over {n:,} samples", quote)]
    if rows:
        figs.append(figures.sensitivity_figure(rows, system, "what moves the duty most"))
    from dash import dcc

    from heatload.outputs.wording import plain_path
    # the inputs in plain words; the file's path as the tooltip
    names = [html.Span(plain_path(u.path, scenario), title=u.path, className="input-name")
             for u in scenario.uncertainty]
    inputs = html.P(["Uncertain inputs: "] + [x for i, sp in enumerate(names)
                                              for x in ([", "] if i else []) + [sp]],
                    id="mc-inputs", className="note")
    return html.Div(([line] if line else []) + [inputs]
                    + [dcc.Graph(figure=f, id=f"mc-graph-{i}") for i, f in enumerate(figs)],
                    id="mc-result")


def mc_stale(store, strategy, mc_key):
    """A note replacing a Monte Carlo result computed for another scenario or
    strategy (``PreventUpdate`` while it still matches)."""
    if not mc_key:
        raise PreventUpdate
    key = compute.scenario_key(store["data"]) if store and store.get("data") else None
    if mc_key.get("key") == key and mc_key.get("strategy") == strategy:
        raise PreventUpdate
    return (html.Div(f"The Monte Carlo shown was for {mc_key.get('strategy')} of an earlier "
                     "entry; it was cleared. Run it again for the scenario and strategy in "
                     "view.", className="stale", id="mc-stale"), None)


def download_scenario(data: dict, name: str | None = None) -> dict:
    """The edited scenario as TOML for ``dcc.Download`` (loads back equal)."""
    scenario = compute.scenario_of(data)
    text = io.dumps_scenario(scenario)
    slug = re.sub(r"[^a-z0-9]+", "_", (name or scenario.name).lower()).strip("_") or "scenario"
    return {"content": text, "filename": f"{slug}.toml", "type": "application/toml"}


#: Monte Carlo samples of the report's uncertainty section (kept small for a click).
REPORT_SAMPLES = 1000


def download_report(data: dict, source: str | None = None, system: str = "si"):
    """The HTML report (heatload.outputs.report.build_report), or ``None`` with a note.

    The cover names the scenario as shown (edits included) and its SHA-256 is
    that of the TOML the page's scenario download gives, not of a file on the
    server."""
    scenario = compute.scenario_of(data)
    cmp = chain.compare(scenario)
    label = f"{source or scenario.name} (as shown in the dashboard; download the .toml)"
    try:
        html_text = _call(report.build_report, scenario, cmp, source=None,
                          samples=REPORT_SAMPLES, cover={"input": label},
                          system=system if system in ("si", "us") else "si")
    except TypeError:
        # an older signature taking only the comparison
        html_text = report.build_report(cmp)
    if not isinstance(html_text, str):
        html_text = str(html_text)
    slug = re.sub(r"[^a-z0-9]+", "_", scenario.name.lower()).strip("_") or "scenario"
    return {"content": html_text, "filename": f"{slug}_report.html",
            "type": "text/html"}, ""


# ---------------------------------------------------------------------------
# registration
# ---------------------------------------------------------------------------

def register(app, examples: dict) -> None:
    """Attach every callback to *app*; *examples* maps choices to files."""
    outputs = [Output("scenario-store", "data"), Output("results-store", "data"),
               Output("phase-table", "data"), Output("phase-table", "columns"),
               Output("actuator-table", "data"), Output("actuator-table", "columns"),
               Output("phase-table", "style_data_conditional"),
               Output("phase-table", "tooltip_data"),
               Output("actuator-table", "style_data_conditional"),
               Output("actuator-table", "tooltip_data"),
               Output({"type": "key", "index": ALL}, "value"),
               Output({"type": "key-unit", "index": ALL}, "children"),
               Output({"type": "key-error", "index": ALL}, "children"),
               Output("form-errors", "children"),
               Output("upload-message", "children"), Output("source-label", "children"),
               Output("upload", "contents"), Output("error-banner", "children")]

    @app.callback(outputs,
                  Input("scenario-select", "value"), Input("upload", "contents"),
                  State("upload", "filename"), Input("units", "value"),
                  Input("phase-table", "data"), Input("actuator-table", "data"),
                  Input({"type": "key", "index": ALL}, "value"),
                  State("scenario-store", "data"), State("results-store", "data"),
                  State("tabs", "value"), State("strategy-select", "value"))
    def _update(choice, contents, filename, system, phase_rows, actuator_rows, key_vals,
                store, results, tab, strategy):
        trig = ctx.triggered_id
        if isinstance(trig, dict):
            trig = "key"
        out = update_scenario(trig, choice, contents, filename, system, phase_rows,
                              actuator_rows, key_vals, store, results, examples,
                              tab=tab, strategy=strategy)
        n = len(state.KEY_FIELDS)
        for k in ("key_values", "key_units", "key_errors"):
            if out[k] is no_update:
                out[k] = [no_update] * n
        return [out[k] for k in OUTPUT_KEYS]

    @app.callback(Output("strategy-select", "options"), Output("strategy-select", "value"),
                  Input("scenario-store", "data"), Input("results-store", "data"),
                  State("strategy-select", "value"))
    def _strategies(store, results, current):
        return strategy_choices(store, current, results)

    @app.callback(Output("decision", "children"), Input("results-store", "data"),
                  Input("units", "value"), State("scenario-store", "data"))
    def _decision(results, system, store):
        current(results, store)
        return figures.decision_view(results, system)

    @app.callback(Output("results-store", "data", allow_duplicate=True),
                  Input("results-store", "data"), Input("tabs", "value"),
                  Input("strategy-select", "value"), State("scenario-store", "data"),
                  prevent_initial_call=True)
    def _complete(results, tab, strategy, store):
        return complete_results(results, tab, strategy, store)

    def current(results, store):
        # a late answer for an older scenario is never shown (completion replaces it)
        if not compute.matches(results, store):
            raise PreventUpdate

    @app.callback(Output("headline", "children"), Input("results-store", "data"),
                  Input("strategy-select", "value"), Input("units", "value"),
                  State("scenario-store", "data"))
    def _headline(results, strategy, system, store):
        current(results, store)
        return figures.headline(results, strategy, system)

    @app.callback(Output("comparison", "children"), Input("results-store", "data"),
                  Input("units", "value"), State("scenario-store", "data"))
    def _comparison(results, system, store):
        current(results, store)
        return figures.comparison_table(results, system)

    @app.callback(Output("sankey", "figure"), Input("results-store", "data"),
                  Input("strategy-select", "value"), Input("units", "value"),
                  State("scenario-store", "data"))
    def _sankey(results, strategy, system, store):
        current(results, store)
        return figures.sankey_figure(results, strategy, system)

    @app.callback(Output("cycle-graph", "figure"), Input("results-store", "data"),
                  Input("strategy-select", "value"), Input("units", "value"),
                  State("scenario-store", "data"))
    def _cycle(results, strategy, system, store):
        current(results, store)
        return figures.cycle_figure(results, strategy, system)

    @app.callback(Output("shift-graph", "figure"), Output("shift-note", "children"),
                  Input("results-store", "data"), Input("tabs", "value"),
                  Input("strategy-select", "value"), Input("units", "value"),
                  State("scenario-store", "data"))
    def _shift(results, tab, strategy, system, store):
        if tab != "shift" or not results or not strategy or not store:
            raise PreventUpdate
        return shift_view(store["data"], strategy, system)

    @app.callback(Output("cooler-note", "children"), Output("cooler-spec", "children"),
                  Input("results-store", "data"), Input("tabs", "value"),
                  Input("strategy-select", "value"), Input("units", "value"),
                  State("scenario-store", "data"))
    def _cooler(results, tab, strategy, system, store):
        if tab != "cooler" or not results or not strategy or not store:
            raise PreventUpdate
        return cooler_view(store["data"], strategy, system)

    @app.callback(Output("mc-out", "children"), Output("mc-key", "data"),
                  Output("mc-samples-error", "children"),
                  Input("mc-run", "n_clicks"),
                  State("scenario-store", "data"), State("strategy-select", "value"),
                  State("mc-samples", "value"), State("units", "value"),
                  prevent_initial_call=True)
    def _mc(n, store, strategy, samples, system):
        if not n:
            raise PreventUpdate
        return run_monte_carlo(store, strategy, samples, system)

    @app.callback(Output("mc-out", "children", allow_duplicate=True),
                  Output("mc-key", "data", allow_duplicate=True),
                  Input("scenario-store", "data"), Input("strategy-select", "value"),
                  State("mc-key", "data"), prevent_initial_call=True)
    def _mc_stale(store, strategy, mc_key):
        return mc_stale(store, strategy, mc_key)

    @app.callback(Output("pay-base", "options"), Output("pay-base", "value"),
                  Output("pay-candidate", "options"), Output("pay-candidate", "value"),
                  Input("results-store", "data"), State("pay-base", "value"),
                  State("pay-candidate", "value"))
    def _pay_choices(results, base, candidate):
        return payback_choices(results, base, candidate)

    @app.callback(Output("pay-price", "value"), Input("pay-base", "value"),
                  Input("pay-candidate", "value"), State("results-store", "data"))
    def _pay_price(base, candidate, results):
        if not results:
            raise PreventUpdate
        v = default_extra_price(results, base, candidate)
        return None if v is None else f"{v:.0f}"

    @app.callback(Output("pay-summary", "children"), Output("pay-graph", "figure"),
                  Input("results-store", "data"), Input("pay-base", "value"),
                  Input("pay-candidate", "value"), Input("pay-price", "value"),
                  Input("units", "value"), State("scenario-store", "data"))
    def _payback(results, base, candidate, price, system, store):
        current(results, store)
        return payback_view(results, base, candidate, price, system)

    @app.callback(Output("download-toml", "data"), Input("download-toml-btn", "n_clicks"),
                  State("scenario-store", "data"), prevent_initial_call=True)
    def _download_toml(n, store):
        if not n or not store:
            raise PreventUpdate
        return download_scenario(store["data"])

    @app.callback(Output("download-report", "data"), Output("upload-message", "children",
                                                            allow_duplicate=True),
                  Input("download-report-btn", "n_clicks"), State("scenario-store", "data"),
                  State("units", "value"), prevent_initial_call=True)
    def _download_report(n, store, system):
        if not n or not store:
            raise PreventUpdate
        payload, note = download_report(store["data"], store.get("source"), system)
        if payload is None:
            return no_update, html.Span(note, className="err")
        return payload, no_update
