"""Oil cooler sizing and rating: air-oil by specific cooling power (W per K of
entering temperature difference, ETD), water-oil by effectiveness-NTU, the
duty a cooler must take and a spec sheet a supplier can quote from.

SI inside: W, K, m^3/s, kg/s, W/K, Pa, m^2/s.  Water and air come from tables
shipped with the package; CoolProp (ethylene glycol-water 'INCOMP::MEG') is
imported lazily, only for glycol.

Every result carries the one caution text (:data:`heatload.outputs.wording.CAUTION`).
"""

from __future__ import annotations

from collections import namedtuple
from dataclasses import dataclass
from functools import lru_cache
from typing import Optional

import numpy as np

from heatload.properties import property_tables
from heatload.errors import HeatloadError
from heatload.outputs.wording import CAUTION

#: Arrangements accepted by the water-oil functions.
ARRANGEMENTS = ("shell-and-tube", "counterflow")


CoolantProperties = namedtuple(
    "CoolantProperties",
    ["density", "specific_heat", "dynamic_viscosity", "thermal_conductivity",
     "kinematic_viscosity", "prandtl"])
CoolantProperties.__doc__ = """Liquid coolant properties (arrays, SI): density [kg/m^3],
specific_heat [J/(kg K)], dynamic_viscosity [Pa s], thermal_conductivity [W/(m K)],
kinematic_viscosity [m^2/s], prandtl [-]."""


def _positive(value, field, allow_zero=False):
    v = np.asarray(value, float)
    bad = (v < 0.0) if allow_zero else (v <= 0.0)
    if np.any(~np.isfinite(v)) or np.any(bad):
        raise HeatloadError(f"{field} must be {'>= 0' if allow_zero else 'positive'}", field=field)
    return v


def _cr(cr):
    c = np.asarray(cr, float)
    if np.any(~np.isfinite(c)) or np.any(c < 0.0) or np.any(c > 1.0):
        raise HeatloadError("capacity ratio Cr = Cmin/Cmax must be within 0 .. 1",
                            field="capacity_ratio")
    return c


def effectiveness_counterflow(ntu, cr):
    """Effectiveness of a counterflow exchanger.

    eps = [1 - exp(-NTU (1 - Cr))] / [1 - Cr exp(-NTU (1 - Cr))];  Cr = 1: NTU / (1 + NTU)

    Parameters
    ----------
    ntu : array_like
        Number of transfer units UA / Cmin [-], >= 0.
    cr : array_like
        Cmin / Cmax, 0..1 [-].

    Returns
    -------
    ndarray
        eps [-].

    References
    ----------
    Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed.,
    Table 11.3, eqs. 11.29a-b.
    """
    n = _positive(ntu, "ntu", allow_zero=True)
    c = _cr(cr)
    n, c = np.broadcast_arrays(n, c)
    one = np.isclose(c, 1.0, rtol=0.0, atol=1e-9)
    cs = np.where(one, 0.5, c)  # placeholder avoids 0/0 in the branch not taken
    e = np.exp(-n * (1.0 - cs))
    general = (1.0 - e) / (1.0 - cs * e)
    return np.where(one, n / (1.0 + n), general)


def _eps_one_shell(n, c):
    root = np.sqrt(1.0 + c ** 2)
    e = np.exp(-n * root)
    with np.errstate(divide="ignore", invalid="ignore"):
        val = 2.0 / (1.0 + c + root * (1.0 + e) / (1.0 - e))
    return np.where(n > 0.0, val, 0.0)


def effectiveness_shell_and_tube(ntu, cr, shell_passes=1):
    """Effectiveness of a shell-and-tube exchanger, one or more shell passes
    (2, 4, ... tube passes each).

    One shell: eps_1 = 2 {1 + Cr + sqrt(1+Cr^2) [1 + exp(-N sqrt(1+Cr^2))] /
    [1 - exp(-N sqrt(1+Cr^2))]}^-1 with N the NTU of one shell;
    n shells: eps = [((1 - eps_1 Cr)/(1 - eps_1))^n - 1] / [((1 - eps_1 Cr)/(1 - eps_1))^n - Cr]
    (Cr = 1: n eps_1 / (1 + (n - 1) eps_1)), N = NTU / n.

    Parameters
    ----------
    ntu : array_like
        Total NTU = UA / Cmin [-].
    cr : array_like
        Cmin / Cmax, 0..1 [-].
    shell_passes : int, optional
        Number of shell passes n >= 1.

    Returns
    -------
    ndarray
        eps [-].

    References
    ----------
    Incropera et al., 6th ed., Table 11.3, eqs. 11.30a and 11.31a.
    """
    n_sh = _shell_passes(shell_passes)
    n = _positive(ntu, "ntu", allow_zero=True)
    c = _cr(cr)
    n, c = np.broadcast_arrays(n, c)
    e1 = _eps_one_shell(n / n_sh, c)
    if n_sh == 1:
        return e1
    one = np.isclose(c, 1.0, rtol=0.0, atol=1e-9)
    with np.errstate(divide="ignore", invalid="ignore"):
        f = ((1.0 - e1 * c) / (1.0 - e1)) ** n_sh
        general = (f - 1.0) / (f - c)
    unity = n_sh * e1 / (1.0 + (n_sh - 1.0) * e1)
    return np.where(one, unity, general)


