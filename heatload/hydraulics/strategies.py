"""The control strategies: one class per circuit, registered by its name.

Each class holds what is particular to its circuit; the shared solve
(:func:`heatload.hydraulics.circuits.solve_strategy`) asks it for:

- ``available(q, c, p1)`` with ``inlet_throttle`` / ``outlet_throttle``: the
  pump pressure its supply gives at inlet flow Q1, and the entries setting the
  drops of its flow controls; the residual ``available - (drops + p1 +
  inlet throttle)`` decreases in Q1 and the solve finds the set flow or its
  root (:func:`heatload.hydraulics.circuits.residual`);
- ``flow_capacity`` / ``kink``: the most the pump delivers, and the corner
  of its supply characteristic (full flow at the relief or the compensator);
- ``operating_pressures``: pump pressure, actuator pressures and the
  throttle drops at the solved flow;
- ``stall_pressure``, ``rest_pressure``: the pump pressure when the load
  stalls the actuator, and in hold / idle phases;
- ``pump_state``: stroke, shaft speed and delivered flow;
- ``surplus_routing``: where the flow the actuator does not take goes
  (relief, open centre, or bled at working pressure);
- ``settings``: the :class:`heatload.model.StrategyParameters` fields it
  reads (sweeps and the Monte Carlo may vary them), ``settings_text`` for the
  report, ``extra_conditions`` for warnings only this circuit has.

Adding a strategy is one class here (plus its test); the file schema, the
report, the sweep keys and the dashboard read :data:`REGISTRY`.

Several motions at once (``[[phases.simultaneous]]``)
------------------------------------------------------
Where a phase moves several actuators on one supply, each class's docstring
states where its pump sits; common to all:

- the circuit's flow is the sum of the motions' flows (the supply
  characteristics see ``Q1 R``, R = 1 + the other set flows over the phase's
  own, :func:`heatload.hydraulics.circuits._total_flow`);
- each motion has its own path (check valve, line, valve section, return)
  at its own flow, its own force balance and its own throttle; what the pump
  pressure gives beyond a motion's need is that motion's throttling loss,
  ``Q_b (p_pump - drops_b - p1_b)``, booked on it (``CircuitResult.motions``);
- saturation (the pump or the pressure cannot give every set flow): the flow
  is shared **in proportion to the set flows**, every motion reaching the
  same fraction of its set speed (as a load-sensing valve bank with flow
  sharing, post-compensated, does); flagged ``speed-not-reached``, naming
  the rule.  A valve bank without flow sharing would starve the heaviest
  motion first: not modelled.

References
----------
H. E. Merritt, *Hydraulic Control Systems*, Wiley, 1967, ch. 3-5 (valve and
actuator steady-state relations); circuit descriptions: common practice.
"""

from __future__ import annotations

import abc

import numpy as np

from heatload.components import accumulator as _acc
from heatload.hydraulics import circuits as _c
from heatload.components import pumps


