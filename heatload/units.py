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
import re
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

#: The one convention of every output file (JSON keys, CSV, Parquet and
#: spreadsheet columns): a number's name ends in its unit -- SI, except
#: absolute temperatures in degC (``_C``); temperature differences in ``_K``.
#: Plain numbers (efficiencies, fractions, factors, counts, money in the
#: scenario's ``currency``) carry a name that says so (:data:`PLAIN_NAMES`).
#: A record that names its unit beside the number is the one exception: a
#: warning's ``value``/``limit`` (SI of its ``kind``), a phase's ``speed``
#: (``speed_unit``: m/s or rev/s as the actuator is a cylinder or a motor).
SUFFIXES = {"pressure": "Pa", "flow": "m3_s", "length": "m", "distance": "m", "area": "m2",
            "volume": "m3", "displacement": "m3_rev", "velocity": "m_s",
            "shaft_speed": "rps", "force": "N", "torque": "N_m", "power": "W",
            "energy": "J", "time": "s", "temperature": "C", "temperature_difference": "K",
            "mass": "kg", "mass_flow": "kg_s", "density": "kg_m3",
            "kinematic_viscosity": "m2_s", "dynamic_viscosity": "Pa_s", "bulk_modulus": "Pa",
            "heat_transfer_coefficient": "W_m2K", "thermal_conductance": "W_K",
            "heat_capacity": "J_K", "specific_heat": "J_kgK", "thermal_conductivity": "W_mK",
            "expansion_coefficient": "per_K", "flow_per_pressure": "m3_sPa",
            "pressure_per_flow": "Pa_s_m3", "specific_energy_price": "per_J",
            "emission_factor": "kg_J"}
#: Suffixes of figures that are not a kind's SI unit (energy per year, payback time).
EXTRA_SUFFIXES = ("kWh", "per_kWh", "kg_per_kWh", "h", "years")
#: Endings of names of plain numbers: no unit, the name says what they are.
PLAIN_NAMES = ("efficiency", "fraction", "factor", "margin", "ratio", "effectiveness",
               "ntu", "count", "iterations", "rank", "seed", "samples", "variant", "passes",
               "phases", "decimals", "cost", "price", "cost_total", "cost_per_year",
               "saving_per_year", "hours_per_year", "cost_of_ownership_per_year",
               "cost_of_ownership_per_cycle", "P50", "P90", "P95")
#: Beginnings of names of counts: ``warnings_<code>`` counts the phases with that warning.
PLAIN_PREFIXES = ("warnings_",)


def file_name(name: str, kind: str | None) -> str:
    """*name* of a number in an output file with its unit suffix
    (:data:`SUFFIXES`); a plain number keeps a name of :data:`PLAIN_NAMES`
    and gets ``_factor`` otherwise; a path whose items mix kinds (cylinders
    and motors) gets ``_SI``.

    >>> file_name("power_unit.pump.displacement", "displacement")
    'power_unit.pump.displacement_m3_rev'
    >>> file_name("ambient.temperature_max", "temperature")
    'ambient.temperature_max_C'
    >>> file_name("economics.hours_per_year", "dimensionless")
    'economics.hours_per_year'
    """
    if kind is None:
        return f"{name}_SI"
    if kind == "dimensionless":
        return name if name.endswith(PLAIN_NAMES) else f"{name}_factor"
    return f"{name}_{SUFFIXES[kind]}"


def file_value(value, kind: str | None):
    """An SI value (float or array) as an output file holds it: unchanged,
    except absolute temperatures in degC."""
    return value - _ZERO_CELSIUS if kind == "temperature" else value


def from_file(value, kind: str | None):
    """A value as an output file holds it (:func:`file_value`) back in SI."""
    return value + _ZERO_CELSIUS if kind == "temperature" else value


_ZERO_CELSIUS = 273.15   # K


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
    t = text.strip().replace("\u2103", "degC").replace("\u2109", "degF")   # one-character ℃ ℉
    t = t.replace("°C", "degC").replace("°F", "degF").replace("°", "deg")
    t = t.replace("²", "^2").replace("³", "^3").replace("·", "*").replace("ℓ", "L")
    # A leading "/" for prices ("0.2 /kWh"): pint needs a numerator.
    parts = t.split(None, 1)
    if len(parts) == 2 and parts[1].startswith("/"):
        t = f"{parts[0]} 1{parts[1]}"
    return t


