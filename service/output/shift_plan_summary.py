"""The shift plan as a plain-text summary for work orders: at most 80 columns, printable
ASCII."""

from __future__ import annotations

from core import Drivetrain, ShiftPlan, Tire, TorqueCurve
from service.mapping.documents import notice_text
from service.output.cautions import SHORT_CAUTION
from service.output.sheets import printable, title_line, wrap_text
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = ["shift_plan_summary"]

_WHY = {"crossover": "crossover", "rev_limit": "rev limit", "traction_limit": "both on grip"}
_CAUTION_LINES = ("", *wrap_text("Caution: " + SHORT_CAUTION))  # wrapped once


def shift_plan_summary(
    plan: ShiftPlan,
    curve: TorqueCurve,
    drivetrain: Drivetrain,
    tire: Tire,
    units: UnitSystem,
    reference: str | None,
) -> str:
    """The shift plan as a short printable sheet.

    Parameters
    ----------
    plan : ShiftPlan
        Result of ``core.shift_plan``.
    curve, drivetrain, tire
        The inputs the plan used.
    units : UnitSystem
        Units to print in.
    reference : str or None
        Caller's reference (work order).

    Returns
    -------
    str
        Lines of at most 80 columns joined by newlines, printable ASCII only.
    """
    lines = [title_line("GEARWORK SHIFT PLAN", reference)]
    lines += _inputs_lines(plan, curve, drivetrain, tire, units)
    lines += _gears_and_shifts(plan, drivetrain, units)
    if plan.notices:
        lines.append("")
        lines.append("Warnings:")
        for n in plan.notices:
            lines += wrap_text(notice_text(n, units), "- ")
    lines += _CAUTION_LINES
    return printable(lines)


def _inputs_lines(
    plan: ShiftPlan, curve: TorqueCurve, drivetrain: Drivetrain, tire: Tire, units: UnitSystem
) -> list[str]:
    """The curve and the drivetrain the plan used, in sentences."""
    lab = unit_labels(units)
    trq, pwr, lng = lab["torque"], lab["power"], lab["length"]
    t_peak = from_si(plan.peak_torque_nm, Quantity.TORQUE, units)
    p_peak = from_si(plan.peak_power_w, Quantity.POWER, units)
    source = "chassis dyno (net of losses)" if not plan.efficiency_applied else "engine dyno"
    lines = wrap_text(
        f"Curve: {source}, {curve.rpm_min:.0f}-{curve.rpm_max:.0f} rpm; peak torque "
        f"{t_peak:.0f} {trq} at {plan.peak_torque_rpm:.0f} rpm; peak power {p_peak:.0f} "
        f"{pwr} at {plan.peak_power_rpm:.0f} rpm; rev limit {plan.rev_limit_rpm:.0f} rpm."
    )
    radius = from_si(tire.rolling_radius_m, Quantity.LENGTH, units)
    eff = drivetrain.efficiency
    eff_txt = (
        "not applied"
        if not plan.efficiency_applied
        else f"{eff[0]:.3g}"
        if bool((eff == eff[0]).all())
        else f"{eff.min():.3g}-{eff.max():.3g}"
    )
    tire_txt = tire.designation or f"{2 * radius:.1f} {lng}"
    extra = (
        f", extra reduction {drivetrain.extra_reduction:.3g}"
        if drivetrain.extra_reduction != 1.0
        else ""
    )
    lines += wrap_text(
        f"Drivetrain: final drive {drivetrain.final_drive_ratio:.3g}{extra}; tire {tire_txt} "
        f"(rolling radius {radius:.1f} {lng}); efficiency {eff_txt}."
    )
    return lines


def _gears_and_shifts(plan: ShiftPlan, drivetrain: Drivetrain, units: UnitSystem) -> list[str]:
    """The table of gears and the table of shifts (none for one gear)."""
    spd = unit_labels(units)["speed"]
    lines = ["", f"{'Gear':>4}  {'Ratio':>6}  {'Overall':>7}  {'Speed at limit':>16}"]
    for g, ratio in zip(plan.gears, drivetrain.gear_ratios.tolist(), strict=True):
        top = from_si(g.max_speed_m_s, Quantity.SPEED, units)
        lines.append(f"{g.gear:>4}  {ratio:>6.3f}  {g.overall_ratio:>7.3f}  {top:>10.1f} {spd:<5}")
    if plan.shifts:
        lines.append("")
        lines.append(
            f"{'Shift':>5}  {'At rpm':>6}  {'Road speed':>14}  {'Lands at':>8}  {'Drop':>5}  Why"
        )
        for s in plan.shifts:
            v = from_si(s.shift_speed_m_s, Quantity.SPEED, units)
            why = _WHY.get(s.reason.value, "tops out")
            lines.append(
                f"{s.from_gear:>3}-{s.to_gear:<1}  {s.shift_rpm:>6.0f}  {v:>8.1f} {spd:<5}  "
                f"{s.rpm_after:>8.0f}  {s.rpm_drop:>5.0f}  {why}"
            )
    return lines
