"""Electric drive motors: IEC 60034-30-1 class efficiencies and part-load losses.

Motor losses heat the room, not the oil; callers keep "energy bought" (the
electric input) apart from "heat into oil" (the hydraulic losses).

SI inside: power [W], efficiency as a fraction [-].
"""

from __future__ import annotations

import math
import warnings

import numpy as np

from heatload.errors import HeatloadError
from heatload._validate import (
    out as _out,
    as_array as _arr,
    positive as _positive,
    efficiency as _efficiency,
)

#: Interpolation coefficients (A, B, C, D) of the minimum efficiency
#: eta[%] = A x^3 + B x^2 + C x + D, x = log10(P / 1 kW), 50 Hz motors rated
#: 0.75 kW to 200 kW, per class and number of poles.  IE2-IE4: the ecodesign
#: rules for electric motors (Commission Regulation (EU) 2019/1781; UK
#: SI 2021/745, Schedule 16, Table 28), which take them from
#: IEC 60034-30-1:2014.  IE1 4-pole: from memory (IEC 60034-30-1 Annex),
#: checked against the standard's IE1 table as remembered (11 kW 87.6 %).
IE_COEFFICIENTS = {
    "IE1": {4: (0.5234, -5.0499, 17.4180, 74.3171)},
    "IE2": {2: (0.2972, -3.3454, 13.0651, 79.077),
            4: (0.0278, -1.9247, 10.4395, 80.9761),
            6: (0.0148, -2.4978, 13.247, 77.5603),
            8: (2.1311, -12.029, 26.719, 69.735)},
    "IE3": {2: (0.3569, -3.3076, 11.6108, 82.2503),
            4: (0.0773, -1.8951, 9.2984, 83.7025),
            6: (0.1252, -2.613, 11.9963, 80.4769),
            8: (0.7189, -5.1678, 15.705, 77.074)},
    "IE4": {2: (0.34, -3.0479, 10.293, 84.8208),
            4: (0.2412, -2.3608, 8.446, 86.8321),
            6: (0.3598, -3.2107, 10.7933, 84.107),
            8: (0.6556, -4.7229, 13.977, 80.247)},
}

#: The same for 0.12 kW to 0.55 kW (same source, Table 27).
IE_COEFFICIENTS_SMALL = {
    "IE2": {2: (22.4864, 27.7603, 37.8091, 82.458),
            4: (17.2751, 23.978, 35.5822, 84.9935),
            6: (-15.9218, -30.258, 16.6861, 79.1838),
            8: (6.4855, 9.4748, 36.852, 70.762)},
    "IE3": {2: (6.8532, 6.2006, 25.1317, 84.0392),
            4: (7.6356, 4.8236, 21.0903, 86.0998),
            6: (-17.361, -44.538, -3.0554, 79.1318),
            8: (-0.5896, -25.526, 4.2884, 75.831)},
    "IE4": {2: (-8.8538, -20.3352, 8.9002, 85.0641),
            4: (8.432, 2.6888, 14.6236, 87.6153),
            6: (-13.0355, -36.9497, -4.3621, 82.0009),
            8: (-4.9735, -21.453, 2.6653, 79.055)},
}

#: Share of the rated losses that do not depend on load (iron, friction,
#: windage) [-]; typical of 4-pole induction motors of 1-100 kW, from
#: memory (common practice: 25-35 %).
CONSTANT_LOSS_SHARE = 0.3

#: Share of those constant losses that does not fall with speed when a converter
#: lowers frequency and voltage together: the stator I^2 R of the magnetizing
#: current stays with the flux, while iron, friction and windage losses fall
#: with the frequency [-]; typical, from memory.
SPEED_INDEPENDENT_SHARE = 0.3

#: Share of a frequency converter's rated losses drawn at no load (control
#: electronics, fans, DC-link, switching at magnetizing current) [-]; typical of
#: converters of 1-100 kW, from memory (common practice: 20-35 %).
CONVERTER_NO_LOAD_SHARE = 0.25

_P_SMALL_MIN, _P_SMALL_MAX, _P_MIN, _P_MAX = 0.12e3, 0.55e3, 0.75e3, 200e3










def _poly(coefficients, p_watt):
    a, b, c, d = coefficients
    x = np.log10(p_watt / 1e3)
    return ((a * x + b) * x + c) * x + d


