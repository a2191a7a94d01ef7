"""The numbers of a dyno export's used columns, turned into engine speed and torque.

:func:`run_values` reads the cells :mod:`core.dyno.parse` collected column by column
(:func:`core.dyno.numbers.parse_column`), checks their ranges naming the first bad cell,
refers a speed-based export to engine rpm (:mod:`core.dyno.road`), turns power or force into
torque, checks power against torque, and says whether the curve is a chassis curve.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.dyno.columns import ColumnQuantity
from core.dyno.numbers import NumberFormat, number_format_of_texts, parse_column
from core.dyno.parse import Table
from core.dyno.road import RoadSpeedConversion, names_the_engine
from core.engine.curves import MAX_TORQUE_NM, RPM_TO_RAD_S, CurveSource
from core.errors import DynoFileError
from core.notices import Notice

__all__ = ["MAX_RPM", "MISMATCH_LIMIT", "RunValues", "run_values"]

FloatArray = NDArray[np.float64]

MAX_RPM = 100_000.0  # engine speeds above this are taken as a misread file
MISMATCH_LIMIT = 0.02  # relative disagreement of power with torque that earns a notice


@dataclass(frozen=True)
class RunValues:
    """Engine speed and torque of every kept row, unsorted.

    Attributes
    ----------
    rpm, torque_nm : ndarray, shape (n,)
        Engine speed [rpm] and torque [N*m] (referred to the engine for wheel figures).
    lines : ndarray, shape (n,)
        1-based line of each row.
    number_format : NumberFormat
        Decimal mark and thousands separator found.
    source : CurveSource
        ``CHASSIS`` for wheel figures, else ``ENGINE``.
    notices : tuple of Notice
        Power disagreeing with torque; the curve taken as a chassis curve.
    """

    rpm: FloatArray
    torque_nm: FloatArray
    lines: NDArray[np.int_]
    number_format: NumberFormat
    source: CurveSource
    notices: tuple[Notice, ...]


def _first_bad(
    bad: NDArray[np.bool_], texts: Sequence[str], lines: Sequence[int], column: int, rule: str
) -> None:
    """Raise for the first cell whose value is flagged bad."""
    hits = np.flatnonzero(bad)
    if hits.size:
        k = int(hits[0])
        raise DynoFileError(
            f"`text` line {lines[k]}, column {column}: {texts[k]!r} must be {rule}",
            line=lines[k],
            column=column,
        )


def _mismatch(
    torque: FloatArray,
    from_power: FloatArray,
    rpm: FloatArray,
    lines: NDArray[np.int_],
    wheels: bool,
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
        if wheels and median < 1.0:
            message += (
                " Wheel torque must be referred to engine speed (wheel power / engine angular "
                "speed); torque at the axle is larger by the overall ratio."
            )
    return Notice("torque_power_mismatch", message, "text")


def _source(table: Table) -> tuple[CurveSource, list[Notice]]:
    """Chassis for wheel figures (or a speed-based run not naming the engine), else engine."""
    x, curve = table.columns[0], table.columns[1]
    if curve.at_wheels:
        why = f"{curve.column} ({curve.header!r}) holds figures measured at the wheels"
    elif table.speed_based and not names_the_engine(curve):
        why = (
            f"{curve.column} ({curve.header!r}) was measured against road speed "
            f"({x.header!r}), at the rollers"
        )
    else:
        return CurveSource.ENGINE, []
    return CurveSource.CHASSIS, [
        Notice(
            "chassis_curve",
            f"Column {why}: the curve is a chassis curve (`source` chassis), already net of "
            "driveline losses, so a plan does not take driveline efficiency off again.",
            "text",
        )
    ]


def _engine_rpm(x: FloatArray, table: Table, conversion: RoadSpeedConversion | None) -> FloatArray:
    """Engine speed [rpm] from the x column: itself, or road speed through the gear."""
    col, texts, lines = table.columns[0], table.cells[0], table.lines
    if not table.speed_based:
        _first_bad(~(x > 0.0), texts, lines, col.column, "> 0 rpm")
        _first_bad(x > MAX_RPM, texts, lines, col.column, f"at most {MAX_RPM:g} rpm")
        return x
    if conversion is None:
        raise DynoFileError(
            f"`text` is a speed-based export (column {col.column}, {col.header!r}, holds road "
            "speed and no column holds engine speed): give `overall_ratio` and "
            "`rolling_radius_m` of the gear it was run in",
            parameter="overall_ratio",
        )
    _first_bad(~(x > 0.0), texts, lines, col.column, f"> 0 {col.unit.value}")
    rpm = conversion.engine_rpm(x * col.unit.si_factor)
    _first_bad(
        rpm > MAX_RPM,
        texts,
        lines,
        col.column,
        f"at most {MAX_RPM / conversion.rpm_per_m_s / col.unit.si_factor:.5g} "
        f"{col.unit.value} ({MAX_RPM:g} rpm at overall ratio {conversion.overall_ratio:g})",
    )
    return rpm


def run_values(table: Table, conversion: RoadSpeedConversion | None) -> RunValues:
    """Engine speed and torque of the kept rows of a table.

    Parameters
    ----------
    table : Table
        The used columns and their cells.
    conversion : RoadSpeedConversion or None
        The gear of a speed-based export; needed for one, unused otherwise.

    Returns
    -------
    RunValues

    Raises
    ------
    DynoFileError
        For a cell that is not a number or out of range (its line and column), or a
        speed-based export without ``conversion``.
    """
    lines = table.lines
    cols = table.columns
    filled = [
        np.ones(len(texts), dtype=bool)
        if "" not in texts
        else np.array([bool(t) for t in texts], dtype=bool)
        for texts in table.cells
    ]
    picked = [
        (texts, lines, c.column)
        if mask.all()
        else (
            [t for t in texts if t],
            [n for n, t in zip(lines, texts, strict=True) if t],
            c.column,
        )
        for texts, mask, c in zip(table.cells, filled, cols, strict=True)
    ]
    number_format = number_format_of_texts(picked)
    values = []
    for (texts, at, column), col in zip(picked, cols, strict=True):
        v = parse_column(texts, at, column, number_format)
        if col.quantity is not cols[0].quantity:
            _first_bad(v < 0.0, texts, at, column, ">= 0")
        values.append(v)
    with np.errstate(over="ignore", invalid="ignore"):  # overflowing cells are refused below
        rpm = _engine_rpm(values[0], table, conversion)
        curve = cols[1]
        si = values[1] * curve.unit.si_factor
        if curve.quantity is ColumnQuantity.TORQUE:
            torque = si
        elif table.speed_based and conversion is not None:
            torque = conversion.engine_torque_nm(si, curve.quantity, rpm)
        else:
            torque = si / (rpm * RPM_TO_RAD_S)
        _check_torque(torque, rpm, table, conversion)
        source, notices = _source(table)
        numbers = np.asarray(lines, dtype=np.int_)
        if len(cols) == 3:
            mask = filled[2]
            from_power = values[2] * cols[2].unit.si_factor / (rpm[mask] * RPM_TO_RAD_S)
            note = _mismatch(torque[mask], from_power, rpm[mask], numbers[mask], curve.at_wheels)
            notices = ([note] if note is not None else []) + notices
    return RunValues(rpm, torque, numbers, number_format, source, tuple(notices))


def _check_torque(
    torque: FloatArray, rpm: FloatArray, table: Table, conversion: RoadSpeedConversion | None
) -> None:
    """Refuse the first row whose torque (converted, or implied by power or force) exceeds
    the curve's bound, naming the cell and the most it may hold there."""
    bad = ~(torque <= MAX_TORQUE_NM)
    if not bad.any():
        return
    k, col = int(np.argmax(bad)), table.columns[1]
    if col.quantity is ColumnQuantity.TORQUE:
        rule = f"at most {MAX_TORQUE_NM / col.unit.si_factor:g} {col.unit.value}"
    else:
        one = np.array([col.unit.si_factor])  # torque [N*m] of one unit of the column at k
        if conversion is not None:
            per_unit = conversion.engine_torque_nm(one, col.quantity, rpm[k : k + 1])[0]
        else:
            per_unit = one[0] / (rpm[k] * RPM_TO_RAD_S)
        rule = f"at most {MAX_TORQUE_NM / per_unit:.6g} {col.unit.value} at {rpm[k]:.6g} rpm"
    _first_bad(bad, table.cells[1], table.lines, col.column, rule)
