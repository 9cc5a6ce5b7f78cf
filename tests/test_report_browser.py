"""The HTML report in a real headless Chromium, driven over the DevTools protocol.

The browser is started with ``--remote-debugging-pipe`` (messages are JSON separated by NUL
bytes on file descriptors 3 and 4), so no websocket package is needed. We check what a user
would meet: the page loads with no console errors or exceptions, typing in the filter box
narrows the table, clicking a header sorts it, and a compound page shows its structure as an
``<svg>``. A screenshot of each page is saved under pytest's tmp dir.

Skipped with a visible reason when no Chromium is installed, except under ``CI=true``, where a
missing browser fails (``.ci/run`` installs Debian's ``chromium`` package).
"""

from __future__ import annotations

import base64
import contextlib
import json
import os
import queue
import shutil
import subprocess
import threading
import time
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from test_reports_site import build_demo_report

pytestmark = pytest.mark.browser

TIMEOUT_S = 30.0


def chromium_binary() -> str | None:
    """FLUXLEDGER_CHROMIUM, else ``chromium`` (Debian) or ``chromium-browser`` on PATH."""
    return (
        os.environ.get("FLUXLEDGER_CHROMIUM")
        or shutil.which("chromium")
        or shutil.which("chromium-browser")
    )


class Browser:
    """A headless Chromium and one page, spoken to over the DevTools pipe."""

    def __init__(self, binary: str, profile: Path) -> None:
        read_ours, write_theirs = os.pipe()  # chromium writes fd 4 → we read
        read_theirs, write_ours = os.pipe()  # we write → chromium reads fd 3

        def wire_fds() -> None:  # runs in the child before exec: put the pipe ends on 3 and 4
            a, b = os.dup(read_theirs), os.dup(write_theirs)
            os.dup2(a, 3)
            os.dup2(b, 4)

        args = [
            binary,
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--disable-dev-shm-usage",
            f"--user-data-dir={profile}",
            "--remote-debugging-pipe",
            "--window-size=1280,900",
            "about:blank",
        ]
        self._log = profile / "chromium.log"
        log = self._log.open("wb")
        self.proc = subprocess.Popen(
            args,
            stdin=subprocess.DEVNULL,
            stdout=subprocess.DEVNULL,
            stderr=log,
            pass_fds=(3, 4),
            preexec_fn=wire_fds,
        )
        log.close()
        os.close(read_theirs)
        os.close(write_theirs)
        self._out = os.fdopen(write_ours, "wb", buffering=0)
        self._in = read_ours
        self._next = 0
        self._replies: dict[int, dict[str, Any]] = {}
        self._inbox: queue.Queue[dict[str, Any]] = queue.Queue()
        self.events: list[dict[str, Any]] = []
        self._reader = threading.Thread(target=self._read, daemon=True)
        self._reader.start()
        target = self.call("Target.createTarget", {"url": "about:blank"})["targetId"]
        self.session = self.call("Target.attachToTarget", {"targetId": target, "flatten": True})[
            "sessionId"
        ]
        for domain in ("Page", "Runtime", "Log"):
            self.call(f"{domain}.enable", session=True)

    def _read(self) -> None:
        buffer = b""
        while True:
            try:
                chunk = os.read(self._in, 65536)
            except OSError:
                return
            if not chunk:
                return
            buffer += chunk
            while b"\0" in buffer:
                raw, buffer = buffer.split(b"\0", 1)
                self._inbox.put(json.loads(raw))

    def _pump(self, deadline: float) -> None:
        try:
            message = self._inbox.get(timeout=max(0.01, deadline - time.monotonic()))
        except queue.Empty:
            return
        if "id" in message:
            self._replies[message["id"]] = message
        else:
            self.events.append(message)

    def call(
        self, method: str, params: dict[str, Any] | None = None, *, session: bool = False
    ) -> dict[str, Any]:
        self._next += 1
        message: dict[str, Any] = {"id": self._next, "method": method, "params": params or {}}
        if session:
            message["sessionId"] = self.session
        try:
            self._out.write(json.dumps(message).encode() + b"\0")
        except BrokenPipeError as exc:
            raise AssertionError(
                f"the browser is gone (exit {self.proc.poll()}); its log ends:\n{self.log_tail()}"
            ) from exc
        deadline = time.monotonic() + TIMEOUT_S
        while self._next not in self._replies:
            if time.monotonic() > deadline or self.proc.poll() is not None:
                raise AssertionError(
                    f"no answer from the browser to {method}; its log ends:\n{self.log_tail()}"
                )
            self._pump(deadline)
        reply = self._replies.pop(self._next)
        if "error" in reply:
            raise AssertionError(f"{method}: {reply['error']}")
        return reply.get("result", {})

    def log_tail(self, lines: int = 15) -> str:
        """The end of the browser's own log, for a failure message."""
        try:
            text = self._log.read_text(encoding="utf-8", errors="replace")
        except OSError:
            return "(no log)"
        return "\n".join(text.splitlines()[-lines:])

    def wait_event(self, method: str, since: int) -> dict[str, Any]:
        deadline = time.monotonic() + TIMEOUT_S
        while True:
            for event in self.events[since:]:
                if event.get("method") == method:
                    return event
            if time.monotonic() > deadline:
                raise AssertionError(f"the browser never sent {method}")
            self._pump(deadline)

    def open(self, url: str) -> None:
        """Navigate and wait for the load event (scripts have run by then)."""
        mark = len(self.events)
        self.call("Page.navigate", {"url": url}, session=True)
        self.wait_event("Page.loadEventFired", mark)
        self.settle()

    def settle(self, seconds: float = 0.3) -> None:
        """Collect events that arrive shortly after an action (late console errors)."""
        deadline = time.monotonic() + seconds
        while time.monotonic() < deadline:
            self._pump(deadline)

    def js(self, expression: str) -> Any:
        result = self.call(
            "Runtime.evaluate",
            {"expression": expression, "returnByValue": True, "awaitPromise": True},
            session=True,
        )
        if "exceptionDetails" in result:
            raise AssertionError(f"{expression}: {result['exceptionDetails']}")
        return result["result"].get("value")

    def click(self, selector: str) -> None:
        box = self.js(
            f"(() => {{ const r = document.querySelector({json.dumps(selector)})"
            ".getBoundingClientRect(); return [r.x + r.width / 2, r.y + r.height / 2]; })()"
        )
        for kind in ("mousePressed", "mouseReleased"):
            self.call(
                "Input.dispatchMouseEvent",
                {"type": kind, "x": box[0], "y": box[1], "button": "left", "clickCount": 1},
                session=True,
            )

    def type_into(self, selector: str, text: str) -> None:
        """Focus the element and type as a keyboard would (fires 'input' events)."""
        self.js(f"document.querySelector({json.dumps(selector)}).focus()")
        self.call("Input.insertText", {"text": text}, session=True)

    def screenshot(self, path: Path) -> Path:
        data = self.call("Page.captureScreenshot", {"format": "png"}, session=True)["data"]
        path.write_bytes(base64.b64decode(data))
        return path

    def problems(self, since: int = 0) -> list[str]:
        """Console errors, uncaught exceptions and failed loads seen since event ``since``."""
        found = []
        for event in self.events[since:]:
            method, params = event.get("method"), event.get("params", {})
            if method == "Runtime.exceptionThrown":
                details = params.get("exceptionDetails", {})
                found.append(
                    str(details.get("exception", {}).get("description") or details.get("text"))
                )
            elif method == "Runtime.consoleAPICalled" and params.get("type") in ("error", "assert"):
                found.append(json.dumps(params.get("args", []))[:400])
            elif method == "Log.entryAdded" and params.get("entry", {}).get("level") == "error":
                found.append(params["entry"].get("text", "")[:400])
        return found

    def close(self) -> None:
        with contextlib.suppress(AssertionError):
            self.call("Browser.close")
        try:
            self.proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait(timeout=10)
        self._out.close()
        os.close(self._in)


