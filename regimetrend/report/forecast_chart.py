"""Chart of a series with a fitted trend and its forecast band (for the ``forecast`` command).

Colours are the Okabe and Ito (2008) colour-blind-safe palette.
"""

from __future__ import annotations

import io

import numpy as np

OKABE_ITO = {"black": "#000000", "orange": "#E69F00", "sky": "#56B4E9", "green": "#009E73",
             "yellow": "#F0E442", "blue": "#0072B2", "vermillion": "#D55E00",
             "purple": "#CC79A7", "grey": "#999999"}


def forecast_png(series, fitted: np.ndarray, fitted_from: int, forecast, units: str = "") -> bytes:
    """PNG bytes: actuals, the in-sample fit, and the forecast with 80%/95% bands."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=(9, 4.5), dpi=110)
    ax.plot(series.starts, series.values, color=OKABE_ITO["black"], lw=1.2, label="actual")
    ax.plot(series.starts[fitted_from:], fitted, color=OKABE_ITO["blue"], lw=1.6,
            label=f"fitted: {forecast.model}")
    p = forecast.points
    ax.fill_between(forecast.starts, p.lower95, p.upper95, color=OKABE_ITO["sky"], alpha=0.25,
                    label="95% interval")
    ax.fill_between(forecast.starts, p.lower80, p.upper80, color=OKABE_ITO["sky"], alpha=0.45,
                    label="80% interval")
    ax.plot(forecast.starts, p.mean, color=OKABE_ITO["vermillion"], lw=1.8, label="forecast (mean)")
    ax.set_title(f"{series.name}: trend forecast", loc="left")
    ax.set_xlabel(f"period start ({series.frequency.name})")
    ax.set_ylabel(units or series.name)
    ax.grid(alpha=0.3)
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    fig.tight_layout()
    buf = io.BytesIO()
    fig.savefig(buf, format="png")
    plt.close(fig)
    return buf.getvalue()
