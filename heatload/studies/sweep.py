"""``heatload sweep``: a grid or a random sample of design variants at array speed.

``--vary PATH=LOW..HIGH:N`` names a scenario field (the paths of
:mod:`heatload.studies.variants`), its range with units (``16..40cm^3:13``,
``63..100mm:8``, ``34..42degC:5``; a unit given only on HIGH applies to LOW
too) and the number of values.  Several ``--vary`` make the full grid
(every combination); ``--samples N --seed S`` draws N variants uniformly in
the ranges instead.  Each strategy is evaluated in vectorized chunks
(:func:`heatload.studies.variants.evaluate_variants`), the table is written to CSV or
Parquet atomically (the output path checked before anything is computed; in
CSV, text a spreadsheet would run as a formula gets a leading quote), and the
best variants and the Pareto front (energy per cycle against cooler duty, and
against the pump displacement when it varies) are printed.
"""

from __future__ import annotations

import math
import re
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from heatload.io import files as outputs
from heatload.errors import HeatloadError

#: Variants per vectorized pass (bounds memory: ~12 phases x 60 arrays each).
CHUNK = 20000

_SPEC = re.compile(r"^\s*([^=\s]+)\s*=\s*(.+?)\s*\.\.\s*(.+?)\s*(?::\s*(\S+))?\s*$")
_NUMBER = re.compile(r"^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)$")


@dataclass(frozen=True)
class VarySpec:
    """One ``--vary``: field path, SI bounds, number of grid values, kind."""

    path: str
    low: float
    high: float
    count: int | None
    kind: str
    text: str


def _split(text):
    m = _NUMBER.match(text.strip())
    if not m:
        return None, None
    return m.group(1), m.group(2).strip()


def parse_vary(text: str, scenario, need_count: bool = True) -> VarySpec:
    """Parse ``PATH=LOW..HIGH:N`` into SI bounds for *scenario*'s field.

    Raises
    ------
    HeatloadError
        Malformed spec, unknown path, a unit of the wrong kind, N < 1,
        LOW > HIGH; the message names the spec.
    """
    from heatload import paths, units

    field = f"--vary {text}"
    if "..." in (text or ""):
        raise HeatloadError("write two dots between LOW and HIGH, e.g. 16..40cm^3:13",
                            field=field)
    m = _SPEC.match(text or "")
    if not m:
        raise HeatloadError("expected PATH=LOW..HIGH:N, e.g. "
                            "power_unit.pump.displacement=16..40cm^3:13", field=field)
    path, lo_txt, hi_txt, n_txt = m.groups()
    try:
        ref = paths.resolve_path(scenario, path)
    except HeatloadError as exc:
        raise HeatloadError(exc.message, field=field) from None
    if ref.kind is None:
        raise HeatloadError(f"{path} mixes cylinders and motors: no single unit", field=field)
    count = None
    if n_txt is not None:
        if not re.fullmatch(r"[+-]?\d+", n_txt):
            raise HeatloadError(f"N must be a whole number, got {n_txt!r}", field=field)
        count = int(n_txt)
        if count < 1:
            raise HeatloadError(f"N must be >= 1, got {count}", field=field)
    elif need_count:
        raise HeatloadError("give the number of values, e.g. ...:8", field=field)
    lo_num, lo_unit = _split(lo_txt)
    hi_num, hi_unit = _split(hi_txt)
    if lo_num is None or hi_num is None:
        raise HeatloadError("LOW and HIGH must be numbers with an optional unit", field=field)
    lo_unit = lo_unit or hi_unit
    hi_unit = hi_unit or lo_unit
    kind = ref.kind
    try:
        low = units.to_si(f"{lo_num} {lo_unit}".strip(), kind, field=field)
        high = units.to_si(f"{hi_num} {hi_unit}".strip(), kind, field=field)
    except HeatloadError as exc:
        raise HeatloadError(f"{exc.message} (the field {path} is {units.KINDS[kind].noun})",
                            field=field) from None
    if low > high:
        raise HeatloadError(f"LOW must not exceed HIGH ({lo_txt} > {hi_txt})", field=field)
    return VarySpec(path=ref.path, low=low, high=high, count=count, kind=kind, text=text)


