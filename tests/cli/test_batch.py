"""``gearwork batch``: one record per input line, resumable, the same bytes on every engine.

The outside reference is the service's own answer for each body (the in-process HTTP
client) and RFC 9457 problem details for lines that fail; the engines are checked against
each other: this process, a local process pool and an in-process Dask ``LocalCluster``.
"""

from __future__ import annotations

import json
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from click.testing import CliRunner

from service.cli.batch import run_batch
from service.cli.main import cli
from service.cli.records import OutputSpec
from tests.conftest import DATA, ApiClient

COLUMNS = ("top_speed.speed", "shifts[0].shift_rpm", "summary")


def _good(ident: str, endpoint: str, demo: str) -> str:
    body = json.loads((DATA / demo).read_text())
    return json.dumps({"id": ident, "endpoint": endpoint, "body": body})


@pytest.fixture(scope="module")
def mixed(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """Good and bad lines of several endpoints (the bodies are the invented demo cars)."""
    lines = [
        _good("coupe", "shift-plan", "demo_coupe_us.json"),
        _good("spacing", "gear-spacing", "demo_gear_spacing_us.json"),
        '{"id": "no-engine", "endpoint": "shift-plan", "body": {"units": "us"}}',
        "this is not JSON",
        '{"id": "who", "endpoint": "teleport", "body": {}}',
        _good("speedo", "speedometer", "demo_speedometer_us.json"),
        '{"endpoint": "run", "body": {}}',
        _good("chassis", "chassis-dyno-convert", "demo_chassis_metric.json"),
        _good("coupe-again", "shift-plan", "demo_coupe_us.json"),
    ]
    path = tmp_path_factory.mktemp("batch") / "mixed.jsonl"
    path.write_text("\n".join(lines) + "\n\n")
    return path


def _records(path: Path) -> list[dict[str, Any]]:
    return [json.loads(line) for line in path.read_text().splitlines()]


def test_mixed_good_and_bad_lines_give_one_record_each(mixed: Path, tmp_path: Path) -> None:
    out = tmp_path / "out.jsonl"
    summary = run_batch(mixed, out, OutputSpec("jsonl", ()), jobs=1)
    records = _records(out)
    assert [r["id"] for r in records] == [
        "coupe", "spacing", "no-engine", "line-4", "who", "speedo", "line-7", "chassis",
        "coupe-again",
    ]  # fmt: skip
    assert [r["status"] for r in records] == [200, 200, 422, 400, 422, 200, 422, 200, 200]
    assert summary.lines == 9
    assert summary.written == 9
    assert summary.errors == 4
    for r in records:
        if r["status"] != 200:  # RFC 9457 members on every error line
            assert {"type", "title", "status", "detail"} <= set(r["problem"])


def test_each_record_carries_the_http_answer(mixed: Path, tmp_path: Path, api: ApiClient) -> None:
    out = tmp_path / "out.jsonl"
    run_batch(mixed, out, OutputSpec("jsonl", ()), jobs=1)
    first, _, bad = _records(out)[:3]
    body = (DATA / "demo_coupe_us.json").read_bytes()
    r = api.post("/v1/shift-plan", content=body, headers={"content-type": "application/json"})
    assert first["result"] == r.json()
    r = api.post("/v1/shift-plan", json={"units": "us"})
    assert bad["problem"] == r.json()


def test_csv_keeps_the_chosen_columns_one_line_per_input(mixed: Path, tmp_path: Path) -> None:
    out = tmp_path / "out.csv"
    result = CliRunner().invoke(
        cli, ["batch", str(mixed), "-o", str(out), "-c", ",".join(COLUMNS), "-j", "1"]
    )
    assert result.exit_code == 0, result.stderr
    lines = out.read_text().splitlines()
    assert lines[0] == "id,endpoint,status,top_speed.speed,shifts[0].shift_rpm,summary,problem"
    assert len(lines) == 1 + 9
    assert lines[1].startswith("coupe,shift-plan,200,,7000.0,")
    assert "written (5 ok, 4 problems" in result.stderr


def _cut(path: Path, keep_lines: int, torn: bool) -> None:
    """Leave the first lines of a finished output, and half of the next one when torn."""
    lines = path.read_text().splitlines(keepends=True)
    text = "".join(lines[:keep_lines])
    if torn:
        text += lines[keep_lines][: len(lines[keep_lines]) // 2]
    path.write_text(text)


@pytest.mark.parametrize(
    ("kind", "keep", "torn"),
    [
        pytest.param("jsonl", 3, False, id="jsonl-clean-stop"),
        pytest.param("jsonl", 5, True, id="jsonl-torn-line"),
        pytest.param("csv", 4, True, id="csv-torn-line"),
    ],
)
def test_a_resumed_batch_equals_an_uninterrupted_one(
    mixed: Path, tmp_path: Path, kind: str, keep: int, torn: bool
) -> None:
    spec = OutputSpec("csv" if kind == "csv" else "jsonl", COLUMNS if kind == "csv" else ())
    whole, resumed = tmp_path / f"whole.{kind}", tmp_path / f"resumed.{kind}"
    run_batch(mixed, whole, spec, jobs=1)
    run_batch(mixed, resumed, spec, jobs=1)
    _cut(resumed, keep, torn)
    summary = run_batch(mixed, resumed, spec, jobs=1)
    assert resumed.read_bytes() == whole.read_bytes()
    assert summary.skipped == keep - (1 if kind == "csv" else 0)


@pytest.fixture(scope="module")
def dask_cluster() -> Iterator[Any]:
    distributed = pytest.importorskip("distributed")
    cluster = distributed.LocalCluster(
        n_workers=1, threads_per_worker=2, processes=False, dashboard_address=None
    )
    yield cluster
    cluster.close()


def test_local_processes_write_the_same_bytes_as_one_process(mixed: Path, tmp_path: Path) -> None:
    spec = OutputSpec("jsonl", ())
    here, pool = tmp_path / "here.jsonl", tmp_path / "pool.jsonl"
    run_batch(mixed, here, spec, jobs=1)
    run_batch(mixed, pool, spec, jobs=2, chunk_size=2)
    assert pool.read_bytes() == here.read_bytes()


def test_dask_writes_the_same_bytes_as_local_processes(
    mixed: Path, tmp_path: Path, dask_cluster: Any
) -> None:
    spec = OutputSpec("jsonl", ())
    here, dask = tmp_path / "here.jsonl", tmp_path / "dask.jsonl"
    run_batch(mixed, here, spec, jobs=1)
    run_batch(mixed, dask, spec, scheduler=dask_cluster, chunk_size=2)
    assert dask.read_bytes() == here.read_bytes()
