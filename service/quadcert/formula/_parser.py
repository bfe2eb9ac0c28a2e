"""Recursive-descent parser for textbook formulas.

Grammar (``^`` binds tightest and is right-associative; ``-x^2`` is ``-(x^2)``)::

    expression := term (("+" | "-") term)*
    term       := unary (("*" | "/") unary)*
    unary      := ("+" | "-") unary | power
    power      := primary ("^" unary)?
    primary    := NUMBER | NAME | NAME "(" expression ("," expression)* ")" | "(" expression ")" | cases
    cases      := "{" case (";" case)* "}"          the first case whose condition holds gives the value
    case       := expression "if" condition | expression "otherwise"      (otherwise: the last case only)
    condition  := conjunction ("or" conjunction)*
    conjunction:= comparison ("and" comparison)*
    comparison := expression (("<" | "<=" | ">" | ">=") expression)+    (chains: 0 < x <= 1)

A piecewise definition is a ``Call`` of ``cases`` whose arguments alternate value and condition (an odd count
ends with the ``otherwise`` value); conditions are calls of ``<``, ``<=``, ``and`` and ``or``, names no one
can write as functions. ``a > b`` is kept as ``b < a``, and a chain as the ``and`` of its links.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from functools import cached_property, lru_cache
from typing import Any

from ..errors import FormulaError
from . import _limits
from ._catalogue import ALIASES, CATALOGUE
from ._nodes import Binary, Call, Constant, Negate, Node, Number, Parameter, Variable, canonical_text
from ._tokenizer import Kind, Token, tokenize

#: function name -> (minimum, maximum) number of arguments
FUNCTIONS: dict[str, tuple[int, int]] = {f.name: f.arguments for f in CATALOGUE}
CONSTANTS = ("pi", "e")
KEYWORDS = ("if", "otherwise", "and", "or", "not")
RESERVED = frozenset(FUNCTIONS) | frozenset(ALIASES) | frozenset(CONSTANTS) | frozenset(KEYWORDS)


@dataclass(frozen=True)
class Formula:
    """A parsed formula in one variable, with named parameters still symbolic."""

    root: Node
    variable: str
    parameters: tuple[str, ...] = ()
    node_count: int = field(default=0, compare=False)

    def __hash__(self) -> int:
        """Computed once: a formula is a key of the engine's caches, and hashing walks the whole tree."""
        cached = self.__dict__.get("_hash")
        if cached is None:
            cached = hash((self.root, self.variable, self.parameters))
            object.__setattr__(self, "_hash", cached)
        return cached

    def __getstate__(self) -> dict[str, Any]:
        """Pickle without the cached hash: string hashes differ between processes."""
        return {k: v for k, v in self.__dict__.items() if k != "_hash"}

    @cached_property
    def text(self) -> str:
        """Canonical text, stable across spellings (for caching and echoing)."""
        return canonical_text(self.root)


#: functions people reach for that the language does not have, with how to write them today; a spelling
#: suggestion there would name a different function (sign is not sin, cot is not cos)
REWRITES = {
    "sgn": "write sign(x)",
    "heaviside": "write step(x)",
    "pow": "write a^b",
    "sqr": "write x^2",
    "exp10": "write 10^x",
    "ln10": "write log(10)",
    "tgamma": "write gamma(x)",
    "besselj0": "write j0(x)",
    "besselj1": "write j1(x)",
}


def _suggest(name: str, candidates: list[str]) -> str:
    """A close spelling of the same intent: one letter more, less, changed or swapped, and only when the
    name is not a function of another kind (see REWRITES)."""
    if name in REWRITES:
        return f"; the language has no {name}(): {REWRITES[name]}"
    close = [candidate for candidate in candidates if _one_edit(name.lower(), candidate)]
    if not close:
        return ""
    # a doubled or dropped last letter (sinn, exx) is likelier than a changed one (sinn is not sign)
    best = min(close, key=lambda c: not (name.lower().startswith(c) or c.startswith(name.lower())))
    return f"; did you mean {best!r}?"


