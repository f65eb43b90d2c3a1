"""analyze(): the whole flow is a pure function whose result pickles and serialises."""

import json
import pickle

import numpy as np

from regimetrend import Settings, analyze, load_series
from regimetrend import demo_path


def test_analyze_is_pure_and_pickles():
    series = load_series(demo_path())
    settings = Settings(shape="exponential", horizon=6, step=3, max_breaks=2)
    a = analyze(series, settings)
    b = analyze(series, settings)
    assert json.dumps(a.to_dict(), sort_keys=True) == json.dumps(b.to_dict(), sort_keys=True)
    c = pickle.loads(pickle.dumps(a))
    np.testing.assert_array_equal(c.forecast.mean, a.forecast.mean)
    assert series.values.flags.writeable is False


def test_analysis_joins_the_stages():
    series = load_series(demo_path())
    a = analyze(series, shape="exponential", horizon=6, step=3)
    d = a.to_dict()
    assert {"series", "breaks", "evaluation", "growth", "forecast", "global_forecast",
            "cusum", "cautions"} <= set(d)
    assert len(d["forecast"]["rows"]) == 6
    assert d["evaluation"]["recommended"]["strategy"]
    assert any("business judgement" in c for c in a.cautions)
    assert any("assumes" in c for c in a.cautions)
    # the recommended forecast comes from the regime that holds now: the demo's last regime
    # grows faster than the global trend, so its forecast is above the global one
    assert a.forecast.mean[-1] > a.global_forecast.mean[-1]
