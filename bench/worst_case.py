"""Worst-case requests: the largest inputs the schemas admit, timed in-process.

    python -m bench.worst_case

No wall-clock guard stops a request: the work of every calculation is bounded by the
request schema instead (curve points, gears, table rows, trace points, a fixed search
budget), so the same input always does the same work. This script builds the heaviest
requests those bounds allow and prints how long each takes through the whole app (every
middleware included, the calculation on its slot thread; each run varies the reference so
the result cache never answers): shift plans, optimised runs, their HTML and PDF reports,
SVG and PNG charts, the largest comparison and final-drive sweep, a 256 KiB dyno file,
and a body of 15,000 unknown fields (refused before validation). Figures are printed,
never asserted.
"""

from __future__ import annotations

import copy
import json
import time
from pathlib import Path
from typing import Any

import anyio
import httpx
import numpy as np

from service.app import app

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"


def _demo(name: str) -> dict[str, Any]:
    data: dict[str, Any] = json.loads((DATA / f"{name}.json").read_text())
    return data


Body = dict[str, Any]


def _largest_runs(sedan: Body, curve: Body, gears: list[float]) -> tuple[Body, Body]:
    """The longest optimised run of the largest car, and the same with converter tables."""
    run = copy.deepcopy(sedan)
    run["engine"] = {"curve": curve}
    run["drivetrain"]["gear_ratios"] = gears
    run["shifts"] = {"optimise": True}
    run["run"] = {
        "finish_distance": 5000,
        "trace_points": 2000,
        "extra_distances": [100.0 * (i + 1) for i in range(10)],
        "extra_speed_intervals": [{"start": 10.0 * i, "end": 10.0 * i + 50} for i in range(10)],
    }
    converter = copy.deepcopy(run)
    converter["launch"] = {
        "coupling": "converter",
        "converter": {
            "speed_ratio": [i / 63 for i in range(64)],
            "k_factor_table": [150.0 + i for i in range(64)],
            "torque_ratio_table": [2.0 - i / 63 for i in range(64)],
        },
        "lockup_gears": list(range(3, 13)),
    }
    return run, converter


def _largest_choices(curve: Body, gears: list[float]) -> tuple[Body, Body]:
    """The largest comparison (8 variants) and final-drive sweep (100 candidates)."""
    comparison = _demo("demo_comparison_us")
    comparison["engine"] = {"curve": curve}
    comparison["drivetrain"]["gear_ratios"] = gears
    comparison["variants"] = [
        {"name": f"axle {i}", "final_drive_ratio": round(3.0 + 0.15 * i, 2)} for i in range(8)
    ]
    sweep = _demo("demo_sweep_us")
    sweep["engine"] = {"curve": curve}
    sweep["drivetrain"]["gear_ratios"] = gears
    sweep.pop("ratios", None)
    sweep["ratio_range"] = {"low": 2.5, "high": 4.975, "step": 0.025}  # 100 x 12 gears
    return comparison, sweep


