"""The control strategies: one class per circuit, registered by its name.

Each class holds what is particular to its circuit; the shared solve
(:func:`heatload.circuits.solve_strategy`) asks it for:

- ``residual(q, c)``: available minus required pump pressure at inlet flow
  Q1 (decreasing in Q1); the solve finds the set flow or the root;
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

References
----------
H. E. Merritt, *Hydraulic Control Systems*, Wiley, 1967, ch. 3-5 (valve and
actuator steady-state relations); circuit descriptions: common practice.
"""

from __future__ import annotations

import numpy as np

from heatload import circuits as _c


class Circuit:
    """A fixed pump with its relief valve: the defaults the circuits share."""

    kind: str = ""
    description: str = ""
    variable_pump = False     #: a variable-displacement pump (stroke follows demand)
    meters_out = False        #: speed set in the outlet line (holds an overrunning load)
    speed_controlled = False  #: the pump's motor runs on a frequency converter
    settings: tuple = ()      #: StrategyParameters fields this circuit reads

    # -- the flow solve -----------------------------------------------------
    def flow_capacity(self, c):
        """Most the pump can deliver [m^3/s]."""
        return c["q_theoretical"]

    def kink(self, c, q_cap, leak):
        """Inlet flow at the corner of the supply characteristic [m^3/s]."""
        return q_cap - leak * c["relief_cracking"]

    def residual(self, q, c, rec=None):
        raise NotImplementedError

    # -- the operating point ----------------------------------------------------
    def operating_pressures(self, q1, c, supply, p_back, moving, stalled):
        """``(p_pump, p1, p2, dp_cb, dp_fc_in, dp_fc_out)`` at the solved flow [Pa]."""
        p1, p2, dp_cb = _c._inlet_pressure_at(p_back, c)
        p_pump, dp_fc_in = self.pump_pressure(q1, c, supply + p1, p1, moving, stalled)
        return p_pump, p1, p2, dp_cb, dp_fc_in, np.zeros(np.shape(q1))

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        """``(p_pump, dp_fc_in)``: pump pressure and inlet throttle drop [Pa]."""
        raise NotImplementedError

    def stall_pressure(self, c, z):
        """Pump pressure where the load stalls the actuator [Pa]."""
        return _c._relief_supply(z, c, c["q_theoretical"])

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        """Pump pressure in hold and idle phases [Pa]."""
        return np.where(use_centre, centre_dp, relief_full)

    def pump_state(self, c, q1, leakage, moving, stalled, use_centre, shape):
        """``(stroke fraction, shaft speed [rev/s], delivered flow [m^3/s])``."""
        n_pump = np.broadcast_to(c["pump_speed"], shape).astype(float)
        return np.ones(shape), n_pump, np.maximum(c["q_theoretical"] - leakage, 0.0)

    def surplus_routing(self, moving, holding, use_centre, centre_ok, at_relief, shape):
        """``(to_centre, to_relief)``: where the surplus flow goes (else: bled)."""
        to_centre = ~moving & use_centre
        return to_centre, ~to_centre

    # -- reporting --------------------------------------------------------------
    def settings_text(self, sp, q) -> str:
        """The settings of *sp* (StrategyParameters) in one line; *q* formats a value."""
        return f"flow control min. drop {q(sp.flow_control_min_drop, 'pressure')}"

    def extra_conditions(self, c, result) -> list:
        """Warning conditions only this circuit has (:class:`heatload.checks.Condition`)."""
        return []


_COUNTERBALANCE = ("counterbalance_setting", "counterbalance_pilot_ratio")


def _throttle(c, q, setting):
    """Drop of a compensated flow control at flow *q*: its setting at the set
    flow, ~Q^2 below it."""
    return setting * (q / c["q_target_safe"]) ** 2


class MeterIn(Circuit):
    kind = "meter-in"
    description = ("fixed pump, relief sets the pump pressure, a 2-way compensated flow "
                   "control in the inlet line; surplus flow crosses the relief")
    settings = ("flow_control_min_drop",) + _COUNTERBALANCE
    throttle = "fc_min_drop"   #: the inlet flow control's drop at the set flow

    def residual(self, q, c, rec=None):
        supply, p1 = _c._supply_and_inlet(q, c, 0.0, rec)
        dp_fc = _throttle(c, q, c[self.throttle])
        return _c._relief_supply(q, c, c["q_theoretical"]) - (supply + p1 + dp_fc)

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        p_pump = _c._relief_supply(q1, c, c["q_theoretical"])
        return p_pump, np.maximum(p_pump - required, 0.0)


