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


def test_the_chosen_evaluation_names_the_verdicts_reference():
    """Under the automatic shape the demo's model comes from the exponential evaluation while
    the verdict measures everything against one linear trend over all history: the evaluation
    the report reads is rescored against that trend (same origins, so the same errors), and its
    gains and Diebold-Mariano p-values are the verdict's own. (The DM test itself is checked
    against published values in tests/test_evaluate.py.)"""
    a = analyze(load_series(demo_path()))
    v = a.verdict
    linear = a.evaluations["linear"]
    assert v.model.search_shape != "linear"  # the case this test is about
    ev = a.evaluation
    assert ev.reference == linear.reference == "global linear"
    np.testing.assert_array_equal(ev.errors.errors("global linear"),
                                  linear.errors.errors("global linear"))
    chosen = ev.candidate(v.model.name)
    assert abs(chosen.gain - v.evidence.gain) < 1e-12
    assert abs(chosen.vs_global["p_value_better"] - v.evidence.p_better) < 1e-12
    assert ev.candidate("global linear").gain == 0.0
