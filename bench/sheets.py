"""PDF sheet cost against the computed shift plan it draws (issue target: <= 10x), and
each track answer's PDF sheet (coast-down, shift window, weather) against its JSON answer.

Run with ``python -m bench.sheets``. Figures are printed, never asserted. Every request body
differs (the driveline efficiency steps per call), so nothing is answered from a cache; the
shift plan and the PDF sheet are timed alternately in the same loop, and each figure is the
median of the repeats. For comparison the same chart is also drawn by matplotlib's PDF
backend (the earlier means), to show why the sheet draws its chart as PDF paths itself.
"""

from __future__ import annotations

import copy
import io
import json
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"
RUNS = 40
_OPEN: list[Any] = []
# the PDF standard fonts, as the earlier matplotlib sheet used (embedding cost ~0.8 s)
_CORE_FONTS = {
    "pdf.use14corefonts": True,
    "font.family": "Helvetica",
    "font.weight": "medium",
    "axes.labelweight": "medium",
}


def _bodies(name: str, count: int) -> list[dict[str, Any]]:
    raw = json.loads((DATA / f"{name}.json").read_text())
    out = []
    for i in range(count):
        body = copy.deepcopy(raw)
        body["drivetrain"]["efficiency"] = 0.80 + 0.001 * i  # a new body every call
        out.append(body)
    return out


def _alternate(fns: dict[str, Callable[[int], object]], runs: int) -> dict[str, float]:
    """Median seconds of each function, called in turn within one loop."""
    samples: dict[str, list[float]] = {name: [] for name in fns}
    for i in range(runs):
        for name, fn in fns.items():
            t0 = time.perf_counter()
            fn(i)
            samples[name].append(time.perf_counter() - t0)
    return {name: float(np.median(s)) for name, s in samples.items()}


def _served(
    path: str, bodies: list[dict[str, Any]], accept: str = "application/json"
) -> Callable[[int], object]:
    """One POST through the whole app in process (validation, middleware, serialisation)."""
    import httpx
    from anyio.from_thread import start_blocking_portal

    from service.app import create_app

    app = create_app()
    portal_cm = start_blocking_portal()
    portal = portal_cm.__enter__()
    _OPEN.append(portal_cm)  # kept running until the process ends
    client = httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://b")

    def call(i: int) -> object:
        async def go() -> httpx.Response:
            return await client.post(path, json=bodies[i], headers={"accept": accept})

        r = portal.call(go)
        if r.status_code != 200:
            raise RuntimeError(r.text)
        return r

    return call


TRACK = (  # JSON route, its sheet, demo body
    ("/v1/road-load/coast-down", "/v1/reports/road-load/coast-down", "demo_coastdown_metric"),
    ("/v1/shift-window", "/v1/reports/shift-window", "demo_shift_window_metric"),
    ("/v1/weather-correction", "/v1/reports/weather-correction", "demo_weather_metric"),
)


