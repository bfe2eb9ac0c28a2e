"""A bounded LRU of certified results, keyed by the canonical request and the engine version."""

from __future__ import annotations

import hashlib
import json
from collections import OrderedDict
from typing import Any

from .._version import ENGINE_VERSION


def cache_key(kind: str, canonical: dict[str, Any]) -> str:
    text = json.dumps({"kind": kind, "engine": ENGINE_VERSION, **canonical}, sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(text.encode()).hexdigest()


class ResultCache:
    def __init__(self, capacity: int) -> None:
        self.capacity = capacity
        self._entries: OrderedDict[str, dict[str, Any]] = OrderedDict()
        self.hits = 0
        self.misses = 0

    def get(self, key: str) -> dict[str, Any] | None:
        entry = self._entries.get(key)
        if entry is None:
            self.misses += 1
            return None
        self._entries.move_to_end(key)
        self.hits += 1
        return entry

    def put(self, key: str, value: dict[str, Any]) -> None:
        if self.capacity <= 0:
            return
        self._entries[key] = value
        self._entries.move_to_end(key)
        while len(self._entries) > self.capacity:
            self._entries.popitem(last=False)

    def __len__(self) -> int:
        return len(self._entries)
