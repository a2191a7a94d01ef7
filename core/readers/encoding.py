"""Decoding an uploaded export's bytes: UTF-8 (with or without a byte-order mark) or UTF-16.

Dyno and logger software on Windows often saves text as UTF-16 with a byte-order mark, or
as UTF-8 with one. The bytes are read as:

* UTF-8 with its mark ``EF BB BF``; UTF-16 little- or big-endian with its mark ``FF FE`` or
  ``FE FF`` (the mark is dropped);
* UTF-16 without a mark when the first bytes hold a NUL in every second byte and nowhere
  else (text in the Latin range stored in two bytes a character);
* otherwise UTF-8.

Bytes that are not valid in the encoding found are an error naming the byte's 1-based
position.
"""

from __future__ import annotations

import codecs
from dataclasses import dataclass

from core.errors import DynoFileError

__all__ = ["DecodedText", "decode_export"]

_PROBE_BYTES = 512
_BOMS = (
    (codecs.BOM_UTF8, "utf-8", "UTF-8 with byte-order mark"),
    (codecs.BOM_UTF16_LE, "utf-16-le", "UTF-16LE with byte-order mark"),
    (codecs.BOM_UTF16_BE, "utf-16-be", "UTF-16BE with byte-order mark"),
)


@dataclass(frozen=True)
class DecodedText:
    """An export's text and how it was stored.

    Attributes
    ----------
    text : str
        The decoded text, without a byte-order mark.
    encoding : str
        ``UTF-8``, ``UTF-8 with byte-order mark``, ``UTF-16LE with byte-order mark``,
        ``UTF-16BE with byte-order mark``, ``UTF-16LE`` or ``UTF-16BE``.
    """

    text: str
    encoding: str


def _unmarked_utf16(raw: bytes) -> str | None:
    """``utf-16-le`` or ``utf-16-be`` when NULs fill exactly every second probed byte."""
    probe = raw[: _PROBE_BYTES - _PROBE_BYTES % 2]
    if len(probe) < 2 or b"\x00" not in probe:
        return None
    even, odd = probe[0::2], probe[1::2]
    if odd.count(0) == len(odd) and even.count(0) == 0:
        return "utf-16-le"
    if even.count(0) == len(even) and odd.count(0) == 0:
        return "utf-16-be"
    return None


def decode_export(raw: bytes) -> DecodedText:
    """Decode an uploaded export.

    Parameters
    ----------
    raw : bytes
        The file as uploaded.

    Returns
    -------
    DecodedText

    Raises
    ------
    DynoFileError
        When a byte is not valid in the encoding found (``parameter`` ``text``).

    Examples
    --------
    >>> decode_export(codecs.BOM_UTF16_LE + "RPM;Nm".encode("utf-16-le"))
    DecodedText(text='RPM;Nm', encoding='UTF-16LE with byte-order mark')
    >>> decode_export(b"\\xef\\xbb\\xbfRPM;Nm").encoding
    'UTF-8 with byte-order mark'
    """
    codec, name, skip = "utf-8", "UTF-8", 0
    for mark, mark_codec, mark_name in _BOMS:
        if raw.startswith(mark):
            codec, name, skip = mark_codec, mark_name, len(mark)
            break
    else:
        unmarked = _unmarked_utf16(raw)
        if unmarked is not None:
            codec, name = unmarked, unmarked.upper().replace("UTF-16-", "UTF-16")
    try:
        text = raw[skip:].decode(codec)
    except UnicodeDecodeError as exc:
        raise DynoFileError(
            f"`text` is not valid {name} text (byte {skip + exc.start + 1}); save the export "
            "as UTF-8 or UTF-16"
        ) from exc
    return DecodedText(text, name)