def _shell_passes(shell_passes):
    if int(shell_passes) != shell_passes or shell_passes < 1:
        raise HeatloadError("shell passes must be a whole number >= 1", field="shell_passes")
    return int(shell_passes)


def _effectiveness_range(eps):
    e = np.asarray(eps, float)
    if np.any(~np.isfinite(e)) or np.any(e < 0.0):
        raise HeatloadError("effectiveness must be >= 0", field="effectiveness")
    return e


def ntu_counterflow(effectiveness, cr):
    """NTU a counterflow exchanger needs for an effectiveness (inverse of
    :func:`effectiveness_counterflow`).

    NTU = ln[(eps - 1) / (eps Cr - 1)] / (Cr - 1);  Cr = 1: eps / (1 - eps)

    Parameters
    ----------
    effectiveness : array_like
        eps, 0 <= eps < 1 [-].
    cr : array_like
        Cmin / Cmax, 0..1 [-].

    Returns
    -------
    ndarray
        NTU [-].

    Raises
    ------
    HeatloadError
        When eps >= 1 (not reachable with finite area).

    References
    ----------
    Incropera et al., 6th ed., Table 11.4, eqs. 11.29b-c.
    """
    e = _effectiveness_range(effectiveness)
    c = _cr(cr)
    e, c = np.broadcast_arrays(e, c)
    if np.any(e >= 1.0):
        raise HeatloadError("effectiveness >= 1 is not reachable by a counterflow exchanger",
                            field="effectiveness")
    one = np.isclose(c, 1.0, rtol=0.0, atol=1e-9)
    cs = np.where(one, 0.5, c)
    general = np.log((e - 1.0) / (e * cs - 1.0)) / (cs - 1.0)
    return np.where(one, e / (1.0 - e), general)


def max_effectiveness_shell_and_tube(cr, shell_passes=1):
    """Effectiveness a shell-and-tube exchanger approaches as NTU -> infinity.

    One shell: eps_max = 2 / (1 + Cr + sqrt(1 + Cr^2)); n shells through the
    series formula of :func:`effectiveness_shell_and_tube`.

    Parameters
    ----------
    cr : array_like
        Cmin / Cmax [-].
    shell_passes : int, optional

    Returns
    -------
    ndarray
        eps_max [-].

    References
    ----------
    Incropera et al., 6th ed., eq. 11.30a in the limit NTU -> infinity.
    """
    n_sh = _shell_passes(shell_passes)
    c = _cr(cr)
    e1 = 2.0 / (1.0 + c + np.sqrt(1.0 + c ** 2))
    if n_sh == 1:
        return e1
    one = np.isclose(c, 1.0, rtol=0.0, atol=1e-9)
    with np.errstate(divide="ignore", invalid="ignore"):
        f = ((1.0 - e1 * c) / (1.0 - e1)) ** n_sh
        general = np.where(c > 0.0, (f - 1.0) / (f - c), 1.0)
    # Cr = 0: every arrangement reaches eps -> 1
    general = np.where(c == 0.0, 1.0, general)
    return np.where(one, n_sh * e1 / (1.0 + (n_sh - 1.0) * e1), general)


