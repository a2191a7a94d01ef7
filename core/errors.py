"""Exceptions raised by the pure core.

Every exception is a ``ValueError`` so callers that only know the standard library still
catch it. Each carries ``parameter``: the core argument at fault (with an index where one
applies, e.g. ``"gear_ratios[2]"``), which the service maps onto the caller's field path.

::

    ValueError
     └── GearworkError            base of everything below
          ├── CurveError          torque or power curve, rev limit
          ├── TireSizeError       tire diameter, size code, revolutions per distance
          ├── DrivetrainError     gear ratios, final drive, reductions, efficiency
          ├── VehicleError        mass, geometry, road load, converter, launch
          ├── SimulationError     a run that cannot proceed (car cannot move, no finish)
          ├── CorrectionError     dyno correction: ambient conditions, correction factor
          ├── FitError            a fit to measured data that cannot be made (too few points)
          ├── DynoFileError       a dyno export that cannot be read (``line``, ``column``)
          └── LogDataError        a logged pass: bad channels, or a log text that cannot be
                                  read (``line``, ``column``)
"""

from __future__ import annotations

__all__ = [
    "CorrectionError",
    "CurveError",
    "DrivetrainError",
    "DynoFileError",
    "FitError",
    "GearworkError",
    "LogDataError",
    "SimulationError",
    "TireSizeError",
    "VehicleError",
]


class GearworkError(ValueError):
    """Base class of every error the core raises.

    Parameters
    ----------
    message : str
        What is wrong, naming the argument and the limit.
    parameter : str or None
        The core argument at fault, optionally with an index (``"rpm[3]"``).
    """

    def __init__(self, message: str, *, parameter: str | None = None) -> None:
        super().__init__(message)
        self.message = message
        self.parameter = parameter


class CurveError(GearworkError):
    """A torque or power curve, or the rev limit applied to it, is invalid."""


class TireSizeError(GearworkError):
    """A tire description cannot be parsed or gives an impossible size."""


class DrivetrainError(GearworkError):
    """Gear ratios, final drive, extra reduction or efficiency are invalid."""


class VehicleError(GearworkError):
    """Vehicle mass, geometry, road load, converter or launch data are invalid."""


class SimulationError(GearworkError):
    """A simulated run cannot proceed (the car cannot move or never reaches the finish)."""


class CorrectionError(GearworkError):
    """Ambient conditions or a correction factor for a dyno correction are invalid."""


class DynoFileError(GearworkError):
    """A dyno export cannot be read.

    Parameters
    ----------
    message : str
        What is wrong, naming the place in the text.
    line : int or None
        1-based line of the text at fault, or None when the whole text is at fault.
    column : int or None
        1-based column (cell number, counting the fields of the line) of the cell at fault;
        for a character that cannot appear in a text export, its 1-based character position
        in the line; None when no single cell is at fault.
    parameter : str or None
        The core argument at fault, ``"text"`` unless an option is.
    """

    def __init__(
        self,
        message: str,
        *,
        line: int | None = None,
        column: int | None = None,
        parameter: str | None = "text",
    ) -> None:
        super().__init__(message, parameter=parameter)
        self.line = line
        self.column = column


class FitError(GearworkError):
    """Measured data cannot be fitted: too few points, times not increasing, no motion."""


class LogDataError(GearworkError):
    """A logged pass cannot be used: bad channels, or a log text that cannot be read.

    Parameters
    ----------
    message : str
        What is wrong, naming the channel (and the sample index or line).
    parameter : str or None
        The channel at fault, with an index where one applies (``"time[12]"``).
    line, column : int or None
        For a log text: the 1-based line and column (cell) at fault, when one is.
    """

    def __init__(
        self,
        message: str,
        *,
        parameter: str | None = None,
        line: int | None = None,
        column: int | None = None,
    ) -> None:
        super().__init__(message, parameter=parameter)
        self.line = line
        self.column = column
