"""A cache this user's own builds did not write can never change a verdict.

Issue 10 ("the cache can only save time"): every entry carries an HMAC made
with a secret kept outside the document folder, so a hand-edited, forged,
moved or malformed entry is ignored and its step recomputed; ``recompute``
mode computes every step and reports where the cache disagrees.  The rule is
anomark's own (common practice, no source).
"""
from __future__ import annotations

import json
import os
import stat

import pytest

from compiler.engine import BuildOptions, build
from compiler.engine.cache import CACHE_DIR, sign, signing_key

# 2 + 2 == 5 is false (common practice, no source); 2 + 2 == 4 holds.
DOC = "```derive\nsymbol N: integer, positive\nlet a = 2 + 2\ncheck a == 5\ncheck a == 4\n```\n"


pytestmark = pytest.mark.usefixtures("key_folder")


def build_at(tmp_path, **options):
    path = tmp_path / "doc.md"
    path.write_text(DOC)
    return build(str(path), DOC, BuildOptions(**options))


def load(tmp_path) -> dict:
    return json.loads((tmp_path / CACHE_DIR / "doc.md.json").read_text())


def save(tmp_path, data) -> None:
    (tmp_path / CACHE_DIR / "doc.md.json").write_text(json.dumps(data))


def key_of(data, predicate) -> str:
    return next(k for k, e in data["entries"].items() if predicate(e["entry"]))


def is_false_check(entry) -> bool:
    return entry["checks"] and entry["checks"][0]["status"] == "failed"


def test_a_failed_check_edited_to_proven_stays_failed(tmp_path):
    build_at(tmp_path)
    data = load(tmp_path)
    data["entries"][key_of(data, is_false_check)]["entry"]["checks"][0]["status"] = "proven"
    save(tmp_path, data)
    report = build_at(tmp_path)
    assert not report.passed and report.steps[2].status == "failed"
    assert not report.steps[2].cached and report.cached_steps == 2


def test_a_forged_value_with_the_checks_entry_deleted_is_not_used(tmp_path):
    build_at(tmp_path)
    data = load(tmp_path)
    del data["entries"][key_of(data, is_false_check)]
    value = data["entries"][key_of(data, lambda e: "a" in e["outputs"])]["entry"]
    value["outputs"]["a"] = {"expr": "5"}
    value["values"][0].update(text="5")
    save(tmp_path, data)
    report = build_at(tmp_path)
    assert report.values["a"].text == "4"
    assert [s.status for s in report.steps] == ["proven", "proven", "failed", "proven"]


def test_an_entry_signed_with_another_key_is_not_trusted(tmp_path):
    build_at(tmp_path)
    data = load(tmp_path)
    key = key_of(data, is_false_check)
    data["entries"][key]["entry"]["checks"][0]["status"] = "proven"
    data["entries"][key]["mac"] = sign(b"someone else's secret", key, data["entries"][key]["entry"])
    save(tmp_path, data)
    assert build_at(tmp_path).steps[2].status == "failed"


def test_a_true_checks_entry_moved_under_a_false_checks_key_is_not_trusted(tmp_path):
    build_at(tmp_path)
    data = load(tmp_path)
    false_key = key_of(data, is_false_check)
    true_key = key_of(data, lambda e: e["checks"] and e["checks"][0]["what"] == "a == 4")
    data["entries"][false_key] = data["entries"][true_key]
    save(tmp_path, data)
    assert build_at(tmp_path).steps[2].status == "failed"


@pytest.mark.parametrize("content", [
    "[" * 100_000 + "]" * 100_000,
    '{"format": 2, "entries": {"k": {"mac": "00", "entry": ' + "[" * 50_000 + "]" * 50_000 + "}}}",
    '{"format": 2, "entries": {"k": {"mac": ' + "9" * 10_000 + ', "entry": {}}}}',
], ids=["nested-file", "nested-entry", "huge-integer"])
def test_hostile_cache_data_is_ignored_without_a_crash(tmp_path, content):
    build_at(tmp_path)
    (tmp_path / CACHE_DIR / "doc.md.json").write_text(content)
    report = build_at(tmp_path)
    assert report.cached_steps == 0 and [s.status for s in report.steps][-2:] == ["failed", "proven"]


def test_the_key_lives_outside_the_document_folder_readable_by_its_owner_only(tmp_path, key_folder):
    build_at(tmp_path)
    key = key_folder / "key"
    assert stat.S_IMODE(key.stat().st_mode) == 0o600
    assert len(bytes.fromhex(key.read_text())) == 32
    assert not any(p.name == "key" for p in tmp_path.rglob("*"))


def test_a_key_others_may_write_disables_the_cache(tmp_path, key_folder):
    build_at(tmp_path)
    os.chmod(key_folder / "key", 0o666)
    assert signing_key() is None
    assert build_at(tmp_path).cached_steps == 0


def test_recompute_agrees_with_an_honest_cache(tmp_path):
    build_at(tmp_path)
    report = build_at(tmp_path, recompute=True)
    assert report.cached_steps == 0
    assert [s.status for s in report.steps] == ["proven", "proven", "failed", "proven"]
    assert len(report.diagnostics) == 1


def test_recompute_reports_a_disagreement_at_the_steps_location(tmp_path):
    # An entry signed with the user's own key that still disagrees (say, a bug in an old
    # version): only recompute mode can see it.
    build_at(tmp_path)
    data = load(tmp_path)
    key = key_of(data, is_false_check)
    data["entries"][key]["entry"]["checks"][0]["status"] = "proven"
    data["entries"][key]["mac"] = sign(signing_key(), key, data["entries"][key]["entry"])
    save(tmp_path, data)
    report = build_at(tmp_path, recompute=True)
    step = report.steps[2]
    assert step.status == "error" and "cache" in step.checks[-1].detail
    located = [d for d in report.diagnostics if d.startswith(f"{tmp_path / 'doc.md'}:4:1:")]
    assert any("cache holds a different check outcome (proven; recomputed: failed)" in d
               for d in located), report.diagnostics


def test_a_full_disk_while_saving_leaves_no_temporary_file(tmp_path, monkeypatch):
    # issue 10: "temporary files are removed on every failure path"; the cache is never needed
    from compiler.engine import cache as cache_module

    assert signing_key() is not None  # the key is made before the disk fills

    def full(fd, *args, **kwargs):  # the temporary file exists; writing into it fails
        os.close(fd)
        raise OSError(28, "No space left on device")
    monkeypatch.setattr(cache_module.os, "fdopen", full)
    report = build_at(tmp_path)
    assert [s.status for s in report.steps] == ["proven", "proven", "failed", "proven"]
    assert list((tmp_path / CACHE_DIR).iterdir()) == []


def test_a_plot_beyond_float_range_is_simply_not_cached(tmp_path):
    # 10^400 x^2 overflows a float at every sample but 0: such a step is recomputed, never a crash
    text = "```derive\nsymbol x\nlet f = 10^400*x^2\nplot f over x in 0..1\n```\n"
    path = tmp_path / "doc.md"
    path.write_text(text)
    cold = build(str(path), text, BuildOptions())
    warm = build(str(path), text, BuildOptions())
    assert [s.cached for s in warm.steps] == [False, True, False]
    assert warm.steps[-1].plot == cold.steps[-1].plot
