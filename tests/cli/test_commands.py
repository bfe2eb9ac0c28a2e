"""The CLI in-process (offline mode): output, exit codes, JUnit and CSV files."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET

import pytest

from quadcert.arithmetic import release_flint_context
from quadcert.cli import main
from tests.conftest import HP, encloses


@pytest.fixture(autouse=True)
def _release_flint():
    yield
    release_flint_context()  # the CLI claims flint's context for its own process; undo that between tests


def test_integrate_human_and_json(capsys) -> None:
    assert main(["integrate", "exp(x)", "0", "2", "--tol", "1e-10"]) == 0
    out = capsys.readouterr().out
    assert "enclosure" in out and "certified" in out
    assert main(["integrate", "exp(x)", "0", "2", "--tol", "1e-10", "--json"]) == 0
    body = json.loads(capsys.readouterr().out)
    assert encloses(body["enclosure"], HP.e**2 - 1)  # closed form


def test_integrate_negative_limits_parameters_and_mesh(capsys) -> None:
    assert main(["integrate", "a*abs(t)", "-1", "1", "--var", "t", "--param", "a=2", "--mesh"]) == 0
    out = capsys.readouterr().out
    assert "mesh:" in out and "simpson-f1" in out


@pytest.mark.parametrize("claimed, code, verdict", [(9.0, 0, "pass"), (9.01, 1, "fail")])
def test_check_exit_codes_and_junit(tmp_path, capsys, claimed, code, verdict) -> None:
    report = tmp_path / "r.xml"
    assert (
        main(
            [
                "check",
                "x^2",
                "0",
                "3",
                "--claimed",
                str(claimed),
                "--tol",
                "1e-6",
                "--junit",
                str(report),
                "--name",
                "area under x^2",
            ]
        )
        == code
    )
    assert capsys.readouterr().out.startswith(verdict)
    suite = ET.parse(report).getroot().find("testsuite")
    case = suite.find("testcase")
    assert case.get("name") == "area under x^2"
    assert (case.find("failure") is not None) == (verdict == "fail")


def test_check_undecided_and_error_exit_2(tmp_path, capsys) -> None:
    assert main(["check", "sin(30*x)^2", "0", "3", "--claimed", "1.5", "--tol", "1e-13", "--max-nodes", "9"]) == 2
    assert capsys.readouterr().out.startswith("undecided")
    report = tmp_path / "e.xml"
    assert main(["check", "sinn(x)", "0", "1", "--claimed", "1", "--tol", "1e-6", "--junit", str(report)]) == 2
    assert "unknown_function" in capsys.readouterr().err
    assert ET.parse(report).getroot().find("testsuite/testcase/error") is not None


def test_batch_csv(tmp_path, capsys) -> None:
    source = tmp_path / "in.csv"
    source.write_text("integrand,lower_limit,upper_limit,tolerance\n1/x,1,2,1e-10\n2x,0,1,\nlog(x),-1,1,\n")
    target = tmp_path / "out.csv"
    assert main(["batch", str(source), "-o", str(target)]) == 2
    lines = target.read_text().splitlines()
    assert lines[0].startswith("integrand,lower_limit,upper_limit,tolerance,status,value")
    assert len(lines) == 4
    assert ",certified," in lines[1] and "implicit_multiplication" in lines[2] and "undefined_at_point" in lines[3]
    assert "1 of 3 rows certified" in capsys.readouterr().err


def test_batch_requires_columns(tmp_path, capsys) -> None:
    source = tmp_path / "bad.csv"
    source.write_text("formula,a,b\nx,0,1\n")
    assert main(["batch", str(source)]) == 2
    assert "invalid_csv" in capsys.readouterr().err


def test_plan(capsys) -> None:
    assert main(["plan", "exp(x)", "0", "2", "--tol", "0.5e-4"]) == 0
    out = capsys.readouterr().out
    assert "15 nodes" in out and "315 nodes" in out


def test_formula_error_exits_2(capsys) -> None:
    assert main(["integrate", "2x", "0", "1"]) == 2
    assert "implicit_multiplication" in capsys.readouterr().err


def test_claimed_value_is_read_as_typed(capsys) -> None:
    """9.00000000000000015 is 1.5e-16 from the exact 9 (closed form ∫₀³ x² dx); as a float64 it would be 9.0."""
    from decimal import Decimal

    code = main(["check", "x^2", "0", "3", "--claimed", "9.00000000000000015", "--tol", "1e-16", "--json"])
    body = json.loads(capsys.readouterr().out, parse_float=Decimal)
    assert code != 0 and body["verdict"] != "pass"
    assert str(body["claimed_value"]) == "9.00000000000000015"


def test_printed_bounds_round_outward(capsys) -> None:
    """The error bound is printed rounded up at 6 digits, never to nearest."""
    from decimal import Decimal

    assert main(["integrate", "exp(x)", "0", "2", "--tol", "1e-10"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert main(["integrate", "exp(x)", "0", "2", "--tol", "1e-10", "--json"]) == 0
    body = json.loads(capsys.readouterr().out, parse_float=Decimal)
    printed = Decimal(lines[3].split()[2])
    assert printed >= body["error_bound"]


def test_batch_reads_spreadsheet_exports_and_parameter_columns(tmp_path, capsys) -> None:
    """A UTF-8 byte-order mark and semicolons, as comma-decimal spreadsheets export them; one column per
    parameter, so one file sweeps k. Closed form: ∫₀¹ k·x dx = k/2."""
    source = tmp_path / "sweep.csv"
    source.write_bytes("\ufeffintegrand;lower_limit;upper_limit;parameter.k\nk*x;0;1;2\nk*x;0;1;3\n".encode())
    out = tmp_path / "out.csv"
    assert main(["batch", str(source), "-o", str(out)]) == 0
    lines = out.read_text().splitlines()
    assert lines[0].split(";")[:4] == ["integrand", "lower_limit", "upper_limit", "parameter.k"]
    header = lines[0].split(";")
    for line, k in zip(lines[1:], (2, 3)):
        row = dict(zip(header, line.split(";")))
        assert float(row["low"]) <= k / 2 <= float(row["high"])
        assert row["status"] == "certified" and row["detail"] == ""  # success rows leave detail empty


def test_integrate_with_bounds_and_sensitivities(capsys) -> None:
    argv = ["integrate", "P*x*(L - x)", "0", "L", "--param", "P=1.9..2.1", "--param", "L=10±0.05", "--tol", "1e-9"]
    assert main([*argv, "--sensitivities"]) == 0
    out = capsys.readouterr().out
    assert "parameter spread" in out and "d/dP" in out and "d/dL" in out and "certified" in out
    assert main([*argv, "--json"]) == 0
    body = json.loads(capsys.readouterr().out)
    # ∫₀ᴸ P·x·(L − x) dx = P·L³/6 (closed form), at the box's extreme corners
    assert encloses(body["enclosure"], HP.mpf("1.9") * HP.mpf("9.95") ** 3 / 6)
    assert encloses(body["enclosure"], HP.mpf("2.1") * HP.mpf("10.05") ** 3 / 6)
    assert body["discretisation_bound"] is not None and body["sensitivities"] is None


def test_files_take_bounds_in_parameter_columns_and_tables(tmp_path, capsys) -> None:
    """CSV text ``low..high`` and a TOML table {low, high}. Closed form: ∫₀¹ k·x dx = k/2."""
    source = tmp_path / "sweep.csv"
    source.write_text("integrand,lower_limit,upper_limit,parameter.k\nk*x,0,1,0.9..1.1\n")
    out = tmp_path / "out.csv"
    assert main(["batch", str(source), "-o", str(out)]) == 0
    header, line = out.read_text().splitlines()
    row = dict(zip(header.split(","), line.split(",")))
    assert float(row["low"]) <= 0.45 and 0.55 <= float(row["high"]) and row["status"] == "certified"
    checks = tmp_path / "checks.toml"
    checks.write_text(
        '[[check]]\nname = "k within bounds"\nintegrand = "k*x"\nlower_limit = 0\nupper_limit = 1\n'
        "claimed_value = 0.5\ntolerance = 0.06\nparameters = { k = { low = 0.9, high = 1.1 } }\n"
    )
    assert main(["checks", str(checks)]) == 0  # |k/2 − 0.5| <= 0.05 for every k in the box


def test_integrate_with_the_gauss_legendre_rule(capsys) -> None:
    assert (
        main(["integrate", "sin(200*x)*exp(-x)", "0", "5", "--tol", "1e-8", "--rule", "gauss-legendre", "--json"]) == 0
    )
    body = json.loads(capsys.readouterr().out)
    # ∫₀⁵ sin(200x)e^(−x) dx = (200 − e^(−5)(sin 1000 + 200 cos 1000))/(1 + 200²) (closed form)
    exact = (200 - HP.exp(-5) * (HP.sin(1000) + 200 * HP.cos(1000))) / (1 + 200**2)
    assert encloses(body["enclosure"], exact) and body["bounds_used"] == {"gauss-legendre-10": body["panels"]}
