"""Fluid properties from tables shipped with the package (``heatload/data/``),
made from CoolProp by ``scripts/make_property_tables.py``: the engine reads them
with numpy alone, so no run that sizes a tank or an air or water cooler waits
for CoolProp's import (several seconds).

Each table holds, on a uniform temperature grid, the values of a few property
rows and their second derivatives ("moments") of a not-a-knot cubic spline, so
the cubic between two nodes is evaluated without a solve (:func:`cubic_spline`).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from heatload.errors import HeatloadError

#: Liquid water at 1 atm: the range of the shipped table [K] (freezing .. just
#: below boiling, as :func:`heatload.cooling.cooler.coolant_properties` accepts).
WATER_TEMPERATURE_RANGE = (273.16, 372.5)


@lru_cache(maxsize=None)
def load(name: str) -> dict:
    """The arrays of ``heatload/data/<name>.npz`` (read once)."""
    from importlib.resources import files

    try:
        with files("heatload").joinpath("data", f"{name}.npz").open("rb") as fh:
            with np.load(fh, allow_pickle=False) as d:
                return {k: d[k] for k in d.files}
    except OSError as exc:
        raise HeatloadError(f"the property table {name}.npz is missing from the installed "
                            f"package ({exc}); reinstall heatload", field="data") from None


def cubic_spline(t, values, moments, t0, step):
    """Rows (k, n) of a cubic spline at *t* (n,) from its values and second
    derivatives (k, nodes) on the uniform grid t0, t0 + step, ... .

    S(t) = A y_i + B y_(i+1) + [(A^3 - A) M_i + (B^3 - B) M_(i+1)] h^2 / 6,
    B = (t - t_i) / h, A = 1 - B.

    References
    ----------
    Press, Teukolsky, Vetterling, Flannery, Numerical Recipes, 3rd ed.,
    Cambridge 2007, eq. 3.3.3.
    """
    x = (np.asarray(t, float) - t0) / step
    i = np.clip(x.astype(np.intp), 0, values.shape[1] - 2)
    b = x - i
    a = 1.0 - b
    return (a * values[:, i] + b * values[:, i + 1]
            + ((a ** 3 - a) * moments[:, i] + (b ** 3 - b) * moments[:, i + 1])
            * (step * step / 6.0))


def water(temperature):
    """Density [kg/m^3], c_p [J/(kg K)], viscosity [Pa s], conductivity [W/(m K)]
    of liquid water at 101325 Pa after CoolProp's IAPWS-95 'Water', each shaped
    like *temperature* [K] (within :data:`WATER_TEMPERATURE_RANGE`, checked by
    the caller).

    Notes
    -----
    Cubic spline on a 0.5 K grid; within 1e-7 of CoolProp (a test checks 1e-6).

    References
    ----------
    Wagner and Pruss, J. Phys. Chem. Ref. Data 31 (2002) 387 (IAPWS-95);
    Huber et al., J. Phys. Chem. Ref. Data 38 (2009) 101 (viscosity), 41 (2012)
    033102 (conductivity); Bell et al., Ind. Eng. Chem. Res. 53 (2014) 2498.

    Examples
    --------
    Water at 25 degC: 997.05 kg/m^3, 0.890 mPa s (IAPWS; Incropera et al.,
    6th ed., Table A.6: 997, 0.855 at 300 K).

    >>> rho, cp, mu, k = water(298.15)
    >>> round(float(rho), 2), round(float(mu) * 1e3, 3)
    (997.05, 0.89)
    """
    t = np.asarray(temperature, float)
    d = load("water_properties")
    t0, step = d["temperature"][0], d["temperature"][2]
    return tuple(cubic_spline(t.ravel(), d["values"], d["moments"], t0, step)
                 .reshape((4,) + t.shape))
