"""Documents are data: they cannot run code, read files or put script into a
report (customer rule "Documents are data"; spec, "Prose": "a shared report
must not run a stranger's script", and "Precise rules → Prose and front
matter").

Code-shaped input must be refused with a located document error, never an
internal error and never evaluated; the proof that nothing ran is a canary
file the payloads would create or read.
"""
from __future__ import annotations

import json
from pathlib import Path

import pytest

from compiler.engine.cache import CACHE_DIR
from compiler.errors import DocumentError
from compiler.render.html import to_html
from compiler.render.json import to_json
from compiler.render.tex import to_tex
from support import compile_text

SECRET = "TOPSECRET-7f3a9c"


def compile_doc(folder: Path, text: str, **options):
    return compile_text(folder / "doc.md", text, **options)


@pytest.fixture
def sandbox(tmp_path):
    """A document folder with a secret file beside it (outside the folder) and a canary path."""
    (tmp_path / "secret.txt").write_text(SECRET)
    folder = tmp_path / "doc"
    folder.mkdir()
    return folder


PAYLOADS = [
    "__import__('os').system('touch CANARY')",
    "__import__",
    "N.__class__",
    "N.__class__.__mro__",
    "p1(T).real",
    "lambda: 1",
    "[x for x in N]",
    "(x for x in N)",
    "{N: 1}",
    "'abc'",
    '"abc"',
    "eval('1')",
    "exec(N)",
    "open(N)",
    "getattr(N, N)",
    "__builtins__",
    "_N",
    "N; import os",
    "N if N else 1",
    "N[0]",
    "N % 2",
    "N // 2",
    "N @ N",
    "`N`",
    "N.__dict__",
    "p1(T.__class__)",
    "Symbol(N)",
    "S('x')",
    "0x10",
    "1_000",
    "N\u00a0+ 1",
    "ñ",
]


@pytest.mark.parametrize("payload", PAYLOADS)
def test_code_in_an_expression_is_a_located_document_error(sandbox, payload):
    # customer rule: never eval document text; spec: Precise rules → Lexing and grammar (identifiers
    # are ASCII [A-Za-z][A-Za-z0-9_]*, no strings, no attribute access); Command line: FILE:LINE:COL
    text = f"```derive\nsymbol N\nbundle T: real, rank 4\nlet v = {payload}\n```\n"
    with pytest.raises(DocumentError) as info:
        compile_doc(sandbox, text)
    assert info.value.location.line == 4 and info.value.location.column >= 9
    assert not list(sandbox.parent.rglob("CANARY"))


@pytest.mark.parametrize("statement", ["import os", "exec N", "def f(x): return x", "os.system(1)",
                                       "let v = 1 ; let w = 2", "__import__('os')", "print(1)"])
def test_code_as_a_statement_is_a_document_error(sandbox, statement):
    # spec: Statements: one statement per line, only statement words; customer rule: documents are data
    with pytest.raises(DocumentError) as info:
        compile_doc(sandbox, f"```derive\nsymbol N\n{statement}\n```\n")
    assert info.value.location.line == 3


@pytest.mark.parametrize("line", ["symbol __class__", "bundle __init__: line", "let __x = 1",
                                  "symbol N: __import__", "convention _x = 1"])
def test_dunder_and_underscore_names_are_refused(sandbox, line):
    # spec: Precise rules → Lexing and grammar: identifiers start with a letter
    with pytest.raises(DocumentError):
        compile_doc(sandbox, f"```derive\n{line}\n```\n")


def test_front_matter_cannot_construct_python_objects(sandbox):
    # spec: Front matter is YAML with known keys only; customer rule: documents are data
    text = ("---\ntitle: !!python/object/apply:os.system ['touch CANARY']\n---\n"
            "```derive\nsymbol N\n```\n")
    with pytest.raises(DocumentError):
        compile_doc(sandbox, text)
    assert not list(sandbox.parent.rglob("CANARY"))


# ---------------------------------------------------------------- raw HTML

HOSTILE = """---
title: "<script>alert('t')</script>"
authors: ["<img src=x onerror=alert(2)>"]
abstract: "<b onmouseover=alert(3)>x</b>"
---

Hello <script>alert(1)</script> and <img src=x onerror="alert(1)">.

<div onclick="alert(4)">block html</div>

<script>
alert(5)
</script>

```derive
symbol N
let a = N
```
"""


