"""A bounded run of the compiled engine's differential fuzz target (atheris); longer runs: its docstring.

Reference: the arbitrary-precision engine on the reference backend (the two must produce meeting enclosures).
"""

from __future__ import annotations

import subprocess
import sys

import pytest

from quadcert.quadrature import _fast
from quadcert.quadrature._fuzz import check_one

atheris = pytest.importorskip("atheris")
pytestmark = pytest.mark.skipif(not _fast.AVAILABLE, reason="the C engine was not built")

SEEDS = [
    b"x",
    b"exp(-x^2)",
    b"sin(10*x)/(1+x)",
    b"sqrt(x)",
    b"abs(x-0.3)",
    b"max(sin(x),cos(x))",
    b"x^1.5",
    b"log(1+x)",
    b"tan(x)",
    b"1/x",
    b"asin(x)",
    b"(2+x)^(x/3)",
    b"cosh(100*x)^6",
    b"erf(3*x)-tanh(x)",
    b"x^-3",
    b"1/(1e-4+(x-0.5)^2)",
    b"log10(x+1e-300)",
    b"acos(x)^2",
    b"cosh(101/x)^6",  # a reference bound beyond the float range (a harness bug, fixed)
    b"gamma(x + 1/2) + j1(20*x)",  # handed over: the two arbitrary-precision backends are compared
    b"{asinh(x) if x < 0.3; erfc(x) otherwise}",
    b"atan2(x - 0.5, x^2 - 0.1)",
]


def test_seed_formulas_pass_the_target() -> None:
    for seed in SEEDS:
        check_one(seed)


def test_bounded_fuzz_run_finds_nothing(tmp_path) -> None:
    corpus = tmp_path / "corpus"
    corpus.mkdir()
    for i, seed in enumerate(SEEDS):
        (corpus / f"seed{i}").write_bytes(seed)
    done = subprocess.run(
        [
            sys.executable,
            "-m",
            "quadcert.quadrature._fuzz",
            "-runs=3000",
            "-seed=1",
            f"-artifact_prefix={tmp_path}/",
            str(corpus),
        ],
        check=False,
        capture_output=True,
        text=True,
        timeout=600,
    )
    assert done.returncode == 0, done.stderr[-3000:]
    assert "Done 3000 runs" in done.stderr
