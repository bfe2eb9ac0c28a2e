"""The C library check: run once per build and machine, remembered in the user's cache folder, and never a
reason to fail where that folder cannot be used."""

from __future__ import annotations

from pathlib import Path

import pytest

from quadcert.quadrature import _fast, _self_test

pytestmark = pytest.mark.skipif(not _fast.AVAILABLE, reason="built without the compiled engine")


def _extension(tmp_path: Path, content: bytes = b"build 1") -> str:
    path = tmp_path / "engine.so"
    path.write_bytes(content)
    return str(path)


def _enclose():  # type: ignore[no-untyped-def]
    from quadcert.quadrature import _native

    return _native.enclose


def test_the_verdict_is_remembered_per_build(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("QUADCERT_CACHE_DIR", str(tmp_path / "cache"))
    extension = _extension(tmp_path)
    assert _self_test.passes(extension, _enclose()) is True
    assert len(list((tmp_path / "cache").glob("libm-check-*.json"))) == 1

    def must_not_run(enclose):  # type: ignore[no-untyped-def]
        raise AssertionError("the check ran again for the same build")

    monkeypatch.setattr(_self_test, "check", must_not_run)
    assert _self_test.passes(extension, _enclose()) is True
    with pytest.raises(AssertionError):  # another build is checked afresh
        _self_test.passes(_extension(tmp_path, b"build 2"), _enclose())


def test_a_failing_library_is_refused_and_remembered_as_such(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """exp rounded up wrongly (its enclosure misses the value): the library is not trusted."""
    monkeypatch.setenv("QUADCERT_CACHE_DIR", str(tmp_path / "cache"))
    good = _enclose()

    def wrong(op: int, low: float, high: float) -> tuple[float, float] | None:
        enclosure = good(op, low, high)
        if op == _self_test.FUNCTION_CODES["exp"] and enclosure is not None:
            return enclosure[1] * 2 + 1, enclosure[1] * 2 + 2
        return enclosure

    extension = _extension(tmp_path)
    assert _self_test.passes(extension, wrong) is False
    assert _self_test.passes(extension, good) is False  # remembered for this build


def test_an_unusable_cache_folder_only_costs_a_check(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("a file where the folder should be")
    monkeypatch.setenv("QUADCERT_CACHE_DIR", str(blocker))
    assert _self_test.passes(_extension(tmp_path), _enclose()) is True
    monkeypatch.setenv("QUADCERT_CACHE_DIR", "")  # memory off: nothing is written anywhere
    assert _self_test.passes(_extension(tmp_path), _enclose()) is True
    assert blocker.read_text() == "a file where the folder should be"


def test_a_damaged_record_is_checked_again(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("QUADCERT_CACHE_DIR", str(tmp_path / "cache"))
    extension = _extension(tmp_path)
    assert _self_test.passes(extension, _enclose())
    (record,) = (tmp_path / "cache").glob("libm-check-*.json")
    record.write_text("{not json")
    assert _self_test.passes(extension, _enclose()) is True
    assert '"trusted": true' in record.read_text()


def test_a_compiled_answer_loads_neither_mpmath_nor_flint(tmp_path: Path) -> None:
    """Cold start: importing the command line and answering an integral in the compiled engine loads neither
    arbitrary-precision library (once this build's library check is remembered; the first process runs it,
    with mpmath as its reference). A constant such as pi is folded by the reference backend, which then loads."""
    import os
    import subprocess
    import sys

    code = (
        "import sys, quadcert.cli\n"
        "before = [m for m in sys.modules if m.split('.')[0] in ('mpmath', 'flint')]\n"
        "from quadcert import integrate\n"
        "result = integrate('x*exp(-x^2/2) + 3', 0, 2, tolerance=1e-10)\n"
        "after = [m for m in sys.modules if m.split('.')[0] in ('mpmath', 'flint')]\n"
        "integrate('pi*x', 0, 1, tolerance=1e-10)\n"
        "print(before, after, result.precision_bits, 'mpmath' in sys.modules)\n"
    )
    env = {**os.environ, "QUADCERT_CACHE_DIR": str(tmp_path)}
    runs = [
        subprocess.run([sys.executable, "-c", code], check=False, capture_output=True, text=True, timeout=120, env=env)
        for _ in range(2)
    ]
    assert all(run.returncode == 0 for run in runs), runs[0].stderr + runs[1].stderr
    assert runs[1].stdout.split() == ["[]", "[]", "53", "True"], runs[1].stdout
