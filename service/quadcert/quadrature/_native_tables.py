"""The tables the compiled engine and Python share: opcodes, stack effects, statuses, limits, Peano constants.

They are written twice, in ``_native.c`` and here, because each side needs them as constants of its own
language. They are not trusted to stay equal: the extension reports the values it was built with
(``_native.tables()``), and :func:`disagreement` compares them with these at import. On any difference the
compiled engine is not used, and the arbitrary-precision engine answers every request.
"""

from __future__ import annotations

from enum import IntEnum
from fractions import Fraction
from math import factorial
from typing import Any

from ._peano import ABSOLUTE, SIGNED_4
from ._simpson import MAX_DEPTH

#: the most Taylor terms a compiled series holds, f to f^(10) (Simpson uses the first five)
ORDER = 20
#: |n| of an integer power x^n that compiles to repeated multiplication
MAX_POWER = 1024
#: stack slots a compiled program may ask for
MAX_STACK = 1024


class Op(IntEnum):
    """The instructions of a compiled formula (a stack machine: each pushes, pops or replaces values)."""

    X = 0
    CONST = 1
    NEG = 2
    ADD = 3
    SUB = 4
    MUL = 5
    DIV = 6
    SQR = 7
    POWI = 8
    POWR = 9
    MIN = 10
    MAX = 11
    SQRT = 20
    EXP = 21
    LOG = 22
    LOG10 = 23
    SIN = 24
    COS = 25
    TAN = 26
    ASIN = 27
    ACOS = 28
    ATAN = 29
    SINH = 30
    COSH = 31
    TANH = 32
    ERF = 33
    ABS = 34


#: the names the extension reports for the operators (functions go by their own names)
OPERATOR_NAMES = {
    Op.X: "x",
    Op.CONST: "const",
    Op.NEG: "neg",
    Op.ADD: "+",
    Op.SUB: "-",
    Op.MUL: "*",
    Op.DIV: "/",
    Op.SQR: "sqr",
    Op.POWI: "powi",
    Op.POWR: "^",
    Op.MIN: "min",
    Op.MAX: "max",
}
BINARY = {"+": Op.ADD, "-": Op.SUB, "*": Op.MUL, "/": Op.DIV, "^": Op.POWR}
FUNCTION_CODES = {op.name.lower(): op for op in Op if op >= Op.SQRT}
#: values pushed minus values popped; a function replaces its argument (0)
EFFECT = (
    {op: 0 for op in Op}
    | {Op.X: 1, Op.CONST: 1, Op.MIN: -1, Op.MAX: -1, Op.POWR: -1}
    | {op: -1 for op in BINARY.values()}
)


class Status(IntEnum):
    """How a compiled run ended: a certified answer (>= 0), or why it handed the request over (< 0)."""

    MET = 0
    NODE_BUDGET = 1
    DEADLINE = 2
    DECLINE_VALUE = -1
    DECLINE_DEPTH = -2
    DECLINE_RESOLUTION = -3
    DECLINE_UNRESOLVED = -4
    DECLINE_MEMORY = -5
    DECLINE_ROUNDING_MODE = -6
    DECLINE_FLOAT_RANGE = -7
    DECLINE_STALLED = -8

    @property
    def label(self) -> str:
        """The name the extension reports: met, node_budget, ..., and value, depth, ... for the declines."""
        return self.name.lower().removeprefix("decline_")


def _peano_rows() -> list[Fraction]:
    """C_k·k! as the extension holds it: the signed fourth-order constant, then the absolute k = 1..3."""
    return [SIGNED_4 * factorial(4)] + [ABSOLUTE[k] * factorial(k) for k in (1, 2, 3)]


def expected() -> dict[str, Any]:
    """The tables as this side holds them, in the shape ``_native.tables()`` reports."""
    return {
        "opcodes": {OPERATOR_NAMES.get(op, op.name.lower()): int(op) for op in Op},
        "effects": {int(op): EFFECT[op] for op in Op if op <= Op.MAX},
        "peano": _peano_rows(),
        "status": {s.label: int(s) for s in Status},
        "order": ORDER,
        "max_depth": MAX_DEPTH,
        "max_power": MAX_POWER,
        "max_stack": MAX_STACK,
    }


def disagreement(reported: dict[str, Any]) -> str | None:
    """None when the extension's tables equal these; else the first table that differs, for the log."""
    ours = expected()
    theirs = dict(reported)
    theirs["peano"] = [Fraction(n) / Fraction(d) for n, d in reported.get("peano", [])]
    for name, value in ours.items():
        if theirs.get(name) != value:
            return f"{name}: the extension has {theirs.get(name)!r}, Python has {value!r}"
    return None
