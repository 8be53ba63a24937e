"""Tests of the duty-cycle file format: loading, validation messages, lossless
writing and the bundled examples.

These are format tests, not physics tests: the check values are the inputs
themselves (a value written and read back must be the very same float) and
the unit conversions of the SI definitions (1 bar = 1e5 Pa exactly, 1 L =
1e-3 m^3, degC = K - 273.15; BIPM SI Brochure, 9th ed.).
"""

from __future__ import annotations

import dataclasses
import math
import re

import pytest
from hypothesis import given, settings, strategies as st

from heatload.io import schema
from heatload import io, model
from heatload.errors import HeatloadError

MINIMAL = '''\
[scenario]
name = "test rig"

[[actuators]]
name = "cyl"
kind = "cylinder"
bore = "63 mm"
rod = "36 mm"
stroke = "400 mm"

[[actuators]]
name = "mot"
kind = "motor"
displacement = "80 cm^3/rev"
volumetric_efficiency = 0.95

[[phases]]
name = "out"
actuator = "cyl"
motion = "extend"
load = "10 kN"
speed = "0.1 m/s"
stroke = "300 mm"
compress = true

[[phases]]
name = "back"
actuator = "cyl"
motion = "retract"
speed = "full"
stroke = "300 mm"

[[phases]]
name = "squeeze"
actuator = "cyl"
motion = "hold"
duration = "2 s"
hold_pressure = "100 bar"
unloading = "held"

[[phases]]
name = "spin"
actuator = "mot"
motion = "run"
load = "100 N*m"
speed = "200 rpm"
duration = "5 s"
'''


def _edit(old: str, new: str, text: str = MINIMAL) -> str:
    assert text.count(old) == 1, old
    return text.replace(old, new)


def _load_error(tmp_path, text: str, name: str = "bad.toml") -> HeatloadError:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    with pytest.raises(HeatloadError) as info:
        io.load_scenario(path)
    err = info.value
    message = str(err)
    assert message.startswith(str(path)), message
    assert "\n" not in message
    return err


# ---------------------------------------------------------------------------
# Loading what is valid
# ---------------------------------------------------------------------------

def test_minimal_file_loads_to_si():
    s = io.loads_scenario(MINIMAL)
    cyl = s.actuator("cyl")
    assert cyl.bore == pytest.approx(0.063, rel=1e-15)         # 63 mm (SI prefix)
    assert s.phases[0].load == pytest.approx(10e3, rel=1e-15)  # 10 kN
    assert s.phases[1].speed is None                            # "full" = full pump flow
    assert s.phases[2].hold_pressure == pytest.approx(100e5, rel=1e-15)  # 1 bar = 1e5 Pa
    assert s.phases[3].speed == pytest.approx(200 / 60, rel=1e-12)       # rpm -> rev/s
    assert isinstance(s.actuator("mot"), model.HydraulicMotor)
    # no [[strategies]]: every strategy with default parameters, in the model's order
    assert tuple(x.kind for x in s.strategies) == model.STRATEGIES
    assert all(x.parameters == model.StrategyParameters() for x in s.strategies)
    # the sections left out keep the model's defaults
    assert s.power_unit == model.PowerUnit()
    assert s.fluid == model.Fluid()


def test_partial_section_keeps_the_other_defaults_of_that_part():
    text = MINIMAL + '\n[power_unit.return_line]\nlength = "5 m"\n'
    s = io.loads_scenario(text)
    assert s.power_unit.return_line.length == 5.0
    # the return line's own default diameter (20 mm), not the generic line's 16 mm
    assert s.power_unit.return_line.inner_diameter == model.PowerUnit().return_line.inner_diameter


def test_strategy_defaults_apply_to_every_strategy_and_items_override():
    text = MINIMAL + '''
[strategy_defaults]
counterbalance_setting = "80 bar"

[[strategies]]
kind = "meter-in"

[[strategies]]
kind = "meter-out"
counterbalance_setting = "90 bar"
label = "meter-out CB"
'''
    s = io.loads_scenario(text)
    assert s.strategies[0].parameters.counterbalance_setting == pytest.approx(80e5)
    assert s.strategies[1].parameters.counterbalance_setting == pytest.approx(90e5)
    assert s.strategy("meter-out CB").kind == "meter-out"


def test_temperatures_in_celsius_and_fahrenheit():
    text = MINIMAL + '\n[ambient]\ntemperature = "25 degC"\ntemperature_max = "104 degF"\n'
    s = io.loads_scenario(text)
    assert s.ambient.temperature == pytest.approx(298.15, abs=1e-9)      # K = degC + 273.15
    assert s.ambient.temperature_max == pytest.approx(313.15, abs=1e-9)  # 104 degF = 40 degC


def test_relative_percent_bounds():
    text = MINIMAL + '''
[[uncertainty]]
path = "phases[*].load"
low = "-10 %"
high = "+25 %"
'''
    u = io.loads_scenario(text).uncertainty[0]
    assert (u.low, u.high, u.relative) == (0.9, 1.25, True)


def test_grade_with_viscosity_index_uses_oil_module():
    oil = pytest.importorskip("heatload.properties.oil")
    text = MINIMAL + '\n[fluid]\niso_grade = 46\nviscosity_index = 100\n'
    s = io.loads_scenario(text)
    assert s.fluid.iso_grade == 46
    assert s.fluid.nu40 == pytest.approx(46e-6)        # ISO 3448: VG = mid-point at 40 degC
    # An HM 46 oil of VI ~100 has about 6.8 mm^2/s at 100 degC (common practice,
    # from memory of typical datasheets).
    assert s.fluid.nu100 == pytest.approx(6.8e-6, rel=0.03)
    assert s.fluid.nu100 == pytest.approx(float(oil.nu100_from_vi(46e-6, 100.0)), rel=1e-12)
    # the writer stores nu40/nu100 explicitly: equal on reload
    assert io.loads_scenario(io.dumps_scenario(s)) == s


