"""The tank model fitted to a temperature log.

Check values: synthetic logs generated here from known heat capacity,
conductance and heat (with noise and a drifting ambient); the model's exact
solution against scipy.integrate.solve_ivp of the same ODE (an independent
solver); the first-order step response 1 - 1/e at one time constant
(textbook, any text on first-order systems)."""

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from heatload.measurement import logfit
from heatload.cli import main
from heatload.errors import HeatloadError

K0 = 273.15
# invented machine: C = 600 kJ/K (about 250 L of oil and 300 kg of steel), UA 55 W/K,
# 4 kW into the oil while running: tau = C / UA = 3.0 h
C, UA, P = 600e3, 55.0, 4000.0


def _drifting_ambient(t):
    """An air temperature that warms by 6 K over the day and wanders."""
    return K0 + 18.0 + 6.0 * np.sin(np.pi * t / 86400.0) + 0.8 * np.sin(2 * np.pi * t / 5400.0)


def _warm_up_cool_down(seed, noise=0.2, step=60.0, hours_on=9.0, hours_off=7.0):
    """A start from cold, a shift with a break, then the cool-down."""
    rng = np.random.default_rng(seed)
    t = np.arange(0.0, (hours_on + hours_off) * 3600.0 + 1.0, step)
    ta = _drifting_ambient(t)
    h = t / 3600.0
    run = ((h < 4.0) | ((h >= 4.5) & (h < hours_on))).astype(float)
    true = logfit.tank_temperatures(t, ta, run, P / C, UA / C, K0 + 15.0)
    return t, true + rng.normal(0.0, noise, t.size), ta, run


def test_step_response_at_one_time_constant():
    # first-order step: 1 - exp(-1) = 0.63212 of the steady rise after one tau
    tau = C / UA
    t = np.array([0.0, tau])
    T = logfit.tank_temperatures(t, [K0 + 20, K0 + 20], 1.0, P / C, UA / C, K0 + 20)
    assert (T[1] - (K0 + 20)) / (P / UA) == pytest.approx(1 - math.exp(-1), rel=1e-12)


def test_exact_solution_matches_solve_ivp_with_gaps_and_drift():
    # uneven sampling with gaps of 5 and 40 minutes; ambient linear between the
    # samples (as the model takes it); running switches at sample times
    rng = np.random.default_rng(3)
    t = np.cumsum(np.concatenate(([0.0], rng.uniform(20.0, 90.0, 300))))
    t[150:] += 300.0
    t[220:] += 2400.0
    ta = _drifting_ambient(t)
    run = (np.sin(t / 2000.0) > -0.3).astype(float)

    def rhs(time, y):
        k = min(np.searchsorted(t, time, side="right") - 1, len(t) - 2)
        return [(P * run[k] - UA * (y[0] - np.interp(time, t, ta))) / C]

    T0 = K0 + 12.0
    model = logfit.tank_temperatures(t, ta, run, P / C, UA / C, T0)
    # integrate piece by piece so the solver never steps across a switch
    y, ref = T0, [T0]
    for a, b in zip(t[:-1], t[1:]):
        sol = solve_ivp(rhs, (a, b), [y], rtol=1e-11, atol=1e-11, method="DOP853",
                        t_eval=[b])
        y = sol.y[0, -1]
        ref.append(y)
    assert np.max(np.abs(model - np.array(ref))) < 1e-6


def test_long_log_against_plain_recurrence():
    # a log of 1000 time constants: the closed form runs in blocks; each step
    # must agree with the one-step exact formula
    t = np.arange(0.0, 1000 * 600.0, 37.0)
    ta = _drifting_ambient(t)
    run = (np.sin(t / 900.0) > 0).astype(float)
    k = 1 / 600.0
    model = logfit.tank_temperatures(t, ta, run, 0.01, k, K0 + 30)
    theta = model[:-1] - ta[:-1]
    h = np.diff(t)
    inf = 0.01 * run[:-1] / k - np.diff(ta) / h / k
    one_step = ta[1:] + inf + (theta - inf) * np.exp(-k * h)
    assert np.max(np.abs(model[1:] - one_step)) < 1e-9


def test_warm_up_and_cool_down_recovered_within_3_percent_and_own_interval():
    t, y, ta, run = _warm_up_cool_down(seed=11)
    fit = logfit.fit_tank_log(t, y, ta, run, capacity=C)
    assert fit.fully_identified, fit.notes
    assert fit.heat == pytest.approx(P, rel=0.03)
    assert fit.conductance == pytest.approx(UA, rel=0.03)
    assert fit.time_constant == pytest.approx(C / UA, rel=0.03)
    for name, true in (("heat", P), ("conductance", UA), ("time_constant", C / UA),
                       ("initial_temperature", K0 + 15.0)):
        lo, hi = fit.intervals[name]
        assert lo <= true <= hi, (name, lo, true, hi)
    assert fit.residual_rms == pytest.approx(0.2, rel=0.15)   # the noise put in


