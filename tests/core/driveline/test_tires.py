"""Tires: size codes, diameters, revolutions per distance."""

from __future__ import annotations

import math

import pytest
from numpy.testing import assert_allclose

from core import (
    TireSizeError,
    tire_from_diameter,
    tire_from_revs_per_km,
    tire_from_revs_per_mile,
    tire_from_size,
)

INCH = 0.0254


@pytest.mark.parametrize(
    ("code", "diameter_in"),
    [
        # ISO 4000-1 / ETRTO: D = rim + 2 * width * aspect; values computed from the formula
        # in REFERENCES.md
        pytest.param("225/45R17", 24.9724, id="225/45R17"),
        pytest.param("205/55R16", 24.8780, id="205/55R16"),
        pytest.param("LT265/75R16", 31.6496, id="LT-prefix"),
        pytest.param("175/70R13", 22.6457, id="175/70R13"),
        pytest.param("225/45ZR17 94W", 24.9724, id="ZR-with-service-description"),
        pytest.param("p205/55r16 91v", 24.8780, id="lower-case-P-prefix"),
    ],
)
def test_iso_metric_diameter_matches_formula(code: str, diameter_in: float) -> None:
    tire = tire_from_size(code)
    assert tire.free_diameter_m is not None
    assert_allclose(tire.free_diameter_m / INCH, diameter_in, rtol=1e-5)


def test_p_metric_size_matches_published_table_value() -> None:
    # a vehicle maker's tire table gives P265/75R15 as 30.649 in (secondary source)
    tire = tire_from_size("P265/75R15")
    assert tire.free_diameter_m is not None
    assert_allclose(tire.free_diameter_m / INCH, 30.649, rtol=1e-4)


def test_omitted_aspect_ratio_is_82_percent() -> None:
    # ETRTO convention (memory): 165R15 -> 15 in + 2 * 165 mm * 0.82
    tire = tire_from_size("165R15")
    assert tire.free_diameter_m is not None
    assert_allclose(tire.free_diameter_m, 15 * INCH + 2 * 0.165 * 0.82, rtol=1e-12)


@pytest.mark.parametrize(
    ("code", "diameter_in"),
    [
        pytest.param("31x10.50R15", 31.0, id="flotation"),
        pytest.param("33X12.50-15LT", 33.0, id="flotation-bias-LT"),
        pytest.param("35x12.50R17LT 121Q", 35.0, id="flotation-with-service"),
    ],
)
def test_flotation_size_gives_its_nominal_diameter(code: str, diameter_in: float) -> None:
    tire = tire_from_size(code)
    assert tire.free_diameter_m is not None
    assert_allclose(tire.free_diameter_m / INCH, diameter_in, rtol=1e-12)


def test_revs_per_mile_of_diameter_matches_formula() -> None:
    # revolutions per mile = 63360 / (pi * D_in) (REFERENCES.md)
    tire = tire_from_diameter(26 * INCH)
    assert_allclose(tire.revs_per_mile, 63360 / (math.pi * 26), rtol=1e-12)


def test_revs_per_mile_round_trips() -> None:
    assert_allclose(tire_from_revs_per_mile(812.0).revs_per_mile, 812.0, rtol=1e-12)
    assert_allclose(tire_from_revs_per_km(504.5).revs_per_km, 504.5, rtol=1e-12)


def test_rolling_factor_shrinks_radius() -> None:
    # a databook example rolls 245/35R17 at 0.978 of its free radius (secondary)
    free = tire_from_size("245/35R17")
    rolling = tire_from_size("245/35R17", rolling_factor=0.978)
    assert_allclose(rolling.rolling_radius_m, 0.978 * free.rolling_radius_m, rtol=1e-12)


@pytest.mark.parametrize(
    "code",
    [
        pytest.param("banana", id="words"),
        pytest.param("225/45", id="no-rim"),
        pytest.param("225/45X17", id="bad-construction"),
        pytest.param("15x31R33", id="rim-larger-than-tire"),
        pytest.param("225/10R17", id="aspect-too-small"),
    ],
)
def test_unparseable_size_is_rejected(code: str) -> None:
    with pytest.raises(TireSizeError, match="size"):
        tire_from_size(code)


def test_impossible_diameter_is_rejected() -> None:
    with pytest.raises(TireSizeError, match=r"between 200 mm and 3000 mm, got 50 mm"):
        tire_from_diameter(0.05)
