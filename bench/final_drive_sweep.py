"""Final-drive sweep benchmark: 100 candidate ratios simulated together against one run.

A sweep computed one candidate at a time would cost one run (plus one top-speed scan) per
candidate; the batched sweep integrates all of them in one pass per gear. The target is
that 100 candidates cost no more than 15 single runs. Timings are interleaved in rounds on
the same process and reported as medians; figures are printed, never asserted (the machine
is shared). Run with ``python -m bench.final_drive_sweep``.
"""

from __future__ import annotations

import asyncio
import json
import statistics
import time
from collections.abc import Callable
from pathlib import Path

import httpx
import numpy as np
from numpy.typing import NDArray

from core import shift_plan, simulate_run, top_speed
from core.batchdrive import batch_top_speed
from core.batchrun import batch_runs
from core.milestones import FOOT_M
from core.runreport import QUARTER_MILE_M, run_report
from core.simulate import DriveModel, drive_model
from core.sweep import sweep_final_drives
from core.sweepspec import SWEEP_DISTANCES, SWEEP_SPEEDS, SweepObjective
from service.app import app
from service.builders import build_curve, build_drivetrain, build_tire
from service.schemas.acceleration import AccelerationRunRequest
from service.vehicle_builders import build_launch, build_vehicle

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"
CANDIDATES = np.linspace(2.5, 4.5, 100)
ROUNDS = 15


def _model(name: str) -> DriveModel:
    raw = json.loads((DATA / f"{name}.json").read_text())
    body = AccelerationRunRequest.model_validate({k: raw[k] for k in raw if k != "shifts"})
    u = body.units
    curve = build_curve(body.engine.curve, u)
    return drive_model(
        curve,
        build_drivetrain(body.drivetrain),
        build_tire(body.drivetrain.tire, u),
        build_vehicle(body.vehicle, u),
        build_launch(body.launch, curve, u),
        rev_limit_rpm=body.engine.rev_limit_rpm,
    )


def _median_ms(fn: Callable[[], object], calls: int) -> float:
    samples = []
    for _ in range(calls):
        t0 = time.perf_counter()
        fn()
        samples.append(time.perf_counter() - t0)
    return statistics.median(samples) * 1e3


def _figures(model: DriveModel) -> dict[str, float]:
    plan = shift_plan(model.curve, model.drivetrain, model.tire, rev_limit_rpm=model.rev_limit_rpm)
    shifts: NDArray[np.float64] = np.array([s.shift_rpm for s in plan.shifts])
    cover = QUARTER_MILE_M + FOOT_M
    cover_v = max(b for _, _, b in SWEEP_SPEEDS)

    def one_run() -> object:
        return simulate_run(model, shifts, cover_distance_m=cover, cover_speed_m_s=cover_v)

    def one_top() -> object:
        return top_speed(model)

    def one_report() -> object:
        return run_report(model, shifts)

    def batch() -> object:
        runs = batch_runs(
            model, CANDIDATES, shifts, distances=SWEEP_DISTANCES, speeds=SWEEP_SPEEDS
        )
        return runs, batch_top_speed(model, CANDIDATES)

    def sweep() -> object:
        return sweep_final_drives(
            model.curve,
            model.drivetrain,
            model.tire,
            CANDIDATES,
            SweepObjective.QUARTER_MILE_ET,
            vehicle=model.vehicle,
            launch=model.launch,
            rev_limit_rpm=model.rev_limit_rpm,
        )

    cases = {
        "one run": (one_run, 20),
        "one top speed": (one_top, 20),
        "one run report": (one_report, 10),
        "batched 100": (batch, 3),
        "sweep 100 + optimum": (sweep, 2),
    }
    for fn, _ in cases.values():  # warm up
        fn()
    rounds: dict[str, list[float]] = {k: [] for k in cases}
    for _ in range(ROUNDS):
        for key, (fn, calls) in cases.items():
            rounds[key].append(_median_ms(fn, calls))
    return {k: statistics.median(v) for k, v in rounds.items()}


async def _endpoint_ms(url: str, body: dict[str, object], calls: int) -> float:
    transport = httpx.ASGITransport(app=app)
    async with httpx.AsyncClient(transport=transport, base_url="http://bench") as client:
        for _ in range(3):  # warm up
            (await client.post(url, json=body)).raise_for_status()
        samples = []
        for i in range(calls):
            # a different reference each time, so the result cache never answers
            t0 = time.perf_counter()
            r = await client.post(url, json={**body, "reference": f"bench-{i}"})
            samples.append(time.perf_counter() - t0)
            r.raise_for_status()
    return statistics.median(samples) * 1e3


def _endpoints() -> None:
    sweep = json.loads((DATA / "demo_sweep_us.json").read_text())
    wide = {**sweep, "ratios": [round(float(x), 3) for x in CANDIDATES]}
    comparison = json.loads((DATA / "demo_comparison_us.json").read_text())
    slider = {**comparison, "variants": comparison["variants"][:1]}
    print("endpoints in process (httpx, cache bypassed), median of 15 calls")
    for label, url, body in (
        ("comparison, base + 1 variant", "/v1/comparison", slider),
        ("comparison, base + 4 variants", "/v1/comparison", comparison),
        ("final-drive sweep, 9 ratios", "/v1/final-drive-sweep", sweep),
        ("final-drive sweep, 100 ratios", "/v1/final-drive-sweep", wide),
    ):
        print(f"   {label:<32} {asyncio.run(_endpoint_ms(url, body, 15)):9.3f} ms")


def main() -> None:
    print(
        f"{CANDIDATES.size} candidates from {CANDIDATES[0]:g} to {CANDIDATES[-1]:g}; "
        f"medians of {ROUNDS} interleaved rounds"
    )
    for name, label in (
        ("demo_sedan_run_metric", "clutch, six gears"),
        ("demo_wagon_converter_us", "converter, six gears, lock-up in 3-6"),
    ):
        f = _figures(_model(name))
        single = f["one run"] + f["one top speed"]
        print(f"{label} ({name})")
        for key, ms in f.items():
            print(f"   {key:<22} {ms:9.3f} ms")
        batched = f["batched 100"]
        print(f"   batched 100 / (one run + top speed)  {batched / single:6.1f} single runs")
        print(f"   batched 100 / one run report          {batched / f['one run report']:6.1f}")
        print(f"   batched 100 / one run alone           {batched / f['one run']:6.1f}")
        sweep = f["sweep 100 + optimum"]
        print(
            f"   whole sweep / (one run + top speed)   {sweep / single:6.1f}  (optimum included)"
        )


if __name__ == "__main__":
    main()
