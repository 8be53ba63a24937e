"""Tests of the customer report and its exports (heatload.outputs.report): one
self-contained HTML file per bundled example, no outside resources (static scan
and headless Chromium), figures that agree with ``heatload compare --json``,
spreadsheet and CSV files that read back with the same values, atomic writes
that never overwrite without --force."""

import contextlib
import html.parser
import io as stdio
import json
import math
import os
import re
import shutil
import sys
import time

import numpy as np
import pytest

from heatload import chain, io
from heatload.outputs import report, tables
from heatload.cli import main
from heatload.errors import HeatloadError

EXAMPLES = io.example_paths()
SAMPLES = 200  # Monte Carlo samples of the report's cooler uncertainty (speed)


@pytest.fixture(scope="module")
def built():
    """{path: (scenario, comparison, prepared data, html, seconds)} for every example."""
    out = {}
    for p in EXAMPLES:
        t0 = time.perf_counter()
        sc = io.load_scenario(p)
        cmp = chain.compare(sc)
        rd = report.report_data(sc, cmp, source=str(p), samples=SAMPLES)
        text = report.build_report(sc, cmp, prepared=rd)
        out[p] = (sc, cmp, rd, text, time.perf_counter() - t0)
    return out


def _run(argv):
    out, err = stdio.StringIO(), stdio.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        rc = main(argv)
    return rc, out.getvalue(), err.getvalue()


def test_every_example_builds(built):
    assert len(built) == len(EXAMPLES) >= 3
    for p, (sc, cmp, rd, text, _) in built.items():
        assert text.startswith("<!DOCTYPE html>") and text.rstrip().endswith("</html>")
        for section in ("summary", "comparison", "energy", "cycle", "shift", "cooler",
                        "payback", "warnings", "assumptions"):
            assert f'id="{section}"' in text, (p.name, section)
        assert "ISO 4413" in text and "estimate for early design" in text
        for method in ("ISO 3448", "ASTM D341", "ASTM D2270", "Cragoe", "Churchill-Chu",
                       "effectiveness-NTU", "IEC 60034-30-1", "Wilson", "Darcy-Weisbach",
                       "Colebrook"):
            assert method in text, method
        # every warning of the comparison is listed
        for r in rd["data"]["strategies"]:
            for w in r["warnings"]:
                assert _esc(w["message"]) in text


def _esc(s):
    return html.escape(s)


class _Refs(html.parser.HTMLParser):
    """Collects resource attributes, <style> text, style attributes and script bodies."""

    ATTRS = ("src", "href", "xlink:href", "srcset", "poster", "data", "action", "formaction",
             "background", "manifest", "icon")

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.attrs, self.styles, self.scripts, self.tags = [], [], [], []
        self._in = None

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for k, v in attrs:
            if k in self.ATTRS and v:
                self.attrs.append((tag, k, v))
            if k == "style" and v:
                self.styles.append(v)
        self._in = tag if tag in ("style", "script") else None
        if tag == "script":
            self.scripts.append([dict(attrs), ""])

    def handle_data(self, data):
        if self._in == "style":
            self.styles.append(data)
        elif self._in == "script":
            self.scripts[-1][1] += data

    def handle_endtag(self, tag):
        self._in = None


REMOTE = re.compile(r"^\s*(https?:)?//", re.I)
CSS_REMOTE = re.compile(r"(@import|url\()\s*['\"]?\s*(https?:)?//", re.I)
ANY_RESOURCE = re.compile(r"(src\s*=\s*['\"]?\s*(https?:)?//|@import[^;]*https?://|"
                          r"url\(\s*['\"]?\s*(https?:)?//)", re.I)


def test_no_outside_resources(built):
    for p, (*_, text, _) in built.items():
        # no src=, @import or url() to a server; no URL anywhere in the file
        assert not ANY_RESOURCE.search(text), (p.name, ANY_RESOURCE.search(text).group(0))
        parser = _Refs()
        parser.feed(text)
        assert "link" not in parser.tags and "img" not in parser.tags and "iframe" not in parser.tags
        for tag, k, v in parser.attrs:
            assert not REMOTE.match(v), (p.name, tag, k, v)
        for s in parser.styles:
            assert not CSS_REMOTE.search(s), (p.name, s[:80])
        assert "@font-face" not in text
        # the only script is the embedded data block: charts are inline SVG
        assert [a.get("type") for a, _ in parser.scripts] == ["application/json"]
        assert not re.search(r"https?://", text), p.name
        assert text.count("<svg") >= 4


