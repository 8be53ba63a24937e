"""The one evaluation of a strategy: a scenario and optional field overrides
(N variants) -> circuits, heat, oil temperatures, cooler duty and warnings.

``heatload compare`` (one scenario, N = 1), sweeps and the Monte Carlo all
call :func:`evaluate`; :mod:`heatload.chain` and :mod:`heatload.studies.variants`
only reshape its arrays into their result objects.

Steps
-----
1. solver inputs of the N variants through the one builder (:mod:`heatload.hydraulics.cycle`
   with :class:`heatload.paths.Overrides`), the oil temperature left open;
2. *uncoupled*: the circuit at the reference oil temperature (the pump's
   datasheet viscosity), its mean heat turned into a steady temperature at
   the typical ambient, ``Q = UA(T)(T - T_a)`` (:func:`steady_temperature`);
3. *design point*: oil held at the design temperature on the hottest day,
   ``duty = max(0, Q(T_d) - UA(T_d)(T_d - T_a,max)) (1 + margin)``;
4. *coupled*: ``Q(T) = UA(T)(T - T_a)`` with the circuit re-solved at each
   variant's own oil temperature (:func:`coupled_temperature`: secant steps
   on a linear model of Q(T) through exact solves, started from the
   reference and design-point solves, to 0.01 K x UA; each row iterates on
   its own, so its result does not depend on the others in the batch);
   optionally also at the hottest ambient;
5. the machine runs at the coupled temperature, or at the design temperature
   where a sized cooler holds it there; warnings are the conditions of
   :func:`heatload.checks.phase_conditions` at that operating point.

The scenario's ``heat_calibration`` (measured / model heat, from ``heatload
logfit --scenario``) multiplies the heat into the oil in steps 2-4 and in the
cycle's periodic temperatures, for every strategy alike; the circuits'
electricity and losses stay the model's.

UA(T) is one table per distinct air temperature and tank
(:class:`ConductanceTable`: 160 points from T_a - 20 K to 250 degC, linear
interpolation).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from heatload import _memory, checks
from heatload.hydraulics import circuits, cycle
from heatload.cooling import cooler
from heatload.heat import heat_transfer
from heatload.properties import oil
from heatload.heat import thermal as lumped
from heatload.components import lines, motors, pumps, valves
from heatload.errors import HeatloadError
from heatload.model import STRATEGIES, Scenario, Strategy, design_oil_temperature
from heatload.paths import Overrides
from heatload.hydraulics.strategies import circuit

COUPLING_TOLERANCE = 0.01   # [K]
COUPLING_MAX_ITER = 20
#: Elements (variants x phases) from which a batch's arrays are large enough
#: for the C library to map each from the system (128 KiB / 8 B)
LARGE_BATCH = 16384

#: Points of the UA(T) table and its top [K] (UA varies slowly and smoothly with T)
TABLE_POINTS = 160
TABLE_TOP = 523.15


def strategy_of(scenario: Scenario, strategy) -> Strategy:
    """The scenario's strategy of that name or kind, or a kind with default settings."""
    if isinstance(strategy, Strategy):
        return strategy
    try:
        return scenario.strategy(strategy)
    except KeyError:
        if strategy in STRATEGIES:
            return Strategy(strategy)
        raise HeatloadError(f"unknown strategy {strategy!r}; expected one of "
                            f"{', '.join(s.name for s in scenario.strategies)}",
                            field="strategy") from None


# ---------------------------------------------------------------------------
# the solver inputs of N variants
# ---------------------------------------------------------------------------

def _compact(c: dict, shape) -> dict:
    """Entries at their own shapes, broadcastable to *shape* (single values 0-d,
    a phase constant ``(P,)``, a variant's value ``(N, 1)``): numpy's
    broadcasting then computes a term of phase constants once per phase, not
    once per variant (values identical to
    :func:`heatload.hydraulics.cycle.finalize`, which broadcasts every entry).
    ``shape`` is the batch's full shape."""
    out = {}
    for k, v in c.items():
        a = np.asarray(v)
        out[k] = a.reshape(()) if a.size == 1 else a
    out["shape"] = shape
    return out


def _take(c: dict, idx) -> dict:
    """Entries of the variants *idx* (leading axis) of an input dict."""
    return {k: (v[idx] if (isinstance(v, np.ndarray) and v.ndim == 2) else v)
            for k, v in c.items() if k != "shape"}


