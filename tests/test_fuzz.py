"""Fuzzing the loader and the solvers with hypothesis.

Random and adversarial edits of a valid duty-cycle file (a value replaced by
random text, numbers, quantities in random units, tables, lists; keys
deleted): the loader must either return a scenario or raise the project's own
error naming a field; every scenario it accepts must solve for every strategy
without NaN or inf.  ``HEATLOAD_FUZZ=long`` runs a longer profile (with
``HYPOTHESIS_PROFILE=explore`` for new random examples; see tests/conftest.py).
"""

import copy
import math
import os
import tomllib

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from heatload.hydraulics import circuits, cycle, invariants
from heatload import io
from heatload.errors import HeatloadError
from heatload.model import STRATEGIES

LONG = os.environ.get("HEATLOAD_FUZZ") == "long"
BASES = [tomllib.loads(p.read_text()) for p in io.example_paths()]
UNITS = ["bar", "psi", "kg", "m/s", "mm/s", "degC", "degF", "K", "L/min", "gal/min", "rpm",
         "mm", "m", "in", "kN", "N", "N*m", "kW", "hp", "s", "h", "cm^3/rev", "L", "%", "",
         "mm^2/s", "kg/m^3", "W/(m^2*K)", "1/K", "GPa", "/kWh", "kg/kWh", "m^2", "bar/s"]


def _leaves(obj, path=()):
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _leaves(v, path + (k,))
    elif isinstance(obj, list) and obj and isinstance(obj[0], dict):
        for i, v in enumerate(obj):
            yield from _leaves(v, path + (i,))
    yield path


numbers = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10**12, 10**12),
                    st.sampled_from([0, -1, 1e-300, 1e300, 0.5, 1.0, 1.0000001]))
quantities = st.builds(lambda x, u: f"{x} {u}", numbers, st.sampled_from(UNITS))
values = st.one_of(quantities, numbers, st.text(max_size=20), st.booleans(),
                   st.lists(st.one_of(quantities, numbers), max_size=3),
                   st.dictionaries(st.text(max_size=5), quantities, max_size=2),
                   st.just("full"), st.just(None))


@st.composite
def mutated(draw):
    data = copy.deepcopy(draw(st.sampled_from(BASES)))
    for _ in range(draw(st.integers(1, 3))):
        paths = [p for p in _leaves(data) if p]
        path = draw(st.sampled_from(paths))
        parent = data
        for k in path[:-1]:
            parent = parent[k]
        value = draw(values)
        if value is None:
            if isinstance(parent, dict):
                parent.pop(path[-1], None)
        else:
            parent[path[-1]] = value
    return data


def _finite(result):
    arrays = [result.pump_pressure, result.inlet_pressure, result.outlet_pressure,
              result.pump_flow, result.actuator_flow, result.speed, result.duration,
              result.electric_power, result.useful_power, *result.losses.values()]
    return all(np.all(np.isfinite(a)) for a in arrays)


@settings(max_examples=20000 if LONG else 3500, deadline=None,
          suppress_health_check=list(HealthCheck))
@given(mutated())
def test_loader_accepts_or_names_the_field(data):
    try:
        io.scenario_from_dict(data, "fuzz.toml")
    except HeatloadError as e:
        msg = e.one_line()
        assert msg.startswith("fuzz.toml") and "\n" not in msg
        assert e.field or "TOML" in msg


@settings(max_examples=5000 if LONG else 1500, deadline=None,
          suppress_health_check=list(HealthCheck))
@given(mutated(), st.floats(263.15, 393.15))
def test_accepted_scenarios_solve_without_nan(data, oil_temperature):
    try:
        sc = io.scenario_from_dict(data, "fuzz.toml")
    except HeatloadError:
        return
    pa = cycle.phase_arrays(sc)
    for kind in STRATEGIES:
        c = cycle.circuit_inputs(sc, kind, oil_temperature, phases=pa)
        r = circuits.solve_strategy(kind, c)
        assert _finite(r), kind
        assert invariants.circuit_violations(r, kind) == []
        assert math.isfinite(float(np.sum(r.heat_to_oil * r.duration)))


# --- quantity text: operators, commas, run-together numbers, exponent towers ------------
from heatload.units import KINDS, MAX_QUANTITY_CHARS, to_si  # noqa: E402

_PIECES = ["1", "9", "10", "0", "2.5", "e", "E", "e-400", "e999", ",", ".", "..", " ", "*", "**",
           "^", "/", "(", ")", "-", "+", "bar", "m", "L/min", "kN", "degC", "%", "1/", "mm2",
           "9**9**9", "10**10**8", "\u00b2", "\u00b0C", "\t", "_", "x", "(((("]
quantity_texts = st.one_of(
    st.lists(st.sampled_from(_PIECES), max_size=25).map("".join),
    st.text(alphabet="0123456789.,eE+-*/^() barmLin%", max_size=60),
    st.builds(lambda n, u: f"{n} {u}", st.text("0123456789,.", min_size=1, max_size=8),
              st.sampled_from(UNITS)),
    st.integers(1, 60).map(lambda n: "9" + "**9" * n + " bar"),
)


@settings(max_examples=20000 if LONG else 3000, deadline=None,
          suppress_health_check=list(HealthCheck))
@given(quantity_texts, st.sampled_from(sorted(KINDS)))
def test_quantity_text_is_read_or_refused_at_once(text, kind):
    """Any text: a finite SI value or the project's error naming the field, and
    never the time to evaluate arithmetic (a hang guard, not a benchmark)."""
    import time

    from heatload.units import registry
    registry()                          # pint's one-time load is not the text's cost
    t0 = time.perf_counter()
    try:
        v = to_si(text, kind, field="f", file="fuzz.toml")
        assert math.isfinite(v)
        assert len(text.strip()) <= MAX_QUANTITY_CHARS
        assert "**9" not in text and ",5" not in text
    except HeatloadError as e:
        assert e.field == "f" and "\n" not in e.one_line()
    # a field is parsed in well under a millisecond (a new unit takes pint a few),
    # so a second is only a guard against evaluating a power tower
    assert time.perf_counter() - t0 < 1.0
