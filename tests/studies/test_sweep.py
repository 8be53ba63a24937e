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
