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
