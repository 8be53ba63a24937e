"""Regenerate the property tables shipped with the package from CoolProp:

* heatload/data/air_properties.npz: CoolProp's 'Air' (Lemmon et al. 2000
  pseudo-pure fluid), read by :func:`heatload.heat.heat_transfer.air_properties`;
* heatload/data/water_properties.npz: 'Water' (IAPWS-95) at 101325 Pa, read by
  :func:`heatload.cooling.cooler.coolant_properties` (glycol-water stays with CoolProp).

    .venv/bin/python scripts/make_property_tables.py

So sizing a tank, an air or a water cooler never imports CoolProp (a 2-6 s import).

Air: what is stored, per property f in (rho / p, c_p, mu, k):

* In pressure, a second-order expansion about the ideal gas,
  f(T, p) = a0(T) + a1(T) s + a2(T) s^2 with s = p / 1e5 Pa.  This is the
  virial form: rho = p M / (Z R T), 1/Z = 1 - B' p + ..., so rho / p is an
  expansion in p; the dilute-gas viscosity and conductivity get density
  (hence pressure) corrections to first and second order.  The three
  coefficients are the exact quadratic through CoolProp at three Chebyshev
  pressures of the table's range.
* In temperature, each coefficient on a uniform 2 K grid with its second
  derivatives ("moments") of a not-a-knot cubic spline, so the engine
  evaluates the cubic between two nodes with numpy alone (no solve, no scipy).

Over 150 K .. 1000 K and 20 kPa .. 120 kPa (altitude -500 m .. 9000 m is
107.5 .. 30.8 kPa) this reproduces CoolProp within 1e-7 relative
(tests/test_heat_transfer.py checks 1e-6).

Water: rho, c_p, mu, k at 101325 Pa on a 0.5 K grid from 273.16 K (liquid up
to 372.66 K), values and spline moments; within 3e-8 of CoolProp
(tests/test_cooler.py checks 1e-6).

Regenerate after a CoolProp upgrade and run those two tests.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

DATA = Path(__file__).resolve().parents[1] / "heatload" / "data"

T_LOW, T_HIGH, T_STEP = 150.0, 1000.0, 2.0      # [K]
P_LOW, P_HIGH = 20.0e3, 120.0e3                 # [Pa]
P_SCALE = 1.0e5                                 # s = p / P_SCALE
PROPERTIES = ("D", "C", "V", "L")               # CoolProp keys; "D" stored as rho / p


def pressure_nodes(n=3):
    """Chebyshev nodes of [P_LOW, P_HIGH] [Pa] (smallest interpolation error)."""
    k = np.arange(n)
    return 0.5 * (P_LOW + P_HIGH) + 0.5 * (P_HIGH - P_LOW) * np.cos((2 * k + 1) * np.pi / (2 * n))


WATER_LOW, WATER_STEP, WATER_NODES = 273.16, 0.5, 200   # [K]: up to 372.66 K, liquid at 1 atm


def build_water():
    from CoolProp import __version__ as coolprop_version
    from CoolProp.CoolProp import PropsSI
    from scipy.interpolate import CubicSpline

    t = WATER_LOW + WATER_STEP * np.arange(WATER_NODES)
    values = np.array([PropsSI(key, "T", t, "P", 101325.0, "Water") for key in PROPERTIES])
    moments = CubicSpline(t, values, axis=1, bc_type="not-a-knot").derivative(2)(t)
    return dict(values=values, moments=moments,
                temperature=np.array([WATER_LOW, t[-1], WATER_STEP]),
                source=np.array(f"CoolProp {coolprop_version} 'Water' (IAPWS-95) at 101325 Pa; "
                                "rows rho, cp, mu, k; regenerate with "
                                "scripts/make_property_tables.py"))


def build():
    from CoolProp import __version__ as coolprop_version
    from CoolProp.CoolProp import PropsSI
    from scipy.interpolate import CubicSpline

    t = np.arange(T_LOW, T_HIGH + 0.5 * T_STEP, T_STEP)
    p = pressure_nodes()
    vander = np.vander(p / P_SCALE, len(p), increasing=True)
    coefficients = []
    for key in PROPERTIES:
        values = np.array([PropsSI(key, "T", t, "P", pv, "Air") for pv in p])  # (3, nT)
        if key == "D":
            values = values / p[:, None]
        coefficients.append(np.linalg.solve(vander, values))                   # a0, a1, a2
    values = np.concatenate(coefficients)                                      # (12, nT)
    moments = CubicSpline(t, values, axis=1, bc_type="not-a-knot").derivative(2)(t)
    return dict(values=values, moments=moments,
                temperature=np.array([T_LOW, T_HIGH, T_STEP]),
                pressure=np.array([P_LOW, P_HIGH, P_SCALE]),
                source=np.array(f"CoolProp {coolprop_version} 'Air' (Lemmon et al. 2000); "
                                "rows rho/p, cp, mu, k x (a0, a1, a2) in s = p / 1e5 Pa; "
                                "regenerate with scripts/make_property_tables.py"))


def main():
    DATA.mkdir(exist_ok=True)
    for name, data in (("air_properties", build()), ("water_properties", build_water())):
        out = DATA / f"{name}.npz"
        np.savez_compressed(out, **data)
        print(f"wrote {out} ({out.stat().st_size / 1024:.0f} KiB, {data['values'].shape[1]} "
              f"temperatures); {data['source']}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
