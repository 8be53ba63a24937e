"""The scenario: a machine's fluid, power unit, actuators, duty cycle and the
control strategies to compare.  Plain frozen dataclasses, SI floats inside.

Every field documents its unit in brackets.  Pressures are gauge [Pa] (tank =
0).  Shaft speeds are [rev/s], displacements [m^3/rev].  ``None`` means "not
given; use the documented default or correlation".

The file format (TOML, units as strings) is read and written by
:mod:`heatload.io`; nothing here parses text.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional



def __getattr__(name):
    # STRATEGIES: the names heatload compares, in the order it shows them, read
    # from the registry (heatload.hydraulics.strategies) when first asked for, so the model
    # stays free of the solver's imports
    if name == "STRATEGIES":
        from heatload.hydraulics.strategies import NAMES
        return NAMES
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")

#: Motions a phase may have.
MOTIONS = ("extend", "retract", "hold", "idle", "run")

#: How the pump is unloaded while no actuator moves (hold and idle phases).
#: ``relief``: the whole pump flow passes the relief valve at its setting;
#: ``centre``: the directional valve's open/tandem centre returns it to tank at low pressure;
#: ``held``: the pump holds the phase's pressure at near-zero flow (variable
#: pumps and variable speed only; a fixed pump falls back to ``relief``).
UNLOADING = ("relief", "centre", "held", "pilot-check")


@dataclass(frozen=True)
class Fluid:
    """The hydraulic fluid.

    Viscosity follows ASTM D341 through two points (``nu40``, ``nu100``) or a
    least-squares fit through ``viscosity_points`` when those are given
    (user-defined fluids such as water-glycol or esters).
    """

    name: str = "ISO VG 46 mineral oil"
    iso_grade: Optional[int] = 46          #: ISO 3448 grade, informative [-]
    nu40: float = 46e-6                    #: kinematic viscosity at 40 degC [m^2/s]
    nu100: float = 6.8e-6                  #: kinematic viscosity at 100 degC [m^2/s]
    viscosity_index: Optional[float] = None  #: given VI (informative when nu100 given) [-]
    density_15C: float = 870.0             #: density at 15 degC, atmospheric [kg/m^3]
    expansion_coefficient: float = 7.0e-4  #: volumetric thermal expansion [1/K]
    bulk_modulus: float = 1.6e9            #: isothermal secant bulk modulus [Pa]
    specific_heat: Optional[float] = None  #: [J/(kg K)]; None -> Cragoe correlation
    thermal_conductivity: Optional[float] = None  #: [W/(m K)]; None -> Cragoe
    temperature_min: float = 253.15        #: lowest allowed oil temperature [K]
    temperature_max: float = 353.15        #: highest allowed oil temperature [K]
    #: user data points ((T [K], nu [m^2/s]), ...); empty -> use nu40/nu100
    viscosity_points: tuple = ()
    kind: str = "mineral"                  #: "mineral" | "water-glycol" | "ester" | "other"


@dataclass(frozen=True)
class Ambient:
    """The room or site around the power unit."""

    temperature: float = 298.15            #: typical ambient air [K]
    temperature_max: float = 313.15        #: highest ambient, the cooler design point [K]
    cold_start_temperature: float = 288.15  #: oil and steel temperature at start of shift [K]
    altitude: float = 0.0                  #: site altitude above sea level [m]


@dataclass(frozen=True)
class Surface:
    """A further surface that sheds heat (pipes, a manifold block, a motor)."""

    name: str
    area: float                            #: outside area [m^2]
    heat_transfer_coefficient: Optional[float] = None  #: [W/(m^2 K)]; None -> natural convection + radiation
    orientation: str = "vertical"          #: "vertical" | "horizontal-up" | "horizontal-down" | "cylinder"
    characteristic_length: float = 0.5    #: height of a wall or diameter of a pipe [m]
    emissivity: float = 0.9                #: [-]


@dataclass(frozen=True)
class Reservoir:
    """The tank: its oil, its steel and the surfaces that shed heat."""

    oil_volume: float = 0.2                #: oil in the tank and circuit [m^3]
    length: float = 1.0                    #: outside length [m]
    width: float = 0.6                     #: outside width [m]
    height: float = 0.5                    #: outside height [m]
    oil_level: float = 0.8                 #: wetted fraction of the walls' height [-]
    steel_mass: float = 150.0              #: steel of tank, pump, manifold, cylinders [kg]
    steel_specific_heat: float = 490.0     #: [J/(kg K)], carbon steel, common practice
    emissivity: float = 0.9                #: painted steel [-]
    #: user value replacing natural convection + radiation [W/(m^2 K)]
    heat_transfer_coefficient: Optional[float] = None
    air_velocity: float = 0.0              #: forced air over the walls (0 = still air) [m/s]
    bottom_exposed: bool = False           #: tank on feet with air below
    surfaces: tuple = ()                   #: further :class:`Surface` items


@dataclass(frozen=True)
class Pump:
    """The pump, with efficiencies at a rated point (datasheet)."""

    kind: str = "fixed"                    #: "fixed" (gear/vane/piston) or "variable"
    type: str = "gear"                     #: "gear" | "vane" | "axial-piston" | "radial-piston"
    displacement: float = 28e-6            #: (maximum) displacement [m^3/rev]
    shaft_speed: float = 1450 / 60         #: nominal shaft speed [rev/s]
    volumetric_efficiency: float = 0.93    #: at the rated point [-]
    hydromechanical_efficiency: float = 0.88  #: at the rated point [-]
    rated_pressure: float = 200e5          #: pressure of the datasheet point [Pa]
    rated_viscosity: float = 32e-6         #: kinematic viscosity of the datasheet point [m^2/s]
    max_pressure: float = 250e5            #: continuous pressure rating [Pa]
    viscosity_min: float = 10e-6           #: lowest allowed viscosity [m^2/s]
    viscosity_max: float = 1000e-6         #: highest allowed (cold start) viscosity [m^2/s]
    #: zero-stroke (standby) loss of a variable pump as a fraction of the
    #: full-flow shaft power at the rated point; None -> the loss model alone
    standby_loss_fraction: Optional[float] = None


@dataclass(frozen=True)
class DriveMotor:
    """The electric motor driving the pump."""

    rated_power: float = 11e3              #: [W]
    efficiency_class: str = "IE3"          #: IEC 60034-30-1 class: IE1..IE4
    poles: int = 4                         #: [-]
    efficiency: Optional[float] = None     #: rated efficiency [-]; None -> class minimum
    drive_efficiency: float = 0.97         #: frequency converter, variable speed only [-]


@dataclass(frozen=True)
class ReliefValve:
    """Main relief valve at the pump outlet."""

    cracking_pressure: float = 180e5       #: [Pa]
    override: float = 10e5                 #: pressure rise from cracking to rated flow [Pa]
    rated_flow: float = 60 / 60000         #: flow at which the override is reached [m^3/s]


@dataclass(frozen=True)
class DirectionalValve:
    """Directional control valve: the drop of each path ~ Q^2."""

    rated_flow: float = 60 / 60000         #: [m^3/s]
    pressure_drop: float = 5e5             #: P->A (and B->T) drop at rated flow [Pa]
    centre: str = "tandem"                 #: "open" | "tandem" | "closed"
    centre_pressure_drop: float = 3e5      #: P->T drop in centre at rated flow [Pa]
    max_pressure: float = 315e5            #: rating [Pa]


@dataclass(frozen=True)
class CheckValve:
    """Check valve in the pump line."""

    cracking_pressure: float = 0.5e5       #: [Pa]
    rated_flow: float = 60 / 60000         #: [m^3/s]
    pressure_drop: float = 1.5e5           #: drop at rated flow, incl. cracking [Pa]


@dataclass(frozen=True)
class Line:
    """A pipe or hose, by Darcy-Weisbach."""

    length: float = 3.0                    #: [m]
    inner_diameter: float = 0.016          #: [m]
    roughness: float = 1.5e-6              #: absolute roughness, drawn steel [m]
    fittings_k: float = 2.0                #: sum of minor-loss coefficients [-]


@dataclass(frozen=True)
class PowerUnit:
    """Pump, motor, valves and lines shared by every strategy."""

    pump: Pump = field(default_factory=Pump)
    motor: DriveMotor = field(default_factory=DriveMotor)
    relief: ReliefValve = field(default_factory=ReliefValve)
    directional_valve: DirectionalValve = field(default_factory=DirectionalValve)
    check_valve: CheckValve = field(default_factory=CheckValve)
    pressure_line: Line = field(default_factory=Line)
    return_line: Line = field(default_factory=lambda: Line(length=3.0, inner_diameter=0.020))


@dataclass(frozen=True)
class Cylinder:
    """A differential cylinder."""

    name: str
    bore: float                            #: piston diameter [m]
    rod: float                             #: rod diameter [m]
    stroke: float                          #: [m]
    friction_force: float = 0.0            #: seal friction, opposes motion [N]
    max_pressure: float = 250e5            #: rating [Pa]
    dead_volume: float = 0.0               #: oil in hoses to the cylinder, each side [m^3]
    #: its own counterbalance valve in the outlet line [Pa]; None -> the strategy's
    counterbalance_setting: Optional[float] = None
    counterbalance_pilot_ratio: float = 3.0  #: of its own counterbalance valve [-]
    #: a back-pressure (counter-force) valve in its outlet line [Pa]; None -> none
    back_pressure: Optional[float] = None
    kind: str = "cylinder"


@dataclass(frozen=True)
class HydraulicMotor:
    """A hydraulic motor."""

    name: str
    displacement: float                    #: [m^3/rev]
    volumetric_efficiency: float = 0.95    #: [-]
    hydromechanical_efficiency: float = 0.92  #: [-]
    max_pressure: float = 250e5            #: rating [Pa]
    max_speed: Optional[float] = None      #: [rev/s]
    #: its own counterbalance (brake) valve in the outlet line [Pa]; None -> the strategy's
    counterbalance_setting: Optional[float] = None
    counterbalance_pilot_ratio: float = 3.0  #: of its own counterbalance valve [-]
    #: a back-pressure (counter-force) valve in its outlet line [Pa]; None -> none
    back_pressure: Optional[float] = None
    kind: str = "motor"


@dataclass(frozen=True)
class Motion:
    """A further actuator's motion in a phase, on the same supply as the
    phase's own (``[[phases.simultaneous]]``).

    It runs for the whole phase (the phase's own motion sets the duration;
    split the phase where a motion ends earlier).  A moving one needs its set
    ``speed`` [m/s] or [rev/s]: the motions share the pump by their set flows.
    A ``hold`` keeps its pressure behind its closed valve section (no flow).
    """

    actuator: str
    motion: str = "extend"                 #: extend | retract | run | hold
    load: float = 0.0                      #: [N] or [N m]
    speed: Optional[float] = None          #: [m/s] or [rev/s]; needed when it moves
    hold_pressure: Optional[float] = None  #: [Pa], a hold
    hold_force: Optional[float] = None     #: [N], a hold
    compress: bool = True                  #: count compression energy of the chamber
    regeneration: bool = False             #: see :attr:`Phase.regeneration`


@dataclass(frozen=True)
class Phase:
    """One step of the duty cycle.

    ``load`` is a force [N] for a cylinder or a torque [N m] for a motor;
    positive opposes the motion, negative overruns (pulls) it.  ``speed`` is
    [m/s] or [rev/s]; ``None`` means the full pump flow.  Give ``stroke``
    [m] (cylinders) or ``duration`` [s]; with both, the duration wins and
    the stroke is checked against it.
    """

    name: str
    actuator: Optional[str] = None         #: name of an actuator; None for idle
    motion: str = "extend"                 #: one of :data:`MOTIONS`
    load: float = 0.0                      #: [N] or [N m]
    speed: Optional[float] = None          #: [m/s] or [rev/s]; None = full pump flow
    stroke: Optional[float] = None         #: [m]
    duration: Optional[float] = None       #: [s]
    hold_pressure: Optional[float] = None  #: pressure to hold in a hold phase [Pa]
    hold_force: Optional[float] = None     #: force to hold (converted with the cap area) [N]
    unloading: str = "centre"              #: one of :data:`UNLOADING`
    compress: bool = True                  #: count compression energy of the chamber
    #: an extending cylinder connected differentially: the rod side's oil joins the
    #: cap side, so speed and force follow the rod area (v = Q / A_rod, F = p A_rod)
    regeneration: bool = False
    #: further actuators' motions at the same time, on the same supply
    #: (:class:`Motion` items; empty: the phase moves one actuator)
    simultaneous: tuple = ()

    @property
    def actuators(self) -> tuple:
        """Names of every actuator the phase drives (its own first)."""
        own = (self.actuator,) if self.actuator else ()
        return own + tuple(m.actuator for m in self.simultaneous)


@dataclass(frozen=True)
class Repeat:
    """A block of consecutive phases (from *first* to *last*, by name) that runs
    *count* times in each cycle, written once.

    A repeated phase's figures cover all its passes (its duration is *count*
    single passes).  Its chamber's compression energy is counted once per pass
    from the pressure of the phase before it in the file: where the block's
    last phase pressurises the same chamber as its first, the passes after the
    first start from that instead (not modelled; small against the cycle)."""

    first: str
    last: str
    count: int = 2                         #: passes of the block per cycle [-]


@dataclass(frozen=True)
class StrategyParameters:
    """Settings of the strategy-specific components.

    Defaults are typical values (common practice); every one can be set per
    strategy in the scenario file.
    """

    flow_control_min_drop: float = 8e5     #: 2-way compensator minimum drop [Pa]
    bypass_spring: float = 8e5             #: 3-way compensator spring, pump above load [Pa]
    compensator_setting: Optional[float] = None  #: PC pump setting [Pa]; None -> relief cracking - 10 bar
    load_sensing_margin: float = 20e5      #: LS pump margin over the highest load [Pa]
    standby_pressure: float = 25e5         #: LS pump standby with no demand [Pa]
    counterbalance_setting: Optional[float] = None  #: [Pa]; None -> no counterbalance valve
    counterbalance_pilot_ratio: float = 3.0  #: pilot ratio of the counterbalance valve [-]
    min_speed_fraction: float = 0.1        #: variable speed: lowest motor speed / nominal [-]
    max_speed_fraction: float = 1.0        #: variable speed: highest / nominal [-]
    #: hi-lo: the small (high-pressure) pump's share of the double pump's displacement [-]
    high_pressure_fraction: float = 0.25
    #: hi-lo: the large pump unloads above this [Pa]; None -> a third of the relief cracking
    unloading_pressure: Optional[float] = None
    #: hi-lo, accumulator: drop of an unloaded pump's flow to tank [Pa] (common practice)
    unloading_valve_drop: float = 3e5
    #: accumulator: lowest working pressure [Pa]; None -> 0.75 x the highest
    accumulator_pressure_min: Optional[float] = None
    #: accumulator: highest working pressure [Pa]; None -> relief cracking - 10 bar
    #: (at least 0.9 x the cracking)
    accumulator_pressure_max: Optional[float] = None
    #: accumulator: gas precharge [Pa]; None -> 0.9 x the lowest working pressure
    accumulator_precharge: Optional[float] = None
    #: accumulator: gas volume at the precharge, its nominal size [m^3]
    accumulator_gas_volume: float = 0.010
    #: accumulator: polytropic exponent of the gas [-] (1 isothermal: slow cycles)
    polytropic_exponent: float = 1.0
    price: Optional[float] = None          #: extra price of this circuit over the cheapest [currency]


@dataclass(frozen=True)
class Strategy:
    """A control strategy to compare, by name, with its parameters."""

    kind: str                              #: a name of :data:`heatload.hydraulics.strategies.REGISTRY`
    label: Optional[str] = None            #: shown name; None -> kind
    parameters: StrategyParameters = field(default_factory=StrategyParameters)

    @property
    def name(self) -> str:
        return self.label or self.kind


@dataclass(frozen=True)
class Economics:
    """Operating hours, energy price and grid emissions."""

    hours_per_year: float = 4000.0         #: machine running hours [h/year]
    #: a shift pattern (all three, or none): hours per shift [h], shifts per day,
    #: running days per week; with it hours_per_year = their product x weeks_per_year,
    #: and the warm-up from cold runs over one day's hours (cold start each day)
    hours_per_shift: Optional[float] = None
    shifts_per_day: Optional[float] = None
    days_per_week: Optional[float] = None
    weeks_per_year: Optional[float] = None  #: None -> 50 with a shift pattern [-]
    electricity_price: float = 0.20 / 3.6e6  #: [currency/J]
    currency: str = "EUR"
    grid_co2_factor: float = 0.35 / 3.6e6  #: [kg/J]
    present_strategy: Optional[str] = None  #: the circuit the machine has now
    service_life: float = 10.0             #: years over which prices are annualised [year]
    interest_rate: float = 0.05            #: for the annualised prices [-/year]


#: Working weeks a year of a shift pattern that gives none (52 less about two
#: of holidays and shutdowns; common practice, from memory).
WEEKS_PER_YEAR = 50.0


def shift_hours(economics: Economics):
    """``(hours per year [h], running hours per day [h])`` of a shift pattern,
    or None when the economics give none.

    .. math::  H_{year} = h_{shift} \, n_{shifts} \, n_{days} \, n_{weeks},
               \qquad H_{day} = h_{shift} \, n_{shifts}
    """
    e = economics
    if e.hours_per_shift is None:
        return None
    weeks = WEEKS_PER_YEAR if e.weeks_per_year is None else e.weeks_per_year
    day = e.hours_per_shift * e.shifts_per_day
    return day * e.days_per_week * weeks, day


@dataclass(frozen=True)
class CoolerDesign:
    """What the cooler sizing aims for."""

    oil_temperature_max: Optional[float] = None  #: design oil temperature [K]; None -> fluid max - 5 K
    margin: float = 0.2                    #: duty margin [-] (0.2 = +20 %)
    coolant: str = "air"                   #: "air" | "water"
    water_inlet_temperature: float = 298.15  #: [K]
    water_glycol_fraction: float = 0.0     #: ethylene glycol mass fraction [-]
    water_flow: Optional[float] = None     #: [m^3/s]; None -> from the allowed rise
    water_temperature_rise: float = 5.0    #: allowed coolant rise [K]
    air_temperature_rise: float = 10.0     #: expected air rise for the air flow [K]
    oil_pressure_drop_max: float = 1.0e5   #: allowed oil-side drop [Pa]
    thermostat_on: Optional[float] = None  #: switch-on oil temperature [K]
    thermostat_hysteresis: float = 5.0     #: [K]
    price_fixed: Optional[float] = None    #: cooler price, fixed part [currency]; None -> heatload.decision default
    price_per_kW: Optional[float] = None   #: cooler price per kW of duty [currency/kW]; None -> default
    fan_power_fraction: Optional[float] = None  #: fan electric power / duty [-]; None -> default


#: The design oil temperature lies this far below the fluid's limit when the
#: scenario gives none [K] (common practice: a few kelvin of headroom for the
#: tank's temperature swing and the thermostat's hysteresis).
DESIGN_TEMPERATURE_HEADROOM = 5.0


def design_oil_temperature(fluid: Fluid, cooler: CoolerDesign) -> float:
    """Oil temperature the cooler must hold on the hottest day [K]:
    ``cooler.oil_temperature_max``, or the fluid's limit less
    :data:`DESIGN_TEMPERATURE_HEADROOM`."""
    if cooler.oil_temperature_max is not None:
        return cooler.oil_temperature_max
    return fluid.temperature_max - DESIGN_TEMPERATURE_HEADROOM


@dataclass(frozen=True)
class UncertainInput:
    """An input the user is unsure of, for the Monte Carlo and the sensitivity ranking.

    ``path`` names a numeric field the way errors do (``"ambient.temperature_max"``,
    ``"power_unit.pump.volumetric_efficiency"``, ``"phases[2].load"``,
    ``"phases[*].duration"`` for every phase, ``"reservoir.heat_transfer_coefficient"``).
    With ``relative`` the bounds are factors on the nominal value (0.9 .. 1.1);
    otherwise SI values of the field's kind.
    """

    path: str
    distribution: str = "uniform"          #: "uniform" | "triangular" | "normal"
    low: float = 0.9                       #: lower bound (normal: 5th percentile)
    high: float = 1.1                      #: upper bound (normal: 95th percentile)
    mode: Optional[float] = None           #: triangular: most likely; None -> midpoint
    relative: bool = True


@dataclass(frozen=True)
class Scenario:
    """A machine and its duty cycle, complete and validated."""

    name: str
    phases: tuple                          #: ordered :class:`Phase` items
    actuators: tuple                       #: :class:`Cylinder` / :class:`HydraulicMotor`
    strategies: tuple                      #: :class:`Strategy` items
    fluid: Fluid = field(default_factory=Fluid)
    ambient: Ambient = field(default_factory=Ambient)
    reservoir: Reservoir = field(default_factory=Reservoir)
    power_unit: PowerUnit = field(default_factory=PowerUnit)
    economics: Economics = field(default_factory=Economics)
    cooler: CoolerDesign = field(default_factory=CoolerDesign)
    description: str = ""
    #: shift length for warm-up [s]
    shift_duration: float = 8 * 3600.0
    #: measured / model heat into the oil of the present circuit [-]
    #: (``heatload logfit --scenario``); multiplies every strategy's heat into
    #: the oil in the thermal step (:func:`heatload.evaluation.evaluate`), never
    #: the electrical energy or the per-component losses
    heat_calibration: float = 1.0
    #: uncertain inputs (:class:`UncertainInput` items)
    uncertainty: tuple = ()
    #: blocks of phases repeated within the cycle (:class:`Repeat` items)
    repeats: tuple = ()
    #: air-oil coolers given by their datasheet curves
    #: (:class:`heatload.cooling.cooler_datasheet.DatasheetCooler` items)
    coolers: tuple = ()
    #: the report's cover: project, customer, who prepared it, revision
    project: str = ""
    customer: str = ""
    prepared_by: str = ""
    revision: str = ""

    def actuator(self, name: str):
        """The actuator called *name* (``KeyError`` when there is none)."""
        for a in self.actuators:
            if a.name == name:
                return a
        raise KeyError(name)

    def phase_repeats(self) -> tuple:
        """Passes of each phase per cycle: a block's count inside it, else 1."""
        names = [p.name for p in self.phases]
        out = [1] * len(names)
        for r in self.repeats:
            for i in range(names.index(r.first), names.index(r.last) + 1):
                out[i] = r.count
        return tuple(out)

    def strategy(self, name: str) -> Strategy:
        for s in self.strategies:
            if s.name == name or s.kind == name:
                return s
        raise KeyError(name)
