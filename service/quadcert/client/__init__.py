"""A small client for a quadcert service, sync and async, with typed results.

>>> from quadcert.client import Client
>>> with Client("http://127.0.0.1:8000") as client:      # doctest: +SKIP
...     result = client.integrate("exp(-x^2)", 0, 1, 1e-10)
...     result.enclosure
(0.7468241328123..., 0.7468241328125...)

Problem responses are raised as :class:`ProblemError` (``status`` 0 when no HTTP answer came at all: code
``service_unreachable``, ``timed_out`` or ``invalid_url``). Calls that get 503 or no answer are sent again, up to
three tries in all, waiting as the server's ``Retry-After`` says (every call is a pure computation, so repeating
it is safe).
"""

from ..errors import ProblemError
from ..results import check_from, integral_from, plan_from
from ._client import AsyncClient, Client

__all__ = ["AsyncClient", "Client", "ProblemError", "check_from", "integral_from", "plan_from"]
