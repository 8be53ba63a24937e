"""Output files (heatload.io.files and its users): no live formula from a name in
an export, output paths refused before any computing, one atomic writer that
leaves no temporary file behind.

The first characters a spreadsheet runs as a formula (``= + - @``, tab,
carriage return) and the neutralising single quote for CSV are those of
OWASP's "CSV Injection" guidance; the xlsx cell types (``f`` formula, ``s``
text, ``n`` number) are openpyxl's.
"""

import contextlib
import csv
import io as stdio
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from heatload import chain, io
from heatload.io import files as outputs
from heatload.outputs import report
from heatload.studies import sweep
from heatload.cli import main
from heatload.errors import HeatloadError

ROOT = Path(__file__).resolve().parents[2]
LEADS = ("=", "+", "-", "@", "\t", "\r")          # OWASP, CSV Injection
#: The leads a name from a file can start with (the loader refuses a line break in a name)
NAME_LEADS = tuple(c for c in LEADS if len(f"a{c}b".splitlines()) == 1)


def _run(argv):
    out, err = stdio.StringIO(), stdio.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        rc = main(argv)
    return rc, out.getvalue(), err.getvalue()


# ---------------------------------------------------------------------------
# no formula from a name
# ---------------------------------------------------------------------------

def _hostile_scenario():
    """The forming press with every name starting like a formula."""
    d = io.scenario_to_dict(io.load_scenario(io.default_scenario_path()))
    d["scenario"]["name"] = '=HYPERLINK("http://example.invalid","click")'
    renamed = {}
    for i, a in enumerate(d["actuators"]):
        renamed[a["name"]] = new = f"{NAME_LEADS[i % len(NAME_LEADS)]}act {a['name']}"
        a["name"] = new
    for i, ph in enumerate(d["phases"]):
        ph["name"] = f"{NAME_LEADS[i % len(NAME_LEADS)]}1+1 {ph['name']}"
        if "actuator" in ph:
            ph["actuator"] = renamed[ph["actuator"]]
    d["phases"][1]["name"] = "=\x07bell " + d["phases"][1]["name"]  # not storable in xlsx raw
    for i, st in enumerate(d["strategies"]):
        st["label"] = f"{NAME_LEADS[i % len(NAME_LEADS)]}SUM(1,2) {st['kind']}"
    d["economics"]["present_strategy"] = d["strategies"][0]["label"]
    # (a line break inside or before a name the loader refuses; a cell's own row
    # break: test_a_large_csv_holds_the_same_cells_as_a_small_one)
    sc = io.scenario_from_dict(d)
    names = ([sc.name] + [a.name for a in sc.actuators] + [p.name for p in sc.phases]
             + [s.name for s in sc.strategies])
    assert {n[0] for n in names} >= set(NAME_LEADS)
    return sc, names


@pytest.fixture(scope="module")
def hostile():
    sc, names = _hostile_scenario()
    cmp = chain.compare(sc)
    return sc, names, cmp, report.export_tables(sc, cmp)


def test_xlsx_has_no_formula_cell(hostile, tmp_path):
    import openpyxl
    import pandas as pd

    sc, names, cmp, frames = hostile
    path = report.write_xlsx(frames, tmp_path / "hostile.xlsx")
    wb = openpyxl.load_workbook(path)
    texts, negative_numbers = set(), 0
    for ws in wb:
        for row in ws.iter_rows():
            for c in row:
                assert c.data_type != "f", (ws.title, c.coordinate, c.value)
                if isinstance(c.value, str):
                    texts.add(c.value)
                    if c.value.startswith(LEADS):
                        # stored as text, with the quote prefix a spreadsheet keeps on edit
                        assert c.data_type == "s" and c.quotePrefix, (ws.title, c.coordinate)
                elif isinstance(c.value, (int, float)) and c.value < 0:
                    assert c.data_type == "n"
                    negative_numbers += 1
    assert negative_numbers > 0            # a negative number stays a number
    # the names themselves are kept (a control character shown escaped)
    shown = {n.replace("\x07", "\\x07") for n in names}
    assert {s.name for s in sc.strategies} <= texts
    assert [n for n in shown if n in texts]
    back = pd.read_excel(path, sheet_name="payback")
    assert list(back["strategy"]) == [o.name for o in cmp.outcomes]


