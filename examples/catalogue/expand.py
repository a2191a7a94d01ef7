"""Expand the invented catalogue into a gearwork batch file (JSON lines).

Every vehicle in vehicles.csv with every stocked ratio in ratios.txt and every tire size in
tires.txt gives two lines: an acceleration run (1/4 mile, 0-60 mph, top speed) and a shift
plan with the car described (cruise rpm at highway speed). The engine curve of each car is
an invented shape scaled to its peak torque, peak-torque rpm and rev limit.

    python examples/catalogue/expand.py -o runs.jsonl [--vehicles 20]
"""

from __future__ import annotations

import argparse
import csv
import json
from collections.abc import Iterator
from pathlib import Path
from typing import Any

HERE = Path(__file__).parent
HIGHWAY_KMH = 110.0


def _rows(name: str) -> list[str]:
    lines = (HERE / name).read_text().splitlines()
    return [line.strip() for line in lines if line.strip() and not line.startswith("#")]


def vehicles() -> list[dict[str, str]]:
    """The invented vehicles, one dict per row."""
    return list(csv.DictReader(_rows("vehicles.csv")))


def stocked_ratios() -> list[float]:
    """The stocked ring-and-pinion ratios."""
    return [float(r) for r in _rows("ratios.txt")]


def curve(peak_nm: float, peak_rpm: float, limit_rpm: float) -> dict[str, list[float]]:
    """An invented torque shape: rises to the peak, falls to 78 % of it at the limit."""
    rpm = [1000.0 + 500.0 * i for i in range(int((limit_rpm - 1000.0) // 500.0) + 1)]
    if rpm[-1] < limit_rpm:
        rpm.append(limit_rpm)
    torque = []
    for n in rpm:
        if n <= peak_rpm:
            x = (n - 1000.0) / max(peak_rpm - 1000.0, 1.0)
            share = 0.62 + 0.38 * (2 * x - x * x)
        else:
            x = (n - peak_rpm) / max(limit_rpm - peak_rpm, 1.0)
            share = 1.0 - 0.22 * x * x
        torque.append(round(peak_nm * share, 1))
    return {"rpm": rpm, "torque": torque}


def bodies(car: dict[str, str], ratio: float, tire: str) -> tuple[dict[str, Any], dict[str, Any]]:
    """The acceleration-run and shift-plan request bodies of one fitment (metric units)."""
    limit = float(car["rev_limit_rpm"])
    engine = {
        "curve": curve(float(car["peak_torque_nm"]), float(car["peak_torque_rpm"]), limit),
        "rev_limit_rpm": limit,
    }
    drivetrain = {
        "gear_ratios": [float(g) for g in car["gear_ratios"].split()],
        "final_drive_ratio": ratio,
        "efficiency": 0.88 if car["drive"] == "rear" else 0.9,
        "tire": {"size": tire},
    }
    vehicle = {
        "mass": float(car["mass_kg"]),
        "front_weight_share": float(car["front_weight_share"]),
        "wheelbase": float(car["wheelbase_mm"]),
        "cg_height": float(car["cg_height_mm"]),
        "drive": car["drive"],
        "friction_coefficient": 0.95,
        "road_load": {
            "drag_coefficient": float(car["drag_coefficient"]),
            "frontal_area": float(car["frontal_area_m2"]),
            "rolling_coefficient": 0.011,
        },
    }
    ref = f"{car['code']} {ratio:.2f} {tire}"
    run = {
        "units": "metric",
        "reference": ref,
        "engine": engine,
        "drivetrain": drivetrain,
        "vehicle": vehicle,
        "launch": {"coupling": "clutch", "launch_rpm": min(3000.0, 0.5 * limit)},
        "run": {"trace_points": 10},
    }
    plan = {
        "units": "metric",
        "reference": ref,
        "engine": engine,
        "drivetrain": drivetrain,
        "vehicle": vehicle,
        "cruise_speeds": [HIGHWAY_KMH],
        "table": {"rpm_step": 250},
    }
    return run, plan


def lines(limit: int | None) -> Iterator[str]:
    """The batch lines, run then cruise for each vehicle, ratio and tire."""
    ratios = stocked_ratios()
    tires = _rows("tires.txt")
    for car in vehicles()[:limit]:
        for ratio in ratios:
            for tire in tires:
                run, plan = bodies(car, ratio, tire)
                key = f"{car['code']}|{ratio:.2f}|{tire}"
                yield json.dumps({"id": f"{key}|run", "endpoint": "run", "body": run})
                yield json.dumps({"id": f"{key}|cruise", "endpoint": "shift-plan", "body": plan})


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("-o", "--output", default="runs.jsonl", help="batch file to write")
    parser.add_argument("--vehicles", type=int, default=None, help="only the first N vehicles")
    args = parser.parse_args()
    with open(args.output, "w") as out:
        for line in lines(args.vehicles):
            out.write(line + "\n")


if __name__ == "__main__":
    main()
