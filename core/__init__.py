"""gearwork core: pure gearing, shift-point and vehicle computation in SI units.

No web framework, no I/O, no module state. Functions take floats, NumPy arrays or frozen
dataclasses and return frozen dataclasses.
"""

from core.atmosphere import (
    AirState,
    air_density_kg_m3,
    air_state,
    saturation_vapour_pressure_pa,
    standard_pressure_pa,
)
from core.converter import (
    TorqueConverter,
)
from core.converter_matching import (
    ConverterOperatingPoints,
    EngineTorqueFn,
    converter_operating_points,
    stall_speed_rpm,
)
from core.curves import (
    CurveSource,
    Interpolation,
    TorqueCurve,
    torque_curve_from_power,
    torque_curve_from_torque,
)
from core.drivetrain import (
    Drivetrain,
    make_drivetrain,
)
from core.errors import (
    CurveError,
    DrivetrainError,
    GearworkError,
    SimulationError,
    TireSizeError,
    VehicleError,
)
from core.gearing import (
    GearTable,
    engine_rpm_at_speed,
    gear_tables,
    road_speed_m_s,
    rpm_grid,
)
from core.inertia import (
    equivalent_mass_kg,
    mass_factor,
    rotating_mass_kg,
)
from core.plan import (
    Notice,
    ShiftPlan,
    ShiftPoint,
    resolve_rev_limit,
    shift_plan,
)
from core.roadload import (
    RoadLoad,
    RoadLoadForm,
    gradeability_percent,
)
from core.shifting import (
    ScalarDiff,
    ShiftChoice,
    ShiftReason,
    VectorEfforts,
    best_shifts,
)
from core.tires import (
    Tire,
    tire_from_diameter,
    tire_from_revs_per_km,
    tire_from_revs_per_mile,
    tire_from_size,
)
from core.traction import (
    AxleGeometry,
    AxleLoads,
    DriveLayout,
    axle_loads,
    traction_limit_n,
)

__all__ = [
    "AirState",
    "AxleGeometry",
    "AxleLoads",
    "ConverterOperatingPoints",
    "CurveError",
    "CurveSource",
    "DriveLayout",
    "Drivetrain",
    "DrivetrainError",
    "EngineTorqueFn",
    "GearTable",
    "GearworkError",
    "Interpolation",
    "Notice",
    "RoadLoad",
    "RoadLoadForm",
    "ScalarDiff",
    "ShiftChoice",
    "ShiftPlan",
    "ShiftPoint",
    "ShiftReason",
    "SimulationError",
    "Tire",
    "TireSizeError",
    "TorqueConverter",
    "TorqueCurve",
    "VectorEfforts",
    "VehicleError",
    "air_density_kg_m3",
    "air_state",
    "axle_loads",
    "best_shifts",
    "converter_operating_points",
    "engine_rpm_at_speed",
    "equivalent_mass_kg",
    "gear_tables",
    "gradeability_percent",
    "make_drivetrain",
    "mass_factor",
    "resolve_rev_limit",
    "road_speed_m_s",
    "rotating_mass_kg",
    "rpm_grid",
    "saturation_vapour_pressure_pa",
    "shift_plan",
    "stall_speed_rpm",
    "standard_pressure_pa",
    "tire_from_diameter",
    "tire_from_revs_per_km",
    "tire_from_revs_per_mile",
    "tire_from_size",
    "torque_curve_from_power",
    "torque_curve_from_torque",
    "traction_limit_n",
]