class Circuit(abc.ABC):
    """A fixed pump with its relief valve: the defaults the circuits share."""

    kind: str = ""
    description: str = ""
    variable_pump = False     #: a variable-displacement pump (stroke follows demand)
    meters_out = False        #: speed set in the outlet line (holds an overrunning load)
    speed_controlled = False  #: the pump's motor runs on a frequency converter
    accumulator = False       #: an accumulator stores the pump's flow between phases
    settings: tuple = ()      #: StrategyParameters fields this circuit reads

    # -- the flow solve -----------------------------------------------------
    def flow_capacity(self, c):
        """Most the pump can deliver [m^3/s]."""
        return c["q_theoretical"]

    def kink(self, c, q_cap, leak):
        """Inlet flow at the corner of the supply characteristic [m^3/s]."""
        return q_cap - leak * c["relief_cracking"]

    #: entry of the circuit dict setting the drop of a compensated flow control in
    #: the inlet line at the set flow (~Q^2 below it), or None where there is none;
    #: ``outlet_throttle`` the same in the outlet line
    inlet_throttle = None
    outlet_throttle = None

    @abc.abstractmethod
    def available(self, q, c, p1):
        """Pump pressure the supply gives at inlet flow *q* [Pa] (*p1*: the
        actuator's inlet pressure there, which a load-sensing pump follows)."""

    # -- the operating point ----------------------------------------------------
    def operating_pressures(self, q1, c, supply, p_back, moving, stalled):
        """``(p_pump, p1, p2, dp_cb, dp_fc_in, dp_fc_out)`` at the solved flow [Pa]."""
        p1, p2, dp_cb = _c._inlet_pressure_at(p_back, c)
        p_pump, dp_fc_in = self.pump_pressure(q1, c, supply + p1, p1, moving, stalled)
        return p_pump, p1, p2, dp_cb, dp_fc_in, np.zeros(np.shape(q1))

    @abc.abstractmethod
    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        """``(p_pump, dp_fc_in)``: pump pressure and inlet throttle drop [Pa]."""

    def stall_pressure(self, c, z):
        """Pump pressure where the load stalls the actuator [Pa]."""
        return _c._relief_supply(z, c, c["q_theoretical"])

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        """Pump pressure in hold and idle phases [Pa]."""
        return np.where(use_centre, centre_dp, relief_full)

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        """``(stroke fraction, shaft speed [rev/s], delivered flow [m^3/s])``
        (``c["pump_pressure"]``: the solved pump pressure [Pa])."""
        n_pump = np.broadcast_to(c["pump_speed"], shape).astype(float)
        return np.ones(shape), n_pump, np.maximum(c["q_theoretical"] - leakage, 0.0)

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        """``(to_centre, to_relief)``: where the surplus flow goes (else: bled)."""
        to_centre = ~moving & use_centre
        return to_centre, ~to_centre

    def pump_power(self, c, n_pump, p_pump, frac, q1, duration):
        """``(shaft power [W], losses apart {component: W}, stored [W], duty)``.

        The shaft power of the pump(s) at the operating point; the losses of a
        pump running apart from the circuit (an unloaded pump's flow to tank,
        booked under that component); the power put into an accumulator; and
        an accumulator pump's on-time over the cycle (None for the rest).
        One pump delivering into the circuit: ``P = 2 pi n T(p)``
        (:func:`heatload.components.pumps.pump_torque`), nothing apart, nothing stored.
        """
        torque = pumps.pump_torque_unchecked(c["pump_displacement"], n_pump,
                                             np.maximum(p_pump, 0.0), c["mu"],
                                             c["pump_viscous"], c["pump_friction"], frac)
        return pumps.pump_shaft_power_unchecked(torque, n_pump), {}, 0.0, None

    # -- reporting --------------------------------------------------------------
    def settings_text(self, sp, q) -> str:
        """The settings of *sp* (StrategyParameters) in one line; *q* formats a value."""
        return f"flow control min. drop {q(sp.flow_control_min_drop, 'pressure')}"

    def extra_conditions(self, c, result) -> list:
        """Warning conditions only this circuit has (:class:`heatload.checks.Condition`)."""
        return []


_COUNTERBALANCE = ("counterbalance_setting", "counterbalance_pilot_ratio")


class MeterIn(Circuit):
    """Fixed pump, relief, a 2-way flow control in each inlet line.

    Several motions: the pump at the relief (or, short of flow, its curve) for
    the sum of their flows; each flow control throttles relief - its need.
    """

    kind = "meter-in"
    description = ("fixed pump, relief sets the pump pressure, a 2-way compensated flow "
                   "control in the inlet line; surplus flow crosses the relief")
    settings = ("flow_control_min_drop",) + _COUNTERBALANCE
    inlet_throttle = "fc_min_drop"   #: the inlet flow control's drop at the set flow

    def available(self, q, c, p1):
        return _c._relief_supply(q, c, c["q_theoretical"])

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        p_pump = _c._relief_supply(q1, c, c["q_theoretical"])
        return p_pump, np.maximum(p_pump - required, 0.0)


class MeterOut(MeterIn):
    """As :class:`MeterIn` with the flow control in the outlet line.

    Several motions: the pump at the relief for the sum of their flows; each
    outlet flow control takes what its force balance leaves at that pressure.
    """

    kind = "meter-out"
    description = ("as meter-in with the flow control in the outlet line: the outlet "
                   "pressure is (p1 A1 - F)/A2 and may exceed supply by the area ratio")
    meters_out = True

    inlet_throttle = None
    outlet_throttle = "fc_min_drop"

    def operating_pressures(self, q1, c, supply, p_back, moving, stalled):
        # throttle drop = what the relief pressure leaves beyond the force balance
        p_pump = _c._relief_supply(q1, c, c["q_theoretical"])
        p1_open = p_pump - supply
        # p1 A1 - (p_back + bp + dp_fc) A2 = F  ->  dp_fc = (p1 A1 - F)/A2 - p_back - bp
        # (bp: the actuator's back-pressure valve, if any)
        dp_fc_out = np.where(moving & ~stalled,
                             np.maximum((p1_open * c["a_in"] - c["force"]) / c["a_out"]
                                        - p_back - c.get("back_pressure", 0.0), 0.0), 0.0)
        p1, p2, dp_cb = _c._inlet_pressure_at(p_back + dp_fc_out, c)
        return p_pump, p1, p2, dp_cb, np.zeros(np.shape(q1)), dp_fc_out