def ntu_shell_and_tube(effectiveness, cr, shell_passes=1):
    """NTU a shell-and-tube exchanger needs for an effectiveness (inverse of
    :func:`effectiveness_shell_and_tube`).

    One shell: E = (2/eps_1 - (1 + Cr)) / sqrt(1 + Cr^2),
    NTU_1 = -ln[(E - 1)/(E + 1)] / sqrt(1 + Cr^2);
    n shells: F = [(eps Cr - 1)/(eps - 1)]^(1/n), eps_1 = (F - 1)/(F - Cr)
    (Cr = 1: eps_1 = eps / (n - (n - 1) eps)), NTU = n NTU_1.

    Parameters
    ----------
    effectiveness : array_like
        eps [-].
    cr : array_like
        Cmin / Cmax [-].
    shell_passes : int, optional

    Returns
    -------
    ndarray
        NTU [-].

    Raises
    ------
    HeatloadError
        When eps is at or above :func:`max_effectiveness_shell_and_tube`.

    References
    ----------
    Incropera et al., 6th ed., Table 11.4, eqs. 11.30b-c, 11.31b-c.
    """
    n_sh = _shell_passes(shell_passes)
    e = _effectiveness_range(effectiveness)
    c = _cr(cr)
    e, c = np.broadcast_arrays(e, c)
    e_max = max_effectiveness_shell_and_tube(c, n_sh)
    if np.any(e >= e_max):
        raise HeatloadError("effectiveness not reachable by this shell-and-tube arrangement "
                            f"(limit {float(np.min(e_max)):.4f} at this Cr); use more shell "
                            "passes, a counterflow exchanger or more coolant", field="effectiveness")
    if n_sh == 1:
        e1 = e
    else:
        one = np.isclose(c, 1.0, rtol=0.0, atol=1e-9)
        cs = np.where(one, 0.5, c)
        f = ((e * cs - 1.0) / (e - 1.0)) ** (1.0 / n_sh)
        e1 = np.where(one, e / (n_sh - (n_sh - 1.0) * e), (f - 1.0) / (f - cs))
    root = np.sqrt(1.0 + c ** 2)
    with np.errstate(divide="ignore"):
        big_e = (2.0 / e1 - (1.0 + c)) / root
        ntu1 = -np.log((big_e - 1.0) / (big_e + 1.0)) / root
    return np.where(e1 > 0.0, n_sh * ntu1, 0.0)


def _effectiveness(arrangement, ntu, cr, shell_passes):
    if arrangement == "counterflow":
        return effectiveness_counterflow(ntu, cr)
    return effectiveness_shell_and_tube(ntu, cr, shell_passes)


def _ntu(arrangement, eps, cr, shell_passes):
    if arrangement == "counterflow":
        return ntu_counterflow(eps, cr)
    return ntu_shell_and_tube(eps, cr, shell_passes)


def _check_arrangement(arrangement):
    if arrangement not in ARRANGEMENTS:
        raise HeatloadError(f"unknown arrangement {arrangement!r}; expected one of "
                            f"{', '.join(ARRANGEMENTS)}", field="arrangement")


_GRID = 0.05


@lru_cache(maxsize=20000)
def _coolant_point(grid_index: int, glycol_fraction: float) -> tuple:
    from CoolProp.CoolProp import PropsSI

    fluid = "Water" if glycol_fraction == 0.0 else f"INCOMP::MEG[{glycol_fraction}]"
    t = grid_index * _GRID
    try:
        return tuple(PropsSI(k, "T", t, "P", 101325.0, fluid) for k in ("D", "C", "V", "L"))
    except ValueError as exc:
        raise HeatloadError(f"coolant properties not available at {t:.2f} K "
                            f"({fluid}): {exc}", field="temperature") from None


@lru_cache(maxsize=64)
def glycol_freezing_point(glycol_fraction: float) -> float:
    """Freezing point [K] of ethylene glycol-water of mass fraction *glycol_fraction*
    (0 < x <= 0.6), from CoolProp's incompressible 'INCOMP::MEG[x]' (Melinder's
    data; e.g. 10 %: -3.4 °C, 30 %: -14.6 °C, 50 %: -36.0 °C).

    References
    ----------
    Melinder, Properties of Secondary Working Fluids, IIR 2010 (MEG data in CoolProp).
    """
    from CoolProp.CoolProp import PropsSI
    return float(PropsSI("T_freeze", "T", 300.0, "P", 101325.0,
                         f"INCOMP::MEG[{float(glycol_fraction)}]"))


