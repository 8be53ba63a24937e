"""Valves and throttles: flow <-> pressure drop, and the power they turn into heat.

Every function is pure and vectorized (numpy broadcasting).  SI inside:
pressures gauge [Pa], flows [m^3/s], areas [m^2], lengths [m], density
[kg/m^3], kinematic viscosity [m^2/s], dynamic viscosity [Pa s].  A scalar
input gives a float back, an array input an array.

Flow-drop relations of throttles (orifice, laminar throttle, power law,
directional valve path) are odd functions: a negative flow gives a negative
drop and vice versa.  Zero flow gives zero drop; only valves with a cracking
pressure (relief, check) report a pressure at zero flow.

The power a component turns into heat is the flow through it times its
drop, :func:`hydraulic_power`.
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
    show as _show,
)

#: Turbulent discharge coefficient of a sharp-edged orifice, pi/(pi+2)
#: (free-streamline theory; Merritt, Hydraulic Control Systems, 1967).
CD_TURBULENT = math.pi / (math.pi + 2.0)

#: Laminar-region slope of Cd = delta*sqrt(Re) (Merritt 1967, from memory).
CD_LAMINAR_DELTA = 0.2

#: Centres of a directional valve that connect P to T in neutral.
UNLOADING_CENTRES = ("open", "tandem")

#: Every centre heatload knows.
CENTRES = ("open", "tandem", "closed")












def discharge_coefficient(reynolds, cd_turbulent=CD_TURBULENT, delta=CD_LAMINAR_DELTA):
    """Discharge coefficient of a sharp-edged orifice versus Reynolds number.

    .. math::  C_d = \\left(C_{d,t}^{-2} + (\\delta^2 Re)^{-1}\\right)^{-1/2}

    a smooth blend of the laminar law :math:`C_d = \\delta\\sqrt{Re}` and the
    turbulent limit :math:`C_{d,t} = \\pi/(\\pi+2) = 0.611`.

    Parameters
    ----------
    reynolds : numeric
        Orifice Reynolds number, mean velocity through the area times the
        hydraulic diameter over kinematic viscosity [-], >= 0.
    cd_turbulent : numeric
        Turbulent (high Re) limit [-].
    delta : numeric
        Laminar slope [-].

    Returns
    -------
    numeric
        Discharge coefficient [-], 0 at Re = 0, below ``cd_turbulent``.

    Notes
    -----
    The two laws cross at Re* = (Cd_t/delta)^2 = 9.3, where the blend gives
    0.71 Cd_t.  It follows the laminar law to within 1 % below
    Re = 0.02 Re* = 0.19 and reaches 99 % of the turbulent value at
    Re = 49 Re* = 460.  Its squared-reciprocal form makes the
    orifice equation solvable in closed form (:func:`orifice_flow`).

    References
    ----------
    Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 3
    (Cd = pi/(pi+2) for a sharp-edged slot; Cd = delta sqrt(Re) at low Re,
    delta from memory).

    Examples
    --------
    >>> round(discharge_coefficient(1e8), 3)
    0.611
    """
    re = _non_negative(reynolds, "reynolds")
    cd_t = _positive(cd_turbulent, "cd_turbulent")
    d = _positive(delta, "delta")
    x = d * d * re
    # Cd^2 = x Cdt^2 / (x + Cdt^2): finite (0) at Re = 0
    return _out(np.sqrt(x * cd_t**2 / (x + cd_t**2)))


def _hydraulic_diameter(area):
    # round orifice of the same area
    return np.sqrt(4.0 * area / math.pi)


def orifice_flow(pressure_drop, area, density, kinematic_viscosity=None,
                 cd_turbulent=CD_TURBULENT, delta=CD_LAMINAR_DELTA):
    """Flow through a sharp-edged orifice for a given pressure drop.

    .. math::  Q = C_d A \\sqrt{2 \\Delta p / \\rho}

    With ``kinematic_viscosity`` the coefficient follows
    :func:`discharge_coefficient` at the orifice's own Reynolds number
    Re = C_d Re_i, Re_i = sqrt(2 dp/rho) d_h / nu, d_h = sqrt(4A/pi);
    the blend makes this a quadratic in C_d, solved in closed form:
    C_d = 2 delta^2 Re_i / (1 + sqrt(1 + 4 delta^4 Re_i^2 / C_dt^2)).
    Without viscosity, C_d = ``cd_turbulent``.

    Parameters
    ----------
    pressure_drop : numeric
        Drop across the orifice [Pa]; negative gives negative flow.
    area : numeric
        Orifice area [m^2], > 0.
    density : numeric
        Fluid density [kg/m^3], > 0.
    kinematic_viscosity : numeric, optional
        [m^2/s], > 0; None -> turbulent coefficient only.
    cd_turbulent : numeric
        Turbulent discharge coefficient [-].
    delta : numeric
        Laminar slope of Cd = delta sqrt(Re) [-].

    Returns
    -------
    numeric
        Volume flow [m^3/s], same sign as the drop.

    Notes
    -----
    Round, sharp-edged orifice; for spool metering edges the hydraulic
    diameter of the real opening would be smaller, raising the laminar share.

    References
    ----------
    Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 3.

    Examples
    --------
    >>> q = orifice_flow(10e5, 20e-6, 870.0)
    >>> round(q * 60000, 2)   # L/min
    35.16
    """
    dp = _arr(pressure_drop, "pressure_drop")
    a = _positive(area, "area")
    rho = _positive(density, "density")
    cd_t = _positive(cd_turbulent, "cd_turbulent")
    u_ideal = np.sqrt(2.0 * np.abs(dp) / rho)
    if kinematic_viscosity is None:
        cd = cd_t
    else:
        nu = _positive(kinematic_viscosity, "kinematic_viscosity")
        d = _positive(delta, "delta")
        re_ideal = u_ideal * _hydraulic_diameter(a) / nu
        k = d * d * re_ideal
        cd = 2.0 * k / (1.0 + np.sqrt(1.0 + 4.0 * k * k / cd_t**2))
    return _out(np.sign(dp) * cd * a * u_ideal)


def orifice_pressure_drop(flow, area, density, kinematic_viscosity=None,
                          cd_turbulent=CD_TURBULENT, delta=CD_LAMINAR_DELTA):
    """Pressure drop of a sharp-edged orifice for a given flow (inverse of
    :func:`orifice_flow`).

    .. math::  \\Delta p = \\frac{\\rho Q^2}{2 C_{d,t}^2 A^2}
                + \\frac{\\rho \\nu Q}{2 \\delta^2 A d_h}

    The second (laminar) term appears only when ``kinematic_viscosity`` is
    given; it is the blend of :func:`discharge_coefficient` written out, so
    the drop is finite and zero at zero flow.

    Parameters
    ----------
    flow : numeric
        Volume flow [m^3/s]; negative gives a negative drop.
    area : numeric
        Orifice area [m^2], > 0.
    density : numeric
        [kg/m^3], > 0.
    kinematic_viscosity : numeric, optional
        [m^2/s], > 0; None -> turbulent coefficient only.
    cd_turbulent, delta : numeric
        As in :func:`discharge_coefficient` [-].

    Returns
    -------
    numeric
        Pressure drop [Pa].

    References
    ----------
    Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 3.

    Examples
    --------
    >>> round(orifice_pressure_drop(35.16 / 60000, 20e-6, 870.0) / 1e5, 2)
    10.0
    """
    q = _arr(flow, "flow")
    a = _positive(area, "area")
    rho = _positive(density, "density")
    cd_t = _positive(cd_turbulent, "cd_turbulent")
    dp = rho * q * np.abs(q) / (2.0 * cd_t**2 * a**2)
    if kinematic_viscosity is not None:
        nu = _positive(kinematic_viscosity, "kinematic_viscosity")
        d = _positive(delta, "delta")
        dp = dp + rho * nu * q / (2.0 * d * d * a * _hydraulic_diameter(a))
    return _out(dp)


def _laminar_throttle_terms(diameter, length, dynamic_viscosity, density, entry_exit_k):
    d = _positive(diameter, "diameter")
    ell = _positive(length, "length")
    mu = _positive(dynamic_viscosity, "dynamic_viscosity")
    rho = _positive(density, "density")
    k = _non_negative(entry_exit_k, "entry_exit_k")
    area = math.pi * d * d / 4.0
    c1 = 128.0 * mu * ell / (math.pi * d**4)       # [Pa s/m^3]
    c2 = k * rho / (2.0 * area * area)            # [Pa s^2/m^6]
    return c1, c2


def laminar_throttle_pressure_drop(flow, diameter, length, dynamic_viscosity, density,
                                   entry_exit_k=1.5):
    """Pressure drop of a long, narrow bore (laminar throttle).

    .. math::  \\Delta p = \\frac{128 \\mu L Q}{\\pi d^4} + k \\frac{\\rho v |v|}{2},
               \\quad v = \\frac{4 Q}{\\pi d^2}

    Parameters
    ----------
    flow : numeric
        [m^3/s]; negative gives a negative drop.
    diameter : numeric
        Bore [m], > 0.
    length : numeric
        Bore length [m], > 0.
    dynamic_viscosity : numeric
        [Pa s], > 0.
    density : numeric
        [kg/m^3], > 0.
    entry_exit_k : numeric
        Entry plus exit loss coefficient [-], >= 0 (1.5: sharp entry 0.5 plus
        exit 1.0, common practice).

    Returns
    -------
    numeric
        Pressure drop [Pa].

    Notes
    -----
    Fully developed laminar flow (Re below about 2000, L/d large enough that
    the entry length is a small part); the first term makes the drop drift
    with oil temperature through the viscosity.

    References
    ----------
    Hagen-Poiseuille law, e.g. White, F. M., Fluid Mechanics, McGraw-Hill,
    section 6.4 (pipe flow) and 6.9 (minor losses).

    Examples
    --------
    >>> round(laminar_throttle_pressure_drop(1e-5, 1e-3, 0.02, 0.04, 870.0, 0.0) / 1e5, 2)
    3.26
    """
    q = _arr(flow, "flow")
    c1, c2 = _laminar_throttle_terms(diameter, length, dynamic_viscosity, density, entry_exit_k)
    return _out(c1 * q + c2 * q * np.abs(q))


def laminar_throttle_flow(pressure_drop, diameter, length, dynamic_viscosity, density,
                          entry_exit_k=1.5):
    """Flow through a laminar throttle for a given drop (inverse of
    :func:`laminar_throttle_pressure_drop`).

    .. math::  Q = \\frac{2 \\Delta p}{c_1 + \\sqrt{c_1^2 + 4 c_2 \\Delta p}}

    the positive root of :math:`c_2 Q^2 + c_1 Q - \\Delta p = 0` with
    c1 = 128 mu L/(pi d^4), c2 = k rho/(2 A^2), written so that it stays
    finite for k = 0.

    Parameters
    ----------
    pressure_drop : numeric
        [Pa]; negative gives negative flow.
    diameter, length, dynamic_viscosity, density, entry_exit_k
        As in :func:`laminar_throttle_pressure_drop`.

    Returns
    -------
    numeric
        Volume flow [m^3/s].

    References
    ----------
    Hagen-Poiseuille law, e.g. White, F. M., Fluid Mechanics, section 6.4.
    """
    dp = _arr(pressure_drop, "pressure_drop")
    c1, c2 = _laminar_throttle_terms(diameter, length, dynamic_viscosity, density, entry_exit_k)
    adp = np.abs(dp)
    q = 2.0 * adp / (c1 + np.sqrt(c1 * c1 + 4.0 * c2 * adp))
    return _out(np.sign(dp) * q)


def _power_law_args(rated_flow, rated_drop, exponent, ideal_allowed=False):
    # an ideal path (rated drop 0) has no drop at any flow; only the inverse,
    # flow from drop, needs a positive rated drop
    drop = (_non_negative if ideal_allowed else _positive)(rated_drop, "rated_drop")
    return _positive(rated_flow, "rated_flow"), drop, _positive(exponent, "exponent")


def power_law_pressure_drop(flow, rated_flow, rated_drop, exponent=2.0):
    """Pressure drop of a valve given by a catalogue curve.

    .. math::  \\Delta p = \\Delta p_r \\left(|Q| / Q_r\\right)^n \\operatorname{sign} Q

    Parameters
    ----------
    flow : numeric
        [m^3/s].
    rated_flow : numeric
        Flow of the catalogue point [m^3/s], > 0.
    rated_drop : numeric
        Drop at the catalogue point [Pa], >= 0 (0: an ideal path).
    exponent : numeric
        n [-], > 0: 2 for a turbulent (orifice-like) path, 1 for laminar.

    Returns
    -------
    numeric
        Pressure drop [Pa].

    Notes
    -----
    Catalogue curves are measured at one viscosity (often 32-46 mm^2/s);
    n between 1.7 and 2 fits most spool valves (common practice).

    References
    ----------
    ISO 4411 (hydraulic fluid power, valves, determination of pressure
    differential/flow characteristics) defines how such curves are measured.

    Examples
    --------
    >>> power_law_pressure_drop(30 / 60000, 60 / 60000, 4e5)
    100000.0
    """
    q = _arr(flow, "flow")
    qr, dpr, n = _power_law_args(rated_flow, rated_drop, exponent, ideal_allowed=True)
    return _out(power_law_pressure_drop_unchecked(q, qr, dpr, n))


def power_law_pressure_drop_unchecked(flow, rated_flow, rated_drop, exponent=2.0):
    """:func:`power_law_pressure_drop` without its input checks, for the solver's
    inner loop (float arrays of fields checked once at load) [Pa]."""
    return np.sign(flow) * rated_drop * (np.abs(flow) / rated_flow) ** exponent


def power_law_flow(pressure_drop, rated_flow, rated_drop, exponent=2.0):
    """Flow through a catalogue-curve valve for a given drop (inverse of
    :func:`power_law_pressure_drop`).

    .. math::  Q = Q_r \\left(|\\Delta p| / \\Delta p_r\\right)^{1/n} \\operatorname{sign} \\Delta p

    Parameters
    ----------
    pressure_drop : numeric
        [Pa].
    rated_flow, rated_drop, exponent
        As in :func:`power_law_pressure_drop`.

    Returns
    -------
    numeric
        Volume flow [m^3/s].

    References
    ----------
    ISO 4411 (valve pressure differential/flow characteristics).
    """
    dp = _arr(pressure_drop, "pressure_drop")
    qr, dpr, n = _power_law_args(rated_flow, rated_drop, exponent)
    return _out(np.sign(dp) * qr * (np.abs(dp) / dpr) ** (1.0 / n))


def valve_path_pressure_drop(flow, rated_flow, rated_drop):
    """Drop of one path of a directional valve (P->A, B->T ...), ~Q^2.

    .. math::  \\Delta p = \\Delta p_r (Q/Q_r)|Q/Q_r|

    Parameters
    ----------
    flow : numeric
        [m^3/s].
    rated_flow : numeric
        Catalogue flow [m^3/s], > 0.
    rated_drop : numeric
        Catalogue drop of the path at that flow [Pa], >= 0 (0: ideal).

    Returns
    -------
    numeric
        Pressure drop [Pa].

    References
    ----------
    Turbulent orifice law (Merritt, Hydraulic Control Systems, 1967); ISO 4411.

    Examples
    --------
    >>> valve_path_pressure_drop(60 / 60000, 60 / 60000, 5e5)
    500000.0
    """
    return power_law_pressure_drop(flow, rated_flow, rated_drop, 2.0)


def valve_path_pressure_drop_unchecked(flow, rated_flow, rated_drop):
    """:func:`valve_path_pressure_drop` without its input checks, for the solver's
    inner loop (float arrays of fields checked once at load) [Pa]."""
    return power_law_pressure_drop_unchecked(flow, rated_flow, rated_drop, 2.0)


def directional_centre_pressure_drop(flow, centre, rated_flow, centre_drop):
    """P->T drop of a directional valve in its centre position (unloading).

    .. math::  \\Delta p = \\Delta p_{c,r} (Q/Q_r)^2  \\quad (open, tandem)

    Parameters
    ----------
    flow : numeric
        Pump flow through the centre [m^3/s].
    centre : str
        ``"open"`` or ``"tandem"`` (P connected to T).
    rated_flow : numeric
        [m^3/s], > 0.
    centre_drop : numeric
        P->T drop at rated flow [Pa], > 0.

    Returns
    -------
    numeric
        Pressure drop [Pa].

    Raises
    ------
    HeatloadError
        For ``"closed"`` (P is blocked: the pump flow must leave over the
        relief valve or be held by the pump control, which the caller
        decides) and for an unknown centre; field
        ``power_unit.directional_valve.centre``.

    References
    ----------
    ISO 1219-1 (graphical symbols: open, tandem, closed centres).
    """
    if centre not in UNLOADING_CENTRES:
        if centre == "closed":
            msg = ("a closed centre blocks P: no unloading through the valve; "
                   "unload over the relief valve or hold with the pump control")
        else:
            msg = f"unknown centre {centre!r}; expected one of {', '.join(CENTRES)}"
        raise HeatloadError(msg, field="power_unit.directional_valve.centre")
    return valve_path_pressure_drop(flow, rated_flow, centre_drop)


def relief_pressure(flow, cracking_pressure, override, rated_flow):
    """Inlet pressure of a relief valve passing a flow.

    .. math::  p = p_c + \\Delta p_o \\max(Q, 0)/Q_r

    Parameters
    ----------
    flow : numeric
        Flow over the valve [m^3/s]; <= 0 gives the cracking pressure.
    cracking_pressure : numeric
        [Pa], >= 0.
    override : numeric
        Pressure rise from cracking to rated flow [Pa], >= 0.
    rated_flow : numeric
        Flow at which the override is reached [m^3/s], > 0.

    Returns
    -------
    numeric
        Gauge pressure at the valve inlet (tank = 0) [Pa].

    Notes
    -----
    Linear override: a fair fit of a direct or pilot-operated relief valve
    between cracking and rated flow; real curves bend a little
    (common practice).  Beyond rated flow the line is extrapolated.

    References
    ----------
    ISO 4411 (pressure/flow characteristics of valves); the linear override
    is a common simplification, e.g. Merritt, Hydraulic Control Systems, 1967.

    Examples
    --------
    >>> relief_pressure(30 / 60000, 180e5, 10e5, 60 / 60000)
    18500000.0
    """
    q = _arr(flow, "flow")
    pc = _non_negative(cracking_pressure, "cracking_pressure")
    po = _non_negative(override, "override")
    qr = _positive(rated_flow, "rated_flow")
    return _out(pc + po * np.maximum(q, 0.0) / qr)


def relief_flow(pressure, cracking_pressure, override, rated_flow):
    """Flow a relief valve passes at an inlet pressure (inverse of
    :func:`relief_pressure`).

    .. math::  Q = Q_r \\max(p - p_c, 0)/\\Delta p_o

    Parameters
    ----------
    pressure : numeric
        Inlet gauge pressure [Pa].
    cracking_pressure : numeric
        [Pa], >= 0.
    override : numeric
        [Pa], > 0 (an ideal valve with no override has no flow inverse).
    rated_flow : numeric
        [m^3/s], > 0.

    Returns
    -------
    numeric
        Flow [m^3/s], 0 below cracking.

    References
    ----------
    As :func:`relief_pressure`.
    """
    p = _arr(pressure, "pressure")
    pc = _non_negative(cracking_pressure, "cracking_pressure")
    po = _positive(override, "override")
    qr = _positive(rated_flow, "rated_flow")
    return _out(qr * np.maximum(p - pc, 0.0) / po)


def check_valve_pressure_drop(flow, cracking_pressure, rated_flow, rated_drop):
    """Drop of a check valve in its free-flow direction.

    .. math::  \\Delta p = p_c + (\\Delta p_r - p_c)(Q/Q_r)^2 \\quad (Q > 0),
               \\qquad 0 \\quad (Q \\le 0)

    Parameters
    ----------
    flow : numeric
        Flow in the free direction [m^3/s]; <= 0 means closed, drop 0.
    cracking_pressure : numeric
        Spring's opening pressure [Pa], >= 0.
    rated_flow : numeric
        [m^3/s], > 0.
    rated_drop : numeric
        Total drop at rated flow, cracking included [Pa], >= cracking
        (both 0: an ideal check valve).

    Returns
    -------
    numeric
        Pressure drop [Pa].

    References
    ----------
    ISO 4411 (valve pressure/flow characteristics); spring preload plus
    turbulent orifice law (Merritt, Hydraulic Control Systems, 1967).

    Examples
    --------
    >>> check_valve_pressure_drop(60 / 60000, 0.5e5, 60 / 60000, 1.5e5)
    150000.0
    """
    q = _arr(flow, "flow")
    pc = _non_negative(cracking_pressure, "cracking_pressure")
    qr = _positive(rated_flow, "rated_flow")
    dpr = _non_negative(rated_drop, "rated_drop")
    if np.any(dpr < pc):
        raise HeatloadError("must be >= the cracking pressure (it includes it)",
                            field="rated_drop")
    return _out(check_valve_pressure_drop_unchecked(q, pc, qr, dpr))


def check_valve_pressure_drop_unchecked(flow, cracking_pressure, rated_flow, rated_drop):
    """:func:`check_valve_pressure_drop` without its input checks, for the solver's
    inner loop (float arrays of fields checked once at load) [Pa]."""
    qp = np.maximum(flow, 0.0)
    return np.where(flow > 0, cracking_pressure
                    + (rated_drop - cracking_pressure) * (qp / rated_flow) ** 2, 0.0)


def counterbalance_load_pressure(setting, pilot_pressure, pilot_ratio):
    """Load-side pressure at which a counterbalance valve opens.

    .. math::  p_{load} = \\max(p_{set} - R\\,p_{pilot}, 0)

    The valve opens when p_load + R p_pilot reaches its setting (pilot
    assisted by the opposite line, ratio R); with no pilot pressure it acts
    as a direct-operated relief at ``setting``.

    Parameters
    ----------
    setting : numeric
        Spring setting [Pa], >= 0 (usually 1.3 x the highest load pressure,
        common practice).
    pilot_pressure : numeric
        Pressure in the opposite (driving) line [Pa].
    pilot_ratio : numeric
        Pilot area ratio [-], >= 0 (typically 3:1 to 10:1, common practice).

    Returns
    -------
    numeric
        Load pressure needed to open [Pa], >= 0.

    Notes
    -----
    Back pressure in the valve's outlet (drain) is taken as zero; a
    vented valve would add it.  The heat is the flow through the valve times
    the drop across it, the load-side pressure.

    References
    ----------
    ISO 1219-1 (symbol); valve balance from the pilot and load areas,
    e.g. Merritt, Hydraulic Control Systems, 1967.

    Examples
    --------
    >>> counterbalance_load_pressure(200e5, 30e5, 3.0)
    11000000.0
    """
    s = _non_negative(setting, "setting")
    pp = _arr(pilot_pressure, "pilot_pressure")
    r = _non_negative(pilot_ratio, "pilot_ratio")
    return _out(np.maximum(s - r * pp, 0.0))


def flow_control_2way_flow(set_flow, pressure_drop, min_drop):
    """Flow through a 2-way pressure-compensated flow control valve.

    .. math::  Q = Q_{set}\\ (\\Delta p \\ge \\Delta p_{min}), \\qquad
               Q = Q_{set} \\sqrt{\\Delta p / \\Delta p_{min}}\\ (0 \\le \\Delta p < \\Delta p_{min})

    Above the compensator's minimum drop the valve holds its set flow; below
    it the compensator is fully open and the valve behaves as its metering
    orifice.  A negative drop gives zero flow (reverse flow through a bypass
    check is not modelled).

    Parameters
    ----------
    set_flow : numeric
        [m^3/s], >= 0.
    pressure_drop : numeric
        Drop across the whole valve [Pa].
    min_drop : numeric
        Compensator minimum drop [Pa], > 0 (5-10 bar, common practice).

    Returns
    -------
    numeric
        Flow [m^3/s].

    Notes
    -----
    The whole drop across the valve, compensator and orifice, becomes heat.

    References
    ----------
    ISO 6263 (compensated flow-control valves, mounting surfaces) names the
    type; the law is the orifice equation with a pressure compensator,
    Merritt, Hydraulic Control Systems, 1967.

    Examples
    --------
    >>> flow_control_2way_flow(20 / 60000, 2e5, 8e5) * 60000
    10.0
    """
    qs = _non_negative(set_flow, "set_flow")
    dp = _arr(pressure_drop, "pressure_drop")
    dmin = _positive(min_drop, "min_drop")
    ratio = np.clip(dp / dmin, 0.0, 1.0)
    return _out(qs * np.sqrt(ratio))


def flow_control_3way_inlet_pressure(load_pressure, spring_pressure):
    """Inlet (pump) pressure of a 3-way, bypass compensated flow control.

    .. math::  p_{in} = p_{load} + p_{spring}

    Parameters
    ----------
    load_pressure : numeric
        [Pa].
    spring_pressure : numeric
        Compensator spring [Pa], >= 0.

    Returns
    -------
    numeric
        Inlet pressure [Pa].

    Notes
    -----
    Excess pump flow leaves at this pressure, not at relief pressure.  The
    relief valve still caps it; the caller takes the lower of the two.

    References
    ----------
    Merritt, Hydraulic Control Systems, 1967 (pressure compensation).
    """
    pl = _arr(load_pressure, "load_pressure")
    ps = _non_negative(spring_pressure, "spring_pressure")
    return _out(pl + ps)


def flow_control_3way_bypass_flow(supply_flow, set_flow):
    """Flow a 3-way flow control returns to tank.

    .. math::  Q_{bypass} = \\max(Q_{supply} - Q_{set}, 0)

    Parameters
    ----------
    supply_flow : numeric
        Pump flow into the valve [m^3/s].
    set_flow : numeric
        Set (controlled) flow [m^3/s].

    Returns
    -------
    numeric
        Bypass flow [m^3/s].

    References
    ----------
    Continuity; Merritt, Hydraulic Control Systems, 1967.
    """
    qsup = _arr(supply_flow, "supply_flow")
    qs = _arr(set_flow, "set_flow")
    return _out(np.maximum(qsup - qs, 0.0))


def hydraulic_power(flow, pressure):
    """Hydraulic power: flow times pressure (or a component's loss: flow
    times its drop).

    .. math::  P = Q\\,p

    Parameters
    ----------
    flow : numeric
        [m^3/s].
    pressure : numeric
        Pressure or pressure drop [Pa].

    Returns
    -------
    numeric
        Power [W].

    Notes
    -----
    In trade units P[kW] = p[bar] Q[L/min] / 600 (common practice).

    References
    ----------
    Definition of hydraulic power, e.g. ISO 4391 (pumps, motors: terms).

    Examples
    --------
    >>> hydraulic_power(60 / 60000, 100e5)
    10000.0
    """
    return _out(_arr(flow, "flow") * _arr(pressure, "pressure"))
