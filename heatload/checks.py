"""Warnings a designer must see next to the energy numbers.

Each warning is data: a code, its phase, the value that triggered it and the
limit (SI, of the code's kind, :data:`CODE_KINDS`), and a one-line text whose
figures are marked with their SI value and kind (:func:`heatload.units.mark`):
the engine writes no unit; every edge writes the text in its reader's units
through :func:`heatload.outputs.wording.warning_text`.

Codes: ``pressure-rating``, ``intensification``, ``overrunning-load``,
``cavitation``, ``relief-passing``, ``speed-not-reached``, ``stall``,
``viscosity-window``, ``oil-temperature``, ``hold-pressure``, ``speed-drift``,
``motor-overload``, ``correlation-range``, ``flow-rating``, ``hold-at-limit``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from heatload.hydraulics.circuits import CAVITATION_THRESHOLD, UNLOAD_CENTRE, UNLOAD_CHECK, CircuitResult
from heatload.hydraulics.strategies import circuit
from heatload.units import mark


#: The kind of quantity (:data:`heatload.units.KINDS`) of each code's value and
#: limit; "speed" is the actuator's speed (m/s of a cylinder, rev/s of a motor).
CODE_KINDS = {"motor-overload": "power", "pressure-rating": "pressure",
              "hold-pressure": "pressure", "relief-passing": "flow",
              "intensification": "pressure", "overrunning-load": "force",
              "cavitation": "pressure", "stall": "speed", "speed-not-reached": "speed",
              "speed-drift": "dimensionless", "oil-temperature": "temperature",
              "viscosity-window": "kinematic_viscosity",
              "correlation-range": "dimensionless", "flow-rating": "flow",
              "heat-calibration": "power", "cooler-design": "power",
              "hold-at-limit": "pressure"}


@dataclass(frozen=True)
class Warning_:
    """One warning as data: its code, phase (None: the whole cycle), value and
    limit [SI, of :attr:`kind`] and its text, whose figures are marked
    (:func:`heatload.units.mark`) so that every edge writes them in its reader's
    units (:meth:`text`); :attr:`message` is the text in SI units."""

    code: str
    phase: str | None
    value: float
    limit: float | None
    template: str
    kind: str | None = None

    def __post_init__(self):
        if self.kind is None:
            object.__setattr__(self, "kind", CODE_KINDS.get(self.code))

    @property
    def message(self) -> str:
        """The one-line message in SI units."""
        return self.text("si")

    def text(self, system: str = "si") -> str:
        """The one-line message in *system*'s units ("si" or "us")."""
        from heatload.units import render
        return render(self.template, system)

    def as_dict(self) -> dict:
        """JSON-ready: code, phase, value, limit [SI], message (SI text), kind,
        and the text as ``template`` with its ``quantities`` [SI] that the edges
        write in the reader's units (:func:`heatload.outputs.wording.warning_text`)."""
        from heatload.units import split_marks
        template, quantities = split_marks(self.template)
        return {"code": self.code, "phase": self.phase, "value": float(self.value),
                "limit": None if self.limit is None else float(self.limit),
                "message": self.message, "kind": self.kind, "template": template,
                "quantities": quantities}


def _bar(p):
    return mark(p, "pressure", 0)


def _deg(t):
    return mark(t, "temperature", 0)


#: Continuous load an IEC motor may carry, as a multiple of its rating [-]: IEC
#: 60034-1 rates it for duty type S1 at rated output with no service factor
#: (NEMA MG 1 motors often carry 1.15; an IEC nameplate does not) (from memory).
MOTOR_SERVICE_FACTOR = 1.0
#: Occasional excess torque IEC 60034-1 requires an induction motor to withstand
#: without stalling: 160 % of rated torque for 15 s (from memory) [-], [s].
MOTOR_EXCESS_TORQUE = 1.6
MOTOR_EXCESS_TORQUE_TIME = 15.0
#: Flow through a directional valve's working path (P->A, B->T), or through its
#: open / tandem centre (P->T) while nothing moves, above which the valve is
#: undersized, as a multiple of its rated flow (the flow its pressure drop is
#: given at) [-]: makers' curves commonly end at about 1.5 x the flow
#: their drop is quoted at; beyond it the Q^2 drop is an extrapolation and the
#: flow forces on the spool pass the power limit the maker states (common
#: practice, from memory).
VALVE_FLOW_FACTOR = 1.5
#: Band around a pressure to hold, as a fraction of it, inside which the supply
#: is "at the limit" [-]: a relief valve or a compensator is set by a gauge, and
#: a class 1.0 gauge (EN 837-1) reads within 1 % of its span, so a supply within
#: 1 % of the need is not known to be above or below it (common practice, from
#: memory).  A hold whose supply ceiling (relief or compensator setting) lies
#: inside the band gets a caution (``hold-at-limit``) on either side of the
#: need; only a supply short by more rules the circuit out (``hold-pressure``),
#: so 1 mbar either side of the need flips nothing.
HOLD_AT_LIMIT = 0.01
#: Beyond this multiple of its rated torque a standard induction motor has passed
#: its breakdown torque (about 2 to 3 x rated in catalogues, common practice, from
#: memory) and stalls: figures above it describe no real drive [-].
MOTOR_BREAKDOWN_TORQUE = 3.0


