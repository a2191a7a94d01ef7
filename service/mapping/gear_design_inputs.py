"""Gear-spacing and speedometer requests to core results, in SI, naming fields on error."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.driveline.landing import LandingAnalysis, LandingBand, landing_analysis
from core.driveline.spacing import (
    ShiftLandings,
    geometric_gear_set,
    max_progression_factor,
    progressive_gear_set,
    shift_landings,
)
from core.driveline.speedometer import (
    DistanceReadings,
    DrivenGearChange,
    SpeedometerCorrection,
    SpeedometerDrive,
    SpeedReadings,
    driven_gear_change,
    odometer_readings,
    speed_readings,
    speedometer_correction,
    speedometer_setup,
)
from core.driveline.tires import Tire
from core.engine.curves import TorqueCurve
from core.notices import Notice
from core.shifts.plan import resolve_rev_limit
from service.http.problems import ProblemError
from service.mapping.inputs import ENGINE_FIELDS, build_curve, build_tire, core_fields
from service.mapping.setups import renamed_fields
from service.schemas.gear_design import GearSpacingRequest, SpeedometerRequest
from service.units import Quantity, UnitSystem, to_si

__all__ = [
    "DEFAULT_DISTANCES",
    "DEFAULT_SPEEDS",
    "SPACING_FIELDS",
    "GearSetStudy",
    "SpeedometerStudy",
    "gear_set_studies",
    "speedometer_study",
]

FloatArray = NDArray[np.float64]
DEFAULT_PROGRESSION = 1.1
DEFAULT_SPEEDS = {
    UnitSystem.METRIC: (50.0, 80.0, 100.0, 120.0, 130.0),
    UnitSystem.US: (30.0, 45.0, 55.0, 65.0, 75.0),
}
DEFAULT_DISTANCES = (100.0, 1000.0, 10000.0)
SPACING_FIELDS: Mapping[str, str] = {
    **ENGINE_FIELDS,
    "first_ratio": "spacing.first_ratio",
    "top_ratio": "spacing.top_ratio",
    "gear_count": "spacing.gear_count",
    "progression_factor": "spacing.progression_factor",
    "gear_ratios": "gear_ratios",
    "shift_rpm": "shift_rpm",
    "band": "landing_band_rpm",
}


@dataclass(frozen=True)
class GearSetStudy:
    """One gear set with its landings and, given a curve, their distance from the peaks."""

    name: str
    gear_ratios: FloatArray
    progression_factor: float | None
    landings: ShiftLandings
    analysis: LandingAnalysis | None


def _band(body: GearSpacingRequest) -> LandingBand | tuple[float, float]:
    if body.landing_band_rpm is not None:
        return (body.landing_band_rpm[0], body.landing_band_rpm[1])
    return LandingBand(body.landing_band)


def _shift_rpm(
    body: GearSpacingRequest, curve: TorqueCurve | None
) -> tuple[float | list[float], list[Notice]]:
    if body.shift_rpm is not None:
        return (body.shift_rpm[0] if len(body.shift_rpm) == 1 else list(body.shift_rpm)), []
    if curve is None or body.engine is None:  # the request model asks for one of them
        raise ProblemError(
            422, "give `shift_rpm`, or `engine` for its rev limit", field="shift_rpm"
        )
    limit, notes = resolve_rev_limit(curve, body.engine.rev_limit_rpm)
    return limit, list(notes)


def gear_set_studies(
    body: GearSpacingRequest,
) -> tuple[list[GearSetStudy], float | None, list[Notice]]:
    """The geometric, progressive and given sets with their landings, the largest usable
    progression factor for the spacing's ends, and notices."""
    curve = None if body.engine is None else build_curve(body.engine.curve, body.units)
    sets: list[tuple[str, FloatArray, float | None]] = []
    limit_factor = None
    with core_fields(SPACING_FIELDS):
        shift, notes = _shift_rpm(body, curve)
        if body.spacing is not None:
            sp = body.spacing
            ends = (sp.first_ratio, sp.top_ratio, sp.gear_count)
            limit_factor = max_progression_factor(*ends)
            psi = sp.progression_factor
            if psi is None:
                psi = min(DEFAULT_PROGRESSION, math.sqrt(limit_factor))
                notes.append(
                    Notice(
                        "progression_factor_chosen",
                        f"The progressive set uses a progression factor of {psi:.4g}; the "
                        f"largest usable for these ends is {limit_factor:.4g}.",
                        "progression_factor",
                    )
                )
            prog = progressive_gear_set(*ends, progression_factor=psi)
            sets.append(("geometric", geometric_gear_set(*ends).gear_ratios, 1.0))
            sets.append(("progressive", prog.gear_ratios, psi))
        if body.gear_ratios is not None:
            sets.append(("given", np.asarray(body.gear_ratios, dtype=np.float64), None))
        studies = []
        for name, ratios, factor in sets:
            analysis = None
            if curve is not None:
                analysis = landing_analysis(curve, ratios, shift, band=_band(body))
                notes += [n for n in analysis.notices if n not in notes]
            landings = shift_landings(ratios, shift) if analysis is None else analysis.landings
            studies.append(GearSetStudy(name, ratios, factor, landings, analysis))
    if limit_factor is not None and math.isinf(limit_factor):
        limit_factor = None  # two gears: one step, the factor plays no part
    return studies, limit_factor, notes


