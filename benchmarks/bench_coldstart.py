"""Cold starts of the ``heatload`` command: wall time of a fresh process from
a shell, for ``--help``, ``check``, ``compare`` and ``report`` on the default file.

    .venv/bin/python benchmarks/bench_coldstart.py                  # this checkout
    .venv/bin/python benchmarks/bench_coldstart.py --baseline main  # and a git ref, ratios

Each command runs once to warm the byte-code and disk caches, then ``--runs``
times; the table shows the median wall time [s].  With ``--baseline REF`` the
ref is exported (``git archive``) to a temporary folder and run by the same
interpreter with that folder first on ``PYTHONPATH``, interleaved with this
checkout's runs so both see the same machine load; the last column is
this / baseline.  Absolute times drift with the load of the machine; the
ratios of one run are what to compare.
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEFAULT = "duty_cycles/forming_press.toml"


def commands(out_dir: Path):
    return {
        "--help": ["--help"],
        "check": ["check", DEFAULT],
        "compare": ["compare", DEFAULT],
        "report": ["report", DEFAULT, "-o", str(out_dir / "report.html"), "--force"],
    }


def _cpu():
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def _run(tree: Path, argv, cwd: Path):
    """(wall, CPU) seconds of one fresh ``python -m heatload.cli ARGV`` process."""
    env = dict(os.environ, PYTHONPATH=str(tree), COLUMNS="80")
    c0, t0 = _cpu(), time.perf_counter()
    r = subprocess.run([sys.executable, "-m", "heatload.cli", *argv], cwd=cwd, env=env,
                       stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    wall, cpu = time.perf_counter() - t0, _cpu() - c0
    if r.returncode != 0:
        raise SystemExit(f"heatload {' '.join(argv)} failed in {tree}: {r.stderr.strip()}")
    return wall, cpu


def _export(ref: str, dest: Path) -> Path:
    dest.mkdir()
    archive = subprocess.run(["git", "-C", str(ROOT), "archive", ref], check=True,
                             capture_output=True).stdout
    subprocess.run(["tar", "-x", "-C", str(dest)], input=archive, check=True)
    return dest


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=5, help="timed runs per command (median)")
    ap.add_argument("--baseline", metavar="REF", help="git ref to compare with, e.g. main")
    args = ap.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        trees = {"this": ROOT}
        if args.baseline:
            trees[args.baseline] = _export(args.baseline, tmp.joinpath("baseline"))
        rows = []
        for name, argv_ in commands(tmp).items():
            times = {k: [] for k in trees}
            for tree_name, tree in trees.items():
                _run(tree, argv_, cwd=tree)  # warm-up: byte code, disk cache
            for _ in range(args.runs):
                for tree_name, tree in trees.items():
                    times[tree_name].append(_run(tree, argv_, cwd=tree))
            rows.append((name, {k: [statistics.median(x[j] for x in v) for j in (0, 1)]
                                for k, v in times.items()}))
    heads = ["command"]
    for k in trees:
        heads += [f"{k} wall", f"{k} CPU"]
    if args.baseline:
        heads += ["wall ratio", "CPU ratio"]
    print(f"cold starts [s], median of {args.runs} runs (python {sys.version.split()[0]}, "
          f"load {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores); CPU = user + system "
          "time of the process, less sensitive to other load than wall")
    print("  ".join(f"{h:>11}" for h in heads))
    for name, med in rows:
        cells = [name]
        for k in trees:
            cells += [f"{med[k][0]:.2f}", f"{med[k][1]:.2f}"]
        if args.baseline:
            cells += [f"{med['this'][j] / med[args.baseline][j]:.2f}" for j in (0, 1)]
        print("  ".join(f"{c:>11}" for c in cells))
    return 0


if __name__ == "__main__":
    sys.exit(main())
