"""The whole speed table in one run: a floor kernel, the sweep modes, a sweep end
to end through the command line to Parquet, ``chain.compare``, the dashboard's
recompute, the Monte Carlo, a report and the cold starts, each with its ratio
to the floor kernel; with ``--baseline REF`` the same rows of a git ref too,
runs interleaved, and the ratios this / baseline.

    .venv/bin/python benchmarks/bench_table.py                    # this checkout
    .venv/bin/python benchmarks/bench_table.py --baseline main    # and a ref
    .venv/bin/python benchmarks/bench_table.py --quick            # smaller counts

The floor kernel is a bare-numpy meter-in pass over the default 12-phase press
(pump at the relief, the drops of the check valve, the lines -- laminar -- and
the valve paths, the force balance, the pump's Wilson losses, the cycle's mean
heat and a design-point duty): about the arithmetic a design-point variant
needs, in as few full-size array passes as numpy allows.  It exists only to
time against; it is not the model and no figure is ever taken from it.

Every row is timed in a fresh process per tree (in-process rows: best of
``--repeat`` after a warm-up; the end-to-end sweep and the cold starts: a
process each, wall time from the shell's side).  Absolute times drift with
the machine's load; compare the ratios of one run.  Nothing here is asserted.
"""

from __future__ import annotations

import argparse
import importlib.util
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEFAULT = "duty_cycles/forming_press.toml"
DISPLACEMENT = "power_unit.pump.displacement"


# ---------------------------------------------------------------------------
# the floor kernel (timing only)
# ---------------------------------------------------------------------------

def floor_inputs(n):
    """Arrays of the floor kernel: the default press's meter-in inputs, the pump
    displacement of *n* variants from 16 to 40 cm^3/rev."""
    import numpy as np

    from heatload.hydraulics import cycle
    from heatload import io

    sc = io.load_scenario(ROOT / DEFAULT)
    c = cycle.circuit_inputs(sc, sc.strategy("meter-in"))
    row = {k: np.asarray(v, float)[None, :] for k, v in c.items()
           if k != "shape" and np.ndim(v) == 1}
    row["displacement"] = np.linspace(16e-6, 40e-6, n)[:, None]
    row["ambient"] = sc.ambient.temperature_max
    row["t_design"] = 333.15
    return row


def floor_kernel(a):
    """A meter-in design point of every variant and phase in bare numpy (timing only)."""
    import numpy as np

    two_pi = 2.0 * np.pi
    d, n, mu, rho, nu = a["displacement"], a["pump_speed"], a["mu"], a["density"], a["viscosity"]
    q_th = d * n
    leak = a["pump_slip"] * d / (two_pi * mu)
    q1 = np.where(a["moving"] > 0, np.minimum(np.nan_to_num(a["q_target"], posinf=1.0),
                                              q_th - leak * a["relief_cracking"]), 0.0)
    k = a["relief_override"] / a["relief_rated_flow"]
    p_pump = (a["relief_cracking"] + k * (q_th - q1)) / (1.0 + k * leak)
    q2 = q1 * a["q_ratio"]
    lam_p = 128.0 * rho * nu * a["pline_l"] / (np.pi * a["pline_d"] ** 4)
    lam_r = 128.0 * rho * nu * a["rline_l"] / (np.pi * a["rline_d"] ** 4)
    dv_p = a["dv_rated_drop"] * (q1 / a["dv_rated_flow"]) ** 2
    dv_r = a["dv_rated_drop"] * (q2 / a["dv_rated_flow"]) ** 2
    check = np.where(q1 > 0, a["check_cracking"] + (a["check_rated_drop"] - a["check_cracking"])
                     * (q1 / a["check_rated_flow"]) ** 2, 0.0)
    p2 = dv_r + lam_r * q2
    p1 = (a["force"] + a["a_out"] * p2) / a["a_in"]
    throttle = p_pump - check - lam_p * q1 - dv_p - p1
    torque = (d * p_pump + a["pump_viscous"] * d * mu * two_pi * n
              + a["pump_friction"] * d * p_pump) / two_pi
    shaft = two_pi * n * torque
    useful = a["force"] * q1 / a["a_in"]
    heat = shaft - useful
    mean = (heat * a["duration"]).sum(axis=1) / a["duration"].sum()
    duty = np.maximum(mean - 60.0 * (a["t_design"] - a["ambient"]), 0.0) * 1.1
    return duty, throttle


# ---------------------------------------------------------------------------
# the in-process rows (run in a worker process per tree)
# ---------------------------------------------------------------------------

def _best(fn, repeat):
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def _load_dashboard(tree: Path):
    """``heatload.dashboard`` from *tree*'s own folder (an editable install would
    map the name to another checkout's)."""
    spec = importlib.util.spec_from_file_location(
        "heatload.dashboard", tree / "dashboard" / "__init__.py",
        submodule_search_locations=[str(tree / "dashboard")])
    mod = importlib.util.module_from_spec(spec)
    sys.modules["heatload.dashboard"] = mod
    spec.loader.exec_module(mod)
    return mod


