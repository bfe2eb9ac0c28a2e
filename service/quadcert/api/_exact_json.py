"""JSON in and out with numbers kept exact: a JSON number is the decimal it spells, not the nearest float.

Request bodies are read with every number that has a fraction or an exponent as a :class:`~decimal.Decimal`
(integers stay ``int``), so ``9.00000000000000015`` reaches the engine as that decimal. Responses are written
by simplejson, which prints a ``Decimal`` as the very digits it holds, so a typed number is echoed exactly.
No arithmetic is ever done on these Decimals (their context precision would round it); the engine converts
them to exact rationals.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Coroutine
from decimal import Decimal
from typing import Any

import simplejson
from fastapi import Request, Response
from fastapi.responses import JSONResponse
from fastapi.routing import APIRoute


def loads(text: bytes | str) -> Any:
    """Parse JSON text with exact numbers. The non-standard ``NaN`` and ``Infinity`` become Decimals too, so
    that the field they sit in is named when it refuses them.

    >>> loads('{"claimed_value": 9.00000000000000015, "max_nodes": 301}')
    {'claimed_value': Decimal('9.00000000000000015'), 'max_nodes': 301}
    """
    return json.loads(text, parse_float=Decimal, parse_constant=Decimal)  # NaN/Infinity: refused per field


def dumps(content: Any) -> bytes:
    """Compact JSON with Decimals printed as their digits.

    >>> dumps({"claimed_value": Decimal("9.00000000000000015"), "value": 9.0})
    b'{"claimed_value":9.00000000000000015,"value":9.0}'
    """
    text: str = simplejson.dumps(content, use_decimal=True, ensure_ascii=False, allow_nan=False, separators=(",", ":"))
    return text.encode("utf-8")


class ExactJSONResponse(JSONResponse):
    def render(self, content: Any) -> bytes:
        return dumps(content)


class _ExactRequest(Request):
    async def json(self) -> Any:
        if not hasattr(self, "_json"):
            self._json = loads(await self.body())
        return self._json


class ExactRoute(APIRoute):
    """A route whose JSON body is read with exact numbers."""

    def get_route_handler(self) -> Callable[[Request], Coroutine[Any, Any, Response]]:
        handler = super().get_route_handler()

        async def exact_handler(request: Request) -> Response:
            return await handler(_ExactRequest(request.scope, request.receive))

        return exact_handler
