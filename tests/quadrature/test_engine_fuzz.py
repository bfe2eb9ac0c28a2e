"""Random formulas through the whole engine (hypothesis): only coded errors, and no false certificates.

The reference for each certified result is mpmath's tanh-sinh quadrature at 60 digits on 16 equal pieces,
with its own error estimate; the generated integrands are analytic on [0, 1] by construction (arguments of
log, sqrt and division are kept away from their singular points), so the reference is reliable there.
"""

from __future__ import annotations

import operator

from hypothesis import given, settings
from hypothesis import strategies as st

from quadcert import integrate
from quadcert.arithmetic import FlintArithmetic, MpmathArithmetic, claim_flint_context, release_flint_context
from quadcert.errors import QuadcertError

REF = __import__("mpmath").MPContext()
REF.dps = 60

LEAVES = st.sampled_from(
    [
        ("x", lambda x: x),
        ("2", lambda x: REF.mpf(2)),
        ("0.5", lambda x: REF.mpf("0.5")),
        ("pi", lambda x: +REF.pi),
        ("3*x", lambda x: 3 * x),
    ]
)
SAFE_UNARY = [
    ("sin({})", REF.sin),
    ("cos({})", REF.cos),
    ("exp(({})/3)", lambda v: REF.exp(v / 3)),
    ("atan({})", REF.atan),
    ("tanh({})", REF.tanh),
    ("erf({})", REF.erf),
    ("log(2 + ({})^2)", lambda v: REF.log(2 + v**2)),
    ("sqrt(1 + ({})^2)", lambda v: REF.sqrt(1 + v**2)),
    ("1/(1 + ({})^2)", lambda v: 1 / (1 + v**2)),
    ("({})^3", lambda v: v**3),
]


_OPERATORS = {"+": operator.add, "-": operator.sub, "*": operator.mul}


def _composed(f, g):
    return lambda x: f(g(x))


def _joined(op, f, g):
    return lambda x: op(f(x), g(x))


def _combine(children):
    unary = st.tuples(st.sampled_from(SAFE_UNARY), children).map(
        lambda t: (t[0][0].format(t[1][0]), _composed(t[0][1], t[1][1]))
    )
    binary = st.tuples(st.sampled_from(sorted(_OPERATORS)), children, children).map(
        lambda t: (f"({t[1][0]}) {t[0]} ({t[2][0]})", _joined(_OPERATORS[t[0]], t[1][1], t[2][1]))
    )
    return unary | binary


FORMULAS = st.recursive(LEAVES, _combine, max_leaves=6)


@settings(max_examples=max(60, settings().max_examples // 4))
@given(FORMULAS, st.sampled_from([1e-4, 1e-8, 1e-12]), st.sampled_from([MpmathArithmetic, FlintArithmetic, None]))
def test_random_formulas_are_certified_correctly_or_refused_with_a_code(formula, tolerance, backend) -> None:
    """backend None: the default path, the compiled float64 engine first, handing over where it declines."""
    text, function = formula
    claim_flint_context()  # one thread here; released below so other tests keep the reference default
    try:
        result = integrate(text, 0, 1, tolerance, max_nodes=4001, deadline_seconds=5, arithmetic=backend)
    except QuadcertError as error:
        assert error.code
        return
    finally:
        release_flint_context()
    pieces = [REF.mpf(i) / 16 for i in range(17)]
    reference, estimate = REF.quad(function, pieces, error=True)
    slack = abs(estimate) + REF.mpf(10) ** -40
    low, high = REF.mpf(result.enclosure[0]), REF.mpf(result.enclosure[1])
    assert low - slack <= reference <= high + slack, (text, result.enclosure, reference)
    assert result.error_bound >= 0 and result.nodes <= 4001
