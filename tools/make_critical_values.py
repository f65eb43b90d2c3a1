"""Simulate the asymptotic null distribution of the sup-F break test and write it as a table.

Run:  /work/venv/bin/python tools/make_critical_values.py [--draws N] [--workers W] [--out PATH]

Why simulate every configuration: with a time trend among the regressors the limit of sup-F is
not Andrews' (1993) Brownian-bridge functional of the stationary case; it is a functional of
Brownian motion weighted by the trend functions, and the continuous ("slope") kind has a limit of
its own. So each configuration is simulated directly on a fine grid:

- trend models ``{terms}-{kind}``: Gaussian white noise e on T grid points, the null design
  Z = [1, t] (linear) or [1, t, t^2] (quadratic) with t = i / T, and for every admissible break
  position b the break columns D_b of the kind:
    level : 1{i >= b}                                    (q = 1)
    slope : (t - t_b)_+ [, (t - t_b)_+^2 for quadratic]  (q = 1 or 2; trend continuous at b)
    both  : 1{i >= b} * [1, t - t_b [, (t - t_b)^2]]      (q = 2 or 3; all trend terms change)
  The F statistic at b with the noise variance known (= 1, its limit) is
    F(b) = e' M_Z D_b (D_b' M_Z D_b)^-1 D_b' M_Z e / q,
  and D_b' M_Z e = D_b' (M_Z e) comes from suffix sums of (M_Z e) * t^j, so all positions of all
  draws in a chunk are computed at once with numpy.
- stationary models ``stationary-q{q}``: Andrews' functional
    sup_{lambda} |B(lambda) - lambda B(1)|^2 / (lambda (1 - lambda)) / q
  with B a q-dimensional Brownian motion, built from partial sums of white noise on the grid.

Seasonal dummy terms that stay common to all regimes do not change these limits (their span
contains the constant, which is already in Z), so the trend tables serve seasonal models too.

The statistic is on the F scale (the Wald statistic divided by q), like Bai and Perron's sup-F.
For each trimming tau on the grid the sup runs over b = h .. T - h with h = round(tau * T)
(both regimes at least h points). The empirical distribution is stored as quantiles on a fixed
probability grid. Draws are split into two halves to measure the simulation error: the largest
difference between the halves' 90/95/99% quantiles is stored next to each table.

Seeded: numpy SeedSequence(SEED) spawns one independent stream per model, so the result does not
depend on the number of worker processes.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import time
from concurrent.futures import ProcessPoolExecutor

import numpy as np

SEED = 20261202
GRID_POINTS = 1000
TRIMS = (0.01, 0.02, 0.03, 0.05, 0.075, 0.10, 0.15, 0.20, 0.25)
CHUNK = 2500
DEFAULT_DRAWS = 200_000

# Probability grid of the stored quantiles: coarse in the body, fine in the upper tail.
PROBABILITIES = tuple(np.round(np.concatenate([
    np.arange(0.01, 0.10, 0.02),      # 0.01 .. 0.09
    np.arange(0.10, 0.80, 0.05),      # 0.10 .. 0.75
    np.arange(0.80, 0.90, 0.01),      # 0.80 .. 0.89
    np.arange(0.90, 0.99, 0.005),     # 0.900 .. 0.985
    np.arange(0.99, 0.9995, 0.001),   # 0.990 .. 0.999
]), 4).tolist())

TREND_MODELS = {  # model -> (number of trend terms in the null design, kind)
    "linear-level": (2, "level"), "linear-slope": (2, "slope"), "linear-both": (2, "both"),
    "quadratic-level": (3, "level"), "quadratic-slope": (3, "slope"),
    "quadratic-both": (3, "both"),
}
STATIONARY_MODELS = {f"stationary-q{q}": q for q in range(1, 6)}


def changing_count(model: str) -> int:
    """Number of coefficients that change at the break (q) for a model name."""
    if model in STATIONARY_MODELS:
        return STATIONARY_MODELS[model]
    terms, kind = TREND_MODELS[model]
    return {"level": 1, "slope": terms - 1, "both": terms}[kind]


def _break_columns(t: np.ndarray, b: int, terms: int, kind: str) -> np.ndarray:
    after = (np.arange(t.size) >= b).astype(float)
    d = (t - t[b]) * after
    if kind == "level":
        return after[:, None]
    if kind == "slope":
        return np.column_stack([d ** p for p in range(1, terms)])
    return np.column_stack([after] + [d ** p for p in range(1, terms)])


def _trend_setup(terms: int, kind: str, h_min: int):
    """Deterministic parts: null projection and the inverse Gram matrix of M_Z D_b per position."""
    T = GRID_POINTS
    t = np.arange(T) / T
    Z = np.column_stack([t ** p for p in range(terms)])
    ztz_inv = np.linalg.inv(Z.T @ Z)
    positions = np.arange(h_min, T - h_min + 1)
    grams = []
    for b in positions:
        D = _break_columns(t, b, terms, kind)
        zd = Z.T @ D
        grams.append(D.T @ D - zd.T @ ztz_inv @ zd)
    gram_inv = np.linalg.inv(np.array(grams))
    return t, Z, ztz_inv, positions, gram_inv


def _trend_chunk(rng, n_draws, terms, kind, setup):
    """sup-F path F(b) for a chunk of draws: array (n_draws, len(positions))."""
    t, Z, ztz_inv, positions, gram_inv = setup
    T = GRID_POINTS
    y = rng.standard_normal((n_draws, T))
    e = y - (y @ Z) @ ztz_inv @ Z.T  # residuals M_Z y
    # Suffix sums S_j(b) = sum_{i >= b} e_i t_i^j for j = 0..terms-1.
    suffix = [np.cumsum((e * t ** j)[:, ::-1], axis=1)[:, ::-1][:, positions]
              for j in range(terms)]
    tb = t[positions]

    def centred(p):  # sum_{i >= b} e_i (t_i - t_b)^p by the binomial expansion
        from math import comb
        return sum(comb(p, j) * (-tb) ** (p - j) * suffix[j] for j in range(p + 1))

    if kind == "level":
        v = [suffix[0]]
    elif kind == "slope":
        v = [centred(p) for p in range(1, terms)]
    else:
        v = [suffix[0]] + [centred(p) for p in range(1, terms)]
    q = len(v)
    red = np.zeros_like(v[0])
    for i in range(q):
        red += gram_inv[:, i, i] * v[i] * v[i]
        for j in range(i + 1, q):
            red += 2.0 * gram_inv[:, i, j] * v[i] * v[j]
    return red / q, positions


def _stationary_chunk(rng, n_draws, q, h_min):
    T = GRID_POINTS
    positions = np.arange(h_min, T - h_min + 1)
    lam = positions / T
    total = np.zeros((n_draws, positions.size))
    for _ in range(q):
        s = np.cumsum(rng.standard_normal((n_draws, T)), axis=1)
        bridge = s[:, positions - 1] - lam * s[:, -1:]
        total += bridge ** 2
    return total / (T * lam * (1.0 - lam)) / q, positions


def simulate_model(args) -> dict:
    """All trims of one model: sup-F draws -> quantiles, plus the half-split stability."""
    model, draws, seed_seq = args
    rng = np.random.default_rng(seed_seq)
    h_values = [int(round(tau * GRID_POINTS)) for tau in TRIMS]
    h_min = min(h_values)
    sups = np.empty((len(TRIMS), draws))
    setup = None
    if model in TREND_MODELS:
        terms, kind = TREND_MODELS[model]
        setup = _trend_setup(terms, kind, h_min)
    start = time.time()
    done = 0
    while done < draws:
        m = min(CHUNK, draws - done)
        if setup is not None:
            path, positions = _trend_chunk(rng, m, terms, kind, setup)
        else:
            path, positions = _stationary_chunk(rng, m, STATIONARY_MODELS[model], h_min)
        for k, h in enumerate(h_values):
            keep = (positions >= h) & (positions <= GRID_POINTS - h)
            sups[k, done:done + m] = path[:, keep].max(axis=1)
        done += m
    probs = np.array(PROBABILITIES)
    half = draws // 2
    table, stability = {}, {}
    for k, tau in enumerate(TRIMS):
        key = f"{tau:g}"
        table[key] = np.round(np.quantile(sups[k], probs), 4).tolist()
        a = np.quantile(sups[k, :half], [0.90, 0.95, 0.99])
        b = np.quantile(sups[k, half:], [0.90, 0.95, 0.99])
        stability[key] = np.round(np.abs(a - b), 4).tolist()
    return {"model": model, "q": changing_count(model), "quantiles": table,
            "half_split_abs_diff_90_95_99": stability, "seconds": round(time.time() - start, 1)}


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--draws", type=int, default=DEFAULT_DRAWS)
    parser.add_argument("--workers", type=int, default=min(2, os.cpu_count() or 1))
    parser.add_argument("--out", default=os.path.join(os.path.dirname(__file__), "..",
                                                       "regimetrend", "breaks",
                                                       "critical_values.json"))
    parser.add_argument("--models", nargs="*", default=None, help="subset of models (testing)")
    opts = parser.parse_args(argv)
    models = opts.models or (list(TREND_MODELS) + list(STATIONARY_MODELS))
    all_models = list(TREND_MODELS) + list(STATIONARY_MODELS)
    seeds = dict(zip(all_models, np.random.SeedSequence(SEED).spawn(len(all_models))))
    jobs = [(m, opts.draws, seeds[m]) for m in models]
    start = time.time()
    if opts.workers > 1:
        with ProcessPoolExecutor(max_workers=opts.workers) as pool:
            results = list(pool.map(simulate_model, jobs))
    else:
        results = [simulate_model(j) for j in jobs]
    elapsed = time.time() - start
    out = {
        "meta": {
            "what": "asymptotic null distribution of sup-F (F scale: Wald / q), one break",
            "generator": "tools/make_critical_values.py",
            "seed": SEED, "draws": opts.draws, "grid_points": GRID_POINTS,
            "trims": list(TRIMS), "probabilities": list(PROBABILITIES),
            "trim_rule": "both regimes have at least round(trim * grid_points) points",
            "wall_seconds": round(elapsed, 1), "workers": opts.workers,
        },
        "models": {r["model"]: {k: v for k, v in r.items() if k != "model"} for r in results},
    }
    tmp = opts.out + ".tmp"
    with open(tmp, "w") as fh:
        json.dump(out, fh, separators=(",", ":"))
    os.replace(tmp, opts.out)
    for r in results:
        worst = max(max(v) for v in r["half_split_abs_diff_90_95_99"].values())
        sys.stdout.write(f"{r['model']:18s} q={r['q']}  {r['seconds']:7.1f}s  "
                         f"max half-split diff {worst:.4f}\n")
    sys.stdout.write(f"total {elapsed:.1f}s -> {os.path.abspath(opts.out)}\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
