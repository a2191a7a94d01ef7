"""Reading a delimited dyno export given as text.

The text is a table: a header row naming an engine-speed column and a torque and/or power
column, then one row per sample. The reader finds, in this order:

* **Size and content.** At most :data:`MAX_TEXT_CHARS` characters, :data:`MAX_LINES` lines
  and :data:`MAX_COLUMNS` cells a line. NUL, other control characters (except tab and the
  line breaks), U+FFFD and lone surrogates (bytes that did not decode) are rejected with
  their line and character position. ``\\r\\n`` and ``\\r`` line breaks and a leading
  byte-order mark are accepted.
* **Lines to skip.** Blank lines; comment lines, whose first non-blank characters are
  ``#`` or ``//``; and any lines above the header (reported in a notice).
* **Header and delimiter.** The header is the first line that, split at tab, semicolon or
  comma, names an engine-speed column and a torque or power column (spellings in
  :mod:`core.dynocolumns`). When several delimiters qualify, the one that gives the
  header's cell count on most of the next 20 lines wins (ties: tab, semicolon, comma).
  Cells may be quoted with ``"``; a quoted cell may not span lines. Torque or power named
  without a unit may take it from a units row right under the header (``rpm;Nm;kW``).
* **Decimal mark.** Point or comma, decided over all the cells read
  (:mod:`core.dynonumbers`); with a semicolon delimiter a decimal comma is common.
* **Rows.** Every data row must hold a number in each used column; other columns are not
  read. Rows are sorted by rpm and rows repeating an rpm are averaged, each with a notice.
  Power is turned into torque by ``torque = power / omega``, ``omega = 2*pi*rpm/60``.
  When both torque and power are given, torque is used and a notice reports power that
  disagrees with it by more than 2 %.
* **Options.** Resampling to multiples of ``rpm_step`` with a monotone cubic (PCHIP,
  ``scipy.interpolate.PchipInterpolator``); smoothing with a Savitzky-Golay filter
  (``scipy.signal.savgol_filter``, mode ``"interp"``) whose window is the odd number of
  samples nearest to ``smoothing_window_rpm`` divided by the sample spacing. Smoothing
  needs evenly spaced rpm: resample first when the export is not.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.interpolate import PchipInterpolator
from scipy.signal import savgol_filter

from core.curves import (
    MAX_TORQUE_NM,
    MIN_CURVE_POINTS,
    RPM_TO_RAD_S,
    CurveSource,
    Interpolation,
    TorqueCurve,
    torque_curve_from_torque,
)
from core.dynocolumns import ColumnQuantity, DynoColumn
from core.dynonumbers import NumberFormat, number_format_of, parse_number
from core.dynoparse import MAX_COLUMNS, MAX_LINES, MAX_TEXT_CHARS, Cell, Delimiter, read_table
from core.errors import DynoFileError
from core.plan import Notice

__all__ = [
    "MAX_COLUMNS",
    "MAX_LINES",
    "MAX_RPM",
    "MAX_TEXT_CHARS",
    "MISMATCH_LIMIT",
    "DynoRun",
    "read_dyno_text",
]

FloatArray = NDArray[np.float64]

MAX_RPM = 100_000.0  # engine speeds above this are taken as a misread file
MISMATCH_LIMIT = 0.02  # relative disagreement of power with torque that earns a notice
_MAX_SMOOTHING_ORDER = 5
_UNIFORM_SPACING_RTOL = 1e-6


@dataclass(frozen=True)
class DynoRun:
    """A torque curve read from a dyno export.

    Attributes
    ----------
    rpm : ndarray, shape (n,)
        Engine speed [rpm], strictly increasing, read-only.
    torque_nm : ndarray, shape (n,)
        Torque [N*m] at each speed, non-negative, read-only.
    rpm_column : DynoColumn
        The engine-speed column used.
    torque_column : DynoColumn or None
        The torque column used, if the export has one.
    power_column : DynoColumn or None
        The power column: the source of the torque when there is no torque column, else
        only checked against it.
    delimiter : Delimiter
        Cell separator found.
    number_format : NumberFormat
        Decimal mark and thousands separator found.
    header_line : int
        1-based line of the header row.
    data_rows : int
        Number of data rows read (before merging repeated rpm).
    rpm_step : float or None
        Resampling step [rpm], if the run was resampled.
    smoothing_samples : int or None
        Savitzky-Golay window [samples], if the run was smoothed.
    notices : tuple of Notice
        What the reader changed or noticed (sorting, merging, mismatches, skipped lines).
    """

    rpm: FloatArray
    torque_nm: FloatArray
    rpm_column: DynoColumn
    torque_column: DynoColumn | None
    power_column: DynoColumn | None
    delimiter: Delimiter
    number_format: NumberFormat
    header_line: int
    data_rows: int
    rpm_step: float | None
    smoothing_samples: int | None
    notices: tuple[Notice, ...]

    def power_w(self) -> FloatArray:
        """Power [W] at each sample, torque * 2*pi*rpm/60; shape (n,)."""
        return self.torque_nm * self.rpm * RPM_TO_RAD_S

    def torque_curve(
        self,
        *,
        interpolation: Interpolation = Interpolation.PCHIP,
        source: CurveSource = CurveSource.ENGINE,
    ) -> TorqueCurve:
        """The run as a :class:`~core.curves.TorqueCurve`.

        Parameters
        ----------
        interpolation : Interpolation
            Fill between samples, PCHIP by default.
        source : CurveSource
            Engine dyno (default) or chassis dyno.

        Returns
        -------
        TorqueCurve

        Raises
        ------
        CurveError
            When the run has more points than a curve may hold (resample it coarser).
        """
        return torque_curve_from_torque(
            self.rpm, self.torque_nm, interpolation=interpolation, source=source
        )


def _check_options(
    rpm_step: float | None, smoothing_window_rpm: float | None, smoothing_order: int
) -> None:
    """Validate the resampling and smoothing options."""
    for name, value in (("rpm_step", rpm_step), ("smoothing_window_rpm", smoothing_window_rpm)):
        if value is not None and not (math.isfinite(value) and value > 0.0):
            raise DynoFileError(f"`{name}` must be finite and > 0, got {value}", parameter=name)
    if isinstance(smoothing_order, bool) or not isinstance(smoothing_order, int):
        raise DynoFileError(
            f"`smoothing_order` must be an int, got {smoothing_order!r}",
            parameter="smoothing_order",
        )
    if not 0 <= smoothing_order <= _MAX_SMOOTHING_ORDER:
        raise DynoFileError(
            f"`smoothing_order` must lie in [0, {_MAX_SMOOTHING_ORDER}], got {smoothing_order}",
            parameter="smoothing_order",
        )


def _first_bad(bad: NDArray[np.bool_], cells: list[Cell], rule: str) -> None:
    """Raise for the first cell whose value is flagged bad."""
    hits = np.flatnonzero(bad)
    if hits.size:
        cell = cells[int(hits[0])]
        raise DynoFileError(
            f"`text` line {cell.line}, column {cell.column}: {cell.text!r} must be {rule}",
            line=cell.line,
            column=cell.column,
        )


def _mismatch(
    torque: FloatArray, from_power: FloatArray, rpm: FloatArray, lines: NDArray[np.int_]
) -> Notice | None:
    """A notice when power disagrees with torque by more than MISMATCH_LIMIT."""
    scale = np.maximum(torque, from_power)
    rel = np.abs(from_power - torque) / np.where(scale > 0.0, scale, 1.0)
    bad = rel > MISMATCH_LIMIT
    if not bad.any():
        return None
    w = int(np.argmax(rel))
    message = (
        f"Power disagrees with torque by more than {MISMATCH_LIMIT:.0%} on {int(bad.sum())} "
        f"of {rel.size} rows (worst {rel[w]:.1%} on line {int(lines[w])}, {rpm[w]:g} rpm); "
        "the torque column was used."
    )
    both = (torque > 0.0) & (from_power > 0.0)
    ratio = from_power[both] / torque[both]
    median = float(np.median(ratio)) if ratio.size else 1.0
    if np.all(np.abs(ratio / median - 1.0) < 0.005) and abs(median - 1.0) > MISMATCH_LIMIT:
        message += (
            f" Power is consistently {median:.4f} times torque, which suggests a wrong unit "
            "in a header."
        )
    return Notice("torque_power_mismatch", message, "text")


def _sorted_merged(
    rpm: FloatArray, torque: FloatArray, lines: NDArray[np.int_]
) -> tuple[FloatArray, FloatArray, list[Notice]]:
    """Sort by rpm and average rows that repeat an rpm."""
    notices = []
    order = np.argsort(rpm, kind="stable")
    if np.any(np.diff(rpm) < 0.0):
        notices.append(
            Notice(
                "rpm_sorted", "The rows were not in rising rpm order; they were sorted.", "text"
            )
        )
    rpm, torque, lines = rpm[order], torque[order], lines[order]
    unique, first, inverse, counts = np.unique(
        rpm, return_index=True, return_inverse=True, return_counts=True
    )
    repeated = np.flatnonzero(counts > 1)
    if repeated.size:
        k = int(repeated[0])
        notices.append(
            Notice(
                "rpm_repeated_merged",
                f"{repeated.size} rpm value(s) appear on more than one row (first "
                f"{unique[k]:g} rpm, line {int(lines[first[k]])}); those rows were averaged.",
                "text",
            )
        )
        torque = np.bincount(inverse, weights=torque) / counts
    return unique, torque, notices


def _resampled(rpm: FloatArray, torque: FloatArray, step: float) -> tuple[FloatArray, FloatArray]:
    """PCHIP values at the multiples of ``step`` inside the sampled range."""
    lo = math.ceil(rpm[0] / step - 1e-9)
    hi = math.floor(rpm[-1] / step + 1e-9)
    count = hi - lo + 1
    if count > MAX_LINES:
        raise DynoFileError(
            f"`rpm_step` {step:g} gives {count} points, more than {MAX_LINES}; use a larger step",
            parameter="rpm_step",
        )
    if count < MIN_CURVE_POINTS:
        raise DynoFileError(
            f"`rpm_step` must leave at least {MIN_CURVE_POINTS} points between "
            f"{rpm[0]:g} and {rpm[-1]:g} rpm, got {step:g}",
            parameter="rpm_step",
        )
    grid = np.arange(lo, hi + 1, dtype=np.float64) * step
    values = PchipInterpolator(rpm, torque)(np.clip(grid, rpm[0], rpm[-1]))
    return grid, np.maximum(np.asarray(values, dtype=np.float64), 0.0)


def _smoothed(
    rpm: FloatArray, torque: FloatArray, window_rpm: float, order: int
) -> tuple[FloatArray, int]:
    """Savitzky-Golay smoothing over a window given in rpm; evenly spaced rpm only."""
    spacing = np.diff(rpm)
    step = float(spacing.mean())
    if float(np.ptp(spacing)) > _UNIFORM_SPACING_RTOL * step:
        raise DynoFileError(
            "`smoothing_window_rpm` needs evenly spaced rpm, but the spacing runs from "
            f"{spacing.min():g} to {spacing.max():g} rpm; give `rpm_step` to resample first",
            parameter="smoothing_window_rpm",
        )
    samples = 2 * math.floor((window_rpm / step - 1.0) / 2.0 + 0.5) + 1
    if samples < MIN_CURVE_POINTS:
        raise DynoFileError(
            f"`smoothing_window_rpm` must span at least {MIN_CURVE_POINTS} samples "
            f"({MIN_CURVE_POINTS * step:g} rpm), got {window_rpm:g}",
            parameter="smoothing_window_rpm",
        )
    if samples > rpm.size:
        raise DynoFileError(
            f"`smoothing_window_rpm` must span at most the run's {rpm.size} samples "
            f"({rpm.size * step:g} rpm), got {window_rpm:g}",
            parameter="smoothing_window_rpm",
        )
    if order >= samples:
        raise DynoFileError(
            f"`smoothing_order` must be below the window's {samples} samples, got {order}",
            parameter="smoothing_order",
        )
    values = savgol_filter(torque, samples, order, mode="interp")
    return np.maximum(np.asarray(values, dtype=np.float64), 0.0), samples


def read_dyno_text(
    text: str,
    *,
    rpm_step: float | None = None,
    smoothing_window_rpm: float | None = None,
    smoothing_order: int = 2,
) -> DynoRun:
    """Read a torque curve from a delimited dyno export.

    The rules for finding the header, delimiter, decimal mark and units are in the module
    docstring; the accepted column spellings in :mod:`core.dynocolumns`.

    Parameters
    ----------
    text : str
        The whole export, at most 1 000 000 characters, 20 000 lines, 64 cells a line.
    rpm_step : float, optional
        Resample to the multiples of this step inside the sampled range [rpm], > 0.
    smoothing_window_rpm : float, optional
        Savitzky-Golay window [rpm], at least 3 samples and at most the run's length.
    smoothing_order : int
        Savitzky-Golay polynomial order, 0..5 and below the window's sample count.

    Returns
    -------
    DynoRun
        Sorted rpm [rpm] and torque [N*m], the columns and units used, and notices.

    Raises
    ------
    DynoFileError
        When the text cannot be read; ``line`` and ``column`` locate the offending cell.

    Examples
    --------
    >>> run = read_dyno_text("RPM;Torque (Nm)\\n2000;180,5\\n3000;201,0\\n4000;195,5\\n")
    >>> run.rpm.tolist(), run.torque_nm.tolist(), run.number_format.decimal_mark.value
    ([2000.0, 3000.0, 4000.0], [180.5, 201.0, 195.5], ',')
    """
    _check_options(rpm_step, smoothing_window_rpm, smoothing_order)
    table = read_table(text)
    if len(table.rows) < MIN_CURVE_POINTS:
        raise DynoFileError(
            f"`text` must hold at least {MIN_CURVE_POINTS} data rows below the header on "
            f"line {table.header_line}, got {len(table.rows)}; is the file truncated?"
        )
    number_format = number_format_of([c for row in table.rows for c in row])
    values = np.array([[parse_number(c, number_format) for c in row] for row in table.rows])
    lines = np.array([row[0].line for row in table.rows])
    by_quantity = {col.quantity: j for j, col in enumerate(table.columns)}
    rpm = values[:, 0]
    rpm_cells = [row[0] for row in table.rows]
    _first_bad(~(rpm > 0.0), rpm_cells, "> 0 rpm")
    _first_bad(rpm > MAX_RPM, rpm_cells, f"at most {MAX_RPM:g} rpm")
    for j in range(1, len(table.columns)):
        cells = [row[j] for row in table.rows]
        _first_bad(values[:, j] < 0.0, cells, ">= 0")
        unit = table.columns[j].unit
        if unit.quantity is ColumnQuantity.TORQUE:  # converted values must stay finite
            top = MAX_TORQUE_NM / unit.si_factor
            _first_bad(~(values[:, j] <= top), cells, f"at most {top:g} {unit.value}")
    notices = list(table.notices)
    omega = rpm * RPM_TO_RAD_S
    power_j = by_quantity.get(ColumnQuantity.POWER)
    torque_j = by_quantity.get(ColumnQuantity.TORQUE)
    from_power = None
    if power_j is not None:
        with np.errstate(over="ignore"):  # an overflowing cell is refused just below
            from_power = values[:, power_j] * table.columns[power_j].unit.si_factor / omega
    if torque_j is not None:
        torque = values[:, torque_j] * table.columns[torque_j].unit.si_factor
        if from_power is not None:
            note = _mismatch(torque, from_power, rpm, lines)
            notices.extend([note] if note is not None else [])
    elif from_power is not None:
        if power_j is not None:  # always, here; the torque it implies must stay finite
            unit = table.columns[power_j].unit
            bad = np.flatnonzero(~(from_power <= MAX_TORQUE_NM))
            limits = MAX_TORQUE_NM * omega / unit.si_factor
            if bad.size:
                i = int(bad[0])
                rule = f"at most {limits[i]:g} {unit.value} at {rpm[i]:g} rpm"
                _first_bad(bad == i, [row[power_j] for row in table.rows][i : i + 1], rule)
        torque = from_power
    else:  # pragma: no cover - read_table always finds torque or power
        raise DynoFileError("`text` has neither a torque nor a power column")
    rpm, torque, merge_notices = _sorted_merged(rpm, torque, lines)
    notices.extend(merge_notices)
    if rpm.size < MIN_CURVE_POINTS:
        raise DynoFileError(
            f"`text` must hold at least {MIN_CURVE_POINTS} distinct rpm values, got {rpm.size}"
        )
    if not np.any(torque > 0.0):
        raise DynoFileError("`text` must hold at least one torque or power value > 0, got none")
    if rpm_step is not None:
        rpm, torque = _resampled(rpm, torque, rpm_step)
    samples = None
    if smoothing_window_rpm is not None:
        torque, samples = _smoothed(rpm, torque, smoothing_window_rpm, smoothing_order)
    rpm.setflags(write=False)
    torque.setflags(write=False)
    return DynoRun(
        rpm=rpm,
        torque_nm=torque,
        rpm_column=table.columns[0],
        torque_column=table.columns[torque_j] if torque_j is not None else None,
        power_column=table.columns[power_j] if power_j is not None else None,
        delimiter=table.delimiter,
        number_format=number_format,
        header_line=table.header_line,
        data_rows=len(table.rows),
        rpm_step=None if rpm_step is None else float(rpm_step),
        smoothing_samples=samples,
        notices=tuple(notices),
    )
