"""Checks of heatload.heat.thermal: closed forms against scipy's ODE and root
solvers as independent solutions, the first law over a shift, and properties."""

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from heatload.heat import thermal as T
from heatload.errors import HeatloadError
from heatload.heat.heat_transfer import reservoir_conductance
from heatload.model import Reservoir

scipy_integrate = pytest.importorskip("scipy.integrate")
scipy_optimize = pytest.importorskip("scipy.optimize")

HEAT = np.array([3000.0, 500.0, 1500.0])   # invented duty cycle [W]
DUR = np.array([20.0, 30.0, 10.0])         # [s]
TA = 298.15


def _ua_linear(temp):
    # a conductance rising with temperature, like convection + radiation
    return 30.0 + 0.2 * (np.asarray(temp) - TA)


def _integrate_phases(heat, dur, capacity, ua_fn, ta, t0, n_cycles, cooler=None):
    """scipy.solve_ivp phase by phase (restarted at each discontinuity), tight tolerance."""
    temps = [t0]
    t = t0
    for _ in range(n_cycles):
        for q, d in zip(heat, dur):
            sol = scipy_integrate.solve_ivp(
                lambda _t, y, q=q: [(q - ua_fn(y[0]) * (y[0] - ta)) / capacity],
                (0.0, d), [t], method="DOP853", rtol=1e-11, atol=1e-11)
            t = sol.y[0, -1]
            temps.append(t)
    return np.array(temps)


def test_heat_capacity_formula():
    # C = V rho c + m c_s: 0.2 m^3 * 870 * 1900 + 150 * 490 (by hand: 330600 + 73500)
    assert T.heat_capacity(0.2, 870.0, 1900.0, 150.0, 490.0) == pytest.approx(404100.0)
    with pytest.raises(HeatloadError):
        T.heat_capacity(-0.1, 870.0, 1900.0)


def _constant(ua):
    return lambda t, rows=None: (np.full(np.shape(t), ua), np.zeros(np.shape(t)))


def test_steady_state_constant_ua_closed_form():
    # Q = UA (T - Ta) -> T = Ta + Q / UA (Newton's law of cooling)
    assert T.steady_temperature(2000.0, TA, 0.0, TA, _constant(40.0)) == pytest.approx(
        TA + 50.0, abs=1e-9)
    assert T.steady_temperature(0.0, TA, 0.0, TA, _constant(40.0)) == pytest.approx(TA)
    # a heat falling with T: Q = 2000 - 10 (T - Ta) -> T = Ta + 2000 / (40 + 10)
    assert T.steady_temperature(2000.0, TA, -10.0, TA, _constant(40.0)) == pytest.approx(
        TA + 40.0, abs=1e-9)


def test_steady_state_against_brentq():
    from heatload import model
    from heatload.evaluation import ConductanceTable

    sc = model.Scenario("tank", (), (), (), reservoir=Reservoir())
    table = ConductanceTable(sc, [TA])
    fn = table.fn()
    heats = np.array([200.0, 800.0, 1500.0])
    got = T.steady_temperature(heats, TA, 0.0, np.full(3, TA), table, np.zeros(3, int))
    for q, tg in zip(heats, got):
        ref = scipy_optimize.brentq(lambda x: fn(x) * (x - TA) - q, TA, TA + 300.0, xtol=1e-12)
        assert tg == pytest.approx(ref, abs=1e-8)


@settings(max_examples=40, deadline=None)
@given(q1=st.floats(0.0, 5e4), dq=st.floats(1.0, 5e4), ta=st.floats(250.0, 320.0))
def test_steady_state_monotone_and_above_ambient(q1, dq, ta):
    def fn(t, rows=None):
        t = np.asarray(t, float)
        return 20.0 + 0.1 * np.abs(t - ta), 0.1 * np.sign(t - ta)
    t1, t2 = T.steady_temperature(np.array([q1, q1 + dq]), ta, 0.0, ta, fn)
    assert t1 >= ta
    assert t2 > t1


