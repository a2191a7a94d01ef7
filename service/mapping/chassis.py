"""Chassis-dyno requests to a core conversion in SI, and the conversion to its response
document and an 80-column printable summary."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np

from core.driveline.chassis import (
    ChassisConversion,
    MeasuredAt,
    chassis_conversion,
    efficiency_from_loss,
)
from service.mapping.documents import notice_text, notices_out, rounded
from service.mapping.inputs import core_fields
from service.output.sheets import printable, title_line, wrap_text
from service.schemas.chassis import ChassisConversionRequest
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "CHASSIS_FIELDS",
    "MODEL_NOTE",
    "chassis_document",
    "chassis_fields",
    "chassis_summary",
    "convert_chassis_curve",
]

CHASSIS_FIELDS: Mapping[str, str] = {
    "rpm": "curve.rpm",
    "torque_nm": "curve.torque",
    "power_w": "curve.power",
    "loss_percent": "driveline.loss_percent",
    "measured_gear": "driveline.measured_gear",
    "fixed_loss_w": "driveline.fixed_loss",
}
SUMMARY_ROWS = 15
MODEL_NOTE = (
    "Model: wheel = engine x efficiency at the same engine rpm (common practice); in gear "
    "j the wheel curve measured in gear k is scaled by eta_j / eta_k. Torque at the wheels "
    "is wheel power over engine angular speed. An estimate: real losses vary."
)


def chassis_fields(body: ChassisConversionRequest) -> dict[str, str]:
    """Core parameter -> request field, the efficiency named as the request gave it."""
    per_gear = body.driveline.gear_efficiencies is not None
    return {
        **CHASSIS_FIELDS,
        "efficiency": "driveline.gear_efficiencies" if per_gear else "driveline.efficiency",
    }


def _efficiency(body: ChassisConversionRequest) -> float | list[float]:
    loss = body.driveline
    if loss.gear_efficiencies is not None:
        return loss.gear_efficiencies
    if loss.efficiency is not None:
        return loss.efficiency
    return efficiency_from_loss(float(loss.loss_percent or 0.0))


def convert_chassis_curve(body: ChassisConversionRequest) -> ChassisConversion:
    """What POST /v1/chassis-dyno/convert computes (core errors become 422 problems)."""
    u, curve, loss = body.units, body.curve, body.driveline

    def si(values: list[float] | None, quantity: Quantity) -> np.ndarray | None:
        return None if values is None else to_si(np.asarray(values, np.float64), quantity, u)

    with core_fields(chassis_fields(body), u):
        return chassis_conversion(
            curve.rpm,
            measured_at=MeasuredAt(curve.measured_at),
            efficiency=_efficiency(body),
            torque_nm=si(curve.torque, Quantity.TORQUE),
            power_w=si(curve.power, Quantity.POWER),
            measured_gear=loss.measured_gear,
            fixed_loss_w=0.0
            if loss.fixed_loss is None
            else to_si(loss.fixed_loss, Quantity.POWER, u),
        )


def chassis_document(
    c: ChassisConversion, units: UnitSystem, fields: Mapping[str, str]
) -> dict[str, Any]:
    """The body of a chassis-conversion response, without reference and summary."""
    p, t = Quantity.POWER, Quantity.TORQUE
    k_power = int(np.argmax(c.wheel_power_w))
    k_torque = int(np.argmax(c.wheel_torque_nm))
    gears = None
    if c.gear_efficiency is not None and c.wheel_power_by_gear_w is not None:
        omega = c.rpm * (2.0 * np.pi / 60.0)
        gears = [
            {
                "gear": j + 1,
                "efficiency": round(float(eta), 4),
                "factor": round(float(eta) / c.efficiency, 6),
                "wheel_torque": rounded(from_si(power / omega, t, units), 3),
                "wheel_power": rounded(from_si(power, p, units), 3),
                "peak_wheel_power": round(from_si(float(power.max()), p, units), 3),
            }
            for j, (eta, power) in enumerate(
                zip(c.gear_efficiency.tolist(), c.wheel_power_by_gear_w, strict=True)
            )
        ]
    return {
        "units": unit_labels(units),
        "measured_at": c.measured_at.value,
        "measured_gear": c.measured_gear,
        "efficiency": round(c.efficiency, 6),
        "loss_percent": round(100.0 * (1.0 - c.efficiency), 4),
        "fixed_loss": round(from_si(c.fixed_loss_w, p, units), 4),
        "curve": {
            "rpm": rounded(c.rpm, 1),
            "engine_torque": rounded(from_si(c.engine_torque_nm, t, units), 3),
            "engine_power": rounded(from_si(c.engine_power_w, p, units), 3),
            "wheel_torque": rounded(from_si(c.wheel_torque_nm, t, units), 3),
            "wheel_power": rounded(from_si(c.wheel_power_w, p, units), 3),
        },
        "peaks": {
            "engine_power": round(from_si(float(c.engine_power_w[k_power]), p, units), 3),
            "wheel_power": round(from_si(float(c.wheel_power_w[k_power]), p, units), 3),
            "power_rpm": round(float(c.rpm[k_power]), 1),
            "engine_torque": round(from_si(float(c.engine_torque_nm[k_torque]), t, units), 3),
            "wheel_torque": round(from_si(float(c.wheel_torque_nm[k_torque]), t, units), 3),
            "torque_rpm": round(float(c.rpm[k_torque]), 1),
        },
        "gears": gears,
        "warnings": notices_out(c.notices, fields, units),
    }


def chassis_summary(c: ChassisConversion, units: UnitSystem, reference: str | None) -> str:
    """The conversion as a short printable sheet: 80 columns, printable ASCII."""
    lab = unit_labels(units)
    pw, tq = lab["power"], lab["torque"]
    p, t = Quantity.POWER, Quantity.TORQUE
    lines = [title_line("GEARWORK CHASSIS DYNO CONVERSION", reference)]
    where = "the wheels" if c.measured_at.value == "wheels" else "the engine"
    gear = "" if c.measured_gear is None else f" in gear {c.measured_gear}"
    fixed = (
        f" plus a fixed {from_si(c.fixed_loss_w, p, units):.1f} {pw}"
        if c.fixed_loss_w > 0.0
        else ""
    )
    lines += wrap_text(
        f"Measured at {where}{gear}; driveline efficiency {c.efficiency:.3f} "
        f"({100.0 * (1.0 - c.efficiency):.1f} % loss{fixed})."
    )
    kp, kt = int(np.argmax(c.wheel_power_w)), int(np.argmax(c.wheel_torque_nm))
    lines.append(
        f"Peak power: wheels {from_si(float(c.wheel_power_w[kp]), p, units):.1f} {pw}, "
        f"engine {from_si(float(c.engine_power_w[kp]), p, units):.1f} {pw} at "
        f"{c.rpm[kp]:.0f} rpm."
    )
    lines.append(
        f"Peak torque: wheels {from_si(float(c.wheel_torque_nm[kt]), t, units):.1f} {tq}, "
        f"engine {from_si(float(c.engine_torque_nm[kt]), t, units):.1f} {tq} at "
        f"{c.rpm[kt]:.0f} rpm."
    )
    lines.append("")
    lines.append(
        f"{'rpm':>7}{'Wheel ' + pw:>13}{'Engine ' + pw:>13}{'Wheel ' + tq:>15}{'Engine ' + tq:>15}"
    )
    rows = np.unique(np.linspace(0, c.rpm.size - 1, min(SUMMARY_ROWS, c.rpm.size)).round())
    for i in rows.astype(int).tolist():
        lines.append(
            f"{c.rpm[i]:7.0f}{from_si(float(c.wheel_power_w[i]), p, units):13.1f}"
            f"{from_si(float(c.engine_power_w[i]), p, units):13.1f}"
            f"{from_si(float(c.wheel_torque_nm[i]), t, units):15.1f}"
            f"{from_si(float(c.engine_torque_nm[i]), t, units):15.1f}"
        )
    if c.gear_efficiency is not None and c.wheel_power_by_gear_w is not None:
        lines.append("")
        lines.append(f"Gear  Efficiency    Factor  Peak wheel {pw}")
        for j, eta in enumerate(c.gear_efficiency.tolist()):
            peak = from_si(float(c.wheel_power_by_gear_w[j].max()), p, units)
            mark = "  (measured)" if j + 1 == c.measured_gear else ""
            lines.append(f"{j + 1:4d}{eta:12.3f}{eta / c.efficiency:10.4f}{peak:15.1f}{mark}")
    lines.append("")
    lines += wrap_text(MODEL_NOTE)
    for n in c.notices:
        if n.code != "estimate":
            lines += wrap_text(f"Note: {notice_text(n, units)}")
    return printable(lines)
