"""Accuracy metrics against scikit-learn and the published interval-score formula."""

import numpy as np
import pytest
from sklearn.metrics import (mean_absolute_error, mean_absolute_percentage_error,
                             mean_squared_error)

from regimetrend.metrics import accuracy, interval_score, naive_scale


def test_point_metrics_match_scikit_learn():
    # Reference library: scikit-learn metrics on the same pairs.
    rng = np.random.default_rng(7)
    actual = rng.uniform(50, 150, 40)
    forecast = actual + rng.normal(3, 10, 40)
    m = accuracy(actual, forecast, scale=4.0)
    assert m["mae"] == pytest.approx(mean_absolute_error(actual, forecast), rel=1e-12)
    assert m["rmse"] == pytest.approx(np.sqrt(mean_squared_error(actual, forecast)), rel=1e-12)
    assert m["mape"] == pytest.approx(100 * mean_absolute_percentage_error(actual, forecast),
                                      rel=1e-12)
    assert m["me"] == pytest.approx(np.mean(actual - forecast))
    assert m["mase"] == pytest.approx(m["mae"] / 4.0)


def test_mape_is_undefined_not_infinite_when_an_actual_is_zero():
    m = accuracy([0.0, 2.0], [1.0, 2.0])
    assert m["mape"] is None and "zero" in m["mape_note"]


def test_seasonal_naive_scale():
    # Hyndman and Koehler (2006): mean |y_t - y_{t-m}| over the history.
    h = np.array([1.0, 2, 3, 4, 2, 3, 4, 5])
    assert naive_scale(h, 4) == pytest.approx(1.0)
    assert naive_scale(h, 1) == pytest.approx(np.mean(np.abs(np.diff(h))))


def test_interval_score_follows_gneiting_raftery():
    # Gneiting and Raftery (2007), eq. 43: (u - l) + 2/a (l - y) 1{y<l} + 2/a (y - u) 1{y>u}.
    s = interval_score([5.0, 0.0, 12.0], [1.0, 1.0, 1.0], [10.0, 10.0, 10.0], 0.80)
    np.testing.assert_allclose(s, [9.0, 9.0 + 10.0, 9.0 + 20.0])
    m = accuracy([5.0, 0.5], [5.0, 5.0], lower80=[1, 1], upper80=[10, 10],
                 lower95=[0, 0], upper95=[11, 11])
    assert m["coverage80"] == 0.5 and m["coverage95"] == 1.0
