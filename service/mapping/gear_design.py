"""Gear-spacing and speedometer requests to core results in SI (naming fields on error),
and those results to response documents in the caller's units."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

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
from service.mapping.documents import notices_out, rounded, tire_document
from service.mapping.inputs import (
    ENGINE_FIELDS,
    build_curve,
    build_tire,
    core_fields,
    renamed_fields,
)
from service.output.cautions import CAUTIONS, SPEEDOMETER_CAUTIONS
from service.schemas.gear_design import GearSpacingRequest, SpeedometerRequest
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "DEFAULT_DISTANCES",
    "DEFAULT_SPEEDS",
    "SPACING_FIELDS",
    "GearSetStudy",
    "SpeedometerStudy",
    "gear_set_studies",
    "spacing_document",
    "speedometer_document",
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
    with core_fields(SPACING_FIELDS, body.units):
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
    with core_fields({"rolling_radius_m": "new.tire", "driven_teeth": "driven_teeth"}, u):
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


def _maybe(values: Any, i: int, digits: int) -> float | None:
    return None if values is None else round(float(values[i]), digits)


def _set(study: GearSetStudy, units: UnitSystem) -> dict[str, Any]:
    lan, an = study.landings, study.analysis
    torque = None if an is None else from_si(an.landing_torque_nm, Quantity.TORQUE, units)
    power = None if an is None else from_si(an.landing_power_w, Quantity.POWER, units)
    shifts = []
    for i, gear in enumerate(lan.from_gear.tolist()):
        shifts.append(
            {
                "from_gear": gear,
                "to_gear": gear + 1,
                "step": round(float(lan.steps[i]), 5),
                "shift_rpm": round(float(lan.shift_rpm[i]), 1),
                "landing_rpm": round(float(lan.landing_rpm[i]), 1),
                "rpm_drop": round(float(lan.rpm_drop[i]), 1),
                "drop_percent": round(float(lan.drop_percent[i]), 2),
                "from_torque_peak_rpm": _maybe(
                    None if an is None else an.from_torque_peak_rpm, i, 1
                ),
                "from_torque_peak_percent": _maybe(
                    None if an is None else an.from_torque_peak_percent, i, 2
                ),
                "from_power_peak_rpm": _maybe(
                    None if an is None else an.from_power_peak_rpm, i, 1
                ),
                "from_power_peak_percent": _maybe(
                    None if an is None else an.from_power_peak_percent, i, 2
                ),
                "in_band": None if an is None else bool(an.in_band[i]),
                "landing_torque": _maybe(torque, i, 2),
                "landing_power": _maybe(power, i, 2),
            }
        )
    ratios = study.gear_ratios
    return {
        "name": study.name,
        "gear_ratios": rounded(ratios, 5),
        "steps": rounded(lan.steps, 5),
        "spread": round(float(ratios[0] / ratios[-1]), 5),
        "progression_factor": None
        if study.progression_factor is None
        else round(study.progression_factor, 6),
        "shifts": shifts,
        "peak_torque_rpm": None if an is None else round(an.peak_torque_rpm, 1),
        "peak_power_rpm": None if an is None else round(an.peak_power_rpm, 1),
        "band_rpm": None
        if an is None
        else [round(an.band_low_rpm, 1), round(an.band_high_rpm, 1)],
    }


def spacing_document(
    studies: Sequence[GearSetStudy],
    max_factor: float | None,
    notices: Sequence[Notice],
    units: UnitSystem,
    fields: Mapping[str, str],
) -> dict[str, Any]:
    """The body of a gear-spacing response, without reference and summary."""
    return {
        "units": unit_labels(units),
        "max_progression_factor": None if max_factor is None else round(max_factor, 6),
        "sets": [_set(s, units) for s in studies],
        "warnings": notices_out(notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def _setup_out(study: SpeedometerStudy, new: bool, units: UnitSystem) -> dict[str, Any]:
    setup = study.correction.new if new else study.correction.original
    return {
        "tire": tire_document(study.new_tire if new else study.original_tire, units),
        "final_drive_ratio": setup.final_drive_ratio if study.axle_given else None,
    }


def speedometer_document(study: SpeedometerStudy, units: UnitSystem) -> dict[str, Any]:
    """The body of a speedometer-correction response, without reference and summary."""
    c, speed = study.correction, Quantity.SPEED
    s, d = study.speeds, study.distances
    error = c.reading_error_percent
    gear = study.driven_gear
    return {
        "units": unit_labels(units),
        "drive": c.drive.value,
        "original": _setup_out(study, False, units),
        "new": _setup_out(study, True, units),
        "true_per_indicated": round(c.true_per_indicated, 6),
        "indicated_per_true": round(c.indicated_per_true, 6),
        "reading_error_percent": round(error, 4),
        "correction_factor": round(c.pulses_per_distance_factor, 6),
        "reads": "true" if abs(error) < 5e-5 else ("high" if error > 0.0 else "low"),
        "speeds": [
            {"indicated": round(i, 2), "true": round(t, 2), "error": round(e, 2)}
            for i, t, e in zip(
                from_si(s.indicated_m_s, speed, units).tolist(),
                from_si(s.true_m_s, speed, units).tolist(),
                from_si(s.error_m_s, speed, units).tolist(),
                strict=True,
            )
        ],
        "distances": [
            {"indicated": round(i, 3), "true": round(t, 3), "error": round(e, 3)}
            for i, t, e in zip(
                d.indicated_m.tolist(), d.true_m.tolist(), d.error_m.tolist(), strict=True
            )
        ],
        "driven_gear": None
        if gear is None
        else {
            "original_teeth": gear.original_teeth,
            "exact_teeth": round(gear.exact_teeth, 4),
            "nearest_teeth": gear.nearest_teeth,
            "residual_error_percent": round(gear.residual_error_percent, 4),
        },
        "warnings": notices_out(
            study.notices, {"final_drive_ratio": "new.final_drive_ratio"}, units
        ),
        "cautions": list(SPEEDOMETER_CAUTIONS),
    }
