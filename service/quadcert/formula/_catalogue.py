"""The functions of the formula language: one entry each, the single source for the parser, the engines'
hand-over and the language reference (docs/language.md, kept in step by tests/formula/test_catalogue.py).

Some functions are *spelled out*: the engines read ``sec(u)`` as ``1/cos(u)``, so every engine, the
compiled one included, certifies them with the rules it already has, and no second implementation can
disagree with the first. The written form stays in the formula's text.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction

from . import _limits
from ._nodes import Binary, Call, Node, Number, Variable, canonical_text


@dataclass(frozen=True)
class Function:
    name: str
    arguments: tuple[int, int]  # least and most
    domain: str
    meaning: str
    spelled_out: Callable[[tuple[Node, ...]], Node] | None = None


def _ratio(top: Node, bottom: Node) -> Node:
    return Binary("/", top, bottom)


_ONE, _TWO = Number(Fraction(1)), Number(Fraction(2))

CATALOGUE: tuple[Function, ...] = (
    Function("sqrt", (1, 1), "u ≥ 0", "square root"),
    Function("cbrt", (1, 1), "all real u", "real cube root, odd: cbrt(−8) = −2"),
    Function("exp", (1, 1), "u ≤ 40000", "exponential"),
    Function("log", (1, 1), "u > 0", "natural logarithm (also ln)"),
    Function("log10", (1, 1), "u > 0", "logarithm to base 10"),
    Function("log2", (1, 1), "u > 0", "logarithm to base 2", lambda a: _ratio(Call("log", a), Call("log", (_TWO,)))),
    Function("sin", (1, 1), "all real u", "sine, u in radians"),
    Function("cos", (1, 1), "all real u", "cosine"),
    Function("tan", (1, 1), "u ≠ π/2 + kπ", "tangent"),
    Function("sec", (1, 1), "u ≠ π/2 + kπ", "secant, 1/cos(u)", lambda a: _ratio(_ONE, Call("cos", a))),
    Function("csc", (1, 1), "u ≠ kπ", "cosecant, 1/sin(u)", lambda a: _ratio(_ONE, Call("sin", a))),
    Function("cot", (1, 1), "u ≠ kπ", "cotangent, cos(u)/sin(u)", lambda a: _ratio(Call("cos", a), Call("sin", a))),
    Function("asin", (1, 1), "−1 ≤ u ≤ 1", "inverse sine (also arcsin)"),
    Function("acos", (1, 1), "−1 ≤ u ≤ 1", "inverse cosine (also arccos)"),
    Function("atan", (1, 1), "all real u", "inverse tangent (also arctan)"),
    Function(
        "atan2",
        (2, 2),
        "(y, x) ≠ (0, 0)",
        "angle of the point (x, y) in (−π, π]: atan2(y, x), y first; it jumps from π to −π where x < 0 and y crosses 0",
    ),
    Function(
        "hypot",
        (2, 2),
        "all real u, v",
        "length sqrt(u² + v²)",
        lambda a: Call("sqrt", (Binary("+", Binary("^", a[0], _TWO), Binary("^", a[1], _TWO)),)),
    ),
    Function("sinh", (1, 1), "−40000 ≤ u ≤ 40000", "hyperbolic sine"),
    Function("cosh", (1, 1), "−40000 ≤ u ≤ 40000", "hyperbolic cosine"),
    Function("tanh", (1, 1), "all real u", "hyperbolic tangent"),
    Function("asinh", (1, 1), "all real u", "inverse hyperbolic sine (also arsinh)"),
    Function("acosh", (1, 1), "u ≥ 1", "inverse hyperbolic cosine (also arcosh)"),
    Function("atanh", (1, 1), "−1 < u < 1", "inverse hyperbolic tangent (also artanh)"),
    Function("erf", (1, 1), "all real u", "error function"),
    Function("erfc", (1, 1), "all real u", "complementary error function, 1 − erf(u), accurate where it is tiny"),
    Function("gamma", (1, 1), "u not 0, −1, −2, … (u ≤ 5000)", "Gamma function; gamma(n + 1) = n!"),
    Function("lgamma", (1, 1), "u > 0", "natural logarithm of the Gamma function"),
    Function("j0", (1, 1), "−100000 ≤ u ≤ 100000", "Bessel function of the first kind, order 0"),
    Function("j1", (1, 1), "−100000 ≤ u ≤ 100000", "Bessel function of the first kind, order 1"),
    Function("abs", (1, 1), "all real u", "absolute value"),
    Function("sign", (1, 1), "all real u", "−1 below 0, 0 at 0, 1 above 0"),
    Function("step", (1, 1), "all real u", "unit step: 0 below 0, 1 from 0 on (step(0) = 1)"),
    Function("min", (2, _limits.MAX_ARGUMENTS), "all real arguments", "least of its arguments"),
    Function("max", (2, _limits.MAX_ARGUMENTS), "all real arguments", "greatest of its arguments"),
)

BY_NAME: dict[str, Function] = {f.name: f for f in CATALOGUE}

ALIASES = {
    "ln": "log",
    "arcsin": "asin",
    "arccos": "acos",
    "arctan": "atan",
    "arsinh": "asinh",
    "arcosh": "acosh",
    "artanh": "atanh",
}


def reference_table() -> str:
    """The functions as the Markdown table of docs/language.md (a test keeps the page equal to it)."""
    rows = ["| function | arguments | domain | meaning | spelled out |", "| --- | --- | --- | --- | --- |"]
    for f in CATALOGUE:
        low, high = f.arguments
        count = str(low) if low == high else f"{low} to {high}"
        written = canonical_text(f.spelled_out(_SAMPLE[:high])) if f.spelled_out else ""
        rows.append(f"| `{f.name}` | {count} | {f.domain} | {f.meaning} | {f'`{written}`' if written else ''} |")
    return "\n".join(rows)


_SAMPLE = (Variable("u"), Variable("v"))


def spelled_out(name: str, args: tuple[Node, ...]) -> Node | None:
    """The formula an engine reads for a call of a spelled-out function, or None for the others.

    >>> from quadcert.formula import canonical_text, parse
    >>> canonical_text(spelled_out("sec", (parse("x").root,)))
    '1/cos(x)'
    """
    entry = BY_NAME.get(name)
    if entry is None or entry.spelled_out is None:
        return None
    return entry.spelled_out(args)
