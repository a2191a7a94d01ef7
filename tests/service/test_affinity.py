"""One CPU per worker: sibling processes take different CPUs, extras are left alone.

Pinning applies to the whole calling process, and siblings are the children of one parent,
so each case runs in a driver process of its own whose children are the workers."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from typing import Any

import pytest

pytestmark = pytest.mark.skipif(
    not hasattr(os, "sched_getaffinity") or len(os.sched_getaffinity(0)) < 2,
    reason="pinning needs Linux and at least two CPUs",
)

# a worker: a second thread, then pin; report the CPU and the allowed set; hold until told
WORKER = """
import os, sys, threading
threading.Thread(target=lambda: None).start()
from service.http.affinity import pin_worker
print(pin_worker(), sorted(os.sched_getaffinity(0)), flush=True)
sys.stdin.readline()
"""

# the driver: one worker per CPU and one more, all at once; then, while the others hold
# their CPUs, one more after the first ended
DRIVER = """
import json, os, subprocess, sys
def start():
    return subprocess.Popen([sys.executable, "-c", WORKER], stdin=subprocess.PIPE,
                            stdout=subprocess.PIPE, text=True)
def report(child):
    cpu, allowed = child.stdout.readline().split(" ", 1)
    return [cpu, allowed.strip()]
workers = [start() for _ in sorted(os.sched_getaffinity(0))]
reports = [report(w) for w in workers]
extra = start()
extra_report = report(extra)
extra.communicate("\\n", timeout=30)
workers[0].communicate("\\n", timeout=30)
again = start()
again_report = report(again)
for child in [again, *workers[1:]]:
    child.communicate("\\n", timeout=30)
print(json.dumps({"reports": reports, "extra": extra_report, "again": again_report}))
"""


@pytest.fixture(scope="module")
def outcome() -> dict[str, Any]:
    code = f"WORKER = {WORKER!r}\n{DRIVER}"
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True
    )
    result: dict[str, Any] = json.loads(done.stdout)
    return result


def test_sibling_workers_each_take_a_cpu_of_their_own(outcome: dict[str, Any]) -> None:
    cpus = sorted(os.sched_getaffinity(0))
    assert sorted(int(cpu) for cpu, _ in outcome["reports"]) == cpus
    assert all(allowed == f"[{cpu}]" for cpu, allowed in outcome["reports"])


def test_a_worker_beyond_the_cpu_count_is_left_to_the_scheduler(
    outcome: dict[str, Any],
) -> None:
    assert outcome["extra"] == ["None", str(sorted(os.sched_getaffinity(0)))]


def test_a_cpu_left_by_an_ended_worker_is_taken_by_the_next(outcome: dict[str, Any]) -> None:
    assert outcome["again"][0] == outcome["reports"][0][0]
