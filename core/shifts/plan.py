"""The shift plan: gear tables plus the shift for every gear change, from wheel force."""

from __future__ import annotations

import dataclasses
import functools
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.converter.drive import ConverterDrive, converter_input
from core.driveline.drivetrain import Drivetrain
from core.driveline.gearing import GearTable, gear_tables, road_speed_m_s, rpm_grid
from core.driveline.tires import Tire
from core.engine.curves import RPM_TO_RAD_S, CurveSource, TorqueCurve
from core.errors import CurveError
from core.notices import Notice
from core.shifts.best import ShiftChoice, ShiftReason, best_shifts
from core.shifts.overtake import force_crossings

__all__ = ["ShiftPlan", "ShiftPoint", "resolve_rev_limit", "shift_plan", "shift_point"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class ShiftPoint:
    """One gear change.

    Attributes
    ----------
    from_gear, to_gear : int
        Gear numbers, 1 for first.
    shift_rpm : float
        Engine speed at the shift [rpm].
    shift_speed_m_s : float
        Road speed at the shift [m/s].
    rpm_after : float
        Engine speed after the shift, shift_rpm * ratio_next / ratio_current [rpm] (with a
        slipping torque converter, the engine speed it settles at in the next gear).
    rpm_drop : float
        shift_rpm - rpm_after [rpm].
    reason : ShiftReason
        Force crossover or rev limit.
    force_before_n, force_after_n : float
        Tractive force just before and just after the shift [N].
    crossings : int
        Number of points in the gears' shared range where the next gear overtakes.
    coincident_rpm : tuple of float or None
        Band of engine rpm in the current gear where both gears give the same force, if any
        (with a slipping torque converter, the engine speeds at the band's turbine speeds).
    intersections : int
        How many times the two gears' curves intersect in the shared range, either way.
    overtake_rpm : tuple of float
        Engine rpm in the current gear at each point where the next gear overtakes.
    """

    from_gear: int
    to_gear: int
    shift_rpm: float
    shift_speed_m_s: float
    rpm_after: float
    rpm_drop: float
    reason: ShiftReason
    force_before_n: float
    force_after_n: float
    crossings: int
    coincident_rpm: tuple[float, float] | None
    intersections: int = 0
    overtake_rpm: tuple[float, ...] = ()


@dataclass(frozen=True)
class ShiftPlan:
    """Gear tables and shifts for one curve, drivetrain and tire.

    Attributes
    ----------
    gears : tuple of GearTable
        One table per forward gear.
    shifts : tuple of ShiftPoint
        One per gear change (gear count - 1).
    rev_limit_rpm : float
        Rev limit used [rpm], after clipping to the curve.
    efficiency_applied : bool
        False for a chassis-dyno curve, which is already net of driveline losses.
    peak_torque_rpm, peak_power_rpm : float
        Where the curve peaks [rpm].
    peak_torque_nm, peak_power_w : float
        The peaks themselves [N*m, W].
    notices : tuple of Notice
        Warnings about the inputs or the result.
    """

    gears: tuple[GearTable, ...]
    shifts: tuple[ShiftPoint, ...]
    rev_limit_rpm: float
    efficiency_applied: bool
    peak_torque_rpm: float
    peak_power_rpm: float
    peak_torque_nm: float
    peak_power_w: float
    notices: tuple[Notice, ...]


def resolve_rev_limit(
    curve: TorqueCurve, rev_limit_rpm: float | None
) -> tuple[float, tuple[Notice, ...]]:
    """The rev limit to use: the caller's, clipped to the curve's last point.

    Parameters
    ----------
    curve : TorqueCurve
        The torque curve.
    rev_limit_rpm : float or None
        Caller's rev limit [rpm]; None means the curve's last point.

    Returns
    -------
    tuple of (float, tuple of Notice)
        The rev limit [rpm] and any notice about clipping.

    Raises
    ------
    CurveError
        When the rev limit is not finite or does not exceed the curve's first point.
    """
    if rev_limit_rpm is None:
        return curve.rpm_max, ()
    if not math.isfinite(rev_limit_rpm) or rev_limit_rpm <= curve.rpm_min:
        raise CurveError(
            f"`rev_limit_rpm` must be above the curve's first point ({curve.rpm_min:g} rpm), "
            f"got {rev_limit_rpm:g}",
            parameter="rev_limit_rpm",
        )
    if rev_limit_rpm > curve.rpm_max:
        note = Notice(
            "rev_limit_clipped",
            f"Rev limit {rev_limit_rpm:g} rpm is above the curve's last point; the plan "
            f"stops at {curve.rpm_max:g} rpm (the curve is not extrapolated).",
            "rev_limit_rpm",
        )
        return curve.rpm_max, (note,)
    return float(rev_limit_rpm), ()


_EFFICIENCY_NOT_APPLIED = Notice(
    "efficiency_not_applied",
    "The curve is from a chassis dyno and already net of driveline losses; the given "
    "efficiency is not applied again.",
    "efficiency",
)


def _choice_notices(
    gear: int, choice: ShiftChoice, rpm_after: float, rpm_min: float
) -> list[Notice]:
    """What a reader should know about the change from ``gear`` to the next one."""
    notes = []
    if rpm_after < rpm_min:
        notes.append(
            Notice(
                "gear_gap",
                f"Shifting {gear}-{gear + 1} at the rev limit drops the engine to "
                f"{rpm_after:.0f} rpm, below the curve's first point ({rpm_min:g} rpm); "
                "the force after the shift is taken at that point.",
                "gear_ratios",
            )
        )
    if choice.coincident_rpm is not None:
        lo, hi = choice.coincident_rpm
        notes.append(
            Notice(
                "coincident_force",
                f"Gears {gear} and {gear + 1} give the same tractive force from {lo:.0f} "
                f"to {hi:.0f} rpm; any shift in that band is equally quick.",
            )
        )
    if choice.crossings > 1:
        notes.append(
            Notice(
                "multiple_crossovers",
                f"Gears {gear} and {gear + 1} cross {choice.crossings} times; the shift "
                "that crosses their shared speed range quickest was chosen.",
            )
        )
    if choice.below_range:
        notes.append(
            Notice(
                "next_gear_stronger",
                f"Gear {gear + 1} pulls harder than gear {gear} wherever both are on the "
                "curve; shift as soon as the next gear reaches the curve's first point.",
            )
        )
    return notes


def shift_plan(
    curve: TorqueCurve,
    drivetrain: Drivetrain,
    tire: Tire,
    *,
    rev_limit_rpm: float | None = None,
    rpm_step: float | None = None,
    converter: ConverterDrive | None = None,
) -> ShiftPlan:
    """Gear tables and wheel-force shift points.

    With a torque converter the tables and the force comparison count its torque ratio at
    the speed ratio it runs at; each shift is found in gearbox input (turbine) speed, which
    is proportional to road speed, and reported at the engine speed the tachometer shows.

    Parameters
    ----------
    curve : TorqueCurve
        Torque over engine speed; a chassis curve is used without efficiency.
    drivetrain : Drivetrain
        Gear ratios, final drive, extra reduction and efficiency.
    tire : Tire
        Driven tires.
    rev_limit_rpm : float, optional
        Rev limit [rpm]; defaults to the curve's last point and is clipped to it.
    rpm_step : float, optional
        Row spacing of the gear tables [rpm]; default the curve's own points.
    converter : ConverterDrive, optional
        The torque converter and its lock-up gears, if the drivetrain has one.

    Returns
    -------
    ShiftPlan

    Examples
    --------
    >>> from core.engine.curves import torque_curve_from_torque, Interpolation
    >>> from core.driveline.drivetrain import make_drivetrain
    >>> from core.driveline.tires import tire_from_diameter
    >>> c = torque_curve_from_torque([1000, 4000, 7000], [350, 200, 50],
    ...                              interpolation=Interpolation.LINEAR)
    >>> p = shift_plan(c, make_drivetrain([3.0, 2.0], 1.0), tire_from_diameter(0.6))
    >>> round(p.shifts[0].shift_rpm, 3), round(p.shifts[0].rpm_after, 3)
    (4800.0, 3200.0)
    """
    limit, notices = resolve_rev_limit(curve, rev_limit_rpm)
    notes = list(notices)
    chassis = curve.source is CurveSource.CHASSIS
    efficiency = np.ones(drivetrain.gear_count) if chassis else drivetrain.efficiency
    if chassis and np.any(drivetrain.efficiency != 1.0):
        notes.append(_EFFICIENCY_NOT_APPLIED)
    rows = rpm_grid(curve, limit, rpm_step)
    tables = gear_tables(curve, drivetrain, tire, rows, efficiency, converter)
    ratios = drivetrain.overall_ratios
    r = tire.rolling_radius_m
    force_per_torque = ratios * efficiency / r
    if converter is None:
        shifts = _clutch_shifts(curve, ratios, force_per_torque, r, limit, notes)
    else:
        shifts = _converter_shifts(curve, (ratios, force_per_torque, r), limit, converter, notes)
    torque_rpm, power_rpm = curve.peak_torque_rpm(), curve.peak_power_rpm()
    return ShiftPlan(
        gears=tables,
        shifts=shifts,
        rev_limit_rpm=limit,
        efficiency_applied=not chassis,
        peak_torque_rpm=torque_rpm,
        peak_power_rpm=power_rpm,
        peak_torque_nm=curve.torque_scalar(torque_rpm),
        peak_power_w=curve.torque_scalar(power_rpm) * power_rpm * RPM_TO_RAD_S,
        notices=tuple(notes),
    )


def shift_point(
    i: int,
    choice: ShiftChoice,
    rpm: tuple[float, float],
    speed_m_s: float,
    forces: tuple[float, float],
    overtake_rpm: tuple[float, ...],
) -> ShiftPoint:
    """The record of one gear change, from the search's choice and what it means.

    Parameters
    ----------
    i : int
        Gear index of the change, 0 for 1-2.
    choice : ShiftChoice
        The chosen shift (reason, crossings, coincident band, intersections).
    rpm : tuple of float
        Engine speed at the shift and after it [rpm].
    speed_m_s : float
        Road speed at the shift [m/s].
    forces : tuple of float
        Wheel force just before and just after the shift [N].
    overtake_rpm : tuple of float
        Engine speed in the current gear at each overtake [rpm].

    Returns
    -------
    ShiftPoint
    """
    before, after = rpm
    return ShiftPoint(
        from_gear=i + 1,
        to_gear=i + 2,
        shift_rpm=before,
        shift_speed_m_s=speed_m_s,
        rpm_after=after,
        rpm_drop=before - after,
        reason=choice.reason,
        force_before_n=forces[0],
        force_after_n=forces[1],
        crossings=choice.crossings,
        coincident_rpm=choice.coincident_rpm,
        intersections=choice.intersections,
        overtake_rpm=overtake_rpm,
    )


def _clutch_shifts(
    curve: TorqueCurve,
    ratios: FloatArray,
    force_per_torque: FloatArray,
    r: float,
    limit: float,
    notes: list[Notice],
) -> tuple[ShiftPoint, ...]:
    """Every gear change without a torque converter (engine speed is gearbox input speed);
    the notices of each appended to ``notes``. ``force_per_torque`` is each gear's wheel
    force per unit engine torque [1/m], ``r`` the rolling radius [m]."""
    step = ratios[1:] / ratios[:-1]
    k_cur, k_next = force_per_torque[:-1, None], force_per_torque[1:, None]
    kc: list[float] = force_per_torque[:-1].tolist()
    kn: list[float] = force_per_torque[1:].tolist()
    qs: list[float] = step.tolist()

    def efforts(n: FloatArray) -> tuple[FloatArray, FloatArray]:
        # both gears' torque in one compiled evaluation
        both = curve.torque_fast(np.concatenate((n, n * step[:, None])))
        cur, nxt = both[: step.size], both[step.size :]
        cur *= k_cur
        nxt *= k_next
        return cur, nxt

    choices = best_shifts(
        efforts,
        None,
        curve.rpm_min / step,
        np.full(step.size, limit),
        cell_crossings=functools.partial(force_crossings, curve, kc, kn, qs),
    )
    torque = curve.torque_scalar
    shifts = []
    for i, (choice, g1, q) in enumerate(zip(choices, ratios.tolist(), qs, strict=False)):
        n = choice.shift_rpm
        after = n * q
        notes.extend(_choice_notices(i + 1, choice, after, curve.rpm_min))
        forces = (kc[i] * torque(n), kn[i] * torque(after))
        speed = n * RPM_TO_RAD_S * r / g1
        shifts.append(shift_point(i, choice, (n, after), speed, forces, choice.overtake_rpm))
    return tuple(shifts)


def _converter_shifts(
    curve: TorqueCurve,
    gearing: tuple[FloatArray, FloatArray, float],
    limit: float,
    converter: ConverterDrive,
    notes: list[Notice],
) -> tuple[ShiftPoint, ...]:
    """Every gear change with a torque converter, found in gearbox input (turbine) speed
    and reported in engine speed; the notices of each appended to ``notes``. ``gearing``
    holds the overall ratios, each gear's wheel force per unit input torque [1/m] and the
    rolling radius [m]."""
    ratios, force_per_torque, r = gearing
    k_cur, k_next = force_per_torque[:-1], force_per_torque[1:]
    step = ratios[1:] / ratios[:-1]

    def drive(gear: int, n: float) -> tuple[float, float]:
        """Input torque [N*m] and engine speed [rpm] at turbine speed ``n`` [rpm]."""
        got = converter_input(converter, curve, limit, gear, np.array([n]))
        return float(got.torque_nm[0]), float(got.engine_rpm[0])

    def efforts(n: FloatArray) -> tuple[FloatArray, FloatArray]:
        def torque(gear: int, n: FloatArray) -> FloatArray:
            return converter_input(converter, curve, limit, gear, n).torque_nm

        cur = np.stack([k_cur[k] * torque(k, n[k]) for k in range(step.size)])
        nxt = np.stack([k_next[k] * torque(k + 1, n[k] * step[k]) for k in range(step.size)])
        return cur, nxt

    choices = best_shifts(efforts, None, curve.rpm_min / step, np.full(step.size, limit))
    kc: list[float] = k_cur.tolist()
    kn: list[float] = k_next.tolist()
    shifts = []
    pairs = zip(choices, ratios.tolist(), step.tolist(), strict=False)
    for i, (found, g1, q) in enumerate(pairs):
        turbine = found.shift_rpm
        before, n_s = drive(i, turbine)
        after_torque, after = drive(i + 1, turbine * q)
        band = found.coincident_rpm
        # the band, like every rpm reported, in engine speed
        choice = found
        if band is not None:
            choice = dataclasses.replace(
                found, coincident_rpm=(drive(i, band[0])[1], drive(i, band[1])[1])
            )
        notes.extend(_choice_notices(i + 1, choice, after, curve.rpm_min))
        forces = (kc[i] * before, kn[i] * after_torque)
        speed = float(road_speed_m_s(turbine, g1, r))
        overtake = tuple(drive(i, x)[1] for x in choice.overtake_rpm)
        shifts.append(shift_point(i, choice, (n_s, after), speed, forces, overtake))
    return tuple(shifts)