#: Most rows (variants x strategies) one sweep evaluates: about 0.5 GB of results
#: in memory; a larger study is several sweeps.
MAX_SWEEP_ROWS = 2_000_000


def check_size(specs, samples, strategies: int) -> int:
    """The number of variants, refused beyond :data:`MAX_SWEEP_ROWS` rows before
    anything is computed."""
    n = samples if samples is not None else math.prod(s.count for s in specs)
    if n < 1:
        raise HeatloadError(f"must be >= 1, got {n}", field="--samples")
    if n * strategies > MAX_SWEEP_ROWS:
        from heatload.outputs.tables import count
        raise HeatloadError(f"{n:,} variants x {count(strategies, 'strategy')} is more than the "
                            f"{MAX_SWEEP_ROWS:,} rows one sweep evaluates; use fewer values "
                            "or fewer strategies", field="--samples" if samples else "--vary")
    return n


def check_corners(scenario, specs) -> None:
    """Refuse a range that reaches a machine the loader would refuse.

    The variants at the corners of the ranges (every combination of LOW and
    HIGH for up to four paths, else each path alone at its ends) go through the
    loader's own checks (:func:`heatload.io.scenario_from_dict`), so a sweep
    holds the same limits as a file.  The limits are monotone in each field
    (areas, volumes, temperatures), so the corners bound the whole range.
    """
    import itertools

    from heatload import io, paths, units

    if len(specs) <= 4:
        corners = [dict(zip(specs, c)) for c in itertools.product(*[(s.low, s.high)
                                                                    for s in specs])]
    else:
        corners = [{s: v} for s in specs for v in (s.low, s.high)]
    for corner in corners:
        sc = paths.replaced_scenario(scenario, {s.path: v for s, v in corner.items()})
        try:
            io.scenario_from_dict(io.scenario_to_dict(sc), "--vary")
        except HeatloadError as exc:
            at = ", ".join(f"{s.path} = {units.format_quantity(v, s.kind)}"
                           for s, v in corner.items())
            raise HeatloadError(f"the variant with {at} is no machine the loader accepts: "
                                f"{exc.field + ': ' if exc.field else ''}{exc.message}",
                                field="--vary") from None


def grid_values(specs) -> dict:
    """Full grid (every combination) of the specs: path -> (N,) SI values."""
    axes = [np.linspace(s.low, s.high, s.count) for s in specs]
    mesh = np.meshgrid(*axes, indexing="ij")
    return {s.path: m.ravel() for s, m in zip(specs, mesh)}


def sample_values(specs, samples: int, seed: int) -> dict:
    """*samples* variants drawn uniformly in the ranges (numpy ``default_rng(seed)``)."""
    if samples < 1:
        raise HeatloadError(f"must be >= 1, got {samples}", field="--samples")
    rng = np.random.default_rng(seed)
    return {s.path: rng.uniform(s.low, s.high, samples) for s in specs}


def pareto_front(x, y) -> np.ndarray:
    """Mask of the points no other point dominates, minimising both *x* and *y*.

    Point i is dominated when some j has x_j <= x_i and y_j <= y_i with one
    of them strict.  Sorted by x then y, a point is on the front exactly
    when its y is below every y before it (equal points share their fate).
    O(n log n).  NaN points are never on the front.

    Parameters
    ----------
    x, y : array_like
        Objectives, shape (n,).

    Returns
    -------
    ndarray of bool, shape (n,)
    """
    x = np.asarray(x, float).ravel()
    y = np.asarray(y, float).ravel()
    if x.shape != y.shape:
        raise HeatloadError("x and y need the same length", field="pareto_front")
    out = np.zeros(x.size, dtype=bool)
    ok = np.isfinite(x) & np.isfinite(y)
    if not ok.any():
        return out
    idx = np.nonzero(ok)[0]
    order = np.lexsort((y[idx], x[idx]))           # by x, then y
    xs, ys = x[idx][order], y[idx][order]
    # each point against the lowest y of the points before its group of equals
    new = np.ones(xs.size, dtype=bool)
    new[1:] = (xs[1:] != xs[:-1]) | (ys[1:] != ys[:-1])
    start = np.maximum.accumulate(np.where(new, np.arange(xs.size), 0))
    prev_min = np.concatenate([[np.inf], np.minimum.accumulate(ys)[:-1]])
    out[idx[order]] = ys < prev_min[start]
    return out


