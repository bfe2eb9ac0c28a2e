"""Whether the C library of this machine may be trusted by the compiled engine, checked once per build.

The compiled engine widens every value the C library returns by 2^-46 relative. That is safe only if the
library is within that of the truth, so before the first use the engine checks a set of arguments (next to
zeros, poles and extrema, and large ones) against mpmath at 100 bits, in a private context. A library that
fails one is not used: every request goes to the arbitrary-precision engine.

The verdict depends only on the extension's build, the C library and the machine, so it is remembered in the
user's cache folder under a key made of the extension's SHA-256, the C library's version and the machine.
Where that folder cannot be read or written, the check simply runs again; nothing fails for it. Set
``QUADCERT_CACHE_DIR`` to move the folder, or to an empty string to turn the memory off.
"""

from __future__ import annotations

import hashlib
import json
import os
import platform
import tempfile
from collections.abc import Callable
from pathlib import Path

from ._native_tables import FUNCTION_CODES

#: (function, argument) pairs the C library must get right for the compiled engine to be trusted
CASES = [
    (name, x)
    for name, points in {
        "exp": (-700.5, -1.0, -1e-9, 0.5, 1.0, 3.7, 88.7, 690.25),
        "log": (1e-300, 0.1, 1.0000001, 2.0, 1e300),
        "log10": (1e-300, 0.3, 1.0000001, 1000.0, 1e300),
        "sin": (1e-8, 1.0, 3.141592653589793, 22.0, 1e5, 1e9),
        "cos": (1e-8, 1.5707963267948966, 3.0, 355.0, 1e5, 1e9),
        "tan": (0.5, 1.5707963267948, -1.4, 11.0),
        "asin": (-0.99999, 0.001, 0.5, 1.0),
        "acos": (-1.0, 0.001, 0.7, 0.99999999),
        "atan": (-1e10, -1.0, 1e-9, 2.5, 1e300),
        "sinh": (-690.0, -1e-9, 0.7, 30.0),
        "cosh": (-690.0, 1e-9, 0.7, 30.0),
        "tanh": (-20.0, -1e-9, 0.3, 5.0),
        "erf": (-6.0, -1e-9, 0.4, 1.5, 5.0),
    }.items()
    for x in points
]

Enclose = Callable[[int, float, float], "tuple[float, float] | None"]


def passes(extension: str, enclose: Enclose) -> bool:
    """The remembered verdict for this build and machine, or a fresh check (then remembered if possible)."""
    where = _record(extension)
    if where is not None:
        try:
            return bool(json.loads(where.read_text(encoding="utf-8"))["trusted"])
        except (OSError, ValueError, KeyError, TypeError):
            pass  # absent or unreadable: check again
    verdict = check(enclose)
    if where is not None:
        _remember(where, verdict)
    return verdict


def check(enclose: Enclose) -> bool:
    """Every case's enclosure contains mpmath's value at 100 bits."""
    import mpmath  # the reference, loaded only when the check actually runs

    ref = mpmath.MPContext()
    ref.prec = 100
    for name, x in CASES:
        enclosure = enclose(FUNCTION_CODES[name], x, x)
        value = getattr(ref, name)(ref.mpf(x))
        if enclosure is None or not ref.mpf(enclosure[0]) <= value <= ref.mpf(enclosure[1]):
            return False
    return True


def _record(extension: str) -> Path | None:
    """Where this build's verdict is kept, or None when there is no usable cache folder."""
    folder = os.environ.get("QUADCERT_CACHE_DIR")
    if folder == "":
        return None
    base = Path(folder) if folder else Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache") / "quadcert"
    try:
        digest = hashlib.sha256(Path(extension).read_bytes())
    except OSError:
        return None
    libc = "-".join(platform.libc_ver()) or "unknown-libc"
    digest.update(f"|{libc}|{platform.machine()}|{platform.system()}|{len(CASES)}".encode())
    return base / f"libm-check-{digest.hexdigest()[:32]}.json"


def _remember(where: Path, verdict: bool) -> None:
    """Write the verdict atomically; a folder that cannot be written is simply not used."""
    try:
        where.parent.mkdir(parents=True, exist_ok=True)
        with tempfile.NamedTemporaryFile("w", dir=where.parent, delete=False, suffix=".tmp") as stream:
            json.dump({"trusted": verdict}, stream)
        os.replace(stream.name, where)
    except OSError:
        pass
