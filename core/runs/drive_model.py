"""The drive model: everything that fixes the car's net acceleration in each gear.

:class:`DriveModel` takes a quasi-static engine, clutch or converter, the traction limit
with weight transfer, road load and the rotating masses (Gillespie ch. 2).

A converter's operating point depends on the turbine speed alone, so the model solves it
once per car on a table of turbine speeds (:attr:`DriveModel.converter_map`) and every
run reads it by linear interpolation.
"""

from __future__ import annotations

import dataclasses
import functools
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
from core.shifts.plan import resolve_rev_limit

__all__ = ["DriveModel", "FinalDriveMasses", "drive_model"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class FinalDriveMasses:
    """The car's masses as ``A + B*f**2`` in its final drive ratio f [kg].

    Attributes
    ----------
    effective_base_kg, effective_per_f2_kg : ndarray, shape (g,)
        ``A`` and ``B`` of the effective mass in each gear [kg].
    decoupled_base_kg, decoupled_per_f2_kg : float
        ``A`` and ``B`` of the mass while the engine slips [kg].
    """

    effective_base_kg: FloatArray
    effective_per_f2_kg: FloatArray
    decoupled_base_kg: float
    decoupled_per_f2_kg: float


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
    def final_drive_masses(self) -> FinalDriveMasses:
        """The effective and decoupled masses as ``A + B*f**2`` in the final drive ratio f,
        fixed once per car by the vehicle's own methods at f = 1 and f = 2 (see
        :func:`core.choice.batch_drive.candidate_masses`)."""
        vehicle, tire, base = self.vehicle, self.tire, self.drivetrain
        one = dataclasses.replace(base, final_drive_ratio=1.0)
        two = dataclasses.replace(base, final_drive_ratio=2.0)
        e1, e2 = vehicle.effective_mass_kg(one, tire), vehicle.effective_mass_kg(two, tire)
        d1, d2 = vehicle.decoupled_mass_kg(one, tire), vehicle.decoupled_mass_kg(two, tire)
        b_eff = (e2 - e1) / 3.0
        b_dec = (d2 - d1) / 3.0
        return FinalDriveMasses(e1 - b_eff, b_eff, d1 - b_dec, b_dec)

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
