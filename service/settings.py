"""Service settings from the environment (prefix ``GEARWORK_``), built on first use.

Every knob is bounded; a value out of bounds stops the process at start with a message
naming the variable, rather than serving with a setting nobody asked for.
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import Annotated

from pydantic import Field, field_validator, model_validator
from pydantic_settings import BaseSettings, NoDecode, SettingsConfigDict

__all__ = ["Settings", "get_settings"]

# scheme://host[:port], no path: what a browser sends in an Origin header
_ORIGIN = re.compile(r"^https?://[A-Za-z0-9.-]{1,253}(:[0-9]{1,5})?$")


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
    calc_slots: int = Field(
        2,
        ge=0,
        le=64,
        description="Calculations one worker runs at once, each on its own thread (see "
        "README, Scaling out: two per worker measured best); 0 computes on the event loop.",
    )
    switch_interval_s: float = Field(
        0.001,
        ge=0.0001,
        le=0.1,
        description="How often a computing thread hands the interpreter lock to the event "
        "loop [s] (Python's default is 0.005; 0.001 measured best: README, Scaling out).",
    )
    pin_cpu: bool = Field(
        True,
        description="Keep each worker process on one CPU of its own (Linux): its event loop "
        "and calculation threads share one interpreter lock, and a lock handed between "
        "CPUs costs about twice the CPU time (README, Scaling out).",
    )
    queue_limit: int = Field(
        16,
        ge=0,
        le=10_000,
        description="Calculation requests one worker lets wait for a slot; one more is "
        "answered 503 with Retry-After at once.",
    )
    wait_budget_s: float = Field(
        5.0,
        gt=0,
        le=600,
        description="Longest a request waits from arrival for a calculation slot [s]; past "
        "it the answer is 503 with Retry-After.",
    )
    client_timeout_s: float = Field(
        10.0,
        gt=0,
        le=600,
        description="Longest a client may take to send its headers, and its body, from "
        "arrival [s]; past it 408 and the connection is closed.",
    )
    shutdown_timeout_s: float = Field(
        20.0,
        gt=0,
        le=3600,
        description="On SIGTERM, longest the worker waits for accepted requests to be "
        "answered before closing [s]; at least the wait budget plus the slowest request.",
    )
    max_header_bytes: int = Field(
        16_384,
        ge=1024,
        le=1_048_576,
        description="Largest request line plus headers [bytes]; past it 431.",
    )
    max_headers: int = Field(
        64, ge=8, le=1000, description="Most header fields in a request; past it 431."
    )
    docs: bool = Field(
        True, description="Serve /docs (Swagger UI from the installed package, no CDN)."
    )
    retry_after_s: int = Field(2, ge=1, le=600, description="Retry-After sent with a 503 [s].")
    request_log: bool = Field(True, description="One JSON line per request on stdout.")
    metrics: bool = Field(True, description="Serve Prometheus metrics at /metrics.")
    otel: bool = Field(
        False,
        description="FastAPI's own OpenTelemetry traces, metrics and logs, for a process "
        "with an OpenTelemetry SDK configured; off, no request asks whether one is.",
    )
    cors_origins: Annotated[list[str], NoDecode] = Field(
        default_factory=list,
        max_length=32,
        description="Comma-separated origins allowed to call from a browser "
        "(e.g. `https://shop.example`), or `*`; none by default.",
    )
    cors_max_age_s: int = Field(
        600, ge=0, le=86_400, description="How long a browser may keep a preflight [s]."
    )
    gzip_level: int = Field(
        5, ge=0, le=9, description="gzip level for large responses; 0 turns gzip off."
    )
    gzip_min_bytes: int = Field(
        1024, ge=128, le=16_777_216, description="Smallest response body gzipped [bytes]."
    )
    result_max_age_s: int = Field(
        0,
        ge=0,
        le=86_400,
        description="max-age of calculation results [s]; 0 sends `no-cache` (store, but "
        "revalidate with If-None-Match).",
    )

    @model_validator(mode="after")
    def _shutdown_covers_the_budget(self) -> Settings:
        if self.shutdown_timeout_s < self.wait_budget_s:
            raise ValueError(
                f"GEARWORK_SHUTDOWN_TIMEOUT_S ({self.shutdown_timeout_s:g}) must be at least "
                f"GEARWORK_WAIT_BUDGET_S ({self.wait_budget_s:g}): queued requests are "
                "answered before the worker stops"
            )
        return self

    shop_name: str = Field(
        "",
        max_length=80,
        pattern=r"^[\x20-\x7E]*$",
        description="Shop name printed at the head of every sheet; empty for the "
        "service's neutral header.",
    )
    shop_address: Annotated[list[str], NoDecode] = Field(
        default_factory=list,
        max_length=3,
        description="Address lines of the letterhead, separated by `|` "
        "(e.g. `12 Forge Lane|Millbrook 4410`).",
    )
    shop_phone: str = Field(
        "", max_length=40, pattern=r"^[\x20-\x7E]*$", description="Letterhead phone."
    )
    shop_logo: str = Field(
        "",
        max_length=4096,
        description="Path of a PNG or JPEG logo printed at the right of the letterhead; "
        "read once at start.",
    )
    sheet_paper: str = Field(
        "auto",
        pattern="^(auto|a4|letter)$",
        description="Paper of PDF sheets: `a4`, `letter`, or `auto` (US Letter for `us` "
        "requests, A4 for metric).",
    )

    @field_validator("shop_address", mode="before")
    @classmethod
    def _split_address(cls, value: object) -> object:
        if isinstance(value, str):
            return [part.strip() for part in value.split("|") if part.strip()]
        return value

    @field_validator("shop_address")
    @classmethod
    def _check_address(cls, value: list[str]) -> list[str]:
        for line in value:
            if len(line) > 80 or not line.isprintable() or not line.isascii():
                raise ValueError(
                    "GEARWORK_SHOP_ADDRESS: each line printable ASCII, at most 80 characters"
                )
        return value

    @field_validator("cors_origins", mode="before")
    @classmethod
    def _split_origins(cls, value: object) -> object:
        if isinstance(value, str):
            return [part.strip() for part in value.split(",") if part.strip()]
        return value

    @field_validator("cors_origins")
    @classmethod
    def _check_origins(cls, value: list[str]) -> list[str]:
        for origin in value:
            if origin != "*" and not _ORIGIN.match(origin):
                raise ValueError(
                    f"GEARWORK_CORS_ORIGINS: {origin[:80]!r} is not `*` or scheme://host[:port]"
                )
        return value


@lru_cache(maxsize=1)
def get_settings() -> Settings:
    """The process's settings, read from the environment once."""
    return Settings()
