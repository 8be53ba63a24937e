"""Control strategies: each phase of a duty cycle solved to its operating point.

One solver per strategy, all sharing one structure.  Every phase is a
steady operating point of one actuator (a differential cylinder or a
hydraulic motor) fed by the power unit:

    pump (+ relief, bleed or bypass at the pump outlet)
      -> check valve -> pressure line -> directional valve P->A
      -> [inlet flow control]  -> actuator inlet  (p1, Q1)
      actuator outlet (p2, Q2) -> [outlet flow control] [counterbalance]
      -> directional valve B->T -> return line -> tank (0 bar gauge)

The actuator's steady force balance is ``p1 A1 - p2 A2 = F_eff`` with
``F_eff`` the load plus friction (cylinders) or ``2 pi T / eta_hm`` (motors).
A solver finds the inlet flow ``Q1`` that the strategy can deliver (the set
flow, or less when the pump, the relief or the flow control's minimum drop
limits it; zero when the load stalls the actuator), then books every watt:

    P_shaft = P_pump_loss + p_pump Q_pump
    p_pump Q_pump = relief + bleed + (Q1 x every drop on the way in) + p1 Q1
    p1 Q1 - p2 Q2 = F v + actuator losses      (F v < 0 while a load overruns)
    p2 Q2 = Q2 x every drop on the way out
    P_electric = P_shaft + motor losses (+ converter losses)

so ``P_electric = useful + sum(losses)`` closes to rounding.  Motor and
converter losses heat the room, every other loss heats the oil.

What is particular to each strategy (its residual, pump pressure, rest and
stall pressures, pump state and surplus routing) lives in its class in
:mod:`heatload.hydraulics.strategies`; :func:`solve_strategy` is the solve they share.

All functions are vectorized: every input broadcasts (e.g. shape
``(variants, phases)``), so a design sweep is one call.

References
----------
H. E. Merritt, *Hydraulic Control Systems*, Wiley, 1967, ch. 3-5 (valve and
actuator steady-state relations).  The efficiency bookkeeping is the first
law for a steady open system (P = p Q for each loss).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from heatload.components import lines, motors, valves

TWO_PI = 2.0 * np.pi

#: Chamber pressure below which cavitation is flagged [Pa gauge]
#: (about 0.7 bar absolute; common practice to keep chambers above it).
CAVITATION_THRESHOLD = -0.3e5

#: Loss components in the order tables show them.  ``drive_motor`` and
#: ``converter`` heat the room; the rest heat the oil.
OIL_LOSSES = ("pump", "relief", "flow_control", "bleed", "directional_valve",
              "check_valve", "lines", "counterbalance", "actuator", "compression")
ROOM_LOSSES = ("drive_motor", "converter")
LOSS_COMPONENTS = OIL_LOSSES + ROOM_LOSSES

#: Unloading codes used in the arrays (see :data:`heatload.model.UNLOADING`).
UNLOAD_RELIEF, UNLOAD_CENTRE, UNLOAD_HELD, UNLOAD_CHECK = 0, 1, 2, 3

#: Counterbalance setting assumed where a circuit cannot hold an overrunning
#: load: 1.3 x the load-induced pressure (common practice for the setting).
COUNTERBALANCE_FACTOR = 1.3

_INFEASIBLE = -1e12  # "pressure" of a flow the pump cannot deliver [Pa]

_ROOT_STEPS = 60  # Illinois steps at most (typically 4-8)
_COMPACT_MIN = 256  # working sets smaller than this are not shrunk (numpy's call cost rules)
_ROOT_PRESSURE_TOL = 1e-7  # |residual| that counts as solved [Pa] (~1e-14 of the pressures)


@dataclass
class CircuitResult:
    """Operating point and power balance of every phase for one strategy.

    Every array has the broadcast shape of the inputs (``(..., phases)``).
    Pressures are gauge [Pa], flows [m^3/s], powers [W], speeds [m/s] or
    [rev/s] for motors, durations [s].
    """

    strategy: str
    pump_pressure: np.ndarray
    inlet_pressure: np.ndarray        #: actuator inlet p1 [Pa]
    outlet_pressure: np.ndarray       #: actuator outlet p2 [Pa]
    pump_flow: np.ndarray             #: delivered by the pump [m^3/s]
    actuator_flow: np.ndarray         #: into the actuator inlet Q1 [m^3/s]
    outlet_flow: np.ndarray           #: out of the actuator outlet Q2 [m^3/s]
    relief_flow: np.ndarray
    bleed_flow: np.ndarray            #: bled / bypassed at working pressure [m^3/s]
    speed: np.ndarray                 #: actual actuator speed reached
    speed_target: np.ndarray
    pump_shaft_speed: np.ndarray      #: [rev/s]
    displacement_fraction: np.ndarray  #: pump stroke [-]
    throttle_drop: np.ndarray         #: drop across the speed-setting element [Pa]
    duration: np.ndarray              #: actual phase duration [s]
    shaft_power: np.ndarray
    electric_power: np.ndarray
    useful_power: np.ndarray          #: F v, negative while a load overruns
    losses: dict = field(default_factory=dict)  #: component -> power [W]
    stalled: np.ndarray = None
    flow_limited: np.ndarray = None
    runaway: np.ndarray = None        #: overrunning load this circuit cannot hold
    counterbalance_active: np.ndarray = None
    counterbalance_setting: np.ndarray = None  #: [Pa], where active
    #: |p_pump Q1 - Q1 (drops) - p1 Q1| left by the root solve [W]; ~rounding
    bookkeeping_residual: np.ndarray = None
    #: power put into (+) or taken from (-) an accumulator's gas [W]; sums to
    #: zero over a cycle the pump keeps up with (None: the circuit stores none)
    stored_power: np.ndarray = None
    #: an accumulator circuit's pump on-time over the cycle [-] (None: not one)
    pump_duty: np.ndarray = None
    #: each motion's figures where phases move several actuators at once:
    #: ``(b, name) -> array`` with b = 0 the phase's own motion and 1, 2, ...
    #: its further ones (:data:`MOTION_FIGURES`, ``("loss", component)`` for its
    #: share of the losses); None where every phase moves one actuator
    motions: dict = None

    @property
    def heat_to_oil(self) -> np.ndarray:
        """Sum of the losses that end up in the oil [W]."""
        return sum(self.losses[k] for k in OIL_LOSSES)

    @property
    def room_losses(self) -> np.ndarray:
        """Motor and converter losses, which heat the room [W]."""
        return sum(self.losses[k] for k in ROOM_LOSSES)

    @property
    def balance_residual(self) -> np.ndarray:
        """``P_electric - useful - sum(losses) - stored`` [W]; zero to rounding."""
        stored = 0.0 if self.stored_power is None else self.stored_power
        return self.electric_power - self.useful_power - sum(self.losses.values()) - stored


# ---------------------------------------------------------------------------
# drops along the paths
# ---------------------------------------------------------------------------

def _supply_drop(q, c):
    """Drop from the pump outlet to the actuator inlet at flow *q* (no throttle)."""
    return (valves.check_valve_pressure_drop_unchecked(q, c["check_cracking"],
                                                       c["check_rated_flow"], c["check_rated_drop"])
            + lines.line_pressure_drop_unchecked(q, c["pline_d"], c["pline_l"], c["density"],
                                                 c["viscosity"], c["pline_rough"], c["pline_k"])
            + valves.valve_path_pressure_drop_unchecked(q, c["dv_rated_flow"],
                                                        c["dv_rated_drop"]))


def _supply_drop_parts(q, c):
    check = valves.check_valve_pressure_drop_unchecked(q, c["check_cracking"],
                                                       c["check_rated_flow"], c["check_rated_drop"])
    line = lines.line_pressure_drop_unchecked(q, c["pline_d"], c["pline_l"], c["density"],
                                              c["viscosity"], c["pline_rough"], c["pline_k"])
    dv = valves.valve_path_pressure_drop_unchecked(q, c["dv_rated_flow"], c["dv_rated_drop"])
    return check, line, dv


def _return_drop_parts(q, c):
    dv = valves.valve_path_pressure_drop_unchecked(q, c["dv_rated_flow"], c["dv_rated_drop"])
    line = lines.line_pressure_drop_unchecked(q, c["rline_d"], c["rline_l"], c["density"],
                                              c["viscosity"], c["rline_rough"], c["rline_k"])
    return dv, line


def _centre_drop(q, c):
    """P->T drop of an open or tandem centre, ~Q^2 from its catalogue point
    (zero allowed: an ideal centre)."""
    return c["dv_centre_drop"] * (q / c["dv_rated_flow"]) ** 2


def _return_drop(q, c):
    dv, line = _return_drop_parts(q, c)
    return dv + line


def _flow_drops(q1, c, rec=None):
    """Every drop that depends on the inlet flow *q1* only: (check, pressure
    line, valve P->A, valve B->T, return line) [Pa]; appended to *rec* when
    given, so the solve can reuse them at the flow it settles on."""
    d = _supply_drop_parts(q1, c) + _return_drop_parts(q1 * c["q_ratio"], c)
    if rec is not None:
        rec.append(d)
    return d


def _supply_and_inlet(q, c, outlet_extra, rec=None):
    """(supply drop, p1) at inlet flow *q* with *outlet_extra* on the outlet path.

    Where the phase moves further actuators at once (:func:`motion_views`),
    the governing pair: ``p1`` the highest load pressure of its motions and
    ``supply + p1`` the highest pressure any of them needs at the pump, each at
    its share of the flow (the outlet throttles at the same fraction of their
    setting)."""
    check, pline, dv_in, rdv, rline = _flow_drops(q, c, rec)
    p1, _, _ = _inlet_pressure_at(rdv + rline + outlet_extra, c)
    supply = check + pline + dv_in
    views = motion_views(c)
    if not views:
        return supply, p1
    need, load = supply + p1, p1
    others = False
    for v in views:
        qb = q * v["flow_share"]
        check, pline, dv_in, rdv, rline = _flow_drops(qb, v)
        p1b, _, _ = _inlet_pressure_at(rdv + rline + outlet_extra, v)
        moving = v["moving"]
        need = np.where(moving, np.maximum(need, check + pline + dv_in + p1b), need)
        load = np.where(moving, np.maximum(load, p1b), load)
        others = others | moving
    return np.where(others, need - load, supply), np.where(others, load, p1)


def _total_flow(q, c):
    """The circuit's flow when the motion solved for takes *q*: times
    ``flow_total_ratio`` where a phase moves several actuators (their set flows
    over its own), else *q* itself."""
    ratio = c.get("flow_total_ratio")
    return q if ratio is None else q * ratio


class _LazyView(dict):
    """A dict whose entries are taken from elsewhere when first read
    (``__missing__``); ``get`` goes through it too."""

    def get(self, key, default=None):
        try:
            return self[key]
        except KeyError:
            return default


class _MotionView(_LazyView):
    """A circuit dict seen from a phase's further motion *b*: its own entries
    (``motion<b>:<key>``, see :data:`heatload.hydraulics.cycle.MOTION_KEYS`), the supply's
    and the phase's shared."""

    def __init__(self, c, b):
        super().__init__()
        self._c, self._prefix = c, f"motion{b}:"

    def __missing__(self, key):
        try:
            v = self._c[self._prefix + key]
        except KeyError:
            v = self._c[key]
        self[key] = v
        return v


