"""Notices: what the caller should know about a result, beside the figures.

A notice that quotes a physical value keeps it as a :class:`Figure` (in SI) beside a
``template`` with a ``{0}``, ``{1}``... where each goes, so the edge can say it again in
the caller's units; its ``message`` quotes the values in SI.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["SI_UNITS", "Figure", "Notice"]

SI_UNITS = {"speed": "m/s"}
"""The SI unit a figure of each kind is given in."""


@dataclass(frozen=True)
class Figure:
    """A physical value quoted by a notice.

    Attributes
    ----------
    value : float
        The value in SI (the unit ``SI_UNITS[kind]``).
    kind : str
        What it is, a key of ``SI_UNITS``: ``"speed"`` [m/s].
    digits : int
        Decimals it is quoted with.
    """

    value: float
    kind: str
    digits: int = 1

    def __post_init__(self) -> None:
        if self.kind not in SI_UNITS:
            raise ValueError(f"`kind` must be one of {sorted(SI_UNITS)}, got {self.kind!r}")

    def quoted(self, value: float, unit: str) -> str:
        """``value`` (this figure restated) with ``unit``, at this figure's decimals."""
        return f"{value:.{self.digits}f} {unit}"


@dataclass(frozen=True)
class Notice:
    """Something the caller should know about a result.

    Attributes
    ----------
    code : str
        Stable identifier, e.g. ``"rev_limit_clipped"``.
    message : str
        One plain sentence; physical values in SI.
    parameter : str or None
        The core argument concerned, if any.
    figures : tuple of Figure
        The physical values the message quotes, in order (see ``template``).
    template : str or None
        The message with ``{0}``, ``{1}``... where each figure goes, value and unit; None
        when it quotes none.
    """

    code: str
    message: str
    parameter: str | None = None
    figures: tuple[Figure, ...] = ()
    template: str | None = None

    @classmethod
    def quoting(
        cls, code: str, template: str, figures: tuple[Figure, ...], parameter: str | None = None
    ) -> Notice:
        """A notice whose ``template`` quotes ``figures``; its message gives them in SI.

        Examples
        --------
        >>> n = Notice.quoting("x", "Held at {0}.", (Figure(77.84, "speed"),))
        >>> n.message
        'Held at 77.8 m/s.'
        """
        si = [f.quoted(f.value, SI_UNITS[f.kind]) for f in figures]
        return cls(code, template.format(*si), parameter, figures, template)
