"""Shared helpers: exact comparisons against references, never float-fuzzy ones."""

from __future__ import annotations

import os
from fractions import Fraction

import mpmath
from hypothesis import HealthCheck, settings

settings.register_profile("ci", max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("deep", max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("long", max_examples=2000, deadline=None, suppress_health_check=[HealthCheck.too_slow])
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))

#: a private high-precision context, so no test touches mpmath's global precision
HP = mpmath.MPContext()
HP.dps = 110


def encloses(enclosure: tuple[float, float], reference: object) -> bool:
    """True when the float pair [low, high] contains the reference value exactly."""
    value = HP.mpf(reference)
    return HP.mpf(enclosure[0]) <= value <= HP.mpf(enclosure[1])


def fraction_of(value: object) -> Fraction:
    man, exp = HP.mpf(value).man_exp
    return Fraction(man) * Fraction(2) ** exp if exp >= 0 else Fraction(man, 2**-exp)
