"""A torque converter in the drivetrain: the torque it passes into the gearbox in each gear.

At a gearbox input (turbine) speed ``n_t`` the converter settles where the engine's torque
equals what the converter absorbs, ``T_e(n) = (n/K(SR))**2`` with ``SR = n_t/n``
(:func:`core.converter.matching.converter_operating_points`), and passes ``TR(SR)`` times
the engine's torque on: its multiplication near stall, about 1:1 past coupling. In a gear
whose lock-up clutch may close, the converter is locked 1:1 wherever the turbine turns at
least the curve's first rpm. The shift plan, the per-gear tables, the chart and the
acceleration run all use this one model.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.vehicle import Coupling, Launch
from core.converter.matching import converter_operating_points
from core.converter.tables import TorqueConverter
from core.engine.curves import TorqueCurve

__all__ = ["ConverterDrive", "ConverterInput", "converter_input"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class ConverterDrive:
    """A converter and the gears in which its lock-up clutch may close.

    Attributes
    ----------
    converter : TorqueConverter
        The converter (its own lock-up speed ratio is not used; see ``lockup_gears``).
    lockup_gears : frozenset of int
        Gears (1 = first) locked 1:1 wherever the turbine turns at least the curve's first
        rpm.
    """

    converter: TorqueConverter
    lockup_gears: frozenset[int] = frozenset()

    @classmethod
    def of_launch(cls, launch: Launch | None) -> ConverterDrive | None:
        """The converter of a launch description, or None for a clutch (or no launch)."""
        if launch is None or launch.coupling is not Coupling.CONVERTER:
            return None
        if launch.converter is None:
            return None
        return cls(launch.converter, launch.lockup_gears)


@dataclass(frozen=True)
class ConverterInput:
    """What the converter delivers at each gearbox input speed.

    Attributes
    ----------
    torque_nm : ndarray
        Torque into the gearbox [N*m].
    engine_rpm : ndarray
        Engine speed [rpm].
    torque_ratio : ndarray
        Gearbox input torque over engine torque [-]; 1 when locked.
    """

    torque_nm: FloatArray
    engine_rpm: FloatArray
    torque_ratio: FloatArray


def converter_input(
    drive: ConverterDrive,
    curve: TorqueCurve,
    rev_limit_rpm: float,
    gear: int,
    n_in: FloatArray,
) -> ConverterInput:
    """Torque into the gearbox, engine speed and torque ratio at gearbox input speeds.

    Parameters
    ----------
    drive : ConverterDrive
        The converter and its lock-up gears.
    curve : TorqueCurve
        Engine torque.
    rev_limit_rpm : float
        Rev limit [rpm]; input speeds above it are taken at it.
    gear : int
        Gear index, 0 for first.
    n_in : ndarray, any shape
        Gearbox input (turbine) speed [rpm], >= 0.

    Returns
    -------
    ConverterInput
        Arrays of the shape of ``n_in``.
    """
    turbine = np.minimum(np.asarray(n_in, dtype=np.float64), rev_limit_rpm)
    engine = turbine.copy()
    torque = curve.torque_at(turbine)
    ratio = np.ones_like(turbine)
    slipping = np.ones(turbine.shape, dtype=np.bool_)
    if gear + 1 in drive.lockup_gears:
        slipping = turbine < curve.rpm_min
    if slipping.any():
        points = converter_operating_points(
            dataclasses.replace(drive.converter, lockup_speed_ratio=None),
            turbine[slipping],
            curve.torque_at,
            rpm_min=curve.rpm_min,
            rpm_max=rev_limit_rpm,
        )
        engine[slipping] = points.engine_rpm
        torque[slipping] = points.output_torque_nm
        ratio[slipping] = points.output_torque_nm / np.maximum(points.input_torque_nm, 1e-300)
    return ConverterInput(torque, engine, ratio)
