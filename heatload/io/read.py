"""Read duty-cycle files: TOML text -> a validated :class:`~heatload.model.Scenario`.

Loading validates everything that can be judged from the file alone (units,
signs, plausible magnitudes, names that refer to each other, required keys,
unknown keys with a suggestion) and raises :class:`~heatload.errors.HeatloadError`
whose one-line text starts with the file name and line and names the field.
Inputs are checked here once; the solver trusts a loaded scenario.  Physics
checks that need a solved operating point belong to other modules.
"""

from __future__ import annotations

import dataclasses
import re
import stat
from pathlib import Path

import numpy as np

from heatload import model as m
from heatload.errors import HeatloadError
from heatload.cooling.cooler_types import cooler_type
from heatload.io.schema import (_MOTION, MAX_AREA_RATIO, MAX_PHASE_DURATION, MIN_OIL_VOLUME,
                                _AMBIENT, _COOLER, _CYLINDER, _ECONOMICS, _F, _FLUID,
                                _HYDRAULIC_MOTOR, _PARAMETERS, _PHASE, _POWER_UNIT, _REPEAT,
                                _LIMITS, _RESERVOIR, _SCENARIO, _STRATEGY, _SURFACE, _TOP,
                                _UNCERTAINTY, _array, _err, _read, _show, _suggest, _table,
                                _value, ceiling_of)


# ---------------------------------------------------------------------------
# Sections
# ---------------------------------------------------------------------------

def _fluid(data, source: str) -> m.Fluid:
    path = "fluid"
    _table(data, _FLUID, path, source)
    vals = _read(data, _FLUID, path, source, skip=("viscosity_points",))
    base = m.Fluid()
    points = ()
    if "viscosity_points" in data:
        points = _points(data["viscosity_points"], source)
    grade = vals.get("iso_grade")
    if grade is None and ("nu40" in vals or points):
        # A fluid given by its viscosity is not an ISO grade unless it says so.
        vals["iso_grade"] = None
    if "nu40" not in vals:
        if grade is not None:
            from heatload.properties import oil

            try:
                vals["nu40"] = float(oil.iso_grade_viscosity(grade)[0])  # (mid, low, high)
            except HeatloadError as e:
                raise _err(e.message, "fluid.iso_grade", source) from None
        elif "nu100" in vals:
            raise _err("nu100 given without nu40 or iso_grade", "fluid.nu40", source)
    nu40 = vals.get("nu40", base.nu40)
    if grade is not None and not 0.9 * grade * 1e-6 <= nu40 <= 1.1 * grade * 1e-6:
        raise _err(f"{nu40 * 1e6:.4g} mm^2/s is outside ISO VG {grade} "
                   f"({0.9 * grade:.4g}..{1.1 * grade:.4g} mm^2/s, ISO 3448)",
                   "fluid.nu40", source)
    if "nu100" not in vals and (vals.get("viscosity_index") is not None
                                or "nu40" in vals):
        from heatload.properties import oil

        vi = vals.get("viscosity_index", 100.0)   # common practice for HM oils
        try:
            vals["nu100"] = float(oil.nu100_from_vi(nu40, vi))
        except HeatloadError as e:
            raise _err(e.message, e.field or "fluid.viscosity_index", source) from None
    nu100 = vals.get("nu100", base.nu100)
    if not nu100 < nu40:
        raise _err(f"nu100 ({nu100 * 1e6:.4g} mm^2/s) must be below nu40 "
                   f"({nu40 * 1e6:.4g} mm^2/s)", "fluid.nu100", source)
    if "name" not in vals:
        # the default name says the default grade: a file giving another grade, or
        # its own viscosity, without a name must not be printed as ISO VG 46
        g = vals.get("iso_grade", base.iso_grade)
        vals["name"] = (f"ISO VG {g:g} mineral oil" if g is not None
                        else f"mineral oil of {nu40 * 1e6:.4g} mm²/s at 40 °C")
    fluid = dataclasses.replace(base, **vals, viscosity_points=points)
    if not fluid.temperature_min < fluid.temperature_max:
        raise _err("temperature_min must be below temperature_max",
                   "fluid.temperature_max", source)
    return fluid


def _points(raw, source: str) -> tuple:
    path = "fluid.viscosity_points"
    if not isinstance(raw, list) or len(raw) < 2:
        raise _err("expected at least two [temperature, viscosity] pairs such as "
                   "[[\"20 degC\", \"120 mm^2/s\"], [\"40 degC\", \"46 mm^2/s\"]]",
                   path, source)
    out = []
    for i, pair in enumerate(raw):
        p = f"{path}[{i}]"
        if not isinstance(pair, list) or len(pair) != 2:
            raise _err(f"expected a [temperature, viscosity] pair, got {pair!r}", p, source)
        t = _value(pair[0], _F("temperature", "pos"), p, source)
        nu = _value(pair[1], _F("kinematic_viscosity", "pos"), p, source)
        out.append((t, nu))
    temps = [t for t, _ in out]
    if len(set(temps)) != len(temps):
        raise _err("two points at the same temperature", path, source)
    return tuple(out)


def _simple(data, spec, path, source, default):
    _table(data, spec, path, source)
    return dataclasses.replace(default, **_read(data, spec, path, source))


def _ambient(data, source):
    a = _simple(data, _AMBIENT, "ambient", source, m.Ambient())
    if a.temperature > a.temperature_max:
        raise _err("the typical temperature is above temperature_max",
                   "ambient.temperature", source)
    return a


