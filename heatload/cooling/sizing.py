"""The cooler job at the edge of the engine: one strategy's design point turned
into a cooler size, a spec sheet a supplier can quote against, a rating check of
a given cooler, the thermostat's behaviour over a shift and the uncertainty of
the duty.

It only calls the engine (:mod:`heatload.chain`, :mod:`heatload.cooling.cooler`,
:mod:`heatload.properties.oil`) and returns its results as data; the
``heatload cooler`` command (:mod:`heatload.cli.cooler`) prints them.

Design point
------------
Highest ambient (``ambient.temperature_max``), oil held at the design
temperature (``outcome.thermal.design_oil_temperature``); the cooler takes
what the reservoir's surfaces cannot shed there (first law), plus the margin.

Oil flow through the cooler
---------------------------
The cooler is taken to sit in the return line, so its oil flow is the
cycle-average return flow, the time average of the pump flow over the phases:
Q_cooler = sum(Q_pump,i t_i) / sum(t_i).  All pump flow reaches the tank over
a cycle (the cylinder's area difference averages out over a full stroke pair),
so the return flow averages to the pump flow.  An off-line (kidney-loop)
cooler with its own pump would see a constant flow instead.

Sizing is an estimate for early design; component makers' data, local codes
and licensed practice govern the selection.
"""

from __future__ import annotations


import math
from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from heatload.cooling import cooler
from heatload.model import design_oil_temperature
from heatload.cooling.cooler_types import TYPES, cooler_type
from heatload.errors import HeatloadError
from heatload.heat.heat_transfer import barometric_pressure
from heatload.outputs.wording import CAUTION

K0 = 273.15


#: Monte Carlo samples used when the report asks for the uncertainty.
REPORT_SAMPLES = 2000

ASSUMPTION_OIL_FLOW = ("return-line cooler: oil flow = cycle-average return flow = time "
                       "average of the pump flow over the cycle")


@dataclass
class CoolerSizing:
    """A cooler's requirement for one strategy at the design point (SI: W, K, W/K, m^3/s,
    kg/s, Pa, m^2/s).  Sizings that cannot be done (no cooler needed, or a coolant that
    cannot reach the duty) are ``None`` with the reason in :attr:`notes`."""

    strategy: str                        #: strategy name
    coolant: str                         #: "air" | "water" (the one the spec sheet is for)
    design_oil_temperature: float        #: oil into the cooler [K]
    design_ambient: float                #: highest ambient = air inlet [K]
    design_heat: float                   #: mean heat into the oil at the design point [W]
    design_conductance: float            #: surfaces' UA at the design point [W/K]
    surfaces_heat: float                 #: UA (T_d - T_a,max), shed without a cooler [W]
    cooler_needed: bool
    duty_without_margin: float           #: [W]
    margin: float                        #: [-]
    duty: float                          #: with margin [W]
    oil_flow: float                      #: cycle-average return flow [m^3/s]
    oil_density: float                   #: at the cooler inlet [kg/m^3]
    oil_specific_heat: float             #: at the cooler inlet [J/(kg K)]
    oil_viscosity: float                 #: kinematic, at the cooler inlet [m^2/s]
    air: Optional[cooler.AirCoolerSizing] = None
    water: dict = field(default_factory=dict)   #: arrangement -> WaterCoolerSizing
    spec: Optional[cooler.CoolerSpec] = None
    rating: Optional[dict] = None        #: see :func:`rate_cooler`
    thermostat: Optional[dict] = None    #: see :func:`thermostat_summary`
    notes: list = field(default_factory=list)
    #: the file's datasheet coolers rated (:func:`heatload.cooling.cooler_datasheet.rate_coolers`)
    datasheet: Optional[object] = None
    water_inlet_temperature: float = float("nan")  #: coolant inlet of the water-oil sizing [K]
    #: the site's air pressure (its altitude, standard atmosphere) [Pa]: the air
    #: cooler's volume flow is at the air's density there
    air_pressure: float = 101325.0
    caution: str = CAUTION


