"""Acceleration runs of one car: the drive model and a run as a batch of one.

:class:`DriveModel` fixes the car's net acceleration in each gear (quasi-static engine,
clutch or converter, traction limit with weight transfer, road load and the rotating
masses, Gillespie ch. 2). :func:`simulate_run` integrates one run with the integrator of
:mod:`core.runs.integrator`, the same code that integrates many final drive candidates at once
(:func:`core.runs.batch.batch_runs`), and keeps its trace.

A converter's operating point depends on the turbine speed alone, so the model solves it
once per car on a table of turbine speeds (:attr:`DriveModel.converter_map`) and every
run reads it by linear interpolation.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.vehicle import Coupling, Launch, Vehicle
from core.converter.operating_map import ConverterMap, converter_map
from core.driveline.drivetrain import Drivetrain
from core.driveline.tires import Tire
from core.engine.curves import RPM_TO_RAD_S, CurveSource, TorqueCurve
from core.errors import SimulationError
from core.notices import Notice
from core.runs.integrator import (
    MAX_SPEED_M_S,
    POINTS_PER_GEAR,
    GearBlock,
    RunEnds,
    RunStart,
    ShiftBlock,
    integrate_runs,
)
from core.shifts.plan import resolve_rev_limit
from core.shifts.shift_rpm import checked_shift_rpm

__all__ = [
    "MAX_SPEED_M_S",
    "POINTS_PER_GEAR",
    "DriveModel",
    "RunResult",
    "RunShift",
    "default_start_gear",
    "drive_model",
    "simulate_run",
]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class DriveModel:
    """Everything that fixes the car's net acceleration in each gear.

    Attributes
    ----------
    curve : TorqueCurve
        Engine (or chassis) torque.
    drivetrain : Drivetrain
        Ratios.
    tire : Tire
        Driven tires.
    vehicle : Vehicle
        Mass, road load, grip.
    launch : Launch
        Coupling, launch rpm and shift time.
    rev_limit_rpm : float
        Rev limit used [rpm].
    efficiency : ndarray, shape (g,)
        Driveline efficiency applied per gear (ones for a chassis curve).
    effective_mass_kg : ndarray, shape (g,)
        Mass plus rotating equivalent per gear [kg].
    decoupled_mass_kg : float
        Mass plus the parts turning with the wheels, used while the clutch or converter
        slips and the engine does not follow the wheels [kg].
    traction_limit_n : float
        Traction-limited tractive force [N].
    launch_rpm : float
        Clutch slip speed used, clipped to the curve and the rev limit [rpm].
    notices : tuple of Notice
        Warnings raised while assembling the model.
    """

    curve: TorqueCurve
    drivetrain: Drivetrain
    tire: Tire
    vehicle: Vehicle
    launch: Launch
    rev_limit_rpm: float
    efficiency: FloatArray
    effective_mass_kg: FloatArray
    decoupled_mass_kg: float
    traction_limit_n: float
    launch_rpm: float
    notices: tuple[Notice, ...]

    def coupled_rpm(self, gear: int, speed_m_s: FloatArray) -> FloatArray:
        """Gearbox input speed [rpm] at road speeds in gear index ``gear`` (0 = first)."""
        ratio = float(self.drivetrain.overall_ratios[gear])
        return speed_m_s * ratio / (self.tire.rolling_radius_m * RPM_TO_RAD_S)

    def speed_at_rpm(self, gear: int, rpm: float) -> float:
        """Road speed [m/s] at gearbox input speed ``rpm`` in gear index ``gear``."""
        ratio = float(self.drivetrain.overall_ratios[gear])
        return rpm * RPM_TO_RAD_S * self.tire.rolling_radius_m / ratio

    def drive(
        self, gear: int, speed_m_s: FloatArray, *, launching: bool = False
    ) -> tuple[FloatArray, FloatArray]:
        """Drive force [N] at the contact patch and engine speed [rpm], before traction.

        Parameters
        ----------
        gear : int
            Gear index, 0 for first.
        speed_m_s : ndarray, shape (n,)
            Road speeds [m/s], >= 0.
        launching : bool
            True in the launch gear from rest: a clutch slips at the launch rpm until the
            wheels catch up.

        Returns
        -------
        tuple of ndarray, shape (n,)
            Force [N] (zero above the rev-limit speed) and engine speed [rpm].
        """
        n_in = self.coupled_rpm(gear, speed_m_s)
        torque, engine = self.gearbox_input(gear, n_in, launching=launching)
        ratio = float(self.drivetrain.overall_ratios[gear])
        force = torque * ratio * float(self.efficiency[gear]) / self.tire.rolling_radius_m
        force = np.where(n_in > self.rev_limit_rpm * (1.0 + 1e-9), 0.0, force)
        return force, engine

    def gearbox_input(
        self, gear: int, n_in: FloatArray, *, launching: bool = False
    ) -> tuple[FloatArray, FloatArray]:
        """Torque into the gearbox [N*m] and engine speed [rpm] at gearbox input speeds.

        Parameters
        ----------
        gear : int
            Gear index, 0 for first (a converter may be locked in it).
        n_in : ndarray, any shape
            Gearbox input speed [rpm].
        launching : bool
            A clutch slips at the launch rpm until the input catches up.

        Returns
        -------
        tuple of ndarray, the shape of ``n_in``
            Torque [N*m] and engine speed [rpm]. A clutch passes the engine's torque; a
            converter its output torque, locked 1:1 in a lock-up gear wherever the turbine
            turns at least the curve's first rpm.
        """
        curve, limit = self.curve, self.rev_limit_rpm
        if self.launch.coupling is Coupling.CLUTCH:
            floor = self.launch_rpm if launching else curve.rpm_min
            engine = np.maximum(n_in, floor)
            return curve.torque_at(np.minimum(engine, limit)), engine
        turbine = np.minimum(n_in, limit)
        table = self.converter_map
        nodes, engine_map, torque_map = table.turbine_rpm, table.engine_rpm, table.output_torque_nm
        if gear + 1 not in self.launch.lockup_gears:
            return np.interp(turbine, nodes, torque_map), np.interp(turbine, nodes, engine_map)
        engine = turbine.copy()
        torque = curve.torque_at(turbine)
        slipping = turbine < curve.rpm_min
        if slipping.any():
            engine[slipping] = np.interp(turbine[slipping], nodes, engine_map)
            torque[slipping] = np.interp(turbine[slipping], nodes, torque_map)
        return torque, engine

    @functools.cached_property
    def converter_map(self) -> ConverterMap:
        """The converter's operating point against turbine speed (lock-up open), from 0 to
        the rev limit, tabulated once per car by
        :func:`core.converter.operating_map.converter_map`.
        """
        converter = self.launch.converter
        if converter is None:
            raise SimulationError("`converter` is missing", parameter="converter")
        return converter_map(
            converter, self.curve.torque_at, rpm_min=self.curve.rpm_min, rpm_max=self.rev_limit_rpm
        )

    def acceleration(
        self, gear: int, speed_m_s: FloatArray, *, launching: bool = False
    ) -> tuple[FloatArray, FloatArray, NDArray[np.bool_]]:
        """Net acceleration [m/s^2], engine speed [rpm] and traction-limited flags."""
        force, engine = self.drive(gear, speed_m_s, launching=launching)
        limited = force > self.traction_limit_n
        usable = np.minimum(force, self.traction_limit_n)
        resist = self.vehicle.road_load.force_n(np.maximum(speed_m_s, 0.0))
        # the engine's inertia rides with the car only while it follows the wheels
        slipping = engine > self.coupled_rpm(gear, speed_m_s) * (1.0 + 1e-6) + 1e-6
        mass = np.where(slipping, self.decoupled_mass_kg, float(self.effective_mass_kg[gear]))
        return (usable - resist) / mass, engine, limited


def drive_model(
    curve: TorqueCurve,
    drivetrain: Drivetrain,
    tire: Tire,
    vehicle: Vehicle,
    launch: Launch,
    *,
    rev_limit_rpm: float | None = None,
) -> DriveModel:
    """Assemble the acceleration model of a car.

    Parameters
    ----------
    curve : TorqueCurve
        Torque curve; a chassis curve is used without driveline efficiency.
    drivetrain : Drivetrain
        Ratios and efficiency.
    tire : Tire
        Driven tires.
    vehicle : Vehicle
        Mass, road load, geometry, grip, rotating parts.
    launch : Launch
        Clutch or converter, launch rpm, lock-up gears, shift time.
    rev_limit_rpm : float, optional
        Rev limit [rpm], clipped to the curve.

    Returns
    -------
    DriveModel
    """
    limit, notices = resolve_rev_limit(curve, rev_limit_rpm)
    notes = list(notices)
    chassis = curve.source is CurveSource.CHASSIS
    efficiency = np.ones(drivetrain.gear_count) if chassis else drivetrain.efficiency
    launch_rpm = min(max(launch.launch_rpm, curve.rpm_min), limit)
    if launch.coupling is Coupling.CLUTCH and launch_rpm != launch.launch_rpm:
        notes.append(
            Notice(
                "launch_rpm_clipped",
                f"Launch rpm {launch.launch_rpm:g} lies outside the curve and rev limit; "
                f"{launch_rpm:g} rpm is used.",
                "launch_rpm",
            )
        )
    bad_gears = sorted(g for g in launch.lockup_gears if not 1 <= g <= drivetrain.gear_count)
    if bad_gears:
        raise SimulationError(
            f"`lockup_gears` must name gears 1 to {drivetrain.gear_count}, got {bad_gears[0]}",
            parameter="lockup_gears",
        )
    return DriveModel(
        curve=curve,
        drivetrain=drivetrain,
        tire=tire,
        vehicle=vehicle,
        launch=launch,
        rev_limit_rpm=limit,
        efficiency=efficiency,
        effective_mass_kg=vehicle.effective_mass_kg(drivetrain, tire),
        decoupled_mass_kg=vehicle.decoupled_mass_kg(drivetrain, tire),
        traction_limit_n=vehicle.traction_limit_n(),
        launch_rpm=launch_rpm,
        notices=tuple(notes),
    )


@dataclass(frozen=True)
class RunShift:
    """One upshift during a run.

    Attributes
    ----------
    from_gear, to_gear : int
        Gear numbers, 1 for first.
    time_s, speed_m_s, distance_m : float
        When, how fast and how far from the start the shift began [s, m/s, m].
    rpm_before, rpm_after : float
        Engine speed as the shift begins and once the next gear takes up the drive [rpm].
    """

    from_gear: int
    to_gear: int
    time_s: float
    speed_m_s: float
    distance_m: float
    rpm_before: float
    rpm_after: float


@dataclass(frozen=True)
class RunResult:
    """A simulated run from its start until it covered the distance and speed asked for.

    Attributes
    ----------
    time_s, speed_m_s, distance_m : ndarray, shape (n,)
        The run's trace [s, m/s, m]; distance from the start of motion.
    gear : ndarray of int, shape (n,)
        Gear number at each point (during a shift, the gear being left).
    engine_rpm, acceleration_m_s2 : ndarray, shape (n,)
        Engine speed [rpm] and net acceleration [m/s^2].
    traction_limited : ndarray of bool, shape (n,)
        Where the tires, not the engine, capped the drive.
    shifts : tuple of RunShift
        Every upshift.
    shift_rpm : ndarray, shape (g - 1,)
        Shift rpm used for each gear change.
    start_gear : int
        Gear the run started in (1 = first).
    held_speed_m_s : float or None
        The drag-limited speed the run approaches (it follows the approach to within a
        part per million, then carries on at it) or the speed it is held at by the rev
        limiter in top gear [m/s]; None when it did neither.
    held_by : str or None
        ``"drag"`` or ``"rev_limit"`` accordingly.
    notices : tuple of Notice
        Warnings about the run.
    """

    time_s: FloatArray
    speed_m_s: FloatArray
    distance_m: FloatArray
    gear: NDArray[np.int64]
    engine_rpm: FloatArray
    acceleration_m_s2: FloatArray
    traction_limited: NDArray[np.bool_]
    shifts: tuple[RunShift, ...]
    shift_rpm: FloatArray
    start_gear: int
    held_speed_m_s: float | None
    held_by: str | None
    notices: tuple[Notice, ...]


def default_start_gear(model: DriveModel, shift_rpm: FloatArray, start_speed_m_s: float) -> int:
    """The lowest gear that can pull the start speed below its shift rpm (1 = first).

    The top gear, which has no shift rpm, takes anything below its rev-limit speed.
    """
    gears = model.drivetrain.gear_count
    for g in range(gears - 1):
        if start_speed_m_s < model.speed_at_rpm(g, float(shift_rpm[g])):
            return g + 1
    return gears


def _checked_start(
    model: DriveModel, shifts: FloatArray, start_speed_m_s: float, start_gear: int | None
) -> int:
    """The start gear number, checked against the start speed."""
    gears = model.drivetrain.gear_count
    if not 0.0 <= start_speed_m_s < MAX_SPEED_M_S:
        raise SimulationError(
            f"`start_speed_m_s` must lie in [0, {MAX_SPEED_M_S:g}), got {start_speed_m_s}",
            parameter="start_speed_m_s",
        )
    top_speed = model.speed_at_rpm(gears - 1, model.rev_limit_rpm)
    if start_speed_m_s >= top_speed:
        raise SimulationError(
            f"`start_speed_m_s` ({start_speed_m_s:.1f} m/s) must be below the top gear's "
            f"rev-limit speed ({top_speed:.1f} m/s)",
            parameter="start_speed_m_s",
        )
    if start_gear is None:
        return default_start_gear(model, shifts, start_speed_m_s)
    if not 1 <= start_gear <= gears:
        raise SimulationError(
            f"`start_gear` must name a gear from 1 to {gears}, got {start_gear}",
            parameter="start_gear",
        )
    rpm = float(model.coupled_rpm(start_gear - 1, np.array([start_speed_m_s]))[0])
    if rpm >= model.rev_limit_rpm:
        raise SimulationError(
            f"`start_gear` {start_gear} would turn {rpm:.0f} rpm at the start speed, at or "
            f"above the rev limit ({model.rev_limit_rpm:.0f} rpm)",
            parameter="start_gear",
        )
    return start_gear


class _Trace:
    """A :class:`core.runs.integrator.RunSink` keeping the one run's trace."""

    def __init__(self) -> None:
        self.parts: list[tuple[FloatArray, ...]] = []
        self.gears: list[NDArray[np.int64]] = []
        self.limited: list[NDArray[np.bool_]] = []
        self.shifts: list[RunShift] = []

    def gear(self, block: GearBlock) -> None:
        t, v = block.time_s[0], block.speed_m_s[0]
        keep = np.ones(t.size, dtype=np.bool_)  # drop the padding that repeats a point
        keep[1:] = (np.diff(t) > 0.0) | (np.diff(v) != 0.0)
        cols = (t, v, block.distance_m[0], block.engine_rpm[0], block.acceleration_m_s2[0])
        self.parts.append(tuple(c[keep] for c in cols))
        self.gears.append(np.full(int(keep.sum()), block.gear + 1, dtype=np.int64))
        self.limited.append(block.traction_limited[0][keep])

    def shift(self, block: ShiftBlock) -> None:
        g, decel = block.gear, float(block.deceleration_m_s2[0])
        self.shifts.append(
            RunShift(
                g + 1,
                g + 2,
                float(block.time_s[0]),
                float(block.speed_m_s[0]),
                float(block.distance_m[0]),
                float(block.rpm_before[0]),
                max(float(block.rpm_after[0]), 0.0),
            )
        )
        if block.end_time_s[0] <= block.time_s[0]:
            return  # an instant shift adds no points
        # the coast through the shift: decelerating from its first instant
        pair = (
            np.array([block.time_s[0], block.end_time_s[0]]),
            np.array([block.speed_m_s[0], block.end_speed_m_s[0]]),
            np.array([block.distance_m[0], block.end_distance_m[0]]),
            np.array([block.rpm_before[0], max(float(block.rpm_after[0]), 0.0)]),
            np.array([-decel, -decel]),
        )
        self.parts.append(pair)
        self.gears.append(np.array([g + 1, g + 2], dtype=np.int64))
        self.limited.append(np.zeros(2, dtype=np.bool_))


