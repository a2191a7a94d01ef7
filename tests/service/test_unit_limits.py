"""Every unit-bearing limit is one physical limit in SI, enforced alike in `metric` and `us`.

The limits are converted for the check with pint (an independent unit library), not with
the service's own factors, so a limit that is not unit-aware fails here.
"""

from __future__ import annotations

import importlib
import json
import pkgutil
import re
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pint
import pytest
from pydantic import BaseModel

import service.schemas
from service.bounds import SiLimits, bound_violations, limited_fields
from service.units import UnitSystem, si_label, unit_label

DOC = json.loads((Path(__file__).resolve().parents[2] / "openapi/openapi.json").read_text())
UREG: Any = pint.UnitRegistry()
# caller's unit labels as pint expressions (pint's hp is 550 ft*lbf/s, its inHg at 32 degF)
PINT_UNITS = {
    "N*m": "N*m",
    "lbf*ft": "lbf*ft",
    "W": "W",
    "kW": "kW",
    "hp": "hp",
    "m/s": "m/s",
    "km/h": "km/h",
    "mph": "mph",
    "N": "N",
    "lbf": "lbf",
    "m": "m",
    "mm": "mm",
    "in": "inch",
    "ft": "ft",
    "kg": "kg",
    "lb": "lb",
    "m^2": "m**2",
    "ft^2": "ft**2",
    "Pa": "Pa",
    "kPa": "kPa",
    "inHg": "inHg",
    "K": "kelvin",
    "degC": "degC",
    "degF": "degF",
    "kg*m^2": "kg*m**2",
    "lb*ft^2": "lb*ft**2",
    "rpm/sqrt(N*m)": "1/(N*m)**0.5",
    "rpm/sqrt(lbf*ft)": "1/(lbf*ft)**0.5",
    "N/(m/s)": "N/(m/s)",
    "N/(km/h)": "N/(km/h)",
    "lbf/mph": "lbf/mph",
    "N/(m/s)^2": "N/(m/s)**2",
    "N/(km/h)^2": "N/(km/h)**2",
    "lbf/mph^2": "lbf/mph**2",
    "km": "km",
    "mi": "mile",
    "m/s^2": "m/s**2",
    "g": "standard_gravity",
}


def _convert(value: float, src: str, dst: str) -> float:
    return float(UREG.Quantity(value, PINT_UNITS[src]).to(PINT_UNITS[dst]).magnitude)


def _request_models() -> Iterator[type[BaseModel]]:
    seen: set[type[BaseModel]] = set()
    for info in pkgutil.iter_modules(service.schemas.__path__):
        module = importlib.import_module(f"service.schemas.{info.name}")
        for value in vars(module).values():
            if isinstance(value, type) and issubclass(value, BaseModel) and value not in seen:
                seen.add(value)
                yield value


LIMITED = [
    pytest.param(model, name, limits, shape, id=f"{model.__name__}.{name}[{shape}]")
    for model in _request_models()
    for name, limits, shape in limited_fields(model)
]
UNIT_PAIR = re.compile(r"\[([^\[\]|]+?) \| ([^\[\]]+?)\]")


def _numbers(schema: dict[str, Any]) -> Iterator[dict[str, Any]]:
    """The number schemas inside a property: itself, nullable branch, items, tuple items."""
    for part in (schema, schema.get("items", {}), *schema.get("anyOf", ())):
        if isinstance(part, dict):
            if part.get("type") in {"number", "integer"}:
                yield part
            yield from (p for p in part.get("prefixItems", ()) if isinstance(p, dict))
            if isinstance(part.get("items"), dict) and part["items"].get("type") == "number":
                yield part["items"]


def test_every_bound_on_a_unit_bearing_number_is_an_si_limit() -> None:
    # a number whose unit differs between the systems ("[m | ft]") may carry a range only
    # through SiLimits (x-si-limits); a plain minimum/maximum would mean two limits
    offenders = []
    for name, schema in DOC["components"]["schemas"].items():
        for prop, sub in schema.get("properties", {}).items():
            pair = UNIT_PAIR.search(sub.get("description", ""))
            if pair is None or pair[1] == pair[2]:
                continue
            for number in _numbers(sub):
                bounded = number.keys() & {
                    "minimum",
                    "maximum",
                    "exclusiveMinimum",
                    "exclusiveMaximum",
                }
                if bounded and "x-si-limits" not in number:
                    offenders.append(f"{name}.{prop}")
    assert offenders == []


