"""Checks of heatload.heat.heat_transfer against the ht library, hand-evaluated
handbook formulas and CoolProp (each source named beside the value)."""

import math

import numpy as np
import pytest

ht = pytest.importorskip("ht")

from heatload.heat import heat_transfer as H
from heatload.errors import HeatloadError
from heatload.model import Reservoir, Surface


# --- correlations against the ht library ------------------------------------

@pytest.mark.parametrize("pr, gr", [(0.71, 1e4), (0.71, 3e8), (0.7, 5e10), (5.0, 1e9)])
def test_vertical_plate_matches_ht(pr, gr):
    # ht.Nu_vertical_plate_Churchill takes Gr, not Ra (ht documentation)
    expected = ht.Nu_vertical_plate_Churchill(pr, gr)
    got = H.nusselt_vertical_plate_churchill_chu(H.rayleigh(gr, pr), pr)
    assert got == pytest.approx(expected, rel=1e-12)


def test_vertical_plate_by_hand():
    # Churchill & Chu (1975), Incropera eq. 9.26, evaluated by hand for Ra = 1e9, Pr = 0.71:
    # psi = (1 + (0.492/0.71)^(9/16))^(8/27); Nu = (0.825 + 0.387 * 1e9^(1/6) / psi)^2
    psi = (1 + (0.492 / 0.71) ** (9 / 16)) ** (8 / 27)
    expected = (0.825 + 0.387 * 1e9 ** (1 / 6) / psi) ** 2
    assert H.nusselt_vertical_plate_churchill_chu(1e9, 0.71) == pytest.approx(expected, rel=1e-14)
    # worked out step by step on paper: psi = 1.1929, 0.387 * 31.623 / psi = 10.259,
    # (0.825 + 10.259)^2 = 122.86
    assert H.nusselt_vertical_plate_churchill_chu(1e9, 0.71) == pytest.approx(122.86, abs=0.01)


@pytest.mark.parametrize("pr, gr", [(0.71, 1e6), (0.71, 1e8), (0.71, 1e10)])
def test_horizontal_plate_hot_up_matches_ht_mcadams(pr, gr):
    # ht's McAdams method is 0.54 Ra^(1/4) up to 1e7, 0.15 Ra^(1/3) above (same as Incropera)
    expected = ht.Nu_free_horizontal_plate(pr, gr, buoyancy=True, Method="McAdams")
    assert H.nusselt_horizontal_plate_hot_up(pr * gr) == pytest.approx(expected, rel=1e-12)


def test_horizontal_plate_hot_down_by_hand_and_vdi():
    # Incropera 7th ed. eq. 9.32: 0.52 Ra^(1/5); by hand at Ra = 1e7
    ra = 1e7
    assert H.nusselt_horizontal_plate_hot_down(ra) == pytest.approx(0.52 * 1e7 ** 0.2, rel=1e-14)
    # ht's VDI correlation, 0.6 (Ra f1(Pr))^(1/5), is a different fit; within 10 % for air
    vdi = ht.Nu_free_horizontal_plate(0.71, ra / 0.71, buoyancy=False, Method="VDI")
    assert H.nusselt_horizontal_plate_hot_down(ra) == pytest.approx(vdi, rel=0.10)


@pytest.mark.parametrize("pr, gr", [(0.71, 1e3), (0.71, 1e6), (0.7, 1e9)])
def test_horizontal_cylinder_matches_ht(pr, gr):
    expected = ht.Nu_horizontal_cylinder_Churchill_Chu(pr, gr)
    got = H.nusselt_horizontal_cylinder_churchill_chu(pr * gr, pr)
    assert got == pytest.approx(expected, rel=1e-12)


def test_flat_plate_forced_laminar_and_mixed():
    # laminar: ht's Baehr laminar form is 0.664 Re^0.5 Pr^(1/3) for 0.6 <= Pr < 10
    re, pr = 1e5, 0.71
    expected = ht.conv_external.Nu_horizontal_plate_laminar_Baehr(re, pr)
    assert H.nusselt_flat_plate_forced(re, pr) == pytest.approx(expected, rel=1e-12)
    # mixed, Incropera eq. 7.38 by hand: (0.037 Re^0.8 - 871) Pr^(1/3)
    re = 2e6
    hand = (0.037 * re ** 0.8 - 871) * pr ** (1 / 3)
    assert H.nusselt_flat_plate_forced(re, pr) == pytest.approx(hand, rel=1e-14)
    # the two branches meet at Re = 5e5 (within 0.2 %: 871 is rounded in the handbook)
    lam = 0.664 * 5e5 ** 0.5
    mix = 0.037 * 5e5 ** 0.8 - 871
    assert lam == pytest.approx(mix, rel=2e-3)


