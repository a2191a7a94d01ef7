"""One CPU per worker: sibling processes take different CPUs, extras are left alone.

Each case runs in child processes of this test, since pinning applies to the whole calling
process."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

pytestmark = pytest.mark.skipif(
    not hasattr(os, "sched_getaffinity") or len(os.sched_getaffinity(0)) < 2,
    reason="pinning needs Linux and at least two CPUs",
)

# pin, report the CPU and this process's allowed set, then hold the claim until told
CHILD = """
import os, sys, threading
threading.Thread(target=lambda: None).start()
from service.http.affinity import pin_worker
cpu = pin_worker()
print(cpu, sorted(os.sched_getaffinity(0)), flush=True)
sys.stdin.readline()
"""


def _pinned_child() -> subprocess.Popen[str]:
    return subprocess.Popen(
        [sys.executable, "-c", CHILD],
        stdin=subprocess.PIPE,
        stdout=subprocess.PIPE,
        text=True,
    )


def _report(child: subprocess.Popen[str]) -> tuple[str, str]:
    assert child.stdout is not None
    cpu, allowed = child.stdout.readline().split(" ", 1)
    return cpu, allowed.strip()


def _release(*children: subprocess.Popen[str]) -> None:
    for child in children:
        child.communicate("\n", timeout=30)


def test_sibling_workers_take_different_cpus_and_extras_are_left_to_the_scheduler() -> None:
    cpus = sorted(os.sched_getaffinity(0))
    children = [_pinned_child() for _ in cpus]
    try:
        reports = [_report(child) for child in children]
        extra = _pinned_child()
        extra_cpu, extra_allowed = _report(extra)
    finally:
        _release(*children)
    _release(extra)
    taken = sorted(int(cpu) for cpu, _ in reports)
    assert taken == cpus
    assert all(allowed == f"[{cpu}]" for cpu, allowed in reports)
    assert extra_cpu == "None"
    assert extra_allowed == str(cpus)


def test_a_cpu_left_by_an_ended_worker_is_taken_by_the_next() -> None:
    first = _pinned_child()
    cpu, _ = _report(first)
    _release(first)
    second = _pinned_child()
    again, _ = _report(second)
    _release(second)
    assert again == cpu