def _reservoir(data, source):
    path = "reservoir"
    _table(data, _RESERVOIR, path, source)
    vals = _read(data, _RESERVOIR, path, source, skip=("surfaces",))
    surfaces = []
    if "surfaces" in data:
        items = _array(data["surfaces"], "reservoir.surfaces", source)
        names = set()
        for i, item in enumerate(items):
            p = f"reservoir.surfaces[{i}]"
            _table(item, _SURFACE, p, source)
            s = m.Surface(**_read(item, _SURFACE, p, source))
            if s.name in names:
                raise _err(f"duplicate surface name {s.name!r}", f"{p}.name", source)
            names.add(s.name)
            surfaces.append(s)
    r = dataclasses.replace(m.Reservoir(), **vals, surfaces=tuple(surfaces))
    tank = r.length * r.width * r.height
    if tank < MIN_OIL_VOLUME:
        raise _err(f"the tank's outside dimensions hold {tank * 1e3:.3g} L, below the least "
                   f"oil of a compact power unit (0.1 L); check the units",
                   "reservoir.length", source)
    if r.oil_volume > tank * (1 + 1e-12):
        given = ", ".join(k for k in ("length", "width", "height") if k in vals)
        dims = ("its dimensions" if given else "the default dimensions") + (
            f" {r.length:g} x {r.width:g} x {r.height:g} m")
        raise _err(f"{r.oil_volume * 1e3:.4g} L of oil cannot be in a tank of "
                   f"{tank * 1e3:.4g} L ({dims}); check the unit or give the tank's "
                   f"length, width and height", "reservoir.oil_volume", source)
    return r


def _power_unit(data, source):
    _table(data, {k: _F("table") for k in _POWER_UNIT}, "power_unit", source)
    base = m.PowerUnit()
    parts = {}
    for key, spec in _POWER_UNIT.items():
        if key in data:
            parts[key] = _simple(data[key], spec, f"power_unit.{key}", source,
                                 getattr(base, key))
    pu = dataclasses.replace(base, **parts)
    if not pu.pump.viscosity_min < pu.pump.viscosity_max:
        raise _err("viscosity_min must be below viscosity_max",
                   "power_unit.pump.viscosity_min", source)
    pump = pu.pump
    if not pump.viscosity_min <= pump.rated_viscosity <= pump.viscosity_max:
        raise _err(f"the datasheet point's viscosity, {pump.rated_viscosity * 1e6:.4g} mm²/s, "
                   f"lies outside the pump's own allowed window "
                   f"{pump.viscosity_min * 1e6:.4g} .. {pump.viscosity_max * 1e6:.4g} mm²/s "
                   f"(viscosity_min .. viscosity_max): no datasheet gives efficiencies where "
                   f"the pump may not run; expected a kinematic viscosity inside it (e.g. "
                   f"\"32 mm^2/s\"; check the unit)", "power_unit.pump.rated_viscosity", source)
    # the pump's own flow, displacement x speed, holds the flow's magnitude limit
    # that every given flow holds (a slipped unit in either)
    q_max, q_text = _LIMITS["flow"]
    q = pump.displacement * pump.shaft_speed
    if q > q_max * (1 + 1e-12):
        raise _err(f"{pump.displacement * 1e6:.4g} cm³/rev at {pump.shaft_speed * 60:.4g} rpm "
                   f"delivers {q * 6e4:,.0f} L/min, beyond any plausible machine (limit "
                   f"{q_text}); check the units of the displacement and the speed",
                   "power_unit.pump.displacement", source)
    if pu.check_valve.pressure_drop < pu.check_valve.cracking_pressure:
        raise _err("the drop at rated flow includes the cracking pressure, so it "
                   "cannot be smaller", "power_unit.check_valve.pressure_drop", source)
    for key in ("pressure_line", "return_line"):
        line = getattr(pu, key)
        if line.roughness >= line.inner_diameter:
            raise _err("roughness must be far smaller than the inner diameter",
                       f"power_unit.{key}.roughness", source)
    return pu


def _actuators(data, source):
    items = _array(data, "actuators", source)
    if not items:
        raise _err("at least one actuator is needed", "actuators", source)
    out, names = [], set()
    for i, item in enumerate(items):
        p = f"actuators[{i}]"
        kind = item.get("kind") if isinstance(item, dict) else None
        spec = _HYDRAULIC_MOTOR if kind == "motor" else _CYLINDER
        if kind is not None:
            _value(kind, spec["kind"], f"{p}.kind", source)
        _table(item, spec, p, source)
        vals = _read(item, spec, p, source, skip=("kind",))
        if vals["name"] in names:
            raise _err(f"duplicate actuator name {vals['name']!r}", f"{p}.name", source)
        names.add(vals["name"])
        if kind == "motor":
            out.append(m.HydraulicMotor(**vals))
        else:
            if not vals["rod"] < vals["bore"]:
                raise _err(f"the rod ({_show(item['rod'])}) must be smaller than the "
                           f"bore ({_show(item['bore'])})", f"{p}.rod", source)
            from heatload.components.actuators import cylinder_areas

            cap, annulus = (float(a) for a in cylinder_areas(vals["bore"], vals["rod"]))
            if cap > MAX_AREA_RATIO * annulus:
                raise _err(f"a rod of {_show(item['rod'])} in a {_show(item['bore'])} bore "
                           f"leaves an annulus of {100 * annulus / cap:.3g} % of the bore "
                           f"area (area ratio {cap / annulus:.4g}); a cylinder's area ratio "
                           f"is at most {MAX_AREA_RATIO:g} (d/D about 0.95)", f"{p}.rod", source)
            out.append(m.Cylinder(**vals))
    return tuple(out)


_CYLINDER_MOTIONS = ("extend", "retract", "hold")
_MOTOR_MOTIONS = ("run", "hold")


def _phases(data, actuators, source):
    items = _array(data, "phases", source)
    if not items:
        raise _err("the duty cycle needs at least one phase", "phases", source)
    if len(items) > MAX_PHASES:
        raise _err(f"{len(items)} phases; a duty cycle has at most {MAX_PHASES} (merge "
                   f"repeated steps into one phase with their total duration)", "phases", source)
    by_name = {a.name: a for a in actuators}
    out, names = [], set()
    for i, item in enumerate(items):
        out.append(_phase(item, i, by_name, source))
        if out[-1].name in names:
            raise _err(f"duplicate phase name {out[-1].name!r}", f"phases[{i}].name",
                       source)
        names.add(out[-1].name)
    return tuple(out)


