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