def cycle_average_flow(flow, duration) -> float:
    """Time average of a per-phase flow over the cycle.

    Q_avg = sum(Q_i t_i) / sum(t_i)

    Parameters
    ----------
    flow : array_like
        Flow per phase [m^3/s].
    duration : array_like
        Phase durations [s].

    Returns
    -------
    float
        [m^3/s].

    References
    ----------
    Time average of a piecewise-constant signal (definition).
    """
    q = np.asarray(flow, float)
    t = np.asarray(duration, float)
    total = float(t.sum())
    if not total > 0.0:
        raise HeatloadError("the cycle has no duration", field="phases")
    return float((q * t).sum() / total)


def _design_strategy(scenario, name=None):
    if name:
        try:
            return scenario.strategy(name)
        except KeyError:
            raise HeatloadError(f"unknown strategy {name!r}; this scenario has "
                                f"{', '.join(s.name for s in scenario.strategies)}",
                                field="--strategy") from None
    present = scenario.economics.present_strategy
    if present:
        try:
            return scenario.strategy(present)
        except KeyError:
            pass
    return scenario.strategies[0]


def rate_cooler(sizing: CoolerSizing, rated_duty: float, rated_etd: float) -> dict:
    """Duty a given cooler delivers at the design point, and whether it suffices.

    P_design = P_rated ETD_design / ETD_rated (same oil and coolant flows)

    Parameters
    ----------
    sizing : CoolerSizing
    rated_duty : float
        The cooler's catalogue duty [W].
    rated_etd : float
        ETD of that catalogue point [K].

    Returns
    -------
    dict
        ``design_etd_K``, ``duty_at_design_W``, ``required_W`` (with margin),
        ``required_without_margin_W``, ``suffices`` (covers the duty with margin),
        ``suffices_without_margin``, ``ratio`` (delivered / required).

    Notes
    -----
    Air-oil: :func:`heatload.cooling.cooler.rate_air_cooler` (duty proportional to ETD at
    fixed flows, common practice).  Water-oil at the rated flows: with UA, Cmin and
    Cmax unchanged the effectiveness is unchanged, so P = eps Cmin ETD is again
    proportional to the ETD (effectiveness-NTU); viscosity effects on the oil film
    are not included.

    References
    ----------
    Common practice of cooler catalogues (W per K of ETD); Incropera et al.,
    6th ed., Sec. 11.4 (P = eps Cmin ETD).
    """
    # the sizing carries the coolant inlet temperatures of its design point
    coolant_in = cooler_type(sizing.coolant).inlet_temperature(sizing, sizing.design_ambient)
    etd = sizing.design_oil_temperature - coolant_in
    if not etd > 0.0:
        raise HeatloadError("the design point has no positive ETD for rating",
                            field="--rated-etd")
    delivered = float(cooler.rate_air_cooler(rated_duty, rated_etd, etd))
    need = sizing.duty
    return {"coolant": sizing.coolant, "rated_duty_W": float(rated_duty),
            "rated_etd_K": float(rated_etd), "design_etd_K": float(etd),
            "duty_at_design_W": delivered, "required_W": float(need),
            "required_without_margin_W": float(sizing.duty_without_margin),
            "suffices": bool(delivered >= need),
            "suffices_without_margin": bool(delivered >= sizing.duty_without_margin),
            "ratio": (delivered / need) if need > 0 else math.inf}


def thermostat_summary(scenario, outcome, datasheet=None) -> dict:
    """A shift with the cooler switched by its thermostat
    (:func:`heatload.chain.shift_profile` with ``cooler_on=True``): the sized
    duty, or with *datasheet* (a :class:`heatload.cooling.cooler_datasheet.CoolerRating`)
    that cooler's curve, C dT/dt = Q - UA (T - T_a) - S (T - T_a) while on, S the
    time average over the cycle of the curve at each phase's return flow.

    Returns
    -------
    dict
        ``switch_count`` [-], ``on_fraction`` [-], ``max_temperature_K``,
        ``final_temperature_K``, ``on_temperature_K``, ``hysteresis_K``,
        ``shift_duration_s``, ``cooler`` (the datasheet cooler's name, or None
        for the sized duty), ``cooler_specific_power_W_K`` (its S, or None);
        ``switch_count`` is 0 and ``on_fraction`` 0 when no cooler is needed
        (the shift is then a plain warm-up).
    """
    from heatload import chain

    s_cooler = None if datasheet is None else float(datasheet.specific_power)
    run = chain.shift_profile(scenario, outcome, cooler_on=True,
                              cooler_conductance=s_cooler)
    on = scenario.cooler.thermostat_on or outcome.thermal.design_oil_temperature
    if hasattr(run, "switch_on_times"):
        count, frac = int(len(run.switch_on_times)), float(run.on_fraction)
    else:
        count, frac = 0, 0.0
    return {"switch_count": count, "on_fraction": frac,
            "max_temperature_K": float(np.max(run.maximum_temperature)),
            "final_temperature_K": float(np.ravel(run.final_temperature)[0]),
            "on_temperature_K": float(on),
            "hysteresis_K": float(scenario.cooler.thermostat_hysteresis),
            "shift_duration_s": float(scenario.shift_duration),
            "cooler": None if datasheet is None else datasheet.name,
            "cooler_specific_power_W_K": s_cooler}


