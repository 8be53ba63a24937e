"""Field paths of a scenario: the one grammar the loader's ``[[uncertainty]]``,
``heatload sweep --vary``, the Monte Carlo and the dashboard read.

A path names a numeric field of a scenario in the spelling of the file:

``power_unit.<part>.<key>`` (part: pump, motor, relief, directional_valve,
check_valve, pressure_line, return_line), ``actuators.<name>.<key>`` or
``actuators[i].<key>`` (``[*]``: every actuator), ``phases[i].<key>`` or
``phases[*].<key>`` (every phase that has the key), ``strategies.<kind or
label>.<key>`` or ``strategies[i].<key>``, ``ambient.<key>``,
``reservoir.<key>``, ``fluid.bulk_modulus``, ``economics.<key>``,
``cooler.<key>``, and the factor ``reservoir.heat_transfer_factor`` (a
multiplier on the computed conductance UA, nominal 1; the only path that is
not a scenario field).

- :func:`resolve_path` -> :class:`FieldRef` (targets, unit kind, value check,
  nominal values), or a one-line :class:`~heatload.errors.HeatloadError`
  naming the nearest valid paths;
- :func:`valid_paths` -> every path that can vary;
- :func:`allowed_range` -> the values a path's field may take (the file's own
  limits from :mod:`heatload.io.schema`, and a ceiling another field sets);
- :func:`replaced_scenario` -> the scenario with fields set (``dataclasses.replace``);
- :class:`Overrides` -> the lookup the one builder (:mod:`heatload.hydraulics.cycle`)
  reads: a field's array over N variants, or the scenario's own value.
"""

from __future__ import annotations

import dataclasses
import difflib
import re
from dataclasses import dataclass

import numpy as np

from heatload.errors import HeatloadError
from heatload.model import Scenario
from heatload.hydraulics.strategies import circuit
from heatload.io import schema as _schema


def _vary(spec: dict, *keys) -> dict:
    """``{key: (kind, check, field spec)}`` of the variable *keys* of one file
    table, read from the loader's field specifications (:mod:`heatload.io.schema`):
    a path varies a field with the very kind, sign rule and range the file has
    for it."""
    return {k: (spec[k].kind, spec[k].check or "any", spec[k]) for k in keys}


# Which keys can vary (numeric fields the builder reads); kinds and checks come
# from the schema.  check: pos, nonneg, eff, frac_pos, any
_POWER_UNIT_KEYS = {
    "pump": _vary(_schema._PUMP, "displacement", "shaft_speed", "volumetric_efficiency",
                  "hydromechanical_efficiency", "rated_pressure", "max_pressure"),
    "motor": _vary(_schema._MOTOR, "rated_power", "efficiency", "drive_efficiency"),
    "relief": _vary(_schema._RELIEF, "cracking_pressure", "override", "rated_flow"),
    "directional_valve": _vary(_schema._DIRECTIONAL, "rated_flow", "pressure_drop",
                               "centre_pressure_drop", "max_pressure"),
    "check_valve": _vary(_schema._CHECK, "cracking_pressure", "rated_flow", "pressure_drop"),
    "pressure_line": _vary(_schema._LINE, "length", "inner_diameter", "roughness",
                           "fittings_k"),
}
_POWER_UNIT_KEYS["return_line"] = _POWER_UNIT_KEYS["pressure_line"]
_CYLINDER_KEYS = _vary(_schema._CYLINDER, "bore", "rod", "stroke", "friction_force",
                       "max_pressure", "dead_volume")
_MOTOR_KEYS = _vary(_schema._HYDRAULIC_MOTOR, "displacement", "volumetric_efficiency",
                    "hydromechanical_efficiency", "max_pressure")
# the kinds of a phase's load and speed follow its actuator (force or torque,
# velocity or shaft speed): the cylinder's are listed here, the motor's are set
# where the path is resolved
_PHASE_KEYS = _vary(_schema._PHASE, "load", "speed", "stroke", "duration", "hold_pressure",
                    "hold_force")
