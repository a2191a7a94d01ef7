"""The scan of every gear change at once: where each row's current gear stalls, the band
where two gears' efforts coincide, the sign changes, and the cells where the next gear
overtakes (:func:`core.shifts.best.best_shifts` chooses among them).

Row k of a scan holds ``SCAN_POINTS`` current-gear engine speeds evenly over gear change
k's shared range and the difference ``current - next`` of the two gears' efforts there.
A plain scan (every row a range, the current gear never stalls, no zero and too few close
points for a band) is read from its signs alone; any other is cut where the current gear
stops accelerating and looked at row by row where it has to be.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "COINCIDENT_RTOL",
    "SCAN_POINTS",
    "UNIT_SCAN",
    "CellCrossings",
    "ScanFound",
    "found_cut",
    "found_plain",
    "is_plain",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.intp]
CellCrossings = Callable[[IntArray, FloatArray, FloatArray, FloatArray, FloatArray], FloatArray]
"""``(rows, a, b, fa, fb) -> n``: the crossing [rpm] in each falling scan cell."""

COINCIDENT_RTOL = 1e-4
SCAN_POINTS = 513
UNIT_SCAN = np.linspace(0.0, 1.0, SCAN_POINTS)
"""Where a row's scan points sit in its range, 0 to 1 (read-only)."""
UNIT_SCAN.flags.writeable = False


def _coincident_band(
    grid: FloatArray, diff: FloatArray, scale: float
) -> tuple[float, float] | None:
    close = np.abs(diff) <= COINCIDENT_RTOL * scale
    if not close.any():
        return None
    edges = np.flatnonzero(np.diff(np.concatenate(([0], close.astype(np.int8), [0]))))
    starts, stops = edges[::2], edges[1::2] - 1
    k = int(np.argmax(grid[stops] - grid[starts]))
    lo, hi = float(grid[starts[k]]), float(grid[stops[k]])
    if hi - lo < 0.02 * float(grid[-1] - grid[0]):
        return None
    return lo, hi


@dataclass(frozen=True)
class _Scan:
    """Every gear change's scan, each row cut where the current gear stops accelerating.

    ``grid`` and ``diff`` are (p, m); in a row whose current-gear effort falls to zero the
    point where it does (linear in the scan cell) replaces the first point past it, and the
    row ends there: ``last`` is the index of each row's last point (-1 for an empty range,
    0 where the gear cannot accelerate at all), ``top`` the end of each row's range [rpm].
    """

    grid: FloatArray
    diff: FloatArray
    last: NDArray[np.intp]
    top: FloatArray
    inside: NDArray[np.bool_]

    @classmethod
    def of(
        cls,
        grid: FloatArray,
        diff: FloatArray,
        e_cur: FloatArray,
        hi: FloatArray,
        valid: BoolArray,
    ) -> _Scan:
        m = grid.shape[1]
        stalled = e_cur <= 0.0
        stops = stalled.any(axis=1)
        last = np.where(stops, np.argmax(stalled, axis=1), m - 1)
        last[~valid] = -1
        top = hi.copy()
        cut = np.flatnonzero(stops & valid & (last > 0))
        if cut.size:
            grid, diff = grid.copy(), diff.copy()
            j = last[cut]
            e0, e1 = e_cur[cut, j - 1], e_cur[cut, j]
            frac = e0 / (e0 - e1)
            g0, g1 = grid[cut, j - 1], grid[cut, j]
            top[cut] = grid[cut, j] = g0 + frac * (g1 - g0)
            diff[cut, j] = diff[cut, j - 1] + frac * (diff[cut, j] - diff[cut, j - 1])
        inside = np.arange(m) <= last[:, None]
        return cls(grid, diff, last, top, inside)


def _may_hold_band(close: BoolArray, span: FloatArray, width: FloatArray) -> BoolArray:
    """Whether each row has enough ``close`` points to span 2 % of its scanned ``width``
    [rpm], the least a coincident band covers (``span``: each row's range [rpm])."""
    reach = (np.count_nonzero(close, axis=1) - 1) * (span / (SCAN_POINTS - 1)) * (1.0 + 1e-9)
    return np.asarray(reach >= 0.02 * width)


def _bands(scan: _Scan, scale: FloatArray, span: FloatArray) -> dict[int, tuple[float, float]]:
    """The coincident band of each gear change that has one, by row.

    A band must be 2 % of its row's range wide: a row without enough close points to
    span that many scan cells has none and is not looked at further."""
    close = (np.abs(scan.diff) <= COINCIDENT_RTOL * scale[:, None]) & scan.inside
    rows = np.arange(scan.last.size)
    wide = _may_hold_band(close, span, scan.grid[rows, scan.last] - scan.grid[:, 0])
    bands = {}
    for k in np.flatnonzero(wide & (scan.last > 0)).tolist():
        n = int(scan.last[k]) + 1
        band = _coincident_band(scan.grid[k, :n], scan.diff[k, :n], float(scale[k]))
        if band is not None:
            bands[k] = band
    return bands