def check_components(c: dict) -> None:
    """The checks the solver's inner loop leaves out, once per batch: the valves',
    lines', pump's and motor's fields of the solver inputs *c* through the checked public
    functions (at zero flow), so a sweep's override that breaks a rule no single
    field states (a check valve's rated drop below its cracking pressure) is
    refused by the same message as a direct call.  The oil's density and
    viscosity come from the fluid model and are checked there."""
    valves.check_valve_pressure_drop(0.0, c["check_cracking"], c["check_rated_flow"],
                                     c["check_rated_drop"])
    valves.valve_path_pressure_drop(0.0, c["dv_rated_flow"], c["dv_rated_drop"])
    for side in ("pline", "rline"):
        lines.line_pressure_drop(0.0, c[f"{side}_d"], c[f"{side}_l"], 1.0, 1.0,
                                 c[f"{side}_rough"], c[f"{side}_k"])
    pumps.pump_torque(c["pump_displacement"], c["pump_speed"], 0.0, 1.0, c["pump_viscous"],
                      c["pump_friction"])
    motors.motor_input_power(0.0, c["motor_rated_power"], c["motor_rated_efficiency"])


class Builder:
    """Solver inputs of N variants of one or more strategies with the oil
    temperature left open: rows ``s N .. (s + 1) N - 1`` are strategy *s*'s
    variants (one strategy: the N variants).

    ``solve(T, rows)``: the strategies solved with the oil at *T* [K] (scalar,
    or one per row) for the rows *rows* (indices, repeats allowed; default
    all), side by side in one batch (:class:`heatload.hydraulics.circuits.Kinds`)."""

    def __init__(self, scenario: Scenario, strategies, values, phases=None):
        strategies = list(strategies) if isinstance(strategies, (list, tuple)) \
            else [strategies]
        values = list(values) if isinstance(values, (list, tuple)) else [values]
        self.scenario = scenario
        self.kinds = [st.kind for st in strategies]
        self.kind = self.kinds[0]
        self.n = values[0].n
        self.rows = self.n * len(strategies)
        pa = phases if phases is not None and values[0].nominal else cycle.phase_arrays(
            scenario, values[0])
        self.phase_arrays = pa
        common = dict(pa)
        common.update(cycle.power_unit_constants(scenario, values[0]))
        self.base = _stack_rows([dict(common, **cycle.strategy_arrays(scenario, st, v))
                                 for st, v in zip(strategies, values)], self.n)
        self._row_kinds = np.repeat(np.array(self.kinds, object), self.n)
        self._base_all = None
        self.n_phases = len(scenario.phases)
        if not all(v.nominal for v in values):      # the scenario's own fields were
            check_components(self.base)              # checked at load

    def inputs(self, t_oil, rows=None) -> dict:
        t = np.asarray(t_oil, dtype=float)
        if rows is None:
            shape = (self.rows, self.n_phases)
            # the temperature-free entries broadcast once for every solve of all rows
            if self._base_all is None:
                self._base_all = _compact(self.base, shape)
            c = dict(self._base_all)
        else:
            shape = (int(np.size(rows)), self.n_phases)
            c = _compact(_take(self.base, rows), shape)
        c.update(_compact(cycle.oil_entries(self.scenario, t), shape))
        return c

    def strategy_of_rows(self, rows=None):
        """The strategy name of the batch (one strategy), or of each row of *rows*."""
        if len(set(self.kinds)) == 1:
            return self.kind
        return self._row_kinds.tolist() if rows is None else self._row_kinds[rows].tolist()

    def solve(self, t_oil, rows=None):
        c = self.inputs(t_oil, rows)
        return circuits.solve_strategy(self.strategy_of_rows(rows), c), c


def _stack_rows(bases, n):
    """One input dict of several strategies' (*bases*, each of *n* variants): an
    entry the same in all stays as it is, else each is given per variant and
    they follow one another (rows ``s n .. (s + 1) n - 1``)."""
    if len(bases) == 1:
        return bases[0]
    out = {}
    for k in bases[0]:
        vals = [np.asarray(b[k]) for b in bases]
        first = vals[0]
        if all(v is first or (v.shape == first.shape and np.array_equal(v, first))
               for v in vals[1:]) and first.ndim < 2:
            out[k] = bases[0][k]
            continue
        width = max((v.shape[-1] for v in vals if v.ndim == 2), default=1)
        if any(v.ndim == 1 for v in vals):     # a phase constant in some
            width = max(width, max(v.shape[-1] for v in vals if v.ndim == 1))
        out[k] = np.concatenate([np.broadcast_to(v if v.ndim != 1 else v[None, :], (n, width))
                                 for v in vals])
    return out


# ---------------------------------------------------------------------------
# the surfaces' conductance UA(T)
# ---------------------------------------------------------------------------

def _table_nodes(uniq):
    """Oil temperatures [K] of the table's nodes (U, 160) for the key rows *uniq* (U, 2)."""
    return np.linspace(uniq[:, 0] - 20.0, TABLE_TOP, TABLE_POINTS, axis=-1)


