"""The result cache is bounded by the memory its entries are estimated to hold, not only by their count."""

from __future__ import annotations

from quadcert.api._cache import ENTRY_BYTES, PANEL_BYTES, ResultCache


def test_meshes_are_bounded_by_bytes() -> None:
    cache = ResultCache(capacity=10_000, max_bytes=1_000_000)
    mesh_answer = {"value": 1.0, "mesh": [{"lower": 0.0}] * 400}  # about 207 KB by the estimate
    for i in range(20):
        cache.put(f"mesh-{i}", mesh_answer)
    assert cache.bytes <= 1_000_000 and len(cache) == 1_000_000 // (ENTRY_BYTES + 400 * PANEL_BYTES)
    assert cache.get("mesh-19") is not None and cache.get("mesh-0") is None  # least recently used went first


def test_one_answer_never_takes_over_and_plain_answers_still_fit() -> None:
    cache = ResultCache(capacity=10_000, max_bytes=1_000_000)
    cache.put("huge", {"mesh": [{}] * 1000})  # over a quarter of the budget: not kept
    assert cache.get("huge") is None and cache.bytes == 0
    for i in range(400):
        cache.put(f"plain-{i}", {"value": float(i)})
    assert len(cache) == 400 and cache.bytes == 400 * ENTRY_BYTES
    cache.put("plain-0", {"value": 0.0})  # replacing an entry does not count it twice
    assert cache.bytes == 400 * ENTRY_BYTES
