"""Monotone piecewise-cubic (PCHIP) fill of a torque curve: the cubic coefficients of each
interval (Fritsch and Carlson slopes, with the three-point end slopes scipy's
PchipInterpolator uses)."""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

__all__ = ["pchip_coefficients"]

FloatArray = NDArray[np.float64]


def _sign(v: float) -> int:
    return (v > 0.0) - (v < 0.0)


def _pchip_edge_slope(h0: float, h1: float, m0: float, m1: float) -> float:
    d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1)
    if _sign(d) != _sign(m0):
        return 0.0
    if _sign(m0) != _sign(m1) and abs(d) > 3.0 * abs(m0):
        return 3.0 * m0
    return d


def pchip_coefficients(x: FloatArray, y: FloatArray) -> FloatArray:
    """Piecewise-cubic coefficients of the monotone PCHIP fill through (x, y).

    The Fritsch-Carlson slopes with the one-sided three-point end condition, exactly as
    ``scipy.interpolate.PchipInterpolator`` computes them (a test holds the two to 1e-12),
    without its per-call overhead: a request builds one curve, and building it through
    scipy cost more than the whole shift search (``bench/shift_plan.py`` measures both).

    Parameters
    ----------
    x : ndarray, shape (n,)
        Strictly increasing abscissae, n >= 3.
    y : ndarray, shape (n,)
        Ordinates.

    Returns
    -------
    ndarray, shape (4, n - 1)
        Rows c0..c3 of ``((c0*dx + c1)*dx + c2)*dx + c3`` on each interval, dx = t - x[i].
    """
    h = np.diff(x)
    m = np.diff(y) / h
    d = np.zeros_like(y)
    w1 = 2.0 * h[1:] + h[:-1]
    w2 = h[1:] + 2.0 * h[:-1]
    flat = (np.sign(m[1:]) != np.sign(m[:-1])) | (m[1:] == 0.0) | (m[:-1] == 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        whmean = (w1 / m[:-1] + w2 / m[1:]) / (w1 + w2)
        d[1:-1] = np.where(flat, 0.0, 1.0 / whmean)
    (h0, h1), (hl, hp) = h[:2].tolist(), h[-1:-3:-1].tolist()
    (m0, m1), (ml, mp) = m[:2].tolist(), m[-1:-3:-1].tolist()
    d[0] = _pchip_edge_slope(h0, h1, m0, m1)
    d[-1] = _pchip_edge_slope(hl, hp, ml, mp)
    coef = np.empty((4, x.size - 1))
    coef[0] = (d[:-1] + d[1:] - 2.0 * m) / h**2
    coef[1] = (3.0 * m - 2.0 * d[:-1] - d[1:]) / h
    coef[2] = d[:-1]
    coef[3] = y[:-1]
    return coef
