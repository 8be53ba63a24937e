"""The dashboard in a real headless Chromium (dash_duo, Selenium).

Needs /usr/bin/chromium and /usr/bin/chromedriver (Debian's chromium and
chromium-driver; .ci/run installs them).  Each test starts its own server,
so one browser session never sees another's state.  Screenshots go to
test-output/ (ignored by git).
"""

import os
import shutil
import time
from pathlib import Path

import pytest

pytestmark = [
    pytest.mark.browser,
    pytest.mark.skipif(not (shutil.which("chromedriver") and (
        shutil.which("chromium") or os.environ.get("CHROME_BIN"))),
        reason="needs chromium and chromedriver"),
]

OUT = Path(__file__).resolve().parents[1] / "test-output"


def _shot(dash_duo, name):
    OUT.mkdir(exist_ok=True)
    dash_duo.driver.save_screenshot(str(OUT / f"{name}.png"))


def _start(dash_duo):
    from heatload.dashboard.app import make_app

    dash_duo.start_server(make_app())
    dash_duo.wait_for_element("#tile-0", timeout=60)
    return dash_duo


def _tab(dash_duo, label):
    for el in dash_duo.find_elements(".tab"):
        if el.text.strip() == label:
            el.click()
            return
    raise AssertionError(f"no tab {label!r}")


def _edit_cell(dash_duo, table, row, column, text):
    from selenium.webdriver.common.action_chains import ActionChains
    from selenium.webdriver.common.keys import Keys

    cell = dash_duo.find_element(
        f'#{table} td[data-dash-column="{column}"][data-dash-row="{row}"]')
    cell.click()
    ActionChains(dash_duo.driver).send_keys(text).send_keys(Keys.ENTER).perform()


def _text(dash_duo, selector):
    """An element's text, read again when a re-render replaced the element."""
    from selenium.common.exceptions import StaleElementReferenceException

    for _ in range(20):
        try:
            return dash_duo.find_element(selector).text
        except StaleElementReferenceException:
            time.sleep(0.1)
    return dash_duo.find_element(selector).text


def _wait_text_change(dash_duo, selector, old, timeout=30):
    end = time.time() + timeout
    while time.time() < end:
        now = _text(dash_duo, selector)
        if now and now != old:
            return now
        time.sleep(0.2)
    raise AssertionError(f"{selector} stayed {old!r}")


def _decision_of(path):
    from heatload import chain, decision, io
    return decision.decide(chain.compare(io.load_scenario(path)))


