"""Hostile and malformed input to the front end: located exit-2 problems,
never internal errors, and bounded work before any parsing starts.

The limits are the project's own choices (common practice, no source); YAML
integer forms are from the YAML 1.2 core schema (Ben-Kiki, Evans and döt Net,
"YAML Ain't Markup Language version 1.2", 2009), where ``010`` is decimal,
while YAML 1.1 readers take it as octal: so a leading zero is refused.
"""
from __future__ import annotations

from fractions import Fraction

import pytest

from compiler import names
from compiler.document import (MAX_DOCUMENT_SIZE, MAX_LINE_LENGTH, MAX_STATEMENT_LINES,
                               read_document)
from compiler.errors import DocumentError
from compiler.front_matter import MAX_YAML_DEPTH, MAX_YAML_DIGITS
from compiler.statements import clause_nodes as cn, expr_nodes as en, nodes as n, words
from compiler.statements.parser import parse_block
from compiler.statements.rules import MAX_RANK, RULES as PARSE_RULES
from compiler.statements.tree import Ident, walk
from support import parse_problem


def problems(text: str) -> list[tuple[int, int, str]]:
    with pytest.raises(DocumentError) as info:
        read_document("doc.md", text)
    return [(p.location.line, p.location.column, p.message) for p in info.value.problems]


# ---------------------------------------------------------------- front matter


def test_a_byte_order_mark_does_not_hide_the_front_matter():
    doc = read_document("doc.md", "\ufeff---\ntitle: T\nconventions:\n  k: 3\n---\ntext\n")
    assert doc.front.title == "T" and doc.front.conventions[0].value == 3
    assert problems("\ufeff---\ntitel: x\n---\n")[0][:2] == (2, 1)


@pytest.mark.parametrize("value", ["010", "-007", "0_1"])
def test_a_leading_zero_is_refused_not_read_as_octal(value):
    (found,) = problems(f"---\nconventions:\n  angular_integral: {value}\n---\n")
    assert found[:2] == (3, 21) and "leading zero is refused" in found[2]


@pytest.mark.parametrize("value", ["0x10", "0b11", "1_000", "1:30", '!!int "twelve"'])
def test_integers_are_plain_decimal(value):
    (found,) = problems(f"---\ntruncate: {value}\n---\n")
    assert found[:2] == (2, 11) and "'truncate' must be an even positive integer" in found[2]


def test_decimal_integers_are_read_as_decimal():
    doc = read_document("doc.md", "---\ntruncate: 10\nconventions:\n  k: -12\n---\n")
    assert doc.front.truncate == 10 and doc.front.conventions[0].value == Fraction(-12)


def test_a_huge_integer_is_a_located_error():
    (found,) = problems("---\nconventions:\n  k: " + "9" * 5000 + "\n---\n")
    assert found[:2] == (3, 6) and f"at most {MAX_YAML_DIGITS} digits" in found[2]
    (found,) = problems("---\ntruncate: " + "8" * 5000 + "\n---\n")
    assert found[:2] == (2, 11)


def test_deep_nesting_is_a_located_error():
    (found,) = problems("---\nauthors:\n" + " [\n" * 20000 + " ]\n" * 20000 + "---\n")
    assert found[:2] == (2 + MAX_YAML_DEPTH, 2)  # the root mapping is the first level
    assert f"nested more than {MAX_YAML_DEPTH} deep" in found[2]


def test_an_alias_is_refused_at_the_alias():
    text = "---\ntitle: &t [1, 2]\nabstract: x\ndate: *t\n---\n"
    (found,) = problems(text)
    assert found[:2] == (4, 7) and "aliases" in found[2]


def test_control_characters_in_a_key_are_escaped():
    (found,) = problems('---\n"\\e]0;owned\\a\\e[2J": 1\n---\n')
    assert "\x1b" not in found[2] and "\x07" not in found[2]
    assert "\\x1b]0;owned\\x07" in found[2]


# ---------------------------------------------------------------- fences


@pytest.mark.parametrize("info", ["Derive", "derived", "drive", "deriv", "DERIVE x"])
def test_a_near_miss_of_derive_is_a_located_warning(info):
    doc = read_document("doc.md", f"text\n\n  ```{info}\nlet a = 1\n  ```\n")
    (warning,) = doc.warnings
    word = info.split()[0]
    assert (warning.location.line, warning.location.column) == (3, 6)
    assert f"'{word}'" in warning.message and "did you mean 'derive'?" in warning.message
    assert not any(hasattr(part, "text") for part in doc.parts)  # still code, not compiled


@pytest.mark.parametrize("info", ["python", "", "diff", "derive"])
def test_other_fences_give_no_warning(info):
    assert read_document("doc.md", f"```{info}\nlet a = 1\n```\n").warnings == ()


# ---------------------------------------------------------------- bounded work


def test_a_long_line_is_refused_before_parsing():
    (found,) = problems("# title\n\nlet " + "x" * (5 * 1024 * 1024) + "\n")
    assert found[:2] == (3, MAX_LINE_LENGTH + 1) and str(MAX_LINE_LENGTH) in found[2]


def test_too_many_statements_are_refused_before_parsing():
    (found,) = problems("text\n\n```derive\n" + "show 1\n" * 100_000 + "```\n")
    assert found[:2] == (4 + MAX_STATEMENT_LINES, 1) and "limit on statements" in found[2]


