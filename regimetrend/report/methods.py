"""The report's short methods section: what each test and strategy does, with its source."""

from __future__ import annotations

from ..strategy_table import strategy_kinds

_SECTIONS = (
    ("Trend and growth",
     "Each trend is fitted by least squares: linear (y = a + b t), exponential (ln y = a + b t, "
     "growth per period e^b - 1, compounded to a year as (1 + g)^p - 1) or quadratic. Seasonal "
     "terms, when used, are shared by all regimes. Standard errors allow for autocorrelated "
     "residuals: a heteroskedasticity and autocorrelation consistent covariance with AR(1) "
     "prewhitening and a data-driven Bartlett bandwidth, with t quantiles. Intervals of growth "
     "figures use the delta method and a Wald test with the same covariance asks whether "
     "growth differs across a break. In simulations with regimes of 40 to 120 points and "
     "AR(1) errors up to 0.6 the 95% intervals covered 89-95% of the time; shorter or more "
     "persistent regimes give intervals that are too narrow.",
     "Newey, W. K. and West, K. D. (1987), Econometrica 55(3), 703-708; Andrews, D. W. K. "
     "(1991), Econometrica 59(3), 817-858; Andrews, D. W. K. and Monahan, J. C. (1992), "
     "Econometrica 60(4), 953-966."),
    ("Break search",
     "Breaks are the first periods of new regimes. The best break dates for each number of "
     "breaks come from an exact search over all segmentations (dynamic programming on segment "
     "costs); very long series are searched by PELT instead. The number of breaks is chosen "
     "by an information criterion or sequential tests, the sup-F test asks whether there is "
     "any break at all, and each break date gets a 95% interval. The tests assume that the "
     "deviations from the trend return to it (stationary errors, autocorrelation allowed): "
     "each F statistic is scaled by a long-run variance estimated without the break tested, "
     "and whether there is any break is judged against series simulated on the same design, "
     "with level, slope and combined breaks tried together, so the chance of a false break is "
     "about 5% in all (measured 3-8% for 60-240 points and autocorrelation up to 0.6). When "
     "the deviations wander like a random walk (a KPSS test with a persistent residual "
     "autocorrelation) the report says so and treats breaks as descriptive. Break-date "
     "intervals are widened to cover the dates of another kind of break that fits almost as "
     "well; small jumps in short series are dated less surely than the intervals suggest.",
     "Bai, J. and Perron, P. (1998), Econometrica 66(1), 47-78; Bai and Perron (2003), Journal "
     "of Applied Econometrics 18(1), 1-22; Andrews, D. W. K. (1993), Econometrica 61(4), "
     "821-856; Killick, R., Fearnhead, P. and Eckley, I. A. (2012), Journal of the American "
     "Statistical Association 107(500), 1590-1598; Dufour, J.-M. (2006), Journal of "
     "Econometrics 133(2), 443-477; Westfall, P. H. and Young, S. S. (1993), Resampling-Based "
     "Multiple Testing, Wiley; Kwiatkowski, D., Phillips, P. C. B., Schmidt, P. and Shin, Y. "
     "(1992), Journal of Econometrics 54(1-3), 159-178."),
    ("Known dates and drift",
     "A break at a known date is tested with the Chow test. Break dates the analyst gives "
     "are used instead of the search: the regimes are fitted at those dates, each break is "
     "tested by its F statistic given the others on the F law (the dates were not searched "
     "for, so there is no sup-F test and no date interval), and at each rolling origin the "
     "given dates inside the history known then are used, which leaks nothing from the "
     "future because the dates were fixed in advance. CUSUM paths (of recursive "
     "residuals, and of ordinary residuals) show when one global trend starts to drift; a path "
     "leaving its 5% band signals instability.",
     "Chow, G. C. (1960), Econometrica 28(3), 591-605; Brown, R. L., Durbin, J. and Evans, "
     "J. M. (1975), Journal of the Royal Statistical Society B 37(2), 149-192; Ploberger, W. "
     "and Kramer, W. (1992), Econometrica 60(2), 271-285."),
    ("Strategies",
     "{strategies}",
     "Pesaran, M. H. and Pick, A. (2011), Journal of Business & Economic Statistics 29(2), "
     "307-318."),
    ("Evaluation",
     "Each candidate is fitted on the history up to an origin, forecasts the next periods, and "
     "the origin moves forward (rolling origin); breaks are searched again at each origin from "
     "that history only. Errors are in original units; MASE scales them by the seasonal naive "
     "forecast, the interval score rewards narrow intervals that cover. The Diebold-Mariano "
     "test, with the small-sample correction, asks whether a candidate beats the global trend.",
     "Tashman, L. J. (2000), International Journal of Forecasting 16(4), 437-450; Diebold, "
     "F. X. and Mariano, R. S. (1995), Journal of Business & Economic Statistics 13(3), 253-263; "
     "Harvey, D., Leybourne, S. and Newbold, P. (1997), International Journal of Forecasting "
     "13(2), 281-291; Hyndman, R. J. and Koehler, A. B. (2006), International Journal of "
     "Forecasting 22(4), 679-688; Gneiting, T. and Raftery, A. E. (2007), Journal of the "
     "American Statistical Association 102(477), 359-378."),
    ("Charts",
     "Colours come from a palette that stays distinct for the common forms of colour-blindness, "
     "and lines also differ in style.",
     "Okabe, M. and Ito, K. (2008), Color Universal Design (CUD): how to make figures and "
     "presentations that are friendly to colorblind people."),
)


def methods() -> tuple[tuple[str, str, str], ...]:
    """(heading, text, sources) of each section; the strategies are read from the strategy
    table, so a registered strategy is described with the others."""
    words = " ".join(f"{k.name}: {k.summary}" for k in strategy_kinds())
    return tuple((h, text.replace("{strategies}", words), src) for h, text, src in _SECTIONS)
