"""Physical plausibility checks of results: they fail loudly instead of letting
an impossible number through.

Each check returns a list of violations (strings); :func:`assert_plausible`
raises :class:`PlausibilityError` when there is any.  Tests run them over
every example and over fuzzed scenarios; the chain can run them on demand.

Invariants (first law and second law of a steady hydraulic circuit):

- the power balance closes: P_electric = useful + sum(losses), to 1e-9 relative;
- no component dissipates negative power (a throttle cannot cool the oil),
  and heat into the oil is never negative;
- every number is finite;
- with heat going into the oil the steady oil temperature lies above ambient,
  and more heat never gives a lower temperature at the same conductance;
- pressures stay above absolute vacuum (-1.01325 bar gauge) except in phases
  flagged as a runaway, a stall or cavitation (a moving actuator whose chamber
  would fall below the cavitation threshold carries that warning: the figure
  shows how far the circuit is from holding the load, it is never silent);
- cooler duty is non-negative, zero when no cooler is needed.
"""

from __future__ import annotations

import numpy as np

from heatload.hydraulics.circuits import OIL_LOSSES, ROOM_LOSSES

ABSOLUTE_VACUUM = -101325.0  # [Pa gauge]
_REL = 1e-9


class PlausibilityError(AssertionError):
    """A result that is physically impossible (a bug, never a user error)."""


def circuit_violations(result, label: str = "") -> list:
    """Violations of one :class:`~heatload.hydraulics.circuits.CircuitResult`."""
    out = []
    tag = f"{label}: " if label else ""
    fields = ("pump_pressure", "inlet_pressure", "outlet_pressure", "pump_flow", "actuator_flow",
              "relief_flow", "bleed_flow", "speed", "duration", "electric_power",
              "useful_power", "shaft_power")
    for name in fields:
        if not np.all(np.isfinite(getattr(result, name))):
            out.append(f"{tag}{name} is not finite")
    for k, v in result.losses.items():
        if not np.all(np.isfinite(v)):
            out.append(f"{tag}loss {k} is not finite")
    scale = np.maximum(np.abs(result.electric_power), 1.0)
    if np.any(np.abs(result.balance_residual) > _REL * scale + 1e-9):
        out.append(f"{tag}power balance does not close (max residual "
                   f"{float(np.max(np.abs(result.balance_residual))):.3g} W)")
    for k in OIL_LOSSES + ROOM_LOSSES:
        v = result.losses[k]
        if np.any(v < -1e-9 * scale - 1e-9):
            out.append(f"{tag}loss {k} is negative ({float(np.min(v)):.3g} W)")
    if np.any(result.heat_to_oil < -1e-9 * scale - 1e-9):
        out.append(f"{tag}heat into the oil is negative")
    from heatload.hydraulics.circuits import CAVITATION_THRESHOLD
    cavitating = (result.speed > 0) & (np.minimum(result.inlet_pressure, result.outlet_pressure)
                                       < CAVITATION_THRESHOLD)
    flagged = result.runaway | result.stalled | cavitating
    for name in ("pump_pressure", "inlet_pressure", "outlet_pressure"):
        p = getattr(result, name)
        if np.any((p < ABSOLUTE_VACUUM) & ~flagged):
            out.append(f"{tag}{name} below absolute vacuum ({float(np.min(p)) / 1e5:.2f} bar)")
    for name in ("pump_flow", "relief_flow", "bleed_flow", "duration"):
        if np.any(getattr(result, name) < -1e-15):
            out.append(f"{tag}{name} is negative")
    if result.motions is not None:
        out.extend(motion_violations(result, tag))
    return out


def motion_violations(result, tag: str = "") -> list:
    """Violations of the balance of each motion where phases move several
    actuators at once: what a motion draws at the pump outlet, ``p_pump Q_b``,
    is its useful power plus its path's losses (the compression of its
    chambers comes from the shaft besides), and the motions' losses add up
    to no more than the phase's of each component."""
    from heatload.hydraulics.circuits import MOTION_LOSSES
    out = []
    p = np.maximum(result.pump_pressure, 0.0)
    scale = np.maximum(np.abs(result.electric_power), 1.0)
    count = 1 + max(b for b, _ in result.motions)
    summed = {k: 0.0 for k in MOTION_LOSSES}
    for b in range(count):
        fig = {k: v for (i, k), v in result.motions.items() if i == b}
        path = sum(fig[("loss", k)] for k in MOTION_LOSSES if k != "compression")
        residual = p * fig["flow"] - fig["useful_power"] - path
        if np.any(np.abs(residual) > _REL * scale + 1e-9):
            out.append(f"{tag}motion {b}: its power balance does not close (max residual "
                       f"{float(np.max(np.abs(residual))):.3g} W)")
        for k in MOTION_LOSSES:
            summed[k] = summed[k] + fig[("loss", k)]
    for k in MOTION_LOSSES:
        if np.any(summed[k] > result.losses[k] + _REL * scale + 1e-9):
            out.append(f"{tag}the motions' {k} losses exceed the phase's")
    return out


def outcome_violations(outcome, scenario) -> list:
    """Violations of one :class:`~heatload.chain.StrategyOutcome`."""
    out = circuit_violations(outcome.circuit, outcome.name)
    out += circuit_violations(outcome.circuit_uncoupled, f"{outcome.name} (uncoupled)")
    th = outcome.thermal
    amb = scenario.ambient
    tag = f"{outcome.name}: "
    values = [th.steady_uncoupled, th.steady_coupled, th.steady_hot, th.heat_coupled,
              th.heat_uncoupled, th.design_heat, th.cooler_duty, th.conductance, th.capacity]
    if not all(np.isfinite(v) for v in values):
        out.append(tag + "a thermal figure is not finite")
    if th.heat_coupled > 0 and th.steady_coupled < amb.temperature - 1e-6:
        out.append(tag + "steady oil temperature below ambient with heat going in")
    if th.heat_coupled > 0 and th.steady_hot < amb.temperature_max - 1e-6:
        out.append(tag + "hot-day oil temperature below the hot-day ambient with heat going in")
    if th.cooler_duty < 0:
        out.append(tag + "negative cooler duty")
    if not th.cooler_needed and th.cooler_duty != 0.0:
        out.append(tag + "cooler duty without a cooler being needed")
    if not th.cycle_minimum - 1e-6 <= th.cycle_maximum:
        out.append(tag + "cycle minimum above maximum")
    e = outcome.energy
    if float(e.heat_to_oil_per_cycle) > float(e.electric_energy_per_cycle) - float(
            e.useful_energy_per_cycle) + 1e-6 * max(float(e.electric_energy_per_cycle), 1.0):
        out.append(tag + "more heat than electric input minus useful work")
    return out


def comparison_violations(cmp) -> list:
    """Violations of every outcome of a :class:`~heatload.chain.Comparison`."""
    out = []
    for o in cmp.outcomes:
        out += outcome_violations(o, cmp.scenario)
    return out


def assert_plausible(cmp) -> None:
    """Raise :class:`PlausibilityError` listing every violation, if any."""
    bad = comparison_violations(cmp)
    if bad:
        raise PlausibilityError("; ".join(bad))
