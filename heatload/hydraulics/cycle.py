"""From a scenario to the arrays the circuit solvers take.

:func:`circuit_inputs` turns a :class:`~heatload.model.Scenario`, one strategy
and an oil temperature into a flat dict of SI numpy arrays (one element per
phase, or broadcast over a leading axis of variants), so every solver is a
handful of vectorized passes.  Sweeps and the Monte Carlo change entries of
this dict and call the solvers again, without touching a Python loop per
variant.

Actuator conventions
--------------------
Each phase drives one *generalised* actuator with inlet "area" ``a_in`` and
outlet "area" ``a_out`` and effective force ``force``:

- cylinder extending: ``a_in = A_cap``, ``a_out = A_annulus``, ``force = F + F_friction``;
  retracting: the areas swap.  Speed [m/s] = Q1 / a_in.
- cylinder extending with ``regeneration`` (differential connection): ``a_in = A_cap -
  A_annulus`` (the rod's area), ``a_out = A_annulus``, ``Q2 / Q1 = A_annulus / a_in``; the
  rod side's oil returns to the cap side, so ``p2`` is the rod side's excess over the cap
  side (its path's drops) and ``p1 a_in - p2 a_out = force`` still holds.
- hydraulic motor: ``a_in = a_out = D`` [m^3/rev]; ``force = 2 pi T / eta_hm`` for a
  driving torque T >= 0 and ``2 pi T eta_hm`` for an overrunning one; speed
  [rev/s] = Q1 eta_v / D driving, Q1 / (eta_v D) overrun (the motor then pumps), so
  ``p1 a_in - p2 a_out = force`` holds with Q in m^3/s and the motor's loss stays >= 0.
"""

from __future__ import annotations

import numpy as np

from heatload.components import motors, pumps
from heatload.properties import oil
from heatload.components.actuators import cylinder_areas
from heatload.hydraulics.circuits import UNLOAD_CENTRE, UNLOAD_CHECK, UNLOAD_HELD, UNLOAD_RELIEF
from heatload.model import Scenario, Strategy, StrategyParameters
from heatload.paths import Overrides

_UNLOAD_CODE = {"relief": UNLOAD_RELIEF, "centre": UNLOAD_CENTRE, "held": UNLOAD_HELD,
                "pilot-check": UNLOAD_CHECK}
TWO_PI = 2.0 * np.pi


def oil_state(scenario: Scenario, oil_temperature) -> dict:
    """Oil properties at *oil_temperature* [K]: density [kg/m^3], kinematic
    [m^2/s] and dynamic [Pa s] viscosity."""
    fluid = scenario.fluid
    nu = oil.kinematic_viscosity(fluid, oil_temperature)
    rho = oil.fluid_density(fluid, oil_temperature)
    return {"density": rho, "viscosity": nu, "mu": rho * nu}


def reference_oil_temperature(scenario: Scenario) -> float:
    """Oil temperature [K] at which the pump's datasheet viscosity holds: the
    temperature of the *uncoupled* figures (efficiencies exactly as given)."""
    t = oil.temperature_for_viscosity(scenario.fluid, scenario.power_unit.pump.rated_viscosity)
    return float(np.clip(t, 253.15, 393.15))


def _nominal(key, default):
    return default


def _row(x):
    """A per-variant value (N,) as a column (N, 1) against the phase axis."""
    return np.asarray(x)[:, None] if np.ndim(x) == 1 else x


