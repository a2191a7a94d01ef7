"""Reading a delimited dyno export given as text.

The text is a table: a header row naming an engine-speed column and a torque and/or power
column (or a road-speed column and a power or tractive-force column), then one row per
sample. The reader finds, in this order:

* **Size and content.** At most :data:`MAX_TEXT_CHARS` characters, :data:`MAX_LINES` lines
  and :data:`MAX_COLUMNS` cells a line. NUL, other control characters (except tab and the
  line breaks), U+FFFD and lone surrogates (bytes that did not decode) are rejected with
  their line and character position. ``\\r\\n`` and ``\\r`` line breaks and a leading
  byte-order mark are accepted.
* **Lines to skip.** Blank lines; comment lines, whose first non-blank characters are
  ``#`` or ``//``; and any lines above the header (reported in a notice).
* **Header and delimiter.** The header is the first line that, split at tab, semicolon or
  comma, names an engine-speed column and a torque or power column, or a road-speed column
  and a power or force column (spellings in :mod:`core.dyno.columns`). When several
  delimiters qualify, the one that gives the header's cell count on most of the next 20
  lines wins (ties: tab, semicolon, comma). A line that is a header in its own right (it
  has names, not only units) is never taken as the units row of the line above.
  Cells may be quoted with ``"``; a quoted cell may not span lines. Torque or power named
  without a unit may take it from a units row right under the header (``rpm;Nm;kW``).
* **Decimal mark.** Point or comma, decided over all the cells read
  (:mod:`core.dyno.numbers`); with a semicolon delimiter a decimal comma is common.
* **Rows.** Every data row must hold a number in each used column; other columns are not
  read. Summary rows (max, average, peak ...) and rows with a blank x or curve cell are
  skipped with a notice (:mod:`core.dyno.rows`). Rows are sorted by rpm and rows repeating
  an rpm are averaged, each with a notice.
  Power is turned into torque by ``torque = power / omega``, ``omega = 2*pi*rpm/60``.
  When both torque and power are given, torque is used and a notice reports power that
  disagrees with it by more than 2 %.
* **Wheel figures.** A torque, power or force column headed as a wheel figure (``WHP``,
  ``Wheel Torque``, ``whl tq``, ``RWHP``; :mod:`core.dyno.columns`) makes the run a chassis
  curve (``source`` chassis, net of driveline losses), reported in a notice.
* **Speed-based exports.** Road speed with power or tractive force and no engine speed is
  referred to engine rpm with the gear's overall ratio and the tire's rolling radius
  (:mod:`core.dyno.road`); measured at the rollers, it is a chassis curve.
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

from core.dyno.columns import DynoColumn
from core.dyno.numbers import NumberFormat
from core.dyno.parse import MAX_COLUMNS, MAX_LINES, MAX_TEXT_CHARS, read_table
from core.dyno.road import RoadSpeedConversion, road_speed_conversion
from core.dyno.values import MAX_RPM, MISMATCH_LIMIT, run_values
from core.engine.curves import (
    MIN_CURVE_POINTS,
    RPM_TO_RAD_S,
    CurveSource,
    Interpolation,
    TorqueCurve,
    torque_curve_from_torque,
)
from core.errors import DynoFileError
from core.notices import Notice
from core.readers.delimited import Delimiter

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
        The engine-speed column used; the road-speed column of a speed-based export.
    torque_column : DynoColumn or None
        The torque column used, if the export has one.
    power_column : DynoColumn or None
        The power column: the source of the torque when there is no torque column, else
        only checked against it.
    force_column : DynoColumn or None
        The tractive-force column of a speed-based export without power.
    source : CurveSource
        ``CHASSIS`` when the figures were measured at the wheels, else ``ENGINE``.
    road_speed : RoadSpeedConversion or None
        The gear and tire a speed-based export was referred to engine rpm with.
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
    force_column: DynoColumn | None
    source: CurveSource
    road_speed: RoadSpeedConversion | None
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
        source: CurveSource | None = None,
    ) -> TorqueCurve:
        """The run as a :class:`~core.engine.curves.TorqueCurve`.

        Parameters
        ----------
        interpolation : Interpolation
            Fill between samples, PCHIP by default.
        source : CurveSource, optional
            Engine or chassis dyno; default the run's own ``source``.

        Returns
        -------
        TorqueCurve

        Raises
        ------
        CurveError
            When the run has more points than a curve may hold (resample it coarser).
        """
        return torque_curve_from_torque(
            self.rpm, self.torque_nm, interpolation=interpolation, source=source or self.source
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
    overall_ratio: float | None = None,
    rolling_radius_m: float | None = None,
) -> DynoRun:
    """Read a torque curve from a delimited dyno export.

    The rules for finding the header, delimiter, decimal mark and units are in the module
    docstring; the accepted column spellings in :mod:`core.dyno.columns`.

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
    overall_ratio : float, optional
        Gear * final drive * extra reduction of the gear a speed-based export was run in,
        in (0, 100]; with ``rolling_radius_m``. Needed for a speed-based export only.
    rolling_radius_m : float, optional
        Tire rolling radius [m] of that run, in (0, 2.5]; with ``overall_ratio``.

    Returns
    -------
    DynoRun
        Sorted rpm [rpm] and torque [N*m], the columns and units used, the curve's source
        (chassis for wheel figures) and notices.

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
    conversion = road_speed_conversion(overall_ratio, rolling_radius_m)
    table = read_table(text)
    if len(table.lines) < MIN_CURVE_POINTS:
        raise DynoFileError(
            f"`text` must hold at least {MIN_CURVE_POINTS} data rows below the header on "
            f"line {table.header_line}, got {len(table.lines)}; is the file truncated?"
        )
    values = run_values(table, conversion)
    notices = [*table.notices, *values.notices]
    if conversion is not None and not table.speed_based:
        notices.append(
            Notice(
                "road_speed_conversion_unused",
                "The export gives engine speed, so `overall_ratio` and `rolling_radius_m` "
                "were not used.",
                "overall_ratio",
            )
        )
    rpm, torque, merge_notices = _sorted_merged(values.rpm, values.torque_nm, values.lines)
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
    by_quantity = {c.quantity.value: c for c in table.columns[1:]}
    return DynoRun(
        rpm=rpm,
        torque_nm=torque,
        rpm_column=table.columns[0],
        torque_column=by_quantity.get("torque"),
        power_column=by_quantity.get("power"),
        force_column=by_quantity.get("force"),
        source=values.source,
        road_speed=conversion if table.speed_based else None,
        delimiter=table.delimiter,
        number_format=values.number_format,
        header_line=table.header_line,
        data_rows=len(table.lines),
        rpm_step=None if rpm_step is None else float(rpm_step),
        smoothing_samples=samples,
        notices=tuple(notices),
    )