def _node_values(reservoir, altitude, t, air, h):
    """UA [W/K] at oil temperatures *t* with air temperatures *air* and user
    coefficients *h* (-1: none), element by element (same shapes)."""
    pressure = heat_transfer.barometric_pressure(altitude)
    free = h < 0.0
    ua = np.empty(t.shape)
    if free.any():
        ua[free] = heat_transfer.reservoir_conductance(reservoir, t[free], air[free], pressure)
    if (~free).any():
        # a user coefficient h: UA = h A_eff + further surfaces (linear in h)
        unit = heat_transfer.reservoir_heat_transfer(
            dataclasses.replace(reservoir, heat_transfer_coefficient=1.0),
            t[~free], air[~free], pressure)
        own = unit.conductance - unit.surfaces
        ua[~free] = h[~free] * own + unit.surfaces
    return ua


def _table_rows(reservoir, altitude, keys):
    """UA nodes (U, 160) for the distinct (air temperature, user h or -1) *keys*."""
    uniq = np.asarray(keys, float).reshape(-1, 2)
    t = _table_nodes(uniq)
    return t, _node_values(reservoir, altitude, t, np.broadcast_to(uniq[:, :1], t.shape),
                           np.broadcast_to(uniq[:, 1:2], t.shape))


@lru_cache(maxsize=64)
def _cached_rows(reservoir, altitude, keys):
    t, ua = _table_rows(reservoir, altitude, keys)
    t.flags.writeable = False
    ua.flags.writeable = False
    return t, ua


class ConductanceTable:
    """UA(T_oil) [W/K] of the reservoir and further surfaces, one table per row.

    Each row has its air temperature [K], its user heat-transfer coefficient
    (NaN: computed from natural convection and radiation,
    :func:`heatload.heat.heat_transfer.reservoir_conductance`) and a factor on UA;
    the table holds 160 nodes from T_a - 20 K to 250 degC and is
    interpolated linearly (clamped at its ends), the formula of
    :func:`numpy.interp`.  ``table(T, rows)`` -> ``(UA, dUA/dT)``.
    """

    def __init__(self, scenario: Scenario, air, h_user=np.nan, factor=1.0):
        air = np.atleast_1d(np.asarray(air, float))
        h_user = np.broadcast_to(np.asarray(h_user, float), air.shape)
        # NaN (no user coefficient) -> -1: np.unique keeps every NaN apart
        h = np.where(np.isfinite(h_user), h_user, -1.0)
        key = np.stack([air, h], axis=-1).reshape(-1, 2)
        if np.all(key == key[:1]):  # one air temperature and tank for all: no sort
            uniq, inverse = key[:1], np.zeros(len(key), int)
        elif np.all(key[:, 1] == key[0, 1]):  # one tank: a plain sort of the air
            air_u, inverse = np.unique(key[:, 0], return_inverse=True)
            uniq = np.stack([air_u, np.full(len(air_u), key[0, 1])], axis=-1)
        else:
            uniq, inverse = np.unique(key, axis=0, return_inverse=True)
        self._lazy = None
        self._node_lists = {}
        if len(uniq) <= 8:
            self.t, self.ua = _cached_rows(scenario.reservoir, float(scenario.ambient.altitude),
                                           tuple(map(tuple, uniq.tolist())))
        else:
            # many tables (a Monte Carlo of the ambient): each node computed when a
            # lookup first reads it, a few per row instead of all 160
            self.t = _table_nodes(uniq)
            self.ua = np.empty(self.t.shape)
            self._lazy = (scenario.reservoir, scenario.ambient.altitude, uniq,
                          np.zeros(self.t.shape, bool))
        self.row = inverse.reshape(-1)
        self.factor = np.broadcast_to(np.asarray(factor, float), self.row.shape)
        self.t0 = self.t[:, 0]
        self.step = (self.t[:, -1] - self.t[:, 0]) / (self.t.shape[1] - 1)

    def __call__(self, t_oil, rows=None):
        """(UA, dUA/dT) at *t_oil* for the rows *rows* (default all)."""
        row = self.row if rows is None else self.row[rows]
        f = self.factor if rows is None else self.factor[rows]
        t, row, f = np.broadcast_arrays(np.asarray(t_oil, float), row, f)
        if self._lazy is None and t.size <= 8 and np.isfinite(t).all():
            # a scenario's few rows: the same formula in floats, row by row
            ua, slope = np.empty(t.shape), np.empty(t.shape)
            for i, (ti, ri, fi) in enumerate(zip(t.flat, row.flat, f.flat)):
                ua.flat[i], slope.flat[i] = _interpolate(float(ti), *self._nodes(ri), float(fi))
            return ua, slope
        m = self.t.shape[1]
        xs, ys = self.t, self.ua
        j = np.clip(np.floor((t - self.t0[row]) / self.step[row]), 0, m - 2).astype(int)
        # floor on rounded nodes can land one segment off: step to xs[j] <= t < xs[j+1]
        j = np.where((j > 0) & (t < xs[row, j]), j - 1, j)
        j = np.where((j < m - 2) & (t >= xs[row, j + 1]), j + 1, j)
        x0, x1 = xs[row, j], xs[row, j + 1]
        below, above = t < xs[row, 0], t >= xs[row, -1]
        if self._lazy is not None:
            self._fill(row, j, below, above)
        y0, y1 = ys[row, j], ys[row, j + 1]
        slope = (y1 - y0) / (x1 - x0)
        ua = slope * (t - x0) + y0
        ua = np.where(below, ys[row, 0], np.where(above, ys[row, -1], ua))
        slope = np.where(below | above, 0.0, slope)
        return ua * f, slope * f

    def rows(self, rows):
        """The table seen from the rows *rows* (a slice or indices) only."""
        out = object.__new__(ConductanceTable)
        out.__dict__.update(self.__dict__)
        out.row, out.factor = self.row[rows], self.factor[rows]
        return out

    def _fill(self, row, j, below, above):
        """Compute the nodes a lookup reads (rows *row*, segments *j*, the ends
        where *below* / *above*) that are not known yet."""
        reservoir, altitude, uniq, known = self._lazy
        m = self.t.shape[1]
        flat = (row * m)[..., None] + np.stack([j, j + 1, np.where(below, 0, j),
                                                np.where(above, m - 1, j)], axis=-1)
        flat = np.unique(flat)
        flat = flat[~known.reshape(-1)[flat]]
        if flat.size:
            r = flat // m
            self.ua.reshape(-1)[flat] = _node_values(reservoir, altitude, self.t.reshape(-1)[flat],
                                                     uniq[r, 0], uniq[r, 1])
            known.reshape(-1)[flat] = True

    def _nodes(self, r):
        """(nodes T, nodes UA, first node, step) of table row *r* as floats."""
        got = self._node_lists.get(r)
        if got is None:
            got = self._node_lists[r] = (self.t[r].tolist(), self.ua[r].tolist(),
                                         float(self.t0[r]), float(self.step[r]))
        return got

    def fn(self, row=0):
        """UA(T) [W/K] of one row as a plain vectorized function of T."""
        r = int(self.row[row])
        scalar = None
        if self._lazy is None:
            # one temperature at a time (a warm-up's steps): the same formula as
            # __call__ in plain floats, without the array passes
            scalar = self._nodes(r) + (float(self.factor[row]),)

        def ua(t_oil):
            if scalar is not None and np.ndim(t_oil) == 0 and math.isfinite(t_oil):
                return _interpolate(float(t_oil), *scalar)[0]
            t = np.asarray(t_oil, float)
            v, _ = self(t.ravel(), np.full(t.size, row))
            return v.reshape(t.shape) if t.ndim else float(v[0])
        return ua


