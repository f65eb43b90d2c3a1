"""The report's six charts, drawn with matplotlib from plain arrays, returned as PNG bytes.

Each function only plots what it is given (no statistics here). Colours follow the Okabe and
Ito (2008) colour-blind-safe palette; line styles differ too, so the charts read in grey print.
Every axis is labelled with its units; dates run along the x axis where there is time.
"""

from __future__ import annotations

import io
from dataclasses import dataclass

import numpy as np

from .forecast_chart import OKABE_ITO

GLOBAL = OKABE_ITO["vermillion"]
REGIME = OKABE_ITO["blue"]
ACTUAL = OKABE_ITO["black"]
BAND = OKABE_ITO["sky"]
SHADES = (OKABE_ITO["grey"], OKABE_ITO["yellow"])
CANDIDATE_COLOURS = (OKABE_ITO["blue"], OKABE_ITO["vermillion"], OKABE_ITO["green"],
                     OKABE_ITO["orange"], OKABE_ITO["purple"], OKABE_ITO["sky"],
                     OKABE_ITO["black"], OKABE_ITO["yellow"])
STYLES = ("-", "--", "-.", ":")
WIDTH, HEIGHT, DPI = 8.6, 3.9, 100


@dataclass(frozen=True)
class Band:
    """A dated line with optional 80% and 95% interval ends (a fit or a forecast)."""

    label: str
    dates: np.ndarray
    mean: np.ndarray
    lower80: np.ndarray | None = None
    upper80: np.ndarray | None = None
    lower95: np.ndarray | None = None
    upper95: np.ndarray | None = None


def _plt():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _figure():
    plt = _plt()
    fig, ax = plt.subplots(figsize=(WIDTH, HEIGHT), dpi=DPI)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.grid(axis="y", color="#dddddd", lw=0.6)
    ax.set_axisbelow(True)
    return plt, fig, ax


def _png(plt, fig) -> bytes:
    fig.tight_layout()
    buf = io.BytesIO()
    fig.savefig(buf, format="png", metadata={"Software": None})
    plt.close(fig)
    return buf.getvalue()


def _plain(text) -> str:
    """Text matplotlib draws as it is: a dollar sign would otherwise start mathematical markup."""
    return str(text).replace("$", r"\$")


def _wrap(text: str, width: int = 38) -> str:
    """An axis label on at most a few short lines (long series names make long units)."""
    import textwrap

    return _plain("\n".join(textwrap.wrap(str(text), width)) or str(text))


def _dates(values) -> np.ndarray:
    return np.asarray(values, dtype="datetime64[D]")


def series_chart(dates, values, *, units: str, frequency: str, regimes=(), break_spans=(),
                 global_fit: Band | None = None, regime_fit: Band | None = None,
                 forecasts=(), title: str = "") -> bytes:
    """The series with regimes shaded, the global and regime-aware fits, and forecasts with
    interval bands. ``regimes`` are (first, last) date pairs; ``break_spans`` are the 95%
    intervals of the break dates as (low, high) date pairs."""
    plt, fig, ax = _figure()
    for i, (first, last) in enumerate(regimes):
        ax.axvspan(_dates([first])[0], _dates([last])[0], color=SHADES[i % 2], alpha=0.10,
                   lw=0, label="regimes (shaded)" if i == 0 else None)
    for j, (lo, hi) in enumerate(break_spans):
        if lo is None or hi is None:
            continue
        ax.axvspan(_dates([lo])[0], _dates([hi])[0], color=OKABE_ITO["orange"], alpha=0.25, lw=0,
                   hatch="//", label="break date, 95% interval" if j == 0 else None)
    ax.plot(_dates(dates), values, color=ACTUAL, lw=1.1, label="actual")
    if global_fit is not None:
        ax.plot(_dates(global_fit.dates), global_fit.mean, color=GLOBAL, lw=1.4, ls="--",
                label=_plain(global_fit.label))
    if regime_fit is not None:
        ax.plot(_dates(regime_fit.dates), regime_fit.mean, color=REGIME, lw=1.4,
                label=_plain(regime_fit.label))
    for k, band in enumerate(forecasts):
        colour = REGIME if k == 0 else GLOBAL
        d = _dates(band.dates)
        if band.lower95 is not None:
            ax.fill_between(d, band.lower95, band.upper95, color=colour, alpha=0.12, lw=0,
                            label=_plain(f"{band.label}: 95% interval"))
        if band.lower80 is not None:
            ax.fill_between(d, band.lower80, band.upper80, color=colour, alpha=0.22, lw=0,
                            label=_plain(f"{band.label}: 80% interval"))
        ax.plot(d, band.mean, color=colour, lw=2.0, ls="-" if k == 0 else "--",
                label=_plain(f"{band.label}: forecast"))
    ax.set_xlabel(f"period start ({frequency})")
    ax.set_ylabel(_wrap(units))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    fig.set_size_inches(WIDTH, HEIGHT + 1.3)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.16), fontsize=7.5, frameon=False,
              ncol=3)
    return _png(plt, fig)


def error_chart(dates, lines: dict, *, units: str, frequency: str, horizon_note: str = "",
                title: str = "") -> bytes:
    """Forecast errors (actual minus forecast) over time, one line per strategy."""
    plt, fig, ax = _figure()
    ax.axhline(0.0, color="#555555", lw=0.8)
    for k, (label, errors) in enumerate(lines.items()):
        ax.plot(_dates(dates), errors, color=(GLOBAL, REGIME)[k % 2] if k < 2 else
                CANDIDATE_COLOURS[k % len(CANDIDATE_COLOURS)], lw=1.4,
                ls=STYLES[k % len(STYLES)], marker="o", ms=2.5, label=_plain(label))
    ax.set_xlabel(f"forecast target period ({frequency}){horizon_note}")
    ax.set_ylabel(_wrap(f"error, actual minus forecast ({units})"))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    ax.legend(loc="best", fontsize=8, frameon=False)
    return _png(plt, fig)


