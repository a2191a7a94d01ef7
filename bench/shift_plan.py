"""Shift-plan benchmark: core timing, serialisation choice, served throughput vs /healthz.

Run with ``make bench``. Figures are printed, never asserted: the machine is shared. Every
served figure is the median of interleaved repeats against ``/healthz`` in the same run;
each shift-plan request carries its own reference, so the result cache never answers
(answers from the cache are measured on their own line).
"""

from __future__ import annotations

import asyncio
import contextlib
import json
import os
from pathlib import Path
from typing import Any

import numpy as np
import orjson

from bench.common import (
    app_cpu_per_request,
    asgi_call,
    async_side_by_side,
    demo_drive_model,
    one_cpu,
    ratio_line,
    time_call,
)
from bench.server import VARY, WrkResult, median_wrk, serve, server_cpu
from core import (
    Drivetrain,
    Tire,
    TorqueCurve,
    make_drivetrain,
    shift_plan,
    tire_from_size,
    torque_curve_from_torque,
)
from core.runs.performance import acceleration_shifts, model_converter
from service.schemas.shift_plan import ShiftPlanRequest, ShiftPlanResponse

SERVED_REPEATS = 5
DEMO = Path(__file__).resolve().parent.parent / "tests" / "data" / "demo_coupe_us.json"


def hundred_point_request() -> dict[str, Any]:
    """The demo coupe with its curve resampled to 100 points (invented data)."""
    body: dict[str, Any] = json.loads(DEMO.read_text())
    curve = body["engine"]["curve"]
    rpm = np.linspace(curve["rpm"][0], curve["rpm"][-1], 100)
    curve["torque"] = np.round(np.interp(rpm, curve["rpm"], curve["torque"]), 2).tolist()
    curve["rpm"] = np.round(rpm, 1).tolist()
    return body


def _core(body: dict[str, Any]) -> tuple[TorqueCurve, Drivetrain, Tire]:
    """Time the core plan; the curve, drivetrain and tire it used."""
    curve = torque_curve_from_torque(
        np.array(body["engine"]["curve"]["rpm"]),
        np.array(body["engine"]["curve"]["torque"]) * 1.3558,
    )
    drivetrain = make_drivetrain([3.10, 2.05, 1.48, 1.16, 0.94, 0.79], 3.55, efficiency=0.87)
    tire = tire_from_size("255/40R18")
    print("core shift_plan, 6 gears, 100-point curve")
    print("  ", time_call(lambda: shift_plan(curve, drivetrain, tire), runs=500))
    return curve, drivetrain, tire


def _core_cars() -> None:
    """Time the core plans of two demo cars: by net acceleration, and with a converter."""
    sedan = demo_drive_model("demo_sedan_run_metric")
    wagon = demo_drive_model("demo_wagon_converter_us")
    converter = model_converter(wagon)
    print("core net-acceleration shifts, demo sedan (road load, inertia, traction)")
    print("  ", time_call(lambda: acceleration_shifts(sedan), runs=300))
    print("core shift_plan with a torque converter, demo wagon")
    print(
        "  ",
        time_call(
            lambda: shift_plan(
                wagon.curve,
                wagon.drivetrain,
                wagon.tire,
                rev_limit_rpm=wagon.rev_limit_rpm,
                converter=converter,
            ),
            runs=60,
            warmup=5,
        ),
    )


def _serialisation(body: dict[str, Any], car: tuple[TorqueCurve, Drivetrain, Tire]) -> None:
    """The same response document written by orjson and by pydantic; the handler."""
    # the app logs as the served one below does (warnings only), so the figures print
    # without access lines
    os.environ.setdefault("GEARWORK_LOG_LEVEL", "warning")
    from service.mapping.shift_plan import shift_plan_document
    from service.routes.shift_plan import create_shift_plan

    curve, drivetrain, tire = car
    request = ShiftPlanRequest.model_validate(body)
    response = asyncio.run(create_shift_plan(request, None))
    doc = orjson.loads(response.body)
    raw = shift_plan_document(
        shift_plan(curve, drivetrain, tire), curve, drivetrain, tire, request.units, {}
    )
    raw.update(reference=None, summary="x")
    opts = orjson.OPT_SERIALIZE_NUMPY
    print("serialise response: orjson with NumPy arrays vs pydantic model")
    t_orjson = time_call(lambda: orjson.dumps(raw, option=opts), runs=500)
    t_pyd = time_call(lambda: ShiftPlanResponse.model_validate(doc).model_dump_json(), runs=500)
    print("   orjson  ", t_orjson)
    print("   pydantic", t_pyd)
    print(f"   pydantic / orjson = {t_pyd.median / t_orjson.median:.1f}x")
    print("handler in-process (parse model, compute, serialise)")
    loop = asyncio.new_event_loop()
    print(
        "  ",
        time_call(
            lambda: loop.run_until_complete(
                create_shift_plan(ShiftPlanRequest.model_validate(body), None)
            )
        ),
    )
    loop.close()


