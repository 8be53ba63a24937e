"""Pipes and hoses: Reynolds number, Darcy friction factor, pressure drop.

Pure, vectorized functions; SI inside: flow [m^3/s], lengths [m], density
[kg/m^3], kinematic viscosity [m^2/s], pressure drop [Pa].
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from heatload.errors import HeatloadError

#: Upper end of the laminar region [-].
RE_LAMINAR = 2000.0
#: Lower end of fully turbulent flow (Colebrook-White) [-].
RE_TURBULENT = 4000.0

_NEWTON_STEPS = 3  # quadratic from Swamee-Jain (~1 %): 1e-2 -> 1e-4 -> 1e-8 -> 1e-16


def _out(value):
    value = np.asarray(value, dtype=float)
    return float(value) if value.ndim == 0 else value


def _compact(a):
    """*a* without its broadcast (stride-0) axes: a view of length 1 along
    them.  Arrays from :func:`numpy.broadcast_to` (the solvers' inputs) are
    then checked and computed once per distinct value, not once per element;
    the results broadcast back to the same values."""
    if a.ndim == 0 or 0 not in a.strides:
        return a
    return a[tuple(slice(0, 1) if st == 0 and n > 1 else slice(None)
                   for st, n in zip(a.strides, a.shape))]


def _arr(value, name):
    try:
        a = _compact(np.asarray(value, dtype=float))
    except (TypeError, ValueError):
        raise HeatloadError(f"expected a number, got {value!r}", field=name) from None
    if not np.isfinite(a).all():
        raise HeatloadError("expected a finite number (not NaN or infinite)", field=name)
    return a


def _check(a, name, low, strict):
    bad = a <= low if strict else a < low
    if bad.any():
        worst = float(np.min(a))
        op = ">" if strict else ">="
        raise HeatloadError(f"must be {op} {low:g}, got {worst:g}", field=name)
    return a


def reynolds_number(flow, inner_diameter, kinematic_viscosity):
    """Reynolds number of flow in a round pipe.

    .. math::  Re = \\frac{v d}{\\nu} = \\frac{4 |Q|}{\\pi d \\nu}

    Parameters
    ----------
    flow : numeric
        [m^3/s] (the sign is the direction; Re uses the magnitude).
    inner_diameter : numeric
        [m], > 0.
    kinematic_viscosity : numeric
        [m^2/s], > 0.

    Returns
    -------
    numeric
        Reynolds number [-], >= 0.

    References
    ----------
    White, F. M., Fluid Mechanics, McGraw-Hill, section 6.1.

    Examples
    --------
    >>> round(reynolds_number(60 / 60000, 0.016, 46e-6))
    1730
    """
    q = _arr(flow, "flow")
    d = _check(_arr(inner_diameter, "inner_diameter"), "inner_diameter", 0.0, True)
    nu = _check(_arr(kinematic_viscosity, "kinematic_viscosity"), "kinematic_viscosity", 0.0, True)
    return _out(4.0 * np.abs(q) / (math.pi * d * nu))


def _colebrook(re, ed):
    """Darcy factor from Colebrook-White by Newton's method on x = 1/sqrt(f),
    started from Swamee-Jain (``x0 = -2 log10(ed/3.7 + 5.74 Re^-0.9)``); re >=
    4000 expected (callers clip).  Natural logs and in-place steps: the
    turbulent elements of a large sweep are its costliest line arithmetic."""
    re, ed = np.asarray(re, float), np.asarray(ed, float)
    if ed.ndim and ed.shape != re.shape:
        re, ed = np.broadcast_arrays(re, ed)
    shape = re.shape
    re, a = np.atleast_1d(re), ed / 3.7
    b = 2.51 / re
    x = np.log(re)                       # Re^-0.9 = exp(-0.9 ln Re)
    x *= -0.9
    np.exp(x, out=x)
    x *= 5.74
    x += a
    np.log(x, out=x)
    x *= -_TWO_OVER_LN10                 # Swamee-Jain's 1/sqrt(f)
    arg, step = np.empty_like(x), np.empty_like(x)
    for _ in range(_NEWTON_STEPS):
        # g = x + 2 log10(a + b x),  g' = 1 + 2 b / (ln 10 (a + b x))
        np.multiply(b, x, out=arg)
        arg += a
        np.log(arg, out=step)
        step *= _TWO_OVER_LN10
        step += x
        np.divide(b, arg, out=arg)
        arg *= _TWO_OVER_LN10
        arg += 1.0
        step /= arg
        x -= step
    x *= x
    return (1.0 / x).reshape(shape)


_TWO_OVER_LN10 = 2.0 / math.log(10.0)


def _friction_times_re(re, ed):
    """f*Re, bounded (64) as Re -> 0, so that drops stay finite at zero flow.

    Colebrook's Newton steps run only on the elements that need them (Re >=
    4000, and the 4000 end of the transition once per distinct roughness):
    the laminar elements of a sweep cost one comparison each.
    """
    re = np.asarray(re, float)
    ed = np.asarray(ed, float)
    if ed.ndim == 0 and re.size <= _SMALL:
        return _friction_times_re_small(re, float(ed))
    shape = np.broadcast_shapes(re.shape, ed.shape)
    out = np.full(shape, 64.0)
    f_2000 = 64.0 / RE_LAMINAR
    trans = re >= RE_LAMINAR
    if not trans.any():
        return out
    re_b = np.broadcast_to(re, shape)
    ed_b = np.broadcast_to(ed, shape)
    turb = re_b >= RE_TURBULENT
    mid = trans & ~turb
    if turb.any():
        r = re_b[turb]
        out[turb] = _colebrook(r, ed_b[turb]) * r
    if mid.any():
        r = re_b[mid]
        ed_c = _compact(ed_b)
        if ed_c.size == 1:
            f_4000 = _colebrook(np.full(1, RE_TURBULENT), ed_c.reshape(1))[0]
        else:
            f_4000 = _colebrook(np.full(int(mid.sum()), RE_TURBULENT), ed_b[mid])
        w = (r - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
        out[mid] = (f_2000 + (f_4000 - f_2000) * w) * r
    return out


#: Up to this many elements the friction factor is computed on whole arrays
#: (no gathers): a scenario's few phases cost fewer array passes that way.
_SMALL = 64


def _friction_times_re_small(re, ed):
    """:func:`_friction_times_re` of a few elements and one roughness *ed*:
    Colebrook on every element (at Re >= 4000, the same steps), kept where
    turbulent."""
    f_2000 = 64.0 / RE_LAMINAR
    turb = re >= RE_TURBULENT
    if not turb.any():              # laminar lines, the usual case: no Newton steps
        out = np.full(re.shape, 64.0)
    else:
        out = np.where(turb, _colebrook(np.maximum(re, RE_TURBULENT), ed) * re, 64.0)
    mid = (re >= RE_LAMINAR) & ~turb
    if mid.any():
        w = (re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
        out = np.where(mid, (f_2000 + (_colebrook_4000(ed) - f_2000) * w) * re, out)
    return out


@lru_cache(maxsize=64)
def _colebrook_4000(ed):
    """Colebrook's factor at Re = 4000 for one relative roughness (the top of the
    transition's interpolation)."""
    return _colebrook(np.full(1, RE_TURBULENT), np.full(1, ed))[0]