def test_csv_cells_are_neutralised(hostile, tmp_path):
    sc, names, cmp, frames = hostile
    files = report.write_csv(frames, tmp_path / "csv")
    quoted, negative_numbers = set(), 0
    for f in files:
        with open(f, newline="", encoding="utf-8") as fh:
            rows = list(csv.reader(fh))
        assert len(rows) == len(frames[next(k for k in frames
                                            if report._csv_name(k) == f.name)]) + 1
        assert len({len(r) for r in rows}) == 1, f.name     # no cell split into rows
        for row in rows:
            for cell in row:
                if cell.startswith(LEADS):
                    float(cell)           # only a number may begin with '-' or '+'
                    negative_numbers += cell.startswith("-")
                if cell.startswith("'"):
                    quoted.add(cell[1:])
    assert negative_numbers > 0
    for name in (s.name for s in sc.strategies):
        assert name in quoted
    for name in (p.name for p in sc.phases):
        assert name in quoted


def test_sweep_csv_is_neutralised(tmp_path):
    sc, _ = _hostile_scenario()
    spec = [sweep.parse_vary("power_unit.pump.displacement=20..30cm^3:2", sc)]
    df = sweep.run_sweep(sc, sweep.grid_values(spec), [sc.strategies[0], sc.strategies[2]])
    p = sweep.write_table(df, tmp_path / "s.csv")
    with open(p, newline="", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    col = rows[0].index("strategy")
    assert {r[col] for r in rows[1:]} == {"'" + sc.strategies[0].name,
                                          "'" + sc.strategies[2].name}
    for r in rows[1:]:
        for cell in r:
            if cell.startswith(LEADS):
                float(cell)


@pytest.mark.parametrize("value, expected", [
    ("=1+1", "'=1+1"), ("+x", "'+x"), ("-3 kN", "'-3 kN"), ("@SUM(A1)", "'@SUM(A1)"),
    ("\tx", "'\tx"), ("\rx", "'\rx"), ("meter-in", "meter-in"), (-3.5, -3.5), (2, 2),
    (None, None)])
def test_csv_text(value, expected):
    assert outputs.csv_text(value) == expected


# ---------------------------------------------------------------------------
# output paths, before anything is computed
# ---------------------------------------------------------------------------

@pytest.fixture
def no_compute(monkeypatch):
    """Any computing fails the test: the refusals must come first."""
    def refuse(*a, **k):
        raise AssertionError("computed before the output paths were checked")
    # the command's module holds its own name for run_sweep: imported first, so
    # that it does not keep this stand-in after the test
    from heatload.cli import sweep as cli_sweep
    monkeypatch.setattr(chain, "compare", refuse)
    monkeypatch.setattr(sweep, "run_sweep", refuse)
    monkeypatch.setattr(cli_sweep, "run_sweep", refuse)


def _one_line_error(rc, out, err, *words):
    assert rc == 2, (out, err)
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "internal error" not in err, err
    for w in words:
        assert w in lines[0], lines[0]


@pytest.mark.parametrize("force", [[], ["--force"]])
def test_fifo_is_refused_even_with_force(tmp_path, no_compute, force):
    fifo = tmp_path / "pipe.html"
    os.mkfifo(fifo)
    _one_line_error(*_run(["report", "-o", str(fifo)] + force), "FIFO", "--output")
    _one_line_error(*_run(["report", "-o", str(tmp_path / "r.html"), "--xlsx",
                           str(tmp_path / "pipe.html")] + force), "--xlsx")
    os.mkfifo(tmp_path / "pipe.csv")
    _one_line_error(*_run(["sweep", "--vary", "actuators.main.bore=95..105mm:2", "-o",
                           str(tmp_path / "pipe.csv")] + force), "FIFO", "--output")
    assert Path(fifo).is_fifo() and (tmp_path / "pipe.csv").is_fifo()
    assert sorted(os.listdir(tmp_path)) == ["pipe.csv", "pipe.html"]


@pytest.mark.parametrize("force", [[], ["--force"]])
def test_directory_is_refused_with_one_line(tmp_path, no_compute, force):
    d = tmp_path / "out.html"
    d.mkdir()
    _one_line_error(*_run(["report", "-o", str(d)] + force), "folder", "--output")
    (tmp_path / "book.xlsx").mkdir()
    _one_line_error(*_run(["report", "-o", str(tmp_path / "r.html"), "--xlsx",
                           str(tmp_path / "book.xlsx")] + force), "folder", "--xlsx")
    (tmp_path / "grid.csv").mkdir()
    _one_line_error(*_run(["sweep", "--vary", "actuators.main.bore=95..105mm:2", "-o",
                           str(tmp_path / "grid.csv")] + force), "folder", "--output")
    (tmp_path / "tables").write_text("a file, not a folder")
    _one_line_error(*_run(["report", "-o", str(tmp_path / "r.html"), "--csv",
                           str(tmp_path / "tables")] + force), "not a folder", "--csv")
    assert not (tmp_path / "r.html").exists()


@pytest.mark.skipif(not os.path.exists("/dev/null"), reason="no /dev/null")
def test_device_is_refused(tmp_path, no_compute):
    with pytest.raises(HeatloadError) as e:
        outputs.check_output("/dev/null", "--output", force=True)
    assert "character device" in str(e.value)
    with pytest.raises(HeatloadError):
        io.save_scenario(io.load_scenario(io.default_scenario_path()), "/dev/null", force=True)


def test_extensions_are_checked_before_the_report_is_written(tmp_path, no_compute):
    html = tmp_path / "r.html"
    _one_line_error(*_run(["report", "-o", str(html), "--xlsx", str(tmp_path / "tables")]),
                    "--xlsx", "no extension", ".xlsx")
    _one_line_error(*_run(["report", "-o", str(tmp_path / "report")]), "--output", ".html")
    _one_line_error(*_run(["sweep", "--vary", "actuators.main.bore=95..105mm:2", "-o",
                           str(tmp_path / "grid.txt")]), "'.txt'", ".csv or .parquet")
    assert os.listdir(tmp_path) == []


def test_existing_file_refused_before_computing(tmp_path, no_compute):
    (tmp_path / "grid.csv").write_text("old")
    _one_line_error(*_run(["sweep", "--vary", "actuators.main.bore=95..105mm:2", "-o",
                           str(tmp_path / "grid.csv")]), "exists", "--force")
    (tmp_path / "csv").mkdir()
    (tmp_path / "csv" / "cooler.csv").write_text("old")
    _one_line_error(*_run(["report", "-o", str(tmp_path / "r.html"), "--csv",
                           str(tmp_path / "csv")]), "cooler.csv", "exists")
    assert (tmp_path / "grid.csv").read_text() == "old"


def test_save_scenario_refuses_a_folder_even_with_force(tmp_path):
    (tmp_path / "press.toml").mkdir()
    with pytest.raises(HeatloadError) as e:
        io.save_scenario(io.load_scenario(io.default_scenario_path()), tmp_path / "press.toml",
                         force=True)
    assert "folder" in str(e.value) and str(e.value).startswith(str(tmp_path / "press.toml"))


# ---------------------------------------------------------------------------
# the atomic writer
# ---------------------------------------------------------------------------

def _temporaries(folder):
    return [n for n in os.listdir(folder) if outputs.TEMP_TAG in n]


@pytest.mark.parametrize("exc", [RuntimeError, KeyboardInterrupt])
def test_no_temporary_left_after_an_exception_mid_write(tmp_path, exc):
    target = tmp_path / "r.html"
    target.write_text("old")

    def half(tmp):
        with open(tmp, "w") as fh:
            fh.write("<p>half a rep")
        assert _temporaries(tmp_path)          # it exists while writing
        raise exc("stopped")
    with pytest.raises(exc):
        outputs.write_atomic(target, half, "--output", force=True)
    assert os.listdir(tmp_path) == ["r.html"] and target.read_text() == "old"


def test_os_error_mid_write_is_one_line(tmp_path):
    def full(tmp):
        raise OSError(28, "No space left on device")
    with pytest.raises(HeatloadError) as e:
        outputs.write_atomic(tmp_path / "s.csv", full, "--output")
    assert "No space left" in e.value.one_line() and e.value.field == "--output"
    assert os.listdir(tmp_path) == []


def test_leftover_of_a_killed_writer_is_removed_by_the_next_write(tmp_path):
    target = tmp_path / "r.html"
    code = textwrap.dedent(f"""
        import sys, time
        sys.path.insert(0, {str(ROOT)!r})
        from heatload.io import files as outputs
        def slow(tmp):
            print("writing", flush=True)
            time.sleep(60)
        outputs.write_atomic({str(target)!r}, slow, "--output")
    """)
    proc = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, text=True)
    try:
        assert proc.stdout.readline().strip() == "writing"
        os.kill(proc.pid, signal.SIGKILL)              # no finally runs: kill -9
        proc.wait(timeout=10)
    finally:
        if proc.poll() is None:
            proc.kill()
    left = _temporaries(tmp_path)
    assert len(left) == 1 and f"-{proc.pid}-" in left[0]
    assert (tmp_path / left[0]).stat().st_size == 0
    report.write_html("<p>new</p>", target)
    assert os.listdir(tmp_path) == ["r.html"] and target.read_text() == "<p>new</p>"