def test_periodic_steady_state_against_solve_ivp():
    # closed form vs a cold start integrated by solve_ivp until settled (12 tau)
    c, ua = 30000.0, 50.0          # tau = 600 s
    ps = T.periodic_steady_state(HEAT, DUR, c, ua, TA)
    n_cycles = int(12 * 600 / DUR.sum())
    traj = _integrate_phases(HEAT, DUR, c, lambda _t: ua, TA, TA, n_cycles)
    last = traj[-(len(HEAT) + 1):]
    np.testing.assert_allclose(ps.boundaries, last, atol=0.01)
    assert ps.maximum == pytest.approx(last.max(), abs=0.01)
    assert ps.minimum == pytest.approx(last.min(), abs=0.01)
    # mean of a periodic linear system: Ta + Q_mean / UA
    q_mean = np.sum(HEAT * DUR) / DUR.sum()
    assert ps.mean == pytest.approx(TA + q_mean / ua, rel=1e-12)
    assert ps.time_constant == pytest.approx(600.0)


def test_periodic_steady_state_is_periodic_under_solve_ivp():
    # start solve_ivp at the closed form's boundary: one cycle must return to it
    c, ua = 4e5, 25.0
    ps = T.periodic_steady_state(HEAT, DUR, c, ua, TA)
    traj = _integrate_phases(HEAT, DUR, c, lambda _t: ua, TA, ps.boundaries[0], 1)
    np.testing.assert_allclose(traj, ps.boundaries, atol=1e-6)


def test_periodic_steady_state_vectorized_variants():
    heat = np.stack([HEAT, 2 * HEAT, 0.5 * HEAT])
    ps = T.periodic_steady_state(heat, DUR, 30000.0, 50.0, TA)
    assert ps.boundaries.shape == (3, 4)
    single = T.periodic_steady_state(2 * HEAT, DUR, 30000.0, 50.0, TA)
    np.testing.assert_allclose(ps.boundaries[1], single.boundaries, rtol=1e-14)
    # linear system: doubling the heat doubles the rise over ambient
    np.testing.assert_allclose(ps.boundaries[1] - TA, 2 * (ps.boundaries[0] - TA), rtol=1e-12)


def test_periodic_with_temperature_dependent_ua_linearized_at_mean():
    ps = T.periodic_steady_state(HEAT, DUR, 4e5, _ua_linear, TA)
    q_mean = np.sum(HEAT * DUR) / DUR.sum()
    # the mean satisfies Q_mean = UA(T_mean)(T_mean - Ta), solved independently by brentq
    ref = scipy_optimize.brentq(lambda x: _ua_linear(x) * (x - TA) - q_mean, TA, TA + 200,
                                xtol=1e-12)
    assert ps.mean == pytest.approx(ref, abs=1e-5)
    # and against solve_ivp with the true UA(T): ripple is small, so within 0.05 K
    traj = _integrate_phases(HEAT, DUR, 4e5, _ua_linear, TA, ps.boundaries[0], 1)
    np.testing.assert_allclose(traj, ps.boundaries, atol=0.05)


def test_warm_up_against_solve_ivp_constant_ua():
    c, ua = 2e5, 40.0
    shift = 3600.0 + 25.0  # not a whole number of cycles: last cycle cut in phase 2
    w = T.warm_up(HEAT, DUR, c, ua, TA, 288.15, shift, limit_temperature=310.0)
    assert w.times[-1] == pytest.approx(shift)
    # independent: scipy over the same schedule
    t = 288.15
    ref = [t]
    for a, b in zip(w.times[:-1], w.times[1:]):
        phase = np.searchsorted(np.cumsum(DUR), (0.5 * (a + b)) % DUR.sum(), side="right")
        q = HEAT[phase]
        sol = scipy_integrate.solve_ivp(lambda _t, y: [(q - ua * (y[0] - TA)) / c], (a, b), [t],
                                        method="DOP853", rtol=1e-11, atol=1e-11)
        t = sol.y[0, -1]
        ref.append(t)
    np.testing.assert_allclose(w.temperatures, ref, atol=1e-6)
    # time to the limit: solve_ivp events on the continuous run
    assert w.time_to_limit is not None
    assert 0 < w.time_to_limit < shift


