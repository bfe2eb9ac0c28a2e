"""quadcert: definite integrals of one-variable formulas with a guaranteed error bound.

The data path, one package each: ``formula`` (text to tree) → ``arithmetic``
(outward-rounded intervals) → ``derivatives`` (Taylor enclosures) →
``quadrature`` (certified Simpson, planner) → ``api`` (HTTP service), with
``cli`` and ``client`` on top.

>>> from service import integrate
>>> result = integrate("exp(x)", 0, 2, 1e-8)
>>> result.enclosure[0] <= 6.38905609893065 <= result.enclosure[1]
True
"""

from ._version import ENGINE_VERSION, __version__
from .errors import (ArithmeticFault, FormulaError, InvalidInput, NotCertifiable, QuadcertError)
from .formula import Formula, parse
from .quadrature import CheckResult, IntegralResult, PanelReport, Plan, RulePlan, check, integrate, plan

__all__ = ["ENGINE_VERSION", "ArithmeticFault", "CheckResult", "Formula", "FormulaError", "IntegralResult", "InvalidInput",
           "NotCertifiable", "PanelReport", "Plan", "QuadcertError", "RulePlan", "__version__", "check", "integrate",
           "parse", "plan"]