def test_fluid_by_viscosity_alone_is_no_iso_grade():
    text = MINIMAL + '\n[fluid]\nnu40 = "40 mm^2/s"\nnu100 = "6.2 mm^2/s"\n'
    s = io.loads_scenario(text)
    assert s.fluid.iso_grade is None
    assert io.loads_scenario(io.dumps_scenario(s)) == s


# ---------------------------------------------------------------------------
# Bundled examples
# ---------------------------------------------------------------------------

def test_example_paths_are_the_three_machines():
    names = [p.name for p in io.example_paths()]
    assert names == sorted(names)
    assert {"forming_press.toml", "platform_lift.toml", "conveyor_winch.toml"} <= set(names)
    assert io.default_scenario_path().name == "forming_press.toml"
    assert io.default_scenario_path().is_file()


def test_default_press_has_twelve_phases():
    s = io.load_scenario(io.default_scenario_path())
    assert len(s.phases) == 12


@pytest.mark.parametrize("path", io.example_paths(), ids=lambda p: p.name)
def test_example_loads_and_round_trips(path):
    s = io.load_scenario(path)
    assert s.phases and s.actuators and s.strategies
    text = io.dumps_scenario(s)
    again = io.loads_scenario(text, source="dumped")
    assert again == s
    assert io.dumps_scenario(again) == text          # the written text is a fixed point


@pytest.mark.parametrize("path", io.example_paths(), ids=lambda p: p.name)
def test_example_pump_reaches_its_target_speeds(path):
    """Sanity of the invented numbers: the pump's effective flow covers every
    set speed (Q = D n eta_v; v = Q / A; n_m = Q eta_v,m / D_m, common practice)."""
    s = io.load_scenario(path)
    pump = s.power_unit.pump
    q = pump.displacement * pump.shaft_speed * pump.volumetric_efficiency
    # with an accumulator the pump need only cover the cycle's mean flow, sum(Q t) / T
    stored = any(x.kind == "accumulator" for x in s.strategies)
    volume = time = 0.0
    for ph, n in zip(s.phases, s.phase_repeats()):
        if ph.speed is None or ph.actuator is None:
            time += n * (ph.duration or 0.0)
            continue
        a = s.actuator(ph.actuator)
        if a.kind == "motor":
            need = ph.speed * a.displacement / a.volumetric_efficiency
        else:
            area = math.pi / 4 * a.bore ** 2
            if ph.motion == "retract":
                area -= math.pi / 4 * a.rod ** 2
            need = ph.speed * area
        t = ph.duration or ph.stroke / ph.speed
        volume, time = volume + n * need * t, time + n * t
        if not stored:
            assert need <= q, ph.name
    assert volume <= q * time


def test_schema_example_round_trips_and_documents_every_key():
    s = io.loads_scenario(io.SCHEMA_EXAMPLE, source="SCHEMA_EXAMPLE")
    assert io.loads_scenario(io.dumps_scenario(s)) == s
    assert s.reservoir.surfaces and s.uncertainty and len(s.actuators) == 2
    specs = [schema._SCENARIO, schema._ECONOMICS, schema._FLUID, schema._AMBIENT, schema._RESERVOIR,
             schema._SURFACE, schema._PUMP, schema._MOTOR, schema._RELIEF, schema._DIRECTIONAL, schema._CHECK,
             schema._LINE, schema._CYLINDER, schema._HYDRAULIC_MOTOR, schema._PHASE, schema._STRATEGY,
             schema._COOLER, schema._UNCERTAINTY]
    for spec in specs:
        for key in spec:
            if key == "surfaces":
                continue
            assert re.search(rf"^\s*#?\s*{key}\s*=", io.SCHEMA_EXAMPLE, re.M), key


# ---------------------------------------------------------------------------
# Lossless writing of awkward floats
# ---------------------------------------------------------------------------

def test_awkward_floats_round_trip_exactly():
    s = io.loads_scenario(MINIMAL)
    cyl = dataclasses.replace(s.actuators[0], bore=0.1 + 0.2 - 0.2, rod=0.036000000000000004,
                              stroke=1 / 3)
    pu = dataclasses.replace(
        s.power_unit,
        pump=dataclasses.replace(s.power_unit.pump, shaft_speed=1450 / 60 + 1e-13,
                                 displacement=28.123456789e-6),
        relief=dataclasses.replace(s.power_unit.relief, cracking_pressure=17_999_999.999999996))
    amb = dataclasses.replace(s.ambient, temperature=300.123456789123, temperature_max=313.15)
    odd = dataclasses.replace(s, actuators=(cyl, s.actuators[1]), power_unit=pu, ambient=amb,
                              shift_duration=math.pi * 1000)
    back = io.loads_scenario(io.dumps_scenario(odd))
    assert back == odd                               # equality, not closeness
    assert back.actuators[0].stroke == 1 / 3


@settings(max_examples=40, deadline=None)
@given(p=st.floats(min_value=1e5, max_value=1.9e8, allow_nan=False),   # relief >= 1 bar
       t=st.floats(min_value=200.0, max_value=500.0, allow_nan=False),
       q=st.floats(min_value=1e-6, max_value=0.09, allow_nan=False),
       f=st.floats(min_value=-1e8, max_value=1e8, allow_nan=False))
def test_any_value_round_trips_exactly(p, t, q, f):
    s = io.loads_scenario(MINIMAL)
    s = dataclasses.replace(
        s,
        power_unit=dataclasses.replace(
            s.power_unit, relief=dataclasses.replace(s.power_unit.relief,
                                                     cracking_pressure=p, rated_flow=q)),
        # above the hottest ambient (40 degC) + 5 K: the loader refuses an air cooler's
        # design point at or below the air
        fluid=dataclasses.replace(s.fluid, temperature_max=max(t, 330.0)),
        phases=(dataclasses.replace(s.phases[0], load=f),) + s.phases[1:])
    assert io.loads_scenario(io.dumps_scenario(s)) == s