@pytest.mark.parametrize("rho", [0.0, 0.8])
def test_intervals_cover_the_truth_about_as_often_as_they_claim(rho):
    # 95 % intervals over 40 independent noisy logs: the truth is inside in
    # about 38 of 40; fewer than 33 would mean the intervals are too narrow
    # (binomial, n = 40, p = 0.95: P(X <= 32) < 0.1 %).  rho = 0.8: the noise
    # is AR(1) with that lag-1 correlation (a slow sensor, drift), which the
    # widening of the intervals must cover too
    hits = {"heat": 0, "conductance": 0}
    for seed in range(40):
        t, y, ta, run = _warm_up_cool_down(seed, noise=0.0, step=120.0)
        rng = np.random.default_rng(1000 + seed)
        noise = np.empty(t.size)
        noise[0] = rng.normal(0.0, 0.5)
        shocks = rng.normal(0.0, 0.5 * math.sqrt(1 - rho ** 2), t.size)
        for i in range(1, t.size):
            noise[i] = rho * noise[i - 1] + shocks[i]
        fit = logfit.fit_tank_log(t, y + noise, ta, run, capacity=C)
        for name, true in (("heat", P), ("conductance", UA)):
            lo, hi = fit.intervals[name]
            hits[name] += lo <= true <= hi
    assert min(hits.values()) >= 33, hits


def test_without_capacity_only_rates_and_time_constant():
    t, y, ta, run = _warm_up_cool_down(seed=5)
    fit = logfit.fit_tank_log(t, y, ta, run)
    assert fit.heat is None and fit.conductance is None
    assert fit.time_constant == pytest.approx(C / UA, rel=0.03)
    assert fit.temperature_rise == pytest.approx(P / UA, rel=0.03)
    rec = logfit.fit_record(fit)
    assert rec["heat_W"] is None and rec["time_constant_s"] > 0


def test_short_log_says_it_cannot_identify_the_conductance():
    # 40 minutes of a 3 h time constant with 0.3 K noise: only the slope shows
    t, y, ta, run = _warm_up_cool_down(seed=2, noise=0.3, step=30.0, hours_on=0.67,
                                       hours_off=0.0)
    fit = logfit.fit_tank_log(t, y, ta, run, capacity=C)
    assert not fit.identified["conductance"]
    assert any("short against the time constant" in n for n in fit.notes)


def test_steady_log_without_contrast_says_so():
    # running throughout at the steady temperature, constant air: only P/UA shows
    rng = np.random.default_rng(4)
    t = np.arange(0.0, 10 * 3600.0, 60.0)
    ta = np.full(t.size, K0 + 20.0)
    y = K0 + 20.0 + P / UA + rng.normal(0.0, 0.2, t.size)
    fit = logfit.fit_tank_log(t, y, ta, np.ones(t.size), capacity=C)
    assert not fit.identified["conductance"] and not fit.identified["heat"]
    text = " ".join(fit.notes)
    assert "hardly changes" in text and "running/stopped contrast" in text
    # a flat line fits a well-insulated tank with little heat as well as this one:
    # the interval must not claim to know the heat
    lo, hi = fit.intervals["heat"]
    assert hi - lo > P


def test_never_running_fits_the_cooling_only():
    t = np.arange(0.0, 8 * 3600.0, 60.0)
    ta = np.full(t.size, K0 + 20.0)
    y = logfit.tank_temperatures(t, ta, 0.0, 0.0, UA / C, K0 + 70.0)
    fit = logfit.fit_tank_log(t, y, ta, np.zeros(t.size), capacity=C)
    assert fit.conductance == pytest.approx(UA, rel=1e-4)
    assert not fit.identified["heat"]
    assert any("never runs" in n for n in fit.notes)


def test_bad_arrays_refused():
    t = np.arange(20.0)
    with pytest.raises(HeatloadError, match="at least"):
        logfit.fit_tank_log(t[:5], t[:5] + 300, 293.0)
    with pytest.raises(HeatloadError, match="increase"):
        logfit.fit_tank_log(t[::-1], t + 300, 293.0)
    with pytest.raises(HeatloadError, match="heat capacity"):
        logfit.fit_tank_log(t, t + 300, 293.0, capacity=-1.0)