def coolant_properties(temperature, glycol_fraction=0.0) -> CoolantProperties:
    """Properties of cooling water or ethylene glycol-water at atmospheric pressure.

    Parameters
    ----------
    temperature : array_like
        Liquid temperature [K].
    glycol_fraction : float, optional
        Ethylene glycol mass fraction, 0 (pure water, IAPWS-95 'Water') or
        0 < x <= 0.6 (CoolProp incompressible 'INCOMP::MEG[x]').

    Returns
    -------
    CoolantProperties
        Arrays shaped like *temperature*.

    Notes
    -----
    Evaluated at 101325 Pa; liquid properties hardly change with the few bar of
    a cooling circuit.  Pure water from the table shipped with the package
    (:func:`heatload.properties.property_tables.water`, within 1e-7 of CoolProp); glycol-water
    from CoolProp on a 0.05 K grid (cached), interpolated.  Pure water must stay
    liquid (273.16 K .. 372.5 K at 1 atm).

    References
    ----------
    Wagner and Pruss, J. Phys. Chem. Ref. Data 31 (2002) 387 (IAPWS-95);
    Melinder, Properties of Secondary Working Fluids, IIR 2010 (MEG data in CoolProp).
    """
    x = float(glycol_fraction)
    if not 0.0 <= x <= 0.6:
        raise HeatloadError("glycol mass fraction must be within 0 .. 0.6",
                            field="glycol_fraction")
    t = np.asarray(temperature, float)
    if np.any(~np.isfinite(t)) or np.any(t <= 0.0):
        raise HeatloadError("temperature must be absolute [K]", field="temperature")
    if x == 0.0 and (np.any(t < 273.16) or np.any(t > 372.5)):
        raise HeatloadError("water must stay liquid: 273.16 K .. 372.5 K at 1 atm",
                            field="temperature")
    if x == 0.0:  # the table shipped with the package: no CoolProp import
        rho, cp, mu, k = property_tables.water(t)
    else:
        g = t / _GRID
        lo = np.floor(g)
        w = g - lo
        uniq, inverse = np.unique(lo.ravel(), return_inverse=True)
        a = np.array([_coolant_point(int(i), x) for i in uniq])
        b = np.array([_coolant_point(int(i) + 1, x) for i in uniq])
        inverse = inverse.reshape(-1)
        flat = a[inverse] + w.reshape(-1, 1) * (b[inverse] - a[inverse])
        rho, cp, mu, k = flat.T.reshape((4,) + t.shape)
    return CoolantProperties(density=rho, specific_heat=cp, dynamic_viscosity=mu,
                             thermal_conductivity=k, kinematic_viscosity=mu / rho,
                             prandtl=cp * mu / k)


@dataclass(frozen=True)
class AirCoolerSizing:
    """An air-oil cooler's requirement at the design point (SI)."""

    duty: np.ndarray                     #: heat to remove [W]
    etd: np.ndarray                      #: entering temperature difference T_oil,in - T_air,in [K]
    specific_cooling_power: np.ndarray   #: duty / ETD [W/K]
    air_mass_flow: np.ndarray            #: [kg/s]
    air_volume_flow: np.ndarray          #: at the air inlet [m^3/s]
    air_outlet_temperature: np.ndarray   #: [K]
    oil_temperature_drop: np.ndarray     #: through the cooler [K]
    oil_outlet_temperature: np.ndarray   #: [K]


def _oil_capacity_rate(oil_flow, oil_density, oil_specific_heat):
    return (_positive(oil_flow, "oil_flow") * _positive(oil_density, "oil_density")
            * _positive(oil_specific_heat, "oil_specific_heat"))


def size_air_cooler(duty, oil_inlet_temperature, air_inlet_temperature, oil_flow, oil_density,
                    oil_specific_heat, air_temperature_rise=10.0,
                    pressure=101325.0) -> AirCoolerSizing:
    """Required specific cooling power of an air-oil cooler and its flows.

    P_spec = P / ETD, ETD = T_oil,in - T_air,in;
    m_air = P / (c_p,air dT_air), dT_oil = P / (rho_oil Q_oil c_oil).

    Parameters
    ----------
    duty : array_like
        Heat to remove [W], >= 0.
    oil_inlet_temperature : array_like
        Oil entering the cooler [K].
    air_inlet_temperature : array_like
        Cooling air entering [K] (the highest ambient for sizing).
    oil_flow : array_like
        Oil through the cooler [m^3/s].
    oil_density, oil_specific_heat : array_like
        At the oil inlet temperature [kg/m^3], [J/(kg K)].
    air_temperature_rise : array_like, optional
        Expected air rise through the core [K] (sets the air flow).
    pressure : float, optional
        Absolute air pressure [Pa].

    Returns
    -------
    AirCoolerSizing

    Notes
    -----
    Cooler catalogues rate air-oil coolers in W per K of ETD at a given oil and
    air flow, and the duty is close to proportional to the ETD (common practice).
    Air properties (CoolProp) at the mean air temperature.

    References
    ----------
    Energy balance of each stream (Incropera et al., 6th ed., eq. 11.6b);
    ETD rating: common practice.
    """
    from heatload.heat.heat_transfer import air_properties

    p = _positive(duty, "duty", allow_zero=True)
    t_oil = np.asarray(oil_inlet_temperature, float)
    t_air = np.asarray(air_inlet_temperature, float)
    rise = _positive(air_temperature_rise, "air_temperature_rise")
    etd = t_oil - t_air
    if np.any(etd <= 0.0):
        raise HeatloadError("oil inlet must be warmer than the air inlet (ETD > 0)",
                            field="oil_inlet_temperature")
    if np.any(rise >= etd):
        raise HeatloadError("air temperature rise must stay below the ETD",
                            field="air_temperature_rise")
    c_oil = _oil_capacity_rate(oil_flow, oil_density, oil_specific_heat)
    drop = p / c_oil
    if np.any(drop >= etd):
        raise HeatloadError("oil flow too small: the oil would leave colder than the air "
                            "inlet; more oil flow is needed", field="oil_flow")
    air_in = air_properties(t_air, pressure)
    air_mean = air_properties(t_air + 0.5 * rise, pressure)
    m_air = p / (air_mean.specific_heat * rise)
    return AirCoolerSizing(duty=p, etd=etd, specific_cooling_power=p / etd,
                           air_mass_flow=m_air, air_volume_flow=m_air / air_in.density,
                           air_outlet_temperature=t_air + rise, oil_temperature_drop=drop,
                           oil_outlet_temperature=t_oil - drop)


