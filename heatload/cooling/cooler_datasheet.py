"""Air-oil coolers from their makers' datasheet curves, and the choice among
several.

A datasheet gives a cooler's *specific cooling power* S [W/K] — the heat it
takes per kelvin of entering temperature difference (ETD = T_oil,in -
T_air,in) — against the oil flow through it, often with the oil-side pressure
drop against flow at a stated viscosity and the fan's power.  In the
duty-cycle file (``[[coolers]]``, any number)::

    [[coolers]]
    name = "AO-2 (invented)"
    specific_power = [["10 L/min", "0.020 kW/K"], ["20 L/min", "0.030 kW/K"],
                      ["40 L/min", "0.040 kW/K"], ["60 L/min", "0.045 kW/K"]]
    pressure_drop = [["10 L/min", "0.05 bar"], ["40 L/min", "0.5 bar"]]   # optional
    pressure_drop_viscosity = "30 mm^2/s"   # the viscosity of the drop curve
    fan_power = "90 W"                      # optional

Rating (:func:`rate_coolers`), on the hottest day (``ambient.temperature_max``):

- the oil flow through a return-line cooler is the return flow of every phase,
  Q_ret = Q_pump - Q_1 + Q_2 (what the pump delivers less what enters the
  actuator plus what leaves it: a differential cylinder retracting returns
  its cap-side flow, up to the area ratio times the pump flow);
- the cooler's effective S is the time average over the cycle of S(Q_ret,i),
  linear interpolation in the curve, 0 at no flow, held at the curve's last
  value beyond it (never extrapolated upwards);
- the machine settles where the heat into the oil equals what the surfaces
  and the cooler shed, Q(T) = (UA(T) + S) (T - T_a,max), with the oil's
  viscosity coupled (:func:`heatload.evaluation.coupled_temperature`);
- a cooler holds the limit when it settles at or below the design oil
  temperature, and holds it *with margin* when S (T_design - T_a,max) covers
  the sized duty with its margin (:func:`heatload.cooling.cooler.required_cooler_duty`);
  the smallest cooler (least S at the machine's flow) holding it with margin
  is chosen;
- a shift from a cold start on the hottest day with the cooler switched by its
  thermostat (``cooler.thermostat_on``, default the design temperature) uses
  the curve's S as the cooler's conductance
  (:func:`heatload.heat.thermal.thermostat_cooler_run`): its highest temperature
  and the fan's share of the time;
- the oil-side drop at the peak return flow, corrected from the datasheet's
  viscosity to the oil's at the settled temperature, is checked against
  ``cooler.oil_pressure_drop_max``; above it a bypass (a check valve across
  the cooler cracking at the allowed drop) is needed.

Viscosity correction of the drop: at fixed flow a laminar drop grows as nu
(Hagen-Poiseuille), a smooth-turbulent one as nu^0.25 (Blasius); a cooler's
oil side lies between.  The bound that gives the larger drop is taken: nu^1
when the oil is thicker than stated, nu^0.25 when thinner.  Beyond the curve's
highest flow the drop follows the power law through its last two points.

References
----------
Specific cooling power in W/K of ETD: common practice of air-oil cooler
datasheets.  White, Fluid Mechanics, 7th ed., Sec. 6.4 and 6.7 (laminar
friction factor 64/Re, Blasius 0.316 Re^-1/4).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from heatload.errors import HeatloadError

#: Exponent of the drop on viscosity: laminar (Hagen-Poiseuille) and smooth
#: turbulent (Blasius); the larger-drop bound is used (module notes).
LAMINAR_EXPONENT, TURBULENT_EXPONENT = 1.0, 0.25


@dataclass(frozen=True)
class DatasheetCooler:
    """An air-oil cooler given by its datasheet curves (SI)."""

    name: str
    specific_power: tuple                #: ((oil flow [m^3/s], S [W/K]), ...) increasing flow
    pressure_drop: tuple = ()            #: ((oil flow [m^3/s], drop [Pa]), ...)
    pressure_drop_viscosity: float | None = None  #: kinematic viscosity of the drop curve [m^2/s]
    fan_power: float | None = None       #: [W]


# ---------------------------------------------------------------------------
# the file format (called by heatload.io.read and heatload.io.write)
# ---------------------------------------------------------------------------

def _pairs(raw, path, source, kind_y, what):
    from heatload.io import schema

    if not isinstance(raw, list) or len(raw) < 2:
        raise schema._err(f"expected at least two [oil flow, {what}] pairs such as "
                      f"[[\"20 L/min\", ...], [\"40 L/min\", ...]]", path, source)
    out = []
    for i, pair in enumerate(raw):
        p = f"{path}[{i}]"
        if not isinstance(pair, list) or len(pair) != 2:
            raise schema._err(f"expected an [oil flow, {what}] pair, got {pair!r}", p, source)
        q = schema._value(pair[0], schema._F("flow", "pos"), p, source)
        y = schema._value(pair[1], schema._F(kind_y, "pos"), p, source)
        out.append((q, y))
    flows = [q for q, _ in out]
    if any(b <= a for a, b in zip(flows, flows[1:])):
        raise schema._err("the oil flows of the curve must increase", path, source)
    return tuple(out)


_KEYS = ("name", "specific_power", "pressure_drop", "pressure_drop_viscosity", "fan_power")


def coolers_from_toml(items, source) -> tuple:
    """``[[coolers]]`` items of a parsed duty-cycle file -> DatasheetCooler tuple."""
    from heatload.io import schema

    items = schema._array(items, "coolers", source)
    out, names = [], set()
    for i, item in enumerate(items):
        path = f"coolers[{i}]"
        spec = {"name": schema._F("str", "nonempty", required=True),
                "specific_power": schema._F("table", required=True),
                "pressure_drop": schema._F("table"),
                "pressure_drop_viscosity": schema._F("kinematic_viscosity", "pos"),
                "fan_power": schema._F("power", "nonneg")}
        schema._table(item, spec, path, source)
        name = schema._value(item["name"], spec["name"], f"{path}.name", source)
        if name in names:
            raise schema._err(f"two coolers are called {name!r}", f"{path}.name", source)
        names.add(name)
        sp = _pairs(item["specific_power"], f"{path}.specific_power", source,
                    "thermal_conductance", "specific cooling power")
        dp = (_pairs(item["pressure_drop"], f"{path}.pressure_drop", source, "pressure",
                     "pressure drop") if "pressure_drop" in item else ())
        nu = (schema._value(item["pressure_drop_viscosity"], spec["pressure_drop_viscosity"],
                        f"{path}.pressure_drop_viscosity", source)
              if "pressure_drop_viscosity" in item else None)
        if dp and nu is None:
            raise schema._err("give the viscosity the pressure-drop curve was measured at, "
                          "e.g. \"30 mm^2/s\"", f"{path}.pressure_drop_viscosity", source)
        fan = (schema._value(item["fan_power"], spec["fan_power"], f"{path}.fan_power", source)
               if "fan_power" in item else None)
        out.append(DatasheetCooler(name=name, specific_power=sp, pressure_drop=dp,
                                   pressure_drop_viscosity=nu, fan_power=fan))
    return tuple(out)


def coolers_to_toml(coolers) -> list:
    """DatasheetCooler items -> ``[[coolers]]`` tables (lossless on reload)."""
    from heatload.io import write

    out = []
    for c in coolers:
        item = {"name": c.name,
                "specific_power": [[write._format(q, "flow"), write._format(s, "thermal_conductance")]
                                   for q, s in c.specific_power]}
        if c.pressure_drop:
            item["pressure_drop"] = [[write._format(q, "flow"), write._format(d, "pressure")]
                                     for q, d in c.pressure_drop]
        if c.pressure_drop_viscosity is not None:
            item["pressure_drop_viscosity"] = write._format(c.pressure_drop_viscosity,
                                                         "kinematic_viscosity")
        if c.fan_power is not None:
            item["fan_power"] = write._format(c.fan_power, "power")
        out.append(item)
    return out


# ---------------------------------------------------------------------------
# the curves
# ---------------------------------------------------------------------------

def specific_cooling_power(curve, oil_flow):
    """Specific cooling power S [W/K] at *oil_flow* from a datasheet curve.

    S(Q) = linear interpolation in ((0, 0), (Q_1, S_1), ..., (Q_n, S_n)),
    S_n beyond Q_n.

    Parameters
    ----------
    curve : sequence of (float, float)
        (oil flow [m^3/s], S [W/K]) points, increasing flow.
    oil_flow : array_like
        [m^3/s], >= 0.

    Returns
    -------
    ndarray
        S [W/K].

    Notes
    -----
    No extrapolation above the curve: a cooler's S flattens with flow as
    the air side starts to rule (common practice), so holding the last value
    errs low.

    Examples
    --------
    Half-way between 20 L/min (30 W/K) and 40 L/min (40 W/K):

    >>> curve = ((20 / 60000, 30.0), (40 / 60000, 40.0))
    >>> float(specific_cooling_power(curve, 30 / 60000))
    35.0
    """
    q = np.asarray([p[0] for p in curve], float)
    s = np.asarray([p[1] for p in curve], float)
    if q[0] > 0.0:
        q, s = np.concatenate(([0.0], q)), np.concatenate(([0.0], s))
    return np.interp(np.asarray(oil_flow, float), q, s)


def cycle_specific_cooling_power(curve, flows, durations) -> float:
    """Time average over the cycle of S at each phase's oil flow [W/K].

    S_cycle = sum S(Q_i) t_i / sum t_i  (the ETD barely moves within a cycle,
    the tank's time constant being hours)."""
    t = np.asarray(durations, float)
    return float(np.sum(specific_cooling_power(curve, flows) * t) / np.sum(t))


def oil_pressure_drop(cooler: DatasheetCooler, oil_flow, viscosity):
    """Oil-side pressure drop [Pa] at *oil_flow* [m^3/s] and kinematic
    *viscosity* [m^2/s] from the datasheet's drop curve (module notes).

    dp = dp_curve(Q) (nu / nu_curve)^n, n = 1 (nu > nu_curve) or 0.25;
    dp_curve: linear interpolation, 0 at no flow, beyond the last point the
    power law through the last two points.

    Returns
    -------
    ndarray or None
        None when the datasheet gives no drop curve.

    Examples
    --------
    Twice the viscosity of the datasheet at a point of the curve doubles the
    drop (laminar bound):

    >>> c = DatasheetCooler("x", ((1e-4, 20.0), (5e-4, 40.0)),
    ...                     ((1e-4, 1e4), (5e-4, 6e4)), 30e-6)
    >>> float(oil_pressure_drop(c, 5e-4, 60e-6))
    120000.0
    """
    if not cooler.pressure_drop:
        return None
    q = np.asarray([p[0] for p in cooler.pressure_drop], float)
    d = np.asarray([p[1] for p in cooler.pressure_drop], float)
    flow = np.asarray(oil_flow, float)
    exponent = math.log(d[-1] / d[-2]) / math.log(q[-1] / q[-2])
    beyond = d[-1] * (np.maximum(flow, q[-1]) / q[-1]) ** exponent
    qa, da = (np.concatenate(([0.0], q)), np.concatenate(([0.0], d))) if q[0] > 0 else (q, d)
    dp = np.where(flow > q[-1], beyond, np.interp(flow, qa, da))
    ratio = np.asarray(viscosity, float) / cooler.pressure_drop_viscosity
    n = np.where(ratio > 1.0, LAMINAR_EXPONENT, TURBULENT_EXPONENT)
    return dp * ratio ** n


def return_flow(circuit):
    """Oil flow back to the tank in every phase [m^3/s] (through a return-line
    cooler): Q_ret = Q_pump - Q_1 + Q_2 (volume balance of the circuit)."""
    return circuit.pump_flow - circuit.actuator_flow + circuit.outlet_flow


# ---------------------------------------------------------------------------
# rating a list on the hottest day
# ---------------------------------------------------------------------------

@dataclass
class CoolerRating:
    """One datasheet cooler on the machine's hottest day (SI)."""

    name: str
    specific_power: float            #: S over the cycle at the machine's flows [W/K]
    settled_temperature: float       #: oil temperature with this cooler running [K]
    holds_limit: bool                #: settles at or below the design oil temperature
    duty_at_design: float            #: S (T_design - T_a,max) [W]
    holds_with_margin: bool          #: duty_at_design covers the sized duty with margin
    peak_return_flow: float          #: [m^3/s]
    peak_pressure_drop: float | None  #: at the peak flow and the settled oil's viscosity [Pa]
    bypass_needed: bool | None       #: drop above the allowed; None when unknown
    fan_power: float | None
    shift_max_temperature: float | None = None  #: thermostat shift on the hottest day [K]
    shift_on_fraction: float | None = None      #: share of that shift with the fan on [-]
    shift_switch_count: int | None = None       #: fan switch-ons over the shift
    notes: list = field(default_factory=list)


@dataclass
class DatasheetSelection:
    """All datasheet coolers of a scenario rated for one strategy."""

    strategy: str
    design_oil_temperature: float    #: [K]
    design_ambient: float            #: [K]
    required_duty: float             #: with margin [W]
    allowed_pressure_drop: float     #: [Pa]
    mean_return_flow: float          #: [m^3/s]
    peak_return_flow: float          #: [m^3/s]
    settled_without_cooler: float    #: [K]
    ratings: list                    #: CoolerRating, in the file's order
    chosen: str | None               #: the smallest holding the limit with margin
    notes: list = field(default_factory=list)


def rate_coolers(scenario, outcome, coolers=None) -> DatasheetSelection:
    """Rate every datasheet cooler of *scenario* (or *coolers*) for the strategy
    of *outcome* on the hottest day, and choose the smallest that holds the
    design temperature with the margin (module notes).

    Parameters
    ----------
    scenario : heatload.model.Scenario
    outcome : heatload.chain.StrategyOutcome
    coolers : sequence of DatasheetCooler, optional

    Returns
    -------
    DatasheetSelection
    """
    from heatload import chain, evaluation
    from heatload.properties import oil
    from heatload.heat import thermal
    from heatload.paths import Overrides

    coolers = tuple(coolers if coolers is not None else scenario.coolers)
    if not coolers:
        raise HeatloadError("the scenario lists no datasheet coolers ([[coolers]])",
                            field="coolers")
    th = outcome.thermal
    res = outcome.circuit
    q_ret = np.maximum(return_flow(res), 0.0)
    t = res.duration
    mean_q = float(np.sum(q_ret * t) / np.sum(t))
    peak_q = float(np.max(q_ret))
    s = np.array([cycle_specific_cooling_power(c.specific_power, q_ret, t) for c in coolers])
    # the coupled temperature on the hottest day with each cooler's S added to the
    # surfaces' UA (row 0: no cooler), through the one coupled solve
    ta = th.design_ambient
    m = len(coolers) + 1
    build = evaluation.Builder(scenario, outcome.strategy,
                               Overrides(scenario, outcome.strategy, None))
    h = scenario.reservoir.heat_transfer_coefficient
    surfaces = evaluation.ConductanceTable(scenario, np.full(m, ta),
                                           np.nan if h is None else h)
    extra = np.concatenate(([0.0], s))

    def with_cooler(t_oil, rows=None):
        ua, dua = surfaces(t_oil, rows)
        return ua + (extra if rows is None else extra[rows]), dua

    temps, _, _ = evaluation.coupled_temperature(
        build, np.zeros(m, int), np.full(m, ta), with_cooler,
        (th.reference_temperature, th.heat_uncoupled),
        (th.design_oil_temperature, th.design_heat), heat_factor=th.heat_calibration)
    t_d = th.design_oil_temperature
    allowed = scenario.cooler.oil_pressure_drop_max
    ua_hot = chain.conductance_fn(scenario, ta)
    amb = scenario.ambient
    on = scenario.cooler.thermostat_on or t_d
    ratings = []
    for c, s_i, t_i in zip(coolers, s, temps[1:]):
        nu = float(oil.kinematic_viscosity(scenario.fluid, t_i))
        dp = oil_pressure_drop(c, peak_q, nu)
        notes = []
        top = c.specific_power[-1][0]
        if np.any(q_ret > top):
            notes.append(f"the return flow reaches {peak_q * 6e4:.3g} L/min, beyond the "
                         f"curve's {top * 6e4:.3g} L/min: S held at its last value")
        if dp is not None and peak_q > c.pressure_drop[-1][0]:
            notes.append("the drop at the peak flow is extrapolated beyond the datasheet's "
                         "curve (power law through its last two points)")
        duty = float(s_i * (t_d - ta))
        shift = (thermal.thermostat_cooler_run(
            th.phase_heat, th.phase_durations, th.capacity, ua_hot, ta,
            amb.cold_start_temperature, scenario.shift_duration, on,
            scenario.cooler.thermostat_hysteresis, cooler_conductance=float(s_i))
            if s_i > 0 else None)
        ratings.append(CoolerRating(
            name=c.name, specific_power=float(s_i), settled_temperature=float(t_i),
            holds_limit=bool(t_i <= t_d + 1e-9), duty_at_design=duty,
            holds_with_margin=bool(duty >= th.cooler_duty * (1 - 1e-12)),
            peak_return_flow=peak_q, peak_pressure_drop=None if dp is None else float(dp),
            bypass_needed=None if dp is None else bool(dp > allowed), fan_power=c.fan_power,
            shift_max_temperature=None if shift is None else float(shift.maximum_temperature),
            shift_on_fraction=None if shift is None else float(shift.on_fraction),
            shift_switch_count=None if shift is None else int(len(shift.switch_on_times)),
            notes=notes))
    holding = [r for r in ratings if r.holds_with_margin and r.holds_limit]
    chosen = min(holding, key=lambda r: r.specific_power).name if holding else None
    notes = []
    if not th.cooler_needed:
        notes.append("no cooler is needed: the surfaces alone hold the design temperature")
    elif chosen is None:
        fits = [r for r in ratings if r.holds_limit]
        notes.append("no listed cooler holds the design temperature with the margin"
                     + (f"; without the margin: {min(fits, key=lambda r: r.specific_power).name}"
                        if fits else "; none holds it even without the margin"))
    return DatasheetSelection(
        strategy=outcome.name, design_oil_temperature=t_d, design_ambient=ta,
        required_duty=th.cooler_duty, allowed_pressure_drop=allowed, mean_return_flow=mean_q,
        peak_return_flow=peak_q, settled_without_cooler=float(temps[0]), ratings=ratings,
        chosen=chosen, notes=notes)


def selection_record(sel: DatasheetSelection) -> dict:
    """The selection as plain data, SI with unit-suffixed keys."""
    def f(v):
        return None if v is None or not math.isfinite(v) else float(v)
    return {"strategy": sel.strategy, "design_oil_temperature_C": f(sel.design_oil_temperature - 273.15),
            "design_ambient_C": f(sel.design_ambient - 273.15),
            "required_duty_W": f(sel.required_duty),
            "allowed_pressure_drop_Pa": f(sel.allowed_pressure_drop),
            "mean_return_flow_m3_s": f(sel.mean_return_flow),
            "peak_return_flow_m3_s": f(sel.peak_return_flow),
            "settled_without_cooler_C": f(sel.settled_without_cooler - 273.15),
            "chosen": sel.chosen, "notes": list(sel.notes),
            "coolers": [{"name": r.name, "specific_power_W_K": f(r.specific_power),
                         "settled_temperature_C": f(r.settled_temperature - 273.15),
                         "holds_limit": r.holds_limit, "duty_at_design_W": f(r.duty_at_design),
                         "holds_with_margin": r.holds_with_margin,
                         "peak_pressure_drop_Pa": f(r.peak_pressure_drop),
                         "bypass_needed": r.bypass_needed, "fan_power_W": f(r.fan_power),
                         "shift_max_temperature_C": None if r.shift_max_temperature is None
                         else f(r.shift_max_temperature - 273.15),
                         "shift_on_fraction": f(r.shift_on_fraction),
                         "shift_switch_count": r.shift_switch_count,
                         "notes": list(r.notes)} for r in sel.ratings]}


def rating_texts(r: CoolerRating, system="si") -> dict:
    """Words for one rating: ``verdict`` (holds with margin / no margin / too
    small), ``drop`` (at the peak flow, and whether a bypass is needed),
    ``shift`` (the hot shift's maximum and the fan's share)."""
    from heatload.units import format_quantity as fq

    verdict = ("holds, with margin" if r.holds_with_margin and r.holds_limit else
               "holds, no margin" if r.holds_limit else "too small")
    drop = ("no curve" if r.peak_pressure_drop is None else
            fq(r.peak_pressure_drop, "pressure", system)
            + (" -> bypass needed" if r.bypass_needed else ""))
    shift = ("-" if r.shift_max_temperature is None else
             f"{fq(r.shift_max_temperature, 'temperature', system)}, fan on "
             f"{100 * r.shift_on_fraction:.0f} %")
    return {"verdict": verdict, "drop": drop, "shift": shift}