def motion_views(c) -> list:
    """Views of a circuit dict for each of its phases' further motions (empty
    when every phase moves one actuator)."""
    out = []
    while c.get(f"motion{len(out) + 1}:moving") is not None:
        out.append(_MotionView(c, len(out) + 1))
    return out


def governing(required, p1, c):
    """``(required, p1)`` raised to the phase's heaviest motion where it moves
    several actuators: the pump pressure the heaviest needs and the highest
    load pressure (a load-sensing signal), set by the solve at the solved
    flow (``need_max``, ``load_max``); unchanged elsewhere."""
    need = c.get("need_max")
    if need is None:
        return required, p1
    return np.maximum(required, need), np.maximum(p1, c["load_max"])


def _inlet_pressure(q1, c, outlet_extra):
    """Actuator inlet pressure p1 [Pa] from the force balance at inlet flow *q1*.

    ``p1 A1 = F_eff + A2 p2`` with ``p2 = return drops + outlet_extra + dp_cb``,
    where a fitted counterbalance valve (direct acting, pilot ratio r) adds
    ``dp_cb = max(setting - r p1, 0)``.  The balance is monotone in p1, so
    ``p1 = max(p1_open, p1_active)`` with
    ``p1_active = (F + A2 (p_back + setting)) / (A1 + r A2)``.
    Returns ``(p1, p2, dp_cb)``.
    """
    return _inlet_pressure_at(_return_drop(q1 * c["q_ratio"], c) + outlet_extra, c)


def _inlet_pressure_at(p_back, c):
    """:func:`_inlet_pressure` for a known outlet back pressure *p_back* [Pa]."""
    a1, a2, f = c["a_in"], c["a_out"], c["force"]
    # an actuator's back-pressure valve adds its setting to the outlet path while it
    # moves (a fixed counter-force bp A2; loss Q2 bp, booked with the counterbalance)
    bp = c.get("back_pressure", 0.0)
    p_back = p_back + bp
    p1_open = (f + a2 * p_back) / a1
    if c.get("cb_idle") is True:        # no counterbalance acts in any phase (the solve knows)
        return p1_open, p_back + 0.0, 0.0 + bp
    setting = np.where(c["cb_active"], c["cb_setting"], 0.0)
    p1_active = (f + a2 * (p_back + setting)) / (a1 + c["cb_ratio"] * a2)
    p1 = np.where(c["cb_active"], np.maximum(p1_open, p1_active), p1_open)
    dp_cb = np.where(c["cb_active"], np.maximum(setting - c["cb_ratio"] * p1, 0.0), 0.0)
    return p1, p_back + dp_cb, dp_cb + bp


