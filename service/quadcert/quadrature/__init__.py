"""Certified quadrature: adaptive composite Simpson and the a priori planner."""

from ._check import CheckResult, check
from ._finish import bound_decimal, bound_text, certified_digits, shown
from ._integrate import integrate
from ._planner import plan
from ._result import IntegralResult, PanelReport, Plan, RulePlan

__all__ = [
    "CheckResult",
    "IntegralResult",
    "PanelReport",
    "Plan",
    "RulePlan",
    "bound_decimal",
    "bound_text",
    "certified_digits",
    "check",
    "integrate",
    "plan",
    "shown",
]
