"""The triage order: series with the strongest evidence of a recent change first.

The rule (also written on the portfolio page, from ``RULE``):

1. series whose latest break falls in the recent window (the last two years of the series, at
   least 8 periods, at most half of it), strongest first by that break's F statistic (partial F
   given the other breaks, robust to autocorrelation unless that was switched off); the latest
   break is the forecast model's, or a later one the diagnosis names as the change that the
   model does not forecast from (its F, when another shape's search found it, is not at hand:
   such series follow those with an F);
2. then series without a recent break whose global trend's recursive CUSUM left its 5% band in
   the recent window (the global trend has started to miss), by the sup-F p-value;
3. then every other analysed series, by the sup-F p-value of a break anywhere (smallest first);
4. series that failed come last.

Ties keep the input order. The rank is a reading order, not a test.
"""

from __future__ import annotations

RULE = ("Series are ranked by evidence of a recent change in their trend. First come series "
        "whose latest break falls in the recent window (the last two years of the series, at "
        "least 8 periods and at most half of it), strongest first by that break's F statistic "
        "(partial F given the other breaks). A break the diagnosis names as the change but the "
        "forecast model does not use counts too; where its F is not at hand it comes after "
        "those with one. Next come series with no recent break whose global "
        "trend's CUSUM left its 5% band inside the recent window, by the sup-F p-value. Then "
        "all other series, by the sup-F p-value of a break anywhere (smallest first). Series "
        "that could not be analysed come last. Ties keep the input order. The rank orders "
        "reading; it is not a test.")


def _recent_cusum(row) -> bool:
    crossing, end = row.get("cusum_crossing"), row.get("recent_from")
    return bool(crossing and end and crossing >= end)


def sort_key(position: int, row: dict):
    if row.get("status") != "ok":
        return (4, 0.0, position)
    supf = row.get("supf_p")
    supf = 2.0 if supf is None else supf
    if row.get("recent_change"):
        f = row.get("last_break_f")
        return (1, -(f if f is not None else 0.0), position)
    if _recent_cusum(row):
        return (2, supf, position)
    return (3, supf, position)


def step(row: dict) -> int:
    """The rule's step (1 to 4) that places ``row``."""
    return sort_key(0, row)[0]


def evidence(row: dict) -> str:
    """Why ``row`` stands where it does: the rule's step and the figure it is ordered by, in
    words (written beside each series on the page, so the order can be checked by eye)."""
    from ..numformat import pvalue

    p = pvalue(row.get("supf_p"), "not tested")
    where = step(row)
    if where == 1:
        f = row.get("last_break_f")
        unused = " not used by the forecast model" if row.get("last_break_in_model") is False \
            else ""
        return f"1: recent break{unused}, F {f:.1f}" if f is not None else \
            f"1: recent break{unused}"
    if where == 2:
        return f"2: CUSUM left its band {row.get('cusum_crossing')}; sup-F p {p}"
    if where == 3:
        return f"3: sup-F p {p}"
    return "4: not analysed"


def rank(rows: list[dict]) -> list[int]:
    """Positions of ``rows`` in triage order."""
    return sorted(range(len(rows)), key=lambda k: sort_key(k, rows[k]))