def _interpolate(t, xs, ys, t0, step, factor):
    """:meth:`ConductanceTable.__call__` of one row at one temperature, in floats:
    ``(UA, dUA/dT)``."""
    m = len(xs)
    j = min(max(math.floor((t - t0) / step), 0), m - 2)
    if j > 0 and t < xs[j]:
        j -= 1
    if j < m - 2 and t >= xs[j + 1]:
        j += 1
    if t < xs[0]:
        return ys[0] * factor, 0.0 * factor
    if t >= xs[-1]:
        return ys[-1] * factor, 0.0 * factor
    x0, y0 = xs[j], ys[j]
    slope = (ys[j + 1] - y0) / (xs[j + 1] - x0)
    return (slope * (t - x0) + y0) * factor, slope * factor


steady_temperature = lumped.steady_temperature


def mean_heat(result) -> np.ndarray:
    """Time-average heat into the oil over the cycle [W], per row."""
    t = result.duration
    return (result.heat_to_oil * t).sum(axis=-1) / t.sum(axis=-1)


# ---------------------------------------------------------------------------
# rows of results
# ---------------------------------------------------------------------------

def _fields(result):
    for f in dataclasses.fields(result):
        yield f.name, getattr(result, f.name)


def _map(result, fn):
    """A result with *fn* applied to every array (and every loss)."""
    out = {}
    for name, v in _fields(result):
        if isinstance(v, np.ndarray):
            v = fn(v)
        elif isinstance(v, dict):
            v = {k: fn(np.asarray(a)) for k, a in v.items()}
        out[name] = v
    return type(result)(**out)


def result_row(result, i):
    """Row *i* of a result solved over a leading axis of variants."""
    return _map(result, lambda a: a[i] if a.ndim >= 2 else a)


def select(mask, a, b):
    """Rows of result *a* where *mask*, else of *b* (same shapes)."""
    ba = dict(_fields(a))

    def pick(name, key=None):
        def fn(x):
            y = ba[name] if key is None else ba[name][key]
            y = np.asarray(y)
            m = mask.reshape(mask.shape + (1,) * (max(x.ndim, y.ndim) - 1))
            return np.where(m, y, x)
        return fn
    out = {}
    for name, v in _fields(b):
        if isinstance(v, np.ndarray):
            v = pick(name)(v)
        elif isinstance(v, dict):
            v = {k: pick(name, k)(np.asarray(x)) for k, x in v.items()}
        out[name] = v
    return type(b)(**out)