_STRATEGY_KEYS = _vary(_schema._PARAMETERS, *(k for k in _schema._PARAMETERS if k != "price"))
_TABLE_KEYS = {
    "ambient": _vary(_schema._AMBIENT, "temperature", "temperature_max"),
    "reservoir": {**_vary(_schema._RESERVOIR, "oil_volume", "steel_mass", "steel_specific_heat",
                          "heat_transfer_coefficient"),
                  # a multiplier on the computed UA, nominal 1: a path, not a file key
                  "heat_transfer_factor": ("dimensionless", "pos",
                                           _schema._F("dimensionless", "pos"))},
    "fluid": _vary(_schema._FLUID, "bulk_modulus"),
    "economics": _vary(_schema._ECONOMICS, "hours_per_year", "electricity_price"),
    "cooler": _vary(_schema._COOLER, "margin", "oil_temperature_max"),
}

_PART = re.compile(r"^([A-Za-z0-9_\- ]+)(?:\[(\*|\d+)\])?$")


@dataclass(frozen=True)
class FieldRef:
    """What one path changes: *targets* are internal keys such as
    ``("phase", 3, "load")``; *kind* is the :data:`heatload.units.KINDS` key of
    the value (None where cylinders and motors mix); *nominal* the
    scenario's values (one per target, None where unset)."""

    path: str
    targets: tuple
    kind: str | None
    check: str
    nominal: tuple
    #: the file's specification of the field (:class:`heatload.io.schema._F`):
    #: its range (:func:`allowed_range`)
    spec: object = None
    #: the kind of each target (cylinders and motors may mix: force and torque)
    kinds: tuple = ()


def _actuator_keys(act):
    return _MOTOR_KEYS if act.kind == "motor" else _CYLINDER_KEYS


def _phase_kind(scenario, ph, key):
    kind = _PHASE_KEYS[key][0]
    if key in ("load", "speed") and ph.actuator:
        if scenario.actuator(ph.actuator).kind == "motor":
            kind = "torque" if key == "load" else "shaft_speed"
    return kind


def valid_paths(scenario: Scenario) -> list:
    """Every path :func:`resolve_path` accepts for *scenario* (canonical spellings)."""
    out = []
    for part, keys in _POWER_UNIT_KEYS.items():
        out += [f"power_unit.{part}.{k}" for k in keys]
    for i, a in enumerate(scenario.actuators):
        out += [f"actuators.{a.name}.{k}" for k in _actuator_keys(a)]
    for k in _PHASE_KEYS:
        if any(getattr(ph, k) is not None and _inert(ph, k) is None for ph in scenario.phases):
            out.append(f"phases[*].{k}")
        out += [f"phases[{i}].{k}" for i, ph in enumerate(scenario.phases)
                if (getattr(ph, k) is not None or k in ("load", "speed"))
                and _inert(ph, k) is None]
    for s in scenario.strategies:
        out += [f"strategies.{s.name}.{k}" for k in circuit(s.kind).settings]
    for head, keys in _TABLE_KEYS.items():
        out += [f"{head}.{k}" for k in keys]
    return out


def _unknown(path, scenario, why=""):
    paths = valid_paths(scenario)
    near = difflib.get_close_matches(path, paths, n=3, cutoff=0.5)
    hint = f"; did you mean {' or '.join(near)}?" if near else ""
    heads = sorted({p.split(".")[0].split("[")[0] for p in paths})
    return HeatloadError(f"cannot vary {path!r}{(': ' + why) if why else ''}{hint} "
                         f"(paths start with {', '.join(heads)}; "
                         f"e.g. {', '.join(paths[:3])} ...)", field=path)


