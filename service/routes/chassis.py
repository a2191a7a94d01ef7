"""Chassis-dyno helpers: wheel and engine figures, one gear's curve in the others."""

from __future__ import annotations

from fastapi import APIRouter

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["chassis dyno"])