class MeterOut(MeterIn):
    kind = "meter-out"
    description = ("as meter-in with the flow control in the outlet line: the outlet "
                   "pressure is (p1 A1 - F)/A2 and may exceed supply by the area ratio")
    meters_out = True

    def residual(self, q, c, rec=None):
        dp_fc = _throttle(c, q, c["fc_min_drop"])
        supply, p1 = _c._supply_and_inlet(q, c, dp_fc, rec)
        return _c._relief_supply(q, c, c["q_theoretical"]) - (supply + p1)

    def operating_pressures(self, q1, c, supply, p_back, moving, stalled):
        # throttle drop = what the relief pressure leaves beyond the force balance
        p_pump = _c._relief_supply(q1, c, c["q_theoretical"])
        p1_open = p_pump - supply
        # p1 A1 - (p_back + dp_fc) A2 = F  ->  dp_fc = (p1 A1 - F)/A2 - p_back
        dp_fc_out = np.where(moving & ~stalled,
                             np.maximum((p1_open * c["a_in"] - c["force"]) / c["a_out"]
                                        - p_back, 0.0), 0.0)
        p1, p2, dp_cb = _c._inlet_pressure_at(p_back + dp_fc_out, c)
        return p_pump, p1, p2, dp_cb, np.zeros(np.shape(q1)), dp_fc_out


class BleedOff(Circuit):
    kind = "bleed-off"
    description = ("fixed pump at the working pressure; the surplus is bled to tank at "
                   "that pressure by a restrictor set for the phase's speed")
    settings = ("flow_control_min_drop",) + _COUNTERBALANCE

    def residual(self, q, c, rec=None):
        supply, p1 = _c._supply_and_inlet(q, c, 0.0, rec)
        return _c._relief_supply(q, c, c["q_theoretical"]) - (supply + p1)

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        return (np.minimum(required, _c._relief_supply(q1, c, self.flow_capacity(c))),
                np.zeros(np.shape(q1)))

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
    c["cb_setting"] = np.where(result.counterbalance_active, result.counterbalance_setting,
                               c["cb_setting"])
    c["q_theoretical"] = c["pump_displacement"] * c["pump_speed"]
    c["force"] = np.where(c["moving"], c["force"] + (load_factor - 1.0) * c["load"], c["force"])
    moving = c["moving"] & (result.speed > 0)
    p0 = np.maximum(result.pump_pressure, 1.0)
    qb0 = result.bleed_flow
    leak = _c._leak_conductance(c)
    q = result.actuator_flow.copy()
    for _ in range(iterations):
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
    kind = "bypass-compensated"
    description = ("3-way compensated flow control: surplus leaves at working pressure + "
                   "the compensator spring")
    settings = ("bypass_spring",) + _COUNTERBALANCE
    throttle = "bypass_spring"   # the 3-way compensator's spring sets the drop

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        spring_drop = np.where(moving & ~stalled,
                               c["bypass_spring"] * np.minimum(q1 / c["q_target_safe"], 1.0)
                               ** 2, 0.0)
        p_pump = np.minimum(required + spring_drop,
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
    kind = "pressure-compensated"
    description = ("variable pump held at its compensator setting, delivering only the flow "
                   "used; a meter-in flow control sets the speed")
    settings = ("compensator_setting", "flow_control_min_drop") + _COUNTERBALANCE

    def residual(self, q, c, rec=None):
        supply, p1 = _c._supply_and_inlet(q, c, 0.0, rec)
        dp_fc = _throttle(c, q, c["fc_min_drop"])
        avail = _c._compensator_supply(q, c, c["compensator"], c["q_theoretical"])
        return avail - (supply + p1 + dp_fc)

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
    kind = "load-sensing"
    description = ("variable pump at the highest load pressure + margin; the proportional "
                   "valve meters with the margin; standby pressure when idle")
    settings = ("load_sensing_margin", "standby_pressure", "compensator_setting") \
        + _COUNTERBALANCE

    def residual(self, q, c, rec=None):
        supply, p1 = _c._supply_and_inlet(q, c, 0.0, rec)
        avail = np.minimum(_c._compensator_supply(q, c, c["compensator"], c["q_theoretical"]),
                           p1 + c["ls_margin"])
        return avail - (supply + p1)

    def pump_pressure(self, q1, c, required, p1, moving, stalled):
        p_pump = np.minimum(_c._compensator_supply(q1, c, c["compensator"], c["q_theoretical"]),
                            p1 + c["ls_margin"])
        return p_pump, np.maximum(p_pump - required, 0.0)

    def rest_pressure(self, c, z, use_centre, holding, p_hold, centre_dp, relief_full):
        return np.where(holding, np.minimum(p_hold + c["ls_margin"], c["compensator"]),
                        c["standby"])

    def settings_text(self, sp, q):
        return (f"margin {q(sp.load_sensing_margin, 'pressure')}, standby "
                f"{q(sp.standby_pressure, 'pressure')}")


class VariableSpeed(Circuit):
    kind = "variable-speed"
    description = ("fixed pump on a speed-controlled motor delivering the flow used at the "
                   "working pressure; surplus below its minimum speed is bled at the working "
                   "pressure")
    speed_controlled = True
    settings = ("min_speed_fraction", "max_speed_fraction") + _COUNTERBALANCE

    def flow_capacity(self, c):
        return c["q_theoretical_max"]

    def residual(self, q, c, rec=None):
        supply, p1 = _c._supply_and_inlet(q, c, 0.0, rec)
        return _c._relief_supply(q, c, c["q_theoretical_max"]) - (supply + p1)

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


#: Every strategy by name, in the order heatload shows them.
REGISTRY = {cls.kind: cls() for cls in (MeterIn, MeterOut, BleedOff, BypassCompensated,
                                        PressureCompensated, LoadSensing, VariableSpeed)}
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
