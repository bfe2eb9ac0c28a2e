"""A bounded run of the coverage-guided parser fuzz target (atheris); longer runs: see the target's docstring."""

from __future__ import annotations

import subprocess
import sys

import pytest

from quadcert.formula._fuzz import check_one

atheris = pytest.importorskip("atheris")


def test_seed_inputs_pass_the_target() -> None:
    for seed in [
        b"x",
        b"-x^2",
        b"sin(",
        b"2x",
        b"\xff\xfe",
        b"((((",
        b"min(x,a,k)",
        b"1e999999",
        b"x**2",
        # found by long runs: canonical text must stay exact and within the literal limits
        b".133333333333333333333333333333333333333333333",
        b"4^4^04e404^00^04e4",
        b"2^-" * 30 + b"x",
        b"x" + b"+x" * 400,
        # piecewise definitions and the further functions
        b"{x if x < 1; 2 if 1 <= x < k; a otherwise}",
        b"{x if x < 1 or x > 2 and x <= 3;}",
        b"{{x if x<0; 1 otherwise} if x > a; -x otherwise}",
        b"{x otherwise}",
        b"x < 1",
        b"{x if not x < 1}",
        b"atan2(x, a) + hypot(x, 1) + gamma(x) + j0(x) + step(x - k)",
        b"{" * 70,
        # parameter values known within bounds
        b"1.99..2.01",
        b"2\xc2\xb10.01",
        b"2+-0.01",
        b"2..1",
        b"1...2",
        b"..",
        b"1e999..2",
        b"1/3..1/2",
    ]:  # the last once overflowed the stack
        check_one(seed)


def test_bounded_fuzz_run_finds_nothing(tmp_path) -> None:
    done = subprocess.run(
        [sys.executable, "-m", "quadcert.formula._fuzz", "-runs=5000", "-seed=1", f"-artifact_prefix={tmp_path}/"],
        check=False,
        capture_output=True,
        text=True,
        timeout=600,
    )
    assert done.returncode == 0, done.stderr[-3000:]
    assert "Done 5000 runs" in done.stderr
