"""The scenario as an editable form, and back.

The page keeps the last *good* scenario as the TOML-ready dict of
:func:`heatload.io.scenario_to_dict` (quantities as strings with units, JSON
serialisable).  The form shows those quantities as bare numbers in the units
of the chosen system (SI or US customary, named in the column headers); a cell
a person leaves as shown keeps its exact stored value (so switching units or
editing one cell never rounds the others), a changed cell is parsed:

- a bare number is taken in the header's unit;
- a number with a unit (``"110 kN"``, ``"2300 psi"``) in any unit of the right kind;
- an empty cell removes an optional key; emptying a required one (a key
  number, a phase's name or motion, a moving phase's load and speed, an
  actuator's dimensions) is an error at that cell; ``full`` is the whole pump
  flow (speed).

Parsing goes through :func:`heatload.units.to_si` and the whole scenario
through :func:`heatload.io.scenario_from_dict`, so every rejection is a
:class:`heatload.errors.HeatloadError` naming its field (``phases[2].speed``);
the form shows it at that cell.
"""

from __future__ import annotations

import copy
import functools
import re
from dataclasses import dataclass

from heatload import io, units
from heatload.errors import HeatloadError

#: Significant figures of the numbers shown in editable fields.
EDIT_DIGITS = 4


@dataclass(frozen=True)
class Column:
    """One editable column: the TOML key, its header and its kind of quantity
    per actuator kind (``None`` for text and choice columns)."""

    key: str
    label: str
    cylinder: str | None = None
    motor: str | None = None
    choices: tuple = ()
    editable: bool = True
    #: needed in every row ("all") or in rows of moving phases ("moving")
    required: str | None = None

    def kind(self, actuator_kind: str) -> str | None:
        return self.motor if actuator_kind == "motor" else self.cylinder


PHASE_COLUMNS = (
    Column("name", "phase", required="all"),
    Column("actuator", "actuator"),
    Column("motion", "motion", choices=("extend", "retract", "hold", "idle", "run"),
           required="all"),
    Column("load", "load", "force", "torque", required="moving"),
    Column("speed", "speed", "velocity", "shaft_speed", required="moving"),
    Column("stroke", "stroke", "length", "length"),
    Column("duration", "duration", "time", "time"),
    Column("hold_pressure", "hold pressure", "pressure", "pressure"),
    Column("unloading", "unloading", choices=("centre", "relief", "held", "pilot-check")),
    # the further actuators moving in the phase ([[phases.simultaneous]]): shown,
    # kept as stored (edited in the file)
    Column("simultaneous", "moving with it", editable=False),
)

ACTUATOR_COLUMNS = (
    Column("name", "actuator", editable=False),
    Column("kind", "kind", editable=False),
    Column("bore", "bore", "length", None, required="all"),
    Column("rod", "rod", "length", None, required="all"),
    Column("stroke", "stroke", "length", None, required="all"),
    Column("friction_force", "seal friction", "force", None),
    Column("displacement", "displacement", None, "displacement", required="all"),
    Column("max_pressure", "rated pressure", "pressure", "pressure"),
)


@dataclass(frozen=True)
class KeyField:
    """An editable key number of the power unit, tank, site or economics."""

    path: tuple
    label: str
    kind: str
    unit_note: str = ""          # shown for dimensionless values
    required: bool = True        # emptying it is an error (else: back to the default)

    @property
    def field(self) -> str:
        return ".".join(self.path)


KEY_FIELDS = (
    KeyField(("power_unit", "pump", "displacement"), "pump displacement", "displacement"),
    KeyField(("power_unit", "pump", "shaft_speed"), "pump shaft speed", "shaft_speed"),
    KeyField(("power_unit", "pump", "volumetric_efficiency"), "pump volumetric efficiency",
             "dimensionless", "0..1"),
    KeyField(("power_unit", "relief", "cracking_pressure"), "relief setting", "pressure"),
    KeyField(("power_unit", "motor", "rated_power"), "drive motor rating", "power"),
    KeyField(("reservoir", "oil_volume"), "oil volume", "volume"),
    KeyField(("ambient", "temperature"), "ambient, typical", "temperature"),
    KeyField(("ambient", "temperature_max"), "ambient, hottest", "temperature"),
    KeyField(("cooler", "oil_temperature_max"), "design oil temperature", "temperature",
             required=False),
    KeyField(("economics", "hours_per_year"), "running hours", "dimensionless", "h/year"),
    KeyField(("economics", "electricity_price"), "electricity price",
             "specific_energy_price"),
    # measured / model heat from a temperature log (the "Temperature log" tab); empty = 1
    KeyField(("scenario", "heat_calibration"), "heat calibration (measured / model)",
             "dimensionless", "× model heat", required=False),
)


