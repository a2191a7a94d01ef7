"""Acceleration runs, integrated over road speed rather than stepped in time.

In each gear the net acceleration is a function of speed alone (quasi-static engine,
converter and road load),

    a_g(v) = (min(F_g(v), F_traction) - R(v)) / m_g

with ``F_g`` the drive force through the clutch or converter, ``F_traction`` the closed-form
traction limit with weight transfer, ``R`` the road load and ``m_g`` the mass plus the
equivalent mass of the rotating parts in that gear (Gillespie ch. 2). Time and distance
follow as integrals over speed, ``t = int dv / a`` and ``x = int v dv / a``, evaluated for a
whole gear at once with ``scipy.integrate.cumulative_trapezoid`` on a speed grid: no Python
loop per time step. A shift takes ``shift_time_s`` with no drive, during which the car
slows at the road-load deceleration of the shift speed. Once the net acceleration falls
below ``MIN_ACCELERATION`` the car is taken to hold its speed (drag or rev limiter).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.integrate import cumulative_trapezoid

from core.converter_drive import ConverterDrive, converter_input
from core.curves import RPM_TO_RAD_S, CurveSource, TorqueCurve
from core.drivetrain import Drivetrain
from core.errors import SimulationError
from core.plan import Notice, resolve_rev_limit
from core.tires import Tire
from core.vehicle import Coupling, Launch, Vehicle

__all__ = [
    "MAX_SPEED_M_S",
    "MIN_ACCELERATION",
    "POINTS_PER_GEAR",
    "DriveModel",
    "RunResult",
    "RunShift",
    "checked_shift_rpm",
    "drive_model",
    "simulate_run",
]

FloatArray = NDArray[np.float64]
MIN_ACCELERATION = 0.05  # [m/s^2]; below this the car is taken to hold speed
POINTS_PER_GEAR = 241
MAX_SPEED_M_S = 150.0  # [m/s], no run integrates beyond this


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
        converter = self.launch.converter
        if converter is None:  # Launch.__post_init__ forbids it; kept for the type
            raise SimulationError("`converter` is missing", parameter="converter")
        drive = ConverterDrive(converter, self.launch.lockup_gears)
        out = converter_input(drive, curve, limit, gear, n_in)
        return out.torque_nm, out.engine_rpm

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
    held_speed_m_s : float or None
        Speed the car settled at when it stopped accelerating (drag or rev limiter), if it did.
    held_by : str or None
        ``"drag"`` or ``"rev_limit"`` when the car settled.
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
    held_speed_m_s: float | None
    held_by: str | None
    notices: tuple[Notice, ...]


def checked_shift_rpm(model: DriveModel, shift_rpm: ArrayLike) -> FloatArray:
    """Shift rpms as an array, one per gear change, each above the curve's first point
    and at most the rev limit [rpm].

    Raises
    ------
    SimulationError
        On a wrong count or an rpm out of range, naming ``shift_rpm[i]``.
    """
    gears = model.drivetrain.gear_count
    shifts = np.asarray(shift_rpm, dtype=np.float64)
    if shifts.shape != (gears - 1,):
        raise SimulationError(
            f"`shift_rpm` must give one rpm per gear change ({gears - 1}), got {shifts.size}",
            parameter="shift_rpm",
        )
    for i, n in enumerate(shifts.tolist()):
        if not math.isfinite(n) or not model.curve.rpm_min < n <= model.rev_limit_rpm + 1e-9:
            raise SimulationError(
                f"`shift_rpm[{i}]` must lie above the curve's first point "
                f"({model.curve.rpm_min:g}) and at most the rev limit "
                f"({model.rev_limit_rpm:g}), got {n:g}",
                parameter=f"shift_rpm[{i}]",
            )
    return shifts


def _start_gear(model: DriveModel, v0: float, shift_speed: FloatArray) -> int:
    for g in range(shift_speed.size):
        if v0 < shift_speed[g]:
            return g
    return int(shift_speed.size) - 1


def simulate_run(
    model: DriveModel,
    shift_rpm: Sequence[float] | FloatArray,
    *,
    start_speed_m_s: float = 0.0,
    cover_distance_m: float,
    cover_speed_m_s: float = 0.0,
) -> RunResult:
    """Simulate a full-throttle run.

    Parameters
    ----------
    model : DriveModel
        The car.
    shift_rpm : sequence of float, length g - 1
        Engine speed at which to leave each gear [rpm], at most the rev limit.
    start_speed_m_s : float
        0 for a standing start (the launch gear slips its clutch or converter), else a
        rolling start in the lowest gear whose shift speed lies above it [m/s].
    cover_distance_m : float
        The run continues at least this far from the start [m].
    cover_speed_m_s : float
        ... and until this speed, if the car can reach it [m/s].

    Returns
    -------
    RunResult

    Raises
    ------
    SimulationError
        When the car cannot move off, or the shift rpm list does not fit the gears.
    """
    gears = model.drivetrain.gear_count
    shifts_in = checked_shift_rpm(model, shift_rpm)
    if not 0.0 <= start_speed_m_s < MAX_SPEED_M_S:
        raise SimulationError(
            f"`start_speed_m_s` must lie in [0, {MAX_SPEED_M_S:g}), got {start_speed_m_s}",
            parameter="start_speed_m_s",
        )
    notes: list[Notice] = []
    shift_speed = np.array(
        [model.speed_at_rpm(g, float(n)) for g, n in enumerate(shifts_in.tolist())]
        + [model.speed_at_rpm(gears - 1, model.rev_limit_rpm)]
    )
    if start_speed_m_s >= shift_speed[-1]:
        raise SimulationError(
            f"`start_speed_m_s` ({start_speed_m_s:.1f} m/s) must be below the top gear's "
            f"rev-limit speed ({shift_speed[-1]:.1f} m/s)",
            parameter="start_speed_m_s",
        )
    if (
        start_speed_m_s == 0.0
        and model.launch.coupling is Coupling.CLUTCH
        and gears > 1
        and model.launch_rpm >= shifts_in[0]
    ):
        notes.append(
            Notice(
                "launch_above_shift",
                f"The launch rpm ({model.launch_rpm:.0f}) is at or above the first shift rpm "
                f"({shifts_in[0]:.0f}): first gear is left while the clutch still slips.",
                "launch_rpm",
            )
        )
    g = _start_gear(model, start_speed_m_s, shift_speed)
    launching = start_speed_m_s == 0.0
    v_in, t0, x0 = start_speed_m_s, 0.0, 0.0
    parts: dict[str, list[FloatArray]] = {k: [] for k in ("t", "v", "x", "n", "a")}
    gear_parts: list[NDArray[np.int64]] = []
    limited_parts: list[NDArray[np.bool_]] = []
    events: list[RunShift] = []
    held: float | None = None
    held_by: str | None = None
    target_v = min(max(cover_speed_m_s, 0.0), MAX_SPEED_M_S)

    def shift(g: int, v_out: float, rpm_before: float) -> float:
        """No drive for shift_time_s, slowing at the road-load deceleration."""
        nonlocal t0, x0
        ts = model.launch.shift_time_s
        decel = float(model.vehicle.road_load.force_n(np.array([v_out]))[0])
        decel /= model.vehicle.mass_kg
        v_after = max(v_out - decel * ts, 0.0)
        n_after = float(model.coupled_rpm(g + 1, np.array([v_after]))[0])
        events.append(RunShift(g + 1, g + 2, t0, v_out, x0, rpm_before, max(n_after, 0.0)))
        if ts > 0.0:
            parts["t"].append(np.array([t0 + ts]))
            parts["v"].append(np.array([v_after]))
            parts["x"].append(np.array([x0 + 0.5 * (v_out + v_after) * ts]))
            parts["n"].append(np.array([n_after]))
            parts["a"].append(np.array([-decel]))
            gear_parts.append(np.array([g + 2], dtype=np.int64))
            limited_parts.append(np.array([False]))
            t0, x0 = t0 + ts, x0 + 0.5 * (v_out + v_after) * ts
        return v_after

    while True:
        v_top = float(shift_speed[g])
        v_end = min(v_top, MAX_SPEED_M_S)
        if g < gears - 1 and v_in >= v_end:
            # entered above its own shift speed: the gear is left at once
            notes.append(
                Notice(
                    "gear_left_at_once",
                    f"Gear {g + 1} lands above its shift rpm ({shifts_in[g]:.0f}); it is "
                    "left as soon as it is entered.",
                    f"shift_rpm[{g}]",
                )
            )
            rpm_in = float(model.coupled_rpm(g, np.array([v_in]))[0])
            g, v_in, launching = g + 1, shift(g, v_in, rpm_in), False
            continue
        grid = np.linspace(v_in, v_end, POINTS_PER_GEAR)
        if launching and model.launch.coupling is Coupling.CLUTCH:
            v_lock = model.speed_at_rpm(g, model.launch_rpm)
            if v_in < v_lock < v_end:
                grid = np.union1d(grid, [v_lock])
        a, rpm, limited = model.acceleration(g, grid, launching=launching)
        if g < gears - 1:
            # leave the gear when the engine reaches the shift rpm: with a slipping
            # converter that comes before the coupled speed of the shift rpm
            due = np.flatnonzero(rpm >= shifts_in[g] * (1.0 - 1e-9))
            if due.size and 0 < int(due[0]) < grid.size - 1:
                k = int(due[0])
                frac = (shifts_in[g] - rpm[k - 1]) / (rpm[k] - rpm[k - 1])
                v_cut = float(grid[k - 1] + frac * (grid[k] - grid[k - 1]))
                v_top = v_cut
                grid = np.append(grid[:k], v_cut)
                a = np.append(a[:k], a[k - 1] + frac * (a[k] - a[k - 1]))
                rpm = np.append(rpm[:k], shifts_in[g])
                limited = np.append(limited[:k], limited[k - 1])
        weak = np.flatnonzero(a < MIN_ACCELERATION)
        stop = weak.size > 0
        if stop:
            k = int(weak[0])
            if k == 0:
                if not parts["t"]:
                    raise SimulationError(
                        "The car cannot move off: road load and grade exceed the drive "
                        "force at the start.",
                        parameter="start_speed_m_s",
                    )
                held, held_by = v_in, "drag"
                break
            # speed where the acceleration falls to the floor, by linear interpolation
            frac = (a[k - 1] - MIN_ACCELERATION) / (a[k - 1] - a[k])
            v_stop = float(grid[k - 1] + frac * (grid[k] - grid[k - 1]))
            keep = grid < v_stop
            grid = np.append(grid[keep], v_stop)
            a = np.append(a[keep], MIN_ACCELERATION)
            rpm = np.append(rpm[keep], rpm[k - 1] + frac * (rpm[k] - rpm[k - 1]))
            limited = np.append(limited[keep], False)
        inv = 1.0 / a
        t = t0 + cumulative_trapezoid(inv, grid, initial=0.0)
        x = x0 + cumulative_trapezoid(grid * inv, grid, initial=0.0)
        for key, arr in (("t", t), ("v", grid), ("x", x), ("n", rpm), ("a", a)):
            parts[key].append(arr)
        gear_parts.append(np.full(grid.size, g + 1, dtype=np.int64))
        limited_parts.append(limited)
        t0, x0, v_out = float(t[-1]), float(x[-1]), float(grid[-1])
        if stop:
            held = v_out
            held_by = "rev_limit" if v_out >= v_top * (1 - 1e-6) else "drag"
            break
        if g == gears - 1 or v_out >= MAX_SPEED_M_S:
            held, held_by = v_out, "rev_limit"
            break
        if x0 >= cover_distance_m and v_out >= target_v:
            break
        g, v_in, launching = g + 1, shift(g, v_out, float(rpm[-1])), False

    time = np.concatenate(parts["t"])
    speed = np.concatenate(parts["v"])
    dist = np.concatenate(parts["x"])
    rpm_all = np.concatenate(parts["n"])
    accel = np.concatenate(parts["a"])
    gear_all = np.concatenate(gear_parts)
    limited_all = np.concatenate(limited_parts)
    if held is not None and dist[-1] < cover_distance_m:
        # hold the settled speed for the rest of the distance asked for
        extra_t = (cover_distance_m - dist[-1]) / max(held, 1e-9)
        time = np.append(time, time[-1] + extra_t)
        speed = np.append(speed, held)
        dist = np.append(dist, cover_distance_m)
        rpm_all = np.append(rpm_all, rpm_all[-1])
        accel = np.append(accel, 0.0)
        gear_all = np.append(gear_all, gear_all[-1])
        limited_all = np.append(limited_all, False)
        where = "the rev limit in top gear" if held_by == "rev_limit" else "its drag limit"
        notes.append(
            Notice(
                "speed_held",
                f"The car reached {where} at {held:.1f} m/s after {time[-2]:.1f} s and is "
                "taken to hold that speed for the rest of the run.",
            )
        )
    return RunResult(
        time_s=time,
        speed_m_s=speed,
        distance_m=dist,
        gear=gear_all,
        engine_rpm=rpm_all,
        acceleration_m_s2=accel,
        traction_limited=limited_all,
        shifts=tuple(events),
        shift_rpm=shifts_in,
        held_speed_m_s=held,
        held_by=held_by,
        notices=tuple(model.notices) + tuple(notes),
    )
