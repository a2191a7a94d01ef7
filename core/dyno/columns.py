"""Recognising the columns of a dyno export from their header text.

A header cell names a quantity, a unit, or both. The unit may stand in brackets anywhere in
the cell (``"Torque [lb-ft]"``, ``"Torque (N·m)"``, ``"Engine Speed {rpm}"``), after the
name separated by a space, underscore or slash (``"Torque Nm"``, ``"torque_nm"``,
``"Power/kW"``), or alone (``"Nm"``, ``"kW"``, ``"PS"``, ``"RPM"``). Matching ignores case,
spaces, dots, hyphens, underscores, ``*`` and the middle dots ``·`` ``⋅`` ``∙``.

Accepted units (spellings after that normalisation):

=================  ==========================================================================
engine speed       ``rpm``, ``r/min``, ``rev/min``, ``revs/min``, ``1/min``, ``min^-1``,
                   ``min⁻¹``, ``u/min``
N*m                ``Nm``, ``N·m``, ``N-m``, ``newton metre(s)``, ``newton meter(s)``
lbf*ft             ``lb-ft``, ``lbs-ft``, ``lbf-ft``, ``ft-lb``, ``ft-lbs``, ``ft-lbf``,
                   ``pound-feet``, ``pound-foot``, ``foot-pound(s)``
kgf*m              ``kgf-m``, ``kg-m``, ``m-kg``, ``m-kgf``
W, kW              ``W``, ``watt(s)``, ``kW``, ``kilowatt(s)``
hp (mechanical)    ``hp``, ``bhp``, ``whp``, ``rwhp``, ``awhp``, ``fwhp``, ``horsepower``;
                   745.69987158227022 W
PS (metric hp)     ``PS``, ``CV``; 735.49875 W
road speed         ``km/h``, ``kph``, ``kmh``, ``mph``, ``mi/h``, ``m/s``
force              ``N``, ``kN``, ``daN``, ``lbf``, ``lb``, ``lbs``, ``kgf``, ``kp``
=================  ==========================================================================

Names (words, any case): torque is a name containing ``torque`` or the word ``tq`` or
``trq``; power a name containing ``power`` or ``pwr``; engine speed the word
``rpm`` or ``revs``, or ``engine speed``, ``crank speed``. A name with one of these words
but a unit of another quantity, or a unit not in the table, is an error; a column with
neither a known name nor a known unit (``"Boost (psi)"``, ``"Oil temp (C)"``) is ignored.
The bare word ``speed`` names engine speed with an engine-speed unit and road speed with a
road-speed unit; ``road speed``, ``vehicle speed``, ``roller speed`` and ``velocity`` name
road speed. Tractive force is a name containing ``force``, ``tractive`` or ``traction``
(a force unit alone is not enough).

**Wheel figures.** A torque, power or force column whose header says it was measured at the
wheels makes the curve a chassis curve (already net of driveline losses): a header holding
``wheel`` or ``whl`` (``"Wheel Torque"``, ``"whl tq"``, ``"WhlPwr"``), or one of the words
``whp``, ``rwhp``, ``awhp``, ``fwhp``, ``wtq``, ``rwtq``, ``wtrq`` (as a name or as the
unit, e.g. ``"Power (whp)"``). Tractive force is always a wheel figure. Wheel torque is
taken as referred to engine speed (wheel power divided by engine angular speed), the usual
way a chassis dyno reports it.

A header cell without a unit may take it from a units row right under the header: a line
with at least one known unit and no number (``rpm;Nm;kW``). A unit in the header and a
different one in the units row is an error.
"""

from __future__ import annotations

import enum
import re
from dataclasses import dataclass

from core.units import (
    HORSEPOWER_W,
    KILOGRAM_FORCE_N,
    KM_H_M_S,
    METRIC_HORSEPOWER_W,
    MPH_M_S,
    POUND_FORCE_FOOT_NM,
    POUND_FORCE_N,
)

__all__ = [
    "ColumnQuantity",
    "ColumnUnit",
    "DynoColumn",
    "HeaderCell",
    "is_wheel_header",
    "read_header_cell",
    "unit_from_text",
]


class ColumnQuantity(enum.Enum):
    """What a used column of a dyno export holds."""

    ENGINE_SPEED = "engine_speed"
    TORQUE = "torque"
    POWER = "power"
    ROAD_SPEED = "road_speed"
    FORCE = "force"


