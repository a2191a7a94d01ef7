"""Log-analysis and chassis-conversion benchmark: core and in-process request timings.

Run with ``python -m bench.log_analysis``. Figures are printed, never asserted: the machine
is shared. The pass is the invented demo log in tests/data (synthetic, 25 Hz); the large
case resamples it to 1000 Hz and keeps the first 20000 samples (the schema's limit).
"""

from __future__ import annotations

import asyncio
import itertools
import json
import os
from pathlib import Path
from typing import Any

import httpx
import numpy as np

from bench.common import demo_log, time_call
from core.driveline.chassis import MeasuredAt, chassis_conversion
from core.logs.check import analyse_pass
from core.logs.pass_data import SpeedUnit, pass_log
from core.logs.text import read_log_text

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"


_calls = itertools.count()


def _request(body: dict[str, Any], url: str) -> httpx.Response:
    """One POST through the ASGI app; a fresh reference each time keeps the result cache
    from answering (it keys on the body)."""
    os.environ.setdefault("GEARWORK_REQUEST_LOG", "false")  # no access log lines in the figures
    from service.app import app

    fresh = {**body, "reference": f"BENCH-{next(_calls)}"}

    async def go() -> httpx.Response:
        transport = httpx.ASGITransport(app=app)
        async with httpx.AsyncClient(transport=transport, base_url="http://bench") as c:
            return await c.post(url, json=fresh)

    return asyncio.run(go())


def main() -> None:
    text, drivetrain, tire = demo_log()
    request: dict[str, Any] = json.loads((DATA / "demo_log_request_metric.json").read_text())
    demo = read_log_text(text)
    print(f"read_log_text, demo export ({demo.rows} rows, semicolons, decimal commas)")
    print("  ", time_call(lambda: read_log_text(text), runs=200))
    print(f"analyse_pass, demo pass ({demo.log.samples} samples at 25 Hz, rpm logged)")
    print("  ", time_call(lambda: analyse_pass(demo.log, drivetrain, tire), runs=300))
    speed_only = pass_log(demo.log.time_s, demo.log.speed_m_s, speed_unit=SpeedUnit.M_S)
    print("analyse_pass, same pass without rpm (shifts from acceleration dips)")
    print("  ", time_call(lambda: analyse_pass(speed_only, drivetrain, tire), runs=300))

    t = np.arange(20_000) * 0.001
    log = demo.log
    if log.rpm is None:
        raise SystemExit("the demo log must carry rpm")
    big_speed = np.interp(t, log.time_s, log.speed_m_s)
    big_rpm = np.interp(t, log.time_s, log.rpm)
    big = pass_log(t, big_speed, speed_unit=SpeedUnit.M_S, rpm=big_rpm)
    print("analyse_pass, 20000 samples at 1000 Hz (the request limit)")
    print("  ", time_call(lambda: analyse_pass(big, drivetrain, tire), runs=30, warmup=3))

    rows = "\n".join(
        f"{a:.3f};{b:.2f};{c:.0f}".replace(".", ",")
        for a, b, c in zip(t[:12_000], big_speed[:12_000] * 3.6, big_rpm[:12_000], strict=True)
    )
    big_text = "Time [s];Speed [km/h];RPM\n" + rows
    print(f"read_log_text, 12000 rows ({len(big_text) // 1024} KiB, under the 256 KiB body limit)")
    print("  ", time_call(lambda: read_log_text(big_text), runs=20, warmup=2))
    big_request = {**request, "log": {"text": big_text}}
    print("POST /v1/log-analysis in process, the 12000-row text")
    print("  ", time_call(lambda: _request(big_request, "/v1/log-analysis"), runs=20, warmup=2))

    request["log"] = {"text": text}
    response = _request(request, "/v1/log-analysis")
    print(f"POST /v1/log-analysis in process, demo text ({len(response.content)} bytes out)")
    print("  ", time_call(lambda: _request(request, "/v1/log-analysis"), runs=50, warmup=5))

    rpm = np.linspace(2000.0, 7500.0, 2000)
    power = 150e3 * np.sin(np.pi * (rpm - 1500.0) / 7000.0)
    print("chassis_conversion, 2000-point curve, 6 gear efficiencies")
    print(
        "  ",
        time_call(
            lambda: chassis_conversion(
                rpm,
                measured_at=MeasuredAt.WHEELS,
                efficiency=[0.85, 0.86, 0.87, 0.89, 0.88, 0.87],
                power_w=power,
                measured_gear=4,
            ),
            runs=300,
        ),
    )
    chassis = json.loads((DATA / "demo_chassis_metric.json").read_text())
    print("POST /v1/chassis-dyno/convert in process, demo curve")
    print("  ", time_call(lambda: _request(chassis, "/v1/chassis-dyno/convert"), runs=100))


if __name__ == "__main__":
    main()