def friction_factor(reynolds, relative_roughness=0.0):
    """Darcy friction factor of a round pipe, laminar to fully rough.

    .. math::
        f = 64/Re \\quad (Re < 2000)

        \\frac{1}{\\sqrt f} = -2 \\log_{10}\\left(\\frac{\\varepsilon/d}{3.7}
            + \\frac{2.51}{Re \\sqrt f}\\right) \\quad (Re > 4000)

    Between Re = 2000 and 4000 the factor is interpolated linearly in Re
    between the laminar value at 2000 (0.032) and the Colebrook value at
    4000.

    Parameters
    ----------
    reynolds : numeric
        [-], > 0.
    relative_roughness : numeric
        Absolute roughness over inner diameter [-], >= 0.

    Returns
    -------
    numeric
        Darcy friction factor [-].

    Notes
    -----
    Colebrook-White is solved by six Newton steps on 1/sqrt(f) from the
    Swamee-Jain estimate, which converges to machine precision for
    4000 <= Re <= 1e8 and relative roughness up to 0.05.  The transition
    interpolation is a convention: real flow there is intermittent and no
    correlation is reliable (expect +-30 %).

    References
    ----------
    Colebrook, C. F., J. Inst. Civ. Eng. 11 (1939) 133-156.
    Swamee, P. K.; Jain, A. K., J. Hydraul. Div. ASCE 102 (1976) 657-664.

    Examples
    --------
    >>> round(friction_factor(1e5, 1e-4), 6)
    0.018514
    """
    re = _check(_arr(reynolds, "reynolds"), "reynolds", 0.0, True)
    ed = _check(_arr(relative_roughness, "relative_roughness"), "relative_roughness", 0.0, False)
    re, ed = np.broadcast_arrays(re, ed)
    return _out(_friction_times_re(re, ed) / re)


