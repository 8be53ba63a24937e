"""Design variants at array speed: N copies of a scenario with some numeric
fields changed, evaluated in one vectorized pass per strategy.

A *variant* is the scenario with the fields named by field paths
(:mod:`heatload.paths`) set to its values.  :func:`evaluate_variants` calls
the one evaluation (:func:`heatload.evaluation.evaluate`) -- the same the
single-scenario chain calls with N = 1 -- and collects its per-variant
figures into :class:`VariantResults` (a table: one row per variant).
"""

from __future__ import annotations

import contextlib
import dataclasses
from dataclasses import dataclass, field

import numpy as np

from heatload import _memory, checks, evaluation
from heatload.hydraulics import energy
from heatload.model import Scenario


@dataclass
class VariantResults:
    """Figures of N variants of one strategy (arrays of shape (N,), SI).

    Temperatures [K], heat and duty [W], energies [J], money in the
    scenario's currency, pressures [Pa], times [s].
    """

    strategy: str
    values: dict                       #: path -> (N,) SI values that were varied
    cycle_time: np.ndarray             #: at the operating temperature [s]
    heat_to_oil: np.ndarray            #: mean heat into the oil, operating T [W]
    heat_to_oil_uncoupled: np.ndarray  #: at the reference oil temperature [W]
    electric_energy_per_cycle: np.ndarray  #: operating T [J]
    electric_energy_per_year: np.ndarray   #: operating T [J]
    cost_per_year: np.ndarray
    peak_pressure: np.ndarray          #: operating T [Pa]
    oil_temperature_uncoupled: np.ndarray  #: steady, typical ambient, reference-T circuit [K]
    oil_temperature_steady: np.ndarray     #: coupled steady, typical ambient, no cooler [K]
    oil_temperature_operating: np.ndarray  #: coupled, or held at the design T by the cooler [K]
    oil_temperature_cycle_max: np.ndarray  #: highest T in the periodic cycle at the coupled T [K]
    coupling_iterations: np.ndarray
    design_heat: np.ndarray            #: mean heat at the design oil temperature [W]
    cooler_duty: np.ndarray            #: with margin [W]
    cooler_duty_without_margin: np.ndarray
    warnings: dict = field(default_factory=dict)  #: code -> counts of phases (N,)
    thermal: object = True  #: True (coupled), "design" or False: see evaluate_variants

    def __len__(self):
        return int(np.size(self.cycle_time))

    def frame(self):
        """The results as a pandas DataFrame: one row per variant, units in the
        column names (:data:`heatload.units.SUFFIXES`: SI, absolute
        temperatures in degC); the varied values under their paths, as given."""
        import pandas as pd

        from heatload.units import file_value

        cols = {p: np.asarray(v) for p, v in self.values.items()}
        cols.update({
            "strategy": [self.strategy] * len(self),
            "heat_to_oil_W": self.heat_to_oil,
            "heat_to_oil_uncoupled_W": self.heat_to_oil_uncoupled,
            "electric_energy_per_cycle_J": self.electric_energy_per_cycle,
            "electric_energy_per_year_kWh": self.electric_energy_per_year / energy.J_PER_KWH,
            "cost_per_year": self.cost_per_year,
            "peak_pressure_Pa": self.peak_pressure,
            "cycle_time_s": self.cycle_time,
            "oil_temperature_uncoupled_C": file_value(self.oil_temperature_uncoupled, "temperature"),
            "oil_temperature_steady_C": file_value(self.oil_temperature_steady, "temperature"),
            "oil_temperature_operating_C": file_value(self.oil_temperature_operating, "temperature"),
            "oil_temperature_cycle_max_C": file_value(self.oil_temperature_cycle_max, "temperature"),
            "design_heat_W": self.design_heat,
            "cooler_duty_W": self.cooler_duty,
            "cooler_duty_without_margin_W": self.cooler_duty_without_margin,
            "coupling_iterations": self.coupling_iterations,
        })
        for code, n in self.warnings.items():
            cols[f"warnings_{code}"] = n
        # the columns as they are (pandas' copy-on-write keeps them apart): a copy
        # into one 2-D block cost a 10^6-variant sweep seconds
        return pd.DataFrame(cols, copy=False)


def threads() -> int:
    """Worker threads for chunked batches (:func:`heatload._memory.threads_setting`)."""
    return _memory.threads_setting()


def evaluate_chunks(scenario: Scenario, strategy, overrides: dict, n: int, chunk: int,
                    done=None, **kwargs):
    """:func:`evaluate_variants` of *n* variants in consecutive chunks of at most
    *chunk*, in their order (a list); chunks run on :func:`threads` threads
    when there are several (each chunk is evaluated on its own, so the figures
    do not depend on it).  *done(k)* is called as k more variants are finished."""
    starts = range(0, n, chunk)

    def one(start):
        part = {k: v[start:start + chunk] for k, v in overrides.items()}
        return evaluate_variants(scenario, strategy, part, **kwargs)

    workers = min(threads(), len(starts))
    out = []
    # one batch for the memory: the chunks reuse each other's freed arrays
    large = n * len(scenario.phases) >= evaluation.LARGE_BATCH
    with _memory.batch() if large else contextlib.nullcontext():
        if workers <= 1:
            for start in starts:
                out.append(one(start))
                if done is not None:
                    done(len(out[-1]))
            return out
        from concurrent.futures import ThreadPoolExecutor
        with ThreadPoolExecutor(max_workers=workers) as pool:
            for res in pool.map(one, starts):
                out.append(res)
                if done is not None:
                    done(len(res))
    return out