def _nan_filled(shape, dtype):
    return np.full(shape, np.nan if np.dtype(dtype).kind == "f" else 0, dtype)


class _Rows:
    """Results of rows that converge at different steps, gathered in place (a
    figure a step's result lacks -- what only some strategies of a side-by-side
    batch give -- is NaN in its rows)."""

    def __init__(self, m):
        self.m = m
        self.data = {}
        self.template = None

    def put(self, where, result, c, sel):
        shape = c["shape"]
        flat = {n: v for n, v in _fields(result) if isinstance(v, np.ndarray)}
        # the dicts of arrays (losses, each motion's figures) by their field's name
        flat.update({(name, k): v for name, d in _fields(result) if isinstance(d, dict)
                     for k, v in d.items()})
        first = self.template is None
        if first:
            self.template = result
        for k, v in flat.items():
            v = np.broadcast_to(v, shape)
            if k not in self.data:      # rows not put yet are written later, or NaN
                self.data[k] = (np.empty if first else _nan_filled)((self.m,) + v.shape[1:],
                                                                    v.dtype)
            self.data[k][where] = v[sel]
        for k in self.data.keys() - flat.keys():
            self.data[k][where] = np.nan if self.data[k].dtype.kind == "f" else 0

    def result(self):
        out = {}
        for name, v in _fields(self.template):
            if name in self.data:
                v = self.data[name]
            elif isinstance(v, dict):
                v = {k: self.data[(name, k)] for k in v}
            out[name] = v
        return type(self.template)(**out)


def coupled_temperature(builder: Builder, rows, ambient, conductance: ConductanceTable,
                        start_a, start_b, heat_factor=1.0):
    """Self-consistent steady oil temperature [K] of each row: Q(T) = UA(T)(T - T_a).

    Q(T) is the strategy's mean heat with the circuit solved at T.  Secant
    steps on a linear model of Q(T) through two points (*start_a*, *start_b*:
    ``(T, Q)`` pairs of exact solves), each step solved exactly for T by
    :func:`steady_temperature`, until ``|Q - UA (T - T_a)| < 0.01 K x UA``
    (at most :data:`COUPLING_MAX_ITER` solves).

    *heat_factor* (one per row of *rows*, or one for all) multiplies Q(T):
    the scenario's ``heat_calibration``; the starts are already scaled.

    Returns ``(T, iterations, result)``: *result* solved at T, one row per
    row of *rows*.
    """
    m = len(rows)
    factor = np.broadcast_to(np.asarray(heat_factor, float), (m,))
    ta_, qa = (np.array(np.broadcast_to(x, (m,)), float) for x in start_a)
    tb_, qb = (np.array(np.broadcast_to(x, (m,)), float) for x in start_b)
    t_c = np.full(m, np.nan)
    iters = np.zeros(m, int)
    gathered = _Rows(m)
    todo = np.arange(m)
    for it in range(1, COUPLING_MAX_ITER + 1):
        if not todo.size:
            break
        dt = tb_[todo] - ta_[todo]
        slope = np.where(dt != 0, (qb[todo] - qa[todo]) / np.where(dt != 0, dt, 1.0), 0.0)
        # a heat that grows faster with T than the surfaces shed it (a regime
        # changing between the two points, e.g. a pump at 100 % volumetric
        # efficiency) leaves the linear model no root: a fixed-heat step there
        ua_b, dua_b = conductance(tb_[todo], todo)
        rises = ua_b + dua_b * (tb_[todo] - ambient[todo]) - slope > 0.0
        slope = np.where(np.isfinite(slope) & rises, slope, 0.0)
        t_new = steady_temperature(qa[todo], ta_[todo], slope, ambient[todo], conductance, todo,
                                   start=tb_[todo])
        r, c = builder.solve(t_new, rows[todo])
        q_new = factor[todo] * mean_heat(r)
        ua_new, _ = conductance(t_new, todo)
        gap = q_new - ua_new * (t_new - ambient[todo])
        done = (np.abs(gap) < COUPLING_TOLERANCE * np.maximum(ua_new, 1e-9)) | (
            it == COUPLING_MAX_ITER)
        sel = todo[done]
        gathered.put(sel, r, c, done)
        t_c[sel] = t_new[done]
        iters[sel] = it
        # the secant keeps the newest point and the older one nearer to it
        keep_a = np.abs(ta_[todo] - t_new) < np.abs(tb_[todo] - t_new)
        nt, nq = todo[~done], ~done
        ta_[nt] = np.where(keep_a[nq], ta_[nt], tb_[nt])
        qa[nt] = np.where(keep_a[nq], qa[nt], qb[nt])
        tb_[nt], qb[nt] = t_new[nq], q_new[nq]
        todo = nt
    return t_c, iters, gathered.result()


