"""The command line: start-up weight, JSON shape, one-line errors, the README's promises."""

import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from heatload import io
from heatload.cli import main
from heatload.model import STRATEGIES

ROOT = Path(__file__).resolve().parents[1]
HEAVY = ("dash", "plotly", "CoolProp")


def _modules_after(code: str) -> set:
    out = subprocess.run([sys.executable, "-c", code + "\nimport sys\nprint(' '.join(sys.modules))"],
                         capture_output=True, text=True, check=True, cwd=ROOT)
    return set(out.stdout.split())


def test_import_is_light():
    mods = _modules_after("import heatload")
    assert not [m for m in HEAVY if m in mods]


@pytest.mark.parametrize("argv", [["--help"], ["check", "duty_cycles/forming_press.toml"]])
def test_help_and_check_import_no_ui_or_coolprop(argv):
    code = ("import contextlib, io as _io\nfrom heatload.cli import main\n"
            "with contextlib.redirect_stdout(_io.StringIO()):\n"
            f"    try:\n        main({argv!r})\n    except SystemExit:\n        pass")
    mods = _modules_after(code)
    assert not [m for m in HEAVY if m in mods]


@pytest.mark.parametrize("argv", [
    ["compare"], ["thermal"], ["cooler", "--samples", "100"],
    ["cooler", "duty_cycles/conveyor_winch.toml", "--samples", "100"],
    ["sweep", "--vary", "power_unit.pump.displacement=16..40cm^3:3", "--top", "2"]],
    ids=lambda a: " ".join(a[:2]))
def test_air_and_water_cooled_commands_never_import_coolprop(argv):
    """Air and water properties come from the shipped tables; CoolProp (a
    multi-second import) is left to glycol-water coolers."""
    code = ("import contextlib, io as _io\nfrom heatload.cli import main\n"
            "with contextlib.redirect_stdout(_io.StringIO()):\n"
            f"    assert main({argv!r}) == 0")
    assert "CoolProp" not in _modules_after(code)