def _repeats(data, phases, source) -> tuple:
    """``[[repeats]]``: blocks of consecutive phases run *count* times per cycle."""
    items = _array(data, "repeats", source)
    names = [p.name for p in phases]
    taken = [None] * len(names)
    out = []
    for i, item in enumerate(items):
        p = f"repeats[{i}]"
        _table(item, _REPEAT, p, source)
        vals = _read(item, _REPEAT, p, source)
        for key in ("first", "last"):
            if key in vals and vals[key] not in names:
                raise _err(f"no phase called {vals[key]!r}{_suggest(vals[key], names)}",
                           f"{p}.{key}", source)
        first = vals["first"]
        last = vals.get("last", first)
        a, b = names.index(first), names.index(last)
        if b < a:
            raise _err(f"{last!r} comes before {first!r} in [[phases]]; a block runs from "
                       f"its first phase to its last", f"{p}.last", source)
        count = vals["count"]
        if count != int(count):
            raise _err(f"count must be a whole number of passes, not {count:g}",
                       f"{p}.count", source)
        for j in range(a, b + 1):
            if taken[j] is not None:
                raise _err(f"phase {names[j]!r} is already in repeats[{taken[j]}]; blocks "
                           f"may not overlap", f"{p}.first", source)
            taken[j] = i
        out.append(m.Repeat(first=first, last=last, count=int(count)))
    return tuple(out)


def _named_actuator(item, by_name, p, source):
    """The actuator *item* names (``<p>.actuator``); a one-line error naming
    the choices when there is none of that name."""
    aname = _value(item["actuator"], _PHASE["actuator"], f"{p}.actuator", source)
    act = by_name.get(aname)
    if act is None:
        raise _err(f"no actuator called {aname!r} (actuators: "
                   f"{', '.join(by_name)}){_suggest(aname, by_name)}",
                   f"{p}.actuator", source)
    return act


def _simultaneous(items, phase, p, by_name, source) -> tuple:
    """``[[phases.simultaneous]]``: further actuators' motions in phase *phase*
    (its own motion read already), on the same supply."""
    if not isinstance(items, list) or not all(isinstance(x, dict) for x in items):
        raise _err("expected an array of tables, written as [[phases.simultaneous]] items",
                   f"{p}.simultaneous", source)
    if items and (phase.motion not in ("extend", "retract", "run") or phase.speed is None):
        raise _err("a phase with simultaneous motions needs its own motion at a set speed "
                   "(the motions share the pump by their set flows)", f"{p}.speed", source)
    out, seen = [], {phase.actuator}
    for j, item in enumerate(items):
        q = f"{p}.simultaneous[{j}]"
        _table(item, _MOTION, q, source)
        act = _named_actuator(item, by_name, q, source)
        aname = act.name
        if aname in seen:
            raise _err(f"{aname!r} already moves in this phase; an actuator makes one "
                       f"motion at a time", f"{q}.actuator", source)
        seen.add(aname)
        motion = _value(item["motion"], _MOTION["motion"], f"{q}.motion", source)
        is_motor = act.kind == "motor"
        allowed = _MOTOR_MOTIONS if is_motor else _CYLINDER_MOTIONS
        if motion not in allowed:
            raise _err(f"a {act.kind} cannot {motion}; use one of {', '.join(allowed)}",
                       f"{q}.motion", source)
        vals = {"actuator": aname, "motion": motion}
        if "load" in item:
            vals["load"] = _value(item["load"], _MOTION["load"], f"{q}.load", source,
                                  kind="torque" if is_motor else "force")
        if motion == "hold":
            if "speed" in item:
                raise _err("a hold has no speed", f"{q}.speed", source)
        elif "speed" not in item or item["speed"] == "full":
            raise _err(f"give the {motion} motion its set speed (m/s, or rpm for a motor): "
                       f"simultaneous motions share the pump by their set flows",
                       f"{q}.speed", source)
        else:
            vals["speed"] = _value(item["speed"], _MOTION["speed"], f"{q}.speed", source,
                                   kind="shaft_speed" if is_motor else "velocity")
        for key in ("hold_pressure", "hold_force", "compress", "regeneration"):
            if key in item:
                vals[key] = _value(item[key], _MOTION[key], f"{q}.{key}", source)
        for key in ("hold_pressure", "hold_force"):
            if key in vals and motion != "hold":
                raise _err(f"only a hold has {key}", f"{q}.{key}", source)
        if "hold_pressure" in vals and "hold_force" in vals:
            raise _err("give hold_pressure or hold_force, not both", f"{q}.hold_force",
                       source)
        if "hold_force" in vals and is_motor:
            raise _err("a motor holds a torque (load) or a pressure, not a force",
                       f"{q}.hold_force", source)
        if vals.get("regeneration") and (is_motor or motion != "extend"):
            raise _err("only an extending cylinder can regenerate (its rod side joined to "
                       "the cap side)", f"{q}.regeneration", source)
        out.append(m.Motion(**vals))
    return tuple(out)