class BleedOff(Circuit):
    """Fixed pump at the working pressure; the surplus bled to tank.

    Several motions: the pump at the heaviest motion's need (relief at most);
    the surplus is bled at that pressure and each lighter motion's own valve
    throttles the difference (it needs one, or it would take all the flow).
    """

    kind = "bleed-off"
    description = ("fixed pump at the working pressure; the surplus is bled to tank at "
                   "that pressure by a restrictor set for the phase's speed")
    settings = ("flow_control_min_drop",) + _COUNTERBALANCE

    def available(self, q, c, p1):
        return _c._relief_supply(q, c, c["q_theoretical"])

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        # several motions: the pump at the heaviest's need; a lighter one's own
        # valve throttles the difference (booked on it by the solve)
        need, _ = _c.governing(required, p1, c)
        p_pump = np.minimum(need, _c._relief_supply(q1, c, self.flow_capacity(c)))
        if c.get("need_max") is None:
            return p_pump, np.zeros(np.shape(q1))
        return p_pump, np.maximum(p_pump - required, 0.0)

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        # the bleed restrictor opens fully: pump at about the centre drop
        return np.where(holding & ~use_centre, relief_full, centre_dp)

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        return (np.zeros(shape, dtype=bool),
                np.where(moving, at_relief, holding & ~use_centre))

    def extra_conditions(self, c, result):
        return [speed_drift_condition(bleed_off_speed_change(c, result), c)]


def bleed_off_speed_change(c: dict, result, load_factor: float = 1.1,
                           iterations: int = 30) -> np.ndarray:
    """Relative speed change of a bleed-off circuit when the load changes by
    *load_factor*, the bleed restrictor staying as set for the nominal load.

    The bleed restrictor is a sharp-edged orifice, Q_b = Q_b0 sqrt(p / p0)
    (Merritt 1967, ch. 3); the actuator gets what the pump delivers less the
    bleed, Q1 = Q_p(p) - Q_b(p), at the pressure the changed load needs,
    p = drops(Q1) + p1(Q1, F'), solved by damped fixed-point steps.  Returns
    (v' - v) / v per phase [-] (0 where nothing moves).
    """
    c = dict(c)
    c["cb_active"] = result.counterbalance_active
    c.pop("cb_idle", None)
    c["cb_setting"] = np.where(result.counterbalance_active, result.counterbalance_setting,
                               c["cb_setting"])
    c["q_theoretical"] = c["pump_displacement"] * c["pump_speed"]
    c["force"] = np.where(c["moving"], c["force"] + (load_factor - 1.0) * c["load"], c["force"])
    moving = c["moving"] & (result.speed > 0)
    p0 = np.maximum(result.pump_pressure, 1.0)
    qb0 = result.bleed_flow
    leak = _c._leak_conductance(c)
    q = result.actuator_flow.copy()
    views = _c.motion_views(c)
    if views:
        # several motions (the phase's own load changed): the pump at the heaviest
        # need, their flows in their set proportion, Q1 = total / R
        for b, v in enumerate(views, start=1):
            for key, val in zip(("cb_fitted", "cb_setting", "cb_ratio", "cb_active"),
                                _c._holding_valves(v, v["moving"], False)[:4]):
                c[f"motion{b}:{key}"] = val
            c.pop(f"motion{b}:cb_idle", None)
        for _ in range(iterations):
            supply, p1 = _c._supply_and_inlet(q, c, 0.0)
            p = np.maximum(supply + p1, 0.0)
            q_new = np.maximum(c["q_theoretical"] - leak * p - qb0 * np.sqrt(p / p0), 0.0)
            q = 0.5 * (q + q_new / c["flow_total_ratio"])
    for _ in range(0 if views else iterations):
        p1, _, _ = _c._inlet_pressure(q, c, 0.0)
        p = np.maximum(_c._supply_drop(q, c) + p1, 0.0)
        q_new = np.maximum(c["q_theoretical"] - leak * p - qb0 * np.sqrt(p / p0), 0.0)
        q = 0.5 * (q + q_new)
    v0 = np.where(moving, result.actuator_flow, 1.0)
    return np.where(moving, (q - result.actuator_flow) / v0, 0.0)


