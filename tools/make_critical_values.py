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

Seeded: numpy SeedSequence(SEED) spawns one stream per model family and from it one per block of
draws, so the result does not depend on the number of worker processes. The models of a family
(linear: level/slope/both; quadratic: the same; stationary: q = 1..5) share their draws, which
cuts the time by about three; each model's own distribution is unaffected.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import time
from concurrent.futures import ProcessPoolExecutor
from functools import cache

import numpy as np

SEED = 20261202
GRID_POINTS = 1000
TRIMS = (0.01, 0.02, 0.03, 0.05, 0.075, 0.10, 0.15, 0.20, 0.25)
CHUNK = 2500
DEFAULT_DRAWS = 2_000_000

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


def _break_columns(t: np.ndarray, b: int, terms: int, kind: str,
                   before: bool = False) -> np.ndarray:
    """Break columns D_b of a kind; with ``before`` the same polynomials on the periods < b."""
    after = (np.arange(t.size) >= b).astype(float)
    if before:
        after = 1.0 - after
    d = (t - t[b]) * after
    if kind == "level":
        return after[:, None]
    if kind == "slope":
        return np.column_stack([d ** p for p in range(1, terms)])
    return np.column_stack([after] + [d ** p for p in range(1, terms)])


FAMILIES = {  # one simulation pass serves every model of a family (shared draws)
    "linear": [m for m, (terms, _) in TREND_MODELS.items() if terms == 2],
    "quadratic": [m for m, (terms, _) in TREND_MODELS.items() if terms == 3],
    "stationary": list(STATIONARY_MODELS),
}
BLOCKS = 8  # draws of a family are simulated in independently seeded blocks


@cache
def _trend_setup(terms: int, kind: str, h_min: int):
    """Deterministic parts for one kind: inverse Gram matrices of M_Z D_b per position.

    D_b = P_b - E_b with P_b = (t - t_b)^p on all periods (a polynomial inside the span of Z)
    and E_b its part before b, so M_Z D_b = -M_Z E_b. Early positions use E_b (short support),
    late ones D_b itself, and the projection is by QR: no cancellation at either edge.
    """
    T = GRID_POINTS
    t = np.arange(T) / T
    Z = np.column_stack([t ** p for p in range(terms)])
    Q, _ = np.linalg.qr(Z)
    positions = np.arange(h_min, T - h_min + 1)
    grams = []
    for b in positions:
        D = _break_columns(t, b, terms, kind)
        if b < T // 2:
            D = _break_columns(t, b, terms, kind, before=True)
        D = D - Q @ (Q.T @ D)
        D = D - Q @ (Q.T @ D)  # second pass: re-orthogonalisation
        grams.append(D.T @ D)
    return np.linalg.inv(np.array(grams))


def _trend_chunk(rng, n_draws, terms, gram_invs, h_min):
    """F(b) paths of every kind for one chunk of draws: {kind: (n_draws, positions)}."""
    from math import comb
    T = GRID_POINTS
    t = np.arange(T) / T
    Z = np.column_stack([t ** p for p in range(terms)])
    ztz_inv = np.linalg.inv(Z.T @ Z)
    positions = np.arange(h_min, T - h_min + 1)
    y = rng.standard_normal((n_draws, T))
    e = y - (y @ Z) @ ztz_inv @ Z.T  # residuals M_Z y
    # S_j(b) = sum_{i >= b} e_i t_i^j for late positions (suffix sums); for early ones the
    # prefix sums sum_{i < b} e_i t_i^j, equal to -S_j(b) because e is orthogonal to Z. The
    # common sign flip leaves the quadratic form unchanged and avoids cancellation.
    early = positions < T // 2
    weighted = [e * t ** j for j in range(terms)]
    suffix = []
    for w in weighted:
        late_sums = np.cumsum(w[:, ::-1], axis=1)[:, ::-1][:, positions]
        early_sums = np.concatenate([np.zeros((w.shape[0], 1)), np.cumsum(w, axis=1)],
                                    axis=1)[:, positions]
        suffix.append(np.where(early, early_sums, late_sums))
    tb = t[positions]
    # sum over the same side of e_i (t_i - t_b)^p by the binomial expansion
    centred = {p: sum(comb(p, j) * (-tb) ** (p - j) * suffix[j] for j in range(p + 1))
               for p in range(1, terms)}
    columns = {"level": [suffix[0]],
               "slope": [centred[p] for p in range(1, terms)],
               "both": [suffix[0]] + [centred[p] for p in range(1, terms)]}
    paths = {}
    for kind, v in columns.items():
        g = gram_invs[kind]
        q = len(v)
        red = np.zeros_like(v[0])
        for i in range(q):
            red += g[:, i, i] * v[i] * v[i]
            for j in range(i + 1, q):
                red += 2.0 * g[:, i, j] * v[i] * v[j]
        paths[kind] = red / q
    return paths, positions


def _stationary_chunk(rng, n_draws, h_min):
    """Andrews' bridge functional for q = 1..5 from the same five components."""
    T = GRID_POINTS
    positions = np.arange(h_min, T - h_min + 1)
    lam = positions / T
    total = np.zeros((n_draws, positions.size))
    paths = {}
    for q in range(1, max(STATIONARY_MODELS.values()) + 1):
        s = np.cumsum(rng.standard_normal((n_draws, T)), axis=1)
        total += (s[:, positions - 1] - lam * s[:, -1:]) ** 2
        paths[f"stationary-q{q}"] = total / (T * lam * (1.0 - lam)) / q
    return paths, positions


