"""Positive-displacement pumps: delivered flow, shaft torque and power, with a
Wilson-type loss model calibrated from a datasheet's efficiencies.

API units: displacement [m^3/rev], shaft speed [rev/s], pressure rise [Pa],
dynamic viscosity [Pa s], flow [m^3/s], torque [N m], power [W].  Inside,
the model is written in the angular form of Wilson's equations
(displacement per radian D/(2 pi), omega = 2 pi n), so the coefficients are
the dimensionless ones of the literature.

Loss model (Wilson):

- slip (leakage) Q_s = C_s (D/2pi) dp / mu, laminar, so it grows as the oil
  thins when it warms up;
- viscous drag torque T_v = C_v (D/2pi) mu omega;
- friction torque T_f = C_f (D/2pi) dp (Coulomb-like, ~ pressure).

With the duty parameter S = mu omega / dp:
eta_v = 1 - C_s/S and eta_hm = 1/(1 + C_v S + C_f).

For a variable pump at stroke fraction x the ideal flow and ideal torque
scale with x D; slip, drag and friction scale with the maximum displacement
D (clearances, piston count and swash-plate bearings do not shrink with the
stroke).  That gives the zero-stroke standby loss of a compensated pump:
the pump still turns, drags, rubs and leaks at the held pressure.
"""

from __future__ import annotations

import math

import numpy as np

from heatload.errors import HeatloadError
from heatload._validate import (
    out as _out,
    as_array as _arr,
    positive as _positive,
    non_negative as _non_negative,
    efficiency as _efficiency,
)

TWO_PI = 2.0 * math.pi

#: Typical rated-point efficiencies per pump type, (eta_v [-], eta_hm [-],
#: rated pressure [Pa]) at about 1500 rpm and 30 mm^2/s.  Typical values,
#: from memory (common practice); a datasheet's values always win.
TYPICAL_PUMP_EFFICIENCIES = {
    "gear": (0.93, 0.88, 200e5),
    "vane": (0.92, 0.88, 160e5),
    "axial-piston": (0.95, 0.92, 280e5),
    "radial-piston": (0.96, 0.93, 350e5),
}

#: Pump kinds heatload knows.
PUMP_KINDS = ("fixed", "variable")












def _fraction(value, name):
    a = _arr(value, name)
    if np.any((a < 0) | (a > 1)):
        raise HeatloadError("must be a fraction in [0, 1]", field=name)
    return a


def duty_parameter(dynamic_viscosity, shaft_speed, pressure):
    """Wilson's duty (Sommerfeld-like) parameter.

    .. math::  S = \\mu \\omega / \\Delta p, \\quad \\omega = 2\\pi n

    Parameters
    ----------
    dynamic_viscosity : numeric
        [Pa s], > 0.
    shaft_speed : numeric
        [rev/s], >= 0.
    pressure : numeric
        Pressure rise [Pa], > 0.

    Returns
    -------
    numeric
        S [-].

    References
    ----------
    Wilson, W. E., Positive-Displacement Pumps and Fluid Motors, Pitman,
    1950 (from memory); Ivantysyn, J.; Ivantysynova, M., Hydrostatic Pumps
    and Motors, 2001, ch. 3.
    """
    mu = _positive(dynamic_viscosity, "dynamic_viscosity")
    n = _non_negative(shaft_speed, "shaft_speed")
    p = _positive(pressure, "pressure")
    return _out(mu * TWO_PI * n / p)