def _phase(item, i, by_name, source):
    p = f"phases[{i}]"
    if isinstance(item, dict) and "simultaneous" in item:
        # further motions at the same time, on the same supply: read after the phase
        together = item["simultaneous"]
        item = {k: v for k, v in item.items() if k != "simultaneous"}
        phase = _phase(item, i, by_name, source)
        motions = _simultaneous(together, phase, p, by_name, source)
        return dataclasses.replace(phase, simultaneous=motions)
    _table(item, _PHASE, p, source)
    motion = _value(item["motion"], _PHASE["motion"], f"{p}.motion", source)
    name = _value(item["name"], _PHASE["name"], f"{p}.name", source)
    act = None
    if motion == "idle":
        for key in ("actuator", "load", "speed", "stroke", "hold_pressure", "hold_force"):
            if key in item:
                raise _err("an idle phase moves no actuator; leave this key out",
                           f"{p}.{key}", source)
    else:
        if "actuator" not in item:
            raise _err(f"a {motion} phase needs the actuator it drives", f"{p}.actuator",
                       source)
        act = _named_actuator(item, by_name, p, source)
        allowed = _MOTOR_MOTIONS if act.kind == "motor" else _CYLINDER_MOTIONS
        if motion not in allowed:
            raise _err(f"a {act.kind} cannot {motion}; use one of {', '.join(allowed)}",
                       f"{p}.motion", source)
    is_motor = act is not None and act.kind == "motor"
    vals = {"name": name, "motion": motion, "actuator": act.name if act else None}
    if "load" in item:
        vals["load"] = _value(item["load"], _PHASE["load"], f"{p}.load", source,
                              kind="torque" if is_motor else "force")
    if "speed" in item:
        if motion in ("hold", "idle"):
            raise _err(f"a {motion} phase has no speed", f"{p}.speed", source)
        if item["speed"] != "full":
            vals["speed"] = _value(item["speed"], _PHASE["speed"], f"{p}.speed", source,
                                   kind="shaft_speed" if is_motor else "velocity")
    for key in ("stroke", "duration", "hold_pressure", "hold_force", "unloading",
                "compress", "regeneration"):
        if key in item:
            vals[key] = _value(item[key], _PHASE[key], f"{p}.{key}", source)
    if vals.get("regeneration") and (is_motor or motion != "extend"):
        raise _err("only an extending cylinder can regenerate (its rod side joined to the "
                   "cap side)", f"{p}.regeneration", source)
    if "stroke" in vals:
        if is_motor or motion not in ("extend", "retract"):
            raise _err("only an extending or retracting cylinder has a stroke; give a "
                       "duration", f"{p}.stroke", source)
        if vals["stroke"] > act.stroke * (1 + 1e-12):
            raise _err(f"{_show(item['stroke'])} is longer than the stroke of "
                       f"{act.name!r}", f"{p}.stroke", source)
    if motion in ("extend", "retract") and "stroke" not in vals and "duration" not in vals:
        article = "an" if motion == "extend" else "a"
        raise _err(f"{article} {motion} phase needs a stroke or a duration", f"{p}.stroke",
                   source)
    if motion in ("hold", "idle", "run") and "duration" not in vals:
        raise _err(f"a {motion} phase needs a duration", f"{p}.duration", source)
    for key in ("hold_pressure", "hold_force"):
        if key in vals and motion != "hold":
            raise _err(f"only a hold phase has {key}", f"{p}.{key}", source)
    if "hold_pressure" in vals and "hold_force" in vals:
        raise _err("give hold_pressure or hold_force, not both", f"{p}.hold_force", source)
    if "hold_force" in vals and is_motor:
        raise _err("a motor holds a torque (load) or a pressure, not a force",
                   f"{p}.hold_force", source)
    return m.Phase(**vals)


def _strategies(data, defaults: dict, source):
    if data is None:
        return tuple(m.Strategy(kind=k, parameters=m.StrategyParameters(**defaults))
                     for k in m.STRATEGIES)
    items = _array(data, "strategies", source)
    if not items:
        raise _err("leave out [[strategies]] to compare all of them, or list at least one",
                   "strategies", source)
    out, names = [], set()
    for i, item in enumerate(items):
        p = f"strategies[{i}]"
        _table(item, _STRATEGY, p, source)
        vals = _read(item, _STRATEGY, p, source)
        kind = vals.pop("kind")
        label = vals.pop("label", None)
        params = _parameters({**defaults, **vals}, p, source)
        s = m.Strategy(kind=kind, label=label, parameters=params)
        if s.name in names:
            raise _err(f"two strategies are called {s.name!r}; give a distinct label",
                       f"{p}.label", source)
        names.add(s.name)
        out.append(s)
    return tuple(out)


def _parameters(vals: dict, path: str, source) -> m.StrategyParameters:
    params = m.StrategyParameters(**vals)
    if not params.min_speed_fraction < params.max_speed_fraction:
        raise _err("min_speed_fraction must be below max_speed_fraction",
                   f"{path}.min_speed_fraction", source)
    if not params.high_pressure_fraction < 1.0:
        raise _err("high_pressure_fraction must be below 1 (the large pump's share is "
                   "what is left)", f"{path}.high_pressure_fraction", source)
    lo, hi, pre = (params.accumulator_pressure_min, params.accumulator_pressure_max,
                   params.accumulator_precharge)
    if lo is not None and hi is not None and not lo < hi:
        raise _err("accumulator_pressure_min must be below accumulator_pressure_max",
                   f"{path}.accumulator_pressure_min", source)
    if pre is not None and lo is not None and pre > lo:
        raise _err("accumulator_precharge must not exceed accumulator_pressure_min (the "
                   "bladder would bottom out inside the working range)",
                   f"{path}.accumulator_precharge", source)
    return params


_SHIFT_KEYS = ("hours_per_shift", "shifts_per_day", "days_per_week")


def _economics(data, strategies, source, shift_given=False):
    e = _simple(data, _ECONOMICS, "economics", source, m.Economics())
    given = [k for k in _SHIFT_KEYS if k in data]
    if given or "weeks_per_year" in data:
        missing = [k for k in _SHIFT_KEYS if k not in data]
        if missing:
            raise _err(f"a shift pattern needs {', '.join(_SHIFT_KEYS)}; "
                       f"{missing[0]} is missing", f"economics.{missing[0]}", source)
        if "hours_per_year" in data:
            raise _err("give hours_per_year or a shift pattern (hours_per_shift, "
                       "shifts_per_day, days_per_week), not both",
                       "economics.hours_per_year", source)
        if shift_given:
            raise _err("with a shift pattern the warm-up runs over one day's hours from "
                       "cold; leave shift_duration out", "scenario.shift_duration", source)
        if e.hours_per_shift * e.shifts_per_day > 24.0 * (1 + 1e-12):
            raise _err(f"{e.hours_per_shift:g} h x {e.shifts_per_day:g} shifts is more than "
                       f"a day (24 h)", "economics.shifts_per_day", source)
        e = dataclasses.replace(e, hours_per_year=m.shift_hours(e)[0])
    if e.present_strategy is not None:
        names = [s.name for s in strategies] + [s.kind for s in strategies]
        if e.present_strategy not in names:
            raise _err(f"{e.present_strategy!r} is not among the strategies "
                       f"({', '.join(s.name for s in strategies)})"
                       f"{_suggest(e.present_strategy, names)}",
                       "economics.present_strategy", source)
    return e


