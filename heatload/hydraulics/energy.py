"""Energy over a cycle and a year: per-phase x per-component tables and totals.

Energies are powers times the phase's actual duration, summed over the
phases (the last axis), so every function also works on sweeps with leading
axes.  "Bought from the grid" (electric input) and "heat into the oil" are
kept apart: the drive motor's and converter's losses heat the room.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from heatload.hydraulics.circuits import LOSS_COMPONENTS, OIL_LOSSES, CircuitResult

J_PER_KWH = 3.6e6


@dataclass
class EnergySummary:
    """Cycle and yearly figures of one strategy (arrays over any leading axes).

    Attributes are SI: energies [J], powers [W], time [s], money in the
    scenario's currency, CO2 [kg].
    """

    cycle_time: np.ndarray
    electric_energy_per_cycle: np.ndarray
    heat_to_oil_per_cycle: np.ndarray
    room_heat_per_cycle: np.ndarray
    useful_energy_per_cycle: np.ndarray      #: net load work F v dt (overrunning counts negative)
    component_energy_per_cycle: dict         #: component -> [J]
    average_heat_to_oil: np.ndarray          #: [W]
    average_electric_power: np.ndarray       #: [W]
    cycles_per_year: np.ndarray
    electric_energy_per_year: np.ndarray     #: [J]
    cost_per_year: np.ndarray                #: [currency]
    co2_per_year: np.ndarray                 #: [kg]
    overall_efficiency: np.ndarray           #: positive load work / electric energy [-]
    peak_pressure: np.ndarray                #: highest pump or chamber pressure [Pa]

    @property
    def electric_energy_per_year_kWh(self):
        return self.electric_energy_per_year / J_PER_KWH


def summarize(result: CircuitResult, economics) -> EnergySummary:
    """Cycle energies and yearly cost of one solved strategy.

    ``E = sum_i P_i t_i`` over phases; cycles per year = hours x 3600 / cycle
    time; cost = E_year x price; CO2 = E_year x grid factor.

    Parameters
    ----------
    result : CircuitResult
    economics : heatload.model.Economics
    """
    t = result.duration
    cycle_time = t.sum(axis=-1)
    comp = {k: (result.losses[k] * t).sum(axis=-1) for k in LOSS_COMPONENTS}
    e_el = (result.electric_power * t).sum(axis=-1)
    e_heat = sum(comp[k] for k in OIL_LOSSES)
    e_room = comp["drive_motor"] + comp["converter"]
    e_use = (result.useful_power * t).sum(axis=-1)
    e_use_pos = (np.maximum(result.useful_power, 0.0) * t).sum(axis=-1)
    cycles = economics.hours_per_year * 3600.0 / cycle_time
    e_year = e_el * cycles
    peak = np.max(np.maximum(np.maximum(result.pump_pressure, result.inlet_pressure),
                             result.outlet_pressure), axis=-1)
    return EnergySummary(
        cycle_time=cycle_time, electric_energy_per_cycle=e_el, heat_to_oil_per_cycle=e_heat,
        room_heat_per_cycle=e_room, useful_energy_per_cycle=e_use,
        component_energy_per_cycle=comp, average_heat_to_oil=e_heat / cycle_time,
        average_electric_power=e_el / cycle_time, cycles_per_year=cycles,
        electric_energy_per_year=e_year, cost_per_year=e_year * economics.electricity_price,
        co2_per_year=e_year * economics.grid_co2_factor,
        overall_efficiency=np.where(e_el > 0, e_use_pos / np.where(e_el > 0, e_el, 1.0), 0.0),
        peak_pressure=peak)


def cap_rod_pressures(result: CircuitResult, extending):
    """Cap-side and rod-side pressures [Pa] from inlet/outlet and the motion."""
    cap = np.where(extending, result.inlet_pressure, result.outlet_pressure)
    rod = np.where(extending, result.outlet_pressure, result.inlet_pressure)
    return cap, rod


def phase_table(result: CircuitResult, scenario, phases_arrays=None):
    """Per-phase x per-component table (pandas DataFrame), SI units in the
    column names: pressures [Pa], flows [m^3/s], powers [W], energies [J]."""
    import pandas as pd

    from heatload.hydraulics.cycle import phase_arrays
    pa = phases_arrays if phases_arrays is not None else phase_arrays(scenario)
    cap, rod = cap_rod_pressures(result, pa["extending"])
    t = result.duration
    rows = {
        "phase": [p.name for p in scenario.phases],
        "actuator": [p.actuator or "" for p in scenario.phases],
        "motion": [p.motion for p in scenario.phases],
        "duration_s": t,
        "pump_pressure_Pa": result.pump_pressure,
        "cap_pressure_Pa": cap,
        "rod_pressure_Pa": rod,
        "pump_flow_m3_s": result.pump_flow,
        "actuator_flow_m3_s": result.actuator_flow,
        "relief_flow_m3_s": result.relief_flow,
        "bleed_flow_m3_s": result.bleed_flow,
        "speed_target": result.speed_target,
        "speed": result.speed,
        "pump_shaft_speed_rps": result.pump_shaft_speed,
        "electric_power_W": result.electric_power,
        "useful_power_W": result.useful_power,
        "heat_to_oil_W": result.heat_to_oil,
    }
    for k in LOSS_COMPONENTS:
        rows[f"loss_{k}_W"] = result.losses[k]
    rows["heat_to_oil_J"] = result.heat_to_oil * t
    rows["electric_energy_J"] = result.electric_power * t
    return pd.DataFrame(rows)
