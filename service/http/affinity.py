"""One CPU per worker process.

A worker's event loop and its calculation threads share one interpreter lock, so only one
of them runs Python at a time. Left to the scheduler, the lock passes between threads that
the kernel places on different CPUs, and each hand-over lands on a CPU whose caches hold
another thread's data: on the two-core benchmark machine the same shift plan cost about
1.9x the CPU time on a calculation thread that it cost on the event loop's own thread, and
as much as on the loop once the process was kept on one CPU (README, Scaling out).

:func:`pin_worker` keeps every thread of the calling process on one CPU of those it may
use. Sibling workers (same parent process) take different CPUs: each claims a CPU by
binding an abstract Unix socket named after the parent and the CPU, which the kernel frees
when the process ends, so a restarted worker takes the CPU its predecessor left. Once every
CPU is claimed, further workers are left to the scheduler.
"""

from __future__ import annotations

import atexit
import os
import socket

__all__ = ["pin_worker"]

_claims: list[socket.socket] = []  # held for the life of the process


def _claim(cpu: int) -> bool:
    """Whether this process now holds ``cpu`` among its siblings (Linux abstract socket)."""
    claim = socket.socket(socket.AF_UNIX, socket.SOCK_DGRAM)
    try:
        claim.bind(f"\0gearwork-{os.getppid()}-cpu-{cpu}")
    except OSError:
        claim.close()
        return False
    _claims.append(claim)
    atexit.register(claim.close)
    return True


def pin_worker() -> int | None:
    """Keep every thread of this process on one free CPU; the CPU, or ``None`` where the
    platform cannot pin, only one CPU is allowed, or siblings hold every CPU."""
    if not hasattr(os, "sched_setaffinity") or not os.path.isdir("/proc/self/task"):
        return None
    allowed = sorted(os.sched_getaffinity(0))
    if len(allowed) < 2:
        return None
    for cpu in allowed:
        if _claim(cpu):
            for thread_id in os.listdir("/proc/self/task"):
                try:
                    os.sched_setaffinity(int(thread_id), {cpu})
                except OSError:  # the thread ended meanwhile
                    continue
            return cpu
    return None
