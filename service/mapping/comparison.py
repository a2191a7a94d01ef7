"""Comparison results to response documents and a printable summary, in the caller's
units; the summary helpers shared by the gear-choice and design sheets."""

from __future__ import annotations

import math
import re
import textwrap
from collections.abc import Callable, Mapping, Sequence
from typing import Any

from core.choice.setups import SetupFigures
from core.notices import Notice
from service.mapping.comparison_curves import (
    curve_notices,
    curves_summary,
    engine_document,
    peak_numbers,
)
from service.mapping.setups import NamedSetup
from service.mapping.shift_plan import notices_out, rounded, tire_document
from service.output.cautions import CAUTIONS
from service.output.sheets import WIDTH, summary_sheet, wrap_text
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = [
    "cell",
    "comparison_document",
    "comparison_summary",
    "seconds_out",
    "speed_out",
]

Number = float | None


def speed_out(v: float | None, units: UnitSystem, digits: int = 2) -> float | None:
    """A road speed [m/s] in the caller's unit, rounded; None for a missing one."""
    if v is None or not math.isfinite(v):
        return None
    return round(from_si(float(v), Quantity.SPEED, units), digits)


def seconds_out(t: float | None) -> float | None:
    """A time [s] to the millisecond; None for a missing one."""
    return None if t is None or not math.isfinite(t) else round(float(t), 3)


def _minus(a: Number, b: Number, digits: int) -> Number:
    return None if a is None or b is None else round(a - b, digits) + 0.0  # no -0.0


def _renamed(items: list[dict[str, Any]], renames: Mapping[str, str]) -> list[dict[str, Any]]:
    for item in items:
        for old, new in renames.items():
            field = item.get("field")
            if field is not None and re.match(rf"^{re.escape(old)}(?=$|[.\[])", field):
                item["field"] = new + field[len(old) :]
    return items


def _timed(fig: SetupFigures, name: str) -> tuple[Number, Number]:
    if fig.report is None:
        return None, None
    for d in fig.report.distances:
        if d.name == name:
            return d.elapsed_s, d.trap_speed_m_s
    return None, None


def _numbers(fig: SetupFigures, units: UnitSystem) -> dict[str, Any]:
    """The figures a delta is taken of, unrounded, in the caller's units."""
    speed = Quantity.SPEED
    sixty, _ = _timed(fig, "60 ft")
    eighth, eighth_trap = _timed(fig, "1/8 mile")
    quarter, quarter_trap = _timed(fig, "1/4 mile")
    z60 = z100 = None
    top = None
    if fig.report is not None:
        z60 = next(s.elapsed_s for s in fig.report.speeds if s.name == "0-60 mph")
        z100 = next((s.elapsed_s for s in fig.report.speeds if s.name == "0-100 km/h"), None)
        top = from_si(fig.report.top.speed_m_s, speed, units)
    return {
        "speed_at_rev_limit": from_si(fig.speed_at_rev_limit_m_s, speed, units).tolist(),
        "shift_rpm": [s.shift_rpm for s in fig.shifts],
        "rpm_after": [s.rpm_after for s in fig.shifts],
        "cruise_top_gear_rpm": [float(row[-1]) for row in fig.cruise_rpm],
        "top_speed": top,
        "sixty_ft": sixty,
        "eighth_mile_elapsed": eighth,
        "eighth_mile_trap_speed": None
        if eighth_trap is None
        else from_si(eighth_trap, speed, units),
        "quarter_mile_elapsed": quarter,
        "quarter_mile_trap_speed": None
        if quarter_trap is None
        else from_si(quarter_trap, speed, units),
        "zero_to_60_mph": z60,
        "zero_to_100_kmh": z100,
        **peak_numbers(fig, units),
    }


