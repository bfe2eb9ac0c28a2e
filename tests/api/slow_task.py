"""A task for the worker pool's fault tests: it only sleeps, so a test controls how long a job runs."""

from __future__ import annotations

import time
from typing import Any


def sleep(payload: dict[str, Any], seconds: float | None) -> dict[str, Any]:
    time.sleep(float(payload["seconds"]))
    return {"slept": payload["seconds"]}
