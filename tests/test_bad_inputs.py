"""A corpus of bad duty-cycle files: each must be refused with one clear line
naming the file and the field (the fragment on the file's first line,
``# expect: ...``), never a traceback or another exception type."""

from pathlib import Path

import pytest

from heatload import io
from heatload.errors import HeatloadError

BAD = sorted((Path(__file__).parent / "data" / "bad").glob("*.toml"))


def _expected(path: Path) -> str:
    first = path.read_bytes().split(b"\n", 1)[0].decode("latin-1")
    return first.split("expect:", 1)[1].strip()


def test_corpus_is_large_enough():
    assert len(BAD) >= 30


@pytest.mark.parametrize("path", BAD, ids=lambda p: p.stem)
def test_bad_file_refused_with_its_reason(path):
    with pytest.raises(HeatloadError) as e:
        io.load_scenario(path)
    msg = e.value.one_line()
    assert _expected(path) in msg
    assert msg.startswith(str(path))
    assert "\n" not in msg


def test_huge_file_refused(tmp_path):
    p = tmp_path / "huge.toml"
    p.write_text('[scenario]\nname = "x"\n' + ("# padding " * 100 + "\n") * 5000)
    with pytest.raises(HeatloadError, match="at most"):
        io.load_scenario(p)
    with pytest.raises(HeatloadError, match="at most"):
        io.loads_scenario(p.read_text(), source="upload.toml")


def test_too_many_phases_refused():
    import copy
    import tomllib
    from heatload.io import MAX_PHASES
    data = tomllib.loads(io.default_scenario_path().read_text())
    one = data["phases"][0]
    data["phases"] = [dict(copy.deepcopy(one), name=f"p{i}") for i in range(MAX_PHASES + 1)]
    with pytest.raises(HeatloadError, match="at most"):
        io.scenario_from_dict(data, "many.toml")


def test_over_long_line_refused_quickly():
    import time
    text = "[" + ".".join(["a"] * 60_000) + "]\n"
    t0 = time.perf_counter()
    with pytest.raises(HeatloadError, match="line of"):
        io.loads_scenario(text, source="keys.toml")
    assert time.perf_counter() - t0 < 5.0   # generous bound, not a benchmark