def resolve_path(scenario: Scenario, path: str) -> FieldRef:
    """Resolve a field *path* of *scenario* (see the module notes).

    Raises
    ------
    HeatloadError
        Unknown path, naming it and the nearest valid ones.
    """
    if not isinstance(path, str) or not path.strip():
        raise HeatloadError("expected a field path such as 'phases[2].load'", field="path")
    path = path.strip()
    raw = path.split(".")
    parts = []
    for p in raw:
        mt = _PART.match(p)
        if not mt:
            raise _unknown(path, scenario)
        parts.append((mt.group(1), mt.group(2)))
    head, hidx = parts[0]
    if head == "power_unit" and len(parts) == 3 and not hidx:
        part, key = parts[1][0], parts[2][0]
        keys = _POWER_UNIT_KEYS.get(part)
        if keys is None or key not in keys or parts[1][1] or parts[2][1]:
            raise _unknown(path, scenario)
        kind, check, spec = keys[key]
        obj = getattr(scenario.power_unit, part)
        return FieldRef(path, ((part, key),), kind, check, (getattr(obj, key),), spec, (kind,))
    if head == "actuators":
        if hidx is not None and len(parts) == 2:
            acts = (list(scenario.actuators) if hidx == "*"
                    else [scenario.actuators[int(hidx)]]
                    if int(hidx) < len(scenario.actuators) else None)
            key = parts[1][0]
        elif hidx is None and len(parts) == 3:
            acts = [a for a in scenario.actuators if a.name == parts[1][0]] or None
            key = parts[2][0]
        else:
            acts = None
        if not acts or any(key not in _actuator_keys(a) for a in acts):
            raise _unknown(path, scenario)
        each = tuple(_actuator_keys(a)[key][0] for a in acts)
        kinds = set(each)
        return FieldRef(path, tuple(("actuator", a.name, key) for a in acts),
                        kinds.pop() if len(kinds) == 1 else None,
                        _actuator_keys(acts[0])[key][1],
                        tuple(getattr(a, key) for a in acts),
                        _actuator_keys(acts[0])[key][2], each)
    if head == "phases" and hidx is not None and len(parts) == 2:
        key = parts[1][0]
        if key not in _PHASE_KEYS:
            raise _unknown(path, scenario)
        n = len(scenario.phases)
        if hidx == "*":
            # every phase that has the key and where it acts
            idx = [i for i, ph in enumerate(scenario.phases) if getattr(ph, key) is not None
                   and _inert(ph, key) is None]
            if not idx:
                raise _unknown(path, scenario, f"no phase has a {key}")
        else:
            if int(hidx) >= n:
                raise _unknown(path, scenario, f"index {hidx} is out of range (there are {n})")
            why = _inert(scenario.phases[int(hidx)], key)
            if why:       # varying it would give identical variants
                raise HeatloadError(f"phase {hidx} '{scenario.phases[int(hidx)].name}': {why}",
                                    field=path)
            idx = [int(hidx)]
        each = tuple(_phase_kind(scenario, scenario.phases[i], key) for i in idx)
        kinds = set(each)
        return FieldRef(path, tuple(("phase", i, key) for i in idx),
                        kinds.pop() if len(kinds) == 1 else None, _PHASE_KEYS[key][1],
                        tuple(getattr(scenario.phases[i], key) for i in idx),
                        _PHASE_KEYS[key][2], each)
    if head == "strategies":
        if hidx is not None and len(parts) == 2:
            chosen = (list(scenario.strategies) if hidx == "*"
                      else [scenario.strategies[int(hidx)]]
                      if int(hidx) < len(scenario.strategies) else [])
            key = parts[1][0]
        elif hidx is None and len(parts) == 3:
            chosen = [s for s in scenario.strategies if parts[1][0] in (s.name, s.kind)]
            key = parts[2][0]
        else:
            chosen = []
        if not chosen or key not in _STRATEGY_KEYS:
            raise _unknown(path, scenario)
        # a setting varies only where the circuit has it (heatload.hydraulics.strategies)
        chosen = [s for s in chosen if key in circuit(s.kind).settings]
        if not chosen:
            raise _unknown(path, scenario, f"no such strategy has a {key}")
        kind, check, spec = _STRATEGY_KEYS[key]
        return FieldRef(path, tuple(("strategy", s.name, key) for s in chosen), kind, check,
                        tuple(getattr(s.parameters, key) for s in chosen), spec,
                        (kind,) * len(chosen))
    if head in _TABLE_KEYS and hidx is None and len(parts) == 2 and parts[1][0] in _TABLE_KEYS[head]:
        key = parts[1][0]
        kind, check, spec = _TABLE_KEYS[head][key]
        nominal = 1.0 if key == "heat_transfer_factor" else getattr(getattr(scenario, head), key)
        return FieldRef(path, ((head, key),), kind, check, (nominal,), spec, (kind,))
    raise _unknown(path, scenario)


