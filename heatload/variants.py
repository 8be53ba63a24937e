"""Design variants at array speed: scenario field paths -> solver inputs -> results.

A *variant* is the scenario with some numeric fields changed.  This module
maps a field path (the same paths errors and ``[[uncertainty]]`` use) to the
circuit-input entries and thermal inputs it changes, rebuilds every derived
quantity the way :mod:`heatload.cycle` does (bore -> areas, flows and stroke
durations; pump efficiencies -> Wilson coefficients; relief -> default
compensator; ambient and tank -> conductance), and evaluates N variants of
one strategy in a few vectorized solver calls (leading axis = variants, no
Python loop per variant).

Paths
-----
``power_unit.<part>.<key>`` (part: pump, motor, relief, directional_valve,
check_valve, pressure_line, return_line), ``actuators.<name>.<key>`` or
``actuators[i].<key>``, ``phases[i].<key>`` or ``phases[*].<key>`` (every
phase that has the key), ``strategies.<kind or label>.<key>`` or
``strategies[i].<key>``, ``ambient.<key>``, ``reservoir.<key>``,
``fluid.bulk_modulus``, ``economics.<key>``, ``cooler.<key>``, and the
factor ``reservoir.heat_transfer_factor`` (a multiplier on the computed
conductance UA, nominal 1; the only path that is not a scenario field).

Thermal figures (per variant)
-----------------------------
- *uncoupled*: the circuit at the reference oil temperature (the pump's
  datasheet viscosity), its mean heat turned into a steady temperature at
  the typical ambient: ``Q = UA(T)(T - T_a)``, solved by Newton's method to
  machine precision;
- *coupled* (``oil_temperature_steady``): ``Q(T) = UA(T)(T - T_a)`` with the
  circuit re-solved at each variant's own oil temperature: secant steps on
  a linear model of Q(T) through exact solves, started from the reference
  and design-point solves, to 0.01 K (each variant iterates on its own, so
  its result does not depend on the others in the batch);
- *design point*: oil held at the design temperature on the hottest day,
  ``duty = max(0, Q(T_d) - UA(T_d)(T_d - T_a,max)) (1 + margin)``.

UA(T) is tabulated exactly as :func:`heatload.chain.conductance_fn` does
(160 points from T_a - 20 K to 250 degC, linear interpolation), once per
distinct air temperature and tank, so a variant's figures equal the
single-scenario chain's.
"""

from __future__ import annotations

import dataclasses
import difflib
import re
from dataclasses import dataclass, field

import numpy as np

from heatload import checks, circuits, cooler, cycle, energy, heat_transfer, oil, pumps, motors
from heatload.actuators import cylinder_areas
from heatload.errors import HeatloadError
from heatload.model import STRATEGIES, Scenario, Strategy, design_oil_temperature

TWO_PI = 2.0 * np.pi
COUPLING_TOLERANCE = 0.01   # [K], as the chain
COUPLING_MAX_ITER = 12
WARNING_CODES = ("stall", "speed-not-reached", "runaway", "intensification", "pressure-rating",
                 "motor-overload")

# (field kind, check) of every key that can vary; check: pos, nonneg, eff, frac_pos, any
_POWER_UNIT_KEYS = {
    "pump": {"displacement": ("displacement", "pos"), "shaft_speed": ("shaft_speed", "pos"),
             "volumetric_efficiency": ("dimensionless", "eff"),
             "hydromechanical_efficiency": ("dimensionless", "eff"),
             "rated_pressure": ("pressure", "pos"), "max_pressure": ("pressure", "pos")},
    "motor": {"rated_power": ("power", "pos"), "efficiency": ("dimensionless", "eff"),
              "drive_efficiency": ("dimensionless", "eff")},
    "relief": {"cracking_pressure": ("pressure", "pos"), "override": ("pressure", "nonneg"),
               "rated_flow": ("flow", "pos")},
    "directional_valve": {"rated_flow": ("flow", "pos"), "pressure_drop": ("pressure", "pos"),
                          "centre_pressure_drop": ("pressure", "nonneg"),
                          "max_pressure": ("pressure", "pos")},
    "check_valve": {"cracking_pressure": ("pressure", "nonneg"), "rated_flow": ("flow", "pos"),
                    "pressure_drop": ("pressure", "nonneg")},
    "pressure_line": {"length": ("distance", "pos"), "inner_diameter": ("length", "pos"),
                      "roughness": ("length", "nonneg"), "fittings_k": ("dimensionless", "nonneg")},
}
_POWER_UNIT_KEYS["return_line"] = _POWER_UNIT_KEYS["pressure_line"]
_CYLINDER_KEYS = {"bore": ("length", "pos"), "rod": ("length", "pos"),
                  "stroke": ("distance", "pos"), "friction_force": ("force", "nonneg"),
                  "max_pressure": ("pressure", "pos"), "dead_volume": ("volume", "nonneg")}
_MOTOR_KEYS = {"displacement": ("displacement", "pos"),
               "volumetric_efficiency": ("dimensionless", "eff"),
               "hydromechanical_efficiency": ("dimensionless", "eff"),
               "max_pressure": ("pressure", "pos")}
_PHASE_KEYS = {"load": ("force", "any"), "speed": ("velocity", "pos"),
               "stroke": ("distance", "pos"), "duration": ("time", "pos"),
               "hold_pressure": ("pressure", "pos"), "hold_force": ("force", "pos")}
