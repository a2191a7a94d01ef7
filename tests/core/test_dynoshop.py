"""Dyno files as shops have them: wheel columns, summary rows and blank cells, speed-based
exports, UTF-16 and byte-order marks.

Every export here (inline or in tests/data) is invented for the test: made-up layouts and
made-up numbers, no real car, dyno or session.
"""

from __future__ import annotations

import codecs
import math
from pathlib import Path

import numpy as np
import pint
import pytest
from numpy.testing import assert_allclose

from core.dyno.columns import ColumnQuantity, ColumnUnit, is_wheel_header, read_header_cell
from core.dyno.file import DynoRun, read_dyno_text
from core.engine.curves import CurveSource
from core.errors import DynoFileError
from core.readers.encoding import decode_export

DATA = Path(__file__).resolve().parent.parent / "data"
UREG: pint.UnitRegistry[float] = pint.UnitRegistry()


def _q(value: float, unit: str, to: str) -> float:
    """Convert with pint (reference library for the unit definitions)."""
    return float(UREG.Quantity(value, unit).to(to).magnitude)


def _read(name: str, **options: float) -> DynoRun:
    return read_dyno_text(decode_export((DATA / name).read_bytes()).text, **options)  # type: ignore[arg-type]


def _codes(run: DynoRun) -> list[str]:
    return [n.code for n in run.notices]


@pytest.mark.parametrize(
    ("header", "quantity"),
    [
        pytest.param("WHP", ColumnQuantity.POWER, id="whp"),
        pytest.param("RWHP", ColumnQuantity.POWER, id="rwhp"),
        pytest.param("Wheel Horsepower (hp)", ColumnQuantity.POWER, id="wheel-horsepower"),
        pytest.param("wheel hp", ColumnQuantity.POWER, id="wheel-hp"),
        pytest.param("Power (whp)", ColumnQuantity.POWER, id="whp-as-unit"),
        pytest.param("WhlPwr [kW]", ColumnQuantity.POWER, id="camel-case"),
        pytest.param("Whl Tq (lb-ft)", ColumnQuantity.TORQUE, id="whl-tq"),
        pytest.param("Wheel Torque [Nm]", ColumnQuantity.TORQUE, id="wheel-torque"),
        pytest.param("WTQ (ft-lbs)", ColumnQuantity.TORQUE, id="wtq"),
    ],
)
def test_wheel_headers_are_recognised_as_wheel_figures(
    header: str, quantity: ColumnQuantity
) -> None:
    cell = read_header_cell(header)
    assert (cell.quantity, cell.at_wheels, cell.problem) == (quantity, True, None)


@pytest.mark.parametrize(
    "header", ["Power (hp)", "BHP", "Torque (Nm)", "Engine Torque [lb-ft]", "Crank HP"]
)
def test_engine_headers_are_not_wheel_figures(header: str) -> None:
    assert not is_wheel_header(header)
    assert not read_header_cell(header).at_wheels


def test_wheel_columns_make_a_chassis_curve_and_say_so() -> None:
    # tests/data/dyno_wheel_columns_us.csv: invented chassis-dyno export, US units.
    run = _read("dyno_wheel_columns_us.csv")
    assert run.source is CurveSource.CHASSIS
    assert run.torque_curve().source is CurveSource.CHASSIS
    assert run.torque_column is not None and run.torque_column.at_wheels
    chassis = next(n for n in run.notices if n.code == "chassis_curve")
    assert "Whl Tq (lb-ft)" in chassis.message and "driveline" in chassis.message
    # lbf*ft to N*m with pint's definition of the pound-force foot
    assert_allclose(run.torque_nm[0], _q(250.0, "lbf*ft", "N*m"), rtol=1e-12)


def test_wheel_power_agrees_with_wheel_torque_by_the_5252_rule() -> None:
    # hp = lbf*ft * rpm / 5252.113 (common practice; REFERENCES.md): the invented file's
    # WHP was written from its torque that way, so no mismatch notice is raised.
    run = _read("dyno_wheel_columns_us.csv")
    assert "torque_power_mismatch" not in _codes(run)
    power_hp = run.power_w() / _q(1.0, "hp", "W")
    torque_lbft = run.torque_nm / _q(1.0, "lbf*ft", "N*m")
    assert_allclose(power_hp, torque_lbft * run.rpm / 5252.113, rtol=1e-6)