# ---------------------------------------------------------------------------
# Rejections: each names the file, the field path and, where found, the line
# ---------------------------------------------------------------------------

BAD = [
    # (id, old, new, field, fragment)
    ("wrong unit", 'speed = "0.1 m/s"', 'speed = "12 kg"', "phases[0].speed",
     "expected a velocity such as '0.1 m/s', got '12 kg'"),
    ("number without unit", 'bore = "63 mm"', "bore = 63", "actuators[0].bore",
     "a number with its unit"),
    ("negative size", 'bore = "63 mm"', 'bore = "-63 mm"', "actuators[0].bore", "positive"),
    ("zero stroke", 'stroke = "400 mm"', 'stroke = "0 mm"', "actuators[0].stroke", "positive"),
    ("rod not below bore", 'rod = "36 mm"', 'rod = "63 mm"', "actuators[0].rod",
     "smaller than the bore"),
    ("efficiency above one", "volumetric_efficiency = 0.95", "volumetric_efficiency = 1.2",
     "actuators[1].volumetric_efficiency", "(0, 1]"),
    ("efficiency zero", "volumetric_efficiency = 0.95", "volumetric_efficiency = 0",
     "actuators[1].volumetric_efficiency", "(0, 1]"),
    ("unknown motion", 'motion = "extend"', 'motion = "extnd"', "phases[0].motion",
     "did you mean 'extend'?"),
    ("unknown unloading", 'unloading = "held"', 'unloading = "dump"', "phases[2].unloading",
     "relief, centre, held"),
    ("unknown actuator", 'actuator = "mot"', 'actuator = "motr"', "phases[3].actuator",
     "no actuator called 'motr'"),
    ("duplicate actuator", 'name = "mot"', 'name = "cyl"', "actuators[1].name",
     "duplicate actuator name"),
    ("duplicate phase", 'name = "back"', 'name = "out"', "phases[1].name",
     "duplicate phase name"),
    ("absurd speed", 'speed = "0.1 m/s"', 'speed = "12 m/s"', "phases[0].speed", "10 m/s"),
    ("absurd pressure", 'hold_pressure = "100 bar"', 'hold_pressure = "3000 bar"',
     "phases[2].hold_pressure", "2000 bar"),
    ("no stroke nor duration", 'stroke = "300 mm"\ncompress = true', "compress = true",
     "phases[0].stroke", "an extend phase needs a stroke or a duration"),
    ("hold with pressure and force", 'hold_pressure = "100 bar"',
     'hold_pressure = "100 bar"\nhold_force = "20 kN"', "phases[2].hold_force", "not both"),
    ("motor cannot extend", 'motion = "run"', 'motion = "extend"', "phases[3].motion",
     "a motor cannot extend"),
    ("phase stroke beyond cylinder", 'stroke = "300 mm"\ncompress', 'stroke = "450 mm"\ncompress',
     "phases[0].stroke", "longer than the stroke"),
    ("missing required key", 'displacement = "80 cm^3/rev"\n', "", "actuators[1].displacement",
     "missing required key"),
    ("wrong type", "compress = true", 'compress = "yes"', "phases[0].compress",
     "expected true or false"),
    ("hold has no speed", 'hold_pressure = "100 bar"', 'hold_pressure = "100 bar"\nspeed = "1 m/s"',
     "phases[2].speed", "no speed"),
    ("unknown actuator kind", 'kind = "motor"', 'kind = "pump"', "actuators[1].kind",
     "cylinder, motor"),
]


@pytest.mark.parametrize("old,new,field,fragment", [b[1:] for b in BAD],
                         ids=[b[0] for b in BAD])
def test_bad_phase_or_actuator_input(tmp_path, old, new, field, fragment):
    text = _edit(old, new)
    err = _load_error(tmp_path, text)
    assert err.field == field
    assert f" {field}: " in str(err)
    assert fragment in str(err)
    # the line named is the line of the offending key, or of its table
    key = field.rsplit(".", 1)[1]
    lines = text.splitlines()
    assert err.line is not None
    named = lines[err.line - 1]
    assert named.startswith(key) or named.startswith("[[")


def test_unknown_key_suggests_the_nearest(tmp_path):
    text = _edit('speed = "full"', 'sped = "full"')
    err = _load_error(tmp_path, text)
    assert str(err).endswith("phases[1].sped: unknown key; did you mean 'speed'?")
    assert text.splitlines()[err.line - 1].startswith("sped")


