"""The build cache (spec, "Precise rules → JSON and command line": "the cache
folder sits beside the document and is never needed for correctness").

Every test builds in-process, so the code fingerprint in the cache keys is
the same for the cold and the warm build.  "Never needed for correctness"
is tested the strict way: a warm build, and a build over a damaged cache,
must give the same record as a build with the cache off.
"""
from __future__ import annotations

import json
import os
import stat

import pytest

from compiler.engine import BuildOptions, build
from compiler.engine.cache import CACHE_DIR, sign, signing_key
from compiler.render.html import to_html
from compiler.render.json import to_json as full_json
from support import compile_text

pytestmark = pytest.mark.usefixtures("key_folder")


def to_json(report):
    """The record without the count of cached steps (the one key a warm build changes)."""
    record = json.loads(full_json(report))
    record.pop("cached_steps")
    return json.dumps(record)

DOC = """# Cache

Value @{f0}.

```derive
symbol N: integer, positive
symbol x
bundle T: real, rank 4
let a = N^2*p1(T)
let b = a + p2(T)
let c = N + 1
check b == N^2*p1(T) + p2(T)
let f = -x^2 + 2*c*x
maximize f over x -> x0, f0
show f0
table c for N = 1..3
plot f over x in 0..2 for N = 1
check sqrt(c)^2 == c
check sqrt(x^2 + 2*sqrt(x^2) + 1) == sqrt(x^2) + 1
```
"""


def build_at(path, text=None, **options):
    """Build with the cache on unless asked otherwise."""
    options.setdefault("use_cache", True)
    return compile_text(path, DOC if text is None else text, **options)


def cache_file(tmp_path, name="doc.md"):
    return tmp_path / CACHE_DIR / f"{name}.json"


DECLARATIONS = ("symbol", "bundle", "convention", "split", "fiber")


def cacheable(report):
    """Steps of the kinds the cache keeps: everything but declarations."""
    return [s for s in report.steps if s.kind not in DECLARATIONS]


def test_warm_rebuild_is_identical_and_cached(tmp_path):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    doc = tmp_path / "doc.md"
    cold = build_at(doc)
    warm = build_at(doc)
    fresh = build_at(doc, use_cache=False)
    assert to_json(cold) == to_json(warm) == to_json(fresh)
    assert to_html(cold) == to_html(warm)
    assert not any(s.cached for s in cold.steps)
    steps = cacheable(warm)
    assert len(steps) == 11 and all(s.cached for s in steps)
    assert (cold.cached_steps, warm.cached_steps) == (0, 11)
    assert json.loads(full_json(warm))["cached_steps"] == 11


def test_editing_a_statement_recomputes_it_and_its_dependents_only(tmp_path):
    # spec: Precise rules → JSON and command line (cache); dependents are the steps that read c
    doc = tmp_path / "doc.md"
    build_at(doc)
    edited = build_at(doc, DOC.replace("let c = N + 1", "let c = N + 2"))
    recomputed = {s.source.split(" =")[0].split(" over")[0] for s in cacheable(edited) if not s.cached}
    assert recomputed == {"let c", "let f", "maximize f", "show f0", "table c for N", "plot f",
                          "check sqrt(c)^2"}
    assert to_json(edited) == to_json(build_at(doc, DOC.replace("let c = N + 1", "let c = N + 2"),
                                               use_cache=False))


def test_a_convention_change_invalidates_its_users(tmp_path):
    # spec: Precise rules → Names and order: conventions "substituted eagerly"; a cached value must
    # not survive a --set that changes it
    doc = tmp_path / "doc.md"
    text = "```derive\nconvention kappa = 2\nlet k = kappa\n```\n"
    from fractions import Fraction
    build_at(doc, text)
    changed = build_at(doc, text, overrides={"kappa": Fraction(3)})
    assert changed.values["k"].text == "3"


def test_no_cache_bypasses_the_cache(tmp_path):
    # spec: Command line: --no-cache
    doc = tmp_path / "doc.md"
    build_at(doc)
    again = build_at(doc, use_cache=False)
    assert not any(s.cached for s in again.steps)


def test_no_cache_writes_no_cache_folder(tmp_path):
    # spec: Command line: --no-cache (nothing is read or written)
    build_at(tmp_path / "doc.md", use_cache=False)
    assert not (tmp_path / CACHE_DIR).exists()


def test_the_cache_folder_sits_beside_the_document(tmp_path):
    # spec: Precise rules → JSON and command line: "the cache folder sits beside the document"
    sub = tmp_path / "deep" / "er"
    sub.mkdir(parents=True)
    build_at(sub / "twisted.md")
    assert cache_file(sub, "twisted.md").is_file()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["deep"]


def test_the_cache_is_plain_json_and_not_executable(tmp_path):
    # spec: Precise rules → JSON and command line (cache); customer rule: documents are data, so the
    # cache holds data only
    build_at(tmp_path / "doc.md")
    for path in (tmp_path / CACHE_DIR).rglob("*"):
        if path.is_file():
            json.loads(path.read_text(encoding="utf-8"))
            assert not path.stat().st_mode & (stat.S_IXUSR | stat.S_IXGRP | stat.S_IXOTH)
            assert b"pickle" not in path.read_bytes() and not path.read_bytes().startswith(b"\x80")


@pytest.mark.parametrize("garbage", [b"", b"{", b"\x80\x04not json", b"[1, 2]", b'{"format": 99}',
                                     b'{"format": 1, "entries": [1, 2]}', b'"text"'])