def test_the_schema_walk_finds_the_limited_fields() -> None:
    # the examples are among them: distances run, frontal area, pressures, temperature
    names = {p.id for p in LIMITED}
    for expected in (
        "RunOptions.extra_distances[item]",
        "RunOptions.finish_distance[one]",
        "RoadLoadIn.frontal_area[one]",
        "AmbientIn.station_pressure[one]",
        "AmbientIn.altimeter_setting[one]",
        "AmbientIn.temperature[one]",
        "InertiaIn.engine[one]",
        "RoadLoadIn.coast_down[1]",
        "LogIn.speed[item]",
    ):
        assert expected in names
    assert len(names) >= 30


def _inside(limits: SiLimits) -> float:
    low = limits.ge if limits.ge is not None else limits.gt
    high = limits.le if limits.le is not None else limits.lt
    assert low is not None and high is not None
    return (low + high) / 2.0


def _caller_unit(limits: SiLimits, system: UnitSystem) -> str:
    if limits.quantity is None:
        return limits.choices[0]
    return unit_label(limits.quantity, system)


@pytest.mark.parametrize("system", [pytest.param(s, id=s.value) for s in UnitSystem])
@pytest.mark.parametrize(("model", "name", "limits", "shape"), LIMITED)
def test_each_limit_is_enforced_in_si_in_both_systems(
    model: type[BaseModel], name: str, limits: SiLimits, shape: str, system: UnitSystem
) -> None:
    unit = _caller_unit(limits, system)
    si_unit = limits.si_unit or si_label(limits.quantity) if limits.quantity else limits.si_unit
    inside_si = _inside(limits)
    checks = [(limits.le, 1.0 + 1e-6), (limits.lt, 1.0 + 1e-6)]
    checks += [(limits.ge, -1.0), (limits.gt, -1.0)]
    for limit_si, direction in checks:
        if limit_si is None:
            continue
        limit = _convert(limit_si, si_unit, unit)
        step = max(abs(limit) * 1e-6, 1e-6)
        outside = limit + step if direction > 0 else limit - step
        for value, bad in ((outside, True), (_convert(inside_si, si_unit, unit), False)):
            if shape == "one":
                field_value: Any = value
                path = name
            elif shape == "item":
                field_value, path = [_convert(inside_si, si_unit, unit), value], f"{name}[1]"
            else:  # one position of a tuple, the others inside their own limits
                others = [lim for _, lim, s in limited_fields(model) if s.isdigit()]
                field_value = tuple(
                    value
                    if str(i) == shape
                    else _convert(_inside(o), si_label(o.quantity), _caller_unit(o, system))  # type: ignore[arg-type]
                    for i, o in enumerate(others)
                )
                path = f"{name}[{shape}]"
            found = bound_violations(model.model_construct(**{name: field_value}), system)
            if bad:
                assert [e["field"] for e in found] == [path], (value, limit, unit)
                assert f" {unit}," in found[0]["message"]
            else:
                assert found == [], (value, unit)


LIMITED_LISTS = [p for p in LIMITED if p.values[3] == "item"]


@pytest.mark.parametrize("system", [pytest.param(s, id=s.value) for s in UnitSystem])
@pytest.mark.parametrize(("model", "name", "limits", "shape"), LIMITED_LISTS)
def test_a_limited_list_flags_exactly_the_items_the_one_value_check_flags(
    model: type[BaseModel], name: str, limits: SiLimits, shape: str, system: UnitSystem
) -> None:
    # a list of numbers is checked as one array; every item at, a hair and a step either
    # side of each limit (the neighbouring doubles of the limit in the caller's unit) must
    # be flagged exactly when SiLimits.problem flags it on its own
    unit = _caller_unit(limits, system)
    values = [_convert(_inside(limits), limits.si_unit or si_label(limits.quantity), unit)]  # type: ignore[arg-type]
    for limit_si in (limits.gt, limits.ge, limits.lt, limits.le):
        if limit_si is not None:
            at = limits._from_si(limit_si, unit, system)
            step = max(abs(at) * 1e-6, 1e-6)
            values += [at, np.nextafter(at, -np.inf), np.nextafter(at, np.inf)]
            values += [at - step, at + step]
    values = [float(v) for v in values]
    given: dict[str, Any] = {name: values}
    instance = model.model_construct(**given)
    found = [e["field"] for e in bound_violations(instance, system)]
    expected = [
        f"{name}[{i}]" for i, v in enumerate(values) if limits.problem(v, instance, system)
    ]
    assert found == expected
    assert 1 <= len(found) < len(values)