def cases() -> list[tuple[str, str, dict[str, Any], dict[str, str]]]:
    """(label, path, body, headers) of the heaviest admissible requests."""
    coupe, sedan = _demo("demo_coupe_us"), _demo("demo_sedan_run_metric")
    rpm = np.linspace(500.0, 29000.0, 2000)
    curve = {
        "rpm": rpm.round(3).tolist(),
        "torque": (200.0 + 100.0 * np.sin(rpm / 3000.0)).round(3).tolist(),
    }
    gears = [float(g) for g in np.geomspace(5.0, 0.5, 12).round(4)]
    plan = copy.deepcopy(coupe)
    plan["engine"] = {"curve": curve}
    plan["drivetrain"]["gear_ratios"] = gears
    plan_car = copy.deepcopy(plan)
    plan_car["units"] = "metric"  # the sedan's vehicle is described in metric units
    plan_car["vehicle"] = {**sedan["vehicle"], "mass": 3000}
    plan_car["shift_criterion"] = "net_acceleration"
    plan_car["cruise_speeds"] = [10.0 * (i + 1) for i in range(10)]
    run, converter = _largest_runs(sedan, curve, gears)
    comparison, sweep = _largest_choices(curve, gears)
    crowded = {**coupe, **{f"k{i}": i for i in range(15_000)}}
    html, pdf = {"accept": "text/html"}, {"accept": "application/pdf"}
    return [
        ("shift plan, demo coupe", "/v1/shift-plan", coupe, {}),
        ("shift plan, 2000 points x 12 gears", "/v1/shift-plan", plan, {}),
        ("shift plan, same + vehicle, net accel.", "/v1/shift-plan", plan_car, {}),
        ("acceleration run, demo sedan", "/v1/acceleration-run", sedan, {}),
        ("acceleration run, largest, optimised", "/v1/acceleration-run", run, {}),
        ("same, converter tables + lock-up", "/v1/acceleration-run", converter, {}),
        ("report HTML, largest shift plan", "/v1/reports/shift-plan", plan_car, html),
        ("report PDF, largest shift plan", "/v1/reports/shift-plan", plan_car, pdf),
        ("report HTML, largest optimised run", "/v1/reports/acceleration-run", run, html),
        ("report PDF, largest optimised run", "/v1/reports/acceleration-run", run, pdf),
        ("report PDF, converter run", "/v1/reports/acceleration-run", converter, pdf),
        ("chart SVG, largest shift plan", "/v1/charts/tractive-force", plan_car, {}),
        (
            "chart PNG, largest shift plan",
            "/v1/charts/tractive-force",
            plan_car,
            {"accept": "image/png"},
        ),
        ("comparison, 8 variants, largest", "/v1/comparison", comparison, {}),
        ("final-drive sweep, 100 x 12 gears", "/v1/final-drive-sweep", sweep, {}),
        ("15,000 unknown fields (refused)", "/v1/shift-plan", crowded, {}),
    ]


def dyno_file() -> bytes:
    """A dyno export just under the 256 KiB body limit (about 10,000 rows)."""
    lines = ["Engine Speed (rpm),Torque [N*m],Power [kW]"]
    rpm = 1000.0
    while sum(len(x) + 1 for x in lines) < 250_000:
        torque = 300.0 + 50.0 * np.sin(rpm / 900.0)
        lines.append(f"{rpm:.1f},{torque:.2f},{torque * rpm / 9549.296596:.2f}")
        rpm += 0.7
    return ("\n".join(lines) + "\n").encode()


async def _measure(runs: int) -> None:
    transport = httpx.ASGITransport(app=app)
    wrong: list[str] = []
    async with httpx.AsyncClient(transport=transport, base_url="http://bench") as client:
        print(f"{'request':40s} {'status':>6s} {'best ms':>8s} {'worst ms':>9s} {'KiB':>7s}")
        for label, path, body, headers in cases():
            times = []
            status, size = 0, 0
            for i in range(runs):
                varied = {**body, "reference": f"bench-{i}"}
                t0 = time.perf_counter()
                r = await client.post(path, json=varied, headers=headers)
                times.append(time.perf_counter() - t0)
                status, size = r.status_code, len(r.content)
            print(
                f"{label:40s} {status:6d} {min(times) * 1e3:8.1f} {max(times) * 1e3:9.1f} "
                f"{size / 1024:7.0f}"
            )
            if status != (422 if "refused" in label else 200):
                wrong.append(f"{label}: {status} {r.text[:200]}")

        raw = dyno_file()
        times = []
        for i in range(runs):
            t0 = time.perf_counter()
            r = await client.post(
                f"/v1/torque-curves/import?units=us&run={i}",
                content=raw,
                headers={"content-type": "text/csv"},
            )
            times.append(time.perf_counter() - t0)
        print(
            f"{'dyno import, 256 KiB file':40s} {r.status_code:6d} {min(times) * 1e3:8.1f} "
            f"{max(times) * 1e3:9.1f} {len(r.content) / 1024:7.0f}"
        )
    if wrong:  # a case that is refused times the refusal, not the work: the run is void
        raise SystemExit("unexpected answers:\n" + "\n".join(wrong))


def main() -> None:
    """Time each case a few times and print the figures."""
    anyio.run(_measure, 5)


if __name__ == "__main__":
    main()