#: Speed change for +10 % load above which a bleed-off phase is flagged [-]
SPEED_DRIFT_LIMIT = 0.05


def speed_drift_condition(change, c):
    """Bleed-off phases whose speed moves more than 5 % when the load rises 10 %
    (*change* from :func:`bleed_off_speed_change`)."""
    change = np.asarray(change, float)
    moving = np.broadcast_to(c["moving"], change.shape)

    def text(i):
        what = ("the actuator stalls" if change[i] <= -0.999
                else f"speed changes {100 * change[i]:+.0f} %")
        return f"{what} when the load rises 10 %: a bleed-off speed follows the load"
    from heatload.checks import Condition

    return Condition("speed-drift", moving & (np.abs(change) > SPEED_DRIFT_LIMIT), change,
                     np.full(change.shape, SPEED_DRIFT_LIMIT), text, listed_last=True)


class BypassCompensated(MeterIn):
    """3-way compensated flow control: the pump at the load + its spring.

    Several motions: the 3-way compensator at the heaviest motion's need + its
    spring; each lighter motion's valve throttles the difference.
    """

    kind = "bypass-compensated"
    description = ("3-way compensated flow control: surplus leaves at working pressure + "
                   "the compensator spring")
    settings = ("bypass_spring",) + _COUNTERBALANCE
    inlet_throttle = "bypass_spring"   # the 3-way compensator's spring sets the drop

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        spring_drop = np.where(moving & ~stalled,
                               c["bypass_spring"] * np.minimum(q1 / c["q_target_safe"], 1.0)
                               ** 2, 0.0)
        need, _ = _c.governing(required, p1, c)   # the heaviest motion's need
        p_pump = np.minimum(need + spring_drop,
                            _c._relief_supply(q1, c, c["q_theoretical"]))
        return p_pump, np.maximum(p_pump - required, 0.0)

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        # with the load port vented the 3-way compensator unloads at its spring
        return np.where(use_centre, centre_dp,
                        np.minimum(np.where(holding, p_hold, 0.0) + c["bypass_spring"],
                                   relief_full))

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        to_centre = ~moving & use_centre
        return to_centre, ~to_centre & at_relief

    def settings_text(self, sp, q):
        return f"3-way spring {q(sp.bypass_spring, 'pressure')}"


class _VariablePump(Circuit):
    """A variable pump held at its compensator: delivers only the flow used."""

    variable_pump = True

    def kink(self, c, q_cap, leak):
        return c["q_theoretical"] - leak * c["compensator"]

    def stall_pressure(self, c, z):
        return c["compensator"]

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        frac = np.clip((q1 + leakage) / c["q_theoretical"], 0.0, 1.0)
        n_pump = np.broadcast_to(c["pump_speed"], shape).astype(float)
        return frac, n_pump, q1 * 1.0

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        return np.zeros(shape, dtype=bool), np.zeros(shape, dtype=bool)


class PressureCompensated(_VariablePump):
    """Variable pump at its compensator setting, meter-in flow controls.

    Several motions: the pump at its setting delivering the sum of their
    flows; each flow control throttles setting - its need.
    """

    kind = "pressure-compensated"
    description = ("variable pump held at its compensator setting, delivering only the flow "
                   "used; a meter-in flow control sets the speed")
    settings = ("compensator_setting", "flow_control_min_drop") + _COUNTERBALANCE

    inlet_throttle = "fc_min_drop"

    def available(self, q, c, p1):
        return _c._compensator_supply(q, c, c["compensator"], c["q_theoretical"])

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        p_pump = _c._compensator_supply(q1, c, c["compensator"], c["q_theoretical"])
        return p_pump, np.maximum(p_pump - required, 0.0)

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        # held at its setting at zero stroke; an open/tandem centre vents the
        # pump line instead: the pump swings out and circulates at the centre drop
        return np.where(use_centre, centre_dp, c["compensator"])

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        frac, n_pump, q_pump = super().pump_state(c, q1, leakage, moving, stalled, use_centre,
                                                  shape)
        frac = np.where(use_centre, 1.0, frac)
        q_pump = np.where(use_centre, np.maximum(c["q_theoretical"] - leakage, 0.0), q_pump)
        return frac, n_pump, q_pump

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        # all of it through a vented centre
        return use_centre, np.zeros(shape, dtype=bool)

    def settings_text(self, sp, q):
        return "compensator " + (q(sp.compensator_setting, "pressure")
                                 if sp.compensator_setting else "relief cracking - 10 bar")


