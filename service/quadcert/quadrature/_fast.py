"""The compiled float64 engine: formula → instructions, a run, and its outcome.

Most requests need far fewer than 53 bits, so the whole adaptive Simpson
refinement runs in C on outward-rounded float64 intervals (``_native.c``).
It only accelerates: whenever it cannot finish within float64 (a value it
cannot enclose, a tolerance below its resolution, a panel it cannot bound)
it declines, and the arbitrary-precision engine in ``_simpson`` takes the
request from the start.  Constant subtrees (0.1, pi/3, parameters) are
enclosed exactly by the reference backend and rounded outward to floats.
"""

from __future__ import annotations

import logging
import math
import time
from array import array
from collections import Counter
from collections.abc import Mapping
from dataclasses import dataclass
from fractions import Fraction
from functools import cache, cached_property, lru_cache
from typing import Any

from ..arithmetic import Arithmetic, ParameterValue, Within, fraction_down, fraction_up, reference
from ..derivatives import Program
from ..errors import ArithmeticFault
from ..formula import Binary, Call, Constant, Formula, Negate, Node, Number, Parameter, Variable
from ..formula._catalogue import spelled_out
from ..formula._nodes import distinct_arguments, parameters_used
from ..results import RULES, StopReason
from . import _gauss
from ._native_tables import BINARY, EFFECT, FUNCTION_CODES, MAX_POWER, Op, Status, disagreement
from ._peano import BOUND_NAMES
from ._result import PanelReport
from ._self_test import passes

log = logging.getLogger("quadcert.engine")

try:
    from . import _native
except ImportError:  # built without a C compiler: the arbitrary-precision engine does everything
    _native = None  # type: ignore[assignment]

#: None when the extension's tables equal Python's; else what differs (the extension is then not used)
TABLE_DISAGREEMENT = None if _native is None else disagreement(_native.tables())
if TABLE_DISAGREEMENT is not None:
    log.error("compiled engine disabled: its tables differ from Python's", extra={"detail": TABLE_DISAGREEMENT})
    _native = None  # type: ignore[assignment]

AVAILABLE = _native is not None

_FOLD_PRECISION = 128

#: why the compiled engine handed requests over, counted in this process (see :func:`declines`)
_DECLINES: Counter[str] = Counter()


def declines() -> dict[str, int]:
    """How often, and why, the compiled engine declined in this process since it started."""
    return dict(_DECLINES)


@dataclass(frozen=True)
class Compiled:
    code: bytes
    constants: tuple[tuple[float, float], ...]
    stack: int


@dataclass(frozen=True)
class FastOutcome:
    """A run that finished: its enclosure is rigorous whatever the stop reason."""

    enclosure: tuple[float, float]
    stop_reason: StopReason
    nodes: int
    panels: int
    bounds_used: dict[str, int]
    mesh: tuple[PanelReport, ...]


@dataclass(frozen=True)
class Declined:
    """Why the compiled engine declined; where float64's resolution stopped it, the mesh it had built, as the
    exact split points strictly inside the limits (ascending) and the depth of the panel each one starts, for
    the precise engine to go on from rather than start over."""

    reason: str
    cuts: tuple[tuple[Fraction, int], ...] = ()