def _nested_maxima(path: np.ndarray, h_values, h_min: int) -> np.ndarray:
    """sup over b = h .. T - h for every h, widening from the largest h (views, no copies)."""
    T = GRID_POINTS
    out = np.empty((len(h_values), path.shape[0]), dtype=np.float32)
    order = sorted(range(len(h_values)), key=lambda k: -h_values[k])
    current, lo, hi = None, None, None
    for k in order:
        new_lo, new_hi = h_values[k] - h_min, T - h_values[k] - h_min + 1
        if current is None:
            current = path[:, new_lo:new_hi].max(axis=1)
        else:
            if new_lo < lo:
                current = np.maximum(current, path[:, new_lo:lo].max(axis=1))
            if new_hi > hi:
                current = np.maximum(current, path[:, hi:new_hi].max(axis=1))
        lo, hi = new_lo, new_hi
        out[k] = current
    return out


def simulate_block(args) -> dict:
    """sup-F draws of every model of a family, every trim: {model: (len(TRIMS), draws)}."""
    family, draws, seed_seq = args
    rng = np.random.default_rng(seed_seq)
    h_values = [int(round(tau * GRID_POINTS)) for tau in TRIMS]
    h_min = min(h_values)
    models = FAMILIES[family]
    sups = {m: np.empty((len(TRIMS), draws), dtype=np.float32) for m in models}
    if family != "stationary":
        terms = 2 if family == "linear" else 3
        gram_invs = {TREND_MODELS[m][1]: _trend_setup(terms, TREND_MODELS[m][1], h_min)
                     for m in models}
    done = 0
    while done < draws:
        m = min(CHUNK, draws - done)
        if family == "stationary":
            paths, positions = _stationary_chunk(rng, m, h_min)
        else:
            by_kind, positions = _trend_chunk(rng, m, terms, gram_invs, h_min)
            paths = {f"{family}-{kind}": path for kind, path in by_kind.items()}
        for model, path in paths.items():
            sups[model][:, done:done + m] = _nested_maxima(path, h_values, h_min)
        done += m
    return sups


def summarise(model: str, sups: np.ndarray) -> dict:
    """Quantile table per trim, and the gap between the two halves' 90/95/99% quantiles."""
    probs = np.array(PROBABILITIES)
    half = sups.shape[1] // 2
    table, stability = {}, {}
    for k, tau in enumerate(TRIMS):
        key = f"{tau:g}"
        draws = sups[k].astype(np.float64)
        table[key] = np.round(np.quantile(draws, probs), 4).tolist()
        a = np.quantile(draws[:half], [0.90, 0.95, 0.99])
        b = np.quantile(draws[half:], [0.90, 0.95, 0.99])
        stability[key] = np.round(np.abs(a - b), 4).tolist()
    return {"q": changing_count(model), "quantiles": table,
            "half_split_abs_diff_90_95_99": stability}


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--draws", type=int, default=DEFAULT_DRAWS)
    parser.add_argument("--workers", type=int, default=min(2, os.cpu_count() or 1))
    parser.add_argument("--out", default=os.path.join(os.path.dirname(__file__), "..",
                                                       "regimetrend", "breaks",
                                                       "critical_values.json"))
    parser.add_argument("--families", nargs="*", default=None, choices=list(FAMILIES),
                        help="subset of model families (for quick checks)")
    opts = parser.parse_args(argv)
    families = opts.families or list(FAMILIES)
    per_block = -(-opts.draws // BLOCKS)
    draws = per_block * BLOCKS
    root = np.random.SeedSequence(SEED)
    seeds = dict(zip(FAMILIES, root.spawn(len(FAMILIES))))
    jobs = [(f, per_block, seq) for f in families for seq in seeds[f].spawn(BLOCKS)]
    start = time.time()
    if opts.workers > 1:
        with ProcessPoolExecutor(max_workers=opts.workers) as pool:
            blocks = list(pool.map(simulate_block, jobs))
    else:
        blocks = [simulate_block(j) for j in jobs]
    models = {}
    for f in families:
        parts = [b for b, job in zip(blocks, jobs) if job[0] == f]
        for m in FAMILIES[f]:
            models[m] = summarise(m, np.concatenate([p[m] for p in parts], axis=1))
    elapsed = time.time() - start
    out = {
        "meta": {
            "what": "asymptotic null distribution of sup-F (F scale: Wald / q), one break",
            "generator": "tools/make_critical_values.py",
            "seed": SEED, "draws": draws, "blocks": BLOCKS, "grid_points": GRID_POINTS,
            "trims": list(TRIMS), "probabilities": list(PROBABILITIES),
            "trim_rule": "both regimes have at least round(trim * grid_points) points",
            "shared_draws": "models of one family (linear, quadratic, stationary) share draws",
            "wall_seconds": round(elapsed, 1), "workers": opts.workers,
        },
        "models": models,
    }
    tmp = opts.out + ".tmp"
    with open(tmp, "w") as fh:
        json.dump(out, fh, separators=(",", ":"))
    os.replace(tmp, opts.out)
    for name, entry in models.items():
        gaps = np.array(list(entry["half_split_abs_diff_90_95_99"].values()))
        worst = gaps.max(axis=0)
        sys.stdout.write(f"{name:18s} q={entry['q']}  largest half-split gap over trims "
                         f"90% {worst[0]:.4f}  95% {worst[1]:.4f}  99% {worst[2]:.4f}\n")
    sys.stdout.write(f"{draws} draws per model, total {elapsed:.1f}s with {opts.workers} "
                     f"worker(s) -> {os.path.abspath(opts.out)}\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
