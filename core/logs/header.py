"""Recognising the columns of a logger export from its header (rules in :mod:`core.logs.text`)."""

from __future__ import annotations

import enum
import re
from dataclasses import dataclass

from core.errors import LogDataError

__all__ = ["LogColumn", "LogQuantity", "read_header", "unit_of"]


class LogQuantity(enum.Enum):
    """What a used column of a log holds."""

    TIME = "time"
    SPEED = "speed"
    RPM = "rpm"
    ACCELERATION = "acceleration"


@dataclass(frozen=True)
class LogColumn:
    """A used column of a log export.

    Attributes
    ----------
    quantity : LogQuantity
        What it holds.
    column : int
        1-based column (cell) number.
    header : str
        The header cell as written.
    unit : str
        Its unit: ``s`` or ``ms``; ``km/h``, ``mph`` or ``m/s``; ``rpm``; ``g`` or ``m/s^2``.
    """

    quantity: LogQuantity
    column: int
    header: str
    unit: str


_UNITS: dict[str, tuple[LogQuantity, str]] = {
    **{u: (LogQuantity.TIME, "s") for u in ("s", "sec", "secs", "second", "seconds")},
    **{u: (LogQuantity.TIME, "ms") for u in ("ms", "msec", "millisecond", "milliseconds")},
    **{u: (LogQuantity.SPEED, "km/h") for u in ("km/h", "kph", "kmh", "km/hr", "kmph")},
    **{u: (LogQuantity.SPEED, "mph") for u in ("mph", "mi/h", "mi/hr")},
    **{u: (LogQuantity.SPEED, "m/s") for u in ("m/s", "mps", "m/sec")},
    **{u: (LogQuantity.RPM, "rpm") for u in ("rpm", "1/min", "r/min", "rev/min", "min^-1")},
    **{u: (LogQuantity.ACCELERATION, "g") for u in ("g", "gs", "g's")},
    **{u: (LogQuantity.ACCELERATION, "m/s^2") for u in ("m/s^2", "m/s2", "m/s/s", "m/sec^2")},
}
_NAMES: dict[LogQuantity, frozenset[str]] = {
    LogQuantity.TIME: frozenset({"time", "t", "timestamp", "elapsed"}),
    LogQuantity.SPEED: frozenset({"speed", "velocity", "vel", "v"}),
    LogQuantity.RPM: frozenset({"rpm", "revs", "n"}),
    LogQuantity.ACCELERATION: frozenset({"g", "longg", "long_g"}),
}
_NOT_LONGITUDINAL = frozenset({"lat", "lateral", "vert", "vertical", "y", "z"})
_BRACKETED = re.compile(r"^(?P<name>[^\[\(\{]*)[\[\(\{](?P<unit>[^\]\)\}]*)[\]\)\}](?P<rest>.*)$")
_WORDS = re.compile(r"[a-z]+")
_REQUIRED = {LogQuantity.SPEED: "km/h", LogQuantity.ACCELERATION: "g"}


def unit_of(text: str) -> tuple[LogQuantity, str] | None:
    """The quantity and canonical unit a unit text names, or None.

    Examples
    --------
    >>> unit_of("KM/H"), unit_of("m/s²"), unit_of("psi")
    ((<LogQuantity.SPEED: 'speed'>, 'km/h'), (<LogQuantity.ACCELERATION: 'acceleration'>, \
'm/s^2'), None)
    """
    key = text.strip().lower().replace(" ", "").replace("²", "^2").replace("⁻¹", "^-1")
    return _UNITS.get(key)


def _name_and_unit(cell: str) -> tuple[str, str | None]:
    m = _BRACKETED.match(cell)
    if m is not None:
        return (m["name"] + " " + m["rest"]).strip().lower(), m["unit"].strip()
    parts = re.split(r"[\s_]+", cell.strip())
    if len(parts) > 1 and unit_of(parts[-1]) is not None:
        return " ".join(parts[:-1]).lower(), parts[-1]
    if unit_of(cell) is not None:
        return "", cell.strip()
    return cell.strip().lower(), None


def _named(name: str) -> LogQuantity | None:
    words = set(_WORDS.findall(name))
    if words & _NOT_LONGITUDINAL:
        return None
    if words & _NAMES[LogQuantity.RPM] or ("engine" in words and "speed" in words):
        return LogQuantity.RPM
    if words & _NAMES[LogQuantity.TIME]:
        return LogQuantity.TIME
    if words & _NAMES[LogQuantity.SPEED]:
        return LogQuantity.SPEED
    if any(w.startswith("acc") for w in words) or words & _NAMES[LogQuantity.ACCELERATION]:
        return LogQuantity.ACCELERATION
    return None


def _column(cell: str, unit_cell: str, index: int, line: int) -> LogColumn | None:
    name, unit = _name_and_unit(cell)
    if unit is None and unit_cell:
        unit = unit_cell
    by_name = _named(name)
    by_unit = unit_of(unit) if unit else None
    if by_name is None and not name and by_unit is not None:
        if set(_WORDS.findall(cell.lower())) & _NOT_LONGITUDINAL:
            return None
        by_name = by_unit[0]
    if by_name is None:
        return None
    if by_name is LogQuantity.SPEED and by_unit is not None and by_unit[0] is LogQuantity.RPM:
        by_name = LogQuantity.RPM
    if unit and (by_unit is None or by_unit[0] is not by_name):
        raise LogDataError(
            f"`text` line {line}, column {index}: header {cell!r} gives {by_name.value} in "
            f"{unit!r}, which is not a {by_name.value} unit this reader knows",
            parameter="text",
            line=line,
            column=index,
        )
    if by_unit is None:
        if by_name in _REQUIRED:
            raise LogDataError(
                f"`text` line {line}, column {index}: header {cell!r} names no unit; write "
                f"it in brackets, e.g. '{cell} [{_REQUIRED[by_name]}]'",
                parameter="text",
                line=line,
                column=index,
            )
        return LogColumn(by_name, index, cell, "s" if by_name is LogQuantity.TIME else "rpm")
    return LogColumn(by_name, index, cell, by_unit[1])


def read_header(
    cells: list[str], below: list[str] | None, line: int
) -> tuple[tuple[LogColumn, ...], bool] | None:
    """The used columns of a header line, or None when it names no time and speed columns.

    Parameters
    ----------
    cells : list of str
        The header's cells.
    below : list of str or None
        The next line's cells, read as a units row when every non-empty cell is a unit.
    line : int
        1-based line number, for errors.

    Returns
    -------
    tuple or None
        The columns (time, speed, then rpm and acceleration if present) and whether
        ``below`` is a units row.

    Raises
    ------
    LogDataError
        When a time or speed column is found but a used column has a wrong or missing unit.
    """
    units_row = (
        below is not None and any(below) and all(not c or unit_of(c) is not None for c in below)
    )
    under = below if units_row and below is not None else []
    under = under + [""] * (len(cells) - len(under))
    names = [_named(_name_and_unit(c)[0]) for c in cells]
    if LogQuantity.TIME not in names or LogQuantity.SPEED not in names:
        return None
    found: dict[LogQuantity, LogColumn] = {}
    for i, (cell, unit_cell) in enumerate(zip(cells, under, strict=False), start=1):
        col = _column(cell, unit_cell, i, line)
        if col is not None and col.quantity not in found:
            found[col.quantity] = col
    if LogQuantity.TIME not in found or LogQuantity.SPEED not in found:
        return None
    ordered = tuple(found[q] for q in LogQuantity if q in found)
    return ordered, bool(units_row)
