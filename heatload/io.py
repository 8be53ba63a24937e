"""Read and write duty-cycle files: TOML with units as strings.

A duty-cycle file describes one machine: its fluid, site, reservoir, power
unit, actuators, the phases of its cycle, the control strategies to compare,
the cooler design target and the inputs one is unsure of.  Every quantity is a
string with its unit (``"160 bar"``, ``"40 L/min"``, ``"35 degC"``); plain
numbers are for dimensionless values (efficiencies, counts, factors).

The keys are the attribute names of :mod:`heatload.model`, so a field path in
an error message (``phases[2].speed``, ``power_unit.pump.displacement``) is
also where the value lives in the :class:`~heatload.model.Scenario`.  The
exceptions: the ``[scenario]`` table holds the scenario's own top-level
fields; the parameters of a strategy sit directly in its ``[[strategies]]``
item (``Strategy.parameters`` in the model); ``[strategy_defaults]`` sets
parameters shared by every strategy and has no model counterpart.  Array
indices in paths count from 0, like Python.

:data:`SCHEMA_EXAMPLE` below is a complete, commented file that documents
every key; the files in ``duty_cycles/`` are fuller examples to copy.

Loading validates everything that can be judged from the file alone (units,
signs, plausible magnitudes, names that refer to each other, required keys,
unknown keys with a suggestion) and raises :class:`~heatload.errors.HeatloadError`
whose one-line text starts with the file name and line and names the field.
Physics checks that need a solved operating point belong to other modules.

Writing is lossless: ``loads_scenario(dumps_scenario(s)) == s``.  Each value
is written in a friendly unit with the fewest digits that parse back to the
very same float; where no friendly form round-trips exactly, the SI value is
written with full ``repr`` precision.
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import re
import stat
from functools import lru_cache
from pathlib import Path

from heatload import model as m
from heatload import outputs
from heatload.errors import HeatloadError
from heatload.cooler_types import TYPES as COOLER_TYPES, cooler_type
from heatload.units import KINDS, from_si, to_si

__all__ = [
    "SCHEMA_EXAMPLE",
    "load_scenario",
    "loads_scenario",
    "scenario_from_dict",
    "scenario_to_dict",
    "dumps_scenario",
    "save_scenario",
    "default_scenario_path",
    "example_paths",
]

SCHEMA_EXAMPLE = '''\
# A heatload duty-cycle file.  Quantities are strings with a unit ("160 bar",
# "40 L/min", "35 degC", "1450 rpm"): one number with a decimal point, then the
# unit; efficiencies, counts and factors are plain numbers.  Only [scenario], [[actuators]] and [[phases]] are required; every
# other table and key has the default shown here.  Pressures are gauge.

[scenario]
name = "Example press"                 # required, shown in every report
description = "A small press to show every key of the file format."
shift_duration = "8 h"                 # length of a shift, for the warm-up from cold
project = "P-1234 press line"          # cover of the report (or heatload report --project ...)
customer = "Example Works Ltd."
prepared_by = "A. Designer"
revision = "A"

[economics]
hours_per_year = 4000                  # running hours of the machine [h/year], or instead
                                       # a shift pattern (all three; then no hours_per_year
                                       # and no shift_duration: the warm-up from cold runs
                                       # over each day's hours):
# hours_per_shift = 8
# shifts_per_day = 2
# days_per_week = 5
# weeks_per_year = 50                  # default 50 with a shift pattern
electricity_price = "0.20 /kWh"        # price of bought electrical energy, in `currency`
currency = "EUR"
grid_co2_factor = "0.35 kg/kWh"        # CO2 emitted per kWh bought
present_strategy = "meter-in"          # the circuit the machine has now (a strategy below)
service_life = 10                      # years over which circuit and cooler prices are annualised
interest_rate = 0.05                   # per year, for the annualised prices

[fluid]
name = "ISO VG 46 mineral oil"
iso_grade = 46                         # ISO 3448 grade; alone it gives nu40 = grade mm^2/s
nu40 = "46 mm^2/s"                     # kinematic viscosity at 40 degC
nu100 = "6.8 mm^2/s"                   # at 100 degC; or give viscosity_index instead
viscosity_index = 98                   # ASTM D2270 VI; used for nu100 when nu100 is missing
density_15C = "870 kg/m^3"
expansion_coefficient = "7e-4 1/K"     # volumetric thermal expansion
bulk_modulus = "1.6 GPa"
specific_heat = "1.88 kJ/(kg*K)"       # leave out for the Cragoe correlation
thermal_conductivity = "0.13 W/(m*K)"  # leave out for the Cragoe correlation
temperature_min = "-20 degC"           # allowed oil temperature window
temperature_max = "80 degC"
kind = "mineral"                       # mineral | water-glycol | ester | other
# For a fluid given by data instead (at least two points, distinct temperatures):
# viscosity_points = [["20 degC", "120 mm^2/s"], ["40 degC", "46 mm^2/s"], ["80 degC", "12 mm^2/s"]]

[ambient]                              # each within -60 .. +70 degC (arctic site to process hall)
temperature = "25 degC"                # typical air around the power unit
temperature_max = "40 degC"            # hottest day: the cooler's design point
cold_start_temperature = "15 degC"     # oil and steel at the start of a shift
altitude = "0 m"

[reservoir]
oil_volume = "200 L"                   # oil in tank and circuit: at least 0.1 L (a compact
                                       # power unit), at most length x width x height
length = "1.0 m"                       # outside dimensions of the tank, each at least 10 mm
width = "0.6 m"
height = "0.5 m"
oil_level = 0.8                        # wetted fraction of the wall height
steel_mass = "150 kg"                  # tank, pump, manifold and cylinders
steel_specific_heat = "490 J/(kg*K)"
emissivity = 0.9                       # painted steel
air_velocity = "0 m/s"                 # forced air over the walls; 0 = still air
bottom_exposed = false                 # true for a tank on feet with air below
# heat_transfer_coefficient = "12 W/(m^2*K)"   # replaces convection + radiation

[[reservoir.surfaces]]                 # further surfaces that shed heat (any number)
name = "pressure pipe"
area = "0.3 m^2"
orientation = "cylinder"               # vertical | horizontal-up | horizontal-down | cylinder
characteristic_length = "22 mm"        # wall height, or pipe outside diameter
emissivity = 0.9
# heat_transfer_coefficient = "8 W/(m^2*K)"

[power_unit.pump]
kind = "fixed"                         # fixed | variable
type = "gear"                          # gear | vane | axial-piston | radial-piston
displacement = "28 cm^3/rev"           # (maximum) displacement
shaft_speed = "1450 rpm"
volumetric_efficiency = 0.93           # datasheet point ...
hydromechanical_efficiency = 0.88
rated_pressure = "200 bar"             # ... at this pressure
rated_viscosity = "32 mm^2/s"          # ... and this viscosity
max_pressure = "250 bar"               # continuous rating
viscosity_min = "10 mm^2/s"            # allowed viscosity window
viscosity_max = "1000 mm^2/s"
# standby_loss_fraction = 0.03         # variable pump at zero stroke, of full-flow power

[power_unit.motor]
rated_power = "11 kW"
efficiency_class = "IE3"               # IEC 60034-30-1: IE1 | IE2 | IE3 | IE4
poles = 4                              # 2 | 4 | 6 | 8
# efficiency = 0.91                    # rated efficiency; default: the class minimum
drive_efficiency = 0.97                # frequency converter (variable speed only)

[power_unit.relief]
cracking_pressure = "180 bar"
override = "10 bar"                    # rise from cracking to rated flow
rated_flow = "60 L/min"

[power_unit.directional_valve]
rated_flow = "60 L/min"
pressure_drop = "5 bar"                # P->A and B->T at rated flow
centre = "tandem"                      # open | tandem | closed
centre_pressure_drop = "3 bar"         # P->T in centre at rated flow
max_pressure = "315 bar"

[power_unit.check_valve]
cracking_pressure = "0.5 bar"
rated_flow = "60 L/min"
pressure_drop = "1.5 bar"              # at rated flow, cracking included

[power_unit.pressure_line]
length = "3 m"
inner_diameter = "16 mm"
roughness = "0.0015 mm"                # drawn steel tube
fittings_k = 2.0                       # sum of minor-loss coefficients

[power_unit.return_line]
length = "3 m"
inner_diameter = "20 mm"
roughness = "0.0015 mm"
fittings_k = 2.0

[[actuators]]
name = "main"                          # phases refer to this name
kind = "cylinder"                      # cylinder | motor
bore = "63 mm"
rod = "36 mm"                          # smaller than the bore; the area ratio
                                       # D^2/(D^2 - d^2) at most 10 (ISO 7181 lists up to 5)
stroke = "400 mm"
friction_force = "500 N"               # seal friction, opposes motion
max_pressure = "250 bar"
dead_volume = "0.3 L"                  # oil in the hoses, each side
# counterbalance_setting = "120 bar"   # its own counterbalance valve in the outlet line
                                       # (default: the strategy's, if any)
# counterbalance_pilot_ratio = 3.0
# back_pressure = "5 bar"              # a back-pressure valve in its outlet line: its
                                       # counter-force and its loss while it moves

[[actuators]]
name = "spindle"
kind = "motor"
displacement = "80 cm^3/rev"
volumetric_efficiency = 0.95
hydromechanical_efficiency = 0.92
max_pressure = "250 bar"
max_speed = "600 rpm"

# Phases run in this order, then the cycle repeats.  motion is
# extend | retract | hold (cylinders), run | hold (motors), idle (no actuator).
# load opposes the motion when positive and overruns (pulls) it when negative:
# a force for a cylinder, a torque for a motor.  speed is a velocity, a shaft
# speed for a motor, or "full" (the whole pump flow, also when left out).
# A moving cylinder phase needs a stroke or a duration (with both, the duration
# wins); hold, idle and run phases need a duration.  However it arises (a stroke
# at a crawling speed, or at the full flow of a tiny pump) a phase lasts at most 24 h.
[[phases]]
name = "approach"
actuator = "main"
motion = "extend"
load = "2 kN"
speed = "full"
stroke = "300 mm"

[[phases]]
name = "press"
actuator = "main"
motion = "extend"
load = "60 kN"
speed = "20 mm/s"
stroke = "50 mm"
compress = true                        # count the compression energy of the cap side
# regeneration = true                  # extend differentially: the rod side's oil joins
                                       # the cap side; v = Q / A_rod, F = p A_rod (a fast
                                       # approach at low force)
# Further actuators moving at the same time on the same pump, one item each
# (the phase's own motion needs a set speed and sets the duration; each moving
# one needs its set speed and runs for the whole phase; hold: no flow):
# [[phases.simultaneous]]
# actuator = "spindle"
# motion = "run"                       # extend | retract | run | hold
# load = "40 N*m"
# speed = "100 rpm"

[[phases]]
name = "dwell"
actuator = "main"
motion = "hold"
duration = "3 s"
hold_pressure = "160 bar"              # pressure held on the cap side, or instead:
# hold_force = "50 kN"                 # a force held (not both)
unloading = "held"                     # relief | centre | held | pilot-check (how the pump
                                       # is unloaded; pilot-check: a pilot-operated check
                                       # holds the load, the pump is unloaded)

[[phases]]
name = "return"
actuator = "main"
motion = "retract"
load = "1 kN"
speed = "full"
stroke = "350 mm"

[[phases]]
name = "spin"
actuator = "spindle"
motion = "run"
load = "120 N*m"
speed = "300 rpm"
duration = "10 s"

[[phases]]
name = "part change"
motion = "idle"
duration = "8 s"
unloading = "centre"

# A block of consecutive phases run more than once per cycle, written once:
# [[repeats]]
# first = "press"                      # the block's first phase (by name)
# last = "dwell"                       # its last; default: the first
# count = 2                            # passes per cycle (a whole number)

# Shared by every strategy below (any key of a [[strategies]] item except kind and label).
[strategy_defaults]
flow_control_min_drop = "8 bar"

# Circuits to compare.  Leave out [[strategies]] to compare all of them with defaults.
[[strategies]]
kind = "meter-in"                      # meter-in | meter-out | bleed-off | bypass-compensated |
                                       # pressure-compensated | load-sensing | variable-speed |
                                       # hi-lo | accumulator
label = "meter-in"                     # shown name (default: kind); names must be unique
price = 0                              # extra price over the cheapest circuit, in currency

[[strategies]]
kind = "meter-out"
counterbalance_setting = "100 bar"     # leave out for no counterbalance valve
counterbalance_pilot_ratio = 3.0

[[strategies]]
kind = "bypass-compensated"
bypass_spring = "8 bar"                # 3-way compensator: pump this far above the load

[[strategies]]
kind = "pressure-compensated"
compensator_setting = "170 bar"        # default: relief cracking - 10 bar
price = 1500

[[strategies]]
kind = "load-sensing"
load_sensing_margin = "20 bar"
standby_pressure = "25 bar"
price = 2500

[[strategies]]
kind = "variable-speed"
min_speed_fraction = 0.1               # slowest motor speed / nominal
max_speed_fraction = 1.0
price = 1800

[[strategies]]
kind = "hi-lo"                         # double pump; [power_unit.pump] is the pair's total
high_pressure_fraction = 0.25          # the small pump's share of the displacement
unloading_pressure = "60 bar"          # the large pump unloads above it; default relief / 3
unloading_valve_drop = "3 bar"         # the unloaded pump's flow to tank crosses this
price = 600

[[strategies]]
kind = "accumulator"                   # fixed pump charging a gas accumulator
accumulator_pressure_max = "170 bar"   # pump idles above it; default relief cracking - 10 bar
accumulator_pressure_min = "125 bar"   # pump back on below it; default 0.75 x the maximum;
                                       # every load (+ flow control) must stay below it
accumulator_precharge = "110 bar"      # gas precharge; default 0.9 x the minimum
accumulator_gas_volume = "10 L"        # gas volume at the precharge (nominal size)
polytropic_exponent = 1.0              # 1 isothermal (cycles of minutes); 1.4 adiabatic
unloading_valve_drop = "3 bar"         # the idling pump's flow to tank
price = 2000

[cooler]
oil_temperature_max = "55 degC"        # design oil temperature; default fluid max - 5 K;
                                       # above temperature_max of [ambient] for air (ETD > 0)
margin = 0.2                           # +20 % on the duty
coolant = "air"                        # air | water
water_inlet_temperature = "25 degC"    # for water: below the design oil temperature
water_glycol_fraction = 0.0            # ethylene glycol mass fraction
# water_flow = "20 L/min"              # default: from the allowed water rise
water_temperature_rise = "5 K"
air_temperature_rise = "10 K"
oil_pressure_drop_max = "1 bar"
thermostat_on = "45 degC"              # leave out for a cooler that always runs
thermostat_hysteresis = "5 K"
# price_fixed = 500                    # cooler price, fixed part, in currency; leave out for
# price_per_kW = 100                   # ... the defaults (common practice) of heatload.decision
# fan_power_fraction = 0.04            # fan electric power / cooler duty (air-oil)

# Inputs you are unsure of, for the Monte Carlo and the sensitivity ranking.
# path names a numeric key as above; phases[*] means every phase.  With
# relative = true the bounds are factors or percentages of the value
# ("-10 %" = 0.9); with relative = false they are quantities of the key's kind.
[[uncertainty]]
path = "phases[*].load"
distribution = "uniform"               # uniform | triangular | normal (low/high = 5/95 %)
low = "-10 %"
high = "+10 %"
relative = true

[[uncertainty]]
path = "ambient.temperature_max"
distribution = "triangular"
low = "35 degC"
high = "45 degC"
mode = "40 degC"
relative = false

# Air-oil coolers on offer, by their datasheet curves (any number; `heatload
# cooler` rates each on the hottest day and picks the smallest that holds).
# specific_power: specific cooling power at the ETD against oil flow;
# pressure_drop (optional): oil-side drop against flow at pressure_drop_viscosity.
[[coolers]]
name = "AO-2 (invented)"
specific_power = [["10 L/min", "21 W/K"], ["20 L/min", "29 W/K"], ["40 L/min", "35 W/K"]]
pressure_drop = [["10 L/min", "0.06 bar"], ["40 L/min", "0.55 bar"]]
pressure_drop_viscosity = "30 mm^2/s"
fan_power = "60 W"
'''


# ---------------------------------------------------------------------------
# Field specifications
# ---------------------------------------------------------------------------

@dataclasses.dataclass(frozen=True)
class _F:
    """How one key is read: *kind* is a key of :data:`heatload.units.KINDS`
    or one of ``str``, ``int``, ``bool``, ``choice``, ``points``."""

    kind: str
    check: str | None = None               # pos | nonneg | eff | frac | frac_pos | nonempty
    choices: tuple = ()
    required: bool = False
    low: float | None = None               # plausible range beyond the kind's own
    high: float | None = None
    why: str | None = None                 # the range and its reason, for the message


_BAR = 1e5

# Limits where no machine exists (each is documented with its reason in the
# README's "Limits" section and in SCHEMA_EXAMPLE).

#: Air temperatures a site can have [K]: -60 degC is about the coldest air
#: arctic-rated equipment is specified for, +70 degC the air beside hot
#: processes (foundries, furnaces); weather records lie inside (common practice).
AMBIENT_RANGE = (213.15, 343.15)
_AMBIENT_WHY = ("the plausible air temperature range -60 °C .. +70 °C (arctic sites to "
                "hot process halls)")
#: Least oil a tank may hold [m^3] (0.1 L): the smallest compact power units carry
#: a few tenths of a litre (common practice, from memory); below this the model of
#: a well-mixed tank shedding heat through its walls describes no machine.
MIN_OIL_VOLUME = 1e-4
#: Smallest outside dimension of a tank [m]: a tank wall alone is 2-5 mm of steel
#: (common practice).
MIN_TANK_DIMENSION = 0.01
#: Smallest cylinder bore [m]: ISO 3320 lists bores from 8 mm and miniature
#: cylinders go down to about 2.5 mm (common practice, from memory); below 2 mm
#: a bore is a slipped unit (mm written as um).
MIN_BORE = 2e-3
#: Lowest relief valve setting [Pa]: 1 bar; a relief set lower relieves nothing
#: a hydraulic circuit builds (a tank line's back pressure alone is about that).
MIN_RELIEF_SETTING = 1e5
#: Largest cylinder area ratio A_cap / A_annulus [-]: ISO 7181 lists area ratios
#: up to 5 (d/D = 0.89; ISO 3320 rods reach about d/D = 0.7) (from memory); 10
#: (d/D = 0.95, an annulus of a tenth of the bore) is twice the largest, and beyond
#: it the rod side would intensify the supply more than tenfold.
MAX_AREA_RATIO = 10.0
#: Lowest efficiency of a pump, motor or converter at its rated point [-]: gear
#: and piston pumps reach 0.8-0.95 volumetric and hydromechanical, electric
#: motors and converters 0.7-0.98 (common practice, from memory); below 0.3 the
#: figure is a slipped percentage (0.9 written as 0.009) or no working machine.
MIN_EFFICIENCY = 0.3
#: Longest phase [s]: a duty cycle's step lasts at most a day (the same limit
#: as a given duration); a longer one is a unit slip in a speed or a stroke.
MAX_PHASE_DURATION = 86400.0

#: Plausible magnitude of each kind (absolute value), to catch unit slips
#: such as "3000 bar" or "12 m/s" for a cylinder.  Generous on purpose.
_LIMITS = {
    "pressure": (2000 * _BAR, "2000 bar"),
    "flow": (0.1, "6000 L/min"),
    "length": (2.0, "2 m"),
    "distance": (1000.0, "1000 m"),
    "area": (1000.0, "1000 m^2"),
    "volume": (100.0, "100 m^3"),
    "displacement": (0.5, "500 L/rev"),
    "velocity": (10.0, "10 m/s"),
    "shaft_speed": (10000 / 60, "10000 rpm"),
    "force": (1e9, "1000 MN"),
    "torque": (1e7, "10000 kN*m"),
    "power": (1e7, "10 MW"),
    "time": (86400.0, "24 h"),
    "temperature": (573.15, "300 degC"),
    "temperature_difference": (200.0, "200 K"),
    "mass": (1e6, "1000 t"),
    "density": (2500.0, "2500 kg/m^3"),
    "kinematic_viscosity": (0.1, "100000 mm^2/s"),
    "bulk_modulus": (1e10, "10 GPa"),
    "heat_transfer_coefficient": (1e4, "10000 W/(m^2*K)"),
    "specific_heat": (10000.0, "10 kJ/(kg*K)"),
    "thermal_conductivity": (10.0, "10 W/(m*K)"),
    "expansion_coefficient": (0.01, "0.01 1/K"),
    "specific_energy_price": (10 / 3.6e6, "10 /kWh"),
    "emission_factor": (5 / 3.6e6, "5 kg/kWh"),
}

#: ISO 3448 viscosity grades (midpoint kinematic viscosity at 40 degC in mm^2/s).
ISO_GRADES = (2, 3, 5, 7, 10, 15, 22, 32, 46, 68, 100, 150, 220, 320, 460, 680,
              1000, 1500, 2200, 3200)

_SCENARIO = {
    "name": _F("str", "nonempty", required=True),
    "description": _F("str"),
    "shift_duration": _F("time", "pos"),
    "project": _F("str"),
    "customer": _F("str"),
    "prepared_by": _F("str"),
    "revision": _F("str"),
}
_ECONOMICS = {
    "hours_per_year": _F("dimensionless", "pos", high=8784.0),
    "hours_per_shift": _F("dimensionless", "pos", high=24.0),
    "shifts_per_day": _F("dimensionless", "pos", high=24.0),
    "days_per_week": _F("dimensionless", "pos", high=7.0),
    "weeks_per_year": _F("dimensionless", "pos", high=53.0),
    "electricity_price": _F("specific_energy_price", "nonneg"),
    "currency": _F("str", "nonempty"),
    "grid_co2_factor": _F("emission_factor", "nonneg"),
    "present_strategy": _F("str", "nonempty"),
    "service_life": _F("dimensionless", "pos", high=100.0),
    "interest_rate": _F("dimensionless", "nonneg", high=1.0),
}
_FLUID = {
    "name": _F("str", "nonempty"),
    "iso_grade": _F("int", choices=ISO_GRADES),
    "nu40": _F("kinematic_viscosity", "pos"),
    "nu100": _F("kinematic_viscosity", "pos"),
    "viscosity_index": _F("dimensionless", low=-100.0, high=500.0),
    "density_15C": _F("density", "pos", low=500.0),
    "expansion_coefficient": _F("expansion_coefficient", "nonneg"),
    "bulk_modulus": _F("bulk_modulus", "pos", low=1e8),
    "specific_heat": _F("specific_heat", "pos", low=500.0),
    "thermal_conductivity": _F("thermal_conductivity", "pos"),
    "temperature_min": _F("temperature", "pos"),
    "temperature_max": _F("temperature", "pos"),
    "viscosity_points": _F("points"),
    "kind": _F("choice", choices=("mineral", "water-glycol", "ester", "other")),
}
_AMBIENT = {
    "temperature": _F("temperature", "pos", low=AMBIENT_RANGE[0], high=AMBIENT_RANGE[1], why=_AMBIENT_WHY),
    "temperature_max": _F("temperature", "pos", low=AMBIENT_RANGE[0], high=AMBIENT_RANGE[1], why=_AMBIENT_WHY),
    "cold_start_temperature": _F("temperature", "pos", low=AMBIENT_RANGE[0], high=AMBIENT_RANGE[1], why=_AMBIENT_WHY),
    "altitude": _F("distance", low=-500.0, high=9000.0),
}
_SURFACE = {
    "name": _F("str", "nonempty", required=True),
    "area": _F("area", "pos", required=True),
    "heat_transfer_coefficient": _F("heat_transfer_coefficient", "pos"),
    "orientation": _F("choice", choices=("vertical", "horizontal-up",
                                         "horizontal-down", "cylinder")),
    "characteristic_length": _F("distance", "pos"),
    "emissivity": _F("dimensionless", "frac_pos"),
}
_RESERVOIR = {
    "oil_volume": _F("volume", "pos", low=MIN_OIL_VOLUME,
                     why="0.1 L, the least oil of a compact power unit"),
    "length": _F("distance", "pos", low=MIN_TANK_DIMENSION, high=20.0),
    "width": _F("distance", "pos", low=MIN_TANK_DIMENSION, high=20.0),
    "height": _F("distance", "pos", low=MIN_TANK_DIMENSION, high=20.0),
    "oil_level": _F("dimensionless", "frac_pos"),
    "steel_mass": _F("mass", "nonneg"),
    "steel_specific_heat": _F("specific_heat", "pos"),
    "emissivity": _F("dimensionless", "frac_pos"),
    "heat_transfer_coefficient": _F("heat_transfer_coefficient", "pos"),
    "air_velocity": _F("velocity", "nonneg", high=50.0),
    "bottom_exposed": _F("bool"),
    "surfaces": _F("surfaces"),
}
_PUMP = {
    "kind": _F("choice", choices=("fixed", "variable")),
    "type": _F("choice", choices=("gear", "vane", "axial-piston", "radial-piston")),
    "displacement": _F("displacement", "pos", high=0.01),
    "shaft_speed": _F("shaft_speed", "pos"),
    "volumetric_efficiency": _F("dimensionless", "eff"),
    "hydromechanical_efficiency": _F("dimensionless", "eff"),
    "rated_pressure": _F("pressure", "pos"),
    "rated_viscosity": _F("kinematic_viscosity", "pos"),
    "max_pressure": _F("pressure", "pos"),
    "viscosity_min": _F("kinematic_viscosity", "pos"),
    "viscosity_max": _F("kinematic_viscosity", "pos"),
    "standby_loss_fraction": _F("dimensionless", "frac"),
}
_MOTOR = {
    "rated_power": _F("power", "pos"),
    "efficiency_class": _F("choice", choices=("IE1", "IE2", "IE3", "IE4")),
    "poles": _F("int", choices=(2, 4, 6, 8)),
    "efficiency": _F("dimensionless", "eff"),
    "drive_efficiency": _F("dimensionless", "eff"),
}
_RELIEF = {
    "cracking_pressure": _F("pressure", "pos", low=MIN_RELIEF_SETTING,
                            why="1 bar, the least setting of a relief valve"),
    "override": _F("pressure", "nonneg"),
    "rated_flow": _F("flow", "pos"),
}
_DIRECTIONAL = {
    "rated_flow": _F("flow", "pos"),
    "pressure_drop": _F("pressure", "nonneg"),      # 0: an ideal valve, for hand checks
    "centre": _F("choice", choices=("open", "tandem", "closed")),
    "centre_pressure_drop": _F("pressure", "nonneg"),
    "max_pressure": _F("pressure", "pos"),
}
_CHECK = {
    "cracking_pressure": _F("pressure", "nonneg"),
    "rated_flow": _F("flow", "pos"),
    "pressure_drop": _F("pressure", "nonneg"),
}
_LINE = {
    "length": _F("distance", "nonneg"),             # 0: fittings only, or no line
    "inner_diameter": _F("length", "pos", high=0.5),
    "roughness": _F("length", "nonneg"),
    "fittings_k": _F("dimensionless", "nonneg", high=1000.0),
}
#: power_unit sub-table -> (spec, model attribute)
_POWER_UNIT = {
    "pump": _PUMP,
    "motor": _MOTOR,
    "relief": _RELIEF,
    "directional_valve": _DIRECTIONAL,
    "check_valve": _CHECK,
    "pressure_line": _LINE,
    "return_line": _LINE,
}
_CYLINDER = {
    "name": _F("str", "nonempty", required=True),
    "kind": _F("choice", choices=("cylinder", "motor"), required=True),
    "bore": _F("length", "pos", required=True, low=MIN_BORE,
               why="2 mm, the smallest bore of a miniature cylinder"),
    "rod": _F("length", "pos", required=True),
    "stroke": _F("distance", "pos", required=True, high=50.0),
    "friction_force": _F("force", "nonneg"),
    "max_pressure": _F("pressure", "pos"),
    "dead_volume": _F("volume", "nonneg"),
    "counterbalance_setting": _F("pressure", "pos"),
    "counterbalance_pilot_ratio": _F("dimensionless", "pos", high=100.0),
    "back_pressure": _F("pressure", "pos"),
}
_HYDRAULIC_MOTOR = {
    "name": _F("str", "nonempty", required=True),
    "kind": _F("choice", choices=("cylinder", "motor"), required=True),
    "displacement": _F("displacement", "pos", required=True),
    "volumetric_efficiency": _F("dimensionless", "eff"),
    "hydromechanical_efficiency": _F("dimensionless", "eff"),
    "max_pressure": _F("pressure", "pos"),
    "max_speed": _F("shaft_speed", "pos"),
    "counterbalance_setting": _F("pressure", "pos"),
    "counterbalance_pilot_ratio": _F("dimensionless", "pos", high=100.0),
    "back_pressure": _F("pressure", "pos"),
}
#: Phase keys; the kinds of load and speed depend on the actuator (see _phase_kind).
_PHASE = {
    "name": _F("str", "nonempty", required=True),
    "actuator": _F("str", "nonempty"),
    "motion": _F("choice", choices=m.MOTIONS, required=True),
    "load": _F("force"),
    "speed": _F("velocity", "pos"),
    "stroke": _F("distance", "pos"),
    "duration": _F("time", "pos"),
    "hold_pressure": _F("pressure", "pos"),
    "hold_force": _F("force", "pos"),
    "unloading": _F("choice", choices=m.UNLOADING),
    "compress": _F("bool"),
    "regeneration": _F("bool"),
}
_PARAMETERS = {
    "flow_control_min_drop": _F("pressure", "nonneg"),
    "bypass_spring": _F("pressure", "nonneg"),
    "compensator_setting": _F("pressure", "pos"),
    "load_sensing_margin": _F("pressure", "nonneg"),
    "standby_pressure": _F("pressure", "nonneg"),
    "counterbalance_setting": _F("pressure", "pos"),
    "counterbalance_pilot_ratio": _F("dimensionless", "pos", high=100.0),
    "min_speed_fraction": _F("dimensionless", "frac_pos"),
    "max_speed_fraction": _F("dimensionless", "pos", high=3.0),
    "high_pressure_fraction": _F("dimensionless", "frac_pos"),
    "unloading_pressure": _F("pressure", "pos"),
    "unloading_valve_drop": _F("pressure", "nonneg"),
    "accumulator_pressure_min": _F("pressure", "pos"),
    "accumulator_pressure_max": _F("pressure", "pos"),
    "accumulator_precharge": _F("pressure", "pos"),
    "accumulator_gas_volume": _F("volume", "pos"),
    "polytropic_exponent": _F("dimensionless", "pos", high=2.0),
    "price": _F("dimensionless", "nonneg"),
}
_STRATEGY = {
    "kind": _F("choice", choices=m.STRATEGIES, required=True),
    "label": _F("str", "nonempty"),
    **_PARAMETERS,
}
_COOLER = {
    "oil_temperature_max": _F("temperature", "pos"),
    "margin": _F("dimensionless", "nonneg", high=5.0),
    "coolant": _F("choice", choices=tuple(COOLER_TYPES)),
    "water_inlet_temperature": _F("temperature", "pos"),
    "water_glycol_fraction": _F("dimensionless", "frac", high=0.6),
    "water_flow": _F("flow", "pos"),
    "water_temperature_rise": _F("temperature_difference", "pos"),
    "air_temperature_rise": _F("temperature_difference", "pos"),
    "oil_pressure_drop_max": _F("pressure", "pos"),
    "thermostat_on": _F("temperature", "pos"),
    "thermostat_hysteresis": _F("temperature_difference", "nonneg"),
    "price_fixed": _F("dimensionless", "nonneg"),
    "price_per_kW": _F("dimensionless", "nonneg"),
    "fan_power_fraction": _F("dimensionless", "frac"),
}
_UNCERTAINTY = {
    "path": _F("str", "nonempty", required=True),
    "distribution": _F("choice", choices=("uniform", "triangular", "normal")),
    "low": _F("bound"),
    "high": _F("bound"),
    "mode": _F("bound"),
    "relative": _F("bool"),
}
_TOP = ("scenario", "economics", "fluid", "ambient", "reservoir", "power_unit",
        "actuators", "phases", "strategy_defaults", "strategies", "cooler",
        "uncertainty", "coolers", "repeats")
_ARRAYS = ("actuators", "phases", "strategies", "uncertainty", "repeats")
_REPEAT = {
    "first": _F("str", "nonempty", required=True),
    "last": _F("str", "nonempty"),
    "count": _F("dimensionless", "pos", high=1000.0, required=True),
}


# ---------------------------------------------------------------------------
# Reading values
# ---------------------------------------------------------------------------

def _err(message: str, field: str | None, source: str | None) -> HeatloadError:
    return HeatloadError(message, field=field, file=source)


@lru_cache(maxsize=4096)
def _to_si_cached(text: str, kind: str) -> float:
    return to_si(text, kind)


def _quantity(raw, kind: str, field: str, source: str) -> float:
    """to_si with a cache for strings (pint parsing is the slow part)."""
    if isinstance(raw, str):
        try:
            return _to_si_cached(raw, kind)
        except HeatloadError as e:
            raise _err(e.message, field, source) from None
    return to_si(raw, kind, field=field, file=source)


def _show(raw) -> str:
    return repr(raw) if isinstance(raw, str) else str(raw)


def _check(value: float, raw, spec: _F, kind: str, field: str, source: str) -> float:
    """Sign, range and plausibility checks of one converted value."""
    c = spec.check
    shown = _show(raw)
    if kind == "temperature" and value <= 0.0:
        raise _err(f"{shown} is at or below absolute zero", field, source)
    if c == "pos" and not value > 0.0:
        raise _err(f"must be positive, got {shown}", field, source)
    if c == "nonneg" and value < 0.0:
        raise _err(f"must not be negative, got {shown}", field, source)
    if c == "eff" and not 0.0 < value <= 1.0:
        raise _err(f"an efficiency must lie in (0, 1], got {shown}", field, source)
    if c == "eff" and value < MIN_EFFICIENCY:
        raise _err(f"{shown} is below {MIN_EFFICIENCY:g}, less than any working pump, "
                   f"motor or converter gives at its rated point (a percentage? write 0.9 "
                   f"for 90 %)", field, source)
    if c == "frac" and not 0.0 <= value <= 1.0:
        raise _err(f"a fraction must lie in [0, 1], got {shown}", field, source)
    if c == "frac_pos" and not 0.0 < value <= 1.0:
        raise _err(f"must lie in (0, 1], got {shown}", field, source)
    unit = f" {KINDS[kind].si}" if KINDS[kind].si else ""
    hint = "; check the unit" if unit else ""
    # a limit written in another unit ("-60 degC", "6000 L/min") converts to SI with a
    # rounding of the last bit: the limit itself is within
    low = None if spec.low is None else spec.low - 1e-12 * abs(spec.low)
    high = None if spec.high is None else spec.high + 1e-12 * abs(spec.high)
    if spec.why and low is not None and value < low:
        raise _err(f"{shown} is below {spec.why}{hint}", field, source)
    if spec.why and high is not None and value > high:
        raise _err(f"{shown} is above {spec.why}{hint}", field, source)
    if low is not None and value < low:
        raise _err(f"{shown} is implausibly low (below {spec.low:g}{unit}){hint}",
                   field, source)
    if high is not None and value > high:
        raise _err(f"{shown} is implausibly high (above {spec.high:g}{unit}){hint}",
                   field, source)
    limit = _LIMITS.get(kind)
    if limit is not None and abs(value) > limit[0]:
        raise _err(f"{shown} is beyond any plausible machine (limit {limit[1]}); "
                   "check the unit", field, source)
    return value


def _value(raw, spec: _F, field: str, source: str, kind: str | None = None):
    """Convert and check one raw TOML value according to *spec*."""
    kind = kind or spec.kind
    if kind == "str":
        if not isinstance(raw, str):
            raise _err(f"expected a text in quotes, got {raw!r}", field, source)
        if spec.check == "nonempty" and not raw.strip():
            raise _err("must not be empty", field, source)
        return raw
    if kind == "bool":
        if not isinstance(raw, bool):
            raise _err(f"expected true or false, got {_show(raw)}", field, source)
        return raw
    if kind == "int":
        if isinstance(raw, bool) or not isinstance(raw, int):
            raise _err(f"expected a whole number, got {_show(raw)}", field, source)
        if spec.choices and raw not in spec.choices:
            raise _err(f"{raw} is not one of {', '.join(map(str, spec.choices))}",
                       field, source)
        return raw
    if kind == "choice":
        if not isinstance(raw, str) or raw not in spec.choices:
            hint = _suggest(raw, spec.choices) if isinstance(raw, str) else ""
            raise _err(f"{_show(raw)} is not one of: {', '.join(spec.choices)}{hint}",
                       field, source)
        return raw
    if kind not in KINDS:
        raise _err(f"internal: no reader for kind {kind!r}", field, source)
    value = _quantity(raw, kind, field, source)
    return _check(value, raw, spec, kind, field, source)


def _suggest(word: str, options) -> str:
    close = difflib.get_close_matches(word, [str(o) for o in options], n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


def _table(data, spec: dict, path: str, source: str, what: str = "table") -> dict:
    """Check that *data* is a table with known keys and the required ones."""
    if not isinstance(data, dict):
        raise _err(f"expected a {what}, got {_show(data)}", path, source)
    for key in data:
        if key not in spec:
            field = f"{path}.{key}" if path else key
            hint = _suggest(key, spec)
            if not hint:
                hint = "; valid keys: " + ", ".join(spec)
            raise _err(f"unknown key{hint}", field, source)
    for key, f in spec.items():
        if f.required and key not in data:
            raise _err(f"missing required key '{key}'", f"{path}.{key}" if path else key,
                       source)
    return data


def _read(data: dict, spec: dict, path: str, source: str, skip=()) -> dict:
    """Convert every present key of a checked table (except *skip*)."""
    out = {}
    for key, raw in data.items():
        if key in skip:
            continue
        out[key] = _value(raw, spec[key], f"{path}.{key}", source)
    return out


def _array(data, name: str, source: str) -> list:
    if not isinstance(data, list) or not all(isinstance(x, dict) for x in data):
        raise _err(f"expected an array of tables, written as [[{name}]] items",
                   name, source)
    return data


# ---------------------------------------------------------------------------
# Sections
# ---------------------------------------------------------------------------

def _fluid(data, source: str) -> m.Fluid:
    path = "fluid"
    _table(data, _FLUID, path, source)
    vals = _read(data, _FLUID, path, source, skip=("viscosity_points",))
    base = m.Fluid()
    points = ()
    if "viscosity_points" in data:
        points = _points(data["viscosity_points"], source)
    grade = vals.get("iso_grade")
    if grade is None and ("nu40" in vals or points):
        # A fluid given by its viscosity is not an ISO grade unless it says so.
        vals["iso_grade"] = None
    if "nu40" not in vals:
        if grade is not None:
            from heatload import oil

            try:
                vals["nu40"] = float(oil.iso_grade_viscosity(grade)[0])  # (mid, low, high)
            except HeatloadError as e:
                raise _err(e.message, "fluid.iso_grade", source) from None
        elif "nu100" in vals:
            raise _err("nu100 given without nu40 or iso_grade", "fluid.nu40", source)
    nu40 = vals.get("nu40", base.nu40)
    if grade is not None and not 0.9 * grade * 1e-6 <= nu40 <= 1.1 * grade * 1e-6:
        raise _err(f"{nu40 * 1e6:.4g} mm^2/s is outside ISO VG {grade} "
                   f"({0.9 * grade:.4g}..{1.1 * grade:.4g} mm^2/s, ISO 3448)",
                   "fluid.nu40", source)
    if "nu100" not in vals and (vals.get("viscosity_index") is not None
                                or "nu40" in vals):
        from heatload import oil

        vi = vals.get("viscosity_index", 100.0)   # common practice for HM oils
        try:
            vals["nu100"] = float(oil.nu100_from_vi(nu40, vi))
        except HeatloadError as e:
            raise _err(e.message, e.field or "fluid.viscosity_index", source) from None
    nu100 = vals.get("nu100", base.nu100)
    if not nu100 < nu40:
        raise _err(f"nu100 ({nu100 * 1e6:.4g} mm^2/s) must be below nu40 "
                   f"({nu40 * 1e6:.4g} mm^2/s)", "fluid.nu100", source)
    fluid = dataclasses.replace(base, **vals, viscosity_points=points)
    if not fluid.temperature_min < fluid.temperature_max:
        raise _err("temperature_min must be below temperature_max",
                   "fluid.temperature_max", source)
    return fluid


def _points(raw, source: str) -> tuple:
    path = "fluid.viscosity_points"
    if not isinstance(raw, list) or len(raw) < 2:
        raise _err("expected at least two [temperature, viscosity] pairs such as "
                   "[[\"20 degC\", \"120 mm^2/s\"], [\"40 degC\", \"46 mm^2/s\"]]",
                   path, source)
    out = []
    for i, pair in enumerate(raw):
        p = f"{path}[{i}]"
        if not isinstance(pair, list) or len(pair) != 2:
            raise _err(f"expected a [temperature, viscosity] pair, got {pair!r}", p, source)
        t = _value(pair[0], _F("temperature", "pos"), p, source)
        nu = _value(pair[1], _F("kinematic_viscosity", "pos"), p, source)
        out.append((t, nu))
    temps = [t for t, _ in out]
    if len(set(temps)) != len(temps):
        raise _err("two points at the same temperature", path, source)
    return tuple(out)


def _simple(data, spec, path, source, default):
    _table(data, spec, path, source)
    return dataclasses.replace(default, **_read(data, spec, path, source))


def _ambient(data, source):
    a = _simple(data, _AMBIENT, "ambient", source, m.Ambient())
    if a.temperature > a.temperature_max:
        raise _err("the typical temperature is above temperature_max",
                   "ambient.temperature", source)
    return a


def _reservoir(data, source):
    path = "reservoir"
    _table(data, _RESERVOIR, path, source)
    vals = _read(data, _RESERVOIR, path, source, skip=("surfaces",))
    surfaces = []
    if "surfaces" in data:
        items = _array(data["surfaces"], "reservoir.surfaces", source)
        names = set()
        for i, item in enumerate(items):
            p = f"reservoir.surfaces[{i}]"
            _table(item, _SURFACE, p, source)
            s = m.Surface(**_read(item, _SURFACE, p, source))
            if s.name in names:
                raise _err(f"duplicate surface name {s.name!r}", f"{p}.name", source)
            names.add(s.name)
            surfaces.append(s)
    r = dataclasses.replace(m.Reservoir(), **vals, surfaces=tuple(surfaces))
    tank = r.length * r.width * r.height
    if tank < MIN_OIL_VOLUME:
        raise _err(f"the tank's outside dimensions hold {tank * 1e3:.3g} L, below the least "
                   f"oil of a compact power unit (0.1 L); check the units",
                   "reservoir.length", source)
    if r.oil_volume > tank * (1 + 1e-12):
        given = ", ".join(k for k in ("length", "width", "height") if k in vals)
        dims = ("its dimensions" if given else "the default dimensions") + (
            f" {r.length:g} x {r.width:g} x {r.height:g} m")
        raise _err(f"{r.oil_volume * 1e3:.4g} L of oil cannot be in a tank of "
                   f"{tank * 1e3:.4g} L ({dims}); check the unit or give the tank's "
                   f"length, width and height", "reservoir.oil_volume", source)
    return r


def _power_unit(data, source):
    _table(data, {k: _F("table") for k in _POWER_UNIT}, "power_unit", source)
    base = m.PowerUnit()
    parts = {}
    for key, spec in _POWER_UNIT.items():
        if key in data:
            parts[key] = _simple(data[key], spec, f"power_unit.{key}", source,
                                 getattr(base, key))
    pu = dataclasses.replace(base, **parts)
    if not pu.pump.viscosity_min < pu.pump.viscosity_max:
        raise _err("viscosity_min must be below viscosity_max",
                   "power_unit.pump.viscosity_min", source)
    if pu.check_valve.pressure_drop < pu.check_valve.cracking_pressure:
        raise _err("the drop at rated flow includes the cracking pressure, so it "
                   "cannot be smaller", "power_unit.check_valve.pressure_drop", source)
    for key in ("pressure_line", "return_line"):
        line = getattr(pu, key)
        if line.roughness >= line.inner_diameter:
            raise _err("roughness must be far smaller than the inner diameter",
                       f"power_unit.{key}.roughness", source)
    return pu


def _actuators(data, source):
    items = _array(data, "actuators", source)
    if not items:
        raise _err("at least one actuator is needed", "actuators", source)
    out, names = [], set()
    for i, item in enumerate(items):
        p = f"actuators[{i}]"
        kind = item.get("kind") if isinstance(item, dict) else None
        spec = _HYDRAULIC_MOTOR if kind == "motor" else _CYLINDER
        if kind is not None:
            _value(kind, spec["kind"], f"{p}.kind", source)
        _table(item, spec, p, source)
        vals = _read(item, spec, p, source, skip=("kind",))
        if vals["name"] in names:
            raise _err(f"duplicate actuator name {vals['name']!r}", f"{p}.name", source)
        names.add(vals["name"])
        if kind == "motor":
            out.append(m.HydraulicMotor(**vals))
        else:
            if not vals["rod"] < vals["bore"]:
                raise _err(f"the rod ({_show(item['rod'])}) must be smaller than the "
                           f"bore ({_show(item['bore'])})", f"{p}.rod", source)
            from heatload.actuators import cylinder_areas

            cap, annulus = (float(a) for a in cylinder_areas(vals["bore"], vals["rod"]))
            if cap > MAX_AREA_RATIO * annulus:
                raise _err(f"a rod of {_show(item['rod'])} in a {_show(item['bore'])} bore "
                           f"leaves an annulus of {100 * annulus / cap:.3g} % of the bore "
                           f"area (area ratio {cap / annulus:.4g}); a cylinder's area ratio "
                           f"is at most {MAX_AREA_RATIO:g} (d/D about 0.95)", f"{p}.rod", source)
            out.append(m.Cylinder(**vals))
    return tuple(out)


_CYLINDER_MOTIONS = ("extend", "retract", "hold")
_MOTOR_MOTIONS = ("run", "hold")


def _phases(data, actuators, source):
    items = _array(data, "phases", source)
    if not items:
        raise _err("the duty cycle needs at least one phase", "phases", source)
    if len(items) > MAX_PHASES:
        raise _err(f"{len(items)} phases; a duty cycle has at most {MAX_PHASES} (merge "
                   f"repeated steps into one phase with their total duration)", "phases", source)
    by_name = {a.name: a for a in actuators}
    out, names = [], set()
    for i, item in enumerate(items):
        out.append(_phase(item, i, by_name, source))
        if out[-1].name in names:
            raise _err(f"duplicate phase name {out[-1].name!r}", f"phases[{i}].name",
                       source)
        names.add(out[-1].name)
    return tuple(out)


def _repeats(data, phases, source) -> tuple:
    """``[[repeats]]``: blocks of consecutive phases run *count* times per cycle."""
    items = _array(data, "repeats", source)
    names = [p.name for p in phases]
    taken = [None] * len(names)
    out = []
    for i, item in enumerate(items):
        p = f"repeats[{i}]"
        _table(item, _REPEAT, p, source)
        vals = _read(item, _REPEAT, p, source)
        for key in ("first", "last"):
            if key in vals and vals[key] not in names:
                raise _err(f"no phase called {vals[key]!r}{_suggest(vals[key], names)}",
                           f"{p}.{key}", source)
        first = vals["first"]
        last = vals.get("last", first)
        a, b = names.index(first), names.index(last)
        if b < a:
            raise _err(f"{last!r} comes before {first!r} in [[phases]]; a block runs from "
                       f"its first phase to its last", f"{p}.last", source)
        count = vals["count"]
        if count != int(count):
            raise _err(f"count must be a whole number of passes, not {count:g}",
                       f"{p}.count", source)
        for j in range(a, b + 1):
            if taken[j] is not None:
                raise _err(f"phase {names[j]!r} is already in repeats[{taken[j]}]; blocks "
                           f"may not overlap", f"{p}.first", source)
            taken[j] = i
        out.append(m.Repeat(first=first, last=last, count=int(count)))
    return tuple(out)


#: Keys of a further motion in a phase (``[[phases.simultaneous]]``).
_MOTION = {k: _PHASE[k] for k in ("actuator", "load", "speed", "hold_pressure",
                                  "hold_force", "compress", "regeneration")}
_MOTION["actuator"] = _F("str", "nonempty", required=True)
_MOTION["motion"] = _F("choice", choices=("extend", "retract", "run", "hold"), required=True)


def _named_actuator(item, by_name, p, source):
    """The actuator *item* names (``<p>.actuator``); a one-line error naming
    the choices when there is none of that name."""
    aname = _value(item["actuator"], _PHASE["actuator"], f"{p}.actuator", source)
    act = by_name.get(aname)
    if act is None:
        raise _err(f"no actuator called {aname!r} (actuators: "
                   f"{', '.join(by_name)}){_suggest(aname, by_name)}",
                   f"{p}.actuator", source)
    return act


def _simultaneous(items, phase, p, by_name, source) -> tuple:
    """``[[phases.simultaneous]]``: further actuators' motions in phase *phase*
    (its own motion read already), on the same supply."""
    if not isinstance(items, list) or not all(isinstance(x, dict) for x in items):
        raise _err("expected an array of tables, written as [[phases.simultaneous]] items",
                   f"{p}.simultaneous", source)
    if items and (phase.motion not in ("extend", "retract", "run") or phase.speed is None):
        raise _err("a phase with simultaneous motions needs its own motion at a set speed "
                   "(the motions share the pump by their set flows)", f"{p}.speed", source)
    out, seen = [], {phase.actuator}
    for j, item in enumerate(items):
        q = f"{p}.simultaneous[{j}]"
        _table(item, _MOTION, q, source)
        act = _named_actuator(item, by_name, q, source)
        aname = act.name
        if aname in seen:
            raise _err(f"{aname!r} already moves in this phase; an actuator makes one "
                       f"motion at a time", f"{q}.actuator", source)
        seen.add(aname)
        motion = _value(item["motion"], _MOTION["motion"], f"{q}.motion", source)
        is_motor = act.kind == "motor"
        allowed = _MOTOR_MOTIONS if is_motor else _CYLINDER_MOTIONS
        if motion not in allowed:
            raise _err(f"a {act.kind} cannot {motion}; use one of {', '.join(allowed)}",
                       f"{q}.motion", source)
        vals = {"actuator": aname, "motion": motion}
        if "load" in item:
            vals["load"] = _value(item["load"], _MOTION["load"], f"{q}.load", source,
                                  kind="torque" if is_motor else "force")
        if motion == "hold":
            if "speed" in item:
                raise _err("a hold has no speed", f"{q}.speed", source)
        elif "speed" not in item or item["speed"] == "full":
            raise _err(f"give the {motion} motion its set speed (m/s, or rpm for a motor): "
                       f"simultaneous motions share the pump by their set flows",
                       f"{q}.speed", source)
        else:
            vals["speed"] = _value(item["speed"], _MOTION["speed"], f"{q}.speed", source,
                                   kind="shaft_speed" if is_motor else "velocity")
        for key in ("hold_pressure", "hold_force", "compress", "regeneration"):
            if key in item:
                vals[key] = _value(item[key], _MOTION[key], f"{q}.{key}", source)
        for key in ("hold_pressure", "hold_force"):
            if key in vals and motion != "hold":
                raise _err(f"only a hold has {key}", f"{q}.{key}", source)
        if "hold_pressure" in vals and "hold_force" in vals:
            raise _err("give hold_pressure or hold_force, not both", f"{q}.hold_force",
                       source)
        if "hold_force" in vals and is_motor:
            raise _err("a motor holds a torque (load) or a pressure, not a force",
                       f"{q}.hold_force", source)
        if vals.get("regeneration") and (is_motor or motion != "extend"):
            raise _err("only an extending cylinder can regenerate (its rod side joined to "
                       "the cap side)", f"{q}.regeneration", source)
        out.append(m.Motion(**vals))
    return tuple(out)


def _phase(item, i, by_name, source):
    p = f"phases[{i}]"
    if isinstance(item, dict) and "simultaneous" in item:
        # further motions at the same time, on the same supply: read after the phase
        together = item["simultaneous"]
        item = {k: v for k, v in item.items() if k != "simultaneous"}
        phase = _phase(item, i, by_name, source)
        motions = _simultaneous(together, phase, p, by_name, source)
        return dataclasses.replace(phase, simultaneous=motions)
    _table(item, _PHASE, p, source)
    motion = _value(item["motion"], _PHASE["motion"], f"{p}.motion", source)
    name = _value(item["name"], _PHASE["name"], f"{p}.name", source)
    act = None
    if motion == "idle":
        for key in ("actuator", "load", "speed", "stroke", "hold_pressure", "hold_force"):
            if key in item:
                raise _err("an idle phase moves no actuator; leave this key out",
                           f"{p}.{key}", source)
    else:
        if "actuator" not in item:
            raise _err(f"a {motion} phase needs the actuator it drives", f"{p}.actuator",
                       source)
        act = _named_actuator(item, by_name, p, source)
        allowed = _MOTOR_MOTIONS if act.kind == "motor" else _CYLINDER_MOTIONS
        if motion not in allowed:
            raise _err(f"a {act.kind} cannot {motion}; use one of {', '.join(allowed)}",
                       f"{p}.motion", source)
    is_motor = act is not None and act.kind == "motor"
    vals = {"name": name, "motion": motion, "actuator": act.name if act else None}
    if "load" in item:
        vals["load"] = _value(item["load"], _PHASE["load"], f"{p}.load", source,
                              kind="torque" if is_motor else "force")
    if "speed" in item:
        if motion in ("hold", "idle"):
            raise _err(f"a {motion} phase has no speed", f"{p}.speed", source)
        if item["speed"] != "full":
            vals["speed"] = _value(item["speed"], _PHASE["speed"], f"{p}.speed", source,
                                   kind="shaft_speed" if is_motor else "velocity")
    for key in ("stroke", "duration", "hold_pressure", "hold_force", "unloading",
                "compress", "regeneration"):
        if key in item:
            vals[key] = _value(item[key], _PHASE[key], f"{p}.{key}", source)
    if vals.get("regeneration") and (is_motor or motion != "extend"):
        raise _err("only an extending cylinder can regenerate (its rod side joined to the "
                   "cap side)", f"{p}.regeneration", source)
    if "stroke" in vals:
        if is_motor or motion not in ("extend", "retract"):
            raise _err("only an extending or retracting cylinder has a stroke; give a "
                       "duration", f"{p}.stroke", source)
        if vals["stroke"] > act.stroke * (1 + 1e-12):
            raise _err(f"{_show(item['stroke'])} is longer than the stroke of "
                       f"{act.name!r}", f"{p}.stroke", source)
    if motion in ("extend", "retract") and "stroke" not in vals and "duration" not in vals:
        article = "an" if motion == "extend" else "a"
        raise _err(f"{article} {motion} phase needs a stroke or a duration", f"{p}.stroke",
                   source)
    if motion in ("hold", "idle", "run") and "duration" not in vals:
        raise _err(f"a {motion} phase needs a duration", f"{p}.duration", source)
    for key in ("hold_pressure", "hold_force"):
        if key in vals and motion != "hold":
            raise _err(f"only a hold phase has {key}", f"{p}.{key}", source)
    if "hold_pressure" in vals and "hold_force" in vals:
        raise _err("give hold_pressure or hold_force, not both", f"{p}.hold_force", source)
    if "hold_force" in vals and is_motor:
        raise _err("a motor holds a torque (load) or a pressure, not a force",
                   f"{p}.hold_force", source)
    return m.Phase(**vals)


def _strategies(data, defaults: dict, source):
    if data is None:
        return tuple(m.Strategy(kind=k, parameters=m.StrategyParameters(**defaults))
                     for k in m.STRATEGIES)
    items = _array(data, "strategies", source)
    if not items:
        raise _err("leave out [[strategies]] to compare all of them, or list at least one",
                   "strategies", source)
    out, names = [], set()
    for i, item in enumerate(items):
        p = f"strategies[{i}]"
        _table(item, _STRATEGY, p, source)
        vals = _read(item, _STRATEGY, p, source)
        kind = vals.pop("kind")
        label = vals.pop("label", None)
        params = _parameters({**defaults, **vals}, p, source)
        s = m.Strategy(kind=kind, label=label, parameters=params)
        if s.name in names:
            raise _err(f"two strategies are called {s.name!r}; give a distinct label",
                       f"{p}.label", source)
        names.add(s.name)
        out.append(s)
    return tuple(out)


def _parameters(vals: dict, path: str, source) -> m.StrategyParameters:
    params = m.StrategyParameters(**vals)
    if not params.min_speed_fraction < params.max_speed_fraction:
        raise _err("min_speed_fraction must be below max_speed_fraction",
                   f"{path}.min_speed_fraction", source)
    if not params.high_pressure_fraction < 1.0:
        raise _err("high_pressure_fraction must be below 1 (the large pump's share is "
                   "what is left)", f"{path}.high_pressure_fraction", source)
    lo, hi, pre = (params.accumulator_pressure_min, params.accumulator_pressure_max,
                   params.accumulator_precharge)
    if lo is not None and hi is not None and not lo < hi:
        raise _err("accumulator_pressure_min must be below accumulator_pressure_max",
                   f"{path}.accumulator_pressure_min", source)
    if pre is not None and lo is not None and pre > lo:
        raise _err("accumulator_precharge must not exceed accumulator_pressure_min (the "
                   "bladder would bottom out inside the working range)",
                   f"{path}.accumulator_precharge", source)
    return params


_SHIFT_KEYS = ("hours_per_shift", "shifts_per_day", "days_per_week")


def _economics(data, strategies, source, shift_given=False):
    e = _simple(data, _ECONOMICS, "economics", source, m.Economics())
    given = [k for k in _SHIFT_KEYS if k in data]
    if given or "weeks_per_year" in data:
        missing = [k for k in _SHIFT_KEYS if k not in data]
        if missing:
            raise _err(f"a shift pattern needs {', '.join(_SHIFT_KEYS)}; "
                       f"{missing[0]} is missing", f"economics.{missing[0]}", source)
        if "hours_per_year" in data:
            raise _err("give hours_per_year or a shift pattern (hours_per_shift, "
                       "shifts_per_day, days_per_week), not both",
                       "economics.hours_per_year", source)
        if shift_given:
            raise _err("with a shift pattern the warm-up runs over one day's hours from "
                       "cold; leave shift_duration out", "scenario.shift_duration", source)
        if e.hours_per_shift * e.shifts_per_day > 24.0 * (1 + 1e-12):
            raise _err(f"{e.hours_per_shift:g} h x {e.shifts_per_day:g} shifts is more than "
                       f"a day (24 h)", "economics.shifts_per_day", source)
        e = dataclasses.replace(e, hours_per_year=m.shift_hours(e)[0])
    if e.present_strategy is not None:
        names = [s.name for s in strategies] + [s.kind for s in strategies]
        if e.present_strategy not in names:
            raise _err(f"{e.present_strategy!r} is not among the strategies "
                       f"({', '.join(s.name for s in strategies)})"
                       f"{_suggest(e.present_strategy, names)}",
                       "economics.present_strategy", source)
    return e


# ---------------------------------------------------------------------------
# Uncertain inputs: field paths of the one grammar (heatload.paths)
# ---------------------------------------------------------------------------

def _path_ref(path: str, scenario: m.Scenario, field: str, source):
    """Resolve an uncertainty *path* by :func:`heatload.paths.resolve_path` (the
    grammar sweeps and the Monte Carlo read), so a file that loads never names a
    path they cannot vary; the error names the file's field."""
    from heatload import paths

    try:
        return paths.resolve_path(scenario, path)
    except HeatloadError as e:
        raise _err(e.message, field, source) from None


