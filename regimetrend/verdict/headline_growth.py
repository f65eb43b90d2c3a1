"""Growth now: the last regime's headline figures of the chosen model's growth table."""

from __future__ import annotations

from .fields import GrowthNow, Model


def growth_now(growth, model: Model) -> GrowthNow | None:
    """The last regime's headline figures of the chosen model's growth table."""
    if growth is None or not growth.regimes:
        return None
    last = growth.last
    pct = last.get("annualised_pct")
    units = last.get("annualised_units")
    shape = growth.spec.shape
    if shape == "exponential":
        base = "compound growth of the exponential trend"
    elif shape == "linear":
        start = "the regime's start" if last.start > 0 else "the first period"
        base = (f"compound growth of the fitted line from its level at {start} to its level "
                "at the end")
    else:
        base = ("the curve's slope at the last period over a year, as a share of the fitted "
                "level there")
    strategy = "global" if model.strategy == "window-average" else model.strategy
    shared = growth.kind == "level" and len(growth.regimes) > 1
    since = last.start_label if last.start > 0 else None
    return GrowthNow(pct.value if pct else None,
                     (pct.lower, pct.upper) if pct else (None, None),
                     units.value if units else None,
                     (units.lower, units.upper) if units else (None, None),
                     shape, strategy, since, base, shared, len(growth.regimes))