def test_raw_html_is_escaped_by_default(sandbox):
    # spec: Precise rules → Prose and front matter: "Raw HTML in prose is escaped and shown as text
    # (exit 0) unless --allow-html is given"
    report = compile_doc(sandbox, HOSTILE)
    assert report.passed
    html = to_html(report)
    lowered = html.lower()
    assert "<script" not in lowered
    assert "<img" not in lowered and "<div onclick" not in lowered
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in html  # shown as text, not dropped


def test_allow_html_passes_prose_html_through(sandbox):
    # spec: Precise rules → Prose and front matter: "... unless --allow-html is given"
    html = to_html(compile_doc(sandbox, HOSTILE, allow_html=True))
    assert "<script>alert(1)</script>" in html and '<img src=x onerror="alert(1)">' in html
    # the title is front matter, not prose: still text
    assert "<title>&lt;script&gt;" in html


def test_allow_html_through_the_command_line(sandbox, anomark):
    # spec: Precise rules → Prose and front matter (--allow-html)
    doc = sandbox / "doc.md"
    doc.write_text(HOSTILE)
    plain = anomark("build", doc, "--no-cache")
    assert plain.returncode == 0 and "<script" not in (sandbox / "doc.html").read_text().lower()
    allowed = anomark("build", doc, "--no-cache", "--allow-html", "-o", sandbox / "allowed")
    assert allowed.returncode == 0 and "<script>alert(1)</script>" in (sandbox / "allowed" / "doc.html").read_text()


def test_markdown_links_cannot_carry_javascript(sandbox):
    # spec: Prose: "a shared report must not run a stranger's script" (javascript: URLs included)
    text = ("[click](javascript:alert(1)) [two](JAVASCRIPT:alert(2)) ![im](javascript:alert(3))\n\n"
            "```derive\nsymbol N\n```\n")
    html = to_html(compile_doc(sandbox, text)).lower()
    assert 'href="javascript:' not in html and 'src="javascript:' not in html


def test_math_cannot_smuggle_script(sandbox):
    # spec: Prose: math is rendered; a shared report must not run a stranger's script
    text = "$</math><script>alert(1)</script>$ and $$<script>x$$\n\n```derive\nsymbol N\n```\n"
    assert "<script" not in to_html(compile_doc(sandbox, text)).lower()


# ---------------------------------------------------------------- files

def test_a_document_cannot_make_the_tool_read_files_outside_its_folder(sandbox):
    # spec: there is no include statement; an image or reference path must not pull a file in
    text = ("![secret](../secret.txt) [s](../secret.txt) ![abs](%s)\n\n"
            "@{x}\n\n```derive\nsymbol N\nlet x = N\n```\n" % (sandbox.parent / "secret.txt"))
    report = compile_doc(sandbox, text)
    for output in (to_html(report), to_json(report), to_tex(report)):
        assert SECRET not in output


@pytest.mark.parametrize("ref", ["@{../secret.txt}", "@{/etc/passwd}", "@{secret.txt}"])
def test_crafted_reference_names_do_not_read_files(sandbox, ref):
    # spec: Prose: @{NAME} inserts a computed value; NAME is an identifier, never a path
    text = f"See {ref}.\n\n```derive\nsymbol N\n```\n"
    try:
        report = compile_doc(sandbox, text)
    except DocumentError:
        return
    for output in (to_html(report), to_json(report)):
        assert SECRET not in output and "root:" not in output


def test_a_bundle_or_fiber_named_like_a_file_reads_nothing(sandbox):
    # spec: Statements: names are identifiers; a name is never a path
    text = ("```derive\nbundle secret: real, rank 4\nfiber txt: surface, genus 2, tangent TS\n"
            "let v = p1(secret)\n```\n")
    report = compile_doc(sandbox, text)
    assert SECRET not in to_json(report) and SECRET not in to_html(report)


def test_the_cache_holds_json_only(sandbox):
    # spec: Precise rules → JSON and command line (cache beside the document); customer rule:
    # documents are data, so the cache is data too
    compile_doc(sandbox, HOSTILE.replace("let a = N", "let a = N\ncheck a == N"), use_cache=True)
    files = [p for p in (sandbox / CACHE_DIR).rglob("*") if p.is_file()]
    assert files
    for path in files:
        data = json.loads(path.read_text(encoding="utf-8"))
        assert isinstance(data, dict) and SECRET not in path.read_text()