def _classes_text():
    return ", ".join(f"{c} ({'/'.join(str(p) for p in sorted(v))}-pole)"
                     for c, v in IE_COEFFICIENTS.items())


def ie_class_efficiency(rated_power, efficiency_class="IE3", poles=4):
    """Minimum rated efficiency of a 50 Hz motor of an IEC 60034-30-1 class.

    .. math::  \\eta = (A x^3 + B x^2 + C x + D)/100, \\quad x = \\log_{10}(P/\\mathrm{kW})

    Parameters
    ----------
    rated_power : numeric
        Rated output [W], > 0.
    efficiency_class : str
        ``"IE1"`` (4-pole only), ``"IE2"``, ``"IE3"`` or ``"IE4"``.
    poles : int
        2, 4, 6 or 8.

    Returns
    -------
    numeric
        Efficiency [-] at rated load.

    Notes
    -----
    0.75-200 kW: the 0.75-200 kW coefficients; 0.12-0.55 kW: the small-motor
    coefficients; between 0.55 and 0.75 kW, linear in log10(P) between the
    two (heatload's choice; the standard tabulates only rated steps).  Above
    200 kW the 200 kW value holds (the standard's table is flat there).
    Outside 0.12 kW (0.75 kW for IE1) the nearest end is used with a warning.
    The formulas reproduce the standard's tables to within 0.1 point, which
    is how the tables are rounded.

    References
    ----------
    IEC 60034-30-1:2014, Rotating electrical machines - Efficiency classes
    of line operated AC motors (IE code), Annex A.
    Commission Regulation (EU) 2019/1781; UK SI 2021/745 Schedule 16,
    Tables 27 and 28 (interpolation coefficients).

    Examples
    --------
    >>> round(ie_class_efficiency(11e3, "IE3") * 100, 1)
    91.4
    """
    p = _positive(rated_power, "rated_power")
    if efficiency_class not in IE_COEFFICIENTS:
        raise HeatloadError(f"unknown efficiency class {efficiency_class!r}; expected one of "
                            f"{_classes_text()}", field="power_unit.motor.efficiency_class")
    table = IE_COEFFICIENTS[efficiency_class]
    if poles not in table:
        raise HeatloadError(
            f"no {efficiency_class} coefficients for {poles} poles; known: {_classes_text()}",
            field="power_unit.motor.poles")
    small = IE_COEFFICIENTS_SMALL.get(efficiency_class, {}).get(poles)
    p_low = _P_SMALL_MIN if small is not None else _P_MIN
    if np.any(p < p_low):
        warnings.warn(f"rated power below {p_low / 1e3:g} kW is outside the "
                      f"{efficiency_class} formula; the {p_low / 1e3:g} kW value is used",
                      stacklevel=2)
    p = np.clip(p, p_low, None)
    eta = _poly(table[poles], np.clip(p, _P_MIN, _P_MAX))
    if small is not None:
        eta_small = _poly(small, np.clip(p, _P_SMALL_MIN, _P_SMALL_MAX))
        e055 = _poly(small, _P_SMALL_MAX)
        e075 = _poly(table[poles], _P_MIN)
        w = (np.log10(np.clip(p, _P_SMALL_MAX, _P_MIN) / _P_SMALL_MAX)
             / math.log10(_P_MIN / _P_SMALL_MAX))
        eta_gap = e055 + (e075 - e055) * w
        eta = np.where(p <= _P_SMALL_MAX, eta_small, np.where(p < _P_MIN, eta_gap, eta))
    return _out(eta / 100.0)


