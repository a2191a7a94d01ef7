"""Data-logger checks of real shifts."""

from __future__ import annotations

from fastapi import APIRouter

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["log analysis"])
