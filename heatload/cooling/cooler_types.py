"""Cooler types: one class per coolant, registered by the file's ``coolant`` value.

Each class holds what is particular to its coolant: where its inlet
temperature comes from, when it cannot cool the oil at all (second law), its
sizing at the design point, its quotable spec sheet and the spec sheet's
rows, and the one-line summary the report's front page gives.  The loader's
choices, the cooler sizing (:mod:`heatload.cooling.sizing`), the report and the
``--coolant`` option read :data:`TYPES`.

Adding a cooler type is one class here (plus its test), using a sizing
function of :mod:`heatload.cooling.cooler`.

References
----------
Incropera et al., 6th ed., Sec. 11.4-11.5 (effectiveness-NTU); ETD rating of
air-oil coolers: common practice.
"""

from __future__ import annotations

from abc import ABC, abstractmethod

from heatload.cooling import cooler as _k
from heatload.errors import HeatloadError

K0 = 273.15


def _c(t):
    return f"{t - K0:.4g} °C"


class CoolerType(ABC):
    """A cooler of one coolant (the interface; see the module notes): a new type
    implements the abstract methods, the others have defaults."""

    name = ""      #: the file's ``coolant`` value
    label = ""     #: the kind of exchanger on the spec sheet
    medium = ""    #: the coolant as the spec sheet's rows name it
    has_fan = False  #: a fan draws electric power while the cooler works

    @abstractmethod
    def inlet_temperature(self, cooler_design, design_ambient) -> float:
        """Coolant inlet temperature at the design point [K]."""

    @abstractmethod
    def refusal(self, oil_temperature, design_ambient, cooler_design, what, oil_field):
        """``(message, field)`` when this coolant cannot cool oil at
        *oil_temperature* [K] (it enters no colder: ETD <= 0, second law); else None."""

    @abstractmethod
    def size(self, sz, cd):
        """Size this cooler into the :class:`heatload.cooling.sizing.CoolerSizing` *sz*
        (a note where it cannot reach the duty)."""

    @abstractmethod
    def possible(self, sz) -> bool:
        """True when :meth:`size` reached the duty (a spec sheet can be drawn)."""

    def arrangement(self, sz):
        """The exchanger arrangement of the spec sheet (None: one kind only)."""
        return None

    @abstractmethod
    def spec_sheet(self, duty, oil_inlet_temperature, coolant_inlet_temperature, oil_flow,
                   oil_density, oil_specific_heat, common, options) -> _k.CoolerSpec:
        """The spec sheet at the duty with margin *duty* [W]; *common*: the
        :class:`heatload.cooling.cooler.CoolerSpec` fields every type fills; *options*:
        the sizing settings of :func:`heatload.cooling.cooler.cooler_spec_sheet`."""

    def description(self, spec) -> str:
        return self.label

    def flow_text(self, flow, system, fq) -> str:
        return fq(flow, "flow", system)

    def extra_rows(self, spec, system, fq) -> list:
        return []

    @abstractmethod
    def summary(self, spec, system="si") -> str:
        """The cooler in a few words for the report's front page (spec record, SI),
        its figures in *system*'s units."""


class AirOil(CoolerType):
    """Air-oil cooler sized by its specific cooling power at the ETD
    (:func:`heatload.cooling.cooler.size_air_cooler`)."""

    name = "air"
    label = "air-oil"
    medium = "air"
    has_fan = True

    def inlet_temperature(self, cooler_design, design_ambient):
        return design_ambient

    def refusal(self, oil_temperature, design_ambient, cooler_design, what, oil_field):
        if oil_temperature > design_ambient:
            return None
        return (f"{what}, {_c(oil_temperature)}, is not above the hottest ambient "
                f"{_c(design_ambient)}: no air cooler cools oil below the air that cools it; "
                f"raise the design temperature or use coolant = \"water\"", oil_field)

    def size(self, sz, cd):
        try:
            sz.air = _k.size_air_cooler(sz.duty, sz.design_oil_temperature, sz.design_ambient,
                                        sz.oil_flow, sz.oil_density, sz.oil_specific_heat,
                                        cd.air_temperature_rise, pressure=sz.air_pressure)
        except HeatloadError as exc:
            sz.notes.append(f"air-oil not possible: {exc.one_line()}")

    def possible(self, sz):
        return sz.air is not None

    def spec_sheet(self, duty, oil_inlet_temperature, coolant_inlet_temperature, oil_flow,
                   oil_density, oil_specific_heat, common, options):
        s = _k.size_air_cooler(duty, oil_inlet_temperature, coolant_inlet_temperature, oil_flow,
                               oil_density, oil_specific_heat,
                               options.get("air_temperature_rise", 10.0),
                               pressure=options.get("air_pressure", 101325.0))
        return _k.CoolerSpec(etd=float(s.etd),
                             oil_outlet_temperature=float(s.oil_outlet_temperature),
                             coolant_flow=float(s.air_volume_flow),
                             coolant_outlet_temperature=float(s.air_outlet_temperature),
                             glycol_fraction=0.0,
                             specific_cooling_power=float(s.specific_cooling_power),
                             required_conductance=None, arrangement=None, **common)

    def flow_text(self, flow, system, fq):
        from heatload.cooling.sizing import air_flow_text
        return air_flow_text(flow, system)

    def extra_rows(self, spec, system, fq):
        return [("specific cooling power at the ETD",
                 fq(spec.specific_cooling_power, "thermal_conductance", system))]

    def summary(self, spec, system="si"):
        from heatload.units import format_quantity as fq
        return (f"an air-oil cooler of "
                f"{fq(spec['specific_cooling_power_W_K'], 'thermal_conductance', system)} "
                f"at an ETD of {fq(spec['etd_K'], 'temperature_difference', system)}")


