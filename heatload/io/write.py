"""Write duty-cycle files, losslessly: ``loads_scenario(dumps_scenario(s)) == s``.

Each value is written in a friendly unit with the fewest digits that parse back
to the very same float; where no friendly form round-trips exactly, the SI value
is written with full ``repr`` precision.  Files are written atomically through
:func:`heatload.io.files.write_atomic`.
"""

from __future__ import annotations

import math
from functools import lru_cache
from pathlib import Path

from heatload import model as m
from heatload.io import files as outputs
from heatload.errors import HeatloadError
from heatload.units import KINDS, from_si
from heatload.io.schema import (_MOTION, _AMBIENT, _COOLER, _CYLINDER, _ECONOMICS, _FLUID,
                                _HYDRAULIC_MOTOR, _PARAMETERS, _PHASE, _POWER_UNIT,
                                _RESERVOIR, _SURFACE, _to_si_cached)
from heatload.io.read import (_path_ref, loads_scenario)


# ---------------------------------------------------------------------------
# Writing
# ---------------------------------------------------------------------------

#: Units values are written in, best first; the shortest text that parses
#: back exactly wins, and the SI unit is the last resort.
_WRITE_UNITS = {
    "pressure": ("bar",), "flow": ("L/min",), "length": ("mm", "m"),
    "distance": ("m", "mm"), "area": ("m^2",), "volume": ("L", "m^3"),
    "displacement": ("cm^3",), "velocity": ("m/s", "mm/s"), "shaft_speed": ("rpm",),
    "force": ("kN", "N"), "torque": ("N*m", "kN*m"), "power": ("kW", "W"),
    "time": ("s", "min", "h"), "temperature": ("degC", "K"),
    "temperature_difference": ("K",), "mass": ("kg",), "density": ("kg/m^3",),
    "kinematic_viscosity": ("mm^2/s",), "bulk_modulus": ("GPa", "MPa", "bar"),
    "heat_transfer_coefficient": ("W/(m^2*K)",),
    "specific_heat": ("kJ/(kg*K)", "J/(kg*K)"), "thermal_conductivity": ("W/(m*K)",),
    "expansion_coefficient": ("1/K",), "specific_energy_price": ("1/kWh",),
    "emission_factor": ("kg/kWh",),
}


def _number_text(x: float) -> list:
    seen, out = set(), []
    for digits in (6, 9, 12, 15, 17):
        s = f"{x:.{digits}g}"
        if s not in seen:
            seen.add(s)
            out.append(s)
    r = repr(float(x))
    if r not in seen:
        out.append(r)
    return out


def _unit_text(unit: str, kind: str) -> str:
    if kind == "displacement":
        return f"{unit}/rev"
    if unit.startswith("1/") and kind in ("specific_energy_price",):
        return unit[1:]
    return unit


@lru_cache(maxsize=8192)
def _format(value: float, kind: str) -> str:
    """The shortest '<number> <unit>' text that parses back to exactly *value*."""
    si = KINDS[kind].si
    best = None
    for unit in _WRITE_UNITS.get(kind, ()):
        x = float(from_si(value, kind, unit))
        for s in _number_text(x):
            text = f"{s} {_unit_text(unit, kind)}"
            if best is not None and len(text) >= len(best):
                break
            try:
                if _to_si_cached(text, kind) == value:
                    best = text
                    break
            except HeatloadError:
                continue
    if best is not None:
        return best
    text = f"{float(value)!r} {_unit_text(si, kind)}"
    if _to_si_cached(text, kind) == value:
        return text
    raise HeatloadError(f"cannot write {value!r} losslessly as {kind}")


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if not math.isfinite(v):
            raise HeatloadError(f"cannot write a non-finite number {v!r}")
        r = repr(v)
        return r if ("." in r or "e" in r or "n" in r) else r + ".0"
    if isinstance(v, str):
        out = ['"']
        for ch in v:
            if ch == '"':
                out.append('\\"')
            elif ch == "\\":
                out.append("\\\\")
            elif ch == "\n":
                out.append("\\n")
            elif ch == "\t":
                out.append("\\t")
            elif ord(ch) < 0x20 or ord(ch) == 0x7F:
                out.append(f"\\u{ord(ch):04x}")
            else:
                out.append(ch)
        out.append('"')
        return "".join(out)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    raise HeatloadError(f"cannot write a value of type {type(v).__name__}")


