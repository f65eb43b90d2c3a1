"""The report in a real browser: headless Chromium (Debian's ``chromium`` package).

Chromium is driven through its DevTools protocol over a pipe (``--remote-debugging-pipe``: JSON
messages separated by NUL bytes on file descriptors 3 and 4), so no extra library is needed. The
test loads the report from disk and checks from the rendered page that the summary, every chart
and every table are present and visible (laid out with a size, not hidden, images decoded), that
a hostile series name (markup and script) shows as text and runs nothing (no script element, no
dialog), that the page asks for nothing over the network, and saves a screenshot under the
test's temporary folder.

When Chromium is missing the test is skipped with the reason, except on CI (``CI=true``), where
``.ci/run`` installs it and the test must run.
"""

import base64
import json
import os
import select
import shutil
import subprocess
import time
from pathlib import Path

import pytest

from regimetrend import load_series
from regimetrend.report import write_report

DEMO = Path(__file__).resolve().parents[1] / "demo" / "lumen_grid_energy.csv"
HOSTILE = '<img src=x onerror=alert(1)><script>alert("owned")</script> Lumen & "Grid"'
CHARTS = ("series_regimes", "forecast_errors", "cusum", "history_sweep", "accuracy_by_horizon",
          "growth_by_regime")
TABLES = ("growth_by_regime", "candidate_ranking", "forecast")
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


CHECK_PAGE = r"""
(() => {
  const shown = (el) => {
    if (!el) return false;
    const r = el.getBoundingClientRect();
    let node = el;
    while (node && node.nodeType === 1) {
      const s = getComputedStyle(node);
      if (s.display === 'none' || s.visibility === 'hidden' || parseFloat(s.opacity) === 0)
        return false;
      node = node.parentElement;
    }
    return r.width > 20 && r.height > 10;
  };
  const out = {charts: {}, tables: {}};
  const summary = document.querySelector('#summary');
  out.summary = {shown: shown(summary),
                 sentences: summary ? summary.querySelectorAll('p').length : 0,
                 text: summary ? summary.innerText : ''};
  for (const fig of document.querySelectorAll('figure.chart')) {
    const img = fig.querySelector('img');
    out.charts[fig.id.replace('chart-', '')] = {
      shown: shown(img), decoded: !!img && img.complete && img.naturalWidth > 100,
      width: img ? img.getBoundingClientRect().width : 0};
  }
  for (const sec of document.querySelectorAll('section.table')) {
    const t = sec.querySelector('table');
    out.tables[sec.id.replace('table-', '')] = {
      shown: shown(t), rows: t ? t.tBodies[0].rows.length : 0};
  }
  out.title = document.querySelector('#report-title').textContent;
  out.scripts = document.querySelectorAll('script').length;
  out.planted_img = document.querySelectorAll('img[src="x"]').length;
  out.cautions = shown(document.querySelector('#cautions'));
  out.methods = shown(document.querySelector('#methods'));
  out.height = document.documentElement.scrollHeight;
  return JSON.stringify(out);
})()
"""


@pytest.fixture(scope="module")
def report_file(tmp_path_factory):
    from regimetrend.analysis import analyze

    folder = tmp_path_factory.mktemp("browser_report")
    series = load_series(DEMO, name=HOSTILE)
    analysis = analyze(series, shape="exponential", seasonality="dummies", horizon=12, step=3)
    write_report(analysis, folder)
    return folder / "report.html"


def test_report_renders_in_headless_chromium(report_file, tmp_path):
    binary = _chromium()
    if binary is None:
        if os.environ.get("CI", "").lower() == "true":
            pytest.fail("chromium is required on CI (.ci/run installs Debian's chromium)")
        pytest.skip("chromium is not installed (apt-get install chromium); CI runs this test")
    browser = PipeBrowser(binary, tmp_path / "profile")
    try:
        target = browser.send("Target.createTarget", {"url": "about:blank"})["targetId"]
        session = browser.send("Target.attachToTarget",
                               {"targetId": target, "flatten": True})["sessionId"]
        for domain in ("Page", "Network", "Runtime"):
            browser.send(f"{domain}.enable", session=session)
        browser.send("Emulation.setDeviceMetricsOverride",
                     {"width": 1100, "height": 900, "deviceScaleFactor": 1, "mobile": False},
                     session=session)
        browser.send("Page.navigate", {"url": report_file.as_uri()}, session=session)
        browser.wait_for("Page.loadEventFired", timeout=60)
        raw = browser.send("Runtime.evaluate", {"expression": CHECK_PAGE, "returnByValue": True},
                           session=session)["result"]["value"]
        page = json.loads(raw)
        height = min(int(page["height"]), 16000)
        shot = browser.send("Page.captureScreenshot",
                            {"format": "png", "captureBeyondViewport": True,
                             "clip": {"x": 0, "y": 0, "width": 1100, "height": height,
                                      "scale": 1}}, session=session)
        screenshot = tmp_path / "report.png"
        screenshot.write_bytes(base64.b64decode(shot["data"]))
    finally:
        browser.close()

    assert page["summary"]["shown"] and 5 <= page["summary"]["sentences"] <= 12  # the verdict's
    assert set(page["charts"]) == set(CHARTS)
    for name, chart in page["charts"].items():
        assert chart["shown"] and chart["decoded"], name
    assert set(TABLES) <= set(page["tables"])
    for name, table in page["tables"].items():
        assert table["shown"] and table["rows"] >= 1, name
    assert page["cautions"] and page["methods"]
    # the hostile name is shown as text and runs nothing
    assert HOSTILE in page["title"] and HOSTILE in page["summary"]["text"]
    assert page["scripts"] == 0 and page["planted_img"] == 0
    assert not [e for e in browser.events if e.get("method") == "Page.javascriptDialogOpening"]
    # nothing fetched over the network: the page itself, then only inline data
    urls = [e["params"]["request"]["url"] for e in browser.events
            if e.get("method") == "Network.requestWillBeSent"]
    assert all(u.startswith(("file:", "data:")) for u in urls), urls
    assert screenshot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert screenshot.stat().st_size > 50_000
