"""The engine curves of a comparison, in the caller's units: each setup's peaks, the points
of every curve a setup brings (before and after a tune, two dyno sessions), the peak deltas,
and the summary lines that set the curves side by side."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from core.choice.setups import SetupFigures
from core.engine.curves import RPM_TO_RAD_S
from core.notices import Notice
from service.mapping.setups import NamedSetup
from service.mapping.shift_plan import rounded
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = [
    "curve_notices",
    "curves_summary",
    "engine_document",
    "has_own_curve",
    "peak_numbers",
]


def has_own_curve(named: NamedSetup) -> bool:
    """Whether a setup brings its own engine curve (the base always does)."""
    return not named.changes or "curve" in named.changes


def peak_numbers(fig: SetupFigures, units: UnitSystem) -> dict[str, float]:
    """The curve's peaks in the caller's units, unrounded (what a delta is taken of)."""
    plan = fig.plan
    return {
        "peak_torque": float(from_si(plan.peak_torque_nm, Quantity.TORQUE, units)),
        "peak_torque_rpm": plan.peak_torque_rpm,
        "peak_power": float(from_si(plan.peak_power_w, Quantity.POWER, units)),
        "peak_power_rpm": plan.peak_power_rpm,
    }


def engine_document(named: NamedSetup, fig: SetupFigures, units: UnitSystem) -> dict[str, Any]:
    """A setup's ``engine`` block: source, peaks, and its curve's points if its own."""
    curve = named.setup.curve
    peaks = peak_numbers(fig, units)
    points = None
    if has_own_curve(named):
        power_w = curve.torque_nm * curve.rpm * RPM_TO_RAD_S
        points = {
            "rpm": rounded(np.asarray(curve.rpm), 1),
            "torque": rounded(from_si(np.asarray(curve.torque_nm), Quantity.TORQUE, units), 3),
            "power": rounded(from_si(np.asarray(power_w), Quantity.POWER, units), 3),
        }
    return {
        "source": curve.source.value,
        "peak_torque": round(peaks["peak_torque"], 2),
        "peak_torque_rpm": round(peaks["peak_torque_rpm"], 0),
        "peak_power": round(peaks["peak_power"], 2),
        "peak_power_rpm": round(peaks["peak_power_rpm"], 0),
        "curve": points,
    }


def curve_notices(setups: Sequence[NamedSetup]) -> list[list[Notice]]:
    """Per setup, a warning when its own curve was measured elsewhere than the base's (one
    at the crank, the other at the wheels): their peak deltas mix the two."""
    base = setups[0].setup.curve.source
    out: list[list[Notice]] = []
    for i, named in enumerate(setups):
        mine = named.setup.curve.source
        if i == 0 or not has_own_curve(named) or mine is base:
            out.append([])
            continue
        out.append(
            [
                Notice(
                    "curve_source_differs",
                    f"{named.name}: its curve was measured at the {_where(mine)} and the "
                    f"base's at the {_where(base)}; the peak deltas compare the two as "
                    "measured.",
                    f"variants[{i - 1}].curve",
                )
            ]
        )
    return out


def _where(source: object) -> str:
    return "wheels" if getattr(source, "value", "") == "chassis" else "crankshaft"


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