# ---------------------------------------------------------------------------
# A strict grammar for quantity text, checked before pint sees anything.
#
# pint's own parser evaluates arithmetic ("10**10**8 bar" runs for minutes),
# reads "140,5 bar" as 1405 bar and "2 3 bar" as 6 bar.  Here a quantity is
# one number and a unit expression; the expression holds unit names, "*",
# "/", parentheses and small integer powers only, so evaluating it is bounded.

#: Longest quantity text accepted (a few times the longest unit we print).
MAX_QUANTITY_CHARS = 120
#: Largest power a unit may carry ("m^3", "s^-2"): no unit of the trade needs more.
MAX_UNIT_POWER = 4
#: Deepest nesting of parentheses in a unit ("W/(m^2*K)" is 1).
MAX_UNIT_DEPTH = 3

_NUMBER_TEXT = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
_COMMA_NUMBER = re.compile(r"[+-]?\d*(?:,\d+)+")
_UNIT_TOKEN = re.compile(
    r"\s*(?:(?P<name>[A-Za-z_%\u00b5\u03bc\u03a9][A-Za-z_\u00b5\u03bc\u03a9]*)(?P<suffix>\d*)"
    r"|(?P<power>\*\*|\^)|(?P<op>[*/])|(?P<open>\()|(?P<close>\))|(?P<int>[+-]?\d+))")


class _UnknownUnit(Exception):
    """A unit name pint does not know."""


class _UnitSyntax(Exception):
    """The unit part of a quantity text breaks the grammar (message: why)."""


def _unit_tokens(text: str) -> list[tuple[str, str]]:
    out, pos = [], 0
    while pos < len(text):
        m = _UNIT_TOKEN.match(text, pos)
        if m is None or m.end() == pos:
            rest = text[pos:].strip()
            if not rest:
                break
            raise _UnitSyntax(f"unexpected {rest[0]!r} in the unit")
        kind = m.lastgroup if m.lastgroup != "suffix" else "name"
        if m.group("name") is not None:
            out.append(("name", m.group("name")))
            if len(m.group("suffix")) > 1:
                raise _UnitSyntax(f"unexpected digits {m.group('suffix')!r} after "
                                  f"{m.group('name')!r}")
            if m.group("suffix"):            # "mm2" is mm^2, as people write it
                out.append(("power", "^"))
                out.append(("int", m.group("suffix")))
        else:
            out.append((kind, m.group(kind)))
        pos = m.end()
    return out


def _unit_expression(tokens: list[tuple[str, str]]) -> str:
    """Check the unit tokens against the grammar and return pint's spelling.

    expr := term (("*" | "/" | juxtaposition) term)* ;
    term := ("(" expr ")" | name | "1" before "/") [("^" | "**") small integer]
    """
    pos, depth = 0, 0

    def term() -> str:
        nonlocal pos, depth
        if pos >= len(tokens):
            raise _UnitSyntax("the unit ends early")
        kind, text = tokens[pos]
        if kind == "open":
            depth += 1
            if depth > MAX_UNIT_DEPTH:
                raise _UnitSyntax("parentheses nested too deep in the unit")
            pos += 1
            inner = expr()
            if pos >= len(tokens) or tokens[pos][0] != "close":
                raise _UnitSyntax("a '(' in the unit is not closed")
            pos += 1
            depth -= 1
            atom = f"({inner})"
        elif kind == "name":
            pos += 1
            atom = text
        elif kind == "int" and text == "1" and pos + 1 < len(tokens) \
                and tokens[pos + 1] == ("op", "/"):
            pos += 1
            atom = "1"
        elif kind == "int":
            raise _UnitSyntax("a second number where a unit was expected; "
                              "write one number and its unit")
        elif kind == "power" or pos == 0:
            raise _UnitSyntax("no arithmetic on numbers; write one number and its unit")
        else:
            raise _UnitSyntax(f"unexpected {text!r} in the unit")
        if pos < len(tokens) and tokens[pos][0] == "power":
            pos += 1
            if pos >= len(tokens) or tokens[pos][0] != "int":
                raise _UnitSyntax("a power of a unit must be a whole number")
            n = int(tokens[pos][1])
            if abs(n) > MAX_UNIT_POWER:
                raise _UnitSyntax(f"a power of a unit must lie within ±{MAX_UNIT_POWER}")
            pos += 1
            atom = f"{atom}**{n}"
        return atom

    def expr() -> str:
        nonlocal pos
        out = term()
        while pos < len(tokens) and tokens[pos][0] != "close":
            kind, text = tokens[pos]
            if kind == "op":
                pos += 1
                out = f"{out}{text}{term()}"
            else:                          # juxtaposition: "N m" is N*m
                out = f"{out}*{term()}"
        return out

    text = expr()
    if pos != len(tokens):
        raise _UnitSyntax("a ')' in the unit has no '('")
    return text


