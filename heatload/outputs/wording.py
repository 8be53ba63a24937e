"""Words at the edges: warnings in the reader's units, in plain sentences for
customers, and plain names for field paths.

Warnings are data (:class:`heatload.checks.Warning_`, or its ``as_dict``
record): a code, a phase, value and limit in SI with their kind, and a text
whose figures are marked (:func:`heatload.units.mark`).  The command line,
the dashboard and the report all write them through :func:`warning_text`
(the designer's line, in SI or US units) and :func:`customer_warnings` (one
plain sentence per code, grouped by severity), so a US reader never sees bar,
°C or kW and a customer never sees an internal code.
"""

from __future__ import annotations

import re

#: The one caution printed with every result a person could be hurt by acting on
#: (pressures, temperatures, cooler sizes): the command line, the report, the
#: cooler's spec sheet, the log fit and the dashboard all show this text.
CAUTION = ("These figures are an estimate for early design. Component makers' data, "
           "machine-safety standards for hydraulic systems (e.g. ISO 4413), local codes "
           "and licensed engineering practice govern the design, selection and "
           "installation.")

#: Severities, most serious first, with the heading a customer reads.
SEVERITIES = (("blocking", "Rules the circuit out"),
              ("attention", "Needs attention"),
              ("information", "For information"))

#: Codes that are for information only: the figures stand, their basis is
#: stretched.  Every other code that does not rule a circuit out needs attention.
INFORMATION = ("correlation-range",)

#: One plain sentence per warning code, for a customer (no internal words).
SENTENCES = {
    "stall": "The actuator stalls: the load needs more pressure than the supply allows.",
    "speed-not-reached": "The actuator does not reach its set speed.",
    "pressure-rating": "A pressure exceeds the rating of a pump, valve or cylinder.",
    "flow-rating": "The directional valve carries far more flow than it is rated for.",
    "overrunning-load": "A load that pulls the actuator would run away without a "
                        "counterbalance valve.",
    "hold-pressure": "The pump does not supply the pressure needed to hold the load.",
    "hold-at-limit": "The pump supplies just the pressure needed to hold the load, with no "
                     "margin for how exactly a valve can be set.",
    "motor-overload": "The drive motor is loaded beyond its rating.",
    "oil-temperature": "Without a cooler the oil would run hotter than its limit on "
                       "the hottest day.",
    "viscosity-window": "The oil is thinner or thicker than the pump allows at some "
                        "temperature it reaches.",
    "relief-passing": "Oil passes over the relief valve, which turns pump power into heat.",
    "intensification": "The cylinder multiplies pressure on its outlet side above "
                       "the supply pressure.",
    "cavitation": "A cylinder chamber falls close to vacuum: a risk of cavitation.",
    "speed-drift": "The actuator speed changes noticeably when the load changes.",
    "cooler-design": "No cooler of the chosen kind can keep the oil at its design "
                     "temperature on the hottest day.",
    "heat-calibration": "The measured heat is more than the modelled electricity can "
                        "supply: the energy cost shown reads low.",
    "correlation-range": "A tank surface sheds heat by a correlation used beyond its "
                         "tested range: that part of the cooling is an estimate.",
}


def _get(w, key):
    return w.get(key) if isinstance(w, dict) else getattr(w, key)


def warning_text(w, system: str = "si", with_phase: bool = False) -> str:
    """The designer's one-line message of warning *w* (a ``Warning_`` or its
    ``as_dict`` record) with its figures in *system*'s units ("si" or "us").

    >>> w = {"code": "pressure-rating", "phase": "press", "template": "pump pressure {0}",
    ...      "quantities": [{"value": 3.7e7, "kind": "pressure", "decimals": 0}]}
    >>> warning_text(w, "us", with_phase=True)
    'press: pump pressure 5,366 psi'
    """
    from heatload.units import fill, render

    if not isinstance(w, dict):
        text = render(w.template, system)
    elif "template" in w:
        text = fill(w["template"], w.get("quantities") or (), system)
    else:                                  # a record written before warnings carried data
        text = w["message"]
    if with_phase:
        return f"{_get(w, 'phase') or 'whole cycle'}: {text}"
    return text


def severity(code: str, blocking: bool = False) -> str:
    """"blocking", "attention" or "information" for a warning of *code*
    (*blocking*: the decision rule rules the circuit out by it)."""
    if blocking:
        return "blocking"
    return "information" if code in INFORMATION else "attention"


def severity_label(key: str) -> str:
    """The heading of severity *key* ("Rules the circuit out", ...)."""
    return dict(SEVERITIES)[key]


def sentence(code: str) -> str:
    """The plain sentence of warning *code* (the code itself, spaced, if new)."""
    return SENTENCES.get(code, code.replace("-", " ").capitalize() + ".")


