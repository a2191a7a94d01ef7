"""The shop's letterhead (from settings) and the caller's job block, for every sheet.

Without settings a sheet carries the service's own neutral header. The logo is read once,
checked to be PNG or JPEG, and kept as bytes for the PDF and as a data URI for HTML.
"""

from __future__ import annotations

import base64
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from service.schemas.job import JobIn
from service.settings import Settings, get_settings

__all__ = ["NEUTRAL_NAME", "Letterhead", "get_letterhead", "job_facts", "letterhead_from"]

NEUTRAL_NAME = "gearwork"
MAX_LOGO_BYTES = 1_048_576
_KINDS = {b"\x89PNG\r\n\x1a\n": "image/png", b"\xff\xd8\xff": "image/jpeg"}


@dataclass(frozen=True)
class Letterhead:
    """Who issues the sheet.

    Attributes
    ----------
    name : str
        Shop name, or ``NEUTRAL_NAME`` without settings.
    lines : tuple of str
        Address lines, then the phone.
    logo : bytes
        PNG or JPEG bytes (empty for none).
    logo_type : str
        Media type of the logo.
    neutral : bool
        True when no shop is set: the service's own header.
    """

    name: str
    lines: tuple[str, ...] = ()
    logo: bytes = b""
    logo_type: str = ""
    neutral: bool = True

    @property
    def logo_uri(self) -> str:
        """The logo as a data URI for HTML (empty for none)."""
        if not self.logo:
            return ""
        return f"data:{self.logo_type};base64,{base64.b64encode(self.logo).decode('ascii')}"


def _logo(path: str) -> tuple[bytes, str]:
    if not path:
        return b"", ""
    try:
        data = Path(path).read_bytes()
    except OSError as exc:
        raise ValueError(
            f"GEARWORK_SHOP_LOGO: cannot read {path[:200]!r} ({exc.strerror})"
        ) from exc
    if len(data) > MAX_LOGO_BYTES:
        raise ValueError(f"GEARWORK_SHOP_LOGO: at most {MAX_LOGO_BYTES} bytes, got {len(data)}")
    for magic, kind in _KINDS.items():
        if data.startswith(magic):
            return data, kind
    raise ValueError("GEARWORK_SHOP_LOGO: the file is neither PNG nor JPEG")


def letterhead_from(settings: Settings) -> Letterhead:
    """The letterhead the settings describe (the neutral one when no shop name is set)."""
    if not settings.shop_name.strip():
        return Letterhead(NEUTRAL_NAME)
    lines = list(settings.shop_address)
    if settings.shop_phone.strip():
        lines.append(f"Phone {settings.shop_phone.strip()}")
    logo, kind = _logo(settings.shop_logo)
    return Letterhead(settings.shop_name.strip(), tuple(lines), logo, kind, neutral=False)


@lru_cache(maxsize=1)
def get_letterhead() -> Letterhead:
    """The process's letterhead, built from the settings on first use."""
    return letterhead_from(get_settings())


def job_facts(job: JobIn | None) -> tuple[tuple[str, str], ...]:
    """The job block's filled-in fields as (label, value) pairs, in print order.

    >>> job_facts(JobIn(customer="A. Byrne", work_order="WO-7"))
    (('Work order', 'WO-7'), ('Customer', 'A. Byrne'))
    """
    if job is None:
        return ()
    pairs = (
        ("Work order", job.work_order),
        ("Customer", job.customer),
        ("Vehicle", job.vehicle),
        ("Technician", job.technician),
        ("Date", job.date),
    )
    return tuple((label, value.strip()) for label, value in pairs if value and value.strip())