def _dump_fields(obj, spec: dict, kinds: dict | None = None, skip=()) -> dict:
    out = {}
    for key, f in spec.items():
        if key in skip:
            continue
        v = getattr(obj, key)
        if v is None:
            continue
        kind = (kinds or {}).get(key, f.kind)
        if kind in KINDS and kind != "dimensionless":
            out[key] = _format(float(v), kind)
        elif kind == "dimensionless":
            out[key] = float(v)
        else:
            out[key] = v
    return out


def _dump_motion(x: m.Motion, motor: bool) -> dict:
    """A further motion of a phase as a TOML table (see :func:`_simultaneous`)."""
    item = _dump_fields(x, _MOTION, kinds={"load": "torque" if motor else "force",
                                           "speed": "shaft_speed" if motor else "velocity"})
    if not x.regeneration:
        del item["regeneration"]
    if x.compress:
        del item["compress"]
    return item


def scenario_to_dict(scenario: m.Scenario) -> dict:
    """The scenario as a TOML-ready dict (quantities as strings with units).

    Every field that is not ``None`` is written; the dict loads back with
    :func:`scenario_from_dict` to an equal scenario.
    """
    s = scenario
    d: dict = {"scenario": {"name": s.name, "description": s.description,
                            "shift_duration": _format(s.shift_duration, "time")}}
    for k in ("project", "customer", "prepared_by", "revision"):
        if getattr(s, k):
            d["scenario"][k] = getattr(s, k)
    if s.heat_calibration != 1.0:
        d["scenario"]["heat_calibration"] = float(s.heat_calibration)
    d["economics"] = _dump_fields(s.economics, _ECONOMICS)
    if s.repeats:
        d["repeats"] = [{"first": r.first, "last": r.last, "count": r.count}
                        for r in s.repeats]
    if m.shift_hours(s.economics) is not None:
        # the pattern gives both: written, they would contradict it on loading
        del d["economics"]["hours_per_year"], d["scenario"]["shift_duration"]
    fluid = _dump_fields(s.fluid, _FLUID, skip=("viscosity_points",))
    if s.fluid.viscosity_points:
        fluid["viscosity_points"] = [[_format(t, "temperature"),
                                      _format(nu, "kinematic_viscosity")]
                                     for t, nu in s.fluid.viscosity_points]
    d["fluid"] = fluid
    d["ambient"] = _dump_fields(s.ambient, _AMBIENT)
    res = _dump_fields(s.reservoir, _RESERVOIR, skip=("surfaces",))
    if s.reservoir.surfaces:
        res["surfaces"] = [_dump_fields(x, _SURFACE) for x in s.reservoir.surfaces]
    d["reservoir"] = res
    d["power_unit"] = {k: _dump_fields(getattr(s.power_unit, k), spec)
                       for k, spec in _POWER_UNIT.items()}
    acts = []
    for a in s.actuators:
        spec = _HYDRAULIC_MOTOR if a.kind == "motor" else _CYLINDER
        acts.append(_dump_fields(a, spec))
    d["actuators"] = acts
    kinds = {a.name: a.kind for a in s.actuators}
    phases = []
    for ph in s.phases:
        motor = kinds.get(ph.actuator) == "motor"
        item = _dump_fields(ph, _PHASE, kinds={
            "load": "torque" if motor else "force",
            "speed": "shaft_speed" if motor else "velocity"})
        if ph.motion == "idle" and ph.load == 0.0:
            del item["load"]               # an idle phase takes no load key
        if not ph.regeneration:
            del item["regeneration"]       # written only where it is set
        if ph.speed is None and ph.motion in ("extend", "retract", "run"):
            item = {k: v for k, v in item.items() if k != "stroke" and k != "duration"
                    and k not in ("hold_pressure", "hold_force", "unloading", "compress")}
            item["speed"] = "full"
            item.update({k: v for k, v in _dump_fields(ph, _PHASE).items()
                         if k in ("stroke", "duration", "hold_pressure", "hold_force",
                                  "unloading", "compress")})
        if ph.simultaneous:
            item["simultaneous"] = [_dump_motion(x, kinds.get(x.actuator) == "motor")
                                    for x in ph.simultaneous]
        phases.append(item)
    d["phases"] = phases
    strategies = []
    for st in s.strategies:
        item = {"kind": st.kind}
        if st.label is not None:
            item["label"] = st.label
        item.update(_dump_fields(st.parameters, _PARAMETERS))
        strategies.append(item)
    d["strategies"] = strategies
    d["cooler"] = _dump_fields(s.cooler, _COOLER)
    unc = []
    for u in s.uncertainty:
        item = {"path": u.path, "distribution": u.distribution}
        if u.relative:
            kind = "dimensionless"
        else:
            kind = _path_ref(u.path, s, "uncertainty.path", None).kind
        for key in ("low", "high", "mode"):
            v = getattr(u, key)
            if v is not None:
                item[key] = float(v) if kind == "dimensionless" else _format(v, kind)
        item["relative"] = u.relative
        unc.append(item)
    if unc:
        d["uncertainty"] = unc
    if s.coolers:
        from heatload.cooling.cooler_datasheet import coolers_to_toml
        d["coolers"] = coolers_to_toml(s.coolers)
    return d