def phase_arrays(scenario: Scenario, values: Overrides | None = None) -> dict:
    """Per-phase arrays that do not depend on the strategy or the oil state.

    With *values* (:class:`heatload.paths.Overrides`) a varied field is an
    array over N variants and the entries it touches get shape ``(N, phases)``;
    the others stay ``(phases,)``.
    """
    g = values.get if values is not None else _nominal
    phases = scenario.phases
    n = len(phases)
    pump = scenario.power_unit.pump
    q_pump_nominal = g(("pump", "displacement"), pump.displacement) * g(("pump", "shaft_speed"),
                                                                          pump.shaft_speed)
    keys = ("a_in", "a_out", "q_ratio", "speed_per_flow", "force", "load", "q_target",
            "hold_pressure", "stroke", "duration", "compression_volume",
            "compression_volume_outlet", "work_per_load_speed",
            "max_pressure_inlet", "max_pressure_outlet")
    cols = {k: [] for k in keys}
    out = {"moving": np.zeros(n, dtype=bool), "by_stroke": np.zeros(n, dtype=bool),
           "compress": np.zeros(n, dtype=bool), "extending": np.zeros(n, dtype=bool),
           "unloading": np.zeros(n, dtype=int), "previous_phase": -np.ones(n, dtype=int)}
    chamber = [None] * n
    for i, ph in enumerate(phases):
        act = scenario.actuator(ph.actuator) if ph.actuator else None

        def pget(key, default, i=i):
            return g(("phase", i, key), default)
        speed = pget("speed", ph.speed)
        stroke = pget("stroke", ph.stroke)
        duration = pget("duration", ph.duration)
        load = pget("load", ph.load)
        moving = (ph.motion in ("extend", "retract", "run") and (ph.speed is None or ph.speed > 0)
                  and act is not None)
        row = dict(load=load, work_per_load_speed=1.0, force=0.0, compression_volume=0.0,
                   compression_volume_outlet=0.0,
                   q_target=0.0, hold_pressure=0.0, duration=0.0)
        if act is None:
            row.update(a_in=1.0, a_out=1.0, q_ratio=1.0, speed_per_flow=1.0,
                       max_pressure_inlet=np.inf, max_pressure_outlet=np.inf)
        else:
            def aget(key, default, a=act):
                return g(("actuator", a.name, key), default)
            mp = aget("max_pressure", act.max_pressure)
            row.update(max_pressure_inlet=mp, max_pressure_outlet=mp)
            if act.kind == "motor":
                d = aget("displacement", act.displacement)
                eta = aget("hydromechanical_efficiency", act.hydromechanical_efficiency)
                ev = aget("volumetric_efficiency", act.volumetric_efficiency)
                t = np.asarray(load, float)
                # driven by the oil the motor leaks (n = Q eta_v / D); overrun by its load
                # it pumps, and the load turns it faster than the flow (n = Q / (eta_v D))
                row.update(a_in=d, a_out=d, q_ratio=1.0,
                           speed_per_flow=np.where(t >= 0, ev / d, 1.0 / (ev * d)),
                           force=np.where(t >= 0, TWO_PI * t / eta, TWO_PI * t * eta),
                           work_per_load_speed=TWO_PI,
                           compression_volume=(d + act.dead_volume
                                               if hasattr(act, "dead_volume") else d))
                row["compression_volume_outlet"] = row["compression_volume"]
                chamber[i] = (act.name, "motor")
            else:
                cap, ann = cylinder_areas(aget("bore", act.bore), aget("rod", act.rod))
                if ph.motion == "retract":
                    a_in, a_out = ann, cap
                    chamber[i] = (act.name, "rod")
                else:
                    a_in, a_out = cap, ann
                    chamber[i] = (act.name, "cap")
                friction = aget("friction_force", act.friction_force) if moving else 0.0
                row.update(a_in=a_in, a_out=a_out, q_ratio=a_out / a_in,
                           speed_per_flow=1.0 / a_in, force=load + friction,
                           compression_volume=a_in * aget("stroke", act.stroke)
                           + aget("dead_volume", act.dead_volume),
                           # the outlet chamber, full at the phase's start, is pressed
                           # to p2 too
                           compression_volume_outlet=a_out * aget("stroke", act.stroke)
                           + aget("dead_volume", act.dead_volume))
                if ph.regeneration:
                    # differential connection: the rod side's oil (Q2 = v A_ann) crosses
                    # the valve and its hose and joins the pump's at the cap side, so the
                    # pump fills the rod's area only: v = Q1 / A_rod.  With p2 the rod
                    # side's excess over the cap side (those drops), the balance
                    # p1 A_cap - (p1 + p2) A_ann = F is p1 A_rod - p2 A_ann = F, the
                    # generalised actuator's with a_in = A_rod (F = p A_rod when p2 = 0)
                    row.update(a_in=cap - ann, q_ratio=ann / (cap - ann),
                               speed_per_flow=1.0 / (cap - ann),
                               compression_volume=row["compression_volume"]
                               + row["compression_volume_outlet"],
                               compression_volume_outlet=0.0)
        spf = row["speed_per_flow"]
        # speed target as inlet flow
        if moving:
            row["q_target"] = np.inf if speed is None else speed / spf
        # duration: given, or the stroke at the set speed
        v_set = speed if speed is not None else q_pump_nominal * spf
        if duration is not None:
            row["duration"] = duration
        elif stroke is not None and moving:
            row["duration"] = stroke / v_set
            out["by_stroke"][i] = True
        row["stroke"] = stroke if stroke is not None else 0.0
        # held pressure in hold phases
        if not moving:
            hp = pget("hold_pressure", ph.hold_pressure)
            hf = pget("hold_force", ph.hold_force)
            if hp is not None:
                row["hold_pressure"] = hp
            elif hf is not None and act is not None:
                row["hold_pressure"] = hf / row["a_in"]
        for k in keys:
            cols[k].append(np.asarray(row[k], dtype=float))
        out["moving"][i] = moving
        out["compress"][i] = ph.compress and act is not None
        out["extending"][i] = ph.motion in ("extend", "hold", "run")
        out["unloading"][i] = _UNLOAD_CODE[ph.unloading]
    # the chamber's pressure before this phase: the previous phase's, when the
    # previous phase (cyclically) pressurised the same chamber
    for i in range(n):
        j = (i - 1) % n
        if n > 1 and chamber[i] is not None and chamber[i] == chamber[j]:
            out["previous_phase"][i] = j
    for k, v in cols.items():
        out[k] = np.stack(np.broadcast_arrays(*v), axis=-1)
    # passes per cycle of each phase ([[repeats]]): its time in the cycle is that
    # many of its single pass
    out["repeats"] = np.asarray(scenario.phase_repeats(), float)
    out.update(_actuator_valves(scenario, phases, out["moving"]))
    if any(ph.simultaneous for ph in phases):
        out.update(motion_arrays(scenario, out, values))
    return out