_PERCENT = re.compile(r"^\s*([+-]?\d+(?:\.\d*)?(?:[eE][+-]?\d+)?)\s*%\s*$")


def _uncertainty(data, scenario: m.Scenario, source):
    items = _array(data, "uncertainty", source)
    out = []
    for i, item in enumerate(items):
        p = f"uncertainty[{i}]"
        _table(item, _UNCERTAINTY, p, source)
        path = _value(item["path"], _UNCERTAINTY["path"], f"{p}.path", source)
        relative = _value(item.get("relative", True), _UNCERTAINTY["relative"],
                          f"{p}.relative", source)
        dist = _value(item.get("distribution", "uniform"), _UNCERTAINTY["distribution"],
                      f"{p}.distribution", source)
        ref = _path_ref(path, scenario, f"{p}.path", source)
        kind, nominal = ref.kind, ref.nominal
        if relative and all(v is None for v in nominal):
            raise _err(f"{path!r} has no value to scale; give absolute bounds with "
                       "relative = false", f"{p}.relative", source)
        if not relative and kind is None:
            raise _err(f"{path!r} mixes cylinders and motors; use relative bounds",
                       f"{p}.relative", source)
        vals = {}
        for key in ("low", "high", "mode"):
            if key not in item:
                continue
            raw = item[key]
            fp = f"{p}.{key}"
            if relative:
                mt = _PERCENT.match(raw) if isinstance(raw, str) else None
                if mt:
                    vals[key] = 1.0 + float(mt.group(1)) / 100.0
                elif isinstance(raw, (int, float)) and not isinstance(raw, bool):
                    vals[key] = _value(raw, _F("dimensionless"), fp, source)
                else:
                    raise _err(f"expected a factor such as 0.9 or a percentage such as "
                               f"'-10 %', got {_show(raw)}", fp, source)
            else:
                vals[key] = _value(raw, _F(kind), fp, source)
        u = m.UncertainInput(path=path, distribution=dist, relative=relative, **vals)
        if not u.low < u.high:
            raise _err("low must be below high", f"{p}.high", source)
        if u.mode is not None and not u.low <= u.mode <= u.high:
            raise _err("mode must lie between low and high", f"{p}.mode", source)
        if u.mode is not None and dist != "triangular":
            raise _err("only a triangular distribution has a mode", f"{p}.mode", source)
        out.append(u)
    return tuple(out)