def motor_losses(shaft_power, rated_power, rated_efficiency, speed_fraction=1.0,
                 constant_loss_share=CONSTANT_LOSS_SHARE):
    """Losses of an induction motor at part load and, converter-fed, part speed.

    .. math::
        L_r = P_r (1/\\eta_r - 1), \\qquad
        L = c\\,L_r\\,(k + (1 - k)\\,s) + (1 - c)\\,L_r \\left(\\frac{P}{P_r\\,s}\\right)^2

    with c the constant share, k its speed-independent part
    (:data:`SPEED_INDEPENDENT_SHARE`) and s the speed fraction.

    Parameters
    ----------
    shaft_power : numeric
        Mechanical output [W], >= 0.
    rated_power : numeric
        [W], > 0.
    rated_efficiency : numeric
        [-], in (0, 1].
    speed_fraction : numeric
        Speed over rated speed [-], > 0 (1 on the grid).
    constant_loss_share : numeric
        c [-], in [0, 1].

    Returns
    -------
    numeric
        Losses [W], >= 0.

    Notes
    -----
    The constant part (iron, friction, windage) falls about in proportion
    to the speed when a converter lowers frequency and voltage together
    (constant flux), except the copper loss of the magnetizing current, which
    stays with the flux (share k).  The load part (stator and rotor I^2 R) follows the
    torque squared, T/T_r = P/(P_r s); on the grid (s = 1) that is
    (P/P_r)^2.  Converter losses are not included.

    References
    ----------
    IEC 60034-2-1 (separation of losses: constant and load losses); the
    loss-split model follows e.g. de Almeida, A. T. et al., IEEE Trans.
    Ind. Appl. 47 (2011) (from memory).
    """
    p = _arr(shaft_power, "shaft_power")
    pr = _positive(rated_power, "rated_power")
    er = _efficiency(rated_efficiency, "rated_efficiency")
    s = _positive(speed_fraction, "speed_fraction")
    c = _arr(constant_loss_share, "constant_loss_share")
    if np.any((c < 0) | (c > 1)):
        raise HeatloadError("must be a fraction in [0, 1]", field="constant_loss_share")
    return _out(motor_losses_unchecked(p, pr, er, s, c))


def motor_losses_unchecked(shaft_power, rated_power, rated_efficiency, speed_fraction=1.0,
                           constant_loss_share=CONSTANT_LOSS_SHARE):
    """:func:`motor_losses` without the checks of the motor's fields, for the
    solver's inner loop (checked once at load); the shaft power, the solver's
    own figure, is still refused below zero [W]."""
    p, pr, er, s, c = (shaft_power, rated_power, rated_efficiency, speed_fraction,
                       constant_loss_share)
    if np.any(p < 0):
        raise HeatloadError("must be >= 0 (generating is not modelled)", field="shaft_power")
    lr = pr * (1.0 / er - 1.0)
    k = SPEED_INDEPENDENT_SHARE
    return c * lr * (k + (1.0 - k) * s) + (1.0 - c) * lr * (p / (pr * s)) ** 2


def motor_input_power(shaft_power, rated_power, rated_efficiency, speed_fraction=1.0,
                      constant_loss_share=CONSTANT_LOSS_SHARE):
    """Electric input of a motor delivering a shaft power.

    .. math::  P_{in} = P + L(P, s)

    with the losses of :func:`motor_losses`.

    Parameters
    ----------
    shaft_power, rated_power, rated_efficiency, speed_fraction, constant_loss_share
        As in :func:`motor_losses`.

    Returns
    -------
    numeric
        Electric input [W], >= shaft power; the constant losses at zero load.

    References
    ----------
    IEC 60034-2-1 (loss components); see :func:`motor_losses`.

    Examples
    --------
    >>> round(motor_input_power(11e3, 11e3, 0.914))
    12035
    """
    p = _arr(shaft_power, "shaft_power")
    return _out(p + motor_losses(p, rated_power, rated_efficiency, speed_fraction,
                                 constant_loss_share))


def motor_input_power_unchecked(shaft_power, rated_power, rated_efficiency, speed_fraction=1.0,
                                constant_loss_share=CONSTANT_LOSS_SHARE):
    """:func:`motor_input_power` without the checks of the motor's fields, for the
    solver's inner loop (see :func:`motor_losses_unchecked`) [W]."""
    return shaft_power + motor_losses_unchecked(shaft_power, rated_power, rated_efficiency,
                                                speed_fraction, constant_loss_share)


