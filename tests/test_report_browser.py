"""The report in a real browser: headless Chromium (Debian's ``chromium`` package, driven by
``tests/browser.py``; skipped when missing, except on CI).

The test loads the report from disk and checks from the rendered page that the summary, every chart
and every table are present and visible (laid out with a size, not hidden, images decoded), that
a hostile series name (markup and script) shows as text and runs nothing (no script element, no
dialog), that the page asks for nothing over the network, and saves a screenshot under the
test's temporary folder.
"""

from pathlib import Path

import pytest

from regimetrend import load_series
from regimetrend.report import write_report

from .browser import render

DEMO = Path(__file__).resolve().parents[1] / "demo" / "lumen_grid_energy.csv"
HOSTILE = '<img src=x onerror=alert(1)><script>alert("owned")</script> Lumen & "Grid"'
CHARTS = ("series_regimes", "forecast_errors", "cusum", "history_sweep", "accuracy_by_horizon",
          "growth_by_regime")
TABLES = ("growth_by_regime", "candidate_ranking", "forecast")
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
    shown = render(report_file, CHECK_PAGE, tmp_path / "profile", width=1100)
    page = shown.value
    screenshot = tmp_path / "report.png"
    screenshot.write_bytes(shown.png)

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
    assert not [e for e in shown.events if e.get("method") == "Page.javascriptDialogOpening"]
    # nothing fetched over the network: the page itself, then only inline data
    urls = [e["params"]["request"]["url"] for e in shown.events
            if e.get("method") == "Network.requestWillBeSent"]
    assert all(u.startswith(("file:", "data:")) for u in urls), urls
    assert screenshot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert screenshot.stat().st_size > 50_000
