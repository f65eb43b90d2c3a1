"""What the evaluation reads from a break search result (``BreakSet``), in one place."""

from __future__ import annotations

import math


def positions(breakset) -> tuple[int, ...]:
    if breakset is None:
        return ()
    return tuple(sorted(int(p) for p in breakset.positions))


def break_list(breakset) -> list[dict]:
    """[{position, ci95: (lo, hi)}] in time order; interval ends None when not given."""
    if breakset is None:
        return []
    out = []
    for b in getattr(breakset, "breaks", ()):
        ci = getattr(b, "ci95", None)
        lo, hi = (int(ci[0]), int(ci[1])) if ci is not None else (None, None)
        out.append({"position": int(b.position), "ci95": (lo, hi)})
    return sorted(out, key=lambda d: d["position"])


def supf_pvalue(breakset) -> float | None:
    """p-value of the sup-F test of no break against one or more breaks."""
    if breakset is None:
        return None
    tests = getattr(breakset, "tests", None)
    p = None
    if isinstance(tests, dict):
        for key in ("sup_f", "supf", "sup_F"):
            if key in tests:
                t = tests[key]
                p = t.get("p_value") if isinstance(t, dict) else getattr(t, "p_value", None)
                break
    elif tests is not None:
        t = getattr(tests, "sup_f", None) or getattr(tests, "supf", None)
        if t is not None:
            p = t.get("p_value") if isinstance(t, dict) else getattr(t, "p_value", None)
    if p is None or not math.isfinite(float(p)):
        return None
    return float(p)


def cusum_crossing(breakset) -> int | None:
    """First position where the global trend's CUSUM left its band, or None."""
    if breakset is None:
        return None
    drift = getattr(breakset, "drift", None)
    if drift is None:
        return None
    for key in ("first_crossing", "crossing", "position"):
        v = drift.get(key) if isinstance(drift, dict) else getattr(drift, key, None)
        if v is not None:
            return int(v)
    return None


def to_dict(breakset) -> dict | None:
    return None if breakset is None else breakset.to_dict()