#: Entries that belong to one actuator's motion (the rest belong to the phase:
#: duration, stroke, unloading, repeats, ...): a phase's further motions carry
#: their own under the prefix ``motion<b>:`` (b = 1, 2, ...).
MOTION_KEYS = ("a_in", "a_out", "q_ratio", "speed_per_flow", "force", "load", "q_target",
               "hold_pressure", "compression_volume", "compression_volume_outlet",
               "work_per_load_speed", "max_pressure_inlet", "max_pressure_outlet",
               "moving", "compress", "extending", "previous_phase",
               "cb_own", "cb_own_setting", "cb_own_ratio", "back_pressure")


class _LeadOnly:
    """Overrides seen from a phase's further motions: a varied field of a phase
    (``phases[i].load``) is its own motion's, not theirs."""

    def __init__(self, values):
        self._values = values

    def get(self, key, default):
        if key[0] == "phase" or self._values is None:
            return default
        return self._values.get(key, default)


def motion_arrays(scenario: Scenario, lead: dict, values: Overrides | None = None) -> dict:
    """Entries of the phases' further motions (``[[phases.simultaneous]]``).

    The b-th further motion of every phase is one more set of the per-motion
    entries (:data:`MOTION_KEYS`), built by :func:`phase_arrays` itself (one
    description of an actuator's relations), under the prefix ``motion<b>:``;
    a phase with fewer motions has an idle filler there (not moving).  With
    them: each further motion's set flow as a share of the phase's own
    (``motion<b>:flow_share`` r_b), and the circuit's total per unit of the
    own flow, ``flow_total_ratio`` R = 1 + sum(r_b) (``motion<b>:`` R / r_b:
    the same total per unit of that motion's flow).  Motions share the supply
    in proportion to their set flows (every one reaches the same fraction of
    its set speed), so the solve needs the phase's own flow only.

    A further motion's chamber is counted from tank pressure each phase it
    moves (``previous_phase`` -1), and a further hold stores nothing (its
    chamber was filled when it moved).
    """
    from dataclasses import replace

    from heatload.model import Phase
    phases = scenario.phases
    count = max(len(ph.simultaneous) for ph in phases)
    q_own = np.asarray(lead["q_target"], float)
    total = np.ones(np.shape(q_own))
    out, shares = {}, []
    for b in range(1, count + 1):
        rows = []
        for ph in phases:
            if len(ph.simultaneous) < b:
                rows.append(Phase(name=ph.name, motion="idle", duration=1.0))
                continue
            x = ph.simultaneous[b - 1]
            rows.append(Phase(name=ph.name, actuator=x.actuator, motion=x.motion,
                              load=x.load, speed=x.speed, duration=1.0,
                              hold_pressure=x.hold_pressure, hold_force=x.hold_force,
                              unloading="centre", compress=x.compress and x.motion != "hold",
                              regeneration=x.regeneration))
        sub = phase_arrays(replace(scenario, phases=tuple(rows), repeats=()),
                           _LeadOnly(values))
        n = len(phases)
        sub.setdefault("cb_own", np.zeros(n, bool))
        sub.setdefault("cb_own_setting", np.zeros(n))
        sub.setdefault("cb_own_ratio", np.full(n, 3.0))
        sub.setdefault("back_pressure", np.zeros(n))
        sub["previous_phase"] = -np.ones(n, dtype=int)
        sub["compress"] = sub["compress"] & sub["moving"]
        for k in MOTION_KEYS:
            out[f"motion{b}:{k}"] = sub[k]
        share = np.where(sub["moving"], np.asarray(sub["q_target"], float)
                         / np.where(q_own > 0, q_own, 1.0), 0.0)
        shares.append(share)
        total = total + share
    out["flow_total_ratio"] = total
    for b, share in enumerate(shares, start=1):
        out[f"motion{b}:flow_share"] = share
        out[f"motion{b}:flow_total_ratio"] = total / np.where(share > 0, share, 1.0)
    return out