# ---------------------------------------------------------------------------
# Uncertain inputs: field paths of the one grammar (heatload.paths)
# ---------------------------------------------------------------------------

def _path_ref(path: str, scenario: m.Scenario, field: str, source):
    """Resolve an uncertainty *path* by :func:`heatload.paths.resolve_path` (the
    grammar sweeps and the Monte Carlo read), so a file that loads never names a
    path they cannot vary; the error names the file's field."""
    from heatload import paths

    try:
        return paths.resolve_path(scenario, path)
    except HeatloadError as e:
        raise _err(e.message, field, source) from None


_PERCENT = re.compile(r"^\s*([+-]?\d+(?:\.\d*)?(?:[eE][+-]?\d+)?)\s*%\s*$")


def _bounds_hold_the_field(u: m.UncertainInput, ref, p: str, source, scenario) -> None:
    """The values an uncertain input's bounds give must be values its field may
    take, or the Monte Carlo would sample machines that cannot exist: the
    machine with the field at each bound goes through this loader's own checks
    (the field's sign rule, plausible range and magnitude limit, and the rules
    between fields such as oil within its tank or the design oil temperature
    within the fluid's limit), as ``sweep --vary`` does with its ranges; then the
    bound is held to the range every field path holds
    (:func:`heatload.paths.allowed_range`)."""
    from heatload import paths
    from heatload.io.write import scenario_to_dict
    from heatload.units import format_quantity

    for key in ("low", "high"):
        bound = getattr(u, key)
        values = ([None if v is None else v * bound for v in ref.nominal] if u.relative
                  else [bound] * len(ref.targets))
        if ref.targets != (("reservoir", "heat_transfer_factor"),):
            # a file field: the loader's own message says best what is wrong
            variant = paths.replaced_scenario(dataclasses.replace(scenario, uncertainty=()),
                                              {ref.path: values})
            try:
                scenario_from_dict(scenario_to_dict(variant), source)
            except HeatloadError as e:
                shown = sorted({v for v in values if v is not None})
                shown = (", ".join(format_quantity(v, ref.kind) for v in shown[:3])
                         + (" ..." if len(shown) > 3 else "") if ref.kind else "")
                raise _err(f"this bound gives {u.path} {shown or 'values'} the file itself "
                           f"could not hold: {e.field + ': ' if e.field else ''}{e.message}",
                           f"{p}.{key}", source) from None
        # the range every path holds its values to (a factor on the computed UA has
        # no file field; for the rest it repeats what the loader found)
        try:
            paths._check_values(ref, values, scenario, per_target=True)
        except HeatloadError as e:
            raise _err(f"this bound gives {u.path} a value it cannot take: {e.message}",
                       f"{p}.{key}", source) from None


def _uncertainty(data, scenario: m.Scenario, source):
    items = _array(data, "uncertainty", source)
    out = []
    for i, item in enumerate(items):
        p = f"uncertainty[{i}]"
        _table(item, _UNCERTAINTY, p, source)
        path = _value(item["path"], _UNCERTAINTY["path"], f"{p}.path", source)
        relative = _value(item.get("relative", True), _UNCERTAINTY["relative"],
                          f"{p}.relative", source)
        dist = _value(item.get("distribution", "uniform"), _UNCERTAINTY["distribution"],
                      f"{p}.distribution", source)
        ref = _path_ref(path, scenario, f"{p}.path", source)
        kind, nominal = ref.kind, ref.nominal
        if relative and all(v is None for v in nominal):
            raise _err(f"{path!r} has no value to scale; give absolute bounds with "
                       "relative = false", f"{p}.relative", source)
        if not relative and kind is None:
            raise _err(f"{path!r} mixes cylinders and motors; use relative bounds",
                       f"{p}.relative", source)
        vals = {}
        for key in ("low", "high", "mode"):
            if key not in item:
                continue
            raw = item[key]
            fp = f"{p}.{key}"
            if relative:
                mt = _PERCENT.match(raw) if isinstance(raw, str) else None
                if mt:
                    vals[key] = 1.0 + float(mt.group(1)) / 100.0
                elif isinstance(raw, (int, float)) and not isinstance(raw, bool):
                    vals[key] = _value(raw, _F("dimensionless"), fp, source)
                else:
                    raise _err(f"expected a factor such as 0.9 or a percentage such as "
                               f"'-10 %', got {_show(raw)}", fp, source)
            else:
                vals[key] = _value(raw, _F(kind), fp, source)
        u = m.UncertainInput(path=path, distribution=dist, relative=relative, **vals)
        if not u.low < u.high:
            raise _err("low must be below high", f"{p}.high", source)
        if u.mode is not None and not u.low <= u.mode <= u.high:
            raise _err("mode must lie between low and high", f"{p}.mode", source)
        if u.mode is not None and dist != "triangular":
            raise _err("only a triangular distribution has a mode", f"{p}.mode", source)
        _bounds_hold_the_field(u, ref, p, source, scenario)
        out.append(u)
    return tuple(out)


# ---------------------------------------------------------------------------
# Public reading API
# ---------------------------------------------------------------------------

