"""Breaks at every rolling origin from one dynamic programme, when regime costs add up.

For kind ``both`` with no shared terms between regimes (no seasonal terms, or seasonal terms
that change with the regime), the cost of a regime on positions a..b-1 is the SSR of its own
trend there, which does not depend on any data after b. The exact search's table
F_m(j) = min_i F_{m-1}(i) + c(i, j) (Bai and Perron, 2003) therefore holds, for every j, the
best segmentation of the history 0..j-1, and one table filled up to the last origin gives the
break search of every origin: back-track from j = o, and choose the number of breaks with the
criterion computed on the o periods known there. Nothing after an origin enters its breaks, so
this is as leak-free as running the search on each shortened history, and it returns the same
breaks (tests compare it with ``detect_breaks`` on each shortened history).

Other settings (kinds ``level``, ``slope`` or ``auto``; seasonal terms shared by the regimes;
``adjust``; the sequential criterion; long series searched by PELT) are searched origin by
origin with ``detect_breaks``.
"""

from __future__ import annotations

import numpy as np

from ..design import TrendSpec, season_index, to_model_scale

_BLOCK_ELEMENTS = 2_000_000
_BLOCK_ENDS = 128


def shared_table_applies(kind: str, spec: TrendSpec, seasonal_by_regime: bool,
                         criterion: str, n: int) -> bool:
    from ..breaks import exact

    additive = spec.seasonality == "none" or (spec.seasonality == "dummies"
                                              and seasonal_by_regime)
    return (kind == "both" and additive and criterion in ("bic", "lwz")
            and n < exact.PELT_LENGTH)


def origin_breaks(series, origins, spec: TrendSpec, max_breaks: int, trim, criterion: str,
                  seasonal_by_regime: bool) -> dict:
    """{origin: break positions, or None where the history is too short for a search}."""
    from ..breaks import select
    from ..breaks.costs import SegmentCost
    from ..breaks.problem import resolve_trim

    top = max(origins)
    y = to_model_scale(series.values[:top], spec)
    by_regime = seasonal_by_regime and spec.seasonality == "dummies"
    s = spec.season_length if by_regime else 1
    sidx = season_index(np.arange(top), series.first_season(), spec.season_length) \
        if by_regime else None
    degree = spec.trend_terms - 1
    base = spec.trend_terms + (spec.season_length - 1 if spec.seasonality == "dummies" else 0)
    changing = spec.trend_terms + (spec.season_length - 1 if by_regime else 0)
    by_h: dict[int, list[int]] = {}
    for o in origins:
        by_h.setdefault(resolve_trim(trim, o, spec, by_regime), []).append(o)
    out: dict[int, tuple[int, ...] | None] = {}
    for h, group in by_h.items():
        cost = SegmentCost(y, degree, sidx, s, min_size=h)
        h = max(h, cost.min_size)
        M = int(max_breaks)
        F, arg = _table(cost, M, h, max(group))
        for o in group:
            if o < max(2 * h, spec.minimum_points()):
                out[o] = None
                continue
            m_top = min(M, max(o // h - 1, 0))
            ssr = [float(F[m, o]) for m in range(m_top + 1)]
            values = select.criterion_path(ssr, o, base, changing, criterion)
            m = select.best_count(values)
            out[o] = _backtrack(arg, m, o) if np.isfinite(F[m, o]) else ()
    return out


def _table(cost, M: int, h: int, top: int):
    """F[m, j] and arg-mins for j = 0..top (ends), as in the exact search; each block of ends
    prices only the starts that can precede them (the lower triangle)."""
    F = np.full((M + 1, top + 1), np.inf)
    arg = np.zeros((M + 1, top + 1), dtype=np.intp)
    block = max(1, min(_BLOCK_ENDS, _BLOCK_ELEMENTS // (top + 1)))
    for j0 in range(h, top + 1, block):
        ends = np.arange(j0, min(j0 + block, top + 1))
        width = int(ends[-1]) - h + 1  # starts 0..width-1 leave at least h points
        C = cost.costs(np.arange(width)[None, :], ends[:, None])
        F[0, ends] = C[:, 0]
        for m in range(1, M + 1):
            lo = m * h
            if lo >= width:
                break
            total = F[m - 1, lo:width][None, :] + C[:, lo:]
            k = np.argmin(total, axis=1)
            F[m, ends] = total[np.arange(len(ends)), k]
            arg[m, ends] = k + lo
    return F, arg


def _backtrack(arg, m: int, end: int) -> tuple[int, ...]:
    out = []
    for level in range(m, 0, -1):
        end = int(arg[level, end])
        out.append(end)
    return tuple(sorted(out))

