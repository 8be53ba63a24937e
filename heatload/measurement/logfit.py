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

so a whole log is one linear recurrence, evaluated here in vectorized
chunks (no Python step per sample).  The unknowns are fitted by least squares on the logged oil
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
approximation intervals, s^2 (J^T J)^-1 with Student's t); Golub and
Pereyra, SIAM J. Numer. Anal. 10 (1973) 413-432 (variable projection:
separable least squares); the variance
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
#: Shortest recurrence evaluated by a plain loop; longer ones go in chunks.
_SHORT = 64
#: Bounds of the fitted time constant, as multiples of the shortest sample step
#: and of the log's span: well outside anything a log can show, so the bound
#: never decides a fit the log determines, yet the loss rate stays a positive,
#: finite number when a flat log lets the fit wander (k -> 0 or k -> inf fit a
#: flat line equally well).
_TAU_BOUNDS = (1e-3, 1e6)


def _scan(decay, drive, x0):
    """x_0 = x0, x_{n+1} = decay_n x_n + drive_n for n = 0..N-1 (N + 1 values),
    0 <= decay_n <= 1; *drive* may carry further axes (several recurrences with
    the same decays, side by side).

    Evaluated in chunks of about sqrt(N) steps, all chunks side by side: each
    chunk runs from zero (one vectorized step per position in the chunk), the
    chunks' start values follow from the same recurrence over the chunks
    (decay = the chunk's product of decays), and
    x = (product of the decays so far in the chunk) x_start + the chunk's own
    run.  Only products of decays <= 1 are formed (no division), so no step
    size or time constant overflows it, and the work is O(N) in numpy with
    about 2 sqrt(N) Python steps (the few steps past the last whole chunk run
    one by one)."""
    n = len(decay)
    tail = drive.shape[1:]
    out = np.empty((n + 1,) + tail)
    out[0] = x0
    width = math.isqrt(n) if n > _SHORT else 0
    chunks = n // width if width else 0
    m = chunks * width
    if chunks:
        grow = (1,) * len(tail)          # decays broadcast over the drive's further axes
        a = decay[:m].reshape((chunks, width) + grow)
        run = out[1:m + 1].reshape((chunks, width) + tail)     # a view: filled in place
        run[...] = drive[:m].reshape((chunks, width) + tail)
        for j in range(1, width):        # each chunk's run from zero
            run[:, j] += a[:, j] * run[:, j - 1]
        gain = np.cumprod(a, axis=1)
        starts = _scan(gain[:, -1].reshape(chunks), np.ascontiguousarray(run[:, -1]), x0)
        run += gain * starts[:-1, None]
    x = out[m]
    for i in range(m, n):
        x = decay[i] * x + drive[i]
        out[i + 1] = x
    return out


#: Samples above which the scan for the time constant runs on a thinned log.
_SCAN_SAMPLES = 200_000


