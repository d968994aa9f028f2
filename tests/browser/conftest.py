"""Shared fixtures of the browser tier: a loopback file server and headless Chromium.

Every test in ``tests/browser/`` is marked ``browser`` automatically and skipped with
a reason when Debian's Chromium (``/usr/bin/chromium``) or Playwright is missing.

Fixtures
--------
``served``
    A ``ThreadingHTTPServer`` on 127.0.0.1 (one per test session) that serves files
    held in memory. ``served.put("/page.html", text_or_bytes)`` adds a file and returns
    its URL; ``served.put_file("/x.js", path)`` serves a file from disk.
``browser``
    One Chromium per test session, launched with the flags that work on these machines
    (see docs/widget-testing.md). Playwright gives every launch a fresh temporary profile
    (user-data dir), so no state leaks in from an earlier run.
``web``
    A fresh page (its own browser context) wrapped in :class:`WebPage`, which records
    outside requests (aborted, counted), dialogs (dismissed), console errors and page
    errors. Assert ``web.outside_requests == []`` to prove that a page loads nothing
    from the network.
``artifacts``
    ``test-artifacts/`` at the repository root (git-ignored) for screenshots.
"""
from __future__ import annotations

import mimetypes
import threading
from dataclasses import dataclass, field
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from urllib.parse import urlsplit

import pytest

CHROMIUM = Path("/usr/bin/chromium")
REPO_ROOT = Path(__file__).resolve().parents[2]
LOOPBACK_HOSTS = {"127.0.0.1", "localhost", "[::1]", "::1"}

# Flags proven to work on these machines (root, no GPU, no network beyond loopback).
CHROMIUM_ARGS = [
    "--no-sandbox",
    "--headless",
    "--disable-gpu",
    "--disable-dev-shm-usage",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
    "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1",
]


def _skip_reason() -> str | None:
    if not CHROMIUM.exists():
        return f"{CHROMIUM} is absent (install Debian's package: apt-get install -y chromium)"
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        return "the Python package playwright is not installed (pip install playwright==1.65.2)"
    return None


def pytest_collection_modifyitems(config, items):
    here = Path(__file__).parent
    reason = _skip_reason()
    for item in items:
        if here in Path(str(item.fspath)).parents:
            item.add_marker(pytest.mark.browser)
            if reason:
                item.add_marker(pytest.mark.skip(reason=reason))


# --------------------------------------------------------------------------- server
class _Files:
    """Thread-safe map of URL path -> (bytes, content type)."""

    def __init__(self):
        self._lock = threading.Lock()
        self._files: dict[str, tuple[bytes, str]] = {}

    def set(self, path: str, body: bytes, ctype: str) -> None:
        with self._lock:
            self._files[path] = (body, ctype)

    def get(self, path: str):
        with self._lock:
            return self._files.get(path)


class ServedFiles:
    """Handle of the loopback server: put files, get their URLs."""

    def __init__(self, server: ThreadingHTTPServer, files: _Files):
        self._server = server
        self._files = files
        host, port = server.server_address[:2]
        self.base = f"http://127.0.0.1:{port}"
        self.requests: list[str] = []

    def url(self, path: str) -> str:
        return self.base + (path if path.startswith("/") else "/" + path)

    def put(self, path: str, body: str | bytes, content_type: str | None = None) -> str:
        """Serve ``body`` at ``path``; returns the full URL."""
        if not path.startswith("/"):
            path = "/" + path
        if isinstance(body, str):
            body = body.encode("utf-8")
        ctype = content_type or _guess_type(path)
        self._files.set(path, body, ctype)
        return self.url(path)

    def put_file(self, path: str, source: str | Path, content_type: str | None = None) -> str:
        """Serve the current contents of the file ``source`` at ``path``."""
        return self.put(path, Path(source).read_bytes(), content_type)


def _guess_type(path: str) -> str:
    if path.endswith((".js", ".mjs")):
        return "text/javascript; charset=utf-8"
    if path.endswith(".html"):
        return "text/html; charset=utf-8"
    guessed, _ = mimetypes.guess_type(path)
    return guessed or "application/octet-stream"


@pytest.fixture(scope="session")
def served():
    files = _Files()
    log: list[str] = []

    class Handler(BaseHTTPRequestHandler):
        def do_GET(self):  # noqa: N802 (http.server API)
            path = urlsplit(self.path).path
            log.append(path)
            hit = files.get(path)
            if hit is None:
                self.send_error(404, "not served by the test harness")
                return
            body, ctype = hit
            self.send_response(200)
            self.send_header("Content-Type", ctype)
            self.send_header("Content-Length", str(len(body)))
            self.send_header("Cache-Control", "no-store")
            self.end_headers()
            self.wfile.write(body)

        def log_message(self, *args):  # keep pytest output clean
            pass

    server = ThreadingHTTPServer(("127.0.0.1", 0), Handler)
    server.daemon_threads = True
    thread = threading.Thread(target=server.serve_forever, name="harness-http", daemon=True)
    thread.start()
    handle = ServedFiles(server, files)
    handle.requests = log
    try:
        yield handle
    finally:
        server.shutdown()
        server.server_close()
        thread.join(timeout=5)


# --------------------------------------------------------------------------- browser
@pytest.fixture(scope="session")
def browser():
    reason = _skip_reason()
    if reason:
        pytest.skip(reason)
    from playwright.sync_api import sync_playwright

    with sync_playwright() as pw:
        chromium = pw.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS,
                                      headless=True)
        try:
            yield chromium
        finally:
            chromium.close()


@dataclass
class WebPage:
    """A Playwright page plus what it tried to do behind the test's back."""

    page: object
    outside_requests: list = field(default_factory=list)
    dialogs: list = field(default_factory=list)
    console_errors: list = field(default_factory=list)
    console_warnings: list = field(default_factory=list)
    page_errors: list = field(default_factory=list)

    def goto(self, url: str, **kwargs):
        return self.page.goto(url, **kwargs)

    def screenshot(self, path: str | Path, **kwargs) -> Path:
        path = Path(path)
        path.parent.mkdir(parents=True, exist_ok=True)
        self.page.screenshot(path=str(path), **kwargs)
        return path


@pytest.fixture
def web(browser):
    context = browser.new_context(viewport={"width": 1280, "height": 900},
                                  device_scale_factor=1, service_workers="block")
    page = context.new_page()
    page.set_default_timeout(10_000)
    probe = WebPage(page=page)

    def gate(route):
        url = route.request.url
        parts = urlsplit(url)
        if parts.scheme in ("data", "blob", "about"):
            route.continue_()
        elif parts.scheme in ("http", "https", "ws", "wss") and parts.hostname in LOOPBACK_HOSTS:
            route.continue_()
        else:
            probe.outside_requests.append(url)
            route.abort()

    page.route("**/*", gate)

    def on_dialog(dialog):
        probe.dialogs.append((dialog.type, dialog.message))
        dialog.dismiss()

    page.on("dialog", on_dialog)
    page.on("console", lambda msg: probe.console_errors.append(msg.text) if msg.type == "error"
            else probe.console_warnings.append(msg.text) if msg.type == "warning" else None)
    page.on("pageerror", lambda err: probe.page_errors.append(str(err)))
    try:
        yield probe
    finally:
        context.close()


@pytest.fixture(scope="session")
def artifacts():
    """``test-artifacts/`` at the repository root (git-ignored), for screenshots."""
    path = REPO_ROOT / "test-artifacts"
    path.mkdir(exist_ok=True)
    return path


__all__ = ["CHROMIUM", "CHROMIUM_ARGS", "ServedFiles", "WebPage"]
