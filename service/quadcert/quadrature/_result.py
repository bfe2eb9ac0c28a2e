"""The result types live in ``service/quadcert/results.py`` (light, shared with the client); re-exported here."""

from ..results import CheckResult, IntegralResult, PanelReport, Plan, RulePlan

__all__ = ["CheckResult", "IntegralResult", "PanelReport", "Plan", "RulePlan"]
