"""Turns formula text into tokens, each with its 1-based column."""

from __future__ import annotations

import re
import unicodedata
from dataclasses import dataclass
from enum import Enum

from ..errors import FormulaError
from . import _limits


class Kind(Enum):
    NUMBER = "number"
    NAME = "name"
    OPERATOR = "operator"
    LPAREN = "("
    RPAREN = ")"
    COMMA = ","
    LBRACE = "{"
    RBRACE = "}"
    SEMICOLON = ";"
    COMPARISON = "comparison"
    END = "end of formula"


@dataclass(frozen=True, slots=True)
class Token:
    kind: Kind
    text: str
    column: int


_NUMBER = re.compile(r"(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
_SINGLE = {
    "+": Kind.OPERATOR,
    "-": Kind.OPERATOR,
    "*": Kind.OPERATOR,
    "/": Kind.OPERATOR,
    "^": Kind.OPERATOR,
    "(": Kind.LPAREN,
    ")": Kind.RPAREN,
    ",": Kind.COMMA,
    "{": Kind.LBRACE,
    "}": Kind.RBRACE,
    ";": Kind.SEMICOLON,
    "<": Kind.COMPARISON,
    ">": Kind.COMPARISON,
}
_LOOKALIKES = {
    "×": "*",
    "·": "*",
    "−": "-",
    "–": "-",
    "÷": "/",
    "π": "pi",
    "|": "abs(...)",
    "²": "^2",
    "³": "^3",
    "√": "sqrt(...)",
    "≤": "<=",
    "≥": ">=",
}


def _describe_character(char: str) -> str:
    name = unicodedata.name(char, "unnamed character")
    text = f"unexpected character {char!r} (U+{ord(char):04X} {name})"
    if char in _LOOKALIKES:
        text += f"; write {_LOOKALIKES[char]!r} instead"
    elif not char.isascii():
        text += "; formulas use ASCII letters, digits, spaces and + - * / ^ ( ) , { } ; < >"
    return text


def tokenize(text: str) -> list[Token]:
    """Split ``text`` into tokens, ending with an END token.

    >>> [t.text for t in tokenize("2*x^2")]
    ['2', '*', 'x', '^', '2', '']
    """
    if len(text) > _limits.MAX_LENGTH:
        raise FormulaError(
            f"formula is {len(text)} characters long; the limit is {_limits.MAX_LENGTH}",
            code="formula_too_long",
            column=_limits.MAX_LENGTH + 1,
        )
    tokens: list[Token] = []
    position = 0
    while position < len(text):
        char = text[position]
        column = position + 1
        if char in " \t":
            position += 1
            continue
        if char.isascii() and (char.isdigit() or char == "."):
            match = _NUMBER.match(text, position)
            if match is None:
                raise FormulaError(
                    "a '.' must be part of a number such as 0.5; attribute access is not part of the formula language",
                    code="unexpected_character",
                    column=column,
                )
            tokens.append(Token(Kind.NUMBER, match.group(), column))
            position = match.end()
            continue
        if char.isascii() and (char.isalpha() or char == "_"):
            match = _NAME.match(text, position)
            assert match is not None
            tokens.append(Token(Kind.NAME, match.group(), column))
            position = match.end()
            continue
        if char == "*" and text.startswith("**", position):
            raise FormulaError(
                "'**' is not an operator here; write powers with '^', as in x^2",
                code="unsupported_operator",
                column=column,
            )
        if char in "<>" and text.startswith("=", position + 1):
            tokens.append(Token(Kind.COMPARISON, char + "=", column))
            position += 2
            continue
        if char in "=!":
            raise FormulaError(
                "a condition compares with <, <=, > or >=; equality of real numbers is not tested",
                code="unsupported_operator",
                column=column,
            )
        if char in _SINGLE:
            tokens.append(Token(_SINGLE[char], char, column))
            position += 1
            continue
        raise FormulaError(_describe_character(char), code="unexpected_character", column=column)
    tokens.append(Token(Kind.END, "", len(text) + 1))
    return tokens
