"""``heatload cooler``: the cooler's design point, size, spec sheet and rating, printed."""

from __future__ import annotations

import json
import sys

from heatload.errors import HeatloadError
from heatload.cooling.sizing import (K0, _design_strategy, _parse, cooler_uncertainty,
                                     shift_words, size_cooler, sizing_record, spec_rows)

from heatload.cooling.cooler_datasheet import (DatasheetSelection, rating_texts)


def run(args) -> int:
    """``heatload cooler [FILE] --coolant air|water --strategy NAME --samples N --seed S
    --rated-duty P --rated-etd DT --json --units si|us``."""
    from heatload import chain, io
    from heatload.units import format_quantity as fq

    path = args.file or io.default_scenario_path()
    sc = io.load_scenario(path)
    strat = _design_strategy(sc, getattr(args, "strategy", None))
    if getattr(args, "samples", 1) is not None and args.samples < 1:
        raise HeatloadError("--samples must be at least 1", field="--samples")
    rd = _parse(args.rated_duty, "power", "--rated-duty") if args.rated_duty else None
    re_ = (_parse(args.rated_etd, "temperature_difference", "--rated-etd")
           if args.rated_etd else None)
    if rd is not None and rd <= 0:
        raise HeatloadError("--rated-duty must be positive", field="--rated-duty")
    if re_ is not None and re_ <= 0:
        raise HeatloadError("--rated-etd must be positive", field="--rated-etd")
    outcome = chain.evaluate_strategy(sc, strat)
    try:
        sz = size_cooler(sc, outcome, args.coolant, rd, re_)
    except HeatloadError as exc:
        if exc.field and exc.field.startswith("cooler."):
            raise io.locate_in_file(exc, path) from None
        raise
    # a progress bar on stderr for long runs in a terminal (never in --json pipes)
    unc = cooler_uncertainty(sc, strat, samples=args.samples, seed=args.seed,
                             progress=sys.stderr.isatty() and not args.json)
    if args.json:
        rec = sizing_record(sz, unc)
        rec["scenario"] = sc.name
        rec["file"] = str(path)
        rec["heat_calibration_factor"] = float(sc.heat_calibration)
        if sz.datasheet is not None:
            from heatload.cooling import cooler_datasheet
            rec["datasheet_coolers"] = cooler_datasheet.selection_record(sz.datasheet)
        print(json.dumps(rec, indent=2, ensure_ascii=False, allow_nan=False,
                         default=lambda v: None))
        return 0
    s = args.units
    print(f"{sc.name} — cooler for {sz.strategy}")
    print(f"Design point: ambient {fq(sz.design_ambient, 'temperature', s)}, oil held at "
          f"{fq(sz.design_oil_temperature, 'temperature', s)}")
    print(f"  heat into the oil   {fq(sz.design_heat, 'power', s)}")
    print(f"  surfaces shed       {fq(sz.surfaces_heat, 'power', s)} "
          f"(UA {fq(sz.design_conductance, 'thermal_conductance', s)})")
    if not sz.cooler_needed:
        print("  cooler              not needed")
    else:
        print(f"  cooler duty         {fq(sz.duty_without_margin, 'power', s)} + "
              f"{100 * sz.margin:.0f} % margin = {fq(sz.duty, 'power', s)}")
        print(f"  oil through cooler  {fq(sz.oil_flow, 'flow', s)} (cycle-average return flow)")
        if sz.air is not None:
            a = sz.air
            print(f"Air-oil: {fq(a.specific_cooling_power, 'thermal_conductance', s)} at ETD "
                  f"{fq(a.etd, 'temperature_difference', s)}; air "
                  f"{fq(a.air_mass_flow, 'mass_flow', s)} rising "
                  f"{fq(a.air_outlet_temperature - sz.design_ambient, 'temperature_difference', s)}; "
                  f"oil drops {fq(a.oil_temperature_drop, 'temperature_difference', s)}")
        for arr, w in sz.water.items():
            print(f"Water-oil {arr}: UA {fq(w.required_conductance, 'thermal_conductance', s)}, "
                  f"NTU {float(w.ntu):.2f}, effectiveness {float(w.effectiveness):.3f}, water "
                  f"{fq(w.water_volume_flow, 'flow', s)} "
                  f"{fq(sz.water_inlet_temperature, 'temperature', s)} -> "
                  f"{fq(w.water_outlet_temperature, 'temperature', s)}")
    rows = spec_rows(sz, s)
    if rows:
        print("\nSpec sheet")
        width = max(len(r[0]) for r in rows)
        for k, v in rows:
            print(f"  {k.ljust(width)}  {v}")
    if sz.rating is not None:
        r = sz.rating
        verdict = "suffices" if r["suffices"] else (
            "suffices without the margin only" if r["suffices_without_margin"]
            else "is too small")
        print(f"\nRating: {fq(r['rated_duty_W'], 'power', s)} at ETD "
              f"{fq(r['rated_etd_K'], 'temperature_difference', s)} gives "
              f"{fq(r['duty_at_design_W'], 'power', s)} at ETD "
              f"{fq(r['design_etd_K'], 'temperature_difference', s)}: {verdict} "
              f"(needs {fq(r['required_W'], 'power', s)})")
    if sz.thermostat is not None and sz.cooler_needed:
        t = sz.thermostat
        from heatload.outputs.tables import times
        which = (f"{t['cooler']} (S {fq(t['cooler_specific_power_W_K'], 'thermal_conductance', s)}"
                 " over the cycle, its datasheet curve)" if t.get("cooler") else
                 f"the sized cooler ({fq(sz.duty, 'power', s)} while on)")
        print(f"\nThermostat over {shift_words(t['shift_duration_s'])} with {which}: on at "
              f"{fq(t['on_temperature_K'], 'temperature', s)}, switched on {times(t['switch_count'])}, "
              f"on {100 * t['on_fraction']:.0f} % of the time, max "
              f"{fq(t['max_temperature_K'], 'temperature', s)}")
    print()
    if unc["available"]:
        d, tt = unc["cooler_duty_W"], unc["oil_temperature_C"]
        print(f"Uncertainty ({unc['samples']:,} samples, seed {unc['seed']}):")
        print("  cooler duty      " + ", ".join(f"{k} {fq(d[k], 'power', s)}"
                                               for k in ("P50", "P90", "P95")))
        print("  oil temperature (steady, no cooler, typical ambient)\n                   " + ", ".join(f"{k} {fq(tt[k] + K0, 'temperature', s)}"
                                               for k in ("P50", "P90", "P95")))
        for note in unc.get("truncation_notes", ()):
            print(f"  note: {note}")
        if unc["sensitivity"]:
            print("  inputs that move the duty most:")
            for r in unc["sensitivity"]:
                from heatload.outputs.wording import plain_path
                sw = r.get("cooler_duty_swing_W")
                extra = r.get("oil_temperature_swing_K")
                print(f"    {plain_path(r['path'])} ({r['path']}): duty swing "
                      f"{fq(sw, 'power', s) if isinstance(sw, float) else sw}"
                      + (f", oil temperature swing "
                         f"{fq(extra, 'temperature_difference', s)}"
                         if isinstance(extra, float) else ""))
    else:
        print(unc["note"])
    for n in sz.notes:
        print(f"  note: {n}")
    if sz.datasheet is not None:      # datasheet coolers listed in the file ([[coolers]])
        from heatload.cooling import cooler_datasheet
        print_selection(sz.datasheet, s)
    from heatload.outputs.wording import calibration_note
    if calibration_note(sc.heat_calibration):
        print(calibration_note(sc.heat_calibration))
    print(sz.caution)
    return 0


