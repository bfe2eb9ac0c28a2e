"""Formula language: text in, a checked tree out. No Python evaluation anywhere."""

from ._catalogue import ALIASES
from ._nodes import (
    Binary,
    Call,
    Constant,
    Negate,
    Node,
    Number,
    Parameter,
    Variable,
    canonical_text,
    decimal_text,
    parameters_used,
)
from ._parser import CONSTANTS, FUNCTIONS, Formula, parse
from ._tokenizer import Kind, Token, tokenize

__all__ = [
    "ALIASES",
    "CONSTANTS",
    "FUNCTIONS",
    "Binary",
    "Call",
    "Constant",
    "Formula",
    "Kind",
    "Negate",
    "Node",
    "Number",
    "Parameter",
    "Token",
    "Variable",
    "canonical_text",
    "decimal_text",
    "parameters_used",
    "parse",
    "tokenize",
]