class ColumnUnit(enum.Enum):
    """The unit of a used column; ``si_factor`` converts to rpm, N*m, W, m/s or N."""

    RPM = "rpm"
    NEWTON_METRE = "N*m"
    POUND_FORCE_FOOT = "lbf*ft"
    KILOGRAM_FORCE_METRE = "kgf*m"
    WATT = "W"
    KILOWATT = "kW"
    HORSEPOWER = "hp"
    METRIC_HORSEPOWER = "PS"
    KILOMETRE_PER_HOUR = "km/h"
    MILE_PER_HOUR = "mph"
    METRE_PER_SECOND = "m/s"
    NEWTON = "N"
    KILONEWTON = "kN"
    DECANEWTON = "daN"
    POUND_FORCE = "lbf"
    KILOGRAM_FORCE = "kgf"

    @property
    def quantity(self) -> ColumnQuantity:
        """The quantity this unit measures."""
        return _QUANTITY_OF_UNIT[self]

    @property
    def si_factor(self) -> float:
        """Multiplier to rpm [rpm], N*m [N*m], W [W], m/s [m/s] or N [N]."""
        return _SI_FACTOR[self]


_QUANTITY_OF_UNIT = {
    ColumnUnit.RPM: ColumnQuantity.ENGINE_SPEED,
    ColumnUnit.NEWTON_METRE: ColumnQuantity.TORQUE,
    ColumnUnit.POUND_FORCE_FOOT: ColumnQuantity.TORQUE,
    ColumnUnit.KILOGRAM_FORCE_METRE: ColumnQuantity.TORQUE,
    ColumnUnit.WATT: ColumnQuantity.POWER,
    ColumnUnit.KILOWATT: ColumnQuantity.POWER,
    ColumnUnit.HORSEPOWER: ColumnQuantity.POWER,
    ColumnUnit.METRIC_HORSEPOWER: ColumnQuantity.POWER,
    ColumnUnit.KILOMETRE_PER_HOUR: ColumnQuantity.ROAD_SPEED,
    ColumnUnit.MILE_PER_HOUR: ColumnQuantity.ROAD_SPEED,
    ColumnUnit.METRE_PER_SECOND: ColumnQuantity.ROAD_SPEED,
    ColumnUnit.NEWTON: ColumnQuantity.FORCE,
    ColumnUnit.KILONEWTON: ColumnQuantity.FORCE,
    ColumnUnit.DECANEWTON: ColumnQuantity.FORCE,
    ColumnUnit.POUND_FORCE: ColumnQuantity.FORCE,
    ColumnUnit.KILOGRAM_FORCE: ColumnQuantity.FORCE,
}
_SI_FACTOR = {
    ColumnUnit.RPM: 1.0,
    ColumnUnit.NEWTON_METRE: 1.0,
    ColumnUnit.POUND_FORCE_FOOT: POUND_FORCE_FOOT_NM,
    ColumnUnit.KILOGRAM_FORCE_METRE: KILOGRAM_FORCE_N,  # 1 kgf * 1 m
    ColumnUnit.WATT: 1.0,
    ColumnUnit.KILOWATT: 1000.0,
    ColumnUnit.HORSEPOWER: HORSEPOWER_W,
    ColumnUnit.METRIC_HORSEPOWER: METRIC_HORSEPOWER_W,
    ColumnUnit.KILOMETRE_PER_HOUR: KM_H_M_S,
    ColumnUnit.MILE_PER_HOUR: MPH_M_S,
    ColumnUnit.METRE_PER_SECOND: 1.0,
    ColumnUnit.NEWTON: 1.0,
    ColumnUnit.KILONEWTON: 1000.0,
    ColumnUnit.DECANEWTON: 10.0,
    ColumnUnit.POUND_FORCE: POUND_FORCE_N,
    ColumnUnit.KILOGRAM_FORCE: KILOGRAM_FORCE_N,
}
_UNIT_SPELLINGS = {
    ColumnUnit.RPM: ("rpm", "r/min", "rev/min", "revs/min", "1/min", "min1", "u/min"),
    ColumnUnit.NEWTON_METRE: (
        "nm",
        "newtonmetre",
        "newtonmetres",
        "newtonmeter",
        "newtonmeters",
    ),
    ColumnUnit.POUND_FORCE_FOOT: (
        "lbft",
        "lbsft",
        "lbfft",
        "ftlb",
        "ftlbs",
        "ftlbf",
        "poundfeet",
        "poundfoot",
        "footpound",
        "footpounds",
    ),
    ColumnUnit.KILOGRAM_FORCE_METRE: ("kgfm", "kgm", "mkg", "mkgf"),
    ColumnUnit.WATT: ("w", "watt", "watts"),
    ColumnUnit.KILOWATT: ("kw", "kilowatt", "kilowatts"),
    ColumnUnit.HORSEPOWER: ("hp", "bhp", "whp", "rwhp", "awhp", "fwhp", "horsepower"),
    ColumnUnit.METRIC_HORSEPOWER: ("ps", "cv"),
    ColumnUnit.KILOMETRE_PER_HOUR: ("km/h", "kmh", "kph", "km/hr", "kmph"),
    ColumnUnit.MILE_PER_HOUR: ("mph", "mi/h", "mi/hr"),
    ColumnUnit.METRE_PER_SECOND: ("m/s", "mps"),
    ColumnUnit.NEWTON: ("n", "newton", "newtons"),
    ColumnUnit.KILONEWTON: ("kn",),
    ColumnUnit.DECANEWTON: ("dan",),
    ColumnUnit.POUND_FORCE: ("lbf", "lb", "lbs", "poundforce"),
    ColumnUnit.KILOGRAM_FORCE: ("kgf", "kp"),
}
_UNITS = {spelling: unit for unit, names in _UNIT_SPELLINGS.items() for spelling in names}
_IGNORED_IN_UNITS = re.compile(r"[\s·⋅∙•×*.\-_^]+")
_BRACKETED = re.compile(r"\(([^()]*)\)|\[([^\[\]]*)\]|\{([^{}]*)\}")
_WORD_SEPARATORS = re.compile(r"[\s_]+")
_NON_WORD = re.compile(r"[^0-9a-z]+")
_WHEEL_WORDS = frozenset({"whp", "rwhp", "awhp", "fwhp", "wtq", "rwtq", "wtrq"})
_ROAD_SPEED_NAMES = ("road speed", "vehicle speed", "roller speed", "ground speed", "velocity")