class LoadSensing(_VariablePump):
    """Load-sensing variable pump at the highest load pressure + its margin.

    Several motions: the pump at the highest load pressure of the motions +
    the margin, delivering the sum of their flows; the heaviest meters with
    the margin, each lighter one's compensator throttles the difference
    (loss on that motion).
    """

    kind = "load-sensing"
    description = ("variable pump at the highest load pressure + margin; the proportional "
                   "valve meters with the margin; standby pressure when idle")
    settings = ("load_sensing_margin", "standby_pressure", "compensator_setting") \
        + _COUNTERBALANCE

    def available(self, q, c, p1):
        return np.minimum(_c._compensator_supply(q, c, c["compensator"], c["q_theoretical"]),
                          p1 + c["ls_margin"])

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        _, load = _c.governing(required, p1, c)   # the highest load pressure
        p_pump = np.minimum(_c._compensator_supply(q1, c, c["compensator"], c["q_theoretical"]),
                            load + c["ls_margin"])
        return p_pump, np.maximum(p_pump - required, 0.0)

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        return np.where(holding, np.minimum(p_hold + c["ls_margin"], c["compensator"]),
                        c["standby"])

    def settings_text(self, sp, q):
        return (f"margin {q(sp.load_sensing_margin, 'pressure')}, standby "
                f"{q(sp.standby_pressure, 'pressure')}")


class VariableSpeed(Circuit):
    """Fixed pump on a speed-controlled motor, at the working pressure.

    Several motions: the pump turns for the sum of their flows at the
    heaviest motion's need; each lighter motion's valve throttles the
    difference.
    """

    kind = "variable-speed"
    description = ("fixed pump on a speed-controlled motor delivering the flow used at the "
                   "working pressure; surplus below its minimum speed is bled at the working "
                   "pressure")
    speed_controlled = True
    settings = ("min_speed_fraction", "max_speed_fraction") + _COUNTERBALANCE

    def flow_capacity(self, c):
        return c["q_theoretical_max"]

    def available(self, q, c, p1):
        return _c._relief_supply(q, c, c["q_theoretical_max"])

    pump_pressure = BleedOff.pump_pressure

    def _min_flow(self, c):
        return c["pump_displacement"] * c["pump_speed"] * c["vs_min_fraction"]

    def stall_pressure(self, c, z):
        # a stalled variable-speed pump turns at its minimum speed (below): the relief
        # passes that flow only, and its override follows that flow
        return _c._relief_supply(z, c, self._min_flow(c))

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        q_min = self._min_flow(c)
        return np.where(holding, np.minimum(p_hold, relief_full),
                        np.where(c["centre_unloads"], _c._centre_drop(q_min, c),
                                 _c._relief_supply(z, c, q_min)))

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        n_nom = c["pump_speed"]
        n_need = (q1 + leakage) / c["pump_displacement"]
        n_pump = np.clip(n_need, n_nom * c["vs_min_fraction"], n_nom * c["vs_max_fraction"])
        n_pump = np.where(moving & stalled,
                          np.maximum(leakage / c["pump_displacement"],
                                     n_nom * c["vs_min_fraction"]), n_pump)
        return (np.ones(shape), n_pump,
                np.maximum(c["pump_displacement"] * n_pump - leakage, 0.0))

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        to_centre = ~moving & ~holding & centre_ok
        return to_centre, ~to_centre & (at_relief | (~moving & ~holding))

    def settings_text(self, sp, q):
        return (f"speed {100 * sp.min_speed_fraction:.0f}-"
                f"{100 * sp.max_speed_fraction:.0f} % of nominal")


