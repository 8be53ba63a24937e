"""All seven strategies x the 12-phase cycle; chain.compare time."""

import time

import numpy as np

from heatload import chain, io
from heatload.hydraulics import circuits, cycle
from heatload.model import STRATEGIES

SC = io.load_scenario(io.default_scenario_path())


def main():
    c = cycle.circuit_inputs(SC, SC.strategies[0])
    n_ph = len(SC.phases)
    circuits.solve_all(c)
    t0 = time.perf_counter()
    reps = 20
    for _ in range(reps):
        circuits.solve_all(c, STRATEGIES)
    t = (time.perf_counter() - t0) / reps
    print(f"7 strategies x {n_ph} phases, scalar scenario: {t * 1e3:.1f} ms per pass, "
          f"{t / (7 * n_ph) * 1e6:.0f} us per strategy-phase")
    chain.compare(SC)
    t0 = time.perf_counter()
    chain.compare(SC)
    print(f"chain.compare (7 strategies, thermal coupling, cooler): "
          f"{(time.perf_counter() - t0) * 1e3:.0f} ms")
    from heatload.studies import variants
    t0 = time.perf_counter()
    for s in SC.strategies:
        variants.evaluate_variants(SC, s)
    print(f"variants.evaluate_variants, 7 strategies one by one: "
          f"{(time.perf_counter() - t0) * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