@dataclass(frozen=True)
class SpeedometerStudy:
    """The correction, the tires as used, and the readings corrected."""

    correction: SpeedometerCorrection
    original_tire: Tire
    new_tire: Tire
    speeds: SpeedReadings
    distances: DistanceReadings
    driven_gear: DrivenGearChange | None
    notices: tuple[Notice, ...]
    axle_given: bool = True  # False: no ratio was sent and 1.0 stands in (it cancels)


def speedometer_study(body: SpeedometerRequest) -> SpeedometerStudy:
    """Correct the readings of a speedometer after a tire or axle change."""
    u = body.units
    with renamed_fields({"drivetrain.tire": "original.tire"}):
        old_tire = build_tire(body.original.tire, u)
    new_tire = old_tire
    if body.new.tire is not None:
        with renamed_fields({"drivetrain.tire": "new.tire"}):
            new_tire = build_tire(body.new.tire, u)
    old_axle = body.original.final_drive_ratio or 1.0
    new_axle = body.new.final_drive_ratio or old_axle
    drive = SpeedometerDrive(body.drive)
    notes = []
    if drive is SpeedometerDrive.WHEEL and new_axle != old_axle:
        notes.append(
            Notice(
                "axle_change_not_seen",
                "A wheel-speed sensor does not see the axle ratio; only the tire change "
                "affects the reading.",
                "final_drive_ratio",
            )
        )
    speeds = DEFAULT_SPEEDS[u] if body.indicated_speeds is None else body.indicated_speeds
    lengths = DEFAULT_DISTANCES if body.indicated_distances is None else body.indicated_distances
    with core_fields({"rolling_radius_m": "new.tire", "driven_teeth": "driven_teeth"}):
        correction = speedometer_correction(
            speedometer_setup(old_tire, old_axle),
            speedometer_setup(new_tire, new_axle),
            drive=drive,
        )
        readings = speed_readings(
            correction, to_si(np.asarray(speeds, dtype=np.float64), Quantity.SPEED, u)
        )
        odometer = odometer_readings(correction, np.asarray(lengths, dtype=np.float64))
        teeth = None
        if body.driven_teeth is not None:
            teeth = driven_gear_change(correction, body.driven_teeth)
    return SpeedometerStudy(
        correction,
        old_tire,
        new_tire,
        readings,
        odometer,
        teeth,
        tuple(notes),
        axle_given=body.original.final_drive_ratio is not None,
    )
