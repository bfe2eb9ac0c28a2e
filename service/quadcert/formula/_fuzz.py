"""Coverage-guided fuzz target for the tokenizer and parser (atheris).

    python -m quadcert.formula._fuzz -atheris_runs=1000000      # a long run
    python -m quadcert.formula._fuzz -max_total_time=600        # ten minutes

Any exception other than FormulaError is a finding; so is a canonical text that does not parse back to the
same tree. The same input is also read as a parameter's value (a number, or bounds such as ``1.99..2.01`` or
``2±0.01``): anything but a coded InvalidInput or a value with low < high is a finding.
"""

from __future__ import annotations

import sys


def check_one(data: bytes) -> None:
    from ..errors import FormulaError
    from . import parse

    text = data.decode("utf-8", errors="replace")
    _check_parameter_text(text)
    try:
        formula = parse(text, parameters=("a", "k"))
    except FormulaError as error:
        if not error.code or (error.column is not None and not 1 <= error.column <= len(text) + 1):
            raise AssertionError(f"bad error position for {text!r}: {error}") from None
        return
    again = parse(formula.text, parameters=("a", "k"))
    if again.root != formula.root:
        raise AssertionError(f"canonical text {formula.text!r} does not round-trip {text!r}")


def _check_parameter_text(text: str) -> None:
    from ..arithmetic import Within
    from ..errors import InvalidInput
    from ..quadrature._inputs import parameter_value

    try:
        value = parameter_value(text, "parameters.k")
    except InvalidInput as error:
        if error.code != "invalid_parameter" or not (error.field or "").startswith("parameters.k"):
            raise AssertionError(f"bad refusal of parameter text {text!r}: {error.code} {error.field}") from None
        return
    if isinstance(value, Within) and not value.low < value.high:
        raise AssertionError(f"parameter text {text!r} read as an empty box {value}")


def main(argv: list[str]) -> None:
    import atheris

    from . import _nodes, _parser, _tokenizer  # noqa: F401  (already imported with the package)

    atheris.instrument_all()  # the package is loaded before this module runs, so instrument what is loaded
    atheris.Setup(argv, check_one)
    atheris.Fuzz()


if __name__ == "__main__":
    main(sys.argv)
