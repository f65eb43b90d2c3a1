"""The report's charts, drawn with matplotlib from plain arrays, returned as PNG bytes.

Each function only plots what it is given (no statistics here). Colours follow the Okabe and
Ito (2008) colour-blind-safe palette, one meaning per colour across the charts: black for the
actual values, blue for the chosen model's trend (of each regime), reddish purple (dashed) for
the one global trend, vermillion for the chosen model's forecast and its bands, orange for the
dates of the breaks it uses, grey (dashed) for break dates a search found that the chosen model
does not use. Line styles differ too, so the charts read in grey print.

Layout rules every chart keeps: the legend sits below the plot area, outside it (never over a
line), with six entries or fewer; date axes carry the series' own calendar labels (2019, 1992Q1,
2021-04, or the date of a week's or day's start) at period starts only; horizon axes have whole
numbers only; every axis is labelled with its units.
"""

from __future__ import annotations

import io
import textwrap
from dataclasses import dataclass

import numpy as np

OKABE_ITO = {"black": "#000000", "orange": "#E69F00", "sky": "#56B4E9", "green": "#009E73",
             "yellow": "#F0E442", "blue": "#0072B2", "vermillion": "#D55E00",
             "purple": "#CC79A7", "grey": "#999999"}
ACTUAL = OKABE_ITO["black"]
REGIME = OKABE_ITO["blue"]
GLOBAL = OKABE_ITO["purple"]
FORECAST = OKABE_ITO["vermillion"]
BREAK = OKABE_ITO["orange"]
SEASONAL = OKABE_ITO["sky"]
BAND = OKABE_ITO["sky"]
SHADE = OKABE_ITO["grey"]
CANDIDATE_COLOURS = (OKABE_ITO["blue"], OKABE_ITO["green"], OKABE_ITO["orange"],
                     OKABE_ITO["sky"], OKABE_ITO["purple"], OKABE_ITO["yellow"])
STYLES = ("-", "--", "-.", ":")
WIDTH, HEIGHT, DPI = 9.6, 4.2, 100
MAX_LEGEND = 6
UNITS = {"year": "year", "quarter": "quarter", "month": "month", "week": "week", "day": "day"}
_NAMES = {"annual": "year", "quarterly": "quarter", "monthly": "month", "weekly": "week",
          "daily": "day"}


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


# ------------------------------------------------------------------------------- drawing kit


def _plt():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _figure(ncols: int = 1, width_ratios=None, height: float = HEIGHT):
    plt = _plt()
    fig, axes = plt.subplots(1, ncols, figsize=(WIDTH, height), dpi=DPI, layout="constrained",
                             width_ratios=width_ratios, squeeze=False)
    for ax in axes[0]:
        for side in ("top", "right"):
            ax.spines[side].set_visible(False)
        ax.grid(axis="y", color="#dddddd", lw=0.6)
        ax.set_axisbelow(True)
    return fig, list(axes[0])


def _png(fig) -> bytes:
    buf = io.BytesIO()
    fig.savefig(buf, format="png", metadata={"Software": None})
    _plt().close(fig)
    return buf.getvalue()


def _plain(text) -> str:
    """Text matplotlib draws as it is: a dollar sign would otherwise start mathematical markup."""
    return str(text).replace("$", r"\$")


def _wrap(text: str, width: int = 38) -> str:
    """An axis label on at most a few short lines (long series names make long units)."""
    return _plain("\n".join(textwrap.wrap(str(text), width)) or str(text))


def _dates(values) -> np.ndarray:
    return np.asarray(values, dtype="datetime64[D]")


def _legend(fig, handles=None, labels=None, ncol: int = 3):
    """The figure's one legend, below the plot areas (constrained layout keeps it clear of
    them), with at most six entries."""
    ax = fig.axes[0]
    if handles is None:
        seen: dict[str, object] = {}
        for a in fig.axes:
            for h, lab in zip(*a.get_legend_handles_labels()):
                seen.setdefault(lab, h)
        labels, handles = list(seen), list(seen.values())
    if not handles:
        return None
    if len(handles) > MAX_LEGEND:
        raise ValueError(f"a chart legend holds at most {MAX_LEGEND} entries, got {len(handles)}")
    from matplotlib.legend_handler import HandlerTuple

    del ax
    longest = max(len(str(x)) for x in labels)
    fits = 3 if longest <= 40 else 2 if longest <= 64 else 1  # a row fits the figure's width
    return fig.legend(handles, [_plain(x) for x in labels], loc="outside lower center",
                      ncol=min(ncol, fits, len(handles)), fontsize=8, frameon=False,
                      handler_map={tuple: HandlerTuple(ndivide=None, pad=0.0)})


