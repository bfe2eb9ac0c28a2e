"""A small client for a quadcert service, sync and async, with typed results.

>>> from service.client import Client
>>> with Client("http://127.0.0.1:8000") as client:      # doctest: +SKIP
...     result = client.integrate("exp(-x^2)", 0, 1, 1e-10)
...     result.enclosure
(0.7468241328123..., 0.7468241328125...)

Problem responses are raised as :class:`service.errors.ProblemError`.
"""

from ._client import AsyncClient, Client, check_from, integral_from, plan_from

__all__ = ["AsyncClient", "Client", "check_from", "integral_from", "plan_from"]
