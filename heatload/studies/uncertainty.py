"""Uncertainty of the cooler duty and the oil temperature: Monte Carlo and a
one-at-a-time sensitivity ranking (tornado).

Inputs are :class:`heatload.model.UncertainInput` items (``[[uncertainty]]``
in the scenario file); when a scenario gives none, :data:`DEFAULT_INPUTS`
is used.  Samples are evaluated in vectorized passes by
:func:`heatload.studies.variants.evaluate_variants`.

Distributions: ``uniform`` on [low, high]; ``triangular`` (low, mode, high;
mode defaults to the midpoint); ``normal`` with low/high its 5th and 95th
percentiles (mean = (low + high)/2, sigma = (high - low) / (2 x 1.6449)).
``relative`` bounds are factors on the nominal value; a path with ``[*]``
scales every item by the same factor (fully correlated).

Tails: every sample is held to the range its field may take
(:func:`heatload.paths.allowed_range`: the file's sign rule, plausible range
and magnitude limit, and a ceiling another field sets, such as the design oil
temperature at most the fluid's limit) by **truncation**, not clipping: a draw
that would put any item of its path outside that range is drawn again from the
same distribution until it lies inside, so the samples follow the distribution
cut off at the field's limits and renormalised (a truncated normal), with no
pile of samples at a limit.  The loader has already checked that ``low`` and
``high`` themselves lie in the range, so only a normal's tails (beyond its 5th
and 95th percentiles) and the typical defaults (an efficiency of 0.98 times
1.03) can be cut.  :attr:`UncertaintyResult.truncated` counts the samples drawn
again per input; ``heatload cooler`` and the report name every input whose
share passes :data:`NOTED_SHARE`.

The oil temperature reported is the coupled steady temperature at the
*typical* ambient (``ambient.temperature``) without a cooler; the duty is the
design-point cooler duty (hottest ambient, margin included).
"""

from __future__ import annotations

import sys
from dataclasses import dataclass, field

import numpy as np

from heatload.errors import HeatloadError
from heatload.model import Scenario, UncertainInput

#: z of the 95th percentile of the standard normal distribution.
Z95 = 1.6448536269514722

#: Inputs used when a scenario lists none (typical, common practice):
#: pump efficiencies +-3 %, phase loads +-10 %, hottest ambient +-3 K,
#: surface heat transfer +-25 %, dwell / idle times +-10 %.
DEFAULT_INPUTS = (
    UncertainInput("power_unit.pump.volumetric_efficiency", "uniform", 0.97, 1.03),
    UncertainInput("power_unit.pump.hydromechanical_efficiency", "uniform", 0.97, 1.03),
    UncertainInput("phases[*].load", "uniform", 0.9, 1.1),
    UncertainInput("ambient.temperature_max", "uniform", -3.0, 3.0, relative=False),
    UncertainInput("reservoir.heat_transfer_factor", "uniform", 0.75, 1.25),
    UncertainInput("phases[*].duration", "uniform", 0.9, 1.1),
)
#: Marks the default ambient entry: bounds are offsets [K] on the nominal value.
_OFFSET_PATHS = ("ambient.temperature_max",)

CHUNK = 20000

#: Share of the samples drawn again (truncated at a field's limit) above which
#: the Monte Carlo's text says so [-]: a thousandth of the samples moves the
#: P90 / P95 by less than their own sampling scatter at 10,000 samples.
NOTED_SHARE = 1e-3
#: Rounds of drawing the cut samples again; the range holds at least the 90 %
#: between a normal's 5th and 95th percentiles, so 1e-50 of a sample is left.
_REDRAW_ROUNDS = 50


@dataclass
class UncertaintyResult:
    """Monte Carlo of one strategy: per-sample arrays (SI) and percentiles."""

    strategy: str
    cooler_duty: np.ndarray            #: design-point duty with margin [W]
    oil_temperature: np.ndarray        #: coupled steady T, typical ambient, no cooler [K]
    percentiles: dict                  #: {"cooler_duty_W": {"P50", "P90", "P95"}, "oil_temperature_C": {...}}
    inputs: list                       #: the UncertainInput items sampled
    samples: dict = field(default_factory=dict)  #: path -> sampled factor or value (N,)
    seed: int = 1
    defaults_used: bool = False        #: True when the scenario gave no inputs
    #: path -> samples whose first draw left the field's range and were drawn
    #: again inside it (truncation; see the module notes)
    truncated: dict = field(default_factory=dict)

    def truncation_notes(self, share=None) -> list:
        """``(path, count, share)`` of every input whose truncated share passes
        *share* (default :data:`NOTED_SHARE`), in input order."""
        share = NOTED_SHARE if share is None else share
        n = len(self.cooler_duty)
        return [(p, int(k), k / n) for p, k in self.truncated.items() if n and k / n > share]


