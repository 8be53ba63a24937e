"""Units at the edges: parsing, errors, formatting.

Check values: NIST SP 811 (2008), Appendix B conversion factors:
1 psi = 6894.757 Pa; 1 US gal = 3.785412e-3 m^3; 1 in = 0.0254 m (exact);
1 hp (550 ft lbf/s) = 745.6999 W; 1 lbf = 4.448222 N; degF = degC * 9/5 + 32.
"""

import math

import numpy as np
import pytest

from heatload.errors import HeatloadError
from heatload.units import KINDS, display_unit, format_quantity, from_si, to_si


@pytest.mark.parametrize("text, kind, expected", [
    ("160 bar", "pressure", 160e5),                       # 1 bar = 1e5 Pa (definition)
    ("1 psi", "pressure", 6894.757),                       # NIST SP 811
    ("12 gal/min", "flow", 12 * 3.785412e-3 / 60),        # NIST SP 811 (US gallon)
    ("40 L/min", "flow", 40e-3 / 60),
    ("63 mm", "length", 0.063),
    ("2.5 in", "length", 2.5 * 0.0254),                   # NIST SP 811 (exact)
    ("35 degC", "temperature", 308.15),
    ("95 degF", "temperature", 308.15),                   # (95 - 32) 5/9 + 273.15
    ("1450 rpm", "shaft_speed", 1450 / 60),               # revolutions per second
    ("7.5 kW", "power", 7500.0),
    ("1 hp", "power", 745.6999),                          # NIST SP 811
    ("1 lbf", "force", 4.448222),                         # NIST SP 811
    ("28 cm^3/rev", "displacement", 28e-6),
    ("28 cc", "displacement", 28e-6),
    ("46 mm^2/s", "kinematic_viscosity", 46e-6),
    ("0.35 kg/kWh", "emission_factor", 0.35 / 3.6e6),
    ("0.20 /kWh", "specific_energy_price", 0.20 / 3.6e6),
    ("10 K", "temperature_difference", 10.0),
    ("250 N*m", "torque", 250.0),
    ("0.9", "dimensionless", 0.9),
])
def test_parse(text, kind, expected):
    assert to_si(text, kind) == pytest.approx(expected, rel=1e-6)


def test_wrong_dimension_names_field_and_kind():
    with pytest.raises(HeatloadError) as e:
        to_si("12 kg", "velocity", field="phases[2].speed")
    assert str(e.value) == "phases[2].speed: expected a velocity such as '0.1 m/s', got '12 kg'"


@pytest.mark.parametrize("bad", ["fast", "12 blorps", "", "12 bar bar m", "1e999 bar", True, None, [1]])
def test_unparsable_is_project_error(bad):
    with pytest.raises(HeatloadError) as e:
        to_si(bad, "pressure", field="power_unit.relief.cracking_pressure", file="m.toml")
    assert "power_unit.relief.cracking_pressure" in str(e.value)
    assert "m.toml" in str(e.value)
    assert "\n" not in str(e.value)


def test_bare_number_needs_unit():
    with pytest.raises(HeatloadError, match="with its unit"):
        to_si(160, "pressure", field="x")


def test_format_si_and_us():
    assert format_quantity(160e5, "pressure", "si") == "160 bar"
    # 160 bar = 2320.6 psi (NIST factor above)
    assert format_quantity(160e5, "pressure", "us") == "2,321 psi"   # thousands grouped
    assert format_quantity(308.15, "temperature", "us") == "95.0 °F"
    assert format_quantity(1e-3, "flow", "si") == "60.0 L/min"
    # 60 L/min = 15.85 US gpm
    assert format_quantity(1e-3, "flow", "us") == "15.9 gpm"
    assert format_quantity(7500, "power", "us") == "10.1 hp"   # 7500 / 745.6999


def test_hydraulic_power_rule_of_thumb():
    # P[kW] = p[bar] Q[L/min] / 600 (common practice, exact with these units)
    p, q = to_si("150 bar", "pressure"), to_si("40 L/min", "flow")
    assert from_si(p * q, "power", "kW") == pytest.approx(150 * 40 / 600, rel=1e-12)
    # HP = psi gpm / 1714 (common practice; exact constant 1714.2)
    p, q = to_si("2000 psi", "pressure"), to_si("10 gal/min", "flow")
    assert from_si(p * q, "power", "hp") == pytest.approx(2000 * 10 / 1714, rel=5e-4)


