"""The recompute: a validated scenario in, plain JSON-ready results out.

Everything the figures need is taken from :func:`heatload.outputs.tables.comparison_dict`
(the same numbers as ``heatload compare --json``) and
:func:`heatload.outputs.tables.savings_against`; nothing is kept on the server
between requests (the results travel to the page's ``dcc.Store``).
Views that need the engine's objects (temperature over a shift, cooler
sizing) rebuild the one strategy they show from the stored scenario.
"""

from __future__ import annotations

import hashlib
import json
import math

import numpy as np

from heatload import chain, io
from heatload.outputs import tables
from heatload.errors import HeatloadError


def plain(x):
    """A JSON-safe copy of *x* (numpy scalars and arrays to Python; NaN/inf to None)."""
    if isinstance(x, dict):
        return {str(k): plain(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [plain(v) for v in x]
    if isinstance(x, np.ndarray):
        return [plain(v) for v in x.tolist()]
    if isinstance(x, (bool, np.bool_)):
        return bool(x)
    if isinstance(x, (int, np.integer)):
        return int(x)
    if isinstance(x, (float, np.floating)):
        v = float(x)
        return v if math.isfinite(v) else None
    return x


#: Tabs whose content needs every strategy (the others show one at a time).
NEEDS_ALL = ("decision", "comparison", "payback")


def strategy_names(data: dict) -> list:
    """Names of a stored scenario's strategies, in its order (label or kind)."""
    return [s.get("label") or s["kind"] for s in data.get("strategies", [])]


def compute_results(scenario, source=None, only=None, key=None) -> dict:
    """Compare the strategies of *scenario* and return the stored results.

    Parameters
    ----------
    only : str, optional
        Compute just this strategy (the one in view); the results are then
        marked ``complete: False`` and completed when a view needs the rest.
    key : str, optional
        :func:`scenario_key` of the stored scenario dict, kept with the results.

    Returns
    -------
    dict
        ``comparison`` (:func:`heatload.outputs.tables.comparison_dict`, with phases),
        ``savings`` ({baseline: {strategy: {energy_saving_kWh, cost_saving,
        co2_saving_kg}}} for every baseline; empty while incomplete), ``name``,
        ``complete``.
    """
    names = [s.name for s in scenario.strategies]
    partial = only is not None and only in names and len(names) > 1
    cmp = chain.compare(scenario, strategies=[only] if partial else None)
    savings = ({} if partial else
               {o.name: tables.savings_against(cmp, o.name) for o in cmp.outcomes})
    return plain({"comparison": tables.comparison_dict(cmp, source=source),
                  "savings": savings, "name": scenario.name, "complete": not partial,
                  "key": key})


def scenario_key(data: dict) -> str:
    """A digest of a stored scenario dict: results carry the key of the
    scenario they were computed from, so a late answer for an older edit is
    recognised and never shown as the current one."""
    text = json.dumps(data, sort_keys=True, ensure_ascii=True, default=str)
    return hashlib.sha256(text.encode()).hexdigest()[:24]


def matches(results: dict | None, store: dict | None) -> bool:
    """Whether *results* were computed from the scenario in *store*."""
    if not results or not store or "data" not in store:
        return False
    key = results.get("key")
    return key is None or key == scenario_key(store["data"])


def needs_completion(results: dict | None, tab: str | None, strategy: str | None) -> bool:
    """Whether the view in front needs strategies the stored results lack."""
    if not results or results.get("complete", True):
        return False
    have = {r["label"] for r in results["comparison"]["strategies"]}
    return tab in NEEDS_ALL or (strategy is not None and strategy not in have)


def scenario_of(data: dict, source: str = "dashboard"):
    """The :class:`~heatload.model.Scenario` of a stored scenario dict."""
    return io.scenario_from_dict(data, source=source)


def strategy_outcome(data: dict, strategy: str):
    """Scenario and one strategy's :class:`~heatload.chain.StrategyOutcome`."""
    scenario = scenario_of(data)
    try:
        st = scenario.strategy(strategy)
    except KeyError:
        raise HeatloadError(f"unknown strategy {strategy!r}", field="strategy") from None
    return scenario, chain.evaluate_strategy(scenario, st)


def downsample(times, values, points: int = 1500):
    """At most about *points* samples of a long series, keeping each bucket's
    minimum and maximum so the within-cycle ripple's envelope survives."""
    t = np.asarray(times, float)
    v = np.asarray(values, float)
    if t.size <= points:
        return t, v
    buckets = max(points // 2, 1)
    edges = np.linspace(0, t.size, buckets + 1).astype(int)
    keep = []
    for a, b in zip(edges[:-1], edges[1:]):
        if b <= a:
            continue
        seg = v[a:b]
        i, j = a + int(np.argmin(seg)), a + int(np.argmax(seg))
        keep.extend(sorted({i, j}))
    keep = np.unique(np.r_[0, keep, t.size - 1])
    return t[keep], v[keep]
