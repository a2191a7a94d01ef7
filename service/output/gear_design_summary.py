"""Gear-spacing and speedometer answers as 80-column printable summaries."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from core.notices import Notice
from service.mapping.gear_design import GearSetStudy, SpeedometerStudy
from service.output.cautions import SPEEDOMETER_SHORT_CAUTION
from service.output.sheets import summary_sheet, wrap_text
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = ["spacing_summary", "speedometer_summary"]


def spacing_summary(
    studies: Sequence[GearSetStudy],
    notices: Sequence[Notice],
    units: UnitSystem,
    reference: str | None,
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
    return summary_sheet("GEARWORK GEAR SPACING", reference, body, notices, units)


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
        units,
        caution=SPEEDOMETER_SHORT_CAUTION,
    )