def test_round_trip_every_kind():
    for kind in KINDS:
        for system in ("si", "us"):
            unit = display_unit(kind, system)
            if not unit:
                continue
            v = from_si(np.array([1.0, 2.5]), kind, unit)
            assert np.all(np.isfinite(v))
    assert math.isclose(from_si(0.063, "length", "in"), 0.063 / 0.0254)


def test_unknown_system():
    with pytest.raises(HeatloadError):
        display_unit("pressure", "imperial")


# --- the strict quantity grammar -------------------------------------------------
# One number and a unit expression; nothing else is evaluated (pint alone would compute
# "10**10**8 bar" for minutes and read "140,5 bar" as 1405 bar).

@pytest.mark.parametrize("text, kind, expected", [
    ("46 mm2/s", "kinematic_viscosity", 46e-6),           # "mm2" written for mm^2
    ("3 N m", "torque", 3.0),                              # juxtaposition is a product
    ("10 W/m^2/K", "heat_transfer_coefficient", 10.0),
    ("0.2 bar/(L/min)", "pressure_per_flow", 0.2e5 / (1e-3 / 60)),
    ("7e-4 1/K", "expansion_coefficient", 7e-4),
    (".5 bar", "pressure", 0.5e5),
    ("5. bar", "pressure", 5e5),
    ("+5 bar", "pressure", 5e5),
    ("1E+05 Pa", "pressure", 1e5),
    ("1450 1/min", "shaft_speed", 1450 / 60),
    ("5 kW·h", "energy", 5 * 3.6e6),                      # 1 kWh = 3.6 MJ (definition)
    ("1.2 m²", "area", 1.2),
    ("-10 degF", "temperature", (-10 - 32) * 5 / 9 + 273.15),   # NIST SP 811
    ("50 %", "dimensionless", 0.5),
])
def test_grammar_accepts_what_people_write(text, kind, expected):
    assert to_si(text, kind) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("text, reason", [
    ("140,5 bar", "use a decimal point: 140.5 bar"),
    ("0,5 bar", "use a decimal point: 0.5 bar"),
    ("1,000,000 bar", "without thousands separators"),
    ("1,000.5 bar", "without thousands separators"),
    ("2 3 bar", "write one number and its unit"),
    ("6..3 bar", "unexpected '.' after the number"),
    ("1e-400 bar", "too small to represent"),
    ("1e999 bar", "beyond the floating-point range"),
    ("1e4000 bar", "exponent is too long"),
    ("10**10**8 bar", "no arithmetic"),
    ("9**9**9 bar", "no arithmetic"),
    ("9**9**9", "no arithmetic"),
    ("2*3 bar", "no arithmetic"),
    ("2/3 bar", "write one number and its unit"),
    ("5 bar^0.5", "unexpected '.'"),
    ("5 bar^9", "within ±4"),
    ("5 ((((bar))))", "nested too deep"),
    ("5 (bar", "not closed"),
    ("5 bar)", "has no '('"),
    ("bar", "does not start with a number"),
    ("5 " + "bar*" * 40 + "bar", "longer than"),
    ("5 blorps", "not a number with a known unit"),
])
def test_grammar_refuses_with_its_reason(text, reason):
    with pytest.raises(HeatloadError) as e:
        to_si(text, "pressure", field="power_unit.relief.cracking_pressure", file="m.toml")
    msg = str(e.value)
    assert reason in msg and "power_unit.relief.cracking_pressure" in msg and "m.toml" in msg
    assert "\n" not in msg


