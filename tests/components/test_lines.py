"""Tests of heatload.components.lines against the fluids library and handbook formulas."""

import math

import fluids
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from heatload import HeatloadError
from heatload.components.lines import friction_factor, line_pressure_drop, reynolds_number

RE_LAMINAR = np.logspace(2, math.log10(1999), 15)
RE_TURBULENT = np.logspace(math.log10(4001), 7, 25)
ROUGHNESS = [0.0, 1e-5, 1e-4, 1e-3, 1e-2]


def test_published_example():
    # fluids.friction_factor(1e5, 1e-4) = 0.018514 (Colebrook, fluids docs)
    assert friction_factor(1e5, 1e-4) == pytest.approx(0.018514, abs=1e-6)


@pytest.mark.parametrize("ed", ROUGHNESS)
def test_turbulent_matches_fluids_colebrook(ed):
    # reference library fluids (Clamond's exact Colebrook solution), within 0.5 %
    ours = friction_factor(RE_TURBULENT, ed)
    ref = np.array([fluids.friction_factor(re, ed) for re in RE_TURBULENT])
    np.testing.assert_allclose(ours, ref, rtol=5e-3)


def test_laminar_is_64_over_re():
    # Hagen-Poiseuille: f = 64/Re; fluids.friction_factor laminar branch
    ref = np.array([fluids.friction_factor(re) for re in RE_LAMINAR])
    np.testing.assert_allclose(friction_factor(RE_LAMINAR), ref, rtol=5e-3)
    np.testing.assert_allclose(friction_factor(RE_LAMINAR, 1e-3), 64.0 / RE_LAMINAR, rtol=1e-12)


def test_transition_is_continuous_and_between_ends():
    # documented convention: linear in Re from 64/2000 to Colebrook(4000)
    f_4000 = fluids.friction_factor(4000.0, 1e-4)
    assert friction_factor(2000.0, 1e-4) == pytest.approx(64 / 2000, rel=1e-9)
    assert friction_factor(4000.0, 1e-4) == pytest.approx(f_4000, rel=5e-3)
    mid = friction_factor(3000.0, 1e-4)
    assert min(0.032, f_4000) <= mid <= max(0.032, f_4000)


def test_reynolds_hand_calculation():
    # Re = 4Q/(pi d nu): 60 L/min, 16 mm, 46 mm^2/s -> 1729.9 (hand calculation)
    assert reynolds_number(1e-3, 0.016, 46e-6) == pytest.approx(4e-3 / (math.pi * 0.016 * 46e-6))
    assert reynolds_number(-1e-3, 0.016, 46e-6) == pytest.approx(1729.9, abs=0.1)


def test_laminar_line_drop_is_hagen_poiseuille():
    # 128 mu L Q/(pi d^4) (Hagen-Poiseuille, White, Fluid Mechanics 6.4)
    q, d, ell, rho, nu = 40 / 60000, 0.016, 3.0, 870.0, 46e-6
    mu = rho * nu
    expected = 128 * mu * ell * q / (math.pi * d**4)
    assert line_pressure_drop(q, d, ell, rho, nu) == pytest.approx(expected, rel=1e-12)


def test_turbulent_line_drop_matches_fluids():
    # Darcy-Weisbach with fluids' friction factor and fluids.K_from_f, K of fittings added
    q, d, ell, rho, nu, eps, k = 100 / 60000, 0.012, 5.0, 870.0, 10e-6, 1.5e-6, 2.0
    v = q / (math.pi * d**2 / 4)
    re = v * d / nu
    assert re > 4000
    f = fluids.friction_factor(re, eps / d)
    k_total = fluids.K_from_f(f, ell, d) + k
    expected = fluids.dP_from_K(k_total, rho, v)
    assert line_pressure_drop(q, d, ell, rho, nu, eps, k) == pytest.approx(expected, rel=5e-3)


def test_zero_flow_zero_drop_and_sign():
    assert line_pressure_drop(0.0, 0.016, 3.0, 870.0, 46e-6, fittings_k=2.0) == 0.0
    up = line_pressure_drop(1e-3, 0.016, 3.0, 870.0, 46e-6, fittings_k=2.0)
    down = line_pressure_drop(-1e-3, 0.016, 3.0, 870.0, 46e-6, fittings_k=2.0)
    assert down == pytest.approx(-up)


def test_array_and_scalar_types():
    q = np.array([0.0, 1e-5, 1e-3, 5e-3])
    dp = line_pressure_drop(q, 0.016, 3.0, 870.0, 46e-6)
    assert isinstance(dp, np.ndarray) and dp.shape == (4,)
    assert isinstance(line_pressure_drop(1e-3, 0.016, 3.0, 870.0, 46e-6), float)


@pytest.mark.parametrize("kwargs, field", [
    ({"inner_diameter": -0.016}, "inner_diameter"),
    ({"kinematic_viscosity": 0.0}, "kinematic_viscosity"),
    ({"length": -1.0}, "length"),
    ({"roughness": -1e-6}, "roughness"),
])
def test_invalid_input_names_field(kwargs, field):
    args = dict(flow=1e-3, inner_diameter=0.016, length=3.0, density=870.0,
                kinematic_viscosity=46e-6)
    args.update(kwargs)
    with pytest.raises(HeatloadError) as err:
        line_pressure_drop(**args)
    assert err.value.field == field


def test_invalid_reynolds():
    with pytest.raises(HeatloadError, match="reynolds"):
        friction_factor(-5.0)


@settings(max_examples=60, deadline=None)
@given(q=st.floats(0.0, 0.02), d=st.floats(0.004, 0.1), nu=st.floats(5e-6, 2e-3),
       ed_exp=st.floats(-7, -2))
def test_finite_and_monotone(q, d, nu, ed_exp):
    eps = d * 10**ed_exp
    dp1 = line_pressure_drop(q, d, 3.0, 870.0, nu, eps, 1.0)
    dp2 = line_pressure_drop(q * 1.1 + 1e-7, d, 3.0, 870.0, nu, eps, 1.0)
    assert np.isfinite(dp1) and np.isfinite(dp2)
    assert 0.0 <= dp1 < dp2


def test_few_elements_give_the_figures_of_many():
    # a scenario's few phases take the whole-array path, a sweep the gathered
    # one: the same Colebrook steps, so equal to the last bit (laminar,
    # transition and turbulent elements, zero flow included)
    from heatload.components.lines import line_pressure_drop
    q = np.concatenate([[0.0, 1e-6], np.geomspace(1e-5, 3e-3, 22)])
    many = line_pressure_drop(np.tile(q, 10), 0.016, 4.0, 850.0, 32e-6, 1.5e-6, 3.0)
    few = line_pressure_drop(q, 0.016, 4.0, 850.0, 32e-6, 1.5e-6, 3.0)
    assert np.array_equal(few, many[:q.size])