@dataclass(frozen=True)
class DynoColumn:
    """A column of a dyno export that was used.

    Attributes
    ----------
    column : int
        1-based column number in the export.
    header : str
        The header text as written (stripped of surrounding space).
    quantity : ColumnQuantity
        Engine speed, torque or power.
    unit : ColumnUnit
        The unit the values were read in.
    at_wheels : bool
        Whether the header marks the figures as measured at the wheels.
    """

    column: int
    header: str
    quantity: ColumnQuantity
    unit: ColumnUnit
    at_wheels: bool = False


@dataclass(frozen=True)
class HeaderCell:
    """What one header cell says.

    Attributes
    ----------
    quantity : ColumnQuantity or None
        The quantity named or implied by the unit; None for a column to ignore.
    unit : ColumnUnit or None
        The unit, None when the cell names none (for torque and power, an error unless a
        units row supplies one).
    problem : str or None
        Why the cell cannot be used although it names a quantity (a wrong unit).
    problem_in_units_row : bool
        Whether the problem lies in the units row rather than in the header itself.
    at_wheels : bool
        Whether the header marks a wheel figure (see the module docstring).
    """

    quantity: ColumnQuantity | None
    unit: ColumnUnit | None
    problem: str | None = None
    problem_in_units_row: bool = False
    at_wheels: bool = False


def unit_from_text(text: str) -> ColumnUnit | None:
    """The unit a piece of text spells, or None.

    Parameters
    ----------
    text : str
        A unit as written, e.g. ``"lb-ft"``, ``"N·m"``, ``"min⁻¹"``.

    Returns
    -------
    ColumnUnit or None

    Examples
    --------
    >>> unit_from_text("N·m"), unit_from_text("Ft-Lbs"), unit_from_text("psi")
    (<ColumnUnit.NEWTON_METRE: 'N*m'>, <ColumnUnit.POUND_FORCE_FOOT: 'lbf*ft'>, None)
    """
    key = _IGNORED_IN_UNITS.sub("", text.lower().replace("⁻¹", "1"))
    return _UNITS.get(key)


def _split_unit(cell: str) -> tuple[str, str | None, ColumnUnit | None]:
    """Split a header cell into (name, unit text, unit)."""
    bracket = _BRACKETED.search(cell)
    if bracket is not None:
        unit_text = next(g for g in bracket.groups() if g is not None).strip()
        name = (cell[: bracket.start()] + " " + cell[bracket.end() :]).strip()
        return name, unit_text, unit_from_text(unit_text)
    whole = unit_from_text(cell)
    if whole is not None:
        return "", cell, whole
    words = _WORD_SEPARATORS.split(cell.strip())
    for k in (3, 2, 1):
        if len(words) > k:
            unit = unit_from_text("".join(words[-k:]))
            if unit is not None:
                return " ".join(words[:-k]), " ".join(words[-k:]), unit
    if "/" in cell:
        name, _, unit_text = cell.rpartition("/")
        unit = unit_from_text(unit_text)
        if unit is not None and name.strip():
            return name.strip(), unit_text.strip(), unit
    return cell, None, None