def unit_label(kind: str | None, system: str) -> str:
    """The unit a kind is shown in, as people write it (``bar``, ``°C``)."""
    if not kind or kind == "dimensionless":
        return ""
    return units.pretty_unit(units.display_unit(kind, system))


def _si_text(value: float, kind: str) -> str:
    """An exact, parseable text of an SI value (``repr`` keeps every bit)."""
    if kind == "dimensionless":
        return float(value)
    unit = "m^3/rev" if kind == "displacement" else units.KINDS[kind].si
    return f"{float(value)!r} {unit}"


def display_text(raw, kind: str | None, system: str) -> str:
    """The text a stored TOML value is shown as in an editable field."""
    if raw is None:
        return ""
    if kind is None:
        return str(raw)
    if isinstance(raw, str) and raw.strip().lower() == "full":
        return "full"
    try:
        si = units.to_si(raw, kind)
    except HeatloadError:
        return str(raw)
    if kind != "dimensionless":
        si = units.from_si(si, kind, units.display_unit(kind, system))
    return _trim(units.format_number(si, EDIT_DIGITS, group=False))


def _trim(text: str) -> str:
    """'100.0' -> '100', '0.9300' -> '0.93' (exponent forms left alone)."""
    if "." in text and "e" not in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


_NUMBER = re.compile(r"^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$")

#: The message of an emptied required cell.
REQUIRED = "required: enter a value (an empty cell is not allowed here)"

MOVING = ("extend", "retract", "run")


def _blank(text) -> bool:
    return text is None or (isinstance(text, str) and text.strip() == "")


def parse_text(text, previous, kind: str | None, system: str, field: str, allow_full=False):
    """Turn a field's text back into a TOML value (see the module notes).

    Returns ``None`` to remove the key.  Raises :class:`HeatloadError` naming
    *field* when the text is not a quantity of *kind*.

    A cell whose text, stored value, kind and units are those of an earlier
    call is not parsed again (an edit parses only the cells it changed); a
    refusal is never remembered, so its message always names this *field*.
    """
    try:
        return _parse_cached(text, previous, kind, system, field, allow_full)
    except TypeError:   # an unhashable stored value (a list): parse it afresh
        return _parse_text(text, previous, kind, system, field, allow_full)


@functools.lru_cache(maxsize=4096, typed=True)
def _parse_cached(text, previous, kind, system, field, allow_full):
    return _parse_text(text, previous, kind, system, field, allow_full)


def _parse_text(text, previous, kind, system, field, allow_full):
    if text is None:
        return None
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        text = repr(text)
    text = str(text).strip()
    if text == "":
        return None
    if kind is None:
        return text
    if text == display_text(previous, kind, system):
        return previous            # untouched: keep the exact stored value
    if allow_full and text.lower() == "full":
        return "full"
    if kind == "dimensionless":
        if _NUMBER.match(text):
            return float(text)
        return _si_text(units.to_si(text, kind, field=field), kind)
    if _NUMBER.match(text):
        unit = units.display_unit(kind, system)
        si = units.to_si(f"{text} {unit}", kind, field=field)
    else:
        si = units.to_si(text, kind, field=field)
    return _si_text(si, kind)


def _actuator_kinds(data: dict) -> dict:
    return {a.get("name"): a.get("kind", "cylinder") for a in data.get("actuators", [])}


def _column_header(col: Column, kinds_present: set, system: str) -> list:
    if col.cylinder is None and col.motor is None:
        return col.label
    shown = []
    for k in ("cylinder", "motor"):
        if k in kinds_present:
            u = unit_label(col.kind(k), system)
            if u and u not in shown:
                shown.append(u)
    return f"{col.label} [{' | '.join(shown)}]" if shown else col.label


def table_columns(columns, data: dict, system: str, section: str) -> list:
    """DataTable column definitions with the units in the headers."""
    kinds = set(_actuator_kinds(data).values()) or {"cylinder"}
    if section == "phases" and any(not p.get("actuator") for p in data.get("phases", [])):
        kinds.add("cylinder")
    out = []
    for c in columns:
        d = {"id": c.key, "name": _column_header(c, kinds, system), "editable": c.editable}
        if c.choices:
            d["presentation"] = "dropdown"
        out.append(d)
    return out


