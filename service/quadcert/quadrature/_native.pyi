# Types of the compiled float64 interval engine (_native.c). Intervals are (low, high) pairs of floats.
from typing import Any

def tables() -> dict[str, Any]:
    """The opcodes, statuses and constants the engine was built with (see _native_tables.py)."""

def integrate(
    code: bytes,
    constants: tuple[tuple[float, float], ...],
    stack: int,
    a_low: float,
    a_high: float,
    b_low: float,
    b_high: float,
    tolerance: float,
    relative: float,
    seconds: float,
    max_nodes: int,
    want_mesh: bool,
    rule: int,
    gauss: tuple[tuple[float, float], ...],
    /,
) -> tuple[
    int,
    float,
    float,
    int,
    int,
    tuple[int, int, int, int, int, int],
    list[tuple[float, float, float, float, int]] | None,
]:
    """(status, low, high, nodes, panels, panels per bound order, mesh rows (p, q, low, high, order))."""

def taylor(
    code: bytes, constants: tuple[tuple[float, float], ...], stack: int, low: float, high: float, order: int, /
) -> list[tuple[float, float]] | None:
    """Enclosures of f^(k)(X)/k! for k = 0..order, or None where the program faults."""

def enclose(op: int, low: float, high: float, /) -> tuple[float, float] | None:
    """One guarded elementary function over [low, high], or None where it cannot be bounded."""

def operate(
    op: int, a_low: float, a_high: float, b_low: float, b_high: float, n: int = 0, /
) -> tuple[float, float] | None:
    """One outward-rounded operation: 0 add, 1 sub, 2 mul, 3 div, 4 sqr, 5 power n."""
