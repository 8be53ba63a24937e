"""Shared pytest configuration.

Hypothesis runs a reproducible (derandomized) profile unless
``HYPOTHESIS_PROFILE=explore``.

``pytest_setup_options`` is the hook of Dash's testing plugin (``dash_duo``):
it hands Selenium the Chrome options.  Headless Chromium from the system
packages, no sandbox (CI runs as root), no outside network look-ups.
"""

import os

from hypothesis import settings

# Property tests draw the same examples on every run (reproducible CI);
# HYPOTHESIS_PROFILE=explore draws new ones.
settings.register_profile("reproducible", derandomize=True)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "reproducible"))


def pytest_setup_options():
    from selenium.webdriver.chrome.options import Options

    options = Options()
    options.binary_location = os.environ.get("CHROME_BIN", "/usr/bin/chromium")
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
                "--disable-background-networking", "--disable-component-update",
                "--disable-sync", "--disable-default-apps", "--disable-extensions",
                "--no-first-run", "--no-default-browser-check", "--window-size=1366,900",
                "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1"):
        options.add_argument(arg)
    return options
