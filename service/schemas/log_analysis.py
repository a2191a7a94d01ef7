"""Request and response of POST /v1/log-analysis: a logged pass and the verdict on each shift."""

from __future__ import annotations

from typing import Annotated, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.common import (
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    schema_rules,
)
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.job import JobField
from service.schemas.quantities import LogAcceleration, LogSpeed
from service.schemas.request_examples import LOG_ANALYSIS_EXAMPLE
from service.schemas.vehicle import VehicleIn

__all__ = [
    "GearSegmentOut",
    "LogAnalysisRequest",
    "LogAnalysisResponse",
    "LogIn",
    "LogInfoOut",
    "LogOptionsIn",
    "LoggedShiftOut",
]

MAX_SAMPLES = 20_000
MAX_TEXT_CHARS = 262_144

Time = Annotated[float, Field(ge=-1e7, le=1e7)]
Rpm = Annotated[float, Field(ge=0, le=30000)]
Verdict = Literal["early", "late", "about_right", "undetermined"]
Basis = Literal["crossover", "rev_limit", "beyond_range", "insufficient_data", "downshift"]


class LogIn(ApiModel):
    """A logged pass: channel arrays of equal length, or a logger's delimited text export."""

    model_config = ConfigDict(json_schema_extra=schema_rules(("text",), ("time", "speed")))

    time: list[Time] | None = Field(
        None,
        max_length=MAX_SAMPLES,
        description="Sample times [s], strictly increasing; 20 to 20000 samples at 2 to 1000 "
        "Hz (the body limit, 256 KiB by default, caps a four-channel log near 8000 samples).",
    )
    speed: list[LogSpeed] | None = Field(
        None,
        max_length=MAX_SAMPLES,
        description="Road speed at each time [`speed_unit`; default km/h | mph by `units`].",
    )
    rpm: list[Rpm] | None = Field(
        None, max_length=MAX_SAMPLES, description="Engine speed at each time [rpm], if logged."
    )
    acceleration: list[LogAcceleration] | None = Field(
        None,
        max_length=MAX_SAMPLES,
        description="Longitudinal acceleration at each time, forward positive "
        "[`acceleration_unit`], if logged; else it is the smoothed derivative of speed.",
    )
    speed_unit: Literal["km/h", "mph", "m/s"] | None = Field(
        None, description="Unit of `speed`; default km/h (`metric`) or mph (`us`)."
    )
    acceleration_unit: Literal["g", "m/s^2"] = Field("g", description="Unit of `acceleration`.")
    text: str | None = Field(
        None,
        min_length=1,
        max_length=MAX_TEXT_CHARS,
        description="Instead of the arrays: the logger's comma, semicolon or tab separated "
        "export, with a header naming time [s | ms], speed [km/h | mph | m/s] and optionally "
        "rpm and acceleration [g | m/s^2] (e.g. `time [s];speed [km/h];rpm`); decimal point "
        "or comma; lines starting `#` are skipped. Errors name the line and column.",
    )

    @model_validator(mode="after")
    def _one_form(self) -> Self:
        arrays = (self.time, self.speed, self.rpm, self.acceleration)
        if self.text is not None:
            if any(a is not None for a in arrays) or self.speed_unit is not None:
                raise ValueError("give `text` or the channel arrays, not both")
            return self
        if self.time is None or self.speed is None:
            raise ValueError("give `time` and `speed` (and optionally `rpm`, `acceleration`)")
        return self


class LogOptionsIn(ApiModel):
    """How the pass is analysed."""

    smoothing_window: float = Field(
        0.3,
        ge=0.05,
        le=2.0,
        description="Savitzky-Golay window for speed, its derivative and a logged "
        "acceleration [s]; at least 5 samples are used.",
    )
    tolerance_percent: float = Field(
        3.0,
        ge=0.5,
        le=30,
        description="Half-width of the 'about right' band around the target shift speed "
        "(the same share of rpm) [%].",
    )
    start_gear: int = Field(
        1, ge=1, le=12, description="Gear of the first segment when rpm is not logged."
    )
    rev_limit_rpm: float | None = Field(
        None,
        gt=0,
        le=30000,
        description="Rev limit [rpm]; default the engine's, if one is given. A crossover "
        "above it makes the rev limit the target.",
    )