def _dashboard_recompute(edits):
    from heatload import io
    from heatload.dashboard import app as dash_app
    from heatload.dashboard import callbacks, compute, state

    examples = dash_app.scenario_choices()[2]
    sc = io.load_scenario(io.default_scenario_path())
    data = io.scenario_to_dict(sc)
    form = state.render_form(data, "si")
    store = {"data": data, "source": "forming_press.toml"}
    results = compute.compute_results(sc)
    times = []
    for i in range(edits + 1):
        rows = [dict(r) for r in form["phase_rows"]]
        rows[2]["load"] = f"{101 + 0.5 * i:g}"
        t0 = time.perf_counter()
        out = callbacks.update_scenario("phase-table", None, None, None, "si", rows,
                                        form["actuator_rows"], form["key_values"], store,
                                        results, examples)
        if i:                      # the first edit warms up
            times.append(time.perf_counter() - t0)
        if out["results"] is callbacks.no_update:
            raise SystemExit(f"edit {i} did not recompute: {out['form_errors']}")
    times.sort()
    return statistics.median(times), times[min(len(times) - 1, int(0.95 * len(times)))]


def worker(args) -> dict:
    import numpy as np

    tree = Path(args.tree)
    from heatload import chain, cli, io
    from heatload.studies import uncertainty, variants

    out = {}
    n = args.sweep
    a = floor_inputs(n)
    floor_kernel(a)
    sc = io.load_scenario(tree / DEFAULT)
    vals = {DISPLACEMENT: np.linspace(16e-6, 40e-6, n)}
    # the floor timed again beside each mode (best of all): the load of a
    # shared machine moves between the rows
    floor = []
    for mode in (False, "design", True):
        variants.evaluate_variants(sc, "meter-in", {DISPLACEMENT: vals[DISPLACEMENT][:100]},
                                   thermal=mode)
        best = float("inf")
        for _ in range(args.repeat):
            floor.append(_best(lambda: floor_kernel(a), 2))
            best = min(best, _best(lambda: variants.evaluate_variants(
                sc, "meter-in", vals, thermal=mode), 1))
        out[f"sweep {mode}"] = best / n
    out["floor"] = min(floor) / n
    chain.compare(sc)
    out["compare"] = statistics.median(
        _best(lambda: chain.compare(sc), 1) for _ in range(max(5, args.repeat)))
    _load_dashboard(tree)
    out["dashboard median"], out["dashboard p95"] = _dashboard_recompute(args.edits)
    uncertainty.monte_carlo(sc, "load-sensing", samples=100, seed=1)
    out["monte carlo"] = _best(lambda: uncertainty.monte_carlo(
        sc, "load-sensing", samples=args.mc, seed=1), 1)
    with tempfile.TemporaryDirectory() as tmp:
        argv = ["report", str(tree / DEFAULT), "-o", str(Path(tmp) / "r.html"), "--force"]
        import contextlib
        import io as pyio
        with contextlib.redirect_stdout(pyio.StringIO()):
            cli.main(argv)
            out["report"] = _best(lambda: cli.main(argv), 2)
    return out


# ---------------------------------------------------------------------------
# the process rows
# ---------------------------------------------------------------------------

def _env(tree: Path):
    return dict(os.environ, PYTHONPATH=str(tree), COLUMNS="80")