@dataclass(frozen=True)
class WaterCoolerSizing:
    """A water-oil cooler's requirement at the design point (SI)."""

    duty: np.ndarray                     #: [W]
    etd: np.ndarray                      #: T_oil,in - T_water,in [K]
    required_conductance: np.ndarray     #: UA [W/K]
    ntu: np.ndarray                      #: UA / Cmin [-]
    effectiveness: np.ndarray            #: duty / (Cmin ETD) [-]
    capacity_ratio: np.ndarray           #: Cmin / Cmax [-]
    oil_capacity_rate: np.ndarray        #: rho Q c_p of the oil [W/K]
    water_capacity_rate: np.ndarray      #: m c_p of the water [W/K]
    water_volume_flow: np.ndarray        #: at the inlet temperature [m^3/s]
    water_mass_flow: np.ndarray          #: [kg/s]
    water_outlet_temperature: np.ndarray  #: [K]
    oil_outlet_temperature: np.ndarray   #: [K]
    arrangement: str                     #: "shell-and-tube" | "counterflow"
    shell_passes: int                    #: shell passes (shell-and-tube) [-]


def _water_stream(duty, t_in, water_flow, rise, glycol_fraction):
    """Water mass flow and c_p from a given volume flow or an allowed rise."""
    if water_flow is None:
        r = _positive(rise, "water_temperature_rise")
        props = coolant_properties(t_in + 0.5 * r, glycol_fraction)
        m = duty / (props.specific_heat * r)
        rho_in = coolant_properties(t_in, glycol_fraction).density
        return m, m / rho_in, props.specific_heat
    q = _positive(water_flow, "water_flow")
    rho_in = coolant_properties(t_in, glycol_fraction).density
    m = rho_in * q
    cp = coolant_properties(t_in, glycol_fraction).specific_heat
    # refine c_p at the mean water temperature once (the rise is a few kelvin)
    t_mean = t_in + 0.5 * duty / (m * cp)
    cp = coolant_properties(np.minimum(t_mean, 372.0), glycol_fraction).specific_heat
    return m, q, cp


