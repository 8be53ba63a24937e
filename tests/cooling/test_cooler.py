"""Checks of heatload.cooling.cooler against ht (effectiveness-NTU), the Incropera
closed forms, IAPWS-95 water values and stream energy balances."""

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

ht = pytest.importorskip("ht")

from heatload.cooling import cooler as K
from heatload.errors import HeatloadError


def test_counterflow_check_value():
    # NTU 5, Cr 0.7 -> 0.92067 (Incropera closed form, eq. 11.29a; project check value)
    assert K.effectiveness_counterflow(5.0, 0.7) == pytest.approx(0.92067, abs=5e-6)


@pytest.mark.parametrize("ntu", [0.1, 1.0, 3.0, 8.0])
@pytest.mark.parametrize("cr", [0.0, 0.25, 0.7, 1.0])
def test_counterflow_matches_ht(ntu, cr):
    expected = ht.effectiveness_from_NTU(ntu, cr, subtype="counterflow")
    assert K.effectiveness_counterflow(ntu, cr) == pytest.approx(expected, rel=1e-12)
    assert K.ntu_counterflow(expected, cr) == pytest.approx(
        ht.NTU_from_effectiveness(expected, cr, subtype="counterflow"), rel=1e-9)


@pytest.mark.parametrize("ntu", [0.2, 1.0, 2.5, 6.0])
@pytest.mark.parametrize("cr", [0.0, 0.4, 0.9])
@pytest.mark.parametrize("shells", [1, 2, 3])
def test_shell_and_tube_matches_ht(ntu, cr, shells):
    expected = ht.effectiveness_from_NTU(ntu, cr, subtype="S&T", n_shell_tube=shells)
    assert K.effectiveness_shell_and_tube(ntu, cr, shells) == pytest.approx(expected, rel=1e-10)


@pytest.mark.parametrize("shells", [1, 2, 4])
def test_shell_and_tube_cr_one(shells):
    # Cr = 1: eps = n eps1 / (1 + (n - 1) eps1) (Incropera eq. 11.31a, limit Cr -> 1);
    # compare with ht at Cr slightly below 1 (its formula divides by zero at exactly 1)
    near = ht.effectiveness_from_NTU(2.0, 1.0 - 1e-7, subtype="S&T", n_shell_tube=shells)
    assert K.effectiveness_shell_and_tube(2.0, 1.0, shells) == pytest.approx(near, rel=1e-6)


def test_shell_and_tube_by_hand():
    # Incropera eq. 11.30a by hand, NTU 1, Cr 0.5: s = sqrt(1.25) = 1.11803, e = exp(-1.11803)
    s = np.sqrt(1.25)
    e = np.exp(-s)
    hand = 2.0 / (1.0 + 0.5 + s * (1 + e) / (1 - e))
    assert K.effectiveness_shell_and_tube(1.0, 0.5) == pytest.approx(hand, rel=1e-14)


@settings(max_examples=60, deadline=None)
@given(ntu=st.floats(0.01, 8.0), cr=st.floats(0.0, 1.0), shells=st.integers(1, 4))
def test_ntu_round_trips(ntu, cr, shells):
    e = K.effectiveness_counterflow(ntu, cr)
    assert K.ntu_counterflow(e, cr) == pytest.approx(ntu, rel=1e-6)
    e = K.effectiveness_shell_and_tube(ntu, cr, shells)
    if e < K.max_effectiveness_shell_and_tube(cr, shells) - 1e-9:
        assert K.ntu_shell_and_tube(e, cr, shells) == pytest.approx(ntu, rel=1e-5)


def test_unreachable_effectiveness_raises():
    with pytest.raises(HeatloadError) as err:
        K.ntu_counterflow(1.0, 0.5)
    assert err.value.field == "effectiveness"
    # one shell, Cr = 1: eps_max = 2 / (2 + sqrt 2) = 0.5858 (Incropera eq. 11.30a, NTU -> inf)
    assert K.max_effectiveness_shell_and_tube(1.0) == pytest.approx(2 / (2 + np.sqrt(2)))
    with pytest.raises(HeatloadError):
        K.ntu_shell_and_tube(0.6, 1.0)
    with pytest.raises(HeatloadError):
        K.effectiveness_counterflow(1.0, 1.5)


