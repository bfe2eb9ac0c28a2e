"""The integrand seen from a singular point: f(c + t) as a formula in t, with exact linear parts folded.

Next to a singular point c that is not a binary number (0.3, 1/3), float64 cannot resolve x − c for
|x − c| below an ulp of c, and even exact arithmetic on x then loses it to x's own rounding. Written in
t = x − c, with every part of the formula that is linear in x over exact rationals folded (x − 0.3 becomes
t exactly, 1 − x at c = 1 becomes −t), the panels resolve t down to any size. The substitution is exact:
∫_{c+p}^{c+q} f(x) dx = ∫_p^q f(c + t) dt.
"""

from __future__ import annotations

from fractions import Fraction

from ..formula import Binary, Call, Formula, Negate, Node, Number, Variable

Linear = tuple[Fraction, Fraction]  # a·t + b


def shifted(formula: Formula, c: Fraction) -> Formula:
    """f(c + t) in the same variable name.

    >>> from quadcert.formula import parse
    >>> shifted(parse("1/sqrt(abs(x - 0.3))"), Fraction(3, 10)).text
    '1/sqrt(abs(x))'
    >>> shifted(parse("sqrt(1 - x)*x"), Fraction(1)).text
    'sqrt(-x)*(x + 1)'
    """
    variable = Variable(formula.variable)
    return Formula(_rewrite(formula.root, c, variable), formula.variable, formula.parameters)


def _linear(node: Node, c: Fraction) -> Linear | None:
    """node as a·t + b over exact rationals (with x = c + t), or None."""
    if isinstance(node, Number):
        return Fraction(0), node.value
    if isinstance(node, Variable):
        return Fraction(1), c
    if isinstance(node, Negate):
        inner = _linear(node.operand, c)
        return None if inner is None else (-inner[0], -inner[1])
    if isinstance(node, Binary) and node.op in "+-*/":
        left, right = _linear(node.left, c), _linear(node.right, c)
        if left is None or right is None:
            return None
        if node.op == "+":
            return left[0] + right[0], left[1] + right[1]
        if node.op == "-":
            return left[0] - right[0], left[1] - right[1]
        if node.op == "*":
            if left[0] and right[0]:
                return None
            return left[0] * right[1] + right[0] * left[1], left[1] * right[1]
        if right[0] or right[1] == 0:
            return None
        return left[0] / right[1], left[1] / right[1]
    return None


def _number(value: Fraction) -> Node:
    return Negate(Number(-value)) if value < 0 else Number(value)


def _emit(linear: Linear, variable: Variable) -> Node:
    a, b = linear
    if a == 0:
        return _number(b)
    term: Node = variable if a == 1 else Negate(variable) if a == -1 else Binary("*", _number(a), variable)
    if b == 0:
        return term
    return Binary("+", term, Number(b)) if b > 0 else Binary("-", term, Number(-b))


def _rewrite(node: Node, c: Fraction, variable: Variable) -> Node:
    linear = _linear(node, c)
    if linear is not None:
        return _emit(linear, variable)
    if isinstance(node, Negate):
        return Negate(_rewrite(node.operand, c, variable))
    if isinstance(node, Binary):
        return Binary(node.op, _rewrite(node.left, c, variable), _rewrite(node.right, c, variable))
    if isinstance(node, Call):
        return Call(node.function, tuple(_rewrite(a, c, variable) for a in node.args))
    return node