def inputs_of(scenario: Scenario):
    """The scenario's uncertain inputs, or :data:`DEFAULT_INPUTS` (flag)."""
    if scenario.uncertainty:
        return list(scenario.uncertainty), False
    # a default that has nothing to act on is left out (a cycle of timed-by-stroke
    # phases has no duration to vary; a cycle of idles has no load)
    has = {"phases[*].duration": any(p.duration is not None for p in scenario.phases),
           "phases[*].load": any(p.load for p in scenario.phases)}
    return [u for u in DEFAULT_INPUTS if has.get(u.path, True)], True


def _bounds(u: UncertainInput, default: bool):
    lo, hi = float(u.low), float(u.high)
    mode = None if u.mode is None else float(u.mode)
    if not lo < hi:
        raise HeatloadError("low must be below high", field=u.path)
    return lo, hi, mode


def draw(u: UncertainInput, n: int, rng, default=False) -> np.ndarray:
    """*n* draws of one input's factor or value (see the module notes)."""
    lo, hi, mode = _bounds(u, default)
    if u.distribution == "uniform":
        return rng.uniform(lo, hi, n)
    if u.distribution == "triangular":
        return rng.triangular(lo, 0.5 * (lo + hi) if mode is None else mode, hi, n)
    if u.distribution == "normal":
        return rng.normal(0.5 * (lo + hi), (hi - lo) / (2.0 * Z95), n)
    raise HeatloadError(f"unknown distribution {u.distribution!r}; expected uniform, "
                        "triangular or normal", field=u.path)


def _targets(scenario, u: UncertainInput, default: bool):
    """(single-item paths, nominal values, how: 'factor' | 'offset' | 'value')."""
    from heatload.paths import resolve_path

    ref = resolve_path(scenario, u.path)
    paths = []
    for t in ref.targets:
        if t[0] == "phase":
            paths.append(f"phases[{t[1]}].{t[2]}")
        elif t[0] == "actuator":
            paths.append(f"actuators.{t[1]}.{t[2]}")
        elif t[0] == "strategy":
            paths.append(f"strategies.{t[1]}.{t[2]}")
        else:
            paths.append(ref.path)
    how = "offset" if (default and u.path in _OFFSET_PATHS) else (
        "factor" if u.relative else "value")
    if how != "value" and any(v is None for v in ref.nominal):
        keep = [(p, v) for p, v in zip(paths, ref.nominal) if v is not None]
        if not keep:
            raise HeatloadError("has no nominal value to scale; give absolute bounds",
                                field=u.path)
        paths, nominal = zip(*keep)
        return list(paths), list(nominal), how
    return paths, list(ref.nominal), how


def _item_ranges(scenario, u: UncertainInput, default: bool):
    """``(how, [(nominal, low, low_open, high, high_open), ...])``: each item of
    *u*'s path with the range its field may take (:func:`heatload.paths.allowed_range`)."""
    from heatload import paths as _paths

    items, nominal, how = _targets(scenario, u, default)
    out = []
    for p, v in zip(items, nominal):
        lo, lo_open, hi, hi_open = _paths.allowed_range(scenario, _paths.resolve_path(scenario, p))
        out.append((v, float(lo.max()), lo_open, float(hi.min()), hi_open))
    return how, out


def draw_range(scenario, u: UncertainInput, default: bool = False) -> tuple:
    """The draws of *u* that keep every item of its path in its field's range:
    ``(low, low_open, high, high_open)`` of the factor, offset [K] or value.

    For a factor x on a nominal v > 0 the item's range [a, b] gives
    x in [a / v, b / v] (v < 0: [b / v, a / v]; v = 0: any x); an offset
    x in [a - v, b - v]; a value x in [a, b]; a path of several items takes the
    intersection.
    """
    how, items = _item_ranges(scenario, u, default)
    low, low_open, high, high_open = -np.inf, False, np.inf, False

    def tighten(a, a_open, b, b_open):
        nonlocal low, low_open, high, high_open
        if a > low or (a == low and a_open):
            low, low_open = a, a_open
        if b < high or (b == high and b_open):
            high, high_open = b, b_open
    for v, a, a_open, b, b_open in items:
        if how == "factor":
            if v > 0:
                tighten(a / v, a_open, b / v, b_open)
            elif v < 0:
                tighten(b / v, b_open, a / v, a_open)
        elif how == "offset":
            tighten(a - v, a_open, b - v, b_open)
        else:
            tighten(a, a_open, b, b_open)
    return low, low_open, high, high_open


