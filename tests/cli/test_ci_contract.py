"""The CLI's exit codes are a contract for CI: 0 pass, 1 certified fail, 2 anything else, on every path.

References: closed forms (∫₀¹ x dx = 1/2, ∫₀³ x² dx = 9).
"""

from __future__ import annotations

import subprocess
import sys
import xml.etree.ElementTree as ET

import pytest

from quadcert.arithmetic import release_flint_context
from quadcert.cli import main
from quadcert.cli._main import build_parser


@pytest.fixture(autouse=True)
def _release_flint():
    yield
    release_flint_context()


def _run(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "quadcert.cli", *args], check=False, capture_output=True, text=True, timeout=120
    )


@pytest.mark.parametrize(
    "args",
    [
        ("check", "x", "0", "1", "--claimed", "0.5", "--tol", "1e-9", "--url", "http://127.0.0.1:9"),
        ("check", "x", "0", "1", "--claimed", "0.5", "--tol", "1e-9", "--url", "127.0.0.1:9"),
        ("check", "x", "0", "1", "--claimed", "0.5", "--tol", "1e-9", "--param", "w0:2"),
        ("check", "sinn(x)", "0", "1", "--claimed", "0.5", "--tol", "1e-9"),
        ("integrate", "x", "0", "1", "--timeout", "-1"),
        ("checks", "/nonexistent/checks.toml"),
    ],
)
def test_every_error_exits_2_with_one_line(args) -> None:
    done = _run(*args)
    assert done.returncode == 2, (args, done.stdout, done.stderr)
    assert "Traceback" not in done.stderr and len(done.stderr.strip().splitlines()) == 1, done.stderr


def test_junit_goes_into_new_folders_and_records_errors(tmp_path, capsys) -> None:
    report = tmp_path / "reports" / "nested" / "q.xml"
    assert main(["check", "x", "0", "1", "--claimed", "0.7", "--tol", "1e-9", "--junit", str(report)]) == 1
    assert ET.parse(report).getroot().find(".//failure") is not None
    assert main(["check", "sinn(x)", "0", "1", "--claimed", "0.7", "--tol", "1e-9", "--junit", str(report)]) == 2
    error = ET.parse(report).getroot().find(".//error")
    assert error is not None and "unknown_function" in error.get("message")


TOML = """
[defaults]
tolerance = 1e-9

[[check]]
name = "ninth"
integrand = "x^2"
lower_limit = 0
upper_limit = 3
claimed_value = 9.00000000000000000001   # 1e-20 from the exact 9: read as typed, not as float64

[[check]]
name = "scaled"
integrand = "k*x"
lower_limit = 0
upper_limit = 1
claimed_value = 1
parameters = { k = 2 }
"""


def test_a_file_of_checks_gives_one_report_and_the_right_exit_code(tmp_path, capsys) -> None:
    checks = tmp_path / "checks.toml"
    checks.write_text(TOML)
    report = tmp_path / "out" / "r.xml"
    assert main(["checks", str(checks), "--junit", str(report)]) == 0
    cases = ET.parse(report).getroot().findall(".//testcase")
    assert [c.get("name") for c in cases] == ["ninth", "scaled"]
    checks.write_text(TOML.replace("claimed_value = 1\n", "claimed_value = 1.5\n"))
    assert main(["checks", str(checks), "--junit", str(report)]) == 1
    csv_file = tmp_path / "checks.csv"
    csv_file.write_text(
        "\ufeffname,integrand,lower_limit,upper_limit,claimed_value,tolerance,parameter.k\n"
        "half,k*x,0,1,0.5,1e-9,1\nbroken,2x,0,1,1,1e-9,1\n",
        encoding="utf-8",
    )
    assert main(["checks", str(csv_file), "--junit", str(report)]) == 2  # one pass, one error
    root = ET.parse(report).getroot()
    assert root.get("tests") == "2" and root.get("errors") == "1"


def test_timeout_stops_long_work_without_a_verdict(capsys) -> None:
    code = main(
        ["integrate", "sin(1000*x)", "0", "9000", "--tol", "1e-12", "--max-nodes", "2000001", "--timeout", "0.5"]
    )
    assert code == 2


def test_every_command_documents_its_exit_codes_and_an_example() -> None:
    parser = build_parser()
    commands = parser._subparsers._group_actions[0].choices  # type: ignore[union-attr]
    for name, command in commands.items():
        text = command.format_help()
        assert "example:" in text and "exit codes:" in text, name
        if name != "serve":
            assert "certified fail" in text, name
            for action in command._actions:
                assert action.help, (name, action.dest)


def test_human_output_shows_certified_digits_and_the_applied_target(capsys) -> None:
    """exp over [0, 20] (closed form e^20 - 1 ≈ 485165194.41) with a relative tolerance: the target shown is
    the one applied, and the value shows only the digits the enclosure certifies."""
    assert main(["integrate", "exp(x)", "0", "20", "--tol", "1e-12", "--rel-tol", "1e-10"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[1].split()[1] == "485165194"
    assert "relative tolerance" in lines[3] and "tolerance 1e-12:" not in lines[3]