def scenario_from_dict(data: dict, source: str = "<dict>") -> m.Scenario:
    """Build and validate a :class:`~heatload.model.Scenario` from parsed TOML.

    Parameters
    ----------
    data : dict
        The file's content as ``tomllib`` returns it (strings with units).
    source : str
        File name (or ``"<string>"``) for error messages.

    Returns
    -------
    Scenario
        Every value converted to SI [Pa, m^3/s, m, N, K, s, ...].

    Raises
    ------
    HeatloadError
        The first invalid, missing or unknown entry, naming its field path.
    """
    if not isinstance(data, dict):
        raise _err("expected a table of sections", None, source)
    _table(data, {k: _F("table") for k in _TOP}, "", source)
    for key in ("scenario", "actuators", "phases"):
        if key not in data:
            what = f"[{key}]" if key == "scenario" else f"[[{key}]]"
            raise _err(f"missing required section {what}", key, source)
    _table(data["scenario"], _SCENARIO, "scenario", source)
    head = _read(data["scenario"], _SCENARIO, "scenario", source)
    fluid = _fluid(data["fluid"], source) if "fluid" in data else m.Fluid()
    ambient = _ambient(data["ambient"], source) if "ambient" in data else m.Ambient()
    reservoir = (_reservoir(data["reservoir"], source) if "reservoir" in data
                 else m.Reservoir())
    power_unit = (_power_unit(data["power_unit"], source) if "power_unit" in data
                  else m.PowerUnit())
    actuators = _actuators(data["actuators"], source)
    phases = _phases(data["phases"], actuators, source)
    defaults = {}
    if "strategy_defaults" in data:
        _table(data["strategy_defaults"], _PARAMETERS, "strategy_defaults", source)
        defaults = _read(data["strategy_defaults"], _PARAMETERS, "strategy_defaults",
                         source)
        _parameters(defaults, "strategy_defaults", source)
    strategies = _strategies(data.get("strategies"), defaults, source)
    economics = (_economics(data["economics"], strategies, source,
                            "shift_duration" in data["scenario"])
                 if "economics" in data else m.Economics())
    pattern = m.shift_hours(economics)
    if pattern is not None:
        head["shift_duration"] = pattern[1] * 3600.0   # cold start each day
    cooler = (_simple(data["cooler"], _COOLER, "cooler", source, m.CoolerDesign())
              if "cooler" in data else m.CoolerDesign())
    # datasheet coolers: their format lives with their physics
    from heatload.cooling.cooler_datasheet import coolers_from_toml
    coolers = coolers_from_toml(data["coolers"], source) if "coolers" in data else ()
    scenario = m.Scenario(name=head["name"], phases=phases, actuators=actuators,
                          strategies=strategies, fluid=fluid, ambient=ambient,
                          reservoir=reservoir, power_unit=power_unit, economics=economics,
                          cooler=cooler, coolers=coolers,
                          **{k: v for k, v in head.items() if k != "name"})
    _check_strategy_settings(scenario, source)
    if "repeats" in data:
        scenario = dataclasses.replace(scenario,
                                       repeats=_repeats(data["repeats"], phases, source))
    _check_phase_durations(scenario, source)
    _check_ceilings(scenario, data, source)
    _check_speed_ceilings(scenario, source)
    _check_cooler_design(scenario, "cooler" in data and "oil_temperature_max" in data["cooler"],
                         source)
    # after the machine's own checks: a bound is judged against a machine that loads
    if "uncertainty" in data:
        scenario = dataclasses.replace(
            scenario, uncertainty=_uncertainty(data["uncertainty"], scenario, source))
    return scenario


def _check_strategy_settings(scenario: m.Scenario, source: str) -> None:
    """The rules between a circuit's settings and the power unit (a compensator
    or unloading valve below the relief, an accumulator's working range), where
    the solver's entries are made (:func:`heatload.hydraulics.cycle.strategy_arrays`)."""
    from heatload.hydraulics import cycle
    for st in scenario.strategies:
        try:
            cycle.strategy_arrays(scenario, st)
        except HeatloadError as e:
            raise (e.located(file=source) if e.file is None else e) from None


def _celsius(t: float) -> str:
    return f"{t - 273.15:.4g} °C"


def _check_phase_durations(scenario: m.Scenario, source: str) -> None:
    """Refuse a phase longer than :data:`MAX_PHASE_DURATION`, however it arises:
    a stroke at a crawling set speed, or at the full flow of a tiny pump.  The
    durations are the solver's own (:func:`heatload.hydraulics.cycle.phase_arrays`)."""
    from heatload.hydraulics import cycle

    durations = cycle.phase_arrays(scenario)["duration"]
    for i, (ph, t) in enumerate(zip(scenario.phases, durations)):
        if t <= MAX_PHASE_DURATION:
            continue
        span = (f"{t / 86400:.3g} days" if t < 365.25 * 86400
                else f"{t / (365.25 * 86400):.3g} years")
        at = ("at its set speed" if ph.speed is not None
              else "at the full pump flow")
        raise _err(f"the stroke of {ph.stroke * 1e3:.4g} mm {at} ({ph.stroke / t:.3g} "
                   f"m/s) takes {span}; a phase lasts at most 24 h (check the unit of the "
                   f"{'speed' if ph.speed is not None else 'pump displacement'})",
                   f"phases[{i}].{'speed' if ph.speed is not None else 'stroke'}", source)
    _check_simultaneous_travel(scenario, durations, source)
    _check_cycle_travel(scenario, source)


def _cycle_order(scenario: m.Scenario) -> list:
    """Phase indices in the order one cycle runs them, each repeated block
    (``[[repeats]]``) written out *count* times."""
    names = [p.name for p in scenario.phases]
    blocks = {names.index(r.first): (names.index(r.last), r.count) for r in scenario.repeats}
    order, i = [], 0
    while i < len(names):
        last, count = blocks.get(i, (i, 1))
        order += list(range(i, last + 1)) * count
        i = last + 1
    return order