def test_water_properties_iapws():
    # IAPWS-95 liquid water at 25 degC, 101.325 kPa: rho 997.05 kg/m^3, cp 4.1813 kJ/(kg K)
    p = K.coolant_properties(298.15)
    assert p.density == pytest.approx(997.05, abs=0.01)
    assert p.specific_heat == pytest.approx(4181.3, abs=0.1)
    # viscosity 0.890 mPa s at 25 degC (IAPWS 2008 viscosity formulation)
    assert p.dynamic_viscosity == pytest.approx(0.890e-3, rel=2e-3)


def test_water_table_matches_coolprop_within_1e_6():
    """The shipped water table against CoolProp's IAPWS-95 'Water' at 1 atm,
    off its nodes, over the whole liquid range the sizing accepts."""
    from CoolProp.CoolProp import PropsSI
    t = np.concatenate([np.random.default_rng(6).uniform(273.16, 372.5, 2000), [273.16, 372.5]])
    p = K.coolant_properties(t)
    for key, got in (("D", p.density), ("C", p.specific_heat), ("V", p.dynamic_viscosity),
                     ("L", p.thermal_conductivity), ("PRANDTL", p.prandtl)):
        ref = PropsSI(key, "T", t, "P", 101325.0, "Water")
        assert np.max(np.abs(got / ref - 1.0)) <= 1e-6, key
    assert p.density.shape == t.shape
    assert K.coolant_properties(np.full((2, 3), 300.0)).density.shape == (2, 3)


def test_glycol_water_properties():
    # 30 % ethylene glycol by mass: denser than water, lower cp and more viscous
    # (ASHRAE Handbook Fundamentals ch. 31 tables, from memory: rho ~1.04 g/cm^3, cp ~3.7 kJ/(kg K))
    g = K.coolant_properties(np.array([293.15, 313.15]), glycol_fraction=0.3)
    assert g.density.shape == (2,)
    assert 1030 < g.density[0] < 1050
    assert 3600 < g.specific_heat[0] < 3800
    water = K.coolant_properties(293.15)
    assert g.dynamic_viscosity[0] > 1.5 * water.dynamic_viscosity
    with pytest.raises(HeatloadError):
        K.coolant_properties(300.0, glycol_fraction=0.9)


def test_air_cooler_sizing_balances():
    duty, t_oil, t_air = 8000.0, 333.15, 308.15
    q_oil, rho, cp = 80 / 60000, 860.0, 1950.0
    s = K.size_air_cooler(duty, t_oil, t_air, q_oil, rho, cp, air_temperature_rise=12.0)
    # specific cooling power = duty / ETD (common practice): 8000 / 25 = 320 W/K
    assert s.specific_cooling_power == pytest.approx(320.0)
    assert s.etd == pytest.approx(25.0)
    # stream balances: oil drop = P / (rho Q cp), air: P = m cp dT with CoolProp cp (~1007)
    assert s.oil_temperature_drop == pytest.approx(duty / (rho * q_oil * cp), rel=1e-12)
    assert s.air_mass_flow * 1007.0 * 12.0 == pytest.approx(duty, rel=2e-3)
    assert s.air_outlet_temperature == pytest.approx(t_air + 12.0)
    # volume flow at inlet density ~1.145 kg/m^3 at 35 degC (ideal gas, ISO 2533 air)
    assert s.air_volume_flow == pytest.approx(s.air_mass_flow / 1.1455, rel=2e-3)
    with pytest.raises(HeatloadError):
        K.size_air_cooler(duty, 300.0, 310.0, q_oil, rho, cp)


def test_water_cooler_sizing_consistent_with_ht():
    duty, t_oil, t_w = 12000.0, 328.15, 298.15
    q_oil, rho, cp = 60 / 60000, 860.0, 1950.0
    s = K.size_water_cooler(duty, t_oil, t_w, q_oil, rho, cp, water_temperature_rise=5.0)
    # energy balance of each stream
    assert s.water_outlet_temperature - t_w == pytest.approx(5.0, rel=1e-6)
    assert (t_oil - s.oil_outlet_temperature) * rho * q_oil * cp == pytest.approx(duty, rel=1e-12)
    # eps = P / (Cmin ETD); NTU from ht's inverse; UA = NTU Cmin
    c_min = min(s.oil_capacity_rate, s.water_capacity_rate)
    assert s.effectiveness == pytest.approx(duty / (c_min * 30.0), rel=1e-12)
    ntu_ref = ht.NTU_from_effectiveness(float(s.effectiveness), float(s.capacity_ratio), subtype="S&T")
    assert s.ntu == pytest.approx(ntu_ref, rel=1e-8)
    assert s.required_conductance == pytest.approx(ntu_ref * c_min, rel=1e-8)
    # a counterflow unit needs less UA for the same duty (Incropera Fig. 11.14/11.15)
    cf = K.size_water_cooler(duty, t_oil, t_w, q_oil, rho, cp, arrangement="counterflow")
    assert cf.required_conductance < s.required_conductance


