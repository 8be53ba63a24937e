"""No way in: a static scan of the product's code, and safe defaults."""

import ast
import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PRODUCT = [p for p in (ROOT / "heatload", ROOT / "dashboard") if p.is_dir()]


def test_bandit_finds_no_medium_or_high_issue():
    r = subprocess.run([sys.executable, "-m", "bandit", "-q", "-r", *map(str, PRODUCT),
                        "--severity-level", "medium", "-f", "json"],
                       capture_output=True, text=True, cwd=ROOT)
    report = json.loads(r.stdout)
    found = [(i["filename"], i["line_number"], i["test_id"], i["issue_text"])
             for i in report["results"]]
    assert found == [], found


def _calls(tree):
    for node in ast.walk(tree):
        if isinstance(node, ast.Call):
            f = node.func
            if isinstance(f, ast.Name):            # eval(...), exec(...)
                yield f.id
            elif isinstance(f, ast.Attribute) and isinstance(f.value, ast.Name) \
                    and f.value.id == "builtins":     # builtins.eval(...)
                yield f.attr


def test_no_eval_exec_pickle_or_unsafe_yaml():
    bad = []
    for folder in PRODUCT:
        for path in folder.rglob("*.py"):
            tree = ast.parse(path.read_text(encoding="utf-8"))
            names = set(_calls(tree))
            for forbidden in ("eval", "exec", "compile", "__import__"):
                if forbidden in names:
                    bad.append((path.name, forbidden))
            for node in ast.walk(tree):
                if isinstance(node, (ast.Import, ast.ImportFrom)):
                    mods = [a.name for a in node.names] + [getattr(node, "module", "") or ""]
                    if any(m.split(".")[0] in ("pickle", "marshal", "shelve", "yaml", "dill")
                           for m in mods):
                        bad.append((path.name, mods))
    assert bad == []


def test_dashboard_binds_loopback_and_no_debug_by_default():
    from heatload.cli import build_parser
    args = build_parser().parse_args(["dashboard"])
    assert args.host == "127.0.0.1" and args.debug is False


def test_dashboard_sends_security_headers_and_404_for_traversal():
    """OWASP secure-headers practice: a content security policy without other
    origins, no framing, no MIME sniffing; a request outside the served files is a
    404 (it was a 500 from the framework's dependency check)."""
    from heatload.dashboard.app import make_app
    client = make_app().server.test_client()
    page = client.get("/")
    assert page.status_code == 200
    csp = page.headers["Content-Security-Policy"]
    assert "frame-ancestors 'none'" in csp and "default-src 'self'" in csp
    assert page.headers["X-Content-Type-Options"] == "nosniff"
    assert page.headers["X-Frame-Options"] == "DENY"
    for url in ("/_dash-component-suites/dash/../../../../etc/passwd",
                "/_dash-component-suites/dash/%2e%2e/%2e%2e/x.js",
                "/_dash-component-suites/nothing/x.js", "/assets/../../etc/passwd"):
        r = client.get(url)
        assert r.status_code == 404, url
        assert b"root:" not in r.data


def test_dashboard_serves_only_its_own_routes_and_refuses_malformed_callbacks():
    """A path the app does not serve is a 404 (Dash would answer its page), a GET
    of the callback route a 405, and a callback body the page never sends a 400
    in one line (it was a 500 with a traceback in the server log)."""
    from heatload.dashboard.app import make_app
    client = make_app().server.test_client()
    for url in ("/nope", "/download", "/%2e%2e/%2e%2e/etc/passwd"):
        assert client.get(url).status_code == 404, url
    assert client.get("/_dash-update-component").status_code == 405
    deep = "[" * 100_000 + "]" * 100_000      # nested past the JSON reader's recursion
    for body in ("{}", '{"output": "x.y", "inputs": "nope"}', "[1, 2]", deep):
        r = client.post("/_dash-update-component", data=body, content_type="application/json")
        assert r.status_code == 400, body[:40]
        assert b"Traceback" not in r.data
    for url in ("/", "/_dash-layout", "/_dash-dependencies"):
        assert client.get(url).status_code == 200, url