def test_summary_rows_and_blank_cells_are_skipped_with_notices() -> None:
    run = _read("dyno_wheel_columns_us.csv")
    assert _codes(run)[:3] == [
        "lines_above_header_skipped",
        "summary_rows_skipped",
        "blank_rows_skipped",
    ]
    summary = next(n for n in run.notices if n.code == "summary_rows_skipped")
    assert "2 summary row(s)" in summary.message and "12, 13" in summary.message
    blank = next(n for n in run.notices if n.code == "blank_rows_skipped")
    assert "line 11" in blank.message
    # the 4500 rpm row lacks only its check cell (WHP): it is kept
    assert_allclose(run.rpm, [3000, 3500, 4000, 4500, 5000, 5500, 6000], rtol=0)
    assert run.data_rows == 7


def test_a_summary_label_in_a_later_cell_skips_only_a_row_without_an_x_number() -> None:
    text = "RPM;Torque (Nm);Note\n2000;150;\n3000;170;peak boost here\n4000;160;\n;171;peak\n"
    run = read_dyno_text(text)
    assert_allclose(run.rpm, [2000, 3000, 4000], rtol=0)
    assert _codes(run) == ["summary_rows_skipped"]


def test_a_blank_torque_cell_beside_power_skips_the_row() -> None:
    text = "RPM;Torque (Nm);Power (kW)\n2000;150;31,4\n3000;;53,4\n4000;160;67,0\n5000;150;78,5\n"
    run = read_dyno_text(text)
    assert_allclose(run.rpm, [2000, 4000, 5000], rtol=0)
    assert "blank_rows_skipped" in _codes(run)


def test_speed_based_force_export_is_referred_to_engine_rpm_through_the_gear() -> None:
    # tests/data/dyno_road_speed_force_metric.csv: invented roller export, km/h and N.
    # Closed form (Gillespie, Fundamentals of Vehicle Dynamics, ch. 2, with efficiency 1):
    # v = (2*pi/60) * (r / N) * rpm, and F = T * N / r, so T = F * r / N.
    ratio, radius = 1.48 * 3.55, 0.32
    run = _read("dyno_road_speed_force_metric.csv", overall_ratio=ratio, rolling_radius_m=radius)
    speed = np.array([40.0, 60.0, 80.0, 100.0, 120.0]) * _q(1.0, "km/h", "m/s")
    force = np.array([3200.0, 3650.0, 3810.0, 3590.0, 3120.0])
    assert_allclose(run.rpm, speed * ratio / radius * 60.0 / (2.0 * math.pi), rtol=1e-12)
    assert_allclose(run.torque_nm, force * radius / ratio, rtol=1e-12)
    assert run.source is CurveSource.CHASSIS
    assert run.road_speed is not None and run.force_column is not None
    assert run.rpm_column.quantity is ColumnQuantity.ROAD_SPEED
    assert "summary_rows_skipped" in _codes(run)  # the "Peak" row


def test_speed_based_power_export_gives_the_same_torque_as_power_over_engine_speed() -> None:
    # tests/data/dyno_road_speed_power_us.csv: invented, mph and wheel hp. P = T * omega
    # (definition of power); mph and hp converted with pint.
    ratio, radius = 3.73, 0.33
    run = _read("dyno_road_speed_power_us.csv", overall_ratio=ratio, rolling_radius_m=radius)
    v = _q(60.0, "mph", "m/s")
    rpm = v * ratio / radius * 60.0 / (2.0 * math.pi)
    torque = _q(214.0, "hp", "W") / (rpm * 2.0 * math.pi / 60.0)
    assert_allclose(run.rpm[2], rpm, rtol=1e-12)
    assert_allclose(run.torque_nm[2], torque, rtol=1e-12)
    assert run.source is CurveSource.CHASSIS


def test_speed_based_export_names_the_engine_when_its_power_header_does() -> None:
    text = "Speed (km/h);Engine power (kW)\n60;40\n80;60\n100;75\n"
    run = read_dyno_text(text, overall_ratio=4.0, rolling_radius_m=0.3)
    assert run.source is CurveSource.ENGINE


def test_speed_based_export_without_the_gear_is_rejected_naming_it() -> None:
    with pytest.raises(DynoFileError, match="speed-based export") as info:
        _read("dyno_road_speed_force_metric.csv")
    assert info.value.parameter == "overall_ratio"


