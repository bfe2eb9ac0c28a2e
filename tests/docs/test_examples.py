"""Every answer shown in the README and openapi-notes/ is what the service answers today.

Reference: the service itself, in-process; fields that vary between runs are left out of the comparison.
Regenerate with ``python -m tests.docs.examples --write`` after a change that alters an answer.
"""

from __future__ import annotations

import pytest

from tests.docs.examples import FILES, client, examples, masked, regenerate


@pytest.fixture(scope="module")
def running():
    with client() as test_client:
        yield test_client


def test_the_documents_have_generated_examples() -> None:
    assert sum(len(list(examples(path.read_text()))) for path in FILES) >= 8


@pytest.mark.parametrize("path", FILES, ids=[p.name for p in FILES])
def test_examples_match_real_answers(running, path) -> None:
    text = path.read_text()
    assert masked(regenerate(running, text)) == masked(text), (
        f"an example in {path.name} no longer matches what the service answers: run "
        "`python -m tests.docs.examples --write` and review the change"
    )
