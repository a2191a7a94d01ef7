"""Cost growth: how the work of a request grows with the size of its input.

    python -m bench.growth

Four families, each timed in-process at sizes up to the service's cap: curve points
(10..2000) and gear count (2..12) of a shift plan, candidates of a final-drive sweep (1 up
to 1000, or the cap when it is lower) and samples of a logged pass (up to the cap). The
sizes of a family are timed interleaved round by round (medians of every call), and each
line prints the cost relative to the smallest size and the growth exponent k of
cost ~ size^k from the previous size (1 is linear). Sweep candidates are timed twice: the
whole sweep up to the service's cap, and its batched runs and top speeds up to 1000.
Figures are printed, never asserted.
"""

from __future__ import annotations

import functools
import json
import math
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np

from bench.common import side_by_side
from core import make_drivetrain, shift_plan, tire_from_size, torque_curve_from_torque
from core.choice.sweep_spec import MAX_CANDIDATE_GEARS, MAX_CANDIDATES
from core.logs.check import analyse_pass
from core.logs.pass_data import MAX_SAMPLES, SpeedUnit, pass_log
from core.logs.text import read_log_text

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"
SWEEP_SIZES = (1, 10, 30, 100, 300, 1000)


def _report(
    title: str,
    unit: str,
    sizes: list[int],
    fns: dict[int, Callable[[], object]],
    rounds: int,
    calls: int,
) -> None:
    got = side_by_side({str(n): fn for n, fn in fns.items()}, rounds=rounds, calls=calls, warmup=1)
    print(title)
    base = got[str(sizes[0])].median
    previous: tuple[int, float] | None = None
    for n in sizes:
        t = got[str(n)]
        slope = ""
        if previous is not None:
            k = math.log(t.median / previous[1]) / math.log(n / previous[0])
            slope = f"   growth exponent {k:5.2f}"
        print(f"   {n:>6} {unit:<10} {t.median * 1e3:9.3f} ms   {t.median / base:7.2f}x{slope}")
        previous = (n, t.median)


def _curve(points: int) -> tuple[np.ndarray[Any, Any], np.ndarray[Any, Any]]:
    """An invented smooth curve: 1000-7000 rpm, torque peaking mid-range [N*m]."""
    rpm = np.linspace(1000.0, 7000.0, points)
    torque = 380.0 + 90.0 * np.sin((rpm - 1000.0) / 6000.0 * math.pi) - 0.004 * (rpm - 4000.0)
    return rpm, torque


def curve_points() -> None:
    sizes = [10, 30, 100, 300, 1000, 2000]
    gears = make_drivetrain([3.1, 2.05, 1.48, 1.16, 0.94, 0.79], 3.55, efficiency=0.87)
    tire = tire_from_size("255/40R18")
    fns: dict[int, Callable[[], object]] = {}
    for n in sizes:
        curve = torque_curve_from_torque(*_curve(n))
        fns[n] = functools.partial(shift_plan, curve, gears, tire)
    _report("shift plan (core), 6 gears, by curve points", "points", sizes, fns, 7, 10)


def gear_count() -> None:
    sizes = [2, 4, 6, 8, 10, 12]
    curve = torque_curve_from_torque(*_curve(100))
    tire = tire_from_size("255/40R18")
    fns: dict[int, Callable[[], object]] = {}
    for n in sizes:
        ratios = [float(g) for g in np.geomspace(4.2, 0.7, n)]
        gears = make_drivetrain(ratios, 3.55, efficiency=0.87)
        fns[n] = functools.partial(shift_plan, curve, gears, tire)
    _report("shift plan (core), 100-point curve, by gear count", "gears", sizes, fns, 7, 10)


def sweep_candidates() -> None:
    from bench.final_drive_sweep import _model, quarter_mile_sweep

    model = _model("demo_sedan_run_metric")
    cap = min(MAX_CANDIDATES, MAX_CANDIDATE_GEARS // model.drivetrain.gear_count)
    sizes = sorted({n for n in SWEEP_SIZES if n <= cap} | {cap})
    over = [n for n in SWEEP_SIZES if n > cap]
    fns: dict[int, Callable[[], object]] = {}
    for n in sizes:
        ratios = np.linspace(2.5, 4.5, n) if n > 1 else np.array([3.5])

        fns[n] = functools.partial(quarter_mile_sweep, model, ratios)
    _report("final-drive sweep (core), demo sedan, by candidates", "candidates", sizes, fns, 3, 1)
    if over:
        print(f"   {', '.join(map(str, over))} candidates: above the service's cap of {cap}")
    batched_candidates(model)


def batched_candidates(model: Any) -> None:
    """The sweep's own integration (every candidate's runs and top speed, one batch) up to
    1000 candidates: the part of a sweep that grows with them, past the service's cap."""
    from core import shift_plan as plan_of
    from core.choice.batch_drive import batch_top_speed
    from core.choice.sweep_spec import SWEEP_DISTANCES, SWEEP_SPEEDS
    from core.runs.batch import batch_runs

    plan = plan_of(model.curve, model.drivetrain, model.tire, rev_limit_rpm=model.rev_limit_rpm)
    shifts = np.array([s.shift_rpm for s in plan.shifts])
    fns: dict[int, Callable[[], object]] = {}

    def batch(ratios: np.ndarray[Any, Any]) -> object:
        runs = batch_runs(model, ratios, shifts, distances=SWEEP_DISTANCES, speeds=SWEEP_SPEEDS)
        return runs, batch_top_speed(model, ratios)

    for n in SWEEP_SIZES:
        ratios = np.linspace(2.5, 4.5, n) if n > 1 else np.array([3.5])
        fns[n] = functools.partial(batch, ratios)
    title = "final-drive candidates batched (core runs + top speeds), demo sedan"
    _report(title, "candidates", list(SWEEP_SIZES), fns, 3, 1)


def log_samples() -> None:
    text = (DATA / "demo_log_pass_metric.csv").read_text()
    request: dict[str, Any] = json.loads((DATA / "demo_log_request_metric.json").read_text())
    dt = request["drivetrain"]
    drivetrain = make_drivetrain(dt["gear_ratios"], dt["final_drive_ratio"])
    from core import tire_from_diameter

    tire = tire_from_diameter(dt["tire"]["diameter"] / 1000.0)
    demo = read_log_text(text).log
    if demo.rpm is None:
        raise SystemExit("the demo log must carry rpm")
    sizes = [500, 2000, 5000, 10000, MAX_SAMPLES]
    end = float(demo.time_s[-1])
    fns: dict[int, Callable[[], object]] = {}
    for n in sizes:
        t = np.linspace(0.0, end, n)
        log = pass_log(
            t,
            np.interp(t, demo.time_s, demo.speed_m_s),
            speed_unit=SpeedUnit.M_S,
            rpm=np.interp(t, demo.time_s, demo.rpm),
        )
        fns[n] = functools.partial(analyse_pass, log, drivetrain, tire)
    _report(
        f"log analysis (core), demo pass resampled, by samples (cap {MAX_SAMPLES})",
        "samples",
        sizes,
        fns,
        5,
        2,
    )


def main() -> None:
    curve_points()
    gear_count()
    sweep_candidates()
    log_samples()


if __name__ == "__main__":
    main()
