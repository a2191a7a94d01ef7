"""Decoding an uploaded export's bytes: UTF-8 (with or without a mark), UTF-16 or Windows-1252.

Dyno and logger software on Windows often saves text as UTF-16 with a byte-order mark, or
as UTF-8 with one. The bytes are read as:

* UTF-8 with its mark ``EF BB BF``; UTF-16 little- or big-endian with its mark ``FF FE`` or
  ``FE FF`` (the mark is dropped);
* UTF-16 without a mark when the first bytes hold a NUL in every second byte and nowhere
  else (text in the Latin range stored in two bytes a character);
* otherwise UTF-8, and when that fails Windows-1252: older Windows programs save text in the
  system's "ANSI" code page, which in Western Europe and the Americas is Windows-1252, so a
  unit written ``\xb0C`` or ``\xb5s`` arrives as one byte that is not UTF-8 (common
  practice; the code page is defined by the WHATWG Encoding Standard's ``windows-1252``).

Bytes that are not valid in the encoding found (UTF-8 or UTF-16 behind a mark, or neither
UTF-8 nor Windows-1252 without one) are an error naming the byte's 1-based position.
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
        ``UTF-16BE with byte-order mark``, ``UTF-16LE``, ``UTF-16BE`` or ``Windows-1252``.
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
    >>> decode_export(b"RPM;T (\\xb0C)")
    DecodedText(text='RPM;T (°C)', encoding='Windows-1252')
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
        return DecodedText(raw[skip:].decode(codec), name)
    except UnicodeDecodeError as exc:
        if name != "UTF-8":
            raise _not_valid(name, skip + exc.start) from exc
    try:
        return DecodedText(raw.decode("cp1252"), "Windows-1252")
    except UnicodeDecodeError as exc:
        raise _not_valid("UTF-8 or Windows-1252", exc.start) from exc


def _not_valid(name: str, index: int) -> DynoFileError:
    """The error for a byte (0-based ``index``) that the encoding cannot read."""
    return DynoFileError(
        f"`text` is not valid {name} text (byte {index + 1}); save the export as UTF-8 or UTF-16"
    )