def size_water_cooler(duty, oil_inlet_temperature, water_inlet_temperature, oil_flow,
                      oil_density, oil_specific_heat, water_flow=None, water_temperature_rise=5.0,
                      glycol_fraction=0.0, arrangement="shell-and-tube",
                      shell_passes=1) -> WaterCoolerSizing:
    """Required UA of a water-oil cooler by effectiveness-NTU.

    C_oil = rho Q c_p, C_w = m_w c_p,w; eps = P / (Cmin ETD); NTU from the
    arrangement's inverse; UA = NTU Cmin.

    Parameters
    ----------
    duty : array_like
        Heat to remove [W], > 0.
    oil_inlet_temperature, water_inlet_temperature : array_like
        [K].
    oil_flow : array_like
        [m^3/s].
    oil_density, oil_specific_heat : array_like
        [kg/m^3], [J/(kg K)].
    water_flow : array_like, optional
        Coolant volume flow [m^3/s]; None -> from *water_temperature_rise*.
    water_temperature_rise : array_like, optional
        Allowed coolant rise [K] when no flow is given.
    glycol_fraction : float, optional
        Ethylene glycol mass fraction [-].
    arrangement : str, optional
        'shell-and-tube' (one shell pass, 2, 4 ... tube passes by default) or 'counterflow'.
    shell_passes : int, optional
        Shell passes of a shell-and-tube unit.

    Returns
    -------
    WaterCoolerSizing

    Raises
    ------
    HeatloadError
        When the duty reaches Cmin ETD (no exchanger can do it) or the
        effectiveness is beyond the arrangement's limit.

    References
    ----------
    Incropera et al., 6th ed., Sec. 11.4-11.5 (effectiveness-NTU method).
    """
    _check_arrangement(arrangement)
    p = _positive(duty, "duty")
    t_oil = np.asarray(oil_inlet_temperature, float)
    t_w = np.asarray(water_inlet_temperature, float)
    etd = t_oil - t_w
    if np.any(etd <= 0.0):
        raise HeatloadError("oil inlet must be warmer than the water inlet (ETD > 0)",
                            field="oil_inlet_temperature")
    c_oil = _oil_capacity_rate(oil_flow, oil_density, oil_specific_heat)
    m_w, q_w, cp_w = _water_stream(p, t_w, water_flow, water_temperature_rise, glycol_fraction)
    c_w = m_w * cp_w
    c_min = np.minimum(c_oil, c_w)
    c_max = np.maximum(c_oil, c_w)
    q_max = c_min * etd
    if np.any(p >= q_max):
        raise HeatloadError(f"duty {float(np.max(p)):.0f} W reaches Cmin*ETD = "
                            f"{float(np.min(q_max)):.0f} W: not reachable; more oil or water "
                            "flow, or a colder coolant, is needed", field="duty")
    cr = c_min / c_max
    eps = p / q_max
    ntu = _ntu(arrangement, eps, cr, shell_passes)
    return WaterCoolerSizing(
        duty=p, etd=etd, required_conductance=ntu * c_min, ntu=ntu, effectiveness=eps,
        capacity_ratio=cr, oil_capacity_rate=c_oil, water_capacity_rate=c_w,
        water_volume_flow=q_w, water_mass_flow=m_w, water_outlet_temperature=t_w + p / c_w,
        oil_outlet_temperature=t_oil - p / c_oil, arrangement=arrangement,
        shell_passes=int(shell_passes))


def rate_air_cooler(rated_duty, rated_etd, design_etd):
    """Duty of an air-oil cooler at another ETD, same oil and air flows.

    P_design = P_rated ETD_design / ETD_rated

    Parameters
    ----------
    rated_duty : array_like
        Catalogue duty [W].
    rated_etd : array_like
        ETD of the catalogue point [K].
    design_etd : array_like
        ETD at the design point [K], >= 0.

    Returns
    -------
    ndarray
        Duty at the design ETD [W].

    Notes
    -----
    Duty proportional to ETD at fixed flows (common practice); viscosity
    effects of a colder or warmer oil are not included.

    References
    ----------
    Common practice of air-oil cooler catalogues (specific cooling power in W/K).
    """
    return (_positive(rated_duty, "rated_duty") * _positive(design_etd, "design_etd", True)
            / _positive(rated_etd, "rated_etd"))


@dataclass(frozen=True)
class WaterCoolerRating:
    """A water-oil cooler's performance at a design point from its rated point (SI)."""

    duty: np.ndarray                     #: at the design point [W]
    conductance: np.ndarray              #: UA from the rated point, held [W/K]
    ntu: np.ndarray                      #: at the design point [-]
    effectiveness: np.ndarray            #: at the design point [-]
    capacity_ratio: np.ndarray           #: at the design point [-]
    oil_outlet_temperature: np.ndarray   #: [K]
    water_outlet_temperature: np.ndarray  #: [K]