def _track_sheets(runs: int = RUNS // 4) -> None:
    """Each track answer's PDF sheet against its JSON answer, served in process."""
    print(f"track answers: PDF sheet against the JSON answer it prints, median of {runs}")
    for route, sheet, demo in TRACK:
        raw = json.loads((DATA / f"{demo}.json").read_text())
        bodies = [{**raw, "reference": f"BENCH-{i}"} for i in range(2 * runs + 2)]
        answer = _served(route, bodies[: runs + 1])
        pdf = _served(sheet, bodies[runs + 1 :], accept="application/pdf")
        answer(runs)  # first call: imports, caches
        pdf(runs)
        t = _alternate({"json": answer, "pdf": pdf}, runs)
        print(
            f"   {route:<28} {t['json'] * 1e3:8.1f} ms   sheet {t['pdf'] * 1e3:8.1f} ms"
            f"   {t['pdf'] / t['json']:5.2f} x"
        )


def main() -> None:
    import logging
    import os

    os.environ.setdefault("GEARWORK_REQUEST_LOG", "false")  # no access log lines in the figures

    from matplotlib.backends.backend_pdf import PdfPages

    logging.getLogger("matplotlib.font_manager").setLevel(logging.ERROR)

    from bench.matplotlib_chart import chart_figure, drawing
    from service.mapping.calculations import compute_acceleration_run, compute_shift_plan
    from service.output.chart_data import run_chart, tractive_force_chart
    from service.output.pdf import render_pdf
    from service.output.run_report import acceleration_run_report
    from service.output.shift_plan_report import shift_plan_report
    from service.schemas.acceleration import AccelerationRunRequest
    from service.schemas.shift_plan import ShiftPlanRequest

    plans = [ShiftPlanRequest.model_validate(b) for b in _bodies("demo_coupe_us", RUNS + 5)]
    runs = [
        AccelerationRunRequest.model_validate(b)
        for b in _bodies("demo_sedan_run_metric", RUNS + 5)
    ]

    def plan(i: int) -> object:
        return compute_shift_plan(plans[i])

    def plan_pdf(i: int) -> bytes:
        outcome = compute_shift_plan(plans[i])
        return render_pdf(shift_plan_report(outcome), tractive_force_chart(outcome), "letter")

    def matplotlib_chart_pdf(i: int) -> bytes:
        chart = tractive_force_chart(compute_shift_plan(plans[i]))
        out = io.BytesIO()
        with drawing(_CORE_FONTS), PdfPages(out) as pdf:
            pdf.savefig(chart_figure(chart))
        return out.getvalue()

    def run(i: int) -> object:
        return compute_acceleration_run(runs[i])

    def run_pdf(i: int) -> bytes:
        outcome = compute_acceleration_run(runs[i])
        return render_pdf(acceleration_run_report(outcome), run_chart(outcome), "a4")

    served_bodies = _bodies("demo_coupe_us", 2 * RUNS + 10)
    for b in served_bodies:
        b["units"] = "us"
    served_plan = _served("/v1/shift-plan", served_bodies[: RUNS + 5])
    served_pdf = _served(
        "/v1/reports/shift-plan", served_bodies[RUNS + 5 :], accept="application/pdf"
    )
    for fn in (plan, plan_pdf, matplotlib_chart_pdf, run, run_pdf, served_plan, served_pdf):
        fn(RUNS)  # first call: imports, font metrics, caches
    s = _alternate({"plan": served_plan, "pdf": served_pdf}, RUNS)
    print(f"served in process (POST through the app, cache missed), median of {RUNS}")
    print(f"   POST /v1/shift-plan                        {s['plan'] * 1e3:8.2f} ms")
    print(f"   POST /v1/reports/shift-plan (PDF)          {s['pdf'] * 1e3:8.2f} ms")
    print(
        f"   PDF sheet / shift plan                     {s['pdf'] / s['plan']:8.1f} x"
        "   (target <= 10)"
    )
    t = _alternate({"plan": plan, "pdf": plan_pdf, "mpl": matplotlib_chart_pdf}, RUNS)
    print(f"in process, no HTTP: computation alone against computation + sheet, median of {RUNS}")
    print(f"   shift plan (JSON document)        {t['plan'] * 1e3:8.2f} ms")
    print(f"   PDF sheet (plan + sheet + chart)  {t['pdf'] * 1e3:8.2f} ms")
    print(f"   PDF sheet / shift plan            {t['pdf'] / t['plan']:8.1f} x")
    print(
        f"   for comparison: the chart alone by matplotlib's PDF backend "
        f"{t['mpl'] * 1e3:.1f} ms = {t['mpl'] / t['plan']:.1f} x"
    )
    r = _alternate({"run": run, "pdf": run_pdf}, RUNS // 2)
    print(f"acceleration run, demo sedan, median of {RUNS // 2}")
    print(f"   run (JSON document)               {r['run'] * 1e3:8.2f} ms")
    print(f"   PDF sheet (run + sheet + chart)   {r['pdf'] * 1e3:8.2f} ms")
    print(f"   PDF sheet / run                   {r['pdf'] / r['run']:8.1f} x")
    _track_sheets()
    while _OPEN:  # stop the portals' event-loop threads, so the process ends
        _OPEN.pop().__exit__(None, None, None)


if __name__ == "__main__":
    main()
