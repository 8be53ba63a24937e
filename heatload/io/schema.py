"""The duty-cycle file's schema: every key's kind, unit and plausible range.

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
every key (a test checks it names every key of the field specifications and
loads); the files in ``duty_cycles/`` are fuller examples to copy.

The field specifications (:class:`_F` tables) say how each key is read, and
:func:`_value` is the one input-check helper: it parses a quantity, converts it
to SI and holds it to its sign and plausible range, with a one-line
:class:`~heatload.errors.HeatloadError` naming the field and file.
"""

from __future__ import annotations

import dataclasses
import difflib
import math
from functools import lru_cache

from heatload import model as m
from heatload.errors import HeatloadError
from heatload.cooling.cooler_types import TYPES as COOLER_TYPES
from heatload.units import KINDS, to_si

SCHEMA_EXAMPLE = '''\
# A heatload duty-cycle file.  Quantities are strings with a unit ("160 bar",
# "40 L/min", "35 degC", "1450 rpm"): one number with a decimal point, then the
# unit; efficiencies, counts and factors are plain numbers.  Only [scenario],
# [[actuators]] and [[phases]] are required; every other table and key has the
# default shown here.  Pressures are gauge.

[scenario]
name = "Example press"                 # required, shown in every report
description = "A small press to show every key of the file format."
shift_duration = "8 h"                 # length of a shift, for the warm-up from cold
# heat_calibration = 1.0               # measured / model heat into the oil (heatload
                                       # logfit --scenario): scales every strategy's heat
                                       # into the oil; not the electricity
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
temperature_max = "80 degC"            # the ceiling of the cooler's temperatures below
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
rated_viscosity = "32 mm^2/s"          # ... and this viscosity (inside the window below)
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
friction_force = "500 N"               # seal friction, opposes motion (default 0 N)
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
max_speed = "600 rpm"                  # set speeds of its phases at most this

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
                                       # at most the fluid's temperature_max, and above
                                       # temperature_max of [ambient] for air (ETD > 0)
margin = 0.2                           # +20 % on the duty
coolant = "air"                        # air | water
water_inlet_temperature = "25 degC"    # for water: below the design oil temperature
water_glycol_fraction = 0.0            # ethylene glycol mass fraction
# water_flow = "20 L/min"              # default: from the allowed water rise
water_temperature_rise = "5 K"
air_temperature_rise = "10 K"
oil_pressure_drop_max = "1 bar"
thermostat_on = "45 degC"              # leave out for a cooler that always runs; at most
                                       # the fluid's temperature_max
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
    #: another field of the same scenario (its path) that this one may not exceed
    #: (:func:`ceiling_of`): a design oil temperature above the fluid's own limit;
    #: ``actuator.<key>``: a field of the phase's (or motion's) own actuator
    ceiling: str | None = None


_BAR = 1e5

# Limits where no machine exists (each is documented with its reason in the
# README's "Limits" section and in SCHEMA_EXAMPLE).

#: Air temperatures a site can have [K]: -60 degC is about the coldest air
#: arctic-rated equipment is specified for, +70 degC the air beside hot
#: processes (foundries, furnaces); weather records lie inside (common practice).
AMBIENT_RANGE = (213.15, 343.15)
_AMBIENT_WHY = ("the plausible air temperature range -60 °C .. +70 °C (arctic sites to "
                "hot process halls)")
#: Plausible measured / model heat factor [-]: a model off by more than a factor of
#: five points to a wrong duty cycle or a wrong log, not to losses the model misses.
HEAT_CALIBRATION_RANGE = (0.2, 5.0)
_HEAT_CALIBRATION_WHY = ("the plausible range 0.2 .. 5 of a measured / model heat factor "
                         "(heatload logfit --scenario; dimensionless)")
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
    "heat_calibration": _F("dimensionless", "pos", low=HEAT_CALIBRATION_RANGE[0],
                           high=HEAT_CALIBRATION_RANGE[1], why=_HEAT_CALIBRATION_WHY),
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
    "speed": _F("velocity", "pos", ceiling="actuator.max_speed"),
    "stroke": _F("distance", "pos"),
    "duration": _F("time", "pos"),
    "hold_pressure": _F("pressure", "pos"),
    "hold_force": _F("force", "pos"),
    "unloading": _F("choice", choices=m.UNLOADING),
    "compress": _F("bool"),
    "regeneration": _F("bool"),
}
#: Keys of a further motion in a phase (``[[phases.simultaneous]]``).
_MOTION = {k: _PHASE[k] for k in ("actuator", "load", "speed", "hold_pressure",
                                  "hold_force", "compress", "regeneration")}
_MOTION["actuator"] = _F("str", "nonempty", required=True)
_MOTION["motion"] = _F("choice", choices=("extend", "retract", "run", "hold"), required=True)


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
    "polytropic_exponent": _F("dimensionless", "pos", low=1.0, high=2.0,
                              why="1, isothermal: an accumulator's nitrogen lies between "
                                  "isothermal (1) and adiabatic (1.4; real gas up to about "
                                  "1.7), common practice"),
    "price": _F("dimensionless", "nonneg"),
}
_STRATEGY = {
    "kind": _F("choice", choices=m.STRATEGIES, required=True),
    "label": _F("str", "nonempty"),
    **_PARAMETERS,
}
_COOLER = {
    "oil_temperature_max": _F("temperature", "pos", ceiling="fluid.temperature_max"),
    "margin": _F("dimensionless", "nonneg", high=5.0),
    "coolant": _F("choice", choices=tuple(COOLER_TYPES)),
    "water_inlet_temperature": _F("temperature", "pos"),
    "water_glycol_fraction": _F("dimensionless", "frac", high=0.6),
    "water_flow": _F("flow", "pos"),
    "water_temperature_rise": _F("temperature_difference", "pos"),
    "air_temperature_rise": _F("temperature_difference", "pos"),
    "oil_pressure_drop_max": _F("pressure", "pos"),
    "thermostat_on": _F("temperature", "pos", ceiling="fluid.temperature_max"),
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
    # the kind's magnitude limit, where the field sets no bound of its own on that
    # side (a site's altitude may lie far beyond any machine's length)
    limit = _LIMITS.get(kind)
    if limit is not None and abs(value) > limit[0] and \
            (spec.high if value > 0 else spec.low) is None:
        raise _err(f"{shown} is beyond any plausible machine (limit {limit[1]}); "
                   "check the unit", field, source)
    return value


def allowed_range(spec: _F, kind: str | None = None) -> tuple:
    """The values :func:`_check` lets through, as an interval: ``(low,
    low_open, high, high_open)`` [SI of *kind*] (``-inf`` / ``inf`` where
    unbounded; ``*_open``: the bound itself is refused).

    The same rules as :func:`_check`, read from the same specification: the
    sign rule (``pos`` > 0, ``nonneg`` >= 0, ``eff`` within
    [:data:`MIN_EFFICIENCY`, 1], ``frac`` [0, 1], ``frac_pos`` (0, 1]), a
    temperature above absolute zero, the field's plausible ``low`` / ``high``
    and, on a side where the field sets no bound, its kind's magnitude limit
    (:data:`_LIMITS`).  A field's
    :attr:`_F.ceiling` depends on the scenario and is not included
    (:func:`ceiling_of`).  Field paths (:mod:`heatload.paths`) hold overrides,
    sweeps and Monte Carlo samples to this interval.
    """
    kind = kind or spec.kind
    low, low_open, high, high_open = -math.inf, False, math.inf, False

    def above(x, is_open):
        nonlocal low, low_open
        if x > low or (x == low and is_open):
            low, low_open = x, is_open

    def below(x, is_open):
        nonlocal high, high_open
        if x < high or (x == high and is_open):
            high, high_open = x, is_open
    c = spec.check
    if kind == "temperature" or c in ("pos", "frac_pos"):
        above(0.0, True)
    if c in ("nonneg", "frac"):
        above(0.0, False)
    if c == "eff":
        above(MIN_EFFICIENCY, False)
    if c in ("eff", "frac", "frac_pos"):
        below(1.0, False)
    if spec.low is not None:
        above(spec.low, False)
    if spec.high is not None:
        below(spec.high, False)
    limit = _LIMITS.get(kind)
    if limit is not None:
        if spec.low is None:
            above(-limit[0], False)
        if spec.high is None:
            below(limit[0], False)
    return low, low_open, high, high_open


def ceiling_of(scenario, spec: _F, actuator=None):
    """The value of *spec*'s :attr:`_F.ceiling` field in *scenario* [SI], or None
    where it has none (an ``actuator.`` ceiling is read on *actuator*, the
    phase's or motion's own: a motor's ``max_speed``; a cylinder has none)."""
    if spec.ceiling is None:
        return None
    obj, parts = scenario, spec.ceiling.split(".")
    if parts[0] == "actuator":
        obj, parts = actuator, parts[1:]
    for part in parts:
        obj = getattr(obj, part, None)
    return None if obj is None else float(obj)


def _value(raw, spec: _F, field: str, source: str, kind: str | None = None):
    """Convert and check one raw TOML value according to *spec*."""
    kind = kind or spec.kind
    if kind == "str":
        if not isinstance(raw, str):
            raise _err(f"expected a text in quotes, got {raw!r}", field, source)
        if spec.check == "nonempty" and not raw.strip():
            raise _err("must not be empty", field, source)
        if spec.check == "nonempty" and len(f"{raw}.".splitlines()) > 1:
            # a name is one line: a line break in it would print as a line of its
            # own in tables and warnings (other control characters are shown escaped)
            bad = next(ch for ch in raw if len(f"a{ch}b".splitlines()) > 1)
            raise _err(f"a name is one line; it holds a line break "
                       f"({bad.encode('unicode_escape').decode('ascii')})", field, source)
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