# ---------------------------------------------------------------------------
# supply characteristics: pump outlet pressure available at circuit flow q
# ---------------------------------------------------------------------------

#: Least leakage of a pump at its relief setting, as a share of its theoretical
#: flow [-]: a pump given 100 % volumetric efficiency (an ideal pump, for hand
#: checks) still has a characteristic the flow solve can resolve; with none, a
#: phase taking the whole flow would sit undecided between its load pressure and
#: the relief.  1e-12 changes no figure beyond that relative size.
IDEAL_PUMP_LEAK = 1e-12


def _leak_conductance(c):
    """Pump leakage per pressure L = Cs D / (2 pi mu) [m^3/(s Pa)] (Wilson slip term),
    at least ``IDEAL_PUMP_LEAK`` of the theoretical flow at the relief setting
    (``pump_leak`` of *c* where the solve has set it: once per solve)."""
    leak = c.get("pump_leak")
    return pump_leak_conductance(c) if leak is None else leak


def pump_leak_conductance(c):
    """:func:`_leak_conductance` computed from *c*'s pump entries."""
    leak = c["pump_slip"] * c["pump_displacement"] / (TWO_PI * c["mu"])
    q_th = c["pump_displacement"] * c["pump_speed"]
    return np.maximum(leak, IDEAL_PUMP_LEAK * q_th / c["relief_cracking"])


def _relief_supply(q, c, theoretical_flow):
    """Fixed pump with relief: pressure at the pump outlet when the circuit takes *q*.

    Relief branch (relief passing ``Q_p - q``): ``p = p_c + k (Q_p(p) - q)``
    with ``Q_p = Q_th - L p`` gives ``p = (p_c + k (Q_th - q)) / (1 + k L)``.
    Pump branch (relief shut, the pump delivers all it can):
    ``p = (Q_th - q) / L``.
    """
    q = _total_flow(q, c)
    leak = _leak_conductance(c)
    k = c["relief_override"] / c["relief_rated_flow"]
    q_crack = theoretical_flow - leak * c["relief_cracking"]
    relief_branch = (c["relief_cracking"] + k * (theoretical_flow - q)) / (1.0 + k * leak)
    pump_branch = c["relief_cracking"] - (q - q_crack) / np.maximum(leak, 1e-30)
    # more than the theoretical flow is out of the pump's reach (p < 0: suction)
    pump_branch = np.where(q > theoretical_flow, _INFEASIBLE, pump_branch)
    return np.where(q <= q_crack, relief_branch, pump_branch)


def _compensator_supply(q, c, setting, theoretical_flow):
    """Variable pump at its compensator *setting* until full stroke, then its curve."""
    q = _total_flow(q, c)
    leak = _leak_conductance(c)
    q_full = theoretical_flow - leak * setting
    pump_branch = setting - (q - q_full) / np.maximum(leak, 1e-30)
    pump_branch = np.where(q > theoretical_flow, _INFEASIBLE, pump_branch)
    return np.where(q <= q_full, setting, pump_branch)


class _Rows(_LazyView):
    """Entries of a circuit dict restricted to the rows *idx* (leading axis of a
    batch of *n* rows), taken when first read; entries without a row axis
    (phase constants, single values) as they are."""

    def __init__(self, c, idx, n):
        super().__init__()
        self._c, self._idx, self._n = c, idx, n

    def __missing__(self, key):
        v = self._c[key]
        v = (len(self._idx),) + tuple(v[1:]) if key == "shape" else \
            _take_rows(v, self._idx, self._n)
        self[key] = v
        return v


def _take_rows(x, idx, n):
    """Rows *idx* of *x* where it has a row axis of *n* rows (else *x* itself)."""
    if isinstance(x, np.ndarray) and x.ndim >= 2 and x.shape[0] == n:
        return x[idx]
    return x


class Kinds:
    """The strategy of each row of a batch: one circuit for every row (the
    usual case: each call goes to it), or a circuit per row (a comparison of
    strategies solved at once; each call goes to each circuit with its rows,
    and the pieces are put back in place).

    Each row is computed exactly as the one strategy would compute it alone
    (the relations are element by element), so the figures do not depend on
    which strategies share a batch."""

    def __init__(self, strategy):
        from heatload.hydraulics.strategies import circuit
        if isinstance(strategy, str):
            names = [strategy]
        else:
            names = list(dict.fromkeys(np.asarray(strategy).tolist()))
        self.circuits = [circuit(n) for n in names]
        self.one = self.circuits[0] if len(names) == 1 else None
        self.groups = None
        if self.one is None:
            rows = np.asarray(strategy)
            self.n = len(rows)
            self.groups = [(k, np.flatnonzero(rows == n)) for k, n in zip(self.circuits, names)]
            self.code = np.empty((self.n, 1), int)
            for i, (_, idx) in enumerate(self.groups):
                self.code[idx] = i

    @property
    def name(self):
        """The strategy's name, or the names of the rows' strategies."""
        if self.one is not None:
            return self.one.kind
        names = np.empty(self.n, object)
        for k, idx in self.groups:
            names[idx] = k.kind
        return tuple(names)

    def flag(self, attr):
        """A circuit's class flag (``meters_out``, ...): a bool, or one per row (n, 1)."""
        if self.one is not None:
            return getattr(self.one, attr)
        out = np.zeros((self.n, 1), bool)
        for k, idx in self.groups:
            out[idx] = getattr(k, attr)
        return out

    def prepare(self, c):
        """Per-row entries the mixed batch needs in *c* (the row's strategy code
        and its flow controls' settings)."""
        if self.one is not None:
            return
        c["kind_code"] = self.code
        for side in ("inlet_throttle", "outlet_throttle"):
            keys = [getattr(k, side) for k, _ in self.groups]
            if all(key is None for key in keys):
                c[f"{side}_setting"] = None
                continue
            full = np.broadcast_shapes((self.n, 1), *(np.shape(c[key]) for key in keys
                                                       if key is not None))
            setting = np.zeros(full)     # no flow control: no drop
            for key, (_, idx) in zip(keys, self.groups):
                if key is not None:
                    setting[idx] = np.broadcast_to(c[key], full)[idx]
            c[f"{side}_setting"] = setting

    def throttle_settings(self, c):
        """(outlet, inlet) flow control settings [Pa] of *c*'s elements, None where no
        row has that flow control."""
        if self.one is not None:
            out, inl = self.one.outlet_throttle, self.one.inlet_throttle
            return (None if out is None else c[out]), (None if inl is None else c[inl])
        return c["outlet_throttle_setting"], c["inlet_throttle_setting"]

    def available(self, q, c, p1):
        """``Circuit.available`` of each element's strategy (elements of any shape)."""
        if self.one is not None:
            return self.one.available(q, c, p1)
        code = np.broadcast_to(c["kind_code"], np.shape(q))
        out = np.empty(np.shape(q))
        for i, (k, _) in enumerate(self.groups):
            m = code == i
            if m.any():
                out[m] = k.available(q[m], _Subset(c, m), p1[m])
        return out

    def call(self, method, *args, shape=None, per_row=()):
        """``getattr(circuit, method)(*args)`` of each row's strategy, put back
        together at the batch's *shape*: each circuit gets its rows of every
        argument (a circuit dict as a view of its rows, *shape* cut to them);
        *per_row*: the items of a returned tuple that hold one value per row."""
        if self.one is not None:
            return getattr(self.one, method)(*args)
        n = self.n
        pieces = []
        for k, idx in self.groups:
            sub = [(len(idx),) + tuple(a[1:]) if a is shape
                   else _Rows(a, idx, n) if isinstance(a, dict) else _take_rows(a, idx, n)
                   for a in args]
            pieces.append((idx, getattr(k, method)(*sub)))
        return _merge_rows(pieces, shape, per_row)