def _intersection_counts(scan: _Scan, bands: dict[int, tuple[float, float]]) -> NDArray[np.intp]:
    """Sign changes of each row's ``diff``, zeros and a coincident band left out: every
    row's kept points in one flat sequence, a change counted only within a row."""
    keep = (scan.diff != 0.0) & scan.inside
    for k, (b_lo, b_hi) in bands.items():
        g = scan.grid[k]
        keep[k] &= (g < b_lo) | (g > b_hi)
    at = np.flatnonzero(keep)  # row-major: each row's kept points in order
    row = at // scan.diff.shape[1]
    rising = scan.diff.ravel()[at] > 0.0
    change = (rising[1:] != rising[:-1]) & (row[1:] == row[:-1])
    return np.bincount(row[1:][change], minlength=scan.diff.shape[0])


def _cell_roots(
    rows: IntArray, cells: tuple[FloatArray, ...], refine: CellCrossings | None
) -> FloatArray:
    """The crossing in each falling cell ``(a, b, D(a), D(b))`` [rpm]: ``b`` where
    ``D(b) = 0``, else refined by ``refine`` or linear in the cell."""
    a, b, fa, fb = cells
    with np.errstate(divide="ignore", invalid="ignore"):
        roots = np.where(fb == 0.0, b, a + fa / (fa - fb) * (b - a))
    moved = np.flatnonzero(fb != 0.0)
    if refine is not None and moved.size:
        roots[moved] = refine(rows[moved], a[moved], b[moved], fa[moved], fb[moved])
    return roots


def _falling_roots(scan: _Scan, refine: CellCrossings | None) -> tuple[IntArray, FloatArray]:
    """Each scan cell where the current gear falls behind (row-major order): its row and the
    crossing in it [rpm]."""
    g, d = scan.grid, scan.diff
    falls = (d[:, :-1] > 0.0) & (d[:, 1:] <= 0.0) & scan.inside[:, 1:] & (scan.last > 0)[:, None]
    rows, cols = np.nonzero(falls)
    cells = (g[rows, cols], g[rows, cols + 1], d[rows, cols], d[rows, cols + 1])
    return rows, _cell_roots(rows, cells, refine)


@dataclass(frozen=True)
class ScanFound:
    """What the scan found in every row: the range's end ``top`` [rpm] and last scan index
    ``last`` (as ``_Scan``), the coincident bands, the falling crossings [rpm] and the
    count of sign changes."""

    top: list[float]
    last: list[int]
    bands: dict[int, tuple[float, float]]
    crossings: list[list[float]]
    intersections: list[int]


def is_plain(
    grid: FloatArray, diff: FloatArray, ranges: tuple[BoolArray, FloatArray], scale: FloatArray
) -> bool:
    """Whether every row is a range with no zero and no NaN in ``diff`` and too few points
    close to a crossing for a band (``_bands``), for a current gear that never stalls;
    ``ranges`` are each row's validity and width [rpm]."""
    valid, span = ranges
    if not valid.all() or math.isnan(float(scale.sum())):
        return False
    close = np.abs(diff) <= COINCIDENT_RTOL * scale[:, None]
    if not close.any():
        return True
    wide = _may_hold_band(close, span, grid[:, -1] - grid[:, 0])
    return not (wide.any() or (diff[close] == 0.0).any())


def found_plain(
    grid: FloatArray, diff: FloatArray, hi: FloatArray, refine: CellCrossings | None
) -> ScanFound:
    """``found_cut`` where every row is a valid range, the current gear never stalls and
    no point is close to a crossing (so no zero and no band): the signs alone tell."""
    p, m = diff.shape
    pos = diff > 0.0
    rows, cols = np.divmod(np.flatnonzero(pos[:, 1:] != pos[:, :-1]), m - 1)
    counts = np.bincount(rows, minlength=p).tolist()
    falls = pos[rows, cols]  # a sign change from current ahead: the next gear overtakes
    rows, at = rows[falls], rows[falls] * m + cols[falls]
    crossings: list[list[float]] = [[] for _ in range(p)]
    if rows.size:
        cells = (grid.take(at), grid.take(at + 1), diff.take(at), diff.take(at + 1))
        roots = _cell_roots(rows, cells, refine)
        for k, root in zip(rows.tolist(), roots.tolist(), strict=True):
            crossings[k].append(root)
    return ScanFound(hi.tolist(), [m - 1] * p, {}, crossings, counts)


def found_cut(
    grid: FloatArray,
    diff: FloatArray,
    e_cur: FloatArray,
    ends: tuple[FloatArray, FloatArray, BoolArray],
    scale: FloatArray,
    refine: CellCrossings | None,
) -> ScanFound:
    """Every row's scan cut where the current gear stalls, its band, crossings and count;
    ``ends`` are each row's range end [rpm], width [rpm] and whether it is a range."""
    hi, span, valid = ends
    scan = _Scan.of(grid, diff, e_cur, hi, valid)
    bands = _bands(scan, scale, span)
    crossed = _intersection_counts(scan, bands)
    rows, roots = _falling_roots(scan, refine)
    found: list[list[float]] = [[] for _ in range(hi.size)]
    for k, root in zip(rows.tolist(), roots.tolist(), strict=True):
        band = bands.get(k)
        if band is None or not band[0] <= root <= band[1]:
            found[k].append(root)
    return ScanFound(scan.top.tolist(), scan.last.tolist(), bands, found, crossed.tolist())
