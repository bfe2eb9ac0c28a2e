"""The formula language: grammar, canonical text, coded errors with columns, hard limits."""

from fractions import Fraction

import pytest

from quadcert.errors import FormulaError
from quadcert.formula import Binary, Negate, Number, parse


@pytest.mark.parametrize(
    "text, canonical",
    [
        ("-x^2", "-x^2"),
        ("2^3^2", "2^3^2"),
        ("(2^3)^2", "(2^3)^2"),
        ("(-x)^2", "(-x)^2"),
        ("a - (b - c)", "a - (b - c)"),
        ("x/2/3", "x/2/3"),
        ("x/(2/3)", "x/(2/3)"),
        ("2^-x", "2^-x"),
        ("2^(-x)", "2^-x"),
        ("x^-y^2", "x^-y^2"),
        ("  sin( x )*  cos(x)", "sin(x)*cos(x)"),
        ("1e-3*x", "0.001*x"),
        ("ln(x) + arctan(x)", "log(x) + atan(x)"),
        ("+x", "x"),
        ("min(x, 1, 2)", "min(x, 1, 2)"),
    ],
)
def test_canonical_text_round_trips(text: str, canonical: str) -> None:
    formula = parse(text, parameters=("a", "b", "c", "y"))
    assert formula.text == canonical
    assert parse(canonical, parameters=("a", "b", "c", "y")).root == formula.root


def test_power_is_right_associative_and_binds_tighter_than_unary_minus() -> None:
    root = parse("-x^2").root
    assert isinstance(root, Negate) and isinstance(root.operand, Binary) and root.operand.op == "^"
    tower = parse("2^3^2").root
    assert isinstance(tower, Binary) and isinstance(tower.right, Binary)


def test_decimal_literals_are_exact() -> None:
    root = parse("0.1").root
    assert isinstance(root, Number) and root.value == Fraction(1, 10)


def test_other_variable_name_and_parameters() -> None:
    formula = parse("k*t^2", variable="t", parameters=["k"])
    assert formula.text == "k*t^2"
    with pytest.raises(FormulaError) as info:
        parse("k*x", variable="t", parameters=["k"])
    assert info.value.code == "unknown_name" and info.value.column == 3


@pytest.mark.parametrize(
    "text, code, column",
    [
        ("sinn(x)", "unknown_function", 1),
        ("2x", "implicit_multiplication", 2),
        ("2(x+1)", "implicit_multiplication", 2),
        ("x y", "implicit_multiplication", 3),
        ("(x+1", "unbalanced_parenthesis", 1),
        ("x+1)", "unbalanced_parenthesis", 4),
        ("x**2", "unsupported_operator", 2),
        ("x +* 2", "unexpected_token", 4),
        ("", "empty_formula", 1),
        ("   ", "empty_formula", 1),
        ("2*", "unexpected_end", 3),
        ("x.real", "unexpected_character", 2),
        ("x @ 1", "unexpected_character", 3),
        ("sin", "missing_arguments", 1),
        ("atan(x, 1)", "wrong_argument_count", 1),
        ("max(x)", "wrong_argument_count", 1),
        ("y", "unknown_name", 1),
        ("x(2)", "unknown_function", 1),
    ],
)
def test_errors_carry_code_and_column(text: str, code: str, column: int) -> None:
    with pytest.raises(FormulaError) as info:
        parse(text)
    assert info.value.code == code
    assert info.value.column == column
    assert f"(at column {column})" in str(info.value)


def test_unknown_function_suggests_the_near_name() -> None:
    with pytest.raises(FormulaError, match=r"unknown function 'sinn'; did you mean 'sin'\? \(at column 1\)"):
        parse("sinn(x)")


def test_look_alike_unicode_is_named() -> None:
    with pytest.raises(FormulaError, match="CYRILLIC SMALL LETTER HA") as info:
        parse("\u0445^2")
    assert info.value.code == "unexpected_character"
    with pytest.raises(FormulaError, match="write '\\*' instead"):
        parse("2\u00d7x")


@pytest.mark.parametrize(
    "text, code",
    [
        ("(" * 65 + "x" + ")" * 65, "nesting_too_deep"),
        ("(" * 10000 + "x" + ")" * 10000, "formula_too_long"),
        ("+".join(["(x+x+x+x+x+x+x+x+x+x)"] * 120), "formula_too_large"),
        ("1" * 61, "literal_too_long"),
        ("1e100000000", "literal_out_of_range"),
        ("x^1001", "power_too_large"),
        ("-" * 70 + "x", "nesting_too_deep"),
        ("x" + "+x" * 300, "nesting_too_deep"),  # a long left-deep chain: tree height, not parentheses
        ("x" + "^x" * 300, "nesting_too_deep"),
    ],
)
def test_hard_limits(text: str, code: str) -> None:
    with pytest.raises(FormulaError) as info:
        parse(text)
    assert info.value.code == code


def test_python_is_unreachable() -> None:
    for text in [
        "__import__('os').system('id')",
        "lambda: 1",
        "x.__class__",
        "[x]",
        "{x}",
        "x if x else 1",
        "getattr(x, 'y')",
        "open('f')",
    ]:
        with pytest.raises(FormulaError):
            parse(text)


def test_reserved_parameter_names_are_refused() -> None:
    for bad in ["sin", "pi", "x", "2a", "a-b"]:
        with pytest.raises(FormulaError):
            parse("x", parameters=[bad])


@pytest.mark.parametrize(
    "text, code, expected",
    [
        ("sgn(x)", "unknown_function", "write sign(x)"),  # not 'did you mean sin'
        ("heaviside(x)", "unknown_function", "write step(x)"),
        ("tgamma(x)", "unknown_function", "write gamma(x)"),
        ("sinn(x)", "unknown_function", "did you mean 'sin'"),
        ("|x|", "unexpected_character", "abs(...)"),
        ("sin^2(x)", "unexpected_token", "sin(x)^2"),
        ("E^x", "unknown_name", "lower case: e"),
        ("PI*x", "unknown_name", "lower case: pi"),
        ("0.5.1*x", "unexpected_token", "one decimal point"),
    ],
)
def test_messages_name_the_intended_fix(text: str, code: str, expected: str) -> None:
    with pytest.raises(FormulaError) as info:
        parse(text)
    assert info.value.code == code and expected in info.value.message, info.value.message
