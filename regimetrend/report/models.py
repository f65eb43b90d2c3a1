"""Plain words for the models behind the report's figures.

The growth figures come from the growth table (the analyst's shape, one trend per regime of the
break search); the forecast comes from the recommended strategy, which may use another shape.
The summary, the key figures and the captions name the model behind each figure with these
words, so a reader never takes one model's figures for the other's. Words only: nothing is
computed here.
"""

from __future__ import annotations

from .tables import dig


def growth_model(growth: dict | None) -> str | None:
    """The growth table's model in words, e.g. "linear trend per regime"."""
    if not growth or not growth.get("shape"):
        return None
    shape = growth["shape"]
    if len(growth.get("segments") or ()) <= 1:
        return f"one {shape} trend over the whole history"
    return {"slope": f"{shape} trend per regime, joined at the breaks",
            "level": f"{shape} trend with a level jump at each break and one shared slope",
            }.get(str(growth.get("kind")), f"{shape} trend per regime")


def growth_measure(growth: dict | None) -> str | None:
    """What the growth table's "% a year" means for its shape, in a few words."""
    if not growth:
        return None
    shape = growth.get("shape")
    if shape == "exponential":
        return "compound growth"
    if shape == "linear":
        return "compound growth of the fitted line over the regime"
    return growth.get("headline") or None


def recommended_candidate(evaluation: dict | None) -> dict | None:
    """The recommended candidate's entry (strategy, shape, last shape, start), or None."""
    rec = dig(evaluation, "recommended")
    if not isinstance(rec, dict) or not rec.get("name"):
        return None
    for c in (evaluation or {}).get("candidates") or ():
        if c.get("name") == rec["name"]:
            return c
    return rec


def strategy_words(candidate: dict | None) -> str | None:
    """A strategy in plain words, e.g. "separate exponential trends per regime, forecast from
    the last regime": the candidate's description, written by its entry in the strategy
    table (``regimetrend.strategy_table``)."""
    if not candidate or not candidate.get("strategy"):
        return None
    return candidate.get("description") or _table_words(candidate) or candidate.get("name")


def _table_words(candidate: dict) -> str | None:
    """The strategy table's words for a candidate given as a plain dict without them."""
    from types import SimpleNamespace

    from ..errors import InputError
    from ..strategy_table import strategy_kind

    start = str(candidate.get("start") or "last break")
    k, label = 1, None
    words = start.split()
    if start.startswith("break ") and start.endswith(" before the end") and words[1].isdigit():
        k = int(words[1])
    elif start != "last break":
        label = start
    try:
        kind = strategy_kind(candidate["strategy"])
    except InputError:
        return None
    shape = candidate.get("shape") or "linear"
    last = candidate.get("last_shape")
    return kind.words(SimpleNamespace(name=kind.name, shape=shape,
                                      last_shape=last if last != shape else None,
                                      start=0 if label else None, start_label=label,
                                      from_break=k))


def forecast_shape(candidate: dict | None) -> str | None:
    """The shape the recommended strategy forecasts with (its last regime's shape)."""
    if not candidate:
        return None
    return candidate.get("last_shape") or candidate.get("shape")


ORDINAL = {2: "second", 3: "third", 4: "fourth", 5: "fifth"}


def candidate_name(candidate: dict | None, break_labels=()) -> str | None:
    """A candidate's short name a manager can read, e.g. "linear trend from the third-latest
    break (1987)" for "truncated linear from break 3 before the end". ``break_labels`` are the
    full-sample break dates in time order, to date a start given as a break."""
    if not candidate:
        return None
    kind = candidate.get("strategy")
    shape = candidate.get("shape") or "trend"
    last = candidate.get("last_shape")
    if kind == "global":
        return f"one {shape} trend, all history"
    if kind == "separate":
        if last and last != shape:
            return f"{shape} trends per regime, {last} in the latest"
        return f"{shape} trend per regime"
    if kind == "continuous":
        return f"{shape} trend joined at the breaks"
    if kind == "window-average":
        return f"average of {shape} trends from several start dates"
    if kind == "truncated":
        start = str(candidate.get("start") or "last break")
        k = candidate.get("from_break")
        if start.startswith("break ") and " before the end" in start:
            k = int(start.split()[1])
        elif start == "last break":
            k = 1
        if isinstance(k, int) and start[:1].isalpha() and not start.startswith("event"):
            which = "latest break" if k == 1 else f"{ORDINAL.get(k, f'{k}th')}-latest break"
            when = f" ({break_labels[-k]})" if 0 < k <= len(break_labels) else ""
            return f"{shape} trend from the {which}{when}"
        return f"{shape} trend from {start}"
    return candidate.get("name")
