"""A real server for the end-to-end tests: ``python -m service`` as the container runs it.

Two uvicorn workers on a free loopback port, metrics shared through
PROMETHEUS_MULTIPROC_DIR, request logs off; started once for the session.
"""

from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
import urllib.request
from collections.abc import Iterator
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
WORKERS = 2


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@pytest.fixture(scope="session")
def server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    port = _free_port()
    env = {
        **os.environ,
        "GEARWORK_WORKERS": str(WORKERS),
        "GEARWORK_REQUEST_LOG": "false",
        "GEARWORK_LOG_LEVEL": "warning",
        "PROMETHEUS_MULTIPROC_DIR": str(tmp_path_factory.mktemp("metrics")),
    }
    proc = subprocess.Popen(
        [sys.executable, "-m", "service", "--host", "127.0.0.1", "--port", str(port)],
        cwd=ROOT,
        env=env,
        stdout=subprocess.DEVNULL,
    )
    base = f"http://127.0.0.1:{port}"
    try:
        for _ in range(600):
            if proc.poll() is not None:
                pytest.fail(f"python -m service exited with {proc.returncode}")
            try:
                with urllib.request.urlopen(base + "/readyz", timeout=1):
                    break
            except OSError:
                time.sleep(0.05)
        yield base
    finally:
        proc.terminate()
        proc.wait(timeout=15)
