"""One field-path grammar: what the loader accepts in ``[[uncertainty]]`` is what
sweeps and the Monte Carlo can vary, and what they refuse the loader refuses."""

import dataclasses

import numpy as np
import pytest

from heatload import io, model as m, paths
from heatload.studies import uncertainty, variants
from heatload.errors import HeatloadError

EXAMPLES = io.example_paths()
PRESS = io.load_scenario(io.default_scenario_path())


def _with_uncertainty(text_path, path, relative=True):
    text = open(text_path, encoding="utf-8").read()
    # the examples' own [[uncertainty]] items stay; one more is appended
    bounds = 'low = 0.9\nhigh = 1.1\n' if relative else 'low = 1\nhigh = 2\nrelative = false\n'
    return text + f'\n[[uncertainty]]\npath = "{path}"\n{bounds}'


@pytest.mark.parametrize("path", ["reservoir.length", "fluid.nu40",
                                  "power_unit.pump.rated_viscosity", "scenario.shift_duration",
                                  "cooler.water_inlet_temperature", "pump.colour"])
def test_paths_nothing_can_vary_are_refused_at_load(path):
    text = _with_uncertainty(io.default_scenario_path(), path)
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(text)
    err = info.value
    assert err.field.endswith(".path") and err.field.startswith("uncertainty[")
    assert "\n" not in str(err) and f"cannot vary '{path}'" in str(err)


@pytest.mark.parametrize("example", EXAMPLES, ids=lambda p: p.stem)
def test_every_path_the_loader_accepts_can_be_varied(example):
    sc = io.load_scenario(example)
    valid = paths.valid_paths(sc)
    assert valid
    for p in valid:
        ref = paths.resolve_path(sc, p)
        nominal = [v for v in ref.nominal if v is not None]
        relative = bool(nominal) and all(v != 0 for v in nominal)
        if not relative and ref.kind is None:
            continue          # mixed kinds: the loader asks for relative bounds
        # the loader accepts it ...
        text = open(example, encoding="utf-8").read()
        if relative:
            # a sliver below the nominal (above it where the nominal sits on the field's
            # lower bound): the bounds must give a machine the file could hold (a stroke
            # 5 % short may no longer hold a simultaneous motion's travel)
            low = paths.allowed_range(sc, ref)[0]
            at_low = np.any(np.isclose(np.asarray(ref.nominal, float), low, rtol=1e-12))
            lo, hi = ("1.0", "1.0000000001") if at_low else ("0.9999999999", "1.0")
            text += f'\n[[uncertainty]]\npath = "{p}"\nlow = {lo}\nhigh = {hi}\n'
            loaded = io.loads_scenario(text)
        else:
            loaded = None
        # ... and a variant of it evaluates (values: the nominal, or a positive value)
        value = nominal[0] if nominal else 1.0
        r = variants.evaluate_variants(sc, sc.strategies[0].name, {p: np.array([value])},
                                       thermal=False)
        assert np.isfinite(r.electric_energy_per_cycle[0]), p
        if loaded is not None:
            assert loaded.uncertainty[-1].path == p


@pytest.mark.parametrize("example", EXAMPLES, ids=lambda p: p.stem)
def test_monte_carlo_runs_on_every_example(example):
    sc = io.load_scenario(example)
    r = uncertainty.monte_carlo(sc, sc.strategies[0].name, samples=8, seed=3)
    assert np.all(np.isfinite(r.cooler_duty))


def test_replaced_scenario_and_get_agree():
    sc = paths.replaced_scenario(PRESS, {"actuators.main.bore": 0.11, "phases[3].load": 1e5})
    assert paths.resolve_path(sc, "actuators.main.bore").nominal == (0.11,)
    assert paths.resolve_path(sc, "phases[3].load").nominal == (1e5,)
    # one value per target of a path; None leaves that target as it is
    ref = paths.resolve_path(PRESS, "phases[*].load")
    given = [None] + [1e3 * (k + 1) for k in range(1, len(ref.targets))]
    got = paths.resolve_path(paths.replaced_scenario(PRESS, {ref.path: given}), ref.path)
    assert got.nominal == (ref.nominal[0],) + tuple(given[1:])