def _cells(text):
    """[(strategy, key, value)] from the data-* attributes of the report's numbers."""
    pat = re.compile(r'data-key="([^"]+)"(?: data-strategy="([^"]*)")? data-value="([^"]+)"')
    return [(html.unescape(s) if s else None, k, float(v)) for k, s, v in pat.findall(text)]


def test_figures_equal_compare_json(built):
    keys = ("electric_energy_per_year_kWh", "cost_per_year", "co2_per_year_kg", "heat_to_oil_W",
            "oil_temperature_steady_C", "oil_temperature_operating_C", "cooler_duty_W",
            "peak_pressure_Pa", "overall_efficiency")
    for p, (sc, cmp, rd, text, _) in built.items():
        rc, out, _ = _run(["compare", str(p), "--json"])
        assert rc == 0
        js = {r["label"]: r for r in json.loads(out)["strategies"]}
        cells = _cells(text)
        seen = set()
        for s, k, v in cells:
            if s is not None and k in keys:
                assert v == pytest.approx(js[s][k], rel=1e-12, abs=1e-9), (p.name, s, k)
                seen.add((s, k))
        assert seen == {(s, k) for s in js for k in keys}, p.name
        # the shown text is the value rounded (energy with thousands separators)
        for s, r in js.items():
            shown = f"{r['electric_energy_per_year_kWh']:,.0f}"
            assert (f'data-strategy="{_esc(s)}" data-value="{r["electric_energy_per_year_kWh"]!r}"'
                    f'>{shown}<') in text
        # savings of the summary equal tables.savings_against (kWh and money)
        sav = tables.savings_against(cmp, rd["present"])[rd["recommended"]]
        top = {k: v for s, k, v in cells if s is None}
        assert top["energy_saving_kWh"] == pytest.approx(sav["energy_saving_kWh"], rel=1e-12)
        assert top["cost_saving"] == pytest.approx(sav["cost_saving"], rel=1e-12)
        # the embedded data block is the same comparison
        m = re.search(r'<script type="application/json" id="heatload-data">(.*?)</script>',
                      text, re.S)
        assert "<" not in m.group(1)         # no "</script" or "<!--" can end or bend it
        block = json.loads(m.group(1))
        assert block["comparison"]["ranking"] == json.loads(out)["ranking"]


def test_recommendation_logic(built):
    from heatload import decision

    for p, (sc, cmp, rd, text, _) in built.items():
        dec = cmp.decision(rd["present"])
        # the report recommends what the one decision rule recommends
        assert rd["recommended"] == dec.best.name
        assert rd["data"]["ranking"] == dec.order
        assert _esc(dec.sentence()) in text
        for v in dec.verdicts:
            codes = {w.code for w in cmp.outcome(v.name).warnings}
            if codes & {"pressure-rating", "stall", "overrunning-load", "speed-not-reached"}:
                assert not v.feasible and rd["excluded"][v.name]
                assert _esc(v.reason) in text
        feasible = [v for v in dec.verdicts if v.feasible]
        if feasible:
            assert rd["recommended"] == min(feasible, key=lambda v: v.cost.total).name
        assert all(isinstance(v, decision.Verdict) for v in dec.verdicts)


