"""Coverage-guided differential fuzz target for the compiled float64 engine (atheris).

    python -m quadcert.quadrature._fuzz -max_total_time=600      # ten minutes

Each input that parses as a formula in x is compiled and run by the C engine over [0, 1], with Simpson's
panels and with the Gauss–Legendre ones (and its Taylor enclosures and Simpson's Taylor model over a small
interval); the arbitrary-precision engine on the reference backend does the same work. A formula the C engine
hands over (a function it lacks, a piecewise definition) is integrated on both arbitrary-precision backends
instead. A formula that uses
the parameter k is also integrated with k known only within [9/10, 11/10]: that enclosure must meet the ones
at k = 1 and k = 11/10. Both sides are always rigorous, so their enclosures must meet; a crash, an exception
other than a coded one, or two disjoint enclosures is a finding.
"""

from __future__ import annotations

import sys
from fractions import Fraction
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from ..formula import Formula


def _meet(a: tuple[float, float], b: tuple[float, float]) -> bool:
    return a[0] <= b[1] and b[0] <= a[1]  # float comparisons are exact, infinities included


def check_one(data: bytes) -> None:
    from ..arithmetic import MpmathArithmetic
    from ..derivatives import Program
    from ..errors import QuadcertError
    from ..formula import parse
    from . import _fast
    from ._request import integrate

    text = data.decode("utf-8", errors="replace")
    try:
        with_k = parse(text, parameters=("k",))
    except QuadcertError:
        with_k = None
    if with_k is not None and "k" in with_k.text:
        _box_meets_points(with_k, text)
        return
    try:
        formula = parse(text)
        compiled = _fast.compile_formula(formula, {})
    except QuadcertError:
        return
    if compiled is None:  # a formula the C engine hands over: the two arbitrary-precision backends must agree
        _backends_meet(formula, text)
        return
    # Taylor enclosures to order 20 over [0.25, 0.25 + 2^-10] against the reference backend at the interval's start
    assert _fast.AVAILABLE
    from . import _native

    ours = _native.taylor(compiled.code, compiled.constants, compiled.stack, 0.25, 0.25 + 2.0**-10, 20)
    if ours is not None:
        ar = MpmathArithmetic(113)
        try:
            reference = Program(formula, ar).taylor(ar.exact(Fraction(1, 4)), 20)
        except QuadcertError:
            reference = []
        for k in range(min(len(ours), len(reference))):
            if not _meet(ours[k], ar.bounds(reference[k])):
                raise AssertionError(f"coefficient {k} of {text!r}: {ours[k]} vs {ar.bounds(reference[k])}")
        # Simpson's Taylor model of the fourth coefficient over [1/4 - 2^-6, 1/4 + 2^-6], on the same panel
        model = _native.model(
            compiled.code, compiled.constants, compiled.stack, 0.25 - 2.0**-6, 0.25 + 2.0**-6, 0.25, 0.25 + 2.0**-10
        )
        if model is not None and len(reference) > 4 and not _meet(model[:2], ar.bounds(reference[4])):
            raise AssertionError(f"Taylor model of {text!r}: {model} vs {ar.bounds(reference[4])}")
    outcomes = [
        _fast.run(compiled, (Fraction(0),) * 2, (Fraction(1),) * 2, 1e-6, None, 801, None, False, rule, points)
        for rule, points in (("simpson", 5), ("auto", 5), ("auto", 10))  # auto: the Gauss–Legendre panels too
    ]
    if all(isinstance(outcome, _fast.Declined) for outcome in outcomes):
        return
    try:
        precise = integrate(formula, 0, 1, 1e-6, max_nodes=801, deadline_seconds=2, arithmetic=MpmathArithmetic)
    except QuadcertError:
        return
    for outcome in outcomes:
        if not isinstance(outcome, _fast.Declined) and not _meet(outcome.enclosure, precise.enclosure):
            raise AssertionError(f"disjoint certificates for {text!r}: {outcome.enclosure} vs {precise.enclosure}")


def _box_meets_points(formula: Formula, text: str) -> None:
    from ..arithmetic import Within
    from ..errors import QuadcertError
    from ..formula import parameters_used
    from ._request import integrate

    if "k" not in parameters_used(formula.root):
        return
    box_k = Within(Fraction(9, 10), Fraction(11, 10))
    try:
        box = integrate(formula, 0, 1, 1e-6, parameters={"k": box_k}, max_nodes=801, deadline_seconds=2)
    except QuadcertError:
        return
    for k in (Fraction(1), Fraction(11, 10)):
        try:
            point = integrate(formula, 0, 1, 1e-6, parameters={"k": k}, max_nodes=801, deadline_seconds=2)
        except QuadcertError:
            continue
        if not _meet(box.enclosure, point.enclosure):
            raise AssertionError(f"box and k = {k} disagree on {text!r}: {box.enclosure} vs {point.enclosure}")


def _backends_meet(formula: Formula, text: str) -> None:
    from ..arithmetic import FlintArithmetic, MpmathArithmetic, claim_flint_context, release_flint_context
    from ..errors import QuadcertError
    from ._request import integrate

    results = []
    claim_flint_context()  # the fuzz process, like a test, runs on one thread
    try:
        for backend in (MpmathArithmetic, FlintArithmetic):
            try:
                results.append(integrate(formula, 0, 1, 1e-6, max_nodes=801, deadline_seconds=2, arithmetic=backend))
            except QuadcertError:
                return
    finally:
        release_flint_context()
    if not _meet(results[0].enclosure, results[1].enclosure):
        raise AssertionError(f"backends disagree on {text!r}: {results[0].enclosure} vs {results[1].enclosure}")


def main(argv: list[str]) -> None:
    import atheris

    atheris.instrument_all()
    atheris.Setup(argv, check_one)
    atheris.Fuzz()


if __name__ == "__main__":
    main(sys.argv)
