"""Tests of heatload.components.motors against IEC 60034-30-1 tables and loss identities."""

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from heatload import HeatloadError
from heatload.model import DriveMotor
from heatload.components import motors as m

KW = np.array([5.5, 7.5, 11, 15, 22, 30]) * 1e3
# IEC 60034-30-1, 4-pole 50 Hz minimum efficiencies [%] (from memory)
IE3_TABLE = [89.6, 90.4, 91.4, 92.1, 93.0, 93.6]
IE4_TABLE = [91.9, 92.6, 93.3, 93.9, 94.5, 94.9]
# IEC 60034-30-1, IE2 4-pole (from memory)
IE2_TABLE = [87.7, 88.7, 89.8, 90.6, 91.6, 92.3]


@pytest.mark.parametrize("cls, table", [("IE3", IE3_TABLE), ("IE4", IE4_TABLE), ("IE2", IE2_TABLE)])
def test_class_tables(cls, table):
    # the formula reproduces the standard's table to its rounding (0.1 point)
    np.testing.assert_allclose(m.ie_class_efficiency(KW, cls) * 100, table, atol=0.1)


def test_other_poles_and_small_motors():
    # IEC 60034-30-1 (from memory): IE3 2-pole 11 kW 91.2 %, 6-pole 11 kW 90.3 %,
    # IE3 4-pole 0.55 kW 80.8 %, 0.75 kW 82.5 %
    assert m.ie_class_efficiency(11e3, "IE3", 2) * 100 == pytest.approx(91.2, abs=0.1)
    assert m.ie_class_efficiency(11e3, "IE3", 6) * 100 == pytest.approx(90.3, abs=0.1)
    assert m.ie_class_efficiency(0.55e3, "IE3") * 100 == pytest.approx(80.8, abs=0.1)
    assert m.ie_class_efficiency(0.75e3, "IE3") * 100 == pytest.approx(82.5, abs=0.1)
    e = m.ie_class_efficiency(np.array([0.55, 0.6, 0.65, 0.7, 0.75]) * 1e3, "IE3")
    assert np.all(np.diff(e) > 0)


def test_flat_above_200_kw():
    # IEC 60034-30-1: IE3 4-pole 200-1000 kW 96.0 % (from memory)
    e = m.ie_class_efficiency(np.array([200e3, 315e3, 1000e3]), "IE3")
    np.testing.assert_allclose(e * 100, 96.0, atol=0.1)
    assert e[0] == e[2]


def test_unknown_class_lists_valid_ones():
    with pytest.raises(HeatloadError) as err:
        m.ie_class_efficiency(11e3, "IE9")
    assert "IE3" in err.value.message and "IE4" in err.value.message
    with pytest.raises(HeatloadError, match="poles"):
        m.ie_class_efficiency(11e3, "IE1", 2)


def test_part_load_identities():
    pr, er = 11e3, 0.914
    lr = pr * (1 / er - 1)
    # rated load on the grid: the rated efficiency (definition)
    assert m.motor_efficiency(pr, pr, er) == pytest.approx(er, rel=1e-12)
    # no load: only the constant losses remain (30 % share, documented)
    assert m.motor_input_power(0.0, pr, er) == pytest.approx(0.3 * lr)
    assert m.motor_efficiency(0.0, pr, er) == 0.0
    # half load: losses 0.3 L_r + 0.7 L_r / 4 (loss split, IEC 60034-2-1 constant + load losses)
    assert m.motor_input_power(pr / 2, pr, er) == pytest.approx(pr / 2 + 0.3 * lr + 0.7 * lr / 4)


def test_efficiency_peaks_below_rated_load():
    # classic machine theory: efficiency peaks where constant losses equal load
    # losses, here at sqrt(0.3/0.7) = 65 % load
    loads = np.linspace(0.05, 1.2, 200) * 11e3
    eta = m.motor_efficiency(loads, 11e3, 0.914)
    assert loads[np.argmax(eta)] / 11e3 == pytest.approx(np.sqrt(0.3 / 0.7), abs=0.01)


def test_converter_fed_constant_losses_scale_with_speed_but_the_magnetizing_part():
    # constant losses 0.3 L_r (loss split, IEC 60034-2-1); at half speed and constant
    # flux iron, friction and windage fall with the speed (about), while the
    # magnetizing current's copper loss, k = 0.3 of them (from memory), stays:
    # 0.3 L_r (0.3 + 0.7 x 0.5) = 0.195 L_r
    lr = 11e3 * (1 / 0.914 - 1)
    assert m.motor_input_power(0.0, 11e3, 0.914, speed_fraction=0.5) == pytest.approx(
        0.3 * lr * (0.3 + 0.7 * 0.5), rel=1e-12)
    # at rest the motor still draws the magnetizing part: not zero
    assert m.motor_input_power(0.0, 11e3, 0.914, speed_fraction=1e-6) == pytest.approx(
        0.3 * lr * 0.3, rel=1e-5)


def test_converter_losses_keep_the_rated_efficiency_and_a_standby_loss():
    pr_in = 11e3 / 0.914                          # motor input at its rated point
    # at the rated point the converter's loss is P_in (1/eta_d - 1): eta_d as stated
    rated = m.converter_losses(pr_in, pr_in, 0.97)
    assert pr_in / (pr_in + rated) == pytest.approx(0.97, rel=1e-12)
    # at rest the standby share k0 of the rated loss remains (from memory, 25 %)
    assert m.converter_losses(0.0, pr_in, 0.97) == pytest.approx(0.25 * rated, rel=1e-12)
    # linear in between: half input, k0 + (1 - k0)/2 of the rated loss
    assert m.converter_losses(pr_in / 2, pr_in, 0.97) == pytest.approx(
        (0.25 + 0.75 / 2) * rated, rel=1e-12)


def test_rated_efficiency_of_a_motor():
    assert m.motor_rated_efficiency(DriveMotor()) == pytest.approx(m.ie_class_efficiency(11e3))
    assert m.motor_rated_efficiency(DriveMotor(efficiency=0.9)) == 0.9


@pytest.mark.parametrize("change, field", [
    ({"efficiency": 1.3}, "power_unit.motor.efficiency"),
    ({"rated_power": -1.0}, "power_unit.motor.rated_power"),
    ({"efficiency_class": "IE7"}, "power_unit.motor.efficiency_class"),
    ({"drive_efficiency": 0.0}, "power_unit.motor.drive_efficiency"),
    ({"poles": 3, "efficiency": 0.9}, "power_unit.motor.poles"),
])
def test_invalid_motor_names_field(change, field):
    with pytest.raises(HeatloadError) as err:
        m.validate_motor(replace(DriveMotor(), **change))
    assert err.value.field == field


def test_negative_shaft_power_rejected():
    with pytest.raises(HeatloadError) as err:
        m.motor_input_power(-1.0, 11e3, 0.9)
    assert err.value.field == "shaft_power"


@settings(max_examples=80, deadline=None)
@given(p=st.floats(0.0, 2.0), pr=st.floats(750.0, 500e3), er=st.floats(0.5, 1.0),
       s=st.floats(0.05, 1.2))
def test_input_at_least_shaft_power(p, pr, er, s):
    shaft = p * pr * s
    p_in = m.motor_input_power(shaft, pr, er, s)
    eta = m.motor_efficiency(shaft, pr, er, s)
    assert np.isfinite(p_in) and p_in >= shaft
    assert 0.0 <= eta <= 1.0
    assert 0.0 < m.ie_class_efficiency(pr, "IE4") <= 1.0