APPENDED = [
    ("unknown section", '[fluids]\nnu40 = "46 mm^2/s"\n', "fluids", "did you mean 'fluid'?"),
    ("temperature below 0 K", '[ambient]\ntemperature = "-300 degC"\n', "ambient.temperature",
     "absolute zero"),
    ("absurd relief", '[power_unit.relief]\ncracking_pressure = "3000 bar"\n',
     "power_unit.relief.cracking_pressure", "2000 bar"),
    ("unknown strategy", '[[strategies]]\nkind = "meter-on"\n', "strategies[0].kind",
     "meter-in, meter-out, bleed-off"),
    ("duplicate strategy", '[[strategies]]\nkind = "meter-in"\n[[strategies]]\nkind = "meter-in"\n',
     "strategies[1].label", "two strategies are called 'meter-in'"),
    ("present strategy not compared", '[economics]\npresent_strategy = "bleed-off"\n'
     '[[strategies]]\nkind = "meter-in"\n', "economics.present_strategy", "not among"),
    ("hours above a year", "[economics]\nhours_per_year = 9000\n", "economics.hours_per_year",
     "implausibly high"),
    ("nu100 above nu40", '[fluid]\nnu40 = "46 mm^2/s"\nnu100 = "50 mm^2/s"\n', "fluid.nu100",
     "must be below nu40"),
    ("nu40 outside its grade", '[fluid]\niso_grade = 46\nnu40 = "52 mm^2/s"\nnu100 = "7 mm^2/s"\n',
     "fluid.nu40", "ISO 3448"),
    ("not an ISO grade", '[fluid]\niso_grade = 47\nnu40 = "47 mm^2/s"\nnu100 = "7 mm^2/s"\n',
     "fluid.iso_grade", "not one of"),
    ("oil level above one", "[reservoir]\noil_level = 1.5\n", "reservoir.oil_level", "(0, 1]"),
    ("uncertain index out of range", '[[uncertainty]]\npath = "phases[9].load"\n',
     "uncertainty[0].path", "out of range"),
    ("uncertain key misspelt", '[[uncertainty]]\npath = "ambient.temprature"\n',
     "uncertainty[0].path", "did you mean ambient.temperature"),
    ("uncertain field without value", '[[uncertainty]]\npath = "reservoir.heat_transfer_coefficient"\n',
     "uncertainty[0].relative", "no value to scale"),
    ("uncertain low above high", '[[uncertainty]]\npath = "phases[*].load"\nlow = 1.2\nhigh = 0.8\n',
     "uncertainty[0].high", "low must be below high"),
    ("absolute bound of wrong kind", '[[uncertainty]]\npath = "ambient.temperature"\n'
     'relative = false\nlow = "20 bar"\nhigh = "30 degC"\n', "uncertainty[0].low",
     "expected a temperature"),
    ("surface without area", '[[reservoir.surfaces]]\nname = "pipe"\n',
     "reservoir.surfaces[0].area", "missing required key"),
    ("empty strategy list", "strategies = []\n", "strategies", "at least one"),
]


@pytest.mark.parametrize("extra,field,fragment", [b[1:] for b in APPENDED],
                         ids=[b[0] for b in APPENDED])
def test_bad_section_input(tmp_path, extra, field, fragment):
    # top-level keys must come before the first table, section tables anywhere
    text = extra + "\n" + MINIMAL if not extra.startswith("[") else MINIMAL + "\n" + extra
    err = _load_error(tmp_path, text)
    assert err.field == field
    assert f" {field}: " in str(err)
    assert fragment in str(err)
    assert err.line is not None


def test_missing_scenario_section(tmp_path):
    text = MINIMAL.replace('[scenario]\nname = "test rig"\n', "")
    err = _load_error(tmp_path, text)
    assert err.field == "scenario" and "missing required section [scenario]" in str(err)


def test_missing_scenario_name(tmp_path):
    text = MINIMAL.replace('name = "test rig"\n', 'description = "x"\n')
    err = _load_error(tmp_path, text)
    assert err.field == "scenario.name"
    assert err.line == 1                               # the [scenario] header


def test_empty_phase_list(tmp_path):
    head = MINIMAL.split("[[phases]]")[0]
    text = "phases = []\n" + head
    err = _load_error(tmp_path, text)
    assert err.field == "phases" and "at least one phase" in str(err)
    assert err.line == 1


def test_idle_phase_takes_no_actuator(tmp_path):
    text = MINIMAL + '\n[[phases]]\nname = "wait"\nmotion = "idle"\nactuator = "cyl"\nduration = "3 s"\n'
    err = _load_error(tmp_path, text)
    assert err.field == "phases[4].actuator"


def test_toml_syntax_error_names_file_and_line(tmp_path):
    lines = MINIMAL.splitlines()
    lines[10] = "stroke = = 3"
    err = _load_error(tmp_path, "\n".join(lines) + "\n")
    assert err.line == 11
    assert str(err).startswith(f"{tmp_path / 'bad.toml'}:11: TOML syntax error")


def test_non_utf8_bytes_name_file_and_line(tmp_path):
    path = tmp_path / "latin1.toml"
    path.write_bytes(b'[scenario]\nname = "test"\ndescription = "Pr\xe4sse"\n')
    with pytest.raises(HeatloadError) as info:
        io.load_scenario(path)
    assert info.value.line == 3
    assert str(info.value).startswith(f"{path}:3: ")
    assert "UTF-8" in str(info.value)


def test_missing_file(tmp_path):
    with pytest.raises(HeatloadError) as info:
        io.load_scenario(tmp_path / "none.toml")
    assert str(info.value).startswith(str(tmp_path / "none.toml"))


def test_loads_names_the_source():
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(_edit('bore = "63 mm"', 'bore = "63 kg"'), source="memo")
    assert str(info.value).startswith("memo:7: actuators[0].bore: ")


def test_scenario_from_dict_without_text():
    import tomllib

    data = tomllib.loads(_edit('rod = "36 mm"', 'rod = "80 mm"'))
    with pytest.raises(HeatloadError) as info:
        io.scenario_from_dict(data, source="api")
    assert info.value.field == "actuators[0].rod"
    assert str(info.value).startswith("api: actuators[0].rod: ")


# ---------------------------------------------------------------------------
# Saving
# ---------------------------------------------------------------------------

def test_save_is_atomic_and_refuses_to_overwrite(tmp_path):
    s = io.load_scenario(io.default_scenario_path())
    target = tmp_path / "press.toml"
    assert io.save_scenario(s, target) == target
    assert io.load_scenario(target) == s
    before = target.read_bytes()
    other = dataclasses.replace(s, name="another press")
    with pytest.raises(HeatloadError) as info:
        io.save_scenario(other, target)
    assert str(info.value).startswith(str(target))
    assert target.read_bytes() == before               # untouched
    io.save_scenario(other, target, force=True)
    assert io.load_scenario(target).name == "another press"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["press.toml"]  # no temp files left


def test_save_refuses_an_invalid_scenario(tmp_path):
    s = io.loads_scenario(MINIMAL)
    broken = dataclasses.replace(
        s, actuators=(dataclasses.replace(s.actuators[0], rod=0.08),) + s.actuators[1:])
    target = tmp_path / "broken.toml"
    with pytest.raises(HeatloadError) as info:
        io.save_scenario(broken, target)
    assert info.value.field == "actuators[0].rod"
    assert not target.exists()
    assert list(tmp_path.iterdir()) == []


