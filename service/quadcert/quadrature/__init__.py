"""Certified quadrature: adaptive composite Simpson and the a priori planner."""

from ._finish import bound_decimal, bound_text, certified_digits, shown
from ._request import Request, check, integrate, plan
from ._result import CheckResult, IntegralResult, PanelReport, Plan, RulePlan

__all__ = [
    "CheckResult",
    "IntegralResult",
    "PanelReport",
    "Plan",
    "Request",
    "RulePlan",
    "bound_decimal",
    "bound_text",
    "certified_digits",
    "check",
    "integrate",
    "plan",
    "shown",
]
