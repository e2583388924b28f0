"""The HTML report opened in a real headless browser, from disk, offline.

The spec promises "a self-contained HTML report (no network needed to view
it)" and that "a shared report must not run a stranger's script"; string
tests on the HTML cannot show that a browser agrees, or that the MathML is
actually laid out.  One browser session serves the whole module.
"""
from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from browser_support import missing_browser

if missing_browser():
    pytest.skip(missing_browser(), allow_module_level=True)

from PIL import Image  # noqa: E402 - matplotlib's own dependency

from browser_support import start_browser, visit  # noqa: E402
from compiler.render.html import to_html  # noqa: E402
from report_fixture import SCRIPT, make_report  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
TWISTED = "derivations/twisted-compactification.md"


@pytest.fixture(scope="module")
def browser(tmp_path_factory):
    driver = start_browser(tmp_path_factory.mktemp("chromium-profile"))
    yield driver
    driver.quit()


def _built_report(out: Path) -> Path:
    """The real pipeline, as a user runs it, on the demo derivation."""
    run = subprocess.run(
        [sys.executable, "-m", "compiler", "build", TWISTED, "-o", str(out), "--format", "html", "--no-cache"],
        cwd=ROOT, capture_output=True, text=True, timeout=900,
    )
    page = out / "twisted-compactification.html"
    # Exit 1 (a failed check) still writes a report worth opening; 2 may not.
    assert run.returncode in (0, 1) and page.exists(), f"build exited {run.returncode}:\n{run.stderr}"
    return page


def _hand_built_report(out: Path) -> Path:
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
def page(request, browser, tmp_path_factory):
    """One visit per page; every test below reads what the visit recorded."""
    out = tmp_path_factory.mktemp(request.param)
    build, text = PAGES[request.param]
    html = build(out)
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
BUNDLED = sorted((ROOT / "derivations").glob("*.md"))


@pytest.fixture(scope="module")
def bundled_pages(tmp_path_factory):
    """Every bundled derivation's report, built in-process once."""
    from compiler.engine import BuildOptions, build

    out = tmp_path_factory.mktemp("bundled")
    pages = {}
    for path in BUNDLED:
        report = build(str(path.relative_to(ROOT)), path.read_text(encoding="utf-8"), BuildOptions(use_cache=False))
        pages[path.stem] = out / f"{path.stem}.html"
        pages[path.stem].write_text(to_html(report), encoding="utf-8")
    return pages


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
