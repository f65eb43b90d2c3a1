"""The factor memo returns what a fresh factorisation gives, and stays within its bounds."""

from __future__ import annotations

import numpy as np

from regimetrend import ols
from regimetrend.factor_memo import FACTORS, FactorMemo


def test_fits_sharing_a_design_match_fresh_fits_and_numpy_lstsq():
    rng = np.random.default_rng(7)
    X = np.column_stack([np.ones(60), np.arange(60.0), rng.normal(size=(60, 3))])
    ys = [rng.normal(size=60) for _ in range(3)]
    FACTORS.clear()
    kept = [ols.fit(X, y) for y in ys]  # the first factorises, the others reuse
    saved = FACTORS.max_cells
    FACTORS.max_cells = -1  # every design factorised afresh
    try:
        fresh = [ols.fit(X, y) for y in ys]
    finally:
        FACTORS.max_cells = saved
    for a, b, y in zip(kept, fresh, ys):
        assert np.array_equal(a.beta, b.beta) and np.array_equal(a.xtx_inv, b.xtx_inv)
        # reference: numpy's own least squares (SVD based)
        np.testing.assert_allclose(a.beta, np.linalg.lstsq(X, y, rcond=None)[0], rtol=1e-10,
                                   atol=1e-12)


def test_memo_keys_by_exact_design_and_drops_the_least_recent():
    memo = FactorMemo(max_entries=2)
    calls = []

    def compute(X):
        calls.append(X.copy())
        return X.sum(axis=0)

    a, b, c = np.eye(3), 2 * np.eye(3), np.asfortranarray(np.arange(9.0).reshape(3, 3))
    memo.get("x", a, compute)
    memo.get("x", a.copy(), compute)  # same bytes: no new computation
    assert len(calls) == 1
    memo.get("x", b, compute)
    memo.get("x", c, compute)  # a is the least recently used: dropped
    memo.get("x", a, compute)
    assert len(calls) == 4
    kept = memo.get("x", a, compute)
    assert not kept.flags.writeable
