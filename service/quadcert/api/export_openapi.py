"""Print the service's OpenAPI document: python -m quadcert.api.export_openapi > openapi-notes/openapi.json"""

from __future__ import annotations

import json
from typing import Any

from ._settings import Settings
from .main import create_app


def document() -> dict[str, Any]:
    return create_app(Settings(workers=1)).openapi()


if __name__ == "__main__":
    print(json.dumps(document(), indent=2, sort_keys=True))
