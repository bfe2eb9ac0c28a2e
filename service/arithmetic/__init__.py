"""Rigorous, outward-rounded interval arithmetic behind one small interface."""

from ._backend import MAX_PRECISION, MIN_PRECISION, Arithmetic, MpmathArithmetic
from ._interval import Interval, to_fraction

__all__ = ["MAX_PRECISION", "MIN_PRECISION", "Arithmetic", "Interval", "MpmathArithmetic", "to_fraction"]
