"""The vehicle as the acceleration model sees it: mass, road load, grip, rotating parts,
and how the drive is taken up at launch (clutch or torque converter)."""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.inertia import mass_factor, rotating_mass_kg
from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout, traction_limit_n
from core.checks import require_range
from core.converter.tables import TorqueConverter
from core.driveline.drivetrain import Drivetrain
from core.driveline.tires import Tire
from core.errors import VehicleError

__all__ = ["MIN_FRICTION_COEFFICIENT", "Coupling", "Launch", "RotatingInertia", "Vehicle"]

FloatArray = NDArray[np.float64]
MIN_FRICTION_COEFFICIENT = 0.05
"""Least tire-road friction coefficient accepted [-]: glare ice is about 0.05-0.1 (common
practice); below it no car accelerates or climbs."""


@dataclass(frozen=True)
class RotatingInertia:
    """Inertias of the rotating parts (Gillespie ch. 2).

    Attributes
    ----------
    engine_kg_m2 : float
        Everything at engine speed: crank, flywheel or converter, clutch, gearbox input
        [kg*m^2].
    driveshaft_kg_m2 : float
        Driveshaft and parts turning with it [kg*m^2].
    wheels_kg_m2 : float
        All wheels, tires and axle shafts together [kg*m^2].
    """

    engine_kg_m2: float
    driveshaft_kg_m2: float
    wheels_kg_m2: float

    def __post_init__(self) -> None:
        require_range(self.engine_kg_m2, "engine_kg_m2", 0.0, 10.0, VehicleError)
        require_range(self.driveshaft_kg_m2, "driveshaft_kg_m2", 0.0, 10.0, VehicleError)
        require_range(self.wheels_kg_m2, "wheels_kg_m2", 0.0, 200.0, VehicleError)


@dataclass(frozen=True)
class Vehicle:
    """Mass, road load, axle geometry and grip of a vehicle.

    Attributes
    ----------
    mass_kg : float
        Test mass with driver and fuel [kg].
    road_load : RoadLoad
        Drag, rolling resistance and grade (built for the same mass).
    geometry : AxleGeometry
        Wheelbase, CG height and position.
    layout : DriveLayout
        Driven axles.
    friction_coefficient : float
        Peak tire-road friction coefficient [-].
    front_torque_share : float or None
        Front share of drive torque for all-wheel drive.
    inertia : RotatingInertia or None
        Rotating parts; None uses the mass-factor approximation 1.04 + 0.0025*N^2.
    """

    mass_kg: float
    road_load: RoadLoad
    geometry: AxleGeometry
    layout: DriveLayout
    friction_coefficient: float
    front_torque_share: float | None = None
    inertia: RotatingInertia | None = None

    def __post_init__(self) -> None:
        require_range(self.mass_kg, "mass_kg", 50.0, 50_000.0, VehicleError)
        require_range(
            self.friction_coefficient,
            "friction_coefficient",
            MIN_FRICTION_COEFFICIENT,
            5.0,
            VehicleError,
        )

    def traction_limit_n(self) -> float:
        """Largest tractive force the driven tires put down, with weight transfer [N].

        Gillespie eqs. 2-19 and 2-20 with the rolling-resistance term: the transfer is
        ``(h/L)*(Fx - Rx)``, ``Rx`` the road load's speed-independent rolling part at rest
        (``fr*W*cos(theta)``, or a coast-down ``F0``), on the road load's grade. The part of
        the rolling resistance growing with speed is left out: the limit binds at launch.
        """
        load = self.road_load
        rolling = float(load.rolling_resistance_n(np.array([0.0]))[0])
        return traction_limit_n(
            self.mass_kg,
            self.geometry,
            self.friction_coefficient,
            self.layout,
            front_torque_share=self.front_torque_share,
            rolling_resistance_n=rolling,
            grade_percent=load.grade_percent,
        )

    def decoupled_mass_kg(self, drivetrain: Drivetrain, tire: Tire) -> float:
        """Mass plus the rotating parts that turn with the wheels while the engine slips
        (clutch slipping, converter below coupling) [kg]: the mass factor's fixed 0.04,
        or the driveshaft and wheel inertias."""
        if self.inertia is None:
            return self.mass_kg * 1.04
        final = drivetrain.final_drive_ratio  # a transfer case or drop gear sits ahead of it
        r = tire.rolling_radius_m
        return (
            self.mass_kg
            + (self.inertia.driveshaft_kg_m2 * final**2 + self.inertia.wheels_kg_m2) / r**2
        )

    def effective_mass_kg(self, drivetrain: Drivetrain, tire: Tire) -> FloatArray:
        """Mass plus the equivalent mass of the rotating parts in each gear [kg], shape (g,)."""
        ratios = drivetrain.overall_ratios
        if self.inertia is None:
            return self.mass_kg * mass_factor(ratios)
        extra = rotating_mass_kg(
            ratios,
            drivetrain.final_drive_ratio,  # the driveshaft turns at the final drive ratio
            tire.rolling_radius_m,
            engine_inertia_kg_m2=self.inertia.engine_kg_m2,
            driveshaft_inertia_kg_m2=self.inertia.driveshaft_kg_m2,
            wheel_inertia_kg_m2=self.inertia.wheels_kg_m2,
        )
        return self.mass_kg + extra


class Coupling(enum.Enum):
    """How engine and gearbox are joined."""

    CLUTCH = "clutch"
    CONVERTER = "converter"


@dataclass(frozen=True)
class Launch:
    """Coupling, launch and shift behaviour.

    Attributes
    ----------
    coupling : Coupling
        Clutch or torque converter.
    launch_rpm : float
        Clutch: the engine speed held while the clutch slips, until the wheels catch up
        [rpm]. Ignored with a converter.
    converter : TorqueConverter or None
        The converter, required with ``Coupling.CONVERTER``.
    lockup_gears : frozenset of int
        Gears (1 = first) in which the converter's lock-up clutch may close.
    shift_time_s : float
        Time with no drive during each upshift [s].
    """

    coupling: Coupling = Coupling.CLUTCH
    launch_rpm: float = 3000.0
    converter: TorqueConverter | None = None
    lockup_gears: frozenset[int] = frozenset()
    shift_time_s: float = 0.25

    def __post_init__(self) -> None:
        require_range(self.launch_rpm, "launch_rpm", 300.0, 30_000.0, VehicleError)
        require_range(self.shift_time_s, "shift_time_s", 0.0, 5.0, VehicleError)
        if self.coupling is Coupling.CONVERTER and self.converter is None:
            raise VehicleError(
                "`converter` must be given with a converter coupling", parameter="converter"
            )