def _pchip(curve: TorqueCurve) -> None:
    from scipy.interpolate import PchipInterpolator

    from core.engine.pchip import pchip_coefficients

    x, y = curve.rpm, curve.torque_nm
    print("PCHIP coefficients for the 100-point curve")
    t_scipy = time_call(lambda: PchipInterpolator(x, y).c, runs=500)
    t_own = time_call(lambda: pchip_coefficients(x, y), runs=500)
    print("   scipy PchipInterpolator", t_scipy)
    print("   core pchip_coefficients", t_own)


def _app_cpu(body: dict[str, Any]) -> None:
    """CPU per request through the whole app in process, against /healthz."""
    from service.app import app

    fresh_bodies = [json.dumps({**body, "reference": f"APP-{i}"}).encode() for i in range(4000)]
    cpu = app_cpu_per_request(
        app,
        {
            "health": ("/healthz", None),
            "plan": ("/v1/shift-plan", fresh_bodies),
            "cached": ("/v1/shift-plan", [json.dumps({**body, "reference": "APP"}).encode()]),
        },
    )
    print("through the whole app in process (every middleware, no socket), CPU per request")
    print(f"   /healthz                           {cpu['health'] * 1e3:8.3f} ms")
    print(f"   /v1/shift-plan, computed (fresh)   {cpu['plan'] * 1e3:8.3f} ms")
    print(f"   /v1/shift-plan, cached answers     {cpu['cached'] * 1e3:8.3f} ms")
    print(
        ratio_line(
            "app CPU: healthz / computed shift plan", cpu["health"] / cpu["plan"], ">= 0.25"
        )
    )
    print(
        ratio_line(
            "app CPU: healthz / cached shift plan",
            cpu["health"] / cpu["cached"],
            "none: for reference",
        )
    )


def _outside_core(body: dict[str, Any]) -> None:
    """What a computed shift plan costs beyond the core plan, side by side in one run: the
    core plan of the request's own curve, drivetrain and tire; the handler (validate the
    parsed body, compute, document, summary, orjson); the whole app from the body's bytes."""
    from service.app import app
    from service.mapping.inputs import build_curve, build_drivetrain, build_tire
    from service.routes.shift_plan import create_shift_plan

    request = ShiftPlanRequest.model_validate(body)
    units, engine = request.units, request.engine
    curve = build_curve(engine.curve, units)
    drivetrain = build_drivetrain(request.drivetrain)
    tire = build_tire(request.drivetrain.tire, units)
    fresh = [json.dumps({**body, "reference": f"OUT-{i}"}).encode() for i in range(20000)]
    count = iter(range(10**9))

    def app_call() -> object:
        return asgi_call(app, "/v1/shift-plan", fresh[next(count) % len(fresh)])

    cpu = async_side_by_side(
        {
            "core": lambda: shift_plan(
                curve, drivetrain, tire, rev_limit_rpm=engine.rev_limit_rpm
            ),
            "handler": lambda: create_shift_plan(ShiftPlanRequest.model_validate(body), None),
            "app": app_call,
        }
    )
    core, handler, whole = cpu["core"], cpu["handler"], cpu["app"]
    print(
        "outside the core: CPU per computed shift plan, interleaved side by side, medians "
        "of 15 rounds of 40"
    )
    print(f"   core shift_plan (the request's own inputs)  {core * 1e3:8.3f} ms")
    print(f"   handler (validate, compute, document, text) {handler * 1e3:8.3f} ms")
    print(f"   whole app, computed (fresh bodies)          {whole * 1e3:8.3f} ms")
    print(f"   handler minus core                          {(handler - core) * 1e3:8.3f} ms")
    print(f"   app minus handler (middleware, routing)     {(whole - handler) * 1e3:8.3f} ms")
    print(f"   app CPU per request minus core              {(whole - core) * 1e3:8.3f} ms")
    print(
        ratio_line(
            "app CPU outside the core / core",
            (whole - core) / core,
            "none: the aim is <= 0.35 ms outside the core",
        )
    )


