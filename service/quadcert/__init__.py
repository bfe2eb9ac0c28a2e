"""quadcert: definite integrals of one-variable formulas with a guaranteed error bound.

The data path, one package each: ``formula`` (text to tree) → ``arithmetic``
(outward-rounded intervals) → ``derivatives`` (Taylor enclosures) →
``quadrature`` (certified Simpson, planner) → ``api`` (HTTP service), with
``cli`` and ``client`` on top.

>>> from quadcert import integrate
>>> result = integrate("exp(x)", 0, 2, 1e-8)
>>> result.enclosure[0] <= 6.38905609893065 <= result.enclosure[1]
True
"""

from typing import Any

from ._version import ENGINE_VERSION, __version__
from .errors import ArithmeticFault, FormulaError, InvalidInput, NotCertifiable, QuadcertError
from .results import CheckResult, IntegralResult, PanelReport, Plan, RulePlan

#: the engine loads on first use, so that importing the client (or this package for its types) does not
#: import mpmath, python-flint or the compiled engine
_LAZY = {
    "Formula": "formula",
    "parse": "formula",
    "check": "quadrature",
    "integrate": "quadrature",
    "plan": "quadrature",
    "Request": "quadrature",
    "Within": "arithmetic",
}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        import importlib

        value = getattr(importlib.import_module(f".{_LAZY[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = [
    "ENGINE_VERSION",
    "ArithmeticFault",
    "CheckResult",
    "Formula",
    "FormulaError",
    "IntegralResult",
    "InvalidInput",
    "NotCertifiable",
    "PanelReport",
    "Plan",
    "QuadcertError",
    "Request",
    "RulePlan",
    "Within",
    "__version__",
    "check",
    "integrate",
    "parse",
    "plan",
]
