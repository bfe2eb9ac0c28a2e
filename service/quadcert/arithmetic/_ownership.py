"""Which thread owns python-flint's process-wide context (its precision).

Kept apart from the flint backend so that asking costs no import of python-flint: a request the compiled engine
answers never loads it.
"""

from __future__ import annotations

import threading

_owner: int | None = None


def claim_flint_context() -> None:
    """Declare that the calling thread owns flint's global context (call once, in a single-threaded process)."""
    global _owner
    _owner = threading.get_ident()


def release_flint_context() -> None:
    """Give up the claim (for tests and for programs that start threads later)."""
    global _owner
    _owner = None


def flint_context_claimed() -> bool:
    return _owner == threading.get_ident()