def converter_losses(input_power, rated_input_power, drive_efficiency,
                     no_load_share=CONVERTER_NO_LOAD_SHARE):
    """Losses of a frequency converter feeding a motor.

    .. math::
        L_r = P_{in,r} (1/\\eta_d - 1), \\qquad
        L = L_r \\left(k_0 + (1 - k_0)\\,\\frac{P_{in}}{P_{in,r}}\\right)

    Parameters
    ----------
    input_power : numeric
        Power the converter delivers to the motor [W], >= 0.
    rated_input_power : numeric
        The motor's input at its rated point, P_r / eta_r [W], > 0.
    drive_efficiency : numeric
        The converter's efficiency at that rated point [-], in (0, 1].
    no_load_share : numeric
        k0 [-]: share of the rated losses drawn at no load (standby).

    Returns
    -------
    numeric
        Converter losses [W], >= 0: the stated efficiency at the rated point,
        the standby loss k0 L_r at rest.

    Notes
    -----
    A converter's losses are a constant part (control, fans, DC link) and parts
    that rise with the current it switches; a line through the no-load and the
    rated point keeps the datasheet efficiency where it is given and does not
    let the loss vanish when the pump idles.

    References
    ----------
    IEC 61800-9-2 (energy efficiency of power drive systems: converter losses
    at stated operating points, the no-load point among them).

    Examples
    --------
    >>> round(converter_losses(12035.0, 12035.0, 0.97), 1)
    372.2
    """
    p = _arr(input_power, "input_power")
    pr = _positive(rated_input_power, "rated_input_power")
    ed = _efficiency(drive_efficiency, "drive_efficiency")
    k0 = _arr(no_load_share, "no_load_share")
    lr = pr * (1.0 / ed - 1.0)
    return _out(lr * (k0 + (1.0 - k0) * np.maximum(p, 0.0) / pr))


def motor_efficiency(shaft_power, rated_power, rated_efficiency, speed_fraction=1.0,
                     constant_loss_share=CONSTANT_LOSS_SHARE):
    """Motor efficiency at part load.

    .. math::  \\eta = P / P_{in}

    Parameters
    ----------
    shaft_power, rated_power, rated_efficiency, speed_fraction, constant_loss_share
        As in :func:`motor_losses`.

    Returns
    -------
    numeric
        Efficiency [-], 0 at zero load.

    References
    ----------
    IEC 60034-2-1; see :func:`motor_losses`.

    Examples
    --------
    >>> round(motor_efficiency(11e3, 11e3, 0.914), 3)
    0.914
    """
    p = _arr(shaft_power, "shaft_power")
    p_in = np.asarray(motor_input_power(p, rated_power, rated_efficiency, speed_fraction,
                                        constant_loss_share))
    return _out(np.where(p_in > 0, p / np.where(p_in > 0, p_in, 1.0), 0.0))


def motor_rated_efficiency(motor):
    """Rated efficiency of a :class:`heatload.model.DriveMotor`: its given
    value, else the minimum of its IEC 60034-30-1 class.

    Parameters
    ----------
    motor : heatload.model.DriveMotor

    Returns
    -------
    float
        [-].

    References
    ----------
    IEC 60034-30-1:2014 (see :func:`ie_class_efficiency`).
    """
    if motor.efficiency is not None:
        return float(motor.efficiency)
    return float(ie_class_efficiency(motor.rated_power, motor.efficiency_class, motor.poles))


def validate_motor(motor, field="power_unit.motor"):
    """Check a :class:`heatload.model.DriveMotor` for impossible values.

    Parameters
    ----------
    motor : heatload.model.DriveMotor
    field : str
        Prefix of the field names in errors.

    Returns
    -------
    heatload.model.DriveMotor
        The same motor, when valid.

    Raises
    ------
    HeatloadError
        Naming the bad field, e.g. ``power_unit.motor.efficiency``.
    """
    _positive(motor.rated_power, f"{field}.rated_power")
    if motor.efficiency_class not in IE_COEFFICIENTS:
        raise HeatloadError(f"unknown efficiency class {motor.efficiency_class!r}; expected "
                            f"one of {_classes_text()}", field=f"{field}.efficiency_class")
    if motor.efficiency is None and motor.poles not in IE_COEFFICIENTS[motor.efficiency_class]:
        raise HeatloadError(
            f"no {motor.efficiency_class} coefficients for {motor.poles} poles; give the "
            f"rated efficiency or use one of {_classes_text()}", field=f"{field}.poles")
    if motor.poles not in (2, 4, 6, 8):
        raise HeatloadError(f"must be 2, 4, 6 or 8, got {motor.poles!r}", field=f"{field}.poles")
    if motor.efficiency is not None:
        _efficiency(motor.efficiency, f"{field}.efficiency")
    _efficiency(motor.drive_efficiency, f"{field}.drive_efficiency")
    return motor
