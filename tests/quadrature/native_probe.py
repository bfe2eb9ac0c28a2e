"""Direct entry points into the compiled engine's layers, for its tests (not part of the engine)."""

from __future__ import annotations

from quadcert.quadrature import _fast


def taylor(compiled: _fast.Compiled, low: float, high: float, order: int) -> list[tuple[float, float]] | None:
    """Enclosures of f⁽ᵏ⁾(X)/k! over X = [low, high] from the compiled recurrences (None: not enclosable)."""
    assert _fast._native is not None
    return _fast._native.taylor(compiled.code, compiled.constants, compiled.stack, low, high, order)


def enclose_function(name: str, low: float, high: float) -> tuple[float, float] | None:
    """The guarded layer's enclosure of one function over [low, high] (None: outside its domain)."""
    assert _fast._native is not None
    return _fast._native.enclose(_fast.FUNCTION_CODES[name], low, high)


def operate(
    op: str, a: tuple[float, float], b: tuple[float, float] = (0.0, 0.0), n: int = 0
) -> tuple[float, float] | None:
    assert _fast._native is not None
    codes = {"+": 0, "-": 1, "*": 2, "/": 3, "sqr": 4, "pow": 5}
    return _fast._native.operate(codes[op], a[0], a[1], b[0], b[1], n)