def test_correlations_vectorized():
    ra = np.array([1e4, 1e6, 1e8, 1e10])
    nu = H.nusselt_vertical_plate_churchill_chu(ra, 0.71)
    assert nu.shape == (4,)
    assert np.all(np.diff(nu) > 0)
    expected = [ht.Nu_vertical_plate_Churchill(0.71, r / 0.71) for r in ra]
    np.testing.assert_allclose(nu, expected, rtol=1e-12)


# --- radiation and properties ------------------------------------------------

def test_radiation_coefficient_equals_exact_exchange():
    # eps sigma (Ts^4 - Ta^4) = h_r (Ts - Ta) (Incropera eq. 1.7 and 1.9), sigma CODATA 2018
    ts, ta, eps = 328.15, 298.15, 0.9
    sigma = 5.670374419e-8
    exact = eps * sigma * (ts ** 4 - ta ** 4) / (ts - ta)
    assert H.radiation_coefficient(ts, ta, eps) == pytest.approx(exact, rel=1e-12)
    with pytest.raises(HeatloadError):
        H.radiation_coefficient(ts, ta, 1.2)


def test_air_properties_against_coolprop_direct():
    from CoolProp.CoolProp import PropsSI
    t = 313.17  # between the table's nodes
    air = H.air_properties(t)
    assert air.density == pytest.approx(PropsSI("D", "T", t, "P", 101325, "Air"), rel=1e-6)
    assert air.thermal_conductivity == pytest.approx(PropsSI("L", "T", t, "P", 101325, "Air"), rel=1e-6)
    assert air.prandtl == pytest.approx(PropsSI("PRANDTL", "T", t, "P", 101325, "Air"), rel=1e-6)
    assert air.expansion == pytest.approx(1 / t)
    # ideal-gas check: rho = p M / (R T), M = 28.965 g/mol (dry air, ISO 2533), within 0.1 %
    assert air.density == pytest.approx(101325 * 0.028965 / (8.314462618 * t), rel=1e-3)


@pytest.mark.parametrize("t_range, p_range", [
    # what the model uses: film temperatures of tanks and coolers (ambient -60 .. +70 degC,
    # oil up to 250 degC), barometric pressures of altitude -500 m .. 9000 m
    ((190.0, 450.0), (30.0e3, 108.0e3)),
    # the whole table
    (H.AIR_TEMPERATURE_RANGE, H.AIR_PRESSURE_RANGE),
])
def test_air_table_matches_coolprop_within_1e_6(t_range, p_range):
    """The shipped table against CoolProp's 'Air' (Lemmon et al. 2000) off its nodes."""
    from CoolProp.CoolProp import PropsSI
    rng = np.random.default_rng(13)
    t = np.concatenate([rng.uniform(*t_range, 3000), t_range])
    p = np.concatenate([rng.uniform(*p_range, 3000), p_range])
    air = H.air_properties(t, p)
    for key, got in (("D", air.density), ("C", air.specific_heat), ("V", air.dynamic_viscosity),
                     ("L", air.thermal_conductivity), ("PRANDTL", air.prandtl)):
        ref = PropsSI(key, "T", t, "P", p, "Air")
        assert np.max(np.abs(got / ref - 1.0)) <= 1e-6, key


@pytest.mark.parametrize("pressure", [101325.0, 30.8e3, 107.5e3])
def test_air_table_at_one_altitude_matches_coolprop_within_1e_6(pressure):
    """One pressure for all temperatures (the model's case, its own fast path)."""
    from CoolProp.CoolProp import PropsSI
    t = np.concatenate([np.random.default_rng(15).uniform(150.0, 1000.0, 3000), [150.0, 1000.0]])
    air = H.air_properties(t, pressure)
    for key, got in (("D", air.density), ("C", air.specific_heat), ("V", air.dynamic_viscosity),
                     ("L", air.thermal_conductivity)):
        ref = PropsSI(key, "T", t, "P", pressure, "Air")
        assert np.max(np.abs(got / ref - 1.0)) <= 1e-6, key


def test_air_properties_broadcast_temperature_and_pressure():
    air = H.air_properties(np.array([[300.0, 320.0]]), np.array([[101325.0], [70.0e3]]))
    assert air.density.shape == (2, 2)
    # ideal gas at one temperature: density proportional to pressure (within 0.1 %)
    assert air.density[1, 0] / air.density[0, 0] == pytest.approx(70.0e3 / 101325.0, rel=1e-3)