def test_water_cooler_duty_beyond_cmin_etd():
    # Cmin ETD: oil 860 * 1e-4 * 1950 = 167.7 W/K times 30 K = 5031 W; 6000 W cannot be done
    with pytest.raises(HeatloadError) as err:
        K.size_water_cooler(6000.0, 328.15, 298.15, 1e-4, 860.0, 1950.0, water_flow=1e-3)
    assert err.value.field == "duty"
    with pytest.raises(HeatloadError) as err:
        K.size_water_cooler(1000.0, 328.15, 298.15, 1e-3, 860.0, 1950.0, arrangement="plate")
    assert err.value.field == "arrangement"


def test_rate_air_cooler_proportional_to_etd():
    # duty proportional to ETD at the same flows (common practice)
    assert K.rate_air_cooler(10000.0, 40.0, 25.0) == pytest.approx(6250.0)


def test_rate_water_cooler_round_trip_and_trend():
    kw = dict(oil_density=860.0, oil_specific_heat=1950.0)
    q_oil, q_w = 60 / 60000, 30 / 60000
    # at the rated point itself the rating gives back the rated duty
    same = K.rate_water_cooler(10000.0, 333.15, 298.15, q_oil, q_w, 333.15, 298.15, **kw)
    assert same.duty == pytest.approx(10000.0, rel=1e-3)  # water cp at inlet vs mean: 0.1 %
    # a smaller ETD at the same UA and flows gives proportionally less duty (linear exchanger)
    half = K.rate_water_cooler(10000.0, 333.15, 298.15, q_oil, q_w, 315.65, 298.15, **kw)
    assert half.duty == pytest.approx(0.5 * same.duty, rel=2e-3)
    # held UA, design eps from ht at the design NTU and Cr
    eps_ref = ht.effectiveness_from_NTU(float(half.ntu), float(half.capacity_ratio), subtype="S&T")
    assert half.effectiveness == pytest.approx(eps_ref, rel=1e-10)


def test_required_cooler_duty_balance():
    # max(0, Q - UA (Tmax - Tamb)) (1 + margin): 5000 - 40 * 20 = 4200 W, +20 % = 5040 W
    assert K.required_cooler_duty(5000.0, 40.0, 333.15, 313.15, 0.2) == pytest.approx(5040.0)
    assert K.required_cooler_duty(500.0, 40.0, 333.15, 313.15, 0.2) == 0.0
    needed = K.cooler_needed(np.array([500.0, 5000.0]), 40.0, 333.15, 313.15)
    assert needed.tolist() == [False, True]


def test_spec_sheet_air_and_water():
    air = K.cooler_spec_sheet("air", 4000.0, 333.15, 313.15, 60 / 60000, 860.0, 1950.0, 30e-6,
                              margin=0.25)
    assert air.duty == pytest.approx(5000.0)
    assert air.specific_cooling_power == pytest.approx(5000.0 / 20.0)
    assert air.required_conductance is None
    assert "estimate" in air.caution and "codes" in air.caution
    assert all(isinstance(getattr(air, f), float) for f in
               ("duty", "etd", "oil_flow", "oil_viscosity", "coolant_flow"))
    water = K.cooler_spec_sheet("water", 4000.0, 333.15, 298.15, 60 / 60000, 860.0, 1950.0,
                                30e-6, glycol_fraction=0.3)
    assert water.required_conductance > 0 and water.specific_cooling_power is None
    assert water.coolant_outlet_temperature - 298.15 == pytest.approx(5.0, rel=1e-6)
    with pytest.raises(HeatloadError) as err:
        K.cooler_spec_sheet("oil", 4000.0, 333.15, 298.15, 1e-3, 860.0, 1950.0, 30e-6)
    assert err.value.field == "coolant"


def test_vectorized_effectiveness():
    ntu = np.array([0.5, 1.0, 2.0])
    e = K.effectiveness_counterflow(ntu, np.array([0.3, 1.0, 0.8]))
    assert e.shape == (3,)
    assert np.all((e > 0) & (e < 1))
