"""The parsed formula tree and its canonical text.

Numbers keep their exact rational value: ``0.1`` is one tenth, never the
nearest binary float.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Union


@dataclass(frozen=True, slots=True)
class Number:
    value: Fraction

    @property
    def text(self) -> str:
        return decimal_text(self.value)


@dataclass(frozen=True, slots=True)
class Variable:
    name: str


@dataclass(frozen=True, slots=True)
class Parameter:
    name: str


@dataclass(frozen=True, slots=True)
class Constant:
    name: str  # "pi" or "e"


@dataclass(frozen=True, slots=True)
class Negate:
    operand: "Node"


@dataclass(frozen=True, slots=True)
class Binary:
    op: str  # one of + - * / ^
    left: "Node"
    right: "Node"


@dataclass(frozen=True, slots=True)
class Call:
    function: str
    args: tuple["Node", ...]


Node = Union[Number, Variable, Parameter, Constant, Negate, Binary, Call]

_PRECEDENCE = {"+": 1, "-": 1, "*": 2, "/": 2, "neg": 3, "^": 4}
_ATOM = 5


def decimal_text(value: Fraction) -> str:
    """Exact decimal text of a rational whose denominator divides a power of ten (as literals' do)."""
    if value.denominator == 1:
        return str(value.numerator)
    denominator, places = value.denominator, 0
    for factor in (2, 5):
        while denominator % factor == 0:
            denominator //= factor
    if denominator != 1:  # not a terminating decimal: keep it exact as a quotient
        return f"{value.numerator}/{value.denominator}"
    while (10 ** places) % value.denominator:
        places += 1
    digits = str(abs(value.numerator) * (10 ** places // value.denominator)).rjust(places + 1, "0")
    whole, fraction = digits[:-places], digits[-places:].rstrip("0")
    return ("-" if value < 0 else "") + whole + ("." + fraction if fraction else "")


def _precedence(node: Node) -> int:
    if isinstance(node, Binary):
        return _PRECEDENCE[node.op]
    if isinstance(node, Negate):
        return _PRECEDENCE["neg"]
    return _ATOM


def canonical_text(node: Node) -> str:
    """Text that parses back to the same tree, with minimal parentheses.

    >>> from service.formula import parse
    >>> canonical_text(parse("((2*x))^(2) +  sin( x )").root)
    '(2*x)^2 + sin(x)'
    """
    if isinstance(node, Number):
        return node.text
    if isinstance(node, (Variable, Parameter, Constant)):
        return node.name
    if isinstance(node, Negate):
        inner = canonical_text(node.operand)
        if _precedence(node.operand) < _PRECEDENCE["neg"]:
            inner = f"({inner})"
        return f"-{inner}"
    if isinstance(node, Call):
        return f"{node.function}({', '.join(canonical_text(a) for a in node.args)})"
    level = _PRECEDENCE[node.op]
    left, right = canonical_text(node.left), canonical_text(node.right)
    if node.op == "^":
        if _precedence(node.left) <= level:
            left = f"({left})"
        if _precedence(node.right) < level:
            right = f"({right})"
        return f"{left}^{right}"
    if _precedence(node.left) < level:
        left = f"({left})"
    if _precedence(node.right) <= level:
        right = f"({right})"
    spaced = node.op in "+-"
    return f"{left} {node.op} {right}" if spaced else f"{left}{node.op}{right}"