def rate_water_cooler(rated_duty, rated_oil_inlet, rated_water_inlet, rated_oil_flow,
                      rated_water_flow, design_oil_inlet, design_water_inlet, oil_density,
                      oil_specific_heat, design_oil_flow=None, design_water_flow=None,
                      glycol_fraction=0.0, arrangement="shell-and-tube",
                      shell_passes=1) -> WaterCoolerRating:
    """Duty of a water-oil cooler at a design point from one rated point.

    Rated: eps_r = P_r / (Cmin,r ETD_r), NTU_r from the arrangement, UA = NTU_r Cmin,r.
    Design: NTU = UA / Cmin, eps from the arrangement, P = eps Cmin ETD.

    Parameters
    ----------
    rated_duty : float
        Catalogue duty [W].
    rated_oil_inlet, rated_water_inlet : float
        Inlet temperatures of the rated point [K].
    rated_oil_flow, rated_water_flow : float
        Flows of the rated point [m^3/s].
    design_oil_inlet, design_water_inlet : array_like
        Inlet temperatures at the design point [K].
    oil_density, oil_specific_heat : float
        Oil properties [kg/m^3], [J/(kg K)], used at both points.
    design_oil_flow, design_water_flow : array_like, optional
        Design flows [m^3/s]; None -> the rated flows.
    glycol_fraction : float, optional
    arrangement : str, optional
        'shell-and-tube' or 'counterflow'.
    shell_passes : int, optional

    Returns
    -------
    WaterCoolerRating

    Notes
    -----
    UA is held at its rated value.  In reality the oil-side film coefficient
    changes with oil viscosity and flow, so this is fair near the rated
    flows and oil grade only.

    References
    ----------
    Incropera et al., 6th ed., Sec. 11.5 (performance calculation by eps-NTU).
    """
    _check_arrangement(arrangement)
    rated = size_water_cooler(rated_duty, rated_oil_inlet, rated_water_inlet, rated_oil_flow,
                              oil_density, oil_specific_heat, water_flow=rated_water_flow,
                              glycol_fraction=glycol_fraction, arrangement=arrangement,
                              shell_passes=shell_passes)
    ua = rated.required_conductance
    q_oil = rated_oil_flow if design_oil_flow is None else design_oil_flow
    q_w = rated_water_flow if design_water_flow is None else design_water_flow
    t_oil = np.asarray(design_oil_inlet, float)
    t_w = np.asarray(design_water_inlet, float)
    etd = t_oil - t_w
    if np.any(etd < 0.0):
        raise HeatloadError("design oil inlet must not be colder than the water inlet",
                            field="design_oil_inlet")
    c_oil = _oil_capacity_rate(q_oil, oil_density, oil_specific_heat)
    props = coolant_properties(t_w, glycol_fraction)
    c_w = props.density * _positive(q_w, "design_water_flow") * props.specific_heat
    c_min = np.minimum(c_oil, c_w)
    cr = c_min / np.maximum(c_oil, c_w)
    ntu = ua / c_min
    eps = _effectiveness(arrangement, ntu, cr, shell_passes)
    p = eps * c_min * etd
    return WaterCoolerRating(duty=p, conductance=ua, ntu=ntu, effectiveness=eps,
                             capacity_ratio=cr, oil_outlet_temperature=t_oil - p / c_oil,
                             water_outlet_temperature=t_w + p / c_w)


def required_cooler_duty(heat_to_oil, conductance_at_design, oil_temperature_max, ambient_max,
                         margin=0.2):
    """Duty the cooler must take so the oil stays at the design temperature.

    P_cooler = max(0, Q - UA (T_oil,max - T_amb,max)) (1 + margin)

    Parameters
    ----------
    heat_to_oil : array_like
        Mean heat into the oil [W].
    conductance_at_design : array_like
        Surfaces' UA at the design oil temperature [W/K].
    oil_temperature_max : array_like
        Design (highest allowed) oil temperature [K].
    ambient_max : array_like
        Highest ambient [K].
    margin : array_like, optional
        Duty margin, 0.2 = +20 % [-].

    Returns
    -------
    ndarray
        Cooler duty [W], 0 when the surfaces alone suffice.

    Notes
    -----
    Steady balance at the worst ambient; the reservoir's own dissipation at
    the design temperature is credited (common practice).

    References
    ----------
    Steady energy balance of the oil (first law); margin: common practice.
    """
    q = np.asarray(heat_to_oil, float)
    ua = _positive(conductance_at_design, "conductance_at_design", allow_zero=True)
    m = _positive(margin, "margin", allow_zero=True)
    shed = ua * (np.asarray(oil_temperature_max, float) - np.asarray(ambient_max, float))
    return np.maximum(0.0, q - shed) * (1.0 + m)


def cooler_needed(heat_to_oil, conductance_at_design, oil_temperature_max, ambient_max):
    """Whether the surfaces alone cannot hold the oil at the design temperature.

    needed = Q > UA (T_oil,max - T_amb,max)

    Parameters
    ----------
    heat_to_oil, conductance_at_design, oil_temperature_max, ambient_max : array_like
        As in :func:`required_cooler_duty`.

    Returns
    -------
    ndarray of bool

    References
    ----------
    Steady energy balance of the oil (first law).
    """
    return required_cooler_duty(heat_to_oil, conductance_at_design, oil_temperature_max,
                                ambient_max, margin=0.0) > 0.0