def _design_point(scenario, outcome, coolant=None):
    """``(cooler type, cooler design, CoolerSizing)`` of one strategy's design point
    for *coolant* (default the file's), nothing sized yet; a coolant entering no
    colder than the oil is refused (second law)."""
    from heatload.properties import oil

    kind = cooler_type(coolant or scenario.cooler.coolant, field="--coolant")
    cd = scenario.cooler
    th = outcome.thermal
    t_d = float(th.design_oil_temperature)
    t_a = float(th.design_ambient)
    # no cooler of a coolant entering no colder than the oil cools it (second
    # law); the loader refuses such a file for its own coolant, this covers a
    # coolant chosen afterwards (``heatload cooler --coolant``)
    refused = kind.refusal(t_d, t_a, cd, "the design oil temperature",
                           "cooler.oil_temperature_max")
    if refused:
        raise HeatloadError(refused[0], field=refused[1])
    fluid = scenario.fluid
    duty0 = float(th.cooler_duty_without_margin)
    sz = CoolerSizing(
        strategy=outcome.name, coolant=kind.name, design_oil_temperature=t_d,
        design_ambient=t_a, design_heat=float(th.design_heat),
        design_conductance=float(th.design_conductance),
        surfaces_heat=float(th.design_conductance) * (t_d - t_a),
        cooler_needed=bool(th.cooler_needed), duty_without_margin=duty0, margin=float(cd.margin),
        duty=float(th.cooler_duty),
        oil_flow=cycle_average_flow(outcome.circuit.pump_flow, outcome.circuit.duration),
        oil_density=float(oil.fluid_density(fluid, t_d)),
        oil_specific_heat=float(oil.fluid_specific_heat(fluid, t_d)),
        oil_viscosity=float(oil.kinematic_viscosity(fluid, t_d)),
        water_inlet_temperature=float(cd.water_inlet_temperature),
        air_pressure=float(barometric_pressure(scenario.ambient.altitude)))
    return kind, cd, sz


def _why_not(kind, sz) -> str:
    """Why *kind*'s cooler could not be sized into *sz* (its notes)."""
    return "; ".join(n for n in sz.notes if n.startswith(kind.label)) or "no unit fits"


def cooler_shortfall(scenario, outcome):
    """Why no cooler of the file's coolant can hold one strategy's design point
    (the reason :func:`size_cooler` would refuse it with), or None where one can
    or none is needed.  The comparison flags it (``cooler-design``), so it does
    not recommend a circuit whose cooler cannot be built as specified."""
    if not outcome.thermal.cooler_needed:
        return None
    try:
        kind, cd, sz = _design_point(scenario, outcome)
    except HeatloadError as exc:
        return exc.message
    if sz.oil_flow <= 0.0:
        return None     # an off-line cooler with its own pump (size_cooler's note)
    kind.size(sz, cd)
    if kind.possible(sz):
        return None
    return _why_not(kind, sz)


