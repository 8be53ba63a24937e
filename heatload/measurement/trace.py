"""A pressure trace of a machine turned into a draft duty cycle.

A CSV of time and pump pressure (optionally pump flow and actuator position,
:mod:`heatload.measurement.logs` conventions) of one or more cycles is cut into phases
where a signal steps, each phase classified as the trade names it:

- *extend* / *retract*: the position moves (up / down) — needs a position column;
- *motion*: flow goes out but no position is logged (direction to complete);
- *hold*: pressure held, nothing moves (no flow, no travel);
- *idle*: the pump unloaded (pressure near its lowest level), nothing moves.

Without flow or position a pressure step above the idle level is a phase
whose motion the user completes.  Repeated cycles are recognised by the
repeating sequence of phases; each phase's duration, pressure, flow, travel
and hydraulic power is then the median over the cycles.  Hydraulic power
where flow is logged: P = p Q (P[kW] = p[bar] Q[L/min] / 600), its energy
integrated over the trace by the trapezoidal rule.

The draft is a duty-cycle file in the project's format (:mod:`heatload.io`)
whose every value says in a comment whether it was measured or must be
completed (``"?"`` with ``# TO COMPLETE: ..., e.g.
<value>``); once those are filled, ``heatload check`` accepts it.

Segmentation (our own simple method): each channel is scaled by its range and
lightly smoothed (running median); a new segment starts where one channel
leaves its segment's running level by more than :data:`STEP_TOLERANCE` of
its range (or 4 noise standard deviations, if more) for
:data:`STEP_SAMPLES` samples in a row; segments shorter than *min_duration*
(transitions) are merged into their closest neighbour; neighbours of the same
class and level are joined.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from heatload.errors import HeatloadError

#: A step: a channel moves this fraction of its range away from the segment's level.
STEP_TOLERANCE = 0.08
#: ... for this many samples in a row (one noisy sample is no step).
STEP_SAMPLES = 3
#: Idle: pump pressure within this fraction of the range above its lowest level.
IDLE_FRACTION = 0.12
#: Moving: travel over a segment of at least this fraction of the position range.
TRAVEL_FRACTION = 0.02
#: Flowing: pump flow above this fraction of its highest value.
FLOW_FRACTION = 0.10
#: Fewest rows of a trace.
MIN_ROWS = 20

MOTION_UNKNOWN = "motion"
PRESSURE_UNKNOWN = "pressure"


def trace_columns():
    from heatload.measurement.logs import ColumnSpec
    return {"time": ColumnSpec(("time",), "time", True, "s"),
            "pressure": ColumnSpec(("pressure",), "pressure", True, "bar"),
            "flow": ColumnSpec(("flow",), "flow", False, "L/min"),
            "position": ColumnSpec(("position", "stroke", "travel"), "distance", False, "mm")}


#: Plausible range of each trace column (SI): a gauge pressure between full
#: vacuum (-1.013 bar) and the loader's 2000 bar; flows and travel within the
#: loader's limits (6000 L/min, 1000 m).  A value outside is a unit slip or a
#: broken sensor, not a machine.
TRACE_LIMITS = {"pressure": (-1.01325e5, 2000e5, "-1.013 .. 2000 bar", 1e5, "bar"),
                "flow": (-0.1, 0.1, "-6000 .. 6000 L/min", 1.0 / 60000.0, "L/min"),
                "position": (-1000.0, 1000.0, "-1000 .. 1000 m", 1.0, "m")}


def check_trace(log) -> None:
    """Refuse a trace value no machine gives, naming the file, line and column."""
    from heatload.measurement.logs import _err

    for key, (low, high, shown, per_unit, unit) in TRACE_LIMITS.items():
        v = log.values.get(key)
        if v is None:
            continue
        bad = np.flatnonzero((v < low) | (v > high))
        if bad.size:
            i = int(bad[0])
            raise _err(f"{v[i] / per_unit:.4g} {unit} is outside the plausible {shown}; check the "
                       f"unit of the column", log.source, int(log.lines[i]),
                       log.headers.get(key, key))


@dataclass
class TracePhase:
    """One phase found in the trace (SI; medians over the cycles)."""

    kind: str                    #: extend | retract | hold | idle | motion | pressure
    duration: float              #: [s]
    pressure: float              #: median pump pressure [Pa]
    peak_pressure: float         #: [Pa]
    flow: float | None = None    #: median pump flow [m^3/s]
    travel: float | None = None  #: position change, signed [m]
    energy: float | None = None  #: hydraulic energy p Q dt [J]
    start: float = 0.0           #: start in the first cycle found [s]
    speed: float | None = None   #: steady actuator speed (a line through the position) [m/s]

    @property
    def power(self):
        return None if self.energy is None or self.duration <= 0 else self.energy / self.duration


@dataclass
class TraceCycle:
    """The segmented trace."""

    phases: list                 #: TracePhase of one cycle
    cycles: int                  #: cycles recognised in the trace
    period: float                #: cycle time [s]
    segments: list               #: every segment of the trace (start, end, kind) [s]
    has_flow: bool
    has_position: bool
    position_range: float | None  #: travel range seen [m]
    peak_pressure: float         #: highest pressure of the trace [Pa]
    peak_flow: float | None      #: highest flow [m^3/s]
    energy_per_cycle: float | None  #: [J]
    notes: list = field(default_factory=list)

    @property
    def mean_power(self):
        return None if self.energy_per_cycle is None else self.energy_per_cycle / self.period


#: What the phase figures are, for the reader of the table and the draft.
LEVELS = ("A phase's pressure and flow are its steady level (the median of its samples: "
          "the spikes at the valve switches do not count); its hydraulic power is the mean "
          "of p x Q over the phase (its energy / duration, so that the phases add up to the "
          "energy per cycle); each figure is the median over the cycles.")


def _running_median(x, width):
    if width <= 1 or x.size < width:
        return x.copy()
    pad = width // 2
    xp = np.pad(x, pad, mode="edge")
    windows = np.lib.stride_tricks.sliding_window_view(xp, width)
    return np.median(windows, axis=-1)


def _noise(x):
    """Noise standard deviation from the median absolute successive difference."""
    d = np.abs(np.diff(x))
    return float(np.median(d)) / (0.6745 * math.sqrt(2.0)) if d.size else 0.0


def _robust_range(x):
    lo, hi = np.percentile(x, [1, 99])
    return float(hi - lo)


def _cut(channels, tolerances, run):
    """Start indices of the segments: greedy, a step where a channel leaves the
    segment's running mean by more than its tolerance for *run* samples."""
    n = channels.shape[1]
    starts = [0]
    s = 0
    total = channels[:, 0].copy()
    count = 1
    out_run = 0
    i = 1
    while i < n:
        level = total / count
        dev = np.max(np.abs(channels[:, i] - level) / tolerances)
        if dev > 1.0:
            out_run += 1
            if out_run >= run:
                s = i - run + 1
                starts.append(s)
                total = channels[:, s:i + 1].sum(axis=1)
                count = i + 1 - s
                out_run = 0
        else:
            out_run = 0
            total += channels[:, i]
            count += 1
        i += 1
    return starts