def _actuator_valves(scenario: Scenario, phases, moving) -> dict:
    """Valves set per actuator in its outlet line, per phase: its own
    counterbalance (``cb_own``, setting, pilot ratio; replaces the strategy's)
    and a back-pressure valve's setting while it moves (``back_pressure`` [Pa])."""
    n = len(phases)
    own, setting, ratio, bp = (np.zeros(n, bool), np.zeros(n), np.full(n, 3.0),
                               np.zeros(n))
    for i, ph in enumerate(phases):
        act = scenario.actuator(ph.actuator) if ph.actuator else None
        if act is None:
            continue
        if getattr(act, "counterbalance_setting", None) is not None:
            own[i], setting[i] = True, act.counterbalance_setting
            ratio[i] = act.counterbalance_pilot_ratio
        if getattr(act, "back_pressure", None) is not None and moving[i]:
            bp[i] = act.back_pressure
    if not own.any() and not bp.any():
        return {}                   # the circuit as without per-actuator valves
    return {"cb_own": own, "cb_own_setting": setting, "cb_own_ratio": ratio,
            "back_pressure": bp}


def oil_entries(scenario: Scenario, oil_temperature) -> dict:
    """Oil state entries at *oil_temperature* [K] (scalar, or (M,) for M rows):
    :func:`oil_state`, with the pump's dynamic viscosity ``mu`` held inside its
    datasheet window."""
    t = np.asarray(oil_temperature, dtype=float)
    t = t[..., None] if t.ndim else t
    state = oil_state(scenario, t)
    pump = scenario.power_unit.pump
    # The pump's loss model is calibrated inside its datasheet viscosity window;
    # outside it the leakage and drag are held at the window's edge rather than
    # extrapolated (a warning says when the oil leaves the window).
    nu_pump = np.clip(state["viscosity"], pump.viscosity_min, pump.viscosity_max)
    return {**state, "mu": state["density"] * nu_pump}


