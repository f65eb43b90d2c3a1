"""Portfolio intake options and the per-id settings file, through the command line.

Data: invented monthly series (named as invented). Outside checks: pandas writes the
semicolon-separated, decimal-comma file (``DataFrame.to_csv(sep=';', decimal=',')``) and reads
the summary back; the values pandas parsed with ``decimal=','`` are the values the portfolio's
per-series JSON holds.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from regimetrend.errors import InputError
from regimetrend.portfolio import run_portfolio
from regimetrend.portfolio.store import Store

ROOT = Path(__file__).resolve().parents[1]


def invented(ids=("a", "b"), n=36, seed=3) -> pd.DataFrame:
    """Invented monthly values with a gentle trend and a seasonal swing."""
    rng = np.random.default_rng(seed)
    rows = []
    dates = pd.date_range("2019-01-01", periods=n, freq="MS")
    for ident in ids:
        t = np.arange(n)
        y = 200 + 0.7 * t + 3 * np.sin(2 * np.pi * t / 12) + rng.normal(0, 1, n)
        rows += [(ident, d, round(float(v), 2)) for d, v in zip(dates, y)]
    return pd.DataFrame(rows, columns=["id", "month", "value"])


def cli(src, out, *extra):
    return subprocess.run([sys.executable, "-m", "regimetrend", "portfolio", str(src),
                           "--output", str(out), "--id-column", "id", "--level", "scan",
                           "--quiet", "--workers", "1", *extra],
                          capture_output=True, text=True, cwd=ROOT, check=False)


def stored_values(out, ident) -> list[float]:
    data = json.loads(Store(Path(out)).result_path(ident).read_text())
    return data["chart"]["values"]


def test_decimal_comma_found_from_the_file_and_date_format_passed_through(tmp_path):
    frame = invented()
    frame["month"] = frame["month"].dt.strftime("%d/%m/%Y")  # day first: ambiguous alone
    src = tmp_path / "semicolon.csv"
    frame.to_csv(src, sep=";", decimal=",", index=False)
    assert "a;01/01/2019;202,04" in src.read_text()  # decimal commas in the file
    out = tmp_path / "out"
    proc = cli(src, out, "--date-format", "%d/%m/%Y")
    assert proc.returncode == 0, proc.stderr
    rows = pd.read_csv(out / "summary.csv").set_index("id")
    assert set(rows["status"]) == {"ok"} and rows.loc["a", "start"] == "2019-01-01"
    back = pd.read_csv(src, sep=";", decimal=",")  # pandas' own reading of the file
    expected = back.loc[back["id"] == "a", "value"].tolist()
    assert stored_values(out, "a") == pytest.approx(expected, abs=1e-12)
    # without --date-format the day-first dates are refused in the series' row, not guessed
    proc = cli(src, tmp_path / "out2")
    rows = pd.read_csv(tmp_path / "out2" / "summary.csv").set_index("id")
    assert set(rows["status"]) == {"failed"}
    assert "could be day/month or month/day" in rows.loc["a", "reason"]


def test_numbers_that_read_either_way_are_refused_naming_the_file_row(tmp_path):
    frame = invented(ids=("a",))
    frame["month"] = frame["month"].dt.strftime("%Y-%m-%d")
    frame["value"] = [f"{200 + k},{k % 10}{k % 7}{k % 3}" for k in range(len(frame))]
    src = tmp_path / "either.csv"
    frame.to_csv(src, sep=";", index=False)
    with pytest.raises(InputError, match=r"row 2, column 'value': '200,000' could be 200000"):
        run_portfolio(src, tmp_path / "out", id_columns=["id"], level="scan", workers=1)
    assert not (tmp_path / "out").exists()
    run_portfolio(src, tmp_path / "out", id_columns=["id"], level="scan", workers=1,
                  load_options={"decimal": ","})
    assert stored_values(tmp_path / "out", "a")[:2] == [200.0, 201.111]


def test_settings_file_overrides_only_its_ids_by_setting_or_option_name(tmp_path):
    frame = invented(ids=("a", "b", "c"), n=60)
    src = tmp_path / "long.csv"
    frame.to_csv(src, index=False)
    over = tmp_path / "over.json"
    over.write_text(json.dumps({"a": {"max-breaks": 0}, "b": {"shape": "exponential"}}))
    out = tmp_path / "out"
    proc = cli(src, out, "--settings-file", str(over))
    assert proc.returncode == 0, proc.stderr
    details = {i: json.loads(Store(out).result_path(i).read_text())["analysis"]
               for i in "abc"}
    assert details["a"]["settings"]["max_breaks"] == 0
    assert details["b"]["settings"]["shape"] == "exponential"
    assert details["c"]["settings"]["max_breaks"] is None
    assert details["c"]["settings"]["shape"] != "exponential"


@pytest.mark.parametrize("content, message", [
    ("id,shape\nz,linear\n", "over.csv row 2: no series with id 'z' in the portfolio"),
    ("id,shpe\na,\n", "over.csv column 'shpe': unknown setting"),
    ("id,max_breaks,max-breaks\na,1,2\n", "has two columns for the setting 'max_breaks'"),
    ("id,trim\na,-3\n", "over.csv row 2, column 'trim':"),
    ("store,shape\na,linear\n", "needs an 'id' column"),
])
def test_bad_settings_file_is_one_line_exit_2_and_writes_nothing(tmp_path, content, message):
    src = tmp_path / "long.csv"
    invented(ids=("a", "b")).to_csv(src, index=False)
    over = tmp_path / "over.csv"
    over.write_text(content)
    before = over.read_bytes()
    proc = cli(src, tmp_path / "out", "--settings-file", str(over))
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and message in proc.stderr, proc.stderr
    assert not (tmp_path / "out").exists() and over.read_bytes() == before
