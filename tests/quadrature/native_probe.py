"""Direct entry points into the compiled engine's layers, for its tests (not part of the engine)."""

from __future__ import annotations

from quadcert.quadrature import _fast


def taylor(compiled: _fast.Compiled, low: float, high: float, order: int) -> list[tuple[float, float]] | None:
    """Enclosures of f⁽ᵏ⁾(X)/k! over X = [low, high] from the compiled recurrences (None: not enclosable)."""
    assert _fast._native is not None
    return _fast._native.taylor(compiled.code, compiled.constants, compiled.stack, low, high, order)


def enclose_function(name: str, low: float, high: float, tight: bool = False) -> tuple[float, float] | None:
    """The guarded layer's enclosure of one function over [low, high], or with ``tight`` the tight tier's where
    it covers the function and the guarded one's elsewhere (None: outside its domain)."""
    assert _fast._native is not None
    return _fast._native.enclose(_fast.FUNCTION_CODES[name], low, high, tight)


def tight_ball(name: str, x: float) -> tuple[float, float, float] | None:
    """The tight tier's ball (midpoint high word, low word, radius) of f(x), or None where it does not cover x."""
    assert _fast._native is not None
    return _fast._native.tight(_fast.FUNCTION_CODES[name], x)


def tight_constant(index: int) -> tuple[float, float, float]:
    """The tight tier's ball of its constant ``index``: ln 2, pi/2, 1/ln 10, then 1/j! for j = 0..30."""
    assert _fast._native is not None
    ball = _fast._native.tight(-1, float(index))
    assert ball is not None
    return ball


def operate(
    op: str, a: tuple[float, float], b: tuple[float, float] = (0.0, 0.0), n: int = 0
) -> tuple[float, float] | None:
    assert _fast._native is not None
    codes = {"+": 0, "-": 1, "*": 2, "/": 3, "sqr": 4, "pow": 5}
    return _fast._native.operate(codes[op], a[0], a[1], b[0], b[1], n)


def run_status(formula: str, a: float, b: float, tolerance: float, rule: str, may_tighten: bool) -> str:
    """How the compiled engine ends on [a, b] (float limits), with or without its tight tier: ``met`` or why
    it declined (the outcome's label)."""
    return _run(formula, a, b, tolerance, rule, may_tighten)[0]


def models_built(formula: str, a: float, b: float, tolerance: float) -> tuple[str, int]:
    """How a Simpson run on [a, b] ends (as in run_status) and how many Taylor models it built."""
    return _run(formula, a, b, tolerance, "simpson", True)


def _run(formula: str, a: float, b: float, tolerance: float, rule: str, may_tighten: bool) -> tuple[str, int]:
    from quadcert.formula import parse
    from quadcert.quadrature._gauss import points_for as _gauss_points

    assert _fast._native is not None
    compiled = _fast.compile_formula(parse(formula), {})
    assert compiled is not None
    outcome = _fast._native.integrate(
        compiled.code,
        compiled.constants,
        compiled.stack,
        a,
        a,
        b,
        b,
        tolerance,
        0.0,
        0.0,
        10**7,
        False,
        _fast.RULE_CODES[rule],
        _fast._gauss_table(_gauss_points(tolerance)) if rule != "simpson" else (),
        may_tighten,
    )
    return _fast.Status(outcome[0]).label, outcome[7]


def model_fourth(
    compiled: _fast.Compiled, low: float, high: float, panel_low: float, panel_high: float
) -> tuple[float, float, float] | None:
    """f''''/4! over [panel_low, panel_high] from the compiled engine's Taylor model of f over [low, high], and the
    width of the remainder's part (None: no model there)."""
    assert _fast._native is not None
    return _fast._native.model(compiled.code, compiled.constants, compiled.stack, low, high, panel_low, panel_high)
