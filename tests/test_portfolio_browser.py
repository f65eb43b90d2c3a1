"""The portfolio page in a real browser: headless Chromium (driven by ``tests/browser.py``;
skipped when missing, except on CI).

Checks from the rendered page: the triage table shows every series with its rank, the ranking
rule is visible, each leading series has a drawn chart (an inline SVG with a size), the counts by
cause are shown, a hostile series id (markup and script) shows as text and runs nothing, and the
page asks for nothing over the network. Data: invented series.
"""

import pandas as pd
import pytest

from regimetrend.portfolio import run_portfolio
from tests.browser import render
from tests.test_portfolio import invented_long, with_bad_series

HOSTILE = '<img src=x onerror=alert(1)><script>alert("owned")</script>'

CHECK = r"""
(() => {
  const shown = (el) => {
    if (!el) return false;
    const r = el.getBoundingClientRect();
    return r.width > 20 && r.height > 10 && getComputedStyle(el).visibility !== 'hidden';
  };
  const tables = document.querySelectorAll('table');
  const triage = tables[tables.length - 1];
  const ranks = [...triage.tBodies[0].rows].map(r => r.cells[0].innerText);
  const ids = [...triage.tBodies[0].rows].map(r => r.cells[1].innerText);
  const why = [...triage.tBodies[0].rows].map(r => r.cells[4].innerText);
  return JSON.stringify({
    ranks, ids, why, triage: shown(triage),
    ticks: [...document.querySelectorAll('figure svg text')].map(t => t.textContent),
    rule: shown(document.querySelector('p.rule')),
    ruleText: document.querySelector('p.rule').innerText,
    charts: [...document.querySelectorAll('figure svg')].map(shown),
    polylines: document.querySelectorAll('figure svg polyline').length,
    causes: tables[0].tBodies[0].rows.length,
    scripts: document.querySelectorAll('script').length,
    planted: document.querySelectorAll('img[src="x"]').length,
    text: document.body.innerText});
})()
"""


@pytest.fixture(scope="module")
def page(tmp_path_factory):
    folder = tmp_path_factory.mktemp("portfolio_page")
    frame = with_bad_series(invented_long(n_series=5, n=60))
    frame.loc[frame["product"] == "gizmos", "product"] = HOSTILE
    src = folder / "long.csv"
    frame.to_csv(src, index=False)
    run_portfolio(src, folder / "out", id_columns=["region", "product"], level="scan",
                  workers=1)
    return folder / "out" / "portfolio.html"


def test_portfolio_page_renders_in_headless_chromium(page, tmp_path):
    shown = render(page, CHECK, tmp_path / "profile")
    got = shown.value
    (tmp_path / "portfolio.png").write_bytes(shown.png)
    summary = pd.read_csv(page.parent / "summary.csv").sort_values("rank")
    assert got["ranks"] == [str(r) for r in summary["rank"]]
    assert got["ids"] == list(summary["id"])
    assert HOSTILE in " ".join(got["ids"])  # the hostile id shows as text
    assert got["scripts"] == 0 and got["planted"] == 0
    assert got["triage"] and got["rule"] and "ranked by evidence of a recent change" in \
        got["ruleText"]
    assert len(got["charts"]) == 3 and all(got["charts"])  # the three series analysed
    assert got["polylines"] == 6  # values and regime fit in each
    assert got["causes"] >= 2 and "could not be analysed" in got["text"]
    # each row names the rule's step that placed it; the steps run down the table in order
    steps = [int(w.split(":")[0]) for w in got["why"]]
    assert steps == sorted(steps) and steps[-2:] == [4, 4]  # the two bad series last
    assert all(w.startswith(("1: recent break", "2: CUSUM", "3: sup-F p")) for w in
               got["why"][:-2])
    assert not any("e+" in t or "e-" in t for t in got["ticks"])  # no exponents on axes
    requests = [e for e in shown.events if e.get("method") == "Network.requestWillBeSent"]
    assert all(e["params"]["request"]["url"].startswith("file:") for e in requests)