def test_a_path_varies_a_field_with_the_files_own_rule():
    # a zero-length pressure line and an ideal directional valve (0 bar) load from a
    # file, so a sweep may reach them too; a negative length is refused by both
    ref = paths.resolve_path(PRESS, "power_unit.pressure_line.length")
    assert (ref.kind, ref.check) == ("distance", "nonneg")
    ov = paths.Overrides(PRESS, overrides={"power_unit.pressure_line.length": [0.0, 2.0],
                                           "power_unit.directional_valve.pressure_drop": [0.0, 4e5]})
    assert len(ov.by_path) == 2
    with pytest.raises(HeatloadError, match="pressure_line.length"):
        paths.Overrides(PRESS, overrides={"power_unit.pressure_line.length": [-1.0, 2.0]})


def test_every_phase_skips_idle_phases_for_what_they_do_not_have():
    # phases[*].load on a cycle with an idle phase: the idle phase moves nothing, so
    # only the moving and holding phases vary (a sweep corner must not load it)
    idle = [i for i, ph in enumerate(PRESS.phases) if ph.actuator is None]
    assert idle
    ref = paths.resolve_path(PRESS, "phases[*].load")
    assert not {t[1] for t in ref.targets} & set(idle)
    assert set(idle) <= {t[1] for t in paths.resolve_path(PRESS, "phases[*].duration").targets
                         } | {i for i, ph in enumerate(PRESS.phases) if ph.duration is None}


@pytest.mark.parametrize("path,words", [("phases[4].load", "hold_pressure"),
                                        ("phases[11].load", "idle phase")])
def test_a_field_that_does_nothing_in_its_phase_is_refused(path, words):
    """The press's dwell holds 150 bar by its hold_pressure and its part change
    is idle: varying either's load gave identical variants; refused, saying why,
    by the sweep and by the file's [[uncertainty]] alike."""
    sc = io.load_scenario(io.default_scenario_path())
    with pytest.raises(HeatloadError, match=words):
        paths.resolve_path(sc, path)
    assert path not in paths.valid_paths(sc)
    text = io.default_scenario_path().read_text() + (
        f'\n[[uncertainty]]\npath = "{path}"\nlow = "-10 %"\nhigh = "+10 %"\n')
    with pytest.raises(HeatloadError, match=words):
        io.loads_scenario(text)
    # phases[*] passes over them (the other phases' loads still vary)
    ref = paths.resolve_path(sc, "phases[*].load")
    assert ("phase", 4, "load") not in ref.targets and ("phase", 11, "load") not in ref.targets


# The cooler's design oil temperature may not pass the fluid's own upper limit
# (fluid.temperature_max): the oil maker's limit for the oil, which no cooler
# design changes.  Check values: mineral hydraulic oils are commonly kept below
# about 80 degC in the tank (the default limit; common practice, from memory), and
# 250 degC is near the flash point of an ISO VG 46 oil (about 220-240 degC, from
# memory): no oil runs there.
_HOT = 250.0 + 273.15


def _press_with(design, fluid_limit=None):
    """The press's text with its design oil temperature (and fluid limit) set."""
    import re
    text = io.default_scenario_path().read_text()
    text, n = re.subn(r'(?m)^oil_temperature_max = "[^"]*"', f'oil_temperature_max = "{design}"',
                      text)
    assert n == 1
    if fluid_limit is not None:
        text, n = re.subn(r'(?m)^temperature_max = "80 degC"',
                          f'temperature_max = "{fluid_limit}"', text)
        assert n == 1
    return text


def test_design_temperature_above_the_fluids_limit_is_refused_at_load():
    assert PRESS.fluid.temperature_max == pytest.approx(353.15)      # the file's 80 degC
    with pytest.raises(HeatloadError) as info:
        io.loads_scenario(_press_with("250 degC"), source="p.toml")
    msg = info.value.one_line()
    assert info.value.field == "cooler.oil_temperature_max"
    assert msg.startswith("p.toml:") and "\n" not in msg
    # names the limit, the field holding it, and the unit expected
    assert "80 °C" in msg and "fluid.temperature_max" in msg and "degC" in msg
    # a fluid whose maker allows 90 degC: 95 is refused, 90 (the limit itself) loads
    with pytest.raises(HeatloadError, match="90 °C"):
        io.loads_scenario(_press_with("95 degC", "90 degC"))
    sc = io.loads_scenario(_press_with("90 degC", "90 degC"))
    assert sc.cooler.oil_temperature_max == pytest.approx(363.15)