def split_quantity(text: str) -> tuple[float, str]:
    """Split quantity text into its number and a checked unit expression.

    The text must be one number (optional sign, decimal point, exponent) and a
    unit expression of unit names, ``*``, ``/``, parentheses and integer
    powers up to :data:`MAX_UNIT_POWER`.  Nothing is evaluated but the number.

    Returns
    -------
    (float, str)
        The number and the unit in pint's spelling (``""`` for a bare number).

    Raises
    ------
    ValueError
        With a short reason: a decimal comma, two numbers, arithmetic, a number
        out of the floating-point range, text too long.

    Examples
    --------
    >>> split_quantity("140.5 bar")
    (140.5, 'bar')
    >>> split_quantity("0.2 bar/(L/min)")
    (0.2, 'bar/(L/min)')
    """
    t = text.strip()
    if len(t) > MAX_QUANTITY_CHARS:
        raise ValueError(f"longer than {MAX_QUANTITY_CHARS} characters")
    comma = _COMMA_NUMBER.match(t)
    if comma:
        number = comma.group(0)
        if number.count(",") > 1 or t[comma.end():comma.end() + 1] == ".":
            raise ValueError("write the number without thousands separators")
        head, tail = number.lstrip("+-").split(",")
        rest = t[comma.end():]
        if len(tail) == 3 and head and head != "0":
            # "1,000" is a thousand to some readers and one to others: ask
            raise ValueError(f"no commas in numbers: write {number.replace(',', '')}{rest} "
                             f"for thousands, or {number.replace(',', '.')}{rest} with a "
                             "decimal point")
        raise ValueError(f"use a decimal point: {number.replace(',', '.')}{rest}")
    m = _NUMBER_TEXT.match(t)
    if m is None:
        raise ValueError("it does not start with a number")
    number_text = m.group(0)
    rest = t[m.end():]
    if rest[:1] and rest[:1] in ".,+-0123456789eE_xX":
        raise ValueError(f"unexpected {rest[:1]!r} after the number")
    if "e" in number_text.lower() and len(number_text.lower().split("e")[1].lstrip("+-")) > 3:
        raise ValueError("the number's exponent is too long")
    value = float(number_text)
    if not math.isfinite(value):
        raise ValueError("the number is beyond the floating-point range")
    mantissa = number_text.lower().split("e")[0]
    if value == 0.0 and any(c in "123456789" for c in mantissa):
        raise ValueError("the number is too small to represent; it would read as 0")
    rest = rest.strip()
    if rest.startswith("/"):               # a price "0.2 /kWh": per kWh
        rest = "1" + rest
    try:
        unit = _unit_expression(_unit_tokens(rest)) if rest else ""
    except _UnitSyntax as e:
        raise ValueError(str(e)) from None
    return value, unit


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
    try:
        number, unit = split_quantity(_clean(value))
    except ValueError as e:
        raise HeatloadError(f"{expect}, got {value!r} ({e})", field=field, file=file) from None
    if kind == "temperature_difference" and re.search(
            r"(?<![A-Za-z_])(degC|degF|celsius|fahrenheit|degree_Celsius|degree_Fahrenheit)\b",
            unit):
        raise HeatloadError(f"{expect}, got {value!r} (that is a temperature; a difference "
                            f"is written in K or delta_degC, e.g. '{number:g} K')",
                            field=field, file=file)
    try:
        offset, factor = _conversion(unit, kind)
    except _UnknownUnit:
        raise HeatloadError(f"{expect}, got {value!r} (not a number with a known unit)",
                            field=field, file=file) from None
    except Exception:  # wrong dimension, or pint failing otherwise
        raise HeatloadError(f"{expect}, got {value!r}", field=field, file=file) from None
    v = offset + factor * number
    if not math.isfinite(v):
        raise HeatloadError(f"{expect}, got {value!r} (not a finite number)",
                            field=field, file=file)
    return v


