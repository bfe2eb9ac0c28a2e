"""The HTTP service. ``create_app`` builds it; ``quadcert serve`` runs it."""

from ._settings import Settings
from .main import create_app

__all__ = ["Settings", "create_app"]
