"""Reading a derivation file: front matter, prose runs, derive blocks and
``@{NAME}`` references, all at exact file positions (rules of the format's
contract in the spec, "Front matter", "Prose" and "Precise rules"; Markdown
behaviour per CommonMark — common practice, no source)."""
from __future__ import annotations

from fractions import Fraction

import pytest

from compiler.document import Block, ProsePart, Ref, read_document
from compiler.errors import DocumentError
from compiler.front_matter import ConventionEntry, FrontMatter
from compiler.markdown import make_markdown


def read(text: str):
    return read_document("doc.md", text)


def errors(text: str):
    with pytest.raises(DocumentError) as info:
        read(text)
    return [(p.location.path, p.location.line, p.location.column, p.message)
            for p in info.value.problems]


def blocks(doc):
    return [p for p in doc.parts if isinstance(p, Block)]


def prose(doc):
    return [p for p in doc.parts if isinstance(p, ProsePart)]


# ---------------------------------------------------------------- blocks


DOC = """\
---
title: Anomaly of a twisted compactification
authors: [A. Writer, B. Reader]
date: 2024-01-05
abstract: |
  Two lines
  of abstract.
truncate: 8
conventions:
  angular_integral: 2
  half: "1/2"
  neg: "-3"
  big: -7
---
# Setup

We compute @{I8}.

```derive
symbol N: integer, positive
let I8 = N
```

Code `@{notref}` and more @{I8} text.

```python
let x = @{alsonot}
```

~~~derive   with extra words
let I6 = 2*I8
~~~
Tail.
"""


def test_front_matter_fields():
    front = read(DOC).front
    assert front == FrontMatter(
        title="Anomaly of a twisted compactification",
        authors=("A. Writer", "B. Reader"),
        date="2024-01-05",
        abstract="Two lines\nof abstract.\n",
        truncate=8,
        conventions=(ConventionEntry("angular_integral", Fraction(2), 10, 3),
                     ConventionEntry("half", Fraction(1, 2), 11, 3),
                     ConventionEntry("neg", Fraction(-3), 12, 3),
                     ConventionEntry("big", Fraction(-7), 13, 3)),
        line=1,
    )


def test_parts_in_order_with_exact_lines():
    doc = read(DOC)
    assert [type(p).__name__ for p in doc.parts] == [
        "ProsePart", "Block", "ProsePart", "Block", "ProsePart"]
    assert doc.path == "doc.md"
    first, second, third = prose(doc)
    assert (first.line, first.markdown) == (15, "# Setup\n\nWe compute @{I8}.\n")
    assert second.line == 23
    assert second.markdown.startswith("\nCode `@{notref}`")
    assert "```python\nlet x = @{alsonot}\n```" in second.markdown
    assert (third.line, third.markdown) == (33, "Tail.\n")


def test_derive_blocks_text_and_first_content_line():
    one, two = blocks(read(DOC))
    assert one == Block("symbol N: integer, positive\nlet I8 = N\n", 20)
    assert two == Block("let I6 = 2*I8\n", 31)


@pytest.mark.parametrize("info, derive", [
    ("derive", True), ("derive extra words", True), ("  derive", True),
    ("derived", False), ("python", False), ("", False), ("Derive", False),
    ("python derive", False),
])
def test_a_block_is_derive_when_the_first_info_word_is_derive(info, derive):
    doc = read(f"Intro.\n\n```{info}\nlet a = 1\n```\n")
    assert bool(blocks(doc)) is derive
    if not derive:
        (only,) = doc.parts
        assert "let a = 1" in only.markdown


def test_empty_and_unclosed_derive_blocks():
    doc = read("```derive\n```\n")
    assert doc.parts == (Block("", 2),)
    doc = read("text\n\n```derive\nlet a = 1\n")  # CommonMark: runs to the end
    assert doc.parts[1] == Block("let a = 1\n", 4)


def test_blank_prose_between_blocks_is_dropped():
    doc = read("```derive\nlet a = 1\n```\n\n\n```derive\nlet b = 2\n```\n")
    assert doc.parts == (Block("let a = 1\n", 2), Block("let b = 2\n", 7))


