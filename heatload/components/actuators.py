"""Actuators: differential cylinders and hydraulic motors, and the energy of
compressing the oil in a chamber.

SI inside: lengths [m], areas [m^2], displacement [m^3/rev], shaft speed
[rev/s], torque [N m], pressure [Pa], volume [m^3], bulk modulus [Pa].
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












def _name(field, part):
    return f"{field}.{part}" if field else part


def cylinder_areas(bore, rod, field=None):
    """Piston (cap side) and annulus (rod side) areas of a differential cylinder.

    .. math::  A_1 = \\pi D^2/4, \\qquad A_2 = \\pi (D^2 - d^2)/4

    Parameters
    ----------
    bore : numeric
        Piston diameter D [m], > 0.
    rod : numeric
        Rod diameter d [m], 0 < d < D.
    field : str, optional
        Field prefix for errors, e.g. ``"actuators[0]"``.

    Returns
    -------
    tuple of numeric
        (cap_area, annulus_area) [m^2].

    References
    ----------
    ISO 3320 (cylinder bores and rod diameters); geometry.

    Examples
    --------
    >>> a1, a2 = cylinder_areas(0.063, 0.036)
    >>> round(a1 * 1e4, 2), round(a2 * 1e4, 2)
    (31.17, 20.99)
    """
    d_bore = _positive(bore, _name(field, "bore"))
    d_rod = _positive(rod, _name(field, "rod"))
    if np.any(d_rod >= d_bore):
        raise HeatloadError("rod diameter must be smaller than the bore", field=_name(field, "rod"))
    cap = math.pi * d_bore**2 / 4.0
    return _out(cap), _out(cap - math.pi * d_rod**2 / 4.0)


def area_ratio(bore, rod, field=None):
    """Area ratio of a differential cylinder, cap over annulus.

    .. math::  \\varphi = A_1/A_2 = D^2/(D^2 - d^2)

    Parameters
    ----------
    bore, rod : numeric
        [m], as in :func:`cylinder_areas`.
    field : str, optional
        Field prefix for errors.

    Returns
    -------
    numeric
        [-], > 1.

    Notes
    -----
    With the speed set in the outlet line and no load, the rod-side pressure is the supply
    pressure times this ratio (intensification).

    References
    ----------
    ISO 3320; force balance of the piston.

    Examples
    --------
    >>> round(area_ratio(0.1, 0.07), 3)
    1.961
    """
    cap, ann = cylinder_areas(bore, rod, field)
    return _out(np.asarray(cap) / np.asarray(ann))


def motor_flow(displacement, shaft_speed, volumetric_efficiency):
    """Flow a hydraulic motor takes to turn at a speed.

    .. math::  Q = D n / \\eta_v

    Parameters
    ----------
    displacement : numeric
        [m^3/rev], > 0.
    shaft_speed : numeric
        [rev/s] (the sign is the direction).
    volumetric_efficiency : numeric
        [-], in (0, 1].

    Returns
    -------
    numeric
        Inlet flow [m^3/s].

    References
    ----------
    ISO 4391 (pumps and motors, definitions of efficiencies).

    Examples
    --------
    >>> round(motor_flow(100e-6, 5.0, 0.95) * 60000, 2)
    31.58
    """
    d = _positive(displacement, "displacement")
    n = _arr(shaft_speed, "shaft_speed")
    ev = _efficiency(volumetric_efficiency, "volumetric_efficiency")
    return _out(d * n / ev)


def motor_pressure_difference(torque, displacement, hydromechanical_efficiency):
    """Pressure difference (inlet minus outlet) a hydraulic motor needs for a torque.

    .. math::  \\Delta p = \\frac{2\\pi T}{D \\eta_{hm}} \\ (T \\ge 0), \\qquad
               \\Delta p = \\frac{2\\pi T \\eta_{hm}}{D} \\ (T < 0)

    Parameters
    ----------
    torque : numeric
        Load torque [N m]; positive opposes the rotation, negative overruns.
    displacement : numeric
        [m^3/rev], > 0.
    hydromechanical_efficiency : numeric
        [-], in (0, 1].

    Returns
    -------
    numeric
        Pressure difference [Pa]; negative for an overrunning load (the
        outlet must be held above the inlet, e.g. by a counterbalance valve).

    Notes
    -----
    For an overrunning load the motor runs as a pump; its friction then
    helps hold the load, so the efficiency multiplies instead of divides.

    References
    ----------
    ISO 4391 (definitions of efficiencies).

    Examples
    --------
    >>> round(motor_pressure_difference(150.0, 100e-6, 0.92) / 1e5, 1)
    102.4
    """
    t = _arr(torque, "torque")
    d = _positive(displacement, "displacement")
    ehm = _efficiency(hydromechanical_efficiency, "hydromechanical_efficiency")
    ideal = TWO_PI * t / d
    return _out(np.where(t >= 0, ideal / ehm, ideal * ehm))


def compression_energy(volume, pressure, bulk_modulus):
    """Energy stored by compressing an oil volume (released as heat on
    decompression through a valve).

    .. math::  E = \\frac{V p^2}{2 K}

    Parameters
    ----------
    volume : numeric
        Oil volume under pressure [m^3], >= 0.
    pressure : numeric
        Pressure reached [Pa] (gauge; from tank).
    bulk_modulus : numeric
        Effective bulk modulus [Pa], > 0 (hoses and entrained air lower it).

    Returns
    -------
    numeric
        Energy [J].

    Notes
    -----
    Linear fluid (constant K), small compression (p << K).

    References
    ----------
    Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 2
    (bulk modulus, compressibility); integral of p dV with dV = V dp/K.

    Examples
    --------
    >>> compression_energy(0.01, 300e5, 1.6e9)
    2812.5
    """
    v = _non_negative(volume, "volume")
    p = _arr(pressure, "pressure")
    k = _positive(bulk_modulus, "bulk_modulus")
    return _out(v * p * p / (2.0 * k))


def validate_cylinder(cyl, field="actuators[0]"):
    """Check a :class:`heatload.model.Cylinder` for impossible values.

    Parameters
    ----------
    cyl : heatload.model.Cylinder
    field : str
        Field prefix for errors, e.g. ``"actuators[2]"``.

    Returns
    -------
    heatload.model.Cylinder
        The same cylinder, when valid.

    Raises
    ------
    HeatloadError
        Naming the bad field, e.g. ``actuators[2].rod``.
    """
    cylinder_areas(cyl.bore, cyl.rod, field)
    _positive(cyl.stroke, _name(field, "stroke"))
    _non_negative(cyl.friction_force, _name(field, "friction_force"))
    _positive(cyl.max_pressure, _name(field, "max_pressure"))
    _non_negative(cyl.dead_volume, _name(field, "dead_volume"))
    return cyl


def validate_hydraulic_motor(m, field="actuators[0]"):
    """Check a :class:`heatload.model.HydraulicMotor` for impossible values.

    Parameters
    ----------
    m : heatload.model.HydraulicMotor
    field : str
        Field prefix for errors.

    Returns
    -------
    heatload.model.HydraulicMotor
        The same motor, when valid.

    Raises
    ------
    HeatloadError
        Naming the bad field, e.g. ``actuators[1].volumetric_efficiency``.
    """
    _positive(m.displacement, _name(field, "displacement"))
    _efficiency(m.volumetric_efficiency, _name(field, "volumetric_efficiency"))
    _efficiency(m.hydromechanical_efficiency, _name(field, "hydromechanical_efficiency"))
    _positive(m.max_pressure, _name(field, "max_pressure"))
    if m.max_speed is not None:
        _positive(m.max_speed, _name(field, "max_speed"))
    return m
