"""Certified quadrature: adaptive composite Simpson and the a priori planner."""

from ..arithmetic import shown
from ..results import bound_decimal, bound_text
from ._finish import certified_digits
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
