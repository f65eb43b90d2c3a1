"""Short lists for one-line messages ("'a', 'b' and 3 more")."""

from __future__ import annotations


def listing(items, limit=12, quote=True) -> str:
    """Items joined by commas, at most ``limit`` of them, each quoted with repr if ``quote``."""
    items = [repr(str(x)) if quote else str(x) for x in items]
    if not items:
        return "none"
    if len(items) > limit:
        return ", ".join(items[:limit]) + f" and {len(items) - limit} more"
    return ", ".join(items)
