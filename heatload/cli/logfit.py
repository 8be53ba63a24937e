"""``heatload logfit``: the tank model fitted to a temperature log, printed, as JSON or a page."""

from __future__ import annotations

import contextlib
import json

import numpy as np

from heatload.errors import HeatloadError
from heatload.measurement.measured import (CAPACITY_NOTE, K0, _iv, _json_default, _q,
                                           build_html, calibration_advice, calibration_line,
                                           fit_log, read_temperature_log,
                                           scenario_comparison, summary_rows)


def print_text(log, fit, comparison, system, capacity_source, scenario_path=None):
    from heatload.cli import CAUTION, _table

    dt = np.diff(log.time)
    print(f"{log.source} — {fit.samples:,} samples over {fit.duration / 3600:.3g} h "
          f"(median step {np.median(dt):.3g} s, longest {dt.max():.3g} s); running "
          f"{100 * fit.running_fraction:.0f} % of the time")
    print("Columns: " + ", ".join(f"{k} = {h!r}" for k, h in log.headers.items()))
    print("Model: C dT/dt = P·running − UA (T − T_ambient), exact between samples, "
          "least squares on the logged oil temperature")
    # the table names where C came from in a word; the whole source on its own line
    short = "from the scenario" if scenario_path and fit.capacity is not None else \
        capacity_source
    rows = summary_rows(fit, system, short)
    print(_table(["quantity", "fitted", f"{rows[0][4]} interval", ""],
                 [r[:4] for r in rows]))
    if short != capacity_source:
        print(f"Heat capacity C {capacity_source}")
    print(f"Residual: RMS {_q(fit.residual_rms, 'temperature_difference', system)}, largest "
          f"{_q(fit.residual_max, 'temperature_difference', system)}; "
          f"lag-1 autocorrelation {fit.residual_autocorrelation:.2f}"
          + (f" (intervals widened x{fit.interval_widening:.2f} for it)"
             if fit.interval_widening > 1.0 else ""))
    for n in fit.notes:
        print(f"  ! {n}")
    if fit.capacity is not None:
        print(CAPACITY_NOTE)
    if comparison is not None:
        c = comparison
        print(f"\nAgainst the scenario ({c['strategy']}, the present circuit), oil at "
              f"{_q(c['logged_oil_temperature_C'] + K0, 'temperature', system)} as logged:")
        print(f"  heat into the oil    model {_q(c['model_heat_W'], 'power', system)}, "
              f"measured {_q(c['measured_heat_W'], 'power', system)}; calibration factor "
              + (f"{c['heat_calibration_factor']:.3g}" if c["heat_calibration_factor"]
                 is not None else "–"))
        print(f"  surfaces' UA         model "
              f"{_q(c['model_conductance_W_K'], 'thermal_conductance', system)}, measured "
              f"{_q(c['measured_conductance_W_K'], 'thermal_conductance', system)}; factor "
              + (f"{c['conductance_calibration_factor']:.3g}"
                 if c["conductance_calibration_factor"] is not None else "–"))
        print(f"  design point: oil {_q(c['design_oil_temperature_C'] + K0, 'temperature', system)}"
              f", ambient {_q(c['design_ambient_C'] + K0, 'temperature', system)}, margin "
              f"{100 * c['margin']:.0f} %")
        print(f"  cooler duty          model {_q(c['model_cooler_duty_W'], 'power', system)}; "
              f"from the measurement {_q(c['measured_cooler_duty_W'], 'power', system)}"
              + (f" ({_iv(c['measured_cooler_duty_W_interval'], 'power', system)})"
                 if c.get("measured_cooler_duty_W_interval") else "")
              + "  (heat and UA of the model scaled by the factors above)")
        if c.get("file_heat_calibration_factor", 1.0) != 1.0:
            print(f"  the file's heat_calibration = {c['file_heat_calibration_factor']:.6g} is left "
                  "out of the model figures above")
        for line in calibration_advice(c, fit, scenario_path or "the scenario file"):
            print(f"  {line}")
    print(CAUTION)


@contextlib.contextmanager
def _naming(source):
    """An error of the scenario's model at the log's temperatures names the log
    (the scenario itself was checked when it was loaded)."""
    try:
        yield
    except HeatloadError as e:
        if e.file is None:
            raise e.located(file=source) from None
        raise


def run(args) -> int:
    """``heatload logfit LOG.csv [--scenario FILE | --heat-capacity Q] [--column KEY=NAME]
    [--unit KEY=UNIT] [--ambient-temperature T] [--json] [-o report.html] [--force]``."""
    from heatload.measurement import logfit, logs
    from heatload.io import files as outputs
    from heatload.units import to_si

    out = getattr(args, "output", None)
    if out:
        outputs.check_output(out, "--output", force=args.force, suffixes=(".html",))
    if args.scenario and args.heat_capacity:
        raise HeatloadError("give --scenario or --heat-capacity, not both",
                            field="--heat-capacity")
    if not 0.5 <= args.confidence < 1.0:
        raise HeatloadError("--confidence must lie in [0.5, 1)", field="--confidence")
    amb = (to_si(args.ambient_temperature, "temperature", field="--ambient-temperature")
           if args.ambient_temperature else None)
    log = read_temperature_log(args.log, logs.parse_assignments(args.column, "--column"),
                               logs.parse_assignments(args.unit, "--unit"), amb)
    scenario = None
    capacity = None
    source = "not given"
    if args.scenario:
        from heatload import evaluation, io
        scenario = io.load_scenario(args.scenario)
        mean_oil = float(np.mean(log.values["oil"]))
        with _naming(log.source):
            capacity = float(evaluation.heat_capacity(scenario, mean_oil))
        source = (f"from {args.scenario}: oil and steel at {mean_oil - K0:.3g} °C")
    elif args.heat_capacity:
        capacity = to_si(args.heat_capacity, "heat_capacity", field="--heat-capacity")
        if not capacity > 0.0:
            raise HeatloadError("must be positive", field="--heat-capacity")
        source = "given"
    fit = fit_log(log, capacity, args.confidence)
    with _naming(log.source):
        comparison = (scenario_comparison(scenario, log, fit, getattr(args, "strategy", None))
                      if scenario is not None else None)
    if out:
        text = build_html(log, fit, comparison, args.units, source)
        from heatload.outputs.report import write_html
        write_html(text, out, args.force)
    if args.json:
        from heatload.cli import CAUTION
        rec = logfit.fit_record(fit, source)
        rec.update(file=str(args.log), columns=dict(log.headers), units=dict(log.units),
                   start=log.start.isoformat() if log.start else None,
                   scenario=comparison, caution=CAUTION,
                   heat_calibration_line=(
                       calibration_line(comparison["heat_calibration_factor"])
                       if comparison is not None
                       and comparison["heat_calibration_factor"] is not None else None),
                   heat_capacity_note=CAPACITY_NOTE if fit.capacity is not None else None)
        print(json.dumps(rec, indent=2, ensure_ascii=False, allow_nan=False,
                         default=_json_default))
        return 0
    print_text(log, fit, comparison, args.units, source, args.scenario)
    if out:
        print(f"wrote {out}")
    return 0
