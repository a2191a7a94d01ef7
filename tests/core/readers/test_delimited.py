"""The delimited-text reading shared by the dyno and logger readers."""

from __future__ import annotations

import pytest

from core.errors import DynoFileError, LogDataError
from core.readers.delimited import (
    Delimiter,
    best_delimiter,
    cells_or_none,
    forbidden_character,
    normalised_text,
    significant_lines,
    split_rows,
)


def test_line_breaks_are_made_uniform_and_the_byte_order_mark_dropped() -> None:
    assert normalised_text("\ufeffrpm;Nm\r\n2000;150\r3000;160") == "rpm;Nm\n2000;150\n3000;160"


def test_a_control_character_is_found_with_its_line_and_position() -> None:
    assert forbidden_character("rpm,Nm\n2000,1\x07") == (2, 7, "\x07")
    assert forbidden_character("rpm,Nm\n2000,150") is None


def test_blank_and_comment_lines_are_skipped_keeping_line_numbers() -> None:
    text = "// exported\nrpm,Nm\n\n  # note\n2000,150"
    assert significant_lines(text) == [(2, "rpm,Nm"), (5, "2000,150")]


def test_the_delimiter_that_splits_the_lines_below_alike_wins() -> None:
    # A header "rpm;torque,Nm" splits under both; the rows below split only at ";".
    probe = [(2, "2000;150,5"), (3, "3000;160,2")]
    header = "rpm;torque,Nm"
    delimiters = [Delimiter.SEMICOLON, Delimiter.COMMA]
    counts = [len(cells_or_none(header, d) or ()) for d in delimiters]
    assert counts == [2, 2]
    assert best_delimiter(counts, delimiters, probe) == 0


def test_quoted_cells_follow_the_csv_rules() -> None:
    # RFC 4180 section 2: a quoted field may hold the delimiter; "" stands for a quote.
    rows = split_rows([(4, '"a,b",1'), (5, '"say ""hi""",2')], Delimiter.COMMA, DynoFileError)
    assert rows == [["a,b", "1"], ['say "hi"', "2"]]


@pytest.mark.parametrize("error", [DynoFileError, LogDataError], ids=["dyno", "log"])
def test_a_line_that_cannot_be_split_raises_the_readers_error_naming_the_line(
    error: type[DynoFileError] | type[LogDataError],
) -> None:
    with pytest.raises(error, match="`text` line 7 cannot be split into cells") as info:
        split_rows([(7, '1,"unclosed')], Delimiter.COMMA, error)
    raised = info.value
    assert isinstance(raised, DynoFileError | LogDataError)
    assert raised.line == 7


def test_too_many_cells_name_the_first_cell_over() -> None:
    with pytest.raises(DynoFileError, match="must have at most 2 cells, got 3") as info:
        split_rows([(3, "1;2;3")], Delimiter.SEMICOLON, DynoFileError, max_columns=2)
    assert (info.value.line, info.value.column) == (3, 3)
