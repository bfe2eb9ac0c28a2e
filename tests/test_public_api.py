"""The public surface: every name in each ``__all__`` exists and none is private, every public name a package
defines is in its ``__all__``, and the package ships its type information (py.typed, and a stub for the
compiled engine). The order of each list is ruff's business (RUF022)."""

from __future__ import annotations

import importlib
import types
from pathlib import Path

import pytest

import quadcert

#: names a module imports for its annotations, not part of its API
TYPING_NAMES = {"annotations", "Any", "TYPE_CHECKING"}

PACKAGES = [
    "quadcert",
    "quadcert.arithmetic",
    "quadcert.derivatives",
    "quadcert.formula",
    "quadcert.improper",
    "quadcert.quadrature",
    "quadcert.client",
    "quadcert.cli",
]


@pytest.mark.parametrize("name", PACKAGES)
def test_every_exported_name_exists_and_is_public(name: str) -> None:
    module = importlib.import_module(name)
    exported = module.__all__
    assert len(set(exported)) == len(exported), name
    for item in exported:
        assert not item.startswith("_") or item == "__version__", (name, item)
        getattr(module, item)  # raises AttributeError if the name is not there (lazy names load here)


@pytest.mark.parametrize("name", PACKAGES)
def test_every_public_name_is_exported(name: str) -> None:
    module = importlib.import_module(name)
    for item in module.__all__:
        getattr(module, item)
    public = {
        n
        for n, value in vars(module).items()
        if not n.startswith("_") and not isinstance(value, types.ModuleType) and n not in TYPING_NAMES
    }
    assert public <= set(module.__all__), (name, sorted(public - set(module.__all__)))


def test_type_information_ships_with_the_package() -> None:
    root = Path(quadcert.__file__).parent
    assert (root / "py.typed").is_file()
    assert (root / "quadrature" / "_native.pyi").is_file()