@pytest.fixture(scope="module")
def browser(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Browser]:
    binary = chromium_binary()
    if binary is None:
        if os.environ.get("CI") == "true":
            pytest.fail("CI=true but no chromium binary was found; .ci/run must install it")
        pytest.skip(
            "no chromium binary found (Debian: apt-get install chromium); browser tests skipped"
        )
    handle = Browser(binary, tmp_path_factory.mktemp("chromium-profile"))
    yield handle
    handle.close()


@pytest.fixture(scope="module")
def built(tmp_path_factory: pytest.TempPathFactory):  # type: ignore[no-untyped-def]
    database, out, _, ids = build_demo_report(tmp_path_factory)
    yield database, out, ids
    database.dispose()


def test_error_capture_sees_a_broken_page(browser: Browser, tmp_path: Path) -> None:
    """The harness itself: a page that throws must show up as a problem (else the next test
    could pass on a blind browser)."""
    from registry.reports import assets

    page = tmp_path / "broken.html"
    page.write_text(
        f"<!DOCTYPE html><html><head><script>{assets.ERROR_SINK_JS}</script></head><body>"
        '<div id="page-errors" hidden></div><script>undefinedFunction();</script></body></html>',
        encoding="utf-8",
    )
    mark = len(browser.events)
    browser.open(page.as_uri())
    assert any("undefinedFunction" in p for p in browser.problems(mark))
    assert "undefinedFunction" in browser.js("document.getElementById('page-errors').textContent")