def print_selection(sel: DatasheetSelection, system="si") -> None:
    """The selection as a table for the command line."""
    from heatload.cli import _table
    from heatload.units import format_quantity as fq

    print(f"\nDatasheet coolers on the hottest day ({fq(sel.design_ambient, 'temperature', system)}), "
          f"{sel.strategy}: oil must stay at or below "
          f"{fq(sel.design_oil_temperature, 'temperature', system)} (without a cooler it "
          f"settles at {fq(sel.settled_without_cooler, 'temperature', system)}); duty with "
          f"margin {fq(sel.required_duty, 'power', system)}")
    print(f"  return flow through the cooler: mean {fq(sel.mean_return_flow, 'flow', system)}, "
          f"peak {fq(sel.peak_return_flow, 'flow', system)}; allowed drop "
          f"{fq(sel.allowed_pressure_drop, 'pressure', system)}")
    rows = []
    for r in sel.ratings:
        txt = rating_texts(r, system)
        rows.append([("* " if r.name == sel.chosen else "  ") + r.name,
                     fq(r.specific_power, "thermal_conductance", system),
                     fq(r.settled_temperature, "temperature", system),
                     fq(r.duty_at_design, "power", system), txt["verdict"], txt["drop"],
                     fq(r.fan_power, "power", system) if r.fan_power is not None else "-",
                     txt["shift"]])
    # on a narrow terminal the less decisive columns go first, so names stay whole
    print(_table(["cooler", "S over the cycle", "settles at", "duty at design", "limit",
                  "drop at peak flow", "fan", "shift: max, fan on"], rows,
                 optional=("shift: max, fan on", "fan", "duty at design", "S over the cycle",
                           "drop at peak flow")))
    print(f"  chosen: {sel.chosen}" if sel.chosen else "  chosen: none")
    for n in sel.notes:
        print(f"  ! {n}")
    for r in sel.ratings:
        for n in r.notes:
            print(f"  ! {r.name}: {n}")