@lru_cache(maxsize=1)
def _shipped_conversions() -> dict:
    """``"kind|unit" -> (offset, factor)`` of the common units, made from pint by
    ``scripts/make_unit_table.py`` and checked against pint by the tests: a
    command whose files use common units never imports pint (about 0.6 s)."""
    import json
    from pathlib import Path
    path = Path(__file__).parent / "data" / "unit_conversions.json"
    try:
        return {k: tuple(v) for k, v in json.loads(path.read_text(encoding="utf-8")).items()}
    except OSError:          # a checkout without the table converts through pint
        return {}


@lru_cache(maxsize=1024)
def _conversion(unit: str, kind: str) -> tuple[float, float]:
    """``(offset, factor)`` so that SI = offset + factor * number for *unit*
    (in :func:`split_quantity`'s spelling): the shipped table, else pint."""
    hit = _shipped_conversions().get(f"{kind}|{unit}")
    return hit if hit is not None else _pint_conversion(unit, kind)


def _pint_conversion(unit: str, kind: str) -> tuple[float, float]:
    """``(offset, factor)`` so that SI = offset + factor * number for *unit*.

    Every conversion pint makes is affine (temperatures have an offset), so two
    points fix it; the unit text has passed :func:`split_quantity`'s grammar,
    which bounds what pint evaluates.
    """
    ureg = registry()
    target = "m^3" if kind == "displacement" else KINDS[kind].si  # rev is a count
    try:
        u = ureg.parse_units(unit) if unit else ureg.dimensionless
    except Exception:  # pint fails in many ways (even AssertionError) on odd names
        raise _UnknownUnit(unit) from None
    zero = float(ureg.Quantity(0.0, u).to(target or "").magnitude)
    one = float(ureg.Quantity(1.0, u).to(target or "").magnitude)
    if not (math.isfinite(zero) and math.isfinite(one)):
        raise ValueError(unit)
    return zero, one - zero


def from_si(value, kind: str, unit: str):
    """Convert an SI float or array of *kind* to *unit* (returns a float/array):
    the inverse of :func:`to_si`'s conversion, x = (SI - offset) / factor."""
    import numpy as np

    offset, factor = _conversion(_spelling(unit), kind)
    out = (np.asarray(value, dtype=float) - offset) / factor
    return out if np.ndim(out) else float(out)


@lru_cache(maxsize=256)
def _spelling(unit: str) -> str:
    """A unit as :func:`split_quantity` spells it (``"bar/(L/min)"``, ``""``)."""
    return split_quantity(f"1 {unit}".strip())[1]


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
           "1/delta_degF": "1/°F", "Btu/delta_degF": "Btu/°F"}


def pretty_unit(unit: str) -> str:
    """A unit string as people write it (``degC`` -> ``°C``)."""
    return _PRETTY.get(unit, unit)


def format_quantity(value: float, kind: str, system: str = "si", digits: int = 3,
                    decimals: int | None = None) -> str:
    """Format an SI value of *kind* for people, e.g. ``"160 bar"`` or ``"2,321 psi"``.

    *digits* is the number of significant figures (at least the integer part);
    *decimals*, when given, fixes the places after the point instead.
    Thousands are separated (:func:`format_number`).
    """
    unit = display_unit(kind, system)
    v = from_si(value, kind, unit) if unit else float(value)
    text = format_number(v, digits) if decimals is None else _grouped(v, decimals)
    return f"{text} {pretty_unit(unit)}".strip()