def test_warm_up_time_to_limit_against_solve_ivp_events():
    # constant heat, one phase: exact t = tau ln((T0 - Tinf)/(TL - Tinf)) vs solve_ivp events
    c, ua, q = 3e5, 30.0, 1500.0
    w = T.warm_up([q], [60.0], c, ua, TA, 288.15, 8 * 3600.0, limit_temperature=320.0)
    ev = lambda _t, y: y[0] - 320.0  # noqa: E731
    ev.terminal = True
    sol = scipy_integrate.solve_ivp(lambda _t, y: [(q - ua * (y[0] - TA)) / c], (0, 8 * 3600.0),
                                    [288.15], events=ev, rtol=1e-11, atol=1e-11)
    assert w.time_to_limit == pytest.approx(sol.t_events[0][0], abs=1e-3)
    never = T.warm_up([q], [60.0], c, ua, TA, 288.15, 8 * 3600.0, limit_temperature=400.0)
    assert never.time_to_limit is None


def test_warm_up_temperature_dependent_ua_against_solve_ivp():
    c = 2e5
    w = T.warm_up(HEAT, DUR, c, _ua_linear, TA, 288.15, 4 * 3600.0)
    n_cycles = int(4 * 3600.0 / DUR.sum())
    traj = _integrate_phases(HEAT, DUR, c, _ua_linear, TA, 288.15, n_cycles)
    # UA frozen per 10..30 s segment vs continuous: tiny difference, within 0.01 K
    assert w.final_temperature == pytest.approx(traj[-1], abs=0.01)


def test_shift_energy_balance_closes():
    tank = Reservoir()
    fn = lambda t: reservoir_conductance(tank, t, TA)  # noqa: E731
    w = T.warm_up(HEAT, DUR, 4e5, fn, TA, 288.15, 8 * 3600.0)
    bal = T.shift_energy_balance(w)
    # first law: heat in = stored + dissipated, to 1e-6 relative
    assert abs(bal["relative_residual"]) < 1e-6
    assert bal["heat_in"] == pytest.approx(np.sum(HEAT * DUR) * 8 * 3600.0 / DUR.sum(), rel=1e-12)
    # the dissipated energy cross-checked by trapezoidal integration of UA(T)(T - Ta)
    # of a finely sampled run (independent numerical quadrature)
    fine = T.warm_up(HEAT, DUR, 4e5, fn, TA, 288.15, 8 * 3600.0, max_step=2.0)
    tt, temps = fine.times, fine.temperatures
    flux = fn(temps) * (temps - TA)
    quad = np.trapezoid(flux, tt) if hasattr(np, "trapezoid") else np.trapz(flux, tt)
    assert fine.dissipated == pytest.approx(quad, rel=2e-3)


def test_warm_up_vectorized_variants():
    heat = np.stack([HEAT, 1.5 * HEAT])
    w = T.warm_up(heat, DUR, 2e5, 40.0, TA, 288.15, 7200.0, limit_temperature=320.0)
    assert w.temperatures.shape[0] == 2
    assert w.final_temperature[1] > w.final_temperature[0]
    assert np.isnan(w.time_to_limit[0]) or w.time_to_limit[1] < w.time_to_limit[0]


