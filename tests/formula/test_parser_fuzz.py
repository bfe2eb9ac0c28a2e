"""Random text never escapes the parser except as a coded FormulaError (bounded hypothesis run)."""

from hypothesis import given
from hypothesis import strategies as st

from quadcert.errors import FormulaError
from quadcert.formula import parse

ALPHABET = st.sampled_from(
    list("x0123456789.e+-*/^(), {};<>=")
    + ["sin", "exp", "pi", "log", "abs", "min", "\u0445", " if ", " otherwise", " and ", " or ", "atan2", "step"]
)


@given(st.lists(ALPHABET, max_size=40).map("".join))
def test_parse_only_raises_coded_errors(text: str) -> None:
    try:
        formula = parse(text)
    except FormulaError as error:
        assert error.code and error.column is not None and 1 <= error.column <= len(text) + 1
    else:
        assert parse(formula.text).root == formula.root