# ---------------------------------------------------------------------------
# heat capacity, design temperature
# ---------------------------------------------------------------------------

def heat_capacity(scenario: Scenario, oil_temperature, values: Overrides | None = None):
    """Oil + steel heat capacity C = V rho(T) c_p(T) + m c_steel [J/K]
    (:func:`heatload.heat.thermal.heat_capacity`), per variant."""
    g = values.get if values is not None else (lambda k, d: d)
    r = scenario.reservoir
    rho = oil.fluid_density(scenario.fluid, oil_temperature)
    cp = oil.fluid_specific_heat(scenario.fluid, oil_temperature)
    return lumped.heat_capacity(g(("reservoir", "oil_volume"), r.oil_volume), rho, cp,
                                 g(("reservoir", "steel_mass"), r.steel_mass),
                                 g(("reservoir", "steel_specific_heat"), r.steel_specific_heat))


def design_temperature(scenario: Scenario, values: Overrides | None = None):
    """Design oil temperature of the cooler sizing [K]
    (:func:`heatload.model.design_oil_temperature`), per variant."""
    g = values.get if values is not None else (lambda k, d: d)
    return g(("cooler", "oil_temperature_max"),
             design_oil_temperature(scenario.fluid, scenario.cooler))


# ---------------------------------------------------------------------------
# the evaluation
# ---------------------------------------------------------------------------

@dataclass
class Evaluation:
    """One strategy over N variants; arrays (N,) or results (N, phases), SI.

    Temperatures [K], heat and duty [W], conductance [W/K], capacity [J/K].
    Fields of a step that was not run (see :func:`evaluate`'s *thermal*) are None.
    """

    strategy: Strategy
    values: Overrides
    phase_arrays: dict
    reference_temperature: float
    uncoupled: circuits.CircuitResult = None      #: at the reference temperature
    heat_uncoupled: np.ndarray = None
    steady_uncoupled: np.ndarray = None           #: typical ambient, no cooler
    design: circuits.CircuitResult = None         #: oil at the design temperature
    design_temperature: np.ndarray = None
    design_ambient: np.ndarray = None
    design_heat: np.ndarray = None
    design_conductance: np.ndarray = None
    cooler_duty: np.ndarray = None                #: with margin
    cooler_duty_without_margin: np.ndarray = None
    coupled: circuits.CircuitResult = None        #: at the coupled temperature
    steady_coupled: np.ndarray = None             #: typical ambient, no cooler
    coupling_iterations: np.ndarray = None
    heat_coupled: np.ndarray = None
    conductance: np.ndarray = None                #: UA at the coupled T
    capacity: np.ndarray = None
    cycle_minimum: np.ndarray = None
    cycle_maximum: np.ndarray = None
    steady_hot: np.ndarray = None                 #: hottest ambient, no cooler (if asked)
    operating: circuits.CircuitResult = None      #: where the machine runs
    operating_inputs: dict = None
    operating_temperature: np.ndarray = None
    heat_calibration: np.ndarray = None           #: factor on every heat above [-]
    conditions: list = None                       #: heatload.checks.Condition per phase
    cycle_conditions: list = None                 #: ... of the whole cycle (temperatures)
    typical_conductance: ConductanceTable = None  #: UA(T) at the typical ambient
    n_rows: int = None                            #: rows of the arrays

    @property
    def n(self) -> int:
        return self.values.n


def _col(x, n):
    return np.broadcast_to(np.asarray(x, dtype=float), (n,))


def evaluate(scenario: Scenario, strategy, overrides=None, oil_temperature=None,
             thermal=True, hot=False, phases=None) -> Evaluation:
    """Evaluate N variants of *scenario* for one *strategy* (see the module notes).

    Parameters
    ----------
    scenario : Scenario
    strategy : Strategy or str
        A strategy of the scenario (name or kind) or any kind of
        :data:`heatload.model.STRATEGIES` with default settings.
    overrides : dict or Overrides, optional
        Field path -> 1-D array of N values in SI (:mod:`heatload.paths`).
        Empty or None: the scenario itself (N = 1).
    oil_temperature : float, optional
        Oil temperature [K] of the uncoupled evaluation; default the
        reference temperature (the pump's datasheet viscosity).
    thermal : bool or "design", optional
        True: everything, with the coupled oil temperature.  ``"design"``:
        one solve with the oil at the design temperature (the operating point
        there; the steady temperature without a cooler uncoupled from that
        heat).  False: only the circuit at the uncoupled temperature.
    hot : bool, optional
        Also the coupled steady temperature at the hottest ambient (thermal=True).
    phases : dict, optional
        Precomputed :func:`heatload.hydraulics.cycle.phase_arrays` of the scenario (N = 1).

    Returns
    -------
    Evaluation
    """
    return evaluate_strategies(scenario, [strategy], overrides, oil_temperature, thermal, hot,
                               phases)[0]