def _thermostat_reference(heat, dur, c, ua, ta, t0, duration, t_on, hyst, ua_c, tc):
    """solve_ivp with terminal events for the thermostat, restarted at phase ends and events."""
    on = t0 >= t_on
    t, now = t0, 0.0
    ons, offs = [], []
    period = np.sum(dur)
    ends = np.cumsum(dur)
    while now < duration - 1e-9:
        k = np.searchsorted(ends, (now % period) + 1e-9, side="right")
        phase_end = now - (now % period) + ends[k]
        stop = min(phase_end, duration)
        q = heat[k]

        def rhs(_t, y, q=q, on=on):
            cool = ua_c * (y[0] - tc) if on else 0.0
            return [(q - ua * (y[0] - ta) - cool) / c]

        ev = (lambda _t, y: y[0] - (t_on - hyst)) if on else (lambda _t, y: y[0] - t_on)
        ev.terminal = True
        ev.direction = -1 if on else 1
        sol = scipy_integrate.solve_ivp(rhs, (now, stop), [t], events=ev, method="DOP853",
                                        rtol=1e-11, atol=1e-11)
        if sol.status == 1:
            now = sol.t_events[0][0]
            t = sol.y_events[0][0][0]
            on = not on
            (ons if on else offs).append(now)
        else:
            now, t = stop, sol.y[0, -1]
    return np.array(ons), np.array(offs), t


def test_thermostat_events_against_solve_ivp():
    c, ua, ua_c = 2e5, 30.0, 120.0
    args = dict(ambient=TA, initial_temperature=288.15, on_temperature=318.15, hysteresis=4.0)
    run = T.thermostat_cooler_run(HEAT, DUR, c, ua, duration=6 * 3600.0, cooler_conductance=ua_c,
                                  **args)
    ons, offs, t_end = _thermostat_reference(HEAT, DUR, c, ua, TA, 288.15, 6 * 3600.0, 318.15,
                                             4.0, ua_c, TA)
    assert len(run.switch_on_times) == len(ons) > 2
    np.testing.assert_allclose(run.switch_on_times, ons, atol=1e-3)
    np.testing.assert_allclose(run.switch_off_times, offs, atol=1e-3)
    assert run.final_temperature == pytest.approx(t_end, abs=1e-6)
    # stays within the band once switching (plus the overshoot inside a phase: none here)
    after = run.temperatures[run.times > ons[0]]
    assert after.max() <= 318.15 + 1e-9 and after.min() >= 318.15 - 4.0 - 1e-9
    bal = T.shift_energy_balance(run)
    assert abs(bal["relative_residual"]) < 1e-6


def test_thermostat_duty_mode_energy_and_events():
    run = T.thermostat_cooler_run(HEAT, DUR, 2e5, 30.0, TA, 300.0, 4 * 3600.0,
                                  on_temperature=315.0, hysteresis=3.0, cooler_duty=1500.0)
    assert len(run.switch_on_times) >= 1
    on_time = np.sum(np.diff(run.times)[run.cooler_on])
    # the cooler removes its duty times its on-time (energy of a constant-duty cooler)
    assert run.removed_by_cooler == pytest.approx(1500.0 * on_time, rel=1e-12)
    assert abs(T.shift_energy_balance(run)["relative_residual"]) < 1e-6


def test_thermostat_input_errors():
    with pytest.raises(HeatloadError) as err:
        T.thermostat_cooler_run(HEAT, DUR, 2e5, 30.0, TA, 300.0, 3600.0, on_temperature=315.0)
    assert err.value.field == "cooler_conductance"
    with pytest.raises(HeatloadError) as err:
        T.thermostat_cooler_run(HEAT, DUR, 2e5, 30.0, TA, 300.0, 3600.0, on_temperature=315.0,
                                hysteresis=0.0, cooler_duty=100.0)
    assert err.value.field == "hysteresis"


def test_phase_input_errors():
    with pytest.raises(HeatloadError) as err:
        T.periodic_steady_state([1.0, 2.0], [10.0], 1e5, 10.0, TA)
    assert err.value.field == "durations"
    with pytest.raises(HeatloadError) as err:
        T.periodic_steady_state([1.0], [10.0], -1e5, 10.0, TA)
    assert err.value.field == "capacity"
