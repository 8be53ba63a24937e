"""A pressure trace cut into phases and written as a draft duty cycle.

Check values: synthetic traces generated here from known phases (kind,
duration, pressure, flow, speed) with noise and valve-shift transitions;
hydraulic power P[kW] = p[bar] Q[L/min] / 600 (common practice, exact)."""

import json
from pathlib import Path

import numpy as np
import pytest

from heatload import io
from heatload.measurement import trace
from heatload.cli import main
from heatload.errors import HeatloadError

ROOT = Path(__file__).resolve().parents[2]
BAR, LPM = 1e5, 1e-3 / 60

# (kind, duration [s], pump pressure [bar], flow [L/min], speed [mm/s], + = extend)
CYCLE = [("idle", 3.0, 5.0, 0.0, 0.0), ("extend", 2.0, 40.0, 50.0, 100.0),
         ("extend", 4.0, 150.0, 5.0, 5.0), ("hold", 3.0, 165.0, 0.0, 0.0),
         ("retract", 2.5, 60.0, 50.0, -88.0)]


def _synthetic(cycles=3, dt=0.02, seed=1, cycle=CYCLE):
    rng = np.random.default_rng(seed)
    p, q, v = [], [], []
    for _ in range(cycles):
        for _, d, pb, ql, sp in cycle:
            n = int(round(d / dt))
            p += [pb] * n
            q += [ql] * n
            v += [sp] * n
    t = np.arange(len(p)) * dt
    kernel = np.ones(5) / 5.0                       # a 0.1 s valve shift
    p = np.convolve(p, kernel, "same") * BAR + rng.normal(0, 2 * BAR, len(p))
    q = np.convolve(q, kernel, "same") * LPM + rng.normal(0, 0.5 * LPM, len(q))
    x = np.cumsum(np.asarray(v) * dt) * 1e-3 + rng.normal(0, 0.2e-3, len(v))
    return t, p, q, x


def test_phases_of_a_synthetic_trace_recovered():
    t, p, q, x = _synthetic()
    cy = trace.segment_trace(t, p, q, x)
    assert cy.cycles == 3
    assert cy.period == pytest.approx(sum(c[1] for c in CYCLE), abs=0.2)
    # the draft starts after the idle: extend, extend, hold, retract, idle
    expect = CYCLE[1:] + CYCLE[:1]
    assert [ph.kind for ph in cy.phases] == [c[0] for c in expect]
    for ph, (kind, d, pb, ql, sp) in zip(cy.phases, expect):
        assert ph.duration == pytest.approx(d, abs=0.15), kind
        assert ph.pressure == pytest.approx(pb * BAR, abs=3 * BAR), kind
        assert ph.flow == pytest.approx(ql * LPM, abs=1.0 * LPM), kind
        if kind in ("extend", "retract"):
            assert ph.speed == pytest.approx(abs(sp) * 1e-3, rel=0.05), kind
            assert np.sign(ph.travel) == np.sign(sp)


def test_hydraulic_energy_is_p_times_q_integrated():
    # 100 bar x 60 L/min = 10 kW (P[kW] = p[bar] Q[L/min] / 600, common
    # practice) for 2 s = 20 kJ, between two idle phases at 5 bar and no flow
    cycle = [("idle", 2.0, 5.0, 0.0, 0.0), ("extend", 2.0, 100.0, 60.0, 50.0),
             ("idle", 2.0, 5.0, 0.0, 0.0), ("retract", 2.0, 100.0, 60.0, -50.0)]
    t, p, q, x = _synthetic(cycles=3, cycle=cycle, seed=4)
    cy = trace.segment_trace(t, p, q, x)
    moving = [ph for ph in cy.phases if ph.kind in ("extend", "retract")]
    assert len(moving) == 2
    for ph in moving:
        assert ph.power == pytest.approx(10e3, rel=0.03)
        assert ph.energy == pytest.approx(20e3, rel=0.05)