def test_index_loads_clean_filters_and_sorts(browser: Browser, built, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    _, out, _ = built
    mark = len(browser.events)
    browser.open((out / "index.html").as_uri())
    assert browser.js("document.body.getAttribute('data-ready')") == "1"
    visible = "document.querySelectorAll('#measurements tbody tr:not([hidden])').length"
    assert browser.js(visible) == 4
    assert browser.js("document.getElementById('shown-count').textContent") == (
        "4 of 4 measurements shown"
    )
    browser.screenshot(tmp_path / "index.png")

    browser.type_into("#filter", "biphenyl")
    browser.settle(0.2)
    assert browser.js(visible) == 1
    assert "DEMO-BIARYL" in browser.js(
        "document.querySelector('#measurements tbody tr:not([hidden])').textContent"
    )
    assert browser.js("document.getElementById('shown-count').textContent") == (
        "1 of 4 measurements shown"
    )
    browser.screenshot(tmp_path / "index-filtered.png")

    browser.js("const f = document.getElementById('filter'); f.value = '';")
    browser.type_into("#filter", "coalescence cdcl3")  # every word must match
    browser.settle(0.2)
    assert browser.js(visible) == 2

    browser.js("document.getElementById('filter').value = ''")
    browser.type_into("#filter", " ")  # whitespace only: everything again
    browser.settle(0.2)
    assert browser.js(visible) == 4

    # ΔG‡ is the 7th column: one click sorts ascending, a second descending (numerically)
    first_ids = (
        "[...document.querySelectorAll('#measurements tbody tr')].map(r => r.cells[6].dataset.v)"
    )
    browser.click("#measurements thead th:nth-child(7) button")
    browser.settle(0.2)
    ascending = [float(v) for v in browser.js(first_ids)]
    assert ascending == sorted(ascending)
    browser.click("#measurements thead th:nth-child(7) button")
    browser.settle(0.2)
    descending = [float(v) for v in browser.js(first_ids)]
    assert descending == sorted(descending, reverse=True)
    assert (
        browser.js(
            "document.querySelector('#measurements thead th:nth-child(7)').getAttribute('aria-sort')"
        )
        == "descending"
    )
    assert browser.problems(mark) == []
    assert browser.js("window.fluxErrors.length") == 0
    heads = browser.js(
        "[...document.querySelectorAll('#measurements thead th')].map(h => h.textContent)"
    )
    assert heads[-2:] == ["Operator", "notebook page"]  # the group's own columns, as asked
    assert str(out.parent) not in browser.js("document.body.innerText")  # no machine path


def test_filter_from_the_address(browser: Browser, built) -> None:  # type: ignore[no-untyped-def]
    """index.html#q=words opens with the filter filled in (a shareable filtered view)."""
    _, out, _ = built
    browser.open("about:blank")  # from index.html a '#q=' address would not reload the page
    mark = len(browser.events)
    browser.open((out / "index.html").as_uri() + "#q=ferrocene%20cdcl3")
    assert browser.js("document.getElementById('filter').value") == "ferrocene cdcl3"
    assert (
        browser.js("document.querySelectorAll('#measurements tbody tr:not([hidden])').length") == 1
    )
    assert browser.problems(mark) == []


def test_compound_page_shows_structure_and_plot(browser: Browser, built, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from registry import api

    database, out, ids = built
    biaryl = api.get_measurement(database, ids["biaryl"])["compound"]["id"]
    mark = len(browser.events)
    browser.open((out / "compounds" / f"c{biaryl}.html").as_uri())
    assert browser.js("document.querySelector('#structure svg') !== null")
    width = browser.js("document.querySelector('#structure svg').getBoundingClientRect().width")
    assert width > 100  # drawn, not collapsed
    # the Eyring plot image exists and decoded (naturalWidth is 0 for a broken image)
    assert browser.js("document.querySelector('figure.plot img').naturalWidth") > 0
    shot = browser.screenshot(tmp_path / "compound.png")
    assert shot.stat().st_size > 10_000
    assert browser.problems(mark) == []

    nitro = api.get_measurement(database, ids["unsanitized"])["compound"]["id"]
    browser.open((out / "compounds" / f"c{nitro}.html").as_uri())
    assert browser.js("document.querySelector('#structure svg')") is None
    assert "stored unsanitized" in browser.js("document.getElementById('structure').textContent")

    # no machine path anywhere a reader sees; the group's own columns are on the page
    seen = browser.js("document.body.innerText")
    assert str(out.parent) not in seen and "registry.sqlite" in seen
    dma = api.get_measurement(database, ids["dma"])["compound"]["id"]
    browser.open((out / "compounds" / f"c{dma}.html").as_uri())
    seen = browser.js("document.body.innerText")
    assert "Kept with this entry" in seen and "NB-7 p. 12" in seen and "A. Demo" in seen
    assert str(out.parent) not in seen
    # printed: white paper, the rate points unfolded, no filter box
    browser.call("Emulation.setEmulatedMedia", {"media": "print"}, session=True)
    try:
        paper = browser.js("getComputedStyle(document.body).backgroundColor")
        assert paper == "rgb(255, 255, 255)", paper  # on screen it is the cream paper
        browser.screenshot(tmp_path / "compound-print.png")
    finally:
        browser.call("Emulation.setEmulatedMedia", {"media": ""}, session=True)
    assert browser.problems(mark) == []

    browser.click("header.band a")  # back to the index from a compound page
    browser.wait_event("Page.loadEventFired", len(browser.events) - 1)
    browser.settle(0.2)
    assert browser.js("location.pathname").endswith("/index.html")
    assert browser.problems(mark) == []
