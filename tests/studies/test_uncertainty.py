"""Monte Carlo of the cooler duty and sensitivity ranking."""

import dataclasses

import numpy as np
import pytest

from heatload import io
from heatload.studies import uncertainty, variants
from heatload.model import UncertainInput

SC = io.load_scenario(io.default_scenario_path())


def _only(*inputs):
    return dataclasses.replace(SC, uncertainty=tuple(inputs))


def test_reproducible_and_ordered():
    sc = _only(UncertainInput("phases[*].load", "uniform", 0.9, 1.1),
               UncertainInput("power_unit.pump.volumetric_efficiency", "normal", 0.97, 1.03))
    a = uncertainty.monte_carlo(sc, "load-sensing", samples=10000, seed=7)
    b = uncertainty.monte_carlo(sc, "load-sensing", samples=10000, seed=7)
    np.testing.assert_array_equal(a.cooler_duty, b.cooler_duty)
    assert a.cooler_duty.shape == (10000,)
    for key in ("cooler_duty_W", "oil_temperature_C"):
        p = a.percentiles[key]
        assert p["P50"] <= p["P90"] <= p["P95"]
    c = uncertainty.monte_carlo(sc, "load-sensing", samples=200, seed=8)
    assert not np.array_equal(a.cooler_duty[:200], c.cooler_duty)


def test_linear_input_gives_analytic_quantiles():
    # duty = D0 (1 + m) with the margin m ~ U(a, b): the quantile function of the
    # uniform distribution F^-1(p) = a + p (b - a) maps through the linear law.
    a, b = 0.1, 0.3
    sc = _only(UncertainInput("cooler.margin", "uniform", a, b, relative=False))
    r = uncertainty.monte_carlo(sc, "meter-in", samples=4000, seed=2)
    d0 = variants.evaluate_variants(SC, "meter-in").cooler_duty_without_margin[0]
    for p in (50, 90, 95):
        exact = d0 * (1 + a + p / 100 * (b - a))
        # sampling error of a quantile: ~ sqrt(p(1-p)/n) (b-a) D0, well inside 1 %
        assert r.percentiles["cooler_duty_W"][f"P{p}"] == pytest.approx(exact, rel=5e-3)


def test_sensitivity_zero_effect_ranks_last():
    sc = _only(UncertainInput("economics.electricity_price", "uniform", 0.5, 2.0),
               UncertainInput("ambient.temperature_max", "uniform", 305.15, 317.15,
                              relative=False),
               UncertainInput("phases[*].load", "uniform", 0.9, 1.1))
    rows = uncertainty.sensitivity(sc, "meter-in")
    assert rows[-1]["path"] == "economics.electricity_price"
    assert rows[-1]["cooler_duty_swing_W"] == 0.0
    # a hotter design day leaves less room to the design oil temperature:
    # duty = Q - UA (T_d - T_a) grows with T_a (first law)
    amb = next(r for r in rows if r["path"] == "ambient.temperature_max")
    assert amb["cooler_duty_high_W"] > amb["cooler_duty_low_W"]


def test_defaults_when_none_given():
    r = uncertainty.monte_carlo(_only(), "variable-speed", samples=300, seed=1)
    assert r.defaults_used and len(r.inputs) == len(uncertainty.DEFAULT_INPUTS)
    assert np.all(np.isfinite(r.cooler_duty)) and np.all(r.oil_temperature > 273.15)


def test_bounds_beyond_the_fields_rule_are_refused_at_load():
    # an efficiency cannot exceed 1 (its definition, ISO 4409): +20 % on 0.93 gives 1.116
    import pytest as _pytest
    from heatload import io as _io
    from heatload.errors import HeatloadError as _E
    text = _io.default_scenario_path().read_text(encoding="utf-8")
    bad = text + ('\n[[uncertainty]]\npath = "power_unit.pump.volumetric_efficiency"\n'
                  'distribution = "normal"\nlow = "-20 %"\nhigh = "+20 %"\n')
    with _pytest.raises(_E, match=r"uncertainty\[\d+\]\.high: .*\(0, 1\]"):
        _io.loads_scenario(bad)
    ok = text + ('\n[[uncertainty]]\npath = "power_unit.pump.volumetric_efficiency"\n'
                 'low = "-5 %"\nhigh = "+5 %"\n')
    _io.loads_scenario(ok)


def test_samples_at_an_ideal_pump_do_not_break_the_coupled_temperature(tmp_path):
    """A piston pump (volumetric efficiency 0.97) with a normal spread whose tail
    passes 1 (clipped to 1: an ideal pump): the heat's secant model between two
    coupling points could rise faster with T than the surfaces shed it, and the
    steady temperature ran off to overflow (an internal error).  Every sample
    now ends finite and hot, as its neighbours."""
    text = io.default_scenario_path().read_text()
    text = text.replace("volumetric_efficiency = 0.93", "volumetric_efficiency = 0.97", 1)
    text = text.replace('distribution = "normal"           # low/high are the 5th and 95th '
                        'percentiles\nlow = 0.97', 'distribution = "normal"\nlow = 0.95', 1)
    assert "low = 0.95" in text
    path = tmp_path / "piston.toml"
    path.write_text(text)
    sc = io.load_scenario(path)
    res = uncertainty.monte_carlo(sc, "meter-in", samples=10000, seed=1)
    t = res.percentiles["oil_temperature_C"]
    assert all(np.isfinite(v) for v in t.values())
    assert 150.0 < t["P50"] < 260.0    # the meter-in press without a cooler: ~200 degC
