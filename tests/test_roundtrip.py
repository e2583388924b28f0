"""Every value's ``text`` in the JSON record reads back in with the same parser.

spec: The JSON record → "`text` is written in this format's own expression
syntax, so it reads back in with the same parser".  The test appends one
``check NAME == TEXT`` per value to each bundled derivation and builds the
result: every such claim must hold, so the printed text is not only parseable
but denotes the very value that was computed.
"""
from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from compiler.engine import BuildOptions, build
from compiler.render.json import to_record

DERIVATIONS = sorted((Path(__file__).parent.parent / "derivations").glob("*.md"))


@pytest.mark.parametrize("path", DERIVATIONS, ids=lambda p: p.stem)
def test_value_texts_read_back_to_the_same_values(path, tmp_path):
    text = path.read_text(encoding="utf-8")
    report = build(str(path), text, BuildOptions(use_cache=False))
    values = to_record(report)["values"]
    assert values, "a bundled derivation binds values"
    claims = "\n".join(f"check {name} == {value['text']}" for name, value in values.items())
    # the whole folder, for the documents this one uses
    copy = Path(shutil.copytree(path.parent, tmp_path / "d", ignore=shutil.ignore_patterns(".*"))) / path.name
    copy.write_text(text + "\n\n```derive\n" + claims + "\n```\n", encoding="utf-8")
    again = build(str(copy), copy.read_text(encoding="utf-8"), BuildOptions(use_cache=False))
    readback = again.steps[len(report.steps):]
    assert len(readback) == len(values)
    for step in readback:
        assert step.status in ("proven", "sampled"), (step.source[:200], step.checks)