@pytest.mark.parametrize(
    ("options", "parameter"),
    [
        pytest.param({"overall_ratio": 3.0}, "rolling_radius_m", id="ratio-alone"),
        pytest.param({"overall_ratio": 0.0, "rolling_radius_m": 0.3}, "overall_ratio", id="zero"),
        pytest.param(
            {"overall_ratio": 3.0, "rolling_radius_m": 9.0}, "rolling_radius_m", id="huge-tire"
        ),
    ],
)
def test_bad_gear_for_a_speed_based_export_is_rejected(
    options: dict[str, float], parameter: str
) -> None:
    with pytest.raises(DynoFileError) as info:
        _read("dyno_road_speed_force_metric.csv", **options)
    assert info.value.parameter == parameter


def test_gear_given_with_an_rpm_based_export_is_reported_unused() -> None:
    run = _read("dyno_wheel_columns_us.csv", overall_ratio=3.0, rolling_radius_m=0.3)
    assert "road_speed_conversion_unused" in _codes(run)
    assert run.road_speed is None


def test_implausible_road_speed_for_the_gear_is_rejected_with_its_cell() -> None:
    text = "Speed (mph),Tractive force (lbf)\n30,900\n60,800\n900,700\n"
    with pytest.raises(DynoFileError, match="mph") as info:
        read_dyno_text(text, overall_ratio=12.0, rolling_radius_m=0.3)
    assert (info.value.line, info.value.column) == (4, 1)


def test_force_and_road_speed_unit_factors_match_pint() -> None:
    pairs = [
        (ColumnUnit.POUND_FORCE, "lbf", "N"),
        (ColumnUnit.KILOGRAM_FORCE, "kgf", "N"),
        (ColumnUnit.KILONEWTON, "kN", "N"),
        (ColumnUnit.MILE_PER_HOUR, "mph", "m/s"),
        (ColumnUnit.KILOMETRE_PER_HOUR, "km/h", "m/s"),
    ]
    for unit, name, si in pairs:
        assert_allclose(unit.si_factor, _q(1.0, name, si), rtol=1e-14)


@pytest.mark.parametrize(
    ("name", "encoding"),
    [
        pytest.param("dyno_utf16_bom_metric.csv", "UTF-16LE with byte-order mark", id="utf16"),
        pytest.param("dyno_utf8_bom_metric.csv", "UTF-8 with byte-order mark", id="utf8-bom"),
    ],
)
def test_utf16_and_bom_exports_read_like_plain_utf8(name: str, encoding: str) -> None:
    raw = (DATA / name).read_bytes()
    decoded = decode_export(raw)
    assert decoded.encoding == encoding
    assert not decoded.text.startswith("\ufeff")
    run = read_dyno_text(decoded.text)
    assert_allclose(run.rpm, [2000, 3000, 4000, 5000], rtol=0)
    assert_allclose(run.torque_nm, [180.0, 210.0, 225.0, 215.0], rtol=0)
    assert run.torque_column is not None and run.torque_column.header == "Torque (N·m)"


def test_utf16_without_a_mark_is_recognised_by_its_zero_bytes() -> None:
    text = "RPM;Torque (Nm)\n2000;150\n3000;170\n4000;160\n"
    for codec, name in (("utf-16-le", "UTF-16LE"), ("utf-16-be", "UTF-16BE")):
        decoded = decode_export(text.encode(codec))
        assert (decoded.text, decoded.encoding) == (text, name)


def test_text_that_is_not_utf8_is_read_as_windows_1252() -> None:
    # Python's cp1252 codec is the reference for the code page's table
    text = "Drehzahl;Moment (Nm);Ansaug (\u00b0C)\n2000;150;25\n"
    decoded = decode_export(text.encode("cp1252"))
    assert (decoded.text, decoded.encoding) == (text, "Windows-1252")


def test_undecodable_bytes_are_reported_with_their_position() -> None:
    # 0x81: no UTF-8 lead byte, unassigned in windows-1252 (WHATWG Encoding Standard)
    with pytest.raises(DynoFileError, match=r"byte 5\b"):
        decode_export(b"RPM;\x81")
    with pytest.raises(DynoFileError, match="UTF-16"):
        decode_export(codecs.BOM_UTF16_LE + b"R\x00P")


def test_force_implying_an_impossible_engine_torque_is_refused_with_its_cell() -> None:
    text = "Speed (km/h);Tractive force (kN)\n40;3\n60;1e305\n80;3\n"
    with pytest.raises(DynoFileError, match=r"at most .* kN at") as info:
        read_dyno_text(text, overall_ratio=4.0, rolling_radius_m=0.3)
    assert (info.value.line, info.value.column) == (3, 2)