def motor_load_ratio(shaft_power, rated_power, speed_fraction=1.0):
    """Load of the drive motor as a multiple of its continuous rating [-].

    r = P / (P_r min(s, 1))

    Below base speed a converter-fed motor (constant flux) gives at most its
    rated torque, so its rated power falls with the speed: the ratio is the
    torque ratio T / T_r = P / (P_r s); above base speed (field weakening) it
    gives at most its rated power.  On the grid s = 1 and r = P / P_r.

    Parameters
    ----------
    shaft_power : array_like
        Mechanical power the pump shaft takes [W].
    rated_power : array_like
        Motor rating [W], > 0.
    speed_fraction : array_like, optional
        Motor speed over its nominal speed [-], > 0.

    References
    ----------
    IEC 60034-1 (rated output, duty type S1); constant-torque operation below
    and constant power above base speed of a converter-fed induction motor,
    common practice.
    """
    # a motor at standstill gives no power: the floor keeps 0 / 0 out
    s = np.clip(np.asarray(speed_fraction, float), 1e-12, 1.0)
    return np.asarray(shaft_power, float) / (np.asarray(rated_power, float) * s)


def motor_overloaded(shaft_power, rated_power, speed_fraction=1.0):
    """Where the motor carries more than its rating x :data:`MOTOR_SERVICE_FACTOR`
    (:func:`motor_load_ratio`); vectorized, bool."""
    return (motor_load_ratio(shaft_power, rated_power, speed_fraction)
            > MOTOR_SERVICE_FACTOR * (1 + 1e-9))


def _kw(p):
    return mark(p, "power")


def _motor_overload_text(shaft_power, rated_power, speed_fraction, duration):
    """The message of a ``motor-overload`` warning: it grades the overload: a
    short one the motor withstands (IEC 60034-1: 160 % torque for 15 s), one it
    does not (it overheats or trips), and one past any motor's breakdown
    torque (no real drive)."""
    r = float(motor_load_ratio(shaft_power, rated_power, speed_fraction))
    s = min(float(speed_fraction), 1.0)
    of = (f"{100 * r:.0f} % of its rated torque at {100 * s:.0f} % speed" if s < 1 - 1e-9
          else f"{100 * r:.0f} % of its rating")
    head = f"the pump takes {_kw(shaft_power)} from the {_kw(rated_power)} motor"
    if r > MOTOR_BREAKDOWN_TORQUE:
        return (f"the pump needs {_kw(shaft_power)}, {r:.3g} x what the {_kw(rated_power)} "
                f"motor gives: past the breakdown torque of any motor of that rating, the "
                f"motor stalls; no real drive gives these figures")
    if r <= MOTOR_EXCESS_TORQUE and duration <= MOTOR_EXCESS_TORQUE_TIME:
        return (f"{head} ({of} for {duration:.3g} s): a short overload within IEC 60034-1's "
                f"160 % for 15 s; check the cycle's RMS load against the rating")
    return (f"{head} ({of} for {duration:.3g} s): beyond the 160 % for 15 s of IEC "
            f"60034-1, the motor overheats or trips; a larger motor is needed")


