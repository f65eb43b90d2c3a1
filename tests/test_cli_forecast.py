"""The forecast command end to end: JSON keys, output files, one-line errors with exit code 2."""

import hashlib
import json

import numpy as np
import pytest

from regimetrend import demo_path
from regimetrend.cli import main


def run(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


def test_forecast_json_has_the_promised_keys(capsys):
    code, out, _ = run(capsys, "forecast", str(demo_path()), "--shape", "exponential",
                       "--holdout", "12", "--horizon", "6", "--json")
    assert code == 0
    result = json.loads(out)
    assert set(result["series"]) >= {"name", "frequency", "start", "end", "n"}
    assert result["series"]["frequency"] == "monthly" and result["series"]["n"] == 120
    assert len(result["forecast"]) == 6
    row = result["forecast"][0]
    assert row["date"] == "2026-01-01"
    assert row["lower95"] < row["lower80"] < row["median"] < row["mean"] < row["upper80"] < row["upper95"]
    metrics = result["holdout"]["metrics"]
    assert result["holdout"]["k"] == 12
    assert set(metrics) >= {"me", "mae", "rmse", "mape", "mase"}
    # the holdout errors are in original units: recompute MAE from the rows
    rows = result["holdout"]["rows"]
    mae = np.mean([abs(r["actual"] - r["mean"]) for r in rows])
    assert metrics["mae"] == pytest.approx(mae)


def test_forecast_writes_csv_and_png_and_leaves_input_unchanged(tmp_path, capsys):
    src = tmp_path / "bookings.csv"
    src.write_bytes(demo_path().read_bytes())
    before = hashlib.sha256(src.read_bytes()).hexdigest()
    out_dir = tmp_path / "out"
    code, out, _ = run(capsys, "forecast", str(src), "--output", str(out_dir))
    assert code == 0 and "wrote" in out
    assert (out_dir / "forecast.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    lines = (out_dir / "forecast.csv").read_text().splitlines()
    assert lines[0] == "date,label,mean,median,lower80,upper80,lower95,upper95"
    assert len(lines) == 1 + 12
    assert hashlib.sha256(src.read_bytes()).hexdigest() == before
    assert not [p for p in out_dir.iterdir() if p.name.startswith(".")]


@pytest.mark.parametrize("argv, words", [
    (["--shape", "cubic"], "--shape"),
    (["--holdout", "0"], "at least 1"),
    (["--holdout", "115"], "--holdout"),
])
def test_bad_options_give_one_line_and_exit_2(capsys, argv, words):
    code, out, err = run(capsys, "forecast", str(demo_path()), *argv)
    assert code == 2
    assert words in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert out == ""


def test_bad_file_gives_one_line_and_no_output(tmp_path, capsys):
    bad = tmp_path / "bad.csv"
    bad.write_text("month,bookings\n2020-01,10\n2020-02,abc\n2020-03,12\n2020-04,13\n")
    out_dir = tmp_path / "out"
    code, out, err = run(capsys, "forecast", str(bad), "--output", str(out_dir))
    assert code == 2 and "row 3" in err and len(err.strip().splitlines()) == 1
    assert not out_dir.exists()


def test_forecast_cautions_speak_only_of_what_it_computed(capsys):
    # the forecast command fits one trend and searches for no break: no caution may talk of
    # regimes or breaks as if they had been found
    from regimetrend.cautions import ONE_TREND

    code = main(["forecast", str(demo_path()), "--json"])
    assert code == 0
    cautions = json.loads(capsys.readouterr().out)["cautions"]
    assert ONE_TREND in cautions
    for text in cautions:
        assert "last regime" not in text and "break near the end" not in text


def test_forecast_says_which_shape_auto_fitted_and_why(capsys):
    # --shape auto (the default) fits the linear shape here, and says so, never silently
    code, out, _ = run(capsys, "forecast", str(demo_path()), "--horizon", "3")
    assert code == 0
    lines = out.splitlines()
    assert "model: global linear trend" in lines[1]
    assert lines[2].startswith("shape: linear, because --shape auto") and "compare" in lines[2]
    code, out, _ = run(capsys, "forecast", str(demo_path()), "--horizon", "3", "--json")
    assert json.loads(out)["shape_note"].startswith("shape: linear")
    code, out, _ = run(capsys, "forecast", str(demo_path()), "--horizon", "3", "--shape",
                       "exponential", "--json")
    assert json.loads(out)["shape_note"] is None
