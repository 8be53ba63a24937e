"""This checkout against another one (e.g. main): chain.compare and 20 000-variant
sweeps timed in both, runs interleaved so both see the same machine load;
prints the best times and the ratios this / other.

    python benchmarks/versus.py /path/to/other/checkout [--rounds 3]
"""

import argparse
import json
import os
import pathlib
import subprocess
import sys

HERE = pathlib.Path(__file__).resolve().parents[1]

CASE = r"""
import json, time
import numpy as np
from heatload import chain, io
from heatload.studies import variants
SC = io.load_scenario(io.default_scenario_path())
def timed(fn, repeat):
    best = np.inf
    for _ in range(repeat):
        t = time.perf_counter(); fn(); best = min(best, time.perf_counter() - t)
    return best
chain.compare(SC)
out = {"chain.compare (7 strategies)": timed(lambda: chain.compare(SC), 5)}
vals = {"power_unit.pump.displacement": np.linspace(16e-6, 40e-6, 20000)}
for kind in ("meter-in", "load-sensing"):
    for th in (False, "design", True):
        out[f"sweep 20000 {kind} thermal={th}"] = timed(
            lambda: variants.evaluate_variants(SC, kind, vals, thermal=th), 2)
print(json.dumps(out))
"""


def run(root):
    env = dict(os.environ, PYTHONPATH=str(root))
    out = subprocess.run([sys.executable, "-c", CASE], capture_output=True, text=True,
                         env=env, cwd=str(root))
    if out.returncode:
        raise SystemExit(out.stderr[-2000:])
    return json.loads(out.stdout.strip().splitlines()[-1])


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("other", help="the other checkout (its top folder)")
    ap.add_argument("--rounds", type=int, default=3)
    args = ap.parse_args()
    roots = {"this": HERE, "other": pathlib.Path(args.other).resolve()}
    res = {k: [] for k in roots}
    for _ in range(args.rounds):
        for k, root in roots.items():
            res[k].append(run(root))
    print(f"{'case':40s} {'other [s]':>10s} {'this [s]':>10s} {'this/other':>11s}")
    for key in res["this"][0]:
        a = min(r[key] for r in res["other"])
        b = min(r[key] for r in res["this"])
        print(f"{key:40s} {a:10.3f} {b:10.3f} {b / a:11.2f}")


if __name__ == "__main__":
    main()