@dataclass(frozen=True)
class Condition:
    """One warning code over a batch: where it holds and with what figures.

    *mask*, *value* and *limit* have the batch's shape ``(N, phases)`` (limit
    None where a code has none); ``text(i, j)`` is the one-line message of
    variant *i*, phase *j*.  Sweeps count the masks; reports format the
    messages (:func:`phase_warnings`)."""

    code: str
    mask: np.ndarray
    value: np.ndarray
    limit: np.ndarray | None
    text: object
    listed_last: bool = False   #: listed after every phase's other warnings
    per_phase: bool = True      #: masks (N, phases); False: of the whole cycle, (N,)
    kinds: object = None        #: i -> the kind of value and limit where not the code's

    def counts(self) -> np.ndarray:
        """Phases (or cycles) per variant where the condition holds (N,)."""
        return self.mask.sum(axis=-1) if self.per_phase else self.mask.astype(int)


def valve_centre_flow(result: CircuitResult) -> np.ndarray:
    """Flow through the directional valve's open or tandem centre (P->T) [m^3/s].

    Q_centre = Q_pump - Q_relief - Q_bleed - Q_actuators

    The solver books the pump's delivery as the actuators' flow plus what
    crosses the relief, what is bled and what the centre returns to tank
    (:class:`heatload.hydraulics.circuits.CircuitResult`: ``pump_flow``), so the
    centre's share is what is left.  It is non-zero only in hold and idle
    phases unloaded through an open or tandem centre (``unloading = "centre"``,
    or a fixed pump vented while a pilot-operated check holds), where it is
    the whole pump flow; a variable pump delivers nothing there to return.

    Parameters
    ----------
    result : CircuitResult
        Solved phases, ``(..., phases)``.

    Returns
    -------
    ndarray
        Centre flow [m^3/s], >= 0 (rounding of the sum clipped), shape of the
        result's arrays.
    """
    into = np.abs(result.actuator_flow)
    if result.motions is not None:
        for (b, name), v in result.motions.items():
            if b > 0 and name == "flow":
                into = into + np.abs(v)
    rest = result.pump_flow - result.relief_flow - result.bleed_flow - into
    return np.maximum(rest, 0.0)


