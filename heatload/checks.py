"""Warnings a designer must see next to the energy numbers.

Each warning names its strategy, phase, a code, the value that triggered it
and the limit, and a one-line message in bar / L/min (the engine stays free
of pint; the edges reformat if asked for US units).

Codes: ``pressure-rating``, ``intensification``, ``overrunning-load``,
``cavitation``, ``relief-passing``, ``speed-not-reached``, ``stall``,
``viscosity-window``, ``oil-temperature``, ``hold-pressure``, ``speed-drift``,
``motor-overload``, ``correlation-range``.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np

from heatload.circuits import CAVITATION_THRESHOLD, UNLOAD_CENTRE, CircuitResult


@dataclass(frozen=True)
class Warning_:
    code: str
    phase: str | None
    value: float
    limit: float | None
    message: str

    def as_dict(self) -> dict:
        d = asdict(self)
        for k in ("value", "limit"):  # plain floats: JSON-ready
            if d[k] is not None:
                d[k] = float(d[k])
        return d


def _bar(p):
    return f"{p / 1e5:.0f} bar"


#: Continuous load an IEC motor may carry, as a multiple of its rating [-]: IEC
#: 60034-1 rates it for duty type S1 at rated output with no service factor
#: (NEMA MG 1 motors often carry 1.15; an IEC nameplate does not) (from memory).
MOTOR_SERVICE_FACTOR = 1.0
#: Occasional excess torque IEC 60034-1 requires an induction motor to withstand
#: without stalling: 160 % of rated torque for 15 s (from memory) [-], [s].
MOTOR_EXCESS_TORQUE = 1.6
MOTOR_EXCESS_TORQUE_TIME = 15.0
#: Beyond this multiple of its rated torque a standard induction motor has passed
#: its breakdown torque (about 2 to 3 x rated in catalogues, common practice, from
#: memory) and stalls: figures above it describe no real drive [-].
MOTOR_BREAKDOWN_TORQUE = 3.0


def motor_load_ratio(shaft_power, rated_power, speed_fraction=1.0):
    """Load of the drive motor as a multiple of its continuous rating [-].

    r = P / (P_r min(s, 1))

    Below base speed a converter-fed motor (constant flux) gives at most its
    rated torque, so its rated power falls with the speed: the ratio is the
    torque ratio T / T_r = P / (P_r s); above base speed (field weakening) it
    gives at most its rated power.  On the grid s = 1 and r = P / P_r.

    Parameters
    ----------
    shaft_power : array_like
        Mechanical power the pump shaft takes [W].
    rated_power : array_like
        Motor rating [W], > 0.
    speed_fraction : array_like, optional
        Motor speed over its nominal speed [-], > 0.

    References
    ----------
    IEC 60034-1 (rated output, duty type S1); constant-torque operation below
    and constant power above base speed of a converter-fed induction motor,
    common practice.
    """
    # a motor at standstill gives no power: the floor keeps 0 / 0 out
    s = np.clip(np.asarray(speed_fraction, float), 1e-12, 1.0)
    return np.asarray(shaft_power, float) / (np.asarray(rated_power, float) * s)


def motor_overloaded(shaft_power, rated_power, speed_fraction=1.0):
    """Where the motor carries more than its rating x :data:`MOTOR_SERVICE_FACTOR`
    (:func:`motor_load_ratio`); vectorized, bool."""
    return (motor_load_ratio(shaft_power, rated_power, speed_fraction)
            > MOTOR_SERVICE_FACTOR * (1 + 1e-9))


def _kw(p):
    return f"{p / 1e3:.3g} kW" if abs(p) >= 1e3 else f"{p:.3g} W"


def motor_overload_warning(name, shaft_power, rated_power, speed_fraction, duration):
    """The ``motor-overload`` warning of one phase, or ``None`` within the rating.

    value: the shaft power the pump takes [W]; limit: what the motor gives
    continuously at that speed, P_r min(s, 1) x :data:`MOTOR_SERVICE_FACTOR` [W].
    The message grades the overload: a short one the motor withstands
    (IEC 60034-1: 160 % torque for 15 s), one it does not (it overheats or
    trips), and one past any motor's breakdown torque (no real drive)."""
    if not motor_overloaded(shaft_power, rated_power, speed_fraction):
        return None
    r = float(motor_load_ratio(shaft_power, rated_power, speed_fraction))
    s = min(float(speed_fraction), 1.0)
    limit = MOTOR_SERVICE_FACTOR * rated_power * s
    of = (f"{100 * r:.0f} % of its rated torque at {100 * s:.0f} % speed" if s < 1 - 1e-9
          else f"{100 * r:.0f} % of its rating")
    head = f"the pump takes {_kw(shaft_power)} from the {_kw(rated_power)} motor"
    if r > MOTOR_BREAKDOWN_TORQUE:
        text = (f"the pump needs {_kw(shaft_power)}, {r:.3g} x what the {_kw(rated_power)} "
                f"motor gives: past the breakdown torque of any motor of that rating, the "
                f"motor stalls; no real drive gives these figures")
    elif r <= MOTOR_EXCESS_TORQUE and duration <= MOTOR_EXCESS_TORQUE_TIME:
        text = (f"{head} ({of} for {duration:.3g} s): a short overload within IEC 60034-1's "
                f"160 % for 15 s; check the cycle's RMS load against the rating")
    else:
        text = (f"{head} ({of} for {duration:.3g} s): beyond the 160 % for 15 s of IEC "
                f"60034-1, the motor overheats or trips; a larger motor is needed")
    return Warning_("motor-overload", name, float(shaft_power), float(limit), text)