def _check_cycle_travel(scenario: m.Scenario, source: str) -> None:
    """Refuse a cycle whose cylinder travels, phase after phase, cover more than
    the cylinder's stroke (the piston would pass its end: a slip in a stroke, a
    speed or a repeat count).  Checked where every travel of a cylinder in the
    cycle is known: a phase's stroke, or its set speed times its duration (a
    phase at the full pump flow for a given time is not known before the solve)."""
    moves = {a.name: [] for a in scenario.actuators if a.kind == "cylinder"}
    unknown = set()

    def add(name, motion, speed, stroke, duration, where):
        if name not in moves or motion not in ("extend", "retract"):
            return
        travel = stroke if stroke is not None else (
            speed * duration if speed is not None and duration is not None else None)
        if travel is None:
            unknown.add(name)
        else:
            moves[name].append((travel if motion == "extend" else -travel, where))
    for i in _cycle_order(scenario):
        ph = scenario.phases[i]
        add(ph.actuator, ph.motion, ph.speed, ph.stroke, ph.duration, i)
        t = ph.duration if ph.duration is not None else (
            ph.stroke / ph.speed if ph.stroke is not None and ph.speed is not None else None)
        for x in ph.simultaneous:
            add(x.actuator, x.motion, x.speed, None, t, i)
    for name, steps in moves.items():
        if name in unknown or not steps:
            continue
        act = scenario.actuator(name)
        pos = lo = hi = 0.0
        for travel, i in steps:
            pos += travel
            lo, hi = min(lo, pos), max(hi, pos)
            if hi - lo > act.stroke * (1 + 1e-9):
                ph = scenario.phases[i]
                raise _err(f"by the end of phase {ph.name!r} the cycle has moved "
                           f"{name!r} over {(hi - lo) * 1e3:.4g} mm, more than its "
                           f"{act.stroke * 1e3:.4g} mm stroke (the phases' strokes, speeds "
                           f"x durations and repeats of one cycle, extending + and "
                           f"retracting -, must fit in the cylinder)",
                           f"phases[{i}].stroke", source)


def _check_simultaneous_travel(scenario: m.Scenario, durations, source: str) -> None:
    """Refuse a simultaneous cylinder motion that would travel beyond its
    cylinder's stroke in the phase (it runs for the whole phase at its set speed)."""
    for i, (ph, t) in enumerate(zip(scenario.phases, durations)):
        for j, x in enumerate(ph.simultaneous):
            act = scenario.actuator(x.actuator)
            if act.kind == "motor" or x.speed is None:
                continue
            if x.speed * t > act.stroke * (1 + 1e-9):
                raise _err(f"at its set speed the {x.motion} motion travels "
                           f"{x.speed * t * 1e3:.4g} mm in the phase's {t:.3g} s, more than "
                           f"the {act.stroke * 1e3:.4g} mm stroke of {act.name!r} (it moves "
                           f"for the whole phase: lower its speed or split the phase)",
                           f"phases[{i}].simultaneous[{j}].speed", source)


#: Why a [cooler] temperature may not pass the fluid's own upper limit (its
#: ceiling in the schema, ``_F.ceiling``).
_ABOVE_FLUID_LIMIT = {
    "oil_temperature_max": "no cooler may be designed to hold the oil hotter than the oil "
                           "stands",
    "thermostat_on": "a cooler switched on only above it lets the oil pass its limit "
                     "before it cools",
}


def _check_ceilings(scenario: m.Scenario, data: dict, source: str) -> None:
    """Refuse a ``[cooler]`` temperature the file gives above the fluid's own
    upper limit (``fluid.temperature_max``, the ceiling its field specification
    names): a temperature no oil stands.  *data*: the file's tables."""
    given = data.get("cooler", {})
    default = "" if "temperature_max" in data.get("fluid", {}) else ", its default"
    for key, why in _ABOVE_FLUID_LIMIT.items():
        value = getattr(scenario.cooler, key)
        limit = ceiling_of(scenario, _COOLER[key])
        if key not in given or value is None or value <= limit * (1 + 1e-12):
            continue
        raise _err(f"{_celsius(value)} is above the upper temperature limit of the fluid, "
                   f"{_celsius(limit)} ({_COOLER[key].ceiling}{default}): {why}; expected a "
                   f"temperature (e.g. \"{limit - 273.15 - m.DESIGN_TEMPERATURE_HEADROOM:g} "
                   f"degC\") at or below it, or the fluid's own limit from its maker as "
                   f"fluid.temperature_max", f"cooler.{key}", source)


def _check_speed_ceilings(scenario: m.Scenario, source: str) -> None:
    """Refuse a set speed above its actuator's own limit (the ceiling of a
    phase's ``speed`` in the schema: a hydraulic motor's ``max_speed``), of a
    phase's own motion or a simultaneous one."""
    spec = _PHASE["speed"]
    for i, ph in enumerate(scenario.phases):
        motions = [(f"phases[{i}].speed", ph.actuator, ph.speed)] + [
            (f"phases[{i}].simultaneous[{j}].speed", x.actuator, x.speed)
            for j, x in enumerate(ph.simultaneous)]
        for field, name, speed in motions:
            if name is None or speed is None:
                continue
            act = scenario.actuator(name)
            limit = ceiling_of(scenario, spec, act)
            if limit is None or speed <= limit * (1 + 1e-12):
                continue
            k = next(n for n, a in enumerate(scenario.actuators) if a.name == name)
            raise _err(f"{speed * 60:.4g} rpm is above the max_speed {limit * 60:.4g} rpm of "
                       f"{name!r} (actuators[{k}].max_speed): its maker allows it no faster; "
                       f"expected a shaft speed (e.g. \"{limit * 60:.4g} rpm\") at or below "
                       f"it, or a motor rated for the speed", field, source)


def _check_cooler_design(scenario: m.Scenario, design_given: bool, source: str) -> None:
    """Refuse a design point no cooler of the chosen coolant can hold (one above
    the fluid's own limit is refused before, :func:`_check_ceilings`): air
    cannot cool the oil below the hottest air (ETD = T_oil - T_air must be
    positive), and water cannot cool it below the water's inlet temperature."""
    cd = scenario.cooler
    t_d = m.design_oil_temperature(scenario.fluid, cd)
    what = ("the design oil temperature" if design_given
            else f"the design oil temperature (the fluid's limit less "
                 f"{m.DESIGN_TEMPERATURE_HEADROOM:g} K)")
    where = "cooler.oil_temperature_max" if design_given else "fluid.temperature_max"
    refused = cooler_type(cd.coolant).refusal(t_d, scenario.ambient.temperature_max, cd,
                                              what, where)
    if refused:
        raise _err(refused[0], refused[1], source)


