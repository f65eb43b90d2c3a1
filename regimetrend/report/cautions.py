"""The cautions printed with every report: the standing ones, and those this analysis calls for.

Forecasts and growth figures here can drive costly decisions (budgets, capacity, targets), so the
report always says what the numbers assume and where they are weakest.
"""

from __future__ import annotations

STANDING = (
    "Extrapolation assumes the last regime holds: the forecast continues the trend of the most "
    "recent regime, and a new change of regime after the end of the data is not foreseen.",
    "A break near the end of the series is uncertain: its date interval is wide and the last "
    "regime's growth rests on few periods, so recent growth figures can move a lot as new data "
    "arrive.",
    "These results support, and do not replace, business judgement: check the break dates "
    "against what is known about the business (contracts, prices, launches, definitions) "
    "before acting on them.",
)


def near_end_caution(n: int, last_break: int | None, ci_high: int | None, frequency: str,
                     share: float = 0.15) -> str | None:
    """A caution when the last regime is short or its break interval reaches the last periods."""
    if last_break is None:
        return None
    tail = n - last_break
    reaches = ci_high is not None and ci_high >= n - max(2, int(0.05 * n))
    if tail <= max(4, int(share * n)) or reaches:
        return (f"The last break leaves only {tail} {frequency} periods in the last regime; "
                f"its growth figures and the forecast from it are less certain than the "
                f"intervals alone suggest.")
    return None


# phrases of cautions from other stages that say what a standing caution already says
_COVERED = ("do not replace", "extrapolates the regime", "assumes that regime continues")


def collect(*groups) -> list[str]:
    """The standing cautions first, then the given ones, without repeats or empties."""
    seen, out = set(), []
    extra = [c for g in groups for c in (g or ())
             if c and not any(p in str(c).lower() for p in _COVERED)]
    for text in list(STANDING) + extra:
        if not text:
            continue
        text = str(text).strip()
        if text and text[0].islower():
            text = text[0].upper() + text[1:]
        if text and not text.endswith("."):
            text += "."
        key = text.lower()
        if key not in seen:
            seen.add(key)
            out.append(text)
    return out
