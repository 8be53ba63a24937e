"""Periodic steady state: closed form vs time stepping at equal accuracy;
Monte Carlo of 10 000 samples."""

import time

import numpy as np
from scipy.integrate import solve_ivp

from heatload import io
from heatload.heat import thermal
from heatload.studies import uncertainty
from heatload.chain import compare

SC = io.load_scenario(io.default_scenario_path())


def main():
    o = compare(SC, ["load-sensing"]).outcomes[0]
    th = o.thermal
    q, d = th.phase_heat, th.phase_durations
    cap, ua, ta = th.capacity, th.conductance, SC.ambient.temperature
    t0 = time.perf_counter()
    for _ in range(200):
        ps = thermal.periodic_steady_state(q, d, cap, ua, ta)
    t_closed = (time.perf_counter() - t0) / 200
    # time stepping: integrate cycle after cycle from the mean until the cycle
    # start repeats within 0.01 K of the closed form (same accuracy)
    edges = np.concatenate([[0.0], np.cumsum(d)])
    period = edges[-1]

    def rhs(t, y):
        i = min(np.searchsorted(edges, t % period, side="right") - 1, len(q) - 1)
        return [(q[i] - ua * (y[0] - ta)) / cap]

    t0 = time.perf_counter()
    y = float(ps.mean)
    cycles = 0
    while True:
        for i in range(len(q)):   # one solve per phase: the heat is constant inside
            sol = solve_ivp(lambda t, yy: [(q[i] - ua * (yy[0] - ta)) / cap], (0, d[i]), [y],
                            rtol=1e-8, atol=1e-6)
            y = sol.y[0, -1]
        cycles += 1
        if abs(y - ps.boundaries[0]) < 0.01 or cycles > 100000:
            break
    t_step = time.perf_counter() - t0
    print(f"{'method':30s} {'time [s]':>10s}")
    print(f"{'closed form':30s} {t_closed:10.2e}")
    print(f"{'solve_ivp, ' + str(cycles) + ' cycles':30s} {t_step:10.2e}")
    print(f"ratio {t_step / t_closed:.0f}x (cycle start {ps.boundaries[0] - 273.15:.3f} vs "
          f"{y - 273.15:.3f} degC)")
    t0 = time.perf_counter()
    r = uncertainty.monte_carlo(SC, "load-sensing", samples=10000, seed=1)
    print(f"\nMonte Carlo 10 000 samples (load-sensing, the file's inputs): "
          f"{time.perf_counter() - t0:.1f} s; P50/P90/P95 duty "
          + " / ".join(f"{v / 1e3:.2f}" for v in r.percentiles['cooler_duty_W'].values()) + " kW")


if __name__ == "__main__":
    main()
