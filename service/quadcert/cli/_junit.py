"""JUnit XML reports for CI systems: one testcase per check."""

from __future__ import annotations

import os
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from typing import Literal


@dataclass(frozen=True)
class CaseOutcome:
    name: str
    verdict: Literal["pass", "fail", "undecided", "error"]
    message: str
    seconds: float


def write_report(path: str, cases: list[CaseOutcome], suite: str = "quadcert") -> None:
    failures = sum(c.verdict == "fail" for c in cases)
    errors = sum(c.verdict in ("undecided", "error") for c in cases)
    root = ET.Element("testsuites", name=suite, tests=str(len(cases)), failures=str(failures), errors=str(errors))
    node = ET.SubElement(
        root,
        "testsuite",
        name=suite,
        tests=str(len(cases)),
        failures=str(failures),
        errors=str(errors),
        time=f"{sum(c.seconds for c in cases):.6f}",
    )
    for case in cases:
        element = ET.SubElement(
            node, "testcase", name=case.name, classname=f"{suite}.check", time=f"{case.seconds:.6f}"
        )
        if case.verdict == "fail":
            ET.SubElement(element, "failure", message=case.message, type="certified_fail").text = case.message
        elif case.verdict in ("undecided", "error"):
            ET.SubElement(element, "error", message=case.message, type=case.verdict).text = case.message
        else:
            ET.SubElement(element, "system-out").text = case.message
    folder = os.path.dirname(path)
    if folder:
        os.makedirs(folder, exist_ok=True)  # reports/x.xml in a fresh CI workspace
    ET.ElementTree(root).write(path, encoding="utf-8", xml_declaration=True)