def wilson_coefficients(volumetric_efficiency, hydromechanical_efficiency, rated_pressure,
                        rated_speed, rated_dynamic_viscosity, viscous_share=0.5):
    """Slip, viscous and friction coefficients from a datasheet point.

    .. math::
        S_r = \\mu_r \\omega_r / p_r, \\quad C_s = (1 - \\eta_v) S_r,

        C_v = \\phi (1/\\eta_{hm} - 1)/S_r, \\quad C_f = (1 - \\phi)(1/\\eta_{hm} - 1)

    so that eta_v = 1 - C_s/S and 1/eta_hm - 1 = C_v S + C_f hold exactly at
    the rated point; phi = ``viscous_share`` splits the torque loss there.

    Parameters
    ----------
    volumetric_efficiency : numeric
        eta_v at the rated point [-], in (0, 1].
    hydromechanical_efficiency : numeric
        eta_hm at the rated point [-], in (0, 1].
    rated_pressure : numeric
        [Pa], > 0.
    rated_speed : numeric
        [rev/s], > 0.
    rated_dynamic_viscosity : numeric
        Viscosity of the datasheet point [Pa s], > 0 (kinematic times density).
    viscous_share : numeric
        Share of the rated torque loss that is viscous drag [-], in [0, 1]
        (0.5 when nothing is known; from memory, piston pumps tend lower,
        gear pumps higher).

    Returns
    -------
    tuple of numeric
        (slip C_s, viscous C_v, friction C_f), dimensionless [-].

    Notes
    -----
    One datasheet point cannot separate drag from friction; the share sets
    how the torque loss moves with viscosity and speed away from it.

    References
    ----------
    Wilson, W. E., Positive-Displacement Pumps and Fluid Motors, Pitman,
    1950 (loss model, from memory); McCandlish, D.; Dorey, R. E., Proc. Inst.
    Mech. Eng. B 198 (1984) 165-174 (review of steady-state loss models;
    citation from memory).

    Examples
    --------
    >>> cs, cv, cf = wilson_coefficients(0.93, 0.88, 200e5, 1450 / 60, 0.0278)
    >>> round(cs * 1e9, 1)
    14.8
    """
    ev = _efficiency(volumetric_efficiency, "volumetric_efficiency")
    ehm = _efficiency(hydromechanical_efficiency, "hydromechanical_efficiency")
    p = _positive(rated_pressure, "rated_pressure")
    n = _positive(rated_speed, "rated_speed")
    mu = _positive(rated_dynamic_viscosity, "rated_dynamic_viscosity")
    share = _fraction(viscous_share, "viscous_share")
    s_r = mu * TWO_PI * n / p
    torque_loss = 1.0 / ehm - 1.0
    return (_out((1.0 - ev) * s_r), _out(share * torque_loss / s_r),
            _out((1.0 - share) * torque_loss))


def pump_flow(displacement, shaft_speed, pressure, dynamic_viscosity, slip,
              displacement_fraction=1.0):
    """Flow a pump delivers, ideal flow less laminar slip.

    .. math::  Q = \\max\\left(x D n - C_s \\frac{D\\,\\Delta p}{2\\pi\\mu}, 0\\right)

    Parameters
    ----------
    displacement : numeric
        Maximum displacement D [m^3/rev], > 0.
    shaft_speed : numeric
        n [rev/s], >= 0.
    pressure : numeric
        Pressure rise across the pump [Pa] (outlet gauge, inlet at tank).
    dynamic_viscosity : numeric
        [Pa s], > 0.
    slip : numeric
        C_s [-], >= 0, from :func:`wilson_coefficients`.
    displacement_fraction : numeric
        Stroke x [-], in [0, 1]; 1 for a fixed pump.

    Returns
    -------
    numeric
        Delivered flow [m^3/s], >= 0 (slip that exceeds the ideal flow means
        the pump delivers nothing; it does not suck back).

    Notes
    -----
    Slip scales with the maximum displacement, so it stays at zero stroke.

    References
    ----------
    Wilson, W. E., Positive-Displacement Pumps and Fluid Motors, 1950 (from
    memory).

    Examples
    --------
    >>> q = pump_flow(28e-6, 1450 / 60, 200e5, 0.0278, 1.478e-8)
    >>> round(q * 60000, 1)
    37.8
    """
    d = _positive(displacement, "displacement")
    n = _non_negative(shaft_speed, "shaft_speed")
    p = _arr(pressure, "pressure")
    mu = _positive(dynamic_viscosity, "dynamic_viscosity")
    cs = _non_negative(slip, "slip")
    x = _fraction(displacement_fraction, "displacement_fraction")
    q = x * d * n - cs * d * p / (TWO_PI * mu)
    return _out(np.maximum(q, 0.0))


