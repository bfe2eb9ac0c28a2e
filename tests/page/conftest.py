"""A real server and a real browser: headless Chromium from Debian's packages, driven through Selenium and the
matching ChromeDriver. Where the browser is not installed the page tests are skipped, except in CI (the
``CI`` environment variable), where .ci/run installs it and a missing browser is a failure."""

from __future__ import annotations

import os
import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest

from tests.e2e.conftest import Server, start_server, stop_server

CHROMIUM = "/usr/bin/chromium"
CHROMEDRIVER = "/usr/bin/chromedriver"
#: screenshots and other artefacts of the browser tests land here (CI may keep them)
ARTEFACTS = Path(os.environ.get("QUADCERT_ARTEFACTS", "test-artefacts"))


def _browser_missing() -> bool:
    return not (Path(CHROMIUM).exists() and (Path(CHROMEDRIVER).exists() or shutil.which("chromedriver")))


@pytest.fixture(scope="package")
def served() -> Iterator[Server]:
    running = start_server()
    yield running
    stop_server(running)


@pytest.fixture(scope="package")
def browser() -> Iterator[object]:
    if _browser_missing():
        if os.environ.get("CI"):
            pytest.fail("Chromium and ChromeDriver are not installed; .ci/run installs them from Debian's packages")
        pytest.skip("Chromium and ChromeDriver are not installed (Debian: apt-get install chromium chromium-driver)")
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service

    options = webdriver.ChromeOptions()
    options.binary_location = CHROMIUM
    for flag in (
        "--headless=new",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-dev-shm-usage",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--no-first-run",
        "--window-size=1200,1900",
    ):
        options.add_argument(flag)
    driver = webdriver.Chrome(service=Service(CHROMEDRIVER), options=options)
    driver.set_script_timeout(120)
    yield driver
    driver.quit()