def test_compare_json_lists_all_strategies(capsys):
    from heatload import io
    assert main(["compare", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    listed = [s.kind for s in io.load_scenario(io.default_scenario_path()).strategies]
    assert [s["strategy"] for s in data["strategies"]] == listed
    # the bundled examples together show every registered strategy
    seen = set()
    for path in io.example_paths():
        assert main(["compare", "--json", str(path)]) == 0
        seen |= {s["strategy"] for s in json.loads(capsys.readouterr().out)["strategies"]}
    assert seen == set(STRATEGIES)
    for s in data["strategies"]:
        for key in ("heat_to_oil_W", "electric_energy_per_cycle_J", "electric_energy_per_year_kWh",
                    "peak_pressure_Pa", "oil_temperature_steady_C", "cooler_duty_W",
                    "warnings", "phases"):
            assert key in s
        assert len(s["phases"]) == len(io.load_scenario(io.default_scenario_path()).phases)
    assert sorted(data["ranking"]) == sorted(s["label"] for s in data["strategies"])


def test_compare_table_marks_the_strategies_a_warning_rules_out(capsys):
    # the feasible ones numbered by their rank, the rest marked "out" (not numbered
    # among them); the default press has both
    from heatload import chain
    sc = io.load_scenario(io.default_scenario_path())
    verdicts = chain.compare(sc).decision().verdicts
    assert any(v.feasible for v in verdicts) and not all(v.feasible for v in verdicts)
    assert main(["compare", "--wide"]) == 0
    lines = capsys.readouterr().out.splitlines()
    for v in verdicts:
        row = next(ln for ln in lines if re.match(rf"\s*\S+\s+{re.escape(v.name)}\s", ln))
        assert row.split()[0] == (str(v.rank) if v.feasible else "out"), row


def test_compare_table_runs_in_us_units(capsys):
    assert main(["compare", "--units", "us", "--strategy", "meter-in"]) == 0
    out = capsys.readouterr().out
    assert "psi" in out and "°F" in out and "meter-in" in out


@pytest.mark.parametrize("path", io.example_paths(), ids=lambda p: p.name)
def test_check_each_example(path, capsys):
    assert main(["check", str(path)]) == 0
    assert capsys.readouterr().out.startswith("OK:")


def test_phases_command(capsys):
    assert main(["phases", "--strategy", "load-sensing"]) == 0
    assert "load-sensing" in capsys.readouterr().out
    assert main(["phases", "--strategy", "nonsense"]) == 2


def test_malformed_file_one_line_no_traceback(tmp_path):
    bad = tmp_path / "bad.toml"
    text = io.default_scenario_path().read_text()
    text = re.sub(r'(speed\s*=\s*)"[^"]*m/s"', r'\1"12 kg"', text, count=1)
    bad.write_text(text)
    r = subprocess.run([sys.executable, "-m", "heatload.cli", "compare", str(bad)],
                       capture_output=True, text=True, cwd=ROOT)
    assert r.returncode == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in r.stderr
    assert "bad.toml" in lines[0] and ".speed" in lines[0] and "velocity" in lines[0]


def test_missing_file_is_one_line(tmp_path):
    r = subprocess.run([sys.executable, "-m", "heatload.cli", "check", str(tmp_path / "no.toml")],
                       capture_output=True, text=True, cwd=ROOT)
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1


def test_readme_example_loads_and_compares():
    readme = (ROOT / "README.md").read_text()
    block = re.search(r"```toml\n(.*?)```", readme, re.S).group(1)
    sc = io.loads_scenario(block, source="README.md")
    assert sc.name == "Small clamp" and len(sc.phases) == 4
    from heatload import chain
    cmp = chain.compare(sc)
    assert len(cmp.outcomes) == len(STRATEGIES)


def test_readme_quick_start_matches_ci():
    readme = (ROOT / "README.md").read_text()
    quick = readme.split("## Quick start", 1)[1].split("##", 1)[0]
    assert "make run" in quick and "make test" in quick
    assert "make test" in (ROOT / ".ci" / "run").read_text()


# ---------------------------------------------------------------------------
# what the command line prints: escaped names, clean warnings, phase numbers
# ---------------------------------------------------------------------------

def _press_text(*edits):
    text = io.default_scenario_path().read_text()
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new)
    return text


def _write(tmp_path, text, name="press.toml"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


ESC_NAME = ('name = "main"', 'name = "ma\\u001b[2Jin\\u009b"')   # ESC clears a screen; CSI


def test_check_escapes_terminal_control_characters(tmp_path, capsys):
    text = _press_text(ESC_NAME, ('name = "dwell"', 'name = "dw\\u0007ell\\u202e"'))
    text = text.replace('actuator = "main"', 'actuator = "ma\\u001b[2Jin\\u009b"')
    p = _write(tmp_path, text)
    assert main(["check", str(p)]) == 0
    out = capsys.readouterr().out
    assert not [c for c in out if not c.isprintable() and c != "\n"]
    assert "ma\\x1b[2Jin\\x9b" in out and "dw\\x07ell\\u202e" in out


def test_json_output_stays_valid_with_control_characters(tmp_path, capsys):
    text = _press_text(ESC_NAME).replace('actuator = "main"', 'actuator = "ma\\u001b[2Jin\\u009b"')
    p = _write(tmp_path, text)
    assert main(["phases", str(p), "--strategy", "meter-in", "--json"]) == 0
    out = capsys.readouterr().out
    assert not [c for c in out if not c.isprintable() and c != "\n"]
    recs = json.loads(out)                               # still JSON, same value
    assert recs[0]["actuator"] == "ma\x1b[2Jin\x9b"


def test_engine_warning_is_one_clean_line(tmp_path):
    # IEC 60034-30-1's small-motor formula starts at 0.12 kW: a 1 W motor is outside it
    p = _write(tmp_path, _press_text(('rated_power = "22 kW"', 'rated_power = "1 W"')))
    r = subprocess.run([sys.executable, "-m", "heatload.cli", "compare", str(p),
                        "--strategy", "meter-in"], capture_output=True, text=True, cwd=ROOT)
    assert r.returncode == 0, r.stderr
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1, r.stderr
    assert lines[0].startswith("heatload: warning: rated power below 0.12 kW")
    assert "UserWarning" not in r.stderr and ".py:" not in r.stderr


def test_phases_are_numbered_from_one_in_messages(tmp_path):
    # the third [[phases]] item of the press is "forming"; its path stays phases[2]
    text = io.default_scenario_path().read_text()
    head, sep, tail = text.partition('name = "forming"')
    tail = re.sub(r'speed = "[^"]*"', 'speed = "12 kg"', tail, count=1)
    p = _write(tmp_path, head + sep + tail)
    r = subprocess.run([sys.executable, "-m", "heatload.cli", "check", str(p)],
                       capture_output=True, text=True, cwd=ROOT)
    assert r.returncode == 2
    line = r.stderr.strip()
    assert "phase 3 'forming', phases[2].speed: expected a velocity" in line, line
    number = int(re.search(r"press\.toml:(\d+): ", line).group(1))
    assert 'speed = "12 kg"' in p.read_text().splitlines()[number - 1]


def test_check_shows_a_given_motor_efficiency(tmp_path, capsys):
    p = _write(tmp_path, _press_text(('efficiency_class = "IE3"',
                                      'efficiency_class = "IE3"\nefficiency = 0.915')))
    assert main(["check", str(p), "--wide"]) == 0  # one line per item, unwrapped
    motor = [ln for ln in capsys.readouterr().out.splitlines() if "pump:" in ln][0]
    assert "efficiency 91.5 % (given)" in motor and "IE3" not in motor
    assert main(["check", str(io.default_scenario_path())]) == 0
    assert "IE3" in capsys.readouterr().out


def test_check_of_a_power_tower_answers_at_once():
    """'10**10**8 bar' once kept `heatload check` busy for minutes (pint evaluated
    the arithmetic); now it is one line naming file, line and field.  The timeout
    is a hang guard, not a benchmark."""
    bad = Path(__file__).parent / "data" / "bad" / "quantity_power_tower.toml"
    r = subprocess.run([sys.executable, "-m", "heatload.cli", "check", str(bad)],
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1
    assert "quantity_power_tower.toml:29: power_unit.relief.cracking_pressure" in lines[0]
    assert "no arithmetic" in lines[0]


# --- fits a terminal: 80 columns, plain numbers, counts in English ------------------

def _lines_of(argv, capsys, monkeypatch, columns="80"):
    monkeypatch.setenv("COLUMNS", columns)
    assert main(argv) == 0
    return capsys.readouterr().out.splitlines()


SWEEP = ["sweep", "--vary", "power_unit.pump.displacement=16..40cm^3:5",
         "--vary", "power_unit.pump.shaft_speed=1000..1800rpm:3"]


@pytest.mark.parametrize("path", io.example_paths(), ids=lambda p: p.name)
@pytest.mark.parametrize("command", [["compare"], ["thermal"], ["cooler", "--samples", "200"],
                                     ["phases", "--strategy", "meter-in"], SWEEP],
                         ids=lambda c: c[0])
def test_output_fits_80_columns(path, command, capsys, monkeypatch):
    # 80 columns: the classic terminal width (common practice)
    lines = _lines_of(command + [str(path)], capsys, monkeypatch)
    too_long = [x for x in lines if len(x) > 80]
    assert lines and too_long == []


@pytest.mark.parametrize("units", ["si", "us"])
@pytest.mark.parametrize("vary", [
    ["actuators.main.bore=90..110mm:2", "actuators.ejector.bore=40..60mm:2",
     "power_unit.pump.displacement=20..30cm^3:2"],
    ["phases[0].load=-4..-2kN:2", "phases[1].load=-4..-2kN:2", "phases[2].load=90..110kN:2"],
    ["power_unit.pump.volumetric_efficiency=0.9..0.95:2",
     "power_unit.pump.hydromechanical_efficiency=0.85..0.9:2",
     "power_unit.directional_valve.centre_pressure_drop=2..5bar:2"],
    ["strategies.meter-in.counterbalance_setting=10..20bar:2",
     "strategies.pressure-compensated.counterbalance_setting=10..20bar:2",
     "strategies.load-sensing.counterbalance_setting=10..20bar:2"],
], ids=["two-bores", "three-loads", "efficiencies", "three-strategies"])
def test_sweep_of_three_fields_fits_80_columns(vary, units, capsys, monkeypatch):
    # 80 columns: the classic terminal width (common practice); each table keeps
    # the three varied values of every row (beside strategy, energy and cooler)
    argv = ["sweep", "--top", "4", "--units", units, "--strategy", "pressure-compensated",
            "--strategy", "variable-speed"]
    for v in vary:
        argv += ["--vary", v]
    lines = _lines_of(argv, capsys, monkeypatch)
    assert [x for x in lines if len(x) > 80] == []
    # no table broken over lines: under each rule, rows of a whole strategy name,
    # three varied values and at least two figures
    rules = [i for i, x in enumerate(lines) if x.startswith("-") and not x.strip("- ")]
    assert len(rules) >= 2
    for i in rules:
        row = lines[i + 1].split()
        assert row[0] in ("pressure-compensated", "variable-speed") and len(row) >= 1 + 3 + 2
        assert lines[i].count("-") >= 5 * 4     # the rule spans the columns on one line
    text = "\n".join(lines)
    for v in vary:                       # each field named, over its column or above
        assert v.split("=")[0].rsplit(".", 1)[-1].split("_")[-1] in text


LOGS = Path(__file__).resolve().parents[1] / "duty_cycles" / "logs"


@pytest.mark.parametrize("argv", [
    ["logfit", str(LOGS / "platform_lift_day.csv"), "--scenario",
     str(Path(__file__).resolve().parents[1] / "duty_cycles" / "platform_lift.toml")],
    ["logfit", str(LOGS / "platform_lift_day.csv")],
    ["trace", str(LOGS / "press_trace.csv")]], ids=["logfit-scenario", "logfit", "trace"])
def test_measured_logs_output_fits_80_columns(argv, capsys, monkeypatch):
    # 80 columns: the classic terminal width (common practice); the trace's draft
    # (printed without -o) is a file and fits by its own line breaks
    lines = _lines_of(argv, capsys, monkeypatch)
    assert lines and [x for x in lines if len(x) > 80] == []
    if argv[0] == "logfit":
        assert max(len(x) for x in _lines_of(argv + ["--wide"], capsys, monkeypatch)) > 80


def test_trace_table_says_which_figures_are_medians_and_which_a_mean(capsys, monkeypatch):
    text = "\n".join(_lines_of(["trace", str(LOGS / "press_trace.csv")], capsys, monkeypatch))
    head = text.split("\n-")[0]
    assert "(median)" in head and "power (mean)" in head
    assert "the median of its samples" in text and "mean of p x Q" in text


def test_compare_keeps_key_columns_and_wide_shows_all(capsys, monkeypatch):
    narrow = "\n".join(_lines_of(["compare"], capsys, monkeypatch))
    for key in ("strategy", "[kWh/yr]", "cooler", "meter-in", "variable-speed"):
        assert key in narrow
    assert "--wide shows every column" in " ".join(narrow.split())
    # the warnings stay, as lines below the table
    assert "  ! meter-out / slow-down:" in narrow
    wide = _lines_of(["compare", "--wide"], capsys, monkeypatch)
    header = " ".join(wide[1:3])
    for every in ("CO2", "eff.", "peak", "warnings"):
        assert every in header
    assert max(len(x) for x in wide) > 80
    # a wide terminal gets more columns without --wide
    assert "CO2" in " ".join(_lines_of(["compare"], capsys, monkeypatch, columns="200")[1:3])


def test_sweep_prints_plain_numbers_and_honours_top(capsys, monkeypatch):
    out = _lines_of(SWEEP + ["--strategy", "meter-in", "--top", "2"], capsys, monkeypatch)
    text = "\n".join(out)
    assert not re.search(r"\de[+-]\d", text)          # no exponent form
    assert re.search(r"\d,\d{3}", text)               # thousands separated (kWh/yr)
    # every list (best variants, each Pareto front) holds at most --top rows
    blocks, rows = [], None
    for line in out:
        if line.startswith("--"):
            rows = 0
            blocks.append(rows)
        elif rows is not None and line.startswith("meter-in"):
            blocks[-1] += 1
        elif not line.strip():
            rows = None
    assert len(blocks) >= 2 and max(blocks) <= 2 and blocks[0] == 2


def test_counts_read_as_english(capsys, monkeypatch):
    from heatload.outputs.tables import count, times
    # English number agreement (common usage)
    assert count(1, "strategy") == "1 strategy" and count(2, "strategy") == "2 strategies"
    assert count(1, "variant") == "1 variant" and count(1_000, "variant") == "1,000 variants"
    assert count(3, "day") == "3 days"
    assert [times(n) for n in (0, 1, 2, 5)] == ["never", "once", "twice", "5 times"]
    text = "\n".join(_lines_of(SWEEP + ["--strategy", "meter-in", "--top", "1"], capsys,
                               monkeypatch))
    assert "x 1 strategy " in text and "1 strategies" not in text
    assert not re.search(r"\b1 (variants|strategies|phases|times)\b", text)


def test_plain_number_never_uses_exponents():
    from heatload.outputs.tables import plain_number
    assert plain_number(4.904e4) == "49,040"
    assert plain_number(2.5e9) == "2,500,000,000"
    assert plain_number(3.2e-6) == "0.00000320"
    assert plain_number(float("nan")) == "n/a"


@pytest.mark.parametrize("argv, words", [
    (["compare", "--strategy", "METER-IN"], "unknown strategy 'METER-IN'"),
    (["thermal", "--strategy", "nosuch"], "unknown strategy 'nosuch'"),
    (["cooler", "--samples", "10", "--seed", "-1"], "whole number >= 0"),
    (["cooler", "--samples", "1000000000"], "samples"),
    (["cooler", "--samples", "1"], "samples"),
    (["cooler", "--samples", "10", "--rated-duty", "10 kW", "--rated-etd", "40 degC"],
     "that is a temperature"),
    (["cooler", "--samples", "10", "--rated-duty", "10 kW", "--rated-etd", "1e6 K"],
     "at most 200 K"),
    (["sweep", "--strategy", "meter-in", "--vary",
      "power_unit.pump.displacement=16..40cm^3:100000000"], "rows one sweep evaluates"),
    (["sweep", "--vary", "power_unit.pump.displacement=16...40cm^3:3"], "two dots"),
    (["sweep", "--vary", "reservoir.oil_volume=1e-9..1e-6L:2"], "below 0.1 L"),
    (["report", "--price", "load-sensing=1e308", "-o", "never.html"], "within 0"),
    (["report", "--price", "load-sensing=nan", "-o", "never.html"], "finite"),
])
def test_careless_options_are_one_line_errors(argv, words, tmp_path):
    """Each of these once ended in 'internal error', ran for hours or was
    misread; now a one-line refusal naming the option, before any computing."""
    r = subprocess.run([sys.executable, "-m", "heatload.cli", *argv], capture_output=True,
                       text=True, cwd=tmp_path, timeout=120)
    assert r.returncode == 2, r.stderr
    assert "internal error" not in r.stderr and "Traceback" not in r.stderr
    assert words in r.stderr
    assert not (tmp_path / "never.html").exists()


def test_a_fifo_or_device_as_the_input_is_refused_at_once(tmp_path):
    import os
    fifo = tmp_path / "in.toml"
    os.mkfifo(fifo)
    for path in (fifo, Path("/dev/zero")):
        r = subprocess.run([sys.executable, "-m", "heatload.cli", "check", str(path)],
                           capture_output=True, text=True, timeout=60)   # hang guard
        assert r.returncode == 2 and "not a regular file" in r.stderr


def test_schema_command_prints_a_file_that_loads(capsys):
    # a newcomer's first step: the commented example, straight from the command line
    assert main(["schema"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("# A heatload duty-cycle file")
    assert max(len(line) for line in out.splitlines()) <= 100
    sc = io.loads_scenario(out)
    assert sc.name == "Example press"
