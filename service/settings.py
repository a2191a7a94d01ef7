"""Service settings from the environment (prefix ``GEARWORK_``), built on first use."""

from __future__ import annotations

from functools import lru_cache

from pydantic import Field
from pydantic_settings import BaseSettings, SettingsConfigDict

__all__ = ["Settings", "get_settings"]


class Settings(BaseSettings):
    """Runtime settings; every field can be set as ``GEARWORK_<NAME>``."""

    model_config = SettingsConfigDict(env_prefix="GEARWORK_", extra="ignore")

    host: str = Field("127.0.0.1", description="Address uvicorn binds to.")
    port: int = Field(8000, ge=1, le=65535, description="TCP port.")
    workers: int = Field(1, ge=1, le=64, description="uvicorn worker processes.")
    log_level: str = Field("info", pattern="^(critical|error|warning|info|debug)$")
    cache_entries: int = Field(
        512, ge=0, le=100_000, description="Results kept per worker for repeated requests."
    )
    cache_max_bytes: int = Field(
        64 * 1024 * 1024, ge=0, le=4 * 1024**3, description="Bytes of results kept [bytes]."
    )
    max_body_bytes: int = Field(
        262_144, ge=1024, le=16_777_216, description="Largest accepted request body [bytes]."
    )


@lru_cache(maxsize=1)
def get_settings() -> Settings:
    """The process's settings, read from the environment once."""
    return Settings()