def test_first_view_is_the_decision(dash_duo):
    from heatload import io

    _start(dash_duo)
    dash_duo.wait_for_element("#decision-sentence", timeout=60)
    dec = _decision_of(io.default_scenario_path())
    # the sentence names the recommended strategy, its saving against the present and why
    assert _text(dash_duo, "#decision-sentence") == dec.sentence()
    dash_duo.wait_for_element("#decision-graph .main-svg", timeout=20)
    # the tiles show the recommended strategy, with the difference to the present circuit
    dash_duo.wait_for_text_to_equal("#tile-strategy", dec.recommended, timeout=20)
    assert "vs present" in _text(dash_duo, "#tile-delta-0")
    _shot(dash_duo, "browser_decision")
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_decision_rules_out_stalled_circuits(dash_duo, tmp_path):
    """The forming press with 140 kN of forming load: circuits that stall are ruled out
    with their reason and a feasible one is recommended, as ``compare --json`` says."""
    import re

    from heatload import io

    text = io.default_scenario_path().read_text(encoding="utf-8")
    text = re.sub(r'load = "120 kN"', 'load = "140 kN"', text)
    f = tmp_path / "press140.toml"
    f.write_text(text, encoding="utf-8")
    dec = _decision_of(f)
    out = [v for v in dec.verdicts if not v.feasible]
    assert any("stalls" in v.reason for v in out)
    _start(dash_duo)
    dash_duo.find_element("#upload input[type=file]").send_keys(str(f))
    dash_duo.wait_for_contains_text("#source-label", "press140.toml", timeout=30)
    dash_duo.wait_for_text_to_equal("#decision-sentence", dec.sentence(), timeout=60)
    dash_duo.wait_for_element("#ruled-out", timeout=20)
    ruled = _text(dash_duo, "#ruled-out")
    for v in out:
        assert f"{v.name}: {v.reason}" in ruled
    assert dec.recommended not in [v.name for v in out]
    _shot(dash_duo, "browser_decision_140kN")
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_error_banner_on_every_tab_and_required_cell(dash_duo):
    from selenium.webdriver.common.action_chains import ActionChains
    from selenium.webdriver.common.keys import Keys

    _start(dash_duo)
    _tab(dash_duo, "Cycle and machine")
    assert _text(dash_duo, "#error-banner") == ""
    # clearing a required key number (the pump displacement) is an error
    box = dash_duo.find_element("input[name='power_unit.pump.displacement']")
    box.click()
    ActionChains(dash_duo.driver).key_down(Keys.CONTROL).send_keys("a").key_up(Keys.CONTROL) \
        .send_keys(Keys.BACKSPACE).send_keys(Keys.ENTER).perform()
    dash_duo.wait_for_contains_text("#error-banner", "invalid entr", timeout=20)
    dash_duo.wait_for_contains_text("#form-errors", "required", timeout=20)
    for label in ("Decision", "Comparison", "Payback"):
        _tab(dash_duo, label)
        banner = dash_duo.find_element("#error-banner")
        assert banner.is_displayed() and "last valid entry" in banner.text, label
    _shot(dash_duo, "browser_banner")
    # a valid value clears the banner
    _tab(dash_duo, "Cycle and machine")
    box = dash_duo.find_element("input[name='power_unit.pump.displacement']")
    box.click()
    ActionChains(dash_duo.driver).send_keys("40").send_keys(Keys.ENTER).perform()
    end = time.time() + 20
    while _text(dash_duo, "#error-banner") and time.time() < end:
        time.sleep(0.2)
    assert _text(dash_duo, "#error-banner") == ""
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_monte_carlo_cleared_when_the_strategy_changes(dash_duo):
    _start(dash_duo)
    dash_duo.wait_for_element("#decision-sentence", timeout=60)
    _tab(dash_duo, "Cooler sizing")
    n = dash_duo.find_element("#mc-samples")
    dash_duo.clear_input(n)     # a text field: clear() alone leaves React's value
    n.send_keys("200")
    dash_duo.find_element("#mc-run").click()
    dash_duo.wait_for_element("#mc-result", timeout=60)
    # another strategy: the Monte Carlo of the previous one is cleared, not kept beside it
    shown = _text(dash_duo, "#tile-strategy")
    other = "meter-in" if shown != "meter-in" else "meter-out"
    dash_duo.find_element("#strategy-select").click()
    option = next(o for o in dash_duo.find_elements(".dash-dropdown-option")
                  if o.text.strip() == other)
    dash_duo.driver.execute_script("arguments[0].scrollIntoView({block: 'center'});", option)
    dash_duo.driver.execute_script("arguments[0].click();", option)
    dash_duo.wait_for_text_to_equal("#tile-strategy", other, timeout=20)
    dash_duo.wait_for_element("#mc-stale", timeout=20)
    assert not dash_duo.find_elements("#mc-result")
    _shot(dash_duo, "browser_mc_stale")
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_default_scenario_shows_the_comparison(dash_duo):
    _start(dash_duo)
    _tab(dash_duo, "Comparison")
    # the page computes the strategy in view first; this tab completes the rest
    end = time.time() + 30
    rows = []
    while len(rows) != 7 and time.time() < end:
        rows = dash_duo.find_elements("#comparison-table tbody tr")
        time.sleep(0.2)
    assert len(rows) == 7                  # the forming press compares seven circuits
    rows = dash_duo.find_elements("#comparison-table tbody tr")
    assert "kJ" in rows[0].text and "°C" in rows[0].text
    _tab(dash_duo, "Where the energy goes")
    dash_duo.wait_for_element("#sankey .main-svg", timeout=20)
    _tab(dash_duo, "Cycle over time")
    dash_duo.wait_for_element("#cycle-graph .main-svg", timeout=20)
    _shot(dash_duo, "browser_cycle")
    _tab(dash_duo, "Shift temperature")
    dash_duo.wait_for_element("#shift-graph .scatterlayer .trace", timeout=30)
    _tab(dash_duo, "Cooler sizing")
    dash_duo.wait_for_element("#spec-table", timeout=30)
    _tab(dash_duo, "Payback")
    dash_duo.wait_for_element("#pay-text", timeout=20)
    assert "years" in dash_duo.find_element("#pay-text").text
    _shot(dash_duo, "browser_payback")
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_edit_invalid_entry_and_units(dash_duo):
    _start(dash_duo)
    _tab(dash_duo, "Cycle and machine")
    before = _text(dash_duo, "#tile-1")
    # forming load 100 kN -> 130 kN: more work per cycle, the numbers change
    _edit_cell(dash_duo, "phase-table", 2, "load", "130")
    after = _wait_text_change(dash_duo, "#tile-1", before)
    assert after != before
    # a mass where a speed belongs: flagged with the reason, results kept
    _edit_cell(dash_duo, "phase-table", 2, "speed", "12 kg")
    dash_duo.wait_for_contains_text("#form-errors", "expected a velocity", timeout=20)
    assert "12 kg" in _text(dash_duo, "#form-errors")
    assert _text(dash_duo, "#tile-1") == after
    _shot(dash_duo, "browser_invalid")
    # the app stays alive: a valid value clears the error and recomputes
    _edit_cell(dash_duo, "phase-table", 2, "speed", "25")
    end = time.time() + 20
    while _text(dash_duo, "#form-errors") and time.time() < end:
        time.sleep(0.2)
    assert _text(dash_duo, "#form-errors") == ""
    _wait_text_change(dash_duo, "#tile-1", after)
    # units: SI -> US customary changes the headers and the figures' units
    assert "kN" in dash_duo.find_element("#phase-table").text
    dash_duo.find_element("#units input[value='us']").click()
    dash_duo.wait_for_contains_text("#phase-table", "lbf", timeout=20)
    dash_duo.wait_for_contains_text("#tile-1", "Btu", timeout=20)
    dash_duo.wait_for_contains_text("#headline", "°F", timeout=20)
    _shot(dash_duo, "browser_us_units")
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_bad_upload_refused_and_download_loads_back(dash_duo, tmp_path):
    from heatload import io

    _start(dash_duo)
    _tab(dash_duo, "Cycle and machine")
    before = _text(dash_duo, "#tile-1")
    bad = tmp_path / "broken.toml"
    bad.write_text('[scenario]\nname = "x"\n[[phases]]\nname = "a"\nmotion = "fly"\n',
                   encoding="utf-8")
    dash_duo.find_element("#upload input[type=file]").send_keys(str(bad))
    dash_duo.wait_for_element("#upload-error", timeout=20)
    msg = dash_duo.find_element("#upload-error").text
    assert "Upload refused" in msg and "broken.toml" in msg
    assert _text(dash_duo, "#tile-1") == before
    assert "forming_press.toml" in dash_duo.find_element("#source-label").text
    _shot(dash_duo, "browser_bad_upload")

    # download the scenario (after an edit) and load it back
    _edit_cell(dash_duo, "phase-table", 3, "load", "125")
    _wait_text_change(dash_duo, "#tile-1", before)
    dash_duo.driver.execute_cdp_cmd("Page.setDownloadBehavior",
                                    {"behavior": "allow",
                                     "downloadPath": dash_duo.download_path})
    dash_duo.find_element("#download-toml-btn").click()
    target = Path(dash_duo.download_path) / "forming_press_140_kn.toml"
    end = time.time() + 20
    while not target.exists() and time.time() < end:
        time.sleep(0.2)
    assert target.exists(), list(Path(dash_duo.download_path).iterdir())
    sc = io.load_scenario(target)
    assert sc.phases[3].load == pytest.approx(125e3, rel=1e-12)
    ref = io.load_scenario(io.default_scenario_path())
    assert sc.phases[:3] == ref.phases[:3] and sc.phases[4:] == ref.phases[4:]
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_example_choice_and_report_download(dash_duo):
    _start(dash_duo)
    dash_duo.find_element("#scenario-select").click()
    option = next(o for o in dash_duo.find_elements(".dash-dropdown-option")
                  if o.text.strip().lower() == "platform lift (example)")
    option.click()
    dash_duo.wait_for_contains_text("#source-label", "platform_lift.toml", timeout=30)
    _tab(dash_duo, "Cycle and machine")
    from heatload import io

    lift = io.load_scenario(io.default_scenario_path().parent / "platform_lift.toml")
    end = time.time() + 20
    while time.time() < end and len(dash_duo.find_elements(
            "#phase-table tr td[data-dash-column='name']")) != len(lift.phases):
        time.sleep(0.2)
    names = [c.text for c in dash_duo.find_elements("#phase-table td[data-dash-column='name']")]
    assert names == [p.name for p in lift.phases]
    dash_duo.driver.execute_cdp_cmd("Page.setDownloadBehavior",
                                    {"behavior": "allow",
                                     "downloadPath": dash_duo.download_path})
    dash_duo.find_element("#download-report-btn").click()
    folder = Path(dash_duo.download_path)
    end = time.time() + 60
    found = []
    while not found and time.time() < end:
        found = [p for p in folder.glob("*_report.html")]
        time.sleep(0.3)
    assert found, list(folder.iterdir())
    time.sleep(0.5)
    text = found[0].read_text(encoding="utf-8")
    assert "<html" in text.lower() and lift.name in text
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_warnings_follow_the_us_units(dash_duo):
    """With US customary units chosen, the comparison's warnings give their figures
    in psi, °F and hp (the engine's records hold SI; the dashboard writes them)."""
    import re

    from heatload import chain, io
    from heatload.outputs import tables

    # the forming press's warnings carry pressures (ratings, relief), temperatures (the
    # hottest day) and powers (motor load, cooler duty)
    cmp = chain.compare(io.load_scenario(io.default_scenario_path()))
    recs = tables.comparison_dict(cmp, with_phases=False)["strategies"]
    kinds = {q["kind"] for r in recs for w in r["warnings"] for q in w["quantities"]}
    assert {"pressure", "temperature", "power"} <= kinds   # something to look at
    _start(dash_duo)
    _tab(dash_duo, "Comparison")
    end = time.time() + 30
    while len(dash_duo.find_elements("#comparison-table tbody tr")) != 7 and time.time() < end:
        time.sleep(0.2)
    dash_duo.wait_for_element("#comparison-table td.warnings.has", timeout=20)
    si = " ".join(e.text for e in dash_duo.find_elements("#comparison-table td.warnings"))
    assert "°C" in si and "bar" in si and "kW" in si
    dash_duo.find_element("#units input[value='us']").click()
    # the first row's warnings may carry no temperature (variable speed: its valve's
    # flow only): wait on the whole table
    dash_duo.wait_for_contains_text("#comparison-table tbody", "°F", timeout=20)
    us = " ".join(e.text for e in dash_duo.find_elements("#comparison-table td.warnings"))
    assert "°F" in us and "psi" in us and "hp" in us and "gpm" in us
    # no SI unit is left in any warning (kinematic viscosity is mm²/s in both systems)
    for unit in ("°C", " bar", " kW", "L/min", " kN"):
        assert unit not in us, (unit, us)
    # the figures are grouped, never in exponent form
    assert not re.search(r"\d\.\de[+-]\d", us)
    _shot(dash_duo, "browser_us_warnings")
    assert dash_duo.get_logs() == [], dash_duo.get_logs()


