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
    passes 1 (then clipped to 1, an ideal pump; now drawn again below 1, so the
    samples come close to an ideal pump): the heat's secant model between two
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


# Tails beyond a field's range: a wide normal on a line length, an efficiency and
# the phase durations.  Check values: the standard normal distribution and the
# truncated normal from scipy.stats (a reference library, independent of the
# sampler), and the binomial scatter of a share, sqrt(p (1 - p) / n).
_WIDE = (UncertainInput("power_unit.pressure_line.length", "normal", 0.1, 1.9),
         UncertainInput("power_unit.pump.volumetric_efficiency", "normal", 0.9, 1.1),
         UncertainInput("phases[*].duration", "normal", 0.1, 1.9))


def test_wide_normal_tails_stay_in_each_fields_range_and_are_counted():
    from scipy import stats

    from heatload import paths

    n = 4000
    r = uncertainty.monte_carlo(_only(*_WIDE), "meter-in", samples=n, seed=11)
    sigma = (1.9 - 0.1) / (2 * uncertainty.Z95)
    # no sample leaves its field's range (every item of the path, as evaluated)
    ov = uncertainty._overrides(SC, r.inputs, r.samples, False)
    for p, v in ov.items():
        lo, lo_open, hi, hi_open = paths.allowed_range(SC, paths.resolve_path(SC, p))
        assert np.all(v > lo[0]) if lo_open else np.all(v >= lo[0]), p
        assert np.all(v < hi[0]) if hi_open else np.all(v <= hi[0]), p
    length = SC.power_unit.pressure_line.length * r.samples["power_unit.pressure_line.length"]
    assert np.all(length >= 0.0) and not np.any(length == 0.0)    # cut, not piled at 0
    eff = SC.power_unit.pump.volumetric_efficiency
    assert np.all(eff * r.samples["power_unit.pump.volumetric_efficiency"] <= 1.0)
    # the share drawn again is the normal's mass beyond the limit: below a factor 0
    # for the length and the durations, above 1 / 0.93 for the efficiency
    expect = {"power_unit.pressure_line.length": stats.norm.cdf(0.0, 1.0, sigma),
              "power_unit.pump.volumetric_efficiency":
                  stats.norm.sf(1.0 / eff, 1.0, (1.1 - 0.9) / (2 * uncertainty.Z95)),
              "phases[*].duration": stats.norm.cdf(0.0, 1.0, sigma)}
    assert expect["power_unit.pump.volumetric_efficiency"] > 0.1   # the test cuts some
    for p, share in expect.items():
        got = r.truncated[p] / n
        assert got == pytest.approx(share, abs=4 * np.sqrt(share * (1 - share) / n)), p
    # truncation, not clipping: the samples' mean is the truncated normal's
    x = r.samples["power_unit.pressure_line.length"]
    mean = stats.truncnorm.mean((0.0 - 1.0) / sigma, np.inf, loc=1.0, scale=sigma)
    assert np.mean(x) == pytest.approx(mean, abs=4 * sigma / np.sqrt(n))
    assert mean > 1.0 + 0.05 * sigma                     # (a normal's mean would be 1)
    # the shares past the trivial one are listed, the rest not
    noted = {p for p, _, _ in r.truncation_notes()}
    assert noted == set(expect)
    assert all(0 < f < 0.2 for _, _, f in r.truncation_notes())


def test_truncated_share_is_reported_in_the_text_and_not_when_trivial(tmp_path, capsys):
    from heatload.cli import main

    text = io.default_scenario_path().read_text()
    wide = text + ('\n[[uncertainty]]\npath = "power_unit.pressure_line.length"\n'
                   'distribution = "normal"\nlow = 0.1\nhigh = 1.9\n')
    path = tmp_path / "wide.toml"
    path.write_text(wide)
    assert main(["cooler", str(path), "--samples", "2000", "--wide"]) == 0
    out = capsys.readouterr().out
    line = next(ln for ln in out.splitlines() if "power_unit.pressure_line.length" in ln
                and "drawn again" in ln)
    share = float(line.split("note: ", 1)[1].split(" %", 1)[0])
    assert 2.0 < share < 5.0          # about 3.4 % (the normal below a factor 0)
    # the press's own inputs (a normal of 0.97 .. 1.03 on an efficiency of 0.93:
    # 1 is 4 sigma away) cut nothing worth a word
    assert main(["cooler", "--samples", "2000", "--wide"]) == 0
    assert "drawn again" not in capsys.readouterr().out


def test_design_temperature_samples_stay_at_or_below_the_fluids_limit():
    # a normal 60 .. 78 degC (5th .. 95th percentiles) on the design oil temperature:
    # mean 69 degC, sigma 9 K / 1.645 = 5.47 K, so 2.2 % of a normal lies past the
    # press's 80 degC fluid limit (standard normal, scipy.stats); those are drawn again
    from scipy import stats

    lo, hi = 60.0 + 273.15, 78.0 + 273.15
    sc = _only(UncertainInput("cooler.oil_temperature_max", "normal", lo, hi, relative=False))
    n = 4000
    r = uncertainty.monte_carlo(sc, "load-sensing", samples=n, seed=5)
    t = r.samples["cooler.oil_temperature_max"]
    limit = SC.fluid.temperature_max
    assert limit == pytest.approx(353.15) and np.all(t <= limit) and np.all(t > 273.15)
    share = stats.norm.sf(limit, 0.5 * (lo + hi), (hi - lo) / (2 * uncertainty.Z95))
    assert r.truncated["cooler.oil_temperature_max"] / n == pytest.approx(
        share, abs=4 * np.sqrt(share * (1 - share) / n))
