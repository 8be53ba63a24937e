"""Regenerate heatload/data/unit_conversions.json from pint.

Every unit the product prints (both unit systems) and the units its files,
examples and users commonly write, per kind of quantity: (offset, factor)
such that SI = offset + factor * number, exactly as pint converts them.
Units not listed here are converted by pint at run time; the table only
spares a command pint's import when the file uses common units.

    python scripts/make_unit_table.py
"""

import json
from pathlib import Path

from heatload import units

#: Units written in files and by users beyond the display units (per kind).
COMMON = {
    "pressure": ["bar", "mbar", "Pa", "kPa", "MPa", "psi", "GPa", "ksi"],
    "flow": ["L/min", "l/min", "m^3/s", "m^3/h", "L/s", "gal/min", "gpm", "cm^3/s"],
    "length": ["mm", "m", "cm", "in", "um", "µm"],
    "distance": ["m", "mm", "cm", "km", "ft", "in"],
    "area": ["m^2", "cm^2", "mm^2", "ft^2", "in^2"],
    "volume": ["L", "l", "m^3", "cm^3", "mL", "gal", "dm^3"],
    "displacement": ["cm^3/rev", "cm^3", "cc", "in^3/rev", "in^3", "mL/rev", "m^3/rev"],
    "velocity": ["m/s", "mm/s", "mm/min", "m/min", "in/s", "ft/min", "ft/s", "cm/s"],
    "shaft_speed": ["rpm", "1/min", "rps", "Hz", "1/s", "rev/min", "rev/s"],
    "force": ["N", "kN", "MN", "lbf", "kgf", "daN"],
    "torque": ["N*m", "kN*m", "lbf*ft", "N m"],
    "power": ["W", "kW", "MW", "hp"],
    "energy": ["J", "kJ", "MJ", "kWh", "kW*h", "Wh", "Btu"],
    "time": ["s", "min", "h", "ms", "d", "day"],
    "temperature": ["degC", "K", "degF"],
    "temperature_difference": ["K", "delta_degC", "delta_degF"],
    "mass": ["kg", "t", "g", "lb"],
    "mass_flow": ["kg/s", "kg/min", "kg/h", "lb/min"],
    "density": ["kg/m^3", "g/cm^3", "kg/L", "lb/ft^3"],
    "kinematic_viscosity": ["mm^2/s", "cSt", "m^2/s", "mm2/s"],
    "dynamic_viscosity": ["Pa*s", "mPa*s", "cP"],
    "bulk_modulus": ["GPa", "MPa", "bar", "psi", "ksi", "Pa"],
    "heat_transfer_coefficient": ["W/(m^2*K)", "W/m^2/K", "Btu/(h*ft^2*delta_degF)"],
    "thermal_conductance": ["W/K", "kW/K", "Btu/(h*delta_degF)"],
    "specific_heat": ["J/(kg*K)", "kJ/(kg*K)", "Btu/(lb*delta_degF)"],
    "thermal_conductivity": ["W/(m*K)", "Btu/(h*ft*delta_degF)"],
    "expansion_coefficient": ["1/K", "1/delta_degF"],
    "flow_per_pressure": ["L/(min*bar)", "m^3/(s*Pa)", "gal/(min*psi)"],
    "pressure_per_flow": ["bar/(L/min)", "Pa*s/m^3", "psi/(gal/min)"],
    "specific_energy_price": ["1/kWh", "/kWh", "1/MWh", "1/J"],
    "emission_factor": ["kg/kWh", "g/kWh", "kg/J", "lb/kWh"],
    "dimensionless": ["", "%"],
}


def main():
    table = {}
    for kind, k in units.KINDS.items():
        names = set(COMMON.get(kind, [])) | {k.show_si, k.show_us}
        for name in sorted(names):
            _, unit = units.split_quantity(f"1 {name}".strip())
            offset, factor = units._pint_conversion(unit, kind)   # raises on a slip here
            table[f"{kind}|{unit}"] = [offset, factor]
    out = Path(units.__file__).parent / "data" / "unit_conversions.json"
    out.write_text(json.dumps(table, indent=0, sort_keys=True) + "\n", encoding="utf-8")
    print(f"{len(table)} conversions -> {out}")


if __name__ == "__main__":
    main()
