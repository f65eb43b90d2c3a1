"""Checks a later stage asks of a validated series: enough points, values above zero."""

from __future__ import annotations

import numpy as np

from ..errors import InputError
from ..series import Series


def require_points(series: Series, minimum: int, what: str) -> None:
    """Raise InputError unless ``series`` has at least ``minimum`` points for ``what``.

    Example message: "series 'sales' has 7 points; the quadratic trend with monthly dummies
    needs at least 15".
    """
    if series.n < minimum:
        raise InputError(f"series {series.name!r} has {series.n} points; {what} needs at least "
                         f"{minimum}")


def require_positive(series: Series, what: str) -> None:
    """Raise InputError at the first period whose value is zero or negative (logs need > 0).

    The ``Series`` keeps no file rows, so the message names the period (as the file writes it)
    and its position in the series.
    """
    bad = np.flatnonzero(~(series.values > 0))
    if bad.size:
        i = int(bad[0])
        raise InputError(f"{what} needs values above zero, but series {series.name!r} has "
                         f"{series.values[i]:g} at {series.label(i)} (point {i + 1} of "
                         f"{series.n}; {bad.size} such value{'s' if bad.size != 1 else ''} in all)")