def _outside(x, allowed):
    low, low_open, high, high_open = allowed
    return ((x <= low) if low_open else (x < low)) | ((x >= high) if high_open else (x > high))


def truncate(u: UncertainInput, x: np.ndarray, allowed: tuple, rng, default=False):
    """*x* (draws of *u*) with every draw outside *allowed* (:func:`draw_range`)
    drawn again from the same distribution until it lies inside (truncation);
    returns ``(x, number of draws replaced)``.

    Draws left outside after :data:`_REDRAW_ROUNDS` rounds (a distribution with
    almost none of its mass in the range: only a path given in code, the loader
    refuses such bounds) are clipped to the nearest value inside.
    """
    bad = _outside(x, allowed)
    count = int(bad.sum())
    if not count:
        return x, 0
    x = x.copy()
    for _ in range(_REDRAW_ROUNDS):
        idx = np.flatnonzero(bad)
        if not idx.size:
            break
        x[idx] = draw(u, idx.size, rng, default)
        bad[idx] = _outside(x[idx], allowed)
    if bad.any():
        low, low_open, high, high_open = allowed
        lo = np.nextafter(low, np.inf) if low_open else low
        hi = np.nextafter(high, -np.inf) if high_open else high
        x[bad] = np.clip(x[bad], lo, hi)
    return x, count


def _overrides(scenario, inputs, draws: dict, default: bool) -> dict:
    ov = {}
    for u in inputs:
        how, items = _item_ranges(scenario, u, default)
        paths = _targets(scenario, u, default)[0]
        x = draws[u.path]
        for p, (v, a, a_open, b, b_open) in zip(paths, items):
            if how == "factor":
                val = v * x
            elif how == "offset":
                val = v + x
            else:
                val = x
            # draws are held to the range (truncate); this takes the rounding of
            # v x (b / v) and the sensitivity's bounds of the typical defaults (a
            # factor must not lift an efficiency above 1) to the closed limits
            val = np.clip(val, a if not a_open else -np.inf, b if not b_open else np.inf)
            ov[p] = val
    return ov


def _evaluate(scenario, strategy, ov, n, progress=False):
    from heatload.studies import variants

    duty = np.empty(n)
    temp = np.empty(n)
    bar = None
    if progress and n > CHUNK:
        from tqdm import tqdm
        bar = tqdm(total=n, unit="sample", file=sys.stderr, desc="Monte Carlo")
    try:
        parts = variants.evaluate_chunks(scenario, strategy, ov, n, CHUNK,
                                         done=None if bar is None else bar.update)
        for s, r in zip(range(0, n, CHUNK), parts):
            duty[s:s + CHUNK] = r.cooler_duty
            temp[s:s + CHUNK] = r.oil_temperature_steady
    finally:
        if bar is not None:
            bar.close()
    return duty, temp


