"""The words of each decision, written once: the significance level, how a p-value reads, the
caution for a break near the end of the series, and the history sentence.

The stages decide; this module says the decision in words. The command line, the report and the
notebook all read these functions, so the same decision never reads two ways.
"""

from __future__ import annotations

LEVEL = 0.05  # every test decision is taken at the 5% level (common practice)


def level_text(level: float = LEVEL) -> str:
    """'5%'."""
    return f"{level:.0%}"


def significant(p: float | None, level: float = LEVEL) -> bool:
    """True when the test rejects at ``level``; a missing p-value never counts as evidence."""
    return p is not None and p < level


def p_value(p: float | None) -> str:
    """A p-value inside a sentence: '0.012', 'below 0.001' or 'not available'."""
    if p is None:
        return "not available"
    return "below 0.001" if p < 0.001 else f"{p:.3f}"


def p_phrase(p: float | None) -> str:
    """A p-value as a phrase of its own: 'p = 0.012', 'p < 0.001' or 'p not available'."""
    from . import numformat

    text = numformat.pvalue(p, missing="")
    if not text:
        return "p not available"
    return f"p {text}" if text[0] in "<>" else f"p = {text}"


def near_end(series, position: int | None, ci_high: int | None) -> str | None:
    """The caution for a last regime that is short (under two seasonal cycles, four periods, or
    15% of the series) or whose break's 95% interval reaches the last periods of the data
    (within 5% of the series, at least 2 periods); None when neither holds."""
    if position is None:
        return None
    n = series.n
    tail = n - int(position)
    short = tail < max(2 * series.frequency.season_length, 4, int(0.15 * n))
    reaches = ci_high is not None and ci_high >= n - max(2, int(0.05 * n))
    if short or reaches:
        return (f"The last break ({series.label(int(position))}) leaves only {tail} "
                f"{series.frequency.name} periods in the last regime; its growth figures and the "
                f"forecast from it are less certain than the intervals alone suggest.")
    return None


def near_end_unused(series, position: int, how: str) -> str:
    """The caution for a break near the end that the chosen model does not use (``how``: 'found
    by the break search' or 'given by the analyst')."""
    tail = series.n - int(position)
    return (f"A break at {series.label(int(position))}, {how}, leaves only {tail} "
            f"{series.frequency.name} periods after it; the chosen model does not use it, but a "
            f"change this recent can be neither confirmed nor ruled out yet, so the forecast may "
            f"miss it if it is real.")


def history_sentence(keep_from_label: str | None, reason: str) -> str:
    """The history decision as one sentence: 'Keep the history from 2019-04: <reason>.' or
    'Keep all history: <reason>.' (``reason`` is the evidence the decision rests on)."""
    head = (f"Keep the history from {keep_from_label}" if keep_from_label
            else "Keep all history")
    reason = reason.strip().rstrip(".")
    return f"{head}: {reason}." if reason else f"{head}."


def significance(p: float | None, level: float = LEVEL) -> str:
    """The one wording of a test decision: 'significant at the 5% level', 'not significant at
    the 5% level', or 'not tested' when there is no p-value."""
    if p is None or p != p:
        return "not tested"
    return (f"significant at the {level_text(level)} level" if significant(p, level)
            else f"not significant at the {level_text(level)} level")


def auto_shape_note(command: str, shape: str, flag: str = "--shape") -> str:
    """What the automatic shape means for a command that fits one shape (``forecast``,
    ``scan``): the shape it fitted and why, so an automatic choice is never a silent one."""
    return (f"shape: {shape}, because {flag} auto lets the verdict choose the shape only in "
            f"compare and report (from rolling-origin forecasts under every shape); {command} "
            f"fits one shape and uses the {shape} one, the verdict's reference. Run compare to "
            f"let the verdict choose, or give {flag} exponential or quadratic.")
