"""What the evaluation reads from a break search result (``breaks.BreakSet``), in one place."""

from __future__ import annotations

import math


def positions(breakset) -> tuple[int, ...]:
    if breakset is None:
        return ()
    return tuple(sorted(int(p) for p in breakset.positions))


def break_list(breakset) -> list[dict]:
    """[{position, ci95: (lo, hi), given}] in time order; a date the analyst gave has no
    interval (``ci95`` is (None, None)) and ``given`` True."""
    if breakset is None:
        return []
    out = [{"position": int(b.position), "ci95": (None, None), "given": True} if b.given
           else {"position": int(b.position), "ci95": (int(b.ci95[0]), int(b.ci95[1])),
                 "given": False}
           for b in breakset.breaks]
    return sorted(out, key=lambda d: d["position"])


def supf_pvalue(breakset) -> float | None:
    """p-value of the sup-F test of no break against one (Andrews, 1993); for the analyst's
    break dates (nothing searched) the F test of those dates together (``test_name`` says
    which)."""
    if breakset is None or breakset.tests is None or breakset.tests.supf is None:
        return None
    joint = breakset.tests.joint
    p = joint.p_value if joint is not None else breakset.tests.supf.p_value
    return None if p is None or not math.isfinite(float(p)) else float(p)


def test_name(breakset) -> str:
    """The name of the test behind ``supf_pvalue``, for sentences."""
    if breakset is not None and breakset.given:
        return "F test of the analyst's break dates"
    return "sup-F test"


def cusum_crossing(breakset) -> int | None:
    """First position where the global trend's CUSUM left its 5% band, or None."""
    if breakset is None or breakset.drift is None:
        return None
    return int(breakset.drift.position)


def to_dict(breakset) -> dict | None:
    return None if breakset is None else breakset.to_dict()


def own_test(breakset, position: int) -> dict:
    """The evidence for one break on its own: {test, statistic, p_value}.

    First choice: the sequential sup-F(l+1|l) step (Bai and Perron, 1998) that placed a break
    at exactly this position. Otherwise the break's partial F given the other breaks, read
    against the same sup-F(l+1|l) law with l = the number of other breaks (its date was
    searched for, so the plain F law would overstate it; the max over l+1 regimes makes the
    reading conservative). ``p_value`` is None when the tables do not cover the model (seasonal
    terms that change by regime)."""
    from ..breaks import critical
    from ..errors import InputError

    none = {"test": "not available", "statistic": None, "p_value": None}
    if breakset is None or breakset.tests is None:
        return none
    if breakset.given:  # a date given in advance: its partial F read on the F law
        brk = next((b for b in breakset.breaks if int(b.position) == int(position)), None)
        if brk is None:
            return none
        return {"test": "F test at the given date",
                "statistic": _finite(brk.f_statistic), "p_value": brk.p_value}
    for step in breakset.tests.sequential:
        if step.position is not None and int(step.position) == int(position) \
                and step.p_value is not None and math.isfinite(float(step.p_value)):
            return {"test": f"sequential sup-F({step.breaks_before + 1}|{step.breaks_before})",
                    "statistic": _finite(step.statistic), "p_value": float(step.p_value)}
    brk = next((b for b in breakset.breaks if int(b.position) == int(position)), None)
    stat = None if brk is None else _finite(brk.f_statistic)
    if stat is None or breakset.tests.supf is None or breakset.seasonal_by_regime:
        return dict(none, statistic=stat)
    others = max(len(breakset.breaks) - 1, 0)
    share = min(max(float(breakset.trim_share), 1e-3), 0.49)
    try:
        p = critical.sequential_pvalue(stat, breakset.tests.supf.model, share, others)
    except InputError:
        return dict(none, statistic=stat)
    return {"test": f"partial F given the other breaks, read as sup-F({others + 1}|{others})",
            "statistic": stat, "p_value": float(p)}


def _finite(v):
    if v is None:
        return None
    v = float(v)
    return v if math.isfinite(v) else None