def test_temporary_of_a_live_writer_is_left_alone(tmp_path):
    target = tmp_path / "s.csv"
    live = tmp_path / f".s.csv{outputs.TEMP_TAG}{os.getppid()}-0.csv"   # our parent lives
    live.write_text("")
    stale = tmp_path / f".s.csv{outputs.TEMP_TAG}{os.getpid()}-99.csv"  # ours, not writing
    stale.write_text("")
    old = tmp_path / f".s.csv{outputs.TEMP_TAG}{os.getppid()}-1.csv"
    old.write_text("")
    t = time.time() - outputs.STALE_AFTER - 60
    os.utime(old, (t, t))
    other = tmp_path / ".other.csv.heatload-tmp-1-0.csv"                # another target
    other.write_text("")
    outputs.write_atomic(target, lambda tmp: Path(tmp).write_text("a\n"), "--output")
    assert sorted(os.listdir(tmp_path)) == sorted([live.name, other.name, "s.csv"])


def test_written_file_has_the_usual_permissions(tmp_path):
    mask = os.umask(0o022)
    os.umask(mask)
    p = report.write_html("<p>x</p>", tmp_path / "r.html")
    assert p.stat().st_mode & 0o777 == 0o666 & ~mask


def test_one_atomic_writer():
    """No module but heatload.io.files makes temporary files or replaces files."""
    for p in (ROOT / "heatload").glob("*.py"):
        if p.name == "outputs.py":
            continue
        text = p.read_text()
        assert "tempfile" not in text and "os.replace(" not in text, p.name
    for p in (ROOT / "dashboard").glob("*.py"):
        assert "os.replace(" not in p.read_text(), p.name


