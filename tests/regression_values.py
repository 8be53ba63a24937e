"""The figures the speed work must not change: every example and strategy
through ``chain.compare``, design-variant sweeps in the three thermal modes,
the shift's temperature runs and a small Monte Carlo.

``tests/data/regression_figures.json`` holds these figures as computed by the
code before the speed changes (``scripts/make_regression_fixture.py``).  It is a
regression fixture, not a check value: it says only that a faster path gives
the figures the slower one gave (to 1e-12 relative); the physics is checked
against outside sources elsewhere.  Regenerate it, in its own commit, only
when a change of the physics is meant to move these figures.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = sorted((ROOT / "duty_cycles").glob("*.toml"))
#: varied in the sweeps (7 variants each)
SWEEP_PATH = "power_unit.pump.displacement"
SWEEP_FACTORS = np.linspace(0.7, 1.6, 7)


def _plain(v):
    """JSON-ready: floats as lists, None kept, dicts recursively."""
    if v is None or isinstance(v, (str, bool)):
        return v
    if isinstance(v, dict):
        return {str(k): _plain(x) for k, x in v.items()}
    a = np.asarray(v)
    if a.dtype == bool:
        return a.astype(int).tolist()
    if a.dtype.kind in "iuf":
        return a.astype(float).tolist()
    return None


def _circuit(r):
    out = {}
    for f in dataclasses.fields(r):
        v = getattr(r, f.name)
        if f.name != "strategy":
            out[f.name] = _plain(v)
    return out


def figures() -> dict:
    """{example: {...}}: every figure named above, as plain JSON data."""
    from heatload import chain, io
    from heatload.studies import uncertainty, variants

    data = {}
    for path in EXAMPLES:
        sc = io.load_scenario(path)
        cmp = chain.compare(sc)
        ex = {"compare": {}, "sweep": {}}
        for o in cmp.outcomes:
            th = {f.name: _plain(getattr(o.thermal, f.name))
                  for f in dataclasses.fields(o.thermal)}
            ex["compare"][o.name] = {
                "thermal": th,
                "circuit": _circuit(o.circuit),
                "circuit_uncoupled": _circuit(o.circuit_uncoupled),
                "energy": {f.name: _plain(getattr(o.energy, f.name))
                           for f in dataclasses.fields(o.energy)},
                "warnings": sorted(w.code for w in o.warnings),
            }
        nominal = sc.power_unit.pump.displacement
        for s in sc.strategies:
            for thermal in (True, "design", False):
                r = variants.evaluate_variants(sc, s.name, {SWEEP_PATH: nominal * SWEEP_FACTORS},
                                               thermal=thermal)
                ex["sweep"][f"{s.name}/{thermal}"] = {
                    f.name: _plain(getattr(r, f.name)) for f in dataclasses.fields(r)
                    if f.name not in ("strategy", "values", "thermal")}
        ex["shift"] = {}
        for o in cmp.outcomes:
            for on in (False, True):
                r = chain.shift_profile(sc, o, cooler_on=on)
                # every 50th sample and the last: the run's path, kept small
                keep = np.r_[np.arange(0, len(r.times), 50), len(r.times) - 1]
                ex["shift"][f"{o.name}/{'cooler' if on else 'no cooler'}"] = {
                    "times": _plain(np.asarray(r.times)[keep]),
                    "temperatures": _plain(np.asarray(r.temperatures)[keep])}
        mc = uncertainty.monte_carlo(sc, sc.strategies[0].name, samples=300, seed=3)
        ex["monte_carlo"] = {"cooler_duty": _plain(mc.cooler_duty),
                             "oil_temperature": _plain(mc.oil_temperature)}
        data[path.name] = ex
    return data