def size_cooler(scenario, outcome, coolant=None, rated_duty=None, rated_etd=None,
                thermostat=True, strict=True) -> CoolerSizing:
    """Size the cooler of one strategy at the design point.

    P_0 = max(0, Q_d - UA_d (T_d - T_a,max)); P = P_0 (1 + margin);
    air: P / ETD with ETD = T_d - T_a,max, m_air = P / (c_p,air dT_air),
    dT_oil = P / (rho Q c_p); water: UA by effectiveness-NTU (counterflow and
    shell-and-tube, one shell pass, two tube passes).

    Parameters
    ----------
    scenario : heatload.model.Scenario
    outcome : heatload.chain.StrategyOutcome
    coolant : str, optional
        'air' or 'water' for the spec sheet; None -> ``scenario.cooler.coolant``.
    rated_duty, rated_etd : float, optional
        Rating mode: a cooler's catalogue duty [W] at its ETD [K].
    thermostat : bool, optional
        Also run a shift with the thermostat-switched cooler.
    strict : bool, optional
        Refuse (HeatloadError) where no cooler of *coolant* can hold the design
        point; False: the sizing without a spec sheet, saying why in its notes.

    Returns
    -------
    CoolerSizing

    Notes
    -----
    The oil enters the cooler at the design temperature (a well-mixed tank and a
    return-line cooler).  Both coolants are sized where they can be; the spec
    sheet is for *coolant*.

    References
    ----------
    Steady energy balance of the oil (first law); Incropera et al., 6th ed.,
    Sec. 11.4-11.5 (effectiveness-NTU); ETD rating: common practice.
    """
    kind, cd, sz = _design_point(scenario, outcome, coolant)
    coolant = kind.name
    q_oil = sz.oil_flow
    t_d, t_a = sz.design_oil_temperature, sz.design_ambient
    rho, cp, nu, duty0 = sz.oil_density, sz.oil_specific_heat, sz.oil_viscosity, \
        sz.duty_without_margin
    sz.notes.append(ASSUMPTION_OIL_FLOW)
    # a cooler holding the oil at the design temperature runs the pump there:
    # its viscosity window is judged at that temperature too
    pump = scenario.power_unit.pump
    if sz.cooler_needed and not pump.viscosity_min <= nu <= pump.viscosity_max:
        edge, side = ((pump.viscosity_min, "below the pump's least")
                      if nu < pump.viscosity_min else (pump.viscosity_max,
                                                      "above the pump's most"))
        sz.notes.insert(0, f"caution: at the design oil temperature {t_d - K0:.1f} °C the oil's "
                           f"viscosity {nu * 1e6:.2f} mm²/s is {side} {edge * 1e6:.0f} mm²/s: "
                           f"hold the oil cooler (cooler.oil_temperature_max) or choose a "
                           f"thicker grade")
    if not sz.cooler_needed:
        sz.notes.append("no cooler needed: the surfaces shed "
                        f"{sz.surfaces_heat:.0f} W at the design point, the heat is "
                        f"{sz.design_heat:.0f} W")
    elif q_oil <= 0.0:
        sz.notes.append("no return flow through a cooler (the pump delivers nothing over "
                        "the cycle): use an off-line cooler with its own pump")
    else:
        # every coolant is sized where it can be; the spec sheet is for *coolant*
        for other in TYPES.values():
            other.size(sz, cd)
        arrangement = kind.arrangement(sz)
        if kind.possible(sz):
            sz.spec = cooler.cooler_spec_sheet(
                coolant, duty0, t_d, kind.inlet_temperature(cd, t_a),
                q_oil, rho, cp, nu, margin=cd.margin, oil_pressure_drop_max=cd.oil_pressure_drop_max,
                air_temperature_rise=cd.air_temperature_rise, water_flow=cd.water_flow,
                water_temperature_rise=cd.water_temperature_rise,
                glycol_fraction=cd.water_glycol_fraction, arrangement=arrangement, shell_passes=1,
                air_pressure=sz.air_pressure)
            if sz.spec.arrangement == "counterflow":
                sz.notes.append("spec sheet for a counterflow unit: one-shell shell-and-tube "
                                "cannot reach the effectiveness")
        else:
            # the chosen coolant cannot take the duty: a refusal, not a sheet left
            # blank (a report, not strict, says so in the sizing's notes instead)
            why = _why_not(kind, sz)
            if strict:
                raise HeatloadError(f"no {kind.label} cooler can hold the design point "
                                    f"({why})", field="cooler.coolant")
            sz.notes.insert(0, f"no {kind.label} cooler can hold the design point ({why}): "
                               f"no spec sheet")
    if rated_duty is not None or rated_etd is not None:
        if rated_duty is None or rated_etd is None:
            raise HeatloadError("rating mode needs both --rated-duty and --rated-etd",
                                field="--rated-duty" if rated_duty is None else "--rated-etd")
        sz.rating = rate_cooler(sz, rated_duty, rated_etd)
    if thermostat:
        chosen = None
        if scenario.coolers:
            # the datasheet coolers of the file: the chosen one's curve runs the shift
            from heatload.cooling import cooler_datasheet
            sz.datasheet = cooler_datasheet.rate_coolers(scenario, outcome)
            chosen = next((r for r in sz.datasheet.ratings if r.name == sz.datasheet.chosen),
                          None)
            if chosen is None and sz.cooler_needed:
                sz.notes.append("no listed datasheet cooler holds the design temperature "
                                "with the margin: the thermostat shift uses the sized duty")
        sz.thermostat = thermostat_summary(scenario, outcome, chosen)
    return sz