def phase_conditions(result: CircuitResult, c: dict, scenario, values=None) -> list:
    """The per-phase warning conditions of a solved batch, vectorized.

    Parameters
    ----------
    result : CircuitResult
        Solved over ``(N, phases)`` (or ``(phases,)``).
    c : dict
        Its circuit inputs (:func:`heatload.hydraulics.cycle.circuit_inputs` or the
        evaluation's builder).
    scenario : Scenario
    values : heatload.paths.Overrides, optional
        Varied ratings (pump and directional-valve maximum pressure).

    Returns
    -------
    list of Condition
        In the order a phase's warnings are listed.
    """
    g = values.get if values is not None else (lambda k, d: d)
    pu = scenario.power_unit
    shape = np.shape(result.pump_pressure)

    def full(x):
        return np.broadcast_to(np.asarray(x), shape)

    def col(x):
        x = np.asarray(x, float)
        return full(x[..., None] if x.ndim else x)

    pp, p1, p2 = result.pump_pressure, result.inlet_pressure, result.outlet_pressure
    moving = full(c["moving"])
    still = ~moving
    pump_max = col(g(("pump", "max_pressure"), pu.pump.max_pressure))
    dv_max = col(g(("directional_valve", "max_pressure"), pu.directional_valve.max_pressure))
    dv_rated = col(g(("directional_valve", "rated_flow"), pu.directional_valve.rated_flow))
    # the largest flow of any working path of the phase: P->A carries the inlet
    # flow, B->T the outlet's (twice it, retracting a 2:1 cylinder); each further
    # motion has its own valve of the same size.  In hold and idle phases an open
    # or tandem centre returns the whole pump flow P->T through the same valve
    flows = [result.actuator_flow, result.outlet_flow]
    if result.motions is not None:
        flows += [v for k, v in result.motions.items() if k[1] in ("flow", "outlet_flow")]
    path_flow = np.max(np.abs(np.stack(np.broadcast_arrays(*flows))), axis=0)
    centre_flow = np.where(still, valve_centre_flow(result), 0.0)
    dv_flow = np.maximum(path_flow, centre_flow)
    through_centre = centre_flow > path_flow
    rating = full(c["max_pressure_inlet"])
    rated_power = full(c["motor_rated_power"])
    fraction = result.pump_shaft_speed / full(c["pump_speed"])
    hold = full(c["hold_pressure"])
    load = full(c["load"])
    # the phase's own load as the file gives it: a force on a cylinder, a torque on
    # a hydraulic motor (the solver's "load" is the motor's equivalent force)
    on_motor = np.array([scenario.actuator(ph.actuator).kind == "motor"
                         if ph.actuator else False for ph in scenario.phases])
    own_load = np.stack(np.broadcast_arrays(*[np.asarray(g(("phase", j, "load"), ph.load),
                                                         float)
                                              for j, ph in enumerate(scenario.phases)]),
                        axis=-1)
    own_load = np.where(on_motor, own_load, load) if own_load.shape[-1] == shape[-1] else load

    def own_kind(i):
        return "torque" if on_motor[i[-1]] else "force"
    hi = np.maximum(pp, np.maximum(p1, p2))
    chamber_hi = np.maximum(p1, p2)
    chamber_lo = np.minimum(p1, p2)
    relief, pump_flow = result.relief_flow, result.pump_flow
    stalled, slow = result.stalled, result.flow_limited
    zero = np.zeros(shape)
    with np.errstate(divide="ignore", invalid="ignore"):
        speed_ratio = np.where(result.speed_target != 0, result.speed / result.speed_target, 0)

    # phases that hold a pressure from the pump (not unloaded through the centre
    # or held by a check valve)
    holding = (still & (hold > 0) & (full(c["unloading"]) != UNLOAD_CENTRE)
               & (full(c["unloading"]) != UNLOAD_CHECK))

    # the most the supply gives in a hold: a variable pump's compensator setting;
    # else its relief (a fixed pump holds at the relief; a speed-controlled one
    # at the pressure it is asked for, which the relief caps)
    if circuit(result.strategy).variable_pump:
        ceiling = full(c["compensator"])
    else:
        ceiling = np.maximum(pp, full(c["relief_cracking"]))

    # phases moving several actuators at once (their flows shared by one rule)
    shared = full(c.get("flow_total_ratio", 1.0)) > 1.0

    def cond(code, mask, value, limit, text):
        return Condition(code, full(mask), full(value), None if limit is None else full(limit),
                         text)

    out = [
        cond("motor-overload", motor_overloaded(result.shaft_power, rated_power, fraction),
             result.shaft_power,
             MOTOR_SERVICE_FACTOR * rated_power * np.minimum(fraction, 1.0),
             lambda i: _motor_overload_text(result.shaft_power[i], rated_power[i],
                                            fraction[i], result.duration[i])),
        cond("pressure-rating", pp > pump_max * (1 + 1e-9), pp, pump_max,
             lambda i: f"pump pressure {_bar(pp[i])} above the pump's rating "
                       f"{_bar(pump_max[i])}"),
        cond("pressure-rating", hi > dv_max * (1 + 1e-9), hi, dv_max,
             lambda i: f"pressure {_bar(hi[i])} above the directional valve's rating "
                       f"{_bar(dv_max[i])}"),
        cond("flow-rating", dv_flow > VALVE_FLOW_FACTOR * dv_rated * (1 + 1e-9), dv_flow,
             VALVE_FLOW_FACTOR * dv_rated,
             lambda i: (f"the directional valve's centre (P->T) carries the pump's "
                        f"{mark(dv_flow[i], 'flow', 0)} while nothing moves"
                        if through_centre[i] else
                        f"the directional valve carries {mark(dv_flow[i], 'flow', 0)}")
             + f", {dv_flow[i] / dv_rated[i]:.2g} x its rated "
               f"{mark(dv_rated[i], 'flow', 0)}: past {VALVE_FLOW_FACTOR:g} x its "
               f"drop is an extrapolation and the flow forces on the spool may "
               f"exceed the maker's limit; choose a larger valve"),
        cond("pressure-rating", np.isfinite(rating) & (chamber_hi > rating * (1 + 1e-9)),
             chamber_hi, rating,
             lambda i: f"actuator chamber at {_bar(chamber_hi[i])} above its rating "
                       f"{_bar(rating[i])}"),
        cond("hold-pressure", holding & (pp < hold * (1 - HOLD_AT_LIMIT)), hold, pp,
             lambda i: f"the pressure to hold {_bar(hold[i])} is more than the pump "
                       f"supplies here ({_bar(max(pp[i], 0.0))})"),
        cond("hold-at-limit", holding & (pp >= hold * (1 - HOLD_AT_LIMIT))
             & (np.abs(ceiling - hold) <= HOLD_AT_LIMIT * hold), hold, ceiling,
             lambda i: f"the pump can supply at most {mark(ceiling[i], 'pressure', 1)} "
                       f"to hold {mark(hold[i], 'pressure', 1)}: within "
                       f"{100 * HOLD_AT_LIMIT:g} % of it, closer than a relief or "
                       f"compensator setting is known; set it higher"),
        cond("relief-passing", still & (relief > 1e-9) & (pump_flow > 0), relief, None,
             lambda i: f"the relief valve passes {mark(relief[i], 'flow', 1)} at "
                       f"{_bar(pp[i])} for the whole phase"),
        cond("intensification", moving & (p2 > pp * (1 + 1e-6)) & (p2 > 1e5)
             & ~result.counterbalance_active, p2, pp,
             lambda i: f"outlet chamber at {_bar(p2[i])} exceeds supply {_bar(pp[i])}"
                       + (f" (x{p2[i] / pp[i]:.2f})" if pp[i] >= 1e5 else "")
                       + ": the cylinder intensifies"),
        Condition("overrunning-load", full(moving & result.runaway), own_load, full(zero),
                  lambda i: f"overrunning load {mark(own_load[i], own_kind(i))} this circuit "
                            f"cannot hold: the {'motor' if on_motor[i[-1]] else 'cylinder'} "
                            f"runs away; figures assume a counterbalance valve at "
                            f"{_bar(result.counterbalance_setting[i])} (fit one, or throttle "
                            f"the outlet)", kinds=lambda i: own_kind(i)),
        cond("cavitation", moving & (chamber_lo < CAVITATION_THRESHOLD), chamber_lo,
             np.full(shape, CAVITATION_THRESHOLD),
             lambda i: f"a chamber would fall to {mark(chamber_lo[i], 'pressure', 2)} gauge: "
                       f"cavitation risk"),
        cond("stall", moving & stalled, zero, result.speed_target,
             lambda i: "the load needs more pressure than the supply allows: the actuator "
                       "stalls and the pump flow crosses the relief"),
        cond("speed-not-reached", moving & ~stalled & slow, result.speed, result.speed_target,
             lambda i: (f"the supply cannot give every motion its set flow: each reaches "
                        f"only {100 * speed_ratio[i]:.0f} % of its set speed (shared in "
                        f"proportion to the set flows)") if shared[i] else
             f"speed reaches only {100 * speed_ratio[i]:.0f} % of the set speed"),
        cond("relief-passing", moving & ~stalled & ~slow & (relief >= pump_flow * 0.999)
             & (pump_flow > 0), relief, None,
             lambda i: "the relief valve passes the whole pump flow"),
    ]
    if result.motions is not None:
        out.extend(motion_conditions(result, c, scenario, full, cond))
    return out


