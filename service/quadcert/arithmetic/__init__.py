"""Rigorous, outward-rounded interval arithmetic behind one small interface.

Two backends: :class:`MpmathArithmetic` (the reference: mpmath with a guard on every elementary function) and
:class:`FlintArithmetic` (python-flint's arb ball arithmetic in C, much faster; see its precision rule).
"""

from typing import TYPE_CHECKING, Any

from ._backend import MAX_PRECISION, MIN_PRECISION, Arithmetic, Backend, MpmathArithmetic
from ._interval import Interval, fraction_down, fraction_up, interval_text, shown, to_fraction
from ._ownership import claim_flint_context, flint_context_claimed, release_flint_context
from ._within import ParameterValue, Within, centre_of, spread_in, value_text

if TYPE_CHECKING:
    from ._flint_backend import FlintArithmetic


def __getattr__(name: str) -> Any:
    """FlintArithmetic loads python-flint on first use: a request the compiled engine answers never needs it."""
    if name == "FlintArithmetic":
        from ._flint_backend import FlintArithmetic

        return FlintArithmetic
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = [
    "MAX_PRECISION",
    "MIN_PRECISION",
    "Arithmetic",
    "Backend",
    "FlintArithmetic",
    "Interval",
    "MpmathArithmetic",
    "ParameterValue",
    "Within",
    "centre_of",
    "claim_flint_context",
    "flint_context_claimed",
    "fraction_down",
    "fraction_up",
    "interval_text",
    "release_flint_context",
    "shown",
    "spread_in",
    "to_fraction",
    "value_text",
]
