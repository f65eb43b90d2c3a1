"""What the evaluation reads from a break search result (``breaks.BreakSet``), in one place."""

from __future__ import annotations

import math


def positions(breakset) -> tuple[int, ...]:
    if breakset is None:
        return ()
    return tuple(sorted(int(p) for p in breakset.positions))


def break_list(breakset) -> list[dict]:
    """[{position, ci95: (lo, hi)}] in time order."""
    if breakset is None:
        return []
    out = [{"position": int(b.position), "ci95": (int(b.ci95[0]), int(b.ci95[1]))}
           for b in breakset.breaks]
    return sorted(out, key=lambda d: d["position"])


def supf_pvalue(breakset) -> float | None:
    """p-value of the sup-F test of no break against one (Andrews, 1993)."""
    if breakset is None or breakset.tests is None or breakset.tests.supf is None:
        return None
    p = breakset.tests.supf.p_value
    return None if p is None or not math.isfinite(float(p)) else float(p)


def cusum_crossing(breakset) -> int | None:
    """First position where the global trend's CUSUM left its 5% band, or None."""
    if breakset is None or breakset.drift is None:
        return None
    return int(breakset.drift.position)


def to_dict(breakset) -> dict | None:
    return None if breakset is None else breakset.to_dict()
