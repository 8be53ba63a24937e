"""Sweep throughput: variants per second, vectorized vs one-by-one, cost per
variant relative to one elementwise numpy op on an array of the same length."""

import time

import numpy as np

from heatload import io
from heatload.studies import variants

SC = io.load_scenario(io.default_scenario_path())
PATH = "power_unit.pump.displacement"


def timed(fn, repeat=3):
    best = np.inf
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def main():
    variants.evaluate_variants(SC, "meter-in", {PATH: np.linspace(16e-6, 40e-6, 50)})  # warm caches
    print(f"{'strategy':22s} {'thermal':8s} {'N':>7s} {'time [s]':>9s} {'variants/s':>11s} "
          f"{'per variant / numpy op':>22s}")
    for kind in ("meter-in", "load-sensing"):
        for thermal in (False, "design", True):
            n = 20000
            vals = {PATH: np.linspace(16e-6, 40e-6, n)}
            t = timed(lambda: variants.evaluate_variants(SC, kind, vals, thermal=thermal), 5)
            x = np.random.default_rng(0).random(n * len(SC.phases))
            t_op = timed(lambda: np.multiply(x, 1.0001), 20)   # one op on variants x phases
            print(f"{kind:22s} {str(thermal):8s} {n:7d} {t:9.3f} {n / t:11.0f} "
                  f"{t / t_op:22.0f}")
    # vectorized vs a Python loop of single-variant calls (same 200 variants)
    n = 200
    vals = np.linspace(16e-6, 40e-6, n)
    t_vec = timed(lambda: variants.evaluate_variants(SC, "meter-in", {PATH: vals}), 3)
    t_loop = timed(lambda: [variants.evaluate_variants(SC, "meter-in", {PATH: vals[i:i + 1]})
                            for i in range(n)], 1)
    print(f"\n{n} variants, meter-in, thermal: vectorized {t_vec:.3f} s, loop {t_loop:.3f} s, "
          f"ratio {t_loop / t_vec:.0f}x")


if __name__ == "__main__":
    main()