def test_crlf_keeps_line_numbers():
    doc = read("Intro @{a}\r\n\r\n```derive\r\nlet a = 1\r\n```\r\n")
    assert doc.parts[0].refs == (Ref("a", 1, 7),)
    assert doc.parts[1] == Block("let a = 1\n", 4)


def test_no_front_matter_gives_defaults():
    doc = read("Just prose.\n")
    assert doc.front == FrontMatter()
    assert doc.front.truncate == 12 and doc.front.line == 0
    assert doc.parts == (ProsePart("Just prose.\n", 1, ()),)


def test_empty_front_matter():
    doc = read("---\n---\nHello\n")
    assert doc.front == FrontMatter(line=1)
    assert doc.parts == (ProsePart("Hello\n", 3, ()),)


def test_single_author_without_brackets():
    assert read("---\nauthors: A. Writer\n---\n").front.authors == ("A. Writer",)


# ---------------------------------------------------------------- refs


def test_refs_in_prose_but_not_in_code():
    doc = read(DOC)
    first, second, _ = prose(doc)
    assert first.refs == (Ref("I8", 17, 12),)
    assert second.refs == (Ref("I8", 24, 27),)


def test_ref_positions_in_containers_and_headings():
    text = (
        "# Title @{a}\n"          # 1
        "\n"
        "> quoted @{b} and @{c}\n"  # 3
        "\n"
        "- item `@{x}` @{d}\n"    # 5
        "  continued @{e}\n"      # 6
        "\n"
        "Setext @{f}\n"           # 8
        "======\n"
        "\n"
        "    @{indented_code}\n"  # 11
        "\n"
        "Math $@{m}$ and $$@{mm}$$ \\@{escaped} and @{g}.\n"  # 13: math splices values too
        "Not a name: @{1x} @{ a } @{}\n"  # 14
    )
    (part,) = read(text).parts
    assert part.refs == (
        Ref("a", 1, 9), Ref("b", 3, 10), Ref("c", 3, 19), Ref("d", 5, 15), Ref("e", 6, 13),
        Ref("f", 8, 8), Ref("m", 13, 7), Ref("mm", 13, 19), Ref("g", 13, 43),
    )


def test_ref_after_same_line_code_span_with_marker():
    (part,) = read("A `@{x}` then @{y} and `@{z}` @{w}\n").parts
    assert part.refs == (Ref("y", 1, 15), Ref("w", 1, 31))


def test_ref_after_a_block_is_positioned_in_the_file():
    doc = read("```derive\nlet a = 1\n```\n\n\nWe have @{a}.\n")
    assert doc.parts[1].refs == (Ref("a", 6, 9),)


def test_prose_run_starting_with_a_rule_is_not_front_matter():
    doc = read("```derive\nlet a = 1\n```\n---\nafter @{a}\n\n---\n")
    part = doc.parts[1]
    assert part.refs == (Ref("a", 5, 7),)
    assert [t.type for t in make_markdown().parse(part.markdown)][0] == "hr"


# ---------------------------------------------------------------- front matter errors


def test_unknown_keys_are_errors_at_their_lines():
    assert errors("---\ntitle: x\ntitel: y\nfoo: 1\n---\ntext\n") == [
        ("doc.md", 3, 1, "unknown front matter key 'titel'; did you mean 'title'?"),
        ("doc.md", 4, 1, "unknown front matter key 'foo' (allowed: title, authors, date, "
                         "abstract, truncate, conventions, notation, results)"),
    ]


