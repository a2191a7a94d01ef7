"""The "Inputs" part of every report: what the calculation used, in the caller's units."""

from __future__ import annotations

from typing import Any

from core import Drivetrain, TorqueCurve
from core.units import ISO_SEA_LEVEL_TEMPERATURE_K, MPH_M_S
from service.output.model import fmt, join_numbers
from service.schemas.inputs import CurveIn
from service.schemas.vehicle import LaunchIn, VehicleIn
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = ["curve_facts", "drivetrain_facts", "launch_facts", "units_line", "vehicle_facts"]

Facts = list[tuple[str, str]]
_FILLS = {"pchip": "monotone cubic (PCHIP)", "linear": "straight lines"}


def units_line(units: UnitSystem) -> str:
    """Every unit the report prints, in one line."""
    lab = unit_labels(units)
    return (
        f"{units.value}: torque {lab['torque']}, power {lab['power']}, road speed "
        f"{lab['speed']}, force {lab['force']}, length {lab['length']}, mass {lab['mass']}, "
        f"distance {lab['distance']}; engine speed rpm; times s"
    )


def curve_facts(
    curve_in: CurveIn,
    curve: TorqueCurve,
    rev_limit_rpm: float,
    efficiency_applied: bool,
    units: UnitSystem,
) -> Facts:
    """The curve's source, range, fill and peaks, and the rev limit used."""
    lab = unit_labels(units)
    source = (
        "engine dyno (driveline efficiency applied)"
        if efficiency_applied
        else "chassis dyno (already net of driveline losses)"
    )
    given = "torque" if curve_in.torque is not None else "power"
    n_t, n_p = curve.peak_torque_rpm(), curve.peak_power_rpm()
    t_peak = from_si(float(curve.torque_at([n_t])[0]), Quantity.TORQUE, units)
    p_peak = from_si(float(curve.power_at([n_p])[0]), Quantity.POWER, units)
    return [
        (
            "Curve",
            f"{source}; {given} at {len(curve_in.rpm)} points, {curve.rpm_min:.0f}-"
            f"{curve.rpm_max:.0f} rpm; {_FILLS[curve_in.interpolation]} between points",
        ),
        (
            "Peaks",
            f"torque {t_peak:.1f} {lab['torque']} at {n_t:.0f} rpm; power {p_peak:.1f} "
            f"{lab['power']} at {n_p:.0f} rpm",
        ),
        ("Rev limit", f"{rev_limit_rpm:.0f} rpm used"),
    ]


def drivetrain_facts(
    drivetrain: Drivetrain, tire: dict[str, Any], efficiency_applied: bool, units: UnitSystem
) -> Facts:
    """Ratios, efficiency and the tire as used (``tire`` is the response's tire part)."""
    lng = unit_labels(units)["length"]
    eff = drivetrain.efficiency
    if not efficiency_applied:
        eff_txt = "not applied (chassis curve)"
    elif bool((eff == eff[0]).all()):
        eff_txt = f"{float(eff[0]):.3g} in every gear"
    else:
        eff_txt = join_numbers(eff.tolist()) + " (by gear)"
    extra = (
        f"; extra reduction {drivetrain.extra_reduction:.4g}"
        if drivetrain.extra_reduction != 1.0
        else ""
    )
    size = tire["size"] or "by diameter or revolutions"
    diameter = "" if tire["diameter"] is None else f"diameter {fmt(tire['diameter'], 2)} {lng}, "
    return [
        ("Gear ratios", join_numbers(drivetrain.gear_ratios.tolist())),
        ("Final drive", f"{drivetrain.final_drive_ratio:.4g}{extra}"),
        ("Efficiency", eff_txt),
        (
            "Tire",
            f"{size}: {diameter}rolling radius {fmt(tire['rolling_radius'], 2)} {lng}, "
            f"{fmt(tire['revs_per_mile'], 1)} revs/mile, {fmt(tire['revs_per_km'], 1)} revs/km",
        ),
    ]