def line_pressure_drop(flow, inner_diameter, length, density, kinematic_viscosity,
                       roughness=1.5e-6, fittings_k=0.0):
    """Pressure drop of a pipe or hose (Darcy-Weisbach plus minor losses).

    .. math::  \\Delta p = \\left(f \\frac{L}{d} + K\\right) \\frac{\\rho v |v|}{2},
               \\quad v = \\frac{4 Q}{\\pi d^2}

    Parameters
    ----------
    flow : numeric
        [m^3/s]; negative gives a negative drop.
    inner_diameter : numeric
        [m], > 0.
    length : numeric
        [m], >= 0.
    density : numeric
        [kg/m^3], > 0.
    kinematic_viscosity : numeric
        [m^2/s], > 0.
    roughness : numeric
        Absolute wall roughness [m], >= 0 (drawn steel tube 1.5 um, common
        practice).
    fittings_k : numeric
        Sum of minor-loss coefficients of bends and fittings [-], >= 0.

    Returns
    -------
    numeric
        Pressure drop [Pa], 0 at zero flow.

    Notes
    -----
    The friction term is computed as (f Re) nu rho L v / (2 d^2), which is
    finite as the flow goes to zero (laminar: 32 mu L v / d^2).

    References
    ----------
    White, F. M., Fluid Mechanics, McGraw-Hill, sections 6.4-6.9.

    Examples
    --------
    >>> round(line_pressure_drop(60 / 60000, 0.016, 3.0, 870.0, 46e-6) / 1e5, 3)
    0.746
    """
    q = _arr(flow, "flow")
    d = _check(_arr(inner_diameter, "inner_diameter"), "inner_diameter", 0.0, True)
    ell = _check(_arr(length, "length"), "length", 0.0, False)
    rho = _check(_arr(density, "density"), "density", 0.0, True)
    nu = _check(_arr(kinematic_viscosity, "kinematic_viscosity"), "kinematic_viscosity", 0.0, True)
    eps = _check(_arr(roughness, "roughness"), "roughness", 0.0, False)
    k = _check(_arr(fittings_k, "fittings_k"), "fittings_k", 0.0, False)
    shape = np.broadcast_shapes(np.shape(flow), np.shape(inner_diameter), np.shape(length),
                                np.shape(density), np.shape(kinematic_viscosity),
                                np.shape(roughness), np.shape(fittings_k))
    return _out(_line_drop(q, d, ell, rho, nu, eps, k, shape))


def line_pressure_drop_unchecked(flow, inner_diameter, length, density, kinematic_viscosity,
                                 roughness, fittings_k):
    """:func:`line_pressure_drop` without its input checks, for the solver's inner
    loop: float arrays whose fields the loader (:mod:`heatload.io`) and the
    sweep's overrides (:class:`heatload.paths.Overrides`) checked once.

    Returns an array of the broadcast shape of the arguments [Pa].
    """
    shape = np.broadcast_shapes(np.shape(flow), np.shape(inner_diameter), np.shape(length),
                                np.shape(density), np.shape(kinematic_viscosity),
                                np.shape(roughness), np.shape(fittings_k))
    c = _compact
    return _line_drop(np.asarray(flow), c(np.asarray(inner_diameter)), c(np.asarray(length)),
                      c(np.asarray(density)), c(np.asarray(kinematic_viscosity)),
                      c(np.asarray(roughness)), c(np.asarray(fittings_k)), shape)


def _line_drop(q, d, ell, rho, nu, eps, k, shape):
    """The equation of :func:`line_pressure_drop` on checked arrays."""
    v = 4.0 * q / (math.pi * d * d)
    re = np.abs(v) * d / nu
    f_re = _friction_times_re(re, eps / d)
    friction = f_re * nu * rho * ell * v / (2.0 * d * d)
    minor = k * rho * v * np.abs(v) / 2.0
    dp = friction + minor
    return dp if dp.shape == shape else np.broadcast_to(dp, shape)
