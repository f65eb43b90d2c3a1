"""Phrases the verdict's sentences share: a model in plain words and a break's 95% interval.

Numbers are worded by ``numformat`` and test results by ``words``; this module only names
things, so the report's headline cards and the verdict's sentences say them alike.
"""

from __future__ import annotations


def interval_words(lo: str, hi: str) -> str:
    """'95% interval A to B', or '95% interval A alone' when both ends are the same period."""
    return f"95% interval {lo} alone" if lo == hi else f"95% interval {lo} to {hi}"


def article(word: str) -> str:
    """'a linear', 'an exponential'."""
    return ("an " if word[:1].lower() in "aeiou" else "a ") + word


def strategy_words(strategy: str, shape: str, start_label: str | None = None) -> str:
    """A model in plain words, e.g. 'separate exponential trends per regime'."""
    if strategy == "global":
        return f"one {shape} trend over all history"
    if strategy == "separate":
        return f"separate {shape} trends per regime, forecast from the last regime"
    if strategy == "truncated":
        where = f"from {start_label}" if start_label else "from the last break"
        return f"one {shape} trend fitted on the history {where}"
    if strategy == "continuous":
        return f"{article(shape)} trend joined at the breaks, forecast from its last piece"
    if strategy == "window-average":
        return f"the average of {shape} trends fitted from several window starts"
    return f"{strategy} {shape}"