def phase_warnings(result: CircuitResult, scenario, pa: dict) -> list:
    """Warnings of one solved strategy over the phases of *scenario* (1-D result)."""
    out = []
    pu = scenario.power_unit
    names = [p.name for p in scenario.phases]
    moving = pa["moving"]
    for i, name in enumerate(names):
        pp = float(result.pump_pressure[i])
        p1 = float(result.inlet_pressure[i])
        p2 = float(result.outlet_pressure[i])
        w = motor_overload_warning(name, float(result.shaft_power[i]), pu.motor.rated_power,
                                   float(result.pump_shaft_speed[i]) / pu.pump.shaft_speed,
                                   float(result.duration[i]))
        if w is not None:
            out.append(w)
        if pp > pu.pump.max_pressure * (1 + 1e-9):
            out.append(Warning_("pressure-rating", name, pp, pu.pump.max_pressure,
                                f"pump pressure {_bar(pp)} above the pump's rating "
                                f"{_bar(pu.pump.max_pressure)}"))
        if max(pp, p1, p2) > pu.directional_valve.max_pressure * (1 + 1e-9):
            v = max(pp, p1, p2)
            out.append(Warning_("pressure-rating", name, v, pu.directional_valve.max_pressure,
                                f"pressure {_bar(v)} above the directional valve's rating "
                                f"{_bar(pu.directional_valve.max_pressure)}"))
        rating = float(pa["max_pressure_inlet"][i])
        if np.isfinite(rating) and max(p1, p2) > rating * (1 + 1e-9):
            v = max(p1, p2)
            out.append(Warning_("pressure-rating", name, v, rating,
                                f"actuator chamber at {_bar(v)} above its rating {_bar(rating)}"))
        if not moving[i]:
            p_hold = float(pa["hold_pressure"][i])
            if (p_hold > 0 and pa["unloading"][i] != UNLOAD_CENTRE
                    and pp < p_hold * (1 - 1e-6)):
                out.append(Warning_("hold-pressure", name, p_hold, pp,
                                    f"the pressure to hold {_bar(p_hold)} is more than the "
                                    f"pump supplies here ({_bar(pp)})"))
            if result.relief_flow[i] > 1e-9 and result.pump_flow[i] > 0:
                out.append(Warning_("relief-passing", name, float(result.relief_flow[i]), None,
                                    f"the relief valve passes {result.relief_flow[i] * 6e4:.1f} "
                                    f"L/min at {_bar(pp)} for the whole phase"))
            continue
        if p2 > pp * (1 + 1e-6) and p2 > 1e5 and not result.counterbalance_active[i]:
            ratio = f" (x{p2 / pp:.2f})" if pp >= 1e5 else ""
            out.append(Warning_("intensification", name, p2, pp,
                                f"outlet chamber at {_bar(p2)} exceeds supply {_bar(pp)}"
                                f"{ratio}: the cylinder intensifies"))
        if result.runaway[i]:
            out.append(Warning_("overrunning-load", name, float(scenario.phases[i].load), 0.0,
                                f"overrunning load {scenario.phases[i].load:.0f} this circuit "
                                f"cannot hold: the actuator runs away; figures assume a "
                                f"counterbalance valve at {_bar(result.counterbalance_setting[i])}"
                                f" (fit one, or throttle the outlet)"))
        if min(p1, p2) < CAVITATION_THRESHOLD:
            v = min(p1, p2)
            out.append(Warning_("cavitation", name, v, CAVITATION_THRESHOLD,
                                f"a chamber would fall to {v / 1e5:.2f} bar gauge: cavitation "
                                f"risk"))
        if result.stalled[i]:
            out.append(Warning_("stall", name, 0.0, float(result.speed_target[i]),
                                "the load needs more pressure than the supply allows: "
                                "the actuator stalls and the pump flow crosses the relief"))
        elif result.flow_limited[i]:
            frac = result.speed[i] / result.speed_target[i] if result.speed_target[i] else 0
            out.append(Warning_("speed-not-reached", name, float(result.speed[i]),
                                float(result.speed_target[i]),
                                f"speed reaches only {100 * frac:.0f} % of the set speed"))
        elif result.relief_flow[i] >= result.pump_flow[i] * 0.999 and result.pump_flow[i] > 0:
            out.append(Warning_("relief-passing", name, float(result.relief_flow[i]), None,
                                "the relief valve passes the whole pump flow"))
    return out


