"""Proactive content negotiation on the Accept header (RFC 9110, section 12.5.1)."""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence

from service.http.problems import ProblemError

__all__ = [
    "choose_media_type",
    "inline_disposition",
    "negotiate",
    "require_media_type",
]

_UNSAFE = re.compile(r"[^A-Za-z0-9._-]+")
_MAX_RANGES = 32  # an Accept header is short; the rest of a long one is ignored


def _ranges(accept: str) -> list[tuple[str, str, float]]:
    """(type, subtype, q) of each media range; malformed ranges are skipped."""
    out = []
    for part in accept.split(",")[:_MAX_RANGES]:
        media, *params = part.split(";")
        kind, slash, sub = media.strip().lower().partition("/")
        if not slash or not kind or not sub or (kind == "*" and sub != "*"):
            continue
        q = 1.0
        for param in params:
            name, _, value = param.partition("=")
            if name.strip().lower() == "q":
                try:
                    q = float(value.strip())
                except ValueError:
                    q = 0.0
                q = min(max(q, 0.0), 1.0) if q == q else 0.0  # NaN is not acceptable
        out.append((kind, sub, q))
    return out


def choose_media_type(accept: str | None, offered: Sequence[str]) -> str | None:
    """The offered media type the caller prefers, or None when it accepts none of them.

    The most specific matching range sets an offer's quality; ties go to the earlier offer,
    so ``offered[0]`` is the default for a missing Accept header or ``*/*``.

    Parameters
    ----------
    accept : str or None
        The request's Accept header.
    offered : sequence of str
        Media types the endpoint produces, most preferred first.

    Returns
    -------
    str or None

    Examples
    --------
    >>> choose_media_type("text/plain;q=0.5, application/pdf", ["text/html", "text/plain",
    ...     "application/pdf"])
    'application/pdf'
    >>> choose_media_type(None, ["image/svg+xml", "image/png"])
    'image/svg+xml'
    >>> choose_media_type("application/json", ["image/svg+xml"]) is None
    True
    """
    if accept is None or not accept.strip():
        return offered[0]
    ranges = _ranges(accept)
    best, best_q = None, 0.0
    for media in offered:
        kind, _, sub = media.partition("/")
        quality, specificity = 0.0, -1
        for r_kind, r_sub, q in ranges:
            if r_kind == kind and r_sub == sub:
                spec = 2
            elif r_kind == kind and r_sub == "*":
                spec = 1
            elif r_kind == "*":
                spec = 0
            else:
                continue
            if spec > specificity:
                quality, specificity = q, spec
        if quality > best_q:
            best, best_q = media, quality
    return best


def _asks_for_json(accept: str) -> bool:
    """Whether the Accept header names JSON: a generic client's way of saying "the usual"."""
    return any(
        kind == "application" and (sub == "json" or sub.endswith("+json")) and q > 0
        for kind, sub, q in _ranges(accept)
    )


def require_media_type(accept: str | None, offered: Sequence[str]) -> str:
    """The negotiated media type, or a 406 problem listing what the endpoint produces.

    A caller that accepts only JSON (``curl --json``, most HTTP client libraries) gets the
    default format, ``offered[0]``: a document endpoint has no JSON form, and a plain call
    should print or draw rather than fail.

    >>> require_media_type("application/json", ["text/html", "application/pdf"])
    'text/html'
    """
    media = choose_media_type(accept, offered)
    if media is None and accept is not None and _asks_for_json(accept):
        return offered[0]
    if media is None:
        raise ProblemError(
            406,
            f"Cannot produce any type the Accept header allows ({(accept or '')[:80]!r}); "
            f"this endpoint produces {', '.join(offered)}.",
            slug="not-acceptable",
        )
    return media


def negotiate(
    accept: str | None, requested: str | None, formats: Mapping[str, str], offered: Sequence[str]
) -> str:
    """The media type to send: the ``format`` query parameter when given, else by Accept.

    Parameters
    ----------
    accept : str or None
        The request's Accept header.
    requested : str or None
        The ``format`` query parameter (``html``, ``text``, ``pdf``, ``svg``, ``png``).
    formats : mapping of str to str
        Format name -> media type, for the names this endpoint knows.
    offered : sequence of str
        Media types the endpoint produces, the default first.

    >>> negotiate("text/plain", "pdf", {"pdf": "application/pdf"}, ["application/pdf"])
    'application/pdf'
    """
    if requested is None:
        return require_media_type(accept, offered)
    media = formats.get(requested.strip().lower())
    if media is None:
        raise ProblemError(
            422,
            f"format must be one of {', '.join(formats)}, got {requested[:20]!r}.",
            field="format",
        )
    return media


def inline_disposition(stem: str, reference: str | None, extension: str) -> str:
    """A Content-Disposition that shows the document and names it after the reference.

    >>> inline_disposition("shift-plan", 'WO 22/"91"', "pdf")
    'inline; filename="shift-plan-WO_22_91_.pdf"'
    """
    name = stem if not reference else f"{stem}-{_UNSAFE.sub('_', reference)}"
    return f'inline; filename="{name[:100]}.{extension}"'
