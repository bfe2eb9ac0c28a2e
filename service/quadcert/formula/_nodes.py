"""The parsed formula tree and its canonical text.

Numbers keep their exact rational value: ``0.1`` is one tenth, never the
nearest binary float.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction


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
    operand: Node


@dataclass(frozen=True, slots=True)
class Binary:
    op: str  # one of + - * / ^
    left: Node
    right: Node


@dataclass(frozen=True, slots=True)
class Call:
    function: str
    args: tuple[Node, ...]


Node = Number | Variable | Parameter | Constant | Negate | Binary | Call


def distinct_arguments(node: Call) -> tuple[Node, ...]:
    """The arguments of min or max without repeats: min(u, u) is u exactly, a smooth function, whereas
    evaluated as a kink with a gap of width zero it would need the first-order bound on every panel.

    >>> distinct_arguments(Call("min", (Variable("x"), Variable("x"))))
    (Variable(name='x'),)
    """
    return tuple(dict.fromkeys(node.args))


def parameters_used(node: Node) -> frozenset[str]:
    """The names of the parameters a tree mentions.

    >>> sorted(parameters_used(Binary("*", Parameter("k"), Call("sin", (Parameter("w"),)))))
    ['k', 'w']
    """
    if isinstance(node, Parameter):
        return frozenset((node.name,))
    if isinstance(node, Negate):
        return parameters_used(node.operand)
    if isinstance(node, Binary):
        return parameters_used(node.left) | parameters_used(node.right)
    if isinstance(node, Call):
        return frozenset().union(*(parameters_used(a) for a in node.args))
    return frozenset()


_PRECEDENCE = {"+": 1, "-": 1, "*": 2, "/": 2, "neg": 3, "^": 4}
_ATOM = 5


def decimal_text(value: Fraction) -> str:
    """Exact, short decimal text of a rational whose denominator divides a power of ten (as literals' do).

    Plain notation for ordinary sizes, ``<digits>e<exponent>`` otherwise, so the text never has more
    significant digits than the literal it came from.
    """
    denominator = value.denominator
    if denominator == 1 and value.numerator % 10**7:  # an integer with fewer than 7 trailing zeros
        return str(value.numerator)
    for factor in (2, 5):
        while denominator % factor == 0:
            denominator //= factor
    if denominator != 1:  # not a terminating decimal: keep it exact as a quotient
        return f"{value.numerator}/{value.denominator}"
    if value == 0:
        return "0"
    exponent = 0
    while (value * Fraction(10) ** -exponent).denominator != 1:
        exponent -= 1
    mantissa = int(value * Fraction(10) ** -exponent)
    while mantissa % 10 == 0:
        mantissa //= 10
        exponent += 1
    sign, digits = ("-" if mantissa < 0 else ""), str(abs(mantissa))
    if 0 <= exponent <= 6:
        return sign + digits + "0" * exponent
    if -(len(digits) + 6) <= exponent < 0:
        padded = digits.rjust(-exponent + 1, "0")
        return f"{sign}{padded[:exponent]}.{padded[exponent:]}"
    return f"{sign}{digits}e{exponent}"


#: the internal calls of piecewise definitions (see the grammar in ``_parser``); no one can write them as calls
CONDITION_FUNCTIONS = ("<", "<=", "and", "or")


def _piecewise_text(node: Call) -> str:
    """{v if c; …; w otherwise}, with conditions joined by and/or (and binds tighter)."""
    if node.function == "cases":
        args = node.args
        pieces = [f"{canonical_text(args[i])} if {canonical_text(args[i + 1])}" for i in range(0, len(args) - 1, 2)]
        if len(args) % 2:
            pieces.append(f"{canonical_text(args[-1])} otherwise")
        return "{" + "; ".join(pieces) + "}"
    if node.function in ("<", "<="):
        return f"{canonical_text(node.args[0])} {node.function} {canonical_text(node.args[1])}"
    parts = [canonical_text(arg) for arg in node.args]  # the parser nests and inside or, never the reverse
    return f" {node.function} ".join(parts)


def _precedence(node: Node) -> int:
    if isinstance(node, Binary):
        return _PRECEDENCE[node.op]
    if isinstance(node, Negate):
        return _PRECEDENCE["neg"]
    return _ATOM


def canonical_text(node: Node) -> str:
    """Text that parses back to the same tree, with minimal parentheses.

    >>> from quadcert.formula import parse
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
        if node.function in CONDITION_FUNCTIONS or node.function == "cases":
            return _piecewise_text(node)
        return f"{node.function}({', '.join(canonical_text(a) for a in node.args)})"
    level = _PRECEDENCE[node.op]
    left, right = canonical_text(node.left), canonical_text(node.right)
    if node.op == "^":
        if _precedence(node.left) <= level:
            left = f"({left})"
        if _precedence(node.right) < _PRECEDENCE["neg"]:  # the exponent is read as a unary: 2^-x needs none
            right = f"({right})"
        return f"{left}^{right}"
    if _precedence(node.left) < level:
        left = f"({left})"
    if _precedence(node.right) <= level:
        right = f"({right})"
    spaced = node.op in "+-"
    return f"{left} {node.op} {right}" if spaced else f"{left}{node.op}{right}"
