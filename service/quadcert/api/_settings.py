"""Service settings, read from QUADCERT_* environment variables (documented defaults)."""

from __future__ import annotations

import os

from pydantic import Field
from pydantic_settings import BaseSettings, SettingsConfigDict

from ..arithmetic import Backend


class Settings(BaseSettings):
    """Every field can be set as QUADCERT_<NAME>, e.g. QUADCERT_WORKERS=4."""

    model_config = SettingsConfigDict(env_prefix="QUADCERT_", extra="ignore")

    host: str = "127.0.0.1"
    port: int = Field(8000, ge=0, le=65535, description="TCP port; 0 picks a free one")
    workers: int = Field(
        default_factory=lambda: max(1, os.cpu_count() or 1), ge=1, le=64, description="engine worker processes"
    )
    queue_limit: int = Field(64, ge=1, description="jobs waiting or running before new ones get 503")
    request_deadline_seconds: float = Field(
        10.0, gt=0, le=600, description="engine time per request; past it the worker is stopped and the caller gets 504"
    )
    batch_deadline_seconds: float = Field(60.0, gt=0, le=3600)
    max_body_bytes: int = Field(1_048_576, ge=1024)
    max_batch_items: int = Field(500, ge=1)
    default_max_nodes: int = Field(200_001, ge=3)
    cache_entries: int = Field(4096, ge=0)
    cache_bytes: int = Field(64 * 1024 * 1024, ge=0, description="estimated memory the result cache may hold")
    max_mesh_panels: int = Field(
        100_000, ge=1, description="include_mesh answers with more panels are refused (mesh_too_large)"
    )
    retry_after_seconds: int = Field(1, ge=1)
    grace_seconds: float = Field(20.0, ge=0, description="time in-flight requests get to finish on SIGTERM")
    read_timeout_seconds: float = Field(
        10.0,
        gt=0,
        le=600,
        description="a request's headers and body must arrive within this time of its first byte, or it gets 408",
    )
    max_connections: int = Field(
        0,
        ge=0,
        description="open connections before the oldest silent one is closed (0: derived from the open-file limit)",
    )
    backend: Backend = Field(
        "flint",
        description="engine arithmetic in the workers: flint (arb balls, fast) or mpmath (the reference backend)",
    )
    log_level: str = "INFO"