def _merge_rows(pieces, shape, per_row=()):
    """Put the per-strategy results *pieces* ``[(rows, result)]`` back in place at
    the batch's *shape*: arrays and numbers by rows (one value per row where
    *per_row* is True), tuples and dicts item by item (an item a group lacks is
    0), None where every group gives None."""
    first = next((r for _, r in pieces if r is not None), None)
    if first is None:
        return None
    if isinstance(first, tuple):
        return tuple(_merge_rows([(i, r[j]) for i, r in pieces], shape, j in per_row)
                     for j in range(len(first)))
    if isinstance(first, dict):
        keys = list(dict.fromkeys(k for _, r in pieces for k in r))
        return {key: _merge_rows([(i, r.get(key, 0.0)) for i, r in pieces], shape)
                for key in keys}
    arrays = [(i, np.asarray(r)) for i, r in pieces if r is not None]
    full = (shape[0],) if per_row is True else tuple(shape)
    dtype = np.result_type(*(a for _, a in arrays))
    out = np.full(full, np.nan) if dtype.kind == "f" else np.zeros(full, dtype)
    for idx, a in arrays:
        out[idx] = a      # broadcast by the assignment
    return out


def flow_control_drop(q, c, setting):
    """Drop of a compensated flow control at flow *q* [Pa]: its *setting* at the
    set flow, ~Q^2 below it."""
    return setting * (q / c["q_target_safe"]) ** 2


def residual(kinds, q, c, rec=None):
    """Available minus required pump pressure at inlet flow *q* [Pa], decreasing
    in *q* (the flow solve finds its root):

        r(Q1) = p_available(Q1, p1) - (drops + p1 + inlet throttle)

    with p1 from the force balance, the outlet throttle on the return path
    (meter-out), the supply's pressure from the strategy
    (``Circuit.available``).  *kinds*: a :class:`Kinds` (each row's strategy)."""
    out_set, in_set = kinds.throttle_settings(c)
    outlet = 0.0 if out_set is None else flow_control_drop(q, c, out_set)
    supply, p1 = _supply_and_inlet(q, c, outlet, rec)
    avail = kinds.available(q, c, p1)
    if in_set is None:
        return avail - (supply + p1)
    return avail - (supply + p1 + flow_control_drop(q, c, in_set))


# ---------------------------------------------------------------------------
# the solve
# ---------------------------------------------------------------------------

class _Subset(_LazyView):
    """Entries of a circuit dict restricted to the elements *idx* (a mask of the
    full shape), taken only when a residual first reads them (most entries are
    never read); an entry of its own smaller shape is broadcast first."""

    def __init__(self, c, idx):
        super().__init__()
        self._c, self._idx, self._shape = c, idx, idx.shape

    def __missing__(self, key):
        v = self._c[key]
        if isinstance(v, np.ndarray) and v.ndim:
            if v.shape == self._shape:
                v = v[self._idx]
            elif np.ndim(v) <= len(self._shape):
                try:
                    v = np.broadcast_to(v, self._shape)[self._idx]
                except ValueError:      # not an entry of the batch's shape: as it is
                    pass
        self[key] = v
        return v


def _phase_row(a):
    """*a* as one row of phases when it is the same in every variant (a
    broadcast view, or no variant axis), else None."""
    a = np.asarray(a)
    if a.ndim == 0:
        return None
    if a.ndim == 1:
        return a
    if all(n == 1 or st == 0 for n, st in zip(a.shape[:-1], a.strides[:-1])):
        return a[(0,) * (a.ndim - 1)]
    return None


class _Columns(_LazyView):
    """Entries of a circuit dict restricted to the phases *cols* (last axis),
    taken when first read: where a mask is the same in every variant (the
    phases that move), a phase constant stays one row (or a broadcast view of
    it), a variant's own value (N, 1) stays as it is, and only entries that
    vary by variant and phase are copied."""

    def __init__(self, c, cols, shape):
        super().__init__()
        self._c, self._cols, self._full = c, cols, shape
        self._shape = shape[:-1] + (len(cols),)

    def __missing__(self, key):
        v = self._c[key]
        if isinstance(v, np.ndarray) and v.ndim and v.shape != self._full:
            if v.shape[-1] == self._full[-1]:      # a row of phases (or variants x phases)
                v = v[..., self._cols]
            # else (N, 1): one value per variant, broadcasts as it is
        elif isinstance(v, np.ndarray) and v.shape == self._full:
            row = _phase_row(v)
            v = v[..., self._cols] if row is None else np.broadcast_to(row[self._cols],
                                                                        self._shape)
        self[key] = v
        return v


#: Below this many elements a subset is a boolean gather (fewer numpy calls)
_COLUMNS_MIN = 256


def _phase_columns(mask):
    """The phases (last-axis indices) where *mask* holds, when it is the same in
    every variant (a broadcast row) and large enough to pay; else None."""
    row = _phase_row(mask) if mask.ndim > 1 and mask.size >= _COLUMNS_MIN else None
    return None if row is None else np.flatnonzero(row)


