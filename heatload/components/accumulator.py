"""Gas-charged (bladder or piston) accumulators: volume and energy between two pressures.

The gas follows a polytropic law between the working pressures,

    p V^n = p0 V0^n      (absolute pressures)

with V0 the gas volume at the precharge p0 (the accumulator's nominal size),
n = 1 for slow (isothermal) charging and discharging, n = 1.4 for fast
(adiabatic, nitrogen as an ideal diatomic gas) ones.  The oil an accumulator
takes in or gives out between p_min and p_max is the change of its gas volume;
the work the oil does (or receives) over that swing, divided by that volume,
is its volume-weighted mean pressure, the pressure at which a pump charging it
and the circuit drawing from it are booked.

Pressures in and out are gauge [Pa] (tank = 0) like the rest of the engine;
inside, absolute with the standard atmosphere (ISO 2533, 101 325 Pa).

References
----------
Ideal-gas polytropic process, e.g. Y. A. Cengel, M. A. Boles,
*Thermodynamics: An Engineering Approach*, ch. 4 (boundary work of a
polytropic process, W = (p2 V2 - p1 V1)/(1 - n), n = 1: p1 V1 ln(V2/V1)).
Sizing practice (precharge about 0.9 of the minimum working pressure, n = 1
for cycles of minutes): common practice, from memory.
"""

from __future__ import annotations

import numpy as np

#: Standard atmosphere [Pa] (ISO 2533), to turn gauge into absolute pressures.
ATMOSPHERE = 101325.0


def gas_volume(pressure, precharge, gas_volume0, exponent=1.0):
    """Gas volume of an accumulator at *pressure* [m^3].

    .. math::  V = V_0 \\left(\\frac{p_0 + p_a}{p + p_a}\\right)^{1/n}

    Parameters
    ----------
    pressure : numeric
        Oil pressure [Pa gauge], >= precharge (below it the bladder is empty
        and the gas volume is V0).
    precharge : numeric
        Gas precharge p0 [Pa gauge], > -p_a.
    gas_volume0 : numeric
        Gas volume at the precharge (nominal size) V0 [m^3].
    exponent : numeric
        Polytropic exponent n [-] (1 isothermal, 1.4 adiabatic nitrogen).

    Returns
    -------
    numeric
        [m^3]

    Examples
    --------
    Isothermal, 10 L precharged to 90 bar, at 180 bar: about half the gas
    (Boyle: 91.01 / 181.01 x 10 L = 5.03 L).

    >>> round(float(gas_volume(180e5, 90e5, 0.010)) * 1e3, 3)
    5.028
    """
    p = np.maximum(np.asarray(pressure, float), precharge)
    return gas_volume0 * ((precharge + ATMOSPHERE) / (p + ATMOSPHERE)) ** (1.0 / exponent)


def usable_volume(p_min, p_max, precharge, gas_volume0, exponent=1.0):
    """Oil volume delivered from *p_max* down to *p_min* [m^3]:
    ``V(p_min) - V(p_max)`` of :func:`gas_volume`.

    Notes
    -----
    Needs precharge <= p_min (else the bladder bottoms out above p_min and
    part of the swing delivers nothing).
    """
    return (gas_volume(p_min, precharge, gas_volume0, exponent)
            - gas_volume(p_max, precharge, gas_volume0, exponent))


def mean_pressure(p_min, p_max, exponent=1.0):
    """Volume-weighted mean pressure of a swing between *p_min* and *p_max* [Pa gauge].

    .. math::  \\bar p = \\frac{W}{V_b - V_a} - p_a, \\qquad
               W = \\frac{p_a V_a - p_b V_b}{n - 1} \\;(n \\ne 1), \\quad
               W = p_b V_b \\ln\\frac{V_b}{V_a} \\;(n = 1)

    with a the state at p_max, b at p_min (absolute pressures).  The result
    does not depend on the precharge or the size: both scale V_a and V_b alike.

    Parameters
    ----------
    p_min, p_max : numeric
        Working pressures [Pa gauge], p_min < p_max.
    exponent : numeric
        Polytropic exponent n [-].

    Returns
    -------
    numeric
        [Pa gauge]

    Examples
    --------
    Isothermal between 100 and 150 bar: ln(p_a / p_b) / (1/p_b - 1/p_a) in
    absolute bar (p_b = 101.013, p_a = 151.013): 122.68 bar absolute, 121.67 bar gauge.

    >>> round(float(mean_pressure(100e5, 150e5)) / 1e5, 2)
    121.67
    """
    pa = np.asarray(p_max, float) + ATMOSPHERE
    pb = np.asarray(p_min, float) + ATMOSPHERE
    n = np.asarray(exponent, float)
    # unit precharge volume at unit pressure: V = p^(-1/n); only ratios matter
    va, vb = pa ** (-1.0 / n), pb ** (-1.0 / n)
    iso = np.abs(n - 1.0) < 1e-9
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.where(iso, pb * vb * np.log(vb / va),
                     (pa * va - pb * vb) / np.where(iso, 1.0, n - 1.0))
    return w / (vb - va) - ATMOSPHERE


def pump_duty(volume_drawn, pump_flow, cycle_time):
    """On-time fraction of a pump recharging an accumulator over one cycle [-].

    .. math::  d = \\frac{\\sum_i Q_i t_i}{Q_p T}

    Parameters
    ----------
    volume_drawn : numeric
        Oil the circuit draws over the cycle [m^3].
    pump_flow : numeric
        Pump's delivered flow while charging [m^3/s], > 0.
    cycle_time : numeric
        [s], > 0.

    Returns
    -------
    numeric
        [-]; above 1 the pump cannot recharge within the cycle.
    """
    return volume_drawn / (np.maximum(pump_flow, 1e-30) * cycle_time)
