"""heatload sweep: spec parsing, grid values, Pareto front, the command."""

import argparse

import numpy as np
import pytest

from heatload import io, paths
from heatload.cli import sweep as sweep_cli
from heatload.studies import sweep, variants
from heatload.errors import HeatloadError

SC = io.load_scenario(io.default_scenario_path())


def test_parse_units():
    s = sweep.parse_vary("power_unit.pump.displacement=16..40cm^3:13", SC)
    assert s.low == pytest.approx(16e-6) and s.high == pytest.approx(40e-6) and s.count == 13
    s = sweep.parse_vary("actuators.main.bore=63mm..0.1m:8", SC)
    assert s.low == pytest.approx(0.063) and s.high == pytest.approx(0.1)
    s = sweep.parse_vary("ambient.temperature_max=34..42degC:5", SC)
    assert s.low == pytest.approx(307.15)


@pytest.mark.parametrize("spec", [
    "actuators.main.bore=63..100bar:8",      # wrong unit kind
    "actuators.mian.bore=63..100mm:8",       # unknown path
    "actuators.main.bore=100..63mm:8",       # LOW > HIGH
    "actuators.main.bore=63..100mm:0",       # N < 1
    "actuators.main.bore=63..100mm:x",       # malformed N
    "actuators.main.bore 63-100mm",          # malformed
    "actuators.main.bore=63..100mm",         # no N on a grid
])
def test_bad_specs_name_the_spec(spec):
    with pytest.raises(HeatloadError) as e:
        sweep.parse_vary(spec, SC)
    assert spec in e.value.one_line() and "\n" not in e.value.one_line()


def test_grid_is_every_combination():
    a = sweep.parse_vary("actuators.main.bore=90..110mm:3", SC)
    b = sweep.parse_vary("power_unit.pump.displacement=20..40cm^3:4", SC)
    g = sweep.grid_values([a, b])
    pairs = set(zip(np.round(g[a.path], 9), np.round(g[b.path], 9)))
    assert len(g[a.path]) == 12 and len(pairs) == 12


def _brute(x, y):
    n = len(x)
    out = np.ones(n, bool)
    for i in range(n):
        for j in range(n):
            if x[j] <= x[i] and y[j] <= y[i] and (x[j] < x[i] or y[j] < y[i]):
                out[i] = False
                break
    return out


@pytest.mark.parametrize("seed", range(5))
def test_pareto_front_matches_brute_force(seed):
    rng = np.random.default_rng(seed)
    x = rng.integers(0, 15, 200).astype(float)   # integers: many ties and duplicates
    y = rng.integers(0, 15, 200).astype(float)
    np.testing.assert_array_equal(sweep.pareto_front(x, y), _brute(x, y))


def test_sweep_rows_equal_single_scenarios(tmp_path):
    spec = [sweep.parse_vary("power_unit.pump.displacement=20..36cm^3:3", SC),
            sweep.parse_vary("actuators.main.bore=95..105mm:2", SC)]
    values = sweep.grid_values(spec)
    df = sweep.run_sweep(SC, values, [SC.strategy("bleed-off")], chunk=4)   # two chunks
    for i in (0, 3, 5):
        one = variants.evaluate_variants(
            paths.replaced_scenario(SC, {k: v[i] for k, v in values.items()}), "bleed-off")
        np.testing.assert_allclose(df["cooler_duty_W"][i], one.cooler_duty[0], rtol=1e-12)
        np.testing.assert_allclose(df["electric_energy_per_year_kWh"][i] * 3.6e6,
                                   one.electric_energy_per_year[0], rtol=1e-12)


def _args(tmp_path, **kw):
    base = dict(file=None, vary=["actuators.main.bore=95..105mm:3"], strategy=["meter-in"],
                samples=None, seed=1, output=str(tmp_path / "out.csv"), force=False, top=3,
                units="si")
    base.update(kw)
    return argparse.Namespace(**base)


def test_cli_writes_and_refuses_overwrite(tmp_path, capsys):
    assert sweep_cli.run(_args(tmp_path)) == 0
    out = capsys.readouterr().out
    assert "Pareto front" in out
    import pandas as pd
    assert len(pd.read_csv(tmp_path / "out.csv")) == 3
    with pytest.raises(HeatloadError):
        sweep_cli.run(_args(tmp_path))
    assert sweep_cli.run(_args(tmp_path, force=True)) == 0
    assert sweep_cli.run(_args(tmp_path, output=str(tmp_path / "o.parquet"), samples=4,
                               vary=["actuators.main.bore=95..105mm"])) == 0
    assert len(pd.read_parquet(tmp_path / "o.parquet")) == 4


def _single_phase_scenario():
    import tomllib
    data = tomllib.loads(io.default_scenario_path().read_text())
    data["phases"] = [p for p in data["phases"] if p.get("motion") == "extend"][:1]
    data.pop("uncertainty", None)
    return io.scenario_from_dict(data, "single.toml")