def _root_flow(residual, c, q_hi, idx, q_kink=None, r_lo=None, r_hi=None):
    """Root in q of a residual decreasing in q, with residual(0) >= 0 >
    residual(q_hi), for the elements *idx* only.

    The supply characteristics have one corner (where the relief or the
    compensator takes over from the pump's full flow); evaluating the
    residual there first leaves a bracket on which it is smooth.  Then a
    vectorized Illinois (modified regula falsi), superlinear, never leaving the
    bracket; each element stops on its own once converged (so a result does
    not depend on the other elements of a batch), ending on the bracket's
    feasible side (residual >= 0).
    """
    sub = _Subset(c, idx)
    lo = np.zeros(int(idx.sum()))
    hi = q_hi[idx].copy()
    # the ends' residuals where the caller has them already (NaN: not known)
    r_lo = residual(lo, sub) if r_lo is None else r_lo
    if r_hi is None:
        r_hi = residual(hi, sub)
    elif np.isnan(r_hi).any():
        miss = np.isnan(r_hi)
        r_hi = r_hi.copy()
        r_hi[miss] = residual(hi[miss], _Subset(sub, miss))
    if q_kink is not None:
        k = np.broadcast_to(q_kink, idx.shape)[idx]
        inside = (k > lo) & (k < hi)
        if inside.any():
            r_k = residual(np.where(inside, k, hi), sub)
            up = inside & (r_k >= 0.0)
            down = inside & (r_k < 0.0)
            lo, r_lo = np.where(up, k, lo), np.where(up, r_k, r_lo)
            hi, r_hi = np.where(down, k, hi), np.where(down, r_k, r_hi)
    side = np.zeros(lo.shape)
    active = np.ones(lo.shape, dtype=bool)
    # the elements still iterating (most converge in a few steps; a few need
    # many): once they are half the working set or fewer, the working set
    # shrinks to them, so the late steps cost only what is left.  Each element's
    # iteration is its own, so the roots are the same
    root, work, wsub = lo, None, sub
    for _ in range(_ROOT_STEPS):
        with np.errstate(divide="ignore", invalid="ignore"):  # flat ends: bisect below
            q = (lo * r_hi - hi * r_lo) / (r_hi - r_lo)
        q = np.where(np.isfinite(q) & (q > lo) & (q < hi), q, 0.5 * (lo + hi))
        r = residual(q, wsub)
        hit = active & (np.abs(r) <= _ROOT_PRESSURE_TOL)  # solved: keep q itself
        lo = np.where(hit, q, lo)
        active &= ~hit
        pos = (r >= 0.0) & active
        neg = (r < 0.0) & active
        # Illinois: halve the stale end's residual when the same end moves twice
        r_hi = np.where(pos & (side > 0), 0.5 * r_hi, r_hi)
        r_lo = np.where(neg & (side < 0), 0.5 * r_lo, r_lo)
        lo, r_lo = np.where(pos, q, lo), np.where(pos, r, r_lo)
        hi, r_hi = np.where(neg, q, hi), np.where(neg, r, r_hi)
        side = np.where(pos, 1.0, np.where(neg, -1.0, side))
        active &= hi - lo > 1e-13 * np.maximum(hi, 1e-12)
        n_active = int(np.count_nonzero(active))
        if not n_active:
            break
        if active.size >= _COMPACT_MIN and 2 * n_active <= active.size:
            if work is None:
                root, work = lo, np.arange(lo.size)
            else:
                root[work] = lo
            work, wsub = work[active], _Subset(wsub, active)
            lo, hi, r_lo, r_hi, side = (x[active] for x in (lo, hi, r_lo, r_hi, side))
            active = np.ones(n_active, dtype=bool)
    if work is None:
        return lo
    root[work] = lo
    return root


def _solve_flow(residual, c, q_target, q_kink=None, q_row=None):
    """Inlet flow reached: the set flow where the residual allows it, else the
    root of the residual (flow-limited), zero where even q = 0 fails (stall).

    *q_row*: the set flow as one row of phases where it is the same in every
    variant; the set-flow pass then computes the terms of that flow once per
    phase."""
    q = q_target.copy()
    moving = np.asarray(c["moving"])
    r_target = np.full(q_target.shape, np.nan)
    rec = []
    cols = None
    if moving.all():
        r_target = residual(q_target, c, rec)
    elif moving.any():  # hold and idle phases need no flow solve
        cols = _phase_columns(moving)
        if cols is None:
            r_target[moving] = residual(q_target[moving], _Subset(c, moving), rec)
        else:
            q_cols = q_target[..., cols] if q_row is None else q_row[cols]
            r_target[..., cols] = residual(q_cols, _Columns(c, cols, q_target.shape), rec)
    short = moving & (r_target < 0.0)
    stalled = np.zeros_like(short)
    r_zero = np.full(q_target.shape, np.nan)
    if short.any():
        r_zero[short] = residual(np.zeros(int(short.sum())), _Subset(c, short))
        stalled = short & (r_zero < 0.0)
    need = short & ~stalled
    if need.any():
        q_hi = np.minimum(q_target, c["q_reach"])
        r_hi = np.where(q_hi == q_target, r_target, np.nan)[need]
        q[need] = _root_flow(residual, c, q_hi, need, q_kink, r_lo=r_zero[need], r_hi=r_hi)
    q[stalled] = 0.0
    q[~moving] = 0.0
    # the drops at the set flow, kept where the actuator got it (NaN elsewhere)
    drops = None
    if rec:
        drops = []
        for part in rec[0]:
            full = np.full(q_target.shape, np.nan)
            if cols is not None:
                full[..., cols] = part
            else:
                full[moving] = part[moving] if np.shape(part) == q_target.shape else part
            full[short] = np.nan
            drops.append(full)
    return q, short & ~stalled, stalled, drops


def _holding_valves(v, moving, meters_out):
    """``(cb_fitted, cb_setting, cb_ratio, cb_active, runaway)`` of the motion
    *v* sees: its actuator's own counterbalance valve replaces the strategy's;
    an overrunning load no valve holds runs away (its figures assume one set
    at :data:`COUNTERBALANCE_FACTOR` x the load-induced pressure); an outlet
    throttle needs none."""
    # the load overruns where it beats the seal friction: the effective force pulls
    overrun = moving & (v["load"] < 0.0) & (v["force"] < 0.0)
    fitted, setting, ratio = v["cb_fitted"], v["cb_setting"], v["cb_ratio"]
    if v.get("cb_own") is not None:
        own = v["cb_own"]
        fitted = fitted | own
        setting = np.where(own, v["cb_own_setting"], setting)
        ratio = np.where(own, v["cb_own_ratio"], ratio)
    holds = np.logical_not(meters_out)     # a bool, or one per row
    runaway = overrun & ~fitted & holds
    active = overrun & (fitted | runaway) & holds
    setting = np.where(runaway, COUNTERBALANCE_FACTOR * np.abs(v["force"]) / v["a_out"],
                       setting)
    return fitted, setting, ratio, active, runaway


def _compression_power(c, p1, p2, t_actual):
    """Compression energy of the motion's chambers per phase [W] (the inlet
    one filled at p1, the outlet one pressed to p2, from the pressures of the
    previous phase where it pressurised the same chamber)."""
    prev = np.asarray(c["previous_phase"])
    # E = V (p^2 - p_prev^2) / (2 K) in each chamber: the inlet one filled at p1, and
    # the outlet one, pressed to p2 when the motion starts (a meter-out circuit's
    # intensified chamber stores as much as the inlet)
    sq1 = np.maximum(p1, 0.0) ** 2
    sq2 = np.maximum(p2, 0.0) ** 2
    e_in = c["compression_volume"] * (sq1 - _at_previous(sq1, prev))
    e_out = c["compression_volume_outlet"] * (sq2 - _at_previous(sq2, prev))
    e_comp = np.maximum(e_in, 0.0) + np.maximum(e_out, 0.0)
    e_comp = np.where(c["compress"], e_comp / (2.0 * c["bulk_modulus"]), 0.0)
    # once per pass: a repeated phase's duration holds all its passes
    return e_comp * c.get("repeats", 1.0) / t_actual


