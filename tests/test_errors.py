"""Every error survives pickling with all its fields (the worker pipes need it), and input errors are
ValueErrors for callers who catch those."""

from __future__ import annotations

import pickle

import pytest

from quadcert import errors

INSTANCES = [
    errors.QuadcertError("base", code="quadcert_error"),
    errors.FormulaError("unexpected ')'", code="unbalanced_parenthesis", column=4),
    errors.InvalidInput("tolerance must be > 0", code="invalid_tolerance", field="tolerance", column=2),
    errors.DomainViolation("log of [-1, 0]", certain=True),
    errors.Unbounded("division by [0, 0]", certain=False),
    errors.MagnitudeExceeded("too large"),
    errors.NotCertifiable("cannot bound near x = 0", code="unbounded_near", location=(-1e-9, 1e-9)),
    errors.ArithmeticFault("no bound", certain=False),
    errors.ServiceError("could not run"),
    errors.Saturated("busy"),
    errors.DeadlineExceeded("late"),
    errors.WorkerLost("gone"),
    errors.ShuttingDown("draining"),
    errors.EngineDefect("KeyError: 'x'", trace="Traceback (most recent call last): ..."),
    errors.ProblemError({"status": 503, "code": "saturated", "detail": "busy", "column": None}, retry_after=2.0),
]


def _subclasses(cls: type) -> set[type]:
    found = set()
    for sub in cls.__subclasses__():
        found |= {sub, *_subclasses(sub)}
    return found


def test_the_instances_cover_every_error_class() -> None:
    assert _subclasses(errors.QuadcertError) <= {type(e) for e in INSTANCES}


@pytest.mark.parametrize("error", INSTANCES, ids=[type(e).__name__ for e in INSTANCES])
def test_errors_round_trip_through_pickle_with_their_fields(error: errors.QuadcertError) -> None:
    copy = pickle.loads(pickle.dumps(error))
    assert type(copy) is type(error) and str(copy) == str(error) and copy.args == error.args
    assert vars(copy) == vars(error)


def test_input_errors_are_value_errors() -> None:
    assert issubclass(errors.FormulaError, ValueError) and issubclass(errors.InvalidInput, ValueError)