def _run_notices(
    model: DriveModel, shifts: FloatArray, ends: RunEnds, trace: _Trace, start_speed: float
) -> list[Notice]:
    notes: list[Notice] = []
    gears = model.drivetrain.gear_count
    if (
        start_speed == 0.0
        and model.launch.coupling is Coupling.CLUTCH
        and gears > 1
        and model.launch_rpm >= shifts[0]
    ):
        notes.append(
            Notice(
                "launch_above_shift",
                f"The launch rpm ({model.launch_rpm:.0f}) is at or above the first shift rpm "
                f"({shifts[0]:.0f}): first gear is left while the clutch still slips.",
                "launch_rpm",
            )
        )
    for g in np.flatnonzero(ends.left_at_once[0]).tolist():
        notes.append(
            Notice(
                "gear_left_at_once",
                f"Gear {g + 1} lands above its shift rpm ({shifts[g]:.0f}); it is "
                "left as soon as it is entered.",
                f"shift_rpm[{g}]",
            )
        )
    stalled = int(ends.stalled_gear[0])
    if stalled >= 0:
        notes.append(
            Notice(
                "gear_cannot_pull",
                f"Gear {stalled + 1} cannot accelerate the car at the speed it is entered "
                "with; the run ends there and later distances and speeds are not reached.",
                f"shift_rpm[{stalled - 1}]",
            )
        )
    settled = float(ends.settled_m_s[0])
    if ends.settled_by[0] == "drag":
        notes.append(
            Notice(
                "drag_limited_speed",
                f"The car approaches its drag-limited speed of {settled:.1f} m/s in gear "
                f"{int(trace.gears[-1][-1])} and never quite reaches it; the run follows "
                "the approach to within a part per million and carries on at that speed.",
            )
        )
    elif ends.settled_by[0] == "rev_limit":
        notes.append(
            Notice(
                "rev_limit_held",
                f"The car reaches the rev limit in gear {int(trace.gears[-1][-1])} at "
                f"{settled:.1f} m/s and is held there (no acceleration) for the rest of the "
                "run.",
            )
        )
    return notes