@pytest.mark.parametrize("text, line, column, start", [
    ("---\ntitle: x\nauthors: [a, b\n---\n", 3, 15, "front matter is not valid YAML"),
    ("---\ntitle: x\n  bad: indent\n---\n", 3, 6, "front matter is not valid YAML"),
    ("---\ntitle: x\n\tfoo: 1\n---\n", 3, 1, "front matter is not valid YAML"),
    ("---\ntruncate: 7\n---\n", 2, 11, "'truncate' must be an even positive integer, not 7"),
    ("---\ntruncate: -2\n---\n", 2, 11, "'truncate' must be an even positive integer"),
    ("---\ntruncate: 8.0\n---\n", 2, 11, "'truncate' must be an even positive integer"),
    ("---\ntruncate: eight\n---\n", 2, 11, "'truncate' must be an even positive integer"),
    ("---\nconventions:\n  a: 0.5\n---\n", 3, 6, "decimals are not allowed"),
    ("---\nconventions:\n  a: \"1/0\"\n---\n", 3, 6, "convention 'a' divides by zero"),
    ("---\nconventions:\n  a: [1]\n---\n", 3, 6, "convention 'a' must be a rational number"),
    ("---\nconventions:\n  a: \"x\"\n---\n", 3, 6, "convention 'a' must be a rational number"),
    ("---\nconventions:\n  a: true\n---\n", 3, 6, "convention 'a' must be a rational number"),
    ("---\nconventions:\n  2x: 1\n---\n", 3, 3, "convention name '2x' is not an identifier"),
    ("---\nconventions:\n  let: 1\n---\n", 3, 3, "'let' is a statement word"),
    ("---\nconventions:\n  a: 1\n  a: 2\n---\n", 4, 3, "convention 'a' given twice"),
    ("---\nconventions: 3\n---\n", 2, 14, "'conventions' must map names"),
    ("---\ntitle: a\ntitle: b\n---\n", 3, 1, "front matter key 'title' given twice"),
    ("---\ntitle: [a]\n---\n", 2, 8, "'title' must be text"),
    ("---\nauthors: {a: 1}\n---\n", 2, 10, "'authors' must be a list of names"),
    ("---\n- a\n- b\n---\n", 2, 1, "front matter must be 'key: value' lines"),
    ("---\ntitle: x\n", 1, 1, "front matter opened here is never closed with '---'"),
])
def test_front_matter_errors(text, line, column, start):
    (found,) = errors(text)
    assert found[:3] == ("doc.md", line, column)
    assert found[3].startswith(start)


def test_all_front_matter_problems_are_reported_together():
    found = errors("---\ntruncate: 3\nconventions:\n  a: 0.25\nbogus: 1\n---\n")
    assert [f[1] for f in found] == [2, 4, 5]


# ---------------------------------------------------------------- the shared parser


def test_value_ref_tokens():
    tokens = make_markdown().parse("See @{I8} and `@{x}`.")
    children = tokens[1].children
    refs = [t for t in children if t.type == "value_ref"]
    assert [t.meta["name"] for t in refs] == ["I8"]
    assert refs[0].content == "@{I8}"
    assert any(t.type == "code_inline" and t.content == "@{x}" for t in children)


def test_math_tokens():
    tokens = make_markdown().parse("Inline $a^2$.\n\n$$\nb = @{c}\n$$\n")
    types = [t.type for t in tokens] + [c.type for t in tokens for c in (t.children or [])]
    assert "math_inline" in types and "math_block" in types
    assert "value_ref" not in types


def test_raw_html_is_text_unless_allowed():
    src = "Hi <script>alert(1)</script>\n\n<div>x</div>\n"
    safe = make_markdown().parse(src)
    assert not any(t.type.startswith("html") for t in safe)
    assert not any(c.type.startswith("html") for t in safe for c in (t.children or []))
    assert "&lt;script&gt;" in make_markdown().render(src)
    allowed = make_markdown(allow_html=True).parse(src)
    assert any(t.type == "html_block" for t in allowed)
    assert any(c.type == "html_inline" for t in allowed for c in (t.children or []))


def test_block_lines_carry_statement_positions_into_the_file():
    from compiler.statements.parser import parse_block

    doc = read(DOC)
    one, two = blocks(doc)
    assert [s.line for s in parse_block(one.text, one.line, doc.path)] == [20, 21]
    with pytest.raises(DocumentError) as info:
        parse_block("let x = 0.5\n", two.line, doc.path)
    assert str(info.value) == "doc.md:31:9: decimals are not allowed: write 1/2"
