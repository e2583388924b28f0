"""The language reference in docs/ is built, not just read.

Every ```derive block in docs/*.md is an example document of its own, and
every ```markdown block is a whole example document (front matter, prose,
nested derive blocks).  Each is checked through ``compiler.cli.main`` and
must exit 0, unless its info string says otherwise with ``exit=N``, in which
case it must exit exactly N (and, for 2, say where).  The reference must
also cover the language: every statement word and built-in function appears
in a built example, every front matter key is documented, and the README
links the reference.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import pytest
from markdown_it import MarkdownIt

from compiler import cli
from compiler.front_matter import KEYS as FRONT_MATTER_KEYS
from compiler.statements.words import BUILTIN_FUNCTIONS, STATEMENT_WORDS

ROOT = Path(__file__).resolve().parent.parent
DOCS = ROOT / "docs"
TOPICS = ("statements", "expressions", "fibers", "checks", "display", "front-matter",
          "conventions", "command-line", "cache", "preambles")
LOCATED = re.compile(r"^\S+:\d+:\d+: ", re.M)


@dataclass(frozen=True)
class Example:
    page: str
    line: int
    text: str  # a whole document
    exit: int

    @property
    def id(self) -> str:
        return f"{self.page}:{self.line}"


def _examples() -> list[Example]:
    found = []
    md = MarkdownIt("commonmark")
    for page in sorted(DOCS.glob("*.md")):
        for token in md.parse(page.read_text(encoding="utf-8")):
            words = token.info.split() if token.type == "fence" else []
            if not words or words[0] not in ("derive", "markdown"):
                continue
            marks = dict(w.split("=", 1) for w in words[1:] if "=" in w)
            text = token.content if words[0] == "markdown" else f"```derive\n{token.content}```\n"
            found.append(Example(page.name, token.map[0] + 1, text, int(marks.get("exit", 0))))
    return found


EXAMPLES = _examples()


@pytest.mark.parametrize("example", EXAMPLES, ids=[e.id for e in EXAMPLES])
def test_every_example_builds_with_its_stated_exit_status(example, tmp_path, capsys):
    doc = tmp_path / "example.md"
    doc.write_text(example.text, encoding="utf-8")
    status = cli.main(["check", str(doc), "--no-cache", "--quiet"])
    err = capsys.readouterr().err
    assert status == example.exit, f"{example.id} exited {status}, expected {example.exit}:\n{err}"
    if example.exit == 2:
        assert LOCATED.search(err), err
    assert "internal error" not in err


def _words(texts) -> set[str]:
    return {w for text in texts for w in re.findall(r"[A-Za-z][A-Za-z0-9_]*!?", text)}


def test_every_statement_word_is_used_by_a_passing_example():
    used = _words(e.text for e in EXAMPLES if e.exit == 0)
    missing = sorted(w for w in STATEMENT_WORDS if w not in used)
    assert not missing, f"statements with no passing example in docs/: {missing}"


def test_every_built_in_function_is_called_in_a_passing_example():
    calls = {m for e in EXAMPLES if e.exit == 0 for m in re.findall(r"([A-Za-z][A-Za-z0-9]*)\(", e.text)}
    builtins = set(BUILTIN_FUNCTIONS) | {"p1", "p2", "c1", "c2"}  # and the indexed classes
    missing = sorted(f for f in builtins if f not in calls)
    assert not missing, f"built-in functions with no passing example in docs/: {missing}"


def test_every_front_matter_key_is_documented():
    page = (DOCS / "front-matter.md").read_text(encoding="utf-8")
    missing = [key for key in FRONT_MATTER_KEYS if f"`{key}`" not in page]
    assert not missing, missing


def test_there_is_a_page_per_topic_and_the_readme_links_the_reference():
    index = (DOCS / "README.md").read_text(encoding="utf-8")
    for topic in TOPICS:
        assert (DOCS / f"{topic}.md").is_file(), topic
        assert f"({topic}.md)" in index, f"docs/README.md does not link {topic}.md"
    assert "(docs/README.md)" in (ROOT / "README.md").read_text(encoding="utf-8")


def test_a_failing_example_is_told_apart_from_a_passing_one():
    # the harness itself: both kinds exist, so a marker that stopped being read would show
    assert {e.exit for e in EXAMPLES} >= {0, 1, 2}