def _at_previous(x, prev):
    """*x* of the phase each phase follows (``prev``, the phase index on the last
    axis; -1: none, giving 0)."""
    # the map is one row in every variant (a broadcast): gather along the phases
    row = _phase_row(prev)
    if row is not None and np.ndim(x) >= 1 and np.shape(x)[-1] == prev.shape[-1]:
        shape = np.broadcast_shapes(prev.shape, np.shape(x))
        return np.where(row >= 0, np.broadcast_to(x, shape)[..., np.maximum(row, 0)], 0.0)
    # prev and x may differ in rank (a sweep's (N, P) against a (P,) map; P = 1 too)
    shape = np.broadcast_shapes(np.shape(prev), np.shape(x))
    at = np.broadcast_to(np.maximum(prev, 0), shape or (1,))
    return np.where(prev >= 0, np.take_along_axis(np.broadcast_to(x, shape or (1,)), at,
                                                  axis=-1).reshape(shape), 0.0)


#: Figures of each motion in :attr:`CircuitResult.motions` (flows [m^3/s],
#: pressures [Pa], speeds [m/s] or [rev/s], powers [W]).
MOTION_FIGURES = ("flow", "outlet_flow", "inlet_pressure", "outlet_pressure", "speed",
                  "speed_target", "throttle_drop", "useful_power")
#: The losses booked on a motion's own path (the rest belong to the supply).
MOTION_LOSSES = ("flow_control", "directional_valve", "check_valve", "lines",
                 "counterbalance", "actuator", "compression")


def _motion_point(kinds, v, q1, p_pump, stalled, t_actual):
    """A further motion's operating point at the phase's solved own flow *q1*
    and the shared pump pressure *p_pump*: its figures and its losses (keys of
    :data:`MOTION_FIGURES`, ``("loss", component)``).

    Its flow is its share, ``Q_b = r_b Q1`` (proportional flow sharing); its
    pressures follow from its own force balance and path, exactly as the
    phase's own motion's (``kind.operating_pressures``); what the pump pressure
    gives beyond its need is its own flow control's throttling, booked on it:
    ``Q_b (p_pump - drops - p1)``, so ``p_pump Q_b = losses + useful``.
    """
    moving = np.broadcast_to(v["moving"], np.shape(q1))
    q = np.where(moving, q1 * v["flow_share"], 0.0)
    check, pline, dv_in, rdv, rline = _flow_drops(q, v)
    supply = check + pline + dv_in
    q2 = q * v["q_ratio"]
    _, p1, p2, dp_cb, fc_in, fc_out = kinds.call("operating_pressures", q, v, supply,
                                                 rdv + rline, moving, stalled,
                                                 shape=np.shape(q1))
    stuck = moving & stalled
    fc_in = np.where(stalled, 0.0, fc_in)
    p1 = np.where(stuck, np.maximum(p_pump - v["check_cracking"], 0.0), p1)
    p2 = np.where(stuck, 0.0, p2)
    p1 = np.where(moving, p1, v["hold_pressure"])
    p2 = np.where(moving, p2, 0.0)
    speed = np.where(moving, q * v["speed_per_flow"], 0.0)
    useful = v["load"] * speed * v["work_per_load_speed"]
    mismatch = np.maximum(p_pump, 0.0) * q - q * (fc_in + check + pline + dv_in) - p1 * q
    losses = {
        "flow_control": q * fc_in + q2 * fc_out + mismatch,
        "directional_valve": q * dv_in + q2 * rdv,
        "check_valve": q * check,
        "lines": q * pline + q2 * rline,
        "counterbalance": q2 * dp_cb,
        "actuator": p1 * q - p2 * q2 - useful,
        "compression": _compression_power(v, p1, p2, t_actual),
    }
    out = {"flow": q, "outlet_flow": q2, "inlet_pressure": p1, "outlet_pressure": p2,
           "speed": speed,
           "speed_target": np.where(moving, v["q_target"] * v["speed_per_flow"], 0.0),
           "throttle_drop": _where(kinds.flag("meters_out"), fc_out, fc_in),
           "useful_power": useful}
    out.update({("loss", k): losses[k] for k in MOTION_LOSSES})
    return out


