"""Write tests/data/regression_figures.json (see tests/regression_values.py):
the figures of every example and strategy as this checkout computes them.

    .venv/bin/python scripts/make_regression_fixture.py
    PYTHONPATH=/path/to/other/checkout .venv/bin/python scripts/make_regression_fixture.py
        (the figures of another checkout's code, e.g. main's)

A regression fixture, not a check value: regenerate it only in a commit that
means to change the physics.
"""

import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests"))

from regression_values import figures  # noqa: E402

out = ROOT / "tests" / "data" / "regression_figures.json"
out.write_text(json.dumps(figures(), indent=None, sort_keys=True) + "\n")
print(f"wrote {out} ({out.stat().st_size / 1e6:.1f} MB)")
