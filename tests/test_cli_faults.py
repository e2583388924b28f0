"""Faults around the build, driven in-process through ``compiler.cli.main``.

Issue 10: an output folder that is a file or cannot be written, an output
that would overwrite the input, and a write that fails half-way all exit 2
with a message naming the file or folder, and leave no temporary file
behind; ``check --recompute`` reports a cache that disagrees.  Anomark's own
rules (common practice, no source).
"""
from __future__ import annotations

import errno
import json
import os

import pytest

from compiler import cli
from compiler.engine.cache import CACHE_DIR, sign, signing_key

DOC = "# Doc\n\n```derive\nsymbol N\nlet a = N + 1\ncheck a == N + 1\n```\n"


pytestmark = pytest.mark.usefixtures("key_folder")


def every_file(folder):
    return sorted(p.relative_to(folder).as_posix() for p in folder.rglob("*") if p.is_file())


def test_a_document_named_like_an_output_is_never_overwritten(tmp_path, capsys):
    doc = tmp_path / "notes.json"
    doc.write_text(DOC)
    assert cli.main(["build", str(doc), "--quiet"]) == 2
    assert doc.read_text() == DOC
    assert f"{doc}: the output would overwrite the document itself" in capsys.readouterr().err
    assert every_file(tmp_path) == sorted(["notes.json", f"{CACHE_DIR}/notes.json.json"])


def test_an_output_folder_that_is_a_file_is_refused(tmp_path, capsys):
    (tmp_path / "doc.md").write_text(DOC)
    (tmp_path / "out").write_text("a file")
    assert cli.main(["build", str(tmp_path / "doc.md"), "-o", str(tmp_path / "out"), "--quiet"]) == 2
    assert f"{tmp_path / 'out'}: not a folder" in capsys.readouterr().err
    assert (tmp_path / "out").read_text() == "a file"


@pytest.mark.parametrize("fail_on", ["write", "replace"])
def test_a_failed_write_leaves_no_temporary_file_and_names_the_folder(tmp_path, capsys, monkeypatch,
                                                                       fail_on):
    # a full disk, simulated: the second file cannot be written or moved into place
    (tmp_path / "doc.md").write_text(DOC)
    out = tmp_path / "out"
    # a first build keeps the compiled templates, so the files below are the only writes
    assert cli.main(["build", str(tmp_path / "doc.md"), "-o", str(tmp_path / "first"), "--quiet",
                     "--no-cache"]) == 0
    calls = []

    def full(real):
        def call(*args, **kwargs):
            calls.append(args)
            if len(calls) == 2:
                raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
            return real(*args, **kwargs)
        return call
    if fail_on == "write":
        monkeypatch.setattr(cli.os, "fdopen", full(os.fdopen))
    else:
        monkeypatch.setattr(cli.os, "replace", full(os.replace))
    code = cli.main(["build", str(tmp_path / "doc.md"), "-o", str(out), "--quiet", "--no-cache"])
    assert code == 2
    assert f"cannot write into {out}: {os.strerror(errno.ENOSPC)}" in capsys.readouterr().err
    assert not [name for name in every_file(out) if name.startswith(".")]


def test_check_recompute_reports_a_disagreeing_cache_at_the_step(tmp_path, capsys):
    doc = tmp_path / "doc.md"
    doc.write_text(DOC)
    assert cli.main(["check", str(doc), "--quiet"]) == 0
    assert cli.main(["check", str(doc), "--quiet", "--recompute"]) == 0
    cache = tmp_path / CACHE_DIR / "doc.md.json"
    data = json.loads(cache.read_text())
    key = next(k for k, e in data["entries"].items() if e["entry"]["outputs"].get("a"))
    entry = data["entries"][key]["entry"]
    entry["values"][0]["text"] = "N + 7"
    data["entries"][key]["mac"] = sign(signing_key(), key, entry)
    cache.write_text(json.dumps(data))
    capsys.readouterr()
    assert cli.main(["check", str(doc), "--quiet", "--recompute"]) == 2
    assert capsys.readouterr().err == (f"{doc}:5:1: recomputed, the step disagrees with the cache: "
                                       "the cache holds a different shown value\n")