#: Water-oil arrangements sized side by side (the spec sheet takes the first
#: that reaches the duty among shell-and-tube, then counterflow).
WATER_ARRANGEMENTS = ("counterflow", "shell-and-tube")


class WaterOil(CoolerType):
    """Water-oil cooler by effectiveness-NTU, counterflow and shell-and-tube
    (:func:`heatload.cooling.cooler.size_water_cooler`)."""

    name = "water"
    label = "water-oil"
    medium = "coolant"

    def inlet_temperature(self, cooler_design, design_ambient):
        return cooler_design.water_inlet_temperature

    def refusal(self, oil_temperature, design_ambient, cooler_design, what, oil_field):
        t_w = cooler_design.water_inlet_temperature
        field = "cooler.water_inlet_temperature"
        x = cooler_design.water_glycol_fraction
        if x == 0.0 and t_w <= 273.15:
            return (f"pure water at {_c(t_w)} freezes; give water above 0 °C or a "
                    "water_glycol_fraction", field)
        if x > 0.0 and t_w <= _k.glycol_freezing_point(x):
            return (f"ethylene glycol-water of {100 * x:.0f} % glycol freezes at "
                    f"{_c(_k.glycol_freezing_point(x))}; water entering at {_c(t_w)} would "
                    f"be ice: give it warmer, or more glycol (water_glycol_fraction)", field)
        if t_w >= oil_temperature:
            return (f"water entering at {_c(t_w)} is not colder than {what}, "
                    f"{_c(oil_temperature)}: a water cooler cannot cool the oil; give colder "
                    f"water, or set coolant = \"air\" in the file", field)
        rise = cooler_design.water_temperature_rise
        if cooler_design.water_flow is None and t_w + rise >= oil_temperature:
            # counterflow at best: the water must leave colder than the oil enters
            return (f"water entering at {_c(t_w)} and warming the allowed "
                    f"{rise:.1f} K would leave at {_c(t_w + rise)}, not colder than {what}, "
                    f"{_c(oil_temperature)}: give colder water or a smaller "
                    "water_temperature_rise", field)
        return None

    def size(self, sz, cd):
        for arr in WATER_ARRANGEMENTS:
            try:
                sz.water[arr] = _k.size_water_cooler(
                    sz.duty, sz.design_oil_temperature, cd.water_inlet_temperature, sz.oil_flow,
                    sz.oil_density, sz.oil_specific_heat, water_flow=cd.water_flow,
                    water_temperature_rise=cd.water_temperature_rise,
                    glycol_fraction=cd.water_glycol_fraction, arrangement=arr, shell_passes=1)
            except HeatloadError as exc:
                sz.notes.append(f"water-oil {arr} not possible: {exc.one_line()}")

    def possible(self, sz):
        return bool(sz.water)

    def arrangement(self, sz) -> str:
        """The arrangement of the spec sheet: shell-and-tube where it reaches the duty."""
        return "shell-and-tube" if "shell-and-tube" in sz.water else "counterflow"

    def spec_sheet(self, duty, oil_inlet_temperature, coolant_inlet_temperature, oil_flow,
                   oil_density, oil_specific_heat, common, options):
        arrangement = options.get("arrangement", "shell-and-tube")
        glycol = options.get("glycol_fraction", 0.0)
        s = _k.size_water_cooler(duty, oil_inlet_temperature, coolant_inlet_temperature,
                                 oil_flow, oil_density, oil_specific_heat,
                                 water_flow=options.get("water_flow"),
                                 water_temperature_rise=options.get("water_temperature_rise", 5.0),
                                 glycol_fraction=glycol, arrangement=arrangement,
                                 shell_passes=options.get("shell_passes", 1))
        return _k.CoolerSpec(etd=float(s.etd),
                             oil_outlet_temperature=float(s.oil_outlet_temperature),
                             coolant_flow=float(s.water_volume_flow),
                             coolant_outlet_temperature=float(s.water_outlet_temperature),
                             glycol_fraction=float(glycol), specific_cooling_power=None,
                             required_conductance=float(s.required_conductance),
                             arrangement=arrangement, **common)

    def description(self, spec):
        return (f"{self.label}, {spec.arrangement}"
                + (", one shell pass, two tube passes"
                   if spec.arrangement == "shell-and-tube" else ""))

    def extra_rows(self, spec, system, fq):
        return [("glycol mass fraction", f"{100 * spec.glycol_fraction:.0f} %"),
                ("required UA", fq(spec.required_conductance, "thermal_conductance", system))]

    def summary(self, spec, system="si"):
        from heatload.units import format_quantity as fq
        return (f"a water-oil cooler ({spec['arrangement']}) of UA "
                f"{fq(spec['required_conductance_W_K'], 'thermal_conductance', system)}")


#: Every cooler type by the file's ``coolant`` value.
TYPES = {t.name: t for t in (AirOil(), WaterOil())}


def cooler_type(name: str, field: str = "coolant") -> CoolerType:
    """The registered cooler type *name*; a one-line error naming the choices."""
    try:
        return TYPES[name]
    except (KeyError, TypeError):
        raise HeatloadError(f"unknown coolant {name!r}; expected "
                            f"{' or '.join(TYPES)}", field=field) from None