@pytest.mark.parametrize("system", [pytest.param(s, id=s.value) for s in UnitSystem])
@pytest.mark.parametrize(("model", "name", "limits", "shape"), LIMITED_LISTS)
def test_a_limited_list_reaching_its_limits_flags_what_the_one_value_check_flags(
    model: type[BaseModel], name: str, limits: SiLimits, shape: str, system: UnitSystem
) -> None:
    # a list whose least and greatest items are at each limit or the neighbouring double
    # inside it is passed on those two alone: every item must still get the answer that
    # SiLimits.problem gives it on its own
    unit = _caller_unit(limits, system)
    inside = _convert(_inside(limits), limits.si_unit or si_label(limits.quantity), unit)  # type: ignore[arg-type]
    for limit_si, toward in (
        (limits.gt, np.inf),
        (limits.ge, np.inf),
        (limits.lt, -np.inf),
        (limits.le, -np.inf),
    ):
        if limit_si is None:
            continue
        at = limits._from_si(limit_si, unit, system)
        for edge in (at, np.nextafter(at, toward), np.nextafter(np.nextafter(at, toward), toward)):
            values = [float(inside), float(edge), float(inside)]
            given: dict[str, Any] = {name: values}
            instance = model.model_construct(**given)
            found = [e["field"] for e in bound_violations(instance, system)]
            expected = [
                f"{name}[{i}]" for i, v in enumerate(values) if limits.problem(v, instance, system)
            ]
            assert found == expected


def _us_run(api: Any, run: dict[str, Any], **vehicle: Any) -> Any:
    from tests.conftest import load_demo

    body = load_demo("demo_comparison_us")
    for key in ("variants", "cruise_speeds", "shift_criterion"):
        body.pop(key, None)
    body["vehicle"].update(vehicle)
    body["run"] = run
    return api.post("/v1/acceleration-run", json=body)


def test_a_standing_mile_in_feet_is_accepted_and_named_in_feet(api: Any) -> None:
    r = _us_run(
        api,
        {
            "finish_distance": 5280,
            "extra_distances": [100],
            "extra_speed_intervals": [{"start": 50, "end": 70}],
        },
    )
    assert r.status_code == 200, r.text
    doc = r.json()
    assert doc["finish"]["distance"] == pytest.approx(5280.0)
    assert [d["name"] for d in doc["distances"]][-1] == "100 ft"
    assert [s["name"] for s in doc["speeds"]][-1] == "50-70 mph"


def test_a_full_size_pickup_frontal_area_in_square_feet_is_accepted(api: Any) -> None:
    r = _us_run(api, {}, mass=5200, road_load={"drag_coefficient": 0.45, "frontal_area": 34})
    assert r.status_code == 200, r.text


def test_extra_distance_beyond_the_limit_names_its_index_and_quotes_feet(api: Any) -> None:
    r = _us_run(api, {"extra_distances": [100, 660, 20000]})
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "run.extra_distances[2]"
    # 5000 m is 16404.2 ft (pint); the limit is quoted rounded inward
    assert problem["detail"] == (
        "`run.extra_distances[2]` must be at most 16404.1 ft, got 20000 ft"
    )
    assert len(problem["errors"]) == 1


@pytest.mark.parametrize("pressure", [28.0, 29.92, 31.0])
def test_station_pressure_in_inches_of_mercury_is_accepted(api: Any, pressure: float) -> None:
    body = {
        "units": "us",
        "ambient": {"temperature": -30, "relative_humidity": 40, "station_pressure": pressure},
    }
    r = api.post("/v1/dyno-correction", json=body)
    assert r.status_code == 200, r.text
    assert r.json()["station_pressure"] == pytest.approx(pressure)


def test_altimeter_setting_in_inches_of_mercury_with_elevation_in_feet(api: Any) -> None:
    ambient = {"temperature": 77, "relative_humidity": 40, "altimeter_setting": 29.92}
    r = api.post(
        "/v1/dyno-correction", json={"units": "us", "ambient": {**ambient, "elevation": 5280}}
    )
    assert r.status_code == 200, r.text
    # ISO 2533 standard atmosphere at 1609 m: about 83.4 kPa = 24.6 inHg (memory, loose)
    assert r.json()["station_pressure"] == pytest.approx(24.6, abs=0.2)


