"""Load on the dashboard server: concurrent browser sessions editing over HTTP.

Serves the real app (``heatload.dashboard.app.make_app()``) on 127.0.0.1 and a free
port with the threaded server ``app.run`` uses, then runs N sessions at once,
each opening the page and posting M recomputes of its own forming load to
``/_dash-update-component`` exactly as the page does (the driver and its
checks are those of ``tests/test_dashboard_load.py``).  Every answer is
checked to carry that session's own edit; a wrong or failed answer counts as
an error.  Prints clients, requests, errors, latency p50 / p95 / max and the
throughput, for edits made on the cycle tab (the strategy in view computed
first, as the page does), with the comparison in view (all seven), and on the
cycle tab with the views that read the new results fired after each edit (the
latency is then the recompute plus those views, one after the other).  Then,
one session alone: each callback's latency after an edit; the views' time for
files with more phases; the time to refuse an upload whose one dotted key has
many parts, and another session's edit latency meanwhile.

    .venv/bin/python benchmarks/bench_dashboard_load.py [--clients 20] [--edits 50]
        [--comparison-edits 10] [--view-edits 5] [--phases 0 12 36 60]
        [--nested 25000 50000 100000] [--deadline 300]
"""

from __future__ import annotations

import argparse
import importlib.util
import copy
import json
import os
import sys
import threading
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


def _edit(d, b, main_cb, load_kN):
    rows = copy.deepcopy(b.value("phase-table", "data"))
    rows[d.PHASE]["load"] = f"{load_kN:g}"
    ans = b.post(main_cb, ["phase-table.data"], {("phase-table", "data"): rows})
    if d.check_edit(ans, load_kN * 1e3):
        raise SystemExit(f"edit failed: {d.check_edit(ans, load_kN * 1e3)}")
    return ans.latency


def nested_upload_table(d, url, sizes) -> str:
    """Time to refuse an upload of one table header with *n* dotted parts
    (``[a.a.a...]``, 2n bytes), and the latency of another session's edit sent
    while the server parses it (both sessions share the server's CPU)."""
    other = d.Browser(url)
    other_cb = other.start_session()
    quiet = [_edit(d, other, other_cb, 70 + 0.1 * j) for j in range(5)]
    lines = [f"{'dotted parts':>14}  {'upload [kB]':>11}  {'refused in [s]':>14}  "
             f"{'other edit [ms]':>15}  (other edit alone: {1e3 * min(quiet):.0f} ms)"]
    for j, n in enumerate(sizes):
        b = d.Browser(url)
        cb = b.start_session()
        raw = b"[" + b".".join([b"a"] * n) + b"]\n"
        got = {}

        def upload():
            ans = b.post(cb, ["upload.contents"], {("upload", "contents"): d._data_url(raw),
                                                   ("upload", "filename"): "nested.toml"})
            got["ans"] = ans

        t = threading.Thread(target=upload, daemon=True)
        t.start()
        time.sleep(0.2)                 # the upload is being parsed
        during = _edit(d, other, other_cb, 75 + 0.1 * j) if t.is_alive() else float("nan")
        t.join(timeout=d.REQUEST_TIMEOUT[1] + 5)
        ans = got.get("ans")
        ok = ans is not None and ans.status == 200 and d._span_text(
            ans.prop("upload-message", "children")).startswith("Upload refused")
        lines.append(f"{n:>14,}  {len(raw) / 1e3:>11.0f}  "
                     f"{(ans.latency if ans else float('nan')):>14.2f}  {1e3 * during:>15.0f}"
                     + ("" if ok else "  NOT REFUSED"))
    return "\n".join(lines)


def _short(output: str) -> str:
    return output.strip(".").split("...")[0].split("@")[0]


def views_table(d, url, edits: int = 5) -> str:
    """One session alone: each callback's latency after an edit on the cycle
    tab (the recompute, then the views that read the new stores)."""
    b = d.Browser(url)
    main_cb = b.start_session()
    seen = {}
    for j in range(edits):
        rows = copy.deepcopy(b.value("phase-table", "data"))
        rows[d.PHASE]["load"] = f"{80 + 0.1 * j:g}"
        ans = b.post(main_cb, ["phase-table.data"], {("phase-table", "data"): rows})
        for a in [ans, *b.follow(ans, main_cb)]:
            seen.setdefault(_short(a.output), []).append((a.latency, a.status))
    lines = [f"{'callback (first output)':>28}  {'calls':>5}  {'median [ms]':>11}  "
             f"{'max [ms]':>8}  status"]
    for name, xs in sorted(seen.items(), key=lambda kv: -max(x for x, _ in kv[1])):
        lat = sorted(x for x, _ in xs)
        lines.append(f"{name:>28}  {len(xs):>5}  {1e3 * lat[len(lat) // 2]:>11.0f}  "
                     f"{1e3 * lat[-1]:>8.0f}  {sorted({st for _, st in xs})}")
    return "\n".join(lines)