def test_text_with_quotes_and_newlines_round_trips():
    s = io.loads_scenario(MINIMAL)
    s = dataclasses.replace(s, name='Press "A"\\B', description="line one\nline two\ttab é")
    assert io.loads_scenario(io.dumps_scenario(s)) == s


# ---------------------------------------------------------------------------
# Limits where no machine exists: the value at the limit loads, just beyond it
# is refused with the field and the line (the reasons: README, "Limits")
# ---------------------------------------------------------------------------

def test_area_ratio_limit_by_geometry(tmp_path):
    # phi = D^2 / (D^2 - d^2) (geometry): d/D = sqrt(1 - 1/phi); phi = 10 at d/D = 0.9487
    d_at = 63.0 * math.sqrt(1 - 1 / schema.MAX_AREA_RATIO)
    ok = io.loads_scenario(_edit('rod = "36 mm"', f'rod = "{d_at * 0.9999:.4f} mm"'))
    cyl = ok.actuators[0]
    assert cyl.bore ** 2 / (cyl.bore ** 2 - cyl.rod ** 2) < schema.MAX_AREA_RATIO
    err = _load_error(tmp_path, _edit('rod = "36 mm"', f'rod = "{d_at * 1.0001:.4f} mm"'))
    assert err.field == "actuators[0].rod" and "area ratio 10.0" in str(err)
    # the largest ISO 7181 area ratio, 5 (d/D = 0.894, from memory), loads
    io.loads_scenario(_edit('rod = "36 mm"', f'rod = "{63 * math.sqrt(0.8):.3f} mm"'))


def test_phase_duration_limit_from_stroke_and_speed(tmp_path):
    # t = stroke / speed: 300 mm at 0.3 mm/min is 1000 min (loads); at 0.2 mm/min it is
    # 1500 min = 25 h > 24 h (refused at the speed's line)
    io.loads_scenario(_edit('speed = "0.1 m/s"', 'speed = "0.3 mm/min"'))
    text = _edit('speed = "0.1 m/s"', 'speed = "0.2 mm/min"')
    err = _load_error(tmp_path, text)
    assert err.field == "phases[0].speed" and "1.04 days" in str(err)
    assert text.splitlines()[err.line - 1].startswith("speed")


def test_ambient_range(tmp_path):
    # -60 degC and +70 degC load (the range's ends); a tenth of a kelvin beyond does not
    io.loads_scenario(MINIMAL + '\n[ambient]\ntemperature = "-60 degC"\n'
                      'cold_start_temperature = "-60 degC"\ntemperature_max = "70 degC"\n'
                      '[fluid]\ntemperature_max = "100 degC"\n')
    for key, value in (("temperature", "-60.1 degC"), ("temperature_max", "70.1 degC"),
                       ("cold_start_temperature", "-60.1 degC")):
        err = _load_error(tmp_path, MINIMAL + f'\n[ambient]\n{key} = "{value}"\n')
        assert err.field == f"ambient.{key}" and "-60 °C .. +70 °C" in str(err)


def test_tank_limits(tmp_path):
    # 0.1 L of oil loads, 0.09 L does not; the oil must fit the tank's L x W x H
    io.loads_scenario(MINIMAL + '\n[reservoir]\noil_volume = "0.1 L"\n')
    err = _load_error(tmp_path, MINIMAL + '\n[reservoir]\noil_volume = "0.09 L"\n')
    assert err.field == "reservoir.oil_volume" and "0.1 L" in str(err)
    # 1.0 x 0.6 x 0.5 m = 300 L exactly (the model's default tank) holds 300 L of oil
    io.loads_scenario(MINIMAL + '\n[reservoir]\noil_volume = "300 L"\n')
    err = _load_error(tmp_path, MINIMAL + '\n[reservoir]\noil_volume = "301 L"\n')
    assert err.field == "reservoir.oil_volume" and "tank of 300 L" in str(err)


def test_design_point_colder_than_its_coolant(tmp_path):
    # an air cooler's design oil temperature must lie above the hottest air, a water
    # cooler's above the water inlet (ETD > 0, second law); at equality it cannot cool
    amb = '\n[ambient]\ntemperature_max = "40 degC"\n'
    io.loads_scenario(MINIMAL + amb + '[cooler]\noil_temperature_max = "40.1 degC"\n')
    err = _load_error(tmp_path, MINIMAL + amb + '[cooler]\noil_temperature_max = "40 degC"\n')
    assert err.field == "cooler.oil_temperature_max" and "no air cooler" in str(err)
    # a water cooler may hold the oil below the air, with colder water
    io.loads_scenario(MINIMAL + amb + '[cooler]\noil_temperature_max = "35 degC"\n'
                      'coolant = "water"\nwater_inlet_temperature = "20 degC"\n')
    err = _load_error(tmp_path, MINIMAL + amb + '[cooler]\noil_temperature_max = "35 degC"\n'
                      'coolant = "water"\nwater_inlet_temperature = "35 degC"\n')
    assert err.field == "cooler.water_inlet_temperature" and "cannot cool" in str(err)


def test_limits_documented_with_their_reasons():
    # every load-time limit is named in the README's file-format section and the schema
    from pathlib import Path
    readme = (Path(__file__).parents[2] / "README.md").read_text(encoding="utf-8")
    section = readme.split("### Limits", 1)[1].split("\n## ", 1)[0]
    for fragment in ("-60 °C", "+70 °C", "0.1 L", "10 mm", "area ratio", "24 h",
                     "ETD", "water", "motor-overload", "160 %", "hottest day"):
        assert fragment in section, fragment
    for fragment in ("-60 .. +70 degC", "at least 0.1 L", "area ratio", "24 h"):
        assert fragment in io.SCHEMA_EXAMPLE, fragment


