"""The joint ``both`` model with seasonal dummies shared by the regimes, fitted lightly.

The break search of kind ``both`` asks for the joint model's SSR, its residuals and its
seasonal part at many break sets (the seasonal/trend back-and-forth, the sequential tests),
never for its coefficients' covariance. Building the whole regime design and its QR for each
set is most of the cost of a search on a short series. By Frisch-Waugh-Lovell the seasonal
coefficients, the residuals and the SSR of the regression on [regime trends, seasonal dummies]
are those of the regression of the response on the seasonal dummies after both were cleared of
the regime trends. The regime trends' columns are block diagonal (every coefficient free per
regime), so clearing them is a polynomial fit within each regime: with the discrete orthogonal
polynomials 1, tau, tau^2 - (L^2 - 1)/12 of each regime (tau = t - the regime's midpoint,
``costs.py`` uses the same), normalised, it is one product with a small matrix, and only the
regression on the s - 1 cleared seasonal columns is left to a QR (LAPACK called directly:
these regressions are small and many). Measured against the full fit on every break set of the
demo's origin searches: SSR equal to 8e-15 relative, seasonal part to 1.3e-14.

``joint_both`` gives None when that regression is anywhere near singular (regimes of one
season, whose trends form a seasonal sawtooth): the caller then fits the full design, which
decides and words the refusal as before.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.linalg.lapack import dgeqrf, dtrtrs

NEAR_SINGULAR = 1e-8  # smallest/largest diagonal of R (scaled columns) below which the full fit decides


@dataclass(frozen=True, eq=False)
class JointSummary:
    """What the searches read from a joint fit: SSR, residuals, the shared seasonal part."""

    ssr: float
    residuals: np.ndarray
    seasonal: np.ndarray


def regime_polynomials(bounds, degree: int) -> np.ndarray | None:
    """Orthonormal polynomial columns of every regime, as rows ((regimes x (degree + 1)) x n):
    regime r on positions bounds[r]..bounds[r+1]-1 gets 1, tau and tau^2 - (L^2 - 1)/12 over
    their norms, tau = t - its midpoint, zero elsewhere. None when a regime is too short to
    carry them (the full fit then decides)."""
    bounds = np.asarray(bounds, dtype=np.intp)
    n = int(bounds[-1])
    starts, lengths = bounds[:-1], np.diff(bounds)
    L = lengths.astype(float)
    norms = [L, L * (L * L - 1.0) / 12.0, L * (L * L - 1.0) * (L * L - 4.0) / 180.0][:degree + 1]
    if not all(np.all(v > 0) for v in norms):
        return None
    seg = np.repeat(np.arange(lengths.size), lengths)
    t = np.arange(n)
    tau = t - (starts + (L - 1.0) / 2.0)[seg]
    d1 = degree + 1
    P = np.zeros((lengths.size * d1, n))
    P[seg * d1, t] = 1.0 / np.sqrt(L)[seg]
    if degree >= 1:
        P[seg * d1 + 1, t] = tau / np.sqrt(norms[1])[seg]
    if degree >= 2:
        P[seg * d1 + 2, t] = (tau * tau - ((L * L - 1.0) / 12.0)[seg]) / np.sqrt(norms[2])[seg]
    return P


def joint_both(y: np.ndarray, seasonal: np.ndarray | None, positions, degree: int
               ) -> JointSummary | None:
    """SSR, residuals and seasonal part of the ``both`` model with breaks at ``positions`` and
    the shared ``seasonal`` columns (None: no seasonal terms, the regime trends alone); None
    when the cleared seasonal columns are near dependent."""
    n = len(y)
    bounds = [0, *sorted(int(p) for p in positions), n]
    P = regime_polynomials(bounds, degree)
    if P is None:
        return None
    if seasonal is None:
        y = np.asarray(y, dtype=float)
        resid = y - P.T @ (P @ y)
        resid.setflags(write=False)
        zero = np.zeros(n)
        zero.setflags(write=False)
        return JointSummary(float(resid @ resid), resid, zero)
    k = seasonal.shape[1]
    Z = np.column_stack([seasonal, y])
    cleared = Z - P.T @ (P @ Z)
    W, wy = cleared[:, :k], cleared[:, k]
    norms = np.sqrt(np.einsum("ij,ij->j", W, W))
    if not np.all(norms > 0):
        return None
    Ws = W / norms
    # One Householder QR of [Ws, wy]: R and Q'wy at once, Q never formed (LAPACK directly,
    # these regressions are small and many).
    qr, _, _, info = dgeqrf(np.asfortranarray(np.column_stack([Ws, wy])))
    diag = np.abs(np.diagonal(qr)[:k])
    if info != 0 or diag.min() <= diag.max() * NEAR_SINGULAR:
        return None
    R = qr[:k, :k]  # upper triangle read only
    g = dtrtrs(R, qr[:k, k])[0]
    resid = wy - Ws @ g
    # one step of refinement by the corrected semi-normal equations R'R dg = Ws' resid
    g = g + dtrtrs(R, dtrtrs(R, Ws.T @ resid, trans=1)[0])[0]
    gamma = g / norms
    resid = wy - W @ gamma
    resid.setflags(write=False)
    part = seasonal @ gamma
    part.setflags(write=False)
    return JointSummary(float(resid @ resid), resid, part)
