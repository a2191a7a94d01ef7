"""Cluster manifests and the Dockerfile.

Every manifest in deploy/ is validated against the Kubernetes OpenAPI schemas bundled in
the ``kubernetes-validate`` package (strict: unknown fields are errors), offline: the
schemas ship inside the package, and the test refuses any network connection while it
validates. Docker cannot build here, so the Dockerfile's key properties are read from it.
"""

from __future__ import annotations

import re
import socket
from pathlib import Path
from typing import Any

import kubernetes_validate  # type: ignore[import-untyped]
import pytest
import yaml  # type: ignore[import-untyped]

ROOT = Path(__file__).resolve().parent.parent
DEPLOY = ROOT / "deploy"
# the oldest Kubernetes release the manifests promise to work on, and the newest bundled
VERSIONS = ["1.29.0", "1.37.0"]


def _documents() -> list[tuple[str, dict[str, Any]]]:
    out = []
    for path in sorted(DEPLOY.glob("*.yaml")):
        for doc in yaml.safe_load_all(path.read_text()):
            if doc:
                out.append((path.name, doc))
    return out


DOCS = _documents()


def _kind(kind: str) -> dict[str, Any]:
    found = [doc for _, doc in DOCS if doc["kind"] == kind]
    assert len(found) == 1, f"expected one {kind}, found {len(found)}"
    return found[0]


@pytest.fixture
def no_network(monkeypatch: pytest.MonkeyPatch) -> None:
    def refuse(*args: object, **kwargs: object) -> None:
        raise OSError("network use during manifest validation")

    monkeypatch.setattr(socket.socket, "connect", refuse)
    monkeypatch.setattr(socket, "create_connection", refuse)


def test_deploy_holds_the_expected_kinds() -> None:
    assert sorted(doc["kind"] for _, doc in DOCS) == [
        "Deployment",
        "HorizontalPodAutoscaler",
        "PodDisruptionBudget",
        "Service",
    ]


@pytest.mark.usefixtures("no_network")
@pytest.mark.parametrize("version", VERSIONS)
@pytest.mark.parametrize(("name", "doc"), [pytest.param(n, d, id=n) for n, d in DOCS])
def test_manifest_is_valid_kubernetes(name: str, doc: dict[str, Any], version: str) -> None:
    kubernetes_validate.validate(doc, version, strict=True)


def test_invalid_manifest_is_caught(no_network: None) -> None:
    bad = {**_kind("Service"), "spec": {"ports": [{"port": "eighty"}]}}
    with pytest.raises(kubernetes_validate.ValidationError, match="eighty"):
        kubernetes_validate.validate(bad, VERSIONS[-1], strict=True)


def _container() -> dict[str, Any]:
    containers: list[dict[str, Any]] = _kind("Deployment")["spec"]["template"]["spec"][
        "containers"
    ]
    assert len(containers) == 1
    return containers[0]


def test_probes_use_readiness_and_liveness_endpoints() -> None:
    c = _container()
    assert c["readinessProbe"]["httpGet"]["path"] == "/readyz"
    assert c["startupProbe"]["httpGet"]["path"] == "/readyz"
    assert c["livenessProbe"]["httpGet"]["path"] == "/healthz"


def test_container_has_requests_and_limits() -> None:
    res = _container()["resources"]
    for kind in ("requests", "limits"):
        assert {"cpu", "memory"} <= res[kind].keys()


def test_container_runs_locked_down() -> None:
    pod = _kind("Deployment")["spec"]["template"]["spec"]
    assert pod["securityContext"]["runAsNonRoot"] is True
    assert pod["securityContext"]["runAsUser"] != 0
    assert pod["automountServiceAccountToken"] is False
    sc = _container()["securityContext"]
    assert sc["readOnlyRootFilesystem"] is True
    assert sc["allowPrivilegeEscalation"] is False
    assert sc["capabilities"]["drop"] == ["ALL"]


def test_metrics_directory_is_a_writable_volume() -> None:
    c = _container()
    env = {e["name"]: e["value"] for e in c["env"]}
    mounts = [m["mountPath"] for m in c["volumeMounts"]]
    assert any(env["PROMETHEUS_MULTIPROC_DIR"].startswith(m) for m in mounts)


def test_objects_select_the_deployments_pods() -> None:
    labels = _kind("Deployment")["spec"]["template"]["metadata"]["labels"]
    for kind in ("Service", "PodDisruptionBudget"):
        doc = _kind(kind)
        selector = doc["spec"]["selector"]
        selector = selector.get("matchLabels", selector)
        assert selector.items() <= labels.items(), kind
    assert _kind("Deployment")["spec"]["selector"]["matchLabels"].items() <= labels.items()