def test_missing_folders_are_a_slip_not_created(tmp_path):
    """`-o /nonexistent/s.csv` once made the folder (at the root too, as root): an
    output file's folder must exist, one level missing or several; only a --csv
    folder itself is made, in a folder that exists."""
    from heatload.io import files as outputs
    from heatload.errors import HeatloadError
    for target in (tmp_path / "a" / "b" / "s.csv", tmp_path / "a" / "s.csv"):
        with pytest.raises(HeatloadError, match="does not exist"):
            outputs.check_output(target, "-o", suffixes=(".csv",))
        with pytest.raises(HeatloadError, match="does not exist"):
            outputs.write_atomic(target, lambda p: open(p, "w").write("x"), "-o")
    assert not (tmp_path / "a").exists()
    outputs.check_output_folder(tmp_path / "csv", "--csv")         # made when writing
    with pytest.raises(HeatloadError, match="does not exist"):
        outputs.check_output_folder(tmp_path / "a" / "csv", "--csv")


# ---------------------------------------------------------------------------
# one unit convention across every output (units.SUFFIXES)

def _unit_named(key):
    from heatload.units import EXTRA_SUFFIXES, PLAIN_NAMES, PLAIN_PREFIXES, SUFFIXES
    allowed = tuple("_" + s for s in set(SUFFIXES.values()) | set(EXTRA_SUFFIXES))
    return key.endswith(allowed) or key.endswith(PLAIN_NAMES) or key.startswith(PLAIN_PREFIXES)


def _beside(key, keys):
    """Whether the record names *key*'s unit beside it: a ``kind`` for its
    value / limit (SI of that kind), or a ``<name>_unit``."""
    return (("kind" in keys and key in ("value", "limit", "value_si"))
            or f"{key.split('_')[0]}_unit" in keys)


def _unnamed_numbers(x, where="", named=False):
    """Paths of numbers in JSON data whose key (or an enclosing key) carries no unit
    and whose record does not name it beside them (``kind``, ``<name>_unit``)."""
    bad = []
    if isinstance(x, dict):
        for k, v in x.items():
            k = str(k)
            beside = _beside(k, x)
            bad += _unnamed_numbers(v, f"{where}.{k}", named or beside or _unit_named(k))
    elif isinstance(x, list):
        for v in x:
            bad += _unnamed_numbers(v, f"{where}[]", named)
    elif isinstance(x, (int, float)) and not isinstance(x, bool) and not named:
        bad.append(where)
    return bad


