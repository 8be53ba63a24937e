"""Variants equal the single-scenario evaluation of the changed scenario."""

import numpy as np
import pytest

from heatload import chain, checks, io, paths
from heatload.studies import variants
from heatload.errors import HeatloadError

SC = io.load_scenario(io.default_scenario_path())

FIELDS = ("heat_to_oil_uncoupled", "electric_energy_per_year", "cost_per_year", "peak_pressure",
          "oil_temperature_uncoupled", "design_heat", "cooler_duty", "cycle_time")

# (path, values in SI) -- a sample of paths, each through a different derivation
CASES = [
    ("power_unit.pump.displacement", [20e-6, 33e-6]),        # flows, stroke durations
    ("power_unit.pump.volumetric_efficiency", [0.88, 0.96]),  # Wilson coefficients
    ("power_unit.relief.cracking_pressure", [170e5, 200e5]),  # relief, default compensator
    ("actuators.main.bore", [0.09, 0.11]),                    # areas, flows, compression volume
    ("phases[3].load", [100e3, 130e3]),
    ("phases[*].duration", [2.0, 6.0]),
    ("ambient.temperature_max", [307.15, 315.15]),
    ("strategies.load-sensing.load_sensing_margin", [15e5, 30e5]),
    ("reservoir.heat_transfer_coefficient", [6.0, 12.0]),
]


@pytest.mark.parametrize("path,vals", CASES)
@pytest.mark.parametrize("strategy", ["meter-in", "load-sensing"])
def test_variant_equals_replaced_scenario(path, vals, strategy):
    # two variants in one call against each changed scenario alone (1e-12 relative)
    many = variants.evaluate_variants(SC, strategy, {path: np.array(vals)})
    for i, v in enumerate(vals):
        one = variants.evaluate_variants(paths.replaced_scenario(SC, {path: v}), strategy)
        for f in FIELDS + ("oil_temperature_steady",):
            np.testing.assert_allclose(getattr(many, f)[i], getattr(one, f)[0], rtol=1e-12,
                                       err_msg=f"{path} {f}")
        for code in checks.PHASE_CODES:
            assert many.warnings[code][i] == one.warnings[code][0]


def test_unknown_path_names_nearest():
    with pytest.raises(HeatloadError) as e:
        variants.evaluate_variants(SC, "meter-in", {"power_unit.pump.displacment": [30e-6]})
    assert "power_unit.pump.displacement" in str(e.value)
    assert e.value.field == "power_unit.pump.displacment"


def test_bad_values_and_lengths():
    with pytest.raises(HeatloadError):
        variants.evaluate_variants(SC, "meter-in", {"power_unit.pump.volumetric_efficiency": [1.2]})
    with pytest.raises(HeatloadError):
        variants.evaluate_variants(SC, "meter-in", {"actuators.main.bore": [0.1, 0.11],
                                                    "phases[3].load": [1e5]})


def test_index_and_name_paths_agree():
    a = variants.evaluate_variants(SC, "meter-in", {"actuators[0].bore": [0.095]})
    b = variants.evaluate_variants(SC, "meter-in", {"actuators.main.bore": [0.095]})
    np.testing.assert_array_equal(a.electric_energy_per_year, b.electric_energy_per_year)


def test_heat_grows_with_relief_setting_meter_in():
    # meter-in throttles the whole relief pressure: more relief, more heat
    # (P = p Q, common practice)
    r = variants.evaluate_variants(SC, "meter-in", {"power_unit.relief.cracking_pressure":
                                                    np.linspace(170e5, 210e5, 5)}, thermal=False)
    assert np.all(np.diff(r.heat_to_oil_uncoupled) > 0)