@pytest.mark.parametrize("coupled", [False, True])
def test_a_single_phase_cycle_sweeps(coupled):
    """A cycle of one phase once crashed every sweep ('indices and arr must have the
    same number of dimensions'); a variant equal to the scenario gives the figures
    of the single-scenario evaluation (N = 1)."""
    sc = _single_phase_scenario()
    spec = [sweep.parse_vary("power_unit.relief.cracking_pressure=170..190bar:3", sc)]
    values = sweep.grid_values(spec)
    thermal = True if coupled else "design"
    df = sweep.run_sweep(sc, values, [sc.strategy("meter-in")], thermal=thermal)
    assert len(df) == 3 and np.all(np.isfinite(df["cooler_duty_W"]))
    one = variants.evaluate_variants(
        paths.replaced_scenario(sc, {k: v[1] for k, v in values.items()}), "meter-in",
        thermal=thermal)
    np.testing.assert_allclose(df["cooler_duty_W"][1], one.cooler_duty[0], rtol=1e-12)


def test_the_file_ranks_as_the_text_and_marks_infeasible_variants(tmp_path, capsys):
    """The table's feasible / rank / cost-of-ownership columns are the ones the
    text lists by: sorted by rank, the file gives the text's order; a pump too
    small for a phase's speed is marked infeasible and ranked after every
    feasible variant."""
    import re

    import pandas as pd

    names = [s.name for s in SC.strategies]
    n = 5 * len(names)
    frames = {}
    for suffix in (".csv", ".parquet"):
        out = tmp_path / f"rank{suffix}"
        assert sweep_cli.run(_args(tmp_path, vary=["power_unit.pump.displacement=6..40cm^3:5"],
                                   strategy=None, top=n, output=str(out))) == 0
        text = capsys.readouterr().out
        frames[suffix] = pd.read_csv(out) if suffix == ".csv" else pd.read_parquet(out)
    pd.testing.assert_frame_equal(frames[".csv"], frames[".parquet"], check_dtype=False)
    df = frames[".csv"]
    best = text.split(f"best {n} by yearly cost of ownership per cycle")[1].split("\n\n")[0]
    shown = [re.split(r"\s{2,}", line.strip()) for line in best.splitlines()
             if line.split(" ")[0] in names]
    assert len(shown) == n
    by_rank = df.sort_values("rank")
    assert list(by_rank["rank"]) == list(range(1, n + 1))
    assert [r[0] for r in shown] == list(by_rank["strategy"])
    np.testing.assert_allclose([float(r[1]) for r in shown],
                               by_rank["power_unit.pump.displacement_m3_rev"] * 1e6, rtol=5e-3)

    # feasible first, then by the cost of ownership per cycle
    ok = by_rank["feasible"].to_numpy(bool)
    assert ok.any() and not ok.all() and not np.any(ok[1:] & ~ok[:-1])
    assert np.all(np.diff(by_rank["cost_of_ownership_per_cycle"][ok]) >= 0)
    cycles = SC.economics.hours_per_year * 3600.0 / df["cycle_time_s"]
    np.testing.assert_allclose(df["cost_of_ownership_per_cycle"] * cycles,
                               df["cost_of_ownership_per_year"], rtol=1e-12)

    # continuity (common practice): a pump delivers at most V n (x the speed-up a
    # variable-speed drive allows); the slow-down phase needs A v = pi/4 D^2 v, so
    # a 6 cm^3 pump at 1,450 rpm (1.45e-4 m^3/s) cannot move the 100 mm bore at
    # 40 mm/s (3.14e-4 m^3/s)
    phase = next(p for p in SC.phases if p.name == "slow-down")
    bore = next(a for a in SC.actuators if a.name == phase.actuator).bore
    need = np.pi / 4 * bore ** 2 * phase.speed
    speed_up = max(1.0, max(s.parameters.max_speed_fraction for s in SC.strategies))
    most = df["power_unit.pump.displacement_m3_rev"] * SC.power_unit.pump.shaft_speed * speed_up
    short = (most < need).to_numpy()
    assert short.sum() == len(names)                     # the 6 cm^3 row of every strategy
    assert not df["feasible"][short].any()
    assert df["rank"][short].min() > df["rank"][df["feasible"]].max()


def test_the_cost_of_ownership_counts_each_strategys_circuit_price():
    """A variant needing no cooler costs its electricity plus the annuity of its
    circuit's price: the baler's variable-speed drive (1,500 EUR) over 10 years
    at 5 % adds 1,500 x 0.1295 = 194.25 EUR a year (capital recovery factor
    0.1295 for 5 % and 10 years, annuity tables), meter-in (price 0) nothing."""
    sc = io.load_scenario(io.example_paths()[0].with_name("accumulator_baler.toml"))
    assert (sc.economics.interest_rate, sc.economics.service_life) == (0.05, 10.0)
    spec = [sweep.parse_vary("ambient.temperature_max=20..40degC:3", sc)]
    df = sweep.run_sweep(sc, sweep.grid_values(spec), sc.strategies)
    extra = df["cost_of_ownership_per_year"] - df["cost_per_year"]
    none = (df["cooler_duty_W"] <= 0).to_numpy()
    vs = (df["strategy"] == "variable-speed").to_numpy()
    assert (none & vs).sum() == 3
    np.testing.assert_allclose(extra[none & vs], 1500 * 0.1295, rtol=5e-4)
    # with a cooler, its price and fan come on top (and no circuit price for meter-in)
    assert np.all(extra[~none] > 0)
