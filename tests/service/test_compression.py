"""gzip off the event loop: where the squeezing runs, and that its bytes are deterministic.

The compressed bodies are checked with the standard library's ``gzip`` module (RFC 1952).
"""

from __future__ import annotations

import asyncio
import gzip

import pytest

from service.http.compression import OffLoopGZip
from tests.conftest import ApiClient, load_demo

URL = "/v1/shift-plan"


def test_a_large_answer_is_compressed_on_a_worker_thread(
    api: ApiClient, monkeypatch: pytest.MonkeyPatch
) -> None:
    on_loop: list[bool] = []
    squeeze = OffLoopGZip._compress

    def watched(self: OffLoopGZip, body: bytes) -> bytes:
        try:  # a running event loop in this thread means the work blocks it
            asyncio.get_running_loop()
            on_loop.append(True)
        except RuntimeError:
            on_loop.append(False)
        return squeeze(self, body)

    monkeypatch.setattr(OffLoopGZip, "_compress", watched)
    body = {**load_demo("demo_coupe_us"), "reference": "gzip-thread"}
    r = api.post(URL, json=body, headers={"Accept-Encoding": "gzip"})
    assert r.headers["content-encoding"] == "gzip"
    assert on_loop == [False]


def test_the_same_answer_gzips_to_the_same_bytes_without_a_time_stamp(api: ApiClient) -> None:
    body = {**load_demo("demo_coupe_us"), "reference": "gzip-bytes"}
    first = api.post(URL, json=body, headers={"Accept-Encoding": "gzip"})
    again = api.post(URL, json=body, headers={"Accept-Encoding": "gzip"})
    wire = gzip.compress(first.content, compresslevel=5, mtime=0)
    assert first.headers["content-length"] == again.headers["content-length"]
    assert int(first.headers["content-length"]) == len(wire)
    # RFC 1952, 2.3.1: bytes 4-7 are MTIME; 0 means no time stamp
    assert wire[4:8] == b"\0\0\0\0"


def test_gzip_refused_with_q_zero_gives_the_plain_answer(api: ApiClient) -> None:
    r = api.post(URL, json=load_demo("demo_coupe_us"), headers={"Accept-Encoding": "gzip;q=0"})
    assert "content-encoding" not in r.headers
    assert "Accept-Encoding" in r.headers["vary"]