_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\[\]]+?)\s*\]\]?\s*(?:#.*)?$")
_KEYLINE = re.compile(r"^\s*([A-Za-z0-9_\-]+|\"[^\"]*\")\s*=")


def _key_lines(text: str) -> dict:
    """Map field paths (``phases[2].speed``) to 1-based line numbers by a
    simple scan of the TOML text (headers and ``key =`` lines)."""
    lines: dict = {}
    counts: dict = {}
    current = ""
    in_multiline = None
    for n, line in enumerate(text.splitlines(), 1):
        if in_multiline:
            if in_multiline in line:
                in_multiline = None
            continue
        mt = _HEADER.match(line)
        if mt:
            name = ".".join(p.strip().strip('"') for p in mt.group(2).split("."))
            if mt.group(1) == "[[":
                i = counts.get(name, 0)
                counts[name] = i + 1
                # a nested array (reservoir.surfaces) belongs to its parent table
                current = f"{name}[{i}]"
            else:
                current = name
            lines.setdefault(current, n)
            continue
        mt = _KEYLINE.match(line)
        if mt:
            key = mt.group(1).strip('"')
            lines.setdefault(f"{current}.{key}" if current else key, n)
            rest = line[mt.end():]
            for quote in ('"""', "'''"):
                if rest.count(quote) == 1:
                    in_multiline = quote
    return lines


def _line_of(field: str | None, lines: dict) -> int | None:
    path = field or ""
    while path:
        if path in lines:
            return lines[path]
        # a table written only through its sub-tables ([scenario.a.b.c] for
        # scenario.a): the first line inside it
        inside = [n for k, n in lines.items() if k.startswith((path + ".", path + "["))]
        if inside:
            return min(inside)
        cut = max(path.rfind("."), path.rfind("["))
        path = path[:cut] if cut > 0 else ""
    return None


#: Most phases in one duty cycle: far beyond a real machine's cycle, and it
#: bounds the results a browser session carries.
MAX_PHASES = 200

#: Longest line accepted: no real key or value needs more, and it keeps the
#: TOML parser fast on adversarial keys (its cost grows with a key's parts).
MAX_LINE_CHARS = 10_000

#: Longest duty-cycle text accepted (a real file is a few kB; this stops a
#: huge upload or a wrong file from tying up the parser).
MAX_FILE_CHARS = 1_000_000


def loads_scenario(text: str, source: str = "<string>") -> m.Scenario:
    """Parse and validate a duty-cycle file's text.

    Parameters
    ----------
    text : str
        TOML text in the schema of :data:`SCHEMA_EXAMPLE`.
    source : str
        Name shown at the start of every error message.

    Returns
    -------
    Scenario

    Raises
    ------
    HeatloadError
        TOML syntax errors (with the line), and every validation error of
        :func:`scenario_from_dict`, located at the line of the offending key
        where a scan of the text finds it.
    """
    import tomllib

    if len(text) > MAX_FILE_CHARS:
        raise HeatloadError(f"the file is {len(text):,} characters long; a duty-cycle file "
                            f"is at most {MAX_FILE_CHARS:,}", file=source)
    for number, line in enumerate(text.split("\n"), 1):
        if len(line) > MAX_LINE_CHARS:
            raise HeatloadError(f"line of {len(line):,} characters; at most {MAX_LINE_CHARS:,}",
                                file=source, line=number)
    try:
        data = tomllib.loads(text)
    except RecursionError:
        raise HeatloadError("TOML nested too deeply to be a duty-cycle file",
                            file=source) from None
    except tomllib.TOMLDecodeError as e:
        msg = str(e)
        mt = re.search(r"at line (\d+)", msg)
        line = getattr(e, "lineno", None) or (int(mt.group(1)) if mt else None)
        raise HeatloadError(f"TOML syntax error: {msg}", file=source, line=line) from None
    try:
        return scenario_from_dict(data, source)
    except HeatloadError as e:
        raise e.located(file=source, line=e.line or _line_of(e.field, _key_lines(text))) \
            .named_from(data) from None


def load_scenario(path) -> m.Scenario:
    """Read, parse and validate a duty-cycle file.

    Parameters
    ----------
    path : str or os.PathLike
        The ``.toml`` file.

    Returns
    -------
    Scenario

    Raises
    ------
    HeatloadError
        A missing or unreadable file, bytes that are not UTF-8 (with the
        line), TOML syntax errors and every validation error, each starting
        with the file name.
    """
    source = str(path)
    try:
        st = Path(path).stat()
        if not stat.S_ISREG(st.st_mode):
            # a FIFO or a device would block or never end: only regular files are read
            raise HeatloadError("not a regular file (a duty-cycle file is a .toml file)",
                                file=source)
        size = st.st_size
        if size > MAX_FILE_CHARS * 4:
            raise HeatloadError(f"the file is {size:,} bytes; a duty-cycle file is at most "
                                f"{MAX_FILE_CHARS:,} characters", file=source)
        raw = Path(path).read_bytes()
    except OSError as e:
        raise HeatloadError(f"cannot read the file: {e.strerror or e}", file=source) \
            from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as e:
        line = raw[:e.start].count(b"\n") + 1
        raise HeatloadError(f"not UTF-8 text (byte 0x{raw[e.start]:02x}); save the file "
                            "as UTF-8", file=source, line=line) from None
    return loads_scenario(text.removeprefix("\ufeff"), source=source)


def locate_in_file(error: HeatloadError, path) -> HeatloadError:
    """*error* (raised after loading, naming a field of the scenario) with the
    file and the line of that field in *path* filled in, where they can be found."""
    if error.file is not None:
        return error
    try:
        text = Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return error.located(file=str(path))
    return error.located(file=str(path),
                         line=error.line or _line_of(error.field, _key_lines(text)))


# ---------------------------------------------------------------------------
# Bundled examples
# ---------------------------------------------------------------------------

def _examples_dir() -> Path:
    return Path(__file__).resolve().parents[2] / "duty_cycles"


def default_scenario_path() -> Path:
    """The bundled default machine, ``duty_cycles/forming_press.toml``."""
    return _examples_dir() / "forming_press.toml"


def example_paths() -> list:
    """Every bundled example duty-cycle file, sorted by name."""
    return sorted(_examples_dir().glob("*.toml"))
