"""Lumped oil temperature: steady state, periodic steady state of a duty cycle,
warm-up over a shift and a thermostat-switched cooler.

The oil, the steel of the tank and the circuit form one heat capacity C at one
temperature T (well mixed), losing heat through a conductance UA to the
ambient air:

    C dT/dt = Q(t) - UA (T - T_a) [- cooler]

With piecewise-constant heat Q (one value per duty-cycle phase) and UA held
constant over a segment, the solution of every segment is an exact
exponential, T(t) = T_inf + (T_0 - T_inf) exp(-t / tau), tau = C / UA,
T_inf = T_a + Q / UA.  Everything here is built from that closed form; nothing
is time-stepped.  SI inside: W, J/K, W/K, K, s.

References: Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed.,
Sec. 5.3 (lumped capacitance, eq. 5.25 with a heat source); any text on
first-order linear ODEs.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Optional

import math

import numpy as np

from heatload.errors import HeatloadError


def _as_conductance_fn(conductance) -> Callable:
    if callable(conductance):
        return conductance
    value = np.asarray(conductance, float)
    if np.any(~np.isfinite(value)) or np.any(value <= 0.0):
        raise HeatloadError("conductance UA must be positive [W/K]", field="conductance")
    return lambda t: np.broadcast_to(value, np.shape(t)) if value.ndim == 0 else value


def _with_slope(fn, step=1e-3):
    """A UA(T) function as ``(T, rows) -> (UA, dUA/dT)`` for :func:`steady_temperature`
    (central difference over +-1 mK: UA varies slowly with T)."""
    def both(t, rows=None):
        t = np.asarray(t, float)
        return _eval_ua(fn, t), (_eval_ua(fn, t + step) - _eval_ua(fn, t - step)) / (2 * step)
    return both


def _eval_ua(fn, temperature):
    ua = np.asarray(fn(temperature), float)
    if np.any(~np.isfinite(ua)) or np.any(ua <= 0.0):
        raise HeatloadError("conductance UA must be positive [W/K]", field="conductance")
    return ua


def _ua_at(fn, temperature) -> float:
    """UA [W/K] at one temperature as a float (the step-by-step runs): the
    checks of :func:`_eval_ua` without its array passes."""
    ua = fn(temperature)
    if np.ndim(ua) == 0:
        v = float(ua)
        if v > 0.0 and math.isfinite(v):
            return v
    return float(_eval_ua(fn, temperature))   # its message for a bad value


def heat_capacity(oil_volume, oil_density, oil_specific_heat, steel_mass=0.0,
                  steel_specific_heat=490.0):
    """Lumped heat capacity of the oil and the steel that follows its temperature.

    C = V rho c_oil + m_steel c_steel

    Parameters
    ----------
    oil_volume : array_like
        Oil in tank and circuit [m^3].
    oil_density : array_like
        [kg/m^3].
    oil_specific_heat : array_like
        [J/(kg K)].
    steel_mass : array_like, optional
        Steel of tank, pump, manifold, cylinders [kg].
    steel_specific_heat : array_like, optional
        [J/(kg K)] (carbon steel ~490, common practice).

    Returns
    -------
    ndarray
        C [J/K].

    Notes
    -----
    Assumes the steel follows the oil temperature (thin walls, Biot << 1).

    References
    ----------
    Incropera et al., 6th ed., Sec. 5.1 (lumped capacitance).
    """
    values = dict(oil_volume=oil_volume, oil_density=oil_density,
                  oil_specific_heat=oil_specific_heat, steel_mass=steel_mass,
                  steel_specific_heat=steel_specific_heat)
    arr = {k: np.asarray(v, float) for k, v in values.items()}
    for k, v in arr.items():
        if np.any(~np.isfinite(v)) or np.any(v < 0.0):
            raise HeatloadError(f"{k} must be a finite value >= 0", field=k)
    c = (arr["oil_volume"] * arr["oil_density"] * arr["oil_specific_heat"]
         + arr["steel_mass"] * arr["steel_specific_heat"])
    if np.any(c <= 0.0):
        raise HeatloadError("heat capacity must be positive: give some oil or steel",
                            field="oil_volume")
    return c


def steady_temperature(q0, t0, slope, ambient, conductance, rows=None, start=None):
    """Oil temperature T [K] with ``q0 + slope (T - t0) = UA(T) (T - T_a)``.

    The steady first law of the lumped oil with the heat linear in T (slope 0:
    a fixed heat).  Newton's method to machine precision (a few steps on a
    piecewise-linear UA); vectorized over rows.

    Parameters
    ----------
    q0 : array_like
        Heat into the oil at *t0* [W].
    t0 : array_like
        Oil temperature of *q0* [K].
    slope : array_like
        dQ/dT of the heat's linear model [W/K] (0: a fixed heat).
    ambient : array_like
        Air temperature [K].
    conductance : callable
        ``conductance(T, rows) -> (UA [W/K], dUA/dT [W/K^2])``, e.g.
        :class:`heatload.evaluation.ConductanceTable`.
    rows : array_like, optional
        Rows of *conductance* the arrays stand for (default all).
    start : array_like, optional
        First guess of T [K] (default T_a + max(Q, 0) / UA(T_a)).

    Returns
    -------
    ndarray
        T [K]; never below ``T_a - 19 K`` nor above ``T_a + 2000 K``.

    Notes
    -----
    One root while UA(T)(T - T_a) - Q(T) increases with T (convection +
    radiation with a heat that does not grow faster than the surfaces shed it).

    References
    ----------
    Incropera et al., 6th ed., eq. 1.3a (Newton's law of cooling).
    """
    q0, t0, slope, ta = (np.asarray(x, float) for x in (q0, t0, slope, ambient))
    if start is None:
        ua, _ = conductance(ta, rows)
        t = ta + np.maximum(q0, 0.0) / ua
    else:
        t = np.maximum(np.asarray(start, float), ta - 19.0)
    done = np.zeros(np.shape(t), bool)
    for _ in range(60):
        ua, dua = conductance(t, rows)
        g = ua * (t - ta) - q0 - slope * (t - t0)
        dg = ua + dua * (t - ta) - slope
        step = g / np.where(dg > 0, dg, 1.0)
        # kept finite (no machine's oil is 2000 K above its air): a row without
        # a root cannot run off to overflow and poison its neighbours
        t_new = np.clip(t - step, ta - 19.0, ta + 2000.0)
        # a row stops at its own convergence: its result does not depend on the
        # other rows of the batch
        converged = np.abs(t_new - t) <= 1e-11 * np.abs(t)
        t = np.where(done, t, t_new)
        done = done | converged
        if np.all(done):
            break
    return t


@dataclass(frozen=True)
class PeriodicSteadyState:
    """The repeating temperature cycle once the shift has settled.

    Arrays carry the leading (variant) shape of the heat input.
    """

    boundaries: np.ndarray      #: T at the phase boundaries, (..., n+1), first = last [K]
    mean: np.ndarray            #: time-average T over the cycle [K]
    minimum: np.ndarray         #: lowest T in the cycle [K]
    maximum: np.ndarray         #: highest T in the cycle [K]
    time_constant: np.ndarray   #: tau = C / UA [s]
    conductance: np.ndarray     #: UA used (linearized at the mean) [W/K]
    period: np.ndarray          #: cycle time [s]
    mean_heat: np.ndarray       #: time-average heat [W]


def _phase_inputs(heat_per_phase, durations):
    q = np.asarray(heat_per_phase, float)
    if q.ndim == 0:
        q = q[None]
    d = np.asarray(durations, float)
    if d.ndim == 0:
        d = d[None]
    if d.shape[-1] != q.shape[-1]:
        raise HeatloadError(f"{q.shape[-1]} heat values but {d.shape[-1]} durations",
                            field="durations")
    if np.any(~np.isfinite(d)) or np.any(d < 0.0) or np.any(np.sum(d, axis=-1) <= 0.0):
        raise HeatloadError("phase durations must be >= 0 [s] with a positive cycle time",
                            field="durations")
    if np.any(~np.isfinite(q)):
        raise HeatloadError("heat must be finite [W]", field="heat_per_phase")
    return q, d


def _check_capacity(capacity):
    c = np.asarray(capacity, float)
    if np.any(~np.isfinite(c)) or np.any(c <= 0.0):
        raise HeatloadError("heat capacity must be positive [J/K]", field="capacity")
    return c


def periodic_steady_state(heat_per_phase, durations, capacity, conductance,
                          ambient) -> PeriodicSteadyState:
    """Closed-form periodic steady state of a piecewise-constant duty cycle.

    With theta = T - T_a, a_i = exp(-d_i / tau), theta_inf,i = Q_i / UA, each
    phase maps theta_{i+1} = a_i theta_i + (1 - a_i) theta_inf,i.  Periodicity
    theta_n = theta_0 gives

        theta_0 = sum_i (1 - a_i) theta_inf,i prod_{j>i} a_j / (1 - prod_i a_i)

    Parameters
    ----------
    heat_per_phase : array_like
        Heat into the oil in each phase [W], shape (..., n_phases); a leading
        axis holds variants (strategies, Monte Carlo samples).
    durations : array_like
        Phase durations [s], shape (n_phases,) or broadcastable to the heat.
    capacity : array_like
        C [J/K], broadcastable to the leading shape.
    conductance : callable or array_like
        UA [W/K], a constant or a vectorized function UA(T).
    ambient : array_like
        T_a [K], broadcastable to the leading shape.

    Returns
    -------
    PeriodicSteadyState

    Notes
    -----
    * A callable UA is linearized at the cycle-mean temperature: the mean of
      a periodic first-order response is exactly T_a + Q_mean / UA, so T_mean
      solves Q_mean = UA(T_mean)(T_mean - T_a) (:func:`steady_temperature`)
      and UA(T_mean) is then held over the cycle.  The ripple is usually a few
      kelvin, over which UA changes by a few per cent.
    * Within a phase T moves monotonically towards its T_inf, so the extremes
      of the cycle lie at phase boundaries.

    References
    ----------
    Incropera et al., 6th ed., eq. 5.25 (lumped capacitance with generation);
    the periodicity condition of a linear first-order system.
    """
    q, d = _phase_inputs(heat_per_phase, durations)
    d = np.broadcast_to(d, q.shape)
    c = _check_capacity(capacity)
    ta = np.asarray(ambient, float)
    lead = q.shape[:-1]
    period = np.sum(d, axis=-1)
    q_mean = np.sum(q * d, axis=-1) / period
    if callable(conductance):
        t_mean = steady_temperature(q_mean, ta, 0.0, ta, _with_slope(conductance))
        ua = _eval_ua(conductance, t_mean)
    else:
        ua = _eval_ua(_as_conductance_fn(conductance), np.broadcast_to(ta, lead))
    ua = np.broadcast_to(ua, lead).astype(float)
    c = np.broadcast_to(c, lead)
    ta_b = np.broadcast_to(ta, lead)
    tau = c / ua
    theta_inf = q / ua[..., None]
    a = np.exp(-d / tau[..., None])
    one_minus_a = -np.expm1(-d / tau[..., None])
    b = np.zeros(lead)
    for i in range(q.shape[-1]):
        b = a[..., i] * b + one_minus_a[..., i] * theta_inf[..., i]
    theta0 = b / (-np.expm1(-period / tau))
    theta = [theta0]
    for i in range(q.shape[-1]):
        theta.append(a[..., i] * theta[-1] + one_minus_a[..., i] * theta_inf[..., i])
    bounds = np.stack(theta, axis=-1) + ta_b[..., None]
    bounds[..., -1] = bounds[..., 0]  # exact periodicity, no round-off drift
    mean = ta_b + q_mean / ua
    return PeriodicSteadyState(boundaries=bounds, mean=mean, minimum=bounds.min(axis=-1),
                               maximum=bounds.max(axis=-1), time_constant=tau,
                               conductance=ua, period=period, mean_heat=q_mean)


@dataclass(frozen=True)
class WarmUp:
    """Oil temperature over a shift from a cold start.

    ``temperatures`` has the variants' leading shape and the time axis last.
    Energies are [J] over the whole run and balance:
    ``heat_in = stored + dissipated`` (+ ``removed_by_cooler`` for a thermostat run).
    """

    times: np.ndarray               #: sample times, segment boundaries [s]
    temperatures: np.ndarray        #: T at the sample times (..., n_times) [K]
    time_to_limit: object           #: first time T reaches the limit [s]; None / NaN if never
    final_temperature: np.ndarray   #: T at the end [K]
    maximum_temperature: np.ndarray  #: highest T of the run [K]
    heat_in: np.ndarray             #: integral of Q dt [J]
    stored: np.ndarray              #: C (T_end - T_start) [J]
    dissipated: np.ndarray          #: integral of UA (T - T_a) dt through the surfaces [J]


def _segment(theta0, theta_inf, tau, dt):
    """theta at the end of a segment and its time integral (exact exponential)."""
    decay = np.exp(-dt / tau)
    growth = -np.expm1(-dt / tau)
    theta1 = theta_inf + (theta0 - theta_inf) * decay
    integral = theta_inf * dt + (theta0 - theta_inf) * tau * growth
    return theta1, integral


def _crossing_time(theta0, theta_inf, theta_event, tau):
    """Time to go from theta0 towards theta_inf through theta_event: t = tau ln((T0-Tinf)/(Te-Tinf))."""
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = (theta0 - theta_inf) / (theta_event - theta_inf)
        return np.where(ratio >= 1.0, tau * np.log(ratio), np.inf)


def _split_schedule(d, max_step):
    """Phase index and length of each segment of one cycle, phases split to <= max_step."""
    idx, lengths = [], []
    for i, di in enumerate(d):
        if di <= 0.0:
            continue
        n = 1 if max_step is None else max(1, int(np.ceil(di / max_step - 1e-12)))
        idx += [i] * n
        lengths += [di / n] * n
    return np.array(idx, int), np.array(lengths, float)


def _schedule(durations, shift_duration, max_step):
    """Phase index and length of every segment over the shift (cycles repeated, last cut)."""
    idx1, len1 = _split_schedule(durations, max_step)
    period = float(np.sum(durations))
    n_full = int(np.floor(shift_duration / period + 1e-12))
    idx = np.tile(idx1, n_full)
    lengths = np.tile(len1, n_full)
    rest = shift_duration - n_full * period
    if rest > 1e-9 * period:
        ends = np.cumsum(len1)
        keep = np.searchsorted(ends, rest - 1e-12 * period)
        part_len = len1[:keep + 1].copy()
        part_len[-1] = rest - (ends[keep - 1] if keep > 0 else 0.0)
        idx = np.concatenate([idx, idx1[:keep + 1]])
        lengths = np.concatenate([lengths, part_len])
    return idx, lengths


def warm_up(heat_per_phase, durations, capacity, conductance_fn, ambient, initial_temperature,
            shift_duration, limit_temperature=None, max_step=600.0) -> WarmUp:
    """Oil temperature over a shift from a cold start, segment by segment.

    Per segment: T_inf = T_a + Q_i / UA, tau = C / UA,
    T(t) = T_inf + (T_0 - T_inf) exp(-t / tau); the limit is first reached at
    t = tau ln((T_0 - T_inf) / (T_limit - T_inf)) inside the segment where it is crossed.

    Parameters
    ----------
    heat_per_phase : array_like
        Heat into the oil per phase [W], shape (..., n_phases).
    durations : array_like
        Phase durations [s], shape (n_phases,).
    capacity : array_like
        C [J/K], broadcastable to the leading shape.
    conductance_fn : callable or array_like
        UA(T) [W/K] vectorized, or a constant.
    ambient : array_like
        T_a [K].
    initial_temperature : array_like
        Oil and steel temperature at the start [K].
    shift_duration : float
        Length of the run [s]; the cycle repeats, the last one is cut short.
    limit_temperature : float, optional
        Temperature whose first crossing is reported [K].
    max_step : float or None, optional
        Longest segment [s]; longer phases are split (exactly, the solution is
        still the exponential) so UA is refreshed and the curve is sampled.

    Returns
    -------
    WarmUp
        ``time_to_limit`` is a float (or None if never reached) for a single
        variant, an array with NaN for never when there is a leading axis.

    Notes
    -----
    UA is re-evaluated at the temperature at the start of every segment and
    held over it (a segment is one phase, or a piece of a long phase of at
    most *max_step*).  With constant UA the result is exact.

    References
    ----------
    Incropera et al., 6th ed., Sec. 5.3, eq. 5.25.
    """
    q, d = _phase_inputs(heat_per_phase, durations)
    if d.ndim != 1:
        raise HeatloadError("durations must be one value per phase", field="durations")
    if not shift_duration > 0.0:
        raise HeatloadError("shift duration must be positive [s]", field="shift_duration")
    if max_step is not None and not max_step > 0.0:
        raise HeatloadError("max_step must be positive [s]", field="max_step")
    fn = _as_conductance_fn(conductance_fn)
    lead = q.shape[:-1]
    c = np.broadcast_to(_check_capacity(capacity), lead)
    ta = np.broadcast_to(np.asarray(ambient, float), lead)
    t0 = np.broadcast_to(np.asarray(initial_temperature, float), lead).astype(float)
    idx, lengths = _schedule(d, float(shift_duration), max_step)

    times = np.concatenate([[0.0], np.cumsum(lengths)])
    temps = np.empty(lead + (len(lengths) + 1,))
    temps[..., 0] = t0
    theta = t0 - ta
    heat_in = np.zeros(lead)
    dissipated = np.zeros(lead)
    limit_time = np.full(lead, np.nan)
    if limit_temperature is not None:
        limit_time = np.where(t0 >= limit_temperature, 0.0, limit_time)
    if lead == ():
        return _warm_up_scalar(q, idx, lengths, times, float(c), float(ta), float(t0), fn,
                               limit_temperature)
    for k, (i, dt) in enumerate(zip(idx, lengths)):
        ua = _eval_ua(fn, theta + ta)
        tau = c / ua
        qi = q[..., i]
        theta_inf = qi / ua
        theta1, integral = _segment(theta, theta_inf, tau, dt)
        if limit_temperature is not None:
            th_l = limit_temperature - ta
            crosses = np.isnan(limit_time) & (theta < th_l) & (theta1 >= th_l)
            if np.any(crosses):
                tc = _crossing_time(theta, theta_inf, th_l, tau)
                limit_time = np.where(crosses, times[k] + np.minimum(tc, dt), limit_time)
        heat_in = heat_in + qi * dt
        dissipated = dissipated + ua * integral
        theta = theta1
        temps[..., k + 1] = theta + ta
    stored = c * (temps[..., -1] - temps[..., 0])
    if limit_temperature is None:
        ttl = None
    elif np.ndim(limit_time) == 0:
        ttl = None if np.isnan(limit_time) else float(limit_time)
    else:
        ttl = limit_time
    return WarmUp(times=times, temperatures=temps, time_to_limit=ttl,
                  final_temperature=temps[..., -1], maximum_temperature=temps.max(axis=-1),
                  heat_in=heat_in, stored=stored, dissipated=dissipated)


#: A single run refreshes UA(T) once the oil has moved this far since the
#: last evaluation [K]; UA changes by well under 0.1 % over it.
UA_REFRESH = 0.05


def _warm_up_scalar(q, idx, lengths, times, c, ta, t0, fn, limit_temperature):
    """:func:`warm_up` for one variant, in plain floats (the same exact
    exponential segments; UA refreshed every :data:`UA_REFRESH` kelvin)."""
    import math

    qs = [float(v) for v in q]
    temps = [t0]
    theta = t0 - ta
    heat_in = dissipated = 0.0
    limit_time = 0.0 if (limit_temperature is not None and t0 >= limit_temperature) else None
    ua = _ua_at(fn, t0)
    t_ua = t0
    for k, (i, dt) in enumerate(zip(idx.tolist(), lengths.tolist())):
        t_now = theta + ta
        if abs(t_now - t_ua) > UA_REFRESH:
            ua = _ua_at(fn, t_now)
            t_ua = t_now
        tau = c / ua
        qi = qs[i]
        theta_inf = qi / ua
        x = dt / tau
        decay = math.exp(-x)
        theta1 = theta_inf + (theta - theta_inf) * decay
        integral = theta_inf * dt + (theta - theta_inf) * tau * (-math.expm1(-x))
        if limit_temperature is not None and limit_time is None:
            th_l = limit_temperature - ta
            if theta < th_l <= theta1:
                ratio = (theta - theta_inf) / (th_l - theta_inf)
                tc = tau * math.log(ratio) if ratio >= 1.0 else dt
                limit_time = float(times[k]) + min(tc, dt)
        heat_in += qi * dt
        dissipated += ua * integral
        theta = theta1
        temps.append(theta + ta)
    temps = np.array(temps)
    return WarmUp(times=times, temperatures=temps,
                  time_to_limit=None if limit_temperature is None else limit_time,
                  final_temperature=float(temps[-1]), maximum_temperature=float(temps.max()),
                  heat_in=heat_in, stored=c * (temps[-1] - temps[0]), dissipated=dissipated)


@dataclass(frozen=True)
class ThermostatRun:
    """Oil temperature with a thermostat-switched cooler (one variant)."""

    times: np.ndarray               #: sample times incl. switching instants [s]
    temperatures: np.ndarray        #: T at the sample times [K]
    cooler_on: np.ndarray           #: cooler state over each interval (len = n_times - 1) [-]
    switch_on_times: np.ndarray     #: instants the cooler switched on [s]
    switch_off_times: np.ndarray    #: instants the cooler switched off [s]
    final_temperature: float        #: [K]
    maximum_temperature: float      #: [K]
    on_fraction: float              #: share of the run with the cooler on [-]
    heat_in: float                  #: integral of Q dt [J]
    stored: float                   #: C (T_end - T_start) [J]
    dissipated: float               #: through the surfaces [J]
    removed_by_cooler: float        #: by the cooler [J]


def thermostat_cooler_run(heat_per_phase, durations, capacity, conductance, ambient,
                          initial_temperature, duration, on_temperature, hysteresis=5.0,
                          cooler_conductance=None, cooler_duty=None, coolant_temperature=None,
                          max_step=600.0) -> ThermostatRun:
    """Oil temperature with a cooler switched by a thermostat, events in closed form.

    Cooler off: C dT/dt = Q - UA (T - T_a).
    Cooler on, by conductance: C dT/dt = Q - UA (T - T_a) - UA_c (T - T_c);
    by duty: C dT/dt = Q - UA (T - T_a) - Q_c.
    Either way the segment is an exponential towards T_inf with
    tau = C / (UA [+ UA_c]); the cooler switches on when T rises to T_on and off
    when T falls to T_on - hysteresis, at t = tau ln((T_0 - T_inf)/(T_event - T_inf)).

    Parameters
    ----------
    heat_per_phase : array_like
        Heat into the oil per phase [W], shape (n_phases,).
    durations : array_like
        Phase durations [s], shape (n_phases,).
    capacity : float
        C [J/K].
    conductance : callable or float
        Surfaces' UA(T) [W/K] or a constant.
    ambient : float
        T_a [K].
    initial_temperature : float
        [K]; the cooler starts on if this is at or above *on_temperature*.
    duration : float
        Length of the run [s].
    on_temperature : float
        Switch-on temperature [K].
    hysteresis : float, optional
        Switch-off at on_temperature - hysteresis [K], > 0.
    cooler_conductance : float, optional
        Cooler UA_c [W/K] (air cooler: its specific cooling power, W/K of ETD).
    cooler_duty : float, optional
        Constant heat removed while on [W] (give this or *cooler_conductance*).
    coolant_temperature : float, optional
        Coolant inlet T_c [K] for the conductance form; default ambient.
    max_step : float or None, optional
        Longest segment [s] (UA refresh and sampling).

    Returns
    -------
    ThermostatRun

    Notes
    -----
    The surfaces' UA is evaluated at the start of each segment and held over
    it (exact for constant UA).  The conductance form treats the cooler as a
    fixed-flow exchanger whose duty is proportional to its ETD (common practice).

    References
    ----------
    Incropera et al., 6th ed., eq. 5.25; a two-point (on/off) controller with hysteresis.
    """
    q, d = _phase_inputs(heat_per_phase, durations)
    if q.ndim != 1 or d.ndim != 1:
        raise HeatloadError("thermostat run takes one variant: heat per phase as a 1-D array",
                            field="heat_per_phase")
    if (cooler_conductance is None) == (cooler_duty is None):
        raise HeatloadError("give either cooler_conductance [W/K] or cooler_duty [W]",
                            field="cooler_conductance")
    if cooler_conductance is not None and not cooler_conductance > 0.0:
        raise HeatloadError("cooler conductance must be positive [W/K]", field="cooler_conductance")
    if cooler_duty is not None and not cooler_duty > 0.0:
        raise HeatloadError("cooler duty must be positive [W]", field="cooler_duty")
    if not hysteresis > 0.0:
        raise HeatloadError("thermostat hysteresis must be positive [K]", field="hysteresis")
    if not duration > 0.0:
        raise HeatloadError("run duration must be positive [s]", field="duration")
    c = float(_check_capacity(capacity))
    fn = _as_conductance_fn(conductance)
    ta = float(ambient)
    tc = ta if coolant_temperature is None else float(coolant_temperature)
    t_on = float(on_temperature)
    t_off = t_on - float(hysteresis)
    idx, lengths = _schedule(d, float(duration), max_step)

    t = float(initial_temperature)
    on = t >= t_on
    now = 0.0
    times, temps, states = [0.0], [t], []
    ons, offs = [], []
    heat_in = dissipated = removed = 0.0
    qs = [float(v) for v in q]
    ua, t_ua = _ua_at(fn, np.asarray(t)), t
    for i, dt in zip(idx.tolist(), lengths.tolist()):
        if abs(t - t_ua) > UA_REFRESH:  # UA refreshed once the oil has moved
            ua, t_ua = _ua_at(fn, np.asarray(t)), t
        qi = qs[i]
        left = dt
        while left > 0.0:
            if on and cooler_conductance is not None:
                g = ua + cooler_conductance
                t_inf = (qi + ua * ta + cooler_conductance * tc) / g
            elif on:
                g = ua
                t_inf = ta + (qi - cooler_duty) / ua
            else:
                g = ua
                t_inf = ta + qi / ua
            tau = c / g
            target = t_off if on else t_on
            heading = (t_inf < target) if on else (t_inf > target)
            crossing = on and t > target or (not on) and t < target
            step = left
            switch = False
            if heading and crossing:
                ratio = (t - t_inf) / (target - t_inf)
                te = tau * math.log(ratio) if ratio >= 1.0 else math.inf
                if te < left:
                    step, switch = te, True
            theta0 = t - t_inf
            t1 = theta0 * math.exp(-step / tau) + t_inf
            integral = theta0 * tau * (-math.expm1(-step / tau))
            # integral of (T - T_inf) dt, then of the physical flows
            int_t = float(integral) + t_inf * step  # integral of T dt
            heat_in += qi * step
            dissipated += ua * (int_t - ta * step)
            if on:
                removed += (cooler_conductance * (int_t - tc * step) if cooler_conductance
                            is not None else cooler_duty * step)
            if switch:
                t1 = target  # exact by construction; removes round-off
            now += step
            left -= step
            times.append(now)
            temps.append(t1)
            states.append(on)
            t = t1
            if switch:
                on = not on
                (ons if on else offs).append(now)
    times = np.array(times)
    temps = np.array(temps)
    states = np.array(states, bool)
    on_time = float(np.sum(np.diff(times)[states])) if len(states) else 0.0
    return ThermostatRun(times=times, temperatures=temps, cooler_on=states,
                         switch_on_times=np.array(ons), switch_off_times=np.array(offs),
                         final_temperature=float(temps[-1]), maximum_temperature=float(temps.max()),
                         on_fraction=on_time / float(times[-1]), heat_in=heat_in,
                         stored=c * (temps[-1] - temps[0]), dissipated=dissipated,
                         removed_by_cooler=removed)


def shift_energy_balance(run) -> dict:
    """Energy balance of a :class:`WarmUp` or :class:`ThermostatRun`.

    residual = heat_in - stored - dissipated - removed_by_cooler

    Parameters
    ----------
    run : WarmUp or ThermostatRun

    Returns
    -------
    dict
        ``heat_in``, ``stored``, ``dissipated``, ``removed_by_cooler``,
        ``residual`` [J] and ``relative_residual`` (residual / heat_in) [-].

    Notes
    -----
    The first law over the run; the residual is round-off only.

    References
    ----------
    First law of thermodynamics for a closed system (Incropera et al., eq. 1.11b).
    """
    removed = getattr(run, "removed_by_cooler", 0.0)
    residual = run.heat_in - run.stored - run.dissipated - removed
    scale = np.maximum(np.abs(run.heat_in), 1e-300)
    return dict(heat_in=run.heat_in, stored=run.stored, dissipated=run.dissipated,
                removed_by_cooler=removed, residual=residual, relative_residual=residual / scale)