class _Share(dict):
    """A circuit dict seen as one pump of a set: its displacement is *share* of
    the whole (the leakage scales with it), every other entry as in *c*."""

    def __init__(self, c, share):
        super().__init__(pump_displacement=c["pump_displacement"] * share)
        self._c = c
        self["pump_leak"] = _c.pump_leak_conductance(self)   # its own, not the set's

    def __missing__(self, key):
        return self._c[key]

    def get(self, key, default=None):
        try:
            return self[key]
        except KeyError:
            return default


class HiLo(MeterIn):
    """Hi-lo: a double pump (or two pumps) on one shaft, and a meter-in flow control.

    The large, low-pressure pump delivers with the small one until the system
    pressure reaches the unloading valve's setting p_u; above it the unloading
    valve dumps the large pump's flow to tank at its small drop dp_u and the
    small, high-pressure pump alone works up to the relief.  Supply pressure
    available at circuit flow Q (the higher of the two stages):

        p(Q) = max( relief(Q; Q_H),  p_u while Q <= Q_H + Q_L )

    with Q_H = x D n (x: ``high_pressure_fraction``) and Q_L = (1 - x) D n, D
    the power unit's pump displacement (the double pump's total), each less its
    leakage.  Where the flow control takes less than both pumps give at p_u,
    the unloading valve modulates and passes the surplus at p_u (booked as
    bleed); where the load needs more than p_u the large pump is unloaded: its
    flow Q_L' crosses the unloading valve at dp_u (loss Q_L' dp_u, bleed) and
    the small pump's surplus crosses the relief.

    Shaft power: each pump's torque at its own pressure,
    ``P = 2 pi n (T(x D, p) + T((1 - x) D, p_L))``, p_L = p or dp_u.

    Several motions: the supply above at the sum of their flows; each flow
    control throttles the system pressure down to its need.

    References
    ----------
    Two-pump (hi-lo) circuits with an unloading valve: common practice (e.g.
    press approach at both pumps' flow, pressing at the small pump's).
    """

    kind = "hi-lo"
    description = ("double pump: both deliver below the unloading pressure, above it the "
                   "large pump is unloaded to tank and the small one works up to the relief; "
                   "a meter-in flow control sets the speed")
    settings = ("high_pressure_fraction", "unloading_pressure", "unloading_valve_drop",
                "flow_control_min_drop") + _COUNTERBALANCE

    def available(self, q, c, p1):
        x = c["hilo_fraction"]
        return np.maximum(_c._relief_supply(q, _Share(c, x), x * c["q_theoretical"]),
                          _c._compensator_supply(q, c, c["unload_pressure"],
                                                 c["q_theoretical"]))

    def kink(self, c, q_cap, leak):
        # the corner of the high stage: the small pump's full flow at the relief
        x = c["hilo_fraction"]
        return x * (c["q_theoretical"] - leak * c["relief_cracking"])

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        p_pump = self.available(q1, c, p1)
        return p_pump, np.maximum(p_pump - required, 0.0)

    def _small_relief(self, c, q):
        x = c["hilo_fraction"]
        return _c._relief_supply(q, _Share(c, x), x * c["q_theoretical"])

    def stall_pressure(self, c, z):
        return self._small_relief(c, z)

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        # a vented centre passes both pumps' flow; else the small pump's crosses the relief
        return np.where(use_centre, centre_dp, self._small_relief(c, z))

    def _loaded(self, c, p_pump):
        """Where the large pump delivers into the circuit (system at or below p_u)."""
        return p_pump <= c["unload_pressure"] * (1.0 + 1e-9)

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        # *leakage* is both pumps' at the pump pressure; the small one's is x of it
        n_pump = np.broadcast_to(c["pump_speed"], shape).astype(float)
        share = np.where(self._loaded(c, c["pump_pressure"]), 1.0, c["hilo_fraction"])
        return np.ones(shape), n_pump, np.maximum(share * (c["q_theoretical"] - leakage), 0.0)

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        # below the relief the surplus is the large pump's, passed by the
        # modulating unloading valve at the system pressure: bled
        to_centre = ~moving & use_centre
        return to_centre, ~to_centre & at_relief

    def pump_power(self, c, n_pump, p_pump, frac, q1, duration):
        x = c["hilo_fraction"]
        p = np.maximum(p_pump, 0.0)
        loaded = self._loaded(c, p_pump)
        p_large = np.where(loaded, p, c["unloading_drop"])

        def torque(share, pressure):
            return pumps.pump_torque(c["pump_displacement"] * share, n_pump, pressure, c["mu"],
                                     c["pump_viscous"], c["pump_friction"])
        shaft = pumps.pump_shaft_power(torque(x, p) + torque(1.0 - x, p_large), n_pump)
        leak_large = (1.0 - x) * _c._leak_conductance(c) * c["unloading_drop"]
        q_dumped = np.where(loaded, 0.0,
                            np.maximum((1.0 - x) * c["pump_displacement"] * n_pump
                                       - leak_large, 0.0))
        return shaft, {"bleed": q_dumped * c["unloading_drop"]}, 0.0, None

    def settings_text(self, sp, q):
        unload = (q(sp.unloading_pressure, "pressure") if sp.unloading_pressure
                  else "a third of the relief cracking")
        return (f"small pump {100 * sp.high_pressure_fraction:.0f} % of the displacement, "
                f"large pump unloaded above {unload} (to tank at "
                f"{q(sp.unloading_valve_drop, 'pressure')})")