def truncation_texts(mc) -> list:
    """One sentence per uncertain input whose samples were cut at its field's
    limits in more than a trivial share
    (:meth:`heatload.studies.uncertainty.UncertaintyResult.truncation_notes`)."""
    from heatload.outputs.wording import plain_path
    return [f"{100 * f:.3g} % of the samples of {plain_path(p)} ({p}) fell beyond what the "
            f"field allows and were drawn again inside it (truncated, not clipped): "
            f"the spread given is wider than the field's range"
            for p, _, f in mc.truncation_notes()]


def cooler_uncertainty(scenario, strategy, samples=10000, seed=1, top=5,
                       progress=False) -> dict:
    """Monte Carlo spread of the cooler duty and oil temperature, and the inputs
    that move the duty most (:mod:`heatload.studies.uncertainty`, imported lazily).

    Returns
    -------
    dict
        ``available`` (bool), ``note``; when available: ``samples``, ``seed``,
        ``cooler_duty_W`` {P50, P90, P95}, ``oil_temperature_C`` {P50, P90, P95},
        ``truncated`` (per input: ``path``, ``samples`` and ``fraction`` drawn again
        inside the field's range), ``truncation_notes`` (the sentences for
        shares past :data:`heatload.studies.uncertainty.NOTED_SHARE`),
        ``sensitivity`` (the *top* entries of the ranking, dicts with ``path`` and
        ``cooler_duty_swing_W`` ..., :func:`heatload.studies.uncertainty.sensitivity`).
        Scenarios without uncertain inputs use the uncertainty module's typical defaults.
    """
    try:
        from heatload.studies import uncertainty
    except ImportError as exc:
        return {"available": False,
                "note": f"uncertainty not available (heatload.studies.uncertainty: {exc})"}
    try:
        mc = uncertainty.monte_carlo(scenario, strategy, samples=samples, seed=seed,
                                     progress=progress)
        sens = uncertainty.sensitivity(scenario, strategy)
    except HeatloadError as exc:
        return {"available": False, "note": f"uncertainty not available: {exc.one_line()}"}
    pct = mc.percentiles

    def clean(d):
        return {k: float(v) for k, v in d.items()}
    rows = []
    for s in list(sens)[:top]:
        row = {k: (float(v) if isinstance(v, (int, float, np.floating)) and
                   not isinstance(v, bool) else v) for k, v in dict(s).items()}
        rows.append(row)
    # specific cooling power [W/K] each sample's cooler must give: duty / ETD,
    # ETD = design oil T - the sample's hottest ambient (what an air-oil cooler
    # is bought by; the ambient alone moves it)
    ov = uncertainty._overrides(scenario, mc.inputs, mc.samples, mc.defaults_used)
    t_amb = np.asarray(ov.get("ambient.temperature_max", scenario.ambient.temperature_max),
                       float)
    t_oil = np.asarray(ov.get("cooler.oil_temperature_max",
                              design_oil_temperature(scenario.fluid, scenario.cooler)), float)
    etd = t_oil - t_amb
    kwk = np.where(etd > 0, mc.cooler_duty / np.where(etd > 0, etd, 1.0), np.nan)
    kwk_pct = {k: float(v) for k, v in zip(("P50", "P90", "P95"),
                                            np.nanpercentile(kwk, [50.0, 90.0, 95.0]))} \
        if np.isfinite(kwk).any() else None
    return {"available": True, "note": "", "samples": int(samples), "seed": int(seed),
            "truncated": [{"path": p, "samples": int(k), "fraction": k / int(samples)}
                          for p, k in mc.truncated.items()],
            "truncation_notes": truncation_texts(mc),
            "specific_cooling_power_W_K": kwk_pct,
            "cooler_duty_W": clean(pct["cooler_duty_W"]),
            "oil_temperature_C": clean(pct["oil_temperature_C"]),
            "sensitivity": rows}