class _Compiler:
    def __init__(self, formula: Formula, values: Mapping[str, ParameterValue]) -> None:
        self.formula = formula
        self.values = values
        self.code: list[int] = []
        self.constants: list[tuple[float, float]] = []
        self.depth = self.most = 0
        #: id(node) -> (node, does it involve the variable), computed once per node; the node is held so that a
        #: spelled-out tree built during compilation cannot hand its id to a later one
        self.dependent: dict[int, tuple[Node, bool]] = {}

    @cached_property
    def ar(self) -> Arithmetic[Any]:
        """The arithmetic that folds constants, made on first use: plain numbers never need it."""
        return reference(_FOLD_PRECISION)

    def emit(self, op: Op, arg: int = 0) -> None:
        self.code += [op, arg]
        self.depth += EFFECT[op]
        self.most = max(self.most, self.depth)

    def constant(self, node: Node) -> None:
        if isinstance(node, Number):
            low = high = node.value
        else:
            program = Program(Formula(node, self.formula.variable, self.formula.parameters), self.ar, self.values)
            low, high = self.ar.bounds_exact(program.value(self.ar.zero))
        self.constants.append((fraction_down(low), fraction_up(high)))
        self.emit(Op.CONST, len(self.constants) - 1)

    def depends(self, node: Node) -> bool:
        entry = self.dependent.get(id(node))
        known = entry[1] if entry is not None and entry[0] is node else None  # an id is only unique while alive
        if known is None:
            if isinstance(node, Variable):
                known = True
            elif isinstance(node, (Number, Constant, Parameter)):
                known = False
            elif isinstance(node, Negate):
                known = self.depends(node.operand)
            elif isinstance(node, Call):
                known = any(self.depends(a) for a in node.args)
            else:
                assert isinstance(node, Binary)
                known = self.depends(node.left) | self.depends(node.right)
            self.dependent[id(node)] = (node, known)  # holding the node keeps its id from being reused
        return known

    def node(self, node: Node) -> None:
        if not self.depends(node):
            self.constant(node)
        elif isinstance(node, Variable):
            self.emit(Op.X)
        elif isinstance(node, Negate):
            self.node(node.operand)
            self.emit(Op.NEG)
        elif isinstance(node, Call) and (written := spelled_out(node.function, node.args)) is not None:
            self.node(written)
        elif isinstance(node, Call) and node.function not in FUNCTION_CODES and node.function not in ("min", "max"):
            raise _NotCompiled(node.function)
        elif isinstance(node, Call):
            args = distinct_arguments(node) if node.function in ("min", "max") else node.args
            self.node(args[0])
            if node.function in ("min", "max"):
                for arg in args[1:]:
                    self.node(arg)
                    self.emit(Op.MAX if node.function == "max" else Op.MIN)
            else:
                self.emit(FUNCTION_CODES[node.function])
        else:
            assert isinstance(node, Binary)
            self.binary(node)

    def binary(self, node: Binary) -> None:
        if node.op == "^" and not self.depends(node.right):
            exponent = self.exact_integer(node.right)
            if exponent is not None and abs(exponent) <= MAX_POWER:
                self.node(node.left)
                if exponent == 2:
                    self.emit(Op.SQR)
                else:
                    self.emit(Op.POWI, exponent)
                return
        if node.op == "*" and node.left == node.right:
            self.node(node.left)
            self.emit(Op.SQR)
            return
        self.node(node.left)
        self.node(node.right)
        self.emit(BINARY[node.op])

    def exact_integer(self, node: Node) -> int | None:
        if isinstance(node, Number):
            return node.value.numerator if node.value.denominator == 1 else None
        if isinstance(node, Negate) and isinstance(node.operand, Number):
            inner = node.operand.value
            return -inner.numerator if inner.denominator == 1 else None
        program = Program(Formula(node, self.formula.variable, self.formula.parameters), self.ar, self.values)
        return self.ar.is_exact_integer(program.value(self.ar.zero))


class _NotCompiled(Exception):
    """A function the C engine does not evaluate: the formula goes to the precise engine, whole."""


def compile_formula(formula: Formula, values: Mapping[str, ParameterValue]) -> Compiled | None:
    """Instructions for the native engine, or None where a constant does not fit in float64, or where a
    parameter the formula uses is known only within bounds (the native stop rule reads the whole width)."""
    within = [name for name, value in values.items() if isinstance(value, Within)]
    if within and any(name in within for name in parameters_used(formula.root)):
        return None
    return _compile_cached(formula, tuple(sorted(values.items())))


@lru_cache(maxsize=256)  # a compiled formula is immutable, like the parsed one it comes from
def _compile_cached(formula: Formula, items: tuple[tuple[str, Fraction], ...]) -> Compiled | None:
    values = dict(items)
    compiler = _Compiler(formula, values)
    try:
        compiler.node(formula.root)
    except (ArithmeticFault, _NotCompiled):
        return None
    if any(
        not (math.isfinite(lo) and math.isfinite(hi) and abs(lo) < 1e300 and abs(hi) < 1e300)
        for lo, hi in compiler.constants
    ):
        return None
    return Compiled(array("i", compiler.code).tobytes(), tuple(compiler.constants), max(1, compiler.most))


@cache
def trusted() -> bool:
    """Whether this machine's C library passes the guarded layer's checks (once per process, and remembered
    per build and machine in the user's cache folder; see ``_self_test``)."""
    return _native is not None and passes(_native.__file__, _native.enclose)


