"""A comparison as an 80-column printable summary: the setups side by side, each
variant's change against the base, the engine curves a setup brings, and the shifts."""

from __future__ import annotations

import dataclasses
import textwrap
from collections.abc import Callable, Sequence
from typing import Any

from core.choice.setups import SetupFigures
from core.notices import Notice
from service.mapping.comparison import (
    Comparison,
    NamedSetup,
    curve_notices,
    has_own_curve,
    numbers_delta,
    peak_numbers,
    setup_numbers,
)
from service.mapping.documents import notice_text, speed_out
from service.output.sheets import WIDTH, cell, summary_sheet, wrap_text
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = ["comparison_summary", "curves_summary"]

Number = float | None


Column = tuple[str, int, str, Callable[[dict[str, Any]], Number]]


def _columns(units: UnitSystem, cruise_v: float | None, timed: bool) -> list[Column]:
    """The table's columns: heading, width, format and the number each shows."""
    columns: list[Column] = [
        ("Reach", 6, ".1f", lambda n: n["speed_at_rev_limit"][-1]),
    ]
    if cruise_v is not None:
        columns.append((f"rpm@{cruise_v:g}", 7, ".0f", lambda n: n["cruise_top_gear_rpm"][0]))
    if timed:
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
    return columns


def _legend(units: UnitSystem, cruise_v: float | None, timed: bool) -> str:
    lab = unit_labels(units)
    spd, lng = lab["speed"], lab["length"]
    legend = "Reach: top gear at the rev limit; "
    if cruise_v is not None:
        legend += f"rpm@: top gear at {cruise_v:g} {spd}; "
    legend += f"speeds in {spd}, tire diameter in {lng}"
    if timed:
        sprint = "0-60 mph" if units is UnitSystem.US else "0-100 km/h"
        legend += f"; times in s (60 ft, {sprint}, 1/4 mile); Top: top speed"
    return legend


def comparison_summary(comparison: Comparison, units: UnitSystem, reference: str | None) -> str:
    """The comparison as a printable sheet of at most 80 columns."""
    setups, figures = comparison.setups, comparison.figures
    cruise_speeds_m_s = comparison.cruise_speeds_m_s
    numbers = [setup_numbers(f, units) for f in figures]
    cruise_v = speed_out(cruise_speeds_m_s[0], units, 0) if cruise_speeds_m_s else None
    timed = figures[0].report is not None
    columns = _columns(units, cruise_v, timed)
    legend = _legend(units, cruise_v, timed)
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
            d = numbers_delta(n, numbers[0])
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
    # each sentence once, as the caller reads it, after the setups it concerns
    said: dict[str, tuple[Notice, list[str]]] = {}
    for named, fig, own in zip(setups, figures, curve_notices(setups), strict=True):
        for notice in (*fig.notices, *own):
            said.setdefault(notice_text(notice, units), (notice, []))[1].append(named.name)
    notices = [
        dataclasses.replace(n, message=f"{', '.join(dict.fromkeys(names))}: {n.message}")
        for n, names in said.values()
    ]
    return summary_sheet("GEARWORK SETUP COMPARISON", reference, body, notices, units)


def curves_summary(
    setups: Sequence[NamedSetup], figures: Sequence[SetupFigures], units: UnitSystem
) -> list[str]:
    """Summary lines setting the setups' engine curves side by side, with the change of
    each variant's peaks against the base; none when no variant brings its own curve."""
    if not any(has_own_curve(n) for n in setups[1:]):
        return []
    lab = unit_labels(units)
    tq, pw = lab["torque"], lab["power"]
    base = peak_numbers(figures[0], units)
    lines = [
        "",
        f"Engine curves (peak torque {tq} @ rpm, peak power {pw} @ rpm; change vs base):",
    ]
    for named, fig in zip(setups, figures, strict=True):
        if not has_own_curve(named):
            continue
        p = peak_numbers(fig, units)
        row = (
            f"{named.name[:12]:<12} {p['peak_torque']:7.1f} @ {p['peak_torque_rpm']:5.0f}"
            f"  {p['peak_power']:7.1f} @ {p['peak_power_rpm']:5.0f}"
        )
        if named.changes:
            row += (
                f"  {p['peak_torque'] - base['peak_torque']:+7.1f} "
                f"{p['peak_torque_rpm'] - base['peak_torque_rpm']:+6.0f}"
                f"  {p['peak_power'] - base['peak_power']:+7.1f} "
                f"{p['peak_power_rpm'] - base['peak_power_rpm']:+6.0f}"
            )
        lines.append(row)
    return lines