def run_sweep(scenario, values: dict, strategies, progress=False, chunk=CHUNK, thermal="design"):
    """Evaluate every variant for each strategy; returns a pandas DataFrame.

    *thermal* as in :func:`heatload.studies.variants.evaluate_variants`: ``"design"``
    (one solve per variant, the default) or True for the coupled oil
    temperature as well."""
    import pandas as pd

    from heatload.studies import variants

    n = len(next(iter(values.values()))) if values else 1
    frames = []
    bar = None
    total = n * len(strategies)
    if progress and total > chunk:
        from tqdm import tqdm
        bar = tqdm(total=total, unit="variant", file=sys.stderr, desc="sweep")
    try:
        for st in strategies:
            parts = variants.evaluate_chunks(scenario, st, values, n, chunk,
                                             done=None if bar is None else bar.update,
                                             thermal=thermal)
            # the chunks' arrays joined first: one table per strategy, not a
            # table per chunk joined by pandas (a copy of every column)
            res = variants.concat(parts)
            parts.clear()               # the chunks' arrays freed before the frame copies
            df = res.frame()
            del res
            df.insert(0, "variant", np.arange(len(df)))
            frames.append(df)
    finally:
        if bar is not None:
            bar.close()
    df = frames[0] if len(frames) == 1 else pd.concat(frames, ignore_index=True)
    return rank_variants(file_frame(df, scenario, values), scenario, strategies)


#: The decision's columns of the sweep's table (:func:`rank_variants`): money in
#: the scenario's currency, as ``cost_per_year``.
DECISION_COLUMNS = ("feasible", "rank", "cost_of_ownership_per_year",
                    "cost_of_ownership_per_cycle")


def rank_variants(df, scenario, strategies):
    """Add the decision (:mod:`heatload.decision`) to the sweep's table *df*, in place:

    - ``feasible``: no phase stalls, misses its speed, runs away, exceeds a
      rating or overloads the motor (:func:`heatload.decision.feasible_counts`
      of the ``warnings_<code>`` columns);
    - ``cost_of_ownership_per_year`` (C) [currency/year]:
      :func:`heatload.decision.variant_yearly_cost`;
    - ``cost_of_ownership_per_cycle`` = C / (h 3600 / t_cycle) [currency]: per
      part made, so a slower variant (fewer parts in the same hours) is not
      flattered; NaN where the cycle takes no time;
    - ``rank``: 1 = best, feasible first, then by the cost per cycle
      (:func:`heatload.decision.rank_order`; infeasible rows after every
      feasible one, ties in the table's order).

    The command's text lists the rows in this rank order; sorting the file by
    ``rank`` gives the same order.

    Parameters
    ----------
    df : pandas.DataFrame
        The table of :func:`run_sweep` (its columns as the file holds them).
    scenario : heatload.model.Scenario
    strategies : sequence
        The swept strategies (their ``parameters.price``).

    Returns
    -------
    pandas.DataFrame
        *df*, with the columns of :data:`DECISION_COLUMNS`.
    """
    from heatload import decision

    feasible = decision.feasible_counts(
        {c[len("warnings_"):]: df[c].to_numpy() for c in df.columns if c.startswith("warnings_")})
    feasible = np.ones(len(df), bool) & feasible     # no warnings columns: all feasible
    # each row's circuit price by its strategy: the names factorized once (a
    # dict lookup per row cost a 10^6-row table half a second)
    import pandas as pd
    codes, names = pd.factorize(df["strategy"])
    prices = {s.name: s.parameters.price for s in strategies}
    price = np.array([np.nan if prices.get(k) is None else prices[k] for k in names],
                     float)[codes]
    hours = (df["economics.hours_per_year"].to_numpy() if "economics.hours_per_year" in df
             else scenario.economics.hours_per_year)   # a plain number: no suffix
    cycles = hours * 3600.0 / df["cycle_time_s"].to_numpy()
    yearly = decision.variant_yearly_cost(df["cost_per_year"].to_numpy(),
                                          df["cooler_duty_W"].to_numpy(), price, scenario)
    per_cycle = yearly / np.where(cycles > 0, cycles, np.nan)
    order = decision.rank_order(feasible, per_cycle)
    rank = np.empty(len(df), np.int64)
    rank[order] = np.arange(1, len(df) + 1)
    df["feasible"] = feasible
    df["rank"] = rank
    df["cost_of_ownership_per_year"] = yearly
    df["cost_of_ownership_per_cycle"] = per_cycle
    return df


