"""The chain: a scenario in, every strategy's operating points, energy, oil
temperature and cooler duty out.

This is the one orchestrator the command line, the dashboard and the report
call.  It runs the physical steps in order (circuits -> energy -> thermal ->
cooler) and collects results whose fields carry their units.

Temperatures
------------
- *uncoupled*: the circuit solved at the oil temperature where the oil's
  viscosity equals the pump's datasheet viscosity (efficiencies exactly as
  given), heat turned into a steady oil temperature;
- *coupled*: the self-consistent operating temperature: oil temperature sets
  viscosity, viscosity sets pump leakage and line losses, the heat sets the
  temperature (:func:`heatload.evaluation.coupled_temperature`, to 0.01 K x UA);
- *design point* for the cooler: highest ambient, oil held at the design
  temperature (``cooler.oil_temperature_max``, default the fluid's limit - 5 K).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from heatload.units import mark
from heatload import checks, evaluation
from heatload.hydraulics import circuits, cycle, energy
from heatload.heat import thermal
from heatload.evaluation import ConductanceTable
from heatload.model import Scenario, Strategy


@dataclass
class ThermalOutcome:
    """Oil temperatures and cooler duty of one strategy (SI: K, W, W/K, s)."""

    reference_temperature: float     #: oil T of the uncoupled evaluation [K]
    heat_uncoupled: float            #: mean heat into oil at the reference T [W]
    steady_uncoupled: float          #: steady oil T, typical ambient, no cooler [K]
    heat_coupled: float              #: mean heat at the coupled T [W]
    steady_coupled: float            #: self-consistent steady oil T, no cooler [K]
    coupling_iterations: int
    conductance: float               #: surfaces' UA at the coupled T [W/K]
    capacity: float                  #: oil + steel heat capacity [J/K]
    cycle_minimum: float             #: lowest T in the periodic steady cycle [K]
    cycle_maximum: float             #: highest T in the cycle [K]
    steady_hot: float                #: steady T at the highest ambient, no cooler [K]
    design_oil_temperature: float    #: [K]
    design_ambient: float            #: [K]
    design_heat: float               #: mean heat with the oil at the design T [W]
    design_conductance: float        #: UA at the design point [W/K]
    cooler_needed: bool
    cooler_duty: float               #: with margin [W]; 0 when none is needed
    cooler_duty_without_margin: float
    time_to_limit: float | None      #: from a cold start at typical ambient [s]; None if never
    operating_temperature: float = None  #: oil T the machine runs at: coupled, or held at the design T by the cooler [K]
    phase_heat: np.ndarray = None    #: heat per phase at the coupled T [W]
    phase_durations: np.ndarray = None
    heat_calibration: float = 1.0    #: measured / model factor in every heat above [-]
    heat_running: float = None       #: mean heat at the operating T [W]


@dataclass
class StrategyOutcome:
    """Everything heatload computes for one strategy."""

    strategy: Strategy
    circuit: circuits.CircuitResult          #: at the operating oil temperature
    energy: energy.EnergySummary             #: at the operating oil temperature
    circuit_uncoupled: circuits.CircuitResult
    energy_uncoupled: energy.EnergySummary
    thermal: ThermalOutcome
    warnings: list = field(default_factory=list)

    @property
    def name(self) -> str:
        return self.strategy.name


@dataclass
class Comparison:
    """All strategies of one scenario, in the scenario's order."""

    scenario: Scenario
    outcomes: list
    phase_arrays: dict

    def outcome(self, name: str) -> StrategyOutcome:
        for o in self.outcomes:
            if o.name == name or o.strategy.kind == name:
                return o
        raise KeyError(name)

    def ranked(self) -> list:
        """Outcomes in the order of :func:`heatload.decision.decide`: feasible
        first, then by yearly cost of ownership."""
        return [self.outcome(n) for n in self.decision().order]

    def decision(self, present=None, prices=None):
        """The :class:`heatload.decision.Decision` of this comparison."""
        from heatload import decision
        return decision.decide(self, present, prices)


