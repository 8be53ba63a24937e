"""Writes the invented demo logs of this folder (run from the repository root:
``.venv/bin/python duty_cycles/logs/make_demos.py``).

Nothing here was measured: the numbers are made up to look like a day of a
platform lift's power unit (platform_lift.toml) and one cycle of a press.
"""

from datetime import datetime, timedelta
from pathlib import Path

import numpy as np

from heatload.logfit import tank_temperatures

HERE = Path(__file__).resolve().parent


def temperature_log():
    # invented truth: 1.5 kW into the oil while running, UA 24 W/K, C 150 kJ/K
    heat, ua, capacity = 1500.0, 24.0, 150e3
    rng = np.random.default_rng(7)
    t = np.arange(0.0, 14 * 3600.0 + 1.0, 60.0)
    hours = t / 3600.0
    ambient = 17.0 + 9.0 * np.sin(np.pi * np.clip(hours - 1.0, 0, 12) / 12.0) \
        + rng.normal(0.0, 0.15, t.size) + 273.15
    running = ((hours < 4.0) | ((hours >= 4.5) & (hours < 8.0))).astype(int)
    oil = tank_temperatures(t, ambient, running, heat / capacity, ua / capacity, 291.15)
    oil = np.round(oil - 273.15 + rng.normal(0.0, 0.2, t.size), 1)
    start = datetime(2026, 3, 2, 6, 0, 0)
    lines = ["# Invented demo log (not a measurement): a platform lift's power unit over",
             "# one day shift and the evening after.  Made by make_demos.py from the tank",
             "# model with heat 1.5 kW while running, UA 24 W/K, C 150 kJ/K, noise 0.2 K.",
             "time,oil temperature [degC],ambient [degC],running"]
    for ti, o, a, r in zip(t, oil, ambient, running):
        stamp = (start + timedelta(seconds=float(ti))).isoformat(sep=" ")
        lines.append(f"{stamp},{o:.1f},{a - 273.15:.1f},{r}")
    (HERE / "platform_lift_day.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")


def pressure_trace():
    # invented press cycle: approach, pressing, dwell, return, part change
    # (kind, duration [s], pressure [bar], flow [L/min], speed [mm/s]; + extends)
    cycle = [("approach", 2.4, 35.0, 52.0, 110.0), ("press", 3.0, 145.0, 6.0, 6.0),
             ("dwell", 2.0, 150.0, 0.0, 0.0), ("return", 2.6, 55.0, 52.0, -108.0),
             ("part change", 6.0, 6.0, 0.0, 0.0)]
    rng = np.random.default_rng(11)
    dt = 0.02
    p, q, v = [], [], []
    for _ in range(4):
        for _, d, pb, ql, sp in cycle:
            n = int(round(d / dt))
            p += [pb] * n
            q += [ql] * n
            v += [sp] * n
    kernel = np.ones(6) / 6.0           # valves take about 0.1 s to shift
    p = np.convolve(p, kernel, "same") + rng.normal(0.0, 1.5, len(p))
    q = np.convolve(q, kernel, "same") + rng.normal(0.0, 0.4, len(q))
    x = np.cumsum(np.asarray(v) * dt) + rng.normal(0.0, 0.1, len(v))
    lines = ["# Invented demo trace (not a measurement): four cycles of a small press,",
             "# made by make_demos.py: approach, press, dwell, return, part change.",
             "time [s],pump pressure [bar],pump flow [L/min],ram position [mm]"]
    for i, (pi, qi, xi) in enumerate(zip(p, q, x)):
        lines.append(f"{i * dt:.2f},{pi:.1f},{qi:.2f},{xi:.1f}")
    (HERE / "press_trace.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")


if __name__ == "__main__":
    temperature_log()
    pressure_trace()
