"""Liveness."""

from __future__ import annotations

from fastapi import APIRouter
from pydantic import Field

from service.schemas.common import ApiModel

__all__ = ["router"]

router = APIRouter(tags=["health"])


class Health(ApiModel):
    """Liveness document."""

    status: str = Field(description="`ok` while the process serves requests.")
    service: str = Field(description="Service name.")
    version: str = Field(description="Service version.")


@router.get("/healthz", operation_id="get_health", summary="Liveness check")
async def health() -> Health:
    """Answers while the process is up; touches nothing else."""
    return Health(status="ok", service="gearwork", version="0.1.0")