def _inert(phase, key):
    """Why *key* does nothing in *phase* (None where it acts): an idle phase moves
    no actuator, so only its duration counts; a hold given its pressure or force
    holds that, whatever its load."""
    if phase.actuator is None and key != "duration":
        return f"an idle phase moves no actuator: only its duration can vary, not its {key}"
    if key == "load" and phase.motion == "hold" and (
            phase.hold_pressure is not None or getattr(phase, "hold_force", None) is not None):
        return "the hold is set by its hold_pressure / hold_force: its load does nothing"
    return None


def allowed_range(scenario: Scenario, ref: FieldRef) -> tuple:
    """The values each target of *ref* may take in *scenario*: ``(low, low_open,
    high, high_open)``, *low* and *high* arrays of one bound per target [SI].

    Read from the field's one specification, the file's
    (:func:`heatload.io.schema.allowed_range`: its sign rule, plausible range
    and magnitude limit, the limits the loader holds a file to), tightened by a
    ceiling set by another field of the scenario (the design oil temperature at
    most the fluid's own limit, ``fluid.temperature_max``; a phase's set speed
    at most its motor's ``max_speed``).  Overrides, sweeps
    and the Monte Carlo's samples are held to it.
    """
    lows, highs = [], []
    low_open = high_open = False
    for target, kind in zip(ref.targets, ref.kinds or (ref.kind,) * len(ref.targets)):
        lo, lo_open, hi, hi_open = _schema.allowed_range(ref.spec, kind)
        ceiling = _schema.ceiling_of(scenario, ref.spec, _actuator_of(scenario, target))
        if ceiling is not None and ceiling <= hi:
            hi, hi_open = ceiling, False
        lows.append(lo)
        highs.append(hi)
        low_open, high_open = low_open or lo_open, high_open or hi_open
    return np.array(lows), low_open, np.array(highs), high_open


def _actuator_of(scenario, target):
    """The actuator a target's field belongs to: a phase's own (None: an idle
    phase, or a target of no phase)."""
    if target[0] == "phase" and scenario.phases[target[1]].actuator:
        return scenario.actuator(scenario.phases[target[1]].actuator)
    return None


def _check_values(ref: FieldRef, values, scenario: Scenario, per_target=False):
    """Refuse values a field cannot take: not finite, or outside
    :func:`allowed_range`.  *values* go to every target of *ref* (the tightest
    bounds apply), or with *per_target* one to each target (None: that target
    keeps its own value)."""
    lo, lo_open, hi, hi_open = allowed_range(scenario, ref)
    if per_target:
        keep = np.array([x is not None for x in values], bool)
        v = np.array([x for x in values if x is not None], float)
        lo, hi = lo[keep], hi[keep]
    else:
        v = np.asarray(values, float)
        lo, hi = lo.max(), hi.min()
    if not np.all(np.isfinite(v)):
        raise HeatloadError("values must be finite numbers", field=ref.path)
    # the loader's own tolerance: a limit written in another unit converts with
    # a rounding of its last bit
    below = (v <= lo) if lo_open else (v < lo - 1e-12 * np.abs(lo))
    above = (v >= hi) if hi_open else (v > hi + 1e-12 * np.abs(hi))
    bad = below | above
    if np.any(bad):
        at = int(np.argmax(bad))
        x = float(v.flat[at])
        lo_s = float(np.broadcast_to(lo, v.shape).flat[at])
        hi_s = float(np.broadcast_to(hi, v.shape).flat[at])
        from heatload.units import KINDS
        kind = ref.kind or "dimensionless"
        unit = f" {KINDS[kind].si}" if KINDS[kind].si else ""
        if np.isfinite(lo_s) and np.isfinite(hi_s):
            what = (f"within {'(' if lo_open else '['}{lo_s:g}, {hi_s:g}"
                    f"{')' if hi_open else ']'}{unit}")
        elif np.isfinite(lo_s):
            what = f"{'>' if lo_open else '>='} {lo_s:g}{unit}"
        else:
            what = f"{'<' if hi_open else '<='} {hi_s:g}{unit}"
        if ref.spec.ceiling is not None and x > hi_s:
            what += f" (at most its {ref.spec.ceiling})"
        raise HeatloadError(f"values must be {what} (SI), got {x:g}", field=ref.path)