# ---------------------------------------------------------------------------
# Public reading API
# ---------------------------------------------------------------------------

def scenario_from_dict(data: dict, source: str = "<dict>") -> m.Scenario:
    """Build and validate a :class:`~heatload.model.Scenario` from parsed TOML.

    Parameters
    ----------
    data : dict
        The file's content as ``tomllib`` returns it (strings with units).
    source : str
        File name (or ``"<string>"``) for error messages.

    Returns
    -------
    Scenario
        Every value converted to SI [Pa, m^3/s, m, N, K, s, ...].

    Raises
    ------
    HeatloadError
        The first invalid, missing or unknown entry, naming its field path.
    """
    if not isinstance(data, dict):
        raise _err("expected a table of sections", None, source)
    _table(data, {k: _F("table") for k in _TOP}, "", source)
    for key in ("scenario", "actuators", "phases"):
        if key not in data:
            what = f"[{key}]" if key == "scenario" else f"[[{key}]]"
            raise _err(f"missing required section {what}", key, source)
    _table(data["scenario"], _SCENARIO, "scenario", source)
    head = _read(data["scenario"], _SCENARIO, "scenario", source)
    fluid = _fluid(data["fluid"], source) if "fluid" in data else m.Fluid()
    ambient = _ambient(data["ambient"], source) if "ambient" in data else m.Ambient()
    reservoir = (_reservoir(data["reservoir"], source) if "reservoir" in data
                 else m.Reservoir())
    power_unit = (_power_unit(data["power_unit"], source) if "power_unit" in data
                  else m.PowerUnit())
    actuators = _actuators(data["actuators"], source)
    phases = _phases(data["phases"], actuators, source)
    defaults = {}
    if "strategy_defaults" in data:
        _table(data["strategy_defaults"], _PARAMETERS, "strategy_defaults", source)
        defaults = _read(data["strategy_defaults"], _PARAMETERS, "strategy_defaults",
                         source)
        _parameters(defaults, "strategy_defaults", source)
    strategies = _strategies(data.get("strategies"), defaults, source)
    economics = (_economics(data["economics"], strategies, source,
                            "shift_duration" in data["scenario"])
                 if "economics" in data else m.Economics())
    pattern = m.shift_hours(economics)
    if pattern is not None:
        head["shift_duration"] = pattern[1] * 3600.0   # cold start each day
    cooler = (_simple(data["cooler"], _COOLER, "cooler", source, m.CoolerDesign())
              if "cooler" in data else m.CoolerDesign())
    # datasheet coolers: their format lives with their physics
    from heatload.cooler_datasheet import coolers_from_toml
    coolers = coolers_from_toml(data["coolers"], source) if "coolers" in data else ()
    scenario = m.Scenario(name=head["name"], phases=phases, actuators=actuators,
                          strategies=strategies, fluid=fluid, ambient=ambient,
                          reservoir=reservoir, power_unit=power_unit, economics=economics,
                          cooler=cooler, coolers=coolers,
                          **{k: v for k, v in head.items() if k != "name"})
    if "repeats" in data:
        scenario = dataclasses.replace(scenario,
                                       repeats=_repeats(data["repeats"], phases, source))
    if "uncertainty" in data:
        scenario = dataclasses.replace(
            scenario, uncertainty=_uncertainty(data["uncertainty"], scenario, source))
    _check_phase_durations(scenario, source)
    _check_cooler_design(scenario, "cooler" in data and "oil_temperature_max" in data["cooler"],
                         source)
    return scenario