def _emit(lines: list, table: dict, path: str) -> None:
    """Write *table* under the header *path*: scalars first, then sub-tables
    and arrays of tables."""
    scalars = {k: v for k, v in table.items()
               if not isinstance(v, dict)
               and not (isinstance(v, list) and v and isinstance(v[0], dict))}
    for k, v in scalars.items():
            lines.append(f"{k} = {_toml_value(v)}")
    for k, v in table.items():
        sub = f"{path}.{k}" if path else k
        if isinstance(v, dict):
            if any(not isinstance(x, dict) for x in v.values()):
                lines.append("")
                lines.append(f"[{sub}]")   # a table of only sub-tables needs no header
            _emit(lines, v, sub)
        elif isinstance(v, list) and v and isinstance(v[0], dict):
            for item in v:
                lines.append("")
                lines.append(f"[[{sub}]]")
                _emit(lines, item, sub)


def dumps_scenario(scenario: m.Scenario) -> str:
    """The scenario as duty-cycle TOML text, lossless on reload.

    Returns
    -------
    str
        Text that :func:`loads_scenario` turns back into an equal scenario.
    """
    # a comment ends at a line break, and TOML allows no control character in one
    shown = "".join(ch if ch.isprintable() else " " for ch in scenario.name)
    lines = [f"# heatload duty-cycle file: {shown}",
             "# Quantities carry their units; see heatload.io.SCHEMA_EXAMPLE for every key."]
    _emit(lines, scenario_to_dict(scenario), "")
    return "\n".join(lines).replace("\n\n\n", "\n\n") + "\n"


def save_scenario(scenario: m.Scenario, path, force: bool = False) -> Path:
    """Write the scenario to *path* atomically.

    The text is checked to load back to an equal scenario and written by
    :func:`heatload.io.files.write_atomic` (a temporary file in the same
    folder moved into place), so a reader never sees half a file.

    Parameters
    ----------
    scenario : Scenario
    path : str or os.PathLike
        Target ``.toml`` file.
    force : bool
        Overwrite an existing file.

    Returns
    -------
    Path
        The written file.

    Raises
    ------
    HeatloadError
        The file exists and *force* is false; the target is a folder, pipe
        or device (even with *force*); the scenario is invalid (it would not
        load back); the folder cannot be written.
    """
    target = Path(path)
    hint = "pass force=True to overwrite it"
    outputs.check_output(target, force=force, hint=hint)
    text = dumps_scenario(scenario)
    if loads_scenario(text, source=str(target)) != scenario:
        raise HeatloadError("the scenario does not survive a write and reload "
                            "unchanged", file=str(target))

    def write(tmp):
        with open(tmp, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
    return outputs.write_atomic(target, write, force=force, hint=hint)