def test_autoscaler_targets_the_deployment_and_keeps_the_budget_satisfiable() -> None:
    hpa, pdb = _kind("HorizontalPodAutoscaler"), _kind("PodDisruptionBudget")
    target = hpa["spec"]["scaleTargetRef"]
    assert (target["kind"], target["name"]) == (
        "Deployment",
        _kind("Deployment")["metadata"]["name"],
    )
    assert hpa["spec"]["minReplicas"] >= 2
    assert pdb["spec"]["minAvailable"] < hpa["spec"]["minReplicas"]


def test_container_port_matches_the_image() -> None:
    port = _container()["ports"][0]["containerPort"]
    assert f"EXPOSE {port}" in DOCKERFILE
    assert f"GEARWORK_PORT={port}" in DOCKERFILE


DOCKERFILE = (ROOT / "Dockerfile").read_text()
INSTRUCTIONS = [
    line.split(None, 1)
    for line in re.sub(r"\\\n", " ", DOCKERFILE).splitlines()
    if line.strip() and not line.lstrip().startswith("#")
]


def test_image_runs_as_a_non_root_user() -> None:
    users = [arg.strip() for op, arg in INSTRUCTIONS if op == "USER"]
    assert users, "no USER instruction"
    assert users[-1].split(":")[0] not in ("root", "0")


def test_image_has_a_health_check_on_healthz() -> None:
    checks = [arg for op, arg in INSTRUCTIONS if op == "HEALTHCHECK"]
    assert len(checks) == 1 and "/healthz" in checks[0]


def test_image_uses_slim_pinned_bases() -> None:
    bases = [arg.split()[0] for op, arg in INSTRUCTIONS if op == "FROM"]
    assert bases and all("slim" in b and ":" in b and not b.endswith(":latest") for b in bases)


def test_image_installs_pinned_runtime_dependencies_only() -> None:
    runs = " ".join(arg for op, arg in INSTRUCTIONS if op == "RUN")
    assert "-c constraints.txt" in runs
    assert "[test]" not in runs and "playwright" not in runs


def test_image_holds_no_secrets() -> None:
    secret = re.compile(r"(PASSWORD|PASSWD|SECRET|TOKEN|API_?KEY|PRIVATE_KEY|CREDENTIAL)", re.I)
    for op, arg in INSTRUCTIONS:
        if op in ("ENV", "ARG", "LABEL"):
            assert not secret.search(arg), arg
        if op in ("COPY", "ADD"):
            assert not re.search(r"\.env\b|id_rsa|\.pem\b|\.netrc", arg), arg
            assert op != "ADD" or "://" not in arg, arg


def test_build_context_leaves_out_the_virtualenv_and_git() -> None:
    ignored = (ROOT / ".dockerignore").read_text().split()
    assert {".venv", ".git"} <= set(ignored)


def _env() -> dict[str, str]:
    return {e["name"]: e["value"] for e in _container()["env"]}


def test_grace_period_covers_the_drain_of_everything_accepted() -> None:
    # preStop sleep, then uvicorn answers what it accepted within the shutdown timeout,
    # which covers the wait budget (the settings refuse a shorter one) plus a calculation
    pod = _kind("Deployment")["spec"]["template"]["spec"]
    env = _env()
    pre_stop = int(_container()["lifecycle"]["preStop"]["exec"]["command"][1])
    shutdown = float(env["GEARWORK_SHUTDOWN_TIMEOUT_S"])
    assert float(env["GEARWORK_WAIT_BUDGET_S"]) + 2.0 <= shutdown
    assert pre_stop + shutdown < pod["terminationGracePeriodSeconds"]


def test_probes_allow_for_the_measured_latency_under_saturation() -> None:
    # bench/saturation.py: /healthz max under 0.5 s with every slot busy
    c = _container()
    assert c["livenessProbe"]["timeoutSeconds"] >= 1
    assert c["livenessProbe"]["failureThreshold"] * c["livenessProbe"]["periodSeconds"] >= 20
    assert c["readinessProbe"]["httpGet"]["path"] == "/readyz"


def test_deployment_sets_only_settings_the_service_knows() -> None:
    from service.settings import Settings

    known = {f"GEARWORK_{name.upper()}" for name in Settings.model_fields}
    assert {k for k in _env() if k.startswith("GEARWORK_")} <= known