def test_pressure_below_the_limit_quotes_inches_of_mercury(api: Any) -> None:
    body = {
        "units": "us",
        "ambient": {"temperature": 60, "relative_humidity": 40, "station_pressure": 12},
    }
    r = api.post("/v1/dyno-correction", json=body)
    assert r.status_code == 422
    # 50 kPa = 14.76499 inHg (pint), quoted rounded inward
    assert r.json()["detail"] == (
        "`ambient.station_pressure` must be at least 14.765 inHg, got 12 inHg"
    )


@pytest.mark.parametrize(
    ("efficiency", "field"),
    [
        pytest.param("x", "drivetrain.efficiency", id="not-a-number"),
        pytest.param(1.5, "drivetrain.efficiency", id="one-value"),
        pytest.param([0.9, 0.9, 1.5, 0.9, 0.9, 0.9], "drivetrain.efficiency[2]", id="per-gear"),
    ],
)
def test_efficiency_error_names_the_field_once(
    api: Any, coupe_us: dict[str, Any], efficiency: Any, field: str
) -> None:
    coupe_us["drivetrain"]["efficiency"] = efficiency
    r = api.post("/v1/shift-plan", json=coupe_us)
    assert r.status_code == 422
    problem = r.json()
    assert [e["field"] for e in problem["errors"]] == [field]
    assert "constrained" not in r.text


def test_true_is_not_taken_for_a_number(api: Any, coupe_us: dict[str, Any]) -> None:
    coupe_us["drivetrain"]["final_drive_ratio"] = True
    r = api.post("/v1/shift-plan", json=coupe_us)
    assert r.status_code == 422
    assert r.json()["field"] == "drivetrain.final_drive_ratio"


def test_a_curve_torque_too_large_to_convert_is_refused_naming_its_point(
    api: Any, coupe_us: dict[str, Any]
) -> None:
    # 1.7e308 lbf*ft is past the largest double once in N*m: the item is outside its limit
    # (a 422 naming it), as a single number is, never an overflow error
    coupe_us["engine"]["curve"]["torque"][3] = 1.7e308
    r = api.post("/v1/shift-plan", json=coupe_us)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "engine.curve.torque[3]"


def test_standard_air_is_labelled_in_the_callers_units(api: Any) -> None:
    r = _us_run(api, {}, air={})
    assert r.status_code == 200
    text = api.post(
        "/v1/reports/acceleration-run",
        json=r.request.read() and json.loads(r.request.read()),
        headers={"Accept": "text/plain"},
    ).text
    assert "59 degF (standard)" in text
    assert "degC" not in text


def _other_system(body: dict[str, Any]) -> dict[str, Any]:
    """The same request in the other unit system, values kept inside both systems' limits."""
    flipped: dict[str, Any] = json.loads(json.dumps(body))
    flipped["units"] = "metric" if body.get("units") == "us" else "us"
    scale = 1 / 25.4 if flipped["units"] == "us" else 25.4  # lengths: mm <-> in
    vehicle = flipped.get("vehicle") or {}
    for key in ("wheelbase", "cg_height"):
        if key in vehicle:
            vehicle[key] = round(vehicle[key] * scale, 1)
    tire = (flipped.get("drivetrain") or {}).get("tire", {})
    if "diameter" in tire:
        tire["diameter"] = round(tire["diameter"] * scale, 1)
    ambient = flipped.get("ambient")
    if ambient is not None:  # cell air: 30 degC, 97.9 kPa in metric; 86 degF, 28.9 inHg in us
        metric = flipped["units"] == "metric"
        ambient.update(
            {"temperature": 30 if metric else 86, "station_pressure": 97.9 if metric else 28.9}
        )
    for key in ("conditions", "taken_in", "predict_for"):  # weather blocks: the same air
        air = flipped.get(key)
        if air is not None:
            metric = flipped["units"] == "metric"
            air.update({"temperature": 30 if metric else 86, "pressure": 97.9 if metric else 28.9})
    return flipped


JSON_OPERATIONS = [
    pytest.param(path, ref.rsplit("/", 1)[-1], id=path)
    for path, item in DOC["paths"].items()
    for op in item.values()
    if (
        ref := op.get("requestBody", {})
        .get("content", {})
        .get("application/json", {})
        .get("schema", {})
        .get("$ref")
    )
    and "application/json" in op["responses"]["200"].get("content", {})
]


@pytest.mark.parametrize("system", ["metric", "us"])
@pytest.mark.parametrize(("path", "schema"), JSON_OPERATIONS)
def test_every_endpoint_answers_in_either_system(
    api: Any, path: str, schema: str, system: str
) -> None:
    example = DOC["components"]["schemas"][schema]["examples"][0]
    body = example if example.get("units", "metric") == system else _other_system(example)
    r = api.post(path, json=body)
    assert r.status_code == 200, r.text[:400]
    labels = r.json()["units"]
    assert labels["speed"] == ("mph" if system == "us" else "km/h")
    assert labels["inertia"] == ("lb*ft^2" if system == "us" else "kg*m^2")