def _csv(path, t, y, ta, run):
    lines = ["# synthetic log of a test", "time [s],oil temperature [degC],ambient [degC],running"]
    lines += [f"{a:.0f},{b - K0:.3f},{c - K0:.3f},{int(d)}" for a, b, c, d in zip(t, y, ta, run)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def test_command_line_json_keys_and_recovery(tmp_path, capsys):
    import json
    t, y, ta, run = _warm_up_cool_down(seed=21)
    p = _csv(tmp_path / "log.csv", t, y, ta, run)
    assert main(["logfit", str(p), "--heat-capacity", "600 kJ/K", "--json"]) == 0
    rec = json.loads(capsys.readouterr().out)
    for key in ("heat_W", "conductance_W_K", "heat_capacity_J_K", "time_constant_s"):
        assert key in rec and f"{key}_interval" in rec
    assert rec["heat_W"] == pytest.approx(P, rel=0.03)
    assert rec["conductance_W_K"] == pytest.approx(UA, rel=0.03)
    assert rec["heat_capacity_J_K"] == pytest.approx(C)
    assert rec["caution"]


def test_command_line_writes_the_page_atomically(tmp_path, capsys):
    t, y, ta, run = _warm_up_cool_down(seed=22, step=300.0)
    p = _csv(tmp_path / "log.csv", t, y, ta, run)
    out = tmp_path / "fit.html"
    assert main(["logfit", str(p), "--heat-capacity", "600 kJ/K", "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert "Temperature log fit" in text and "plotly" in text.lower()
    assert main(["logfit", str(p), "--heat-capacity", "600 kJ/K", "-o", str(out)]) == 2
    assert "exists" in capsys.readouterr().err
    assert not [f for f in tmp_path.iterdir() if "heatload-tmp" in f.name]


def test_logfit_imports_no_coolprop_or_dash(tmp_path):
    import subprocess
    import sys
    t, y, ta, run = _warm_up_cool_down(seed=23, step=600.0)
    p = _csv(tmp_path / "log.csv", t, y, ta, run)
    code = ("import sys; from heatload.cli import main; "
            f"main(['logfit', {str(p)!r}, '--heat-capacity', '600 kJ/K', '--json']); "
            "bad = [m for m in ('CoolProp', 'dash') if m in sys.modules]; "
            "sys.exit(1 if bad else 0)")
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert r.returncode == 0, r.stderr


def test_scenario_gives_capacity_calibration_and_duty(capsys):
    import json
    from pathlib import Path
    root = Path(__file__).resolve().parents[2]
    log = root / "duty_cycles" / "logs" / "platform_lift_day.csv"
    scen = root / "duty_cycles" / "platform_lift.toml"
    assert main(["logfit", str(log), "--scenario", str(scen), "--json"]) == 0
    rec = json.loads(capsys.readouterr().out)
    c = rec["scenario"]
    # the demo log was made with 1.5 kW, UA 24 W/K, C 150 kJ/K; the scenario's own
    # C (from its oil and steel) scales the watts by C_scenario / 150 kJ/K
    ratio = rec["heat_capacity_J_K"] / 150e3
    assert rec["heat_W"] == pytest.approx(1500.0 * ratio, rel=0.03)
    assert rec["conductance_W_K"] == pytest.approx(24.0 * ratio, rel=0.03)
    assert c["heat_calibration_factor"] == pytest.approx(c["measured_heat_W"] / c["model_heat_W"])
    # the duty from the measurement is the first-law balance of the scaled design point
    q, ua = c["measured_design_heat_W"], c["measured_design_conductance_W_K"]
    expect = max(0.0, q - ua * (c["design_oil_temperature_C"] - c["design_ambient_C"]))
    assert c["measured_cooler_duty_W"] == pytest.approx(expect * (1 + c["margin"]), rel=1e-9)
    assert c["strategy"] == "meter-out"                 # the lift's present circuit
    assert main(["logfit", str(log), "--scenario", str(scen), "--strategy", "load-sensing",
                 "--json"]) == 0
    other = json.loads(capsys.readouterr().out)["scenario"]
    assert other["strategy"] == "load-sensing"
    assert other["heat_calibration_factor"] == pytest.approx(
        other["measured_heat_W"] / other["model_heat_W"])
    assert main(["logfit", str(log), "--scenario", str(scen), "--strategy", "nozzle"]) == 2
    assert "unknown strategy" in capsys.readouterr().err


def test_a_flat_log_identifies_neither_heat_nor_conductance():
    # a log at one steady temperature without stops carries only P/UA (the steady
    # rise), however perfectly a flat line fits it (first-order tank model)
    t = np.arange(200) * 60.0
    fit = logfit.fit_tank_log(t, np.full(200, 298.15), 293.15, np.ones(200), capacity=1e5)
    assert not fit.identified["heat"] and not fit.identified["conductance"]
    assert any("hardly changes" in n or "steady rise" in n for n in fit.notes)


def test_negative_heat_while_running_is_not_identified():
    # the oil cooling while the machine runs: losses cannot take heat out of the oil
    t = np.arange(300) * 60.0
    oil = 283.15 + 50.0 * np.exp(-t / 3600.0)       # settles 10 K below the air
    fit = logfit.fit_tank_log(t, oil, 293.15, np.ones(300), capacity=1e5)
    assert fit.heat_rate < 0.0
    assert not fit.identified["heat"]
    assert any("negative" in n for n in fit.notes)


@pytest.mark.parametrize("seed", range(1, 9))
def test_a_flat_hot_log_with_noise_never_ends_in_an_error(tmp_path, capsys, seed):
    # oil held at 55 degC by a running pump, a 0.2 K sensor noise, 0.01 K logger
    # resolution: k -> 0 and k -> inf fit such a line equally well, and the fit
    # must stay finite and say the log does not identify UA or P (first-order tank)
    rng = np.random.default_rng(seed)
    t = np.arange(500) * 10.0
    oil = K0 + 55.0 + np.round(rng.normal(0.0, 0.2, t.size), 2)
    p = _csv(tmp_path / "flat.csv", t, oil, np.full(t.size, K0 + 20.0), np.ones(t.size))
    assert main(["logfit", str(p), "--heat-capacity", "600 kJ/K", "--json"]) == 0
    import json
    rec = json.loads(capsys.readouterr().out)
    assert not rec["identified"]["conductance_W_K"] and not rec["identified"]["heat_W"]
    assert rec["time_constant_s"] > 0.0


def test_an_error_inside_the_fit_names_the_log(tmp_path, monkeypatch):
    # whatever the fit refuses, the message names the file it came from
    from heatload.measurement import measured
    t, y, ta, run = _warm_up_cool_down(seed=24, step=600.0)
    p = _csv(tmp_path / "log.csv", t, y, ta, run)
    log = measured.read_temperature_log(p)

    def refuse(*args, **kwargs):
        raise HeatloadError("the loss rate UA / C must be positive [1/s]", field="loss_rate")

    monkeypatch.setattr(logfit, "fit_tank_log", refuse)
    with pytest.raises(HeatloadError) as e:
        measured.fit_log(log, C)
    assert e.value.one_line().startswith(f"{p}: loss_rate:")

    def overflow(*args, **kwargs):
        raise FloatingPointError("overflow encountered in exp")

    monkeypatch.setattr(logfit, "fit_tank_log", overflow)
    with pytest.raises(HeatloadError) as e:
        measured.fit_log(log, C)
    assert e.value.one_line().startswith(f"{p}: ") and "\n" not in e.value.one_line()


def test_chunked_recurrence_matches_the_one_step_formula_at_every_time_constant():
    # uneven steps; from a time constant far below the step (exp(-hk) underflows)
    # to one far above the log (hk ~ 1e-9): each step the exact one-step formula
    rng = np.random.default_rng(5)
    t = np.cumsum(np.concatenate(([0.0], rng.uniform(0.5, 30.0, 20000))))
    ta = _drifting_ambient(t)
    run = (np.sin(t / 700.0) > 0).astype(float)
    for k in (1e3, 1.0, 1e-3, 1e-9):
        model = logfit.tank_temperatures(t, ta, run, 0.002, k, K0 + 30)
        theta = model[:-1] - ta[:-1]
        h = np.diff(t)
        inf = 0.002 * run[:-1] / k - np.diff(ta) / h / k
        one_step = ta[1:] + inf + (theta - inf) * np.exp(-k * h)
        scale = max(1.0, float(np.max(np.abs(inf))))
        assert np.max(np.abs(model[1:] - one_step)) < 1e-9 * scale, k


def test_a_long_log_scanned_thinned_fits_as_the_whole_log(monkeypatch):
    # 250,000 samples at 1 s (three shifts with stops and nights): the scan for the
    # time constant runs on a thinned log, the fit itself on every sample; it must
    # recover the invented machine and land where a scan of the whole log does
    rng = np.random.default_rng(31)
    t = np.arange(250_000) * 1.0
    ta = _drifting_ambient(t)
    day = t % 86400.0
    run = ((day < 4 * 3600) | ((day >= 4.5 * 3600) & (day < 9 * 3600))).astype(float)
    y = logfit.tank_temperatures(t, ta, run, P / C, UA / C, K0 + 15) + rng.normal(0, 0.2, t.size)
    assert t.size > logfit._SCAN_SAMPLES
    fit = logfit.fit_tank_log(t, y, ta, run, capacity=C)
    assert fit.heat == pytest.approx(P, rel=0.03) and fit.conductance == pytest.approx(UA, rel=0.03)
    for name, true in (("heat", P), ("conductance", UA)):
        lo, hi = fit.intervals[name]
        assert lo <= true <= hi
    monkeypatch.setattr(logfit, "_SCAN_SAMPLES", 10 ** 9)
    whole = logfit.fit_tank_log(t, y, ta, run, capacity=C)
    assert fit.conductance == pytest.approx(whole.conductance, rel=1e-5)
    assert fit.heat == pytest.approx(whole.heat, rel=1e-5)
