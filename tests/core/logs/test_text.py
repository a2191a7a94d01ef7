"""Tests of core.logs.text and core.logs.header: reading a logger's delimited text export.

Every export here is invented; none copies a real logger's format.
"""

from __future__ import annotations

import pytest
from numpy.testing import assert_allclose

from core.errors import LogDataError
from core.logs.header import LogQuantity
from core.logs.text import read_log_text


def rows(sep: str = ",", comma_decimal: bool = False, n: int = 30) -> str:
    """n rows of time [s], speed [km/h], rpm: 20 Hz, 3.6 km/h (1 m/s) more each row."""
    out = []
    for i in range(n):
        t, v = f"{0.05 * i:.2f}", f"{3.6 * i:.1f}"
        if comma_decimal:
            t, v = t.replace(".", ","), v.replace(".", ",")
        out.append(sep.join((t, v, str(900 + 100 * i))))
    return "\n".join(out)


@pytest.mark.parametrize(
    ("text", "delimiter"),
    [
        pytest.param("time [s],speed [km/h],rpm\n" + rows(), ",", id="comma"),
        pytest.param(
            "Time (s);Speed (km/h);Engine speed [rpm]\n" + rows(";", True), ";", id="decimal-comma"
        ),
        pytest.param("t\tv kph\tRPM\n" + rows("\t"), "\t", id="tab-units-after-name"),
        pytest.param("time,speed,rpm\ns,km/h,rpm\n" + rows(), ",", id="units-row"),
        pytest.param(
            "\ufeff# invented logger\r\nrun 12\r\ntime [s],speed [km/h],rpm\r\n"
            + rows().replace("\n", "\r\n"),
            ",",
            id="bom-crlf-preamble",
        ),
    ],
)
def test_exports_in_several_forms_read_the_same(text: str, delimiter: str) -> None:
    out = read_log_text(text)
    assert out.delimiter.value == delimiter
    assert out.rows == 30
    assert [c.quantity for c in out.columns] == [
        LogQuantity.TIME,
        LogQuantity.SPEED,
        LogQuantity.RPM,
    ]
    assert_allclose(out.log.speed_m_s[:4], [0.0, 1.0, 2.0, 3.0], rtol=1e-12, atol=1e-12)
    assert out.log.rpm is not None
    assert_allclose(out.log.rpm[-1], 900 + 100 * 29, rtol=1e-12)


def test_milliseconds_mph_and_acceleration_in_m_s2() -> None:
    # 1 mph = 0.44704 m/s exactly (scipy.constants.mph)
    lines = [f"{50 * i};{i};0.5;0.1" for i in range(25)]
    out = read_log_text("Time [ms];Speed [mph];Long acc [m/s^2];Lat acc [g]\n" + "\n".join(lines))
    assert_allclose(out.log.time_s[1], 0.05, rtol=1e-12)
    assert_allclose(out.log.speed_m_s[2], 2 * 0.44704, rtol=1e-12)
    assert out.log.acceleration_m_s2 is not None
    assert_allclose(out.log.acceleration_m_s2, 0.5, rtol=1e-12)
    assert {c.header for c in out.columns} == {"Time [ms]", "Speed [mph]", "Long acc [m/s^2]"}


def test_lines_above_the_header_are_reported() -> None:
    out = read_log_text("session 4\ndriver A\ntime [s],speed [km/h]\n" + rows())
    assert [n.code for n in out.log.notices] == ["lines_skipped"]


@pytest.mark.parametrize(
    ("text", "line", "column", "match"),
    [
        pytest.param(
            "time [s],speed [km/h],rpm\n" + rows() + "\n1.50,54.0",
            32,
            3,
            "truncated",
            id="truncated",
        ),
        pytest.param(
            "time [s],speed [km/h],rpm\n" + rows().replace("1800", "18o0"),
            11,
            3,
            "not a number",
            id="bad-number",
        ),
        pytest.param("time [s],speed\n" + rows(), 1, 2, "names no unit", id="speed-no-unit"),
        pytest.param(
            "time [s],speed [ft/s],rpm\n" + rows(), 1, 2, "not a speed unit", id="wrong-unit"
        ),
        pytest.param("time [s],speed [km/h]\x00\x9c\x01", 1, None, "binary", id="binary"),
        pytest.param(
            "time [s],speed [km/h],rpm\n" + rows().replace("0.30,", "0.20,"),
            8,
            1,
            "strictly increasing",
            id="time-goes-back",
        ),
        pytest.param(
            "time [s],speed [km/h],rpm\n" + rows().replace("36.0", "-36.0"),
            12,
            2,
            "must lie in",
            id="negative-speed",
        ),
    ],
)
def test_bad_exports_name_line_and_column(
    text: str, line: int, column: int | None, match: str
) -> None:
    with pytest.raises(LogDataError, match=match) as err:
        read_log_text(text)
    assert (err.value.line, err.value.column) == (line, column)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        pytest.param("rpm,torque\n1,2\n", "no header row", id="no-time-or-speed"),
        pytest.param("", "header row and data rows", id="empty"),
        pytest.param("time [s],speed [km/h]\n0,0\n0.1,1\n", "20 to 20000", id="too-few-rows"),
        pytest.param(
            "time [s],speed [km/h]\n" + "\n".join(f"{i},1" for i in range(20_001)),
            "at most 20000 data rows",
            id="too-many-rows",
        ),
    ],
)
def test_unusable_exports_are_rejected(text: str, match: str) -> None:
    with pytest.raises(LogDataError, match=match):
        read_log_text(text)
