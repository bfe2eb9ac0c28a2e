"""A bounded LRU of certified results, keyed by the canonical request and the engine version.

Bounded by an estimate of the memory its entries hold, not by their count: one answer with a 100,000-panel
mesh weighs as much as thousands of plain answers, and a count alone let 768 mesh answers grow the process by
200 MiB for good.
"""

from __future__ import annotations

import hashlib
import json
from collections import OrderedDict
from typing import Any

from .._version import ENGINE_VERSION

#: estimated bytes an answer holds without its mesh, and per mesh panel (a dict of four fields and a pair of
#: floats, measured with tracemalloc on CPython 3.11: about 360 bytes; rounded up)
ENTRY_BYTES = 2048
PANEL_BYTES = 512


def cache_key(kind: str, canonical: dict[str, Any]) -> str:
    text = json.dumps({"kind": kind, "engine": ENGINE_VERSION, **canonical}, sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(text.encode()).hexdigest()


def estimated_bytes(value: dict[str, Any]) -> int:
    """An answer's weight: its mesh, or the encoded picture (bytes, or SVG text) it carries."""
    mesh = value.get("mesh") or (value.get("integral") or {}).get("mesh") or ()
    encoded = value.get("json") or value.get("svg") or b""
    return ENTRY_BYTES + PANEL_BYTES * len(mesh) + len(encoded)


class ResultCache:
    def __init__(self, capacity: int, max_bytes: int = 64 * 1024 * 1024) -> None:
        self.capacity = capacity
        self.max_bytes = max_bytes
        self.bytes = 0
        self._entries: OrderedDict[str, tuple[dict[str, Any], int]] = OrderedDict()
        self.hits = 0
        self.misses = 0

    def get(self, key: str) -> dict[str, Any] | None:
        entry = self._entries.get(key)
        if entry is None:
            self.misses += 1
            return None
        self._entries.move_to_end(key)
        self.hits += 1
        return entry[0]

    def put(self, key: str, value: dict[str, Any]) -> None:
        size = estimated_bytes(value)
        if self.capacity <= 0 or size > self.max_bytes // 4:  # one answer never takes over the cache
            return
        old = self._entries.pop(key, None)
        if old is not None:
            self.bytes -= old[1]
        self._entries[key] = (value, size)
        self.bytes += size
        while len(self._entries) > self.capacity or self.bytes > self.max_bytes:
            _, (_, dropped) = self._entries.popitem(last=False)
            self.bytes -= dropped

    def __len__(self) -> int:
        return len(self._entries)
