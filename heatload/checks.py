"""Warnings a designer must see next to the energy numbers.

Each warning names its strategy, phase, a code, the value that triggered it
and the limit, and a one-line message in bar / L/min (the engine stays free
of pint; the edges reformat if asked for US units).

Codes: ``pressure-rating``, ``intensification``, ``overrunning-load``,
``cavitation``, ``relief-passing``, ``speed-not-reached``, ``stall``,
``viscosity-window``, ``oil-temperature``, ``hold-pressure``, ``speed-drift``.
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
      fluid's limit (with the sized cooler's duty when one is needed);
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