def _one_edit(a: str, b: str) -> bool:
    if a == b:
        return True
    if abs(len(a) - len(b)) > 1 or min(len(a), len(b)) < 2:
        return False
    if len(a) == len(b):
        diffs = [i for i in range(len(a)) if a[i] != b[i]]
        return len(diffs) == 1 or (
            len(diffs) == 2 and diffs[1] == diffs[0] + 1 and a[diffs[0]] == b[diffs[1]] and a[diffs[1]] == b[diffs[0]]
        )
    short, long = (a, b) if len(a) < len(b) else (b, a)
    return any(long[:i] + long[i + 1 :] == short for i in range(len(long)))


#: the variable name of a formula that may not have one (a limit): no identifier can be written this way
CONSTANT_ONLY = "_"


class _Parser:
    def __init__(self, text: str, variable: str, parameters: tuple[str, ...]) -> None:
        self.tokens: list[Token] = tokenize(text)
        self.index = 0
        self.depth = 0
        self.nodes = 0
        self.heights: dict[int, int] = {}
        self.keep: list[Node] = []
        self.variable = variable
        self.parameters = parameters

    # -- helpers -----------------------------------------------------------------------------
    @property
    def current(self) -> Token:
        return self.tokens[self.index]

    def advance(self) -> Token:
        token = self.tokens[self.index]
        self.index += 1
        return token

    def count(self, node: Node, column: int) -> Node:
        self.nodes += 1
        if self.nodes > _limits.MAX_NODES:
            raise FormulaError(
                f"formula has more than {_limits.MAX_NODES} parts", code="formula_too_large", column=column
            )
        children = (
            (node.operand,)
            if isinstance(node, Negate)
            else (node.left, node.right)
            if isinstance(node, Binary)
            else node.args
            if isinstance(node, Call)
            else ()
        )
        height = 1 + max((self.heights.get(id(child), 1) for child in children), default=0)
        if height > _limits.MAX_HEIGHT:
            raise FormulaError(
                f"formula is more than {_limits.MAX_HEIGHT} operations deep; split long sums "
                "or products into parenthesised groups",
                code="nesting_too_deep",
                column=column,
            )
        self.heights[id(node)] = height
        self.keep.append(node)  # heights are keyed by id: keep every node alive while parsing
        return node

    def enter(self, column: int) -> None:
        self.depth += 1
        if self.depth > _limits.MAX_DEPTH:
            raise FormulaError(
                f"formula nests deeper than {_limits.MAX_DEPTH} levels", code="nesting_too_deep", column=column
            )

    def peek(self, ahead: int) -> Token:
        return self.tokens[min(self.index + ahead, len(self.tokens) - 1)]

    def unexpected(self, expected: str) -> FormulaError:
        token = self.current
        if token.kind is Kind.END:
            return FormulaError(f"formula ends early; expected {expected}", code="unexpected_end", column=token.column)
        if token.kind is Kind.RPAREN:
            return FormulaError(
                f"unexpected ')'; expected {expected}", code="unbalanced_parenthesis", column=token.column
            )
        return FormulaError(
            f"unexpected {token.text!r}; expected {expected}", code="unexpected_token", column=token.column
        )

    # -- grammar -----------------------------------------------------------------------------
    def parse(self) -> Node:
        if self.current.kind is Kind.END:
            raise FormulaError("formula is empty", code="empty_formula", column=1)
        node = self.expression()
        token = self.current
        if token.kind is Kind.END:
            return node
        if token.kind is Kind.COMPARISON or (token.kind is Kind.NAME and token.text in KEYWORDS):
            raise FormulaError(
                f"{token.text!r} belongs to a condition, which lives in a piecewise definition: "
                "{ x^2 if x < 1; 2*x - 1 otherwise }",
                code="misplaced_condition",
                column=token.column,
            )
        if token.kind in (Kind.NUMBER, Kind.NAME, Kind.LPAREN):
            previous = self.tokens[self.index - 1].text
            if token.kind is Kind.NUMBER and token.text.startswith(".") and "." in previous:
                raise FormulaError(
                    f"a number has one decimal point: {previous}{token.text} is not a number",
                    code="unexpected_token",
                    column=token.column,
                )
            raise FormulaError(
                f"missing operator between {previous!r} and {token.text!r}; implicit "
                f"multiplication is not read, write {previous}*{token.text}",
                code="implicit_multiplication",
                column=token.column,
            )
        if token.kind is Kind.RPAREN:
            raise FormulaError("')' has no matching '('", code="unbalanced_parenthesis", column=token.column)
        raise self.unexpected("an operator")

    def expression(self) -> Node:
        node = self.term()
        while self.current.kind is Kind.OPERATOR and self.current.text in "+-":
            token = self.advance()
            node = self.count(Binary(token.text, node, self.term()), token.column)
        return node

    def term(self) -> Node:
        node = self.unary()
        while self.current.kind is Kind.OPERATOR and self.current.text in "*/":
            token = self.advance()
            node = self.count(Binary(token.text, node, self.unary()), token.column)
        return node

    def unary(self) -> Node:
        token = self.current
        if token.kind is Kind.OPERATOR and token.text in "+-":
            self.advance()
            self.enter(token.column)
            operand = self.unary()
            self.depth -= 1
            if token.text == "+":
                return operand
            return self.count(Negate(operand), token.column)
        return self.power()

    def power(self) -> Node:
        if self.current.kind is Kind.NAME and self.peek(1).text == "^" and self.current.text in FUNCTIONS:
            name = self.current
            raise FormulaError(
                f"write a power of {name.text} after its argument: {name.text}(x)^2, not {name.text}^2(x)",
                code="unexpected_token",
                column=name.column,
            )
        base = self.primary()
        if self.current.kind is Kind.OPERATOR and self.current.text == "^":
            token = self.advance()
            self.enter(token.column)
            exponent_column = self.current.column
            exponent = self.unary()
            self.depth -= 1
            literal = exponent.operand if isinstance(exponent, Negate) else exponent
            if isinstance(literal, Number) and abs(literal.value) > _limits.MAX_CONSTANT_POWER:
                raise FormulaError(
                    f"exponent {literal.text} is larger than {_limits.MAX_CONSTANT_POWER}",
                    code="power_too_large",
                    column=exponent_column,
                )
            return self.count(Binary("^", base, exponent), token.column)
        return base

    def primary(self) -> Node:
        token = self.current
        if token.kind is Kind.NUMBER:
            self.advance()
            return self.count(Number(_read_number(token)), token.column)
        if token.kind is Kind.LPAREN:
            self.advance()
            self.enter(token.column)
            node = self.expression()
            self.depth -= 1
            if self.current.kind is not Kind.RPAREN:
                if self.current.kind is Kind.END:
                    raise FormulaError("'(' is never closed", code="unbalanced_parenthesis", column=token.column)
                raise self.unexpected("')'")
            self.advance()
            return node
        if token.kind is Kind.NAME:
            self.advance()
            if self.current.kind is Kind.LPAREN:
                return self.call(token)
            return self.count(self.name(token), token.column)
        if token.kind is Kind.LBRACE:
            return self.cases()
        raise self.unexpected("a number, a name, '(' or '{'")

    # -- piecewise definitions ------------------------------------------------------------------
    def cases(self) -> Node:
        opening = self.advance()
        self.enter(opening.column)
        args: list[Node] = []
        while True:
            value = self.expression()
            keyword = self.current
            if keyword.kind is Kind.NAME and keyword.text == "otherwise":
                self.advance()
                args.append(value)
                if self.current.kind is not Kind.RBRACE:
                    raise FormulaError(
                        "'otherwise' is the last case; close the definition with '}'",
                        code="misplaced_condition",
                        column=self.current.column,
                    )
                if not args[:-1]:
                    raise FormulaError(
                        "a piecewise definition needs a case with 'if' before 'otherwise'",
                        code="misplaced_condition",
                        column=keyword.column,
                    )
                break
            if not (keyword.kind is Kind.NAME and keyword.text == "if"):
                raise self.unexpected("'if' and a condition, or 'otherwise', after the value of a case")
            self.advance()
            args += [value, self.condition()]
            if self.current.kind is Kind.SEMICOLON:
                self.advance()
                if self.peek(0).kind is Kind.RBRACE:  # a trailing ';' is fine
                    break
                continue
            if self.current.kind is Kind.RBRACE:
                break
            if self.current.kind is Kind.END:
                raise FormulaError("'{' is never closed", code="unbalanced_parenthesis", column=opening.column)
            raise self.unexpected("';' and the next case, or '}'")
        self.advance()
        self.depth -= 1
        return self.count(Call("cases", tuple(args)), opening.column)

    def condition(self) -> Node:
        node = self.conjunction()
        parts = [node]
        while self.current.kind is Kind.NAME and self.current.text == "or":
            self.advance()
            parts.append(self.conjunction())
        return node if len(parts) == 1 else self.count(Call("or", tuple(parts)), self.current.column)

    def conjunction(self) -> Node:
        parts = [self.negation()]
        while self.current.kind is Kind.NAME and self.current.text == "and":
            self.advance()
            parts.append(self.negation())
        return parts[0] if len(parts) == 1 else self.count(Call("and", tuple(parts)), self.current.column)

    def negation(self) -> Node:
        token = self.current
        if token.kind is Kind.NAME and token.text == "not":
            raise FormulaError(
                "conditions have no 'not': write the opposite comparison, x >= 1 for 'not x < 1'",
                code="misplaced_condition",
                column=token.column,
            )
        left = self.expression()
        if self.current.kind is not Kind.COMPARISON:
            raise self.unexpected("a comparison: <, <=, > or >=")
        comparisons: list[Node] = []
        while self.current.kind is Kind.COMPARISON:
            operator = self.advance()
            right = self.expression()
            a, b = (left, right) if operator.text.startswith("<") else (right, left)  # only < and <= are kept
            comparisons.append(self.count(Call(operator.text.replace(">", "<"), (a, b)), operator.column))
            left = right
        if len(comparisons) == 1:
            return comparisons[0]
        return self.count(Call("and", tuple(comparisons)), token.column)

    def call(self, name: Token) -> Node:
        function = ALIASES.get(name.text, name.text)
        if function not in FUNCTIONS:
            hint = _suggest(name.text, sorted(FUNCTIONS))
            if name.text in (self.variable, *self.parameters, *CONSTANTS):
                hint = f"; write {name.text}*(...) to multiply"
            raise FormulaError(f"unknown function {name.text!r}{hint}", code="unknown_function", column=name.column)
        opening = self.advance()
        self.enter(opening.column)
        args = [self.expression()]
        while self.current.kind is Kind.COMMA:
            self.advance()
            args.append(self.expression())
        self.depth -= 1
        if self.current.kind is not Kind.RPAREN:
            if self.current.kind is Kind.END:
                raise FormulaError("'(' is never closed", code="unbalanced_parenthesis", column=opening.column)
            raise self.unexpected("',' or ')'")
        self.advance()
        low, high = FUNCTIONS[function]
        if not low <= len(args) <= high:
            wanted = str(low) if low == high else f"{low} to {high}"
            raise FormulaError(
                f"{function} takes {wanted} argument{'s' if high > 1 else ''}, got {len(args)}",
                code="wrong_argument_count",
                column=name.column,
            )
        return self.count(Call(function, tuple(args)), name.column)

    def name(self, token: Token) -> Node:
        text = token.text
        if text == self.variable:
            return Variable(text)
        if text in self.parameters:
            return Parameter(text)
        if text in CONSTANTS:
            return Constant(text)
        if text in KEYWORDS:
            raise FormulaError(
                f"{text!r} belongs to a piecewise definition: {{ x^2 if x < 1; 2*x - 1 otherwise }}",
                code="misplaced_condition",
                column=token.column,
            )
        if text in FUNCTIONS or text in ALIASES:
            raise FormulaError(
                f"{text!r} is a function; write {text}(...)", code="missing_arguments", column=token.column
            )
        if text.lower() in CONSTANTS and text not in (self.variable, *self.parameters):
            raise FormulaError(
                f"unknown name {text!r}; the constants are written in lower case: {text.lower()}",
                code="unknown_name",
                column=token.column,
            )
        constant_only = self.variable == CONSTANT_ONLY  # a limit: no variable at all
        names = [*self.parameters, *CONSTANTS] if constant_only else [self.variable, *self.parameters, *CONSTANTS]
        hint = _suggest(text, names)
        if not hint and len(text) > 1 and all(c == self.variable or c in CONSTANTS for c in text):
            hint = f"; implicit multiplication is not read, write {'*'.join(text)}"
        where = (
            "; a limit is a constant: numbers, pi, e, inf and the parameters"
            if constant_only
            else f"; the variable is {self.variable!r}"
        )
        raise FormulaError(f"unknown name {text!r}{hint}{where}", code="unknown_name", column=token.column)


