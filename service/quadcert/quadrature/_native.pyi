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
    may_tighten: bool = True,
    /,
) -> tuple[
    int,
    float,
    float,
    int,
    int,
    tuple[int, int, int, int, int, int],
    list[tuple[float, float, float, float, int]] | None,
    int,
    list[tuple[float, float, int]] | None,
]:
    """(status, low, high, nodes, panels, panels per bound order, mesh rows (p, q, low, high, order), Taylor models
    built, and where float64's resolution stopped the run each live panel's left end (low, high) and depth)."""

def taylor(
    code: bytes, constants: tuple[tuple[float, float], ...], stack: int, low: float, high: float, order: int, /
) -> list[tuple[float, float]] | None:
    """Enclosures of f^(k)(X)/k! for k = 0..order, or None where the program faults."""

def model(
    code: bytes,
    constants: tuple[tuple[float, float], ...],
    stack: int,
    low: float,
    high: float,
    panel_low: float,
    panel_high: float,
    /,
) -> tuple[float, float, float] | None:
    """f''''/4! over [panel_low, panel_high] from the Taylor model of f over [low, high], and the width of the
    remainder's part of it; None where the model cannot be built."""

def enclose(op: int, low: float, high: float, tight: bool = False, /) -> tuple[float, float] | None:
    """One elementary function over [low, high], guarded or from the tight tier where it covers it, or None
    where it cannot be bounded."""

def tight(op: int, x: float, /) -> tuple[float, float, float] | None:
    """The tight tier's enclosure of f(x) as a ball (midpoint high and low words, radius), or None where it does not
    cover it; op -1 gives constant number x (ln 2, pi/2, 1/ln 10, then 1/j! for j = 0..30)."""

def operate(
    op: int, a_low: float, a_high: float, b_low: float, b_high: float, n: int = 0, /
) -> tuple[float, float] | None:
    """One outward-rounded operation: 0 add, 1 sub, 2 mul, 3 div, 4 sqr, 5 power n."""
