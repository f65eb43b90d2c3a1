"""Headless Chromium for the page tests (Debian's ``chromium`` package), in one place.

Chromium is driven through its DevTools protocol over a pipe (``--remote-debugging-pipe``: JSON
messages separated by NUL bytes on file descriptors 3 and 4), so no extra library is needed.
``render`` opens a page from disk, evaluates a script that returns JSON, takes a screenshot and
hands back the browser's events (requests, dialogs). ``require_chromium`` skips a test when the
browser is missing, except on CI (``CI=true``), where ``.ci/run`` installs it and the test must
run.
"""

import base64
import json
import os
import select
import shutil
import subprocess
import time
from dataclasses import dataclass

import pytest

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--disable-extensions", "--disable-dev-shm-usage", "--hide-scrollbars",
         "--remote-debugging-pipe"]


def _chromium():
    for candidate in ("/usr/bin/chromium", shutil.which("chromium"),
                      shutil.which("chromium-browser")):
        if candidate and os.path.exists(candidate):
            return candidate
    return None


class PipeBrowser:
    """A minimal DevTools-protocol client over Chromium's debugging pipe."""

    def __init__(self, binary, profile):
        to_child_r, self._to_child = os.pipe()
        self._from_child, from_child_w = os.pipe()

        def wire():  # in the child: fd 3 = commands in, fd 4 = replies out
            os.dup2(to_child_r, 3)
            os.dup2(from_child_w, 4)

        self.proc = subprocess.Popen([binary, *FLAGS, f"--user-data-dir={profile}",
                                      "about:blank"], preexec_fn=wire, close_fds=False,
                                     stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        os.close(to_child_r)
        os.close(from_child_w)
        self._buf = b""
        self._id = 0
        self.events = []

    def _read_message(self, deadline):
        while b"\0" not in self._buf:
            left = deadline - time.monotonic()
            if left <= 0:
                raise TimeoutError("no reply from chromium")
            ready, _, _ = select.select([self._from_child], [], [], left)
            if ready:
                chunk = os.read(self._from_child, 1 << 16)
                if not chunk:
                    raise RuntimeError("chromium closed the debugging pipe")
                self._buf += chunk
        raw, self._buf = self._buf.split(b"\0", 1)
        return json.loads(raw)

    def send(self, method, params=None, session=None, timeout=30.0):
        self._id += 1
        msg = {"id": self._id, "method": method, "params": params or {}}
        if session:
            msg["sessionId"] = session
        os.write(self._to_child, json.dumps(msg).encode() + b"\0")
        deadline = time.monotonic() + timeout
        while True:
            reply = self._read_message(deadline)
            if reply.get("id") == self._id:
                if "error" in reply:
                    raise RuntimeError(f"{method}: {reply['error']}")
                return reply.get("result", {})
            self.events.append(reply)

    def wait_for(self, method, timeout=30.0):
        deadline = time.monotonic() + timeout
        for e in self.events:
            if e.get("method") == method:
                return e
        while True:
            e = self._read_message(deadline)
            self.events.append(e)
            if e.get("method") == method:
                return e

    def close(self):
        try:
            self.send("Browser.close", timeout=5.0)
        except Exception:  # noqa: BLE001 - closing anyway
            pass
        try:
            self.proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()
        os.close(self._to_child)
        os.close(self._from_child)


def require_chromium() -> str:
    """The browser's path; skips the calling test when it is missing (fails on CI)."""
    binary = _chromium()
    if binary is None:
        if os.environ.get("CI", "").lower() == "true":
            pytest.fail("chromium is required on CI (.ci/run installs Debian's chromium)")
        pytest.skip("chromium is not installed (apt-get install chromium); CI runs this test")
    return binary


@dataclass
class Rendered:
    """What a page showed: the script's JSON value, a PNG screenshot, the browser's events."""

    value: object
    png: bytes
    events: list


def render(path, expression, profile, *, width: int | None = None,
           max_height: int = 16000) -> Rendered:
    """Open ``path`` (a file) in headless Chromium, evaluate ``expression`` (a script returning
    a JSON string) and screenshot the page: the whole page ``width`` wide when a width is given
    (at most ``max_height`` tall), else the window."""
    browser = PipeBrowser(require_chromium(), profile)
    try:
        target = browser.send("Target.createTarget", {"url": "about:blank"})["targetId"]
        session = browser.send("Target.attachToTarget",
                               {"targetId": target, "flatten": True})["sessionId"]
        for domain in ("Page", "Network", "Runtime"):
            browser.send(f"{domain}.enable", session=session)
        if width is not None:
            browser.send("Emulation.setDeviceMetricsOverride",
                         {"width": width, "height": 900, "deviceScaleFactor": 1,
                          "mobile": False}, session=session)
        browser.send("Page.navigate", {"url": path.as_uri()}, session=session)
        browser.wait_for("Page.loadEventFired", timeout=60)
        value = json.loads(browser.send("Runtime.evaluate",
                                        {"expression": expression, "returnByValue": True},
                                        session=session)["result"]["value"])
        params: dict = {"format": "png"}
        if width is not None:
            height = browser.send("Runtime.evaluate",
                                  {"expression": "document.documentElement.scrollHeight",
                                   "returnByValue": True}, session=session)["result"]["value"]
            params.update(captureBeyondViewport=True,
                          clip={"x": 0, "y": 0, "width": width,
                                "height": min(int(height), max_height), "scale": 1})
        shot = browser.send("Page.captureScreenshot", params, session=session)
    finally:
        browser.close()
    return Rendered(value, base64.b64decode(shot["data"]), browser.events)