def pump_torque(displacement, shaft_speed, pressure, dynamic_viscosity, viscous, friction,
                displacement_fraction=1.0):
    """Shaft torque a pump needs: ideal torque plus drag and friction.

    .. math::  T = \\frac{x D \\Delta p + C_v D \\mu \\omega + C_f D |\\Delta p|}{2\\pi},
               \\quad \\omega = 2\\pi n

    Parameters
    ----------
    displacement : numeric
        Maximum displacement D [m^3/rev], > 0.
    shaft_speed : numeric
        [rev/s], >= 0.
    pressure : numeric
        Pressure rise [Pa].
    dynamic_viscosity : numeric
        [Pa s], > 0.
    viscous : numeric
        C_v [-], >= 0.
    friction : numeric
        C_f [-], >= 0.
    displacement_fraction : numeric
        Stroke x [-], in [0, 1].

    Returns
    -------
    numeric
        Shaft torque [N m].

    Notes
    -----
    Only the ideal term scales with the stroke x; drag and friction scale
    with the maximum displacement D, so a variable pump at zero stroke still
    needs torque (standby loss).

    References
    ----------
    Wilson, W. E., Positive-Displacement Pumps and Fluid Motors, 1950 (from
    memory); McCandlish and Dorey, Proc. IMechE B 198 (1984), from memory.
    """
    d = _positive(displacement, "displacement")
    n = _non_negative(shaft_speed, "shaft_speed")
    p = _arr(pressure, "pressure")
    mu = _positive(dynamic_viscosity, "dynamic_viscosity")
    cv = _non_negative(viscous, "viscous")
    cf = _non_negative(friction, "friction")
    x = _fraction(displacement_fraction, "displacement_fraction")
    return _out(pump_torque_unchecked(d, n, p, mu, cv, cf, x))


def pump_torque_unchecked(displacement, shaft_speed, pressure, dynamic_viscosity, viscous,
                          friction, displacement_fraction=1.0):
    """:func:`pump_torque` without its input checks, for the solver's inner loop
    (arrays of fields checked once at load, a stroke the strategy keeps in
    [0, 1]) [N m]."""
    omega = TWO_PI * shaft_speed
    d, p = displacement, pressure
    return (displacement_fraction * d * p + viscous * d * dynamic_viscosity * omega
            + friction * d * np.abs(p)) / TWO_PI


def pump_shaft_power(torque, shaft_speed):
    """Shaft power from torque and speed.

    .. math::  P = 2\\pi n T

    Parameters
    ----------
    torque : numeric
        [N m].
    shaft_speed : numeric
        [rev/s].

    Returns
    -------
    numeric
        Power [W].

    References
    ----------
    Definition of rotational power (ISO 4391 terms).

    Examples
    --------
    >>> round(pump_shaft_power(100.0, 25.0))
    15708
    """
    return _out(pump_shaft_power_unchecked(_arr(torque, "torque"),
                                           _arr(shaft_speed, "shaft_speed")))


def pump_shaft_power_unchecked(torque, shaft_speed):
    """:func:`pump_shaft_power` without its input checks (the solver's arrays) [W]."""
    return TWO_PI * shaft_speed * torque


def displacement_fraction_for_flow(flow, displacement, shaft_speed, pressure,
                                   dynamic_viscosity, slip):
    """Stroke a variable pump needs to deliver a flow plus its slip.

    .. math::  x = \\operatorname{clip}\\left(\\frac{Q + C_s D \\Delta p/(2\\pi\\mu)}{D n}, 0, 1\\right)

    Parameters
    ----------
    flow : numeric
        Flow to deliver [m^3/s], >= 0.
    displacement : numeric
        Maximum displacement [m^3/rev], > 0.
    shaft_speed : numeric
        [rev/s], > 0.
    pressure : numeric
        [Pa].
    dynamic_viscosity : numeric
        [Pa s], > 0.
    slip : numeric
        C_s [-], >= 0.

    Returns
    -------
    numeric
        x [-], in [0, 1]; 1 means the pump cannot deliver more (the caller
        compares :func:`pump_flow` at x = 1 with the demand).

    References
    ----------
    Inverse of the Wilson flow equation (see :func:`pump_flow`).
    """
    q = _non_negative(flow, "flow")
    d = _positive(displacement, "displacement")
    n = _positive(shaft_speed, "shaft_speed")
    p = _arr(pressure, "pressure")
    mu = _positive(dynamic_viscosity, "dynamic_viscosity")
    cs = _non_negative(slip, "slip")
    x = (q + cs * d * p / (TWO_PI * mu)) / (d * n)
    return _out(np.clip(x, 0.0, 1.0))


