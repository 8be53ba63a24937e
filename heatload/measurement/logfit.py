"""Heat load and tank conductance fitted from a machine's temperature log.

The oil, the tank's steel and the circuit form one heat capacity C at one
temperature T (the lumped model of :mod:`heatload.heat.thermal`); while the
machine runs the circuit puts a heat P into the oil, and the surfaces shed
UA (T - T_a) to the air:

    C dT/dt = P r(t) - UA (T - T_a(t))          r = 1 running, 0 stopped

Between two samples (step h, running r_k held, ambient linear with slope
s_k = dT_a/dt) the solution is exact:

    theta = T - T_a,  tau = C / UA,  theta_inf,k = P r_k / UA - tau s_k
    theta_k+1 = theta_inf,k + (theta_k - theta_inf,k) exp(-h / tau)

so a whole log is one linear recurrence, evaluated here without time
stepping.  The unknowns are fitted by least squares on the logged oil
temperatures (output error: the model runs from its own initial temperature,
never reset to the measurement, so sensor noise does not enter the dynamics).

What a log can tell
-------------------
Temperatures alone fix two rates: q = P / C [K/s] and k = UA / C = 1 / tau
[1/s], and the initial temperature.  Heat and conductance in watts need C:
from the masses of oil and steel (:func:`heatload.evaluation.heat_capacity` of a
scenario) or given.  Without C the fit still gives the time constant and the
steady temperature rise P / UA.  The conductance needs the log to bend: a log
much shorter than tau shows only the initial slope (P / C), and a log at a
steady temperature only the ratio P / UA; a running/stopped contrast (a
warm-up and a cool-down) separates the two best.  Each fitted value carries
a confidence interval from the Jacobian at the solution; a value whose
interval is wider than :data:`IDENTIFIED_WITHIN` of itself is reported as
not identified, with the reason.

References
----------
Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Sec. 5.3
(lumped capacitance with a heat source); Bates and Watts, Nonlinear
Regression Analysis and Its Applications (1988), Sec. 2.3 (linear
approximation intervals, s^2 (J^T J)^-1 with Student's t); the variance
inflation (1 + rho) / (1 - rho) of AR(1) residuals: Box, Jenkins and Reinsel,
Time Series Analysis (any edition), on the variance of the mean of an
autocorrelated series.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from heatload.errors import HeatloadError

#: A fitted value counts as identified when its confidence interval's half-width
#: is within this fraction of the value (a choice of ours: +-25 % still sizes a
#: cooler; wider says the log does not carry the information).
IDENTIFIED_WITHIN = 0.25
#: Smallest swing of the oil temperature over a log that can carry the tank's
#: dynamics [K]: about the resolution of a process temperature sensor and logger
#: (0.1 K, common practice); a flatter log shows only the steady rise P/UA.
FLAT_SWING = 0.1
#: Fewest samples a fit accepts (three unknowns and a residual to judge them by).
MIN_SAMPLES = 10
#: Largest exponent used inside one block of the recurrence (exp(500) ~ 1e217).
_BLOCK_EXPONENT = 500.0


def _recurrence(log_decay, drive, x0):
    """x_0 = x0, x_{n+1} = exp(log_decay_n) x_n + drive_n for n = 0..N-1 (N + 1 values).

    Evaluated by blocks in closed form: inside a block starting at s,
    x_n = D_n (x_s + sum_{k<n} drive_k / D_{k+1}) with D_n = prod_{s<=j<n} decay_j,
    each block kept short enough that 1 / D stays finite."""
    n = len(log_decay)
    out = np.empty(n + 1)
    out[0] = x0
    cum = np.concatenate(([0.0], np.cumsum(log_decay)))   # log D from the start
    s = 0
    while s < n:
        # the block ends before the decay since its start passes exp(-_BLOCK_EXPONENT)
        e = int(np.searchsorted(-cum, -cum[s] + _BLOCK_EXPONENT, side="right")) - 1
        e = min(max(e, s + 1), n)
        if e == s + 1:
            out[s + 1] = math.exp(log_decay[s]) * out[s] + drive[s]
            s += 1
            continue
        rel = cum[s + 1:e + 1] - cum[s]                  # log D_{k+1}, k = s..e-1
        acc = np.cumsum(drive[s:e] * np.exp(-rel))
        out[s + 1:e + 1] = np.exp(rel) * (out[s] + acc)
        s = e
    return out


def tank_temperatures(time, ambient, running, heat_rate, loss_rate, initial_temperature):
    """Oil temperature of the lumped tank at the log's sample times.

    dT/dt = q r(t) - k (T - T_a(t)),  q = P / C, k = UA / C;
    exact between samples with r held at its value at the interval's start
    and T_a linear in time (see the module notes).

    Parameters
    ----------
    time : array_like
        Sample times, increasing [s].
    ambient : array_like
        Air temperature at the samples [K].
    running : array_like or float
        Fraction of the heat applied over the interval starting at each sample
        (1 running, 0 stopped) [-].
    heat_rate : float
        q = P / C, the warming rate the heat alone gives [K/s].
    loss_rate : float
        k = UA / C = 1 / tau [1/s], > 0.
    initial_temperature : float
        T at the first sample [K].

    Returns
    -------
    ndarray
        T at every sample [K].

    Notes
    -----
    A running state that changes between samples shifts its heat by up to one
    sample interval; sample faster than the machine's cycle, or log the
    running fraction.

    References
    ----------
    Incropera et al., 6th ed., Sec. 5.3 (lumped capacitance, eq. 5.25 with a
    heat source).

    Examples
    --------
    One time constant after a start at ambient the oil has covered
    1 - 1/e = 63.2 % of its steady rise q / k (first-order step response):

    >>> t = [0.0, 3600.0]
    >>> T = tank_temperatures(t, [293.15, 293.15], 1.0, 40.0 / 3600.0, 1 / 3600.0, 293.15)
    >>> round(float(T[1] - 293.15) / 40.0, 4)
    0.6321
    """
    t = np.asarray(time, float)
    ta = np.broadcast_to(np.asarray(ambient, float), t.shape)
    r = np.broadcast_to(np.asarray(running, float), t.shape)
    if not loss_rate > 0.0:
        raise HeatloadError("the loss rate UA / C must be positive [1/s]", field="loss_rate")
    h = np.diff(t)
    tau = 1.0 / loss_rate
    slope = np.diff(ta) / h
    theta_inf = heat_rate * r[:-1] * tau - tau * slope
    drive = -np.expm1(-h * loss_rate) * theta_inf
    theta = _recurrence(-h * loss_rate, drive, initial_temperature - ta[0])
    return ta + theta


@dataclass
class TankFit:
    """A fitted tank model and how well the log determines it (SI: W, W/K,
    J/K, s, K).  Values that need C are None when no heat capacity was given;
    intervals are (low, high) at :attr:`confidence`."""

    heat: float | None                 #: heat into the oil while running, P [W]; None
                                       #: without C or when the machine never runs
    conductance: float | None          #: UA to the air [W/K]
    capacity: float | None             #: C used (given, not fitted) [J/K]
    time_constant: float               #: tau = C / UA [s]
    initial_temperature: float         #: T at the first sample [K]
    temperature_rise: float            #: steady rise while running, P / UA [K]
    heat_rate: float                   #: q = P / C [K/s]
    loss_rate: float                   #: k = UA / C [1/s]
    intervals: dict                    #: name -> (low, high)
    identified: dict                   #: name -> bool
    confidence: float                  #: e.g. 0.95
    residual_rms: float                #: [K]
    residual_max: float                #: largest |measured - fitted| [K]
    residual_autocorrelation: float    #: lag-1 autocorrelation of the residuals [-]
    interval_widening: float           #: factor applied to the intervals for it [-]
    samples: int
    duration: float                    #: span of the log [s]
    running_fraction: float            #: share of the time the machine ran [-]
    fitted: np.ndarray                 #: model T at the samples [K]
    residuals: np.ndarray              #: measured - fitted [K]
    correlation: float                 #: correlation of the P and UA estimates [-]
    notes: list = field(default_factory=list)

    @property
    def fully_identified(self) -> bool:
        return all(self.identified.values())


def _basis(t, ta, r, k):
    """Responses whose combination is the model at loss rate k:
    T = base + q * unit_heat + T0_offset * unit_start."""
    base = tank_temperatures(t, ta, r, 0.0, k, ta[0])
    unit_heat = tank_temperatures(t, ta, r, 1.0, k, ta[0]) - base
    unit_start = np.exp(-k * (t - t[0]))
    return base, unit_heat, unit_start


def _profile(t, ta, r, y, k, fit_heat):
    """Best q and T0 at a fixed k (linear least squares) and the residual sum."""
    base, uh, us = _basis(t, ta, r, k)
    cols = [uh, us] if fit_heat else [us]
    a = np.column_stack(cols)
    coef, *_ = np.linalg.lstsq(a, y - base, rcond=None)
    res = y - base - a @ coef
    q = float(coef[0]) if fit_heat else 0.0
    return q, float(ta[0] + coef[-1]), float(res @ res)


def fit_tank_log(time, oil_temperature, ambient, running=None, capacity=None,
                 confidence=0.95) -> TankFit:
    """Fit heat, conductance and initial temperature of the lumped tank model
    to a logged oil temperature (see the module notes).

    Minimises sum (T_measured - T_model)^2 over q = P / C, k = UA / C and T_0
    with :func:`scipy.optimize.least_squares` (trust region), started from the
    best k of a logarithmic scan on which q and T_0 are solved linearly.

    Parameters
    ----------
    time : array_like
        Sample times, increasing [s] (gaps allowed: the solution is exact over
        any interval).
    oil_temperature : array_like
        Logged oil temperature [K].
    ambient : array_like or float
        Air temperature at the samples [K].
    running : array_like, optional
        1 while the machine runs, 0 while stopped (fractions allowed); None:
        running throughout.
    capacity : float, optional
        Heat capacity C of oil and steel [J/K]; without it heat and
        conductance are None and only rates, tau and the rise are fitted.
    confidence : float, optional
        Level of the intervals (0.95).

    Returns
    -------
    TankFit

    Raises
    ------
    HeatloadError
        Too few samples, times not increasing, non-finite values, a log in
        which the machine never runs and no capacity was given.

    Notes
    -----
    Intervals are the linear approximation s^2 (J^T J)^-1 with Student's t,
    widened by sqrt((1 + rho) / (1 - rho)) when the residuals' lag-1
    autocorrelation rho is positive (drift, a sensor's lag, a heat that varies
    with the cycle make residuals correlated and the plain interval too
    narrow).  tau's interval is 1/k's interval mapped through 1/k.

    References
    ----------
    See the module notes.
    """
    from scipy import optimize, special

    t = np.asarray(time, float)
    y = np.asarray(oil_temperature, float)
    ta = np.broadcast_to(np.asarray(ambient, float), t.shape).astype(float)
    r = (np.ones_like(t) if running is None
         else np.broadcast_to(np.asarray(running, float), t.shape).astype(float))
    n = t.size
    if n < MIN_SAMPLES:
        raise HeatloadError(f"{n} samples; a fit needs at least {MIN_SAMPLES}",
                            field="time")
    if y.shape != t.shape:
        raise HeatloadError("oil temperatures and times differ in number", field="oil")
    for name, v in (("time", t), ("oil", y), ("ambient", ta), ("running", r)):
        if not np.all(np.isfinite(v)):
            raise HeatloadError("values must be finite", field=name)
    if not np.all(np.diff(t) > 0.0):
        raise HeatloadError("times must increase", field="time")
    if capacity is not None and not (math.isfinite(capacity) and capacity > 0.0):
        raise HeatloadError("heat capacity must be positive [J/K]", field="heat_capacity")
    notes = []
    span = float(t[-1] - t[0])
    on = r[:-1]
    h = np.diff(t)
    running_fraction = float((on * h).sum() / span)
    fit_heat = running_fraction > 0.0
    if not fit_heat:
        notes.append("the machine never runs in this log: the heat cannot be identified; "
                     "only the conductance is fitted, from the cooling")
    if running is None:
        notes.append("no running column: the machine is taken to run throughout the log")

    # a scan of tau from a tenth of the shortest step to 100 x the span
    taus = np.geomspace(max(float(h.min()), 1e-3) * 0.1, 100.0 * span, 30)
    scores = [_profile(t, ta, r, y, 1.0 / tau, fit_heat)[2] for tau in taus]
    k0 = 1.0 / taus[int(np.argmin(scores))]
    q0, t00, _ = _profile(t, ta, r, y, k0, fit_heat)

    scale_t = max(float(np.ptp(y)), 1.0)

    def residuals(p):
        q, logk, t0 = (p[0], p[1], p[2]) if fit_heat else (0.0, p[0], p[1])
        return (tank_temperatures(t, ta, r, q, math.exp(logk), t0) - y)

    # k on a log scale: positive by construction and of even sensitivity
    x0 = [q0, math.log(k0), t00] if fit_heat else [math.log(k0), t00]
    sol = optimize.least_squares(residuals, x0, method="trf", x_scale="jac",
                                 xtol=1e-12, ftol=1e-12, gtol=1e-12, max_nfev=400)
    p = sol.x
    q, logk, t0 = (p[0], p[1], p[2]) if fit_heat else (0.0, p[0], p[1])
    k = math.exp(logk)
    res = -sol.fun                         # measured - fitted
    m = len(p)
    dof = max(n - m, 1)
    s2 = float(res @ res) / dof
    jac = sol.jac.copy()
    jac[:, 1 if fit_heat else 0] /= k       # d/dk from d/dlogk
    jtj = jac.T @ jac
    try:
        cov = s2 * np.linalg.inv(jtj)
        if not np.all(np.isfinite(cov)) or np.any(np.diag(cov) < 0):
            raise np.linalg.LinAlgError
    except np.linalg.LinAlgError:
        cov = np.full((m, m), np.inf)
        notes.append("the log does not determine the parameters (singular Jacobian)")
    rho = float(np.corrcoef(res[:-1], res[1:])[0, 1]) if n > 3 and np.std(res) > 0 else 0.0
    rho = 0.0 if not math.isfinite(rho) else rho
    widen = math.sqrt((1.0 + rho) / (1.0 - rho)) if 0.0 < rho < 0.999 else (
        math.sqrt(1999.0) if rho >= 0.999 else 1.0)
    tq = float(special.stdtrit(dof, 0.5 + confidence / 2.0)) * widen
    sd = np.sqrt(np.diag(cov))
    iq, ik, it0 = (0, 1, 2) if fit_heat else (None, 0, 1)
    sd_q = float(sd[iq]) if fit_heat else 0.0
    sd_k, sd_t0 = float(sd[ik]), float(sd[it0])
    cov_qk = float(cov[iq, ik]) if fit_heat else 0.0

    def interval(v, s):
        return (v - tq * s, v + tq * s)

    rise = q / k
    # delta method for q / k
    sd_rise = math.sqrt(max((sd_q / k) ** 2 + (q * sd_k / k ** 2) ** 2
                            - 2 * q / k ** 3 * cov_qk, 0.0)) if math.isfinite(sd_k) else math.inf
    k_lo, k_hi = interval(k, sd_k)
    tau = 1.0 / k
    tau_iv = (1.0 / k_hi if k_hi > 0 else math.inf, 1.0 / k_lo if k_lo > 0 else math.inf)
    intervals = {"heat_rate": interval(q, sd_q), "loss_rate": (k_lo, k_hi),
                 "initial_temperature": interval(t0, sd_t0), "time_constant": tau_iv,
                 "temperature_rise": interval(rise, sd_rise)}

    def ok(v, s):
        return bool(math.isfinite(s) and v != 0.0 and tq * s <= IDENTIFIED_WITHIN * abs(v))

    # a log that never leaves one temperature, with no running/stopped contrast,
    # carries P/UA only, however small its residual (a perfect fit of a flat line)
    contrast = 0.0 < running_fraction < 1.0 and np.ptp(r) > 0
    flat = (not contrast and float(np.ptp(y)) <= max(FLAT_SWING,
                                                     10.0 * math.sqrt(float(res @ res) / n)))
    identified = {"conductance": ok(k, sd_k) and not flat,
                  "heat": fit_heat and ok(q, sd_q) and not flat and q > 0.0,
                  "initial_temperature": bool(math.isfinite(sd_t0)
                                              and tq * sd_t0 < 0.5 * scale_t + 1.0)}
    heat = conductance = None
    if capacity is not None:
        heat, conductance = (capacity * q if fit_heat else None), capacity * k
        if fit_heat:
            intervals["heat"] = tuple(capacity * v for v in intervals["heat_rate"])
        intervals["conductance"] = tuple(capacity * v for v in intervals["loss_rate"])
        intervals["capacity"] = (capacity, capacity)
    corr = (cov_qk / (sd_q * sd_k) if fit_heat and sd_q > 0 and math.isfinite(sd_k)
            and sd_k > 0 else 0.0)
    fit = TankFit(heat=heat, conductance=conductance, capacity=capacity, time_constant=tau,
                  initial_temperature=t0, temperature_rise=rise, heat_rate=q, loss_rate=k,
                  intervals=intervals, identified=identified, confidence=confidence,
                  residual_rms=math.sqrt(float(res @ res) / n),
                  residual_max=float(np.max(np.abs(res))), residual_autocorrelation=rho,
                  interval_widening=widen, samples=n, duration=span,
                  running_fraction=running_fraction, fitted=y - res, residuals=res,
                  correlation=float(corr), notes=notes)
    fit.notes += _diagnose(fit, r)
    return fit


def _hours(seconds):
    return f"{seconds / 3600:.3g} h" if seconds >= 3600 else f"{seconds / 60:.3g} min"


def _diagnose(fit: TankFit, running) -> list:
    """Plain reasons why a value is not identified."""
    out = []
    if fit.fully_identified:
        return out
    contrast = fit.running_fraction not in (0.0, 1.0) and np.ptp(running) > 0
    swing = float(np.ptp(fit.fitted))
    if not fit.identified["conductance"]:
        if swing <= max(FLAT_SWING, 10.0 * fit.residual_rms) and not contrast:
            out.append(f"the conductance is not identified: the oil temperature hardly "
                       f"changes ({swing:.2g} K over the log against {fit.residual_rms:.2g} K "
                       f"of noise) and the log has no running/stopped contrast; log a stop "
                       f"(cool-down) or a start from cold")
        elif not math.isfinite(fit.time_constant) or fit.duration < 2.0 * fit.time_constant:
            out.append(f"the conductance is not identified: the log spans "
                       f"{_hours(fit.duration)}, short against the time constant "
                       f"(about {_hours(fit.time_constant)}); log at least two time "
                       f"constants, or a warm-up and a cool-down")
        elif not contrast:
            out.append("the conductance is not identified: the oil stays near a steady "
                       "temperature and the log has no running/stopped contrast; log a "
                       "stop (cool-down) or a start from cold")
        else:
            out.append("the conductance is not identified: the noise hides the bend of the "
                       "curve; a longer log or a steadier sensor helps")
    if fit.running_fraction > 0.0 and not fit.identified["heat"]:
        if fit.heat_rate <= 0.0:
            out.append("the heat is not identified: the fit gives no heat (or a negative "
                       "one) while the machine runs, which losses cannot do; check the "
                       "running column, the sensors' places and the ambient column")
        elif not contrast and not fit.identified["conductance"]:
            out.append("the heat is not identified: with no running/stopped contrast only "
                       "the steady rise P/UA or the initial slope P/C shows in the log")
        else:
            out.append("the heat is not identified: its interval is wider than "
                       f"±{IDENTIFIED_WITHIN:.0%} of the value")
    return out


def fit_record(fit: TankFit, capacity_source: str = "given") -> dict:
    """The fit as plain data, SI with unit-suffixed keys (``heatload logfit --json``).

    Keys: ``heat_W``, ``conductance_W_K``, ``heat_capacity_J_K``,
    ``time_constant_s`` (each with ``..._interval`` = [low, high]),
    ``initial_temperature_C``, ``temperature_rise_K``, ``identified``,
    ``residual_rms_K`` ..., ``notes``."""
    def f(v):
        return None if v is None or not math.isfinite(v) else float(v)

    def iv(name, offset=0.0):
        lo_hi = fit.intervals.get(name)
        return None if lo_hi is None else [f(lo_hi[0] - offset), f(lo_hi[1] - offset)]

    return {
        "heat_W": f(fit.heat), "heat_W_interval": iv("heat"),
        "conductance_W_K": f(fit.conductance), "conductance_W_K_interval": iv("conductance"),
        "heat_capacity_J_K": f(fit.capacity), "heat_capacity_J_K_interval": iv("capacity"),
        "heat_capacity_source": capacity_source if fit.capacity is not None else None,
        "time_constant_s": f(fit.time_constant), "time_constant_s_interval": iv("time_constant"),
        "initial_temperature_C": f(fit.initial_temperature - 273.15),
        "initial_temperature_C_interval": iv("initial_temperature", 273.15),
        "temperature_rise_K": f(fit.temperature_rise),
        "temperature_rise_K_interval": iv("temperature_rise"),
        "heat_rate_K_s": f(fit.heat_rate), "loss_rate_1_s": f(fit.loss_rate),
        "confidence": fit.confidence,
        "identified": {"heat_W": bool(fit.identified["heat"]),
                       "conductance_W_K": bool(fit.identified["conductance"]),
                       "initial_temperature_C": bool(fit.identified["initial_temperature"])},
        "residual_rms_K": f(fit.residual_rms), "residual_max_K": f(fit.residual_max),
        "residual_autocorrelation": f(fit.residual_autocorrelation),
        "interval_widening": f(fit.interval_widening),
        "heat_conductance_correlation": f(fit.correlation),
        "samples": fit.samples, "duration_s": f(fit.duration),
        "running_fraction": f(fit.running_fraction), "notes": list(fit.notes),
    }
