"""Heat leaving the reservoir and the circuit: natural and forced convection to
air, and thermal radiation.

One correlation per function, vectorized over numpy arrays, SI inside
(K, m, W, Pa).  Air properties come from a table shipped with the package
(``heatload/data/air_properties.npz``, made from CoolProp by
``scripts/make_property_tables.py``; see :mod:`heatload.properties.property_tables`):
smooth in temperature for the root finders of :mod:`heatload.heat.thermal`, and no
CoolProp import on the way.

The public entry point for the thermal model is :func:`reservoir_conductance`,
the overall conductance UA [W/K] of a :class:`heatload.model.Reservoir` and its
further surfaces at a given oil temperature.
"""

from __future__ import annotations

from collections import namedtuple
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from heatload.properties import property_tables
from heatload.errors import HeatloadError

#: Stefan-Boltzmann constant [W/(m^2 K^4)] (CODATA 2018, exact in SI).
STEFAN_BOLTZMANN = 5.670374419e-8
#: Standard gravity [m/s^2] (CGPM 1901, exact).
GRAVITY = 9.80665
#: Laminar to turbulent transition on a flat plate in forced flow [-] (Incropera, Sec. 7.2).
RE_TRANSITION = 5.0e5
#: Natural convection orientations accepted by :func:`natural_convection_coefficient`.
ORIENTATIONS = ("vertical", "horizontal-up", "horizontal-down", "cylinder")
#: Default effectiveness of the reservoir surfaces not wetted by oil (the wall band
#: above the oil level and the lid).  An assumption, not a published value: these
#: surfaces are heated only through the steel from the oil line and by the warm air
#: space above the oil, so they run between the oil and the ambient temperature;
#: half of a wetted surface's dissipation is taken (from memory, a round estimate).
DRY_SURFACE_FACTOR = 0.5

AirProperties = namedtuple(
    "AirProperties",
    ["density", "specific_heat", "dynamic_viscosity", "thermal_conductivity",
     "prandtl", "expansion", "kinematic_viscosity"],
)
AirProperties.__doc__ = """Dry air properties, each an array [SI]:
density [kg/m^3], specific_heat [J/(kg K)], dynamic_viscosity [Pa s],
thermal_conductivity [W/(m K)], prandtl [-], expansion (1/T, ideal gas) [1/K],
kinematic_viscosity [m^2/s]."""


#: Range of the shipped air table (heatload/data/air_properties.npz, written by
#: scripts/make_property_tables.py): temperature [K], absolute pressure [Pa].
AIR_TEMPERATURE_RANGE = (150.0, 1000.0)
AIR_PRESSURE_RANGE = (20.0e3, 120.0e3)


@lru_cache(maxsize=1)
def _air_table():
    """(t_low [K], t_step [K], p_scale [Pa], values (12, n), moments (12, n)) of the
    shipped table: rows rho/p, c_p, mu, k, each as (a0, a1, a2) of
    a0 + a1 s + a2 s^2, s = p / p_scale; columns a uniform temperature grid."""
    d = property_tables.load("air_properties")
    (t_low, t_high, t_step), (p_low, p_high, p_scale) = d["temperature"], d["pressure"]
    if (t_low, t_high) != AIR_TEMPERATURE_RANGE or (p_low, p_high) != AIR_PRESSURE_RANGE:
        raise HeatloadError("the shipped air property table does not match this version; "
                            "regenerate it with scripts/make_property_tables.py",
                            field="data")
    return float(t_low), float(t_step), float(p_scale), d["values"], d["moments"]


