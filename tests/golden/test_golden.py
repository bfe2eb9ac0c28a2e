"""Certified outputs change only with a new ENGINE_VERSION: caches and ETags are keyed by it.

Reference: the outputs stored in outputs.json (written by ``python -m tests.golden.cases --write``) for the
engine version named there.
"""

from __future__ import annotations

import json

import pytest

from quadcert import ENGINE_VERSION
from tests.golden.cases import CASES, STORED, run

STORED_OUTPUTS = json.loads(STORED.read_text())


def test_stored_outputs_belong_to_this_engine_version() -> None:
    assert STORED_OUTPUTS["engine_version"] == ENGINE_VERSION, (
        f"ENGINE_VERSION is {ENGINE_VERSION} but tests/golden/outputs.json was written for "
        f"{STORED_OUTPUTS['engine_version']}: run `python -m tests.golden.cases --write` and commit it"
    )
    assert set(STORED_OUTPUTS["cases"]) == {name for name, _, _ in CASES}


@pytest.mark.parametrize("name, call, arguments", CASES, ids=[c[0] for c in CASES])
def test_certified_outputs_are_unchanged(name: str, call: str, arguments: dict) -> None:
    expected = STORED_OUTPUTS["cases"][name]
    actual = run(call, arguments)
    assert actual == expected, (
        f"the certified output of golden case {name!r} changed while ENGINE_VERSION is still {ENGINE_VERSION}. "
        "Cached results and ETags would now match different bodies. If the change is intended, bump "
        "ENGINE_VERSION in service/quadcert/_version.py and run `python -m tests.golden.cases --write`."
    )
