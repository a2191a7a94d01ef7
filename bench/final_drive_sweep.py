"""Final-drive sweep benchmark: 100 and 1000 candidate ratios against one run.

A sweep computed one candidate at a time would cost one run (plus one top-speed scan) per
candidate; the batched sweep integrates all of them in one pass per gear, with the same
integrator as the single run. Targets (issue 12): the whole sweep of 100 candidates, its
continuous optimum included, costs no more than 8 single runs (goal 5), and 1000
candidates integrated together cost no more than 10 times 100. Timings are interleaved
in rounds on the same process, in CPU time, and reported as medians
(:mod:`bench.common`); figures are printed, never asserted (the machine is shared).
Run with ``python -m bench.final_drive_sweep``.
"""

from __future__ import annotations

import asyncio
import functools
import json
import statistics
import time
from collections.abc import Callable
from pathlib import Path

import httpx
import numpy as np
from numpy.typing import NDArray

from bench.common import demo_drive_model, interleaved_ms
from core import shift_plan, simulate_run, top_speed
from core.choice.batch_drive import batch_top_speed
from core.choice.sweep import sweep_final_drives
from core.choice.sweep_spec import SWEEP_DISTANCES, SWEEP_SPEEDS, SweepObjective
from core.runs.batch import batch_runs
from core.runs.drive_model import DriveModel
from core.runs.report import QUARTER_MILE_M, run_report
from core.units import FOOT_M
from service.app import app

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"
CANDIDATES = np.linspace(2.5, 4.5, 100)
THOUSAND = np.linspace(2.5, 4.5, 1000)
ROUNDS = 7


def _model(name: str) -> DriveModel:
    return demo_drive_model(name, leave_out=("shifts",))


def quarter_mile_sweep(model: DriveModel, ratios: NDArray[np.float64]) -> object:
    """The final-drive sweep of ``model`` over ``ratios`` for the quarter-mile time."""
    return sweep_final_drives(
        model.curve,
        model.drivetrain,
        model.tire,
        ratios,
        SweepObjective.QUARTER_MILE_ET,
        vehicle=model.vehicle,
        launch=model.launch,
        rev_limit_rpm=model.rev_limit_rpm,
    )


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

    def batch_of(ratios: NDArray[np.float64]) -> Callable[[], object]:
        def call() -> object:
            runs = batch_runs(
                model, ratios, shifts, distances=SWEEP_DISTANCES, speeds=SWEEP_SPEEDS
            )
            return runs, batch_top_speed(model, ratios)

        return call

    batch = batch_of(CANDIDATES)

    def sweep(ratios: NDArray[np.float64]) -> Callable[[], object]:
        return functools.partial(quarter_mile_sweep, model, ratios)

    cases = {
        "one run": (one_run, 20),
        "one top speed": (one_top, 20),
        "one run report": (one_report, 10),
        "batched 100": (batch, 3),
        "sweep 100 + optimum": (sweep(CANDIDATES), 3),
        "batched 1000": (batch_of(THOUSAND), 1),
    }
    return interleaved_ms(cases, ROUNDS)


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
            f"   sweep 100 / (one run + top speed)     {sweep / single:6.1f}  single runs,"
            " optimum included (target <= 8, goal 5)"
        )
        thousand = f["batched 1000"] / batched
        print(f"   batched 1000 / batched 100            {thousand:6.1f}  (target <= 10, linear;")
        print("      the service takes at most 200 ratios, so 1000 is the batched runs alone)")


if __name__ == "__main__":
    main()
