"""The benchmark scripts run (their figures go in notes and the README, never in assertions)."""

from __future__ import annotations

import json

from benchmarks import suite


def test_suite_quick_run_prints_a_table(tmp_path, capsys) -> None:
    out = tmp_path / "suite.json"
    assert suite.main(["--quick", "--backend", "mpmath", "--json", str(out)]) == 0
    printed = capsys.readouterr().out
    assert printed.startswith("| integrand |") and "sech-benchmark" in printed
    data = json.loads(out.read_text())
    assert data["summary"]["1e-06"]["false_certificates"] == 0
    assert all(row["ours_contains_exact"] for row in data["rows"])


def test_suite_has_the_required_coverage() -> None:
    kinds = {case.kind for case in suite.SUITE}
    assert len(suite.SUITE) >= 20 and kinds == {"smooth", "peaked", "oscillatory", "kink", "endpoint"}


def test_redteam_smoke_run_finds_no_false_certificate(capsys) -> None:
    """A few random formulas through the library paths, checked against flint at 200 bits (the long run is a
    documented command, not CI)."""
    from benchmarks import redteam

    assert redteam.main(["--cases", "6", "--seed", "5", "--deadline", "1", "--no-service"]) == 0
    printed = capsys.readouterr().out
    assert "| default | 6 |" in printed and "FINDING" not in printed


def test_redteam_reference_catches_a_wrong_enclosure() -> None:
    """The harness itself: an enclosure away from flint's ball is a miss, one around it is not."""
    from benchmarks import redteam

    case = redteam.Case("x^2", "0", "3", "1e-8", lambda x, _: x * x)  # closed form 9
    ball = redteam.reference_ball(case)
    assert redteam.verdict((8.999999, 9.000001), ball) == "ok"
    assert redteam.verdict((9.0000001, 9.1), ball) == "miss"


def test_parameters_redteam_smoke_run_finds_no_false_certificate(capsys) -> None:
    from benchmarks import parameters_redteam

    assert parameters_redteam.main(["--cases", "3", "--seed", "3", "--deadline", "1"]) == 0
    assert "| 3 |" in capsys.readouterr().out


def test_versus_flint_runs_each_rule(monkeypatch) -> None:
    from benchmarks import versus_flint
    from quadcert.arithmetic import release_flint_context

    monkeypatch.setattr(versus_flint, "ROWS", versus_flint.ROWS[:2])
    try:
        printed = versus_flint.table(versus_flint.run([1e-6], ("simpson", "gauss-legendre")))
    finally:
        release_flint_context()
    assert "| gauss-legendre | 1e-06 | gauss |" in printed and "| simpson | 1e-06 |" in printed
