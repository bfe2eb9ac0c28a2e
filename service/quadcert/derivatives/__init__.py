"""Derivative enclosures: interval Taylor coefficients of a formula over an interval."""

from ._program import Program
from ._series import Series

__all__ = ["Program", "Series"]