def test_payback_by_hand(built):
    p = io.default_scenario_path()
    sc, cmp, rd, *_ = built[p]
    data = rd["data"]
    rows = report.payback_rows(data, "meter-in", {"load-sensing": 4200.0})
    r = next(x for x in rows if x["strategy"] == "load-sensing")
    base = next(x for x in data["strategies"] if x["label"] == "meter-in")
    ls = next(x for x in data["strategies"] if x["label"] == "load-sensing")
    # electricity saved: the circuit's and the cooler fan's
    saving = (base["cost_per_year"] + base["yearly_cost"]["fan"]
              - ls["cost_per_year"] - ls["yearly_cost"]["fan"])
    price0 = base["price"] or 0.0
    # the extra price: the circuits' difference and the coolers' (a smaller one saves)
    cooler = ls["yearly_cost"]["cooler_price"] - base["yearly_cost"]["cooler_price"]
    # simple payback = extra price / yearly saving (definition)
    assert r["extra_price"] == pytest.approx(4200.0 - price0 + cooler)
    assert r["cost_saving_per_year"] == pytest.approx(saving, rel=1e-12)
    assert r["payback_years"] == pytest.approx((4200.0 - price0 + cooler) / saving, rel=1e-12)
    with pytest.raises(HeatloadError) as e:
        report.parse_prices(["nothing=3"], sc)
    assert e.value.field == "--price"
    with pytest.raises(HeatloadError):
        report.parse_prices(["load-sensing=cheap"], sc)
    assert report.parse_prices(["load-sensing=4200"], sc) == {"load-sensing": 4200.0}


def test_a_price_given_alone_is_the_extra_price_over_the_present(built):
    """`--price X=...` alone once gave "no price is known": the present circuit's
    extra price over itself is 0 by definition, so X's price is its extra price."""
    p = io.default_scenario_path()
    data = built[p][2]["data"]
    data = dict(data, strategies=[dict(r, price=None) for r in data["strategies"]])
    rows = {r["strategy"]: r for r in report.payback_rows(data, "meter-in",
                                                          {"variable-speed": 6000.0})}
    assert rows["meter-in"]["extra_price"] == 0.0
    recs = {r["label"]: r for r in data["strategies"]}
    cooler = (recs["variable-speed"]["yearly_cost"]["cooler_price"]
              - recs["meter-in"]["yearly_cost"]["cooler_price"])
    assert rows["variable-speed"]["extra_price"] == pytest.approx(6000.0 + cooler)
    saving = rows["variable-speed"]["cost_saving_per_year"]
    assert saving > 0
    assert rows["variable-speed"]["payback_years"] == pytest.approx((6000.0 + cooler) / saving,
                                                                    rel=1e-12)
    assert rows["load-sensing"]["extra_price"] is None


def test_print_stylesheet(built):
    text = next(iter(built.values()))[3]
    css = re.search(r"<style>(.*?)</style>", text, re.S).group(1)
    assert re.search(r"@page\s*{\s*size:\s*auto;\s*margin:", css)
    assert "@media print" in css
    assert "page-break-before: always" in css and "break-inside: avoid" in css
    assert "display: table-header-group" in css
    # charts fit the printable width of A4 and Letter with 15 mm margins: 180 mm = 680 px
    from heatload.outputs.report_assets import FIGURE_WIDTH
    assert FIGURE_WIDTH <= (210 - 30) / 25.4 * 96 + 0.5


def test_charts_units_roles_and_one_scale(built):
    from heatload.outputs.report_assets import ROLE_COLOURS

    p = io.default_scenario_path()
    sc, cmp, rd, text, _ = built[p]
    recs = {r["label"]: r for r in rd["data"]["strategies"]}
    present, rec = rd["present"], rd["recommended"]
    # axis titles carry their unit in brackets
    for title in ("yearly cost of ownership [EUR/year]", "energy per cycle [kJ]",
                  "heat into oil [kW]", "pump pressure [bar]", "time in the cycle [s]",
                  "oil temperature [°C]", "time from cold start [h]"):
        assert title in text, title
    # one colour per role: present and recommended in their colours in every chart
    for role in ("present", "recommended"):
        assert text.count(ROLE_COLOURS[role]) >= 3, role
    # the energy-flow chart prints each strategy's electric input, on one scale:
    # bar lengths are proportional to the values (the larger one the longer)
    svg = report.energy_flow_chart([recs[present], recs[rec]], [present, rec],
                                   [ROLE_COLOURS["present"], ROLE_COLOURS["recommended"]])
    widths = [float(w) for w in re.findall(r'<rect x="190" y="[\d.]+" width="([\d.]+)"', svg)]
    e = [recs[present]["electric_energy_per_cycle_J"], recs[rec]["electric_energy_per_cycle_J"]]
    assert widths[0] / widths[1] == pytest.approx(e[0] / e[1], rel=2e-2)
    from heatload.outputs.svgplot import fmt
    assert f">{fmt(e[0] / 1e3)}<" in svg and f">{fmt(e[1] / 1e3)}<" in svg
    # the cycle chart names every phase
    for ph in sc.phases:
        assert _esc(ph.name) in text