def _process(tree: Path, argv):
    """(wall [s], peak resident memory [MB]) of one ``python -m heatload.cli ARGV``."""
    t0 = time.perf_counter()
    p = subprocess.Popen([sys.executable, "-m", "heatload.cli", *argv], cwd=tree, env=_env(tree),
                         stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(p.pid, 0)
    wall = time.perf_counter() - t0
    p.returncode = os.waitstatus_to_exitcode(status)
    err = p.stderr.read().decode()
    if p.returncode:
        raise SystemExit(f"heatload {' '.join(argv)} failed in {tree}: {err.strip()[-500:]}")
    return wall, usage.ru_maxrss / 1024.0


def process_rows(tree: Path, args, tmp: Path) -> dict:
    out = {}
    e2e = ["sweep", DEFAULT, "--vary", f"{DISPLACEMENT}=16..40cm^3:{args.e2e}",
           "--strategy", "meter-in", "-o", str(tmp / "sweep.parquet"), "--force", "--top", "0"]
    out["end to end"], out["end to end MB"] = _process(tree, e2e)
    cold = {"--help": ["--help"], "check": ["check", DEFAULT], "compare": ["compare", DEFAULT],
            "report": ["report", DEFAULT, "-o", str(tmp / "report.html"), "--force"]}
    for name, argv in cold.items():
        _process(tree, argv)                      # byte code and disk caches
        out[f"cold {name}"] = statistics.median(_process(tree, argv)[0]
                                                for _ in range(args.cold_runs))
    return out


def measure(tree: Path, args, tmp: Path) -> dict:
    cmd = [sys.executable, str(Path(__file__).resolve()), "--worker", "--tree", str(tree),
           "--sweep", str(args.sweep), "--mc", str(args.mc), "--edits", str(args.edits),
           "--repeat", str(args.repeat)]
    r = subprocess.run(cmd, cwd=tree, env=_env(tree), capture_output=True, text=True)
    if r.returncode:
        raise SystemExit(f"worker failed in {tree}:\n{r.stderr[-3000:]}")
    out = json.loads(r.stdout.strip().splitlines()[-1])
    out.update(process_rows(tree, args, tmp))
    return out


def _export(ref: str, dest: Path) -> Path:
    dest.mkdir()
    archive = subprocess.run(["git", "-C", str(ROOT), "archive", ref], check=True,
                             capture_output=True).stdout
    subprocess.run(["tar", "-x", "-C", str(dest)], input=archive, check=True)
    return dest


# (key, label, unit, scale, per-variant count for the floor ratio, target)
def rows(args):
    n = args.sweep
    return [
        ("floor", f"floor kernel, {n:,} variants", "variants/s", None, 1, ""),
        ("sweep False", "sweep meter-in, circuit only", "variants/s", None, 1, ""),
        ("sweep design", "sweep meter-in, design point", "variants/s", None, 1,
         ">= 1e6/s, <= 2x floor"),
        ("sweep True", "sweep meter-in, --coupled", "variants/s", None, 1, ">= 2e5/s"),
        ("end to end", f"CLI sweep {args.e2e:,} -> Parquet", "s", 1.0, args.e2e,
         "<= 10x floor"),
        ("end to end MB", "  its peak memory", "MB", 1.0, None, "< 1000 MB"),
        ("compare", "chain.compare, 7 strategies", "ms", 1e3, None, "< 30 ms"),
        ("dashboard median", "dashboard recompute, median", "ms", 1e3, None, "< 50 ms"),
        ("dashboard p95", "dashboard recompute, p95", "ms", 1e3, None, "< 100 ms"),
        ("monte carlo", f"Monte Carlo {args.mc:,} samples", "s", 1.0, args.mc,
         "< 1 s (1e5)"),
        ("report", "report (in process)", "s", 1.0, None, "< 2 s"),
        ("cold --help", "cold start: --help", "s", 1.0, None, ""),
        ("cold check", "cold start: check", "s", 1.0, None, ""),
        ("cold compare", "cold start: compare", "s", 1.0, None, "< 1 s"),
        ("cold report", "cold start: report", "s", 1.0, None, ""),
    ]


def _value(key, unit, scale, res):
    v = res[key]
    return 1.0 / v if unit == "variants/s" else v * scale


def _fmt(v):
    return f"{v:,.0f}" if v >= 1000 else f"{v:.3g}"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--baseline", metavar="REF", help="git ref to compare with, e.g. main")
    ap.add_argument("--rounds", type=int, default=1, help="interleaved rounds (best of)")
    ap.add_argument("--sweep", type=int, default=50000, help="variants of the in-process sweeps")
    ap.add_argument("--e2e", type=int, default=1_000_000, help="variants of the CLI sweep")
    ap.add_argument("--mc", type=int, default=100_000, help="Monte Carlo samples")
    ap.add_argument("--edits", type=int, default=20, help="dashboard edits")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--cold-runs", type=int, default=3)
    ap.add_argument("--quick", action="store_true", help="e2e 200 000, Monte Carlo 20 000")
    ap.add_argument("--worker", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--tree", help=argparse.SUPPRESS)
    args = ap.parse_args(argv)
    if args.worker:
        print(json.dumps(worker(args)))
        return 0
    if args.quick:
        args.e2e, args.mc = 200_000, 20_000
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        trees = {"this": ROOT}
        if args.baseline:
            trees[args.baseline] = _export(args.baseline, tmp / "baseline")
        runs = {k: [] for k in trees}
        for _ in range(args.rounds):
            for name, tree in trees.items():
                runs[name].append(measure(tree, args, tmp))
    best = {k: {key: min(r[key] for r in v) for key in v[0]} for k, v in runs.items()}
    heads = ["row", "unit"] + [f"{k}" for k in trees] + ["this/floor"]
    if args.baseline:
        heads += [f"{args.baseline}/floor", "this/base"]
    heads.append("target")
    table = []
    for key, label, unit, scale, count, target in rows(args):
        cells = [label, unit]
        for k in trees:
            cells.append(_fmt(_value(key, unit, scale, best[k])))

        def to_floor(k):
            if count is None:
                return ""
            per = best[k][key] / count
            return f"{per / best[k]['floor']:.1f}x"
        cells.append(to_floor("this"))
        if args.baseline:
            cells.append(to_floor(args.baseline))
            b = best[args.baseline][key]
            cells.append(f"{best['this'][key] / b:.2f}" if b else "")
        cells.append(target)
        table.append(cells)
    widths = [max(len(str(r[i])) for r in table + [heads]) for i in range(len(heads))]
    print(f"heatload speed table ({', '.join(trees)}; python {sys.version.split()[0]}, "
          f"load {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; best of {args.rounds} "
          "interleaved round(s)); x floor = time per variant over the floor kernel's, "
          "this/base = time ratio")
    for r in [heads] + table:
        print("  ".join(str(c).ljust(w) if i == 0 else str(c).rjust(w)
                        for i, (c, w) in enumerate(zip(r, widths))))
    return 0


if __name__ == "__main__":
    sys.exit(main())
