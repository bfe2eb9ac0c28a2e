"""The page at / in a real browser: it loads with nothing from outside, certifies what is typed, marks a bad
formula at its column, draws one box per panel, stays usable with 100,000 panels, and its link reproduces the
computation. Values are checked against the API's own answer and a closed form."""

from __future__ import annotations

import json
import math
from urllib.parse import quote

import httpx
import pytest
from selenium.webdriver.common.by import By
from selenium.webdriver.support import expected_conditions as expected
from selenium.webdriver.support.ui import WebDriverWait

from tests.conftest import HP
from tests.page.conftest import ARTEFACTS

#: seconds a step may take on a busy machine before the test gives up (a cap, not a measurement)
PATIENCE = 120


def _wait(driver, condition):  # type: ignore[no-untyped-def]
    return WebDriverWait(driver, PATIENCE).until(condition)


def _fill(driver, field: str, text: str) -> None:  # type: ignore[no-untyped-def]
    element = driver.find_element(By.ID, field)
    element.clear()
    element.send_keys(text)


def _certify(driver, integrand: str, lower: str, upper: str, tolerance: str) -> None:  # type: ignore[no-untyped-def]
    for field, text in (("integrand", integrand), ("lower", lower), ("upper", upper), ("tolerance", tolerance)):
        _fill(driver, field, text)
    driver.execute_script("document.getElementById('band').dataset.boxes = '';")
    driver.find_element(By.ID, "go").click()
    _wait(driver, lambda d: d.find_element(By.ID, "band").get_attribute("data-boxes"))


def test_the_page_loads_with_nothing_from_outside(served, browser) -> None:  # type: ignore[no-untyped-def]
    page = httpx.get(served.url + "/")
    assert page.status_code == 200 and "text/html" in page.headers["content-type"]
    weight = len(page.content) + sum(
        len(httpx.get(served.url + path).content)
        for path in (
            "/static/page.js",
            "/static/page.css",
            "/static/vendor/uplot/uPlot.iife.min.js",
            "/static/vendor/uplot/uPlot.min.css",
        )
    )
    assert weight < 300_000, weight
    assert "http://" not in page.text.replace(served.url, "") and "https://" not in page.text
    browser.get(served.url + "/")
    assert browser.title.startswith("quadcert")
    assert browser.find_element(By.CSS_SELECTOR, "label[for=integrand]").text == "Integrand"


def test_a_typed_integral_matches_the_api(served, browser) -> None:  # type: ignore[no-untyped-def]
    """exp(-x^2) on [0, 1] at 1e-10: the page shows the API's enclosure, which holds √π/2·erf(1) (closed form)."""
    browser.get(served.url + "/")
    _certify(browser, "exp(-x^2)", "0", "1", "1e-10")
    api = httpx.post(
        served.url + "/v1/integrals",
        content=b'{"integrand":"exp(-x^2)","lower_limit":"0","upper_limit":"1","tolerance":1e-10}',
        headers={"content-type": "application/json"},
        timeout=60,
    ).json()
    shown = browser.find_element(By.ID, "enclosure").text
    low, high = json.loads(shown)
    assert [low, high] == [float(v) for v in api["enclosure"]]
    exact = HP.sqrt(HP.pi) / 2 * HP.erf(1)
    assert HP.mpf(low) <= exact <= HP.mpf(high)
    assert "certified" in browser.find_element(By.ID, "verdict").text
    assert browser.find_element(By.ID, "value").text.startswith("0.74682413")
    panels = api["panels"]
    assert browser.find_element(By.ID, "band").get_attribute("data-boxes") == str(panels)  # one box per panel
    assert f"{panels} panels" in browser.find_element(By.ID, "picture-summary").text
    snippets = browser.find_element(By.ID, "snippets").text
    for piece in ("curl -s", "quadcert integrate", "WEBSERVICE(", "from quadcert import integrate", "quadcert check"):
        assert piece in snippets
    ARTEFACTS.mkdir(parents=True, exist_ok=True)
    browser.save_screenshot(str(ARTEFACTS / "page.png"))
    assert (ARTEFACTS / "page.png").stat().st_size > 10_000


def test_a_misspelt_function_is_marked_at_its_column(served, browser) -> None:  # type: ignore[no-untyped-def]
    browser.get(served.url + "/")
    _fill(browser, "integrand", "2*sinn(x)")
    error = _wait(browser, expected.visibility_of_element_located((By.CSS_SELECTOR, "#integrand-error[data-code]")))
    assert error.get_attribute("data-code") == "unknown_function"
    assert browser.find_element(By.ID, "integrand").get_attribute("aria-invalid") == "true"
    marker = browser.find_element(By.ID, "integrand-marker")
    assert marker.get_attribute("data-column") == "3" and marker.get_attribute("textContent") == "  ^"


def test_the_reproduce_link_repeats_the_computation(served, browser) -> None:  # type: ignore[no-untyped-def]
    browser.get(served.url + "/")
    _certify(browser, "1/(1+x^2)", "0", "1", "1e-9")
    first = browser.find_element(By.ID, "enclosure").text
    link = browser.find_element(By.ID, "reproduce").get_attribute("href")
    browser.get("about:blank")
    browser.get(link)
    _wait(browser, lambda d: d.find_element(By.ID, "band").get_attribute("data-boxes"))
    assert browser.find_element(By.ID, "enclosure").text == first
    low, high = json.loads(first)
    assert low <= math.pi / 4 <= high  # closed form π/4 (the float nearest it lies inside a 1e-9 enclosure)