def power_unit_constants(scenario: Scenario, values: Overrides | None = None) -> dict:
    """Power-unit constants for the solvers (SI), independent of the oil
    temperature; a varied value is a column ``(N, 1)``."""
    g = values.get if values is not None else _nominal
    pu = scenario.power_unit
    pump = pu.pump
    # the datasheet point: rated kinematic viscosity at the oil's density there
    t_rated = reference_oil_temperature(scenario)
    rho_rated = float(oil.fluid_density(scenario.fluid, t_rated))
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

    out = {
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
        "bulk_modulus": g(("fluid", "bulk_modulus"), scenario.fluid.bulk_modulus),
    }
    return {k: _row(v) for k, v in out.items()}


def power_unit_arrays(scenario: Scenario, oil_temperature, values: Overrides | None = None) -> dict:
    """Power-unit constants and oil state for the solvers (SI floats/arrays)."""
    return {**oil_entries(scenario, oil_temperature), **power_unit_constants(scenario, values)}


def strategy_arrays(scenario: Scenario, strategy: Strategy | str,
                    values: Overrides | None = None) -> dict:
    """Strategy settings as solver entries (defaults filled in); a varied
    value is a column ``(N, 1)``."""
    if isinstance(strategy, str):
        # a name means the scenario's strategy of that name (its parameters), and
        # the defaults only when the scenario does not list it
        try:
            strategy = scenario.strategy(strategy)
        except KeyError:
            strategy = Strategy(strategy)
    p: StrategyParameters = strategy.parameters
    g = values.get if values is not None else _nominal

    def sp(key):
        return g(("strategy", key), getattr(p, key))

    relief = g(("relief", "cracking_pressure"), scenario.power_unit.relief.cracking_pressure)
    comp = sp("compensator_setting")
    cb = sp("counterbalance_setting")
    out = {
        "fc_min_drop": sp("flow_control_min_drop"), "bypass_spring": sp("bypass_spring"),
        "compensator": comp if comp is not None else relief - 10e5,
        "ls_margin": sp("load_sensing_margin"), "standby": sp("standby_pressure"),
        "cb_fitted": cb is not None, "cb_setting": cb if cb is not None else 0.0,
        "cb_ratio": sp("counterbalance_pilot_ratio"),
        "vs_min_fraction": sp("min_speed_fraction"), "vs_max_fraction": sp("max_speed_fraction"),
        "unloading_drop": sp("unloading_valve_drop"),
    }
    out.update(_two_stage_and_accumulator(sp, relief, strategy.kind))
    _below_relief(strategy, out, relief)
    return {k: _row(v) for k, v in out.items()}


#: A circuit's pressure settings that must lie below the relief valve's cracking
#: pressure (solver entry, field of the file, what it sets)
_BELOW_RELIEF = (("compensator", "compensator_setting", "the pump's compensator"),
                 ("unload_pressure", "unloading_pressure", "the large pump's unloading valve"),
                 ("acc_p_max", "accumulator_pressure_max",
                  "the accumulator's charging (unloading) valve"))