def simulate_run(
    model: DriveModel,
    shift_rpm: Sequence[float] | FloatArray,
    *,
    start_speed_m_s: float = 0.0,
    start_gear: int | None = None,
    cover_distance_m: float,
    cover_speed_m_s: float = 0.0,
) -> RunResult:
    """Simulate a full-throttle run: the integrator of :mod:`core.runs.integrator` with one row.

    Parameters
    ----------
    model : DriveModel
        The car.
    shift_rpm : sequence of float, length g - 1
        Engine speed at which to leave each gear [rpm], at most the rev limit.
    start_speed_m_s : float
        0 for a standing start (the launch gear slips its clutch or converter), else a
        rolling start [m/s].
    start_gear : int, optional
        Gear to start in (1 = first); by default the lowest gear that can pull the start
        speed below its shift rpm (:func:`default_start_gear`).
    cover_distance_m : float
        The run continues at least this far from the start [m].
    cover_speed_m_s : float
        ... and until this speed, if the car can reach it [m/s].

    Returns
    -------
    RunResult
        A car that cannot reach its next shift goes on towards its drag-limited speed; one
        whose next gear cannot pull it ends early, and its trace stops there.

    Raises
    ------
    SimulationError
        When the car cannot move off, or the shift rpm list, start speed or start gear do
        not fit the gears.
    """
    shifts = checked_shift_rpm(
        model.curve, model.rev_limit_rpm, model.drivetrain.gear_count, shift_rpm
    )
    gear = _checked_start(model, shifts, start_speed_m_s, start_gear)
    trace = _Trace()
    start = RunStart(start_speed_m_s, gear - 1, cover_distance_m, cover_speed_m_s)
    ratio = model.drivetrain.overall_ratios[None, :]
    masses = (model.effective_mass_kg[None, :], np.array([model.decoupled_mass_kg]))
    ends = integrate_runs(model, ratio, masses, shifts, start, trace)
    if not ends.moved[0]:
        raise SimulationError(
            "The car cannot move off: road load and grade exceed the drive force at the start.",
            parameter="start_speed_m_s",
        )
    columns = [np.concatenate(c) for c in zip(*trace.parts, strict=True)]
    notes = _run_notices(model, shifts, ends, trace, start_speed_m_s)
    settled = float(ends.settled_m_s[0])
    return RunResult(
        time_s=columns[0],
        speed_m_s=columns[1],
        distance_m=columns[2],
        gear=np.concatenate(trace.gears),
        engine_rpm=columns[3],
        acceleration_m_s2=columns[4],
        traction_limited=np.concatenate(trace.limited),
        shifts=tuple(trace.shifts),
        shift_rpm=shifts,
        start_gear=gear,
        held_speed_m_s=settled if math.isfinite(settled) else None,
        held_by=ends.settled_by[0],
        notices=tuple(model.notices) + tuple(notes),
    )
