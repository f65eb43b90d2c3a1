"""How many breaks: information criteria and the sequential sup-F(l+1|l) rule.

Given the minimum SSR for m = 0..M breaks, each criterion scores every m; the path is kept in
the result so an analyst can see how close the runner-up was.

- ``bic`` (Yao, 1988): n ln(SSR/n) + p ln n.
- ``lwz`` (Liu, Wu and Zidek, 1997): ln(SSR/(n - p)) + p c0 (ln n)^(2 + d0) / n with
  c0 = 0.299 and d0 = 0.1 (the constants Liu, Wu and Zidek recommend; from memory).
- ``sequential`` (Bai and Perron, 1998): starting from no break, add one while the sup-F test
  of l+1 against l breaks rejects at 5%.

p counts every estimated quantity: the coefficients of the model without breaks, and for each
break its changing coefficients plus the break date itself (a date is estimated too).

Default: ``sequential``. Bai and Perron (2003) recommend deciding the number of breaks by the
sequential sup-F(l+1|l) tests, after the sup-F test has shown at least one break, because each
added break must then be significant on its own; the information criteria add a break whenever
its fit gain beats a fixed penalty, and the BIC in particular picks too many breaks when the
errors are autocorrelated, as business series' trend residuals usually are (both from memory).
With kind ``auto`` the sequential rule runs within each kind (level, slope, both) and gives
its count m_k; the kind is then the one with the lowest BIC at (kind, m_k) (ties: fewer breaks,
then both, level, slope). Choosing the kind by the BIC at the BIC's own count and then letting
the tests change the count could report a kind that is not the best at the count used.
``benchmarks/planted_breaks.py`` measures all three rules on planted breaks and on series
without breaks: on 100-point series the sequential rule finds planted breaks as often as the BIC
(or more often), and false breaks at about the size of the sup-F test, while the BIC finds a
false level break in about 11% of no-break series. LWZ penalises hardest (almost no false
breaks, more missed small ones). Yao (1988) shows the BIC consistent for the number of mean
shifts; it stays selectable, as does LWZ.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError, about
from ..words import LEVEL

CRITERIA = ("bic", "lwz", "sequential")
DEFAULT_CRITERION = "sequential"
LWZ_C0, LWZ_D0 = 0.299, 0.1
SEQUENTIAL_LEVEL = LEVEL  # the one test level (words.LEVEL)


def check_criterion(name: str) -> str:
    name = str(name).strip().lower()
    if name not in CRITERIA:
        raise InputError(f"{about('criterion')}: {name!r} is not one of {', '.join(CRITERIA)}")
    return name


def parameter_count(base: int, changing: int, m: int) -> int:
    """Coefficients without breaks plus, per break, its changing coefficients and its date."""
    return int(base + m * (changing + 1))


def bic(ssr: float, n: int, p: int) -> float:
    if not np.isfinite(ssr):
        return math.inf
    return n * math.log(max(ssr, 1e-300) / n) + p * math.log(n)


def lwz(ssr: float, n: int, p: int) -> float:
    if not np.isfinite(ssr) or n - p <= 0:
        return math.inf
    return math.log(max(ssr, 1e-300) / (n - p)) + p * LWZ_C0 * math.log(n) ** (2 + LWZ_D0) / n


def criterion_path(ssr_path, n: int, base: int, changing: int, criterion: str,
                   floor: float = 0.0) -> list[float]:
    """Criterion value for each m = 0..M (``bic`` or ``lwz``; ``sequential`` is scored by BIC).

    SSRs below ``floor`` count as ``floor``: a fit that is exact up to rounding cannot be
    improved by a break, and rounding noise must not pick one (see ``exact_fit_floor``)."""
    score = lwz if criterion == "lwz" else bic
    return [score(max(s, floor), n, parameter_count(base, changing, m))
            for m, s in enumerate(ssr_path)]


def exact_fit_floor(y) -> float:
    """SSR below which a trend fit is exact up to rounding: 1e-12 of the total sum of squares
    about the mean plus 1e-24 of the raw sum of squares (rounding noise of an exact fit is about
    1e-32 of the latter)."""
    y = np.asarray(y, dtype=float)
    return 1e-12 * float(((y - y.mean()) ** 2).sum()) + 1e-24 * float((y * y).sum()) + 1e-300


def best_count(values) -> int:
    """m with the smallest criterion value (the fewest breaks on ties)."""
    values = np.asarray(values, dtype=float)
    return int(np.argmin(values)) if values.size else 0


def sequential_count(p_values, level: float = SEQUENTIAL_LEVEL) -> int:
    """Breaks accepted by the sequential rule: p_values[l] is the p-value of sup-F(l+1|l);
    stop at the first test that does not reject."""
    m = 0
    for p in p_values:
        if p is None or not (p < level):
            break
        m += 1
    return m


def f_statistic(ssr_small: float, ssr_large: float, changing: int, n: int, k_large: int,
                floor: float = 0.0) -> float:
    """F-scale statistic ((SSR_l - SSR_l+1) / q) / (SSR_l+1 / (n - k_l+1)); 0 when the smaller
    model already fits exactly (SSR at or below ``floor``)."""
    if not (np.isfinite(ssr_small) and np.isfinite(ssr_large)) or n - k_large <= 0:
        return math.nan
    if ssr_small <= floor:
        return 0.0
    if ssr_large <= floor:
        return math.inf
    return max(ssr_small - ssr_large, 0.0) / changing / (ssr_large / (n - k_large))