def _grouped(v: float, decimals: int, group: bool = True) -> str:
    text = f"{v:,.{decimals}f}" if group else f"{v:.{decimals}f}"
    # "-0" and "-0.00" read as a sign that means nothing
    return text.lstrip("-") if text.lstrip("-").strip("0.,") == "" else text


def format_number(v: float, digits: int = 3, group: bool = True) -> str:
    """A float with *digits* significant figures (at least the whole part),
    thousands separated, never in exponent form for any magnitude a machine
    has (1e-9 to 1e15); ``group=False`` for text that is read back
    (an editable cell: :func:`to_si` refuses separators).

    >>> format_number(49040.3), format_number(12.04), format_number(0.6546)
    ('49,040', '12.0', '0.655')
    >>> format_number(-1234567.0), format_number(7069.4, group=False)
    ('-1,234,567', '7069')
    """
    v = float(v)
    if not math.isfinite(v):
        return "n/a" if math.isnan(v) else str(v)
    if v == 0:
        return "0"
    mag = math.floor(math.log10(abs(v)))
    if mag >= 15 or mag <= -10:
        return f"{v:.{max(digits - 1, 0)}e}"
    return _grouped(v, max(digits - 1 - mag, 0), group)


# ---------------------------------------------------------------------------
# Quantities inside text.  The engine writes a message once, with each figure
# marked by its SI value and kind (:func:`mark`); the edges render the text in
# the reader's unit system (:func:`render`), so a warning built in the engine
# reads in psi and °F for a US reader without the engine knowing pint.

_MARK_OPEN, _MARK_SEP, _MARK_CLOSE = "\ue000", "\ue001", "\ue002"
_MARK = re.compile(f"{_MARK_OPEN}([a-z_]+){_MARK_SEP}([^{_MARK_SEP}{_MARK_CLOSE}]+)"
                   f"{_MARK_SEP}(-?\\d*){_MARK_CLOSE}")


def mark(value, kind: str, decimals: int | None = None) -> str:
    """The SI *value* of *kind* as a mark inside a message, rendered by
    :func:`render` (with *decimals* places in the display unit, else 3
    significant figures)."""
    return (f"{_MARK_OPEN}{kind}{_MARK_SEP}{float(value)!r}{_MARK_SEP}"
            f"{'' if decimals is None else int(decimals)}{_MARK_CLOSE}")


def split_marks(text: str) -> tuple[str, list]:
    """*text* with its marks replaced by ``{0}``, ``{1}``... and the marked
    quantities as plain data ``[{"value": SI, "kind": ..., "decimals": ...}]``
    (for JSON; :func:`fill` writes them back in a unit system).

    >>> split_marks("at " + mark(2e7, "pressure", 0))
    ('at {0}', [{'value': 20000000.0, 'kind': 'pressure', 'decimals': 0}])
    """
    found = []

    def one(m):
        found.append({"value": float(m.group(2)), "kind": m.group(1),
                      "decimals": int(m.group(3)) if m.group(3) else None})
        return "{" + str(len(found) - 1) + "}"
    return _MARK.sub(one, text), found


def fill(template: str, quantities, system: str = "si") -> str:
    """The text of :func:`split_marks` with its quantities written in *system*'s units."""
    for i, q in enumerate(quantities):
        template = template.replace("{" + str(i) + "}", format_quantity(
            q["value"], q["kind"], system, decimals=q.get("decimals")), 1)
    return template


def render(text: str, system: str = "si") -> str:
    """*text* with every :func:`mark` written in *system*'s units.

    >>> render("relief at " + mark(3.7e7, "pressure", 0))
    'relief at 370 bar'
    """
    if _MARK_OPEN not in text:
        return text

    def one(m):
        d = m.group(3)
        return format_quantity(float(m.group(2)), m.group(1), system,
                               decimals=int(d) if d else None)
    return _MARK.sub(one, text)
