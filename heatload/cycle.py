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
- hydraulic motor: ``a_in = a_out = D`` [m^3/rev]; ``force = 2 pi T / eta_hm`` for a
  driving torque T >= 0 and ``2 pi T eta_hm`` for an overrunning one; speed
  [rev/s] = Q1 eta_v / D driving, Q1 / (eta_v D) overrun (the motor then pumps), so
  ``p1 a_in - p2 a_out = force`` holds with Q in m^3/s and the motor's loss stays >= 0.
"""

from __future__ import annotations

import numpy as np

from heatload import motors, oil, pumps
from heatload.actuators import cylinder_areas
from heatload.circuits import UNLOAD_CENTRE, UNLOAD_HELD, UNLOAD_RELIEF
from heatload.model import Scenario, Strategy, StrategyParameters

_UNLOAD_CODE = {"relief": UNLOAD_RELIEF, "centre": UNLOAD_CENTRE, "held": UNLOAD_HELD}
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


def phase_arrays(scenario: Scenario) -> dict:
    """Per-phase arrays that do not depend on the strategy or the oil state."""
    phases = scenario.phases
    n = len(phases)
    pump = scenario.power_unit.pump
    q_pump_nominal = pump.displacement * pump.shaft_speed
    out = {k: np.zeros(n) for k in (
        "a_in", "a_out", "q_ratio", "speed_per_flow", "force", "load", "q_target",
        "hold_pressure", "stroke", "duration", "compression_volume",
        "compression_volume_outlet", "work_per_load_speed",
        "max_pressure_inlet", "max_pressure_outlet")}
    out["moving"] = np.zeros(n, dtype=bool)
    out["by_stroke"] = np.zeros(n, dtype=bool)
    out["compress"] = np.zeros(n, dtype=bool)
    out["extending"] = np.zeros(n, dtype=bool)
    out["unloading"] = np.zeros(n, dtype=int)
    out["previous_phase"] = -np.ones(n, dtype=int)
    chamber = [None] * n
    for i, ph in enumerate(phases):
        act = scenario.actuator(ph.actuator) if ph.actuator else None
        moving = ph.motion in ("extend", "retract", "run") and (ph.speed is None or ph.speed > 0)
        out["moving"][i] = moving and act is not None
        out["unloading"][i] = _UNLOAD_CODE[ph.unloading]
        out["load"][i] = ph.load
        out["work_per_load_speed"][i] = 1.0
        out["extending"][i] = ph.motion in ("extend", "hold", "run")
        if act is None:
            out["a_in"][i] = out["a_out"][i] = 1.0
            out["q_ratio"][i] = 1.0
            out["speed_per_flow"][i] = 1.0
            out["max_pressure_inlet"][i] = out["max_pressure_outlet"][i] = np.inf
        elif act.kind == "motor":
            d = act.displacement
            out["a_in"][i] = out["a_out"][i] = d
            out["q_ratio"][i] = 1.0
            t = ph.load
            eta = act.hydromechanical_efficiency
            # driven by the oil the motor leaks (n = Q eta_v / D); overrun by its load it
            # pumps, and the load turns it faster than the flow (n = Q / (eta_v D))
            ev = act.volumetric_efficiency
            out["speed_per_flow"][i] = ev / d if t >= 0 else 1.0 / (ev * d)
            out["force"][i] = TWO_PI * t / eta if t >= 0 else TWO_PI * t * eta
            out["work_per_load_speed"][i] = TWO_PI
            out["compression_volume"][i] = d + act.dead_volume if hasattr(act, "dead_volume") else d
            out["compression_volume_outlet"][i] = out["compression_volume"][i]
            out["max_pressure_inlet"][i] = out["max_pressure_outlet"][i] = act.max_pressure
            chamber[i] = (act.name, "motor")
        else:
            cap, ann = cylinder_areas(act.bore, act.rod)
            if ph.motion == "retract":
                a_in, a_out = ann, cap
                chamber[i] = (act.name, "rod")
            else:
                a_in, a_out = cap, ann
                chamber[i] = (act.name, "cap")
            out["a_in"][i], out["a_out"][i] = a_in, a_out
            out["q_ratio"][i] = a_out / a_in
            out["speed_per_flow"][i] = 1.0 / a_in
            friction = act.friction_force if moving else 0.0
            out["force"][i] = ph.load + friction
            out["compression_volume"][i] = a_in * act.stroke + act.dead_volume
            # the outlet chamber, full at the phase's start, is pressed to p2 too
            out["compression_volume_outlet"][i] = a_out * act.stroke + act.dead_volume
            out["max_pressure_inlet"][i] = out["max_pressure_outlet"][i] = act.max_pressure
        # speed target as inlet flow
        if moving and act is not None:
            if ph.speed is None:
                out["q_target"][i] = np.inf
            else:
                out["q_target"][i] = ph.speed / out["speed_per_flow"][i]
        # duration: given, or the stroke at the set speed
        v_set = (ph.speed if ph.speed is not None
                 else q_pump_nominal * out["speed_per_flow"][i])
        if ph.duration is not None:
            out["duration"][i] = ph.duration
        elif ph.stroke is not None and moving:
            out["duration"][i] = ph.stroke / v_set
            out["by_stroke"][i] = True
        out["stroke"][i] = ph.stroke if ph.stroke is not None else 0.0
        # held pressure in hold phases
        if not moving:
            if ph.hold_pressure is not None:
                out["hold_pressure"][i] = ph.hold_pressure
            elif ph.hold_force is not None and act is not None:
                area = out["a_in"][i]
                out["hold_pressure"][i] = ph.hold_force / area
        out["compress"][i] = ph.compress and act is not None
    # the chamber's pressure before this phase: the previous phase's, when the
    # previous phase (cyclically) pressurised the same chamber
    for i in range(n):
        j = (i - 1) % n
        if n > 1 and chamber[i] is not None and chamber[i] == chamber[j]:
            out["previous_phase"][i] = j
    return out


def power_unit_arrays(scenario: Scenario, oil_temperature) -> dict:
    """Power-unit constants and oil state for the solvers (SI floats/arrays)."""
    pu = scenario.power_unit
    pump = pu.pump
    state = oil_state(scenario, oil_temperature)
    # the datasheet point: rated kinematic viscosity at the oil's density there
    t_rated = reference_oil_temperature(scenario)
    rho_rated = float(oil.fluid_density(scenario.fluid, t_rated))
    slip, viscous, friction = pumps.wilson_coefficients(
        pump.volumetric_efficiency, pump.hydromechanical_efficiency, pump.rated_pressure,
        pump.shaft_speed, pump.rated_viscosity * rho_rated)
    motor = pu.motor
    eta_motor = (motor.efficiency if motor.efficiency is not None
                 else motors.ie_class_efficiency(motor.rated_power, motor.efficiency_class,
                                                 motor.poles))
    # The pump's loss model is calibrated inside its datasheet viscosity window;
    # outside it the leakage and drag are held at the window's edge rather than
    # extrapolated (a warning says when the oil leaves the window).
    nu_pump = np.clip(state["viscosity"], pump.viscosity_min, pump.viscosity_max)
    return {
        **state,
        "mu": state["density"] * nu_pump,
        "pump_displacement": pump.displacement, "pump_speed": pump.shaft_speed,
        "pump_slip": slip, "pump_viscous": viscous, "pump_friction": friction,
        "relief_cracking": pu.relief.cracking_pressure, "relief_override": pu.relief.override,
        "relief_rated_flow": pu.relief.rated_flow,
        "dv_rated_flow": pu.directional_valve.rated_flow,
        "dv_rated_drop": pu.directional_valve.pressure_drop,
        "dv_centre_drop": pu.directional_valve.centre_pressure_drop,
        "centre_unloads": pu.directional_valve.centre in ("open", "tandem"),
        "check_cracking": pu.check_valve.cracking_pressure,
        "check_rated_flow": pu.check_valve.rated_flow,
        "check_rated_drop": pu.check_valve.pressure_drop,
        "pline_d": pu.pressure_line.inner_diameter, "pline_l": pu.pressure_line.length,
        "pline_rough": pu.pressure_line.roughness, "pline_k": pu.pressure_line.fittings_k,
        "rline_d": pu.return_line.inner_diameter, "rline_l": pu.return_line.length,
        "rline_rough": pu.return_line.roughness, "rline_k": pu.return_line.fittings_k,
        "motor_rated_power": motor.rated_power, "motor_rated_efficiency": eta_motor,
        "drive_efficiency": motor.drive_efficiency,
        "bulk_modulus": scenario.fluid.bulk_modulus,
    }


def strategy_arrays(scenario: Scenario, strategy: Strategy | str) -> dict:
    """Strategy settings as solver entries (defaults filled in)."""
    if isinstance(strategy, str):
        # a name means the scenario's strategy of that name (its parameters), and
        # the defaults only when the scenario does not list it
        try:
            strategy = scenario.strategy(strategy)
        except KeyError:
            strategy = Strategy(strategy)
    p: StrategyParameters = strategy.parameters
    relief = scenario.power_unit.relief.cracking_pressure
    compensator = p.compensator_setting if p.compensator_setting is not None else relief - 10e5
    return {
        "fc_min_drop": p.flow_control_min_drop, "bypass_spring": p.bypass_spring,
        "compensator": compensator, "ls_margin": p.load_sensing_margin,
        "standby": p.standby_pressure,
        "cb_fitted": p.counterbalance_setting is not None,
        "cb_setting": p.counterbalance_setting if p.counterbalance_setting is not None else 0.0,
        "cb_ratio": p.counterbalance_pilot_ratio,
        "vs_min_fraction": p.min_speed_fraction, "vs_max_fraction": p.max_speed_fraction,
    }


def finalize(c: dict) -> dict:
    """Broadcast every numeric entry of *c* to one shape and record it as
    ``c["shape"]`` (needed for the masked root solve)."""
    arrays = {k: np.asarray(v) for k, v in c.items() if k != "shape"}
    shape = np.broadcast_shapes(*(a.shape for a in arrays.values()))
    return {**{k: np.broadcast_to(a, shape) for k, a in arrays.items()}, "shape": shape}


def circuit_inputs(scenario: Scenario, strategy, oil_temperature=None, phases=None) -> dict:
    """Everything :func:`heatload.circuits.solve_strategy` needs, broadcast.

    Parameters
    ----------
    scenario : Scenario
    strategy : Strategy or str
    oil_temperature : float or array, optional
        Oil temperature [K]; default :func:`reference_oil_temperature`.
    phases : dict, optional
        Precomputed :func:`phase_arrays` (reuse across strategies).
    """
    if oil_temperature is None:
        oil_temperature = reference_oil_temperature(scenario)
    c = dict(phases if phases is not None else phase_arrays(scenario))
    c.update(power_unit_arrays(scenario, np.asarray(oil_temperature, dtype=float)[..., None]
                               if np.ndim(oil_temperature) else oil_temperature))
    c.update(strategy_arrays(scenario, strategy))
    return finalize(c)
