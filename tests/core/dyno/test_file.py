"""Tests of core.dyno.file: reading delimited dyno exports given as text.

Every export here is invented for the test: made-up layouts, made-up numbers.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pint
import pytest
from numpy.testing import assert_allclose
from scipy.interpolate import PchipInterpolator
from scipy.signal import savgol_filter

from core.dyno.columns import ColumnQuantity, ColumnUnit, read_header_cell, unit_from_text
from core.dyno.file import (
    MAX_COLUMNS,
    MAX_LINES,
    MAX_RPM,
    MAX_TEXT_CHARS,
    DynoRun,
    read_dyno_text,
)
from core.dyno.numbers import DecimalMark
from core.engine.curves import CurveSource, TorqueCurve
from core.errors import DynoFileError, GearworkError
from core.readers.delimited import Delimiter

UREG: pint.UnitRegistry[float] = pint.UnitRegistry()


def _si(value: float, unit: str, to: str) -> float:
    """Convert with pint (reference library for the unit definitions)."""
    return float(UREG.Quantity(value, unit).to(to).magnitude)


def _text(*lines: str) -> str:
    return "\n".join(lines) + "\n"


def _codes(run: DynoRun) -> list[str]:
    return [n.code for n in run.notices]


def _error(text: str, **options: Any) -> DynoFileError:
    with pytest.raises(DynoFileError) as info:
        read_dyno_text(text, **options)
    return info.value


# An invented bench export: semicolons, decimal commas, torque and power both given.
BENCH_SEMICOLON = _text(
    "RPM;Torque (N·m);Power (kW);Oil temp (C)",
    "2000;150,0;31,42;88",
    "2500;162,5;42,54;89",
    "3000;171,0;53,72;90",
    "3500;168,0;61,58;91",
    "4000;155,0;64,93;92",
)


def test_semicolon_file_with_decimal_commas_reads_torque_in_n_m() -> None:
    run = read_dyno_text(BENCH_SEMICOLON)
    assert run.delimiter is Delimiter.SEMICOLON
    assert run.number_format.decimal_mark is DecimalMark.COMMA
    assert_allclose(run.rpm, [2000.0, 2500.0, 3000.0, 3500.0, 4000.0], rtol=0)
    assert_allclose(run.torque_nm, [150.0, 162.5, 171.0, 168.0, 155.0], rtol=1e-15)
    assert run.torque_column is not None and run.power_column is not None
    assert (run.rpm_column.column, run.torque_column.column, run.power_column.column) == (1, 2, 3)
    assert run.torque_column.unit is ColumnUnit.NEWTON_METRE
    assert run.power_column.unit is ColumnUnit.KILOWATT
    assert run.header_line == 1
    assert run.data_rows == 5
    assert run.notices == ()  # power agrees with torque (kW = N*m * rpm / 9549.297)


def test_comma_file_in_lb_ft_converts_with_the_pound_foot() -> None:
    # 1 lbf*ft = 1.3558179483314004 N*m (pint; REFERENCES.md, scipy.constants agrees).
    text = _text(
        "Engine Speed (rpm),Torque [lb-ft],Power (hp)",
        "3000,280.0,159.9",
        "4000,300.0,228.5",
        "5000,290.0,276.1",
    )
    run = read_dyno_text(text)
    assert run.delimiter is Delimiter.COMMA
    assert run.number_format.decimal_mark is DecimalMark.POINT
    expected = [_si(t, "lbf*ft", "N*m") for t in (280.0, 300.0, 290.0)]
    assert_allclose(run.torque_nm, expected, rtol=1e-14)
    assert run.notices == ()


def test_power_only_in_hp_matches_the_5252_rule() -> None:
    # lbf*ft = hp * 5252.113 / rpm (REFERENCES.md, 33000/(2*pi); common practice).
    text = _text(
        "RPM\tBoost (psi)\tPower (hp)", "4000\t6.1\t200", "5252.113\t7.0\t250", "6000\t7.4\t260"
    )
    run = read_dyno_text(text)
    assert run.delimiter is Delimiter.TAB
    assert run.torque_column is None
    assert run.power_column is not None and run.power_column.unit is ColumnUnit.HORSEPOWER
    lbft = np.array([200.0, 250.0, 260.0]) * 5252.113 / np.array([4000.0, 5252.113, 6000.0])
    assert_allclose(run.torque_nm, lbft * 1.3558179483314004, rtol=1e-6)
    assert_allclose(run.power_w(), [_si(p, "hp", "W") for p in (200.0, 250.0, 260.0)], rtol=1e-12)


def test_power_only_in_kw_matches_the_9549_rule() -> None:
    # N*m = kW * 9549.297 / rpm (REFERENCES.md, 60000/(2*pi)).
    run = read_dyno_text(_text("rpm;kW", "1500;20,0", "3000;45,5", "4500;61,0"))
    rpm = np.array([1500.0, 3000.0, 4500.0])
    assert_allclose(run.torque_nm, np.array([20.0, 45.5, 61.0]) * 9549.297 / rpm, rtol=1e-6)


def test_power_in_ps_uses_the_metric_horsepower() -> None:
    # 1 PS = 735.49875 W (pint metric_horsepower; REFERENCES.md).
    run = read_dyno_text(_text("Engine RPM;Leistung PS", "2000;40", "3000;62", "4000;80"))
    assert run.power_column is not None
    assert run.power_column.unit is ColumnUnit.METRIC_HORSEPOWER
    assert_allclose(run.power_w(), [_si(p, "metric_horsepower", "W") for p in (40, 62, 80)])


def test_units_row_under_the_header_supplies_missing_units() -> None:
    text = _text(
        "Speed;Torque;Power", "rpm;Nm;kW", "2000;100;20,94", "3000;110;34,56", "4000;105;43,98"
    )
    run = read_dyno_text(text)
    assert run.torque_column is not None and run.torque_column.unit is ColumnUnit.NEWTON_METRE
    assert run.power_column is not None and run.power_column.unit is ColumnUnit.KILOWATT
    assert run.data_rows == 3
    assert run.notices == ()


def test_blank_lines_comments_and_preamble_are_skipped() -> None:
    text = _text(
        "# invented bench export, run 7",
        "Operator note: warm engine",
        "",
        "// columns follow",
        "Time (s),RPM,Torque (Nm),Lambda",
        "0.0,2000,200,0.88",
        "",
        "# mid-run marker",
        "0.5,2500,210,0.87",
        "1.0,3000,215,0.87",
    )
    run = read_dyno_text(text)
    assert run.header_line == 5
    assert_allclose(run.torque_nm, [200.0, 210.0, 215.0], rtol=0)
    assert _codes(run) == ["lines_above_header_skipped"]
    assert "1 line(s) above the header on line 5" in run.notices[0].message


def test_unsorted_rpm_is_sorted_and_repeated_rpm_averaged() -> None:
    text = _text(
        "RPM,Torque (Nm)", "3000,220", "2000,200", "3000,224", "2500,210", "4000,205", "2000,202"
    )
    run = read_dyno_text(text)
    assert_allclose(run.rpm, [2000.0, 2500.0, 3000.0, 4000.0], rtol=0)
    assert_allclose(run.torque_nm, [201.0, 210.0, 222.0, 205.0], rtol=1e-15)
    assert _codes(run) == ["rpm_sorted", "rpm_repeated_merged"]
    assert "2 rpm value(s)" in run.notices[1].message
    assert "line 3" in run.notices[1].message  # 2000 rpm first appears on line 3
    assert run.data_rows == 6


def test_power_disagreeing_with_torque_is_reported_and_torque_used() -> None:
    # 4000 rpm, 200 N*m is 83.78 kW; the file says 90 kW there (7 % off).
    text = _text(
        "RPM;Torque (Nm);Power (kW)", "2000;180;37,70", "3000;195;61,26", "4000;200;90,00"
    )
    run = read_dyno_text(text)
    assert_allclose(run.torque_nm, [180.0, 195.0, 200.0], rtol=0)
    assert _codes(run) == ["torque_power_mismatch"]
    assert "1 of 3 rows" in run.notices[0].message
    assert "line 4, 4000 rpm" in run.notices[0].message


def test_torque_labelled_n_m_but_written_in_lb_ft_is_flagged_as_a_unit_mix_up() -> None:
    # Power in hp from 300/310/290 lbf*ft (hp = lbf*ft * rpm / 5252.113); torque mislabelled.
    rpm = [3000.0, 4000.0, 5000.0]
    lbft = [300.0, 310.0, 290.0]
    rows = [f"{n:.0f};{t:.1f};{t * n / 5252.113:.2f}" for n, t in zip(rpm, lbft, strict=True)]
    run = read_dyno_text(_text("RPM;Torque (Nm);Power (hp)", *rows))
    assert _codes(run) == ["torque_power_mismatch"]
    assert "consistently 1.355" in run.notices[0].message
    assert "wrong unit" in run.notices[0].message


def test_thousands_separators_with_the_other_mark_are_read() -> None:
    semicolon = read_dyno_text(
        _text("RPM;Torque (Nm)", "1.500;95,5", "2.000;120,0", "2.500;130,25")
    )
    assert semicolon.number_format.decimal_mark is DecimalMark.COMMA
    assert_allclose(semicolon.rpm, [1500.0, 2000.0, 2500.0], rtol=0)
    comma = read_dyno_text(
        _text("RPM,Torque (Nm)", '"1,500",95.5', '"2,000",120', '"2,500",130.25')
    )
    assert comma.number_format.decimal_mark is DecimalMark.POINT
    assert_allclose(comma.torque_nm, [95.5, 120.0, 130.25], rtol=0)


def test_windows_line_breaks_byte_order_mark_and_quotes_are_accepted() -> None:
    text = '\ufeff"RPM";"Torque [N-m]"\r\n2000;"100,5"\r\n3000;110\r\n4000;105,25\r\n'
    run = read_dyno_text(text)
    assert_allclose(run.torque_nm, [100.5, 110.0, 105.25], rtol=0)


def test_arrays_are_read_only_and_the_run_becomes_a_torque_curve() -> None:
    run = read_dyno_text(BENCH_SEMICOLON)
    with pytest.raises(ValueError, match="read-only"):
        run.torque_nm[0] = 1.0
    curve = run.torque_curve(source=CurveSource.CHASSIS)
    assert isinstance(curve, TorqueCurve)
    assert curve.source is CurveSource.CHASSIS
    assert_allclose(curve.torque_at(run.rpm), run.torque_nm, rtol=1e-12)


def test_resampling_uses_pchip_on_multiples_of_the_step() -> None:
    # scipy.interpolate.PchipInterpolator as the reference for the resampled values.
    text = _text("RPM,Torque (Nm)", "1130,150", "2010,190", "2890,230", "4075,215", "5020,180")
    run = read_dyno_text(text, rpm_step=500.0)
    assert_allclose(run.rpm, [1500.0, 2000.0, 2500.0, 3000.0, 3500.0, 4000.0, 4500.0, 5000.0])
    source = np.array([1130.0, 2010.0, 2890.0, 4075.0, 5020.0])
    reference = PchipInterpolator(source, [150.0, 190.0, 230.0, 215.0, 180.0])(run.rpm)
    assert_allclose(run.torque_nm, reference, rtol=1e-12)
    assert run.rpm_step == 500.0


def test_smoothing_keeps_a_quadratic_curve_exactly() -> None:
    # Savitzky-Golay of order 2 reproduces any quadratic exactly (closed form property).
    rpm = np.arange(2000.0, 6001.0, 250.0)
    torque = 300.0 - ((rpm - 4000.0) / 100.0) ** 2 * 0.1
    rows = [f"{n:.0f},{t:.6f}" for n, t in zip(rpm, torque, strict=True)]
    run = read_dyno_text(_text("RPM,Torque (Nm)", *rows), smoothing_window_rpm=1250.0)
    assert run.smoothing_samples == 5
    assert_allclose(run.torque_nm, torque, rtol=1e-9)


def test_smoothing_matches_scipy_savgol_with_the_window_in_samples() -> None:
    # scipy.signal.savgol_filter is the reference; 700 rpm at 100 rpm spacing is 7 samples.
    rpm = np.arange(2000.0, 4001.0, 100.0)
    wobble = np.where(np.arange(rpm.size) % 2 == 0, 4.0, -4.0)
    torque = 200.0 + 0.01 * (rpm - 2000.0) + wobble
    rows = [f"{n:.0f};{str(t).replace('.', ',')}" for n, t in zip(rpm, torque, strict=True)]
    run = read_dyno_text(_text("RPM;Torque (Nm)", *rows), smoothing_window_rpm=700.0)
    assert run.smoothing_samples == 7
    assert_allclose(run.torque_nm, savgol_filter(torque, 7, 2, mode="interp"), rtol=1e-12)
    assert np.ptp(run.torque_nm - (200.0 + 0.01 * (rpm - 2000.0))) < np.ptp(wobble)


def test_smoothing_uneven_rpm_without_a_step_is_rejected() -> None:
    text = _text("RPM,Torque (Nm)", "1000,100", "1100,110", "1300,120", "1400,121", "1500,119")
    error = _error(text, smoothing_window_rpm=300.0)
    assert error.parameter == "smoothing_window_rpm"
    assert "give `rpm_step`" in error.message
    run = read_dyno_text(text, rpm_step=100.0, smoothing_window_rpm=300.0)
    assert run.smoothing_samples == 3


@pytest.mark.parametrize(
    ("options", "parameter"),
    [
        pytest.param({"rpm_step": 0.0}, "rpm_step", id="zero-step"),
        pytest.param({"rpm_step": math.nan}, "rpm_step", id="nan-step"),
        pytest.param({"rpm_step": 5000.0}, "rpm_step", id="step-too-large"),
        pytest.param({"rpm_step": 0.01}, "rpm_step", id="step-too-fine"),
        pytest.param({"smoothing_window_rpm": -1.0}, "smoothing_window_rpm", id="negative-window"),
        pytest.param(
            {"smoothing_window_rpm": 100.0}, "smoothing_window_rpm", id="window-1-sample"
        ),
        pytest.param({"smoothing_window_rpm": 9e3}, "smoothing_window_rpm", id="window-too-long"),
        pytest.param({"smoothing_order": 6}, "smoothing_order", id="order-too-high"),
        pytest.param({"smoothing_order": True}, "smoothing_order", id="order-bool"),
        pytest.param(
            {"smoothing_window_rpm": 1000.0, "smoothing_order": 3},
            "smoothing_order",
            id="order-not-below-window",
        ),
    ],
)
def test_bad_options_are_rejected_naming_the_option(
    options: dict[str, Any], parameter: str
) -> None:
    error = _error(BENCH_SEMICOLON, **options)
    assert error.parameter == parameter
    assert error.line is None and error.column is None


def test_bad_number_is_reported_with_its_line_and_column() -> None:
    text = _text(
        "RPM;Torque (Nm);Power (kW)", "2000;150,0;31,42", "2500;16O,5;42,54", "3000;171;53"
    )
    error = _error(text)
    assert (error.line, error.column) == (3, 2)
    assert "'16O,5' is not a number" in error.message
    assert error.parameter == "text"
    assert isinstance(error, GearworkError) and isinstance(error, ValueError)


@pytest.mark.parametrize(
    ("cell", "line", "column"),
    [
        pytest.param("nan", 3, 2, id="nan"),
        pytest.param("inf", 3, 2, id="inf"),
        pytest.param("-5", 3, 2, id="negative-torque"),
        pytest.param("1e", 3, 2, id="bad-exponent"),
    ],
)
def test_cells_that_are_not_usable_numbers_name_their_place(
    cell: str, line: int, column: int
) -> None:
    error = _error(_text("RPM,Torque (Nm)", "1000,90", f"2000,{cell}", "3000,95"))
    assert (error.line, error.column) == (line, column)


def test_zero_rpm_is_rejected_with_its_cell() -> None:
    error = _error(_text("Time (s),RPM,Torque (Nm)", "0.1,1000,90", "0.2,0,92", "0.3,3000,95"))
    assert (error.line, error.column) == (3, 2)
    assert "> 0 rpm" in error.message


def test_truncated_last_row_is_reported_with_the_missing_column() -> None:
    text = "RPM;Torque (Nm);Power (kW)\n2000;150;31,4\n2500;162;42,5\n3000;17"
    error = _error(text)
    assert (error.line, error.column) == (4, 3)
    assert "truncated" in error.message


def test_file_cut_after_the_header_is_reported() -> None:
    error = _error(_text("RPM;Torque (Nm)", "2000;150"))
    assert error.line is None
    assert "at least 3 data rows" in error.message


def test_too_few_distinct_rpm_after_merging_is_rejected() -> None:
    error = _error(_text("RPM,Torque (Nm)", "2000,150", "2000,152", "3000,160"))
    assert "distinct rpm" in error.message


def test_decimal_comma_in_a_comma_separated_file_is_caught() -> None:
    error = _error(_text("RPM,Torque (Nm)", "2000,150", "2500,162,5", "3000,171"))
    assert (error.line, error.column) == (3, 3)
    assert "decimal comma" in error.message


def test_mixed_decimal_marks_are_rejected() -> None:
    error = _error(_text("RPM;Torque (Nm)", "2000;150.5", "2500;162,5", "3000;171"))
    assert (error.line, error.column) == (2, 2)
    assert "mixes" in error.message


@pytest.mark.parametrize(
    ("header", "column", "fragment"),
    [
        pytest.param("RPM;Torque [kg]", 2, "not a torque unit", id="mass-for-torque"),
        pytest.param("RPM;Torque (kW)", 2, "is a power unit", id="power-unit-for-torque"),
        pytest.param("Engine speed (km/h);Power (kW)", 1, "is a road-speed unit", id="road-speed"),
        pytest.param("RPM;Power [ft]", 2, "not a power unit", id="length-for-power"),
        pytest.param("RPM;Torque", 2, "names no unit", id="no-unit"),
    ],
)
def test_wrong_or_missing_units_are_reported_at_the_header_cell(
    header: str, column: int, fragment: str
) -> None:
    error = _error(_text(header, "2000;150", "2500;160", "3000;170"))
    assert (error.line, error.column) == (1, column)
    assert fragment in error.message


def test_units_row_with_a_wrong_unit_is_reported_at_its_cell() -> None:
    error = _error(_text("Speed;Torque", "rpm;kW", "2000;150", "2500;160", "3000;170"))
    assert (error.line, error.column) == (2, 2)
    assert "is a power unit" in error.message


def test_units_row_contradicting_the_header_is_reported() -> None:
    error = _error(_text("RPM;Torque (Nm)", "rpm;lb-ft", "2000;150", "2500;160", "3000;170"))
    assert (error.line, error.column) == (2, 2)
    assert "units row says 'lb-ft'" in error.message


def test_a_second_usable_torque_column_is_left_unused_with_a_notice() -> None:
    text = _text(
        "RPM;Torque (Nm);Torque corrected (Nm)", "2000;150;155", "2500;160;165", "3000;170;175"
    )
    run = read_dyno_text(text)
    assert_allclose(run.torque_nm, [150.0, 160.0, 170.0], rtol=0)
    assert _codes(run) == ["columns_unused"]


def test_text_without_a_header_is_rejected() -> None:
    error = _error(_text("2000;150", "2500;160", "3000;170"))
    assert error.line is None
    assert "no header row" in error.message


@pytest.mark.parametrize(
    ("garbage", "line", "column"),
    [
        pytest.param("\x00", 3, 6, id="nul"),
        pytest.param("\x07", 3, 6, id="bell"),
        pytest.param("\ufffd", 3, 6, id="replacement-character"),
        pytest.param("\udc9f", 3, 6, id="undecoded-byte"),
        pytest.param("\x85", 3, 6, id="c1-control"),
    ],
)
def test_binary_garbage_is_rejected_with_its_position(
    garbage: str, line: int, column: int
) -> None:
    text = _text("RPM;Torque (Nm)", "2000;150", f"2500;{garbage}60", "3000;170")
    error = _error(text)
    assert (error.line, error.column) == (line, column)


def test_a_binary_blob_is_called_binary() -> None:
    blob = bytes(range(256)).decode("latin-1") * 4
    error = _error(blob)
    assert "binary data" in error.message
    assert (error.line, error.column) == (1, 1)


def test_bytes_are_rejected_asking_for_decoding() -> None:
    error = _error(b"RPM,Torque (Nm)\n1000,100\n")  # type: ignore[arg-type]
    assert "decode" in error.message


def test_oversize_text_is_rejected_before_parsing() -> None:
    error = _error("#" * (MAX_TEXT_CHARS + 1))
    assert f"at most {MAX_TEXT_CHARS} characters" in error.message


def test_too_many_lines_are_rejected() -> None:
    error = _error("RPM,Torque (Nm)\n" + "1,1\n" * MAX_LINES)
    assert f"at most {MAX_LINES} lines" in error.message


def test_too_many_columns_are_rejected_at_the_first_extra_cell() -> None:
    header = ";".join(["RPM", "Torque (Nm)"] + [f"extra {i}" for i in range(MAX_COLUMNS - 1)])
    error = _error(_text(header, "2000;150", "2500;160", "3000;170"))
    assert (error.line, error.column) == (1, MAX_COLUMNS + 1)


def test_empty_text_is_rejected() -> None:
    assert "empty" in _error("  \n\n").message


@pytest.mark.parametrize(
    ("header", "quantity", "unit"),
    [
        pytest.param("RPM", ColumnQuantity.ENGINE_SPEED, ColumnUnit.RPM, id="rpm"),
        pytest.param("Engine Speed (rpm)", ColumnQuantity.ENGINE_SPEED, ColumnUnit.RPM, id="es"),
        pytest.param("n [1/min]", ColumnQuantity.ENGINE_SPEED, ColumnUnit.RPM, id="per-minute"),
        pytest.param("Crank speed", ColumnQuantity.ENGINE_SPEED, ColumnUnit.RPM, id="no-unit"),
        pytest.param("speed (min⁻¹)", ColumnQuantity.ENGINE_SPEED, ColumnUnit.RPM, id="min-1"),
        pytest.param(
            "Torque [lb-ft]", ColumnQuantity.TORQUE, ColumnUnit.POUND_FORCE_FOOT, id="lbft"
        ),
        pytest.param("Torque (N·m)", ColumnQuantity.TORQUE, ColumnUnit.NEWTON_METRE, id="n-dot-m"),
        pytest.param("Nm", ColumnQuantity.TORQUE, ColumnUnit.NEWTON_METRE, id="bare-nm"),
        pytest.param(
            "torque_ft_lbs", ColumnQuantity.TORQUE, ColumnUnit.POUND_FORCE_FOOT, id="snake"
        ),
        pytest.param(
            "TQ kgf-m", ColumnQuantity.TORQUE, ColumnUnit.KILOGRAM_FORCE_METRE, id="kgfm"
        ),
        pytest.param("Power (hp)", ColumnQuantity.POWER, ColumnUnit.HORSEPOWER, id="hp"),
        pytest.param("Wheel hp", ColumnQuantity.POWER, ColumnUnit.HORSEPOWER, id="wheel-hp"),
        pytest.param("kW", ColumnQuantity.POWER, ColumnUnit.KILOWATT, id="bare-kw"),
        pytest.param("PS", ColumnQuantity.POWER, ColumnUnit.METRIC_HORSEPOWER, id="bare-ps"),
        pytest.param("Power/W", ColumnQuantity.POWER, ColumnUnit.WATT, id="slash-w"),
    ],
)
def test_header_spellings_are_recognised(
    header: str, quantity: ColumnQuantity, unit: ColumnUnit
) -> None:
    cell = read_header_cell(header)
    assert (cell.quantity, cell.unit, cell.problem) == (quantity, unit, None)


@pytest.mark.parametrize(
    "header",
    [
        pytest.param("Boost (psi)", id="boost"),
        pytest.param("Lambda", id="lambda"),
        pytest.param("N", id="bare-newton"),
        pytest.param("Time [s]", id="time"),
        pytest.param("AFR", id="afr"),
    ],
)
def test_other_columns_are_ignored(header: str) -> None:
    assert read_header_cell(header).quantity is None


def test_unit_factors_match_pint() -> None:
    # pint definitions: lbf*ft, kgf*m, hp (550 ft*lbf/s), metric horsepower, kW.
    pairs = [
        (ColumnUnit.POUND_FORCE_FOOT, "lbf*ft", "N*m"),
        (ColumnUnit.KILOGRAM_FORCE_METRE, "kgf*m", "N*m"),
        (ColumnUnit.HORSEPOWER, "hp", "W"),
        (ColumnUnit.METRIC_HORSEPOWER, "metric_horsepower", "W"),
        (ColumnUnit.KILOWATT, "kW", "W"),
    ]
    for unit, name, si in pairs:
        assert_allclose(unit.si_factor, _si(1.0, name, si), rtol=1e-15)
    assert unit_from_text("lbs ft") is ColumnUnit.POUND_FORCE_FOOT


def test_thousands_separator_is_recorded_in_the_number_format() -> None:
    run = read_dyno_text(_text("RPM;Torque (Nm)", "1.500;95,5", "2.000;120,0", "2.500;130,25"))
    assert run.number_format.thousands_separator == "."
    plain = read_dyno_text(BENCH_SEMICOLON)
    assert plain.number_format.thousands_separator is None


def test_delimiter_is_chosen_by_how_the_rows_split_when_the_header_allows_two() -> None:
    # Split at tabs the header has 2 cells, at commas 3; the rows have 3 comma cells.
    text = _text("RPM,spare\tTorque (Nm),note", "2000,150,a", "2500,160,b", "3000,170,c")
    run = read_dyno_text(text)
    assert run.delimiter is Delimiter.COMMA
    assert_allclose(run.torque_nm, [150.0, 160.0, 170.0], rtol=0)


def test_number_overflowing_a_float_is_rejected_with_its_cell() -> None:
    error = _error(_text("RPM,Torque (Nm)", "1000,90", "2000,1e999", "3000,95"))
    assert (error.line, error.column) == (3, 2)
    assert "too large" in error.message


def test_implausible_engine_speed_is_rejected_with_its_cell() -> None:
    error = _error(_text("RPM,Torque (Nm)", "1000,90", "2000,92", "300000,95"))
    assert (error.line, error.column) == (4, 1)
    assert f"at most {MAX_RPM:g} rpm" in error.message


def test_a_run_without_any_positive_torque_is_rejected() -> None:
    error = _error(_text("RPM;Torque (Nm);Power (kW)", "1000;0;5", "2000;0;6", "3000;0;7"))
    assert "at least one torque or power value > 0" in error.message
