"""Where the next gear overtakes: bracketed root finding, and the wheel-force crossings
found on the torque curve's own cubic pieces.

Between a gear with force factor ``k1`` (overall ratio * efficiency / rolling radius) and
the next one, ``k2``, at speed ratio ``q`` (next ratio / current ratio), the force gap at
current-gear engine speed n is

    D(n) = k1 * T(n) - k2 * T(q * n)

The curve is a cubic between its sampled speeds, so D is one cubic wherever neither n nor
q * n passes a sampled speed. Each scan cell where D falls through zero is cut at those
speeds, the part where D changes sign is kept, and the crossing is found on that part's
cubic (nested evaluation, the arithmetic of ``TorqueCurve.torque_scalar``) by the
bracketed root finding below, to ``XTOL``: the same crossing as on the curve itself, each
step a few multiplications instead of a search of the curve.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np
from numpy.typing import NDArray

from core.engine.curves import TorqueCurve

__all__ = ["bracketed_crossing", "force_crossings"]

FloatArray = NDArray[np.float64]

XTOL = 1e-7  # [rpm] width of the bracket a refined crossing is found in
REFINE_STEPS = 100  # bound on the steps of one refinement (a handful are used)


def bracketed_crossing(
    f: Callable[[float], float], a: float, b: float, fa: float, fb: float
) -> float:
    """The crossing of ``f`` in ``[a, b]`` [rpm], where ``fa = f(a) > 0 >= f(b) = fb``.

    Bracketed root finding to ``XTOL``, as ``scipy.optimize.brentq(f, a, b, xtol=XTOL)``
    but without its per-call wrapping: each step takes the Illinois (modified regula falsi)
    point and, when the crossing is not on its near side, a second point ``XTOL / 2``
    beyond it, so once the estimate is within half the tolerance the bracket closes on the
    crossing. The bracket always holds the sign change.

    Examples
    --------
    >>> round(bracketed_crossing(lambda n: 4800.0 - n, 4000.0, 5000.0, 800.0, -200.0), 9)
    4800.0
    """
    half = 0.5 * XTOL
    kept = 0  # the end the last step kept: -1 a, +1 b
    for _ in range(REFINE_STEPS):
        w = b - a
        if w <= XTOL:
            break
        s = min(max(a + fa / (fa - fb) * w, a + 0.5 * half), b - 0.5 * half)
        ds = f(s)
        if ds == 0.0:
            return s
        left = ds < 0.0  # the crossing is in [a, s]
        if left == (s - a < b - s):  # on the short side of s: keep that part
            s2, d2 = s, ds
        else:  # on the long side: try just beyond s, to close the bracket
            s2 = s - half if left else s + half
            d2 = f(s2)
            if d2 == 0.0:
                return s2
            if (d2 < 0.0) != left:  # between s and s2
                a, b, fa, fb = (s2, s, d2, ds) if left else (s, s2, ds, d2)
                break
        if left:  # replace b; a kept (Illinois: halve it when kept twice)
            b, fb = s2, d2
            fa, kept = (0.5 * fa if kept == -1 else fa), -1
        else:
            a, fa = s2, d2
            fb, kept = (0.5 * fb if kept == 1 else fb), 1
    return min(max(a + fa / (fa - fb) * (b - a), a), b)


Cubic = tuple[float, float, float, float, float]
"""One interval of the curve: its start [rpm] and coefficients c0..c3."""


def _cubics(curve: TorqueCurve, i: int, k: int) -> tuple[Cubic, Cubic, float] | None:
    """The curve's pieces ``i`` to ``k`` when at most two: the one below the cut, the one
    from it on, and the cut [rpm] (infinite for one piece); None for more."""
    if k > i + 1:
        return None
    xs, coef = curve.pieces
    return (xs[i], *coef[i]), (xs[k], *coef[k]), (xs[k] if k > i else math.inf)


def _cell_crossing(
    curve: TorqueCurve,
    k1: float,
    k2: float,
    q: float,
    cell: tuple[float, float, float, float],
    pieces: tuple[int, int, int, int],
) -> float:
    """The crossing of one scan cell ``(a, b, D(a), D(b))``, ``D(a) > 0 >= D(b)`` [rpm];
    ``pieces`` are the curve intervals holding a, b, q * a and q * b.

    D is evaluated on the one or two cubic pieces n and q * n pass in the cell, choosing
    the piece as ``TorqueCurve.torque_scalar`` does, so the root finding takes the same
    steps as on the curve (and finds the same crossing where a cell holds several); on the
    curve itself where a cell spans more pieces.
    """
    a, b, fa, fb = cell
    cur, nxt = _cubics(curve, pieces[0], pieces[1]), _cubics(curve, pieces[2], pieces[3])
    if cur is None or nxt is None:
        torque = curve.torque_scalar
        return bracketed_crossing(lambda n: k1 * torque(n) - k2 * torque(n * q), a, b, fa, fb)
    c_lo, c_hi, c_cut = cur
    e_lo, e_hi, e_cut = nxt

    def gap(n: float) -> float:
        x0, c0, c1, c2, c3 = c_lo if n < c_cut else c_hi
        y = n * q
        y0, e0, e1, e2, e3 = e_lo if y < e_cut else e_hi
        dx, dy = n - x0, y - y0
        return k1 * (((c0 * dx + c1) * dx + c2) * dx + c3) - k2 * (
            ((e0 * dy + e1) * dy + e2) * dy + e3
        )

    return bracketed_crossing(gap, a, b, fa, fb)


def force_crossings(
    curve: TorqueCurve,
    k_cur: Sequence[float],
    k_next: Sequence[float],
    step: Sequence[float],
    rows: NDArray[np.intp],
    a: FloatArray,
    b: FloatArray,
    fa: FloatArray,
    fb: FloatArray,
) -> FloatArray:
    """The wheel-force crossing in each of several scan cells [rpm].

    Parameters
    ----------
    curve : TorqueCurve
        The torque curve.
    k_cur, k_next : sequence of float, length p
        Per gear change, wheel force per unit engine torque in the current and in the next
        gear [1/m].
    step : sequence of float, length p
        Per gear change, next overall ratio / current overall ratio.
    rows : ndarray of int, shape (c,)
        The gear change of each cell.
    a, b : ndarray, shape (c,)
        Each cell's ends in current-gear engine speed [rpm].
    fa, fb : ndarray, shape (c,)
        The force gap (current minus next) at the ends [N], ``fa > 0 >= fb``.

    Returns
    -------
    ndarray, shape (c,)
        Each cell's crossing [rpm], found to ``XTOL``.

    Examples
    --------
    Torque falling linearly, T = 400 - 0.05 n, force factors 3 and 2 (ratios 3 and 2): the
    forces cross at (T0/c) * G1 / (G1 + G2) = 4800 rpm.

    >>> from core.engine.curves import Interpolation, torque_curve_from_torque
    >>> c = torque_curve_from_torque([1000, 4000, 7000], [350, 200, 50],
    ...                              interpolation=Interpolation.LINEAR)
    >>> ends = np.array([4790.0]), np.array([4810.0]), np.array([0.83]), np.array([-0.83])
    >>> n = force_crossings(c, [3.0], [2.0], [2 / 3], np.array([0]), *ends)
    >>> round(float(n[0]), 6)
    4800.0
    """
    q = np.asarray(step, dtype=np.float64)[rows]
    x = curve.rpm
    # the interval of each cell's ends in both gears, as torque_scalar finds it
    pieces = np.searchsorted(x[1:-1], np.concatenate((a, b, a * q, b * q)), side="right")
    ends = zip(*pieces.reshape(4, -1).tolist(), strict=True)
    cells = zip(a.tolist(), b.tolist(), fa.tolist(), fb.tolist(), strict=True)
    return np.array(
        [
            _cell_crossing(curve, k_cur[k], k_next[k], step[k], cell, end)
            for k, cell, end in zip(rows.tolist(), cells, ends, strict=True)
        ],
        dtype=np.float64,
    )
