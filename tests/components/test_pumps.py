"""Tests of heatload.components.pumps: Wilson loss model identities (ISO 4391 definitions
of efficiency) and validation."""

import math
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from heatload import HeatloadError
from heatload.model import Pump
from heatload.components import pumps as pm

D, N, P_R, MU_R = 28e-6, 1450 / 60, 200e5, 32e-6 * 870.0


def _coeffs(ev=0.93, ehm=0.88, share=0.5):
    return pm.wilson_coefficients(ev, ehm, P_R, N, MU_R, share)


@pytest.mark.parametrize("ev, ehm, share", [(0.93, 0.88, 0.5), (0.97, 0.94, 0.2), (0.85, 0.80, 1.0)])
def test_calibration_reproduces_rated_point(ev, ehm, share):
    # ISO 4391: eta_v = Q_e / (D n); eta_hm = D p / (2 pi T); identity at the datasheet point
    cs, cv, cf = _coeffs(ev, ehm, share)
    q = pm.pump_flow(D, N, P_R, MU_R, cs)
    t = pm.pump_torque(D, N, P_R, MU_R, cv, cf)
    assert q / (D * N) == pytest.approx(ev, rel=1e-12)
    assert D * P_R / (2 * math.pi * t) == pytest.approx(ehm, rel=1e-12)
    # overall efficiency = eta_v * eta_hm (ISO 4391): hydraulic out / shaft in
    p_shaft = pm.pump_shaft_power(t, N)
    assert q * P_R / p_shaft == pytest.approx(ev * ehm, rel=1e-12)


def test_wilson_efficiency_forms():
    # eta_v = 1 - Cs/S, eta_hm = 1/(1 + Cv S + Cf), S = mu omega / dp (Wilson, from memory)
    cs, cv, cf = _coeffs()
    mu, p = 0.02, 150e5
    s = pm.duty_parameter(mu, N, p)
    assert s == pytest.approx(mu * 2 * math.pi * N / p)
    assert pm.pump_flow(D, N, p, mu, cs) / (D * N) == pytest.approx(1 - cs / s)
    t = pm.pump_torque(D, N, p, mu, cv, cf)
    assert D * p / (2 * math.pi * t) == pytest.approx(1 / (1 + cv * s + cf))


def test_volumetric_efficiency_falls_with_viscosity():
    # leakage ~ dp/mu (laminar slip, Wilson): thinner oil leaks more
    cs, _, _ = _coeffs()
    mus = np.array([200e-6, 46e-6, 20e-6, 10e-6]) * 870.0
    eta_v = pm.pump_flow(D, N, P_R, mus, cs) / (D * N)
    assert np.all(np.diff(eta_v) < 0)


def test_zero_stroke_standby_loss_and_no_flow():
    # variable pump at zero stroke: no flow delivered, drag and friction remain
    cs, cv, cf = _coeffs()
    assert pm.pump_flow(D, N, 200e5, MU_R, cs, displacement_fraction=0.0) == 0.0
    t0 = pm.pump_torque(D, N, 200e5, MU_R, cv, cf, displacement_fraction=0.0)
    assert t0 == pytest.approx((cv * D * MU_R * 2 * math.pi * N + cf * D * 200e5) / (2 * math.pi))
    assert t0 > 0


def test_stroke_and_speed_inverses():
    cs, _, _ = _coeffs()
    mu, p, q = 0.03, 120e5, 20 / 60000
    x = pm.displacement_fraction_for_flow(q, D, N, p, mu, cs)
    assert 0 < x < 1
    assert pm.pump_flow(D, N, p, mu, cs, x) == pytest.approx(q, rel=1e-12)
    n = pm.speed_for_flow(q, D, p, mu, cs)
    assert pm.pump_flow(D, n, p, mu, cs) == pytest.approx(q, rel=1e-12)
    # more than the pump can give: stroke clipped to 1
    assert pm.displacement_fraction_for_flow(1.0, D, N, p, mu, cs) == 1.0


def test_shaft_power_definition():
    # P = 2 pi n T (definition): 100 N m at 1500 rpm -> 15.708 kW
    assert pm.pump_shaft_power(100.0, 25.0) == pytest.approx(2 * math.pi * 25 * 100)


def test_typical_efficiencies_are_fractions():
    for kind, (ev, ehm, p) in pm.TYPICAL_PUMP_EFFICIENCIES.items():
        assert 0 < ev <= 1 and 0 < ehm <= 1 and p > 0, kind
    assert set(pm.TYPICAL_PUMP_EFFICIENCIES) == {"gear", "vane", "axial-piston", "radial-piston"}


def test_validate_default_pump():
    assert pm.validate_pump(Pump()) == Pump()


@pytest.mark.parametrize("change, field", [
    ({"volumetric_efficiency": 1.2}, "power_unit.pump.volumetric_efficiency"),
    ({"hydromechanical_efficiency": 0.0}, "power_unit.pump.hydromechanical_efficiency"),
    ({"displacement": -28e-6}, "power_unit.pump.displacement"),
    ({"shaft_speed": 0.0}, "power_unit.pump.shaft_speed"),
    ({"viscosity_min": 2000e-6}, "power_unit.pump.viscosity_min"),
    ({"type": "screw-ish"}, "power_unit.pump.type"),
    ({"kind": "magic"}, "power_unit.pump.kind"),
    ({"standby_loss_fraction": 1.5}, "power_unit.pump.standby_loss_fraction"),
])
def test_invalid_pump_names_field(change, field):
    with pytest.raises(HeatloadError) as err:
        pm.validate_pump(replace(Pump(), **change))
    assert err.value.field == field
    assert err.value.message


def test_invalid_function_inputs():
    with pytest.raises(HeatloadError) as err:
        pm.wilson_coefficients(1.05, 0.9, P_R, N, MU_R)
    assert err.value.field == "volumetric_efficiency" and "(0, 1]" in err.value.message
    with pytest.raises(HeatloadError) as err:
        pm.pump_flow(D, N, P_R, MU_R, 1e-8, displacement_fraction=1.5)
    assert err.value.field == "displacement_fraction"


@settings(max_examples=80, deadline=None)
@given(ev=st.floats(0.7, 1.0), ehm=st.floats(0.7, 1.0), share=st.floats(0.0, 1.0),
       mu=st.floats(0.005, 1.0), p=st.floats(1e5, 350e5), n=st.floats(5.0, 50.0),
       x=st.floats(0.05, 1.0))
def test_efficiencies_stay_in_range(ev, ehm, share, mu, p, n, x):
    cs, cv, cf = pm.wilson_coefficients(ev, ehm, P_R, N, MU_R, share)
    q = pm.pump_flow(D, n, p, mu, cs, x)
    t = pm.pump_torque(D, n, p, mu, cv, cf, x)
    assert np.isfinite(q) and np.isfinite(t) and q >= 0 and t > 0
    eta_v = q / (x * D * n)
    eta_hm = x * D * p / (2 * math.pi * t)
    assert 0 <= eta_v <= 1 + 1e-12
    assert 0 < eta_hm <= 1 + 1e-12
