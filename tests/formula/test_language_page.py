"""docs/language.md and the README's summary stay in step with the parser's own catalogue of functions."""

from __future__ import annotations

import re
from pathlib import Path

from quadcert.formula import FUNCTIONS, parse
from quadcert.formula._catalogue import CATALOGUE, reference_table

ROOT = Path(__file__).resolve().parents[2]


def test_the_reference_page_lists_every_function_as_the_parser_knows_it() -> None:
    page = (ROOT / "docs" / "language.md").read_text(encoding="utf-8")
    assert reference_table() in page


def test_the_readme_summary_names_the_same_functions_in_the_same_order() -> None:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    section = readme.split("## The formula language", 1)[1].split("\n## ", 1)[0]
    listed = re.search(r"- functions: `([^`]+)`", section)
    assert listed is not None
    assert listed.group(1).split() == [f.name for f in CATALOGUE]
    assert set(FUNCTIONS) == {f.name for f in CATALOGUE}
    assert "docs/language.md" in section


def test_every_formula_on_the_page_parses() -> None:
    page = (ROOT / "docs" / "language.md").read_text(encoding="utf-8")
    examples = page.split("## Examples", 1)[1]
    formulas = re.findall(r"^\| `([^`]+)` \|", examples, flags=re.MULTILINE)
    assert len(formulas) >= 5
    for text in formulas + ["{ 5*x if x < 2; 10 if x < 5; 10*(6 - x) otherwise }"]:
        parse(text)
