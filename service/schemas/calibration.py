"""Request and response of POST /v1/calibration/pass: the car fitted to a logged pass."""

from __future__ import annotations

from typing import Literal

from pydantic import ConfigDict, Field

from service.schemas.calibration_example import CALIBRATION_EXAMPLE
from service.schemas.common import ApiModel, NoticeOut, Reference, UnitLabels, UnitsRequest
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.job import JobField
from service.schemas.log_analysis import LogIn
from service.schemas.vehicle import LaunchIn, VehicleIn

__all__ = [
    "CalibratedBlockOut",
    "CalibrationFitOut",
    "CalibrationOptionsIn",
    "CalibrationRequest",
    "CalibrationResponse",
    "CalibrationTraceOut",
    "CorrelationOut",
    "FiguresOut",
    "FittedFigureOut",
    "GearFitOut",
]

MAX_TRACE_POINTS = 400


class CalibrationOptionsIn(ApiModel):
    """How the logged pass is read."""

    smoothing_window: float = Field(
        0.3,
        ge=0.05,
        le=2.0,
        description="Savitzky-Golay window of the log check that finds gears and shifts [s].",
    )
    start_gear: int = Field(
        1, ge=1, le=12, description="Gear of the first segment when rpm is not logged."
    )


class CalibrationRequest(UnitsRequest):
    """A logged full-throttle pass and the car as described; its figures are the priors."""

    model_config = ConfigDict(json_schema_extra={"examples": [CALIBRATION_EXAMPLE]})

    reference: Reference
    job: JobField
    log: LogIn
    engine: EngineIn
    drivetrain: DrivetrainIn = Field(
        description="Ratios and tire as run; `efficiency` is the prior of the fitted efficiency."
    )
    vehicle: VehicleIn = Field(
        description="The car as run: mass as weighed; `inertia` (or the mass-factor rule "
        "when omitted) and the drag are the priors of the fit."
    )
    launch: LaunchIn = Field(
        default_factory=LaunchIn,
        description="Clutch or converter and shift time, as the car was driven.",
    )
    options: CalibrationOptionsIn = Field(default_factory=CalibrationOptionsIn)


class FittedFigureOut(ApiModel):
    """One fitted figure with its standard uncertainty."""

    value: float = Field(description="Fitted value.")
    std_error: float = Field(description="Standard uncertainty (1 sigma), from the Jacobian.")
    prior: float = Field(description="The caller's value: the start and the weak prior.")
    bounds: list[float] = Field(min_length=2, max_length=2, description="Bounds of the fit.")
    fitted: bool = Field(description="False when held (efficiency with a chassis curve).")
    at_bound: bool = Field(description="True when the fit ended on a bound.")


class FiguresOut(ApiModel):
    """The three fitted figures."""

    mass_factor: FittedFigureOut = Field(
        description="Multiplier k on the rotating parts' equivalent mass [-]: effective "
        "mass m + k Mr in each gear; 1 = the caller's inertias (or the mass-factor rule)."
    )
    efficiency: FittedFigureOut = Field(description="Driveline efficiency, every gear [-].")
    drag_area: FittedFigureOut = Field(description="Cd times frontal area [m^2 | ft^2].")


class CorrelationOut(ApiModel):
    """Correlation of the fitted figures."""

    names: list[str] = Field(description="Figures, in the order of the matrix rows.")
    matrix: list[list[float]] = Field(description="Correlation coefficients [-].")


class CalibrationFitOut(ApiModel):
    """How the simulation was lined up with the log, and how well it fits."""

    start: Literal["standing", "rolling"]
    launch_time: float = Field(
        description="Log time of the simulated start: the fitted launch instant (standing) "
        "or the first sample fitted (rolling) [s]."
    )
    start_speed: float = Field(description="Simulated start speed [km/h | mph].")
    fitted_from: float = Field(description="First logged sample fitted [s].")
    fitted_until: float = Field(description="Last logged sample fitted [s].")
    samples: int = Field(description="Logged samples fitted.")
    gears_from: Literal["rpm", "acceleration"]
    residual_rms: float = Field(description="Fitted minus logged speed, RMS [km/h | mph].")
    residual_max: float = Field(description="Largest residual magnitude [km/h | mph].")
    residual_rms_before: float = Field(
        description="RMS residual with the caller's figures [km/h | mph]."
    )


class GearFitOut(ApiModel):
    """The fit in one logged gear."""

    gear: int
    start_time: float = Field(description="First logged sample in the gear [s].")
    end_time: float = Field(description="Last logged sample in the gear [s].")
    samples: int
    residual_rms: float | None = Field(description="[km/h | mph]; null without samples.")
    residual_max: float | None = Field(description="[km/h | mph]; null without samples.")
    time_error: float | None = Field(
        description="Model's time at the logged speed of the gear's end, less the logged "
        "time [s]: positive where the model is slower; null where it does not get there."
    )
    shift_rpm: float | None = Field(
        description="Engine speed the simulation left the gear at, from the logged shift "
        "speed [rpm]; null for the last gear."
    )
    effective_mass: float = Field(description="Calibrated mass plus rotating parts [kg | lb].")
    effective_mass_before: float = Field(description="The caller's [kg | lb].")


class CalibratedBlockOut(ApiModel):
    """The calibrated car, ready to paste into the run, shift plan and sweep requests."""

    vehicle: VehicleIn
    drivetrain: DrivetrainIn


class CalibrationTraceOut(ApiModel):
    """Logged and fitted speed at the fitted samples (thinned to at most 400 points)."""

    time: list[float] = Field(max_length=MAX_TRACE_POINTS, description="[s]")
    logged_speed: list[float] = Field(max_length=MAX_TRACE_POINTS, description="[km/h | mph]")
    fitted_speed: list[float] = Field(max_length=MAX_TRACE_POINTS, description="[km/h | mph]")


class CalibrationResponse(ApiModel):
    """Fitted figures with uncertainties, the fit gear by gear, and the calibrated car."""

    reference: Reference
    units: UnitLabels
    figures: FiguresOut
    correlation: CorrelationOut
    fit: CalibrationFitOut
    gears: list[GearFitOut]
    calibrated: CalibratedBlockOut
    trace: CalibrationTraceOut
    method: str
    priors: str
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Printable summary, 80 columns.")
