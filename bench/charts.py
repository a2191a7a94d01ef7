"""Chart and report rendering benchmark: import costs, first render, steady renders, each
chart's cost against the computed shift plan it draws, measured side by side, the PNG's
compression settings, and matplotlib's PNG of the same chart (how it was made before).

Run with ``python -m bench.charts``. Figures are printed, never asserted: the machine is
shared, so each line gives the median and the 99th percentile of repeated renders, and the
ratios come from calls interleaved round by round in this run, each request with its own
reference (as a caller's page sends, so nothing could be answered from a cache).
"""

from __future__ import annotations

import functools
import io
import itertools
import json
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

from bench.common import ratio_line, side_by_side, time_call

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"
RUNS = 40


def _import_cost(modules: str) -> float:
    """Seconds to import ``modules`` in a fresh interpreter."""
    code = (
        f"import time; t = time.perf_counter(); import {modules}; print(time.perf_counter() - t)"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    ).stdout
    return float(out.strip().splitlines()[-1])


def _png_settings(chart: object) -> None:
    """Size and encoding time of the painted chart under other PNG settings: RGB against the
    palette the writer uses, zlib levels, the optimize flag."""
    from PIL import Image

    from service.output.png_chart import PNG_COMPRESSION, chart_picture

    picture, palette = chart_picture(chart)  # type: ignore[arg-type]
    indexed = picture.quantize(palette=palette, dither=Image.Dither.NONE)
    print(
        "   PNG settings (encoding only; the writer uses palette, level",
        PNG_COMPRESSION,
        end=")\n",
    )
    quantize = time_call(
        lambda: picture.quantize(palette=palette, dither=Image.Dither.NONE), runs=RUNS, warmup=3
    )
    print("      map onto the palette           ", quantize)
    cases = [("palette", indexed, level, False) for level in (1, 3, 6, 9)]
    cases += [
        ("palette", indexed, 6, True),
        ("RGB", picture, 1, False),
        ("RGB", picture, 3, False),
    ]
    for mode, image, level, optimize in cases:

        def save(
            image: Image.Image = image, level: int = level, optimize: bool = optimize
        ) -> bytes:
            out = io.BytesIO()
            image.save(out, format="PNG", compress_level=level, optimize=optimize)
            return out.getvalue()

        label = f"{mode} level {level}{' optimize' if optimize else ''}"
        timing = time_call(save, runs=RUNS // 2, warmup=2)
        print(f"      {label:<32}", timing, f"  {len(save()) / 1024:.0f} KiB")


def _import_costs() -> None:
    mpl = "matplotlib.figure, matplotlib.backends.backend_agg, matplotlib.backends.backend_pdf"
    print(f"import matplotlib (figure, Agg, PDF), fresh process: {_import_cost(mpl):.3f} s")
    print(
        f"import service.output.png_chart and what it needs (no matplotlib), fresh process: "
        f"{_import_cost('service.output.png_chart'):.3f} s"
    )


def _render_costs(plan: Any, force: Any, speed: Any) -> None:
    """First renders in the process, then each format of both charts, in isolation."""
    from bench.matplotlib_chart import matplotlib_png
    from service.output.chart_data import tractive_force_chart
    from service.output.png_chart import ChartFormat, render_chart

    t0 = time.perf_counter()
    render_chart(force, ChartFormat.SVG)
    print(f"first SVG render in the process: {time.perf_counter() - t0:.3f} s")
    t0 = time.perf_counter()
    render_chart(force, ChartFormat.PNG)
    print(f"first PNG render in the process (fonts loaded): {time.perf_counter() - t0:.3f} s")
    print(f"tractive-force chart, demo coupe (6 gears), {RUNS} renders each")
    print("   chart data    ", time_call(lambda: tractive_force_chart(plan), runs=RUNS, warmup=3))
    for fmt in ChartFormat:
        timing = time_call(functools.partial(render_chart, force, fmt), runs=RUNS, warmup=3)
        size = len(render_chart(force, fmt))
        print(f"   {fmt.name:<14}", timing, f"  {size / 1024:.0f} KiB")
    timing = time_call(functools.partial(matplotlib_png, force), runs=RUNS // 4, warmup=2)
    size = len(matplotlib_png(force))
    print("   PNG matplotlib", timing, f"  {size / 1024:.0f} KiB  (before)")
    _png_settings(force)
    print("run chart, demo sedan")
    for fmt in ChartFormat:
        timing = time_call(functools.partial(render_chart, speed, fmt), runs=RUNS, warmup=3)
        print(f"   {fmt.name:<14}", timing)


def _served_ratios(coupe: Any) -> None:
    """Each request computed: the plan's JSON against the chart of the same plan."""
    from bench.matplotlib_chart import matplotlib_png
    from service.http.responses import FastJSONResponse
    from service.mapping.shift_plan import compute_shift_plan
    from service.output.chart_data import tractive_force_chart
    from service.output.png_chart import ChartFormat, render_chart
    from service.output.shift_plan_summary import shift_plan_summary

    numbers = itertools.count()

    def fresh() -> Any:
        return coupe.model_copy(update={"reference": f"BENCH-{next(numbers)}"})

    def plan_request() -> object:
        done = compute_shift_plan(fresh())
        text = shift_plan_summary(
            done.plan, done.curve, done.drivetrain, done.tire, done.body.units, done.body.reference
        )
        return FastJSONResponse({**done.document, "summary": text}).body

    def chart_request(fmt: ChartFormat) -> bytes:
        return render_chart(tractive_force_chart(compute_shift_plan(fresh())), fmt)

    def old_png() -> bytes:
        return matplotlib_png(tractive_force_chart(compute_shift_plan(fresh())))

    # SVG and PNG each against the plan in a run of their own: matplotlib's heap churn
    # would otherwise land in the SVG's timings as collections of the garbage it left
    svg = functools.partial(chart_request, ChartFormat.SVG)
    png = functools.partial(chart_request, ChartFormat.PNG)
    got = side_by_side({"plan": plan_request, "svg": svg}, rounds=7, calls=5)
    new = side_by_side({"plan": plan_request, "png": png}, rounds=7, calls=5)
    old = side_by_side({"plan": plan_request, "mpl": old_png}, rounds=3, calls=3)
    print("demo coupe, each request computed: plan JSON vs the chart of the same plan")
    print("   shift plan (compute, summary, JSON)", got["plan"])
    print("   SVG chart (compute, draw)          ", got["svg"])
    print("   shift plan, in the PNG's run       ", new["plan"])
    print("   PNG chart (compute, draw)          ", new["png"])
    print("   shift plan, in matplotlib's run    ", old["plan"])
    print("   matplotlib PNG (compute, draw)     ", old["mpl"])
    for label, runs, key, target in (
        ("SVG chart / computed shift plan", got, "svg", "<= 4"),
        ("PNG chart / computed shift plan", new, "png", "none: SVG is the one set"),
        ("matplotlib PNG (before) / computed shift plan", old, "mpl", "for comparison"),
    ):
        print(ratio_line(label, runs[key].median / runs["plan"].median, target))


def _report_costs(plan: Any, run: Any, force: Any, speed: Any) -> None:
    from service.output.html import render_html
    from service.output.pdf import render_pdf
    from service.output.png_chart import svg_markup
    from service.output.run_report import acceleration_run_report
    from service.output.shift_plan_report import shift_plan_report
    from service.output.text import render_text

    report = shift_plan_report(plan)
    run_report = acceleration_run_report(run)
    print("shift-plan report, demo coupe (after the computation)")
    print("   text          ", time_call(lambda: render_text(report), runs=RUNS, warmup=3))
    print(
        "   html (+svg)   ",
        time_call(lambda: render_html(report, svg_markup(force)), runs=RUNS, warmup=3),
    )
    print("   pdf           ", time_call(lambda: render_pdf(report, force), runs=RUNS, warmup=3))
    print("acceleration-run report, demo sedan (after the computation)")
    print(
        "   pdf           ", time_call(lambda: render_pdf(run_report, speed), runs=RUNS, warmup=3)
    )


def main() -> None:
    _import_costs()
    from service.mapping.acceleration import compute_acceleration_run
    from service.mapping.shift_plan import compute_shift_plan
    from service.output.chart_data import run_chart, tractive_force_chart
    from service.schemas.acceleration import AccelerationRunRequest
    from service.schemas.shift_plan import ShiftPlanRequest

    coupe = ShiftPlanRequest.model_validate(json.loads((DATA / "demo_coupe_us.json").read_text()))
    sedan = AccelerationRunRequest.model_validate(
        json.loads((DATA / "demo_sedan_run_metric.json").read_text())
    )
    plan = compute_shift_plan(coupe)
    force = tractive_force_chart(plan)
    run = compute_acceleration_run(sedan)
    speed = run_chart(run)
    _render_costs(plan, force, speed)
    _served_ratios(coupe)
    _report_costs(plan, run, force, speed)


if __name__ == "__main__":
    main()