def test_air_properties_rejects_bad_input():
    with pytest.raises(HeatloadError) as err:
        H.air_properties(-5.0)
    assert err.value.field == "temperature"
    with pytest.raises(HeatloadError) as err:
        H.air_properties(300.0, 5.0e3)  # beyond the table (an altitude above 9000 m)
    assert err.value.field == "pressure"


# --- natural convection coefficient -------------------------------------------

def test_natural_convection_vertical_against_ht_with_coolprop_air():
    # h = Nu k / L with air at the film temperature; ht gives Nu from Gr, Pr
    from CoolProp.CoolProp import PropsSI
    ts, ta, length = 333.15, 293.15, 0.5
    tf = 0.5 * (ts + ta)
    rho = PropsSI("D", "T", tf, "P", 101325, "Air")
    mu = PropsSI("V", "T", tf, "P", 101325, "Air")
    k = PropsSI("L", "T", tf, "P", 101325, "Air")
    pr = PropsSI("PRANDTL", "T", tf, "P", 101325, "Air")
    gr = 9.80665 * (1 / tf) * (ts - ta) * length ** 3 / (mu / rho) ** 2
    expected = ht.Nu_vertical_plate_Churchill(pr, gr) * k / length
    got = H.natural_convection_coefficient(ts, ta, length, "vertical")
    assert got == pytest.approx(expected, rel=1e-4)
    # still air on a warm wall: a few W/(m^2 K) (common practice, 3..6)
    assert 3.0 < got < 6.0


def test_natural_convection_orientations_and_cold_face():
    ts, ta = 333.15, 293.15
    up = H.natural_convection_coefficient(ts, ta, 0.2, "horizontal-up")
    down = H.natural_convection_coefficient(ts, ta, 0.2, "horizontal-down")
    assert up > down  # hot face up sheds more than hot face down (Incropera Fig. 9.6)
    # a cold face looking up behaves like a hot face looking down (Incropera Sec. 9.6.2)
    cold_up = H.natural_convection_coefficient(ta, ts, 0.2, "horizontal-up")
    assert cold_up == pytest.approx(down, rel=1e-9)
    cyl = H.natural_convection_coefficient(ts, ta, 0.03, "cylinder")
    assert cyl > 0
    with pytest.raises(HeatloadError) as err:
        H.natural_convection_coefficient(ts, ta, 0.2, "sideways")
    assert err.value.field == "orientation"


# --- reservoir -------------------------------------------------------------------

def test_typical_reservoir_combined_coefficient_in_trade_range():
    # 1 m x 0.6 m x 0.5 m painted steel tank, 55 degC oil, 25 degC air:
    # convection + radiation roughly 8-15 W/(m^2 K) per wetted area (common practice)
    tank = Reservoir(length=1.0, width=0.6, height=0.5, oil_level=0.8, emissivity=0.9)
    parts = H.reservoir_heat_transfer(tank, 328.15, 298.15)
    h_wetted = parts.walls_wetted / parts.wetted_wall_area
    assert 8.0 <= h_wetted <= 15.0
    # whole tank per effective area in the same range
    assert 8.0 <= parts.conductance / parts.effective_area <= 15.0


def test_reservoir_user_coefficient_and_surfaces():
    tank = Reservoir(length=1.0, width=0.6, height=0.5, oil_level=1.0,
                     heat_transfer_coefficient=10.0, bottom_exposed=True,
                     surfaces=(Surface("pipes", area=0.5, heat_transfer_coefficient=12.0),))
    # full tank, every face counted: 2 (1 + 0.6) 0.5 + 2 * 0.6 = 2.8 m^2 at 10, + 0.5 m^2 at 12
    ua = H.reservoir_conductance(tank, 330.0, 300.0)
    assert ua == pytest.approx(2.8 * 10.0 + 0.5 * 12.0, rel=1e-12)


def test_reservoir_dry_factor_bounds():
    tank = Reservoir(heat_transfer_coefficient=10.0, oil_level=0.8)
    wet_only = H.reservoir_conductance(tank, 330.0, 300.0, dry_surface_factor=0.0)
    assert wet_only == pytest.approx(10.0 * 2 * (1.0 + 0.6) * 0.4, rel=1e-12)
    full = H.reservoir_conductance(tank, 330.0, 300.0, dry_surface_factor=1.0)
    assert full == pytest.approx(10.0 * (2 * 1.6 * 0.5 + 0.6), rel=1e-12)