def segment_trace(time, pressure, flow=None, position=None, min_duration=None) -> TraceCycle:
    """:func:`_segment` with the shortest phase doubled until the cycle holds no
    more phases than a duty-cycle file may (:data:`heatload.io.MAX_PHASES`), so
    the draft it gives loads once completed; a note says so where it merged."""
    from heatload.io.read import MAX_PHASES
    cycle = _segment(time, pressure, flow, position, min_duration)
    first, d = len(cycle.phases), min_duration
    while len(cycle.phases) > MAX_PHASES:
        dt = float(np.median(np.diff(np.asarray(time, float))))
        d = 2.0 * (d if d is not None else max(5.0 * dt, 0.2))
        cycle = _segment(time, pressure, flow, position, d)
    if d != min_duration:
        cycle.notes.append(f"the trace gave {first} phases, more than a duty cycle holds "
                           f"({MAX_PHASES}): steps shorter than {d:.3g} s are merged into "
                           f"their neighbours (--min-phase sets it)")
    return cycle


def _segment(time, pressure, flow=None, position=None, min_duration=None) -> TraceCycle:
    """Cut a pressure trace into phases and recognise its repeated cycle.

    Parameters
    ----------
    time : array_like
        Increasing sample times [s].
    pressure : array_like
        Pump pressure, gauge [Pa].
    flow : array_like, optional
        Pump flow [m^3/s].
    position : array_like, optional
        Actuator position [m] (increasing = extending).
    min_duration : float, optional
        Shortest phase [s]; shorter segments are transitions merged into a
        neighbour.  Default: 5 sample intervals, at least 0.2 s.

    Returns
    -------
    TraceCycle

    Notes
    -----
    One actuator at a time: simultaneous motions show as one phase.  A ramp
    (a pressure that climbs through a phase) is cut into steps of about
    :data:`STEP_TOLERANCE` of the range.

    References
    ----------
    Hydraulic power P = p Q (P[kW] = p[bar] Q[L/min] / 600, common practice);
    trapezoidal rule for its energy.
    """
    t = np.asarray(time, float)
    p = np.asarray(pressure, float)
    n = t.size
    if n < MIN_ROWS:
        raise HeatloadError(f"{n} samples; a trace needs at least {MIN_ROWS}", field="time")
    if not np.all(np.diff(t) > 0):
        raise HeatloadError("times must increase", field="time")
    dt = float(np.median(np.diff(t)))
    if min_duration is None:
        min_duration = max(5.0 * dt, 0.2)
    width = 5 if n >= 50 else 1
    chans, tols, names = [], [], []
    p_s = _running_median(p, width)
    p_range = max(_robust_range(p_s), 1e4)          # at least 0.1 bar
    chans.append(p_s / p_range)
    tols.append(max(STEP_TOLERANCE, 4.0 * _noise(p) / p_range))
    q = x = None
    if flow is not None:
        q = np.asarray(flow, float)
        q_s = _running_median(q, width)
        q_range = max(_robust_range(q_s), 1e-7)
        chans.append(q_s / q_range)
        tols.append(max(STEP_TOLERANCE, 4.0 * _noise(q) / q_range))
    if position is not None:
        x = np.asarray(position, float)
        x_s = _running_median(x, width)
        v = np.gradient(x_s, t)
        v_s = _running_median(v, max(width, 5) if n >= 50 else 1)
        v_range = max(float(np.percentile(np.abs(v_s), 99)), 1e-6)
        chans.append(v_s / v_range)
        tols.append(max(2 * STEP_TOLERANCE, 4.0 * _noise(v_s) / v_range))
    channels = np.vstack(chans)
    starts = _cut(channels, np.asarray(tols), STEP_SAMPLES)
    bounds = list(zip(starts, starts[1:] + [n - 1]))

    p_low = float(np.percentile(p_s, 2))
    idle_level = p_low + IDLE_FRACTION * p_range
    q_peak = float(np.percentile(q, 99.5)) if q is not None else None
    x_range = _robust_range(x) if x is not None else None

    def inner(a, b):
        """The segment without its transitions (a tenth at each end, >= 2 samples)."""
        if b - a < 6:
            return slice(a, b + 1)
        cut = max(2, (b - a) // 10)
        return slice(a + cut, b - cut + 1)

    def describe(a, b):
        seg = slice(a, b + 1)
        pm = float(np.median(p[seg]))
        travel = None
        if x is not None:
            part = inner(a, b)
            slope = _slope(t, x, part)
            travel = math.copysign(slope * float(t[b] - t[a]),
                                   float(x_s[part][-1] - x_s[part][0]))
        qm = float(np.median(q[seg])) if q is not None else None
        moving = (travel is not None and x_range > 0
                  and abs(travel) > TRAVEL_FRACTION * x_range)
        flowing = qm is not None and q_peak > 0 and qm > FLOW_FRACTION * q_peak
        if moving:
            kind = "extend" if travel > 0 else "retract"
        elif pm <= idle_level:
            kind = "idle"
        elif x is not None or q is not None:
            kind = MOTION_UNKNOWN if (flowing and x is None) else "hold"
        else:
            kind = PRESSURE_UNKNOWN
        return kind, pm, travel

    segs = [[a, b, *describe(a, b)] for a, b in bounds]
    # transitions: merge segments shorter than min_duration into the neighbour
    # whose pressure is closest
    changed = True
    while changed and len(segs) > 1:
        changed = False
        for i, sg in enumerate(segs):
            if t[sg[1]] - t[sg[0]] >= min_duration:
                continue
            cands = [j for j in (i - 1, i + 1) if 0 <= j < len(segs)]
            j = min(cands, key=lambda j: abs(segs[j][3] - sg[3]))
            a, b = min(sg[0], segs[j][0]), max(sg[1], segs[j][1])
            segs[min(i, j)] = [a, b, *describe(a, b)]
            del segs[max(i, j)]
            changed = True
            break
    # neighbours of the same kind and level are one phase
    merged = [segs[0]]
    for sg in segs[1:]:
        last = merged[-1]
        if (sg[2] == last[2] and sg[2] in ("idle", "hold", PRESSURE_UNKNOWN)
                and abs(sg[3] - last[3]) < STEP_TOLERANCE * p_range):
            merged[-1] = [last[0], sg[1], *describe(last[0], sg[1])]
        else:
            merged.append(sg)
    segs = merged

    def phase_of(a, b, kind, pm, travel):
        seg = slice(a, b + 1)
        energy = (float(np.trapezoid(p[seg] * q[seg], t[seg])) if q is not None else None)
        part = inner(a, b)
        return TracePhase(kind=kind, duration=float(t[b] - t[a]), pressure=pm,
                          peak_pressure=float(np.max(p_s[part])),
                          flow=float(np.median(q[seg])) if q is not None else None,
                          travel=travel, energy=energy, start=float(t[a]),
                          speed=_slope(t, x, part) if x is not None else None)

    found = [phase_of(*sg) for sg in segs]
    sig = [(f.kind, round(f.pressure / (2 * STEP_TOLERANCE * p_range))) for f in found]
    k = _period(sig)
    notes = []
    if k is None:
        phases, cycles = found, 1
        notes.append("no repeating cycle recognised: the whole trace is taken as one cycle")
    else:
        cycles = len(found) // k
        # the first and last cycles may be cut by the trace's ends: the
        # median over the repeats ignores one odd one
        phases = []
        for j in range(k):
            reps = found[j::k]
            kinds = [r.kind for r in reps]
            phases.append(TracePhase(
                kind=max(set(kinds), key=kinds.count),
                duration=float(np.median([r.duration for r in reps])),
                pressure=float(np.median([r.pressure for r in reps])),
                peak_pressure=float(np.max([r.peak_pressure for r in reps])),
                flow=None if q is None else float(np.median([r.flow for r in reps])),
                travel=None if x is None else float(np.median([r.travel for r in reps])),
                energy=None if q is None else float(np.median([r.energy for r in reps])),
                start=reps[0].start,
                speed=None if x is None else float(np.median([r.speed for r in reps]))))
        # a cycle reads best from its first motion after the idle
        if any(ph.kind == "idle" for ph in phases) and phases[-1].kind != "idle":
            last_idle = max(i for i, ph in enumerate(phases) if ph.kind == "idle")
            phases = phases[last_idle + 1:] + phases[:last_idle + 1]
    period = float(sum(ph.duration for ph in phases))
    energy = (float(sum(ph.energy for ph in phases)) if q is not None else None)
    if x is None and q is None:
        notes.append("no flow or position column: the motion of each pressure step must be "
                     "completed by hand")
    elif x is None:
        notes.append("no position column: extend or retract of each flowing phase must be "
                     "completed by hand")
    return TraceCycle(phases=phases, cycles=cycles, period=period,
                      segments=[(float(t[a]), float(t[b]), kd) for a, b, kd, _, _ in segs],
                      has_flow=q is not None, has_position=x is not None,
                      position_range=x_range, peak_pressure=float(np.max(p)),
                      peak_flow=None if q is None else float(np.max(q)),
                      energy_per_cycle=energy, notes=notes)


def _slope(t, x, part):
    """|dx/dt| by a least-squares line through the samples of *part*: the
    steady speed of a phase, without its transitions and robust to noise."""
    tt, xx = t[part], x[part]
    tc = tt - tt.mean()
    den = float(np.dot(tc, tc))
    return float(abs(np.dot(tc, xx - xx.mean()) / den)) if den > 0 else 0.0


def _period(signatures):
    """Smallest number of phases after which the sequence repeats (at least
    two repeats, 80 % of the positions agreeing), or None."""
    n = len(signatures)
    for k in range(1, n // 2 + 1):
        pairs = n - k
        same = sum(signatures[i] == signatures[i + k] for i in range(pairs))
        if same >= 0.8 * pairs and n // k >= 2:
            return k
    return None


# ---------------------------------------------------------------------------
# the draft duty-cycle file
# ---------------------------------------------------------------------------

def _fmt(value, kind, digits=3):
    from heatload.units import format_quantity
    return format_quantity(value, kind, "si", digits)


#: Width of the draft's lines (the classic terminal's 80 columns, common practice).
DRAFT_WIDTH = 80


def _file_name(path):
    import pathlib
    return pathlib.PurePath(path).name or path


def _comment(text):
    """*text* as comment lines of at most :data:`DRAFT_WIDTH` characters."""
    import textwrap
    return "\n".join("# " + part for part in textwrap.wrap(
        text, DRAFT_WIDTH - 2, break_on_hyphens=False, break_long_words=False))


def _todo(key, what, example, width=34):
    """``key = "?"  # TO COMPLETE: what, e.g. "example"``; where that is wider than
    the draft's lines, *what* goes on comment lines above it."""
    left = f'{key} = "?"'
    line = f'{left.ljust(width)}# TO COMPLETE: {what}, e.g. "{example}"'
    if len(line) <= DRAFT_WIDTH:
        return line
    return f'{_comment(what)}\n{left.ljust(width)}# TO COMPLETE: e.g. "{example}"'


def _measured(key, value_text, note, width=34):
    left = f'{key} = "{value_text}"'
    line = f"{left.ljust(width)}# {note}"
    return line if len(line) <= DRAFT_WIDTH else f"{_comment(note)}\n{left}"


#: Example cylinder offered in the draft (bore, rod) [m]: completes the file
#: until the real one is entered.
EXAMPLE_BORE, EXAMPLE_ROD = 0.1, 0.07
#: Share of the pump pressure taken as the load's pressure in the example
#: loads (the rest lost in valves and lines) [-], an assumption of ours.
EXAMPLE_LOAD_SHARE = 0.8


def draft_toml(cycle: TraceCycle, source: str, name: str | None = None) -> str:
    """The segmented trace as a draft duty-cycle file (TOML text).

    Measured values are written as values with ``# measured``; values the trace cannot give are ``"?"`` with
    ``# TO COMPLETE: <what>, e.g. "<example>"`` — the examples (a
    100/70 mm cylinder, loads from the measured pressures on it) make a file
    that loads, not a design."""
    import json

    from heatload.errors import printable

    src = printable(str(source)).replace("\n", " ")
    a_cap = math.pi / 4 * EXAMPLE_BORE ** 2
    a_ann = a_cap - math.pi / 4 * EXAMPLE_ROD ** 2
    L = ["# Draft duty cycle from a pressure trace (heatload trace); complete it, then",
         "# run `heatload check` on it.",
         _comment(f"Trace: {src}; {cycle.cycles} cycle{'s' if cycle.cycles != 1 else ''} "
                  f"recognised, cycle time {cycle.period:.3g} s."),
         "# '# measured' = read from the trace (median over the cycles); '# TO COMPLETE' =",
         "# replace \"?\" with the machine's value",
         "# (the example after 'e.g.' only makes the file load: it is not a design value).",
         _comment(LEVELS)]
    if cycle.energy_per_cycle is not None:
        L.append(_comment(f"Hydraulic power from the trace (p x Q): "
                          f"{_fmt(cycle.energy_per_cycle, 'energy')} per cycle, mean "
                          f"{_fmt(cycle.mean_power, 'power')}, phases below."))
    for n in cycle.notes:
        L.append(_comment(f"Note: {n}"))
    # JSON strings are TOML basic strings (the same escapes)
    L += ["", "[scenario]", f"name = {json.dumps(name or 'Draft from a pressure trace')}",
          # the file's name only: the whole path is in the comment above (a string
          # cannot wrap to the draft's width)
          "description = " + json.dumps(f"Duty cycle drafted from {_file_name(src)}",
                                        ensure_ascii=False),
          ""]
    L.append("[power_unit.pump]")
    if cycle.peak_flow is not None:
        L.append(_todo("displacement", f"pump displacement (the trace's highest flow "
                                       f"{_fmt(cycle.peak_flow, 'flow')} = D x speed x "
                                       f"volumetric efficiency)", "40 cm^3/rev"))
    else:
        L.append(_todo("displacement", "pump displacement", "40 cm^3/rev"))
    L.append(_todo("shaft_speed", "pump shaft speed", "1450 rpm"))
    L += ["", "[power_unit.relief]"]
    relief = math.ceil(cycle.peak_pressure * 1.1 / 5e5) * 5e5
    L.append(_todo("cracking_pressure", f"relief setting (the trace peaks at "
                                        f"{_fmt(cycle.peak_pressure, 'pressure')})",
                   _fmt(relief, "pressure")))
    L += ["", "[[actuators]]", "# the actuator the phases drive; rename as you like",
          'name = "main"', 'kind = "cylinder"']
    L.append(_todo("bore", "cylinder bore", "100 mm"))
    L.append(_todo("rod", "rod diameter", "70 mm"))
    # the draft's phases move the cylinder at their steady speed for their whole
    # duration: the stroke holds that span as well as the trace's own travel
    pos = lo = hi = 0.0
    for ph in cycle.phases:
        if ph.kind in ("extend", "retract"):
            pos += max(ph.speed, 1e-4) * ph.duration * (1 if ph.kind == "extend" else -1)
            lo, hi = min(lo, pos), max(hi, pos)
    span = max(hi - lo, cycle.position_range or 0.0)
    if cycle.position_range:
        stroke = math.ceil(span * 1.05 / 0.01) * 0.01
        L.append(_todo("stroke", f"cylinder stroke (the trace travels "
                                 f"{_fmt(cycle.position_range, 'length')})",
                       _fmt(stroke, "length")))
    else:
        L.append(_todo("stroke", "cylinder stroke",
                       _fmt(max(0.5, math.ceil(span * 1.05 / 0.01) * 0.01), "length")))
    for i, ph in enumerate(cycle.phases, 1):
        L += ["", "[[phases]]"]
        label = ph.kind if ph.kind not in (MOTION_UNKNOWN, PRESSURE_UNKNOWN) else "step"
        L.append(f'name = "{i} {label} at {_fmt(ph.pressure, "pressure", 3)}"')
        measured = [f"pump pressure {_fmt(ph.pressure, 'pressure')} (peak "
                    f"{_fmt(ph.peak_pressure, 'pressure')})"]
        if ph.flow is not None:
            measured.append(f"flow {_fmt(ph.flow, 'flow')}")
        if ph.energy is not None:
            measured.append(f"hydraulic power {_fmt(ph.power, 'power')}")
        L.append(_comment("measured: " + ", ".join(measured)))
        if ph.kind == "idle":
            L.append(_measured("motion", "idle", "measured: pump near its lowest pressure, "
                               "nothing moves"))
            L.append(_measured("duration", _fmt(ph.duration, "time"), "measured"))
            continue
        L.append('actuator = "main"')
        if ph.kind in ("extend", "retract"):
            L.append(_measured("motion", ph.kind, "measured: the position "
                               + ("rises" if ph.kind == "extend" else "falls")))
            area = a_cap if ph.kind == "extend" else a_ann
            L.append(_todo("load", f"load on the actuator (the pump delivers "
                                   f"{_fmt(ph.pressure, 'pressure')}; the load's share "
                                   f"depends on the circuit's losses)",
                           _fmt(EXAMPLE_LOAD_SHARE * ph.pressure * area, "force")))
            L.append(_measured("speed", _fmt(max(ph.speed, 1e-4), "velocity"),
                               f"measured (steady speed; travel "
                               f"{_fmt(abs(ph.travel), 'length')})"))
            L.append(_measured("duration", _fmt(ph.duration, "time"), "measured"))
        elif ph.kind == "hold":
            L.append('motion = "hold"                   # measured: pressure held, '
                     'nothing moves')
            L.append(_measured("duration", _fmt(ph.duration, "time"), "measured"))
            L.append(_measured("hold_pressure", _fmt(ph.pressure, "pressure"),
                               "measured pump pressure (the cylinder's may be lower)"))
        else:
            L.append(_todo("motion", "extend or retract (the trace has no position"
                                     + (" or flow" if ph.kind == PRESSURE_UNKNOWN else "")
                                     + " for it)", "extend"))
            L.append(_todo("load", f"load on the actuator (the pump delivers "
                                   f"{_fmt(ph.pressure, 'pressure')})",
                           _fmt(EXAMPLE_LOAD_SHARE * ph.pressure * a_cap, "force")))
            L.append(_measured("duration", _fmt(ph.duration, "time"), "measured"))
    L += ["", _comment("Complete the fluid, reservoir, ambient and cooler sections as in "
                       "duty_cycles/forming_press.toml; until then heatload's documented "
                       "defaults apply (heatload.io.SCHEMA_EXAMPLE)."), ""]
    return "\n".join(L)


def fill_examples(text: str) -> str:
    """The draft with every ``"?"`` replaced by its ``e.g.`` example (what a
    user does by hand with real values; used to check that a draft loads)."""
    import re
    out = []
    for line in text.split("\n"):
        mt = re.search(r'# TO COMPLETE: .*e\.g\. "([^"]+)"\s*$', line)
        if mt and '"?"' in line:
            line = line.replace('"?"', f'"{mt.group(1)}"', 1)
        out.append(line)
    return "\n".join(out)


def cycle_record(cycle: TraceCycle) -> dict:
    """The segmented trace as plain data, SI with unit-suffixed keys."""
    def f(v):
        return None if v is None or not math.isfinite(v) else float(v)
    return {"cycles": cycle.cycles, "cycle_time_s": f(cycle.period),
            "peak_pressure_Pa": f(cycle.peak_pressure), "peak_flow_m3_s": f(cycle.peak_flow),
            "energy_per_cycle_J": f(cycle.energy_per_cycle), "mean_power_W": f(cycle.mean_power),
            "phases": [{"kind": ph.kind, "duration_s": f(ph.duration),
                        "pressure_Pa": f(ph.pressure), "peak_pressure_Pa": f(ph.peak_pressure),
                        "flow_m3_s": f(ph.flow), "travel_m": f(ph.travel),
                        "speed_m_s": f(ph.speed), "energy_J": f(ph.energy),
                        "power_W": f(ph.power)} for ph in cycle.phases],
            "notes": list(cycle.notes)}
