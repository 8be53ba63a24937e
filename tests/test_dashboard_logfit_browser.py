"""The dashboard's Temperature log tab in a real headless Chromium: upload the
invented demo log, see the fit and the graph, no callback error.

Needs /usr/bin/chromium and /usr/bin/chromedriver (skipped without them).
Screenshots go to test-output/."""

import os
import shutil
from pathlib import Path

import pytest

pytestmark = [
    pytest.mark.browser,
    pytest.mark.skipif(not (shutil.which("chromedriver") and (
        shutil.which("chromium") or os.environ.get("CHROME_BIN"))),
        reason="needs chromium and chromedriver"),
]

ROOT = Path(__file__).resolve().parents[1]
OUT = ROOT / "test-output"


def test_log_upload_shows_the_fit(dash_duo):
    from heatload.dashboard.app import make_app

    dash_duo.start_server(make_app(ROOT / "duty_cycles" / "platform_lift.toml"))
    dash_duo.wait_for_element("#tile-0", timeout=60)
    for el in dash_duo.find_elements(".tab"):
        if el.text.strip() == "Temperature log":
            el.click()
            break
    else:
        raise AssertionError("no Temperature log tab")
    log = ROOT / "duty_cycles" / "logs" / "platform_lift_day.csv"
    dash_duo.find_element("#log-upload input[type=file]").send_keys(str(log))
    dash_duo.wait_for_element("#log-fit-table", timeout=90)
    dash_duo.wait_for_element("#log-graph .main-svg", timeout=30)
    table = dash_duo.find_element("#log-fit-table").text
    assert "heat while running" in table and "identified" in table
    assert "calibration factor" in dash_duo.find_element("#log-compare-list").text
    OUT.mkdir(exist_ok=True)
    dash_duo.driver.save_screenshot(str(OUT / "browser_temperature_log.png"))
    assert dash_duo.get_logs() == [], dash_duo.get_logs()
