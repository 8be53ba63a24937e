"""``heatload sweep``: a grid or seeded sample of variants; its table and fronts."""

from __future__ import annotations

import sys

import numpy as np

from heatload.errors import HeatloadError
from heatload.studies.sweep import (check_corners, check_size, check_table_path,
                                    grid_values, pareto_front, parse_vary, rank_order,
                                    run_sweep, sample_values, varied_column, write_table)


def _show(df, specs, system, rows, out, width=None):
    """Print the variants *rows* of *df* as a table fitted to *width* columns
    (None: every column): varied values and figures as plain numbers, units in
    the headers."""
    from heatload.outputs.tables import format_table, plain_number
    from heatload.units import display_unit, from_file, from_si, pretty_unit

    def column(kind, name):
        unit = display_unit(kind, system)
        return f"{name}\n[{pretty_unit(unit)}]" if unit else name, unit

    def value(v, kind, unit, digits=3):
        return plain_number(from_si(v, kind, unit) if unit else v, digits)

    def table(labels):
        varied = [column(s.kind, label) for s, label in zip(specs, labels)]
        cooler = column("power", "cooler")
        oil = column("temperature", "oil T,\nsteady")
        head = (["strategy"] + [h for h, _ in varied]
                + ["energy/\ncycle [kJ]", "cycle\n[s]", "energy/\nyr [kWh]", cooler[0],
                   oil[0], "warn-\nings"])
        lines = []
        for _, r in df.iloc[rows].iterrows():
            t_oil = from_file(r["oil_temperature_steady_C"]
                              if np.isfinite(r["oil_temperature_steady_C"])
                              else r["oil_temperature_uncoupled_C"], "temperature")
            lines.append([r["strategy"]]
                         + [value(from_file(r[varied_column(s)], s.kind), s.kind, u)
                            for s, (_, u) in zip(specs, varied)]
                         + [plain_number(r["electric_energy_per_cycle_J"] / 1e3, 4),
                            plain_number(r["cycle_time_s"], 3),
                            plain_number(r["electric_energy_per_year_kWh"], 4),
                            value(r["cooler_duty_W"], "power", cooler[1]),
                            value(t_oil, "temperature", oil[1]),
                            str(int(sum(r[c] for c in wcols)))])
        # the varied values and what the rank rests on stay: energy, cooler, strategy
        return format_table(head, lines, width,
                            optional=(head[-1], head[-5], head[-4], head[-2]))

    wcols = [c for c in df.columns if c.startswith("warnings_")]
    names = varied_names(specs)
    text = table([wrapped_name(n) for n in names])
    if width is not None and (max(len(x) for x in text.splitlines()) > width or "…" in text):
        # names too long to stand over their columns (or cutting the strategy's
        # name short): numbered, and named above the table
        for i, n in enumerate(names, 1):
            print(("varied:" if i == 1 else "").ljust(8) + f"({i}) {n}", file=out)
        text = table([f"({i})" for i in range(1, len(names) + 1)])
    print(text, file=out)


#: Characters of a header line of a varied field's name (a longer word stays whole).
LABEL_WIDTH = 10


def varied_names(specs) -> list:
    """Each varied path by its shortest ending that no other varied path shares
    (``bore``, or ``main.bore`` beside ``ejector.bore``).

    >>> varied_names([type("S", (), {"path": p}) for p in
    ...               ("actuators.main.bore", "actuators.ejector.bore",
    ...                "power_unit.pump.shaft_speed")])
    ['main.bore', 'ejector.bore', 'shaft_speed']
    """
    parts = [s.path.split(".") for s in specs]
    out = []
    for p in parts:
        k = 1
        while k < len(p) and sum(q[-k:] == p[-k:] for q in parts) > 1:
            k += 1
        out.append(".".join(p[-k:]))
    return out


def wrapped_name(name: str, width: int = LABEL_WIDTH) -> str:
    r"""*name* broken after a ``.``, ``_``, ``-`` or space into header lines of at
    most *width* characters (a longer word stays whole).

    >>> wrapped_name("ejector.bore"), wrapped_name("displacement")
    ('ejector.\nbore', 'displacement')
    """
    import re

    lines = [""]
    for w in re.findall(r"[^._\- ]+[._\- ]?|[._\- ]", name):
        if lines[-1] and len(lines[-1]) + len(w) > width:
            lines.append("")
        lines[-1] += w
    return "\n".join(x.rstrip() for x in lines)


