"""The answers shown in README.md and openapi-notes/ come from real runs, and a test keeps them so.

An example is a marker comment followed by a fenced block:

    <!-- answer: POST /v1/integrals {"integrand": "x", "lower_limit": 0, "upper_limit": 1} -->
    ```json
    ...the real answer, written by this script...
    ```

``GET /path?query`` markers are answered with the status, media type and body. ``; shorten integral``
after the request keeps only ``nodes`` of that member. Rewrite every example from a fresh run with

    python -m tests.docs.examples --write

The test compares with fields that vary between runs (timings, request ids, cache flags) left out.
"""

from __future__ import annotations

import json
import re
import sys
from collections.abc import Iterator
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
FILES = [ROOT / "README.md", *sorted((ROOT / "openapi-notes").glob("*.md"))]
MARKER = re.compile(
    r"<!-- answer: (GET|POST) (\S+)(?: (\{.*?\}))?(?:; shorten (\w+))? -->\n```(\w*)\n(.*?)```", re.DOTALL
)
VOLATILE = ("compute_seconds", "request_id", "cached")
WIDTH = 112


def wrap(text: str) -> str:
    """Compact JSON wrapped at ``WIDTH`` columns between items, continuation lines indented by one space."""
    lines, line = [], ""
    for piece in re.split(r"(?<=, )", text):
        if line and len(line) + len(piece.rstrip()) > WIDTH:
            lines.append(line.rstrip())
            line = " " + piece
        else:
            line += piece
    lines.append(line.rstrip())
    return "\n".join(lines)


def answer(client: Any, method: str, target: str, body: str | None, shorten: str | None) -> str:
    if method == "GET":
        response = client.get(target)
        media = response.headers["content-type"]
        return f"{response.status_code} {media}\n{response.text}\n"
    response = client.post(target, content=body, headers={"content-type": "application/json"})
    data = json.loads(response.text)
    if shorten and isinstance(data.get(shorten), dict):
        data[shorten] = {"nodes": data[shorten].get("nodes"), "...": "..."}
    return wrap(json.dumps(data, ensure_ascii=False)) + "\n"


def examples(text: str) -> Iterator[re.Match]:
    return MARKER.finditer(text)


def regenerate(client: Any, text: str) -> str:
    def replace(match: re.Match) -> str:
        method, target, body, shorten, _language, _ = match.groups()
        head = match.group(0)[: match.start(6) - match.start(0)]
        return head + answer(client, method, target, body, shorten) + "```"

    return MARKER.sub(replace, text)


def masked(text: str) -> str:
    """The examples of a document with the varying fields blanked, for comparison."""
    blocks = [m.group(6) for m in examples(text)]
    return "\n---\n".join(re.sub(rf'"({"|".join(VOLATILE)})": [^,}}\n]+', r'"\1": _', block) for block in blocks)


def client() -> Any:
    from fastapi.testclient import TestClient

    from quadcert.api import Settings, create_app

    return TestClient(create_app(Settings(workers=1, log_level="WARNING", cache_entries=0)))


if __name__ == "__main__":
    if sys.argv[1:] != ["--write"]:
        sys.exit("usage: python -m tests.docs.examples --write")
    with client() as running:
        for path in FILES:
            original = path.read_text()
            updated = regenerate(running, original)
            if updated != original:
                path.write_text(updated)
                print(f"rewrote the examples in {path.relative_to(ROOT)}")