class LogAnalysisRequest(UnitsRequest):
    """A logged pass, the drivetrain, and optionally the engine and vehicle."""

    model_config = ConfigDict(json_schema_extra=schema_rules(example=LOG_ANALYSIS_EXAMPLE))

    reference: Reference
    job: JobField
    log: LogIn
    drivetrain: DrivetrainIn
    engine: EngineIn | None = Field(
        None,
        description="The engine's curve: adds the model's shift rpm for comparison, and the "
        "rev limit.",
    )
    vehicle: VehicleIn | None = Field(
        None,
        description="With `engine`: the model's shift rpm counts road load and rotating "
        "inertia (net acceleration) instead of wheel force alone.",
    )
    options: LogOptionsIn = Field(default_factory=LogOptionsIn)

    @model_validator(mode="after")
    def _vehicle_needs_engine(self) -> Self:
        if self.vehicle is not None and self.engine is None:
            raise ValueError("`vehicle` needs `engine`")
        engine_limit = None if self.engine is None else self.engine.rev_limit_rpm
        if self.options.rev_limit_rpm is not None and engine_limit is not None:
            raise ValueError(
                "give the rev limit once: `engine.rev_limit_rpm` or `options.rev_limit_rpm`"
            )
        return self


class LogInfoOut(ApiModel):
    """What was read and analysed."""

    source: Literal["arrays", "text"]
    samples: int = Field(description="Samples read.")
    duration: float = Field(description="Time spanned [s].")
    sample_rate: float = Field(description="Even-grid rate the pass was analysed at [Hz].")
    channels: list[str] = Field(description="Channels logged: time, speed, rpm, acceleration.")
    delimiter: str | None = Field(description="Cell separator of the text, if text was sent.")
    columns: dict[str, str] | None = Field(
        description="Header of each column used, by channel, if text was sent."
    )
    analysed_from: float = Field(description="Start of the analysed stretch [s].")
    analysed_until: float = Field(description="End of full throttle, as analysed [s].")
    speed_calibration: float | None = Field(
        description="Logged rpm over the rpm speed, ratio and tire imply [-]; null without rpm."
    )


class GearSegmentOut(ApiModel):
    """A stretch of the pass in one gear."""

    gear: int
    start_time: float = Field(description="[s]")
    end_time: float = Field(description="[s]")
    start_speed: float = Field(description="[km/h | mph]")
    end_speed: float = Field(description="[km/h | mph]")
    samples: int


class LoggedShiftOut(ApiModel):
    """One logged gear change and the verdict on it."""

    from_gear: int
    to_gear: int
    start_time: float = Field(description="Shift begins [s].")
    end_time: float = Field(description="New gear takes up the drive [s].")
    duration: float = Field(description="Torque interruption [s].")
    speed_before: float = Field(description="[km/h | mph]")
    speed_after: float = Field(description="[km/h | mph]")
    rpm_before: float = Field(description="In the old gear as the shift begins [rpm].")
    rpm_after: float = Field(description="In the new gear as it ends [rpm].")
    acceleration_before: float = Field(description="Median just before [g].")
    acceleration_after: float = Field(description="Median just after [g].")
    acceleration_min: float = Field(description="Lowest during the shift [g].")
    crossover_speed: float | None = Field(
        description="Where the next gear's logged acceleration overtakes this one's, "
        "both extrapolated by low-order fits [km/h | mph]; null if none in range."
    )
    crossover_rpm: float | None = Field(description="The shift rpm it implies [rpm].")
    target_rpm: float | None = Field(
        description="The shift rpm the verdict compares with: the crossover's, or the rev "
        "limit when that comes first [rpm]."
    )
    deviation_percent: float | None = Field(
        description="Shift speed against the target's, 100 * (v_shift / v_target - 1) [%]."
    )
    verdict: Verdict
    basis: Basis
    model_shift_rpm: float | None = Field(
        description="The model's shift rpm for this gear change, with `engine` [rpm]."
    )
    logged_rpm: list[float] | None = Field(
        min_length=2,
        max_length=2,
        description="[lowest, highest] engine speed logged in the gear being left, up to "
        "the shift [rpm]; null for a downshift.",
    )
    crossover_extrapolated: bool = Field(
        description="True when the crossover lies outside `logged_rpm`: the fit was "
        "extrapolated to rpm this gear never reached in the log, so it is an estimate."
    )


class LogAnalysisResponse(ApiModel):
    """Gear segments, shifts with verdicts, warnings, cautions and a printable summary."""

    reference: str | None
    units: UnitLabels
    gears_from: Literal["rpm", "acceleration"]
    smoothing_window: float = Field(description="Window used [s].")
    tolerance_percent: float
    rev_limit_rpm: float | None
    model_criterion: Literal["tractive_force", "net_acceleration"] | None
    log: LogInfoOut
    segments: list[GearSegmentOut]
    shifts: list[LoggedShiftOut]
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str