def vehicle_facts(vehicle: VehicleIn, units: UnitSystem) -> Facts:
    """The car as the caller described it (its own units)."""
    lab = unit_labels(units)
    lng, temp = lab["length"], lab["temperature"]
    share = (
        ""
        if vehicle.front_torque_share is None
        else f", {vehicle.front_torque_share * 100:.0f} % of torque to the front"
    )
    facts: Facts = [
        (
            "Vehicle",
            f"mass {vehicle.mass:g} {lab['mass']}; {vehicle.front_weight_share * 100:.1f} % "
            f"on the front axle; wheelbase {vehicle.wheelbase:g} {lng}; CG height "
            f"{vehicle.cg_height:g} {lng}; {vehicle.drive} drive{share}; friction "
            f"coefficient {vehicle.friction_coefficient:g}",
        )
    ]
    load = vehicle.road_load
    if load.coast_down is not None:
        f0, f1, f2 = load.coast_down
        text = (
            f"coast-down F0 {f0:g} {lab['force']}, F1 {f1:g} {lab['force_per_speed']}, "
            f"F2 {f2:g} {lab['force_per_speed_squared']}"
        )
    else:
        area = lab["area"]
        aero = (
            f"CdA {load.drag_area:g} {area}"
            if load.drag_area is not None
            else f"Cd {fmt(load.drag_coefficient, 3)} x frontal area "
            f"{fmt(load.frontal_area, 2)} {area}"
        )
        per_speed = 0.000041 * from_si(MPH_M_S, Quantity.SPEED, units)  # Gillespie: per mph
        rolling = (
            f"rolling 0.0041 + {per_speed:.3g} per {lab['speed']}"
            if load.rolling_coefficient is None
            else f"rolling coefficient {load.rolling_coefficient:g}"
        )
        text = f"{aero}; {rolling}"
    facts.append(("Road load", f"{text}; grade {load.grade_percent:g} %"))
    air = vehicle.air
    where = (
        f"pressure {air.pressure:g} {lab['pressure']}"
        if air.pressure is not None
        else f"altitude {air.altitude or 0.0:g} {lab['distance']}"
    )
    # ISO 2533 sea level, 15 degC
    standard = from_si(ISO_SEA_LEVEL_TEMPERATURE_K, Quantity.TEMPERATURE, units)
    temperature = (
        f"{standard:g} {temp} (standard)"
        if air.temperature is None
        else f"{air.temperature:g} {temp}"
    )
    facts.append(("Air", f"{temperature}, {where}, {air.relative_humidity:g} % humidity"))
    if vehicle.inertia is not None:
        i = vehicle.inertia
        facts.append(
            (
                "Inertia",
                f"engine {i.engine:g}, driveshaft {i.driveshaft:g}, wheels {i.wheels:g} "
                f"{lab['inertia']}",
            )
        )
    else:
        facts.append(("Inertia", "mass factor 1.04 + 0.0025 * overall ratio^2"))
    return facts


def launch_facts(launch: LaunchIn, units: UnitSystem) -> Facts:
    """Clutch or converter, and the shift time."""
    if launch.coupling == "clutch":
        text = f"clutch slipping at {launch.launch_rpm:g} rpm"
    else:
        c = launch.converter
        if c is None or c.speed_ratio is not None:
            text = "torque converter from tables"
        elif c.stall_rpm is not None:
            text = f"torque converter, stall {c.stall_rpm:g} rpm"
        else:
            unit = unit_labels(units)["torque"]
            text = f"torque converter, K-factor {c.k_factor:g} rpm/sqrt({unit})"
        if c is not None and c.speed_ratio is None:
            text += f", stall torque ratio {c.stall_torque_ratio:g}"
        if launch.lockup_gears:
            text += "; locks up in gear " + ", ".join(str(g) for g in launch.lockup_gears)
    return [("Launch", f"{text}; {launch.shift_time:g} s without drive per shift")]