class Accumulator(MeterIn):
    """Accumulator circuit: a fixed pump charging a gas accumulator between a
    lowest and a highest working pressure; an unloading (charging) valve idles
    the pump at its small drop dp_u once p_max is reached and puts it back on
    at p_min.  The actuators draw from the accumulator through a meter-in flow
    control, which throttles the accumulator's pressure down to the load's.

    Pressures: the speed must be held down to p_min, so the flow solve takes
    p_min as the supply; the energy is booked at the swing's volume-weighted
    mean pressure p_m (:func:`heatload.components.accumulator.mean_pressure`, polytropic
    gas, n = 1 by default), the pressure the pump charges at and the circuit
    draws at on average.  Throttling p_m -> p1 + drops is the flow control's
    loss ``Q1 (p_m - p_required)``.

    Pump: on for a fraction d of the cycle (:func:`heatload.components.accumulator.pump_duty`,
    d = sum(Q1 t) / (Q_p' T), Q_p' = D n - L p_m), idling for 1 - d; in every
    phase it is booked at that average state:

        P_shaft = d 2 pi n T(p_m) + (1 - d) 2 pi n T(dp_u)
        unloaded loss (bleed) = (1 - d) Q_idle' dp_u
        stored = p_m (d Q_p' - Q1)          (sums to zero over the cycle)

    so each phase closes ``P_el = useful + losses + stored``.

    Several motions: the accumulator gives the sum of their flows (the duty
    counts every motion's volume); each flow control throttles p_m - its need.

    Notes
    -----
    The drive motor's part-load loss is taken at the averaged shaft power, not
    averaged over the on and off states; the motor-overload check sees the
    averaged power too.  Where d > 1 the pump cannot recharge the accumulator
    within the cycle (flagged; d is then held at 1), and a phase drawing faster
    than the pump delivers must find its whole volume between p_max and p_min
    (the pump comes in only at p_min): flagged where it cannot.

    References
    ----------
    Ideal-gas polytropic process (:mod:`heatload.components.accumulator`); accumulator
    charging circuits with an unloading valve: common practice.
    """

    kind = "accumulator"
    description = ("fixed pump charging a gas accumulator between two pressures, idled by "
                   "an unloading valve in between; the accumulator delivers the peaks "
                   "through a meter-in flow control")
    accumulator = True
    settings = ("accumulator_pressure_min", "accumulator_pressure_max", "accumulator_precharge",
                "accumulator_gas_volume", "polytropic_exponent", "unloading_valve_drop",
                "flow_control_min_drop") + _COUNTERBALANCE

    def _mean(self, c):
        return _acc.mean_pressure(c["acc_p_min"], c["acc_p_max"], c["acc_exponent"])

    def available(self, q, c, p1):
        # the speed must be held down to the lowest working pressure
        return c["acc_p_min"]

    def kink(self, c, q_cap, leak):
        return q_cap

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        p_m = self._mean(c) + np.zeros(np.shape(q1))
        return p_m, np.maximum(p_m - required, 0.0)

    def stall_pressure(self, c, z):
        return self._mean(c) + z

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        # a closed circuit: the accumulator holds its pressure on the valve
        return self._mean(c) + z

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        # the accumulator gives the circuit what it takes; the pump's own
        # state is booked in pump_power
        n_pump = np.broadcast_to(c["pump_speed"], shape).astype(float)
        return np.ones(shape), n_pump, q1 * 1.0

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        return np.zeros(shape, dtype=bool), np.zeros(shape, dtype=bool)

    def delivery(self, c, q1, duration):
        """``(p_m, charging flow Q_p', idle flow Q_idle', cycle duty d)``."""
        p_m = self._mean(c)
        leak = _c._leak_conductance(c)
        q_th = c["pump_displacement"] * c["pump_speed"]
        q_on = np.maximum(q_th - leak * p_m, 1e-30)
        q_idle = np.maximum(q_th - leak * c["unloading_drop"], 0.0)
        t = np.broadcast_to(duration, np.shape(q1))
        # per-variant constants broadcast over phases: the cycle's sums over the last axis
        volume = (q1 * t).sum(axis=-1)
        q_on_row = np.broadcast_to(q_on, np.shape(q1))[..., 0]
        duty = _acc.pump_duty(volume, q_on_row, t.sum(axis=-1))
        return p_m, q_on, q_idle, duty

    def pump_power(self, c, n_pump, p_pump, frac, q1, duration):
        p_m, q_on, q_idle, duty = self.delivery(c, q1, duration)
        d = np.minimum(duty, 1.0)[..., None]

        def shaft(p):
            return pumps.pump_shaft_power(
                pumps.pump_torque(c["pump_displacement"], n_pump, p, c["mu"],
                                  c["pump_viscous"], c["pump_friction"]), n_pump)
        power = d * shaft(p_m + 0.0 * n_pump) + (1.0 - d) * shaft(c["unloading_drop"]
                                                                  + 0.0 * n_pump)
        stored = p_m * (d * q_on - q1)
        return power, {"bleed": (1.0 - d) * q_idle * c["unloading_drop"]}, stored, duty

    def extra_conditions(self, c, result):
        from heatload.checks import Condition
        # what the circuit draws: every motion of a phase (the pump flow booked)
        q1, t = result.pump_flow, result.duration
        p_m, q_on, _, duty = self.delivery(c, q1, t)
        shape = np.shape(q1)
        usable = np.broadcast_to(_acc.usable_volume(c["acc_p_min"], c["acc_p_max"],
                                                    c["acc_precharge"], c["acc_volume"],
                                                    c["acc_exponent"]), shape)
        q_on = np.broadcast_to(q_on, shape)
        need = q1 * t / c.get("repeats", 1.0)     # one pass of a repeated phase
        short = (q1 > q_on) & (need > usable * (1.0 + 1e-9))
        behind = np.broadcast_to(np.asarray(duty)[..., None] > 1.0 + 1e-9, shape) \
            & np.broadcast_to(c["moving"], shape)
        d = np.broadcast_to(np.asarray(duty)[..., None], shape)

        def text_short(i):
            return (f"the phase draws {need[i] * 1e3:.2f} L faster than the pump delivers; "
                    f"the accumulator gives only {usable[i] * 1e3:.2f} L between its "
                    f"working pressures: the speed falls when it is empty")

        def text_behind(i):
            return (f"the cycle draws {100 * d[i]:.0f} % of what the pump can recharge: "
                    f"the accumulator runs down cycle by cycle")
        return [Condition("speed-not-reached", short, need, usable, text_short),
                Condition("speed-not-reached", behind, d, np.ones(shape), text_behind)]

    def settings_text(self, sp, q):
        def p(v, default):
            return q(v, "pressure") if v else default
        return (f"accumulator {q(sp.accumulator_gas_volume, 'volume')} gas, working "
                f"{p(sp.accumulator_pressure_min, '0.75 x max')} to "
                f"{p(sp.accumulator_pressure_max, 'relief - 10 bar')}, n = "
                f"{sp.polytropic_exponent:g}")


#: Every strategy by name, in the order heatload shows them.
REGISTRY = {cls.kind: cls() for cls in (MeterIn, MeterOut, BleedOff, BypassCompensated,
                                        PressureCompensated, LoadSensing, VariableSpeed,
                                        HiLo, Accumulator)}
#: Their names (:data:`heatload.model.STRATEGIES`).
NAMES = tuple(REGISTRY)


def circuit(kind: str) -> Circuit:
    """The registered circuit of *kind*; a one-line error naming the choices."""
    try:
        return REGISTRY[kind]
    except (KeyError, TypeError):
        from heatload.errors import HeatloadError
        raise HeatloadError(f"unknown strategy {kind!r}; expected one of "
                            f"{', '.join(NAMES)}", field="strategies") from None