def _celsius(t: float) -> str:
    return f"{t - 273.15:.4g} °C"


def _check_phase_durations(scenario: m.Scenario, source: str) -> None:
    """Refuse a phase longer than :data:`MAX_PHASE_DURATION`, however it arises:
    a stroke at a crawling set speed, or at the full flow of a tiny pump.  The
    durations are the solver's own (:func:`heatload.cycle.phase_arrays`)."""
    from heatload import cycle

    durations = cycle.phase_arrays(scenario)["duration"]
    for i, (ph, t) in enumerate(zip(scenario.phases, durations)):
        if t <= MAX_PHASE_DURATION:
            continue
        span = (f"{t / 86400:.3g} days" if t < 365.25 * 86400
                else f"{t / (365.25 * 86400):.3g} years")
        at = ("at its set speed" if ph.speed is not None
              else "at the full pump flow")
        raise _err(f"the stroke of {ph.stroke * 1e3:.4g} mm {at} ({ph.stroke / t:.3g} "
                   f"m/s) takes {span}; a phase lasts at most 24 h (check the unit of the "
                   f"{'speed' if ph.speed is not None else 'pump displacement'})",
                   f"phases[{i}].{'speed' if ph.speed is not None else 'stroke'}", source)
    _check_simultaneous_travel(scenario, durations, source)