def _row_kind(section: str, item: dict, kinds: dict) -> str:
    if section == "actuators":
        return item.get("kind", "cylinder")
    return kinds.get(item.get("actuator"), "cylinder")


def table_rows(columns, data: dict, system: str, section: str) -> list:
    """The rows of a section (``phases`` or ``actuators``) as display text.

    Each row carries ``_i``, its index in the stored scenario, so a deleted
    row does not shift the others' stored values.
    """
    kinds = _actuator_kinds(data)
    rows = []
    for i, item in enumerate(data.get(section, [])):
        rk = _row_kind(section, item, kinds)
        row = {"_i": i}
        for c in columns:
            kind = c.kind(rk)
            if c.key == "simultaneous":
                row[c.key] = motions_text(item.get(c.key) or [], kinds, system)
            elif c.cylinder is not None or c.motor is not None:
                row[c.key] = display_text(item.get(c.key), kind, system) if kind else ""
            else:
                v = item.get(c.key)
                row[c.key] = "" if v is None else str(v)
        rows.append(row)
    return rows


def motions_text(items: list, kinds: dict, system: str) -> str:
    """A phase's simultaneous motions in one cell: ``door extend 4 kN at 0.04 m/s``
    (quantities in *system*'s units), ``;`` between them."""
    out = []
    for x in items:
        motor = kinds.get(x.get("actuator")) == "motor"
        words = [str(x.get("actuator", "")), str(x.get("motion", ""))]
        if x.get("load") is not None:
            words.append(_with_unit(x["load"], "torque" if motor else "force", system))
        if x.get("speed") is not None:
            words.append("at " + _with_unit(x["speed"], "shaft_speed" if motor else "velocity",
                                            system))
        if x.get("hold_pressure") is not None:
            words.append("at " + _with_unit(x["hold_pressure"], "pressure", system))
        out.append(" ".join(words))
    return "; ".join(out)


def _with_unit(raw, kind: str, system: str) -> str:
    return f"{display_text(raw, kind, system)} {unit_label(kind, system)}"


def _get(data: dict, path: tuple):
    d = data
    for p in path:
        if not isinstance(d, dict) or p not in d:
            return None
        d = d[p]
    return d


def _set(data: dict, path: tuple, value) -> None:
    d = data
    for p in path[:-1]:
        d = d.setdefault(p, {})
    if value is None:
        d.pop(path[-1], None)
    else:
        d[path[-1]] = value


def key_values(data: dict, system: str) -> list:
    """The key numbers' texts, in :data:`KEY_FIELDS` order."""
    return [display_text(_get(data, f.path), f.kind, system) for f in KEY_FIELDS]


def key_units(system: str, data: dict | None = None) -> list:
    """The unit shown beside each key number (prices per kWh in the scenario's currency)."""
    currency = ((data or {}).get("economics") or {}).get("currency") or ""
    out = []
    for f in KEY_FIELDS:
        if f.kind == "specific_energy_price":
            out.append(f"{currency}/kWh".strip())
        else:
            out.append(unit_label(f.kind, system) or f.unit_note)
    return out


def render_form(data: dict, system: str) -> dict:
    """Everything the form shows for a stored scenario in *system*."""
    return {
        "phase_rows": table_rows(PHASE_COLUMNS, data, system, "phases"),
        "phase_columns": table_columns(PHASE_COLUMNS, data, system, "phases"),
        "actuator_rows": table_rows(ACTUATOR_COLUMNS, data, system, "actuators"),
        "actuator_columns": table_columns(ACTUATOR_COLUMNS, data, system, "actuators"),
        "key_values": key_values(data, system),
        "key_units": key_units(system, data),
    }


def _typed(text, kind: str | None, system: str) -> str:
    """What the user typed, as the error message should show it: a bare number
    with the unit the form takes it in."""
    t = str(text).strip()
    if kind and kind != "dimensionless" and _NUMBER.match(t):
        unit = units.pretty_unit(units.display_unit(kind, system))
        return f"{t} {unit}".strip()
    return t


def _remember(typed: dict, value, text, kind, system) -> None:
    # the loader checks the exact SI text the form made; its messages quote it
    if isinstance(value, str) and text is not None and value != str(text).strip():
        typed[value] = _typed(text, kind, system)


