"""The ``heatload`` command line.

Commands (each prints a one-line error naming the field and exits non-zero on
bad input, never a traceback):

- ``heatload compare [FILE]``   ranked strategies (``--json``, ``--units si|us``)
- ``heatload check FILE``       validate and summarise a duty-cycle file
- ``heatload phases FILE --strategy NAME``   per-phase breakdown
- ``heatload thermal [FILE]``   oil temperatures, warm-up time
- ``heatload cooler [FILE] --coolant air|water``   cooler sizing and spec sheet
- ``heatload report [FILE] -o report.html``   a customer report
- ``heatload sweep [FILE] --vary PATH=LOW..HIGH:N``   design sweeps
- ``heatload dashboard [FILE]``  the browser dashboard
- ``heatload logfit LOG.csv``   heat load and tank conductance fitted from a temperature log
- ``heatload trace TRACE.csv -o draft.toml``   a draft duty cycle from a pressure trace

Heavy packages (pandas, CoolProp, plotly, dash) are imported only by the
commands that need them, so ``heatload --help`` and ``heatload check`` start fast.

Names come from the user's file, so everything printed passes through one
escape of terminal control characters (:func:`heatload.errors.printable`, the
one error lines use; JSON output gets the JSON form ``\\u001b``, so it stays
valid), and a Python warning from the engine is shown as one line
``heatload: warning: ...`` without a source line.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import warnings

from heatload.errors import HeatloadError, printable
from heatload.outputs.wording import CAUTION

K0 = 273.15


# ---------------------------------------------------------------------------
# helpers
# ---------------------------------------------------------------------------

def _load(path):
    from heatload import io
    p = path or io.default_scenario_path()
    return io.load_scenario(p), p


def _fmt(value, kind, system, digits=3):
    from heatload.units import format_quantity
    return format_quantity(value, kind, system, digits)


def _unit(kind, system):
    from heatload.units import display_unit, pretty_unit
    return pretty_unit(display_unit(kind, system))


def _num(value, kind, system, digits=3):
    from heatload.outputs.tables import plain_number
    from heatload.units import display_unit, from_si
    unit = display_unit(kind, system)
    return plain_number(from_si(value, kind, unit) if unit else float(value), digits)


#: Most Monte Carlo samples a command draws: P95 of a cooler duty is settled to
#: well under 1 % by 10^4 samples; 10^6 keeps a typo from running for hours.
MAX_SAMPLES = 1_000_000


def _seed(text):
    """argparse type: a random seed, a whole number >= 0."""
    import argparse
    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number >= 0, got {text!r}") from None
    if v < 0:
        raise argparse.ArgumentTypeError(f"expected a whole number >= 0, got {text!r}")
    return v


def _samples(text, low=2):
    """argparse type: a Monte Carlo sample count, *low* .. :data:`MAX_SAMPLES`."""
    import argparse
    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if not low <= v <= MAX_SAMPLES:
        raise argparse.ArgumentTypeError(f"expected {low:,} to {MAX_SAMPLES:,} samples, "
                                         f"got {v:,}")
    return v


#: Width of this run's tables (set by :func:`main`): "terminal", or None with --wide.
_output_width = "terminal"


def _table(headers, rows, width="auto", optional=()):
    """A text table fitted to *width* columns (by default this run's: the
    terminal's, or every column with ``--wide``; ``None`` for every column):
    the *optional* headers are left out in that order."""
    from heatload.outputs.tables import format_table, terminal_width
    if width == "auto":
        width = _output_width
    return format_table(headers, rows, terminal_width() if width == "terminal" else width,
                        optional)




def _temperature(t_kelvin, system):
    return _fmt(t_kelvin, "temperature", system, 3)


def _calibration(scenario):
    """Say the file's heat calibration, when it has one."""
    from heatload.outputs.wording import calibration_note
    note = calibration_note(scenario.heat_calibration)
    if note:
        print(note)


# ---------------------------------------------------------------------------
# commands
# ---------------------------------------------------------------------------

def cmd_compare(args):
    from heatload.outputs.wording import warning_text
    from heatload import chain
    from heatload.outputs import tables
    sc, path = _load(args.file)
    cmp = chain.compare(sc, args.strategy or None)
    if args.json:
        print(json.dumps(tables.comparison_dict(cmp, path, with_phases=not args.no_phases),
                         indent=2, ensure_ascii=False))
        return 0
    s = args.units
    from heatload.outputs.tables import count
    print(f"{sc.name} — {count(len(sc.phases), 'phase')}, "
          f"{sc.economics.hours_per_year:,.0f} h/year, "
          f"ambient {_temperature(sc.ambient.temperature, s)} "
          f"(design {_temperature(sc.ambient.temperature_max, s)})")
    cur = sc.economics.currency
    co2, eff, peak = "CO2\n[t/yr]", "eff.\n[%]", f"peak\n[{_unit('pressure', s)}]"
    headers = ["#", "strategy", "energy\n[kWh/yr]", f"cost\n[{cur}/yr]", co2,
               f"heat,\nrunning [{_unit('power', s)}]",
               f"oil, no\ncooler [{_unit('temperature', s)}]",
               f"cooler\n[{_unit('power', s)}]", peak, eff, "warnings"]
    rows = []
    dec = cmp.decision()
    verdict = {v.name: v for v in dec.verdicts}
    for o in cmp.ranked():
        e, th = o.energy, o.thermal
        codes = sorted({w.code for w in o.warnings})
        # a strategy a warning rules out is marked, not numbered among the feasible
        v = verdict[o.name]
        rows.append([v.rank if v.feasible else "out", o.name, f"{float(e.electric_energy_per_year) / 3.6e6:,.0f}",
                     f"{float(e.cost_per_year):,.0f}", f"{float(e.co2_per_year) / 1000:,.1f}",
                     _num(th.heat_running, "power", s), _num(th.steady_coupled,
                                                                   "temperature", s),
                     _num(th.cooler_duty, "power", s) if th.cooler_needed else "none",
                     _num(e.peak_pressure, "pressure", s), f"{100 * float(e.overall_efficiency):.0f}",
                     ", ".join(codes) if codes else "-"])
    # key columns first; the warnings are listed in full below the table
    print(_table(headers, rows, args.width, optional=("warnings", eff, co2, peak)))
    print()
    print(dec.sentence())
    print("Ranked feasible first, then by yearly cost of ownership (energy, cooler fan, "
          "annualised circuit and cooler price):")
    for v in dec.verdicts:
        print(f"  {v.rank}. {v.name}: {v.reason}")
    for n in dec.notes:
        print(f"  note: {n}")
    print()
    for o in cmp.ranked():
        for w in o.warnings:
            print(f"  ! {o.name} / {warning_text(w, s, with_phase=True)}")
    print(f"\nCooler duty at the design point: oil at "
          f"{_temperature(cmp.outcomes[0].thermal.design_oil_temperature, s)}, ambient "
          f"{_temperature(sc.ambient.temperature_max, s)}, margin {100 * sc.cooler.margin:.0f} %.")
    _calibration(sc)
    print(CAUTION)
    return 0


def cmd_schema(args):
    from heatload.io.schema import SCHEMA_EXAMPLE
    print(SCHEMA_EXAMPLE, end="")
    return 0


def cmd_check(args):
    from heatload import io
    sc = io.load_scenario(args.file)
    s = args.units
    pu = sc.power_unit
    q = pu.pump.displacement * pu.pump.shaft_speed
    print(f"OK: {args.file} — {sc.name}")
    print(f"  fluid: {sc.fluid.name} (nu40 {sc.fluid.nu40 * 1e6:.1f} mm²/s, "
          f"nu100 {sc.fluid.nu100 * 1e6:.2f} mm²/s), limits "
          f"{_temperature(sc.fluid.temperature_min, s)} .. {_temperature(sc.fluid.temperature_max, s)}")
    motor = pu.motor
    # an explicit efficiency is what the engine uses; the class is then unused
    eff = (f"efficiency {100 * motor.efficiency:.1f} % (given)" if motor.efficiency is not None
           else f"{motor.efficiency_class}")
    print(f"  pump: {pu.pump.kind} {pu.pump.type}, {pu.pump.displacement * 1e6:.1f} cm³/rev at "
          f"{pu.pump.shaft_speed * 60:,.0f} rpm = {_fmt(q, 'flow', s)}; relief "
          f"{_fmt(pu.relief.cracking_pressure, 'pressure', s)}; motor "
          f"{_fmt(motor.rated_power, 'power', s)} {eff}")
    print(f"  reservoir: {_fmt(sc.reservoir.oil_volume, 'volume', s)} oil, "
          + " x ".join(_fmt(x, "distance", s) for x in (sc.reservoir.length, sc.reservoir.width,
                                                       sc.reservoir.height)))
    for a in sc.actuators:
        if a.kind == "motor":
            print(f"  actuator {a.name}: motor {a.displacement * 1e6:.0f} cm³/rev")
        else:
            print(f"  actuator {a.name}: cylinder {_fmt(a.bore, 'length', s)} / "
                  f"{_fmt(a.rod, 'length', s)} x {_fmt(a.stroke, 'distance', s)}")
    from heatload.outputs.tables import count
    print(f"  {count(len(sc.phases), 'phase')}: " + ", ".join(f"{p.name} ({p.motion})" for p in sc.phases))
    print(f"  strategies: " + ", ".join(st.name for st in sc.strategies))
    if sc.coolers:
        print(f"  datasheet coolers: " + ", ".join(c.name for c in sc.coolers))
    if sc.heat_calibration != 1.0:
        print(f"  heat calibration: × {sc.heat_calibration:.3g} on every strategy's heat "
              "into the oil (measured / model)")
    return 0


def cmd_phases(args):
    from heatload.outputs.wording import warning_text
    from heatload import chain
    from heatload.outputs import tables
    sc, path = _load(args.file)
    try:
        strat = sc.strategy(args.strategy)
    except KeyError:
        raise HeatloadError(f"unknown strategy {args.strategy!r}; this scenario has "
                            f"{', '.join(s.name for s in sc.strategies)}",
                            field="--strategy") from None
    o = chain.evaluate_strategy(sc, strat)
    recs = tables.phase_records(o, sc, chain.cycle.phase_arrays(sc))
    if args.json:
        print(json.dumps(recs, indent=2, ensure_ascii=False))
        return 0
    s = args.units
    print(f"{sc.name} — {o.name}, oil at {_temperature(o.thermal.operating_temperature, s)}")
    p, q, w = _unit("pressure", s), _unit("flow", s), _unit("power", s)
    headers = ["phase", "motion", "t\n[s]", f"p pump\n[{p}]", f"p cap\n[{p}]", f"p rod\n[{p}]",
               f"Q pump\n[{q}]", f"Q relief\n[{q}]", "speed/\ntarget [%]",
               f"electric\n[{w}]", f"heat\n[{w}]", "largest loss"]
    rows = []
    for r in recs:
        losses = {k: v for k, v in r["losses_W"].items() if k not in ("drive_motor", "converter")}
        top = max(losses, key=lambda k: losses[k] or 0.0)
        pct = (100 * r["speed"] / r["speed_target"]) if r["speed_target"] else None
        rows.append([r["phase"], r["motion"], f"{r['duration_s']:.2f}",
                     _num(r["pump_pressure_Pa"], "pressure", s),
                     _num(r["cap_pressure_Pa"], "pressure", s),
                     _num(r["rod_pressure_Pa"], "pressure", s),
                     _num(r["pump_flow_m3_s"], "flow", s), _num(r["relief_flow_m3_s"], "flow", s),
                     f"{pct:.0f}" if pct is not None else "-",
                     _num(r["electric_power_W"], "power", s), _num(r["heat_to_oil_W"], "power", s),
                     f"{top} {_fmt(losses[top], 'power', s)}" if (losses[top] or 0) > 0 else "-"])
    print(_table(headers, rows, args.width,
                 optional=("largest loss", headers[4], headers[5], headers[9], headers[7])))
    for w in o.warnings:
        print(f"  ! {warning_text(w, s, with_phase=True)}")
    _calibration(sc)
    return 0


def cmd_thermal(args):
    from heatload.outputs.wording import warning_text
    from heatload import chain
    sc, path = _load(args.file)
    cmp = chain.compare(sc, args.strategy or None)
    s = args.units
    if args.json:
        from heatload.outputs import tables
        recs = [{k: v for k, v in tables.strategy_record(o, sc, cmp.phase_arrays, False).items()
                 if k.startswith(("oil_", "heat_", "cooler_", "time_", "strategy", "label"))}
                for o in cmp.outcomes]
        print(json.dumps({"scenario": sc.name,
                          "heat_calibration_factor": float(sc.heat_calibration),
                          "strategies": recs}, indent=2, ensure_ascii=False))
        return 0
    print(f"{sc.name} — oil {sc.fluid.name}, {_fmt(sc.reservoir.oil_volume, 'volume', s)}; "
          f"ambient {_temperature(sc.ambient.temperature, s)}, hot day "
          f"{_temperature(sc.ambient.temperature_max, s)}, cold start "
          f"{_temperature(sc.ambient.cold_start_temperature, s)}")
    t = _unit("temperature", s)
    uncoupled, cycle_range = f"steady\nuncoupled [{t}]", f"cycle\nmin..max [{t}]"
    ua = f"UA\n[{_unit('thermal_conductance', s)}]"
    headers = ["strategy", f"heat, no\ncooler [{_unit('power', s)}]", uncoupled,
               f"steady\ncoupled [{t}]", cycle_range, f"hot day\n[{t}]",
               ua, "to oil\nlimit", "cooler"]
    rows = []
    for o in cmp.outcomes:
        th = o.thermal
        ttl = "never" if th.time_to_limit is None else f"{th.time_to_limit / 3600:.1f} h"
        rows.append([o.name, _num(th.heat_coupled, "power", s),
                     _num(th.steady_uncoupled, "temperature", s),
                     _num(th.steady_coupled, "temperature", s),
                     f"{_num(th.cycle_minimum, 'temperature', s)}..{_num(th.cycle_maximum, 'temperature', s)}",
                     _num(th.steady_hot, "temperature", s),
                     _num(th.conductance, "thermal_conductance", s), ttl,
                     _fmt(th.cooler_duty, "power", s) if th.cooler_needed else "not needed"])
    print(_table(headers, rows, args.width, optional=(cycle_range, ua, uncoupled)))
    for o in cmp.outcomes:
        for w in o.warnings:
            if w.code in ("oil-temperature", "viscosity-window"):
                print(f"  ! {o.name}: {warning_text(w, s)}")
    print("Steady temperatures are without a cooler; 'coupled' lets the oil's viscosity "
          "change pump leakage and line losses at that temperature.")
    _calibration(sc)
    print(CAUTION)
    return 0


def cmd_cooler(args):
    from heatload.cli import cooler
    return cooler.run(args)


def cmd_report(args):
    from heatload.cli import report
    return report.run(args)


def cmd_sweep(args):
    from heatload.cli import sweep
    return sweep.run(args)


def cmd_logfit(args):
    from heatload.cli import logfit
    return logfit.run(args)


def cmd_trace(args):
    from heatload.cli import trace
    return trace.run(args)


def cmd_dashboard(args):
    # The engine does not import its front end: the dashboard registers itself
    # as an entry point of the group "heatload.frontends" (pyproject.toml).
    from importlib.metadata import entry_points
    found = entry_points(group="heatload.frontends", name="dashboard")
    if not found:
        raise HeatloadError("cannot start the dashboard: it is not installed; "
                            "reinstall with `pip install -e .`", field="dashboard")
    try:
        run = next(iter(found)).load()
    except ImportError as exc:  # dash itself missing
        raise HeatloadError(f"cannot start the dashboard: {exc.name or exc} is not "
                            f"importable; reinstall with `pip install -e .`",
                            field="dashboard") from None
    return run(args)


# ---------------------------------------------------------------------------
# parser
# ---------------------------------------------------------------------------

def build_parser() -> argparse.ArgumentParser:
    from heatload import __version__
    p = argparse.ArgumentParser(
        prog="heatload",
        description="Heat load, oil temperature and cooler size of a hydraulic machine's duty "
                    "cycle, for every way of controlling its actuators.")
    p.add_argument("--version", action="version", version=f"heatload {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    def add(name, func, help_, file_required=False):
        sp = sub.add_parser(name, help=help_, description=help_)
        if file_required:
            sp.add_argument("file", metavar="FILE", help="duty-cycle file (TOML)")
        else:
            sp.add_argument("file", metavar="FILE", nargs="?",
                            help="duty-cycle file (TOML); the bundled forming press if omitted")
        sp.add_argument("--units", choices=("si", "us"), default="si",
                        help="units of the printed tables (default: si)")
        sp.add_argument("--wide", action="store_true",
                        help="every column of the tables, long lines unwrapped (default: "
                             "fit the terminal, 80 columns in a pipe)")
        sp.set_defaults(func=func)
        return sp

    sp = add("compare", cmd_compare, "rank the control strategies of a duty cycle")
    sp.add_argument("--json", action="store_true", help="print the results as JSON (SI units)")
    sp.add_argument("--no-phases", action="store_true", help="leave per-phase data out of --json")
    sp.add_argument("--strategy", action="append", metavar="NAME",
                    help="only this strategy (repeatable)")

    add("check", cmd_check, "validate a duty-cycle file and summarise it", file_required=True)
    sp = sub.add_parser("schema", help="print a commented duty-cycle file that documents "
                        "every key (copy it to start a machine of your own)")
    sp.set_defaults(func=cmd_schema)

    sp = add("phases", cmd_phases, "per-phase breakdown of one strategy")
    sp.add_argument("--strategy", required=True, metavar="NAME", help="strategy name or label")
    sp.add_argument("--json", action="store_true", help="print the phases as JSON (SI units)")

    sp = add("thermal", cmd_thermal, "oil temperatures without a cooler and warm-up time")
    sp.add_argument("--strategy", action="append", metavar="NAME", help="only this strategy")
    sp.add_argument("--json", action="store_true", help="print as JSON (SI units)")

    sp = add("cooler", cmd_cooler, "size an air-oil or water-oil cooler, with its uncertainty")
    sp.add_argument("--coolant", default=None,
                    help="cooler type to size, e.g. air or water (default: the scenario's "
                         "[cooler] coolant)")
    sp.add_argument("--strategy", metavar="NAME", default=None,
                    help="strategy to size for (default: the present circuit)")
    sp.add_argument("--samples", type=_samples, default=10000,
                    help="Monte Carlo samples, 2 to 1,000,000 (default 10000)")
    sp.add_argument("--seed", type=_seed, default=1, help="random seed, 0 or more (default 1)")
    sp.add_argument("--rated-duty", default=None, metavar="POWER",
                    help="rating mode: a cooler's rated duty, e.g. '10 kW'")
    sp.add_argument("--rated-etd", default=None, metavar="DT",
                    help="rating mode: ETD of that rating, e.g. '40 K'")
    sp.add_argument("--json", action="store_true", help="print as JSON (SI units)")

    sp = add("report", cmd_report, "write a self-contained HTML report for a customer")
    sp.add_argument("-o", "--output", default="report.html", metavar="HTML",
                    help="report file (default report.html)")
    sp.add_argument("--xlsx", default=None, metavar="FILE", help="also write the tables to a spreadsheet")
    sp.add_argument("--csv", default=None, metavar="DIR", help="also write the tables as CSV files")
    sp.add_argument("--present", default=None, metavar="NAME", help="the machine's present circuit")
    sp.add_argument("--price", action="append", default=[], metavar="NAME=AMOUNT",
                    help="extra price of a strategy's circuit, e.g. load-sensing=4200 (repeatable)")
    sp.add_argument("--force", action="store_true", help="overwrite existing files")
    sp.add_argument("--samples", type=_samples, default=2000,
                    help="Monte Carlo samples for the cooler duty, 2 to 1,000,000 "
                         "(default 2000)")
    sp.add_argument("--seed", type=_seed, default=1, help="random seed, 0 or more (default 1)")
    for opt, what in (("--project", "project"), ("--customer", "customer"),
                      ("--prepared-by", "who prepared it"), ("--revision", "revision"),
                      ("--date", "date (default today)")):
        sp.add_argument(opt, default=None, help=f"the report cover's {what}; default the "
                        "scenario file's [scenario] key" if opt != "--date" else
                        f"the report cover's {what}")

    sp = add("sweep", cmd_sweep, "evaluate a grid or sample of design variants at array speed")
    sp.add_argument("--vary", action="append", default=[], metavar="PATH=LOW..HIGH:N",
                    help="e.g. power_unit.pump.displacement=16..40cm^3:13 (repeatable)")
    sp.add_argument("--strategy", action="append", metavar="NAME", help="strategy (repeatable)")
    sp.add_argument("--samples", type=int, default=None, help="random sample instead of the grid")
    sp.add_argument("--seed", type=_seed, default=1)
    sp.add_argument("-o", "--output", default=None, metavar="FILE", help="CSV or Parquet file")
    sp.add_argument("--force", action="store_true", help="overwrite an existing output")
    sp.add_argument("--top", type=int, default=10,
                    help="rows of each printed list: the best variants and each Pareto front "
                         "(default 10; 0 prints none)")
    sp.add_argument("--coupled", action="store_true",
                    help="also solve each variant's self-consistent oil temperature "
                         "(about 5x slower than the default design-point figures)")

    help_ = "fit the heat load and the tank's conductance to a logged oil temperature (CSV)"
    sp = sub.add_parser("logfit", help=help_, description=help_ + (
        ". Columns are found by name: a header containing 'time', 'oil', 'ambient' and "
        "optionally 'running' (0/1), each with its unit in square brackets, e.g. "
        "'oil temperature [degC]'; time may also be a timestamp."))
    sp.add_argument("log", metavar="LOG", help="the temperature log (CSV)")
    group = sp.add_mutually_exclusive_group()
    group.add_argument("--scenario", metavar="FILE", default=None,
                       help="duty-cycle file: heat capacity from its oil and steel, the "
                            "model's heat beside the measured one, the cooler duty from it")
    group.add_argument("--heat-capacity", metavar="C", default=None,
                       help="heat capacity of oil and steel, e.g. '650 kJ/K'")
    sp.add_argument("--column", action="append", default=[], metavar="KEY=NAME",
                    help="the column for time, oil, ambient or running (repeatable)")
    sp.add_argument("--unit", action="append", default=[], metavar="KEY=UNIT",
                    help="unit of a column whose header gives none, e.g. oil=degF (repeatable)")
    sp.add_argument("--ambient-temperature", metavar="T", default=None,
                    help="constant air temperature when the log has no ambient column")
    sp.add_argument("--strategy", metavar="NAME", default=None,
                    help="with --scenario: the machine's circuit (default: the scenario's "
                         "present_strategy)")
    sp.add_argument("--confidence", type=float, default=0.95,
                    help="level of the confidence intervals (default 0.95)")
    sp.add_argument("--json", action="store_true", help="print as JSON (SI units)")
    sp.add_argument("-o", "--output", default=None, metavar="HTML",
                    help="also write a page with the log and the fit")
    sp.add_argument("--force", action="store_true", help="overwrite an existing output")
    sp.add_argument("--units", choices=("si", "us"), default="si",
                    help="units of the printed tables (default: si)")
    sp.add_argument("--wide", action="store_true",
                    help="every column of the tables, long lines unwrapped (default: "
                         "fit the terminal, 80 columns in a pipe)")
    sp.set_defaults(func=cmd_logfit)

    help_ = "segment a pressure trace (CSV) into phases and write a draft duty-cycle file"
    sp = sub.add_parser("trace", help=help_, description=help_ + (
        ". Columns are found by name: 'time' and 'pressure', optionally 'flow' and "
        "'position', each with its unit in square brackets, e.g. 'pump pressure [bar]'."))
    sp.add_argument("trace", metavar="TRACE", help="the pressure trace (CSV)")
    sp.add_argument("-o", "--output", default=None, metavar="TOML",
                    help="the draft duty-cycle file to write (printed when omitted)")
    sp.add_argument("--column", action="append", default=[], metavar="KEY=NAME",
                    help="the column for time, pressure, flow or position (repeatable)")
    sp.add_argument("--unit", action="append", default=[], metavar="KEY=UNIT",
                    help="unit of a column whose header gives none, e.g. pressure=psi")
    sp.add_argument("--name", default=None, help="the machine's name in the draft")
    sp.add_argument("--min-phase", default=None, metavar="T",
                    help="shortest phase, e.g. '0.5 s' (shorter steps are transitions)")
    sp.add_argument("--json", action="store_true", help="print the phases as JSON (SI units)")
    sp.add_argument("--force", action="store_true", help="overwrite an existing draft")
    sp.set_defaults(func=cmd_trace)

    sp = add("dashboard", cmd_dashboard, "open the browser dashboard")
    sp.add_argument("--port", type=int, default=8050)
    sp.add_argument("--host", default="127.0.0.1",
                    help="interface to bind (default 127.0.0.1; anything else is reachable "
                         "from the network)")
    sp.add_argument("--threads", type=int, default=8,
                    help="worker threads of the production server (default 8: about one per "
                         "person working at the same time; each recompute takes a few "
                         "seconds of one core)")
    sp.add_argument("--debug", action="store_true",
                    help="Dash's development server in debug mode (never on a shared machine)")
    return p


class _TerminalText:
    """A text stream that shows control characters escaped (line ends pass)
    and breaks lines longer than *width* (None: as they are)."""

    def __init__(self, stream, json_mode=False, width=None):
        self._stream = stream
        self._json = json_mode
        self._width = width
        self._pending = ""

    def write(self, text):
        text = printable(text, keep="\n", json=self._json)
        if self._width is None:
            return self._stream.write(text)
        from heatload.outputs.tables import wrap_line
        *lines, self._pending = (self._pending + text).split("\n")
        for line in lines:
            self._stream.write("\n".join(wrap_line(line, self._width)) + "\n")
        return len(text)

    def flush(self):
        if self._pending:
            from heatload.outputs.tables import wrap_line
            self._stream.write("\n".join(wrap_line(self._pending, self._width)))
            self._pending = ""
        return self._stream.flush()

    def __getattr__(self, name):
        return getattr(self._stream, name)


def _one_line_warning(seen):
    def show(message, category, filename, lineno, file=None, line=None):
        text = printable(str(message))
        if text in seen:          # once per run, however many variants repeat it
            return
        seen.add(text)
        kind = "" if category is UserWarning else f" ({category.__name__})"
        print(f"heatload: warning{kind}: {text}", file=sys.stderr)
    return show


def main(argv=None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "command", None):
        parser.print_help()
        return 0
    global _output_width
    json_mode = bool(getattr(args, "json", False))
    if getattr(args, "wide", False) or json_mode:
        args.width = _output_width = None
    elif not hasattr(args, "wide"):
        # a command without --wide may print a file (a draft TOML): its lines stay whole
        args.width, _output_width = None, "terminal"
    else:
        from heatload.outputs.tables import terminal_width
        args.width = _output_width = terminal_width()
    stdout = sys.stdout
    sys.stdout = _TerminalText(stdout, json_mode=json_mode, width=args.width)
    try:
        from heatload import _memory
        _memory.check_environment()     # a bad switch refused before any work
        with warnings.catch_warnings():
            warnings.showwarning = _one_line_warning(set())
            return int(args.func(args) or 0)
    except HeatloadError as exc:
        path = getattr(args, "file", None)
        if exc.file is None and path and exc.field and not exc.field.startswith("-"):
            # raised after loading, naming a field of the file: where it stands there
            from heatload import io
            exc = io.locate_in_file(exc, path)
        print(f"heatload: error: {exc.one_line()}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("heatload: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except Exception as exc:  # a bug of ours: one line, the trace only on request
        if os.environ.get("HEATLOAD_DEBUG"):
            raise
        print(f"heatload: internal error: {type(exc).__name__}: {printable(str(exc))} "
              f"(set HEATLOAD_DEBUG=1 for the traceback)", file=sys.stderr)
        return 3
    finally:
        try:
            sys.stdout.flush()
        except BrokenPipeError:
            pass
        sys.stdout = stdout
        _output_width = "terminal"