def conductance_fn(scenario: Scenario, air_temperature: float):
    """UA(T_oil) [W/K] of the reservoir and further surfaces at *air_temperature*
    (the one table, :class:`heatload.evaluation.ConductanceTable`)."""
    h = scenario.reservoir.heat_transfer_coefficient
    return ConductanceTable(scenario, [float(air_temperature)],
                            np.nan if h is None else h).fn()


def solve_at(scenario, strategy, oil_temperature, pa=None):
    """Solve one strategy with the oil at *oil_temperature* [K] (scalar or array)."""
    c = cycle.circuit_inputs(scenario, strategy, oil_temperature, phases=pa)
    return circuits.solve_strategy(strategy.kind, c)


def evaluate_strategy(scenario: Scenario, strategy: Strategy, pa=None) -> StrategyOutcome:
    """Solve, account and heat-balance one strategy: :func:`heatload.evaluation.evaluate`
    with N = 1 (see the module notes)."""
    return outcome_of(scenario, evaluation.evaluate(scenario, strategy, hot=True, phases=pa))


def outcome_of(scenario: Scenario, ev) -> StrategyOutcome:
    """The :class:`StrategyOutcome` of an evaluation of one strategy (N = 1)."""
    amb = scenario.ambient
    row = evaluation.result_row
    res_u, res_c = row(ev.uncoupled, 0), row(ev.coupled, 0)
    res_op = row(ev.operating, 0)
    t_c = float(ev.steady_coupled[0])
    q_c = float(ev.heat_coupled[0])
    cap = float(ev.capacity[0])
    duty0 = float(ev.cooler_duty_without_margin[0])
    duty = float(ev.cooler_duty[0])
    t_h = float(ev.steady_hot[0])
    t_op = float(ev.operating_temperature[0])
    ua_typ = ev.typical_conductance.fn(0)
    # warm-up from a cold start (typical ambient, cycle-averaged heat)
    f_heat = float(ev.heat_calibration[0])
    e_op = energy.summarize(res_op, scenario.economics)
    ttl = time_to_temperature(q_c, cap, ua_typ, amb.temperature, amb.cold_start_temperature,
                              scenario.fluid.temperature_max)
    th = ThermalOutcome(
        reference_temperature=ev.reference_temperature,
        heat_uncoupled=float(ev.heat_uncoupled[0]),
        steady_uncoupled=float(ev.steady_uncoupled[0]),
        heat_coupled=q_c, steady_coupled=t_c,
        coupling_iterations=int(ev.coupling_iterations[0]),
        conductance=float(ev.conductance[0]), capacity=cap,
        cycle_minimum=float(ev.cycle_minimum[0]), cycle_maximum=float(ev.cycle_maximum[0]),
        steady_hot=t_h, design_oil_temperature=float(ev.design_temperature[0]),
        design_ambient=float(ev.design_ambient[0]), design_heat=float(ev.design_heat[0]),
        design_conductance=float(ev.design_conductance[0]), cooler_needed=duty0 > 0.0,
        cooler_duty=duty, cooler_duty_without_margin=duty0, time_to_limit=ttl,
        phase_heat=f_heat * res_c.heat_to_oil, phase_durations=res_c.duration,
        operating_temperature=t_op, heat_calibration=f_heat,
        heat_running=f_heat * float(e_op.average_heat_to_oil))
    warns = (checks.phase_warnings(ev.conditions, scenario, row=0)
             + checks.cycle_warnings(ev.cycle_conditions, row=0))
    out = StrategyOutcome(strategy=ev.strategy, circuit=res_op, energy=e_op,
                          circuit_uncoupled=res_u,
                          energy_uncoupled=energy.summarize(res_u, scenario.economics),
                          thermal=th, warnings=warns)
    # the cooler the comparison prices must be one that can be built: the same
    # judgement `heatload cooler` and the report size it by
    from heatload.cooling.sizing import cooler_shortfall
    why = cooler_shortfall(scenario, out)
    if why is not None:
        out.warnings.append(checks.Warning_(
            "cooler-design", None, duty, None,
            f"no {scenario.cooler.coolant}-oil cooler can hold the design point "
            f"({mark(duty, 'power')} at {mark(th.design_oil_temperature, 'temperature')} "
            f"oil, {mark(th.design_ambient, 'temperature')} ambient): "
            + why.replace("{", "{{").replace("}", "}}")))
    return out