def air_properties(temperature, pressure=101325.0) -> AirProperties:
    """Properties of dry air after CoolProp's 'Air' (Lemmon et al. pseudo-pure
    fluid), from a table shipped with the package.

    f(T, p) = a0(T) + a1(T) s + a2(T) s^2, s = p / 1e5 Pa, for f = rho / p, c_p,
    mu, k; ``expansion`` = 1/T (ideal gas), ``prandtl`` = c_p mu / k,
    ``kinematic_viscosity`` = mu / rho.

    Parameters
    ----------
    temperature : array_like
        Air temperature [K], 150 K .. 1000 K.
    pressure : array_like, optional
        Absolute pressure [Pa], 20 kPa .. 120 kPa (default 101325 Pa, sea level;
        altitude -500 m .. 9000 m is 107.5 .. 30.8 kPa).

    Returns
    -------
    AirProperties
        Arrays broadcast from *temperature* and *pressure* (see the type's fields).

    Notes
    -----
    The pressure dependence is the virial expansion about the ideal gas to
    second order (rho = p M / (Z R T) with 1/Z = 1 - B' p + C' p^2; density
    corrections of the dilute-gas viscosity and conductivity), each coefficient
    a cubic spline in T on a 2 K grid.  The table is made from CoolProp by
    ``scripts/make_property_tables.py`` and reproduces it within 1e-7 relative over the
    whole range (a test checks 1e-6), far below the uncertainty of any
    convection correlation.  CoolProp itself is not imported: sizing a tank or
    an air cooler starts in well under a second.

    References
    ----------
    Lemmon, Jacobsen, Penoncello, Friend, J. Phys. Chem. Ref. Data 29 (2000) 331;
    Lemmon and Jacobsen, Int. J. Thermophys. 25 (2004) 21 (viscosity, conductivity);
    Bell et al., Ind. Eng. Chem. Res. 53 (2014) 2498 (CoolProp).

    Examples
    --------
    Air at 300 K and 1 atm: the ideal gas p M / (R T) with M = 28.965 g/mol
    (ISO 2533) gives 1.1767 kg/m^3; c_p 1007 J/(kg K) in Incropera et al.,
    6th ed., Table A.4.

    >>> a = air_properties(300.0)
    >>> round(float(a.density), 3), round(float(a.specific_heat))
    (1.177, 1006)
    """
    t, p = np.broadcast_arrays(np.asarray(temperature, dtype=float),
                               np.asarray(pressure, dtype=float))
    t_lo, t_hi = AIR_TEMPERATURE_RANGE
    if not np.all(np.isfinite(t)) or np.any(t < t_lo) or np.any(t > t_hi):
        raise HeatloadError("air temperature must be within 150 K .. 1000 K", field="temperature")
    p_lo, p_hi = AIR_PRESSURE_RANGE
    if not np.all(np.isfinite(p)) or np.any(p < p_lo) or np.any(p > p_hi):
        raise HeatloadError("air pressure must be an absolute pressure within 20 kPa .. 120 kPa "
                            "[Pa] (altitude -500 m .. 9000 m)", field="pressure")
    tf, pf = t.ravel(), p.ravel()
    pu, inverse = np.unique(pf, return_inverse=True)
    if len(pu) <= 8:  # one altitude (the model's case): linear in a fine table per pressure
        flat = np.empty((tf.size, 4))
        for j, pv in enumerate(pu):
            sel = slice(None) if len(pu) == 1 else inverse.reshape(-1) == j
            table = _air_fine_table(float(pv))
            # uniform grid: the node index by arithmetic, no search
            x = (tf[sel] - AIR_TEMPERATURE_RANGE[0]) * (1.0 / _FINE_STEP)
            i = np.minimum(x.astype(np.intp), len(table) - 2)
            lo = table[i]
            flat[sel] = lo + (x - i)[:, None] * (table[i + 1] - lo)
        flat = flat.T
    else:
        flat = _air_from_table(tf, pf)
    rho, cp, mu, k = flat.reshape((4,) + t.shape)
    return AirProperties(density=rho, specific_heat=cp, dynamic_viscosity=mu,
                         thermal_conductivity=k, prandtl=cp * mu / k,
                         expansion=1.0 / t, kinematic_viscosity=mu / rho)


def _air_from_table(t, p):
    """rho, c_p, mu, k (4, n) at temperatures *t* (n,) [K] and pressures *p* (n,) [Pa]
    from the shipped table: the cubic in temperature, then the expansion in pressure."""
    t0, step, p_scale, values, moments = _air_table()
    coef = property_tables.cubic_spline(t, values, moments, t0, step).reshape(4, 3, -1)
    s = p / p_scale
    out = coef[:, 0] + s * (coef[:, 1] + s * coef[:, 2])
    out[0] *= p  # rho / p -> rho
    return out


