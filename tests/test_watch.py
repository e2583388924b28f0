"""``anomark watch`` in a real headless browser: save the document, and the
open report changes by itself.

The command runs as its own process (it is a long-running server stopped
with Ctrl-C, which is part of what is tested); the browser is the system's
Chromium, started as tests/support.py starts it.  Every wait is
bounded, so a broken reload fails the test instead of hanging it.
"""
from __future__ import annotations

import queue
import re
import signal
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from support import missing_browser, start_browser

if missing_browser():
    pytest.skip(missing_browser(), allow_module_level=True)

from selenium.webdriver.support.ui import WebDriverWait  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
WAIT = 15  # seconds any one step may take before the test fails

BEFORE = "---\ntitle: First draft\n---\n\n```derive\nsymbol N\nlet a = N\ncheck a == N\n```\n"
AFTER = "---\ntitle: Second draft\n---\n\n```derive\nsymbol N\nlet a = N\ncheck a == 2*N\n```\n"


class Terminal:
    """The command's standard error, line by line, read on a thread."""

    def __init__(self, stream):
        self.lines: queue.Queue[str] = queue.Queue()
        threading.Thread(target=lambda: [self.lines.put(line.rstrip("\n")) for line in stream],
                         daemon=True).start()

    def expect(self, pattern: str) -> re.Match:
        """The next line matching ``pattern``, waiting at most WAIT seconds for each line."""
        while True:
            try:
                line = self.lines.get(timeout=WAIT)
            except queue.Empty:
                pytest.fail(f"anomark watch printed nothing matching {pattern!r}")
            found = re.search(pattern, line)
            if found:
                return found


def heading(driver) -> str:
    return driver.execute_script("const h = document.querySelector('h1'); return h ? h.textContent : '';")


def test_a_save_rebuilds_and_the_open_page_reloads(tmp_path):
    doc = tmp_path / "doc.md"
    doc.write_text(BEFORE)
    out = tmp_path / "out"
    proc = subprocess.Popen(
        [sys.executable, "-m", "compiler", "watch", str(doc), "-o", str(out), "--port", "0", "--no-cache"],
        cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    driver = None
    try:
        terminal = Terminal(proc.stderr)
        url = terminal.expect(r"serving (http://127\.0\.0\.1:\d+/)")[1]
        terminal.expect(rf"^{re.escape(str(doc))}: passed \u2014 .*; wrote {re.escape(str(out / 'doc.html'))}$")

        driver = start_browser(tmp_path / "profile")
        driver.get(url)
        WebDriverWait(driver, WAIT).until(lambda d: heading(d) == "First draft")
        assert driver.execute_script("return document.scripts.length") == 1  # the served copy's reload script

        doc.write_text(AFTER)
        terminal.expect(rf"^{re.escape(str(doc))}: FAILED \u2014 2 checks: 1 proven, 1 failed")
        WebDriverWait(driver, WAIT).until(lambda d: heading(d) == "Second draft")
        assert "failed" in driver.execute_script("return document.body.innerText")

        # the report on disk is the rebuilt one, and carries no script
        on_disk = (out / "doc.html").read_text()
        assert "Second draft" in on_disk and "<script" not in on_disk
    finally:
        if driver is not None:
            driver.quit()
        proc.send_signal(signal.SIGINT)
        status = proc.wait(timeout=WAIT)
    assert status == 0  # Ctrl-C is how watch is meant to stop
