"""``heatload trace``: a pressure trace cut into phases, written as a draft duty-cycle file."""

from __future__ import annotations

from heatload.errors import HeatloadError
from heatload.measurement.trace import (MIN_ROWS, check_trace, _fmt, cycle_record, draft_toml,
                                        segment_trace, trace_columns)


def run(args) -> int:
    """``heatload trace TRACE.csv -o draft.toml [--column KEY=NAME] [--unit KEY=UNIT]
    [--name TEXT] [--min-phase T] [--json] [--force]``."""
    import json

    from heatload.measurement import logs
    from heatload.io import files as outputs
    from heatload.units import to_si

    out = args.output
    if out:
        outputs.check_output(out, "--output", force=args.force, suffixes=(".toml",))
    min_d = (to_si(args.min_phase, "time", field="--min-phase") if args.min_phase else None)
    if min_d is not None and not min_d > 0:
        raise HeatloadError("must be positive", field="--min-phase")
    log = logs.read_log(args.trace, trace_columns(),
                        logs.parse_assignments(args.column, "--column"),
                        logs.parse_assignments(args.unit, "--unit"), min_rows=MIN_ROWS)
    check_trace(log)
    cycle = segment_trace(log.time, log.values["pressure"], log.values.get("flow"),
                          log.values.get("position"), min_d)
    cycle.notes[:0] = log.notes
    text = draft_toml(cycle, args.trace, args.name)
    if out:
        def write(tmp):
            with open(tmp, "w", encoding="utf-8", newline="\n") as fh:
                fh.write(text)
        outputs.write_atomic(out, write, "--output", force=args.force)
    if args.json:
        rec = cycle_record(cycle)
        rec.update(file=str(args.trace), columns=dict(log.headers), draft=str(out) if out
                   else None)
        print(json.dumps(rec, indent=2, ensure_ascii=False, allow_nan=False))
        return 0
    from heatload.cli import _table
    from heatload.measurement.trace import LEVELS
    from heatload.outputs.tables import terminal_width, wrap_line

    def say(line):
        # the summary fits the terminal; the draft below keeps its own lines (a file)
        print("\n".join(wrap_line(line, terminal_width())))

    say(f"{args.trace} — {len(log)} samples over {log.time[-1]:.4g} s; {cycle.cycles} "
        f"cycle{'s' if cycle.cycles != 1 else ''} of {cycle.period:.4g} s recognised")
    rows = []
    for i, ph in enumerate(cycle.phases, 1):
        rows.append([i, ph.kind, f"{ph.duration:.3g}", _fmt(ph.pressure, "pressure"),
                     _fmt(ph.flow, "flow") if ph.flow is not None else "-",
                     _fmt(abs(ph.travel), "length") if ph.kind in ("extend", "retract") else "-",
                     _fmt(ph.power, "power") if ph.power is not None else "-"])
    print(_table(["#", "phase", "t [s]", "pressure\n(median)", "flow\n(median)", "travel",
                  "hydraulic\npower (mean)"], rows))
    say(LEVELS)
    if cycle.energy_per_cycle is not None:
        say(f"Hydraulic energy per cycle {_fmt(cycle.energy_per_cycle, 'energy')}, mean "
            f"power {_fmt(cycle.mean_power, 'power')} (p x Q integrated over the trace)")
    for n in cycle.notes:
        say(f"  ! {n}")
    if out:
        say(f"wrote {out}: complete the values marked TO COMPLETE, then run "
            f"`heatload check {out}`")
    else:
        print(text)
    return 0