def rank_order(df) -> np.ndarray:
    """Row indices of the sweep's table *df* in its ``rank`` order (best first)."""
    rank = df["rank"].to_numpy()
    order = np.empty(rank.size, np.int64)
    order[rank - 1] = np.arange(rank.size)
    return order


def file_frame(df, scenario, values):
    """The sweep's table as its files hold it: each varied column named with
    its unit and in it (:func:`heatload.units.file_name`, ``file_value``: SI,
    absolute temperatures in degC), like every other column."""
    from heatload.paths import resolve_path
    from heatload.units import file_name, file_value

    names = {}
    for p in values:
        kind = resolve_path(scenario, p).kind
        df[p] = file_value(df[p], kind)
        names[p] = file_name(p, kind)
    return df.rename(columns=names)


def varied_column(spec) -> str:
    """The column of a varied path in :func:`run_sweep`'s table."""
    from heatload.units import file_name
    return file_name(spec.path, spec.kind)


#: Extensions ``heatload sweep -o`` writes.
TABLE_SUFFIXES = (".csv", ".parquet")


def check_table_path(path, force=False) -> Path:
    """Refuse a ``heatload sweep -o`` target before the sweep runs: an extension
    other than .csv / .parquet, a folder, pipe or device (even with *force*),
    an existing file without *force*, Parquet without its writer."""
    p = outputs.check_output(path, "--output", force=force, suffixes=TABLE_SUFFIXES)
    if p.suffix.lower() == ".parquet":
        try:
            import pyarrow  # noqa: F401  (pandas' Parquet engine)
        except ImportError:
            raise HeatloadError("writing .parquet needs the 'pyarrow' package "
                                "(pip install pyarrow), or write .csv", field="--output") from None
    return p


def write_table(df, path, force=False) -> Path:
    """Write *df* to CSV or Parquet (by suffix) atomically; refuse to
    overwrite an existing file unless *force*.  In CSV, text cells a
    spreadsheet would run as a formula get a leading quote
    (:func:`heatload.io.files.to_csv`); Parquet keeps the values as they are
    (typed data, not opened as a spreadsheet)."""
    p = check_table_path(path, force)
    if p.suffix.lower() == ".csv":
        def write(tmp):
            outputs.to_csv(df, tmp)
    else:
        # dictionary encoding only for the text columns: tried on every float
        # column it costs most of the write and gives nothing back
        import pandas as pd
        text = [c for c in df.columns if not pd.api.types.is_numeric_dtype(df[c])]

        def write(tmp):
            df.to_parquet(tmp, index=False, engine="pyarrow", use_dictionary=text)
    return outputs.write_atomic(p, write, "--output", force=force)
