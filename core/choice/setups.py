"""The figures a setup comparison puts side by side: shifts, reach per gear, cruise rpm,
top speed and the timed run of one car setup.

A parts counter compares a base setup with variants (another axle ratio, taller tires, a
different gear set, rev limit, mass or converter); each variant is a complete setup, so the
same function describes them all and the caller subtracts.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.vehicle import Launch, Vehicle
from core.converter.drive import ConverterDrive
from core.driveline.drivetrain import Drivetrain
from core.driveline.gearing import engine_rpm_at_speed
from core.driveline.tires import Tire
from core.engine.curves import TorqueCurve
from core.notices import Notice
from core.runs.drive_model import drive_model
from core.runs.performance import ShiftCriterion, acceleration_shift_points
from core.runs.report import RunReport, run_report
from core.shifts.plan import ShiftPlan, ShiftPoint, shift_plan

__all__ = ["Setup", "SetupFigures", "setup_figures"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class Setup:
    """One complete car setup.

    Attributes
    ----------
    curve : TorqueCurve
        Engine (or chassis) torque.
    drivetrain : Drivetrain
        Ratios and efficiency.
    tire : Tire
        Driven tires.
    rev_limit_rpm : float or None
        Rev limit [rpm]; None for the curve's last point.
    vehicle : Vehicle or None
        The car, for the timed run and top speed.
    launch : Launch or None
        Clutch or converter (with ``vehicle``); None for a clutch launch at 3000 rpm.
    """

    curve: TorqueCurve
    drivetrain: Drivetrain
    tire: Tire
    rev_limit_rpm: float | None = None
    vehicle: Vehicle | None = None
    launch: Launch | None = None


@dataclass(frozen=True)
class SetupFigures:
    """What one setup does.

    Attributes
    ----------
    plan : ShiftPlan
        The wheel-force plan (gear reach, crossover shifts).
    shifts : tuple of ShiftPoint
        The shifts used: the plan's, or the net-acceleration shifts of the described car.
    speed_at_rev_limit_m_s : ndarray, shape (g,)
        Road speed at the rev limit in each gear [m/s].
    cruise_rpm : ndarray, shape (s, g)
        Engine speed in each gear at each cruise speed, no slip [rpm].
    report : RunReport or None
        The timed standing-start run with ``shifts``, with the car described.
    notices : tuple of Notice
        Warnings about the setup.
    """

    plan: ShiftPlan
    shifts: tuple[ShiftPoint, ...]
    speed_at_rev_limit_m_s: FloatArray
    cruise_rpm: FloatArray
    report: RunReport | None
    notices: tuple[Notice, ...]


def setup_figures(
    setup: Setup,
    *,
    criterion: ShiftCriterion = ShiftCriterion.TRACTIVE_FORCE,
    cruise_speeds_m_s: Sequence[float] = (),
) -> SetupFigures:
    """Shifts, reach, cruise rpm and (with the car described) the timed run of a setup.

    Parameters
    ----------
    setup : Setup
        The setup.
    criterion : ShiftCriterion
        Shift by wheel-force crossover, or by net acceleration (needs the vehicle; without
        one the wheel-force plan is used).
    cruise_speeds_m_s : sequence of float
        Road speeds at which to give the rpm in every gear [m/s].

    Returns
    -------
    SetupFigures

    Examples
    --------
    >>> from core.engine.curves import Interpolation, torque_curve_from_torque
    >>> from core.driveline.drivetrain import make_drivetrain
    >>> from core.driveline.tires import tire_from_diameter
    >>> c = torque_curve_from_torque([1000, 4000, 7000], [350, 200, 50],
    ...                              interpolation=Interpolation.LINEAR)
    >>> s = setup_figures(Setup(c, make_drivetrain([3.0, 2.0], 1.0), tire_from_diameter(0.6)))
    >>> round(s.shifts[0].shift_rpm, 3), round(s.shifts[0].rpm_after, 3)
    (4800.0, 3200.0)
    """
    converter = None if setup.vehicle is None else ConverterDrive.of_launch(setup.launch)
    plan = shift_plan(
        setup.curve,
        setup.drivetrain,
        setup.tire,
        rev_limit_rpm=setup.rev_limit_rpm,
        converter=converter,
    )
    ratios = setup.drivetrain.overall_ratios
    r = setup.tire.rolling_radius_m
    cruise = np.array(
        [[float(engine_rpm_at_speed(v, n, r)) for n in ratios.tolist()] for v in cruise_speeds_m_s]
    ).reshape(len(cruise_speeds_m_s), ratios.size)
    reach = np.array([g.max_speed_m_s for g in plan.gears])
    shifts, report, notes = plan.shifts, None, list(plan.notices)
    if setup.vehicle is not None:
        model = drive_model(
            setup.curve,
            setup.drivetrain,
            setup.tire,
            setup.vehicle,
            setup.launch or Launch(),
            rev_limit_rpm=setup.rev_limit_rpm,
        )
        if criterion is ShiftCriterion.NET_ACCELERATION:
            shifts = acceleration_shift_points(model)
        report = run_report(model, [s.shift_rpm for s in shifts])
        notes += [n for n in report.run.notices if n not in notes]
    return SetupFigures(plan, shifts, reach, cruise, report, tuple(notes))
