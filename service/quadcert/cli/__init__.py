"""The ``quadcert`` command: serve, integrate, check, batch and plan, offline or against a server.

Exit codes: 0 success (for ``check``: pass), 1 certified fail, 2 undecided or any error.
"""

from ._main import main

__all__ = ["main"]