def solve_strategy(strategy: str, c: dict) -> CircuitResult:
    """Solve every phase for one *strategy*.

    Parameters
    ----------
    strategy : str or sequence of str
        A name of :data:`heatload.hydraulics.strategies.REGISTRY`, or one per
        row of the batch (strategies solved side by side, each row exactly as
        its strategy alone; see :class:`Kinds`).
    c : dict
        Circuit arrays from :func:`heatload.hydraulics.cycle.circuit_inputs` (all SI,
        broadcast to one shape).

    Returns
    -------
    CircuitResult
    """
    c = dict(c)
    shape = c["shape"]
    kinds = Kinds(strategy)
    kinds.prepare(c)
    meters_out = kinds.flag("meters_out")
    # masks and maps at the full shape (views: no copy), for they index; the float
    # entries keep their own shapes ((P,) phase constants, (N, 1) variant values),
    # so a term of phase constants is computed once per phase
    for k, v in c.items():
        if isinstance(v, np.ndarray) and v.ndim and v.dtype.kind in "bi" and v.shape != shape:
            c[k] = np.broadcast_to(v, shape)
    z = np.zeros(shape)
    moving = c["moving"]
    # A counterbalance valve acts only on an overrunning load; an outlet
    # throttle needs none.  Where none is fitted the load would run away: the
    # phase is flagged and its figures assume one set at 1.3 x the load-induced
    # pressure.  Each motion its own (the further ones first: they read the
    # strategy's valve before the phase's own motion's replaces it in c)
    views = motion_views(c)
    for b, v in enumerate(views, start=1):
        for key, val in zip(("cb_fitted", "cb_setting", "cb_ratio", "cb_active", "runaway"),
                            _holding_valves(v, v["moving"], meters_out)):
            c[f"motion{b}:{key}"] = val
        c[f"motion{b}:cb_idle"] = not np.any(c[f"motion{b}:cb_active"])
        c[f"motion{b}:q_target_safe"] = np.where(v["q_target"] > 0, v["q_target"], 1.0)
    c["cb_fitted"], c["cb_setting"], c["cb_ratio"], c["cb_active"], runaway = \
        _holding_valves(c, moving, meters_out)
    c["cb_idle"] = not np.any(c["cb_active"])

    n_nom = c["pump_speed"]
    c["pump_leak"] = pump_leak_conductance(c)
    c["q_theoretical"] = c["pump_displacement"] * n_nom
    c["q_theoretical_max"] = c["pump_displacement"] * n_nom * c["vs_max_fraction"]
    q_cap = kinds.call("flow_capacity", c, shape=shape)
    c["q_reach"] = q_cap  # beyond it the pump cannot deliver: keeps the root bracket smooth
    if views:   # the phase's own motion takes 1 / R of the circuit's flow
        c["q_reach"] = q_cap / c["flow_total_ratio"]
    # the set flows as one row of phases where no variant changes them (a sweep of
    # the power unit): their drops are then computed once per phase
    row, moving_row = _phase_row(c["q_target"]), _phase_row(moving)
    q_row = None
    if row is not None and moving_row is not None and np.isfinite(row).all():
        q_row = np.where(moving_row, np.maximum(row, 0.0), 0.0)
        q_target = q_row
    else:
        q_target = np.where(np.isfinite(c["q_target"]), c["q_target"], q_cap)
        q_target = np.where(moving, np.maximum(q_target, 0.0), 0.0)
    c["q_target_safe"] = np.where(q_target > 0, q_target, 1.0)
    if "shape" in c:            # a single phase may arrive as 0-d; the flow solve
        q_target = np.broadcast_to(q_target, c["shape"]).copy()   # needs every row

    # the corner of the supply characteristic: full pump flow at the relief
    # (fixed pumps) or compensator setting (variable pumps)
    leak0 = _leak_conductance(c)
    q_kink = kinds.call("kink", c, q_cap, leak0, shape=shape)
    if views:
        q_kink = q_kink / c["flow_total_ratio"]
    def flow_residual(q, cc, rec=None):
        return residual(kinds, q, cc, rec)
    q1, flow_limited, stalled, drops_set = _solve_flow(flow_residual, c, q_target, q_kink,
                                                       q_row if kinds.one is not None else None)
    full_flow = moving & ~np.isfinite(c["q_target"])
    flow_limited = flow_limited & ~full_flow
    q_target = np.where(full_flow, q1, q_target)

    # ---- operating point at the solved flow --------------------------------
    leak = _leak_conductance(c)
    # the drops at the solved flow: reused from the set-flow pass where the
    # actuator got its set flow, computed afresh for the rest
    if drops_set is None:
        check_dp, pline_dp, dv_in_dp, rdv_dp, rline_dp = _flow_drops(q1, c)
    else:
        fresh = np.isnan(drops_set[0])
        check_dp, pline_dp, dv_in_dp, rdv_dp, rline_dp = drops_set
        if fresh.any():
            for full, part in zip(drops_set, _flow_drops(q1[fresh], _Subset(c, fresh))):
                full[fresh] = part
    supply = check_dp + pline_dp + dv_in_dp
    q2 = q1 * c["q_ratio"]
    p_back = rdv_dp + rline_dp
    q_all = q1      # into the actuators: the phase's own motion and its further ones
    if views:
        q_all = _total_flow(q1, c)
        _set_governing(c, views, q1, supply, p_back, moving)
    p_pump, p1, p2, dp_cb, dp_fc_in, dp_fc_out = kinds.call(
        "operating_pressures", q1, c, supply, p_back, moving, stalled, shape=shape)
    # stalled actuators: the pump sits at what its supply gives at zero flow
    p_pump = np.where(moving & stalled, kinds.call("stall_pressure", c, z, shape=shape), p_pump)
    dp_fc_in = np.where(stalled, 0.0, dp_fc_in)
    # ... and no flow means no drop but the check valve's spring: the inlet chamber
    # holds what the pump gives, the outlet is open to tank, the load is not met
    # (not the load's own pressure, which no part of this circuit reaches)
    stuck = moving & stalled
    p1 = np.where(stuck, np.maximum(p_pump - c["check_cracking"], 0.0), p1)
    p2 = np.where(stuck, 0.0, p2)

    # ---- phases with nothing moving (hold / idle) ----------------------------
    p_hold = np.where(moving, 0.0, c["hold_pressure"])
    unload = c["unloading"]
    # a pilot-operated check holds the load; the pump is unloaded meanwhile: a fixed
    # pump vented (at the centre's drop, whatever the centre), a variable one at zero
    # stroke or standby.  No relief flow; the pump's leakage only
    on_check = ~moving & (unload == UNLOAD_CHECK)
    holding = ~moving & (p_hold > 0.0) & ~on_check
    vent = on_check & np.logical_not(kinds.flag("variable_pump"))
    c["centre_unloads"] = c["centre_unloads"] | vent
    centre_ok = c["centre_unloads"]
    use_centre = ~moving & ((unload == UNLOAD_CENTRE) | vent) & centre_ok
    # centre drop at the full theoretical flow (leakage at a few bar is negligible)
    centre_dp = _centre_drop(c["q_theoretical"], c)
    relief_full = _relief_supply(z, c, c["q_theoretical"])
    p_rest = kinds.call("rest_pressure", c, z, use_centre, holding, p_hold, centre_dp,
                        relief_full, shape=shape)
    p_pump = np.where(moving, p_pump, p_rest)
    p1 = np.where(moving, p1, p_hold)
    p2 = np.where(moving, p2, 0.0)

    # ---- pump flow, stroke and speed --------------------------------------
    leakage = leak * np.maximum(p_pump, 0.0)
    c["pump_pressure"] = p_pump
    frac, n_pump, q_pump = kinds.call("pump_state", c, q_all, leakage, moving, stalled,
                                      use_centre, shape, shape=shape)
    surplus = np.maximum(q_pump - q_all, 0.0)
    at_relief = p_pump >= c["relief_cracking"] * (1.0 - 1e-12)
    to_centre, to_relief = kinds.call("surplus_routing", moving, holding, use_centre,
                                      centre_ok, at_relief, shape, shape=shape)
    centre_q = np.where(to_centre, surplus, 0.0)
    relief_q = np.where(to_relief & ~to_centre, surplus, 0.0)
    bleed_q = surplus - centre_q - relief_q

    # ---- powers -------------------------------------------------------------
    speed = np.where(moving, q1 * c["speed_per_flow"], 0.0)
    t_actual = _actual_duration(c, speed, stalled)
    # shaft power, losses of pumps run apart from the circuit (an unloaded pump),
    # and power into an accumulator (zero for most circuits)
    p_shaft_hyd, apart, stored, duty = kinds.call("pump_power", c, n_pump, p_pump, frac,
                                                  q_all, t_actual, shape=shape, per_row=(3,))
    useful = c["load"] * speed * c["work_per_load_speed"]
    # what the actuator does not turn into load work: friction, motor efficiencies
    actuator_loss = p1 * q1 - p2 * q2 - useful

    losses = {
        "relief": relief_q * np.maximum(p_pump, 0.0),
        "bleed": bleed_q * np.maximum(p_pump, 0.0),
        "flow_control": q1 * (dp_fc_in) + q2 * dp_fc_out,
        "directional_valve": q1 * dv_in_dp + q2 * rdv_dp + centre_q * np.maximum(p_pump, 0.0),
        "check_valve": q1 * check_dp,
        "lines": q1 * pline_dp + q2 * rline_dp,
        "counterbalance": q2 * dp_cb,
        "actuator": actuator_loss,
    }
    # pump: shaft power less what it delivers to the circuit
    p_out = np.maximum(p_pump, 0.0) * (q_all + relief_q + bleed_q + centre_q)
    # the solved root leaves rounding between q_pump and the flows booked: the
    # pump term takes it so the balance closes exactly
    losses["pump"] = p_shaft_hyd - p_out - stored
    for k, v in apart.items():
        losses["pump"] = losses["pump"] - v
        losses[k] = losses[k] + v
    # pressure recovered in the pump line beyond p_pump (negative throttle) cannot
    # occur: dp's are clipped at zero; but p1*q1 books against p_pump*q1 exactly:
    mismatch = np.maximum(p_pump, 0.0) * q1 - q1 * (dp_fc_in + check_dp + pline_dp + dv_in_dp) - p1 * q1
    losses["flow_control"] = losses["flow_control"] + mismatch
    bookkeeping = np.abs(mismatch)

    # compression of the oil in the pressurised chamber, released as heat
    losses["compression"] = _compression_power(c, p1, p2, t_actual)
    motions = None
    if views:
        # each motion's figures; the further ones' losses and useful power join the
        # phase's (they draw p_pump Q_b of the pump's output booked above)
        motions = {(0, "flow"): q1, (0, "outlet_flow"): q2, (0, "inlet_pressure"): p1,
                   (0, "outlet_pressure"): p2, (0, "speed"): speed,
                   (0, "speed_target"): np.where(moving, q_target * c["speed_per_flow"], 0.0),
                   (0, "throttle_drop"): _where(meters_out, dp_fc_out, dp_fc_in),
                   (0, "useful_power"): useful}
        motions.update({(0, ("loss", k)): _own_loss(k, losses, q1, q2, dv_in_dp, rdv_dp)
                        for k in MOTION_LOSSES})
        motions[(0, "runaway")], motions[(0, "counterbalance_active")] = runaway, c["cb_active"]
        for b, v in enumerate(views, start=1):
            point = _motion_point(kinds, v, q1, p_pump, stalled, t_actual)
            motions.update({(b, k): val for k, val in point.items()})
            motions[(b, "runaway")] = v["runaway"] & (z == 0.0)
            motions[(b, "counterbalance_active")] = v["cb_active"] & (z == 0.0)
            useful = useful + point["useful_power"]
            for k in MOTION_LOSSES:
                losses[k] = losses[k] + point[("loss", k)]
    p_shaft = p_shaft_hyd + losses["compression"]

    # drive motor (and converter for variable speed)
    speed_fraction = n_pump / n_nom
    on_converter = kinds.flag("speed_controlled")
    p_motor_in = motors.motor_input_power_unchecked(
        p_shaft, c["motor_rated_power"], c["motor_rated_efficiency"],
        _where(on_converter, speed_fraction, 1.0))
    losses["drive_motor"] = p_motor_in - p_shaft
    if np.any(on_converter):
        losses["converter"] = _where(on_converter, motors.converter_losses(
            p_motor_in, c["motor_rated_power"] / c["motor_rated_efficiency"],
            c["drive_efficiency"]), 0.0)
        p_el = p_motor_in + losses["converter"]
    else:
        p_el = p_motor_in
        losses["converter"] = z.copy()

    return CircuitResult(
        strategy=kinds.name, pump_pressure=p_pump, inlet_pressure=p1, outlet_pressure=p2,
        pump_flow=q_all + relief_q + bleed_q + centre_q, actuator_flow=q1, outlet_flow=q2,
        relief_flow=relief_q, bleed_flow=bleed_q, speed=speed,
        speed_target=np.where(moving, q_target * c["speed_per_flow"], 0.0),
        pump_shaft_speed=n_pump, displacement_fraction=frac,
        throttle_drop=_where(meters_out, dp_fc_out, dp_fc_in),
        duration=t_actual, shaft_power=p_shaft, electric_power=p_el, useful_power=useful,
        losses=losses, stalled=stalled, flow_limited=flow_limited, runaway=runaway,
        counterbalance_active=c["cb_active"],
        counterbalance_setting=np.where(c["cb_active"], c["cb_setting"], 0.0),
        bookkeeping_residual=bookkeeping,
        stored_power=None if np.ndim(stored) == 0 and stored == 0 else stored + z,
        pump_duty=None if duty is None else np.asarray(duty)[..., None] + z, motions=motions)