def _f(x):
    if x is None:
        return None
    v = float(x)
    return v if math.isfinite(v) else None


def sizing_record(sz: CoolerSizing, uncertainty_result: Optional[dict] = None) -> dict:
    """The sizing as plain data, SI with unit-suffixed keys (``heatload cooler --json``,
    the report's cooler section and the spreadsheet's cooler sheet)."""
    rec = {
        "strategy": sz.strategy, "coolant": sz.coolant,
        "design_oil_temperature_C": _f(sz.design_oil_temperature - K0),
        "design_ambient_C": _f(sz.design_ambient - K0),
        "design_heat_W": _f(sz.design_heat),
        "design_conductance_W_K": _f(sz.design_conductance),
        "surfaces_heat_W": _f(sz.surfaces_heat),
        "cooler_needed": sz.cooler_needed,
        "duty_without_margin_W": _f(sz.duty_without_margin), "margin": _f(sz.margin),
        "duty_W": _f(sz.duty),
        "oil_flow_m3_s": _f(sz.oil_flow), "oil_density_kg_m3": _f(sz.oil_density),
        "oil_specific_heat_J_kgK": _f(sz.oil_specific_heat),
        "oil_viscosity_m2_s": _f(sz.oil_viscosity),
        "air": None, "water": {}, "spec": None, "rating": sz.rating,
        "thermostat": sz.thermostat, "notes": list(sz.notes), "caution": sz.caution,
    }
    if sz.air is not None:
        a = sz.air
        rec["air"] = {"duty_W": _f(a.duty), "etd_K": _f(a.etd),
                      "specific_cooling_power_W_K": _f(a.specific_cooling_power),
                      "air_mass_flow_kg_s": _f(a.air_mass_flow),
                      "air_volume_flow_m3_s": _f(a.air_volume_flow),
                      "air_inlet_temperature_C": _f(sz.design_ambient - K0),
                      "air_outlet_temperature_C": _f(a.air_outlet_temperature - K0),
                      "oil_temperature_drop_K": _f(a.oil_temperature_drop),
                      "oil_outlet_temperature_C": _f(a.oil_outlet_temperature - K0)}
    for arr, w in sz.water.items():
        rec["water"][arr] = {
            "duty_W": _f(w.duty), "etd_K": _f(w.etd),
            "required_conductance_W_K": _f(w.required_conductance), "ntu": _f(w.ntu),
            "effectiveness": _f(w.effectiveness), "capacity_ratio": _f(w.capacity_ratio),
            "oil_capacity_rate_W_K": _f(w.oil_capacity_rate),
            "water_capacity_rate_W_K": _f(w.water_capacity_rate),
            "water_volume_flow_m3_s": _f(w.water_volume_flow),
            "water_mass_flow_kg_s": _f(w.water_mass_flow),
            "water_inlet_temperature_C": _f(sz.water_inlet_temperature - K0),
            "water_outlet_temperature_C": _f(w.water_outlet_temperature - K0),
            "oil_outlet_temperature_C": _f(w.oil_outlet_temperature - K0),
            "shell_passes": int(w.shell_passes)}
    if sz.spec is not None:
        s = sz.spec
        rec["spec"] = {
            "coolant": s.coolant, "duty_W": _f(s.duty),
            "duty_without_margin_W": _f(s.duty_without_margin), "margin": _f(s.margin),
            "etd_K": _f(s.etd), "oil_flow_m3_s": _f(s.oil_flow),
            "oil_inlet_temperature_C": _f(s.oil_inlet_temperature - K0),
            "oil_outlet_temperature_C": _f(s.oil_outlet_temperature - K0),
            "oil_pressure_drop_max_Pa": _f(s.oil_pressure_drop_max),
            "oil_viscosity_m2_s": _f(s.oil_viscosity),
            "coolant_inlet_temperature_C": _f(s.coolant_inlet_temperature - K0),
            "coolant_flow_m3_s": _f(s.coolant_flow),
            "coolant_outlet_temperature_C": _f(s.coolant_outlet_temperature - K0),
            "glycol_fraction": _f(s.glycol_fraction),
            "specific_cooling_power_W_K": _f(s.specific_cooling_power),
            "required_conductance_W_K": _f(s.required_conductance),
            "arrangement": s.arrangement}
    if sz.thermostat is not None:
        t = dict(sz.thermostat)
        rec["thermostat"] = {
            "switch_count": t["switch_count"], "on_fraction": _f(t["on_fraction"]),
            "max_temperature_C": _f(t["max_temperature_K"] - K0),
            "final_temperature_C": _f(t["final_temperature_K"] - K0),
            "on_temperature_C": _f(t["on_temperature_K"] - K0),
            "hysteresis_K": _f(t["hysteresis_K"]), "shift_duration_s": _f(t["shift_duration_s"]),
            "cooler": t.get("cooler"),
            "cooler_specific_power_W_K": _f(t.get("cooler_specific_power_W_K"))}
    if uncertainty_result is not None:
        rec["uncertainty"] = uncertainty_result
    return rec