def phases_table(d, url, extra_phases) -> str:
    """Open a file with more phases (copies of the forming phase) by upload and
    time the views that redraw for it, one session alone."""
    lines = [f"{'phases':>6}  {'upload [kB]':>11}  {'open [ms]':>9}  {'cycle-graph [ms]':>16}  "
             f"{'all views [ms]':>14}"]
    for n in extra_phases:
        raw = d.many_phases_file(n)
        b = d.Browser(url)
        main_cb = b.start_session()
        ans = b.post(main_cb, ["upload.contents"], {("upload", "contents"): d._data_url(raw),
                                                    ("upload", "filename"): "many.toml"})
        if ans.status != 200 or not ans.has("results-store", "data"):
            lines.append(f"{12 + n:>6}  upload not opened: HTTP {ans.status}")
            continue
        views = b.follow(ans, main_cb)
        cyc = [v.latency for v in views if _short(v.output) == "cycle-graph.figure"]
        bad = [v.status for v in views if v.status not in (200, 204)]
        lines.append(f"{12 + n:>6}  {len(raw) / 1e3:>11.0f}  {1e3 * ans.latency:>9.0f}  "
                     f"{1e3 * max(cyc, default=float('nan')):>16.0f}  "
                     f"{1e3 * sum(v.latency for v in views):>14.0f}"
                     + (f"  HTTP {bad}" if bad else ""))
    return "\n".join(lines)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--clients", type=int, default=20)
    ap.add_argument("--edits", type=int, default=50, help="edits per client, cycle tab")
    ap.add_argument("--comparison-edits", type=int, default=10,
                    help="edits per client with the comparison in view (0: skip)")
    ap.add_argument("--view-edits", type=int, default=5,
                    help="edits per client that also fire the views reading the new "
                         "results, as the page does (0: skip)")
    ap.add_argument("--phases", type=int, nargs="*", default=[0, 12, 36, 60],
                    help="extra phases of the files whose views are timed (none: skip)")
    ap.add_argument("--deadline", type=float, default=300.0,
                    help="global deadline of each run [s]")
    ap.add_argument("--nested", type=int, nargs="*", default=[25_000, 50_000, 100_000],
                    help="parts of the dotted-key upload to time (none: skip)")
    args = ap.parse_args(argv)
    if args.clients < 1 or args.edits < 1 or min(args.comparison_edits, args.view_edits) < 0:
        ap.error("--clients and --edits must be >= 1, --comparison-edits and "
                 "--view-edits >= 0")

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
        runs = [("cycle", "cycle", args.edits, False)]
        if args.comparison_edits:
            runs.append(("comparison", "comparison", args.comparison_edits, False))
        if args.view_edits:
            runs.append(("cycle + views", "cycle", args.view_edits, True))
        for label, tab, edits, follow in runs:
            t0 = time.perf_counter()
            res = d.run_load(srv.url, clients=args.clients, edits=edits,
                             deadline_s=args.deadline, tab=tab, follow=follow)
            rows.append((label, res.summary()))
            print(f"  {label}: {time.perf_counter() - t0:.1f} s including page loads",
                  file=sys.stderr)
            for k, i, problem in res.errors[:5]:
                print(f"  error client {k} edit {i}: {problem}", file=sys.stderr)
        print()
        print(d.format_table(rows))
        print(f"\none edit's request body with the cycle tab's results: {body / 1e3:.0f} kB")
        print()
        print(views_table(d, srv.url))
        if args.phases:
            print()
            print(phases_table(d, srv.url, args.phases))
        if args.nested:
            print()
            print(nested_upload_table(d, srv.url, args.nested))
        errors = sum(s["errors"] for _, s in rows)
        return 1 if errors else 0
    finally:
        srv.stop()


if __name__ == "__main__":
    sys.exit(main())
