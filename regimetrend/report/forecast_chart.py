"""Chart of a series with a fitted trend and its forecast band (for the ``forecast`` command).

It keeps the report charts' rules (``charts``): Okabe-Ito colours with one meaning each, the
legend below the plot area, the series' own calendar labels, units on the axes. When a holdout
was scored, a dotted line marks where it begins and the holdout forecast (fitted only on the
periods before it) is drawn over the held-out actual values.
"""

from __future__ import annotations

import numpy as np

from . import charts
from .charts import OKABE_ITO  # the palette, for callers

__all__ = ["OKABE_ITO", "forecast_figure", "forecast_png"]


def forecast_figure(series, fitted: np.ndarray, fitted_from: int, forecast, units: str = "",
                    holdout=None, log_scale: bool = False):
    """Actuals, the in-sample fit, the forecast with 80%/95% bands, and the holdout."""
    fig, (ax,) = charts._figure(height=charts.HEIGHT + 0.3)
    fig.set_label("forecast")
    d = series.starts
    ax.plot(d, series.values, color=charts.ACTUAL, lw=1.2, label="actual",
            marker="o" if series.n <= 40 else None, ms=2.5)
    ax.plot(d[fitted_from:], fitted, color=charts.REGIME, lw=1.6,
            label=charts._plain(f"fitted on all history: {forecast.model}"))
    p = forecast.points
    b95 = ax.fill_between(forecast.starts, p.lower95, p.upper95, color=charts.FORECAST,
                          alpha=0.13, lw=0)
    b80 = ax.fill_between(forecast.starts, p.lower80, p.upper80, color=charts.FORECAST,
                          alpha=0.27, lw=0)
    (line,) = ax.plot(forecast.starts, p.mean, color=charts.FORECAST, lw=2.0,
                      marker="o" if forecast.horizon == 1 else None, ms=3)
    h, lab = ax.get_legend_handles_labels()
    handles = dict(zip(lab, h))
    handles["forecast (mean), 80% and 95% intervals"] = (b95, b80, line)
    if holdout is not None and holdout.k:
        start = d[series.n - holdout.k]
        vline = ax.axvline(start, color=OKABE_ITO["green"], lw=1.3, ls=":")
        hp = holdout.forecast.points
        (hl,) = ax.plot(holdout.forecast.starts, hp.mean, color=OKABE_ITO["green"], lw=1.6,
                        ls="--")
        handles[f"holdout from {series.label(series.n - holdout.k)}: forecast fitted "
                f"before it"] = (vline, hl)
    if log_scale:
        charts._log_axis(ax)
    charts._date_axis(ax, d[0], forecast.starts[-1] if forecast.horizon else d[-1],
                      series.frequency)
    ax.set_title(charts._plain(f"{series.name}: trend forecast"), loc="left", fontsize=11)
    ax.set_xlabel(f"period start ({series.frequency.name})")
    ax.set_ylabel(charts._wrap((units or series.name) + (" (log scale)" if log_scale else "")))
    charts._legend(fig, list(handles.values()), list(handles), ncol=2)
    return fig


def forecast_png(series, fitted: np.ndarray, fitted_from: int, forecast, units: str = "",
                 holdout=None, log_scale: bool = False) -> bytes:
    """PNG bytes of ``forecast_figure``."""
    return charts._png(forecast_figure(series, fitted, fitted_from, forecast, units, holdout,
                                       log_scale))
