"""The faster paths give the figures the code gave before them (to 1e-12
relative), on every example and strategy: compare, sweeps in the three thermal
modes, the shift's temperature runs, a Monte Carlo.

``tests/data/regression_figures.json`` is a regression fixture written by
``scripts/make_regression_fixture.py`` from the code before the speed work,
not a check value: the physics is checked against outside sources in the
module tests.
"""

import json
import math
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))

from regression_values import figures  # noqa: E402

FIXTURE = Path(__file__).resolve().parent / "data" / "regression_figures.json"
RTOL = 1e-12
#: Figures that are rounding residues by definition (a root solve's leftover,
#: a balance's closure) sit at 1e-13 W whatever the code: held to this
#: absolute bound [W] instead of a relative one
RESIDUE_ATOL = 1e-9


def _diffs(a, b, where, out):
    if isinstance(a, dict) or isinstance(b, dict):
        if not (isinstance(a, dict) and isinstance(b, dict)) or set(a) != set(b):
            out.append(f"{where}: keys {sorted(a) if isinstance(a, dict) else a!r} "
                       f"!= {sorted(b) if isinstance(b, dict) else b!r}")
            return
        for k in a:
            _diffs(a[k], b[k], f"{where}.{k}", out)
    elif isinstance(a, list) or isinstance(b, list):
        if not (isinstance(a, list) and isinstance(b, list)) or len(a) != len(b):
            out.append(f"{where}: {a!r} != {b!r}")
            return
        for i, (x, y) in enumerate(zip(a, b)):
            _diffs(x, y, f"{where}[{i}]", out)
    elif isinstance(a, float) and isinstance(b, float):
        if math.isnan(a) and math.isnan(b):
            return
        if "residual" in where and max(abs(a), abs(b)) <= RESIDUE_ATOL:
            return
        if not abs(a - b) <= RTOL * max(abs(a), abs(b)):
            out.append(f"{where}: {a!r} != {b!r}")
    elif a != b:
        out.append(f"{where}: {a!r} != {b!r}")


@pytest.fixture(scope="module")
def now():
    return figures()


@pytest.fixture(scope="module")
def before():
    return json.loads(FIXTURE.read_text())


def test_fixture_covers_every_example(now, before):
    assert set(now) == set(before)


@pytest.mark.parametrize("part", ["compare", "sweep", "shift", "monte_carlo"])
def test_figures_unchanged(now, before, part):
    out = []
    for ex in before:
        _diffs(now[ex][part], before[ex][part], f"{ex}.{part}", out)
    assert not out, f"{len(out)} figures moved, e.g.\n" + "\n".join(out[:15])