def _readme_block(heading):
    """The first ```toml block after *heading* in the README."""
    from pathlib import Path
    readme = (Path(__file__).parents[2] / "README.md").read_text(encoding="utf-8")
    after = readme.split(heading, 1)[1]
    return after.split("```toml\n", 1)[1].split("```", 1)[0]


def test_readme_hi_lo_and_accumulator_example_loads():
    text = MINIMAL + "\n" + _readme_block("### Hi-lo and accumulator circuits")
    s = io.loads_scenario(text, source="README")
    hilo, acc = s.strategy("hi-lo").parameters, s.strategy("accumulator").parameters
    assert hilo.high_pressure_fraction == 0.2
    assert hilo.unloading_pressure == pytest.approx(50e5, rel=1e-15)     # 1 bar = 1e5 Pa
    assert acc.accumulator_gas_volume == pytest.approx(0.020, rel=1e-15)  # 1 L = 1e-3 m^3
    assert acc.accumulator_precharge == pytest.approx(110e5, rel=1e-15)
    # saved and loaded again: the same settings
    assert io.loads_scenario(io.dumps_scenario(s)).strategies == s.strategies


@pytest.mark.parametrize("lines, field", [
    ('high_pressure_fraction = 1.0', "high_pressure_fraction"),
    ('accumulator_pressure_min = "180 bar"\naccumulator_pressure_max = "170 bar"',
     "accumulator_pressure_min"),
    ('accumulator_pressure_min = "100 bar"\naccumulator_precharge = "120 bar"',
     "accumulator_precharge"),
])
def test_hi_lo_and_accumulator_settings_refused(lines, field):
    text = MINIMAL + '\n[[strategies]]\nkind = "accumulator"\n' + lines + "\n"
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(text, source="bad.toml")
    assert field in str(info.value) and "bad.toml" in str(info.value)


@pytest.mark.parametrize("kind, line, field", [
    ("pressure-compensated", 'compensator_setting = "200 bar"', "compensator_setting"),
    ("load-sensing", 'compensator_setting = "180 bar"', "compensator_setting"),
    ("hi-lo", 'unloading_pressure = "500 bar"', "unloading_pressure"),
    ("accumulator", 'accumulator_pressure_max = "250 bar"', "accumulator_pressure_max"),
])
def test_a_setting_at_or_above_the_relief_is_refused(kind, line, field):
    # the relief (180 bar here) would open first: the compensator would never
    # destroke, the unloading valve never unload (common practice: 10-20 bar below)
    text = io.default_scenario_path().read_text(encoding="utf-8")
    assert 'cracking_pressure = "180 bar"' in text
    text += f"\n[[strategies]]\nlabel = \"trial\"\nkind = \"{kind}\"\n{line}\n"
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(text, source="bad.toml")
    msg = str(info.value)
    assert field in msg and "bad.toml" in msg and "relief" in msg and "bar" in msg
    # 10 bar below it loads
    ok = re.sub(r'"\d+ bar"', '"170 bar"', line)
    io.loads_scenario(text.replace(line, ok), source="ok.toml")


def test_regeneration_is_read_written_and_refused_where_it_cannot_be():
    text = MINIMAL.replace('motion = "extend"', 'motion = "extend"\nregeneration = true', 1)
    s = io.loads_scenario(text)
    assert [p.regeneration for p in s.phases][:2] == [True, False]
    again = io.dumps_scenario(s)
    assert again.count("regeneration") == 1           # written only where it is set
    assert io.loads_scenario(again) == s
    bad = MINIMAL.replace('motion = "retract"', 'motion = "retract"\nregeneration = true', 1)
    assert bad != MINIMAL
    with pytest.raises(HeatloadError, match="only an extending cylinder can regenerate") as e:
        io.loads_scenario(bad, source="bad.toml")
    assert "regeneration" in str(e.value)


def test_readme_regeneration_example_loads():
    text = MINIMAL + "\n" + _readme_block("### Regeneration")
    s = io.loads_scenario(text, source="README")
    assert s.phases[-1].regeneration and s.phases[-1].speed is None


def test_shift_pattern_gives_hours_per_year_and_the_daily_warm_up():
    text = MINIMAL + ('\n[economics]\nhours_per_shift = 8\nshifts_per_day = 2\n'
                      'days_per_week = 5\n')
    s = io.loads_scenario(text)
    # 8 h x 2 shifts x 5 days x 50 weeks (the default) = 4000 h; a 16 h day from cold
    assert s.economics.hours_per_year == pytest.approx(8 * 2 * 5 * 50, rel=1e-15)
    assert s.shift_duration == pytest.approx(16 * 3600, rel=1e-15)
    again = io.dumps_scenario(s)
    assert "hours_per_year" not in again and "shift_duration" not in again
    assert io.loads_scenario(again) == s
    s48 = io.loads_scenario(text + "weeks_per_year = 48\n")
    assert s48.economics.hours_per_year == pytest.approx(8 * 2 * 5 * 48, rel=1e-15)
    # the older key alone keeps working
    old = io.loads_scenario(MINIMAL + "\n[economics]\nhours_per_year = 3000\n")
    assert old.economics.hours_per_year == 3000 and old.shift_duration == 8 * 3600


@pytest.mark.parametrize("extra, field", [
    ("hours_per_shift = 8\nshifts_per_day = 2\n", "economics.days_per_week"),
    ("hours_per_shift = 8\nshifts_per_day = 2\ndays_per_week = 5\nhours_per_year = 4000\n",
     "economics.hours_per_year"),
    ("hours_per_shift = 10\nshifts_per_day = 3\ndays_per_week = 5\n",
     "economics.shifts_per_day"),
    ("days_per_week = 8\n", "economics.days_per_week"),
])
def test_shift_pattern_refused(extra, field):
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(MINIMAL + "\n[economics]\n" + extra, source="bad.toml")
    assert field in str(info.value)


