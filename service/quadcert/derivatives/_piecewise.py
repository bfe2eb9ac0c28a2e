"""Piecewise definitions over intervals: each condition is decided on the whole interval, or left open.

On an interval X every condition is true throughout, false throughout, or undecided. Where the first case
that is not false throughout is true throughout, f is that case's branch on all of X, with its whole Taylor
series. Otherwise X may hold a jump: f is enclosed by the hull of the branches that may apply, their value
alone (a range bound), so the quadrature shrinks the panel around the jump; it never guesses.

A branch is evaluated only where its case may apply. For conditions comparing the variable itself with a
constant (x < 1, 0 <= x < 2), that is the part of X they allow, less what earlier undecided comparisons of
the same kind claim; for any other condition it is all of X, and a branch undefined there makes the panel
split further (the fault is an uncertain one).
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from ..arithmetic import fraction_down, fraction_up, interval_text
from ..errors import ArithmeticFault, DomainViolation
from ..formula import Call, Node, Variable
from ._series import E, Series

if TYPE_CHECKING:
    from ..arithmetic import Arithmetic
    from ._program import Compiled, Program

Grow = Callable[[Series[Any]], Series[Any]]
#: a condition's verdict on an interval: True or False throughout, None for undecided
Verdict = bool | None
#: the part of the interval a condition allows, as exact (low, high), or None when it cannot tell
Region = tuple[Fraction, Fraction] | None


class _Condition:
    """A compiled condition: its verdict on an interval, and the region of the interval it allows."""

    def __init__(self, program: Program[Any], node: Node) -> None:
        assert isinstance(node, Call)
        self.kind = node.function
        self.parts = [_Condition(program, a) for a in node.args] if self.kind in ("and", "or") else []
        if not self.parts:
            self.constants = [program._compile(a) for a in node.args]
            self.sides = [program._lift(compiled) for compiled in self.constants]
            self.on_variable = [isinstance(a, Variable) for a in node.args]

    def verdict(self, ar: Arithmetic[Any], x: Any) -> Verdict:
        if self.kind == "and":
            verdicts = [part.verdict(ar, x) for part in self.parts]
            return False if False in verdicts else (True if all(verdicts) else None)
        if self.kind == "or":
            verdicts = [part.verdict(ar, x) for part in self.parts]
            return True if True in verdicts else (False if all(v is False for v in verdicts) else None)
        left, right = (side([x])[0] for side in self.sides)
        low, high = ar.bounds_exact(ar.sub(left, right))
        strict = self.kind == "<"
        if high < 0 or (not strict and high <= 0):
            return True
        if low > 0 or (strict and low >= 0):
            return False
        return None

    def region(self, ar: Arithmetic[Any], low: Fraction, high: Fraction, negated: bool = False) -> Region:
        """Closed bounds on the points of [low, high] where the condition (or its negation) may hold."""
        if self.kind == "and" and not negated:
            for part in self.parts:
                narrowed = part.region(ar, low, high)
                if narrowed is None:
                    continue
                low, high = narrowed
            return low, high
        if self.kind in ("and", "or"):
            return (low, high) if self.kind == "or" and not negated else None
        for index in (0, 1):
            kind, payload = self.constants[1 - index]
            if self.on_variable[index] and kind == "const":
                c_low, c_high = ar.bounds_exact(payload)
                variable_below = (index == 0) != negated  # x < c, or the negation of c < x
                return (low, min(high, c_high)) if variable_below else (max(low, c_low), high)
        return None


def compile_cases(program: Program[E], node: Call) -> Compiled:
    """A piecewise definition as a series function (see the module docstring)."""
    ar = program.ar
    args = node.args
    cases: list[tuple[Grow, _Condition | None]] = []
    for i in range(0, len(args), 2):
        grow = program._lift(program._compile(args[i]))
        condition = _Condition(program, args[i + 1]) if i + 1 < len(args) else None
        cases.append((grow, condition))

    def evaluate(xs: Series[E]) -> Series[E]:
        x = xs[0]
        low, high = ar.bounds_exact(x)
        value: E | None = None
        open_conditions: list[_Condition] = []
        for grow, condition in cases:
            verdict = True if condition is None else condition.verdict(ar, x)
            if verdict is False:
                continue
            if verdict is True and value is None:
                return grow(xs)  # every earlier case is false throughout: this branch is f on all of X
            piece = _branch_value(ar, grow, condition, open_conditions, low, high)
            if piece is not None:
                value = piece if value is None else ar.hull(value, piece)
            if verdict is True:
                break
            assert condition is not None
            open_conditions.append(condition)
        else:
            if value is None:
                raise DomainViolation(f"no case of the piecewise definition holds on {_text(low, high)}", certain=True)
            raise DomainViolation(
                f"no case of the piecewise definition may hold somewhere in {_text(low, high)}", certain=False
            )
        assert value is not None
        return [value]

    if not _has_variable(node):  # a constant definition (in a limit, say): decided once, here
        return ("const", evaluate([ar.zero])[0])
    return ("series", evaluate)


def _has_variable(node: Node) -> bool:
    stack = [node]
    while stack:
        item = stack.pop()
        if isinstance(item, Variable):
            return True
        stack.extend(getattr(item, "args", ()))
        stack.extend(child for child in (getattr(item, "operand", None),) if child is not None)
        stack.extend(getattr(item, name) for name in ("left", "right") if hasattr(item, name))
    return False


def _branch_value(
    ar: Arithmetic[E],
    grow: Grow,
    condition: _Condition | None,
    earlier: list[_Condition],
    low: Fraction,
    high: Fraction,
) -> E | None:
    """The branch's range over the part of [low, high] where its case may apply; None where that part is
    empty."""
    for other in earlier:  # where an earlier case holds, this one does not apply
        narrowed = other.region(ar, low, high, negated=True)
        if narrowed is not None:
            low, high = narrowed
    if condition is not None:
        narrowed = condition.region(ar, low, high)
        if narrowed is not None:
            low, high = narrowed
    if low > high:
        return None
    try:
        value: E = grow([ar.from_bounds(low, high)])[0]
    except ArithmeticFault as fault:
        fault.certain = False  # the branch may be undefined only where its case does not apply
        raise
    return value


def _text(low: Fraction, high: Fraction) -> str:
    return interval_text(fraction_down(low), fraction_up(high))