def air_flow_text(volume_flow, system="si") -> str:
    """Cooling-air volume flow [m^3/s] as fans are rated: m³/h (SI) or cfm (US)."""
    if system == "us":
        return f"{volume_flow / 0.00047194745:,.0f} cfm"  # 1 ft^3/min = 0.00047194745 m^3/s
    return f"{volume_flow * 3600.0:,.0f} m³/h"


def spec_rows(sz: CoolerSizing, system="si") -> list:
    """The spec sheet as (item, value) rows formatted for people in *system*."""
    from heatload.units import format_quantity as fq

    s = sz.spec
    if s is None:
        return []
    kind = cooler_type(s.coolant)
    rows = [("coolant", kind.description(s)),
            ("duty to quote (with margin)", f"{fq(s.duty, 'power', system)} "
             f"(+{100 * s.margin:.0f} % on {fq(s.duty_without_margin, 'power', system)})"),
            ("entering temperature difference (ETD)",
             fq(s.etd, "temperature_difference", system)),
            ("oil flow", fq(s.oil_flow, "flow", system)),
            ("oil inlet temperature", fq(s.oil_inlet_temperature, "temperature", system)),
            ("oil outlet temperature", fq(s.oil_outlet_temperature, "temperature", system)),
            ("allowed oil-side pressure drop", fq(s.oil_pressure_drop_max, "pressure", system)),
            ("oil viscosity at inlet", fq(s.oil_viscosity, "kinematic_viscosity", system)),
            (f"{kind.medium} inlet temperature",
             fq(s.coolant_inlet_temperature, "temperature", system)),
            (f"{kind.medium} flow", kind.flow_text(s.coolant_flow, system, fq)),
            (f"{kind.medium} outlet temperature",
             fq(s.coolant_outlet_temperature, "temperature", system))]
    return rows + kind.extra_rows(s, system, fq)


#: Plausible ranges of a catalogue rating given on the command line: a duty up to
#: 5 MW, an ETD up to 200 K (the loader's limit for a temperature difference).
_RATING_RANGE = {"power": (0.0, 5e6, "5 MW"), "temperature_difference": (0.0, 200.0, "200 K")}


def _parse(text, kind, fieldname):
    from heatload.units import to_si
    v = to_si(text, kind, field=fieldname)
    low, high, shown = _RATING_RANGE.get(kind, (-math.inf, math.inf, ""))
    if not low < v <= high:
        raise HeatloadError(f"expected a value above 0 and at most {shown}, got {text!r}",
                            field=fieldname)
    return v


def shift_words(seconds, digits=".1f") -> str:
    """A shift's length with its article as the number is spoken: "an 8.0 h
    shift", "a 10.0 h shift", "an 11.0 h shift".

    >>> shift_words(8 * 3600), shift_words(7.5 * 3600), shift_words(18 * 3600, ".3g")
    ('an 8.0 h shift', 'a 7.5 h shift', 'an 18 h shift')
    """
    text = f"{seconds / 3600:{digits}} h"
    # numbers read with a leading vowel sound: eight, eleven, eighteen, eighty...
    whole = text.split(" ")[0].split(".")[0]
    spoken_vowel = whole.startswith("8") or whole in ("11", "18")
    return f"{'an' if spoken_vowel else 'a'} {text} shift"