def motion_conditions(result, c, scenario, full, cond) -> list:
    """The chamber conditions of a phase's further motions (each its own
    rating, runaway, cavitation and intensification), named by actuator."""
    from heatload.hydraulics.circuits import motion_views
    out = []
    pp = result.pump_pressure
    for b, v in enumerate(motion_views(c), start=1):
        p1, p2 = result.motions[(b, "inlet_pressure")], result.motions[(b, "outlet_pressure")]
        moving = full(v["moving"]) & (result.motions[(b, "speed")] > 0)
        hi, lo = np.maximum(p1, p2), np.minimum(p1, p2)
        rating = full(v["max_pressure_inlet"])
        load = full(v["load"])
        runaway = result.motions[(b, "runaway")]

        def word(i, b=b):
            return f"{scenario.phases[i[-1]].simultaneous[b - 1].actuator!r} moving with it"
        out += [
            cond("pressure-rating", np.isfinite(rating) & (hi > rating * (1 + 1e-9)), hi,
                 rating, lambda i, hi=hi, rating=rating, w=word:
                 f"{w(i)}: chamber at {_bar(hi[i])} above its rating {_bar(rating[i])}"),
            cond("intensification", moving & (p2 > pp * (1 + 1e-6)) & (p2 > 1e5)
                 & ~result.motions[(b, "counterbalance_active")], p2, pp,
                 lambda i, p2=p2, w=word: f"{w(i)}: outlet chamber at {_bar(p2[i])} exceeds "
                                          f"supply {_bar(pp[i])}: the cylinder intensifies"),
            cond("overrunning-load", moving & runaway, load, np.zeros(np.shape(load)),
                 lambda i, load=load, w=word: f"{w(i)}: overrunning load "
                 f"{mark(load[i], 'force')} this circuit cannot hold: the actuator runs "
                 f"away (fit a counterbalance valve, or throttle the outlet)"),
            cond("cavitation", moving & (lo < CAVITATION_THRESHOLD), lo,
                 np.full(np.shape(lo), CAVITATION_THRESHOLD),
                 lambda i, lo=lo, w=word: f"{w(i)}: a chamber would fall to "
                 f"{mark(lo[i], 'pressure', 2)} gauge: cavitation risk"),
        ]
    return out