def test_every_number_of_every_output_names_its_unit(tmp_path, capsys):
    """JSON of compare / thermal / cooler / phases, the sweep's CSV and Parquet and the
    report's spreadsheet tables: every number's name ends in its unit (or says it is a
    plain number), and absolute temperatures are in degC (``_C``) everywhere."""
    import json

    import pandas as pd

    sc = io.load_scenario(io.default_scenario_path())
    for argv in (["compare", "--json"], ["thermal", "--json"], ["cooler", "--json"],
                 ["phases", "--json", "--strategy", sc.strategies[0].name]):
        assert main(argv) == 0
        data = json.loads(capsys.readouterr().out)
        assert _unnamed_numbers(data, argv[0]) == []
        text = json.dumps(data)
        # absolute temperatures only in degC: no key of an absolute temperature in K
        for key in ("temperature_low_K", "temperature_high_K", "temperature_max_K",
                    "temperature_steady_K"):
            assert key not in text, (argv[0], key)
    # the hottest ambient in degC as the file gives it (forming_press.toml: 38 degC)
    assert main(["compare", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["scenario"]["ambient_max_C"] == \
        pytest.approx(sc.ambient.temperature_max - 273.15, abs=1e-9)

    frames = {}
    for suffix in (".csv", ".parquet"):
        out = tmp_path / f"s{suffix}"
        assert main(["sweep", "--vary", "ambient.temperature_max=30..40degC:2",
                     "--vary", "power_unit.pump.displacement=20..30cm^3:2",
                     "--strategy", sc.strategies[0].name, "--top", "0",
                     "-o", str(out)]) == 0
        capsys.readouterr()
        frames[suffix] = (pd.read_csv(out) if suffix == ".csv" else pd.read_parquet(out))
    for df in frames.values():
        # a yes/no column (feasible) is no number with a unit
        numeric = [c for c in df.columns if pd.api.types.is_numeric_dtype(df[c])
                   and not pd.api.types.is_bool_dtype(df[c])]
        assert [c for c in numeric if not _unit_named(c)] == []
        assert df["feasible"].dtype == bool and df["rank"].min() == 1
        # the varied temperature in degC, as given on the command line
        assert sorted(set(df["ambient.temperature_max_C"])) == pytest.approx([30.0, 40.0])
        # 20 cm^3 = 2e-5 m^3 (per revolution)
        assert sorted(set(df["power_unit.pump.displacement_m3_rev"])) == \
            pytest.approx([20e-6, 30e-6])
        assert not any(c.endswith("_K") and "temperature" in c and "swing" not in c
                       for c in df.columns)

    cmp = chain.compare(sc)
    tables_ = report.export_tables(sc, cmp)
    for name, df in tables_.items():
        numeric = [c for c in df.columns if pd.api.types.is_numeric_dtype(df[c])
                   and not pd.api.types.is_bool_dtype(df[c])]
        assert [c for c in numeric
                if not (_unit_named(c) or _beside(c, df.columns))] == [], name


def test_a_large_csv_holds_the_same_cells_as_a_small_one(tmp_path):
    """Tables from 10,000 rows go through pyarrow's CSV writer: read back, every
    cell equals what pandas' writer gives (floats exactly, NaN empty, text
    guarded against formulas, a line break kept inside its cell), CR LF rows."""
    import numpy as np
    import pandas as pd

    from heatload.io import files

    n = 12_000
    rng = np.random.default_rng(1)
    df = pd.DataFrame({"strategy": ["=HYPERLINK(1)", "meter-in"] * (n // 2),
                       "heat_W": rng.random(n) * 1e4,
                       "tiny": np.r_[np.nan, rng.random(n - 1) * 1e-9],
                       "count": np.arange(n), "note": ["a\r\nb"] * n})
    big, small = tmp_path / "big.csv", tmp_path / "small.csv"
    files.to_csv(df, big)
    assert files._ARROW_ROWS <= n
    files.csv_safe(df).to_csv(small, index=False, encoding="utf-8", lineterminator="\r\n")
    a, b = pd.read_csv(big), pd.read_csv(small)
    pd.testing.assert_frame_equal(a, b)
    assert a["strategy"][0] == "'=HYPERLINK(1)"
    raw = big.read_bytes()
    assert raw.count(b"\r\n") == 2 * n + 1     # each row's end and each cell's break


def test_a_file_made_while_computing_is_not_replaced_without_force(tmp_path):
    """The output was checked before computing; another run (or the user) made
    the file meanwhile: without --force it is kept and the write refused, with
    the same one-line message; with --force it is replaced."""
    target = tmp_path / "sweep.csv"

    def write(tmp):
        target.write_text("the other run's table\n")     # appears while we compute
        Path(tmp).write_text("ours\n")

    with pytest.raises(HeatloadError, match="--force"):
        outputs.write_atomic(target, write, "--output")
    assert target.read_text() == "the other run's table\n"
    assert [p.name for p in tmp_path.iterdir()] == ["sweep.csv"]   # no temporary left
    outputs.write_atomic(target, write, "--output", force=True)
    assert target.read_text() == "ours\n"