def evaluate_strategies(scenario: Scenario, strategies, overrides=None, oil_temperature=None,
                        thermal=True, hot=False, phases=None) -> list:
    """:func:`evaluate` of several strategies, side by side in one batch (a
    comparison): the same N variants of each, one :class:`Evaluation` per
    strategy, each equal to its strategy's :func:`evaluate` (every row is
    solved and iterated on its own)."""
    sts = [strategy_of(scenario, s) for s in strategies]
    if isinstance(overrides, Overrides):
        if len(sts) != 1:
            raise ValueError("an Overrides object belongs to one strategy")
        vals = [overrides]
    else:
        vals = [Overrides(scenario, st, overrides) for st in sts]
    if vals[0].n * len(sts) * len(scenario.phases) >= LARGE_BATCH:
        _memory.keep_freed_memory()     # temporaries of MB each: no page faults per array
    ev = _evaluate(scenario, sts, vals, oil_temperature, thermal, hot, phases)
    n = vals[0].n
    out = []
    for i, (st, val) in enumerate(zip(sts, vals)):
        part = ev if len(sts) == 1 else _strategy_rows(ev, slice(i * n, (i + 1) * n), st, val)
        part.conditions = _conditions(st, part.operating, part.operating_inputs, scenario, val)
        # the oil's limit is judged on the hottest day, where the cooler is sized
        part.cycle_conditions = checks.thermal_conditions(
            scenario, part.steady_hot, part.operating_temperature, part.cooler_duty, val) \
            + checks.calibration_conditions(scenario, part.operating, part.heat_calibration)
        out.append(part)
    return out


class _Tiled:
    """Overrides of N variants seen by S strategies side by side (S N rows):
    each varied value repeated for every strategy."""

    def __init__(self, values, times):
        self._values, self._times = values, times
        self.n = values.n * times

    def get(self, key, default):
        v = self._values.get(key, default)
        if self._times > 1 and np.ndim(v) == 1 and len(v) == self._values.n:
            return np.tile(v, self._times)
        return v


def _strategy_rows(ev, rows, st, val):
    """The rows *rows* (a slice) of an :class:`Evaluation` of several strategies:
    strategy *st*'s, with its variants *val*."""
    out = {}
    for f in dataclasses.fields(ev):
        v = getattr(ev, f.name)
        if isinstance(v, circuits.CircuitResult):
            v = _result_rows(v, rows, st.kind)
        elif isinstance(v, np.ndarray) and v.ndim >= 1:
            v = v[rows]
        elif isinstance(v, ConductanceTable):
            v = v.rows(rows)
        elif f.name == "operating_inputs" and v is not None:
            v = _input_rows(v, rows, ev.n_rows)
        out[f.name] = v
    out.update(strategy=st, values=val, n_rows=val.n)
    return Evaluation(**out)


def _result_rows(result, rows, kind):
    """Rows *rows* of a result of strategies side by side, as strategy *kind*
    alone gives it (what only an accumulator circuit stores is None for the rest)."""
    part = result_row(result, rows)
    keep = circuit(kind).accumulator
    return dataclasses.replace(part, strategy=kind,
                               stored_power=part.stored_power if keep else None,
                               pump_duty=part.pump_duty if keep else None)


def _input_rows(c, rows, n):
    """Rows *rows* (a slice) of an input dict of *n* rows, as a plain dict
    (:class:`heatload.hydraulics.circuits._Rows` read whole)."""
    view = circuits._Rows(c, np.arange(n)[rows], n)
    return {k: view[k] for k in c}


