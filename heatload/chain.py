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
  temperature (fixed-point iteration to 0.01 K);
- *design point* for the cooler: highest ambient, oil held at the design
  temperature (``cooler.oil_temperature_max``, default the fluid's limit - 5 K).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from heatload import checks, circuits, cooler, cycle, energy, heat_transfer, oil, thermal
from heatload.model import Scenario, Strategy

COUPLING_TOLERANCE = 0.01  # [K]
COUPLING_MAX_ITER = 40


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


def design_oil_temperature(scenario: Scenario) -> float:
    """Design oil temperature of the cooler sizing [K]
    (:func:`heatload.model.design_oil_temperature`)."""
    from heatload.model import design_oil_temperature as design
    return design(scenario.fluid, scenario.cooler)


def heat_capacity(scenario: Scenario, oil_temperature: float) -> float:
    """Oil + steel heat capacity C = V rho c + m c_steel [J/K]."""
    rho = oil.fluid_density(scenario.fluid, oil_temperature)
    cp = oil.fluid_specific_heat(scenario.fluid, oil_temperature)
    r = scenario.reservoir
    return float(thermal.heat_capacity(r.oil_volume, rho, cp, r.steel_mass,
                                       r.steel_specific_heat))


#: Oil temperatures at which every strategy is solved in one vectorized pass;
#: the coupled temperature is bracketed on it and refined by exact solves [K].
TEMPERATURE_GRID = np.linspace(263.15, 523.15, 27)


@lru_cache(maxsize=64)
def _conductance_table(reservoir, altitude, air_temperature):
    pressure = heat_transfer.barometric_pressure(altitude)
    t = np.linspace(air_temperature - 20.0, 523.15, 160)
    ua = heat_transfer.reservoir_conductance(reservoir, t, air_temperature, pressure)
    return t, np.broadcast_to(np.asarray(ua, float), t.shape).copy()


def conductance_fn(scenario: Scenario, air_temperature: float):
    """UA(T_oil) [W/K] of the reservoir and further surfaces at *air_temperature*.

    Tabulated once per reservoir and air temperature (160 points up to 250 degC,
    one vectorized call of :func:`heatload.heat_transfer.reservoir_conductance`)
    and interpolated linearly: UA varies slowly and smoothly with T.
    """
    t, ua = _conductance_table(scenario.reservoir, scenario.ambient.altitude,
                               float(air_temperature))

    def fn(t_oil):
        return np.interp(t_oil, t, ua)
    return fn


def solve_at(scenario, strategy, oil_temperature, pa=None):
    """Solve one strategy with the oil at *oil_temperature* [K] (scalar or array)."""
    c = cycle.circuit_inputs(scenario, strategy, oil_temperature, phases=pa)
    return circuits.solve_strategy(strategy.kind, c)


def _mean_heat(result):
    t = result.duration
    return (result.heat_to_oil * t).sum(axis=-1) / t.sum(axis=-1)


def _row(result, i):
    """Row *i* of a result solved over a leading axis of oil temperatures."""
    import dataclasses
    out = {}
    for f in dataclasses.fields(result):
        v = getattr(result, f.name)
        if isinstance(v, np.ndarray) and v.ndim >= 2:
            v = v[i]
        elif isinstance(v, dict):
            v = {k: (a[i] if isinstance(a, np.ndarray) and a.ndim >= 2 else a)
                 for k, a in v.items()}
        out[f.name] = v
    return type(result)(**out)


def coupled_temperatures(scenario, strategy, ambients, heat_on_grid, pa,
                         extra_conductance=0.0):
    """Self-consistent steady oil temperatures [K] at each air temperature in *ambients*.

    Solves Q(T) = (UA(T) + S) (T - T_a), with Q(T) the strategy's mean heat at oil
    temperature T and S an *extra_conductance* [W/K] per ambient (a cooler's
    specific cooling power; 0 by default): bracketed on :data:`TEMPERATURE_GRID`,
    then refined by an Illinois regula falsi with exact solves (all ambients in one batched solve
    per step) until |Q - UA (T - T_a)| < 0.01 K x UA.
    Returns ``(T, iterations, result)`` with *result* solved at those T (one
    row per ambient).
    """
    grid = TEMPERATURE_GRID
    n = len(ambients)
    ambients = np.asarray(ambients, float)
    extra = np.broadcast_to(np.asarray(extra_conductance, float), (n,))
    uas = [conductance_fn(scenario, ta) for ta in ambients]
    if np.any(extra != 0.0):
        uas = [(lambda t_oil, f=f, s=s: f(t_oil) + s) for f, s in zip(uas, extra)]
    a = np.empty(n); b = np.empty(n); ga = np.empty(n); gb = np.empty(n)
    t = np.empty(n)
    done = np.zeros(n, dtype=bool)
    for k, (ta, ua) in enumerate(zip(ambients, uas)):
        g = heat_on_grid - ua(grid) * (grid - ta)
        down = np.nonzero((g[:-1] >= 0.0) & (g[1:] < 0.0))[0]
        if not down.size:
            # no crossing on the grid: beyond its ends the heat is taken as at the end
            q_end = heat_on_grid[-1] if g[-1] >= 0 else heat_on_grid[0]
            t[k] = float(thermal.steady_state_temperature(q_end, ua, ta))
            done[k] = True
            continue
        i = down[0]
        a[k], b[k], ga[k], gb[k] = grid[i], grid[i + 1], g[i], g[i + 1]
        t[k] = a[k] + (b[k] - a[k]) * ga[k] / (ga[k] - gb[k])
    side = np.zeros(n)
    it = 0
    while True:
        it += 1
        res = solve_at(scenario, strategy, t, pa)
        if done.all() or it > COUPLING_MAX_ITER:
            return t, it, res
        q = _mean_heat(res)
        ua_t = np.array([float(ua(tk)) for ua, tk in zip(uas, t)])
        gt = q - ua_t * (t - ambients)
        done |= (np.abs(gt) < COUPLING_TOLERANCE * np.maximum(ua_t, 1e-9)) | \
            ((b - a) < COUPLING_TOLERANCE)
        if done.all():
            return t, it, res
        pos = gt > 0
        gb = np.where(pos & (side == 1), 0.5 * gb, gb)
        ga = np.where(~pos & (side == -1), 0.5 * ga, ga)
        a, ga = np.where(pos, t, a), np.where(pos, gt, ga)
        b, gb = np.where(pos, b, t), np.where(pos, gb, gt)
        side = np.where(pos, 1.0, -1.0)
        t = np.where(done, t, a + (b - a) * ga / (ga - gb))


def evaluate_strategy(scenario: Scenario, strategy: Strategy, pa=None) -> StrategyOutcome:
    """Solve, account and heat-balance one strategy (see the module notes)."""
    pa = pa if pa is not None else cycle.phase_arrays(scenario)
    amb = scenario.ambient
    t_ref = cycle.reference_oil_temperature(scenario)
    t_d = design_oil_temperature(scenario)
    ua_typ = conductance_fn(scenario, amb.temperature)
    ua_hot = conductance_fn(scenario, amb.temperature_max)

    # one batched solve: the datasheet temperature, the design point, the grid
    first = solve_at(scenario, strategy, np.concatenate(([t_ref, t_d], TEMPERATURE_GRID)), pa)
    res_u, res_d = _row(first, 0), _row(first, 1)
    heat_grid = _mean_heat(first)[2:]
    q_u = float(_mean_heat(res_u))
    t_u = float(thermal.steady_state_temperature(q_u, ua_typ, amb.temperature))

    temps, it, res_th = coupled_temperatures(scenario, strategy,
                                             [amb.temperature, amb.temperature_max],
                                             heat_grid, pa)
    t_c, t_h = float(temps[0]), float(temps[1])
    res_c = _row(res_th, 0)
    q_c = float(_mean_heat(res_c))
    ua_c = float(ua_typ(t_c))
    cap = heat_capacity(scenario, t_c)
    q_phase = res_c.heat_to_oil
    periodic = thermal.periodic_steady_state(q_phase, res_c.duration, cap, ua_c,
                                             amb.temperature)

    # cooler design point: oil held at the design temperature on the hottest day
    q_d = float(_mean_heat(res_d))
    ua_d = float(ua_hot(t_d))
    duty0 = float(cooler.required_cooler_duty(q_d, ua_d, t_d, amb.temperature_max, 0.0))
    duty = duty0 * (1.0 + scenario.cooler.margin)

    # warm-up from a cold start (typical ambient, cycle-averaged heat)
    ttl = time_to_temperature(q_c, cap, ua_typ, amb.temperature, amb.cold_start_temperature,
                              scenario.fluid.temperature_max)

    # the machine runs at the coupled temperature, unless the sized cooler holds
    # it at the design temperature
    t_op = min(t_c, t_d) if duty0 > 0.0 else t_c
    res_op = res_c if t_op == t_c else res_d

    th = ThermalOutcome(
        reference_temperature=t_ref, heat_uncoupled=q_u, steady_uncoupled=t_u,
        heat_coupled=q_c, steady_coupled=t_c, coupling_iterations=it, conductance=ua_c,
        capacity=cap, cycle_minimum=float(periodic.minimum), cycle_maximum=float(periodic.maximum),
        steady_hot=t_h, design_oil_temperature=t_d, design_ambient=amb.temperature_max,
        design_heat=q_d, design_conductance=ua_d, cooler_needed=duty0 > 0.0,
        cooler_duty=duty, cooler_duty_without_margin=duty0, time_to_limit=ttl,
        phase_heat=q_phase, phase_durations=res_c.duration, operating_temperature=t_op)

    warns = checks.phase_warnings(res_op, scenario, pa)
    if strategy.kind == "bleed-off":
        c_op = cycle.circuit_inputs(scenario, strategy, t_op, phases=pa)
        warns += checks.speed_drift_warnings(circuits.bleed_off_speed_change(c_op, res_op),
                                             scenario, pa)
    # the oil's limit is judged on the hottest day, where the cooler is sized
    warns += checks.thermal_warnings(scenario, t_h, t_op, duty)
    warns += checks.correlation_range_warnings(
        scenario, t_op, amb.temperature, heat_transfer.barometric_pressure(amb.altitude))
    return StrategyOutcome(strategy=strategy, circuit=res_op,
                           energy=energy.summarize(res_op, scenario.economics),
                           circuit_uncoupled=res_u,
                           energy_uncoupled=energy.summarize(res_u, scenario.economics),
                           thermal=th, warnings=warns)


def time_to_temperature(heat, capacity, conductance, ambient, start, target, points=400):
    """Time [s] for the oil to warm from *start* to *target* [K] under a
    constant mean *heat* [W]; ``None`` when it never gets there.

    t = integral_{T0}^{T1} C dT / (Q - UA(T) (T - T_a))   (lumped first-order model)

    The cycle's heat is taken as its mean: the ripple within a cycle of
    seconds to minutes is negligible against a time constant of hours (the
    exact segment-by-segment run is :func:`heatload.thermal.warm_up`).
    """
    if target <= start:
        return 0.0
    t = np.linspace(start, target, points)
    net = heat - conductance(t) * (t - ambient)
    if np.any(net <= 0.0):
        return None
    return float(np.trapezoid(capacity / net, t))


def shift_profile(scenario: Scenario, outcome: "StrategyOutcome", cooler_on=False):
    """Oil temperature over a shift from a cold start, segment by segment
    (:func:`heatload.thermal.warm_up`), at typical ambient; with *cooler_on*
    a thermostat-switched cooler of the sized duty is added
    (:func:`heatload.thermal.thermostat_cooler_run`)."""
    amb = scenario.ambient
    th = outcome.thermal
    ua = conductance_fn(scenario, amb.temperature)
    if not cooler_on or th.cooler_duty <= 0.0:
        return thermal.warm_up(th.phase_heat, th.phase_durations, th.capacity, ua,
                               amb.temperature, amb.cold_start_temperature,
                               scenario.shift_duration,
                               limit_temperature=scenario.fluid.temperature_max,
                               max_step=max(600.0, float(np.sum(th.phase_durations))))
    on = scenario.cooler.thermostat_on or th.design_oil_temperature
    return thermal.thermostat_cooler_run(
        th.phase_heat, th.phase_durations, th.capacity, float(ua(th.steady_coupled)),
        amb.temperature, amb.cold_start_temperature, scenario.shift_duration, on,
        scenario.cooler.thermostat_hysteresis, cooler_duty=th.cooler_duty)


def compare(scenario: Scenario, strategies=None) -> Comparison:
    """Evaluate every strategy of *scenario* (or the names in *strategies*)."""
    pa = cycle.phase_arrays(scenario)
    chosen = scenario.strategies
    if strategies:
        chosen = tuple(scenario.strategy(s) for s in strategies)
    outcomes = [evaluate_strategy(scenario, s, pa) for s in chosen]
    return Comparison(scenario=scenario, outcomes=outcomes, phase_arrays=pa)
