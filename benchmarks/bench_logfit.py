"""Time of reading and fitting temperature logs of growing length, and the
exact solution's closed-form recurrence against a plain Python loop over the
same samples (the one-step formula), measured side by side.

Synthetic logs (made here, invented values): a shift with a break and a
cool-down sampled every 60 s, 10 s and 1 s, noise 0.2 K; then logs at the
reader's row limit (``logs.MAX_ROWS``, 1 s steps, shifts and nights over 23
days), one with the shifts and one flat (oil held at 55 degC, running
throughout: the case that identifies nothing and used to send the search
for the time constant off towards zero).

    .venv/bin/python benchmarks/bench_logfit.py
"""

from __future__ import annotations

import math
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import numpy as np  # noqa: E402

from heatload.measurement import logfit, measured

K0 = 273.15
C, UA, P = 600e3, 55.0, 4000.0


def synthetic(step, rows=None):
    rng = np.random.default_rng(1)
    t = np.arange(0.0, 16 * 3600.0, step) if rows is None else np.arange(rows) * step
    ta = K0 + 18 + 6 * np.sin(np.pi * t / 86400)
    day = t % 86400.0
    run = ((day < 4 * 3600) | ((day >= 4.5 * 3600) & (day < 9 * 3600))).astype(float)
    y = logfit.tank_temperatures(t, ta, run, P / C, UA / C, K0 + 15) + rng.normal(0, 0.2, t.size)
    return t, y, ta, run


def flat(rows):
    rng = np.random.default_rng(2)
    t = np.arange(rows) * 1.0
    return t, K0 + 55 + rng.normal(0, 0.2, rows), np.full(rows, K0 + 20), np.ones(rows)


def loop(t, ta, run, q, k, t0):
    out = [t0]
    for i in range(len(t) - 1):
        h = t[i + 1] - t[i]
        inf = q * run[i] / k - (ta[i + 1] - ta[i]) / h / k
        th = out[-1] - ta[i]
        out.append(ta[i + 1] + inf + (th - inf) * math.exp(-k * h))
    return out


def main():
    from heatload.measurement.logs import MAX_ROWS

    print(f"{'log':>6} {'rows':>9} {'read [s]':>9} {'fit [s]':>8} {'model [ms]':>11} "
          f"{'loop [ms]':>10} {'ratio':>6}")
    cases = [(f"{step:.0f} s", synthetic(step)) for step in (60.0, 10.0, 1.0)]
    cases += [("shifts", synthetic(1.0, MAX_ROWS)), ("flat", flat(MAX_ROWS))]
    with tempfile.TemporaryDirectory() as d:
        for name, (t, y, ta, run) in cases:
            path = Path(d) / "log.csv"
            with path.open("w") as f:
                f.write("time [s],oil [degC],ambient [degC],running\n")
                np.savetxt(f, np.column_stack([t, y - K0, ta - K0, run]),
                           fmt=["%.0f", "%.3f", "%.3f", "%d"], delimiter=",")
            t0 = time.perf_counter()
            log = measured.read_temperature_log(path)
            t1 = time.perf_counter()
            measured.fit_log(log, C)
            t2 = time.perf_counter()
            logfit.tank_temperatures(t, ta, run, P / C, UA / C, K0 + 15)
            t3 = time.perf_counter()
            loop(t, ta, run, P / C, UA / C, K0 + 15)
            t4 = time.perf_counter()
            print(f"{name:>6} {t.size:>9,} {t1 - t0:>9.2f} {t2 - t1:>8.2f} "
                  f"{1e3 * (t3 - t2):>11.2f} {1e3 * (t4 - t3):>10.1f} "
                  f"{(t4 - t3) / (t3 - t2):>6.0f}")


if __name__ == "__main__":
    main()
