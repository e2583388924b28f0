"""The HTML report opened in a real headless browser, from disk, offline.

The spec promises "a self-contained HTML report (no network needed to view
it)" and that "a shared report must not run a stranger's script"; string
tests on the HTML cannot show that a browser agrees, or that the MathML is
actually laid out.  One browser session serves the whole module.
"""
from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

import pytest

from support import DOCUMENTS, SCRIPT, make_report, missing_browser, start_browser

if missing_browser():
    pytest.skip(missing_browser(), allow_module_level=True)

from PIL import Image  # noqa: E402 - Pillow, a test dependency
from selenium.webdriver.support.ui import WebDriverWait  # noqa: E402

from compiler.render.html import to_html  # noqa: E402

# ---------------------------------------------------------------- what a visit records

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


def visit(driver, page: Path, screenshot: Path) -> Visit:
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


# ---------------------------------------------------------------- the pages


@pytest.fixture(scope="module")
def browser(tmp_path_factory):
    driver = start_browser(tmp_path_factory.mktemp("chromium-profile"))
    yield driver
    driver.quit()


def _built_report(bundled, out: Path) -> Path:
    """The real pipeline, as a user runs it, on the demo derivation."""
    built = bundled("twisted-compactification")
    assert built.returncode == 0, built.stderr
    return built.file("html")


def _hand_built_report(bundled, out: Path) -> Path:
    """Every status, a remainder, a table, a plot and hostile prose, without the engine."""
    page = out / "hand-built.html"
    page.write_text(to_html(make_report()), encoding="utf-8")
    return page


# Each page, and a text its reader must see: the document's title, or the
# prose's <script> shown as text rather than run.
PAGES = {
    "twisted-compactification": (_built_report, "Central charges of the (2,0) theory on a Riemann surface"),
    "hand-built": (_hand_built_report, SCRIPT),
}


@pytest.fixture(scope="module", params=sorted(PAGES))
def page(request, browser, bundled, tmp_path_factory):
    """One visit per page; every test below reads what the visit recorded."""
    out = tmp_path_factory.mktemp(request.param)
    build, text = PAGES[request.param]
    html = build(bundled, out)
    return html, text, visit(browser, html, out / "screenshot.png")


def test_screenshot_shows_a_page(page):
    _, _, seen = page
    assert seen.screenshot.stat().st_size > 0
    with Image.open(seen.screenshot) as png:
        assert png.format == "PNG" and png.width > 0 and png.height > 0
        # A blank or failed page is one or two colours; set text is many grey levels.
        colours = png.convert("RGB").getcolors(maxcolors=1 << 20)
        assert len(colours) > 50


def test_mathml_is_laid_out(page):
    html, _, seen = page
    math = seen.layout["math"]
    # Every formula written is one <math> element in the MathML namespace,
    # so the browser parsed it as math and not as unknown HTML.
    assert len(math) == html.read_text(encoding="utf-8").count("<math") > 0
    assert all(m["ns"] for m in math)
    assert seen.layout["merror"] == 0
    assert seen.layout["tex_errors"] == []
    empty = [i for i, m in enumerate(math) if not (m["w"] > 0 and m["h"] > 0)]
    assert empty == []
    # Laid out as math, a fraction stacks its numerator over its denominator
    # (W3C, "MathML Core", 2023, section on mfrac); an unsupported <mfrac>
    # would run both inline on one baseline.
    fractions = seen.layout["fractions"]
    assert fractions
    assert all(f["num"]["bottom"] <= f["den"]["top"] + 1 for f in fractions)


def test_plot_is_drawn(page):
    _, _, seen = page
    assert seen.layout["svgs"]
    assert all(s["w"] > 100 and s["h"] > 100 for s in seen.layout["svgs"])


def test_no_network_request(page):
    _, _, seen = page
    # The log did record the page load itself, so no further entry means something.
    assert seen.requested[:1] == [seen.url]
    strangers = [u for u in seen.requested if u != seen.url and not u.startswith(("data:", "about:"))]
    assert strangers == []


def test_no_console_errors(page):
    _, _, seen = page
    assert [e for e in seen.console if e["level"] == "SEVERE"] == []


def test_page_runs_no_script(page):
    _, text, seen = page
    assert seen.layout["scripts"] == 0
    assert text in seen.layout["text"]
    # Every @{NAME} in the prose became its value.
    assert "@{" not in seen.layout["text"]


# ------------------------------------------------------------------ nothing clipped

# Every math element that sticks out of the column it sits in: a display's
# content wider than its own box (hidden behind a scroll bar) or any formula
# whose right edge passes the column's.
_OVERFLOW = """
const columns = '.work, .prose, .abstract, .results, .margin, .table-wrap, .front';
return Array.from(document.querySelectorAll('math')).flatMap(m => {
  const column = m.closest(columns) || document.body;
  const box = m.getBoundingClientRect(), edge = column.getBoundingClientRect().right;
  const hidden = m.scrollWidth - m.clientWidth;
  return (box.right > edge + 1 || hidden > 1)
    ? [{text: m.textContent.slice(0, 80), over: Math.max(box.right - edge, hidden)}] : [];
});
"""


@pytest.fixture(scope="module")
def bundled_pages(bundled):
    """Every bundled derivation's report, from the session's builds."""
    return {path.stem: bundled(path.stem).file("html") for path in DOCUMENTS}


@pytest.mark.parametrize("width", [1280, 700])
def test_no_math_wider_than_its_column(browser, bundled_pages, width, tmp_path):
    browser.set_window_size(width, 2000)
    try:
        clipped = {}
        for stem, page in bundled_pages.items():
            visit(browser, page, tmp_path / f"{stem}.png")
            found = browser.execute_script(_OVERFLOW)
            if found:
                clipped[stem] = found
        assert clipped == {}
    finally:
        browser.set_window_size(1280, 2000)