#: Step of the per-pressure fine table [K]: linear interpolation on it adds at most
#: h^2/8 |f''/f| = 3e-8 (density ~ 1/T at 150 K), so it keeps the table's accuracy.
_FINE_STEP = 0.05


@lru_cache(maxsize=16)
def _air_fine_table(pressure: float) -> np.ndarray:
    """rho, c_p, mu, k (n, 4) at one pressure on a :data:`_FINE_STEP` grid from
    150 K, evaluated from the shipped table once, so each later call is a
    linear interpolation (as fast as a plain lookup)."""
    t0, step, p_scale, values, moments = _air_table()
    # the expansion in pressure first: at one pressure each property is one spline
    # (values and second derivatives combine alike), four rows instead of twelve
    s = pressure / p_scale
    weights = np.array([1.0, s, s * s])
    v = np.einsum("j,pjn->pn", weights, values.reshape(4, 3, -1))
    m = np.einsum("j,pjn->pn", weights, moments.reshape(4, 3, -1))
    lo, hi = AIR_TEMPERATURE_RANGE
    grid = np.linspace(lo, hi, int(round((hi - lo) / _FINE_STEP)) + 1)
    fine = property_tables.cubic_spline(grid, v, m, t0, step)
    fine[0] *= pressure
    return np.ascontiguousarray(fine.T)


def grashof(expansion, temperature_difference, length, kinematic_viscosity, gravity=GRAVITY):
    """Grashof number Gr = g beta |dT| L^3 / nu^2.

    Parameters
    ----------
    expansion : array_like
        Volumetric expansion coefficient beta of the fluid [1/K].
    temperature_difference : array_like
        Surface minus fluid temperature [K] (its magnitude is used).
    length : array_like
        Characteristic length [m].
    kinematic_viscosity : array_like
        [m^2/s].
    gravity : float, optional
        [m/s^2].

    Returns
    -------
    ndarray
        Gr [-].

    References
    ----------
    Incropera, DeWitt, Bergman, Lavine, Fundamentals of Heat and Mass Transfer,
    6th ed., Wiley 2007, eq. 9.12.
    """
    return (gravity * np.asarray(expansion, float) * np.abs(temperature_difference)
            * np.asarray(length, float) ** 3 / np.asarray(kinematic_viscosity, float) ** 2)


def rayleigh(grashof_number, prandtl):
    """Rayleigh number Ra = Gr Pr.

    Parameters
    ----------
    grashof_number : array_like
        Gr [-].
    prandtl : array_like
        Pr [-].

    Returns
    -------
    ndarray
        Ra [-].

    References
    ----------
    Incropera et al., 6th ed., eq. 9.25.
    """
    return np.asarray(grashof_number, float) * np.asarray(prandtl, float)