def test_reservoir_vectorized_and_monotone():
    t = np.linspace(300.0, 360.0, 7)
    ua = H.reservoir_conductance(Reservoir(), t, 298.15)
    assert ua.shape == (7,)
    assert np.all(np.diff(ua) > 0)  # convection and radiation grow with temperature


def test_forced_air_raises_conductance():
    still = H.reservoir_conductance(Reservoir(), 328.15, 298.15)
    blown = H.reservoir_conductance(Reservoir(air_velocity=2.0), 328.15, 298.15)
    assert blown > still
    # 2 m/s along 1 m: Re ~ 1.2e5 laminar, h_f = 0.664 Re^0.5 Pr^(1/3) k / L ~ 7 W/(m^2 K)
    # (Incropera eq. 7.30 by hand, rough), so the forced part adds a few W/K per m^2
    h_f = H.forced_convection_coefficient(328.15, 298.15, 1.0, 2.0)
    assert 5.0 < h_f < 10.0


def test_reservoir_errors_name_the_field():
    with pytest.raises(HeatloadError) as err:
        H.reservoir_conductance(Reservoir(oil_level=1.5), 330.0, 300.0)
    assert err.value.field == "reservoir.oil_level"
    bad = Reservoir(surfaces=(Surface("block", area=0.2, orientation="diagonal"),))
    with pytest.raises(HeatloadError) as err:
        H.reservoir_conductance(bad, 330.0, 300.0)
    assert err.value.field == "reservoir.surfaces[0].orientation"


def test_import_stays_light():
    import subprocess
    import sys
    code = ("import sys, heatload.heat.heat_transfer, heatload.heat.thermal, heatload.cooling.cooler; "
            "print('CoolProp' in sys.modules or 'scipy' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_barometric_pressure_of_the_standard_atmosphere():
    # ISO 2533 standard atmosphere: 101.325 kPa at sea level, 89.876 kPa at 1000 m,
    # 79.501 kPa at 2000 m (tabulated values)
    from heatload.heat.heat_transfer import barometric_pressure
    assert barometric_pressure(0.0) == pytest.approx(101325.0, rel=1e-12)
    assert barometric_pressure(1000.0) == pytest.approx(89876.0, rel=2e-4)
    assert barometric_pressure(2000.0) == pytest.approx(79501.0, rel=2e-4)


def test_a_big_tank_bottom_beyond_its_correlation_is_named():
    """The hot-face-down plate correlation is published for 1e4 <= Ra <= 1e9
    (Incropera et al., 7th ed., eq. 9.32).  Ra = g beta dT L^3 / (nu alpha), by hand
    with the air's properties at the film temperature; a 6 m x 5 m tank bottom
    (L = A/P = 1.36 m) 40 K above the air is far beyond 1e9 and must be named."""
    import dataclasses

    from heatload import io
    from heatload.heat.heat_transfer import air_properties, surface_rayleigh_numbers

    def out_of_range(res, ts, ta):
        return {name: (float(ra), float(lo), float(hi))
                for name, ra, lo, hi in surface_rayleigh_numbers(res, ts, ta)
                if not lo <= ra <= hi}
    r = io.load_scenario(io.default_scenario_path()).reservoir
    big = dataclasses.replace(r, length=6.0, width=5.0, bottom_exposed=True, surfaces=())
    ts, ta = 338.15, 298.15
    air = air_properties(0.5 * (ts + ta))
    L = 30.0 / 22.0
    ra_hand = 9.80665 * (1 / 318.15) * 40.0 * L**3 / (air.kinematic_viscosity
                                                       * air.kinematic_viscosity / air.prandtl)
    found = out_of_range(big, ts, ta)
    assert set(found) == {"tank bottom"}
    ra, lo, hi = found["tank bottom"]
    assert (lo, hi) == (1e4, 1e9)
    assert ra == pytest.approx(ra_hand, rel=1e-3)     # beta = 1/T_film (ideal gas)
    # the default tank is inside every range
    assert out_of_range(r, ts, ta) == {}
    # vectorized: the same numbers over an array of oil temperatures, row by row
    rows = surface_rayleigh_numbers(big, np.array([ts, 318.15, ta]), ta)
    bottom = [x for x in rows if x[0] == "tank bottom"][0]
    assert bottom[1][0] == pytest.approx(ra, rel=1e-12) and bottom[1][2] == 0.0
    assert bottom[3][2] == np.inf                    # oil at the air's temperature: no flag