def test_a_corrupt_cache_file_is_ignored(tmp_path, garbage):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    doc = tmp_path / "doc.md"
    reference = to_json(build_at(doc, use_cache=False))
    build_at(doc)
    cache_file(tmp_path).write_bytes(garbage)
    assert to_json(build_at(doc)) == reference
    json.loads(cache_file(tmp_path).read_text())  # rewritten whole


def _damaged_builds(tmp_path, mutate, resign=True):
    """The record of a build over a cache whose entry for ``a`` ``mutate`` damaged, and the
    reference.  With ``resign`` the damaged entry is signed again with the user's own key: it
    then stands for an entry this user's builds wrote (say, an older anomark) that is still
    not what this version reads."""
    doc = tmp_path / "doc.md"
    reference = to_json(build_at(doc, use_cache=False))
    build_at(doc)
    data = json.loads(cache_file(tmp_path).read_text())
    key = next(k for k, e in data["entries"].items() if "a" in e["entry"]["outputs"])
    signed = data["entries"][key]
    mutate(signed["entry"])
    if resign:
        signed["mac"] = sign(signing_key(), key, signed["entry"])
    cache_file(tmp_path).write_text(json.dumps(data))
    return reference, build_at(doc)


def _set(path, value):
    def mutate(entry):
        target = entry
        for part in path[:-1]:
            target = target[part]
        target[path[-1]] = value
    return mutate


@pytest.mark.parametrize("mutate", [
    _set(("outputs", "a", "element", "den"), [[{}, "0"]]),
    _set(("outputs", "a", "element", "terms"), "nonsense"),
    _set(("outputs", "a"), {"expr": {"symbol": "nosuch"}}),
    _set(("checks",), "abc"),
    _set(("checks",), [{"what": 1}]),
    _set(("plot",), {"variable": "x"}),
    lambda entry: entry.clear(),
], ids=["zero-den", "terms", "expr-symbol", "checks-str", "checks-keys", "plot", "empty"])
def test_a_corrupt_entry_is_ignored(tmp_path, mutate):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    reference, report = _damaged_builds(tmp_path, mutate)
    assert to_json(report) == reference


def test_an_entry_with_an_unknown_status_is_ignored(tmp_path):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    reference, report = _damaged_builds(tmp_path, lambda e: e["checks"][0].update(status="nonsense"))
    assert to_json(report) == reference


def test_an_entry_missing_an_output_is_ignored(tmp_path):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    reference, report = _damaged_builds(tmp_path, lambda e: e["outputs"].clear())
    assert to_json(report) == reference


@pytest.mark.parametrize("mutate", [
    lambda e: e["checks"][0].update(detail=5),
    lambda e: e["values"][0].update(text=None),
    _set(("outputs", "a", "element", "den"), [[{}, "1/0"]]),
    _set(("table",), {"names": 1, "cells": 2, "text_rows": 3}),
], ids=["detail-int", "text-none", "den-1/0", "table-ints"])
def test_an_entry_with_wrong_types_is_ignored(tmp_path, mutate):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    reference, report = _damaged_builds(tmp_path, mutate)
    assert to_json(report) == reference and to_html(report)


def test_split_order_error_survives_a_warm_build(tmp_path):
    # spec: Precise rules → Classes: "split must come before any value mentions the split bundle's
    # classes"; the cache "is never needed for correctness"
    text = ("```derive\nbundle NW: real, rank 5\nbundle L1, L2: line\nlet a = p1(NW)\n"
            "split NW = L1 + L2 + trivial(1)\nlet b = p1(NW)\n```\n")
    doc = tmp_path / "doc.md"
    cold = build_at(doc, text)
    warm = build_at(doc, text)
    assert cold.steps[3].status == "error"
    assert to_json(warm) == to_json(cold)


def test_seeded_results_do_not_depend_on_the_cache(tmp_path, monkeypatch):
    # spec: Precise rules → Operations: sampling "seeded from the document's path and the statement's
    # line"; the cache "is never needed for correctness"
    monkeypatch.chdir(tmp_path)
    text = "```derive\nsymbol I\ncheck I^2 == -1\n```\n"
    (tmp_path / "w.md").write_text(text)
    build("w.md", text, BuildOptions())
    warm = build("./w.md", text, BuildOptions())
    cold = build("./w.md", text, BuildOptions(use_cache=False))
    assert warm.steps[-1].checks[0].detail == cold.steps[-1].checks[0].detail


def test_a_read_only_folder_still_builds(tmp_path):
    # spec: Precise rules → JSON and command line: the cache "is never needed for correctness"
    if os.geteuid() == 0:
        pytest.skip("root ignores folder permissions")
    doc = tmp_path / "doc.md"
    doc.write_text(DOC)
    tmp_path.chmod(0o555)
    try:
        assert build(str(doc), DOC, BuildOptions()).passed
    finally:
        tmp_path.chmod(0o755)


def test_entries_are_kept_for_unchanged_steps_only(tmp_path):
    # spec: cache entries are plain step outcomes; a rebuild writes the entries of this build
    doc = tmp_path / "doc.md"
    build_at(doc)
    first = set(json.loads(cache_file(tmp_path).read_text())["entries"])
    build_at(doc, DOC.replace("let c = N + 1", "let c = N + 2"))
    second = set(json.loads(cache_file(tmp_path).read_text())["entries"])
    assert len(first) == len(second) == 11 and len(first & second) == 4  # a, b, the check of b, sqrt(x^2) check