def speed_for_flow(flow, displacement, pressure, dynamic_viscosity, slip):
    """Shaft speed a fixed pump needs to deliver a flow plus its slip.

    .. math::  n = \\max\\left(\\frac{Q + C_s D \\Delta p/(2\\pi\\mu)}{D}, 0\\right)

    Parameters
    ----------
    flow : numeric
        [m^3/s], >= 0.
    displacement : numeric
        [m^3/rev], > 0.
    pressure : numeric
        [Pa].
    dynamic_viscosity : numeric
        [Pa s], > 0.
    slip : numeric
        C_s [-], >= 0.

    Returns
    -------
    numeric
        Shaft speed [rev/s]; the caller clips it to the drive's speed range.

    Notes
    -----
    At zero flow the pump must still turn fast enough to make up its slip to
    hold pressure.  Slip is taken independent of speed (Wilson).

    References
    ----------
    Inverse of the Wilson flow equation (see :func:`pump_flow`).
    """
    q = _non_negative(flow, "flow")
    d = _positive(displacement, "displacement")
    p = _arr(pressure, "pressure")
    mu = _positive(dynamic_viscosity, "dynamic_viscosity")
    cs = _non_negative(slip, "slip")
    n = (q + cs * d * p / (TWO_PI * mu)) / d
    return _out(np.maximum(n, 0.0))


def validate_pump(pump, field="power_unit.pump"):
    """Check a :class:`heatload.model.Pump` for impossible values.

    Parameters
    ----------
    pump : heatload.model.Pump
    field : str
        Prefix of the field names in errors.

    Returns
    -------
    heatload.model.Pump
        The same pump, when valid.

    Raises
    ------
    HeatloadError
        Naming the first bad field, e.g. ``power_unit.pump.volumetric_efficiency``.
    """
    def f(name):
        return f"{field}.{name}"

    if pump.kind not in PUMP_KINDS:
        raise HeatloadError(f"unknown pump kind {pump.kind!r}; expected one of "
                            f"{', '.join(PUMP_KINDS)}", field=f("kind"))
    if pump.type not in TYPICAL_PUMP_EFFICIENCIES:
        raise HeatloadError(f"unknown pump type {pump.type!r}; expected one of "
                            f"{', '.join(TYPICAL_PUMP_EFFICIENCIES)}", field=f("type"))
    for name in ("displacement", "shaft_speed", "rated_pressure", "max_pressure",
                 "rated_viscosity", "viscosity_min", "viscosity_max"):
        _positive(getattr(pump, name), f(name))
    for name in ("volumetric_efficiency", "hydromechanical_efficiency"):
        _efficiency(getattr(pump, name), f(name))
    if not pump.viscosity_min < pump.viscosity_max:
        raise HeatloadError(
            f"must be below viscosity_max ({pump.viscosity_max:g} m^2/s), got "
            f"{pump.viscosity_min:g} m^2/s", field=f("viscosity_min"))
    if pump.rated_pressure > pump.max_pressure:
        raise HeatloadError(
            f"rated pressure {pump.rated_pressure:g} Pa exceeds the continuous rating "
            f"max_pressure {pump.max_pressure:g} Pa", field=f("rated_pressure"))
    if pump.standby_loss_fraction is not None:
        s = _arr(pump.standby_loss_fraction, f("standby_loss_fraction"))
        if not 0.0 <= float(s) < 1.0:
            raise HeatloadError("must be a fraction in [0, 1)", field=f("standby_loss_fraction"))
    return pump