def test_a_bad_monte_carlo_count_is_named_and_kept_as_typed(dash_duo):
    """Text, zero, a negative or a huge count in the samples field: a line beside
    it names the field and the range, nothing reruns, the entry stays as typed."""
    _start(dash_duo)
    dash_duo.wait_for_element("#decision-sentence", timeout=60)
    _tab(dash_duo, "Cooler sizing")
    n = dash_duo.find_element("#mc-samples")
    dash_duo.clear_input(n)
    n.send_keys("200")
    dash_duo.find_element("#mc-run").click()
    dash_duo.wait_for_element("#mc-result", timeout=60)
    shown = _text(dash_duo, "#mc-result")
    for typed in ("abc", "0", "-500", "1e12"):
        n = dash_duo.find_element("#mc-samples")
        dash_duo.clear_input(n)
        n.send_keys(typed)
        dash_duo.find_element("#mc-run").click()
        dash_duo.wait_for_contains_text("#mc-samples-error", f"got '{typed}'", timeout=20)
        message = _text(dash_duo, "#mc-samples-error")
        assert message.startswith("Monte Carlo samples: expected a whole number from 100 "
                                  "to 20,000")
        assert dash_duo.find_element("#mc-samples").get_attribute("value") == typed
        assert _text(dash_duo, "#mc-result") == shown       # the last result, not rerun
    _shot(dash_duo, "browser_mc_bad_count")
    # a good count clears the line and runs
    n = dash_duo.find_element("#mc-samples")
    dash_duo.clear_input(n)
    n.send_keys("300")
    dash_duo.find_element("#mc-run").click()
    dash_duo.wait_for_contains_text("#mc-result", "300 samples", timeout=60)
    assert _text(dash_duo, "#mc-samples-error") == ""
    assert dash_duo.get_logs() == [], dash_duo.get_logs()
