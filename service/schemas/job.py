"""The job block a printable sheet carries in its header: who, what car, which work order."""

from __future__ import annotations

from typing import Annotated

from pydantic import Field

from service.schemas.common import ApiModel

__all__ = ["JobField", "JobIn"]

_PRINTABLE = r"^[\x20-\x7E]*$"


def _text(description: str, longest: int, example: str) -> object:
    return Field(
        None,
        max_length=longest,
        pattern=_PRINTABLE,
        description=f"{description}; printable ASCII, at most {longest} characters.",
        examples=[example],
    )


class JobIn(ApiModel):
    """Who the sheet is for: printed in the header of a printable sheet, ignored otherwise."""

    customer: str | None = _text("Customer's name", 60, "R. Okonkwo")  # type: ignore[assignment]
    vehicle: str | None = _text(  # type: ignore[assignment]
        "Vehicle description", 80, "Coupe, six-speed, 255/40R18"
    )
    technician: str | None = _text("Technician", 60, "D. Varga")  # type: ignore[assignment]
    date: str | None = _text(  # type: ignore[assignment]
        "Date of the work, as the shop writes it", 20, "2026-11-30"
    )
    work_order: str | None = _text("Work-order number", 32, "WO-2291")  # type: ignore[assignment]


JobField = Annotated[
    JobIn | None,
    Field(
        None,
        description="Customer, vehicle, technician, date and work order to print in the "
        "header of a printable sheet (the report endpoints); the JSON answer ignores it.",
    ),
]
