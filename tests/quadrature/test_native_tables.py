"""The tables the compiled engine and Python share are checked at import, and a difference switches the
compiled engine off; its declines are counted with their reason."""

from __future__ import annotations

import pytest

from quadcert import integrate
from quadcert.quadrature import _fast
from quadcert.quadrature._native_tables import FUNCTION_CODES, Op, Status, disagreement, expected

pytestmark = pytest.mark.skipif(not _fast.AVAILABLE, reason="built without the compiled engine")


def test_the_extension_reports_the_same_tables() -> None:
    from quadcert.quadrature import _native

    assert _fast.TABLE_DISAGREEMENT is None
    assert disagreement(_native.tables()) is None


@pytest.mark.parametrize("table", ["opcodes", "effects", "status", "max_depth", "max_power", "order"])
def test_any_difference_is_found(table: str) -> None:
    from quadcert.quadrature import _native

    reported = _native.tables()
    value = reported[table]
    if isinstance(value, dict):
        key = next(iter(value))
        reported[table] = {**value, key: value[key] + 1}
    else:
        reported[table] = value + 1
    found = disagreement(reported)
    assert found is not None and found.startswith(table)


def test_a_changed_peano_constant_is_found() -> None:
    """The constants are compared as exact ratios: 2/81 written as 4/162 agrees, 2/80 does not."""
    from quadcert.quadrature import _native

    reported = _native.tables()
    reported["peano"] = [reported["peano"][0], reported["peano"][1], (4.0, 162.0), reported["peano"][3]]
    assert disagreement(reported) is None
    reported["peano"][2] = (2.0, 80.0)
    assert disagreement(reported) is not None and "peano" in disagreement(reported)


def test_names_and_codes() -> None:
    assert FUNCTION_CODES["log10"] is Op.LOG10 and int(Op.ABS) == 34
    assert Status(-3).label == "resolution" and Status(0).label == "met"
    assert expected()["opcodes"]["^"] == int(Op.POWR)


def test_declines_are_counted_with_their_reason() -> None:
    """1e-15 on an integral near 1.5: float64's rounding alone is a visible share of the goal, so the
    compiled engine hands the request over; the precise engine certifies it (closed form e^1 − e^0.4)."""
    before = _fast.declines().get("resolution", 0) + _fast.declines().get("stalled", 0)
    result = integrate("exp(x)", "0.4", 1, 1e-15)
    after = _fast.declines().get("resolution", 0) + _fast.declines().get("stalled", 0)
    assert result.tolerance_met and result.precision_bits > 53
    assert after > before