def test_energy_flow_closes_first_law(built):
    for p, (sc, cmp, rd, *_) in built.items():
        for r in rd["data"]["strategies"]:
            rows = report.energy_flow_rows(r)
            out = sum(v for _, v, _ in rows)
            useful = r["useful_energy_per_cycle_J"] / 1e3
            # electric input (+ work of an overrunning load) = useful work + every loss
            inflow = r["electric_energy_per_cycle_J"] / 1e3 + max(-useful, 0.0)
            assert out == pytest.approx(inflow, rel=2e-3), (p.name, r["label"])
            assert {w for *_, w in rows} <= {"useful", "room", "oil"}
            assert all(w == "room" for lab, _, w in rows if lab.startswith("drive motor"))


def test_cover_fingerprint_and_quote(built, tmp_path, monkeypatch):
    import hashlib

    monkeypatch.setattr("heatload.cooling.sizing.REPORT_SAMPLES", SAMPLES)
    src = io.default_scenario_path()
    sha = hashlib.sha256(src.read_bytes()).hexdigest()   # FIPS 180-4 via hashlib
    out = tmp_path / "r.html"
    rc, _, err = _run(["report", str(src), "-o", str(out), "--customer", "Acme <Works>",
                       "--revision", "C", "--date", "2026-01-31"])
    assert rc == 0, err
    text = out.read_text(encoding="utf-8")
    from heatload.outputs.report import tool_version
    for needle in (sha, "Acme &lt;Works&gt;", ">C<", "2026-01-31", f"heatload {tool_version()}",
                   src.name):
        assert needle in text, needle
    sc, cmp, rd, text, _ = built[src]
    if rd["cooler"]["cooler_needed"]:
        q = rd["quote"]
        assert 'id="quote-duty"' in text and "Quote this duty" in text
        unc = rd["uncertainty"]["cooler_duty_W"]
        # the quote is the duty with margin or its P90, whichever is higher
        assert q["duty_W"] == pytest.approx(max(rd["cooler"]["duty_W"], unc["P90"]))
        assert ("P90" in q["basis"]) and (f"{100 * rd['cooler']['margin']:.0f} %" in q["basis"])


def test_assumptions_in_customer_units(built):
    p = io.default_scenario_path()
    sc = built[p][0]
    us = report.assumptions(sc, system="us")
    si = report.assumptions(sc, system="si")
    t_us = next(a["value"] for a in us if a["item"] == "ambient, typical")
    t_si = next(a["value"] for a in si if a["item"] == "ambient, typical")
    assert "°F" in t_us and "°C" in t_si
    assert not any(re.search(r"\d K\b", a["value"]) and "temperature" in a["item"]
                   and "rise" not in a["item"] and "hysteresis" not in a["value"]
                   for a in si)


def _read_back_checks(frames_read, cmp, sc):
    sf = tables.strategy_frame(cmp)
    got = frames_read["strategies"]
    for col in ("electric_energy_per_year_kWh", "cost_per_year", "heat_to_oil_W",
                "cooler_duty_W", "peak_pressure_Pa"):
        np.testing.assert_allclose(got[col].to_numpy(float), sf[col].to_numpy(float),
                                   rtol=1e-12)
    assert list(got["label"]) == list(sf["label"])
    data = tables.comparison_dict(cmp)
    for r, e in zip(data["strategies"], got["electric_energy_per_year_kWh"]):
        assert float(e) == pytest.approx(r["electric_energy_per_year_kWh"], rel=1e-12)
    pc = tables.phase_component_frame(cmp)
    np.testing.assert_allclose(frames_read["phase_components"]["energy_J"].to_numpy(float),
                               pc["energy_J"].to_numpy(float), rtol=1e-12)
    for o in cmp.outcomes:
        recs = tables.phase_records(o, sc, cmp.phase_arrays)
        ph = frames_read[o.name]
        np.testing.assert_allclose(ph["heat_to_oil_W"].to_numpy(float),
                                   [r["heat_to_oil_W"] for r in recs], rtol=1e-12)
        np.testing.assert_allclose(ph["loss_relief_W"].to_numpy(float),
                                   [r["losses_W"]["relief"] for r in recs], rtol=1e-12)
    cool = frames_read["cooler"]
    for o in cmp.outcomes:
        row = cool[cool["strategy"] == o.name].iloc[0]
        assert float(row["duty_W"]) == pytest.approx(o.thermal.cooler_duty, rel=1e-12, abs=1e-9)
    assert len(frames_read["assumptions"]) > 30


