"""Gear-spacing and speedometer results to response documents and printable summaries."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from core.notices import Notice
from service.mapping.gear_design_inputs import GearSetStudy, SpeedometerStudy
from service.mapping.shift_plan import notices_out, rounded, tire_document
from service.output.cautions import CAUTIONS, SPEEDOMETER_CAUTIONS, SPEEDOMETER_SHORT_CAUTION
from service.output.sheets import summary_sheet, wrap_text
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = ["spacing_document", "spacing_summary", "speedometer_document", "speedometer_summary"]


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
        "warnings": notices_out(notices, fields),
        "cautions": list(CAUTIONS),
    }


def spacing_summary(
    studies: Sequence[GearSetStudy], notices: Sequence[Notice], reference: str | None
) -> str:
    """The gear sets and their landings as a printable sheet of at most 80 columns."""
    body: list[str] = []
    for study in studies:
        ratios = ", ".join(f"{r:.3f}" for r in study.gear_ratios.tolist())
        factor = (
            "" if study.progression_factor is None else f", factor {study.progression_factor:.4g}"
        )
        body += ["", *wrap_text(f"{study.name.capitalize()} set{factor}: {ratios}")]
        an = study.analysis
        head = (
            f"{'Shift':>5}  {'Step':>6}  {'At rpm':>6}  {'Lands':>6}  {'Drop':>5}  {'Drop %':>6}"
        )
        if an is not None:
            head += f"  {'vs Tq pk':>8}  {'vs Pw pk':>8}  Band"
        body.append(head)
        lan = study.landings
        for i, gear in enumerate(lan.from_gear.tolist()):
            row = (
                f"{gear:>3}-{gear + 1:<1}  {lan.steps[i]:>6.3f}  {lan.shift_rpm[i]:>6.0f}  "
                f"{lan.landing_rpm[i]:>6.0f}  {lan.rpm_drop[i]:>5.0f}  {lan.drop_percent[i]:>6.1f}"
            )
            if an is not None:
                row += (
                    f"  {an.from_torque_peak_rpm[i]:>+8.0f}  {an.from_power_peak_rpm[i]:>+8.0f}  "
                    + ("in" if an.in_band[i] else "out")
                )
            body.append(row)
        if an is not None:
            body.append(
                f"Torque peak {an.peak_torque_rpm:.0f} rpm, power peak {an.peak_power_rpm:.0f} "
                f"rpm; band {an.band_low_rpm:.0f}-{an.band_high_rpm:.0f} rpm."
            )
    return summary_sheet("GEARWORK GEAR SPACING", reference, body, notices)


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
        "warnings": notices_out(study.notices, {"final_drive_ratio": "new.final_drive_ratio"}),
        "cautions": list(SPEEDOMETER_CAUTIONS),
    }


def speedometer_summary(study: SpeedometerStudy, units: UnitSystem, reference: str | None) -> str:
    """The correction as a printable sheet of at most 80 columns."""
    c = study.correction
    spd, lng = unit_labels(units)["speed"], unit_labels(units)["length"]

    def tire(t: Any) -> str:
        dia = 2.0 * from_si(t.rolling_radius_m, Quantity.LENGTH, units)
        size = f"{t.designation} " if t.designation else ""
        return f"{size}tire of {dia:.1f} {lng} rolling diameter"

    where = "transmission output" if c.drive.value == "transmission_output" else "a wheel sensor"
    body = [""]
    body += wrap_text(f"Signal from {where}.")
    if study.axle_given:
        body += wrap_text(
            f"Calibrated for {tire(study.original_tire)}, axle {c.original.final_drive_ratio:g}; "
            f"now {tire(study.new_tire)}, axle {c.new.final_drive_ratio:g}."
        )
    else:
        body += wrap_text(
            f"Calibrated for {tire(study.original_tire)}; now {tire(study.new_tire)}."
        )
    sense = "high" if c.reading_error_percent > 0 else "low"
    body += wrap_text(
        f"The instrument reads {abs(c.reading_error_percent):.2f} % {sense}: true speed is "
        f"{c.true_per_indicated:.4f} x the reading. Multiply the pulses-per-distance setting "
        f"(or the driven/drive teeth ratio) by {c.pulses_per_distance_factor:.4f}."
    )
    body += ["", f"{'Indicated':>10}  {'True':>8}  ({spd})"]
    s = study.speeds
    for i, t in zip(
        from_si(s.indicated_m_s, Quantity.SPEED, units).tolist(),
        from_si(s.true_m_s, Quantity.SPEED, units).tolist(),
        strict=True,
    ):
        body.append(f"{i:>10.1f}  {t:>8.1f}")
    d = study.distances
    body += ["", f"{'Odometer':>10}  {'True':>8}  (the odometer's own unit)"]
    for i, t in zip(d.indicated_m.tolist(), d.true_m.tolist(), strict=True):
        body.append(f"{i:>10.1f}  {t:>8.1f}")
    gear = study.driven_gear
    if gear is not None:
        body.append("")
        body += wrap_text(
            f"Driven gear: {gear.original_teeth} teeth now; {gear.exact_teeth:.2f} would read "
            f"true; {gear.nearest_teeth} teeth leaves {gear.residual_error_percent:+.2f} %."
        )
    return summary_sheet(
        "GEARWORK SPEEDOMETER CORRECTION",
        reference,
        body,
        study.notices,
        caution=SPEEDOMETER_SHORT_CAUTION,
    )
