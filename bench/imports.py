"""Dyno-file and logger-export import benchmark: 100 000 cells each, parsed in process.

Run with ``python -m bench.imports``. Figures are printed, never asserted: the machine is
shared. Each figure is the median of repeats; each import is set beside a floor measured in
the same run on the same text (split the lines and cells with ``str.split`` and convert
every cell with ``float``, no checks), so the ratio holds on any machine. The target
(issue: dyno and log import) is 100 000 cells in at most 100 ms; it is judged on CPU time,
which leaves out waiting for a core when the machine is shared.

The exports are invented: a smooth made-up torque curve and a made-up pass, written the way
a shop's software might (semicolons and decimal commas; a units row; ignored columns).
"""

from __future__ import annotations

import time
from collections.abc import Callable

import numpy as np

from core.dyno.file import read_dyno_text
from core.logs.text import read_log_text

ROWS = 16_667  # x 6 columns = 100 002 cells, inside both readers' line limits
TARGET_S = 0.100
REPEATS = 21


def dyno_export() -> str:
    """An invented engine-dyno export: 16 667 rows x 6 columns."""
    rpm = np.linspace(1000.0, 8999.0, ROWS)
    torque = 300.0 + 80.0 * np.sin((rpm - 1000.0) / 2600.0)
    power = torque * rpm * 2.0 * np.pi / 60.0 / 1000.0
    oil = 90.0 + 0.0005 * (rpm - 1000.0)
    afr = 12.5 + 0.1 * np.cos(rpm / 500.0)
    boost = 1.2 * (1.0 - np.exp(-(rpm - 1000.0) / 1500.0))
    lines = ["RPM;Torque (N·m);Power (kW);Oil temp (C);AFR;Boost (bar)"]
    lines += [
        f"{a:.1f};{b:.2f};{c:.3f};{d:.1f};{e:.2f};{f:.3f}".replace(".", ",")
        for a, b, c, d, e, f in zip(rpm, torque, power, oil, afr, boost, strict=True)
    ]
    return "\n".join(lines) + "\n"


def log_export() -> str:
    """An invented logger export: 16 667 rows x 6 columns."""
    t = np.arange(ROWS) * 0.001
    speed = 200.0 * (1.0 - np.exp(-t / 8.0))
    rpm = 2500.0 + 4000.0 * ((t * 0.6) % 1.0)
    accel = np.gradient(speed / 3.6, t) / 9.80665
    lat = 0.01 * np.sin(t)
    throttle = 99.0 + np.cos(t)
    lines = ["Time [s];Speed [km/h];RPM;Accel [g];Lat [g];Throttle (%)"]
    lines += [
        f"{a:.3f};{b:.2f};{c:.0f};{d:.3f};{e:.3f};{f:.1f}".replace(".", ",")
        for a, b, c, d, e, f in zip(t, speed, rpm, accel, lat, throttle, strict=True)
    ]
    return "\n".join(lines) + "\n"


def floor(text: str) -> object:
    """The least any reader does: split lines and cells, convert every cell."""
    rows = [line.split(";") for line in text.replace(",", ".").split("\n")[1:] if line]
    return np.array([[float(c) for c in row] for row in rows], dtype=np.float64)


def _median_pair(
    first: Callable[[], object], second: Callable[[], object]
) -> tuple[tuple[float, float], tuple[float, float]]:
    """Medians of (wall, CPU) time [s] of ``first`` and ``second`` timed in turn, so load
    falls on both alike; CPU time leaves out waiting for a core on a busy machine."""
    for fn in (first, second):
        fn()
    samples: tuple[list[tuple[float, float]], list[tuple[float, float]]] = ([], [])
    for _ in range(REPEATS):
        for fn, out in zip((first, second), samples, strict=True):
            w0, c0 = time.perf_counter(), time.process_time()
            fn()
            out.append((time.perf_counter() - w0, time.process_time() - c0))
    a, b = (np.median(np.array(s), axis=0) for s in samples)
    return (float(a[0]), float(a[1])), (float(b[0]), float(b[1]))


def report(name: str, text: str, read: Callable[[], object]) -> None:
    """Time one reader against the floor on the same text and print both."""
    cells = sum(line.count(";") + 1 for line in text.split("\n")[1:] if line)
    (base, base_cpu), (got, got_cpu) = _median_pair(lambda: floor(text), read)
    print(f"{name}: {cells} cells, {len(text) // 1024} KiB, medians of {REPEATS} in turn")
    print(f"   floor (split + float)  wall {base * 1e3:7.1f} ms   cpu {base_cpu * 1e3:7.1f} ms")
    print(f"   reader                 wall {got * 1e3:7.1f} ms   cpu {got_cpu * 1e3:7.1f} ms")
    print(
        f"   reader / floor {got / base:5.2f}x (cpu {got_cpu / base_cpu:5.2f}x);   reader cpu "
        f"{got_cpu * 1e3:.1f} ms against the {TARGET_S * 1e3:.0f} ms target "
        f"({'met' if got_cpu <= TARGET_S else 'NOT met'})"
    )


def main() -> None:
    dyno = dyno_export()
    log = log_export()
    report("read_dyno_text, engine-dyno export", dyno, lambda: read_dyno_text(dyno))
    report("read_log_text, logger export", log, lambda: read_log_text(log))


if __name__ == "__main__":
    main()
