"""Every error quadcert raises, in one hierarchy.

Each error carries a stable machine-readable ``code``. The HTTP layer turns an
error into RFC 9457 problem details in one function (``api/_problems.py``): the
status comes from the error's class, the title and meaning from its code.

    QuadcertError
    ├── FormulaError            the formula text cannot be read (has a column)
    ├── InvalidInput            a limit, tolerance, parameter or budget is unusable
    ├── ArithmeticFault         raised inside interval arithmetic
    │   ├── DomainViolation     a function's argument leaves its domain
    │   ├── Unbounded           division by an interval that reaches zero, a pole
    │   └── MagnitudeExceeded   a value too large to compute with safely
    ├── NotCertifiable          the engine cannot certify, with reason and location
    ├── ServiceError            the service could not run the computation (HTTP 503/504)
    │   ├── Saturated           every worker busy and the queue full
    │   ├── DeadlineExceeded    the computation passed its deadline; its worker was replaced
    │   ├── WorkerLost          the worker stopped during the job
    │   └── ShuttingDown        the service is draining
    ├── EngineDefect            anything else raised inside the engine: a defect, logged with its trace
    └── ProblemError            a quadcert service answered with RFC 9457 problem details
"""

from __future__ import annotations

from typing import Any


def _rebuild(cls: type[QuadcertError], args: tuple[Any, ...], state: dict[str, Any]) -> QuadcertError:
    """Unpickle an error with every field it had (code, column, field, location, ...)."""
    error = cls.__new__(cls)
    Exception.__init__(error, *args)
    error.__dict__.update(state)
    return error


class QuadcertError(Exception):
    """Base of all quadcert errors; ``code`` is stable, ``message`` is for people.

    Errors cross process boundaries (the engine's worker pipes) intact: pickling keeps every field.

    >>> import pickle
    >>> error = pickle.loads(pickle.dumps(FormulaError("unexpected ')'", code="unbalanced_parenthesis", column=4)))
    >>> error.code, error.column, isinstance(error, ValueError)
    ('unbalanced_parenthesis', 4, True)
    """

    code: str = "quadcert_error"

    def __init__(self, message: str, *, code: str | None = None) -> None:
        super().__init__(message)
        self.message = message
        if code is not None:
            self.code = code

    def __str__(self) -> str:
        return self.message

    def __reduce__(self) -> tuple[Any, ...]:
        return (_rebuild, (type(self), self.args, dict(self.__dict__)))


class FormulaError(QuadcertError, ValueError):
    """The formula cannot be read; ``column`` is 1-based and points at the culprit."""

    code = "formula_syntax"

    def __init__(self, message: str, *, code: str, column: int | None = None) -> None:
        self.column = column
        if column is not None:
            message = f"{message} (at column {column})"
        super().__init__(message, code=code)


class InvalidInput(QuadcertError, ValueError):
    """A request value other than the formula is unusable; ``field`` names it."""

    code = "invalid_input"

    def __init__(
        self, message: str, *, code: str = "invalid_input", field: str | None = None, column: int | None = None
    ) -> None:
        super().__init__(message, code=code)
        self.field = field
        self.column = column


class ArithmeticFault(QuadcertError):
    """Raised by interval kernels; the engine turns it into refinement or a refusal.

    ``certain`` is True when the fault holds at every point of the argument
    interval (so refining cannot help) and False when it may be an artefact
    of overestimation.
    """

    code = "arithmetic_fault"

    def __init__(self, message: str, *, certain: bool, code: str | None = None) -> None:
        super().__init__(message, code=code)
        self.certain = certain


class DomainViolation(ArithmeticFault):
    code = "outside_domain"


class Unbounded(ArithmeticFault):
    code = "unbounded"


class MagnitudeExceeded(ArithmeticFault):
    code = "magnitude_exceeded"

    def __init__(self, message: str) -> None:
        super().__init__(message, certain=True)


class NotCertifiable(QuadcertError):
    """The engine refuses to certify; ``location`` is where (an x value or an interval)."""

    code = "not_certifiable"

    def __init__(self, message: str, *, code: str, location: tuple[float, float] | None = None) -> None:
        super().__init__(message, code=code)
        self.location = location


class ServiceError(QuadcertError):
    """The computation could not run; the caller may retry (see Retry-After)."""

    code = "service_error"

    def __init__(self, message: str) -> None:
        super().__init__(message)


class Saturated(ServiceError):
    code = "saturated"


class DeadlineExceeded(ServiceError):
    code = "deadline_exceeded"


class WorkerLost(ServiceError):
    code = "worker_lost"


class ShuttingDown(ServiceError):
    code = "shutting_down"


class EngineDefect(QuadcertError):
    """An exception the engine did not expect, carried out of a worker with its trace for the log."""

    code = "internal_error"

    def __init__(self, message: str, *, trace: str = "") -> None:
        super().__init__(message)
        self.trace = trace


class ProblemError(QuadcertError):
    """Raised by the client: the service answered with problem details (``problem`` holds them all)."""

    code = "problem"

    def __init__(self, problem: dict[str, Any], retry_after: float | None = None) -> None:
        status = problem.get("status")
        detail = str(problem.get("detail", ""))
        super().__init__(f"{detail} (HTTP {status})" if status else detail, code=str(problem.get("code", "problem")))
        self.problem = problem
        self.status: int | None = int(status) if status else None  # None: no HTTP answer at all
        self.column = problem.get("column")
        self.retry_after = retry_after  # seconds, from a 503's Retry-After