def customer_warnings(records) -> list:
    """Warnings of one strategy in plain sentences, grouped by severity.

    Parameters
    ----------
    records : list of dict
        ``Warning_.as_dict`` records with a ``severity`` key (as in
        :func:`heatload.outputs.tables.strategy_record`).

    Returns
    -------
    list of (heading, [(sentence, phases), ...])
        Severities that occur, most serious first; each code once, with the
        phases it occurs in (``"whole cycle"`` for none).
    """
    out = []
    for key, heading in SEVERITIES:
        codes: dict = {}
        for w in records:
            if w.get("severity", severity(w["code"])) != key:
                continue
            phases = codes.setdefault(w["code"], [])
            ph = w.get("phase") or "whole cycle"
            if ph not in phases:
                phases.append(ph)
        if codes:
            out.append((heading, [(sentence(c), ph) for c, ph in codes.items()]))
    return out


#: How a count of one severity reads in a table cell (singular, plural).
_COUNT_WORDS = {"blocking": ("rules it out", "rule it out"),
                "attention": ("needs attention", "need attention"),
                "information": ("for information", "for information")}


def severity_counts(records) -> str:
    """A table cell for a strategy's warnings: how many of each severity, in
    words ("" for none).

    >>> severity_counts([{"code": "stall", "severity": "blocking"},
    ...                  {"code": "cavitation", "severity": "attention"},
    ...                  {"code": "relief-passing", "severity": "attention"}])
    '1 rules it out, 2 need attention'
    """
    n = {}
    for w in records:
        k = w.get("severity", severity(w["code"]))
        n[k] = n.get(k, 0) + 1
    return ", ".join(f"{n[k]} {_COUNT_WORDS[k][n[k] != 1]}" for k, _ in SEVERITIES if k in n)


# ---------------------------------------------------------------------------
# field paths in plain words

_PART_WORDS = {"power_unit": "", "pump": "pump", "motor": "drive motor",
               "relief": "relief valve", "directional_valve": "directional valve",
               "check_valve": "check valve", "pressure_line": "pressure line",
               "return_line": "return line", "ambient": "ambient", "reservoir": "tank",
               "fluid": "oil", "economics": "", "cooler": "cooler"}
_KEY_WORDS = {"temperature_max": "hottest-day temperature",
              "temperature": "temperature",
              "heat_transfer_factor": "heat-transfer factor",
              "cold_start_temperature": "cold-start temperature",
              "hydromechanical_efficiency": "hydro-mechanical efficiency",
              "fittings_k": "fittings loss coefficient",
              "inner_diameter": "inner diameter"}
_PLURAL = {"load": "loads", "speed": "speeds", "duration": "durations",
           "friction_force": "friction forces", "bore": "bores", "stroke": "strokes"}
_ITEM = re.compile(r"^(phases|actuators|strategies)(?:\[(\*|\d+)\])?$")


def _words(key: str) -> str:
    return _KEY_WORDS.get(key, key.replace("_", " "))


def plain_path(path: str, scenario=None) -> str:
    """A field path (:mod:`heatload.paths`) in plain words, for people who do
    not read the file format; show the path beside it as a tooltip.

    >>> plain_path("phases[*].load"), plain_path("ambient.temperature_max")
    ('phase loads', 'ambient hottest-day temperature')
    >>> plain_path("power_unit.pump.volumetric_efficiency")
    'pump volumetric efficiency'
    """
    parts = path.split(".")
    m = _ITEM.match(parts[0])
    if m and len(parts) >= 2:
        group, index, key = m.group(1), m.group(2), parts[-1]
        noun = group[:-1] if group != "strategies" else "strategy"
        if index == "*":
            return f"{noun} {_PLURAL.get(key, _words(key))}"
        if index is not None:
            name = str(int(index) + 1)
            items = getattr(scenario, group, None) if scenario is not None else None
            if items is not None and int(index) < len(items):
                name = getattr(items[int(index)], "name", name)
            return f"{_words(key)} of {noun} {name}"
        if len(parts) >= 3:                      # actuators.<name>.<key>
            return f"{_words(key)} of {noun} {parts[1]}"
    words = [w for w in (_PART_WORDS.get(p, _words(p)) for p in parts[:-1]) if w]
    return " ".join(words + [_words(parts[-1])])


def calibration_note(factor) -> str | None:
    """What the file's ``heat_calibration`` does, for every output that uses
    it; None when it is 1 (the model as it stands).

    >>> calibration_note(1.31)[:52]
    'Heat into the oil × 1.31 (heat_calibration, measured'
    >>> calibration_note(1.0) is None
    True
    """
    f = float(factor)
    if f == 1.0:
        return None
    return (f"Heat into the oil × {f:.3g} (heat_calibration, measured / model heat of the "
            "present circuit) for every strategy: oil temperatures, cooler duties and the "
            "cooler's price and fan include it; the circuits' electricity and their losses "
            "per phase and component are the model's at the oil temperature that follows, "
            "not scaled.")