def test_xlsx_and_csv_read_back(built, tmp_path):
    import pandas as pd

    p = io.default_scenario_path()
    sc, cmp, rd, *_ = built[p]
    frames = report.export_tables(sc, cmp, rd)
    x = report.write_xlsx(frames, tmp_path / "r.xlsx")
    sheets = pd.read_excel(x, sheet_name=None)
    assert {"strategies", "phase_components", "cooler", "assumptions", "payback"} <= set(sheets)
    by_strategy = {o.name: sheets[f"phases {o.name}"[:31]] for o in cmp.outcomes}
    _read_back_checks({**sheets, **by_strategy}, cmp, sc)
    files = report.write_csv(frames, tmp_path / "csv")
    read = {f.stem: pd.read_csv(f) for f in files}
    by_strategy = {o.name: read["phases_" + o.name] for o in cmp.outcomes}
    _read_back_checks({**read, **by_strategy}, cmp, sc)
    # nothing but the written files remains (temporary files replaced)
    assert sorted(os.listdir(tmp_path / "csv")) == sorted(f.name for f in files)
    with pytest.raises(HeatloadError) as e:
        report.write_csv(frames, tmp_path / "csv")
    assert e.value.field == "--csv"
    report.write_csv(frames, tmp_path / "csv", force=True)


def test_atomic_and_no_overwrite(tmp_path):
    target = tmp_path / "r.html"
    report.write_html("<p>one</p>", target)
    with pytest.raises(HeatloadError) as e:
        report.write_html("<p>two</p>", target)
    assert e.value.field == "--output"
    assert target.read_text() == "<p>one</p>"
    report.write_html("<p>two</p>", target, force=True)
    assert target.read_text() == "<p>two</p>"
    assert os.listdir(tmp_path) == ["r.html"]
    with pytest.raises(HeatloadError) as e:
        report.write_xlsx({}, target)
    assert e.value.field == "--xlsx"


def test_cli_report(tmp_path, monkeypatch):
    monkeypatch.setattr("heatload.cooling.sizing.REPORT_SAMPLES", SAMPLES)
    out = tmp_path / "press.html"
    rc, text, err = _run(["report", "-o", str(out), "--xlsx", str(tmp_path / "t.xlsx"),
                          "--csv", str(tmp_path / "csv"), "--price", "load-sensing=4200",
                          "--present", "meter-in"])
    assert rc == 0, err
    assert 50_000 < out.stat().st_size < 2_000_000 and "bytes" in text
    assert (tmp_path / "t.xlsx").exists() and (tmp_path / "csv" / "strategies.csv").exists()
    rc, _, err = _run(["report", "-o", str(out)])
    assert rc == 2 and "--force" in err
    rc, _, err = _run(["report", "-o", str(tmp_path / "x.html"), "--present", "nope"])
    assert rc == 2 and "--present" in err
    rc, _, err = _run(["report", "-o", str(tmp_path / "y.html"), "--price", "a=b"])
    assert rc == 2 and "--price" in err
    assert not (tmp_path / "x.html").exists() and not (tmp_path / "y.html").exists()


def _browser_binaries():
    chrome = os.environ.get("CHROME_BIN", "/usr/bin/chromium")
    driver = shutil.which("chromedriver") or "/usr/bin/chromedriver"
    return (chrome, driver) if os.path.exists(chrome) and os.path.exists(driver) else None


