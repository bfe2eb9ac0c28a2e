"""Rigorous, outward-rounded interval arithmetic behind one small interface.

Two backends: :class:`MpmathArithmetic` (the reference: mpmath with a guard on every elementary function) and
:class:`FlintArithmetic` (python-flint's arb ball arithmetic in C, much faster; see its precision rule).
"""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING, Any

from ._interface import MAX_PRECISION, MIN_PRECISION, Arithmetic, Backend
from ._interval import Interval, fraction_down, fraction_up, interval_text, shown, to_fraction
from ._ownership import claim_flint_context, flint_context_claimed, release_flint_context
from ._within import ParameterValue, Within, centre_of, spread_in, value_text

if TYPE_CHECKING:
    from ._backend import MpmathArithmetic
    from ._flint_backend import FlintArithmetic


def __getattr__(name: str) -> Any:
    """Both backends load on first use: a request the compiled engine answers needs neither mpmath nor
    python-flint. Once loaded, a backend is an ordinary attribute of the package."""
    backend: Any
    if name == "MpmathArithmetic":
        from ._backend import MpmathArithmetic

        backend = MpmathArithmetic
    elif name == "FlintArithmetic":
        from ._flint_backend import FlintArithmetic

        backend = FlintArithmetic
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = backend
    return backend


def reference(prec: int) -> MpmathArithmetic:
    """The reference backend at ``prec`` bits, loading mpmath on first use (what a module that only sometimes
    needs it calls, instead of importing the class)."""
    from ._backend import MpmathArithmetic

    return MpmathArithmetic(prec)


def is_reference(ar: object) -> bool:
    """Whether ``ar`` is the reference backend, without loading mpmath to ask (unloaded, nothing can be one)."""
    module = sys.modules.get(f"{__name__}._backend")
    return module is not None and isinstance(ar, module.MpmathArithmetic)


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
    "is_reference",
    "reference",
    "release_flint_context",
    "shown",
    "spread_in",
    "to_fraction",
    "value_text",
]