def _shown(top, n):
    """", the first 5 shown" when --top cuts a list of *n* rows."""
    if top >= n:
        return ""
    return ", none shown (--top 0)" if top == 0 else f", the first {top:,} shown"


def run(args) -> int:
    """``heatload sweep``: parse, evaluate, write, print (exit code 0)."""
    from heatload import io
    from heatload.outputs.tables import count

    path = args.file or io.default_scenario_path()
    scenario = io.load_scenario(path)
    if not args.vary:
        raise HeatloadError("give at least one --vary PATH=LOW..HIGH:N", field="--vary")
    sampling = args.samples is not None
    specs = [parse_vary(t, scenario, need_count=not sampling) for t in args.vary]
    if len({s.path for s in specs}) < len(specs):
        raise HeatloadError("the same path is varied twice", field="--vary")
    if args.top is not None and args.top < 0:
        raise HeatloadError(f"must be >= 0, got {args.top}", field="--top")
    if args.output:
        check_table_path(args.output, force=args.force)      # before the sweep runs
    names = args.strategy or [s.name for s in scenario.strategies]
    strategies = []
    for name in names:
        try:
            strategies.append(scenario.strategy(name))
        except KeyError:
            raise HeatloadError(f"unknown strategy {name!r}; expected one of "
                                f"{', '.join(s.name for s in scenario.strategies)}",
                                field="--strategy") from None
    check_size(specs, args.samples if sampling else None, len(strategies))
    check_corners(scenario, specs)
    values = (sample_values(specs, args.samples, args.seed) if sampling
              else grid_values(specs))
    n = len(next(iter(values.values())))
    coupled = bool(getattr(args, "coupled", False))
    df = run_sweep(scenario, values, strategies, progress=True,
                   thermal=True if coupled else "design")
    out = sys.stdout
    from heatload.outputs.wording import calibration_note
    note = calibration_note(scenario.heat_calibration)
    if note:        # the file's measured / model heat factor, said in the file too
        df["heat_calibration_factor"] = float(scenario.heat_calibration)
    if args.output:
        written = write_table(df, args.output, force=args.force)
        print(f"wrote {len(df)} rows to {written}", file=out)
    system = getattr(args, "units", "si") or "si"
    print(f"{scenario.name}: {count(n, 'variant')} x {count(len(strategies), 'strategy')} "
          f"({'sample, seed ' + str(args.seed) if sampling else 'grid'}); "
          + ("coupled oil temperature" if coupled else
             "figures at the design oil temperature, steady temperature without a cooler "
             "uncoupled (--coupled for the self-consistent one)"), file=out)
    if not coupled:
        # compare ranks at the temperature each machine settles at; a machine that
        # runs cooler than the design temperature can rank otherwise here
        print("ranked at the design oil temperature: a machine that settles cooler may "
              "rank otherwise in compare (--coupled ranks as compare does)", file=out)
    if note:
        print(note, file=out)
    top = args.top if args.top is not None else 10
    width = getattr(args, "width", None)
    # The decision rule, as the table holds it (rank_variants): feasible first,
    # then yearly cost of ownership per cycle.
    flawed = ~df["feasible"].to_numpy()
    energy = df["electric_energy_per_cycle_J"].to_numpy()
    ranked = rank_order(df)
    if top:
        order = ranked[:top]
        print(f"\nbest {len(order)} by yearly cost of ownership per cycle (feasible first: "
              f"{int(flawed.sum()):,} of {len(df):,} stall, miss a speed, run away, exceed a "
              f"rating or overload the motor):", file=out)
        _show(df, specs, system, order, out, width)
    clean = np.nonzero(~flawed)[0]
    front = clean[pareto_front(energy[clean], df["cooler_duty_W"].to_numpy()[clean])]
    front = front[np.argsort(energy[front], kind="stable")]
    print(f"\nPareto front, energy per cycle vs cooler duty ({count(front.size, 'variant')} "
          f"without those warnings{_shown(top, front.size)}):", file=out)
    if top:
        _show(df, specs, system, front[:top], out, width)
    disp = "power_unit.pump.displacement"
    if any(s.path == disp for s in specs):
        disp = next(varied_column(s) for s in specs if s.path == disp)
        front = clean[pareto_front(energy[clean], df[disp].to_numpy()[clean])]
        front = front[np.argsort(df[disp].to_numpy()[front], kind="stable")]
        print(f"\nPareto front, energy per cycle vs pump displacement "
              f"({count(front.size, 'variant')}{_shown(top, front.size)}):", file=out)
        if top:
            _show(df, specs, system, front[:top], out, width)
    return 0