def time_to_temperature(heat, capacity, conductance, ambient, start, target, points=400):
    """Time [s] for the oil to warm from *start* to *target* [K] under a
    constant mean *heat* [W]; ``None`` when it never gets there.

    t = integral_{T0}^{T1} C dT / (Q - UA(T) (T - T_a))   (lumped first-order model)

    The cycle's heat is taken as its mean: the ripple within a cycle of
    seconds to minutes is negligible against a time constant of hours (the
    exact segment-by-segment run is :func:`heatload.heat.thermal.warm_up`).
    """
    if target <= start:
        return 0.0
    t = np.linspace(start, target, points)
    net = heat - conductance(t) * (t - ambient)
    if np.any(net <= 0.0):
        return None
    return float(np.trapezoid(capacity / net, t))


def shift_profile(scenario: Scenario, outcome: "StrategyOutcome", cooler_on=False,
                  cooler_conductance=None):
    """Oil temperature over a shift from a cold start, segment by segment
    (:func:`heatload.heat.thermal.warm_up`), at typical ambient; with *cooler_on*
    a thermostat-switched cooler of the sized duty is added
    (:func:`heatload.heat.thermal.thermostat_cooler_run`), or, given
    *cooler_conductance* [W/K], a cooler taking that much per kelvin of ETD
    (a datasheet cooler's specific cooling power)."""
    amb = scenario.ambient
    th = outcome.thermal
    ua = conductance_fn(scenario, amb.temperature)
    if not cooler_on or th.cooler_duty <= 0.0 and cooler_conductance is None:
        return thermal.warm_up(th.phase_heat, th.phase_durations, th.capacity, ua,
                               amb.temperature, amb.cold_start_temperature,
                               scenario.shift_duration,
                               limit_temperature=scenario.fluid.temperature_max,
                               max_step=max(600.0, float(np.sum(th.phase_durations))))
    on = scenario.cooler.thermostat_on or th.design_oil_temperature
    return thermal.thermostat_cooler_run(
        th.phase_heat, th.phase_durations, th.capacity, float(ua(th.steady_coupled)),
        amb.temperature, amb.cold_start_temperature, scenario.shift_duration, on,
        scenario.cooler.thermostat_hysteresis,
        **({"cooler_conductance": float(cooler_conductance)} if cooler_conductance is not None
           else {"cooler_duty": th.cooler_duty}))


def compare(scenario: Scenario, strategies=None) -> Comparison:
    """Evaluate every strategy of *scenario* (or the names in *strategies*)."""
    pa = cycle.phase_arrays(scenario)
    chosen = scenario.strategies
    if strategies:
        try:
            chosen = tuple(scenario.strategy(s) for s in strategies)
        except KeyError as e:
            from heatload.errors import HeatloadError
            raise HeatloadError(f"unknown strategy {e.args[0]!r}; this scenario has "
                                f"{', '.join(s.name for s in scenario.strategies)}",
                                field="--strategy") from None
    # the strategies side by side in one batch: each equal to its evaluation alone
    evs = evaluation.evaluate_strategies(scenario, chosen, hot=True, phases=pa)
    outcomes = [outcome_of(scenario, ev) for ev in evs]
    return Comparison(scenario=scenario, outcomes=outcomes, phase_arrays=pa)