def _check_simultaneous_travel(scenario: m.Scenario, durations, source: str) -> None:
    """Refuse a simultaneous cylinder motion that would travel beyond its
    cylinder's stroke in the phase (it runs for the whole phase at its set speed)."""
    for i, (ph, t) in enumerate(zip(scenario.phases, durations)):
        for j, x in enumerate(ph.simultaneous):
            act = scenario.actuator(x.actuator)
            if act.kind == "motor" or x.speed is None:
                continue
            if x.speed * t > act.stroke * (1 + 1e-9):
                raise _err(f"at its set speed the {x.motion} motion travels "
                           f"{x.speed * t * 1e3:.4g} mm in the phase's {t:.3g} s, more than "
                           f"the {act.stroke * 1e3:.4g} mm stroke of {act.name!r} (it moves "
                           f"for the whole phase: lower its speed or split the phase)",
                           f"phases[{i}].simultaneous[{j}].speed", source)


def _check_cooler_design(scenario: m.Scenario, design_given: bool, source: str) -> None:
    """Refuse a design point no cooler of the chosen coolant can hold: air cannot
    cool the oil below the hottest air (ETD = T_oil - T_air must be positive), and
    water cannot cool it below the water's inlet temperature."""
    cd = scenario.cooler
    t_d = m.design_oil_temperature(scenario.fluid, cd)
    what = ("the design oil temperature" if design_given
            else f"the design oil temperature (the fluid's limit less "
                 f"{m.DESIGN_TEMPERATURE_HEADROOM:g} K)")
    where = "cooler.oil_temperature_max" if design_given else "fluid.temperature_max"
    refused = cooler_type(cd.coolant).refusal(t_d, scenario.ambient.temperature_max, cd,
                                              what, where)
    if refused:
        raise _err(refused[0], refused[1], source)


