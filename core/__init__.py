"""gearwork core: pure gearing, shift-point and vehicle computation in SI units.

No web framework, no I/O, no module state. Functions take floats, NumPy arrays or frozen
dataclasses and return frozen dataclasses.
"""

from core.curves import (
    CurveSource,
    Interpolation,
    TorqueCurve,
    torque_curve_from_power,
    torque_curve_from_torque,
)
from core.drivetrain import Drivetrain, make_drivetrain
from core.errors import (
    CurveError,
    DrivetrainError,
    GearworkError,
    SimulationError,
    TireSizeError,
    VehicleError,
)
from core.gearing import GearTable, engine_rpm_at_speed, gear_tables, road_speed_m_s, rpm_grid
from core.plan import Notice, ShiftPlan, ShiftPoint, resolve_rev_limit, shift_plan
from core.shifting import ShiftChoice, ShiftReason, best_shift_rpm
from core.tires import (
    Tire,
    tire_from_diameter,
    tire_from_revs_per_km,
    tire_from_revs_per_mile,
    tire_from_size,
)

__all__ = [
    "CurveError",
    "CurveSource",
    "Drivetrain",
    "DrivetrainError",
    "GearTable",
    "GearworkError",
    "Interpolation",
    "Notice",
    "ShiftChoice",
    "ShiftPlan",
    "ShiftPoint",
    "ShiftReason",
    "SimulationError",
    "Tire",
    "TireSizeError",
    "TorqueCurve",
    "VehicleError",
    "best_shift_rpm",
    "engine_rpm_at_speed",
    "gear_tables",
    "make_drivetrain",
    "resolve_rev_limit",
    "road_speed_m_s",
    "rpm_grid",
    "shift_plan",
    "tire_from_diameter",
    "tire_from_revs_per_km",
    "tire_from_revs_per_mile",
    "tire_from_size",
    "torque_curve_from_power",
    "torque_curve_from_torque",
]