#: Speed change for +10 % load above which a bleed-off phase is flagged [-]
SPEED_DRIFT_LIMIT = 0.05


def speed_drift_warnings(change, scenario, pa) -> list:
    """Bleed-off phases whose speed moves more than 5 % when the load rises 10 %
    (*change* from :func:`heatload.circuits.bleed_off_speed_change`)."""
    out = []
    for i, ph in enumerate(scenario.phases):
        if pa["moving"][i] and abs(change[i]) > SPEED_DRIFT_LIMIT:
            what = ("the actuator stalls" if change[i] <= -0.999
                    else f"speed changes {100 * change[i]:+.0f} %")
            out.append(Warning_("speed-drift", ph.name, float(change[i]), SPEED_DRIFT_LIMIT,
                                f"{what} when the load rises 10 %: a bleed-off speed "
                                f"follows the load"))
    return out


def temperature_warnings(scenario, oil_temperature: float, label: str = "steady") -> list:
    """Oil above its limit and viscosity outside the pump's window at *oil_temperature*."""
    from heatload import oil

    out = []
    fluid = scenario.fluid
    pump = scenario.power_unit.pump
    if oil_temperature > fluid.temperature_max:
        out.append(Warning_("oil-temperature", None, oil_temperature, fluid.temperature_max,
                            f"{label} oil temperature {oil_temperature - 273.15:.0f} °C above "
                            f"the fluid's limit {fluid.temperature_max - 273.15:.0f} °C"))
    nu = float(oil.kinematic_viscosity(fluid, oil_temperature))
    if nu < pump.viscosity_min or nu > pump.viscosity_max:
        out.append(Warning_("viscosity-window", None, nu, pump.viscosity_min
                            if nu < pump.viscosity_min else pump.viscosity_max,
                            f"viscosity {nu * 1e6:.1f} mm²/s at {label} "
                            f"{oil_temperature - 273.15:.0f} °C outside the pump's window "
                            f"{pump.viscosity_min * 1e6:.0f}-{pump.viscosity_max * 1e6:.0f} mm²/s"))
    return out


def thermal_warnings(scenario, steady_no_cooler: float, operating: float,
                     cooler_duty: float) -> list:
    """The temperature warnings of one strategy.

    - ``oil-temperature``: without a cooler the oil would settle above the
      fluid's limit on the hottest day (*steady_no_cooler*: the steady
      temperature at ``ambient.temperature_max``, the cooler's design point;
      a limit kept only at the typical ambient is exceeded every hot day),
      with the sized cooler's duty when one is needed;
    - ``viscosity-window``: the viscosity at the *operating* temperature (the
      coupled one, or the design temperature the sized cooler holds), or at the
      cold start, lies outside the pump's allowed window.
    """
    from heatload import oil

    out = []
    fluid = scenario.fluid
    pump = scenario.power_unit.pump
    limit = fluid.temperature_max
    if steady_no_cooler > limit:
        tail = (f": a cooler is needed ({cooler_duty / 1e3:.2f} kW sized)" if cooler_duty > 0
                else "")
        out.append(Warning_("oil-temperature", None, steady_no_cooler, limit,
                            f"on the hottest day "
                            f"({scenario.ambient.temperature_max - 273.15:.0f} °C ambient) "
                            f"without a cooler the oil would settle at "
                            f"{steady_no_cooler - 273.15:.0f} °C, above the fluid's limit "
                            f"{limit - 273.15:.0f} °C{tail}"))
    for t, label in ((operating, "running"),
                     (scenario.ambient.cold_start_temperature, "cold start")):
        nu = float(oil.kinematic_viscosity(fluid, t))
        if nu < pump.viscosity_min or nu > pump.viscosity_max:
            edge = pump.viscosity_min if nu < pump.viscosity_min else pump.viscosity_max
            out.append(Warning_("viscosity-window", None, nu, edge,
                                f"viscosity {nu * 1e6:.1f} mm²/s at {label} "
                                f"({t - 273.15:.0f} °C) outside the pump's window "
                                f"{pump.viscosity_min * 1e6:.0f}-{pump.viscosity_max * 1e6:.0f} "
                                f"mm²/s"))
    return out


def correlation_range_warnings(scenario, oil_temperature: float, air_temperature: float,
                               pressure: float) -> list:
    """``correlation-range``: a tank surface whose natural-convection correlation
    is used beyond its published Rayleigh range at the running temperature (see
    :func:`heatload.heat_transfer.correlations_out_of_range`)."""
    from heatload import heat_transfer

    out = []
    for name, ra, low, high in heat_transfer.correlations_out_of_range(
            scenario.reservoir, oil_temperature, air_temperature, pressure):
        side = "above" if ra > high else "below"
        out.append(Warning_("correlation-range", None, ra, high if ra > high else low,
                            f"{name}: Rayleigh number {ra:.2g} {side} the range of its "
                            f"natural-convection correlation ({low:.0e} to {high:.0e}); "
                            "its heat shedding is an extrapolation"))
    return out