_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\[\]]+?)\s*\]\]?\s*(?:#.*)?$")
_KEYLINE = re.compile(r"^\s*([A-Za-z0-9_\-]+|\"[^\"]*\")\s*=")


def _key_lines(text: str) -> dict:
    """Map field paths (``phases[2].speed``) to 1-based line numbers by a
    simple scan of the TOML text (headers and ``key =`` lines)."""
    lines: dict = {}
    counts: dict = {}
    current = ""
    in_multiline = None
    for n, line in enumerate(text.splitlines(), 1):
        if in_multiline:
            if in_multiline in line:
                in_multiline = None
            continue
        mt = _HEADER.match(line)
        if mt:
            name = ".".join(p.strip().strip('"') for p in mt.group(2).split("."))
            if mt.group(1) == "[[":
                i = counts.get(name, 0)
                counts[name] = i + 1
                # a nested array (reservoir.surfaces) belongs to its parent table
                current = f"{name}[{i}]"
            else:
                current = name
            lines.setdefault(current, n)
            continue
        mt = _KEYLINE.match(line)
        if mt:
            key = mt.group(1).strip('"')
            lines.setdefault(f"{current}.{key}" if current else key, n)
            rest = line[mt.end():]
            for quote in ('"""', "'''"):
                if rest.count(quote) == 1:
                    in_multiline = quote
    return lines


def _line_of(field: str | None, lines: dict) -> int | None:
    path = field or ""
    while path:
        if path in lines:
            return lines[path]
        cut = max(path.rfind("."), path.rfind("["))
        path = path[:cut] if cut > 0 else ""
    return None


#: Most phases in one duty cycle: far beyond a real machine's cycle, and it
#: bounds the results a browser session carries.
MAX_PHASES = 200

#: Longest line accepted: no real key or value needs more, and it keeps the
#: TOML parser fast on adversarial keys (its cost grows with a key's parts).
MAX_LINE_CHARS = 10_000

#: Longest duty-cycle text accepted (a real file is a few kB; this stops a
#: huge upload or a wrong file from tying up the parser).
MAX_FILE_CHARS = 1_000_000


def loads_scenario(text: str, source: str = "<string>") -> m.Scenario:
    """Parse and validate a duty-cycle file's text.

    Parameters
    ----------
    text : str
        TOML text in the schema of :data:`SCHEMA_EXAMPLE`.
    source : str
        Name shown at the start of every error message.

    Returns
    -------
    Scenario

    Raises
    ------
    HeatloadError
        TOML syntax errors (with the line), and every validation error of
        :func:`scenario_from_dict`, located at the line of the offending key
        where a scan of the text finds it.
    """
    import tomllib

    if len(text) > MAX_FILE_CHARS:
        raise HeatloadError(f"the file is {len(text):,} characters long; a duty-cycle file "
                            f"is at most {MAX_FILE_CHARS:,}", file=source)
    for number, line in enumerate(text.split("\n"), 1):
        if len(line) > MAX_LINE_CHARS:
            raise HeatloadError(f"line of {len(line):,} characters; at most {MAX_LINE_CHARS:,}",
                                file=source, line=number)
    try:
        data = tomllib.loads(text)
    except RecursionError:
        raise HeatloadError("TOML nested too deeply to be a duty-cycle file",
                            file=source) from None
    except tomllib.TOMLDecodeError as e:
        msg = str(e)
        mt = re.search(r"at line (\d+)", msg)
        line = getattr(e, "lineno", None) or (int(mt.group(1)) if mt else None)
        raise HeatloadError(f"TOML syntax error: {msg}", file=source, line=line) from None
    try:
        return scenario_from_dict(data, source)
    except HeatloadError as e:
        raise e.located(file=source, line=e.line or _line_of(e.field, _key_lines(text))) \
            .named_from(data) from None


def load_scenario(path) -> m.Scenario:
    """Read, parse and validate a duty-cycle file.

    Parameters
    ----------
    path : str or os.PathLike
        The ``.toml`` file.

    Returns
    -------
    Scenario

    Raises
    ------
    HeatloadError
        A missing or unreadable file, bytes that are not UTF-8 (with the
        line), TOML syntax errors and every validation error, each starting
        with the file name.
    """
    source = str(path)
    try:
        st = Path(path).stat()
        if not stat.S_ISREG(st.st_mode):
            # a FIFO or a device would block or never end: only regular files are read
            raise HeatloadError("not a regular file (a duty-cycle file is a .toml file)",
                                file=source)
        size = st.st_size
        if size > MAX_FILE_CHARS * 4:
            raise HeatloadError(f"the file is {size:,} bytes; a duty-cycle file is at most "
                                f"{MAX_FILE_CHARS:,} characters", file=source)
        raw = Path(path).read_bytes()
    except OSError as e:
        raise HeatloadError(f"cannot read the file: {e.strerror or e}", file=source) \
            from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as e:
        line = raw[:e.start].count(b"\n") + 1
        raise HeatloadError(f"not UTF-8 text (byte 0x{raw[e.start]:02x}); save the file "
                            "as UTF-8", file=source, line=line) from None
    return loads_scenario(text.removeprefix("\ufeff"), source=source)


def locate_in_file(error: HeatloadError, path) -> HeatloadError:
    """*error* (raised after loading, naming a field of the scenario) with the
    file and the line of that field in *path* filled in, where they can be found."""
    if error.file is not None:
        return error
    try:
        text = Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return error.located(file=str(path))
    return error.located(file=str(path),
                         line=error.line or _line_of(error.field, _key_lines(text)))


# ---------------------------------------------------------------------------
# Writing
# ---------------------------------------------------------------------------

#: Units values are written in, best first; the shortest text that parses
#: back exactly wins, and the SI unit is the last resort.
_WRITE_UNITS = {
    "pressure": ("bar",), "flow": ("L/min",), "length": ("mm", "m"),
    "distance": ("m", "mm"), "area": ("m^2",), "volume": ("L", "m^3"),
    "displacement": ("cm^3",), "velocity": ("m/s", "mm/s"), "shaft_speed": ("rpm",),
    "force": ("kN", "N"), "torque": ("N*m", "kN*m"), "power": ("kW", "W"),
    "time": ("s", "min", "h"), "temperature": ("degC", "K"),
    "temperature_difference": ("K",), "mass": ("kg",), "density": ("kg/m^3",),
    "kinematic_viscosity": ("mm^2/s",), "bulk_modulus": ("GPa", "MPa", "bar"),
    "heat_transfer_coefficient": ("W/(m^2*K)",),
    "specific_heat": ("kJ/(kg*K)", "J/(kg*K)"), "thermal_conductivity": ("W/(m*K)",),
    "expansion_coefficient": ("1/K",), "specific_energy_price": ("1/kWh",),
    "emission_factor": ("kg/kWh",),
}


def _number_text(x: float) -> list:
    seen, out = set(), []
    for digits in (6, 9, 12, 15, 17):
        s = f"{x:.{digits}g}"
        if s not in seen:
            seen.add(s)
            out.append(s)
    r = repr(float(x))
    if r not in seen:
        out.append(r)
    return out


def _unit_text(unit: str, kind: str) -> str:
    if kind == "displacement":
        return f"{unit}/rev"
    if unit.startswith("1/") and kind in ("specific_energy_price",):
        return unit[1:]
    return unit


@lru_cache(maxsize=8192)
def _format(value: float, kind: str) -> str:
    """The shortest '<number> <unit>' text that parses back to exactly *value*."""
    si = KINDS[kind].si
    best = None
    for unit in _WRITE_UNITS.get(kind, ()):
        x = float(from_si(value, kind, unit))
        for s in _number_text(x):
            text = f"{s} {_unit_text(unit, kind)}"
            if best is not None and len(text) >= len(best):
                break
            try:
                if _to_si_cached(text, kind) == value:
                    best = text
                    break
            except HeatloadError:
                continue
    if best is not None:
        return best
    text = f"{float(value)!r} {_unit_text(si, kind)}"
    if _to_si_cached(text, kind) == value:
        return text
    raise HeatloadError(f"cannot write {value!r} losslessly as {kind}")


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if not math.isfinite(v):
            raise HeatloadError(f"cannot write a non-finite number {v!r}")
        r = repr(v)
        return r if ("." in r or "e" in r or "n" in r) else r + ".0"
    if isinstance(v, str):
        out = ['"']
        for ch in v:
            if ch == '"':
                out.append('\\"')
            elif ch == "\\":
                out.append("\\\\")
            elif ch == "\n":
                out.append("\\n")
            elif ch == "\t":
                out.append("\\t")
            elif ord(ch) < 0x20 or ord(ch) == 0x7F:
                out.append(f"\\u{ord(ch):04x}")
            else:
                out.append(ch)
        out.append('"')
        return "".join(out)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    raise HeatloadError(f"cannot write a value of type {type(v).__name__}")


def _dump_fields(obj, spec: dict, kinds: dict | None = None, skip=()) -> dict:
    out = {}
    for key, f in spec.items():
        if key in skip:
            continue
        v = getattr(obj, key)
        if v is None:
            continue
        kind = (kinds or {}).get(key, f.kind)
        if kind in KINDS and kind != "dimensionless":
            out[key] = _format(float(v), kind)
        elif kind == "dimensionless":
            out[key] = float(v)
        else:
            out[key] = v
    return out


def _dump_motion(x: m.Motion, motor: bool) -> dict:
    """A further motion of a phase as a TOML table (see :func:`_simultaneous`)."""
    item = _dump_fields(x, _MOTION, kinds={"load": "torque" if motor else "force",
                                           "speed": "shaft_speed" if motor else "velocity"})
    if not x.regeneration:
        del item["regeneration"]
    if x.compress:
        del item["compress"]
    return item


def scenario_to_dict(scenario: m.Scenario) -> dict:
    """The scenario as a TOML-ready dict (quantities as strings with units).

    Every field that is not ``None`` is written; the dict loads back with
    :func:`scenario_from_dict` to an equal scenario.
    """
    s = scenario
    d: dict = {"scenario": {"name": s.name, "description": s.description,
                            "shift_duration": _format(s.shift_duration, "time")}}
    for k in ("project", "customer", "prepared_by", "revision"):
        if getattr(s, k):
            d["scenario"][k] = getattr(s, k)
    d["economics"] = _dump_fields(s.economics, _ECONOMICS)
    if s.repeats:
        d["repeats"] = [{"first": r.first, "last": r.last, "count": r.count}
                        for r in s.repeats]
    if m.shift_hours(s.economics) is not None:
        # the pattern gives both: written, they would contradict it on loading
        del d["economics"]["hours_per_year"], d["scenario"]["shift_duration"]
    fluid = _dump_fields(s.fluid, _FLUID, skip=("viscosity_points",))
    if s.fluid.viscosity_points:
        fluid["viscosity_points"] = [[_format(t, "temperature"),
                                      _format(nu, "kinematic_viscosity")]
                                     for t, nu in s.fluid.viscosity_points]
    d["fluid"] = fluid
    d["ambient"] = _dump_fields(s.ambient, _AMBIENT)
    res = _dump_fields(s.reservoir, _RESERVOIR, skip=("surfaces",))
    if s.reservoir.surfaces:
        res["surfaces"] = [_dump_fields(x, _SURFACE) for x in s.reservoir.surfaces]
    d["reservoir"] = res
    d["power_unit"] = {k: _dump_fields(getattr(s.power_unit, k), spec)
                       for k, spec in _POWER_UNIT.items()}
    acts = []
    for a in s.actuators:
        spec = _HYDRAULIC_MOTOR if a.kind == "motor" else _CYLINDER
        acts.append(_dump_fields(a, spec))
    d["actuators"] = acts
    kinds = {a.name: a.kind for a in s.actuators}
    phases = []
    for ph in s.phases:
        motor = kinds.get(ph.actuator) == "motor"
        item = _dump_fields(ph, _PHASE, kinds={
            "load": "torque" if motor else "force",
            "speed": "shaft_speed" if motor else "velocity"})
        if ph.motion == "idle" and ph.load == 0.0:
            del item["load"]               # an idle phase takes no load key
        if not ph.regeneration:
            del item["regeneration"]       # written only where it is set
        if ph.speed is None and ph.motion in ("extend", "retract", "run"):
            item = {k: v for k, v in item.items() if k != "stroke" and k != "duration"
                    and k not in ("hold_pressure", "hold_force", "unloading", "compress")}
            item["speed"] = "full"
            item.update({k: v for k, v in _dump_fields(ph, _PHASE).items()
                         if k in ("stroke", "duration", "hold_pressure", "hold_force",
                                  "unloading", "compress")})
        if ph.simultaneous:
            item["simultaneous"] = [_dump_motion(x, kinds.get(x.actuator) == "motor")
                                    for x in ph.simultaneous]
        phases.append(item)
    d["phases"] = phases
    strategies = []
    for st in s.strategies:
        item = {"kind": st.kind}
        if st.label is not None:
            item["label"] = st.label
        item.update(_dump_fields(st.parameters, _PARAMETERS))
        strategies.append(item)
    d["strategies"] = strategies
    d["cooler"] = _dump_fields(s.cooler, _COOLER)
    unc = []
    for u in s.uncertainty:
        item = {"path": u.path, "distribution": u.distribution}
        if u.relative:
            kind = "dimensionless"
        else:
            kind = _path_ref(u.path, s, "uncertainty.path", None).kind
        for key in ("low", "high", "mode"):
            v = getattr(u, key)
            if v is not None:
                item[key] = float(v) if kind == "dimensionless" else _format(v, kind)
        item["relative"] = u.relative
        unc.append(item)
    if unc:
        d["uncertainty"] = unc
    if s.coolers:
        from heatload.cooler_datasheet import coolers_to_toml
        d["coolers"] = coolers_to_toml(s.coolers)
    return d


def _emit(lines: list, table: dict, path: str) -> None:
    """Write *table* under the header *path*: scalars first, then sub-tables
    and arrays of tables."""
    scalars = {k: v for k, v in table.items()
               if not isinstance(v, dict)
               and not (isinstance(v, list) and v and isinstance(v[0], dict))}
    for k, v in scalars.items():
            lines.append(f"{k} = {_toml_value(v)}")
    for k, v in table.items():
        sub = f"{path}.{k}" if path else k
        if isinstance(v, dict):
            if any(not isinstance(x, dict) for x in v.values()):
                lines.append("")
                lines.append(f"[{sub}]")   # a table of only sub-tables needs no header
            _emit(lines, v, sub)
        elif isinstance(v, list) and v and isinstance(v[0], dict):
            for item in v:
                lines.append("")
                lines.append(f"[[{sub}]]")
                _emit(lines, item, sub)


def dumps_scenario(scenario: m.Scenario) -> str:
    """The scenario as duty-cycle TOML text, lossless on reload.

    Returns
    -------
    str
        Text that :func:`loads_scenario` turns back into an equal scenario.
    """
    # a comment ends at a line break, and TOML allows no control character in one
    shown = "".join(ch if ch.isprintable() else " " for ch in scenario.name)
    lines = [f"# heatload duty-cycle file: {shown}",
             "# Quantities carry their units; see heatload.io.SCHEMA_EXAMPLE for every key."]
    _emit(lines, scenario_to_dict(scenario), "")
    return "\n".join(lines).replace("\n\n\n", "\n\n") + "\n"


def save_scenario(scenario: m.Scenario, path, force: bool = False) -> Path:
    """Write the scenario to *path* atomically.

    The text is checked to load back to an equal scenario and written by
    :func:`heatload.outputs.write_atomic` (a temporary file in the same
    folder moved into place), so a reader never sees half a file.

    Parameters
    ----------
    scenario : Scenario
    path : str or os.PathLike
        Target ``.toml`` file.
    force : bool
        Overwrite an existing file.

    Returns
    -------
    Path
        The written file.

    Raises
    ------
    HeatloadError
        The file exists and *force* is false; the target is a folder, pipe
        or device (even with *force*); the scenario is invalid (it would not
        load back); the folder cannot be written.
    """
    target = Path(path)
    hint = "pass force=True to overwrite it"
    outputs.check_output(target, force=force, hint=hint)
    text = dumps_scenario(scenario)
    if loads_scenario(text, source=str(target)) != scenario:
        raise HeatloadError("the scenario does not survive a write and reload "
                            "unchanged", file=str(target))

    def write(tmp):
        with open(tmp, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
    return outputs.write_atomic(target, write, force=force, hint=hint)


# ---------------------------------------------------------------------------
# Bundled examples
# ---------------------------------------------------------------------------

def _examples_dir() -> Path:
    return Path(__file__).resolve().parents[1] / "duty_cycles"


def default_scenario_path() -> Path:
    """The bundled default machine, ``duty_cycles/forming_press.toml``."""
    return _examples_dir() / "forming_press.toml"


def example_paths() -> list:
    """Every bundled example duty-cycle file, sorted by name."""
    return sorted(_examples_dir().glob("*.toml"))