@dataclass(frozen=True)
class CoolerSpec:
    """What a cooler supplier needs to quote; SI floats (None where not applicable)."""

    coolant: str                          #: "air" | "water"
    duty: float                           #: with margin [W]
    duty_without_margin: float            #: [W]
    margin: float                         #: [-]
    etd: float                            #: T_oil,in - T_coolant,in [K]
    oil_flow: float                       #: [m^3/s]
    oil_inlet_temperature: float          #: [K]
    oil_outlet_temperature: float         #: [K]
    oil_pressure_drop_max: float          #: allowed oil-side drop [Pa]
    oil_viscosity: float                  #: kinematic viscosity at the oil inlet [m^2/s]
    coolant_inlet_temperature: float      #: [K]
    coolant_flow: float                   #: air or water volume flow [m^3/s]
    coolant_outlet_temperature: float     #: [K]
    glycol_fraction: float                #: [-] (water only)
    specific_cooling_power: Optional[float]  #: air: duty / ETD [W/K]
    required_conductance: Optional[float]   #: water: UA [W/K]
    arrangement: Optional[str]            #: water: exchanger arrangement
    caution: str = CAUTION


def cooler_spec_sheet(coolant, duty, oil_inlet_temperature, coolant_inlet_temperature, oil_flow,
                      oil_density, oil_specific_heat, oil_viscosity, margin=0.2,
                      oil_pressure_drop_max=1.0e5, air_temperature_rise=10.0, water_flow=None,
                      water_temperature_rise=5.0, glycol_fraction=0.0,
                      arrangement="shell-and-tube", shell_passes=1,
                      air_pressure=101325.0) -> CoolerSpec:
    """Collect a cooler's quotable requirement, margin applied, sized at the design point.

    duty = P (1 + margin); air: P_spec = duty / ETD; water: UA by eps-NTU
    (:func:`size_water_cooler`).

    Parameters
    ----------
    coolant : str
        A cooler type of :data:`heatload.cooling.cooler_types.TYPES` ('air' or 'water').
    duty : float
        Cooler duty WITHOUT margin [W] (e.g. ``required_cooler_duty(..., margin=0)``).
    oil_inlet_temperature : float
        Oil into the cooler at the design point [K].
    coolant_inlet_temperature : float
        Air or water in [K].
    oil_flow : float
        [m^3/s].
    oil_density, oil_specific_heat, oil_viscosity : float
        At the oil inlet: [kg/m^3], [J/(kg K)], [m^2/s].
    margin : float, optional
        [-].
    oil_pressure_drop_max : float, optional
        Allowed oil-side drop [Pa].
    air_temperature_rise : float, optional
        [K] (air).
    water_flow : float, optional
        [m^3/s] (water); None -> from *water_temperature_rise*.
    water_temperature_rise : float, optional
        [K] (water).
    glycol_fraction : float, optional
        [-] (water).
    arrangement : str, optional
        (water).
    shell_passes : int, optional
        (water).
    air_pressure : float, optional
        Absolute air pressure at the site [Pa] (air: the volume flow is at
        the air's density there; :func:`heatload.heat.heat_transfer.barometric_pressure`).

    Returns
    -------
    CoolerSpec

    Notes
    -----
    Sizing is an estimate for early design; component makers' data, local
    codes and licensed practice govern.

    References
    ----------
    See :func:`size_air_cooler`, :func:`size_water_cooler`.
    """
    from heatload.cooling.cooler_types import cooler_type

    kind = cooler_type(coolant)
    base = float(_positive(duty, "duty"))
    m = float(_positive(margin, "margin", allow_zero=True))
    nu = float(_positive(oil_viscosity, "oil_viscosity"))
    dp = float(_positive(oil_pressure_drop_max, "oil_pressure_drop_max"))
    p = base * (1.0 + m)
    common = dict(coolant=coolant, duty=p, duty_without_margin=base, margin=m,
                  oil_flow=float(oil_flow), oil_inlet_temperature=float(oil_inlet_temperature),
                  oil_pressure_drop_max=dp, oil_viscosity=nu,
                  coolant_inlet_temperature=float(coolant_inlet_temperature))
    options = dict(air_temperature_rise=air_temperature_rise, water_flow=water_flow,
                   water_temperature_rise=water_temperature_rise,
                   glycol_fraction=glycol_fraction, arrangement=arrangement,
                   shell_passes=shell_passes, air_pressure=air_pressure)
    return kind.spec_sheet(p, oil_inlet_temperature, coolant_inlet_temperature, oil_flow,
                           oil_density, oil_specific_heat, common, options)
