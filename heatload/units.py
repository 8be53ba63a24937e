"""Units at the edges: one pint registry, parsing of quantity strings, output formatting.

Inside the engine everything is an SI float or numpy array.  This module turns
strings such as ``"160 bar"``, ``"12 gal/min"``, ``"35 degC"`` or ``"1450 rpm"``
into SI floats for a named *kind* of quantity, and formats SI values for
people in SI (bar, L/min, kW, degC, mm) or US customary units (psi, gpm, hp,
degF, in).

pint is imported lazily so that ``import heatload`` and ``heatload --help``
stay fast.

Conventions (SI inside)
-----------------------
- pressure: gauge [Pa] (tank = 0) unless a name says absolute
- shaft speed: [rev/s]; pump displacement: [m^3/rev] (so flow = D * n)
- temperature: [K]; temperature difference: [K]
- money: a plain number in the scenario's currency; energy prices per [J]
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from heatload.errors import HeatloadError


@dataclass(frozen=True)
class Kind:
    """A kind of quantity: its SI unit, a noun and an example for messages,
    and the units it is shown in for each unit system."""

    si: str
    noun: str
    example: str
    show_si: str
    show_us: str


#: Every kind of quantity the scenario file and the outputs use.
KINDS: dict[str, Kind] = {
    "pressure": Kind("Pa", "a pressure", "160 bar", "bar", "psi"),
    "flow": Kind("m^3/s", "a volume flow", "40 L/min", "L/min", "gal/min"),
    "length": Kind("m", "a length", "63 mm", "mm", "in"),
    "distance": Kind("m", "a length", "0.4 m", "m", "ft"),
    "area": Kind("m^2", "an area", "1.2 m^2", "m^2", "ft^2"),
    "volume": Kind("m^3", "a volume", "120 L", "L", "gal"),
    "displacement": Kind("m^3", "a displacement per revolution", "28 cm^3/rev",
                         "cm^3", "in^3"),
    "velocity": Kind("m/s", "a velocity", "0.1 m/s", "mm/s", "in/s"),
    "shaft_speed": Kind("1/s", "a shaft speed", "1450 rpm", "rpm", "rpm"),
    "force": Kind("N", "a force", "50 kN", "kN", "lbf"),
    "torque": Kind("N*m", "a torque", "250 N*m", "N*m", "lbf*ft"),
    "power": Kind("W", "a power", "7.5 kW", "kW", "hp"),
    "energy": Kind("J", "an energy", "1.2 kJ", "kJ", "Btu"),
    "time": Kind("s", "a time", "4 s", "s", "s"),
    "temperature": Kind("K", "a temperature", "35 degC", "degC", "degF"),
    "temperature_difference": Kind("K", "a temperature difference", "10 K",
                                   "K", "delta_degF"),
    "mass": Kind("kg", "a mass", "80 kg", "kg", "lb"),
    "mass_flow": Kind("kg/s", "a mass flow", "0.5 kg/s", "kg/s", "lb/min"),
    "density": Kind("kg/m^3", "a density", "870 kg/m^3", "kg/m^3", "lb/ft^3"),
    "kinematic_viscosity": Kind("m^2/s", "a kinematic viscosity", "46 mm^2/s",
                                "mm^2/s", "mm^2/s"),
    "dynamic_viscosity": Kind("Pa*s", "a dynamic viscosity", "0.04 Pa*s",
                              "mPa*s", "cP"),
    "bulk_modulus": Kind("Pa", "a bulk modulus", "1.6 GPa", "GPa", "ksi"),
    "heat_transfer_coefficient": Kind("W/(m^2*K)", "a heat transfer coefficient",
                                      "10 W/(m^2*K)", "W/(m^2*K)",
                                      "Btu/(h*ft^2*delta_degF)"),
    "thermal_conductance": Kind("W/K", "a thermal conductance (kW/K)", "0.5 kW/K",
                                "kW/K", "Btu/(h*delta_degF)"),
    "heat_capacity": Kind("J/K", "a heat capacity", "650 kJ/K", "kJ/K", "Btu/delta_degF"),
    "specific_heat": Kind("J/(kg*K)", "a specific heat", "1.9 kJ/(kg*K)",
                          "kJ/(kg*K)", "Btu/(lb*delta_degF)"),
    "thermal_conductivity": Kind("W/(m*K)", "a thermal conductivity", "0.13 W/(m*K)",
                                 "W/(m*K)", "Btu/(h*ft*delta_degF)"),
    "expansion_coefficient": Kind("1/K", "a thermal expansion coefficient",
                                  "7e-4 1/K", "1/K", "1/delta_degF"),
    "flow_per_pressure": Kind("m^3/(s*Pa)", "a flow per pressure", "2 L/(min*bar)",
                              "L/(min*bar)", "gal/(min*psi)"),
    "pressure_per_flow": Kind("Pa*s/m^3", "a pressure rise per flow", "0.2 bar/(L/min)",
                              "bar/(L/min)", "psi/(gal/min)"),
    "specific_energy_price": Kind("1/J", "a price per energy", "0.20 /kWh", "1/kWh",
                                  "1/kWh"),
    "emission_factor": Kind("kg/J", "an emission factor", "0.35 kg/kWh", "kg/kWh",
                            "lb/kWh"),
    "dimensionless": Kind("", "a plain number", "0.9", "", ""),
}

UNIT_SYSTEMS = ("si", "us")


@lru_cache(maxsize=1)
def registry():
    """The package's single pint ``UnitRegistry`` (created on first use).

    ``rev`` is a plain count here (so ``cm^3/rev`` is a volume and ``rpm`` is
    revolutions per minute = 1/60 s^-1, not 2*pi/60 rad/s).
    """
    import pint

    import logging

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True,
                             on_redefinition="warn")
    log = logging.getLogger("pint.util")
    level = log.level
    log.setLevel(logging.ERROR)  # our redefinitions of rpm/rps/cc are deliberate
    try:
        ureg.define("rev = 1 = revs = revolution_count")
        ureg.define("revolutions_per_minute = rev / minute = rpm")
        ureg.define("revolutions_per_second = rev / second = rps")
        ureg.define("cc = centimeter ** 3")
        ureg.define("gpm = gallon / minute")
    finally:
        log.setLevel(level)
    return ureg


def _clean(text: str) -> str:
    t = text.strip().replace("°C", "degC").replace("°F", "degF").replace("°", "deg")
    t = t.replace("²", "^2").replace("³", "^3").replace("·", "*").replace("ℓ", "L")
    # A leading "/" for prices ("0.2 /kWh"): pint needs a numerator.
    parts = t.split(None, 1)
    if len(parts) == 2 and parts[1].startswith("/"):
        t = f"{parts[0]} 1{parts[1]}"
    return t


def to_si(value, kind: str, field: str | None = None, file: str | None = None) -> float:
    """Parse *value* (a quantity string, or a plain number for dimensionless
    kinds) and return it as an SI float.

    Parameters
    ----------
    value : str or int or float
        E.g. ``"160 bar"``.  A bare number is accepted only for the
        ``dimensionless`` kind; every other kind needs its unit.
    kind : str
        A key of :data:`KINDS`.
    field : str, optional
        Field path for error messages, e.g. ``"phases[2].speed"``.

    Returns
    -------
    float
        The value in the kind's SI unit (see :data:`KINDS`).

    Raises
    ------
    HeatloadError
        Wrong dimension, unparsable text, a missing unit or a non-finite value,
        naming *field* and the expected kind.

    Examples
    --------
    >>> round(to_si("160 bar", "pressure"))
    16000000
    >>> round(to_si("1450 rpm", "shaft_speed"), 4)
    24.1667
    """
    k = KINDS.get(kind)
    if k is None:
        raise HeatloadError(f"unknown quantity kind {kind!r}", field=field, file=file)
    expect = f"expected {k.noun} such as '{k.example}'"
    if isinstance(value, bool):
        raise HeatloadError(f"{expect}, got {value!r}", field=field, file=file)
    if isinstance(value, (int, float)):
        if kind == "dimensionless":
            v = float(value)
            if not math.isfinite(v):
                raise HeatloadError(f"{expect}, got {value!r}", field=field, file=file)
            return v
        raise HeatloadError(f"{expect} (a number with its unit, in quotes), got {value!r}",
                            field=field, file=file)
    if not isinstance(value, str):
        raise HeatloadError(f"{expect}, got {value!r}", field=field, file=file)
    ureg = registry()
    try:
        q = ureg.Quantity(_clean(value))
    except Exception:  # pint's parser can fail in many ways on arbitrary text
        # (even AssertionError); any of them means the text is not a quantity
        raise HeatloadError(f"{expect}, got {value!r} (not a number with a known unit)",
                            field=field, file=file) from None
    if not isinstance(q, ureg.Quantity):
        q = ureg.Quantity(q, "")
    target = k.si
    if kind == "displacement":
        # Accept "28 cm^3/rev" and "28 cm^3" alike: rev is a count.
        target = "m^3"
    try:
        v = float(q.to(target).magnitude) if target else float(q.to("").magnitude)
    except Exception:  # wrong dimension, complex or otherwise unconvertible
        raise HeatloadError(f"{expect}, got {value!r}", field=field, file=file) from None
    if not math.isfinite(v):
        raise HeatloadError(f"{expect}, got {value!r} (not a finite number)",
                            field=field, file=file)
    return v


def from_si(value, kind: str, unit: str):
    """Convert an SI float or array of *kind* to *unit* (returns a float/array)."""
    import numpy as np

    k = KINDS[kind]
    ureg = registry()
    si = "m^3" if kind == "displacement" else k.si
    if kind in ("temperature",):
        q = ureg.Quantity(np.asarray(value, dtype=float), "K")
        out = q.to(unit).magnitude
    else:
        factor = ureg.Quantity(1.0, si or "").to(unit).magnitude
        out = np.asarray(value, dtype=float) * factor
    return out if np.ndim(out) else float(out)


def display_unit(kind: str, system: str = "si") -> str:
    """The unit *kind* is shown in for *system* (``"si"`` or ``"us"``)."""
    if system not in UNIT_SYSTEMS:
        raise HeatloadError(f"unit system must be one of {UNIT_SYSTEMS}, got {system!r}",
                            field="units")
    k = KINDS[kind]
    return k.show_si if system == "si" else k.show_us


_PRETTY = {"degC": "°C", "degF": "°F", "delta_degF": "°F", "m^2": "m²", "m^3": "m³",
           "mm^2/s": "mm²/s", "cm^3": "cm³", "in^3": "in³", "ft^2": "ft²",
           "kg/m^3": "kg/m³", "lb/ft^3": "lb/ft³", "W/(m^2*K)": "W/(m²·K)",
           "N*m": "N·m", "lbf*ft": "lbf·ft", "gal/min": "gpm", "mPa*s": "mPa·s",
           "kJ/(kg*K)": "kJ/(kg·K)", "W/(m*K)": "W/(m·K)",
           "Btu/(h*delta_degF)": "Btu/(h·°F)", "Btu/(lb*delta_degF)": "Btu/(lb·°F)",
           "Btu/(h*ft^2*delta_degF)": "Btu/(h·ft²·°F)", "Btu/(h*ft*delta_degF)": "Btu/(h·ft·°F)",
           "1/delta_degF": "1/°F"}


def pretty_unit(unit: str) -> str:
    """A unit string as people write it (``degC`` -> ``°C``)."""
    return _PRETTY.get(unit, unit)


def format_quantity(value: float, kind: str, system: str = "si", digits: int = 3) -> str:
    """Format an SI value of *kind* for people, e.g. ``"160 bar"`` or ``"2321 psi"``.

    *digits* is the number of significant figures (at least the integer part).
    """
    unit = display_unit(kind, system)
    v = from_si(value, kind, unit) if unit else float(value)
    return f"{format_number(v, digits)} {pretty_unit(unit)}".strip()


def format_number(v: float, digits: int = 3) -> str:
    """A float with *digits* significant figures, never in exponent form for
    ordinary engineering magnitudes."""
    if not math.isfinite(v):
        return str(v)
    if v == 0:
        return "0"
    mag = math.floor(math.log10(abs(v)))
    if mag >= 9 or mag <= -5:
        return f"{v:.{max(digits - 1, 0)}e}"
    decimals = max(digits - 1 - mag, 0)
    return f"{v:.{decimals}f}"