@pytest.mark.parametrize("path,vals", CASES[:6])
def test_design_mode_equals_replaced_scenario_and_full_mode(path, vals):
    # one solve at the design temperature: the cooler duty and the design heat
    # are exactly those of the full evaluation (the same design-point solve)
    design = variants.evaluate_variants(SC, "meter-in", {path: np.array(vals)}, thermal="design")
    full = variants.evaluate_variants(SC, "meter-in", {path: np.array(vals)})
    np.testing.assert_allclose(design.cooler_duty, full.cooler_duty, rtol=1e-12)
    np.testing.assert_allclose(design.design_heat, full.design_heat, rtol=1e-12)
    for i, v in enumerate(vals):
        one = variants.evaluate_variants(paths.replaced_scenario(SC, {path: v}), "meter-in",
                                         thermal="design")
        for f in ("heat_to_oil", "electric_energy_per_cycle", "peak_pressure", "cooler_duty",
                  "oil_temperature_uncoupled"):
            np.testing.assert_allclose(getattr(design, f)[i], getattr(one, f)[0], rtol=1e-12)
    assert np.all(np.isnan(design.oil_temperature_steady))


def test_design_mode_heat_is_the_chain_design_heat():
    cmp = chain.compare(SC)
    for o in cmp.outcomes:
        v = variants.evaluate_variants(SC, o.strategy, thermal="design")
        np.testing.assert_allclose(v.heat_to_oil[0], o.thermal.design_heat, rtol=1e-12)
        np.testing.assert_allclose(v.cooler_duty[0], o.thermal.cooler_duty, rtol=1e-12)


def test_sweeps_count_the_correlation_range():
    # A 6 m x 5 m tank bottom exposed 40 K above the air: Ra ~ 8e9, beyond the
    # 1e4..1e9 of the hot-face-down plate correlation (Incropera et al., 7th ed.,
    # eq. 9.32); a sweep counts it as compare lists it.
    import dataclasses
    big = dataclasses.replace(SC.reservoir, length=6.0, width=5.0, bottom_exposed=True)
    sc = dataclasses.replace(SC, reservoir=big)
    meter_in = next(s for s in sc.strategies if s.kind == "meter-in")
    res = variants.evaluate_variants(sc, meter_in, {"ambient.temperature": [298.15, 303.15]})
    listed = [w for o in chain.compare(sc).outcomes if o.strategy.name == meter_in.name
              for w in o.warnings if w.code == "correlation-range"]
    assert len(listed) == 1
    assert res.warnings["correlation-range"][0] == 1


def test_chunks_on_two_threads_give_the_same_figures(monkeypatch):
    """evaluate_chunks: each chunk is evaluated on its own, so running them on
    two threads (HEATLOAD_THREADS=2) gives the figures of one thread, in order."""
    from heatload import io
    from heatload.studies import variants as vr

    sc = io.load_scenario(io.default_scenario_path())
    vals = {"power_unit.pump.displacement": np.linspace(16e-6, 40e-6, 23)}
    monkeypatch.setenv("HEATLOAD_THREADS", "1")
    one = vr.concat(vr.evaluate_chunks(sc, "meter-in", vals, 23, 5))
    monkeypatch.setenv("HEATLOAD_THREADS", "2")
    done = []
    two = vr.concat(vr.evaluate_chunks(sc, "meter-in", vals, 23, 5, done=done.append))
    assert done == [5, 5, 5, 5, 3]
    np.testing.assert_array_equal(one.cooler_duty, two.cooler_duty)
    np.testing.assert_array_equal(one.electric_energy_per_cycle, two.electric_energy_per_cycle)


@pytest.mark.parametrize("given", ["two", "0", "-1", "1.5"])
def test_a_thread_count_that_is_not_one_is_refused(monkeypatch, given):
    monkeypatch.setenv("HEATLOAD_THREADS", given)
    with pytest.raises(HeatloadError, match="HEATLOAD_THREADS"):
        variants.threads()


def test_threads_never_exceed_the_cores(monkeypatch):
    import os
    monkeypatch.setenv("HEATLOAD_THREADS", "1000")
    assert variants.threads() == (os.cpu_count() or 1)


def test_design_mode_does_not_call_the_design_heat_uncoupled():
    """One name, one quantity: 'uncoupled' heat is the heat at the reference
    temperature (as compare reports it); the design-point sweep does not solve
    there, so the column is empty rather than the design heat again."""
    d = variants.evaluate_variants(SC, "load-sensing", thermal="design")
    full = variants.evaluate_variants(SC, "load-sensing")
    assert np.isnan(d.heat_to_oil_uncoupled[0])
    assert np.isfinite(full.heat_to_oil_uncoupled[0])
    np.testing.assert_allclose(d.design_heat, full.design_heat, rtol=1e-12)
