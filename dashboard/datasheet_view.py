"""Datasheet coolers in the dashboard's cooler view: each cooler listed in the
scenario (``[[coolers]]``) rated on the hottest day
(:func:`heatload.cooling.cooler_datasheet.rate_coolers`), the chosen one marked.
Lays out only; nothing here computes physics."""

from __future__ import annotations

from dash import html


def datasheet_block(scenario, outcome, system: str):
    """An HTML block rating the scenario's datasheet coolers for *outcome*'s
    strategy, or None when the scenario lists none."""
    from heatload.cooling import cooler_datasheet
    from heatload.units import format_quantity as fq

    if not getattr(scenario, "coolers", ()):
        return None
    sel = cooler_datasheet.rate_coolers(scenario, outcome)
    head = html.Tr([html.Th(h) for h in ("cooler", "S over the cycle", "settles at",
                                          "limit", "drop at peak flow", "hot shift")])
    rows = []
    for r in sel.ratings:
        txt = cooler_datasheet.rating_texts(r, system)
        rows.append(html.Tr([html.Td(("✔ " if r.name == sel.chosen else "") + r.name),
                             html.Td(fq(r.specific_power, "thermal_conductance", system)),
                             html.Td(fq(r.settled_temperature, "temperature", system)),
                             html.Td(txt["verdict"]), html.Td(txt["drop"]),
                             html.Td(txt["shift"])]))
    notes = [html.Div(n, className="note") for n in sel.notes]
    notes += [html.Div(f"{r.name}: {n}", className="note") for r in sel.ratings for n in r.notes]
    return html.Div([
        html.H3("datasheet coolers"),
        html.Div(f"On the hottest day ({fq(sel.design_ambient, 'temperature', system)}) the oil "
                 f"must stay at or below {fq(sel.design_oil_temperature, 'temperature', system)};"
                 f" return flow through the cooler: mean "
                 f"{fq(sel.mean_return_flow, 'flow', system)}, peak "
                 f"{fq(sel.peak_return_flow, 'flow', system)} (allowed drop "
                 f"{fq(sel.allowed_pressure_drop, 'pressure', system)}). Chosen: "
                 f"{sel.chosen or 'none'}.", className="msg"),
        html.Table([html.Thead(head), html.Tbody(rows)], id="datasheet-table",
                   className="comparison"), *notes],
        id="datasheet-coolers")