def _delta(mine: dict[str, Any], base: dict[str, Any]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in mine.items():
        digits = 1 if "rpm" in key else 3
        if isinstance(value, list):
            other = base[key]
            out[key] = [
                _minus(v, other[i] if i < len(other) else None, digits)
                for i, v in enumerate(value)
            ]
        else:
            out[key] = _minus(value, base[key], digits)
    out["cruise_top_gear_rpm"] = [0.0 if v is None else v for v in out["cruise_top_gear_rpm"]]
    return out


def _run(fig: SetupFigures, numbers: dict[str, Any]) -> dict[str, Any] | None:
    if fig.report is None:
        return None
    z60 = next(s for s in fig.report.speeds if s.name == "0-60 mph")
    z100 = next((s for s in fig.report.speeds if s.name == "0-100 km/h"), None)
    top = fig.report.top
    speed = numbers["top_speed"]
    return {
        "sixty_ft": seconds_out(numbers["sixty_ft"]),
        "eighth_mile": {
            "elapsed": seconds_out(numbers["eighth_mile_elapsed"]),
            "trap_speed": _round(numbers["eighth_mile_trap_speed"], 2),
        },
        "quarter_mile": {
            "elapsed": seconds_out(numbers["quarter_mile_elapsed"]),
            "trap_speed": _round(numbers["quarter_mile_trap_speed"], 2),
        },
        "zero_to_60_mph": seconds_out(z60.elapsed_s),
        "zero_to_60_mph_less_rollout": seconds_out(z60.less_rollout_s),
        "zero_to_100_kmh": None if z100 is None else seconds_out(z100.elapsed_s),
        "zero_to_100_kmh_less_rollout": None if z100 is None else seconds_out(z100.less_rollout_s),
        "top_speed": {"speed": round(speed, 2), "gear": top.gear, "limited_by": top.limited_by},
    }


def _round(value: Number, digits: int) -> Number:
    return None if value is None else round(value, digits)


def comparison_document(
    setups: Sequence[NamedSetup],
    figures: Sequence[SetupFigures],
    cruise_speeds_m_s: Sequence[float],
    units: UnitSystem,
    fields: Mapping[str, str],
) -> dict[str, Any]:
    """The body of a comparison response, without reference, criterion and summary."""
    base = _numbers(figures[0], units)
    out = []
    own_notices = curve_notices(setups)
    for named, fig, own in zip(setups, figures, own_notices, strict=True):
        s, numbers = named.setup, _numbers(fig, units)
        ratios = s.drivetrain.overall_ratios.tolist()
        out.append(
            {
                "name": named.name,
                "changes": list(named.changes),
                "final_drive_ratio": s.drivetrain.final_drive_ratio,
                "gear_ratios": s.drivetrain.gear_ratios.tolist(),
                "rev_limit_rpm": round(fig.plan.rev_limit_rpm, 1),
                "engine": engine_document(named, fig, units),
                "tire": tire_document(s.tire, units),
                "gears": [
                    {
                        "gear": i + 1,
                        "ratio": float(s.drivetrain.gear_ratios[i]),
                        "overall_ratio": round(n, 4),
                        "speed_at_rev_limit": round(v, 2),
                    }
                    for i, (n, v) in enumerate(
                        zip(ratios, numbers["speed_at_rev_limit"], strict=True)
                    )
                ],
                "shifts": [
                    {
                        "from_gear": p.from_gear,
                        "to_gear": p.to_gear,
                        "shift_rpm": round(p.shift_rpm, 1),
                        "shift_speed": speed_out(p.shift_speed_m_s, units),
                        "rpm_after": round(p.rpm_after, 1),
                        "rpm_drop": round(p.rpm_drop, 1),
                        "reason": p.reason.value,
                    }
                    for p in fig.shifts
                ],
                "cruise": [
                    {
                        "speed": speed_out(v, units),
                        "rpm": rounded(row, 0),
                        "top_gear_rpm": round(float(row[-1]), 0),
                    }
                    for v, row in zip(cruise_speeds_m_s, fig.cruise_rpm, strict=True)
                ],
                "run": _run(fig, numbers),
                "delta": None if not named.changes else _delta(numbers, base),
                "warnings": _renamed(notices_out(fig.notices, fields), named.renames)
                + notices_out(own, fields),
            }
        )
    return {"units": unit_labels(units), "setups": out, "cautions": list(CAUTIONS)}


def cell(value: Number, width: int, fmt: str, signed: bool = False) -> str:
    """A number right-aligned in ``width`` columns, ``-`` for a missing one."""
    if value is None or not math.isfinite(value):
        return "-".rjust(width)
    return format(value, ("+" if signed else "") + fmt).rjust(width)


def comparison_summary(
    setups: Sequence[NamedSetup],
    figures: Sequence[SetupFigures],
    cruise_speeds_m_s: Sequence[float],
    units: UnitSystem,
    reference: str | None,
) -> str:
    """The comparison as a printable sheet of at most 80 columns."""
    lab = unit_labels(units)
    spd, lng = lab["speed"], lab["length"]
    numbers = [_numbers(f, units) for f in figures]
    cruise_v = speed_out(cruise_speeds_m_s[0], units, 0) if cruise_speeds_m_s else None
    columns: list[tuple[str, int, str, Callable[[dict[str, Any]], Number]]] = [
        ("Reach", 6, ".1f", lambda n: n["speed_at_rev_limit"][-1]),
    ]
    if cruise_v is not None:
        columns.append((f"rpm@{cruise_v:g}", 7, ".0f", lambda n: n["cruise_top_gear_rpm"][0]))
    if figures[0].report is not None:
        columns += [
            ("60ft", 5, ".2f", lambda n: n["sixty_ft"]),
            (
                ("0-60", 5, ".2f", lambda n: n["zero_to_60_mph"])
                if units is UnitSystem.US
                else ("0-100", 5, ".2f", lambda n: n["zero_to_100_kmh"])
            ),
            ("1/4", 6, ".2f", lambda n: n["quarter_mile_elapsed"]),
            ("Trap", 6, ".1f", lambda n: n["quarter_mile_trap_speed"]),
            ("Top", 6, ".1f", lambda n: n["top_speed"]),
        ]
    legend = "Reach: top gear at the rev limit; "
    if cruise_v is not None:
        legend += f"rpm@: top gear at {cruise_v:g} {spd}; "
    legend += f"speeds in {spd}, tire diameter in {lng}"
    if figures[0].report is not None:
        sprint = "0-60 mph" if units is UnitSystem.US else "0-100 km/h"
        legend += f"; times in s (60 ft, {sprint}, 1/4 mile); Top: top speed"
    body = ["", *wrap_text(legend + ".")]
    body += [""]
    head = f"{'Setup':<12} {'Axle':>5} {'Tire':>6}" + "".join(
        f" {h:>{w}}" for h, w, _, _ in columns
    )
    body.append(head)
    for named, n in zip(setups, numbers, strict=True):
        dia = 2.0 * from_si(named.setup.tire.rolling_radius_m, Quantity.LENGTH, units)
        row = f"{named.name[:12]:<12} {named.setup.drivetrain.final_drive_ratio:>5.2f} {dia:>6.1f}"
        body.append(row + "".join(f" {cell(get(n), w, f)}" for _, w, f, get in columns))
    if len(setups) > 1:
        body += ["", "Change against base:"]
        for named, n in zip(setups[1:], numbers[1:], strict=True):
            d = _delta(n, numbers[0])
            body.append(
                f"{named.name[:25]:<25}"
                + "".join(f" {cell(get(d), w, f, signed=True)}" for _, w, f, get in columns)
            )
    body += curves_summary(setups, figures, units)
    body += ["", "Shifts 1-2, 2-3, ... (rpm at the shift > rpm after it):"]
    for named, fig in zip(setups, figures, strict=True):
        text = "  ".join(f"{p.shift_rpm:.0f}>{p.rpm_after:.0f}" for p in fig.shifts)
        body += textwrap.wrap(
            f"{named.name[:12]:<12} {text or 'one gear, no shifts'}",
            WIDTH,
            subsequent_indent=" " * 13,
        )
    notices: list[Notice] = []
    for fig, own in zip(figures, curve_notices(setups), strict=True):
        notices += [x for x in (*fig.notices, *own) if x not in notices]
    return summary_sheet("GEARWORK SETUP COMPARISON", reference, body, notices)