def nusselt_vertical_plate_churchill_chu(rayleigh, prandtl):
    """Mean Nusselt number of an isothermal vertical plate, laminar and turbulent.

    Nu_L = {0.825 + 0.387 Ra_L^(1/6) / [1 + (0.492/Pr)^(9/16)]^(8/27)}^2

    Parameters
    ----------
    rayleigh : array_like
        Ra_L based on the plate height [-].
    prandtl : array_like
        Pr [-].

    Returns
    -------
    ndarray
        Nu_L [-].

    Notes
    -----
    Valid over the whole Ra range (10^-1 .. 10^12); vertical cylinders too when
    D / L >= 35 / Gr_L^(1/4).

    References
    ----------
    Churchill, S.W., Chu, H.H.S., Int. J. Heat Mass Transfer 18 (1975) 1323-1329;
    Incropera et al., 6th ed., eq. 9.26.
    """
    ra = np.asarray(rayleigh, float)
    pr = np.asarray(prandtl, float)
    psi = (1.0 + (0.492 / pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return (0.825 + 0.387 * ra ** (1.0 / 6.0) / psi) ** 2


def nusselt_horizontal_plate_hot_up(rayleigh):
    """Mean Nusselt number of the upper face of a hot horizontal plate
    (or the lower face of a cold one).

    Nu_L = 0.54 Ra_L^(1/4) for Ra_L <= 10^7, 0.15 Ra_L^(1/3) above,
    with L = area / perimeter.

    Parameters
    ----------
    rayleigh : array_like
        Ra_L based on L = A / P [-].

    Returns
    -------
    ndarray
        Nu_L [-].

    Notes
    -----
    Published range 10^4 .. 10^11, Pr >= 0.7; the laminar branch is used
    below 10^4 too (small plates, small dT), a mild extrapolation.

    References
    ----------
    Incropera et al., 6th ed., eqs. 9.30-9.31 (after Lloyd and Moran 1974).
    """
    ra = np.asarray(rayleigh, float)
    return np.where(ra <= 1e7, 0.54 * ra ** 0.25, 0.15 * ra ** (1.0 / 3.0))


def nusselt_horizontal_plate_hot_down(rayleigh):
    """Mean Nusselt number of the lower face of a hot horizontal plate
    (or the upper face of a cold one).

    Nu_L = 0.52 Ra_L^(1/5), L = area / perimeter.

    Parameters
    ----------
    rayleigh : array_like
        Ra_L based on L = A / P [-].

    Returns
    -------
    ndarray
        Nu_L [-].

    Notes
    -----
    Published range 10^4 .. 10^9, Pr >= 0.7.

    References
    ----------
    Incropera et al., 7th ed., eq. 9.32 (after Radziemska and Lewandowski 2001).
    """
    ra = np.asarray(rayleigh, float)
    return 0.52 * ra ** 0.2


def nusselt_horizontal_cylinder_churchill_chu(rayleigh, prandtl):
    """Mean Nusselt number of a long isothermal horizontal cylinder (a pipe).

    Nu_D = {0.60 + 0.387 Ra_D^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2

    Parameters
    ----------
    rayleigh : array_like
        Ra_D based on the outside diameter [-].
    prandtl : array_like
        Pr [-].

    Returns
    -------
    ndarray
        Nu_D [-].

    Notes
    -----
    Valid for Ra_D <= 10^12.

    References
    ----------
    Churchill, S.W., Chu, H.H.S., Int. J. Heat Mass Transfer 18 (1975) 1049-1053;
    Incropera et al., 6th ed., eq. 9.34.
    """
    ra = np.asarray(rayleigh, float)
    pr = np.asarray(prandtl, float)
    psi = (1.0 + (0.559 / pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return (0.60 + 0.387 * ra ** (1.0 / 6.0) / psi) ** 2


def nusselt_flat_plate_forced(reynolds, prandtl):
    """Mean Nusselt number of an isothermal flat plate in parallel forced flow.

    Laminar (Re_L <= 5 10^5): Nu_L = 0.664 Re_L^(1/2) Pr^(1/3);
    mixed laminar/turbulent (Re_L > 5 10^5): Nu_L = (0.037 Re_L^(4/5) - 871) Pr^(1/3).

    Parameters
    ----------
    reynolds : array_like
        Re_L = u L / nu, L the length along the flow [-].
    prandtl : array_like
        Pr [-].

    Returns
    -------
    ndarray
        Nu_L [-].

    Notes
    -----
    Laminar form for Pr >= 0.6; mixed form for 0.6 <= Pr <= 60,
    5 10^5 < Re_L <= 10^8, transition at Re = 5 10^5.  Both branches
    meet at the transition (continuous).

    References
    ----------
    Incropera et al., 6th ed., eqs. 7.30 and 7.38.
    """
    re = np.asarray(reynolds, float)
    pr = np.asarray(prandtl, float)
    lam = 0.664 * np.sqrt(re) * pr ** (1.0 / 3.0)
    mixed = (0.037 * re ** 0.8 - 871.0) * pr ** (1.0 / 3.0)
    return np.where(re <= RE_TRANSITION, lam, mixed)


def radiation_coefficient(surface_temperature, ambient_temperature, emissivity):
    """Linearized radiation coefficient of a small grey surface in large surroundings.

    h_r = eps sigma (T_s^2 + T_a^2)(T_s + T_a), so that q = h_r (T_s - T_a)
    equals eps sigma (T_s^4 - T_a^4) exactly.

    Parameters
    ----------
    surface_temperature : array_like
        [K].
    ambient_temperature : array_like
        Surroundings (walls of the room, taken at air temperature) [K].
    emissivity : array_like
        Hemispherical emissivity, 0..1 [-] (painted steel ~0.9, common practice).

    Returns
    -------
    ndarray
        h_r [W/(m^2 K)].

    References
    ----------
    Incropera et al., 6th ed., eq. 1.9.
    """
    ts = np.asarray(surface_temperature, float)
    ta = np.asarray(ambient_temperature, float)
    eps = np.asarray(emissivity, float)
    if np.any(eps < 0.0) or np.any(eps > 1.0):
        raise HeatloadError("emissivity must be within 0 .. 1", field="emissivity")
    if np.any(ts <= 0.0) or np.any(ta <= 0.0):
        raise HeatloadError("temperatures must be absolute [K] and positive", field="temperature")
    return eps * STEFAN_BOLTZMANN * (ts ** 2 + ta ** 2) * (ts + ta)


def natural_convection_coefficient(surface_temperature, air_temperature, characteristic_length,
                                   orientation="vertical", pressure=101325.0):
    """Natural convection coefficient from an isothermal surface to still air.

    h = Nu k / L, Nu from the orientation's correlation, air properties at the
    film temperature T_f = (T_s + T_a)/2, beta = 1/T_f.

    Parameters
    ----------
    surface_temperature : array_like
        [K].
    air_temperature : array_like
        Air far from the surface [K].
    characteristic_length : array_like
        Height of a vertical wall, area/perimeter of a horizontal plate, outside
        diameter of a cylinder [m].
    orientation : str
        'vertical' (Churchill-Chu plate), 'horizontal-up' (face looking up),
        'horizontal-down' (face looking down), 'cylinder' (horizontal pipe).
    pressure : array_like, optional
        Absolute air pressure [Pa].

    Returns
    -------
    ndarray
        h [W/(m^2 K)].

    Notes
    -----
    A face looking up that is colder than the air behaves like a hot face
    looking down (and vice versa): the stable layer case takes the
    hot-down correlation.

    References
    ----------
    Incropera et al., 6th/7th ed., Sec. 9.6; Churchill and Chu (1975).
    """
    if orientation not in ORIENTATIONS:
        raise HeatloadError(f"unknown orientation {orientation!r}; expected one of "
                            f"{', '.join(ORIENTATIONS)}", field="orientation")
    ts = np.asarray(surface_temperature, float)
    ta = np.asarray(air_temperature, float)
    length = np.asarray(characteristic_length, float)
    if np.any(length <= 0.0):
        raise HeatloadError("characteristic length must be positive [m]",
                            field="characteristic_length")
    film = 0.5 * (ts + ta)
    air = air_properties(film, pressure)
    gr = grashof(air.expansion, ts - ta, length, air.kinematic_viscosity)
    ra = rayleigh(gr, air.prandtl)
    if orientation == "vertical":
        nu = nusselt_vertical_plate_churchill_chu(ra, air.prandtl)
    elif orientation == "cylinder":
        nu = nusselt_horizontal_cylinder_churchill_chu(ra, air.prandtl)
    else:
        unstable = (ts >= ta) if orientation == "horizontal-up" else (ts < ta)
        nu = np.where(unstable, nusselt_horizontal_plate_hot_up(ra),
                      nusselt_horizontal_plate_hot_down(ra))
    return nu * air.thermal_conductivity / length


def forced_convection_coefficient(surface_temperature, air_temperature, length, velocity,
                                  pressure=101325.0):
    """Forced convection coefficient of a flat wall in parallel air flow.

    h = Nu k / L with Nu from :func:`nusselt_flat_plate_forced`,
    Re = u L / nu, air properties at the film temperature.

    Parameters
    ----------
    surface_temperature, air_temperature : array_like
        [K].
    length : array_like
        Length of the wall along the flow [m].
    velocity : array_like
        Free-stream air velocity [m/s], >= 0.
    pressure : array_like, optional
        [Pa].

    Returns
    -------
    ndarray
        h [W/(m^2 K)].

    References
    ----------
    Incropera et al., 6th ed., eqs. 7.30, 7.38.
    """
    u = np.asarray(velocity, float)
    if np.any(u < 0.0):
        raise HeatloadError("air velocity must be >= 0 [m/s]", field="air_velocity")
    length = np.asarray(length, float)
    air = air_properties(0.5 * (np.asarray(surface_temperature, float)
                                + np.asarray(air_temperature, float)), pressure)
    re = u * length / air.kinematic_viscosity
    return nusselt_flat_plate_forced(re, air.prandtl) * air.thermal_conductivity / length


def _mixed(h_forced, h_natural):
    # Mixed convection, transverse/assisting flow: Nu^3 = Nu_F^3 + Nu_N^3
    # (Incropera et al., 6th ed., eq. 9.64, n = 3).
    return np.cbrt(h_forced ** 3 + h_natural ** 3)


@dataclass(frozen=True)
class ReservoirHeatTransfer:
    """Breakdown of the reservoir's conductance; arrays over oil temperature.

    Every conductance is [W/K]; areas [m^2]; coefficients [W/(m^2 K)].
    """

    conductance: np.ndarray            #: total UA, reservoir + further surfaces [W/K]
    walls_wetted: np.ndarray           #: UA of the oil-wetted wall band [W/K]
    walls_dry: np.ndarray              #: UA of the wall band above the oil, factor applied [W/K]
    top: np.ndarray                    #: UA of the lid, factor applied when not wetted [W/K]
    bottom: np.ndarray                 #: UA of the bottom (0 unless exposed) [W/K]
    surfaces: np.ndarray               #: UA of the further surfaces [W/K]
    wetted_wall_area: float            #: [m^2]
    wall_coefficient: np.ndarray       #: combined convection + radiation of the wetted walls [W/(m^2 K)]
    effective_area: float              #: reservoir area counted, factors applied [m^2]


def _surface_coefficient(ts, ta, length, orientation, emissivity, pressure, velocity=0.0,
                         flow_length=None):
    h = natural_convection_coefficient(ts, ta, length, orientation, pressure)
    if np.any(np.asarray(velocity) > 0.0):
        hf = forced_convection_coefficient(ts, ta, flow_length, velocity, pressure)
        h = _mixed(hf, h)
    return h + radiation_coefficient(ts, ta, emissivity)


def reservoir_heat_transfer(reservoir, oil_temperature, air_temperature, pressure=101325.0,
                            dry_surface_factor=DRY_SURFACE_FACTOR) -> ReservoirHeatTransfer:
    """Conductance of a reservoir and the circuit's further surfaces, part by part.

    UA = h_w A_w + f (h_w A_d + h_t A_t) + h_b A_b + sum(h_i A_i), with
    h = h_convection + h_radiation (see :func:`natural_convection_coefficient`,
    :func:`radiation_coefficient`) or the user's coefficient.

    Parameters
    ----------
    reservoir : heatload.model.Reservoir
        Tank geometry, oil level, emissivity, user coefficient, air velocity,
        bottom exposure and further surfaces.
    oil_temperature : array_like
        Bulk oil temperature [K].
    air_temperature : float or array_like
        Ambient air (and surroundings for radiation) [K].
    pressure : float, optional
        Absolute air pressure [Pa] (lower at altitude).
    dry_surface_factor : float, optional
        Effectiveness f (0..1) of the wall band above the oil and of the lid
        when the tank is not full (default :data:`DRY_SURFACE_FACTOR`).
        1 counts them as if wetted, 0 counts the oil-wetted area only.

    Returns
    -------
    ReservoirHeatTransfer

    Notes
    -----
    * Wall temperature = oil temperature: the steel is thin and the oil-side
      coefficient is much larger than the air side, so the air side governs
      (common practice).  Further surfaces (pipes, blocks, motors) are taken at
      oil temperature too.
    * Walls: four sides, wetted height = oil_level * height as the vertical
      length; lid: hot face up, bottom (only when ``bottom_exposed``): hot face
      down, both with L = area / perimeter.
    * Forced air (``air_velocity`` > 0) over walls, lid and bottom: flat plate
      along the tank length, combined with natural convection by
      Nu^3 = Nu_F^3 + Nu_N^3.  Further surfaces stay in still air.
    * A user ``heat_transfer_coefficient`` replaces convection + radiation on
      the same effective area.

    References
    ----------
    Incropera et al., Fundamentals of Heat and Mass Transfer, Ch. 7 and 9;
    Churchill and Chu (1975).
    """
    r = reservoir
    for name in ("length", "width", "height"):
        if not getattr(r, name) > 0.0:
            raise HeatloadError(f"reservoir {name} must be positive [m]", field=f"reservoir.{name}")
    if not 0.0 < r.oil_level <= 1.0:
        raise HeatloadError("oil level must be a wetted fraction within (0, 1]",
                            field="reservoir.oil_level")
    if not 0.0 <= dry_surface_factor <= 1.0:
        raise HeatloadError("dry surface factor must be within 0 .. 1", field="dry_surface_factor")
    if r.heat_transfer_coefficient is not None and not r.heat_transfer_coefficient > 0.0:
        raise HeatloadError("heat transfer coefficient must be positive [W/(m^2 K)]",
                            field="reservoir.heat_transfer_coefficient")
    ts = np.asarray(oil_temperature, float)
    ta = np.broadcast_to(np.asarray(air_temperature, float), ts.shape)
    perimeter = 2.0 * (r.length + r.width)
    wet_height = r.oil_level * r.height
    a_wet = perimeter * wet_height
    a_dry = perimeter * (r.height - wet_height)
    a_plate = r.length * r.width
    plate_l = a_plate / (2.0 * (r.length + r.width))
    top_factor = 1.0 if r.oil_level >= 1.0 else dry_surface_factor
    a_bottom = a_plate if r.bottom_exposed else 0.0

    if r.heat_transfer_coefficient is not None:
        h = np.full(ts.shape, float(r.heat_transfer_coefficient))
        h_wall = h_top = h_bottom = h
    else:
        kw = dict(emissivity=r.emissivity, pressure=pressure, velocity=r.air_velocity,
                  flow_length=r.length)
        h_wall = _surface_coefficient(ts, ta, wet_height, "vertical", **kw)
        h_top = _surface_coefficient(ts, ta, plate_l, "horizontal-up", **kw)
        h_bottom = (_surface_coefficient(ts, ta, plate_l, "horizontal-down", **kw)
                    if r.bottom_exposed else np.zeros(ts.shape))
    ua_wet = h_wall * a_wet
    ua_dry = dry_surface_factor * h_wall * a_dry
    ua_top = top_factor * h_top * a_plate
    ua_bottom = h_bottom * a_bottom
    ua_surf = np.zeros(ts.shape)
    for i, s in enumerate(r.surfaces):
        if not s.area >= 0.0:
            raise HeatloadError("surface area must be >= 0 [m^2]", field=f"reservoir.surfaces[{i}].area")
        if s.heat_transfer_coefficient is not None:
            ua_surf = ua_surf + s.heat_transfer_coefficient * s.area
        else:
            try:
                hs = _surface_coefficient(ts, ta, s.characteristic_length, s.orientation,
                                          s.emissivity, pressure)
            except HeatloadError as exc:
                raise exc.located(field_prefix=f"reservoir.surfaces[{i}]") from None
            ua_surf = ua_surf + hs * s.area
    total = ua_wet + ua_dry + ua_top + ua_bottom + ua_surf
    return ReservoirHeatTransfer(
        conductance=total, walls_wetted=ua_wet, walls_dry=ua_dry, top=ua_top,
        bottom=ua_bottom, surfaces=ua_surf, wetted_wall_area=a_wet, wall_coefficient=h_wall,
        effective_area=a_wet + dry_surface_factor * a_dry + top_factor * a_plate + a_bottom)


def barometric_pressure(altitude):
    """Absolute air pressure at a site altitude, standard atmosphere.

    .. math::  p = 101325 \\,(1 - 2.25577 \\times 10^{-5} z)^{5.25588}

    Parameters
    ----------
    altitude : array_like
        Height above sea level z [m] (troposphere, below 11 km).

    Returns
    -------
    ndarray or float
        [Pa].

    References
    ----------
    ISO 2533:1975 (standard atmosphere); the same form in ASHRAE Handbook
    Fundamentals, Ch. 1, eq. 3.

    Examples
    --------
    >>> round(barometric_pressure(1500.0))
    84556
    """
    return 101325.0 * (1.0 - 2.25577e-5 * np.asarray(altitude, float)) ** 5.25588


#: Rayleigh ranges the natural-convection correlations were fitted over [-]
#: (Incropera et al., 7th ed., eqs. 9.26-9.27, 9.30-9.32, 9.34): beyond them the
#: models extrapolate.
RAYLEIGH_RANGES = {"vertical": (1e-1, 1e12), "horizontal-up": (1e4, 1e11),
                   "horizontal-down": (1e4, 1e9), "cylinder": (1e-5, 1e12)}


def surface_rayleigh_numbers(reservoir, oil_temperature, air_temperature,
                             pressure=101325.0) -> list:
    """Rayleigh number of every naturally cooled surface, with its correlation's
    published range, vectorized over the temperatures.

    Ra = g beta |T_s - T_a| L^3 / (nu alpha), air at the film temperature, with the
    lengths and orientations of :func:`reservoir_heat_transfer` (a face colder
    than the air takes the opposite plate correlation).

    Parameters
    ----------
    reservoir : heatload.model.Reservoir
    oil_temperature, air_temperature : array_like
        [K], broadcast together.
    pressure : float, optional
        Absolute air pressure [Pa].

    Returns
    -------
    list of (str, ndarray, ndarray, ndarray)
        ``(surface, Ra, low, high)`` per surface whose convection is computed (a
        user coefficient replaces it and drops the surface); *low* and *high* are
        the range of :data:`RAYLEIGH_RANGES` for the orientation each element
        takes.  Where oil and air are at one temperature Ra is 0 and the range
        is (0, inf): no natural convection to speak of, nothing to flag.

    References
    ----------
    Incropera et al., Fundamentals of Heat and Mass Transfer, 7th ed., Sec. 9.6.
    """
    ts, ta = np.broadcast_arrays(np.asarray(oil_temperature, float),
                                 np.asarray(air_temperature, float))
    r = reservoir
    parts = []
    if r.heat_transfer_coefficient is None:
        plate = r.length * r.width / (2.0 * (r.length + r.width))
        parts.append(("tank walls", "vertical", r.oil_level * r.height))
        parts.append(("tank lid", "horizontal-up", plate))
        if r.bottom_exposed:
            parts.append(("tank bottom", "horizontal-down", plate))
    for s in r.surfaces:
        if s.heat_transfer_coefficient is None:
            parts.append((s.name, s.orientation, s.characteristic_length))
    swap = {"horizontal-up": "horizontal-down", "horizontal-down": "horizontal-up"}
    air = air_properties(0.5 * (ts + ta), pressure)
    cold, same = ts < ta, ts == ta
    out = []
    for name, orientation, length in parts:
        ra = np.asarray(rayleigh(grashof(air.expansion, np.abs(ts - ta), length,
                                         air.kinematic_viscosity), air.prandtl), float)
        low, high = RAYLEIGH_RANGES[orientation]
        # a cold face: the stable and unstable plate cases swap
        low_c, high_c = RAYLEIGH_RANGES[swap.get(orientation, orientation)]
        low = np.where(same, 0.0, np.where(cold, low_c, low))
        high = np.where(same, np.inf, np.where(cold, high_c, high))
        out.append((name, np.where(same, 0.0, ra), low, high))
    return out


def reservoir_conductance(reservoir, oil_temperature, air_temperature, pressure=101325.0,
                          dry_surface_factor=DRY_SURFACE_FACTOR):
    """Overall conductance UA [W/K] from the oil to the ambient air.

    UA(T) = sum over surfaces of (h_conv + h_rad) A; see
    :func:`reservoir_heat_transfer` for the parts and the assumptions.

    Parameters
    ----------
    reservoir : heatload.model.Reservoir
    oil_temperature : array_like
        [K].
    air_temperature : array_like
        [K].
    pressure : float, optional
        Absolute air pressure [Pa].
    dry_surface_factor : float, optional
        Effectiveness of the non-wetted wall band and lid (0..1).

    Returns
    -------
    ndarray
        UA [W/K], shaped like *oil_temperature*.

    Notes
    -----
    Heat dissipated = UA (T_oil - T_air).  UA rises with T_oil (natural
    convection and radiation both grow with the temperature difference).

    References
    ----------
    Incropera et al., Fundamentals of Heat and Mass Transfer, Ch. 9.
    """
    return reservoir_heat_transfer(reservoir, oil_temperature, air_temperature, pressure,
                                   dry_surface_factor).conductance