def _thinned(t, ta, r, y, samples=_SCAN_SAMPLES // 2):
    """Every m-th sample of a log (and the last), with the running fraction
    held over each longer step the time-weighted mean of the steps it spans."""
    m = -(-t.size // samples)
    idx = np.unique(np.append(np.arange(0, t.size, m), t.size - 1))
    h = np.diff(t)
    on = np.add.reduceat(r[:-1] * h, idx[:-1]) / np.add.reduceat(h, idx[:-1])
    return t[idx], ta[idx], np.append(on, r[-1]), y[idx]


def _steps(t, ta, r):
    """What the responses need of a log whatever k is: steps [s], the air's
    slope over each [K/s], the running fraction held over each [-]."""
    h = np.diff(t)
    return h, np.diff(ta) / h, r[:-1]


def _responses(t, ta, r, k, steps=None):
    """The tank's three responses at loss rate k, whose combination is the model:

        T = ta + theta_air + q theta_heat + (T_0 - ta_0) exp(-k (t - t_0))

    theta_air: the lag behind a moving air temperature (from T_0 = ta_0, no
    heat); theta_heat: the rise from a unit heat rate q = 1 K/s (from zero);
    each by the exact one-interval solution (module notes), both in one scan.
    *steps*: :func:`_steps` of the log, when already at hand."""
    h, slope, held = steps if steps is not None else _steps(t, ta, r)
    decay = np.exp(-h * k)
    settle = -np.expm1(-h * k)                 # 1 - exp(-h k): how far one step goes
    drive = np.empty((h.size, 2))
    np.multiply(settle, -slope / k, out=drive[:, 0])
    np.multiply(settle, held / k, out=drive[:, 1])
    theta = _scan(decay, drive, np.zeros(2))
    return ta + theta[:, 0], theta[:, 1], np.exp(-k * (t - t[0]))


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
    base, heat, start = _responses(t, ta, r, loss_rate)
    return base + heat_rate * heat + (initial_temperature - ta[0]) * start


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


def _profile(t, ta, r, y, k, fit_heat, steps=None):
    """Best q and T0 at a fixed k (linear least squares: the model is linear in
    both), the residual sum of squares and the responses."""
    base, uh, us = _responses(t, ta, r, k, steps)
    a = np.column_stack([uh, us] if fit_heat else [us])
    b = y - base
    # normal equations on unit-norm columns (two columns, well apart: the heat's
    # response rises from zero, the start's decays from one): a 2 x 2 solve
    # instead of a decomposition of the whole log
    norm = np.sqrt(np.einsum("ij,ij->j", a, a))
    norm[norm == 0.0] = 1.0
    gram = (a.T @ a) / np.outer(norm, norm)
    coef = np.linalg.lstsq(gram, (a.T @ b) / norm, rcond=1e-13)[0] / norm
    res = b - a @ coef
    q = float(coef[0]) if fit_heat else 0.0
    return q, float(ta[0] + coef[-1]), float(res @ res), (base, uh, us)


def fit_tank_log(time, oil_temperature, ambient, running=None, capacity=None,
                 confidence=0.95) -> TankFit:
    """Fit heat, conductance and initial temperature of the lumped tank model
    to a logged oil temperature (see the module notes).

    Minimises sum (T_measured - T_model)^2 over q = P / C, k = UA / C and T_0.
    The model is linear in q and T_0, so they are solved by linear least
    squares at each k and the search runs over k alone (variable projection):
    a logarithmic scan, then :func:`scipy.optimize.minimize_scalar` (bounded
    Brent) between the best scan point's neighbours.  Each trial k costs one
    vectorized pass over the log, so millions of samples fit in seconds.

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

    # k on a log scale, bounded far outside what the log can show (a flat log
    # lets k run off to 0 or inf); q and T_0 enter linearly and are solved
    # exactly at each k (variable projection), so the search is over k alone:
    # a scan of tau from a tenth of the shortest step to 100 x the span, then
    # Brent's bounded method between the best point's neighbours
    logk_low = -math.log(_TAU_BOUNDS[1] * span)
    logk_high = -math.log(_TAU_BOUNDS[0] * float(h.min()))
    taus = np.geomspace(max(float(h.min()), 1e-3) * 0.1, 100.0 * span, 30)
    grid = -np.log(taus)                                 # log k, decreasing
    steps = _steps(t, ta, r)
    # a long log is scanned on every m-th sample (the running fraction averaged
    # over each longer step): the scan only brackets the minimum, which is then
    # found on the whole log, two grid cells either side for the thinning's sake
    coarse = _thinned(t, ta, r, y) if n > _SCAN_SAMPLES else None
    sub = coarse if coarse is not None else (t, ta, r, y)
    sub_steps = _steps(*sub[:3]) if coarse is not None else steps
    scores = [_profile(*sub, math.exp(g), fit_heat, sub_steps)[2] for g in grid]
    best = int(np.argmin(scores))
    wide = 2 if coarse is not None else 1
    bracket = (grid[best + wide] if best + wide < grid.size else logk_low,
               grid[best - wide] if best >= wide else logk_high)

    def sse(logk):
        return _profile(t, ta, r, y, math.exp(logk), fit_heat, steps)[2]

    sol = optimize.minimize_scalar(sse, bounds=bracket, method="bounded",
                                   options={"xatol": 1e-7, "maxiter": 200})
    logk = (float(sol.x) if coarse is not None or sol.fun <= scores[best]
            else float(grid[best]))
    k = math.exp(logk)
    q, t0, _, (base, uh, us) = _profile(t, ta, r, y, k, fit_heat, steps)
    fitted = base + q * uh + (t0 - ta[0]) * us
    res = y - fitted                       # measured - fitted
    # the model's derivatives: q and T_0 exactly (their responses), k by a
    # central difference in log k
    step = 1e-5
    up, down = (tank_temperatures(t, ta, r, q, k * math.exp(e), t0) for e in (step, -step))
    d_k = (up - down) / (k * 2.0 * math.sinh(step))
    jac = np.column_stack([uh, d_k, us] if fit_heat else [d_k, us])
    m = jac.shape[1]
    dof = max(n - m, 1)
    s2 = float(res @ res) / dof
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

    scale_t = max(float(np.ptp(y)), 1.0)

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
                                              and tq * sd_t0 < 0.5 * scale_t + 1.0),
                  # a flat log fits k -> 0 with no heat as well as a steady rise:
                  # then P/UA is no better known than P or UA
                  "temperature_rise": fit_heat and ok(rise, sd_rise) and rise > 0.0}
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
                       "initial_temperature_C": bool(fit.identified["initial_temperature"]),
                       "temperature_rise_K": bool(fit.identified["temperature_rise"])},
        "residual_rms_K": f(fit.residual_rms), "residual_max_K": f(fit.residual_max),
        "residual_autocorrelation": f(fit.residual_autocorrelation),
        "interval_widening": f(fit.interval_widening),
        "heat_conductance_correlation": f(fit.correlation),
        "samples": fit.samples, "duration_s": f(fit.duration),
        "running_fraction": f(fit.running_fraction), "notes": list(fit.notes),
    }