def _where(flag, a, b):
    """*a* where the class flag *flag* holds, else *b* (a bool for every row, or
    one per row)."""
    if isinstance(flag, (bool, np.bool_)):
        return a if flag else b
    return np.where(flag, a, b)


def _own_loss(k, losses, q1, q2, dv_in_dp, rdv_dp):
    """The phase's own motion's share of loss *k* (its path; the directional
    valve's centre flow belongs to the supply)."""
    if k == "directional_valve":
        return q1 * dv_in_dp + q2 * rdv_dp
    return losses[k]


def _set_governing(c, views, q1, supply, p_back, moving):
    """``need_max`` / ``load_max`` in *c* (see :func:`governing`): the highest
    pump pressure any motion of the phase needs and its highest load pressure,
    each at its share of the solved flow *q1*."""
    p1, _, _ = _inlet_pressure_at(p_back, c)
    need = np.where(moving, supply + p1, -np.inf)
    load = np.where(moving, p1, -np.inf)
    for v in views:
        qb = q1 * v["flow_share"]
        check, pline, dv_in, rdv, rline = _flow_drops(qb, v)
        p1b, _, _ = _inlet_pressure_at(rdv + rline, v)
        on = v["moving"] & moving
        need = np.where(on, np.maximum(need, check + pline + dv_in + p1b), need)
        load = np.where(on, np.maximum(load, p1b), load)
    c["need_max"], c["load_max"] = need, load


def _actual_duration(c, speed, stalled):
    """Phase duration [s]: the stroke at the speed reached where the phase is
    given by its stroke, else the given duration; times its passes per cycle
    (``repeats``: a repeated block's phase lasts all its passes).  A stalled
    stroke keeps its nominal duration (the result carries the stall warning)."""
    by_stroke = c["by_stroke"] & (speed > 0)
    t = np.where(by_stroke, c["stroke"] / np.where(speed > 0, speed, 1.0), c["duration"])
    return np.maximum(t, 1e-9) * c.get("repeats", 1.0)


def solve_all(c: dict, strategies=None) -> dict:
    """Solve every phase for each strategy name (default: every registered one);
    returns name -> CircuitResult."""
    if strategies is None:
        from heatload.hydraulics.strategies import NAMES as strategies
    return {s: solve_strategy(s, c) for s in strategies}
