"""Notices that quote physical values: the values kept in SI for the edge to restate."""

from __future__ import annotations

import pytest

from core.notices import Figure, Notice


def test_a_quoting_notice_says_its_figures_in_si_and_keeps_them() -> None:
    figures = (Figure(77.84, "speed"), Figure(2.0, "speed", 0))
    n = Notice.quoting("held", "Held at {0} in gear 6, from {1}.", figures)
    assert n.message == "Held at 77.8 m/s in gear 6, from 2 m/s."
    assert n.figures == figures
    assert n.template == "Held at {0} in gear 6, from {1}."


def test_a_figure_of_an_unknown_kind_is_refused() -> None:
    with pytest.raises(ValueError, match="`kind` must be one of"):
        Figure(1.0, "furlongs")