def test_ring_and_pinion_teeth_give_the_ratio_ring_over_pinion(
    api: Any, coupe_us: dict[str, Any]
) -> None:
    # the final drive of a ring and pinion is ring teeth / pinion teeth (Gillespie ch. 2)
    by_ratio = api.post("/v1/shift-plan", json=coupe_us).json()
    drivetrain = dict(coupe_us["drivetrain"])
    drivetrain.pop("final_drive_ratio")
    drivetrain["ring_and_pinion"] = {"ring_teeth": 71, "pinion_teeth": 20}  # 3.55
    by_teeth = api.post("/v1/shift-plan", json={**coupe_us, "drivetrain": drivetrain}).json()
    assert by_teeth["gears"] == by_ratio["gears"]
    assert by_teeth["shifts"] == by_ratio["shifts"]


def test_ring_and_pinion_with_a_ratio_is_rejected(api: Any, coupe_us: dict[str, Any]) -> None:
    coupe_us["drivetrain"]["ring_and_pinion"] = {"ring_teeth": 41, "pinion_teeth": 11}
    r = api.post("/v1/shift-plan", json=coupe_us)
    assert r.status_code == 422
    assert "not both" in r.json()["detail"]


def test_inertia_in_pound_square_feet_for_us_callers() -> None:
    from scipy import constants

    from service.mapping.vehicle import build_vehicle
    from service.schemas.vehicle import VehicleIn

    body = {
        "mass": 3450,
        "wheelbase": 107,
        "cg_height": 20,
        "road_load": {"drag_area": 7.5},
        "inertia": {"engine": 5.0, "driveshaft": 1.0, "wheels": 60.0},
    }
    vehicle = build_vehicle(VehicleIn.model_validate(body), UnitSystem.US)
    # reference library: scipy.constants (1 lb*ft^2 = pound * foot^2 in kg*m^2)
    lb_ft2 = constants.pound * constants.foot**2
    assert vehicle.inertia is not None
    assert vehicle.inertia.engine_kg_m2 == pytest.approx(5.0 * lb_ft2, rel=1e-12)
    assert vehicle.inertia.wheels_kg_m2 == pytest.approx(60.0 * lb_ft2, rel=1e-12)


def test_fixed_plus_percent_driveline_loss(api: Any) -> None:
    # the chassis-dyno convention of a fixed part plus a percentage (common practice):
    # wheel = engine * (1 - p/100) - fixed, so engine = (wheel + fixed) / (1 - p/100)
    body = {
        "units": "us",
        "curve": {"rpm": [3000, 5000, 6500], "power": [150, 280, 300]},
        "driveline": {"loss_percent": 10, "fixed_loss": 12},
    }
    r = api.post("/v1/chassis-dyno/convert", json=body)
    assert r.status_code == 200, r.text
    doc = r.json()
    assert doc["curve"]["engine_power"] == pytest.approx([180.0, 324.444, 346.667], rel=1e-5)
    assert doc["fixed_loss"] == pytest.approx(12.0)
    assert "plus a fixed 12.0 hp" in " ".join(doc["summary"].split())
    back = api.post(
        "/v1/chassis-dyno/convert",
        json={**body, "curve": {"rpm": [3000], "power": [180], "measured_at": "engine"}},
    ).json()
    assert back["curve"]["wheel_power"] == pytest.approx([150.0], rel=1e-9)


def test_core_messages_quote_speeds_in_the_callers_units(api: Any) -> None:
    # a rolling start beyond top gear's reach at the rev limit: core speaks m/s
    r = _us_run(api, {"start_speed": 300})
    assert r.status_code == 422
    assert "m/s" not in r.json()["detail"]


def test_imported_speed_curve_tire_diameter_limit_quotes_inches(api: Any) -> None:
    csv = (Path(__file__).resolve().parents[1] / "data/dyno_road_speed_power_us.csv").read_bytes()
    r = api.post(
        "/v1/torque-curves/import?units=us&overall_ratio=3.0&tire_diameter=300",
        content=csv,
        headers={"Content-Type": "text/csv"},
    )
    assert r.status_code == 422
    # 5 m is 196.85 in (pint)
    assert r.json()["detail"] == "`tire_diameter` must be at most 196.85 in, got 300 in"
