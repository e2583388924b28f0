"""Every value's ``text`` in the JSON record reads back in with the same parser.

spec: The JSON record → "`text` is written in this format's own expression
syntax, so it reads back in with the same parser".  The test appends one
``check NAME == TEXT`` per value to each bundled derivation and builds the
result: every such claim must hold, so the printed text is not only parseable
but denotes the very value that was computed.
"""
from __future__ import annotations

import shutil

import pytest

from support import DOCUMENTS, SETTLED, compile_text


@pytest.mark.parametrize("path", DOCUMENTS, ids=lambda p: p.stem)
def test_value_texts_read_back_to_the_same_values(path, bundled, tmp_path):
    record = bundled(path.stem).record
    values = record["values"]
    assert values, "a bundled derivation binds values"
    claims = "\n".join(f"check {name} == {value['text']}" for name, value in values.items())
    text = path.read_text(encoding="utf-8") + "\n\n```derive\n" + claims + "\n```\n"
    # in a copy of the whole folder, for the documents this one uses
    folder = shutil.copytree(path.parent, tmp_path / "d", ignore=shutil.ignore_patterns(".*"))
    again = compile_text(folder / path.name, text)
    readback = again.steps[len(record["steps"]):]
    assert len(readback) == len(values)
    for step in readback:
        assert step.status in SETTLED, (step.source[:200], step.checks)