@pytest.mark.browser
def test_opens_offline_in_chromium(built, tmp_path):
    bins = _browser_binaries()
    if bins is None:
        pytest.skip("chromium / chromedriver not installed")
    from selenium import webdriver
    from selenium.webdriver.chrome.options import Options
    from selenium.webdriver.chrome.service import Service

    opts = Options()
    opts.binary_location = bins[0]
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
                "--disable-background-networking", "--disable-component-update",
                "--disable-sync", "--disable-default-apps", "--disable-extensions",
                "--no-first-run", "--no-default-browser-check", "--window-size=1200,900",
                "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1"):
        opts.add_argument(arg)
    opts.set_capability("goog:loggingPrefs", {"browser": "ALL"})
    drv = webdriver.Chrome(service=Service(bins[1]), options=opts)
    try:
        for p, (sc, cmp, rd, text, _) in built.items():
            f = tmp_path / (p.stem + ".html")
            f.write_text(text, encoding="utf-8")
            drv.get(f.as_uri())
            assert drv.execute_script("return document.querySelectorAll('svg.chart').length") \
                == text.count('<svg class="chart"')
            logs = [e for e in drv.get_log("browser") if e["level"] in ("SEVERE", "WARNING")]
            assert logs == [], (p.name, logs)
            names = drv.execute_script(
                "return performance.getEntriesByType('resource').map(e => e.name)")
            assert [u for u in names if re.match(r"^(https?|wss?|ftp):", u)] == [], names
            assert all(u.startswith(("about:", "data:", "blob:", "file:")) for u in names), names
            # printing works: the print media lays out without script errors
            drv.execute_script("window.matchMedia('print')")
    finally:
        drv.quit()


def test_report_size_and_time(built):
    """Regression figures, not physics: a report is one file of a few MB made in seconds."""
    for p, (*_, text, seconds) in built.items():
        size = len(text.encode("utf-8"))
        # the deliverable stays small: at most 2 MB (charts are inline SVG)
        assert 50_000 < size < 2_000_000, (p.name, size)
        print(f"{p.name}: {size:,} bytes, built in {seconds:.1f} s")


def _pdf_pages(pdf: bytes) -> int:
    """Pages of a PDF: its page objects (Chromium writes the page tree uncompressed)."""
    return len(re.findall(rb"/Type\s*/Page(?![s\w])", pdf))


def _print_to_pdf(html_path, pdf_path):
    import subprocess

    chrome = _browser_binaries()[0]
    subprocess.run([chrome, "--headless=new", "--no-sandbox", "--disable-gpu",
                    "--disable-dev-shm-usage", "--no-pdf-header-footer",
                    "--host-resolver-rules=MAP * ~NOTFOUND", f"--print-to-pdf={pdf_path}",
                    html_path.as_uri()], check=True, capture_output=True, timeout=120)
    return pdf_path.read_bytes()


@pytest.mark.browser
def test_print_to_pdf_page_count(built, tmp_path):
    """The forming press prints to a handful of A4 pages with the sections flowing;
    forcing a page per section (the old layout) gives more."""
    if _browser_binaries() is None:
        pytest.skip("chromium / chromedriver not installed")
    p = io.default_scenario_path()
    text = built[p][3]
    f = tmp_path / "press.html"
    f.write_text(text, encoding="utf-8")
    flowing = _pdf_pages(_print_to_pdf(f, tmp_path / "press.pdf"))
    forced = text.replace("</style>", "@media print { section { break-before: page; } }</style>")
    g = tmp_path / "forced.html"
    g.write_text(forced, encoding="utf-8")
    paged = _pdf_pages(_print_to_pdf(g, tmp_path / "forced.pdf"))
    print(f"{p.name}: {flowing} pages printed ({paged} with a page per section), "
          f"{len(text.encode()):,} bytes")
    assert 3 <= flowing <= 12
    assert flowing < paged
    # page numbers "x of y" come from CSS paged media
    css = re.search(r"<style>(.*?)</style>", text, re.S).group(1)
    assert 'counter(page) " of " counter(pages)' in css