def test_design_temperature_above_the_fluids_limit_is_refused_by_every_path():
    limit = PRESS.fluid.temperature_max
    path = "cooler.oil_temperature_max"
    lo, lo_open, hi, hi_open = paths.allowed_range(PRESS, paths.resolve_path(PRESS, path))
    assert hi[0] == limit and not hi_open and lo[0] == 0.0 and lo_open
    # the overrides every evaluation reads
    paths.Overrides(PRESS, overrides={path: [limit - 20.0, limit]})
    with pytest.raises(HeatloadError, match="fluid.temperature_max") as info:
        paths.Overrides(PRESS, overrides={path: [limit - 20.0, _HOT]})
    assert info.value.field == path
    # a sweep's range
    from heatload.studies import sweep
    spec = sweep.parse_vary(f"{path}=50..250degC:3", PRESS)
    with pytest.raises(HeatloadError, match="upper temperature limit of the fluid"):
        sweep.check_corners(PRESS, [spec])
    # an [[uncertainty]] bound, absolute or relative
    for bounds in ('low = "60 degC"\nhigh = "250 degC"\nrelative = false\n',
                   'low = 0.99\nhigh = 1.1\n'):   # 56.5 .. 93 degC
        item = f'\n[[uncertainty]]\npath = "{path}"\n{bounds}'
        t = _press_with("60 degC") + item
        with pytest.raises(HeatloadError, match="upper temperature limit") as info:
            io.loads_scenario(t)
        assert info.value.field.startswith("uncertainty[") and info.value.field.endswith(".high")


# A hydraulic motor's set speed may not pass the maximum speed its maker gives
# (max_speed on the datasheet; common practice).  Check value: the conveyor's
# drum motor, 400 rpm.
WINCH = io.default_scenario_path().with_name("conveyor_winch.toml")


def test_a_set_speed_above_the_motors_max_speed_is_refused_by_every_path():
    text = WINCH.read_text()
    sc = io.loads_scenario(text)
    drum = sc.actuator("drum")
    assert drum.max_speed * 60 == pytest.approx(400.0)
    # the file: the phase's own motion, and a motion moving with another phase
    with pytest.raises(HeatloadError, match=r"phases\[3\]\.speed: 450 rpm is above .* 400 rpm"):
        io.loads_scenario(text.replace('speed = "300 rpm"', 'speed = "450 rpm"', 1))
    io.loads_scenario(text.replace('speed = "300 rpm"', 'speed = "400 rpm"', 1))   # at it
    auger = text.replace("# For a motor, load is a torque", '[[actuators]]\nname = "auger"\n'
                         'kind = "motor"\ndisplacement = "20 cm^3/rev"\nmax_speed = "100 rpm"\n\n'
                         "# For a motor, load is a torque", 1)
    together = auger.replace('speed = "250 rpm"\nduration = "90 s"\n',
                             'speed = "250 rpm"\nduration = "90 s"\n\n[[phases.simultaneous]]\n'
                             'actuator = "auger"\nmotion = "run"\nload = "20 N*m"\n'
                             'speed = "120 rpm"\n', 1)
    assert together.count("phases.simultaneous") == 1
    with pytest.raises(HeatloadError, match=r"simultaneous\[0\]\.speed: 120 rpm .* 'auger'"):
        io.loads_scenario(together)
    io.loads_scenario(together.replace('speed = "120 rpm"', 'speed = "90 rpm"'))
    # the overrides, a sweep's corners and an [[uncertainty]] bound
    path = "phases[*].speed"
    hi = paths.allowed_range(sc, paths.resolve_path(sc, path))[2]
    assert np.all(hi == drum.max_speed)
    with pytest.raises(HeatloadError, match="max_speed"):
        paths.Overrides(sc, overrides={"phases[3].speed": [410 / 60]})
    from heatload.studies import sweep
    spec = sweep.parse_vary("phases[3].speed=200..450rpm:3", sc)
    with pytest.raises(HeatloadError, match="max_speed"):
        sweep.check_corners(sc, [spec])
    with pytest.raises(HeatloadError, match=r"uncertainty\[\d\]\.high: .*max_speed"):
        io.loads_scenario(text + f'\n[[uncertainty]]\npath = "{path}"\nlow = 0.9\nhigh = 1.5\n')
    # the Monte Carlo's normal tail: the fastest phase (300 rpm) binds at 400 / 300
    wide = dataclasses.replace(sc, uncertainty=(
        m.UncertainInput(path, "normal", 0.9, 1.3),))
    r = uncertainty.monte_carlo(wide, "load-sensing", samples=2000, seed=4)
    assert np.all(300.0 * r.samples[path] <= 400.0 * (1 + 1e-12))
    assert r.truncated[path] > 0