def test_shift_pattern_and_shift_duration_are_not_both_given():
    text = MINIMAL.replace('name = "test rig"', 'name = "test rig"\nshift_duration = "8 h"')
    text += "\n[economics]\nhours_per_shift = 8\nshifts_per_day = 1\ndays_per_week = 5\n"
    with pytest.raises(HeatloadError, match="shift_duration"):
        io.loads_scenario(text)


def test_repeats_read_written_and_refused():
    text = MINIMAL + '\n[[repeats]]\nfirst = "out"\nlast = "back"\ncount = 3\n'
    s = io.loads_scenario(text)
    assert s.repeats == (model.Repeat("out", "back", 3),)
    assert s.phase_repeats() == (3, 3, 1, 1)
    assert len(s.phases) == 4                         # written once, not copied
    assert io.loads_scenario(io.dumps_scenario(s)) == s
    # one phase alone: last defaults to first
    s1 = io.loads_scenario(MINIMAL + '\n[[repeats]]\nfirst = "spin"\ncount = 2\n')
    assert s1.phase_repeats() == (1, 1, 1, 2)


@pytest.mark.parametrize("block, fragment", [
    ('first = "outt"\ncount = 2', "no phase called 'outt'"),
    ('first = "back"\nlast = "out"\ncount = 2', "comes before"),
    ('first = "out"\ncount = 2.5', "whole number"),
    ('first = "out"\ncount = 0', "count"),
    ('first = "out"\nlast = "back"\ncount = 2\n\n[[repeats]]\nfirst = "back"\ncount = 2',
     "may not overlap"),
])
def test_bad_repeats_refused(block, fragment):
    with pytest.raises(HeatloadError, match=fragment):
        io.loads_scenario(MINIMAL + "\n[[repeats]]\n" + block + "\n", source="bad.toml")


def test_readme_repeats_and_shift_example_loads():
    phases = MINIMAL.replace('name = "out"', 'name = "charge"').replace(
        'name = "back"', 'name = "charge back"')
    s = io.loads_scenario(phases + "\n" + _readme_block("### Repeated blocks and shift"),
                          source="README")
    assert s.phase_repeats() == (2, 2, 1, 1)
    assert s.economics.hours_per_year == pytest.approx(3840, rel=1e-15)   # 8 x 2 x 5 x 48
    assert s.shift_duration == pytest.approx(16 * 3600, rel=1e-15)


def test_readme_actuator_valves_example_loads():
    s = io.loads_scenario(MINIMAL + "\n" + _readme_block("### Valves per actuator"),
                          source="README")
    lift = s.actuator("lift")
    assert lift.counterbalance_setting == pytest.approx(110e5, rel=1e-15)
    assert lift.counterbalance_pilot_ratio == 4.0
    assert lift.back_pressure == pytest.approx(4e5, rel=1e-15)
    assert s.phases[-1].unloading == "pilot-check"
    assert io.loads_scenario(io.dumps_scenario(s)) == s


def test_an_efficiency_below_any_working_machine_is_refused():
    # pumps 0.8-0.95 at their rated point (common practice, from memory): 0.009 is a
    # slipped percentage, and 1e-300 would make every power infinite
    for value in ("0.009", "1e-300"):
        text = MINIMAL + f"\n[power_unit.pump]\nhydromechanical_efficiency = {value}\n"
        with pytest.raises(HeatloadError, match="below 0.3") as info:
            io.loads_scenario(text, source="bad.toml")
        assert "power_unit.pump.hydromechanical_efficiency" in str(info.value)
    text = MINIMAL + "\n[power_unit.pump]\nhydromechanical_efficiency = 0.3\n"
    assert io.loads_scenario(text).power_unit.pump.hydromechanical_efficiency == 0.3


def test_fluid_name_follows_the_grade_when_none_is_given():
    # ISO 3448: a VG 68 oil given by its grade alone is named VG 68, not the default VG 46
    text = io.default_scenario_path().read_text(encoding="utf-8")
    import re
    body = re.sub(r"(?ms)^\[fluid\].*?(?=^\[)", '[fluid]\niso_grade = 68\n\n', text)
    sc = io.loads_scenario(body)
    assert sc.fluid.iso_grade == 68 and sc.fluid.name == "ISO VG 68 mineral oil"
    assert io.loads_scenario(io.dumps_scenario(sc)) == sc


def test_allowed_range_is_the_loaders_own_check():
    """``schema.allowed_range`` states the loader's ``_check`` as an interval: for
    every numeric key of every table a value just inside each finite bound loads and
    one just outside is refused (a second copy of the rules would drift)."""
    import math

    from heatload.io import schema
    from heatload.units import KINDS

    tables = [v for k, v in vars(schema).items() if k.startswith("_") and isinstance(v, dict)
              and v and all(isinstance(f, schema._F) for f in v.values())]
    checked = 0
    for table in tables:
        for key, spec in table.items():
            if spec.kind not in KINDS:
                continue
            lo, lo_open, hi, hi_open = schema.allowed_range(spec)
            assert lo < hi, key
            for bound, is_open, step in ((lo, lo_open, 1.0), (hi, hi_open, -1.0)):
                if not math.isfinite(bound):
                    continue
                d = 1e-6 * max(abs(bound), 1.0)
                inside = bound if not is_open else bound + step * d
                schema._check(inside, inside, spec, spec.kind, key, "t.toml")
                with pytest.raises(HeatloadError):
                    schema._check(bound - step * d, bound - step * d, spec, spec.kind, key,
                                  "t.toml")
                checked += 1
    assert checked > 100


def _press_set(key, value):
    text = io.default_scenario_path().read_text(encoding="utf-8")
    text, n = re.subn(rf'(?m)^{key} = "[^"]*"', f'{key} = "{value}"', text, count=1)
    assert n == 1, key
    return text