# ---------------------------------------------------------------------------- calendar axis


def calendar(frequency):
    """A ``Frequency`` from itself or its plain name (``monthly``, ``quarterly``, ...)."""
    from ..series import Frequency

    if isinstance(frequency, Frequency):
        return frequency
    unit = _NAMES.get(str(frequency))
    if unit is None:  # "every 2 weeks"
        parts = str(frequency).split()
        if len(parts) == 3 and parts[0] == "every" and parts[1].isdigit():
            return Frequency(parts[2].rstrip("s"), int(parts[1]))
        return Frequency("day")
    return Frequency(unit)


def _years(d) -> np.ndarray:
    return d.astype("datetime64[Y]").astype(int) + 1970


def _months(d) -> np.ndarray:
    return d.astype("datetime64[M]").astype(int)  # months since 1970-01


def calendar_ticks(first, last, frequency, most: int = 7) -> list[np.datetime64]:
    """Tick dates between ``first`` and ``last`` that are period starts of the calendar, at a
    round step (every 1, 2, 5, 10 ... years; every 1, 2, 3, 6 months; every 1, 2, 4, 13 ...
    weeks), at most ``most`` of them."""
    cal = calendar(frequency)
    first, last = _dates([first])[0], _dates([last])[0]
    unit, step = cal.unit, cal.step
    if unit in ("year", "quarter", "month"):
        period = {"year": 12, "quarter": 3, "month": 1}[unit] * step  # months per period
        m0, m1 = (int(_months(np.array([x]))[0]) for x in (first, last))
        candidates = [k for k in (1, 2, 3, 6) if k % period == 0]
        candidates += [12 * y for y in (1, 2, 5, 10, 20, 25, 50, 100, 200, 500, 1000)
                       if (12 * y) % period == 0]

        def round_months(k):  # months since 1970-01 on a round step that are period starts
            def round_date(m):
                return m % 12 == 0 and (1970 + m // 12) % (k // 12) == 0 if k >= 12 else \
                    m % k == 0
            return [m for m in range(m0, m1 + 1) if round_date(m) and (m - m0) % period == 0]

        months = []
        for k in candidates:
            months = round_months(k)
            if len(months) <= most:
                break
        if len(months) < 2:  # the series' periods miss the round dates: step from its start
            months = list(range(m0, m1 + 1, max(period, (m1 - m0) // max(most - 1, 1))))
        return [np.datetime64("1970-01", "M") + np.timedelta64(m, "M") for m in months]
    days = 7 * step if unit == "week" else step
    span = int((last - first).astype(int))
    if span >= 3.5 * 365:  # years apart: the first period start of every k-th year
        y0, y1 = (int(_years(np.array([x]))[0]) for x in (first, last))
        k = next((k for k in (1, 2, 5, 10, 20, 50, 100) if (y1 - y0) / k + 1 <= most), 100)
        out: list[np.datetime64] = []
        for y in range(y0, y1 + 1):
            jan1 = np.datetime64(f"{y:04d}-01-01", "D")
            if y % k == 0 and jan1 >= first:
                ahead = max(0, -(-int((jan1 - first).astype(int)) // days))
                tick = first + np.timedelta64(ahead * days, "D")
                if tick <= last and (not out or tick > out[-1]):
                    out.append(tick)
        if len(out) >= 2:
            return out
    steps = (1, 2, 4, 8, 13, 26, 52, 104, 260, 520, 1040) if unit == "week" else \
        (1, 2, 7, 14, 28, 91, 182, 364, 728, 1820, 3640)
    k = next((k for k in steps if span / (k * days) + 1 <= most), steps[-1])
    return [first + np.timedelta64(i * k * days, "D") for i in range(span // (k * days) + 1)]


def _date_axis(ax, first, last, frequency, most: int = 7, pad: float = 0.02) -> list[str]:
    """Calendar ticks and labels on ``ax``'s x axis; returns the labels."""
    import matplotlib.dates as mdates
    from matplotlib.ticker import FixedFormatter, FixedLocator, NullLocator

    cal = calendar(frequency)
    ticks = [_dates([t])[0] for t in calendar_ticks(first, last, cal, most)]
    labels = [cal.label(t) for t in ticks]
    nums = [float(mdates.date2num(t)) for t in ticks]
    ax.xaxis.set_major_locator(FixedLocator(nums))
    ax.xaxis.set_major_formatter(FixedFormatter(labels))
    ax.xaxis.set_minor_locator(NullLocator())
    lo, hi = float(mdates.date2num(_dates([first])[0])), float(mdates.date2num(_dates([last])[0]))
    span = max(hi - lo, 1.0)
    ax.set_xlim(lo - pad * span, hi + pad * span)
    return labels


def _log_axis(ax) -> None:
    """A log-scale value axis with plain numbers at 1-2-5 steps (1-2-3-5 over less than a
    decade and a half, every digit within half a decade), never powers of ten like 6 x 10^2."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    from .. import numformat

    ax.set_yscale("log")
    lo, hi = ax.get_ylim()
    decades = np.log10(max(hi, 1e-300)) - np.log10(max(lo, 1e-300))
    subs = ((1.0, 2.0, 5.0) if decades >= 1.5 else (1.0, 2.0, 3.0, 5.0) if decades >= 0.5
            else tuple(float(k) for k in range(1, 10)))
    ax.yaxis.set_major_locator(LogLocator(base=10, subs=subs))
    ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: numformat.number(v)))
    ax.yaxis.set_minor_formatter(NullFormatter())


def _period_word(frequency) -> str:
    cal = calendar(frequency)
    return cal.name


# ---------------------------------------------------------------------------------- charts


def _draw_band(ax, band: Band, colour, *, style="-", width=2.0, label=None):
    d = _dates(band.dates)
    patches = []
    if band.lower95 is not None:
        patches.append(ax.fill_between(d, band.lower95, band.upper95, color=colour, alpha=0.13,
                                       lw=0))
    if band.lower80 is not None:
        patches.append(ax.fill_between(d, band.lower80, band.upper80, color=colour, alpha=0.27,
                                       lw=0))
    (line,) = ax.plot(d, band.mean, color=colour, lw=width, ls=style, label=label,
                      marker="o" if len(d) == 1 else None, ms=3)
    return line, patches


def _break_marks(ax, breaks, spans):
    for lo, hi in spans:
        if lo is not None and hi is not None:
            ax.axvspan(_dates([lo])[0], _dates([hi])[0], facecolor=BREAK, alpha=0.18, lw=0,
                       hatch="//", edgecolor=BREAK)
    for b in breaks:
        ax.axvline(_dates([b])[0], color=BREAK, lw=1.3, ls="-")


def series_figure(dates, values, *, units: str, frequency, breaks=(), break_spans=(),
                  search_breaks=(), regime_trends=(), global_trend: Band | None = None,
                  seasonal_fit: Band | None = None, forecast: Band | None = None,
                  global_forecast: Band | None = None, zoom_from=None, log_scale: bool = False,
                  labels: dict | None = None, title: str = ""):
    """The series over all history (left) and zoomed on the latest regime with the forecast
    (right). ``regime_trends`` are Bands, one per regime (the trend with seasonal terms at their
    average); ``seasonal_fit`` is the regime model with its seasonal pattern, drawn in the zoom
    only; ``breaks`` are the dates of the breaks the drawn model uses and ``break_spans`` their
    95% intervals as (low, high); ``search_breaks`` other break dates (found by a search, not
    used by the model), drawn grey and dashed. ``labels`` may rename any legend entry and the
    zoom panel's title (``zoom``)."""
    words = {"actual": "actual", "regime": "trend of each regime", "global": "one global trend",
             "seasonal": "regime model with its seasonal pattern",
             "breaks": "break date, 95% interval",
             "search": "break found by the search, not used",
             "forecast": "recommended forecast, 80% and 95% intervals",
             "zoom": "latest regime and forecast"}
    words.update(labels or {})
    d = _dates(dates)
    values = np.asarray(values, dtype=float)
    zoom = zoom_from is not None and _dates([zoom_from])[0] > d[0]
    fig, axes = _figure(2 if zoom else 1, [3, 2] if zoom else None, HEIGHT + 0.4)
    fig.set_label("series")
    handles: dict[str, object] = {}
    end = d[-1]
    for fc in (forecast, global_forecast):
        if fc is not None and len(fc.dates):
            end = max(end, _dates(fc.dates)[-1])
    for i, ax in enumerate(axes):
        zoomed = zoom and i == 1
        first = _dates([zoom_from])[0] if zoomed else d[0]
        _break_marks(ax, [b for b in breaks if first <= _dates([b])[0]],
                     [s for s in break_spans if s[1] is not None and _dates([s[1]])[0] >= first])
        for b in search_breaks:
            if first <= _dates([b])[0]:
                handles.setdefault("search", ax.axvline(_dates([b])[0], color=SHADE, lw=1.2,
                                                        ls="--"))
        keep = d >= first
        (h,) = ax.plot(d[keep], values[keep], color=ACTUAL, lw=1.1 if not zoomed else 1.4,
                       marker="o" if keep.sum() <= 40 else None, ms=2.5)
        handles.setdefault("actual", h)
        if global_trend is None and global_forecast is not None and (zoomed or not zoom):
            (h,) = ax.plot(_dates(global_forecast.dates), global_forecast.mean, color=GLOBAL,
                           lw=1.4, ls="--")
            handles.setdefault("global", h)
        if global_trend is not None:
            gd = _dates(global_trend.dates)
            gk = gd >= first
            gdates, gvals = gd[gk], np.asarray(global_trend.mean, dtype=float)[gk]
            if global_forecast is not None and (zoomed or not zoom):
                gdates = np.concatenate([gdates, _dates(global_forecast.dates)])
                gvals = np.concatenate([gvals, np.asarray(global_forecast.mean, dtype=float)])
            (h,) = ax.plot(gdates, gvals, color=GLOBAL, lw=1.4, ls="--")
            handles.setdefault("global", h)
        if seasonal_fit is not None and zoomed:
            sd = _dates(seasonal_fit.dates)
            sk = sd >= first
            (h,) = ax.plot(sd[sk], np.asarray(seasonal_fit.mean)[sk], color=SEASONAL, lw=1.5,
                           ls=":")
            handles.setdefault("seasonal", h)
        for band in regime_trends:
            rd = _dates(band.dates)
            rk = rd >= first
            if rk.any():
                (h,) = ax.plot(rd[rk], np.asarray(band.mean, dtype=float)[rk], color=REGIME,
                               lw=2.0)
                handles.setdefault("regime", h)
        if forecast is not None:
            line, patches = _draw_band(ax, forecast, FORECAST)
            handles.setdefault("forecast", tuple(patches) + (line,) if patches else line)
        if breaks:
            from matplotlib.patches import Patch

            handles.setdefault("breaks", Patch(facecolor=BREAK, alpha=0.35, hatch="//",
                                               edgecolor=BREAK))
        if log_scale:
            _log_axis(ax)
        ax.set_ylabel(_wrap(units + (" (log scale)" if log_scale else "")))
        long_labels = calendar(frequency).unit in ("week", "day")  # 2021-03-01, not 2021-03
        _date_axis(ax, first, end, frequency,
                   most=(4 if long_labels else 6) if zoomed else (6 if long_labels else 8))
        ax.set_xlabel(f"period start ({_period_word(frequency)})")
        if zoom:
            ax.set_title(_plain(f"from {calendar(frequency).label(first)}: {words['zoom']}"
                                if zoomed else "all history"), loc="left", fontsize=9,
                         color="#444444")
    fig.suptitle(_plain(title), x=0.01, ha="left", fontsize=11)
    order = ["actual", "regime", "seasonal", "global", "breaks", "search", "forecast"]
    keys = [k for k in order if k in handles]
    if len(keys) > MAX_LEGEND:  # the dotted seasonal fit is named in the caption instead
        keys.remove("seasonal")
    _legend(fig, [handles[k] for k in keys], [words[k] for k in keys], ncol=3)
    return fig


def series_chart(dates, values, **kwargs) -> bytes:
    """PNG of ``series_figure``."""
    return _png(series_figure(dates, values, **kwargs))


def error_figure(dates, lines: dict, *, units: str, frequency, horizon_note: str = "",
                 title: str = ""):
    """Forecast errors (actual minus forecast) over time, one line per strategy; the first
    line is the global trend."""
    fig, (ax,) = _figure()
    fig.set_label("errors")
    ax.axhline(0.0, color="#555555", lw=0.8)
    d = _dates(dates)
    colours = (GLOBAL, FORECAST) + CANDIDATE_COLOURS
    styles = ("--", "-") + STYLES
    for k, (label, errors) in enumerate(lines.items()):
        ax.plot(d, errors, color=colours[k % len(colours)], lw=1.4 if k else 1.2,
                ls=styles[k % len(styles)], marker="o", ms=2.5, label=_plain(label))
    _date_axis(ax, d.min(), d.max(), frequency)
    ax.set_xlabel(f"forecast target period ({_period_word(frequency)}){horizon_note}")
    ax.set_ylabel(_wrap(f"error ({units})", 30))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    _legend(fig, ncol=2)
    return fig


def error_chart(dates, lines: dict, **kwargs) -> bytes:
    return _png(error_figure(dates, lines, **kwargs))


def cusum_figure(dates, path, lower, upper, *, frequency, ylabel: str, title: str = ""):
    """A CUSUM path with its significance band."""
    fig, (ax,) = _figure()
    fig.set_label("cusum")
    d = _dates(dates)
    ax.fill_between(d, lower, upper, color=BAND, alpha=0.25, lw=0, label="5% significance band")
    ax.plot(d, upper, color=OKABE_ITO["blue"], lw=0.9, ls="--")
    ax.plot(d, lower, color=OKABE_ITO["blue"], lw=0.9, ls="--")
    ax.plot(d, path, color=ACTUAL, lw=1.5, label="CUSUM path")
    outside = (np.asarray(path) > np.asarray(upper)) | (np.asarray(path) < np.asarray(lower))
    if outside.any():
        ax.scatter(d[outside], np.asarray(path)[outside], color=FORECAST, s=10,
                   zorder=3, label="outside the band")
    _date_axis(ax, d.min(), d.max(), frequency)
    ax.set_xlabel(f"period start ({_period_word(frequency)})")
    ax.set_ylabel(ylabel)
    ax.set_title(_plain(title), loc="left", fontsize=11)
    _legend(fig)
    return fig


def cusum_chart(dates, path, lower, upper, **kwargs) -> bytes:
    return _png(cusum_figure(dates, path, lower, upper, **kwargs))


def history_figure(dates, scores, *, metric: str, frequency, chosen=None, points=(),
                   title: str = ""):
    """Forecast accuracy against the first period of the history kept (the history sweep).
    ``points`` are extra (date, score, label) marks, e.g. fits that start at a break;
    ``chosen`` the start the verdict keeps, drawn as a dashed vertical line."""
    fig, (ax,) = _figure()
    fig.set_label("history")
    d = _dates(dates)
    ax.plot(d, scores, color=REGIME, lw=1.6, marker="o", ms=3.5, label="fixed start dates")
    markers = ("D", "^", "s", "v")
    colours = (OKABE_ITO["green"], OKABE_ITO["purple"], OKABE_ITO["orange"], OKABE_ITO["sky"])
    kinds: dict[str, int] = {}
    every = list(d)
    for date, value, label in points:
        if value is None:
            continue
        first = label not in kinds
        k = kinds.setdefault(label, len(kinds))
        ax.scatter(_dates([date]), [value], marker=markers[k % 4], s=42, zorder=3,
                   color=colours[k % 4], edgecolor=ACTUAL, lw=0.5,
                   label=_plain(label) if first else None)
        every.append(_dates([date])[0])
    cal = calendar(frequency)
    if chosen is not None:
        c = _dates([chosen])[0]
        ax.axvline(c, color=FORECAST, lw=1.2, ls="--", label=f"start kept {cal.label(c)}")
        every.append(c)
    _date_axis(ax, min(every), max(every), frequency)
    ax.set_xlabel(f"first period of the history used for fitting ({_period_word(frequency)})")
    ax.set_ylabel(_wrap(metric))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    _legend(fig, ncol=2)
    return fig


def history_chart(dates, scores, **kwargs) -> bytes:
    return _png(history_figure(dates, scores, **kwargs))


def horizon_figure(horizons, lines: dict, *, metric: str, highlight: str | None = None,
                   reference: str | None = None, title: str = ""):
    """Accuracy by forecast horizon for each candidate strategy; the reference (global trend)
    is drawn dashed in its own colour, the chosen one thicker in the forecast colour.
    At most six lines (the legend's limit)."""
    from matplotlib.ticker import MaxNLocator

    fig, (ax,) = _figure()
    fig.set_label("horizon")
    k = 0
    for label, values in list(lines.items())[:MAX_LEGEND]:
        if label == reference:
            ax.plot(horizons, values, color=GLOBAL, lw=1.8, ls="--", marker="s", ms=3,
                    label=_plain(label + " (reference)"))
            continue
        if label == highlight:
            ax.plot(horizons, values, color=FORECAST, lw=2.6, marker="o", ms=3.5,
                    label=_plain(label + " (chosen)"))
            continue
        ax.plot(horizons, values, color=CANDIDATE_COLOURS[k % len(CANDIDATE_COLOURS)],
                lw=1.2, ls=STYLES[(k + 1) % len(STYLES)], marker="o", ms=3, label=_plain(label))
        k += 1
    h = [int(x) for x in horizons]
    if len(h) <= 13:
        ax.set_xticks(h)
    else:
        ax.xaxis.set_major_locator(MaxNLocator(integer=True, nbins=12))
    ax.set_xlabel("forecast horizon (periods ahead)")
    ax.set_ylabel(_wrap(metric))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    _legend(fig, ncol=2)
    return fig


def horizon_chart(horizons, lines: dict, **kwargs) -> bytes:
    return _png(horizon_figure(horizons, lines, **kwargs))


def growth_figure(labels, values, lower, upper, *, quantity: str, title: str = ""):
    """Growth by regime as bars with 95% interval whiskers; the current regime in blue."""
    from .. import numformat

    fig, (ax,) = _figure(height=HEIGHT - 0.8)
    fig.set_label("growth")
    x = np.arange(len(labels))
    vals = np.array([np.nan if v is None else v for v in values], dtype=float)
    lo = np.array([np.nan if v is None else v for v in lower], dtype=float)
    hi = np.array([np.nan if v is None else v for v in upper], dtype=float)
    colours = [SHADE if i < len(labels) - 1 else REGIME for i in range(len(labels))]
    ax.bar(x, vals, color=colours, width=0.55, edgecolor=ACTUAL, lw=0.6)
    yerr = np.vstack([np.where(np.isfinite(lo), vals - lo, 0),
                      np.where(np.isfinite(hi), hi - vals, 0)])
    ax.errorbar(x, vals, yerr=yerr, fmt="none", ecolor=ACTUAL, capsize=6, lw=1.2,
                label="95% interval")
    ax.axhline(0.0, color="#555555", lw=0.8)
    for xi, v in zip(x, vals):
        if np.isfinite(v):
            ax.annotate(numformat.percent(v), (xi, v), textcoords="offset points",
                        xytext=(14, 3), fontsize=8)
    ax.set_xticks(x, [_plain(s) for s in labels], fontsize=8)
    ax.set_xlabel("regime (first period to last period)")
    ax.set_ylabel(_wrap(quantity))
    ax.set_title(_plain(title), loc="left", fontsize=11)
    _legend(fig)
    return fig


def growth_chart(labels, values, lower, upper, **kwargs) -> bytes:
    return _png(growth_figure(labels, values, lower, upper, **kwargs))