def _below_relief(strategy, out, relief):
    """Refuse a setting of the circuit at or above the relief valve's cracking
    pressure: the relief would open first, so the compensator would never
    destroke (or the valve never unload) and the circuit would run as a fixed
    pump over its relief, not as set.  Common practice sets them 10-20 bar
    below the relief."""
    from heatload.errors import HeatloadError
    from heatload.hydraulics.strategies import circuit
    reads = circuit(strategy.kind).settings
    for entry, field, what in _BELOW_RELIEF:
        if field not in reads:
            continue
        bad = np.asarray(out[entry]) >= np.asarray(relief)
        if np.any(bad):
            v = float(np.max(np.broadcast_to(out[entry], np.shape(bad))[bad])) / 1e5
            r = float(np.min(np.broadcast_to(relief, np.shape(bad))[bad])) / 1e5
            raise HeatloadError(
                f"{field} {v:g} bar is at or above the relief valve's cracking pressure "
                f"{r:g} bar: the relief would open first and {what} never act; give it "
                f"below the relief (Pa, e.g. \"{max(r - 10.0, 0.5 * r):g} bar\"; common "
                f"practice 10-20 bar below)", field=f"strategies.{strategy.name}.{field}")


def _two_stage_and_accumulator(sp, relief, kind) -> dict:
    """Hi-lo and accumulator settings with their defaults filled in (see
    :class:`heatload.model.StrategyParameters`); for an accumulator circuit
    (*kind*) a working range left empty is refused naming the setting."""
    from heatload.errors import HeatloadError
    from heatload.hydraulics.strategies import circuit
    unload = sp("unloading_pressure")
    p_max = sp("accumulator_pressure_max")
    # below the relief's cracking, so the relief stays shut while charging
    p_max = np.maximum(relief - 10e5, 0.9 * np.asarray(relief)) if p_max is None else p_max
    p_min = sp("accumulator_pressure_min")
    p_min = 0.75 * np.asarray(p_max) if p_min is None else p_min
    pre = sp("accumulator_precharge")
    pre = 0.9 * np.asarray(p_min) if pre is None else pre
    if not circuit(kind).accumulator:
        pass
    elif np.any(np.asarray(p_min) >= p_max):
        raise HeatloadError("the accumulator's working range is empty: give "
                            "accumulator_pressure_min below accumulator_pressure_max (Pa, "
                            "e.g. \"120 bar\")", field="strategies.accumulator_pressure_min")
    elif np.any(np.asarray(pre) > p_min):
        raise HeatloadError("accumulator_precharge must not exceed the lowest working "
                            "pressure", field="strategies.accumulator_precharge")
    return {"hilo_fraction": sp("high_pressure_fraction"),
            "unload_pressure": relief / 3.0 if unload is None else unload,
            "acc_p_min": p_min, "acc_p_max": p_max, "acc_precharge": pre,
            "acc_volume": sp("accumulator_gas_volume"), "acc_exponent": sp("polytropic_exponent")}


def finalize(c: dict) -> dict:
    """Broadcast every numeric entry of *c* to one shape and record it as
    ``c["shape"]`` (needed for the masked root solve)."""
    arrays = {k: np.asarray(v) for k, v in c.items() if k != "shape"}
    shape = np.broadcast_shapes(*(a.shape for a in arrays.values()))
    return {**{k: np.broadcast_to(a, shape) for k, a in arrays.items()}, "shape": shape}


def circuit_inputs(scenario: Scenario, strategy, oil_temperature=None, phases=None,
                   values: Overrides | None = None) -> dict:
    """Everything :func:`heatload.hydraulics.circuits.solve_strategy` needs, broadcast.

    Parameters
    ----------
    scenario : Scenario
    strategy : Strategy or str
    oil_temperature : float or array, optional
        Oil temperature [K]; default :func:`reference_oil_temperature`.
    phases : dict, optional
        Precomputed :func:`phase_arrays` (reuse across strategies).
    values : heatload.paths.Overrides, optional
        Fields varied over N variants (a leading axis of N).
    """
    if oil_temperature is None:
        oil_temperature = reference_oil_temperature(scenario)
    c = dict(phases if phases is not None else phase_arrays(scenario, values))
    c.update(power_unit_arrays(scenario, oil_temperature, values))
    c.update(strategy_arrays(scenario, strategy, values))
    return finalize(c)
