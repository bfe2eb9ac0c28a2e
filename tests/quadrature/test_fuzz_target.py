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
    b"exp(-k*x)*sin(10*x)",  # k within [0.9, 1.1] against k = 1 and k = 1.1
    b"{k if x < 0.5; x/k otherwise}",
    b"abs(x - k/2)",
    # found by the long run: a stretch past the float range next to x^x's singular end
    b"+5+++1+1+1+1+145+1+145^351^1^1+1+1+145+1+145^351^1^x^x-x^x*- k- k/8+5++1+1+11",
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


def test_spelled_out_functions_compile_to_the_formula_itself() -> None:
    """Found by the fuzz target: the compiler remembered which nodes involve x by their id, and the temporary
    trees of spelled-out functions (hypot, log2, sec, ...) could hand their ids to later nodes, so log(x + 1)
    was once compiled as a constant. Reference: the reference backend at 113 bits, and 60-digit mpmath."""
    from fractions import Fraction

    import mpmath

    from quadcert import integrate
    from quadcert.arithmetic import MpmathArithmetic
    from quadcert.derivatives import Program
    from quadcert.formula import parse
    from quadcert.quadrature import _native
    from tests.conftest import encloses

    text = "hypot(x, 0.1)*log2(x + 1) + sec(x/3)*cot(x + 1) + csc(x + 2)*hypot(x, x + 1)"
    ar = MpmathArithmetic(113)
    for _ in range(100):  # id reuse depends on the allocator: the old code failed in most of these
        formula = parse(text)
        compiled = _fast._compile_cached.__wrapped__(formula, ())
        ours = _native.taylor(compiled.code, compiled.constants, compiled.stack, 0.25, 0.25 + 2.0**-10, 2)
        box = ar.hull(ar.exact(Fraction(1, 4)), ar.exact(Fraction(1, 4) + Fraction(1, 1024)))
        reference = Program(formula, ar).taylor(box, 2)
        for k, (low, high) in enumerate(ours):
            ref_low, ref_high = ar.bounds(reference[k])
            assert low <= ref_high and ref_low <= high, (k, (low, high), (ref_low, ref_high))
    exact = mpmath.MPContext()
    exact.dps = 60
    f = lambda t: (
        exact.hypot(t, exact.mpf("0.1")) * exact.log(t + 1, 2)
        + exact.sec(t / 3) * exact.cot(t + 1)
        + exact.csc(t + 2) * exact.hypot(t, t + 1)
    )
    result = integrate(text, 0, 1, 1e-9)
    assert result.precision_bits == 53 and encloses(result.enclosure, exact.quad(f, [0, 1]))