#: Codes of the per-phase conditions, in the order sweeps list their counts
PHASE_CODES = ("motor-overload", "pressure-rating", "flow-rating", "hold-pressure",
               "hold-at-limit", "relief-passing",
               "intensification", "overrunning-load", "cavitation", "stall",
               "speed-not-reached", "speed-drift")


#: Codes of the whole cycle every evaluation judges (the oil's limit needs the
#: hottest day's steady temperature, which sweeps do not solve)
CYCLE_CODES = ("viscosity-window", "correlation-range")


def condition_counts(conditions) -> dict:
    """Code -> phases (or cycles) per variant that carry it, (N,) ints (every
    code of :data:`PHASE_CODES` and :data:`CYCLE_CODES`, zero where it was not
    checked)."""
    lead = np.shape(conditions[0].mask)[:-1] if conditions else ()
    out = {code: np.zeros(lead, int) for code in PHASE_CODES + CYCLE_CODES}
    for cd in conditions:
        n = cd.counts()
        out[cd.code] = out[cd.code] + n if cd.code in out else n
    return out


def phase_warnings(conditions, scenario, row=None) -> list:
    """The warnings of one variant as :class:`Warning_` records, phase by
    phase in the order of :func:`phase_conditions` (*row*: the variant of a
    batch; None for a batch of one phase axis)."""
    names = [p.name for p in scenario.phases]
    out = []
    for group in ([cd for cd in conditions if not cd.listed_last],
                  [cd for cd in conditions if cd.listed_last]):
        for j, name in enumerate(names):
            for cd in group:
                i = (j,) if row is None else (row, j)
                if cd.mask[i]:
                    limit = None if cd.limit is None else float(cd.limit[i])
                    kind = cd.kinds(i) if cd.kinds is not None else None
                    out.append(Warning_(cd.code, name, float(cd.value[i]), limit, cd.text(i),
                                        kind))
    return out


def thermal_conditions(scenario, steady_no_cooler, operating, cooler_duty,
                       values=None) -> list:
    """The temperature conditions of a strategy over N variants, vectorized
    (masks of shape (N,); a condition of the whole cycle, not of a phase).

    - ``oil-temperature``: without a cooler the oil would settle above the
      fluid's limit on the hottest day (*steady_no_cooler* [K]: the steady
      temperature at ``ambient.temperature_max``, the cooler's design point; a
      limit kept only at the typical ambient is exceeded every hot day), with
      the sized cooler's duty [W] when one is needed; None: not judged;
    - ``viscosity-window``: the viscosity at the *operating* temperature [K]
      (the coupled one, or the design temperature the sized cooler holds), or
      at the cold start, lies outside the pump's allowed window.
    """
    from heatload.properties import oil

    g = values.get if values is not None else (lambda k, d: d)
    fluid = scenario.fluid
    pump = scenario.power_unit.pump
    limit = fluid.temperature_max
    t_op = np.atleast_1d(np.asarray(operating, float))
    n = t_op.shape
    out = []
    if steady_no_cooler is not None:
        t_hot = np.broadcast_to(np.asarray(steady_no_cooler, float), n)
        duty = np.broadcast_to(np.asarray(cooler_duty, float), n)
        amb_max = np.broadcast_to(np.asarray(g(("ambient", "temperature_max"),
                                               scenario.ambient.temperature_max), float), n)

        def hot_text(i):
            tail = (f": a cooler is needed ({mark(duty[i], 'power')} sized)" if duty[i] > 0
                    else "")
            return (f"on the hottest day ({_deg(amb_max[i])} ambient) without a "
                    f"cooler the oil would settle at {_deg(t_hot[i])}, above the "
                    f"fluid's limit {_deg(limit)}{tail}")
        out.append(Condition("oil-temperature", t_hot > limit, t_hot, np.full(n, limit),
                             hot_text, per_phase=False))
    for t, label in ((t_op, "running"),
                     (np.full(n, scenario.ambient.cold_start_temperature), "cold start")):
        nu = np.asarray(oil.kinematic_viscosity(fluid, t), float)
        low = nu < pump.viscosity_min
        edge = np.where(low, pump.viscosity_min, pump.viscosity_max)

        def visc_text(i, t=t, nu=nu, label=label):
            return (f"viscosity {nu[i] * 1e6:.1f} mm²/s at {label} ({_deg(t[i])}) "
                    f"outside the pump's window {pump.viscosity_min * 1e6:.0f}-"
                    f"{pump.viscosity_max * 1e6:.0f} mm²/s")
        out.append(Condition("viscosity-window", low | (nu > pump.viscosity_max), nu, edge,
                             visc_text, per_phase=False))
    out += correlation_range_conditions(scenario, t_op, values)
    return out


