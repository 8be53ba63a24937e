"""Tests of heatload.components.valves against handbook formulas and trade relations."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from heatload import HeatloadError
from heatload.components import valves as v

RHO = 870.0
NU = 46e-6


def test_turbulent_cd_limit_is_merritt():
    # Cd -> pi/(pi+2) = 0.611 for a sharp-edged orifice at high Re (Merritt 1967)
    assert v.CD_TURBULENT == pytest.approx(math.pi / (math.pi + 2))
    assert v.discharge_coefficient(1e9) == pytest.approx(0.611, abs=5e-4)


def test_laminar_cd_is_delta_sqrt_re():
    # Cd = delta sqrt(Re), delta = 0.2, at low Re (Merritt 1967, delta from memory)
    re = np.array([0.001, 0.01, 0.1])
    np.testing.assert_allclose(v.discharge_coefficient(re), 0.2 * np.sqrt(re), rtol=0.01)
    assert v.discharge_coefficient(0.0) == 0.0


def test_turbulent_orifice_hand_formula():
    # Q = Cd A sqrt(2 dp/rho) (Merritt 1967), Cd = 0.611
    dp, area = 50e5, 12e-6
    expected = 0.611 * area * math.sqrt(2 * dp / RHO)
    assert v.orifice_flow(dp, area, RHO, cd_turbulent=0.611) == pytest.approx(expected, rel=1e-12)
    assert v.orifice_pressure_drop(expected, area, RHO, cd_turbulent=0.611) == pytest.approx(dp)


def _blend_cd(re):
    # independent statement of the blend: Cd^-2 = Cdt^-2 + 1/(delta^2 Re)
    cdt = math.pi / (math.pi + 2)
    return (cdt**-2 + 1.0 / (0.04 * re)) ** -0.5


@pytest.mark.parametrize("dp, area, nu", [(1e3, 1e-8, 1e-3), (1e5, 1e-7, 500e-6), (2e6, 5e-6, 32e-6)])
def test_viscous_orifice_is_self_consistent(dp, area, nu):
    # scipy brentq as an independent solver of Q = Cd(Re(Q)) A sqrt(2dp/rho)
    d_h = math.sqrt(4 * area / math.pi)

    def residual(q):
        re = q / area * d_h / nu
        return q - _blend_cd(re) * area * math.sqrt(2 * dp / RHO)

    q_ref = brentq(residual, 1e-20, area * math.sqrt(2 * dp / RHO))
    q = v.orifice_flow(dp, area, RHO, nu)
    assert q == pytest.approx(q_ref, rel=1e-9)
    assert v.orifice_pressure_drop(q, area, RHO, nu) == pytest.approx(dp, rel=1e-9)


def test_laminar_throttle_hagen_poiseuille():
    # 128 mu L Q/(pi d^4) (Hagen-Poiseuille) + k rho v^2/2 (minor loss)
    q, d, ell, mu = 2 / 60000, 1.2e-3, 0.03, 0.04
    hp = 128 * mu * ell * q / (math.pi * d**4)
    vel = q / (math.pi * d**2 / 4)
    assert v.laminar_throttle_pressure_drop(q, d, ell, mu, RHO, 0.0) == pytest.approx(hp, rel=1e-12)
    assert v.laminar_throttle_pressure_drop(q, d, ell, mu, RHO) == pytest.approx(
        hp + 1.5 * RHO * vel**2 / 2, rel=1e-12)


def test_laminar_throttle_inverse_and_viscosity_drift():
    dp = v.laminar_throttle_pressure_drop(1e-5, 1e-3, 0.02, 0.04, RHO)
    assert v.laminar_throttle_flow(dp, 1e-3, 0.02, 0.04, RHO) == pytest.approx(1e-5, rel=1e-10)
    dp = v.laminar_throttle_pressure_drop(1e-5, 1e-3, 0.02, 0.04, RHO, 0.0)
    # Q ~ dp/mu: thinner (warmer) oil passes more (Hagen-Poiseuille)
    assert v.laminar_throttle_flow(dp, 1e-3, 0.02, 0.02, RHO, 0.0) == pytest.approx(2e-5, rel=1e-10)


def test_power_law_and_valve_path():
    # dp = dp_r (Q/Q_r)^n (catalogue curve): half flow -> quarter drop for n = 2
    assert v.valve_path_pressure_drop(30 / 60000, 60 / 60000, 5e5) == pytest.approx(1.25e5)
    assert v.power_law_pressure_drop(30 / 60000, 60 / 60000, 4e5, 1.0) == pytest.approx(2e5)
    assert v.power_law_flow(1.25e5, 60 / 60000, 5e5) == pytest.approx(30 / 60000)
    assert v.power_law_pressure_drop(0.0, 60 / 60000, 5e5) == 0.0


def test_relief_linear_override():
    # p = p_crack + override Q/Q_r (linear override, documented)
    assert v.relief_pressure(0.0, 180e5, 10e5, 1e-3) == 180e5
    assert v.relief_pressure(1e-3, 180e5, 10e5, 1e-3) == pytest.approx(190e5)
    assert v.relief_flow(170e5, 180e5, 10e5, 1e-3) == 0.0
    assert v.relief_flow(185e5, 180e5, 10e5, 1e-3) == pytest.approx(0.5e-3)


def test_check_valve():
    # cracking + (rated - cracking)(Q/Q_r)^2, 0 when closed
    assert v.check_valve_pressure_drop(0.0, 0.5e5, 1e-3, 1.5e5) == 0.0
    assert v.check_valve_pressure_drop(0.5e-3, 0.5e5, 1e-3, 1.5e5) == pytest.approx(0.75e5)
    assert v.check_valve_pressure_drop(1e-3, 0.5e5, 1e-3, 1.5e5) == pytest.approx(1.5e5)
    with pytest.raises(HeatloadError, match="rated_drop"):
        v.check_valve_pressure_drop(1e-3, 2e5, 1e-3, 1.5e5)


def test_counterbalance_balance():
    # valve opens when p_load + R p_pilot = setting (force balance on the poppet)
    assert v.counterbalance_load_pressure(200e5, 30e5, 3.0) == pytest.approx(110e5)
    assert v.counterbalance_load_pressure(200e5, 0.0, 3.0) == pytest.approx(200e5)
    assert v.counterbalance_load_pressure(200e5, 100e5, 3.0) == 0.0


def test_flow_controls():
    # 2-way: holds set flow above min drop; orifice law below (sqrt)
    q = v.flow_control_2way_flow(20 / 60000, np.array([-1e5, 0.0, 2e5, 8e5, 50e5]), 8e5)
    np.testing.assert_allclose(q * 60000, [0.0, 0.0, 10.0, 20.0, 20.0])
    # 3-way: inlet = load + spring; excess to tank
    assert v.flow_control_3way_inlet_pressure(100e5, 8e5) == pytest.approx(108e5)
    assert v.flow_control_3way_bypass_flow(1e-3, 0.4e-3) == pytest.approx(0.6e-3)
    assert v.flow_control_3way_bypass_flow(0.3e-3, 0.4e-3) == 0.0


def test_hydraulic_power_trade_formulas():
    # P[kW] = p[bar] Q[L/min] / 600 (common practice, exact)
    p_bar, q_lpm = 210.0, 45.0
    kw = v.hydraulic_power(q_lpm / 60000, p_bar * 1e5) / 1e3
    assert kw == pytest.approx(p_bar * q_lpm / 600, rel=1e-12)
    # HP = psi gpm / 1714 (common practice; exact constant 1714.29)
    psi, gpm = 3000.0, 12.0
    w = v.hydraulic_power(gpm * 3.785411784e-3 / 60, psi * 6894.757293168)
    assert w / 745.6998715822702 == pytest.approx(psi * gpm / 1714, rel=5e-4)


def test_directional_centre():
    assert v.directional_centre_pressure_drop(1e-3, "tandem", 1e-3, 3e5) == pytest.approx(3e5)
    assert v.directional_centre_pressure_drop(0.5e-3, "open", 1e-3, 3e5) == pytest.approx(0.75e5)
    for centre in ("closed", "float"):
        with pytest.raises(HeatloadError) as err:
            v.directional_centre_pressure_drop(1e-3, centre, 1e-3, 3e5)
        assert err.value.field == "power_unit.directional_valve.centre"


def test_zero_flow_zero_drop_everywhere():
    assert v.orifice_pressure_drop(0.0, 1e-6, RHO, NU) == 0.0
    assert v.orifice_flow(0.0, 1e-6, RHO, NU) == 0.0
    assert v.laminar_throttle_pressure_drop(0.0, 1e-3, 0.02, 0.04, RHO) == 0.0
    assert v.laminar_throttle_flow(0.0, 1e-3, 0.02, 0.04, RHO, 0.0) == 0.0


@pytest.mark.parametrize("call, field", [
    (lambda: v.orifice_flow(1e5, -1e-6, RHO), "area"),
    (lambda: v.laminar_throttle_pressure_drop(1e-5, -1e-3, 0.02, 0.04, RHO), "diameter"),
    (lambda: v.orifice_flow(1e5, 1e-6, RHO, kinematic_viscosity=0.0), "kinematic_viscosity"),
    (lambda: v.relief_flow(1e7, 180e5, 0.0, 1e-3), "override"),
    (lambda: v.power_law_flow(1e5, 1e-3, 5e5, exponent=-1.0), "exponent"),
    (lambda: v.flow_control_2way_flow(1e-3, 1e5, 0.0), "min_drop"),
])
def test_invalid_input_names_field(call, field):
    with pytest.raises(HeatloadError) as err:
        call()
    assert err.value.field == field
    assert "must be" in err.value.message


drops = st.floats(0.0, 400e5)


@settings(max_examples=60, deadline=None)
@given(dp=drops, extra=st.floats(1e2, 50e5), area=st.floats(1e-8, 1e-4),
       nu=st.floats(5e-6, 2e-3))
def test_more_drop_more_flow(dp, extra, area, nu):
    pairs = [
        (v.orifice_flow(dp, area, RHO, nu), v.orifice_flow(dp + extra, area, RHO, nu)),
        (v.power_law_flow(dp, 1e-3, 5e5, 1.8), v.power_law_flow(dp + extra, 1e-3, 5e5, 1.8)),
        (v.laminar_throttle_flow(dp, 1e-3, 0.02, nu * RHO, RHO),
         v.laminar_throttle_flow(dp + extra, 1e-3, 0.02, nu * RHO, RHO)),
        (v.relief_flow(dp, 100e5, 10e5, 1e-3), v.relief_flow(dp + extra, 100e5, 10e5, 1e-3)),
    ]
    for low, high in pairs:
        assert np.isfinite(low) and np.isfinite(high)
        assert low <= high
    assert pairs[0][0] < pairs[0][1]
    assert pairs[2][0] < pairs[2][1]


@settings(max_examples=60, deadline=None)
@given(q=st.floats(0.0, 0.01), area=st.floats(1e-8, 1e-4), nu=st.floats(5e-6, 2e-3))
def test_orifice_round_trip_finite(q, area, nu):
    dp = v.orifice_pressure_drop(q, area, RHO, nu)
    assert np.isfinite(dp) and dp >= 0
    assert v.orifice_flow(dp, area, RHO, nu) == pytest.approx(q, rel=1e-9, abs=1e-18)
    cd = v.discharge_coefficient(q / area * math.sqrt(4 * area / math.pi) / nu)
    assert 0.0 <= cd <= v.CD_TURBULENT
