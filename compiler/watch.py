"""``anomark watch``: rebuild a document on save and keep its open report current.

The document's modification time is polled (no dependency).  A small HTTP
server bound to 127.0.0.1 only serves the HTML report; the served copy gets a
tiny script that polls a version endpoint and reloads the page when a rebuild
has finished.  The report files on disk are never touched here, so they stay
free of script.  What a rebuild does (and what it prints) is the caller's.
"""
from __future__ import annotations

import threading
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from typing import Callable
from urllib.parse import urlsplit

HOST = "127.0.0.1"
VERSION_PATH = "/__anomark__/version"

# The version the page was served at is written in; when the endpoint says
# otherwise a rebuild has finished, and the page reloads where it was scrolled.
RELOAD_SCRIPT = """<script>/* anomark watch: live reload, in the served copy only */
(function () {
  var served = "%(version)s", key = "anomark-watch-scroll";
  var y = sessionStorage.getItem(key);
  if (y !== null) { sessionStorage.removeItem(key); window.scrollTo(0, Number(y)); }
  setInterval(function () {
    fetch("%(endpoint)s", {cache: "no-store"})
      .then(function (r) { return r.text(); })
      .then(function (v) {
        if (v !== served) { sessionStorage.setItem(key, String(window.scrollY)); location.reload(); }
      }, function () {});
  }, 400);
})();
</script>
"""

PLACEHOLDER = ("<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>anomark watch</title>"
               "</head><body><p>No report yet: the first build is still running, or the document could "
               "not be compiled (the problems are on the terminal). This page reloads when a build "
               "finishes.</p></body></html>")


class Site:
    """What the server shows: the report page as it is now, and its version."""

    def __init__(self, page: Path):
        self.page = page
        self.version = 0

    def changed(self) -> None:
        """A rebuild finished: open pages reload."""
        self.version += 1

    def served_page(self) -> bytes:
        # The version is read before the file: a rebuild in between costs one
        # extra reload, never a stale page.
        script = RELOAD_SCRIPT % {"version": self.version, "endpoint": VERSION_PATH}
        try:
            html = self.page.read_text(encoding="utf-8")
        except OSError:
            html = PLACEHOLDER
        at = html.rfind("</body>")
        at = len(html) if at < 0 else at
        return (html[:at] + script + html[at:]).encode("utf-8")


def _handler(site: Site) -> type[BaseHTTPRequestHandler]:
    routes: dict[str, Callable[[], tuple[bytes, str]]] = {
        "/": lambda: (site.served_page(), "text/html; charset=utf-8"),
        f"/{site.page.name}": lambda: (site.served_page(), "text/html; charset=utf-8"),
        VERSION_PATH: lambda: (str(site.version).encode("ascii"), "text/plain; charset=utf-8"),
    }

    class Handler(BaseHTTPRequestHandler):
        def do_GET(self) -> None:  # noqa: N802 - the http.server name
            route = routes.get(urlsplit(self.path).path)
            if route is None:
                self.send_error(404)
                return
            body, kind = route()
            self.send_response(200)
            self.send_header("Content-Type", kind)
            self.send_header("Content-Length", str(len(body)))
            self.send_header("Cache-Control", "no-store")
            self.end_headers()
            self.wfile.write(body)

        def log_message(self, format, *args) -> None:  # the terminal is for build summaries
            pass

    return Handler


def _signature(path: Path):
    """What changes when the file is saved (None while an editor has it moved away)."""
    try:
        stat = path.stat()
    except OSError:
        return None
    return stat.st_mtime_ns, stat.st_size


class Watch:
    """Serve ``page`` and call ``rebuild`` whenever ``source`` is saved."""

    def __init__(self, source: Path, page: Path, rebuild: Callable[[], None], interval: float = 0.25):
        self.source = source
        self.site = Site(page)
        self.rebuild = rebuild
        self.interval = interval
        self.stopped = threading.Event()
        self.server: ThreadingHTTPServer | None = None

    def start(self, port: int = 0) -> str:
        """Open the server on loopback (port 0: any free one) and return its URL."""
        self.server = ThreadingHTTPServer((HOST, port), _handler(self.site))
        self.server.daemon_threads = True
        threading.Thread(target=self.server.serve_forever, name="anomark-watch-server", daemon=True).start()
        return f"http://{HOST}:{self.server.server_address[1]}/"

    def run(self) -> None:
        """Build now, then again after every save, until ``stop``."""
        seen = _signature(self.source)
        self.rebuild()
        self.site.changed()
        while not self.stopped.wait(self.interval):
            now = _signature(self.source)
            if now is None or now == seen:
                continue
            seen = now
            self.rebuild()
            self.site.changed()

    def stop(self) -> None:
        self.stopped.set()
        if self.server is not None:
            self.server.shutdown()
            self.server.server_close()
