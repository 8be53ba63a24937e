"""Server-side time of the dashboard's recompute after an edit.

Runs the state callback's plain function (``heatload.dashboard.callbacks.update_scenario``)
as a phase-table edit would: parse the form, validate the scenario, compare
every strategy, build the stored results.  50 edits of the forming load of the
default scenario, each a new value (so nothing is reused), after one warm-up.
Prints median and p95 of the whole recompute (every strategy: what an edit
costs with the comparison or payback in view) and of its parts, measured side
by side; the recompute of an edit made on a tab that shows one strategy (that
strategy first, the rest when a view needs them); and the views computed on
demand (shift temperature, cooler sizing).

    .venv/bin/python benchmarks/bench_dashboard.py [--edits N]
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import numpy as np  # noqa: E402

from heatload.dashboard import app as dash_app  # noqa: E402
from heatload.dashboard import callbacks, compute, state  # noqa: E402
from heatload import chain, io
from heatload.outputs import tables


def _stats(xs):
    a = np.asarray(xs) * 1e3
    return statistics.median(a), float(np.percentile(a, 95)), float(a.min())


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--edits", type=int, default=50)
    args = ap.parse_args(argv)

    examples = dash_app.scenario_choices()[2]
    sc = io.load_scenario(io.default_scenario_path())
    data = io.scenario_to_dict(sc)
    form = state.render_form(data, "si")
    store = {"data": data, "source": "forming_press.toml"}
    results = compute.compute_results(sc)          # warm-up (imports, tables)

    full, form_part, compare_part, tables_part, visible = [], [], [], [], []
    for i in range(args.edits):
        rows = [dict(r) for r in form["phase_rows"]]
        rows[2]["load"] = f"{101 + 0.5 * i:g}"      # kN (stored: 100), new every edit
        t0 = time.perf_counter()
        out = callbacks.update_scenario("phase-table", None, None, None, "si", rows,
                                        form["actuator_rows"], form["key_values"], store,
                                        results, examples)
        full.append(time.perf_counter() - t0)
        if out["results"] is callbacks.no_update:
            raise SystemExit(f"edit {i} did not recompute: {out['form_errors']}")
        # the same edit made on a tab that shows one strategy (the default tab)
        t0 = time.perf_counter()
        part = callbacks.update_scenario("phase-table", None, None, None, "si", rows,
                                         form["actuator_rows"], form["key_values"], store,
                                         results, examples, tab="cycle", strategy="meter-in")
        visible.append(time.perf_counter() - t0)
        if part["results"]["complete"]:
            raise SystemExit("the one-strategy path computed everything")
        # the same work in parts
        t0 = time.perf_counter()
        scn, _, errors = state.apply_form(data, rows, form["actuator_rows"],
                                          form["key_values"], "si")
        io.scenario_to_dict(scn)
        t1 = time.perf_counter()
        cmp = chain.compare(scn)
        t2 = time.perf_counter()
        tables.comparison_dict(cmp)
        {o.name: tables.savings_against(cmp, o.name) for o in cmp.outcomes}
        t3 = time.perf_counter()
        form_part.append(t1 - t0)
        compare_part.append(t2 - t1)
        tables_part.append(t3 - t2)

    print(f"dashboard recompute after an edit, {args.edits} edits "
          f"(forming press, {len(sc.strategies)} strategies, {len(sc.phases)} phases)")
    print(f"{'part':<44}{'median ms':>10}{'p95 ms':>10}{'min ms':>10}")
    for name, xs in (("full recompute, all strategies", full),
                     ("  form parse + validate + canonical dict", form_part),
                     ("  chain.compare (engine)", compare_part),
                     ("  comparison_dict + savings", tables_part)):
        med, p95, lo = _stats(xs)
        print(f"{name:<44}{med:>10.1f}{p95:>10.1f}{lo:>10.1f}")
    med, p95, lo = _stats(visible)
    print(f"{'visible first: the shown strategy only':<44}{med:>10.1f}{p95:>10.1f}{lo:>10.1f}")
    share = statistics.median(compare_part) / statistics.median(full)
    print(f"engine share of the recompute: {100 * share:.0f} %")

    # views computed only when their tab is open
    for name, fn in (("shift temperature view (1 strategy)",
                      lambda: callbacks.shift_view(data, "meter-in", "si")),
                     ("cooler sizing view (1 strategy)",
                      lambda: callbacks.cooler_view(data, "meter-in", "si"))):
        ts = []
        for _ in range(5):
            t0 = time.perf_counter()
            fn()
            ts.append(time.perf_counter() - t0)
        med, p95, lo = _stats(ts)
        print(f"{name:<44}{med:>10.1f}{p95:>10.1f}{lo:>10.1f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