def _check(text, tmp_path, capsys, name="draft.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    code = main(["check", str(path)])
    return code, capsys.readouterr()


def test_draft_passes_check_once_completed(tmp_path, capsys):
    t, p, q, x = _synthetic()
    text = trace.draft_toml(trace.segment_trace(t, p, q, x), "synthetic.csv")
    assert "TO COMPLETE" in text and "# measured" in text
    code, out = _check(text, tmp_path, capsys)
    assert code == 2 and "'?'" in out.err                 # not yet completed
    code, out = _check(trace.fill_examples(text), tmp_path, capsys, "filled.toml")
    assert code == 0, out.err
    sc = io.load_scenario(tmp_path / "filled.toml")
    assert [ph.motion for ph in sc.phases] == ["extend", "extend", "hold", "retract", "idle"]
    assert sc.phases[2].hold_pressure == pytest.approx(165 * BAR, abs=3 * BAR)


@pytest.mark.parametrize("channels", ["pressure", "pressure+flow"])
def test_drafts_without_position_leave_the_motion_to_complete(channels, tmp_path, capsys):
    t, p, q, x = _synthetic()
    cy = trace.segment_trace(t, p, q if channels == "pressure+flow" else None)
    text = trace.draft_toml(cy, "synthetic.csv")
    assert 'motion = "?"' in text
    code, out = _check(trace.fill_examples(text), tmp_path, capsys)
    assert code == 0, out.err


def test_trace_command_writes_the_draft(tmp_path, capsys):
    demo = ROOT / "duty_cycles" / "logs" / "press_trace.csv"
    out = tmp_path / "draft.toml"
    assert main(["trace", str(demo), "-o", str(out)]) == 0
    assert "4 cycles" in capsys.readouterr().out
    assert "TO COMPLETE" in out.read_text(encoding="utf-8")
    assert main(["trace", str(demo), "-o", str(out)]) == 2      # exists, no --force
    assert "exists" in capsys.readouterr().err
    assert main(["trace", str(demo), "--json"]) == 0
    rec = json.loads(capsys.readouterr().out)
    assert rec["cycles"] == 4 and len(rec["phases"]) == 5
    assert rec["mean_power_W"] > 0


def test_trace_without_pressure_column_refused(tmp_path, capsys):
    p = tmp_path / "t.csv"
    p.write_text("time [s],flow [L/min]\n" + "\n".join(f"{i},{i}" for i in range(30)))
    assert main(["trace", str(p)]) == 2
    err = capsys.readouterr().err
    assert str(p) in err and "no pressure column" in err and "[bar]" in err


def test_too_short_trace_refused():
    with pytest.raises(HeatloadError, match="at least"):
        trace.segment_trace(np.arange(5.0), np.ones(5))


def test_any_trace_gives_a_draft_that_loads_once_completed():
    # random and degenerate traces (flat, noise, a random walk; uneven steps):
    # the segmentation never fails and its completed draft always loads
    rng = np.random.default_rng(0)
    for case in range(24):
        n = int(rng.integers(20, 2000))
        t = np.cumsum(rng.uniform(0.001, 0.5, n))
        p = [np.full(n, 1e6), rng.normal(5e6, 1e6, n),
             np.abs(np.cumsum(rng.normal(0, 1e5, n)))][case % 3]
        q = rng.uniform(0, 1e-3, n) if case % 2 else None
        x = np.cumsum(rng.normal(0, 1e-3, n)) if case % 4 == 0 else None
        cy = trace.segment_trace(t, p, q, x)
        assert cy.phases and cy.period > 0
        io.loads_scenario(trace.fill_examples(trace.draft_toml(cy, "random.csv")), "d.toml")


def test_implausible_trace_values_are_refused_with_file_and_line(tmp_path):
    # a gauge pressure below full vacuum (-1.013 bar) is no pressure a pump gives
    path = tmp_path / "t.csv"
    rows = ["time [s],pump pressure [bar],flow [L/min]"]
    rows += [f"{i},{-50 if i == 3 else 100},20" for i in range(40)]
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")
    from heatload.errors import HeatloadError
    from heatload.measurement import logs
    log = logs.read_log(str(path), trace.trace_columns(), min_rows=trace.MIN_ROWS)
    with pytest.raises(HeatloadError, match=r"-50 bar is outside the plausible") as e:
        trace.check_trace(log)
    assert e.value.line == 5                     # header on line 1, the row of t = 3 s


def test_a_trace_of_many_steps_gives_no_more_phases_than_a_file_holds():
    # 400 pressure levels of 0.5 s each that never repeat cut into about 380
    # phases; the draft merges the short ones until its cycle fits the loader's
    # 200 phases, says so, and loads once completed
    from heatload.io import MAX_PHASES
    rng = np.random.default_rng(3)
    n = 20000
    t = np.arange(n) * 0.01
    p = np.repeat(rng.uniform(1e6, 2e7, n // 50), 50) + rng.normal(0, 1e4, n)
    q = np.repeat(rng.uniform(0, 5e-4, n // 50), 50)
    assert len(trace._segment(t, p, q).phases) > MAX_PHASES
    cy = trace.segment_trace(t, p, q)
    assert len(cy.phases) <= MAX_PHASES
    assert any("merged" in note and f"({MAX_PHASES})" in note for note in cy.notes)
    io.loads_scenario(trace.fill_examples(trace.draft_toml(cy, "steps.csv")), "d.toml")