def cusum_chart(dates, path, lower, upper, *, frequency: str, ylabel: str,
                title: str = "") -> bytes:
    """A CUSUM path with its significance band."""
    plt, fig, ax = _figure()
    d = _dates(dates)
    ax.fill_between(d, lower, upper, color=BAND, alpha=0.25, lw=0, label="5% significance band")
    ax.plot(d, upper, color=OKABE_ITO["blue"], lw=0.9, ls="--")
    ax.plot(d, lower, color=OKABE_ITO["blue"], lw=0.9, ls="--")
    ax.plot(d, path, color=ACTUAL, lw=1.5, label="CUSUM path")
    outside = (np.asarray(path) > np.asarray(upper)) | (np.asarray(path) < np.asarray(lower))
    if outside.any():
        ax.scatter(d[outside], np.asarray(path)[outside], color=OKABE_ITO["vermillion"], s=10,
                   zorder=3, label="outside the band")
    ax.set_xlabel(f"period start ({frequency})")
    ax.set_ylabel(ylabel)
    ax.set_title(_plain(title), loc="left", fontsize=11)
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    return _png(plt, fig)


def history_chart(dates, scores, *, metric: str, frequency: str, chosen=None, points=(),
                  title: str = "") -> bytes:
    """Forecast accuracy against the first period of the history kept (the history sweep).
    ``points`` are extra (date, score, label) marks, e.g. fits that start at a break."""
    plt, fig, ax = _figure()
    d = _dates(dates)
    ax.plot(d, scores, color=REGIME, lw=1.6, marker="o", ms=3.5, label="fixed start dates")
    markers = ("D", "^", "s", "v")
    colours = (OKABE_ITO["green"], OKABE_ITO["purple"], OKABE_ITO["orange"], OKABE_ITO["sky"])
    kinds: dict[str, int] = {}
    for date, value, label in points:
        if value is None:
            continue
        first = label not in kinds
        k = kinds.setdefault(label, len(kinds))
        ax.scatter(_dates([date]), [value], marker=markers[k % 4], s=42, zorder=3,
                   color=colours[k % 4], edgecolor=ACTUAL, lw=0.5,
                   label=_plain(label) if first else None)
    if chosen is not None:
        c = _dates([chosen])[0]
        ax.axvline(c, color=OKABE_ITO["vermillion"], lw=1.2, ls="--",
                   label=f"recommended start {str(c)}")
    ax.set_xlabel(f"first period of the history used for fitting ({frequency})")
    ax.set_ylabel(_wrap(metric))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    ax.legend(loc="best", fontsize=8, frameon=False)
    return _png(plt, fig)


def horizon_chart(horizons, lines: dict, *, metric: str, highlight: str | None = None,
                  reference: str | None = None, title: str = "") -> bytes:
    """Accuracy by forecast horizon for each candidate strategy; the reference (global trend)
    is drawn in black, the recommended one thicker."""
    plt, fig, ax = _figure()
    others = [c for c in CANDIDATE_COLOURS if c != ACTUAL]
    k = 0
    for label, values in lines.items():
        bold = label == highlight
        if label == reference:
            ax.plot(horizons, values, color=ACTUAL, lw=1.8, ls="--", marker="s", ms=3,
                    label=_plain(label + " (reference)"))
            continue
        ax.plot(horizons, values, color=others[k % len(others)],
                lw=2.6 if bold else 1.2, ls=STYLES[k % len(STYLES)], marker="o", ms=3,
                label=_plain(label + (" (recommended)" if bold else "")))
        k += 1
    ax.set_xlabel("forecast horizon (periods ahead)")
    ax.set_ylabel(_wrap(metric))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    ax.legend(loc="upper left", fontsize=7.5, frameon=False, ncol=2)
    return _png(plt, fig)


def growth_chart(labels, values, lower, upper, *, quantity: str, title: str = "") -> bytes:
    """Growth by regime as bars with 95% interval whiskers."""
    plt, fig, ax = _figure()
    x = np.arange(len(labels))
    vals = np.array([np.nan if v is None else v for v in values], dtype=float)
    lo = np.array([np.nan if v is None else v for v in lower], dtype=float)
    hi = np.array([np.nan if v is None else v for v in upper], dtype=float)
    colours = [SHADES[0] if i < len(labels) - 1 else REGIME for i in range(len(labels))]
    ax.bar(x, vals, color=colours, width=0.55, edgecolor=ACTUAL, lw=0.6)
    yerr = np.vstack([np.where(np.isfinite(lo), vals - lo, 0), np.where(np.isfinite(hi), hi - vals, 0)])
    ax.errorbar(x, vals, yerr=yerr, fmt="none", ecolor=ACTUAL, capsize=6, lw=1.2,
                label="95% interval")
    ax.axhline(0.0, color="#555555", lw=0.8)
    for xi, v in zip(x, vals):
        if np.isfinite(v):
            ax.annotate(f"{v:.1f}", (xi, v), textcoords="offset points", xytext=(14, 3),
                        fontsize=8)
    ax.set_xticks(x, labels, fontsize=8)
    ax.set_xlabel("regime (first period to last period)")
    ax.set_ylabel(quantity)
    ax.set_title(_plain(title), loc="left", fontsize=11)
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    return _png(plt, fig)
