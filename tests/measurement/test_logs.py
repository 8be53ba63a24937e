"""Reading measured CSV logs: columns by name, units in brackets, timestamps,
and one-line refusals of bad files (tests/data/bad_logs/, first line
``# expect: <fragment>``)."""

from pathlib import Path

import numpy as np
import pytest

from heatload.measurement import logs, measured
from heatload.cli import main
from heatload.errors import HeatloadError

BAD = sorted((Path(__file__).parents[1] / "data" / "bad_logs").glob("*.csv"))


def _expected(path: Path) -> str:
    return path.read_text(encoding="utf-8").split("\n", 1)[0].split("expect:", 1)[1].strip()


def test_bad_corpus_covers_the_cases():
    names = {p.stem for p in BAD}
    assert {"missing_ambient_column", "non_numeric_cell", "unknown_unit", "too_few_rows",
            "time_goes_back"} <= names


@pytest.mark.parametrize("path", BAD, ids=lambda p: p.stem)
def test_bad_log_refused_with_one_line(path):
    with pytest.raises(HeatloadError) as e:
        measured.read_temperature_log(path)
    msg = e.value.one_line()
    assert msg.startswith(str(path))
    assert _expected(path) in msg
    assert "\n" not in msg


@pytest.mark.parametrize("path", BAD[:3], ids=lambda p: p.stem)
def test_bad_log_on_the_command_line_exits_2_with_one_line(path, capsys):
    assert main(["logfit", str(path), "--heat-capacity", "150 kJ/K"]) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith("heatload: error: ") and "\n" not in err
    assert str(path) in err


def _write(tmp_path, text, name="log.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def test_units_and_columns_converted(tmp_path):
    rows = "\n".join(f"{i},{100 + i},{68},{i % 2}" for i in range(12))
    p = _write(tmp_path, "Time [min],Tank oil [degF],Ambient air [°F],Running\n" + rows)
    log = measured.read_temperature_log(p)
    assert log.time[1] == pytest.approx(60.0)                 # 1 min = 60 s
    # 212 degF = 100 degC = 373.15 K; 68 degF = 20 degC (definition of the scales)
    assert log.values["oil"][0] == pytest.approx(310.92778, abs=1e-4)   # 100 degF
    assert log.values["ambient"][0] == pytest.approx(293.15)
    assert list(log.values["running"][:3]) == [0.0, 1.0, 0.0]
    assert log.headers["oil"] == "Tank oil [degF]"


def test_timestamps_semicolons_and_decimal_commas(tmp_path):
    rows = "\n".join(f"2026-03-02 06:{i:02d}:30;20,{i};18,5" for i in range(10))
    p = _write(tmp_path, "# logger export\ntime;oil temperature [°C];ambient [°C]\n" + rows)
    log = measured.read_temperature_log(p)
    assert log.time[-1] == pytest.approx(540.0)
    assert log.start.isoformat() == "2026-03-02T06:00:30"
    assert log.values["oil"][3] == pytest.approx(293.45)
    assert log.values["ambient"][0] == pytest.approx(291.65)


def test_column_and_unit_overrides(tmp_path):
    rows = "\n".join(f"{i},{40 + i},{20}" for i in range(10))
    p = _write(tmp_path, "t,T_tank,T_hall\n" + rows)
    log = measured.read_temperature_log(
        p, columns={"time": "t", "oil": "T_tank", "ambient": "T_hall"},
        units={"time": "s", "oil": "degC", "ambient": "degC"})
    assert log.values["oil"][0] == pytest.approx(313.15)
    with pytest.raises(HeatloadError, match="no column called 'T_oil'"):
        measured.read_temperature_log(p, columns={"time": "t", "oil": "T_oil"})


def test_gap_rows_left_out_and_counted(tmp_path):
    rows = [f"{60 * i},{20 + i},18" for i in range(12)]
    rows[4] = "240,,18"
    p = _write(tmp_path, "time [s],oil [degC],ambient [degC]\n" + "\n".join(rows))
    log = measured.read_temperature_log(p)
    assert len(log) == 11 and log.gaps == 1
    assert 240.0 not in log.time
    assert any("empty cell" in n for n in log.notes)


def test_constant_ambient_option(tmp_path):
    rows = "\n".join(f"{60 * i},{20 + i}" for i in range(12))
    p = _write(tmp_path, "time [s],oil [degC]\n" + rows)
    log = measured.read_temperature_log(p, ambient_temperature=295.15)
    assert np.all(log.values["ambient"] == 295.15)


def test_parse_assignments():
    assert logs.parse_assignments(["oil=T tank", "Time = t"], "--column") == {
        "oil": "T tank", "time": "t"}
    with pytest.raises(HeatloadError, match="KEY=VALUE"):
        logs.parse_assignments(["oil"], "--column")


def test_any_text_gives_a_log_or_one_line_error():
    # property: whatever the file holds, the reader returns a log or raises
    # HeatloadError with one line, never another exception
    from hypothesis import given, settings
    from hypothesis import strategies as st

    header = st.sampled_from(["time [s],oil [degC],ambient [degC]",
                              "time,oil temperature [°C];ambient [C]",
                              "Time [min]\tOil [degF]\tAmbient [K]\trunning", ""])
    cell = st.one_of(st.floats(allow_nan=True, allow_infinity=True).map(str),
                     st.text(max_size=6), st.sampled_from(["", "2026-03-02 06:00:00", "1,5"]))
    row = st.lists(cell, min_size=0, max_size=5).map(",".join)

    @settings(max_examples=150, deadline=None)
    @given(header, st.lists(row, max_size=15))
    def check(h, rows):
        text = "\n".join([h] + rows)
        try:
            log = measured.read_temperature_log("fuzz.csv", text=text)
        except HeatloadError as e:
            assert "\n" not in e.one_line()
        else:
            assert np.all(np.diff(log.time) > 0)
    check()


def test_more_rows_than_the_limit_refused_with_how_to_thin(tmp_path, monkeypatch):
    monkeypatch.setattr(logs, "MAX_ROWS", 50)
    rows = "\n".join(f"{60 * i},{40 + 0.01 * i:.2f},20" for i in range(60))
    p = _write(tmp_path, "time [s],oil [degC],ambient [degC]\n" + rows)
    with pytest.raises(HeatloadError) as e:
        measured.read_temperature_log(p)
    msg = e.value.one_line()
    assert msg.startswith(f"{p}:52: ") and "thin the log" in msg


def test_clean_and_row_by_row_reading_agree(tmp_path):
    # a clean log is read at once; a blank line sends it to the row-by-row reader:
    # the same values, and line numbers that follow the file's own lines
    rows = [f"{30 * i},{40 + 0.37 * i:.2f},{20 + 0.01 * i:.2f},{i % 2}" for i in range(40)]
    head = "# invented\ntime [min],oil [degF],ambient [degC],running\n"
    clean = measured.read_temperature_log(_write(tmp_path, head + "\n".join(rows)))
    gapped = measured.read_temperature_log(
        _write(tmp_path, head + "\n".join(rows[:20] + [""] + rows[20:]), "b.csv"))
    for key in ("oil", "ambient", "running"):
        assert np.array_equal(clean.values[key], gapped.values[key])
    assert np.array_equal(clean.time, gapped.time)
    assert list(clean.lines[:3]) == [3, 4, 5]
    assert gapped.lines[19] == 22 and gapped.lines[20] == 24