def _served_floor(health: WrkResult, plan: WrkResult, floor: WrkResult) -> None:
    """What the serving path alone allows: the same requests answered by a plan computed
    beforehand (:mod:`bench.serving_floor`), against the computed plan and /healthz."""
    print("   /v1/shift-plan, answered from a plan computed beforehand (the serving floor)")
    print("                                     ", floor)
    print(
        ratio_line(
            "serving floor / healthz throughput",
            floor.requests_per_s / health.requests_per_s,
            "none: the most any computation can reach",
        )
    )
    left = 4.0 * health.server_cpu_ms - floor.server_cpu_ms
    print(
        f"   server CPU: floor {floor.server_cpu_ms:.3f} ms, so computation, document and "
        f"summary cost {plan.server_cpu_ms - floor.server_cpu_ms:.3f} ms served; "
        f"0.25x leaves them {left:.3f} ms"
    )


def _served(body: dict[str, Any]) -> None:
    """Throughput served by uvicorn with one and two workers, against /healthz; with one
    pinned worker, the serving floor side by side."""
    fresh = json.dumps({**body, "reference": f"BENCH-{VARY}"}).encode()
    same = json.dumps({**body, "reference": "BENCH"}).encode()
    # one worker pinned to a CPU (the default), the same unpinned, two workers pinned
    for workers, pin in ((1, "true"), (1, "false"), (2, "true")):
        floored = workers == 1 and pin == "true"
        with contextlib.ExitStack() as stack:
            server = stack.enter_context(serve(workers, {"GEARWORK_PIN_CPU": pin}))
            base = server.base
            runs = {
                "health": (base + "/healthz", None),
                "plan": (base + "/v1/shift-plan", fresh),
                "cached": (base + "/v1/shift-plan", same),
            }
            clocks = dict.fromkeys(runs, server_cpu(server))
            if floored:
                floor = stack.enter_context(
                    serve(1, {"GEARWORK_PIN_CPU": pin}, module="bench.serving_floor")
                )
                runs["floor"] = (floor.base + "/v1/shift-plan", fresh)
                clocks["floor"] = server_cpu(floor)
            for url, _ in runs.values():
                if url.endswith("shift-plan"):
                    median_wrk({"warm": (url, fresh)}, repeats=1, seconds=1)
            got = median_wrk(runs, repeats=SERVED_REPEATS, cpu=clocks)
        health, plan, cached = got["health"], got["plan"], got["cached"]
        print(
            f"served by uvicorn, {workers} worker(s), "
            f"{'each kept on one CPU' if pin == 'true' else 'unpinned'}; "
            "wrk 1 thread, 16 connections, "
            f"3 s x {SERVED_REPEATS} interleaved repeats, medians; CPU: the server's "
            "processes only, per answered request"
        )
        print("   /healthz                          ", health)
        print("   /v1/shift-plan, computed (fresh)  ", plan)
        print("   /v1/shift-plan, cached answers    ", cached)
        print(
            ratio_line(
                "computed shift plan / healthz throughput",
                plan.requests_per_s / health.requests_per_s,
                ">= 0.25",
            )
        )
        print(
            ratio_line(
                "server CPU: healthz / computed shift plan",
                health.server_cpu_ms / plan.server_cpu_ms,
                "none: robust on a shared machine",
            )
        )
        print(ratio_line("computed shift plan p99 / p50", plan.p99_ms / plan.p50_ms, "<= 4"))
        if floored:
            _served_floor(health, plan, got["floor"])


def main() -> None:
    body = hundred_point_request()
    print("in process: kept on one CPU, as a served worker keeps itself")
    with one_cpu():
        car = _core(body)
        _core_cars()
        _serialisation(body, car)
        _pchip(car[0])
        _app_cpu(body)
        _outside_core(body)
    _served(body)


if __name__ == "__main__":
    main()