def run(
    compiled: Compiled,
    a: tuple[Fraction, Fraction],
    b: tuple[Fraction, Fraction],
    tolerance: float,
    relative: float | None,
    max_nodes: int,
    deadline: float | None,
    want_mesh: bool,
    rule: str,
    points: int,
) -> FastOutcome | Declined:
    """Refine on [a, b] (exact enclosures of the limits, a < b); a FastOutcome, or why it declined."""
    if not trusted():
        return _declined("unavailable")
    seconds = 0.0
    if deadline is not None:
        seconds = deadline - time.monotonic()
        if seconds <= 0:
            return _declined("deadline")
    bounds = (fraction_down(a[0]), fraction_up(a[1]), fraction_down(b[0]), fraction_up(b[1]))
    if not all(math.isfinite(v) for v in bounds):
        return _declined("limits")
    status, low, high, nodes, panels, counts, mesh, _models, left_ends = _native.integrate(
        compiled.code,
        compiled.constants,
        compiled.stack,
        *bounds,
        tolerance,
        relative or 0.0,
        seconds,
        max_nodes,
        want_mesh,
        RULE_CODES[rule],
        _gauss_table(points) if rule != "simpson" else (),
    )
    ended = Status(status)
    if ended < 0:
        return _declined(ended.label, nodes, _cuts(left_ends, bounds[1], bounds[2]))
    names = {**BOUND_NAMES, GAUSS_BOUND: _gauss.name(points)}
    used = {names[order]: count for order, count in enumerate(counts) if count}
    reports: tuple[PanelReport, ...] = ()
    if mesh is not None:
        reports = tuple(PanelReport(p, q, (lo, hi), names[order]) for p, q, lo, hi, order in sorted(mesh))
    stop: StopReason = "tolerance_met" if ended is Status.MET else ended.label  # type: ignore[assignment]
    return FastOutcome((low, high), stop, nodes, panels, used, reports)


#: the rule codes of the extension; the bounds it reports are Simpson's orders 0..4, then the rule's (key 5)
RULE_CODES = {rule: code for code, rule in enumerate(RULES)}  # the extension's RULE_* enum, in this order
GAUSS_BOUND = 5


@cache
def _gauss_table(points: int) -> tuple[tuple[float, float], ...]:
    """The n-point nodes and weights on [−1, 1] and the constant cₙ·(2n)!, each enclosed in floats outward
    from its exact rational bounds (``_gauss.rule``), in the order the extension reads them."""
    table: list[tuple[float, float]] = []
    for (t_low, t_high), (w_low, w_high) in _gauss.rule(points, 80):
        table += [(fraction_down(t_low), fraction_up(t_high)), (fraction_down(w_low), fraction_up(w_high))]
    constant = _gauss.remainder_constant(points) * math.factorial(2 * points)
    return (*table, (fraction_down(constant), fraction_up(constant)))


def value_range(compiled: Compiled, a: float, b: float) -> tuple[float, float] | None:
    """An enclosure of f over [a, b] (floats), or None where the program cannot bound it."""
    if _native is None:
        return None
    coefficients = _native.taylor(compiled.code, compiled.constants, compiled.stack, a, b, 0)
    if not coefficients:
        return None
    low, high = coefficients[0]
    return (low, high) if math.isfinite(low) and math.isfinite(high) else None


def _declined(reason: str, nodes: int = 0, cuts: tuple[tuple[Fraction, int], ...] = ()) -> Declined:
    """Count and log why a request goes to the arbitrary-precision engine."""
    _DECLINES[reason] += 1
    log.debug("compiled engine declined", extra={"reason": reason, "nodes": nodes, "cuts": len(cuts)})
    return Declined(reason, cuts)


def _cuts(
    left_ends: list[tuple[float, float, int]] | None, a_high: float, b_low: float
) -> tuple[tuple[Fraction, int], ...]:
    """The split points of a mesh the engine hands over: its panels' left ends that are floats strictly inside
    [a_high, b_low] (a cut that is an interval, rare, merges its two panels), ascending, each with the depth of
    the panel it starts (depth only bounds further bisection; the panel from the lower limit starts at 0)."""
    if not left_ends:
        return ()
    cuts: dict[float, int] = {}
    for low, high, depth in left_ends:
        if low == high and a_high < low < b_low:
            cuts[low] = depth
    return tuple((Fraction(x), cuts[x]) for x in sorted(cuts))
