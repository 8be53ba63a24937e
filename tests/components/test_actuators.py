"""Tests of heatload.components.actuators: geometry, ISO 4391 motor relations,
intensification and compression energy."""

import math
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

from heatload import HeatloadError
from heatload.model import Cylinder, HydraulicMotor
from heatload.components import actuators as a


def test_cylinder_areas_hand_calculation():
    # 63/36 mm cylinder: A1 = pi 63^2/4 = 3117.2 mm^2, A2 = 2099.4 mm^2 (hand calculation)
    cap, ann = a.cylinder_areas(0.063, 0.036)
    assert cap * 1e6 == pytest.approx(3117.2, abs=0.1)
    assert ann * 1e6 == pytest.approx(2099.4, abs=0.1)


def test_area_ratio_and_intensification():
    # 100/70 mm: phi = 100^2/(100^2 - 70^2) = 1.961 (ISO 3320 sizes, hand calculation)
    assert a.area_ratio(0.1, 0.07) == pytest.approx(1e4 / (1e4 - 4900))
    # intensification identity (common practice): meter-out, no load,
    # p2 = p1 A1 / A2, so p2/p1 equals the area ratio
    cap, ann = a.cylinder_areas(0.1, 0.07)
    p1 = 200e5
    p2 = p1 * cap / ann
    assert p2 / p1 == pytest.approx(a.area_ratio(0.1, 0.07), rel=1e-12)


def test_array_areas():
    cap, ann = a.cylinder_areas(np.array([0.05, 0.08]), np.array([0.028, 0.045]))
    assert cap.shape == (2,) and np.all(ann < cap)


def test_motor_relations_iso_4391():
    # ISO 4391: Q = D n / eta_v; dp = 2 pi T / (D eta_hm)
    assert a.motor_flow(100e-6, 5.0, 0.95) == pytest.approx(100e-6 * 5 / 0.95)
    assert a.motor_pressure_difference(150.0, 100e-6, 0.92) == pytest.approx(
        2 * math.pi * 150 / (100e-6 * 0.92))
    # overrunning: motor works as a pump, friction helps hold the load
    assert a.motor_pressure_difference(-150.0, 100e-6, 0.92) == pytest.approx(
        -2 * math.pi * 150 * 0.92 / 100e-6)


def test_motor_power_balance():
    # hydraulic power in x overall efficiency = shaft power out (ISO 4391)
    d, n, t, ev, ehm = 80e-6, 8.0, 120.0, 0.95, 0.92
    q = a.motor_flow(d, n, ev)
    dp = a.motor_pressure_difference(t, d, ehm)
    assert q * dp * ev * ehm == pytest.approx(2 * math.pi * n * t, rel=1e-12)


def test_compression_energy_hand_and_integral():
    # V p^2/(2K): 10 L at 300 bar, K = 1.6 GPa -> 2812.5 J (hand calculation)
    assert a.compression_energy(0.01, 300e5, 1.6e9) == pytest.approx(2812.5)
    # the same as the integral of p dV with dV = V dp / K (scipy quad)
    ref, _ = quad(lambda p: p * 0.01 / 1.6e9, 0.0, 300e5)
    assert a.compression_energy(0.01, 300e5, 1.6e9) == pytest.approx(ref, rel=1e-9)
    assert a.compression_energy(0.0, 300e5, 1.6e9) == 0.0


@pytest.mark.parametrize("bore, rod", [(0.05, 0.05), (0.05, 0.06), (0.05, 0.0), (-0.05, 0.02)])
def test_bad_geometry_names_field(bore, rod):
    with pytest.raises(HeatloadError) as err:
        a.cylinder_areas(bore, rod, field="actuators[1]")
    assert err.value.field in ("actuators[1].rod", "actuators[1].bore")
    assert err.value.message


def test_rod_not_smaller_than_bore_message():
    with pytest.raises(HeatloadError) as err:
        a.validate_cylinder(Cylinder("lift", bore=0.05, rod=0.05, stroke=0.5), "actuators[0]")
    assert err.value.field == "actuators[0].rod"
    assert "smaller than the bore" in err.value.message


def test_validate_good_actuators():
    cyl = Cylinder("press", bore=0.1, rod=0.07, stroke=0.4)
    mot = HydraulicMotor("winch", displacement=100e-6)
    assert a.validate_cylinder(cyl, "actuators[0]") is cyl
    assert a.validate_hydraulic_motor(mot, "actuators[1]") is mot


@pytest.mark.parametrize("change, field", [
    ({"volumetric_efficiency": 1.1}, "actuators[2].volumetric_efficiency"),
    ({"hydromechanical_efficiency": -0.5}, "actuators[2].hydromechanical_efficiency"),
    ({"displacement": 0.0}, "actuators[2].displacement"),
    ({"max_speed": -1.0}, "actuators[2].max_speed"),
])
def test_invalid_motor_names_field(change, field):
    with pytest.raises(HeatloadError) as err:
        a.validate_hydraulic_motor(replace(HydraulicMotor("winch", 100e-6), **change),
                                   "actuators[2]")
    assert err.value.field == field


def test_invalid_cylinder_stroke():
    with pytest.raises(HeatloadError) as err:
        a.validate_cylinder(Cylinder("c", bore=0.1, rod=0.05, stroke=-0.1), "actuators[3]")
    assert err.value.field == "actuators[3].stroke"


@settings(max_examples=60, deadline=None)
@given(bore=st.floats(0.01, 0.5), frac=st.floats(0.05, 0.95),
       v=st.floats(0.0, 1.0), p=st.floats(0.0, 700e5))
def test_geometry_finite_and_ordered(bore, frac, v, p):
    cap, ann = a.cylinder_areas(bore, bore * frac)
    assert 0 < ann < cap
    assert np.isfinite(a.area_ratio(bore, bore * frac)) and a.area_ratio(bore, bore * frac) > 1
    e = a.compression_energy(v, p, 1.6e9)
    assert np.isfinite(e) and e >= 0