def calibration_conditions(scenario, operating: CircuitResult, factor) -> list:
    """``heat-calibration``: the heat into the oil scaled by the scenario's
    ``heat_calibration`` (measured / model) exceeds what the modelled circuit's
    electricity can account for, cycle-averaged:

        f Q_oil > mean(P_electric - P_useful)

    (first law of the machine: the oil cannot take more than the electric input
    less the work done on the load; the model's own heat stays below it by its
    motor losses).  The heat, the temperatures and the cooler follow the
    measurement; the electricity and the energy cost remain the model's and then
    read low.  None where the factor is 1 (nothing measured)."""
    if float(np.max(np.asarray(factor, float))) <= 1.0:
        return []
    t = operating.duration

    def mean(x):
        return (x * t).sum(axis=-1) / t.sum(axis=-1)
    heat = np.asarray(factor, float) * mean(operating.heat_to_oil)
    ceiling = mean(operating.electric_power - operating.useful_power)

    def text(i):
        return (f"the heat calibration puts {mark(heat[i], 'power')} into the oil, more "
                f"than the {mark(ceiling[i], 'power')} the modelled circuit draws beyond "
                f"its useful work: the modelled electricity and energy cost read low "
                f"(check the log, or the pump's and motor's efficiencies)")
    return [Condition("heat-calibration", heat > ceiling * (1.0 + 1e-9), heat, ceiling, text,
                      per_phase=False)]


def correlation_range_conditions(scenario, operating, values=None) -> list:
    """``correlation-range``: a tank surface whose natural-convection correlation is
    used beyond its published Rayleigh range with the oil at *operating* [K] and
    the air at the typical ambient, one condition per surface, masks (N,)
    (:func:`heatload.heat.heat_transfer.surface_rayleigh_numbers`)."""
    from heatload.heat import heat_transfer

    g = values.get if values is not None else (lambda k, d: d)
    t_op = np.atleast_1d(np.asarray(operating, float))
    t_air = np.broadcast_to(np.asarray(g(("ambient", "temperature"),
                                         scenario.ambient.temperature), float), t_op.shape)
    pressure = heat_transfer.barometric_pressure(scenario.ambient.altitude)
    out = []
    for name, ra, low, high in heat_transfer.surface_rayleigh_numbers(
            scenario.reservoir, t_op, t_air, pressure):
        above = ra > high
        edge = np.where(above, high, low)

        def text(i, name=name, ra=ra, low=low, high=high, above=above):
            return (f"{name}: Rayleigh number {ra[i]:.2g} "
                    f"{'above' if above[i] else 'below'} the range of its natural-"
                    f"convection correlation ({low[i]:.0e} to {high[i]:.0e}); its heat "
                    "shedding is an extrapolation")
        out.append(Condition("correlation-range", above | (ra < low), ra, edge, text,
                             per_phase=False))
    return out



def cycle_warnings(conditions, row=0) -> list:
    """The warnings of one variant from conditions of the whole cycle (masks (N,))."""
    return [Warning_(cd.code, None, float(cd.value[row]),
                     None if cd.limit is None else float(cd.limit[row]), cd.text(row))
            for cd in conditions if cd.mask[row]]


def thermal_warnings(scenario, steady_no_cooler: float, operating: float,
                     cooler_duty: float) -> list:
    """The temperature warnings of one strategy (:func:`thermal_conditions`)."""
    return cycle_warnings(thermal_conditions(scenario, steady_no_cooler, operating,
                                             cooler_duty))