def _apply_rows(new: dict, old: dict, columns, rows, system: str, section: str,
                errors: list, kinds: dict, typed: dict | None = None) -> None:
    old_items = old.get(section, [])
    items = []
    for pos, row in enumerate(rows or []):
        i = row.get("_i")
        prev = old_items[i] if isinstance(i, int) and 0 <= i < len(old_items) else {}
        item = copy.deepcopy(prev)
        prev_kind = _row_kind(section, prev, _actuator_kinds(old))
        for c in columns:
            if not c.editable:
                continue
            field = f"{section}[{pos}].{c.key}"
            need = c.required == "all" or (c.required == "moving"
                                           and row.get("motion") in MOVING)
            if need and _blank(row.get(c.key)) and (c.kind(prev_kind) is not None
                                                    or c.cylinder is None and c.motor is None):
                errors.append((field, REQUIRED))
                continue
            if c.cylinder is None and c.motor is None:
                v = parse_text(row.get(c.key), prev.get(c.key), None, system, field)
                _set(item, (c.key,), v)
                continue
            row_kind = (_row_kind(section, {"actuator": row.get("actuator")}, kinds)
                        if section == "phases" else prev_kind)
            kind = c.kind(row_kind)
            if kind is None:
                continue
            previous = prev.get(c.key) if prev_kind == row_kind else None
            try:
                v = parse_text(row.get(c.key), previous, kind, system, field,
                               allow_full=(c.key == "speed"))
            except HeatloadError as e:
                errors.append((e.field or field, e.message))
                continue
            if typed is not None:
                _remember(typed, v, row.get(c.key), kind, system)
            _set(item, (c.key,), v)
        items.append(item)
    new[section] = items


def apply_form(data: dict, phase_rows, actuator_rows, values, system: str,
               source: str = "dashboard"):
    """Merge the form into the stored scenario dict and validate it.

    Parameters
    ----------
    data : dict
        The last good scenario (:func:`heatload.io.scenario_to_dict`).
    phase_rows, actuator_rows : list of dict
        The tables' rows as the page holds them.
    values : list of str
        The key numbers' texts in :data:`KEY_FIELDS` order.
    system : str
        'si' or 'us': the units bare numbers are taken in.

    Returns
    -------
    (Scenario or None, dict, list)
        The validated scenario (``None`` on any error), the merged dict and
        the errors as ``(field, message)`` pairs.
    """
    new = copy.deepcopy(data)
    errors: list = []
    typed: dict = {}
    if actuator_rows is not None:
        _apply_rows(new, data, ACTUATOR_COLUMNS, actuator_rows, system, "actuators",
                    errors, _actuator_kinds(data), typed)
    kinds = _actuator_kinds(new)
    if phase_rows is not None:
        _apply_rows(new, data, PHASE_COLUMNS, phase_rows, system, "phases", errors, kinds,
                    typed)
    for f, text in zip(KEY_FIELDS, values or []):
        if f.required and _blank(text):
            errors.append((f.field, REQUIRED))
            continue
        try:
            v = parse_text(text, _get(data, f.path), f.kind, system, f.field)
        except HeatloadError as e:
            errors.append((e.field or f.field, e.message))
            continue
        _remember(typed, v, text, f.kind, system)
        _set(new, f.path, v)
    if errors:
        return None, new, errors
    try:
        scenario = io.scenario_from_dict(new, source=source)
    except HeatloadError as e:
        message = e.message
        for si, shown in typed.items():      # quote what was typed, not its SI form
            message = message.replace(repr(si), repr(shown))
        return None, new, [(e.field, message)]
    return scenario, new, []


_CELL = re.compile(r"^(phases|actuators)\[(\d+)\](?:\.([A-Za-z_]+))?")


def locate(field: str | None):
    """Where a field path is shown: ``("phases", row, column)``,
    ``("key", index)`` or ``("form", None)``."""
    if field:
        mt = _CELL.match(field)
        if mt:
            return (mt.group(1), int(mt.group(2)), mt.group(3))
        for i, f in enumerate(KEY_FIELDS):
            if field == f.field or field.startswith(f.field + "."):
                return ("key", i, None)
    return ("form", None, None)


def scenario_data(text: str, source: str):
    """Parse a duty-cycle text and return ``(Scenario, canonical dict)``."""
    scenario = io.loads_scenario(text, source=source)
    return scenario, io.scenario_to_dict(scenario)
