"""Rebuilds with nothing to do, and several documents in one command.

An unchanged rebuild repeats what the last build said without building
(the signed record of ``compiler.outputs``); any change to what a build
reads, and any record this user's builds did not write, builds again.  The
rules are anomark's own (common practice, no source); the arithmetic is
2 + 2 = 4 (common practice, no source).
"""
from __future__ import annotations

import json

import pytest

from compiler.engine.cache import CACHE_DIR, sign

pytestmark = pytest.mark.usefixtures("key_folder")

PASSES = "# Passes\n\n```derive\nsymbol N\nlet a = N\ncheck a == N\n```\n"
FAILS = "# Fails\n\n```derive\nlet a = 2 + 2\ncheck a == 5\n```\n"
USES = '# Uses\n\n```derive\nuse "common.md"\nlet b = 2*a\ncheck b == 8\n```\n'
COMMON = "```derive\nlet a = 2 + 2\n```\n"


def write(folder, name, text):
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def record_file(doc):
    return doc.parent / CACHE_DIR / f"{doc.name}.outputs.json"


def test_an_unchanged_rebuild_says_the_same_without_building(anomark, tmp_path):
    doc = write(tmp_path, "fails.md", FAILS)
    first = anomark("build", str(doc))
    assert first.returncode == 1 and "wrote" in first.stderr and ":5:" in first.stderr
    html = (tmp_path / "fails.html").stat().st_mtime_ns
    again = anomark("build", str(doc))
    assert again.returncode == 1 and "up to date" in again.stderr
    # the failed check's located line is said again, word for word
    assert [l for l in again.stderr.splitlines() if ":5:" in l] == \
        [l for l in first.stderr.splitlines() if ":5:" in l]
    assert (tmp_path / "fails.html").stat().st_mtime_ns == html


def test_a_record_edited_to_pass_is_not_believed(anomark, tmp_path):
    doc = write(tmp_path, "fails.md", FAILS)
    anomark("build", str(doc))
    data = json.loads(record_file(doc).read_text())
    data["entry"]["status"] = 0
    data["entry"]["summary"] = "fails.md: passed"
    record_file(doc).write_text(json.dumps(data))
    proc = anomark("build", str(doc))
    assert proc.returncode == 1 and "wrote" in proc.stderr and "FAILED" in proc.stderr


def test_a_record_signed_with_another_key_is_not_believed(anomark, tmp_path):
    doc = write(tmp_path, "fails.md", FAILS)
    anomark("build", str(doc))
    data = json.loads(record_file(doc).read_text())
    data["entry"]["status"] = 0
    data["mac"] = sign(b"another user's secret", "any key", data["entry"])
    record_file(doc).write_text(json.dumps(data))
    assert anomark("build", str(doc)).returncode == 1


def test_a_changed_used_document_option_or_report_builds_again(anomark, tmp_path):
    doc = write(tmp_path, "uses.md", USES)
    write(tmp_path, "common.md", COMMON)
    assert anomark("build", str(doc)).returncode == 0
    assert "up to date" in anomark("build", str(doc)).stderr
    write(tmp_path, "common.md", COMMON.replace("2 + 2", "2 + 3"))
    proc = anomark("build", str(doc))
    assert proc.returncode == 1 and "wrote" in proc.stderr  # b = 10 now
    assert "wrote" in anomark("build", str(doc), "--format", "json").stderr
    (tmp_path / "uses.json").write_text("{}")
    assert "wrote" in anomark("build", str(doc), "--format", "json").stderr
    assert json.loads((tmp_path / "uses.json").read_text())["passed"] is False


def test_a_build_with_an_error_keeps_no_record(anomark, tmp_path):
    doc = write(tmp_path, "errs.md", "```derive\nsymbol x\nlet a = 1/(x - x)\n```\n")
    assert anomark("build", str(doc)).returncode == 2
    assert not record_file(doc).exists()
    assert "wrote" in anomark("build", str(doc)).stderr


def test_several_documents_build_in_one_command_with_the_worst_status(anomark, tmp_path):
    good, bad = write(tmp_path, "passes.md", PASSES), write(tmp_path, "fails.md", FAILS)
    proc = anomark("build", str(good), str(bad), "-o", str(tmp_path / "out"))
    assert proc.returncode == 1
    assert {p.name for p in (tmp_path / "out").iterdir()} == \
        {"passes.html", "passes.json", "fails.html", "fails.json"}
    assert "passes.md: passed" in proc.stderr and "fails.md: FAILED" in proc.stderr


def test_two_documents_with_one_stem_into_one_folder_are_refused(anomark, tmp_path):
    (tmp_path / "a").mkdir(), (tmp_path / "b").mkdir()
    one, two = write(tmp_path / "a", "doc.md", PASSES), write(tmp_path / "b", "doc.md", PASSES)
    proc = anomark("build", str(one), str(two), "-o", str(tmp_path / "out"))
    assert proc.returncode == 2 and "same reports" in proc.stderr
    assert not (tmp_path / "out").exists()


# ---------------------------------------------------------------- compiled templates

def forge_compiled_templates(folder, secret: bytes) -> int:
    """Replace every kept compiled template by one that renders FORGED, signed with ``secret``."""
    import hashlib
    import hmac
    import io
    import pickle

    import jinja2
    from jinja2.bccache import Bucket, bc_magic

    env = jinja2.Environment()
    code = env.compile("FORGED", "forged", None)
    forged = 0
    for path in folder.glob("*.template"):
        body = io.BytesIO(path.read_bytes()[32:])
        assert body.read(len(bc_magic)) == bc_magic
        bucket = Bucket(env, path.stem, pickle.load(body))  # the real template's checksum
        bucket.code = code
        data = bucket.bytecode_to_string()
        path.write_bytes(hmac.new(secret, data, hashlib.sha256).digest() + data)
        forged += 1
    return forged


@pytest.mark.parametrize("own_key", [True, False])
def test_only_compiled_templates_signed_with_the_users_key_are_loaded(anomark, tmp_path, key_folder, own_key):
    # a compiled template is code: one this user's builds did not sign is compiled again from
    # the template; the control (own key) shows that a signed one is indeed what gets loaded
    doc = write(tmp_path, "passes.md", PASSES)
    assert anomark("build", str(doc), "--no-cache").returncode == 0
    honest = (tmp_path / "passes.html").read_text()
    secret = bytes.fromhex((key_folder / "key").read_text().strip()) if own_key else b"someone else"
    assert forge_compiled_templates(key_folder / "templates", secret) >= 1
    assert anomark("build", str(doc), "--no-cache").returncode == 0
    html = (tmp_path / "passes.html").read_text()
    assert (html == "FORGED") if own_key else (html == honest)