def test_a_huge_document_is_refused_before_parsing():
    line = "x" * (MAX_LINE_LENGTH - 1) + "\n"
    (found,) = problems(line * (MAX_DOCUMENT_SIZE // len(line) + 5))
    assert found[:2] == (MAX_DOCUMENT_SIZE // len(line) + 1, 1)
    assert "limit on document size" in found[2]


def test_a_huge_rank_is_refused_at_parse_time():
    with pytest.raises(DocumentError) as info:
        parse_block("bundle T: real, rank 99999999999999", 1, "doc.md")
    assert str(info.value) == (f"doc.md:1:22: the rank is at most {MAX_RANK}, "
                               "not 99999999999999")
    (bundle,) = parse_block(f"bundle T: complex, rank {MAX_RANK}", 1, "doc.md")
    assert bundle.rank == MAX_RANK


@pytest.mark.parametrize("text, column, limit", [
    ("fiber F: dimension 100000", 20, "the fiber dimension is at most 64"),
    ("split T = trivial(100000)", 19, f"the rank of trivial(k) is at most {MAX_RANK}"),
])
def test_other_declared_sizes_are_bounded(text, column, limit):
    line, col, message = parse_problem(text)
    assert (line, col) == (1, column) and message.startswith(limit)


def test_did_you_mean_stops_after_the_first_problems():
    text = "symbol kappa\n" + "".join(f"let a{i} = kapa\n" for i in range(names.MAX_SUGGESTIONS + 5))
    with pytest.raises(DocumentError) as info:
        names.resolve("doc.md", parse_block(text, 1, "doc.md"), [], [])
    hinted = ["did you mean" in p.message for p in info.value.problems]
    assert hinted == [True] * names.MAX_SUGGESTIONS + [False] * 5


# ---------------------------------------------------------------- identifiers and tables


def test_identifiers_carry_their_positions():
    (s,) = parse_block("substitute a: x = 1 -> b", 4, "doc.md")
    (out,) = s.outputs
    assert isinstance(out, Ident) and (out, out.line, out.column) == ("b", 4, 24)
    with pytest.raises(AttributeError):
        out.line = 1


def test_walk_finds_every_identifier_in_source_order():
    (s,) = parse_block("check a + p1(T) == b for N = 2..3", 1, "doc.md")
    found = [(str(i), i.column) for i, _ in walk(s) if isinstance(i, Ident)]
    assert found == [("a", 7), ("T", 14), ("b", 20), ("N", 26)]


def test_the_tables_cover_every_statement():
    assert set(PARSE_RULES) == words.STATEMENT_WORDS
    statement_types = set(n.Statement.__args__)
    assert set(names.RULES) == statement_types


def test_references_and_bindings_come_from_the_names_table():
    (s,) = parse_block("integrate I8 over S4 -> I6", 1, "doc.md")
    assert names.references(s) == ["I8", "S4"] and names.bound_names(s) == ["I6"]


# ---------------------------------------------------------------- relations between symbols


def test_symbol_relations_are_parsed_beside_literal_bounds():
    (s,) = parse_block("symbol Nf: integer, Nc < Nf < 3*Nc, Nf >= 2", 1, "doc.md")
    assert s.bounds == (cn.Bound("Nf", ">=", Fraction(2), 1, 37),)
    (low, high) = s.relations
    assert (low.lhs, low.op, low.rhs, low.line, low.column) == (
        en.Name("Nc", 1, 21), "<", en.Name("Nf", 1, 26), 1, 21)
    assert high.op == "<" and high.rhs == en.Binary("*", en.Num(Fraction(3), 1, 31),
                                                   en.Name("Nc", 1, 33), 1, 32)
    (q,) = parse_block("symbol q: integer, 0 < q < p", 1, "doc.md")
    assert q.bounds == (cn.Bound("q", ">", Fraction(0), 1, 20),)
    assert [(str(r.lhs.id), r.op, str(r.rhs.id)) for r in q.relations] == [("q", "<", "p")]


@pytest.mark.parametrize("text, column, start", [
    ("symbol q: q < p*r", 16, "a relation between symbols is linear"),
    ("symbol q: q < sqrt(p)", 15, "a relation between symbols is linear"),
    ("symbol q: p < 2*r", 11, "a bound on 'p', which this statement does not declare"),
    ("symbol q: q < p/r", 16, "a relation between symbols divides only by a number"),
    ("symbol q: q < p/0", 16, "division by zero"),
    ("symbol q: 2 < 3", 11, "a bound needs a symbol"),
    ("symbol q: q < 1 < p", 19, "a bound on 'p', which this statement does not declare"),
])
def test_bad_relations_are_located(text, column, start):
    line, col, message = parse_problem(text)
    assert (line, col) == (1, column) and message.startswith(start)


def test_a_relation_names_declared_symbols_only(tmp_path):
    from compiler.engine import BuildOptions, build

    text = "```derive\nsymbol Nc: integer\nsymbol Nf: integer, Nf > Nc, Nf > M\n```\n"
    with pytest.raises(DocumentError) as info:
        build(str(tmp_path / "doc.md"), text, BuildOptions(use_cache=False))
    found = [(p.location.line, p.location.column, p.message) for p in info.value.problems]
    assert [f[:2] for f in found] == [(3, 35)]
    assert "unknown name 'M'" in found[0][2]


# ---------------------------------------------------------------- layering


def _imports(path) -> set[str]:
    import ast

    tree = ast.parse(path.read_text())
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found |= {alias.name for alias in node.names}
        elif isinstance(node, ast.ImportFrom):
            found.add(node.module or "")
    return found


def test_the_front_end_keeps_its_import_directions():
    # architecture: statements never import sympy; the document reader does not
    # reach into the statement nodes (only the reserved words)
    from pathlib import Path

    root = Path(__file__).resolve().parent.parent / "compiler"
    for path in (root / "statements").glob("*.py"):
        assert not any(m.split(".")[0] == "sympy" for m in _imports(path)), path
    for name in ("document.py", "front_matter.py", "markdown.py"):
        imported = _imports(root / name)
        assert not any(m.startswith("compiler.statements") and m != "compiler.statements.words"
                       for m in imported), name
