"""Invariants every verdict must satisfy: no two fields contradict, every sentence agrees with
its number. Shared by the known-truth simulations and the real-series corpus."""

from __future__ import annotations

import re

from regimetrend.numformat import number, percent
from regimetrend.verdict import CAUSES
from regimetrend.verdict import sentences as sentences_from_fields

VERDICT_KEYS = {"model", "breaks", "keep_history_from", "growth_now", "forecast_model",
                "diagnosis", "stability", "sentences"}
P_WITH_WORDS = re.compile(r"p (?:=|<) (\d\.\d+), (significant|not significant) at the 5% level")


def check_verdict(analysis, explicit_shape: str | None = None) -> None:
    v = analysis.verdict
    d = analysis.to_dict()["verdict"]
    assert set(d) == VERDICT_KEYS
    assert set(d["model"]) == {"shape", "seasonality", "strategy"}
    assert set(d["growth_now"]) == {"annualised_pct", "ci95", "per_year_units", "model"}
    assert set(d["diagnosis"]) == {"cause", "sentence"}
    assert d["diagnosis"]["cause"] in CAUSES
    assert all(set(b) == {"date", "ci95"} for b in d["breaks"])
    model = d["model"]
    if explicit_shape:
        assert model["shape"] == explicit_shape
    # the model, its forecast and its growth are one model
    assert d["forecast_model"] == {"shape": model["shape"], "strategy": model["strategy"]}
    assert d["growth_now"]["model"]["shape"] == model["shape"]
    assert analysis.forecast.spec.shape == model["shape"]
    assert analysis.growth.spec.shape == model["shape"]
    assert analysis.spec.shape == model["shape"]
    # break-free models use no breaks and keep all history; a cut is at one of the model's breaks
    if model["strategy"] in ("global", "window-average", "continuous"):
        assert d["keep_history_from"] is None
    if model["strategy"] in ("global", "window-average"):
        assert d["breaks"] == []
    if model["strategy"] == "truncated" and d["keep_history_from"] is not None:
        assert analysis.series.iso(analysis.forecast.fitted_from) == d["keep_history_from"]
    if model["strategy"] == "separate" and d["keep_history_from"] is not None:
        assert d["keep_history_from"] in [b["date"] for b in d["breaks"]]
    for b, field in zip(v.breaks, d["breaks"]):
        if b.given:  # a date the analyst gave has no date interval
            assert field["ci95"] is None
        else:
            assert field["ci95"][0] <= field["date"] <= field["ci95"][1]
    # sentences agree with the fields
    text = " ".join(d["sentences"])
    assert tuple(d["sentences"]) == v.sentences
    assert sentences_from_fields(v) == v.sentences  # regenerated from the fields alone
    assert d["diagnosis"]["sentence"] in d["sentences"]
    assert d["stability"]["sentence"] in d["sentences"]
    assert "-0.0%" not in text and " -0 " not in text
    for b in v.breaks:
        assert b.label in text
    if v.evidence.breaks_given:  # dates given by the analyst: no search is described
        assert "sup-F" not in text and "re-detected" not in text and "break search" not in text
        assert not any(f"{b.label} (95% interval" in text for b in v.found_breaks)
        assert "given by the analyst" in text
    keep = v.history.keep_from_label
    history = next(s for s in d["sentences"] if s.startswith("Keep "))
    if keep:
        assert history.startswith(f"Keep the history from {keep} ")
    else:
        assert history.startswith("Keep all history")
    g = v.growth_now
    growth = next(s for s in d["sentences"] if s.startswith("Growth now ("))
    if g.annualised_pct is not None:
        assert f"{percent(g.annualised_pct)} a year" in growth
    if g.per_year_units is not None:
        assert f"{number(g.per_year_units)} units a year" in growth
    if v.model.strategy == "truncated" and keep:  # the growth names the history it is fitted on
        assert f"fitted on the history from {keep}" in growth
        assert "from the last break" not in growth
    if g.shape == "linear" and g.per_year_units is not None and g.annualised_pct is not None:
        assert growth.index("units a year") < growth.index("% a year")  # units first
    if g.shared:
        assert "growth changed" not in text.lower()
    # growth words follow the chosen model: a separate fit has each regime's own growth, and
    # "growth changed" is said only of a model that lets growth change at its breaks
    if model["strategy"] == "separate":
        assert analysis.growth.kind == "both" and not g.shared
    if "growth changed" in text.lower():
        assert model["strategy"] in ("separate", "continuous") and analysis.growth.kind != "level"
    if g.shared:
        assert analysis.growth.kind == "level"
    if d["stability"]["status"] == "stable":
        assert d["stability"]["sentence"].startswith("The verdict is stable")
    elif d["stability"]["status"] == "changed":
        k = d["stability"]["changed_when_added"]
        assert "changed when the last" in d["stability"]["sentence"]
        assert (f"last {k} " in d["stability"]["sentence"]) or k == 1
    for p, words in P_WITH_WORDS.findall(text):  # significance words follow the p-value
        assert (float(p) < 0.05) == (words == "significant")
    assert (d["diagnosis"]["cause"] == "wrong shape") <= ("curves" in d["diagnosis"]["sentence"])
    if v.evidence.coverage95 is not None and v.evidence.coverage95 < 0.8:
        assert any("95% intervals covered only" in s for s in d["sentences"])
