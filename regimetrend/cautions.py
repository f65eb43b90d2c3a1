"""The cautions that travel with every forecast and growth figure.

Forecasts and growth rates from regimetrend can drive costly decisions (budgets, capacity,
targets), so every result says what the numbers assume and where they are weakest. The standing
cautions are written once here; ``for_analysis`` adds the ones a particular analysis calls for
(the near-end caution's words and rule live in ``words.near_end``).
The report and the CLI show these texts; they do not write their own.
"""

from __future__ import annotations

from .words import near_end, near_end_unused

EXTRAPOLATION = ("Extrapolation assumes the last regime holds: the forecast continues the trend "
                 "of the most recent regime, and a new change of regime after the end of the "
                 "data is not foreseen.")
LATE_BREAK = ("A break near the end of the series is uncertain: its date interval is wide and "
              "the last regime's growth rests on few periods, so recent growth figures can move "
              "a lot as new data arrive.")
JUDGEMENT = ("These results support, and do not replace, business judgement: check the break "
             "dates against what is known about the business (contracts, prices, launches, "
             "definitions) before acting on them.")
STANDING = (EXTRAPOLATION, LATE_BREAK, JUDGEMENT)
# the ``forecast`` command fits one trend and searches for no break: its cautions say only what
# it did
ONE_TREND = ("Extrapolation assumes the trend holds: this forecast continues one trend fitted "
             "to all history. No search for a change of regime was run, so a change in the "
             "trend's growth would go unnoticed here; the report command searches for breaks "
             "and chooses a model.")
HOLDOUT = ("The holdout score is one split of the data: a single stretch of periods can flatter "
           "or penalise the trend by chance.")
ONE_TREND_CAUTIONS = (ONE_TREND, HOLDOUT, JUDGEMENT)


def sentence(text: str) -> str:
    """Capital first letter, full stop at the end."""
    text = " ".join(str(text).split())
    if text and text[0].islower():
        text = text[0].upper() + text[1:]
    return text if not text or text.endswith(".") else text + "."


def assemble(*groups) -> tuple[str, ...]:
    """The standing cautions first, then the given ones, as sentences, without repeats."""
    seen, out = set(), []
    for text in list(STANDING) + [c for g in groups for c in (g or ()) if c]:
        text = sentence(text)
        if text and text.lower() not in seen:
            seen.add(text.lower())
            out.append(text)
    return tuple(out)


def for_analysis(series, breaks, evaluation_cautions=(), unused=()) -> tuple[str, ...]:
    """Standing cautions, the last break's own, then the evaluation's. ``breaks``: the break
    search whose breaks the chosen model uses (None when it uses none); ``unused``: break
    searches whose breaks the chosen model does not use; the latest of their breaks still gets
    the near-end caution, because a recent change the model ignores is the one that may show."""
    extra: list[str | None] = []
    latest = max((b for s in unused if s is not None for b in s.breaks),
                 key=lambda b: b.position, default=None)
    if (breaks is None or not breaks.breaks) and latest is not None:
        hi = int(latest.position) if latest.given else int(latest.ci95[1])
        if near_end(series, latest.position, hi):
            extra.append(near_end_unused(series, latest.position,
                                         "given by the analyst" if latest.given
                                         else "found by the break search"))
    if breaks is not None and breaks.breaks:
        last = breaks.breaks[-1]
        if last.given:
            extra.append(near_end(series, last.position, None))
            extra.append(f"The break dates were given by the analyst (the latest {last.label}), "
                         f"not found in the data: the regimes hold only as far as those dates "
                         f"are right.")
        else:
            lo, hi = (int(p) for p in last.ci95)
            extra.append(near_end(series, last.position, hi))
            extra.append(f"The latest break is dated {last.label}; the data are consistent with "
                         f"any date from {series.label(lo)} to {series.label(hi)} (95% "
                         f"interval).")
    return assemble(extra, evaluation_cautions)
