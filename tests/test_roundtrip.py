"""Every value's ``text`` and ``display`` in the JSON record read back in with the same parser.

spec: The JSON record → "`text` is written in this format's own expression
syntax, so it reads back in with the same parser".  The display form (the
factored form a reader sees) is held to the same promise.  The test appends
``check NAME == TEXT`` and ``check NAME == DISPLAY`` per value to each
bundled derivation and builds the result: every such claim must hold, so
the printed forms are not only parseable but denote the very value that was
computed.
"""
from __future__ import annotations

import shutil

import pytest

from support import DOCUMENTS, SETTLED, compile_text


@pytest.mark.parametrize("path", DOCUMENTS, ids=lambda p: p.stem)
def test_value_texts_read_back_to_the_same_values(path, bundled, bundled_folder, tmp_path):
    record = bundled(path.stem).record
    values = record["values"]
    assert values, "a bundled derivation binds values"
    claims = "\n".join(f"check {name} == {value[form]}" for name, value in values.items()
                       for form in ("text", "display"))
    text = path.read_text(encoding="utf-8") + "\n\n```derive\n" + claims + "\n```\n"
    # in a copy of the whole built folder, for the documents this one uses; its
    # cache (signed by this session) restores the document's own steps, so only
    # the read-back claims are computed here
    folder = shutil.copytree(bundled_folder / "derivations", tmp_path / "d")
    again = compile_text(folder / path.name, text, use_cache=True)
    readback = again.steps[len(record["steps"]):]
    assert len(readback) == 2 * len(values)
    for step in readback:
        assert step.status in SETTLED, (step.source[:200], step.checks)
    # the display form is an exact identity, never a numerical coincidence
    displays = readback[1::2]
    assert all(step.status == "proven" for step in displays), [s.source[:200] for s in displays
                                                               if s.status != "proven"]
