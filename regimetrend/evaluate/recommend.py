"""The recommendation rule: which candidate to forecast with, and why, in one sentence.

RULE (also shown with every recommendation):

    The global trend of the chosen shape is the reference. Another candidate is recommended
    only when its rolling-origin RMSE is below the reference's and either
    (a) the Diebold-Mariano test (HLN-corrected, squared-error loss, pooled over horizons)
        finds it more accurate at the 5% level (one-sided), or
    (b) it is regime-aware, its RMSE is at least 10% below the reference's, and the break
        search's sup-F test rejects "no break" at the 5% level.
    Among the candidates that qualify the one with the lowest RMSE is recommended; when none
    qualifies the global trend is kept.

Why (b): rolling-origin comparisons on short series have little power, so a large gain backed by
significant evidence that the regime changed counts even when the accuracy test alone cannot
separate the two. The 5% level is common practice; the 10% gain is this tool's own threshold
(a parameter of ``recommend``).
"""

from __future__ import annotations

from ..words import LEVEL, p_phrase
from .result import OPTIMISTIC_NOTE, Recommendation

ALPHA = LEVEL  # the one test level (words.LEVEL)
LARGE_GAIN = 0.10


def rule_text(reference: str, alpha: float = ALPHA, large_gain: float = LARGE_GAIN) -> str:
    return (f"The {reference} trend is the reference. Another candidate is recommended only when "
            f"its rolling-origin RMSE is lower and either (a) the Diebold-Mariano test "
            f"(HLN-corrected, squared-error loss, pooled over horizons) finds it more accurate "
            f"at the {alpha:.0%} level, or (b) it is regime-aware, its RMSE is at least "
            f"{large_gain:.0%} lower and the sup-F test finds a break at the {alpha:.0%} level. "
            f"The qualifying candidate with the lowest RMSE is recommended; otherwise the "
            f"global trend is kept.")


_p = p_phrase  # a p-value for a sentence: 'p = 0.012', 'p < 0.001' or 'p not available'


def recommend(candidates, reference, break_p: float | None, optimistic: bool = False,
              alpha: float = ALPHA, large_gain: float = LARGE_GAIN) -> Recommendation:
    """Apply the rule to ranked ``CandidateResult``s; ``reference`` is the global one."""
    rule = rule_text(reference.name, alpha, large_gain)
    break_ok = break_p is not None and break_p < alpha
    qualified = []
    for c in candidates:
        if c.name == reference.name or c.gain is None or not c.gain > 0:
            continue
        p_better = c.vs_global.get("p_value_better")
        by_test = p_better is not None and p_better < alpha
        by_gain = c.strategy.regime_aware and c.gain >= large_gain and break_ok
        if by_test or by_gain:
            qualified.append((c.metrics["rmse"], c, by_test))
    tail = f" ({OPTIMISTIC_NOTE})" if optimistic else ""
    if qualified:
        _, best, by_test = min(qualified, key=lambda t: t[0])
        p_better = best.vs_global.get("p_value_better")
        gain = f"its rolling-origin RMSE is {best.gain:.0%} below the {reference.name} trend's"
        if by_test:
            basis = "accuracy test"
            reason = (f"{best.name} is recommended: {gain}, and the Diebold-Mariano test finds "
                      f"it more accurate (one-sided {_p(p_better)}){tail}.")
        else:
            basis = "large gain with a significant break"
            reason = (f"{best.name} is recommended: {gain}, a gain of at least {large_gain:.0%}, "
                      f"and the sup-F test finds a break ({_p(break_p)}), although the "
                      f"Diebold-Mariano test alone cannot tell the two apart "
                      f"(one-sided {_p(p_better)}){tail}.")
        return Recommendation(best.strategy.name, best.strategy.shape, best.name, reason, rule,
                              basis)
    others = [c for c in candidates if c.name != reference.name and c.gain is not None]
    if others:
        best = min(others, key=lambda c: c.metrics["rmse"])
        if best.gain > 0:
            detail = (f"the best, {best.name}, has a {best.gain:.0%} lower RMSE with one-sided "
                      f"Diebold-Mariano {_p(best.vs_global.get('p_value_better'))}")
        else:
            detail = f"none has a lower RMSE (the best, {best.name}, is {-best.gain:.0%} worse)"
    else:
        detail = "there are no other candidates"
    reason = (f"the {reference.name} trend is kept: no candidate beats it by a margin the "
              f"Diebold-Mariano test can tell apart, nor by {large_gain:.0%} with a significant "
              f"break (sup-F {_p(break_p)}); {detail}{tail}.")
    return Recommendation(reference.strategy.name, reference.strategy.shape, reference.name,
                          reason, rule, "global kept")
