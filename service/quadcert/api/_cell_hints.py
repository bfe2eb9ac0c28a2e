"""Hints for URLs typed into spreadsheet cells, where a few mistakes are common and their errors obscure.

* A raw ``+`` in a query string means a space, so ``x^2+1`` arrives as ``x^2 1`` and reads as implicit
  multiplication. The raw query string still shows the ``+``: the hint says to write ``%2B``.
* Comma decimals (``0,5``) from locales that write them, and ``parameter=k:2,x0:5`` for two parameters.
* Query keys the endpoint does not know (``tol``, ``parameters``) are refused, with the nearest known key.
"""

from __future__ import annotations

import difflib
import re
from urllib.parse import unquote

from ..errors import InvalidInput

_COMMA_DECIMAL = re.compile(r"(?<![\w.])-?\d+,\d+(?![\w.])")
_TWO_PARAMETERS = re.compile(r"^[A-Za-z_]\w*:[^,]*,\s*[A-Za-z_]\w*:")


def raw_values(query_string: bytes, key: str) -> list[str]:
    """The values of ``key`` exactly as typed (percent-decoded, but with ``+`` left as ``+``)."""
    values = []
    for pair in query_string.decode("latin-1").split("&"):
        name, _, value = pair.partition("=")
        if unquote(name.replace("+", " ")) == key:
            values.append(unquote(value))
    return values


def hint(query_string: bytes, field: str | None) -> str:
    """A sentence to add to an error's detail when the field's raw text shows a typical mistake, else ''."""
    if field and field.startswith("parameters"):
        field = "parameter"  # the engine names the parameter; the URL key is parameter=
    keys = (
        [field]
        if field
        else ["integrand", "lower_limit", "upper_limit", "tolerance", "relative_tolerance", "parameter"]
    )
    for key in keys:
        for raw in raw_values(query_string, key):
            if "+" in raw:
                return (
                    " In a URL a raw + means a space: write + as %2B (for example x%5E2%2B1 for x^2+1, "
                    "1.0E%2B2 for 1.0E+2)."
                )
            if key == "parameter" and _TWO_PARAMETERS.match(raw):
                return " Give each parameter its own parameter= (parameter=k:2&parameter=x0:5)."
            if _COMMA_DECIMAL.search(raw):
                return " Numbers take a dot as the decimal separator (0.5, not 0,5), whatever the spreadsheet's locale."
    return ""


def refuse_unknown_keys(keys: list[str], known: tuple[str, ...]) -> None:
    for key in keys:
        if key not in known:
            close = difflib.get_close_matches(key, known, n=1, cutoff=0.5)
            suggestion = f"; did you mean {close[0]!r}?" if close else ""
            raise InvalidInput(
                f"unknown query key {key!r}{suggestion} The keys are {', '.join(known)}",
                code="unknown_query_key",
                field=key,
            )