def test_grammar_agrees_with_pint_on_what_it_accepts():
    """Outside check: for text the grammar accepts, the value equals pint's own
    Quantity conversion (the reference library) to rounding."""
    from heatload.units import registry
    ureg = registry()
    cases = [("160 bar", "Pa"), ("12 gal/min", "m^3/s"), ("95 degF", "K"), ("35 degC", "K"),
             ("0.2 bar/(L/min)", "Pa*s/m^3"), ("1.9 kJ/(kg*K)", "J/(kg*K)"),
             ("10 Btu/(h*ft^2*delta_degF)", "W/(m^2*K)")]
    kinds = ["pressure", "flow", "temperature", "temperature", "pressure_per_flow",
             "specific_heat", "heat_transfer_coefficient"]
    for (text, si), kind in zip(cases, kinds):
        ref = ureg.Quantity(text).to(si).magnitude
        assert to_si(text, kind) == pytest.approx(ref, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("text, reason", [
    ("1,000 L", "no commas in numbers: write 1000 L for thousands, or 1.000 L"),
    ("0x10 L", "unexpected 'x' after the number"),
    ("1_40 L", "unexpected '_' after the number"),
    ("5 m10", "unexpected digits '10'"),
])
def test_grammar_second_round(text, reason):
    with pytest.raises(HeatloadError) as e:
        to_si(text, "volume" if "L" in text else "length", field="f")
    assert reason in str(e.value)


def test_a_temperature_is_no_temperature_difference():
    """'40 degC' as an ETD was read as 313 K: a temperature where a difference
    belongs is refused (K, delta_degC and delta_degF are differences: NIST SP 811)."""
    with pytest.raises(HeatloadError, match="that is a temperature"):
        to_si("40 degC", "temperature_difference", field="--rated-etd")
    with pytest.raises(HeatloadError, match="that is a temperature"):
        to_si("40 °C", "temperature_difference", field="--rated-etd")
    assert to_si("40 K", "temperature_difference") == 40.0
    assert to_si("40 delta_degC", "temperature_difference") == pytest.approx(40.0)
    assert to_si("72 delta_degF", "temperature_difference") == pytest.approx(40.0)
    # the one-character degree signs are read as degC / degF
    assert to_si("20 \u2103", "temperature") == pytest.approx(293.15)


def test_the_shipped_unit_table_is_pint():
    """The common units' conversions ship as a table (scripts/make_unit_table.py) so
    that a command never imports pint for them; every entry equals pint's own
    conversion (the reference library) and covers every unit the outputs print."""
    from heatload import units
    table = units._shipped_conversions()
    assert len(table) > 100
    for key, (offset, factor) in table.items():
        kind, unit = key.split("|", 1)
        ref = units._pint_conversion(unit, kind)
        assert offset == pytest.approx(ref[0], rel=1e-15, abs=1e-300), key
        assert factor == pytest.approx(ref[1], rel=1e-15), key
    for kind, k in KINDS.items():
        for shown in (k.show_si, k.show_us):
            assert f"{kind}|{units._spelling(shown)}" in table, (kind, shown)


def test_compare_of_the_examples_imports_no_pint():
    """Cold start: the bundled examples use units of the shipped table, so
    `heatload compare` loads neither pint (about 0.6 s) nor CoolProp."""
    import subprocess
    import sys
    from heatload import io
    for path in io.example_paths():
        code = ("import sys, io, contextlib\nfrom heatload.cli import main\n"
                "with contextlib.redirect_stdout(io.StringIO()):\n"
                f"    assert main(['compare', {str(path)!r}]) == 0\n"
                "print(sorted(m for m in ('pint', 'CoolProp', 'dash', 'plotly') "
                "if m in sys.modules))")
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                             timeout=300)
        assert out.returncode == 0, out.stderr
        assert out.stdout.strip() == "[]", (path.name, out.stdout)


def test_marked_text_renders_in_each_system():
    from heatload.units import fill, mark, render, split_marks
    # 370 bar = 5366 psi; 80 degC = 176 degF; 7.5 kW = 10.06 hp (NIST SP 811 factors)
    text = (f"pump at {mark(370e5, 'pressure', 0)}, oil {mark(353.15, 'temperature', 0)}, "
            f"motor {mark(7500.0, 'power')}")
    assert render(text, "si") == "pump at 370 bar, oil 80 °C, motor 7.50 kW"
    assert render(text, "us") == "pump at 5,366 psi, oil 176 °F, motor 10.1 hp"
    template, quantities = split_marks(text)
    assert template == "pump at {0}, oil {1}, motor {2}"
    assert fill(template, quantities, "us") == render(text, "us")


def test_format_number_groups_thousands_only_when_asked():
    from heatload.units import format_number
    assert format_number(7069.4) == "7,069" and format_number(7069.4, group=False) == "7069"
    assert format_number(49040.0, 4) == "49,040"          # never 4.904e+04
    assert format_number(-0.0001) == "-0.000100"
