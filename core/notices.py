"""Notices: what the caller should know about a result, beside the figures."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Notice"]


@dataclass(frozen=True)
class Notice:
    """Something the caller should know about a result.

    Attributes
    ----------
    code : str
        Stable identifier, e.g. ``"rev_limit_clipped"``.
    message : str
        One plain sentence.
    parameter : str or None
        The core argument concerned, if any.
    """

    code: str
    message: str
    parameter: str | None = None