def test_the_page_stays_usable_with_100000_panels(served, browser) -> None:  # type: ignore[no-untyped-def]
    """sin(400 x)·e^(−x) on [0, 50] at 1e-14 spends the default budget of 200,001 nodes: 100,000 panels. The page
    draws every box, then still answers the keyboard and zooms; its drawing time is printed, not asserted."""
    browser.get(served.url + "/")
    _certify(browser, "sin(400*x)*exp(-x)", "0", "50", "1e-14")
    assert browser.find_element(By.ID, "band").get_attribute("data-boxes") == "100000"
    _fill(browser, "variable", "x")  # typing still works
    before = browser.execute_script("return charts[0].scales.x.max - charts[0].scales.x.min")
    browser.find_element(By.ID, "zoom-dense").click()
    after = browser.execute_script("return charts[0].scales.x.max - charts[0].scales.x.min")
    assert 0 < after < before  # it zoomed into the densest stretch
    drawn = browser.find_element(By.ID, "band").get_attribute("data-boxes")
    assert drawn == "100000"
    draw_ms = browser.find_element(By.ID, "band").get_attribute("data-draw-ms")
    print(f"\n100,000 panels: the picture was built and drawn in {draw_ms} ms")  # a figure, not a test


@pytest.mark.parametrize("url_format", ["svg"])
def test_the_svg_picture_has_a_box_per_panel(served, url_format: str) -> None:  # type: ignore[no-untyped-def]
    from xml.etree import ElementTree

    query = f"integrand={quote('exp(-x^2)')}&lower_limit=0&upper_limit=1&tolerance=1e-10"
    svg = httpx.get(f"{served.url}/v1/integral?{query}&format={url_format}", timeout=60)
    assert svg.status_code == 200 and svg.headers["content-type"].startswith("image/svg+xml")
    root = ElementTree.fromstring(svg.text)
    boxes = [e for e in root.iter("{http://www.w3.org/2000/svg}rect") if "box" in (e.get("class") or "").split()]
    panels = httpx.get(f"{served.url}/v1/integral?{query}&format=json", timeout=60).json()["panels"]
    assert len(boxes) == panels
    text = " ".join(root.itertext())
    assert "exp(-x^2)" in text and "quadcert-engine-" in text and "certified" in text


def test_the_picture_answers_the_keyboard(served, browser) -> None:  # type: ignore[no-untyped-def]
    """The picture takes focus by Tab order; + zooms in, 0 shows it all again."""
    browser.get(served.url + "/")
    _certify(browser, "sqrt(x)", "0", "1", "1e-8")
    whole = browser.execute_script("return charts[0].scales.x.max - charts[0].scales.x.min")
    overlay = browser.find_element(By.CSS_SELECTOR, "#band .u-over")
    assert overlay.get_attribute("tabindex") == "0" and "arrow keys" in overlay.get_attribute("aria-label")
    overlay.send_keys("+")
    zoomed = browser.execute_script("return charts[0].scales.x.max - charts[0].scales.x.min")
    overlay.send_keys("0")
    again = browser.execute_script("return charts[0].scales.x.max - charts[0].scales.x.min")
    assert zoomed < whole and abs(again - whole) <= 1e-12 * max(1.0, whole)


def test_a_dark_colour_scheme_is_followed(served, browser) -> None:  # type: ignore[no-untyped-def]
    browser.get(served.url + "/")
    light = browser.execute_script("return getComputedStyle(document.body).backgroundColor")
    browser.execute_cdp_cmd(
        "Emulation.setEmulatedMedia", {"features": [{"name": "prefers-color-scheme", "value": "dark"}]}
    )
    try:
        browser.get(served.url + "/")
        dark = browser.execute_script("return getComputedStyle(document.body).backgroundColor")
    finally:
        browser.execute_cdp_cmd("Emulation.setEmulatedMedia", {"features": []})
    assert light != dark and dark == "rgb(22, 26, 34)"  # the page's own dark paper, #161a22


def test_a_bad_limit_is_marked_as_you_type(served, browser) -> None:  # type: ignore[no-untyped-def]
    """The whole request is checked as it is typed, with the API's codes: a misspelt constant in a limit, then
    a tolerance of zero, each on its own input."""
    browser.get(served.url + "/")
    _fill(browser, "lower", "pii/2")
    error = _wait(browser, expected.visibility_of_element_located((By.CSS_SELECTOR, "#request-error[data-code]")))
    assert error.get_attribute("data-code") == "unknown_name" and "did you mean 'pi'" in error.text
    assert browser.find_element(By.ID, "lower").get_attribute("aria-invalid") == "true"
    _fill(browser, "lower", "0")
    _fill(browser, "tolerance", "0")
    _wait(browser, lambda d: d.find_element(By.ID, "request-error").get_attribute("data-code") == "invalid_tolerance")
    assert browser.find_element(By.ID, "tolerance").get_attribute("aria-invalid") == "true"
    assert browser.find_element(By.ID, "lower").get_attribute("aria-invalid") is None