class _VisibleText(html.parser.HTMLParser):
    """The text a reader sees: no attributes, no <style> or <script> bodies."""

    def __init__(self):
        super().__init__()
        self.parts, self._skip = [], 0

    def handle_starttag(self, tag, attrs):
        self._skip += tag in ("style", "script")

    def handle_endtag(self, tag):
        self._skip -= tag in ("style", "script")

    def handle_data(self, data):
        if not self._skip:
            self.parts.append(data)


def _visible(text):
    p = _VisibleText()
    p.feed(text)
    return " ".join(p.parts)


def test_warnings_in_words_and_customer_units(built):
    """Customers read plain sentences grouped by severity, never the internal codes;
    with US units the warnings give psi and °F, not bar and °C."""
    from heatload.checks import CODE_KINDS
    from heatload.outputs.wording import SEVERITIES, sentence

    p = io.default_scenario_path()
    sc, cmp, rd, text, _ = built[p]
    seen = _visible(text)
    codes = {w["code"] for r in rd["data"]["strategies"] for w in r["warnings"]}
    assert codes
    for code in CODE_KINDS:                     # no internal code reaches the reader
        if "-" in code:                         # ("stall" is also an English word)
            assert code not in seen, code
    for code in codes:
        assert _esc(sentence(code)) in text
    assert any(head in seen for _, head in SEVERITIES)
    us = report.build_report(sc, cmp, prepared=dict(rd, system="us"))
    # the comparison table in the customer's units too (its data-value attributes stay SI)
    table = _visible(us[us.index('id="comparison"'):us.index('id="energy"')])
    assert "peak [psi]" in table and "[°F]" in table and "CO₂ [lb/yr]" in table
    part = us[us.index('id="warnings"'):us.index('id="assumptions"')]
    assert "psi" in part and "°F" in part
    for unit in (" bar", "°C", " kW", "L/min"):
        assert unit not in _visible(part), unit
    # the uncertain inputs in plain words, the file's path beside them
    assert "phase loads" in seen and "phases[*].load" in text


def test_cover_date_must_be_a_real_date():
    # ISO 8601 calendar date: month 13 does not exist
    from heatload.errors import HeatloadError as _E
    sc = io.load_scenario(io.default_scenario_path())
    assert report.cover_data(sc, cover={"date": "2026-12-03"})["date"] == "2026-12-03"
    with pytest.raises(_E, match="--date"):
        report.cover_data(sc, cover={"date": "2026-13-45"})


def test_a_report_where_no_cooler_can_hold_the_design_point_is_written(tmp_path):
    # every strategy is ruled out (cooler-design); the report still tells why
    import contextlib
    import io as stdio

    from heatload import cli
    from heatload import io as hio
    from tests.cooling.test_sizing import _hot_hall
    src = tmp_path / "hot.toml"
    src.write_text(hio.dumps_scenario(_hot_hall()), encoding="utf-8")
    out = tmp_path / "hot.html"
    with contextlib.redirect_stdout(stdio.StringIO()):
        assert cli.main(["report", str(src), "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert "no air-oil cooler can hold the design point" in text
    assert "No cooler of the chosen kind can keep the oil" in text


def test_a_us_report_gives_its_summary_cooler_and_quote_in_us_units():
    # the customer who asked for US units reads the decision, the cooler section,
    # its spec sheet and the duty to quote in hp, °F and Btu/(h·°F) too (their
    # machine-readable data-value attributes stay SI)
    sc = io.load_scenario(io.default_scenario_path())
    cmp = chain.compare(sc)
    rd = report.report_data(sc, cmp, samples=SAMPLES, system="us")
    us = report.build_report(sc, cmp, prepared=rd)
    head = _visible(us[:us.index('id="comparison"')])
    cooler = _visible(us[us.index('id="cooler"'):us.index('id="warnings"')])
    for part in (head, cooler):
        assert " hp" in part and "°F" in part
        assert not re.search(r" kW(?!h)", part)        # kWh of electricity stays
        for unit in ("°C", " bar", "L/min", "m³/h"):
            assert unit not in part, unit