def concat(parts) -> VariantResults:
    """One :class:`VariantResults` of the rows of *parts* (results of the same
    strategy and thermal mode over consecutive chunks), in their order."""
    first = parts[0]
    if len(parts) == 1:
        return first

    def cat(get):
        return np.concatenate([np.asarray(get(r)) for r in parts])
    out = {}
    for f in dataclasses.fields(first):
        v = getattr(first, f.name)
        if f.name == "values":
            v = {k: cat(lambda r, k=k: r.values[k]) for k in v}
        elif f.name == "warnings":
            v = {k: cat(lambda r, k=k: r.warnings[k]) for k in v}
        elif isinstance(v, np.ndarray):
            v = cat(lambda r, name=f.name: getattr(r, name))
        out[f.name] = v
    return VariantResults(**out)


def _figures(result, ev, n):
    """Cycle figures of the operating solve: dict of (n,) arrays (energy.summarize)."""
    sc = ev.values.sc
    g = ev.values.get
    s = energy.summarize(result, sc.economics)
    hours = g(("economics", "hours_per_year"), sc.economics.hours_per_year)
    price = g(("economics", "electricity_price"), sc.economics.electricity_price)
    cycles = hours * 3600.0 / s.cycle_time
    e_year = s.electric_energy_per_cycle * cycles
    col = evaluation._col
    # heat into the oil as the thermal step takes it (x the file's heat_calibration)
    heat = ev.heat_calibration * s.average_heat_to_oil
    return {"cycle_time": col(s.cycle_time, n), "heat": col(heat, n),
            "e_cycle": col(s.electric_energy_per_cycle, n), "e_year": col(e_year, n),
            "cost": col(e_year * price, n), "peak": col(s.peak_pressure, n)}


def evaluate_variants(scenario: Scenario, strategy, overrides: dict | None = None,
                      oil_temperature=None, thermal=True) -> VariantResults:
    """Evaluate N variants of *scenario* for one *strategy* in vectorized passes.

    Each variant is the scenario with the fields named by the keys of
    *overrides* set to its values; its figures equal those of the changed
    scenario (:func:`heatload.paths.replaced_scenario`) evaluated alone.

    Q(T) = UA(T) (T - T_a) (steady), duty = max(0, Q(T_d) - UA(T_d)(T_d - T_a,max)) (1 + m)

    Parameters
    ----------
    scenario, strategy, overrides, oil_temperature
        As :func:`heatload.evaluation.evaluate`.
    thermal : bool or "design", optional
        True (default): everything, with the self-consistent (coupled) oil
        temperature (about five solver calls).  ``"design"``: one solver
        call with the oil at the cooler's design temperature -- heat, energy,
        cost, peak pressure and warnings there (where the machine runs once
        its cooler holds it), the exact cooler duty, and the steady oil
        temperature without a cooler estimated from that heat
        (``oil_temperature_uncoupled``: from the design-point heat, not the
        reference temperature's as in the other modes); the coupled figures
        and ``heat_to_oil_uncoupled`` (not solved) are NaN.  False: only the circuit at the
        uncoupled temperature (one call); the design figures NaN.

    Returns
    -------
    VariantResults

    Raises
    ------
    HeatloadError
        Unknown path (with the nearest valid paths), values of the wrong
        sign or range, arrays of different lengths.

    Notes
    -----
    Energy, cost, peak pressure and warnings are at the operating oil
    temperature (the coupled one, or the design temperature where the sized
    cooler holds it there), as :func:`heatload.chain.evaluate_strategy`
    reports them.  The pump's datasheet viscosity (and so the reference
    temperature) and the fluid's viscosity curve are not variable.

    References
    ----------
    First law for the oil (steady lumped balance); cooler duty: common practice.
    """
    ev = evaluation.evaluate(scenario, strategy, overrides, oil_temperature, thermal=thermal)
    n = ev.n
    nan = np.full(n, np.nan)
    fig = _figures(ev.operating, ev, n)

    def arr(x, default=nan):
        return default if x is None else evaluation._col(x, n)
    coupled = thermal is True
    return VariantResults(
        strategy=ev.strategy.name, values=dict(ev.values.by_path), cycle_time=fig["cycle_time"],
        heat_to_oil=fig["heat"], electric_energy_per_cycle=fig["e_cycle"],
        electric_energy_per_year=fig["e_year"], cost_per_year=fig["cost"],
        peak_pressure=fig["peak"],
        warnings={k: evaluation._col(v, n).astype(int)
                  for k, v in checks.condition_counts(
                      ev.conditions + [cd for cd in ev.cycle_conditions
                                       if cd.code in checks.CYCLE_CODES]).items()},
        # at the design point the heat is design_heat; "uncoupled" means at the
        # reference temperature, as compare says it: not solved there
        heat_to_oil_uncoupled=(nan if thermal == "design" else arr(ev.heat_uncoupled)),
        oil_temperature_uncoupled=arr(ev.steady_uncoupled),
        oil_temperature_steady=arr(ev.steady_coupled),
        oil_temperature_operating=(arr(ev.operating_temperature) if thermal else nan),
        oil_temperature_cycle_max=arr(ev.cycle_maximum),
        coupling_iterations=(arr(ev.coupling_iterations).astype(int) if coupled
                             else np.zeros(n, int)),
        design_heat=arr(ev.design_heat), cooler_duty=arr(ev.cooler_duty),
        cooler_duty_without_margin=arr(ev.cooler_duty_without_margin), thermal=thermal)