def _read_number(token: Token) -> Fraction:
    mantissa, _, exponent = token.text.lower().partition("e")
    digits = mantissa.replace(".", "").lstrip("0")
    if len(digits) > _limits.MAX_LITERAL_DIGITS:
        raise FormulaError(
            f"number has {len(digits)} significant digits; the limit is {_limits.MAX_LITERAL_DIGITS}",
            code="literal_too_long",
            column=token.column,
        )
    if exponent and (len(exponent) > 8 or abs(int(exponent)) > _limits.MAX_LITERAL_EXPONENT):
        raise FormulaError(
            f"exponent of {token.text[:20]!r} is beyond ±{_limits.MAX_LITERAL_EXPONENT}",
            code="literal_out_of_range",
            column=token.column,
        )
    return Fraction(token.text)


def _check_identifier(name: str, role: str) -> None:
    if not name.isascii() or not name.isidentifier():
        raise FormulaError(f"{role} name {name!r} must be ASCII letters, digits and '_'", code="invalid_name")
    if name in RESERVED:
        raise FormulaError(f"{role} name {name!r} is reserved for a function or constant", code="reserved_name")


def parse(text: str, variable: str = "x", parameters: tuple[str, ...] | list[str] = ()) -> Formula:
    """Read ``text`` into a :class:`Formula`; raises :class:`FormulaError` with a column.

    >>> parse("-x^2 + 2*x").text
    '-x^2 + 2*x'
    >>> parse("sinn(x)")
    Traceback (most recent call last):
    ...
    quadcert.errors.FormulaError: unknown function 'sinn'; did you mean 'sin'? (at column 1)
    """
    if not isinstance(text, str):
        raise FormulaError("formula must be text", code="invalid_formula")
    return _parse_cached(text, variable, tuple(parameters))


@lru_cache(maxsize=256)  # formulas are immutable: spreadsheets and CI jobs send the same ones over and over
def _parse_cached(text: str, variable: str, parameters: tuple[str, ...]) -> Formula:
    return _parse(text, variable, parameters)


def _parse(text: str, variable: str, parameters: tuple[str, ...]) -> Formula:
    _check_identifier(variable, "variable")
    for name in parameters:
        _check_identifier(name, "parameter")
        if name == variable:
            raise FormulaError(f"parameter {name!r} has the variable's name", code="reserved_name")
    parser = _Parser(text, variable, parameters)
    root = parser.parse()
    return Formula(root=root, variable=variable, parameters=parameters, node_count=parser.nodes)
