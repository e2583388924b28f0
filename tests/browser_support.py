"""Drive the system's headless Chromium over one report page and record what
a reader's browser would do with it: requests, console messages, MathML
layout, a screenshot.

The browser is the distribution's own (CI installs it with apt); selenium is
pointed at it explicitly so it never fetches a driver or a browser itself.
"""
from __future__ import annotations

import json
import shutil
from dataclasses import dataclass
from pathlib import Path

from selenium import webdriver
from selenium.webdriver.chrome.service import Service
from selenium.webdriver.support.ui import WebDriverWait

CHROMIUM = Path("/usr/bin/chromium")
CHROMEDRIVER = Path("/usr/bin/chromedriver")

# Headless, and quiet: no background fetches of its own that could be
# mistaken for (or hide) a request made by the page.
FLAGS = (
    "--headless=new",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-default-apps",
    "--window-size=1280,2000",
)


def missing_browser() -> str | None:
    """Why the browser test cannot run here, or None when it can."""
    absent = [str(p) for p in (CHROMIUM, CHROMEDRIVER) if shutil.which(str(p)) is None]
    if absent:
        return f"headless browser not installed ({', '.join(absent)} missing; apt install chromium chromium-driver)"
    return None


def start_browser(profile: Path) -> webdriver.Chrome:
    """A fresh headless Chromium with a throwaway profile and performance logging."""
    options = webdriver.ChromeOptions()
    options.binary_location = str(CHROMIUM)
    for flag in FLAGS:
        options.add_argument(flag)
    options.add_argument(f"--user-data-dir={profile}")
    options.set_capability("goog:loggingPrefs", {"performance": "ALL", "browser": "ALL"})
    return webdriver.Chrome(service=Service(str(CHROMEDRIVER)), options=options)


# Every <math> element's box, whether it is in the MathML namespace (parsed
# as math, not as an unknown HTML tag), and every fraction's layout: a
# browser that lays MathML out puts the numerator above the denominator.
_MEASURE = """
const NS = 'http://www.w3.org/1998/Math/MathML';
const box = e => { const r = e.getBoundingClientRect(); return {w: r.width, h: r.height, top: r.top, bottom: r.bottom}; };
return {
  math: Array.from(document.querySelectorAll('math')).map(e => Object.assign(box(e), {ns: e.namespaceURI === NS})),
  fractions: Array.from(document.querySelectorAll('mfrac'))
    .filter(f => f.children.length === 2)
    .map(f => ({num: box(f.children[0]), den: box(f.children[1])})),
  merror: document.querySelectorAll('merror').length,
  tex_errors: Array.from(document.querySelectorAll('.tex-error')).map(e => e.textContent),
  scripts: document.scripts.length,
  svgs: Array.from(document.querySelectorAll('figure.plot svg')).map(box),
  text: document.body.innerText,
};
"""


@dataclass
class Visit:
    """What happened when the browser opened one page."""

    url: str
    requested: list[str]  # the page's own URL, then every URL it asked for
    console: list[dict]  # browser log entries
    layout: dict  # the result of _MEASURE
    screenshot: Path


def _requested_urls(performance_log: list[dict]) -> list[str]:
    urls = []
    for entry in performance_log:
        message = json.loads(entry["message"])["message"]
        method, params = message.get("method"), message.get("params", {})
        if method == "Network.requestWillBeSent":
            urls.append(params["request"]["url"])
        elif method == "Network.webSocketCreated":
            urls.append(params["url"])
    return urls


def visit(driver: webdriver.Chrome, page: Path, screenshot: Path) -> Visit:
    """Open ``page`` from disk, wait for it to finish loading, and record it."""
    driver.get_log("performance")  # drain what earlier pages left behind
    driver.get_log("browser")
    url = page.resolve().as_uri()
    driver.get(url)
    WebDriverWait(driver, 30).until(lambda d: d.execute_script("return document.readyState") == "complete")
    layout = driver.execute_script(_MEASURE)
    driver.save_screenshot(str(screenshot))
    # Bring everything into view, so lazily loaded content would ask now too.
    driver.execute_script("window.scrollTo(0, document.body.scrollHeight)")
    requested = _requested_urls(driver.get_log("performance"))
    # The log may still hold the start-up tab's own chrome:// loads; whatever
    # the page asks for comes after the request that navigated to it.
    if url in requested:
        requested = requested[requested.index(url):]
    return Visit(
        url=url,
        requested=requested,
        console=driver.get_log("browser"),
        layout=layout,
        screenshot=screenshot,
    )
