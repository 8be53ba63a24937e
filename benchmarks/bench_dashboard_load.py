"""Load on the dashboard server: concurrent browser sessions editing over HTTP.

Serves the real app (``dashboard.app.make_app()``) on 127.0.0.1 and a free
port with the threaded server ``app.run`` uses, then runs N sessions at once,
each opening the page and posting M recomputes of its own forming load to
``/_dash-update-component`` exactly as the page does (the driver and its
checks are those of ``tests/test_dashboard_load.py``).  Every answer is
checked to carry that session's own edit; a wrong or failed answer counts as
an error.  Prints clients, requests, errors, latency p50 / p95 / max and the
throughput, for edits made on the cycle tab (the strategy in view computed
first, as the page does) and with the comparison in view (all seven).

    .venv/bin/python benchmarks/bench_dashboard_load.py [--clients 20] [--edits 50]
        [--comparison-edits 10] [--deadline 300]
"""

from __future__ import annotations

import argparse
import importlib.util
import json
import os
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))


def _driver():
    """The HTTP driver of tests/test_dashboard_load.py (one source for both)."""
    spec = importlib.util.spec_from_file_location("dashboard_load_driver",
                                                  ROOT / "tests" / "test_dashboard_load.py")
    mod = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = mod        # dataclasses look their module up there
    spec.loader.exec_module(mod)
    return mod


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--clients", type=int, default=20)
    ap.add_argument("--edits", type=int, default=50, help="edits per client, cycle tab")
    ap.add_argument("--comparison-edits", type=int, default=10,
                    help="edits per client with the comparison in view (0: skip)")
    ap.add_argument("--deadline", type=float, default=300.0,
                    help="global deadline of each run [s]")
    args = ap.parse_args(argv)
    if args.clients < 1 or args.edits < 1 or args.comparison_edits < 0:
        ap.error("--clients and --edits must be >= 1, --comparison-edits >= 0")

    d = _driver()
    srv = d.DashServer().start()
    try:
        print(f"dashboard on {srv.url}; {os.cpu_count()} CPU(s); "
              f"{args.clients} sessions at once")
        # the size of what one edit posts (the page sends its stores back as state)
        b = d.Browser(srv.url)
        main_cb = b.start_session()
        body = len(json.dumps(b.payload(main_cb, ["phase-table.data"])))
        rows = []
        runs = [("cycle", args.edits)]
        if args.comparison_edits:
            runs.append(("comparison", args.comparison_edits))
        for tab, edits in runs:
            t0 = time.perf_counter()
            res = d.run_load(srv.url, clients=args.clients, edits=edits,
                             deadline_s=args.deadline, tab=tab)
            rows.append((tab, res.summary()))
            print(f"  {tab}: {time.perf_counter() - t0:.1f} s including page loads",
                  file=sys.stderr)
            for k, i, problem in res.errors[:5]:
                print(f"  error client {k} edit {i}: {problem}", file=sys.stderr)
        print()
        print(d.format_table(rows))
        print(f"\none edit's request body with the cycle tab's results: {body / 1e3:.0f} kB")
        errors = sum(s["errors"] for _, s in rows)
        return 1 if errors else 0
    finally:
        srv.stop()


if __name__ == "__main__":
    sys.exit(main())