def monte_carlo(scenario: Scenario, strategy, samples=10000, seed=1,
                progress=False) -> UncertaintyResult:
    """Monte Carlo of the cooler duty and the steady oil temperature.

    P_k = k-th percentile of the sampled outputs (linear interpolation
    between order statistics, :func:`numpy.percentile`).

    Parameters
    ----------
    scenario : Scenario
    strategy : Strategy or str
    samples : int
        Number of samples (>= 2).
    seed : int
        Seed of ``numpy.random.default_rng``: equal seeds give equal results.
    progress : bool
        A tqdm bar on stderr for runs longer than one chunk.

    Returns
    -------
    UncertaintyResult
        ``cooler_duty`` [W] (design point, with margin), ``oil_temperature``
        [K] (coupled steady, typical ambient, no cooler), ``percentiles``.

    Notes
    -----
    Inputs are sampled independently, each in the order listed, from one
    generator.  The defaults (no ``[[uncertainty]]``) are typical spreads
    (common practice), see :data:`DEFAULT_INPUTS`.  Samples beyond the range
    their field may take are drawn again inside it (truncation, see the module
    notes), counted in ``truncated``; the draws made again come from the same
    generator after every input's first draws.

    References
    ----------
    JCGM 101:2008 (propagation of distributions by a Monte Carlo method).
    """
    if not isinstance(samples, (int, np.integer)) or samples < 2:
        raise HeatloadError(f"need at least 2 samples, got {samples!r}", field="samples")
    inputs, default = inputs_of(scenario)
    rng = np.random.default_rng(seed)
    draws = {u.path: draw(u, int(samples), rng, default) for u in inputs}
    # the tails beyond a field's range, drawn again after every first draw (so a
    # run where nothing is cut draws exactly what it did before)
    truncated = {}
    for u in inputs:
        draws[u.path], truncated[u.path] = truncate(
            u, draws[u.path], draw_range(scenario, u, default), rng, default)
    ov = _overrides(scenario, inputs, draws, default)
    duty, temp = _evaluate(scenario, strategy, ov, int(samples), progress)
    pct = {"cooler_duty_W": _pcts(duty), "oil_temperature_C": _pcts(temp - 273.15)}
    name = strategy if isinstance(strategy, str) else strategy.name
    return UncertaintyResult(strategy=name, cooler_duty=duty, oil_temperature=temp,
                             percentiles=pct, inputs=inputs, samples=draws, seed=seed,
                             defaults_used=default, truncated=truncated)


def _pcts(x):
    p50, p90, p95 = np.percentile(x, [50.0, 90.0, 95.0])
    return {"P50": float(p50), "P90": float(p90), "P95": float(p95)}


def sensitivity(scenario: Scenario, strategy) -> list:
    """One-at-a-time ranking: each input at its low and high bound (normal:
    5th / 95th percentile), every other input nominal; sorted by the swing of
    the cooler duty, then of the oil temperature (largest first: a tornado).

    Returns
    -------
    list of dict
        ``path``, its bounds (``low_factor``/``high_factor`` for factors, else
        ``low_<unit>``/``high_<unit>``, :func:`heatload.units.file_name`),
        ``relative``, ``cooler_duty_low_W, cooler_duty_high_W,
        cooler_duty_swing_W, oil_temperature_low_C, oil_temperature_high_C,
        oil_temperature_swing_K`` per input.
    """
    inputs, default = inputs_of(scenario)
    k = len(inputs)
    nominal_x = {}
    for u in inputs:
        _, _, how = _targets(scenario, u, default)
        nominal_x[u.path] = {"factor": 1.0, "offset": 0.0}.get(how)
    draws = {}
    for i, u in enumerate(inputs):
        lo, hi, _ = _bounds(u, default)
        base = nominal_x[u.path]
        if base is None:   # absolute values: the nominal is the scenario's own
            from heatload.paths import resolve_path
            nom = resolve_path(scenario, u.path).nominal[0]
            base = nom if nom is not None else 0.5 * (lo + hi)
        x = np.full(2 * k, float(base))
        x[2 * i], x[2 * i + 1] = lo, hi
        draws[u.path] = x
    ov = _overrides(scenario, inputs, draws, default)
    duty, temp = _evaluate(scenario, strategy, ov, 2 * k)
    from heatload.paths import resolve_path
    from heatload.units import file_name, file_value

    rows = []
    for i, u in enumerate(inputs):
        d0, d1 = duty[2 * i], duty[2 * i + 1]
        t0, t1 = temp[2 * i], temp[2 * i + 1]
        how = _targets(scenario, u, default)[2]
        kind = {"factor": "dimensionless", "offset": "temperature_difference"}.get(
            how, resolve_path(scenario, u.path).kind)
        low, high = (file_name(b, "dimensionless" if how == "factor" else kind)
                     for b in ("low", "high"))
        rows.append({"path": u.path, low: float(file_value(u.low, kind)),
                     high: float(file_value(u.high, kind)),
                     "relative": u.relative, "cooler_duty_low_W": float(d0),
                     "cooler_duty_high_W": float(d1), "cooler_duty_swing_W": float(abs(d1 - d0)),
                     "oil_temperature_low_C": float(file_value(t0, "temperature")),
                     "oil_temperature_high_C": float(file_value(t1, "temperature")),
                     "oil_temperature_swing_K": float(abs(t1 - t0))})
    rows.sort(key=lambda r: (-r["cooler_duty_swing_W"], -r["oil_temperature_swing_K"]))
    return rows