def _evaluate(sc, sts, vals, oil_temperature, thermal, hot, phases) -> Evaluation:
    """:func:`evaluate` of the strategies *sts* (their variants *vals*) side by side:
    one :class:`Evaluation` of all their rows, without its warning conditions."""
    times = len(sts)
    val = _Tiled(vals[0], times)    # the scenario's fields, the same for every strategy
    n = val.n
    g = val.get
    build = Builder(sc, sts, vals, phases)
    t_ref = (cycle.reference_oil_temperature(sc) if oil_temperature is None
             else float(oil_temperature))
    ev = Evaluation(strategy=sts[0], values=vals[0], phase_arrays=build.phase_arrays,
                    reference_temperature=t_ref, n_rows=n)
    amb_t = _col(g(("ambient", "temperature"), sc.ambient.temperature), n)
    amb_hot = _col(g(("ambient", "temperature_max"), sc.ambient.temperature_max), n)
    h_res = sc.reservoir.heat_transfer_coefficient
    h_user = _col(g(("reservoir", "heat_transfer_coefficient"),
                    np.nan if h_res is None else h_res), n)
    factor = _col(g(("reservoir", "heat_transfer_factor"), 1.0), n)
    # measured / model heat ([scenario] heat_calibration): every heat into the oil
    # below is scaled, the circuit's own figures (electricity, losses) are not
    f_heat = _col(sc.heat_calibration, n)
    ev.heat_calibration = f_heat
    ua_typ = ConductanceTable(sc, amb_t, h_user, factor)
    ev.typical_conductance = ua_typ

    t_d_given = design_temperature(sc, val)
    both = None
    if thermal is True and vals[0].n == 1:
        # one scenario: the reference and design-point solves in one call (each
        # row is solved on its own, so the figures equal two separate calls)
        both, _ = build.solve(np.repeat([t_ref, float(np.ravel(t_d_given)[0])], times),
                              np.tile(np.arange(times), 2))
    if thermal != "design":
        if both is not None:
            res_u, c_u = result_row(both, slice(0, times)), None
        else:
            res_u, c_u = build.solve(t_ref)
        q_u = f_heat * mean_heat(res_u)
        ev.uncoupled, ev.heat_uncoupled = res_u, q_u
        ev.steady_uncoupled = steady_temperature(q_u, t_ref, 0.0, amb_t, ua_typ)
        if not thermal:
            ev.operating, ev.operating_inputs = res_u, c_u
            ev.operating_temperature = np.full(n, t_ref)
            return ev

    # design point: oil at the design temperature, hottest ambient
    t_d = _col(t_d_given, n)
    if both is not None:
        res_d, c_d = result_row(both, slice(times, 2 * times)), None
    else:
        res_d, c_d = build.solve(t_d if np.ndim(t_d_given) else float(t_d_given))
    q_d = f_heat * mean_heat(res_d)
    ua_hot = ConductanceTable(sc, amb_hot, h_user, factor)
    ua_d, _ = ua_hot(t_d)
    margin = g(("cooler", "margin"), sc.cooler.margin)
    duty0 = cooler.required_cooler_duty(q_d, ua_d, t_d, amb_hot, 0.0)
    ev.design, ev.design_temperature, ev.design_ambient = res_d, t_d, amb_hot
    ev.design_heat, ev.design_conductance = q_d, ua_d
    ev.cooler_duty_without_margin, ev.cooler_duty = duty0, duty0 * (1.0 + margin)
    if thermal == "design":
        ev.heat_uncoupled = q_d
        ev.steady_uncoupled = steady_temperature(q_d, t_d, 0.0, amb_t, ua_typ)
        ev.operating, ev.operating_inputs, ev.operating_temperature = res_d, c_d, t_d
        return ev

    # coupled steady temperature at the typical (and the hottest) ambient
    rows = np.arange(n)
    ambient, table = amb_t, ua_typ
    if hot:
        rows = np.concatenate([rows, rows])
        ambient = np.concatenate([amb_t, amb_hot])
        table = ConductanceTable(sc, ambient, np.concatenate([h_user, h_user]),
                                 np.concatenate([factor, factor]))
    t_all, it_all, res_all = coupled_temperature(
        build, rows, ambient, table, (np.full(n, t_ref)[rows], ev.heat_uncoupled[rows]),
        (t_d[rows], q_d[rows]), heat_factor=f_heat[rows])
    t_c = t_all[:n]
    res_c = result_row(res_all, slice(0, n)) if hot else res_all
    if hot:
        ev.steady_hot = t_all[n:]
    ev.coupled, ev.steady_coupled, ev.coupling_iterations = res_c, t_c, it_all[:n]
    ev.heat_coupled = f_heat * mean_heat(res_c)
    ev.conductance, _ = ua_typ(t_c)
    ev.capacity = heat_capacity(sc, t_c, val)
    periodic = lumped.periodic_steady_state(
        f_heat[:, None] * res_c.heat_to_oil, res_c.duration, ev.capacity, ev.conductance,
        amb_t)
    ev.cycle_minimum, ev.cycle_maximum = periodic.minimum, periodic.maximum

    # the machine runs at the coupled temperature, unless the sized cooler holds
    # it at the design temperature
    at_design = (duty0 > 0.0) & (t_d < t_c)
    ev.operating_temperature = np.where(at_design, t_d, t_c)
    if np.all(at_design):
        ev.operating = res_d
        ev.operating_inputs = c_d if c_d is not None else build.inputs(t_d)
    elif not np.any(at_design):
        ev.operating, ev.operating_inputs = res_c, build.inputs(t_c)
    else:
        ev.operating = select(at_design, res_d, res_c)
        ev.operating_inputs = build.inputs(ev.operating_temperature)
    return ev


def _conditions(st, result, c, sc, val):
    """The warning conditions of a solved batch (:func:`heatload.checks.phase_conditions`)."""
    return (checks.phase_conditions(result, c, sc, val)
            + circuit(st.kind).extra_conditions(c, result))