_STRATEGY_KEYS = {"flow_control_min_drop": ("pressure", "nonneg"),
                  "bypass_spring": ("pressure", "nonneg"),
                  "compensator_setting": ("pressure", "pos"),
                  "load_sensing_margin": ("pressure", "nonneg"),
                  "standby_pressure": ("pressure", "nonneg"),
                  "counterbalance_setting": ("pressure", "pos"),
                  "counterbalance_pilot_ratio": ("dimensionless", "pos"),
                  "min_speed_fraction": ("dimensionless", "frac_pos"),
                  "max_speed_fraction": ("dimensionless", "pos")}
_TABLE_KEYS = {
    "ambient": {"temperature": ("temperature", "pos"), "temperature_max": ("temperature", "pos")},
    "reservoir": {"oil_volume": ("volume", "pos"), "steel_mass": ("mass", "nonneg"),
                  "steel_specific_heat": ("specific_heat", "pos"),
                  "heat_transfer_coefficient": ("heat_transfer_coefficient", "pos"),
                  "heat_transfer_factor": ("dimensionless", "pos")},
    "fluid": {"bulk_modulus": ("bulk_modulus", "pos")},
    "economics": {"hours_per_year": ("dimensionless", "pos"),
                  "electricity_price": ("specific_energy_price", "nonneg")},
    "cooler": {"margin": ("dimensionless", "nonneg"),
               "oil_temperature_max": ("temperature", "pos")},
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
        out.append(f"phases[*].{k}")
        out += [f"phases[{i}].{k}" for i, ph in enumerate(scenario.phases)
                if getattr(ph, k) is not None or k in ("load", "speed")]
    for s in scenario.strategies:
        out += [f"strategies.{s.name}.{k}" for k in _STRATEGY_KEYS]
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
        kind, check = keys[key]
        obj = getattr(scenario.power_unit, part)
        return FieldRef(path, ((part, key),), kind, check, (getattr(obj, key),))
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
        kinds = {_actuator_keys(a)[key][0] for a in acts}
        return FieldRef(path, tuple(("actuator", a.name, key) for a in acts),
                        kinds.pop() if len(kinds) == 1 else None,
                        _actuator_keys(acts[0])[key][1],
                        tuple(getattr(a, key) for a in acts))
    if head == "phases" and hidx is not None and len(parts) == 2:
        key = parts[1][0]
        if key not in _PHASE_KEYS:
            raise _unknown(path, scenario)
        n = len(scenario.phases)
        if hidx == "*":
            idx = [i for i, ph in enumerate(scenario.phases) if getattr(ph, key) is not None]
            if not idx:
                raise _unknown(path, scenario, f"no phase has a {key}")
        else:
            if int(hidx) >= n:
                raise _unknown(path, scenario, f"index {hidx} is out of range (there are {n})")
            idx = [int(hidx)]
        kinds = {_phase_kind(scenario, scenario.phases[i], key) for i in idx}
        return FieldRef(path, tuple(("phase", i, key) for i in idx),
                        kinds.pop() if len(kinds) == 1 else None, _PHASE_KEYS[key][1],
                        tuple(getattr(scenario.phases[i], key) for i in idx))
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
        kind, check = _STRATEGY_KEYS[key]
        return FieldRef(path, tuple(("strategy", s.name, key) for s in chosen), kind, check,
                        tuple(getattr(s.parameters, key) for s in chosen))
    if head in _TABLE_KEYS and hidx is None and len(parts) == 2 and parts[1][0] in _TABLE_KEYS[head]:
        key = parts[1][0]
        kind, check = _TABLE_KEYS[head][key]
        nominal = 1.0 if key == "heat_transfer_factor" else getattr(getattr(scenario, head), key)
        return FieldRef(path, ((head, key),), kind, check, (nominal,))
    raise _unknown(path, scenario)


def _check_values(ref: FieldRef, values):
    v = values
    if not np.all(np.isfinite(v)):
        raise HeatloadError("values must be finite numbers", field=ref.path)
    bad = {"pos": v <= 0, "nonneg": v < 0, "eff": (v <= 0) | (v > 1),
           "frac_pos": (v <= 0) | (v > 1), "any": np.zeros(v.shape, bool)}[ref.check]
    if np.any(bad):
        what = {"pos": "> 0", "nonneg": ">= 0", "eff": "within (0, 1]",
                "frac_pos": "within (0, 1]"}[ref.check]
        raise HeatloadError(f"values must be {what} (SI), got {float(v[np.argmax(bad)]):g}",
                            field=ref.path)


def _strategy_of(scenario, strategy) -> Strategy:
    if isinstance(strategy, Strategy):
        return strategy
    try:
        return scenario.strategy(strategy)
    except KeyError:
        if strategy in STRATEGIES:
            return Strategy(strategy)
        raise HeatloadError(f"unknown strategy {strategy!r}; expected one of "
                            f"{', '.join(s.name for s in scenario.strategies)}",
                            field="strategy") from None


# ---------------------------------------------------------------------------
# building the solver inputs of N variants
# ---------------------------------------------------------------------------

class _Values:
    """Lookup of a field's value: the variants' array (N,) or the scenario's scalar."""

    def __init__(self, scenario, strategy, overrides):
        self.sc = scenario
        self.strategy = strategy
        self.v = {}
        self.n = 1
        self.refs = []
        self.by_path = {}
        lengths = set()
        for path, vals in overrides.items():
            ref = resolve_path(scenario, path)
            a = np.atleast_1d(np.asarray(vals, dtype=float))
            if a.ndim != 1:
                raise HeatloadError("give a 1-D array of values per path", field=path)
            _check_values(ref, a)
            lengths.add(a.size)
            self.refs.append(ref)
            self.by_path[ref.path] = a
            for t in ref.targets:
                if t[0] == "strategy":
                    if t[1] != strategy.name:
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


def _col(x, n):
    return np.broadcast_to(np.asarray(x, dtype=float), (n,))


def _phase_arrays(sc: Scenario, val: _Values) -> dict:
    """:func:`heatload.cycle.phase_arrays` with any field an array over variants
    (same expressions, so a variant's entries equal the changed scenario's)."""
    n_var = val.n
    g = val.get
    pump = sc.power_unit.pump
    q_pump_nominal = g(("pump", "displacement"), pump.displacement) * g(("pump", "shaft_speed"),
                                                                          pump.shaft_speed)
    keys = ("a_in", "a_out", "q_ratio", "speed_per_flow", "force", "load", "q_target",
            "hold_pressure", "stroke", "duration", "compression_volume",
            "compression_volume_outlet", "work_per_load_speed",
            "max_pressure_inlet", "max_pressure_outlet")
    cols = {k: [] for k in keys}
    flags = {k: [] for k in ("moving", "by_stroke", "compress", "extending", "unloading",
                             "previous_phase")}
    chamber = []
    for i, ph in enumerate(sc.phases):
        act = sc.actuator(ph.actuator) if ph.actuator else None
        pget = lambda key, default, i=i: g(("phase", i, key), default)  # noqa: E731
        speed = pget("speed", ph.speed)
        stroke = pget("stroke", ph.stroke)
        duration = pget("duration", ph.duration)
        load = pget("load", ph.load)
        moving = ph.motion in ("extend", "retract", "run") and act is not None
        row = dict(load=load, work_per_load_speed=1.0, force=0.0, compression_volume=0.0,
                   compression_volume_outlet=0.0, q_target=0.0, hold_pressure=0.0, duration=0.0)
        if act is None:
            row.update(a_in=1.0, a_out=1.0, q_ratio=1.0, speed_per_flow=1.0,
                       max_pressure_inlet=np.inf, max_pressure_outlet=np.inf)
            chamber.append(None)
        else:
            aget = lambda key, default, a=act: g(("actuator", a.name, key), default)  # noqa: E731
            mp = aget("max_pressure", act.max_pressure)
            row.update(max_pressure_inlet=mp, max_pressure_outlet=mp)
            if act.kind == "motor":
                d = aget("displacement", act.displacement)
                eta = aget("hydromechanical_efficiency", act.hydromechanical_efficiency)
                t = np.asarray(load, float)
                row.update(a_in=d, a_out=d, q_ratio=1.0,
                           speed_per_flow=aget("volumetric_efficiency",
                                               act.volumetric_efficiency) / d,
                           force=np.where(t >= 0, TWO_PI * t / eta, TWO_PI * t * eta),
                           work_per_load_speed=TWO_PI,
                           compression_volume=(d + act.dead_volume
                                               if hasattr(act, "dead_volume") else d))
                row["compression_volume_outlet"] = row["compression_volume"]
                chamber.append((act.name, "motor"))
            else:
                cap, ann = cylinder_areas(aget("bore", act.bore), aget("rod", act.rod))
                if ph.motion == "retract":
                    a_in, a_out = ann, cap
                    chamber.append((act.name, "rod"))
                else:
                    a_in, a_out = cap, ann
                    chamber.append((act.name, "cap"))
                friction = aget("friction_force", act.friction_force) if moving else 0.0
                row.update(a_in=a_in, a_out=a_out, q_ratio=a_out / a_in,
                           speed_per_flow=1.0 / a_in, force=load + friction,
                           compression_volume=a_in * aget("stroke", act.stroke)
                           + aget("dead_volume", act.dead_volume),
                           compression_volume_outlet=a_out * aget("stroke", act.stroke)
                           + aget("dead_volume", act.dead_volume))
        spf = row["speed_per_flow"]
        if moving:
            row["q_target"] = np.inf if speed is None else speed / spf
        v_set = speed if speed is not None else q_pump_nominal * spf
        by_stroke = False
        if duration is not None:
            row["duration"] = duration
        elif stroke is not None and moving:
            row["duration"] = stroke / v_set
            by_stroke = True
        row["stroke"] = stroke if stroke is not None else 0.0
        if not moving:
            hp = pget("hold_pressure", ph.hold_pressure)
            hf = pget("hold_force", ph.hold_force)
            if hp is not None:
                row["hold_pressure"] = hp
            elif hf is not None and act is not None:
                row["hold_pressure"] = hf / row["a_in"]
        for k in keys:
            cols[k].append(_col(row[k], n_var))
        flags["moving"].append(moving)
        flags["by_stroke"].append(by_stroke)
        flags["compress"].append(ph.compress and act is not None)
        flags["extending"].append(ph.motion in ("extend", "hold", "run"))
        flags["unloading"].append(cycle._UNLOAD_CODE[ph.unloading])
    n = len(sc.phases)
    prev = -np.ones(n, dtype=int)
    for i in range(n):
        j = (i - 1) % n
        if n > 1 and chamber[i] is not None and chamber[i] == chamber[j]:
            prev[i] = j
    out = {k: np.stack(v, axis=-1) for k, v in cols.items()}
    out["moving"] = np.array(flags["moving"], dtype=bool)
    out["by_stroke"] = np.array(flags["by_stroke"], dtype=bool)
    out["compress"] = np.array(flags["compress"], dtype=bool)
    out["extending"] = np.array(flags["extending"], dtype=bool)
    out["unloading"] = np.array(flags["unloading"], dtype=int)
    out["previous_phase"] = prev
    return out


def _power_unit_constants(sc: Scenario, val: _Values) -> dict:
    """The oil-temperature-independent part of :func:`heatload.cycle.power_unit_arrays`."""
    g = val.get
    pu = sc.power_unit
    pump = pu.pump
    t_rated = cycle.reference_oil_temperature(sc)
    rho_rated = float(oil.fluid_density(sc.fluid, t_rated))
    speed = g(("pump", "shaft_speed"), pump.shaft_speed)
    slip, viscous, friction = pumps.wilson_coefficients(
        g(("pump", "volumetric_efficiency"), pump.volumetric_efficiency),
        g(("pump", "hydromechanical_efficiency"), pump.hydromechanical_efficiency),
        g(("pump", "rated_pressure"), pump.rated_pressure), speed,
        pump.rated_viscosity * rho_rated)
    motor = pu.motor
    rated_power = g(("motor", "rated_power"), motor.rated_power)
    eff = g(("motor", "efficiency"), motor.efficiency)
    eta_motor = (eff if eff is not None
                 else motors.ie_class_efficiency(rated_power, motor.efficiency_class, motor.poles))

    def part(name, key):
        return g((name, key), getattr(getattr(pu, name), key))

    return {
        "pump_displacement": part("pump", "displacement"), "pump_speed": speed,
        "pump_slip": slip, "pump_viscous": viscous, "pump_friction": friction,
        "relief_cracking": part("relief", "cracking_pressure"),
        "relief_override": part("relief", "override"),
        "relief_rated_flow": part("relief", "rated_flow"),
        "dv_rated_flow": part("directional_valve", "rated_flow"),
        "dv_rated_drop": part("directional_valve", "pressure_drop"),
        "dv_centre_drop": part("directional_valve", "centre_pressure_drop"),
        "centre_unloads": pu.directional_valve.centre in ("open", "tandem"),
        "check_cracking": part("check_valve", "cracking_pressure"),
        "check_rated_flow": part("check_valve", "rated_flow"),
        "check_rated_drop": part("check_valve", "pressure_drop"),
        "pline_d": part("pressure_line", "inner_diameter"),
        "pline_l": part("pressure_line", "length"),
        "pline_rough": part("pressure_line", "roughness"),
        "pline_k": part("pressure_line", "fittings_k"),
        "rline_d": part("return_line", "inner_diameter"),
        "rline_l": part("return_line", "length"),
        "rline_rough": part("return_line", "roughness"),
        "rline_k": part("return_line", "fittings_k"),
        "motor_rated_power": rated_power, "motor_rated_efficiency": eta_motor,
        "drive_efficiency": part("motor", "drive_efficiency"),
        "bulk_modulus": g(("fluid", "bulk_modulus"), sc.fluid.bulk_modulus),
    }


def _strategy_entries(sc: Scenario, st: Strategy, val: _Values) -> dict:
    """:func:`heatload.cycle.strategy_arrays` with variant arrays."""
    p = st.parameters
    g = val.get

    def sp(key):
        return g(("strategy", key), getattr(p, key))

    relief = g(("relief", "cracking_pressure"), sc.power_unit.relief.cracking_pressure)
    comp = sp("compensator_setting")
    cb = sp("counterbalance_setting")
    return {
        "fc_min_drop": sp("flow_control_min_drop"), "bypass_spring": sp("bypass_spring"),
        "compensator": comp if comp is not None else relief - 10e5,
        "ls_margin": sp("load_sensing_margin"), "standby": sp("standby_pressure"),
        "cb_fitted": cb is not None, "cb_setting": cb if cb is not None else 0.0,
        "cb_ratio": sp("counterbalance_pilot_ratio"),
        "vs_min_fraction": sp("min_speed_fraction"), "vs_max_fraction": sp("max_speed_fraction"),
    }


def _oil_entries(sc: Scenario, t_oil):
    """Oil state entries at *t_oil* [K] (scalar or (N,)), as power_unit_arrays."""
    t = np.asarray(t_oil, dtype=float)
    t = t[..., None] if t.ndim else t
    state = cycle.oil_state(sc, t)
    pump = sc.power_unit.pump
    nu_pump = np.clip(state["viscosity"], pump.viscosity_min, pump.viscosity_max)
    return {**state, "mu": state["density"] * nu_pump}


def _compact(c: dict, shape) -> dict:
    """Broadcast entries to *shape*, keeping single values 0-d: the solvers
    then compute uniform terms once (values identical to
    :func:`heatload.cycle.finalize`, which broadcasts every entry)."""
    out = {}
    for k, v in c.items():
        a = np.asarray(v)
        out[k] = a.reshape(()) if a.size == 1 else np.broadcast_to(a, shape)
    out["shape"] = shape
    return out


def _take(c: dict, idx) -> dict:
    """Entries of the variants *idx* (leading axis) of a compact input dict."""
    return {k: (v[idx] if (isinstance(v, np.ndarray) and v.ndim == 2) else v)
            for k, v in c.items() if k != "shape"}


class _Builder:
    """Solver inputs of N variants with the oil temperature left open."""

    def __init__(self, scenario, st, val: _Values):
        self.sc = scenario
        self.kind = st.kind
        self.n = val.n
        self.nominal = not val.v
        pa = cycle.phase_arrays(scenario) if self.nominal else _phase_arrays(scenario, val)
        base = dict(pa)
        if self.nominal:
            full = cycle.power_unit_arrays(scenario, cycle.reference_oil_temperature(scenario))
            base.update({k: v for k, v in full.items() if k not in ("density", "viscosity", "mu")})
            base.update(cycle.strategy_arrays(scenario, st))
        else:
            # values per variant (N,) get a phase axis: (N, 1)
            for part in (_power_unit_constants(scenario, val),
                         _strategy_entries(scenario, st, val)):
                base.update({k: (np.asarray(v)[:, None] if np.ndim(v) == 1 else v)
                             for k, v in part.items()})
        self.base = base
        self.n_phases = len(scenario.phases)
        self.shape = (self.n, self.n_phases)
        self._full = None

    def inputs(self, t_oil, idx=None):
        t = np.asarray(t_oil, dtype=float)
        if idx is None:
            c = dict(self.base)
            c.update(_oil_entries(self.sc, t))
            return _compact(c, self.shape)
        if self._full is None:
            self._full = _compact(self.base, self.shape)
        c = _take(self._full, idx)
        c.update(_oil_entries(self.sc, t))
        return _compact(c, (int(np.size(idx)), self.n_phases))

    def solve(self, t_oil, idx=None):
        c = self.inputs(t_oil, idx)
        return circuits.solve_strategy(self.kind, c), c


# ---------------------------------------------------------------------------
# conductance tables (one per air temperature and tank, as the chain's)
# ---------------------------------------------------------------------------

def _air_pressure(altitude):
    return 101325.0 * (1.0 - 2.25577e-5 * altitude) ** 5.25588


def _conductance_rows(sc: Scenario, air, h_user):
    """Tables UA(T_oil) for each distinct (air temperature, user coefficient).

    Returns (t_nodes (U, 160), ua_nodes (U, 160), inverse (N,)) where
    ``inverse`` maps each variant to its row.
    """
    air = np.asarray(air, float)
    # NaN (no user coefficient) -> -1: np.unique keeps every NaN apart
    h = np.where(np.isfinite(h_user), np.asarray(h_user, float), -1.0)
    key = np.stack([air, h], axis=-1).reshape(-1, 2)
    if np.all(key == key[:1]):  # one air temperature and tank for all: no sort
        uniq, inverse = key[:1], np.zeros(len(key), int)
    else:
        uniq, inverse = np.unique(key, axis=0, return_inverse=True)
    pressure = _air_pressure(sc.ambient.altitude)
    # the chain's nodes, every row in one vectorized call
    t = np.linspace(uniq[:, 0] - 20.0, 523.15, 160, axis=-1)
    ta = np.broadcast_to(uniq[:, :1], t.shape)
    free = uniq[:, 1] < 0.0
    ua = np.empty(t.shape)
    if free.any():
        ua[free] = heat_transfer.reservoir_conductance(sc.reservoir, t[free], ta[free], pressure)
    if (~free).any():
        # a user coefficient h: UA = h A_eff + further surfaces (linear in h)
        unit = heat_transfer.reservoir_heat_transfer(
            dataclasses.replace(sc.reservoir, heat_transfer_coefficient=1.0),
            t[~free], ta[~free], pressure)
        own = unit.conductance - unit.surfaces
        ua[~free] = uniq[~free, 1:2] * own + unit.surfaces
    return t, ua, inverse.reshape(-1)


class _Conductance:
    """UA(T_oil) [W/K] per variant, interpolated linearly in its own table
    (the nodes and values of :func:`heatload.chain.conductance_fn`; the
    same formula as :func:`numpy.interp`, clamped at the ends)."""

    def __init__(self, sc, air, h_user, factor):
        self.t, self.ua, self.row = _conductance_rows(sc, air, h_user)
        self.factor = np.asarray(factor, float)
        self.t0 = self.t[:, 0]
        self.step = (self.t[:, -1] - self.t[:, 0]) / (self.t.shape[1] - 1)

    def __call__(self, t_oil, idx=None):
        """(UA, dUA/dT) at *t_oil* (n,) for the variants *idx* (default all)."""
        row = self.row if idx is None else self.row[idx]
        t, row = np.broadcast_arrays(np.asarray(t_oil, float), row)
        m = self.t.shape[1]
        xs, ys = self.t, self.ua
        j = np.clip(np.floor((t - self.t0[row]) / self.step[row]), 0, m - 2).astype(int)
        # floor on rounded nodes can land one segment off: step to xs[j] <= t < xs[j+1]
        j = np.where((j > 0) & (t < xs[row, j]), j - 1, j)
        j = np.where((j < m - 2) & (t >= xs[row, j + 1]), j + 1, j)
        x0, x1 = xs[row, j], xs[row, j + 1]
        y0, y1 = ys[row, j], ys[row, j + 1]
        slope = (y1 - y0) / (x1 - x0)
        ua = slope * (t - x0) + y0
        below, above = t < xs[row, 0], t >= xs[row, -1]
        ua = np.where(below, ys[row, 0], np.where(above, ys[row, -1], ua))
        slope = np.where(below | above, 0.0, slope)
        f = self.factor if (idx is None or self.factor.ndim == 0) else self.factor[idx]
        return ua * f, slope * f


def _steady(q0, t0, slope, ta, ua_fn, idx=None):
    """T with ``q0 + slope (T - t0) = UA(T) (T - T_a)`` by Newton's method to
    machine precision (UA piecewise linear, g convex enough: a few steps)."""
    q0, t0, slope, ta = (np.asarray(x, float) for x in (q0, t0, slope, ta))
    ua, _ = ua_fn(ta, idx)
    t = ta + np.maximum(q0, 0.0) / ua
    for _ in range(60):
        ua, dua = ua_fn(t, idx)
        g = ua * (t - ta) - q0 - slope * (t - t0)
        dg = ua + dua * (t - ta) - slope
        step = g / np.where(dg > 0, dg, 1.0)
        t_new = np.maximum(t - step, ta - 19.0)
        done = np.abs(t_new - t) <= 1e-11 * np.abs(t)
        t = t_new
        if np.all(done):
            break
    return t


# ---------------------------------------------------------------------------
# results
# ---------------------------------------------------------------------------

@dataclass
class VariantResults:
    """Figures of N variants of one strategy (arrays of shape (N,), SI).

    Temperatures [K], heat and duty [W], energies [J], money in the
    scenario's currency, pressures [Pa], times [s].
    """

    strategy: str
    values: dict                       #: path -> (N,) SI values that were varied
    cycle_time: np.ndarray             #: at the operating temperature [s]
    heat_to_oil: np.ndarray            #: mean heat into the oil, operating T [W]
    heat_to_oil_uncoupled: np.ndarray  #: at the reference oil temperature [W]
    electric_energy_per_cycle: np.ndarray  #: operating T [J]
    electric_energy_per_year: np.ndarray   #: operating T [J]
    cost_per_year: np.ndarray
    peak_pressure: np.ndarray          #: operating T [Pa]
    oil_temperature_uncoupled: np.ndarray  #: steady, typical ambient, reference-T circuit [K]
    oil_temperature_steady: np.ndarray     #: coupled steady, typical ambient, no cooler [K]
    oil_temperature_operating: np.ndarray  #: coupled, or held at the design T by the cooler [K]
    oil_temperature_cycle_max: np.ndarray  #: highest T in the periodic cycle at the coupled T [K]
    coupling_iterations: np.ndarray
    design_heat: np.ndarray            #: mean heat at the design oil temperature [W]
    cooler_duty: np.ndarray            #: with margin [W]
    cooler_duty_without_margin: np.ndarray
    warnings: dict = field(default_factory=dict)  #: code -> counts of phases (N,)
    thermal: object = True  #: True (coupled), "design" or False: see evaluate_variants

    def __len__(self):
        return int(np.size(self.cycle_time))

    def frame(self):
        """The results as a pandas DataFrame: one row per variant, SI units in
        the column names."""
        import pandas as pd

        cols = {p: np.asarray(v) for p, v in self.values.items()}
        cols.update({
            "strategy": [self.strategy] * len(self),
            "heat_to_oil_W": self.heat_to_oil,
            "heat_to_oil_uncoupled_W": self.heat_to_oil_uncoupled,
            "electric_energy_per_cycle_J": self.electric_energy_per_cycle,
            "electric_energy_per_year_kWh": self.electric_energy_per_year / energy.J_PER_KWH,
            "cost_per_year": self.cost_per_year,
            "peak_pressure_Pa": self.peak_pressure,
            "cycle_time_s": self.cycle_time,
            "oil_temperature_uncoupled_K": self.oil_temperature_uncoupled,
            "oil_temperature_steady_K": self.oil_temperature_steady,
            "oil_temperature_operating_K": self.oil_temperature_operating,
            "oil_temperature_cycle_max_K": self.oil_temperature_cycle_max,
            "design_heat_W": self.design_heat,
            "cooler_duty_W": self.cooler_duty,
            "cooler_duty_without_margin_W": self.cooler_duty_without_margin,
            "coupling_iterations": self.coupling_iterations,
        })
        for code, n in self.warnings.items():
            cols[f"warnings_{code}"] = n
        return pd.DataFrame(cols)


def _mean_heat(r):
    t = r.duration
    return (r.heat_to_oil * t).sum(axis=-1) / t.sum(axis=-1)


def _figures(r, c, sc, val, idx=None):
    """Cycle figures of a solved batch: dict of (n,) arrays (energy.summarize)."""
    s = energy.summarize(r, sc.economics)
    hours = val.get(("economics", "hours_per_year"), sc.economics.hours_per_year)
    price = val.get(("economics", "electricity_price"), sc.economics.electricity_price)
    if idx is not None:
        hours = hours[idx] if np.ndim(hours) else hours
        price = price[idx] if np.ndim(price) else price
    cycles = hours * 3600.0 / s.cycle_time
    e_year = s.electric_energy_per_cycle * cycles
    # a figure that no variant changes comes back unbroadcast (a 0-d cycle time when
    # the only phase is timed by its stroke): give every figure the batch's shape
    phase_heat = np.asarray(r.heat_to_oil)
    batch = phase_heat.shape[:-1] if phase_heat.ndim else ()
    out = {"cycle_time": s.cycle_time, "heat": s.average_heat_to_oil,
           "e_cycle": s.electric_energy_per_cycle, "e_year": e_year,
           "cost": e_year * price, "peak": s.peak_pressure}
    out = {k: np.broadcast_to(v, np.broadcast_shapes(np.shape(v), batch)).copy()
           for k, v in out.items()}
    out.update(phase_heat=phase_heat,
               durations=np.broadcast_to(r.duration, np.broadcast_shapes(
                   np.shape(r.duration), phase_heat.shape)).copy(),
               warnings=warning_counts(r, c, sc, val, idx))
    return out


def warning_counts(result, c, sc, val=None, idx=None) -> dict:
    """Phases per variant that carry each warning code (the conditions of
    :func:`heatload.checks.phase_warnings`, vectorized): code -> (n,) ints."""
    get = val.get if val is not None else (lambda k, d: d)
    pu = sc.power_unit

    def pick(x):
        x = np.asarray(x, float)
        if x.ndim and idx is not None:
            x = x[idx]
        return x[..., None] if x.ndim else x

    pp, p1, p2 = result.pump_pressure, result.inlet_pressure, result.outlet_pressure
    moving = np.broadcast_to(c["moving"], pp.shape)
    pump_max = pick(get(("pump", "max_pressure"), pu.pump.max_pressure))
    dv_max = pick(get(("directional_valve", "max_pressure"), pu.directional_valve.max_pressure))
    rating = np.broadcast_to(c["max_pressure_inlet"], pp.shape)
    hi = np.maximum(pp, np.maximum(p1, p2))
    rate = ((pp > pump_max * (1 + 1e-9)).astype(int) + (hi > dv_max * (1 + 1e-9))
            + (np.isfinite(rating) & (np.maximum(p1, p2) > rating * (1 + 1e-9))))
    intens = moving & (p2 > pp * (1 + 1e-6)) & (p2 > 1e5) & ~result.counterbalance_active
    stall = moving & result.stalled
    slow = moving & ~result.stalled & result.flow_limited
    over = checks.motor_overloaded(
        result.shaft_power, pick(get(("motor", "rated_power"), pu.motor.rated_power)),
        result.pump_shaft_speed / pick(get(("pump", "shaft_speed"), pu.pump.shaft_speed)))
    return {"stall": stall.sum(-1), "speed-not-reached": slow.sum(-1),
            "runaway": (moving & result.runaway).sum(-1),
            "intensification": intens.sum(-1), "pressure-rating": rate.sum(-1),
            "motor-overload": over.sum(-1)}


def _select(mask, a, b):
    if isinstance(a, dict):
        return {k: _select(mask, a[k], b[k]) for k in a}
    a = np.asarray(a)
    return np.where(mask.reshape(mask.shape + (1,) * (a.ndim - 1)), a, b)


def evaluate_variants(scenario: Scenario, strategy, overrides: dict | None = None,
                      oil_temperature=None, thermal=True) -> VariantResults:
    """Evaluate N variants of *scenario* for one *strategy* in vectorized passes.

    Each variant is the scenario with the fields named by the keys of
    *overrides* set to its values; its figures equal those of the changed
    scenario (:func:`dataclasses.replace`) evaluated alone.

    Q(T) = UA(T) (T - T_a) (steady), duty = max(0, Q(T_d) - UA(T_d)(T_d - T_a,max)) (1 + m)

    Parameters
    ----------
    scenario : Scenario
    strategy : Strategy or str
        A strategy of the scenario (name or kind) or any kind of
        :data:`heatload.model.STRATEGIES` with default settings.
    overrides : dict, optional
        Field path -> 1-D array of N values in SI (see :func:`valid_paths`).
        Empty or None: the scenario itself (N = 1).
    oil_temperature : float, optional
        Oil temperature [K] of the uncoupled evaluation; default the
        reference temperature (the pump's datasheet viscosity).
    thermal : bool or "design", optional
        True (default): everything, with the self-consistent (coupled) oil
        temperature (about five solver calls).  ``"design"``: one solver
        call with the oil at the cooler's design temperature — heat, energy,
        cost, peak pressure and warnings there (where the machine runs once
        its cooler holds it), the exact cooler duty, and the steady oil
        temperature without a cooler estimated from that heat (uncoupled);
        the coupled figures are NaN.  False: only the circuit at the
        uncoupled temperature (one call); the design figures NaN.

    Returns
    -------
    VariantResults

    Raises
    ------
    HeatloadError
        Unknown path (with the nearest valid paths), values of the wrong
        sign or range, arrays of different lengths.

    Notes
    -----
    Energy, cost, peak pressure and warnings are at the operating oil
    temperature (the coupled one, or the design temperature where the sized
    cooler holds it there), as :func:`heatload.chain.evaluate_strategy`
    reports them.  The pump's datasheet viscosity (and so the reference
    temperature) and the fluid's viscosity curve are not variable.

    References
    ----------
    First law for the oil (steady lumped balance); cooler duty: common practice.
    """
    sc = scenario
    st = _strategy_of(sc, strategy)
    val = _Values(sc, st, overrides or {})
    n = val.n
    build = _Builder(sc, st, val)
    t_ref = cycle.reference_oil_temperature(sc) if oil_temperature is None else float(oil_temperature)
    g = val.get
    amb_t = _col(g(("ambient", "temperature"), sc.ambient.temperature), n)
    amb_hot = _col(g(("ambient", "temperature_max"), sc.ambient.temperature_max), n)
    h_res = sc.reservoir.heat_transfer_coefficient
    h_user = _col(g(("reservoir", "heat_transfer_coefficient"),
                    np.nan if h_res is None else h_res), n)
    factor = g(("reservoir", "heat_transfer_factor"), 1.0)
    ua_typ = _Conductance(sc, amb_t, h_user, factor)

    nan = np.full(n, np.nan)
    if thermal == "design":
        return _design_point_only(sc, st, val, build, n, g, amb_t, amb_hot, h_user, factor,
                                  ua_typ)
    res_u, c_u = build.solve(t_ref)
    fig_u = _figures(res_u, c_u, sc, val)
    q_u = _mean_heat(res_u)
    t_u = _steady(q_u, t_ref, 0.0, amb_t, ua_typ)
    if not thermal:
        return _results(st, val, fig_u, heat_to_oil_uncoupled=q_u,
                        oil_temperature_uncoupled=t_u, oil_temperature_steady=nan,
                        oil_temperature_operating=nan, oil_temperature_cycle_max=nan,
                        coupling_iterations=np.zeros(n, int), design_heat=nan, cooler_duty=nan,
                        cooler_duty_without_margin=nan, thermal=False)

    # design point: oil at the design temperature, hottest ambient
    t_d, fig_d, q_d, margin, duty0 = _design_point(sc, val, build, n, g, amb_hot, h_user, factor)
    duty = duty0 * (1.0 + margin)

    # coupled steady temperature at the typical ambient: secant steps on Q(T)
    ta_, qa = np.full(n, t_ref), q_u.copy()
    tb_, qb = t_d.copy(), q_d.copy()
    t_c = np.full(n, np.nan)
    iters = np.zeros(n, int)
    fig_c = None
    todo = np.arange(n)
    for it in range(1, COUPLING_MAX_ITER + 1):
        if not todo.size:
            break
        dt = tb_[todo] - ta_[todo]
        slope = np.where(dt != 0, (qb[todo] - qa[todo]) / np.where(dt != 0, dt, 1.0), 0.0)
        t_new = _steady(qa[todo], ta_[todo], slope, amb_t[todo], ua_typ, todo)
        r, c = build.solve(t_new, todo)
        q_new = _mean_heat(r)
        ua_new, _ = ua_typ(t_new, todo)
        gap = q_new - ua_new * (t_new - amb_t[todo])
        done = (np.abs(gap) < COUPLING_TOLERANCE * np.maximum(ua_new, 1e-9)) | (
            it == COUPLING_MAX_ITER)
        f = _figures(r, c, sc, val, todo)
        if fig_c is None:
            fig_c = {k: (np.zeros((n,) + v.shape[1:], v.dtype) if not isinstance(v, dict)
                         else {kk: np.zeros(n, int) for kk in v}) for k, v in f.items()}
        sel = todo[done]
        for k, v in f.items():
            if isinstance(v, dict):
                for kk, vv in v.items():
                    fig_c[k][kk][sel] = vv[done]
            else:
                fig_c[k][sel] = v[done]
        t_c[sel] = t_new[done]
        iters[sel] = it
        # the secant keeps the newest point and the older one nearer to it
        keep_a = np.abs(ta_[todo] - t_new) < np.abs(tb_[todo] - t_new)
        nt, nq = todo[~done], ~done
        ta_[nt] = np.where(keep_a[nq], ta_[nt], tb_[nt])
        qa[nt] = np.where(keep_a[nq], qa[nt], qb[nt])
        tb_[nt], qb[nt] = t_new[nq], q_new[nq]
        todo = nt

    # the oil capacity and the periodic cycle at the coupled temperature
    ua_c, _ = ua_typ(t_c)
    rho = oil.fluid_density(sc.fluid, t_c)
    cp = oil.fluid_specific_heat(sc.fluid, t_c)
    res = sc.reservoir
    from heatload import thermal as _thermal
    cap = _thermal.heat_capacity(g(("reservoir", "oil_volume"), res.oil_volume), rho, cp,
                                 g(("reservoir", "steel_mass"), res.steel_mass),
                                 g(("reservoir", "steel_specific_heat"), res.steel_specific_heat))
    periodic = _thermal.periodic_steady_state(fig_c["phase_heat"], fig_c["durations"], cap, ua_c,
                                             amb_t)

    at_design = (duty0 > 0.0) & (t_d < t_c)
    t_op = np.where(at_design, t_d, t_c)
    fig_op = _select(at_design, fig_d, fig_c)
    return _results(st, val, fig_op, heat_to_oil_uncoupled=q_u,
                    oil_temperature_uncoupled=t_u, oil_temperature_steady=t_c,
                    oil_temperature_operating=t_op, oil_temperature_cycle_max=periodic.maximum,
                    coupling_iterations=iters, design_heat=q_d, cooler_duty=duty,
                    cooler_duty_without_margin=duty0, thermal=True)


def _design_point(sc, val, build, n, g, amb_hot, h_user, factor):
    """The design-point solve: oil at the design temperature, hottest ambient.
    Returns ``(T_d, figures, mean heat, margin, duty without margin)``."""
    t_d = _col(g(("cooler", "oil_temperature_max"),
                 design_oil_temperature(sc.fluid, sc.cooler)), n)
    res_d, c_d = build.solve(t_d if np.ndim(g(("cooler", "oil_temperature_max"), 0.0))
                             else float(t_d[0]))
    fig_d = _figures(res_d, c_d, sc, val)
    q_d = _mean_heat(res_d)
    ua_hot = _Conductance(sc, amb_hot, h_user, factor)
    ua_d, _ = ua_hot(t_d)
    margin = g(("cooler", "margin"), sc.cooler.margin)
    duty0 = cooler.required_cooler_duty(q_d, ua_d, t_d, amb_hot, 0.0)
    return t_d, fig_d, q_d, margin, duty0


def _design_point_only(sc, st, val, build, n, g, amb_t, amb_hot, h_user, factor, ua_typ):
    """:func:`evaluate_variants` with ``thermal="design"``: one solve."""
    t_d, fig_d, q_d, margin, duty0 = _design_point(sc, val, build, n, g, amb_hot, h_user, factor)
    t_s = _steady(q_d, t_d, 0.0, amb_t, ua_typ)
    nan = np.full(n, np.nan)
    return _results(st, val, fig_d, heat_to_oil_uncoupled=q_d,
                    oil_temperature_uncoupled=t_s, oil_temperature_steady=nan,
                    oil_temperature_operating=t_d, oil_temperature_cycle_max=nan,
                    coupling_iterations=np.zeros(n, int), design_heat=q_d,
                    cooler_duty=duty0 * (1.0 + margin), cooler_duty_without_margin=duty0,
                    thermal="design")


def _results(st, val, fig, **thermal_fields):
    """:class:`VariantResults` from the figures *fig* of the solve the figures
    are reported at, and the thermal fields of the mode."""
    return VariantResults(
        strategy=st.name, values=dict(val.by_path), cycle_time=fig["cycle_time"],
        heat_to_oil=fig["heat"], electric_energy_per_cycle=fig["e_cycle"],
        electric_energy_per_year=fig["e_year"], cost_per_year=fig["cost"],
        peak_pressure=fig["peak"], warnings=fig["warnings"], **thermal_fields)


def replaced_scenario(scenario: Scenario, values: dict) -> Scenario:
    """The scenario with the fields of *values* (path -> one SI value) set,
    by :func:`dataclasses.replace` (the single-scenario twin of a variant;
    ``reservoir.heat_transfer_factor`` has none and is refused)."""
    sc = scenario
    for path, value in values.items():
        ref = resolve_path(sc, path)
        for t in ref.targets:
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
