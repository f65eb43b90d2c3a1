"""Generated inputs (hypothesis): odd CSV files through the command line, odd values and settings
through the Python API. Every run ends with exit 0 or 2 (``InputError`` in Python), one line on
standard error, and never a traceback. Few examples each, so the suite stays quick."""

import math

import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from regimetrend.cli import main
from regimetrend.errors import InputError

FAST = settings(max_examples=12, deadline=None,
                suppress_health_check=[HealthCheck.function_scoped_fixture,
                                       HealthCheck.too_slow])

names = st.text(alphabet=st.characters(codec="utf-8", exclude_characters=",\"\r\n"),
                min_size=0, max_size=12)
cells = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True, width=64).map(repr),
    st.integers(min_value=-10**30, max_value=10**30).map(str),
    st.sampled_from(["", "NA", "n/a", "-", "1,5", "1.000,5", "12%", "1e400", "-0", "0x10",
                     " 7 ", "\u00a0", "\x1b[2J"]),
)
dates = st.one_of(
    st.builds(lambda y, m: f"{y:04d}-{m:02d}", st.integers(1, 9999), st.integers(1, 12)),
    st.sampled_from(["", "2019-13", "2019-02-30", "31/12/2019", "Q1 2019", "9999-12",
                     "0001-01", "2019W52", "nonsense"]),
)


@st.composite
def csv_files(draw):
    n = draw(st.integers(0, 40))
    start = draw(st.integers(1800, 2100))
    regular = draw(st.booleans())
    header = f"{draw(names)},{draw(names)}"
    rows = []
    for i in range(n):
        d = f"{start + (i // 12):04d}-{i % 12 + 1:02d}" if regular else draw(dates)
        v = repr(100.0 + 2 * i + 5 * math.sin(i)) if draw(st.booleans()) else draw(cells)
        rows.append(f"{d},{v}")
    return "\n".join([header] + rows) + draw(st.sampled_from(["", "\n", "\n\n"]))


def _ok(code, err):
    assert code in (0, 2), err
    assert "Traceback" not in err
    if code == 2:
        lines = err.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("regimetrend: error: "), err


@FAST
@given(text=csv_files(), command=st.sampled_from([["scan", "--max-breaks", "1"],
                                                  ["forecast", "--horizon", "3"]]))
def test_generated_csv_files_exit_0_or_2_with_one_line(tmp_path, capsys, text, command):
    path = tmp_path / "series.csv"
    path.write_text(text, encoding="utf-8")
    code = main([command[0], str(path), *command[1:]])
    _, err = capsys.readouterr()
    _ok(code, err)


values = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10**20, 10**20),
                   st.none(), st.just(pd.NA), st.text(max_size=4), st.booleans())
choices = st.dictionaries(
    st.sampled_from(["shape", "seasonality", "season_length", "kind", "max_breaks", "trim",
                     "criterion", "events", "horizon", "first_origin", "step", "reuse_breaks",
                     "serial_correlation", "not_a_setting"]),
    st.one_of(st.integers(-5, 10**12), st.floats(allow_nan=True, allow_infinity=True),
              st.text(max_size=6), st.none(), st.booleans(), st.lists(st.text(max_size=7),
                                                                      max_size=2)),
    max_size=3)


@settings(max_examples=40, deadline=None)
@given(choices=choices)
def test_generated_settings_are_accepted_or_refused_in_one_line(choices):
    from regimetrend import Settings

    try:
        Settings(**choices)
    except InputError as exc:
        assert "\n" not in str(exc) and str(exc)


@settings(max_examples=25, deadline=None)
@given(data=st.lists(values, min_size=0, max_size=30), start=st.integers(1700, 2200))
def test_generated_pandas_series_load_or_are_refused_in_one_line(data, start):
    from regimetrend import load_series

    index = pd.period_range(f"{start}-01", periods=len(data), freq="M").to_timestamp() \
        if data else pd.DatetimeIndex([])
    try:
        load_series(pd.Series(data, index=index, dtype=object, name="sales"))
    except InputError as exc:
        assert "\n" not in str(exc) and str(exc)


@pytest.mark.parametrize("source", [{"a": 1}, [1, 2, 3], None, 42, "no-such-file.csv"])
def test_things_that_are_not_series_are_refused_in_one_line(source):
    from regimetrend import analyze

    with pytest.raises(InputError) as info:
        analyze(source)
    assert "\n" not in str(info.value)
