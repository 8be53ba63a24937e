"""``heatload report``: the customer's HTML report and its spreadsheet exports."""

from __future__ import annotations

import time
from pathlib import Path

from heatload.outputs.report import (build_report, check_outputs, export_names, export_tables,
                                     parse_prices, report_data, write_csv, write_html,
                                     write_xlsx)
from heatload.outputs.wording import CAUTION


def run(args) -> int:
    """``heatload report [FILE] -o report.html [--xlsx F] [--csv DIR] [--present NAME]
    [--price NAME=AMOUNT ...] [--samples N] [--seed S] [--force]``."""
    from heatload import chain, io

    t0 = time.perf_counter()
    path = args.file or io.default_scenario_path()
    sc = io.load_scenario(path)
    prices = parse_prices(getattr(args, "price", None), sc)
    out = Path(args.output)
    # refuse before computing anything
    check_outputs(out, args.xlsx, args.csv, export_names(st.name for st in sc.strategies),
                  args.force)
    cmp = chain.compare(sc)
    cover = {k: getattr(args, k, None) for k in ("project", "customer", "prepared_by",
                                                 "revision", "date")}
    rd = report_data(sc, cmp, args.present, prices, str(path),
                     samples=getattr(args, "samples", None), seed=getattr(args, "seed", 1),
                     cover=cover, system=getattr(args, "units", None) or "si")
    text = build_report(sc, cmp, prepared=rd)
    write_html(text, out, args.force)
    if args.xlsx or args.csv:
        frames = export_tables(sc, cmp, rd)
        if args.xlsx:
            write_xlsx(frames, args.xlsx, args.force)
        if args.csv:
            write_csv(frames, args.csv, args.force)
    dt = time.perf_counter() - t0
    print(f"wrote {out} ({out.stat().st_size:,} bytes) in {dt:.1f} s"
          + (f"; {args.xlsx}" if args.xlsx else "") + (f"; {args.csv}/" if args.csv else ""))
    print(f"recommended: {rd['recommended']} ({rd['why']})")
    print(CAUTION)
    return 0
