"""How the product installs: one top-level name, the engine free of its front end.

The Dash front end lives in the checkout's top-level ``dashboard/`` folder but is
installed as ``heatload.dashboard`` (pyproject's package-dir): nothing named
``dashboard`` lands in site-packages, where it would clash with any other
package of that name.
"""

import ast
import re
import os
import subprocess
import sys
from importlib.metadata import entry_points
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _run_outside(code: str, tmp_path) -> subprocess.CompletedProcess:
    """Run *code* in a fresh interpreter whose path does not hold the checkout."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    return subprocess.run([sys.executable, "-c", code], cwd=tmp_path, env=env,
                          capture_output=True, text=True)


def test_no_top_level_dashboard_module(tmp_path):
    r = _run_outside("import dashboard", tmp_path)
    assert r.returncode != 0 and "No module named 'dashboard'" in r.stderr


def test_dashboard_installs_under_the_project_name(tmp_path):
    r = _run_outside("import heatload.dashboard.app as a; print(a.make_app.__name__)", tmp_path)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip() == "make_app"


def test_cli_finds_the_dashboard_through_its_entry_point():
    (ep,) = entry_points(group="heatload.frontends", name="dashboard")
    assert ep.value == "heatload.dashboard.app:run_cli"
    from heatload.dashboard import app
    assert ep.load() is app.run_cli


def test_no_engine_module_imports_the_dashboard():
    offenders = []
    for path in sorted((ROOT / "heatload").rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            names = ([a.name for a in node.names] if isinstance(node, ast.Import)
                     else [node.module or ""] if isinstance(node, ast.ImportFrom) else [])
            if any(n.split(".")[0] == "dashboard" or n.startswith("heatload.dashboard")
                   for n in names):
                offenders.append(f"{path.name}:{node.lineno}")
    assert offenders == []


def test_dashboard_has_no_import_fallbacks():
    """A real ImportError in the front end must surface, not read as 'not installed'."""
    for path in sorted((ROOT / "dashboard").glob("*.py")):
        text = path.read_text(encoding="utf-8")
        assert "importlib" not in text, path.name
        assert "not installed yet" not in text and "does not have yet" not in text, path.name


def test_engine_docstring_examples_are_collected():
    """The docstring examples run in CI (pytest's --doctest-modules over heatload/);
    this guards that the option stays on and the examples stay numerous."""
    import doctest
    import importlib
    import tomllib
    config = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["pytest"]["ini_options"]
    assert "--doctest-modules" in config["addopts"] and "heatload" in config["testpaths"]
    finder, examples = doctest.DocTestFinder(), 0
    for path in sorted((ROOT / "heatload").rglob("*.py")):
        parts = path.relative_to(ROOT).with_suffix("").parts
        module = importlib.import_module(".".join(p for p in parts if p != "__init__"))
        examples += sum(len(t.examples) > 0 for t in finder.find(module))
    assert examples >= 30


def test_air_table_ships_as_package_data():
    """heat_transfer and cooler read the tables in heatload/data/: the wheel must carry them."""
    import fnmatch
    import tomllib
    config = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]
    patterns = config["package-data"]["heatload"]
    assert any(fnmatch.fnmatch("data/air_properties.npz", p) for p in patterns)
    for name in ("air_properties", "water_properties"):
        assert (ROOT / "heatload" / "data" / f"{name}.npz").is_file()
        assert fnmatch.fnmatch(f"data/{name}.npz", patterns[0])


def _make_recipe(target: str) -> str:
    """The recipe lines of a Makefile target (tabs stripped)."""
    text = (ROOT / "Makefile").read_text()
    block = re.search(rf"^{re.escape(target)}:.*?\n((?:\t.*\n)+)", text, re.M)
    assert block, target
    return block.group(1)


def test_make_run_installs_only_what_running_needs():
    """`make run` installs the package without its test extras, with pip's
    progress visible; `make test` adds the extras."""
    text = (ROOT / "Makefile").read_text()
    run_deps = re.search(r"^run:(.*)$", text, re.M).group(1).split()
    test_deps = re.search(r"^test:(.*)$", text, re.M).group(1).split()
    (run_stamp,) = run_deps
    run_install = _make_recipe(run_stamp)
    assert "-e ." in run_install and "[test]" not in run_install
    assert "--quiet" not in text and " -q " not in run_install
    (test_stamp,) = test_deps
    assert "[test]" in _make_recipe(test_stamp)


def test_every_engine_subpackage_is_packaged():
    # a subpackage missing from pyproject's list would be left out of the wheel
    import tomllib
    listed = set(tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]
                 ["packages"])
    found = {".".join(p.relative_to(ROOT).parent.parts)
             for p in (ROOT / "heatload").rglob("__init__.py")}
    assert found <= listed, found - listed


def test_engine_modules_do_not_print():
    # printing is the command line's job (heatload/cli/); engine modules return data
    import re
    for path in (ROOT / "heatload").rglob("*.py"):
        if "cli" in path.relative_to(ROOT / "heatload").parts:
            continue
        code = "\n".join(line for line in path.read_text(encoding="utf-8").splitlines()
                         if not line.lstrip().startswith((">>>", "#")))
        assert not re.search(r"(?<![\w.])print\(", code), path.name