class Overrides:
    """Lookup of a field's value: the variants' array (N,) or the scenario's scalar.

    *overrides*: path -> 1-D array of N values in SI (empty or None: the
    scenario itself, N = 1).  Settings of a strategy other than *strategy*
    have no effect (each strategy is built on its own).  ``get(key, default)``
    takes an internal key such as ``("phase", 3, "load")`` or ``("pump",
    "displacement")``."""

    def __init__(self, scenario, strategy=None, overrides=None):
        self.sc = scenario
        self.strategy = strategy
        self.v = {}
        self.n = 1
        self.refs = []
        self.by_path = {}
        lengths = set()
        for path, vals in (overrides or {}).items():
            ref = resolve_path(scenario, path)
            a = np.atleast_1d(np.asarray(vals, dtype=float))
            if a.ndim != 1:
                raise HeatloadError("give a 1-D array of values per path", field=path)
            _check_values(ref, a, scenario)
            lengths.add(a.size)
            self.refs.append(ref)
            self.by_path[ref.path] = a
            for t in ref.targets:
                if t[0] == "strategy":
                    if strategy is None or t[1] != strategy.name:
                        continue          # another strategy's setting: no effect here
                    t = ("strategy", t[2])
                self.v[t] = a
        if len(lengths) > 1:
            raise HeatloadError(f"every path needs the same number of values, got "
                                f"{sorted(lengths)}", field="overrides")
        self.n = lengths.pop() if lengths else 1

    def get(self, key, default):
        return self.v.get(key, default)

    def has(self, *groups):
        return any(k[0] in groups for k in self.v)

    @property
    def nominal(self) -> bool:
        """True when nothing is overridden (the scenario itself)."""
        return not self.v


def replaced_scenario(scenario: Scenario, values: dict) -> Scenario:
    """The scenario with the fields of *values* (path -> one SI value, or a
    sequence of one per target of the path, None leaving that target as it is)
    set, by :func:`dataclasses.replace` (the single-scenario twin of a variant;
    ``reservoir.heat_transfer_factor`` has none and is refused)."""
    sc = scenario
    for path, value in values.items():
        ref = resolve_path(sc, path)
        for k, t in enumerate(ref.targets):
            if isinstance(value, (list, tuple)):
                if value[k] is None:
                    continue
                x = float(value[k])
            else:
                x = float(value)
            if t[0] == "phase":
                phases = list(sc.phases)
                phases[t[1]] = dataclasses.replace(phases[t[1]], **{t[2]: x})
                sc = dataclasses.replace(sc, phases=tuple(phases))
            elif t[0] == "actuator":
                acts = tuple(dataclasses.replace(a, **{t[2]: x}) if a.name == t[1] else a
                             for a in sc.actuators)
                sc = dataclasses.replace(sc, actuators=acts)
            elif t[0] == "strategy":
                sts = tuple(dataclasses.replace(s, parameters=dataclasses.replace(
                    s.parameters, **{t[2]: x})) if s.name == t[1] else s for s in sc.strategies)
                sc = dataclasses.replace(sc, strategies=sts)
            elif t[0] in _POWER_UNIT_KEYS:
                part = dataclasses.replace(getattr(sc.power_unit, t[0]), **{t[1]: x})
                sc = dataclasses.replace(sc, power_unit=dataclasses.replace(
                    sc.power_unit, **{t[0]: part}))
            elif t == ("reservoir", "heat_transfer_factor"):
                raise HeatloadError("a factor on the conductance has no scenario field",
                                    field=path)
            else:
                sc = dataclasses.replace(sc, **{t[0]: dataclasses.replace(
                    getattr(sc, t[0]), **{t[1]: x})})
    return sc

