"""Cooler types as a registry: the loader, the sizing and the spec sheet read
:data:`heatload.cooling.cooler_types.TYPES`."""

import dataclasses
import pathlib
import re

import pytest

from heatload import chain, io
from heatload.io import schema
from heatload.cooling import cooler_types, sizing
from heatload.errors import HeatloadError

ENGINE = pathlib.Path(cooler_types.__file__).parents[1]   # the heatload package


def test_loader_choices_are_the_registry():
    assert schema._COOLER["coolant"].choices == tuple(cooler_types.TYPES)


def test_no_coolant_name_dispatch_outside_the_registry():
    pattern = re.compile(r"""coolant\s*[!=]=\s*["'](air|water)["']""")
    for path in ENGINE.rglob("*.py"):
        assert not pattern.search(path.read_text(encoding="utf-8")), path.name


@pytest.mark.parametrize("name", list(cooler_types.TYPES))
def test_coolant_no_colder_than_the_oil_is_refused(name):
    # second law: a coolant entering at or above the oil's temperature takes no heat
    kind = cooler_types.TYPES[name]
    cd = io.load_scenario(io.default_scenario_path()).cooler
    t_oil = 330.0
    warm = dataclasses.replace(cd, water_inlet_temperature=t_oil)
    assert kind.refusal(t_oil, t_oil, warm, "the oil", "cooler.oil_temperature_max")
    cold = dataclasses.replace(cd, water_inlet_temperature=t_oil - 20.0)
    assert kind.refusal(t_oil, t_oil - 20.0, cold, "the oil", "x") is None


def test_unknown_coolant_is_one_line():
    with pytest.raises(HeatloadError, match="expected air or water"):
        cooler_types.cooler_type("oil")


def test_a_new_cooler_type_is_one_class(monkeypatch):
    # an air-oil cooler under another name: registered, it is sized and gets a
    # spec sheet whose specific cooling power is duty / ETD (common practice)
    class RoofAir(cooler_types.AirOil):
        name = "roof-air"
        label = "air-oil (roof)"

    monkeypatch.setitem(cooler_types.TYPES, "roof-air", RoofAir())
    sc = io.load_scenario(io.default_scenario_path())
    o = chain.compare(sc, [sc.strategies[0].name]).outcomes[0]
    sz = sizing.size_cooler(sc, o, coolant="roof-air", thermostat=False)
    assert sz.spec is not None and sz.spec.coolant == "roof-air"
    assert sz.spec.specific_cooling_power == pytest.approx(sz.spec.duty / sz.spec.etd,
                                                           rel=1e-12)
    assert dict(sizing.spec_rows(sz))["coolant"] == "air-oil (roof)"


@pytest.mark.parametrize("fraction, inlet_c, refused", [
    (0.1, -30.0, True), (0.1, -2.0, False), (0.5, -30.0, False), (0.5, -40.0, True)])
def test_glycol_water_below_its_freezing_point_is_refused(fraction, inlet_c, refused):
    # ethylene glycol-water freezes at -3.4 °C with 10 % glycol and at -36 °C with
    # 50 % (Melinder, IIR 2010, through CoolProp; ASHRAE tables give about -3.5
    # and -37 °C, from memory): colder inlet water is ice, refused by the field
    import dataclasses
    from heatload import io
    from heatload.cooling.cooler_types import cooler_type
    sc = io.load_scenario(io.default_scenario_path())
    cd = dataclasses.replace(sc.cooler, coolant="water", water_glycol_fraction=fraction,
                             water_inlet_temperature=273.15 + inlet_c)
    why = cooler_type("water").refusal(333.15, 311.15, cd, "the design oil temperature",
                                       "cooler.oil_temperature_max")
    assert (why is not None and "freezes" in why[0]
            and why[1] == "cooler.water_inlet_temperature") is refused