def test_thermostat_above_the_fluids_limit_is_refused_and_at_it_loads():
    # a cooler's thermostat switches it on below the oil's limit (mineral oil: the
    # fan comes on at about 45-55 degC, the oil stays below about 80 degC; common
    # practice, from memory): one that waits until past the limit lets the oil pass it
    with pytest.raises(HeatloadError, match=r"cooler\.thermostat_on: 81 °C is above .*80 °C"):
        io.loads_scenario(_press_set("thermostat_on", "81 degC"))
    sc = io.loads_scenario(_press_set("thermostat_on", "80 degC"))   # the limit itself
    assert sc.cooler.thermostat_on == pytest.approx(353.15)


def test_pump_rated_viscosity_inside_its_own_window():
    # a datasheet's efficiencies are measured at a viscosity the pump runs at
    # (commonly 30-36 mm^2/s, inside a window of about 10 .. 1000 mm^2/s; common
    # practice, from memory)
    for nu, ok in (("9.9 mm^2/s", False), ("10 mm^2/s", True), ("1000 mm^2/s", True),
                   ("1001 mm^2/s", False)):
        text = _press_set("rated_viscosity", nu)
        if ok:
            io.loads_scenario(text)
        else:
            with pytest.raises(HeatloadError, match="power_unit.pump.rated_viscosity"):
                io.loads_scenario(text)


def test_a_site_high_above_sea_level_loads():
    # mines and cities stand at 1,600-4,500 m (from memory); the site's own bounds (-500..9000 m)
    # rule there, not the magnitude limit of a machine's lengths (1000 m)
    text = io.default_scenario_path().read_text(encoding="utf-8")
    assert 'altitude = "200 m"' in text
    assert io.loads_scenario(text.replace('altitude = "200 m"', 'altitude = "4500 m"')
                             ).ambient.altitude == pytest.approx(4500.0)
    with pytest.raises(HeatloadError, match="altitude"):
        io.loads_scenario(text.replace('altitude = "200 m"', 'altitude = "9500 m"'))
    # a length of the machine keeps its magnitude limit
    lo, _, hi, _ = schema.allowed_range(schema._F("distance", "pos"))
    assert hi == 1000.0


@pytest.mark.parametrize("brk", ["\n", "\r", "\u2028", "\x85"])
def test_a_line_break_in_a_name_is_refused(brk):
    # a name printed in a table or a warning would start a line of its own there
    # (a forged line); a description may run over several lines
    d = io.scenario_to_dict(io.load_scenario(io.default_scenario_path()))
    d["phases"][0]["name"] = f"split{brk}Build meter-in: no cooler is needed"
    with pytest.raises(HeatloadError, match=r"phases\[0\]\.name.*line break"):
        io.scenario_from_dict(d, "forged.toml")
    d["phases"][0]["name"] = "split"
    d["scenario"]["description"] = "line one\nline two"
    assert io.scenario_from_dict(d).description == "line one\nline two"


def test_a_cycle_that_moves_a_cylinder_past_its_stroke_is_refused():
    # the press's main cylinder has a 400 mm stroke and its cycle extends
    # 250 + 20 + 60 + 10 = 340 mm: a 320 mm approach would take it to 410 mm
    d = io.scenario_to_dict(io.load_scenario(io.default_scenario_path()))
    assert d["phases"][0]["name"] == "fast approach"
    d["phases"][0]["stroke"] = "320 mm"
    with pytest.raises(HeatloadError, match=r"phases\[3\]\.stroke.*410 mm.*400 mm stroke"):
        io.scenario_from_dict(d, "long.toml")
    d["phases"][0]["stroke"] = "310 mm"            # 400 mm: to the end and no further
    io.scenario_from_dict(d, "ok.toml")
    # a repeated block that only extends: three passes of the ejector's 100 mm on
    # its 120 mm stroke
    d = io.scenario_to_dict(io.load_scenario(io.default_scenario_path()))
    d["repeats"] = [{"first": "eject", "last": "eject", "count": 3}]
    with pytest.raises(HeatloadError, match=r"'ejector' over 200 mm"):
        io.scenario_from_dict(d, "rep.toml")
    # the block of extend and return repeats within the stroke
    d["repeats"] = [{"first": "eject", "last": "ejector return", "count": 3}]
    io.scenario_from_dict(d, "ok.toml")


def test_an_unknown_nested_table_is_located_at_its_header():
    # [scenario.a.b.c] makes the unknown key scenario.a: the error names its line,
    # not the line of [scenario]
    text = io.default_scenario_path().read_text(encoding="utf-8")
    n = text.count("\n") + 2
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(text + "\n[scenario.a.b.c]\nx = 1\n", source="deep.toml")
    assert "scenario.a" in str(info.value) and info.value.line == n


def test_a_pump_delivering_beyond_any_machine_is_refused():
    # 10 L/rev at 1750 rpm is 17,500 L/min: beyond the 6000 L/min every given flow
    # is held to (a slipped unit); the default's 30 cm3/rev at 1450 rpm loads
    d = io.scenario_to_dict(io.load_scenario(io.default_scenario_path()))
    d["power_unit"]["pump"]["displacement"] = "10000 cm^3/rev"
    d["power_unit"]["pump"]["shaft_speed"] = "1750 rpm"
    with pytest.raises(HeatloadError, match=r"displacement.*17,500 L/min.*6000 L/min"):
        io.scenario_from_dict(d, "big.toml")


def test_a_polytropic_exponent_below_isothermal_is_refused():
    # nitrogen in an accumulator runs between isothermal (n = 1) and adiabatic
    # (n = 1.4; common practice): n = 1/64 gave a mean pressure of NaN (fuzz)
    text = MINIMAL + '\n[[strategies]]\nkind = "accumulator"\npolytropic_exponent = 0.015625\n'
    with pytest.raises(HeatloadError, match="polytropic_exponent.*isothermal"):
        io.loads_scenario(text, source="gas.toml")
    io.loads_scenario(text.replace("0.015625", "1.0"), source="gas.toml")
