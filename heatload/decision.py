"""The decision: which control strategy to build, and why.

One rule, used by the command line, ``compare --json``, the dashboard, the
report and the sweep:

1. **Feasible first.** A strategy is out when its circuit cannot do the job;
   the reason is read from the warnings :mod:`heatload.checks` raised (never
   re-derived here): an actuator that stalls (``stall``), a speed not reached
   (``speed-not-reached``), a pressure above a rating (``pressure-rating``), an
   overrunning load the circuit cannot hold without a counterbalance valve it
   does not have (``overrunning-load``), a hold pressure the pump does not
   supply (``hold-pressure``), or a drive motor loaded beyond what
   IEC 60034-1 allows even briefly (``motor-overload`` above 160 % or for
   longer than 15 s).
2. **Then by yearly cost of ownership**, lowest first:

   C = E_year c_e + P_fan t_fan c_e + a (P_circuit + P_cooler)

   the electricity the circuit buys, the electricity of the cooler's fan, and
   the annualised extra price of the circuit and of the cooler it needs, with
   the capital recovery factor a = i (1 + i)^n / ((1 + i)^n - 1) over the
   service life n at the interest rate i.

Each ranked strategy gets a one-line reason, each one that is out the reason
it is out.  Prices come from the scenario (``strategies[i].price``;
``[cooler] price_fixed``, ``price_per_kW``, ``fan_power_fraction``;
``[economics] service_life``, ``interest_rate``); where the file gives none,
the defaults below (common practice) are used and the reasons say so.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

#: Warning codes of :mod:`heatload.checks` that rule a strategy out: its circuit
#: cannot do the job as specified.  ``motor-overload`` is graded apart
#: (:func:`motor_overload_blocks`).
BLOCKING = ("stall", "speed-not-reached", "pressure-rating", "overrunning-load",
            "hold-pressure", "cooler-design")

#: Sweep tables written before the warnings became one table of conditions name the
#: overrunning-load condition ``runaway``.
SWEEP_ALIASES = {"runaway": "overrunning-load"}

#: What each blocking code means, for the reason a strategy is out.
BLOCKING_WORDS = {
    "stall": "the actuator stalls",
    "speed-not-reached": "the set speed is not reached",
    "pressure-rating": "a pressure exceeds a component's rating",
    "overrunning-load": "it cannot hold the overrunning load without a counterbalance valve",
    "hold-pressure": "the pump does not supply the pressure to hold",
    "cooler-design": "no cooler of the chosen coolant can hold the design oil temperature",
    "motor-overload": "the drive motor is overloaded beyond IEC 60034-1's 160 % for 15 s",
}

#: Price of an air-oil cooler with its fan when the scenario gives none:
#: a fixed part and a part per kW of duty [currency], [currency/kW]
#: (common practice, from memory: catalogue coolers of 5 to 30 kW with an AC
#: fan cost roughly 1,000 to 3,500 in EUR or USD).
DEFAULT_COOLER_PRICE_FIXED = 500.0
DEFAULT_COOLER_PRICE_PER_KW = 100.0
#: Electric power of an air-oil cooler's fan per W of duty [-] (common practice,
#: from memory: fans of 0.12 to 1.1 kW on coolers of 3 to 30 kW, 3 to 5 %).
DEFAULT_FAN_POWER_FRACTION = 0.04


# ---------------------------------------------------------------------------
# money
# ---------------------------------------------------------------------------

def capital_recovery_factor(rate, years):
    """Share of a price paid back each year over a service life [1/year].

    a = i (1 + i)^n / ((1 + i)^n - 1),  a = 1/n for i = 0

    Parameters
    ----------
    rate : array_like
        Interest rate i per year [-], >= 0.
    years : array_like
        Service life n [years], > 0.

    Returns
    -------
    ndarray
        a [1/year].

    References
    ----------
    Capital recovery (annuity) factor of engineering economics, e.g.
    VDI 2067 Part 1 (annuity method) and any engineering-economics text.

    Examples
    --------
    Ten years at 5 %: a = 0.1295 (annuity tables, 5 %, n = 10).

    >>> round(float(capital_recovery_factor(0.05, 10)), 4)
    0.1295
    >>> float(capital_recovery_factor(0.0, 8))
    0.125
    """
    i = np.asarray(rate, float)
    n = np.asarray(years, float)
    g = (1.0 + i) ** n
    safe = np.where(i > 0, i, 1.0)
    return np.where(i > 0, safe * g / np.where(i > 0, g - 1.0, 1.0), 1.0 / n)


def cooler_price(duty, cooler):
    """Price of the cooler a duty needs [currency]; 0 where none is needed.

    P = P_fixed + p_kW duty / 1000   (duty > 0)

    Parameters
    ----------
    duty : array_like
        Cooler duty with margin [W].
    cooler : heatload.model.CoolerDesign
        ``price_fixed`` and ``price_per_kW``; None -> the defaults of this
        module (common practice).
    """
    fixed, per_kw = cooler_prices(cooler)
    d = np.asarray(duty, float)
    return np.where(d > 0.0, fixed + per_kw * d / 1e3, 0.0)


def cooler_prices(cooler):
    """(fixed [currency], per kW [currency/kW]) of the scenario or the defaults."""
    fixed = getattr(cooler, "price_fixed", None)
    per_kw = getattr(cooler, "price_per_kW", None)
    return (DEFAULT_COOLER_PRICE_FIXED if fixed is None else fixed,
            DEFAULT_COOLER_PRICE_PER_KW if per_kw is None else per_kw)


def fan_power(duty, cooler):
    """Electric power of the cooler's fan [W] (air-oil coolers; 0 for water).

    P_fan = f duty,  f = ``cooler.fan_power_fraction`` or
    :data:`DEFAULT_FAN_POWER_FRACTION`.
    """
    from heatload.cooling.cooler_types import cooler_type
    if not cooler_type(getattr(cooler, "coolant", "air")).has_fan:
        return np.zeros_like(np.asarray(duty, float))
    f = getattr(cooler, "fan_power_fraction", None)
    f = DEFAULT_FAN_POWER_FRACTION if f is None else f
    return f * np.maximum(np.asarray(duty, float), 0.0)


def fan_on_fraction(load, duty):
    """Share of the running time a thermostat keeps the fan on [-].

    t_on / t = clip(Q_load / Q_duty, 0, 1)

    An on/off controller delivers its capacity while on, so over a long time
    it is on for the mean load over the capacity (first law over many
    switching periods).

    Parameters
    ----------
    load : array_like
        Heat the cooler must take on a typical day [W].
    duty : array_like
        Its duty (capacity) [W].
    """
    d = np.asarray(duty, float)
    q = np.asarray(load, float)
    return np.where(d > 0.0, np.clip(q / np.where(d > 0.0, d, 1.0), 0.0, 1.0), 0.0)


@dataclass(frozen=True)
class YearlyCost:
    """Yearly cost of ownership of one strategy and its parts [currency/year]."""

    energy: float        #: electricity the circuit buys
    fan: float           #: electricity of the cooler's fan
    circuit: float       #: annualised extra price of the circuit
    cooler: float        #: annualised price of the cooler
    circuit_price: float | None  #: extra price of the circuit [currency]; None: unknown
    cooler_price: float  #: price of the cooler [currency]
    fan_energy_kWh: float  #: [kWh/year]

    @property
    def total(self) -> float:
        return self.energy + self.fan + self.circuit + self.cooler

    def as_dict(self) -> dict:
        return {"energy": self.energy, "fan": self.fan, "circuit": self.circuit,
                "cooler": self.cooler, "total": self.total,
                "circuit_price": self.circuit_price, "cooler_price": self.cooler_price,
                "fan_energy_kWh": self.fan_energy_kWh}


def yearly_cost(scenario, outcome, price=None) -> YearlyCost:
    """Yearly cost of ownership of one evaluated strategy
    (:class:`heatload.chain.StrategyOutcome`); *price* overrides its circuit price."""
    from heatload import chain

    ec = scenario.economics
    th = outcome.thermal
    duty = float(th.cooler_duty) if th.cooler_needed else 0.0
    a = float(capital_recovery_factor(getattr(ec, "interest_rate", 0.05),
                                      getattr(ec, "service_life", 10.0)))
    p_circuit = outcome.strategy.parameters.price if price is None else price
    p_cooler = float(cooler_price(duty, scenario.cooler))
    # heat the cooler takes on a typical day with the oil held at the design T
    ua = chain.conductance_fn(scenario, scenario.ambient.temperature)
    t_d = th.design_oil_temperature
    load = th.design_heat - float(ua(t_d)) * (t_d - scenario.ambient.temperature)
    hours = ec.hours_per_year
    fan_j = float(fan_power(duty, scenario.cooler) * fan_on_fraction(load, duty)) * hours * 3600.0
    return YearlyCost(energy=float(outcome.energy.cost_per_year),
                      fan=fan_j * ec.electricity_price,
                      circuit=a * (p_circuit or 0.0), cooler=a * p_cooler,
                      circuit_price=p_circuit, cooler_price=p_cooler,
                      fan_energy_kWh=fan_j / 3.6e6)


# ---------------------------------------------------------------------------
# feasibility
# ---------------------------------------------------------------------------

def motor_overload_blocks(value, limit, duration):
    """Whether a ``motor-overload`` warning rules a strategy out: more than
    :data:`heatload.checks.MOTOR_EXCESS_TORQUE` x the continuous limit, or any
    overload longer than :data:`heatload.checks.MOTOR_EXCESS_TORQUE_TIME`
    (IEC 60034-1's occasional excess torque, 160 % for 15 s)."""
    from heatload.checks import MOTOR_EXCESS_TORQUE, MOTOR_EXCESS_TORQUE_TIME
    return bool(value > limit * MOTOR_EXCESS_TORQUE or duration > MOTOR_EXCESS_TORQUE_TIME)


def blocking_warnings(outcome, scenario) -> list:
    """The warnings of *outcome* that rule it out (``checks.Warning_`` items)."""
    durations = {ph.name: float(d) for ph, d in zip(scenario.phases,
                                                    np.atleast_1d(outcome.circuit.duration))}
    out = []
    for w in outcome.warnings:
        if w.code in BLOCKING:
            out.append(w)
        elif w.code == "motor-overload" and motor_overload_blocks(
                w.value, w.limit, durations.get(w.phase, np.inf)):
            out.append(w)
    return out


def feasible_counts(counts: dict):
    """Feasibility of N sweep variants from their warning counts
    (``code -> (N,) phases``, the ``warnings_<code>`` columns of a sweep): bool (N,).

    The counts do not grade a motor overload, so any overloaded phase counts
    (stricter than :func:`blocking_warnings`)."""
    codes = set(BLOCKING) | {"motor-overload"}
    n = None
    bad = None
    for code, c in counts.items():
        c = np.asarray(c)
        n = c.shape
        if SWEEP_ALIASES.get(code, code) in codes:
            bad = (c > 0) if bad is None else (bad | (c > 0))
    if bad is None:
        return np.ones(n or (), bool)
    return ~bad


def rank_order(feasible, cost):
    """Indices ranked by the rule: feasible first, then by *cost*, lowest first
    (ties keep their order).  Vectorized: numpy arrays of shape (N,)."""
    cost = np.asarray(cost, float)
    cost = np.where(np.isfinite(cost), cost, np.inf)
    return np.lexsort((cost, ~np.asarray(feasible, bool)))


# ---------------------------------------------------------------------------
# the decision of a comparison
# ---------------------------------------------------------------------------

@dataclass(frozen=True)
class Verdict:
    """One strategy's place in the decision."""

    name: str
    feasible: bool
    rank: int                 #: 1 = best; infeasible ones after every feasible one
    reason: str               #: one line: why it ranks here, or why it is out
    cost: YearlyCost
    blocking: tuple = ()      #: (code, phase) of the warnings that rule it out

    def as_dict(self) -> dict:
        return {"strategy": self.name, "rank": self.rank, "feasible": self.feasible,
                "reason": self.reason, "yearly_cost": self.cost.as_dict(),
                "blocking": [{"code": c, "phase": p} for c, p in self.blocking]}


@dataclass(frozen=True)
class Decision:
    """The ranked strategies of one comparison and the recommendation."""

    verdicts: tuple           #: :class:`Verdict` in rank order
    recommended: str | None   #: None when no strategy is feasible
    present: str
    currency: str
    notes: tuple = field(default_factory=tuple)  #: defaults that were used

    @property
    def order(self) -> list:
        return [v.name for v in self.verdicts]

    def verdict(self, name) -> Verdict:
        for v in self.verdicts:
            if v.name == name:
                return v
        raise KeyError(name)

    @property
    def best(self) -> Verdict:
        """The recommended verdict, or the first ranked one when none is feasible."""
        return self.verdicts[0]

    def saving(self, name=None) -> float:
        """Yearly cost of ownership saved against the present circuit [currency/year]."""
        v = self.verdict(name or self.best.name)
        return self.verdict(self.present).cost.total - v.cost.total

    def sentence(self) -> str:
        """The decision in one sentence (the dashboard's and report's lead)."""
        cur = self.currency
        if self.recommended is None:
            return ("No strategy can do this duty cycle as specified: "
                    + "; ".join(f"{v.name}: {v.reason}" for v in self.verdicts[:3]) + ".")
        best = self.best
        if best.name == self.present:
            return (f"Keep the present circuit, {best.name}: {best.reason}.")
        s = self.saving()
        tail = (f"it saves {s:,.0f} {cur} a year against the present {self.present}"
                if s > 0 else f"it costs {-s:,.0f} {cur} a year more than the present "
                              f"{self.present}, which cannot do the job")
        return f"Build {best.name}: {tail}; {best.reason}."

    def as_dict(self) -> dict:
        return {"recommended": self.recommended, "present": self.present,
                "sentence": self.sentence(),
                "saving_per_year": self.saving() if self.verdicts else None,
                "currency": self.currency, "notes": list(self.notes),
                "rule": "feasible first, then lowest yearly cost of ownership (energy, cooler "
                        "fan, annualised circuit and cooler price)",
                "ranking": [v.as_dict() for v in self.verdicts]}


def _phases_text(ws):
    phases = []
    for w in ws:
        p = w.phase or "the whole cycle"
        if p not in phases:
            phases.append(p)
    return ", ".join(phases)


def _out_reason(ws) -> str:
    by_code = {}
    for w in ws:
        by_code.setdefault(w.code, []).append(w)
    parts = [f"{BLOCKING_WORDS.get(c, c)} ({_phases_text(v)})" for c, v in by_code.items()]
    return "out: " + "; ".join(parts)


def _money(v, cur):
    return f"{v:,.0f} {cur}"


def decide(comparison, present=None, prices=None) -> Decision:
    """Rank the strategies of a :class:`heatload.chain.Comparison` by the rule of
    this module.

    Parameters
    ----------
    comparison : heatload.chain.Comparison
    present : str, optional
        The machine's present circuit; default ``economics.present_strategy``
        or the first strategy.
    prices : dict, optional
        {strategy name: extra price of its circuit} overriding the scenario's.

    Returns
    -------
    Decision
    """
    sc = comparison.scenario
    cur = sc.economics.currency
    prices = dict(prices or {})
    outcomes = list(comparison.outcomes)
    present = present or sc.economics.present_strategy or outcomes[0].name
    try:
        present = comparison.outcome(present).name
    except KeyError:            # a comparison of some strategies only: the first one
        present = outcomes[0].name
    costs = [yearly_cost(sc, o, prices.get(o.name)) for o in outcomes]
    blocks = [blocking_warnings(o, sc) for o in outcomes]
    feasible = np.array([not b for b in blocks])
    order = rank_order(feasible, [c.total for c in costs])
    best_i = int(order[0]) if len(order) else None
    any_ok = bool(feasible.any())
    verdicts = []
    for rank, i in enumerate(order, 1):
        o, c, b = outcomes[i], costs[i], blocks[i]
        if b:
            reason = _out_reason(b)
        elif i == best_i:
            parts = [f"electricity {_money(c.energy + c.fan, cur)}"
                     + (" with the cooler fan" if c.fan > 0 else "")]
            if c.cooler_price > 0:
                parts.append(f"cooler {_money(c.cooler, cur)}")
            else:
                parts.append("no cooler")
            if c.circuit:
                parts.append(f"circuit {_money(c.circuit, cur)}")
            n_ok = int(feasible.sum())
            reason = (f"lowest yearly cost of ownership of the {n_ok} feasible "
                      f"strateg{'y' if n_ok == 1 else 'ies'}, {_money(c.total, cur)}/year ("
                      + ", ".join(parts) + ")")
        else:
            ref = costs[best_i]
            d = {"electricity": (c.energy + c.fan) - (ref.energy + ref.fan),
                 "cooler": c.cooler - ref.cooler, "circuit price": c.circuit - ref.circuit}
            main = max(d, key=lambda k: d[k])
            reason = (f"{_money(c.total - ref.total, cur)}/year more than "
                      f"{outcomes[best_i].name}, mostly {main} (+{_money(d[main], cur)})")
            if c.circuit_price is None:
                reason += "; circuit price unknown, counted as 0"
        verdicts.append(Verdict(name=o.name, feasible=bool(feasible[i]), rank=rank,
                                reason=reason, cost=c,
                                blocking=tuple((w.code, w.phase) for w in b)))
    notes = []
    fixed, per_kw = getattr(sc.cooler, "price_fixed", None), getattr(sc.cooler, "price_per_kW", None)
    if fixed is None or per_kw is None:
        notes.append(f"cooler price {DEFAULT_COOLER_PRICE_FIXED:,.0f} {cur} + "
                     f"{DEFAULT_COOLER_PRICE_PER_KW:,.0f} {cur}/kW of duty where the file gives "
                     "none (common practice)")
    from heatload.cooling.cooler_types import cooler_type
    if (getattr(sc.cooler, "fan_power_fraction", None) is None
            and cooler_type(sc.cooler.coolant).has_fan):
        notes.append(f"cooler fan power {100 * DEFAULT_FAN_POWER_FRACTION:.0f} % of its duty "
                     "(common practice)")
    unknown = [o.name for o, c in zip(outcomes, costs) if c.circuit_price is None]
    if unknown:
        notes.append("no circuit price for " + ", ".join(unknown) + " (counted as 0)")
    return Decision(verdicts=tuple(verdicts),
                    recommended=outcomes[best_i].name if any_ok else None,
                    present=present, currency=cur, notes=tuple(notes))


def variant_yearly_cost(energy_cost, cooler_duty, circuit_price, scenario, fan_on=1.0):
    """Yearly cost of ownership of N design variants (the sweep) [currency/year].

    The same sum as :func:`yearly_cost`, vectorized; the sweep knows no
    typical-day load, so the fan is taken as on for the share *fan_on* of the
    running hours (default all of them: an upper bound).

    Parameters
    ----------
    energy_cost : array_like
        Electricity of the circuit [currency/year].
    cooler_duty : array_like
        Cooler duty with margin [W]; <= 0 where none is needed.
    circuit_price : array_like
        Extra price of each variant's circuit [currency] (NaN -> 0).
    scenario : heatload.model.Scenario
    """
    ec = scenario.economics
    a = capital_recovery_factor(ec.interest_rate, ec.service_life)
    duty = np.maximum(np.asarray(cooler_duty, float), 0.0)
    fan_j = fan_power(duty, scenario.cooler) * fan_on * ec.hours_per_year * 3600.0
    price = np.nan_to_num(np.asarray(circuit_price, float), nan=0.0)
    return (np.asarray(energy_cost, float) + fan_j * ec.electricity_price
            + a * (price + cooler_price(duty, scenario.cooler)))


#: Percentile of the Monte Carlo duty a quote must cover: nine machines in ten
#: built to this scenario need no more (common practice for a design value).
QUOTE_PERCENTILE = "P90"


def quoted_duty(duty_with_margin, margin, percentiles=None, system="si"):
    """The cooler duty to quote, and in words what it is.

    Q_quote = max(Q_design (1 + m), P90 of Q_design (1 + m) over the uncertain inputs)

    Parameters
    ----------
    duty_with_margin : float
        Duty at the design point with the margin *m* [W].
    margin : float
        The margin [-] (0.2 = 20 %).
    percentiles : dict, optional
        ``{"P50", "P90", "P95"}`` of the duty with margin over the Monte Carlo
        [W] (:func:`heatload.cooling.sizing.cooler_uncertainty`).
    system : str, optional
        Units of the figures in the basis ("si" or "us").

    Returns
    -------
    (float, str, bool)
        The duty [W], its basis in one line, and whether the margin alone
        covers the spread up to :data:`QUOTE_PERCENTILE`.
    """
    from heatload.units import format_quantity

    def kw(v):
        return format_quantity(v, "power", system)
    d = float(duty_with_margin)
    base = d / (1.0 + margin) if margin > -1 else d
    pc = f"{100 * margin:.0f} %"
    if not percentiles or percentiles.get(QUOTE_PERCENTILE) is None:
        return d, (f"the duty at the design point ({kw(base)}) plus the {pc} margin; "
                   "no spread was computed"), True
    p = float(percentiles[QUOTE_PERCENTILE])
    p95 = percentiles.get("P95")
    tail = f", P95 {kw(float(p95))}" if p95 is not None else ""
    if p <= d:
        return d, (f"the duty at the design point ({kw(base)}) plus the {pc} margin, "
                   f"which covers the {QUOTE_PERCENTILE} of the uncertain inputs "
                   f"({kw(p)}{tail})"), True
    return p, (f"the {QUOTE_PERCENTILE} of the duty with the {pc} margin over the uncertain "
               f"inputs; the margin alone ({kw(d)}) does not cover the spread"
               f"{tail}"), False


#: Highest price a circuit or cooler may be given [currency]: a billion is beyond
#: any hydraulic power unit; above it a price is a slipped digit.
MAX_PRICE = 1e9


def price_value(amount, field: str, what: str = "price") -> float:
    """A price [currency] from text or a number: finite, 0 .. :data:`MAX_PRICE`,
    else a :class:`~heatload.errors.HeatloadError` naming *field*."""
    from heatload.errors import HeatloadError
    try:
        v = float(amount)
    except (TypeError, ValueError):
        raise HeatloadError(f"{what} must be a number, got {amount!r}", field=field) from None
    if not np.isfinite(v):
        raise HeatloadError(f"{what} must be a finite number, got {amount!r}", field=field)
    if not 0.0 <= v <= MAX_PRICE:
        raise HeatloadError(f"{what} must lie within 0 .. {MAX_PRICE:,.0f}, got {amount!r}",
                            field=field)
    return v