def is_wheel_header(cell: str) -> bool:
    """Whether a header cell marks its figures as measured at the wheels.

    Examples
    --------
    >>> is_wheel_header("WHP"), is_wheel_header("whl tq (lb-ft)"), is_wheel_header("BHP")
    (True, True, False)
    """
    plain = _NON_WORD.sub(" ", cell.lower())
    return "wheel" in plain or "whl" in plain or bool(set(plain.split()) & _WHEEL_WORDS)


def _named_quantity(name: str) -> tuple[ColumnQuantity | None, bool]:
    """The quantity a name states, and whether it states it firmly (not just "speed")."""
    plain = _NON_WORD.sub(" ", name.lower()).strip()
    words = set(plain.split())
    if "torque" in plain or words & {"tq", "trq", "wtq", "rwtq", "wtrq"}:
        return ColumnQuantity.TORQUE, True
    if "power" in plain or "pwr" in plain or words & (_WHEEL_WORDS - {"wtq", "rwtq", "wtrq"}):
        return ColumnQuantity.POWER, True
    if "force" in plain or "tractive" in plain or "traction" in words:
        return ColumnQuantity.FORCE, True
    if any(n in plain for n in _ROAD_SPEED_NAMES):
        return ColumnQuantity.ROAD_SPEED, True
    if words & {"rpm", "revs"} or "engine speed" in plain or "crank speed" in plain:
        return ColumnQuantity.ENGINE_SPEED, True
    if "speed" in words:
        return ColumnQuantity.ENGINE_SPEED, False
    return None, False


def _spoken(quantity: ColumnQuantity) -> str:
    """The quantity with its article, e.g. "an engine-speed"."""
    return {
        ColumnQuantity.ENGINE_SPEED: "an engine-speed",
        ColumnQuantity.TORQUE: "a torque",
        ColumnQuantity.POWER: "a power",
        ColumnQuantity.ROAD_SPEED: "a road-speed",
        ColumnQuantity.FORCE: "a force",
    }[quantity]


def read_header_cell(cell: str, unit_below: str = "") -> HeaderCell:
    """Recognise one header cell, with the cell under it when that line is a units row.

    Parameters
    ----------
    cell : str
        The header text of one column.
    unit_below : str
        The same column's cell in a units row under the header, or ``""``.

    Returns
    -------
    HeaderCell
        The quantity and unit, or the problem with a cell that names a quantity.

    Examples
    --------
    >>> read_header_cell("Torque [lb-ft]").unit
    <ColumnUnit.POUND_FORCE_FOOT: 'lbf*ft'>
    >>> read_header_cell("Engine Speed (rpm)").quantity
    <ColumnQuantity.ENGINE_SPEED: 'engine_speed'>
    >>> read_header_cell("Torque", unit_below="Nm").unit
    <ColumnUnit.NEWTON_METRE: 'N*m'>
    >>> read_header_cell("Boost (psi)").quantity is None
    True
    """
    name, unit_text, unit = _split_unit(cell.strip())
    below = unit_below.strip()
    in_row = False
    if below and unit_text is None:
        unit_text, unit, in_row = below, unit_from_text(below), True
    elif below and unit is not None and unit_from_text(below) not in (None, unit):
        return HeaderCell(
            unit.quantity,
            None,
            f"header {cell!r} gives the unit {unit_text!r} but the units row says {below!r}",
            True,
        )
    named, firm = _named_quantity(name)
    wheels = is_wheel_header(cell) or named is ColumnQuantity.FORCE
    if unit is not None:
        if named is not None and firm and named is not unit.quantity:
            return HeaderCell(
                named,
                None,
                f"header {cell!r} names {named.value.replace('_', ' ')} but its unit "
                f"{unit_text!r} is {_spoken(unit.quantity)} unit",
                in_row,
            )
        if unit.quantity is ColumnQuantity.FORCE and named is None:
            return HeaderCell(None, None)  # "N" or "lb" alone is too vague to use
        return HeaderCell(unit.quantity, unit, at_wheels=wheels)
    if named is None or not firm:
        return HeaderCell(None, None)
    if unit_text is not None:
        accepted = ", ".join(u.value for u in ColumnUnit if u.quantity is named)
        return HeaderCell(
            named,
            None,
            f"header {cell!r} has the unit {unit_text!r}, which is not {_spoken(named)} unit "
            f"(accepted: {accepted})",
            in_row,
        )
    if named is ColumnQuantity.ENGINE_SPEED:
        return HeaderCell(named, ColumnUnit.RPM)
    return HeaderCell(named, None, at_wheels=wheels)
